"""Insulation design: thickness for a limit, critical thickness, fittings (annual energy: :mod:`convlib.annual`).

Each sizing function solves for the thickness of one insulation layer (with
optional fixed layers such as a jacket outside it) at which the limit is just
met, for whole arrays of cases at once (bracketed root finding on the
thickness, each evaluation a vectorized :func:`convlib.pipe.insulated_pipe`),
then picks the next thickness from a list of commercial thicknesses.

The results carry cautions: these are estimates for design studies; burn
protection, condensation control and the insulation specification are
governed by the applicable standards, local codes and licensed practice.
"""
from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .conductivity import Conductivity
from .pipe import Layer, insulated_pipe
from .properties import dew_point
from .roots import find_root
from .regimes import summarize_flags
from .surroundings import Surroundings, resolve
from .annual import (DEFAULT_COOLING_COP, DEFAULT_HEATING_EFFICIENCY, AnnualEnergy, WeatherBins,
                     annual_energy)
from .validation import as_array

__all__ = [
    "COMMERCIAL_THICKNESSES", "TOUCH_LIMIT_METAL_JACKET", "TOUCH_LIMIT_NONMETAL_JACKET", "CONDENSATION_MARGIN",
    "CAUTION_TOUCH", "CAUTION_TOUCH_GIVEN", "CAUTION_CONDENSATION", "FITTING_EQUIVALENT_LENGTH",
    "ThicknessResult", "listed_thickness", "thickness_for_surface_temperature", "thickness_for_heat_loss",
    "thickness_against_condensation", "critical_thickness", "WeatherBins", "AnnualEnergy", "annual_energy",
    "equivalent_length", "DEFAULT_HEATING_EFFICIENCY", "DEFAULT_COOLING_COP",
]

#: Commercial insulation thicknesses [m]: the usual metric steps of pipe-section and
#: mattress products. Common practice, no source; override with the supplier's list.
COMMERCIAL_THICKNESSES = (0.020, 0.025, 0.030, 0.040, 0.050, 0.060, 0.070, 0.080, 0.090, 0.100, 0.120, 0.140,
                          0.160, 0.180, 0.200)

#: Touch-temperature limits [K] for a contact of a few seconds. Common practice, no
#: source: 60 degC for bare metal jackets; non-metallic finishes tolerate more. The
#: governing limits depend on material and contact time (ISO 13732-1, ASTM C1055).
TOUCH_LIMIT_METAL_JACKET = 333.15
TOUCH_LIMIT_NONMETAL_JACKET = 343.15

#: Margin of the surface temperature above the dew point [K]. Common practice, no source.
CONDENSATION_MARGIN = 1.0

CAUTION_TOUCH = ("Personnel protection: the touch limit used here is a design default; ISO 13732-1 and ASTM C1055 "
                 "set limits by jacket material and contact time, and local codes and licensed practice govern. "
                 "Check the hottest ambient, still air and full sun.")
#: The same caution where the user gave the limit (it is theirs, not a default).
CAUTION_TOUCH_GIVEN = ("Personnel protection: the touch limit is the one given; check it against ISO 13732-1 and "
                       "ASTM C1055 (limits by jacket material and contact time); local codes and licensed practice "
                       "govern. Check the hottest ambient, still air and full sun.")
CAUTION_CONDENSATION = ("Condensation control: keeping the jacket above the dew point is not enough on its own: a "
                        "cold line also needs a continuous vapour retarder, sealed at every joint and support, or "
                        "moisture migrates into the insulation. Local codes and licensed practice govern.")


@dataclass(frozen=True)
class ThicknessResult:
    """Result of a sizing; arrays broadcast over the inputs.

    ``required_thickness`` is NaN exactly where ``achievable`` is False (no thickness up
    to ``max_thickness`` meets the limit), ``commercial_thickness`` and ``value_at_commercial``
    exactly where ``listed`` is False (not reachable, or beyond the largest listed thickness);
    ``messages`` says so in words. Test the flags, not the NaN: a NaN summed into a total or
    written to a file says nothing.
    """

    required_thickness: np.ndarray     # exact thickness that just meets the limit [m]
    commercial_thickness: np.ndarray   # next thickness from the list [m]; NaN if none is enough
    achievable: np.ndarray             # bool: some thickness <= max_thickness meets the limit
    listed: np.ndarray                 # bool: a listed (commercial) thickness meets the limit
    value_at_commercial: np.ndarray    # the limited quantity at the commercial thickness (K or W/m)
    limit: np.ndarray
    quantity: str                      # "surface temperature [K]" or "heat loss [W/m]"
    messages: tuple[str, ...]
    cautions: tuple[str, ...]
    # the assumptions the sizing used (echoed so that a reader sees them) and the state at the listed thickness
    air_temperature: np.ndarray = None           # air of the sizing (touch: the hottest design ambient) [K]
    wind_speed: np.ndarray = None                # [m/s] (touch and condensation: 0, still air, unless told)
    jacket_emissivity: np.ndarray = None         # [-]
    margin: np.ndarray = None                    # condensation margin above the dew point [K]; NaN for other limits
    dew_point: np.ndarray = None                 # of the design air [K]; NaN where no humidity was given
    surface_temperature_at_commercial: np.ndarray = None  # jacket at the listed thickness [K]; NaN if none
    q_per_length_at_commercial: np.ndarray = None         # heat flow at the listed thickness [W/m]; NaN if none
    limit_given: bool = True                     # False where the limit is the library's default
    warnings: np.ndarray = None                  # union of the flags of every solve made per point (Flag mask)

    def warning_messages(self) -> list[str]:
        """Readable warnings of the solves the sizing made, with counts."""
        return [] if self.warnings is None else summarize_flags(self.warnings)


#: Keywords of :func:`convlib.pipe.insulated_pipe` a sizing passes on by name; numeric ones travel per point.
PIPE_NUMERIC = ("jacket_emissivity", "solar_absorptivity", "pipe_wall_thickness", "pipe_conductivity",
                "inner_coefficient", "mixing_exponent", "convection_factor", "convection_coefficient")
PIPE_CHOICES = ("natural", "forced", "exact_properties")
#: Fields of the surroundings that reach the outer surface.
_AROUND = ("air_temperature", "wind_speed", "surroundings_temperature", "sky_view_fraction", "sky_temperature",
           "solar_irradiance", "pressure")

@dataclass(frozen=True)
class _Cases:
    """The per-point inputs of a sizing by name: flat arrays of one length (``None``: not given), the choices,
    and the outer layers (their numeric thickness and constant conductivity per point)."""

    shape: tuple
    arrays: dict
    choices: dict
    outer: tuple  # (name, Conductivity or None) per outer layer; per-point values in arrays

    @property
    def size(self) -> int:
        return int(np.prod(self.shape, dtype=int))

    def subset(self, mask) -> "_Cases":
        return dataclasses.replace(self, arrays={k: (None if v is None else v[mask]) for k, v in self.arrays.items()})

    def __getitem__(self, name):
        return self.arrays[name]


def _cases(pipe_outer_diameter, fluid_temperature, around: Surroundings, insulation_conductivity, outer_layers,
           pipe_keywords: dict, **extra) -> _Cases:
    """Validate, broadcast and flatten every numeric input of a sizing."""
    values = {"pipe_outer_diameter": as_array("pipe_outer_diameter", pipe_outer_diameter, unit="m", low=0.0,
                                              low_inclusive=False),
              "fluid_temperature": as_array("fluid_temperature", fluid_temperature, unit="K", low=0.0,
                                            low_inclusive=False)}
    values.update({name: getattr(around, name) for name in _AROUND})
    for name in PIPE_NUMERIC:
        given = pipe_keywords.get(name)
        values[name] = None if given is None else np.asarray(given, dtype=float)
    k = Conductivity.of(insulation_conductivity)
    values["insulation_conductivity"] = k.constant_value if k.is_constant else None
    outer = []
    for j, layer in enumerate(outer_layers):
        if not isinstance(layer, Layer):
            raise InputError(f"outer_layers must be Layer objects; got {layer!r}", field="outer_layers",
                             rule="Layer objects", value=layer)
        values[f"outer {j} thickness"] = layer.thickness
        values[f"outer {j} conductivity"] = layer.conductivity.constant_value if layer.conductivity.is_constant \
            else None
        outer.append((layer.name, None if layer.conductivity.is_constant else layer.conductivity))
    values.update({name: np.asarray(v, dtype=float) for name, v in extra.items()})
    shape = np.broadcast_shapes(*(np.shape(v) for v in values.values() if v is not None))
    arrays = {name: None if v is None else np.broadcast_to(v, shape).ravel() for name, v in values.items()}
    choices = {name: pipe_keywords.get(name) for name in PIPE_CHOICES}
    choices["exact_properties"] = bool(choices["exact_properties"])
    return _Cases(shape=shape, arrays=arrays, choices=choices, outer=tuple(outer))


def _evaluate(thickness, cases: _Cases, insulation_conductivity, tolerance=1e-6):
    """insulated_pipe with the sized layer at ``thickness`` for the per-point inputs ``cases`` (surface
    temperature to ``tolerance`` kelvin)."""
    a = cases.arrays
    k = a["insulation_conductivity"] if a["insulation_conductivity"] is not None else insulation_conductivity
    layers = [Layer(thickness, k, name="insulation")]
    for j, (name, conductivity) in enumerate(cases.outer):
        layers.append(Layer(a[f"outer {j} thickness"], conductivity if conductivity is not None
                            else a[f"outer {j} conductivity"], name=name))
    keywords = {name: a[name] for name in (*_AROUND, *PIPE_NUMERIC) if a[name] is not None}
    return insulated_pipe(a["pipe_outer_diameter"], a["fluid_temperature"], layers, **keywords, **cases.choices,
                          tolerance=tolerance)


def _around(surroundings, **keywords) -> Surroundings:
    return resolve(surroundings, **keywords)


def listed_thickness(required, commercial_thicknesses=COMMERCIAL_THICKNESSES):
    """The listed thickness at or above each ``required`` one [m]; 0 stays 0, NaN where none is large enough
    (or ``required`` is NaN).

    >>> listed_thickness([0.0, 0.0301, 0.05, 0.25]).tolist()
    [0.0, 0.04, 0.05, nan]
    """
    steps = np.sort(as_array("commercial_thicknesses", commercial_thicknesses, unit="m", low=0.0,
                             low_inclusive=False).ravel())
    required = np.asarray(required, dtype=float)
    index = np.searchsorted(steps, np.where(np.isnan(required), np.inf, required) - 1e-9)
    return np.where(required == 0, 0.0, np.where(index < steps.size, steps[np.minimum(index, steps.size - 1)],
                                                 np.nan))


class _Flags:
    """Union of the warning flags of every solve a sizing makes, per point."""

    def __init__(self, size: int):
        self.mask = np.zeros(size, dtype=np.int16)

    def evaluate(self, thickness, cases: _Cases, index, insulation_conductivity):
        result = _evaluate(thickness, cases, insulation_conductivity)
        np.bitwise_or.at(self.mask, index, np.ravel(result.warnings).astype(np.int16))
        return result


def _size(metric, sign, quantity, limit_name, cases: _Cases, insulation_conductivity, max_thickness,
          commercial_thicknesses, cautions, low_thickness=None, margin=np.nan, dew=np.nan, limit_given=True,
          notes=()):
    """Thickness where sign * (metric - limit) turns <= 0, per point."""
    shape, limit = cases.shape, cases["limit"]
    t_max = float(as_array("max_thickness", max_thickness, unit="m", low=0.0, low_inclusive=False))
    largest = float(np.max(as_array("commercial_thicknesses", commercial_thicknesses, unit="m", low=0.0,
                                    low_inclusive=False)))  # checked before the search
    flags = _Flags(limit.size)
    every = np.arange(limit.size)

    def excess(t, index):
        part = cases.subset(index)
        return sign * (metric(flags.evaluate(t, part, index, insulation_conductivity)) - part["limit"])

    t_low = np.zeros_like(limit) if low_thickness is None else np.asarray(low_thickness, float).ravel()
    at_low = excess(t_low, every)
    at_max = excess(np.full_like(limit, t_max), every)
    met_low = at_low <= 0
    achievable = met_low | (at_max <= 0)  # met at the start of the search already (e.g. a line colder than the limit)
    required = np.where(met_low, t_low, np.nan)
    if low_thickness is not None:
        # the search starts above zero (critical thickness): a bare line that meets the limit needs nothing
        bare_ok = excess(np.zeros_like(limit), every) <= 0
        required = np.where(bare_ok, 0.0, required)
        met_low, achievable = met_low | bare_ok, achievable | bare_ok
    todo = achievable & ~met_low
    unsolved = 0
    if todo.any():
        res = find_root(excess, t_low[todo], np.full(int(todo.sum()), t_max), args=(every[todo],), xatol=1e-6,
                        xrtol=0.0)
        required[todo] = np.where(res.success, res.x, np.nan)  # a failed search is never reported as a thickness
        unsolved = int(np.count_nonzero(~res.success))
    commercial = listed_thickness(required, commercial_thicknesses)
    at_commercial = np.full_like(limit, np.nan)
    surface_at, q_at = np.full_like(limit, np.nan), np.full_like(limit, np.nan)
    has = ~np.isnan(commercial)
    if has.any():
        listed = flags.evaluate(commercial[has], cases.subset(has), every[has], insulation_conductivity)
        at_commercial[has] = metric(listed)
        surface_at[has] = np.ravel(listed.surface_temperature)
        q_at[has] = np.ravel(listed.q_per_length)
    messages = list(notes)
    if (~achievable).any():
        messages.append(f"{int((~achievable).sum())} of {achievable.size} case(s): no thickness up to "
                        f"{t_max * 1000:g} mm keeps the {quantity} within the {limit_name}")
    if unsolved:
        messages.append(f"{unsolved} case(s): the thickness search did not converge; no thickness is given there")
    beyond = achievable & ~has & ~np.isnan(required)
    if beyond.any():
        messages.append(f"{int(beyond.sum())} case(s) need more than the largest listed thickness "
                        f"({largest * 1000:g} mm)")
    emissivity = cases["jacket_emissivity"] if cases["jacket_emissivity"] is not None else np.full(limit.size, 0.9)
    return ThicknessResult(
        required_thickness=required.reshape(shape), commercial_thickness=commercial.reshape(shape),
        achievable=achievable.reshape(shape), listed=has.reshape(shape),
        value_at_commercial=at_commercial.reshape(shape),
        limit=limit.reshape(shape), quantity=quantity, messages=tuple(messages), cautions=tuple(cautions),
        air_temperature=cases["air_temperature"].reshape(shape), wind_speed=cases["wind_speed"].reshape(shape),
        jacket_emissivity=emissivity.reshape(shape),
        margin=np.broadcast_to(np.asarray(margin, float), shape).copy(),
        dew_point=np.broadcast_to(np.asarray(dew, float), shape).copy(),
        surface_temperature_at_commercial=surface_at.reshape(shape), q_per_length_at_commercial=q_at.reshape(shape),
        limit_given=limit_given, warnings=flags.mask.reshape(shape))


def thickness_for_surface_temperature(pipe_outer_diameter, fluid_temperature, *, insulation_conductivity,
                                      surface_limit=None, hottest_air_temperature=None, outer_layers=(),
                                      jacket_emissivity=0.1, solar_absorptivity=None, pipe_wall_thickness=None,
                                      pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None,
                                      mixing_exponent=None, convection_factor=None, convection_coefficient=None,
                                      exact_properties=False, max_thickness=0.3,
                                      commercial_thicknesses=COMMERCIAL_THICKNESSES,
                                      surroundings: Surroundings | None = None, air_temperature=None,
                                      wind_speed=None, surroundings_temperature=None, sky_view_fraction=None,
                                      sky_temperature=None, solar_irradiance=None,
                                      pressure=None) -> ThicknessResult:
    """Insulation thickness that keeps a hot line's jacket at or below a touch limit.

    Give the worst case: the highest ambient (``hottest_air_temperature``), still air (the
    default ``wind_speed=0``: any wind cools the jacket and gives a thinner, unsafe layer)
    and, outdoors, full sun (``solar_irradiance`` with the jacket's ``solar_absorptivity``).
    The result echoes the air, wind, emissivity and limit it used, and the jacket
    temperature and heat flow at the listed thickness.

    Parameters
    ----------
    pipe_outer_diameter : numeric
        [m]
    fluid_temperature : numeric
        [K]
    insulation_conductivity : numeric or Conductivity
        [W/m/K]
    surface_limit : numeric, optional
        Highest allowed jacket temperature [K]; default :data:`TOUCH_LIMIT_METAL_JACKET` (the caution then
        says it is a default).
    hottest_air_temperature : numeric, optional
        Design hottest ambient [K] the sizing runs at; default the surroundings' air temperature.
    outer_layers : sequence of Layer
        Fixed layers outside the sized insulation (a jacket).
    jacket_emissivity : numeric
        Of the outermost surface [-].
    max_thickness, commercial_thicknesses
        Largest thickness searched [m]; the catalogue the result is rounded up to [m].
    pipe_wall_thickness, pipe_conductivity, inner_coefficient, solar_absorptivity, natural, forced,
    mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`; every numeric one may be an array.
    surroundings : Surroundings, optional
        The surroundings; or give their fields as keywords (``air_temperature``, ``wind_speed``,
        ``surroundings_temperature``, ``sky_view_fraction``, ``sky_temperature``, ``solar_irradiance``,
        ``pressure``), not both.

    Returns
    -------
    ThicknessResult

    Examples
    --------
    >>> r = thickness_for_surface_temperature(0.1143, 523.15, air_temperature=313.15, insulation_conductivity=0.05)
    >>> round(float(r.required_thickness) * 1000, 1), float(r.commercial_thickness)
    (69.7, 0.07)
    """
    around = _around(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    given = surface_limit is not None
    limit = as_array("surface_limit", surface_limit if given else TOUCH_LIMIT_METAL_JACKET, unit="K", low=0.0,
                     low_inclusive=False)
    if hottest_air_temperature is not None:
        around = around.replace(air_temperature=as_array("hottest_air_temperature", hottest_air_temperature,
                                                         unit="K", low=0.0, low_inclusive=False))
    cases = _cases(pipe_outer_diameter, fluid_temperature, around, insulation_conductivity, outer_layers,
                   dict(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                        pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
                        inner_coefficient=inner_coefficient, natural=natural, forced=forced,
                        mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                        convection_coefficient=convection_coefficient, exact_properties=exact_properties),
                   limit=limit)
    return _size(lambda r: r.surface_temperature, 1.0, "surface temperature [K]", "touch limit", cases,
                 insulation_conductivity, max_thickness, commercial_thicknesses,
                 (CAUTION_TOUCH_GIVEN if given else CAUTION_TOUCH,), limit_given=given)


def thickness_for_heat_loss(pipe_outer_diameter, fluid_temperature, *, insulation_conductivity, heat_loss_limit,
                            outer_layers=(), jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None,
                            pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None,
                            mixing_exponent=None, convection_factor=None, convection_coefficient=None,
                            exact_properties=False, max_thickness=0.3, commercial_thicknesses=COMMERCIAL_THICKNESSES,
                            surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None,
                            surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None,
                            solar_irradiance=None, pressure=None) -> ThicknessResult:
    """Insulation thickness that keeps the heat flow per metre at or below a limit [W/m].

    For a cold line the limit applies to the heat gain (give it positive). Below the
    critical thickness added insulation raises the flow; the search starts there
    (:func:`critical_thickness`), so a thin layer that would make things worse is never returned.

    Parameters
    ----------
    pipe_outer_diameter, fluid_temperature, insulation_conductivity, outer_layers, jacket_emissivity
        As in :func:`thickness_for_surface_temperature`.
    heat_loss_limit : numeric
        Largest heat flow per metre of line [W/m].
    max_thickness, commercial_thicknesses
        As in :func:`thickness_for_surface_temperature`.
    pipe_wall_thickness, pipe_conductivity, inner_coefficient, solar_absorptivity, natural, forced,
    mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`; every numeric one may be an array.
    surroundings : Surroundings, optional
        The surroundings; or give their fields as keywords (``air_temperature``, ``wind_speed``,
        ``surroundings_temperature``, ``sky_view_fraction``, ``sky_temperature``, ``solar_irradiance``,
        ``pressure``), not both.

    Examples
    --------
    >>> r = thickness_for_heat_loss(0.1143, 453.15, air_temperature=293.15, insulation_conductivity=0.04,
    ...                             heat_loss_limit=60.0)
    >>> round(float(r.required_thickness) * 1000, 1), float(r.commercial_thickness)
    (49.9, 0.05)
    """
    around = _around(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    limit = as_array("heat_loss_limit", heat_loss_limit, unit="W/m", low=0.0, low_inclusive=False)
    keywords = dict(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                    pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
                    inner_coefficient=inner_coefficient, natural=natural, forced=forced,
                    mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                    convection_coefficient=convection_coefficient, exact_properties=exact_properties)
    cases = _cases(pipe_outer_diameter, fluid_temperature, around, insulation_conductivity, outer_layers, keywords,
                   limit=limit)
    critical = _critical(cases, insulation_conductivity, max_thickness)
    result = _size(lambda r: np.abs(r.q_per_length), 1.0, "heat flow [W/m]", "heat-loss limit", cases,
                   insulation_conductivity, max_thickness, commercial_thicknesses, (), low_thickness=critical)
    if np.any(critical > 0):
        worst = float(np.max(critical))
        note = (f"critical thickness up to {worst * 1000:.1f} mm: a thinner layer of this insulation increases the "
                f"heat flow of the bare line")
        result = dataclasses.replace(result, messages=(*result.messages, note))
    return result


def thickness_against_condensation(pipe_outer_diameter, fluid_temperature, *, insulation_conductivity,
                                   relative_humidity=None, margin=CONDENSATION_MARGIN, outer_layers=(),
                                   jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None,
                                   pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None,
                                   mixing_exponent=None, convection_factor=None, convection_coefficient=None,
                                   exact_properties=False, max_thickness=0.3,
                                   commercial_thicknesses=COMMERCIAL_THICKNESSES,
                                   surroundings: Surroundings | None = None, air_temperature=None,
                                   wind_speed=None, surroundings_temperature=None, sky_view_fraction=None,
                                   sky_temperature=None, solar_irradiance=None, pressure=None) -> ThicknessResult:
    """Insulation thickness that keeps a cold line's jacket above the dew point plus a margin.

    Evaluated in still air, out of the sun and with no sky in view (the worst case for a cold
    surface: wind, sun and sky given are noted and not used) at the design air temperature and
    relative humidity (0-1, over liquid water above 0 degC; from the surroundings or the keyword);
    the dew point (frost point below 0 degC) comes from CoolProp's humid-air routines. A low jacket
    emissivity lowers the surface temperature of a cold line.

    Parameters
    ----------
    pipe_outer_diameter, fluid_temperature, insulation_conductivity, outer_layers, jacket_emissivity
        As in :func:`thickness_for_surface_temperature`.
    relative_humidity : numeric
        Of the design air [-], 0-1 (or the surroundings' ``relative_humidity``).
    margin : numeric
        How far the jacket stays above the dew point [K].
    max_thickness, commercial_thicknesses
        As in :func:`thickness_for_surface_temperature`.
    pipe_wall_thickness, pipe_conductivity, inner_coefficient, solar_absorptivity, natural, forced,
    mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`; every numeric one may be an array.
    surroundings : Surroundings, optional
        The surroundings; or give their fields as keywords (``air_temperature``, ``wind_speed``,
        ``surroundings_temperature``, ``sky_view_fraction``, ``sky_temperature``, ``solar_irradiance``,
        ``pressure``), not both.

    Examples
    --------
    >>> r = thickness_against_condensation(0.1683, 279.15, air_temperature=303.15, relative_humidity=0.8,
    ...                                    insulation_conductivity=0.035)
    >>> round(float(r.required_thickness) * 1000, 1), float(r.commercial_thickness)
    (28.6, 0.03)
    """
    around = _around(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure,
                     relative_humidity=relative_humidity)
    if around.relative_humidity is None:
        raise InputError("relative_humidity is required for a condensation sizing (0-1)", field="relative_humidity",
                         rule="given, 0-1", value=None)
    margin = as_array("margin", margin, unit="K", low=0.0)
    limit = dew_point(around.air_temperature, around.relative_humidity, around.pressure) + margin
    notes = []
    if np.any(around.wind_speed > 0) or np.any(around.sky_view_fraction > 0) or np.any(around.solar_irradiance > 0):
        notes.append("sized in still air, out of the sun and with no sky in view (the worst case for a cold jacket); "
                     "the wind, sun and sky given were not used")
    # still air, no sky, no sun -- kept in the shape of what was given, so that every input still broadcasts
    around = around.replace(wind_speed=0.0 * around.wind_speed, sky_view_fraction=0.0 * around.sky_view_fraction,
                            solar_irradiance=0.0 * around.solar_irradiance)
    cases = _cases(pipe_outer_diameter, fluid_temperature, around, insulation_conductivity, outer_layers,
                   dict(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                        pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
                        inner_coefficient=inner_coefficient, natural=natural, forced=forced,
                        mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                        convection_coefficient=convection_coefficient, exact_properties=exact_properties),
                   limit=limit, margin=margin)
    return _size(lambda r: r.surface_temperature, -1.0, "surface temperature [K]", "dew point plus margin", cases,
                 insulation_conductivity, max_thickness, commercial_thicknesses, (CAUTION_CONDENSATION,),
                 margin=cases["margin"].reshape(cases.shape), dew=(limit - margin), notes=notes)


def critical_thickness(pipe_outer_diameter, fluid_temperature, *, insulation_conductivity, outer_layers=(),
                       jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None,
                       pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None,
                       mixing_exponent=None, convection_factor=None, convection_coefficient=None,
                       exact_properties=False, max_thickness=0.3, surroundings: Surroundings | None = None,
                       air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None,
                       sky_temperature=None, solar_irradiance=None, pressure=None) -> np.ndarray:
    r"""Thickness below which adding insulation increases the heat flow [m]; 0 where there is none.

    Found numerically from the maximum of :math:`|q'|` against thickness with the
    full outer model (convection depending on diameter, plus radiation); the textbook
    :math:`r_{cr} = k/h` is the constant-h special case.

    Parameters
    ----------
    pipe_outer_diameter, fluid_temperature, insulation_conductivity, outer_layers, jacket_emissivity, max_thickness
        As in :func:`thickness_for_surface_temperature`.
    pipe_wall_thickness, pipe_conductivity, inner_coefficient, solar_absorptivity, natural, forced,
    mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`; every numeric one may be an array.
    surroundings : Surroundings, optional
        The surroundings; or give their fields as keywords (``air_temperature``, ``wind_speed``,
        ``surroundings_temperature``, ``sky_view_fraction``, ``sky_temperature``, ``solar_irradiance``,
        ``pressure``), not both.

    Examples
    --------
    A 6 mm tube with a poorly insulating layer (k = 0.2 W/m/K) in still air:

    >>> round(float(critical_thickness(0.006, 353.15, air_temperature=293.15, insulation_conductivity=0.2)) * 1000, 1)
    8.4
    """
    around = _around(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    cases = _cases(pipe_outer_diameter, fluid_temperature, around, insulation_conductivity, outer_layers,
                   dict(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                        pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
                        inner_coefficient=inner_coefficient, natural=natural, forced=forced,
                        mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                        convection_coefficient=convection_coefficient, exact_properties=exact_properties))
    return _critical(cases, insulation_conductivity, max_thickness).reshape(cases.shape)


def _critical(cases: _Cases, insulation_conductivity, max_thickness) -> np.ndarray:
    """Critical thickness per (flat) point [m]."""
    t_max = float(as_array("max_thickness", max_thickness, unit="m", low=0.0, low_inclusive=False))
    n = cases.size
    every = np.arange(n)

    def flow(t, index):  # solved far below the tolerance: its slope is taken by differences
        return np.abs(_evaluate(t, cases.subset(index), insulation_conductivity, tolerance=1e-10).q_per_length)

    def slope(t, index):
        step = np.maximum(1e-6, 1e-4 * t)
        low = np.maximum(t - step, 0.0)
        return (flow(t + step, index) - flow(low, index)) / (t + step - low)

    grid = np.concatenate([[0.0], np.geomspace(1e-4, t_max, 40)])
    values = flow(np.tile(grid, n), np.repeat(every, grid.size))
    best = np.argmax(values.reshape(n, grid.size), axis=1)
    result = np.zeros(n)
    inner = (best > 0) & (best < grid.size - 1)
    if inner.any():
        lo, hi = grid[best[inner] - 1], grid[best[inner] + 1]
        res = find_root(lambda t, index: -slope(t, index), lo, hi, args=(every[inner],), xatol=1e-7, xrtol=0.0)
        result[inner] = np.where(res.success, res.x, grid[best[inner]])
    result[best == grid.size - 1] = t_max
    return result


# ----------------------------------------------------------------------------- fittings
#: Extra heat loss of fittings as equivalent metres of the same insulated pipe, per item.
#: Common practice, no source (orders of magnitude used in energy audits for insulated
#: fittings with removable covers; bare fittings lose several times more). Override with
#: figures from the governing standard or the site's survey.
FITTING_EQUIVALENT_LENGTH = {
    "valve": 1.5,
    "flange_pair": 0.5,
    "support": 0.3,
    "elbow": 0.5,
    "strainer": 1.5,
}


def equivalent_length(length, fittings: dict | None = None, factors: dict | None = None) -> np.ndarray:
    """Pipe length plus fittings as equivalent metres [m].

    Examples
    --------
    >>> float(equivalent_length(40.0, {"valve": 2, "flange_pair": 4}))
    45.0
    >>> equivalent_length(40.0, {"gate": 1})
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: unknown fitting 'gate'; choose one of: valve, flange_pair, support, elbow, strainer
    """
    table = dict(FITTING_EQUIVALENT_LENGTH if factors is None else factors)
    total = as_array("length", length, unit="m", low=0.0)
    for name, count in (fittings or {}).items():
        if name not in table:
            rule = f"one of: {', '.join(table)}"
            raise InputError(f"unknown fitting {name!r}; choose {rule}", field="fittings", rule=rule, value=name)
        total = total + as_array(f"number of {name}", count, low=0.0) * table[name]
    return total
