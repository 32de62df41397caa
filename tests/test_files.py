"""The one writer (interact.files): no input overwritten, no non-regular target replaced, modes and links kept."""

from __future__ import annotations

import os
import stat
import tempfile
from pathlib import Path

import pytest

from interact.cli import main
from interact.errors import InputError
from interact.files import open_output, write_file
from interact.scenario import demo_path

DEMO = demo_path().read_text(encoding="utf-8")


def _scenario(tmp_path: Path, name: str = "s.toml") -> Path:
    path = tmp_path / name
    path.write_text(DEMO, encoding="utf-8")
    return path


def _run(*argv: str) -> int:
    return main([*argv])


def test_output_equal_to_the_input_is_refused_and_the_input_kept(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scen = _scenario(tmp_path)
    assert _run("assess", str(scen), "-o", str(scen)) == 2
    assert "--output" in capsys.readouterr().err
    assert scen.read_text(encoding="utf-8") == DEMO
    # the same file spelled another way, and through a link
    os.symlink(scen, tmp_path / "alias.toml")
    assert _run("assess", str(tmp_path / "alias.toml"), "-o", str(tmp_path / "." / "s.toml")) == 2
    assert scen.read_text(encoding="utf-8") == DEMO


@pytest.mark.parametrize("command", ["uncertainty", "report"])
def test_other_commands_refuse_their_input_as_output(tmp_path: Path, command: str) -> None:
    scen = _scenario(tmp_path)
    argv = [command, str(scen), "-o", str(scen)]
    if command == "uncertainty":
        argv += ["--vary", "victim.fg=uniform:0.3,0.6", "--samples", "50"]
    assert _run(*argv) == 2
    assert scen.read_text(encoding="utf-8") == DEMO


def test_batch_output_equal_to_a_table_is_refused(tmp_path: Path) -> None:
    perps = tmp_path / "p.csv"
    perps.write_text("name,target,ki,cmax,fu_plasma\nP,CYP3A,1 uM,1 uM,0.1\n", encoding="utf-8")
    victims = tmp_path / "v.csv"
    victims.write_text("name,enzyme,fm\nV,CYP3A,0.9\n", encoding="utf-8")
    before = victims.read_bytes()
    assert _run("screen-batch", str(perps), str(victims), "-o", str(victims)) == 2
    assert victims.read_bytes() == before


def test_batch_output_to_a_folder_is_a_named_error(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    perps = tmp_path / "p.csv"
    perps.write_text("name,target,ki,cmax,fu_plasma\nP,CYP3A,1 uM,1 uM,0.1\n", encoding="utf-8")
    victims = tmp_path / "v.csv"
    victims.write_text("name,enzyme,fm\nV,CYP3A,0.9\n", encoding="utf-8")
    assert _run("screen-batch", str(perps), str(victims), "-o", str(tmp_path)) == 2
    err = capsys.readouterr().err
    assert "--output" in err and "folder" in err and "Traceback" not in err


def test_fifo_and_device_are_refused_not_replaced(tmp_path: Path) -> None:
    scen = _scenario(tmp_path)
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    assert _run("assess", str(scen), "-o", str(fifo)) == 2
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)
    with pytest.raises(InputError, match="character device"):
        write_file("/dev/null", "x")
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)


def test_read_only_file_is_refused_unless_forced_and_stays_read_only(tmp_path: Path) -> None:
    scen = _scenario(tmp_path)
    out = tmp_path / "out.txt"
    out.write_text("keep me\n", encoding="utf-8")
    out.chmod(0o444)
    assert _run("assess", str(scen), "-o", str(out), "--time-course", "off") == 2
    assert out.read_text(encoding="utf-8") == "keep me\n"
    assert _run("assess", str(scen), "-o", str(out), "--time-course", "off", "--force") == 0
    assert out.read_text(encoding="utf-8").startswith("Scenario:")
    assert stat.S_IMODE(out.stat().st_mode) == 0o444


def test_mode_bits_are_kept_and_new_files_follow_the_umask(tmp_path: Path) -> None:
    target = tmp_path / "t.txt"
    target.write_text("old", encoding="utf-8")
    target.chmod(0o640)
    write_file(target, "new")
    assert stat.S_IMODE(target.stat().st_mode) == 0o640 and target.read_text(encoding="utf-8") == "new"
    mask = os.umask(0o022)
    try:
        write_file(tmp_path / "fresh.txt", b"\x00bytes")
    finally:
        os.umask(mask)
    assert stat.S_IMODE((tmp_path / "fresh.txt").stat().st_mode) == 0o644
    assert (tmp_path / "fresh.txt").read_bytes() == b"\x00bytes"


def test_a_symlink_is_written_through_and_stays_a_link(tmp_path: Path) -> None:
    real = tmp_path / "real.txt"
    real.write_text("old", encoding="utf-8")
    link = tmp_path / "link.txt"
    link.symlink_to(real)
    write_file(link, "new")
    assert link.is_symlink() and os.readlink(link) == str(real)
    assert real.read_text(encoding="utf-8") == "new"


def test_the_temporary_file_lies_beside_the_final_target(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """Renames cannot cross filesystems: the temporary file must be made in the target's folder (after links)."""
    folder = tmp_path / "elsewhere"
    folder.mkdir()
    real = folder / "real.txt"
    real.write_text("old", encoding="utf-8")
    link = tmp_path / "link.txt"
    link.symlink_to(real)
    seen: list[str] = []
    original = tempfile.mkstemp

    def spy(*args: object, **kwargs: object):  # type: ignore[no-untyped-def]
        seen.append(str(kwargs.get("dir")))
        return original(*args, **kwargs)  # type: ignore[call-overload]

    monkeypatch.setattr(tempfile, "mkstemp", spy)
    write_file(link, "new")
    assert seen == [str(folder.resolve())]


def test_writes_across_filesystems(tmp_path: Path) -> None:
    """/dev/shm is a separate memory filesystem on Linux; writing there from elsewhere must work."""
    shm = Path("/dev/shm")
    if not shm.is_dir() or os.stat(shm).st_dev == os.stat(tmp_path).st_dev:
        pytest.skip("no second filesystem on this machine")
    with tempfile.TemporaryDirectory(dir=shm) as other:
        scen = _scenario(tmp_path)
        out = Path(other) / "report.txt"
        assert _run("assess", str(scen), "-o", str(out), "--time-course", "off") == 0
        assert out.read_text(encoding="utf-8").startswith("Scenario:")


def test_a_failed_write_leaves_the_old_file_and_no_temporary(tmp_path: Path) -> None:
    target = tmp_path / "t.txt"
    target.write_text("old", encoding="utf-8")
    with pytest.raises(RuntimeError), open_output(target) as out:
        out.write("partial")
        raise RuntimeError("stop")
    assert target.read_text(encoding="utf-8") == "old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["t.txt"]


def test_missing_folder_is_a_named_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"--output.*does not exist"):
        write_file(tmp_path / "no" / "such.txt", "x")


def test_plot_equal_to_output_or_input_is_refused(tmp_path: Path) -> None:
    scen = _scenario(tmp_path)
    out = tmp_path / "out.txt"
    assert _run("timecourse", str(scen), "-o", str(out), "--plot", str(out)) == 2
    assert _run("timecourse", str(scen), "--plot", str(scen)) == 2
    assert not out.exists() and scen.read_text(encoding="utf-8") == DEMO


def test_saving_a_scenario_keeps_a_read_only_file(tmp_path: Path) -> None:
    from interact.scenario import load_scenario, save_scenario

    scen = _scenario(tmp_path)
    scen.chmod(0o444)
    with pytest.raises(InputError, match="read-only"):
        save_scenario(load_scenario(scen), scen)
    assert scen.read_text(encoding="utf-8") == DEMO


def test_saving_a_scenario_through_a_link_keeps_the_link(tmp_path: Path) -> None:
    """Issue 11: saving through a symbolic link replaced the link with a plain file."""
    from interact.scenario import load_scenario, save_scenario

    real = _scenario(tmp_path, "real.toml")
    link = tmp_path / "link.toml"
    link.symlink_to(real)
    scenario = load_scenario(link)
    save_scenario(scenario, link)
    assert link.is_symlink() and link.resolve() == real.resolve()
    assert load_scenario(real) == scenario
