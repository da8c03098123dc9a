"""Scale benchmark: surveyed lines per second through the upgrade study, serial and on a Dask LocalCluster.

    python benchmarks/scale.py                     # 2,000 line-cases x 100 samples (what make bench runs)
    python benchmarks/scale.py --lines 100000      # the issue's 10^5 line-cases (about an hour per worker core)
    python benchmarks/scale.py --quick             # 200 line-cases, a smoke run
    python benchmarks/scale.py --lines 100000 --baseline-lines 2000 --repeat 1   # the serial baseline on a subset

The baseline is the serial path (one process, no Dask) on the same lines in the same run; each engine is timed
``--repeat`` times (best and median) and its ratio to the baseline is printed, with a check that every engine
returned the baseline's numbers bit for bit. Not a test: nothing asserts a timing. The line-cases are the invented
demo survey repeated with seeded random changes of size, length and measured temperature.
"""
from __future__ import annotations

import argparse
import os
import statistics
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from convlib.scale import run_study  # noqa: E402
from convlib.survey import Measurement, demo_survey_path, read_survey  # noqa: E402
from convlib.upgrade import CostTable, StudySettings, demo_costs_path  # noqa: E402
from convlib.weather import demo_weather_path, read_epw, to_bins  # noqa: E402


def line_cases(n: int, seed: int) -> dict:
    """``n`` line-cases as columns: demo lines with seeded changes (jacket stays between air and fluid)."""
    lines, _ = read_survey(demo_survey_path())
    rng = np.random.default_rng(seed)
    pick = rng.integers(0, len(lines), n)
    air = lines.air_temperature[pick] - 273.15
    fluid = lines.fluid_temperature[pick] - 273.15
    jacket = lines.surface_temperature[pick] - 273.15
    share = np.clip((jacket - air) / (fluid - air) * rng.uniform(0.8, 1.3, n), 0.005, 0.6)
    return {
        "tag": [f"B-{i:06d}" for i in range(n)], "nps": rng.choice(["2", "3", "4", "6", "8"], n).tolist(),
        "fluid_temperature[degC]": fluid.round(1).tolist(),
        "insulation_thickness[mm]": (lines.insulation_thickness[pick] * 1000).tolist(),
        "design_conductivity[W/m/K]": lines.design_conductivity[pick].tolist(),
        "jacket_emissivity": lines.jacket_emissivity[pick].tolist(),
        "surface_temperature[degC]": (air + share * (fluid - air)).round(1).tolist(),
        "air_temperature[degC]": air.tolist(),
        "wind_speed[m/s]": lines.wind_speed[pick].tolist(),
        "length[m]": rng.uniform(5, 200, n).round(0).tolist(),
        "operating_hours[h]": lines.operating_hours[pick].tolist(),
    }


def timed(call, repeat):
    times, result = [], None
    for _ in range(repeat):
        t0 = time.perf_counter()
        result = call()
        times.append(time.perf_counter() - t0)
    return times, result


def same(a, b) -> bool:
    if a.rows.keys() != b.rows.keys() or a.errors != b.errors:
        return False
    return all(np.array_equal(a.rows[k], b.rows[k], equal_nan=a.rows[k].dtype != object) for k in a.rows)


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--lines", type=int, default=2000)
    p.add_argument("--samples", type=int, default=100)
    p.add_argument("--quick", action="store_true", help="200 line-cases")
    p.add_argument("--repeat", type=int, default=2)
    p.add_argument("--workers", type=int, nargs="*", default=[1, 2])
    p.add_argument("--chunk-size", type=int, default=100)
    p.add_argument("--seed", type=int, default=20261203)
    p.add_argument("--baseline-lines", type=int, help="time the serial baseline on the first N line-cases only "
                   "(its lines/s stand for the whole; engines are then checked against the first cluster's numbers)")
    args = p.parse_args(argv)
    n = 200 if args.quick else args.lines
    settings = StudySettings(to_bins(read_epw(demo_weather_path()), 3.0, (0.0, 1.0, 3.0, 6.0)),
                             CostTable.read(demo_costs_path()), Measurement(samples=args.samples, seed=args.seed))
    columns = line_cases(n, args.seed)
    print(f"scale: {n} line-cases x {args.samples} samples x {settings.bins.hours.size} weather bins, "
          f"chunks of {args.chunk_size}, {os.cpu_count()} cores")
    subset = args.baseline_lines if args.baseline_lines and args.baseline_lines < n else n
    part = columns if subset == n else {k: v[:subset] for k, v in columns.items()}
    base_times, base = timed(lambda: run_study(part, settings), args.repeat)
    base_times = [t * n / subset for t in base_times]  # lines/s of the subset, as the time of the whole
    rows = [("serial (baseline)" + ("" if subset == n else f", {subset} lines"), base_times, True)]
    import dask
    from distributed import Client, LocalCluster

    from convlib.scale import WORKER_MALLOC

    startup, reference_taken = {}, False
    for w in args.workers:
        t0 = time.perf_counter()
        with dask.config.set(WORKER_MALLOC), LocalCluster(n_workers=w, threads_per_worker=1,
                                                          dashboard_address=None) as cluster, Client(cluster) as client:
            client.run(lambda: run_study(line_cases(5, 1), settings))  # warm each worker: imports, property tables
            startup[w] = time.perf_counter() - t0
            times, out = timed(lambda: run_study(columns, settings, client=client, chunk_size=args.chunk_size),
                               args.repeat)
        reference = subset < n and not reference_taken
        reference_taken = reference_taken or reference
        if reference:
            base = out  # the first cluster's numbers on the whole list are the reference of the others
        rows.append((f"LocalCluster {w} worker{'s' if w > 1 else ''}", times, None if reference else same(out, base)))
    best_base = min(base_times)
    print(f"{'engine':<26}{'lines/s best':>14}{'lines/s median':>16}{'ratio (best)':>14}  identical")
    for name, times, identical in rows:
        print(f"{name:<26}{n / min(times):>14.1f}{n / statistics.median(times):>16.1f}"
              f"{best_base / min(times):>14.2f}  {'reference' if identical is None else 'yes' if identical else 'NO'}")
    print("(ratio: baseline time / engine time, on a started and warmed cluster; start-up and warm-up took "
          + ", ".join(f"{t:.0f} s with {w}" for w, t in startup.items()) + ")")
    return 0


if __name__ == "__main__":
    sys.exit(main())
