"""Safe file input and output: capped reads, strict JSON, atomic writes that leave no debris.

Every file convlib reads (snapshots, line lists, study and weather files) goes through
:func:`read_capped`: the size is checked with ``stat`` before the file is opened, only
regular files are opened (a named pipe or device would block or never end), a
symbolic link is followed only when its target stays in the link's own folder, and at
most ``max_bytes + 1`` bytes are read. Memory and time of a refused file are therefore
bounded by the cap, however large or strange the file is. :func:`parse_json` turns the
bytes into data with the rules JSON files of convlib share: UTF-8 (a BOM is allowed),
no duplicate keys, no ``NaN``/``Infinity``, nesting at most :data:`MAX_DEPTH` deep.
Problems raise :class:`~convlib.errors.InputError` whose message starts with the file.

Every file convlib writes goes through :func:`write_atomic`: the bytes go to a
temporary file in the target's folder (named ``.<target>.<random>.convlib.tmp``, held
under an exclusive ``flock`` while it is written), are flushed to disk, and the
temporary file is renamed onto the target; the folder is then synced. A reader, or a
process killed at any point, sees the old file or the new one, never a mix. A
temporary file left by a killed writer is no longer locked, and the next write into
that folder removes it (:func:`remove_stale_temporaries`); one still being written by
a live process is locked and left alone. A target that is a symbolic link is replaced
by the new file, never written through, so nothing outside the folder is touched.
"""
from __future__ import annotations

import contextlib
import json
import math
import os
import re
import secrets
import stat
import time
from pathlib import Path
from collections.abc import Callable
from typing import Any

from .errors import InputError

try:  # POSIX: a live writer holds a lock on its temporary file, so cleaners can tell it from debris
    import fcntl
except ImportError:  # pragma: no cover - Windows: debris is recognised by its age instead
    fcntl = None

__all__ = ["TEMP_SUFFIX", "HEAD_BYTES", "MAX_DEPTH", "STALE_AFTER_S", "read_capped", "read_json", "parse_json",
           "write_atomic", "remove_stale_temporaries"]

TEMP_SUFFIX = ".convlib.tmp"   #: ending of convlib's temporary files (hidden: they also start with a dot)
HEAD_BYTES = 65536             #: bytes read first, to refuse a file plainly not of its kind before reading the rest
MAX_DEPTH = 64                 #: deepest nesting of arrays and objects accepted in a JSON file
STALE_AFTER_S = 3600.0         #: without file locks (Windows): age after which a temporary file is debris [s]
_BLANKS = re.compile(rb"(?:\xef\xbb\xbf)?[ \t\r\n]*")
_MAX_DIGITS = 30               # longest integer accepted in JSON (Python refuses beyond 4300 digits)
_NAME_PART = 100               # characters of the target's name kept in a temporary file's name
_O = {name: getattr(os, name, 0) for name in ("O_NOFOLLOW", "O_NONBLOCK", "O_CLOEXEC", "O_BINARY")}


def _megabytes(size: int) -> str:
    return f"{size / 1e6:.3g} MB"


def _refuse(label: str, problem: str, *, field: str, rule: str, value=None) -> InputError:
    return InputError(f"{label}: {problem}", field=field, rule=rule, value=value)


def _text_path(path, label, field) -> Path:
    text = os.fspath(path) if isinstance(path, (str, os.PathLike)) else None
    if not isinstance(text, str) or not text or "\0" in text:
        raise InputError(f"{label}: not a usable file name ({path!r})", field=field,
                         rule="a file name without NUL characters", value=path)
    return Path(text)


def read_capped(path, max_bytes: int, *, label: str | None = None, field: str = "path",
                check_head: Callable[[bytes], None] | None = None) -> bytes:
    """The bytes of a regular file of at most ``max_bytes``, checked before it is read.

    Parameters
    ----------
    path : str or path-like
        The file. A symbolic link is followed only to a file in the link's own folder.
    max_bytes : int
        Largest size accepted [bytes]; a larger file is refused from its ``stat`` size,
        without being opened, and at most ``max_bytes + 1`` bytes are ever read.
    label : str, optional
        How messages name the file (default: the path).
    field : str
        The ``field`` of the :class:`~convlib.errors.InputError` raised.
    check_head : callable, optional
        Called with the first :data:`HEAD_BYTES` bytes before the rest is read; it raises to
        refuse the file (a file that is plainly not of its kind costs no more than its head).

    Raises
    ------
    InputError
        Missing, a directory, a pipe or device, a link leading out of its folder, a
        broken link, unreadable, or larger than ``max_bytes``.
    """
    label = label or str(path)
    path = _text_path(path, label, field)

    def refuse(problem, rule="a readable regular file"):
        return _refuse(label, problem, field=field, rule=rule, value=str(path))

    try:
        info = os.lstat(path)
        real = path
        if stat.S_ISLNK(info.st_mode):
            real = Path(os.path.realpath(path))
            if real.parent != Path(os.path.realpath(path.parent)):
                raise refuse("cannot read the file: it is a symbolic link leading outside its folder",
                             "a file in its own folder")
            info = os.stat(real)
    except FileNotFoundError:
        raise refuse("cannot read the file (it does not exist, or is a broken link)") from None
    except OSError as exc:
        raise refuse(f"cannot read the file ({exc.strerror or exc})") from None
    if stat.S_ISDIR(info.st_mode):
        raise refuse("cannot read the file (it is a directory)")
    if not stat.S_ISREG(info.st_mode):
        raise refuse("cannot read the file (not a regular file: a pipe, socket or device)")
    rule = f"at most {_megabytes(max_bytes)}"
    if info.st_size > max_bytes:
        raise refuse(f"file is {_megabytes(info.st_size)}, larger than the {_megabytes(max_bytes)} limit", rule)
    try:  # the real path, without following a link swapped in meanwhile, without blocking on a pipe
        fd = os.open(real, os.O_RDONLY | _O["O_NOFOLLOW"] | _O["O_NONBLOCK"] | _O["O_CLOEXEC"] | _O["O_BINARY"])
    except OSError as exc:
        raise refuse(f"cannot read the file ({exc.strerror or exc})") from None
    with os.fdopen(fd, "rb") as fh:
        opened = os.fstat(fh.fileno())
        if not stat.S_ISREG(opened.st_mode):
            raise refuse("cannot read the file (not a regular file: a pipe, socket or device)")
        if opened.st_size > max_bytes:
            raise refuse(f"file is {_megabytes(opened.st_size)}, larger than the {_megabytes(max_bytes)} limit", rule)
        try:
            data = fh.read(min(HEAD_BYTES, max_bytes + 1))
            if check_head is not None:
                check_head(data)
            # read(n) allocates n bytes at once: ask for what fstat promised (+1 to see the end), then
            # for at most the cap in small steps if the file grew meanwhile
            parts = [data, fh.read(max(0, min(opened.st_size, max_bytes) + 1 - len(data)))]
            while parts[-1] and sum(map(len, parts)) <= max_bytes:
                parts.append(fh.read(min(2**20, max_bytes + 1 - sum(map(len, parts)))))
            data = b"".join(parts)
        except OSError as exc:
            raise refuse(f"cannot read the file ({exc.strerror or exc})") from None
    if len(data) > max_bytes:  # grew while being read
        raise refuse(f"file is larger than the {_megabytes(max_bytes)} limit", rule)
    return data


# ----------------------------------------------------------------------------- JSON
class _Refused(ValueError):
    pass


def _pairs(pairs):
    seen = set()
    for key, _ in pairs:
        if key in seen:
            raise _Refused(f"duplicate key {key!r}")
        seen.add(key)
    return dict(pairs)


def _constant(name):
    raise _Refused(f"{name} is not JSON (numbers must be finite)")


def _float(text):
    value = float(text)
    if not math.isfinite(value):
        raise _Refused(f"number {text[:40]} is out of range (numbers must be finite)")
    return value


def _int(text):
    if len(text) > _MAX_DIGITS:
        raise _Refused(f"integer of {len(text)} digits is out of range (at most {_MAX_DIGITS})")
    return int(text)


def _depth_beyond(value, limit: int) -> bool:
    """Whether arrays/objects nest deeper than ``limit`` (iterative: no recursion on hostile input)."""
    stack = [(value, 1)]
    while stack:
        item, depth = stack.pop()
        if depth > limit:
            return True
        children = item.values() if isinstance(item, dict) else item
        stack.extend((child, depth + 1) for child in children if isinstance(child, (dict, list)))
    return False


def _check_start(data: bytes, label: str, field: str, top: type | None, complete: bool = True) -> None:
    """Refuse from its first characters a file that cannot hold a JSON value of type ``top``
    (``complete``: ``data`` is the whole file, not only its head)."""
    def refuse(problem, rule="a valid JSON file"):
        return _refuse(label, problem, field=field, rule=rule, value=label)

    first = _BLANKS.match(data).end()  # an index: no copy of a large file
    head = data[first:first + 1]
    if not head:
        if complete:
            raise refuse("the file is empty")
        return
    if top not in (dict, list) or head == (b"{" if top is dict else b"["):
        return
    kind = "object" if top is dict else "array"
    if head in (b"{", b"["):
        raise refuse(f"the top level is a JSON {'list' if head == b'[' else 'dict'}, not an {kind}")
    try:
        data[first:first + 4].decode("utf-8")
    except UnicodeDecodeError as exc:
        if exc.start == 0:
            raise refuse(f"not UTF-8 text (byte {first})", "UTF-8 text") from None
    raise refuse(f"not valid JSON here: the file must start with '{'{' if top is dict else '['}' (a JSON {kind}), "
                 f"not {head.decode('ascii', 'replace')!r}")


def read_json(path, max_bytes: int, *, label: str | None = None, field: str = "path", max_depth: int = MAX_DEPTH,
              top: type | None = dict) -> Any:
    """:func:`read_capped` then :func:`parse_json`; a file not starting like JSON of type ``top`` is
    refused after reading its first :data:`HEAD_BYTES` only."""
    label = label or str(path)
    data = read_capped(path, max_bytes, label=label, field=field,
                       check_head=lambda head: _check_start(head, label, field, top, complete=False))
    return parse_json(data, label=label, field=field, max_depth=max_depth, top=top)


def parse_json(data: bytes, *, label: str, field: str = "path", max_depth: int = MAX_DEPTH,
               top: type | None = dict) -> Any:
    """Strict JSON from the bytes of a file: UTF-8, no duplicate keys, finite numbers (no ``NaN``, no
    ``1e400``, integers of at most 30 digits), bounded nesting.

    ``top`` is the required type of the top level (``None``: any). Raises
    :class:`~convlib.errors.InputError` whose message starts with ``label``; a text that
    stops early is called truncated.
    """
    def refuse(problem, rule="a valid JSON file"):
        return _refuse(label, problem, field=field, rule=rule, value=label)

    _check_start(data, label, field, top)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise refuse(f"not UTF-8 text (byte {exc.start})", "UTF-8 text") from None
    try:
        value = json.loads(text, object_pairs_hook=_pairs, parse_constant=_constant, parse_float=_float,
                           parse_int=_int)
    except json.JSONDecodeError as exc:
        closer = {dict: "}", list: "]"}.get(top, "")
        hint = "; the file looks truncated (it does not end with '" + closer + "')" \
            if closer and not text[-4096:].rstrip().endswith(closer) else ""
        raise refuse(f"not valid JSON: {exc.msg} at line {exc.lineno} column {exc.colno}{hint}") from None
    except (_Refused, ValueError) as exc:
        raise refuse(f"not valid JSON: {exc}") from None
    except RecursionError:
        raise refuse(f"not valid JSON here: nested more than {max_depth} levels deep",
                     f"nesting at most {max_depth} deep") from None
    if top is not None and not isinstance(value, top):
        wanted = "an object" if top is dict else "an array"
        raise refuse(f"the top level is a JSON {type(value).__name__}, not {wanted}")
    if _depth_beyond(value, max_depth):
        raise refuse(f"not valid JSON here: nested more than {max_depth} levels deep",
                     f"nesting at most {max_depth} deep")
    return value


# ----------------------------------------------------------------------------- atomic writes
def _lock(fd: int, wait: bool) -> bool:
    if fcntl is None:
        return True
    try:
        fcntl.flock(fd, fcntl.LOCK_EX | (0 if wait else fcntl.LOCK_NB))
    except OSError:
        return False
    return True


def _same_file(path: Path, fd: int) -> bool:
    try:
        named, opened = os.lstat(path), os.fstat(fd)
    except OSError:
        return False
    return (named.st_dev, named.st_ino) == (opened.st_dev, opened.st_ino)


def remove_stale_temporaries(directory) -> int:
    """Remove temporary files of killed writers from ``directory``; returns how many were removed.

    Only regular files named ``.<name>.<random>.convlib.tmp`` are considered. On POSIX one is
    debris when nobody holds its lock (its writer is gone); elsewhere when it is older than
    :data:`STALE_AFTER_S`. Never raises for the folder's contents.
    """
    removed = 0
    try:
        with os.scandir(directory) as items:
            names = [item.name for item in items if item.name.startswith(".") and item.name.endswith(TEMP_SUFFIX)]
    except OSError:
        return 0
    for name in names:
        path = Path(directory) / name
        try:
            fd = os.open(path, os.O_RDONLY | _O["O_NOFOLLOW"] | _O["O_NONBLOCK"] | _O["O_CLOEXEC"])
        except OSError:  # gone meanwhile, a symbolic link (not ours), no permission
            continue
        try:
            info = os.fstat(fd)
            stale = fcntl is not None or time.time() - info.st_mtime > STALE_AFTER_S
            if stat.S_ISREG(info.st_mode) and stale and _lock(fd, wait=False) and _same_file(path, fd):
                os.unlink(path)
                removed += 1
        except OSError:
            pass
        finally:
            os.close(fd)
    return removed


def _temporary(directory: Path, target: str) -> tuple[int, Path]:
    """Create and lock a new temporary file for ``target`` in ``directory``."""
    for _ in range(100):
        path = directory / f".{target[:_NAME_PART]}.{secrets.token_hex(6)}{TEMP_SUFFIX}"
        fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL | _O["O_NOFOLLOW"] | _O["O_CLOEXEC"]
                     | _O["O_BINARY"], 0o600)
        _lock(fd, wait=True)
        if _same_file(path, fd):  # a cleaner may have taken it for debris before it was locked: start again
            return fd, path
        os.close(fd)
    raise FileExistsError(f"cannot create a temporary file in {directory}")  # pragma: no cover


def _sync_directory(directory: Path) -> None:
    if os.name == "posix":  # make the rename itself durable
        with contextlib.suppress(OSError):
            fd = os.open(directory, os.O_RDONLY)
            try:
                os.fsync(fd)
            finally:
                os.close(fd)


def write_atomic(path, data: bytes, *, overwrite: bool = True) -> Path:
    """Write ``data`` to ``path`` atomically; the old file or the new one exists at every instant.

    The new file keeps the permissions of the regular file it replaces (else ``0o644``). With
    ``overwrite=False`` an existing target (also one that appears meanwhile) is never replaced:
    ``FileExistsError``. A target that is a symbolic link is replaced, not written through.
    Stale temporary files of killed writers in the folder are removed first. ``OSError`` from
    the file system is raised as is, after the temporary file is removed.
    """
    path = Path(path)
    directory = path.parent
    try:
        current = os.lstat(path)
    except FileNotFoundError:
        current = None
    if current is not None and not overwrite:
        raise FileExistsError(f"{path} already exists; pass overwrite=True to replace it")
    mode = stat.S_IMODE(current.st_mode) if current is not None and stat.S_ISREG(current.st_mode) else 0o644
    remove_stale_temporaries(directory)
    fd, tmp = _temporary(directory, path.name)
    try:
        view = memoryview(data)
        while view:
            view = view[os.write(fd, view):]
        os.fsync(fd)
        if hasattr(os, "fchmod"):
            with contextlib.suppress(OSError):  # file systems without permissions
                os.fchmod(fd, mode)
        if overwrite:
            os.replace(tmp, path)
        else:
            try:  # a link fails if the target appeared meanwhile: never replaces a file we were not asked to
                os.link(tmp, path)
            except FileExistsError:
                raise FileExistsError(f"{path} already exists; pass overwrite=True to replace it") from None
            except (OSError, NotImplementedError):  # file system without hard links
                if os.path.lexists(path):
                    raise FileExistsError(f"{path} already exists; pass overwrite=True to replace it") from None
                os.replace(tmp, path)
    finally:
        with contextlib.suppress(OSError):
            os.unlink(tmp)  # after the rename only a leftover name (or nothing) is removed
        os.close(fd)
    _sync_directory(directory)
    return path
