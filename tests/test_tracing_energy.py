"""A year of heat tracing from hourly weather (issue 15 point 2): convlib.weather.tracing_energy and
``convlib trace --weather``."""
from __future__ import annotations

import json
import math

import numpy as np
import pytest

from convlib.pipe import Layer
from convlib.weather import demo_weather_path, read_epw, tracing_energy



@pytest.fixture(scope="module")
def weather():
    return read_epw(demo_weather_path())


def test_energy_equals_the_series_resistance_hand_sum(weather):
    """With a given outer coefficient and no radiation, the loss per metre is the series of the layer's
    conduction and the outer film (Incropera et al., 6th ed., eq. 3.32 and Sec. 3.3.1, cylindrical wall):
    q' = (T_m - T_air) / (ln(r2/r1) / (2 pi k) + 1 / (h 2 pi r2)); summed over the hours the air is below the
    switch-on temperature, one hour each."""
    d, t, k, h, tm = 0.0603, 0.025, 0.04, 12.0, 278.15
    r1, r2 = d / 2, d / 2 + t
    resistance = math.log(r2 / r1) / (2 * math.pi * k) + 1.0 / (h * 2 * math.pi * r2)
    air = weather.air_temperature
    hand = sum(max(tm - ta, 0.0) / resistance * 3600.0 for ta in air if ta < tm)
    e = tracing_energy(d, tm, [Layer(t, k)], weather, jacket_emissivity=0.0, convection_coefficient=h,
                       length=100.0)
    assert e.energy_per_length[0] == pytest.approx(hand, rel=1e-9)
    assert e.energy[0] == pytest.approx(100.0 * hand, rel=1e-9)
    assert e.time_on[0] == pytest.approx(3600.0 * np.count_nonzero(air < tm))
    assert e.peak_per_length[0] == pytest.approx((tm - air.min()) / resistance, rel=1e-9)


def test_a_lower_switch_on_temperature_and_thicker_insulation_use_less(weather):
    base = tracing_energy(0.0603, 278.15, [Layer(0.025, 0.04)], weather)
    later = tracing_energy(0.0603, 278.15, [Layer(0.025, 0.04)], weather, switch_on_below=273.15)
    thicker = tracing_energy(0.0603, 278.15, [Layer(0.05, 0.04)], weather)
    assert later.energy_per_length[0] < base.energy_per_length[0]
    assert later.time_on[0] < base.time_on[0]
    assert thicker.energy_per_length[0] < base.energy_per_length[0]


def test_lines_at_once_equal_lines_alone(weather):
    both = tracing_energy([0.0603, 0.1143], [278.15, 283.15], [Layer(np.array([[0.025], [0.04]]), 0.04)], weather)
    one = tracing_energy(0.1143, 283.15, [Layer(0.04, 0.04)], weather)
    assert both.energy_per_length[1] == pytest.approx(one.energy_per_length[0], rel=1e-9)


def test_bad_input_names_the_field(weather):
    from convlib.errors import InputError

    with pytest.raises(InputError, match="maintain_temperature"):
        tracing_energy(0.0603, -5.0, [Layer(0.025, 0.04)], weather)


def test_cli_trace_with_weather_prints_the_year_in_si_and_us(capsys, weather):
    from convlib.cli import main

    args = ["trace", "--nps", "2", "--maintain-temperature", "5degC", "--air-temperature", "-20degC",
            "--layer", "25mm,0.04", "--length", "100m", "--weather", "demo", "--json"]
    assert main(args) == 0
    out = json.loads(capsys.readouterr().out)
    year = next(v for k, v in out.items() if k.startswith("a year of weather"))["results"][0]
    e = tracing_energy(0.0603, 278.15, [Layer(0.025, 0.04)], weather, length=100.0)
    assert year["tracing_energy"] == pytest.approx(float(e.energy[0]), rel=1e-9)   # J, SI in JSON
    assert year["time_on"] == pytest.approx(float(e.time_on[0]))                     # s
    assert main([*args[:-1], "--units", "US"]) == 0
    text = capsys.readouterr().out
    assert "E_trace/yr [MMBtu]" in text and "t_on/yr [h]" in text
    # the tracing margin is a fraction, shown without a temperature unit
    assert "margin [" not in text.split("a year of weather")[0]
