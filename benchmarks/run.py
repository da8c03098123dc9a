"""convlib benchmarks: throughput of the vectorized hot paths, each beside its own baseline.

Run ``python benchmarks/run.py`` (what ``make bench`` does). Options:

    --quick       divide every size by 10 (a smoke run; figures less representative)
    --only NAME   run only the benchmark NAME (repeatable); --list shows the names
    --seed N      seed of the numpy Generator that draws the cases (default 20260101)

This is not a test: nothing here asserts a timing. Timings on a shared machine
are noisy; each figure is measured beside its baseline in the same run, and the
ratio of the two is the number to compare between runs (see benchmarks/README.md).

To add a benchmark: write a function ``def bench_xxx(cfg: Config) -> Row`` and
append it to ``BENCHMARKS``.
"""
from __future__ import annotations

import argparse
import gc
import hashlib
import math
import os
import platform
import statistics
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

try:
    import resource  # POSIX only
except ImportError:  # pragma: no cover
    resource = None

# ---------------------------------------------------------------------------- framework


@dataclass(frozen=True)
class Config:
    quick: bool = False
    seed: int = 20260101
    repeat: int = 3  # timed calls of each side after one warm-up; the best is reported

    def size(self, n: int) -> int:
        return max(1, n // 10) if self.quick else n


@dataclass(frozen=True)
class Timing:
    times: list[float]        # wall time of each timed call [s]
    kernel_fraction: float    # system (kernel) CPU time / wall time over the timed calls
    minor_faults: float       # minor page faults per timed call

    @property
    def best(self) -> float:
        return min(self.times)

    def spread(self) -> str:
        return f"{self.best:.3g} / {statistics.median(self.times):.3g} s"


@dataclass
class Row:
    """One benchmark's result: the subject, its baseline and their comparison."""

    name: str
    subject: str
    n_subject: int
    timing_subject: Timing
    baseline: str
    n_baseline: int
    timing_baseline: Timing
    target_ratio: float | None = None
    target_rate: float | None = None
    target_note: str = ""
    accuracy: dict[str, str] = field(default_factory=dict)  # label -> formatted figure
    notes: list[str] = field(default_factory=list)

    @property
    def rate_subject(self) -> float:
        """points/s, best of the timed calls"""
        return self.n_subject / self.timing_subject.best

    @property
    def rate_baseline(self) -> float:
        return self.n_baseline / self.timing_baseline.best

    @property
    def ratio(self) -> float:
        return self.rate_subject / self.rate_baseline


def time_interleaved(fns: list[Callable[[], object]], repeat: int, warmup: int = 1) -> list[Timing]:
    """Wall times of ``repeat`` calls of each of ``fns``, taken in turn (A B A B ...), after ``warmup``
    untimed rounds; GC off while timing.

    Taking the subject and its baseline in turn lets both see the same spells of load from other
    processes, so that their ratio is steadier than either figure. Each result is dropped before
    the next call, as a one-off call would. The kernel time and minor page faults show how much
    of the wall time goes to fetching fresh memory from the OS.
    """
    for _ in range(warmup):
        for fn in fns:
            fn()
    times = [[] for _ in fns]
    kernel = [0.0 for _ in fns]
    faults = [0 for _ in fns]
    for _ in range(repeat):
        for j, fn in enumerate(fns):
            gc.collect()
            gc.disable()
            before = resource.getrusage(resource.RUSAGE_SELF) if resource else None
            try:
                t0 = time.perf_counter()
                fn()
                times[j].append(time.perf_counter() - t0)
            finally:
                gc.enable()
            if resource:
                after = resource.getrusage(resource.RUSAGE_SELF)
                kernel[j] += after.ru_stime - before.ru_stime
                faults[j] += after.ru_minflt - before.ru_minflt
    return [Timing(t, kernel[j] / sum(t) if resource else math.nan,
                   faults[j] / repeat if resource else math.nan) for j, t in enumerate(times)]


# ---------------------------------------------------------------------------- cases


def draw_cylinder_cases(n: int, seed: int) -> dict[str, np.ndarray]:
    """Random outdoor horizontal-cylinder cases, about 10 % of them in still air (wind exactly 0)."""
    rng = np.random.default_rng(seed)
    wind = rng.uniform(0.0, 15.0, n)
    wind[rng.random(n) < 0.1] = 0.0
    return {
        "diameter": rng.uniform(0.02, 0.6, n),
        "surface_temperature": rng.uniform(260.0, 650.0, n),
        "air_temperature": rng.uniform(250.0, 315.0, n),
        "wind_speed": wind,
        "emissivity": rng.uniform(0.05, 0.95, n),
    }


SKY_VIEW_FRACTION = 0.5
PRESSURE = 101325.0

# ---------------------------------------------------------------------------- scalar reference
# Written here from the published formulas, independent of convlib's code: one CoolProp
# PropsSI call per property per point, math on Python floats, a Python loop over points.

SIGMA = 5.670374419e-8  # Stefan-Boltzmann [W/m2/K4], CODATA 2018
G = 9.80665             # standard gravity [m/s2]


def reference_q_per_length(d: float, ts: float, ta: float, wind: float, eps: float,
                           props: Callable, pressure: float = PRESSURE) -> tuple[float, float]:
    """Heat loss per metre of a horizontal cylinder, wind across it, outdoors.

    Returns the net loss q [W/m] and the gross exchange |q_conv| + |q_rad| [W/m], the scale
    against which a difference in q is judged where convection and radiation nearly cancel.
    """
    tf = 0.5 * (ts + ta)
    rho = props("D", "T", tf, "P", pressure, "Air")
    mu = props("V", "T", tf, "P", pressure, "Air")
    k = props("L", "T", tf, "P", pressure, "Air")
    cp = props("C", "T", tf, "P", pressure, "Air")
    nu = mu / rho
    pr = cp * mu / k
    beta = 1.0 / tf                                   # ideal gas
    gr = G * beta * abs(ts - ta) * d ** 3 / nu ** 2
    ra = gr * pr
    # Churchill & Chu (1975), horizontal cylinder, full range
    nu_n = (0.60 + 0.387 * ra ** (1.0 / 6.0) / (1.0 + (0.559 / pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)) ** 2
    if wind > 0.0:
        re = wind * d / nu
        # Churchill & Bernstein (1977), film properties
        nu_f = 0.3 + (0.62 * math.sqrt(re) * pr ** (1.0 / 3.0) / (1.0 + (0.4 / pr) ** (2.0 / 3.0)) ** 0.25
                      * (1.0 + (re / 282000.0) ** 0.625) ** 0.8)
        # Churchill (1977), transverse: Nu^4 = Nu_F^4 + Nu_N^4
        nusselt = (nu_f ** 4 + nu_n ** 4) ** 0.25
    else:
        nusselt = nu_n
    h = nusselt * k / d
    t_sky = 0.0552 * ta ** 1.5                        # Swinbank (1963), clear sky
    f = SKY_VIEW_FRACTION                             # rest of the view: ground at air temperature
    q_rad = eps * SIGMA * (f * (ts ** 4 - t_sky ** 4) + (1.0 - f) * (ts ** 4 - ta ** 4))
    q_conv = h * (ts - ta)
    return (q_conv + q_rad) * math.pi * d, (abs(q_conv) + abs(q_rad)) * math.pi * d


# ---------------------------------------------------------------------------- benchmarks


def bench_bare_surface_cylinder(cfg: Config) -> Row:
    """convlib.bare_surface, horizontal cylinder, wind + radiation, vs the per-point scalar reference."""
    from CoolProp.CoolProp import PropsSI

    import convlib

    n = cfg.size(1_000_000)
    n_ref = cfg.size(2_000)
    cases = draw_cylinder_cases(n, cfg.seed)

    def vectorized(sl=slice(None), **extra):
        return convlib.bare_surface(
            "horizontal_cylinder", length=1.0, sky_view_fraction=SKY_VIEW_FRACTION, pressure=PRESSURE,
            natural="churchill_chu", forced="churchill_bernstein", flow_direction="transverse",
            mixing_exponent=4.0, **{k: v[sl] for k, v in cases.items()}, **extra)

    sub = {k: v[:n_ref].tolist() for k, v in cases.items()}   # Python floats, outside the timing
    points = list(zip(sub["diameter"], sub["surface_temperature"], sub["air_temperature"],
                      sub["wind_speed"], sub["emissivity"]))
    q_ref: list[tuple[float, float]] = []

    def scalar_loop():
        q_ref.clear()
        for d, ts, ta, w, e in points:
            q_ref.append(reference_q_per_length(d, ts, ta, w, e, PropsSI))

    t_vec, t_ref = time_interleaved([vectorized, scalar_loop], cfg.repeat)

    # accuracy on the reference points: the table-interpolated library, and the library with
    # exact CoolProp properties (which isolates the formulas from the interpolation)
    ref, gross = np.array(q_ref).T
    head = slice(0, n_ref)
    lib = vectorized(head).q_per_length
    lib_exact = vectorized(head, exact_properties=True).q_per_length
    rel = np.abs(lib - ref) / np.abs(ref)
    rel_exact = np.abs(lib_exact - ref) / np.abs(ref)
    rel_gross = np.abs(lib - ref) / gross
    worst = int(np.argmax(rel))
    worst_point = (f"worst point #{worst}: D={sub['diameter'][worst]:.3f} m, "
                   f"Ts={sub['surface_temperature'][worst]:.1f} K, Ta={sub['air_temperature'][worst]:.1f} K, "
                   f"wind={sub['wind_speed'][worst]:.2f} m/s, q={ref[worst]:.4g} W/m")
    notes = [worst_point]
    small = np.abs(ref) < 0.05 * gross
    if small.any():
        notes.append(f"{int(small.sum())} of {n_ref} reference points have |q| < 5 % of the gross exchange "
                     "(Ts near Ta, or convection and radiation nearly cancel): there a property error is "
                     "amplified in the relative difference of q; the gross-exchange figure is the fair one")
    return Row(
        name="bare_surface_cylinder",
        subject=f"convlib.bare_surface, {n:,} pts",
        n_subject=n,
        timing_subject=t_vec,
        baseline=f"scalar loop + PropsSI, {n_ref:,} pts",
        n_baseline=n_ref,
        timing_baseline=t_ref,
        target_ratio=500.0,
        target_rate=1.5e6,
        target_note="a guide for this machine class (one core), not a gate",
        accuracy={
            "max rel. diff. q_per_length, tables vs reference": f"{rel.max():.2e}  (target < ~1e-3)",
            "median rel. diff., tables vs reference": f"{np.median(rel):.2e}",
            "max |diff| / gross exchange, tables vs ref.": f"{rel_gross.max():.2e}  (|q_conv|+|q_rad| scale)",
            "max rel. diff., exact properties vs reference": f"{rel_exact.max():.2e}  (formulas alone)",
        },
        notes=notes,
    )


def bench_insulated_pipe(cfg: Config) -> Row:
    """convlib.insulated_pipe, two layers, wind + radiation, vs a per-point scipy brentq energy balance."""
    from CoolProp.CoolProp import PropsSI
    from scipy.optimize import brentq

    import convlib

    n = cfg.size(200_000)
    n_ref = cfg.size(500)
    rng = np.random.default_rng(cfg.seed + 1)
    d_pipe = rng.uniform(0.02, 0.6, n)
    t_fluid = rng.uniform(260.0, 600.0, n)
    t_air = rng.uniform(250.0, 315.0, n)
    wind = np.where(rng.random(n) < 0.1, 0.0, rng.uniform(0.0, 15.0, n))
    eps = rng.uniform(0.05, 0.95, n)
    thick = rng.uniform(0.01, 0.15, n)
    k_ins = rng.uniform(0.02, 0.1, n)
    jacket, k_jacket = 0.0008, 50.0

    def vectorized(sl=slice(None)):
        layers = [convlib.Layer(thick[sl], k_ins[sl]), convlib.Layer(jacket, k_jacket, name="jacket")]
        return convlib.insulated_pipe(d_pipe[sl], t_fluid[sl], layers, air_temperature=t_air[sl],
                                      wind_speed=wind[sl], jacket_emissivity=eps[sl],
                                      sky_view_fraction=SKY_VIEW_FRACTION, pressure=PRESSURE,
                                      natural="churchill_chu", forced="churchill_bernstein", mixing_exponent=4.0)

    points = list(zip(*(a[:n_ref].tolist() for a in (d_pipe, t_fluid, t_air, wind, eps, thick, k_ins))))
    ts_ref: list[float] = []

    def scalar_loop():
        ts_ref.clear()
        for d, tf, ta, w, e, t, k in points:
            r1, r2, r3 = d / 2, d / 2 + t, d / 2 + t + jacket
            resistance = math.log(r2 / r1) / (2 * math.pi * k) + math.log(r3 / r2) / (2 * math.pi * k_jacket)

            def balance(ts):
                return (tf - ts) / resistance - reference_q_per_length(2 * r3, ts, ta, w, e, PropsSI)[0]

            lo, hi = min(tf, ta, 0.0552 * ta ** 1.5) - 0.5, max(tf, ta) + 0.5
            ts_ref.append(brentq(balance, lo, hi, xtol=1e-6))

    t_vec, t_ref = time_interleaved([vectorized, scalar_loop], cfg.repeat)
    head = slice(0, n_ref)
    diff = np.abs(vectorized(head).surface_temperature - np.array(ts_ref))
    return Row(
        name="insulated_pipe",
        subject=f"convlib.insulated_pipe, 2 layers, {n:,} pts",
        n_subject=n,
        timing_subject=t_vec,
        baseline=f"scalar brentq + PropsSI, {n_ref:,} pts",
        n_baseline=n_ref,
        timing_baseline=t_ref,
        target_rate=3e5,
        target_note="a guide for this machine class (one core), not a gate",
        accuracy={
            "max |surface temperature diff.|, tables vs brentq + exact properties": f"{diff.max():.2e} K  "
            "(target < 0.02 K)",
            "median |diff.|": f"{np.median(diff):.2e} K",
        },
    )


def bench_monte_carlo(cfg: Config) -> Row:
    """convlib.run_study Monte Carlo of the demo insulated line (10^5 samples) vs per-sample scalar calls."""
    import convlib
    from convlib.study import UncertaintySpec, evaluate_case, load_demo_study

    demo = load_demo_study()
    n = cfg.size(100_000)
    n_ref = cfg.size(300)
    spec = demo.model_copy(update={"sweeps": [], "maps": [], "tornado": [],
                                   "uncertainty": demo.uncertainty.model_copy(update={"samples": n})})
    rng = np.random.default_rng(cfg.seed + 2)
    draws = [{d.input: float(v) for d, v in zip(demo.uncertainty.distributions,
                                                 (d.sample(rng, 1)[0] for d in demo.uncertainty.distributions))}
             for _ in range(n_ref)]
    results: list[float] = []

    def vectorized():
        return convlib.run_study(spec)

    def per_sample():
        results.clear()
        for draw in draws:  # one library call per sample: what a loop over samples would do
            results.append(float(evaluate_case(demo.case, **draw).q_per_length))

    t_vec, t_ref = time_interleaved([vectorized, per_sample], cfg.repeat)
    mc = vectorized().monte_carlo
    return Row(
        name="monte_carlo",
        subject=f"run_study Monte Carlo, insulated demo line, {n:,} samples",
        n_subject=n,
        timing_subject=t_vec,
        baseline=f"one evaluate_case call per sample, {n_ref:,} samples",
        n_baseline=n_ref,
        timing_baseline=t_ref,
        target_rate=1e5,
        target_note="10^5 samples in <= 1 s here: a guide, not a gate",
        accuracy={"P5 / P50 / P95 of q_per_length [W/m]": f"{mc.p5:.2f} / {mc.p50:.2f} / {mc.p95:.2f}"},
    )


def bench_small_solves(cfg: Config) -> Row:
    """convlib.roots.find_root on the interactive size (31 surface solves of an insulated line) vs SciPy's
    general-purpose elementwise find_root on the same residual: the fixed cost per call that dominated there."""
    import convlib
    from scipy.optimize import elementwise

    from convlib.pipe import Layer
    from convlib.roots import find_root
    from convlib.surface import POINT_FIELDS as POINTS, OuterSurface

    n_calls = cfg.size(200)
    wind = np.linspace(0.0, 15.0, 31)
    outer = OuterSurface.build(diameter=0.219 + 0.2, length=1.0, air_temperature=268.15, wind_speed=wind,
                               emissivity=0.1, sky_view_fraction=0.5)
    tf, resistance = np.full(wind.shape, 388.15), np.log((0.219 + 0.2) / 0.219) / (2 * np.pi * 0.04)
    per_flux = np.pi * (0.219 + 0.2)

    def residual(ts, tf_, *point):
        return (tf_ - ts) / resistance - per_flux * outer.exchange(ts, dict(zip(POINTS, point)), flux_only=True)

    args = (tf, *(np.broadcast_to(a, wind.shape) for a in outer.point_fields().values()))
    lo, hi = np.full(wind.shape, 267.0), np.full(wind.shape, 389.0)
    answers = {}

    def ours():
        for _ in range(n_calls):
            answers["ours"] = find_root(residual, lo, hi, args=args, xatol=1e-6, xrtol=0.0).x

    def scipy_general():
        for _ in range(n_calls):
            answers["scipy"] = elementwise.find_root(residual, (lo, hi), args=args,
                                                     tolerances={"xatol": 1e-6, "xrtol": 0.0}).x

    t_ours, t_scipy = time_interleaved([ours, scipy_general], cfg.repeat)
    check = convlib.insulated_pipe(0.219, 388.15, [Layer(0.1, 0.04)], air_temperature=268.15, wind_speed=wind,
                                   jacket_emissivity=0.1, sky_view_fraction=0.5).surface_temperature
    return Row(
        name="small_solves",
        subject=f"convlib.roots.find_root, {n_calls} calls x 31 surface temperatures",
        n_subject=n_calls * wind.size,
        timing_subject=t_ours,
        baseline=f"scipy.optimize.elementwise.find_root, same residual and tolerance, {n_calls} calls",
        n_baseline=n_calls * wind.size,
        timing_baseline=t_scipy,
        accuracy={"max |ours - scipy| [K]": f"{np.max(np.abs(answers['ours'] - answers['scipy'])):.1e}",
                  "max |ours - insulated_pipe| [K]": f"{np.max(np.abs(answers['ours'] - check)):.1e}"},
    )


BENCHMARKS: list[Callable[[Config], Row]] = [
    bench_bare_surface_cylinder,
    bench_insulated_pipe,
    bench_monte_carlo,
    bench_small_solves,
]


def _name(fn: Callable) -> str:
    return fn.__name__.removeprefix("bench_")


# ---------------------------------------------------------------------------- report


def _rate(x: float) -> str:
    return f"{x / 1e6:.3g} M pts/s" if x >= 1e5 else f"{x:,.0f} pts/s"


def convlib_fingerprint() -> str:
    """Short SHA-256 of convlib's Python sources: other work in a shared tree may change them mid-run."""
    import convlib

    root = Path(convlib.__file__).parent
    digest = hashlib.sha256()
    for path in sorted(root.rglob("*.py")):
        digest.update(str(path.relative_to(root)).encode() + b"\0" + path.read_bytes())
    return digest.hexdigest()[:12]


def environment() -> list[str]:
    import CoolProp

    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:
        cores = os.cpu_count()
    coretype = os.environ.get("OPENBLAS_CORETYPE")
    threads = {k: os.environ[k] for k in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")
               if k in os.environ}
    cpu = platform.processor() or platform.machine()
    try:
        with open("/proc/cpuinfo") as fh:
            cpu = next((line.split(":", 1)[1].strip() for line in fh if line.startswith("model name")), cpu)
    except OSError:
        pass
    return [
        f"python {platform.python_version()}, numpy {np.__version__}, CoolProp {CoolProp.__version__}",
        f"cpu: {cpu}, {cores} usable core(s); numpy elementwise work runs on one thread",
        "OPENBLAS_CORETYPE " + (f"is set: {coretype!r}" if coretype is not None else "is not set")
        + (f"; {', '.join(f'{k}={v}' for k, v in threads.items())}" if threads else ""),
    ]


def print_row(row: Row, repeat: int) -> None:
    w = 46
    print(f"\n[{row.name}]")
    for label, rate, timing in (("subject: " + row.subject, row.rate_subject, row.timing_subject),
                                ("baseline: " + row.baseline, row.rate_baseline, row.timing_baseline)):
        print(f"  {label:<{w}} {_rate(rate):>16}   (best / median of {repeat}: {timing.spread()}; "
              f"kernel {timing.kernel_fraction:.0%}, {timing.minor_faults / 1e3:.3g}k page faults/call)")
    target = f"   (target >= {row.target_ratio:g})" if row.target_ratio else ""
    print(f"  {'ratio subject / baseline':<{w}} {row.ratio:>14,.3g} x{target}")
    if row.target_rate:
        print(f"  {'subject target':<{w}} {'>= ' + _rate(row.target_rate):>16}   ({row.target_note})")
    for label, value in row.accuracy.items():
        print(f"  {label:<{w}} {value}")
    for note in row.notes:
        print(f"  note: {note}")


def main(argv: list[str] | None = None) -> int:
    names = [_name(fn) for fn in BENCHMARKS]
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--quick", action="store_true", help="divide every size by 10")
    parser.add_argument("--only", action="append", metavar="NAME", choices=names,
                        help="run only this benchmark (repeatable)")
    parser.add_argument("--list", action="store_true", help="list the benchmark names and exit")
    parser.add_argument("--seed", type=int, default=Config.seed)
    args = parser.parse_args(argv)
    if args.list:
        for fn in BENCHMARKS:
            print(f"{_name(fn):<28} {(fn.__doc__ or '').strip().splitlines()[0]}")
        return 0
    cfg = Config(quick=args.quick, seed=args.seed)
    import convlib

    fingerprint = convlib_fingerprint()
    print("convlib benchmarks" + (" (--quick: sizes / 10)" if cfg.quick else ""))
    for line in environment():
        print("  " + line)
    print(f"  convlib from {Path(convlib.__file__).parent}, sources sha256 {fingerprint}")
    for fn in BENCHMARKS:
        if args.only and _name(fn) not in args.only:
            continue
        print_row(fn(cfg), cfg.repeat)
    if convlib_fingerprint() != fingerprint:
        print("\nWARNING: convlib's sources changed during this run (shared tree); the figures above are "
              "for the code imported at the start. Re-run for a clean figure.")
    print("\nTimings are noisy on a shared machine; compare ratios between runs, not absolute rates.")
    return 0


if __name__ == "__main__":
    sys.exit(main())
