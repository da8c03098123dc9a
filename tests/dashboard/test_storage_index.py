"""The snapshot listing's index: files are opened once, then listed from the index by ``stat`` alone."""
from __future__ import annotations

import json
import os
import shutil
import threading
from pathlib import Path

import pytest
from convlib import files as cl_files
from convlib import snapshot as cl_snapshot
from convlib.study import CaseSpec, StudySpec, run_study

from dashboard import settings, storage

INDEX = storage.INDEX_NAME


@pytest.fixture(scope="module")
def computed():
    spec = StudySpec(name="index test", case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    return spec, run_study(spec)


@pytest.fixture(scope="module")
def template(computed, tmp_path_factory):
    """One real snapshot, written once and copied into each test's directory."""
    spec, result = computed
    return cl_snapshot.save(tmp_path_factory.mktemp("template") / "t.snapshot.json", spec, result,
                            author="A. Engineer", note="template")


@pytest.fixture
def loads(monkeypatch):
    """Every path :func:`convlib.snapshot.load` is called with during the test (the real load still runs)."""
    calls = []
    real = cl_snapshot.load

    def counting(path):
        calls.append(Path(path).name)
        return real(path)

    monkeypatch.setattr(storage.cl_snapshot, "load", counting)
    return calls


def _copy(template, folder: Path, name: str, mtime_s: int | None = None) -> Path:
    path = folder / name
    shutil.copyfile(template, path)
    if mtime_s is not None:
        os.utime(path, ns=(mtime_s * 10**9, mtime_s * 10**9))
    return path


def _index(folder: Path) -> dict:
    document = json.loads((folder / INDEX).read_text(encoding="utf-8"))
    assert document["schema_version"] == storage.INDEX_SCHEMA_VERSION
    return {item["name"]: item for item in document["files"]}


def _fields(entries):
    return [(e.path, e.created_utc, e.author, e.note, e.sha256, e.problem, e.size) for e in entries]


# ----------------------------------------------------------------------------- (a) listed from the index
def test_second_listing_opens_no_file(template, tmp_path, loads):
    for i in range(3):
        _copy(template, tmp_path, f"s{i}.snapshot.json", mtime_s=1_700_000_000 + i)
    first = storage.list_snapshots(tmp_path)
    assert sorted(loads) == ["s0.snapshot.json", "s1.snapshot.json", "s2.snapshot.json"]
    assert [e.path.name for e in first] == ["s2.snapshot.json", "s1.snapshot.json", "s0.snapshot.json"]
    sha = cl_snapshot.load(template).sha256
    assert all(e.sha256 == sha and e.author == "A. Engineer" and not e.problem for e in first)
    assert first[0].size == template.stat().st_size
    assert set(_index(tmp_path)) == {"s0.snapshot.json", "s1.snapshot.json", "s2.snapshot.json"}
    loads.clear()
    index_stat = (tmp_path / INDEX).stat()
    second = storage.list_snapshots(tmp_path)
    assert loads == []
    assert _fields(second) == _fields(first)
    assert (tmp_path / INDEX).stat().st_mtime_ns == index_stat.st_mtime_ns  # nothing changed: not rewritten
    assert (tmp_path / INDEX).stat().st_ino == index_stat.st_ino


def test_the_index_never_looks_like_a_snapshot(template, tmp_path):
    _copy(template, tmp_path, "a.snapshot.json")
    storage.list_snapshots(tmp_path)
    assert (tmp_path / INDEX).is_file() and not INDEX.endswith(storage.SUFFIX) and INDEX.startswith(".")
    assert [e.path.name for e in storage.list_snapshots(tmp_path)] == ["a.snapshot.json"]
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted([INDEX, "a.snapshot.json"])  # no temp file left


def test_only_the_newest_files_up_to_the_limit_are_opened(template, tmp_path, loads):
    for i in range(4):
        _copy(template, tmp_path, f"s{i}.snapshot.json", mtime_s=1_700_000_000 + i)
    listed = storage.list_snapshots(tmp_path, limit=2)
    assert [e.path.name for e in listed] == ["s3.snapshot.json", "s2.snapshot.json"]
    assert sorted(loads) == ["s2.snapshot.json", "s3.snapshot.json"]


# ----------------------------------------------------------------------------- (b) a huge file is never read
def test_huge_file_is_listed_as_too_large_and_never_read(template, tmp_path, loads):
    huge = tmp_path / "x.snapshot.json"
    with open(huge, "wb") as fh:
        fh.truncate(100 * 2**20)  # sparse: 100 MB on paper
    _copy(template, tmp_path, "ok.snapshot.json")
    for _ in range(2):
        entries = {e.path.name: e for e in storage.list_snapshots(tmp_path)}
        assert "x.snapshot.json" not in loads
        assert "too large to open here (100 MB > 20 MB)" in entries["x.snapshot.json"].problem
        assert str(huge) in entries["x.snapshot.json"].problem
        assert entries["x.snapshot.json"].size == 100 * 2**20
        assert "cannot be read" in entries["x.snapshot.json"].label
        assert not entries["ok.snapshot.json"].problem
    assert list(_index(tmp_path)) == ["ok.snapshot.json"]  # the huge one is judged by its size every time


def test_bound_is_a_setting(template, tmp_path, loads, monkeypatch):
    _copy(template, tmp_path, "a.snapshot.json")
    monkeypatch.setattr(settings, "MAX_SNAPSHOT_BYTES", 1000)
    (entry,) = storage.list_snapshots(tmp_path)
    assert "too large to open here" in entry.problem and loads == []


# ----------------------------------------------------------------------------- (c) damaged index
@pytest.mark.parametrize("content", [
    b"{not json", b"", b"\xff\xfe\x00garbage", b"[]", b'{"kind": "convlib-snapshot-index"}',
    b'{"schema_version": 99, "kind": "convlib-snapshot-index", "files": []}',
    b'{"schema_version": 1, "kind": "something else", "files": []}',
    b'{"schema_version": 1, "kind": "convlib-snapshot-index", "files": [{"name": "a.snapshot.json", "size": "x"}]}',
    b"[" * 100_000,
])
def test_damaged_index_is_rebuilt_silently(template, tmp_path, loads, content):
    _copy(template, tmp_path, "a.snapshot.json")
    (tmp_path / INDEX).write_bytes(content)
    (entry,) = storage.list_snapshots(tmp_path)
    assert not entry.problem and entry.author == "A. Engineer"
    assert loads == ["a.snapshot.json"]
    assert list(_index(tmp_path)) == ["a.snapshot.json"]
    loads.clear()
    storage.list_snapshots(tmp_path)
    assert loads == []


def test_index_entry_with_a_forged_size_is_not_trusted(template, tmp_path, loads):
    _copy(template, tmp_path, "a.snapshot.json")
    storage.list_snapshots(tmp_path)
    document = json.loads((tmp_path / INDEX).read_text())
    document["files"][0]["size"] += 1
    document["files"][0]["author"] = "Someone Else"
    (tmp_path / INDEX).write_text(json.dumps(document))
    loads.clear()
    (entry,) = storage.list_snapshots(tmp_path)
    assert loads == ["a.snapshot.json"] and entry.author == "A. Engineer"


def test_damaged_index_with_no_snapshots_left_is_replaced(tmp_path):
    (tmp_path / INDEX).write_text("{broken")
    assert storage.list_snapshots(tmp_path) == []
    assert _index(tmp_path) == {}


@pytest.mark.skipif(os.name != "posix", reason="symbolic links and O_NOFOLLOW")
def test_index_that_is_a_symbolic_link_is_replaced_not_followed(template, tmp_path):
    folder, outside = tmp_path / "snaps", tmp_path / "outside.json"
    folder.mkdir()
    outside.write_text("precious")
    (folder / INDEX).symlink_to(outside)
    _copy(template, folder, "a.snapshot.json")
    (entry,) = storage.list_snapshots(folder)
    assert not entry.problem
    assert outside.read_text() == "precious"
    assert not (folder / INDEX).is_symlink() and list(_index(folder)) == ["a.snapshot.json"]


def test_index_that_cannot_be_written_never_breaks_the_listing(template, tmp_path, monkeypatch):
    _copy(template, tmp_path, "a.snapshot.json")
    (tmp_path / INDEX).mkdir()  # a directory where the index should be: cannot be read nor replaced
    (entry,) = storage.list_snapshots(tmp_path)
    assert not entry.problem

    def refuse(*args, **kwargs):
        raise PermissionError(13, "Permission denied")

    other = tmp_path / "other"
    other.mkdir()
    _copy(template, other, "b.snapshot.json")
    monkeypatch.setattr(cl_files, "_temporary", refuse)  # e.g. a read-only directory
    (entry,) = storage.list_snapshots(other)
    assert not entry.problem and not (other / INDEX).exists()


# ----------------------------------------------------------------------------- (d) changed files are read again
def test_changed_file_is_read_again(computed, template, tmp_path, loads):
    path = _copy(template, tmp_path, "a.snapshot.json", mtime_s=1_700_000_000)
    _copy(template, tmp_path, "b.snapshot.json", mtime_s=1_600_000_000)
    storage.list_snapshots(tmp_path)
    loads.clear()
    spec, result = computed
    cl_snapshot.save(path, spec, result, author="B. Reviewer", note="second thoughts", overwrite=True)
    os.utime(path, ns=(1_700_000_005 * 10**9, 1_700_000_005 * 10**9))
    entries = storage.list_snapshots(tmp_path)
    assert loads == ["a.snapshot.json"]
    assert (entries[0].path.name, entries[0].author, entries[0].note) == ("a.snapshot.json", "B. Reviewer",
                                                                           "second thoughts")
    assert entries[0].sha256 == cl_snapshot.load(path).sha256
    assert _index(tmp_path)["a.snapshot.json"]["author"] == "B. Reviewer"


def test_file_damaged_after_indexing_shows_its_problem(template, tmp_path, loads):
    path = _copy(template, tmp_path, "a.snapshot.json")
    storage.list_snapshots(tmp_path)
    data = path.read_bytes()
    path.write_bytes(data[: len(data) // 2])
    (entry,) = storage.list_snapshots(tmp_path)
    assert "truncated" in entry.problem and str(path) in entry.problem
    loads.clear()
    (again,) = storage.list_snapshots(tmp_path)  # the problem is remembered too: not read again
    assert loads == [] and again.problem == entry.problem


# ----------------------------------------------------------------------------- (e) deleted files drop out
def test_deleted_file_drops_out(template, tmp_path, loads):
    keep = _copy(template, tmp_path, "keep.snapshot.json")
    gone = _copy(template, tmp_path, "gone.snapshot.json")
    assert len(storage.list_snapshots(tmp_path)) == 2
    gone.unlink()
    loads.clear()
    assert [e.path for e in storage.list_snapshots(tmp_path)] == [keep]
    assert loads == [] and list(_index(tmp_path)) == ["keep.snapshot.json"]


# ----------------------------------------------------------------------------- (f) saving updates the index
def test_record_snapshot_updates_the_index(computed, template, tmp_path, loads):
    _copy(template, tmp_path, "old.snapshot.json", mtime_s=1_600_000_000)
    storage.list_snapshots(tmp_path)
    spec, result = computed
    path = cl_snapshot.save(tmp_path / "new.snapshot.json", spec, result, author="C. Saver", note="fresh")
    entry = storage.record_snapshot(tmp_path, path)
    assert entry.author == "C. Saver" and entry.sha256 == cl_snapshot.load(path).sha256
    assert set(_index(tmp_path)) == {"old.snapshot.json", "new.snapshot.json"}
    loads.clear()
    listed = storage.list_snapshots(tmp_path)
    assert loads == []
    assert [e.path.name for e in listed] == ["new.snapshot.json", "old.snapshot.json"]
    assert listed[0] == entry


def test_record_snapshot_refuses_files_elsewhere(template, tmp_path):
    folder = tmp_path / "snaps"
    folder.mkdir()
    outside = _copy(template, tmp_path, "outside.snapshot.json")
    with pytest.raises(ValueError, match="not a snapshot file .* in the snapshot directory"):
        storage.record_snapshot(folder, outside)
    assert not (folder / INDEX).exists()


def test_saving_from_the_dashboard_updates_the_index(app, loads):
    app.save_snapshot(author="D. Ashboard", note="from the app", name="saved here")
    folder = app.snapshot_dir
    path = folder / "saved_here.snapshot.json"
    assert path.is_file()
    assert _index(folder)["saved_here.snapshot.json"]["sha256"] == cl_snapshot.load(path).sha256
    assert [e.path.name for e in app.snapshots.entries] == ["saved_here.snapshot.json"]
    loads.clear()
    (entry,) = storage.list_snapshots(folder)
    assert loads == [] and entry.author == "D. Ashboard"


# ----------------------------------------------------------------------------- links, pipes, concurrency
@pytest.mark.skipif(os.name != "posix", reason="symbolic links")
def test_links_leading_outside_are_listed_but_not_followed(template, tmp_path, loads):
    folder = tmp_path / "snaps"
    folder.mkdir()
    outside = _copy(template, tmp_path, "outside.snapshot.json")
    (folder / "escape.snapshot.json").symlink_to(outside)
    (folder / "broken.snapshot.json").symlink_to(folder / "missing.snapshot.json")
    _copy(template, folder, "real.snapshot.json")
    (folder / "alias.snapshot.json").symlink_to(folder / "real.snapshot.json")
    entries = {e.path.name: e for e in storage.list_snapshots(folder)}
    assert "outside the snapshot directory" in entries["escape.snapshot.json"].problem
    assert "broken symbolic link" in entries["broken.snapshot.json"].problem
    assert not entries["alias.snapshot.json"].problem and not entries["real.snapshot.json"].problem
    assert sorted(loads) == ["alias.snapshot.json", "real.snapshot.json"]


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes")
def test_pipes_and_folders_are_not_snapshots(template, tmp_path):
    os.mkfifo(tmp_path / "pipe.snapshot.json")  # opening it would block the listing
    (tmp_path / "folder.snapshot.json").mkdir()
    _copy(template, tmp_path, "a.snapshot.json")
    assert [e.path.name for e in storage.list_snapshots(tmp_path)] == ["a.snapshot.json"]


def test_concurrent_writers_never_leave_a_torn_index(template, tmp_path):
    seen = [storage._Seen(f"s{i}.snapshot.json", 1000 + i, 1, 2) for i in range(50)]
    versions = [{s.name: storage._record(s, "2025-01-01T00:00:00Z", f"writer {w}", "n" * 2000, "0" * 64)
                 for s in seen} for w in range(2)]
    stop, states = threading.Event(), []

    def write(entries):
        for _ in range(30):
            assert storage._write_index(tmp_path, entries)

    def read():
        while not stop.is_set():
            states.append(storage._read_index(tmp_path)[1])

    reader = threading.Thread(target=read)
    writers = [threading.Thread(target=write, args=(v,)) for v in versions]
    reader.start()
    for t in writers:
        t.start()
    for t in writers:
        t.join()
    stop.set()
    reader.join()
    assert "bad" not in states
    assert storage._read_index(tmp_path)[0] in versions  # last writer wins, whole
    assert sorted(p.name for p in tmp_path.iterdir()) == [INDEX]  # no temporary file left behind
