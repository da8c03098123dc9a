r"""Vessels and ducts: heat lost (or gained) face by face.

A vessel or duct is a few flat or cylindrical faces, each one of the shapes of
:mod:`convlib.geometry`, evaluated with the outer-surface physics of
:mod:`convlib.surface` (natural / forced / mixed convection plus radiation):

* :func:`vertical_tank` -- wall (vertical cylinder), roof (horizontal plate facing up),
  floor on the ground (conduction into the soil), open underneath (plate facing down) or left out.
  Either every face is at a known ``surface_temperature`` (bare metal), or the fluid inside is at
  ``fluid_temperature`` and each face may carry layers (insulation, jacket) whose outer surface
  temperature is solved, as for :func:`convlib.pipe.insulated_pipe`.
* :func:`spherical_tank` -- one face, the shell (sphere), with optional inner film, wall and layers.
* :func:`rectangular_duct` -- sides (vertical plates), top and bottom (horizontal plates facing
  up and down), bare at a known surface temperature or insulated with the contents' temperature
  given; wind along the duct (plate laws) or across it (a square-section cross-flow law,
  :func:`nusselt_square_cylinder_jakob`).

Every input broadcasts (numpy arrays over cases); each face's arrays have the broadcast shape.

**Round faces as plates.** A disc of diameter :math:`D` (tank roof, open floor) is evaluated as
the rectangle of length :math:`\pi D/4` along the wind and width :math:`\pi D / (2(\pi - 2))`: it has
the disc's characteristic length :math:`A/P = D/4` exactly (the length of the horizontal-plate
laws, Goldstein, Sparrow & Jones (1973), doi:10.1016/0017-9310(73)90081-9, who proposed it for any
plan form, discs included), and its streamwise length is the disc's mean chord :math:`\pi D/4`
(for a laminar boundary layer, :math:`h \propto L^{-1/2}`, averaging the plate law over the
disc's chords gives the plate value at :math:`L = 0.81 D`, 3 % from the mean chord -- derived here).
The heat flow per unit area of that rectangle is applied to the disc's area :math:`\pi D^2/4`.
(An equal-area square, side :math:`D\sqrt\pi/2`, would give :math:`A/P = 0.22 D`, 11 % short.)

**Floor on the ground.** Steady conduction from an isothermal disc on the surface of a
semi-infinite medium (the rest of its surface adiabatic), shape factor :math:`S = 2D`
(Incropera et al., 6th ed., Table 4.1, from memory; the half-space version of the disc
capacitance :math:`8 R`), in series with any floor layers (slab, insulation) over the floor area:

.. math:: Q = \frac{T_{floor} - T_{ground}}{\sum_j t_j/(k_j A) + 1/(2 D k_{soil})}

An estimate: it ignores the soil's heat capacity (a slow warm-up takes months), ground water and
the heat flow through the soil surface around the tank.
"""
from __future__ import annotations

import dataclasses
import functools
import inspect
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from . import correlations as corr
from .correlations.forced import nusselt_square_cylinder_crossflow_jakob
from .correlations.mixed import combine, default_mixing_exponent
from .design import COMMERCIAL_THICKNESSES, listed_thickness
from .errors import InputError
from .pipe import Layer
from .properties import fluid_properties
from .radiation import SKY_VIEW_FRACTION_TYPICAL
from .regimes import Flag, convection_mode
from .roots import find_root
from .surface import GRAVITY, OuterSurface, SurfaceResult
from .validation import as_array, as_size, check_choice
from .surroundings import Surroundings, resolve
from .wall import layer_drops, shell_drop, solve_face

__all__ = ["GROUND_CONDUCTIVITY", "FLOORS", "WIND_DIRECTIONS", "SQUARE_CYLINDER_RE_RANGE", "Face", "FacesResult",
           "disc_as_plate", "vertical_tank", "spherical_tank", "rectangular_duct", "FaceThickness",
           "insulation_per_face", "nusselt_square_cylinder_jakob"]

#: Conductivity of the soil under a tank [W/m/K]: the value EN ISO 13370 (heat transfer via the ground)
#: takes for clay or silt when the soil is unknown; sand or gravel 2.0, homogeneous rock 3.5 (from memory).
#: Dry soil is far lower (Incropera et al., 6th ed., Table A.3: 0.52 W/m/K, from memory). Override with
#: the site's value.
GROUND_CONDUCTIVITY = 1.5

FLOORS = ("ground", "open", "none")
WIND_DIRECTIONS = ("along", "across")

#: Reynolds range of the square-cylinder constants (Jakob 1949, as in Incropera et al., 6th ed., Table 7.3).
SQUARE_CYLINDER_RE_RANGE = corr.get("square_cylinder_crossflow", "jakob").re_range


@dataclass(frozen=True)
class Face:
    """One face of a vessel or duct; arrays of the broadcast input shape."""

    name: str                          # "wall", "roof", "floor", "sides", "top", "bottom"
    shape: str                         # shape of convlib.geometry used, or "ground"
    area: np.ndarray                   # exposed (or contact) area [m2]
    surface_temperature: np.ndarray    # outer surface (for the ground: floor-soil interface) [K]
    q_per_area: np.ndarray             # [W/m2], positive from the face outwards
    q_total: np.ndarray                # [W]
    h_convection: np.ndarray           # [W/m2/K]; NaN for ground contact
    h_radiation: np.ndarray            # [W/m2/K]; NaN for ground contact
    surface: SurfaceResult | None      # the outer-surface physics per unit area (None for ground contact)


@dataclass(frozen=True)
class FacesResult:
    """The faces of a vessel or duct and their total."""

    faces: tuple[Face, ...]
    q_total: np.ndarray                # sum over the faces [W]
    area: np.ndarray                   # sum of the face areas [m2]
    notes: tuple[str, ...]

    def face(self, name: str) -> Face:
        """The face called ``name``."""
        names = [f.name for f in self.faces]
        check_choice("face", name, names)
        return self.faces[names.index(name)]

    def rows(self) -> list[dict]:
        """One dict per face for tables (scalar cases: floats; arrays stay arrays)."""
        def show(a):
            return float(a) if np.ndim(a) == 0 else a
        return [{"face": f.name, "shape": f.shape, "area": show(f.area), "surface_temperature":
                 show(f.surface_temperature), "q_per_area": show(f.q_per_area), "q_total": show(f.q_total),
                 "h_convection": show(f.h_convection), "h_radiation": show(f.h_radiation)} for f in self.faces]


def disc_as_plate(diameter):
    r"""Rectangle (length along the wind, width) [m] that stands for a disc in the plate laws.

    Its :math:`A/P` equals the disc's :math:`D/4` and its length the disc's mean chord
    :math:`\pi D/4` (module docstring).

    Examples
    --------
    >>> length, width = disc_as_plate(4.0)
    >>> round(float(length), 4), round(float(width * length / (2 * (length + width))), 6)
    (3.1416, 1.0)
    """
    d = as_size("diameter", diameter)
    return np.pi * d / 4.0, np.pi * d / (2.0 * (np.pi - 2.0))


def _sky(outdoor, shape, around=None):
    """Sky view fraction of a face: typical for its orientation outdoors, else the surroundings' (0 indoors)."""
    if outdoor:
        return SKY_VIEW_FRACTION_TYPICAL[shape]
    return 0.0 if around is None else around.sky_view_fraction


def _solve_face(outer, fluid_temperature, layers, kind, inner_diameter, tolerance, fixed_resistance=0.0):
    """Outer surface temperature [K] and outer diameter of a face with layers: :func:`convlib.wall.solve_face`."""
    solved = solve_face(outer, fluid_temperature, layers, kind=kind, inner_diameter=inner_diameter,
                        fixed_resistance=fixed_resistance, tolerance=tolerance)
    return solved.surface_temperature, solved.outer_diameter


def _film(inner_coefficient):
    """Resistance of the inside film per m2 of inner surface [m2 K/W]: 1/h_i, 0 without one."""
    if inner_coefficient is None:
        return np.zeros(())
    return 1.0 / as_array("inner_coefficient", inner_coefficient, unit="W/m2/K", low=0.0, low_inclusive=False)


def _known_temperature(surface_temperature, fluid_temperature, what, **inside):
    """The temperature given inside [K]: a bare ``what``'s surface or its contents, exactly one of them.

    ``inside`` holds the inputs that need the contents (layers, wall, film): given with a bare surface they raise.
    """
    if (surface_temperature is None) == (fluid_temperature is None):
        raise InputError(f"give surface_temperature (a bare {what}) or fluid_temperature (the contents), one of them",
                         field="surface_temperature, fluid_temperature", rule="exactly one of them",
                         value=(surface_temperature, fluid_temperature))
    if fluid_temperature is not None:
        return as_array("fluid_temperature", fluid_temperature, unit="K", low=0.0, low_inclusive=False)
    given = [name for name, value in inside.items() if value is not None and value != []]
    if given:
        raise InputError(f"{', '.join(given)} need fluid_temperature: with surface_temperature the {what} is bare "
                         f"and its outer surface is at that temperature", field=", ".join(given),
                         rule="only with fluid_temperature", value=inside[given[0]])
    return as_array("surface_temperature", surface_temperature, unit="K", low=0.0, low_inclusive=False)


def _face(name, outer, ts, area, convection=None):
    """A Face from an OuterSurface at surface temperature ``ts`` scaled to ``area``."""
    surface = outer.result(outer.exchange(ts))
    if convection is not None:
        surface = convection(outer, surface)
    shape = np.broadcast_shapes(surface.q_per_area.shape, np.shape(area))
    full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    return Face(name=name, shape=outer.shape, area=full(area), surface_temperature=full(surface.surface_temperature),
                q_per_area=full(surface.q_per_area), q_total=full(surface.q_per_area * area),
                h_convection=full(surface.h_convection), h_radiation=full(surface.h_radiation), surface=surface)


def _total(faces, notes):
    shape = np.broadcast_shapes(*(f.q_total.shape for f in faces))
    total = sum((np.broadcast_to(f.q_total, shape) for f in faces), np.zeros(shape))
    area = sum((np.broadcast_to(f.area, shape) for f in faces), np.zeros(shape))
    return FacesResult(faces=tuple(faces), q_total=total, area=area, notes=tuple(notes))


def vertical_tank(diameter, height, *, surface_temperature=None, fluid_temperature=None,
                  wall_layers=(), roof_layers=(), floor="ground", floor_layers=(), emissivity=0.9,
                  outdoor=False, ground_temperature=None, ground_conductivity=GROUND_CONDUCTIVITY,
                  inner_coefficient=None, exact_properties=False, convection_factor=1.0, convection_coefficient=None,
                  tolerance=1e-6, surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None) -> FacesResult:
    r"""Heat lost (or gained) by a vertical cylindrical tank, face by face.

    Parameters
    ----------
    diameter, height : numeric
        Tank diameter and wall height [m] (of the shell; layers add outside).
    surface_temperature : numeric, optional
        Known temperature of every face [K] (a bare tank); no layers then.
    fluid_temperature : numeric, optional
        Temperature of the contents [K] (the tank full, inner faces at it); give this or
        ``surface_temperature``. With layers, each face's outer surface temperature is solved.
    wall_layers, roof_layers, floor_layers : sequence of Layer
        From the shell outwards (cylindrical on the wall, flat on roof and floor). Under a floor on
        the ground they are the slab and insulation (constant conductivity).
    floor : {"ground", "open", "none"}
        On a foundation (conduction into the soil, module docstring), raised with air underneath
        (plate facing down), or left out of the total.
    emissivity : numeric
        Long-wave emissivity of the outer surfaces (bare shell or jacket) [-].
    outdoor : bool
        Sky view per face from :data:`convlib.radiation.SKY_VIEW_FRACTION_TYPICAL` (wall 0.5,
        roof 1, open floor 0). The wind is horizontal: across the wall, along roof and open floor.
    exact_properties, convection_factor, convection_coefficient
        As in :func:`convlib.surface.bare_surface` (a given coefficient applies to every exposed face).
    ground_temperature : numeric, optional
        Undisturbed soil temperature [K]; default the air temperature (say the annual mean of the site).
    ground_conductivity : numeric
        Soil [W/m/K]; default :data:`GROUND_CONDUCTIVITY`.
    inner_coefficient : numeric, optional
        Film coefficient between the contents and the shell [W/m2/K] (with ``fluid_temperature``), on
        every face; default none (the thin shell at the contents' temperature).
    tolerance : float
        Surface temperature solve [K].
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords (still air,
        surroundings at the air, no sky, no sun, 101325 Pa by default). ``sky_view_fraction`` applies to every
        face; ``outdoor=True`` gives each face the typical fraction of its orientation instead.

    Returns
    -------
    FacesResult
        Faces ``wall``, ``roof`` and (unless ``floor="none"``) ``floor``, and their total.

    Examples
    --------
    A bare 10 m x 12 m tank at 60 degC in still air at 10 degC, floor on moist soil:

    >>> r = vertical_tank(10.0, 12.0, surface_temperature=333.15, air_temperature=283.15)
    >>> [f.name for f in r.faces], round(float(r.q_total) / 1e3, 1)
    (['wall', 'roof', 'floor'], 253.0)
    """
    check_choice("floor", floor, FLOORS)
    d = as_size("diameter", diameter)
    h = as_size("height", height)
    if surface_temperature is None and fluid_temperature is None:
        raise InputError("give surface_temperature (a bare tank) or fluid_temperature (the contents, with layers)",
                         field="surface_temperature, fluid_temperature", rule="exactly one of them", value=None)
    if surface_temperature is not None and fluid_temperature is not None:
        raise InputError("give surface_temperature or fluid_temperature, not both",
                         field="surface_temperature, fluid_temperature", rule="exactly one of them",
                         value=(surface_temperature, fluid_temperature))
    if surface_temperature is not None:
        inner = as_array("surface_temperature", surface_temperature, unit="K", low=0.0, low_inclusive=False)
        if any(len(tuple(x)) for x in (wall_layers, roof_layers)) or (floor != "ground" and len(tuple(floor_layers))):
            raise InputError("layers need fluid_temperature: with surface_temperature every face is bare",
                             field="wall_layers, roof_layers, floor_layers", rule="only with fluid_temperature",
                             value=(wall_layers, roof_layers, floor_layers))
        if inner_coefficient is not None:
            raise InputError("inner_coefficient needs fluid_temperature: with surface_temperature the shell is bare",
                             field="inner_coefficient", rule="only with fluid_temperature", value=inner_coefficient)
    else:
        inner = as_array("fluid_temperature", fluid_temperature, unit="K", low=0.0, low_inclusive=False)
    film = _film(inner_coefficient)
    wall_layers, roof_layers, floor_layers = list(wall_layers), list(roof_layers), list(floor_layers)
    if floor == "none" and floor_layers:
        raise InputError("floor_layers need floor='ground' or 'open'; the floor is left out", field="floor_layers",
                         rule="only with floor='ground' or 'open'", value=floor_layers)
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure, ground_temperature=ground_temperature)
    common = dict(air_temperature=around.air_temperature, wind_speed=around.wind_speed, emissivity=emissivity,
                  surroundings_temperature=around.surroundings_temperature, sky_temperature=around.sky_temperature,
                  solar_irradiance=around.solar_irradiance,
                  pressure=around.pressure, exact_properties=exact_properties, convection_factor=convection_factor,
                  convection_coefficient=convection_coefficient)
    notes = []

    def solve(outer, layers, kind, inner_diameter, fixed):
        if not layers and not np.any(fixed > 0):
            return inner, inner_diameter
        return _solve_face(outer, inner, layers, kind, inner_diameter, tolerance, fixed)

    # wall: a vertical cylinder of the insulated outer diameter (the film per metre: 1/(h_i pi D))
    _, d_wall = layer_drops(wall_layers, "cylinder", d)
    wall = OuterSurface.build("vertical_cylinder", diameter=d_wall, length=h,
                              sky_view_fraction=_sky(outdoor, "vertical_cylinder", around), **common)
    ts_wall, _ = solve(wall, wall_layers, "cylinder", d, film / (np.pi * d))
    faces = [_face("wall", wall, ts_wall, np.pi * d_wall * h)]

    # roof: the disc as its equivalent plate, facing up
    disc_area = np.pi * d ** 2 / 4.0
    plate_length, plate_width = disc_as_plate(d)
    roof = OuterSurface.build("horizontal_plate_up", length=plate_length, width=plate_width,
                              sky_view_fraction=_sky(outdoor, "horizontal_plate_up", around), **common)
    ts_roof, _ = solve(roof, roof_layers, "flat", d, film)
    faces.append(_face("roof", roof, ts_roof, disc_area))
    notes.append("roof as a plate with the disc's A/P = D/4 and mean chord pi D/4; heat per area times pi D^2/4")

    if floor == "open":
        under = OuterSurface.build("horizontal_plate_down", length=plate_length, width=plate_width,
                                   sky_view_fraction=_sky(outdoor, "horizontal_plate_down", around), **common)
        ts_floor, _ = solve(under, floor_layers, "flat", d, film)
        faces.append(_face("floor", under, ts_floor, disc_area))
    elif floor == "ground":
        faces.append(_ground_floor(d, inner, floor_layers, around.air_temperature, around.ground_temperature,
                                   ground_conductivity,
                                   film))
        notes.append("floor on the ground: disc on a semi-infinite soil, S = 2 D (steady state; an estimate)")
    else:
        notes.append("floor left out of the total")
    return _total(faces, notes)


def spherical_tank(diameter, *, surface_temperature=None, fluid_temperature=None, layers=(),
                   wall_thickness=None, wall_conductivity=None, inner_coefficient=None, emissivity=0.9,
                   outdoor=False, exact_properties=False, convection_factor=1.0, convection_coefficient=None,
                   tolerance=1e-6, surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None) -> FacesResult:
    r"""Heat lost (or gained) by a spherical vessel (storage sphere, ball tank): one face, the shell.

    The shell is a sphere of the ``sphere`` shape of :mod:`convlib.geometry` (natural convection
    Churchill 1983, wind Whitaker 1972, radiation to surroundings and sky). With the contents at
    ``fluid_temperature``, heat passes an optional inner film, the shell wall and the layers in
    series (spherical shells, :math:`(1/r_1 - 1/r_2)/(4\pi k)`, Incropera et al., 6th ed., eq. 3.36),
    and the outer surface temperature is solved. Legs, nozzles and manways are left out.

    Parameters
    ----------
    diameter : numeric
        Outer diameter of the shell [m] (layers add outside; the wall is inside it).
    surface_temperature, fluid_temperature : numeric
        Give one: a bare shell at a known temperature, or the contents [K].
    layers : sequence of Layer
        Insulation and jacket from the shell outwards.
    wall_thickness, wall_conductivity : numeric, optional
        Shell wall [m] and its conductivity [W/m/K], given together.
    inner_coefficient : numeric, optional
        Film coefficient between the contents and the wall [W/m2/K] (on the inner area).
    emissivity, exact_properties, convection_factor, convection_coefficient
        As in :func:`convlib.surface.bare_surface`.
    outdoor : bool
        Sky view fraction 0.5 (:data:`convlib.radiation.SKY_VIEW_FRACTION_TYPICAL`).
    tolerance : float
        Surface temperature solve [K].
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords (still air,
        surroundings at the air, no sky, no sun, 101325 Pa by default). ``sky_view_fraction`` applies to every
        face; ``outdoor=True`` gives each face the typical fraction of its orientation instead.

    Returns
    -------
    FacesResult
        One face, ``shell``.

    Examples
    --------
    A 12 m sphere of cold product at -30 degC under 100 mm of k = 0.03, jacket emissivity 0.2, in
    still air at 25 degC (a gain, so negative):

    >>> r = spherical_tank(12.0, fluid_temperature=243.15, air_temperature=298.15, layers=[Layer(0.1, 0.03)],
    ...                    emissivity=0.2)
    >>> round(float(r.q_total) / 1e3, 2), round(float(r.face("shell").surface_temperature) - 273.15, 1)
    (-6.97, 20.5)
    """
    d = as_size("diameter", diameter)
    layers = list(layers)
    if (wall_thickness is None) != (wall_conductivity is None):
        raise InputError("give wall_thickness and wall_conductivity together (or neither: a thin shell)",
                         field="wall_thickness, wall_conductivity", rule="both or neither",
                         value=(wall_thickness, wall_conductivity))
    fixed, d_inner = np.zeros(()), d
    if wall_thickness is not None:
        t = as_array("wall_thickness", wall_thickness, unit="m", low=0.0)
        if np.any(2.0 * t >= d):
            raise InputError(f"wall_thickness: must be less than half the diameter; got {t} m for {d} m",
                             field="wall_thickness", rule="less than half the diameter", value=t)
        k_wall = as_array("wall_conductivity", wall_conductivity, unit="W/m/K", low=0.0, low_inclusive=False)
        d_inner = d - 2.0 * t
        fixed = fixed + shell_drop("sphere", 0.5 * d_inner, 0.5 * d) / k_wall
    fixed = fixed + _film(inner_coefficient) / (np.pi * d_inner ** 2)
    inner = _known_temperature(surface_temperature, fluid_temperature, "shell", layers=layers,
                               wall_thickness=wall_thickness, inner_coefficient=inner_coefficient)
    _, d_out = layer_drops(layers, "sphere", d)
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    outer = OuterSurface.build("sphere", diameter=d_out, air_temperature=around.air_temperature,
                               wind_speed=around.wind_speed, emissivity=emissivity,
                               surroundings_temperature=around.surroundings_temperature,
                               sky_view_fraction=_sky(outdoor, "sphere", around), sky_temperature=around.sky_temperature,
                               solar_irradiance=around.solar_irradiance,
                               pressure=around.pressure, exact_properties=exact_properties,
                               convection_factor=convection_factor, convection_coefficient=convection_coefficient)
    if layers or np.any(fixed > 0):
        ts, _ = _solve_face(outer, inner, layers, "sphere", d, tolerance, fixed)
    else:
        ts = inner
    notes = ["legs, nozzles and manways left out"]
    return _total([_face("shell", outer, ts, np.pi * d_out ** 2)], notes)


class FaceThickness(NamedTuple):
    """Insulation of one face that meets a limit: the exact thickness and the next listed one [m]
    (NaN: not reachable within the largest thickness tried, or no listed thickness large enough)."""

    face: str
    required: float
    commercial: float
    air_temperature: float = float("nan")  # air the sizing ran at [K] (NaN: the builder's own)
    wind_speed: float = float("nan")       # wind the sizing ran at [m/s] (NaN: the builder's own)


def insulation_per_face(build, *, surface_limit=None, heat_flux_limit=None, max_thickness=0.3,
                        commercial_thicknesses=COMMERCIAL_THICKNESSES, tolerance=1e-5,
                        hottest_air_temperature=None, wind_for_touch=False) -> tuple[FaceThickness, ...]:
    r"""Smallest insulation on each exposed face of a vessel or duct that meets a limit.

    ``build(thickness)`` returns the :class:`FacesResult` of the vessel with ``thickness`` [m] (an array) of
    insulation on every exposed face, e.g. ``lambda t: vertical_tank(10, 12, fluid_temperature=..., air_temperature=...,
    wall_layers=[Layer(t, 0.04)], roof_layers=[Layer(t, 0.04)])``. Each face is sized alone (faces do not
    exchange heat here); a floor on the ground is not sized.

    Parameters
    ----------
    build : callable
        ``build(thickness) -> FacesResult`` for one vessel (scalar inputs otherwise).
    surface_limit : numeric, optional
        Outer surface temperature [K]: at most this on a face that loses heat (touch protection,
        :data:`convlib.design.TOUCH_LIMIT_METAL_JACKET`), at least this on one that gains heat (above the
        dew point plus a margin against condensation).
    heat_flux_limit : numeric, optional
        Largest heat flow per exposed area [W/m2] (either direction). Give one of the two limits.
    max_thickness : float
        Largest thickness tried [m].
    commercial_thicknesses : sequence of float
        Listed thicknesses [m]; default :data:`convlib.design.COMMERCIAL_THICKNESSES` (common practice).
    tolerance : float
        On the thickness [m].
    hottest_air_temperature : numeric, optional
        With ``surface_limit``: the design hottest ambient [K] the sizing runs at (the worst case for a burn);
        default: the builder's own air.
    wind_for_touch : bool
        With ``surface_limit``: size in the builder's wind; default False sizes in still air (the worst case).

    With ``surface_limit``, a ``build`` that accepts the keywords ``air_temperature`` and ``wind_speed`` is
    called with the sizing's conditions (still air, and the hottest ambient when given); the faces echo them
    (:attr:`FaceThickness.air_temperature`, :attr:`FaceThickness.wind_speed`). A ``build(thickness)`` without
    these keywords keeps its own conditions (it cannot take a hottest ambient).

    Examples
    --------
    A 6 m x 8 m tank at 90 degC in still air at 30 degC, k = 0.04, jacket emissivity 0.1: the wall and roof
    under a 50 W/m2 loss:

    >>> size = insulation_per_face(lambda t: vertical_tank(
    ...     6.0, 8.0, fluid_temperature=363.15, air_temperature=303.15, floor="none", emissivity=0.1,
    ...     wall_layers=[Layer(t, 0.04)], roof_layers=[Layer(t, 0.04)]), heat_flux_limit=50.0)
    >>> [(f.face, round(f.required * 1000, 1), round(f.commercial * 1000)) for f in size]
    [('wall', 37.1, 40), ('roof', 39.3, 40)]
    """
    if (surface_limit is None) == (heat_flux_limit is None):
        raise InputError("give surface_limit or heat_flux_limit, one of them", field="surface_limit, heat_flux_limit",
                         rule="exactly one of them", value=(surface_limit, heat_flux_limit))
    if surface_limit is not None:
        limit = float(as_array("surface_limit", surface_limit, unit="K", low=0.0, low_inclusive=False))
    else:
        limit = float(as_array("heat_flux_limit", heat_flux_limit, unit="W/m2", low=0.0, low_inclusive=False))
    t_max = float(as_array("max_thickness", max_thickness, unit="m", low=0.0, low_inclusive=False))
    conditions = {}
    if surface_limit is not None:
        params = inspect.signature(build).parameters
        takes = any(p.kind is p.VAR_KEYWORD for p in params.values()) or {"air_temperature",
                                                                             "wind_speed"} <= set(params)
        if hottest_air_temperature is not None:
            if not takes:
                raise InputError("hottest_air_temperature needs a build(thickness, *, air_temperature, wind_speed)",
                                 field="build", rule="accepts air_temperature and wind_speed keywords",
                                 value=getattr(build, "__name__", repr(build)))
            conditions["air_temperature"] = float(as_array("hottest_air_temperature", hottest_air_temperature,
                                                           unit="K", low=0.0, low_inclusive=False))
        if takes and not wind_for_touch:
            conditions["wind_speed"] = 0.0
    elif hottest_air_temperature is not None or wind_for_touch:
        raise InputError("hottest_air_temperature and wind_for_touch apply to a surface_limit only",
                         field="hottest_air_temperature, wind_for_touch", rule="only with surface_limit",
                         value=(hottest_air_temperature, wind_for_touch))
    if conditions:
        build = functools.partial(build, **conditions)
    bare = build(np.zeros(1))
    names = [f.name for f in bare.faces if f.surface is not None]
    hot = np.array([float(np.ravel(bare.face(n).q_total)[0]) >= 0.0 for n in names])

    def excess(t, index, result=None):
        """> 0 while face ``index`` (per element) misses the limit at thickness ``t`` (``result``: built already)."""
        r = build(t) if result is None else result
        rows = np.arange(t.size)
        if surface_limit is not None:
            ts = np.stack([np.broadcast_to(r.face(n).surface_temperature, t.shape) for n in names])[index, rows]
            return np.where(hot[index], ts - limit, limit - ts)
        flux = np.stack([np.broadcast_to(r.face(n).q_per_area, t.shape) for n in names])[index, rows]
        return np.abs(flux) - limit

    index = np.arange(len(names))
    at_zero = excess(np.zeros(len(names)), index, bare)  # the bare faces, evaluated once
    at_max = excess(np.full(len(names), t_max), index)
    required = np.where(at_zero <= 0, 0.0, np.nan)
    todo = (at_zero > 0) & (at_max <= 0)
    if todo.any():
        res = find_root(excess, np.zeros(int(todo.sum())), np.full(int(todo.sum()), t_max), args=(index[todo],),
                        xatol=tolerance, xrtol=0.0)
        required[todo] = np.where(res.success, res.x, np.nan)
    commercial = listed_thickness(required, commercial_thicknesses)
    air, wind = conditions.get("air_temperature", float("nan")), conditions.get("wind_speed", float("nan"))
    return tuple(FaceThickness(n, float(r), float(c), air, wind) for n, r, c in zip(names, required, commercial))


def _ground_floor(d, floor_temperature, layers, air_temperature, ground_temperature, ground_conductivity,
                  film=0.0):
    """Floor face on the soil: inner film [m2 K/W] and layers in series with the disc's spreading resistance
    1/(2 D k)."""
    k_soil = as_array("ground_conductivity", ground_conductivity, unit="W/m/K", low=0.0, low_inclusive=False)
    t_ground = as_array("air_temperature" if ground_temperature is None else "ground_temperature",
                        air_temperature if ground_temperature is None else ground_temperature, unit="K", low=0.0,
                        low_inclusive=False)
    area = np.pi * d ** 2 / 4.0
    slab = np.asarray(film, dtype=float)  # [m2 K/W] of the film and the floor layers
    for layer in layers:
        if not isinstance(layer, Layer):
            raise InputError(f"floor_layers must be Layer objects (thickness, conductivity); got {layer!r}",
                             field="floor_layers", rule="Layer objects", value=layer)
        if not layer.conductivity.is_constant:
            raise InputError(f"floor_layers on the ground take a constant conductivity; {layer.name!r} has k(T)",
                             field="floor_layers", rule="constant conductivity on the ground", value=layer)
        slab = slab + layer.thickness / layer.conductivity.constant_value
    q = (floor_temperature - t_ground) / (slab / area + 1.0 / (2.0 * d * k_soil))
    shape = np.broadcast_shapes(np.shape(q), np.shape(area))
    full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    nan = np.full(shape, np.nan)
    return Face(name="floor", shape="ground", area=full(area), surface_temperature=full(floor_temperature
                                                                                      - q * slab / area),
                q_per_area=full(q / area), q_total=full(q), h_convection=nan, h_radiation=nan.copy(), surface=None)


# ----------------------------------------------------------------------------- ducts
#: The square-cylinder law now lives in the correlation registry ("square_cylinder_crossflow", "jakob");
#: this name stays one version for scripts that called it here.
nusselt_square_cylinder_jakob = nusselt_square_cylinder_crossflow_jakob


def rectangular_duct(width, height, length, *, surface_temperature=None, fluid_temperature=None,
                     layers=(), inner_coefficient=None, wind_direction=None, emissivity=0.9,
                     outdoor=False, exact_properties=False, convection_factor=1.0, convection_coefficient=None,
                     tolerance=1e-6, surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None) -> FacesResult:
    r"""Heat lost (or gained) by a horizontal rectangular duct, bare at a known surface temperature or insulated.

    Faces: ``sides`` (two vertical plates, height x length), ``top`` (plate facing up, length x
    width) and ``bottom`` (plate facing down); the two ends are left out.

    Either every face is at ``surface_temperature`` (bare sheet metal), or the air (or other
    contents) inside is at ``fluid_temperature`` and heat passes an optional inner film and the
    ``layers`` of every face as flat slabs (:math:`t/k` per m2 over the outer face areas, corners
    neglected: the heat flow is overstated by roughly :math:`2t/(w + h)` relative, on the safe side),
    and each face's outer surface temperature is solved. The outer section is the duct's plus the layers.

    Wind ``"along"`` the duct uses the plate laws with the duct length as streamwise length.
    Wind ``"across"`` (horizontal, normal to the axis) uses :func:`nusselt_square_cylinder_jakob`
    with :math:`D` = the outer height (the face the wind meets), one forced coefficient for the whole
    section, combined with each face's natural coefficient by Churchill's rule (transverse,
    :math:`n = 3`); a section far from square is flagged in ``notes``, Reynolds numbers outside
    5e3-1e5 in each face's ``warnings`` (``FORCED_OUT_OF_RANGE``). With layers and wind across, the
    surface temperature and the cross-flow coefficient are iterated to agree (``NOT_CONVERGED`` if not).

    Parameters
    ----------
    width, height, length : numeric
        Duct section (sheet metal, layers add outside) and run [m].
    surface_temperature, fluid_temperature : numeric
        Give one: every face at a known temperature (no layers), or the contents [K].
    layers : sequence of Layer
        Insulation and jacket of every face, from the duct outwards (constant or k(T)).
    inner_coefficient : numeric, optional
        Film coefficient inside [W/m2/K] (with ``fluid_temperature``); default none (wall at the contents).
    wind_direction : {"along", "across"}, optional
        Of the wind relative to the duct; default the surroundings' when a Surroundings object is given,
        else ``"along"``.
    emissivity, outdoor, exact_properties, convection_factor, convection_coefficient
        As in :func:`vertical_tank` (with a given coefficient the wind direction plays no part).
    tolerance : float
        Surface temperature solve [K].
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords (still air,
        surroundings at the air, no sky, no sun, 101325 Pa by default). ``sky_view_fraction`` applies to every
        face; ``outdoor=True`` gives each face the typical fraction of its orientation instead.

    Examples
    --------
    A 0.6 m x 0.4 m duct, 20 m long, at 40 degC in still air at 20 degC:

    >>> r = rectangular_duct(0.6, 0.4, 20.0, surface_temperature=313.15, air_temperature=293.15)
    >>> [f.name for f in r.faces], round(float(r.q_total))
    (['sides', 'top', 'bottom'], 7547)

    The same duct carrying air at 40 degC under 50 mm of k = 0.035 with an inside film of 15 W/m2/K:

    >>> r = rectangular_duct(0.6, 0.4, 20.0, fluid_temperature=313.15, air_temperature=293.15,
    ...                      layers=[Layer(0.05, 0.035)], inner_coefficient=15.0)
    >>> round(float(r.q_total))
    586
    """
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    # a duct's wind runs along it unless told (the keyword, or a Surroundings object's wind_direction)
    wind_direction = wind_direction or (surroundings.wind_direction if surroundings is not None else "along")
    check_choice("wind_direction", wind_direction, WIND_DIRECTIONS)
    w = as_size("width", width)
    h = as_size("height", height)
    run = as_size("length", length)
    layers = list(layers)
    fixed = _film(inner_coefficient)
    inner = _known_temperature(surface_temperature, fluid_temperature, "duct", layers=layers,
                               inner_coefficient=inner_coefficient)
    layer_drops(layers, "flat", w)  # checks the layers
    grow = sum((2.0 * layer.thickness for layer in layers), np.zeros(()))
    w_out, h_out = w + grow, h + grow
    across = wind_direction == "across" and convection_coefficient is None
    wind = around.wind_speed
    common = dict(air_temperature=around.air_temperature, wind_speed=0.0 * wind if across else wind,
                  emissivity=emissivity, surroundings_temperature=around.surroundings_temperature,
                  sky_temperature=around.sky_temperature, solar_irradiance=around.solar_irradiance,
                  pressure=around.pressure, exact_properties=exact_properties, convection_factor=convection_factor,
                  convection_coefficient=convection_coefficient)
    outers = [("sides", OuterSurface.build("vertical_plate", height=h_out, width=run,
                                           sky_view_fraction=_sky(outdoor, "vertical_plate", around), **common),
               2.0 * h_out * run),
              ("top", OuterSurface.build("horizontal_plate_up", length=run, width=w_out,
                                         sky_view_fraction=_sky(outdoor, "horizontal_plate_up", around), **common),
               w_out * run),
              ("bottom", OuterSurface.build("horizontal_plate_down", length=run, width=w_out,
                                            sky_view_fraction=_sky(outdoor, "horizontal_plate_down", around), **common),
               w_out * run)]
    notes = ["ends of the duct left out"]
    if layers:
        notes.append("layers as flat slabs on each face (corners neglected)")
    p_air = around.pressure
    n_mix = default_mixing_exponent("transverse", round_body=False)
    factor = as_array("convection_factor", convection_factor, low=0.0, low_inclusive=False)

    def cross_flow(ts, outer):
        """The cross-flow mix at surface temperature ``ts`` (its h and the SurfaceResult replacement)."""
        ta = np.asarray(outer.air_temperature)
        film = fluid_properties(outer.fluid, 0.5 * (ts + ta), pressure=p_air, exact=exact_properties)
        reynolds = wind * h_out / film.nu
        nu, law_flags = corr.evaluate("square_cylinder_crossflow", "jakob", Re=np.where(wind > 0, reynolds, 1.0),
                                      Pr=film.pr, check=True)
        h_forced = np.where(wind > 0, nu * film.k / h_out, 0.0)
        outside = np.where(wind > 0, law_flags, 0).astype(np.int16)
        grashof = GRAVITY * film.beta * np.abs(ts - ta) / film.nu ** 2 * h_out ** 3
        h_mix, _ = combine(h_forced, outer.exchange(ts)["h_natural"], n_mix, "transverse")
        return h_mix, _cross_flow(wind, reynolds, h_forced, factor, n_mix, outside, grashof)

    faces = []
    for name, outer, area in outers:
        ts, converged = inner, np.ones(np.shape(inner), dtype=bool)
        if layers or np.any(fixed > 0):
            ts, _ = _solve_face(outer, inner, layers, "flat", w, tolerance, fixed)
            if across:  # the surface temperature and the cross-flow coefficient agree after a few passes
                for _ in range(30):
                    h_mix, _ = cross_flow(ts, outer)
                    given = dataclasses.replace(outer, given_coefficient=np.asarray(h_mix))
                    ts_next, _ = _solve_face(given, inner, layers, "flat", w, tolerance, fixed)
                    converged = np.abs(ts_next - ts) <= 10.0 * tolerance
                    ts = ts_next
                    if converged.all():
                        break
        convection = cross_flow(ts, outer)[1] if across else None
        face = _face(name, outer, ts, area, convection)
        if not converged.all():
            flags = face.surface.warnings | np.where(converged, 0, Flag.NOT_CONVERGED).astype(np.int16)
            face = dataclasses.replace(face, surface=dataclasses.replace(face.surface, warnings=flags))
        faces.append(face)
    if across:
        aspect = w_out / h_out
        if np.any((aspect < 0.8) | (aspect > 1.25)):
            notes.append("wind across a section that is not square (width/height outside 0.8-1.25): the square-"
                         "cylinder law is applied with D = height; no law for rectangular sections is implemented")
    return _total(faces, notes)


def _cross_flow(wind, reynolds, h_forced, factor, n_mix, outside, grashof):
    """Replace a still-air SurfaceResult's convection by the cross-flow mix (Churchill, transverse)."""
    def apply(outer: OuterSurface, r: SurfaceResult) -> SurfaceResult:
        delta = r.surface_temperature - r.air_temperature
        h_mix, _ = combine(h_forced, r.h_natural, n_mix, "transverse")
        h_conv = factor * h_mix
        q_area = r.q_per_area + (h_conv - r.h_convection) * delta
        per_run = outer.area / outer.run_length
        with np.errstate(divide="ignore", invalid="ignore"):
            richardson = np.where(wind > 0, grashof / np.where(wind > 0, reynolds, 1.0) ** 2, np.inf)
        flags = r.warnings | outside
        shape = np.broadcast_shapes(r.q_per_area.shape, np.shape(h_conv), np.shape(richardson))
        full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
        r = SurfaceResult(**{f.name: full(getattr(r, f.name)) for f in dataclasses.fields(SurfaceResult)})
        return dataclasses.replace(
            r, q_per_area=full(q_area), q_per_length=full(q_area * per_run), q_total=full(q_area * outer.area),
            q_convection_per_length=full(h_conv * delta * per_run), h_convection=full(h_conv),
            h_forced=full(h_forced), reynolds=full(np.where(wind > 0, reynolds, 0.0)), richardson=full(richardson),
            regime=full(convection_mode(richardson, wind)), warnings=full(flags))
    return apply
