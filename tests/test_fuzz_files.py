"""Property-based tests of what users hand in as files (issue 14, point 1): study files, snapshots and line lists.

Each draws a valid document (the demo study, a saved snapshot, a line-list row), changes one value anywhere in it
to something a careless edit or a hostile file could hold, and checks that reading it gives either a valid object
or :class:`convlib.errors.InputError` naming a field -- never another exception, a numpy warning or a traceback.
A study that still validates is evaluated, and a line list that still parses is run, under the same rule.
The random damage of bytes (truncation, bit flips, huge files) is in ``tests/test_file_safety.py``.
"""
from __future__ import annotations

import argparse
import copy
import csv
import io
import json

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from convlib import cli_study, snapshot
from convlib.linelist import COLUMNS, REQUIRED, read_line_list, run_line_list, write_results_csv
from convlib.study import CaseSpec, StudySpec, evaluate_case, load_demo_study, run_study
from fuzz_helpers import outcome

pytestmark = pytest.mark.fuzz

_UNIT_TEXT = ("90degC", "-40degF", "2in", "50mm", "0.04W/m/K", "3m/s", "6barg", "80%", "1e400", "-0", "(", "1/0",
              "50mm,0.045", "25@0.04 wool", "NaN", "Infinity", "", " ", "\u00a0", "1,5", "abc", "1" * 40)
json_values = st.recursive(
    st.one_of(st.none(), st.booleans(), st.integers(-10**40, 10**40),
              st.floats(allow_nan=False, allow_infinity=False), st.sampled_from(_UNIT_TEXT), st.text(max_size=12)),
    lambda inner: st.one_of(st.lists(inner, max_size=4), st.dictionaries(st.text(max_size=8), inner, max_size=3)),
    max_leaves=8)


def _paths(node, prefix=()):
    """Every path into a JSON document (dict keys and list indices)."""
    yield prefix
    if isinstance(node, dict):
        for key, value in node.items():
            yield from _paths(value, prefix + (key,))
    elif isinstance(node, list):
        for i, value in enumerate(node):
            yield from _paths(value, prefix + (i,))


def _replace(document, path, value):
    out = copy.deepcopy(document)
    if not path:
        return value
    node = out
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = value
    return out


_STUDY = load_demo_study().model_dump(mode="json")
_STUDY_PATHS = list(_paths(_STUDY))


@given(where=st.sampled_from(_STUDY_PATHS), value=json_values)
@example(where=("sweeps", 0, "input"), value=[])  # was a TypeError from inside the unit reading of axes
def test_a_damaged_study_file_is_a_study_or_an_input_error(tmp_path_factory, where, value):
    path = tmp_path_factory.mktemp("study") / "study.json"
    path.write_text(json.dumps(_replace(_STUDY, where, value)), encoding="utf-8")
    spec = outcome(cli_study.load_spec, argparse.Namespace(demo=False, study=str(path)))
    if isinstance(spec, StudySpec):
        outcome(evaluate_case, spec.case)


@pytest.fixture(scope="module")
def saved(tmp_path_factory):
    spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    path = snapshot.save(tmp_path_factory.mktemp("snap") / "s.snapshot.json", spec, run_study(spec),
                         author="A. Engineer")
    return json.loads(path.read_text(encoding="utf-8"))


@given(data=st.data(), value=json_values, rehash=st.booleans())
def test_a_tampered_snapshot_loads_or_is_an_input_error(saved, tmp_path_factory, data, value, rehash):
    where = data.draw(st.sampled_from([p for p in _paths(saved) if p and p[0] != "sha256"]))
    document = _replace(saved, where, value)
    if rehash and isinstance(document, dict):  # a careful forger fixes the hash: validation must still hold
        document["sha256"] = snapshot.content_hash(document)
    path = tmp_path_factory.mktemp("snap") / "t.snapshot.json"
    path.write_text(json.dumps(document), encoding="utf-8")
    outcome(snapshot.load, path)


_HEADER = [*REQUIRED, "nps", "layers", "wind_speed", "jacket_emissivity", "relative_humidity", "location",
           "operating_hours", "outer_diameter", "mass_flow", "minimum_ambient"]
_GOOD = {"tag": "L-1", "length": "120m", "fluid_temperature": "150degC", "air_temperature": "15degC", "nps": "4",
         "layers": "50mm@0.045 wool", "wind_speed": "3m/s", "jacket_emissivity": "0.1", "relative_humidity": "60%",
         "location": "outdoor", "operating_hours": "8000", "outer_diameter": "", "mass_flow": "", "minimum_ambient": ""}
assert set(_HEADER) <= set(COLUMNS)


@given(column=st.sampled_from(_HEADER), cell=st.one_of(st.sampled_from(_UNIT_TEXT), st.text(max_size=16)))
def test_a_line_list_row_parses_and_runs_or_is_a_row_error(tmp_path_factory, column, cell):
    buffer = io.StringIO()
    csv.writer(buffer).writerows([_HEADER, [dict(_GOOD, **{column: cell})[c] for c in _HEADER]])
    parsed = outcome(read_line_list, io.StringIO(buffer.getvalue()))
    if isinstance(parsed, tuple):
        lines, errors = parsed
        assert len(lines) + len(errors) <= 1
    result = outcome(run_line_list, io.StringIO(buffer.getvalue()))
    if not isinstance(result, Exception):
        assert len(result) + len(result.errors) <= 1  # the row ran or is a row error; nothing else happened
        path = tmp_path_factory.mktemp("csv") / "out.csv"
        write_results_csv(result, path)
        with open(path, newline="", encoding="utf-8") as fh:
            header, *rows = list(csv.reader(fh))
        text = {"row", "tag", "status", "notes", "location", "layers", "description"}  # the user's own words
        cells = {row[i].strip().lower() for row in rows for i, name in enumerate(header)
                 if i < len(row) and name.split("[")[0] not in text}
        # numbers only: "not computed" is an empty cell with a note, never NaN or inf
        assert not {"nan", "inf", "-inf", "infinity"} & cells, header


def test_the_undamaged_row_runs():
    buffer = io.StringIO()
    csv.writer(buffer).writerows([_HEADER, [_GOOD[c] for c in _HEADER]])
    result = run_line_list(io.StringIO(buffer.getvalue()))
    assert len(result) == 1 and not result.errors
