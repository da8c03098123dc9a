"""Structure rules of DEVELOPERS.md, checked on the source: modules stay small enough to read, functions short.

Issue 10 point 10: modules split where they mix concerns (none over 600 lines), no function over about 80 lines
(its body, the docstring left out). The limits are the project's own (common practice, no source).
"""
from __future__ import annotations

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
SOURCES = sorted([*ROOT.glob("convlib/**/*.py"), *ROOT.glob("dashboard/**/*.py")])
MAX_MODULE_LINES = 600
MAX_FUNCTION_LINES = 80


def _body_lines(node: ast.FunctionDef | ast.AsyncFunctionDef) -> int:
    lines = node.end_lineno - node.lineno + 1
    first = node.body[0]
    if isinstance(first, ast.Expr) and isinstance(getattr(first, "value", None), ast.Constant) \
            and isinstance(first.value.value, str):
        lines -= first.end_lineno - first.lineno + 1
    return lines


def test_the_sources_are_found():
    names = {p.relative_to(ROOT).as_posix() for p in SOURCES}
    assert {"convlib/pipe.py", "convlib/vessels.py", "dashboard/app.py"} <= names


@pytest.mark.parametrize("path", SOURCES, ids=lambda p: p.relative_to(ROOT).as_posix())
def test_module_and_function_sizes(path):
    text = path.read_text(encoding="utf-8")
    assert text.count("\n") <= MAX_MODULE_LINES, f"{path.name}: {text.count(chr(10))} lines; split it by concern"
    long = [(node.name, _body_lines(node)) for node in ast.walk(ast.parse(text))
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and _body_lines(node) > MAX_FUNCTION_LINES]
    assert not long, f"{path.name}: functions over {MAX_FUNCTION_LINES} lines (docstring left out): {long}"


def test_vessels_import_nothing_private():
    """Issue 10: vessels (and the face modules) import no private name of another module."""
    for name in ("vessels", "ducts", "faces", "face_sizing"):
        tree = ast.parse((ROOT / "convlib" / f"{name}.py").read_text(encoding="utf-8"))
        private = [a.name for node in ast.walk(tree) if isinstance(node, ast.ImportFrom)
                   for a in node.names if a.name.startswith("_")]
        assert not private, f"convlib/{name}.py imports private names: {private}"
