r"""Vessel and duct lists (CSV): the tanks, spheres and ducts of a plant from one table, face by face.

A vessel list is read like a line list (:mod:`convlib.linelist`): one item per row, units in brackets after a
column name apply to its plain numbers (plain numbers SI, kelvin), a unit in a cell wins, layers are written
``THICKNESS,CONDUCTIVITY[,NAME]`` separated by ``;`` (a material name may stand for the conductivity), values
outside the ranges engineers use make the row an error unless ``allow_unusual=True``, and the file's size, rows
and cells are capped before it is parsed (the line list's readers and limits, :mod:`convlib.linelist_read`).

=======================  ===============  ==============================================================
column                   default          meaning [default unit]
=======================  ===============  ==============================================================
``tag``                  required         item identifier, e.g. ``FH-T2``
``description``          ""               free text
``kind``                 required         ``vertical_tank``, ``horizontal_tank``, ``sphere`` or ``duct``
``diameter``             tanks, sphere    diameter of the shell [m]
``height``               vertical, duct   wall height of a vertical tank; section height of a duct [m]
``length``               horizontal, duct shell between the heads' tangent lines; run of a duct [m]
``width``                duct             section width of a duct [m]
``heads``                2:1 ellipsoidal  horizontal tank: ``flat``, ``ellipsoidal_2to1``, ``torispherical``,
                                          ``hemispherical`` (:data:`convlib.vessels.HEADS`)
``fluid_temperature``    --               contents [K] (the item may carry layers); or:
``surface_temperature``  --               every face of a bare item [K]; give exactly one of the two
``air_temperature``      required         design air around the item [K]
``wind_speed``           0                design wind [m/s]
``layers``               bare             layers of every exposed face, from the shell outwards
``roof_layers``          ``layers``       vertical tank: the roof's, if they differ
``head_layers``          ``layers``       horizontal tank: both heads', if they differ
``floor_layers``         see meaning      vertical tank: slab and insulation under a floor on the ground
                                          (default none); under an open floor (default ``layers``)
``emissivity``           0.9              long-wave emissivity of the outer surfaces [-]
``location``             indoor           ``indoor`` or ``outdoor`` (typical sky view per face)
``floor``                ground           vertical tank: ``ground``, ``open`` or ``none``
``wind_direction``       along            duct: ``along`` or ``across``
``operating_hours``      8760             hours per year the item is hot or cold [h]
=======================  ===============  ==============================================================

A cell in a column that does not fit the row's kind (``heads`` on a sphere, ``width`` on a tank) makes the row a
:class:`~convlib.linelist_read.RowError` naming the column, as does a missing size or a bare item with layers.

**Computing.** Each item is one call of :func:`convlib.vessels.vertical_tank`,
:func:`~convlib.vessels.horizontal_tank`, :func:`~convlib.vessels.spherical_tank` or
:func:`convlib.ducts.rectangular_duct` (each vectorized over its faces and, for the annual figures, over the
weather bins), so an item's numbers are those of that call. A row the physics refuses
(:class:`~convlib.errors.InputError`) becomes a row error; any other exception is raised.

**Results.** Per item: heat flow (lost > 0, gained < 0) and area summed over its faces, the hottest exposed
face and its surface temperature, a touch flag (that face above the limit, default
:data:`~convlib.design.TOUCH_LIMIT_METAL_JACKET`; a flag for review, not a verdict), and the annual heat.
With :class:`~convlib.design.WeatherBins` outdoor items see each bin's air and wind (indoor items keep their
design condition); without them every item takes its design condition for all its hours and
:attr:`VesselListResult.warnings` carries :data:`convlib.linelist.WARNING_DESIGN_AIR_ALL_YEAR`. Totals never net
a cold item's gain against a hot item's loss.

Examples
--------
>>> text = '''tag,kind,diameter[m],height[m],surface_temperature[degC],air_temperature[degC]
... T-1,vertical_tank,10,12,60,10
... '''
>>> res = run_vessel_list(io.StringIO(text))
>>> round(float(res.q_total[0]) / 1e3, 1), res.hottest_face[0]
(253.0, 'wall')
"""
from __future__ import annotations

import csv
import io
from dataclasses import dataclass, field
from importlib import resources
from typing import NamedTuple

import numpy as np
from pydantic import ValidationError

from .annual import check_bins
from .design import CAUTION_TOUCH, TOUCH_LIMIT_METAL_JACKET, WeatherBins
from .ducts import WIND_DIRECTIONS, rectangular_duct
from .errors import InputError
from .faces import FacesResult
from .files import write_atomic
from .linelist import WARNING_DESIGN_AIR_ALL_YEAR
from .linelist_read import (HOURS_PER_YEAR, LOCATIONS, RowError, blank, cell_layers, cell_number, csv_cell,
                            inert_cells, parse_rows, read_table)
from .lines import LayerSpec
from .regimes import describe_flags
from .units import from_si
from .validation import as_array
from .vessels import FLOORS, HEADS, horizontal_tank, spherical_tank, vertical_tank

__all__ = ["COLUMNS", "REQUIRED", "KINDS", "MAX_ITEMS", "ParsedItem", "VesselListResult", "read_vessel_list",
           "run_vessel_list", "write_vessel_results_csv", "demo_vessels_path", "OUTPUT_COLUMNS", "CALLS"]

#: Input columns and the kind of quantity of their unit suffix ("text" and "count" take none).
COLUMNS = {
    "tag": "text", "description": "text", "kind": "text", "diameter": "length", "height": "length",
    "length": "length", "width": "length", "heads": "text", "fluid_temperature": "temperature",
    "surface_temperature": "temperature", "air_temperature": "temperature", "wind_speed": "speed",
    "layers": "length", "roof_layers": "length", "head_layers": "length", "floor_layers": "length",
    "emissivity": "dimensionless", "location": "text", "floor": "text", "wind_direction": "text",
    "operating_hours": "count",
}
REQUIRED = ("tag", "kind", "air_temperature")
#: Per kind: its size columns (required) and the input of :data:`convlib.units.INPUTS` each is read as (the
#: plausible range), then the kind's own optional columns.
KINDS = {
    "vertical_tank": ({"diameter": "size", "height": "size"}, ("floor", "roof_layers", "floor_layers")),
    "horizontal_tank": ({"diameter": "size", "length": "size"}, ("heads", "head_layers")),
    "sphere": ({"diameter": "size"}, ()),
    "duct": ({"width": "duct_size", "height": "duct_size", "length": "length"}, ("wind_direction",)),
}
_CHOICES = {"heads": HEADS, "floor": FLOORS, "wind_direction": WIND_DIRECTIONS, "location": LOCATIONS}
_INPUTS = {"fluid_temperature": "temperature", "surface_temperature": "temperature",
           "air_temperature": "air_temperature", "wind_speed": "wind_speed"}
_LAYERS = ("layers", "roof_layers", "head_layers", "floor_layers")
MAX_ITEMS = 20_000  #: most items of a vessel list (each is its own solver call)
#: The convlib function of each kind; an item's numbers are those of ``CALLS[kind](**item.inputs)``.
CALLS = {"vertical_tank": vertical_tank, "horizontal_tank": horizontal_tank, "sphere": spherical_tank,
         "duct": rectangular_duct}


class ParsedItem(NamedTuple):
    """A valid row: row number, tag, kind, description, location, operating hours [h] or None, and the keyword
    arguments (SI) of its convlib call (:data:`CALLS`), design air and wind included."""

    row: int
    tag: str
    kind: str
    description: str
    location: str
    operating_hours: float | None
    inputs: dict


def demo_vessels_path():
    """The invented vessel and duct list of the Fernhill district-energy plant shipped with the package."""
    return resources.files("convlib").joinpath("data/demo_vessels.csv")


# ----------------------------------------------------------------------------- reading
def _cells(cells: dict, units: dict, kind: str, allow_unusual: bool) -> tuple[dict, list[str]]:
    """The SI values of a row's given cells, and the problems (each naming its column)."""
    sizes, own = KINDS[kind]
    values, problems = {}, []
    for name, column_kind in COLUMNS.items():
        cell = cells.get(name)
        if blank(cell):
            problems += [f"{name}: missing (required for {kind})"] if name in sizes else []
            continue
        if name in ("diameter", "height", "length", "width", *_LAYERS, *_CHOICES) and name not in (
                *sizes, *own, "layers", "location"):
            problems.append(f"{name}: not a column of a {kind} (its columns: {', '.join([*sizes, *own])}); got "
                            f"{cell!r}")
            continue
        try:
            if name in _LAYERS:
                values[name] = [LayerSpec(**d).layer() for d in cell_layers(cell, units.get(name), allow_unusual,
                                                                            name)]
            elif column_kind == "text":
                values[name] = str(cell).strip()
            else:
                values[name] = cell_number(cell, name, column_kind, units.get(name), sizes.get(name,
                                           _INPUTS.get(name)), allow_unusual)
        except InputError as exc:
            problems.append(str(exc))
        except ValidationError as exc:  # a layer's thickness or conductivity outside LayerSpec's range
            problems.append(f"{name}: {exc.errors()[0]['msg']}; cell {cell!r}")
    return values, problems


def _checked(values: dict, cells: dict, kind: str) -> list[str]:
    """Problems across the columns of a row: choices, ranges, one temperature, layers of a bare item."""
    problems = []
    for name, choices in _CHOICES.items():
        if name in values:
            values[name] = values[name].lower()
            if values[name] not in choices:
                problems.append(f"{name}: unknown {name} {cells[name]!r}; choose one of: {', '.join(choices)}")
    if sum(not blank(cells.get(name)) for name in ("fluid_temperature", "surface_temperature")) != 1:
        problems.append("fluid_temperature / surface_temperature: give one of them (the contents, or every face "
                        "of a bare item)")
    layered = [name for name in _LAYERS if values.get(name)]
    if "surface_temperature" in values and layered and not (layered == ["floor_layers"]
                                                            and values.get("floor", "ground") == "ground"):
        problems.append(f"{layered[0]}: a bare item at surface_temperature takes no layers; give fluid_temperature")
    if not 0.0 < values.get("emissivity", 0.9) <= 1.0:
        problems.append(f"emissivity: must be more than 0 and at most 1; got {cells['emissivity']!r}")
    hours = values.get("operating_hours", 0.0)
    if not 0.0 <= hours <= 8784.0:
        problems.append(f"operating_hours: must be 0 to 8784 h (a leap year); got {cells['operating_hours']!r}")
    if values.get("floor") == "none" and values.get("floor_layers"):
        problems.append("floor_layers: floor 'none' leaves the floor out; give floor ground or open")
    return problems


def _inputs(kind: str, values: dict) -> dict:
    """Keyword arguments of the convlib call of an item (SI)."""
    given = {name: values[name] for name in ("fluid_temperature", "surface_temperature", "emissivity") if name in values}
    given.update(air_temperature=values["air_temperature"], wind_speed=values.get("wind_speed", 0.0))
    given["outdoor"] = values.get("location", "indoor") == "outdoor"
    layers = values.get("layers", [])
    if kind == "vertical_tank":
        floor = values.get("floor", "ground")
        return dict(diameter=values["diameter"], height=values["height"], wall_layers=layers,
                    roof_layers=values.get("roof_layers", layers), floor=floor,
                    floor_layers=values.get("floor_layers", layers if floor == "open" else []), **given)
    if kind == "horizontal_tank":
        return dict(diameter=values["diameter"], length=values["length"], heads=values.get("heads", "ellipsoidal_2to1"),
                    shell_layers=layers, head_layers=values.get("head_layers", layers), **given)
    if kind == "sphere":
        return dict(diameter=values["diameter"], layers=layers, **given)
    return dict(width=values["width"], height=values["height"], length=values["length"], layers=layers,
                wind_direction=values.get("wind_direction", "along"), **given)


def _parse_row(row: int, cells: dict, units: dict, allow_unusual: bool) -> ParsedItem | RowError:
    tag = "" if blank(cells.get("tag")) else str(cells["tag"]).strip()
    kind = "" if blank(cells.get("kind")) else str(cells["kind"]).strip().lower()
    if kind not in KINDS:
        return RowError(row, tag, f"kind: {'missing (required)' if not kind else f'unknown kind {kind!r}'}; "
                                  f"choose one of: {', '.join(KINDS)}")
    problems = [f"{name}: missing (required)" for name in REQUIRED if blank(cells.get(name))]
    values, more = _cells(cells, units, kind, allow_unusual)
    problems += more
    problems += _checked(values, cells, kind)
    if problems:
        return RowError(row, tag, "; ".join(problems))
    return ParsedItem(row, tag, kind, values.get("description", ""), values.get("location", "indoor"),
                      values.get("operating_hours"), _inputs(kind, values))


def read_vessel_list(source, *, allow_unusual: bool = False) -> tuple[list[ParsedItem], list[RowError]]:
    """Read and validate a vessel list (see the module docstring for the columns).

    Parameters
    ----------
    source : path, file-like, or list of dict
        A CSV file (path, open text file or package resource), or rows as dicts keyed by column header (unit
        suffixes allowed; numbered 2, 3, ... as below a header).
    allow_unusual : bool
        Accept values outside the ranges engineers use (:func:`convlib.linelist.read_line_list`).

    Returns
    -------
    items, errors : list of ParsedItem, list of RowError
        The valid rows in file order; the rows that failed, each naming its column(s).

    Raises
    ------
    InputError
        For the whole file, as :func:`convlib.linelist.read_line_list` (size, rows and cells checked before
        parsing; encoding; header), and for more than :data:`MAX_ITEMS` items.
    """
    units, rows = read_table(source, "vessel list", "tag, kind, diameter, ..., air_temperature", columns=COLUMNS,
                             required=REQUIRED, more_problems=None)
    if len(rows) > MAX_ITEMS:
        raise InputError(f"vessel list: {len(rows)} items, more than {MAX_ITEMS}; split the list", field="source",
                         rule=f"at most {MAX_ITEMS} items", value=len(rows))
    return parse_rows(rows, _parse_row, units, allow_unusual)


# ----------------------------------------------------------------------------- computing
@dataclass(frozen=True)
class VesselListResult:
    """Per-item results (arrays in file order, one entry per computed item), failed rows, settings.

    ``area`` [m2] and ``q_total`` [W] (lost > 0, gained < 0) are sums over the item's faces at the design
    condition; ``hottest_face`` and ``surface_temperature`` [K] are those of its hottest exposed face (a floor on
    the ground is not exposed); ``heat_kwh`` [kWh/yr] the annual heat; ``touch_flag`` that face above
    ``settings["surface_limit"]`` (a flag for review, not a verdict); ``faces`` each item's
    :class:`~convlib.faces.FacesResult`; ``notes`` the notes and physics warnings per item.
    """

    row: np.ndarray
    tag: tuple[str, ...]
    kind: tuple[str, ...]
    location: tuple[str, ...]
    area: np.ndarray
    air_temperature: np.ndarray
    q_total: np.ndarray
    hottest_face: tuple[str, ...]
    surface_temperature: np.ndarray
    operating_hours: np.ndarray
    heat_kwh: np.ndarray
    touch_flag: np.ndarray
    notes: tuple[str, ...]
    faces: tuple[FacesResult, ...]
    errors: tuple[RowError, ...] = ()
    settings: dict = field(default_factory=dict)

    def __len__(self) -> int:
        return len(self.tag)

    # heat on each side, positive numbers, 0 for an item on the other side: never netted across items
    q_lost = property(lambda self: np.maximum(self.q_total, 0.0), doc="Heat lost by each item losing heat [W].")
    q_gained = property(lambda self: np.maximum(-self.q_total, 0.0), doc="Heat gained by each item gaining it [W].")
    heat_lost_kwh = property(lambda self: np.maximum(self.heat_kwh, 0.0), doc="Annual heat lost [kWh/yr].")
    heat_gained_kwh = property(lambda self: np.maximum(-self.heat_kwh, 0.0), doc="Annual heat gained [kWh/yr].")

    @property
    def totals(self) -> dict:
        """Sums over the computed items; heat lost (hot items) and gained (cold items) summed apart, both positive
        [W], [kWh/yr]; ``items_losing`` / ``items_gaining`` count them at the design condition."""
        return {"items": len(self), "rows_with_errors": len(self.errors),
                **{name: float(np.sum(getattr(self, name))) for name in _SUMMED},
                "items_losing": int(np.sum(self.q_total > 0)), "items_gaining": int(np.sum(self.q_total < 0)),
                "annual_basis": "weather bins" if self.settings.get("weather_bins") else
                "design air for all operating hours", "touch_flags": int(np.sum(self.touch_flag))}

    @property
    def warnings(self) -> tuple[str, ...]:
        """:data:`convlib.linelist.WARNING_DESIGN_AIR_ALL_YEAR` when no weather bins were given."""
        return () if self.settings.get("weather_bins") or not len(self) else (WARNING_DESIGN_AIR_ALL_YEAR,)

    @property
    def cautions(self) -> tuple[str, ...]:
        """The touch caution where any item is flagged."""
        return (CAUTION_TOUCH,) if np.any(self.touch_flag) else ()

    def rows(self) -> list[dict]:
        """One dict per computed item, SI values, with its faces (name, area, surface temperature, heat), e.g. for
        JSON."""
        names = [n for n in self.__dataclass_fields__ if n not in ("errors", "settings", "faces")]
        values = [[v.item() if isinstance(v, np.generic) else v for v in getattr(self, n)] for n in names]
        return [{**dict(zip(names, row)), "faces": [{k: face[k] for k in ("face", "area", "surface_temperature",
                                                                           "q_total")} for face in faces.rows()]}
                for row, faces in zip(zip(*values), self.faces)]


_SUMMED = ("area", "q_lost", "q_gained", "heat_lost_kwh", "heat_gained_kwh")


def _settings(surface_limit, bins) -> dict:
    check_bins(bins)
    return {"surface_limit": float(as_array("surface_limit", surface_limit, unit="K", low=0.0, low_inclusive=False)),
            "weather_bins": bins is not None}


def _solve(item: ParsedItem, bins: WeatherBins | None) -> tuple[FacesResult, float, float]:
    """The item's faces at its design condition, its hours [h/yr] and annual heat [kWh/yr]."""
    call = CALLS[item.kind]
    design = call(**item.inputs)
    hours = item.operating_hours if item.operating_hours is not None else (
        HOURS_PER_YEAR if bins is None else float(bins.hours.sum()))
    if bins is None or item.location != "outdoor":
        return design, hours, float(design.q_total) * hours / 1000.0
    binned = call(**{**item.inputs, "air_temperature": bins.air_temperature, "wind_speed": bins.wind_speed})
    return design, hours, float(np.sum(binned.q_total * bins.hours)) * hours / float(bins.hours.sum()) / 1000.0


def _hottest(faces: FacesResult) -> tuple[str, float]:
    exposed = [f for f in faces.faces if f.shape != "ground"]
    face = max(exposed, key=lambda f: float(f.surface_temperature))
    return face.name, float(face.surface_temperature)


def _notes(faces: FacesResult) -> str:
    masks = [int(f.surface.warnings) for f in faces.faces if f.surface is not None]
    flags = describe_flags(np.bitwise_or.reduce(masks)) if masks else []
    return "; ".join([*faces.notes, *flags])


def run_vessel_list(source, bins: WeatherBins | None = None, *, surface_limit=TOUCH_LIMIT_METAL_JACKET,
                    allow_unusual: bool = False) -> VesselListResult:
    """Compute every item of a vessel list: heat flow face by face, hottest face, annual heat, touch flags.

    Parameters
    ----------
    source : path, file-like, or list of dict
        See :func:`read_vessel_list`.
    bins : WeatherBins, optional
        Weather for the annual figures of outdoor items; default: each item's design condition for its
        ``operating_hours`` (8760 h unless given), with :data:`convlib.linelist.WARNING_DESIGN_AIR_ALL_YEAR`.
    surface_limit : float
        Surface temperature above which ``touch_flag`` is set [K]; default
        :data:`~convlib.design.TOUCH_LIMIT_METAL_JACKET`, a design default, not a rule.
    allow_unusual : bool
        See :func:`read_vessel_list`.

    Returns
    -------
    VesselListResult
    """
    settings = _settings(surface_limit, bins)
    items, errors = read_vessel_list(source, allow_unusual=allow_unusual)
    done = []
    for item in items:
        try:
            done.append((item, *_solve(item, bins)))
        except InputError as exc:  # the physics refuses this row; any other exception is a fault: raised
            errors.append(RowError(item.row, item.tag, f"could not be computed: {exc}"))
    hottest = [_hottest(faces) for _, faces, _, _ in done]
    surface = np.array([t for _, t in hottest], dtype=float)
    return VesselListResult(
        row=np.array([i.row for i, *_ in done], dtype=int), tag=tuple(i.tag for i, *_ in done),
        kind=tuple(i.kind for i, *_ in done), location=tuple(i.location for i, *_ in done),
        area=np.array([float(f.area) for _, f, _, _ in done]),
        air_temperature=np.array([float(i.inputs["air_temperature"]) for i, *_ in done]),
        q_total=np.array([float(f.q_total) for _, f, _, _ in done]), hottest_face=tuple(n for n, _ in hottest),
        surface_temperature=surface, operating_hours=np.array([h for *_, h, _ in done], dtype=float),
        heat_kwh=np.array([e for *_, e in done], dtype=float), touch_flag=surface > settings["surface_limit"],
        notes=tuple(_notes(f) for _, f, _, _ in done), faces=tuple(f for _, f, _, _ in done),
        errors=tuple(sorted(errors, key=lambda e: e.row)), settings=settings)


# ----------------------------------------------------------------------------- writing
#: Output columns after ``row, tag, status``: header (unit in brackets), attribute, display unit or None.
OUTPUT_COLUMNS = (
    ("kind", "kind", None), ("location", "location", None), ("area[m2]", "area", None),
    ("air_temperature[degC]", "air_temperature", ("temperature", "degC")), ("q_total[W]", "q_total", None),
    ("heat_lost[W]", "q_lost", None), ("heat_gained[W]", "q_gained", None), ("hottest_face", "hottest_face", None),
    ("surface_temperature[degC]", "surface_temperature", ("temperature", "degC")),
    ("operating_hours[h]", "operating_hours", None), ("annual_heat[kWh]", "heat_kwh", None),
    ("annual_heat_lost[kWh]", "heat_lost_kwh", None), ("annual_heat_gained[kWh]", "heat_gained_kwh", None),
    ("touch_flag", "touch_flag", None),
)
_TEXT = ("kind", "location", "hottest_face")


def write_vessel_results_csv(result: VesselListResult, path) -> None:
    """Write per-item results, failed rows and a totals row to CSV atomically (:func:`convlib.files.write_atomic`).

    Columns: ``row, tag, status`` (``ok`` or ``error``), :data:`OUTPUT_COLUMNS` (temperatures in degC) and
    ``notes``. Text cells that a spreadsheet would run as a formula get a leading ``'``
    (:func:`convlib.linelist_read.inert_cells`); numbers stay numbers. The last row (``TOTAL``) sums area and the
    heat lost and gained apart, leaves the signed ``q_total`` and ``annual_heat`` empty (never netted), counts the
    touch flags, and carries :attr:`VesselListResult.warnings` in its notes.
    """
    columns = [getattr(result, a) if conv is None else from_si(np.asarray(getattr(result, a), dtype=float), *conv)
               for _, a, conv in OUTPUT_COLUMNS]
    body = [(int(r), [str(r), t, "ok", *(csv_cell(c[i]) for c in columns), result.notes[i]])
            for i, (r, t) in enumerate(zip(result.row, result.tag))]
    body += [(e.row, [str(e.row), e.tag, "error", *[""] * len(OUTPUT_COLUMNS), e.reason]) for e in result.errors]
    totals = result.totals
    total = ["TOTAL", f"{len(result)} items", "totals",
             *(csv_cell(totals[a]) if a in _SUMMED else str(totals["touch_flags"]) if a == "touch_flag" else ""
               for _, a, _ in OUTPUT_COLUMNS),
             " ".join([f"sums over the {len(result)} computed items; {len(result.errors)} row(s) with errors not "
                       f"included; heat lost by hot items and gained by cold items summed apart, never netted; "
                       f"touch_flag counts flagged items (flags for review, not verdicts).", *result.warnings])]
    numeric = [False, False, False, *(a not in _TEXT for _, a, _ in OUTPUT_COLUMNS), False]
    text = io.StringIO(newline="")
    writer = csv.writer(text)
    writer.writerow(["row", "tag", "status", *(c[0] for c in OUTPUT_COLUMNS), "notes"])
    for _, cells in sorted(body, key=lambda b: b[0]):
        writer.writerow(inert_cells(cells, numeric))
    writer.writerow(inert_cells(total, numeric))
    write_atomic(path, text.getvalue().encode("utf-8"))
