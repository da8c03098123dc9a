r"""Insulated (or bare) pipes with a known fluid temperature: solve for the outer surface.

The heat flow per metre through the wall and layers (a series of cylindrical
conduction resistances, with an optional inner film) must equal what the outer
surface gives to the air, the surroundings and the sky
(:class:`convlib.surface.OuterSurface`). The unknown outer surface temperature
is found for all points at once by :func:`convlib.wall.solve_face` (safeguarded
Newton steps inside a bracket, Chandrupatla's method for the points they leave) to
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

from .blocks import blocked
from .conductivity import Conductivity
from .errors import InputError
from .regimes import Flag
from .surface import OuterSurface, SurfaceResult, check_cross_flow, property_range_named
from .surroundings import Surroundings, resolve
from .validation import LAYER_THICKNESS_MAX, as_array, as_bounded, as_size
from .wall import solve_face

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


@blocked
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

    r_film, r_wall = _inside_resistances(d_pipe, inner_coefficient, pipe_wall_thickness, pipe_conductivity)
    r_fixed = r_film + r_wall
    with property_range_named("fluid_temperature, air_temperature"):
        solved = solve_face(outer, tf, layers, kind="cylinder", inner_diameter=d_pipe, fixed_resistance=r_fixed,
                            tolerance=tolerance)
        ts, converged = solved.surface_temperature, solved.converged
        exchange = outer.exchange(ts)
    shape = ts.shape
    drops = solved.drops
    surface = outer.result(exchange)
    q_line = surface.q_per_length  # per metre of pipe (run length = length)

    temps, names, flags = _interfaces(tf, q_line, shape, layers, drops, ts, surface.warnings,
                                      r_film if inner_coefficient is not None else None,
                                      r_wall if pipe_wall_thickness is not None else None)
    flags |= np.where(converged, 0, Flag.NOT_CONVERGED).astype(np.int16)
    base = {f.name: getattr(surface, f.name) for f in fields(SurfaceResult)}
    base["warnings"] = np.broadcast_to(flags, shape).copy()
    return PipeResult(**base, fluid_temperature=np.broadcast_to(tf, shape).copy(),
                      outer_diameter=np.broadcast_to(d_out, shape).copy(),
                      interface_temperatures=np.stack([np.broadcast_to(x, shape) for x in temps]),
                      interface_names=tuple(names), converged=np.broadcast_to(converged, shape).copy())


def _inside_resistances(d_pipe, inner_coefficient, pipe_wall_thickness, pipe_conductivity):
    """Resistances per metre [K m/W] inside the layers: the inner film and the pipe wall (0 where not given)."""
    r_film = np.zeros(())
    if inner_coefficient is not None:
        h_in = as_array("inner_coefficient", inner_coefficient, unit="W/m2/K", low=0.0, low_inclusive=False)
        wall = 0.0 if pipe_wall_thickness is None else as_array("pipe_wall_thickness", pipe_wall_thickness,
                                                               unit="m", low=0.0)
        r_film = r_film + 1.0 / (np.pi * (d_pipe - 2.0 * wall) * h_in)
    if (pipe_wall_thickness is None) != (pipe_conductivity is None):
        raise InputError("give both pipe_wall_thickness [m] and pipe_conductivity [W/m/K], or neither",
                         field="pipe_wall_thickness, pipe_conductivity", rule="both or neither",
                         value=(pipe_wall_thickness, pipe_conductivity))
    r_wall = np.zeros(())
    if pipe_wall_thickness is not None:
        wall = as_array("pipe_wall_thickness", pipe_wall_thickness, unit="m", low=0.0)
        k_wall = as_array("pipe_conductivity", pipe_conductivity, unit="W/m/K", low=0.0, low_inclusive=False)
        if np.any(2.0 * wall >= d_pipe):
            raise InputError(f"pipe_wall_thickness must be less than half the pipe_outer_diameter; got "
                             f"{np.max(wall):g} m for a {np.min(d_pipe):g} m pipe", field="pipe_wall_thickness",
                             rule="less than half the pipe_outer_diameter", value=float(np.max(wall)))
        r_wall = _drops(0.5 * d_pipe - wall, 0.5 * d_pipe) / k_wall
    return r_film, r_wall


def _interfaces(tf, q_line, shape, layers, drops, ts, warnings, r_film=None, r_wall=None):
    """Interface temperatures from the inside out, their names, and the warnings with k(T) extrapolation flagged.

    ``r_film`` / ``r_wall`` [K m/W]: None where the pipe has no inner film / wall given.
    """
    temps, names = [], []
    t = np.broadcast_to(tf, shape).astype(float)
    if r_film is not None:
        t = t - q_line * r_film
        temps.append(t)
        names.append("pipe inner surface")
    if r_wall is not None:
        t = t - q_line * r_wall
        temps.append(t)
        names.append("pipe outer surface")
    elif r_film is None:
        temps.append(t)
        names.append("pipe outer surface")
    flags = warnings.copy()
    for j, layer in enumerate(layers):
        t_next = layer.conductivity.temperature_after(t, q_line * drops[j])
        flags |= np.where(layer.conductivity.outside_range(t, t_next) & (layer.thickness > 0),
                          Flag.CONDUCTIVITY_EXTRAPOLATED, 0).astype(np.int16)
        t = np.broadcast_to(t_next, shape)
        temps.append(t)
        names.append(f"{layer.name} outer surface")
    if layers:
        temps[-1] = np.broadcast_to(ts, shape)  # the solved surface, exact
    return temps, names, flags
