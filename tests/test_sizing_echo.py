"""Sizing echoes its assumptions, condensation checks and the smaller command-line items (issue 12, points 5
and 10; issue 16, point 6).

Every physical expectation is an independent calculation: the sized thickness is evaluated again with
``convlib.insulated_pipe`` (meets the limit there, misses it 0.1 mm thinner), dew points come from the Magnus
form with the constants of Alduchov & Eskridge (1996), unit factors from their definitions (NIST SP 811).
The command line runs in-process through ``convlib.cli.main`` (the code of ``python -m convlib``).
"""
import math

import pytest

from convlib import design, snapshot
from convlib.cli import main
from convlib.operation import line_temperature_profile
from convlib.pipe import Layer, insulated_pipe
from convlib.pipe_sizes import nominal_pipe
from convlib.study import CaseSpec, StudySpec, run_study
from cli_helpers import run_json, run_text

NPS4 = nominal_pipe("4", "40").outer_diameter      # 0.1143 m, ASME B36.10M (4.500 in)
NPS2 = nominal_pipe("2", "40").outer_diameter      # 0.0603 m, ASME B36.10M (2.375 in)
INCH = 0.0254                                      # m, exact (1959 international yard and pound agreement)
BTU_PER_HOUR = 0.29307107                          # W, NIST SP 811 (2008), appendix B.8 (Btu_IT per hour)


def magnus_dew_point(air_k, rh):
    """Dew point over liquid water [K]: Magnus form, Alduchov & Eskridge (1996), J. Appl. Meteor. 35:601, eq. 21
    (a = 17.625, b = 243.04 degC); within about 0.1 K of the exact saturation curve between -40 and 50 degC."""
    t = air_k - 273.15
    gamma = math.log(rh) + 17.625 * t / (243.04 + t)
    return 273.15 + 243.04 * gamma / (17.625 - gamma)


def run_error(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    assert code == 2, out
    return err


# ----------------------------------------------------------------------------- touch sizing (API)
def test_touch_sizing_at_the_hottest_ambient_meets_the_limit_and_misses_it_thinner():
    k, limit, hottest = 0.05, 333.15, 313.15
    r = design.thickness_for_surface_temperature(NPS4, 523.15, air_temperature=293.15, hottest_air_temperature=hottest,
                                                 insulation_conductivity=k, surface_limit=limit,
                                                 jacket_emissivity=0.1)
    t = float(r.required_thickness)
    # the assumptions are echoed: the hottest ambient, still air, the emissivity and the limit used
    assert float(r.air_temperature) == hottest and float(r.wind_speed) == 0.0
    assert float(r.jacket_emissivity) == 0.1 and float(r.limit) == limit and r.limit_given

    def surface(thickness):  # independent re-evaluation at the hottest ambient in still air
        return float(insulated_pipe(NPS4, 523.15, [Layer(thickness, k)], air_temperature=hottest, wind_speed=0.0,
                                    jacket_emissivity=0.1).surface_temperature)

    assert surface(t) <= limit + 1e-3
    assert surface(t - 1e-4) > limit
    # sized at the design air instead (20 degC) the layer is thinner: the hottest ambient matters
    at_air = design.thickness_for_surface_temperature(NPS4, 523.15, air_temperature=293.15, insulation_conductivity=k,
                                                      surface_limit=limit, jacket_emissivity=0.1)
    assert float(at_air.required_thickness) < t - 1e-3
    # the state at the listed thickness is the pipe's there
    listed = float(r.commercial_thickness)
    direct = insulated_pipe(NPS4, 523.15, [Layer(listed, k)], air_temperature=hottest, jacket_emissivity=0.1)
    assert float(r.surface_temperature_at_commercial) == pytest.approx(float(direct.surface_temperature), rel=1e-9)
    assert float(r.q_per_length_at_commercial) == pytest.approx(float(direct.q_per_length), rel=1e-9)


def test_touch_caution_calls_only_the_default_limit_a_default():
    common = dict(air_temperature=303.15, insulation_conductivity=0.04)
    default = design.thickness_for_surface_temperature(NPS4, 453.15, **common)
    given = design.thickness_for_surface_temperature(NPS4, 453.15, surface_limit=328.15, **common)
    assert "design default" in default.cautions[0] and not default.limit_given
    assert "design default" not in given.cautions[0] and "given" in given.cautions[0]


# ----------------------------------------------------------------------------- touch sizing (CLI)
SIZE = ("size", "--nps", "4", "--fluid-temperature", "250degC", "--air-temperature", "20degC",
        "--insulation-conductivity", "0.05W/m/K", "--jacket-emissivity", "0.1", "--touch-limit", "60degC")


def test_cli_touch_sizing_uses_still_air_and_the_hottest_ambient(capsys):
    out = run_json(capsys, *SIZE, "--wind-speed", "5", "--hottest-air-temperature", "40degC")
    row = out["sizing"]
    direct = design.thickness_for_surface_temperature(NPS4, 523.15, air_temperature=313.15,
                                                      insulation_conductivity=0.05, surface_limit=333.15,
                                                      jacket_emissivity=0.1, wind_speed=0.0)
    assert row["required_thickness_m"] == pytest.approx(float(direct.required_thickness), rel=1e-9)
    assert row["air_temperature"] == pytest.approx(313.15) and row["wind_speed"] == 0.0
    assert row["jacket_emissivity"] == 0.1 and row["surface_limit"] == pytest.approx(333.15)  # key renamed from touch_limit (one vocabulary)
    assert row["limit_source"] == "given" and "still air" in row["notes"]
    assert out["units"]["required_thickness"] == "m" and out["units"]["surface_limit"] == "K"
    assert not any("design default" in c for c in out["cautions"])
    # told otherwise, the wind counts (a thinner layer) and the echo says so
    windy = run_json(capsys, *SIZE, "--wind-speed", "5", "--wind-for-touch")["sizing"]
    assert windy["wind_speed"] == pytest.approx(5.0) and windy["air_temperature"] == pytest.approx(293.15)
    assert windy["required_thickness_m"] < row["required_thickness_m"] - 0.005


def test_cli_sizing_table_echoes_assumptions_and_prints_inches_in_us_units(capsys):
    si = run_json(capsys, *SIZE)["sizing"]
    text = run_text(capsys, *SIZE, "--units", "US")
    head, rule, cells = text.splitlines()[:3]
    spans, start = [], 0
    for dashes in rule.split("  "):   # columns as the rule line draws them
        spans.append((start, start + len(dashes)))
        start += len(dashes) + 2
    columns = {head[a:b].strip(): cells[a:b].strip() for a, b in spans}
    assert float(columns["t_required [in]"]) == pytest.approx(si["required_thickness_m"] / INCH, abs=0.05)
    assert float(columns["t_listed [in]"]) == pytest.approx(si["commercial_thickness_m"] / INCH, rel=1e-2)
    for label in ("T_limit [°F]", "T_air [°F]", "emissivity", "T_surface@listed [°F]", "q@listed [Btu/h/ft]"):
        assert label in columns
    assert float(columns["T_limit [°F]"]) == pytest.approx(140.0)   # 60 degC = 140 degF (definition of the scales)


def test_cli_size_options_apply_only_to_their_limit(capsys):
    err = run_error(capsys, "size", "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC",
                    "--insulation-conductivity", "0.04", "--heat-loss-limit", "60W/m", "--hottest-air-temperature",
                    "35degC")
    assert "--hottest-air-temperature" in err and "--surface-limit" in err  # the option renamed from --touch-limit


# ----------------------------------------------------------------------------- condensation sizing
def test_cli_condensation_margin_and_thickness_list_are_inputs(capsys):
    out = run_json(capsys, "size", "--nps", "2", "--fluid-temperature", "5degC", "--air-temperature", "30degC",
                   "--insulation-conductivity", "0.035", "--relative-humidity", "80%", "--condensation-margin", "2K",
                   "--thicknesses", "25mm,45mm,90mm")
    row = out["sizing"]
    direct = design.thickness_against_condensation(NPS2, 278.15, air_temperature=303.15, relative_humidity=0.8,
                                                   insulation_conductivity=0.035, margin=2.0,
                                                   commercial_thicknesses=(0.025, 0.045, 0.09))
    assert row["required_thickness_m"] == pytest.approx(float(direct.required_thickness), rel=1e-9)
    assert row["commercial_thickness_m"] in (0.025, 0.045, 0.09)
    assert row["margin"] == 2.0
    assert row["dew_point"] == pytest.approx(magnus_dew_point(303.15, 0.8), abs=0.15)
    # at the listed thickness the jacket is above the dew point plus the margin (independent re-evaluation)
    listed = insulated_pipe(NPS2, 278.15, [Layer(row["commercial_thickness_m"], 0.035)], air_temperature=303.15)
    assert row["surface_temperature_at_listed"] == pytest.approx(float(listed.surface_temperature), rel=1e-9)
    assert row["surface_temperature_at_listed"] >= row["dew_point"] + 2.0
    assert row["q_per_length_at_listed"] == pytest.approx(float(listed.q_per_length), rel=1e-9)
    # a smaller margin needs less insulation
    narrower = run_json(capsys, "size", "--nps", "2", "--fluid-temperature", "5degC", "--air-temperature", "30degC",
                        "--insulation-conductivity", "0.035", "--relative-humidity", "80%", "--condensation-margin",
                        "0.5K")["sizing"]
    assert narrower["required_thickness_m"] < row["required_thickness_m"] - 0.005


# ----------------------------------------------------------------------------- condensation check: line, tank, duct
def test_line_condensation_check_against_the_magnus_dew_point(capsys):
    argv = ("line", "--nps", "2", "--fluid-temperature", "6degC", "--air-temperature", "30degC",
            "--relative-humidity", "80%")
    thin = run_json(capsys, *argv, "--layer", "10mm,0.04")
    thick = run_json(capsys, *argv, "--layer", "60mm,0.04", "--condensation-margin", "1.5K")
    for payload, t, margin in ((thin, 0.01, 1.0), (thick, 0.06, 1.5)):
        row = payload["line"]["results"][0]
        surface = float(insulated_pipe(NPS2, 279.15, [Layer(t, 0.04)], air_temperature=303.15).surface_temperature)
        assert row["dew_point"] == pytest.approx(magnus_dew_point(303.15, 0.8), abs=0.15)
        assert row["margin"] == margin
        assert row["condensation"] is (surface < row["dew_point"] + margin)
        assert any("vapour retarder" in c for c in payload["cautions"])
    assert thin["line"]["results"][0]["condensation"] is True      # 23 degC jacket, dew point 26 degC
    assert thick["line"]["results"][0]["condensation"] is False    # 28.6 degC jacket
    assert "yes" in run_text(capsys, *argv, "--layer", "10mm,0.04")


def test_tank_and_duct_keep_their_tag_and_check_condensation(capsys):
    tank = ("tank", "--diameter", "10m", "--height", "12m", "--fluid-temperature", "5degC", "--air-temperature",
            "28degC", "--wall-layer", "50mm,0.04", "--roof-layer", "50mm,0.04", "--relative-humidity", "85%",
            "--tag", "TK-7")
    payload = run_json(capsys, *tank)
    assert payload["tag"] == "TK-7"
    dew = magnus_dew_point(301.15, 0.85)
    faces = {f["tag"]: f for f in payload["tank faces"]["results"]}
    for name in ("wall", "roof"):
        assert faces[name]["item"] == "TK-7"
        assert faces[name]["dew_point"] == pytest.approx(dew, abs=0.15)
        assert faces[name]["condensation"] is (faces[name]["surface_temperature"] < faces[name]["dew_point"] + 1.0)
    assert faces["floor"]["condensation"] is None       # on the ground: no air on it
    assert "TK-7" in run_text(capsys, *tank)
    duct = run_json(capsys, "duct", "--width", "600mm", "--height", "400mm", "--length", "20m", "--fluid-temperature",
                    "13degC", "--air-temperature", "30degC", "--relative-humidity", "70%", "--tag", "AD-1")
    assert duct["tag"] == "AD-1"
    for face in duct["duct faces"]["results"]:   # a bare 13 degC duct in 30 degC, 70 % air (dew point 24 degC)
        assert face["item"] == "AD-1" and face["condensation"] is True
        assert face["dew_point"] == pytest.approx(magnus_dew_point(303.15, 0.7), abs=0.15)


def test_tank_total_in_btu_per_hour_with_us_units(capsys):
    argv = ("tank", "--diameter", "10m", "--height", "12m", "--fluid-temperature", "80degC", "--air-temperature",
            "10degC", "--tag", "TK-1")
    total = run_json(capsys, *argv)["q_total"]
    text = run_text(capsys, *argv, "--units", "US")
    line = next(x for x in text.splitlines() if "total" in x)
    assert line.strip().endswith("Btu/h") and line.startswith("TK-1")
    shown = float(line.split("total")[1].split("Btu")[0].replace(",", ""))
    assert shown == pytest.approx(total / BTU_PER_HOUR, abs=0.5)


# ----------------------------------------------------------------------------- outlet --fluid-phase
def test_outlet_takes_the_fluid_phase_its_error_asks_for(capsys):
    argv = ("outlet", "--nps", "4", "--inlet-temperature", "150degC", "--air-temperature", "10degC", "--mass-flow",
            "0.2kg/s", "--length", "100m", "--fluid", "Air", "--layer", "50mm,0.04")
    err = run_error(capsys, *argv)
    assert "--fluid-phase" in err and "fluid_phase" not in err
    row = run_json(capsys, *argv, "--fluid-phase", "gas")["temperature along the line"]["results"][0]
    direct = line_temperature_profile(NPS4, 423.15, [Layer(0.05, 0.04)], mass_flow=0.2, length=100.0,
                                      air_temperature=283.15, fluid="Air", fluid_phase="gas")
    assert row["outlet_temperature"] == pytest.approx(float(direct.outlet_temperature), rel=1e-9)
    assert 283.15 < row["outlet_temperature"] < 423.15


# ----------------------------------------------------------------------------- compare and report
def _snapshot(path, wind):
    spec = StudySpec(name="compare test", case=CaseSpec(kind="insulated", diameter=NPS4, fluid_temperature=423.15,
                                                        wind_speed=wind, length=25.0))
    return snapshot.save(path, spec, run_study(spec))


@pytest.fixture(scope="module")
def pair(tmp_path_factory):
    folder = tmp_path_factory.mktemp("compare")
    return _snapshot(folder / "a.json", 1.0), _snapshot(folder / "b.json", 6.0)


def test_compare_json_is_structured_before_after_with_units_and_sign(pair, capsys):
    a, b = pair
    out = run_json(capsys, "compare", str(a), str(b))
    assert out["identical"] is False
    assert out["inputs"] == [{"key": "case.wind_speed", "before": 1.0, "after": 6.0}]
    results = {r["key"]: r for r in out["results"]}
    q = results["base.q_per_length"]
    before = snapshot.load(a).result.base.q_per_length[0]
    after = snapshot.load(b).result.base.q_per_length[0]
    assert (q["before"], q["after"], q["unit"]) == (before, after, "W/m")
    assert q["change"] == pytest.approx(after - before, rel=1e-12) and q["change"] > 0   # more wind, more loss
    assert q["relative_change"] == pytest.approx((after - before) / before, rel=1e-12)
    text = run_text(capsys, "compare", str(a), str(b))
    line = next(x for x in text.splitlines() if "base.q_per_length" in x)
    assert f"{before:.6g} W/m -> {after:.6g} W/m" in line
    assert f"(+{after - before:.4g} W/m, +{100 * (after - before) / before:.3g} %)" in line


def test_report_has_line_totals_and_names_the_command(pair, tmp_path):
    from dashboard.report import render_report

    page = render_report(pair[0])
    total = snapshot.load(pair[0]).result.base.q_total[0]   # 25 m of a hot line: a loss, no gain
    assert total > 0
    assert "Heat lost by the line" in page and "Heat gained by the line" in page
    assert f"{total / 1000:.3g} kW" in page and "0 kW" in page
    assert "convlib verify a.json" in page and "convlib.snapshot.verify" not in page
    assert "No annual figures" in page
