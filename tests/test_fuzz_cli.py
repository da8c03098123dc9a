"""Property-based test of the command line (issue 14, point 1): any argument list gives a result or a one-line
error with exit code 2 (argparse's usage errors too) -- never a Python traceback -- and every JSON it prints is
strict JSON (no NaN or Infinity: "not reachable" and "never freezes" are said in words).

Arguments are drawn from each command's own options (read from the parser) and from values engineers type,
mistype or paste; the profiles of ``tests/conftest.py`` set how many cases run (``make fuzz`` for the long one).
"""
from __future__ import annotations

import argparse
import contextlib
import io
import json

import pytest
from hypothesis import given
from hypothesis import strategies as st

from convlib import cli

pytestmark = pytest.mark.fuzz

#: Commands with a single design case each (the line-list, study and survey commands read files; they have
#: their own file-safety tests).
COMMANDS = ("surface", "line", "size", "outlet", "freeze", "trace", "steam", "tank", "duct")

VALUES = ("90degC", "-10degC", "20", "0", "-1", "1e-300", "1e400", "nan", "inf", "-inf", "4", "2in", "114.3",
          "168", "0.045W/m/degC", "50mm,0.045", "50mm,0.045,wool", "25mm,0.04W/m/K", "2in,0.31", "3/4", "1-1/2",
          "80%", "5barg", "6bar", "12kg/s", "0.002", "1400m", "1.4km", "(", "1/0", "W/(m*K", "[1, 2]", "",
          "degC", "abc", "1,5", "10m/s", "30mph", "1e6", "300degC", "-300degC", "5K", "0.9", "1.5")


def _options(command: str) -> list[str]:
    parser = cli.build_parser()
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    return sorted(o for action in sub.choices[command]._actions for o in action.option_strings
                  if o.startswith("--") and o not in ("--help",))


_OPTIONS = {c: _options(c) for c in COMMANDS}


@st.composite
def command_lines(draw):
    command = draw(st.sampled_from(COMMANDS))
    options = _OPTIONS[command]
    argv = [command]
    for _ in range(draw(st.integers(0, 9))):
        argv.append(draw(st.sampled_from(options)))
        if draw(st.integers(0, 5)):  # mostly with a value
            argv.append(draw(st.one_of(st.sampled_from(VALUES), st.text(max_size=8))))
    if draw(st.booleans()):
        argv.append("--json")
    return argv


def _strict(text: str):
    def refuse(name):
        raise AssertionError(f"JSON output carries {name}")

    return json.loads(text, parse_constant=refuse)


@given(argv=command_lines())
def test_any_command_line_gives_a_result_or_a_one_line_error(argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = cli.main(argv)
        except SystemExit as exc:  # argparse: usage errors exit 2, --help exits 0
            code = exc.code
    assert code in (0, 2, None), (argv, code, err.getvalue()[-500:])
    assert "Traceback" not in err.getvalue(), argv
    if code == 2:
        last = err.getvalue().rstrip("\n").split("\n")[-1]  # (splitlines would split at control characters)
        assert "error" in last, (argv, err.getvalue()[-500:])
    elif "--json" in argv and out.getvalue().strip().startswith("{"):
        _strict(out.getvalue())


@pytest.mark.parametrize("argv", [
    ["size", "--nps", "4", "--fluid-temperature", "250degC", "--air-temperature", "40degC",
     "--insulation-conductivity", "0.05", "--touch-limit", "41degC", "--json"],
    ["freeze", "--nps", "2", "--initial-temperature", "8degC", "--minimum-ambient", "5degC", "--layer", "30mm,0.04",
     "--json"],
])
def test_not_reachable_and_never_are_said_in_words_not_nan(argv):
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert cli.main(argv) == 0
    _strict(out.getvalue())
