"""The materials library: each entry against the numbers of its cited source, use by name in Python, on the
command line and in line lists, service-temperature warnings, and users' material files.

Unit conversions used below (definitions, not data): 1 Btu(IT)·in/(h·ft²·°F) = 0.144227889 W/m/K
(Btu_IT = 1055.05585262 J, in = 0.0254 m, ft = 0.3048 m, °F = 5/9 K); T[K] = (T[°F] - 32) 5/9 + 273.15.
"""
from __future__ import annotations

import json

import numpy as np
import pytest

import convlib as cl
from convlib import materials
from convlib.conductivity import Conductivity
from convlib.errors import InputError
from convlib.linelist import run_line_list
from convlib.lines import LayerSpec
from convlib.pipe import Layer, insulated_pipe

from cli_helpers import run_error, run_json, run_text

BTU_IN = 0.144227889  # W/m/K per Btu·in/(h·ft²·°F), to 9 digits


def kelvin(deg_f):
    return (np.asarray(deg_f, dtype=float) - 32.0) * 5.0 / 9.0 + 273.15


@pytest.fixture(autouse=True)
def builtin_library():
    """Every test starts and ends with the built-in library only (user files loaded in a test are forgotten)."""
    materials.reset()
    yield
    materials.reset()


# ----------------------------------------------------------------------------- entries against their sources
#: Manson Insulation, Alley-K pipe insulation, product page "Technical data", thermal conductivity by ASTM C335:
#: mean temperature [°F] -> Btu·in/(ft²·h·°F), and the page's own W/m·°C column (rounded to 3 decimals).
ALLEY_K_F = [75, 100, 200, 300, 400, 500, 600]
ALLEY_K_BTU = [0.23, 0.24, 0.28, 0.34, 0.42, 0.51, 0.62]
ALLEY_K_SI = [0.033, 0.035, 0.040, 0.049, 0.061, 0.074, 0.089]


def test_glass_fibre_table_is_the_data_sheet_table():
    m = materials.material("glass_fiber_pipe_alley_k")
    k = m.conductivity
    assert k.kind == "table" and k.form == "mean"
    np.testing.assert_allclose(k.temperatures, kelvin(ALLEY_K_F), rtol=0, atol=1e-9)
    np.testing.assert_allclose(k.values, np.array(ALLEY_K_BTU) * BTU_IN, rtol=1e-8)
    # the data sheet's SI column, rounded to 0.001 W/m/K
    np.testing.assert_allclose(k.values, ALLEY_K_SI, rtol=0, atol=0.0005 + 1e-12)
    # maximum service temperature 1000 °F (ASTM C411), same data sheet
    assert m.max_temperature == pytest.approx(kelvin(1000), abs=1e-9)
    assert "Alley-K" in m.source and "C335" in m.source


def test_calcium_silicate_is_the_c533_type1_maximum_at_100F_and_flagged_above():
    # ASTM C533 Table 1, Type I: 0.41 Btu·in/(h·ft²·°F) maximum at 100 °F mean (North Refractories' summary of
    # C533); Type I for use to 1200 °F (C533-07, 4.1.2)
    m = materials.material("calcium_silicate_c533_type1")
    assert float(m.conductivity.at(kelvin(100))) == pytest.approx(0.41 * BTU_IN, rel=1e-8)
    assert m.max_temperature == pytest.approx(kelvin(1200), abs=1e-9)
    assert "maximum" in m.note and "C533" in m.source
    # one published point: a face above 100 °F lies outside the data (k held, flagged); below it does not
    assert m.conductivity.outside_range(kelvin(150)) and not m.conductivity.outside_range(kelvin(90))


def test_elastomeric_is_the_c534_grade1_maximum_at_75F():
    # ASTM C534/C534M Grade 1: 0.28 Btu·in/(h·ft²·°F) maximum at 75 °F mean -- recalled, not checked against the
    # standard (the entry says "from memory"); service -297 to 220 °F (C534/C534M-08, 1.1)
    m = materials.material("elastomeric_c534_grade1")
    assert float(m.conductivity.at(kelvin(75))) == pytest.approx(0.28 * BTU_IN, rel=1e-8)
    assert "from memory" in m.source + m.note
    assert (m.min_temperature, m.max_temperature) == pytest.approx((kelvin(-297), kelvin(220)), abs=1e-9)


def test_cellular_glass_is_the_data_sheet_r_per_inch():
    # Owens Corning FOAMGLAS F data sheet: thermal resistance per inch 2.8 h·ft²·°F/Btu at 75 °F mean; service
    # -445 to 806 °F. k = 1 in / R.
    m = materials.material("cellular_glass_foamglas_f")
    assert float(m.conductivity.at(kelvin(75))) == pytest.approx(BTU_IN / 2.8, rel=1e-8)
    assert (m.min_temperature, m.max_temperature) == pytest.approx((kelvin(-445), kelvin(806)), abs=1e-9)


@pytest.mark.parametrize("name, k", [("aluminium_jacket", 230.0), ("stainless_steel_jacket", 16.0),
                                     ("steel_jacket", 45.0)])
def test_jacket_metals_are_cibse_guide_a_table_3_36(name, k):
    # CIBSE Guide A, Table 3.36: aluminium 230, stainless steel (20 % Ni) 16, steel 45 W/m/K
    m = materials.material(name)
    assert m.kind == "jacket" and m.conductivity.is_constant
    assert float(m.conductivity.constant_value) == k


@pytest.mark.parametrize("name", [m.name for m in materials._builtin().values()])
def test_every_entry_names_its_source_and_k_rises_with_temperature(name):
    m = materials.material(name)
    assert m.source and m.display_name
    k = m.conductivity
    if k.kind == "table":  # published tables of these materials rise with mean temperature
        assert np.all(np.diff(k.values) > 0) and np.all(np.diff(k.temperatures) > 0)
    t = np.linspace(250.0, 700.0, 91)
    assert np.all(np.diff(k.at(t)) >= 0)  # never falls (held constant beyond the data)


def test_jacket_emissivity_presets_name_a_source_and_stay_in_0_1():
    presets = materials.jacket_emissivities()
    assert {"aluminium_new", "aluminium_oxidised", "stainless_steel", "galvanised_steel_new", "painted",
            "pvc_or_fabric"} <= set(presets)
    for name, (value, display, source) in presets.items():
        assert 0.0 < value < 1.0 and display and source
        assert ("from memory" in source) or ("no source" in source) or source
        assert materials.jacket_emissivity(name) == value
    # oxidised aluminium emits more than new; painted surfaces far more than bare metal
    assert materials.jacket_emissivity("aluminium_new") < materials.jacket_emissivity("aluminium_oxidised") \
        < materials.jacket_emissivity("painted")
    with pytest.raises(InputError, match="aluminium_new"):
        materials.jacket_emissivity("chrome")


# ----------------------------------------------------------------------------- by name
def test_layer_by_name_equals_the_layer_built_by_hand():
    by_name = materials.layer(0.05, "glass_fiber_pipe_alley_k")
    by_hand = Layer(0.05, Conductivity.table(kelvin(ALLEY_K_F), np.array(ALLEY_K_BTU) * BTU_IN, form="mean"))
    args = dict(air_temperature=293.15, jacket_emissivity=0.1)
    a = insulated_pipe(0.1143, np.array([353.15, 453.15, 553.15]), [by_name], **args)
    b = insulated_pipe(0.1143, np.array([353.15, 453.15, 553.15]), [by_hand], **args)
    np.testing.assert_allclose(a.q_per_length, b.q_per_length, rtol=1e-9)
    np.testing.assert_allclose(a.surface_temperature, b.surface_temperature, rtol=0, atol=1e-6)
    assert by_name.name == "glass_fiber_pipe_alley_k" and by_name.conductivity is \
        materials.material("glass_fiber_pipe_alley_k").conductivity


def test_unknown_material_lists_the_names():
    with pytest.raises(InputError) as info:
        materials.material("rock_wool_magic")
    for name in materials.material_names():
        assert name in str(info.value)
    assert info.value.field == "material"


def test_layer_spec_takes_a_material_or_a_conductivity_not_both():
    spec = LayerSpec(thickness=0.05, material="Calcium_Silicate_C533_Type1")
    assert spec.material == "calcium_silicate_c533_type1"
    assert spec.layer().conductivity is materials.material("calcium_silicate_c533_type1").conductivity
    with pytest.raises(ValueError, match="one of them"):
        LayerSpec(thickness=0.05, conductivity=0.04, material="calcium_silicate_c533_type1")
    with pytest.raises(ValueError, match="glass_fiber_pipe_alley_k"):
        LayerSpec(thickness=0.05, material="nothing")


LINE = ("line", "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC")


def test_cli_and_line_list_give_the_same_heat_flow_for_a_material(capsys, tmp_path):
    cli = run_json(capsys, *LINE, "--layer", "50mm,calcium_silicate_c533_type1", "--layer", "0.7mm,aluminium_jacket",
                   "--jacket-emissivity", "aluminium_oxidised")["line"]["results"][0]
    path = tmp_path / "lines.csv"
    path.write_text("tag,nps,length,fluid_temperature[degC],air_temperature[degC],layers[mm],jacket_emissivity\n"
                    'L1,4,1,180,20,"50,calcium_silicate_c533_type1; 0.7,aluminium_jacket",0.13\n', encoding="utf-8")
    res = run_line_list(str(path))
    assert not res.errors
    assert float(res.q_per_length[0]) == pytest.approx(cli["q_per_length"], rel=1e-6)
    # and both equal the library call (the same k(T) objects)
    direct = insulated_pipe(0.1143, 453.15, [materials.layer(0.05, "calcium_silicate_c533_type1"),
                                             materials.layer(0.0007, "aluminium_jacket")],
                            air_temperature=293.15, jacket_emissivity=0.13)
    assert cli["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-9)
    # k held at its one published point above 38 degC: flagged, in both
    assert any("outside its conductivity data" in w for w in cli["warnings"])
    assert "outside its conductivity data" in res.notes[0]


def test_line_list_groups_lines_by_material_and_keeps_each_lines_numbers(tmp_path):
    path = tmp_path / "lines.csv"
    path.write_text("tag,nps,length,fluid_temperature[degC],air_temperature[degC],layers[mm]\n"
                    'A,4,1,180,20,"50,glass_fiber_pipe_alley_k"\n'
                    'B,4,1,180,20,"50,cellular_glass_foamglas_f"\n'
                    'C,4,1,180,20,"50,0.045"\n', encoding="utf-8")
    res = run_line_list(str(path))
    for i, k in enumerate([materials.material("glass_fiber_pipe_alley_k").conductivity,
                           materials.material("cellular_glass_foamglas_f").conductivity, 0.045]):
        alone = insulated_pipe(0.1143, 453.15, [Layer(0.05, k)], air_temperature=293.15)
        assert float(res.q_per_length[i]) == pytest.approx(float(alone.q_per_length), rel=1e-6)


def test_unknown_material_word_in_cli_and_line_list_lists_the_names(capsys, tmp_path):
    err = run_error(capsys, *LINE, "--layer", "50mm,mineral_wool")
    assert "is not a conductivity" in err and "glass_fiber_pipe_alley_k" in err
    path = tmp_path / "lines.csv"
    path.write_text("tag,nps,length,fluid_temperature[degC],air_temperature[degC],layers[mm]\n"
                    'A,4,1,180,20,"50,mineral_wool"\n', encoding="utf-8")
    res = run_line_list(str(path))
    assert len(res.errors) == 1 and "calcium_silicate_c533_type1" in res.errors[0].reason
    # a number with a wrong unit keeps the reader's error alone
    err = run_error(capsys, *LINE, "--layer", "50mm,0.04kg")
    assert "material name" not in err


def test_above_the_maximum_service_temperature_is_a_warning_not_a_silent_answer(capsys, tmp_path):
    row = run_json(capsys, "line", "--nps", "4", "--fluid-temperature", "600degC", "--air-temperature", "20degC",
                   "--layer", "50mm,glass_fiber_pipe_alley_k")["line"]["results"][0]
    assert any("maximum service temperature 538 degC" in w for w in row["warnings"])
    path = tmp_path / "lines.csv"
    path.write_text("tag,nps,length,fluid_temperature[degC],air_temperature[degC],layers[mm]\n"
                    'HOT,4,1,600,20,"50,glass_fiber_pipe_alley_k"\nOK,4,1,180,20,"50,glass_fiber_pipe_alley_k"\n',
                    encoding="utf-8")
    res = run_line_list(str(path))
    assert "maximum service temperature" in res.notes[0] and "maximum service temperature" not in res.notes[1]
    # the Python check itself, point by point
    lay = [materials.layer(0.05, "glass_fiber_pipe_alley_k")]
    r = insulated_pipe(0.1143, np.array([453.15, 873.15]), lay, air_temperature=293.15)
    (mask, text), = materials.service_warnings(lay, r)
    assert mask.tolist() == [False, True] and "Alley-K" in text


def test_materials_command_lists_names_ranges_and_sources(capsys):
    payload = run_json(capsys, "materials")
    assert [m["name"] for m in payload["materials"]] == materials.material_names()
    assert all(m["source"] for m in payload["materials"])
    alley = next(m for m in payload["materials"] if m["name"] == "glass_fiber_pipe_alley_k")
    assert alley["data_range"] == pytest.approx([kelvin(75), kelvin(600)])
    text = run_text(capsys, "materials", "--units", "US")
    assert "glass_fiber_pipe_alley_k" in text and "75..600" in text and "aluminium_oxidised" in text


# ----------------------------------------------------------------------------- user files
GOOD = {"materials": [{"name": "site_wool", "display_name": "Site mineral wool", "source": "invented test data",
                       "temperature_unit": "degC", "temperatures": [50, 100, 200], "conductivities": [0.04, 0.046, 0.06],
                       "max_temperature": 600}]}


def _write(tmp_path, name, content):
    path = tmp_path / name
    path.write_text(content if isinstance(content, str) else json.dumps(content), encoding="utf-8")
    return path


def test_user_json_file_extends_the_library_and_is_usable_by_name(tmp_path, capsys):
    assert materials.load_materials(_write(tmp_path, "m.json", GOOD)) == ["site_wool"]
    m = materials.material("site_wool")
    np.testing.assert_allclose(m.conductivity.temperatures, [323.15, 373.15, 473.15])
    assert m.max_temperature == pytest.approx(873.15)
    row = run_json(capsys, *LINE, "--layer", "50mm,site_wool")["line"]["results"][0]
    direct = insulated_pipe(0.1143, 453.15, [Layer(0.05, m.conductivity)], air_temperature=293.15)
    assert row["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-9)


def test_user_csv_file_with_units_in_the_header(tmp_path):
    path = _write(tmp_path, "m.csv", "name,temperature[degF],conductivity[Btu*in/(h*ft**2*degF)],max_temperature[degF],"
                  "source\nmy_pipe,100,0.25,850,invented\nmy_pipe,300,0.35,,\n")
    assert materials.load_materials(path) == ["my_pipe"]
    k = materials.material("my_pipe").conductivity
    np.testing.assert_allclose(k.temperatures, kelvin([100, 300]))
    np.testing.assert_allclose(k.values, np.array([0.25, 0.35]) * BTU_IN, rtol=1e-8)
    assert materials.material("my_pipe").max_temperature == pytest.approx(kelvin(850))


BAD_FILES = [
    ("m.json", {"materials": [{**GOOD["materials"][0], "source": ""}]}, "source"),
    ("m.json", {"materials": [{**GOOD["materials"][0], "temperatures": [200, 100, 50]}]}, "temperatures"),
    ("m.json", {"materials": [{**GOOD["materials"][0], "conductivities": [0.04, -0.01, 0.06]}]}, "conductivity"),
    ("m.json", {"materials": [{**GOOD["materials"][0], "conductivities": [0.04, "lots", 0.06]}]}, "conductivities"),
    ("m.json", {"materials": [{**GOOD["materials"][0], "colour": "red"}]}, "colour"),
    ("m.json", {"materials": [{**GOOD["materials"][0], "name": "Site Wool"}]}, "name"),
    ("m.json", {"materials": [{**GOOD["materials"][0], "name": "glass_fiber_pipe_alley_k"}]}, "name"),
    ("m.json", {"materials": [GOOD["materials"][0], GOOD["materials"][0]]}, "name"),
    ("m.json", {"materials": [{**GOOD["materials"][0], "name": "ok_one"}, {**GOOD["materials"][0],
                                                                           "temperature_unit": "kg"}]},
     "temperature_unit"),
    ("m.json", {"stuff": []}, "materials"),
    ("m.json", '{"materials": [', "path"),
    ("m.csv", "name,temperature,conductivity,source\nx,300,0.04,s\nx,400,,s\n", "temperature"),
    ("m.csv", "name,colour\nx,red\n", "header"),
]


@pytest.mark.parametrize("filename, content, field", BAD_FILES)
def test_a_bad_user_file_fails_clearly_and_leaves_the_library_unchanged(tmp_path, filename, content, field):
    before = {name: materials.material(name) for name in materials.material_names()}
    with pytest.raises(InputError) as info:
        materials.load_materials(_write(tmp_path, filename, content))
    assert str(info.value).startswith("material file") and field in (info.value.field or "") + str(info.value)
    assert materials.material_names() == sorted(before)
    assert all(materials.material(n) is m for n, m in before.items())


def test_a_user_file_over_the_size_limit_is_refused_before_reading(tmp_path):
    path = tmp_path / "big.json"
    path.write_bytes(b" " * (materials.MAX_MATERIAL_BYTES + 1))
    with pytest.raises(InputError, match="limit|larger"):
        materials.load_materials(path)


def test_replacing_a_loaded_material_needs_replace(tmp_path):
    path = _write(tmp_path, "m.json", GOOD)
    materials.load_materials(path)
    with pytest.raises(InputError, match="already in the library"):
        materials.load_materials(path)
    materials.load_materials(path, replace=True)
    assert "site_wool" in materials.material_names()


def test_public_name_of_the_package():
    assert cl.materials.material("steel_jacket").name == "steel_jacket"
