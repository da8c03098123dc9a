"""Blocked evaluation of large arrays (issue: bounded memory at 10^7 points): a call evaluated in blocks equals
the same call in one piece, field by field, for every input form (arrays, layers with array thicknesses, a
Surroundings object with array fields, 2-D broadcasting). A property of the implementation: no outside value."""
import dataclasses

import numpy as np
import pytest

import convlib as cl
from convlib import blocks


def _same(a, b):
    for field in dataclasses.fields(a):
        x, y = getattr(a, field.name), getattr(b, field.name)
        if isinstance(x, np.ndarray):
            np.testing.assert_array_equal(x, y, err_msg=field.name)
        else:
            assert x == y, field.name


@pytest.fixture
def small_blocks(monkeypatch):
    monkeypatch.setattr(blocks, "BLOCK_POINTS", 7)


def _calls():
    rng = np.random.default_rng(20261204)
    d = rng.uniform(0.02, 0.5, 40)
    ts = rng.uniform(300.0, 500.0, (3, 1))
    wind = rng.uniform(0.0, 10.0, 40)
    thickness = rng.uniform(0.0, 0.1, 40)
    yield lambda: cl.bare_surface(surface_temperature=ts, air_temperature=288.15, diameter=d, length=1.0,
                                  wind_speed=wind, emissivity=0.8)
    yield lambda: cl.insulated_pipe(d, 420.0, [cl.Layer(thickness, 0.04), cl.Layer(0.001, 200.0)],
                                    surroundings=cl.Surroundings(air_temperature=ts[:, :1] - 100.0, wind_speed=wind))
    yield lambda: cl.insulated_pipe(0.1143, np.linspace(350.0, 600.0, 30), [cl.Layer(0.05, 0.04)],
                                    air_temperature=283.15, inner_coefficient=500.0)


@pytest.mark.parametrize("index", range(3))
def test_blocked_call_equals_one_piece(index, monkeypatch):
    call = list(_calls())[index]
    whole = call()
    monkeypatch.setattr(blocks, "BLOCK_POINTS", 7)
    _same(whole, call())


def test_errors_are_the_functions_own(small_blocks):
    with pytest.raises(cl.InputError, match="emissivity"):
        cl.bare_surface(surface_temperature=np.full(20, 350.0), air_temperature=290.0, diameter=0.1, length=1.0,
                        emissivity=np.full(20, 1.5))


def _message(call):
    with pytest.raises(cl.InputError) as caught:
        call()
    return str(caught.value), caught.value.field, caught.value.rule, np.asarray(caught.value.value).tolist()


_BAD_EMISSIVITY = np.full(20, 0.5)
_BAD_EMISSIVITY[[3, 15]] = (1.5, -1.0)  # in the first and in a later block
_HOT = np.linspace(320.0, 700.0, 20)


@pytest.mark.parametrize("call", [
    lambda: cl.bare_surface(surface_temperature=np.full(20, 350.0), air_temperature=290.0, diameter=0.1,
                            emissivity=_BAD_EMISSIVITY),
    lambda: cl.bare_surface(surface_temperature=np.where(np.arange(20) == 17, 1e5, 350.0), air_temperature=290.0,
                            diameter=0.1),  # the film leaves the air table in the third block only
    lambda: cl.bare_surface(surface_temperature=_HOT, air_temperature=290.0, diameter=np.geomspace(1e-5, 1.0, 20),
                            wind_speed=np.linspace(0.0, 0.2, 20), strict=True),  # counts "(n of 20 points)"
    lambda: cl.insulated_pipe(0.1, np.full(20, 400.0), [cl.Layer(np.where(np.arange(20) == 12, -0.01, 0.05), 0.04)],
                              air_temperature=290.0),
], ids=["emissivity", "air-table", "strict", "layer"])
def test_errors_are_word_for_word_those_of_one_piece(call, monkeypatch):
    whole = _message(call)
    monkeypatch.setattr(blocks, "BLOCK_POINTS", 7)
    assert _message(call) == whole


def test_a_generator_of_layers_reaches_every_block(small_blocks):
    thickness, fluid = np.linspace(0.01, 0.1, 20), np.linspace(350.0, 500.0, 20)
    expected = cl.insulated_pipe(0.1, fluid, [cl.Layer(thickness, 0.04), cl.Layer(0.001, 50.0)], air_temperature=290.0)
    got = cl.insulated_pipe(0.1, fluid, (layer for layer in [cl.Layer(thickness, 0.04), cl.Layer(0.001, 50.0)]),
                            air_temperature=290.0)
    assert got.interface_temperatures.shape == (3, 20)
    _same(got, expected)


def test_nested_lists_and_scalars_broadcast_as_arrays(monkeypatch):
    def call():
        return cl.bare_surface(surface_temperature=[np.linspace(330.0, 420.0, 9).tolist()], air_temperature=285.0,
                               diameter=np.linspace(0.02, 0.5, 5)[:, None], wind_speed=(0.0, 1.0, 2.0, 3.0, 4.0,
                                                                                        5.0, 6.0, 7.0, 8.0))
    whole = call()
    monkeypatch.setattr(blocks, "BLOCK_POINTS", 4)
    got = call()
    assert got.q_per_length.shape == (5, 9)
    _same(got, whole)


def test_warnings_stay_with_their_points(small_blocks):
    """Out-of-range bits set in some points of some blocks only come back at those points."""
    diameter = np.where(np.arange(30) % 11 == 4, 1e-5, 0.1)  # tiny wire: Ra below the Churchill-Chu range
    got = cl.bare_surface(surface_temperature=400.0, air_temperature=290.0, diameter=diameter)
    np.testing.assert_array_equal(got.warnings != 0, diameter < 1e-3)
