"""Upgrade-study snapshots: the survey rows, every setting, the ranked results and provenance in one hashed file.

A study snapshot (:mod:`convlib.snapshot`) holds a :class:`~convlib.study.StudySpec`; an upgrade study
(:func:`convlib.upgrade.upgrade_study`) has no spec but a survey list and :class:`~convlib.upgrade.StudySettings`.
This module saves both, with what the study gave, so that a reviewer can re-run it without the original files:

File format (UTF-8 JSON, ``kind`` ``"convlib-upgrade-snapshot"``, ``schema_version`` 1)::

    {"schema_version": 1, "kind": "convlib-upgrade-snapshot", "created_utc": "...", "author": "...", "note": "...",
     "provenance": {...as a study snapshot...},
     "survey": {"columns": {"tag": ["FS-101", ...], "surface_temperature[degC]": ["37.5", ...], ...}},
     "settings": {"weather": {"source", "air_temperature" [K], "wind_speed" [m/s], "hours" [h]},
                  "costs": {"diameters" [m], "thicknesses" [m], "new", "removal", "over" [currency/m]},
                  "measurement": {"thermometer" [K], "emissivity", "samples", "seed"},
                  "heat_tariff" / "cold_tariff": {"fuel", "price" [currency/kWh], "efficiency", "co2_per_kwh"},
                  "finance": {"discount_rate", "escalation", "years"}, "payback_years", "thicknesses" [m]},
     "results": {"rows": {column: {"type": "float"|"int"|"bool"|"text", "values": [...]}}, "ranked": {...},
                 "totals": {"hot": {...}, "cold": {...}}, "errors": [{"index", "tag", "reason"}]},
     "cautions": [...], "sha256": "<64 hex digits>"}

``survey.columns`` are the cells of the survey list as read (:func:`convlib.survey.read_survey` takes them: text,
numbers or null for a blank), every row in file order, bad ones included, so that line numbers -- and with them the
random draws of each line, ``SeedSequence(seed, spawn_key=(row,))`` -- are the same on a re-run. Numbers that are
not finite (no saving: payback ``inf``; no effective conductivity: NaN) are stored as ``"inf"``, ``"-inf"`` and
``null``. The hash is :func:`convlib.snapshot.content_hash` over every field but ``sha256``; files are written with
:func:`convlib.files.write_atomic` and read with :func:`convlib.files.read_json` (size capped at
:data:`convlib.snapshot.MAX_BYTES`, no duplicate keys, no NaN), never executed or unpickled.

:func:`verify` (in :mod:`convlib.upgrade_snapshot_check`, re-exported here) re-runs the study serially and compares
every stored number; :func:`diff` lists changed settings and per-line and total changes.
"""
from __future__ import annotations

import datetime as _dt
import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

import numpy as np
from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator

from .economics import Finance, Tariff
from .errors import InputError
from .files import read_json, write_atomic
from .scale import StudyOutput, run_study
from .snapshot import (MAX_BYTES, Provenance, SnapshotError, _flatten, _pretty, checked_envelope,  # noqa: F401
                       content_hash, current_provenance, save_target)
from .survey import CAUTIONS, Measurement, RowError, _columns_of, read_survey
from .annual import WeatherBins
from .upgrade import CostTable, StudySettings, ranked, totals

__all__ = ["KIND", "SCHEMA_VERSION", "MAX_SAMPLES", "UpgradeSnapshot", "save", "load", "file_kind",
           "as_upgrade_snapshot", "settings_document", "settings_from_document", "verify", "diff", "UpgradeDiff",
           "COLUMN_UNITS"]

KIND = "convlib-upgrade-snapshot"
SCHEMA_VERSION = 1
#: Most samples per line a loaded snapshot may ask for (a re-run costs lines x samples x weather bins).
MAX_SAMPLES = 100_000
_MAX_CELL = 10_000        # characters of one survey cell

#: SI unit (money in the tariff's currency) of the numeric result columns, for diffs and reports.
COLUMN_UNITS = {
    "k_effective": "W/m/K", "ratio": "", "q_now": "W", "q_design": "W", "excess_kwh_p5": "kWh/yr",
    "excess_kwh_p50": "kWh/yr", "excess_kwh_p95": "kWh/yr", "thickness": "m", "investment": "currency",
    "saved_kwh_p50": "kWh/yr", "saving_p5": "currency/yr", "saving_p50": "currency/yr", "saving_p95": "currency/yr",
    "payback_p50": "yr", "npv_p5": "currency", "npv_p50": "currency", "npv_p95": "currency",
    "probability_payback": "", "co2_saved_kg_p50": "kg/yr", "lines": "", "lines_worth_doing": "",
}


#: Columns every stored row (and ranked line) has, with their type; the ranked list adds ``rank`` and ``worth_doing``.
ROW_COLUMNS = {"index": "int", "tag": "text", "area": "text", "service": "text", "condition": "text",
               "option": "text", **{k: "float" for k in ("k_effective", "ratio", "q_now", "q_design", "excess_kwh_p50",
                                                         "thickness", "investment", "saving_p5", "saving_p50",
                                                         "saving_p95", "payback_p50", "npv_p50",
                                                         "probability_payback", "co2_saved_kg_p50")}}
RANKED_COLUMNS = {**ROW_COLUMNS, "rank": "int", "worth_doing": "bool"}
#: Numbers every non-empty total (hot, cold) has.
TOTAL_KEYS = ("lines", "lines_worth_doing", "q_now", "q_design", "excess_kwh_p50", "investment", "saving_p50",
              "npv_p50", "co2_saved_kg_p50")


# ----------------------------------------------------------------------------- the document's models
class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, strict=True)


def _finite(values):
    flat = values if isinstance(values, list) else [values]
    for v in flat:
        if isinstance(v, list):
            _finite(v)
        elif not math.isfinite(v):
            raise ValueError(f"{v!r} is not a finite number")
    return values


class _Weather(_Model):
    source: str = Field(default="", max_length=2000)
    air_temperature: list[float] = Field(min_length=1, max_length=10_000)
    wind_speed: list[float] = Field(min_length=1, max_length=10_000)
    hours: list[float] = Field(min_length=1, max_length=10_000)
    check_finite = field_validator("air_temperature", "wind_speed", "hours")(_finite)


class _Costs(_Model):
    diameters: list[float] = Field(min_length=1, max_length=1000)
    thicknesses: list[float] = Field(min_length=1, max_length=1000)
    new: list[list[float]]
    removal: list[list[float]]
    over: list[list[float]]
    check_finite = field_validator("diameters", "thicknesses", "new", "removal", "over")(_finite)


class _Measurement(_Model):
    thermometer: float
    emissivity: float
    samples: int = Field(ge=1, le=MAX_SAMPLES)
    seed: int = Field(ge=0, lt=2 ** 63)


class _Tariff(_Model):
    fuel: str = Field(max_length=200)
    price: float
    efficiency: float
    co2_per_kwh: float


class _Finance(_Model):
    discount_rate: float
    escalation: float
    years: float


class _Settings(_Model):
    weather: _Weather
    costs: _Costs
    measurement: _Measurement
    heat_tariff: _Tariff
    cold_tariff: _Tariff
    finance: _Finance
    payback_years: float = Field(gt=0, le=1000)
    thicknesses: list[float] = Field(max_length=1000)


class _Document(_Model):
    schema_version: int = Field(ge=1, le=SCHEMA_VERSION)
    kind: Literal["convlib-upgrade-snapshot"]
    created_utc: str
    author: str = Field(max_length=200)
    note: str = Field(max_length=20_000)
    provenance: Provenance
    survey: dict[str, Any]
    settings: _Settings
    results: dict[str, Any]
    cautions: list[str]
    sha256: str = Field(pattern="^[0-9a-f]{64}$")

    @field_validator("created_utc")
    @classmethod
    def _iso(cls, value):
        _dt.datetime.strptime(value, "%Y-%m-%dT%H:%M:%SZ")
        return value


# ----------------------------------------------------------------------------- settings <-> JSON
def _tariff(t: Tariff) -> dict:
    return {"fuel": str(t.fuel), "price": float(t.price), "efficiency": float(t.efficiency),
            "co2_per_kwh": float(t.co2_per_kwh)}


def settings_document(settings: StudySettings, weather_source: str = "") -> dict:
    """Every setting of an upgrade study as JSON data (SI, kelvin; money per kWh as entered)."""
    b, c, m, f = settings.bins, settings.costs, settings.measurement, settings.finance
    return {
        "weather": {"source": weather_source, "air_temperature": b.air_temperature.tolist(),
                    "wind_speed": b.wind_speed.tolist(), "hours": b.hours.tolist()},
        "costs": {"diameters": np.asarray(c.diameters, float).tolist(),
                  "thicknesses": np.asarray(c.thicknesses, float).tolist(),
                  **{k: np.asarray(getattr(c, k), float).tolist() for k in ("new", "removal", "over")}},
        "measurement": {"thermometer": float(m.thermometer), "emissivity": float(m.emissivity),
                        "samples": int(m.samples), "seed": int(m.seed)},
        "heat_tariff": _tariff(settings.heat_tariff), "cold_tariff": _tariff(settings.cold_tariff),
        "finance": {"discount_rate": float(f.discount_rate), "escalation": float(f.escalation),
                    "years": float(f.years)},
        "payback_years": float(settings.payback_years),
        "thicknesses": [float(x) for x in settings.thicknesses],
    }


def _cost_table(c: _Costs) -> CostTable:
    d, t = np.asarray(c.diameters), np.asarray(c.thicknesses)
    for name, axis in (("diameters", d), ("thicknesses", t)):
        if np.any(axis <= 0) or np.any(np.diff(axis) <= 0):
            raise InputError(f"costs.{name} must be > 0 and increasing", field=f"settings.costs.{name}",
                             rule="> 0 and strictly increasing", value=axis.tolist())
    grids = {}
    for name in ("new", "removal", "over"):
        rows = getattr(c, name)
        full = len(rows) == d.size and all(len(row) == t.size for row in rows)
        g = np.asarray(rows, dtype=float) if full else np.empty(0)
        if not full or np.any(g < 0):
            raise InputError(f"costs.{name} must be {d.size} rows of {t.size} costs >= 0",
                             field=f"settings.costs.{name}", rule="a full grid of sizes x thicknesses, >= 0",
                             value=None)
        grids[name] = g
    return CostTable(d, t, grids["new"], grids["removal"], grids["over"])


def settings_from_document(data) -> tuple[StudySettings, str]:
    """:class:`StudySettings` (and the weather's source text) from :func:`settings_document` data, validated.

    Raises ``InputError`` naming the setting.
    """
    try:
        s = data if isinstance(data, _Settings) else _Settings.model_validate(data)
    except ValidationError as exc:
        raise InputError(f"invalid settings: {_flatten(exc, 'settings')}", field="settings",
                         rule="valid upgrade settings", value=None) from None
    w = s.weather
    if not len(w.air_temperature) == len(w.wind_speed) == len(w.hours):
        raise InputError("settings.weather: one air_temperature, wind_speed and hours per bin",
                         field="settings.weather", rule="lists of equal length", value=None)
    if s.measurement.thermometer < 0:  # Measurement accepts any bound >= 0
        raise InputError("settings.measurement.thermometer must be >= 0 K", field="settings.measurement.thermometer",
                         rule=">= 0 K", value=s.measurement.thermometer)
    if any(not x > 0 for x in s.thicknesses):
        raise InputError("settings.thicknesses must be > 0 m", field="settings.thicknesses", rule="> 0 m",
                         value=s.thicknesses)
    settings = StudySettings(
        bins=WeatherBins(np.asarray(w.air_temperature), np.asarray(w.wind_speed), np.asarray(w.hours)),
        costs=_cost_table(s.costs), measurement=Measurement(**s.measurement.model_dump()),
        heat_tariff=Tariff(**s.heat_tariff.model_dump()), cold_tariff=Tariff(**s.cold_tariff.model_dump()),
        finance=Finance(**s.finance.model_dump()), payback_years=s.payback_years, thicknesses=tuple(s.thicknesses))
    return settings, w.source


# ----------------------------------------------------------------------------- columns <-> JSON
def _encode_float(x: float):
    return None if math.isnan(x) else ("inf" if x > 0 else "-inf") if math.isinf(x) else x


def encode_columns(columns: dict) -> dict:
    """Result columns (numpy arrays) as typed JSON lists; non-finite floats as ``null`` / ``"inf"`` / ``"-inf"``."""
    out = {}
    for name, values in columns.items():
        a = np.asarray(values)
        if a.dtype == bool:
            out[name] = {"type": "bool", "values": [bool(v) for v in a]}
        elif np.issubdtype(a.dtype, np.integer):
            out[name] = {"type": "int", "values": [int(v) for v in a]}
        elif np.issubdtype(a.dtype, np.floating):
            out[name] = {"type": "float", "values": [_encode_float(float(v)) for v in a]}
        else:
            out[name] = {"type": "text", "values": [str(v) for v in a]}
    return out


_CHECKS = {"bool": lambda v: isinstance(v, bool), "int": lambda v: isinstance(v, int) and not isinstance(v, bool),
           "text": lambda v: isinstance(v, str),
           "float": lambda v: v is None or v in ("inf", "-inf") or isinstance(v, (int, float))
           and not isinstance(v, bool)}


def decode_columns(data, where: str, required: dict | None = None) -> dict:
    """Typed JSON lists back to numpy arrays (equal lengths); ``InputError`` naming the column otherwise.

    ``required``: column -> type that a non-empty set of columns must hold.
    """
    if not isinstance(data, dict):
        raise InputError(f"{where} must be an object of columns", field=where, rule="an object", value=None)
    wrong = [k for k, kind in (required or {}).items() if data and (not isinstance(data.get(k), dict)
                                                                     or data[k].get("type") != kind)]
    if wrong:
        raise InputError(f"{where} lacks the column(s) {', '.join(wrong)} (or they have another type)",
                         field=f"{where}.{wrong[0]}", rule=f"a {required[wrong[0]]} column", value=None)
    out, length = {}, None
    for name, column in data.items():
        kind = column.get("type") if isinstance(column, dict) else None
        values = column.get("values") if isinstance(column, dict) else None
        if not isinstance(kind, str) or kind not in _CHECKS or not isinstance(values, list) \
                or set(column) != {"type", "values"}:
            raise InputError(f"{where}.{name} must be {{'type': float|int|bool|text, 'values': [...]}}",
                             field=f"{where}.{name}", rule="a typed column", value=None)
        bad = next((i for i, v in enumerate(values) if not _CHECKS[kind](v)), None)
        if bad is not None:
            raise InputError(f"{where}.{name}[{bad}]: {values[bad]!r} is not a {kind} value",
                             field=f"{where}.{name}", rule=f"{kind} values", value=values[bad])
        if length is not None and len(values) != length:
            raise InputError(f"{where}.{name} has {len(values)} values, the other columns {length}",
                             field=f"{where}.{name}", rule="columns of equal length", value=len(values))
        length = len(values)
        if kind == "float":
            out[name] = np.array([math.nan if v is None else float(v) for v in values], dtype=float)
        else:
            out[name] = np.array(values, dtype={"bool": bool, "int": np.int64, "text": object}[kind])
    return out


def _survey_cell(value, name: str, row: int):
    if value is None or isinstance(value, str) and len(value) <= _MAX_CELL:
        return value
    if isinstance(value, (bool, np.bool_)):
        return str(bool(value))
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return None if math.isnan(value) else float(value) if math.isfinite(value) else str(float(value))
    raise InputError(f"survey column {name}, row {row}: cannot store {type(value).__name__} {str(value)[:40]!r}",
                     field=name, rule=f"text of at most {_MAX_CELL} characters, a number or blank",
                     value=str(value)[:40])


def survey_columns(source) -> dict:
    """The cells of a survey list (path to CSV / Parquet, CSV text or dict of columns) as JSON data."""
    columns = _columns_of(source)
    return {str(name): [_survey_cell(v, str(name), i) for i, v in enumerate(cells)] for name, cells in columns.items()}


def _check_survey(survey) -> dict:
    columns = survey.get("columns") if isinstance(survey, dict) and set(survey) == {"columns"} else None
    if not isinstance(columns, dict) or not columns:
        raise InputError("survey must be {'columns': {name: [cells]}}", field="survey", rule="survey columns",
                         value=None)
    lengths = {len(v) if isinstance(v, list) else -1 for v in columns.values()}
    if len(lengths) != 1 or -1 in lengths:
        raise InputError("survey columns must be lists of equal length", field="survey.columns",
                         rule="lists of equal length", value=sorted(lengths))
    for name, cells in columns.items():
        for i, v in enumerate(cells):
            if not (v is None or isinstance(v, (str, int, float)) and not isinstance(v, bool)):
                raise InputError(f"survey.columns.{name}[{i}]: {v!r} is not text, a number or null",
                                 field=f"survey.columns.{name}", rule="text, a number or null", value=v)
    return columns


# ----------------------------------------------------------------------------- save / load
@dataclass(frozen=True)
class UpgradeSnapshot:
    """A loaded (validated, hash-checked) upgrade snapshot; result columns as numpy arrays (SI)."""

    survey: dict                 # the survey list's cells by column, as :func:`convlib.survey.read_survey` takes them
    settings: StudySettings
    weather_source: str
    rows: dict                   # every line x offered option (:func:`convlib.upgrade.upgrade_study`)
    ranked: dict                 # the best option per line, best first (:func:`convlib.upgrade.ranked`)
    totals: dict                 # {"hot": {...}, "cold": {...}} (:func:`convlib.upgrade.totals`)
    errors: list                 # RowError of the lines not computed
    cautions: list
    provenance: Provenance
    sha256: str
    created_utc: str
    author: str = ""
    note: str = ""
    path: Path | None = None

    def lines(self):
        """The surveyed lines (:class:`convlib.survey.SurveyLines`) and row errors, read from the stored cells."""
        return read_survey(self.survey)


def _summary(rows: dict) -> tuple[dict, dict]:
    """The ranked list and totals of result rows (empty when no line was computed)."""
    if not rows:
        return {}, {"hot": {}, "cold": {}}
    best = ranked(rows)
    return best, totals(best)


def _text(name: str, value: str, limit: int) -> None:
    if not isinstance(value, str) or len(value) > limit:
        raise InputError(f"{name} must be text of at most {limit} characters", field=name,
                         rule=f"text of at most {limit} characters", value=value)


def save(path, source, settings: StudySettings, *, output: StudyOutput | None = None, weather_source: str = "",
         author: str = "", note: str = "", overwrite: bool = False) -> Path:
    """Write an upgrade study's snapshot atomically.

    Parameters
    ----------
    path : str or path-like
        Target file; its directory must exist.
    source : path (CSV / Parquet), CSV text or dict of columns
        The survey list, as :func:`convlib.scale.run_study` takes it; its cells are stored.
    settings : StudySettings
    output : StudyOutput, optional
        The study's result (e.g. of a Dask run, equal to the serial one); computed serially when not given.
    weather_source : str
        Where the weather bins came from (file, location), shown in reports.
    author, note : str
        Up to 200 and 20000 characters.
    overwrite : bool
        Replace an existing file; otherwise ``FileExistsError`` and the file stays as it was.

    Examples
    --------
    >>> import tempfile
    >>> from convlib.survey import demo_survey_path
    >>> from convlib.upgrade import demo_costs_path
    >>> s = StudySettings(WeatherBins.single(283.15, 3.0), CostTable.read(demo_costs_path()), Measurement(samples=8))
    >>> folder = tempfile.TemporaryDirectory()
    >>> p = save(Path(folder.name) / "u.json", demo_survey_path(), s, author="A. Auditor")
    >>> load(p).settings.measurement.samples
    8
    >>> folder.cleanup()
    """
    if not isinstance(settings, StudySettings):
        raise TypeError(f"settings must be a StudySettings; got {type(settings).__name__}")
    for name, value, limit in (("author", author, 200), ("note", note, 20_000), ("weather_source", weather_source,
                                                                                 2000)):
        _text(name, value, limit)
    path = save_target(path, overwrite, "upgrade.snapshot.json")
    columns = survey_columns(source)
    if output is None:
        output = run_study(columns, settings)
    best, tot = _summary(output.rows)
    document = {"schema_version": SCHEMA_VERSION, "kind": KIND,
                "created_utc": _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
                "author": author, "note": note, "provenance": current_provenance().model_dump(),
                "survey": {"columns": columns}, "settings": settings_document(settings, weather_source),
                "results": {"rows": encode_columns(output.rows), "ranked": encode_columns(best), "totals": tot,
                            "errors": [{"index": int(e.index), "tag": str(e.tag), "reason": str(e.reason)}
                                       for e in output.errors]},
                "cautions": list(CAUTIONS)}
    document["sha256"] = content_hash(document)
    data = (_pretty(document) + "\n").encode("utf-8")
    if len(data) > MAX_BYTES:
        raise InputError(f"upgrade snapshot would be {len(data) / 1e6:.3g} MB, above the {MAX_BYTES / 1e6:.3g} MB "
                         "that load() reads; save a part of the list", field="source",
                         rule=f"a snapshot of at most {MAX_BYTES / 1e6:.3g} MB", value=len(data))
    try:
        write_atomic(path, data, overwrite=overwrite)
    except FileExistsError:
        raise FileExistsError(f"{path} already exists; pass overwrite=True to replace it") from None
    return path


def _read(path):
    """The parsed JSON of a snapshot file (capped, strict); a SnapshotError names the file and the problem."""
    try:
        return read_json(path, MAX_BYTES, label=str(path), field="snapshot")
    except InputError as exc:
        raise SnapshotError(str(exc), rule=exc.rule, value=exc.value) from None


def file_kind(path) -> str:
    """The ``kind`` of a JSON file (read with the snapshot size cap), ``""`` when it has none."""
    document = _read(path)
    kind = document.get("kind") if isinstance(document, dict) else None
    return kind if isinstance(kind, str) else ""


def _envelope(document, fail) -> _Document:
    return checked_envelope(document, KIND, SCHEMA_VERSION, _Document, fail, "upgrade snapshot")


def _errors(data) -> list:
    if not isinstance(data, list) or any(not isinstance(e, dict) or set(e) != {"index", "tag", "reason"}
                                         or not isinstance(e["index"], int) or not isinstance(e["tag"], str)
                                         or not isinstance(e["reason"], str) for e in data):
        raise InputError("results.errors must be a list of {index, tag, reason}", field="results.errors",
                         rule="a list of row errors", value=None)
    return [RowError(e["index"], e["tag"], e["reason"]) for e in data]


def _check_totals(tot) -> dict:
    def number(v):
        return isinstance(v, (int, float)) and not isinstance(v, bool)
    ok = isinstance(tot, dict) and set(tot) == {"hot", "cold"} and all(
        isinstance(t, dict) and (not t or set(TOTAL_KEYS) <= set(t)) and all(number(v) for v in t.values())
        for t in tot.values())
    if not ok:
        raise InputError(f"results.totals must be {{hot: {{...}}, cold: {{...}}}}, each empty or with the numbers "
                         f"{', '.join(TOTAL_KEYS)}", field="results.totals", rule="hot and cold totals", value=None)
    return tot


def load(path) -> UpgradeSnapshot:
    """Read, validate and hash-check an upgrade snapshot (never writes).

    Raises
    ------
    SnapshotError
        (an :class:`~convlib.errors.InputError`) the file cannot be read (size above
        :data:`convlib.snapshot.MAX_BYTES`, not JSON, duplicate keys, NaN), is not an upgrade snapshot, was written by
        a newer convlib, has missing or invalid fields or settings, or a hash that does not match its content.
    """
    path = Path(path)

    def fail(problem):
        return SnapshotError(f"{path}: {problem}")

    envelope = _envelope(_read(path), fail)
    results = envelope.results
    try:
        if set(results) != {"rows", "ranked", "totals", "errors"}:
            raise InputError("results must hold rows, ranked, totals and errors", field="results",
                             rule="rows, ranked, totals, errors", value=sorted(results))
        survey = _check_survey(envelope.survey)
        settings, source = settings_from_document(envelope.settings)
        rows = decode_columns(results["rows"], "results.rows", ROW_COLUMNS)
        best = decode_columns(results["ranked"], "results.ranked", RANKED_COLUMNS)
        tot, errors = _check_totals(results["totals"]), _errors(results["errors"])
    except InputError as exc:
        raise fail(str(exc)) from None
    return UpgradeSnapshot(survey=survey, settings=settings, weather_source=source, rows=rows, ranked=best,
                           totals=tot, errors=errors, cautions=list(envelope.cautions),
                           provenance=envelope.provenance, sha256=envelope.sha256,
                           created_utc=envelope.created_utc, author=envelope.author, note=envelope.note, path=path)


def as_upgrade_snapshot(source) -> UpgradeSnapshot:
    """``source`` itself if it is an :class:`UpgradeSnapshot`, else :func:`load` it."""
    return source if isinstance(source, UpgradeSnapshot) else load(source)


def rerun(snap: UpgradeSnapshot) -> tuple[StudyOutput, dict, dict]:
    """The study of a snapshot run again serially: (output, ranked, totals)."""
    output = run_study(snap.survey, snap.settings)
    best, tot = _summary(output.rows)
    return output, best, tot


# verify and diff live in convlib.upgrade_snapshot_check; their names are importable from here
from .upgrade_snapshot_check import UpgradeDiff, diff, verify  # noqa: E402
