"""Standard pipe and tube sizes offered on the line panel: NPS (ASME B36.10M), DN (EN 10220), copper tube
(EN 1057, ASTM B88), all from :mod:`convlib.pipe_sizes` (:func:`~convlib.pipe_sizes.pipe_size`)."""
from __future__ import annotations

from dataclasses import dataclass

from convlib.pipe_sizes import (ASTM_B88, EN1057_OUTSIDE_DIAMETER_MM, EN10220_OUTSIDE_DIAMETER_MM, SCHEDULES,
                                nominal_pipe, nominal_sizes, pipe_size)

__all__ = ["SIZE_SYSTEMS", "StandardSize", "size_grades", "standard_sizes"]

#: Size systems: key -> (name on screen, name of its grade list or "" when it has none).
SIZE_SYSTEMS = {
    "nps": ("NPS (ASME B36.10M)", "Schedule"),
    "dn": ("DN (EN 10220)", ""),
    "copper_en": ("copper tube (EN 1057)", ""),
    "copper_astm": ("copper tube (ASTM B88)", "Type"),
}


@dataclass(frozen=True)
class StandardSize:
    """One size of a system: its key in the list (NPS, DN, outside diameter [mm] or nominal size [in]), the
    outside diameter and wall [m] (NaN where the standard implies none)."""

    key: float
    outer_diameter: float
    wall_thickness: float


def size_grades(system: str) -> tuple[str, ...]:
    """Schedules (NPS) or types (ASTM B88) of a system; none for DN and EN 1057 (no wall implied)."""
    if system not in SIZE_SYSTEMS:
        raise ValueError(f"unknown size system {system!r}; choose one of: {', '.join(SIZE_SYSTEMS)}")
    return {"nps": SCHEDULES, "copper_astm": ("K", "L", "M")}.get(system, ())


def _b88_text(nominal: float) -> str:
    whole, part = int(nominal), nominal - int(nominal)
    fraction = {0.25: "1/4", 0.375: "3/8", 0.5: "1/2", 0.75: "3/4"}.get(part, "")
    return "-".join(p for p in (str(whole) if whole else "", fraction) if p)


def standard_sizes(system: str, grade: str | None = None) -> list[StandardSize]:
    """The sizes of ``system`` (of :data:`SIZE_SYSTEMS`) in ``grade`` (schedule or ASTM B88 type), smallest first.

    >>> [s.key for s in standard_sizes("dn")][:3], round(standard_sizes("dn")[11].outer_diameter, 4)
    ([6, 8, 10], 0.1143)
    >>> s = standard_sizes("copper_astm", "L")[3]; s.key, round(s.outer_diameter, 6)
    (0.75, 0.022225)
    """
    grades = size_grades(system)
    if grades and grade not in grades:
        raise ValueError(f"unknown grade {grade!r} of {system}; choose one of: {', '.join(grades)}")
    if system == "nps":
        return [StandardSize(n, p.outer_diameter, p.wall_thickness)
                for n in nominal_sizes(grade) for p in (nominal_pipe(n, grade),)]
    if system == "dn":
        return [StandardSize(dn, p.outer_diameter, p.wall_thickness)
                for dn in EN10220_OUTSIDE_DIAMETER_MM for p in (pipe_size(f"DN{dn}"),)]
    if system == "copper_en":  # EN 1057 lists several walls per diameter: the diameter only
        return [StandardSize(od, od / 1000.0, float("nan")) for od in EN1057_OUTSIDE_DIAMETER_MM]
    return [StandardSize(n, p.outer_diameter, p.wall_thickness) for n, (_, walls) in ASTM_B88.items()
            if grade in walls for p in (pipe_size(f"B88-{_b88_text(n)}-{grade}"),)]
