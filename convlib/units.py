"""Unit conversion at the edges (command line, files, dashboard); the core stays SI.

Text such as ``"90degC"``, ``"4.5 in"``, ``"194 degF"`` or a plain number (read
as the SI unit of the field) becomes an SI float. Unit systems for display:
``"SI"`` (degC, mm, W/m, W/m2/K) and ``"US"`` (degF, in, Btu/h/ft, Btu/h/ft2/F).
"""
from __future__ import annotations

from functools import lru_cache

import numpy as np

from .errors import InputError

__all__ = ["to_si", "from_si", "parse", "DISPLAY_UNITS", "display_unit", "KIND_SI_UNIT"]

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
    "dimensionless": "",
}

#: Display unit per kind and unit system.
DISPLAY_UNITS = {
    "SI": {"temperature": "degC", "temperature_difference": "delta_degC", "length": "mm", "speed": "m/s",
           "pressure": "kPa", "heat_per_length": "W/m", "heat_flux": "W/m**2", "power": "W",
           "coefficient": "W/m**2/K", "conductivity": "W/m/K", "energy": "kWh", "area": "m**2", "time": "hour",
           "mass_flow": "kg/hour", "dimensionless": ""},
    "US": {"temperature": "degF", "temperature_difference": "delta_degF", "length": "inch", "speed": "mph",
           "pressure": "psi", "heat_per_length": "Btu/hour/foot", "heat_flux": "Btu/hour/foot**2",
           "power": "Btu/hour", "coefficient": "Btu/hour/foot**2/delta_degF",
           "conductivity": "Btu*inch/hour/foot**2/delta_degF", "energy": "MMBtu", "area": "foot**2", "time": "hour",
           "mass_flow": "lb/hour", "dimensionless": ""},
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


def parse(text, kind: str, field: str) -> float:
    """Read a number with an optional unit, e.g. ``"90degC"`` or ``"4.5in"``; plain numbers are SI.

    Raises :class:`~convlib.errors.InputError` (a ``ValueError``) naming the
    field when the text is not a quantity of the right kind.

    Examples
    --------
    >>> round(parse("90degC", "temperature", "surface temperature"), 2)
    363.15
    >>> parse("0.1", "length", "diameter")
    0.1
    >>> parse("3 kg", "length", "diameter")
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: diameter: '3 kg' is not a length (expected e.g. '0.1 m', '4.5 in', '114.3 mm')
    """
    examples = {"temperature": "'363.15 K', '90 degC', '194 degF'", "length": "'0.1 m', '4.5 in', '114.3 mm'",
                "speed": "'3 m/s', '10 mph'", "pressure": "'101325 Pa', '79.5 kPa'"}
    hint = f" (expected e.g. {examples[kind]})" if kind in examples else ""
    s = str(text).strip()
    try:
        value = float(s)
    except ValueError:
        value = None
    if value is not None:
        if not np.isfinite(value):
            raise InputError(f"{field}: {s!r} is not a finite number", field=field, rule="a finite number",
                             value=text)
        return value
    ureg = _registry()
    import pint

    try:
        q = ureg.Quantity(s)
        value = float(q.to(KIND_SI_UNIT[kind]).magnitude)
    except (pint.errors.PintError, ValueError, TypeError, AttributeError, AssertionError):
        name = kind.replace("_", " ")
        raise InputError(f"{field}: {s!r} is not a {name}{hint}", field=field, rule=f"a {name}",
                         value=text) from None
    if not np.isfinite(value):
        raise InputError(f"{field}: {s!r} is not a finite number", field=field, rule="a finite number", value=text)
    return value
