"""Conventions enforced by reading the source: import direction, no I/O in the core, public API."""

from __future__ import annotations

import ast
from pathlib import Path

import interact

PACKAGE = Path(interact.__file__).parent
SHELLS = ("cli", "tui", "report", "__main__")
FORBIDDEN_IMPORTS = ("textual", "rich", "argparse", "plotext", "interact.cli", "interact.tui", "interact.report")


def _core_files() -> list[Path]:
    out = []
    for path in PACKAGE.rglob("*.py"):
        rel = path.relative_to(PACKAGE)
        if rel.parts[0] in SHELLS or rel.parts[0].removesuffix(".py") in SHELLS:
            continue
        out.append(path)
    return out


def test_core_imports_no_shell_and_does_no_io() -> None:
    offences = []
    for path in _core_files():
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            names: list[str] = []
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom):
                base = node.module or ""
                if node.level:
                    pkg = ".".join(("interact", *path.relative_to(PACKAGE).parts[:-1]))
                    parts = pkg.split(".")
                    base = ".".join(parts[: len(parts) - node.level + 1] + ([base] if base else []))
                names = [base]
            elif isinstance(node, ast.Call) and isinstance(node.func, ast.Name) and node.func.id in ("print", "open", "input"):
                offences.append(f"{path.name}:{node.lineno} calls {node.func.id}()")
            for name in names:
                if any(name == f or name.startswith(f + ".") for f in FORBIDDEN_IMPORTS):
                    offences.append(f"{path.name}:{node.lineno} imports {name}")
    assert not offences, offences


def test_all_is_sorted_and_complete() -> None:
    assert interact.__all__ == sorted(interact.__all__)
    for name in interact.__all__:
        assert hasattr(interact, name), name


def test_reference_tables_found() -> None:
    from interact.tables import tables_dir

    assert (tables_dir() / "rules" / "ich-m12-2024.toml").is_file()


def test_cold_path_does_not_import_scipy_or_textual() -> None:
    """`interact assess` must start fast: no scipy submodules (pint itself imports the light top-level scipy), no Textual."""
    import subprocess
    import sys

    code = (
        "import sys, interact, interact.assessment, interact.report.assessment, interact.cli;"
        "bad=[m for m in ('scipy.optimize', 'scipy.stats', 'scipy.integrate', 'textual', 'matplotlib', 'plotext') if m in sys.modules];"
        "print(','.join(bad))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.strip()
    assert out == "", f"imported on the cold path: {out}"
