"""convlib.roots.find_root checked against scipy.optimize.brentq (SciPy, general-purpose reference) element by element."""
import numpy as np
import pytest
from scipy.optimize import brentq

from convlib.roots import find_root

CASES = [  # f(x, p), bracket, parameter values
    (lambda x, p: x ** 3 - p, (-1.0, 10.0), [0.001, 1.0, 2.0, 500.0]),
    (lambda x, p: np.exp(x) - p, (-5.0, 5.0), [0.01, 1.0, 100.0]),
    (lambda x, p: np.cos(x) - p * x, (0.0, 2.0), [0.1, 1.0, 3.0]),
    (lambda x, p: np.tanh(50 * (x - p)) + 1e-3, (-1.0, 1.0), [-0.5, 0.0, 0.7]),  # steep
    (lambda x, p: (x - p) ** 3, (-2.0, 3.0), [0.3, 1.0]),  # triple root: flat there
    (lambda x, p: 1e8 * (x - p), (200.0, 900.0), [300.0, 873.15]),
]


@pytest.mark.parametrize("f,bracket,params", CASES)
@pytest.mark.parametrize("xatol,xrtol", [(1e-6, 0.0), (1e-12, 1e-13), (0.0, 1e-10)])
def test_roots_agree_with_brentq_within_the_tolerance(f, bracket, params, xatol, xrtol):
    p = np.array(params)
    r = find_root(f, bracket[0], bracket[1], args=(p,), xatol=xatol, xrtol=xrtol)
    assert r.success.all()
    for i, pi in enumerate(p):
        ref = brentq(lambda x, pi=pi: float(f(np.float64(x), pi)), *bracket, xtol=1e-15, rtol=8.9e-16, maxiter=1000)
        assert abs(r.x[i] - ref) <= xatol + xrtol * abs(ref) + 2e-15 * abs(ref) + 1e-15


def test_ends_sign_errors_and_non_finite_values_are_reported():
    f = lambda x, p: x - p  # noqa: E731
    r = find_root(f, [0.0, 0.0, 0.0, 0.0], [1.0, 1.0, 2.0, 1.0], args=([0.0, 1.0, 5.0, 0.5],), xatol=1e-9)
    assert r.x[0] == 0.0 and r.x[1] == 1.0 and r.success[:2].all()  # roots at the ends
    assert not r.success[2] and np.isnan(r.x[2])                    # no sign change
    assert r.success[3] and abs(r.x[3] - 0.5) <= 1e-9
    g = lambda x: np.where(x > 0.25, np.nan, x - 0.3)  # noqa: E731
    bad = find_root(g, 0.0, 1.0, xatol=1e-9)
    assert not bad.success and np.isnan(bad.x)


def test_shape_and_iteration_limit():
    r = find_root(lambda x, c: x ** 2 - c, np.zeros((2, 3)), 10.0, args=(np.arange(1.0, 7.0).reshape(2, 3),),
                  xatol=1e-12)
    assert r.x.shape == (2, 3) and r.iterations.shape == (2, 3)
    np.testing.assert_allclose(r.x, np.sqrt(np.arange(1.0, 7.0)).reshape(2, 3), atol=1e-12)
    few = find_root(lambda x: np.tanh(30 * (x - 0.123456789)), 0.0, 1.0, xatol=1e-15, maxiter=3)
    assert not few.success and 0.0 <= float(few.x) <= 1.0
