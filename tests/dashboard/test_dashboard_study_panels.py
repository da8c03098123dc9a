"""Headless tests of the uncertainty, insulation and snapshot panels, and of the HTML report."""
from __future__ import annotations

import html
import json
import re

import numpy as np
import pytest
from traitlets import TraitError
from convlib import design
from convlib import snapshot as cl_snapshot
from convlib.pipe import Layer
from convlib.study import evaluate_case, run_study

from dashboard import compute
from dashboard.display import Display
from dashboard.report import render_report
from dashboard_helpers import show, trace


def test_tornado_and_monte_carlo_equal_run_study(app, study):
    show(app, "uncertainty")
    panel = app.uncertainty
    panel.auto = False
    panel.samples, panel.seed = 2_000, 7
    panel.run_button.click()
    spec = app.spec.model_copy(update={"sweeps": [], "maps": [], "uncertainty": study.uncertainty.model_copy(
        update={"samples": 2_000, "seed": 7})})
    expected = run_study(spec)
    plot = panel.plot
    assert [b.input for b in panel.tornado] == [b.input for b in expected.tornado]
    low = trace(plot, "input at its low value")
    base = expected.base.q_per_length[0]
    np.testing.assert_allclose(np.asarray(low.x) + base, [b.q_low for b in reversed(expected.tornado)])
    hist = trace(plot, "samples")
    np.testing.assert_array_equal(hist.y, expected.monte_carlo.histogram_counts)
    texts = [a.text for a in plot.layout.annotations]
    assert f"P50 {Display().number(expected.monte_carlo.p50, 'q_per_length')}" in texts
    assert panel.progress == pytest.approx(1.0) and not panel.busy
    # a later change of the case marks the Monte Carlo result as out of date, keeping it on screen
    app.line.controls["wind_speed"].widget.value = 6.0
    assert panel.monte_carlo_stale and "earlier case" in panel.message.value
    assert len(trace(panel.plot, "samples").y) == len(expected.monte_carlo.histogram_counts)


def test_insulation_sizing_equals_convlib_design(app, study):
    show(app, "insulation")
    panel = app.insulation
    case = study.case
    jacket = [Layer(case.jacket_thickness, case.jacket_conductivity, name="jacket")]
    common = dict(air_temperature=case.air_temperature, insulation_conductivity=case.insulation_conductivity,
                  outer_layers=jacket, jacket_emissivity=case.emissivity, wind_speed=0.0,
                  sky_view_fraction=case.sky_view_fraction, pressure=case.pressure, max_thickness=0.3)
    touch = design.thickness_for_surface_temperature(case.diameter, case.fluid_temperature,
                                                     surface_limit=design.TOUCH_LIMIT_METAL_JACKET, **common)
    loss = design.thickness_for_heat_loss(case.diameter, case.fluid_temperature, heat_loss_limit=60.0, **common)
    sizings = {s.name: s for s in panel.view.sizings}
    assert sizings["touch"].required == pytest.approx(float(touch.required_thickness), abs=1e-6)
    assert sizings["heat loss"].commercial == pytest.approx(float(loss.commercial_thickness))
    d = Display()
    assert d.text(float(loss.required_thickness), "insulation_thickness") in panel.summary.value
    curve = trace(panel.plot, "surface temperature")
    r = evaluate_case(case, insulation_thickness=panel.view.thickness, wind_speed=np.zeros_like(panel.view.thickness))
    np.testing.assert_allclose(curve.y, d.value(r.surface_temperature, "surface_temperature"))
    # a stricter limit asks for more insulation
    panel.limit_control.widget.value = 40.0
    assert {s.name: s for s in panel.view.sizings}["heat loss"].required > sizings["heat loss"].required


def test_touch_sizing_at_design_hottest_ambient_in_still_air(app, study):
    # convlib.design.thickness_for_surface_temperature(..., hottest_air_temperature=..., wind_speed=0) is the
    # reference: the panel must show exactly its thickness and its echoed assumptions
    show(app, "insulation")
    panel = app.insulation
    case = study.case
    assert panel.hottest_control.si == pytest.approx(case.air_temperature)  # default: the case's air
    app.line.controls["wind_speed"].widget.value = 6.0       # wind on the case: touch must still size in still air
    panel.conditions.value = False                            # heat loss in the case's wind
    panel.hottest_control.widget.value = 40.0                # degC, SI display
    hottest = 313.15
    jacket = [Layer(case.jacket_thickness, case.jacket_conductivity, name="jacket")]
    touch = design.thickness_for_surface_temperature(
        case.diameter, case.fluid_temperature, air_temperature=case.air_temperature,
        hottest_air_temperature=hottest, wind_speed=0.0, insulation_conductivity=case.insulation_conductivity,
        outer_layers=jacket, jacket_emissivity=case.emissivity, sky_view_fraction=case.sky_view_fraction,
        solar_irradiance=case.solar_irradiance, pressure=case.pressure, max_thickness=0.3,
        surface_limit=design.TOUCH_LIMIT_METAL_JACKET)
    s = {s.name: s for s in panel.view.sizings}["touch"]
    assert s.required == pytest.approx(float(touch.required_thickness), abs=1e-6)
    assert s.commercial == pytest.approx(float(touch.commercial_thickness))
    assert (s.air_temperature, s.wind_speed) == (pytest.approx(hottest), 0.0)
    assert s.jacket_emissivity == pytest.approx(case.emissivity)
    d = Display()
    text = panel.summary.value
    assert d.text(float(touch.required_thickness), "insulation_thickness") in text
    assert f"hottest air {d.text(hottest, 'air_temperature')}, still air" in text
    assert f"jacket ε {case.emissivity:.2f}" in text
    # the hotter the design ambient, the more insulation touch needs
    panel.hottest_control.widget.value = 20.0
    assert {s.name: s for s in panel.view.sizings}["touch"].required < s.required
    # US units: the control keeps its SI value and shows it in degF
    app.units = "US"
    assert panel.hottest_control.si == pytest.approx(293.15)
    assert "°F" in panel.summary.value and "hottest air 68" in panel.summary.value


def test_cold_line_sizes_against_condensation(app, study):
    line = app.line
    line.controls["fluid_temperature"].widget.value = 5.0
    line.controls["air_temperature"].widget.value = 30.0
    line.controls["relative_humidity"].widget.value = 80.0
    show(app, "insulation")
    names = [s.name for s in app.insulation.view.sizings]
    assert "condensation" in names and "touch" not in names
    assert app.line.card_text("q_per_length").endswith("W/m")
    assert "Heat gain" in app.line.cards["q_per_length"].value


def test_save_open_verify_compare_and_report(app, tmp_path):
    snaps = app.snapshots
    snaps.author, snaps.note = "A. Reviewer", "baseline"
    snaps._fire("save")
    files = sorted((tmp_path / "snapshots").glob("*.snapshot.json"))
    assert len(files) == 1
    first = cl_snapshot.load(files[0])  # a valid, hash-checked file
    assert first.author == "A. Reviewer" and first.spec.case == app.spec.case
    assert first.result.base.q_per_length[0] == pytest.approx(float(evaluate_case(app.spec.case).q_per_length))
    assert [e.path for e in snaps.entries] == files
    # change the line, save again under a chosen (unsafe) name
    app.line.controls["wind_speed"].widget.value = 7.5
    snaps.name = "../escape attempt"
    snaps._fire("save")
    assert "not allowed" in snaps.message.value
    snaps.name = "windy run"
    snaps._fire("save")
    second = tmp_path / "snapshots" / "windy_run.snapshot.json"
    assert second.exists()
    # open the first: every control back
    snaps.selected = str(files[0])
    snaps._fire("open")
    assert app.line.case == first.spec.case
    assert app.line.controls["wind_speed"].widget.value == pytest.approx(3.0)
    assert "Opened" in snaps.message.value
    snaps._fire("verify")
    assert "agree with a re-run" in snaps.message.value and "AGREES" in snaps.output.value
    snaps.other = str(second)
    snaps._fire("compare")
    assert "case.wind_speed" in snaps.output.value
    snaps._fire("report")
    assert "data:text/html;base64," in snaps.link.value


def test_open_refuses_files_outside_the_directory(app, tmp_path):
    outside = tmp_path / "elsewhere.snapshot.json"
    spec = app.snapshot_spec()
    cl_snapshot.save(outside, spec, run_study(spec))
    with pytest.raises(TraitError):  # the list accepts only the files it offers
        app.snapshots.listing.value = str(outside)
    with pytest.raises(ValueError, match="not in the snapshot directory"):
        app._checked(str(outside))


def test_report_is_self_contained(app, tmp_path):
    spec = app.snapshot_spec()
    path = cl_snapshot.save(tmp_path / "r.snapshot.json", spec, run_study(spec), author="E. Ngineer", note="n")
    text = render_report(path, "US")
    snap = cl_snapshot.load(path)
    assert snap.sha256 in text and "E. Ngineer" in text
    assert re.search(r"<script[^>]*\ssrc=", text) is None  # plotly.js inlined, nothing fetched
    assert re.search(r"<link[^>]*href=\"http", text) is None
    assert text.count("Plotly.newPlot") >= len(spec.sweeps)  # every figure interactive
    assert "Btu/h·ft" in text
    assert Display("US").text(snap.result.base.q_per_length[0], "q_per_length") in text
    for caution in snap.result.cautions:  # in the report's units: "above about 140 °F", not "60 degC"
        assert html.escape(Display("US").localize(caution))[:40] in text
    json.loads(path.read_text())  # the snapshot itself untouched


def test_panels_freeze_unfreeze_reset(app):
    for panel in [app.line, *app.panels.values()]:
        controls = [w for w in panel.interactive() if not w.disabled]
        panel.freeze()
        assert panel.busy and all(w.disabled for w in controls)
        panel.unfreeze()
        assert not panel.busy and not any(w.disabled for w in controls)
        panel.reset()
    assert app.line.case == app.study.case


def test_snapshot_spec_holds_the_sweep_on_screen(app):
    app.sweep.sweep_input = "fluid_temperature"  # an extra sweep, not in the study file
    spec = app.snapshot_spec()
    assert "fluid_temperature" in [s.input for s in spec.sweeps]
    assert spec.case == app.line.case
    assert compute.study_for_case(app.study, app.line.case).tornado == spec.tornado


def test_report_names_a_gain_as_a_gain(tmp_path):
    # issue 12 point 4: a chilled line (6 degC in 30 degC air) gains heat; the report says so with a positive value
    # instead of a negative "loss". Expected value: the study's own base result, sign turned.
    from convlib.study import CaseSpec, StudySpec
    spec = StudySpec(name="chilled", case=CaseSpec(fluid_temperature=279.15, air_temperature=303.15))
    path = cl_snapshot.save(tmp_path / "c.snapshot.json", spec, run_study(spec))
    text = render_report(path, "SI")
    q = cl_snapshot.load(path).result.base.q_per_length[0]
    assert q < 0 and "Heat gained per length" in text and "Heat lost per length" not in text
    assert Display("SI").text(-q, "q_per_length") in text
