"""Snapshot folder of the dashboard under hostile names and damaged files: nothing outside it is written,
no snapshot in it changes, and debris of killed index writes is removed (see also tests/test_file_safety.py)."""
from __future__ import annotations

import os
import re
import shutil

import pytest
from convlib import files as cl_files
from convlib import snapshot as cl_snapshot
from convlib.errors import InputError
from convlib.study import CaseSpec, StudySpec, run_study
from hypothesis import given, settings
from hypothesis import strategies as st

from dashboard import storage

NAME = re.compile(r"[A-Za-z0-9.-][A-Za-z0-9._-]*\.snapshot\.json")


@pytest.fixture(scope="module")
def template(tmp_path_factory):
    spec = StudySpec(name="storage safety", case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    return cl_snapshot.save(tmp_path_factory.mktemp("template") / "t.snapshot.json", spec, run_study(spec),
                            author="A. Engineer", note="template")


def _inside(root, name):
    """snapshot_path(root, name): a plain file name directly in root, or InputError naming the field."""
    try:
        path = storage.snapshot_path(root, name)
    except InputError as exc:
        assert exc.field == "name" and "not allowed" in str(exc) or "must be text" in str(exc)
        return None
    assert path.parent == root.resolve() and NAME.fullmatch(path.name), path
    assert len(path.name) <= storage.MAX_NAME + len(storage.SUFFIX)
    return path


HOSTILE = ["../../etc/passwd", "..", ".", "", "   ", "/", "/etc/passwd", "a/b", "a\\b", "..\\..\\win.ini",
           "\u2024\u2024/x", "\uff0e\uff0e\uff0fx", "a\0b", "\u202eexe.json", "x" * 5000, "\U0001F600",
           "CON", ".hidden", "-rf", "name.snapshot.json.snapshot.json", "café au lait", "\r\n\t", "a\u2215b",
           "%2e%2e%2fetc", "~/x", "$HOME", "`id`", "a;b|c&d"]


@pytest.mark.parametrize("name", HOSTILE, ids=range(len(HOSTILE)))
def test_hostile_names_stay_in_the_folder_or_are_refused(name, tmp_path):
    _inside(tmp_path, name)


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=300))
def test_any_text_as_a_name_stays_in_the_folder_or_is_refused(tmp_path_factory, name):
    _inside(tmp_path_factory.getbasetemp(), name)


def test_name_that_is_not_text_is_refused(tmp_path):
    with pytest.raises(InputError, match="must be text"):
        storage.snapshot_path(tmp_path, ["a"])


@pytest.mark.skipif(os.name != "posix", reason="symbolic links")
def test_name_of_a_link_leading_outside_is_refused(tmp_path):
    folder = tmp_path / "snaps"
    folder.mkdir()
    (tmp_path / "precious.txt").write_text("precious")
    (folder / "run.snapshot.json").symlink_to(tmp_path / "precious.txt")
    with pytest.raises(InputError, match="leaves the snapshot directory"):
        storage.snapshot_path(folder, "run")


@pytest.mark.skipif(os.name != "posix", reason="symbolic links and pipes")
def test_listing_damaged_folder_changes_no_snapshot_and_writes_only_its_index(template, tmp_path, folder_digests):
    folder = tmp_path / "snaps"
    folder.mkdir()
    outside = tmp_path / "outside.snapshot.json"
    shutil.copyfile(template, outside)
    shutil.copyfile(template, folder / "good.snapshot.json")
    data = template.read_bytes()
    (folder / "truncated.snapshot.json").write_bytes(data[: len(data) // 2])
    (folder / "tampered.snapshot.json").write_bytes(data.replace(b'"template"', b'"edited"'))
    (folder / "nested.snapshot.json").write_bytes(b'{"a": ' + b"[" * 100_000)
    with open(folder / "huge.snapshot.json", "wb") as fh:
        fh.truncate(150_000_000)  # sparse
    (folder / "escape.snapshot.json").symlink_to(outside)
    os.mkfifo(folder / "pipe.snapshot.json")
    before = folder_digests(tmp_path)
    entries = {e.path.name: e for e in storage.list_snapshots(folder)}
    after = folder_digests(tmp_path)
    index = str(folder / storage.INDEX_NAME)
    assert set(after) - set(before) == {index}
    assert {k: v for k, v in after.items() if k != index} == before
    assert not entries["good.snapshot.json"].problem
    for name, words in [("truncated", "truncated"), ("tampered", "tampered"), ("nested", "nested more than"),
                        ("huge", "too large"), ("escape", "outside the snapshot directory")]:
        assert words in entries[f"{name}.snapshot.json"].problem, name
    assert "pipe.snapshot.json" not in entries


@pytest.mark.skipif(os.name != "posix", reason="file locks")
def test_debris_of_killed_index_writes_is_removed_by_the_next_write(template, tmp_path):
    shutil.copyfile(template, tmp_path / "a.snapshot.json")
    debris = tmp_path / f".{storage.INDEX_NAME}.0123456789ab{cl_files.TEMP_SUFFIX}"
    debris.write_text('{"half written')  # left by a kernel killed while writing the index
    live_fd, live = cl_files._temporary(tmp_path, storage.INDEX_NAME)  # another kernel writing now
    try:
        storage.record_snapshot(tmp_path, tmp_path / "a.snapshot.json")
        assert not debris.exists() and live.exists()
    finally:
        os.close(live_fd)
    (tmp_path / "a.snapshot.json").touch()  # changed: the listing rewrites the index
    storage.list_snapshots(tmp_path)
    assert sorted(p.name for p in tmp_path.iterdir()) == [storage.INDEX_NAME, "a.snapshot.json"]
