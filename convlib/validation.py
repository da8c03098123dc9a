"""Input checks shared by every public function.

Every check raises :class:`~convlib.errors.InputError` (a :class:`ValueError`)
whose message names the field, the allowed range (with units) and the value that
was given, so that a user of the command line or the dashboard can correct the
input without reading code; its attributes ``field``, ``rule`` and ``value`` hold
the same for programs.
"""
from __future__ import annotations

import numpy as np

from .errors import InputError

__all__ = ["as_array", "check_choice"]


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
