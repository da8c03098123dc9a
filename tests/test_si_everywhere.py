"""SI in every result: the same key means the same value in the same unit in Python, JSON, CSV and snapshots.

Regression (issue): SteamLine.condensate_rate was kg/h in Python and kg/s in --json; freeze times hours in Python
and seconds in JSON. Display units (h, kg/h) appear only at the edges: table columns and CSV headers that say
their unit. Conversions: 1 h = 3600 s (SI brochure, 9th ed., Table 8).
"""
import csv
import io

import numpy as np
import pytest

import convlib as cl
from cli_helpers import run_json, run_text
from convlib import cli_common, cli_study, linelist
from convlib.pipe import Layer
from convlib.units import KIND_SI_UNIT

HOUR = 3600.0


def test_steam_condensate_is_kg_per_s_in_python_and_json(capsys):
    s = cl.steam_line(0.1683, 3.5e5, [Layer(0.08, 0.045)], air_temperature=263.15, length=260.0, wind_speed=6.0)
    out = run_json(capsys, "steam", "--nps", "6", "--steam-pressure", "3.5bar", "--air-temperature=-10degC",
                   "--layer", "80mm,0.045", "--length", "260", "--wind-speed", "6")
    section = out["saturated steam line"]
    assert section["units"]["condensate_rate"] == "kg/s"
    assert section["results"][0]["condensate_rate"] == pytest.approx(float(s.condensate_rate), rel=1e-12)
    assert float(s.condensate_rate) == pytest.approx(float(s.q_total) / float(s.latent_heat), rel=1e-12)
    table = run_text(capsys, "steam", "--nps", "6", "--steam-pressure", "3.5bar", "--air-temperature=-10degC",
                     "--layer", "80mm,0.045", "--length", "260", "--wind-speed", "6")
    assert "[kg/h]" in table and f"{float(s.condensate_rate) * HOUR:.2f}" in table   # hours only on screen


def test_freeze_times_are_seconds_in_python_and_json(capsys):
    f = cl.freeze_time(0.0603, 0.00391, 283.15, [Layer(0.025, 0.04)], air_temperature=258.15, wind_speed=5.0)
    out = run_json(capsys, "freeze", "--nps", "2", "--initial-temperature", "10degC", "--minimum-ambient=-15degC",
                   "--wind-speed", "5", "--layer", "25mm,0.04")
    section = out["freeze time (stagnant water)"]
    assert section["units"]["time_total"] == "s"
    assert section["results"][0]["time_total"] == pytest.approx(float(f.time_total), rel=1e-12)
    with pytest.warns(DeprecationWarning, match="time_total"):
        assert float(f.hours_total) == pytest.approx(float(f.time_total) / HOUR)


def test_every_json_unit_comes_from_one_table():
    # a key of the command line's output has one SI unit, whichever command prints it
    for key, (_, kind, _) in cli_common.FIELDS.items():
        assert KIND_SI_UNIT[kind] in ("K", "m", "m/s", "Pa", "W/m", "W/m**2", "W", "W/m**2/K", "W/m/K", "J",
                                       "m**2", "s", "kg/s", "kg", "", "delta_degC"), key
    for key, unit in {**cli_study.LINE_UNITS, **cli_study.TOTAL_UNITS}.items():
        if key in cli_common.FIELDS:
            assert unit == KIND_SI_UNIT[cli_common.FIELDS[key][1]], key


def test_line_list_condensate_kg_per_s_in_python_and_json_kg_per_h_in_the_csv_header(capsys, tmp_path):
    result = cl.run_line_list(linelist.demo_lines_path())
    steam = ~np.isnan(result.condensate)
    assert steam.any()
    out = run_json(capsys, "lines", "--demo")
    assert out["lines"]["units"]["condensate"] == "kg/s" and out["totals_units"]["condensate"] == "kg/s"
    by_tag = {row["tag"]: row for row in out["lines"]["results"]}
    for tag, value in zip(np.asarray(result.tag)[steam], result.condensate[steam]):
        assert by_tag[tag]["condensate"] == pytest.approx(float(value), rel=1e-9)
    path = tmp_path / "out.csv"
    cl.write_results_csv(result, path)
    rows = list(csv.DictReader(io.StringIO(path.read_text())))
    for tag, value in zip(np.asarray(result.tag)[steam], result.condensate[steam]):
        cell = next(r for r in rows if r["tag"] == tag)["condensate[kg/h]"]
        assert float(cell) == pytest.approx(float(value) * HOUR, rel=1e-6)   # the header says kg/h


def test_snapshot_results_are_the_python_results_in_si(tmp_path):
    from convlib import snapshot
    from convlib.study import load_demo_study, run_study

    spec = load_demo_study()
    result = run_study(spec)
    path = tmp_path / "demo.json"
    snapshot.save(path, spec, result, author="test")
    loaded = snapshot.load(path)
    for key in ("q_per_length", "surface_temperature", "h_convection"):
        np.testing.assert_allclose(np.asarray(getattr(loaded.result.base, key) if hasattr(loaded.result.base, key)
                                              else loaded.result.base[key], float),
                                   np.asarray(getattr(result.base, key) if hasattr(result.base, key)
                                              else result.base[key], float), rtol=1e-12)


def test_operation_results_carry_the_flags_of_every_solve():
    # 30 m/s on an 8 in line under 50 mm: the jacket's Reynolds number (30 x 0.32 / 1.3e-5 ~ 7e5) is beyond
    # Hilpert's 4e5 (Hilpert (1933), as tabulated by Incropera et al., 6th ed., Table 7.2): the flag must travel.
    kw = dict(air_temperature=263.15, wind_speed=30.0, forced="hilpert")
    messages = "forced-convection correlation used outside its Reynolds range (extrapolated)"
    p = cl.line_temperature_profile(0.2191, 353.15, [Layer(0.05, 0.04)], mass_flow=2.0, length=500.0, **kw)
    f = cl.freeze_time(0.2191, 0.008, 283.15, [Layer(0.05, 0.04)], **kw)
    m = cl.minimum_flow(0.2191, 353.15, [Layer(0.05, 0.04)], outlet_limit=343.15, length=500.0, **kw)
    s = cl.steam_line(0.2191, 5e5, [Layer(0.05, 0.04)], **kw)
    t = cl.tracing_duty(0.2191, 278.15, [Layer(0.05, 0.04)], **kw)
    for result in (p, f, m, s, t):
        assert any(messages in text for text in result.warning_messages()), type(result).__name__
