r"""Plant line lists: read a survey of lines from CSV, compute them all at once, write the results.

A line list is a table with one line (pipe run) per row. Columns (case and spaces in
the header do not matter; ``Fluid temperature [degC]`` reads as ``fluid_temperature[degC]``):

=====================  ========  ======================================================================
column                 default   meaning [default unit]
=====================  ========  ======================================================================
``tag``                required  line identifier, e.g. ``FH-103``
``description``        ""        free text
``nps``                --        nominal pipe size: ``4``, ``1.5``, ``1-1/2``, ``3/4`` (ASME B36.10M)
``schedule``           ``40``    pipe schedule with ``nps``: 40, 80, STD, XS, 10S, ...
``outer_diameter``     --        outer diameter of the pipe itself [m], instead of ``nps``
``length``             required  run length [m]
``fluid_temperature``  required  temperature of the fluid [K]
``air_temperature``    required  design air temperature around the line [K]
``relative_humidity``  none      design relative humidity, a fraction 0-1 (or head it ``[%]``)
``layers``             bare      layers from the pipe outwards, see below
``location``           indoor    ``indoor`` or ``outdoor``
``sky_view_fraction``  0 / 0.5   part of the view that is sky [-]; 0 indoors, 0.5 outdoors
``wind_speed``         0         design wind speed [m/s]
``jacket_emissivity``  0.9       long-wave emissivity of the outer surface [-]
``operating_hours``    8760      hours per year the line is hot or cold [h] (no unit suffix)
``valve`` ...          0         number of fittings: ``valve``, ``flange_pair``, ``support``,
                                 ``elbow``, ``strainer`` (:data:`convlib.design.FITTING_EQUIVALENT_LENGTH`)
``mass_flow``          none      flow in the line [kg/s]: outlet temperature over the
                                 equivalent length (:func:`convlib.operation.line_temperature_profile`)
``fluid``              Water     CoolProp name of what flows (with ``mass_flow``), e.g. ``Water``, ``Air``
``fluid_pressure``     1 atm     absolute pressure of the fluid [Pa] (hot water above 100 degC needs it)
``fluid_phase``        liquid    ``liquid`` or ``gas`` (air, superheated steam); checked against the
                                 boiling point at ``fluid_pressure``
``maintain_temperature`` none    temperature a tracer holds [K]: tracing duty
                                 (:func:`convlib.operation.tracing_duty`, default margin)
``minimum_ambient``    air       design minimum air temperature for the tracing duty [K]
``steam_pressure``     none      absolute pressure of a saturated steam line [Pa]: condensate formed by
                                 the line's loss (:func:`convlib.operation.condensate_rate`); the
                                 fluid temperature should be the saturation temperature (else a note)
=====================  ========  ======================================================================

Give each line ``nps`` or ``outer_diameter``, not both. Columns with an empty header are ignored; an
unknown column is an error for the whole file (a misspelt column must not go unnoticed).

**Units.** Plain numbers are SI, kelvin for temperatures. A unit in brackets after the column name
applies to the plain numbers of that column: ``fluid_temperature[degC]``, ``air_temperature[°F]``,
``outer_diameter[mm]``, ``length[ft]``, ``wind_speed[km/h]``, ``relative_humidity[%]``, ``layers[mm]``
(thicknesses). A unit in a cell wins: ``6 in``, ``90 degC``, ``0.045 W/m/degC``, ``6 barg``, ``80%``. Cells
are read by :func:`convlib.units.split`, the reader of the command line (a temperature inside a compound unit
is an interval), and a value outside the range engineers use (:data:`convlib.units.INPUTS`) makes its row an
error with a hint unless ``allow_unusual=True``.

**Layers.** ``THICKNESS,CONDUCTIVITY[,NAME]`` per layer, the command line's ``--layer`` syntax
(:mod:`convlib.layer_text`; conductivity in W/m/K or with its unit), separated by ``;``, from the pipe
outwards, the cell quoted (it holds commas); empty, ``bare`` or ``none``: a bare pipe. With ``layers[mm]``:
``"80,0.045,mineral wool; 0.7,200,aluminium jacket"``; without it ``"80mm,0.045,..."``. The form of 0.2.0,
``80@0.045 mineral wool``, is still read, with a ``DeprecationWarning``.

**Rows.** Row numbers are those of the file (header = row 1; blank lines count, and are skipped).
A row that fails validation becomes a :class:`RowError` naming the column and the problem; the
other rows are still computed. So does a row that the solvers or the property data cannot compute
(:class:`~convlib.errors.InputError` from the computation). Any other exception is a fault of the
program, not of the row: it is raised, not reported as a row error.

**Results.** Per line at its design conditions: surface temperature, heat flow per metre and over the
equivalent length (length plus fittings); per year: heat lost (> 0) or gained (< 0), purchased energy
(hot service, fluid above the design air: net loss / efficiency; cold service: net gain / COP), its
cost and CO2. With :class:`~convlib.design.WeatherBins`, outdoor lines see each bin's air temperature
and wind, indoor lines keep their design air and wind; a given ``operating_hours`` scales every bin's
hours by ``operating_hours / total bin hours``; without them every line takes its design condition for
all its hours, and :attr:`LineListResult.warnings` says so. Totals never net a cold line's gain against
a hot line's loss: heat lost by hot lines and heat gained by cold lines are summed apart.
``touch_flag`` (surface above a touch limit) and ``condensation_flag`` (surface below the dew point
of the line's air) are flags for review, not verdicts (:data:`~convlib.design.CAUTION_TOUCH`,
:data:`~convlib.design.CAUTION_CONDENSATION`).

Examples
--------
>>> text = '''tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],jacket_emissivity
... FH-001,4,10,180,20,"50,0.045,mineral wool",0.1
... '''
>>> res = run_line_list(io.StringIO(text))
>>> round(float(res.q_per_length[0]), 1), round(float(res.q_total[0]))
(63.1, 631)
"""
from __future__ import annotations

import csv
import io
import math
import os
import re
import warnings
from collections.abc import Callable
from dataclasses import dataclass, field
from importlib import resources
from typing import NamedTuple

import numpy as np
from pydantic import ValidationError

from .design import (CAUTION_CONDENSATION, CAUTION_TOUCH, DEFAULT_COOLING_COP, DEFAULT_HEATING_EFFICIENCY,
                     FITTING_EQUIVALENT_LENGTH, TOUCH_LIMIT_METAL_JACKET, WeatherBins)
from .errors import InputError
from .files import read_capped, write_atomic
from .lines import LineSpec
from .layer_text import split_layer, split_layers
from .operation import (CAUTION_LINE_FREEZE, condensate_rate, line_temperature_profile, saturation_temperature,
                        tracing_duty)
from .pipe import Layer, insulated_pipe
from .pipe_sizes import nominal_pipe, parse_nps
from .properties import dew_point
from .radiation import sky_temperature
from .regimes import describe_flags
from .units import KIND_SI_UNIT, from_si, is_unit, read, split, unit_affine
from .validation import as_array

__all__ = ["COLUMNS", "OUTPUT_COLUMNS", "OUTDOOR_SKY_VIEW_FRACTION", "WARNING_DESIGN_AIR_ALL_YEAR", "RowError",
           "ParsedLine", "LineListResult", "read_line_list", "run_line_list", "write_results_csv", "demo_lines_path"]

#: Input columns and the kind of quantity of their unit suffix ("text" and "count" take none).
COLUMNS = {
    "tag": "text", "description": "text", "nps": "count", "schedule": "text", "outer_diameter": "length",
    "length": "length", "fluid_temperature": "temperature", "air_temperature": "temperature",
    "relative_humidity": "dimensionless", "layers": "length", "location": "text",
    "sky_view_fraction": "dimensionless", "wind_speed": "speed", "jacket_emissivity": "dimensionless",
    "operating_hours": "count", **{name: "count" for name in FITTING_EQUIVALENT_LENGTH},
    "mass_flow": "mass_flow", "fluid": "text", "fluid_pressure": "pressure", "fluid_phase": "text",
    "maintain_temperature": "temperature", "minimum_ambient": "temperature", "steam_pressure": "pressure",
}
#: Optional columns of lines in operation (not part of a LineSpec): outlet temperature and tracing duty.
OPERATION_COLUMNS = ("mass_flow", "fluid", "fluid_pressure", "fluid_phase", "maintain_temperature",
                     "minimum_ambient", "steam_pressure")
FLUID_PHASES = ("liquid", "gas")
REQUIRED = ("tag", "length", "fluid_temperature", "air_temperature")
LOCATIONS = ("indoor", "outdoor")
#: Sky view fraction of an outdoor line without a ``sky_view_fraction`` cell: the upper half
#: of a horizontal pipe sees the sky, the lower half the ground. Common practice, no source.
OUTDOOR_SKY_VIEW_FRACTION = 0.5
HOURS_PER_YEAR = 8760.0
MAX_BYTES = 32_000_000     #: largest line-list file read [bytes] (refused from its size before reading)
MAX_ROWS = 200_000         #: most rows of a line list, header and blank rows included
MAX_CELLS = 5_000_000      #: most cells of a line list (line breaks + commas; bounds memory of tiny cells)
#: First characters that make a spreadsheet treat a cell as a formula; such text cells are written with a
#: leading apostrophe (OWASP, "CSV Injection"); numbers in numeric columns are written as numbers.
FORMULA_PREFIXES = ("=", "+", "-", "@", "\t", "\r")
_HEADER = re.compile(r"^\s*(?P<name>[^\[\]]*?)\s*(?:\[(?P<unit>[^\[\]]*)\])?\s*$")
_LAYER = re.compile(r"^(?P<thickness>[^@]+?)\s*@\s*(?P<conductivity>\S+)\s*(?P<name>.*)$")


class RowError(NamedTuple):
    """A row that was not computed: row number in the file (header = 1), tag, reason."""

    row: int
    tag: str
    reason: str


class ParsedLine(NamedTuple):
    """A valid row: row number, :class:`~convlib.lines.LineSpec` (SI), location, operating hours [h] or None,
    and the given :data:`OPERATION_COLUMNS` (SI) or None."""

    row: int
    spec: LineSpec
    location: str
    operating_hours: float | None
    operation: dict | None = None


def demo_lines_path():
    """The invented line list of the Fernhill district-energy plant shipped with the package."""
    return resources.files("convlib").joinpath("data/demo_lines.csv")


# ----------------------------------------------------------------------------- reading
def _columns(header) -> list[tuple[str, str | None] | None]:
    """(name, unit) per header cell, None for an empty header cell; InputError for the whole file."""
    out, problems, seen = [], [], set()
    for text in ("" if h is None else str(h) for h in header):
        m = _HEADER.match(text)
        if m is not None and not m["name"] and not m["unit"]:
            out.append(None)
            continue
        name = re.sub(r"[\s\-]+", "_", m["name"].strip().lower()) if m else text
        unit = (m["unit"] or "").strip() if m else ""
        unit = None if unit in ("", "-", "1") else unit
        kind = COLUMNS.get(name)
        if kind is None:
            problems.append(f"unknown column {text!r}")
        elif name in seen:
            problems.append(f"column {name!r} appears twice")
        elif unit is not None and kind in ("text", "count"):
            problems.append(f"column {text!r}: {name} takes no unit")
        elif unit is not None:
            try:
                _affine(unit, kind)
            except Exception:  # noqa: BLE001 - pint raises several error types for bad units
                problems.append(f"column {text!r}: {unit!r} is not a unit of {kind}")
        seen.add(name)
        out.append((name, unit))
    missing = [c for c in REQUIRED if c not in seen]
    if missing:
        problems.append(f"missing required column(s): {', '.join(missing)}")
    if not {"nps", "outer_diameter"} & seen:
        problems.append("give the pipe size in a column 'nps' (with 'schedule') or 'outer_diameter'")
    if problems:
        raise InputError(f"line list header: {'; '.join(problems)}; the columns are: {', '.join(COLUMNS)}",
                         field="header", rule=f"columns among: {', '.join(COLUMNS)}", value=list(header))
    return out


def _blank(cell) -> bool:
    return cell is None or (isinstance(cell, float) and math.isnan(cell)) or (isinstance(cell, str)
                                                                              and not cell.strip())


#: Columns read by :func:`convlib.units.read`: the input (plausible range, hint) each one is.
_INPUTS = {"outer_diameter": "pipe_diameter", "length": "length", "fluid_temperature": "temperature",
           "air_temperature": "air_temperature", "wind_speed": "wind_speed", "mass_flow": "mass_flow",
           "fluid_pressure": "fluid_pressure", "steam_pressure": "fluid_pressure", "maintain_temperature": "temperature",
           "minimum_ambient": "air_temperature"}
#: How a user lets an unusual value through, in both of their words.
_OVERRIDE = "--allow-unusual (Python: allow_unusual=True)"


def _number(cell, column: str, kind: str, unit: str | None, input_name: str | None = None,
            allow_unusual: bool = False) -> float:
    """SI value of a non-blank cell: a plain number in ``unit`` (else SI), or a number with its own unit (which
    wins), read by :func:`convlib.units.split` (the parser of the command line); with ``input_name``, refused
    outside the range engineers use unless ``allow_unusual``."""
    if kind == "count":
        try:
            value = float(cell)
        except (TypeError, ValueError):
            raise InputError(f"{column}: {str(cell).strip()!r} is not a number", field=column, rule="a number",
                             value=cell) from None
        if not math.isfinite(value):
            raise InputError(f"{column}: must be a finite number; got {cell!r}", field=column,
                             rule="a finite number", value=cell)
        return value
    if input_name is None:
        return split(cell, kind, column, unit)[0]
    return read(cell, input_name, column, allow_unusual=allow_unusual, override=_OVERRIDE,
                plain_unit=unit if unit is not None else KIND_SI_UNIT[kind])


def _affine(unit: str, kind: str):
    """SI conversion of a column's ``unit`` as offset + factor x value (:func:`convlib.units.unit_affine`)."""
    factor, offset = unit_affine(unit, kind)
    return lambda value: offset + factor * value


def _nps(cell) -> float:
    return parse_nps(cell)


def _layers(cell, unit: str | None, allow_unusual: bool = False) -> list[dict]:
    layers = []
    for i, part in enumerate(split_layers(cell), start=1):
        thickness_text, written, name = split_layer(part, f"layers: layer {i}")
        thickness = _number(thickness_text, f"layers: layer {i} thickness", "length", unit, "thickness",
                            allow_unusual)
        conductivity = _number(written, f"layers: layer {i} conductivity", "conductivity", None,
                               "conductivity", allow_unusual)
        layers.append({"thickness": thickness, "conductivity": conductivity, "name": name or f"layer {i}"})
    return layers


_LEADING_NUMBER = re.compile(r"\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)(.*)$", re.S)


def _conductivity_and_name(text: str) -> tuple[str, str]:
    """``"0.045 W/m/K mineral wool"`` -> ``("0.045 W/m/K", "mineral wool")``: the number and the longest run of
    following words that reads as a conductivity unit (written after a space or glued to the number, e.g.
    ``"1Btu in/(h ft² °F)"``), the rest the layer's name.

    >>> _conductivity_and_name("1Btu in/(h ft² °F) wool")
    ('1Btu in/(h ft² °F)', 'wool')
    >>> _conductivity_and_name("0.045 mineral wool")
    ('0.045', 'mineral wool')
    """
    m = _LEADING_NUMBER.match(text)
    if m is None:
        words = text.split()
        return (words[0] if words else ""), " ".join(words[1:])
    number, rest = m[1], m[2]
    glued = bool(rest) and not rest[0].isspace()
    words = rest.split()
    for n in range(len(words), 0, -1):
        if is_unit(" ".join(words[:n]), "conductivity"):
            return number + ("" if glued else " ") + " ".join(words[:n]), " ".join(words[n:])
    if glued and words:  # a unit glued to the number that is not a conductivity: reported by the reader
        return number + words[0], " ".join(words[1:])
    return number, " ".join(words)


def _parse_row(row: int, cells: dict, units: dict, allow_unusual: bool = False) -> ParsedLine | RowError:
    """One row (column -> raw cell) to a :class:`ParsedLine`, or a :class:`RowError` listing every problem."""
    problems, values = [], {}
    tag = "" if _blank(cells.get("tag")) else str(cells["tag"]).strip()
    for name, kind in COLUMNS.items():
        cell = cells.get(name)
        if _blank(cell):
            problems += [f"{name}: missing (required)"] if name in REQUIRED else []
            continue
        try:
            if kind == "text":
                values[name] = str(cell).strip()
            elif name in ("nps", "layers"):
                values[name] = _nps(cell) if name == "nps" else _layers(cell, units.get(name), allow_unusual)
            else:
                values[name] = _number(cell, name, kind, units.get(name), _INPUTS.get(name), allow_unusual)
                if kind == "count" and values[name] < 0:
                    raise InputError(f"{name}: must be at least 0; got {cell!r}", field=name, rule="at least 0",
                                     value=cell)
        except InputError as exc:
            problems.append(str(exc))
    location = values.pop("location", "indoor").lower()
    if location not in LOCATIONS:
        problems.append(f"location: unknown location {location!r}; choose one of: {', '.join(LOCATIONS)}")
    if values.get("relative_humidity", 0.0) > 1.0:
        problems.append(f"relative_humidity: {cells['relative_humidity']!r} is more than 1; write a fraction 0-1 "
                        f"or head the column relative_humidity[%]")
    hours = values.pop("operating_hours", None)
    operation = {name: values.pop(name) for name in OPERATION_COLUMNS if name in values}
    if operation.get("mass_flow", 1.0) <= 0:
        problems.append(f"mass_flow: must be greater than 0 kg/s; got {cells['mass_flow']!r}")
    if "fluid_phase" in operation:
        operation["fluid_phase"] = operation["fluid_phase"].lower()
        if operation["fluid_phase"] not in FLUID_PHASES:
            problems.append(f"fluid_phase: unknown phase {cells['fluid_phase']!r}; choose one of: "
                            f"{', '.join(FLUID_PHASES)}")
    for name in ("fluid_pressure", "steam_pressure", "maintain_temperature", "minimum_ambient"):
        if operation.get(name, 1.0) <= 0:
            problems.append(f"{name}: must be greater than 0 {'Pa' if name.endswith('pressure') else 'K'}; "
                            f"got {cells[name]!r}")
    if hours is not None and hours > 8784.0:
        problems.append(f"operating_hours: {hours:g} h is more than a (leap) year of 8784 h")
    if _blank(cells.get("nps")) == _blank(cells.get("outer_diameter")):  # (a bad cell is reported above)
        problems.append("nps / outer_diameter: give the pipe as nps (with schedule) or as outer_diameter, not both")
    elif "nps" in values:
        if "schedule" in values:  # 40.0 from a numeric spreadsheet column, std, 10s
            values["schedule"] = re.sub(r"^(\d+)\.0*$", r"\1", values["schedule"]).upper()
        try:
            nominal_pipe(values["nps"], values.get("schedule", "40"))
        except InputError as exc:
            problems.append(f"{'nps' if 'NPS' in str(exc) else 'schedule'}: {exc}")
    if problems:
        return RowError(row, tag, "; ".join(problems))
    fittings = {name: values.pop(name) for name in FITTING_EQUIVALENT_LENGTH if name in values}
    if "outer_diameter" in values:
        values["pipe_outer_diameter"] = values.pop("outer_diameter")
    values.setdefault("sky_view_fraction", OUTDOOR_SKY_VIEW_FRACTION if location == "outdoor" else 0.0)
    try:
        return ParsedLine(row, LineSpec(**values, fittings=fittings), location, hours, operation or None)
    except ValidationError as exc:  # ranges of LineSpec: emissivity, humidity, lengths, tag
        for e in exc.errors():
            loc = e["loc"] or ("row",)
            column = "outer_diameter" if loc[0] == "pipe_outer_diameter" else str(loc[0])
            if loc[0] == "layers" and len(loc) >= 3:
                column = f"layers: layer {loc[1] + 1} {loc[2]}"
            shown = "" if _blank(cells.get(column)) else f"; cell {cells[column]!r}"
            problems.append(f"{column}: {e['msg'].removeprefix('Value error, ')}{shown}")
        return RowError(row, tag, "; ".join(problems))


def _records(source) -> list[list[str]]:
    """The CSV rows of a file, an open text file or a package resource, within :data:`MAX_BYTES`,
    :data:`MAX_ROWS` and :data:`MAX_CELLS` (checked before the file is parsed, and while it is)."""
    name = source if isinstance(source, (str, os.PathLike)) else getattr(source, "name", "")
    label = f"line list {name}" if isinstance(name, (str, os.PathLike)) and str(name) else "line list"
    if isinstance(source, (str, os.PathLike)):
        data = read_capped(source, MAX_BYTES, label=label, field="source")
    elif hasattr(source, "read"):  # an open file: read at most the cap
        data = source.read(MAX_BYTES + 1)
        if not isinstance(data, (str, bytes)):
            raise InputError(f"{label}: reading it gave {type(data).__name__}, not text", field="source",
                             rule="a text file", value=type(data).__name__)
        if len(data) > MAX_BYTES:
            raise InputError(f"{label}: larger than the {MAX_BYTES / 1e6:.3g} MB limit", field="source",
                             rule=f"at most {MAX_BYTES / 1e6:.3g} MB", value=len(data))
    elif hasattr(source, "read_bytes"):  # a package resource (importlib.resources): the package's own data
        data = source.read_bytes()
    else:
        raise InputError(f"line list source must be a path, an open text file or a list of rows; got "
                         f"{type(source).__name__}", field="source", rule="a path, file or rows",
                         value=type(source).__name__)
    if isinstance(data, bytes):
        try:
            data = data.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            raise InputError(f"{label}: the file is not UTF-8 text (byte {exc.start}); save it as 'CSV UTF-8'",
                             field="source", rule="UTF-8 text", value=str(source)) from None
    rows, separators = data.count("\n") + data.count("\r"), data.count(",")  # bounds of rows and cells, in C
    if rows > 2 * MAX_ROWS or rows + separators > MAX_CELLS:
        raise InputError(f"{label}: more than {MAX_ROWS} rows or {MAX_CELLS} cells; split the list",
                         field="source", rule=f"at most {MAX_ROWS} rows and {MAX_CELLS} cells", value=rows)
    reader = csv.reader(io.StringIO(data, newline=""))
    try:
        records = list(reader)
    except csv.Error as exc:
        raise InputError(f"{label}: not readable as CSV at row {reader.line_num}: {exc}", field="source",
                         rule="comma-separated text", value=reader.line_num) from None
    if len(records) > MAX_ROWS:
        raise InputError(f"{label}: {len(records)} rows, more than {MAX_ROWS}; split the list", field="source",
                         rule=f"at most {MAX_ROWS} rows", value=len(records))
    return records


def read_line_list(source, *, allow_unusual: bool = False) -> tuple[list[ParsedLine], list[RowError]]:
    """Read and validate a line list (see the module docstring for the columns).

    Parameters
    ----------
    source : path, file-like, or list of dict or LineSpec
        A CSV file (path, open text file or package resource); rows as dicts keyed by column
        header (unit suffixes allowed; numbered 2, 3, ... as below a header); or
        :class:`~convlib.lines.LineSpec` objects (outdoor where ``sky_view_fraction > 0``).
    allow_unusual : bool
        Accept values outside the ranges engineers use (a temperature below 150 K, a diameter over 5 m, a
        layer over 1 m, ...); by default such a cell makes its row an error with a hint ("did you mean
        95 degC?").

    Returns
    -------
    lines, errors : list of ParsedLine, list of RowError
        The valid rows in file order; the rows that failed, with row number and reason.

    Raises
    ------
    InputError
        (a ``ValueError``) For the whole file: not a readable regular file, larger than
        :data:`MAX_BYTES` (checked with ``stat`` before reading), more than :data:`MAX_ROWS`
        rows or :data:`MAX_CELLS` cells, not UTF-8, not CSV (a cell beyond 131072 characters), no header,
        unknown or repeated column, wrong unit suffix, missing column.
    """
    if isinstance(source, (list, tuple)) and source and all(isinstance(s, LineSpec) for s in source):
        return [ParsedLine(i, s, LOCATIONS[s.sky_view_fraction > 0], None) for i, s in enumerate(source, 2)], []
    if isinstance(source, (list, tuple)):
        if not all(isinstance(s, dict) for s in source):
            raise InputError("line list rows must all be dicts (column -> value) or all LineSpec objects",
                             field="source", rule="all dicts or all LineSpec objects",
                             value=sorted({type(s).__name__ for s in source}))
        header = list(dict.fromkeys(k for row in source for k in row))
        records = [header, *([row.get(k) for k in header] for row in source)]
    else:
        records = _records(source)
    if not records or all(_blank(c) for c in records[0]):
        raise InputError("line list: the first row must be the header (tag, nps or outer_diameter, length, ...)",
                         field="header", rule="the first row", value=records[0] if records else None)
    if len(records[0]) == 1 and ";" in str(records[0][0]):
        raise InputError("line list: the header is separated by ';'; save the sheet as comma-separated CSV "
                         "with '.' as the decimal mark", field="header", rule="comma-separated",
                         value=records[0][0])
    columns = _columns(records[0])
    units = {c[0]: c[1] for c in columns if c is not None}
    lines, errors = [], []
    for number, cells in enumerate(records[1:], start=2):
        if all(_blank(c) for c in cells):
            continue
        named = {c[0]: cell for c, cell in zip(columns, cells) if c is not None}
        if any(not _blank(c) for c in cells[len(columns):]):
            parsed = RowError(number, str(named.get("tag") or "").strip(),
                              f"row has {len(cells)} cells but the header has {len(columns)} columns")
        else:
            parsed = _parse_row(number, named, units, allow_unusual)
        (errors if isinstance(parsed, RowError) else lines).append(parsed)
    return lines, errors


# ----------------------------------------------------------------------------- computing
def _one_side(name: str, sign: float, doc: str) -> property:
    """A read-only property: ``max(sign * self.<name>, 0)`` per line."""
    return property(lambda self: np.maximum(sign * getattr(self, name), 0.0), doc=doc)


@dataclass(frozen=True)
class LineListResult:
    """Per-line results (arrays in file order, one entry per computed line), failed rows, settings.

    Temperatures [K], lengths and ``outer_diameter`` (of the pipe itself) [m], ``q_per_length``
    [W/m] and ``q_total`` (= q_per_length x equivalent_length) [W] at the design conditions;
    ``operating_hours`` [h/yr]; ``heat_kwh`` (lost > 0, gained < 0) and ``purchased_kwh`` [kWh/yr],
    ``cost`` (currency of the energy price), ``co2_kg`` [kg/yr]. ``dew_point`` is NaN where no
    humidity was given. ``touch_flag`` and ``condensation_flag`` are flags for review, not verdicts.
    ``notes``: warnings of the physics per line.
    """

    row: np.ndarray
    tag: tuple[str, ...]
    location: tuple[str, ...]
    layer_count: np.ndarray
    length: np.ndarray
    equivalent_length: np.ndarray
    outer_diameter: np.ndarray
    fluid_temperature: np.ndarray
    air_temperature: np.ndarray
    surface_temperature: np.ndarray
    dew_point: np.ndarray
    q_per_length: np.ndarray
    q_total: np.ndarray
    operating_hours: np.ndarray
    heat_kwh: np.ndarray
    purchased_kwh: np.ndarray
    cost: np.ndarray
    co2_kg: np.ndarray
    touch_flag: np.ndarray
    condensation_flag: np.ndarray
    outlet_temperature: np.ndarray         # NaN without mass_flow [K]; the freezing point where the water freezes
    freezing_position: np.ndarray          # where the water reaches 0 degC [m from the inlet]; NaN if it does not
    tracing_duty_per_length: np.ndarray    # NaN without maintain_temperature [W/m]
    tracing_duty: np.ndarray               # over the equivalent length [W]
    condensate: np.ndarray                 # NaN without steam_pressure [kg/s]
    notes: tuple[str, ...]
    errors: tuple[RowError, ...] = ()
    settings: dict = field(default_factory=dict)

    def __len__(self) -> int:
        return len(self.tag)

    # heat on each side, positive numbers, 0 for a line on the other side: never netted across lines
    q_lost = _one_side("q_total", 1.0, "Heat lost at the design conditions by each line that loses heat [W].")
    q_gained = _one_side("q_total", -1.0, "Heat gained at the design conditions by each line that gains heat [W].")
    heat_lost_kwh = _one_side("heat_kwh", 1.0, "Annual heat lost by each line whose year is a loss [kWh/yr].")
    heat_gained_kwh = _one_side("heat_kwh", -1.0, "Annual heat gained by each line whose year is a gain [kWh/yr].")

    @property
    def totals(self) -> dict:
        """Sums over the computed lines. Heat is never netted across lines: ``q_lost`` / ``heat_lost_kwh`` sum the
        lines that lose heat (hot lines), ``q_gained`` / ``heat_gained_kwh`` those that gain it (cold lines), both
        positive [W], [kWh/yr]; ``lines_losing`` and ``lines_gaining`` count them (at the design conditions).
        Purchased energy, cost and CO2 are sums of per-line figures, each already on the right side.
        ``annual_basis`` says what the annual figures assume (see :attr:`warnings`)."""
        sums = {name: float(np.nansum(getattr(self, name))) for name in _SUMMED}
        return {"lines": len(self), "rows_with_errors": len(self.errors), **sums,
                "lines_losing": int(np.sum(self.q_total > 0)), "lines_gaining": int(np.sum(self.q_total < 0)),
                "annual_basis": "weather bins" if self.settings.get("weather_bins") else ANNUAL_BASIS_DESIGN,
                "touch_flags": int(np.sum(self.touch_flag)), "condensation_flags": int(np.sum(self.condensation_flag))}

    @property
    def warnings(self) -> tuple[str, ...]:
        """Warnings on the whole result: :data:`WARNING_DESIGN_AIR_ALL_YEAR` when no weather bins were given."""
        return () if self.settings.get("weather_bins") or not len(self) else (WARNING_DESIGN_AIR_ALL_YEAR,)

    @property
    def cautions(self) -> tuple[str, ...]:
        """The cautions that apply: touch and condensation where any line is flagged."""
        return tuple(text for text, flags in ((CAUTION_TOUCH, self.touch_flag),
                                              (CAUTION_CONDENSATION, self.condensation_flag),
                                              (CAUTION_LINE_FREEZE, ~np.isnan(self.freezing_position)))
                     if np.any(flags))

    def rows(self) -> list[dict]:
        """One dict per computed line with SI values (None for a missing dew point), e.g. for JSON."""
        names = [n for n in self.__dataclass_fields__ if n not in ("errors", "settings")]
        values = [[v.item() if isinstance(v, np.generic) else v for v in getattr(self, n)] for n in names]
        return [{n: None if isinstance(v, float) and math.isnan(v) else v for n, v in zip(names, row)}
                for row in zip(*values)]


_SUMMED = ("length", "equivalent_length", "q_lost", "q_gained", "heat_lost_kwh", "heat_gained_kwh", "purchased_kwh",
           "cost", "co2_kg", "tracing_duty", "condensate")

ANNUAL_BASIS_DESIGN = "design air for all operating hours"
#: Warning of every output of a line list computed without weather bins.
WARNING_DESIGN_AIR_ALL_YEAR = (
    "Warning: no weather bins were given, so the annual figures take each line's design air temperature and wind "
    "for every operating hour (8,760 h/yr unless operating_hours is given). For outdoor lines a cold design "
    "condition overstates the annual loss; give weather bins (CLI: --bins FILE.json) for annual energy.")


def run_line_list(source, bins: WeatherBins | None = None, *, energy_price=0.0,
                  heating_efficiency=DEFAULT_HEATING_EFFICIENCY, cooling_cop=DEFAULT_COOLING_COP, co2_per_kwh=0.0,
                  surface_limit=TOUCH_LIMIT_METAL_JACKET, chunk_size: int = 5000, allow_unusual: bool = False,
                  progress: Callable[[float, str], None] | None = None, touch_limit=None) -> LineListResult:
    """Compute every line of a line list: surface temperature, heat flow, annual energy, flags.

    Lines with the same number of layers are solved together, ``chunk_size`` at a time, in one
    :func:`convlib.pipe.insulated_pipe` call (design condition and weather bins on a second axis);
    each line's numbers equal those of a call for that line alone. A chunk the solver rejects
    (:class:`~convlib.errors.InputError`) is re-solved line by line, so that only the offending rows
    become errors; any other exception propagates.

    Parameters
    ----------
    source : path, file-like, or list of dict or LineSpec
        See :func:`read_line_list`.
    bins : WeatherBins, optional
        Weather for the annual figures of outdoor lines; default: each line's design condition
        for its ``operating_hours`` (8760 h unless given).
    energy_price, heating_efficiency, cooling_cop, co2_per_kwh : float
        Price per purchased kWh [currency/kWh]; seasonal efficiency of the heat source (0-1] and
        COP of the chiller (> 0); emission factor of the purchased energy [kg/kWh].
    surface_limit : float
        Surface temperature above which ``touch_flag`` is set [K]; default
        :data:`~convlib.design.TOUCH_LIMIT_METAL_JACKET`, a design default, not a rule. (``touch_limit``, its
        name in 0.2.0, is still read for one version with a ``DeprecationWarning``.)
    chunk_size : int
        Lines per solver call.
    allow_unusual : bool
        See :func:`read_line_list`.
    progress : callable, optional
        ``progress(fraction, text)`` after reading and after each chunk; fractions increase to 1.

    Returns
    -------
    LineListResult
    """
    price = float(as_array("energy_price", energy_price, low=0.0))
    eff = float(as_array("heating_efficiency", heating_efficiency, low=0.0, high=1.0, low_inclusive=False))
    cop = float(as_array("cooling_cop", cooling_cop, low=0.0, low_inclusive=False))
    co2 = float(as_array("co2_per_kwh", co2_per_kwh, unit="kg/kWh", low=0.0))
    if touch_limit is not None:
        warnings.warn("run_line_list(touch_limit=) is deprecated: use surface_limit=", DeprecationWarning, stacklevel=2)
        surface_limit = touch_limit
    limit = float(as_array("surface_limit", surface_limit, unit="K", low=0.0, low_inclusive=False))
    if isinstance(chunk_size, bool) or not isinstance(chunk_size, (int, np.integer)) or chunk_size < 1:
        raise InputError(f"chunk_size must be a whole number of at least 1; got {chunk_size!r}", field="chunk_size",
                         rule="a whole number of at least 1", value=chunk_size)
    if bins is not None and not isinstance(bins, WeatherBins):
        raise InputError(f"bins must be a convlib.design.WeatherBins or None; got {type(bins).__name__}",
                         field="bins", rule="a convlib.design.WeatherBins or None", value=bins)
    if bins is not None and bins.hours.sum() <= 0:
        raise InputError("bins: the hours add up to 0", field="bins", rule="hours adding up to more than 0",
                         value=bins)
    report = progress or (lambda fraction, text: None)
    lines, errors = read_line_list(source, allow_unusual=allow_unusual)
    specs, n = [p.spec for p in lines], len(lines)
    report(0.0, f"read {n} line(s), {len(errors)} row(s) with errors")

    def col(values):
        return np.array([np.nan if v is None else v for v in values], dtype=float).reshape(n)

    d, tf, ta = (col(s.pipe_diameter() for s in specs), col(s.fluid_temperature for s in specs),
                 col(s.air_temperature for s in specs))
    wind, eps, sky = (col(s.wind_speed for s in specs), col(s.jacket_emissivity for s in specs),
                      col(s.sky_view_fraction for s in specs))
    outdoor = np.array([p.location == "outdoor" for p in lines], dtype=bool)
    given = col(p.operating_hours for p in lines)
    hours = np.where(np.isnan(given), HOURS_PER_YEAR if bins is None else bins.hours.sum(), given)
    count = np.array([len(s.layers) for s in specs], dtype=int)
    q, ts, energy = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)  # energy [Wh/m per year]
    flags, ok = np.zeros(n, dtype=np.int64), np.ones(n, dtype=bool)

    def group_layers(idx, extra_axis=True):
        k = count[idx[0]]
        thick, cond = (np.array([[getattr(ly, a) for ly in specs[i].layers] for i in idx], dtype=float)
                       .reshape(idx.size, k) for a in ("thickness", "conductivity"))
        if extra_axis:
            thick, cond = thick[:, :, None], cond[:, :, None]
        return [Layer(thick[:, j], cond[:, j], name=f"layer {j + 1}") for j in range(k)]

    def solve(idx):
        layers = group_layers(idx)
        air, wnd = ta[idx, None], wind[idx, None]
        if bins is not None:  # column 0: design condition; then one column per bin (outdoor lines)
            air = np.concatenate([air, np.where(outdoor[idx, None], bins.air_temperature, air)], axis=1)
            wnd = np.concatenate([wnd, np.where(outdoor[idx, None], bins.wind_speed, wnd)], axis=1)
        # the sky temperature a one-line call takes, so that a line's numbers do not depend on its group
        t_sky = np.where(sky[idx, None] > 0, sky_temperature(air), air)
        r = insulated_pipe(d[idx, None], tf[idx, None], layers, air_temperature=air, wind_speed=wnd,
                           jacket_emissivity=eps[idx, None], sky_view_fraction=sky[idx, None], sky_temperature=t_sky,
                           length=1.0)
        q[idx], ts[idx] = r.q_per_length[:, 0], r.surface_temperature[:, 0]
        flags[idx] = np.bitwise_or.reduce(r.warnings.astype(np.int64), axis=1)
        energy[idx] = (q[idx] * hours[idx] if bins is None else
                       (r.q_per_length[:, 1:] * bins.hours).sum(axis=1) * hours[idx] / bins.hours.sum())

    done = 0
    for k in np.unique(count):
        members = np.flatnonzero(count == k)
        for start in range(0, members.size, chunk_size):
            idx = members[start:start + chunk_size]
            try:
                solve(idx)
            except InputError:  # only input errors become row errors: any other exception is a fault, raised
                for i in idx:
                    try:
                        solve(np.array([i]))
                    except InputError as exc:
                        ok[i] = False
                        errors.append(RowError(lines[i].row, specs[i].tag, f"could not be computed: {exc}"))
            done += idx.size
            report(done / n, f"{k}-layer lines: {done} of {n}")
    if n == 0:
        report(1.0, "no lines to compute")
    keep = np.flatnonzero(ok)
    leq, rh = col(s.equivalent_length() for s in specs), col(s.relative_humidity for s in specs)
    dew, notes = np.full(n, np.nan), {i: [] for i in keep}
    # lines in operation: outlet temperature (mass_flow) and tracing duty (maintain_temperature, minimum_ambient)
    given = [p.operation or {} for p in lines]
    flow, maintain = col(g.get("mass_flow") for g in given), col(g.get("maintain_temperature") for g in given)
    coldest = col(g.get("minimum_ambient") for g in given)
    coldest = np.where(np.isnan(coldest), ta, coldest)
    outlet, duty, frozen_at = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)

    def operate(idx, wanted, label, compute):
        """Per layer count at once; a group the solver rejects is redone line by line (notes on those lines)."""
        for k in np.unique(count[idx]):
            members = idx[count[idx] == k]
            try:
                wanted[members] = compute(members, group_layers(members, extra_axis=False))
            except InputError:
                for i in members:
                    try:
                        wanted[[i]] = compute(np.array([i]), group_layers(np.array([i]), extra_axis=False))
                    except InputError as exc:
                        notes[int(i)].append(f"{label} not computed: {exc}")

    def sky_of(air, idx):
        return np.where(sky[idx] > 0, sky_temperature(air), air)

    fluid = [(g.get("fluid", "Water"), g.get("fluid_phase", "liquid")) for g in given]
    fluid_pressure = col(g.get("fluid_pressure", 101325.0) for g in given)
    flowing = np.flatnonzero(ok & ~np.isnan(flow))

    def outlet_of(i, layers, name, phase):
        p = line_temperature_profile(d[i], tf[i], layers, mass_flow=flow[i], length=leq[i], air_temperature=ta[i],
                                     fluid=name, fluid_pressure=fluid_pressure[i], fluid_phase=phase,
                                     wind_speed=wind[i], jacket_emissivity=eps[i], sky_view_fraction=sky[i],
                                     sky_temperature=sky_of(ta[i], i))
        frozen_at[i] = p.freezing_position
        return p.outlet_temperature

    for name, phase in sorted({fluid[i] for i in flowing}):
        operate(np.array([i for i in flowing if fluid[i] == (name, phase)]), outlet, "outlet temperature",
                lambda i, layers, name=name, phase=phase: outlet_of(i, layers, name, phase))
    for i in np.flatnonzero(~np.isnan(frozen_at)):
        notes[int(i)].append(f"the water reaches 0 degC {frozen_at[i]:.1f} m from the inlet, before the outlet "
                             f"(outlet temperature shown: 0 degC)")
    operate(np.flatnonzero(ok & ~np.isnan(maintain)), duty, "tracing duty", lambda i, layers: (
        tracing_duty(d[i], maintain[i], layers, air_temperature=coldest[i], wind_speed=wind[i],
                     jacket_emissivity=eps[i], sky_view_fraction=sky[i],
                     sky_temperature=sky_of(coldest[i], i)).duty_per_length))
    steam, condensate, t_sat = col(g.get("steam_pressure") for g in given), np.full(n, np.nan), np.full(n, np.nan)

    def saturated(idx):
        condensate[idx] = condensate_rate(q[idx] * leq[idx], steam[idx])
        t_sat[idx] = saturation_temperature(steam[idx])

    steamy = np.flatnonzero(ok & ~np.isnan(steam))
    try:
        saturated(steamy)
    except InputError:  # one by one, so that only the line with an impossible pressure loses its condensate
        for i in steamy:
            try:
                saturated(np.array([i]))
            except InputError as exc:
                notes[int(i)].append(f"condensate not computed: {exc}")
    for i in np.flatnonzero(np.abs(tf - t_sat) > 1.0):
        notes[int(i)].append(f"fluid temperature {tf[i] - 273.15:.1f} degC is not the saturation temperature "
                             f"{t_sat[i] - 273.15:.1f} degC at steam_pressure: condensate from the loss as given")
    humid = np.flatnonzero(ok & ~np.isnan(rh))
    try:
        dew[humid] = dew_point(ta[humid], rh[humid])
    except InputError:  # one by one, so that only the line CoolProp refuses loses its dew point
        for i in humid:
            try:
                dew[i] = dew_point(ta[i], rh[i])
            except InputError as exc:
                notes[i].append(f"dew point not computed: {exc}")
    texts = {m: describe_flags(m) for m in np.unique(flags[keep])}
    heat = energy * leq / 1000.0
    # hot service (fluid above the design air): net loss / efficiency; cold service: net gain / COP
    purchased = np.where(tf >= ta, np.maximum(heat, 0.0) / eff, np.maximum(-heat, 0.0) / cop)
    return LineListResult(
        row=np.array([p.row for p in lines], dtype=int)[keep], tag=tuple(specs[i].tag for i in keep),
        location=tuple(lines[i].location for i in keep), layer_count=count[keep],
        length=col(s.length for s in specs)[keep], equivalent_length=leq[keep], outer_diameter=d[keep],
        fluid_temperature=tf[keep], air_temperature=ta[keep], surface_temperature=ts[keep], dew_point=dew[keep],
        q_per_length=q[keep], q_total=(q * leq)[keep], operating_hours=hours[keep], heat_kwh=heat[keep],
        purchased_kwh=purchased[keep], cost=(purchased * price)[keep], co2_kg=(purchased * co2)[keep],
        touch_flag=(ts > limit)[keep], condensation_flag=(ts < dew)[keep], outlet_temperature=outlet[keep],
        freezing_position=frozen_at[keep],
        tracing_duty_per_length=duty[keep], tracing_duty=(duty * leq)[keep], condensate=condensate[keep],
        notes=tuple("; ".join(texts[flags[i]] + notes[i]) for i in keep),
        errors=tuple(sorted(errors, key=lambda e: e.row)),
        settings={"energy_price": price, "heating_efficiency": eff, "cooling_cop": cop, "co2_per_kwh": co2,
                  "surface_limit": limit, "weather_bins": bins is not None})


# ----------------------------------------------------------------------------- writing
#: Output columns after ``row, tag, status``: header (unit in brackets), attribute, display unit.
OUTPUT_COLUMNS = (
    ("location", "location", None), ("layers", "layer_count", None), ("length[m]", "length", None),
    ("equivalent_length[m]", "equivalent_length", None), ("outer_diameter[mm]", "outer_diameter", ("length", "mm")),
    *((f"{name}[degC]", name, ("temperature", "degC"))
      for name in ("fluid_temperature", "air_temperature", "surface_temperature", "dew_point")),
    ("q_per_length[W/m]", "q_per_length", None), ("q_total[W]", "q_total", None),
    ("heat_lost[W]", "q_lost", None), ("heat_gained[W]", "q_gained", None),
    ("operating_hours[h]", "operating_hours", None), ("annual_heat[kWh]", "heat_kwh", None),
    ("annual_heat_lost[kWh]", "heat_lost_kwh", None), ("annual_heat_gained[kWh]", "heat_gained_kwh", None),
    ("purchased_energy[kWh]", "purchased_kwh", None), ("cost", "cost", None), ("co2[kg]", "co2_kg", None),
    ("touch_flag", "touch_flag", None), ("condensation_flag", "condensation_flag", None),
    ("outlet_temperature[degC]", "outlet_temperature", ("temperature", "degC")),
    ("freezing_position[m]", "freezing_position", None),
    ("tracing_duty[W/m]", "tracing_duty_per_length", None), ("tracing_duty_total[W]", "tracing_duty", None),
    ("condensate[kg/h]", "condensate", ("mass_flow", "kg/h")),
)


def _cell(value) -> str:
    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else "no"
    if isinstance(value, str):
        return value
    value = float(value)
    if math.isnan(value):
        return ""
    return str(int(value)) if value.is_integer() and abs(value) < 1e15 else f"{value:.7g}"


_NUMBER = re.compile(r"-?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?")


def _inert(cells: list[str], numeric: list[bool]) -> list[str]:
    """Cells a spreadsheet will not run as formulas: text starting with one of :data:`FORMULA_PREFIXES`
    gets a leading apostrophe; a plain number in a numeric column (``-12.5``) is left a number."""
    return [cell if not cell.startswith(FORMULA_PREFIXES) or number and _NUMBER.fullmatch(cell) else "'" + cell
            for cell, number in zip(cells, numeric)]


def write_results_csv(result: LineListResult, path) -> None:
    """Write per-line results, failed rows and a totals row to CSV atomically (:func:`convlib.files.write_atomic`).

    Text cells starting with ``=``, ``+``, ``-``, ``@``, tab or CR (tags, notes, reasons quoting a cell)
    are written with a leading ``'`` so that a spreadsheet shows them instead of running them as formulas;
    numbers in the numeric columns stay numbers (``-12.5``).

    Columns: ``row, tag, status`` (``ok`` or ``error``), :data:`OUTPUT_COLUMNS` (units in brackets
    as in the input; temperatures in degC; ``annual_heat`` is ``heat_kwh``, ``co2`` is ``co2_kg``)
    and ``notes`` (warnings, or why a row failed). Rows in file order; the last row has ``row`` =
    ``TOTAL``, the sums of the summed columns and the number of flagged lines in the flag columns.
    Heat is never netted across lines: the TOTAL row leaves the signed ``q_total`` and ``annual_heat``
    empty and sums ``heat_lost`` (hot lines) and ``heat_gained`` (cold lines) separately; its notes carry
    :attr:`LineListResult.warnings`.
    """
    columns = [getattr(result, a) if conv is None else from_si(np.asarray(getattr(result, a), dtype=float), *conv)
               for _, a, conv in OUTPUT_COLUMNS]  # whole columns converted at once
    body = [(int(r), [str(r), t, "ok", *(_cell(c[i]) for c in columns), result.notes[i]])
            for i, (r, t) in enumerate(zip(result.row, result.tag))]
    body += [(e.row, [str(e.row), e.tag, "error", *[""] * len(OUTPUT_COLUMNS), e.reason]) for e in result.errors]
    totals = result.totals
    total = ["TOTAL", f"{len(result)} lines", "totals"]
    for _, attribute, _ in OUTPUT_COLUMNS:
        total.append(_cell(totals[attribute]) if attribute in _SUMMED else
                     str(totals[attribute + "s"]) if attribute.endswith("_flag") else "")
    total.append(" ".join([f"sums over the {len(result)} computed lines; {len(result.errors)} row(s) with errors not "
                           f"included; heat lost by hot lines and gained by cold lines summed apart, never netted; "
                           f"flag columns count flagged lines (flags for review, not verdicts).", *result.warnings]))
    text = io.StringIO(newline="")
    writer = csv.writer(text)
    writer.writerow(["row", "tag", "status", *(c[0] for c in OUTPUT_COLUMNS), "notes"])
    numeric = [False, False, False, *(True for _ in OUTPUT_COLUMNS), False]
    for _, cells in sorted(body, key=lambda b: b[0]):
        writer.writerow(_inert(cells, numeric))
    writer.writerow(_inert(total, numeric))
    write_atomic(path, text.getvalue().encode("utf-8"))
