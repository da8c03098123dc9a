r"""Shapes of exposed surfaces: which sizes they take, their areas and characteristic lengths.

Conventions (all sizes in metres):

=====================  =================  ==================  ==================  =====================
shape                  sizes              natural length      forced length       heat per "length" of
=====================  =================  ==================  ==================  =====================
horizontal_cylinder    diameter, length*  diameter            diameter            length (per metre run)
vertical_cylinder      diameter, length   length (height)     diameter            length (height)
sphere                 diameter           diameter            diameter            diameter
vertical_plate         height, width      height              width               width
horizontal_plate_up    length, width      area / perimeter    length              length
horizontal_plate_down  length, width      area / perimeter    length              length
=====================  =================  ==================  ==================  =====================

\* default 1 m. A cylinder's area is its side only (ends neglected); a plate's area is the one
exposed face. Wind is horizontal: across a cylinder or sphere, along a plate.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .validation import as_array, check_choice

__all__ = ["ShapeInfo", "SHAPES", "Dimensions", "dimensions"]


@dataclass(frozen=True)
class ShapeInfo:
    """How a shape maps onto the correlation registry."""

    name: str
    sizes: tuple[str, ...]
    natural_geometry: str          # registry geometry when hot (or the face it presents)
    natural_geometry_cold: str     # registry geometry when the surface is colder than the air
    forced_geometry: str
    round_body: bool               # for the mixed-convection exponent
    default_natural: str
    default_forced: str
    sky_view_fraction: float       # typical view of the sky in the open (common practice, no source)


SHAPES: dict[str, ShapeInfo] = {
    s.name: s
    for s in (
        ShapeInfo("horizontal_cylinder", ("diameter", "length"), "horizontal_cylinder", "horizontal_cylinder",
                  "cylinder_crossflow", True, "churchill_chu", "churchill_bernstein", 0.5),
        ShapeInfo("vertical_cylinder", ("diameter", "length"), "vertical_cylinder", "vertical_cylinder",
                  "cylinder_crossflow", True, "churchill_chu", "churchill_bernstein", 0.5),
        ShapeInfo("sphere", ("diameter",), "sphere", "sphere", "sphere_crossflow", True, "churchill", "whitaker", 0.5),
        ShapeInfo("vertical_plate", ("height", "width"), "vertical_plate", "vertical_plate", "plate_parallel_flow",
                  False, "churchill_chu", "mixed_layer", 0.5),
        # A face looking up behaves as a hot-face-up plate when hot and as a hot-face-down plate when cold.
        ShapeInfo("horizontal_plate_up", ("length", "width"), "horizontal_plate_up", "horizontal_plate_down",
                  "plate_parallel_flow", False, "mcadams", "mixed_layer", 1.0),
        ShapeInfo("horizontal_plate_down", ("length", "width"), "horizontal_plate_down", "horizontal_plate_up",
                  "plate_parallel_flow", False, "mcadams", "mixed_layer", 0.0),
    )
}


@dataclass(frozen=True)
class Dimensions:
    """Areas and lengths of a shape (arrays broadcast over the sizes)."""

    area: np.ndarray               # exposed area [m2]
    projected_area: np.ndarray     # area seen by the sun from the direction of highest gain [m2]
    natural_length: np.ndarray     # characteristic length of the natural-convection law [m]
    forced_length: np.ndarray      # characteristic length of the forced-convection law [m]
    run_length: np.ndarray         # length that "per length" results divide by [m]
    diameter_over_length: np.ndarray | None  # D/L of a vertical cylinder, else None


def dimensions(shape: str, *, diameter=None, length=None, height=None, width=None) -> Dimensions:
    """Areas and characteristic lengths of a shape from its sizes [m].

    Sizes a shape does not take must be left ``None``; missing ones raise
    ``InputError`` (a ``ValueError``) naming them.

    Examples
    --------
    >>> d = dimensions("horizontal_cylinder", diameter=0.2, length=3.0)
    >>> round(float(d.area), 4), float(d.natural_length)
    (1.885, 0.2)
    >>> d = dimensions("horizontal_plate_up", length=2.0, width=1.0)
    >>> round(float(d.natural_length), 4)
    0.3333
    >>> dimensions("sphere", diameter=0.5, width=1.0)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: a sphere takes diameter; width does not apply
    """
    check_choice("shape", shape, SHAPES)
    info = SHAPES[shape]
    given = {"diameter": diameter, "length": length, "height": height, "width": width}
    extra = [k for k, v in given.items() if v is not None and k not in info.sizes]
    if extra:
        raise InputError(f"a {shape.replace('_', ' ')} takes {' and '.join(info.sizes)}; "
                         f"{', '.join(extra)} does not apply", field=", ".join(extra),
                         rule=f"not given for a {shape.replace('_', ' ')}", value=given[extra[0]])
    if shape == "horizontal_cylinder" and length is None:
        given["length"] = 1.0  # per-metre results do not depend on it
    missing = [k for k in info.sizes if given[k] is None]
    if missing:
        raise InputError(f"a {shape.replace('_', ' ')} needs {' and '.join(missing)} [m]", field=", ".join(missing),
                         rule=f"given for a {shape.replace('_', ' ')}", value=None)
    s = {k: as_array(k, given[k], unit="m", low=0.0, low_inclusive=False) for k in info.sizes}
    ratio = None
    if shape == "horizontal_cylinder":
        d, l = s["diameter"], s["length"]
        area, proj, nat, frc, run = np.pi * d * l, d * l, d, d, l
    elif shape == "vertical_cylinder":
        d, l = s["diameter"], s["length"]
        area, proj, nat, frc, run, ratio = np.pi * d * l, d * l, l, d, l, d / l
    elif shape == "sphere":
        d = s["diameter"]
        area, proj, nat, frc, run = np.pi * d ** 2, np.pi * d ** 2 / 4.0, d, d, d
    elif shape == "vertical_plate":
        h, w = s["height"], s["width"]
        area, proj, nat, frc, run = h * w, h * w, h, w, w
    else:  # horizontal plates
        l, w = s["length"], s["width"]
        area = l * w
        area, proj, nat, frc, run = area, area, area / (2.0 * (l + w)), l, l
    return Dimensions(area, proj, nat, frc, run, ratio)
