"""Snapshots: a study's inputs, results and provenance in one verifiable JSON file.

A snapshot is what a reviewer opens: the :class:`~convlib.study.StudySpec`, the
:class:`~convlib.study.StudyResult` the engineer saw, the library versions that
computed it, and a SHA-256 that changes if any of it changes. :func:`verify`
re-runs the study and says whether the numbers still agree; :func:`diff` lists
what differs between two snapshots.

File format (UTF-8 JSON, ``schema_version`` 1)::

    {"schema_version": 1, "kind": "convlib-snapshot", "created_utc": "2025-01-31T12:00:00Z",
     "author": "...", "note": "...",
     "provenance": {"convlib", "coolprop", "numpy", "scipy", "pydantic", "python", "platform"},
     "spec": {...}, "result": {...}, "sha256": "<64 hex digits>"}

The hash covers **every field except** ``sha256`` itself (author, note, creation
time and provenance included, so nobody can re-attribute a result or claim other
library versions unnoticed). It is SHA-256 of the UTF-8 canonical JSON
(:func:`canonical_json`: sorted keys, no whitespace, ``ensure_ascii=False``,
floats as Python's shortest round-trip ``repr``), computed from the parsed
values, so re-indenting a file does not change it but any edited character of
a value does. A hash is a checksum, not a signature: it detects corruption and
careless edits; anyone able to run this code can recompute it.

Files are written atomically (:func:`convlib.files.write_atomic`: locked temporary
file in the same directory, fsync, rename; debris of killed saves is removed by the
next save) and read as data only: never executed or unpickled. Loading never writes;
it checks the size with ``stat`` before reading, reads regular files only, follows a
symbolic link only within its folder, refuses duplicate keys, NaN/Infinity and nesting
deeper than :data:`convlib.files.MAX_DEPTH` (:func:`convlib.files.read_json`).
"""
from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import os
import platform
from collections.abc import Callable
from dataclasses import dataclass
from dataclasses import field as dataclass_field
from importlib import metadata
from pathlib import Path
from typing import Any, Literal, NamedTuple

import numpy as np
from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator

from . import __version__
from .errors import InputError
from .files import read_json, write_atomic
from .study import MonteCarloResult, StudyResult, StudySpec, run_study

__all__ = ["SCHEMA_VERSION", "KIND", "MAX_BYTES", "DETERMINISTIC_TOLERANCE", "STANDARD_ERRORS", "SnapshotError",
           "Provenance", "Snapshot", "QuantityCheck", "VerifyReport", "SnapshotDiff", "save", "load", "verify",
           "diff", "canonical_json", "content_hash", "current_provenance", "quantile_standard_error"]

SCHEMA_VERSION = 1
KIND = "convlib-snapshot"
MAX_BYTES = 200_000_000                #: largest file :func:`load` reads (and :func:`save` writes) [bytes]
DETERMINISTIC_TOLERANCE = 1e-9         #: relative tolerance of re-computed deterministic quantities [-]
STANDARD_ERRORS = 4.0                  #: Monte Carlo tolerance in standard errors of a difference [-]
_MIN_HISTOGRAM_COUNT = 20              # samples a density window must hold (quantile standard error)
_ABSENT = "<absent>"                   # stands for a value one side of a diff does not have


class SnapshotError(InputError):
    """A snapshot file cannot be read: the message names the file and the problem.

    An :class:`~convlib.errors.InputError` (so a ``ValueError``) with ``field`` ``"snapshot"``.
    """

    def __init__(self, message: str, *, field: str = "snapshot", rule: str = "a readable, valid snapshot file",
                 value=None):
        super().__init__(message, field=field, rule=rule, value=value)


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class Provenance(_Model):
    """Versions of what computed a result."""

    convlib: str
    coolprop: str
    numpy: str
    scipy: str
    pydantic: str
    python: str
    platform: str


class _Document(_Model):
    """Envelope of a snapshot file (spec and result are validated by their own models)."""

    model_config = ConfigDict(extra="forbid", frozen=True, strict=True)
    schema_version: int = Field(ge=1, le=SCHEMA_VERSION)
    kind: Literal["convlib-snapshot"]
    created_utc: str
    author: str = Field(max_length=200)
    note: str = Field(max_length=20_000)
    saved_by: str = Field(default="", max_length=400)  # the shared server's identity of the viewer (if any)
    provenance: Provenance
    spec: dict[str, Any]
    result: dict[str, Any]
    sha256: str = Field(pattern="^[0-9a-f]{64}$")

    @field_validator("created_utc")
    @classmethod
    def _iso(cls, value):
        _dt.datetime.strptime(value, "%Y-%m-%dT%H:%M:%SZ")
        return value


def current_provenance() -> Provenance:
    """Versions of convlib, CoolProp, numpy, scipy, pydantic and Python running now, and the platform."""
    def version(dist):
        try:
            return metadata.version(dist)
        except metadata.PackageNotFoundError:
            return "not installed"
    return Provenance(convlib=__version__, coolprop=version("CoolProp"), numpy=version("numpy"),
                      scipy=version("scipy"), pydantic=version("pydantic"), python=platform.python_version(),
                      platform=platform.platform())


def canonical_json(value) -> str:
    """The canonical JSON text the hash is taken over.

    >>> canonical_json({"b": 0.1, "a": [1, 1.0, "é", None]})
    '{"a":[1,1.0,"é",null],"b":0.1}'
    """
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False)


def content_hash(document: dict) -> str:
    """SHA-256 (hex) of the canonical JSON of every field of ``document`` except ``sha256``.

    Raises ``InputError`` (a ``ValueError``) naming the first non-finite number (JSON holds none).
    """
    body = {key: value for key, value in document.items() if key != "sha256"}
    try:
        text = canonical_json(body)
    except ValueError:
        where = _first_nonfinite(body, "")
        if where is None:
            raise
        raise InputError(f"cannot store {where[0]} = {where[1]}: snapshot files hold finite numbers only",
                         field=where[0], rule="a finite number", value=where[1]) from None
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def _first_nonfinite(value, path):
    if isinstance(value, float) and not math.isfinite(value):
        return path, value
    items = value.items() if isinstance(value, dict) else enumerate(value) if isinstance(value, list) else ()
    for key, item in items:
        found = _first_nonfinite(item, f"{path}[{key}]" if isinstance(key, int) else f"{path}.{key}".lstrip("."))
        if found:
            return found
    return None


def _pretty(value, indent=0) -> str:
    """Readable JSON: one field per line, lists of numbers on one line."""
    pad, end = "  " * (indent + 1), "\n" + "  " * indent
    if isinstance(value, dict) and value:
        items = [f"{pad}{json.dumps(k, ensure_ascii=False)}: {_pretty(v, indent + 1)}" for k, v in value.items()]
        return "{\n" + ",\n".join(items) + end + "}"
    if isinstance(value, list) and any(isinstance(v, (dict, list)) for v in value):
        return "[\n" + ",\n".join(pad + _pretty(v, indent + 1) for v in value) + end + "]"
    return json.dumps(value, ensure_ascii=False, allow_nan=False)


# ----------------------------------------------------------------------------- save / load
@dataclass(frozen=True)
class Snapshot:
    """A loaded (validated, hash-checked) snapshot."""

    spec: StudySpec
    result: StudyResult
    provenance: Provenance
    sha256: str
    created_utc: str
    author: str = ""
    note: str = ""
    path: Path | None = None
    saved_by: str = ""


def _check_pair(spec: StudySpec, result: StudyResult) -> None:
    problems = []
    if [(s.input, s.count) for s in spec.sweeps] != [(r.input, len(r.values)) for r in result.sweeps]:
        problems.append("the sweeps differ")
    if [(m.x.input, m.y.input) for m in spec.maps] != [(r.x_input, r.y_input) for r in result.maps]:
        problems.append("the maps differ")
    if sorted(t.input for t in spec.tornado) != sorted(b.input for b in result.tornado):
        problems.append("the tornado inputs differ")
    if (spec.uncertainty is None) != (result.monte_carlo is None):
        problems.append("one has a Monte Carlo study and the other not")
    if problems:
        raise InputError(f"result does not belong to spec ({'; '.join(problems)}); save run_study(spec)",
                         field="result", rule="the result of run_study(spec)", value="; ".join(problems))


def save(path, spec: StudySpec, result: StudyResult, author: str = "", note: str = "",
         overwrite: bool = False, saved_by: str = "") -> Path:
    """Write a snapshot file atomically.

    Parameters
    ----------
    path : str or path-like
        Target file (e.g. ``steam_main.snapshot.json``); its directory must exist.
    spec, result : StudySpec, StudyResult
        The study and the result of ``run_study(spec)``.
    author, note : str
        Who saved it (up to 200 characters) and why (up to 20000).
    saved_by : str
        Who the shared dashboard server says the viewer is (login name and address, up to 400 characters),
        recorded beside the typed author; written only when given, so that such files stay as before.
    overwrite : bool
        Replace an existing file; otherwise ``FileExistsError`` and the file is left as it was.

    Returns
    -------
    Path
        The file written.

    Examples
    --------
    >>> import tempfile
    >>> from convlib.study import CaseSpec
    >>> spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    >>> folder = tempfile.TemporaryDirectory()
    >>> path = save(Path(folder.name) / "s.json", spec, run_study(spec), author="A. Engineer")
    >>> load(path).spec == spec
    True
    >>> folder.cleanup()
    """
    for name, value, kind in (("spec", spec, StudySpec), ("result", result, StudyResult)):
        if not isinstance(value, kind):
            raise TypeError(f"{name} must be a {kind.__name__}; got {type(value).__name__}")
    for name, value, limit in (("author", author, 200), ("note", note, 20_000), ("saved_by", saved_by, 400)):
        if not isinstance(value, str) or len(value) > limit:
            raise InputError(f"{name} must be text of at most {limit} characters; got {type(value).__name__} "
                             f"of length {len(value) if isinstance(value, str) else '-'}", field=name,
                             rule=f"text of at most {limit} characters", value=value)
    _check_pair(spec, result)
    if not isinstance(path, (str, os.PathLike)) or not os.fspath(path) or "\0" in os.fspath(path):
        raise InputError(f"cannot save to {path!r}: not a usable file name", field="path",
                         rule="a file name without NUL characters", value=path)
    path = Path(path)
    if path.is_dir():
        raise IsADirectoryError(f"{path} is a directory; give a file name such as {path / 'study.snapshot.json'}")
    if not path.parent.is_dir():
        raise FileNotFoundError(f"cannot save {path}: directory {path.parent} does not exist")
    if path.exists() and not overwrite:
        raise _exists(path)
    document = {"schema_version": SCHEMA_VERSION, "kind": KIND,
                "created_utc": _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
                "author": author, "note": note, "provenance": current_provenance().model_dump(),
                "spec": spec.model_dump(mode="json"), "result": result.model_dump(mode="json")}
    if saved_by:
        document["saved_by"] = saved_by
    document["sha256"] = content_hash(document)
    data = (_pretty(document) + "\n").encode("utf-8")
    if len(data) > MAX_BYTES:
        raise InputError(f"snapshot would be {_mb(len(data))}, above the {_mb(MAX_BYTES)} that load() reads; "
                         f"use fewer sweep or map points", field="spec", rule=f"a snapshot of at most {_mb(MAX_BYTES)}",
                         value=len(data))
    try:
        write_atomic(path, data, overwrite=overwrite)
    except FileExistsError:
        raise _exists(path) from None
    return path


def _mb(size: int) -> str:
    return f"{size / 1e6:.3g} MB"


def _exists(path: Path) -> FileExistsError:
    return FileExistsError(f"{path} already exists; pass overwrite=True to replace it")


def _flatten(exc: ValidationError, prefix: str = "") -> str:
    """Pydantic errors as 'field path: message' joined by '; '."""
    lines = []
    for error in exc.errors():
        where = prefix
        for part in error["loc"]:
            where += f"[{part}]" if isinstance(part, int) else f".{part}" if where else str(part)
        lines.append(f"{where or 'top level'}: {error['msg'].removeprefix('Value error, ')}")
    more = f"; and {len(lines) - 8} more" if len(lines) > 8 else ""
    return "; ".join(lines[:8]) + more


def load(path) -> Snapshot:
    """Read, validate and hash-check a snapshot file (never writes).

    Raises
    ------
    SnapshotError
        (an :class:`~convlib.errors.InputError`) Missing or unreadable file, a directory, pipe or
        device, a symbolic link leading out of its folder, larger than :data:`MAX_BYTES` (refused
        before reading), not JSON or truncated, duplicate keys, NaN, nested too deep, not a snapshot,
        written by a newer convlib, missing or invalid fields, or a hash that does not match the
        content ("tampered or corrupted").
    """
    path = Path(path)

    def fail(problem):
        return SnapshotError(f"{path}: {problem}")

    try:
        document = read_json(path, MAX_BYTES, label=str(path), field="snapshot")
    except InputError as exc:
        raise SnapshotError(str(exc), rule=exc.rule, value=exc.value) from None
    if document.get("kind") != KIND:
        hint = " (this looks like a study spec; read it with StudySpec.model_validate_json)" if "case" in document \
            else ""
        raise fail(f"not a convlib snapshot: kind is {document.get('kind', 'missing')!r}, expected {KIND!r}{hint}")
    version = document.get("schema_version")
    if isinstance(version, int) and not isinstance(version, bool) and version > SCHEMA_VERSION:
        raise fail(f"written by a newer convlib (snapshot schema_version {version}; convlib {__version__} reads "
                   f"up to {SCHEMA_VERSION}); upgrade convlib to open it")
    try:
        envelope = _Document.model_validate(document)
    except ValidationError as exc:
        raise fail(_flatten(exc)) from None
    computed = content_hash(document)
    if computed != envelope.sha256:
        raise fail(f"tampered or corrupted: stored hash {envelope.sha256}, computed {computed}")
    try:
        spec = StudySpec.model_validate(envelope.spec)
    except ValidationError as exc:
        raise fail(f"invalid study spec: {_flatten(exc, 'spec')}") from None
    try:
        result = StudyResult.model_validate(envelope.result)
    except ValidationError as exc:
        raise fail(f"invalid study result: {_flatten(exc, 'result')}") from None
    return Snapshot(spec=spec, result=result, provenance=envelope.provenance, sha256=envelope.sha256,
                    created_utc=envelope.created_utc, author=envelope.author, note=envelope.note, path=path,
                    saved_by=envelope.saved_by)


def _as_snapshot(source) -> Snapshot:
    return source if isinstance(source, Snapshot) else load(source)


# ----------------------------------------------------------------------------- comparison
def _relative(a, b) -> np.ndarray:
    """|a - b| / max(|a|, |b|), the denominator floored at 1e-12 of the array's largest magnitude (NaN kept)."""
    a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    scale = np.maximum(np.abs(a), np.abs(b))
    floor = max(1e-12 * float(np.nanmax(scale, initial=0.0)), np.finfo(float).tiny)
    return np.abs(a - b) / np.maximum(scale, floor)


def _number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


class _Tally:
    """Largest relative difference (and where) and structural mismatches between two JSON trees."""

    def __init__(self):
        self.largest, self.where, self.mismatches = 0.0, "", []

    def walk(self, a, b, path):
        if isinstance(a, dict) and isinstance(b, dict):
            for key in [*a, *(k for k in b if k not in a)]:
                self.walk(a.get(key, _ABSENT), b.get(key, _ABSENT), f"{path}.{key}")
        elif isinstance(a, list) and isinstance(b, list):
            if len(a) != len(b):
                self.mismatches.append(f"{path}: {len(a)} vs {len(b)} entries")
            elif a and all(isinstance(x, float) or x is None for x in [*a, *b]) and any(map(_number, a)):
                if [x is None for x in a] != [x is None for x in b]:
                    self.mismatches.append(f"{path}: missing values (null) at different points")
                    return
                self._note(_relative(*([math.nan if x is None else x for x in v] for v in (a, b))), path)
            elif not any(isinstance(x, (dict, list)) for x in [*a, *b]):  # flags, regimes, texts: exact
                bad = [i for i, (x, y) in enumerate(zip(a, b)) if x != y or type(x) is not type(y)]
                if bad:
                    self.mismatches.append(f"{path}: {len(bad)} of {len(a)} values differ (first "
                                           f"[{bad[0]}]: {a[bad[0]]!r} vs {b[bad[0]]!r})")
            else:
                for i, (x, y) in enumerate(zip(a, b)):
                    self.walk(x, y, f"{path}[{i}]")
        elif isinstance(a, float) and _number(b) or isinstance(b, float) and _number(a):
            self._note(_relative([a], [b]), path)
        elif a != b or type(a) is not type(b):
            self.mismatches.append(f"{path}: {a!r} vs {b!r}")

    def _note(self, rel, path):
        rel = np.nan_to_num(rel, nan=0.0)
        if rel.size and rel.max() > self.largest:
            self.largest, self.where = float(rel.max()), f"{path}[{int(rel.argmax())}]"


class QuantityCheck(NamedTuple):
    """One row of a :class:`VerifyReport`; ``difference`` and ``tolerance`` are relative [-]."""

    name: str
    difference: float
    tolerance: float
    within: bool
    kind: Literal["deterministic", "statistical"]
    detail: str = ""


def _deterministic(name: str, stored, now) -> QuantityCheck:
    tally = _Tally()
    tally.walk(stored, now, name)
    if tally.mismatches:
        shown = "; ".join(tally.mismatches[:3]) + (f" (+{len(tally.mismatches) - 3} more)"
                                                   if len(tally.mismatches) > 3 else "")
        return QuantityCheck(name, math.inf, DETERMINISTIC_TOLERANCE, False, "deterministic", shown)
    detail = f"largest at {tally.where}" if tally.largest > 0 else "identical"
    return QuantityCheck(name, tally.largest, DETERMINISTIC_TOLERANCE, tally.largest <= DETERMINISTIC_TOLERANCE,
                         "deterministic", detail)


def quantile_standard_error(p: float, edges, counts) -> float:
    """Standard error of a sample ``p``-quantile from a histogram, sqrt(p (1 - p) / n) / f(x_p).

    x_p is the histogram's own ``p``-quantile (cumulative counts interpolated
    linearly), so a wrong stored quantile cannot widen its own tolerance. The density
    f(x_p) is the frequency polygon's (bin densities interpolated between bin
    centres) where the two bins around x_p hold at least 20 samples, else the mean
    density of the bin holding x_p widened one bin each side until it does. The law
    is the asymptotic normal distribution of a sample quantile (H. Cramer,
    *Mathematical Methods of Statistics*, 1946, sec. 28.5); for a normal
    distribution it gives sqrt(pi / 2) sigma / sqrt(n) for the median, as below
    (n = 10^6, sigma = 1).

    Parameters
    ----------
    p : float
        Probability of the quantile, 0 < p < 1 [-].
    edges, counts : array_like
        Histogram bin edges [unit of the quantity] and counts (n = sum of counts).

    Returns
    -------
    float
        Standard error [unit of the quantity].

    >>> edges = np.linspace(-5.125, 5.125, 42)
    >>> counts = np.diff([math.erf(x / math.sqrt(2)) / 2 for x in edges]) * 1e6
    >>> round(quantile_standard_error(0.5, edges, counts) * 1e3 / math.sqrt(math.pi / 2), 2)
    1.0
    """
    edges, counts = np.asarray(edges, dtype=float), np.asarray(counts, dtype=float)
    n, last = counts.sum(), len(counts) - 1
    value = float(np.interp(p, np.concatenate([[0.0], np.cumsum(counts)]) / n, edges))
    centres = (edges[:-1] + edges[1:]) / 2
    right = int(np.clip(np.searchsorted(centres, value), 1, max(last, 1)))
    density = float(np.interp(value, centres, counts / (n * np.diff(edges))))
    if counts[right - 1:right + 1].sum() < _MIN_HISTOGRAM_COUNT or not density > 0:
        lo = hi = int(np.clip(np.searchsorted(edges, value, side="right") - 1, 0, last))
        while counts[lo:hi + 1].sum() < _MIN_HISTOGRAM_COUNT and (lo > 0 or hi < last):
            lo, hi = max(lo - 1, 0), min(hi + 1, last)
        density = counts[lo:hi + 1].sum() / (n * (edges[hi + 1] - edges[lo]))
    return float(math.sqrt(p * (1.0 - p) / n) / density) if density > 0 else math.inf


def _statistical(stored: MonteCarloResult, now: MonteCarloResult) -> list[QuantityCheck]:
    """Mean and P5/P50/P95 within STANDARD_ERRORS standard errors of the difference of two runs."""
    n = stored.samples
    errors = {"mean": stored.std / math.sqrt(n)}
    for p in (5, 50, 95):
        errors[f"p{p}"] = quantile_standard_error(p / 100, stored.histogram_edges, stored.histogram_counts)
    rows = []
    for key, error in errors.items():
        a, b = getattr(stored, key), getattr(now, key)
        scale = max(abs(a), abs(b)) or 1.0
        allowed = max(STANDARD_ERRORS * math.sqrt(2.0) * error, DETERMINISTIC_TOLERANCE * scale)
        detail = f"{abs(a - b) / error:.2g} standard errors (limit {allowed / error:.2g})" if error else ""
        rows.append(QuantityCheck(f"monte_carlo.{key}", abs(a - b) / scale, allowed / scale, abs(a - b) <= allowed,
                                  "statistical", detail))
    return rows


@dataclass(frozen=True)
class VerifyReport:
    """Outcome of :func:`verify`: one :class:`QuantityCheck` per quantity, and the versions then and now."""

    source: str
    quantities: list[QuantityCheck]
    provenance_then: Provenance
    provenance_now: Provenance

    @property
    def agrees(self) -> bool:
        """True when every quantity is within its tolerance."""
        return all(q.within for q in self.quantities)

    @property
    def provenance_differences(self) -> list[tuple[str, str, str]]:
        """(name, version then, version now) for each library or platform that changed."""
        then, now = self.provenance_then.model_dump(), self.provenance_now.model_dump()
        return [(k, then[k], now[k]) for k in then if then[k] != now[k]]

    def text(self) -> str:
        """Readable report: verdict, one line per quantity, then version differences."""
        bad = [q for q in self.quantities if not q.within]
        verdict = "AGREES" if not bad else f"DOES NOT AGREE ({len(bad)} of {len(self.quantities)} outside tolerance)"
        width = max([len(q.name) for q in self.quantities] + [8])
        lines = [f"Verification of {self.source}: {verdict}",
                 f"{'quantity':<{width}} {'difference':>10} {'tolerance':>10}  {'kind':<13} ok  detail"]
        for q in self.quantities:
            lines.append(f"{q.name:<{width}} {q.difference:>10.2e} {q.tolerance:>10.2e}  {q.kind:<13} "
                         f"{'yes' if q.within else 'NO ':<3} {q.detail}")
        changes = self.provenance_differences
        lines.append("Versions then -> now: " + ("unchanged" if not changes else ""))
        lines += [f"  {name}: {then} -> {now}" for name, then, now in changes]
        if changes and any(q.kind == "deterministic" for q in bad):
            lines.append("Note: deterministic results repeat bit for bit with the same code, property tables and "
                         "platform. With other versions, small differences can be round-off amplified by the "
                         "surface-temperature solve (tolerance 1e-6 K); large ones mean the computation changed.")
        return "\n".join(lines)


def verify(source, progress: Callable[[float, str], None] | None = None) -> VerifyReport:
    """Re-run a snapshot's study with this convlib and compare with the stored result.

    Deterministic quantities (base case, correlation comparison and spreads, dew point,
    warnings, each sweep, each map, tornado) must agree to a relative
    :data:`DETERMINISTIC_TOLERANCE` (1e-9): the same code on the same property tables
    reproduces them bit for bit, so the margin only absorbs round-off, and anything
    larger means the computation changed (a new CoolProp can change the tables: the
    report lists version differences). Monte Carlo mean and P5/P50/P95 may move when
    numpy changes its random streams; each must lie within :data:`STANDARD_ERRORS`
    standard errors of the difference of two independent runs, sqrt(2) times the
    stored estimate's error: std/sqrt(n) for the mean, sqrt(p (1 - p) / n) / f(x_p)
    for a quantile (:func:`quantile_standard_error`). A false alarm between two
    honest runs is then about 1 in 10^4 per quantity (4 sigma of a normal difference). Histogram, convergence
    trace and surface-temperature percentiles are not compared.

    Parameters
    ----------
    source : path-like or Snapshot
    progress : callable, optional
        ``progress(fraction, text)``, passed to :func:`~convlib.study.run_study`.
    """
    snap = _as_snapshot(source)
    name = str(snap.path) if snap.path is not None else f"snapshot {snap.sha256[:12]}"
    try:
        now = run_study(snap.spec, progress=progress)
    except InputError as exc:  # valid when saved, refused now: report it; any other exception is a fault, raised
        raise SnapshotError(f"{name}: re-running the study failed with this convlib: {exc}") from exc
    a, b = snap.result.model_dump(mode="json"), now.model_dump(mode="json")
    rows = [_deterministic(key, a[key], b[key]) for key in
            ("base", "base_methods", "base_spreads", "dew_point", "warnings", "cautions")]
    for key in ("sweeps", "maps"):
        if len(a[key]) != len(b[key]):
            rows.append(_deterministic(key, a[key], b[key]))
            continue
        for i, item in enumerate(a[key]):
            label = item.get("input") or f"{item.get('x_input')} x {item.get('y_input')}"
            rows.append(_deterministic(f"{key}[{i}] ({label})", item, b[key][i]))
    rows.append(_deterministic("tornado", a["tornado"], b["tornado"]))
    if snap.result.monte_carlo is not None and now.monte_carlo is not None:
        rows += _statistical(snap.result.monte_carlo, now.monte_carlo)
    elif (snap.result.monte_carlo is None) != (now.monte_carlo is None):
        rows.append(QuantityCheck("monte_carlo", math.inf, 0.0, False, "statistical", "present on one side only"))
    return VerifyReport(name, rows, snap.provenance, current_provenance())


# ----------------------------------------------------------------------------- diff
@dataclass(frozen=True)
class SnapshotDiff:
    """What differs between two snapshots (a -> b)."""

    changed_inputs: list[tuple[str, Any, Any]]
    changed_results: list[tuple[str, float]]
    changed_provenance: list[tuple[str, str, str]]
    #: each changed result as before -> after (SI, with its unit): see :meth:`records`
    result_changes: list[dict] = dataclass_field(default_factory=list)

    def records(self) -> dict:
        """The changes as structured data (for JSON): ``inputs`` (key, before, after), ``results`` (key, before,
        after, unit, change = after - before, relative_change = change / |before|; ``None`` where a side has no
        value) and ``versions`` (component, before, after)."""
        return {"identical": self.identical,
                "inputs": [{"key": k, "before": _json_side(x), "after": _json_side(y)}
                           for k, x, y in self.changed_inputs],
                "results": [dict(r) for r in self.result_changes],
                "versions": [{"component": k, "before": x, "after": y} for k, x, y in self.changed_provenance]}

    @property
    def identical(self) -> bool:
        """Same inputs and same results (author, note, time and versions may differ)."""
        return not self.changed_inputs and not self.changed_results

    def text(self) -> str:
        """Readable list of the changes."""
        if self.identical:
            return "Inputs and results identical."
        lines = ["Changed inputs (a -> b):"] + [f"  {p}: {x!r} -> {y!r}" for p, x, y in self.changed_inputs]
        lines += ["Changed results (a -> b; of a curve, the point that changed most):"]
        lines += [f"  {_change_text(r)}" for r in self.result_changes]
        lines += [f"Version {k}: {x} -> {y}" for k, x, y in self.changed_provenance]
        return "\n".join(lines)


def _json_side(x):
    return None if isinstance(x, str) and x == _ABSENT else x


def _signed(x: float, digits: int = 4) -> str:
    return f"{x:+.{digits}g}"


def _change_text(r: dict) -> str:
    """``base.q_per_length: 52.31 W/m -> 55.02 W/m (+2.71 W/m, +5.18 %)``."""
    unit = f" {r['unit']}" if r["unit"] else ""
    side = lambda x: "absent" if x is None else f"{x:.6g}{unit}"  # noqa: E731
    if r["change"] is None:
        return f"{r['key']}: {side(r['before'])} -> {side(r['after'])}"
    relative = "" if r["relative_change"] is None else f", {_signed(100.0 * r['relative_change'], 3)} %"
    return f"{r['key']}: {side(r['before'])} -> {side(r['after'])} ({_signed(r['change'])}{unit}{relative})"


def _result_unit(name: str) -> str:
    return "K" if name.startswith("dew_point") else "W/m"


def _result_change(name: str, x, y) -> dict | None:
    """The change of one headline quantity (its point of largest relative difference); None when unchanged."""
    unit = _result_unit(name)
    if x is None or y is None or len(x) != len(y):
        before = None if x is None or len(x) != 1 else x[0]
        after = None if y is None or len(y) != 1 else y[0]
        note = {} if x is None or y is None else {"note": f"{len(x)} values -> {len(y)} values"}
        return {"key": name, "before": before, "after": after, "unit": unit, "change": None,
                "relative_change": None, **note}
    a = np.array([math.nan if v is None else v for v in x], dtype=float)
    b = np.array([math.nan if v is None else v for v in y], dtype=float)
    rel = _relative(a, b)
    if not np.any(rel > 0):
        return None
    i = int(np.nanargmax(rel))
    key = name if a.size == 1 else f"{name}[{i}]"
    change = float(b[i] - a[i])
    return {"key": key, "before": float(a[i]), "after": float(b[i]), "unit": unit, "change": change,
            "relative_change": change / abs(float(a[i])) if a[i] != 0 else None}


def _leaf_changes(a, b, path, out):
    if isinstance(a, dict) and isinstance(b, dict):
        for key in [*a, *(k for k in b if k not in a)]:
            _leaf_changes(a.get(key, _ABSENT), b.get(key, _ABSENT), f"{path}.{key}" if path else key, out)
    elif isinstance(a, list) and isinstance(b, list):
        for i in range(max(len(a), len(b))):
            _leaf_changes(a[i] if i < len(a) else _ABSENT, b[i] if i < len(b) else _ABSENT, f"{path}[{i}]", out)
    elif a != b or type(a) is not type(b) and not (_number(a) and _number(b)):
        out.append((path, a, b))


def _headline(result: StudyResult) -> dict[str, list[float]]:
    """The top-level quantities :func:`diff` compares."""
    out = {"base.q_per_length": result.base.q_per_length, "dew_point": [result.dew_point]}
    for i, s in enumerate(result.sweeps):
        out[f"sweeps[{i}].default.q_per_length"] = s.default.q_per_length
    for i, m in enumerate(result.maps):
        out[f"maps[{i}].q_per_length"] = [x for row in m.q_per_length for x in row]
    for bar in result.tornado:
        out[f"tornado[{bar.input}].swing"] = [bar.swing]
    if result.monte_carlo is not None:
        for key in ("mean", "p5", "p50", "p95"):
            out[f"monte_carlo.{key}"] = [getattr(result.monte_carlo, key)]
    return out


def diff(a, b) -> SnapshotDiff:
    """Differences between two snapshots (paths or :class:`Snapshot`).

    ``changed_inputs``: (JSON path such as ``case.wind_speed`` or ``sweeps[0].count``,
    value in a, value in b), ``"<absent>"`` where one side has no such field.
    ``changed_results``: (quantity, largest relative difference [-]) for the base
    q_per_length, dew point, each sweep's and map's q_per_length (default
    correlations), each tornado swing (matched by input) and the Monte Carlo mean and
    percentiles; ``inf`` where a quantity exists on one side only or changed length.
    """
    a, b = _as_snapshot(a), _as_snapshot(b)
    inputs: list = []
    _leaf_changes(a.spec.model_dump(mode="json"), b.spec.model_dump(mode="json"), "", inputs)
    qa, qb = _headline(a.result), _headline(b.result)
    results, changes = [], []
    for name in [*qa, *(k for k in qb if k not in qa)]:
        x, y = qa.get(name), qb.get(name)
        rel = float(_relative(x, y).max(initial=0.0)) if x is not None and y is not None and len(x) == len(y) \
            else math.inf
        if rel > 0:
            results.append((name, rel))
            change = _result_change(name, x, y)
            if change is not None:
                changes.append(change)
    then, now = a.provenance.model_dump(), b.provenance.model_dump()
    return SnapshotDiff(inputs, results, [(k, then[k], now[k]) for k in then if then[k] != now[k]], changes)
