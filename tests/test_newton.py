"""The safeguarded Newton iteration (convlib.roots.newton_decreasing) and the lean outer flux it is fed
(convlib.flux.FluxSlope).

The root finder is checked against closed-form roots and SciPy's brentq (a general-purpose reference,
R. P. Brent (1973), *Algorithms for Minimization without Derivatives*, ch. 4); the lean flux against the
library's full exchange (the numbers must be the same: the solver's residual is that flux) and its slope
against hand derivatives: grey radiation d/dT (eps sigma T^4) = 4 eps sigma T^3, a given coefficient h
(slope h), and the Churchill & Chu (1975) law differentiated by hand with the properties held.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.optimize import brentq

from convlib import Layer, insulated_pipe
from convlib.correlations import methods
from convlib.flux import FluxSlope
from convlib.geometry import SHAPES
from convlib.properties import air
from convlib.radiation import STEFAN_BOLTZMANN
from convlib.roots import newton_decreasing
from convlib.surface import GRAVITY, OuterSurface

# ----------------------------------------------------------------------------- the iteration

cases = st.lists(st.tuples(st.floats(-1e3, 1e3), st.floats(1e-3, 1e3), st.floats(1e-3, 1e3),
                           st.floats(1e-3, 1e2), st.floats(0.0, 1e2), st.floats(-0.3, 0.6)),
                 min_size=1, max_size=20)


@settings(deadline=None)
@given(cases=cases, start=st.floats(0.0, 1.0))
def test_newton_meets_the_tolerance_with_an_approximate_slope(cases, start):
    # f = -(a (x - c) + b (x - c)^3): falls through its one root c; the slope handed over is off by up to
    # -30 %..+60 % (as a slope with the properties held is), which costs iterations, never the tolerance.
    c, below, above, a, b, error = (np.array(v) for v in zip(*cases))

    def f(x, c_, a_, b_, e_):
        u = x - c_
        return -(a_ * u + b_ * u ** 3), -(a_ + 3.0 * b_ * u ** 2) * (1.0 + e_)

    lo, hi = c - below, c + above
    r = newton_decreasing(f, lo, hi, lo + start * (hi - lo), args=(c, a, b, error), xatol=1e-9)
    assert r.success.all()
    assert np.all(np.abs(r.x - c) <= 1e-9 + 4.0 * np.spacing(np.abs(c)))


def test_newton_agrees_with_brentq():
    # x exp(x) = k (Lambert W): roots by brentq (SciPy) to 1e-14
    k = np.array([0.1, 1.0, 5.0, 50.0])
    r = newton_decreasing(lambda x, k_: (k_ - x * np.exp(x), -(1.0 + x) * np.exp(x)), 0.0, 5.0, 2.5, args=(k,),
                          xatol=1e-12)
    expected = [brentq(lambda x: kk - x * math.exp(x), 0.0, 5.0, xtol=1e-14) for kk in k]
    assert r.success.all()
    np.testing.assert_allclose(r.x, expected, atol=1e-12, rtol=0)


def test_root_beyond_an_end_or_a_nan_fails_and_says_so():
    # root at 2 outside [0, 1]: the iteration reaches the end 1, sees the sign and gives up (no wrong root)
    r = newton_decreasing(lambda x: (2.0 - x, -np.ones_like(x)), 0.0, 1.0, 0.5, xatol=1e-9)
    assert not r.success and float(r.x) == 1.0
    r = newton_decreasing(lambda x: (np.full_like(x, np.nan), -np.ones_like(x)), 0.0, 1.0, 0.5, xatol=1e-9)
    assert not r.success
    # a wrong-signed slope falls back to bisection and still converges
    r = newton_decreasing(lambda x: (1.0 - x, np.ones_like(x)), 0.0, 3.0, 2.9, xatol=1e-10)
    assert r.success and abs(float(r.x) - 1.0) <= 1e-10


# ----------------------------------------------------------------------------- the lean flux


def _point_sets():
    rng = np.random.default_rng(11)
    n = 400
    yield dict(air_temperature=rng.uniform(240, 320, n), wind_speed=np.where(rng.random(n) < 0.3, 0.0,
                                                                             rng.uniform(0, 15, n)),
               emissivity=rng.uniform(0.05, 0.95, n), sky_view_fraction=rng.uniform(0, 1, n)), rng, n


@pytest.mark.parametrize("shape", sorted(SHAPES))
def test_lean_flux_is_the_exchange_flux_for_every_law(shape):
    info = SHAPES[shape]
    sizes = {name: 0.3 for name in info.sizes}
    compared = 0
    for keywords, rng, n in _point_sets():
        ts = keywords["air_temperature"] + rng.uniform(-60, 300, n)
        for natural in methods(info.natural_geometry):
            for forced in methods(info.forced_geometry):
                for direction in (("transverse", "assisting", "opposing") if shape != "horizontal_cylinder"
                                  else ("transverse",)):
                    try:
                        outer = OuterSurface.build(shape, natural=natural, forced=forced, flow_direction=direction,
                                                   **sizes, **keywords)
                    except ValueError:
                        continue  # a law not offered for the cold face of this shape
                    expected = outer.exchange(ts, flux_only=True)
                    q, slope = FluxSlope(outer, outer.point_fields())(ts, outer.point_fields())
                    np.testing.assert_allclose(q, expected, rtol=1e-12, atol=1e-9)
                    assert np.all(np.isfinite(slope))
                    compared += 1
    assert compared >= len(methods(info.natural_geometry)) * len(methods(info.forced_geometry))


def test_slope_of_radiation_and_of_a_given_coefficient_by_hand():
    ts, ta, eps = np.array([250.0, 320.0, 600.0]), 293.15, 0.8
    outer = OuterSurface.build("horizontal_cylinder", diameter=0.1, length=1.0, air_temperature=ta, emissivity=eps,
                               convection_coefficient=7.5)
    _, slope = FluxSlope(outer, outer.point_fields())(ts, outer.point_fields())
    np.testing.assert_allclose(slope, 7.5 + 4 * eps * STEFAN_BOLTZMANN * ts ** 3, rtol=1e-12)


def test_slope_of_churchill_chu_by_hand_with_properties_held():
    # Churchill & Chu (1975), Int. J. Heat Mass Transfer 18:1049, eq. 4 (horizontal cylinder):
    # Nu = (0.60 + 0.387 Ra^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27))^2; with the properties held at the film,
    # d(h dT)/dTs = h + (k/D) Ra dNu/dRa, Ra dNu/dRa = 2 sqrt(Nu) * 0.387 Ra^(1/6) / 6 / [...]^(8/27).
    d, ta, ts = 0.2, 293.15, np.array([313.15, 393.15, 273.15])
    outer = OuterSurface.build("horizontal_cylinder", diameter=d, length=1.0, air_temperature=ta, emissivity=0.0)
    q, slope = FluxSlope(outer, outer.point_fields())(ts, outer.point_fields())
    p = air(0.5 * (ts + ta))
    ra = GRAVITY * (1 / p.T) * np.abs(ts - ta) * d ** 3 / (p.nu * p.alpha)
    shape = (1 + (0.559 / p.pr) ** (9 / 16)) ** (8 / 27)
    nu = (0.60 + 0.387 * ra ** (1 / 6) / shape) ** 2
    h = nu * p.k / d
    np.testing.assert_allclose(q, h * (ts - ta), rtol=1e-9)
    expected = h + p.k / d * 2 * np.sqrt(nu) * 0.387 * ra ** (1 / 6) / 6 / shape
    np.testing.assert_allclose(slope, expected, rtol=1e-5)  # forward difference on Ra, step 1e-7


def test_newton_solve_agrees_with_brentq_on_insulated_lines():
    # the surface balance of a bare-cylinder law solved point by point by brentq (SciPy) on the library's
    # own outer exchange, against the Newton solve of insulated_pipe: the same root within the tolerance
    rng = np.random.default_rng(5)
    n = 60
    d, tf, ta = rng.uniform(0.02, 0.6, n), rng.uniform(200, 700, n), rng.uniform(240, 315, n)
    wind, eps, t, k = rng.uniform(0, 12, n), rng.uniform(0.05, 0.95, n), rng.uniform(0.01, 0.15, n), 0.04
    wind[::5] = 0.0
    r = insulated_pipe(d, tf, [Layer(t, k)], air_temperature=ta, wind_speed=wind, jacket_emissivity=eps,
                       sky_view_fraction=0.5, tolerance=1e-9)
    for i in range(n):
        do = d[i] + 2 * t[i]
        outer = OuterSurface.build("horizontal_cylinder", diameter=do, length=1.0, air_temperature=ta[i],
                                   wind_speed=wind[i], emissivity=eps[i], sky_view_fraction=0.5)
        resistance = math.log(do / d[i]) / (2 * math.pi * k)
        balance = lambda s: (tf[i] - s) / resistance - math.pi * do * float(outer.exchange(np.array(s),  # noqa
                                                                                           flux_only=True))
        lo, hi = min(tf[i], ta[i], float(outer.sky_temperature)) - 1, max(tf[i], ta[i]) + 1
        assert float(r.surface_temperature[i]) == pytest.approx(brentq(balance, lo, hi, xtol=1e-11), abs=1e-8)


def test_a_linear_balance_is_solved_in_two_evaluations_to_rounding(monkeypatch):
    # Given outer coefficient, no radiation: the balance is linear in Ts, the first Newton step lands on the
    # root and the second evaluation confirms it (a step lost in rounding at the bracket's end once sent the
    # iteration to bisection). Hand value: series resistance of layer and film, Incropera et al., 6th ed.,
    # eq. 3.32.
    d, t, k, h, tm = 0.0603, 0.025, 0.04, 12.0, 278.15
    r1, r2 = d / 2, d / 2 + t
    resistance = math.log(r2 / r1) / (2 * math.pi * k) + 1.0 / (h * 2 * math.pi * r2)
    ta = np.array([260.0, 270.0, 275.0, 278.0])
    counted = []

    def counting(f, *args, **kwargs):
        result = newton_decreasing(f, *args, **kwargs)
        counted.append(result.iterations)
        return result

    monkeypatch.setattr("convlib.wall.newton_decreasing", counting)
    r = insulated_pipe(d, tm, [Layer(t, k)], air_temperature=ta, jacket_emissivity=0.0, convection_coefficient=h)
    np.testing.assert_allclose(r.q_per_length, (tm - ta) / resistance, rtol=1e-12)
    assert counted and np.all(counted[0] <= 2)


@pytest.mark.parametrize("options", [dict(exact_properties=True), dict(pressure=np.array([60e3, 80e3, 101325.0])),
                                     dict(fluid="Nitrogen"), dict(pressure=79500.0)])
def test_lean_flux_off_the_shipped_table_is_still_the_exchange_flux(options):
    # exact properties, several pressures (no single table: the general property path), another gas, another
    # single pressure (a table built from CoolProp)
    ts = np.array([250.0, 330.0, 480.0])
    outer = OuterSurface.build("horizontal_cylinder", diameter=0.1, length=1.0, air_temperature=290.0,
                               wind_speed=np.array([0.0, 1.5, 6.0]), emissivity=0.6, **options)
    q, slope = FluxSlope(outer, outer.point_fields())(ts, outer.point_fields())
    np.testing.assert_allclose(q, outer.exchange(ts, flux_only=True), rtol=1e-12)
    assert np.all(slope > 0)
