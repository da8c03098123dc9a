"""Where snapshots live: one configured directory, safe file names, a listing.

A name typed in a browser is untrusted: it is reduced to ``[A-Za-z0-9._-]``,
may not contain ``..`` or start with a dot, and the resolved path must lie in
the snapshot directory (no traversal, no symbolic-link escape).

The listing is served from an index kept beside the snapshots
(:data:`INDEX_NAME`, a hidden JSON file that never looks like a snapshot). It
holds, per file, what the listing shows (author, note, creation time, SHA-256,
or the problem of a file that cannot be read) together with the file's size,
modification and change times when it was read. A listing reconciles the index
with one scan of the directory that only calls ``stat``: a file whose size and
times still match is listed from the index without being opened; a new or
changed file is loaded and hash-checked once (if it is at most
:data:`dashboard.settings.MAX_SNAPSHOT_BYTES`; a larger one is listed as too
large and never read); a deleted file drops out. The index is a cache: a
missing, damaged or foreign index is rebuilt without a word, and opening,
verifying or comparing a snapshot always reads and hash-checks the file itself.
"""
from __future__ import annotations

import datetime as _dt
import json
import os
import re
import stat
from dataclasses import dataclass
from pathlib import Path

from . import settings
from .compute import InputError, read_capped, write_atomic
from .compute import snapshot as cl_snapshot

__all__ = ["SUFFIX", "INDEX_NAME", "INDEX_SCHEMA_VERSION", "safe_name", "snapshot_path", "default_name",
           "SnapshotEntry", "list_snapshots", "record_snapshot", "viewer_identity"]

SUFFIX = ".snapshot.json"
_ALLOWED = re.compile(r"[^A-Za-z0-9._-]+")
MAX_NAME = 120
INDEX_NAME = ".convlib-index.json"     #: the listing's index, beside the snapshots (hidden, not a snapshot name)
INDEX_SCHEMA_VERSION = 1
INDEX_KIND = "convlib-snapshot-index"
MAX_INDEX_BYTES = 64 * 2**20           #: a larger index is ignored and rebuilt [bytes]


def safe_name(text: str) -> str:
    """A file name made of ``[A-Za-z0-9._-]`` ending in ``.snapshot.json``.

    Raises :class:`convlib.errors.InputError` (a ``ValueError``, field ``"name"``) for names
    that are not text, are empty after cleaning, contain ``..`` or start with a dot.
    Separators, control characters and any non-ASCII character become ``_``.

    Examples
    --------
    >>> safe_name("steam main / run 2")
    'steam_main_run_2.snapshot.json'
    >>> safe_name("../../etc/passwd")
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: snapshot name '../../etc/passwd' is not allowed: it may not contain '..'
    """
    if not isinstance(text, str):
        raise InputError(f"snapshot name must be text; got {type(text).__name__}", field="name", rule="text",
                         value=text)
    raw = text.strip()
    if ".." in raw:
        raise InputError(f"snapshot name {raw!r} is not allowed: it may not contain '..'", field="name",
                         rule="no '..'", value=raw)
    stem = raw[: -len(SUFFIX)] if raw.endswith(SUFFIX) else raw
    stem = _ALLOWED.sub("_", stem).strip("_")
    if not stem or stem.startswith("."):
        raise InputError(f"snapshot name {raw!r} is not allowed: use letters, digits, '.', '_' or '-', "
                         "not starting with a dot", field="name", rule="letters, digits, '.', '_' or '-'", value=raw)
    return stem[:MAX_NAME] + SUFFIX


def snapshot_path(directory: Path | str | None, name: str) -> Path:
    """The path of snapshot ``name`` inside ``directory`` (checked to stay inside it)."""
    root = Path(directory or settings.snapshot_dir()).expanduser().resolve()
    path = (root / safe_name(name)).resolve()
    if path.parent != root:
        raise InputError(f"snapshot name {name!r} is not allowed: it leaves the snapshot directory", field="name",
                         rule="a file in the snapshot directory", value=name)
    return path


def default_name(study_name: str, when: _dt.datetime | None = None) -> str:
    """``<study>-<UTC time>`` cleaned for a file name."""
    when = when or _dt.datetime.now(_dt.timezone.utc)
    stem = _ALLOWED.sub("_", study_name).strip("_.")[:40] or "study"
    return safe_name(f"{stem}-{when.strftime('%Y%m%d-%H%M%S')}")


@dataclass(frozen=True)
class SnapshotEntry:
    """One file of the snapshot directory, as listed (``size`` in bytes)."""

    path: Path
    created_utc: str
    author: str
    note: str
    sha256: str
    problem: str = ""
    size: int = 0

    @property
    def label(self) -> str:
        if self.problem:
            return f"{self.path.name} · cannot be read"
        when = self.created_utc.replace("T", " ").replace("Z", " UTC")
        return f"{when} · {self.author or 'no author'} · {self.sha256[:12]} · {self.path.name}"


# ----------------------------------------------------------------------------- directory scan (stat only)
@dataclass(frozen=True)
class _Seen:
    """One candidate file as found by the scan: name, size and times, or a problem known without opening it."""

    name: str
    size: int
    mtime_ns: int
    ctime_ns: int
    problem: str = ""


def _megabytes(size: int) -> str:
    return f"{size / 2**20:.3g} MB"


def _examine(root: Path, root_real: Path, name: str, max_bytes: int) -> _Seen | None:
    """``stat`` one name of the directory (never opens it); ``None`` if it is gone or not a regular file."""
    where = os.path.join(root, name)
    try:
        st = os.lstat(where)
    except FileNotFoundError:
        return None
    except OSError as exc:
        return _Seen(name, 0, 0, 0, f"cannot examine the file ({exc.strerror or exc})")
    if stat.S_ISLNK(st.st_mode):
        if Path(os.path.realpath(where)).parent != root_real:
            return _Seen(name, 0, st.st_mtime_ns, st.st_ctime_ns,
                         "a symbolic link leading outside the snapshot directory; not opened")
        try:
            st = os.stat(where)
        except OSError:
            return _Seen(name, 0, st.st_mtime_ns, st.st_ctime_ns, "a broken symbolic link; not opened")
    if not stat.S_ISREG(st.st_mode):  # directories, pipes, devices: not snapshots (a pipe would block a reader)
        return None
    if st.st_size > max_bytes:
        return _Seen(name, st.st_size, st.st_mtime_ns, st.st_ctime_ns,
                     f"too large to open here ({_megabytes(st.st_size)} > {_megabytes(max_bytes)})")
    return _Seen(name, st.st_size, st.st_mtime_ns, st.st_ctime_ns)


def _scan(root: Path, max_bytes: int) -> list[_Seen]:
    root_real = root.resolve()
    with os.scandir(root) as names:
        candidates = [item.name for item in names if item.name.endswith(SUFFIX)]
    return [seen for name in candidates if (seen := _examine(root, root_real, name, max_bytes)) is not None]


# ----------------------------------------------------------------------------- the index
_TEXT_LIMITS = {"author": 200, "note": 20_000, "created_utc": 40, "sha256": 64, "problem": 20_000}
_NUMBERS = ("size", "mtime_ns", "ctime_ns")
_HEX64 = re.compile(r"[0-9a-f]{64}")


def _record(seen: _Seen, created_utc="", author="", note="", sha256="", problem="") -> dict:
    """One index entry (the problem is stored without the file's path, which is added when listed)."""
    return {"created_utc": created_utc, "author": author, "note": note, "sha256": sha256, "problem": problem,
            "size": seen.size, "mtime_ns": seen.mtime_ns, "ctime_ns": seen.ctime_ns}


def _valid(item) -> tuple[str, dict] | None:
    """``(name, entry)`` of one stored index item, or ``None`` if anything about it is off."""
    if not isinstance(item, dict):
        return None
    name = item.get("name")
    if (not isinstance(name, str) or not name.endswith(SUFFIX) or len(name) > 1000
            or any(c in name for c in "/\\\0") or name in (".", "..")):
        return None
    entry = {}
    for key, limit in _TEXT_LIMITS.items():
        value = item.get(key)
        if not isinstance(value, str) or len(value) > limit:
            return None
        entry[key] = value
    for key in _NUMBERS:
        value = item.get(key)
        if not isinstance(value, int) or isinstance(value, bool) or value < 0:
            return None
        entry[key] = value
    if not entry["problem"] and not _HEX64.fullmatch(entry["sha256"]):
        return None
    return name, entry


def _read_index(root: Path) -> tuple[dict[str, dict], str]:
    """Entries of the index by file name and its state: ``"ok"``, ``"missing"`` or ``"bad"`` (never raises)."""
    flags = os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_BINARY", 0)
    try:
        fd = os.open(root / INDEX_NAME, flags)
    except FileNotFoundError:
        return {}, "missing"
    except OSError:  # a symbolic link (refused), no permission...
        return {}, "bad"
    try:
        with os.fdopen(fd, "rb") as fh:
            info = os.fstat(fh.fileno())
            if not stat.S_ISREG(info.st_mode) or info.st_size > MAX_INDEX_BYTES:
                return {}, "bad"
            raw = fh.read(MAX_INDEX_BYTES + 1)
        document = json.loads(raw.decode("utf-8")) if len(raw) <= MAX_INDEX_BYTES else None
    except Exception:  # unreadable, not UTF-8, not JSON, too deep: rebuilt from the files
        return {}, "bad"
    if (not isinstance(document, dict) or document.get("kind") != INDEX_KIND
            or document.get("schema_version") != INDEX_SCHEMA_VERSION or not isinstance(document.get("files"), list)):
        return {}, "bad"
    entries, state = {}, "ok"
    for item in document["files"]:
        checked = _valid(item)
        if checked is None or checked[0] in entries:
            state = "bad"  # the damaged item is dropped (its file is read again) and the index rewritten
            continue
        entries[checked[0]] = checked[1]
    return entries, state


def _write_index(root: Path, entries: dict[str, dict]) -> bool:
    """Replace the index atomically (:func:`convlib.files.write_atomic`); ``False`` if it cannot be written.

    Two kernels writing at once each rename a complete file: the last one wins and nothing is torn.
    """
    document = {"schema_version": INDEX_SCHEMA_VERSION, "kind": INDEX_KIND,
                "about": "cache of the convlib dashboard's snapshot listing; safe to delete (it is rebuilt)",
                "files": [{"name": name, **entries[name]} for name in sorted(entries)]}
    data = (json.dumps(document, ensure_ascii=False, indent=1) + "\n").encode("utf-8")
    try:
        write_atomic(root / INDEX_NAME, data)
    except OSError:  # read-only directory: the listing works, only without its cache
        return False
    return True


def _read_snapshot(root: Path, seen: _Seen) -> tuple[dict, bool]:
    """Load and hash-check one file: its index entry, and whether it may be cached (unchanged while read)."""
    path = root / seen.name
    try:
        snap = cl_snapshot.load(path)
    except Exception as exc:  # a damaged file is listed with its problem, never raised
        text = str(exc) or type(exc).__name__
        entry = _record(seen, problem=text.removeprefix(f"{path}: ")[:_TEXT_LIMITS["problem"]])
    else:
        entry = _record(seen, snap.created_utc, snap.author, snap.note, snap.sha256)
    try:
        after = os.stat(path)
    except OSError:
        return entry, False
    return entry, (after.st_size, after.st_mtime_ns, after.st_ctime_ns) == (seen.size, seen.mtime_ns, seen.ctime_ns)


def _listed(root: Path, name: str, entry: dict) -> SnapshotEntry:
    path = root / name
    problem = f"{path}: {entry['problem']}" if entry["problem"] else ""
    return SnapshotEntry(path, entry["created_utc"], entry["author"], entry["note"], entry["sha256"], problem,
                         entry["size"])


def _unchanged(entry: dict | None, seen: _Seen) -> bool:
    return entry is not None and (entry["size"], entry["mtime_ns"], entry["ctime_ns"]) == (
        seen.size, seen.mtime_ns, seen.ctime_ns)


def _root(directory) -> Path:
    return Path(directory or settings.snapshot_dir()).expanduser()


def _bound(max_bytes: int | None) -> int:
    return settings.MAX_SNAPSHOT_BYTES if max_bytes is None else int(max_bytes)


# ----------------------------------------------------------------------------- listing
def list_snapshots(directory: Path | str | None, limit: int = 200,
                   max_bytes: int | None = None) -> list[SnapshotEntry]:
    """Snapshots in the directory, newest (last modified) first, at most ``limit``.

    Served from the index: only new or changed files among the ``limit`` newest are opened (loaded
    and hash-checked once, then remembered); files larger than ``max_bytes`` (default
    :data:`dashboard.settings.MAX_SNAPSHOT_BYTES`), symbolic links leading out of the directory and
    broken links are listed with their problem and never read. Unreadable files are listed with
    their problem too; nothing here raises for the contents of the directory. The index is
    rewritten (atomically) when anything changed.

    Author, note and hash come from the last time the file was read; a file is read again as soon
    as its size, modification time or change time differ. Opening a snapshot checks it anew.
    """
    root = _root(directory)
    if not root.is_dir():
        return []
    try:
        found = _scan(root, _bound(max_bytes))
    except OSError:  # directory unreadable or gone meanwhile
        return []
    found.sort(key=lambda seen: (seen.mtime_ns, seen.name), reverse=True)
    index, state = _read_index(root)
    kept, out = {}, []
    for rank, seen in enumerate(found):
        shown = rank < limit
        if seen.problem:  # known from stat alone: listed, never opened, not remembered
            if shown:
                out.append(SnapshotEntry(root / seen.name, "", "", "", "", f"{root / seen.name}: {seen.problem}",
                                         seen.size))
            continue
        entry = index.get(seen.name)
        if _unchanged(entry, seen):
            kept[seen.name] = entry
        elif shown:  # new or changed: read once
            entry, cacheable = _read_snapshot(root, seen)
            if cacheable:
                kept[seen.name] = entry
        else:  # beyond the listing: not opened now
            continue
        if shown:
            out.append(_listed(root, seen.name, entry))
    if kept != index or state == "bad":  # a damaged index is replaced even when nothing is left to remember
        _write_index(root, kept)
    return out


def record_snapshot(directory: Path | str | None, path: Path | str,
                    max_bytes: int | None = None) -> SnapshotEntry | None:
    """Add (or refresh) one just-saved file in the index, so the next listing need not open it.

    Call after a successful save. Returns the file's entry as listed, or ``None`` if the file is
    gone or not a regular file. Raises ``ValueError`` if ``path`` is not in ``directory``; a
    problem with the index itself is never raised (the next listing rebuilds it).
    """
    root = _root(directory)
    path = Path(path).expanduser()
    if not path.is_absolute():
        path = root / path
    if not root.is_dir() or path.parent.resolve() != root.resolve() or not path.name.endswith(SUFFIX):
        raise ValueError(f"cannot index {path}: it is not a snapshot file ({SUFFIX}) in the snapshot "
                         f"directory {root}")
    seen = _examine(root, root.resolve(), path.name, _bound(max_bytes))
    if seen is None:
        return None
    if seen.problem:
        return SnapshotEntry(root / seen.name, "", "", "", "", f"{root / seen.name}: {seen.problem}", seen.size)
    entry, cacheable = _read_snapshot(root, seen)
    index, _ = _read_index(root)
    if cacheable:
        index[seen.name] = entry
    else:
        index.pop(seen.name, None)
    _write_index(root, index)
    return _listed(root, seen.name, entry)


def viewer_identity(connection_file: str | os.PathLike | None = None) -> str:
    """Who the shared server says the viewer of this kernel is ("name at address"), or "" when it says nothing
    (a local dashboard, a test kernel). The server (``dashboard.server``) writes it beside the kernel's
    connection file when the kernel is handed to a page; nothing the page sends can change it."""
    if connection_file is None:
        try:
            from ipykernel.connect import get_connection_file

            connection_file = get_connection_file()
        except Exception:  # noqa: BLE001 - not in a kernel
            return ""
    path = Path(connection_file)
    kernel_id = path.stem.removeprefix("kernel-")
    target = path.with_name(f"viewer-{kernel_id}.json")
    try:
        data = json.loads(read_capped(target, 4096, label="viewer record", field="viewer"))
    except (OSError, ValueError):
        return ""
    if not isinstance(data, dict):
        return ""
    name = str(data.get("name") or "").strip()[:200]
    address = str(data.get("address") or "").strip()[:100]
    return " at ".join(part for part in (name, address) if part)

