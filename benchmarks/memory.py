"""Peak memory and per-point time of large evaluations, blocked (convlib.blocks) beside one piece.

Run ``python benchmarks/memory.py`` (part of ``make bench``; ``--sizes 1e5 1e6`` to choose). Each figure comes from
a fresh process (peak RSS is per process), best of ``--rounds`` for time; the baseline is the same call with
blocking switched off (``BLOCK_POINTS`` above the size), measured in the same run. The bare call at 10^7
points goes to the run's record (``record.py``, the speed table of ``summary.py``). Not a test: nothing here
asserts a figure.
"""
from __future__ import annotations

import argparse
import os
import subprocess
import sys

from record import record

HERE = os.path.dirname(os.path.abspath(__file__))

CHILD = r"""
import dataclasses, sys, time, numpy as np
sys.path.insert(0, sys.argv[4])
from peak_rss import peak, reset_peak
import convlib as cl
from convlib import blocks
n, whole, kind = int(float(sys.argv[1])), sys.argv[2] == "whole", sys.argv[3]
if whole:
    blocks.BLOCK_POINTS = 10 ** 12
def call(d, t, w):
    if kind == "bare":
        return cl.bare_surface(surface_temperature=t, air_temperature=288.15, diameter=d, length=1.0, wind_speed=w)
    return cl.insulated_pipe(d, t, [cl.Layer(0.05, 0.04)], air_temperature=288.15, wind_speed=w)
call(0.1, 400.0, 1.0)  # imports, the air table
rng = np.random.default_rng(1)
d, t, w = rng.uniform(0.02, 0.5, n), rng.uniform(350.0, 500.0, n), rng.uniform(0.0, 10.0, n)
base = reset_peak()
start = time.perf_counter()
result = call(d, t, w)
elapsed = time.perf_counter() - start
above = peak() - base
outputs = sum(getattr(result, f.name).nbytes for f in dataclasses.fields(result)
              if isinstance(getattr(result, f.name), np.ndarray))
print(elapsed, (d.nbytes + t.nbytes + w.nbytes) / 2**20, above / 1024, outputs / 2**20)
"""


def measure(n: float, mode: str, kind: str, rounds: int):
    best = None
    for _ in range(rounds):
        out = subprocess.run([sys.executable, "-c", CHILD, str(n), mode, kind, HERE], capture_output=True, text=True,
                             check=True).stdout.split()
        figures = tuple(map(float, out))
        best = figures if best is None or figures[0] < best[0] else best
    return best


def record_bare_1e7(rows: dict, rounds: int) -> None:
    """The speed table's memory row: peak RSS above the inputs (outputs included) of the blocked bare call at
    10^7 points, beside the same call in one piece."""
    (elapsed, _, above, outputs), whole = rows["blocked"], rows["whole"]
    record("memory_bare_1e7", value=above, baseline=whole[2], baseline_label="same call in one piece",
           note=f"results {outputs:.0f} MiB, so {above - outputs:.0f} MiB of temporaries (one piece: "
                f"{whole[2] - whole[3]:.0f}); {elapsed / 1e7 * 1e6:.2f} us per point (one piece "
                f"{whole[0] / 1e7 * 1e6:.2f}); the round of the best time of {rounds}")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", nargs="+", type=float, default=[1e5, 1e6, 1e7])
    parser.add_argument("--rounds", type=int, default=2)
    args = parser.parse_args()
    print("peak RSS above the inputs (so: outputs + temporaries) and the outputs' own size; 'over' = the first less "
          "the second (the target: <= 512 MiB at 1e7 points)")
    print("kind       points  mode     time/point [us]  inputs [MiB]  peak above inputs [MiB]  outputs [MiB]  "
          "over [MiB]  time blocked/whole")
    for kind in ("bare", "insulated"):
        for n in args.sizes:
            if kind == "insulated" and n > 1e6:
                continue  # about 5 us a point: 1e7 takes a minute per round
            rows = {mode: measure(n, mode, kind, args.rounds) for mode in ("blocked", "whole")}
            for mode, (elapsed, inputs, above, outputs) in rows.items():
                ratio = rows["blocked"][0] / rows["whole"][0]
                print(f"{kind:9s} {n:8.0e}  {mode:7s}  {elapsed / n * 1e6:15.3f}  {inputs:12.1f}  {above:23.0f}  "
                      f"{outputs:13.0f}  {above - outputs:10.0f}  {ratio:.2f}")
            if kind == "bare" and n == 1e7:
                record_bare_1e7(rows, args.rounds)


if __name__ == "__main__":
    main()
