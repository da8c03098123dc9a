"""Every convlib call the dashboard makes, each returning a plain result for a panel.

These functions touch no widget: the app runs them (in a worker thread when a
kernel loop is running) and pushes what they return into the panels. All
numbers come from :mod:`convlib`: :func:`convlib.study.evaluate_case`,
:func:`convlib.study.run_study`, :func:`convlib.correlations.nusselt`, the
sizing functions of :mod:`convlib.design`, :mod:`convlib.operation` and
:mod:`convlib.vessels`.
"""
from __future__ import annotations

import collections
import functools
import threading
from dataclasses import dataclass, field

import numpy as np
from convlib import correlations as corr
from convlib import design
from convlib import operation as op
from convlib import snapshot
from convlib import vessels
from convlib.correlations.registry import display_name
from convlib.errors import InputError
from convlib.files import read_capped, write_atomic
from convlib.geometry import SHAPES
from convlib.operation import CAUTION_FREEZE, CAUTION_TRACING, TRACING_MARGIN
from convlib.pipe import Layer
from convlib.pipe_sizes import SCHEDULES, nominal_pipe, nominal_sizes
from convlib.properties import dew_point
from convlib.regimes import FLOW_LIMITS, Flag, flow_names, mode_names
from convlib.study import (INPUTS, CaseSpec, MonteCarloResult, StudyResult, StudySpec, SweepAxis, SweepResult,
                           TornadoBar, UncertaintySpec, cautions_for, evaluate_case, load_demo_study, run_study,
                           run_sweep, sweep_key)
from convlib.units import display_unit, from_si, to_si

from . import settings

#: What the other dashboard modules use of convlib, re-exported: this module is the only one importing convlib.
REEXPORTED = (
    "CaseSpec", "StudySpec", "StudyResult", "SweepAxis", "SweepResult", "MonteCarloResult", "TornadoBar",
    "InputError", "SHAPES", "SCHEDULES", "nominal_pipe", "nominal_sizes", "load_demo_study", "run_study", "snapshot",
    "read_capped", "write_atomic", "display_name", "display_unit", "from_si", "to_si", "flow_names", "mode_names",
    "CAUTION_FREEZE", "CAUTION_TRACING", "TRACING_MARGIN", "TOUCH_LIMITS", "law_keys",
)
#: Touch limits offered for a jacket: (label, surface temperature [K]) (values of convlib.design).
TOUCH_LIMITS = (("metal jacket", design.TOUCH_LIMIT_METAL_JACKET),
                ("non-metal finish", design.TOUCH_LIMIT_NONMETAL_JACKET))

__all__ = [
    *REEXPORTED, "CaseSummary", "summarize_case", "study_for_case", "sweep_axes", "chosen_laws", "current_value",
    "SweepCache", "sweep_study", "sweep_only", "LawCurve",
    "RegimeView",
    "regime_view", "RegimeMap", "regime_map", "uncertainty_study", "monte_carlo_settings", "Sizing",
    "InsulationView", "insulation_view", "OperationInputs", "OperationView", "operation_view", "operation_layers",
    "operation_options", "design_air_temperature", "pipe_wall_thickness", "VesselInputs", "VesselView",
    "vessel_defaults", "vessel_view", "operation_defaults",
]


# ----------------------------------------------------------------------------- base case
@dataclass(frozen=True)
class CaseSummary:
    """The numbers of the result cards for one case (SI)."""

    q_per_length: float
    q_total: float
    q_convection_per_length: float
    q_radiation_per_length: float
    q_solar_per_length: float        # absorbed sun [W/m]
    surface_temperature: float
    air_temperature: float
    h_convection: float
    h_radiation: float
    nusselt: float
    rayleigh: float
    reynolds: float
    richardson: float | None
    prandtl: float
    regime: str
    flow: str
    dew_point: float
    outer_diameter: float | None
    warnings: tuple[str, ...]
    cautions: tuple[str, ...]


def _item(value) -> float:
    return float(np.asarray(value, dtype=float).ravel()[0])


def summarize_case(case: CaseSpec) -> CaseSummary:
    """Evaluate the base case with :func:`convlib.study.evaluate_case` and collect the card values."""
    r = evaluate_case(case)
    dew = _item(dew_point(case.air_temperature, case.relative_humidity, case.pressure))
    ts = _item(r.surface_temperature)
    fluid = case.fluid_temperature if case.kind == "insulated" else None
    ri = _item(r.richardson)
    if case.kind == "insulated":
        outer = _item(r.outer_diameter)
    else:
        outer = case.diameter if "diameter" in SHAPES[case.shape].sizes else None
    return CaseSummary(
        q_per_length=_item(r.q_per_length), q_total=_item(r.q_total),
        q_convection_per_length=_item(r.q_convection_per_length),
        q_radiation_per_length=_item(r.q_radiation_per_length),
        q_solar_per_length=_item(r.q_solar_per_length), surface_temperature=ts,
        air_temperature=case.air_temperature, h_convection=_item(r.h_convection), h_radiation=_item(r.h_radiation),
        nusselt=_item(r.nusselt), rayleigh=_item(r.rayleigh), reynolds=_item(r.reynolds),
        richardson=ri if np.isfinite(ri) else None, prandtl=_item(r.prandtl),
        regime=str(mode_names(r.regime).ravel()[0]), flow=str(flow_names(r.flow_regime).ravel()[0]),
        dew_point=dew, outer_diameter=outer, warnings=tuple(r.warning_messages()),
        cautions=tuple(cautions_for(ts, case.air_temperature, dew, fluid)))


# ----------------------------------------------------------------------------- study specs
def _applies(name: str, case: CaseSpec) -> bool:
    if case.kind not in INPUTS[name][3]:
        return False
    return not (name == "diameter" and "diameter" not in SHAPES[case.shape].sizes)


def _methods(chosen: list[str] | None, geometry: str) -> list[str] | None:
    keep = [k for k in (chosen or ()) if k in corr.methods(geometry)]
    return keep or None


def study_for_case(study: StudySpec, case: CaseSpec) -> StudySpec:
    """The study with ``case`` as its base case, keeping only the parts that apply to it."""
    dists = None
    if study.uncertainty is not None:
        dists = study.uncertainty.model_copy(update={"distributions": [
            d for d in study.uncertainty.distributions if _applies(d.input, case)]})
    return StudySpec(
        name=study.name, description=study.description, case=case,
        sweeps=[s for s in study.sweeps if _applies(s.input, case)],
        maps=[m for m in study.maps if _applies(m.x.input, case) and _applies(m.y.input, case)],
        natural_methods=_methods(study.natural_methods, case.natural_geometry),
        forced_methods=_methods(study.forced_methods, case.forced_geometry),
        tornado=[t for t in study.tornado if _applies(t.input, case)], uncertainty=dists)


def sweep_axes(study: StudySpec, case: CaseSpec) -> list[SweepAxis]:
    """The sweeps offered for ``case``: the study's own, then the extras of :data:`settings.EXTRA_SWEEPS`."""
    axes = [s for s in study.sweeps if _applies(s.input, case)]
    seen = {a.input for a in axes}
    for extra in settings.EXTRA_SWEEPS:
        if extra["input"] not in seen and _applies(extra["input"], case):
            axes.append(SweepAxis(**extra))
            seen.add(extra["input"])
    return axes


def law_keys(geometry: str) -> list[str]:
    """Keys of the registered correlations of ``geometry`` (:func:`convlib.correlations.methods`)."""
    return corr.methods(geometry)


def chosen_laws(case: CaseSpec) -> tuple[str, str]:
    """The case's natural and forced laws: its own choice or its shape's default (registry keys)."""
    info = SHAPES[case.shape]
    return case.natural or info.default_natural, case.forced or info.default_forced


def current_value(case: CaseSpec, name: str | None) -> float | None:
    """The case's value of the input ``name`` [SI] (the surroundings follow the air when not given)."""
    if not name:
        return None
    value = getattr(case, name, None)
    if value is None and name == "surroundings_temperature":
        value = case.air_temperature
    return None if value is None else float(value)


class SweepCache:
    """The latest sweeps by :func:`convlib.study.sweep_key`: a sweep is not recomputed when only the case's
    value of its own swept input changed (moving the wind does not change the sweep of wind).

    Parameters
    ----------
    size : int
        Sweeps kept (least recently used dropped first).
    """

    def __init__(self, size: int = 16):
        self.size = size
        self._items: collections.OrderedDict[str, SweepResult] = collections.OrderedDict()
        self._lock = threading.Lock()

    def get(self, spec: StudySpec, axis: SweepAxis) -> SweepResult:
        """The sweep of ``spec`` along ``axis`` (:func:`convlib.study.run_sweep`), from the cache when known."""
        key = sweep_key(spec, axis)
        with self._lock:
            if key in self._items:
                self._items.move_to_end(key)
                return self._items[key]
        result = run_sweep(spec, axis)
        with self._lock:
            self._items[key] = result
            while len(self._items) > self.size:
                self._items.popitem(last=False)
        return result


def sweep_study(spec: StudySpec, axis: SweepAxis, cache: SweepCache | None = None) -> StudyResult:
    """Base case, correlation comparison and one sweep (what :func:`convlib.study.run_study` returns for the
    study with that sweep alone): the correlation view. The sweep comes from ``cache`` when given."""
    base = run_study(spec.model_copy(update={"sweeps": [], "maps": [], "tornado": [], "uncertainty": None}))
    return base.model_copy(update={"sweeps": [sweep_only(spec, axis, cache)]})


def sweep_only(spec: StudySpec, axis: SweepAxis, cache: SweepCache | None = None) -> SweepResult:
    """One sweep and nothing else (:func:`convlib.study.run_sweep`): the sweep view; from ``cache`` when given."""
    return run_sweep(spec, axis) if cache is None else cache.get(spec, axis)


def uncertainty_study(spec: StudySpec, *, run_monte_carlo: bool, samples: int | None = None,
                      seed: int | None = None, model_form: str | None = None, progress=None) -> StudyResult:
    """Tornado (and the Monte Carlo when asked) of the study at its current case.

    ``samples``, ``seed`` and ``model_form`` replace the study's Monte Carlo settings
    (a study without distributions samples the model form only).
    """
    return run_study(spec.model_copy(update={"sweeps": [], "maps": [], "uncertainty": monte_carlo_settings(
        spec, samples, seed, model_form) if run_monte_carlo else None}), progress=progress)


def monte_carlo_settings(spec: StudySpec, samples: int | None, seed: int | None,
                         model_form: str | None) -> UncertaintySpec:
    """The study's uncertainty settings with the dashboard's sample count, seed and model form (validated)."""
    u = spec.uncertainty or UncertaintySpec()
    update = {k: v for k, v in (("samples", samples), ("seed", seed), ("model_form", model_form)) if v is not None}
    return UncertaintySpec.model_validate({**u.model_dump(), **update})


# ----------------------------------------------------------------------------- regimes
@dataclass(frozen=True)
class LawCurve:
    """Nu of one registered correlation over a grid of Ra (natural) or Re (forced)."""

    mode: str
    method: str
    group: str
    x: np.ndarray
    nusselt: np.ndarray
    in_range: np.ndarray
    chosen: bool


@dataclass(frozen=True)
class RegimeView:
    """Nu charts of the current geometry and where the case sits on them."""

    natural_geometry: str
    forced_geometry: str
    natural: tuple[LawCurve, ...]
    forced: tuple[LawCurve, ...]
    natural_limits: tuple[float, float]
    forced_limits: tuple[float, float]
    prandtl: float
    rayleigh: float
    natural_nusselt: float
    reynolds: float | None
    forced_nusselt: float | None
    regime: str
    flow: str
    wind_speed: float
    temperature_difference: float


def _curves(geometry, mode, group, grid, chosen, pr, extra) -> tuple[LawCurve, ...]:
    out = []
    for key in corr.methods(geometry, mode):
        nu, flags = corr.nusselt(geometry, key, **{group: grid}, Pr=pr, full_output=True, **extra)
        ok = (np.asarray(flags) & ~Flag.INFORMATIONAL) == 0
        out.append(LawCurve(mode, key, group, grid, np.asarray(nu, float), np.broadcast_to(ok, grid.shape).copy(),
                            key == chosen))
    return tuple(out)


def regime_view(case: CaseSpec, summary: CaseSummary) -> RegimeView:
    """Every natural and forced correlation of the case's shape over Ra and Re at the case's film Pr."""
    info = SHAPES[case.shape]
    hot = summary.surface_temperature >= case.air_temperature
    nat_geometry = info.natural_geometry if hot else info.natural_geometry_cold
    natural = case.natural or info.default_natural
    forced = case.forced or info.default_forced
    extra = {}
    if nat_geometry == "vertical_cylinder":
        extra = {"diameter_over_length": case.diameter / case.length}
    pr = summary.prandtl
    ra = np.geomspace(*settings.RA_GRID[:2], settings.RA_GRID[2])
    re = np.geomspace(*settings.RE_GRID[:2], settings.RE_GRID[2])
    nat = _curves(nat_geometry, "natural", "Ra", ra, natural, pr, extra)
    frc = _curves(info.forced_geometry, "forced", "Re", re, forced, pr, {})
    point_nat = corr.nusselt(nat_geometry, natural, Ra=summary.rayleigh, Pr=pr, full_output=True, **extra)[0]
    point_re, point_frc = None, None
    if summary.reynolds > 0:
        point_re = summary.reynolds
        point_frc = float(corr.nusselt(info.forced_geometry, forced, Re=point_re, Pr=pr, full_output=True)[0])
    return RegimeView(
        natural_geometry=nat_geometry, forced_geometry=info.forced_geometry, natural=nat, forced=frc,
        natural_limits=FLOW_LIMITS[nat_geometry][1:], forced_limits=FLOW_LIMITS[info.forced_geometry][1:],
        prandtl=pr, rayleigh=summary.rayleigh, natural_nusselt=float(point_nat), reynolds=point_re,
        forced_nusselt=point_frc, regime=summary.regime, flow=summary.flow, wind_speed=case.wind_speed,
        temperature_difference=summary.surface_temperature - case.air_temperature)


@dataclass(frozen=True)
class RegimeMap:
    """Convection mode of the outer surface over wind speed and surface-minus-air temperature."""

    wind_speed: np.ndarray              # [m/s], x (log-spaced from settings.MAP_LOWEST_WIND)
    temperature_difference: np.ndarray  # surface - air [K], y
    regime: np.ndarray                  # mode code [y, x]
    richardson: np.ndarray              # [y, x], NaN in still air
    outer_diameter: float | None


def regime_map(case: CaseSpec, summary: CaseSummary) -> RegimeMap:
    """Evaluate the outer surface as a bare surface over a grid (:func:`convlib.study.evaluate_case`).

    An insulated line's outer surface is its jacket: the same exchange at the
    solved surface temperature, so the case's own point lies on the map.
    """
    dt_case = summary.surface_temperature - case.air_temperature
    sign = 1.0 if dt_case >= 0 else -1.0
    span = max(100.0, 1.5 * abs(dt_case))
    if sign < 0:
        span = min(span, case.air_temperature - 100.0)
    nx, ny = settings.MAP_POINTS
    wind = np.geomspace(settings.MAP_LOWEST_WIND, max(12.0, 1.5 * case.wind_speed), nx)  # log: still air to gale
    dt = sign * np.geomspace(0.5, span, ny)
    bare = case.model_dump()
    bare.update(kind="bare", surface_temperature=summary.surface_temperature, fluid_temperature=None)
    if case.kind == "insulated":
        bare["diameter"] = summary.outer_diameter
    bare_case = CaseSpec.model_validate(bare)
    ww, dd = np.meshgrid(wind, dt)
    r = evaluate_case(bare_case, wind_speed=ww, surface_temperature=case.air_temperature + dd)
    ri = np.asarray(r.richardson, dtype=float)
    return RegimeMap(wind, dt, np.asarray(r.regime, dtype=int), np.where(np.isfinite(ri), ri, np.nan),
                     summary.outer_diameter)


# ----------------------------------------------------------------------------- insulation
@dataclass(frozen=True)
class Sizing:
    """One sizing of :mod:`convlib.design` for the insulation chart."""

    name: str
    limit: float                 # SI: K or W/m
    required: float | None       # [m], None when not achievable
    commercial: float | None     # [m]
    messages: tuple[str, ...]
    cautions: tuple[str, ...]
    # the assumptions the sizing ran at (echoed from convlib's ThicknessResult)
    air_temperature: float = float("nan")     # [K]: touch: the design hottest ambient
    wind_speed: float = float("nan")          # [m/s]: touch: 0, still air
    jacket_emissivity: float = float("nan")   # [-]


@dataclass(frozen=True)
class InsulationView:
    """Surface temperature and heat loss against insulation thickness, with sizings."""

    thickness: np.ndarray
    surface_temperature: np.ndarray
    q_per_length: np.ndarray
    current_thickness: float
    wind_speed: float
    hot: bool
    dew_point: float
    critical: float
    sizings: tuple[Sizing, ...] = field(default_factory=tuple)


def _sizing(name, result) -> Sizing:
    def first(x):
        return float("nan") if x is None else float(np.asarray(x, dtype=float).ravel()[0])

    req, com = first(result.required_thickness), first(result.commercial_thickness)
    return Sizing(name, first(result.limit), None if np.isnan(req) else req,
                  None if np.isnan(com) else com, tuple(result.messages), tuple(result.cautions),
                  first(result.air_temperature), first(result.wind_speed), first(result.jacket_emissivity))


def insulation_view(case: CaseSpec, surface_limit: float, heat_loss_limit: float, still_air: bool,
                    hottest_air_temperature: float | None = None) -> InsulationView:
    """Thickness curves and the thicknesses that meet the touch, heat-loss and condensation limits.

    The touch sizing runs at the design hottest ambient ``hottest_air_temperature`` [K] (default: the case's air)
    and in still air whatever ``still_air`` says (the worst case for a burn); ``still_air`` applies to the others.
    """
    if case.kind != "insulated":
        raise ValueError("insulation sizing applies to an insulated line: switch the line kind to 'insulated'")
    wind = 0.0 if still_air else case.wind_speed
    top = max(settings.SIZING_MAX_THICKNESS * 2 / 3, 2.0 * case.insulation_thickness)
    grid = np.linspace(0.0, top, 61)
    r = evaluate_case(case, insulation_thickness=grid, wind_speed=wind)  # the wind stays a scalar
    outer = [Layer(case.jacket_thickness, case.jacket_conductivity, name="jacket")] if case.jacket_thickness else []
    common = dict(air_temperature=case.air_temperature, insulation_conductivity=case.insulation_conductivity,
                  outer_layers=outer, jacket_emissivity=case.emissivity, pressure=case.pressure,
                  max_thickness=settings.SIZING_MAX_THICKNESS, natural=case.natural, forced=case.forced)
    outdoor = dict(wind_speed=wind, sky_view_fraction=case.sky_view_fraction, solar_irradiance=case.solar_irradiance)
    d, tf = case.diameter, case.fluid_temperature
    hot = tf >= case.air_temperature
    dew = float(dew_point(case.air_temperature, case.relative_humidity, case.pressure))
    sizings = [_sizing("heat loss", design.thickness_for_heat_loss(d, tf, heat_loss_limit=heat_loss_limit,
                                                                   **common, **outdoor))]
    if hot:
        hottest = case.air_temperature if hottest_air_temperature is None else hottest_air_temperature
        sizings.append(_sizing("touch", design.thickness_for_surface_temperature(
            d, tf, surface_limit=surface_limit, hottest_air_temperature=hottest, **common,
            **{**outdoor, "wind_speed": 0.0})))
    else:
        sizings.append(_sizing("condensation", design.thickness_against_condensation(
            d, tf, relative_humidity=case.relative_humidity, **common)))
    critical = float(np.asarray(design.critical_thickness(
        d, tf, air_temperature=case.air_temperature, insulation_conductivity=case.insulation_conductivity,
        outer_layers=outer, jacket_emissivity=case.emissivity, wind_speed=wind,
        sky_view_fraction=case.sky_view_fraction, pressure=case.pressure,
        max_thickness=settings.SIZING_MAX_THICKNESS)).ravel()[0])
    return InsulationView(grid, np.asarray(r.surface_temperature, float), np.asarray(r.q_per_length, float),
                          case.insulation_thickness, wind, hot, dew, critical, tuple(sizings))


# ----------------------------------------------------------------------------- lines in operation
@dataclass(frozen=True)
class OperationInputs:
    """Inputs of the "In operation" panel (SI)."""

    mass_flow: float                 # [kg/s]
    fluid_pressure: float            # [Pa] absolute
    maintain_temperature: float      # [K]
    design_air_temperature: float    # coldest air [K]
    design_wind_speed: float         # strongest wind [m/s]
    tracing_margin: float            # [-]
    initial_temperature: float       # water when the flow stops [K]
    pipe_wall_thickness: float       # [m]
    service: str = "water"           # what flows: "water" (liquid, at fluid_pressure) or "steam" (saturated)


@dataclass(frozen=True)
class OperationView:
    """A flowing line's temperature profile, its tracing duty and freeze time, and sweeps of them (SI)."""

    inputs: OperationInputs
    length: float
    inlet_temperature: float
    air_temperature: float
    wind_speed: float
    position: np.ndarray             # (n,) [m]
    temperature: np.ndarray          # (n,) [K]
    outlet_temperature: float        # steam: the saturation temperature
    q_total: float                   # lost along the line [W]
    condensate_rate: float           # steam: condensate formed along the line [kg/s]; NaN for water
    tracing_loss_per_length: float   # [W/m]
    tracing_per_length: float        # [W/m]
    tracing_total: float             # [W]
    time_to_freezing_point: float    # stopped line: sensible cooling to 0 degC [s], inf: never
    time_to_frozen: float            # stopped line: until frozen solid [s], inf: never
    never_freezes: bool
    sweep_input: str
    sweep_values: np.ndarray
    sweep_outlet: np.ndarray         # [K]
    sweep_condensate: np.ndarray     # steam: [kg/s]; NaN for water
    sweep_tracing: np.ndarray        # [W/m]
    sweep_freezing_point: np.ndarray  # [s], NaN: never
    sweep_frozen: np.ndarray         # [s], NaN: never
    current_operating: float         # the case's value of the swept input (profile row)
    current_design: float            # the value the tracing and freeze rows use
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    site_rows: tuple[dict, ...] = ()  # the demo site's lines in operation (convlib.demo), text in SI


@functools.lru_cache(maxsize=1)
def demo_site_operation() -> tuple[dict, ...]:
    """The demo site's long line, traced line, outdoor water line and tank (:func:`convlib.demo.operation_rows`)."""
    from convlib.demo import load_demo_site, operation_rows

    rows, _ = operation_rows(load_demo_site()["operation"])
    return tuple(rows)


def design_air_temperature(case: CaseSpec) -> float:
    """Default coldest air of the tracing and freeze estimates: the case's air less a margin, clipped [K]."""
    o = settings.OPERATION
    return max(case.air_temperature - o["design_air_drop"], o["design_air_floor"])


def operation_defaults(case: CaseSpec, nps: float | None = None, schedule: str | None = None) -> dict:
    """Defaults of the operation view that follow the line: coldest air and pipe wall (NPS/schedule when
    chosen); none for a bare surface."""
    if case.kind != "insulated":
        return {}
    return {"design_air_temperature": design_air_temperature(case),
            "pipe_wall_thickness": pipe_wall_thickness(case.diameter, nps, schedule)}


def pipe_wall_thickness(diameter: float, nps: float | None = None, schedule: str | None = None) -> float:
    """Wall of the line [m]: the NPS/schedule wall when known or when ``diameter`` is a listed size
    (:func:`convlib.pipe_sizes.nominal_pipe`), else the setting (below a quarter of the diameter)."""
    schedule = schedule or settings.DEFAULT_SCHEDULE
    if nps is not None:
        return nominal_pipe(nps, schedule).wall_thickness
    for n in nominal_sizes(schedule):
        pipe = nominal_pipe(n, schedule)
        if abs(pipe.outer_diameter - diameter) < 1e-6:
            return pipe.wall_thickness
    return min(settings.OPERATION["pipe_wall_thickness"], 0.25 * diameter)


def operation_layers(case: CaseSpec, insulation_thickness=None) -> list[Layer]:
    """The case's insulation (``insulation_thickness`` may be an array) and jacket, as in evaluate_case."""
    thickness = case.insulation_thickness if insulation_thickness is None else insulation_thickness
    layers = [Layer(thickness, case.insulation_conductivity, name="insulation")]
    if case.jacket_thickness > 0:
        layers.append(Layer(case.jacket_thickness, case.jacket_conductivity, name="jacket"))
    return layers


def operation_options(case: CaseSpec, design: bool = False) -> dict:
    """Options of :func:`convlib.pipe.insulated_pipe` for the case; ``design``: no sun, surroundings at the air."""
    info = SHAPES[case.shape]
    natural, forced = case.natural or info.default_natural, case.forced or info.default_forced
    common = dict(jacket_emissivity=case.emissivity, sky_view_fraction=case.sky_view_fraction, pressure=case.pressure,
                  convection_factor=case.convection_factor, natural=natural, forced=forced)
    if not design:
        common.update(surroundings_temperature=case.surroundings_temperature, solar_irradiance=case.solar_irradiance)
    return common


def _sweep_grid(case: CaseSpec, inputs: OperationInputs, name: str) -> np.ndarray:
    _, low, high = settings.OPERATION_SWEEPS[name]
    if name == "wind_speed":
        high = max(high, 1.5 * case.wind_speed, 1.5 * inputs.design_wind_speed)
    elif name == "air_temperature":
        high = max(high, case.air_temperature + 10.0)
        low = min(low, inputs.design_air_temperature - 5.0)
    else:
        high = max(high, 2.0 * case.insulation_thickness)
    return np.linspace(low, high, settings.OPERATION["sweep_points"])


def operation_view(case: CaseSpec, inputs: OperationInputs, sweep_input: str = "wind_speed") -> OperationView:
    """Temperature along the line (:func:`convlib.operation.line_temperature_profile`; for saturated steam
    the saturation temperature and the condensate, :func:`convlib.operation.steam_line`) at the case's air and
    wind, the tracing duty (:func:`convlib.operation.tracing_duty`) and the freeze time
    (:func:`convlib.operation.freeze_time`) at the coldest air and strongest wind, and each against
    ``sweep_input`` (one vectorized call per quantity)."""
    if case.kind != "insulated":
        raise ValueError("for insulated lines with a known fluid temperature")
    if sweep_input not in settings.OPERATION_SWEEPS:
        raise ValueError(f"unknown sweep input {sweep_input!r}; choose one of: {', '.join(settings.OPERATION_SWEEPS)}")
    if inputs.service not in ("water", "steam"):
        raise ValueError(f"unknown service {inputs.service!r}; choose water or steam")
    d, i = case.diameter, inputs
    steam = i.service == "steam"

    def profile(air=case.air_temperature, wind=case.wind_speed, thickness=None):
        if steam:
            return op.steam_line(d, i.fluid_pressure, operation_layers(case, thickness), air_temperature=air,
                                 wind_speed=wind, length=case.length, **operation_options(case))
        return op.line_temperature_profile(
            d, case.fluid_temperature, operation_layers(case, thickness), mass_flow=i.mass_flow, length=case.length,
            air_temperature=air, fluid_pressure=i.fluid_pressure, wind_speed=wind, **operation_options(case))

    def tracing(air=i.design_air_temperature, wind=i.design_wind_speed, thickness=None):
        return op.tracing_duty(d, i.maintain_temperature, operation_layers(case, thickness), air_temperature=air,
                               wind_speed=wind, margin=i.tracing_margin, length=case.length,
                               **operation_options(case, design=True))

    def freeze(air=i.design_air_temperature, wind=i.design_wind_speed, thickness=None):
        return op.freeze_time(d, i.pipe_wall_thickness, i.initial_temperature, operation_layers(case, thickness),
                              air_temperature=air, wind_speed=wind, **operation_options(case, design=True))

    p, t, f = profile(), tracing(), freeze()
    grid = _sweep_grid(case, inputs, sweep_input)
    if sweep_input == "wind_speed":
        sp, st, sf = profile(wind=grid), tracing(wind=grid), freeze(wind=grid)
        current = (case.wind_speed, i.design_wind_speed)
    elif sweep_input == "air_temperature":
        sp, st, sf = profile(air=grid), tracing(air=grid), freeze(air=grid)
        current = (case.air_temperature, i.design_air_temperature)
    else:
        sp, st, sf = profile(thickness=grid), tracing(thickness=grid), freeze(thickness=grid)
        current = (case.insulation_thickness, case.insulation_thickness)
    seconds = lambda t: np.where(np.isfinite(t), np.asarray(t, float), np.nan)  # noqa: E731
    notes = tuple(dict.fromkeys((*t.notes, *f.notes)))
    cautions = (*f.cautions, *t.cautions)
    if steam:  # saturated all along: the profile is flat at the saturation temperature
        t_sat = _item(p.saturation_temperature)
        position, temperature = np.array([0.0, case.length]), np.full(2, t_sat)
        outlet, condensate = t_sat, _item(p.condensate_rate)
        sweep_outlet, sweep_condensate = np.asarray(sp.saturation_temperature, float), np.asarray(
            sp.condensate_rate, float)
        cautions = (*p.cautions, *cautions)
        if abs(case.fluid_temperature - t_sat) > 0.5:
            notes = (f"saturated steam at the pressure given is at {t_sat - 273.15:.1f} degC: the steam results use "
                     f"it, not the line's fluid temperature of {case.fluid_temperature - 273.15:.1f} degC", *notes)
    else:
        position, temperature = np.asarray(p.position, float), np.asarray(p.temperature, float)
        outlet, condensate = _item(p.outlet_temperature), float("nan")
        notes, cautions = (*p.notes, *notes), (*p.cautions, *cautions)  # where the water would freeze
        sweep_outlet = np.asarray(sp.outlet_temperature, float)
        sweep_condensate = np.full(sweep_outlet.shape, np.nan)
    return OperationView(
        site_rows=demo_site_operation(),
        inputs=inputs, length=case.length, inlet_temperature=outlet if steam else case.fluid_temperature,
        air_temperature=case.air_temperature, wind_speed=case.wind_speed, position=position,
        temperature=temperature, outlet_temperature=outlet, condensate_rate=condensate,
        q_total=_item(p.q_total), tracing_loss_per_length=_item(t.heat_loss_per_length),
        tracing_per_length=_item(t.duty_per_length), tracing_total=_item(t.duty_total),
        time_to_freezing_point=_item(f.time_to_freezing_point),
        time_to_frozen=_item(f.time_total),
        never_freezes=bool(np.asarray(f.never_freezes).ravel()[0]), sweep_input=sweep_input, sweep_values=grid,
        sweep_outlet=sweep_outlet, sweep_condensate=sweep_condensate,
        sweep_tracing=np.asarray(st.duty_per_length, float),
        sweep_freezing_point=seconds(sf.time_to_freezing_point), sweep_frozen=seconds(sf.time_total),
        current_operating=float(current[0]), current_design=float(current[1]), notes=notes, cautions=cautions)


# ----------------------------------------------------------------------------- tanks and ducts
@dataclass(frozen=True)
class VesselInputs:
    """Inputs of the "Tanks & ducts" panel (SI); the air, wind, emissivity and sky come from the case."""

    shape: str                       # key of settings.VESSEL_SHAPES
    vessel_diameter: float           # tank or sphere [m]
    vessel_height: float             # wall of a vertical tank [m]
    duct_width: float                # [m]
    duct_height: float               # [m]
    duct_length: float               # [m]
    contents_temperature: float      # [K]
    vessel_insulation: float         # thickness on every exposed face [m], 0: bare
    vessel_insulation_k: float       # [W/m/K]
    floor: str = "ground"            # vertical tank: key of settings.VESSEL_FLOORS
    wind_direction: str = "along"    # duct: key of settings.VESSEL_WIND
    vessel_length: float = settings.VESSEL["vessel_length"]  # horizontal tank: shell between the heads [m]
    heads: str = settings.VESSEL["heads"]  # horizontal tank: key of settings.VESSEL_HEADS


@dataclass(frozen=True)
class VesselView:
    """Faces of a tank, sphere or duct, their total, and the total against one input (SI)."""

    inputs: VesselInputs
    air_temperature: float
    wind_speed: float
    outdoor: bool
    faces: tuple[dict, ...]          # name, shape, area [m2], surface_temperature [K], q_per_area [W/m2], q_total [W]
    q_total: float                   # [W]
    area: float                      # exposed (and ground-contact) area [m2]
    sweep_input: str
    sweep_values: np.ndarray
    sweep_faces: dict                # face name -> (n,) q_total [W]
    sweep_total: np.ndarray          # (n,) [W]
    current: float                   # the case's value of the swept input
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    sizing_limit: float = float("nan")  # surface limit of the sizing [K]: touch (hot) or dew point + margin (cold)
    sizing: tuple = ()               # convlib.vessels.FaceThickness per exposed face at that limit, in still air


def vessel_defaults(case: CaseSpec) -> dict:
    """Contents temperature and insulation of the panel taken from the line: its fluid (or surface) temperature,
    its insulation when insulated; the design hottest air of the touch sizing is the line's air."""
    out = {"contents_temperature": case.fluid_temperature if case.kind == "insulated" else case.surface_temperature,
           "hottest_air_temperature": case.air_temperature}
    if case.kind == "insulated":
        out.update(vessel_insulation=case.insulation_thickness, vessel_insulation_k=case.insulation_conductivity)
    return out


def vessel_view(case: CaseSpec, inputs: VesselInputs, sweep_input: str = "vessel_insulation",
                hottest_air_temperature: float | None = None) -> VesselView:
    """:func:`convlib.vessels.vertical_tank`, :func:`~convlib.vessels.horizontal_tank`,
    :func:`~convlib.vessels.spherical_tank` or :func:`~convlib.vessels.rectangular_duct` with the contents at
    ``inputs.contents_temperature`` and one insulation layer on every exposed face, at the case's air, wind,
    emissivity and sky (outdoors when the case sees the sky), and the same against ``sweep_input`` in one
    vectorized call.

    The insulation per face (:func:`convlib.vessels.insulation_per_face`) is sized in still air: for hot
    contents against the touch limit at the design hottest air ``hottest_air_temperature`` [K] (default: the
    case's air), for cold contents above the dew point plus a margin at the case's air."""
    i = inputs
    for name, value, choices in (("shape", i.shape, settings.VESSEL_SHAPES), ("floor", i.floor, settings.VESSEL_FLOORS),
                                 ("heads", i.heads, settings.VESSEL_HEADS),
                                 ("wind_direction", i.wind_direction, settings.VESSEL_WIND),
                                 ("sweep input", sweep_input, settings.VESSEL_SWEEPS)):
        if value not in choices:
            raise ValueError(f"unknown {name} {value!r}; choose one of: {', '.join(choices)}")
    outdoor = case.sky_view_fraction > 0

    def run(thickness=i.vessel_insulation, wind=case.wind_speed, air=case.air_temperature):
        layers = [Layer(thickness, i.vessel_insulation_k, name="insulation")]
        common = dict(air_temperature=air, fluid_temperature=i.contents_temperature, emissivity=case.emissivity,
                      wind_speed=wind, outdoor=outdoor, pressure=case.pressure, convection_factor=case.convection_factor)
        if i.shape == "vertical_tank":
            return vessels.vertical_tank(i.vessel_diameter, i.vessel_height, wall_layers=layers, roof_layers=layers,
                                         floor=i.floor, floor_layers=layers if i.floor == "open" else [], **common)
        if i.shape == "horizontal_tank":
            return vessels.horizontal_tank(i.vessel_diameter, i.vessel_length, heads=i.heads, shell_layers=layers,
                                           head_layers=layers, **common)
        if i.shape == "sphere":
            return vessels.spherical_tank(i.vessel_diameter, layers=layers, **common)
        return vessels.rectangular_duct(i.duct_width, i.duct_height, i.duct_length, layers=layers,
                                        wind_direction=i.wind_direction, **common)

    base = run()
    _, low, high = settings.VESSEL_SWEEPS[sweep_input]
    current = {"vessel_insulation": i.vessel_insulation, "wind_speed": case.wind_speed,
               "air_temperature": case.air_temperature}[sweep_input]
    grid = np.linspace(min(low, current), max(high, 1.5 * current if sweep_input != "air_temperature" else current
                                                  + 10.0), settings.VESSEL["sweep_points"])
    key = {"vessel_insulation": "thickness", "wind_speed": "wind", "air_temperature": "air"}[sweep_input]
    swept = run(**{key: grid})
    limit = design.TOUCH_LIMIT_METAL_JACKET
    hot = [f for f in base.faces if f.surface is not None and float(f.surface_temperature) > limit]
    # sized at the case's air in still air (the worst case for both): a hot vessel for the touch limit, a cold
    # one above the dew point plus a margin
    hot_contents = i.contents_temperature >= case.air_temperature
    sizing_limit = (limit if hot_contents else
                    _item(dew_point(case.air_temperature, case.relative_humidity, case.pressure))
                    + design.CONDENSATION_MARGIN)
    hottest = None if hottest_air_temperature is None or not hot_contents else float(hottest_air_temperature)

    def build(thickness, *, air_temperature=case.air_temperature, wind_speed=0.0):
        return run(thickness=thickness, wind=wind_speed, air=air_temperature)

    cautions = ((design.CAUTION_TOUCH,) if hot else ()) + (
        (design.CAUTION_CONDENSATION,) if i.contents_temperature < case.air_temperature else ())
    return VesselView(
        inputs=i, air_temperature=case.air_temperature, wind_speed=case.wind_speed, outdoor=outdoor,
        faces=tuple({"name": f.name, "shape": f.shape, "area": _item(f.area),
                     "surface_temperature": _item(f.surface_temperature), "q_per_area": _item(f.q_per_area),
                     "q_total": _item(f.q_total)} for f in base.faces),
        q_total=_item(base.q_total), area=_item(base.area), sweep_input=sweep_input, sweep_values=grid,
        sweep_faces={f.name: np.broadcast_to(np.asarray(f.q_total, float), grid.shape).copy() for f in swept.faces},
        sweep_total=np.broadcast_to(np.asarray(swept.q_total, float), grid.shape).copy(), current=float(current),
        notes=tuple(base.notes), cautions=cautions, sizing_limit=sizing_limit,
        sizing=vessels.insulation_per_face(build, surface_limit=sizing_limit, hottest_air_temperature=hottest))
