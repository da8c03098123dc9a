"""convlib.design: insulation sizing, critical thickness, annual energy, fittings.

Sizing is checked by consistency: the pipe is re-evaluated with
``convlib.insulated_pipe`` at the returned thickness and the limited quantity
must equal the limit (the sizing functions must invert the pipe model, whatever
that model's own accuracy). Outside references: the Magnus dew-point formula of
Alduchov & Eskridge (1996), doi:10.1175/1520-0450(1996)035<0601:IMFAOS>2.0.CO;2;
the critical radius r_cr = k/h (Incropera et al., Fundamentals of Heat and Mass
Transfer, 6th ed., section 3.3.1 and Example 3.5, from memory) and its
generalization derived below; the Stefan-Boltzmann constant (CODATA 2018, exact).
"""
import math

import numpy as np
import pytest

import convlib as cl
from convlib import Layer
from convlib import design

SIGMA = 5.670374419e-8  # W/m2/K4, CODATA 2018 (exact since the 2019 SI)

# A commercial list in inch steps (1/2 in ... 4 in), to check that any list is honoured; the values
# are the usual US pipe-insulation steps (common practice, no source).
INCH_LIST = (0.0127, 0.0191, 0.0254, 0.0381, 0.0508, 0.0635, 0.0762, 0.0889, 0.1016)


def _pipe(d, tf, t, k, *, outer=(), **kw):
    """The pipe with ``t`` of insulation ``k`` (plus fixed outer layers) through insulated_pipe."""
    return cl.insulated_pipe(d, tf, [Layer(t, k, name="insulation"), *outer], **kw)


def _smallest_at_least(steps, x):
    """Smallest entry of ``steps`` >= x, NaN if none (the rule the brief states)."""
    bigger = [s for s in sorted(steps) if s >= x]
    return bigger[0] if bigger else math.nan


def _magnus_dew_point(t_kelvin, rh):
    """Dew point over water [K], Magnus form with Alduchov & Eskridge (1996) constants (AERK).

    e_w = 6.1094 exp(17.625 t / (t + 243.04)) hPa, t in degC; their stated accuracy in
    -40..50 degC is a few 0.1 % of the vapour pressure, i.e. < 0.1 K in dew point.
    """
    t = t_kelvin - 273.15
    g = math.log(rh) + 17.625 * t / (243.04 + t)
    return 243.04 * g / (17.625 - g) + 273.15


def _magnus_frost_point(t_kelvin, rh):
    """Frost point [K]: vapour pressure rh * e_w(t) equal to e_i over ice (AERKi of the same paper).

    e_i = 6.1121 exp(22.587 t / (t + 273.86)) hPa.
    """
    t = t_kelvin - 273.15
    e = rh * 6.1094 * math.exp(17.625 * t / (t + 243.04))
    g = math.log(e / 6.1121)
    return 273.86 * g / (22.587 - g) + 273.15


# ----------------------------------------------------------------------------- touch temperature
TOUCH_CASES = [
    # d [m], tf [K], ta [K], k [W/m/K], limit [K], extra keyword arguments of both calls
    (0.1143, 523.15, 313.15, 0.05, design.TOUCH_LIMIT_METAL_JACKET, dict(jacket_emissivity=0.1)),
    (0.0603, 453.15, 308.15, 0.045, 328.15, dict(jacket_emissivity=0.9)),
    (0.2191, 623.15, 303.15, 0.06, design.TOUCH_LIMIT_NONMETAL_JACKET,
     dict(jacket_emissivity=0.3, wind_speed=1.0)),
    # outdoors in full sun, aluminium-like jacket (absorptivity differs from emissivity)
    (0.1683, 473.15, 308.15, 0.04, 333.15, dict(jacket_emissivity=0.1, solar_irradiance=800.0,
                                                solar_absorptivity=0.3, sky_view_fraction=0.5)),
]


@pytest.mark.parametrize("d, tf, ta, k, limit, kw", TOUCH_CASES)
@pytest.mark.parametrize("jacket", [(), (Layer(0.0007, 200.0, name="jacket"),)])
def test_touch_limit_is_met_exactly_and_at_the_commercial_thickness(d, tf, ta, k, limit, kw, jacket):
    r = design.thickness_for_surface_temperature(d, tf, air_temperature=ta, insulation_conductivity=k,
                                                 surface_limit=limit, outer_layers=jacket, **kw)
    assert bool(r.achievable) and r.messages == ()
    t = float(r.required_thickness)
    assert t > 0
    # the exact thickness puts the jacket at the limit
    at_exact = _pipe(d, tf, t, k, outer=jacket, air_temperature=ta, **kw)
    assert abs(float(at_exact.surface_temperature) - limit) < 1e-4
    # the commercial thickness is the smallest listed one at or above it, and meets the limit
    tc = float(r.commercial_thickness)
    assert tc == _smallest_at_least(design.COMMERCIAL_THICKNESSES, t)
    at_commercial = float(_pipe(d, tf, tc, k, outer=jacket, air_temperature=ta, **kw).surface_temperature)
    assert at_commercial <= limit + 1e-6  # 1e-6 K: the surface solver's tolerance
    assert float(r.value_at_commercial) == pytest.approx(at_commercial, abs=1e-5)
    # ... and the listed thickness below it does not
    below = [s for s in design.COMMERCIAL_THICKNESSES if s < tc]
    if below:
        assert float(_pipe(d, tf, below[-1], k, outer=jacket, air_temperature=ta, **kw).surface_temperature) > limit
    assert r.quantity.startswith("surface temperature")
    assert float(r.limit) == limit


def test_touch_caution_names_the_standards():
    r = design.thickness_for_surface_temperature(0.1143, 523.15, air_temperature=313.15,
                                                 insulation_conductivity=0.05)
    text = " ".join(r.cautions)
    assert "ISO 13732-1" in text and "ASTM C1055" in text


def test_custom_commercial_list_is_honoured():
    d, tf, ta, k = 0.1143, 523.15, 313.15, 0.05
    r = design.thickness_for_surface_temperature(d, tf, air_temperature=ta, insulation_conductivity=k,
                                                 jacket_emissivity=0.1, commercial_thicknesses=INCH_LIST[::-1])
    t, tc = float(r.required_thickness), float(r.commercial_thickness)
    assert tc == _smallest_at_least(INCH_LIST, t)
    assert tc in INCH_LIST
    assert float(_pipe(d, tf, tc, k, air_temperature=ta, jacket_emissivity=0.1).surface_temperature) <= 333.15


# ----------------------------------------------------------------------------- heat loss
HEAT_CASES = [
    # d, tf, ta, k, limit [W/m], kw
    (0.1143, 453.15, 293.15, 0.04, 60.0, dict(jacket_emissivity=0.9)),
    (0.0603, 423.15, 283.15, 0.035, 25.0, dict(jacket_emissivity=0.1, wind_speed=4.0)),
    (0.3239, 573.15, 273.15, 0.05, 150.0, dict(jacket_emissivity=0.2, wind_speed=8.0, sky_view_fraction=0.5)),
    # cold line: the limit applies to the heat gain (q' < 0)
    (0.1143, 253.15, 303.15, 0.03, 10.0, dict(jacket_emissivity=0.9)),
]


@pytest.mark.parametrize("d, tf, ta, k, limit, kw", HEAT_CASES)
def test_heat_loss_limit_is_met_exactly_and_at_the_commercial_thickness(d, tf, ta, k, limit, kw):
    r = design.thickness_for_heat_loss(d, tf, air_temperature=ta, insulation_conductivity=k,
                                       heat_loss_limit=limit, **kw)
    assert bool(r.achievable)
    t = float(r.required_thickness)
    q_exact = float(_pipe(d, tf, t, k, air_temperature=ta, **kw).q_per_length)
    assert abs(q_exact) == pytest.approx(limit, rel=1e-4)
    assert math.copysign(1.0, q_exact) == math.copysign(1.0, tf - ta)  # a loss for hot, a gain for cold lines
    tc = float(r.commercial_thickness)
    assert tc == _smallest_at_least(design.COMMERCIAL_THICKNESSES, t)
    q_commercial = abs(float(_pipe(d, tf, tc, k, air_temperature=ta, **kw).q_per_length))
    assert q_commercial <= limit * (1 + 1e-9)
    assert float(r.value_at_commercial) == pytest.approx(q_commercial, rel=1e-6)
    below = [s for s in design.COMMERCIAL_THICKNESSES if s < tc]
    if below:
        assert abs(float(_pipe(d, tf, below[-1], k, air_temperature=ta, **kw).q_per_length)) > limit


def test_impossible_heat_loss_limit_is_reported():
    # 600 K on a 0.5 m pipe cannot be brought to 20 W/m with at most 50 mm (brief)
    r = design.thickness_for_heat_loss(0.5, 600.0, air_temperature=293.15, insulation_conductivity=0.04,
                                       heat_loss_limit=20.0, max_thickness=0.05)
    assert not bool(r.achievable)
    assert np.isnan(r.required_thickness) and np.isnan(r.commercial_thickness)
    assert any("no thickness up to 50 mm" in m for m in r.messages)
    # the physics agrees: even 50 mm loses far more than 20 W/m
    assert float(_pipe(0.5, 600.0, 0.05, 0.04, air_temperature=293.15).q_per_length) > 20.0


def test_mixed_achievable_cases_are_reported_per_case():
    r = design.thickness_for_heat_loss(0.5, 600.0, air_temperature=293.15, insulation_conductivity=0.04,
                                       heat_loss_limit=[20.0, 400.0], max_thickness=0.05)
    assert r.achievable.tolist() == [False, True]
    assert np.isnan(r.required_thickness[0]) and np.isfinite(r.required_thickness[1])
    assert any("1 of 2 case(s)" in m for m in r.messages)
    q = float(_pipe(0.5, 600.0, float(r.required_thickness[1]), 0.04, air_temperature=293.15).q_per_length)
    assert q == pytest.approx(400.0, rel=1e-4)


def test_beyond_the_largest_listed_thickness():
    # needs more than 200 mm but less than the 300 mm search limit
    d, tf, ta, k = 0.1143, 523.15, 293.15, 0.04
    q_200 = float(_pipe(d, tf, 0.2, k, air_temperature=ta).q_per_length)
    q_300 = float(_pipe(d, tf, 0.3, k, air_temperature=ta).q_per_length)
    limit = 0.5 * (q_200 + q_300)
    r = design.thickness_for_heat_loss(d, tf, air_temperature=ta, insulation_conductivity=k, heat_loss_limit=limit)
    assert bool(r.achievable)
    assert 0.2 < float(r.required_thickness) < 0.3
    assert np.isnan(r.commercial_thickness)
    assert any("largest listed thickness" in m for m in r.messages)


# ----------------------------------------------------------------------------- condensation
COLD_CASES = [
    # d, tf, ta, rh, k, margin, emissivity
    (0.1683, 279.15, 303.15, 0.8, 0.035, design.CONDENSATION_MARGIN, 0.9),
    (0.0603, 268.15, 298.15, 0.7, 0.04, 2.0, 0.1),
    (0.2191, 258.15, 308.15, 0.85, 0.033, 1.0, 0.9),
]


@pytest.mark.parametrize("d, tf, ta, rh, k, margin, eps", COLD_CASES)
def test_condensation_limit_is_met_exactly_and_at_the_commercial_thickness(d, tf, ta, rh, k, margin, eps):
    r = design.thickness_against_condensation(d, tf, air_temperature=ta, relative_humidity=rh,
                                              insulation_conductivity=k, margin=margin, jacket_emissivity=eps)
    # the limit is the dew point (Magnus, Alduchov & Eskridge 1996; 0.2 K) plus the margin
    assert float(r.limit) == pytest.approx(_magnus_dew_point(ta, rh) + margin, abs=0.2)
    t = float(r.required_thickness)
    assert t > 0
    # still air, no sky, no sun: the function documents this worst case for a cold surface
    at_exact = _pipe(d, tf, t, k, air_temperature=ta, jacket_emissivity=eps)
    assert abs(float(at_exact.surface_temperature) - float(r.limit)) < 1e-4
    tc = float(r.commercial_thickness)
    assert tc == _smallest_at_least(design.COMMERCIAL_THICKNESSES, t)
    at_commercial = float(_pipe(d, tf, tc, k, air_temperature=ta, jacket_emissivity=eps).surface_temperature)
    assert at_commercial >= float(r.limit) - 1e-6
    below = [s for s in design.COMMERCIAL_THICKNESSES if s < tc]
    if below:
        assert float(_pipe(d, tf, below[-1], k, air_temperature=ta, jacket_emissivity=eps).surface_temperature) \
            < float(r.limit)
    assert "vapour retarder" in " ".join(r.cautions)


@pytest.mark.parametrize("ta_c, rh", [(20.0, 0.6), (30.0, 0.8), (25.0, 0.5), (35.0, 0.9), (10.0, 0.95),
                                       (40.0, 0.3), (15.0, 0.4)])
def test_dew_point_of_condensation_sizing_against_magnus(ta_c, rh):
    ta = ta_c + 273.15
    r = design.thickness_against_condensation(0.1, 263.15, air_temperature=ta, relative_humidity=rh,
                                              insulation_conductivity=0.04, margin=0.0)
    # Alduchov & Eskridge (1996), AERK; 0.2 K covers the formula's own error (< 0.1 K here)
    assert float(r.limit) == pytest.approx(_magnus_dew_point(ta, rh), abs=0.2)


@pytest.mark.parametrize("ta_c, rh", [(5.0, 0.5), (2.0, 0.7)])
def test_frost_point_below_zero_against_magnus_over_ice(ta_c, rh):
    # below 0 degC the vapour deposits as ice: the limit is the frost point (documented in dew_point)
    ta = ta_c + 273.15
    r = design.thickness_against_condensation(0.1, 243.15, air_temperature=ta, relative_humidity=rh,
                                              insulation_conductivity=0.04, margin=0.0)
    assert float(r.limit) < 273.15
    assert float(r.limit) == pytest.approx(_magnus_frost_point(ta, rh), abs=0.2)  # AERKi, same paper


def test_impossible_condensation_limit_is_reported():
    # -40 degC brine in humid air (dew point about 32 degC) with at most 10 mm of insulation
    r = design.thickness_against_condensation(0.1143, 233.15, air_temperature=308.15, relative_humidity=0.95,
                                              insulation_conductivity=0.04, max_thickness=0.01)
    assert not bool(r.achievable) and np.isnan(r.required_thickness) and np.isnan(r.commercial_thickness)
    assert any("no thickness up to 10 mm" in m for m in r.messages)
    assert float(_pipe(0.1143, 233.15, 0.01, 0.04, air_temperature=308.15).surface_temperature) < float(r.limit)


# ----------------------------------------------------------------------------- limits met by the bare pipe
def test_touch_limit_met_by_bare_pipe_needs_nothing():
    # a 47 degC line stays below the 60 degC metal-jacket touch limit without insulation
    r = design.thickness_for_surface_temperature(0.1, 320.0, air_temperature=293.15, insulation_conductivity=0.04)
    assert float(r.required_thickness) == 0.0 and float(r.commercial_thickness) == 0.0 and bool(r.achievable)


def test_condensation_limit_met_by_bare_pipe_needs_nothing():
    # a line at 27 degC in air at 30 degC, 50 % (dew point about 18.4 degC by Magnus): no condensation
    assert _magnus_dew_point(303.15, 0.5) + design.CONDENSATION_MARGIN < 300.0
    r = design.thickness_against_condensation(0.1, 300.0, air_temperature=303.15, relative_humidity=0.5,
                                              insulation_conductivity=0.04)
    assert float(r.required_thickness) == 0.0 and float(r.commercial_thickness) == 0.0 and bool(r.achievable)


def test_heat_loss_limit_met_by_bare_large_pipe_needs_nothing():
    d, tf, ta, k = 0.3, 450.0, 293.15, 0.04
    q_bare = float(cl.insulated_pipe(d, tf, [], air_temperature=ta).q_per_length)
    r = design.thickness_for_heat_loss(d, tf, air_temperature=ta, insulation_conductivity=k,
                                       heat_loss_limit=1.1 * q_bare)
    assert float(r.required_thickness) == 0.0 and float(r.commercial_thickness) == 0.0 and bool(r.achievable)


def test_heat_loss_limit_met_by_bare_small_tube_needs_nothing():
    d, tf, ta, k = 0.006, 353.15, 293.15, 0.2
    assert float(design.critical_thickness(d, tf, air_temperature=ta, insulation_conductivity=k)) > 0
    q_bare = float(cl.insulated_pipe(d, tf, [], air_temperature=ta).q_per_length)
    r = design.thickness_for_heat_loss(d, tf, air_temperature=ta, insulation_conductivity=k,
                                       heat_loss_limit=1.02 * q_bare)
    assert float(r.required_thickness) == 0.0 and float(r.commercial_thickness) == 0.0


def test_heat_loss_sizing_never_returns_a_thickness_that_raises_the_flow():
    # the same small tube with a limit below the bare flow: the answer lies beyond the critical thickness
    d, tf, ta, k = 0.006, 353.15, 293.15, 0.2
    q_bare = float(cl.insulated_pipe(d, tf, [], air_temperature=ta).q_per_length)
    t_cr = float(design.critical_thickness(d, tf, air_temperature=ta, insulation_conductivity=k))
    r = design.thickness_for_heat_loss(d, tf, air_temperature=ta, insulation_conductivity=k,
                                       heat_loss_limit=0.9 * q_bare)
    t = float(r.required_thickness)
    assert t > t_cr
    assert float(_pipe(d, tf, t, k, air_temperature=ta).q_per_length) == pytest.approx(0.9 * q_bare, rel=1e-4)
    assert any("critical thickness" in m for m in r.messages)


# ----------------------------------------------------------------------------- arrays
def test_touch_sizing_broadcasts_over_cases():
    d = np.array([0.0603, 0.1143, 0.2191])
    tf = np.array([[423.15], [523.15]])
    ta, k = 308.15, 0.045
    r = design.thickness_for_surface_temperature(d.tolist(), tf, air_temperature=ta, insulation_conductivity=k,
                                                 jacket_emissivity=0.1)
    for field in ("required_thickness", "commercial_thickness", "achievable", "value_at_commercial", "limit"):
        assert np.shape(getattr(r, field)) == (2, 3), field
    for i in range(2):
        for j in range(3):
            t = float(r.required_thickness[i, j])
            ts = float(_pipe(d[j], tf[i, 0], t, k, air_temperature=ta, jacket_emissivity=0.1).surface_temperature)
            assert abs(ts - design.TOUCH_LIMIT_METAL_JACKET) < 1e-4
            assert float(r.commercial_thickness[i, j]) == _smallest_at_least(design.COMMERCIAL_THICKNESSES, t)
    # the hotter line needs more insulation on every pipe
    assert np.all(r.required_thickness[1] > r.required_thickness[0])


def test_heat_loss_sizing_broadcasts_limits():
    d, tf, ta, k = 0.1143, 453.15, 293.15, 0.04
    limits = np.array([40.0, 60.0, 90.0])
    r = design.thickness_for_heat_loss(d, tf, air_temperature=ta, insulation_conductivity=k,
                                       heat_loss_limit=limits)
    assert r.required_thickness.shape == (3,)
    for t, limit in zip(r.required_thickness, limits, strict=True):
        assert float(_pipe(d, tf, float(t), k, air_temperature=ta).q_per_length) == pytest.approx(limit, rel=1e-4)
    assert np.all(np.diff(r.required_thickness) < 0)  # a looser limit needs less


def test_condensation_sizing_broadcasts_humidity():
    d, tf, ta, k = 0.1143, 275.15, 303.15, 0.035
    rh = np.array([[0.6], [0.75], [0.9]])
    r = design.thickness_against_condensation(d, tf, air_temperature=ta, relative_humidity=rh,
                                              insulation_conductivity=k)
    assert r.required_thickness.shape == (3, 1)
    for i in range(3):
        assert float(r.limit[i, 0]) == pytest.approx(_magnus_dew_point(ta, float(rh[i, 0])) + 1.0, abs=0.2)
        ts = float(_pipe(d, tf, float(r.required_thickness[i, 0]), k, air_temperature=ta).surface_temperature)
        assert abs(ts - float(r.limit[i, 0])) < 1e-4
    assert np.all(np.diff(r.required_thickness[:, 0]) > 0)  # more humid air needs more


# ----------------------------------------------------------------------------- critical thickness
def _radiation_only(d, tf, ta, k, eps):
    """Critical thickness and the pipe there with convection switched off (factor 1e-9): h does not depend on r."""
    kw = dict(air_temperature=ta, jacket_emissivity=eps, convection_factor=1e-9)
    t_cr = float(design.critical_thickness(d, tf, insulation_conductivity=k, **kw))
    return t_cr, _pipe(d, tf, t_cr, k, **kw)


def test_critical_radius_constant_h_textbook():
    # Incropera et al. 6th ed., Example 3.5 (from memory): k = 0.055 W/m/K, h = 5 W/m2/K,
    # tube radius 5 mm -> r_cr = k/h = 11 mm. A coefficient independent of the radius is made
    # here by radiation alone (linearized h_r = 4 eps sigma T^3 = 5 W/m2/K at the air temperature)
    # and a 1 K difference, over which h_r changes by 3 dT/T ~ 1 %.
    ta, k = 293.15, 0.055
    eps = 5.0 / (4 * SIGMA * ta**3)
    t_cr, r = _radiation_only(0.010, ta + 1.0, ta, k, eps)
    ts = float(r.surface_temperature)
    h = eps * SIGMA * (ts**2 + ta**2) * (ts + ta)  # grey-body secant coefficient, by hand
    assert 0.005 + t_cr == pytest.approx(k / h, rel=0.01)
    assert 0.005 + t_cr == pytest.approx(0.011, rel=0.015)  # the textbook answer; h at Ts is ~0.5 % above 5


def test_critical_radius_with_temperature_dependent_radiation_exactly():
    # With q'' = g(Ts) independent of r, maximizing q' = 2 pi k (Tf - Ts) / ln(r/ri) = 2 pi r g(Ts)
    # gives r_cr = k / g'(Ts) (derivation: see test_critical_radius_first_order_condition with g_r = 0);
    # for grey radiation to surroundings at Ta, g' = 4 eps sigma Ts^3 (by hand).
    ta, k, eps = 293.15, 0.055, 0.9
    t_cr, r = _radiation_only(0.010, ta + 30.0, ta, k, eps)
    ts = float(r.surface_temperature)
    assert 0.005 + t_cr == pytest.approx(k / (4 * eps * SIGMA * ts**3), rel=2e-4)  # xatol 1e-7 m on ~4 mm


CRITICAL_CASES = [
    # d, tf, ta, k, eps: small tubes under poor insulators, where a critical radius exists
    (0.006, 353.15, 293.15, 0.2, 0.9),
    (0.02, 373.15, 293.15, 0.5, 0.9),
    (0.01, 330.0, 293.15, 0.3, 0.1),
]


@pytest.mark.parametrize("d, tf, ta, k, eps", CRITICAL_CASES)
def test_critical_thickness_is_a_maximum_of_the_flow(d, tf, ta, k, eps):
    t_cr = float(design.critical_thickness(d, tf, air_temperature=ta, insulation_conductivity=k,
                                           jacket_emissivity=eps))
    assert t_cr > 0

    def q(t):
        return float(_pipe(d, tf, t, k, air_temperature=ta, jacket_emissivity=eps).q_per_length)

    q_cr = q(t_cr)
    for factor in (0.9, 0.99, 1.01, 1.1):
        assert q_cr >= q(factor * t_cr)
    assert q_cr > q(0.0)  # insulating the bare tube up to t_cr raises the loss


@pytest.mark.parametrize("d, tf, ta, k, eps", CRITICAL_CASES)
def test_critical_radius_first_order_condition(d, tf, ta, k, eps):
    """dq'/dr = 0 at r_cr, written with the outer flux g(r, Ts) = q''(Ts) of a bare cylinder of radius r.

    Inside: q' = 2 pi k (Tf - Ts) / ln(r/ri); outside: q' = 2 pi r g(r, Ts). Differentiating both
    along the solution and eliminating dTs/dr gives (derived for this test)

        r_cr = k / (g_T - k g_r / g)

    with g_T = dg/dTs and g_r = dg/dr. For constant h (g = h (Ts - Ta)) this is k/h (Incropera).
    The derivatives are central differences of convlib.bare_surface; the tolerance 1e-4 covers
    the differences (1e-3 K, 1e-6 r) and the solvers (1e-6 K, 1e-7 m).
    """
    t_cr = float(design.critical_thickness(d, tf, air_temperature=ta, insulation_conductivity=k,
                                           jacket_emissivity=eps))
    r_cr = 0.5 * d + t_cr
    ts = float(_pipe(d, tf, t_cr, k, air_temperature=ta, jacket_emissivity=eps).surface_temperature)

    def g(temperature, radius):
        return float(cl.bare_surface(surface_temperature=temperature, air_temperature=ta, diameter=2 * radius,
                                     emissivity=eps).q_per_area)

    dt, dr = 1e-3, 1e-6 * r_cr
    g0 = g(ts, r_cr)
    g_t = (g(ts + dt, r_cr) - g(ts - dt, r_cr)) / (2 * dt)
    g_r = (g(ts, r_cr + dr) - g(ts, r_cr - dr)) / (2 * dr)
    assert r_cr == pytest.approx(k / (g_t - k * g_r / g0), rel=1e-4)


@pytest.mark.parametrize("d, tf, ta, k, eps", CRITICAL_CASES)
def test_critical_radius_band_around_k_over_h(d, tf, ta, k, eps):
    """r_cr / (k / (h_conv + h_rad)) lies in [0.55, 1.0].

    From r_cr = k / (g_T - k g_r / g): laminar natural convection has h_c ~ (dT / D)^(1/4)
    (Nu ~ Ra^(1/4)), so g_T = 1.25 h_c + 4 eps sigma Ts^3 lies between h and about 1.3 h, and
    -k g_r / g = -h_c / (4 h) (r_cr h / k); hence r_cr h / k = (1 - h_c / (4 h)) / (g_T / h), between
    0.75 / 1.3 = 0.58 and 1. The band [0.55, 1.0] is that range, with a little room for the Churchill-Chu
    exponent, which is below 1/4 at low Ra.
    """
    t_cr = float(design.critical_thickness(d, tf, air_temperature=ta, insulation_conductivity=k,
                                           jacket_emissivity=eps))
    r = _pipe(d, tf, t_cr, k, air_temperature=ta, jacket_emissivity=eps)
    h = float(r.h_convection + r.h_radiation)
    assert 0.55 <= (0.5 * d + t_cr) / (k / h) <= 1.0


def test_no_critical_thickness_for_a_large_pipe_with_good_insulation():
    # r = 150 mm and 57 mm are far above k/h ~ 0.04 / 10 = 4 mm: any insulation lowers the loss
    # (insulation_conductivity is one material, a scalar; the pipes broadcast)
    good = design.critical_thickness([0.3, 0.1143, 0.006], [[450.0], [350.0]], air_temperature=293.15,
                                     insulation_conductivity=0.04)
    assert good.shape == (2, 3)
    assert np.all(good[:, :2] == 0.0)
    poor = design.critical_thickness([0.3, 0.006], 450.0, air_temperature=293.15, insulation_conductivity=0.2)
    assert poor[0] == 0.0 and poor[1] > 0  # the 6 mm tube under k = 0.2 has one (r_o = 3 mm < k/h)


# ----------------------------------------------------------------------------- annual energy
BINS = design.WeatherBins([268.15, 283.15, 298.15], [4.0, 3.0, 2.0], [2000.0, 4000.0, 2760.0])


def _hand_heat_kwh(d, tf, layers, bins, length, **kw):
    """Sum over bins of q'(bin) [W/m] x hours [h] x length [m] / 1000, one insulated_pipe call per bin."""
    total = 0.0
    for ta, wind, hours in zip(bins.air_temperature, bins.wind_speed, bins.hours, strict=True):
        q = float(cl.insulated_pipe(d, tf, layers, air_temperature=float(ta), wind_speed=float(wind),
                                    **kw).q_per_length)
        total += q * hours * length / 1000.0
    return total


def test_annual_energy_hot_line_equals_hand_sum():
    layers = [Layer(0.04, 0.04)]
    e = design.annual_energy(0.0603, 343.15, layers, bins=BINS, length=100.0, energy_price=0.08,
                             heating_efficiency=0.85, co2_per_kwh=0.2, jacket_emissivity=0.3)
    heat = _hand_heat_kwh(0.0603, 343.15, layers, BINS, 100.0, jacket_emissivity=0.3)
    assert heat > 0
    assert float(e.heat_kwh) == pytest.approx(heat, rel=1e-9)
    assert float(e.purchased_kwh) == pytest.approx(heat / 0.85, rel=1e-9)   # fuel = heat / efficiency
    assert float(e.cost) == pytest.approx(heat / 0.85 * 0.08, rel=1e-9)
    assert float(e.co2_kg) == pytest.approx(heat / 0.85 * 0.2, rel=1e-9)
    assert e.q_per_length_by_bin.shape == (3,)


def test_annual_energy_cold_line_gain_over_cop():
    layers = [Layer(0.03, 0.035)]
    e = design.annual_energy(0.1143, 278.15, layers, bins=BINS, length=50.0, energy_price=0.2, cooling_cop=3.5,
                             co2_per_kwh=0.4)
    gain = _hand_heat_kwh(0.1143, 278.15, layers, BINS, 50.0)
    assert gain < 0  # a chilled line gains heat in every bin above 5 degC; the 268.15 K bin loses a little
    assert float(e.heat_kwh) == pytest.approx(gain, rel=1e-9)
    assert float(e.purchased_kwh) == pytest.approx(-gain / 3.5, rel=1e-9)   # electricity = |gain| / COP
    assert float(e.cost) == pytest.approx(-gain / 3.5 * 0.2, rel=1e-9)
    assert float(e.co2_kg) == pytest.approx(-gain / 3.5 * 0.4, rel=1e-9)


def test_annual_energy_single_bin():
    layers = [Layer(0.05, 0.04)]
    bins = design.WeatherBins.single(283.15, wind_speed=2.0, hours=8760.0)
    e = design.annual_energy(0.1143, 453.15, layers, bins=bins, length=10.0)
    q = float(cl.insulated_pipe(0.1143, 453.15, layers, air_temperature=283.15, wind_speed=2.0).q_per_length)
    assert float(e.heat_kwh) == pytest.approx(q * 8760.0 * 10.0 / 1000.0, rel=1e-9)
    assert float(e.cost) == 0.0 and float(e.co2_kg) == 0.0  # no price, no factor given


def test_annual_energy_broadcasts_cases():
    layers = [Layer(0.04, 0.04)]
    d = np.array([0.0603, 0.1143])
    e = design.annual_energy(d, 343.15, layers, bins=BINS, length=100.0)
    assert e.heat_kwh.shape == (2,) and e.q_per_length_by_bin.shape == (2, 3)
    for i in range(2):
        assert float(e.heat_kwh[i]) == pytest.approx(_hand_heat_kwh(d[i], 343.15, layers, BINS, 100.0), rel=1e-9)


def test_weather_bins_validation():
    with pytest.raises(ValueError, match="8784"):
        design.WeatherBins([280.0, 290.0], [1.0, 2.0], [5000.0, 4000.0])   # 9000 h > a leap year
    design.WeatherBins([280.0, 290.0], [1.0, 2.0], [5000.0, 3784.0])       # exactly 8784 h: accepted
    with pytest.raises(ValueError, match="bin hours"):
        design.WeatherBins([280.0], [1.0], [-1.0])
    with pytest.raises(ValueError, match="bin wind_speed"):
        design.WeatherBins([280.0], [-2.0], [100.0])
    with pytest.raises(ValueError, match="bin air_temperature"):
        design.WeatherBins([0.0], [1.0], [100.0])
    b = design.WeatherBins([280.0, 290.0, 300.0], 2.0, 1000.0)  # scalars broadcast over the bins
    assert b.wind_speed.tolist() == [2.0, 2.0, 2.0] and b.hours.tolist() == [1000.0] * 3


# ----------------------------------------------------------------------------- fittings
def test_equivalent_length_counts_times_factors():
    table = design.FITTING_EQUIVALENT_LENGTH
    got = float(design.equivalent_length(40.0, {"valve": 2, "flange_pair": 4, "support": 10}))
    assert got == pytest.approx(40.0 + 2 * table["valve"] + 4 * table["flange_pair"] + 10 * table["support"])
    # a site's own factors replace the table
    assert float(design.equivalent_length(40.0, {"valve": 3}, factors={"valve": 2.0})) == 46.0
    assert float(design.equivalent_length(40.0)) == 40.0
    np.testing.assert_allclose(design.equivalent_length([10.0, 20.0], {"elbow": [1, 2]}),
                               [10.0 + table["elbow"], 20.0 + 2 * table["elbow"]])


def test_equivalent_length_unknown_fitting_lists_choices():
    with pytest.raises(ValueError) as info:
        design.equivalent_length(40.0, {"gate": 1})
    message = str(info.value)
    assert "'gate'" in message
    for name in design.FITTING_EQUIVALENT_LENGTH:
        assert name in message
    with pytest.raises(ValueError, match="number of valve"):
        design.equivalent_length(40.0, {"valve": -1})
