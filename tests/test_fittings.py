"""Bare flange pairs and valves (convlib.fittings) against outside sources.

Sources:
- Flange dimensions: ASME B16.5, Class 150 "common dimensions" as printed in a flange maker's catalogue sheet
  (ASME B16.5 Flanges, Class 150, revised 1-99; an edition that lists the thickness C with the 0.06 in raised
  face), transcribed below; and the same flanges in mm from a forging maker's catalogue ("ANSI B16.5 forged
  flanges", Class 150). No outside table was at hand for Class 300 or for ASME B16.10 valves: those values are
  marked "from memory" in convlib.fittings and checked here only for order (class 300 larger than class 150).
- Pipe outside diameters: ASME B36.10M (NPS 2: 2.375 in, NPS 4: 4.500 in, NPS 8: 8.625 in).
- Natural convection: Churchill & Chu (1975), horizontal cylinder, Int. J. Heat Mass Transfer 18, 1049,
  doi:10.1016/0017-9310(75)90222-7, and vertical plate, ibid. 1323, doi:10.1016/0017-9310(75)90243-4 (as in
  Incropera et al., Fundamentals of Heat and Mass Transfer, eqs. 9.26 and 9.34), with air properties called
  from CoolProp here; grey-body radiation with the CODATA Stefan-Boltzmann constant.
The geometry (rims as cylinders of the flange diameter, faces as annuli) is the one the module states; the areas
below are recomputed by hand formulas from the sheet's dimensions.
"""
import math

import numpy as np
import pytest

from convlib import InputError
from convlib.fittings import (FLANGE_CLASS_150, bare_flange_pair, bare_valve, flange_dimensions,
                              valve_face_to_face)
from convlib.pipe import Layer

INCH = 0.0254
SIGMA = 5.670374419e-8  # CODATA 2018 Stefan-Boltzmann constant [W/m2/K4]

#: ASME B16.5 Class 150, catalogue sheet (revised 1-99): NPS -> (outside diameter O, thickness C incl. 0.06 in
#: raised face) [in].
SHEET_CLASS_150 = {
    0.5: (3.50, 0.44), 0.75: (3.88, 0.50), 1.0: (4.25, 0.56), 1.25: (4.62, 0.62), 1.5: (5.00, 0.69),
    2.0: (6.00, 0.75), 2.5: (7.00, 0.88), 3.0: (7.50, 0.94), 3.5: (8.50, 0.94), 4.0: (9.00, 0.94),
    5.0: (10.00, 0.94), 6.0: (11.00, 1.00), 8.0: (13.50, 1.12), 10.0: (16.00, 1.19), 12.0: (19.00, 1.25),
    14.0: (21.00, 1.38), 16.0: (23.50, 1.44), 18.0: (25.00, 1.56), 20.0: (27.50, 1.69), 24.0: (32.00, 1.88),
}
RAISED_FACE = 0.06  # [in], ASME B16.5 raised face of Class 150 and 300 flanges (1/16 in)


# ----------------------------------------------------------------------------- tables
@pytest.mark.parametrize("nps", sorted(SHEET_CLASS_150))
def test_class_150_flanges_match_the_catalogue_sheet(nps):
    outside, thickness = flange_dimensions(nps, 150)
    sheet_outside, sheet_thickness = SHEET_CLASS_150[nps]
    assert float(outside) / INCH == pytest.approx(sheet_outside, abs=1e-9)
    # the sheet's thickness holds the raised face; ours leaves it out; both rounded to 0.01 in
    assert float(thickness) / INCH + RAISED_FACE == pytest.approx(sheet_thickness, abs=0.011)


#: The same flanges in millimetres, from a forging maker's catalogue ("ANSI B16.5 forged flanges", Class 150, unit mm:
#: outside diameter D, thickness t with the raised face), NPS 1/2 ... 24 in the order of SHEET_CLASS_150.
METRIC_CATALOGUE_150_D = (89, 99, 108, 117, 127, 152, 178, 191, 216, 229, 254, 279, 343, 406, 483, 533, 597, 635, 699,
                          813)
METRIC_CATALOGUE_150_T = (11.2, 12.7, 14.2, 15.7, 17.5, 19.1, 22.4, 23.9, 23.9, 23.9, 23.9, 25.4, 28.4, 30.2, 31.8, 35.1,
                          36.6, 39.6, 42.9, 47.8)


def test_class_150_flanges_match_a_metric_catalogue():
    outside, thickness = flange_dimensions(np.array(sorted(SHEET_CLASS_150)), 150)
    np.testing.assert_allclose(outside * 1000, METRIC_CATALOGUE_150_D, atol=0.6)  # catalogue rounds to 1 mm
    np.testing.assert_allclose((thickness + RAISED_FACE * INCH) * 1000, METRIC_CATALOGUE_150_T, atol=0.35)


def test_the_tables_cover_nps_half_to_24_and_refuse_other_sizes_listing_the_known_ones():
    assert sorted(FLANGE_CLASS_150) == sorted(SHEET_CLASS_150)
    with pytest.raises(InputError, match=r"NPS 7 is not in the table.*sizes known are: 0.5, 0.75, 1, .*, 24$") as e:
        flange_dimensions(7)
    assert e.value.field == "nps"
    with pytest.raises(InputError, match="NPS 3.5 is not in the table of ASME B16.10"):
        valve_face_to_face(3.5)
    with pytest.raises(InputError, match="pressure_class 600 has no table here; choose one of: 150, 300"):
        bare_valve(4, 400.0, pressure_class=600, air_temperature=293.15)
    with pytest.raises(InputError, match="not a nominal pipe size"):
        bare_flange_pair("four", 400.0, air_temperature=293.15)
    with pytest.raises(InputError, match="layers must be convlib.Layer"):
        bare_flange_pair(4, 400.0, layers=[(0.05, 0.04)], air_temperature=293.15)
    with pytest.raises(InputError, match="air_temperature is required"):
        bare_flange_pair(4, 400.0)


def test_class_300_flanges_are_larger_than_class_150():
    # ASME B16.5: a higher class at the same NPS has a larger and thicker flange, and B16.10 a longer valve
    o150, t150 = flange_dimensions(np.array(sorted(SHEET_CLASS_150)), 150)
    o300, t300 = flange_dimensions(np.array(sorted(SHEET_CLASS_150)), 300)
    assert np.all(o300 > o150) and np.all(t300 > t150)
    sizes = np.array([0.5, 1, 2, 4, 6, 8, 12, 24])
    assert np.all(valve_face_to_face(sizes, 300) > valve_face_to_face(sizes, 150))


def test_strings_as_written_read_as_nps():
    assert flange_dimensions("1-1/2")[0] == pytest.approx(5.00 * INCH)


# ----------------------------------------------------------------------------- areas (hand formulas)
def _annulus(outside, inside):
    return math.pi / 4 * (outside ** 2 - inside ** 2)


def test_flange_pair_area_by_hand_bare_and_insulated_line():
    o, c = (v * INCH for v in SHEET_CLASS_150[4.0])
    t = c - RAISED_FACE * INCH
    pipe = 4.500 * INCH  # ASME B36.10M NPS 4
    bare = bare_flange_pair(4, 423.15, air_temperature=293.15)
    assert float(bare.item_length) == pytest.approx(2 * t, rel=1e-3)
    assert float(bare.area) == pytest.approx(math.pi * o * 2 * t + 2 * _annulus(o, pipe), rel=2e-3)
    insulated = bare_flange_pair(4, 423.15, layers=[Layer(0.04, 0.04)], air_temperature=293.15)
    assert float(insulated.area) == pytest.approx(math.pi * o * 2 * t + 2 * _annulus(o, pipe + 0.08), rel=2e-3)


def test_valve_area_by_hand():
    o, c = (v * INCH for v in SHEET_CLASS_150[8.0])
    t = c - RAISED_FACE * INCH
    face_to_face = 11.50 * INCH  # ASME B16.10, Class 150 flanged gate valve NPS 8 (from memory)
    pipe = 8.625 * INCH  # ASME B36.10M NPS 8
    r = bare_valve(8, 423.15, layers=[Layer(0.05, 0.04)], air_temperature=293.15)
    length = face_to_face + 2 * t
    assert float(r.item_length) == pytest.approx(length, rel=1e-3)
    assert float(r.area) == pytest.approx(math.pi * o * length + 2 * _annulus(o, pipe + 0.1), rel=2e-3)


# ----------------------------------------------------------------------------- heat against Churchill-Chu
def _air(film):
    CP = pytest.importorskip("CoolProp.CoolProp")
    props = {k: CP.PropsSI(k, "T", film, "P", 101325.0, "Air") for k in ("D", "V", "L", "Prandtl",
                                                                        "isobaric_expansion_coefficient")}
    nu = props["V"] / props["D"]
    return nu, props["L"], props["Prandtl"], props["isobaric_expansion_coefficient"]


def _churchill_chu(ts, ta, length, base, pr_constant):
    """Average h [W/m2/K] of Churchill & Chu (1975) on ``length``: cylinder (0.60, 0.559), plate (0.825, 0.492)."""
    nu, k, pr, beta = _air(0.5 * (ts + ta))
    alpha = nu / pr
    ra = 9.80665 * beta * abs(ts - ta) * length ** 3 / (nu * alpha)
    nusselt = (base + 0.387 * ra ** (1 / 6) / (1 + (pr_constant / pr) ** (9 / 16)) ** (8 / 27)) ** 2
    return nusselt * k / length


@pytest.mark.parametrize("ts", [353.15, 453.15])
def test_rim_alone_against_churchill_chu_horizontal_cylinder(ts):
    # NPS 2 Class 150 with 50 mm of insulation: the line (60.3 + 100 mm) is wider than the flange (152.4 mm),
    # so only the rim is exposed: a horizontal cylinder of the flange diameter over 2 t
    ta, eps = 293.15, 0.9
    o, c = (v * INCH for v in SHEET_CLASS_150[2.0])
    length = 2 * (c - RAISED_FACE * INCH)
    r = bare_flange_pair(2, ts, layers=[Layer(0.05, 0.04)], air_temperature=ta, emissivity=eps)
    h = _churchill_chu(ts, ta, o, 0.60, 0.559)
    expected = math.pi * o * length * (h * (ts - ta) + eps * SIGMA * (ts ** 4 - ta ** 4))
    assert float(r.q_item) == pytest.approx(expected, rel=0.01)
    assert any("faces are hidden" in n for n in r.notes)


def test_bare_line_pair_rim_plus_faces_against_churchill_chu():
    # NPS 4 Class 150 on a bare line at 150 degC: rim (cylinder, D = O) + two faces (vertical plates of height O)
    ts, ta, eps = 423.15, 293.15, 0.8
    o, c = (v * INCH for v in SHEET_CLASS_150[4.0])
    length = 2 * (c - RAISED_FACE * INCH)
    face = 2 * _annulus(o, 4.500 * INCH)
    radiation = eps * SIGMA * (ts ** 4 - ta ** 4)
    rim = math.pi * o * length * (_churchill_chu(ts, ta, o, 0.60, 0.559) * (ts - ta) + radiation)
    faces = face * (_churchill_chu(ts, ta, o, 0.825, 0.492) * (ts - ta) + radiation)
    r = bare_flange_pair(4, ts, air_temperature=ta, emissivity=eps)
    assert float(r.q_item) == pytest.approx(rim + faces, rel=0.01)
    # the bare line over the same length: a horizontal cylinder of the pipe's diameter (Churchill-Chu again)
    pipe = 4.500 * INCH
    line = math.pi * pipe * length * (_churchill_chu(ts, ta, pipe, 0.60, 0.559) * (ts - ta) + radiation)
    assert float(r.q_insulated_same_length) == pytest.approx(line, rel=0.01)
    assert float(r.extra_heat) == pytest.approx(rim + faces - line, rel=0.015)
    assert float(r.equivalent_length) == pytest.approx((rim + faces - line) / (line / length), rel=0.015)


# ----------------------------------------------------------------------------- behaviour
def test_monotone_in_nps_and_temperature():
    sizes = np.array([0.5, 1, 2, 3, 4, 6, 8, 10, 12, 16, 20, 24])
    layers = [Layer(0.05, 0.04)]
    for item in (bare_flange_pair, bare_valve):
        by_size = item(sizes, 453.15, layers=layers, air_temperature=293.15)
        assert np.all(np.diff(by_size.q_item) > 0) and np.all(np.diff(by_size.area) > 0)
        by_temperature = item(4, np.array([323.15, 373.15, 423.15, 473.15, 573.15]), layers=layers,
                              air_temperature=293.15)
        assert np.all(np.diff(by_temperature.q_item) > 0) and np.all(np.diff(by_temperature.extra_heat) > 0)
        assert np.all(by_temperature.extra_heat > 0) and np.all(by_temperature.equivalent_length > 0)


def test_a_cold_fitting_gains_heat():
    for item in (bare_flange_pair, bare_valve):
        r = item(6, 278.15, layers=[Layer(0.04, 0.035)], air_temperature=303.15)
        assert r.q_item < 0 and r.extra_heat < 0 and r.q_insulated_same_length < 0
        assert r.equivalent_length > 0  # metres of line that gain as much


def test_a_valve_adds_more_than_a_flange_pair_and_wind_adds_more():
    kwargs = dict(layers=[Layer(0.05, 0.04)], air_temperature=293.15)
    assert bare_valve(4, 453.15, **kwargs).extra_heat > bare_flange_pair(4, 453.15, **kwargs).extra_heat
    windy = bare_flange_pair(4, 453.15, wind_speed=np.array([0.0, 2.0, 8.0]), **kwargs)
    assert np.all(np.diff(windy.extra_heat) > 0)


def test_equivalent_length_is_nan_with_a_note_where_the_line_neither_loses_nor_gains():
    r = bare_flange_pair(4, np.array([293.15, 393.15]), air_temperature=293.15)
    assert np.isnan(r.equivalent_length[0]) and np.isfinite(r.equivalent_length[1])
    assert any("undefined" in n for n in r.notes)
    assert any("Caution" in n for n in r.notes)


# ----------------------------------------------------------------------------- line list
LIST = """tag,nps,outer_diameter[mm],length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],jacket_emissivity,bare_valve,bare_flange_pair,pressure_class,location
A,4,,10,180,20,"50,0.045",0.1,,,,indoor
B,4,,10,180,20,"50,0.045",0.1,1,2,,indoor
C,4,,10,180,20,"50,0.045",0.1,1,2,300,outdoor
D,,114.3,10,180,20,"50,0.045",0.1,1,,,indoor
E,4,,10,180,20,"50,0.045",0.1,,1,600,indoor
F,3.5,,10,180,20,"50,0.045",0.1,1,,,indoor
G,6,,10,5,30,"40,0.035",0.9,,3,,indoor
"""


def _items(tag, nps, tf, ta, layers, eps, valves, pairs, pressure_class=150, **around):
    kw = dict(layers=layers, jacket_emissivity=eps, air_temperature=ta, pressure_class=pressure_class, **around)
    return (valves * bare_valve(nps, tf, **kw).extra_heat if valves else 0.0) + \
        (pairs * bare_flange_pair(nps, tf, **kw).extra_heat if pairs else 0.0)


def test_line_list_adds_the_extra_heat_of_bare_items_to_q_total_and_the_year(tmp_path):
    import io

    from convlib.design import WeatherBins
    from convlib.linelist import run_line_list, write_results_csv
    from convlib.radiation import sky_temperature

    res = run_line_list(io.StringIO(LIST))
    assert res.tag == ("A", "B", "C", "G")
    assert {e.tag: e.reason.split(":")[0] for e in res.errors} == {"D": "nps", "E": "pressure_class", "F": "nps"}
    assert "bare valves and flange pairs need the line's nps" in res.errors[0].reason
    assert "sizes known are" in res.errors[2].reason
    hot = [Layer(0.05, 0.045)]
    expected = {"A": 0.0, "B": _items("B", 4, 453.15, 293.15, hot, 0.1, 1, 2),
                "C": _items("C", 4, 453.15, 293.15, hot, 0.1, 1, 2, 300, sky_view_fraction=0.5,
                            sky_temperature=sky_temperature(293.15)),
                "G": _items("G", 6, 278.15, 303.15, [Layer(0.04, 0.035)], 0.9, 0, 3)}
    for i, tag in enumerate(res.tag):
        assert res.bare_fittings_heat[i] == pytest.approx(float(expected[tag]), rel=1e-9)
        assert res.q_total[i] == pytest.approx(res.q_per_length[i] * res.equivalent_length[i] + float(expected[tag]),
                                               rel=1e-9)
        assert res.heat_kwh[i] == pytest.approx(res.q_total[i] * 8760 / 1000, rel=1e-9)  # design air all year
    assert res.bare_fittings_heat[2] > res.bare_fittings_heat[1] > 0 > res.bare_fittings_heat[3]  # class 300; cold
    assert any("bare flange or valve" in c for c in res.cautions)
    write_results_csv(res, tmp_path / "out.csv")
    assert "bare_fittings_heat[W]" in (tmp_path / "out.csv").read_text().splitlines()[0]
    # with weather bins the outdoor line's items see each bin's air and wind
    bins = WeatherBins([268.15, 283.15], [4.0, 2.0], [3000.0, 5760.0])
    year = run_line_list(io.StringIO(LIST), bins)
    c = year.tag.index("C")
    per_bin = [_items("C", 4, 453.15, t, hot, 0.1, 1, 2, 300, wind_speed=w, sky_view_fraction=0.5,
                      sky_temperature=sky_temperature(t)) for t, w in ((268.15, 4.0), (283.15, 2.0))]
    pipe = year.heat_kwh[c] - (float(per_bin[0]) * 3000 + float(per_bin[1]) * 5760) / 1000
    line_only = run_line_list(io.StringIO(LIST.replace(",1,2,300,outdoor", ",,,300,outdoor")), bins)
    assert pipe == pytest.approx(line_only.heat_kwh[line_only.tag.index("C")], rel=1e-9)


# ----------------------------------------------------------------------------- command line
def test_cli_line_prints_the_extra_heat_and_equivalent_length_of_bare_items(capsys):
    from cli_helpers import run_error, run_json, run_text

    base = ("line", "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC",
            "--layer", "50mm,0.045", "--jacket-emissivity", "0.1", "--length", "10m")
    out = run_json(capsys, *base, "--bare-valves", "1", "--bare-flange-pairs", "2", "--pressure-class", "300")
    rows = out["bare items (extra heat over the line they replace)"]["results"]
    kw = dict(pressure_class=300, layers=[Layer(0.05, 0.045)], jacket_emissivity=0.1, air_temperature=293.15)
    valve, pair = bare_valve(4, 453.15, **kw), bare_flange_pair(4, 453.15, **kw)
    assert [r["tag"] for r in rows] == ["bare valve", "bare flange pair"]
    assert rows[0]["extra_heat"] == pytest.approx(float(valve.extra_heat), rel=1e-9)
    assert rows[1]["extra_heat"] == pytest.approx(2 * float(pair.extra_heat), rel=1e-9)
    assert out["equivalent_length"] == pytest.approx(float(valve.equivalent_length + 2 * pair.equivalent_length))
    line_q = out["line"]["results"][0]["q_total"]
    assert out["q_total_with_bare_items"] == pytest.approx(line_q + float(valve.extra_heat + 2 * pair.extra_heat))
    assert any("bare flange or valve" in c for c in out["cautions"])
    text = run_text(capsys, *base, "--bare-valves", "1", "--units", "US")
    assert "bare items add as much heat as" in text and " ft of this line" in text and "Btu/h" in text
    assert "bare items" not in run_text(capsys, *base)  # none asked, none shown
    assert "need --nps" in run_error(capsys, "line", "--pipe-outer-diameter", "114.3mm", "--fluid-temperature",
                                     "180degC", "--air-temperature", "20degC", "--bare-valves", "1")
    assert "not in the table" in run_error(capsys, "line", "--nps", "3.5", "--fluid-temperature", "180degC",
                                           "--air-temperature", "20degC", "--bare-valves", "1")
    with pytest.raises(SystemExit):
        run_text(capsys, *base, "--bare-valves", "-1")
    with pytest.raises(SystemExit):
        run_text(capsys, *base, "--pressure-class", "600")
