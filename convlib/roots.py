r"""Bracketed root finding for many independent equations at once (Chandrupatla's method).

:func:`find_root` solves :math:`f_i(x_i) = 0` for every element ``i`` of arrays, each in its own
bracket :math:`[lo_i, hi_i]` with a sign change. One call of ``f`` evaluates every element still
searching (the others are dropped from the arrays passed in), so the cost is that of a few numpy
operations per iteration, whatever the number of elements.

The method (T. R. Chandrupatla (1997), "A new hybrid quadratic/bisection algorithm for finding
the zero of a nonlinear function without using derivatives", *Advances in Engineering Software*
28(3):145-149, doi:10.1016/S0965-9978(96)00051-8) keeps a bracket :math:`[a, b]` and the point
:math:`c` it last discarded, and takes the inverse quadratic interpolation through the three when
:math:`\phi^2 < \xi` and :math:`(1 - \phi)^2 < 1 - \xi` (:math:`\xi = (a - b)/(c - b)`,
:math:`\phi = (f_a - f_b)/(f_c - f_b)`), else bisection; every step moves at least the tolerance.
It stops when the bracket is narrower than the tolerance, so the returned point (the end with the
smaller :math:`|f|`) lies within ``xatol + xrtol |x|`` of the root.

:func:`newton_decreasing` is a safeguarded Newton iteration for functions known to fall through their
root inside the bracket (a surface-temperature balance does): it needs the slope too, and does not
evaluate the bracket ends unless a step leads there; the wall solver tries it first and hands the points
it cannot settle to :func:`find_root`.

:func:`find_root` replaces, for the small arrays of interactive use, a general-purpose implementation whose fixed
cost per call dominated there (``benchmarks/run.py`` measures both).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["RootResult", "find_root", "newton_decreasing"]


@dataclass(frozen=True)
class RootResult:
    """Roots and their status, arrays of the broadcast shape of the brackets and arguments."""

    x: np.ndarray           # the root; NaN where the bracket held no sign change or f was not finite
    success: np.ndarray     # bool: converged to the tolerance
    iterations: np.ndarray  # function evaluations after the two at the bracket ends


def find_root(f, lo, hi, args=(), *, xatol=0.0, xrtol=4.0 * np.finfo(float).eps, maxiter=100) -> RootResult:
    """Roots of ``f(x, *args) = 0`` element by element, each bracketed by ``lo`` and ``hi``.

    Parameters
    ----------
    f : callable
        ``f(x, *args)`` -> array like ``x``; called with 1-D arrays of the elements still searching
        and the matching elements of ``args``.
    lo, hi : array_like
        Bracket ends (either order); ``f`` must change sign between them.
    args : tuple of array_like
        Extra arguments, broadcast with ``lo`` and ``hi``.
    xatol, xrtol : float
        Absolute and relative tolerance on the root: ``|x - root| <= xatol + xrtol |x|``.
    maxiter : int
        Iterations before an element is given up (``success`` False, ``x`` its best estimate).

    Returns
    -------
    RootResult

    Examples
    --------
    >>> r = find_root(lambda x, c: x ** 3 - c, 0.0, 3.0, args=([1.0, 8.0, 27.0],), xatol=1e-12)
    >>> np.round(r.x, 10).tolist(), r.success.tolist()
    ([1.0, 2.0, 3.0], [True, True, True])
    """
    arrays = np.broadcast_arrays(np.asarray(lo, dtype=float), np.asarray(hi, dtype=float),
                                 *(np.asarray(a) for a in args))
    shape = arrays[0].shape
    a, b = (np.array(v, dtype=float).ravel() for v in arrays[:2])
    extra = tuple(np.ascontiguousarray(v).ravel() for v in arrays[2:])
    n = a.size
    x, success, iterations = np.full(n, np.nan), np.zeros(n, dtype=bool), np.zeros(n, dtype=int)
    eps_a, eps_m = 0.5 * float(xatol), 0.25 * float(xrtol)
    with np.errstate(all="ignore"):
        fa, fb = np.asarray(f(a, *extra), dtype=float), np.asarray(f(b, *extra), dtype=float)
        # ends that are roots, and brackets without a sign change (or with a non-finite end)
        root_a, root_b = fa == 0, (fb == 0) & (fa != 0)
        x[root_a], x[root_b] = a[root_a], b[root_b]
        success[root_a | root_b] = True
        search = ~success & np.isfinite(fa) & np.isfinite(fb) & (np.sign(fa) != np.sign(fb))
        idx = np.flatnonzero(search)
        a, b, fa, fb = a[idx], b[idx], fa[idx], fb[idx]
        c, fc, t = a.copy(), fa.copy(), np.full(idx.size, 0.5)
        active = tuple(e[idx] for e in extra)  # the arguments of the elements still searching
        xm = a
        for it in range(1, maxiter + 1):
            if idx.size == 0:
                break
            xt = a + t * (b - a)
            ft = np.asarray(f(xt, *active), dtype=float)
            same = np.sign(ft) == np.sign(fa)
            c, fc = np.where(same, a, b), np.where(same, fa, fb)
            b, fb = np.where(same, b, a), np.where(same, fb, fa)
            a, fa = xt, ft
            smaller = np.abs(fa) < np.abs(fb)
            xm, fm = np.where(smaller, a, b), np.where(smaller, fa, fb)
            tol = 2.0 * eps_m * np.abs(xm) + eps_a
            finite = np.isfinite(ft)
            # the root lies in [a, b] and xm is one of its ends: done when it is narrower than 2 tol
            done = finite & ((fm == 0) | (np.abs(b - a) < 2.0 * tol))
            iterations[idx] = it
            keep = finite & ~done
            if not keep.all():
                x[idx[done]], success[idx[done]] = xm[done], True
                idx, a, b, c, fa, fb, fc, xm, tol = (v[keep] for v in (idx, a, b, c, fa, fb, fc, xm, tol))
                active = tuple(e[keep] for e in active)
            # next step: inverse quadratic interpolation where it is safe, else bisection, at least tol inside
            tlim = tol / np.abs(b - c)
            xi, phi = (a - b) / (c - b), (fa - fb) / (fc - fb)
            quadratic = (phi ** 2 < xi) & ((1.0 - phi) ** 2 < 1.0 - xi)
            t_iqi = fa / (fb - fa) * fc / (fb - fc) + (c - a) / (b - a) * fa / (fc - fa) * fb / (fc - fb)
            t = np.clip(np.where(quadratic, t_iqi, 0.5), tlim, 1.0 - tlim)
        x[idx] = xm  # out of iterations: the best estimate, not converged
    return RootResult(x=x.reshape(shape), success=success.reshape(shape), iterations=iterations.reshape(shape))


def newton_decreasing(f, lo, hi, x0, args=(), *, xatol, maxiter=60) -> RootResult:
    """Roots of a function that falls through zero in ``[lo, hi]``, element by element, by Newton steps kept
    inside a bracket.

    ``f(x, *args)`` returns ``(value, slope)``; the value is taken to be positive below the root and negative
    above it (the ends are not evaluated unless a step leads to them). Each evaluation narrows the bracket
    by the sign of the value; the next point is the Newton step ``x - value / slope`` when the slope is
    negative, the step stays strictly inside the bracket and the value at least halved since the previous
    evaluation, else the bracket end the step passed (if it was never evaluated), else the bracket's
    midpoint. From the second evaluation on, the slope is the secant through the previous point where that
    falls (it corrects a slope that is off, e.g. one with the fluid properties held, and converges
    superlinearly); the given slope serves the first step and wherever the secant does not fall. An element
    has converged when its Newton step is at most ``xatol`` (the root is then that step away; with a slope
    within a factor of two of the true one the error after it is below the step) or its evaluated bracket is
    narrower than ``2 xatol``.

    Fails (``success`` False) where the value is not finite, where an end, once evaluated, shows the root
    lies beyond it, or after ``maxiter`` evaluations: a caller hands those to :func:`find_root`.

    >>> r = newton_decreasing(lambda x: (2.0 - x ** 2, -2.0 * x), 0.0, 3.0, 1.0, xatol=1e-12)
    >>> round(float(r.x), 12), bool(r.success), int(r.iterations)
    (1.414213562373, True, 7)
    """
    arrays = np.broadcast_arrays(np.asarray(lo, dtype=float), np.asarray(hi, dtype=float),
                                 np.asarray(x0, dtype=float), *(np.asarray(a) for a in args))
    shape = arrays[0].shape
    lo, hi = (np.minimum(arrays[0], arrays[1]).ravel(), np.maximum(arrays[0], arrays[1]).ravel())
    x = np.clip(arrays[2].ravel(), lo, hi)
    active = tuple(np.ascontiguousarray(v).ravel() for v in arrays[3:])
    n = x.size
    out, success, iterations = np.full(n, np.nan), np.zeros(n, dtype=bool), np.zeros(n, dtype=int)
    idx = np.arange(n)
    lo_known, hi_known = np.zeros(n, dtype=bool), np.zeros(n, dtype=bool)
    previous, x_previous = np.full(n, np.inf), np.full(n, np.nan)
    tol = float(xatol)
    with np.errstate(all="ignore"):
        for it in range(1, maxiter + 1):
            if idx.size == 0:
                break
            value, slope = f(x, *active)
            value, slope = np.asarray(value, dtype=float), np.asarray(slope, dtype=float)
            above, below = value < 0, value > 0
            failed = ~np.isfinite(value) | (below & (x >= hi)) | (above & (x <= lo))
            lo, lo_known = np.where(below, x, lo), lo_known | below
            hi, hi_known = np.where(above, x, hi), hi_known | above
            # the secant through the previous point where it is a falling one: it corrects a slope that is off
            secant = (value - previous) / (x - x_previous)
            slope = np.where(np.isfinite(secant) & (secant < 0), secant, slope)
            step = -value / slope
            target = x + step
            newton = np.isfinite(step) & (slope < 0) & (np.abs(value) <= 0.5 * np.abs(previous))
            inside = newton & (target > lo) & (target < hi)
            # a step below the tolerance ends it (also one lost in rounding: x + step == x, at a bracket end)
            close = newton & (np.abs(step) <= tol) & (target >= lo) & (target <= hi)
            narrow = lo_known & hi_known & (hi - lo <= 2.0 * tol)
            root = value == 0
            done = ~failed & (root | close | narrow)
            middle = 0.5 * (lo + hi)
            nxt = np.where(inside, target, middle)
            passed = newton & ~inside  # a Newton step that left the bracket: to the end it passed, if not known
            if passed.any():
                nxt = np.where(passed & (target >= hi) & ~hi_known, hi, nxt)
                nxt = np.where(passed & (target <= lo) & ~lo_known, lo, nxt)
            previous, x_previous = value, x
            keep = ~(done | failed)
            if not keep.all():
                leaving = idx[~keep]
                iterations[leaving] = it
                if done.any():
                    result = np.where(root, x, np.where(close, target, middle))
                    out[idx[done]], success[idx[done]] = result[done], True
                if failed.any():
                    out[idx[failed]] = x[failed]
                idx, lo, hi, lo_known, hi_known, previous, x_previous, nxt = (
                    v[keep] for v in (idx, lo, hi, lo_known, hi_known, previous, x_previous, nxt))
                active = tuple(a[keep] for a in active)
            x = nxt
        iterations[idx] = maxiter
        out[idx] = x  # out of iterations: the last point, not converged
    return RootResult(x=out.reshape(shape), success=success.reshape(shape), iterations=iterations.reshape(shape))
