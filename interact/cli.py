"""Command line: parse, call the core, format, exit.

Exit status: 0 success, 2 an input error (one line on stderr, no traceback),
1 an unexpected internal failure.  Heavy imports (scipy fits, Textual) happen
only inside the commands that need them.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable, Sequence
from pathlib import Path

from . import __version__
from .errors import InputError, InteractError

__all__ = ["main"]

FORMATS = ("text", "json", "markdown")


def _out(text: str, path: str | None = None) -> None:
    if path:
        from .scenario import write_text_atomic

        write_text_atomic(Path(path), text)
    else:
        sys.stdout.write(text)


def _cmd_assess(args: argparse.Namespace) -> int:
    from .assessment import assess
    from .report.assessment import format_assessment
    from .scenario import demo_path, load_scenario

    path = demo_path() if args.command == "demo" else Path(args.scenario)
    result = assess(load_scenario(path), rules=args.rules)
    _out(format_assessment(result, args.format, width=args.width), args.output)
    return 0


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
        try:
            text = path.read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError) as exc:
            raise InputError("--spec", str(path), f"could not be read ({getattr(exc, 'strerror', None) or exc.__class__.__name__})") from None
        spec = loads_spec(text, source=str(path))
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

    result = assess(load_scenario(Path(args.scenario)), rules=args.rules)
    if args.list_inputs:
        model = ScenarioModel(result)
        lines = [f"{i.path}  {fmt(i.value, 4)} {i.unit}  ({i.label})".replace("  ()", "") for i in model.inputs(relevant_only=True)]
        _out("\n".join(lines) + "\n", args.output)
        return 0
    spec, vary = _uncertainty_spec(args)
    samples = args.samples if args.samples is not None else (spec.samples or 10_000)
    seed = args.seed if args.seed is not None else (spec.seed if spec.seed is not None else 0)
    method = args.method or spec.method or "lhs"
    spread = run_uncertainty(result, vary, samples=samples, seed=seed, method=method)
    sens = sensitivity(result, vary)
    _out(format_uncertainty(spread, sens, args.format, title=result.scenario.title, width=args.width), args.output)
    return 0


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="interact",
        description=(
            "Static drug-drug interaction risk for reversible enzyme inhibitors. "
            "Run without arguments to open the terminal app on the built-in invented demo. "
            "Predictions are model estimates, not clinical advice."
        ),
    )
    parser.add_argument("--version", action="version", version=f"interact {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    def with_report_options(p: argparse.ArgumentParser) -> None:
        p.add_argument("--rules", metavar="NAME|PATH", help="rule set by name (see 'interact tables') or a TOML file; "
                       "default: the scenario's 'rules' key, else ich-m12-2024")
        p.add_argument("--format", choices=FORMATS, default="text", help="output format (default: text)")
        p.add_argument("--width", type=int, default=100, help="text width (default: 100)")
        p.add_argument("-o", "--output", metavar="FILE", help="write to FILE instead of standard output")

    p = sub.add_parser("assess", help="assess a scenario file: basic models, AUC ratio, dose suggestion")
    p.add_argument("scenario", metavar="SCENARIO.toml")
    with_report_options(p)
    p.set_defaults(run=_cmd_assess)

    p = sub.add_parser("demo", help="assess the built-in invented demo scenario (same output as assess)")
    with_report_options(p)
    p.set_defaults(run=_cmd_assess)

    p = sub.add_parser("tables", help="print the reference tables with their sources and status")
    p.add_argument("--rules", metavar="NAME|PATH", help="show only this rule set")
    p.add_argument("--format", choices=("text", "markdown"), default="text")
    p.set_defaults(run=_cmd_tables)

    p = sub.add_parser("fm", help="back-calculate fm from an AUC ratio observed with a strong inhibitor")
    p.add_argument("--observed", type=float, required=True, metavar="AUCR", help="observed AUC ratio")
    p.add_argument("--gut-ratio", type=float, default=1.0, metavar="AUCR_G", help="part of the ratio from the gut wall (default 1)")
    p.add_argument("--remaining", type=float, default=0.0, metavar="A",
                   help="fraction of enzyme activity left with the inhibitor (default 0: complete inhibition)")
    p.set_defaults(run=_cmd_fm)

    p = sub.add_parser("open", help="open a scenario in the terminal app")
    p.add_argument("scenario", nargs="?", metavar="SCENARIO.toml")
    p.set_defaults(run=_cmd_open)

    p = sub.add_parser("uncertainty", help="spread of the AUC ratio under input distributions, and sensitivity")
    p.add_argument("scenario", metavar="SCENARIO.toml")
    p.add_argument("--vary", action="append", metavar="PATH=SPEC",
                   help="an input's distribution, e.g. perpetrator.inhibits[0].ki=cv:30%% or "
                   "perpetrator.cmax=ci:1.2 uM,2.5 uM or victim.pathways[0].fm=uniform:0.6,0.9 (repeatable)")
    p.add_argument("--spec", metavar="FILE.toml", help="a file with a [vary] table of \"PATH\" = \"SPEC\" and an optional [sampling] table")
    p.add_argument("--samples", type=int, metavar="N", help="number of samples (default 10000)")
    p.add_argument("--seed", type=int, metavar="S", help="random seed (default 0); the same seed gives the same numbers")
    p.add_argument("--method", choices=("mc", "lhs"), help="mc: Monte Carlo; lhs: Latin hypercube (default)")
    p.add_argument("--list-inputs", action="store_true", help="list the input paths this scenario's model reads, and stop")
    with_report_options(p)
    p.set_defaults(run=_cmd_uncertainty)

    for register in _EXTRA_COMMANDS:
        register(sub)
    return parser


#: other modules add their subcommands here (each a function taking the subparsers object)
_EXTRA_COMMANDS: list[Callable[[argparse._SubParsersAction], None]] = []  # type: ignore[type-arg]


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    args_list = list(sys.argv[1:] if argv is None else argv)
    if not args_list or (len(args_list) == 1 and args_list[0].endswith(".toml") and not args_list[0].startswith("-")):
        args_list = ["open", *args_list]
    parser = _parser()
    args = parser.parse_args(args_list)
    if not getattr(args, "run", None):
        parser.print_help()
        return 2
    try:
        return int(args.run(args))
    except InteractError as exc:
        text = str(exc)
        sys.stderr.write(f"interact: {text}\n")
        return 2
    except KeyboardInterrupt:
        sys.stderr.write("interact: interrupted\n")
        return 130
    except BrokenPipeError:
        return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
