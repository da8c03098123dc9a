"""The one way layers are written, on the command line and in a line list.

A layer is ``THICKNESS,CONDUCTIVITY[,NAME]`` (``50mm,0.045,mineral wool``; a number with or without its unit,
plain numbers per the entry point: mm / W/m/K in SI, in / Btu·in/(h·ft²·°F) in US units, or the CSV column's
unit). The conductivity may instead be the name of a material of :mod:`convlib.materials`
(``50mm,glass_fiber_pipe_alley_k``): the layer then takes that material's k(T). Several layers, from the pipe outwards, are separated by ``;`` in a line-list cell (a CSV cell holding
commas is quoted, as spreadsheets do) and given as repeated ``--layer`` options on the command line.

The line list's form of version 0.2.0, ``THICKNESS@CONDUCTIVITY NAME``, is still read for one version, with a
:class:`DeprecationWarning`.
"""
from __future__ import annotations

import re
import warnings

from .errors import InputError
from .units import is_unit

__all__ = ["LAYER_SYNTAX", "LAYER_EXAMPLE", "split_layer", "split_layers", "conductivity_and_name",
           "layer_conductivity"]

LAYER_SYNTAX = "THICKNESS,CONDUCTIVITY[,NAME]"
LAYER_EXAMPLE = "50mm,0.045,mineral wool"
_LEGACY = re.compile(r"^(?P<thickness>[^@,]+?)\s*@\s*(?P<rest>.+)$", re.S)


def split_layer(text: str, field: str = "layer") -> tuple[str, str, str | None]:
    """(thickness text, conductivity text, name or ``None``) of one layer.

    Examples
    --------
    >>> split_layer("50mm,0.045,mineral wool")
    ('50mm', '0.045', 'mineral wool')
    >>> split_layer("2in, 0.3 Btu*in/(h*ft**2*degF)")
    ('2in', '0.3 Btu*in/(h*ft**2*degF)', None)
    >>> split_layer("50")
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: layer '50': write THICKNESS,CONDUCTIVITY[,NAME], e.g. 50mm,0.045,mineral wool
    """
    text = str(text).strip()
    if "," not in text:
        legacy = _LEGACY.match(text)
        if legacy is not None:
            warnings.warn(f"{field} {text!r}: THICKNESS@CONDUCTIVITY NAME is deprecated; write {LAYER_SYNTAX}, "
                          f"e.g. {LAYER_EXAMPLE}", DeprecationWarning, stacklevel=3)
            conductivity, name = conductivity_and_name(legacy["rest"].strip())
            return legacy["thickness"].strip(), conductivity, name or None
    parts = [p.strip() for p in text.split(",")]
    if len(parts) not in (2, 3) or not parts[0] or not parts[1]:
        raise InputError(f"{field} {text!r}: write {LAYER_SYNTAX}, e.g. {LAYER_EXAMPLE}", field=field,
                         rule=LAYER_SYNTAX, value=text)
    return parts[0], parts[1], (parts[2] or None) if len(parts) == 3 else None


def split_layers(cell: str) -> list[str]:
    """The layers of a line-list cell, separated by ``;`` (``bare`` or ``none``: no layer).

    >>> split_layers("80mm,0.045,mineral wool; 0.7mm,200,aluminium jacket")
    ['80mm,0.045,mineral wool', '0.7mm,200,aluminium jacket']
    """
    text = str(cell).strip()
    if text.lower() in ("bare", "none", ""):
        return []
    return [part.strip() for part in text.split(";") if part.strip()]


_LEADING_NUMBER = re.compile(r"\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)(.*)$", re.S)


def conductivity_and_name(text: str) -> tuple[str, str]:
    """``"0.045 W/m/K mineral wool"`` -> ``("0.045 W/m/K", "mineral wool")``: the number and the longest run of
    following words that reads as a conductivity unit (written after a space or glued to the number, e.g.
    ``"1Btu in/(h ft² °F)"``), the rest the layer's name.

    >>> conductivity_and_name("1Btu in/(h ft² °F) wool")
    ('1Btu in/(h ft² °F)', 'wool')
    >>> conductivity_and_name("0.045 mineral wool")
    ('0.045', 'mineral wool')
    """
    m = _LEADING_NUMBER.match(text)
    if m is None:
        words = text.split()
        return (words[0] if words else ""), " ".join(words[1:])
    number, rest = m[1], m[2]
    glued = bool(rest) and not rest[0].isspace()
    words = rest.split()
    for n in range(len(words), 0, -1):
        if is_unit(" ".join(words[:n]), "conductivity"):
            return number + ("" if glued else " ") + " ".join(words[:n]), " ".join(words[n:])
    if glued and words:  # a unit glued to the number that is not a conductivity: reported by the reader
        return number + words[0], " ".join(words[1:])
    return number, " ".join(words)


def layer_conductivity(text: str, read_number, field: str):
    """A layer's conductivity text: ``(material name, None)`` when it names a material of :mod:`convlib.materials`,
    else ``(None, read_number(text))``. A word that is neither a conductivity nor a material raises the reader's
    :class:`~convlib.errors.InputError` with the material names added.

    >>> layer_conductivity("Calcium_Silicate_C533_Type1", float, "layer")
    ('calcium_silicate_c533_type1', None)
    >>> layer_conductivity("0.045", float, "layer")
    (None, 0.045)
    """
    from .materials import find, material_names  # the library is built on first use

    found = find(text)
    if found is not None:
        return found.name, None
    try:
        return None, read_number(text)
    except InputError as exc:
        if _LEADING_NUMBER.match(str(text)) is not None:
            raise
        names = ", ".join(material_names())
        raise InputError(f"{exc}; or a material name: {names}", field=exc.field or field,
                         rule=f"{exc.rule}, or one of: {names}", value=exc.value) from None
