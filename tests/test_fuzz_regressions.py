"""Regression tests, one concrete example each, for the silent NaN/inf cases and inconsistencies that the
property-based tests (tests/test_fuzz_*.py) found. Each ran without an error before its fix and returned
NaN or inf, raised a bare numpy FloatingPointError, or gave contradicting flags.
"""
from __future__ import annotations

import numpy as np
import pytest

from convlib import design, operation, vessels
from convlib.correlations import nusselt
from convlib.errors import InputError
from convlib.surface import bare_surface
from fuzz_helpers import assert_finite, outcome

STRICT = dict(divide="raise", over="raise", invalid="raise")


@pytest.mark.parametrize("wind", [1e-300, 5e-324, 1.4433506460119383e-162])
@pytest.mark.parametrize("dt", [0.0, -1.0, 1.0])
def test_richardson_number_of_a_vanishing_wind_is_infinite_not_nan(wind, dt):
    # before: Ri = Gr / Re^2 = 0 / 0 = NaN at zero temperature difference with wind 1e-300 m/s,
    # and an overflow in the division at 1.4e-162 m/s
    with np.errstate(**STRICT):
        r = bare_surface(surface_temperature=300.0 + dt, air_temperature=300.0, diameter=1.0, length=1.0,
                         wind_speed=wind, emissivity=0.0)
    assert not np.isnan(r.richardson)
    if dt != 0.0:  # buoyancy against a vanishing wind: natural convection (at dt = 0 there is neither)
        assert float(r.richardson) == np.inf
        assert r.regime_names().item() == "natural"
    assert_finite(r, skip=("richardson",))


@pytest.mark.parametrize("change, field", [
    (dict(diameter=1e300), "diameter"),           # before: overflow in a power, FloatingPointError / inf
    (dict(diameter=1e-300), "diameter"),          # before: overflow in a power
    (dict(length=1e300), "length"),               # before: q_total 2.2e303 W
    (dict(wind_speed=1e300), "wind_speed"),       # before: overflow in a power
    (dict(wind_speed=1e10), "wind_speed"),        # before: 2.7e12 W/m from a wind faster than light
    (dict(solar_irradiance=1e300), "solar_irradiance"),  # before: q = -9e299 W/m
    (dict(convection_factor=1e300), "convection_factor"),
    (dict(convection_coefficient=1e300), "convection_coefficient"),
    (dict(mixing_exponent=1e300, wind_speed=1.0), "mixing_exponent"),
])
def test_physically_meaningless_sizes_and_conditions_are_refused(change, field):
    kwargs = dict(surface_temperature=350.0, air_temperature=290.0, diameter=1.0, length=1.0, **{})
    kwargs.update(change)
    with pytest.raises(InputError) as info:
        with np.errstate(**STRICT):
            bare_surface(**kwargs)
    assert info.value.field == field


def test_accepted_extremes_still_compute():
    # the ends of the accepted ranges (convlib.validation) give finite results
    r = outcome(bare_surface, surface_temperature=350.0, air_temperature=290.0, diameter=np.array([1e-6, 1e6]),
                length=1e6, wind_speed=100.0, solar_irradiance=1400.0, sky_view_fraction=1.0)
    assert not isinstance(r, InputError), r
    assert_finite(r)


@pytest.mark.parametrize("groups, field", [(dict(Re=1e9, Pr=1e300), "Pr"), (dict(Re=1e300, Pr=0.7), "Re")])
def test_nusselt_refuses_meaningless_groups(groups, field):
    # before: overflow in Re * Pr while checking the validity range (FloatingPointError under errstate)
    with pytest.raises(InputError) as info:
        with np.errstate(**STRICT):
            nusselt("cylinder_crossflow", "churchill_bernstein", **groups)
    assert info.value.field == field


def test_spherical_tank_of_absurd_diameter_is_refused():
    # before: overflow squaring the diameter for the inside film
    with pytest.raises(InputError) as info:
        with np.errstate(**STRICT):
            vessels.spherical_tank(1e300, air_temperature=1.0, fluid_temperature=1.0)
    assert info.value.field == "diameter"


def test_sizing_met_without_insulation_is_achievable():
    # before: a line colder than the touch limit had required_thickness 0 but achievable False
    r = design.thickness_for_surface_temperature(1.0, 1.0, air_temperature=120.0, insulation_conductivity=1.0,
                                                 surface_limit=1.0)
    assert float(r.required_thickness) == 0.0
    assert bool(r.achievable) and bool(r.listed)


def test_sizing_not_reachable_is_a_flag_with_a_message():
    # a 500 degC line can not be brought under 30 degC in 300 mm of a poor insulation: the flags say so
    r = design.thickness_for_surface_temperature(0.1143, 773.15, air_temperature=313.15, insulation_conductivity=0.5,
                                                 surface_limit=303.15)
    assert not bool(r.achievable) and not bool(r.listed)
    assert any("no thickness up to 300 mm" in m for m in r.messages)


@pytest.mark.parametrize("change, field", [(dict(margin=1e300), "margin"), (dict(length=1e300), "length")])
def test_tracing_duty_refuses_unbounded_margin_and_length(change, field):
    with pytest.raises(InputError) as info:
        operation.tracing_duty(0.0603, 278.15, air_temperature=253.15, **change)
    assert info.value.field == field


def test_never_freezes_is_a_flag_with_a_note():
    # water at 10 degC in air at 20 degC never freezes: the flag and the note say so, the times are not numbers
    f = operation.freeze_time(0.0603, 0.00391, 283.15, air_temperature=293.15)
    assert bool(f.never_freezes)
    assert any("no freezing" in n for n in f.notes)
