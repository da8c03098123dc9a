"""One-point calls: what a single ``insulated_pipe`` or ``bare_surface`` call costs, beside the reference kernel.

Run ``python benchmarks/small_calls.py`` (part of ``make bench``, before ``kernel_ratio.py``). A script, a
spreadsheet add-in or a marching calculation calls convlib once per point; there the fixed cost per call
(validation, dispatch, a few dozen numpy calls on one number) is the whole cost. The cases:

* insulated: a 4 in line (NPS 4, outer diameter 114.3 mm, ASME B36.10M through :mod:`convlib.pipe_sizes`) at
  180 degC (the fluid temperature of the example in DESIGN.md), 50 mm of insulation with k = 0.045 W/m/K (a case
  input, not a material datum), jacket emissivity 0.1, air 20 degC, wind 2 m/s, 1 m, surroundings at the air
  temperature; surface temperature solved to convlib's default 1e-6 K on both sides;
* bare: the same pipe bare at a surface temperature of 90 degC (the case of ``startup.py``), emissivity 0.1, the
  same air.

Subjects, timed in turn within each round (``--rounds``, default 7), each call repeated to about 0.2 s per round
(``--seconds``): convlib's call on scalars; the reference kernel (:mod:`reference_kernel`, numba-compiled when numba
is installed, else the run says so and leaves it out) through its Python entry (``run_insulated`` / ``run_bare``:
scalars in, arrays of one point out), the same physics on the same table; and the kernel's source run uncompiled:
plain Python on floats (scalar ``math``, the 1 K table read point by point), the hand formula's cost.
Printed: best / median milliseconds per call, the ratio of each to convlib's, the agreement in q, and how many
outer-exchange evaluations each needs for the insulated point (convlib's counted by wrapping
``convlib.flux.FluxSlope.__call__`` and ``convlib.surface.OuterSurface.exchange`` in this process for one untimed
call; convlib itself is not changed). The insulated call's best time goes to the run's record (``record.py``,
the speed table of ``summary.py``; target <= 0.5 ms). Not a test: nothing here asserts a timing.
"""
from __future__ import annotations

import argparse
import gc
import os
import statistics
import sys
import time

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
import reference_kernel as rk  # noqa: E402
from record import record  # noqa: E402

#: degC -> K offset (ITS-90 definition of the Celsius scale)
KELVIN = 273.15
INSULATED = dict(pipe_outer_diameter=None, fluid_temperature=180.0 + KELVIN, thickness=0.05, conductivity=0.045,
                 air_temperature=20.0 + KELVIN, wind_speed=2.0, emissivity=0.1)
BARE = dict(diameter=None, surface_temperature=90.0 + KELVIN, air_temperature=20.0 + KELVIN, wind_speed=2.0,
            emissivity=0.1)


def cases() -> tuple[dict, dict]:
    from convlib.pipe_sizes import nominal_pipe

    outer = nominal_pipe(4).outer_diameter  # 114.3 mm, ASME B36.10M
    return {**INSULATED, "pipe_outer_diameter": outer}, {**BARE, "diameter": outer}


def subjects(insulated: dict, bare: dict, compiled) -> dict:
    """name -> (call returning q_per_length, kind); the kernel entries only where a kernel is given."""
    import convlib as cl

    table = rk.air_table()
    i, b = insulated, bare

    def convlib_pipe():
        return cl.insulated_pipe(i["pipe_outer_diameter"], i["fluid_temperature"],
                                 [cl.Layer(i["thickness"], i["conductivity"])], air_temperature=i["air_temperature"],
                                 wind_speed=i["wind_speed"], jacket_emissivity=i["emissivity"]).q_per_length

    def convlib_bare():
        return cl.bare_surface("horizontal_cylinder", surface_temperature=b["surface_temperature"],
                               air_temperature=b["air_temperature"], diameter=b["diameter"],
                               wind_speed=b["wind_speed"], emissivity=b["emissivity"]).q_per_length

    def kernel_pipe(kernels):
        return lambda: rk.run_insulated(kernels[1], **i, table=table)[0]["q_per_length"]

    def kernel_bare(kernels):
        return lambda: rk.run_bare(kernels[0], **b, table=table)["q_per_length"]

    plain = rk.make_kernels(jit=False)
    out = {"convlib.insulated_pipe": (convlib_pipe, "insulated")}
    if compiled is not None:
        out["kernel, numba (insulated)"] = (kernel_pipe(compiled), "insulated")
    out["plain Python (insulated)"] = (kernel_pipe(plain), "insulated")
    out["convlib.bare_surface"] = (convlib_bare, "bare")
    if compiled is not None:
        out["kernel, numba (bare)"] = (kernel_bare(compiled), "bare")
    out["plain Python (bare)"] = (kernel_bare(plain), "bare")
    return out


def per_call(fn, calls: int) -> float:
    """Seconds per call over ``calls`` calls (GC off while timing)."""
    gc.collect()
    gc.disable()
    try:
        start = time.perf_counter()
        for _ in range(calls):
            fn()
        return (time.perf_counter() - start) / calls
    finally:
        gc.enable()


def measure(calls: dict, rounds: int, seconds: float) -> dict[str, tuple[list[float], int]]:
    """Per-call times [s] of every subject in every round (subjects in turn within a round), and the calls per
    round; the number of calls set from a first estimate after a warm-up."""
    repeat = {}
    for name, (fn, _) in calls.items():
        for _ in range(3):
            fn()  # warm-up: imports, tables, compilation
        estimate = per_call(fn, 5)
        repeat[name] = max(1, int(seconds / max(estimate, 1e-9)))
    times = {name: [] for name in calls}
    for _ in range(rounds):
        for name, (fn, _) in calls.items():
            times[name].append(per_call(fn, repeat[name]))
    return {name: (times[name], repeat[name]) for name in calls}


def convlib_evaluations(call) -> dict[str, int]:
    """Outer-exchange evaluations of one convlib call, counted by wrapping the evaluators in this process."""
    import convlib.flux
    import convlib.surface

    targets = [(convlib.flux, "FluxSlope", "__call__"), (convlib.surface, "OuterSurface", "exchange")]
    counts, saved = {}, []
    for module, cls_name, attr in targets:
        cls = getattr(module, cls_name, None)
        original = getattr(cls, attr, None) if cls is not None else None
        if original is None:
            continue
        label = f"{cls_name}.{attr}"
        counts[label] = 0

        def counted(*args, _original=original, _label=label, **kwargs):
            counts[_label] += 1
            return _original(*args, **kwargs)

        saved.append((cls, attr, original))
        setattr(cls, attr, counted)
    try:
        call()
    finally:
        for cls, attr, original in saved:
            setattr(cls, attr, original)
    return counts


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=7)
    parser.add_argument("--seconds", type=float, default=0.2, help="time per subject per round (about)")
    args = parser.parse_args(argv)
    try:
        import numba

        compiled, kernel_text = rk.make_kernels(jit=True), f"numba {numba.__version__} njit, one core"
    except ImportError:
        compiled, kernel_text = None, "numba not installed (pip install -e '.[bench]'): no compiled kernel timed"
    from run import convlib_fingerprint, environment  # the header of benchmarks/run.py

    insulated, bare = cases()
    calls = subjects(insulated, bare, compiled)
    print("one-point calls: convlib beside the reference kernel (benchmarks/reference_kernel.py) on the same case")
    print("\n".join(environment() + [f"convlib sources {convlib_fingerprint()}", f"kernel: {kernel_text}"]))
    print("insulated: NPS 4 (114.3 mm), fluid 180 degC, 50 mm k 0.045 W/m/K, jacket emissivity 0.1, air 20 degC, "
          "wind 2 m/s; bare: the pipe at 90 degC, emissivity 0.1")
    results = measure(calls, args.rounds, args.seconds)
    q = {name: float(np.ravel(fn())[0]) for name, (fn, _) in calls.items()}
    print(f"\n{'subject':<28} {'ms per call best / median':>26}  {'calls/round':>11}  {'time / convlib':>14}  "
          f"{'q [W/m]':>10}  {'rel. diff. q':>12}")
    for name, (fn, kind) in calls.items():
        times, repeat = results[name]
        mine = "convlib.insulated_pipe" if kind == "insulated" else "convlib.bare_surface"
        ratio = min(times) / min(results[mine][0])
        diff = abs(q[name] - q[mine]) / abs(q[mine])
        print(f"{name:<28} {min(times) * 1e3:12.4g} / {statistics.median(times) * 1e3:<11.4g}  {repeat:11d}  "
              f"{ratio:14.3g}  {q[name]:10.4g}  {diff:12.1e}")
    counts = convlib_evaluations(calls["convlib.insulated_pipe"][0])
    plain_kernel = rk.make_kernels(jit=False)
    _, kernel_evaluations = rk.run_insulated(plain_kernel[1], **insulated)
    counted = ", ".join(f"{label} {n}" for label, n in counts.items()) or "no evaluator found to count"
    print(f"\nouter-exchange evaluations for the insulated point: convlib {sum(counts.values())} ({counted}); "
          f"the kernel {kernel_evaluations} (Newton steps and the final evaluation)")
    print("ms per call from the rounds' per-call means; the ratio is each subject's best time over convlib's "
          "(above 1: slower than convlib).")
    times = results["convlib.insulated_pipe"][0]
    base_name = "kernel, numba (insulated)" if compiled is not None else "plain Python (insulated)"
    base_label = ("reference kernel, numba, one-point call" if compiled is not None
                  else "plain Python (kernel source uncompiled; numba not installed)")
    record("single_point_pipe", value=min(times) * 1e3, baseline=min(results[base_name][0]) * 1e3,
           baseline_label=base_label, best=min(times) * 1e3, median=statistics.median(times) * 1e3,
           note=(f"plain Python {min(results['plain Python (insulated)'][0]) * 1e3:.3g} ms; bare_surface "
                 f"{min(results['convlib.bare_surface'][0]) * 1e3:.3g} ms; convlib {sum(counts.values())} "
                 f"outer-exchange evaluations ({counted}), kernel {kernel_evaluations}"))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
