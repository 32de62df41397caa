"""Command line: parse, call the core, format, exit.

Exit status: 0 success, 2 an input error (one line on stderr, no traceback),
1 an unexpected internal failure.  Heavy imports (scipy fits, Textual) happen
only inside the commands that need them.
"""

from __future__ import annotations

import argparse
import math
import shutil
import sys
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from . import __version__
from .errors import InputError, InteractError
from .files import read_text

if TYPE_CHECKING:
    from .kinetics.binding import BindingPrediction

__all__ = ["main"]

FORMATS = ("text", "json", "markdown")
FORCE_HELP = "replace a read-only output file (it stays read-only); without it a read-only file is left unchanged"


def _stdout(path: str | None) -> bool:
    """True when output goes to standard output: no ``-o``, or ``-o -`` (the usual convention)."""
    return not path or path == "-"


def _out(text: str, path: str | None = None, args: argparse.Namespace | None = None) -> None:
    if not _stdout(path):
        assert path is not None
        from .files import write_file

        write_file(path, text, field="--output", inputs=_inputs(args), force=bool(getattr(args, "force", False)))
        _said_written(path)
    else:
        sys.stdout.write(text)


def _said_written(path: str | Path, what: str = "output") -> None:
    """Every command that writes a file says where (on standard error, so standard output stays the result)."""
    sys.stderr.write(f"interact: {what} written to {Path(path).resolve()}\n")


#: the arguments that name files a command reads; no output of the same run may overwrite one of them
_INPUT_ARGS = ("scenario", "data", "perpetrators", "victims", "spec", "rules", "into")


def _inputs(args: argparse.Namespace | None) -> tuple[str | None, ...]:
    return tuple(getattr(args, name, None) for name in _INPUT_ARGS) if args is not None else ()


def _check_outputs(args: argparse.Namespace) -> None:
    """Refuse, before any work, an output path the writer would refuse (an input, a folder, a device, read-only)."""
    from .files import check_target

    force = bool(getattr(args, "force", False))
    output, plot, into = (getattr(args, name, None) for name in ("output", "plot", "into"))
    if output and not _stdout(output):  # "-o -" is standard output, not a file
        check_target(output, field="--output", inputs=_inputs(args), force=force)
    if plot:
        check_target(plot, field="--plot", inputs=(*_inputs(args), output), force=force)
    if into:
        check_target(into, field="--into", inputs=(getattr(args, "data", None), output, plot), force=force)


def _cmd_assess(args: argparse.Namespace) -> int:
    from .assessment import assess
    from .report.assessment import format_assessment
    from .scenario import demo_path, load_scenario

    path = demo_path() if args.command == "demo" else Path(args.scenario)
    result = assess(load_scenario(path), rules=args.rules, warn=False)
    course, note = _assess_time_course(result, args)
    _out(format_assessment(result, args.format, width=args.width, time_course=course, time_course_note=note), args.output, args)
    return 0


# -- time course (interact.dynamic): a block of its own
def _assess_time_course(result, args: argparse.Namespace):  # type: ignore[no-untyped-def]
    """The time course for ``assess``: computed for time-dependent inhibition or induction ("auto"), or on request."""
    choice = getattr(args, "time_course", "off")
    wanted = choice == "on" or (choice == "auto" and ({"time-dependent", "induction"} & set(result.prediction.mechanisms)))
    if not wanted:
        return None, ""
    from .dynamic import simulate

    try:
        return simulate(result, days=args.days, warn=False), ""
    except InputError as exc:
        if choice == "on":
            raise
        return None, f"Not computed: {exc}. Add it to the scenario to see when the interaction starts and fades."


def _cmd_timecourse(args: argparse.Namespace) -> int:
    from .assessment import assess
    from .dynamic import simulate
    from .report.timecourse import format_timecourse
    from .scenario import load_scenario

    result = assess(load_scenario(Path(args.scenario)), rules=args.rules, warn=False)
    course = simulate(
        result,
        days=args.days,
        washout_days=args.washout_days,
        mode="constant" if args.constant else "regimen",
        effect_fraction=args.fraction,
        warn=False,
    )
    if args.plot:
        plot_inputs = (*_inputs(args), args.output)
        from .report.figures import save_figure, timecourse_figure

        figure = timecourse_figure(course, title=result.scenario.title, terms=result.rules.terms)
        suffix = Path(args.plot).suffix.lower()
        fmt = suffix.lstrip(".") if suffix in (".png", ".pdf") else "svg"  # SVG under any other name, as it always was
        save_figure(figure, args.plot, field="--plot", inputs=plot_inputs, force=args.force, fmt=fmt)
        _said_written(args.plot, "plot")
    _out(format_timecourse(course, result, args.format, width=args.width), args.output, args)
    return 0


def _cmd_fit_mechanism(args: argparse.Namespace) -> int:
    """Fit time-dependent inhibition (kinact, KI) or induction (Emax, EC50) data; optionally carry them into a scenario."""
    import datetime

    from .files import write_file
    from .kinetics.carry import parse_fold_change_csv, parse_preincubation_csv
    from .kinetics.scenario_update import carry_constants_text
    from .report.mechanism_fits import format_mechanism_fit

    path = Path(args.data)
    text = read_text(path, "data")
    if args.fu_inc is not None and not 0 < args.fu_inc <= 1:
        raise InputError("--fu-inc", args.fu_inc, "is not in (0, 1]")
    fu = 1.0 if args.fu_inc is None else args.fu_inc
    today = datetime.date.today().isoformat()
    values: dict[str, object]
    result: Any  # an InactivationFit or an InductionFit
    if args.command == "fit-tdi":
        from .kinetics.inactivation import fit_inactivation_raw

        data = parse_preincubation_csv(text, source=path.name)
        c = data.columns
        result = fit_inactivation_raw(
            c["inhibitor"], c["time"], c["activity"], subtract_vehicle=not args.keep_vehicle, weighted=args.weighted
        )
        ok = result.success and math.isfinite(result.ki.value) and result.ki.value > 0
        # the in vitro KI goes in as measured; its binding goes beside it (fu_inc_ki_inact), so nothing is corrected twice
        values = {"kinact": f"{result.kinact.value:.6g} 1/min", "ki_inact": f"{result.ki.value:.6g} uM"}
        if args.fu_inc is not None:
            values["fu_inc_ki_inact"] = float(f"{fu:.6g}")
        intervals = {"kinact": (result.kinact, "1/min", 1.0), "ki_inact": (result.ki, "uM", 1.0)}
        what = "kinact/KI hyperbola"
    else:
        from .kinetics.induction import fit_induction

        data = parse_fold_change_csv(text, source=path.name)
        c = data.columns
        result = fit_induction(c["concentration"], c["fold_change"], hill=args.hill)  # type: ignore[assignment]
        ok = result.success and result.ec50.value > 0
        values = {"emax": float(f"{result.emax.value:.6g}"), "ec50": f"{result.ec50.value:.6g} uM"}  # type: ignore[union-attr]
        if args.fu_inc is not None:
            values["fu_inc_ec50"] = float(f"{fu:.6g}")
        intervals = {"emax": (result.emax, "", 1.0), "ec50": (result.ec50, "uM", 1.0)}  # type: ignore[union-attr]
        what = "Emax model" + (" with Hill slope" if args.hill else "")
    _out(format_mechanism_fit(result, path.name, args.format, width=args.width), args.output, args)
    if args.into:
        if not args.target:
            raise InputError("--target", None, "is needed with --into: the enzyme, e.g. --target CYP3A")
        if not ok:
            raise InputError("fit", "not usable", "did not converge to finite constants; nothing was written")
        if getattr(result, "no_effect", ""):
            raise InputError("--into", args.into, f"was not updated: no induction shown ({result.no_effect})")
        if args.command == "fit-induction" and args.hill and result.hill is not None and abs(result.hill.value - 1) > 0.05:  # type: ignore[union-attr]
            raise InputError(
                "--hill", "fitted slope", "is not 1; the scenario's induction term assumes h = 1: refit without --hill to carry"
            )
        target = Path(args.into)
        scenario_text = _read_text(args.into, "--into")
        methods = []
        for key, (est, unit, factor) in intervals.items():
            ci = est.interval()
            if ci is None:
                continue
            low, high = ci[0] * factor, ci[1] * factor
            values[f"{key}_ci"] = [f"{low:.6g} {unit}", f"{high:.6g} {unit}"] if unit else [float(f"{low:.6g}"), float(f"{high:.6g}")]
            methods.append(f"{key}_ci 95% {ci[2]}")
        origin = (
            f"{what} fit of {path.name}"
            + (f", binding {fu:g} (--fu-inc)" if args.fu_inc is not None else "")
            + (f"; {', '.join(methods)}" if methods else "")
            + f", {today}"
        )
        new = carry_constants_text(
            scenario_text,
            target=args.target,
            values=values,
            origin=origin,
            source=str(target),
            remove=tuple(f"{key}_ci" for key in intervals),
        )
        write_file(target, new, field="--into", inputs=(args.data, args.output), force=args.force)
        shown = ", ".join(f"{k} = {v}" for k, v in values.items())
        sys.stderr.write(f"interact: {target} updated: {args.target} {shown}; origin recorded\n")
        if args.fu_inc is None:
            own = "fu_inc_ki_inact" if args.command == "fit-tdi" else "fu_inc_ec50"
            sys.stderr.write(
                f"interact: no --fu-inc given: the entry's {own}, else its fu_inc, else 1 (unbound) corrects the fitted constant\n"
            )
    return 0


def _days_arg(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number of days") from None
    if not (0 < value <= 365):
        raise argparse.ArgumentTypeError(f"{text!r} is outside (0, 365] days")
    return value


def _width_arg(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of characters") from None
    if not 40 <= value <= 1000:
        raise argparse.ArgumentTypeError(f"{text!r} is outside 40 to 1000 characters")
    return value


def _fraction_arg(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a fraction") from None
    if not (0 < value < 1):
        raise argparse.ArgumentTypeError(f"{text!r} is outside (0, 1), e.g. 0.9")
    return value


def _cmd_tables(args: argparse.Namespace) -> int:
    from .report.tables import format_tables

    _out(format_tables(args.rules, fmt_name=args.format), None)
    return 0


def _cmd_fm(args: argparse.Namespace) -> int:
    from .dosing import fm_from_observed_ratio
    from .report.numbers import fmt

    fm = fm_from_observed_ratio(args.observed, remaining_activity=args.remaining, gut_ratio=args.gut_ratio)
    sys.stdout.write(
        f"fm = {fmt(fm)}  (from observed AUCR {args.observed:g}, gut part {args.gut_ratio:g}, "
        f"activity left with the inhibitor {args.remaining:g}: fm = (1 - 1/AUCR_h) / (1 - a))\n"
        "Assumes the inhibitor blocks the enzyme to the stated degree; an incomplete block means a larger fm.\n"
    )
    return 0


def _cmd_new(args: argparse.Namespace) -> int:
    """Write the commented starter scenario (placeholder values) to FILE, never over an existing file."""
    from .scenario import loads_scenario, starter_path

    text = starter_path().read_text(encoding="utf-8")
    loads_scenario(text, source="starter scenario")  # the file written always loads
    if _stdout(args.file):
        sys.stdout.write(text)
        return 0
    target = Path(args.file)
    if target.exists() and not args.force:
        raise InputError("FILE", args.file, "already exists; choose another name (or --force to replace it)")
    _out(text, args.file, args)
    sys.stderr.write(f"interact: wrote {args.file}: its values are placeholders to replace; then run: interact assess {args.file}\n")
    return 0


def _cmd_open(args: argparse.Namespace) -> int:
    from .tui import run_app

    return run_app(args.scenario)


# -- uncertainty, batch screening, reports ------------------------------------------------------------


def _uncertainty_spec(args: argparse.Namespace):  # type: ignore[no-untyped-def]
    """The --spec file (if any) and --vary options merged: command-line values win."""
    from .uncertainty import UncertaintySpec, loads_spec, parse_vary

    spec = UncertaintySpec()
    if getattr(args, "spec", None):
        path = Path(args.spec)
        spec = loads_spec(read_text(path, "--spec"), source=str(path))
    vary = dict(spec.vary)
    for item in getattr(args, "vary", None) or []:
        path_, dist = parse_vary(item)
        vary[path_] = dist
    return spec, tuple(vary.items())


def _cmd_uncertainty(args: argparse.Namespace) -> int:
    from .assessment import assess
    from .report.numbers import fmt
    from .report.uncertainty import format_uncertainty
    from .scenario import load_scenario
    from .uncertainty import ScenarioModel, run_uncertainty, sensitivity

    result = assess(load_scenario(Path(args.scenario)), rules=args.rules, warn=False)
    if args.list_inputs:
        model = ScenarioModel(result)
        lines = [f"{i.path}  {fmt(i.value, 4)} {i.unit}  ({i.label})".replace("  ()", "") for i in model.inputs(relevant_only=True)]
        _out("\n".join(lines) + "\n", args.output, args)
        return 0
    spec, vary = _uncertainty_spec(args)
    samples = args.samples if args.samples is not None else (spec.samples if spec.samples is not None else 10_000)
    seed = args.seed if args.seed is not None else (spec.seed if spec.seed is not None else 0)
    method = args.method or spec.method or "lhs"
    spread = run_uncertainty(
        result, vary, samples=samples, seed=seed, method=method, progress=_progress_bar("sampling") if samples >= 200_000 else None
    )
    sens = sensitivity(result, vary)
    _out(
        format_uncertainty(spread, sens, args.format, title=result.scenario.title, width=args.width, scenario=result.scenario),
        args.output,
        args,
    )
    return 0


def _progress_bar(label: str, stream=None):  # type: ignore[no-untyped-def]
    """A progress callback ``show(done, total)`` drawing a rich.progress bar on standard error, or None off a terminal.

    rich (installed with Textual) draws and clears the bar; the bar stops itself when ``done`` reaches ``total``.
    """
    stream = sys.stderr if stream is None else stream
    if not stream.isatty():
        return None
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TaskProgressColumn, TextColumn, TimeRemainingColumn

    progress = Progress(
        TextColumn(label),
        BarColumn(),
        TaskProgressColumn(),
        MofNCompleteColumn(),
        TimeRemainingColumn(),
        console=Console(file=stream),
        transient=True,
    )
    task = progress.add_task(label, total=None)
    started = False

    def show(done: int, total: int) -> None:
        nonlocal started
        if not started:
            progress.start()
            started = True
        progress.update(task, completed=done, total=total)
        if done >= total:
            progress.stop()

    return show


def _out_bytes(data: bytes, args: argparse.Namespace) -> None:
    from .files import write_file

    write_file(args.output, data, field="--output", inputs=_inputs(args), force=bool(getattr(args, "force", False)))


def _read_text(path: str, what: str) -> str:
    return read_text(path, what)


def _write_streamed(args: argparse.Namespace, write, binary: bool = False) -> int:  # type: ignore[no-untyped-def]
    """Call ``write(handle)``: to standard output, or through the one writer to ``args.output`` (bytes with ``binary``)."""
    from .files import open_output

    if _stdout(args.output):
        return int(write(sys.stdout))
    with open_output(args.output, field="--output", inputs=_inputs(args), force=args.force, binary=binary) as out:
        return int(write(out))


def _cmd_screen_batch(args: argparse.Namespace) -> int:
    import time

    from .batch import (
        STREAM_PAIRS,
        check_pair_budget,
        count_rows,
        evaluate_pairs,
        fits_in_memory,
        loads_perpetrators,
        loads_victims,
        read_table,
        stream_chunks,
        worst_pairs,
    )
    from .report.batch import write_parquet_chunks
    from .tables import load_rules

    t0 = time.perf_counter()
    rules = load_rules(args.rules)
    _check_screen_options(args)
    fmt_name = _screen_format(args)
    p_sheet, v_sheet = args.sheet, args.victim_sheet or args.sheet
    p_table, v_table = read_table(args.perpetrators, "perpetrators"), read_table(args.victims, "victims")
    counted = (
        count_rows(p_table, args.perpetrators, "perpetrator", sheet=p_sheet),
        count_rows(v_table, args.victims, "victim", sheet=v_sheet),
    )
    # beyond memory, the worst pairs (--top) and Parquet are streamed in chunks of perpetrators; anything else is refused
    streamed = (
        not fits_in_memory(*counted) and args.engine == "local" and args.samples is None and (args.top is not None or fmt_name == "parquet")
    )
    if not streamed:
        check_pair_budget(*counted)  # before reading
    perps = loads_perpetrators(p_table, rules, source=args.perpetrators, on_error=args.on_error, sheet=p_sheet)
    victims = loads_victims(v_table, source=args.victims, on_error=args.on_error, sheet=v_sheet)
    for problem in (*perps.skipped, *victims.skipped):
        sys.stderr.write(f"interact: skipped {problem}\n")
    n = len(perps.rows) * len(victims.rows)
    bar = _progress_bar("screening") if n >= 200_000 and not args.quiet else None
    streamed = streamed and not fits_in_memory(len(perps.rows), len(victims.rows))  # rows left out may make it fit
    if args.samples is not None:  # a probabilistic screen
        rows = _probabilistic_screen(args, perps, victims, rules, fmt_name, bar)
        _say_written(args, n, rows, t0, perps.skipped, victims.skipped, order="most probable dose change first")
        return 0
    if streamed and args.top is None:  # Parquet, chunk after chunk, in table order
        rows = _write_streamed(args, lambda h: write_parquet_chunks(stream_chunks(perps, victims, rules, progress=bar), h), binary=True)
        _say_written(args, n, rows, t0, perps.skipped, victims.skipped, order="in table order (streamed; rank left empty)")
        return 0
    local_top = args.top is not None and args.engine == "local" and n > 2 * STREAM_PAIRS
    if streamed or local_top:  # the worst pairs of a large screen: a running list, whatever the memory (the same rows)
        assert args.top is not None
        result = worst_pairs(perps, victims, args.top, rules, progress=bar)
    elif args.engine == "dask":
        from .batch_dask import run_on_dask

        result = run_on_dask(perps, victims, rules, scheduler=args.scheduler, progress=bar)
    else:
        result = evaluate_pairs(perps, victims, rules, progress=bar)
    rows = _write_screen_results(args, result, fmt_name)
    _say_written(args, n, rows, t0, perps.skipped, victims.skipped, order="worst first")
    return 0


def _check_screen_options(args: argparse.Namespace) -> None:
    """screen-batch's options that go together, checked before any table is read; sets ``args.variation``."""
    if args.scheduler is not None and args.engine != "dask":
        raise InputError("--scheduler", args.scheduler, "is a Dask scheduler address and needs --engine dask")
    if args.engine == "dask":  # before reading the tables: a missing extra is said at once
        from .batch_dask import import_distributed

        import_distributed()
    if args.top is not None and args.top < 1:
        raise InputError("--top", args.top, "is not a whole number of at least 1")
    args.variation = None
    if args.samples is not None or args.vary is not None:
        from .batch_probability import MAX_SAMPLES, parse_vary

        if args.samples is None or args.vary is None:
            raise InputError(
                "--samples" if args.samples is None else "--vary",
                "missing",
                "a probabilistic screen needs both --samples N and --vary (e.g. --samples 1000 --vary ki=30%,conc=20%)",
            )
        if not 1 <= args.samples <= MAX_SAMPLES:
            raise InputError("--samples", args.samples, f"is not a whole number from 1 to {MAX_SAMPLES:,}")
        args.variation = parse_vary(args.vary)


def _screen_format(args: argparse.Namespace) -> str:
    """The output format: --format, else from the file name, else a table at a terminal and CSV down a pipe."""
    if args.format:
        fmt_name = args.format
    elif not _stdout(args.output):
        fmt_name = {".json": "json", ".md": "markdown", ".markdown": "markdown", ".parquet": "parquet", ".xlsx": "xlsx"}.get(
            Path(args.output or "").suffix.lower(), "csv"
        )
    else:  # a person at a terminal reads a rounded table; a pipe gets CSV
        fmt_name = "table" if sys.stdout.isatty() else "csv"
    if args.variation is not None:
        from .report.batch import PROBABILITY_FORMATS

        if fmt_name == "table" and args.format is None:
            fmt_name = "csv"
        if fmt_name not in PROBABILITY_FORMATS:
            raise InputError("--format", fmt_name, f"is not one of {', '.join(PROBABILITY_FORMATS)} for a probabilistic screen (--samples)")
    if fmt_name in ("parquet", "xlsx") and _stdout(args.output) and sys.stdout.isatty():
        raise InputError("--format", fmt_name, f"is binary and would garble the terminal; write it to a file (-o results.{fmt_name})")
    return fmt_name


def _write_screen_results(args: argparse.Namespace, result: Any, fmt_name: str) -> int:
    """Write a screen's results (an .xlsx workbook, or a text or binary table); returns the rows written."""
    from .report.batch import write_results

    if fmt_name == "xlsx":
        from datetime import UTC, datetime

        from .report.batch import results_workbook

        book = results_workbook(result, top=args.top, generated_at=datetime.now(UTC).isoformat(timespec="seconds"))
        if _stdout(args.output):
            sys.stdout.buffer.write(book)
        else:
            _out_bytes(book, args)
        rows = result.pairs if args.top is None else min(args.top, result.pairs)
    else:
        width = shutil.get_terminal_size((100, 24)).columns
        rows = _write_streamed(
            args, lambda h: write_results(result, h, fmt_name, top=args.top, width=width), binary=fmt_name not in ("markdown", "table")
        )
    return rows


def _probabilistic_screen(args: argparse.Namespace, perps: Any, victims: Any, rules: Any, fmt_name: str, bar: Any) -> int:
    """screen-batch --samples: the probability of each class and of a dose change per pair (interact.batch_probability)."""
    from .batch_probability import screen_probabilities
    from .report.batch import write_probabilities

    variation = args.variation
    if args.engine == "dask":
        from .batch_dask import dask_client, probabilities_dask

        with dask_client(args.scheduler) as client:
            result = probabilities_dask(perps, victims, variation, rules, samples=args.samples, seed=args.seed, client=client, progress=bar)
    else:
        result = screen_probabilities(perps, victims, variation, rules, samples=args.samples, seed=args.seed, progress=bar)
    return _write_streamed(args, lambda h: write_probabilities(result, h, fmt_name, top=args.top), binary=True)


def _say_written(args: argparse.Namespace, n: int, rows: int, t0: float, *skipped_rows: tuple[object, ...], order: str) -> None:
    """The summary line of screen-batch (to standard error, unless quiet or the results went to standard output)."""
    import time

    if not _stdout(args.output) and not args.quiet:
        skipped = sum(len(s) for s in skipped_rows)
        sys.stderr.write(
            f"interact: {n:,} pairs screened in {time.perf_counter() - t0:.2f} s; {rows:,} rows, {order}, written to {args.output}"
            + (f"; {skipped} bad rows left out (listed above)" if skipped else "")
            + "\n"
        )


def _cmd_report(args: argparse.Namespace) -> int:
    from datetime import UTC, datetime

    from .assessment import assess
    from .report.html import render_report_html, render_report_markdown, report_parts
    from .scenario import loads_scenario
    from .uncertainty import ScenarioModel, run_uncertainty, scenario_intervals, sensitivity

    path = Path(args.scenario)
    try:
        raw = path.read_bytes()
        text = raw.decode("utf-8-sig")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError("scenario", str(path), f"could not be read ({getattr(exc, 'strerror', None) or exc.__class__.__name__})") from None
    result = assess(loads_scenario(text, source=str(path), folder=path.absolute().parent), rules=args.rules, warn=False)
    spec, vary = _uncertainty_spec(args)
    spread = None
    if vary or scenario_intervals(ScenarioModel(result)):  # intervals the scenario carries (ki_ci ...) count too
        samples = args.samples if args.samples is not None else (spec.samples if spec.samples is not None else 10_000)
        spread = run_uncertainty(
            result,
            vary,
            samples=samples,
            seed=args.seed if args.seed is not None else (spec.seed if spec.seed is not None else 0),
            method=args.method or spec.method or "lhs",
            progress=_progress_bar("sampling") if samples >= 200_000 else None,
        )
    parts = report_parts(
        result,
        spread=spread,
        sens=sensitivity(result, vary),
        scenario_bytes=raw,
        source_name=path.name,
        generated_at=datetime.now(UTC),
    )
    suffix = Path(args.output or "").suffix.lower()
    fmt_name = args.format or ("markdown" if suffix in (".md", ".markdown") else "html")
    text_out = render_report_markdown(result, parts) if fmt_name == "markdown" else render_report_html(result, parts)
    _out(text_out, args.output, args)
    return 0


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="interact",
        description=(
            "Static drug-drug interaction risk for precipitants that inhibit or induce enzymes and transporters. "
            "Run without arguments to open the terminal app on the built-in invented demo. "
            "Predictions are model estimates, not clinical advice."
        ),
    )
    parser.add_argument("--version", action="version", version=f"interact {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    _add_assess_commands(sub)
    _add_mechanism_fit_commands(sub)
    _add_small_commands(sub)
    _add_uncertainty_command(sub)
    _add_screen_batch_command(sub)
    _add_report_command(sub)
    _add_fit_command(sub)
    return parser


def _with_report_options(p: argparse.ArgumentParser) -> None:
    """--rules, --format, --width, -o/--output and --force: the options of every command that reports a scenario."""
    p.add_argument(
        "--rules",
        metavar="NAME|PATH",
        help="rule set by name (see 'interact tables') or a TOML file; default: the scenario's 'rules' key, else ich-m12-2024",
    )
    p.add_argument("--format", choices=FORMATS, default="text", help="output format (default: text)")
    p.add_argument("--width", type=_width_arg, default=100, help="text width, 40 to 1000 (default: 100)")
    p.add_argument("-o", "--output", metavar="FILE", help="write to FILE instead of standard output")
    p.add_argument("--force", action="store_true", help=FORCE_HELP)


def _add_assess_commands(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """assess and timecourse: a scenario's static assessment and its time course."""
    p = sub.add_parser("assess", help="assess a scenario file: basic models, AUC ratio, dose suggestion")
    p.add_argument("scenario", metavar="SCENARIO.toml")
    _with_report_options(p)
    p.add_argument(
        "--time-course",
        choices=("auto", "on", "off"),
        default="auto",
        help="add the dynamic check and dose timing (auto: for time-dependent inhibition or induction)",
    )
    p.add_argument("--days", type=_days_arg, default=30.0, help="days of perpetrator dosing in the time course (default 30)")
    p.set_defaults(run=_cmd_assess)

    p = sub.add_parser("timecourse", help="time course of the interaction: curves, dynamic vs static ratio, onset and offset")
    p.add_argument("scenario", metavar="SCENARIO.toml")
    _with_report_options(p)
    p.add_argument("--days", type=_days_arg, default=30.0, help="days of perpetrator dosing (default 30)")
    p.add_argument("--washout-days", type=_days_arg, default=None, help="days followed after stopping (default: long enough to fade)")
    p.add_argument("--fraction", type=_fraction_arg, default=0.9, help="share of the effect that defines onset and offset (default 0.9)")
    p.add_argument("--constant", action="store_true", help="hold the perpetrator's site concentrations at their static values")
    p.add_argument("--plot", metavar="FILE", help="also write the curves to FILE (matplotlib): .png or .pdf, else SVG")
    p.set_defaults(run=_cmd_timecourse)


def _add_mechanism_fit_commands(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """fit-tdi and fit-induction: time-dependent inhibition and induction constants from incubation data."""
    for name, text in (
        ("fit-tdi", "fit kinact and KI from pre-incubation data (columns inhibitor, time, activity)"),
        ("fit-induction", "fit Emax and EC50 from mRNA fold-change data (columns concentration, fold_change)"),
    ):
        p = sub.add_parser(name, help=text)
        p.add_argument("data", metavar="DATA.csv")
        p.add_argument("--format", choices=FORMATS, default="text")
        p.add_argument("--width", type=_width_arg, default=100, help="text width, 40 to 1000 (default: 100)")
        p.add_argument("-o", "--output", metavar="FILE")
        p.add_argument("--force", action="store_true", help=FORCE_HELP)
        p.add_argument("--into", metavar="SCENARIO.toml", help="write the fitted constants into this scenario (atomically)")
        p.add_argument("--target", metavar="ENZYME", help="the enzyme they belong to (with --into)")
        p.add_argument(
            "--fu-inc",
            type=float,
            default=None,
            metavar="FU",
            help="unbound fraction in the incubation: written beside the carried KI (fu_inc_ki_inact) or EC50 (fu_inc_ec50), "
            "which the assessment multiplies by it",
        )
        if name == "fit-tdi":
            p.add_argument("--keep-vehicle", action="store_true", help="do not subtract the vehicle (0 uM) loss of activity")
            p.add_argument("--weighted", action="store_true", help="weight the hyperbola by the kobs standard errors")
        else:
            p.add_argument("--hill", action="store_true", help="also fit a Hill slope (reported; not carried unless it is 1)")
        p.set_defaults(run=_cmd_fit_mechanism)


def _add_small_commands(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """new, demo, tables, fm and open."""
    p = sub.add_parser("new", help="write a commented starter scenario (placeholder values to replace) to FILE")
    p.add_argument("file", metavar="FILE", help="the scenario file to create (- for standard output)")
    p.add_argument("--force", action="store_true", help="replace FILE if it exists")
    p.set_defaults(run=_cmd_new)

    p = sub.add_parser("demo", help="assess the built-in invented demo scenario (same output as assess)")
    _with_report_options(p)
    p.set_defaults(run=_cmd_assess)

    p = sub.add_parser("tables", help="print the reference tables with their sources and status, and the source registry in full")
    p.add_argument("--rules", metavar="NAME|PATH", help="show only this rule set")
    p.add_argument("--format", choices=("text", "markdown"), default="text")
    p.set_defaults(run=_cmd_tables)

    p = sub.add_parser("fm", help="back-calculate fm from an AUC ratio observed with a strong inhibitor")
    p.add_argument("--observed", type=float, required=True, metavar="AUCR", help="observed AUC ratio")
    p.add_argument("--gut-ratio", type=float, default=1.0, metavar="AUCR_G", help="part of the ratio from the gut wall (default 1)")
    p.add_argument(
        "--remaining",
        type=float,
        default=0.0,
        metavar="A",
        help="fraction of enzyme activity left with the inhibitor (default 0: complete inhibition)",
    )
    p.set_defaults(run=_cmd_fm)

    p = sub.add_parser("open", help="open a scenario in the terminal app")
    p.add_argument("scenario", nargs="?", metavar="SCENARIO.toml")
    p.set_defaults(run=_cmd_open)


def _add_uncertainty_command(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """uncertainty: the spread of the AUC ratio under input distributions."""
    p = sub.add_parser("uncertainty", help="spread of the AUC ratio under input distributions, and sensitivity")
    p.add_argument("scenario", metavar="SCENARIO.toml")
    p.add_argument(
        "--vary",
        action="append",
        metavar="PATH=SPEC",
        help="an input's distribution, e.g. perpetrator.inhibits[0].ki=cv:30%% or "
        "perpetrator.cmax=ci:1.2 uM,2.5 uM or victim.pathways[0].fm=uniform:0.6,0.9 (repeatable). Intervals the scenario "
        "carries (ki_ci and the like, written by fit --into) are used as 95%% ranges unless declared here",
    )
    p.add_argument("--spec", metavar="FILE.toml", help='a file with a [vary] table of "PATH" = "SPEC" and an optional [sampling] table')
    p.add_argument("--samples", type=int, metavar="N", help="number of samples (default 10000)")
    p.add_argument("--seed", type=int, metavar="S", help="random seed (default 0); the same seed gives the same numbers")
    p.add_argument("--method", choices=("mc", "lhs"), help="mc: Monte Carlo; lhs: Latin hypercube (default)")
    p.add_argument("--list-inputs", action="store_true", help="list the input paths this scenario's model reads, and stop")
    _with_report_options(p)
    p.set_defaults(run=_cmd_uncertainty)


def _add_screen_batch_command(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """screen-batch: every perpetrator of one table against every victim of another."""
    p = sub.add_parser("screen-batch", help="every perpetrator of one table against every victim of another, worst pairs first")
    p.add_argument("perpetrators", metavar="PERPETRATORS.csv", help="perpetrator table (CSV, TOML or .xlsx; columns in README)")
    p.add_argument("victims", metavar="VICTIMS.csv", help="victim table (CSV, TOML or .xlsx; columns in README)")
    p.add_argument("--sheet", metavar="NAME", help="sheet of an .xlsx table to read (default: the first sheet)")
    p.add_argument("--victim-sheet", metavar="NAME", help="sheet of the victims' .xlsx table, when it differs from --sheet")
    p.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="write results to FILE (.csv, .json, .parquet, .md or .xlsx) instead of standard output (- for it)",
    )
    p.add_argument(
        "--format",
        choices=("csv", "json", "parquet", "markdown", "table", "xlsx"),
        help="output format (default: from the file name; to a terminal a rounded table, to a pipe csv)",
    )
    p.add_argument("--rules", metavar="NAME|PATH", help="rule set (default ich-m12-2024)")
    p.add_argument(
        "--on-error",
        choices=("fail", "skip"),
        default="fail",
        help="a bad row stops the run (fail, default) or is left out and listed (skip)",
    )
    p.add_argument("--top", type=int, metavar="N", help="write only the N worst pairs")
    p.add_argument("--force", action="store_true", help=FORCE_HELP)
    p.add_argument("-q", "--quiet", action="store_true", help="no progress bar or summary line")
    p.add_argument(
        "--engine",
        choices=("local", "dask"),
        default="local",
        help='where the pairs are evaluated: in this process (local, default) or on Dask (needs pip install "interact[dask]")',
    )
    p.add_argument(
        "--scheduler",
        metavar="ADDRESS",
        help="with --engine dask: a running Dask scheduler, e.g. tcp://host:8786 (default: a local cluster on this machine's cores)",
    )
    p.add_argument(
        "--samples",
        type=int,
        metavar="N",
        help="a probabilistic screen: N draws of the varied inputs per pair; per pair the probability of each class and of a dose change",
    )
    p.add_argument(
        "--vary",
        metavar="Q=CV,...",
        help="with --samples: the CV of each varied quantity for every row, lognormal around the table's value: ki, conc "
        "(the perpetrator's site concentrations), fm, fg, route (efflux, uptake, secretion fractions), renal (renal fraction); "
        "e.g. ki=30%%,conc=20%%",
    )
    p.add_argument("--seed", type=int, default=0, help="with --samples: the random seed (the same seed, the same probabilities)")
    p.set_defaults(run=_cmd_screen_batch)


def _add_report_command(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """report: a self-contained HTML or Markdown report of a scenario."""
    p = sub.add_parser("report", help="a self-contained HTML (or Markdown) report of a scenario, with uncertainty and sensitivity")
    p.add_argument("scenario", metavar="SCENARIO.toml")
    p.add_argument("-o", "--output", metavar="FILE", help="write to FILE (.html or .md) instead of standard output")
    p.add_argument("--format", choices=("html", "markdown"), help="default: from the file name, else html")
    p.add_argument("--force", action="store_true", help=FORCE_HELP)
    p.add_argument("--rules", metavar="NAME|PATH", help="rule set (default: the scenario's 'rules' key, else ich-m12-2024)")
    p.add_argument(
        "--vary", action="append", metavar="PATH=SPEC", help="an input's distribution, as for 'interact uncertainty' (repeatable)"
    )
    p.add_argument("--spec", metavar="FILE.toml", help="a file with a [vary] table and an optional [sampling] table")
    p.add_argument("--samples", type=int, metavar="N", help="number of samples (default 10000)")
    p.add_argument("--seed", type=int, metavar="S", help="random seed (default 0)")
    p.add_argument("--method", choices=("mc", "lhs"), help="mc: Monte Carlo; lhs: Latin hypercube (default)")
    p.set_defaults(run=_cmd_report)


# --------------------------------------------------------------------------- interact fit (incubation data)


def _cmd_fit(args: argparse.Namespace) -> int:
    import datetime

    from .kinetics.data import columns_of

    path = Path(args.data)
    try:
        header = columns_of(path.read_text(encoding="utf-8-sig"), source=path.name)
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError("data", str(path), f"could not be read ({getattr(exc, 'strerror', None) or exc.__class__.__name__})") from None
    ic50_mode = args.ic50 or ("substrate" not in header and "inhibitor" in header)
    today = datetime.datetime.now(datetime.UTC).date().isoformat()
    fu_inc, fu_origin, binding = _fit_binding(args)
    if ic50_mode:
        return _cmd_fit_ic50(args, path, today, fu_inc, fu_origin)
    from .kinetics.binding import unbound_constant
    from .kinetics.data import read_incubation_csv
    from .kinetics.diagnostics import diagnostic_plots, double_reciprocal_data
    from .kinetics.fitting import MODELS, fit_inhibition
    from .report.fit import format_comparison

    data = read_incubation_csv(
        path,
        substrate_unit=args.substrate_unit,
        inhibitor_unit=args.inhibitor_unit,
        velocity_unit=args.velocity_unit,
        require_inhibitor="inhibitor" in header,  # substrate and velocity only: a plain Michaelis-Menten fit
    )
    models = tuple(m.strip() for m in args.models.split(",") if m.strip()) if args.models else MODELS
    comp = fit_inhibition(data, models=models, weights=args.weights, level=args.level, warn=False)
    unbound = None
    ki = comp.ki
    if ki is not None and fu_inc is not None and fu_origin:
        low, high, kind = (
            (ki.profile_low, ki.profile_high, "profile likelihood") if ki.profile_low is not None else (ki.ci_low, ki.ci_high, "asymptotic")
        )
        unbound = unbound_constant(ki.name, ki.value, low, high, fu_inc, interval=f"{comp.level:.0%} {kind}", fu_origin=fu_origin)
    plots_text = ""
    if args.format == "text" and not args.no_terminal_plot:
        from .report.fit_plots import render_terminal

        plots_text = render_terminal(double_reciprocal_data(comp), width=min(args.width, 100) - 4, height=20)
    if args.plot:
        from .report.fit_plots import save_figure

        save_figure(diagnostic_plots(comp), args.plot, inputs=(*_inputs(args), args.output), force=args.force)
    _out(format_comparison(comp, args.format, width=args.width, unbound=unbound, binding=binding, plots=plots_text), args.output, args)
    if args.plot:
        sys.stderr.write(f"interact: diagnostic plots written to {args.plot}\n")
    if args.into and comp.models == ("none",) and not any(x > 0 for x in data.inhibitor_um):
        _write_km_into(args, comp, path.name, today)
    elif args.into:
        if ki is None or comp.verdict.mechanism is None:
            raise InputError("--into", args.into, f"was not updated: there is no Ki to carry. {comp.verdict.text}")
        if not math.isfinite(ki.value):
            raise InputError("--into", args.into, f"was not updated: {ki.name} is unbounded")
        ci = ki.interval()
        method = f"; ki_ci {comp.level:.0%} {ci[2]}" if ci is not None else ""
        origin = f"fit of {path.name}, {comp.verdict.mechanism} model ({_weights_label(comp)}){method}, {today}"
        _write_into(args, ki.value, comp.verdict.mechanism, comp.alpha, fu_inc, origin, ci[:2] if ci is not None else None)
        if not ki.identifiable:
            sys.stderr.write(f"interact: caution: {ki.name} is poorly determined by these data ({ki.note}); check it first\n")
    return 0


def _weights_label(comp: Any) -> str:
    e = comp.error_model
    if e is None:
        return f"{comp.weights} weights"
    return f"{e.name} error model" + (f", theta {e.exponent:.2f}" if e.name == "power" else "")


def _write_km_into(args: argparse.Namespace, comp: Any, data_name: str, today: str) -> None:
    """Carry the Km of a plain Michaelis-Menten fit into the target's entry (for its Cheng-Prusoff conversion)."""
    from .files import write_file
    from .kinetics.scenario_update import carry_constants_text

    if not args.target:
        raise InputError("--target", None, "is needed with --into: the enzyme whose Cheng-Prusoff conversion uses this Km, e.g. CYP3A")
    fit = comp.fit("none")
    km = fit.estimate("Km")
    if not comp.data.substrate_is_molar:
        raise InputError(
            "--into", args.into, f"was not updated: Km is in {comp.data.substrate_unit}, and a scenario needs a molar Km (e.g. uM)"
        )
    if not (fit.success and km.identifiable and math.isfinite(km.value) and km.value > 0):
        raise InputError("--into", args.into, f"was not updated: Km is not determined by these data ({km.note or fit.message})")
    target = Path(args.into)
    text = _read_text(args.into, "--into")
    values: dict[str, object] = {"km": f"{km.value:.6g} uM"}
    method = ""
    if km.profile_low is not None and km.profile_high is not None and math.isfinite(km.profile_high):
        values["km_ci"] = [f"{km.profile_low:.6g} uM", f"{km.profile_high:.6g} uM"]
        method = f"; km_ci {comp.level:.0%} profile likelihood"
    origin = f"Michaelis-Menten fit of {data_name} ({_weights_label(comp)}){method}, {today}"
    new = carry_constants_text(text, target=args.target, values=values, origin=origin, source=str(target), remove=("km_ci",))
    write_file(target, new, field="--into", inputs=(args.data, args.output, args.plot), force=args.force)
    sys.stderr.write(f"interact: {target} updated: {args.target} km = {km.value:.4g} uM; origin recorded\n")


def _fit_binding(args: argparse.Namespace) -> tuple[float | None, str, BindingPrediction | None]:
    from . import units

    if args.fu_inc is not None and args.logp is not None:
        raise InputError(
            "--fu-inc",
            args.fu_inc,
            "and --logp were both given; expected a measured fu,inc or a lipophilicity to predict it, not both",
        )
    if args.fu_inc is not None:
        return units.parse_fraction(args.fu_inc, field="--fu-inc"), "measured (given with --fu-inc)", None
    if args.logp is None:
        return None, "", None
    from .kinetics.binding import predict_fu_inc

    try:
        logp = float(args.logp)
    except ValueError:
        raise InputError("--logp", args.logp, "is not a number (logP for bases, logD7.4 for acids and neutrals)") from None
    protein = cells = None
    if args.method_binding == "kilford-2008":
        if args.cells is None:
            raise InputError("--cells", None, "is needed for kilford-2008: hepatocyte density in 10^6 cells/mL")
        try:
            cells = float(args.cells)
        except ValueError:
            raise InputError("--cells", args.cells, "is not a number (hepatocytes in 10^6 cells/mL)") from None
    else:
        if args.protein is None:
            raise InputError("--protein", None, 'is needed to predict fu,inc in microsomes, e.g. --protein "0.5 mg/mL"')
        protein = units.magnitude(units.parse(args.protein, "protein", field="--protein"), "mg/mL")
    pred = predict_fu_inc(logp, method=args.method_binding, protein_mg_per_ml=protein, cells_million_per_ml=cells)
    return pred.fu_inc, f"predicted, {pred.title} ({pred.status})", pred


def _write_into(
    args: argparse.Namespace,
    ki_um: float,
    mechanism: str,
    alpha: float | None,
    fu_inc: float | None,
    origin: str,
    ki_ci_um: tuple[float, float] | None = None,
) -> None:
    from .files import write_file
    from .kinetics.scenario_update import update_inhibition_text

    if not args.target:
        raise InputError("--target", None, "is needed with --into: the enzyme the Ki belongs to, e.g. --target CYP3A")
    target = Path(args.into)
    text = _read_text(args.into, "--into")
    new = update_inhibition_text(
        text,
        target=args.target,
        ki_um=ki_um,
        mechanism=mechanism,
        origin=origin,
        alpha=alpha,
        fu_inc=fu_inc,
        ki_ci_um=ki_ci_um,
        source=str(target),
    )
    write_file(target, new, field="--into", inputs=(args.data, args.output, args.plot), force=args.force)
    sys.stderr.write(f"interact: {target} updated: {args.target} ki = {ki_um:.4g} uM ({mechanism}); origin recorded\n")


def _cmd_fit_ic50(args: argparse.Namespace, path: Path, today: str, fu_inc: float | None, fu_origin: str) -> int:
    from .kinetics.data import read_ic50_csv
    from .kinetics.ic50 import fit_ic50, ki_from_ic50_fit
    from .report.fit import format_ic50

    data = read_ic50_csv(path, inhibitor_unit=args.inhibitor_unit)
    result = fit_ic50(
        data.inhibitor_um,
        data.response,
        bottom=args.bottom,
        weights="none" if args.weights == "auto" else args.weights,
        level=args.level,
        response_unit=data.response_unit,
        source=data.source,
        warn=False,
    )
    ki = None
    if args.mechanism and not result.no_decline:
        s = units_um(args.substrate_conc, "--substrate-conc") if args.substrate_conc else None
        km = units_um(args.km, "--km") if args.km else None
        ki = ki_from_ic50_fit(result, args.mechanism, substrate_um=s, km_um=km, alpha=args.alpha)
    unbound = None
    if ki is not None and fu_inc is not None:
        from .kinetics.binding import unbound_constant

        unbound = unbound_constant("Ki", ki.ki_um, ki.low_um, ki.high_um, fu_inc, interval="from the IC50 interval", fu_origin=fu_origin)
    _out(format_ic50(result, ki, args.format, width=args.width, unbound=unbound), args.output, args)
    if args.into:
        if result.no_decline:
            raise InputError("--into", args.into, f"was not updated: {result.no_decline}")
        if ki is None:
            raise InputError("--mechanism", None, "is needed with --into for an IC50 curve (the Cheng-Prusoff conversion depends on it)")
        ci = (ki.low_um, ki.high_um) if ki.low_um is not None and ki.high_um is not None else None
        ok = ci is not None and 0 < ci[0] <= ki.ki_um <= ci[1] < math.inf
        kind = "profile" if result.fit.estimate("IC50").profile_low is not None else "asymptotic"
        method = f"; ki_ci {args.level:.0%} from the IC50 {kind} interval"
        origin = f"Cheng-Prusoff from {result.fit.model} IC50 fit of {path.name}, {ki.mechanism}{method if ok else ''}, {today}"
        _write_into(args, ki.ki_um, ki.mechanism, ki.alpha, fu_inc, origin, ci if ok else None)
    return 0


def units_um(text: str, field: str) -> float:
    from . import units

    return units.magnitude(units.parse(text, "molar_concentration", field=field), "uM")


def _add_fit_command(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser(
        "fit",
        help="fit incubation data: all inhibition mechanisms, verdict, Ki with intervals (or an IC50 curve)",
        description=(
            "Fit a CSV of initial velocities over a substrate x inhibitor grid (columns substrate, inhibitor, velocity; "
            "optional depletion %) to every inhibition model, or an IC50 curve (columns inhibitor, response; chosen with "
            "--ic50 or when the file has no substrate column). In vitro constants feed model predictions, not clinical advice."
        ),
    )
    p.add_argument("data", metavar="DATA.csv")
    p.add_argument("--substrate-unit", metavar="UNIT", help="unit of the substrate column when the header does not say (e.g. uM)")
    p.add_argument("--inhibitor-unit", metavar="UNIT", help="unit of the inhibitor column when the header does not say (e.g. uM)")
    p.add_argument("--velocity-unit", metavar="UNIT", help="unit of the velocity column (a label, e.g. pmol/min/mg)")
    p.add_argument(
        "--models",
        metavar="LIST",
        help="comma-separated subset of none,competitive,noncompetitive,uncompetitive,mixed (default: all; none, the model "
        "without inhibition, is always fitted because inhibition is reported only when it is rejected). A file with one "
        "inhibitor level, or no inhibitor column, gets a plain Michaelis-Menten fit (Km, Vmax)",
    )
    p.add_argument(
        "--weights",
        choices=("auto", "none", "1/y", "1/y2", "poisson"),
        default="auto",
        help="auto (default): choose the error model (constant, proportional or power variance) by likelihood and weight "
        "by it; or force a scheme: none (constant variance), 1/y, 1/y2 (constant relative error), poisson. An IC50 "
        "curve is fitted unweighted under auto",
    )
    p.add_argument("--level", type=float, default=0.95, help="confidence level (default 0.95)")
    p.add_argument("--format", choices=FORMATS, default="text", help="output format (default: text)")
    p.add_argument("--width", type=_width_arg, default=100, help="text width, 40 to 1000 (default: 100)")
    p.add_argument("-o", "--output", metavar="FILE", help="write the report to FILE instead of standard output")
    p.add_argument("--force", action="store_true", help=FORCE_HELP)
    p.add_argument("--plot", metavar="FILE", help="write the diagnostic plots (double reciprocal, Dixon, residuals) to FILE.svg/.png/.pdf")
    p.add_argument("--no-terminal-plot", action="store_true", help="leave the double-reciprocal plot out of the text report")
    p.add_argument(
        "--into",
        metavar="SCENARIO.toml",
        help="write the chosen Ki (and fu,inc) into this scenario, keeping the rest of the file",
    )
    p.add_argument("--target", metavar="ENZYME", help="with --into: the enzyme the Ki belongs to, e.g. CYP3A")
    p.add_argument("--fu-inc", metavar="X", help="measured fraction unbound in the incubation, gives Ki,u = Ki x fu,inc")
    p.add_argument("--logp", metavar="X", help="predict fu,inc from logP (bases) or logD7.4 (acids, neutrals)")
    p.add_argument("--protein", metavar="CONC", help='microsomal protein for the prediction, e.g. "0.5 mg/mL"')
    p.add_argument("--cells", metavar="N", help="hepatocytes, 10^6 cells/mL (kilford-2008)")
    p.add_argument(
        "--binding-method",
        dest="method_binding",
        choices=("austin-2002", "hallifax-2006", "kilford-2008"),
        default="hallifax-2006",
        help="fu,inc relation (default hallifax-2006; austin-2002 was derived in rat liver microsomes; "
        "sources and status: interact tables)",
    )
    p.add_argument("--ic50", action="store_true", help="treat the file as an IC50 curve (inhibitor, response)")
    p.add_argument("--bottom", type=float, metavar="Y", help="IC50 mode: fix the bottom plateau (3-parameter fit), e.g. 0")
    p.add_argument(
        "--mechanism",
        choices=("competitive", "noncompetitive", "uncompetitive", "mixed"),
        help="IC50 mode: mechanism for the Cheng-Prusoff conversion",
    )
    p.add_argument("--substrate-conc", metavar="CONC", help='IC50 mode: substrate concentration in the assay, e.g. "5 uM"')
    p.add_argument("--km", metavar="CONC", help='IC50 mode: Km of the substrate, e.g. "5 uM"')
    p.add_argument("--alpha", type=float, help="IC50 mode, mixed: Kiu/Kic")
    p.set_defaults(run=_cmd_fit)


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    args_list = list(sys.argv[1:] if argv is None else argv)
    parser = _parser()
    if not args_list and not (sys.stdin.isatty() and sys.stdout.isatty()):
        # no terminal to draw the app on (a pipe, a script, CI): say how to use the command instead
        parser.print_usage(sys.stderr)
        sys.stderr.write("interact: no command given and no terminal for the app; try 'interact --help'\n")
        return 2
    if not args_list or (len(args_list) == 1 and args_list[0].endswith(".toml") and not args_list[0].startswith("-")):
        args_list = ["open", *args_list]
    args = parser.parse_args(args_list)
    if not getattr(args, "run", None):
        parser.print_help()
        return 2
    try:
        _check_outputs(args)
        return int(args.run(args))
    except InteractError as exc:
        from .report.document import terminal_safe

        sys.stderr.write(f"interact: {terminal_safe(str(exc))}\n")  # the message quotes user text: no escapes reach the terminal
        return 2
    except KeyboardInterrupt:
        sys.stderr.write("interact: interrupted\n")
        return 130
    except BrokenPipeError:
        return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
