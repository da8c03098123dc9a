"""Tests of convlib.radiation against published equations, worked examples and ``ht``.

``ht`` (Caleb Bell, PyPI) uses the CODATA 2014 Stefan-Boltzmann constant
5.670367e-8 (``ht.radiation.sigma``); convlib uses the exact 2019-SI value.  Where
we compare with ``ht.radiation.q_rad`` its result is rescaled by the ratio of the two
constants, so the comparison checks the equation, not the constant.
"""
import math

import numpy as np
import pytest
from ht.radiation import q_rad as ht_q_rad
from ht.radiation import sigma as ht_sigma

from convlib.radiation import (
    SKY_MODELS,
    SKY_VIEW_FRACTION_TYPICAL,
    STEFAN_BOLTZMANN,
    outdoor_radiation,
    radiation_coefficient,
    radiation_flux,
    sky_temperature,
    solar_gain,
)

SIGMA_RATIO = STEFAN_BOLTZMANN / ht_sigma


def ht_flux(emissivity, surface_temperature, surroundings_temperature):
    """ht.radiation.q_rad with convlib's Stefan-Boltzmann constant."""
    return ht_q_rad(emissivity, surface_temperature, surroundings_temperature) * SIGMA_RATIO


@pytest.fixture
def rng():
    return np.random.default_rng(20240601)


def test_stefan_boltzmann_from_exact_si_constants():
    # SI brochure 9th ed. (2019): h, k, c exact; sigma = 2 pi^5 k^4 / (15 h^3 c^2)
    h, k, c = 6.62607015e-34, 1.380649e-23, 299792458.0
    sigma = 2.0 * math.pi**5 * k**4 / (15.0 * h**3 * c**2)
    # CODATA 2018 rounds sigma to 10 significant digits: 5.670374419e-8
    assert STEFAN_BOLTZMANN == pytest.approx(sigma, rel=1e-10)


def test_flux_matches_ht_q_rad_on_random_arrays(rng):
    ts = rng.uniform(200.0, 900.0, 200)
    tsur = rng.uniform(200.0, 900.0, 200)
    eps = rng.uniform(0.0, 1.0, 200)
    expected = ht_flux(eps, ts, tsur)  # ht.radiation.q_rad: eps*sigma*(T^4 - T2^4)
    # ht subtracts the fourth powers directly, so its rounding error scales with
    # eps*sigma*max(T)^4, not with the (possibly small) difference: atol accounts for it.
    scale = eps * STEFAN_BOLTZMANN * np.maximum(ts, tsur) ** 4
    got = radiation_flux(ts, tsur, eps)
    assert np.all(np.abs(got - expected) <= 1e-12 * np.abs(expected) + 1e-13 * scale)
    assert np.sign(got[ts > tsur]).min() == 1 and np.sign(got[ts < tsur]).max() == -1


@pytest.mark.parametrize("ts, tsur", [(453.15, 293.15), (278.15, 303.15), (1000.0, 250.0),
                                      (300.0, 300.0 + 1e-9)])
def test_coefficient_times_difference_equals_flux(ts, tsur):
    # Definition of the radiation coefficient, Bergman et al. (2011) 7th ed., Sec. 1.2.3:
    # q = h_r (Ts - Tsur) with h_r = eps sigma (Ts + Tsur)(Ts^2 + Tsur^2), exact identity
    eps = 0.85
    h = radiation_coefficient(ts, tsur, eps)
    assert h * (ts - tsur) == pytest.approx(radiation_flux(ts, tsur, eps), rel=1e-13, abs=1e-18)
    assert h == pytest.approx(eps * STEFAN_BOLTZMANN * (ts + tsur) * (ts**2 + tsur**2), rel=1e-14)


def test_coefficient_at_equal_temperatures_is_4_eps_sigma_t3():
    # d/dT (eps sigma T^4) = 4 eps sigma T^3 (calculus)
    assert radiation_coefficient(350.0, 350.0, 0.7) == pytest.approx(
        4 * 0.7 * STEFAN_BOLTZMANN * 350.0**3, rel=1e-14)


def test_incropera_uninsulated_steam_pipe():
    # Incropera/Bergman, Fundamentals of Heat and Mass Transfer (6th ed. 2007), Example 1.2:
    # D = 70 mm, Ts = 200 degC, walls 25 degC, eps = 0.8 -> q'_rad = 421 W/m  # from memory
    # (the book uses sigma = 5.67e-8 and rounds to 3 digits: tolerance 1 W/m)
    q_per_length = radiation_flux(473.15, 298.15, 0.8) * math.pi * 0.070
    assert q_per_length == pytest.approx(421.0, abs=1.0)


@pytest.mark.parametrize("air", [253.15, 273.15, 293.15, 313.15])
def test_swinbank_formula(air):
    # Swinbank (1963), Q. J. R. Meteorol. Soc. 89:339, in the form T_sky = 0.0552 T_a^1.5
    # (Duffie & Beckman, Solar Engineering of Thermal Processes)
    expected = 0.0552 * air * math.sqrt(air)
    assert sky_temperature(air) == pytest.approx(expected, rel=1e-14)
    assert sky_temperature(air, model="swinbank") == pytest.approx(expected, rel=1e-14)


def test_swinbank_clear_sky_depression_at_20_celsius():
    # Hand computation: sqrt(293.15) = 17.12162, x 293.15 = 5019.2, x 0.0552 = 277.06 K,
    # i.e. the clear sky is about 16.1 K colder than 20 degC air (not ~9 K).
    t_sky = sky_temperature(293.15)
    assert t_sky == pytest.approx(277.06, abs=0.01)
    assert 293.15 - t_sky == pytest.approx(16.09, abs=0.01)


def test_swinbank_coefficient_consistent_with_his_radiation_law():
    # Swinbank (1963): clear-sky downward long-wave R = 5.31e-14 T^6 mW/cm2
    # = 5.31e-13 T^6 W/m2  # from memory.  The 0.0552 coefficient is (5.31e-13/sigma)^(1/4)
    # rounded, so the two forms agree to well under 1 %.
    air = np.array([263.15, 283.15, 303.15])
    from_radiation_law = (5.31e-13 * air**6 / STEFAN_BOLTZMANN) ** 0.25
    np.testing.assert_allclose(sky_temperature(air), from_radiation_law, rtol=5e-3)


def test_berdahl_martin_dew_point_10c_air_20c():
    # Berdahl & Martin (1984), Solar Energy 32:663, eps_sky = 0.711 + 0.56 (t/100) + 0.73 (t/100)^2
    # t_dp = 10 degC: 0.711 + 0.056 + 0.0073 = 0.7743
    eps_sky = 0.711 + 0.56 * 0.10 + 0.73 * 0.10**2
    assert eps_sky == pytest.approx(0.7743, abs=1e-12)
    t_sky = sky_temperature(293.15, dew_point=283.15, model="berdahl_martin")
    assert (t_sky / 293.15) ** 4 == pytest.approx(0.7743, rel=1e-12)
    assert t_sky == pytest.approx(0.7743**0.25 * 293.15, rel=1e-12)


def test_berdahl_martin_broadcasts_over_dew_points():
    # Same published constants, dew points -20, 0, +20 degC by hand
    dew_c = np.array([-20.0, 0.0, 20.0])
    eps = 0.711 + 0.56 * dew_c / 100 + 0.73 * (dew_c / 100) ** 2  # 0.6282, 0.711, 0.8522
    np.testing.assert_allclose(eps, [0.6282, 0.711, 0.8522], rtol=1e-12)
    got = sky_temperature(298.15, dew_point=dew_c + 273.15, model="berdahl_martin")
    np.testing.assert_allclose(got, eps**0.25 * 298.15, rtol=1e-12)
    assert got.shape == (3,)


def test_berdahl_martin_needs_dew_point():
    with pytest.raises(ValueError, match="dew_point"):
        sky_temperature(293.15, model="berdahl_martin")


def test_dew_point_above_air_rejected():
    with pytest.raises(ValueError, match="dew_point"):
        sky_temperature([290.0, 300.0], dew_point=295.0, model="berdahl_martin")


def test_unknown_sky_model_lists_choices():
    with pytest.raises(ValueError) as info:
        sky_temperature(293.15, model="brunt")
    assert "brunt" in str(info.value)
    for name in SKY_MODELS:
        assert name in str(info.value)


@pytest.mark.parametrize("model", sorted(SKY_MODELS))
def test_every_sky_model_dispatches_to_its_function(model):
    air = np.array([263.15, 288.15, 303.15])
    dew = air - 8.0
    got = sky_temperature(air, dew_point=dew, model=model)
    np.testing.assert_array_equal(got, SKY_MODELS[model](air, dew))
    # clear skies are colder than the air at these conditions
    assert np.all(got < air) and np.all(got > 0.8 * air)


def test_outdoor_all_sky_equals_enclosure_flux(rng):
    ts = rng.uniform(250.0, 500.0, 50)
    ta = rng.uniform(250.0, 320.0, 50)
    tsur = rng.uniform(200.0, 300.0, 50)
    h, q = outdoor_radiation(ts, ta, 0.9, sky_view_fraction=1.0, sky_temperature=tsur)
    np.testing.assert_allclose(q, radiation_flux(ts, tsur, 0.9), rtol=1e-13)
    np.testing.assert_allclose(h * (ts - ta), q, rtol=1e-12)


def test_outdoor_all_ground_at_air_equals_radiation_coefficient():
    ts = np.array([253.15, 293.15, 373.15, 573.15])
    ta = 293.15
    h, q = outdoor_radiation(ts, ta, 0.8, sky_view_fraction=0.0)
    np.testing.assert_allclose(h, radiation_coefficient(ts, ta, 0.8), rtol=1e-12)
    np.testing.assert_allclose(q, radiation_flux(ts, ta, 0.8), rtol=1e-13, atol=1e-12)


def test_outdoor_flux_matches_ht_mixture(rng):
    # q = F q_rad(eps, Ts, Tsky) + (1 - F) q_rad(eps, Ts, Tg), each term ht.radiation.q_rad
    n = 100
    ts, ta = rng.uniform(250.0, 600.0, n), rng.uniform(250.0, 320.0, n)
    t_sky, t_ground = rng.uniform(200.0, 300.0, n), rng.uniform(250.0, 330.0, n)
    eps, f = rng.uniform(0.0, 1.0, n), rng.uniform(0.0, 1.0, n)
    expected = f * ht_flux(eps, ts, t_sky) + (1 - f) * ht_flux(eps, ts, t_ground)
    _, q = outdoor_radiation(ts, ta, eps, sky_view_fraction=f, sky_temperature=t_sky,
                             ground_temperature=t_ground)
    scale = eps * STEFAN_BOLTZMANN * np.maximum.reduce([ts, t_sky, t_ground]) ** 4
    assert np.all(np.abs(q - expected) <= 1e-12 * np.abs(expected) + 1e-13 * scale)


def test_outdoor_default_sky_is_swinbank_and_ground_is_air():
    ts, ta = 330.0, 285.0
    _, q = outdoor_radiation(ts, ta, 0.9, sky_view_fraction=0.3)
    t_sky = 0.0552 * ta**1.5  # Swinbank (1963) as above
    expected = 0.3 * ht_flux(0.9, ts, t_sky) + 0.7 * ht_flux(0.9, ts, ta)
    assert q == pytest.approx(expected, rel=1e-12)


def test_outdoor_at_air_temperature_returns_finite_linearised_coefficient():
    # Documented choice: at Ts == Ta, h = dq/dTs = 4 eps sigma Ta^3
    ta = np.array([263.15, 293.15, 313.15])
    h, q = outdoor_radiation(ta, ta, 0.9)
    assert np.all(np.isfinite(h))
    np.testing.assert_allclose(h, 4 * 0.9 * STEFAN_BOLTZMANN * ta**3, rtol=1e-14)
    assert np.all(q > 0)  # still losing to the cold sky


def test_outdoor_coefficient_at_air_is_the_limit_when_surroundings_at_air():
    # With sky = ground = air, q/(Ts - Ta) is continuous; a central difference of
    # q(Ts) built from ht.radiation.q_rad approaches 4 eps sigma Ta^3.
    ta, eps, dt = 290.0, 0.6, 1e-3
    limit = (ht_flux(eps, ta + dt, ta) - ht_flux(eps, ta - dt, ta)) / (2 * dt)
    h, _ = outdoor_radiation(ta, ta, eps, sky_temperature=ta)
    assert h == pytest.approx(limit, rel=1e-6)


def test_typical_sky_view_fractions():
    # Values from common practice, no source (stated in the module)
    assert SKY_VIEW_FRACTION_TYPICAL["horizontal_plate_up"] == 1.0
    assert SKY_VIEW_FRACTION_TYPICAL["horizontal_plate_down"] == 0.0
    for shape in ("horizontal_cylinder", "vertical_cylinder", "vertical_plate", "sphere"):
        assert SKY_VIEW_FRACTION_TYPICAL[shape] == 0.5
    fractions = np.array(list(SKY_VIEW_FRACTION_TYPICAL.values()))
    h, q = outdoor_radiation(330.0, 290.0, 0.9, sky_view_fraction=fractions)
    assert h.shape == q.shape == fractions.shape and np.all(np.isfinite(h))
    # more sky -> more loss (sky is colder than the ground at air temperature)
    order = np.argsort(fractions)
    assert np.all(np.diff(q[order]) >= 0)


def test_solar_gain():
    # alpha_s G A_proj by hand: 0.3 x 800 x 0.1143 = 27.432 W
    assert solar_gain(0.3, 800.0, 0.1143) == pytest.approx(27.432, rel=1e-14)
    assert solar_gain(0.9, 0.0, 1.0) == 0.0


@pytest.mark.parametrize("call, field", [
    (lambda: radiation_flux(400.0, 300.0, 1.2), "emissivity"),
    (lambda: radiation_flux(400.0, 300.0, -0.01), "emissivity"),
    (lambda: radiation_flux(0.0, 300.0, 0.5), "surface_temperature"),
    (lambda: radiation_flux(400.0, -3.0, 0.5), "surroundings_temperature"),
    (lambda: radiation_flux(np.nan, 300.0, 0.5), "surface_temperature"),
    (lambda: radiation_coefficient(400.0, np.inf, 0.5), "surroundings_temperature"),
    (lambda: radiation_coefficient([400.0, 1.5], 300.0, [0.5, 2.0]), "emissivity"),
    (lambda: sky_temperature(-1.0), "air_temperature"),
    (lambda: sky_temperature(290.0, dew_point=0.0, model="berdahl_martin"), "dew_point"),
    (lambda: outdoor_radiation(400.0, 290.0, 0.9, sky_view_fraction=1.1), "sky_view_fraction"),
    (lambda: outdoor_radiation(400.0, 290.0, 0.9, sky_temperature=0.0), "sky_temperature"),
    (lambda: outdoor_radiation(400.0, 290.0, 0.9, ground_temperature=np.nan), "ground_temperature"),
    (lambda: outdoor_radiation(400.0, 0.0, 0.9), "air_temperature"),
    (lambda: solar_gain(1.1, 800.0, 1.0), "absorptivity"),
    (lambda: solar_gain(0.5, -1.0, 1.0), "irradiance"),
    (lambda: solar_gain(0.5, 800.0, 0.0), "projected_area"),
])
def test_invalid_inputs_name_the_field(call, field):
    with pytest.raises(ValueError, match=field):
        call()


@pytest.mark.parametrize("function, args", [
    (radiation_flux, ([350.0, 400.0, 450.0], 293.15, [0.1, 0.5, 0.9])),
    (radiation_coefficient, ([350.0, 400.0, 450.0], 293.15, [0.1, 0.5, 0.9])),
    (sky_temperature, ([263.15, 283.15, 303.15],)),
    (solar_gain, ([0.1, 0.5, 0.9], 800.0, [0.1, 0.2, 0.3])),
])
def test_scalar_list_and_ndarray_agree(function, args):
    as_list = function(*args)
    as_array = function(*(np.asarray(a) for a in args))
    assert isinstance(as_list, np.ndarray) and as_list.shape == (3,)
    np.testing.assert_array_equal(as_list, as_array)
    for i in range(3):  # each scalar call gives the matching element, as a 0-d value
        scalar_args = [a[i] if isinstance(a, list) else a for a in args]
        value = function(*scalar_args)
        assert np.ndim(value) == 0
        assert value == as_array[i]


def test_outdoor_broadcasts_and_scalar_list_ndarray_agree():
    ts = [[300.0], [350.0]]  # (2, 1) against (3,) -> (2, 3)
    fractions = [0.0, 0.5, 1.0]
    h, q = outdoor_radiation(ts, 290.0, 0.9, sky_view_fraction=fractions)
    assert h.shape == q.shape == (2, 3)
    h2, q2 = outdoor_radiation(np.array(ts), 290.0, 0.9, sky_view_fraction=np.array(fractions))
    np.testing.assert_array_equal(q, q2)
    np.testing.assert_array_equal(h, h2)
    hs, qs = outdoor_radiation(350.0, 290.0, 0.9, sky_view_fraction=0.5)
    assert np.ndim(hs) == np.ndim(qs) == 0
    assert qs == q[1, 1] and hs == h[1, 1]

