"""Surveys and upgrade studies of long line lists, chunked through ``dask.distributed``.

The list is read once (CSV or Parquet via pyarrow) and cut into chunks of rows; each chunk is parsed and computed
by :func:`convlib.upgrade.upgrade_study` on a worker. Every line keeps its global row number, and its random draws
come from ``SeedSequence(seed, spawn_key=(row,))`` (:func:`convlib.survey.line_samples`), so the numbers of a line
do not depend on the chunk it lands in: the chunked results equal the serial ones bit for bit (tested).

Engines: ``workers=N`` starts a ``LocalCluster`` of N single-threaded worker processes for the call (``processes=
False``: threads in this process); ``scheduler="tcp://host:8786"`` uses a running cluster whose workers have convlib
installed. Without either, :func:`run_study` runs serially in this process (no Dask needed). Rows that cannot be
computed are returned as errors (row number, tag, reason), never dropped silently.

Needs the ``scale`` extra: ``pip install convlib[scale]`` (dask[distributed], pyarrow).
"""
from __future__ import annotations

import csv
import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .errors import InputError
from .survey import RowError, _columns_of, read_survey
from .upgrade import StudySettings, upgrade_study

__all__ = ["StudyOutput", "run_study", "run_chunk", "write_rows", "DEFAULT_CHUNK"]

#: glibc settings for LocalCluster worker processes. Dask's nanny sets MALLOC_TRIM_THRESHOLD_=64 KiB, which also
#: turns off glibc's dynamic mmap threshold: every large numpy temporary is then a fresh mmap with page faults on
#: first touch (measured: a 100-line chunk took 2x as long in a worker as in this process). 128 MiB / 64 MiB keep
#: the temporaries of a chunk on the heap; a cluster reached with ``scheduler`` keeps its own settings.
WORKER_MALLOC = {"distributed.nanny.pre-spawn-environ.MALLOC_TRIM_THRESHOLD_": 1 << 27,
                 "distributed.nanny.pre-spawn-environ.MALLOC_MMAP_THRESHOLD_": 1 << 26}

DEFAULT_CHUNK = 500  # lines per task: large enough to keep numpy busy, small enough to spread over workers


@dataclass(frozen=True)
class StudyOutput:
    """Columns (one row per line and offered option) and the rows that failed."""

    rows: dict
    errors: list

    def __len__(self) -> int:
        return int(len(self.rows.get("index", ())))


def run_chunk(columns: dict, first_index: int, settings: StudySettings) -> tuple[dict, list]:
    """One chunk: parse its rows (numbered from ``first_index``) and run the upgrade study on the valid ones."""
    lines, errors = read_survey(columns, first_index=first_index)
    if len(lines) == 0:
        return {}, errors
    try:
        return upgrade_study(lines, settings), errors
    except InputError:
        # a rule only the physics can check (e.g. a state CoolProp refuses): compute line by line to find it
        parts, errs = [], list(errors)
        for k in range(len(lines)):
            one = lines.take(slice(k, k + 1))
            try:
                parts.append(upgrade_study(one, settings))
            except InputError as err:
                errs.append(RowError(int(one.index[0]), str(one.tag[0]), str(err)))
        errs.sort(key=lambda e: e.index)
        return _concat(parts), errs


def _concat(parts: list[dict]) -> dict:
    parts = [p for p in parts if p]
    if not parts:
        return {}
    return {k: np.concatenate([p[k] for p in parts]) for k in parts[0]}


def _chunks(columns: dict, chunk_size: int):
    n = len(next(iter(columns.values()))) if columns else 0
    for start in range(0, n, chunk_size):
        yield start, {k: v[start:start + chunk_size] for k, v in columns.items()}


def run_study(source, settings: StudySettings, *, workers: int | None = None, scheduler: str | None = None,
              chunk_size: int = DEFAULT_CHUNK, processes: bool = True, progress: bool = False,
              client=None) -> StudyOutput:
    """Run the survey and upgrade study of a line list, serially or chunked on Dask.

    Parameters
    ----------
    source : path (CSV / Parquet), CSV text, or dict of columns
    settings : StudySettings
    workers : int, optional
        Start a LocalCluster with this many workers for the call.
    scheduler : str, optional
        Address of a running Dask scheduler (``tcp://host:8786``); wins over ``workers``.
    chunk_size : int
        Lines per task (Dask only).
    processes : bool
        LocalCluster workers as processes (True) or threads in this process (False).
    progress : bool
        Print a progress line to stderr as chunks finish.
    client : distributed.Client, optional
        A connected client to use (and leave open) instead of starting one.

    Examples
    --------
    >>> from convlib.survey import demo_survey_path, Measurement
    >>> from convlib.upgrade import CostTable, demo_costs_path
    >>> from convlib.design import WeatherBins
    >>> s = StudySettings(WeatherBins.single(283.15, 3.0), CostTable.read(demo_costs_path()), Measurement(samples=8))
    >>> out = run_study(demo_survey_path(), s)
    >>> len(out) > 12, out.errors
    (True, [])
    """
    columns = _columns_of(source)
    if chunk_size < 1:
        raise InputError(f"chunk_size must be >= 1, got {chunk_size}", field="chunk_size", rule=">= 1",
                         value=chunk_size)
    if workers is None and scheduler is None and client is None:
        rows, errors = run_chunk(columns, 0, settings)
        return StudyOutput(rows, errors)
    try:
        from distributed import Client, LocalCluster, as_completed
    except ImportError:
        raise InputError("running on Dask needs the 'scale' extra: pip install 'convlib[scale]'",
                         field="--workers/--scheduler", rule="dask.distributed installed", value=None) from None
    own = client is None
    cluster = None
    if client is not None:
        pass
    elif scheduler is not None:
        client = Client(scheduler)
    else:
        if int(workers) < 1:
            raise InputError(f"workers must be >= 1, got {workers}", field="workers", rule=">= 1", value=workers)
        import dask

        with dask.config.set(WORKER_MALLOC):
            cluster = LocalCluster(n_workers=int(workers), threads_per_worker=1, processes=processes,
                                   dashboard_address=None)
        client = Client(cluster)
    try:
        shared = client.scatter(settings, broadcast=True, hash=False)  # a fresh key per call: a reused client
        futures = [client.submit(run_chunk, part, start, shared, pure=False) for start, part in
                   _chunks(columns, int(chunk_size))]
        if progress:
            done = 0
            for _ in as_completed(futures):
                done += 1
                print(f"\r{done}/{len(futures)} chunks", end="", file=sys.stderr, flush=True)
            print(file=sys.stderr)
        results = client.gather(futures)  # in submission order: the serial order of the lines
    finally:
        if own:
            client.close()
        if cluster is not None:
            cluster.close()
    rows = _concat([r for r, _ in results])
    errors = [e for _, errs in results for e in errs]
    return StudyOutput(rows, errors)


def write_rows(rows: dict, path, errors: list | None = None) -> list[Path]:
    """Write columns to ``.parquet`` (pyarrow) or ``.csv`` by the suffix; errors (if any) to ``<stem>_errors.csv``.

    Values are SI (W, kWh, m, K, W/m/K) and money in the tariff's currency. Returns the paths written.
    """
    path = Path(path)
    names = list(rows)
    written = [path]
    if path.suffix.lower() in (".parquet", ".pq"):
        import pyarrow as pa
        import pyarrow.parquet as pq

        table = pa.table({k: pa.array(list(v) if np.asarray(v).dtype == object else np.asarray(v))
                          for k, v in rows.items()})
        pq.write_table(table, path)
    elif path.suffix.lower() == ".csv":
        with path.open("w", newline="", encoding="utf-8") as f:
            w = csv.writer(f)
            w.writerow(names)
            n = len(rows[names[0]]) if names else 0
            for i in range(n):
                w.writerow([_cell(rows[k][i]) for k in names])
    else:
        raise InputError(f"output must end in .parquet or .csv, got {path.name!r}", field="--output",
                         rule=".parquet or .csv", value=str(path))
    if errors:
        err_path = path.with_name(path.stem + "_errors.csv")
        with err_path.open("w", newline="", encoding="utf-8") as f:
            w = csv.writer(f)
            w.writerow(["row", "tag", "reason"])
            for e in errors:
                w.writerow([e.index, e.tag, e.reason])
        written.append(err_path)
    return written


def _cell(value):
    if isinstance(value, (float, np.floating)):
        return repr(float(value))  # round-trips exactly
    if isinstance(value, (np.integer,)):
        return int(value)
    if isinstance(value, (np.bool_, bool)):
        return bool(value)
    return value
