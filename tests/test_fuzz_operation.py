"""Property-based tests of the operating-line functions (convlib.operation) and the vessels.

Every input drawn over wide ranges gives finite results or an InputError naming the field: never
NaN, inf, a numpy warning or another exception. "Never freezes" is an explicit flag with a note.
The marching has an iteration bound and a time bound and says when it stopped.
"""
from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from convlib import operation, vessels
from convlib.errors import InputError
from convlib.pipe import Layer
from fuzz_helpers import assert_finite, outcome, temperatures, wide

pytestmark = pytest.mark.fuzz

#: These calls march (tens of insulated_pipe calls each): a tenth of the profile's examples (at least 10).
slow = settings(max_examples=max(10, settings.default.max_examples // 10))
STILL_AIR_FIELDS = ("richardson",)  # inf in still air by definition (SurfaceResult)

line_layers = st.lists(st.builds(Layer, st.one_of(st.just(0.0), wide(1e-4, 1.0)), wide(0.01, 1.0)), max_size=2)


@slow
@given(d=wide(1e-4, 10.0), tin=temperatures, ta=temperatures, flow=st.one_of(wide(1e-9, 1e6), st.just(1e300)),
       length=st.one_of(wide(1e-3, 1e7), st.just(1e300)), layers=line_layers,
       u=st.one_of(st.just(0.0), wide(1e-3, 200.0)), fluid=st.sampled_from(["Water", "Air"]),
       constant=st.booleans(), cp=st.one_of(st.none(), wide(1.0, 1e5)))
def test_line_temperature_profile_finite_or_input_error(d, tin, ta, flow, length, layers, u, fluid, constant, cp):
    out = outcome(operation.line_temperature_profile, d, tin, layers, mass_flow=flow, length=length,
                  air_temperature=ta, wind_speed=u, fluid=fluid, fluid_phase="liquid" if fluid == "Water" else "gas",
                  constant_coefficient=constant, specific_heat=cp, time_limit=20.0)
    if isinstance(out, InputError):
        return
    freezes = np.asarray(out.freezes)
    # where the line freezes the profile stops there (later points NaN); "freezes" is the flag, and the freezing
    # position is NaN exactly where it is False
    assert_finite(out, skip=("freezing_position",) + (("position", "temperature", "q_per_length")
                                                      if freezes.any() else ()))
    position = np.asarray(out.freezing_position)
    assert np.all(np.isfinite(position[freezes])) and np.all(np.isnan(position[~freezes]))
    # the outlet lies between the inlet and the air (no overshoot past the air temperature)
    lo, hi = min(tin, ta), max(tin, ta)
    assert lo - 1e-6 <= float(out.outlet_temperature) <= hi + 1e-6


@slow
@given(d=wide(1e-3, 5.0), wall_fraction=st.floats(0.001, 0.49), t0=st.floats(273.15, 372.0),
       ta=st.one_of(st.floats(200.0, 300.0), temperatures), layers=line_layers,
       u=st.one_of(st.just(0.0), wide(1e-3, 200.0)), constant=st.booleans(),
       sun=st.one_of(st.just(0.0), wide(1.0, 1400.0)))
def test_freeze_time_finite_or_never_freezes_flag(d, wall_fraction, t0, ta, layers, u, constant, sun):
    out = outcome(operation.freeze_time, d, d * wall_fraction, t0, layers, air_temperature=ta, wind_speed=u,
                  constant_coefficient=constant, solar_irradiance=sun, time_limit=20.0)
    if isinstance(out, InputError):
        return
    never = np.asarray(out.never_freezes)
    # times and curves are finite where the line freezes; "never" is the flag, with a note saying so
    assert_finite(out, skip=("time_to_freezing_point", "time_to_freeze_solid", "time_total", "curve_time",
                             "curve_temperature"))
    for name in ("time_to_freezing_point", "time_to_freeze_solid", "time_total"):
        hours = np.asarray(getattr(out, name))
        assert np.all(np.isfinite(hours) | never), name
        assert np.all(hours[~never] >= 0), name
    assert np.all(np.isfinite(out.curve_time) | never)
    if never.any():
        assert any("no freezing" in n for n in out.notes)
    else:
        assert float(out.time_total) >= float(out.time_to_freezing_point)


@slow
@given(d=wide(1e-4, 10.0), t=temperatures, ta=temperatures, layers=line_layers,
       u=st.one_of(st.just(0.0), wide(1e-3, 200.0)), margin=st.one_of(st.floats(0.0, 5.0), st.just(1e300)),
       length=st.one_of(st.floats(0.0, 1e4), st.just(1e300)))
def test_tracing_duty_finite_or_input_error(d, t, ta, layers, u, margin, length):
    out = outcome(operation.tracing_duty, d, t, layers, air_temperature=ta, wind_speed=u, margin=margin,
                  length=length)
    if not isinstance(out, InputError):
        assert_finite(out, skip=STILL_AIR_FIELDS)


@slow
@given(d=wide(1e-4, 10.0), p=st.one_of(wide(1.0, 1e9), st.just(1e300)), ta=temperatures, layers=line_layers,
       length=st.one_of(st.floats(0.0, 1e4), st.just(1e300)))
def test_steam_line_finite_or_input_error(d, p, ta, layers, length):
    out = outcome(operation.steam_line, d, p, layers, air_temperature=ta, length=length)
    if not isinstance(out, InputError):
        assert_finite(out, skip=STILL_AIR_FIELDS)


def test_march_stops_at_its_time_bound_and_says_so():
    with pytest.raises(InputError) as info:
        operation.line_temperature_profile(0.0603, 353.15, [Layer(0.04, 0.04)], mass_flow=0.2, length=200.0,
                                           air_temperature=273.15, time_limit=0.0)
    assert info.value.field == "time_limit"
    assert "stopped" in str(info.value)


def test_march_stops_at_its_step_bound_and_says_so():
    # a tolerance no step can meet: the step bound ends the march with a message naming the tolerance
    with pytest.raises(InputError) as info:
        operation.line_temperature_profile(0.0603, 353.15, [Layer(0.04, 0.04)], mass_flow=0.2, length=200.0,
                                           air_temperature=273.15, tolerance=1e-300)
    assert info.value.field == "tolerance"


ground = ("h_convection", "h_radiation")  # a floor on the ground has no air film: documented NaN on that face


@slow
@given(kind=st.sampled_from(["vertical_tank", "spherical_tank", "rectangular_duct"]),
       a=st.one_of(wide(1e-7, 1e7), st.just(1e300)), b=wide(1e-3, 100.0), ta=temperatures, t=temperatures,
       bare=st.booleans(), layers=line_layers, u=st.one_of(st.just(0.0), wide(1e-3, 200.0)), outdoor=st.booleans(),
       floor=st.sampled_from(["ground", "open", "none"]), wind_direction=st.sampled_from(["along", "across"]))
def test_vessels_finite_or_input_error(kind, a, b, ta, t, bare, layers, u, outdoor, floor, wind_direction):
    temps = dict(surface_temperature=t) if bare else dict(fluid_temperature=t)
    if kind == "vertical_tank":
        extra = {} if bare else dict(wall_layers=layers, roof_layers=layers)
        out = outcome(vessels.vertical_tank, a, b, air_temperature=ta, wind_speed=u, outdoor=outdoor, floor=floor,
                      **temps, **extra)
    elif kind == "spherical_tank":
        out = outcome(vessels.spherical_tank, a, air_temperature=ta, wind_speed=u, outdoor=outdoor, **temps,
                      **({} if bare else dict(layers=layers)))
    else:
        out = outcome(vessels.rectangular_duct, a, b, 10.0, air_temperature=ta, wind_speed=u, outdoor=outdoor,
                      wind_direction=wind_direction, **temps, **({} if bare else dict(layers=layers)))
    if isinstance(out, InputError):
        return
    for face in out.faces:
        assert_finite(face, skip=("surface", *(ground if face.surface is None else ())))
        if face.surface is not None:
            assert_finite(face.surface, skip=STILL_AIR_FIELDS)
    assert_finite(out.q_total)
    assert_finite(out.area)
