r"""Horizontal rectangular ducts: heat lost (or gained) face by face.

:func:`rectangular_duct` -- sides (vertical plates), top and bottom (horizontal plates facing up and
down), bare at a known surface temperature or insulated with the contents' temperature given; wind
along the duct (plate laws) or across it (the registry's square-section cross-flow law,
``("square_cylinder_crossflow", "jakob")``). The result is a :class:`convlib.faces.FacesResult`.
"""
from __future__ import annotations

import dataclasses

import numpy as np

from . import correlations as corr
from .correlations.forced import nusselt_square_cylinder_crossflow_jakob
from .correlations.mixed import combine, default_mixing_exponent
from .faces import (FacesResult, face_from, faces_total, film_resistance, known_temperature, outer_keywords, sky_view,
                    solve_layers)
from .properties import fluid_properties
from .regimes import Flag, convection_mode
from .surface import GRAVITY, OuterSurface, SurfaceResult
from .validation import as_array, as_size, check_choice
from .surroundings import Surroundings, resolve
from .wall import layer_drops

__all__ = ["WIND_DIRECTIONS", "SQUARE_CYLINDER_RE_RANGE", "rectangular_duct", "nusselt_square_cylinder_jakob"]

WIND_DIRECTIONS = ("along", "across")

#: Reynolds range of the square-cylinder constants (Jakob 1949, as in Incropera et al., 6th ed., Table 7.3).
SQUARE_CYLINDER_RE_RANGE = corr.get("square_cylinder_crossflow", "jakob").re_range

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

    >>> from convlib.pipe import Layer
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
    fixed = film_resistance(inner_coefficient)
    inner = known_temperature(surface_temperature, fluid_temperature, "duct", layers=layers,
                               inner_coefficient=inner_coefficient)
    layer_drops(layers, "flat", w)  # checks the layers
    grow = sum((2.0 * layer.thickness for layer in layers), np.zeros(()))
    w_out, h_out = w + grow, h + grow
    across = wind_direction == "across" and convection_coefficient is None
    wind = around.wind_speed
    common = outer_keywords(around, wind_speed=0.0 * wind if across else wind, emissivity=emissivity,
                            exact_properties=exact_properties, convection_factor=convection_factor,
                            convection_coefficient=convection_coefficient)
    outers = [("sides", OuterSurface.build("vertical_plate", height=h_out, width=run,
                                           sky_view_fraction=sky_view(outdoor, "vertical_plate", around), **common),
               2.0 * h_out * run),
              ("top", OuterSurface.build("horizontal_plate_up", length=run, width=w_out,
                                         sky_view_fraction=sky_view(outdoor, "horizontal_plate_up", around), **common),
               w_out * run),
              ("bottom", OuterSurface.build("horizontal_plate_down", length=run, width=w_out,
                                            sky_view_fraction=sky_view(outdoor, "horizontal_plate_down", around), **common),
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
            ts, _ = solve_layers(outer, inner, layers, "flat", w, tolerance, fixed)
            if across:  # the surface temperature and the cross-flow coefficient agree after a few passes
                for _ in range(30):
                    h_mix, _ = cross_flow(ts, outer)
                    given = dataclasses.replace(outer, given_coefficient=np.asarray(h_mix))
                    ts_next, _ = solve_layers(given, inner, layers, "flat", w, tolerance, fixed)
                    converged = np.abs(ts_next - ts) <= 10.0 * tolerance
                    ts = ts_next
                    if converged.all():
                        break
        convection = cross_flow(ts, outer)[1] if across else None
        face = face_from(name, outer, ts, area, convection)
        if not converged.all():
            flags = face.surface.warnings | np.where(converged, 0, Flag.NOT_CONVERGED).astype(np.int16)
            face = dataclasses.replace(face, surface=dataclasses.replace(face.surface, warnings=flags))
        faces.append(face)
    if across:
        aspect = w_out / h_out
        if np.any((aspect < 0.8) | (aspect > 1.25)):
            notes.append("wind across a section that is not square (width/height outside 0.8-1.25): the square-"
                         "cylinder law is applied with D = height; no law for rectangular sections is implemented")
    return faces_total(faces, notes)


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
