"""EPW weather files: field positions, missing codes, bins, freezing and condensation hours."""
import numpy as np
import pytest

from convlib.errors import InputError
from convlib.weather import (condensation_hours, demo_weather_path, hours_below, read_epw, synthetic_epw_text,
                             to_bins)

HEADER = "\n".join([
    "LOCATION,Sample Town,ST,XX,Test,000001,41.98,-87.92,-6.0,201.0",
    "DESIGN CONDITIONS,0", "TYPICAL/EXTREME PERIODS,0", "GROUND TEMPERATURES,0", "HOLIDAYS/DAYLIGHT SAVINGS,No,0,0,0",
    "COMMENTS 1,test", "COMMENTS 2,test", "DATA PERIODS,1,1,Data,Sunday, 1/ 1,12/31",
])
# One hourly row in the layout of the EnergyPlus Auxiliary Programs manual, "EnergyPlus Weather File (EPW) Data
# Dictionary" (35 fields; 1 year, 2 month, 3 day, 4 hour, 5 minute, 6 source/uncertainty flags, 7 dry bulb degC,
# 8 dew point degC, 9 RH %, 10 station pressure Pa, 11-12 extraterrestrial radiation, 13 horizontal infrared Wh/m2,
# 14-16 global/direct/diffuse radiation, 17-19 illuminance, 20 zenith luminance, 21 wind direction deg,
# 22 wind speed m/s, 23-35 sky cover ... liquid precipitation). Written by us in that layout (the values follow
# the style of the manual's Chicago sample rows -- from memory, not a verbatim copy).
SAMPLE_ROW = ("1984,1,1,1,60,C9C9C9C9*0?9?9?9?9?9?9?9A7A7A7A7A7A7*0E8*0*0,7.0,4.6,85,99500,0,1415,322,0,0,0,0,0,0,0,"
              "250,11.3,10,10,8.0,360,0,999999099,0,0.0680,0,88,0.000,0.0,0.0")


def _epw(rows):
    return HEADER + "\n" + "\n".join(rows) + "\n"


def test_sample_row_fields():
    w = read_epw(_epw([SAMPLE_ROW]))
    assert (w.month[0], w.day[0], w.hour[0]) == (1, 1, 1)
    assert w.air_temperature[0] == pytest.approx(7.0 + 273.15)      # field 7, degC
    assert w.dew_point[0] == pytest.approx(4.6 + 273.15)            # field 8, degC
    assert w.relative_humidity[0] == pytest.approx(0.85)            # field 9, %
    assert w.pressure[0] == pytest.approx(99500.0)                  # field 10, Pa
    assert w.horizontal_infrared[0] == pytest.approx(322.0)         # field 13, Wh/m2 over the hour = W/m2 mean
    assert w.wind_speed[0] == pytest.approx(11.3)                   # field 22, m/s (field 21 is the direction, 250)
    assert w.location["city"] == "Sample Town" and w.location["elevation"] == pytest.approx(201.0)


def test_sky_temperature_from_infrared():
    constants = pytest.importorskip("scipy.constants")
    w = read_epw(_epw([SAMPLE_ROW]))
    # T_sky = (I / sigma)^(1/4), sigma from CODATA via scipy.constants
    assert w.sky_temperature[0] == pytest.approx((322.0 / constants.Stefan_Boltzmann) ** 0.25, rel=1e-9)


def _with(row, **changes):
    cells = row.split(",")
    for index, value in changes.items():
        cells[int(index[1:]) - 1] = value
    return ",".join(cells)


def test_missing_codes_are_filled_or_nan():
    # missing codes from the manual's data dictionary: 99.9 dry bulb, 999 RH, 999999 pressure, 9999 infrared,
    # 999 wind speed
    rows = [_with(SAMPLE_ROW, f4="1", f7="2.0", f9="80", f10="100000", f22="2.0"),
            _with(SAMPLE_ROW, f4="2", f7="99.9", f9="999", f10="999999", f13="9999", f22="999"),
            _with(SAMPLE_ROW, f4="3", f7="4.0", f9="90", f10="100200", f22="4.0")]
    w = read_epw(_epw(rows))
    assert w.air_temperature[1] == pytest.approx(3.0 + 273.15)
    assert w.relative_humidity[1] == pytest.approx(0.85)
    assert w.pressure[1] == pytest.approx(100100.0)
    assert w.wind_speed[1] == pytest.approx(3.0)
    assert np.isnan(w.horizontal_infrared[1]) and np.isnan(w.sky_temperature[1])
    assert w.filled == {"dry_bulb": 1, "relative_humidity": 1, "pressure": 1, "wind_speed": 1}


@pytest.mark.parametrize("text", ["not a weather file\n", HEADER + "\n1984,1,1,1\n",
                                  _epw([_with(SAMPLE_ROW, f7="99.9")])])
def test_bad_files_raise_input_error(text):
    with pytest.raises(InputError):
        read_epw(text)


def test_bins_keep_hours_and_mean_temperature():
    w = read_epw(demo_weather_path())
    b = to_bins(w, temperature_step=3.0)
    # bins are a partition of the hours: total hours and hour-weighted means are conserved exactly
    assert b.hours.sum() == pytest.approx(len(w))
    assert np.sum(b.air_temperature * b.hours) == pytest.approx(w.air_temperature.sum(), rel=1e-12)
    assert np.sum(b.wind_speed * b.hours) == pytest.approx(w.wind_speed.sum(), rel=1e-12)
    scaled = to_bins(w, hours_per_year=6000)
    assert scaled.hours.sum() == pytest.approx(6000)


def test_freezing_and_condensation_hours():
    rows = [_with(SAMPLE_ROW, f4=str(h), f7=t, f8=d) for h, (t, d) in
            enumerate([("-3.0", "-5.0"), ("1.0", "-1.0"), ("12.0", "9.0"), ("20.0", "15.0")], start=1)]
    w = read_epw(_epw(rows))
    assert hours_below(w) == 1
    assert hours_below(w, 283.15) == 2
    # a surface at 10 degC is below the dew points 15 degC only; with a 2 K margin also below 9 + 2 = 11 degC
    assert int(condensation_hours(w, 283.15)) == 1
    assert int(condensation_hours(w, 283.15, margin=2.0)) == 2
    np.testing.assert_array_equal(condensation_hours(w, np.array([[283.15], [200.0]])), [1, 4])


def test_demo_file_is_invented_and_reproducible():
    text = demo_weather_path().read_text(encoding="utf-8")
    assert "INVENTED" in text.splitlines()[5]
    assert text == synthetic_epw_text()  # the shipped file is exactly what the seeded generator writes
    w = read_epw(text)
    assert len(w) == 8760 and w.filled == {"dry_bulb": 0, "relative_humidity": 0, "pressure": 0, "wind_speed": 0}


def test_jacket_condensation_hours_by_direct_solve():
    from convlib.pipe import Layer, insulated_pipe
    from convlib.properties import dew_point
    from convlib.weather import jacket_condensation_hours
    # four hours: warm humid, warm dry, cool humid, cold; a chilled-water line at 6 degC under 10 mm / 30 mm
    rows = [_with(SAMPLE_ROW, f4=str(h), f7=t, f8="99.9", f9=rh, f22="1.0") for h, (t, rh) in
            enumerate([("28.0", "85"), ("28.0", "30"), ("15.0", "95"), ("2.0", "90")], start=1)]
    w = read_epw(_epw(rows))
    layers = [Layer(np.array([[0.010], [0.030]]), 0.035)]
    hours = jacket_condensation_hours([0.1143, 0.1143], 279.15, layers, w, jacket_emissivity=0.9)
    # independent: the jacket at each hour from insulated_pipe, the dew point from CoolProp (dew point missing in file)
    for line, t in enumerate([0.010, 0.030]):
        ts = insulated_pipe(0.1143, 279.15, [Layer(t, 0.035)], air_temperature=w.air_temperature,
                            wind_speed=w.wind_speed, jacket_emissivity=0.9, pressure=w.pressure).surface_temperature
        dew = dew_point(w.air_temperature, w.relative_humidity, w.pressure)
        assert hours[line] == int(np.sum(ts < dew))
    assert hours[0] >= hours[1] and hours[0] >= 1
