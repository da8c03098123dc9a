"""Sizing accepts an array for any numeric input (regression: surroundings_temperature, pipe_wall_thickness and
inner_coefficient given as arrays ended in an internal IndexError), and carries the flags of its solves.

Each element of an array call must equal the scalar call with that element: a property of the vectorized
API (no outside value needed); the sizing numbers themselves are checked against published values in
tests/test_design.py.
"""
import numpy as np
import pytest

import convlib as cl
from convlib import design
from convlib.pipe import Layer
from convlib.regimes import Flag

BASE = dict(insulation_conductivity=0.04, air_temperature=293.15)
ARRAYS = {
    "surroundings_temperature": np.array([283.15, 293.15, 303.15]),
    "pipe_wall_thickness": np.array([0.003, 0.006, 0.009]),
    "inner_coefficient": np.array([50.0, 500.0, 5000.0]),
    "jacket_emissivity": np.array([0.1, 0.5, 0.9]),
    "wind_speed": np.array([0.0, 2.0, 8.0]),
    "sky_view_fraction": np.array([0.0, 0.5, 1.0]),
    "insulation_conductivity": np.array([0.03, 0.04, 0.06]),
    "pressure": np.array([80e3, 95e3, 101325.0]),
    "convection_factor": np.array([0.8, 1.0, 1.2]),
}
EXTRA = {"pipe_wall_thickness": {"pipe_conductivity": 45.0}}


def _sizings():
    yield "heat loss", lambda **kw: design.thickness_for_heat_loss(0.1143, 453.15, heat_loss_limit=60.0, **kw)
    yield "touch", lambda **kw: design.thickness_for_surface_temperature(0.1143, 523.15, surface_limit=323.15, **kw)


@pytest.mark.parametrize("name", list(ARRAYS))
@pytest.mark.parametrize("label, size", list(_sizings()), ids=lambda v: v if isinstance(v, str) else "")
def test_any_numeric_input_as_an_array_matches_scalar_calls(label, size, name):
    kwargs = {**BASE, **EXTRA.get(name, {})}
    values = ARRAYS[name]
    whole = size(**{**kwargs, name: values})
    for i, v in enumerate(values):
        one = size(**{**kwargs, name: float(v)})
        np.testing.assert_allclose(whole.required_thickness[i], one.required_thickness, rtol=1e-9, atol=1e-12)
        np.testing.assert_array_equal(whole.warnings[i], one.warnings)


def test_condensation_sizing_broadcasts_humidity_and_surroundings():
    rh = np.array([0.6, 0.75, 0.9])
    whole = design.thickness_against_condensation(0.1683, 279.15, insulation_conductivity=0.035,
                                                  surroundings=cl.Surroundings(303.15, relative_humidity=rh))
    for i, v in enumerate(rh):
        one = design.thickness_against_condensation(0.1683, 279.15, insulation_conductivity=0.035,
                                                    air_temperature=303.15, relative_humidity=float(v))
        assert float(whole.required_thickness[i]) == pytest.approx(float(one.required_thickness), rel=1e-9)


def test_outer_layer_arrays_and_critical_thickness_broadcast():
    jackets = [Layer(np.array([0.0005, 0.001, 0.002]), 0.2, name="jacket")]
    crit = design.critical_thickness(0.006, 353.15, air_temperature=293.15, insulation_conductivity=0.2,
                                     surroundings_temperature=np.array([283.15, 293.15, 303.15]))
    for i, t in enumerate([283.15, 293.15, 303.15]):
        one = design.critical_thickness(0.006, 353.15, air_temperature=293.15, insulation_conductivity=0.2,
                                        surroundings_temperature=t)
        assert float(crit[i]) == pytest.approx(float(one), rel=1e-9)
    r = design.thickness_for_heat_loss(0.1143, 453.15, heat_loss_limit=60.0, outer_layers=jackets, **BASE)
    assert r.required_thickness.shape == (3,)


def test_sizing_carries_the_flags_of_its_solves():
    # 60 m/s wind on a 4 in line: Re ~ 4e5 at the jacket; the forced law is used far from still air. Any flag the
    # pipe solve raises at the listed thickness must be in the sizing's union.
    r = design.thickness_for_heat_loss(0.1143, 453.15, heat_loss_limit=60.0, wind_speed=60.0,
                                       natural="morgan", **BASE)
    at_listed = cl.insulated_pipe(0.1143, 453.15, [Layer(float(r.commercial_thickness), 0.04)],
                                  air_temperature=293.15, wind_speed=60.0, natural="morgan")
    assert int(r.warnings) & int(at_listed.warnings) == int(at_listed.warnings)
    assert isinstance(r.warning_messages(), list)


def test_surroundings_object_and_keywords_agree():
    around = cl.Surroundings(air_temperature=293.15, wind_speed=3.0, sky_view_fraction=0.5)
    a = design.thickness_for_heat_loss(0.1143, 453.15, heat_loss_limit=60.0, insulation_conductivity=0.04,
                                       surroundings=around)
    b = design.thickness_for_heat_loss(0.1143, 453.15, heat_loss_limit=60.0, insulation_conductivity=0.04,
                                       air_temperature=293.15, wind_speed=3.0, sky_view_fraction=0.5)
    assert float(a.required_thickness) == float(b.required_thickness)


def test_annual_energy_takes_per_case_arrays_of_pipe_inputs():
    bins = design.WeatherBins([268.15, 283.15], [4.0, 2.0], [3000, 5760])
    eps = np.array([0.1, 0.5, 0.9])
    whole = design.annual_energy(0.0603, 343.15, [Layer(0.04, 0.04)], bins=bins, jacket_emissivity=eps)
    for i, v in enumerate(eps):
        one = design.annual_energy(0.0603, 343.15, [Layer(0.04, 0.04)], bins=bins, jacket_emissivity=float(v))
        assert float(whole.heat_kwh[i]) == pytest.approx(float(one.heat_kwh), rel=1e-9)
    assert whole.warnings.shape == (3,) and Flag  # flags per case
