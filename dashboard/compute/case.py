"""The base case, the study specs behind the sweeps, regime maps and uncertainty (dashboard side)."""
from __future__ import annotations

import collections
import threading
from dataclasses import dataclass

import numpy as np
from convlib import correlations as corr
from convlib.geometry import SHAPES
from convlib.properties import dew_point
from convlib.regimes import FLOW_LIMITS, Flag, flow_names, mode_names
from convlib.study import (INPUTS, CaseSpec, StudyResult, StudySpec, SweepAxis, SweepResult, UncertaintySpec,
                           cautions_for, evaluate_case, run_study, run_sweep, sweep_key)

from .. import settings


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


def scalar(value) -> float:
    return float(np.asarray(value, dtype=float).ravel()[0])


def summarize_case(case: CaseSpec) -> CaseSummary:
    """Evaluate the base case with :func:`convlib.study.evaluate_case` and collect the card values."""
    r = evaluate_case(case)
    dew = scalar(dew_point(case.air_temperature, case.relative_humidity, case.pressure))
    ts = scalar(r.surface_temperature)
    fluid = case.fluid_temperature if case.kind == "insulated" else None
    ri = scalar(r.richardson)
    if case.kind == "insulated":
        outer = scalar(r.outer_diameter)
    else:
        outer = case.diameter if "diameter" in SHAPES[case.shape].sizes else None
    return CaseSummary(
        q_per_length=scalar(r.q_per_length), q_total=scalar(r.q_total),
        q_convection_per_length=scalar(r.q_convection_per_length),
        q_radiation_per_length=scalar(r.q_radiation_per_length),
        q_solar_per_length=scalar(r.q_solar_per_length), surface_temperature=ts,
        air_temperature=case.air_temperature, h_convection=scalar(r.h_convection), h_radiation=scalar(r.h_radiation),
        nusselt=scalar(r.nusselt), rayleigh=scalar(r.rayleigh), reynolds=scalar(r.reynolds),
        richardson=ri if np.isfinite(ri) else None, prandtl=scalar(r.prandtl),
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


def insulation_materials() -> list[tuple[str, str]]:
    """(display name, key) of the insulation materials of :mod:`convlib.materials`, for a menu."""
    from convlib.materials import materials

    return [(m.display_name, m.name) for m in materials("insulation")]


def material_source(key: str | None) -> str:
    """Where a material's k(T) comes from and what it means, for a hint under the menu ("" for none)."""
    if key is None:
        return ""
    from convlib.materials import material

    m = material(key)
    return f"k(T) of {m.display_name}: {m.source}. {m.note}".strip()


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

    def peek(self, spec: StudySpec, axis: SweepAxis) -> SweepResult | None:
        """The sweep of ``spec`` along ``axis`` when the cache holds it, else None (never computes)."""
        key = sweep_key(spec, axis)
        with self._lock:
            if key in self._items:
                self._items.move_to_end(key)
                return self._items[key]
        return None

    def get(self, spec: StudySpec, axis: SweepAxis) -> SweepResult:
        """The sweep of ``spec`` along ``axis`` (:func:`convlib.study.run_sweep`), from the cache when known."""
        cached = self.peek(spec, axis)
        if cached is not None:
            return cached
        key = sweep_key(spec, axis)
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
