"""Upgrade study: cost table, options, savings and economics against independent hand calculations."""
import numpy as np
import pytest

from convlib.design import WeatherBins, annual_energy
from convlib.economics import Finance, Tariff
from convlib.errors import InputError
from convlib.pipe import Layer
from convlib.survey import Measurement, demo_survey_path, read_survey
from convlib.upgrade import CostTable, StudySettings, demo_costs_path, ranked, totals, upgrade_study

BINS = WeatherBins([268.15, 281.15, 293.15], [4.0, 2.0, 1.0], [1500, 4500, 2760])
EXACT = Measurement(thermometer=0.0, emissivity=0.0, samples=4)


def _pw(i, g, n):
    # present worth by summing the discounted cash flows (Newnan et al., Engineering Economic Analysis -- from memory)
    k = np.arange(1, n + 1)
    return float(np.sum((1 + g) ** (k - 1) / (1 + i) ** k))


COSTS = """nps,thickness[mm],new_per_m,removal_per_m,over_per_m
2,40,50,10,40
2,80,70,14,60
4,40,60,12,50
4,80,90,18,80
"""


def test_cost_table_bilinear_and_outside():
    t = CostTable.read(COSTS)
    d2, d4 = 0.0603, 0.1143  # NPS 2 and 4 schedule 40 outer diameters (ASME B36.10M)
    assert float(t.price("new", d2, 0.04)) == pytest.approx(50)
    assert float(t.price("new", d4, 0.08)) == pytest.approx(90)
    # the middle of the four nodes is their mean (bilinear interpolation)
    assert float(t.price("new", (d2 + d4) / 2, 0.06)) == pytest.approx((50 + 70 + 60 + 90) / 4)
    assert np.isnan(t.price("over", 0.2, 0.05)) and np.isnan(t.price("over", d2, 0.1))


def test_cost_table_needs_full_grid():
    with pytest.raises(InputError, match="every thickness for every pipe size"):
        CostTable.read(COSTS.rsplit("\n", 2)[0] + "\n")


def _study(**kw):
    lines, _ = read_survey(demo_survey_path())
    settings = StudySettings(BINS, CostTable.read(demo_costs_path()), EXACT, **kw)
    return lines, settings, upgrade_study(lines, settings)


def _row(rows, tag, option_start):
    hits = [i for i in range(len(rows["tag"])) if rows["tag"][i] == tag and rows["option"][i].startswith(option_start)]
    assert len(hits) == 1
    return hits[0]


def test_repair_saving_and_economics_by_an_independent_path():
    tariff, finance = Tariff("gas", 0.05, 0.85, co2_per_kwh=0.2), Finance(0.07, 0.02, 12)
    lines, settings, rows = _study(heat_tariff=tariff, finance=finance)
    i = _row(rows, "FS-103", "repair")     # wet or damaged, no bare length, yard rack (outdoor: site weather)
    j = int(np.flatnonzero(lines.tag == "FS-103")[0])
    assert lines.location[j] == "outdoor"
    hours = BINS.hours * lines.operating_hours[j] / BINS.hours.sum()
    scaled = WeatherBins(BINS.air_temperature, BINS.wind_speed, hours)
    common = dict(bins=scaled, length=lines.length[j], jacket_emissivity=lines.jacket_emissivity[j])
    now = annual_energy(lines.pipe_outer_diameter[j], lines.fluid_temperature[j],
                        [Layer(lines.insulation_thickness[j], rows["k_effective"][i])], **common).heat_kwh
    design = annual_energy(lines.pipe_outer_diameter[j], lines.fluid_temperature[j],
                           [Layer(lines.insulation_thickness[j], lines.design_conductivity[j])], **common).heat_kwh
    saved = float(now - design)
    assert rows["saved_kwh_p50"][i] == pytest.approx(saved, rel=1e-6)
    saving = saved * 0.05 / 0.85
    assert rows["saving_p50"][i] == pytest.approx(saving, rel=1e-6)
    assert rows["npv_p50"][i] == pytest.approx(saving * _pw(0.07, 0.02, 12) - rows["investment"][i], rel=1e-6)
    assert rows["payback_p50"][i] == pytest.approx(rows["investment"][i] / saving, rel=1e-6)
    assert rows["co2_saved_kg_p50"][i] == pytest.approx(saved * 0.2 / 0.85, rel=1e-6)
    # investment: strip and renew the whole line at design thickness, cost table by hand (demo table, NPS 6 / 80 mm)
    table = CostTable.read(demo_costs_path())
    d, t, L = lines.pipe_outer_diameter[j], lines.insulation_thickness[j], lines.length[j]
    assert rows["investment"][i] == pytest.approx(float(table.price("new", d, t) + table.price("removal", d, t)) * L)


def test_replace_picks_least_life_cycle_cost():
    finance = Finance(0.08, 0.02, 15)
    lines, settings, rows = _study(finance=finance)
    table = CostTable.read(demo_costs_path())
    j = int(np.flatnonzero(lines.tag == "FS-202")[0])
    i = _row(rows, "FS-202", "replace")
    d, tf, L = lines.pipe_outer_diameter[j], lines.fluid_temperature[j], lines.length[j]
    assert lines.location[j] == "indoor"  # the pump house: its surveyed air and air speed all year
    scaled = WeatherBins.single(lines.air_temperature[j], lines.wind_speed[j], lines.operating_hours[j])
    lcc = []
    for t in table.thicknesses:
        e = annual_energy(d, tf, [Layer(t, lines.design_conductivity[j])], bins=scaled, length=L,
                          jacket_emissivity=lines.jacket_emissivity[j])
        cost = float(table.price("new", d, t)) * L + float(table.price("removal", d, lines.insulation_thickness[j])) * L
        lcc.append(cost + float(e.heat_kwh) * settings.heat_tariff.price_per_heat_kwh * _pw(0.08, 0.02, 15))
    assert rows["thickness"][i] == table.thicknesses[int(np.argmin(lcc))]
    assert rows["option"][i] == f"replace at {1000 * table.thicknesses[int(np.argmin(lcc))]:.0f} mm"


def test_no_layer_over_wet_or_missing_insulation():
    _, _, rows = _study()
    for k in range(len(rows["tag"])):
        if rows["condition"][k] in ("wet or damaged", "missing"):
            assert rows["option"][k] != "add a layer"


def test_probability_of_payback_grows_with_the_horizon():
    lines, _ = read_survey(demo_survey_path())
    m = Measurement(thermometer=1.5, samples=60)
    p = [upgrade_study(lines, StudySettings(BINS, CostTable.read(demo_costs_path()), m, payback_years=y))[
        "probability_payback"] for y in (1.0, 3.0, 10.0)]
    assert np.all((p[0] <= p[1]) & (p[1] <= p[2])) and np.all((p[2] >= 0) & (p[2] <= 1))
    assert p[2].max() == 1.0 and p[0].min() == 0.0


def test_ranked_best_option_per_line_and_separate_totals():
    _, _, rows = _study()
    best = ranked(rows)
    assert sorted(best["index"].tolist()) == sorted(set(rows["index"].tolist()))
    assert np.all(np.diff(best["npv_p50"]) <= 0)
    for k, idx in enumerate(best["index"]):
        assert best["npv_p50"][k] == pytest.approx(rows["npv_p50"][rows["index"] == idx].max())
    tot = totals(best)
    hot = best["service"] == "hot"
    assert tot["hot"]["q_now"] == pytest.approx(best["q_now"][hot].sum()) and tot["hot"]["q_now"] > 0
    assert tot["cold"]["q_now"] == pytest.approx(best["q_now"][~hot].sum()) and tot["cold"]["q_now"] < 0
    worth = hot & best["worth_doing"]
    assert tot["hot"]["investment"] == pytest.approx(best["investment"][worth].sum())
