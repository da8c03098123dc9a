"""Peak memory and per-point time of large evaluations, blocked (convlib.blocks) beside one piece.

Run ``python benchmarks/memory.py`` (part of ``make bench``; ``--sizes 1e5 1e6`` to choose). Each figure comes from
a fresh process (peak RSS is per process), best of ``--rounds`` for time; the baseline is the same call with
blocking switched off (``BLOCK_POINTS`` above the size), measured in the same run. Not a test: nothing here
asserts a figure.
"""
from __future__ import annotations

import argparse
import subprocess
import sys

CHILD = r"""
import resource, sys, time, numpy as np
import convlib as cl
from convlib import blocks
n, whole, kind = int(float(sys.argv[1])), sys.argv[2] == "whole", sys.argv[3]
if whole:
    blocks.BLOCK_POINTS = 10 ** 12
rng = np.random.default_rng(1)
d, t, w = rng.uniform(0.02, 0.5, n), rng.uniform(350.0, 500.0, n), rng.uniform(0.0, 10.0, n)
base = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
start = time.perf_counter()
if kind == "bare":
    cl.bare_surface(surface_temperature=t, air_temperature=288.15, diameter=d, length=1.0, wind_speed=w)
else:
    cl.insulated_pipe(d, t, [cl.Layer(0.05, 0.04)], air_temperature=288.15, wind_speed=w)
elapsed = time.perf_counter() - start
print(elapsed, base / 1024, resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024)
"""


def measure(n: float, mode: str, kind: str, rounds: int):
    best = None
    for _ in range(rounds):
        out = subprocess.run([sys.executable, "-c", CHILD, str(n), mode, kind], capture_output=True, text=True,
                             check=True).stdout.split()
        elapsed, base, peak = map(float, out)
        best = (elapsed, base, peak) if best is None or elapsed < best[0] else best
    return best


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", nargs="+", type=float, default=[1e5, 1e6, 1e7])
    parser.add_argument("--rounds", type=int, default=2)
    args = parser.parse_args()
    print("kind       points  mode     time/point [us]  peak RSS [MiB]  inputs [MiB]  ratio time blocked/whole")
    for kind in ("bare", "insulated"):
        for n in args.sizes:
            if kind == "insulated" and n > 1e6:
                continue  # about 5 us a point: 1e7 takes a minute per round
            rows = {mode: measure(n, mode, kind, args.rounds) for mode in ("blocked", "whole")}
            for mode, (elapsed, base, peak) in rows.items():
                ratio = rows["blocked"][0] / rows["whole"][0]
                print(f"{kind:9s} {n:8.0e}  {mode:7s}  {elapsed / n * 1e6:15.3f}  {peak:14.0f}  {base:12.0f}  "
                      f"{ratio:.2f}")


if __name__ == "__main__":
    main()
