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
* :func:`horizontal_tank` -- shell (horizontal cylinder) and both heads (flat, 2:1 ellipsoidal, torispherical
  or hemispherical; areas from :func:`head_area`), bare or with layers per face.
* ducts: :mod:`convlib.ducts`; insulation sized face by face: :mod:`convlib.face_sizing` (both
  importable from here too).

Every input broadcasts (numpy arrays over cases); each face's arrays have the broadcast shape.

**Round faces as plates**: see :mod:`convlib.faces`.

**Floor on the ground.** Steady conduction from an isothermal disc on the surface of a
semi-infinite medium (the rest of its surface adiabatic), shape factor :math:`S = 2D`
(Incropera et al., 6th ed., Table 4.1, from memory; the half-space version of the disc
capacitance :math:`8 R`), in series with any floor layers (slab, insulation) over the floor area:

.. math:: Q = \frac{T_{floor} - T_{ground}}{\sum_j t_j/(k_j A) + 1/(2 D k_{soil})}

An estimate: it ignores the soil's heat capacity (a slow warm-up takes months), ground water and
the heat flow through the soil surface around the tank.
"""
from __future__ import annotations

import math

import numpy as np

from .ducts import SQUARE_CYLINDER_RE_RANGE, WIND_DIRECTIONS, nusselt_square_cylinder_jakob, rectangular_duct
from .errors import InputError
from .face_sizing import FaceThickness, insulation_per_face
from .faces import (Face, FacesResult, disc_as_plate, face_from, faces_total, film_resistance, known_temperature,
                    outer_keywords, sky_view, solve_layers)
from .pipe import Layer
from .surface import OuterSurface, check_cross_flow
from .validation import as_array, as_size, check_choice
from .surroundings import Surroundings, resolve
from .wall import layer_drops, shell_drop

__all__ = ["GROUND_CONDUCTIVITY", "FLOORS", "WIND_DIRECTIONS", "SQUARE_CYLINDER_RE_RANGE", "Face", "FacesResult",
           "disc_as_plate", "vertical_tank", "spherical_tank", "horizontal_tank", "head_area", "HEADS",
           "TORISPHERICAL_CROWN_RATIO", "TORISPHERICAL_KNUCKLE_RATIO", "FLAT_HEAD_HEIGHT_RATIO", "rectangular_duct",
           "FaceThickness", "insulation_per_face", "nusselt_square_cylinder_jakob"]

#: Conductivity of the soil under a tank [W/m/K]: the value EN ISO 13370 (heat transfer via the ground)
#: takes for clay or silt when the soil is unknown; sand or gravel 2.0, homogeneous rock 3.5 (from memory).
#: Dry soil is far lower (Incropera et al., 6th ed., Table A.3: 0.52 W/m/K, from memory). Override with
#: the site's value.
GROUND_CONDUCTIVITY = 1.5

FLOORS = ("ground", "open", "none")


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
    film = film_resistance(inner_coefficient)
    wall_layers, roof_layers, floor_layers = list(wall_layers), list(roof_layers), list(floor_layers)
    if floor == "none" and floor_layers:
        raise InputError("floor_layers need floor='ground' or 'open'; the floor is left out", field="floor_layers",
                         rule="only with floor='ground' or 'open'", value=floor_layers)
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure, ground_temperature=ground_temperature)
    common = outer_keywords(around, emissivity=emissivity, exact_properties=exact_properties,
                            convection_factor=convection_factor, convection_coefficient=convection_coefficient)
    notes = []

    def solve(outer, layers, kind, inner_diameter, fixed):
        if not layers and not np.any(fixed > 0):
            return inner, inner_diameter
        return solve_layers(outer, inner, layers, kind, inner_diameter, tolerance, fixed)

    # wall: a vertical cylinder of the insulated outer diameter (the film per metre: 1/(h_i pi D))
    _, d_wall = layer_drops(wall_layers, "cylinder", d)
    wall = OuterSurface.build("vertical_cylinder", diameter=d_wall, length=h,
                              sky_view_fraction=sky_view(outdoor, "vertical_cylinder", around), **common)
    ts_wall, _ = solve(wall, wall_layers, "cylinder", d, film / (np.pi * d))
    faces = [face_from("wall", wall, ts_wall, np.pi * d_wall * h)]

    # roof: the disc as its equivalent plate, facing up
    disc_area = np.pi * d ** 2 / 4.0
    plate_length, plate_width = disc_as_plate(d)
    roof = OuterSurface.build("horizontal_plate_up", length=plate_length, width=plate_width,
                              sky_view_fraction=sky_view(outdoor, "horizontal_plate_up", around), **common)
    ts_roof, _ = solve(roof, roof_layers, "flat", d, film)
    faces.append(face_from("roof", roof, ts_roof, disc_area))
    notes.append("roof as a plate with the disc's A/P = D/4 and mean chord pi D/4; heat per area times pi D^2/4")

    if floor == "open":
        under = OuterSurface.build("horizontal_plate_down", length=plate_length, width=plate_width,
                                   sky_view_fraction=sky_view(outdoor, "horizontal_plate_down", around), **common)
        ts_floor, _ = solve(under, floor_layers, "flat", d, film)
        faces.append(face_from("floor", under, ts_floor, disc_area))
    elif floor == "ground":
        faces.append(_ground_floor(d, inner, floor_layers, around.air_temperature, around.ground_temperature,
                                   ground_conductivity,
                                   film))
        notes.append("floor on the ground: disc on a semi-infinite soil, S = 2 D (steady state; an estimate)")
    else:
        notes.append("floor left out of the total")
    return faces_total(faces, notes)


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
    fixed = fixed + film_resistance(inner_coefficient) / (np.pi * d_inner ** 2)
    inner = known_temperature(surface_temperature, fluid_temperature, "shell", layers=layers,
                               wall_thickness=wall_thickness, inner_coefficient=inner_coefficient)
    _, d_out = layer_drops(layers, "sphere", d)
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    outer = OuterSurface.build("sphere", diameter=d_out, sky_view_fraction=sky_view(outdoor, "sphere", around),
                               **outer_keywords(around, emissivity=emissivity, exact_properties=exact_properties,
                                                convection_factor=convection_factor,
                                                convection_coefficient=convection_coefficient))
    if layers or np.any(fixed > 0):
        ts, _ = solve_layers(outer, inner, layers, "sphere", d, tolerance, fixed)
    else:
        ts = inner
    notes = ["legs, nozzles and manways left out"]
    return faces_total([face_from("shell", outer, ts, np.pi * d_out ** 2)], notes)


#: Heads of a horizontal tank (:func:`horizontal_tank`).
HEADS = ("flat", "ellipsoidal_2to1", "torispherical", "hemispherical")

#: ASME flanged-and-dished (torispherical) head as fractions of the diameter: crown (dish) radius = D,
#: knuckle radius = 0.06 D (the ASME Section VIII proportions: crown radius at most the skirt's outside
#: diameter, knuckle at least 6 % of it; from memory).
TORISPHERICAL_CROWN_RATIO = 1.0
TORISPHERICAL_KNUCKLE_RATIO = 0.06

#: Height of the vertical plate that stands for a vertical disc (flat head), as a fraction of its diameter:
#: :math:`(\pi / 2I)^4` with :math:`I = \int_0^\pi \sin^{7/4}\theta\,d\theta = \sqrt\pi\,\Gamma(11/8)/\Gamma(15/8)`
#: (derived in :func:`horizontal_tank`), 0.8164.
FLAT_HEAD_HEIGHT_RATIO = (np.pi / (2.0 * np.sqrt(np.pi) * math.gamma(11.0 / 8.0) / math.gamma(15.0 / 8.0))) ** 4


def head_area(diameter, heads="ellipsoidal_2to1"):
    r"""Outer surface area of one head of a tank of diameter ``diameter`` [m2], from closed forms.

    * ``"flat"``: the disc, :math:`\pi D^2/4`.
    * ``"hemispherical"``: half a sphere, :math:`\pi D^2/2`.
    * ``"ellipsoidal_2to1"``: half an oblate spheroid of semi-axes :math:`a = D/2` and :math:`c = D/4`,
      :math:`\pi a^2 \left(1 + \frac{1-e^2}{e}\,\mathrm{artanh}\,e\right)` with :math:`e^2 = 1 - c^2/a^2 = 3/4`
      (the spheroid's area, e.g. Weisstein, MathWorld "Oblate Spheroid", from memory): :math:`1.0840\,D^2`.
    * ``"torispherical"``: ASME F&D head, crown radius :math:`R_c = D`, knuckle radius :math:`r_k = 0.06 D`
      (:data:`TORISPHERICAL_CROWN_RATIO`, :data:`TORISPHERICAL_KNUCKLE_RATIO`). The crown is a spherical cap
      and the knuckle a zone of a torus, tangent where the surface normal makes the angle :math:`\alpha` with
      the axis, :math:`\sin\alpha = (D/2 - r_k)/(R_c - r_k)`:

      .. math:: A = 2\pi R_c^2 (1 - \cos\alpha)
                + 2\pi r_k\left[(D/2 - r_k)(\pi/2 - \alpha) + r_k \cos\alpha\right]

      (cap :math:`2\pi R h`; the torus zone by Pappus's theorem): :math:`0.9306\,D^2`; the head is
      :math:`R_c - \sqrt{(R_c - r_k)^2 - (D/2 - r_k)^2} = 0.1693\,D` deep.

    ``D`` is the diameter the head is formed on (the shell's outside; a thin shell).

    Examples
    --------
    >>> [round(float(head_area(1.0, h)), 4) for h in HEADS]
    [0.7854, 1.084, 0.9306, 1.5708]
    """
    check_choice("heads", heads, HEADS)
    d = as_size("diameter", diameter)
    if heads == "flat":
        return np.pi * d ** 2 / 4.0
    if heads == "hemispherical":
        return np.pi * d ** 2 / 2.0
    if heads == "ellipsoidal_2to1":
        e = np.sqrt(3.0) / 2.0
        return np.pi * d ** 2 / 4.0 * (1.0 + (1.0 - e ** 2) / e * np.arctanh(e))
    radius, crown, knuckle = d / 2.0, TORISPHERICAL_CROWN_RATIO * d, TORISPHERICAL_KNUCKLE_RATIO * d
    sin_a = (radius - knuckle) / (crown - knuckle)
    alpha, cos_a = np.arcsin(sin_a), np.sqrt(1.0 - sin_a ** 2)
    return (2.0 * np.pi * crown ** 2 * (1.0 - cos_a)
            + 2.0 * np.pi * knuckle * ((radius - knuckle) * (np.pi / 2.0 - alpha) + knuckle * cos_a))


def horizontal_tank(diameter, length, *, heads="ellipsoidal_2to1", surface_temperature=None, fluid_temperature=None,
                    shell_layers=(), head_layers=(), emissivity=0.9, outdoor=False, inner_coefficient=None,
                    exact_properties=False, convection_factor=1.0, convection_coefficient=None, tolerance=1e-6,
                    surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None,
                    surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None,
                    solar_irradiance=None, pressure=None) -> FacesResult:
    r"""Heat lost (or gained) by a horizontal cylindrical tank with two heads, face by face.

    Faces:

    * ``shell`` -- the cylindrical part, ``length`` long (tangent line to tangent line), a horizontal cylinder
      with the registry's laws (natural Churchill & Chu 1975; wind across the axis, Churchill & Bernstein
      1977; mixed after Churchill 1977), exactly what :func:`convlib.surface.bare_surface` or
      :func:`convlib.pipe.insulated_pipe` give for a line of that diameter and length.
    * ``heads`` -- both heads together (their areas: :func:`head_area`).

    **Flat heads** are vertical discs. Each is evaluated as a vertical plate of height
    :data:`FLAT_HEAD_HEIGHT_RATIO` :math:`\times D = 0.816\,D`, its heat flow per unit area applied to the
    disc's area :math:`\pi D^2/4`. Why that height: the boundary layer rises along each vertical chord of
    the disc, of height :math:`c(x) = 2\sqrt{R^2 - x^2}`; taking each chord as a plate of its own height
    with the laminar law :math:`\bar h \propto c^{-1/4}` and summing :math:`\bar h(c)\,c\,dx` over the disc
    gives the plate value at :math:`L = D\,(\pi/2I)^4`, :math:`I = \int_0^\pi\sin^{7/4}\theta\,d\theta`
    (derived here; the same reasoning as the roof's mean chord, :mod:`convlib.faces`). In a turbulent
    layer :math:`Nu \propto Ra^{1/3}` and the height drops out. A plate of height :math:`D` would give a
    laminar coefficient 5 % lower. The wind, across the tank, runs along the head's face: the plate's
    streamwise length is the disc's mean chord :math:`\pi D/4`. Layers on a flat head are flat.

    **Dished heads** (2:1 ellipsoidal, torispherical, hemispherical): the two heads together, in their
    area, are taken as one sphere of the same area, :math:`D_{eq} = \sqrt{2 A_{head}/\pi}`, with the sphere
    laws of the registry (natural Churchill 1983, wind Whitaker 1972): exactly the sphere of diameter
    :math:`D` for hemispherical heads, :math:`0.831 D` for 2:1 ellipsoidal, :math:`0.770 D` for
    torispherical ones. Equal area as the match follows Yovanovich's finding that the square root of the
    area is the length that brings convex bodies' laminar natural convection together (Yovanovich 1987,
    from memory). Limits: a head is not a free sphere -- its axis is horizontal, it is joined to the shell
    and meets the boundary layer the shell sheds; no published law for a head on a horizontal tank is used
    here, so take the heads' coefficient as an estimate (its error is not quantified; the heads are a small
    part of a long tank's area). Layers on dished heads are spherical shells on that sphere
    (:math:`(1/r_1 - 1/r_2)/(4\pi k)`, Incropera et al., 6th ed., eq. 3.36): exact for hemispherical
    heads; for the others the insulated heads' area is the grown sphere's.

    Saddles, nozzles and manways are left out; the contents fill the tank (every inner face at
    ``fluid_temperature``).

    Parameters
    ----------
    diameter : numeric
        Diameter of the shell [m] (layers add outside; a thin shell).
    length : numeric
        Length of the cylindrical shell between the heads' tangent lines [m]; the heads add to it.
    heads : {"flat", "ellipsoidal_2to1", "torispherical", "hemispherical"}
        Shape of both heads (:data:`HEADS`).
    surface_temperature : numeric, optional
        Known temperature of every face [K] (a bare tank); no layers then.
    fluid_temperature : numeric, optional
        Temperature of the contents [K]; give this or ``surface_temperature``. With layers or an inner film
        each face's outer surface temperature is solved.
    shell_layers, head_layers : sequence of Layer
        From the shell outwards: cylindrical on the shell; on the heads flat (flat heads) or spherical
        (dished heads).
    emissivity : numeric
        Long-wave emissivity of the outer surfaces (bare shell or jacket) [-].
    outdoor : bool
        Sky view per face from :data:`convlib.radiation.SKY_VIEW_FRACTION_TYPICAL` (0.5: shell, heads).
    inner_coefficient : numeric, optional
        Film coefficient between the contents and the shell [W/m2/K] (with ``fluid_temperature``), on every
        face over its inner area.
    exact_properties, convection_factor, convection_coefficient
        As in :func:`convlib.surface.bare_surface` (a given coefficient applies to both faces).
    tolerance : float
        Surface temperature solve [K].
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords (still air,
        surroundings at the air, no sky, no sun, 101325 Pa by default). The wind blows across the tank's axis
        (``wind_direction="along"`` is refused, as for a line).

    Returns
    -------
    FacesResult
        Faces ``shell`` and ``heads``, and their total.

    Examples
    --------
    A bare tank 3 m across, 8 m between the tangent lines, 2:1 ellipsoidal heads: the heads' area is twice
    :math:`1.084\,D^2`:

    >>> r = horizontal_tank(3.0, 8.0, surface_temperature=333.15, air_temperature=283.15)
    >>> [f.name for f in r.faces], round(float(r.face("heads").area), 2)
    (['shell', 'heads'], 19.51)
    """
    check_choice("heads", heads, HEADS)
    d = as_size("diameter", diameter)
    run = as_size("length", length)
    shell_layers, head_layers = list(shell_layers), list(head_layers)
    if surface_temperature is not None and inner_coefficient is not None:
        raise InputError("inner_coefficient needs fluid_temperature: with surface_temperature the tank is bare",
                         field="inner_coefficient", rule="only with fluid_temperature", value=inner_coefficient)
    inner = known_temperature(surface_temperature, fluid_temperature, "tank", shell_layers=shell_layers or None,
                              head_layers=head_layers or None)
    film = film_resistance(inner_coefficient)
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    check_cross_flow("horizontal_cylinder", around)
    common = outer_keywords(around, emissivity=emissivity, exact_properties=exact_properties,
                            convection_factor=convection_factor, convection_coefficient=convection_coefficient)

    def solve(outer, layers, kind, inner_diameter, fixed):
        if not layers and not np.any(fixed > 0):
            return inner
        return solve_layers(outer, inner, layers, kind, inner_diameter, tolerance, fixed)[0]

    # shell: a horizontal cylinder of the insulated outer diameter (the film per metre: 1/(h_i pi D))
    _, d_shell = layer_drops(shell_layers, "cylinder", d)
    shell = OuterSurface.build("horizontal_cylinder", diameter=d_shell, length=run,
                               sky_view_fraction=sky_view(outdoor, "horizontal_cylinder", around), **common)
    faces = [face_from("shell", shell, solve(shell, shell_layers, "cylinder", d, film / (np.pi * d)),
                       np.pi * d_shell * run)]
    notes = ["shell: horizontal cylinder between the tangent lines, wind across; saddles, nozzles and manways "
             "left out"]

    if heads == "flat":
        disc = np.pi * d ** 2 / 4.0
        plate = OuterSurface.build("vertical_plate", height=FLAT_HEAD_HEIGHT_RATIO * d, width=np.pi * d / 4.0,
                                   sky_view_fraction=sky_view(outdoor, "vertical_plate", around), **common)
        faces.append(face_from("heads", plate, solve(plate, head_layers, "flat", d, film), 2.0 * disc))
        notes.append("flat heads: vertical plates of height 0.816 D (the disc's laminar equivalent), wind along "
                     "their mean chord pi D/4; heat per area times 2 pi D^2/4")
    else:
        d_eq = np.sqrt(2.0 * head_area(d, heads) / np.pi)
        _, d_out = layer_drops(head_layers, "sphere", d_eq)
        ball = OuterSurface.build("sphere", diameter=d_out,
                                  sky_view_fraction=sky_view(outdoor, "sphere", around), **common)
        ts = solve(ball, head_layers, "sphere", d_eq, film / (np.pi * d_eq ** 2))
        faces.append(face_from("heads", ball, ts, np.pi * d_out ** 2))
        name = {"ellipsoidal_2to1": "2:1 ellipsoidal", "torispherical": "torispherical (F&D)",
                "hemispherical": "hemispherical"}[heads]
        notes.append(f"{name} heads: both together as one sphere of the same area (sphere laws); an estimate, "
                     f"no published law covers a head on a horizontal tank")
    return faces_total(faces, notes)


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
