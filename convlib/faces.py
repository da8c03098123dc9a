r"""Faces of vessels and ducts: the shared result shape and the per-face steps.

A vessel or duct is a few flat, cylindrical or spherical faces (:mod:`convlib.vessels`,
:mod:`convlib.ducts`). Each face is an :class:`convlib.surface.OuterSurface` exchanging with the
surroundings, with the layers between it and the contents solved by :func:`convlib.wall.solve_face`.
This module holds what every such item shares: :class:`Face`, :class:`FacesResult`, the disc-as-plate
rule, the typical sky view per orientation, the inside film, and the build of a face and of the total.

**Round faces as plates.** A disc of diameter :math:`D` (tank roof, open floor) is evaluated as
the rectangle of length :math:`\pi D/4` along the wind and width :math:`\pi D / (2(\pi - 2))`: it has
the disc's characteristic length :math:`A/P = D/4` exactly (the length of the horizontal-plate
laws, Goldstein, Sparrow & Jones (1973), doi:10.1016/0017-9310(73)90081-9, who proposed it for any
plan form, discs included), and its streamwise length is the disc's mean chord :math:`\pi D/4`
(for a laminar boundary layer, :math:`h \propto L^{-1/2}`, averaging the plate law over the
disc's chords gives the plate value at :math:`L = 0.81 D`, 3 % from the mean chord -- derived here).
The heat flow per unit area of that rectangle is applied to the disc's area :math:`\pi D^2/4`.
(An equal-area square, side :math:`D\sqrt\pi/2`, would give :math:`A/P = 0.22 D`, 11 % short.)
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .radiation import SKY_VIEW_FRACTION_TYPICAL
from .surface import SurfaceResult
from .validation import as_array, as_size, check_choice
from .wall import solve_face

__all__ = ["Face", "FacesResult", "disc_as_plate"]  # the helpers below are building blocks for new items


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


def sky_view(outdoor, shape, around=None):
    """Sky view fraction of a face: typical for its orientation outdoors, else the surroundings' (0 indoors)."""
    if outdoor:
        return SKY_VIEW_FRACTION_TYPICAL[shape]
    return 0.0 if around is None else around.sky_view_fraction


def outer_keywords(around, *, emissivity, exact_properties, convection_factor, convection_coefficient,
                   wind_speed=None):
    """Keywords of :meth:`convlib.surface.OuterSurface.build` every face shares: the surroundings and the settings.

    ``around`` is a resolved :class:`convlib.surroundings.Surroundings`; ``wind_speed`` replaces its wind when given.
    The sky view is per face (:func:`sky_view`), so it is left to the caller.
    """
    return dict(air_temperature=around.air_temperature,
                wind_speed=around.wind_speed if wind_speed is None else wind_speed, emissivity=emissivity,
                surroundings_temperature=around.surroundings_temperature, sky_temperature=around.sky_temperature,
                solar_irradiance=around.solar_irradiance, pressure=around.pressure,
                exact_properties=exact_properties, convection_factor=convection_factor,
                convection_coefficient=convection_coefficient)


def solve_layers(outer, fluid_temperature, layers, kind, inner_diameter, tolerance, fixed_resistance=0.0):
    """Outer surface temperature [K] and outer diameter of a face with layers: :func:`convlib.wall.solve_face`."""
    solved = solve_face(outer, fluid_temperature, layers, kind=kind, inner_diameter=inner_diameter,
                        fixed_resistance=fixed_resistance, tolerance=tolerance)
    return solved.surface_temperature, solved.outer_diameter


def film_resistance(inner_coefficient):
    """Resistance of the inside film per m2 of inner surface [m2 K/W]: 1/h_i, 0 without one."""
    if inner_coefficient is None:
        return np.zeros(())
    return 1.0 / as_array("inner_coefficient", inner_coefficient, unit="W/m2/K", low=0.0, low_inclusive=False)


def known_temperature(surface_temperature, fluid_temperature, what, **inside):
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


def face_from(name, outer, ts, area, convection=None):
    """A Face from an OuterSurface at surface temperature ``ts`` scaled to ``area``."""
    surface = outer.result(outer.exchange(ts))
    if convection is not None:
        surface = convection(outer, surface)
    shape = np.broadcast_shapes(surface.q_per_area.shape, np.shape(area))
    full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    return Face(name=name, shape=outer.shape, area=full(area), surface_temperature=full(surface.surface_temperature),
                q_per_area=full(surface.q_per_area), q_total=full(surface.q_per_area * area),
                h_convection=full(surface.h_convection), h_radiation=full(surface.h_radiation), surface=surface)


def faces_total(faces, notes):
    """The FacesResult of ``faces``: their total heat flow and area (broadcast) and the notes."""
    shape = np.broadcast_shapes(*(f.q_total.shape for f in faces))
    total = sum((np.broadcast_to(f.q_total, shape) for f in faces), np.zeros(shape))
    area = sum((np.broadcast_to(f.area, shape) for f in faces), np.zeros(shape))
    return FacesResult(faces=tuple(faces), q_total=total, area=area, notes=tuple(notes))
