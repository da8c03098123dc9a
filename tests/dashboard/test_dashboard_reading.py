"""The dashboard as an engineer reads it: names, symbols, units and axes (headless, issue 16 points 1–4, 8)."""
from __future__ import annotations

import re

import numpy as np
import pytest
from convlib.correlations import REGISTRY
from convlib.pipe_sizes import nominal_pipe, nominal_sizes
from convlib.study import evaluate_case

from dashboard import compute, figures, settings
from dashboard.display import NPS_OUTSIDE_INCH, Display, regime_text
from dashboard.panels.snapshots import is_temporary
from dashboard_helpers import show

_CODE = re.compile(r"[a-z]+_[a-z_]+")  # a code identifier such as churchill_chu or sky_view_fraction


def _labels(widget) -> list[str]:
    return [label for label, _ in widget.options]


def test_law_menus_and_legends_use_authors_names(app):
    line = app.line
    # authors as published, e.g. Churchill & Chu (1975), Churchill & Bernstein (1977) (registry citations)
    assert _labels(line.natural)[0] == "Churchill–Chu (default)"
    assert _labels(line.forced)[0] == "Churchill–Bernstein (default)"
    assert "Morgan" in _labels(line.natural) and "Zukauskas" in _labels(line.forced)
    for widget in (line.natural, line.forced, line.shape, app.sweep.selector, app.spread.selector):
        assert not [t for t in _labels(widget) if _CODE.search(t)], _labels(widget)
    for key in ("sweep", "regimes", "spread"):
        show(app, key)
        names = [t.name for t in app.panels[key].plot.data if t.name]
        assert names and not [n for n in names if _CODE.search(n)], names
    bars = next(t for t in app.spread.plot.data if t.type == "bar")
    assert "Churchill–Bernstein" in list(bars.x[1]) and not [x for x in bars.x[1] if "_" in x]


def test_every_registered_law_has_a_display_name_without_code_identifiers():
    for rec in REGISTRY:
        assert rec.display_name and "_" not in rec.display_name, rec.key


def test_cards_use_the_trade_symbols_and_say_what_the_regime_means(app):
    cards = app.line.cards
    assert ">h convection<" in cards["h_convection"].value and ">h radiation<" in cards["h_radiation"].value
    assert "text-transform" not in __import__("dashboard.style", fromlist=["CSS"]).CSS.split(".cl-card-title")[1] \
        .split("}")[0]
    r = evaluate_case(app.spec.case)
    # the demo line in wind: Re of order 10^4–10^5, subcritical, so the boundary layer is laminar
    assert 1e3 < float(r.reynolds) < 2e5
    assert app.line.card_text("regime") == "forced, laminar boundary layer"
    assert regime_text("natural", "turbulent") == "natural, turbulent boundary layer"
    assert "×10" in cards["regime"].value and "e+" not in cards["regime"].value  # Ra 1.8×10⁷, not 1.8e+07


def test_regime_chart_has_one_case_marker_in_the_legend_and_readable_log_axes(app):
    show(app, "regimes")
    plot = app.regimes.plot
    in_legend = [t for t in plot.data if t.name == "this case" and t.showlegend is not False]
    assert len(in_legend) == 1
    layout = plot.layout
    for axis in (layout.xaxis, layout.yaxis, layout.xaxis3, layout.yaxis3):  # Nu–Ra and Nu–Re charts
        assert axis.type == "log" and axis.exponentformat == "power" and axis.dtick in (1, 2, 3)
    for axis in (layout.xaxis2, layout.yaxis2):  # the mode map: 1-2-5 labels written plainly
        mantissas = {float(f"{v / 10 ** np.floor(np.log10(v)):.6g}") for v in axis.tickvals}
        assert mantissas <= {1.0, 2.0, 5.0} and len(axis.tickvals) == len(axis.ticktext)
        assert all(re.fullmatch(r"[0-9.]+", t) for t in axis.ticktext)


def test_spread_follows_the_swept_input(app):
    app.sweep.sweep_input = "emissivity"
    show(app, "spread")
    assert app.spread.sweep_input == "emissivity" and app.spread.x_axis == "input"
    assert app.spread.x_toggle.options[0][0] == "against emissivity"
    assert app.spread.plot.layout.xaxis.title.text == "Emissivity"


def test_us_units_are_the_trades(app):
    app.units = "US"
    line = app.line
    assert "[mph]" in line.controls["wind_speed"].widget.description
    # 10 mph = 4.4704 m/s exactly (international mile, NIST SP 811)
    assert Display("US").scalar(4.4704, "wind_speed") == pytest.approx(10.0, rel=1e-12)
    nps6 = next(label for label, value in line.nps.options if value == 6.0)
    assert nps6 == "NPS 6 · 6.625 in"  # ASME B36.10M: NPS 6 outside diameter 6.625 in
    assert line.controls["diameter"].widget.value == pytest.approx(6.625, abs=1e-12)
    assert line.card_text("q_per_length").endswith("Btu/h·ft")
    assert "°F" in line.cards["surface_temperature"].value and "°C" not in line.cards["surface_temperature"].value
    show(app, "insulation")
    assert "°C" not in app.insulation.summary.value and "degC" not in app.insulation.summary.value


def test_inch_outside_diameters_agree_with_the_metric_table():
    """Each inch value equals the millimetre column of ASME B36.10M (as carried by the fluids package,
    fluids.piping.schedule_lookup) within its rounding: 0.1 mm to NPS 12, whole millimetres above."""
    for schedule in ("40", "80", "10", "STD", "XS", "10S"):
        for nps in nominal_sizes(schedule):
            mm = nominal_pipe(nps, schedule).outer_diameter * 1000
            inch = NPS_OUTSIDE_INCH[nps]
            assert abs(inch * 25.4 - mm) <= (0.05 if nps < 14 else 0.5) + 1e-9, (schedule, nps, inch, mm)
            assert float(Display("US").value(mm / 1000, "diameter")) == pytest.approx(inch, abs=1e-12)
    assert Display("US").text(0.15, "diameter") == "5.906 in"  # not a pipe size: converted as it is


def test_messages_show_temperatures_in_the_unit_system():
    # 60 degC = 140 degF and a 3 K difference = 5.4 degF (definitions of the scales, NIST SP 811 B.8)
    assert Display("US").localize("above about 60 degC; a margin of 3 K") == "above about 140 °F; a margin of 5.4 °F"
    assert Display("SI").localize("above about 60 degC") == "above about 60 °C"


def test_snapshots_go_to_a_persistent_folder_under_home(monkeypatch, tmp_path):
    monkeypatch.delenv("CONVLIB_SNAPSHOT_DIR", raising=False)
    monkeypatch.delenv("CONVLIB_HOME", raising=False)
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    assert settings.snapshot_dir() == tmp_path / "home" / ".convlib" / "snapshots"
    monkeypatch.setenv("CONVLIB_HOME", str(tmp_path / "site"))
    assert settings.snapshot_dir() == tmp_path / "site" / "snapshots"
    monkeypatch.setenv("CONVLIB_SNAPSHOT_DIR", str(tmp_path / "chosen"))
    assert settings.snapshot_dir() == tmp_path / "chosen"
    import tempfile
    from pathlib import Path

    assert is_temporary(Path(tempfile.gettempdir()) / "convlib-snapshots-x")
    assert not is_temporary(Path("/srv/convlib/snapshots"))


def test_snapshot_panel_shows_its_folder_and_warns_when_it_is_temporary(app):
    panel = app.snapshots
    assert str(app.snapshot_dir) in panel.where.value
    assert ("temporary" in panel.where.value) == is_temporary(app.snapshot_dir)


def test_numbers_use_tabular_figures_and_the_verification_text_a_fixed_width_font():
    from dashboard.style import CSS

    assert "font-variant-numeric: tabular-nums" in CSS
    pre = CSS.split("pre.cl-pre {")[1].split("}")[0]
    assert "monospace" in pre


def test_log_tick_helpers():
    assert figures.decade_ticks([1e-4, 1e14])["dtick"] == 3
    assert figures.one_two_five_ticks([0.01, 20.0])["ticktext"][:4] == ["0.01", "0.02", "0.05", "0.1"]


def test_tab_titles_are_short_own_names():
    titles = [t for _, t in settings.PANELS]
    assert max(len(t) for t in titles) <= 13 and "Correlations" in titles


def test_regime_view_still_air_keeps_one_legend_entry(app, study):
    case = study.case.model_copy(update={"wind_speed": 0.0})
    summary = compute.summarize_case(case)
    fig = figures.regime_figure(compute.regime_view(case, summary), None, Display())
    assert [t.name for t in fig.data if t.name == "this case" and t.showlegend is not False] == ["this case"]


def test_tank_notes_write_formulas_as_engineers_do(app):
    show(app, "vessels")
    notes = app.vessels.notes.value
    assert "π D²/4" in notes and "pi D^2" not in notes  # the roof's area, from convlib.vessels' note
