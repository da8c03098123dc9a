r"""Mixed (combined free and forced) convection.

Churchill's combination of the two limiting laws,

.. math:: Nu^n = Nu_F^n \pm Nu_N^n,

with "+" when buoyancy assists the forced flow or acts across it (a pipe in a
horizontal wind is transverse) and "-" when it opposes it.

References
----------
Churchill, S.W. (1977). A comprehensive correlating equation for laminar,
assisting, forced and free convection. AIChE J. 23:10-16. doi:10.1002/aic.690230103
"""
from __future__ import annotations

import numpy as np

from ..validation import check_choice

__all__ = ["combine", "default_mixing_exponent", "FLOW_DIRECTIONS", "OPPOSING_FLOOR_FRACTION"]

FLOW_DIRECTIONS = ("transverse", "assisting", "opposing")

#: Default exponent n by (direction, body). n = 3 is the usual value for assisting
#: and opposing flows (Churchill 1977); for transverse flow over cylinders and
#: spheres n = 4 fits better, as quoted in Incropera et al., Fundamentals of Heat
#: and Mass Transfer, 6th ed., section 9.9 (from memory).
_DEFAULT_EXPONENT = {
    ("transverse", "round"): 4.0,
    ("transverse", "flat"): 3.0,
    ("assisting", "round"): 3.0,
    ("assisting", "flat"): 3.0,
    ("opposing", "round"): 3.0,
    ("opposing", "flat"): 3.0,
}

#: Opposing flows use |Nu_F^n - Nu_N^n|^(1/n): the stronger mechanism sets the flow
#: (with no wind the result is purely natural). Where the two are of nearly equal
#: strength the formula tends to zero, which no data support (the flow separates or
#: reverses); the result is floored at this fraction of the larger limit and flagged.
#: Project choice, no source.
OPPOSING_FLOOR_FRACTION = 0.5


def default_mixing_exponent(direction: str, round_body: bool) -> float:
    """Default Churchill exponent for a flow direction and body type.

    Examples
    --------
    >>> default_mixing_exponent("transverse", round_body=True)
    4.0
    >>> default_mixing_exponent("opposing", round_body=False)
    3.0
    """
    check_choice("flow direction", direction, FLOW_DIRECTIONS)
    return _DEFAULT_EXPONENT[(direction, "round" if round_body else "flat")]


def combine(forced, natural, exponent=3.0, direction="transverse"):
    r"""Combine forced and natural coefficients (Nusselt numbers or h on one basis).

    Parameters
    ----------
    forced : numeric
        Forced-convection value (0 where there is no wind) [-] or [W/m2/K]
    natural : numeric
        Natural-convection value on the same basis
    exponent : numeric
        Churchill exponent n [-], > 0
    direction : {"transverse", "assisting", "opposing"}
        How buoyancy acts relative to the forced flow.

    Returns
    -------
    value : numpy.ndarray
        Combined value, same basis as the inputs.
    floored : numpy.ndarray of bool
        True where opposing flow was floored (see :data:`OPPOSING_FLOOR_FRACTION`).

    Examples
    --------
    >>> value, floored = combine(30.0, 10.0, exponent=3.0, direction="assisting")
    >>> round(float(value), 3), bool(floored)
    (30.366, False)
    >>> value, floored = combine(10.0, 10.2, direction="opposing")
    >>> float(value), bool(floored)
    (5.1, True)
    >>> value, floored = combine(0.0, 12.0, direction="opposing")
    >>> float(value), bool(floored)
    (12.0, False)
    """
    check_choice("flow direction", direction, FLOW_DIRECTIONS)
    forced = np.asarray(forced, dtype=float)
    natural = np.asarray(natural, dtype=float)
    n = np.asarray(exponent, dtype=float)
    if direction == "opposing":
        # The stronger mechanism sets the flow; the weaker one opposes it. Near equality
        # the formula tends to zero, which no data support: floor and flag there.
        value = np.abs(forced ** n - natural ** n) ** (1.0 / n)
        floor = OPPOSING_FLOOR_FRACTION * np.maximum(forced, natural)
        floored = value < floor
        return np.where(floored, floor, value), floored
    value = (forced ** n + natural ** n) ** (1.0 / n)
    return value, np.zeros(np.shape(value), dtype=bool)
