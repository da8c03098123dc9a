r"""Lines that start and stop: cool-down of a stopped line, warm-up condensate of a steam line.

**Cool-down.** When the flow stops, the fluid and the pipe wall (lumped, well mixed) lose heat through the
layers at the rate :math:`q'(T)` of :func:`convlib.pipe.insulated_pipe` with the fluid at :math:`T`, the
outer coefficient re-evaluated at every temperature:

.. math:: C'(T)\,\frac{dT}{dt} = -q'(T), \qquad
    t = \int_{T_1}^{T_0} \frac{C'(T)}{q'(T)}\,dT
      = \int_{\ln|T_1 - T_a|}^{\ln|T_0 - T_a|} \frac{C'(T)\,(T - T_a)}{q'(T)}\,ds,
    \quad s = \ln|T - T_a|

with :math:`C' = m'_f c_f(T) + m'_p c_p` (fluid mass at the initial temperature, the wall's heat capacity). The
second form is smooth (for a constant coefficient :math:`U'` its integrand is the constant :math:`C'/U'`, the
lumped-capacitance result :math:`t = (C'/U') \ln\frac{T_0 - T_a}{T_1 - T_a}`, Incropera et al., *Fundamentals of
Heat and Mass Transfer*, 6th ed., eq. 5.6) and is integrated by Gauss-Legendre quadrature on all points at once.
A cold line that stops warms up by the same equations. The insulation's own heat capacity is neglected (it
shortens the time a little for a hot line), as are supports and contact with other lines.

**Warm-up condensate.** Bringing a cold steam line to the saturation temperature condenses
:math:`m = M_p c_p (T_{sat} - T_0) / h_{fg}` of steam in the pipe wall (:math:`M_p` the wall's mass), on top of
the line's running loss, which during warm-up is commonly taken at half its value at the saturation temperature
(common practice, no source). Condensate drains and traps are sized on the mean rate over the warm-up time.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .operation import (CARBON_STEEL_DENSITY, CARBON_STEEL_SPECIFIC_HEAT, latent_heat_of_vaporization,
                        saturation_temperature)
from .pipe import insulated_pipe
from .properties import fluid_properties
from .regimes import summarize_flags
from .surroundings import Surroundings, resolve
from .validation import as_array

__all__ = ["CoolDown", "WarmUp", "cool_down_time", "warm_up_condensate", "CAUTION_COOL_DOWN", "CAUTION_WARM_UP",
           "RUNNING_LOSS_SHARE_DURING_WARM_UP"]

#: Gauss-Legendre nodes of the cool-down integral (in ln|T - T_air|; exact for a constant coefficient).
NODES = 48

#: Share of the running loss counted during warm-up (common practice, no source).
RUNNING_LOSS_SHARE_DURING_WARM_UP = 0.5

CAUTION_COOL_DOWN = ("Cool-down time is an estimate (fluid well mixed, no heat from supports, soil or other lines); "
                     "a stopped hot line stays hot to the touch for hours, and a stopped water line outdoors can "
                     "freeze: drain or trace as local codes and licensed practice require.")
CAUTION_WARM_UP = ("Warm-up condensate is an estimate: size drains and traps with the manufacturer's data; warm steam "
                   "lines slowly and drain them first (water hammer); local codes and licensed practice govern.")


@dataclass(frozen=True)
class CoolDown:
    """A stopped line cooling (or a stopped cold line warming) from ``initial_temperature`` to
    ``final_temperature``; every field an array over the cases, SI.

    A case whose line settles before reaching the final temperature (the final temperature beyond the
    equilibrium with the surroundings) is flagged ``never_reaches``; its time is inf. Test the flag.
    """

    time: np.ndarray                      # [s]
    never_reaches: np.ndarray             # bool
    heat_capacity_per_length: np.ndarray  # fluid + wall at the initial temperature [J/m/K]
    q_initial: np.ndarray                 # q' at the initial temperature [W/m]
    q_final: np.ndarray                   # q' at the final temperature [W/m]
    warnings: np.ndarray                  # union of the flags of every solve, convlib.regimes.Flag
    notes: tuple[str, ...]
    cautions: tuple[str, ...]

    def warning_messages(self) -> list[str]:
        return summarize_flags(self.warnings)


@dataclass(frozen=True)
class WarmUp:
    """Condensate of a steam line brought from ``start_temperature`` to saturation; arrays, SI."""

    saturation_temperature: np.ndarray    # [K]
    latent_heat: np.ndarray               # h_fg [J/kg]
    wall_mass: np.ndarray                 # pipe wall [kg]
    warm_up_condensate: np.ndarray        # condensed heating the wall [kg]
    running_loss: np.ndarray              # q' at saturation times length [W]
    running_condensate_rate: np.ndarray   # running loss / h_fg [kg/s]
    mean_condensate_rate: np.ndarray      # over the warm-up time: wall + share of running [kg/s]
    warnings: np.ndarray
    cautions: tuple[str, ...]

    def warning_messages(self) -> list[str]:
        return summarize_flags(self.warnings)


def _wall(pipe_outer_diameter, pipe_wall_thickness):
    d = as_array("pipe_outer_diameter", pipe_outer_diameter, unit="m", low=0.0, low_inclusive=False)
    wall = as_array("pipe_wall_thickness", pipe_wall_thickness, unit="m", low=0.0, low_inclusive=False)
    if np.any(2.0 * wall >= d):
        raise InputError(f"pipe_wall_thickness must be less than half the pipe_outer_diameter; got {np.max(wall):g} m "
                         f"for a {np.min(d):g} m pipe", field="pipe_wall_thickness",
                         rule="less than half the pipe_outer_diameter", value=float(np.max(wall)))
    return d, wall


def cool_down_time(pipe_outer_diameter, pipe_wall_thickness, initial_temperature, final_temperature, layers=(), *,
                   fluid="Water", fluid_pressure=101325.0, specific_heat=None,
                   pipe_density=CARBON_STEEL_DENSITY, pipe_specific_heat=CARBON_STEEL_SPECIFIC_HEAT,
                   jacket_emissivity=0.9, inner_coefficient=None, convection_coefficient=None,
                   surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None,
                   surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None,
                   solar_irradiance=None, pressure=None) -> CoolDown:
    r"""Time for a stopped line to cool from ``initial_temperature`` to ``final_temperature``.

    Parameters
    ----------
    pipe_outer_diameter, pipe_wall_thickness : numeric
        The pipe [m] (the fluid's bore, the wall's heat capacity).
    initial_temperature, final_temperature : numeric
        Fluid temperature when the flow stops and the one whose time is asked [K]; for a cold line the final
        temperature is above the initial one.
    layers : sequence of Layer
        From the pipe outwards.
    fluid, fluid_pressure : str, numeric
        CoolProp fluid filling the line (liquid at ``fluid_pressure`` [Pa] over the whole range).
    specific_heat : numeric, optional
        Fixed specific heat of the fluid [J/kg/K] instead of CoolProp's (hand-calculation checks).
    pipe_density, pipe_specific_heat : numeric
        Wall [kg/m3], [J/kg/K]; default steel after EN 12524 (see :mod:`convlib.operation`).
    jacket_emissivity, inner_coefficient, convection_coefficient
        As in :func:`convlib.pipe.insulated_pipe`.
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords.

    Returns
    -------
    CoolDown

    Examples
    --------
    A 4 in schedule 40 hot-water line (6.02 mm wall) at 90 degC, 50 mm of insulation (k 0.04), stopped in
    still air at 10 degC: hours to 40 degC.

    >>> from convlib.pipe import Layer
    >>> r = cool_down_time(0.1143, 0.00602, 363.15, 313.15, [Layer(0.05, 0.04)], air_temperature=283.15)
    >>> round(float(r.time) / 3600, 1)
    29.7
    """
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    d, wall = _wall(pipe_outer_diameter, pipe_wall_thickness)
    kelvin = dict(unit="K", low=0.0, low_inclusive=False)
    t0 = as_array("initial_temperature", initial_temperature, **kelvin)
    t1 = as_array("final_temperature", final_temperature, **kelvin)
    rho_p = as_array("pipe_density", pipe_density, unit="kg/m3", low=0.0, low_inclusive=False)
    c_p = as_array("pipe_specific_heat", pipe_specific_heat, unit="J/kg/K", low=0.0, low_inclusive=False)
    ta = around.air_temperature
    if np.any((t0 - ta) * (t1 - ta) <= 0) or np.any(t0 == t1):
        raise InputError("initial_temperature and final_temperature must differ and lie on the same side of the air "
                         "temperature (a line cools towards the air, never past it)",
                         field="initial_temperature, final_temperature", rule="both above or both below the air",
                         value=(float(np.min(t0)), float(np.min(t1))))
    if np.any(np.abs(t1 - ta) > np.abs(t0 - ta)):
        raise InputError("final_temperature must lie between the initial and the air temperature",
                         field="final_temperature", rule="between initial_temperature and air_temperature",
                         value=float(np.max(t1)))
    p_fluid = as_array("fluid_pressure", fluid_pressure, unit="Pa", low=0.0, low_inclusive=False)
    fixed_c = None if specific_heat is None else as_array("specific_heat", specific_heat, unit="J/kg/K", low=0.0,
                                                          low_inclusive=False)

    def properties(temperature):
        return fluid_properties(fluid, temperature, pressure=p_fluid)

    bore = d - 2.0 * wall
    m_f = properties(t0).rho * np.pi * bore ** 2 / 4.0
    c_wall = rho_p * c_p * np.pi * (d ** 2 - bore ** 2) / 4.0

    nodes, weights = np.polynomial.legendre.leggauss(NODES)
    s0, s1 = np.log(np.abs(t0 - ta)), np.log(np.abs(t1 - ta))
    common = dict(jacket_emissivity=jacket_emissivity, inner_coefficient=inner_coefficient,
                  convection_coefficient=convection_coefficient, surroundings=around, tolerance=1e-8)
    start, end = insulated_pipe(d, t0, layers, **common), insulated_pipe(d, t1, layers, **common)
    shape = np.broadcast_shapes(s0.shape, s1.shape, around.shape, d.shape, wall.shape, m_f.shape, c_wall.shape,
                                start.q_per_length.shape, end.q_per_length.shape,
                                () if fixed_c is None else fixed_c.shape)
    s0, s1 = np.broadcast_to(s0, shape), np.broadcast_to(s1, shape)
    expand = (slice(None),) + (None,) * len(shape)
    s = 0.5 * (s0 + s1) + 0.5 * (s0 - s1) * nodes[expand]
    side = np.sign(t0 - ta)
    temperature = ta + side * np.exp(s)
    at_nodes = insulated_pipe(d, temperature, layers, **common)
    cp_f = (properties(temperature).cp if fixed_c is None else fixed_c)
    capacity = m_f * cp_f + c_wall
    q = at_nodes.q_per_length
    moving = side * q > 0  # heat flows away from the fluid towards the air
    never = ~np.all(moving, axis=0) | ~(np.broadcast_to(side, shape) * end.q_per_length > 0)
    integrand = capacity * (temperature - ta) / np.where(moving, q, 1.0)
    seconds = 0.5 * (s0 - s1) * np.tensordot(weights, integrand, axes=(0, 0))
    flags = np.bitwise_or.reduce(at_nodes.warnings, axis=0) | start.warnings | end.warnings
    never = np.broadcast_to(never, shape)
    notes = ((f"{int(never.sum())} case(s) settle before the final temperature (the surroundings hold the line "
              f"there): no time exists",) if never.any() else ())
    return CoolDown(time=np.where(never, np.inf, np.broadcast_to(seconds, shape)), never_reaches=never.copy(),
                    heat_capacity_per_length=np.broadcast_to(m_f * (properties(t0).cp if fixed_c is None else fixed_c)
                                                             + c_wall, shape).copy(),
                    q_initial=np.broadcast_to(start.q_per_length, shape).copy(),
                    q_final=np.broadcast_to(end.q_per_length, shape).copy(),
                    warnings=np.broadcast_to(flags, shape).copy(), notes=notes, cautions=(CAUTION_COOL_DOWN,))


def warm_up_condensate(pipe_outer_diameter, pipe_wall_thickness, steam_pressure, start_temperature, warm_up_time,
                       layers=(), *, length=1.0, pipe_density=CARBON_STEEL_DENSITY,
                       pipe_specific_heat=CARBON_STEEL_SPECIFIC_HEAT, jacket_emissivity=0.9,
                       convection_coefficient=None, surroundings: Surroundings | None = None, air_temperature=None,
                       wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None,
                       solar_irradiance=None, pressure=None) -> WarmUp:
    r"""Condensate formed warming a steam line from ``start_temperature`` to saturation in ``warm_up_time``.

    Parameters
    ----------
    pipe_outer_diameter, pipe_wall_thickness : numeric
        The pipe [m].
    steam_pressure : numeric
        Absolute steam pressure [Pa].
    start_temperature : numeric
        Temperature of the cold line before steam is admitted [K] (usually the air's).
    warm_up_time : numeric
        Time allowed to bring it up to temperature [s].
    layers, length, pipe_density, pipe_specific_heat, jacket_emissivity, convection_coefficient
        As in :func:`cool_down_time` and :func:`convlib.pipe.insulated_pipe`; ``length`` [m].
    surroundings, air_temperature, ...
        The surroundings, as in :func:`cool_down_time`.

    Examples
    --------
    100 m of 6 in schedule 40 (168.3 mm, 7.11 mm wall) from 10 degC to 10 bar abs steam in 30 minutes:

    >>> from convlib.pipe import Layer
    >>> w = warm_up_condensate(0.1683, 0.00711, 10e5, 283.15, 1800.0, [Layer(0.08, 0.045)], length=100.0,
    ...                        air_temperature=283.15)
    >>> round(float(w.warm_up_condensate)), round(float(w.mean_condensate_rate) * 3600)
    (107, 219)
    """
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    d, wall = _wall(pipe_outer_diameter, pipe_wall_thickness)
    p = as_array("steam_pressure", steam_pressure, unit="Pa", low=0.0, low_inclusive=False)
    start = as_array("start_temperature", start_temperature, unit="K", low=0.0, low_inclusive=False)
    duration = as_array("warm_up_time", warm_up_time, unit="s", low=0.0, low_inclusive=False)
    run = as_array("length", length, unit="m", low=0.0, low_inclusive=False)
    rho_p = as_array("pipe_density", pipe_density, unit="kg/m3", low=0.0, low_inclusive=False)
    c_p = as_array("pipe_specific_heat", pipe_specific_heat, unit="J/kg/K", low=0.0, low_inclusive=False)
    t_sat = saturation_temperature(p)
    if np.any(start >= t_sat):
        raise InputError(f"start_temperature must be below the saturation temperature of the steam "
                         f"({float(np.min(t_sat)):.2f} K); got {float(np.max(start)):g} K", field="start_temperature",
                         rule="below the saturation temperature", value=float(np.max(start)))
    h_fg = latent_heat_of_vaporization(p)
    mass = rho_p * np.pi * (d ** 2 - (d - 2.0 * wall) ** 2) / 4.0 * run
    heating = mass * c_p * (t_sat - start) / h_fg
    running = insulated_pipe(d, t_sat, layers, jacket_emissivity=jacket_emissivity,
                             convection_coefficient=convection_coefficient, surroundings=around)
    loss = np.maximum(running.q_per_length, 0.0) * run
    rate = loss / h_fg
    mean = heating / duration + RUNNING_LOSS_SHARE_DURING_WARM_UP * rate
    shape = np.broadcast_shapes(np.shape(mean), np.shape(heating), np.shape(t_sat))
    b = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    return WarmUp(saturation_temperature=b(t_sat), latent_heat=b(h_fg), wall_mass=b(mass),
                  warm_up_condensate=b(heating), running_loss=b(loss), running_condensate_rate=b(rate),
                  mean_condensate_rate=b(mean), warnings=b(running.warnings), cautions=(CAUTION_WARM_UP,))
