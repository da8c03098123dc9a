"""Upgrade-study snapshots: save, load, verify, compare and report (issue 15 point 6).

These tests check the file's own promises -- what is saved is what the engine computed, a re-run agrees, an edit
is caught, a changed price shows before -> after -- so their expected values are the engine's own results on the
same input (no physics value is asserted here; the engine's physics and economics are checked against outside
sources in tests/test_survey.py, tests/test_upgrade.py and tests/test_economics.py). The demo survey runs with
20 samples to stay fast.
"""
import json
import re
from dataclasses import replace

import numpy as np
import pytest

from convlib import snapshot as study_snapshot
from convlib import upgrade_snapshot as us
from convlib.cli import main
from convlib.economics import Tariff
from convlib.errors import InputError
from convlib.snapshot import SnapshotError, content_hash
from convlib.survey import CAUTIONS, Measurement, demo_survey_path, read_survey
from convlib.upgrade import CostTable, StudySettings, demo_costs_path, ranked, totals, upgrade_study
from convlib.weather import demo_weather_path, read_epw, to_bins

SAMPLES = 20


@pytest.fixture(scope="module")
def settings():
    bins = to_bins(read_epw(demo_weather_path()), 5.0, (0.0, 3.0))
    return StudySettings(bins, CostTable.read(demo_costs_path()), Measurement(samples=SAMPLES, seed=7),
                         payback_years=4.0)


@pytest.fixture(scope="module")
def saved(settings, tmp_path_factory):
    path = tmp_path_factory.mktemp("upgrade") / "fernhill.upgrade.json"
    us.save(path, demo_survey_path(), settings, weather_source="demo year, 5 K bins", author="A. Auditor",
            note="before the winter shutdown")
    return path


def _same(a, b) -> bool:
    a, b = np.asarray(a), np.asarray(b)
    if a.dtype.kind == "f" or b.dtype.kind == "f":
        return a.shape == b.shape and bool(np.array_equal(a.astype(float), b.astype(float), equal_nan=True))
    return a.tolist() == b.tolist()


def _rewrite(src, dst, edit, rehash=True):
    document = json.loads(src.read_text(encoding="utf-8"))
    edit(document)
    if rehash:
        document["sha256"] = content_hash(document)
    dst.write_text(json.dumps(document, indent=1), encoding="utf-8")
    return dst


# ----------------------------------------------------------------------------- save / load
def test_round_trip_keeps_every_setting_and_the_survey(saved, settings):
    snap = us.load(saved)
    s = snap.settings
    assert snap.author == "A. Auditor" and snap.note == "before the winter shutdown"
    assert snap.weather_source == "demo year, 5 K bins" and len(snap.sha256) == 64
    for name in ("air_temperature", "wind_speed", "hours"):
        assert _same(getattr(s.bins, name), getattr(settings.bins, name))
    for name in ("diameters", "thicknesses", "new", "removal", "over"):
        assert _same(getattr(s.costs, name), getattr(settings.costs, name))
    assert (s.measurement, s.heat_tariff, s.cold_tariff, s.finance, s.payback_years) == \
        (settings.measurement, settings.heat_tariff, settings.cold_tariff, settings.finance, settings.payback_years)
    assert snap.cautions == list(CAUTIONS)
    lines, errors = snap.lines()  # the stored cells re-read as the survey file was
    original, _ = read_survey(demo_survey_path())
    assert errors == [] and lines.tag.tolist() == original.tag.tolist()
    assert _same(lines.surface_temperature, original.surface_temperature)


def test_numbers_in_the_snapshot_equal_upgrade_study_on_the_same_input(saved, settings):
    snap = us.load(saved)
    lines, _ = read_survey(demo_survey_path())
    rows = upgrade_study(lines, settings)
    best = ranked(rows)
    assert set(snap.rows) == set(rows) and set(snap.ranked) == set(best)
    for key in rows:
        assert _same(snap.rows[key], rows[key]), key
    for key in best:
        assert _same(snap.ranked[key], best[key]), key
    assert snap.totals == totals(best)
    assert np.isinf(snap.rows["payback_p50"]).any() or np.isfinite(snap.rows["payback_p50"]).all()


def test_save_refuses_to_overwrite_unless_asked(saved, settings):
    before = saved.read_bytes()
    with pytest.raises(FileExistsError):
        us.save(saved, demo_survey_path(), settings)
    assert saved.read_bytes() == before


def test_a_tampered_file_fails_on_load_and_is_left_as_it_was(saved, tmp_path):
    text = saved.read_text(encoding="utf-8").replace('"price": 0.045', '"price": 0.046', 1)
    assert '"price": 0.046' in text
    bad = tmp_path / "tampered.json"
    bad.write_text(text, encoding="utf-8")
    with pytest.raises(SnapshotError, match="tampered or corrupted"):
        us.load(bad)
    assert bad.read_text(encoding="utf-8") == text
    assert main(["verify", str(bad)]) == 2


@pytest.mark.parametrize("edit, words", [
    (lambda d: d.update(kind="convlib-snapshot"), "upgrade snapshot|spec"),
    (lambda d: d.update(schema_version=2), "newer convlib"),
    (lambda d: d["settings"]["costs"]["new"].pop(), "costs.new"),
    (lambda d: d["settings"]["measurement"].update(samples=10 ** 9), "samples"),
    (lambda d: d["settings"]["heat_tariff"].update(price=-1.0), "price"),
    (lambda d: d["results"]["rows"]["saving_p50"]["values"].append(1.0), "saving_p50"),
    (lambda d: d["results"]["rows"]["tag"].update(type="float"), "tag"),
    (lambda d: d["survey"]["columns"]["tag"].pop(), "equal length"),
])
def test_invalid_content_with_a_recomputed_hash_fails_clearly(saved, tmp_path, edit, words):
    bad = _rewrite(saved, tmp_path / "bad.json", edit)
    with pytest.raises(SnapshotError, match=words):
        study_snapshot.load(bad) if "upgrade snapshot|spec" == words else us.load(bad)


def test_size_limit_is_checked_before_reading(saved, monkeypatch):
    monkeypatch.setattr(us, "MAX_BYTES", 1000)
    with pytest.raises(SnapshotError, match="MB"):
        us.load(saved)


def test_a_study_snapshot_is_not_an_upgrade_snapshot(tmp_path):
    from convlib.study import CaseSpec, StudySpec, run_study

    spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    path = study_snapshot.save(tmp_path / "study.json", spec, run_study(spec))
    with pytest.raises(SnapshotError, match="not a convlib upgrade snapshot"):
        us.load(path)
    assert us.file_kind(path) == study_snapshot.KIND


# ----------------------------------------------------------------------------- verify
def test_verify_agrees_on_a_fresh_snapshot(saved, capsys):
    report = us.verify(saved)
    assert report.agrees and all(q.difference == 0.0 for q in report.quantities)  # same code: bit for bit
    names = {q.name for q in report.quantities}
    assert {"rows.saving_p50", "ranked.option", "totals.hot.npv_p50", "totals.cold.q_now", "errors"} <= names
    assert main(["verify", str(saved)]) == 0
    assert "AGREES" in capsys.readouterr().out


def test_verify_fails_naming_the_quantity_when_a_stored_number_is_edited(saved, tmp_path, capsys):
    def edit(document):
        values = document["results"]["rows"]["saving_p50"]["values"]
        values[0] = values[0] * 1.01
    edited = _rewrite(saved, tmp_path / "edited.json", edit)
    us.load(edited)  # the hash was recomputed: the file loads, only a re-run can tell
    assert main(["verify", str(edited)]) == 1
    out = capsys.readouterr().out
    assert "DOES NOT AGREE" in out
    bad = [line for line in out.splitlines() if " NO " in line]
    assert any(line.startswith("rows.saving_p50") for line in bad), out
    assert not any(line.startswith("rows.saving_p5 ") for line in bad)


def test_verify_json_from_the_command_line(saved, capsys):
    assert main(["verify", str(saved), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["agrees"] is True


# ----------------------------------------------------------------------------- compare
def test_compare_lists_a_changed_price_before_and_after(saved, settings, tmp_path, capsys):
    dearer = replace(settings, heat_tariff=Tariff("natural gas", 0.06, 0.85, 0.2))
    other = us.save(tmp_path / "dearer.json", demo_survey_path(), dearer, weather_source="demo year, 5 K bins")
    d = us.diff(saved, other)
    assert ("heat_tariff.price", 0.045, 0.06, "currency/kWh") in d.changed_settings
    assert d.changed_survey == [] and not d.identical
    saving = [r for r in d.total_changes if r["key"] == "hot saving_p50"]
    assert saving and saving[0]["after"] > saving[0]["before"] and saving[0]["change"] > 0
    assert main(["compare", str(saved), str(other)]) == 0
    out = capsys.readouterr().out
    assert "heat_tariff.price: 0.045 -> 0.06 currency/kWh" in out
    assert re.search(r"hot saving_p50: [\d.e+]+ currency/yr -> [\d.e+]+ currency/yr \(\+", out)
    assert main(["compare", str(saved), str(other), "--json"]) == 0
    records = json.loads(capsys.readouterr().out)
    assert {"key": "heat_tariff.price", "before": 0.045, "after": 0.06, "unit": "currency/kWh"} in records["settings"]


def test_compare_names_a_changed_cost_cell_by_size_and_thickness(saved, settings, tmp_path):
    new = settings.costs.new.copy()
    new[0, 0] += 5.0
    other = us.save(tmp_path / "costs.json", demo_survey_path(), replace(settings, costs=replace(settings.costs,
                                                                                                new=new)))
    names = [k for k, *_ in us.diff(saved, other).changed_settings]
    d0, t0 = settings.costs.diameters[0], settings.costs.thicknesses[0]
    assert f"costs.new at pipe {1000 * d0:.1f} mm, {1000 * t0:.0f} mm thick" in names


def test_an_unchanged_study_compares_identical(saved, settings, tmp_path):
    again = us.save(tmp_path / "again.json", demo_survey_path(), settings, weather_source="demo year, 5 K bins")
    assert us.diff(saved, again).identical


def test_compare_refuses_a_study_snapshot_with_an_upgrade_snapshot(saved, tmp_path, capsys):
    from convlib.study import CaseSpec, StudySpec, run_study

    spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    path = study_snapshot.save(tmp_path / "study.json", spec, run_study(spec))
    assert main(["compare", str(path), str(saved)]) == 2
    assert "cannot compare an upgrade snapshot with a study snapshot" in capsys.readouterr().err
    assert main(["verify", str(path)]) == 0  # study snapshots go on as before


# ----------------------------------------------------------------------------- report
@pytest.mark.parametrize("units", ["SI", "US"])
def test_report_holds_the_ranked_tags_and_totals_and_nothing_from_outside(saved, tmp_path, units):
    out = tmp_path / f"report_{units}.html"
    assert main(["report", str(saved), "-o", str(out), "--units", units]) == 0
    page = out.read_text(encoding="utf-8")
    snap = us.load(saved)
    positions = [page.index(f"<td>{tag}</td>") for tag in snap.ranked["tag"]]
    assert positions == sorted(positions)  # in rank order
    assert "Hot lines: heat lost" in page and "Cold lines: heat gained" in page
    assert f"{snap.totals['hot']['investment']:,.0f}" in page and f"{snap.totals['hot']['npv_p50']:,.0f}" in page
    assert snap.sha256 in page and "seed 7" in page and "Cautions" in page
    assert ("MWh/yr" if units == "SI" else "MMBtu/yr") in page and ("°C" if units == "SI" else "°F") in page
    assert not re.search(r"(src|href)\s*=\s*['\"]?\s*(https?:)?//", page, re.I)
    assert not re.search(r"https?://", page)


def test_report_escapes_text_from_the_survey(settings, tmp_path):
    text = demo_survey_path().read_text(encoding="utf-8").replace("FS-101", "<b>FS-101</b>")
    path = us.save(tmp_path / "escaped.json", text, settings, note="<script>x</script>")
    from dashboard.report import render_upgrade_report

    page = render_upgrade_report(us.load(path))
    assert "<script>" not in page and "&lt;b&gt;FS-101&lt;/b&gt;" in page


# ----------------------------------------------------------------------------- command line
def test_upgrade_save_from_the_command_line(tmp_path, capsys):
    path = tmp_path / "cli.json"
    argv = ["upgrade", "--demo", "--samples", "12", "--save", str(path), "--author", "B. Reviewer", "--note", "n"]
    assert main(argv) == 0
    assert f"snapshot saved: {path}" in capsys.readouterr().out
    snap = us.load(path)
    assert snap.author == "B. Reviewer" and snap.settings.measurement.samples == 12
    assert "Fernhill" in snap.weather_source
    before = path.read_bytes()
    assert main(argv) == 2 and path.read_bytes() == before  # refused before the study runs
    assert "--overwrite" in capsys.readouterr().err
    assert main(argv + ["--overwrite"]) == 0


def test_settings_document_round_trips_and_rejects_bad_values(settings):
    document = us.settings_document(settings, "x")
    back, source = us.settings_from_document(document)
    assert source == "x" and us.settings_document(back, "x") == document
    document["costs"]["thicknesses"] = list(reversed(document["costs"]["thicknesses"]))
    with pytest.raises(InputError, match="increasing"):
        us.settings_from_document(document)


# ----------------------------------------------------------------------------- damaged files (property-based)
from hypothesis import given, strategies as st  # noqa: E402

from fuzz_helpers import outcome  # noqa: E402
from test_fuzz_files import _paths, _replace, json_values  # noqa: E402


@pytest.fixture(scope="module")
def document(saved):
    return json.loads(saved.read_text(encoding="utf-8"))


@pytest.mark.fuzz
@given(data=st.data(), value=json_values, rehash=st.booleans())
def test_a_damaged_upgrade_snapshot_loads_or_is_an_input_error(document, saved, tmp_path_factory, data, value, rehash):
    """Any one value replaced (the hash recomputed or not): load gives a snapshot or an InputError, and a snapshot
    that loads is reported and compared without any other exception; with its stored results damaged, verify runs.

    A damaged survey cell or weather bin is re-run by the engine as a survey file with that value would be: limits
    of absurd magnitudes (a length of 1e306 m) are the survey reader's rules, not this file's, so verify is not run
    on those here."""
    where = data.draw(st.sampled_from([p for p in _paths(document) if p and p[0] != "sha256"]))
    damaged = _replace(document, where, value)
    if rehash and isinstance(damaged, dict):
        damaged["sha256"] = content_hash(damaged)
    path = tmp_path_factory.mktemp("damaged") / "u.json"
    path.write_text(json.dumps(damaged), encoding="utf-8")
    snap = outcome(us.load, path)
    if isinstance(snap, us.UpgradeSnapshot):
        from dashboard.report import render_upgrade_report

        render_upgrade_report(snap, "US")
        us.diff(saved, snap).text()
        if where[0] not in ("survey", "settings"):
            outcome(us.verify, snap)
