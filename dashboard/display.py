"""Units and number formatting on screen; every conversion is done by :mod:`convlib.units`.

A :class:`Display` knows the unit system (``"SI"`` or ``"US"``) and turns SI
values of a named quantity (a CaseSpec field or a result such as
``q_per_length``) into displayed numbers, unit labels and text.
"""
from __future__ import annotations

import math
import re

import numpy as np
from . import settings
from .compute import display_name as law_name
from .compute import display_unit, fill_template, from_si, to_si

__all__ = ["Display", "format_number", "quantity_kind", "pretty_unit", "input_label", "law_name", "geometry_name",
           "shape_name", "regime_text", "scientific", "NPS_OUTSIDE_INCH"]

#: Shapes of the line panel as people name them (keys of :data:`convlib.geometry.SHAPES`).
_SHAPE_NAMES = {
    "horizontal_cylinder": "horizontal pipe or cylinder", "vertical_cylinder": "vertical pipe or cylinder",
    "sphere": "sphere", "vertical_plate": "vertical wall or plate",
    "horizontal_plate_up": "horizontal plate, hot face up", "horizontal_plate_down": "horizontal plate, hot face down",
}
#: Geometries of the correlation registry as people name them.
_GEOMETRY_NAMES = {
    "horizontal_cylinder": "horizontal cylinder", "vertical_cylinder": "vertical cylinder", "sphere": "sphere",
    "vertical_plate": "vertical plate", "horizontal_plate_up": "horizontal plate, hot face up",
    "horizontal_plate_down": "horizontal plate, hot face down", "cylinder_crossflow": "cylinder in cross-flow",
    "sphere_crossflow": "sphere in a stream", "plate_parallel_flow": "plate in parallel flow",
}

#: Outside diameter of NPS 1/8 to 12 in inches as ASME B36.10M tabulates it (from NPS 14 up the outside
#: diameter equals the NPS). convlib's table holds the millimetre column (168.3 mm for NPS 6), whose
#: conversion (6.626 in) is not the figure a US engineer reads beside "NPS 6" (6.625 in).
NPS_OUTSIDE_INCH = {  # ASME B36.10M-2004, Table 1, outside diameter column in inches (from memory)
    0.125: 0.405, 0.25: 0.540, 0.375: 0.675, 0.5: 0.840, 0.75: 1.050, 1.0: 1.315, 1.25: 1.660, 1.5: 1.900,
    2.0: 2.375, 2.5: 2.875, 3.0: 3.500, 3.5: 4.000, 4.0: 4.500, 5.0: 5.563, 6.0: 6.625, 8.0: 8.625,
    10.0: 10.750, 12.0: 12.750, **{float(n): float(n) for n in range(14, 50, 2)},
}
_NPS_INCHES = np.array(sorted(NPS_OUTSIDE_INCH.values()))
#: A diameter within this of a tabulated outside diameter is that pipe [in]: the millimetre column is
#: rounded to 0.1 mm (0.002 in) up to NPS 12 and to whole millimetres (457 mm for NPS 18) above.
_NPS_MATCH_INCH = np.where(_NPS_INCHES < 14, 0.0025, 0.5 / 25.4)

#: Quantity kind of each study input (INPUTS names) for axes of sweeps, maps and tornado bars.
_INPUT_KINDS = {
    "diameter": "diameter", "surface_temperature": "surface_temperature",
    "fluid_temperature": "fluid_temperature", "air_temperature": "air_temperature",
    "surroundings_temperature": "surroundings_temperature", "wind_speed": "wind_speed",
    "emissivity": "emissivity", "sky_view_fraction": "sky_view_fraction", "solar_irradiance": "solar_irradiance",
    "pressure": "pressure", "insulation_thickness": "insulation_thickness",
    "insulation_conductivity": "insulation_conductivity", "convection_factor": "convection_factor",
}

#: Quantity shown for a value known only by its kind (rows of the demo site): site lengths in m or ft, flows in
#: lb/h, powers in kW or Btu/h, times in hours.
_KIND_QUANTITY = {
    "temperature": "fluid_temperature", "length": "length", "speed": "wind_speed", "power": "line_loss",
    "heat_per_length": "tracing_per_length", "time": "freeze_time", "pressure": "fluid_pressure",
    "mass_flow": "mass_flow", "dimensionless": "tracing_margin",
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


def _nps_inches(inches):
    """Diameters [in] with those within :data:`_NPS_MATCH_INCH` of a listed NPS outside diameter set to it."""
    x = np.asarray(inches, dtype=float)
    index = np.abs(x[..., None] - _NPS_INCHES).argmin(axis=-1)
    nearest = _NPS_INCHES[index]
    return np.where(np.abs(nearest - x) <= _NPS_MATCH_INCH[index], nearest, x)


_CELSIUS = re.compile(r"(-?\d+(?:\.\d+)?) ?(?:degC|°C)")
#: A number of kelvin in a message at or above this is a temperature, below it a difference (margins of a
#: few K; no air or surface convlib handles is below 150 K).
_ABSOLUTE_KELVIN = 150.0
_KELVIN = re.compile(r"(?<![\w.])(\d+(?:\.\d+)?) K\b")
_PI = re.compile(r"\bpi\b")
_POWER = re.compile(r"\^(-?\d)")
_SUPERSCRIPT = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")


def scientific(value: float | None, digits: int = 2) -> str:
    """A dimensionless group as engineers write it: ``56000`` -> ``"5.6×10⁴"``; plain between 0.01 and 1000.

    >>> scientific(56000.0), scientific(3.14159), scientific(0.000123), scientific(1e9)
    ('5.6×10⁴', '3.1', '1.2×10⁻⁴', '1×10⁹')
    """
    if value is None or not math.isfinite(value):
        return "–"
    if value == 0 or 0.01 <= abs(value) < 1000:
        return f"{value:.{digits}g}"
    exponent = math.floor(math.log10(abs(value)))
    mantissa = round(value / 10.0 ** exponent, digits - 1)
    if abs(mantissa) >= 10:
        mantissa, exponent = mantissa / 10, exponent + 1
    text = f"{mantissa:.{digits - 1}f}".rstrip("0").rstrip(".")
    return f"{text}×10{str(exponent).translate(_SUPERSCRIPT)}"


def regime_text(mode: str, flow: str) -> str:
    """What a convection mode and flow regime mean, e.g. ``"forced, laminar boundary layer"``.

    The flow regime is that of the boundary layer on the surface (a cross-flow at Re 5×10⁴ is
    turbulent in the wake, yet its boundary layer is still laminar).

    >>> regime_text("forced", "laminar"), regime_text("natural", "turbulent")
    ('forced, laminar boundary layer', 'natural, turbulent boundary layer')
    """
    return f"{mode}, {flow} boundary layer"


def shape_name(key: str) -> str:
    """Readable name of a shape of the line panel, e.g. ``"horizontal pipe or cylinder"``."""
    return _SHAPE_NAMES.get(key, key.replace("_", " "))


def geometry_name(key: str) -> str:
    """Readable name of a geometry of the correlation registry, e.g. ``"cylinder in cross-flow"``."""
    return _GEOMETRY_NAMES.get(key, key.replace("_", " "))


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
    '104 Btu/h·ft'
    >>> d.text(0.1683, "diameter")  # NPS 6: 168.3 mm in the metric table, 6.625 in in the inch one
    '6.625 in'
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
        unit = self.unit(name)
        shown = from_si(np.asarray(si, dtype=float), quantity_kind(name), unit)
        if name == "diameter" and unit == "inch":
            shown = _nps_inches(shown)
        return shown

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

    def fill(self, template: str, values: dict) -> str:
        """``template`` with each ``{name}`` replaced by the text of ``values[name]`` (``{"value": SI value,
        "kind": kind of quantity}``) in this unit system (:func:`convlib.demo.fill_template`).

        >>> Display("US").fill("{run} at {wind}", {"run": {"value": 1400.0, "kind": "length"},
        ...                                        "wind": {"value": 5.0, "kind": "speed"}})
        '4,593 ft at 11.2 mph'
        """
        def text(name, entry):
            shown = self.text(entry["value"], _KIND_QUANTITY[entry["kind"]])
            return shown + "(a)" if entry["kind"] == "pressure" else shown  # convlib's pressures are absolute

        return fill_template(template, values, text)

    def localize(self, text: str) -> str:
        """``text`` (a message of convlib, written in °C and K and plain-text formulas) with its
        temperatures in this unit system and its formulas in proper notation (π D²/4, not pi D^2/4).

        >>> Display("US").localize("surfaces above about 60 degC can burn; margin 3 K; boils at 373.15 K")
        'surfaces above about 140 °F can burn; margin 5.4 °F; boils at 212.0 °F'
        >>> Display("SI").localize("at 60 degC; heat per area times pi D^2/4")
        'at 60 °C; heat per area times π D²/4'
        """
        def celsius(match):
            number = match.group(1)
            if self.system == "SI":
                return f"{number} {self.label('air_temperature')}"
            decimals = len(number.split(".")[1]) if "." in number else 0
            value = self.scalar(float(number) + 273.15, "air_temperature")
            return f"{value:.{decimals}f} {self.label('air_temperature')}"

        def kelvin(match):
            if self.system == "SI":
                return match.group(0)
            number = float(match.group(1))
            if number >= _ABSOLUTE_KELVIN:  # a temperature (boiling point 453.03 K), not a difference
                return f"{self.scalar(number, 'air_temperature'):.1f} {self.label('air_temperature')}"
            value = self.scalar(number, "temperature_difference")
            return f"{value:.3g} {self.label('temperature_difference')}"

        text = _KELVIN.sub(kelvin, _CELSIUS.sub(celsius, text))
        text = _PI.sub("π", text)
        return _POWER.sub(lambda m: m.group(1).translate(_SUPERSCRIPT), text)

    def axis_title(self, name: str, text: str | None = None) -> str:
        """Axis title with unit in brackets, e.g. ``"Wind speed [m/s]"``."""
        unit = self.label(name)
        text = text or input_label(name)
        return text if unit == "–" else f"{text} [{unit}]"
