"""Line lists: reading with units, validation by row, vectorized solve, annual energy, CSV output.

Outside sources of the expected values are named beside them. Unit conversions use the
definitions of the units (1 in = 25.4 mm, 1 ft = 0.3048 m exactly; T[K] = T[degC] + 273.15;
T[degF] = 1.8 T[degC] + 32). Pipe outer diameters are those of ASME B36.10M. Per-line heat
flows are checked against direct calls of ``convlib.insulated_pipe`` (the physics itself is
tested in test_pipe.py); energy and money against hand sums of q x hours x length.
"""
import csv
import io
import math
import os

import numpy as np
import pytest

import convlib as cl
from convlib.design import FITTING_EQUIVALENT_LENGTH, TOUCH_LIMIT_METAL_JACKET, WeatherBins, annual_energy
from convlib.linelist import RowError, demo_lines_path, read_line_list, run_line_list, write_results_csv
from convlib.lines import LineSpec


def csv_text(*rows):
    return io.StringIO("\n".join(rows) + "\n")


def direct(spec: LineSpec, **conditions):
    """The same line through a direct, scalar call of convlib.insulated_pipe."""
    args = spec.pipe_arguments()
    args.update(conditions)
    return cl.insulated_pipe(**args)


# ----------------------------------------------------------------------------- reading and units
def test_header_unit_suffixes_convert_like_hand_conversions():
    lines, errors = read_line_list(csv_text(
        "Tag,Outer diameter [in],length[ft],fluid_temperature[°C],air_temperature[degF],layers[mm],"
        "wind_speed[km/h],relative_humidity[%],jacket_emissivity",
        "A-1,4.5,100,180,68,50@0.045 mineral wool; 0.7@200 aluminium jacket,18,60,0.1"))
    assert errors == []
    s = lines[0].spec
    assert s.pipe_outer_diameter == pytest.approx(0.1143, abs=1e-12)    # 4.5 in x 25.4 mm/in
    assert s.length == pytest.approx(30.48, abs=1e-12)                  # 100 ft x 0.3048 m/ft
    assert s.fluid_temperature == pytest.approx(453.15, abs=1e-9)       # 180 degC + 273.15
    assert s.air_temperature == pytest.approx(293.15, abs=1e-9)         # (68 - 32) / 1.8 = 20 degC
    assert s.wind_speed == pytest.approx(5.0, abs=1e-12)                # 18 km/h / 3.6
    assert s.relative_humidity == pytest.approx(0.60, abs=1e-12)        # 60 %
    assert [(ly.thickness, ly.conductivity, ly.name) for ly in s.layers] == [
        pytest.approx((0.05, 0.045, "mineral wool")), pytest.approx((0.0007, 200.0, "aluminium jacket"))]


def test_plain_numbers_are_si_and_a_unit_in_a_cell_wins():
    lines, errors = read_line_list(csv_text(
        "tag,outer_diameter,length,fluid_temperature,air_temperature[degC],layers",
        "B-1,0.1143,10,453.15,20,0.05@0.04",
        "B-2,6 in,10,90 degC,293.15 K,2in@0.04 foam"))
    assert errors == []
    a, b = (p.spec for p in lines)
    assert (a.pipe_outer_diameter, a.fluid_temperature, a.air_temperature) == pytest.approx((0.1143, 453.15, 293.15))
    assert a.layers[0].thickness == 0.05 and a.layers[0].name == "layer 1"
    assert b.pipe_outer_diameter == pytest.approx(0.1524, abs=1e-12)   # 6 in x 25.4 mm/in
    assert b.fluid_temperature == pytest.approx(363.15, abs=1e-9)     # 90 degC
    assert b.air_temperature == pytest.approx(293.15, abs=1e-9)       # K in the cell beats [degC] of the header
    assert b.layers[0].thickness == pytest.approx(0.0508, abs=1e-12)


# outer diameters of the metric columns of ASME B36.10M (inch sizes in the comments, 1 in = 25.4 mm)
@pytest.mark.parametrize("nps, schedule, outer_mm", [
    ("4", "40", 114.3),      # NPS 4 = 4.500 in
    ("1-1/2", "40", 48.3),   # NPS 1 1/2 = 1.900 in
    ("1 1/2", "80", 48.3),
    ('1-1/2"', "80.0", 48.3),  # inch mark; schedule as a spreadsheet number
    ("3/4", "40", 26.7),     # NPS 3/4 = 1.050 in
    ("12", "std", 323.8),    # NPS 12 = 12.750 in
])
def test_nominal_sizes_and_fractions(nps, schedule, outer_mm):
    cell = '"' + nps.replace('"', '""') + '"'  # quoted as a spreadsheet writes a cell holding a quote mark
    lines, errors = read_line_list(csv_text("tag,nps,schedule,length,fluid_temperature,air_temperature",
                                            f"C-1,{cell},{schedule},1,400,290"))
    assert errors == []
    assert lines[0].spec.outer_diameter() * 1000 == pytest.approx(outer_mm, abs=1e-9)


def test_location_sets_sky_view_unless_given():
    lines, _ = read_line_list(csv_text(
        "tag,nps,length,fluid_temperature,air_temperature,location,sky_view_fraction",
        "D-1,2,1,400,290,outdoor,", "D-2,2,1,400,290,Outdoor,0.3", "D-3,2,1,400,290,,", "D-4,2,1,400,290,indoor,"))
    assert [(p.location, p.spec.sky_view_fraction) for p in lines] == [
        ("outdoor", 0.5), ("outdoor", 0.3), ("indoor", 0.0), ("indoor", 0.0)]


def test_percent_in_a_cell_missing_cells_of_a_data_frame_and_extra_cells():
    rows = [{"tag": "P-1", "nps": 2, "length": 3.0, "fluid_temperature[degC]": 60, "air_temperature[degC]": 20,
             "relative_humidity": "65%", "wind_speed": float("nan")},           # NaN: an empty data-frame cell
            {"tag": "P-2", "nps": 2, "length": 3.0, "fluid_temperature[degC]": 60, "air_temperature[degC]": 20,
             "relative_humidity": "high%", "wind_speed": 1.0}]
    lines, errors = read_line_list(rows)
    assert lines[0].spec.relative_humidity == pytest.approx(0.65) and lines[0].spec.wind_speed == 0.0
    assert [(e.row, e.tag) for e in errors] == [(3, "P-2")] and "relative_humidity" in errors[0].reason
    _, errors = read_line_list(csv_text("tag,nps,length,fluid_temperature,air_temperature", "X,4,1,400,290,7"))
    assert errors[0].row == 2 and "6 cells" in errors[0].reason


def test_files_a_spreadsheet_may_produce_get_a_clear_message(tmp_path):
    with pytest.raises(ValueError, match="separated by ';'"):
        read_line_list(csv_text("tag;nps;length;fluid_temperature;air_temperature", "X;4;1;400;290"))
    latin = tmp_path / "latin.csv"
    latin.write_bytes("tag,nps,length,fluid_temperature[°C],air_temperature\nX,4,1,120,290\n".encode("cp1252"))
    with pytest.raises(ValueError, match="UTF-8"):
        read_line_list(latin)
    bom = tmp_path / "bom.csv"
    bom.write_text("tag,nps,length,fluid_temperature[°C],air_temperature\nX,4,1,120,290\n", encoding="utf-8-sig")
    assert read_line_list(bom)[0][0].spec.fluid_temperature == pytest.approx(393.15)   # 120 degC
    with pytest.raises(ValueError, match="header"):
        read_line_list(csv_text(""))


def test_demo_line_list_loads_clean():
    lines, errors = read_line_list(demo_lines_path())
    assert errors == []
    assert 20 <= len(lines) <= 30
    assert all(p.spec.tag.startswith("FH-1") for p in lines)
    assert {p.location for p in lines} == {"indoor", "outdoor"}
    assert any(not p.spec.layers for p in lines)                               # bare stretches
    assert any(p.spec.fluid_temperature < 273.15 for p in lines)               # the cold glycol line
    assert any(p.spec.pipe_outer_diameter is not None for p in lines)          # a tube given by diameter
    assert len({p.spec.tag for p in lines}) == len(lines)


# ----------------------------------------------------------------------------- bad rows
BAD = [
    ("tag,nps,outer_diameter[mm],length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],"
     "jacket_emissivity,relative_humidity,location,valve"),
    "OK-1,4,,10,180,20,50@0.045,0.1,,,2",              # row 2
    "BAD-NPS,4.3,,10,180,20,50@0.045,0.1,,,",          # row 3: NPS 4.3 does not exist
    "BAD-THK,4,,10,180,20,-50@0.045,0.1,,,",           # row 4: negative thickness
    "BAD-TF,4,,10,,20,50@0.045,0.1,,,",                # row 5: missing fluid temperature
    "",                                                # row 6: blank, skipped
    "BAD-LEN,4,,ten,180,20,50@0.045,0.1,,,",           # row 7: non-numeric length
    "BAD-EPS,4,,10,180,20,50@0.045,1.3,,,",            # row 8: emissivity above 1
    "BAD-RH,4,,10,5,30,25@0.036,0.9,75,,",             # row 9: humidity as percent without [%]
    "BAD-BOTH,4,114.3,10,180,20,50@0.045,0.1,,,",      # row 10: nps and outer diameter
    "BAD-LOC,4,,10,180,20,50@0.045,0.1,,roof,",        # row 11: unknown location
    "BAD-LAYER,4,,10,180,20,50 mineral wool,0.1,,,",   # row 12: layer without @conductivity
    "BAD-FIT,4,,10,180,20,50@0.045,0.1,,,-1",          # row 13: negative count
    "OK-2,,60.3,20,70,20,,0.9,0.5,outdoor,",           # row 14
    "BAD-NAN,4,,10,nan,20,50@0.045,0.1,,,",            # row 15: not a finite number
]


def test_bad_rows_are_reported_by_row_and_column_and_the_rest_computed():
    res = run_line_list(csv_text(*BAD))
    assert list(res.tag) == ["OK-1", "OK-2"] and list(res.row) == [2, 14]
    reasons = {e.row: (e.tag, e.reason) for e in res.errors}
    expected = {3: ("BAD-NPS", "nps"), 4: ("BAD-THK", "layers"), 5: ("BAD-TF", "fluid_temperature"),
                7: ("BAD-LEN", "length"), 8: ("BAD-EPS", "jacket_emissivity"), 9: ("BAD-RH", "relative_humidity"),
                10: ("BAD-BOTH", "outer_diameter"), 11: ("BAD-LOC", "location"), 12: ("BAD-LAYER", "layers"),
                13: ("BAD-FIT", "valve"), 15: ("BAD-NAN", "fluid_temperature")}
    assert set(reasons) == set(expected)
    for row, (tag, column) in expected.items():
        assert reasons[row][0] == tag
        assert reasons[row][1].startswith(column) or f"{column}:" in reasons[row][1], reasons[row]
    assert "nearest: 4, 5" in reasons[3][1]
    assert "thickness" in reasons[4][1] and "'-50 mm'" in reasons[4][1]
    assert "missing" in reasons[5][1]
    assert "'ten'" in reasons[7][1]
    assert "[%]" in reasons[9][1]
    assert "roof" in reasons[11][1] and "indoor, outdoor" in reasons[11][1]
    assert all(isinstance(e, RowError) for e in res.errors)


def test_a_row_the_solver_rejects_becomes_an_error_and_its_chunk_is_still_computed():
    # 5000 K is a valid LineSpec, but under a thin layer of metal its surface is near 5000 K and the air
    # film beyond the air property tables (82-2000 K): only that row fails.
    # (allowed past the plausibility guard of the reader, so that the solver sees it)
    rows = ["tag,nps,length,fluid_temperature,air_temperature,layers"] + [
        f"E-{i},4,10,{5000 if i == 2 else 400 + i},290,{'0.001@50' if i == 2 else '0.05@0.04'}" for i in range(5)]
    res = run_line_list(csv_text(*rows), allow_unusual=True)
    assert [e.row for e in res.errors] == [4] and "could not be computed" in res.errors[0].reason
    assert list(res.tag) == ["E-0", "E-1", "E-3", "E-4"]
    one = run_line_list(csv_text(rows[0], rows[1]))
    assert res.q_per_length[0] == one.q_per_length[0]


@pytest.mark.parametrize("header, words", [
    ("tag,nps,length,fluid_temprature,air_temperature", ["fluid_temprature", "fluid_temperature"]),
    ("tag,nps,length,air_temperature", ["missing required column", "fluid_temperature"]),
    ("tag,length,fluid_temperature,air_temperature", ["nps", "outer_diameter"]),
    ("tag,nps,length[degC],fluid_temperature,air_temperature", ["length[degC]", "not a unit of length"]),
    ("tag,nps[in],length,fluid_temperature,air_temperature", ["takes no unit"]),
    ("tag,nps,length,fluid_temperature,air_temperature,tag", ["twice"]),
])
def test_problems_of_the_whole_file_raise_naming_the_column(header, words):
    with pytest.raises(ValueError) as info:
        read_line_list(csv_text(header, "X,4,1,400,290"))
    for word in words:
        assert word in str(info.value)


@pytest.mark.parametrize("kwargs, field", [
    (dict(energy_price=-1.0), "energy_price"), (dict(heating_efficiency=1.5), "heating_efficiency"),
    (dict(cooling_cop=0.0), "cooling_cop"), (dict(chunk_size=0), "chunk_size"), (dict(bins=[1, 2]), "bins"),
])
def test_bad_arguments_raise_naming_the_field(kwargs, field):
    with pytest.raises(ValueError, match=field):
        run_line_list(demo_lines_path(), **kwargs)


# ----------------------------------------------------------------------------- results
@pytest.fixture(scope="module")
def demo():
    return run_line_list(demo_lines_path())


def test_each_line_equals_a_direct_insulated_pipe_call(demo):
    lines, _ = read_line_list(demo_lines_path())
    for i, p in enumerate(lines):
        r = direct(p.spec)
        assert demo.q_per_length[i] == pytest.approx(float(r.q_per_length), rel=1e-9, abs=1e-12), p.spec.tag
        assert demo.surface_temperature[i] == pytest.approx(float(r.surface_temperature), rel=1e-9), p.spec.tag
        # equivalent length by hand: length + count x metres per fitting
        leq = p.spec.length + sum(n * FITTING_EQUIVALENT_LENGTH[k] for k, n in p.spec.fittings.items())
        assert demo.equivalent_length[i] == pytest.approx(leq, rel=1e-12)
        assert demo.q_total[i] == pytest.approx(float(r.q_per_length) * leq, rel=1e-9)


def test_chunking_and_grouping_do_not_change_the_numbers(demo):
    small = run_line_list(demo_lines_path(), chunk_size=3)
    for name in ("q_per_length", "surface_temperature", "heat_kwh"):
        np.testing.assert_allclose(getattr(small, name), getattr(demo, name), rtol=1e-9, atol=0)


def test_inputs_as_dicts_or_line_specs_give_the_same_results(demo):
    with open(demo_lines_path(), newline="", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    from_dicts = run_line_list(rows)
    np.testing.assert_array_equal(from_dicts.q_per_length, demo.q_per_length)
    specs = [p.spec for p in read_line_list(demo_lines_path())[0]]
    from_specs = run_line_list(specs)
    np.testing.assert_array_equal(from_specs.surface_temperature, demo.surface_temperature)


BINS = WeatherBins([263.15, 278.15, 293.15], [5.0, 3.0, 1.0], [1500.0, 4000.0, 3260.0])


def test_annual_energy_is_the_hand_sum_over_bins():
    res = run_line_list(csv_text(
        "tag,nps,length,fluid_temperature[degC],air_temperature[degC],layers[mm],location,wind_speed,valve,"
        "operating_hours",
        "OUT,3,100,95,10,50@0.04,outdoor,3,2,",
        "IN,3,100,95,22,50@0.04,indoor,0,2,",
        "PART,3,100,95,10,50@0.04,outdoor,3,2,4380",
        "COLD,4,50,-25,25,25@0.036,outdoor,2,,",
        "CHILLED,4,50,6,25,25@0.036,outdoor,2,,"), BINS, energy_price=0.05, heating_efficiency=0.8, cooling_cop=2.5,
        co2_per_kwh=0.2)
    layer = [cl.Layer(0.05, 0.04)]
    d3, d4, leq = 0.0889, 0.1143, 100.0 + 2 * 1.5
    # outdoor: each bin's air temperature and wind, hours of the bin
    q_bins = [float(cl.insulated_pipe(d3, 368.15, layer, air_temperature=t, wind_speed=w, sky_view_fraction=0.5,
                                      jacket_emissivity=0.9).q_per_length) for t, w in zip(BINS.air_temperature,
                                                                                          BINS.wind_speed)]
    out_kwh = sum(q * h for q, h in zip(q_bins, BINS.hours)) * leq / 1000.0
    # indoor: its own design air and wind for all the bins' hours
    q_in = float(cl.insulated_pipe(d3, 368.15, layer, air_temperature=295.15).q_per_length)
    in_kwh = q_in * BINS.hours.sum() * leq / 1000.0
    assert res.heat_kwh[0] == pytest.approx(out_kwh, rel=1e-9)
    assert res.heat_kwh[1] == pytest.approx(in_kwh, rel=1e-9)
    assert res.heat_kwh[2] == pytest.approx(out_kwh * 4380 / 8760, rel=1e-9)   # runs half of every bin
    assert res.purchased_kwh[0] == pytest.approx(out_kwh / 0.8, rel=1e-12)
    assert res.cost[0] == pytest.approx(out_kwh / 0.8 * 0.05, rel=1e-12)
    assert res.co2_kg[0] == pytest.approx(out_kwh / 0.8 * 0.2, rel=1e-12)
    # a cold line (-25 degC, colder than every bin) gains heat: negative heat, electricity = gain / COP
    def cold_kwh(t_fluid):
        q = [float(cl.insulated_pipe(d4, t_fluid, [cl.Layer(0.025, 0.036)], air_temperature=t, wind_speed=w,
                                     sky_view_fraction=0.5).q_per_length)
             for t, w in zip(BINS.air_temperature, BINS.wind_speed)]
        return sum(qi * h for qi, h in zip(q, BINS.hours)) * 50.0 / 1000.0
    gain = cold_kwh(248.15)
    assert gain < 0
    assert res.heat_kwh[3] == pytest.approx(gain, rel=1e-9)
    assert res.purchased_kwh[3] == pytest.approx(-gain / 2.5, rel=1e-12)
    # chilled water (6 degC) in these mostly cold bins loses more heat than it gains over the year: the
    # hand sum is positive; a cold line's net loss is no heating fuel and no chiller work
    net = cold_kwh(279.15)
    assert net > 0
    assert res.heat_kwh[4] == pytest.approx(net, rel=1e-9)
    assert res.purchased_kwh[4] == 0.0
    # the same outdoor line through convlib.design.annual_energy
    e = annual_energy(d3, 368.15, layer, bins=BINS, length=leq, sky_view_fraction=0.5)
    assert res.heat_kwh[0] == pytest.approx(float(e.heat_kwh), rel=1e-9)


def test_without_bins_the_design_condition_runs_all_year_or_the_given_hours():
    res = run_line_list(csv_text("tag,nps,length,fluid_temperature,air_temperature,layers,operating_hours",
                                 "A,2,40,343.15,283.15,0.03@0.04,", "B,2,40,343.15,283.15,0.03@0.04,2000"))
    q = float(cl.insulated_pipe(0.0603, 343.15, [cl.Layer(0.03, 0.04)], air_temperature=283.15).q_per_length)
    assert res.heat_kwh == pytest.approx([q * 8760 * 40 / 1000, q * 2000 * 40 / 1000], rel=1e-9)
    assert res.operating_hours.tolist() == [8760.0, 2000.0]


HOT_AND_CHILLED = ("tag,nps,length,fluid_temperature[degC],air_temperature[degC],layers[mm]",
                   "HW-1,4,100,90,20,50@0.04", "CHW-1,4,100,6,20,30@0.035")


def test_hot_loss_and_chilled_gain_are_not_netted_and_design_air_all_year_is_warned():
    # issue 12 point 4: a total netted the chilled-water gain against the hot-water loss. Expected values: direct
    # insulated_pipe calls per line, summed by hand on each side; without bins each line runs 8760 h at its design air
    res = run_line_list(csv_text(*HOT_AND_CHILLED))
    hot, cold = (float(cl.insulated_pipe(0.1143, tf, [cl.Layer(t, k)], air_temperature=293.15).q_per_length) * 100
                 for tf, t, k in ((363.15, 0.05, 0.04), (279.15, 0.03, 0.035)))
    assert hot > 0 > cold
    t = res.totals
    assert t["q_lost"] == pytest.approx(hot, rel=1e-9) and t["q_gained"] == pytest.approx(-cold, rel=1e-9)
    assert t["heat_lost_kwh"] == pytest.approx(hot * 8760 / 1000, rel=1e-9)
    assert t["heat_gained_kwh"] == pytest.approx(-cold * 8760 / 1000, rel=1e-9)
    assert t["annual_basis"] == "design air for all operating hours"
    assert len(res.warnings) == 1 and "8,760 h/yr" in res.warnings[0]
    # with weather bins the annual figures follow them and the warning goes
    binned = run_line_list(csv_text(*HOT_AND_CHILLED), BINS)
    assert binned.warnings == () and binned.totals["annual_basis"] == "weather bins"


def test_written_csv_totals_row_carries_the_design_air_warning(tmp_path):
    res = run_line_list(csv_text(*HOT_AND_CHILLED))
    write_results_csv(res, tmp_path / "out.csv")
    with open(tmp_path / "out.csv", newline="", encoding="utf-8") as fh:
        total = list(csv.DictReader(fh))[-1]
    assert total["row"] == "TOTAL" and res.warnings[0] in total["notes"]
    assert float(total["heat_gained[W]"]) == pytest.approx(res.totals["q_gained"], rel=1e-6)
    assert total["q_total[W]"] == ""


def magnus_dew_point(t_celsius, rh):
    """Dew point [degC] over water, Magnus form of Alduchov & Eskridge (1996), their coefficients
    17.625 and 243.04 degC; doi:10.1175/1520-0450(1996)035<0601:IMFAOS>2.0.CO;2."""
    g = math.log(rh) + 17.625 * t_celsius / (243.04 + t_celsius)
    return 243.04 * g / (17.625 - g)


def test_touch_and_condensation_flags():
    res = run_line_list(csv_text(
        "tag,nps,length,fluid_temperature[degC],air_temperature[degC],relative_humidity,layers[mm]",
        "HOT-BARE,2,5,150,25,,bare",             # bare pipe without wall resistance: surface = fluid, 150 degC
        "HOT-INS,2,5,150,25,,80@0.04",
        "COLD-BARE,4,5,6,30,0.8,bare",            # surface 6 degC, dew point about 26 degC
        "COLD-INS,4,5,6,30,0.3,50@0.035"))        # dew point about 10.5 degC
    assert res.surface_temperature[0] == pytest.approx(423.15, abs=1e-6)
    assert res.touch_flag.tolist() == [True, False, False, False]
    assert res.surface_temperature[1] < TOUCH_LIMIT_METAL_JACKET
    assert res.condensation_flag.tolist() == [False, False, True, False]
    assert np.isnan(res.dew_point[:2]).all()
    assert res.dew_point[2] - 273.15 == pytest.approx(magnus_dew_point(30.0, 0.8), abs=0.2)
    assert res.dew_point[3] - 273.15 == pytest.approx(magnus_dew_point(30.0, 0.3), abs=0.2)
    assert len(res.cautions) == 2


def test_totals_are_the_sums(demo):
    t = demo.totals
    assert t["lines"] == len(demo) and t["rows_with_errors"] == 0
    for name in ("length", "equivalent_length", "purchased_kwh", "cost", "co2_kg"):
        assert t[name] == pytest.approx(sum(float(v) for v in getattr(demo, name)), rel=1e-12)
    # heat: lines that lose and lines that gain summed apart (issue 12 point 4), by hand over the per-line values
    q, e = [float(v) for v in demo.q_total], [float(v) for v in demo.heat_kwh]
    assert t["q_lost"] == pytest.approx(sum(v for v in q if v > 0), rel=1e-12)
    assert t["q_gained"] == pytest.approx(-sum(v for v in q if v < 0), rel=1e-12)
    assert t["heat_lost_kwh"] == pytest.approx(sum(v for v in e if v > 0), rel=1e-12)
    assert t["heat_gained_kwh"] == pytest.approx(-sum(v for v in e if v < 0), rel=1e-12)
    assert t["lines_losing"] + t["lines_gaining"] == len(demo) and t["lines_gaining"] > 0
    assert "q_total" not in t and "heat_kwh" not in t   # no net figure that hides a cold line's gain
    assert t["touch_flags"] == sum(bool(f) for f in demo.touch_flag)
    assert t["condensation_flags"] == sum(bool(f) for f in demo.condensation_flag)


def test_progress_is_called_with_increasing_fractions_ending_at_one():
    calls = []
    run_line_list(demo_lines_path(), chunk_size=4, progress=lambda f, text: calls.append((f, text)))
    fractions = [f for f, _ in calls]
    assert len(calls) >= 6
    assert all(b > a for a, b in zip(fractions, fractions[1:]))
    assert fractions[0] >= 0.0 and fractions[-1] == 1.0
    assert all(isinstance(text, str) and text for _, text in calls)


# ----------------------------------------------------------------------------- writing
def test_written_csv_round_trips_with_errors_and_totals(tmp_path):
    res = run_line_list(csv_text(*BAD), BINS, energy_price=0.07, co2_per_kwh=0.2)
    path = tmp_path / "out.csv"
    path.write_text("old contents")
    write_results_csv(res, path)
    assert sorted(os.listdir(tmp_path)) == ["out.csv"]        # replaced in place, no temp file left
    with open(path, newline="", encoding="utf-8") as fh:
        table = list(csv.DictReader(fh))
    body, total = table[:-1], table[-1]
    assert [int(r["row"]) for r in body] == sorted([*res.row.tolist(), *(e.row for e in res.errors)])
    ok = [r for r in body if r["status"] == "ok"]
    for i, r in enumerate(ok):
        assert r["tag"] == res.tag[i]
        assert float(r["surface_temperature[degC]"]) + 273.15 == pytest.approx(res.surface_temperature[i], rel=1e-6)
        assert float(r["q_per_length[W/m]"]) == pytest.approx(res.q_per_length[i], rel=1e-6)
        assert float(r["q_total[W]"]) == pytest.approx(res.q_total[i], rel=1e-6)
        assert float(r["annual_heat[kWh]"]) == pytest.approx(res.heat_kwh[i], rel=1e-6)
        assert float(r["cost"]) == pytest.approx(res.cost[i], rel=1e-6)
        assert float(r["co2[kg]"]) == pytest.approx(res.co2_kg[i], rel=1e-6)
        assert float(r["outer_diameter[mm]"]) == pytest.approx(res.outer_diameter[i] * 1000, rel=1e-6)
        assert r["touch_flag"] in ("yes", "no")
    errors = {int(r["row"]): r["notes"] for r in body if r["status"] == "error"}
    assert errors == {e.row: e.reason for e in res.errors}
    assert total["row"] == "TOTAL"
    assert total["annual_heat[kWh]"] == "" and total["q_total[W]"] == ""   # never netted across lines
    for column, name in (("heat_lost[W]", "q_lost"), ("heat_gained[W]", "q_gained"),
                         ("annual_heat_lost[kWh]", "heat_lost_kwh"), ("annual_heat_gained[kWh]", "heat_gained_kwh")):
        assert float(total[column]) == pytest.approx(res.totals[name], rel=1e-6)
        assert float(total[column]) == pytest.approx(sum(float(r[column]) for r in ok), rel=1e-6)
    assert int(total["touch_flag"]) == res.totals["touch_flags"]
    assert "not included" in total["notes"]


def test_rows_for_json_carry_si_values_and_none_for_missing(demo):
    rows = demo.rows()
    assert len(rows) == len(demo)
    assert rows[0]["tag"] == demo.tag[0] and rows[0]["q_per_length"] == float(demo.q_per_length[0])
    assert any(r["dew_point"] is None for r in rows) and any(r["dew_point"] is not None for r in rows)
    assert isinstance(rows[0]["touch_flag"], bool)


def test_one_layer_syntax_for_the_command_line_and_the_line_list(capsys):
    """The same layer string gives the same layers on the command line and in a line-list cell (issue: one
    layer syntax); the 0.2.0 line-list form still reads, with a DeprecationWarning."""
    import io
    import warnings

    from cli_helpers import run_json
    from convlib.linelist import run_line_list

    header = "tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers,jacket_emissivity\n"
    cell = "50mm,0.045,mineral wool; 0.7mm,200,aluminium jacket"
    new = run_line_list(io.StringIO(header + f'L1,4,10,180,20,"{cell}",0.1\n'))
    cli = run_json(capsys, "line", "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature", "20degC",
                   "--layer", "50mm,0.045,mineral wool", "--layer", "0.7mm,200,aluminium jacket",
                   "--jacket-emissivity", "0.1")
    assert float(new.q_per_length[0]) == pytest.approx(cli["line"]["results"][0]["q_per_length"], rel=1e-9)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        old = run_line_list(io.StringIO(header + "L1,4,10,180,20,50mm@0.045 mineral wool; 0.7mm@200 jacket,0.1\n"))
    assert any(issubclass(w.category, DeprecationWarning) and "THICKNESS,CONDUCTIVITY" in str(w.message)
               for w in caught)
    assert float(old.q_per_length[0]) == float(new.q_per_length[0])
