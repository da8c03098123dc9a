"""Insulation of a vessel or duct sized face by face against a surface-temperature or heat-flux limit."""
from __future__ import annotations

import functools
import inspect
from typing import NamedTuple

import numpy as np

from .design import COMMERCIAL_THICKNESSES, listed_thickness
from .errors import InputError
from .roots import find_root
from .validation import as_array

__all__ = ["FaceThickness", "insulation_per_face"]


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

    >>> from convlib.vessels import vertical_tank, Layer
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
