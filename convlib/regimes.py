"""Regime classification and validity flags, kept as integer codes per point.

Per-point strings would slow the hot path, so results carry small integer
codes (convection mode, flow regime) and a bit mask of warnings; the
functions here turn them into readable text when someone asks.
"""
from __future__ import annotations

import numpy as np

__all__ = [
    "NATURAL", "MIXED", "FORCED", "MODE_NAMES",
    "LAMINAR", "TRANSITIONAL", "TURBULENT", "FLOW_NAMES",
    "RICHARDSON_NATURAL_ABOVE", "RICHARDSON_FORCED_BELOW",
    "Flag", "FLAG_TEXT",
    "convection_mode", "flow_regime", "mode_names", "flow_names", "describe_flags", "summarize_flags",
]

# Convection mode codes.
NATURAL, MIXED, FORCED = 0, 1, 2
MODE_NAMES = ("natural", "mixed", "forced")

# Flow regime codes.
LAMINAR, TRANSITIONAL, TURBULENT = 0, 1, 2
FLOW_NAMES = ("laminar", "transitional", "turbulent")

#: Richardson number Ri = Gr/Re^2 limits: buoyancy negligible below 0.1, forced flow
#: negligible above 10. Common practice, no source (the order-of-magnitude statement
#: "Gr/Re^2 << 1 forced, >> 1 free" is in Incropera et al., 6th ed., section 9.9).
RICHARDSON_FORCED_BELOW = 0.1
RICHARDSON_NATURAL_ABOVE = 10.0

#: Laminar / turbulent limits per geometry: (group, laminar below, turbulent above).
#: Natural convection: transition near Ra = 1e9 on vertical surfaces (Incropera et al.,
#: 6th ed., section 9.6, from memory) and taken alike for cylinders and spheres; the hot-face-up
#: plate turns turbulent near Ra = 1e7 (McAdams 1954); the hot-face-down plate stays laminar.
#: Cross-flow: the critical Re of a cylinder is about 2e5, supercritical above about 1e6
#: (Zukauskas 1972); a flat plate's boundary layer turns at Re = 5e5. Common practice otherwise.
FLOW_LIMITS = {
    "horizontal_cylinder": ("Ra", 1e9, 1e10),
    "vertical_plate": ("Ra", 1e9, 1e10),
    "vertical_cylinder": ("Ra", 1e9, 1e10),
    "horizontal_plate_up": ("Ra", 1e7, 1e8),
    "horizontal_plate_down": ("Ra", np.inf, np.inf),
    "sphere": ("Ra", 1e9, 1e10),
    "cylinder_crossflow": ("Re", 2e5, 1e6),
    "sphere_crossflow": ("Re", 2e5, 1e6),
    "plate_parallel_flow": ("Re", 5e5, 1e6),
}


class Flag:
    """Bits of the per-point warning mask."""

    NATURAL_OUT_OF_RANGE = 1
    FORCED_OUT_OF_RANGE = 2
    PRANDTL_OUT_OF_RANGE = 4
    FLUID_NOT_FITTED = 8
    OPPOSING_FLOW_FLOORED = 16
    SLENDER_CYLINDER_CORRECTED = 32
    PROPERTY_RATIO_OUT_OF_RANGE = 64
    NOT_CONVERGED = 128
    CONDUCTIVITY_EXTRAPOLATED = 256
    COEFFICIENT_GIVEN = 512
    #: Bits that report what was done rather than a loss of validity: they do not make
    #: ``strict=True`` raise.
    INFORMATIONAL = SLENDER_CYLINDER_CORRECTED | COEFFICIENT_GIVEN


FLAG_TEXT = {
    Flag.NATURAL_OUT_OF_RANGE: "natural-convection correlation used outside its Rayleigh/Grashof range (extrapolated)",
    Flag.FORCED_OUT_OF_RANGE: "forced-convection correlation used outside its Reynolds range (extrapolated)",
    Flag.PRANDTL_OUT_OF_RANGE: "correlation used outside its Prandtl-number range",
    Flag.FLUID_NOT_FITTED: "correlation was fitted for air only and is used for another fluid",
    Flag.OPPOSING_FLOW_FLOORED: "opposing buoyancy close to the forced flow in strength: no correlation applies; value floored",
    Flag.SLENDER_CYLINDER_CORRECTED: "slender vertical cylinder: curvature adds over 5 % to the plate law (Popiel et al. 2007)",
    Flag.PROPERTY_RATIO_OUT_OF_RANGE: "surface-to-stream property ratio outside the correlation's range",
    Flag.NOT_CONVERGED: "surface-temperature solution did not converge",
    Flag.CONDUCTIVITY_EXTRAPOLATED: "a layer's temperature lies outside its conductivity data (held at the end value)",
    Flag.COEFFICIENT_GIVEN: "convective coefficient given by the user: no correlation used (radiation still computed)",
}


def convection_mode(richardson, wind_speed):
    """Mode code per point from the Richardson number; no wind is always natural.

    Examples
    --------
    >>> convection_mode([50.0, 1.0, 0.01, np.inf], [1.0, 1.0, 1.0, 0.0]).tolist()
    [0, 1, 2, 0]
    """
    ri = np.asarray(richardson, dtype=float)
    still = np.asarray(wind_speed, dtype=float) <= 0.0
    mode = np.where(ri > RICHARDSON_NATURAL_ABOVE, NATURAL, np.where(ri < RICHARDSON_FORCED_BELOW, FORCED, MIXED))
    return np.where(still, NATURAL, mode).astype(np.int8)


def flow_regime(geometry: str, value):
    """Flow regime code per point for a geometry, from its Ra (natural) or Re (forced).

    A value equal to a limit belongs to the lower regime.

    Examples
    --------
    >>> flow_regime("horizontal_cylinder", [1e6, 5e9, 1e11]).tolist()
    [0, 1, 2]
    """
    _, lower, upper = FLOW_LIMITS[geometry]
    value = np.asarray(value, dtype=float)
    return np.where(value <= lower, LAMINAR, np.where(value <= upper, TRANSITIONAL, TURBULENT)).astype(np.int8)


def mode_names(codes) -> np.ndarray:
    """Readable convection mode per point.

    >>> mode_names([0, 2]).tolist()
    ['natural', 'forced']
    """
    return np.asarray(np.asarray(MODE_NAMES, dtype=object)[np.asarray(codes, dtype=int)], dtype=object)


def flow_names(codes) -> np.ndarray:
    """Readable flow regime per point.

    >>> flow_names([0, 1]).tolist()
    ['laminar', 'transitional']
    """
    return np.asarray(np.asarray(FLOW_NAMES, dtype=object)[np.asarray(codes, dtype=int)], dtype=object)


def describe_flags(mask: int) -> list[str]:
    """Texts of the bits set in one point's mask.

    >>> describe_flags(Flag.NATURAL_OUT_OF_RANGE | Flag.FLUID_NOT_FITTED)[1]
    'correlation was fitted for air only and is used for another fluid'
    """
    mask = int(mask)
    return [text for bit, text in FLAG_TEXT.items() if mask & bit]


def summarize_flags(masks) -> list[str]:
    """One line per warning that occurs anywhere in an array of masks, with its count.

    >>> summarize_flags(np.array([0, 1, 1, 0]))
    ['natural-convection correlation used outside its Rayleigh/Grashof range (extrapolated) (2 of 4 points)']
    """
    masks = np.asarray(masks, dtype=np.int64)
    total = masks.size
    lines = []
    for bit, text in FLAG_TEXT.items():
        count = int(np.count_nonzero(masks & bit))
        if count:
            lines.append(text if total == 1 else f"{text} ({count} of {total} points)")
    return lines
