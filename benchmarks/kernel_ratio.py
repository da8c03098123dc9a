"""convlib's throughput as a ratio to a fused, compiled kernel of the same physics, and its memory.

Run ``python benchmarks/kernel_ratio.py`` (part of ``make bench``, which installs numba through the ``bench`` extra).
For each of ``bare_surface`` (horizontal cylinder at a known surface temperature) and ``insulated_pipe`` (one
constant-k layer, surface temperature solved to convlib's default 1e-6 K) and each size (default 10^2, 10^4, 10^6,
10^7 points), convlib and the reference kernel (:mod:`reference_kernel`, numba ``njit``, one core) each run in a
fresh process: one untimed warm-up call on a few points (imports, table, compilation), then ``--rounds`` timed
calls on all points (calls on small arrays repeated to about 0.1 s per round), each result dropped before the next.
Printed per size: per-point time of both (best / median of the rounds), convlib's throughput as a fraction of the
kernel's (best against best), the peak RSS of each process above its inputs (so outputs and temporaries), and the
kernel's outer-exchange evaluations per point.

Agreement: in each kernel process the first 10^4 points (or all) are also computed by convlib; the largest relative
difference in ``q_per_length`` is printed and must be <= 1e-5 (``--rtol``), else the run ends with exit code 1. The
insulated pipe is compared with both sides solved to 1e-9 K (at 1e-6 K, points whose fluid is within a few
hundredths of a kelvin of the air differ by more than 1e-5 in q only because the two root finders stop at
different points inside the tolerance).

For the speed table of ``make bench`` (``record.py``, ``summary.py``) it records the worst ratio of the bare
surface over the sizes 10^4-10^7 and of the insulated pipe over every size, each size's ratio in the note.

Options: ``--sizes 1e2 1e4`` (any sizes), ``--rounds N`` (default 5; 3 at 10^7, 2 for the insulated pipe at
10^7), ``--kinds bare``, ``--seed N``, ``--quick`` (sizes 1e2 1e4 1e5, 3 rounds). Not a test: nothing here asserts
a timing; the ratio, measured in the same run, is the figure to compare between runs.
"""
from __future__ import annotations

import argparse
import json
import math
import os
import statistics
import subprocess
import sys
import time

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
from peak_rss import peak, reset_peak  # noqa: E402
from record import record  # noqa: E402

SIZES = (1e2, 1e4, 1e6, 1e7)
#: The issue's targets: convlib's throughput as a fraction of the kernel's, and the figures before.
TARGETS = {"bare": (1 / 3, "1/7.5 - 1/18 at 1e4-1e7, 1/25 - 1/90 below 1e3"),
           "insulated": (1 / 5, "1/13 - 1/33")}
CHECK_POINTS = 10_000
ROUND_SECONDS = 0.1
#: rows of the speed table (benchmarks/record.py) and the sizes whose worst ratio each reports
RECORDED = {"bare": ("kernel_bare", 1e4, 1e7), "insulated": ("kernel_pipe", 0.0, math.inf)}


def draw(kind: str, n: int, seed: int) -> dict[str, np.ndarray]:
    """Random outdoor cases (seeded): radiation to surroundings at the air temperature, about 10 % still air."""
    rng = np.random.default_rng(seed)
    wind = rng.uniform(0.0, 15.0, n)
    wind[rng.random(n) < 0.1] = 0.0
    cases = dict(diameter=rng.uniform(0.02, 0.6, n), air_temperature=rng.uniform(250.0, 315.0, n), wind_speed=wind,
                 emissivity=rng.uniform(0.05, 0.95, n))
    if kind == "bare":
        cases["surface_temperature"] = rng.uniform(260.0, 650.0, n)
    else:
        cases.update(fluid_temperature=rng.uniform(260.0, 600.0, n), thickness=rng.uniform(0.01, 0.15, n),
                     conductivity=rng.uniform(0.02, 0.1, n))
    return cases


def _convlib_call(kind: str, c: dict, tolerance: float = 1e-6):
    import convlib as cl

    if kind == "bare":
        return cl.bare_surface("horizontal_cylinder", surface_temperature=c["surface_temperature"],
                               air_temperature=c["air_temperature"], diameter=c["diameter"],
                               wind_speed=c["wind_speed"], emissivity=c["emissivity"])
    return cl.insulated_pipe(c["diameter"], c["fluid_temperature"], [cl.Layer(c["thickness"], c["conductivity"])],
                             air_temperature=c["air_temperature"], wind_speed=c["wind_speed"],
                             jacket_emissivity=c["emissivity"], tolerance=tolerance)


def _kernel_call(kind: str, kernels, table, c: dict, tolerance: float = 1e-6):
    """The kernel on prepared flat inputs; outputs allocated here, as convlib allocates its own. Returns
    (q_per_length, evaluations)."""
    import reference_kernel as rk

    bare, insulated = kernels
    values, t_low, t_step = table
    n = c["diameter"].size
    out, codes = np.empty((len(rk.FIELDS), n)), np.empty((len(rk.CODES), n), dtype=np.int16)
    if kind == "bare":
        bare(c["surface_temperature"], c["air_temperature"], c["diameter"], c["wind_speed"], c["emissivity"],
             c["length"], values, t_low, t_step, out, codes)
        return out[rk.FIELDS.index("q_per_length")], n
    outer = np.empty(n)
    evaluations = insulated(c["diameter"], c["fluid_temperature"], c["thickness"], c["conductivity"],
                            c["air_temperature"], c["wind_speed"], c["emissivity"], c["length"], values, t_low,
                            t_step, tolerance, out, codes, outer)
    return out[rk.FIELDS.index("q_per_length")], evaluations


def child(kind: str, n: int, subject: str, rounds: int, seed: int) -> dict:
    """Measure one subject at one size in this (fresh) process."""
    small = {k: v[:10] for k, v in draw(kind, 10, seed + 1).items()}
    if subject == "kernel":
        import reference_kernel as rk

        kernels, table = rk.make_kernels(jit=True), rk.air_table()
        small["length"] = np.ones(10)
        t0 = time.perf_counter()
        _kernel_call(kind, kernels, table, small)  # compiles
        warmup = time.perf_counter() - t0
        call = lambda c: _kernel_call(kind, kernels, table, c)  # noqa: E731
    else:
        t0 = time.perf_counter()
        _convlib_call(kind, small)  # imports, the air table
        warmup = time.perf_counter() - t0
        call = lambda c: _convlib_call(kind, c)  # noqa: E731
    cases = draw(kind, n, seed)
    if subject == "kernel":
        cases["length"] = np.ones(n)
    base = reset_peak()  # imports, compiled code, inputs
    t0 = time.perf_counter()
    result = call(cases)
    first = time.perf_counter() - t0
    evaluations = result[1] / n if subject == "kernel" else None
    del result
    repeat = max(1, int(ROUND_SECONDS / max(first, 1e-9)))
    times = []
    for _ in range(rounds):
        t0 = time.perf_counter()
        for _ in range(repeat):
            result = call(cases)
            del result
        times.append((time.perf_counter() - t0) / repeat)
    peak_kib = peak()
    out = dict(times=times, repeat=repeat, warmup=warmup, base_mib=base / 1024,
               peak_above_mib=(peak_kib - base) / 1024, inputs_mib=sum(v.nbytes for v in cases.values()) / 2**20,
               evaluations=evaluations)
    if subject == "kernel":
        m = min(n, CHECK_POINTS)
        head = {k: np.ascontiguousarray(v[:m]) for k, v in cases.items()}
        tolerance = 1e-9
        ours, _ = _kernel_call(kind, kernels, table, head, tolerance)
        theirs = _convlib_call(kind, head, tolerance).q_per_length
        out["max_rel_diff_q"] = float(np.max(np.abs(ours - theirs) / np.abs(theirs)))
        out["checked"] = m
    return out


def run_child(kind: str, n: int, subject: str, rounds: int, seed: int) -> dict:
    command = [sys.executable, os.path.abspath(__file__), "--child", kind, str(n), subject, str(rounds), str(seed)]
    done = subprocess.run(command, capture_output=True, text=True)
    if done.returncode != 0:
        raise SystemExit(f"{subject} {kind} at {n} points failed:\n{done.stderr.strip()}")
    return json.loads(done.stdout.strip().splitlines()[-1])


def rounds_for(kind: str, n: int, rounds: int) -> int:
    if n >= 1e7:
        return min(rounds, 2 if kind == "insulated" else 3)
    return rounds


def header() -> list[str]:
    from run import convlib_fingerprint, environment  # the header of benchmarks/run.py

    lines = environment() + [f"convlib sources {convlib_fingerprint()}"]
    try:
        import numba

        lines.append(f"numba {numba.__version__} (kernel: njit, one core, no fastmath)")
    except ImportError:
        lines.append("numba: not installed (pip install -e '.[bench]'); the kernel cannot be timed")
    return lines


def record_worst(kind: str, measured: list[tuple[int, float, float, float]], rtol: float) -> None:
    """Record the worst throughput ratio (best against best) over the sizes the table's row covers, with every
    size's ratio in the note; ``measured`` holds (points, ratio, ratio of medians, largest difference in q)."""
    key, low, high = RECORDED[kind]
    counted = [m for m in measured if low <= m[0] <= high]
    if not counted:
        return
    n, ratio, median, _ = min(counted, key=lambda m: m[1])
    sizes = ", ".join(f"{_power(m[0])} 1/{1 / m[1]:.3g}" + ("" if m in counted else " (not counted)")
                      for m in measured)
    note = f"best against best: {sizes}; worst at {_power(n)} (ratio of medians there 1/{1 / median:.3g})"
    missing = [size for size in SIZES if low <= size <= high and int(size) not in {m[0] for m in measured}]
    if missing:
        note += "; not measured in this run: " + ", ".join(_power(size) for size in missing)
    if any(not m[3] <= rtol for m in measured):
        note += f"; DISAGREES with the kernel by more than {rtol:g} in q"
    record(key, value=ratio, baseline=1.0, baseline_label="fused numba kernel = 1", best=ratio, median=median,
           note=note)


def _power(n: float) -> str:
    """1e4 for 10000; other sizes as 2.5e+04."""
    exponent = round(math.log10(n)) if n > 0 else 0
    return f"1e{exponent}" if n == 10 ** exponent else f"{n:.2g}"


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", nargs="+", type=float, default=list(SIZES))
    parser.add_argument("--rounds", type=int, default=5)
    parser.add_argument("--kinds", nargs="+", choices=("bare", "insulated"), default=["bare", "insulated"])
    parser.add_argument("--seed", type=int, default=20261204)
    parser.add_argument("--rtol", type=float, default=1e-5, help="largest relative difference in q allowed")
    parser.add_argument("--quick", action="store_true", help="sizes 1e2 1e4 1e5, 3 rounds")
    parser.add_argument("--child", nargs=5, metavar=("KIND", "N", "SUBJECT", "ROUNDS", "SEED"), help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if args.child:
        kind, n, subject, rounds, seed = args.child
        print(json.dumps(child(kind, int(float(n)), subject, int(rounds), int(seed))))
        return 0
    try:
        import numba  # noqa: F401
    except ImportError:
        print("numba is not installed: pip install -e '.[bench]' (make bench does)", file=sys.stderr)
        return 2
    sizes, rounds = ([1e2, 1e4, 1e5], 3) if args.quick else (args.sizes, args.rounds)
    print("convlib against a fused compiled kernel of the same physics (benchmarks/reference_kernel.py)")
    print("\n".join(header()))
    print("each figure from its own process; time per point best / median of the rounds; ratio = convlib "
          "throughput / kernel throughput (best)")
    failed = []
    for kind in args.kinds:
        target, before = TARGETS[kind]
        print(f"\n{kind} ({'bare_surface, horizontal cylinder' if kind == 'bare' else 'insulated_pipe, one layer'}); "
              f"target ratio >= 1/{1 / target:.0f}; before: {before}")
        print(f"{'points':>8} {'rounds':>6}  {'convlib [us/pt]':>17}  {'kernel [us/pt]':>17}  {'ratio':>7}  "
              f"{'RSS above inputs convlib / kernel [MiB]':>40}  {'inputs [MiB]':>12}  {'evals/pt':>8}  "
              f"{'max rel diff q':>14}")
        measured = []
        for size in sizes:
            n = int(size)
            r = rounds_for(kind, n, rounds)
            theirs = run_child(kind, n, "convlib", r, args.seed)
            ours = run_child(kind, n, "kernel", r, args.seed)
            best_c, best_k = min(theirs["times"]) / n * 1e6, min(ours["times"]) / n * 1e6
            med_c, med_k = statistics.median(theirs["times"]) / n * 1e6, statistics.median(ours["times"]) / n * 1e6
            ratio = best_k / best_c
            diff = ours["max_rel_diff_q"]
            if not diff <= args.rtol:
                failed.append(f"{kind} at {n} points: q differs by {diff:.3g} (allowed {args.rtol:g})")
            measured.append((n, ratio, med_k / med_c, diff))
            print(f"{n:8.0e} {r:6d}  {best_c:8.3g} / {med_c:<6.3g}  {best_k:8.3g} / {med_k:<6.3g}  "
                  f"1/{1 / ratio:<5.3g}  "
                  f"{theirs['peak_above_mib']:19.0f} / {ours['peak_above_mib']:<18.0f}  {theirs['inputs_mib']:12.1f}  "
                  f"{ours['evaluations']:8.2f}  {diff:14.2g}")
        record_worst(kind, measured, args.rtol)
    if failed:
        print("\nDISAGREEMENT between convlib and the reference kernel:\n  " + "\n  ".join(failed))
        return 1
    print(f"\nconvlib and the kernel agree on q_per_length to {args.rtol:g} (relative) at every size "
          f"(first {CHECK_POINTS} points of each)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
