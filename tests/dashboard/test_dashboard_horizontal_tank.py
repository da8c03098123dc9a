"""Headless tests of the horizontal tank on the "Tanks & ducts" panel: cards, figure and sizing equal
convlib.vessels.horizontal_tank called directly; the menus show display names, never code identifiers."""
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
