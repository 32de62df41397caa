"""The kinetics package keeps its rooms small: no function over 100 lines (issue 12, "a test ... fails on any function
over 100 lines"; common practice for readable code, the limit is this project's)."""

from __future__ import annotations

import ast
from pathlib import Path

KINETICS = Path(__file__).resolve().parents[2] / "interact" / "kinetics"


def test_no_function_in_kinetics_is_over_100_lines() -> None:
    long = []
    for path in sorted(KINETICS.glob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef) and node.end_lineno is not None:
                lines = node.end_lineno - node.lineno + 1
                if lines > 100:
                    long.append(f"{path.name}:{node.lineno} {node.name} ({lines} lines)")
    assert len(list(KINETICS.glob("*.py"))) > 5  # the package was found
    assert not long, long
