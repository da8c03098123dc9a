"""Shared machinery of lines in operation: marching, the loss q'(T) of a line, CoolProp calls, input checks.

Marching takes classical RK4 steps with step doubling (W. H. Press et al., *Numerical Recipes*, 3rd ed., section
17.2); see :mod:`convlib.operation`. The loss function re-evaluates :func:`convlib.pipe.insulated_pipe` at every fluid
temperature and keeps the flags of every solve (:class:`SolveFlags`).
"""
from __future__ import annotations

import time

import numpy as np

from .errors import InputError
from .pipe import insulated_pipe
from .surroundings import Surroundings
from .validation import _show, as_array

__all__ = ["TIME_LIMIT", "OutOfRange", "rk4_step", "march", "coolprop", "positive",
           "pipe_keywords", "SolveFlags", "loss_function", "frozen_coefficient"]

_MIN_STEP = 1e-9      # smallest normalized step before giving up
_MAX_STEPS = 20000    # accepted + rejected steps before giving up
#: Default wall-clock bound of one march [s] (``time_limit`` of the marching functions); a march
#: normally takes well under a second, so reaching it means the inputs ask for something unreasonable.
TIME_LIMIT = 60.0


class OutOfRange(InputError):
    """A trial stage left the fluid's property range: the march retries with a smaller step."""


def rk4_step(rhs, s, y, h, k1):
    """One classical Runge-Kutta step of dy/ds = rhs(s, y) from (s, y) with slope k1 there."""
    k2 = rhs(s + 0.5 * h, y + 0.5 * h * k1)
    k3 = rhs(s + 0.5 * h, y + 0.5 * h * k2)
    k4 = rhs(s + h, y + h * k3)
    return y + h / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4)


def march(rhs, y0, scale, tolerance, max_step, time_limit=TIME_LIMIT):
    """dy/ds = rhs(s, y) from s = 0 to 1 by RK4 with step doubling (module docstring); a step passes when every
    element's error estimate is <= tolerance * scale (an array, or a callable of y at the step's start).
    Returns s grid, y stacked on it, accepted, rejected, evaluations.

    Bounded: at most ``_MAX_STEPS`` accepted plus rejected steps and ``time_limit`` seconds of wall-clock time;
    reaching either raises InputError saying where the march stopped (field ``tolerance`` or ``time_limit``).
    """
    deadline = time.monotonic() + time_limit
    s, y, h = 0.0, np.asarray(y0, dtype=float), float(max_step)
    grid, values = [0.0], [y]
    accepted = rejected = 0
    k1, last_error, evaluations = rhs(s, y), None, 1
    while s < 1.0 - 1e-13:
        if h < _MIN_STEP and last_error is not None:
            # the solution itself leaves the range
            raise InputError(str(last_error), field=last_error.field, rule=last_error.rule,
                             value=last_error.value) from None
        if time.monotonic() >= deadline:
            raise InputError(f"marching stopped at its time limit of {time_limit:g} s, {s:.3g} of the way along "
                             f"({accepted} steps); loosen the tolerance or raise time_limit", field="time_limit",
                             rule="the march completes within it", value=time_limit)
        if accepted + rejected >= _MAX_STEPS or h < _MIN_STEP:
            raise InputError(f"marching failed to meet the tolerance {tolerance:g} (step {h:.3g} of the "
                             f"normalized range after {accepted} steps); loosen the tolerance", field="tolerance",
                             rule="met by the marching within its step limits", value=tolerance)
        h = min(h, 1.0 - s)
        try:
            whole = rk4_step(rhs, s, y, h, k1)
            half = rk4_step(rhs, s, y, 0.5 * h, k1)
            two = rk4_step(rhs, s + 0.5 * h, half, 0.5 * h, rhs(s + 0.5 * h, half))
            evaluations += 10
            last_error = None
        except OutOfRange as exc:  # a trial stage overshot: retry with a quarter of the step
            rejected, h, last_error = rejected + 1, 0.25 * h, exc
            continue
        delta = (two - whole) / 15.0
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.abs(delta) / (tolerance * (scale(y) if callable(scale) else scale))
        err = float(np.max(ratio, initial=0.0))
        if not np.isfinite(err):
            raise InputError("marching met a non-finite value; check the inputs", field="inputs",
                             rule="finite values along the march", value=None)
        if err <= 1.0:
            s, y, accepted = (1.0 if h >= 1.0 - s - 1e-13 else s + h), two + delta, accepted + 1
            grid.append(s)
            values.append(y)
            if s < 1.0:
                k1 = rhs(s, y)
                evaluations += 1
            h = min(h * (4.0 if err == 0.0 else min(4.0, 0.9 * err ** -0.2)), float(max_step))
        else:
            rejected += 1
            h *= max(0.1, 0.9 * err ** -0.2)
    return np.array(grid), np.stack(values), accepted, rejected, evaluations


def coolprop(call, value, field):
    """``call()`` of CoolProp; its ValueError (a state it cannot compute, an unknown fluid) as InputError."""
    try:
        return call()
    except ValueError as err:
        shown = repr(value) if isinstance(value, str) else _show(np.asarray(value, dtype=float))
        raise InputError(f"{field}: CoolProp could not compute it for {shown}: {err}", field=field,
                         rule="a state CoolProp can compute", value=value) from None


def positive(name, value, unit=""):
    return as_array(name, value, unit=unit, low=0.0, low_inclusive=False)


def pipe_keywords(**given) -> dict:
    """The insulated_pipe keywords a caller gave (``None``: not given)."""
    return {name: value for name, value in given.items() if value is not None}


class SolveFlags:
    """Union of the warning flags of every insulated_pipe solve a function makes, per case."""

    def __init__(self):
        self.seen = []

    def add(self, warnings):
        self.seen.append(np.asarray(warnings))

    def union(self, shape) -> np.ndarray:
        out = np.zeros(shape, dtype=np.int16)
        for w in self.seen:
            if w.ndim > len(shape):  # quadrature nodes or grids on leading axes
                w = np.bitwise_or.reduce(w.reshape((-1, *w.shape[w.ndim - len(shape):])), axis=0)
            out |= np.broadcast_to(w, shape).astype(np.int16)
        return out


def loss_function(pipe_outer_diameter, layers, around: Surroundings, pipe_keywords: dict, flags: SolveFlags):
    """q'(T) [W/m] of the line with the fluid at T, outer coefficient re-evaluated (surface solved to 1e-8 K);
    the flags of every solve go to ``flags``."""
    def loss(temperature):
        r = insulated_pipe(pipe_outer_diameter, temperature, layers, length=1.0, tolerance=1e-8, surroundings=around,
                           **pipe_keywords)
        flags.add(r.warnings)
        return r.q_per_length
    return loss


def frozen_coefficient(loss, reference_temperature, air_temperature):
    """U' = q'(T_ref) / (T_ref - T_a) [W/m/K]; within 0.01 K of the air, taken 1 K above it."""
    ta = np.asarray(air_temperature, dtype=float)
    near = np.abs(reference_temperature - ta) < 0.01
    t_ref = np.where(near, ta + 1.0, reference_temperature)
    return loss(t_ref) / (t_ref - ta)
