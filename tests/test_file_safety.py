"""File safety: every file convlib reads or writes, under hostile, damaged and interrupted conditions.

Files read: snapshots (:func:`convlib.snapshot.load`), line lists (:func:`convlib.linelist.read_line_list`;
layer materials are cells of it), study files (``convlib run STUDY``; insulation and jacket materials are
fields of it) and weather-bin files (``convlib lines --bins``). Each kind gets truncated, corrupted,
wrong-typed, huge (>= 100 MB, sparse files made here), deeply nested, wrong-schema and tampered contents,
symbolic links, pipes and devices; each must raise :class:`convlib.errors.InputError` (the snapshot's
``SnapshotError`` is one) naming the file, with memory bounded by the kind's cap (``tracemalloc``), and
leave every file of the folder as it was (SHA-256 of each file before and after).

Files written: snapshots, the line-list results CSV, the dashboard's snapshot index (all through
:func:`convlib.files.write_atomic`). A save killed with SIGKILL at random moments (40 kills) or failing
at a random system call (40 faults) leaves the old file or the new one, never a mix, and the next save
leaves no temporary file behind.

Formula neutralisation follows OWASP, "CSV Injection" (https://owasp.org/www-community/attacks/CSV_Injection):
cells starting with ``=``, ``+``, ``-``, ``@``, tab or carriage return are prefixed with a single quote.
"""
import argparse
import csv
import errno
import io
import json
import os
import random
import signal
import threading
import time
import tracemalloc

import hypothesis
import pytest
from hypothesis import strategies as st

from convlib import cli, cli_study, files, linelist, snapshot
from convlib.errors import InputError
from convlib.linelist import demo_lines_path, read_line_list, run_line_list, write_results_csv
from convlib.lines import LineSpec
from convlib.study import CaseSpec, StudySpec, SweepAxis, run_study

MB = 1_000_000
posix_only = pytest.mark.skipif(os.name != "posix", reason="symbolic links, pipes, devices, fork and flock")


# ----------------------------------------------------------------------------- helpers
@pytest.fixture(scope="module")
def study():
    spec = StudySpec(name="file safety", case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1),
                     sweeps=[SweepAxis(input="wind_speed", start=0.0, stop=10.0, count=50)])
    return spec, run_study(spec)


@pytest.fixture(scope="module")
def valid(study, tmp_path_factory):
    """The bytes of one valid file of each kind (the damaged ones below are made from these)."""
    spec, result = study
    folder = tmp_path_factory.mktemp("valid")
    snap = snapshot.save(folder / "a.snapshot.json", spec, result, author="A. Engineer", note="baseline")
    return {"snapshot": snap.read_bytes(),
            "line list": demo_lines_path().read_bytes(),
            "study": spec.model_dump_json(indent=1).encode(),
            "weather": json.dumps({"air_temperature": [268.15, 283.15], "wind_speed": [4.0, 2.0],
                                   "hours": [3000, 5760]}).encode()}


LOADERS = {
    "snapshot": (snapshot.load, snapshot.MAX_BYTES),
    "line list": (read_line_list, linelist.MAX_BYTES),
    "study": (lambda p: cli_study.load_spec(argparse.Namespace(demo=False, study=str(p))), cli_study.MAX_STUDY_BYTES),
    "weather": (lambda p: cli_study.weather_bins(argparse.Namespace(bins=str(p), demo=False)), cli_study.MAX_BINS_BYTES),
}
JSON_KINDS = ("snapshot", "study", "weather")


@pytest.fixture
def refused(folder_digests):
    """``refused(kind, path, match)``: loading ``path`` as ``kind`` raises an InputError (naming the file) with
    bounded memory, and no file of the folder changed."""
    return lambda *args, **kwargs: _refused(folder_digests, *args, **kwargs)


def _refused(digests, kind, path, match=None, peak_below=10 * MB, named=True):
    load, _ = LOADERS[kind]
    before = digests(path.parent)
    tracemalloc.start()
    try:
        with pytest.raises(InputError, match=match) as err:
            load(path)
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    assert digests(path.parent) == before
    assert err.value.field and (str(path) in str(err.value) or not named)
    assert "Traceback" not in str(err.value)
    assert peak < peak_below, f"peak memory {peak / MB:.1f} MB"
    return err.value


def _write(tmp_path, kind, data: bytes, name=None):
    path = tmp_path / (name or {"snapshot": "s.snapshot.json", "line list": "lines.csv", "study": "study.json",
                                "weather": "bins.json"}[kind])
    path.write_bytes(data)
    return path


def _sparse(path, size, head=b""):
    """A file of ``size`` bytes that takes no disk space beyond ``head`` (zeros after it)."""
    with open(path, "wb") as fh:
        fh.write(head)
        fh.truncate(size)
    return path


# ----------------------------------------------------------------------------- the starting points load
@pytest.mark.parametrize("kind", LOADERS)
def test_valid_file_of_each_kind_loads(kind, valid, tmp_path):
    LOADERS[kind][0](_write(tmp_path, kind, valid[kind]))


# ----------------------------------------------------------------------------- damaged contents
def _rehashed(data: bytes, edit) -> bytes:
    document = json.loads(data)
    edit(document)
    document["sha256"] = snapshot.content_hash(document)
    return json.dumps(document).encode()


def _flip_hash(data: bytes) -> bytes:
    at = data.index(b'"sha256": "') + len(b'"sha256": "')
    return data[:at] + (b"0" if data[at:at + 1] != b"0" else b"1") + data[at + 1:]


def _nested(depth, closed=True):
    return b'{"case": ' + b"[" * depth + (b"]" * depth + b"}" if closed else b"")


DAMAGED = {
    # kind: [(case, make(valid bytes) -> bytes, message pattern)]
    "snapshot": [
        ("truncated", lambda v: v[: len(v) // 2], "truncated"),
        ("cut at one byte", lambda v: v[:1], "truncated"),
        ("corrupted byte", lambda v: v[:200] + b"\xff" + v[201:], "not UTF-8"),
        ("binary garbage", lambda v: bytes(range(256)) * 40, "not UTF-8|not valid JSON"),
        ("zeros", lambda v: b"\0" * 5000, "not valid JSON"),
        ("empty", lambda v: b"", "empty"),
        ("top level list", lambda v: b"[" + v + b"]", "top level is a JSON list"),
        ("top level string", lambda v: b'"convlib-snapshot"', "must start with"),
        ("spec a string", lambda v: _rehashed(v, lambda d: d.update(spec="steam main")), "spec"),
        ("result numbers as words", lambda v: _rehashed(
            v, lambda d: d["result"]["base"].update(q_per_length=["twelve"])), "result"),
        ("unknown field", lambda v: _rehashed(v, lambda d: d.update(extra=1)), "extra"),
        ("missing field", lambda v: _rehashed(v, lambda d: d.pop("provenance")), "provenance"),
        ("wrong kind", lambda v: _rehashed(v, lambda d: d.update(kind="convlib-study")), "not a convlib snapshot"),
        ("tampered note", lambda v: v.replace(b'"baseline"', b'"baseline!"'), "tampered"),
        ("tampered number", lambda v: v.replace(b'"count": 50', b'"count": 51', 1), "tampered"),
        ("tampered hash", lambda v: _flip_hash(v), "tampered"),
        ("duplicate key", lambda v: v.replace(b'"note": ', b'"note": "x", "note": ', 1), "duplicate key"),
        ("NaN", lambda v: v.replace(b'"author": "A. Engineer"', b'"author": NaN', 1), "NaN is not JSON"),
        ("number beyond float", lambda v: v.replace(b'"count": 50', b'"count": 1e400', 1), "out of range"),
        ("integer of 5000 digits", lambda v: v.replace(b'"count": 50', b'"count": ' + b"9" * 5000, 1),
         "out of range"),
        ("nested 100000 deep, open", lambda v: _nested(100_000, closed=False), "nested more than"),
        ("nested 200 deep", lambda v: _nested(200), "nested more than"),
    ],
    "study": [
        ("truncated", lambda v: v[: len(v) // 2], "truncated"),
        ("corrupted byte", lambda v: v[:20] + b"\xc3\x28" + v[22:], "not UTF-8"),
        ("binary garbage", lambda v: bytes(range(256)) * 40, "not UTF-8|not valid JSON"),
        ("top level list", lambda v: b"[1, 2]", "top level is a JSON list"),
        ("case a list", lambda v: b'{"case": [1, 2]}', "case"),
        ("unknown field", lambda v: v[:-1].rstrip() + b', "shell": "rm -rf /"}', "shell"),
        ("duplicate key", lambda v: b'{"name": "a", "name": "b"}', "duplicate key"),
        ("Infinity", lambda v: b'{"case": {"wind_speed": Infinity}}', "Infinity is not JSON"),
        ("integer of 5000 digits", lambda v: b'{"case": {"wind_speed": ' + b"1" * 5000 + b"}}", "out of range"),
        ("nested 100000 deep, open", lambda v: _nested(100_000, closed=False), "nested more than"),
        ("nested 200 deep", lambda v: _nested(200), "nested more than"),
    ],
    "weather": [
        ("truncated", lambda v: v[: len(v) // 2], "truncated"),
        ("corrupted byte", lambda v: v[:5] + b"\xff" + v[6:], "not UTF-8|not valid JSON"),
        ("top level list", lambda v: b"[268.15, 3000]", "top level is a JSON list"),
        ("missing hours", lambda v: b'{"air_temperature": [268.15]}', "missing hours"),
        ("air temperature a number", lambda v: b'{"air_temperature": 268.15, "hours": [10]}', "must be a list"),
        ("hours an object", lambda v: b'{"air_temperature": [268.15], "hours": {"a": 1}}', "must be a list"),
        ("no bins", lambda v: b'{"air_temperature": [], "hours": []}', "at least one bin"),
        ("lists of different lengths", lambda v: b'{"air_temperature": [268.15, 283.15], "hours": [10]}',
         "one value per bin"),
        ("a bin as an object", lambda v: b'{"air_temperature": [{"degC": -5}], "hours": [10]}', "not a temperature"),
        ("hours as words", lambda v: b'{"air_temperature": [268.15], "hours": ["many"]}', "bin hours"),
        ("too many bins", lambda v: json.dumps({"air_temperature": [280.0] * 10_001,
                                                "hours": [0.1] * 10_001}).encode(), "at most 10000"),
        ("duplicate key", lambda v: b'{"hours": [1], "hours": [2], "air_temperature": [270]}', "duplicate key"),
        ("NaN", lambda v: b'{"air_temperature": [NaN], "hours": [1]}', "NaN is not JSON"),
        ("number beyond float", lambda v: b'{"air_temperature": [-1e999], "hours": [1]}', "out of range"),
        ("nested 100000 deep, open", lambda v: _nested(100_000, closed=False), "nested more than"),
        ("nested 200 deep", lambda v: _nested(200), "nested more than"),
    ],
    "line list": [
        ("truncated in the header", lambda v: v[:30], "unknown column|header|missing"),
        ("binary garbage", lambda v: bytes(range(256)) * 40, "not UTF-8"),
        ("corrupted byte in the header", lambda v: v[:3] + b"\xfe" + v[4:], "not UTF-8"),
        ("zeros", lambda v: b"\0" * 5000, "header|column"),
        ("a JSON file", lambda v: b'{"tag": "FH-101", "length": 3}', "column"),
        ("semicolons", lambda v: v.replace(b",", b";"), "separated by ';'"),
        ("cell beyond the csv field limit", lambda v: v + b'"' + b"x" * 200_000 + b'"\n', "not readable as CSV"),
        ("too many cells", lambda v: v + b"," * (linelist.MAX_CELLS + 1), "more than"),
        ("too many rows", lambda v: v + b"\n" * (2 * linelist.MAX_ROWS + 1), "more than"),
    ],
}


@pytest.mark.parametrize("kind, case, make, match",
                         [(k, c, m, p) for k, cases in DAMAGED.items() for c, m, p in cases],
                         ids=[f"{k}: {c}" for k, cases in DAMAGED.items() for c, _, _ in cases])
def test_damaged_contents_are_refused_clearly(kind, case, make, match, valid, tmp_path, refused):
    data = make(valid[kind])
    assert data != valid[kind]
    file_level = kind != "line list" or any(word in match for word in ("UTF-8", "CSV", "more than"))
    refused(kind, _write(tmp_path, kind, data), match, peak_below=max(20 * MB, 12 * len(data)), named=file_level)


def test_truncated_line_list_row_is_reported_not_computed(valid, tmp_path):
    """A line list cut inside a row: that row is reported as an error, the rows before it computed."""
    text = valid["line list"].decode()
    second_row_end = text.index("\n", text.index("\n") + 1)
    lines, errors = read_line_list(_write(tmp_path, "line list", text[: second_row_end + 40].encode()))
    assert [p.row for p in lines] == [2] and [e.row for e in errors] == [3]


# ----------------------------------------------------------------------------- huge files
@pytest.mark.parametrize("kind", LOADERS)
def test_huge_file_is_refused_from_its_size_without_reading(kind, tmp_path, refused):
    cap = LOADERS[kind][1]
    path = _sparse(tmp_path / f"huge-{kind.replace(' ', '_')}", max(100 * MB, cap + 1), head=b"{")
    assert path.stat().st_size >= 100 * MB
    refused(kind, path, "larger than", peak_below=1 * MB)


@pytest.mark.parametrize("kind", JSON_KINDS)
def test_huge_file_that_is_not_json_is_refused_after_its_head(kind, tmp_path, monkeypatch, refused):
    """A 100 MB file of zeros within the cap: refused from its first 64 kB."""
    if kind == "snapshot":
        monkeypatch.setattr(snapshot, "MAX_BYTES", 150 * MB)
    else:
        monkeypatch.setattr(cli_study, "MAX_STUDY_BYTES" if kind == "study" else "MAX_BINS_BYTES", 150 * MB)
    path = _sparse(tmp_path / "zeros.json", 100 * MB)
    refused(kind, path, "not valid JSON|must start", peak_below=1 * MB)


def test_huge_snapshot_within_the_cap_costs_memory_bounded_by_its_size(tmp_path, refused):
    """100 MB that starts like JSON is read once and decoded once: peak below 2.5 x the file."""
    path = _sparse(tmp_path / "big.snapshot.json", 100 * MB, head=b'{"kind": "convlib-snapshot", "note": "')
    refused("snapshot", path, "not valid JSON", peak_below=250 * MB)


# ----------------------------------------------------------------------------- links, pipes, devices, names
@posix_only
@pytest.mark.parametrize("kind", LOADERS)
def test_symbolic_links_are_followed_only_within_their_folder(kind, valid, tmp_path, refused):
    folder = tmp_path / "folder"
    folder.mkdir()
    outside = _write(tmp_path, kind, valid[kind], name="outside")
    _write(folder, kind, valid[kind], name="inside")
    (folder / "alias").symlink_to(folder / "inside")
    LOADERS[kind][0](folder / "alias")  # a link to a file beside it is fine
    (folder / "escape").symlink_to(outside)
    refused(kind, folder / "escape", "symbolic link leading outside")
    (folder / "relative-escape").symlink_to("../outside")
    refused(kind, folder / "relative-escape", "symbolic link leading outside")
    (folder / "device").symlink_to("/dev/zero")
    refused(kind, folder / "device", "symbolic link leading outside")
    (folder / "broken").symlink_to(folder / "missing")
    refused(kind, folder / "broken", "does not exist")


@posix_only
@pytest.mark.parametrize("kind", LOADERS)
def test_pipes_devices_and_folders_are_refused_without_blocking(kind, tmp_path, refused):
    os.mkfifo(tmp_path / "pipe")
    (tmp_path / "sub").mkdir()
    outcome = []

    def load_pipe():
        try:
            LOADERS[kind][0](tmp_path / "pipe")
        except InputError as exc:
            outcome.append(exc)

    reader = threading.Thread(target=load_pipe, daemon=True)
    reader.start()
    reader.join(60)
    if reader.is_alive():  # it blocked: open the other end so the thread ends, then fail
        os.close(os.open(tmp_path / "pipe", os.O_WRONLY | os.O_NONBLOCK))
        pytest.fail("opening a named pipe blocked")
    assert outcome and "not a regular file" in str(outcome[0])
    refused(kind, tmp_path / "sub", "is a directory")
    with pytest.raises(InputError, match="not a regular file"):
        LOADERS[kind][0]("/dev/zero")


@pytest.mark.parametrize("kind", LOADERS)
def test_odd_names_load_and_bad_names_are_refused(kind, valid, tmp_path, refused):
    odd = _write(tmp_path, kind, valid[kind], name="Ünïcode \u202eevil\u200b 東京 ..-name")
    LOADERS[kind][0](odd)
    with pytest.raises(InputError, match="not a usable file name"):
        LOADERS[kind][0](str(tmp_path / "a\0b"))
    refused(kind, tmp_path / "no such file", "does not exist")


# ----------------------------------------------------------------------------- saving
def _only(folder):
    return sorted(p.name for p in folder.iterdir())


def test_failed_saves_change_nothing(study, tmp_path, folder_digests):
    spec, result = study
    folder = tmp_path / "snaps"
    folder.mkdir()
    target = snapshot.save(folder / "a.snapshot.json", spec, result, note="old")
    before = folder_digests(tmp_path)
    with pytest.raises(FileExistsError):
        snapshot.save(target, spec, result, note="new")
    with pytest.raises(InputError, match="not a usable file name"):
        snapshot.save(str(folder / "b\0.snapshot.json"), spec, result)
    with pytest.raises(InputError, match="author"):
        snapshot.save(target, spec, result, author=["not", "text"], overwrite=True)
    with pytest.raises(InputError, match="result does not belong"):
        snapshot.save(target, StudySpec(case=spec.case), result, overwrite=True)
    with pytest.raises(FileNotFoundError):
        snapshot.save(folder / "missing" / "c.snapshot.json", spec, result)
    assert folder_digests(tmp_path) == before


@posix_only
def test_saving_onto_a_link_never_writes_outside_the_folder(study, tmp_path, folder_digests):
    spec, result = study
    folder, outside = tmp_path / "snaps", tmp_path / "precious.txt"
    folder.mkdir()
    outside.write_text("precious")
    (folder / "a.snapshot.json").symlink_to(outside)
    (folder / "b.snapshot.json").symlink_to(tmp_path / "nowhere")
    before = folder_digests(tmp_path)
    for name in ("a.snapshot.json", "b.snapshot.json"):
        with pytest.raises(FileExistsError):
            snapshot.save(folder / name, spec, result)
    assert folder_digests(tmp_path) == before
    snapshot.save(folder / "a.snapshot.json", spec, result, note="replaces the link", overwrite=True)
    assert outside.read_text() == "precious" and not (tmp_path / "nowhere").exists()
    assert not (folder / "a.snapshot.json").is_symlink()
    assert snapshot.load(folder / "a.snapshot.json").note == "replaces the link"
    assert _only(folder) == ["a.snapshot.json", "b.snapshot.json"]


def _notes(path):
    return snapshot.load(path).note


@pytest.mark.parametrize("overwrite", [True, False])
def test_save_failing_at_any_system_call_leaves_old_or_new_file(study, tmp_path, monkeypatch, overwrite):
    """40 saves, each failing at a random one of its file-system calls (disk full, I/O error)."""
    spec, result = study
    rng = random.Random(14)
    calls = ("open", "write", "fsync", "fchmod", "replace", "link", "unlink")
    real = {name: getattr(os, name) for name in calls}
    target = tmp_path / "a.snapshot.json"
    outcomes = set()
    for trial in range(40):
        if overwrite and not target.exists():
            snapshot.save(target, spec, result, note="old")
        elif not overwrite and target.exists():
            target.unlink()
        old = _notes(target) if target.exists() else None
        counter, fail_at = [0], rng.randrange(12)

        def faulty(name):
            def call(*args, **kwargs):
                counter[0] += 1
                if counter[0] == fail_at + 1:
                    raise OSError(rng.choice([errno.ENOSPC, errno.EIO]), f"injected fault in os.{name}")
                return real[name](*args, **kwargs)
            return call

        for name in calls:
            monkeypatch.setattr(files.os, name, faulty(name))
        try:
            snapshot.save(target, spec, result, note=f"new {trial}", overwrite=overwrite)
            raised = None
        except OSError as exc:
            raised = exc
        finally:
            monkeypatch.undo()
        now = _notes(target) if target.exists() else None  # load raises on a broken file
        assert now in (old, f"new {trial}"), (trial, fail_at, raised)
        assert raised is None or "injected fault" in str(raised)
        outcomes.add((raised is None, now == old))
        # no temporary file survives the next save
        snapshot.save(tmp_path / "other.snapshot.json", spec, result, overwrite=True)
        assert not [n for n in _only(tmp_path) if n.endswith(files.TEMP_SUFFIX)], trial
        assert set(_only(tmp_path)) <= {"a.snapshot.json", "other.snapshot.json"}
    assert (False, True) in outcomes and (True, False) in outcomes  # faults hit, and saves went through


@posix_only
def test_save_killed_at_random_moments_leaves_old_or_new_file(study, tmp_path):
    """40 child processes save in a loop and are killed with SIGKILL after a random delay.

    The children's ``fsync`` takes 20 ms more (a slow disk), so that kills land inside the write as
    well as before and after it; the test checks that both happened.
    """
    spec, result = study
    target = tmp_path / "a.snapshot.json"
    snapshot.save(target, spec, result, note="original")
    rng = random.Random(2026)
    notes, debris_seen, saved_seen = {"original"}, 0, 0
    for kill in range(40):
        note = f"child {kill}"
        notes.add(note)
        pid = os.fork()
        if pid == 0:  # child: save again and again until killed
            try:
                fsync = os.fsync
                os.fsync = lambda fd: (time.sleep(0.02), fsync(fd))[1]
                while True:
                    snapshot.save(target, spec, result, note=note, overwrite=True)
            finally:
                os._exit(1)
        time.sleep(rng.uniform(0.0, 0.5))
        os.kill(pid, signal.SIGKILL)
        _, status = os.waitpid(pid, 0)
        assert os.WIFSIGNALED(status) and os.WTERMSIG(status) == signal.SIGKILL  # it was still saving
        now = _notes(target)  # loads (valid, hash checked)
        assert now in notes  # the old file or a new one
        saved_seen += now == note
        names = _only(tmp_path)
        debris_seen += any(n.endswith(files.TEMP_SUFFIX) for n in names)
        assert all(n == "a.snapshot.json" or n.endswith(files.TEMP_SUFFIX) for n in names)
    assert debris_seen > 0 and saved_seen > 0  # kills landed inside writes, and between completed saves
    snapshot.save(target, spec, result, note="after the kills", overwrite=True)
    assert _only(tmp_path) == ["a.snapshot.json"] and _notes(target) == "after the kills"


@posix_only
def test_live_temporary_file_of_another_writer_is_left_alone(tmp_path):
    fd, tmp = files._temporary(tmp_path, "a.json")  # held (locked) as by a writer in another process
    try:
        files.write_atomic(tmp_path / "a.json", b"{}")
        assert tmp.exists()
    finally:
        os.close(fd)
    files.write_atomic(tmp_path / "a.json", b"{}")
    assert _only(tmp_path) == ["a.json"]


@posix_only
def test_cleanup_removes_only_convlib_temporaries(tmp_path):
    keep = [".notes.tmp", "a.convlib.tmp", ".x.123.tmp"]
    for name in keep:
        (tmp_path / name).write_text("user data")
    (tmp_path / ".link.convlib.tmp").symlink_to(tmp_path / "a.convlib.tmp")
    (tmp_path / ".dir.convlib.tmp").mkdir()
    (tmp_path / ".dead.abc.convlib.tmp").write_text("left by a killed writer")
    assert files.remove_stale_temporaries(tmp_path) == 1
    assert _only(tmp_path) == sorted([*keep, ".link.convlib.tmp", ".dir.convlib.tmp"])


# ----------------------------------------------------------------------------- CSV formulas
DANGEROUS = ("=HYPERLINK(A1)", "+1+1", "-2+3+cmd|' /C calc'!A0", "@SUM(A1:A9)", "\tTAB-1", "\rCR-1")
PREFIXES = ("=", "+", "-", "@", "\t", "\r")


def _written(result, path):
    write_results_csv(result, path)
    with open(path, encoding="utf-8", newline="") as fh:  # newline="": a CR inside a cell stays a CR
        rows = list(csv.reader(fh))
    return rows[0], rows[1:]


def test_written_csv_neutralises_formulas_and_keeps_negative_numbers(tmp_path):
    lines = [LineSpec(tag=tag, pipe_outer_diameter=0.1143, length=10.0, fluid_temperature=t, air_temperature=298.15,
                      layers=[{"thickness": 0.05, "conductivity": 0.04}])
             for tag, t in zip(DANGEROUS, (423.15, 278.15, 253.15, 423.15, 423.15, 423.15))]
    columns, rows = _written(run_line_list(lines), tmp_path / "out.csv")
    numeric = {i for i, name in enumerate(columns) if name not in ("row", "tag", "status", "notes")}
    negative_numbers = 0
    for line in rows:
        for i, cell in enumerate(line):
            if cell.startswith(PREFIXES):
                assert i in numeric, (columns[i], cell)
                float(cell)  # a number, not a formula
                negative_numbers += 1
    assert negative_numbers > 0  # the cold lines' heat gains are negative numbers, left as numbers
    assert [line[1] for line in rows[:-1]] == ["'" + t for t in DANGEROUS]


def test_written_csv_neutralises_formulas_in_error_rows(tmp_path):
    text = ("tag,outer_diameter[mm],length[m],fluid_temperature[degC],air_temperature[degC]\n"
            "=1+1,=2+2,10,150,25\n@A1,114.3,-5,150,25\n")
    result = run_line_list(io.StringIO(text))
    assert len(result.errors) == 2
    _, rows = _written(result, tmp_path / "out.csv")
    assert [line[1] for line in rows[:-1]] == ["'=1+1", "'@A1"]
    assert all(not cell.startswith(PREFIXES) or float(cell) < 0 for line in rows for cell in line)


# ----------------------------------------------------------------------------- the command line
def test_command_line_reports_hostile_files_in_one_line(tmp_path, capsys):
    """`convlib run`, `lines --bins` and `verify` on a huge, a nested and a piped file: one line, exit 2."""
    huge = _sparse(tmp_path / "huge.json", 100 * MB, head=b"{")
    nested = _write(tmp_path, "weather", _nested(100_000, closed=False))
    commands = [["run", str(huge)], ["lines", "--demo", "--bins", str(nested)], ["verify", str(huge)]]
    if hasattr(os, "mkfifo"):
        os.mkfifo(tmp_path / "pipe.json")
        commands.append(["run", str(tmp_path / "pipe.json")])
    for argv in commands:
        assert cli.main(argv) == 2, argv
        err = capsys.readouterr().err
        assert err.startswith("convlib: error: ") and err.count("\n") == 1 and "Traceback" not in err, err
        words = ("larger than", "nested more than", "not a regular file", "not valid JSON")
        assert any(word in err for word in words), err


@posix_only
def test_results_csv_and_report_replace_a_link_instead_of_writing_through_it(study, tmp_path):
    """`convlib lines -o` and `convlib report -o` onto a link to a file elsewhere leave that file alone."""
    folder, outside = tmp_path / "out", tmp_path / "precious.txt"
    folder.mkdir()
    outside.write_text("precious")
    (folder / "results.csv").symlink_to(outside)
    (folder / "report.html").symlink_to(outside)
    spec, result = study
    snap = snapshot.save(folder / "a.snapshot.json", spec, result)
    write_results_csv(run_line_list(demo_lines_path()), folder / "results.csv")
    assert cli.main(["report", str(snap), "-o", str(folder / "report.html"), "--overwrite"]) == 0
    assert outside.read_text() == "precious"
    assert not any(p.is_symlink() for p in folder.iterdir())
    assert (folder / "results.csv").read_text(encoding="utf-8").startswith("row,tag,status")
    assert "<html" in (folder / "report.html").read_text(encoding="utf-8").lower()
    assert _only(folder) == ["a.snapshot.json", "report.html", "results.csv"]


# ----------------------------------------------------------------------------- random damage
@pytest.mark.parametrize("kind", LOADERS)
@hypothesis.settings(max_examples=100, deadline=None, suppress_health_check=[hypothesis.HealthCheck.too_slow])
@hypothesis.given(edits=st.lists(st.tuples(st.floats(0, 1), st.integers(0, 16), st.binary(max_size=8)),
                                 min_size=1, max_size=4),
                  cut=st.one_of(st.none(), st.floats(0, 1)))
def test_randomly_damaged_files_load_or_raise_input_error(kind, valid, tmp_path_factory, edits, cut):
    """Random byte replacements and truncations: the loader returns or raises InputError, nothing else."""
    data = bytearray(valid[kind])
    for where, length, replacement in edits:
        at = int(where * len(data))
        data[at:at + length] = replacement
    if cut is not None:
        data = data[: int(cut * len(data))]
    path = tmp_path_factory.mktemp("damaged") / "file"
    path.write_bytes(bytes(data))
    try:
        LOADERS[kind][0](path)
    except InputError:
        pass
