"""Headless tests of the "In operation" panel: cards and figures equal convlib.operation called directly."""
from __future__ import annotations

import html

import numpy as np
import pytest
from convlib import operation as op
from convlib.pipe import Layer
from convlib.pipe_sizes import nominal_pipe

from dashboard import compute, figures, plotting, settings
from dashboard.display import Display

from dashboard_helpers import show, trace


def _layers(case, thickness=None):
    thickness = case.insulation_thickness if thickness is None else thickness
    return [Layer(thickness, case.insulation_conductivity), Layer(case.jacket_thickness, case.jacket_conductivity)]


def _options(case):
    return dict(jacket_emissivity=case.emissivity, sky_view_fraction=case.sky_view_fraction, pressure=case.pressure)


@pytest.fixture
def panel(app):
    show(app, "operation")
    return app.operation


def test_cards_and_profile_equal_convlib_operation(app, panel, study):
    case = study.case
    panel.controls["mass_flow"].widget.value = 0.5            # kg/s on screen
    panel.controls["design_wind_speed"].widget.value = 12.0   # m/s
    assert panel.mass_flow == pytest.approx(0.5) and panel.design_wind_speed == pytest.approx(12.0)
    coldest = case.air_temperature - settings.OPERATION["design_air_drop"]
    wall = nominal_pipe(6, "40").wall_thickness  # the demo line is 6 in (168.3 mm)
    assert panel.design_air_temperature == pytest.approx(coldest)
    assert panel.pipe_wall_thickness == pytest.approx(wall)

    profile = op.line_temperature_profile(case.diameter, case.fluid_temperature, _layers(case), mass_flow=0.5,
                                          length=case.length, air_temperature=case.air_temperature,
                                          fluid_pressure=settings.OPERATION["fluid_pressure"],
                                          wind_speed=case.wind_speed, **_options(case))
    duty = op.tracing_duty(case.diameter, settings.OPERATION["maintain_temperature"], _layers(case),
                           air_temperature=coldest, wind_speed=12.0, margin=op.TRACING_MARGIN, length=case.length,
                           **_options(case))
    freeze = op.freeze_time(case.diameter, wall, settings.OPERATION["initial_temperature"], _layers(case),
                            air_temperature=coldest, wind_speed=12.0, **_options(case))
    d = Display("SI")
    assert panel.card_text("outlet_temperature") == d.text(float(profile.outlet_temperature), "outlet_temperature")
    assert panel.card_text("line_loss") == d.text(float(profile.q_total), "line_loss")
    assert panel.card_text("tracing_per_length") == d.text(float(duty.duty_per_length), "tracing_per_length")
    assert d.text(float(duty.duty_total), "tracing_total") in panel.cards["tracing_per_length"].value
    assert panel.card_text("time_to_freezing_point") == d.text(float(freeze.time_to_freezing_point),
                                                               "freeze_time")
    assert panel.card_text("time_to_frozen") == d.text(float(freeze.time_total), "freeze_time")
    assert panel.card_text("time_to_frozen").endswith(" h")
    line = trace(panel.plot, "fluid temperature")
    np.testing.assert_allclose(line.x, profile.position, rtol=1e-9)
    np.testing.assert_allclose(line.y, d.value(profile.temperature, "fluid_temperature"), rtol=1e-9)
    for caution in (op.CAUTION_FREEZE, op.CAUTION_TRACING):
        assert caution[:40] in panel.notes.value.replace("&#x27;", "'")


def test_saturated_steam_shows_condensate_from_convlib_steam_line(panel, study):
    case = study.case
    panel.controls["fluid_pressure"].widget.value = "3.5"  # bar(a) on screen
    panel.service_box.value = "steam"
    assert panel.service == "steam" and panel.fluid_pressure == pytest.approx(3.5e5)
    s = op.steam_line(case.diameter, 3.5e5, _layers(case), air_temperature=case.air_temperature,
                      wind_speed=case.wind_speed, length=case.length, **_options(case))
    d = Display("SI")
    assert panel.card_text("condensate") == d.text(float(s.condensate_rate), "condensate_rate")
    assert panel.card_text("condensate").endswith(" kg/h")
    assert panel.cards["outlet_temperature"].layout.display == "none"
    assert panel.controls["mass_flow"].box.layout.display == "none"
    assert panel.card_text("line_loss") == d.text(float(s.q_total), "line_loss")
    flat = trace(panel.plot, "fluid temperature")
    np.testing.assert_allclose(flat.y, d.value(np.full(2, float(s.saturation_temperature)), "fluid_temperature"))
    grid = panel.view.sweep_values
    swept = op.steam_line(case.diameter, 3.5e5, _layers(case), air_temperature=case.air_temperature, wind_speed=grid,
                          length=case.length, **_options(case))
    np.testing.assert_allclose(trace(panel.sweep_plot, "condensate").y,
                               d.value(np.asarray(swept.condensate_rate), "condensate_rate"), rtol=1e-9)
    notes = panel.notes.value
    assert "saturated steam at the pressure given" in notes and "trap" in notes  # case at 160 C, steam at 138.9 C
    panel.service_box.value = "water"  # liquid at 160 C boils at 3.5 bar: said, not computed
    assert "boil" in panel.message.value and panel.view.inputs.service == "steam"
    panel.controls["fluid_pressure"].widget.value = "10"
    assert panel.cards["outlet_temperature"].layout.display is None and panel.view.inputs.service == "water"


def test_sweep_against_insulation_is_vectorized_convlib(panel, study):
    case = study.case
    panel.sweep_input = "insulation_thickness"
    v = panel.view
    grid = v.sweep_values
    assert len(grid) == settings.OPERATION["sweep_points"] and grid[-1] >= 2 * case.insulation_thickness
    duty = op.tracing_duty(case.diameter, panel.maintain_temperature, _layers(case, grid),
                           air_temperature=panel.design_air_temperature, wind_speed=panel.design_wind_speed,
                           **_options(case))
    profile = op.line_temperature_profile(case.diameter, case.fluid_temperature, _layers(case, grid),
                                          mass_flow=panel.mass_flow, length=case.length,
                                          air_temperature=case.air_temperature, fluid_pressure=panel.fluid_pressure,
                                          wind_speed=case.wind_speed, **_options(case))
    d = Display("SI")
    plot = panel.sweep_plot
    np.testing.assert_allclose(trace(plot, "tracing duty").y, duty.duty_per_length, rtol=1e-9)
    np.testing.assert_allclose(trace(plot, "outlet temperature").y,
                               d.value(profile.outlet_temperature, "outlet_temperature"), rtol=1e-9)
    np.testing.assert_allclose(trace(plot, "tracing duty").x, d.value(grid, "insulation_thickness"))
    assert "Insulation thickness [mm]" == plot.layout.xaxis3.title.text
    # thicker insulation: less duty, later freezing
    assert np.all(np.diff(duty.duty_per_length) < 0)
    frozen = np.asarray(trace(plot, "time to frozen solid").y, dtype=float)
    assert np.all(np.diff(frozen[np.isfinite(frozen)]) > 0)


def test_units_switch_converts_cards_and_controls(app, panel):
    si = panel.card_text("outlet_temperature")
    app.units_switch.value = "US"
    us = Display("US")
    v = panel.view
    assert si.endswith("°C") and panel.card_text("outlet_temperature").endswith("°F")
    assert panel.card_text("outlet_temperature") == us.text(v.outlet_temperature, "outlet_temperature")
    assert panel.card_text("tracing_per_length") == us.text(v.tracing_per_length, "tracing_per_length")
    assert panel.card_text("line_loss").endswith("Btu/h")
    assert panel.controls["mass_flow"].widget.description == "Mass flow [lb/h]"
    assert panel.controls["mass_flow"].widget.value == pytest.approx(us.value(v.inputs.mass_flow, "mass_flow"),
                                                                     abs=0.01)
    assert "[ft]" in panel.plot.layout.xaxis.title.text and "°F" in panel.plot.layout.yaxis.title.text
    # a value typed in US units arrives in SI
    panel.controls["mass_flow"].widget.value = 3600.0  # lb/h
    assert panel.mass_flow == pytest.approx(3600.0 * 0.45359237 / 3600.0)


def test_warm_air_never_freezes(app, panel):
    panel.controls["design_air_temperature"].widget.value = 5.0  # °C
    assert panel.view.time_to_frozen == np.inf
    assert panel.card_text("time_to_frozen") == "never"
    # the user's coldest air is kept when the line changes
    app.line.controls["wind_speed"].widget.value = 4.0
    assert panel.design_air_temperature == pytest.approx(278.15)


def test_bare_case_shows_the_message(app, panel):
    app.line.kind.value = "bare"
    assert "insulated lines with a known fluid temperature" in panel.message.value
    assert panel.results.layout.display == "none"
    app.line.kind.value = "insulated"
    assert panel.results.layout.display is None and "cl-msg" not in panel.message.value


def test_hidden_panel_waits_until_shown(app):
    show(app, "sweep")
    app.line.controls["wind_speed"].widget.value = 5.0
    assert app.operation.stale and app.operation.view is None
    show(app, "operation")
    assert not app.operation.stale and app.operation.view.wind_speed == pytest.approx(5.0)


def test_operation_figures_are_valid_plotly(monkeypatch, study):
    import plotly.graph_objects as go

    monkeypatch.setattr(plotting, "VALIDATE", True)
    case = study.case
    inputs = compute.OperationInputs(1.0, 1.0e6, 278.15, 253.15, 10.0, 0.2, 278.15, 0.007)
    view = compute.operation_view(case, inputs, "air_temperature")
    for fig in (figures.operation_profile_figure(view, Display("US")), figures.operation_sweep_figure(view, Display())):
        go.Figure(fig.to_dict())
        assert fig.layout.title.text
    assert np.isnan(view.sweep_frozen[-1])  # warm air: never freezes, a gap


def test_demo_site_lines_in_operation_are_listed_with_convlib_numbers():
    import html

    from convlib.demo import load_demo_site, operation_rows

    from dashboard import compute

    rows, _ = operation_rows(load_demo_site()["operation"], numbers=True)
    assert compute.demo_site_operation() == tuple(rows)
    plain, _ = operation_rows(load_demo_site()["operation"])
    assert [{k: r[k] for k in ("tag", "what", "result")} for r in rows] == plain  # what the command line prints
    from dashboard.panels.operation import _site_table

    table = _site_table(compute.demo_site_operation(), Display("SI"))
    assert "(SI units)" not in table
    for row in rows:  # long line, steam main, traced line, outdoor water line, tank
        assert row["tag"] in table and html.escape(row["result"]) in table


def test_demo_site_lines_in_operation_read_in_us_units(app, panel):
    import html

    app.units_switch.value = "US"
    table = html.unescape(panel.site.value)
    rows = {r["tag"]: r for r in panel.view.site_rows}
    # conversions by the exact factors of NIST SP 811 (2008), appendix B: 1 ft = 0.3048 m, 1 lb = 0.45359237 kg,
    # 1 mph = 0.44704 m/s, t[°F] = 1.8 t[°C] + 32, 1 Btu_IT/h = 0.29307107 W
    long_line = rows["FH-150"]["values"]
    assert long_line["length"]["value"] == 1400.0 and "outlet after 4,593 ft" in table      # 1400 / 0.3048 = 4593.2
    assert long_line["mass_flow"]["value"] == 12.0 and "at 95,240 lb/h" in table             # 12*3600/0.45359237
    assert "239.0 °F ->" in table                                                              # 115 °C
    assert "26.8 mph" in table and "-7.6 °F" in table                                          # 12 m/s; -22 °C
    loss = long_line["loss"]["value"]
    assert f"loss {round(loss / 0.29307107):,} Btu/h" in table
    tank = rows["FH-T2"]["values"]
    assert f"tank {tank['diameter']['value'] / 0.3048:.2f} ft x {tank['height']['value'] / 0.3048:.2f} ft" in table
    assert "psi(a)" in table and "Btu/h·ft" in table and " h," in table
    for si in ("°C", " kW", "kg/", " m ", "m/s", "W/m", "bar"):
        assert si not in table, si
    app.units_switch.value = "SI"
    assert "1400 m at 12 kg/s" in html.unescape(panel.site.value)


def _transient_options(case):
    return dict(jacket_emissivity=case.emissivity, air_temperature=case.air_temperature, wind_speed=case.wind_speed,
                sky_view_fraction=case.sky_view_fraction, pressure=case.pressure)


def test_cool_down_and_warm_up_cards_equal_convlib_transients(app, panel, study):
    from convlib.transients import CAUTION_COOL_DOWN, CAUTION_WARM_UP, cool_down_time, warm_up_condensate

    case = study.case
    wall = nominal_pipe(6, "40").wall_thickness
    # defaults that follow the line: halfway from 160 to 8 degC, steam saturated at the fluid temperature
    assert panel.cool_to_temperature == pytest.approx(273.15 + 84.0)
    # IAPWS-IF97 (Wagner et al. 2000, saturation table): 160 degC saturates at 6.18 bar; default to 0.1 bar
    assert panel.warm_up_pressure == pytest.approx(6.2e5)
    panel.controls["cool_to_temperature"].widget.value = 100.0  # °C
    panel.controls["warm_up_pressure"].widget.value = 8.0       # bar(a)
    panel.controls["warm_up_time"].widget.value = 45.0          # min
    assert panel.warm_up_time == pytest.approx(2700.0) and panel.warm_up_pressure == pytest.approx(8e5)
    cool = cool_down_time(case.diameter, wall, case.fluid_temperature, 373.15, _layers(case),
                          fluid_pressure=panel.fluid_pressure, **_transient_options(case))
    warm = warm_up_condensate(case.diameter, wall, 8e5, case.air_temperature, 2700.0, _layers(case),
                              length=case.length, **_transient_options(case))
    for system in ("SI", "US"):
        app.units_switch.value = system
        d = Display(system)
        assert panel.card_text("cool_down") == d.text(float(cool.time), "cool_down_time")
        assert panel.card_text("warm_up") == d.text(float(warm.warm_up_condensate), "warm_up_condensate")
        assert d.text(float(warm.mean_condensate_rate), "condensate_rate") in panel.cards["warm_up"].value
        assert d.text(373.15, "cool_to_temperature") in panel.cards["cool_down"].value
    assert panel.card_text("warm_up").endswith(" lb") and panel.card_text("cool_down").endswith(" h")
    notes = html.unescape(panel.notes.value)
    for caution in (CAUTION_COOL_DOWN, CAUTION_WARM_UP):
        assert caution in notes


def test_cool_down_past_the_air_says_why_and_steam_has_none(app, panel, study):
    panel.controls["cool_to_temperature"].widget.value = 0.0  # °C: below the 8 °C air, a line never gets there
    assert panel.card_text("cool_down") == "–"
    assert "same side of the air" in html.unescape(panel.notes.value)
    assert panel.card_text("warm_up").endswith(" kg")  # the warm-up still shows
    panel.controls["fluid_pressure"].widget.value = "3.5"
    panel.service_box.value = "steam"
    assert "liquid-filled lines only" in panel.cards["cool_down"].value
