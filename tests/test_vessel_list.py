"""Vessel lists: reading with units, rows that do not fit their kind, totals, CSV output, the command line.

Per-item heat flows are checked against direct calls of the convlib function of the item's kind (the physics
itself is tested in test_vessels.py, test_horizontal_tank.py); unit conversions use the definitions of the
units (NIST SP 811, Appendix B: 1 ft = 0.3048 m and 1 in = 25.4 mm exactly; T[K] = T[degC] + 273.15;
T[degF] = 1.8 T[degC] + 32); annual energy against hand sums of q x hours. The demo data are invented; they are
checked only against each other (one story per tag).
"""
import csv
import io
import json
import math
import tracemalloc
from importlib import resources

import numpy as np
import pytest

from convlib.cli import main
from convlib.design import CAUTION_TOUCH, WeatherBins
from convlib.errors import InputError
from convlib.linelist import WARNING_DESIGN_AIR_ALL_YEAR, demo_lines_path
from convlib.linelist_read import MAX_BYTES
from convlib.pipe import Layer
from convlib.vessel_list import (CALLS, KINDS, demo_vessels_path, read_vessel_list, run_vessel_list,
                                 write_vessel_results_csv)
from convlib.ducts import rectangular_duct
from convlib.vessels import horizontal_tank, spherical_tank, vertical_tank

HEADER = ("tag,kind,diameter[m],height[m],length[m],width[m],heads,fluid_temperature[degC],"
          "surface_temperature[degC],air_temperature[degC],wind_speed[m/s],layers[mm],roof_layers[mm],"
          "floor_layers[mm],emissivity,location,floor,wind_direction,operating_hours")
ROWS = {
    "V-1": "V-1,vertical_tank,3.2,7.5,,,,85,,5,4,\"100,0.04,mineral wool\",\"150,0.04\",\"100,0.035\",0.3,outdoor,"
           "ground,,8760",
    "H-1": "H-1,horizontal_tank,2.4,,7,,torispherical,105,,25,0,\"100,0.045; 0.7,200\",,,0.1,indoor,,,8000",
    "S-1": "S-1,sphere,1.5,,,,,60,,25,1,\"50,0.04\",,,0.1,indoor,,,",
    "D-1": "D-1,duct,,0.5,30,0.8,,13,,28,2,\"25,0.036\",,,0.9,indoor,,across,2500",
    "B-1": "B-1,vertical_tank,0.8,2,,,,,102,8,3,,,,0.8,outdoor,open,,",
}


def csv_text(*rows):
    return io.StringIO("\n".join(rows) + "\n")


def _direct():
    """The same items by direct calls, inputs converted by hand (degC + 273.15, mm / 1000)."""
    return {
        "V-1": vertical_tank(3.2, 7.5, fluid_temperature=85 + 273.15, air_temperature=5 + 273.15, wind_speed=4.0,
                             wall_layers=[Layer(0.1, 0.04)], roof_layers=[Layer(0.15, 0.04)], floor="ground",
                             floor_layers=[Layer(0.1, 0.035)], emissivity=0.3, outdoor=True),
        "H-1": horizontal_tank(2.4, 7.0, heads="torispherical", fluid_temperature=105 + 273.15,
                               air_temperature=25 + 273.15, wind_speed=0.0, emissivity=0.1,
                               shell_layers=[Layer(0.1, 0.045), Layer(0.0007, 200.0)],
                               head_layers=[Layer(0.1, 0.045), Layer(0.0007, 200.0)]),
        "S-1": spherical_tank(1.5, fluid_temperature=60 + 273.15, air_temperature=25 + 273.15, wind_speed=1.0,
                              layers=[Layer(0.05, 0.04)], emissivity=0.1),
        "D-1": rectangular_duct(0.8, 0.5, 30.0, fluid_temperature=13 + 273.15, air_temperature=28 + 273.15,
                                wind_speed=2.0, wind_direction="across", layers=[Layer(0.025, 0.036)],
                                emissivity=0.9),
        "B-1": vertical_tank(0.8, 2.0, surface_temperature=102 + 273.15, air_temperature=8 + 273.15, wind_speed=3.0,
                             floor="open", emissivity=0.8, outdoor=True),
    }


@pytest.fixture(scope="module")
def result():
    return run_vessel_list(csv_text(HEADER, *ROWS.values()))


# ----------------------------------------------------------------------------- each kind as its direct call
def test_every_kind_is_in_the_test():
    assert {row.split(",")[1] for row in ROWS.values()} == set(KINDS)


@pytest.mark.parametrize("tag", list(ROWS))
def test_each_row_equals_the_direct_call(result, tag):
    i = result.tag.index(tag)
    direct = _direct()[tag]
    assert result.q_total[i] == pytest.approx(float(direct.q_total), rel=1e-12, abs=1e-12)
    assert result.area[i] == pytest.approx(float(direct.area), rel=1e-12)
    for face, mine in zip(direct.faces, result.faces[i].faces):
        assert (mine.name, float(mine.q_total)) == (face.name, pytest.approx(float(face.q_total), rel=1e-12,
                                                                              abs=1e-12))
    exposed = [f for f in direct.faces if f.shape != "ground"]
    hottest = max(exposed, key=lambda f: float(f.surface_temperature))
    assert (result.hottest_face[i], result.surface_temperature[i]) == (
        hottest.name, pytest.approx(float(hottest.surface_temperature), rel=1e-12))


def test_items_are_exactly_their_calls():
    items, errors = read_vessel_list(csv_text(HEADER, *ROWS.values()))
    assert errors == []
    for item in items:
        again = CALLS[item.kind](**item.inputs)
        assert float(again.q_total) == pytest.approx(float(_direct()[item.tag].q_total), rel=1e-12, abs=1e-12)


def test_touch_flag_is_the_hottest_exposed_face_above_the_metal_jacket_default(result):
    # default TOUCH_LIMIT_METAL_JACKET = 60 degC; the bare flash vessel is at 102 degC, the others far below 60
    assert dict(zip(result.tag, result.touch_flag.tolist())) == {"V-1": False, "H-1": False, "S-1": False,
                                                                 "D-1": False, "B-1": True}
    assert result.cautions == (CAUTION_TOUCH,)
    cooler = run_vessel_list(csv_text(HEADER, ROWS["B-1"]), surface_limit=110 + 273.15)
    assert not cooler.touch_flag.any() and cooler.cautions == ()


# ----------------------------------------------------------------------------- units
@pytest.mark.parametrize("header, cell", [
    ("diameter[ft]", "10"),                  # 10 ft = 3.048 m
    ("diameter[in]", "120"),                 # 120 in x 25.4 mm = 3.048 m
    ("diameter", "3.048"),                   # plain numbers SI
    ("diameter[mm]", "3.048 m"),             # a unit in the cell wins over the column's
    ("diameter", "10 ft"),
])
def test_units_in_brackets_and_in_cells(header, cell):
    items, errors = read_vessel_list(csv_text(f"tag,kind,{header},height,surface_temperature[degF],air_temperature",
                                              f"T,vertical_tank,{cell},4,140,293.15"))
    assert errors == []
    assert items[0].inputs["diameter"] == pytest.approx(3.048, rel=1e-12)
    assert items[0].inputs["surface_temperature"] == pytest.approx(333.15, abs=1e-9)  # (140 - 32) / 1.8 = 60 degC


def test_layers_in_a_cell_with_units_and_a_material_name():
    items, errors = read_vessel_list(csv_text(
        "tag,kind,diameter,fluid_temperature,air_temperature,layers",
        'S,sphere,2,350,290,"2in,0.3 Btu*in/(h*ft**2*degF),wool; 50mm,calcium_silicate_c533_type1"'))
    assert errors == []
    first, second = items[0].inputs["layers"]
    assert first.thickness == pytest.approx(0.0508, rel=1e-12)              # 2 in
    # 1 Btu_IT.in/(h.ft2.degF) = 0.1442279 W/m/K (NIST SP 811, Appendix B.8; the IT Btu)
    assert first.conductivity.at(300.0).item() == pytest.approx(0.3 * 0.1442279, rel=1e-6)
    assert second.thickness == pytest.approx(0.05, rel=1e-12)
    assert second.conductivity.kind != "constant"  # the material's k(T)


def test_an_unusual_value_is_a_row_error_unless_allowed():
    text = ("tag,kind,diameter,height,surface_temperature[degC],air_temperature[degC]",
            "T,vertical_tank,10,12,60,500")
    _, errors = read_vessel_list(csv_text(*text))
    assert errors[0].reason.startswith("air_temperature:")
    items, errors = read_vessel_list(csv_text(*text), allow_unusual=True)
    assert errors == [] and items[0].inputs["air_temperature"] == pytest.approx(773.15)


# ----------------------------------------------------------------------------- rows that do not fit
@pytest.mark.parametrize("row, column", [
    ("X,sphere,2,,,,flat,60,,20", "heads"),
    ("X,vertical_tank,2,3,,1,,60,,20", "width"),
    ("X,vertical_tank,2,,,,,60,,20", "height"),
    ("X,horizontal_tank,2,,,,,60,,20", "length"),
    ("X,duct,,0.5,10,,,60,,20", "width"),
    ("X,cone,2,,,,,60,,20", "kind"),
    (",sphere,2,,,,,60,,20", "tag"),
    ("X,sphere,2,,,,,60,50,20", "fluid_temperature / surface_temperature"),
    ("X,sphere,2,,,,,,,20", "fluid_temperature / surface_temperature"),
    ("X,sphere,2,,,,,60,,", "air_temperature"),
    ("X,sphere,2,,,,,sixty,,20", "fluid_temperature"),
    ("X,horizontal_tank,2,,5,,domed,60,,20", "heads"),
])
def test_a_row_that_does_not_fit_its_kind_names_the_column(row, column):
    header = ("tag,kind,diameter,height,length,width,heads,fluid_temperature[degC],surface_temperature[degC],"
              "air_temperature[degC]")
    items, errors = read_vessel_list(csv_text(header, row, "OK,sphere,2,,,,,60,,20"))
    assert [i.tag for i in items] == ["OK"]  # the other rows are still read
    assert errors[0].row == 2 and errors[0].reason.startswith(f"{column}:"), errors[0].reason


@pytest.mark.parametrize("extra_header, cell, column", [
    ("floor", "ground", "floor"), ("wind_direction", "across", "wind_direction"),
    ("roof_layers", '"50,0.04"', "roof_layers"), ("emissivity", "1.5", "emissivity"),
    ("location", "roof", "location"), ("layers", '"50,0.04"', "layers"), ("operating_hours", "9000", "operating_hours"),
])
def test_columns_of_another_kind_or_out_of_range_name_the_column(extra_header, cell, column):
    items, errors = read_vessel_list(csv_text(f"tag,kind,diameter,surface_temperature,air_temperature,{extra_header}",
                                              f"S,sphere,2,333.15,293.15,{cell}"))
    assert items == [] and errors[0].reason.startswith(f"{column}:"), errors[0].reason


def test_an_unknown_column_fails_the_whole_file():
    with pytest.raises(InputError, match="vessel list header: unknown column 'nps'"):
        read_vessel_list(csv_text("tag,kind,nps,air_temperature", "A,sphere,4,290"))


def test_a_bad_row_is_left_out_and_the_rest_is_computed():
    res = run_vessel_list(csv_text("tag,kind,diameter,surface_temperature,air_temperature,emissivity",
                                   "A,sphere,2,333.15,293.15,0", "B,sphere,2,333.15,293.15,0.9"))
    assert res.tag == ("B",) and res.errors[0].reason.startswith("emissivity:")


# ----------------------------------------------------------------------------- totals and annual energy
def test_totals_never_net_gains_against_losses(result):
    q = result.q_total
    assert (q > 0).any() and (q < 0).any()  # the duct at 13 degC in 28 degC air gains heat
    t = result.totals
    assert t["q_lost"] == pytest.approx(q[q > 0].sum(), rel=1e-12)
    assert t["q_gained"] == pytest.approx(-q[q < 0].sum(), rel=1e-12)
    assert t["q_lost"] - t["q_gained"] == pytest.approx(q.sum(), rel=1e-12)
    assert (t["items_losing"], t["items_gaining"]) == (4, 1)
    assert t["heat_gained_kwh"] == pytest.approx(-result.heat_kwh[result.tag.index("D-1")], rel=1e-12)


def test_annual_heat_without_bins_is_design_q_times_hours_and_says_so(result):
    hours = {"V-1": 8760, "H-1": 8000, "S-1": 8760, "D-1": 2500, "B-1": 8760}  # blank operating_hours: 8760 h
    for i, tag in enumerate(result.tag):
        assert result.heat_kwh[i] == pytest.approx(result.q_total[i] * hours[tag] / 1000, rel=1e-12)
    assert result.warnings == (WARNING_DESIGN_AIR_ALL_YEAR,)


def test_weather_bins_apply_to_outdoor_items_only():
    bins = WeatherBins([268.15, 283.15], [4.0, 2.0], [3000, 5760])
    res = run_vessel_list(csv_text(HEADER, ROWS["V-1"], ROWS["S-1"]), bins)
    assert res.warnings == () and res.totals["annual_basis"] == "weather bins"
    d = _direct()
    outdoor = [float(vertical_tank(3.2, 7.5, fluid_temperature=358.15, air_temperature=ta, wind_speed=w,
                                   wall_layers=[Layer(0.1, 0.04)], roof_layers=[Layer(0.15, 0.04)],
                                   floor_layers=[Layer(0.1, 0.035)], emissivity=0.3, outdoor=True).q_total)
               for ta, w in ((268.15, 4.0), (283.15, 2.0))]
    expected = (outdoor[0] * 3000 + outdoor[1] * 5760) * 8760 / 8760 / 1000
    assert res.heat_kwh[0] == pytest.approx(expected, rel=1e-6)  # the bins solved in one call, tolerance 1e-6 K
    assert res.heat_kwh[1] == pytest.approx(float(d["S-1"].q_total) * 8760 / 1000, rel=1e-12)  # indoor: design


# ----------------------------------------------------------------------------- CSV output
def test_results_csv_round_trip(result, tmp_path):
    path = tmp_path / "out.csv"
    write_vessel_results_csv(result, path)
    rows = list(csv.DictReader(path.open(encoding="utf-8")))
    assert [r["tag"] for r in rows[:-1]] == list(result.tag)
    for r, i in zip(rows, range(len(result))):
        assert float(r["q_total[W]"]) == pytest.approx(result.q_total[i], rel=1e-6)    # 7 significant digits
        assert float(r["surface_temperature[degC]"]) == pytest.approx(result.surface_temperature[i] - 273.15,
                                                                      abs=1e-4)
        assert r["touch_flag"] == ("yes" if result.touch_flag[i] else "no")
        assert r["hottest_face"] == result.hottest_face[i] and r["status"] == "ok"
    total = rows[-1]
    assert total["row"] == "TOTAL" and total["q_total[W]"] == "" and total["annual_heat[kWh]"] == ""
    assert float(total["heat_lost[W]"]) == pytest.approx(result.totals["q_lost"], rel=1e-6)
    assert float(total["heat_gained[W]"]) == pytest.approx(result.totals["q_gained"], rel=1e-6)
    assert total["touch_flag"] == "1" and WARNING_DESIGN_AIR_ALL_YEAR in total["notes"]


def test_results_csv_is_formula_safe_and_lists_errors(tmp_path):
    res = run_vessel_list(csv_text("tag,kind,diameter,surface_temperature,air_temperature",
                                   "=HYPERLINK(1),sphere,2,333.15,293.15", "@cmd,sphere,2,hot,293.15",
                                   "-cold,sphere,2,283.15,293.15"))
    path = tmp_path / "out.csv"
    write_vessel_results_csv(res, path)
    rows = list(csv.reader(path.open(encoding="utf-8")))
    tags = [r[1] for r in rows[1:-1]]
    assert tags == ["'=HYPERLINK(1)", "'@cmd", "'-cold"]
    assert rows[2][2] == "error" and rows[2][-1].startswith("surface_temperature:")
    q = rows[0].index("q_total[W]")
    assert float(rows[3][q]) < 0  # a negative number stays a number


# ----------------------------------------------------------------------------- file limits
def test_a_file_over_the_size_limit_is_refused_before_reading(tmp_path):
    path = tmp_path / "vessels.csv"
    with open(path, "wb") as fh:  # sparse: takes no disk space
        fh.write(b"tag,kind,diameter,air_temperature\n")
        fh.truncate(MAX_BYTES + 1)
    tracemalloc.start()
    try:
        with pytest.raises(InputError, match="vessel list .*larger than") as err:
            read_vessel_list(str(path))
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    assert err.value.field == "source" and str(path) in str(err.value)
    assert peak < 1_000_000  # refused from its size, not read


# ----------------------------------------------------------------------------- command line
def test_cli_si(capsys, tmp_path):
    out = tmp_path / "res.csv"
    assert main(["vessels", "--demo", "-o", str(out)]) == 0
    text = capsys.readouterr().out
    assert "T_surface [°C]" in text and "Q [W]" in text and "heat [MWh/yr]" in text
    assert "heat lost by hot items" in text and "kW" in text and "FH-T2" in text
    assert out.exists() and "results written to" in text


def test_cli_us(capsys, tmp_path):
    path = tmp_path / "v.csv"
    path.write_text(f"{HEADER}\n{ROWS['B-1']}\n", encoding="utf-8")
    assert main(["vessels", str(path), "--units", "US"]) == 0
    text = capsys.readouterr().out
    assert "T_surface [°F]" in text and "Q [Btu/h]" in text and "MMBtu/yr" in text
    # 102 degC = 215.6 degF (1.8 x 102 + 32)
    assert "215.6" in text and WARNING_DESIGN_AIR_ALL_YEAR in text and "touch" in text


def test_cli_json_and_errors(capsys, tmp_path):
    path = tmp_path / "v.csv"
    path.write_text(f"{HEADER}\n{ROWS['S-1']}\nX,sphere,2,,,,flat,60,,20,,,,,,,,,\n", encoding="utf-8")
    assert main(["vessels", str(path), "--json"]) == 1
    captured = capsys.readouterr()
    data = json.loads(captured.out)
    assert [r["tag"] for r in data["vessels"]["results"]] == ["S-1"]
    assert data["errors"][0]["reason"].startswith("heads:") and "row 3 (X): heads:" in captured.err
    assert data["vessels"]["results"][0]["faces"][0]["face"] == "shell"
    assert data["vessels"]["units"]["q_total"] == "W"


def test_cli_needs_a_file_or_demo(capsys):
    assert main(["vessels"]) == 2
    assert "give a vessel-list CSV file or --demo" in capsys.readouterr().err


# ----------------------------------------------------------------------------- the demo list
def _demo_rows():
    return list(csv.DictReader(io.StringIO(demo_vessels_path().read_text(encoding="utf-8"))))


def test_demo_list_computes_without_errors_and_covers_every_kind():
    res = run_vessel_list(demo_vessels_path())
    assert res.errors == () and 5 <= len(res) <= 8 and set(res.kind) == set(KINDS)
    assert (res.q_total < 0).any() and res.touch_flag.any()


def test_demo_vessel_tags_are_not_line_tags_and_agree_with_the_demo_site():
    line_tags = {r["tag"] for r in csv.DictReader(io.StringIO(demo_lines_path().read_text(encoding="utf-8")))}
    rows = {r["tag"]: r for r in _demo_rows()}
    assert not set(rows) & line_tags
    site = json.loads(resources.files("convlib").joinpath("data/demo_site.json").read_text())
    t1 = next(s for s in site["surfaces"] if s["tag"] == "FH-T1")
    d2 = next(s for s in site["surfaces"] if s["tag"] == "FH-D2")
    t2 = site["operation"]["tank"]
    assert (float(rows["FH-T1"]["diameter[m]"]), float(rows["FH-T1"]["height[m]"])) == (t1["diameter"], t1["length"])
    assert float(rows["FH-T1"]["surface_temperature[degC]"]) + 273.15 == pytest.approx(t1["surface_temperature"])
    assert float(rows["FH-T1"]["air_temperature[degC]"]) + 273.15 == pytest.approx(t1["air_temperature"])
    assert (float(rows["FH-D2"]["width[m]"]), float(rows["FH-D2"]["length[m]"])) == (d2["width"], d2["length"])
    assert float(rows["FH-D2"]["surface_temperature[degC]"]) + 273.15 == pytest.approx(d2["surface_temperature"])
    assert (float(rows["FH-T2"]["diameter[m]"]), float(rows["FH-T2"]["height[m]"])) == (t2["diameter"], t2["height"])
    assert float(rows["FH-T2"]["fluid_temperature[degC]"]) + 273.15 == pytest.approx(t2["fluid_temperature"])
    assert float(rows["FH-T2"]["air_temperature[degC]"]) + 273.15 == pytest.approx(t2["air_temperature"])
    items, _ = read_vessel_list(demo_vessels_path())
    tank = next(i for i in items if i.tag == "FH-T2").inputs
    for face, key in (("wall_layers", "wall_layers"), ("roof_layers", "roof_layers"), ("floor_layers", "floor_layers")):
        assert [(float(ly.thickness), ly.conductivity.at(300.0).item()) for ly in tank[face]] == [
            pytest.approx((ly["thickness"], ly["conductivity"])) for ly in t2[key]]
    assert math.isclose(tank["emissivity"], t2["emissivity"]) and tank["outdoor"] == t2["outdoor"]
    assert np.isclose(tank["wind_speed"], t2["wind_speed"])
