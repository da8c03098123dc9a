"""Freeze time of stagnant water in a line: sensible cooling, then freezing solid (lumped, marched in temperature).

No substitute for draining or heat tracing; local codes govern.
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .marching import TIME_LIMIT, SolveFlags, frozen_coefficient, loss_function, march, pipe_keywords, positive
from .properties import fluid_properties
from .regimes import summarize_flags
from .surroundings import Surroundings, resolve
from .validation import as_array

__all__ = ["LATENT_HEAT_OF_FUSION", "WATER_FREEZING_TEMPERATURE", "CARBON_STEEL_DENSITY", "CARBON_STEEL_SPECIFIC_HEAT",
           "CAUTION_FREEZE", "FreezeTime", "freeze_time"]

#: Latent heat of fusion of ice at 0 degC and 1 atm [J/kg]: 333.42 kJ/kg, the enthalpy of liquid water
#: (IAPWS-95) less that of ice Ih (IAPWS R10-06(2009)) at 273.15 K and 101325 Pa, as the ``iapws``
#: package computes it (checked in the tests); handbooks round it to 333.5-333.6 kJ/kg.
LATENT_HEAT_OF_FUSION = 333.42e3

#: Freezing point of water at 1 atm [K] (0 degC; the ice point of the ITS-90 scale is 273.15 K).
WATER_FREEZING_TEMPERATURE = 273.15

#: Steel pipe wall: density [kg/m3] and specific heat [J/kg/K], the design values of DIN EN 12524:2000
#: (continued in EN ISO 10456) for steel, 7800 kg/m3 and 450 J/kg/K, as tabulated in the ``ht`` package's
#: building materials (checked in the tests). Plain carbon steel at 300 K has 434 J/kg/K (Incropera et al.,
#: 6th ed., Table A.1, from memory); a lower value shortens the freeze time slightly (the safe side).
CARBON_STEEL_DENSITY = 7800.0
CARBON_STEEL_SPECIFIC_HEAT = 450.0

CAUTION_FREEZE = ("Freeze time is an estimate; no substitute for draining or heat tracing; local codes govern. "
                  "It assumes still water cooling uniformly, no supercooling and no heat from supports or soil.")
@dataclass(frozen=True)
class FreezeTime:
    """Stagnant water in a line: times and the cooling curve (arrays over the cases).

    Cases whose line settles above the freezing point are flagged ``never_freezes``, and ``notes`` says so in
    words; their times are inf and their curves NaN (no time exists). Test the flag, not the inf: an inf or NaN
    summed into a total or written to a file says nothing. Every other case has finite times.
    """

    time_to_freezing_point: np.ndarray       # sensible cooling from the initial temperature [s]
    time_to_freeze_solid: np.ndarray         # further time, at the freezing point, until all water is ice [s]
    time_total: np.ndarray                   # [s]
    never_freezes: np.ndarray                # bool: q' at the freezing point <= 0
    water_mass_per_length: np.ndarray        # [kg/m]
    heat_capacity_per_length: np.ndarray     # water + pipe wall at the initial temperature [J/m/K]
    q_at_freezing_point: np.ndarray          # q' with the water at the freezing point [W/m]
    curve_time: np.ndarray                   # (n, *shape) [s]; last point: frozen solid
    curve_temperature: np.ndarray            # (n, *shape) [K]
    inlet_loss_coefficient: np.ndarray       # U' = q'(T_0) / (T_0 - T_a) [W/m/K]
    steps: int
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    warnings: np.ndarray = None              # union of the flags of every insulated_pipe solve, per case

    def warning_messages(self) -> list[str]:
        return [] if self.warnings is None else summarize_flags(self.warnings)

    # ---- names of 0.2.0 in hours: deprecated, removed in the next version (the results are SI now)
    def _hours(self, old: str, new: str) -> np.ndarray:
        warnings.warn(f"FreezeTime.{old} is deprecated: use {new} (seconds) / 3600", DeprecationWarning, stacklevel=3)
        return getattr(self, new) / 3600.0

    @property
    def hours_to_freezing_point(self) -> np.ndarray:
        return self._hours("hours_to_freezing_point", "time_to_freezing_point")

    @property
    def hours_to_freeze_solid(self) -> np.ndarray:
        return self._hours("hours_to_freeze_solid", "time_to_freeze_solid")

    @property
    def hours_total(self) -> np.ndarray:
        return self._hours("hours_total", "time_total")

    @property
    def curve_hours(self) -> np.ndarray:
        return self._hours("curve_hours", "curve_time")


#: Water properties are taken no lower than this [K]: CoolProp's IAPWS-95 liquid starts at the
#: triple point, 273.16 K; cp changes by < 1e-4 % over the 0.02 K below it.
_WATER_PROPERTY_FLOOR = 273.17
_WATER_PROPERTY_CEILING = 372.0   # liquid at 1 atm (boils at 373.12 K)


def freeze_time(pipe_outer_diameter, pipe_wall_thickness, initial_temperature, layers=(), *,
                pipe_density=CARBON_STEEL_DENSITY, pipe_specific_heat=CARBON_STEEL_SPECIFIC_HEAT,
                water_specific_heat=None, latent_heat=LATENT_HEAT_OF_FUSION,
                freezing_temperature=WATER_FREEZING_TEMPERATURE, constant_coefficient=False, tolerance=1e-7,
                max_step=0.1, time_limit=TIME_LIMIT, jacket_emissivity=0.9, solar_absorptivity=None,
                pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None, mixing_exponent=None,
                convection_factor=None, convection_coefficient=None, exact_properties=False,
                surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None,
                surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None,
                solar_irradiance=None, pressure=None) -> FreezeTime:
    r"""Time for stagnant water in an insulated line to reach the freezing point and to freeze solid.

    Sensible cooling of the water and the pipe wall, the outer coefficient re-evaluated:

    .. math:: (m_w c_w(T) + m_p c_p)\,\frac{dT}{dt} = -q'(T)
        \quad\Rightarrow\quad t_1 = \int_{T_f}^{T_0} \frac{m_w c_w(T) + m_p c_p}{q'(T)}\,dT

    (marched in temperature), then freezing at :math:`T_f` until all the water is ice,
    :math:`t_2 = m_w L_f / q'(T_f)`. For constant :math:`U'` and :math:`C'`:
    :math:`t_1 = C'/U' \ln\frac{T_0 - T_a}{T_f - T_a}`, :math:`t_2 = m_w L_f / (U'(T_f - T_a))`.
    Lumped: the water well mixed; the ice layer's resistance, supercooling and the insulation's heat
    capacity neglected. Water density (at :math:`T_0`) and :math:`c_w(T)` from CoolProp at 1 atm.

    Parameters
    ----------
    pipe_outer_diameter, pipe_wall_thickness : numeric
        Pipe and its wall [m] (the water's diameter, the wall's heat capacity).
    initial_temperature : numeric
        Water temperature when the flow stops [K], from the freezing point to 372 K.
    layers : sequence of Layer
    pipe_density, pipe_specific_heat : numeric
        Wall [kg/m3], [J/kg/K]; default carbon steel (common practice).
    water_specific_heat : numeric, optional
        Fixed [J/kg/K] instead of CoolProp's (hand-calculation checks).
    latent_heat, freezing_temperature : numeric
        [J/kg], [K]; default :data:`LATENT_HEAT_OF_FUSION`, 273.15 K.
    constant_coefficient : bool
        Freeze :math:`U' = q'(T_0)/(T_0 - T_a)` at the initial temperature.
    tolerance : float
        Local error per step relative to the case's time scale :math:`(T_0 - T_f) C'/q'(T_0)` [-].
    max_step : float
        Largest step as a fraction of the temperature fall (0-1].
    time_limit : float
        Wall-clock bound of the march [s], as in :func:`line_temperature_profile`.
    jacket_emissivity, solar_absorptivity, pipe_conductivity, inner_coefficient, natural, forced,
    mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe` (with ``pipe_conductivity`` the wall's resistance counts too).
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings, or its fields as keywords: the design minimum ambient.

    Examples
    --------
    A 2 in schedule 40 line (3.91 mm wall) at 10 degC, 25 mm of insulation, -15 degC and 5 m/s:

    >>> from convlib.pipe import Layer
    >>> f = freeze_time(0.0603, 0.00391, 283.15, [Layer(0.025, 0.04)], air_temperature=258.15, wind_speed=5.0)
    >>> round(float(f.time_to_freezing_point) / 3600, 2), round(float(f.time_to_freeze_solid) / 3600, 1)
    (4.08, 33.3)
    """
    d, wall, tf, t0 = _pipe_and_temperatures(pipe_outer_diameter, pipe_wall_thickness, freezing_temperature,
                                             initial_temperature)
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    ta = around.air_temperature
    rho_p = positive("pipe_density", pipe_density, "kg/m3")
    c_p = positive("pipe_specific_heat", pipe_specific_heat, "J/kg/K")
    lf = positive("latent_heat", latent_heat, "J/kg")
    tol = float(positive("tolerance", tolerance))
    step = float(as_array("max_step", max_step, low=0.0, high=1.0, low_inclusive=False))
    limit_s = float(as_array("time_limit", time_limit, unit="s", low=0.0))
    fixed_cw = None if water_specific_heat is None else positive("water_specific_heat", water_specific_heat,
                                                                  "J/kg/K")
    options = pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                             pipe_conductivity=pipe_conductivity, inner_coefficient=inner_coefficient, natural=natural,
                             forced=forced, mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                             convection_coefficient=convection_coefficient, exact_properties=exact_properties)
    if "pipe_conductivity" in options:
        options["pipe_wall_thickness"] = wall
    flags = SolveFlags()
    loss = loss_function(d, layers, around, options, flags)

    def water(temperature):
        return fluid_properties("Water", np.clip(temperature, _WATER_PROPERTY_FLOOR, _WATER_PROPERTY_CEILING))

    def cw(temperature):
        return water(temperature).cp if fixed_cw is None else np.broadcast_to(fixed_cw, np.shape(temperature))

    bore = d - 2.0 * wall
    m_w = water(t0).rho * np.pi * bore ** 2 / 4.0               # [kg/m]
    c_wall = rho_p * c_p * np.pi * (d ** 2 - bore ** 2) / 4.0   # [J/m/K]
    coefficient = frozen_coefficient(loss, t0, ta)
    loss_at = (lambda t: coefficient * (t - ta)) if constant_coefficient else loss  # noqa: E731
    q_start = loss_at(t0)
    shape = np.broadcast_shapes(q_start.shape, m_w.shape, c_wall.shape, tf.shape, lf.shape,
                                () if fixed_cw is None else fixed_cw.shape)
    t0, tf = np.broadcast_to(t0, shape), np.broadcast_to(tf, shape)
    q_freeze = np.broadcast_to(loss_at(tf), shape)
    never = q_freeze <= 0.0
    fall = np.where(never, 0.0, t0 - tf)

    def capacity(temperature):
        return m_w * cw(temperature) + c_wall

    def rhs(u, y):
        temperature = t0 - u * fall
        return (fall * capacity(temperature) / np.where(never, 1.0, loss_at(temperature)))[None]

    scale = np.where(never | (fall == 0), 1.0, np.abs(fall * capacity(t0) / np.where(never, 1.0, q_start)))
    grid, values, accepted, _, _ = march(rhs, np.zeros((1, *shape)), scale, tol, step, limit_s)
    sensible, solid = values[-1, 0], np.broadcast_to(m_w * lf, shape) / np.where(never, 1.0, q_freeze)
    curve_t = np.concatenate([t0[None] - grid.reshape((-1,) + (1,) * len(shape)) * fall[None], tf[None]])
    curve_s = np.concatenate([values[:, 0], (sensible + solid)[None]])
    notes = [f"{int(never.sum())} case(s) settle above the freezing point: no freezing under these conditions"
             ] if never.any() else []
    seconds = lambda t: np.where(never, np.inf, t)  # noqa: E731
    return FreezeTime(
        time_to_freezing_point=seconds(sensible), time_to_freeze_solid=seconds(solid),
                                       time_total=seconds(sensible + solid),
        never_freezes=never.copy(), water_mass_per_length=np.broadcast_to(m_w, shape).copy(),
        heat_capacity_per_length=np.broadcast_to(capacity(t0), shape).copy(), q_at_freezing_point=q_freeze.copy(),
        curve_time=np.where(never[None], np.nan, curve_s), curve_temperature=np.where(never[None], np.nan, curve_t),
        inlet_loss_coefficient=np.broadcast_to(coefficient, shape).copy(), steps=accepted, notes=tuple(notes),
        cautions=(CAUTION_FREEZE,), warnings=flags.union(shape))


def _pipe_and_temperatures(pipe_outer_diameter, pipe_wall_thickness, freezing_temperature, initial_temperature):
    """The checked pipe (outer diameter, wall [m]) and temperatures (freezing point, initial [K])."""
    d = positive("pipe_outer_diameter", pipe_outer_diameter, "m")
    wall = positive("pipe_wall_thickness", pipe_wall_thickness, "m")
    if np.any(2.0 * wall >= d):
        raise InputError(f"pipe_wall_thickness must be less than half the pipe_outer_diameter; got "
                         f"{np.max(wall):g} m for a {np.min(d):g} m pipe", field="pipe_wall_thickness",
                         rule="less than half the pipe_outer_diameter", value=float(np.max(wall)))
    tf = positive("freezing_temperature", freezing_temperature, "K")
    t0 = as_array("initial_temperature", initial_temperature, unit="K", low=0.0, low_inclusive=False,
                  high=_WATER_PROPERTY_CEILING)
    if np.any(t0 < tf):
        raise InputError(f"initial_temperature must be at least the freezing_temperature "
                         f"({float(np.max(tf)):g} K); got {float(np.min(t0)):g} K", field="initial_temperature",
                         rule="at least the freezing_temperature", value=float(np.min(t0)))
    return d, wall, tf, t0
