"""Property-based tests of insulated_pipe and the sizing functions of convlib.design.

Every input drawn over wide ranges gives finite results or an InputError naming the field; the
surface solve converges (``converged``) on every accepted case; the loss rises with the temperature
difference, changes sign with it, and falls with insulation thickness above the critical thickness
(Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., sec. 3.3.1, from memory).
"""
from __future__ import annotations

import os

import numpy as np
import pytest
from hypothesis import given, strategies as st

from convlib import design
from convlib.errors import InputError
from convlib.pipe import Layer, insulated_pipe
from fuzz_helpers import assert_finite, outcome, temperatures, wide

pytestmark = pytest.mark.fuzz

STILL_AIR_FIELDS = ("richardson",)  # inf in still air by definition (SurfaceResult)


@st.composite
def layers(draw, max_layers=3):
    """(thickness, conductivity) pairs; the test builds the Layer objects inside the checked call."""
    return [(draw(st.one_of(st.just(0.0), wide(1e-9, 1e3), st.just(1e300))),
             draw(st.one_of(wide(1e-4, 1e3), st.sampled_from([1e-300, 1e300]))))
            for _ in range(draw(st.integers(0, max_layers)))]


def _pipe(d, tf, pairs, **kwargs):
    return insulated_pipe(d, tf, [Layer(t, k, name=f"layer {j}") for j, (t, k) in enumerate(pairs)], **kwargs)


@st.composite
def pipe_inputs(draw):
    kwargs = dict(
        pipe_outer_diameter=draw(st.one_of(wide(1e-9, 1e9), st.sampled_from([1e-300, 1e300]))),
        fluid_temperature=draw(temperatures), air_temperature=draw(temperatures),
        wind_speed=draw(st.one_of(st.just(0.0), st.sampled_from([1e-300, 1e-12]), wide(1e-3, 1e3))),
        jacket_emissivity=draw(st.floats(0.0, 1.0)),
        solar_irradiance=draw(st.one_of(st.just(0.0), wide(1.0, 2000.0))),
        sky_view_fraction=draw(st.sampled_from([0.0, 0.5, 1.0])),
    )
    kwargs["layers"] = draw(layers())
    if draw(st.booleans()):
        kwargs["surroundings_temperature"] = draw(temperatures)
    if draw(st.booleans()):
        kwargs["inner_coefficient"] = draw(wide(1e-6, 1e9))
    if draw(st.booleans()):
        kwargs["pipe_wall_thickness"] = draw(wide(1e-6, 1.0))
        kwargs["pipe_conductivity"] = draw(wide(1e-3, 1e4))
    return kwargs


@given(pipe_inputs())
def test_insulated_pipe_finite_or_input_error(kwargs):
    arguments = set(kwargs) | {"inputs"}
    out = outcome(_pipe, kwargs.pop("pipe_outer_diameter"), kwargs.pop("fluid_temperature"),
                  kwargs.pop("layers"), **kwargs)
    if isinstance(out, InputError):
        # the error names the caller's own arguments (or a layer's), not an internal quantity
        named = {f for f in out.field.split(", ") if not f.startswith("layer ")}
        assert named <= arguments | {"conductivity"}, out.field
        return
    assert_finite(out, skip=STILL_AIR_FIELDS)
    assert not np.isnan(out.richardson).any()
    assert np.all(out.converged)


@given(d=wide(0.005, 2.0), ta=st.floats(250.0, 320.0), dt=st.floats(1.0, 300.0),
       t=st.one_of(st.just(0.0), wide(1e-3, 0.3)), k=wide(0.01, 1.0), u=st.one_of(st.just(0.0), st.floats(0, 20)),
       eps=st.floats(0.0, 1.0), sky=st.sampled_from([0.0, 0.5]))
def test_loss_changes_sign_and_rises_with_temperature_difference(d, ta, dt, t, k, u, eps, sky):
    tf = np.array([ta - min(dt, 80.0), ta - 0.5 * min(dt, 80.0), ta + 0.5 * dt, ta + dt])
    r = outcome(insulated_pipe, d, tf, [Layer(t, k)], air_temperature=ta, wind_speed=u, jacket_emissivity=eps,
                sky_view_fraction=sky, sky_temperature=ta)
    assert not isinstance(r, InputError), r
    q = r.q_per_length
    assert q[0] < q[1] < 0.0 < q[2] < q[3]
    assert np.all(r.converged)


@given(d=wide(0.005, 1.0), ta=st.floats(250.0, 320.0), dt=st.one_of(st.floats(-80.0, -2.0), st.floats(2.0, 300.0)),
       k=wide(0.02, 0.5), u=st.one_of(st.just(0.0), st.floats(0, 20)), eps=st.floats(0.0, 1.0),
       t1=wide(1e-3, 0.2), dt_rel=st.floats(0.05, 1.0))
def test_loss_falls_with_thickness_above_critical(d, ta, dt, k, u, eps, t1, dt_rel):
    common = dict(air_temperature=ta, insulation_conductivity=k, jacket_emissivity=eps, wind_speed=u)
    critical = float(design.critical_thickness(d, ta + dt, **common, max_thickness=0.5))
    thick = np.array([critical + t1, critical + t1 * (1.0 + dt_rel)])
    r = outcome(insulated_pipe, d, ta + dt, [Layer(thick, k)], air_temperature=ta, wind_speed=u,
                jacket_emissivity=eps)
    assert not isinstance(r, InputError), r
    q = np.abs(r.q_per_length)
    assert q[1] <= q[0] * (1.0 + 1e-6)


sizing = st.sampled_from(["surface", "heat_loss", "condensation"])


@given(kind=sizing, d=st.one_of(wide(1e-9, 1e9)), tf=temperatures, ta=temperatures, k=wide(1e-4, 1e3),
       limit=st.one_of(temperatures, wide(1e-3, 1e6)), u=st.one_of(st.just(0.0), wide(1e-3, 1e3)),
       rh=st.floats(0.0, 1.5), max_t=st.one_of(st.just(0.3), wide(1e-6, 1e3)))
def test_sizing_finite_or_input_error_and_flags_not_reachable(kind, d, tf, ta, k, limit, u, rh, max_t):
    if kind == "surface":
        out = outcome(design.thickness_for_surface_temperature, d, tf, air_temperature=ta, insulation_conductivity=k,
                      surface_limit=limit, wind_speed=u, max_thickness=max_t)
    elif kind == "heat_loss":
        out = outcome(design.thickness_for_heat_loss, d, tf, air_temperature=ta, insulation_conductivity=k,
                      heat_loss_limit=limit, wind_speed=u, max_thickness=max_t)
    else:
        out = outcome(design.thickness_against_condensation, d, tf, air_temperature=ta, relative_humidity=rh,
                      insulation_conductivity=k, max_thickness=max_t)
    if isinstance(out, InputError):
        return
    # "not reachable" and "beyond the listed thicknesses" are explicit flags with a message, and the
    # thicknesses are finite exactly where they exist
    assert_finite(out, skip=("required_thickness", "commercial_thickness", "value_at_commercial", "margin",
                             "dew_point", "surface_temperature_at_commercial", "q_per_length_at_commercial"))
    reachable, listed = np.asarray(out.achievable), np.asarray(out.listed)
    # the echoed assumptions: margin and dew point belong to a condensation sizing (NaN, "not applicable", else),
    # the state at the listed thickness exists where a listed thickness does
    condensation = kind == "condensation"
    assert np.all(np.isfinite(out.margin)) == condensation and np.all(np.isnan(out.margin)) != condensation
    assert np.all(np.isfinite(out.dew_point)) == condensation
    for name in ("surface_temperature_at_commercial", "q_per_length_at_commercial"):
        assert np.array_equal(np.isfinite(getattr(out, name)), listed), name
    assert np.array_equal(np.isfinite(out.required_thickness), reachable)
    assert np.array_equal(np.isfinite(out.commercial_thickness), listed)
    assert not np.any(listed & ~reachable)
    assert np.array_equal(np.isfinite(out.value_at_commercial), listed)
    if not reachable.all():
        assert any("no thickness up to" in m for m in out.messages)
    if (reachable & ~listed).any():
        assert any("largest listed thickness" in m for m in out.messages)


def test_surface_solve_converges_on_many_random_valid_cases():
    """The surface solve converges at every one of 2*10^4 (``make fuzz``: 10^5) random valid cases, in one call."""
    n = 100_000 if os.environ.get("HYPOTHESIS_PROFILE") == "long" else 20_000
    rng = np.random.default_rng(14)
    ta = rng.uniform(230.0, 320.0, n)
    hot = rng.random(n) < 0.7
    tf = np.where(hot, ta + rng.uniform(0.0, 450.0, n), ta - rng.uniform(0.0, 80.0, n))
    thickness = np.where(rng.random(n) < 0.1, 0.0, rng.uniform(0.0, 0.2, n))
    r = outcome(insulated_pipe, 10.0 ** rng.uniform(-2.0, 0.3, n), tf, [Layer(thickness, rng.uniform(0.02, 0.2, n))],
                air_temperature=ta, wind_speed=np.where(rng.random(n) < 0.3, 0.0, rng.uniform(0.0, 30.0, n)),
                jacket_emissivity=rng.uniform(0.0, 1.0, n), sky_view_fraction=rng.uniform(0.0, 1.0, n),
                solar_irradiance=np.where(rng.random(n) < 0.5, 0.0, rng.uniform(0.0, 1000.0, n)),
                inner_coefficient=np.where(rng.random(n) < 0.5, 1e9, rng.uniform(5.0, 5000.0, n)))
    assert not isinstance(r, InputError), r
    assert r.converged.all()
    assert_finite(r, skip=STILL_AIR_FIELDS)
