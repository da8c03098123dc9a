"""Running ``convlib.cli.main`` in-process in tests (with pytest's ``capsys``)."""
from __future__ import annotations

import json

from convlib.cli import main


def run_json(capsys, *argv):
    """The parsed ``--json`` output of a command that must succeed."""
    code = main([*argv, "--json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    return json.loads(out)


def run_text(capsys, *argv):
    """The table output of a command that must succeed."""
    code = main(list(argv))
    out, err = capsys.readouterr()
    assert code == 0, err
    return out


def run_error(capsys, *argv):
    """The one-line error of a command that must fail with exit code 2."""
    code = main(list(argv))
    out, err = capsys.readouterr()
    assert code == 2, out
    assert err.count("\n") == 1 and "Traceback" not in err   # one line
    return err
