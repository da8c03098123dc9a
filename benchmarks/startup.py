"""Command-line start-up: wall time of ``convlib --help`` and ``convlib surface ...``, each beside
``python -c pass`` (the interpreter's own start-up) measured in the same run.

Run ``python benchmarks/startup.py`` (part of ``make bench``). Options:

    --rounds N    timed rounds (default 7, at least 5); one untimed warm-up round first

Byte-code caches are used and written (``PYTHONDONTWRITEBYTECODE`` is dropped for the commands), as
an installed wheel has them; without them every start compiles convlib's sources again. Each round
starts every command once as a fresh process, in turn (baseline, help, surface, ...), so a
change of load on a shared machine touches all of them alike. Printed per command: best and median
wall time, the baseline's best and median, the ratios (best / best and median / median), the guide
and the heavy packages the command imported (from one extra, untimed run per command). The median wall
times of ``surface`` (with units) and ``--help`` and the baseline's go to the run's record (``record.py``,
for ``summary.py``). This is not a test: nothing asserts a timing (``tests/test_startup.py`` checks what
is imported).
"""
from __future__ import annotations

import argparse
import math
import os
import platform
import statistics
import subprocess
import sys
import time
from pathlib import Path

from record import record

try:
    import resource  # POSIX only
except ImportError:  # pragma: no cover
    resource = None

ROOT = Path(__file__).resolve().parents[1]
#: packages the command line must not import unless a command needs them (see tests/test_startup.py)
HEAVY = ("CoolProp", "scipy", "pydantic", "plotly", "ipywidgets", "dashboard", "pint", "fluids")
SURFACE_ARGS = ["surface", "--surface-temperature", "90degC", "--air-temperature", "20degC", "--diameter", "4.5in",
                "--wind-speed", "2"]
# the same case in plain numbers (degC, mm, m/s: the command line's default units) with JSON out: no pint needed
SURFACE_PLAIN_ARGS = ["surface", "--surface-temperature", "90", "--air-temperature", "20", "--diameter", "114.3",
                      "--wind-speed", "2", "--json"]

# (label, argv after the interpreter, guide [s] or None)
CASES = [
    ("python -c pass (baseline)", ["-c", "pass"], None),
    ("convlib --help", ["-m", "convlib", "--help"], 0.4),
    ("convlib surface (with units)", ["-m", "convlib", *SURFACE_ARGS], 0.8),
    ("convlib surface (plain numbers, --json)", ["-m", "convlib", *SURFACE_PLAIN_ARGS], 0.8),
]
#: rows of the speed table (benchmarks/record.py) and the command each records
RECORDED = {"convlib surface (with units)": "startup_surface", "convlib --help": "startup_help"}

# run a command in-process and print the heavy top-level packages it imported
_PROBE = ("import runpy, sys\n"
          "sys.argv = ['convlib'] + sys.argv[1:]\n"
          "try:\n    runpy.run_module('convlib', run_name='__main__')\n"
          "except SystemExit:\n    pass\n"
          "print('HEAVY=' + ','.join(sorted({m.split('.')[0] for m in sys.modules} & set(%r))))\n" % (HEAVY,))


def _env() -> dict:
    env = dict(os.environ)
    # byte-code caches as an installed package has them (pip compiles on install): the warm-up round writes
    # them (__pycache__ is git-ignored) even where PYTHONDONTWRITEBYTECODE is set in the shell
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    env["PYTHONPATH"] = os.pathsep.join(p for p in (str(ROOT), env.get("PYTHONPATH")) if p)
    return env


def _cpu_children() -> float:
    if resource is None:  # pragma: no cover (not POSIX)
        return math.nan
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def _run(argv: list[str], env: dict) -> tuple[float, float]:
    """Wall time and CPU time (user + system) [s] of one fresh process."""
    cpu = _cpu_children()
    start = time.perf_counter()
    done = subprocess.run([sys.executable, *argv], stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, env=env,
                          cwd=ROOT)
    elapsed = time.perf_counter() - start
    if done.returncode != 0:
        raise SystemExit(f"{' '.join(argv)} failed ({done.returncode}): {done.stderr.decode()[-500:]}")
    return elapsed, _cpu_children() - cpu


def heavy_imports(argv: list[str], env: dict) -> str:
    """Heavy packages a ``-m convlib ...`` command imports (one untimed run)."""
    if argv[:2] != ["-m", "convlib"]:
        return "-"
    out = subprocess.run([sys.executable, "-c", _PROBE, *argv[2:]], capture_output=True, text=True, env=env,
                         cwd=ROOT).stdout
    line = [s for s in out.splitlines() if s.startswith("HEAVY=")]
    return (line[-1][6:] or "none") if line else "?"


def measure(rounds: int) -> dict[str, list[tuple[float, float]]]:
    """(wall, CPU) [s] of every command in every round, the commands taken in turn within a round."""
    env = _env()
    times = {label: [] for label, _, _ in CASES}
    for r in range(rounds + 1):  # round 0: warm-up (byte-code caches, file cache), not counted
        for label, argv, _ in CASES:
            t = _run(argv, env)
            if r:
                times[label].append(t)
    return times


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--rounds", type=int, default=7)
    args = parser.parse_args(argv)
    rounds = max(5, args.rounds)
    load = os.getloadavg() if hasattr(os, "getloadavg") else None
    print(f"convlib start-up ({rounds} rounds after one warm-up; Python {platform.python_version()}, "
          f"{os.cpu_count()} CPUs" + (f", load average {load[0]:.2f} at start" if load else "") + ")")
    times = measure(rounds)
    base_wall, base_cpu = zip(*times[CASES[0][0]])
    b_best, b_med, b_cpu = min(base_wall), statistics.median(base_wall), statistics.median(base_cpu)
    env = _env()
    print(f"  {'command':<39} {'wall best':>9} {'median':>7} {'CPU med':>7} | {'baseline best':>13} {'median':>7} "
          f"{'CPU med':>7} | {'ratio best':>10} {'median':>7} | {'guide':>13}  heavy imports")
    for label, argv, guide in CASES:
        wall, cpu = zip(*times[label])
        best, med, cpu_med = min(wall), statistics.median(wall), statistics.median(cpu)
        guide_text = "-" if guide is None else f"{guide:.1f} s {'ok' if med <= guide else 'MISSED'}"
        print(f"  {label:<39} {best:9.3f} {med:7.3f} {cpu_med:7.3f} | {b_best:13.3f} {b_med:7.3f} {b_cpu:7.3f} | "
              f"{best / b_best:10.1f} {med / b_med:7.1f} | {guide_text:>13}  {heavy_imports(argv, env)}")
        if label in RECORDED:
            record(RECORDED[label], value=med, baseline=b_med, baseline_label="python -c pass, median wall",
                   best=best, median=med, note=f"median CPU {cpu_med:.2f} s (python -c pass {b_cpu:.2f} s), "
                   f"{rounds} rounds" + (f", load average {load[0]:.1f} at start" if load else ""))
    print("  seconds; the guide is checked against the median wall time. On a loaded machine the wall time grows "
          "with the load;\n  the CPU time (user + system of the process) much less: compare ratios and CPU "
          "times between runs.")
    return 0


if __name__ == "__main__":
    sys.exit(main())
