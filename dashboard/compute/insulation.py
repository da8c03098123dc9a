"""Insulation sizing on the insulation tab: touch, heat-loss and condensation limits."""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from convlib import design
from convlib.pipe import Layer
from convlib.properties import dew_point
from convlib.study import (CaseSpec, evaluate_case)

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
