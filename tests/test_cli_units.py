"""What engineers type on the command line: units, plain numbers, plausibility guards (issue 12, points 1, 2, 10).

Run in-process through ``convlib.cli.main`` (the same code as ``python -m convlib``) so that each case is cheap;
tests/test_cli.py runs the command as a subprocess. Each expected value comes from the library called directly
with SI values whose conversion is checked against its definition beside it: the command line must give the
same numbers as a hand conversion.
"""
import json

import pytest

import convlib as cl
from convlib.cli import main
from convlib.design import thickness_for_heat_loss
from convlib.operation import steam_line
from convlib.pipe_sizes import nominal_pipe
from cli_helpers import run_error, run_json

INCH = 0.0254                                      # m, exact (1959 international yard and pound agreement)
# NIST SP 811 (2008), appendix B.8, "British thermal unit_IT inch per hour square foot degree Fahrenheit":
# 1.442 279 E-01 W/(m K); "British thermal unit_IT per hour square foot degree Fahrenheit": 5.678 263 E+00 W/(m2 K)
BTU_IN_PER_H_FT2_F = 0.1442279
BTU_PER_H_FT2_F = 5.678263
PSI = 6894.757                                     # Pa, NIST SP 811 (2008), appendix B.8 (pound-force per sq. inch)
ATMOSPHERE = 101325.0                              # Pa, standard atmosphere, exact (10th CGPM, 1954)
NPS4 = 0.1143                                      # m, NPS 4 outer diameter 4.500 in (ASME B36.10M)


def line_row(capsys, *argv):
    return run_json(capsys, "line", *argv)["line"]["results"][0]


# ----------------------------------------------------------------------------- point 1: degrees inside units
# issue 12 point 1: '--layer 50mm,0.045W/m/degC' gave 0.3 W/m (k read as 0.045/274.15) instead of ~67 W/m
@pytest.mark.parametrize("conductivity, k_si", [
    ("0.045W/m/degC", 0.045),                      # a Celsius interval is a kelvin (NIST SP 811, 4.2.1.1)
    ("0.045 W/(m*K)", 0.045),
    ("0.045W/m.K", 0.045),                          # engineers' W/m·K
    ("0.3Btu*in/(hr*ft**2*degF)", 0.3 * BTU_IN_PER_H_FT2_F),
    ("0.3 Btu.in/h.ft2.F", 0.3 * BTU_IN_PER_H_FT2_F),
])
def test_layer_conductivity_with_degrees_inside_the_unit(capsys, conductivity, k_si):
    row = line_row(capsys, "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC",
                   "--layer", f"50mm,{conductivity}")
    direct = cl.insulated_pipe(pipe_outer_diameter=NPS4, fluid_temperature=453.15,
                               layers=[cl.Layer(thickness=0.05, conductivity=k_si)], air_temperature=293.15)
    assert row["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-5)
    assert 50 < row["q_per_length"] < 90       # ~67 W/m (issue 12), not 0.3 W/m


def test_convection_coefficient_with_degrees_inside_the_unit(capsys):
    # issue 12 point 1: '--convection-coefficient 10W/m**2/degC' acted as 0.04 W/m2/K
    args = ("--nps", "4", "--fluid-temperature", "90degC", "--air-temperature", "10degC", "--layer", "30mm,0.04",
            "--jacket-emissivity", "0")
    celsius = line_row(capsys, *args, "--convection-coefficient", "10W/m**2/degC")
    kelvin = line_row(capsys, *args, "--convection-coefficient", "10W/m**2/K")
    assert celsius["h_convection"] == pytest.approx(10.0, rel=1e-12)
    assert celsius["q_per_length"] == pytest.approx(kelvin["q_per_length"], rel=1e-12)
    us = line_row(capsys, *args, "--convection-coefficient", "1.761Btu/(hr*ft**2*degF)")
    assert us["h_convection"] == pytest.approx(1.761 * BTU_PER_H_FT2_F, rel=1e-5)   # NIST SP 811 factor


def test_sizing_with_insulation_conductivity_in_celsius_units(capsys):
    # issue 12 point 1: '--insulation-conductivity 0.045W/m/degC' sized 0.1 mm
    out = run_json(capsys, "size", "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC",
                   "--insulation-conductivity", "0.045W/m/degC", "--heat-loss-limit", "80W/m")
    direct = thickness_for_heat_loss(NPS4, 453.15, air_temperature=293.15, insulation_conductivity=0.045,
                                     heat_loss_limit=80.0)
    assert out["sizing"]["required_thickness_m"] == pytest.approx(float(direct.required_thickness), rel=1e-6)
    assert out["sizing"]["required_thickness_m"] > 0.01


@pytest.mark.parametrize("text", ["50mm,0.045W/(m*K", "50mm,0.045W/m/K)", "50mm,1/0W/m/K",
                                  "50mm,0.045W/(m*0)", "50mm,[0.04;0.05]", "50mm,0.045 kg"])
def test_malformed_units_give_one_line_naming_the_layer(capsys, text):
    err = run_error(capsys, "line", "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC",
                    "--layer", text)
    assert "--layer 1 conductivity" in err


# ----------------------------------------------------------------------------- point 2: plain numbers
def test_plain_numbers_are_degC_and_mm_in_si(capsys):
    # issue 12 point 2: 'surface --diameter 168 --surface-temperature 95 --air-temperature 25' computed a 168 m
    # pipe at 95 K. An engineer means 168 mm and 95 degC.
    row = run_json(capsys, "surface", "--diameter", "168", "--surface-temperature", "95",
                   "--air-temperature", "25")["surface"]["results"][0]
    direct = cl.bare_surface(shape="horizontal_cylinder", diameter=0.168, length=1.0, surface_temperature=368.15,
                             air_temperature=298.15)
    assert row["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-9)


def test_plain_layer_thickness_is_mm_and_fluid_temperature_degC(capsys):
    # issue 12 point 2: '--layer 50,0.045' was 50 m of insulation; '--fluid-temperature 180' failed on liquid air
    plain = line_row(capsys, "--nps", "4", "--fluid-temperature", "180", "--air-temperature", "20",
                     "--layer", "50,0.045")
    written = line_row(capsys, "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC",
                       "--layer", "50mm,0.045W/m/K")
    assert plain["q_per_length"] == pytest.approx(written["q_per_length"], rel=1e-12)


def test_units_us_governs_plain_numbers(capsys):
    # issue 12 point 2: '--units US --layer 2in,0.31' read k as 0.31 W/m/K
    us = line_row(capsys, "--units", "US", "--nps", "4", "--fluid-temperature", "356", "--air-temperature", "68",
                  "--layer", "2,0.31")
    direct = cl.insulated_pipe(pipe_outer_diameter=NPS4, fluid_temperature=453.15,  # 356 degF = 180 degC exactly
                               layers=[cl.Layer(thickness=2 * INCH, conductivity=0.31 * BTU_IN_PER_H_FT2_F)],
                               air_temperature=293.15)                              # 68 degF = 20 degC exactly
    assert us["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-5)


def test_help_says_the_unit_of_plain_numbers(capsys):
    with pytest.raises(SystemExit):
        main(["line", "--help"])
    text = " ".join(capsys.readouterr().out.split())
    assert "plain number: degC (--units US: degF)" in text
    assert "plain number: mm (--units US: in)" in text
    assert "plain thickness: mm, --units US: in" in text


# ----------------------------------------------------------------------------- point 2: plausibility guards
@pytest.mark.parametrize("argv, words", [
    (("surface", "--diameter", "168m", "--surface-temperature", "95", "--air-temperature", "25"),
     ["--diameter", "5000 mm", "did you mean 168 mm"]),
    (("surface", "--diameter", "168", "--surface-temperature", "95K", "--air-temperature", "25"),
     ["--surface-temperature", "degC", "did you mean 95 degC"]),
    (("line", "--nps", "4", "--fluid-temperature", "180", "--air-temperature", "20", "--layer", "2m,0.04"),
     ["--layer 1 thickness", "did you mean 2 mm"]),
    (("line", "--nps", "4", "--fluid-temperature", "180", "--air-temperature", "20", "--wind-speed", "100"),
     ["--wind-speed", "did you mean 100 km/h"]),
    (("line", "--nps", "4", "--fluid-temperature", "180", "--air-temperature", "20", "--layer", "50,600"),
     ["--layer 1 conductivity"]),
    (("size", "--nps", "4", "--fluid-temperature", "180", "--air-temperature", "20", "--insulation-conductivity",
      "45", "--heat-loss-limit", "50"), ["--insulation-conductivity", "did you mean 45 mW/m/K"]),
    (("line", "--units", "US", "--nps", "4", "--fluid-temperature", "180", "--air-temperature", "-400"),
     ["--air-temperature", "degF"]),
])
def test_implausible_values_are_refused_with_a_hint_in_the_users_units(capsys, argv, words):
    err = run_error(capsys, *argv)
    for w in words:
        assert w in err, err
    assert "--allow-unusual" in err and "liquid" not in err.lower()


def test_allow_unusual_computes_a_refused_value(capsys):
    argv = ("surface", "--diameter", "6m", "--surface-temperature", "60degC", "--air-temperature", "20degC")
    assert "--diameter" in run_error(capsys, *argv)
    row = run_json(capsys, *argv, "--allow-unusual")["surface"]["results"][0]
    direct = cl.bare_surface(shape="horizontal_cylinder", diameter=6.0, length=1.0, surface_temperature=333.15,
                             air_temperature=293.15)
    assert row["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-9)


def test_weather_bins_in_degC_are_refused_with_a_hint_not_a_property_error(capsys, tmp_path):
    # issue 12 point 2: a bins file in degC failed with "straddle the boiling point of Air"
    bins = tmp_path / "bins.json"
    bins.write_text(json.dumps({"air_temperature": [-5, 5, 15], "hours": [2000, 4000, 2760]}))
    lines = tmp_path / "lines.csv"
    lines.write_text("tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],location\n"
                     "X-1,4,10,150,20,50@0.04 wool,outdoor\n")
    err = run_error(capsys, "lines", str(lines), "--bins", str(bins))
    assert "bins air_temperature" in err and "did you mean -5 degC" in err and "boiling" not in err
    bins.write_text(json.dumps({"air_temperature": ["-5degC", "5degC", "15degC"], "hours": [2000, 4000, 2760]}))
    assert main([str(x) for x in ("lines", lines, "--bins", bins)]) == 0
    capsys.readouterr()


# ----------------------------------------------------------------------------- point 10: small unit items
def test_nps_fractions_on_the_command_line_and_in_python(capsys):
    # issue 12 point 10: NPS 1-1/2 and 3/4 were refused by the CLI and the API but accepted in a CSV
    # ASME B36.10M outer diameters, metric column: NPS 1-1/2 = 48.3 mm (1.900 in), NPS 3/4 = 26.7 mm (1.050 in)
    assert nominal_pipe("1-1/2").outer_diameter == pytest.approx(0.0483, abs=1e-9)
    assert nominal_pipe("3/4").outer_diameter == pytest.approx(0.0267, abs=1e-9)
    row = line_row(capsys, "--nps", "1-1/2", "--fluid-temperature", "90", "--air-temperature", "20")
    assert row["outer_diameter"] == pytest.approx(0.0483, abs=1e-9)
    row = line_row(capsys, "--nps", "3/4", "--fluid-temperature", "90", "--air-temperature", "20")
    assert row["outer_diameter"] == pytest.approx(0.0267, abs=1e-9)


def test_negative_values_with_units_need_no_equals_sign(capsys):
    # issue 12 point 10: '--air-temperature -10degC' was taken for an option
    spaced = line_row(capsys, "--nps", "2", "--fluid-temperature", "60degC", "--air-temperature", "-10degC")
    joined = line_row(capsys, "--nps", "2", "--fluid-temperature", "60degC", "--air-temperature=-10degC")
    assert spaced["air_temperature"] == pytest.approx(263.15, abs=1e-9) and spaced == joined


def test_humidity_in_percent(capsys):
    # issue 12 point 10: '--relative-humidity 80%' was refused
    argv = ("size", "--nps", "2", "--fluid-temperature", "5degC", "--air-temperature", "25degC",
            "--insulation-conductivity", "0.035")
    percent = run_json(capsys, *argv, "--relative-humidity", "80%")
    fraction = run_json(capsys, *argv, "--relative-humidity", "0.8")
    assert percent["sizing"] == fraction["sizing"]
    assert "did you mean 80%" in run_error(capsys, *argv, "--relative-humidity", "80")


def test_gauge_pressure_adds_the_standard_atmosphere(capsys):
    # issue 12 point 10: barg and psig were not understood; gauge + 101 325 Pa (documented)
    out = run_json(capsys, "steam", "--nps", "6", "--steam-pressure", "2.5barg", "--air-temperature", "10degC",
                   "--layer", "80mm,0.045")["saturated steam line"]["results"][0]
    direct = steam_line(nominal_pipe(6).outer_diameter, 2.5e5 + ATMOSPHERE,
                        [cl.Layer(thickness=0.08, conductivity=0.045)], air_temperature=283.15)
    assert out["steam_pressure"] == pytest.approx(2.5e5 + ATMOSPHERE, rel=1e-12)
    assert out["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-9)
    psig = run_json(capsys, "steam", "--nps", "6", "--steam-pressure", "50psig", "--air-temperature", "10degC",
                    "--layer", "80mm,0.045")["saturated steam line"]["results"][0]
    assert psig["steam_pressure"] == pytest.approx(50 * PSI + ATMOSPHERE, rel=1e-6)


# ----------------------------------------------------------------------------- study files take units too
def test_study_file_values_with_units_equal_si_values():
    from convlib.study import CaseSpec, SweepAxis

    text = ('{"kind": "insulated", "diameter": "4.5in", "fluid_temperature": "180degC", "air_temperature": "68degF",'
            ' "insulation_thickness": "50mm", "insulation_conductivity": "0.045W/m/degC", "wind_speed": "10mph"}')
    case = CaseSpec.model_validate_json(text)
    assert case.diameter == pytest.approx(4.5 * INCH, rel=1e-12)             # 1959 agreement
    assert case.fluid_temperature == pytest.approx(453.15, rel=1e-12)        # K = degC + 273.15
    assert case.air_temperature == pytest.approx(293.15, rel=1e-12)          # 68 degF = 20 degC
    assert case.insulation_thickness == pytest.approx(0.05, rel=1e-12)
    assert case.insulation_conductivity == pytest.approx(0.045, rel=1e-12)   # degC interval = K
    assert case.wind_speed == pytest.approx(4.4704, rel=1e-12)               # 10 mph, mile = 1609.344 m
    axis = SweepAxis.model_validate({"input": "air_temperature", "start": "-10degC", "stop": "30degC", "count": 3})
    assert (axis.start, axis.stop) == pytest.approx((263.15, 303.15), rel=1e-12)
    with pytest.raises(ValueError, match="diameter"):
        CaseSpec.model_validate_json('{"kind": "insulated", "diameter": "4.5 kg", "fluid_temperature": 400}')


def test_one_option_name_per_meaning_with_the_old_names_warned(capsys):
    """One vocabulary (issue): --air-temperature on every command (was --minimum-ambient on freeze and trace),
    --surface-limit (was --touch-limit), --pipe-outer-diameter (was --pipe-diameter); the old names still work for
    one version with a warning. Emissivity and sky view take the same names on line, tank and duct commands."""
    from convlib.cli import main

    args = ["freeze", "--pipe-outer-diameter", "60.3mm", "--wall-thickness", "3.91mm", "--initial-temperature",
            "10degC", "--air-temperature=-15degC", "--layer", "25mm,0.04", "--json"]
    assert main(args) == 0
    new = capsys.readouterr()
    old_args = [a.replace("--air-temperature", "--minimum-ambient").replace("--pipe-outer-diameter", "--pipe-diameter")
                for a in args]
    assert main(old_args) == 0
    old = capsys.readouterr()
    assert old.out == new.out and "warning" not in new.err
    assert "--minimum-ambient is deprecated; use --air-temperature" in old.err
    assert "--pipe-diameter is deprecated; use --pipe-outer-diameter" in old.err
    for command in (["tank", "--diameter", "6m", "--height", "8m"], ["duct", "--width", "600mm", "--height", "400mm",
                                                                    "--length", "20m"]):
        assert main([*command, "--surface-temperature", "40degC", "--air-temperature", "10degC",
                     "--jacket-emissivity", "0.3", "--sky-view-fraction", "0.5", "--json"]) == 0
        capsys.readouterr()


def test_sun_on_lines_from_the_command_line_is_the_python_call(capsys):
    """Sun on lines in the command line (issue: CLI had no sun for lines): --solar-irradiance and
    --solar-absorptivity reach insulated_pipe unchanged."""
    import convlib as cl
    from cli_helpers import run_json

    out = run_json(capsys, "line", "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC",
                   "--layer", "50mm,0.04", "--sky-view-fraction", "0.5", "--solar-irradiance", "800W/m2",
                   "--solar-absorptivity", "0.3", "--jacket-emissivity", "0.1")
    r = cl.insulated_pipe(0.1143, 453.15, [cl.Layer(0.05, 0.04)], air_temperature=293.15, sky_view_fraction=0.5,
                          solar_irradiance=800.0, solar_absorptivity=0.3, jacket_emissivity=0.1)
    assert out["line"]["results"][0]["q_per_length"] == pytest.approx(float(r.q_per_length), rel=1e-9)
    shade = cl.insulated_pipe(0.1143, 453.15, [cl.Layer(0.05, 0.04)], air_temperature=293.15, sky_view_fraction=0.5,
                              jacket_emissivity=0.1)
    assert float(r.q_per_length) < float(shade.q_per_length)   # absorbed sun lowers the net loss
