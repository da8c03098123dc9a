"""Standard pipe sizes: nominal pipe size (NPS) and schedule to outer diameter and wall.

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

__all__ = ["PipeSize", "nominal_pipe", "parse_nps", "SCHEDULES", "nominal_sizes"]

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
