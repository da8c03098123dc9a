"""Reading plant line lists (CSV): columns, units, layers, one :class:`ParsedLine` or :class:`RowError` per row.

The file format is described in :mod:`convlib.linelist` (its module docstring); computing and writing are there.
"""
from __future__ import annotations

import csv
import io
import math
import os
import re
from importlib import resources
from typing import NamedTuple

import numpy as np
from pydantic import ValidationError

from .design import FITTING_EQUIVALENT_LENGTH
from .errors import InputError
from .fittings import PRESSURE_CLASSES
from .files import read_capped
from .lines import LineSpec
from .layer_text import layer_conductivity, split_layer, split_layers
from .pipe_sizes import is_copper, nominal_pipe, parse_nps, pipe_size
from .units import KIND_SI_UNIT, read, split, unit_affine

__all__ = ["COLUMNS", "OPERATION_COLUMNS", "OUTDOOR_SKY_VIEW_FRACTION", "RowError", "ParsedLine", "read_line_list",
           "demo_lines_path", "HOURS_PER_YEAR", "FORMULA_PREFIXES", "blank", "cell_number", "cell_layers",
           "header_columns", "read_records", "read_table", "parse_rows", "csv_cell", "inert_cells"]

#: Input columns and the kind of quantity of their unit suffix ("text" and "count" take none).
COLUMNS = {
    "tag": "text", "description": "text", "nps": "count", "schedule": "text", "size": "text",
    "outer_diameter": "length",
    "length": "length", "fluid_temperature": "temperature", "air_temperature": "temperature",
    "relative_humidity": "dimensionless", "layers": "length", "location": "text",
    "sky_view_fraction": "dimensionless", "wind_speed": "speed", "jacket_emissivity": "dimensionless",
    "operating_hours": "count", **{name: "count" for name in FITTING_EQUIVALENT_LENGTH},
    "bare_valve": "count", "bare_flange_pair": "count", "pressure_class": "count",
    "mass_flow": "mass_flow", "fluid": "text", "fluid_pressure": "pressure", "fluid_phase": "text",
    "maintain_temperature": "temperature", "minimum_ambient": "temperature", "steam_pressure": "pressure",
    "pipe_wall_thickness": "length", "cool_down_to": "temperature", "warm_up_time": "time",
}
#: Optional columns of lines in operation (not part of a LineSpec): outlet temperature and tracing duty.
OPERATION_COLUMNS = ("mass_flow", "fluid", "fluid_pressure", "fluid_phase", "maintain_temperature",
                     "minimum_ambient", "steam_pressure", "pipe_wall_thickness", "cool_down_to", "warm_up_time")
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


# ----------------------------------------------------------------------------- cells of written lists
def csv_cell(value) -> str:
    """A result value as a CSV cell: yes/no, text, '' for NaN, a whole number or 7 significant digits."""
    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else "no"
    if isinstance(value, str):
        return value
    value = float(value)
    if math.isnan(value):
        return ""
    return str(int(value)) if value.is_integer() and abs(value) < 1e15 else f"{value:.7g}"


_NUMBER = re.compile(r"-?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?")


def inert_cells(cells: list[str], numeric: list[bool]) -> list[str]:
    """Cells a spreadsheet will not run as formulas: text starting with one of :data:`FORMULA_PREFIXES`
    gets a leading apostrophe; a plain number in a numeric column (``-12.5``) is left a number."""
    return [cell if not cell.startswith(FORMULA_PREFIXES) or number and _NUMBER.fullmatch(cell) else "'" + cell
            for cell, number in zip(cells, numeric)]



# ----------------------------------------------------------------------------- reading
def _pipe_size_column(seen: set) -> list[str]:
    """The header problem of a line list without a column of the pipe's size."""
    if not {"nps", "outer_diameter", "size"} & seen:
        return ["give the pipe size in a column 'nps' (with 'schedule'), 'size' (DN100, CU22x1.0, ...) or "
                "'outer_diameter'"]
    return []


def header_columns(header, columns: dict = COLUMNS, required=REQUIRED, what: str = "line list",
                   more_problems=_pipe_size_column) -> list[tuple[str, str | None] | None]:
    """(name, unit) per header cell of a list with ``columns`` (None for an empty cell); InputError for the file."""
    out, problems, seen = [], [], set()
    for text in ("" if h is None else str(h) for h in header):
        m = _HEADER.match(text)
        if m is not None and not m["name"] and not m["unit"]:
            out.append(None)
            continue
        name = re.sub(r"[\s\-]+", "_", m["name"].strip().lower()) if m else text
        unit = (m["unit"] or "").strip() if m else ""
        unit = None if unit in ("", "-", "1") else unit
        kind = columns.get(name)
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
    missing = [c for c in required if c not in seen]
    if missing:
        problems.append(f"missing required column(s): {', '.join(missing)}")
    problems += more_problems(seen) if more_problems is not None else []
    if problems:
        raise InputError(f"{what} header: {'; '.join(problems)}; the columns are: {', '.join(columns)}",
                         field="header", rule=f"columns among: {', '.join(columns)}", value=list(header))
    return out


def blank(cell) -> bool:
    """True for an empty cell: None, NaN, or only spaces."""
    return cell is None or (isinstance(cell, float) and math.isnan(cell)) or (isinstance(cell, str)
                                                                              and not cell.strip())


#: Columns read by :func:`convlib.units.read`: the input (plausible range, hint) each one is.
_INPUTS = {"outer_diameter": "pipe_diameter", "length": "length", "fluid_temperature": "temperature",
           "air_temperature": "air_temperature", "wind_speed": "wind_speed", "mass_flow": "mass_flow",
           "fluid_pressure": "fluid_pressure", "steam_pressure": "fluid_pressure", "maintain_temperature": "temperature",
           "minimum_ambient": "air_temperature", "pipe_wall_thickness": "wall_thickness",
           "cool_down_to": "temperature", "warm_up_time": "duration"}
#: How a user lets an unusual value through, in both of their words.
_OVERRIDE = "--allow-unusual (Python: allow_unusual=True)"


def cell_number(cell, column: str, kind: str, unit: str | None, input_name: str | None = None,
            allow_unusual: bool = False) -> float:
    """SI value of a non-blank cell of a list (line list, vessel list): a plain number in ``unit`` (else SI), or a number with its own unit (which
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


def cell_layers(cell, unit: str | None, allow_unusual: bool = False, column: str = "layers") -> list[dict]:
    """The layers of a ``layers`` cell (:mod:`convlib.layer_text`), dicts of LayerSpec fields (SI)."""
    layers = []
    for i, part in enumerate(split_layers(cell), start=1):
        thickness_text, written, name = split_layer(part, f"{column}: layer {i}")
        thickness = cell_number(thickness_text, f"{column}: layer {i} thickness", "length", unit, "thickness",
                                allow_unusual)
        field = f"{column}: layer {i} conductivity"
        known, conductivity = layer_conductivity(
            written, lambda text: cell_number(text, field, "conductivity", None, "conductivity", allow_unusual), field)
        given = {"material": known} if known is not None else {"conductivity": conductivity}
        layers.append({"thickness": thickness, **given, "name": name or known or f"layer {i}"})
    return layers


def _size_problems(cells: dict, values: dict) -> list[str]:
    """Problems of the pipe's size: exactly one of nps (with schedule), size and outer_diameter; a ``size`` becomes
    the outer diameter (``values`` updated in place)."""
    problems = []
    sizes = [name for name in ("nps", "size", "outer_diameter") if not blank(cells.get(name))]
    if len(sizes) != 1:  # (a bad cell is reported above)
        problems.append("nps / size / outer_diameter: give the pipe as nps (with schedule), as size (e.g. DN100, "
                        "CU22x1.0, B88-3/4-L) or as outer_diameter, one of them")
    elif "size" in values:
        try:
            named = pipe_size(values.pop("size"))
            values["outer_diameter"] = named.outer_diameter
            if math.isfinite(named.wall_thickness):  # a copper tube or NPS names its wall; a DN does not
                values["_size_wall"] = named.wall_thickness
            if is_copper(named):
                values["_size_copper"] = True
        except InputError as exc:
            problems.append(f"size: {exc}")
    elif "nps" in values:
        if "schedule" in values:  # 40.0 from a numeric spreadsheet column, std, 10s
            values["schedule"] = re.sub(r"^(\d+)\.0*$", r"\1", values["schedule"]).upper()
        try:
            nominal_pipe(values["nps"], values.get("schedule", "40"))
        except InputError as exc:
            problems.append(f"{'nps' if 'NPS' in str(exc) else 'schedule'}: {exc}")
    return problems


def _parse_row(row: int, cells: dict, units: dict, allow_unusual: bool = False) -> ParsedLine | RowError:
    """One row (column -> raw cell) to a :class:`ParsedLine`, or a :class:`RowError` listing every problem."""
    problems, values = [], {}
    tag = "" if blank(cells.get("tag")) else str(cells["tag"]).strip()
    for name, kind in COLUMNS.items():
        cell = cells.get(name)
        if blank(cell):
            problems += [f"{name}: missing (required)"] if name in REQUIRED else []
            continue
        try:
            if kind == "text":
                values[name] = str(cell).strip()
            elif name in ("nps", "layers"):
                values[name] = _nps(cell) if name == "nps" else cell_layers(cell, units.get(name), allow_unusual)
            else:
                values[name] = cell_number(cell, name, kind, units.get(name), _INPUTS.get(name), allow_unusual)
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
    problems += _size_problems(cells, values)
    if "_size_wall" in values and "pipe_wall_thickness" not in operation:
        operation["pipe_wall_thickness"] = values["_size_wall"]
    values.pop("_size_wall", None)
    if values.pop("_size_copper", False):
        operation["wall_material"] = "copper"  # derived from the size: the wall's heat capacity (COPPER_WALL)
    if problems:
        return RowError(row, tag, "; ".join(problems))
    fittings = {name: values.pop(name) for name in FITTING_EQUIVALENT_LENGTH if name in values}
    for column, field_name in (("bare_valve", "bare_valves"), ("bare_flange_pair", "bare_flange_pairs")):
        if column in values:
            values[field_name] = values.pop(column)
    if "pressure_class" in values:
        if values["pressure_class"] not in PRESSURE_CLASSES:
            return RowError(row, tag, f"pressure_class: {cells['pressure_class']!r} is not one of: "
                                      f"{', '.join(map(str, PRESSURE_CLASSES))}")
        values["pressure_class"] = int(values["pressure_class"])
    if "outer_diameter" in values:
        values["pipe_outer_diameter"] = values.pop("outer_diameter")
    values.setdefault("sky_view_fraction", OUTDOOR_SKY_VIEW_FRACTION if location == "outdoor" else 0.0)
    try:
        return ParsedLine(row, LineSpec(**values, fittings=fittings), location, hours, operation or None)
    except ValidationError as exc:  # ranges of LineSpec: emissivity, humidity, lengths, tag
        for e in exc.errors():
            given = (e.get("ctx") or {}).get("error")  # a rule of LineSpec across fields names its column
            loc = e["loc"] or ((given.field,) if isinstance(given, InputError) and given.field in COLUMNS else ("row",))
            column = {"pipe_outer_diameter": "outer_diameter", "bare_valves": "bare_valve",
                      "bare_flange_pairs": "bare_flange_pair"}.get(loc[0], str(loc[0]))
            if loc[0] == "layers" and len(loc) >= 3:
                column = f"layers: layer {loc[1] + 1} {loc[2]}"
            shown = "" if blank(cells.get(column)) else f"; cell {cells[column]!r}"
            problems.append(f"{column}: {e['msg'].removeprefix('Value error, ')}{shown}")
        return RowError(row, tag, "; ".join(problems))


def read_records(source, what: str = "line list") -> list[list[str]]:
    """The CSV rows of a file, an open text file or a package resource, within :data:`MAX_BYTES`,
    :data:`MAX_ROWS` and :data:`MAX_CELLS` (checked before the file is parsed, and while it is)."""
    name = source if isinstance(source, (str, os.PathLike)) else getattr(source, "name", "")
    label = f"{what} {name}" if isinstance(name, (str, os.PathLike)) and str(name) else what
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
        raise InputError(f"{what} source must be a path, an open text file or a list of rows; got "
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
    units, rows = read_table(source, "line list", "tag, nps or outer_diameter, length, ...", "or all LineSpec objects")
    return parse_rows(rows, _parse_row, units, allow_unusual)


def parse_rows(rows, parse, *args) -> tuple[list, list[RowError]]:
    """The ``(number, cells)`` rows of :func:`read_table` through ``parse(number, cells, *args)``: parsed, RowErrors."""
    parsed_rows, errors = [], []
    for number, named in rows:
        parsed = named if isinstance(named, RowError) else parse(number, named, *args)
        (errors if isinstance(parsed, RowError) else parsed_rows).append(parsed)
    return parsed_rows, errors


def read_table(source, what: str = "line list", header_hint: str = "tag, ...", alternative: str = "",
               columns: dict = COLUMNS, required=REQUIRED, more_problems=_pipe_size_column):
    """Column units and ``(row number, {column: cell})`` per non-blank row of a list (a RowError for extra cells)."""
    if isinstance(source, (list, tuple)):
        if not all(isinstance(s, dict) for s in source):
            raise InputError(f"{what} rows must all be dicts (column -> value){' ' * bool(alternative)}{alternative}",
                             field="source", rule=f"all dicts{' ' * bool(alternative)}{alternative}",
                             value=sorted({type(s).__name__ for s in source}))
        header = list(dict.fromkeys(k for row in source for k in row))
        records = [header, *([row.get(k) for k in header] for row in source)]
    else:
        records = read_records(source, what)
    if not records or all(blank(c) for c in records[0]):
        raise InputError(f"{what}: the first row must be the header ({header_hint})",
                         field="header", rule="the first row", value=records[0] if records else None)
    if len(records[0]) == 1 and ";" in str(records[0][0]):
        raise InputError(f"{what}: the header is separated by ';'; save the sheet as comma-separated CSV "
                         "with '.' as the decimal mark", field="header", rule="comma-separated",
                         value=records[0][0])
    header = header_columns(records[0], columns, required, what, more_problems)
    rows = []
    for number, cells in enumerate(records[1:], start=2):
        if all(blank(c) for c in cells):
            continue
        named = {c[0]: cell for c, cell in zip(header, cells) if c is not None}
        if any(not blank(c) for c in cells[len(header):]):
            named = RowError(number, str(named.get("tag") or "").strip(),
                             f"row has {len(cells)} cells but the header has {len(header)} columns")
        rows.append((number, named))
    return {c[0]: c[1] for c in header if c is not None}, rows
