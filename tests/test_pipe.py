"""convlib.insulated_pipe checked against independent solvers, textbooks and standards.

Reference model used throughout: conduction through cylindrical shells in
series, q' = (T_f - T_s) / sum ln(r2/r1) / (2 pi k)  (Incropera et al.,
Fundamentals of Heat and Mass Transfer, 6th ed., eq. 3.27-3.33, from memory),
and the outer surface solved per point with ``scipy.optimize.brentq``.
"""
import math

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI
from ht.conduction import R_cylinder
from ht.conv_external import Nu_cylinder_Churchill_Bernstein
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
from scipy.optimize import brentq, minimize_scalar

import convlib as cl
from convlib import Conductivity, Layer
from convlib.regimes import Flag

G = 9.80665  # standard gravity [m/s2], 3rd CGPM (1901), exact
SIGMA = 5.670374419e-8  # Stefan-Boltzmann [W/m2/K4], CODATA 2018 (exact since SI 2019)
K_JACKET = 50.0  # W/m/K, steel-like jacket (brief)


def _shell(r1, r2, k):
    """ln(r2/r1)/(2 pi k) [K m/W]; conduction resistance of a cylindrical shell per metre."""
    return math.log(r2 / r1) / (2 * math.pi * k)


def _random_cases(n, seed):
    """Seeded cases, one dict of floats each."""
    rng = np.random.default_rng(seed)
    columns = {
        "d": rng.uniform(0.02, 0.6, n), "tf": rng.uniform(250.0, 600.0, n), "ta": rng.uniform(250.0, 315.0, n),
        "wind": np.where(rng.random(n) < 0.25, 0.0, rng.uniform(0.0, 10.0, n)), "eps": rng.uniform(0.05, 0.95, n),
        "F": np.where(np.arange(n) % 2 == 0, 0.0, 0.5), "k_ins": rng.uniform(0.02, 0.1, n),
        "t_ins": rng.uniform(0.01, 0.15, n), "t_jac": rng.uniform(0.5e-3, 1e-3, n)}
    return [{key: float(value[i]) for key, value in columns.items()} for i in range(n)]


def _pipe(p, **kw):
    """One case through insulated_pipe (a Layer's conductivity is a scalar, so one call per case)."""
    return cl.insulated_pipe(p["d"], p["tf"], [Layer(p["t_ins"], p["k_ins"]),
                                               Layer(p["t_jac"], K_JACKET, name="jacket")],
                             air_temperature=p["ta"], wind_speed=p["wind"], jacket_emissivity=p["eps"],
                             sky_view_fraction=p["F"], **kw)


def _reference_surface(p, q_out, xtol):
    """brentq on the outer balance (T_f - T_s)/sum R_shell = q_out(T_s) [W/m] of one case."""
    r1 = p["d"] / 2
    r2 = r1 + p["t_ins"]
    r3 = r2 + p["t_jac"]
    resistance = _shell(r1, r2, p["k_ins"]) + _shell(r2, r3, K_JACKET)
    t_sky = 0.0552 * p["ta"] ** 1.5 if p["F"] > 0 else p["ta"]  # Swinbank (1963), Q.J.R. Meteorol. Soc. 89:339
    # every candidate surface temperature lies between the fluid, air and sky temperatures
    low, high = min(p["tf"], p["ta"], t_sky) - 1.0, max(p["tf"], p["ta"], t_sky) + 1.0
    return brentq(lambda ts: (p["tf"] - ts) / resistance - q_out(ts, p, 2 * r3), low, high, xtol=xtol, rtol=1e-15)


def _convlib_q_out(ts, p, diameter):
    return float(cl.bare_surface(surface_temperature=ts, air_temperature=p["ta"], diameter=diameter, length=1.0,
                                 wind_speed=p["wind"], emissivity=p["eps"], sky_view_fraction=p["F"]).q_per_length)


def _independent_q_out(ts, ta, D, wind, eps, F, p=101325.0):
    """Outer q' [W/m] without convlib: CoolProp at film temperature, ht correlations, Churchill mixing."""
    t_film = 0.5 * (ts + ta)
    rho, mu, k, cp = (PropsSI(key, "T", t_film, "P", p, "Air") for key in ("D", "V", "L", "C"))
    nu, pr = mu / rho, cp * mu / k
    gr = G * (1.0 / t_film) * abs(ts - ta) * D ** 3 / nu ** 2  # ideal gas beta = 1/T (common practice)
    h_nat = Nu_horizontal_cylinder_Churchill_Chu(pr, gr) * k / D
    h = h_nat
    if wind > 0:  # Churchill (1977), AIChE J. 23:10, exponent 4 for transverse flow round a cylinder
        h_frc = Nu_cylinder_Churchill_Bernstein(wind * D / nu, pr) * k / D
        h = (h_frc ** 4 + h_nat ** 4) ** 0.25
    t_sky = 0.0552 * ta ** 1.5  # Swinbank (1963)
    q_rad = eps * SIGMA * (F * (ts ** 4 - t_sky ** 4) + (1 - F) * (ts ** 4 - ta ** 4))
    return math.pi * D * (h * (ts - ta) + q_rad)


# ---------------------------------------------------------------- 1. independent scalar solvers
def test_surface_temperature_matches_scalar_brentq_with_convlib_outer_surface():
    """300 seeded cases: brentq on q'_cond(Ts) = bare_surface(Ts).q_per_length (same table properties).

    insulated_pipe solves to 1e-6 K; allowed 2e-6 K. Measured: max 2.4e-7 K.
    """
    errors = []
    for p in _random_cases(300, seed=20240601):
        result = _pipe(p)
        assert result.converged
        errors.append(float(result.surface_temperature) - _reference_surface(p, _convlib_q_out, xtol=1e-11))
    assert np.max(np.abs(errors)) < 2e-6


def test_surface_temperature_matches_fully_independent_model():
    """30 cases, reference with exact CoolProp properties; convlib with its default tables.

    Allowed 0.02 K (table interpolation < 0.05 % on properties). Measured: 4e-5 K.
    """
    def q_out(ts, p, diameter):
        return _independent_q_out(ts, p["ta"], diameter, p["wind"], p["eps"], p["F"])

    errors = [float(_pipe(p).surface_temperature) - _reference_surface(p, q_out, xtol=1e-9)
              for p in _random_cases(30, seed=7)]
    assert np.max(np.abs(errors)) < 0.02


# ---------------------------------------------------------------- 2. conduction pieces, energy balance
@pytest.mark.parametrize("d_in, d_out, k", [(0.05, 0.055, 80.0), (0.1143, 0.2143, 0.045), (0.6, 0.602, 50.0)])
def test_shell_resistance_matches_ht(d_in, d_out, k):
    # ht.conduction.R_cylinder (Bell, ht) for a 1 m shell, K/W == K m/W per metre
    assert _shell(d_in / 2, d_out / 2, k) == pytest.approx(R_cylinder(d_in, d_out, k, 1.0), rel=1e-14)


def test_energy_balance_through_every_layer():
    """q' through film, wall and insulation from interface_temperatures equals q_per_length (1e-6 rel).

    The thin jacket's drop (about 1 mK) is compared in kelvin instead: its outer
    face is the solved surface, accurate to the solver tolerance, so its relative
    flux error is tolerance / drop (measured up to 3 % at 1e-6 K; 6e-6 K absolute).
    """
    wall, h_in, k_wall = 0.004, 1000.0, 45.0
    for p in _random_cases(40, seed=3):
        d = p["d"]
        r = _pipe(p, pipe_wall_thickness=wall, pipe_conductivity=k_wall, inner_coefficient=h_in)
        assert r.interface_names == ("pipe inner surface", "pipe outer surface", "insulation outer surface",
                                     "jacket outer surface")
        T, q = r.interface_temperatures, float(r.q_per_length)
        radii = [d / 2 - wall, d / 2, d / 2 + p["t_ins"], d / 2 + p["t_ins"] + p["t_jac"]]
        q_film = (p["tf"] - T[0]) * math.pi * (d - 2 * wall) * h_in
        q_wall = (T[0] - T[1]) / _shell(radii[0], radii[1], k_wall)
        q_ins = (T[1] - T[2]) / _shell(radii[1], radii[2], p["k_ins"])
        for flux in (q_film, q_wall, q_ins):
            assert flux == pytest.approx(q, rel=1e-6)
        assert T[2] - T[3] == pytest.approx(q * _shell(radii[2], radii[3], K_JACKET), abs=1e-5)
        assert T[3] == r.surface_temperature


# ---------------------------------------------------------------- 3. textbook examples
def test_cengel_insulated_steam_pipe():
    """Cengel & Ghajar, Heat and Mass Transfer, example "Heat loss through an insulated steam pipe" (from memory):
    steam 320 degC, h1 = 60; cast iron D1/D2 = 5/5.5 cm, k = 80; 3 cm glass wool k = 0.05;
    air 5 degC, given h2 = 18 W/m2K. Book: R = 0.106 + 0.0002 + 2.35 + 0.154 = 2.61 K/W,
    Q = 121 W per metre, drop 0.02 K over the pipe and 284 K over the insulation.
    """
    r_in, r_pipe = 1 / (60 * math.pi * 0.05), R_cylinder(0.05, 0.055, 80.0, 1.0)
    r_ins, r_out = R_cylinder(0.055, 0.115, 0.05, 1.0), 1 / (18 * math.pi * 0.115)
    q_book = (320 - 5) / (r_in + r_pipe + r_ins + r_out)  # hand calculation with the book's constant h2
    assert q_book == pytest.approx(121, abs=0.5)  # book rounds to 3 figures
    assert q_book * r_pipe == pytest.approx(0.02, abs=0.005)
    assert q_book * r_ins == pytest.approx(284, abs=0.5)
    # convlib cannot take a fixed outer h; its inside network must equal the book's resistances
    r = cl.insulated_pipe(0.055, 593.15, [Layer(0.03, 0.05, name="glass wool")], air_temperature=278.15,
                          jacket_emissivity=0.9, pipe_wall_thickness=0.0025, pipe_conductivity=80.0,
                          inner_coefficient=60.0)
    T, q = r.interface_temperatures, float(r.q_per_length)
    assert (593.15 - float(r.surface_temperature)) / q == pytest.approx(0.106 + 0.0002 + 2.35, rel=3e-3)
    assert (T[0] - T[1]) / q == pytest.approx(r_pipe, rel=1e-6)
    assert (593.15 - T[0]) / q == pytest.approx(0.106, rel=1e-2)  # book's 3 figures
    # Outer film is only 6 % of the book's total resistance, so convlib's correlation h
    # (natural + radiation, lower than the assumed 18) may move q by a few per cent only.
    assert q == pytest.approx(121, rel=0.08)


def test_critical_radius_constant_h_hand_calculation():
    """Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., Example 3.5 (from memory):
    refrigerant tube r_i = 5 mm, insulation k = 0.055, h = 5 W/m2K -> r_cr = k/h = 0.011 m,
    where the total resistance per metre is least."""
    k, h, ri = 0.055, 5.0, 0.005

    def total(ro):
        return R_cylinder(2 * ri, 2 * ro, k, 1.0) + 1 / (h * 2 * math.pi * ro)

    best = minimize_scalar(total, bounds=(ri, 0.05), method="bounded", options={"xatol": 1e-9})
    assert best.x == pytest.approx(k / h, rel=1e-5)
    assert k / h == pytest.approx(0.011, rel=1e-12)


def test_critical_radius_of_small_tube_with_variable_h():
    """A 1/4 in tube (OD 6.35 mm) at 50 degC, k = 0.08, eps = 0.05, still air at 20 degC:
    q' rises with insulation to a maximum, then falls (the critical-radius effect).

    Textbook r_cr = k/h assumes constant h; here h falls as the diameter grows
    (h_c ~ D^-1/4 or faster at low Ra) and as the surface cools, which moves the
    maximum inwards: r_max = (k/h)(1 + r dh/dr / h) along the curve. Accepted band
    0.45 .. 1.0 of k/h (measured 0.56). The maximum itself is compared with the
    independent model (CoolProp + ht) maximised by scipy: within 1 %.
    """
    d, tf, ta, k, eps = 0.00635, 323.15, 293.15, 0.08, 0.05
    thickness = np.linspace(0.0, 0.02, 2001)
    r = cl.insulated_pipe(d, tf, [Layer(thickness, k)], air_temperature=ta, jacket_emissivity=eps)
    i = int(np.argmax(r.q_per_length))
    assert 0 < i < thickness.size - 1
    assert r.q_per_length[i] > 1.02 * r.q_per_length[0]
    assert r.q_per_length[-1] < r.q_per_length[i]
    r_max = d / 2 + thickness[i]
    h = r.h_convection[i] + r.h_radiation[i]
    assert 0.45 * k / h < r_max < 1.0 * k / h

    def q_independent(ro):
        resistance = _shell(d / 2, ro, k)
        return (tf - brentq(lambda t: (tf - t) / resistance - _independent_q_out(t, ta, 2 * ro, 0.0, eps, 0.0),
                            ta - 1.0, tf + 1.0, xtol=1e-10)) / resistance

    best = minimize_scalar(lambda ro: -q_independent(ro), bounds=(d / 2 + 1e-4, 0.02), method="bounded",
                           options={"xatol": 1e-6})
    assert r_max == pytest.approx(best.x, rel=0.01)  # grid step 0.01 mm = 0.2 %; measured 0.1 %
    assert r.q_per_length[i] == pytest.approx(-best.fun, rel=1e-4)  # table vs exact properties; measured 6e-7


# ---------------------------------------------------------------- 4. cold lines, bare pipe, film and wall
@pytest.mark.parametrize("wind", [0.0, 3.0])
def test_cold_line_gains_heat(wind):
    r = cl.insulated_pipe(0.0603, 258.15, [Layer(0.04, 0.035, name="foam"), Layer(0.0008, K_JACKET, name="jacket")],
                          air_temperature=303.15, wind_speed=wind, jacket_emissivity=0.6,
                          pipe_wall_thickness=0.00391, pipe_conductivity=45.0, inner_coefficient=500.0)
    assert r.q_per_length < 0
    assert 258.15 < r.surface_temperature < 303.15
    T = np.concatenate([[258.15], r.interface_temperatures])
    assert np.all(np.diff(T) > 0)  # warmer outwards
    assert r.interface_temperatures[-1] == r.surface_temperature


def test_bare_pipe_surface_is_fluid_temperature():
    kw = {"air_temperature": 293.15, "wind_speed": 2.0, "jacket_emissivity": 0.8, "sky_view_fraction": 0.5}
    r = cl.insulated_pipe(0.1143, 453.15, [], **kw)
    assert r.surface_temperature == 453.15
    assert r.interface_names == ("pipe outer surface",)
    bare = cl.bare_surface(surface_temperature=453.15, diameter=0.1143, length=1.0, air_temperature=293.15,
                           wind_speed=2.0, emissivity=0.8, sky_view_fraction=0.5)
    assert float(r.q_per_length) == pytest.approx(float(bare.q_per_length), rel=1e-12)
    empty = cl.insulated_pipe(0.1143, 453.15, [Layer(0.0, 0.04), Layer(0.0, K_JACKET, name="jacket")], **kw)
    assert empty.surface_temperature == 453.15


@pytest.mark.parametrize("k_insulation", [0.04, Conductivity.polynomial([0.02, 1e-4], valid_range=(250, 700))])
def test_zero_thickness_layer_equals_no_layer(k_insulation):
    kw = {"air_temperature": 293.15, "jacket_emissivity": 0.3, "wind_speed": 1.0}
    one = cl.insulated_pipe(0.1143, 453.15, [Layer(0.05, k_insulation)], **kw)
    two = cl.insulated_pipe(0.1143, 453.15, [Layer(0.05, k_insulation), Layer(0.0, 0.5, name="coat")], **kw)
    assert float(two.surface_temperature) == pytest.approx(float(one.surface_temperature), abs=2e-6)
    assert float(two.q_per_length) == pytest.approx(float(one.q_per_length), rel=1e-6)


def test_huge_film_coefficient_and_wall_conductivity_reproduce_plain_pipe():
    kw = {"air_temperature": 293.15, "jacket_emissivity": 0.3, "wind_speed": 1.0}
    plain = cl.insulated_pipe(0.1143, 453.15, [Layer(0.05, 0.045)], **kw)
    ideal = cl.insulated_pipe(0.1143, 453.15, [Layer(0.05, 0.045)], inner_coefficient=1e12,
                              pipe_wall_thickness=0.006, pipe_conductivity=1e12, **kw)
    assert ideal.interface_names == ("pipe inner surface", "pipe outer surface", "insulation outer surface")
    assert float(ideal.surface_temperature) == pytest.approx(float(plain.surface_temperature), abs=3e-6)
    np.testing.assert_allclose(ideal.interface_temperatures[:2], 453.15, atol=1e-6)
    film = cl.insulated_pipe(0.1143, 453.15, [Layer(0.05, 0.045)], inner_coefficient=20.0, **kw)
    assert film.interface_names == ("pipe inner surface", "insulation outer surface")
    assert 453.15 > film.interface_temperatures[0] > film.surface_temperature


# ---------------------------------------------------------------- 5. temperature-dependent conductivity
D4, TF, TA = 0.1143, 573.15, 293.15


def _one_layer(k, thickness, tf=TF, **kw):
    r = cl.insulated_pipe(D4, tf, [Layer(thickness, k)], air_temperature=TA, jacket_emissivity=0.3, **kw)
    t1, t2 = r.interface_temperatures
    return r, float(t1), float(t2), math.log((D4 / 2 + thickness) / (D4 / 2))


@pytest.mark.parametrize("thickness", [0.01, 0.05, 0.15])
def test_linear_true_k_is_k_at_mean_temperature(thickness):
    """Kirchhoff: the integral mean of a linear k(T) is k at the mean temperature (identity).
    Tolerance 1e-6: convlib interpolates the integral of k on a 0.25 K grid (error <= k' h^2/8).
    Measured 4e-8."""
    c0, c1 = 0.03, 1e-4
    r, t1, t2, ln = _one_layer(Conductivity.polynomial([c0, c1], form="true", valid_range=(250, 700)), thickness)
    expected = 2 * math.pi * (c0 + c1 * (t1 + t2) / 2) * (t1 - t2) / ln
    assert float(r.q_per_length) == pytest.approx(expected, rel=1e-6)


@pytest.mark.parametrize("thickness", [0.01, 0.05, 0.15])
def test_quadratic_true_k_uses_exact_integral_mean(thickness):
    c = (0.02, 5e-5, 2e-7)
    r, t1, t2, ln = _one_layer(Conductivity.polynomial(c, form="true", valid_range=(250, 700)), thickness)
    def U(T):  # antiderivative of k, by hand
        return c[0] * T + c[1] * T ** 2 / 2 + c[2] * T ** 3 / 3

    expected = 2 * math.pi * (U(t1) - U(t2)) / ln
    assert float(r.q_per_length) == pytest.approx(expected, rel=1e-6)  # measured 1.4e-7


MINERAL_WOOL = ([311, 366, 422, 478, 533], [0.036, 0.045, 0.056, 0.069, 0.084])  # typical shape, no source


def _table_integral(table, t_low, t_high):
    """int_{t_low}^{t_high} k dT of a table, linear between points and held at its ends (exact, by hand:
    the trapezoid is exact on each linear piece)."""
    t, k = table
    nodes = sorted({t_low, t_high, *[x for x in t if t_low < x < t_high]})
    values = np.interp(nodes, t, k)
    return float(np.sum(0.5 * (values[1:] + values[:-1]) * np.diff(nodes)))


@pytest.mark.parametrize("thickness", [0.025, 0.05, 0.1])
def test_mean_form_table_is_integrated_over_the_layer(thickness):
    """Mean-form (apparent) data are integrated like k(T) since issue 12 item 6 (ASTM C680/C1045 practice,
    from memory): q' = 2 pi int_{T2}^{T1} k dT / ln(r2/r1) with the hand integral of the table."""
    k = Conductivity.table(*MINERAL_WOOL, form="mean")
    r, t1, t2, ln = _one_layer(k, thickness, tf=473.15)
    expected = 2 * math.pi * _table_integral(MINERAL_WOOL, t2, t1) / ln
    assert float(r.q_per_length) == pytest.approx(expected, rel=1e-8)
    # faces outside the table's 311..533 K are held at the end value and flagged
    extrapolated = bool(r.warnings & Flag.CONDUCTIVITY_EXTRAPOLATED)
    assert extrapolated == (float(r.surface_temperature) < 311.0)


@pytest.mark.parametrize("table, thickness, wind, eps", [
    (MINERAL_WOOL, 0.05, 5.0, 0.1), (([250, 400, 600], [0.03, 0.05, 0.09]), 0.15, 0.0, 0.3)])
def test_mean_form_table_converges_for_ordinary_hot_line(table, thickness, wind, eps):
    """NPS 4 at 300 degC with apparent-k insulation (mean form): ordinary cases.
    Expected from an explicit hand balance: q'(Ts) = 2 pi int_{Ts}^{Tf} k dT / ln(r2/r1).
    Regression: at commit 26a6c5f both raised "outer surface temperature could not be found"
    (mean-form Newton in Conductivity.temperature_after diverged at the k_max bracket end)."""
    k = Conductivity.table(*table, form="mean")
    ro = D4 / 2 + thickness
    ln = math.log(ro / (D4 / 2))

    def balance(ts):
        q_in = 2 * math.pi * _table_integral(table, ts, TF) / ln
        return q_in - float(cl.bare_surface(surface_temperature=ts, air_temperature=TA, diameter=2 * ro, length=1.0,
                                            wind_speed=wind, emissivity=eps).q_per_length)

    expected = brentq(balance, TA, TF, xtol=1e-10)
    r = cl.insulated_pipe(D4, TF, [Layer(thickness, k)], air_temperature=TA, wind_speed=wind, jacket_emissivity=eps)
    assert float(r.surface_temperature) == pytest.approx(expected, abs=2e-6)


def test_two_variable_layers_share_interface_and_carry_same_flow():
    k1 = Conductivity.polynomial([0.03, 1e-4], form="true", valid_range=(250, 700))
    table = ([250, 400, 600], [0.03, 0.05, 0.09])
    k2 = Conductivity.table(*table, form="mean")
    t1, t2 = 0.04, 0.05
    r = cl.insulated_pipe(D4, TF, [Layer(t1, k1, name="inner"), Layer(t2, k2, name="outer")],
                          air_temperature=TA, jacket_emissivity=0.3, wind_speed=3.0)
    assert r.interface_names == ("pipe outer surface", "inner outer surface", "outer outer surface")
    T = r.interface_temperatures
    radii = [D4 / 2, D4 / 2 + t1, D4 / 2 + t1 + t2]
    q1 = 2 * math.pi * (0.03 + 1e-4 * (T[0] + T[1]) / 2) * (T[0] - T[1]) / math.log(radii[1] / radii[0])
    q2 = 2 * math.pi * _table_integral(table, float(T[2]), float(T[1])) / math.log(radii[2] / radii[1])
    assert TF > T[1] > T[2]  # the single shared interface lies between the faces
    assert float(q1) == pytest.approx(float(r.q_per_length), rel=1e-6)
    assert float(q2) == pytest.approx(float(r.q_per_length), rel=1e-6)


# ---------------------------------------------------------------- 6. broadcasting
def test_thickness_by_wind_broadcasts_to_2d():
    thickness = np.array([0.0, 0.02, 0.05, 0.1])[:, None]
    wind = np.array([0.0, 0.5, 2.0, 5.0, 10.0])
    r = cl.insulated_pipe(0.1143, 453.15, [Layer(thickness, 0.045), Layer(0.0008, K_JACKET, name="jacket")],
                          air_temperature=293.15, wind_speed=wind, jacket_emissivity=0.2, sky_view_fraction=0.5)
    for name, value in r.as_dict().items():
        if isinstance(value, np.ndarray) and name != "interface_temperatures":
            assert value.shape == (4, 5), name
            if value.dtype.kind == "f":
                assert not np.isnan(value).any(), name
    assert r.interface_temperatures.shape == (3, 4, 5)
    assert r.converged.all()
    one = cl.insulated_pipe(0.1143, 453.15, [Layer(0.05, 0.045), Layer(0.0008, K_JACKET, name="jacket")],
                            air_temperature=293.15, wind_speed=2.0, jacket_emissivity=0.2, sky_view_fraction=0.5)
    assert r.surface_temperature[2, 2] == pytest.approx(float(one.surface_temperature), abs=2e-6)
    assert np.all(np.diff(r.q_per_length, axis=1) > 0)  # more wind, more loss (common practice, no source)


# ---------------------------------------------------------------- 7. bad input
@pytest.mark.parametrize("kwargs, match", [
    ({"pipe_outer_diameter": 0.0}, "pipe_outer_diameter"),
    ({"pipe_wall_thickness": 0.06, "pipe_conductivity": 50.0}, "pipe_wall_thickness"),
    ({"pipe_wall_thickness": 0.005}, "pipe_conductivity"),
    ({"pipe_conductivity": 50.0}, "pipe_wall_thickness"),
    ({"layers": [(0.05, 0.04)]}, "Layer"),
    ({"natural": "no_such_law"}, "no_such_law.*churchill_chu"),
    ({"inner_coefficient": -1.0}, "inner_coefficient"),
])
def test_bad_input_raises_naming_the_field(kwargs, match):
    args = {"pipe_outer_diameter": 0.12, "fluid_temperature": 400.0, "air_temperature": 290.0,
            "layers": [Layer(0.05, 0.04)]}
    args.update(kwargs)
    with pytest.raises(ValueError, match=match):
        cl.insulated_pipe(**args)


def test_negative_thickness_raises_naming_the_layer():
    with pytest.raises(ValueError, match="jacket thickness"):
        Layer(-0.001, 50.0, name="jacket")


# ---------------------------------------------------------------- 8. standard pipe sizes
@pytest.mark.parametrize("nps, schedule, od_mm, wall_mm", [
    # ASME B36.10M-2004, Table 1 (from memory)
    (2, "40", 60.3, 3.91), (4, "40", 114.3, 6.02), (6, "80", 168.3, 10.97), (0.5, "80", 21.3, 3.73),
    (1, "40", 33.4, 3.38), (2, "80", 60.3, 5.54), (8, "40", 219.1, 8.18), (12, "STD", 323.8, 9.53),
])
def test_nominal_pipe_matches_asme_b36_10m(nps, schedule, od_mm, wall_mm):
    p = cl.nominal_pipe(nps, schedule)
    assert p.outer_diameter == pytest.approx(od_mm / 1000, abs=1e-6)
    assert p.wall_thickness == pytest.approx(wall_mm / 1000, abs=1e-6)
    assert p.inner_diameter == pytest.approx(p.outer_diameter - 2 * p.wall_thickness, abs=1e-9)


def test_nominal_pipe_unknown_size_or_schedule():
    with pytest.raises(ValueError, match="nearest: 4, 5"):
        cl.nominal_pipe(4.3, "40")
    with pytest.raises(ValueError, match="choose one of: .*40.*STD"):
        cl.nominal_pipe(4, "41")


def test_textbook_insulated_steam_pipe_with_given_coefficients():
    # Cengel, Heat and Mass Transfer, Ch. 3 example "Heat loss through an insulated steam pipe" (from memory):
    # steam at 320 C in a cast-iron pipe (k = 80 W/m/K), D = 5 / 5.5 cm, 3 cm of glass wool (k = 0.05), air and
    # surroundings at 5 C, h = 60 W/m2/K inside, combined h = 18 W/m2/K outside. Book: 121 W per metre, drops of
    # 0.02 C across the pipe wall and 284 C across the insulation (its resistances rounded to 3 figures).
    r = cl.insulated_pipe(0.055, 593.15, [Layer(0.03, 0.05)], air_temperature=278.15, pipe_wall_thickness=0.0025,
                          pipe_conductivity=80.0, inner_coefficient=60.0, convection_coefficient=18.0,
                          jacket_emissivity=0.0)
    assert float(r.q_per_length) == pytest.approx(121.0, rel=0.005)
    inner, pipe_outer, insulation_outer = r.interface_temperatures
    assert float(inner - pipe_outer) == pytest.approx(0.02, abs=0.005)
    assert float(pipe_outer - insulation_outer) == pytest.approx(284.0, abs=1.0)
    assert r.interface_names == ("pipe inner surface", "pipe outer surface", "insulation outer surface")
