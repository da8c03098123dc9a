"""convlib.Conductivity: k(T) as a constant, a polynomial or a table, checked against hand integrals.

The effective conductivity of a layer between faces at T1 and T2 is, for data
of the material's true k(T), the integral mean (Kirchhoff transform)
k_bar = 1/(T1-T2) * int_{T2}^{T1} k dT (ASTM C680, from memory). Apparent data
against mean temperature (ASTM C335 tests, form="mean") are integrated the same
way since issue 12 item 6 (the one-point reading k_app((T1+T2)/2) is not monotone
over large drops); that reading stays available as ``at_layer_mean``.
"""
import numpy as np
import pytest
from scipy.integrate import quad
from scipy.optimize import brentq

from convlib import Conductivity

LINEAR = (0.03, 1e-4)
QUADRATIC = (0.02, 5e-5, 2e-7)
TABLE = ([250.0, 400.0, 600.0], [0.03, 0.05, 0.09])


def antiderivative(c, T):
    """int k dT of k = sum c_i T^i (exact, by hand)."""
    return sum(ci * T ** (i + 1) / (i + 1) for i, ci in enumerate(c))


def table_integral(T_a, T_b):
    """int_{T_a}^{T_b} of the piecewise-linear TABLE, by the trapezoid on each piece (exact for linear pieces)."""
    t, k = TABLE
    nodes = sorted({T_a, T_b, *[x for x in t if T_a < x < T_b]})
    values = np.interp(nodes, t, k)
    return float(np.sum(0.5 * (values[1:] + values[:-1]) * np.diff(nodes)))


# ---------------------------------------------------------------- at()
def test_constant():
    k = Conductivity.constant(0.045)
    assert k.is_constant
    np.testing.assert_array_equal(k.at([250.0, 500.0]), [0.045, 0.045])
    assert float(k.effective(500.0, 300.0)) == 0.045
    assert float(k.temperature_after(500.0, 4.5)) == pytest.approx(400.0, rel=1e-15)  # t_in - drop/k


def test_polynomial_at_and_clipping():
    k = Conductivity.polynomial(QUADRATIC, valid_range=(250, 700))
    T = np.array([250.0, 400.0, 700.0])
    np.testing.assert_allclose(k.at(T), QUADRATIC[0] + QUADRATIC[1] * T + QUADRATIC[2] * T ** 2, rtol=1e-14)
    # outside the fit: held at the end value
    assert float(k.at(800.0)) == pytest.approx(float(k.at(700.0)), rel=1e-15)
    assert float(k.at(100.0)) == pytest.approx(float(k.at(250.0)), rel=1e-15)


def test_table_at_interpolates_and_holds_ends():
    k = Conductivity.table(*TABLE)
    assert float(k.at(325.0)) == pytest.approx(0.04, rel=1e-14)
    assert float(k.at(500.0)) == pytest.approx(0.07, rel=1e-14)
    assert float(k.at(700.0)) == 0.09 and float(k.at(200.0)) == 0.03
    assert k.valid_range == (250.0, 600.0)


# ---------------------------------------------------------------- effective()
@pytest.mark.parametrize("t_in, t_out", [(500.0, 300.0), (650.0, 260.0), (412.3, 301.7), (300.0, 450.0)])
def test_true_form_effective_is_integral_mean(t_in, t_out):
    """Tolerance 1e-6: convlib integrates k on a 0.25 K grid and interpolates linearly
    (error <= k' h^2 / 8 per face, relative 1e-7 here)."""
    lin = Conductivity.polynomial(LINEAR, form="true", valid_range=(250, 700))
    quad = Conductivity.polynomial(QUADRATIC, form="true", valid_range=(250, 700))
    for k, c in ((lin, LINEAR), (quad, QUADRATIC)):
        expected = (antiderivative(c, t_in) - antiderivative(c, t_out)) / (t_in - t_out)
        assert float(k.effective(t_in, t_out)) == pytest.approx(expected, rel=1e-6)
    # linear k: the integral mean is k at the mean temperature (a mathematical identity)
    mean = 0.5 * (t_in + t_out)
    assert float(lin.effective(t_in, t_out)) == pytest.approx(LINEAR[0] + LINEAR[1] * mean, rel=1e-6)


@pytest.mark.parametrize("t_in, t_out", [(500.0, 300.0), (580.0, 420.0), (412.3, 301.7), (350.0, 340.0)])
def test_true_form_table_effective_is_integral_mean(t_in, t_out):
    k = Conductivity.table(*TABLE, form="true")
    expected = table_integral(min(t_in, t_out), max(t_in, t_out)) / abs(t_in - t_out)
    assert float(k.effective(t_in, t_out)) == pytest.approx(expected, rel=1e-6)


def test_true_form_effective_beyond_table_uses_end_value():
    k = Conductivity.table(*TABLE, form="true")
    # 600..700 K at the held end value 0.09, 500..600 K mean 0.08 -> (9 + 8) / 200
    assert float(k.effective(700.0, 500.0)) == pytest.approx(0.085, rel=1e-6)


@pytest.mark.parametrize("t_in, t_out", [(500.0, 300.0), (580.0, 420.0), (412.3, 301.7), (350.0, 340.0)])
def test_mean_form_effective_is_integral_mean_of_the_data(t_in, t_out):
    """Mean-form data are integrated like k(T) (ASTM C1045 small-drop reduction, from memory):
    the same hand integrals as the true form; the one-point reading stays as at_layer_mean."""
    table = Conductivity.table(*TABLE, form="mean")
    expected = table_integral(min(t_in, t_out), max(t_in, t_out)) / abs(t_in - t_out)
    assert float(table.effective(t_in, t_out)) == pytest.approx(expected, rel=1e-6)
    quad = Conductivity.polynomial(QUADRATIC, form="mean", valid_range=(250, 700))
    expected = (antiderivative(QUADRATIC, t_in) - antiderivative(QUADRATIC, t_out)) / (t_in - t_out)
    assert float(quad.effective(t_in, t_out)) == pytest.approx(expected, rel=1e-6)
    assert float(table.at_layer_mean(t_in, t_out)) == float(table.at(0.5 * (t_in + t_out)))


def test_integral_mean_and_layer_mean_agree_for_linear_k_and_differ_for_curved_k():
    """The integral mean and the one-point layer-mean reading agree exactly for linear k, to second
    order otherwise: for k = c0 + c1 T + c2 T^2 the difference is c2 (T1-T2)^2 / 12 (by hand)."""
    t_in, t_out = 600.0, 300.0
    for form in ("true", "mean"):
        lin = Conductivity.polynomial(LINEAR, form=form, valid_range=(250, 700))
        assert float(lin.effective(t_in, t_out)) == pytest.approx(float(lin.at_layer_mean(t_in, t_out)), rel=1e-6)
        quad = Conductivity.polynomial(QUADRATIC, form=form, valid_range=(250, 700))
        difference = float(quad.effective(t_in, t_out) - quad.at_layer_mean(t_in, t_out))
        assert difference == pytest.approx(QUADRATIC[2] * (t_in - t_out) ** 2 / 12, rel=1e-4)


# Steep k of a high-temperature blanket (radiation through the fibres): invented shape, no source.
BLANKET = ([300.0, 500.0, 700.0, 900.0, 1100.0, 1300.0], [0.03, 0.06, 0.11, 0.18, 0.27, 0.38])


@pytest.mark.parametrize("form", ["true", "mean"])
def test_steep_k_temperature_after_is_unique_and_matches_quadrature(form):
    """Issue 12 item 6: over a 900 K drop the layer-mean reading 2 k((T1+T2)/2)(T1-T2)/2 is not monotone in
    T2 (three roots for one drop), and the old inversion returned one of them. Independent check:
    scipy.integrate.quad of k(T) and brentq on int_{T2}^{T1} k dT = drop, which has exactly one root."""
    k = Conductivity.table(*BLANKET, form=form)
    t_in = 1173.15
    k_of = lambda t: float(np.interp(t, *BLANKET))  # noqa: E731  the table, linear between points
    # the layer-mean reading really is non-monotone here (the fault's cause), on the table itself
    t2 = np.linspace(320.0, 1170.0, 2000)
    reading = np.interp(0.5 * (t_in + t2), *BLANKET) * (t_in - t2)
    assert np.any(np.diff(reading) > 0)  # falling T2 does not always raise the layer-mean "flow"
    drops = np.array([10.0, 30.0, 60.0, 90.0, 115.0])  # the whole layer 300..1173 K carries about 121 W/m
    got = k.temperature_after(t_in, drops)
    for d, t in zip(drops, got):
        def held(x, d=d):  # int_x^t_in k dT - drop, the table's nodes as break points, tight quadrature
            nodes = [p for p in BLANKET[0] if x < p < t_in]
            return quad(k_of, x, t_in, points=nodes or None, limit=200, epsabs=1e-13, epsrel=1e-13)[0] - d
        expected = brentq(held, 300.0, t_in, xtol=1e-10)
        assert float(t) == pytest.approx(expected, abs=1e-6)
    assert np.all(np.diff(got) < 0)  # more drop, colder outer face


# ---------------------------------------------------------------- temperature_after()
@pytest.mark.parametrize("make", [
    lambda: Conductivity.constant(0.05),
    lambda: Conductivity.polynomial(LINEAR, form="true", valid_range=(250, 700)),
    lambda: Conductivity.polynomial(QUADRATIC, form="true", valid_range=(250, 700)),
    lambda: Conductivity.polynomial(QUADRATIC, form="mean", valid_range=(250, 700)),
    lambda: Conductivity.table(*TABLE, form="true"),
    lambda: Conductivity.table(*TABLE, form="mean"),
])
def test_temperature_after_inverts_effective(make):
    """effective(t_in, t_after) * (t_in - t_after) == drop; also for heat flowing inwards (drop < 0)."""
    k = make()
    t_in = np.array([600.0, 500.0, 350.0, 300.0, 260.0, 290.0])
    drop = np.array([10.0, 5.0, 1.0, 0.05, -2.0, -0.5])
    t_after = k.temperature_after(t_in, drop)
    assert np.all(np.sign(t_in - t_after) == np.sign(drop))
    np.testing.assert_allclose(k.effective(t_in, t_after) * (t_in - t_after), drop, rtol=1e-9)


def test_temperature_after_linear_true_matches_closed_form():
    """For k = c0 + c1 T: c0 (T1-T2) + c1/2 (T1^2-T2^2) = drop -> quadratic in T2, solved by hand."""
    c0, c1 = LINEAR
    k = Conductivity.polynomial(LINEAR, form="true", valid_range=(250, 700))
    t_in, drop = 550.0, 12.0
    # c1/2 T2^2 + c0 T2 - (c0 T1 + c1/2 T1^2 - drop) = 0, positive root
    rhs = c0 * t_in + c1 / 2 * t_in ** 2 - drop
    expected = (-c0 + np.sqrt(c0 ** 2 + 2 * c1 * rhs)) / c1
    assert float(k.temperature_after(t_in, drop)) == pytest.approx(expected, abs=1e-4)  # 0.25 K grid, measured 1e-6


def test_mean_form_temperature_after_large_drop_is_consistent_or_refused():
    """A drop the layer cannot carry above 0 K: either raise ValueError or return the mean-form root.
    Regression: at commit 26a6c5f an unguarded Newton gave drop 22 -> -160.18 K and drop 24.2 -> 16589 K."""
    k = Conductivity.table(*TABLE, form="mean")
    drop = np.array([20.04, 22.0, 24.2])
    try:
        t_after = k.temperature_after(573.15, drop)
    except ValueError:
        return
    np.testing.assert_allclose(k.effective(573.15, t_after) * (573.15 - t_after), drop, rtol=1e-9)


# ---------------------------------------------------------------- range flags
def test_outside_range_flags():
    poly = Conductivity.polynomial(LINEAR, valid_range=(250, 700))
    np.testing.assert_array_equal(poly.outside_range(np.array([249.9, 250.0, 500.0, 700.0, 700.1])),
                                  [True, False, False, False, True])
    assert bool(poly.outside_range(300.0, 800.0))  # any of the faces
    assert not bool(poly.outside_range(300.0, 600.0))
    table = Conductivity.table(*TABLE)
    np.testing.assert_array_equal(table.outside_range([240.0, 400.0], [300.0, 610.0]), [True, True])
    assert not bool(Conductivity.constant(0.04).outside_range(1.0, 5000.0))


# ---------------------------------------------------------------- validation
@pytest.mark.parametrize("build, match", [
    (lambda: Conductivity.constant(-0.04), "conductivity.*greater than 0"),
    (lambda: Conductivity.constant(0.0), "conductivity.*greater than 0"),
    (lambda: Conductivity.table([300, 300, 400], [0.03, 0.04, 0.05]), "increase"),
    (lambda: Conductivity.table([400, 300], [0.03, 0.04]), "increase"),
    (lambda: Conductivity.table([300, 400], [0.03, -0.04]), "conductivity table values"),
    (lambda: Conductivity.table([300], [0.03]), "at least two"),
    (lambda: Conductivity.table([300, 400, 500], [0.03, 0.04]), "at least two"),
    (lambda: Conductivity.polynomial([0.05, -1e-4], valid_range=(200, 900)), "positive over 200..900"),
    (lambda: Conductivity.polynomial([0.05], valid_range=(500, 300)), "low < high"),
    (lambda: Conductivity.table(*TABLE, form="apparent"), "choose one of: true, mean"),
])
def test_validation_errors(build, match):
    with pytest.raises(ValueError, match=match):
        build()


def test_polynomial_negative_outside_range_is_accepted_and_clipped():
    """k < 0 only beyond valid_range is fine: evaluation is held at the range ends."""
    k = Conductivity.polynomial([0.05, -1e-4], valid_range=(200, 400))  # k(450) would be 0.005, k(600) < 0
    assert float(k.at(600.0)) == pytest.approx(0.01, rel=1e-12)
