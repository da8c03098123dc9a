"""Saturated steam lines: saturation temperature, latent heat, condensate of a line's loss (CoolProp, IAPWS-95).

Results are design estimates; steam trapping follows the governing standard and the trap manufacturer.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .marching import coolprop, pipe_keywords
from .pipe import PipeResult, insulated_pipe
from .properties import CP  # CoolProp.CoolProp, imported on first use
from .surroundings import Surroundings, resolve
from .validation import SIZE_RANGE, as_array, as_bounded

__all__ = ["CAUTION_STEAM", "saturation_temperature", "latent_heat_of_vaporization", "condensate_rate", "SteamLine",
           "steam_line"]

CAUTION_STEAM = ("Condensate load is for the steady running line; warm-up loads are larger, and trap sizing and "
                 "spacing follow the governing standard and the trap manufacturer.")

def _saturated(key, steam_pressure, quality, fluid):
    """CoolProp (IAPWS-95 for water) at saturation; the pressure checked between triple and critical points."""
    triple, critical = coolprop(lambda: (CP.PropsSI("ptriple", fluid), CP.PropsSI("pcrit", fluid)), fluid, "fluid")
    p = as_array("steam_pressure", steam_pressure, unit="Pa", low=triple, high=critical, low_inclusive=False,
                 high_inclusive=False)
    values = coolprop(lambda: CP.PropsSI(key, "P", np.atleast_1d(p).ravel(), "Q", quality, fluid), p,
                       "steam_pressure")
    return np.asarray(values, dtype=float).reshape(p.shape)


def saturation_temperature(steam_pressure, fluid="Water"):
    """Saturation temperature [K] at ``steam_pressure`` [Pa], from CoolProp (IAPWS-95 for water).

    >>> round(float(saturation_temperature(101325.0)) - 273.15, 2)
    99.97
    """
    return _saturated("T", steam_pressure, 0.0, fluid)


def latent_heat_of_vaporization(steam_pressure, fluid="Water"):
    """Latent heat :math:`h_{fg} = h_g - h_f` at saturation [J/kg] at ``steam_pressure`` [Pa], from CoolProp.

    >>> round(float(latent_heat_of_vaporization(101325.0)) / 1e3, 1)
    2256.5
    """
    return _saturated("H", steam_pressure, 1.0, fluid) - _saturated("H", steam_pressure, 0.0, fluid)


def condensate_rate(q_total, steam_pressure, fluid="Water"):
    r"""Condensate formed by a heat loss from saturated steam [kg/s]: :math:`Q / h_{fg}(p)`.

    Parameters
    ----------
    q_total : numeric
        Heat lost by the steam [W]; a net gain (< 0) condenses nothing (0 is returned).
    steam_pressure : numeric
        Absolute steam pressure [Pa], between the triple and critical points.
    fluid : str
        CoolProp fluid, default ``"Water"``.

    Examples
    --------
    >>> round(float(condensate_rate(10_000.0, 1.0e6)) * 3600.0, 2)   # kg/h
    17.87
    """
    q = as_array("q_total", q_total, unit="W")
    return np.maximum(q, 0.0) / latent_heat_of_vaporization(steam_pressure, fluid)


@dataclass(frozen=True)
class SteamLine:
    """A saturated steam line: its loss and the condensate it forms (arrays over the cases)."""

    saturation_temperature: np.ndarray   # [K]
    latent_heat: np.ndarray              # h_fg [J/kg]
    q_per_length: np.ndarray             # [W/m]
    q_total: np.ndarray                  # [W]
    condensate_per_length: np.ndarray    # [kg/s per m]
    condensate_rate: np.ndarray          # [kg/s]
    pipe: PipeResult
    cautions: tuple[str, ...]

    @property
    def warnings(self) -> np.ndarray:
        """Flags of the line's solve (convlib.regimes.Flag)."""
        return self.pipe.warnings

    def warning_messages(self) -> list[str]:
        return self.pipe.warning_messages()


def steam_line(pipe_outer_diameter, steam_pressure, layers=(), *, length=1.0, jacket_emissivity=0.9,
               solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None, inner_coefficient=None,
               natural=None, forced=None, mixing_exponent=None, convection_factor=None, convection_coefficient=None,
               exact_properties=False, surroundings: Surroundings | None = None, air_temperature=None,
               wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None,
               solar_irradiance=None, pressure=None) -> SteamLine:
    """Heat loss and condensate of a line of saturated steam at ``steam_pressure`` [Pa].

    The fluid is at the saturation temperature all along (a condensing vapour stays at it);
    the loss is :func:`convlib.pipe.insulated_pipe` at that temperature and the condensate
    :func:`condensate_rate` (kg/s).

    Parameters
    ----------
    pipe_outer_diameter, steam_pressure : numeric
        Pipe [m]; absolute steam pressure [Pa].
    layers : sequence of Layer
    length : numeric
        Line length [m].
    jacket_emissivity, solar_absorptivity, pipe_wall_thickness, pipe_conductivity, inner_coefficient, natural,
    forced, mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`.
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords.

    Examples
    --------
    100 m of 4 in steam main at 10 bar(a) with 80 mm mineral wool and an aluminium jacket, air at 0 degC:

    >>> from convlib.pipe import Layer
    >>> s = steam_line(0.1143, 1.0e6, [Layer(0.08, 0.045)], air_temperature=273.15, length=100.0,
    ...                jacket_emissivity=0.1)
    >>> round(float(s.saturation_temperature) - 273.15, 1), round(float(s.q_total)), round(float(s.condensate_rate) * 3600, 2)
    (179.9, 5346, 9.55)
    """
    run = as_bounded("length", length, unit="m", accepted=(0.0, SIZE_RANGE[1]))
    t_sat, h_fg = saturation_temperature(steam_pressure), latent_heat_of_vaporization(steam_pressure)
    r = insulated_pipe(pipe_outer_diameter, t_sat, layers, length=1.0, surroundings=resolve(surroundings,
                       air_temperature=air_temperature, wind_speed=wind_speed,
                       surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                       sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure),
                       **pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                                       pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
                                       inner_coefficient=inner_coefficient, natural=natural, forced=forced,
                                       mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                                       convection_coefficient=convection_coefficient,
                                       exact_properties=exact_properties))
    shape = np.broadcast_shapes(r.q_per_length.shape, run.shape, h_fg.shape)
    per_metre = np.maximum(r.q_per_length, 0.0) / h_fg
    full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    return SteamLine(saturation_temperature=full(t_sat), latent_heat=full(h_fg), q_per_length=full(r.q_per_length),
                     q_total=full(r.q_per_length * run), condensate_per_length=full(per_metre),
                     condensate_rate=full(per_metre * run), pipe=r, cautions=(CAUTION_STEAM,))
