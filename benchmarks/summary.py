"""The table that ends ``make bench``: every row of the speed issue's table beside its same-run baseline and target.

Run ``python benchmarks/summary.py`` (the last step of ``make bench``). It reads the figures the benchmark scripts
recorded (:mod:`record`: the JSON named by ``CONVLIB_BENCH_RECORD``, by default ``benchmarks/results/latest.json``)
and prints one table in the order of :data:`record.ROWS`: the figure, its value (with best / median of the rounds
where known), the baseline measured in the same run and what it is, the value as a multiple of the baseline, the
target, and whether the value meets it or by how much it misses ("1.9x over" for a time or memory above its target,
"1.4x short" for a throughput ratio below it). A row no script recorded says "not measured in this run" and names
the script that measures it, so the table also makes sense after running one script alone. The same table is
written as Markdown to ``summary.md`` beside the record (atomically).

Options: ``--record PATH`` (another record file), ``--markdown PATH`` (where to write the Markdown; ``-`` for
nowhere). Exit code 0 whether or not targets are met: this reports, it does not gate.
"""
from __future__ import annotations

import argparse
import math
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import record as bench_record  # noqa: E402

DEFAULT_RECORD = HERE / "results" / "latest.json"

#: Which script measures each row (named in the table when a row is missing).
SCRIPTS = {
    "startup_surface": "benchmarks/startup.py",
    "startup_help": "benchmarks/startup.py",
    "sweep_redraw": "benchmarks/dashboard_latency.py",
    "sweep_redraw_p95": "benchmarks/dashboard_latency.py",
    "card_update": "benchmarks/dashboard_latency.py",
    "first_plot_preheated": "benchmarks/dashboard_latency.py",
    "first_plot_cold": "benchmarks/dashboard_latency.py",
    "kernel_bare": "benchmarks/kernel_ratio.py",
    "kernel_pipe": "benchmarks/kernel_ratio.py",
    "single_point_pipe": "benchmarks/small_calls.py",
    "memory_bare_1e7": "benchmarks/memory.py",
}
COLUMNS = ("figure", "value", "best / median", "baseline", "value / baseline", "target", "result")


def number(value: float | None, unit: str) -> str:
    """A figure in its row's unit: seconds and milliseconds to 3 digits, MiB whole, ratios as 1/x."""
    if value is None or not isinstance(value, (int, float)) or math.isnan(value):
        return "-"
    if unit == "ratio":
        return f"1/{1 / value:.3g}" if value > 0 else f"{value:.3g}"
    if unit == "MiB":
        return f"{value:.0f} MiB"
    return f"{value:.3g} {unit}"


def verdict(value: float, target: float, larger_is_better: bool) -> str:
    """"meets", or "MISSES: <factor>x over" (above a ceiling) / "MISSES: <factor>x short" (below a floor)."""
    if larger_is_better:
        if value >= target:
            return "meets"
        return "MISSES: " + (f"{target / value:.2g}x short" if value > 0 else "nothing measured above 0")
    if value <= target:
        return "meets"
    return f"MISSES: {value / target:.2g}x over"


def row_cells(key: str, entry: dict | None) -> tuple[list[str], str]:
    """The cells of one row and its note ("" when none)."""
    figure, unit, target, larger = bench_record.ROWS[key]
    target_text = (">= " if larger else "<= ") + number(target, unit)
    value = entry.get("value") if isinstance(entry, dict) else None
    if not isinstance(value, (int, float)) or math.isnan(value):
        why = "not measured in this run" if entry is None else "recorded without a value"
        return [figure, "-", "-", "-", "-", target_text, f"{why} (run {SCRIPTS[key]})"], ""
    best, median = entry.get("best"), entry.get("median")
    spread = "-" if best is None and median is None else f"{number(best, unit)} / {number(median, unit)}"
    baseline = entry.get("baseline")
    label = entry.get("baseline_label") or ""
    if baseline is None:
        base_text, multiple = "-" if not label else label, "-"
    else:
        base_text = number(baseline, "" if unit == "ratio" else unit).strip() + (f" ({label})" if label else "")
        multiple = f"{value / baseline:.3g}x" if baseline else "-"
    cells = [figure, number(value, unit), spread, base_text, multiple, target_text, verdict(value, target, larger)]
    return cells, str(entry.get("note") or "")


def table(data: dict) -> tuple[list[list[str]], list[tuple[str, str]]]:
    """Rows of cells in the issue's order, and the notes (figure, note) of the rows that have one."""
    rows, notes = [], []
    for key in bench_record.ROWS:
        cells, note = row_cells(key, data.get(key))
        rows.append(cells)
        if note:
            notes.append((cells[0], note))
    return rows, notes


def render_text(data: dict, source: str) -> str:
    """The table as aligned plain text, for the terminal."""
    rows, notes = table(data)
    widths = [max(len(r[i]) for r in [list(COLUMNS), *rows]) for i in range(len(COLUMNS))]
    line = lambda cells: "  ".join(c.ljust(w) for c, w in zip(cells, widths)).rstrip()  # noqa: E731
    out = [f"Speed targets (issue 11), figures of {source}", line(COLUMNS), line(["-" * w for w in widths])]
    out += [line(r) for r in rows]
    if notes:
        out += ["notes:"] + [f"  {figure}: {note}" for figure, note in notes]
    out += unknown_rows(data)
    return "\n".join(out) + "\n"


def render_markdown(data: dict, source: str) -> str:
    """The same table in Markdown (for ``summary.md``)."""
    rows, notes = table(data)
    cell = lambda text: text.replace("|", "\\|")  # noqa: E731
    out = ["# Speed targets (issue 11)", "", f"Figures of {source}.", "",
           "| " + " | ".join(COLUMNS) + " |", "|" + "---|" * len(COLUMNS)]
    out += ["| " + " | ".join(cell(c) for c in r) + " |" for r in rows]
    if notes:
        out += ["", "Notes:", ""] + [f"- {figure}: {note}" for figure, note in notes]
    extra = unknown_rows(data)
    if extra:
        out += ["", *extra]
    return "\n".join(out) + "\n"


def unknown_rows(data: dict) -> list[str]:
    """A line naming recorded keys the table does not know (none: [])."""
    unknown = sorted(set(data) - set(bench_record.ROWS))
    return ["ignored rows the table does not know: " + ", ".join(unknown)] if unknown else []


def record_path(given: str | None) -> Path:
    """The record to read: ``--record``, else ``CONVLIB_BENCH_RECORD``, else benchmarks/results/latest.json."""
    if given:
        return Path(given)
    return bench_record.path() or DEFAULT_RECORD


def describe(path: Path) -> str:
    """"<path> (written <local time>)", or that it does not exist."""
    if not path.exists():
        return f"{path} (no such file: nothing recorded yet)"
    stamp = time.strftime("%Y-%m-%d %H:%M", time.localtime(path.stat().st_mtime))
    return f"{path} (written {stamp})"


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--record", help="record file (default: $CONVLIB_BENCH_RECORD or "
                                         "benchmarks/results/latest.json)")
    parser.add_argument("--markdown", help="Markdown output (default: summary.md beside the record; - for none)")
    args = parser.parse_args(argv)
    path = record_path(args.record)
    data = bench_record.load(path)
    source = describe(path)
    print(render_text(data, source), end="")
    target = args.markdown if args.markdown is not None else str(path.parent / "summary.md")
    if target != "-":
        from convlib.files import write_atomic

        written = write_atomic(Path(target), render_markdown(data, source).encode("utf-8"))
        print(f"written: {written}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
