"""Input checks shared by every public function.

Every check raises :class:`~convlib.errors.InputError` (a :class:`ValueError`)
whose message names the field, the allowed range (with units) and the value that
was given, so that a user of the command line or the dashboard can correct the
input without reading code; its attributes ``field``, ``rule`` and ``value`` hold
the same for programs.
"""
from __future__ import annotations

import math

import numpy as np

from .errors import InputError

__all__ = ["as_array", "as_bounded", "as_size", "check_choice", "check_groups", "GROUP_RANGES", "SIZE_RANGE",
           "WIND_SPEED_MAX", "SOLAR_IRRADIANCE_MAX", "LAYER_THICKNESS_MAX", "CONVECTION_COEFFICIENT_MAX",
           "CONVECTION_FACTOR_MAX", "MIXING_EXPONENT_RANGE"]

# ---- accepted input ranges: physically meaningful ones. Outside them a result would overflow to inf,
# lose every digit, or describe nothing real, so the input is refused (InputError) instead.
# Temperatures and pressures are bounded by the fluid's property data (convlib.properties).
#: Sizes of a body [m] (diameter, length, height, width): a 1 um wire to a 1000 km run.
SIZE_RANGE = (1e-6, 1e6)
#: Wind or air speed [m/s]: the models take incompressible flow, Mach < 0.3 (about 100 m/s in air;
#: common practice, no source); the strongest gusts measured are about 113 m/s (from memory).
WIND_SPEED_MAX = 100.0
#: Solar irradiance on a surface [W/m2]: the solar constant is 1361 W/m2 (Kopp & Lean (2011),
#: Geophys. Res. Lett. 38:L01706), which no surface on the ground exceeds without concentration.
SOLAR_IRRADIANCE_MAX = 1400.0
#: Thickness of one insulation (or other) layer [m].
LAYER_THICKNESS_MAX = 10.0
#: A convective (or inside film) coefficient given by the user [W/m2/K]: above condensing steam
#: (about 1e4-1e5) with room for "the surface is at the fluid temperature" studies.
CONVECTION_COEFFICIENT_MAX = 1e8
#: Multiplier on a convective coefficient (model-form studies) [-].
CONVECTION_FACTOR_MAX = 1e3
#: Churchill's (1977) mixed-convection exponent n [-]: 3 (transverse) or 4 in the source; 1 adds the
#: coefficients, large n takes the larger one.
MIXING_EXPONENT_RANGE = (0.5, 20.0)

#: Accepted ranges of the dimensionless groups given to :func:`convlib.correlations.nusselt` (inclusive).
#: Far wider than any published correlation (their own ranges are flagged, not refused); beyond them a
#: number has no physical meaning for convection to or from air and overflows in the power laws.
#: Ra: 1e20 is a 1 km body 1000 K above the air; Re: 1e12; Pr: liquid metals (~1e-3) to heavy oils.
GROUP_RANGES = {"Ra": (0.0, 1e20), "Re": (0.0, 1e12), "Pr": (1e-4, 1e6), "Pr_s": (1e-4, 1e6),
                "viscosity_ratio": (1e-6, 1e6), "diameter_over_length": (1e-9, 1e9)}


def _show(values: np.ndarray) -> str:
    """Short text of the offending values (first few of an array)."""
    flat = np.asarray(values).ravel()
    if flat.size == 1:
        return repr(flat[0].item())
    shown = ", ".join(repr(v.item()) for v in flat[:3])
    more = f", ... ({flat.size} values)" if flat.size > 3 else ""
    return f"[{shown}{more}]"


def _values(wrong: np.ndarray):
    """The offending values for ``InputError.value``: a float for one, else a flat array."""
    flat = np.asarray(wrong, dtype=float).ravel()
    return float(flat[0]) if flat.size == 1 else flat


def as_array(
    name: str,
    value,
    *,
    unit: str = "",
    low: float | None = None,
    high: float | None = None,
    low_inclusive: bool = True,
    high_inclusive: bool = True,
) -> np.ndarray:
    """Return ``value`` as a float array after checking it.

    Parameters
    ----------
    name : str
        Field name used in the message, e.g. ``"diameter"``.
    value : numeric
        Scalar, list or array.
    unit : str
        Unit shown in the message, e.g. ``"m"`` or ``"K"``.
    low, high : float, optional
        Allowed range; ``None`` means unbounded on that side.
    low_inclusive, high_inclusive : bool
        Whether the bounds themselves are allowed.

    Raises
    ------
    InputError
        If the value is not numeric, not finite, or outside the range (a ``ValueError``).

    Examples
    --------
    >>> as_array("diameter", [0.1, 0.2], unit="m", low=0, low_inclusive=False)
    array([0.1, 0.2])
    >>> as_array("emissivity", 1.2, low=0, high=1)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: emissivity must be between 0 and 1; got 1.2
    """
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a number or an array of numbers; got {value!r}",
                         field=name, rule="a number or an array of numbers", value=value) from None
    if _within(arr, low, high, low_inclusive, high_inclusive):
        return arr
    unit_text = f" {unit}" if unit else ""
    bad = ~np.isfinite(arr)
    if bad.any():
        raise InputError(f"{name} must be a finite number; got {_show(arr[bad])}",
                         field=name, rule="a finite number", value=_values(arr[bad]))
    too_low = too_high = np.zeros(arr.shape, dtype=bool)
    if low is not None:
        too_low = arr < low if low_inclusive else arr <= low
    if high is not None:
        too_high = arr > high if high_inclusive else arr >= high
    if too_low.any() or too_high.any():
        parts = []
        if low is not None:
            parts.append(f"{'at least' if low_inclusive else 'greater than'} {low:g}{unit_text}")
        if high is not None:
            parts.append(f"{'at most' if high_inclusive else 'less than'} {high:g}{unit_text}")
        rule = " and ".join(parts)
        if low is not None and high is not None and low_inclusive and high_inclusive:
            rule = f"between {low:g} and {high:g}{unit_text}"
        wrong = arr[too_low | too_high]
        raise InputError(f"{name} must be {rule}; got {_show(wrong)}{unit_text}", field=name, rule=rule,
                         value=_values(wrong))
    return arr


def _within(arr: np.ndarray, low, high, low_inclusive: bool, high_inclusive: bool) -> bool:
    """True when every value is finite and inside the bounds (two reductions; NaN fails through min/max)."""
    if arr.size == 0:
        return True
    if arr.dtype.kind not in "fiu":
        return False
    smallest, largest = float(arr.min()), float(arr.max())
    if not (math.isfinite(smallest) and math.isfinite(largest)):
        return False
    if low is not None and (smallest < low if low_inclusive else smallest <= low):
        return False
    return high is None or (largest <= high if high_inclusive else largest < high)


def check_choice(name: str, value, choices) -> str:
    """Check that ``value`` is one of ``choices``; the error lists them.

    Examples
    --------
    >>> check_choice("shape", "sphere", ["sphere", "vertical_plate"])
    'sphere'
    >>> check_choice("shape", "cube", ["sphere", "vertical_plate"])
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: unknown shape 'cube'; choose one of: sphere, vertical_plate
    """
    choices = list(choices)
    if value not in choices:
        rule = f"one of: {', '.join(map(str, choices))}"
        raise InputError(f"unknown {name} {value!r}; choose {rule}", field=name, rule=rule, value=value)
    return value


def check_groups(**groups) -> dict[str, np.ndarray]:
    """Dimensionless groups as arrays, each within :data:`GROUP_RANGES` (``None`` passes through).

    >>> check_groups(Ra=1e6, Pr=None)["Ra"].item()
    1000000.0
    >>> check_groups(Pr=1e300)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: Pr must be between 0.0001 and 1e+06; got 1e+300
    """
    out = {}
    for name, value in groups.items():
        if value is None:
            out[name] = None
            continue
        low, high = GROUP_RANGES.get(name, (None, None))
        out[name] = as_array(name, value, low=low, high=high)
    return out


def as_bounded(name: str, value, *, unit: str = "", low: float = 0.0, low_inclusive: bool = True,
               accepted: tuple[float, float]) -> np.ndarray:
    """``value`` checked against its sign rule (``low``) first, then against its ``accepted`` range.

    Two steps so that a wrong sign reads as such ("must be at least 0") and only a value of the right
    sign but outside what is physically meaningful meets the accepted range.

    >>> as_bounded("wind_speed", 1e3, unit="m/s", accepted=(0.0, 100.0))
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: wind_speed must be between 0 and 100 m/s; got 1000.0 m/s
    """
    as_array(name, value, unit=unit, low=low, low_inclusive=low_inclusive)
    return as_array(name, value, unit=unit, low=accepted[0], high=accepted[1])


def as_size(name: str, value) -> np.ndarray:
    """A size [m]: greater than 0, then within :data:`SIZE_RANGE`.

    >>> as_size("diameter", 0.1).item()
    0.1
    >>> as_size("diameter", 1e9)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: diameter must be between 1e-06 and 1e+06 m; got 1000000000.0 m
    """
    return as_bounded(name, value, unit="m", low_inclusive=False, accepted=SIZE_RANGE)
