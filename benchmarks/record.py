"""Figures of one ``make bench`` run, kept for the summary table that ends it (``benchmarks/summary.py``).

Each benchmark script calls :func:`record` for the figures the speed issue's table names, with the baseline it
measured in the same run. The figures go into the JSON file named by the environment variable
``CONVLIB_BENCH_RECORD`` (``make bench`` sets it to ``benchmarks/results/latest.json`` and clears the file
first); without the variable :func:`record` does nothing, so every script still runs alone. The file is
rewritten whole on each call (write to a temporary file, then rename), so an interrupted run leaves the
figures recorded so far.

Keys (one per row of the table, in this order): ``startup_surface``, ``startup_help``, ``sweep_redraw``,
``card_update``, ``first_plot_preheated``, ``first_plot_cold``, ``kernel_bare``, ``kernel_pipe``,
``single_point_pipe``, ``memory_bare_1e7``.
"""
from __future__ import annotations

import json
import os
import tempfile
from pathlib import Path

ENV = "CONVLIB_BENCH_RECORD"

#: The rows of the summary table in the issue's order: key -> (figure, unit, target, larger values are better).
ROWS = {
    "startup_surface": ("`convlib surface ...` wall time (median)", "s", 0.8, False),
    "startup_help": ("`convlib --help` wall time (median)", "s", 0.4, False),
    "sweep_redraw": ("key press -> redrawn sweep, median", "ms", 60.0, False),
    "sweep_redraw_p95": ("key press -> redrawn sweep, p95", "ms", 150.0, False),
    "card_update": ("key press -> cards, median", "ms", 35.0, False),
    "first_plot_preheated": ("first interactive plot, preheated kernel", "s", 2.0, False),
    "first_plot_cold": ("first interactive plot, cold kernel", "s", 8.0, False),
    "kernel_bare": ("bare_surface vs fused kernel, worst of 1e4-1e7 (throughput ratio)", "ratio", 1 / 3, True),
    "kernel_pipe": ("insulated_pipe vs fused kernel, worst of 1e2-1e7 (throughput ratio)", "ratio", 1 / 5, True),
    "single_point_pipe": ("single-point insulated_pipe call (best)", "ms", 0.5, False),
    "memory_bare_1e7": ("peak memory, bare_surface at 1e7 incl. outputs (1.5 GB read as GiB)", "MiB", 1536.0, False),
}


def path() -> Path | None:
    """The record file of this run, or None when no run is being recorded."""
    value = os.environ.get(ENV, "").strip()
    return Path(value) if value else None


def load(file: Path | None = None) -> dict:
    """The figures recorded so far ({} when none or unreadable)."""
    file = file or path()
    if file is None or not file.exists():
        return {}
    try:
        data = json.loads(file.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return {}
    return data if isinstance(data, dict) else {}


def record(key: str, *, value: float, baseline: float | None = None, baseline_label: str = "",
           best: float | None = None, median: float | None = None, note: str = "") -> None:
    """Record one figure of the table (``key`` one of :data:`ROWS`) in the unit of its row.

    ``value`` is the figure compared with the target; ``baseline`` the same-run baseline in the same unit
    (``baseline_label`` says what it is); ``best``/``median`` the spread of the rounds when known.
    """
    if key not in ROWS:
        raise KeyError(f"unknown benchmark row {key!r}; known: {', '.join(ROWS)}")
    file = path()
    if file is None:
        return
    data = load(file)
    data[key] = {"value": float(value), "baseline": None if baseline is None else float(baseline),
                 "baseline_label": baseline_label, "best": None if best is None else float(best),
                 "median": None if median is None else float(median), "note": note}
    file.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(dir=file.parent, prefix=".record-", suffix=".json")
    with os.fdopen(fd, "w", encoding="utf-8") as handle:
        json.dump(data, handle, indent=1, sort_keys=True)
    os.replace(tmp, file)
