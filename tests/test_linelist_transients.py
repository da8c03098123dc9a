"""Cool-down and warm-up of lines from a line list (issue 16 point 7: each new item in the line list too)."""
from __future__ import annotations

import io
import math

import pytest

from convlib.linelist import run_line_list
from convlib.pipe import Layer
from convlib.transients import cool_down_time, warm_up_condensate

HEAD = ("tag,nps,size,length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],cool_down_to[degC],"
        "steam_pressure[bar],warm_up_time[min],wind_speed\n")
ROWS = ('C-1,4,,50,90,-10,"40,0.04",5,,,3\n'
        'C-2,,CU22x1.0,20,60,-5,"20,0.035",2,,,0\n'
        'S-1,6,,100,165,0,"60,0.045",,7,30,0\n'
        'D-1,,DN100,20,60,-5,"20,0.035",2,,,0\n'
        'W-1,4,,20,60,-5,"20,0.035",,,30,0\n')


@pytest.fixture(scope="module")
def result():
    return run_line_list(io.StringIO(HEAD + ROWS))


def test_cool_down_equals_the_python_call_with_the_tables_wall(result):
    by = dict(zip(result.tag, result.cool_down_time))
    # ASME B36.10M: NPS 4 schedule 40 is 114.3 mm x 6.02 mm (from memory)
    direct = cool_down_time(0.1143, 0.00602, 363.15, 278.15, [Layer(0.04, 0.04)], air_temperature=263.15,
                            wind_speed=3.0)
    assert by["C-1"] == pytest.approx(float(direct.time), rel=1e-6)
    # EN 1057: a 22 x 1.0 copper tube names its own wall, and its wall is copper: pure copper 8933 kg/m3 and
    # 385 J/kg/K (Incropera et al., 6th ed., Table A.1, from memory)
    tube = cool_down_time(0.022, 0.001, 333.15, 275.15, [Layer(0.02, 0.035)], air_temperature=268.15,
                          pipe_density=8933.0, pipe_specific_heat=385.0)
    assert by["C-2"] == pytest.approx(float(tube.time), rel=1e-6)
    steel = cool_down_time(0.022, 0.001, 333.15, 275.15, [Layer(0.02, 0.035)], air_temperature=268.15)
    assert abs(by["C-2"] - float(steel.time)) > 1e-3 * float(steel.time)  # not the steel default


def test_warm_up_condensate_equals_the_wall_heat_over_the_latent_heat(result):
    by = dict(zip(result.tag, result.warm_up_condensate))
    direct = warm_up_condensate(0.1683, 0.00711, 7e5, 273.15, 1800.0, [Layer(0.06, 0.045)], length=100.0,
                                air_temperature=273.15)
    assert by["S-1"] == pytest.approx(float(direct.warm_up_condensate), rel=1e-9)
    # hand calculation: wall mass x c x (T_sat - T_start) / h_fg. ASME B36.10M NPS 6 sch 40: 168.3 x 7.11 mm;
    # IAPWS-IF97 at 7 bar: T_sat 164.95 degC, h_fg 2064.9 kJ/kg (steam tables, from memory); carbon steel
    # 7800 kg/m3 and 450 J/kg/K (the library's stated values)
    mass = 7800.0 * math.pi / 4 * (0.1683 ** 2 - (0.1683 - 2 * 0.00711) ** 2) * 100.0
    hand = mass * 450.0 * (164.95 - 0.0) / 2064.9e3
    assert by["S-1"] == pytest.approx(hand, rel=5e-3)


def test_missing_wall_or_steam_pressure_is_a_note_not_a_number(result):
    notes = dict(zip(result.tag, result.notes))
    cool, warm = dict(zip(result.tag, result.cool_down_time)), dict(zip(result.tag, result.warm_up_condensate))
    assert math.isnan(cool["D-1"]) and "give the pipe wall" in notes["D-1"]   # EN 10220 DN names no wall
    assert math.isnan(warm["W-1"]) and "needs steam_pressure" in notes["W-1"]
    assert math.isnan(warm["C-1"]) and math.isnan(cool["S-1"])                 # not asked for


def test_results_csv_and_json_carry_them_in_their_units(result, tmp_path, capsys):
    import csv
    import json

    from convlib.cli import main
    from convlib.linelist import write_results_csv

    path = tmp_path / "out.csv"
    write_results_csv(result, path)
    rows = {r["tag"]: r for r in csv.DictReader(path.open(encoding="utf-8"))}
    assert float(rows["C-1"]["cool_down_time[h]"]) == pytest.approx(
        dict(zip(result.tag, result.cool_down_time))["C-1"] / 3600.0, rel=1e-6)
    source = tmp_path / "in.csv"
    source.write_text(HEAD + ROWS, encoding="utf-8")
    main(["lines", str(source), "--json"])
    out = json.loads(capsys.readouterr().out)
    assert out["lines"]["units"]["cool_down_time"] == "s" and out["lines"]["units"]["warm_up_condensate"] == "kg"
