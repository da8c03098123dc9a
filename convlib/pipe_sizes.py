"""Standard pipe sizes: nominal pipe size (NPS) and schedule to outer diameter and wall; DN (EN 10220) and
copper tube (EN 1057, ASTM B88) by :func:`pipe_size`.

Dimensions of ASME B36.10M (welded and seamless wrought steel pipe) and
B36.19M (stainless, the ``S`` schedules), taken from the tables carried by the
``fluids`` package (Bell, C., fluids: Fluid dynamics component of the Chemical
Engineering Design Library, ``fluids.piping``), which cites ASME B36.10M-2004.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction

from .errors import InputError

__all__ = ["PipeSize", "nominal_pipe", "parse_nps", "SCHEDULES", "nominal_sizes", "pipe_size",
           "EN10220_OUTSIDE_DIAMETER_MM", "EN1057_OUTSIDE_DIAMETER_MM", "ASTM_B88", "COPPER_WALL", "is_copper"]

#: Schedules of ASME B36.10M and B36.19M offered here.
SCHEDULES = ("5", "10", "20", "30", "40", "60", "80", "100", "120", "140", "160", "STD", "XS", "XXS",
             "5S", "10S", "40S", "80S")


@dataclass(frozen=True)
class PipeSize:
    """A standard pipe: NPS [-], schedule, outer diameter, wall thickness, inner diameter [m]."""

    nps: float
    schedule: str
    outer_diameter: float
    wall_thickness: float
    inner_diameter: float


def _table(schedule: str):
    from fluids.piping import schedule_lookup  # a runtime dependency, imported where used

    nps, inner, outer, wall = schedule_lookup[schedule]
    return nps, inner, outer, wall


def nominal_sizes(schedule: str = "40") -> list[float]:
    """The NPS values available in a schedule.

    >>> nominal_sizes("40")[:4]
    [0.125, 0.25, 0.375, 0.5]
    """
    _check_schedule(schedule)
    return [float(n) for n in _table(schedule)[0]]


def _check_schedule(schedule: str) -> None:
    if str(schedule) not in SCHEDULES:
        rule = f"one of: {', '.join(SCHEDULES)}"
        raise InputError(f"unknown pipe schedule {schedule!r}; choose {rule}", field="schedule", rule=rule,
                         value=schedule)


def parse_nps(nps) -> float:
    """A nominal pipe size as written: ``4``, ``1.5``, ``"1-1/2"``, ``"1 1/2"``, ``"3/4"``, ``'2"'``.

    >>> parse_nps("1-1/2"), parse_nps("3/4"), parse_nps(4)
    (1.5, 0.75, 4.0)
    """
    if isinstance(nps, (int, float)) and not isinstance(nps, bool):
        value = float(nps)
    else:
        text = str(nps).strip().rstrip('"').strip()
        mixed = re.fullmatch(r"(\d+)[\s\-]+(\d+/\d+)", text)  # 1-1/2, 1 1/2
        try:
            value = float(int(mixed[1]) + Fraction(mixed[2]) if mixed else Fraction(text) if "/" in text else text)
        except (ValueError, ZeroDivisionError):
            value = math.nan
    if not math.isfinite(value) or value <= 0:
        raise InputError(f"nps: {nps!r} is not a nominal pipe size (write e.g. 4, 1.5, 1-1/2 or 3/4)", field="nps",
                         rule="a nominal pipe size such as 4, 1.5, 1-1/2 or 3/4", value=nps)
    return value


def nominal_pipe(nps: float | str, schedule: str = "40") -> PipeSize:
    """Dimensions of NPS ``nps`` (a number or text such as ``"1-1/2"``) in ``schedule`` (ASME B36.10M / B36.19M).

    Examples
    --------
    >>> p = nominal_pipe(4, "40")
    >>> p.outer_diameter, round(p.wall_thickness, 5)
    (0.1143, 0.00602)
    >>> nominal_pipe(4.3, "40")
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: NPS 4.3 is not a standard size in schedule 40; nearest: 4, 5
    """
    schedule = str(schedule)
    _check_schedule(schedule)
    sizes, inner, outer, wall = _table(schedule)
    value = parse_nps(nps)
    for i, n in enumerate(sizes):
        if abs(n - value) < 1e-9:
            return PipeSize(float(n), schedule, outer[i] / 1000.0, wall[i] / 1000.0, inner[i] / 1000.0)
    near = sorted(sizes, key=lambda n: abs(n - value))[:2]
    raise InputError(f"NPS {value:g} is not a standard size in schedule {schedule}; nearest: "
                     f"{', '.join(f'{n:g}' for n in sorted(near))}", field="nps",
                     rule=f"a standard size of schedule {schedule}", value=nps)


# ----------------------------------------------------------------------------- metric steel and copper tube
#: Pure copper at 300 K: density [kg/m3] and specific heat [J/kg/K] (Incropera et al., Fundamentals of Heat and
#: Mass Transfer, 6th ed., Table A.1, from memory), for the heat capacity of a copper tube's wall.
COPPER_WALL = {"pipe_density": 8933.0, "pipe_specific_heat": 385.0}

#: Outside diameters of steel tube by DN [mm]: EN 10220:2002, series 1 (the ISO 4200 main series; from memory). No
#: wall is implied: EN 10220 lists several walls per diameter, so give the wall where it matters.
EN10220_OUTSIDE_DIAMETER_MM = {6: 10.2, 8: 13.5, 10: 17.2, 15: 21.3, 20: 26.9, 25: 33.7, 32: 42.4, 40: 48.3,
                               50: 60.3, 65: 76.1, 80: 88.9, 100: 114.3, 125: 139.7, 150: 168.3, 200: 219.1,
                               250: 273.0, 300: 323.9, 350: 355.6, 400: 406.4, 450: 457.0, 500: 508.0, 600: 610.0}

#: Outside diameters of copper tube [mm]: EN 1057:2006 + A1:2010, Table 3 (from memory); written ``ODxWALL``.
EN1057_OUTSIDE_DIAMETER_MM = (6.0, 8.0, 10.0, 12.0, 14.0, 15.0, 16.0, 18.0, 22.0, 28.0, 35.0, 42.0, 54.0, 64.0,
                              66.7, 76.1, 88.9, 108.0, 133.0, 159.0, 219.0, 267.0)

#: ASTM B88 copper water tube: nominal size -> outside diameter [in] (nominal + 1/8 in) and wall [in] of types K,
#: L and M (ASTM B88-20, Table 1; from memory). Type M has no 1/4 in size.
ASTM_B88 = {
    0.25: (0.375, {"K": 0.035, "L": 0.030}), 0.375: (0.500, {"K": 0.049, "L": 0.035, "M": 0.025}),
    0.5: (0.625, {"K": 0.049, "L": 0.040, "M": 0.028}), 0.75: (0.875, {"K": 0.065, "L": 0.045, "M": 0.032}),
    1.0: (1.125, {"K": 0.065, "L": 0.050, "M": 0.035}), 1.25: (1.375, {"K": 0.065, "L": 0.055, "M": 0.042}),
    1.5: (1.625, {"K": 0.072, "L": 0.060, "M": 0.049}), 2.0: (2.125, {"K": 0.083, "L": 0.070, "M": 0.058}),
    2.5: (2.625, {"K": 0.095, "L": 0.080, "M": 0.065}), 3.0: (3.125, {"K": 0.109, "L": 0.090, "M": 0.072}),
    4.0: (4.125, {"K": 0.134, "L": 0.110, "M": 0.095}), 5.0: (5.125, {"K": 0.160, "L": 0.125, "M": 0.109}),
    6.0: (6.125, {"K": 0.192, "L": 0.140, "M": 0.122}), 8.0: (8.125, {"K": 0.271, "L": 0.200, "M": 0.170}),
}

_INCH = 0.0254


def _size_error(text, why: str) -> InputError:
    rule = "DN<n> (EN 10220), NPS<n>[/<schedule>], CU<OD>x<wall> (EN 1057, mm) or B88-<n>-<K|L|M>"
    return InputError(f"pipe size {text!r}: {why}; write e.g. DN100, NPS4/40, CU22x1.0 or B88-3/4-L", field="size",
                      rule=rule, value=text)


def pipe_size(text: str) -> PipeSize:
    """A pipe or tube as engineers name it: ``DN100`` (steel, EN 10220 series 1; no wall implied, NaN),
    ``NPS4`` or ``NPS4/80`` (ASME B36.10M, schedule 40 by default), ``CU22x1.0`` (copper, EN 1057: outside
    diameter x wall in mm) or ``B88-3/4-L`` (copper water tube, ASTM B88 type K, L or M).

    Examples
    --------
    >>> p = pipe_size("DN100"); p.outer_diameter, p.schedule
    (0.1143, 'EN 10220')
    >>> p = pipe_size("CU22x1.0"); round(p.outer_diameter, 4), round(p.inner_diameter, 4)
    (0.022, 0.02)
    >>> round(pipe_size("B88-3/4-L").outer_diameter, 6)
    0.022225
    >>> pipe_size("DN90")
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: pipe size 'DN90': DN 90 is not in EN 10220 series 1 (nearest: DN80, DN100); write e.g. DN100, NPS4/40, CU22x1.0 or B88-3/4-L
    """
    raw = str(text).strip()
    upper = raw.upper().replace(" ", "")
    if upper.startswith("DN"):
        try:
            dn = int(upper[2:])
        except ValueError:
            raise _size_error(raw, "DN takes a whole number") from None
        if dn not in EN10220_OUTSIDE_DIAMETER_MM:
            near = sorted(EN10220_OUTSIDE_DIAMETER_MM, key=lambda n: abs(n - dn))[:2]
            raise _size_error(raw, f"DN {dn} is not in EN 10220 series 1 (nearest: "
                                   f"{', '.join(f'DN{n}' for n in sorted(near))})")
        od = EN10220_OUTSIDE_DIAMETER_MM[dn] / 1000.0
        return PipeSize(math.nan, "EN 10220", od, math.nan, math.nan)
    if upper.startswith("NPS"):
        nps, _, schedule = upper[3:].partition("/")
        return nominal_pipe(nps, schedule or "40")
    if upper.startswith("CU"):
        m = re.fullmatch(r"CU(\d+(?:\.\d+)?)X(\d+(?:\.\d+)?)", upper)
        if m is None:
            raise _size_error(raw, "a copper tube is CU<outside diameter>x<wall> in mm")
        od, wall = float(m[1]), float(m[2])
        if not any(abs(od - d) < 1e-9 for d in EN1057_OUTSIDE_DIAMETER_MM):
            raise _size_error(raw, f"{od:g} mm is not an EN 1057 outside diameter")
        if not 0 < 2 * wall < od:
            raise _size_error(raw, f"the wall {wall:g} mm does not fit a {od:g} mm tube")
        return PipeSize(math.nan, "EN 1057", od / 1000.0, wall / 1000.0, (od - 2 * wall) / 1000.0)
    if upper.startswith("B88-"):
        parts = raw.split("-")
        if len(parts) < 3:
            raise _size_error(raw, "an ASTM B88 tube is B88-<nominal size>-<K, L or M>")
        nominal, kind = "-".join(parts[1:-1]), parts[-1].upper()
        size = parse_nps(nominal)
        if size not in ASTM_B88 or kind not in ASTM_B88[size][1]:
            raise _size_error(raw, f"no ASTM B88 type {kind} tube of nominal size {nominal}")
        od_in, walls = ASTM_B88[size]
        od, wall = od_in * _INCH, walls[kind] * _INCH
        return PipeSize(size, f"ASTM B88 type {kind}", od, wall, od - 2 * wall)
    raise _size_error(raw, "unknown kind of size")


def is_copper(size: PipeSize) -> bool:
    """Whether a :func:`pipe_size` is a copper tube (EN 1057, ASTM B88): its wall takes :data:`COPPER_WALL`."""
    return size.schedule.startswith(("EN 1057", "ASTM B88"))
