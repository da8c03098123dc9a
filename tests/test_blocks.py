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
