"""Where snapshots live: one configured directory, safe file names, a listing.

A name typed in a browser is untrusted: it is reduced to ``[A-Za-z0-9._-]``,
may not contain ``..`` or start with a dot, and the resolved path must lie in
the snapshot directory (no traversal, no symbolic-link escape).
"""
from __future__ import annotations

import datetime as _dt
import re
from dataclasses import dataclass
from pathlib import Path

from convlib import snapshot as cl_snapshot

from . import settings

__all__ = ["SUFFIX", "safe_name", "snapshot_path", "default_name", "SnapshotEntry", "list_snapshots"]

SUFFIX = ".snapshot.json"
_ALLOWED = re.compile(r"[^A-Za-z0-9._-]+")
MAX_NAME = 120


def safe_name(text: str) -> str:
    """A file name made of ``[A-Za-z0-9._-]`` ending in ``.snapshot.json``.

    Raises ``ValueError`` for names that are empty after cleaning, contain ``..``
    or start with a dot.

    Examples
    --------
    >>> safe_name("steam main / run 2")
    'steam_main_run_2.snapshot.json'
    >>> safe_name("../../etc/passwd")
    Traceback (most recent call last):
    ...
    ValueError: snapshot name '../../etc/passwd' is not allowed: it may not contain '..'
    """
    raw = str(text).strip()
    if ".." in raw:
        raise ValueError(f"snapshot name {raw!r} is not allowed: it may not contain '..'")
    stem = raw[: -len(SUFFIX)] if raw.endswith(SUFFIX) else raw
    stem = _ALLOWED.sub("_", stem).strip("_")
    if not stem or stem.startswith("."):
        raise ValueError(f"snapshot name {raw!r} is not allowed: use letters, digits, '.', '_' or '-', "
                         "not starting with a dot")
    return stem[:MAX_NAME] + SUFFIX


def snapshot_path(directory: Path | str | None, name: str) -> Path:
    """The path of snapshot ``name`` inside ``directory`` (checked to stay inside it)."""
    root = Path(directory or settings.snapshot_dir()).expanduser().resolve()
    path = (root / safe_name(name)).resolve()
    if path.parent != root:
        raise ValueError(f"snapshot name {name!r} is not allowed: it leaves the snapshot directory")
    return path


def default_name(study_name: str, when: _dt.datetime | None = None) -> str:
    """``<study>-<UTC time>`` cleaned for a file name."""
    when = when or _dt.datetime.now(_dt.timezone.utc)
    stem = _ALLOWED.sub("_", study_name).strip("_.")[:40] or "study"
    return safe_name(f"{stem}-{when.strftime('%Y%m%d-%H%M%S')}")


@dataclass(frozen=True)
class SnapshotEntry:
    """One file of the snapshot directory, as listed."""

    path: Path
    created_utc: str
    author: str
    note: str
    sha256: str
    problem: str = ""

    @property
    def label(self) -> str:
        if self.problem:
            return f"{self.path.name} · cannot be read"
        when = self.created_utc.replace("T", " ").replace("Z", " UTC")
        return f"{when} · {self.author or 'no author'} · {self.sha256[:12]} · {self.path.name}"


def list_snapshots(directory: Path | str | None, limit: int = 200) -> list[SnapshotEntry]:
    """Snapshots in the directory, newest first (each loaded and hash-checked)."""
    root = Path(directory or settings.snapshot_dir()).expanduser()
    if not root.is_dir():
        return []
    files = sorted((p for p in root.glob("*" + SUFFIX) if p.is_file()), key=lambda p: p.stat().st_mtime,
                   reverse=True)[:limit]
    out = []
    for path in files:
        try:
            snap = cl_snapshot.load(path)
        except Exception as exc:  # a damaged file is listed with its problem, never raised
            out.append(SnapshotEntry(path, "", "", "", "", problem=str(exc)))
            continue
        out.append(SnapshotEntry(path, snap.created_utc, snap.author, snap.note, snap.sha256))
    return out
