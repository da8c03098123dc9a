r"""A small library of insulation and jacket materials by name, each with k(T) and its published source.

Every entry carries its conductivity as a :class:`~convlib.conductivity.Conductivity` (a table of mean
temperature -> apparent conductivity, ``form="mean"``; see that module for how mean-temperature data are
integrated over a layer), the range of temperatures it may be used at, and the source of its numbers beside it.
Values that stand in a standard's specification table are **maximum** apparent conductivities a product must
meet: a design value on the safe side for heat loss (a real product is usually better). Values from a
manufacturer's data sheet are that product's published typical values. The library holds few entries on purpose:
only numbers whose source is named; a value recalled but not checked against its source says ``from memory``.

Where the data end, the layer is flagged in the results (``CONDUCTIVITY_EXTRAPOLATED``: k is held at the end
value); a layer hotter than the material's ``max_temperature`` (or colder than ``min_temperature``) is reported by
:func:`service_warnings` (the command line and line lists print it). Neither is a silent answer.

A material known at **one** mean temperature only (a standard's single requirement) is held at that value up to
that temperature and flagged above it: k of these materials rises with temperature, so the value is on the safe
side below its point and not above it.

Users extend the library with their own file (:func:`load_materials`, JSON or CSV); a bad file raises
:class:`~convlib.errors.InputError` and leaves the library as it was.

Examples
--------
>>> from convlib import materials
>>> m = materials.material("glass_fiber_pipe_alley_k")
>>> round(float(m.conductivity.at(373.15)), 4)   # 100 degC = 212 degF: 0.28 + 0.12 (0.34 - 0.28) Btu·in/(h·ft²·°F)
0.0414
>>> layer = materials.layer(0.05, "glass_fiber_pipe_alley_k")
>>> layer.conductivity is m.conductivity
True
"""
from __future__ import annotations

import csv
import io
import math
import os
import threading
from dataclasses import dataclass

import numpy as np

from .conductivity import Conductivity
from .errors import InputError
from .files import parse_json, read_capped
from .pipe import Layer

__all__ = ["Material", "material", "materials", "material_names", "layer", "jacket_emissivity",
           "jacket_emissivities", "load_materials", "service_warnings", "MAX_MATERIAL_BYTES", "MAX_MATERIALS"]

#: 1 Btu(IT)·in/(h·ft²·°F) in W/m/K (Btu_IT = 1055.05585262 J, in = 0.0254 m, ft = 0.3048 m, °F = 5/9 K).
BTU_IN = 1055.05585262 * 0.0254 / (3600.0 * 0.3048 ** 2 * 5.0 / 9.0)
MAX_MATERIAL_BYTES = 1_000_000   #: largest user material file read [bytes]
MAX_MATERIALS = 500              #: most materials in a user file
MAX_POINTS = 100                 #: most (temperature, conductivity) points of one material
_NAME_CHARS = set("abcdefghijklmnopqrstuvwxyz0123456789_")


def _kelvin_from_f(*degrees_f):
    return tuple((f - 32.0) * 5.0 / 9.0 + 273.15 for f in degrees_f)


@dataclass(frozen=True, eq=False)
class Material:
    """One material of the library.

    Attributes
    ----------
    name : str
        The key (snake_case) used in Python, on the command line and in line lists.
    display_name : str
        How people call it, for tables and reports.
    conductivity : Conductivity
        k(T) [W/m/K] against temperature [K]; its ``valid_range`` is where the data are.
    max_temperature, min_temperature : float or None
        Service limits of the material [K] (``None``: not stated by the source).
    source : str
        Where the numbers come from (standard and table, or data sheet).
    note : str
        What the numbers mean (a specification maximum or typical values) and their limits.
    kind : str
        ``"insulation"`` or ``"jacket"``.
    """

    name: str
    display_name: str
    conductivity: Conductivity
    max_temperature: float | None
    source: str
    note: str = ""
    min_temperature: float | None = None
    kind: str = "insulation"


def _one_point(k_value, mean_temperature, low=1.0) -> Conductivity:
    """A conductivity known at one mean temperature [K]: held at that value up to it, flagged above."""
    return Conductivity.polynomial([k_value], form="mean", valid_range=(low, mean_temperature))


def _builtin() -> dict[str, Material]:
    entries = [
        # Manson Insulation, "Alley-K" glass-fibre pipe insulation, product page, Technical data: thermal conductivity
        # by ASTM C335 at mean temperatures 75-600 degF [Btu·in/(ft²·h·°F)]; maximum service temperature 1000 degF
        # (ASTM C411). https://imanson.com/en-us/products/pipe-equipment-insulation/alley-k
        Material(
            "glass_fiber_pipe_alley_k", "Glass-fibre pipe insulation (Manson Alley-K)",
            Conductivity.table(_kelvin_from_f(75, 100, 200, 300, 400, 500, 600),
                               np.array([0.23, 0.24, 0.28, 0.34, 0.42, 0.51, 0.62]) * BTU_IN, form="mean"),
            max_temperature=_kelvin_from_f(1000)[0],
            source="Manson Insulation, Alley-K pipe insulation data sheet (technical data: ASTM C335 thermal "
                   "conductivity at mean temperatures 75-600 degF; maximum service temperature 1000 degF, ASTM C411)",
            note="manufacturer's published typical values (not a specification maximum); data 24-316 degC mean"),
        # ASTM C533 (calcium silicate block and pipe), Table 1 as summarised by North Refractories
        # (https://www.northrefractories.com/calcium-silicate-pipe-segments-insulation/): Type I maximum apparent
        # conductivity 0.41 Btu·in/(h·ft²·°F) at 100 degF mean; Type I is for 140-1200 degF (C533-07 section 4.1.2).
        Material(
            "calcium_silicate_c533_type1", "Calcium silicate pipe and block, ASTM C533 Type I",
            _one_point(0.41 * BTU_IN, _kelvin_from_f(100)[0]),
            max_temperature=_kelvin_from_f(1200)[0], min_temperature=None,
            source="ASTM C533, Table 1: Type I maximum apparent thermal conductivity at 100 degF mean (as quoted by "
                   "North Refractories' page on calcium silicate); use 140-1200 degF, C533-07 section 4.1.2",
            note="specification maximum (a conservative design value) at 100 degF (38 degC) mean only: the "
                 "standard's values at higher mean temperatures are not in this library, so a layer above 38 degC "
                 "is flagged (k held at the 38 degC value, which understates the loss of a hot line)"),
        # ASTM C534/C534M (flexible elastomeric cellular insulation), Grade 1: maximum apparent conductivity at
        # 75 degF (24 degC) mean: 0.28 Btu·in/(h·ft²·°F)  # from memory
        # Service range of Grade 1: -297 to 220 degF (-183 to 104 degC), C534/C534M-08 section 1.1.
        Material(
            "elastomeric_c534_grade1", "Flexible elastomeric foam, ASTM C534 Grade 1",
            _one_point(0.28 * BTU_IN, _kelvin_from_f(75)[0]),
            max_temperature=_kelvin_from_f(220)[0], min_temperature=_kelvin_from_f(-297)[0],
            source="ASTM C534/C534M, Grade 1: maximum apparent thermal conductivity at 75 degF mean (value from "
                   "memory, check against the current edition); service range -297 to 220 degF, C534/C534M-08 1.1",
            note="specification maximum at 24 degC mean only (from memory); flagged above 24 degC"),
        # Owens Corning FOAMGLAS F cellular glass, data sheet: thermal resistance per inch 2.8 h·ft²·°F/Btu at 75 degF
        # mean (ASTM C518 / C177); service temperature -445 to 806 degF (-265 to 430 degC). A cellular glass of
        # ASTM C552 (use -450 to 800 degF, C552 section 1.1). k = 1/R per inch.
        Material(
            "cellular_glass_foamglas_f", "Cellular glass (Owens Corning FOAMGLAS F)",
            _one_point(BTU_IN / 2.8, _kelvin_from_f(75)[0]),
            max_temperature=_kelvin_from_f(806)[0], min_temperature=_kelvin_from_f(-445)[0],
            source="Owens Corning, FOAMGLAS F cellular glass data sheet: R 2.8 per inch at 75 degF mean (ASTM "
                   "C518/C177), service temperature -445 to 806 degF",
            note="manufacturer's typical value at 24 degC mean only; flagged above 24 degC"),
        # Jacket metals: CIBSE Guide A (2015), Table 3.36, thermal conductivity of impermeable materials [W/m/K].
        Material("aluminium_jacket", "Aluminium jacketing", Conductivity.constant(230.0), max_temperature=None,
                 source="CIBSE Guide A, Table 3.36: aluminium 230 W/m/K", note="constant", kind="jacket"),
        Material("stainless_steel_jacket", "Stainless steel jacketing", Conductivity.constant(16.0),
                 max_temperature=None, source="CIBSE Guide A, Table 3.36: stainless steel, 20 % Ni, 16 W/m/K",
                 note="constant", kind="jacket"),
        Material("steel_jacket", "Galvanised steel jacketing", Conductivity.constant(45.0), max_temperature=None,
                 source="CIBSE Guide A, Table 3.36: steel 45 W/m/K (zinc coating neglected)", note="constant",
                 kind="jacket"),
    ]
    return {m.name: m for m in entries}


#: Long-wave emissivity of common jacket surfaces: name -> (emissivity, display name, source).
_EMISSIVITIES = {
    # VDI 2055 Part 1 (2008), table of emissivities of outer surfaces  # from memory
    "aluminium_new": (0.05, "Aluminium, bright (new)", "VDI 2055-1, aluminium bright rolled (from memory)"),
    "aluminium_oxidised": (0.13, "Aluminium, oxidised (in service)", "VDI 2055-1, aluminium oxidised (from memory)"),
    "stainless_steel": (0.15, "Stainless (austenitic) steel", "VDI 2055-1, austenitic steel (from memory)"),
    "galvanised_steel_new": (0.26, "Galvanised steel, bright", "VDI 2055-1, galvanised sheet bright (from memory)"),
    "galvanised_steel_weathered": (0.44, "Galvanised steel, dusty / weathered",
                                   "VDI 2055-1, galvanised sheet dusty (from memory)"),
    "painted": (0.94, "Painted surface", "VDI 2055-1, non-metallic surfaces and paints (from memory)"),
    # PVC and fabric (glass cloth, canvas) jackets: 0.9, common practice, no source
    "pvc_or_fabric": (0.90, "PVC or fabric jacket", "common practice, no source"),
}

_lock = threading.Lock()
_library: dict[str, Material] | None = None


def _get_library() -> dict[str, Material]:
    global _library
    with _lock:
        if _library is None:
            _library = _builtin()
        return _library


def material_names() -> list[str]:
    """The names of every material in the library (built in and loaded), sorted."""
    return sorted(_get_library())


def materials(kind: str | None = None) -> list[Material]:
    """Every material of the library (built in and loaded), sorted by name; ``kind`` ``"insulation"`` or
    ``"jacket"`` keeps those only."""
    return [m for _, m in sorted(_get_library().items()) if kind is None or m.kind == kind]


def _unknown(name, field: str = "material") -> InputError:
    names = ", ".join(material_names())
    return InputError(f"unknown material {name!r}; the materials are: {names}", field=field,
                      rule=f"one of: {names}", value=name)


def material(name: str) -> Material:
    """The material called ``name`` (its snake_case key; case does not matter).

    Raises :class:`~convlib.errors.InputError` listing the names for an unknown one.
    """
    key = str(name).strip().lower()
    found = _get_library().get(key)
    if found is None:
        raise _unknown(name)
    return found


def find(name: str) -> Material | None:
    """The material called ``name``, or ``None`` (no error)."""
    return _get_library().get(str(name).strip().lower())


def layer(thickness, name: str, *, layer_name: str | None = None) -> Layer:
    """A :class:`~convlib.pipe.Layer` of ``thickness`` [m] of the material ``name`` with its k(T).

    The layer's name is the material's key unless ``layer_name`` is given.

    >>> layer(0.05, "calcium_silicate_c533_type1").name
    'calcium_silicate_c533_type1'
    """
    m = material(name)
    return Layer(thickness, m.conductivity, name=layer_name or m.name)


def jacket_emissivities() -> dict[str, tuple[float, str, str]]:
    """The emissivity presets: name -> (emissivity, display name, source)."""
    return dict(_EMISSIVITIES)


def jacket_emissivity(name: str) -> float:
    """Long-wave emissivity [-] of a jacket surface by name (see :func:`jacket_emissivities`).

    >>> jacket_emissivity("aluminium_new")
    0.05
    """
    key = str(name).strip().lower()
    if key not in _EMISSIVITIES:
        choices = ", ".join(sorted(_EMISSIVITIES))
        raise InputError(f"unknown jacket surface {name!r}; the surfaces are: {choices}", field="jacket_emissivity",
                         rule=f"one of: {choices}", value=name)
    return _EMISSIVITIES[key][0]


def service_warnings(layers, result) -> list[tuple[np.ndarray, str]]:
    """Layers of library materials used beyond their service temperatures.

    Parameters
    ----------
    layers : sequence of Layer
        The layers given to :func:`~convlib.pipe.insulated_pipe` (a layer is a library material's when its
        conductivity is that material's object, as :func:`layer` builds it).
    result : PipeResult
        Its ``interface_temperatures`` (the last ``len(layers) + 1`` are the faces of the layers).

    Returns
    -------
    list of (mask, text)
        Per offending layer: a boolean mask over the result's points and a readable warning.
    """
    layers = list(layers)
    if not layers:
        return []
    by_conductivity = {id(m.conductivity): m for m in _get_library().values()}
    faces = np.asarray(result.interface_temperatures)[-(len(layers) + 1):]
    out = []
    for j, lay in enumerate(layers):
        m = by_conductivity.get(id(lay.conductivity))
        if m is None:
            continue
        hot, cold = np.maximum(faces[j], faces[j + 1]), np.minimum(faces[j], faces[j + 1])
        present = np.asarray(lay.thickness) > 0
        if m.max_temperature is not None:
            mask = (hot > m.max_temperature) & present
            if np.any(mask):
                out.append((mask, f"layer {lay.name!r}: {m.display_name} is above its maximum service temperature "
                                  f"{m.max_temperature - 273.15:.0f} degC (up to {np.max(hot[mask]) - 273.15:.0f} "
                                  f"degC): choose another material or an inner layer that takes the heat"))
        if m.min_temperature is not None:
            mask = (cold < m.min_temperature) & present
            if np.any(mask):
                out.append((mask, f"layer {lay.name!r}: {m.display_name} is below its minimum service temperature "
                                  f"{m.min_temperature - 273.15:.0f} degC"))
    return out


# ----------------------------------------------------------------------------- user files
_FIELDS = ("name", "display_name", "kind", "max_temperature", "min_temperature", "source", "note", "form",
           "temperature_unit", "conductivity_unit", "temperatures", "conductivities", "constant")


def _refuse(label, problem, field, rule, value=None) -> InputError:
    return InputError(f"{label}: {problem}", field=field, rule=rule, value=value)


def _affine(unit, kind, label, field):
    from .units import unit_affine  # pint only for a unit that is not common

    try:
        return unit_affine(str(unit), kind)
    except ValueError:
        raise _refuse(label, f"{field}: {unit!r} is not a unit of {kind}", field, f"a unit of {kind}", unit) from None


def _finite(value, label, field) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise _refuse(label, f"{field}: {value!r} is not a number", field, "a finite number", value)
    try:
        number = float(value)
    except ValueError:
        raise _refuse(label, f"{field}: {value!r} is not a number", field, "a finite number", value) from None
    if not math.isfinite(number):
        raise _refuse(label, f"{field}: must be finite; got {value!r}", field, "a finite number", value)
    return number


def _text(record, key, label, where, default="", required=False) -> str:
    value = record.get(key, default)
    if value is None or (isinstance(value, str) and not value.strip()):
        if required:
            raise _refuse(label, f"{where}: {key} is required", key, "a non-empty text", value)
        return default
    if not isinstance(value, str) or len(value) > 500:
        raise _refuse(label, f"{where}: {key} must be a text of at most 500 characters", key,
                      "a text of at most 500 characters", value)
    return value.strip()


def _build(record: dict, label: str, where: str) -> Material:
    """One validated Material from a record of a user file (SI or the units the record names)."""
    unknown = sorted(set(record) - set(_FIELDS))
    if unknown:
        raise _refuse(label, f"{where}: unknown field(s) {', '.join(unknown)}; the fields are: {', '.join(_FIELDS)}",
                      unknown[0], f"fields among: {', '.join(_FIELDS)}", unknown)
    name = _text(record, "name", label, where, required=True)
    if not set(name) <= _NAME_CHARS or not name[0].isalpha() or len(name) > 64:
        raise _refuse(label, f"{where}: name {name!r} must be snake_case (a-z, 0-9, _; starting with a letter; at "
                      f"most 64 characters)", "name", "snake_case, at most 64 characters", name)
    where = f"{where} ({name})"
    kind = _text(record, "kind", label, where, default="insulation")
    if kind not in ("insulation", "jacket"):
        raise _refuse(label, f"{where}: kind must be insulation or jacket; got {kind!r}", "kind",
                      "insulation or jacket", kind)
    form = _text(record, "form", label, where, default="mean")
    t_factor, t_offset = _affine(_text(record, "temperature_unit", label, where, default="K"), "temperature", label,
                                 "temperature_unit")
    k_factor, _ = _affine(_text(record, "conductivity_unit", label, where, default="W/m/K"), "conductivity", label,
                          "conductivity_unit")
    limits = {}
    for key in ("max_temperature", "min_temperature"):
        raw = record.get(key)
        limits[key] = None if raw in (None, "") else t_offset + t_factor * _finite(raw, label, f"{where}: {key}")
        if limits[key] is not None and limits[key] <= 0:
            raise _refuse(label, f"{where}: {key} is below absolute zero", key, "above 0 K", raw)
    if "constant" in record and ("temperatures" in record or "conductivities" in record):
        raise _refuse(label, f"{where}: give a constant or a table (temperatures, conductivities), not both",
                      "constant", "a constant or a table", record.get("constant"))
    try:
        if "constant" in record:
            conductivity = Conductivity.constant(k_factor * _finite(record["constant"], label, f"{where}: constant"))
        else:
            points = [record.get("temperatures"), record.get("conductivities")]
            if not all(isinstance(p, list) for p in points) or len(points[0]) > MAX_POINTS:
                raise _refuse(label, f"{where}: temperatures and conductivities must be lists of at most "
                              f"{MAX_POINTS} numbers (or give a constant)", "temperatures, conductivities",
                              f"lists of at most {MAX_POINTS} numbers", None)
            t = [t_offset + t_factor * _finite(v, label, f"{where}: temperatures") for v in points[0]]
            k = [k_factor * _finite(v, label, f"{where}: conductivities") for v in points[1]]
            conductivity = Conductivity.table(t, k, form=form)
    except InputError as exc:
        if str(exc).startswith(label):
            raise
        raise _refuse(label, f"{where}: {exc}", exc.field, exc.rule, exc.value) from None
    return Material(name, _text(record, "display_name", label, where, default=name), conductivity,
                    limits["max_temperature"], _text(record, "source", label, where, required=True),
                    _text(record, "note", label, where), limits["min_temperature"], kind)


def _csv_records(text: str, label: str) -> list[dict]:
    """CSV: one row per (temperature, conductivity) point, rows of one material share its name; a unit in
    brackets after ``temperature``, ``conductivity`` or ``max_temperature`` / ``min_temperature`` applies to
    the column; or a row ``constant``."""
    rows = list(csv.reader(io.StringIO(text, newline="")))
    rows = [r for r in rows if any(c.strip() for c in r)]
    if not rows:
        raise _refuse(label, "empty file; the first row is the header", "header", "a header row", None)
    header = []
    units = {}
    for cell in rows[0]:
        name, _, unit = cell.strip().partition("[")
        name = name.strip().lower().replace(" ", "_")
        header.append(name)
        if unit:
            units[name] = unit.rstrip("]").strip()
    allowed = {"name", "display_name", "kind", "temperature", "conductivity", "constant", "max_temperature",
               "min_temperature", "source", "note", "form"}
    unknown = [h for h in header if h not in allowed]
    if unknown or "name" not in header:
        raise _refuse(label, f"header: unknown column(s) {', '.join(unknown) or '-'} or no 'name'; the columns are: "
                      f"{', '.join(sorted(allowed))}", "header", f"columns among: {', '.join(sorted(allowed))}",
                      rows[0])
    if units.get("max_temperature", units.get("temperature")) != units.get("temperature") or \
            units.get("min_temperature", units.get("temperature")) != units.get("temperature"):
        raise _refuse(label, "header: give temperature, max_temperature and min_temperature in the same unit",
                      "header", "one temperature unit", rows[0])
    records: dict[str, dict] = {}
    for number, row in enumerate(rows[1:], start=2):
        if len(row) > len(header):
            raise _refuse(label, f"row {number}: {len(row)} cells but the header has {len(header)} columns",
                          "row", "as many cells as the header", number)
        cells = {h: c.strip() for h, c in zip(header, row) if c.strip()}
        name = cells.get("name", "")
        record = records.setdefault(name, {"name": name, "temperatures": [], "conductivities": []})
        for key in ("display_name", "kind", "max_temperature", "min_temperature", "source", "note", "form",
                    "constant"):
            if key in cells:
                if key in record and record[key] != cells[key]:
                    raise _refuse(label, f"row {number}: {key} of {name!r} differs from an earlier row", key,
                                  "the same on every row of a material", cells[key])
                record[key] = cells[key]
        if ("temperature" in cells) != ("conductivity" in cells):
            raise _refuse(label, f"row {number}: give temperature and conductivity together", "temperature",
                          "both or neither", number)
        if "temperature" in cells:
            record["temperatures"].append(cells["temperature"])
            record["conductivities"].append(cells["conductivity"])
    for record in records.values():
        if "constant" in record:
            if record["temperatures"]:
                raise _refuse(label, f"{record['name']!r}: a constant and table points, give one", "constant",
                              "a constant or a table", record["constant"])
            del record["temperatures"], record["conductivities"]
        if "temperature" in units:
            record["temperature_unit"] = units["temperature"]
        elif "max_temperature" in units or "min_temperature" in units:
            record["temperature_unit"] = units.get("max_temperature", units.get("min_temperature"))
        if "conductivity" in units or "constant" in units:
            record["conductivity_unit"] = units.get("conductivity", units.get("constant"))
    return list(records.values())


def load_materials(path, *, replace: bool = False) -> list[str]:
    """Add the materials of a user's JSON or CSV file to the library; returns their names.

    JSON: ``{"materials": [{"name": "my_wool", "display_name": "...", "source": "data sheet ...",
    "temperature_unit": "degC", "temperatures": [50, 100, 200], "conductivities": [0.038, 0.045, 0.062],
    "max_temperature": 600}, ...]}`` (``constant`` instead of the table; ``conductivity_unit``, default W/m/K;
    ``form`` ``mean`` (default: apparent values against mean temperature) or ``true``; ``kind`` ``insulation`` or
    ``jacket``; ``min_temperature``; ``note``). CSV: columns ``name, temperature[degC], conductivity[W/m/K],
    max_temperature, source, ...``, one row per point. Temperatures in kelvin unless a unit is given.

    Every material is checked (name snake_case, source given, at least two points rising in temperature, k > 0,
    finite numbers, limits above absolute zero); a name already in the library is refused unless ``replace``.
    The file is read in full and checked before anything changes: a bad file raises
    :class:`~convlib.errors.InputError` naming the field, and the library is left as it was.
    """
    label = f"material file {path}"
    name = str(os.fspath(path)) if isinstance(path, (str, os.PathLike)) else ""
    data = read_capped(path, MAX_MATERIAL_BYTES, label=label, field="path")
    if name.lower().endswith(".csv"):
        try:
            text = data.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            raise _refuse(label, f"not UTF-8 text (byte {exc.start})", "path", "UTF-8 text", name) from None
        try:
            records = _csv_records(text, label)
        except csv.Error as exc:
            raise _refuse(label, f"not readable as CSV: {exc}", "path", "comma-separated text", name) from None
    else:
        top = parse_json(data, label=label, field="path")
        unknown = sorted(set(top) - {"materials"})
        if unknown or not isinstance(top.get("materials"), list):
            raise _refuse(label, 'the file must be {"materials": [ ... ]}', "materials", "a list of materials",
                          unknown or type(top.get("materials")).__name__)
        records = top["materials"]
        if not all(isinstance(r, dict) for r in records):
            raise _refuse(label, "every entry of materials must be an object", "materials", "objects", None)
    if not records or len(records) > MAX_MATERIALS:
        raise _refuse(label, f"give 1 to {MAX_MATERIALS} materials; got {len(records)}", "materials",
                      f"1 to {MAX_MATERIALS} materials", len(records))
    built = [_build(r, label, f"material {i + 1}") for i, r in enumerate(records)]
    names = [m.name for m in built]
    twice = sorted({n for n in names if names.count(n) > 1})
    if twice:
        raise _refuse(label, f"material(s) defined twice: {', '.join(twice)}", "name", "each name once", twice)
    with _lock:
        library = _library if _library is not None else _builtin()
        taken = sorted(n for n in names if n in library)
        if taken and not replace:
            raise _refuse(label, f"material(s) already in the library: {', '.join(taken)} (give replace=True to "
                          f"replace them)", "name", "a name not in the library", taken)
        _set_library({**library, **{m.name: m for m in built}})
    return names


def _set_library(new: dict[str, Material]) -> None:
    """Swap the whole library at once (readers see the old one or the new one)."""
    global _library
    _library = new


def reset() -> None:
    """Forget the loaded materials: back to the built-in library (for tests and long-lived processes)."""
    with _lock:
        _set_library(_builtin())
