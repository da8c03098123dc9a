"""Units and number formatting on screen; every conversion is done by :mod:`convlib.units`.

A :class:`Display` knows the unit system (``"SI"`` or ``"US"``) and turns SI
values of a named quantity (a CaseSpec field or a result such as
``q_per_length``) into displayed numbers, unit labels and text.
"""
from __future__ import annotations

import math

import numpy as np
from convlib.units import display_unit, from_si, to_si

from . import settings

__all__ = ["Display", "format_number", "quantity_kind", "pretty_unit", "input_label"]

#: Quantity kind of each study input (INPUTS names) for axes of sweeps, maps and tornado bars.
_INPUT_KINDS = {
    "diameter": "diameter", "surface_temperature": "surface_temperature",
    "fluid_temperature": "fluid_temperature", "air_temperature": "air_temperature",
    "surroundings_temperature": "surroundings_temperature", "wind_speed": "wind_speed",
    "emissivity": "emissivity", "sky_view_fraction": "sky_view_fraction", "solar_irradiance": "solar_irradiance",
    "pressure": "pressure", "insulation_thickness": "insulation_thickness",
    "insulation_conductivity": "insulation_conductivity", "convection_factor": "convection_factor",
}

_INPUT_LABELS = {
    "diameter": "Diameter", "surface_temperature": "Surface temperature", "fluid_temperature": "Fluid temperature",
    "air_temperature": "Air temperature", "surroundings_temperature": "Surroundings temperature",
    "wind_speed": "Wind speed", "emissivity": "Emissivity", "sky_view_fraction": "Sky view fraction",
    "solar_irradiance": "Solar irradiance", "pressure": "Air pressure", "insulation_thickness": "Insulation thickness",
    "insulation_conductivity": "Insulation conductivity", "convection_factor": "Convection factor",
    "vessel_insulation": "Insulation thickness",
}


def input_label(name: str) -> str:
    """Readable name of a study input, e.g. ``"Wind speed"``."""
    return _INPUT_LABELS.get(name, name.replace("_", " ").capitalize())


def quantity_kind(name: str) -> str:
    """Quantity kind (of :data:`convlib.units.KIND_SI_UNIT`) of a named quantity."""
    if name in settings.QUANTITIES:
        return settings.QUANTITIES[name][0]
    if name in _INPUT_KINDS:
        return settings.QUANTITIES[_INPUT_KINDS[name]][0]
    raise ValueError(f"unknown quantity {name!r}; choose one of: {', '.join(settings.QUANTITIES)}")


def pretty_unit(unit: str) -> str:
    """Readable text of a pint unit string (``"W/m**2/K"`` -> ``"W/(m²·K)"``)."""
    return settings.PRETTY_UNITS.get(unit, unit.replace("**2", "²").replace("**3", "³"))


def format_number(value: float, digits: int = 3) -> str:
    """Text of a number with ``digits`` significant digits, never in exponent form below 1e9.

    Examples
    --------
    >>> format_number(62.566), format_number(11262.0), format_number(0.04512), format_number(12.34, 1)
    ('62.6', '11,262', '0.0451', '12')
    """
    if value is None or not math.isfinite(value):
        return "–"
    if value == 0:
        return "0"
    magnitude = math.floor(math.log10(abs(value)))
    if abs(value) >= 1e9 or abs(value) < 1e-4:
        return f"{value:.{max(digits - 1, 0)}e}"
    decimals = max(0, digits - 1 - magnitude)
    return f"{value:,.{decimals}f}"


class Display:
    """Conversions and labels for one unit system.

    Parameters
    ----------
    system : {"SI", "US"}
        The unit system on screen.

    Examples
    --------
    >>> d = Display("US")
    >>> d.label("air_temperature"), round(float(d.value(293.15, "air_temperature")), 1)
    ('°F', 68.0)
    >>> d.text(100.0, "q_per_length")
    '104 Btu/(h·ft)'
    """

    def __init__(self, system: str = settings.DEFAULT_UNIT_SYSTEM):
        display_unit("length", system)  # validates the system name
        self.system = system

    def unit(self, name: str) -> str:
        """The pint unit string a named quantity is shown in."""
        entry = settings.QUANTITIES.get(_INPUT_KINDS.get(name, name))
        if entry is not None and entry[1] is not None:
            return entry[1][self.system]
        return display_unit(quantity_kind(name), self.system)

    def label(self, name: str) -> str:
        """Readable unit of a named quantity, e.g. ``"W/m"``."""
        return pretty_unit(self.unit(name))

    def value(self, si, name: str):
        """Displayed value(s) of SI value(s) of a named quantity (``None`` stays ``None``)."""
        if si is None:
            return None
        return from_si(np.asarray(si, dtype=float), quantity_kind(name), self.unit(name))

    def scalar(self, si, name: str) -> float | None:
        """Displayed value of one SI value as a float."""
        return None if si is None else float(self.value(si, name))

    def si(self, value, name: str):
        """SI value(s) of displayed value(s) of a named quantity."""
        return to_si(np.asarray(value, dtype=float), self.unit(name), quantity_kind(name))

    def digits(self, name: str) -> int:
        """Significant digits a named quantity is shown with."""
        entry = settings.QUANTITIES.get(_INPUT_KINDS.get(name, name))
        return entry[2] if entry else 3

    def number(self, si, name: str, digits: int | None = None) -> str:
        """Displayed number of an SI value, without unit."""
        if si is None:
            return "–"
        value = self.scalar(si, name)
        kind = quantity_kind(name)
        if kind == "temperature":  # temperatures read best with fixed decimals
            return f"{value:,.{1 if digits is None else digits}f}"
        return format_number(value, self.digits(name) if digits is None else digits)

    def text(self, si, name: str, digits: int | None = None) -> str:
        """Displayed number and unit of an SI value, e.g. ``"62.6 W/m"``."""
        unit = self.label(name)
        number = self.number(si, name, digits)
        return number if unit == "–" else f"{number} {unit}"

    def axis_title(self, name: str, text: str | None = None) -> str:
        """Axis title with unit in brackets, e.g. ``"Wind speed [m/s]"``."""
        unit = self.label(name)
        text = text or input_label(name)
        return text if unit == "–" else f"{text} [{unit}]"
