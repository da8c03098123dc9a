r"""The one wall solver: a face with its layers, exchanging with the surroundings.

Every piece of equipment is a set of faces: a pipe is one cylindrical face, a spherical tank one spherical
face, a vertical tank a cylindrical wall and flat roof and floor, a duct four flat faces. Each face may carry
an inner film and a wall (a fixed resistance) and layers (:class:`convlib.pipe.Layer`, constant k or k(T)),
and exchanges heat with its surroundings through :meth:`convlib.surface.OuterSurface.exchange` (the
registry's laws). :func:`solve_face` finds the outer surface temperature of every point at once:

.. math:: \frac{T_f - T_s}{R_{fixed} + \sum_j \delta_j / k_j} = A'\,q''(T_s)

with the conduction factors :math:`\delta_j` of :func:`shell_drop` (per metre of a cylinder, for the whole
shell of a sphere, per m2 of a flat face; Incropera et al., *Fundamentals of Heat and Mass Transfer*, 6th ed.,
eqs. 3.6, 3.28 and 3.36) and :math:`A'` the outer area on the same basis (:math:`\pi D` per metre, :math:`\pi
D^2`, 1). Layers with k(T) are marched through their Kirchhoff potentials (:func:`layered_flow`). The root is
bracketed between the fluid's and the surroundings' temperatures and found by safeguarded Newton steps
(:func:`convlib.roots.newton_decreasing`, the outer flux and its slope from :class:`convlib.flux.FluxSlope`),
then by Chandrupatla's method (:func:`convlib.roots.find_root`) for any point those leave; the per-point inputs
travel by name (:class:`FacePoints`), subset by the index of the points still searching.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .flux import FluxSlope
from .radiation import STEFAN_BOLTZMANN
from .roots import find_root, newton_decreasing

__all__ = ["FACE_KINDS", "FacePoints", "FaceSolution", "shell_drop", "layer_drops", "layered_flow", "solve_face"]

#: Kinds of face: a cylinder (per metre), a whole sphere, a flat face (per m2).
FACE_KINDS = ("cylinder", "sphere", "flat")


def shell_drop(kind, r1, r2):
    """Conduction resistance times conductivity of a shell from radius r1 to r2: ln(r2/r1)/(2 pi) per metre
    of a cylinder, (1/r1 - 1/r2)/(4 pi) of a whole sphere, the thickness r2 - r1 per m2 of a flat face
    (Incropera et al., 6th ed., eqs. 3.6, 3.28 and 3.36).

    >>> round(float(shell_drop("cylinder", 0.05, 0.1)) * 2 * np.pi, 6)   # ln 2
    0.693147
    """
    if kind == "cylinder":
        return np.log(r2 / r1) / (2.0 * np.pi)
    if kind == "sphere":
        return (1.0 / r1 - 1.0 / r2) / (4.0 * np.pi)
    return r2 - r1


def layer_drops(layers, kind, inner_diameter):
    """Per-layer conduction factors (:func:`shell_drop`) and the outer diameter of the last layer [m]."""
    from .pipe import Layer  # the layer type lives with the pipe, its first user

    drops, radius = [], 0.5 * np.asarray(inner_diameter, dtype=float)
    for layer in layers:
        if not isinstance(layer, Layer):
            raise InputError(f"layers must be Layer objects (thickness, conductivity); got {layer!r}", field="layers",
                             rule="Layer objects", value=layer)
        if kind == "flat":
            drops.append(layer.thickness)
        else:
            drops.append(shell_drop(kind, radius, radius + layer.thickness))
            radius = radius + layer.thickness
    return drops, 2.0 * radius


def layered_flow(ts, tf, r_inside, drops, layers):
    """Heat flow [W per basis] through a fixed resistance and layers with temperature-dependent conductivity.

    Marches from the fluid outwards through the layers in their order (each through its Kirchhoff potential,
    see :mod:`convlib.conductivity`) and finds, by a bracketed solve, the flow whose march ends at the surface
    temperature ``ts``. The march's end temperature falls strictly as the flow rises, so that it is unique.
    NaN where the solve fails (the surface solve then drops and reports the point).
    """
    def end_temperature(q, tf_, ts_, r_inside_, *drops_):
        t = tf_ - q * r_inside_
        for layer, drop in zip(layers, drops_):
            t = layer.conductivity.temperature_after(t, q * drop)
        return t - ts_

    # bracket from the extreme conductivities of each layer's data
    k_min, k_max = [], []
    for layer in layers:
        c = layer.conductivity
        k = c.constant_value if c.is_constant else c.at(np.linspace(*np.clip(c.valid_range, 1.0, 3000.0), 64))
        k_min.append(np.min(k))
        k_max.append(np.max(k))
    r_low = r_inside + sum(d / k for d, k in zip(drops, k_max))
    r_high = r_inside + sum(d / k for d, k in zip(drops, k_min))
    q_a, q_b = (tf - ts) / r_low, (tf - ts) / r_high
    q_lo = np.minimum(q_a, q_b) - 1e-9 * np.abs(q_a) - 1e-12
    q_hi = np.maximum(q_a, q_b) + 1e-9 * np.abs(q_a) + 1e-12
    res = find_root(end_temperature, q_lo, q_hi, args=(tf, ts, r_inside, *drops), xatol=1e-12, xrtol=1e-13)
    return np.where(res.success, res.x, np.nan)


@dataclass(frozen=True)
class FacePoints:
    """The per-point inputs of a face solve by name: flat arrays of one length.

    ``resistance`` is the whole conduction resistance where every layer has a constant k, else the fixed
    part (film and wall) with ``drops`` the layers' conduction factors; ``outer`` the inputs of
    :meth:`convlib.surface.OuterSurface.exchange` by name.
    """

    fluid_temperature: np.ndarray
    area_factor: np.ndarray
    resistance: np.ndarray
    drops: tuple
    outer: dict

    def take(self, index) -> "FacePoints":
        """The points ``index``; an input equal for every point is kept as it is (a 0-d array)."""
        pick = lambda a: a if a.ndim == 0 else a[index]  # noqa: E731
        return FacePoints(pick(self.fluid_temperature), pick(self.area_factor), pick(self.resistance),
                          tuple(pick(d) for d in self.drops), {k: pick(v) for k, v in self.outer.items()})


@dataclass(frozen=True)
class FaceSolution:
    """Outer surface temperature of a face [K], its outer diameter [m] (NaN for a flat face), and per point
    whether the solve converged (every point has, or :func:`solve_face` raised); arrays of the input shape."""

    surface_temperature: np.ndarray
    outer_diameter: np.ndarray
    converged: np.ndarray
    drops: tuple


def solve_face(outer, fluid_temperature, layers=(), *, kind="cylinder", inner_diameter=None, fixed_resistance=0.0,
               tolerance=1e-6) -> FaceSolution:
    """Outer surface temperature of a face with layers, the fluid inside at ``fluid_temperature`` [K].

    Parameters
    ----------
    outer : convlib.surface.OuterSurface
        The face's outer surface and its surroundings (validated).
    fluid_temperature : numeric
        [K]
    layers : sequence of Layer
        From the inside outwards.
    kind : {"cylinder", "sphere", "flat"}
        Basis of the conduction factors and of the heat flow: per metre, per shell, per m2.
    inner_diameter : numeric
        Diameter under the first layer [m] (cylinder, sphere).
    fixed_resistance : numeric
        Inner film and wall on the same basis [K m/W, K/W or m2 K/W].
    tolerance : float
        Absolute tolerance on the surface temperature [K].

    Raises
    ------
    InputError
        Where a point's surface temperature cannot be found (never returned as a number).
    """
    if kind not in FACE_KINDS:
        raise InputError(f"unknown face kind {kind!r}; choose one of: {', '.join(FACE_KINDS)}", field="kind",
                         rule=f"one of: {', '.join(FACE_KINDS)}", value=kind)
    drops, outer_diameter = layer_drops(layers, kind, 0.0 if inner_diameter is None else inner_diameter)
    if kind == "cylinder":
        area_factor = np.pi * outer_diameter
    elif kind == "sphere":
        area_factor = np.pi * outer_diameter ** 2
    else:
        area_factor, outer_diameter = np.ones(()), np.full((), np.nan)
    constant = all(layer.conductivity.is_constant for layer in layers)
    fixed = np.asarray(fixed_resistance, dtype=float)
    named = outer.point_fields()
    shape = np.broadcast_shapes(np.shape(fluid_temperature), np.shape(area_factor), fixed.shape,
                                *(np.shape(d) for d in drops), *(np.shape(v) for v in named.values()),
                                *(np.shape(layer.conductivity.constant_value) for layer in layers
                                  if layer.conductivity.is_constant))
    # per-point inputs as flat arrays; an input with one value for every point stays a 0-d array
    flat = lambda a: (np.asarray(a, dtype=float).reshape(()) if np.size(a) == 1  # noqa: E731
                      else np.broadcast_to(np.asarray(a, dtype=float), shape).ravel())
    if constant:
        resistance = sum((d / layer.conductivity.constant_value for d, layer in zip(drops, layers)), fixed)
        layer_drops_flat = ()
    else:
        resistance = fixed
        layer_drops_flat = tuple(flat(d) for d in drops)
    points = FacePoints(flat(fluid_temperature), flat(area_factor), flat(resistance), layer_drops_flat,
                        {name: flat(v) for name, v in named.items()})

    flux = FluxSlope(outer, points.outer)

    def residual(ts, index):
        """Inner flow minus outer flow per basis, and its slope in ts (outer properties held; for k(T)
        layers the inner slope is the secant from the fluid)."""
        p = points.take(index)
        q_out, slope_out = flux(ts, p.outer)
        with np.errstate(divide="ignore", invalid="ignore"):
            if constant:
                q_in = (p.fluid_temperature - ts) / p.resistance
                slope_in = -1.0 / p.resistance
            else:
                q_in = layered_flow(ts, p.fluid_temperature, p.resistance, p.drops, layers)
                slope_in = -q_in / (p.fluid_temperature - ts)
        return q_in - q_out * p.area_factor, slope_in - slope_out * p.area_factor

    # A point with no resistance at all (no film, no wall, no layer) sits at the fluid temperature.
    direct = np.broadcast_to(fixed <= 0, shape)
    for layer in layers:
        direct = direct & (layer.thickness <= 0)
    guess = _first_guess(points, layers, constant)
    ts, converged = _solve(residual, points, np.broadcast_to(direct, shape).ravel(), tolerance, guess)
    full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    return FaceSolution(surface_temperature=ts.reshape(shape), outer_diameter=full(outer_diameter),
                        converged=converged.reshape(shape), drops=tuple(drops))


def _first_guess(points: FacePoints, layers, constant):
    """Where the Newton iteration starts: the surface of a rough outer coefficient in series with the wall."""
    tf, ta = points.fluid_temperature, points.outer["air_temperature"]
    resistance = points.resistance
    if not constant:
        middle = 0.5 * (tf + ta)
        resistance = resistance + sum(d / layer.conductivity.at(middle) for d, layer in zip(points.drops, layers))
    # a rough outer coefficient [W/m2/K] (convection rising with the wind, linearised radiation at the air
    # temperature): only where the iteration starts, it moves no result (common practice, no source)
    wind, emissivity = points.outer["wind_speed"], points.outer["emissivity"]
    h_guess = 5.0 + 6.0 * wind ** 0.6 + 4.0 * STEFAN_BOLTZMANN * emissivity * ta ** 3
    r_surface = 1.0 / (h_guess * points.area_factor)
    with np.errstate(divide="ignore", invalid="ignore"):
        return ta + (tf - ta) * r_surface / (resistance + r_surface)


def _solve(residual, points: FacePoints, direct, tolerance, guess):
    """Bracket and solve residual(ts, index) = 0 for every (flat) point; returns (ts, converged).

    Newton steps first (:func:`convlib.roots.newton_decreasing`, from ``guess``); the points they do not
    settle go to Chandrupatla's method (:func:`convlib.roots.find_root`), which evaluates the bracket's ends
    and widens brackets without a sign change. A point neither settles (including one whose residual is NaN
    because an inner solve failed) raises ``InputError``: what is returned has converged everywhere.
    """
    n = direct.size
    full = lambda a: np.broadcast_to(a, (n,))  # noqa: E731
    tf = full(points.fluid_temperature)
    o = {k: full(points.outer[k]) for k in ("air_temperature", "surroundings_temperature", "sky_temperature",
                                           "solar_per_area")}
    lo = np.minimum.reduce([tf, o["air_temperature"], o["surroundings_temperature"], o["sky_temperature"]])
    hi = np.maximum.reduce([tf, o["air_temperature"], o["surroundings_temperature"], o["sky_temperature"]])
    if np.any(direct):
        lo, hi = np.where(direct, tf - 1.0, lo), np.where(direct, tf + 1.0, hi)
    # Sun can lift a surface above everything around it: widen the top of the bracket.
    solar = o["solar_per_area"]
    hi = hi + np.where(solar > 0, solar / 2.0, 0.0) + 0.5
    lo = np.maximum(lo - 0.5, 0.5 * lo)
    every = np.arange(n)
    value = lambda ts, index: residual(ts, index)[0]  # noqa: E731
    with np.errstate(all="ignore"):
        start = np.clip(full(guess), lo + 0.01 * (hi - lo), hi - 0.01 * (hi - lo))
        start = np.where(np.isfinite(start), start, 0.5 * (lo + hi))
        res = newton_decreasing(residual, lo, hi, start, args=(every,), xatol=tolerance)
        x, success = np.array(res.x, dtype=float), np.array(res.success, dtype=bool)
        lo, hi = np.array(lo, dtype=float), np.array(hi, dtype=float)
        left = np.flatnonzero(~success & ~direct)
        if left.size:
            again = find_root(value, lo[left], hi[left], args=(every[left],), xatol=tolerance, xrtol=0.0)
            x[left], success[left] = again.x, again.success
        # Widen the few brackets that held no sign change (strong sun, odd surroundings) and retry them;
        # a point whose residual is not finite at its bracket (an inner solve failed) is not widened but reported.
        stuck = np.zeros_like(success)
        for _ in range(6):
            bad = ~success & ~direct & ~stuck
            if not bad.any():
                break
            finite = np.isfinite(value(lo[bad], every[bad])) & np.isfinite(value(hi[bad], every[bad]))
            stuck[bad] = ~finite
            bad = ~success & ~direct & ~stuck
            if not bad.any():
                break
            width = hi[bad] - lo[bad]
            lo_b, hi_b = np.maximum(lo[bad] - width, 0.5 * lo[bad]), hi[bad] + width
            lo[bad], hi[bad] = lo_b, hi_b
            retry = find_root(value, lo_b, hi_b, args=(every[bad],), xatol=tolerance, xrtol=0.0)
            x[bad], success[bad] = retry.x, retry.success
    ts = np.where(direct, tf, x)
    converged = direct | success
    if not np.all(converged):
        bad = np.flatnonzero(~converged)[:3]
        raise InputError(f"outer surface temperature could not be found at {np.count_nonzero(~converged)} "
                         f"point(s) (first indices {bad.tolist()}); check the inputs there", field="inputs",
                         rule="a combination whose outer surface temperature the solver finds", value=bad.tolist())
    return ts, converged
