"""Shared checks of the property-based tests (tests/test_fuzz_*.py).

:func:`outcome` runs a call with numpy's division, overflow and invalid-operation errors raised
(``np.errstate(..., "raise")``; underflow to zero or a subnormal is harmless and numpy's default ignores it too)
and every ``RuntimeWarning`` turned into an error, and returns either the result or the
:class:`convlib.errors.InputError` it raised; any other exception fails the test. :func:`assert_finite`
then checks every float array of a result (dataclass fields, nested dataclasses, tuples, dicts).
"""
from __future__ import annotations

import dataclasses
import math
import warnings

import numpy as np
from hypothesis import strategies as st

from convlib.errors import InputError


def outcome(call, *args, **kwargs):
    """``call(*args, **kwargs)`` -> its result, or the InputError it raised (checked to name a field)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)
        with np.errstate(divide="raise", over="raise", invalid="raise", under="ignore"):
            try:
                return call(*args, **kwargs)
            except InputError as exc:
                assert isinstance(exc.field, str) and exc.field, f"InputError without a field: {exc}"
                assert str(exc), "InputError without a message"
                return exc


def floats_of(value, path="result", skip=()):
    """(path, float array) of every float-valued leaf of ``value``; names in ``skip`` are left out."""
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        for f in dataclasses.fields(value):
            if f.name not in skip:
                yield from floats_of(getattr(value, f.name), f"{path}.{f.name}", skip)
    elif isinstance(value, dict):
        for k, v in value.items():
            if k not in skip:
                yield from floats_of(v, f"{path}[{k!r}]", skip)
    elif isinstance(value, (tuple, list)):
        for i, v in enumerate(value):
            yield from floats_of(v, f"{path}[{i}]", skip)
    elif isinstance(value, (float, np.floating)) or (isinstance(value, np.ndarray) and value.dtype.kind == "f"):
        yield path, np.asarray(value, dtype=float)


def assert_finite(result, skip=()):
    """Every float in ``result`` is finite (no NaN, no inf), the fields in ``skip`` apart."""
    for path, arr in floats_of(result, skip=skip):
        assert np.all(np.isfinite(arr)), f"{path} is not finite: {arr[~np.isfinite(arr)][:5]}"


def finite_or_input_error(call, *args, skip=(), **kwargs):
    """Run ``call``; an InputError is accepted, a result must be finite. Returns the result or None."""
    out = outcome(call, *args, **kwargs)
    if isinstance(out, InputError):
        return None
    assert_finite(out, skip=skip)
    return out


def wide(low, high, *, zero=False, inclusive=True):
    """Floats spread over decades between ``low`` > 0 and ``high`` (log-uniform), plus the ends and 0 if asked."""
    lg = st.floats(math.log10(low), math.log10(high)).map(lambda e: 10.0 ** e)
    options = [lg, st.sampled_from([low, high])] if inclusive else [lg]
    if zero:
        options.append(st.just(0.0))
    return st.one_of(*options)


#: Temperatures [K] from near absolute zero to far above any line: most out of the air tables on purpose.
temperatures = st.one_of(st.floats(1.0, 3000.0), st.floats(200.0, 700.0), st.sampled_from([0.5, 273.15, 5000.0]))
