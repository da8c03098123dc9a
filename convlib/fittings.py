r"""Bare (uninsulated) flange pairs and valves on a line: their heat, and what they add to the insulated line.

A flange pair or a valve left bare on an insulated line loses far more heat than the insulated pipe it
replaces. :func:`bare_flange_pair` and :func:`bare_valve` compute one item from published dimensions
(weld-neck flanges of ASME B16.5, face-to-face lengths of flanged gate valves of ASME B16.10, pipe outer
diameters of ASME B36.10M through :mod:`convlib.pipe_sizes`), evaluate its exposed surface with
:func:`convlib.surface.bare_surface`, and subtract what the line would lose over the same length
(:func:`convlib.pipe.insulated_pipe`): the item's **extra heat** [W] and its **equivalent length** [m of the
line]. Every input broadcasts; SI units, kelvin.

**Geometry** (stated, not measured):

* *Flange pair* (two weld-neck flanges bolted together): the rim is a short horizontal cylinder of the
  flange outside diameter :math:`D_f` and length :math:`2 t_f`; the two exposed back faces are annuli
  between :math:`D_f` and the outside of the line (the pipe, or the insulation where the line is
  insulated). The gasket, the bolts and nuts, the raised faces and the tapered hubs are not counted (the
  bolts add area, the hubs are partly under the insulation's end). Item length along the line: :math:`2 t_f`.
* *Valve* (flanged gate valve, with the two line flanges bolted to it): one horizontal cylinder of the
  flange outside diameter over the face-to-face length plus the two line flanges, :math:`F + 2 t_f` -- the
  valve's own flanges and the line flanges as rims, the body between the valve's flanges approximated as
  a cylinder of the same diameter -- and the two exposed back faces of the line flanges, annuli as above.
  Item length: :math:`F + 2 t_f`. **An approximation**: a real gate valve's body is narrower than its
  flanges between them (this overstates the body), but it carries a bonnet, yoke and hand wheel that rise
  several pipe diameters above the line (not counted: this understates). Our estimate, no source: the
  valve's area may be off by some tens of percent either way, more for large gate valves with tall
  bonnets. A bare valve item includes its joints: do not count them again as bare flange pairs.

**Heat.** Every exposed part is taken at the fluid temperature: a bare metal fitting conducts well, and its
real surface is somewhat nearer the air (most at the rim and, for a valve, the bonnet), so the item's heat is
an upper bound on that account -- conservative for a heat loss (and for a cold line's gain). Rims and bodies
are horizontal cylinders (per-area heat of the cylinder of diameter :math:`D_f`: Churchill-Chu in still air,
wind across by default); each face is a vertical plate of height :math:`D_f` and width
:math:`A_{face} / D_f` (the mean horizontal chord of a full disc, :math:`\pi D_f / 4`, when there is no
hole), its heat per area applied to the face's area. For a laminar boundary layer the plate of height
:math:`D_f` gives about 5 % less than the disc's vertical strips averaged one by one
(:math:`h \propto H^{-1/4}` over the chords: factor :math:`2\sqrt\pi\,\Gamma(11/8) / (\pi\,\Gamma(15/8))
= 1.052`, derived here); for a turbulent layer they agree. The faces' view of the nearby pipe is not
deducted (radiation slightly overstated). :func:`convlib.faces.disc_as_plate` is the rule for *horizontal*
discs (tank roofs); these faces are vertical.

.. math::
    Q_{extra} = Q_{item} - q'_{line} L_{item}, \qquad L_{eq} = Q_{extra} / q'_{line}

A cold fitting gains heat: :math:`Q_{item}` and :math:`Q_{extra}` are negative and :math:`L_{eq}`
positive. Where the line neither loses nor gains heat (:math:`q'_{line} = 0`) the equivalent length is NaN,
with a note.

Caution: a bare flange or valve on a hot line is a burn hazard, and on a cold line it collects condensate
or ice; guards, insulation covers and their inspection follow local codes and licensed practice.

Examples
--------
>>> r = bare_flange_pair(4, 453.15, air_temperature=293.15)
>>> round(float(r.area), 4), round(float(r.item_length), 4)
(0.0937, 0.0447)
"""
from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .errors import InputError
from .pipe import Layer, insulated_pipe
from .pipe_sizes import nominal_pipe, parse_nps
from .surface import bare_surface
from .surroundings import Surroundings, resolve
from .validation import as_array

__all__ = ["FittingResult", "bare_flange_pair", "bare_valve", "flange_dimensions", "valve_face_to_face",
           "PRESSURE_CLASSES", "FLANGE_CLASS_150", "FLANGE_CLASS_300", "GATE_VALVE_FACE_TO_FACE", "CAUTION_BARE"]

INCH = 0.0254  #: [m], exact by definition (1959 international inch)

#: Pressure classes with tables here.
PRESSURE_CLASSES = (150, 300)

#: ASME B16.5 (2003 and later editions), Class 150 weld-neck flanges: NPS -> (outside diameter O, thickness
#: t_f) [in]; thickness without the 0.06 in (2 mm) raised face (editions up to 1996 listed it with the raised
#: face, 0.06 in more). From memory.
FLANGE_CLASS_150 = {
    0.5: (3.50, 0.38), 0.75: (3.88, 0.44), 1.0: (4.25, 0.50), 1.25: (4.62, 0.56), 1.5: (5.00, 0.62),
    2.0: (6.00, 0.69), 2.5: (7.00, 0.82), 3.0: (7.50, 0.88), 3.5: (8.50, 0.88), 4.0: (9.00, 0.88),
    5.0: (10.00, 0.88), 6.0: (11.00, 0.94), 8.0: (13.50, 1.06), 10.0: (16.00, 1.12), 12.0: (19.00, 1.19),
    14.0: (21.00, 1.31), 16.0: (23.50, 1.38), 18.0: (25.00, 1.50), 20.0: (27.50, 1.62), 24.0: (32.00, 1.81),
}  # from memory

#: ASME B16.5 (2003 and later editions), Class 300 weld-neck flanges: NPS -> (O, t_f) [in], thickness without
#: the raised face. From memory.
FLANGE_CLASS_300 = {
    0.5: (3.75, 0.56), 0.75: (4.62, 0.62), 1.0: (4.88, 0.69), 1.25: (5.25, 0.75), 1.5: (6.12, 0.81),
    2.0: (6.50, 0.88), 2.5: (7.50, 1.00), 3.0: (8.25, 1.12), 3.5: (9.00, 1.19), 4.0: (10.00, 1.25),
    5.0: (11.00, 1.38), 6.0: (12.50, 1.44), 8.0: (15.00, 1.62), 10.0: (17.50, 1.88), 12.0: (20.50, 2.00),
    14.0: (23.00, 2.12), 16.0: (25.50, 2.25), 18.0: (28.00, 2.38), 20.0: (30.50, 2.50), 24.0: (36.00, 2.75),
}  # from memory

#: ASME B16.10, face-to-face lengths F of flanged (raised-face) steel gate valves [in], by class and NPS. NPS
#: 3-1/2 is left out (not recalled). From memory.
GATE_VALVE_FACE_TO_FACE = {
    150: {0.5: 4.25, 0.75: 4.62, 1.0: 5.00, 1.25: 5.50, 1.5: 6.50, 2.0: 7.00, 2.5: 7.50, 3.0: 8.00, 4.0: 9.00,
          5.0: 10.00, 6.0: 10.50, 8.0: 11.50, 10.0: 13.00, 12.0: 14.00, 14.0: 15.00, 16.0: 16.00, 18.0: 17.00,
          20.0: 18.00, 24.0: 20.00},
    300: {0.5: 5.50, 0.75: 6.00, 1.0: 6.50, 1.25: 7.00, 1.5: 7.50, 2.0: 8.50, 2.5: 9.50, 3.0: 11.12, 4.0: 12.00,
          5.0: 15.00, 6.0: 15.88, 8.0: 16.50, 10.0: 18.00, 12.0: 19.75, 14.0: 30.00, 16.0: 33.00, 18.0: 36.00,
          20.0: 39.00, 24.0: 45.00},
}  # from memory

CAUTION_BARE = ("Caution: a bare flange or valve is at about the fluid temperature: on a hot line a burn hazard, on "
                "a cold line a place where condensate or ice forms. Guards, insulation covers and their inspection "
                "follow local codes and licensed practice.")

_SIZES = np.array(sorted(FLANGE_CLASS_150), dtype=float)
_FLANGE = {150: FLANGE_CLASS_150, 300: FLANGE_CLASS_300}


def _grid(table_of_class, column=None) -> np.ndarray:
    """(class, NPS) array [m] of one table, NaN where a size is not listed."""
    out = np.full((len(PRESSURE_CLASSES), _SIZES.size), np.nan)
    for i, cls in enumerate(PRESSURE_CLASSES):
        for j, n in enumerate(_SIZES):
            value = table_of_class[cls].get(float(n))
            if value is not None:
                out[i, j] = (value if column is None else value[column]) * INCH
    return out


_OUTSIDE, _THICKNESS, _FACE_TO_FACE = _grid(_FLANGE, 0), _grid(_FLANGE, 1), _grid(GATE_VALVE_FACE_TO_FACE)


@lru_cache(maxsize=1)
def _pipe_outside() -> np.ndarray:
    """Outer diameter of the pipe per table NPS [m] (ASME B36.10M, :func:`convlib.pipe_sizes.nominal_pipe`)."""
    return np.array([nominal_pipe(float(n), "40").outer_diameter for n in _SIZES])


def _sizes_text(known) -> str:
    return ", ".join(f"{n:g}" for n in known)


def _indices(nps, pressure_class, table: np.ndarray, what: str):
    """(class index, NPS index) arrays of the broadcast inputs; InputError naming the sizes the table knows."""
    if isinstance(nps, str):
        nps = parse_nps(nps)
    n = as_array("nps", nps, low=0.0, low_inclusive=False)
    cls = as_array("pressure_class", pressure_class, low=0.0, low_inclusive=False)
    bad_class = ~np.isin(cls, PRESSURE_CLASSES)
    if bad_class.any():
        rule = f"one of: {', '.join(map(str, PRESSURE_CLASSES))}"
        raise InputError(f"pressure_class {float(cls[bad_class].flat[0]):g} has no table here; choose {rule}",
                         field="pressure_class", rule=rule, value=float(cls[bad_class].flat[0]))
    n, cls = np.broadcast_arrays(n, cls)
    j = np.abs(n[..., None] - _SIZES).argmin(axis=-1)
    i = np.where(cls == PRESSURE_CLASSES[0], 0, 1)
    known = np.abs(_SIZES[j] - n) < 1e-9
    known &= ~np.isnan(table[i, j])
    if not known.all():
        size, cl = float(n[~known].flat[0]), int(cls[~known].flat[0])
        listed = _SIZES[~np.isnan(table[PRESSURE_CLASSES.index(cl)])]
        rule = f"an NPS of the table: {_sizes_text(listed)}"
        raise InputError(f"NPS {size:g} is not in the table of {what}, class {cl}; the sizes known are: "
                         f"{_sizes_text(listed)}", field="nps", rule=rule, value=size)
    return i, j


def flange_dimensions(nps, pressure_class=150):
    """Outside diameter and thickness [m] of an ASME B16.5 weld-neck flange (:data:`FLANGE_CLASS_150`,
    :data:`FLANGE_CLASS_300`).

    Examples
    --------
    >>> outside, thickness = flange_dimensions(4, 150)
    >>> round(float(outside), 4), round(float(thickness), 5)
    (0.2286, 0.02235)
    >>> flange_dimensions(4.3)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: NPS 4.3 is not in the table of ASME B16.5 flanges, class 150; the sizes known are: 0.5, 0.75, 1, 1.25, 1.5, 2, 2.5, 3, 3.5, 4, 5, 6, 8, 10, 12, 14, 16, 18, 20, 24
    """
    i, j = _indices(nps, pressure_class, _OUTSIDE, "ASME B16.5 flanges")
    return _OUTSIDE[i, j], _THICKNESS[i, j]


def valve_face_to_face(nps, pressure_class=150):
    """Face-to-face length [m] of a flanged steel gate valve, ASME B16.10 (:data:`GATE_VALVE_FACE_TO_FACE`).

    >>> round(float(valve_face_to_face(6, 300)), 4)
    0.4034
    """
    i, j = _indices(nps, pressure_class, _FACE_TO_FACE, "ASME B16.10 gate valves")
    return _FACE_TO_FACE[i, j]


@dataclass(frozen=True)
class FittingResult:
    """One bare item on a line; every field an array of the broadcast input shape.

    ``area`` [m2] exposed; ``item_length`` [m] of line the item occupies; ``q_item`` [W] lost by the bare item
    (negative: gained); ``q_insulated_same_length`` [W] the line (insulated, or bare if it has no layers) over
    ``item_length``; ``extra_heat`` [W] their difference; ``equivalent_length`` [m] of the line that loses
    ``extra_heat`` (NaN where the line neither loses nor gains heat); ``warnings`` bit mask of
    :class:`convlib.regimes.Flag` of every part; ``notes`` readable texts on the whole call.
    """

    area: np.ndarray
    item_length: np.ndarray
    q_item: np.ndarray
    q_insulated_same_length: np.ndarray
    extra_heat: np.ndarray
    equivalent_length: np.ndarray
    warnings: np.ndarray
    notes: tuple[str, ...] = ()


def _annulus(outside, inside):
    return np.pi / 4.0 * np.maximum(outside ** 2 - inside ** 2, 0.0)


def _item(kind, nps, fluid_temperature, pressure_class, layers, emissivity, jacket_emissivity, around):
    i, j = _indices(nps, pressure_class, _OUTSIDE, "ASME B16.5 flanges")
    outside, thickness = _OUTSIDE[i, j], _THICKNESS[i, j]
    length = 2.0 * thickness
    if kind == "valve":
        length = length + valve_face_to_face(nps, pressure_class)
    pipe = _pipe_outside()[j]
    layers = list(layers or [])
    for layer in layers:
        if not isinstance(layer, Layer):
            raise InputError(f"layers must be convlib.Layer objects; got {type(layer).__name__}", field="layers",
                             rule="a list of Layer", value=repr(layer)[:80])
    line_outside = pipe + 2.0 * sum((layer.thickness for layer in layers), np.zeros(()))
    face = _annulus(outside, line_outside)
    tf = as_array("fluid_temperature", fluid_temperature, unit="K", low=0.0, low_inclusive=False)
    eps = as_array("emissivity", emissivity, low=0.0, high=1.0)
    rim = bare_surface("horizontal_cylinder", surface_temperature=tf, diameter=outside, length=length,
                       emissivity=eps, surroundings=around)
    width = np.where(face > 0.0, face / outside, np.pi * outside / 4.0)  # any width where the face is hidden
    faces = bare_surface("vertical_plate", surface_temperature=tf, height=outside, width=width, emissivity=eps,
                         surroundings=around)
    rim_area = np.pi * outside * length
    q_item = rim.q_per_area * rim_area + faces.q_per_area * 2.0 * face
    line = insulated_pipe(pipe, tf, layers, jacket_emissivity=jacket_emissivity if layers else eps,
                          length=length, surroundings=around)
    q_line = line.q_total
    extra = q_item - q_line
    notes = [CAUTION_BARE]
    with np.errstate(divide="ignore", invalid="ignore"):
        per_metre = q_line / length
        equivalent = np.where(np.abs(per_metre) > 1e-9, extra / per_metre, np.nan)
    if np.isnan(equivalent).any():
        notes.append("equivalent length undefined (NaN) where the line neither loses nor gains heat")
    if (face <= 0.0).any():
        notes.append("the insulation is as large as the flange: its faces are hidden, only the rim is counted")
    shape = np.broadcast_shapes(np.shape(q_item), np.shape(q_line), np.shape(rim_area), np.shape(face))
    full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    warnings = rim.warnings | faces.warnings | line.warnings
    return FittingResult(area=full(rim_area + 2.0 * face), item_length=full(length), q_item=full(q_item),
                         q_insulated_same_length=full(q_line), extra_heat=full(extra),
                         equivalent_length=full(equivalent), warnings=full(warnings), notes=tuple(notes))


_PARAMETERS = """
    Parameters
    ----------
    nps : numeric or str
        Nominal pipe size of the line (``4``, ``1.5``, ``"1-1/2"``); sizes of the tables only.
    fluid_temperature : numeric
        Fluid in the line [K]; the bare item's surface is taken at it (conservative).
    pressure_class : {150, 300}
        ASME B16.5 / B16.10 pressure class.
    layers : list of Layer, optional
        The line's layers from the pipe outwards (default: a bare line). They set the faces' inner
        diameter and the line's heat over the item's length.
    emissivity : numeric
        Long-wave emissivity of the bare metal [-] (default 0.9, oxidized or painted steel).
    jacket_emissivity : numeric
        Emissivity of the line's outer layer [-] (the line's own surface when it has no layers: ``emissivity``).
    air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature, solar_irradiance, pressure
        Fields of the surroundings (:class:`convlib.surroundings.Surroundings`), or give ``surroundings``.
    surroundings : Surroundings, optional
        The surroundings as one object (not with the keywords).

    Returns
    -------
    FittingResult
"""


def _resolve(surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction,
             sky_temperature, solar_irradiance, pressure) -> Surroundings:
    return resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                   surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                   sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)


def bare_flange_pair(nps, fluid_temperature, *, pressure_class=150, layers=None, emissivity=0.9,
                     jacket_emissivity=0.9, air_temperature=None, wind_speed=None, surroundings_temperature=None,
                     sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None,
                     surroundings: Surroundings | None = None) -> FittingResult:
    """Heat of one bare flange pair (two ASME B16.5 weld-neck flanges) and what it adds to the line.

    Geometry, assumptions and cautions: module docstring.

    {parameters}

    Examples
    --------
    An NPS 4 Class 150 pair on a line at 180 degC with 50 mm of insulation, still air at 20 degC:

    >>> r = bare_flange_pair(4, 453.15, layers=[Layer(0.05, 0.045)], air_temperature=293.15)
    >>> round(float(r.q_item)), round(float(r.equivalent_length), 1)
    (122, 1.8)
    """
    around = _resolve(surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction,
                      sky_temperature, solar_irradiance, pressure)
    return _item("flange_pair", nps, fluid_temperature, pressure_class, layers, emissivity, jacket_emissivity, around)


def bare_valve(nps, fluid_temperature, *, pressure_class=150, layers=None, emissivity=0.9, jacket_emissivity=0.9,
               air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None,
               sky_temperature=None, solar_irradiance=None, pressure=None,
               surroundings: Surroundings | None = None) -> FittingResult:
    """Heat of one bare flanged gate valve (ASME B16.10) with its two line flanges, and what it adds to the line.

    Geometry (an approximation: the body as a cylinder of the flange diameter, bonnet not counted),
    assumptions and cautions: module docstring.

    {parameters}

    Examples
    --------
    >>> r = bare_valve(4, 453.15, layers=[Layer(0.05, 0.045)], air_temperature=293.15)
    >>> round(float(r.item_length), 3), round(float(r.q_item))
    (0.273, 594)
    """
    around = _resolve(surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction,
                      sky_temperature, solar_irradiance, pressure)
    return _item("valve", nps, fluid_temperature, pressure_class, layers, emissivity, jacket_emissivity, around)


bare_flange_pair.__doc__ = bare_flange_pair.__doc__.replace("{parameters}", _PARAMETERS.strip())
bare_valve.__doc__ = bare_valve.__doc__.replace("{parameters}", _PARAMETERS.strip())
