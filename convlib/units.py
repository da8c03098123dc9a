"""Unit conversion at the edges (command line, files, dashboard); the core stays SI.

One reader for every entry point (command line, line-list CSV, study and weather files):
:func:`split` / :func:`parse` turn text such as ``"90degC"``, ``"4.5 in"``, ``"0.045W/m/degC"``,
``"0.3 Btu·in/h·ft²·°F"``, ``"6 barg"`` or ``"80%"`` into an SI float. A temperature unit that is
the whole unit of a temperature is absolute (``95C`` = 368.15 K); inside a compound unit it is an
interval (``W/m/degC`` = ``W/m/K``). Gauge pressures add the standard atmosphere (101 325 Pa).
Malformed text (unbalanced brackets, a division by zero, a list) raises a one-line
:class:`~convlib.errors.InputError` naming the field.

:func:`read` reads an input of :data:`INPUTS`: a plain number is in the customary unit of the
``--units`` system (SI: degC, mm for diameters and layers, m for runs; US: degF, in, ft), and a
value outside the range engineers use is refused with a hint ("did you mean 95 degC?") unless
allowed. Files pass their own plain unit (SI base units, kelvin, unless a header says otherwise).

Unit systems for display: ``"SI"`` (degC, mm, W/m, W/m2/K) and ``"US"`` (degF, in, Btu/h/ft,
Btu/h/ft2/F).
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .errors import InputError

__all__ = ["to_si", "from_si", "parse", "read", "split", "unit_affine", "Input", "INPUTS", "help_units",
           "ATMOSPHERIC_PRESSURE", "DISPLAY_UNITS", "display_unit", "KIND_SI_UNIT"]

#: SI unit of each kind of quantity the library uses.
KIND_SI_UNIT = {
    "temperature": "K",
    "temperature_difference": "delta_degC",
    "length": "m",
    "speed": "m/s",
    "pressure": "Pa",
    "heat_per_length": "W/m",
    "heat_flux": "W/m**2",
    "power": "W",
    "coefficient": "W/m**2/K",
    "conductivity": "W/m/K",
    "energy": "J",
    "area": "m**2",
    "time": "s",
    "mass_flow": "kg/s",
    "mass": "kg",
    "dimensionless": "",
}

#: Display unit per kind and unit system.
DISPLAY_UNITS = {
    "SI": {"temperature": "degC", "temperature_difference": "delta_degC", "length": "mm", "speed": "m/s",
           "pressure": "kPa", "heat_per_length": "W/m", "heat_flux": "W/m**2", "power": "W",
           "coefficient": "W/m**2/K", "conductivity": "W/m/K", "energy": "kWh", "area": "m**2", "time": "hour",
           "mass_flow": "kg/hour", "mass": "kg", "dimensionless": ""},
    "US": {"temperature": "degF", "temperature_difference": "delta_degF", "length": "inch", "speed": "mph",
           "pressure": "psi", "heat_per_length": "Btu/hour/foot", "heat_flux": "Btu/hour/foot**2",
           "power": "Btu/hour", "coefficient": "Btu/hour/foot**2/delta_degF",
           "conductivity": "Btu*inch/hour/foot**2/delta_degF", "energy": "MMBtu", "area": "foot**2", "time": "hour",
           "mass_flow": "lb/hour", "mass": "lb", "dimensionless": ""},
}


@lru_cache(maxsize=1)
def _registry():
    import pint  # imported on first use: the physics core does not need it

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    # the International Table Btu (ASHRAE, NIST SP 811), not pint's default ISO Btu
    ureg.define("Btu = Btu_it")
    ureg.define("MMBtu = 1e6 * Btu_it")
    return ureg


def display_unit(kind: str, system: str = "SI") -> str:
    """Display unit of a kind in a unit system; unknown names raise ``InputError`` listing the choices."""
    if system not in DISPLAY_UNITS:
        rule = f"one of: {', '.join(DISPLAY_UNITS)}"
        raise InputError(f"unknown unit system {system!r}; choose {rule}", field="unit system", rule=rule,
                         value=system)
    if kind not in KIND_SI_UNIT:
        rule = f"one of: {', '.join(KIND_SI_UNIT)}"
        raise InputError(f"unknown quantity kind {kind!r}; choose {rule}", field="quantity kind", rule=rule,
                         value=kind)
    return DISPLAY_UNITS[system][kind]


def to_si(value, unit: str, kind: str):
    """Convert a value in ``unit`` to the SI unit of ``kind``.

    Examples
    --------
    >>> round(float(to_si(90.0, "degC", "temperature")), 2)
    363.15
    >>> round(float(to_si(4.5, "inch", "length")), 4)
    0.1143
    """
    if unit == KIND_SI_UNIT[kind]:
        return np.asarray(value, dtype=float)
    ureg = _registry()
    return np.asarray(ureg.Quantity(np.asarray(value, dtype=float), unit).to(KIND_SI_UNIT[kind]).magnitude)


def from_si(value, kind: str, unit: str):
    """Convert an SI value of ``kind`` to ``unit``.

    Examples
    --------
    >>> round(float(from_si(363.15, "temperature", "degF")), 1)
    194.0
    >>> round(float(from_si(100.0, "heat_per_length", "Btu/hour/foot")), 2)
    104.0
    """
    if unit == KIND_SI_UNIT[kind]:
        return np.asarray(value, dtype=float)
    ureg = _registry()
    return np.asarray(ureg.Quantity(np.asarray(value, dtype=float), KIND_SI_UNIT[kind]).to(unit).magnitude)


# ----------------------------------------------------------------------------- reading typed values
# One reader for every edge (command line, line-list CSV, study and weather files): a number, then an optional
# unit written as engineers write it. Every unit becomes SI as ``offset + factor * number``.

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_ALLOWED = re.compile(r"^[A-Za-z0-9_*/(). °%µμ-]*$")
#: Temperature units in a unit text; an absolute unit when it is the whole unit of a temperature, else an interval.
_TEMPERATURE_TOKEN = re.compile(
    r"(?<![A-Za-z_])(°C|°F|°K|°R|degC|degF|degR|deg_C|deg_F|deg C|deg F|celsius|Celsius|fahrenheit|Fahrenheit|"
    r"degree_Celsius|degree_Fahrenheit|C|F|K|R)(?![A-Za-z_])")
_CELSIUS = {"°C", "degC", "deg_C", "deg C", "celsius", "Celsius", "degree_Celsius", "C"}
_FAHRENHEIT = {"°F", "degF", "deg_F", "deg F", "fahrenheit", "Fahrenheit", "degree_Fahrenheit", "F"}
_RANKINE = {"°R", "degR", "R"}
#: Kinds whose unit holds a temperature interval (W/m/K ...): there a bare C or F is a degree, not coulomb/farad.
_PER_DEGREE_KINDS = ("coefficient", "conductivity", "temperature_difference")
#: Pressure units that take a gauge (g) or absolute (a) suffix: barg, psig, kPag, bar(g), psia, bara.
_PRESSURE_UNITS = ("bar", "mbar", "kPa", "MPa", "hPa", "Pa", "psi")
_GAUGE = re.compile(rf"^({'|'.join(_PRESSURE_UNITS)})\s*(g|\(g\)|gauge|\(gauge\)|a|\(a\)|abs|\(abs\))$")
#: Atmospheric pressure added to a gauge pressure [Pa]: the standard atmosphere (10th CGPM, 1954), not the site's.
ATMOSPHERIC_PRESSURE = 101325.0

#: Exact factors of the commonest units (no pint import for them): unit -> (factor, offset) to SI.
_INCH, _FOOT, _POUND, _HOUR = 0.0254, 0.3048, 0.45359237, 3600.0
_PSI = _POUND * 9.80665 / _INCH ** 2
_FAST = {
    "temperature": {"K": (1.0, 0.0), "degC": (1.0, 273.15), "degF": (5 / 9, 273.15 - 32 * 5 / 9),
                    "degR": (5 / 9, 0.0)},
    "length": {"m": (1.0, 0.0), "mm": (1e-3, 0.0), "cm": (1e-2, 0.0), "km": (1e3, 0.0), "in": (_INCH, 0.0),
               "inch": (_INCH, 0.0), "ft": (_FOOT, 0.0), "foot": (_FOOT, 0.0)},
    "speed": {"m/s": (1.0, 0.0), "km/h": (1 / 3.6, 0.0), "mph": (1609.344 / _HOUR, 0.0), "ft/s": (_FOOT, 0.0)},
    "pressure": {"Pa": (1.0, 0.0), "kPa": (1e3, 0.0), "MPa": (1e6, 0.0), "bar": (1e5, 0.0), "mbar": (100.0, 0.0),
                 "hPa": (100.0, 0.0), "psi": (_PSI, 0.0), "atm": (101325.0, 0.0)},
    "conductivity": {"W/m/K": (1.0, 0.0)}, "coefficient": {"W/m**2/K": (1.0, 0.0)},
    "heat_per_length": {"W/m": (1.0, 0.0)}, "heat_flux": {"W/m**2": (1.0, 0.0)}, "power": {"W": (1.0, 0.0)},
    "mass_flow": {"kg/s": (1.0, 0.0), "kg/h": (1 / _HOUR, 0.0), "lb/h": (_POUND / _HOUR, 0.0)},
    "mass": {"kg": (1.0, 0.0), "lb": (_POUND, 0.0)},
    "time": {"s": (1.0, 0.0), "min": (60.0, 0.0), "h": (_HOUR, 0.0), "hour": (_HOUR, 0.0)},
    "dimensionless": {"": (1.0, 0.0), "%": (0.01, 0.0), "percent": (0.01, 0.0)},
}


def _bad(field: str, text, kind: str, why: str = "") -> InputError:
    name = kind.replace("_", " ")
    example = _EXAMPLES.get(kind)
    hint = f" (expected e.g. {example})" if example else ""
    shown = str(text).strip().replace("\n", " ")
    return InputError(f"{field}: {shown!r} is not a {name}{why}{hint}", field=field, rule=f"a {name}", value=text)


_EXAMPLES = {"temperature": "'363.15 K', '90 degC', '194 degF'", "length": "'0.1 m', '4.5 in', '114.3 mm'",
             "speed": "'3 m/s', '10 mph'", "pressure": "'101325 Pa', '79.5 kPa', '6 barg'",
             "conductivity": "'0.045 W/m/K', '0.3 Btu*in/(h*ft**2*degF)'",
             "coefficient": "'10 W/m**2/K', '1.8 Btu/(h*ft**2*degF)'", "mass_flow": "'0.5 kg/s', '1800 kg/h'",
             "dimensionless": "'0.8', '80%'"}


def _normalize(unit: str, kind: str) -> str:
    """The unit as pint reads it: engineers' spellings (m2, W/m.K, Btu/h·ft²·°F, 95C) made explicit, and a
    temperature inside a compound unit made an interval (``W/m/degC`` -> ``W/m/delta_degC``)."""
    u = unit.replace("²", "**2").replace("³", "**3").replace("·", "*").replace("⋅", "*").replace("^", "**")
    u = u.replace("µ", "u").replace("μ", "u").replace("º", "°")
    if not _ALLOWED.match(u):
        raise ValueError("it holds characters that are not part of a unit")
    depth = 0
    for ch in u:
        depth += {"(": 1, ")": -1}.get(ch, 0)
        if depth < 0:
            break
    if depth != 0:
        raise ValueError("its brackets do not balance")
    u = re.sub(r"(?<=[A-Za-z0-9)])\s*[.\-]\s*(?=[A-Za-z(°])", "*", u)     # W/m.K, Btu/hr-ft2-F
    if kind in ("coefficient", "conductivity"):                           # W/mK, W/m2K, W/m°C: metre times degree
        u = re.sub(r"(?<![A-Za-z_])(m|ft)(\*\*2|2)?(K|°C|°F|degC|degF|C|F)(?![A-Za-z_])", r"\1\2*\3", u)
    u = re.sub(r"\b([A-Za-z]+)([23])\b", r"\1**\2", u)                    # m2, ft2 (not inH2O)
    whole = _TEMPERATURE_TOKEN.fullmatch(u.strip())
    if kind == "temperature" and whole:                                   # an absolute temperature: degC, 95C
        t = whole[1]
        return "degC" if t in _CELSIUS else "degF" if t in _FAHRENHEIT else "degR" if t in _RANKINE else "K"
    if kind == "temperature" and "delta" in u:
        raise ValueError("a temperature difference is not a temperature")
    if kind in _PER_DEGREE_KINDS or kind == "temperature":
        def interval(m):
            t = m[1]
            return ("delta_degC" if t in _CELSIUS else "delta_degF" if t in _FAHRENHEIT else
                    "degR" if t in _RANKINE else "K")
        u = _TEMPERATURE_TOKEN.sub(interval, u)
    if u.count("/") == 1 and "(" not in u:                                # W/m*K, Btu/h*ft**2*degF: one denominator
        top, bottom = u.split("/")
        u = f"{top.strip() or '1'}/({bottom.strip()})" if re.search(r"[*\s]", bottom.strip()) else u
    return u.strip()


def is_unit(unit: str, kind: str) -> bool:
    """Whether ``unit`` reads as a unit of ``kind`` (cached; no exception built)."""
    return _affine_or_error(unit, kind)[0]


def unit_affine(unit: str, kind: str) -> tuple[float, float]:
    """``(factor, offset)`` with SI value = ``offset + factor * number`` for a number written in ``unit``.

    Engineers' spellings are understood: ``W/m.K``, ``W/mK``, ``W/m2K``, ``Btu/h·ft²·°F``, ``Btu/hr-ft2-F``,
    ``95C``; a temperature inside a compound unit is an interval (``W/m/degC`` = ``W/m/K``); gauge pressures
    (``barg``, ``psig``, ``kPa(g)``) add the standard atmosphere, 101 325 Pa; ``%`` is 0.01.
    Raises ``ValueError`` (not an ``InputError``: the caller names the field) for a unit that is not of ``kind``.

    >>> unit_affine("W/m/degC", "conductivity")
    (1.0, 0.0)
    >>> unit_affine("barg", "pressure")
    (100000.0, 101325.0)
    """
    ok, out = _affine_or_error(unit, kind)
    if not ok:
        raise ValueError(out)
    return out


@lru_cache(maxsize=1024)
def _affine_or_error(unit: str, kind: str):
    """``(True, (factor, offset))`` or ``(False, reason)``: a refused unit is cached too, so that a file
    repeating it stays fast."""
    try:
        return True, _affine(unit, kind)
    except Exception as exc:  # noqa: BLE001 - pint raises many error types; every one means "not this unit"
        return False, str(exc) if isinstance(exc, ValueError) else f"not a unit of {kind}: {exc}"


def _affine(unit: str, kind: str) -> tuple[float, float]:
    if kind not in KIND_SI_UNIT:
        raise ValueError(f"unknown quantity kind {kind!r}")
    gauge = 0.0
    if kind == "pressure":
        m = _GAUGE.fullmatch(unit.strip())
        if m:
            unit, gauge = m[1], (ATMOSPHERIC_PRESSURE if m[2].strip("()").startswith("g") else 0.0)
    u = _normalize(unit, kind)
    fast = _FAST.get(kind, {}).get(u)
    if fast is not None:
        return fast[0], fast[1] + gauge
    if not u:
        raise ValueError("a unit is needed")
    ureg = _registry()
    parsed = ureg.parse_units(u)
    target = KIND_SI_UNIT[kind]
    offset = float(ureg.Quantity(0.0, parsed).to(target).magnitude)
    factor = float(ureg.Quantity(1.0, parsed).to(target).magnitude) - offset
    if not (np.isfinite(factor) and np.isfinite(offset)) or factor == 0.0:
        raise ValueError("it is not a finite unit")
    return factor, offset + gauge


def split(text, kind: str, field: str, plain_unit: str | None = None) -> tuple[float, float, str]:
    """Read ``text`` (a number with an optional unit): ``(SI value, number as typed, unit used)``.

    A plain number is in ``plain_unit`` (``None``: the SI unit of ``kind``, kelvin for temperatures).
    Raises :class:`~convlib.errors.InputError` naming ``field`` for anything else: no number, a unit of
    another kind, unbalanced brackets, a division by zero, a list, a non-finite number.
    """
    if isinstance(text, (int, float, np.number)) and not isinstance(text, bool):
        number, unit = float(text), ""
    else:
        s = str(text).strip().replace("−", "-")
        m = _NUMBER.match(s)
        if m is None:
            if s.lower().lstrip("+-") in ("nan", "inf", "infinity"):
                raise InputError(f"{field}: {s!r} is not a finite number", field=field, rule="a finite number",
                                 value=text)
            raise _bad(field, text, kind)
        number, unit = float(m[1]), m[2]
    if not math.isfinite(number):
        raise InputError(f"{field}: {text!r} is not a finite number", field=field, rule="a finite number", value=text)
    used = unit if unit else (plain_unit if plain_unit is not None else KIND_SI_UNIT[kind])
    try:
        factor, offset = unit_affine(used, kind)
    except Exception as exc:  # noqa: BLE001 - pint raises many error types; every one is a bad unit here
        why = f": {exc}" if isinstance(exc, ValueError) and str(exc).startswith(("it ", "a ")) else ""
        if re.match(r",\d", unit):  # 0,045: a decimal comma
            why = ": write the decimal mark as '.'"
        raise _bad(field, text, kind, why) from None
    value = offset + factor * number
    if not math.isfinite(value):
        raise InputError(f"{field}: {text!r} is not a finite number", field=field, rule="a finite number", value=text)
    return float(value), number, used


def parse(text, kind: str, field: str, plain_unit: str | None = None) -> float:
    """Read a number with an optional unit, e.g. ``"90degC"`` or ``"4.5in"``, as an SI float.

    A plain number is in ``plain_unit``; without one it is SI (kelvin for temperatures). For the units
    engineers expect of each input, and the plausibility guard, use :func:`read`. Raises
    :class:`~convlib.errors.InputError` (a ``ValueError``) naming the field when the text is not a
    quantity of the right kind.

    Examples
    --------
    >>> round(parse("90degC", "temperature", "surface temperature"), 2)
    363.15
    >>> parse("0.045W/m/degC", "conductivity", "k")  # a temperature inside a compound unit is an interval
    0.045
    >>> parse("0.1", "length", "diameter")
    0.1
    >>> parse("3 kg", "length", "diameter")
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: diameter: '3 kg' is not a length (expected e.g. '0.1 m', '4.5 in', '114.3 mm')
    """
    return split(text, kind, field, plain_unit)[0]


# ----------------------------------------------------------------------------- inputs: plain units and plausibility
@dataclass(frozen=True)
class Input:
    """What a typed input is: its kind, the unit of a plain number per unit system, the range engineers use
    (SI) and the units a mistyped number may have meant (for the hint)."""

    kind: str
    si: str
    us: str
    low: float
    high: float
    words: str
    alternatives: tuple[str, ...] = ()
    #: Physical bounds (SI) no override lets through: the value must exceed ``minimum`` (or equal it when
    #: ``minimum_inclusive``) and be at most ``maximum``.
    minimum: float = 0.0
    minimum_inclusive: bool = False
    maximum: float = float("inf")

    def plain(self, system: str) -> str:
        if system not in ("SI", "US"):
            raise InputError(f"unknown unit system {system!r}; choose one of: SI, US", field="unit system",
                             rule="one of: SI, US", value=system)
        return self.si if system == "SI" else self.us


_T_ALT = ("degC", "K", "degF")
_US_K = "Btu*in/(h*ft**2*degF)"
_US_H = "Btu/(h*ft**2*degF)"
#: Every typed input of the command line and files. Plain numbers: temperatures in degC (US degF); pipe
#: diameters, walls, layers and duct sizes in mm (in); lengths of runs, vessels and plates in m (ft);
#: process pressures in bar absolute (psi absolute), air pressure in kPa (psi); rates per SI (US) unit.
#: Ranges: what engineers meet for heat loss to air; outside them a value is refused unless allowed.
INPUTS = {
    "temperature": Input("temperature", "degC", "degF", 150.0, 1300.0, "a temperature", _T_ALT),
    "air_temperature": Input("temperature", "degC", "degF", 183.15, 423.15, "an ambient air temperature", _T_ALT),
    "pipe_diameter": Input("length", "mm", "in", 0.003, 5.0, "a pipe or surface diameter", ("m", "in", "mm")),
    "wall_thickness": Input("length", "mm", "in", 1e-4, 0.3, "a wall thickness", ("m", "in", "mm")),
    "thickness": Input("length", "mm", "in", 0.0, 1.0, "a layer thickness", ("m", "in", "mm"), minimum_inclusive=True),
    "length": Input("length", "m", "ft", 1e-3, 1e5, "a length of run", ("m", "ft", "mm")),
    "size": Input("length", "m", "ft", 1e-3, 200.0, "a vessel or plate size", ("m", "ft", "mm")),
    "duct_size": Input("length", "mm", "in", 0.05, 10.0, "a duct width or height", ("m", "in", "mm")),
    "wind_speed": Input("speed", "m/s", "mph", 0.0, 60.0, "a wind speed", ("m/s", "km/h", "mph"),
                        minimum_inclusive=True),
    "air_pressure": Input("pressure", "kPa", "psi", 3e4, 1.2e5, "an air pressure", ("kPa", "Pa", "bar", "psi")),
    "fluid_pressure": Input("pressure", "bar", "psi", 1e3, 3e7, "a fluid pressure (absolute)",
                            ("bar", "kPa", "Pa", "psi")),
    "conductivity": Input("conductivity", "W/m/K", _US_K, 0.005, 450.0, "a thermal conductivity",
                          ("W/m/K", "mW/m/K", _US_K)),
    "insulation_conductivity": Input("conductivity", "W/m/K", _US_K, 0.005, 5.0, "an insulation conductivity",
                                     ("W/m/K", "mW/m/K", _US_K)),
    "coefficient": Input("coefficient", "W/m**2/K", _US_H, 0.1, 1000.0, "an outer film coefficient",
                         ("W/m**2/K", _US_H)),
    "inner_coefficient": Input("coefficient", "W/m**2/K", _US_H, 0.1, 1e5, "an inner film coefficient",
                               ("W/m**2/K", _US_H)),
    "heat_per_length": Input("heat_per_length", "W/m", "Btu/h/ft", 1e-3, 1e5, "a heat flow per length",
                             ("W/m", "Btu/h/ft")),
    "heat_flux": Input("heat_flux", "W/m**2", "Btu/h/ft**2", 1e-3, 1e6, "a heat flux", ("W/m**2", "Btu/h/ft**2")),
    "mass_flow": Input("mass_flow", "kg/s", "lb/h", 1e-7, 1e4, "a mass flow", ("kg/s", "kg/h", "lb/h")),
    "relative_humidity": Input("dimensionless", "", "", 0.0, 1.0, "a relative humidity", ("%",),
                               maximum=1.0),
    "duration": Input("time", "min", "min", 60.0, 7 * 86400.0, "a warm-up or cool-down time", ("min", "h", "s")),
    "temperature_margin": Input("temperature_difference", "delta_degC", "delta_degF", 0.0, 30.0,
                                "a temperature margin", ("K", "delta_degC", "delta_degF"), minimum_inclusive=True),
}

#: How a caller overrides the guard, as its user writes it.
PYTHON_OVERRIDE = "allow_unusual=True"


def _show(value: float, unit: str, digits: int = 4) -> str:
    return f"{value:.{digits}g} {unit}".strip() if unit not in ("%",) else f"{value:.{digits}g}%"


def read(text, name: str, field: str, *, system: str = "SI", allow_unusual: bool = False,
         override: str = PYTHON_OVERRIDE, plain_unit: str | None = None) -> float:
    """Read a typed input ``name`` (a key of :data:`INPUTS`) as an SI float.

    A plain number is in the input's unit of ``system`` (SI: degC, mm for diameters and layers, m for runs;
    US: degF, in, ft). A value outside the range engineers use for the input is refused with a hint in the
    user's units ("did you mean 95 degC?") unless ``allow_unusual``. Files (line lists, study and weather
    files) pass ``plain_unit`` (their plain numbers are SI base units, kelvin, unless a header says otherwise).

    Examples
    --------
    >>> round(read("95", "temperature", "surface_temperature"), 2)   # 95 degC
    368.15
    >>> read("168", "pipe_diameter", "diameter")                    # mm
    0.168
    >>> read("95K", "temperature", "surface_temperature")
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: surface_temperature: '95K' is below the range engineers use for a temperature (-123.1 to 1027 degC); did you mean 95 degC or 95 degF? Write the unit, or give allow_unusual=True to compute it anyway
    """
    spec = INPUTS[name]
    plain = spec.plain(system) if plain_unit is None else plain_unit
    value, number, used = split(text, spec.kind, field, plain)
    low_ok = value >= spec.minimum if spec.minimum_inclusive else value > spec.minimum
    possible = low_ok and value <= spec.maximum
    if possible and (allow_unusual or spec.low <= value <= spec.high):
        return value
    factor, offset = unit_affine(plain, spec.kind)
    typed = str(text).strip()
    plain_typed = _NUMBER.match(typed) is not None and not _NUMBER.match(typed)[2]
    hint = _hint(spec, number, used, plain)
    if not possible:
        bound, rule = ((spec.minimum, "at least" if spec.minimum_inclusive else "greater than") if not low_ok else
                       (spec.maximum, "at most"))
        # a plain number: with the unit it was read in, unless that is the SI unit a file's plain numbers take
        written = _show(number, plain, 12) if plain_typed and plain != KIND_SI_UNIT[spec.kind] else typed
        raise InputError(f"{field}: must be {rule} {_show((bound - offset) / factor, plain)}; got {written!r}"
                         f"{hint}", field=field, rule=f"{rule} {bound:g} {KIND_SI_UNIT[spec.kind]}", value=text)
    lo, hi = ((x - offset) / factor for x in (spec.low, spec.high))
    read_as = f" (read as {_show(number, plain, 12)})" if plain_typed and plain else ""
    where = "below" if value < spec.low else "above"
    message = (f"{field}: {typed!r}{read_as} is {where} the range engineers use for {spec.words} "
               f"({lo:.4g} to {_show(hi, plain)}){hint or '.'} Write the unit, or give {override} to compute it "
               f"anyway")
    raise InputError(message, field=field, rule=f"{spec.low:g} to {spec.high:g} {KIND_SI_UNIT[spec.kind]}",
                     value=text)


def _hint(spec: Input, number: float, used: str, plain: str) -> str:
    """``"; did you mean 95 degC?"``: the other units (two at most) that put the typed number in the usual range."""
    fits = []
    for alt in dict.fromkeys((plain, *spec.alternatives)):
        f, o = unit_affine(alt, spec.kind)
        if (f, o) != unit_affine(used, spec.kind) and spec.low <= o + f * number <= spec.high:
            fits.append(_show(number, alt, 12))
    return f"; did you mean {' or '.join(fits[:2])}?" if fits else ""


def help_units(name: str) -> str:
    """How a plain number of input ``name`` is read, for ``--help``: ``"plain number: degC (--units US: degF)"``."""
    spec = INPUTS[name]
    if not spec.si:
        return "plain number: a fraction, or write 80%"
    return f"plain number: {spec.si} (--units US: {spec.us})"


_KELVIN_RANGE = re.compile(r"between (-?[\d.]+(?:e[-+]?\d+)?) and (-?[\d.]+(?:e[-+]?\d+)?) K\b")
_KELVIN_VALUE = re.compile(r"(?<![\w.])(-?[\d.]+(?:e[-+]?\d+)?) K\b(?! \()")


def kelvin_for_reader(message: str, system: str = "SI") -> str:
    """A message with kelvin figures (from the property data, deep in a solve) also in the reader's own unit:
    ``"between 82.22 and 2000 K"`` -> ``"between 82.22 and 2000 K (-191 to 1727 degC)"`` (degF with ``"US"``).

    Examples
    --------
    >>> kelvin_for_reader("temperature must be between 82.22 and 2000 K for Air (gas); got 2774.26 K", "US")
    'temperature must be between 82.22 and 2000 K (-311.7 degF to 3140 degF) for Air (gas); got 2774.26 K (4534 degF)'
    """
    unit = display_unit("temperature", system)

    def show(kelvin: str) -> str:
        return f"{float(from_si(float(kelvin), 'temperature', unit)):.4g} {unit}"

    message = _KELVIN_RANGE.sub(lambda m: f"between {m[1]} and {m[2]} K ({show(m[1])} to {show(m[2])})", message)
    return _KELVIN_VALUE.sub(lambda m: f"{m[1]} K ({show(m[1])})", message)
