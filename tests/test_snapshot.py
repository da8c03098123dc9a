"""convlib.snapshot: file format, hash, atomic writes, clear load errors, verify and diff.

The hash is recomputed here independently from the documented rule (SHA-256, FIPS
180-4, of the canonical JSON: sorted keys, no whitespace, ensure_ascii=False, floats
as Python repr, every field but ``sha256``), so a test that edits a file and
rehashes it does not rely on the code under test. Standard errors of sample
quantiles are checked against the asymptotic law sqrt(p(1-p)/n)/f(x_p) (H. Cramer,
Mathematical Methods of Statistics, 1946, sec. 28.5) for a normal distribution.
"""
import datetime as dt
import hashlib
import json
import math
import os
import re

import numpy as np
import pytest

from convlib import snapshot
from convlib.snapshot import SnapshotError
from convlib.study import (CaseSpec, Distribution, MapSpec, StudyResult, StudySpec, SweepAxis, TornadoInput,
                           UncertaintySpec, run_study)


def _spec(wind_speed=2.0, sweep_count=5):
    return StudySpec(
        name="snapshot test", case=CaseSpec(kind="insulated", diameter=0.1143, fluid_temperature=423.15,
                                            wind_speed=wind_speed),
        sweeps=[SweepAxis(input="wind_speed", start=0.0, stop=10.0, count=sweep_count)],
        maps=[MapSpec(x=SweepAxis(input="wind_speed", start=0.0, stop=10.0, count=3),
                      y=SweepAxis(input="insulation_thickness", start=0.01, stop=0.1, count=3))],
        tornado=[TornadoInput(input="emissivity", low=0.05, high=0.9),
                 TornadoInput(input="wind_speed", low=0.0, high=8.0)],
        uncertainty=UncertaintySpec(samples=2000, distributions=[
            Distribution(input="wind_speed", kind="uniform", low=0.0, high=6.0)]))


@pytest.fixture(scope="module")
def study():
    spec = _spec()
    return spec, run_study(spec)


@pytest.fixture
def saved(study, tmp_path):
    spec, result = study
    return snapshot.save(tmp_path / "line.snapshot.json", spec, result, author="A. Reviewer", note="désign note")


def _hash(document):
    """Independent implementation of the documented hash rule."""
    body = {k: v for k, v in document.items() if k != "sha256"}
    text = json.dumps(body, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def _rewrite(path, edit, rehash=True, indent=None):
    """Edit a snapshot's JSON document and write it back, consistently rehashed unless ``rehash=False``."""
    document = json.loads(path.read_text(encoding="utf-8"))
    edit(document)
    if rehash:
        document["sha256"] = _hash(document)
    path.write_text(json.dumps(document, indent=indent, ensure_ascii=False), encoding="utf-8")


def _state(folder):
    """Names, bytes and modification times of every file in a folder."""
    return {p.name: (p.read_bytes(), p.stat().st_mtime_ns) for p in folder.iterdir()}


# ----------------------------------------------------------------------------- format, round trip, hash
def test_round_trip_gives_identical_models(study, saved):
    spec, result = study
    snap = snapshot.load(saved)
    assert snap.spec == spec and snap.result == result
    assert (snap.author, snap.note, snap.path) == ("A. Reviewer", "désign note", saved)
    assert snap.provenance == snapshot.current_provenance()


def test_file_fields_and_hash_follow_the_documented_format(saved):
    document = json.loads(saved.read_text(encoding="utf-8"))
    assert set(document) == {"schema_version", "kind", "created_utc", "author", "note", "provenance", "spec",
                             "result", "sha256"}
    assert (document["schema_version"], document["kind"]) == (1, "convlib-snapshot")
    assert re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ", document["created_utc"])
    dt.datetime.strptime(document["created_utc"], "%Y-%m-%dT%H:%M:%SZ")
    assert set(document["provenance"]) == {"convlib", "coolprop", "numpy", "scipy", "pydantic", "python",
                                           "platform"}
    assert document["provenance"]["numpy"] == np.__version__
    assert document["sha256"] == _hash(document) == snapshot.load(saved).sha256


def test_canonical_json_rule():
    # expected text written by hand from the rule: sorted keys, no spaces, UTF-8 kept, repr floats
    assert snapshot.canonical_json({"z": 1e-05, "a": {"y": [0.1, 2, None], "x": "Ø"}}) == \
        '{"a":{"x":"Ø","y":[0.1,2,null]},"z":1e-05}'
    with pytest.raises(ValueError):
        snapshot.canonical_json({"a": math.nan})


def test_reformatting_the_file_keeps_it_valid(saved):
    sha = snapshot.load(saved).sha256
    _rewrite(saved, lambda d: None, rehash=False, indent=7)
    assert snapshot.load(saved).sha256 == sha


@pytest.mark.parametrize("where", [
    ("result", "base", "q_per_length", 0), ("result", "dew_point"), ("result", "monte_carlo", "mean"),
    ("result", "maps", 0, "q_per_length", 1, 2), ("spec", "case", "wind_speed"), ("author",)])
def test_hash_changes_with_one_ulp_or_one_character(saved, where):
    document = json.loads(saved.read_text(encoding="utf-8"))
    before = snapshot.content_hash(document)
    *parents, last = where
    holder = document
    for key in parents:
        holder = holder[key]
    value = holder[last]
    holder[last] = value + "." if isinstance(value, str) else float(np.nextafter(value, math.inf))
    assert holder[last] != value
    assert snapshot.content_hash(document) != before


# ----------------------------------------------------------------------------- load errors
def test_tampered_number_is_refused_and_file_untouched(saved):
    text = saved.read_text(encoding="utf-8")
    dew = json.loads(text)["result"]["dew_point"]
    edited = text.replace(f'"dew_point": {dew!r}', f'"dew_point": {float(np.nextafter(dew, 0.0))!r}')
    assert edited != text
    saved.write_text(edited, encoding="utf-8")
    before = _state(saved.parent)
    with pytest.raises(SnapshotError, match=r"tampered or corrupted: stored hash [0-9a-f]{64}, computed") as err:
        snapshot.load(saved)
    assert str(saved) in str(err.value)
    assert _state(saved.parent) == before


def test_truncated_file(saved):
    data = saved.read_bytes()
    saved.write_bytes(data[:len(data) // 2])
    before = _state(saved.parent)
    with pytest.raises(SnapshotError, match="truncated") as err:
        snapshot.load(saved)
    assert str(saved) in str(err.value)
    assert _state(saved.parent) == before


@pytest.mark.parametrize("content, message", [
    (b"this is not JSON", "not valid JSON"),
    (b"\xff\xfe\x00garbage", "not UTF-8"),
    (b"[1, 2, 3]", "top level is a JSON list"),
    (b'{"kind": "something-else"}', "not a convlib snapshot: kind is 'something-else'"),
    (b'{"schema_version": 1, "case": {}}', "looks like a study spec"),
    (b'{"kind": "convlib-snapshot", "kind": "convlib-snapshot"}', "duplicate key 'kind'"),
    (b'{"kind": "convlib-snapshot", "x": NaN}', "NaN is not JSON"),
])
def test_not_a_snapshot(tmp_path, content, message):
    path = tmp_path / "bad.json"
    path.write_bytes(content)
    with pytest.raises(SnapshotError, match=re.escape(message)) as err:
        snapshot.load(path)
    assert str(err.value).startswith(str(path))
    assert path.read_bytes() == content


@pytest.mark.parametrize("edit, message", [
    (lambda d: d.update(schema_version=2), "written by a newer convlib (snapshot schema_version 2"),
    (lambda d: d.pop("spec"), "spec: Field required"),
    (lambda d: d.update(schema_version="1"), "schema_version: Input should be a valid integer"),
    (lambda d: d.update(created_utc="yesterday"), "created_utc:"),
    (lambda d: d["provenance"].pop("coolprop"), "provenance.coolprop: Field required"),
    (lambda d: d["spec"]["case"].update(wind_speed=100.0), "spec.case.wind_speed: Input should be less than"),
    (lambda d: d["spec"]["sweeps"][0].update(count="many"), "spec.sweeps[0].count:"),
    (lambda d: d["result"]["base"].pop("q_per_length"), "result.base.q_per_length: Field required"),
])
def test_invalid_fields_are_named(saved, edit, message):
    _rewrite(saved, edit)
    with pytest.raises(SnapshotError, match=re.escape(message)):
        snapshot.load(saved)


def test_newer_schema_reported_before_hash(saved):
    _rewrite(saved, lambda d: d.update(schema_version=9, future_field=[1]), rehash=False)
    with pytest.raises(SnapshotError, match="newer convlib"):
        snapshot.load(saved)


def test_missing_and_oversized_files(saved, monkeypatch):
    with pytest.raises(SnapshotError, match="cannot read"):
        snapshot.load(saved.parent / "nowhere.json")
    with pytest.raises(SnapshotError, match="cannot read"):
        snapshot.load(saved.parent)
    monkeypatch.setattr(snapshot, "MAX_BYTES", 1000)
    with pytest.raises(SnapshotError, match="larger than"):
        snapshot.load(saved)


# ----------------------------------------------------------------------------- save
def test_save_refuses_to_overwrite(study, saved):
    spec, result = study
    before = _state(saved.parent)
    with pytest.raises(FileExistsError, match="overwrite=True"):
        snapshot.save(saved, spec, result, author="someone else")
    assert _state(saved.parent) == before
    snapshot.save(saved, spec, result, author="someone else", overwrite=True)
    assert snapshot.load(saved).author == "someone else"
    assert [p.name for p in saved.parent.iterdir()] == [saved.name]


def test_file_created_meanwhile_is_not_replaced(study, tmp_path, monkeypatch):
    spec, result = study
    path = tmp_path / "race.json"
    pretty = snapshot._pretty

    def meanwhile(*args, **kwargs):  # another process creates the file while this one serializes
        path.write_text("theirs")
        return pretty(*args, **kwargs)
    monkeypatch.setattr(snapshot, "_pretty", meanwhile)
    with pytest.raises(FileExistsError, match="overwrite=True"):
        snapshot.save(path, spec, result)
    assert path.read_text() == "theirs" and [p.name for p in tmp_path.iterdir()] == ["race.json"]


def test_atomic_write_leaves_no_temporary_files(study, tmp_path):
    spec, result = study
    for name in ("a.json", "b.json"):
        snapshot.save(tmp_path / name, spec, result)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.json", "b.json"]


def test_failed_serialization_leaves_target_untouched(study, saved, monkeypatch):
    spec, result = study
    before = _state(saved.parent)

    def boom(*args, **kwargs):
        raise RuntimeError("disk full while serializing")
    monkeypatch.setattr(json, "dumps", boom)
    with pytest.raises(RuntimeError):
        snapshot.save(saved, spec, result, overwrite=True)
    monkeypatch.undo()
    assert _state(saved.parent) == before


def test_failed_rename_leaves_target_untouched(study, saved, monkeypatch):
    spec, result = study
    before = _state(saved.parent)

    def refuse(*args):
        raise PermissionError("rename refused")
    monkeypatch.setattr(os, "replace", refuse)
    with pytest.raises(PermissionError):
        snapshot.save(saved, spec, result, overwrite=True)
    monkeypatch.undo()
    assert _state(saved.parent) == before


def test_file_system_without_hard_links(study, tmp_path, monkeypatch):
    spec, result = study

    def no_links(*args):
        raise OSError("hard links not supported")
    monkeypatch.setattr(os, "link", no_links)
    path = snapshot.save(tmp_path / "s.json", spec, result)
    assert snapshot.load(path).result == result
    assert [p.name for p in tmp_path.iterdir()] == ["s.json"]


def test_save_rejects_bad_input(study, tmp_path, monkeypatch):
    spec, result = study
    with pytest.raises(TypeError, match="result must be a StudyResult"):
        snapshot.save(tmp_path / "x.json", spec, result.model_dump())
    with pytest.raises(ValueError, match="author must be text"):
        snapshot.save(tmp_path / "x.json", spec, result, author="x" * 201)
    with pytest.raises(FileNotFoundError, match="does not exist"):
        snapshot.save(tmp_path / "missing" / "x.json", spec, result)
    with pytest.raises(ValueError, match="result does not belong to spec"):
        snapshot.save(tmp_path / "x.json", _spec(sweep_count=7), result)
    monkeypatch.setattr(snapshot, "MAX_BYTES", 1000)
    with pytest.raises(ValueError, match="above the 0.001 MB that load"):
        snapshot.save(tmp_path / "x.json", spec, result)
    monkeypatch.undo()
    data = result.model_dump()
    data["base"]["q_per_length"][0] = math.nan
    with pytest.raises(ValueError, match=re.escape("result.base.q_per_length[0] = nan")):
        snapshot.save(tmp_path / "x.json", spec, StudyResult.model_validate(data))
    assert list(tmp_path.iterdir()) == []


# ----------------------------------------------------------------------------- verify
def test_verify_agrees_on_unchanged_library(saved):
    before = _state(saved.parent)
    report = snapshot.verify(saved)
    assert report.agrees and all(q.within for q in report.quantities)
    names = {q.name: q.kind for q in report.quantities}
    for name in ("base", "base_methods", "base_spreads", "dew_point", "sweeps[0] (wind_speed)",
                 "maps[0] (wind_speed x insulation_thickness)", "tornado"):
        assert names[name] == "deterministic"
    for name in ("monte_carlo.mean", "monte_carlo.p5", "monte_carlo.p50", "monte_carlo.p95"):
        assert names[name] == "statistical"
    assert "AGREES" in report.text() and "unchanged" in report.text()
    assert _state(saved.parent) == before
    assert snapshot.verify(snapshot.load(saved)).agrees


@pytest.mark.parametrize("factor, agrees", [(1 + 1e-6, False), (1 + 1e-12, True)])
def test_verify_deterministic_tolerance(saved, factor, agrees):
    def perturb(d):
        d["result"]["sweeps"][0]["default"]["q_per_length"][2] *= factor
    _rewrite(saved, perturb)
    report = snapshot.verify(saved)
    assert report.agrees is agrees
    row = next(q for q in report.quantities if q.name == "sweeps[0] (wind_speed)")
    assert row.within is agrees and row.tolerance == 1e-9
    assert row.difference == pytest.approx((factor - 1) / factor, rel=1e-3)
    assert [q.name for q in report.quantities if not q.within] == ([] if agrees else [row.name])
    if not agrees:
        assert re.search(r"sweeps\[0\] \(wind_speed\).*NO", report.text())


def test_verify_reports_structure_changes(saved):
    _rewrite(saved, lambda d: d["result"]["base_methods"].pop())
    row = next(q for q in snapshot.verify(saved).quantities if q.name == "base_methods")
    assert not row.within and row.difference == math.inf and "entries" in row.detail


@pytest.mark.parametrize("key, errors, agrees", [("mean", 10.0, False), ("mean", 0.5, True),
                                                 ("p95", 10.0, False), ("p50", -0.5, True)])
def test_verify_monte_carlo_tolerance(saved, key, errors, agrees):
    mc = snapshot.load(saved).result.monte_carlo
    n = mc.samples
    if key == "mean":
        standard_error = mc.std / math.sqrt(n)
    else:  # checked against the textbook law in test_quantile_standard_error_of_a_normal_sample
        standard_error = snapshot.quantile_standard_error(int(key[1:]) / 100, mc.histogram_edges,
                                                          mc.histogram_counts)
    _rewrite(saved, lambda d: d["result"]["monte_carlo"].update({key: getattr(mc, key) + errors * standard_error}))
    report = snapshot.verify(saved)
    row = next(q for q in report.quantities if q.name == f"monte_carlo.{key}")
    assert row.kind == "statistical" and row.within is agrees and report.agrees is agrees
    assert row.detail.startswith(f"{abs(errors):.2g} standard errors (limit 5.7)")  # 4 sigma of a difference


@pytest.mark.parametrize("p, z", [(0.5, 0.0), (0.05, -1.6448536), (0.95, 1.6448536)])
def test_quantile_standard_error_of_a_normal_sample(p, z):
    # z: standard normal quantile (Abramowitz & Stegun, Table 26.5); density phi(z) = exp(-z^2/2)/sqrt(2 pi)
    n = 200_000
    sample = np.random.default_rng(7).normal(0.0, 1.0, n)
    counts, edges = np.histogram(sample, bins=40)
    expected = math.sqrt(p * (1 - p) / n) / (math.exp(-z * z / 2) / math.sqrt(2 * math.pi))
    got = snapshot.quantile_standard_error(p, edges, counts)
    assert got == pytest.approx(expected, rel=0.05)  # histogram density of 200k samples: a few % at most


def test_verify_reports_changed_flags_exactly(saved):
    _rewrite(saved, lambda d: d["result"]["base"]["regime"].__setitem__(0, d["result"]["base"]["regime"][0] + 1))
    row = next(q for q in snapshot.verify(saved).quantities if q.name == "base")
    assert not row.within and "base.regime: 1 of 1 values differ" in row.detail


def test_verify_lists_version_differences(saved):
    _rewrite(saved, lambda d: d["provenance"].update(numpy="1.0.0"))
    report = snapshot.verify(saved)
    assert report.agrees
    assert report.provenance_differences == [("numpy", "1.0.0", np.__version__)]
    assert f"numpy: 1.0.0 -> {np.__version__}" in report.text()


# ----------------------------------------------------------------------------- diff
def test_diff_of_changed_wind_speed(saved, tmp_path):
    spec = _spec(wind_speed=3.0)
    other = snapshot.save(tmp_path / "windier.json", spec, run_study(spec))
    d = snapshot.diff(saved, other)
    assert not d.identical
    assert d.changed_inputs == [("case.wind_speed", 2.0, 3.0)]
    changed = dict(d.changed_results)
    assert changed["base.q_per_length"] > 1e-4  # forced convection grows with wind speed
    assert "case.wind_speed: 2.0 -> 3.0" in d.text()


def test_diff_of_changed_sweep_count(saved, tmp_path):
    spec = _spec(sweep_count=4)
    other = snapshot.save(tmp_path / "coarser.json", spec, run_study(spec))
    d = snapshot.diff(snapshot.load(saved), other)
    assert d.changed_inputs == [("sweeps[0].count", 5, 4)]
    assert dict(d.changed_results) == {"sweeps[0].default.q_per_length": math.inf}


def test_diff_of_identical_studies(study, saved, tmp_path):
    spec, result = study
    again = snapshot.save(tmp_path / "again.json", spec, result, author="someone else")
    d = snapshot.diff(saved, again)
    assert d.identical and d.changed_inputs == [] and d.changed_results == []
    assert d.text() == "Inputs and results identical."
