"""Plausibility guard of study files (issue: plain numbers in a study file are SI and were taken at face value).

A study file's plain numbers are SI base units, kelvin: 95 for a surface temperature is 95 K, 168 for a diameter
is 168 m. Values outside the ranges engineers use (convlib.units.INPUTS: common practice, no source) are refused
with a hint in the likely unit, unless --allow-unusual.
"""
import json

import pytest

from cli_helpers import run_error, run_json
from convlib.errors import InputError
from convlib.study import CaseSpec, StudySpec, check_plausible, load_demo_study


def _write(tmp_path, case):
    path = tmp_path / "study.json"
    path.write_text(json.dumps({"schema_version": 1, "case": case}))
    return str(path)


def test_a_temperature_typed_in_degC_without_unit_is_refused_with_a_hint(tmp_path, capsys):
    path = _write(tmp_path, {"kind": "bare", "surface_temperature": 95, "air_temperature": 293.15})
    err = run_error(capsys, "run", path)
    assert "case.surface_temperature" in err and "read as 95 K" in err
    assert "did you mean 95 degC" in err and "--allow-unusual" in err


def test_a_diameter_typed_in_mm_without_unit_is_refused_with_a_hint(tmp_path, capsys):
    path = _write(tmp_path, {"kind": "insulated", "diameter": 8.0, "fluid_temperature": 400.0})
    err = run_error(capsys, "run", path)
    assert "case.diameter" in err and "8 mm" in err


def test_allow_unusual_computes_it_anyway(tmp_path, capsys):
    path = _write(tmp_path, {"kind": "bare", "surface_temperature": 95, "air_temperature": 293.15})
    out = run_json(capsys, "run", path, "--allow-unusual")
    assert out["result"]["base"]["surface_temperature"][0] == pytest.approx(95.0)


def test_values_written_with_their_unit_pass(tmp_path, capsys):
    path = _write(tmp_path, {"kind": "bare", "surface_temperature": "95degC", "air_temperature": "20degC",
                             "diameter": "168.3mm"})
    out = run_json(capsys, "run", path)
    assert out["result"]["base"]["surface_temperature"][0] == pytest.approx(368.15)   # 95 degC = 368.15 K (ITS-90 offset)


def test_the_demo_study_is_plausible():
    check_plausible(load_demo_study())


@pytest.mark.parametrize("field, value", [("air_temperature", 20.0), ("diameter", 6.0),
                                          ("insulation_thickness", 0.0), ("pressure", 25000.0)])
def test_each_guarded_field_names_itself(field, value):
    base = {"kind": "insulated", "fluid_temperature": 420.0, field: value}
    spec = StudySpec(case=CaseSpec(**base))
    if field == "insulation_thickness":   # 0 m is a bare pipe: allowed
        check_plausible(spec)
        return
    with pytest.raises(InputError, match=f"case.{field}"):
        check_plausible(spec)


def test_property_range_errors_speak_the_readers_units(capsys):
    # Air's property data end at 2000 K (CoolProp's Lemmon et al. (2000) air model, its stated upper limit);
    # 9000 degF is (9000 - 32) / 1.8 + 273.15 = 5255.4 K, the film (5255.4 + 294.26) / 2 = 2774.8 K.
    err = run_error(capsys, "surface", "--diameter", "4in", "--surface-temperature", "9000degF",
                    "--air-temperature", "70degF", "--allow-unusual", "--units", "US")
    assert "2000 K (3140 degF)" in err or "3140 degF" in err
    assert "(4535 degF)" in err
    err = run_error(capsys, "surface", "--diameter", "100mm", "--surface-temperature", "4000degC",
                    "--air-temperature", "20degC", "--allow-unusual")
    assert "1727 degC" in err   # 2000 K - 273.15


def test_line_list_row_errors_from_the_property_data_also_speak_the_readers_units(tmp_path, capsys):
    from convlib.cli import main

    path = tmp_path / "hot.csv"   # a bare line at 4000 degC: the film leaves air's 2000 K data (as above)
    path.write_text('tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers,jacket_emissivity\n'
                    'HOT,4,10,4000,20,bare,0.9\nOK,4,10,180,20,"50mm,0.04",0.1\n')
    assert main(["lines", str(path), "--allow-unusual", "--units", "US"]) == 1
    err = capsys.readouterr().err
    assert "row 2 (HOT)" in err and "3140 degF" in err   # 2000 K = 3140.3 degF
