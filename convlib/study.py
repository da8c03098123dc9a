"""Sensitivity studies: a validated spec in, every figure's numbers out.

A :class:`StudySpec` names a base case (a bare surface at a known temperature
or an insulated line with a known fluid temperature), sweep axes, 2-D maps,
the correlations to compare, tornado ranges and input uncertainties.
:func:`run_study` evaluates all of it with vectorized calls of
:func:`convlib.surface.bare_surface` and :func:`convlib.pipe.insulated_pipe`
and returns a :class:`StudyResult` that serializes to JSON (no NaN: quantities
that do not exist are ``None`` and say why).

Uncertainty: each input may carry a distribution (normal, uniform,
triangular, log-normal). The correlation's own model-form error is either
a multiplicative factor on the convective coefficient whose 95 % band is the
correlation's stated accuracy (a published +-figure is read as a 95 % band
unless its source says otherwise) or a random choice among the applicable
correlations of the geometry.
"""
from __future__ import annotations

import json
import math
from typing import Callable, Literal

import numpy as np

from . import __version__
from . import correlations as corr
from .cautions import CAUTION_BELOW_DEW_POINT, CAUTION_FREEZE_RISK, CAUTION_HOT_SURFACE
from .geometry import SHAPES
from .pipe import Layer, insulated_pipe
from .properties import dew_point
from .regimes import Flag, summarize_flags
from .study_spec import (INPUTS, QUANTITIES, SCHEMA_VERSION, CaseSpec, Distribution, MapSpec, StrictModel, StudySpec,
                         SweepAxis, TornadoInput, UncertaintySpec, axis_values, check_input, check_plausible,
                         load_demo_study)
from .surface import bare_surface

__all__ = [
    "SCHEMA_VERSION", "INPUTS", "CaseSpec", "SweepAxis", "MapSpec", "TornadoInput", "Distribution",
    "UncertaintySpec", "StudySpec", "StudyResult", "evaluate_case", "run_study", "run_sweep", "sweep_key", "axis_values",
    "load_demo_study", "cautions_for", "check_plausible", "case_layers", "insulation_conductivity_of",
]


# ----------------------------------------------------------------------------- evaluation
def _defaults(case: CaseSpec) -> tuple[str, str]:
    info = SHAPES[case.shape]
    return case.natural or info.default_natural, case.forced or info.default_forced


def evaluate_case(case: CaseSpec, natural: str | None = None, forced: str | None = None, **overrides):
    """Evaluate the case with any inputs replaced by arrays (broadcast together).

    Returns the :class:`convlib.surface.SurfaceResult` (bare) or
    :class:`convlib.pipe.PipeResult` (insulated).

    Examples
    --------
    >>> case = CaseSpec(kind="insulated", diameter=0.1143, fluid_temperature=453.15, air_temperature=293.15)
    >>> r = evaluate_case(case, wind_speed=np.array([0.0, 5.0]))
    >>> r.q_per_length.shape
    (2,)
    """
    for name in overrides:
        check_input(name, case.kind)
    values = {name: overrides.get(name, getattr(case, name)) for name in INPUTS if case.kind in INPUTS[name][3]}
    default_natural, default_forced = _defaults(case)
    common = dict(air_temperature=values["air_temperature"], wind_speed=values["wind_speed"],
                  surroundings_temperature=values["surroundings_temperature"],
                  sky_view_fraction=values["sky_view_fraction"], solar_irradiance=values["solar_irradiance"],
                  pressure=values["pressure"], convection_factor=values["convection_factor"],
                  natural=natural or default_natural, forced=forced or default_forced)
    if case.kind == "bare":
        sizes = {"diameter": values["diameter"]} if "diameter" in SHAPES[case.shape].sizes else {}
        for size in ("length", "height", "width"):
            if size in SHAPES[case.shape].sizes:
                sizes[size] = getattr(case, size)
        return bare_surface(case.shape, surface_temperature=values["surface_temperature"],
                            emissivity=values["emissivity"], **sizes, **common)
    layers = case_layers(case, values["insulation_thickness"], overrides.get("insulation_conductivity"))
    return insulated_pipe(values["diameter"], values["fluid_temperature"], layers, length=case.length,
                          jacket_emissivity=values["emissivity"], **common)


def insulation_conductivity_of(case: CaseSpec):
    """The insulation's conductivity: the material's k(T) (a :class:`convlib.conductivity.Conductivity`) when the
    case names ``insulation_material``, else the constant ``insulation_conductivity`` [W/m/K]."""
    if case.insulation_material is not None:
        from .materials import material

        return material(case.insulation_material).conductivity
    return case.insulation_conductivity


def case_layers(case: CaseSpec, insulation_thickness=None, insulation_conductivity=None) -> list[Layer]:
    """The case's insulation and jacket as layers (thickness and a constant conductivity may be arrays; a given
    ``insulation_conductivity`` replaces the material's k(T), as a sweep of it does)."""
    thickness = case.insulation_thickness if insulation_thickness is None else insulation_thickness
    k = insulation_conductivity_of(case) if insulation_conductivity is None else insulation_conductivity
    layers = [Layer(thickness, k, name="insulation")]
    if case.jacket_thickness > 0:
        layers.append(Layer(case.jacket_thickness, case.jacket_conductivity, name="jacket"))
    return layers


# ----------------------------------------------------------------------------- results
class Quantities(StrictModel):
    """Per-point quantities of one evaluation (lists over the points)."""

    q_per_length: list[float]
    q_total: list[float]
    prandtl: list[float]
    surface_temperature: list[float]
    h_convection: list[float]
    h_radiation: list[float]
    nusselt: list[float]
    q_convection_per_length: list[float]
    q_radiation_per_length: list[float]
    rayleigh: list[float]
    reynolds: list[float]
    richardson: list[float | None]
    regime: list[int]
    flow_regime: list[int]
    warnings: list[int]


def _quantities(r) -> Quantities:
    flat = {name: np.asarray(getattr(r, name), dtype=float).ravel() for name in
            (*QUANTITIES, "q_total", "prandtl", "rayleigh", "reynolds")}
    ri = np.asarray(r.richardson, dtype=float).ravel()
    return Quantities(**{k: v.tolist() for k, v in flat.items()},
                      richardson=[None if not math.isfinite(x) else x for x in ri.tolist()],
                      regime=np.asarray(r.regime).ravel().tolist(),
                      flow_regime=np.asarray(r.flow_regime).ravel().tolist(),
                      warnings=np.asarray(r.warnings).ravel().tolist())


class MethodCurves(StrictModel):
    """One correlation's values along a sweep (or at the base case)."""

    mode: Literal["natural", "forced"]
    method: str
    values: Quantities
    in_range: list[bool]


class Spread(StrictModel):
    """Disagreement between applicable correlations: (max - min) / median per point.

    Each correlation of the mode is swapped in with the other mode's default, so in wind
    the natural spread is that of the combined (mixed) result: the effect of the choice on
    the answer, not of the laws alone.

    ``None`` where fewer than two correlations apply there; ``extrapolated_*`` uses
    every compared correlation, in range or not.
    """

    mode: Literal["natural", "forced"]
    nusselt: list[float | None]
    q_per_length: list[float | None]
    applicable_count: list[int]
    extrapolated_nusselt: list[float | None]
    extrapolated_q_per_length: list[float | None]


class SweepResult(StrictModel):
    input: str
    unit: str
    values: list[float]
    default: Quantities                  # default correlations
    methods: list[MethodCurves]
    spreads: list[Spread]
    band_low: list[float]                # q_per_length with the default correlation at -accuracy (95 %)
    band_high: list[float]


class MapResult(StrictModel):
    x_input: str
    y_input: str
    x: list[float]
    y: list[float]
    q_per_length: list[list[float]]      # [y][x]
    surface_temperature: list[list[float]]
    richardson: list[list[float | None]]
    regime: list[list[int]]
    natural_spread: list[list[float | None]]


class TornadoBar(StrictModel):
    input: str
    unit: str
    low: float
    high: float
    q_low: float
    q_high: float
    swing: float
    surface_temperature_low: float
    surface_temperature_high: float


class MonteCarloResult(StrictModel):
    samples: int
    seed: int
    model_form: str
    quantity: str
    mean: float
    std: float
    p5: float
    p50: float
    p95: float
    standard_error_mean: float
    histogram_edges: list[float]
    histogram_counts: list[int]
    convergence_n: list[int]
    convergence_mean: list[float]
    surface_temperature_p5: float
    surface_temperature_p50: float
    surface_temperature_p95: float
    clipped: dict[str, int]


class StudyResult(StrictModel):
    """All numbers of a study; JSON round-trips exactly."""

    schema_version: int = SCHEMA_VERSION
    convlib_version: str = __version__
    base: Quantities
    base_methods: list[MethodCurves]
    base_spreads: list[Spread]
    dew_point: float
    warnings: list[str]
    cautions: list[str]
    sweeps: list[SweepResult]
    maps: list[MapResult]
    tornado: list[TornadoBar]
    monte_carlo: MonteCarloResult | None


# ----------------------------------------------------------------------------- runner
def _relative_spread(values: np.ndarray, ok: np.ndarray) -> tuple[list, list]:
    """(max - min) / |median| over axis 0 where ``ok``; ``None`` where fewer than two apply."""
    count = ok.sum(axis=0)
    high = np.where(ok, values, -np.inf).max(axis=0)
    low = np.where(ok, values, np.inf).min(axis=0)
    # the median of the applicable values per column (NaN where none): the two middle ones of the sorted column
    # (NaN sorts last), as numpy.nanmedian gives it, without its slow path for small arrays
    ordered = np.sort(np.where(ok, values, np.nan), axis=0)
    middle = [np.take_along_axis(ordered, np.maximum(index, 0)[None], axis=0)[0]
              for index in ((count - 1) // 2, count // 2)]
    with np.errstate(all="ignore"):
        median = (middle[0] + middle[1]) / 2.0
        spread = (high - low) / np.abs(median)
    out = [float(x) if (c >= 2 and math.isfinite(x)) else None for x, c in zip(spread, count)]
    return out, count.astype(int).tolist()


def _compare(spec: StudySpec, default=None, **overrides) -> tuple[list[MethodCurves], list[Spread]]:
    """Every compared correlation at the given points, and the spread per mode.

    ``default`` is the result of the case's own laws at these points when the caller has it: the comparison
    reuses it for the natural and the forced law it holds instead of solving the same case again. The forced
    correlations are compared only where there is wind (none are solved when no point has any).
    """
    case = spec.case
    curves, spreads = [], []
    bits = {"natural": Flag.NATURAL_OUT_OF_RANGE, "forced": Flag.FORCED_OUT_OF_RANGE}
    own = dict(zip(("natural", "forced"), _defaults(case)))
    for mode in ("natural", "forced"):
        nus, qs, oks = [], [], []
        if mode == "forced" and default is not None and not (np.asarray(default.reynolds) > 0).any():
            break  # still air at every point: no forced law applies
        for key in spec.compared_methods(mode):
            r = default if (default is not None and key == own[mode]) else evaluate_case(
                case, **{mode: key}, **overrides)
            moving = np.broadcast_to(np.asarray(r.reynolds) > 0, np.shape(r.q_per_length)).ravel()
            if mode == "forced" and not moving.any():
                break
            invalid = bits[mode] | Flag.PRANDTL_OUT_OF_RANGE | Flag.FLUID_NOT_FITTED
            ok = ((np.asarray(r.warnings) & invalid) == 0).ravel() & (moving if mode == "forced" else True)
            curves.append(MethodCurves(mode=mode, method=key, values=_quantities(r), in_range=ok.tolist()))
            nus.append(np.asarray(r.nusselt, dtype=float).ravel())
            qs.append(np.asarray(r.q_per_length, dtype=float).ravel())
            oks.append(ok)
        if not nus:
            continue
        nus, qs, oks = np.array(nus), np.array(qs), np.array(oks)
        every = np.ones_like(oks)
        nu_spread, count = _relative_spread(nus, oks)
        spreads.append(Spread(mode=mode, nusselt=nu_spread, q_per_length=_relative_spread(qs, oks)[0],
                              applicable_count=count, extrapolated_nusselt=_relative_spread(nus, every)[0],
                              extrapolated_q_per_length=_relative_spread(qs, every)[0]))
    return curves, spreads


def _accuracy(case: CaseSpec, wind_speed=None) -> np.ndarray:
    """Stated accuracy (fraction, read as a 95 % band) of the default correlations at each point: the natural
    law's in still air, the larger of the natural and forced laws' where there is wind. ``wind_speed`` [m/s]
    is the swept or sampled wind (default: the case's)."""
    natural, forced = _defaults(case)
    still = corr.get(case.natural_geometry, natural).accuracy_percent
    windy = max(still, corr.get(case.forced_geometry, forced).accuracy_percent)
    wind = np.asarray(case.wind_speed if wind_speed is None else wind_speed, dtype=float)
    return np.where(wind > 0, windy, still) / 100.0


def _uniform(values) -> np.ndarray | float:
    """``values`` as a scalar when every point holds the same value (the solver then keeps it a scalar)."""
    a = np.asarray(values, dtype=float)
    return float(a.flat[0]) if a.size and np.all(a == a.flat[0]) else a


def _band(spec: StudySpec, **overrides) -> tuple[np.ndarray, np.ndarray]:
    """q_per_length with the convective coefficient at (1 - accuracy) and (1 + accuracy): the model-form band,
    with the accuracy of the laws that apply at each point (its own wind). Both ends are one solve: the points
    are independent, so stacking them gives the same numbers as two calls."""
    acc = _uniform(_accuracy(spec.case, overrides.get("wind_speed")))
    factor = np.asarray(overrides.pop("convection_factor", spec.case.convection_factor), dtype=float)
    shape = np.broadcast_shapes(np.shape(acc), *(np.shape(v) for v in overrides.values()))
    ends = np.stack([np.broadcast_to(1.0 - acc, shape), np.broadcast_to(1.0 + acc, shape)])  # (2, *points)
    q = np.asarray(evaluate_case(spec.case, convection_factor=factor * ends, **overrides).q_per_length)
    low, high = q[0].ravel(), q[1].ravel()
    return np.minimum(low, high), np.maximum(low, high)


def _sweep(spec: StudySpec, axis: SweepAxis) -> SweepResult:
    x = axis_values(axis)
    default = evaluate_case(spec.case, **{axis.input: x})
    curves, spreads = _compare(spec, default, **{axis.input: x})
    low, high = _band(spec, **{axis.input: x})
    return SweepResult(input=axis.input, unit=INPUTS[axis.input][0], values=x.tolist(),
                       default=_quantities(default), methods=curves, spreads=spreads,
                       band_low=low.tolist(), band_high=high.tolist())


def _grid(values: np.ndarray, shape) -> list:
    return np.asarray(values, dtype=float).reshape(shape).tolist()


def _map(spec: StudySpec, m: MapSpec) -> MapResult:
    x, y = axis_values(m.x), axis_values(m.y)
    xx, yy = np.meshgrid(x, y)
    overrides = {m.x.input: xx, m.y.input: yy}
    r = evaluate_case(spec.case, **overrides)
    ri = np.asarray(r.richardson, dtype=float)
    natural_only = spec.model_copy(update={"forced_methods": None})
    _, spreads = _compare(natural_only, **{k: v.ravel() for k, v in overrides.items()})
    natural_spread = np.array([np.nan if s is None else s for s in spreads[0].q_per_length]).reshape(xx.shape)
    return MapResult(
        x_input=m.x.input, y_input=m.y.input, x=x.tolist(), y=y.tolist(),
        q_per_length=_grid(r.q_per_length, xx.shape), surface_temperature=_grid(r.surface_temperature, xx.shape),
        richardson=[[None if not math.isfinite(v) else v for v in row] for row in ri.tolist()],
        regime=np.asarray(r.regime).reshape(xx.shape).tolist(),
        natural_spread=[[None if not math.isfinite(v) else v for v in row] for row in natural_spread.tolist()])


def _tornado(spec: StudySpec) -> list[TornadoBar]:
    bars = []
    for t in spec.tornado:
        r = evaluate_case(spec.case, **{t.input: np.array([t.low, t.high])})
        q, ts = np.asarray(r.q_per_length), np.asarray(r.surface_temperature)
        bars.append(TornadoBar(input=t.input, unit=INPUTS[t.input][0], low=t.low, high=t.high,
                               q_low=float(q[0]), q_high=float(q[1]), swing=float(abs(q[1] - q[0])),
                               surface_temperature_low=float(ts[0]), surface_temperature_high=float(ts[1])))
    return sorted(bars, key=lambda b: b.swing, reverse=True)


def _monte_carlo(spec: StudySpec, progress: Callable[[float, str], None] | None) -> MonteCarloResult:
    u = spec.uncertainty
    rng = np.random.default_rng(u.seed)
    n = u.samples
    overrides, clipped = {}, {}
    for d in u.distributions:
        _, low, high, _ = INPUTS[d.input]
        draw = d.sample(rng, n)
        outside = (draw < low) | (draw > high)
        clipped[d.input] = int(outside.sum())
        overrides[d.input] = np.clip(draw, low, high)
    case = spec.case
    overrides = overrides or {"air_temperature": np.full(n, case.air_temperature)}
    if u.model_form == "stated_accuracy":
        # factor on the convective coefficient whose 95 % band is the stated accuracy (normal, sd = acc / 1.96)
        # the accuracy of the laws at each sample's own wind (sampled or the case's)
        factor = 1.0 + rng.normal(0.0, 1.0, n) * _accuracy(case, overrides.get("wind_speed")) / 1.96
        overrides["convection_factor"] = np.clip(factor * overrides.get("convection_factor", case.convection_factor),
                                                 0.1, 5.0)
    keys = spec.compared_methods("natural") if u.model_form == "choose_correlation" else [None]
    choice = rng.integers(0, len(keys), n)
    q, ts, done = np.empty(n), np.empty(n), 0
    for j, key in enumerate(keys):
        index = np.flatnonzero(choice == j)
        for start in range(0, index.size, 20_000):  # chunks: progress while sampling, same numbers
            part = index[start:start + 20_000]
            r = evaluate_case(case, natural=key, **{k: v[part] for k, v in overrides.items()})
            q[part], ts[part] = r.q_per_length, r.surface_temperature
            done += part.size
            if progress:
                progress(done / n, f"{done} of {n} samples" + (f" with {key}" if key else ""))
    edges = np.histogram_bin_edges(q, bins=40)
    counts, _ = np.histogram(q, bins=edges)
    checkpoints = np.unique(np.geomspace(10, n, 30).astype(int))
    cumulative = np.cumsum(q)
    return MonteCarloResult(
        samples=n, seed=u.seed, model_form=u.model_form, quantity="q_per_length",
        mean=float(q.mean()), std=float(q.std(ddof=1)), p5=float(np.percentile(q, 5)),
        p50=float(np.percentile(q, 50)), p95=float(np.percentile(q, 95)),
        standard_error_mean=float(q.std(ddof=1) / math.sqrt(n)),
        histogram_edges=edges.tolist(), histogram_counts=counts.tolist(),
        convergence_n=checkpoints.tolist(), convergence_mean=(cumulative[checkpoints - 1] / checkpoints).tolist(),
        surface_temperature_p5=float(np.percentile(ts, 5)), surface_temperature_p50=float(np.percentile(ts, 50)),
        surface_temperature_p95=float(np.percentile(ts, 95)), clipped=clipped)


#: The general cautions (:mod:`convlib.cautions`) under the names this module has always used.
CAUTION_HOT, CAUTION_DEW, CAUTION_FREEZE = CAUTION_HOT_SURFACE, CAUTION_BELOW_DEW_POINT, CAUTION_FREEZE_RISK


def cautions_for(surface_temperature: float, air_temperature: float, dew: float,
                 fluid_temperature: float | None = None) -> list[str]:
    """The safety cautions that apply to one evaluated case."""
    out = []
    if surface_temperature > 333.15:  # 60 degC: common practice, no source
        out.append(CAUTION_HOT)
    if surface_temperature < dew:
        out.append(CAUTION_DEW)
    if air_temperature <= 273.15 or (fluid_temperature is not None and fluid_temperature <= 273.15):
        out.append(CAUTION_FREEZE)
    return out


def run_sweep(spec: StudySpec, axis: SweepAxis) -> SweepResult:
    """One sweep of the study's case and nothing else: the curve of every compared correlation, their
    spread and the model-form band along ``axis`` (what :func:`run_study` puts in ``sweeps`` for it).

    For interactive use, where the base-case comparison and the other parts are not redrawn.

    Examples
    --------
    >>> spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    >>> s = run_sweep(spec, SweepAxis(input="wind_speed", start=0.0, stop=4.0, count=3))
    >>> s.input, len(s.default.q_per_length)
    ('wind_speed', 3)
    """
    spec = StudySpec.model_validate({**spec.model_dump(), "sweeps": [axis.model_dump()]})  # the axis applies
    return _sweep(spec, spec.sweeps[0])


def sweep_key(spec: StudySpec, axis: SweepAxis) -> str:
    """A text that is equal for two studies exactly when their sweeps along ``axis`` are equal.

    It holds what :func:`run_sweep` reads: the case without its own value of the swept input (every point
    replaces it), the laws compared and the axis; not the name, the other sweeps, maps, tornado or
    uncertainty. A cache keyed by it does not recompute the wind sweep when only the case's wind moves.

    Examples
    --------
    >>> spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    >>> axis = SweepAxis(input="wind_speed", start=0.0, stop=4.0, count=3)
    >>> windy = spec.model_copy(update={"case": spec.case.model_copy(update={"wind_speed": 7.0})})
    >>> sweep_key(spec, axis) == sweep_key(windy, axis)
    True
    """
    case = spec.case.model_dump(mode="json")
    case.pop(axis.input, None)
    return json.dumps({"case": case, "natural_methods": spec.natural_methods, "forced_methods": spec.forced_methods,
                       "axis": axis.model_dump(mode="json")}, sort_keys=True)


def run_study(spec: StudySpec, progress: Callable[[float, str], None] | None = None) -> StudyResult:
    """Evaluate a study: base case, correlation comparison, sweeps, maps, tornado, Monte Carlo.

    ``progress(fraction, text)`` is called as the work advances. Deterministic for a
    given spec (seed) and library versions.

    Examples
    --------
    >>> spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1),
    ...                  sweeps=[SweepAxis(input="diameter", start=0.02, stop=0.5, count=5)])
    >>> res = run_study(spec)
    >>> len(res.sweeps[0].values), res.base_spreads[0].mode
    (5, 'natural')
    """
    def report(fraction, text):
        if progress:
            progress(float(fraction), text)

    case = spec.case
    report(0.0, "base case")
    base = evaluate_case(case)
    base_methods, base_spreads = _compare(spec, base)
    dew = float(dew_point(case.air_temperature, case.relative_humidity, case.pressure))
    ts = float(np.asarray(base.surface_temperature))
    warnings = summarize_flags(base.warnings)
    sweeps = []
    for i, axis in enumerate(spec.sweeps):
        report(0.1 + 0.3 * i / max(len(spec.sweeps), 1), f"sweep of {axis.input}")
        sweeps.append(_sweep(spec, axis))
    maps = []
    for i, m in enumerate(spec.maps):
        report(0.4 + 0.2 * i / max(len(spec.maps), 1), f"map of {m.x.input} x {m.y.input}")
        maps.append(_map(spec, m))
    report(0.6, "tornado")
    tornado = _tornado(spec)
    mc = None
    if spec.uncertainty is not None:
        mc = _monte_carlo(spec, lambda f, t: report(0.65 + 0.35 * f, f"Monte Carlo: {t}"))
    report(1.0, "done")
    return StudyResult(
        base=_quantities(base), base_methods=base_methods, base_spreads=base_spreads, dew_point=dew,
        warnings=warnings,
        cautions=cautions_for(ts, case.air_temperature, dew,
                              case.fluid_temperature if case.kind == "insulated" else None),
        sweeps=sweeps, maps=maps, tornado=tornado, monte_carlo=mc)
