"""Lines in operation through the edges: CLI commands trace, steam, freeze, tank, duct; line-list
columns mass_flow, maintain_temperature, minimum_ambient. Expected values: direct library calls with the inputs
converted by the unit definitions (K = degC + 273.15); NPS 2 schedule 40 = 60.3 mm x 3.91 mm (ASME B36.10M)."""
import io
import json
import subprocess
import sys

import numpy as np
import pytest

import convlib as cl
from convlib import Layer
from convlib.linelist import run_line_list


def run(*args):
    return subprocess.run([sys.executable, "-m", "convlib", *args], capture_output=True, text=True, timeout=120)


def test_trace_json_is_the_library_duty():
    proc = run("trace", "--nps", "2", "--maintain-temperature", "5degC", "--minimum-ambient=-20degC",
               "--wind-speed", "10", "--layer", "25mm,0.04", "--length", "100", "--json")
    assert proc.returncode == 0, proc.stderr
    row = json.loads(proc.stdout)["heat tracing"]["results"][0]
    q = float(cl.insulated_pipe(0.0603, 278.15, [Layer(0.025, 0.04)], air_temperature=253.15,
                                wind_speed=10.0).q_per_length)
    assert row["duty_per_length"] == pytest.approx(1.2 * q, rel=1e-9)
    assert row["duty_total"] == pytest.approx(120.0 * q, rel=1e-9)


def test_freeze_json_in_seconds_and_table_in_hours():
    args = ("freeze", "--nps", "2", "--initial-temperature", "10degC", "--minimum-ambient=-15degC", "--wind-speed",
            "5", "--layer", "25mm,0.04")
    proc = run(*args, "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    f = cl.freeze_time(0.0603, 0.00391, 283.15, [Layer(0.025, 0.04)], air_temperature=258.15, wind_speed=5.0)
    row = payload["freeze time (stagnant water)"]["results"][0]
    assert row["time_total"] == pytest.approx(float(f.time_total), rel=1e-9)
    assert payload["freeze time (stagnant water)"]["units"]["time_total"] == "s"
    assert any("no substitute for draining" in c for c in payload["cautions"])
    table = run(*args)
    assert f"{float(f.time_total) / 3600:.2f}" in table.stdout and "[h]" in table.stdout


def test_freeze_says_never_in_the_row_not_as_an_infinite_time():
    # still water at 8 degC in air at +5 degC settles above 0 degC: no freeze time exists (issue 14: a flag with a
    # message in every output, never an inf that travels into a table)
    proc = run("freeze", "--nps", "2", "--initial-temperature", "8degC", "--minimum-ambient", "5degC", "--layer",
               "30mm,0.04", "--json")
    assert proc.returncode == 0, proc.stderr
    assert "Infinity" not in proc.stdout and "NaN" not in proc.stdout
    payload = json.loads(proc.stdout)
    row = payload["freeze time (stagnant water)"]["results"][0]
    assert row["freezes"] == "no" and "time_total" not in row
    assert any("no freezing under these conditions" in c for c in payload["cautions"])
    table = run("freeze", "--nps", "2", "--initial-temperature", "8degC", "--minimum-ambient", "5degC", "--layer",
                "30mm,0.04")
    assert "inf" not in table.stdout.lower().replace("information", "") and "no freezing" in table.stdout


def test_steam_json_condensate_is_the_library_rate():
    proc = run("steam", "--nps", "6", "--steam-pressure", "3.5bar", "--air-temperature=-10degC", "--layer",
               "80mm,0.045", "--length", "260", "--wind-speed", "6", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    row = payload["saturated steam line"]["results"][0]
    s = cl.steam_line(0.1683, 3.5e5, [Layer(0.08, 0.045)], air_temperature=263.15, length=260.0, wind_speed=6.0)
    assert row["condensate_rate"] == pytest.approx(float(s.condensate_rate), rel=1e-9)  # kg/s in Python and JSON
    assert payload["saturated steam line"]["units"]["condensate_rate"] == "kg/s"
    assert row["fluid_temperature"] == pytest.approx(float(s.saturation_temperature), rel=1e-12)
    assert any("trap" in c for c in payload["cautions"])
    bad = run("steam", "--nps", "6", "--steam-pressure", "-2bar", "--air-temperature", "0degC")
    assert bad.returncode == 2 and "pressure" in bad.stderr


def test_tank_json_faces_and_total():
    proc = run("tank", "--diameter", "10m", "--height", "12m", "--fluid-temperature", "80degC",
               "--air-temperature=-5degC", "--wall-layer", "100mm,0.04", "--roof-layer", "100mm,0.04", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    r = cl.vertical_tank(10.0, 12.0, fluid_temperature=353.15, air_temperature=268.15,
                         wall_layers=[Layer(0.1, 0.04)], roof_layers=[Layer(0.1, 0.04)])
    assert payload["q_total"] == pytest.approx(float(r.q_total), rel=1e-9)
    faces = payload["tank faces"]["results"]
    assert [f["tag"] for f in faces] == ["wall", "roof", "floor"]
    assert sum(f["q_total"] for f in faces) == pytest.approx(payload["q_total"], rel=1e-12)
    bad = run("tank", "--diameter", "10m", "--height", "12m", "--air-temperature", "10degC")
    assert bad.returncode == 2 and "--surface-temperature" in bad.stderr


def test_sphere_tank_and_given_coefficient_through_the_command_line():
    proc = run("tank", "--shape", "sphere", "--diameter", "3.04m", "--fluid-temperature", "0degC",
               "--air-temperature", "22degC", "--wall-thickness", "20mm", "--wall-conductivity", "15",
               "--inner-coefficient", "80", "--convection-coefficient", "10", "--emissivity", "1", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    r = cl.spherical_tank(3.04, fluid_temperature=273.15, air_temperature=295.15, wall_thickness=0.02,
                          wall_conductivity=15.0, inner_coefficient=80.0, convection_coefficient=10.0, emissivity=1.0)
    assert payload["q_total"] == pytest.approx(float(r.q_total), rel=1e-9)
    assert [f["tag"] for f in payload["tank faces"]["results"]] == ["shell"]
    bad = run("tank", "--shape", "sphere", "--diameter", "3m", "--height", "4m", "--surface-temperature", "50degC",
              "--air-temperature", "10degC")
    assert bad.returncode == 2 and "--height" in bad.stderr
    line = run("line", "--nps", "2", "--fluid-temperature", "90degC", "--air-temperature", "10degC", "--layer",
               "30mm,0.04", "--convection-coefficient", "10", "--jacket-emissivity", "0", "--json")
    assert line.returncode == 0, line.stderr
    q = float(cl.insulated_pipe(0.0603, 363.15, [Layer(0.03, 0.04)], air_temperature=283.15, jacket_emissivity=0.0,
                                convection_coefficient=10.0).q_per_length)
    assert json.loads(line.stdout)["line"]["results"][0]["q_per_length"] == pytest.approx(q, rel=1e-9)


def test_tank_insulation_sized_per_face_through_the_command_line():
    proc = run("tank", "--diameter", "6m", "--height", "8m", "--fluid-temperature", "200degC", "--air-temperature",
               "30degC", "--emissivity", "0.1", "--insulation-conductivity", "0.04", "--touch-limit", "60degC",
               "--json")
    assert proc.returncode == 0, proc.stderr
    rows = json.loads(proc.stdout)["insulation per face (sized; the layers given stay outside it)"]["results"]
    sized = cl.vessels.insulation_per_face(lambda t: cl.vertical_tank(
        6.0, 8.0, fluid_temperature=473.15, air_temperature=303.15, emissivity=0.1, wall_layers=[Layer(t, 0.04)],
        roof_layers=[Layer(t, 0.04)]), surface_limit=333.15)
    assert [r["tag"] for r in rows] == ["wall", "roof"]
    for row, f in zip(rows, sized):
        assert row["required_thickness"] == pytest.approx(f.required, rel=1e-9)
        assert row["commercial_thickness"] == f.commercial
    bad = run("tank", "--diameter", "6m", "--height", "8m", "--fluid-temperature", "200degC", "--air-temperature",
              "30degC", "--touch-limit", "60degC")
    assert bad.returncode == 2 and "--insulation-conductivity" in bad.stderr


def test_tank_touch_sizing_at_hottest_ambient_in_still_air_through_the_command_line():
    # re-evaluated at the design hottest ambient (40 degC) in still air: meets 60 degC, misses it 0.1 mm thinner
    args = ("tank", "--diameter", "6m", "--height", "8m", "--fluid-temperature", "200degC", "--air-temperature",
            "20degC", "--wind-speed", "6", "--emissivity", "0.1", "--insulation-conductivity", "0.04",
            "--touch-limit", "60degC", "--hottest-air-temperature", "40degC")
    proc = run(*args, "--json")
    assert proc.returncode == 0, proc.stderr
    rows = json.loads(proc.stdout)["insulation per face (sized; the layers given stay outside it)"]["results"]

    def face(t, name):
        return cl.vertical_tank(6.0, 8.0, fluid_temperature=473.15, air_temperature=313.15, wind_speed=0.0,
                                emissivity=0.1, wall_layers=[Layer(t, 0.04)], roof_layers=[Layer(t, 0.04)]).face(name)
    for row in rows:
        assert (row["air_temperature"], row["wind_speed"], row["jacket_emissivity"]) == (313.15, 0.0, 0.1)
        assert row["surface_limit"] == pytest.approx(333.15)  # key renamed from touch_limit (one vocabulary)
        t = row["required_thickness"]
        assert float(face(t, row["tag"]).surface_temperature) <= 333.15 + 1e-3 < float(
            face(t - 1e-4, row["tag"]).surface_temperature)
    table = run(*args)
    assert table.returncode == 0 and "T_air" in table.stdout and "40.0" in table.stdout
    windy = json.loads(run(*args, "--wind-for-touch", "--json").stdout)
    assert windy["insulation per face (sized; the layers given stay outside it)"]["results"][0]["wind_speed"] == 6.0
    bad = run("tank", "--diameter", "6m", "--height", "8m", "--fluid-temperature", "200degC", "--air-temperature",
              "20degC", "--insulation-conductivity", "0.04", "--heat-flux-limit", "50", "--wind-for-touch")
    assert bad.returncode == 2 and "--surface-limit" in bad.stderr  # renamed from --touch-limit


def test_duct_json_is_the_library_duct():
    proc = run("duct", "--width", "600mm", "--height", "400mm", "--length", "20m", "--fluid-temperature", "13degC",
               "--air-temperature", "32degC", "--layer", "25mm,0.035", "--inner-coefficient", "15", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    r = cl.rectangular_duct(0.6, 0.4, 20.0, fluid_temperature=286.15, air_temperature=305.15,
                            layers=[Layer(0.025, 0.035)], inner_coefficient=15.0)
    assert payload["q_total"] == pytest.approx(float(r.q_total), rel=1e-9)
    assert [f["tag"] for f in payload["duct faces"]["results"]] == ["sides", "top", "bottom"]
    assert any("condensation" in c for c in payload["cautions"])
    bad = run("duct", "--width", "0.6", "--height", "0.4", "--length", "20", "--air-temperature", "30degC")
    assert bad.returncode == 2 and "--surface-temperature" in bad.stderr


def test_line_list_operation_columns():
    text = ("tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],wind_speed,mass_flow,"
            "maintain_temperature[degC],minimum_ambient[degC]\n"
            "HW-1,2,200,80,0,40@0.04,3,0.2,,\n"
            "FP-1,2,100,10,0,25@0.04,10,,5,-20\n"
            "HOT,2,100,150,0,40@0.04,0,0.5,,\n"
            "BAD,2,100,10,0,25@0.04,3,0,,\n")
    res = run_line_list(io.StringIO(text))
    assert [e.row for e in res.errors] == [5] and "mass_flow" in res.errors[0].reason
    p = cl.line_temperature_profile(0.0603, 353.15, [Layer(0.04, 0.04)], mass_flow=0.2, length=200.0,
                                    air_temperature=273.15, wind_speed=3.0)
    assert res.outlet_temperature[0] == pytest.approx(float(p.outlet_temperature), abs=1e-6)
    d = cl.tracing_duty(0.0603, 278.15, [Layer(0.025, 0.04)], air_temperature=253.15, wind_speed=10.0)
    assert res.tracing_duty_per_length[1] == pytest.approx(float(d.duty_per_length), rel=1e-9)
    assert res.tracing_duty[1] == pytest.approx(100.0 * float(d.duty_per_length), rel=1e-9)
    assert res.totals["tracing_duty"] == pytest.approx(100.0 * float(d.duty_per_length), rel=1e-9)
    # water at 150 C is not liquid at 1 atm: no outlet temperature, a note says why
    assert res.outlet_temperature[2] != res.outlet_temperature[2] and "fluid_phase" in res.notes[2]
    rows = res.rows()
    assert rows[1]["outlet_temperature"] is None and rows[0]["tracing_duty_per_length"] is None


def test_line_list_steam_pressure_gives_condensate():
    # condensate = 3600 Q / h_fg(p), h_fg from CoolProp's IAPWS-95 steam tables (convlib.operation.condensate_rate)
    text = ("tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],steam_pressure\n"
            "LP,6,260,138.86,-10,80@0.045,3.5 bar\n"
            "OFF,4,100,150,10,50@0.045,3.5 bar\n"
            "HW,4,100,80,10,50@0.045,\n"
            "CRIT,4,100,150,10,50@0.045,300 bar\n"
            "NEG,4,100,150,10,50@0.045,-1\n")
    res = run_line_list(io.StringIO(text))
    assert [e.row for e in res.errors] == [6] and "steam_pressure" in res.errors[0].reason
    lp = cl.insulated_pipe(0.1683, 412.01, [Layer(0.08, 0.045)], air_temperature=263.15)
    assert res.q_total[0] == pytest.approx(260.0 * float(lp.q_per_length), rel=1e-3)
    assert res.condensate[0] == pytest.approx(float(cl.condensate_rate(res.q_total[0], 3.5e5)), rel=1e-12)
    assert "saturation temperature" not in res.notes[0] and "saturation temperature 138.9" in res.notes[1]
    assert res.condensate[2] != res.condensate[2] and "condensate not computed" in res.notes[3]
    assert res.totals["condensate"] == pytest.approx(res.condensate[0] + res.condensate[1], rel=1e-12)


def test_line_list_fluid_columns():
    text = ("tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],mass_flow,fluid,"
            "fluid_pressure,fluid_phase\n"
            "HOT,2,100,150,0,40@0.04,0.5,,6 bar,\n"
            "AIR,4,50,120,10,,0.3,Air,,gas\n"
            "HW,2,100,80,0,40@0.04,0.5,,,\n"
            "BAD,2,100,80,0,40@0.04,0.5,,-1,vapour\n")
    res = run_line_list(io.StringIO(text))
    assert [e.row for e in res.errors] == [5]
    assert "fluid_pressure" in res.errors[0].reason and "fluid_phase" in res.errors[0].reason
    hot = cl.line_temperature_profile(0.0603, 423.15, [Layer(0.04, 0.04)], mass_flow=0.5, length=100.0,
                                      air_temperature=273.15, fluid_pressure=6e5)
    air = cl.line_temperature_profile(0.1143, 393.15, mass_flow=0.3, length=50.0, air_temperature=283.15,
                                      fluid="Air", fluid_phase="gas")
    water = cl.line_temperature_profile(0.0603, 353.15, [Layer(0.04, 0.04)], mass_flow=0.5, length=100.0,
                                        air_temperature=273.15)
    for i, p in enumerate((hot, air, water)):
        assert res.outlet_temperature[i] == pytest.approx(float(p.outlet_temperature), abs=1e-6)


def test_outlet_json_is_the_library_profile():
    proc = run("outlet", "--nps", "2", "--inlet-temperature", "80degC", "--air-temperature=-10degC",
               "--mass-flow", "0.2", "--length", "300", "--layer", "30mm,0.04", "--wind-speed", "3", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    row = payload["temperature along the line"]["results"][0]
    direct = cl.operation.line_temperature_profile(0.0603, 353.15, [Layer(0.03, 0.04)], mass_flow=0.2, length=300.0,
                                                   air_temperature=263.15, wind_speed=3.0)
    assert row["outlet_temperature"] == pytest.approx(float(direct.outlet_temperature), rel=1e-12)
    assert row["q_total"] == pytest.approx(float(direct.q_total), rel=1e-12)
    assert payload["profile"]["temperature_K"][-1] == pytest.approx(float(direct.outlet_temperature), rel=1e-12)


def test_demo_lists_the_lines_in_operation():
    proc = run("demo")
    assert proc.returncode == 0, proc.stderr
    for tag in ("FH-150", "FH-160", "FH-170", "FH-T2"):
        assert tag in proc.stdout
    assert "no substitute for draining or heat tracing" in proc.stdout


ISSUE_12_OUTLET = ("outlet", "--nps", "8", "--inlet-temperature", "95degC", "--mass-flow", "0.002", "--length", "2500m",
                   "--layer", "80mm,0.03")


def test_outlet_trickle_flow_of_issue_12_runs_and_stays_at_the_air():
    # issue 12 point 3: this command failed with "fluid_temperature must be greater than 0 K"; the water can only
    # approach the air (analytic bound), NPS 8 = 219.1 mm (ASME B36.10M)
    proc = run(*ISSUE_12_OUTLET, "--air-temperature=20degC", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    row = payload["temperature along the line"]["results"][0]
    assert row["outlet_temperature"] == pytest.approx(293.15, abs=1e-6) and row["freezes"] is False
    assert min(payload["profile"]["temperature_K"]) >= 293.15


def test_outlet_at_minus_10_reports_where_the_water_freezes():
    # issue 12 point 3: at -10 degC air the same command reported -1684 K; now the profile stops where the water
    # reaches 0 degC, at the position the library computes, with a caution
    proc = run(*ISSUE_12_OUTLET, "--air-temperature=-10degC", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    row = payload["temperature along the line"]["results"][0]
    direct = cl.operation.line_temperature_profile(0.2191, 368.15, [Layer(0.08, 0.03)], mass_flow=0.002,
                                                   length=2500.0, air_temperature=263.15)
    assert row["freezes"] is True and row["outlet_temperature"] == 273.15
    assert row["freezing_position"] == pytest.approx(float(direct.freezing_position), rel=1e-12)
    assert payload["temperature along the line"]["units"]["freezing_position"] == "m"
    assert min(payload["profile"]["temperature_K"]) >= 273.15
    assert max(payload["profile"]["position_m"]) == pytest.approx(row["freezing_position"], rel=1e-12)
    assert cl.operation.CAUTION_LINE_FREEZE in payload["cautions"]
    text = run(*ISSUE_12_OUTLET, "--air-temperature=-10degC")
    assert text.returncode == 0 and "reaches 0 degC at" in text.stdout and "burst" in text.stdout


def test_outlet_keep_above_gives_the_library_minimum_flow():
    proc = run("outlet", "--nps", "8", "--inlet-temperature", "95degC", "--air-temperature=-10degC", "--length",
               "2500m", "--layer", "80mm,0.03", "--keep-above", "5degC", "--mass-flow", "300kg/h", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)
    (title, rows), = [(t, v) for t, v in payload.items() if t.startswith("minimum flow")]
    direct = cl.operation.minimum_flow(0.2191, 368.15, [Layer(0.08, 0.03)], outlet_limit=278.15, length=2500.0,
                                       air_temperature=263.15)
    row = rows["results"][0]
    assert row["minimum_mass_flow"] == pytest.approx(float(direct.mass_flow), rel=1e-12)
    assert rows["units"]["minimum_mass_flow"] == "kg/s"
    assert row["enough"] == ("yes" if 300 / 3600 >= float(direct.mass_flow) else "no")
    both = run("outlet", "--nps", "8", "--inlet-temperature", "95degC", "--air-temperature=-10degC", "--length",
               "2500m", "--keep-above", "5degC", "--keep-below", "5degC")
    assert both.returncode != 0 and "--keep-above" in both.stderr


def test_line_list_trickle_flow_reports_the_freezing_position():
    # issue 12 point 3 through a line list: the outlet stops at 0 degC where the library's profile does, the note
    # gives the position and the freeze caution is among the result's cautions
    text = ("tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],mass_flow\n"
            "TR-1,8,2500,95,-10,80@0.03,0.002\n"
            "TR-2,8,2500,95,20,80@0.03,0.002\n")
    res = run_line_list(io.StringIO(text))
    direct = cl.operation.line_temperature_profile(0.2191, 368.15, [Layer(0.08, 0.03)], mass_flow=0.002,
                                                   length=2500.0, air_temperature=263.15)
    assert res.freezing_position[0] == pytest.approx(float(direct.freezing_position), rel=1e-9)
    assert res.outlet_temperature[0] == 273.15 and "reaches 0 degC" in res.notes[0]
    assert np.isnan(res.freezing_position[1]) and res.outlet_temperature[1] == pytest.approx(293.15, abs=1e-6)
    assert cl.operation.CAUTION_LINE_FREEZE in res.cautions


def test_lines_command_prints_losses_and_gains_apart_and_warns_of_design_air(tmp_path):
    # issue 12 point 4: the table, JSON and CSV of `lines` without --bins
    src = tmp_path / "lines.csv"
    src.write_text("tag,nps,length,fluid_temperature[degC],air_temperature[degC],layers[mm]\n"
                   "HW-1,4,100,90,20,50@0.04\nCHW-1,4,100,6,20,30@0.035\n")
    res = run_line_list(str(src))
    proc = run("lines", str(src), "-o", str(tmp_path / "out.csv"))
    assert proc.returncode == 0, proc.stderr
    assert f"heat lost by hot lines (1): {res.totals['q_lost'] / 1000:.1f} kW" in proc.stdout
    assert f"heat gained by cold lines (1): {res.totals['q_gained'] / 1000:.1f} kW" in proc.stdout
    assert res.warnings[0] in proc.stdout
    payload = json.loads(run("lines", str(src), "--json").stdout)
    assert payload["warnings"] == list(res.warnings)
    assert payload["totals"]["q_gained"] == pytest.approx(res.totals["q_gained"], rel=1e-12)
    assert payload["totals_units"]["q_gained"] == "W" and "q_total" not in payload["totals"]
    assert res.warnings[0] in (tmp_path / "out.csv").read_text()
