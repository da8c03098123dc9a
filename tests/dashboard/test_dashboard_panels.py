"""Headless tests of the line, sweep, regime and correlation-spread panels.

Each test sets widget values as a browser would and compares what the cards and
the FigureWidget traces show with convlib called directly (the expected values
are convlib's own results: the dashboard must show exactly them, converted).
"""
from __future__ import annotations

import numpy as np
import pytest
from convlib import correlations as corr
from convlib.pipe_sizes import nominal_pipe
from convlib.study import CaseSpec, evaluate_case, run_study
from convlib.units import from_si

from dashboard import compute, settings
from dashboard.display import Display

from dashboard_helpers import show, trace


def _q_text(system, q):
    return Display(system).text(abs(float(q)), "q_per_length")


def test_cards_show_convlib_base_case(app, study):
    r = evaluate_case(study.case)
    d = Display("SI")
    assert app.line.card_text("q_per_length") == d.text(float(r.q_per_length), "q_per_length")
    assert app.line.card_text("q_total") == d.text(float(r.q_total), "q_total")
    assert app.line.card_text("surface_temperature") == d.text(float(r.surface_temperature), "surface_temperature")
    assert app.line.card_text("h_convection") == d.text(float(r.h_convection), "h_convection")
    assert app.line.card_text("h_radiation") == d.text(float(r.h_radiation), "h_radiation")
    assert app.line.card_text("regime") == f"{r.regime_names().item()}, {r.flow_regime_names().item()} boundary layer"
    assert app.line.card_text("q_per_length") == "62.6 W/m"  # readable number and unit


def test_wind_slider_changes_card_and_sweep_to_convlib_values(app, study):
    wind = app.line.controls["wind_speed"].widget
    wind.value = 5.0
    case = study.case.model_copy(update={"wind_speed": 5.0})
    assert app.line.case.wind_speed == pytest.approx(5.0)
    assert app.line.card_text("q_per_length") == _q_text("SI", evaluate_case(case).q_per_length)
    # the sweep on screen is run_study's sweep of the new case
    axis = app.sweep.axis()
    expected = run_study(compute.study_for_case(study, case).model_copy(
        update={"sweeps": [axis], "maps": [], "tornado": [], "uncertainty": None})).sweeps[0]
    plot = app.sweep.plot
    np.testing.assert_allclose(trace(plot, "total (selected laws)").y, expected.default.q_per_length, rtol=1e-12)
    np.testing.assert_allclose(trace(plot, "convection part").y, expected.default.q_convection_per_length)
    np.testing.assert_allclose(trace(plot, "radiation part").y, expected.default.q_radiation_per_length)
    np.testing.assert_allclose(trace(plot, "model-form band (stated accuracy)").y, expected.band_high)
    np.testing.assert_allclose(trace(plot, "band, low").y, expected.band_low)
    np.testing.assert_allclose(trace(plot, "total (selected laws)").x, expected.values)
    # the marker of the case moved to the new wind speed
    assert any(s.x0 == pytest.approx(5.0) for s in plot.layout.shapes)


def test_sun_and_air_pressure_controls_reach_the_case(app, study):
    assert study.case.sky_view_fraction > 0  # the demo line is outdoors: the sun control is shown
    assert app.line.controls["solar_irradiance"].box.layout.display is None
    app.line.controls["solar_irradiance"].widget.value = 500.0  # W/m2 on screen
    app.line.controls["pressure"].widget.value = "80"           # kPa on screen (a site at altitude)
    case = study.case.model_copy(update={"solar_irradiance": 500.0, "pressure": 80e3})
    assert app.line.case.solar_irradiance == pytest.approx(500.0) and app.line.case.pressure == pytest.approx(80e3)
    r = evaluate_case(case)
    assert app.line.card_text("q_per_length") == _q_text("SI", r.q_per_length)
    d = Display("SI")
    assert f"sun −{d.number(float(r.q_solar_per_length), 'q_per_length')}" in app.line.cards["q_per_length"].value
    app.line.sky.value = "indoors"  # a line indoors with a sun value keeps showing it (it still counts)
    assert app.line.controls["solar_irradiance"].box.layout.display is None


def test_sweep_marks_laws_outside_their_range(app, study):
    axis = next(a for a in app.sweep.axes if a.input == "diameter")
    app.sweep.sweep_input = "diameter"
    expected = run_study(app.spec.model_copy(update={"sweeps": [axis], "maps": [], "tornado": [],
                                                     "uncertainty": None})).sweeps[0]
    plot = app.sweep.plot
    assert plot.layout.xaxis.type == "log"
    for m in expected.methods:
        label = f"{m.mode}: {corr.registry.display_name(m.method)}" + (
            " (selected)" if m.method in ("churchill_chu", "churchill_bernstein") else "")
        inside = np.asarray(trace(plot, label).y, dtype=float)
        outside = np.array(trace(plot, f"{label} (outside range)").y, dtype=float)
        q = np.array(m.values.q_per_length)
        ok = np.array(m.in_range)
        # a part without any point is sent empty (plotly.js cannot echo an all-NaN array back)
        assert (inside.size == 0) == (not ok.any()) and (outside.size == 0) == ok.all()
        if ok.any():
            np.testing.assert_allclose(inside[ok], q[ok])
            assert np.isnan(inside[~ok]).all()
        if not ok.all():
            np.testing.assert_allclose(outside[~ok], q[~ok])
        assert trace(plot, f"{label} (outside range)").line.dash == "dot"


def test_figure_widgets_are_updated_in_place(app):
    show(app, "regimes")
    sweep_plot, regime_plot = app.sweep.plot, app.regimes.plot
    app.line.controls["air_temperature"].widget.value = 15.0
    show(app, "sweep")
    assert app.sweep.plot is sweep_plot and app.regimes.plot is regime_plot


def test_units_switch_converts_controls_cards_and_axes(app, study):
    q_si = float(evaluate_case(study.case).q_per_length)
    app.units_switch.value = "US"
    assert app.line.card_text("q_per_length") == _q_text("US", q_si)
    air = app.line.controls["air_temperature"].widget
    assert "[°F]" in air.description
    assert air.value == pytest.approx(float(from_si(study.case.air_temperature, "temperature", "degF")))
    assert app.line.case == study.case  # switching units changes no input
    assert "[mph]" in app.sweep.plot.layout.xaxis.title.text
    assert "Btu/h·ft" in app.sweep.plot.layout.yaxis.title.text
    np.testing.assert_allclose(trace(app.sweep.plot, "total (selected laws)").x,
                               from_si(np.array(app.sweep.result.values), "speed", "mph"))
    # a key press on the slider in US units: one step (in degF) up from the shown value
    air.value = air.value + air.step
    expected = study.case.model_copy(update={"air_temperature": app.line.case.air_temperature})
    assert app.line.case.air_temperature == pytest.approx(study.case.air_temperature + air.step / 1.8)
    assert app.line.card_text("q_per_length") == _q_text("US", evaluate_case(expected).q_per_length)


def test_browser_values_are_clamped_and_snapping_ignored(app, study):
    wind = app.line.controls["wind_speed"].widget
    wind.value = 1e6  # a browser could send anything: ipywidgets clamps it to the slider
    assert app.line.case.wind_speed == pytest.approx(20.0)
    diameter = app.line.controls["diameter"]
    app.line.size_mode.value = "value"
    before = app.line.case.diameter
    step = diameter.widget.step
    diameter.widget.value = round(diameter.widget.value / step) * step  # the browser snapping to its grid
    assert app.line.case.diameter == before
    app.units = "US"  # NPS 6 reads 6.625 in (ASME B36.10M inch column), not 6.626 from 168.3 mm
    assert diameter.widget.value == pytest.approx(6.625, abs=1e-12)
    diameter.widget.value = 6.625  # the browser echoing the shown value changes nothing
    assert app.line.case.diameter == before


def test_invalid_case_shows_message_not_traceback(app):
    before = app.line.case
    app.line.controls["wind_speed"].set_si(99.0)  # beyond CaseSpec's 60 m/s
    app.line.controls["emissivity"].widget.value = 0.5  # any change publishes the case
    assert "wind_speed" in app.line.error
    assert "Input not accepted" in app.line.message.value
    assert app.line.case == before  # the last good case and its results stay


def test_nps_and_schedule_set_the_diameter(app, study):
    line = app.line
    assert line.size_mode.value == "nps" and line.nps.value == 6.0  # the demo pipe is NPS 6
    line.nps.value = 4.0
    assert line.case.diameter == nominal_pipe(4, "40").outer_diameter
    case = study.case.model_copy(update={"diameter": nominal_pipe(4, "40").outer_diameter})
    assert line.card_text("q_per_length") == _q_text("SI", evaluate_case(case).q_per_length)
    line.schedule.value = "80"
    assert line.case.diameter == nominal_pipe(4, "80").outer_diameter


def test_bare_vertical_plate(app):
    line = app.line
    line.kind.value = "bare"
    line.shape.value = "vertical_plate"
    shown = {n for n, c in line.controls.items() if c.box.layout.display != "none"}
    assert {"height", "width", "surface_temperature"} <= shown
    assert not {"diameter", "fluid_temperature", "insulation_thickness"} & shown
    case = line.case
    assert case.kind == "bare" and case.height is not None and case.width is not None
    assert line.card_text("q_per_length") == _q_text("SI", evaluate_case(case).q_per_length)
    assert [k for _, k in line.natural.options][1:] == [k for k in corr.methods("vertical_plate") if
                                                        k != "churchill_chu"]
    show(app, "insulation")
    assert "insulated line" in app.insulation.message.value


def test_choosing_a_law_reaches_the_case_and_the_cards(app, study):
    app.line.natural.value = "morgan"
    assert app.line.case.natural == "morgan"
    case = study.case.model_copy(update={"natural": "morgan"})
    assert app.line.card_text("h_convection") == Display().text(float(evaluate_case(case).h_convection),
                                                               "h_convection")
    assert any(t.name == "natural: Morgan (selected)" for t in app.sweep.plot.data)


def test_regime_panel_shows_convlib_curves_point_and_map(app, study):
    show(app, "regimes")
    plot = app.regimes.plot
    r = evaluate_case(study.case)
    pr = float(r.prandtl)
    for key in corr.methods("horizontal_cylinder", "natural"):
        t = trace(plot, f"natural: {corr.registry.display_name(key)}" + (" (selected)" if key == "churchill_chu" else ""))
        nu, flags = corr.nusselt("horizontal_cylinder", key, Ra=np.asarray(t.x), Pr=pr, full_output=True)
        ok = (flags & ~corr.registry.Flag.INFORMATIONAL) == 0
        np.testing.assert_allclose(np.asarray(t.y, dtype=float)[ok], nu[ok], rtol=1e-12)
    stars = [t for t in plot.data if t.name == "this case"]
    assert len(stars) == 3 and [t.showlegend for t in stars].count(False) == 2  # one legend entry for the case
    star = stars[0]
    assert star.x[0] == pytest.approx(float(r.rayleigh))
    assert star.y[0] == pytest.approx(float(corr.nusselt("horizontal_cylinder", "churchill_chu", Ra=r.rayleigh,
                                                         Pr=pr)))
    heat = trace(plot, "mode map")
    rmap = app.regimes.regime_map
    bare = CaseSpec.model_validate({**study.case.model_dump(), "kind": "bare", "fluid_temperature": None,
                                    "surface_temperature": float(r.surface_temperature),
                                    "diameter": float(r.outer_diameter)})
    ww, dd = np.meshgrid(rmap.wind_speed, rmap.temperature_difference)
    expected = evaluate_case(bare, wind_speed=ww, surface_temperature=study.case.air_temperature + dd).regime
    np.testing.assert_array_equal(np.asarray(heat.z), expected)
    # the case point moves with the wind slider
    app.line.controls["wind_speed"].widget.value = 0.0
    stars = [t for t in app.regimes.plot.data if t.name == "this case"]
    assert len(stars[1].x) == 0  # still air: no forced point
    assert stars[2].x[0] == pytest.approx(settings.MAP_LOWEST_WIND)  # still air: at the map's lowest wind


def test_spread_panel_shows_run_study_spreads_and_bars(app, study):
    show(app, "spread")
    res = app.spread.result
    expected = run_study(app.spec.model_copy(update={"sweeps": [app.sweep.axis()], "maps": [], "tornado": [],
                                                     "uncertainty": None}))
    plot = app.spread.plot
    percent = lambda values: np.array([np.nan if v is None else 100 * v for v in values])  # noqa: E731
    for sp in expected.sweeps[0].spreads:
        np.testing.assert_allclose(np.asarray(trace(plot, f"{sp.mode} laws: Nu").y, dtype=float),
                                   percent(sp.nusselt))
        np.testing.assert_allclose(np.asarray(trace(plot, f"{sp.mode} laws: heat loss").y, dtype=float),
                                   percent(sp.q_per_length))
        np.testing.assert_allclose(np.asarray(trace(plot, f"{sp.mode} laws: Nu, all (extrapolated)").y,
                                              dtype=float), percent(sp.extrapolated_nusselt))
    # against the swept input by default, against Ra on request
    assert app.spread.x_axis == "input" and app.spread.x_toggle.options[0][0] == "against wind speed"
    np.testing.assert_allclose(trace(plot, "natural laws: Nu").x, expected.sweeps[0].values)
    app.spread.x_axis = "rayleigh"
    np.testing.assert_allclose(trace(plot, "natural laws: Nu").x, expected.sweeps[0].default.rayleigh)
    bars = trace(plot, "h convection by law")
    np.testing.assert_allclose(bars.y, [m.values.h_convection[0] for m in expected.base_methods])
    assert res == expected
    app.spread.x_axis = "input"
    np.testing.assert_allclose(trace(app.spread.plot, "natural laws: Nu").x, expected.sweeps[0].values)


def test_only_the_visible_panel_is_recomputed(app):
    show(app, "regimes")
    view = app.regimes.view
    show(app, "sweep")
    app.line.controls["air_temperature"].widget.value = 20.0
    assert app.regimes.stale and app.regimes.view is view  # hidden: untouched
    assert not app.sweep.stale
    show(app, "regimes")
    assert not app.regimes.stale and app.regimes.view is not view
    assert app.regimes.view.temperature_difference == pytest.approx(
        app.summary.surface_temperature - app.line.case.air_temperature)


def test_cautions_for_hot_and_cold_surfaces(app):
    from convlib.study import CAUTION_DEW, CAUTION_HOT

    line = app.line
    line.kind.value = "bare"
    line.controls["surface_temperature"].widget.value = 90.0
    assert Display("SI").localize(CAUTION_HOT)[:50] in line.notes.value.replace("&#x27;", "'")
    line.controls["surface_temperature"].widget.value = 2.0
    line.controls["air_temperature"].widget.value = 25.0
    assert Display("SI").localize(CAUTION_DEW)[:50] in line.notes.value.replace("&#x27;", "'")
    assert "Heat gain" in line.cards["q_per_length"].value


@pytest.mark.parametrize("shape", ["horizontal_cylinder", "vertical_cylinder", "sphere", "vertical_plate",
                                   "horizontal_plate_up", "horizontal_plate_down"])
def test_every_shape_renders_every_panel(app, shape):
    app.line.kind.value = "bare"
    app.line.shape.value = shape
    assert app.line.case.shape == shape and not app.line.error
    for key in ("sweep", "regimes", "spread", "uncertainty"):
        show(app, key)
        panel = app.panels[key]
        assert "cl-msg-error" not in panel.message.value, panel.message.value
        assert panel.plot is not None and len(panel.plot.data) > 0
    names = [a.input for a in app.sweep.axes]
    assert ("diameter" in names) == (shape in ("horizontal_cylinder", "vertical_cylinder", "sphere"))
    assert app.line.card_text("q_per_length") == Display().text(
        abs(float(evaluate_case(app.line.case).q_per_length)), "q_per_length")


# ----------------------------------------------------------------------------- bare valves and flange pairs
def test_bare_valves_and_flanges_equal_convlib_fittings(app):
    from convlib.fittings import bare_flange_pair, bare_valve
    from convlib.pipe import Layer

    from dashboard.display import Display

    show(app, "insulation")
    panel, case = app.insulation, app.line.case
    assert app.store.pipe_size[0] == 6.0 and not panel.valve_box.disabled  # the demo line is NPS 6
    panel.valve_box.value, panel.flange_box.value, panel.class_box.value = 2, 3, 300
    layers = [Layer(case.insulation_thickness, case.insulation_conductivity),
              Layer(case.jacket_thickness, case.jacket_conductivity)]
    around = dict(pressure_class=300, layers=layers, jacket_emissivity=case.emissivity,
                  air_temperature=case.air_temperature, wind_speed=case.wind_speed,
                  sky_view_fraction=case.sky_view_fraction, pressure=case.pressure)
    valve = bare_valve(6, case.fluid_temperature, **around)
    flange = bare_flange_pair(6, case.fluid_temperature, **around)
    heat = 2 * float(valve.extra_heat) + 3 * float(flange.extra_heat)
    length = 2 * float(valve.equivalent_length) + 3 * float(flange.equivalent_length)
    for system in ("SI", "US"):
        app.units_switch.value = system
        d = Display(system)
        assert panel.fittings_text() == (d.text(heat, "fitting_heat"), d.text(length, "equivalent_length"))
        assert d.text(float(valve.extra_heat), "fitting_heat") in panel.fittings_card.value
    assert panel.fittings_text()[0].endswith("Btu/h") and panel.fittings_text()[1].endswith("ft")
    # 1 ft = 0.3048 m exactly (NIST SP 811, appendix B)
    assert float(panel.fittings_text()[1].split()[0].replace(",", "")) == pytest.approx(length / 0.3048, rel=2e-3)
    assert "burn hazard" in panel.fittings_notes.value
    # sized by value: no NPS, the controls are off and say why
    app.line.size_mode.value = "value"
    assert panel.valve_box.disabled and panel.class_box.disabled and "NPS" in panel.fittings_hint.value
    assert panel.fittings_cards.layout.display == "none"
    app.line.size_mode.value = "nps"
    assert not panel.valve_box.disabled and panel.fittings_cards.layout.display is None


def test_bare_valves_off_for_a_size_the_tables_lack(app):
    show(app, "insulation")
    app.insulation.valve_box.value = 1
    app.line.nps.value = 3.5  # ASME B16.10 gate valves: no NPS 3 1/2 in convlib's table
    assert app.insulation.valve_box.disabled and "3.5" in app.insulation.fittings_hint.value


# ----------------------------------------------------------------------------- size systems beside NPS
def test_dn_and_copper_sizes_set_the_diameter(app, study):
    line = app.line
    assert line.size_system.value == "nps" and line.pipe_size == (6.0, "40")  # NPS unchanged by default
    line.size_system.value = "dn"
    assert line.schedule.layout.display == "none"  # EN 10220 implies no wall: no schedule
    assert line.nps.layout.display is None  # ... but the size menu stays (widgets do not share one Layout)
    assert line.nps.value == 150 and line.case.diameter == pytest.approx(0.1683)  # nearest: DN 150
    line.nps.value = 100
    assert line.case.diameter == pytest.approx(0.1143)  # EN 10220 series 1: DN 100 is 114.3 mm
    assert line.pipe_size == (None, "40")  # the bare items and the wall need an NPS
    case = study.case.model_copy(update={"diameter": 0.1143})
    assert line.card_text("q_per_length") == _q_text("SI", evaluate_case(case).q_per_length)
    line.size_system.value = "copper_astm"
    assert line.schedule.description == "Type" and list(line.schedule.options) == ["K", "L", "M"]
    line.nps.value = 0.75
    assert line.case.diameter == pytest.approx(0.875 * 0.0254)  # ASTM B88: 3/4 tube is 0.875 in outside
    line.size_system.value = "copper_en"
    line.nps.value = 22.0
    assert line.case.diameter == pytest.approx(0.022)  # EN 1057: 22 mm outside
    app.units_switch.value = "US"
    assert ("Cu 22 mm · 0.8661 in", 22.0) in line.nps.options  # 22 / 25.4 = 0.86614 in
    line.size_system.value = "nps"
    line.nps.value = 4.0
    assert line.case.diameter == nominal_pipe(4, "40").outer_diameter and line.pipe_size == (4.0, "40")
    assert ("NPS 4 · 4.500 in", 4.0) in line.nps.options  # ASME B36.10M: NPS 4 is 4.500 in


def test_insulation_material_menu_reaches_the_case_and_the_cards(app, study):
    """Materials by name on the dashboard (issue 15 point 1): the menu sets the case's insulation_material, hides
    the constant k, shows the source, and the cards are evaluate_case's with the material's k(T)."""
    name = "glass_fiber_pipe_alley_k"
    assert app.line.material.label == "constant k (typed below)"  # the demo case types its k
    assert name in [key for _, key in app.line.material.options]
    app.line.material.value = name
    assert app.line.case.insulation_material == name
    assert app.line.controls["insulation_conductivity"].box.layout.display == "none"
    assert app.line.material_hint.layout.display is None and "k(T)" in app.line.material_hint.value
    r = evaluate_case(study.case.model_copy(update={"insulation_material": name}))
    assert app.line.card_text("q_per_length") == _q_text("SI", r.q_per_length)
    app.line.material.value = ""  # back to the typed constant k, shown by name (not an empty menu)
    assert app.line.material.label == "constant k (typed below)"
    assert app.line.case.insulation_material is None
    assert app.line.controls["insulation_conductivity"].box.layout.display is None
