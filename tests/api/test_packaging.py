"""The package is typed (PEP 561) and its version is written in one place."""

from __future__ import annotations

import importlib.metadata
import tomllib
from pathlib import Path

import interact

ROOT = Path(__file__).resolve().parents[2]


def test_py_typed_marker_ships_with_the_package() -> None:
    assert (Path(interact.__file__).parent / "py.typed").is_file()


def test_version_is_single_sourced() -> None:
    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    assert "version" not in project["project"] and "version" in project["project"]["dynamic"]
    assert project["tool"]["hatch"]["version"]["path"] == "interact/__init__.py"
    assert importlib.metadata.version("interact") == interact.__version__
