"""Headless tests of the "Survey" tab: the ranked table, totals and chart equal convlib.upgrade called directly on
the demo survey (same weather bins, costs, tariffs, samples and seed as the tab); the filter; uploads that cannot
be used leave the shown result as it was and say why; US customary units.

Expected numbers are convlib's own (:func:`convlib.upgrade.upgrade_study` and :func:`~convlib.upgrade.ranked`
called afresh here): the tab must show them, not compute its own. Unit factors name their source beside them.
"""
from __future__ import annotations

import datetime
import html

import numpy as np
import pytest
from convlib.survey import CAUTIONS, Measurement, demo_survey_path, read_survey
from convlib.upgrade import CostTable, StudySettings, demo_costs_path, ranked, totals, upgrade_study
from convlib.weather import demo_weather_path, read_epw, to_bins

from dashboard import settings
from dashboard.compute import survey as compute_survey
from dashboard.panels import survey as survey_panel

from dashboard_helpers import show

#: Watts in one Btu_IT per hour: 1 Btu_IT = 1055.05585262 J (NIST SP 811, Appendix B.8), / 3600 s.
W_PER_BTU_PER_HOUR = 1055.05585262 / 3600.0
#: Joules in 1 MMBtu (10^6 Btu_IT, NIST SP 811) and in 1 kWh (3.6 MJ, by definition).
J_PER_MMBTU, J_PER_KWH = 1055.05585262e6, 3.6e6
#: Kilograms in one avoirdupois pound (exact, NIST SP 811 B.8); millimetres in an inch (exact).
KG_PER_LB, MM_PER_INCH = 0.45359237, 25.4


def _expected(payback_years=3.0):
    """convlib's ranked list for the demo survey, set up as the command line's ``--demo`` does (3 K weather
    bins, wind classes from 0, 1, 3 and 6 m/s; demo cost table and tariffs), 200 samples, the default seed."""
    bins = to_bins(read_epw(demo_weather_path()), 3.0, (0.0, 1.0, 3.0, 6.0))
    s = StudySettings(bins, CostTable.read(demo_costs_path()), Measurement(samples=200, seed=20261203),
                      payback_years=payback_years)
    lines, errors = read_survey(demo_survey_path())
    assert errors == []
    return ranked(upgrade_study(lines, s))


@pytest.fixture(scope="module")
def expected():
    return _expected()


@pytest.fixture
def panel(app):
    show(app, "survey")
    return app.survey


def _column(panel, header):
    found = [c for c in panel.columns() if c.header == header]
    assert len(found) == 1, [c.header for c in panel.columns()]
    return found[0]


def _upload(panel, name: str, data: bytes) -> None:
    panel.upload.value = ({"name": name, "type": "text/csv", "size": len(data), "content": memoryview(data),
                           "last_modified": datetime.datetime.now(datetime.timezone.utc)},)


def _demo_bytes() -> bytes:
    return demo_survey_path().read_bytes()


def test_the_demo_survey_is_preloaded_and_equals_convlib(panel, expected):
    v = panel.view
    assert v is not None and v.source.demo and v.samples == settings.SURVEY["samples"] == 200
    assert list(_column(panel, "Tag").texts) == [str(t) for t in expected["tag"]]
    assert list(_column(panel, "Rank").values) == [float(r) for r in expected["rank"]]
    assert list(_column(panel, "Area").texts) == [str(a) for a in expected["area"]]
    assert list(_column(panel, "Condition").texts) == [str(c) for c in expected["condition"]]
    # heat of a whole line in kW (1 kW = 1000 W), as magnitudes: the side column says loss or gain
    np.testing.assert_allclose(_column(panel, "Heat now [kW]").values, np.abs(expected["q_now"]) / 1000, rtol=1e-12)
    np.testing.assert_allclose(_column(panel, "As designed [kW]").values, np.abs(expected["q_design"]) / 1000,
                               rtol=1e-12)
    assert list(_column(panel, "Side").texts) == [str(s) for s in expected["service"]]
    for header, key in (("Cost", "investment"), ("Saving a year P5", "saving_p5"), ("P50", "saving_p50"),
                        ("P95", "saving_p95"), ("Payback [years]", "payback_p50")):
        np.testing.assert_array_equal(_column(panel, header).values, expected[key].astype(float))
    np.testing.assert_allclose(_column(panel, "Pays back in 3 years").values, 100 * expected["probability_payback"])
    options = _column(panel, "Best option").texts
    for text, option, worth in zip(options, expected["option"], expected["worth_doing"]):
        assert text.split(" (")[0].split(" of ")[0].split(" at ")[0] == option.split(" at ")[0]
        assert text.endswith("(not worth it)") == (not worth)
    # the thickness of a replacement in mm, as convlib names it
    for text, option in zip(options, expected["option"]):
        if option.startswith("replace at"):
            assert float(text.split(" at ")[1].split(" mm")[0]) == pytest.approx(float(option.split()[2]))


def test_totals_keep_hot_losses_and_cold_gains_apart(panel, expected):
    want = totals(expected)
    assert panel.view.totals == want
    assert want["hot"]["lines"] > 0 and want["cold"]["lines"] > 0      # the demo has both sides
    d = panel.display
    assert panel.card_text(0) == d.text(abs(want["hot"]["q_now"]), "survey_heat")
    assert panel.card_text(2) == d.text(abs(want["cold"]["q_now"]), "survey_heat")
    assert panel.card_text(1) == f"{want['hot']['investment']:,.0f} to invest"
    assert "Hot lines, heat lost" in panel.cards[0].value and "Cold lines, heat gained" in panel.cards[2].value
    assert f"{want['hot']['saving_p50']:,.0f} a year" in panel.cards[1].value


def test_chart_one_marker_per_line_with_p5_p95_bars(panel, expected):
    plot = panel.plot
    for service in ("hot", "cold"):
        m = expected["service"] == service
        (t,) = [t for t in plot.data if t.name.startswith(f"{service} line")]
        np.testing.assert_array_equal(t.x, expected["investment"][m].astype(float))
        np.testing.assert_array_equal(t.y, expected["saving_p50"][m])
        np.testing.assert_allclose(t.error_y.array, expected["saving_p95"][m] - expected["saving_p50"][m])
        np.testing.assert_allclose(t.error_y.arrayminus, expected["saving_p50"][m] - expected["saving_p5"][m])
        assert [text.split(" · ")[0] for text in t.text] == [str(tag) for tag in expected["tag"][m]]
    (line,) = [t for t in plot.data if t.name == "pays back in 3 years"]
    assert line.y[1] == pytest.approx(line.x[1] / 3.0)


def test_payback_horizon_is_an_input(panel):
    panel.years_box.value = 5.0
    assert panel.view.payback_years == 5.0
    want = _expected(5.0)
    np.testing.assert_allclose(_column(panel, "Pays back in 5 years").values, 100 * want["probability_payback"])


def test_filter_by_tag_text_and_area(panel, expected):
    demo = read_survey(demo_survey_path())[0]
    in_yard = {str(t) for t, a in zip(demo.tag, demo.area) if "yard" in a}
    panel.filter_text = "YARD"                       # any case, tag or area
    assert set(_column(panel, "Tag").texts) == in_yard == {"FS-103", "FS-104", "FS-105"}
    shown = sorted(x for t in panel.plot.data if t.name.endswith(")") for x in t.x)
    assert shown == sorted(float(c) for c, tag in zip(expected["investment"], expected["tag"]) if tag in in_yard)
    panel.filter_text = "fs-30"
    assert set(_column(panel, "Tag").texts) == {"FS-301", "FS-302", "FS-303"}
    panel.filter_text = ""
    panel.area_box.value = "chiller plant"
    assert set(_column(panel, "Tag").texts) == {"FS-301", "FS-302"}
    assert [o[0] for o in panel.area_box.options][0] == survey_panel.ALL_AREAS
    panel.filter_text = "FS-1"                        # both filters: nothing in the chiller plant
    assert "No line matches the filter" in panel.table.value
    assert all(len(t.x or ()) == 0 for t in panel.plot.data)
    panel.filter_text, panel.area_box.value = "", ""
    assert len(_column(panel, "Tag").texts) == len(expected["tag"])


@pytest.mark.parametrize("name, data, reason", [
    ("columns.csv", b"a,b\n1,2\n", "unknown survey column"),
    ("latin1.csv", "tag,area\nFS-1,H\xe4lle\n".encode("latin-1"), "not UTF-8"),
    ("empty.csv", b"", "empty"),
    ("path.csv", b"/etc/passwd", "unknown survey column"),             # text, never opened as a path
    ("allbad.csv", _demo_bytes().replace(b",40,", b",40x,"), "no line could be computed"),
])
def test_a_bad_upload_leaves_the_result_unchanged(panel, name, data, reason):
    before = panel.view
    table, cards = panel.table.value, [c.value for c in panel.cards]
    _upload(panel, name, data)
    assert panel.view is before and panel.table.value == table and [c.value for c in panel.cards] == cards
    assert "cl-msg-error" in panel.message.value
    assert reason in html.unescape(panel.message.value) and name in html.unescape(panel.message.value)
    assert panel.source.demo                                        # put back: the next change uses the demo
    panel.years_box.value = 4.0
    assert panel.view.source.demo and panel.view.payback_years == 4.0


def test_an_upload_over_the_size_cap_is_refused(panel, monkeypatch):
    monkeypatch.setattr(survey_panel, "SURVEY_MAX_BYTES", 100)
    monkeypatch.setattr(compute_survey, "SURVEY_MAX_BYTES", 100)
    before = panel.view
    _upload(panel, "big.csv", _demo_bytes())
    assert panel.view is before and "larger than" in panel.message.value and panel.source.demo
    monkeypatch.setattr(survey_panel, "SURVEY_MAX_BYTES", 10**9)
    _upload(panel, "big.csv", _demo_bytes())                         # the compute layer checks too
    assert panel.view is before and "larger than" in panel.message.value


def test_an_uploaded_survey_is_shown_with_its_bad_rows_listed(panel):
    data = _demo_bytes().replace(b"FS-104,yard rack,outdoor,3,40,35,160,60", b"FS-104,yard rack,outdoor,3,40,35,160,")
    _upload(panel, "site.csv", data)
    v = panel.view
    assert not v.source.demo and v.source.name == "site.csv" and v.lines == 11
    assert [e[1] for e in v.errors] == ["FS-104"]
    assert "FS-104" in panel.notes.value and "site.csv" in panel.shown.value
    assert "FS-104" not in _column(panel, "Tag").texts
    panel.demo_button.click()
    assert panel.view.source.demo and panel.view.lines == 12


def test_us_customary_units(app, panel, expected):
    app.units = "US"
    heat = _column(panel, "Heat now [Btu/h]").values
    np.testing.assert_allclose(heat, np.abs(expected["q_now"]) / W_PER_BTU_PER_HOUR, rtol=1e-9)
    np.testing.assert_array_equal(_column(panel, "Cost").values, expected["investment"].astype(float))  # money
    for text, option, thickness in zip(_column(panel, "Best option").texts, expected["option"],
                                       expected["thickness"]):
        if option.startswith("replace at"):
            inches = float(text.split(" at ")[1].split(" in")[0])
            assert inches == pytest.approx(1000 * thickness / MM_PER_INCH, rel=5e-3)   # 3 significant digits
            assert " mm" not in text
    t = panel.view.totals["hot"]
    assert panel.card_text(0).endswith("Btu/h")
    assert float(panel.card_text(0).split()[0].replace(",", "")) == pytest.approx(abs(t["q_now"]) / W_PER_BTU_PER_HOUR,
                                                                                  rel=5e-3)
    energy = html.unescape(panel.cards[0].value).split("; ")[1].split(" MMBtu")[0]
    assert float(energy.replace(",", "")) == pytest.approx(t["excess_kwh_p50"] * J_PER_KWH / J_PER_MMBTU, rel=5e-3)
    co2 = html.unescape(panel.cards[1].value).split("CO₂ ")[1].split(" lb")[0]
    assert float(co2.replace(",", "")) == pytest.approx(t["co2_saved_kg_p50"] / KG_PER_LB, rel=5e-3)
    assert "°F" in panel.notes.value and " K," not in panel.notes.value    # the thermometer bound in °F


def test_cautions_and_sampling_are_on_the_tab(panel):
    text = html.unescape(panel.cautions.value)
    for caution in CAUTIONS:
        assert caution in text
    assert "asbestos" in text and "Local codes" in text
    notes = html.unescape(panel.notes.value)
    assert "200 samples per line" in notes and "seed 20261203" in notes


def test_a_new_case_does_not_recompute_the_survey(app, panel):
    before = panel.view
    app.line.controls["wind_speed"].widget.value = 5.0
    assert app.line.case.wind_speed == pytest.approx(5.0)
    assert panel.view is before and "survey" not in app.store.stale


def test_the_survey_figure_is_valid_plotly(monkeypatch, panel):
    """Built with plotly's property checks on (the app builds figures without them), in both unit systems,
    with every line, a filter keeping a few, and none."""
    import plotly.graph_objects as go

    from dashboard import plotting
    from dashboard.display import Display
    from dashboard.figures_survey import survey_figure

    monkeypatch.setattr(plotting, "VALIDATE", True)
    v = panel.view
    for system in ("SI", "US"):
        for keep in (None, v.matching("yard"), v.matching("no such tag")):
            fig = survey_figure(v, Display(system), keep)
            go.Figure(fig.to_dict())
            assert fig.layout.title.text
