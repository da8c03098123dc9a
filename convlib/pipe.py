r"""Insulated (or bare) pipes with a known fluid temperature: solve for the outer surface.

The heat flow per metre through the wall and layers (a series of cylindrical
conduction resistances, with an optional inner film) must equal what the outer
surface gives to the air, the surroundings and the sky
(:class:`convlib.surface.OuterSurface`). The unknown outer surface temperature
is found for all points at once with a bracketed root finder
(Chandrupatla's method, :func:`convlib.roots.find_root`) to
``tolerance`` kelvin; points that converge leave the active set.

.. math::
    q' = \frac{T_f - T_s}{\frac{1}{2\pi r_i h_i} + \frac{\ln(r_o/r_i)}{2\pi k_w}
         + \sum_j \frac{\ln(r_{j+1}/r_j)}{2\pi \bar k_j}}
    = \pi D_s\, q''_{out}(T_s)

Layers whose conductivity depends on temperature use the exact integral mean
:math:`\bar k_j` (Kirchhoff transform) for data of either form (see
:mod:`convlib.conductivity`), so each layer's heat flow rises strictly with its
temperature drop and the solution is unique.
"""
from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np

from .conductivity import Conductivity
from .errors import InputError
from .regimes import Flag
from .roots import find_root
from .surface import OuterSurface, SurfaceResult, check_cross_flow, property_range_named
from .surroundings import Surroundings, resolve
from .validation import LAYER_THICKNESS_MAX, as_array, as_bounded, as_size

__all__ = ["Layer", "PipeResult", "insulated_pipe"]


@dataclass(frozen=True, eq=False)
class Layer:
    """One layer around the pipe: insulation, jacket, coating.

    Parameters
    ----------
    thickness : numeric
        Radial thickness [m], 0 to 10 (0: the layer is absent; arrays broadcast with the other inputs).
    conductivity : float or Conductivity
        [W/m/K]; a number is a constant, see :class:`convlib.conductivity.Conductivity`
        for k(T) as a polynomial or a table.
    name : str
        Label for results.

    Examples
    --------
    >>> Layer(thickness=0.05, conductivity=0.04).conductivity.at(300.0).item()
    0.04
    """

    thickness: object
    conductivity: object = 0.04
    name: str = "insulation"

    def __post_init__(self):
        object.__setattr__(self, "thickness", as_bounded(f"{self.name} thickness", self.thickness, unit="m",
                                                         accepted=(0.0, LAYER_THICKNESS_MAX)))
        object.__setattr__(self, "conductivity", Conductivity.of(self.conductivity))


@dataclass(frozen=True)
class PipeResult(SurfaceResult):
    """A :class:`SurfaceResult` of the outer surface plus the pipe's own quantities."""

    fluid_temperature: np.ndarray = None          # [K]
    outer_diameter: np.ndarray = None             # outer diameter of the last layer [m]
    interface_temperatures: np.ndarray = None     # (n_interfaces, *shape) from inside out [K]
    interface_names: tuple = ()
    converged: np.ndarray = None                  # bool per point


def _drops(radii_inner, radii_outer):
    """ln(r2/r1)/(2 pi) per layer [-]: conduction 'potential' drop per W/m."""
    return np.log(radii_outer / radii_inner) / (2.0 * np.pi)


def insulated_pipe(
    pipe_outer_diameter,
    fluid_temperature,
    layers=(),
    *,
    air_temperature=None,
    jacket_emissivity=0.9,
    wind_speed=None,
    length=1.0,
    pipe_wall_thickness=None,
    pipe_conductivity=None,
    inner_coefficient=None,
    surroundings_temperature=None,
    sky_view_fraction=None,
    sky_temperature=None,
    solar_irradiance=None,
    solar_absorptivity=None,
    pressure=None,
    natural=None,
    forced=None,
    mixing_exponent=None,
    exact_properties=False,
    convection_factor=1.0,
    convection_coefficient=None,
    tolerance=1e-6,
    surroundings: Surroundings | None = None,
) -> PipeResult:
    r"""Heat loss (or gain) and outer surface temperature of a horizontal pipe with layers.

    Parameters
    ----------
    pipe_outer_diameter : numeric
        Outer diameter of the pipe itself [m], 1e-6 to 1e6 (see :mod:`convlib.pipe_sizes` for NPS).
    fluid_temperature : numeric
        Temperature of the fluid inside [K]; below the air temperature for a cold line.
    layers : sequence of Layer
        From the pipe outwards (e.g. insulation, then jacket); empty for a bare pipe.
    air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature, solar_irradiance,
    pressure
        Fields of the surroundings, as in :class:`convlib.surroundings.Surroundings`; or give ``surroundings``.
    jacket_emissivity : numeric
        Emissivity of the outermost surface [-].
    length, solar_absorptivity, natural, forced, mixing_exponent, exact_properties, convection_factor,
    convection_coefficient
        As in :func:`convlib.surface.bare_surface`.
    pipe_wall_thickness : numeric, optional
        Pipe wall thickness [m]; with ``pipe_conductivity`` adds the wall's resistance.
    pipe_conductivity : numeric, optional
        Conductivity of the pipe wall [W/m/K] (carbon steel about 45-50).
    inner_coefficient : numeric, optional
        Inside film coefficient [W/m2/K]; default: the inner surface is at the fluid temperature.
    tolerance : float
        Absolute tolerance on the surface temperature [K].
    surroundings : Surroundings, optional
        The surroundings as one object, instead of their keywords (not both).

    Returns
    -------
    PipeResult
        Every :class:`SurfaceResult` field for the outer surface, plus the interface
        temperatures from the inside out and a convergence flag per point.

    Examples
    --------
    A 4 in (114.3 mm) steam line at 180 degC with 50 mm of insulation, k = 0.045, aluminium jacket:

    >>> r = insulated_pipe(0.1143, 453.15, [Layer(0.05, 0.045)], air_temperature=293.15,
    ...                    jacket_emissivity=0.1)
    >>> round(float(r.q_per_length), 1), round(float(r.surface_temperature) - 273.15, 1)
    (63.1, 39.7)
    """
    d_pipe = as_size("pipe_outer_diameter", pipe_outer_diameter)
    tf = as_array("fluid_temperature", fluid_temperature, unit="K", low=0.0, low_inclusive=False)
    layers = list(layers)
    for layer in layers:
        if not isinstance(layer, Layer):
            raise InputError(f"layers must be Layer objects (thickness, conductivity); got {layer!r}", field="layers",
                             rule="Layer objects", value=layer)
    radii = [0.5 * d_pipe]
    for layer in layers:
        radii.append(radii[-1] + layer.thickness)
    d_out = 2.0 * radii[-1]
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    check_cross_flow("horizontal_cylinder", around)
    outer = OuterSurface.build(
        "horizontal_cylinder", diameter=d_out, length=length, emissivity=jacket_emissivity,
        solar_absorptivity=solar_absorptivity, natural=natural, forced=forced,
        mixing_exponent=mixing_exponent, exact_properties=exact_properties, convection_factor=convection_factor,
        convection_coefficient=convection_coefficient, **around.surface_keywords())

    # ---- fixed resistances [K m/W] inside the layers: inner film and pipe wall
    r_fixed = np.zeros(())
    names = []
    if inner_coefficient is not None:
        h_in = as_array("inner_coefficient", inner_coefficient, unit="W/m2/K", low=0.0, low_inclusive=False)
        wall = 0.0 if pipe_wall_thickness is None else as_array("pipe_wall_thickness", pipe_wall_thickness,
                                                               unit="m", low=0.0)
        r_fixed = r_fixed + 1.0 / (np.pi * (d_pipe - 2.0 * wall) * h_in)
    if (pipe_wall_thickness is None) != (pipe_conductivity is None):
        raise InputError("give both pipe_wall_thickness [m] and pipe_conductivity [W/m/K], or neither",
                         field="pipe_wall_thickness, pipe_conductivity", rule="both or neither",
                         value=(pipe_wall_thickness, pipe_conductivity))
    r_film = r_fixed
    r_wall = np.zeros(())
    if pipe_wall_thickness is not None:
        wall = as_array("pipe_wall_thickness", pipe_wall_thickness, unit="m", low=0.0)
        k_wall = as_array("pipe_conductivity", pipe_conductivity, unit="W/m/K", low=0.0, low_inclusive=False)
        if np.any(2.0 * wall >= d_pipe):
            raise InputError(f"pipe_wall_thickness must be less than half the pipe_outer_diameter; got "
                             f"{np.max(wall):g} m for a {np.min(d_pipe):g} m pipe", field="pipe_wall_thickness",
                             rule="less than half the pipe_outer_diameter", value=float(np.max(wall)))
        r_wall = _drops(0.5 * d_pipe - wall, 0.5 * d_pipe) / k_wall
        r_fixed = r_fixed + r_wall
    drops = [_drops(radii[j], radii[j + 1]) for j in range(len(layers))]
    all_constant = all(layer.conductivity.is_constant for layer in layers)

    shape = np.broadcast_shapes(tf.shape, d_out.shape, np.shape(r_fixed), *(o.shape for o in outer.point_arrays()),
                                *(np.shape(layer.conductivity.constant_value) for layer in layers
                                  if layer.conductivity.is_constant))
    full = lambda a: np.broadcast_to(np.asarray(a, dtype=float), shape)  # noqa: E731
    if all_constant:
        # one lumped resistance: film + wall + layers in series
        r_inside = r_fixed + sum((d / layer.conductivity.constant_value for d, layer in zip(drops, layers)),
                                 np.zeros(()))
        layer_args = ()
    else:
        r_inside = r_fixed
        layer_args = tuple(full(d) for d in drops)
    n_layer_args = len(layer_args)
    args = (full(tf), full(r_inside), full(d_out), *layer_args, *(full(a) for a in outer.point_arrays()))

    def residual(ts, tf_, r_inside_, d_, *rest):
        layer_drops, point = rest[:n_layer_args], rest[n_layer_args:]
        q_out = outer.exchange(ts, *point, flux_only=True) * np.pi * d_
        if all_constant:
            with np.errstate(divide="ignore", invalid="ignore"):
                q_in = (tf_ - ts) / r_inside_
        else:
            q_in = _stack_flow(ts, tf_, r_inside_, layer_drops, layers)
        return q_in - q_out

    # A point with no resistance at all (bare pipe, no film, no wall) sits at the fluid temperature.
    no_resistance = np.broadcast_to(np.asarray(r_fixed) <= 0, shape)
    for layer in layers:
        no_resistance = no_resistance & (layer.thickness <= 0)
    with property_range_named("fluid_temperature, air_temperature"):
        ts, converged = _solve_surface(residual, args, outer, tolerance, no_resistance)
        exchange = outer.exchange(ts)
    surface = outer.result(exchange)
    q_line = surface.q_per_length  # per metre of pipe (run length = length)

    # ---- interface temperatures from the inside out
    temps, names = [], []
    t = np.broadcast_to(tf, shape).astype(float)
    if inner_coefficient is not None:
        t = t - q_line * r_film
        temps.append(t)
        names.append("pipe inner surface")
    if pipe_wall_thickness is not None:
        t = t - q_line * r_wall
        temps.append(t)
        names.append("pipe outer surface")
    elif inner_coefficient is None:
        temps.append(t)
        names.append("pipe outer surface")
    flags = surface.warnings.copy()
    for j, layer in enumerate(layers):
        t_next = layer.conductivity.temperature_after(t, q_line * drops[j])
        flags |= np.where(layer.conductivity.outside_range(t, t_next) & (layer.thickness > 0),
                          Flag.CONDUCTIVITY_EXTRAPOLATED, 0).astype(np.int16)
        t = np.broadcast_to(t_next, shape)
        temps.append(t)
        names.append(f"{layer.name} outer surface")
    if layers:
        temps[-1] = np.broadcast_to(ts, shape)  # the solved surface, exact
    flags |= np.where(converged, 0, Flag.NOT_CONVERGED).astype(np.int16)
    base = {f.name: getattr(surface, f.name) for f in fields(SurfaceResult)}
    base["warnings"] = np.broadcast_to(flags, shape).copy()
    return PipeResult(**base, fluid_temperature=np.broadcast_to(tf, shape).copy(),
                      outer_diameter=np.broadcast_to(d_out, shape).copy(),
                      interface_temperatures=np.stack([np.broadcast_to(x, shape) for x in temps]),
                      interface_names=tuple(names), converged=np.broadcast_to(converged, shape).copy())


def _stack_flow(ts, tf, r_inside, drops, layers):
    """q' [W/m] through film, wall and layers with temperature-dependent conductivity.

    Marches from the fluid outwards through the layers in their order (each through
    its Kirchhoff potential, see :mod:`convlib.conductivity`) and finds, by a
    bracketed solve, the q' whose march ends at the surface temperature ``ts``.
    The march's end temperature falls strictly as q' rises, so that q' is unique.
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
        k_min.append(k.min())
        k_max.append(k.max())
    r_low = r_inside + sum(d / k for d, k in zip(drops, k_max))
    r_high = r_inside + sum(d / k for d, k in zip(drops, k_min))
    q_a, q_b = (tf - ts) / r_low, (tf - ts) / r_high
    q_lo = np.minimum(q_a, q_b) - 1e-9 * np.abs(q_a) - 1e-12
    q_hi = np.maximum(q_a, q_b) + 1e-9 * np.abs(q_a) + 1e-12
    res = find_root(end_temperature, q_lo, q_hi, args=(tf, ts, r_inside, *drops), xatol=1e-12, xrtol=1e-13)
    # A failed solve is never passed on as a number: NaN makes the surface solve drop the point and report it.
    return np.where(res.success, res.x, np.nan)


def _solve_surface(residual, args, outer, tolerance, direct):
    """Bracket and solve residual(ts, *args) = 0 for every point; returns (ts, converged).

    A point the solver cannot settle (including one whose residual is NaN because an inner solve failed)
    raises ``InputError``: what is returned has converged everywhere.

    ``direct`` marks points without resistance: their surface is at the fluid temperature.
    """
    tf = args[0]
    ta = np.broadcast_to(outer.air_temperature, tf.shape)
    env = [ta, np.broadcast_to(outer.surroundings_temperature, tf.shape),
           np.broadcast_to(outer.sky_temperature, tf.shape)]
    lo = np.minimum.reduce([tf, *env])
    hi = np.maximum.reduce([tf, *env])
    if np.any(direct):
        lo, hi = np.where(direct, tf - 1.0, lo), np.where(direct, tf + 1.0, hi)
    # Sun can lift a surface above everything around it: widen the top of the bracket.
    solar = np.broadcast_to(outer.solar_per_area, tf.shape)
    hi = hi + np.where(solar > 0, solar / 2.0, 0.0) + 0.5
    lo = np.maximum(lo - 0.5, 0.5 * lo)
    with np.errstate(all="ignore"):
        res = find_root(residual, lo, hi, args=args, xatol=tolerance, xrtol=0.0)
        x, success = np.array(res.x, dtype=float), np.array(res.success, dtype=bool)
        lo, hi = np.array(lo, dtype=float), np.array(hi, dtype=float)
        # Widen the few brackets that held no sign change (strong sun, odd surroundings) and retry them;
        # a point whose residual is not finite at its bracket (an inner solve failed) is not widened but reported.
        stuck = np.zeros_like(success)
        for _ in range(6):
            bad = ~success & ~direct & ~stuck
            if not bad.any():
                break
            part = tuple(a[bad] for a in args)
            finite = np.isfinite(residual(lo[bad], *part)) & np.isfinite(residual(hi[bad], *part))
            stuck[bad] = ~finite
            bad = ~success & ~direct & ~stuck
            if not bad.any():
                break
            width = hi[bad] - lo[bad]
            lo_b, hi_b = np.maximum(lo[bad] - width, 0.5 * lo[bad]), hi[bad] + width
            lo[bad], hi[bad] = lo_b, hi_b
            retry = find_root(residual, lo_b, hi_b, args=tuple(a[bad] for a in args), xatol=tolerance, xrtol=0.0)
            x[bad], success[bad] = retry.x, retry.success
    ts = np.where(direct, tf, x)
    converged = direct | success
    if not np.all(converged):
        bad = np.flatnonzero(~converged.ravel())[:3]
        raise InputError(f"outer surface temperature could not be found at {np.count_nonzero(~converged)} "
                         f"point(s) (first indices {bad.tolist()}); check the inputs there", field="inputs",
                         rule="a combination whose outer surface temperature the solver finds", value=bad.tolist())
    return ts, converged
