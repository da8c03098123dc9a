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
from dataclasses import dataclass
from importlib import metadata
from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator

from . import __version__
from .errors import InputError
from .files import read_json, write_atomic
from .study import StudyResult, StudySpec

__all__ = ["SCHEMA_VERSION", "KIND", "MAX_BYTES", "DETERMINISTIC_TOLERANCE", "STANDARD_ERRORS", "SnapshotError",
           "Provenance", "Snapshot", "QuantityCheck", "VerifyReport", "SnapshotDiff", "save", "load", "verify",
           "diff", "canonical_json", "content_hash", "current_provenance", "quantile_standard_error", "as_snapshot",
           "checked_envelope", "save_target"]

SCHEMA_VERSION = 1
KIND = "convlib-snapshot"
MAX_BYTES = 200_000_000                #: largest file :func:`load` reads (and :func:`save` writes) [bytes]


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
    >>> from convlib.study import CaseSpec, run_study
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
    path = save_target(path, overwrite, "study.snapshot.json")
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


def save_target(path, overwrite: bool, example: str) -> Path:
    """The checked file a snapshot is saved to: a usable name in an existing directory, not a directory, and
    new unless ``overwrite`` (``example``: a file name suggested when ``path`` is a directory)."""
    if not isinstance(path, (str, os.PathLike)) or not os.fspath(path) or "\0" in os.fspath(path):
        raise InputError(f"cannot save to {path!r}: not a usable file name", field="path",
                         rule="a file name without NUL characters", value=path)
    path = Path(path)
    if path.is_dir():
        raise IsADirectoryError(f"{path} is a directory; give a file name such as {path / example}")
    if not path.parent.is_dir():
        raise FileNotFoundError(f"cannot save {path}: directory {path.parent} does not exist")
    if path.exists() and not overwrite:
        raise _exists(path)
    return path


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
    hint = " (this looks like a study spec; read it with StudySpec.model_validate_json)" if "case" in document else ""
    envelope = checked_envelope(document, KIND, SCHEMA_VERSION, _Document, fail, "snapshot", hint)
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


def checked_envelope(document, kind: str, schema_version: int, model, fail, what: str = "snapshot", hint: str = ""):
    """The validated envelope (``model``) of a parsed snapshot-like ``document`` of ``kind``: the kind, a schema
    no newer than ``schema_version``, every field, and the content hash checked, each failure raised as
    ``fail(problem)``. Shared by study and upgrade snapshots."""
    found = document.get("kind", "missing") if isinstance(document, dict) else "missing"
    if found != kind:
        raise fail(f"not a convlib {what}: kind is {found!r}, expected {kind!r}{hint}")
    version = document.get("schema_version")
    if isinstance(version, int) and not isinstance(version, bool) and version > schema_version:
        raise fail(f"written by a newer convlib ({what} schema_version {version}; convlib {__version__} reads "
                   f"up to {schema_version}); upgrade convlib to open it")
    try:
        envelope = model.model_validate(document)
    except ValidationError as exc:
        raise fail(_flatten(exc)) from None
    computed = content_hash(document)
    if computed != envelope.sha256:
        raise fail(f"tampered or corrupted: stored hash {envelope.sha256}, computed {computed}")
    return envelope


def as_snapshot(source) -> Snapshot:
    """``source`` itself if it is a :class:`Snapshot`, else :func:`load` it."""
    return source if isinstance(source, Snapshot) else load(source)


# verify and diff live in convlib.snapshot_check; their names are importable from here
from .snapshot_check import (DETERMINISTIC_TOLERANCE, STANDARD_ERRORS, QuantityCheck, SnapshotDiff,  # noqa: E402
                             VerifyReport, diff, quantile_standard_error, verify)
