"""Headless tests of the "Tanks & ducts" panel: cards and figure equal convlib.vessels called directly; the menus
show display names, never code identifiers."""
from __future__ import annotations

import html

import numpy as np
import pytest
from convlib import vessels
from convlib.pipe import Layer

from dashboard import settings
from dashboard.display import Display

from dashboard_helpers import show, trace


@pytest.fixture
def panel(app):
    show(app, "vessels")
    return app.vessels


def _common(case):
    return dict(air_temperature=case.air_temperature, emissivity=case.emissivity, wind_speed=case.wind_speed,
                outdoor=case.sky_view_fraction > 0, pressure=case.pressure)


def test_tank_faces_follow_the_line_and_equal_convlib(panel, study):
    case = study.case
    assert panel.contents_temperature == case.fluid_temperature          # follows the line
    assert panel.vessel_insulation == case.insulation_thickness
    layers = [Layer(case.insulation_thickness, case.insulation_conductivity)]
    r = vessels.vertical_tank(settings.VESSEL["vessel_diameter"], settings.VESSEL["vessel_height"],
                              fluid_temperature=case.fluid_temperature, wall_layers=layers, roof_layers=layers,
                              **_common(case))
    d = Display("SI")
    assert panel.card_text(0) == d.text(float(r.q_total), "face_loss")
    for k, face in enumerate(r.faces, start=1):
        assert panel.card_text(k) == d.text(float(face.q_total), "face_loss")
    bars = trace(panel.plot, "per face")
    assert list(bars.x) == ["wall", "roof", "floor"]
    np.testing.assert_allclose(bars.y, d.value(np.array([float(f.q_total) for f in r.faces]), "face_loss"))
    # the sweep over insulation thickness: one vectorized convlib call
    grid = panel.view.sweep_values
    swept = vessels.vertical_tank(settings.VESSEL["vessel_diameter"], settings.VESSEL["vessel_height"],
                                  fluid_temperature=case.fluid_temperature,
                                  wall_layers=[Layer(grid, case.insulation_conductivity)],
                                  roof_layers=[Layer(grid, case.insulation_conductivity)], **_common(case))
    np.testing.assert_allclose(trace(panel.plot, "total").y, d.value(swept.q_total, "face_loss"), rtol=1e-9)
    assert grid[0] == 0.0 and grid[-1] >= case.insulation_thickness
    assert any("ISO 13732-1" in c or "touch" in c.lower() for c in panel.view.cautions) == any(
        float(f.surface_temperature) > 333.15 for f in r.faces if f.surface is not None)


def test_insulation_sized_per_face_in_still_air(panel, study):
    # convlib.vessels.insulation_per_face at the touch limit (hot contents), the case's air, no wind
    case = study.case
    sized = vessels.insulation_per_face(lambda t: vessels.vertical_tank(
        settings.VESSEL["vessel_diameter"], settings.VESSEL["vessel_height"], fluid_temperature=case.fluid_temperature,
        wall_layers=[Layer(t, case.insulation_conductivity)], roof_layers=[Layer(t, case.insulation_conductivity)],
        **{**_common(case), "wind_speed": 0.0}), surface_limit=333.15)
    d = Display("SI")
    text = panel.notes.value
    assert "at or below 60.0 °C (touch), in still air" in text
    for f in sized:
        assert f"{f.face} {d.text(f.required, 'vessel_insulation')} (listed {d.text(f.commercial, 'vessel_insulation')})" \
            in text


def test_duct_against_wind_and_user_values_are_kept(app, panel, study):
    case = study.case
    panel.choices["shape"].value = "duct"
    panel.controls["duct_width"].widget.value = "1.2"           # m on screen
    panel.controls["contents_temperature"].widget.value = 30.0  # degC: the user's, no longer the line's
    panel.choices["sweep_input"].value = "wind_speed"
    assert panel.duct_width == pytest.approx(1.2) and panel.contents_temperature == pytest.approx(303.15)
    layers = [Layer(case.insulation_thickness, case.insulation_conductivity)]
    r = vessels.rectangular_duct(1.2, settings.VESSEL["duct_height"], settings.VESSEL["duct_length"],
                                 fluid_temperature=303.15, layers=layers, **_common(case))
    d = Display("SI")
    assert [panel.card_text(k) for k in range(4)] == [d.text(float(r.q_total), "face_loss"),
                                                      *(d.text(float(f.q_total), "face_loss") for f in r.faces)]
    grid = panel.view.sweep_values
    swept = vessels.rectangular_duct(1.2, settings.VESSEL["duct_height"], settings.VESSEL["duct_length"],
                                     fluid_temperature=303.15, layers=layers,
                                     **{**_common(case), "wind_speed": grid})
    for face in swept.faces:
        np.testing.assert_allclose(trace(panel.plot, face.name).y, d.value(face.q_total, "face_loss"), rtol=1e-9)
    assert panel.controls["vessel_height"].box.layout.display == "none"
    assert panel.choices["wind_direction"].layout.display is None
    # a change of the line keeps the user's contents temperature
    app.line.controls["air_temperature"].widget.value = 0.0
    assert panel.contents_temperature == pytest.approx(303.15)


def test_open_floor_is_insulated_like_the_other_exposed_faces(panel, study):
    case = study.case
    panel.choices["floor"].value = "open"
    layers = [Layer(case.insulation_thickness, case.insulation_conductivity)]
    r = vessels.vertical_tank(settings.VESSEL["vessel_diameter"], settings.VESSEL["vessel_height"],
                              fluid_temperature=case.fluid_temperature, wall_layers=layers, roof_layers=layers,
                              floor="open", floor_layers=layers, **_common(case))
    assert panel.card_text(3) == Display("SI").text(float(r.face("floor").q_total), "face_loss")
    assert [f.face for f in panel.view.sizing] == ["wall", "roof", "floor"]


def test_sphere_shows_one_face_and_converts_units(app, panel, study):
    panel.choices["shape"].value = "sphere"
    assert panel.cards[1].layout.display is None and panel.cards[2].layout.display == "none"
    assert panel.card_text(2) == ""
    case = study.case
    r = vessels.spherical_tank(settings.VESSEL["vessel_diameter"], fluid_temperature=case.fluid_temperature,
                               layers=[Layer(case.insulation_thickness, case.insulation_conductivity)],
                               **_common(case))
    app.units_switch.value = "US"
    assert panel.card_text(1) == Display("US").text(float(r.q_total), "face_loss")
    assert panel.card_text(1).endswith("Btu/h")
    assert "legs, nozzles" in panel.notes.value


def test_touch_sizing_at_a_design_hottest_air(panel, study):
    # convlib.vessels.insulation_per_face(..., hottest_air_temperature=...) is the reference: the panel shows its
    # thicknesses and the air it ran at, beside the hottest-air control
    case = study.case
    control = panel.controls["hottest_air_temperature"]
    assert control.si == pytest.approx(case.air_temperature)  # follows the line's air until set
    assert control.box.layout.display is None                # hot contents: shown
    control.widget.value = 40.0                               # degC on screen
    layers = lambda t: [Layer(t, case.insulation_conductivity)]  # noqa: E731

    def build(t, *, air_temperature=case.air_temperature, wind_speed=0.0):
        return vessels.vertical_tank(
            settings.VESSEL["vessel_diameter"], settings.VESSEL["vessel_height"],
            fluid_temperature=case.fluid_temperature, wall_layers=layers(t), roof_layers=layers(t),
            **{**_common(case), "air_temperature": air_temperature, "wind_speed": wind_speed})

    sized = vessels.insulation_per_face(build, surface_limit=333.15, hottest_air_temperature=313.15)
    d = Display("SI")
    text = panel.notes.value
    assert f"in still air at hottest air {d.text(313.15, 'air_temperature')}" in text
    for f in sized:
        assert f.air_temperature == pytest.approx(313.15) and f.wind_speed == 0.0
        assert f"{f.face} {d.text(f.required, 'vessel_insulation')}" in text
    # hotter air needs more insulation for the same touch limit
    cooler = vessels.insulation_per_face(build, surface_limit=333.15, hottest_air_temperature=283.15)
    assert all(a.required > b.required for a, b in zip(sized, cooler))


# --------------------------------------------------------------------------- horizontal tank
def test_horizontal_tank_cards_and_figure_equal_convlib(panel, study):
    case = study.case
    panel.choices["shape"].value = "horizontal_tank"
    assert panel.controls["vessel_length"].box.layout.display is None          # its sizes are shown
    assert panel.controls["vessel_height"].box.layout.display == "none"
    assert panel.choices["heads"].layout.display is None and panel.choices["floor"].layout.display == "none"
    panel.choices["heads"].value = "torispherical"
    panel.controls["vessel_length"].widget.value = "12"                        # m on screen
    assert panel.vessel_length == pytest.approx(12.0)
    layers = [Layer(case.insulation_thickness, case.insulation_conductivity)]
    r = vessels.horizontal_tank(settings.VESSEL["vessel_diameter"], 12.0, heads="torispherical",
                                fluid_temperature=case.fluid_temperature, shell_layers=layers, head_layers=layers,
                                **_common(case))
    d = Display("SI")
    assert [panel.card_text(k) for k in range(3)] == [d.text(float(r.q_total), "face_loss"),
                                                      *(d.text(float(f.q_total), "face_loss") for f in r.faces)]
    assert panel.cards[3].layout.display == "none"                              # two faces only
    bars = trace(panel.plot, "per face")
    assert list(bars.x) == ["shell", "heads"]
    grid = panel.view.sweep_values
    swept = vessels.horizontal_tank(settings.VESSEL["vessel_diameter"], 12.0, heads="torispherical",
                                    fluid_temperature=case.fluid_temperature,
                                    shell_layers=[Layer(grid, case.insulation_conductivity)],
                                    head_layers=[Layer(grid, case.insulation_conductivity)], **_common(case))
    np.testing.assert_allclose(trace(panel.plot, "total").y, d.value(swept.q_total, "face_loss"), rtol=1e-9)
    assert [f.face for f in panel.view.sizing] == ["shell", "heads"]
    assert "torispherical (F&D) heads" in html.unescape(panel.notes.value)


def test_heads_menu_shows_display_names(panel):
    labels = [label for label, _ in panel.choices["heads"].options]
    assert labels == ["2:1 ellipsoidal", "torispherical (F&D)", "hemispherical", "flat"]
    assert set(key for _, key in panel.choices["heads"].options) == set(vessels.HEADS)
    assert "horizontal tank" in [label for label, _ in panel.choices["shape"].options]
    assert not any("_" in label for label, _ in panel.choices["heads"].options + panel.choices["shape"].options)


def test_flat_heads_note_in_engineering_notation(panel):
    panel.choices["shape"].value = "horizontal_tank"
    panel.choices["heads"].value = "flat"
    assert "π D/4" in panel.notes.value and "pi D" not in panel.notes.value
    panel.reset()
    assert panel.heads == settings.VESSEL["heads"] and panel.shape == settings.VESSEL["shape"]
