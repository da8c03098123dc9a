"""Insulation sizing on the insulation tab: touch, heat-loss and condensation limits; bare valves and flanges."""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from convlib import design, fittings
from convlib.errors import InputError
from convlib.pipe import Layer
from convlib.properties import dew_point
from convlib.study import CaseSpec, evaluate_case, insulation_conductivity_of

from .. import settings


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
    k = insulation_conductivity_of(case)  # the material's k(T), or the constant k
    common = dict(air_temperature=case.air_temperature, insulation_conductivity=k,
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
        d, tf, air_temperature=case.air_temperature, insulation_conductivity=k,
        outer_layers=outer, jacket_emissivity=case.emissivity, wind_speed=wind,
        sky_view_fraction=case.sky_view_fraction, pressure=case.pressure,
        max_thickness=settings.SIZING_MAX_THICKNESS)).ravel()[0])
    return InsulationView(grid, np.asarray(r.surface_temperature, float), np.asarray(r.q_per_length, float),
                          case.insulation_thickness, wind, hot, dew, critical, tuple(sizings))


# ----------------------------------------------------------------------------- bare valves and flange pairs
@dataclass(frozen=True)
class FittingsView:
    """Bare valves and flange pairs on the line (:mod:`convlib.fittings`), SI; ``off`` says why there are no
    numbers ("" when there are)."""

    nps: float | None
    pressure_class: int
    valves: int
    flange_pairs: int
    valve_extra_heat: float          # one valve [W]
    valve_equivalent_length: float   # one valve [m of the line]
    flange_extra_heat: float         # one flange pair [W]
    flange_equivalent_length: float  # [m]
    extra_heat: float                # all of them [W]
    equivalent_length: float         # all of them [m]
    off: str = ""
    notes: tuple[str, ...] = ()


#: Why the bare items are off on a line without an NPS.
FITTINGS_NEED_NPS = "choose the pipe by NPS + schedule on the line panel (the flange and valve tables are by NPS)"


def fittings_view(case: CaseSpec, nps: float | None, pressure_class: int = 150, valves: int = 0,
                  flange_pairs: int = 0) -> FittingsView:
    """Extra heat and equivalent length of ``valves`` bare valves and ``flange_pairs`` bare flange pairs on the
    insulated line (:func:`convlib.fittings.bare_valve`, :func:`convlib.fittings.bare_flange_pair`: at the
    line's fluid temperature, insulation, jacket and surroundings; bare metal emissivity 0.9, convlib's
    default). Without an NPS, or for a size or class the tables lack, the view says why (``off``)."""
    nan = float("nan")
    if case.kind != "insulated":
        return FittingsView(nps, pressure_class, valves, flange_pairs, nan, nan, nan, nan, nan, nan,
                            off="for an insulated line")
    if nps is None:
        return FittingsView(nps, pressure_class, valves, flange_pairs, nan, nan, nan, nan, nan, nan,
                            off=FITTINGS_NEED_NPS)
    from .operation import operation_layers

    options = dict(pressure_class=pressure_class, layers=operation_layers(case), jacket_emissivity=case.emissivity,
                   air_temperature=case.air_temperature, wind_speed=case.wind_speed,
                   surroundings_temperature=case.surroundings_temperature,
                   sky_view_fraction=case.sky_view_fraction, solar_irradiance=case.solar_irradiance,
                   pressure=case.pressure)
    try:
        valve = fittings.bare_valve(nps, case.fluid_temperature, **options)
        flange = fittings.bare_flange_pair(nps, case.fluid_temperature, **options)
    except InputError as exc:
        return FittingsView(nps, pressure_class, valves, flange_pairs, nan, nan, nan, nan, nan, nan, off=str(exc))
    first = lambda a: float(np.asarray(a, dtype=float).ravel()[0])  # noqa: E731
    v_heat, v_length = first(valve.extra_heat), first(valve.equivalent_length)
    f_heat, f_length = first(flange.extra_heat), first(flange.equivalent_length)
    return FittingsView(nps, pressure_class, valves, flange_pairs, v_heat, v_length, f_heat, f_length,
                        valves * v_heat + flange_pairs * f_heat, valves * v_length + flange_pairs * f_length,
                        notes=tuple(dict.fromkeys((*valve.notes, *flange.notes))))
