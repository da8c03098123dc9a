"""``convlib tank --shape horizontal``: the command line gives the library's horizontal tank.

Expected values: direct calls of convlib.vessels.horizontal_tank with the inputs converted by the unit definitions
(K = degC + 273.15, 1 ft = 0.3048 m exactly, NIST SP 811); the physics itself is checked against outside references
in tests/test_horizontal_tank.py.
"""
import pytest

from cli_helpers import run_error, run_json, run_text
from convlib import Layer
from convlib import vessels as v

TITLE = "tank faces"
SIZED = "insulation per face (sized; the layers given stay outside it)"


@pytest.mark.parametrize("heads", v.HEADS)
def test_horizontal_tank_json_is_the_library_tank(capsys, heads):
    out = run_json(capsys, "tank", "--shape", "horizontal", "--diameter", "3m", "--length", "8m", "--heads", heads,
                   "--fluid-temperature", "80degC", "--air-temperature", "5degC", "--wind-speed", "4",
                   "--shell-layer", "50mm,0.04", "--head-layer", "80mm,0.04", "--outdoor")
    r = v.horizontal_tank(3.0, 8.0, heads=heads, fluid_temperature=353.15, air_temperature=278.15, wind_speed=4.0,
                          shell_layers=[Layer(0.05, 0.04)], head_layers=[Layer(0.08, 0.04)], outdoor=True)
    faces = out[TITLE]["results"]
    assert [f["tag"] for f in faces] == ["shell", "heads"]
    assert out["q_total"] == pytest.approx(float(r.q_total), rel=1e-9)
    for row, face in zip(faces, r.faces):
        assert row["q_total"] == pytest.approx(float(face.q_total), rel=1e-9)
        assert row["area"] == pytest.approx(float(face.area), rel=1e-12)
    assert out["notes"] == list(r.notes)


def test_default_heads_and_the_wall_layer_name_for_the_shell(capsys):
    # --wall-layer is the shell's layer too (as on the vertical tank); heads default to 2:1 ellipsoidal
    out = run_json(capsys, "tank", "--shape", "horizontal", "--diameter", "10ft", "--length", "30ft",
                   "--surface-temperature", "60degC", "--air-temperature", "20degC")
    r = v.horizontal_tank(3.048, 9.144, surface_temperature=333.15, air_temperature=293.15)
    assert out["q_total"] == pytest.approx(float(r.q_total), rel=1e-9)
    assert out[TITLE]["results"][1]["area"] == pytest.approx(2 * float(v.head_area(3.048, "ellipsoidal_2to1")))
    a = run_json(capsys, "tank", "--shape", "horizontal", "--diameter", "3m", "--length", "8m", "--fluid-temperature",
                 "90degC", "--air-temperature", "10degC", "--wall-layer", "40mm,0.04")
    b = run_json(capsys, "tank", "--shape", "horizontal", "--diameter", "3m", "--length", "8m", "--fluid-temperature",
                 "90degC", "--air-temperature", "10degC", "--shell-layer", "40mm,0.04")
    assert a == b


def test_horizontal_tank_table_and_sizing_per_face(capsys):
    args = ("tank", "--shape", "horizontal", "--diameter", "2.5m", "--length", "6m", "--heads", "torispherical",
            "--fluid-temperature", "180degC", "--air-temperature", "20degC", "--emissivity", "0.1",
            "--insulation-conductivity", "0.04", "--surface-limit", "60degC")
    text = run_text(capsys, *args)
    assert "shell" in text and "heads" in text and "torispherical (F&D) heads" in text
    rows = run_json(capsys, *args)[SIZED]["results"]
    sized = v.insulation_per_face(lambda t, **over: v.horizontal_tank(
        2.5, 6.0, heads="torispherical", fluid_temperature=453.15, emissivity=0.1, shell_layers=[Layer(t, 0.04)],
        head_layers=[Layer(t, 0.04)], **{"air_temperature": 293.15, **over}), surface_limit=333.15)
    assert [r["tag"] for r in rows] == ["shell", "heads"]
    for row, f in zip(rows, sized):
        assert row["required_thickness"] == pytest.approx(f.required, rel=1e-9)
        assert row["commercial_thickness"] == f.commercial


@pytest.mark.parametrize("argv, named", [
    (("--shape", "horizontal", "--diameter", "3m"), "--length"),
    (("--shape", "horizontal", "--diameter", "3m", "--length", "8m", "--height", "4m"), "--height"),
    (("--shape", "horizontal", "--diameter", "3m", "--length", "8m", "--roof-layer", "50mm,0.04"), "--roof-layer"),
    (("--shape", "horizontal", "--diameter", "3m", "--length", "8m", "--floor", "open"), "--floor"),
    (("--diameter", "3m", "--height", "8m", "--heads", "flat"), "--heads"),
    (("--diameter", "3m", "--height", "8m", "--length", "8m"), "--length"),
    (("--shape", "sphere", "--diameter", "3m", "--head-layer", "50mm,0.04"), "--head-layer"),
])
def test_options_of_another_shape_are_refused_by_name(capsys, argv, named):
    err = run_error(capsys, "tank", *argv, "--surface-temperature", "60degC", "--air-temperature", "10degC")
    assert named in err


def test_help_lists_the_heads_and_an_unknown_head_is_refused(capsys):
    from convlib.cli import main
    with pytest.raises(SystemExit):
        main(["tank", "--help"])
    text = capsys.readouterr().out
    assert "horizontal" in text and all(h in text for h in v.HEADS) and "--head-layer" in text
    with pytest.raises(SystemExit) as info:
        main(["tank", "--shape", "horizontal", "--diameter", "3m", "--length", "8m", "--heads", "conical",
              "--surface-temperature", "60degC", "--air-temperature", "10degC"])
    assert info.value.code == 2 and "--heads" in capsys.readouterr().err
