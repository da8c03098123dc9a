"""The summary table that ends ``make bench`` (benchmarks/summary.py), on a fabricated record: no timing here.

The expected cells are worked out by hand from the fabricated figures and the targets of issue 11's table (as
written in benchmarks/record.py ROWS): e.g. 1.2 s against a ceiling of 0.8 s misses by 1.2 / 0.8 = 1.5x; a
throughput ratio of 1/4.2 against a floor of 1/3 misses by 4.2 / 3 = 1.4x.
"""
import importlib.util
import json
import os
from pathlib import Path

import pytest

_PATH = Path(__file__).resolve().parents[1] / "benchmarks" / "summary.py"
_spec = importlib.util.spec_from_file_location("bench_summary", _PATH)
summary = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(summary)
ROWS = summary.bench_record.ROWS

RECORD = {
    # a miss above a ceiling: 1.2 s median against <= 0.8 s
    "startup_surface": {"value": 1.2, "baseline": 0.05, "baseline_label": "python -c pass, median", "best": 1.0,
                        "median": 1.2, "note": "load 3 at start"},
    # a meet below a ceiling
    "startup_help": {"value": 0.3, "baseline": 0.05, "baseline_label": "python -c pass, median", "best": 0.25,
                     "median": 0.3, "note": ""},
    # a miss below a floor: 1/4.2 against >= 1/3
    "kernel_bare": {"value": 1 / 4.2, "baseline": 1.0, "baseline_label": "fused numba kernel = 1", "best": None,
                    "median": None, "note": "1e4: 1/4.2, 1e6: 1/1.1"},
    # a meet above a floor
    "kernel_pipe": {"value": 1 / 2.5, "baseline": 1.0, "baseline_label": "fused numba kernel = 1", "best": None,
                    "median": None, "note": ""},
    "memory_bare_1e7": {"value": 1530.0, "baseline": 3234.0, "baseline_label": "same call in one piece",
                        "best": None, "median": None, "note": ""},
}


def _row(text: str, figure: str) -> str:
    lines = [line for line in text.splitlines() if line.startswith(figure)]
    assert len(lines) == 1, (figure, text)
    return lines[0]


def test_every_row_in_the_issue_order():
    text = summary.render_text(RECORD, "fabricated")
    positions = [text.index(figure) for figure, *_ in ROWS.values()]
    assert positions == sorted(positions)
    assert len(ROWS) == 11  # the issue's nine rows, two of them split in two (median / p95, preheated / cold)


def test_missing_rows_name_the_script_that_measures_them():
    text = summary.render_text(RECORD, "fabricated")
    for key in ("sweep_redraw", "sweep_redraw_p95", "card_update", "first_plot_preheated", "first_plot_cold"):
        assert "not measured in this run (run benchmarks/dashboard_latency.py)" in _row(text, ROWS[key][0])
    assert "not measured in this run (run benchmarks/small_calls.py)" in _row(text, ROWS["single_point_pipe"][0])
    assert set(summary.SCRIPTS) == set(ROWS)


def test_an_empty_record_lists_every_row_as_not_measured():
    text = summary.render_text({}, "nothing")
    assert text.count("not measured in this run") == len(ROWS)


def test_a_time_above_its_ceiling_misses_by_the_factor():
    cells, note = summary.row_cells("startup_surface", RECORD["startup_surface"])
    assert cells[1:] == ["1.2 s", "1 s / 1.2 s", "0.05 s (python -c pass, median)", "24x", "<= 0.8 s",
                         "MISSES: 1.5x over"]
    assert note == "load 3 at start"


def test_a_time_within_its_ceiling_meets():
    cells, _ = summary.row_cells("startup_help", RECORD["startup_help"])
    assert cells[1] == "0.3 s" and cells[-2:] == ["<= 0.4 s", "meets"]


def test_a_ratio_below_its_floor_misses_short():
    cells, _ = summary.row_cells("kernel_bare", RECORD["kernel_bare"])
    assert cells[1] == "1/4.2" and cells[3] == "1 (fused numba kernel = 1)"
    assert cells[-2:] == [">= 1/3", "MISSES: 1.4x short"]


def test_a_ratio_above_its_floor_meets():
    cells, _ = summary.row_cells("kernel_pipe", RECORD["kernel_pipe"])
    assert cells[1] == "1/2.5" and cells[-2:] == [">= 1/5", "meets"]


def test_memory_in_mib_with_its_baseline_multiple():
    cells, _ = summary.row_cells("memory_bare_1e7", RECORD["memory_bare_1e7"])
    # 1530 / 3234 = 0.4731; 1.5 GB read as 1.5 GiB = 1536 MiB (benchmarks/record.py)
    assert cells[1:] == ["1530 MiB", "-", "3234 MiB (same call in one piece)", "0.473x", "<= 1536 MiB", "meets"]


@pytest.mark.parametrize("value, target, larger, expected", [
    (0.5, 0.5, False, "meets"),          # on the target is within it
    (0.95, 0.5, False, "MISSES: 1.9x over"),
    (0.2, 0.2, True, "meets"),
    (0.1, 0.2, True, "MISSES: 2x short"),
])
def test_verdict(value, target, larger, expected):
    assert summary.verdict(value, target, larger) == expected


def test_entry_without_a_value_and_unknown_keys():
    text = summary.render_text({"startup_help": {"note": "broken"}, "someone_else": {"value": 1.0}}, "odd")
    assert "recorded without a value (run benchmarks/startup.py)" in _row(text, ROWS["startup_help"][0])
    assert "ignored rows the table does not know: someone_else" in text


def test_notes_listed_under_the_table():
    text = summary.render_text(RECORD, "fabricated")
    notes = text[text.index("notes:"):]
    assert "1e4: 1/4.2, 1e6: 1/1.1" in notes and "load 3 at start" in notes


def test_main_prints_and_writes_markdown(tmp_path, capsys):
    record = tmp_path / "latest.json"
    record.write_text(json.dumps(RECORD), encoding="utf-8")
    assert summary.main(["--record", str(record)]) == 0
    printed = capsys.readouterr().out
    assert "MISSES: 1.5x over" in printed
    markdown = (tmp_path / "summary.md").read_text(encoding="utf-8")
    lines = [line for line in markdown.splitlines() if line.startswith("| ")]
    assert len(lines) == 1 + len(ROWS)  # header and one line per row
    assert all(line.count(" | ") == len(summary.COLUMNS) - 1 for line in lines)
    assert "| >= 1/3 | MISSES: 1.4x short |" in markdown
    assert not [name for name in os.listdir(tmp_path) if name.endswith(".tmp")]


def test_main_without_a_record(tmp_path, capsys):
    assert summary.main(["--record", str(tmp_path / "none.json"), "--markdown", "-"]) == 0
    printed = capsys.readouterr().out
    assert "no such file" in printed and printed.count("not measured in this run") == len(ROWS)
    assert os.listdir(tmp_path) == []
