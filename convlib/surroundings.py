"""The air and everything else around a pipe, duct or vessel: one validated object.

:class:`Surroundings` is built once (from keywords, a study case, a weather hour or a
line-list row) and passed to every equipment function (``surroundings=``). Each of those
functions also takes the same fields as plain keywords for convenience; they build the
same object through :func:`resolve`, so a value means the same in either form.

Every field is numeric (scalar or array, broadcast with the equipment's own inputs), SI,
temperatures in kelvin; ``None`` means "derived", as documented per field.
"""
from __future__ import annotations

from dataclasses import dataclass, fields, replace
from typing import Any

import numpy as np

from .errors import InputError
from .validation import SOLAR_IRRADIANCE_MAX, WIND_SPEED_MAX, as_array, as_bounded, check_choice

__all__ = ["Surroundings", "SURROUNDINGS_FIELDS", "WIND_DIRECTIONS", "STANDARD_PRESSURE", "resolve"]

#: Standard atmosphere at sea level [Pa] (ISO 2533:1975).
STANDARD_PRESSURE = 101325.0

#: Direction of the wind relative to the axis of a line or duct.
WIND_DIRECTIONS = ("across", "along")


@dataclass(frozen=True, eq=False)
class Surroundings:
    r"""What a surface exchanges heat with: air, wind, humidity, radiant surroundings, sky, ground and sun.

    Parameters
    ----------
    air_temperature : numeric
        Dry-bulb air temperature :math:`T_a` [K].
    pressure : numeric
        Air pressure [Pa]; default the standard atmosphere, 101325 Pa (lower at altitude: natural
        convection weakens).
    wind_speed : numeric
        Wind speed [m/s], 0 to 100 (incompressible flow); 0 is still air.
    wind_direction : {"across", "along"}
        Wind relative to the axis of a line or duct: ``"across"`` (normal to it, cross-flow; the
        only direction with laws for cylinders) or ``"along"`` (ducts: plates in parallel flow).
    relative_humidity : numeric, optional
        Relative humidity [-], 0 to 1 (over liquid water above 0 degC); needed only for dew-point
        (condensation) checks.
    surroundings_temperature : numeric, optional
        Mean radiant temperature of walls, equipment and ground in view [K]; default the air.
    sky_view_fraction : numeric
        Part of the surface's view taken by the sky [-], 0 indoors; outdoors e.g. 0.5 for a
        horizontal line (:data:`convlib.radiation.SKY_VIEW_FRACTION_TYPICAL`).
    sky_temperature : numeric, optional
        Effective sky temperature [K]; default a clear sky after Swinbank (1963) where the sky is
        in view.
    ground_temperature : numeric, optional
        Temperature of the soil under a tank floor [K]; default the air.
    solar_irradiance : numeric
        Solar irradiance on the projected area [W/m2], 0 to 1400 (about the solar constant).

    Examples
    --------
    >>> s = Surroundings(air_temperature=268.15, wind_speed=5.0, sky_view_fraction=0.5)
    >>> float(s.wind_speed), s.wind_direction
    (5.0, 'across')
    >>> Surroundings(air_temperature=293.15, relative_humidity=80)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: relative_humidity must be at most 1; got 80.0 (a fraction 0-1: 80 % is 0.8)
    """

    air_temperature: Any
    pressure: Any = STANDARD_PRESSURE
    wind_speed: Any = 0.0
    wind_direction: str = "across"
    relative_humidity: Any = None
    surroundings_temperature: Any = None
    sky_view_fraction: Any = 0.0
    sky_temperature: Any = None
    ground_temperature: Any = None
    solar_irradiance: Any = 0.0

    def __post_init__(self):
        kelvin = dict(unit="K", low=0.0, low_inclusive=False)
        checked = {
            "air_temperature": as_array("air_temperature", self.air_temperature, **kelvin),
            "pressure": as_array("pressure", self.pressure, unit="Pa", low=0.0, low_inclusive=False),
            "wind_speed": as_bounded("wind_speed", self.wind_speed, unit="m/s", accepted=(0.0, WIND_SPEED_MAX)),
            "sky_view_fraction": as_array("sky_view_fraction", self.sky_view_fraction, low=0.0, high=1.0),
            "solar_irradiance": as_bounded("solar_irradiance", self.solar_irradiance, unit="W/m2",
                                           accepted=(0.0, SOLAR_IRRADIANCE_MAX)),
        }
        check_choice("wind_direction", self.wind_direction, WIND_DIRECTIONS)
        if self.relative_humidity is not None:
            rh = np.asarray(self.relative_humidity, dtype=float) if _numeric(self.relative_humidity) else None
            if rh is not None and np.any(rh > 1.0) and np.all(rh <= 100.0):
                raise InputError(f"relative_humidity must be at most 1; got {float(np.max(rh))!r} (a fraction 0-1: "
                                 f"{float(np.max(rh)):g} % is {float(np.max(rh)) / 100:g})",
                                 field="relative_humidity", rule="a fraction 0-1", value=float(np.max(rh)))
            checked["relative_humidity"] = as_array("relative_humidity", self.relative_humidity, low=0.0, high=1.0,
                                                    low_inclusive=False)
        for name in ("surroundings_temperature", "sky_temperature", "ground_temperature"):
            if getattr(self, name) is not None:
                checked[name] = as_array(name, getattr(self, name), **kelvin)
        for name, value in checked.items():
            object.__setattr__(self, name, value)

    # ---- derived values (per point; no cross-talk between points)
    @property
    def radiant_temperature(self) -> np.ndarray:
        """Surroundings temperature with its default applied [K]."""
        return self.air_temperature if self.surroundings_temperature is None else self.surroundings_temperature

    @property
    def soil_temperature(self) -> np.ndarray:
        """Ground temperature with its default applied [K]."""
        return self.air_temperature if self.ground_temperature is None else self.ground_temperature

    @property
    def shape(self) -> tuple[int, ...]:
        """Broadcast shape of the numeric fields."""
        return np.broadcast_shapes(*(np.shape(getattr(self, f.name)) for f in fields(self)
                                     if f.name != "wind_direction" and getattr(self, f.name) is not None))

    def replace(self, **changes) -> "Surroundings":
        """A copy with some fields changed (validated again)."""
        return replace(self, **changes)

    def surface_keywords(self) -> dict[str, Any]:
        """The fields :class:`convlib.surface.OuterSurface` takes, by their keyword names."""
        return {"air_temperature": self.air_temperature, "wind_speed": self.wind_speed,
                "surroundings_temperature": self.surroundings_temperature,
                "sky_view_fraction": self.sky_view_fraction, "sky_temperature": self.sky_temperature,
                "solar_irradiance": self.solar_irradiance, "pressure": self.pressure}

    def as_dict(self) -> dict[str, Any]:
        """Every field by name (``None`` where derived)."""
        return {f.name: getattr(self, f.name) for f in fields(self)}


#: Names of the fields of :class:`Surroundings`, the keywords every equipment function accepts.
SURROUNDINGS_FIELDS = tuple(f.name for f in fields(Surroundings))


def _numeric(value) -> bool:
    try:
        np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        return False
    return True


def resolve(surroundings: Surroundings | None = None, *, air_temperature=None, pressure=None, wind_speed=None,
            wind_direction=None, relative_humidity=None, surroundings_temperature=None, sky_view_fraction=None,
            sky_temperature=None, ground_temperature=None, solar_irradiance=None) -> Surroundings:
    """The :class:`Surroundings` of a call: the object given, or one built from its fields as keywords.

    ``None`` means "not given". Giving the object and any keyword together is refused (the two could disagree).

    Examples
    --------
    >>> float(resolve(air_temperature=293.15, wind_speed=None).wind_speed)
    0.0
    >>> resolve(Surroundings(293.15), wind_speed=3.0)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: give the surroundings either as surroundings=Surroundings(...) or as keywords, not both; got both and wind_speed
    """
    keywords = dict(air_temperature=air_temperature, pressure=pressure, wind_speed=wind_speed,
                    wind_direction=wind_direction, relative_humidity=relative_humidity,
                    surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                    sky_temperature=sky_temperature, ground_temperature=ground_temperature,
                    solar_irradiance=solar_irradiance)
    given = {name: value for name, value in keywords.items() if value is not None}
    if surroundings is not None:
        if not isinstance(surroundings, Surroundings):
            raise InputError(f"surroundings must be a convlib.Surroundings; got {type(surroundings).__name__}",
                             field="surroundings", rule="a Surroundings object", value=repr(surroundings)[:80])
        if given:
            raise InputError("give the surroundings either as surroundings=Surroundings(...) or as keywords, not "
                             f"both; got both and {', '.join(sorted(given))}", field=", ".join(sorted(given)),
                             rule="surroundings object or keywords", value=sorted(given))
        return surroundings
    if "air_temperature" not in given:
        raise InputError("air_temperature is required (or give surroundings=Surroundings(air_temperature=...))",
                         field="air_temperature", rule="required", value=None)
    return Surroundings(**given)
