"""Property-based tests of the bracketed root finder (convlib.roots.find_root, Chandrupatla 1997).

A bracket with a sign change always converges within the iteration bound to the tolerance; stopped at the
bound it says so (``success`` False) and returns its finite best estimate; a bracket without a sign change
gives NaN with ``success`` False -- the documented "no root here" -- never an error or a warning.
"""
from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, strategies as st

from convlib.roots import find_root
from fuzz_helpers import outcome

pytestmark = pytest.mark.fuzz

cases = st.lists(st.tuples(st.floats(-1e6, 1e6), st.floats(1e-6, 1e3), st.floats(1e-6, 1e3)), min_size=1,
                 max_size=20)


@given(cases=cases, power=st.sampled_from([1, 3, 5]))
def test_bracketed_roots_converge_to_the_tolerance(cases, power):
    root, below, above = (np.array(v) for v in zip(*cases))
    # odd powers of (x - root): one sign change, at the known root
    r = outcome(find_root, lambda x, c: (x - c) ** power, root - below, root + above, args=(root,), xatol=1e-9,
                xrtol=1e-12)
    assert r.success.all()
    # the promise of find_root: |x - root| <= xatol + xrtol |x|, plus the spacing of floats at the root
    assert np.all(np.abs(r.x - root) <= 1e-9 + 1e-12 * np.abs(root) + 4.0 * np.spacing(np.abs(root)))


@given(cases=cases)
def test_stopped_at_the_iteration_bound_says_so(cases):
    root, below, above = (np.array(v) for v in zip(*cases))
    r = outcome(find_root, lambda x, c: np.tanh(x - c), root - below, root + above, args=(root,), xatol=0.0,
                xrtol=0.0, maxiter=1)
    assert np.all(np.isfinite(r.x))
    assert np.all(r.iterations <= 1)
    assert np.all(r.success | ((r.x >= root - below) & (r.x <= root + above)))


@given(cases=cases)
def test_no_sign_change_gives_nan_and_no_success(cases):
    root, below, above = (np.array(v) for v in zip(*cases))
    r = outcome(find_root, lambda x, c: (x - c) ** 2 + 1.0, root - below, root + above, args=(root,))
    assert not r.success.any()
    assert np.isnan(r.x).all()
