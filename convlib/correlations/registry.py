"""The correlation registry: one frozen record per published law, dispatch by look-up.

To add a correlation: write its function in ``natural.py`` or ``forced.py``
and append one :class:`Correlation` record to :data:`REGISTRY`. The test
suite is parametrized over every record, so a record whose function, ranges
or metadata are inconsistent fails at once.
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass, field
from decimal import Decimal
from typing import Callable

import numpy as np

from ..errors import InputError
from ..regimes import Flag, summarize_flags
from ..validation import check_groups
from . import forced as _f
from . import natural as _n

__all__ = [
    "Correlation", "REGISTRY", "GEOMETRIES", "catalog", "get", "methods", "evaluate", "nusselt",
    "OutOfRangeWarning", "DISPLAY_NAMES", "display_name",
]


class OutOfRangeWarning(UserWarning):
    """A correlation was evaluated outside its published validity range."""


@dataclass(frozen=True)
class Correlation:
    """Metadata of one published correlation.

    Ranges are inclusive ``(low, high)`` pairs; ``None`` means the source
    states no limit on that group. A bound written as a string is the source's
    own text (``"0.71"``): it is stored as a float and compared with a tolerance of
    half a unit in its last written digit (``"0.7"``: 0.05; ``"0.71"``: 0.005;
    ``"380"``: 0.5), the rounding the source's statement allows -- its data were
    a fluid such as air (Pr 0.70-0.72), not a sharp cut at the printed digit.
    A float bound is compared exactly. ``accuracy_percent`` is the stated (or,
    where marked, the customary) scatter band, read as a 95 % band by the studies.
    """

    key: str
    geometry: str
    mode: str  # "natural" or "forced"
    function: Callable
    inputs: tuple[str, ...]
    citation: str
    doi: str | None = None
    ra_range: tuple[float, float] | None = None
    gr_range: tuple[float, float] | None = None
    re_range: tuple[float, float] | None = None
    pr_range: tuple[float, float] | None = None
    extra_ranges: tuple[tuple[str, float, float], ...] = ()
    accuracy_percent: float = 20.0
    accuracy_note: str = ""
    property_temperature: str = "film"  # "film" or "free_stream"
    fitted_for_air_only: bool = False
    boundaries: tuple[tuple[str, float, str], ...] = ()  # (group, value, "upper"|"lower" piece owns it)
    length_scale: str = "diameter"
    notes: str = ""
    display_name: str = ""  # authors' names as published; filled from DISPLAY_NAMES when empty
    # (group, tolerance below low, tolerance above high) for bounds given as the source's text; set from them
    range_rounding: tuple[tuple[str, float, float], ...] = field(default=(), init=False)

    def __post_init__(self):
        if not self.display_name:
            object.__setattr__(self, "display_name", display_name(self.key))
        rounding = []
        for name in ("ra_range", "gr_range", "re_range", "pr_range"):
            bounds = getattr(self, name)
            if bounds is not None:
                (low, tol_low), (high, tol_high) = (_stated(b) for b in bounds)
                object.__setattr__(self, name, (low, high))
                if tol_low or tol_high:
                    rounding.append((name[:2].capitalize() if name != "pr_range" else "Pr", tol_low, tol_high))
        extra = []
        for group, low_text, high_text in self.extra_ranges:
            (low, tol_low), (high, tol_high) = _stated(low_text), _stated(high_text)
            extra.append((group, low, high))
            if tol_low or tol_high:
                rounding.append((group, tol_low, tol_high))
        object.__setattr__(self, "extra_ranges", tuple(extra))
        object.__setattr__(self, "range_rounding", tuple(rounding))

    def nusselt(self, **groups) -> np.ndarray:
        """The law's Nusselt number from the groups it takes (others ignored, ``None`` for an optional one);
        no checks, no flags (:func:`evaluate` adds them; solver loops call this directly)."""
        args = {name: np.asarray(groups[name], dtype=float) for name in self.inputs if groups.get(name) is not None}
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            return np.asarray(self.function(**args), dtype=float)

    def tolerance(self, group: str) -> tuple[float, float]:
        """(below low, above high) tolerance of a group's range from the source's rounding; (0, 0) if exact."""
        return next(((lo, hi) for name, lo, hi in self.range_rounding if name == group), (0.0, 0.0))

    def as_dict(self) -> dict:
        """Plain record for tables and JSON (no function object)."""
        out = {k: v for k, v in self.__dict__.items() if k != "function"}
        out["function"] = f"{self.function.__module__}.{self.function.__name__}"
        return out


def _stated(bound) -> tuple[float | None, float]:
    """(value, tolerance) of a range bound: a float is exact; a string is the source's text, good to half a
    unit in its last written digit.

    >>> _stated("0.71"), _stated("0.7"), _stated("380"), _stated(1e4), _stated(None)
    ((0.71, 0.005), (0.7, 0.05), (380.0, 0.5), (10000.0, 0.0), (None, 0.0))
    """
    if not isinstance(bound, str):
        return (None if bound is None else float(bound)), 0.0
    exponent = Decimal(bound).as_tuple().exponent
    return float(bound), 0.5 * 10.0 ** exponent


#: Name of each law as people cite it (authors as published, en dash between co-authors), by key.
DISPLAY_NAMES = {
    "churchill_chu": "Churchill–Chu", "churchill_chu_laminar": "Churchill–Chu, laminar", "morgan": "Morgan",
    "kuehn_goldstein": "Kuehn–Goldstein", "mcadams": "McAdams", "vdi": "VDI Heat Atlas", "churchill": "Churchill",
    "yuge": "Yuge", "churchill_bernstein": "Churchill–Bernstein", "hilpert": "Hilpert", "zukauskas": "Zukauskas",
    "whitaker": "Whitaker", "jakob": "Jakob", "laminar": "Pohlhausen, laminar", "mixed_layer": "mixed boundary layer",
}


def display_name(key: str) -> str:
    """Name of a law for people, e.g. ``"churchill_bernstein"`` -> ``"Churchill–Bernstein"``."""
    return DISPLAY_NAMES.get(key) or key.replace("_", " ").capitalize()


_CC_HC = "Churchill & Chu (1975), Int. J. Heat Mass Transfer 18:1049"
_CC_VP = "Churchill & Chu (1975), Int. J. Heat Mass Transfer 18:1323"
_POPIEL = " with the slender-cylinder factor of Popiel, Wojtkowiak & Bober (2007), Exp. Therm. Fluid Sci. 32:607"
_TYPICAL = "no single figure stated by the source; ±20 % is the customary band for free-convection laws (common practice, no source)"

REGISTRY: tuple[Correlation, ...] = (
    # ---- horizontal cylinder, natural
    Correlation("churchill_chu", "horizontal_cylinder", "natural", _n.nusselt_horizontal_cylinder_churchill_chu,
                ("Ra", "Pr"), _CC_HC + ", eq. 4", "10.1016/0017-9310(75)90222-7",
                ra_range=(1e-5, 1e12), accuracy_note=_TYPICAL),
    Correlation("churchill_chu_laminar", "horizontal_cylinder", "natural",
                _n.nusselt_horizontal_cylinder_churchill_chu_laminar, ("Ra", "Pr"), _CC_HC + ", eq. 5",
                "10.1016/0017-9310(75)90222-7", ra_range=(1e-6, 1e9), accuracy_note=_TYPICAL),
    Correlation("morgan", "horizontal_cylinder", "natural", _n.nusselt_horizontal_cylinder_morgan, ("Ra",),
                "Morgan (1975), Advances in Heat Transfer 11:199, Table II", "10.1016/S0065-2717(08)70075-3",
                ra_range=(1e-10, 1e12), pr_range=("0.6", "1.0"), fitted_for_air_only=True,
                accuracy_note=_TYPICAL,
                boundaries=(("Ra", 1e-2, "upper"), ("Ra", 1e2, "upper"), ("Ra", 1e4, "upper"), ("Ra", 1e7, "upper")),
                notes="fitted for air; flagged for other fluids"),
    Correlation("kuehn_goldstein", "horizontal_cylinder", "natural", _n.nusselt_horizontal_cylinder_kuehn_goldstein,
                ("Ra", "Pr"), "Kuehn & Goldstein (1976), Int. J. Heat Mass Transfer 19:1127",
                "10.1016/0017-9310(76)90145-9", ra_range=(1e-7, 1e12), pr_range=("0.5", None),
                accuracy_note=_TYPICAL, notes="not for low-Pr fluids; Ra range from memory"),
    # ---- vertical plate, natural (length scale = height)
    Correlation("churchill_chu", "vertical_plate", "natural", _n.nusselt_vertical_plate_churchill_chu, ("Ra", "Pr"),
                _CC_VP + ", eq. 6", "10.1016/0017-9310(75)90243-4", ra_range=(1e-1, 1e12),
                accuracy_note=_TYPICAL, length_scale="height"),
    Correlation("churchill_chu_laminar", "vertical_plate", "natural",
                _n.nusselt_vertical_plate_churchill_chu_laminar, ("Ra", "Pr"), _CC_VP + ", eq. 5",
                "10.1016/0017-9310(75)90243-4", ra_range=(1e-1, 1e9), accuracy_note=_TYPICAL,
                length_scale="height"),
    # ---- vertical cylinder, natural (length scale = height)
    Correlation("churchill_chu", "vertical_cylinder", "natural", _n.nusselt_vertical_cylinder_churchill_chu,
                ("Ra", "Pr", "diameter_over_length"), _CC_VP + ", eq. 6" + _POPIEL, "10.1016/0017-9310(75)90243-4",
                ra_range=(1e-1, 1e12), accuracy_note=_TYPICAL, length_scale="height",
                notes="plate law times the Popiel factor at every D/L (continuous, 1 for a plate); slender where "
                      "D/L < 35/Gr_L^(1/4) (informational); out of range beyond the factor's fit (curvature > 5, "
                      "or slender above the laminar Gr_L 4e9)"),
    Correlation("churchill_chu_laminar", "vertical_cylinder", "natural",
                _n.nusselt_vertical_cylinder_churchill_chu_laminar, ("Ra", "Pr", "diameter_over_length"),
                _CC_VP + ", eq. 5" + _POPIEL, "10.1016/0017-9310(75)90243-4", ra_range=(1e-1, 1e9),
                accuracy_note=_TYPICAL, length_scale="height"),
    # ---- horizontal plates, natural (length scale = area / perimeter)
    Correlation("mcadams", "horizontal_plate_up", "natural", _n.nusselt_horizontal_plate_up_mcadams, ("Ra",),
                "McAdams (1954), Heat Transmission, 3rd ed., ch. 7", None, ra_range=(1e4, 1e11),
                pr_range=("0.7", None), accuracy_note=_TYPICAL, boundaries=(("Ra", 1e7, "lower"),),
                length_scale="area_over_perimeter"),
    Correlation("vdi", "horizontal_plate_up", "natural", _n.nusselt_horizontal_plate_up_vdi, ("Ra", "Pr"),
                "VDI Heat Atlas, 2nd ed. (2010), part F2; laminar branch Stewartson (1958), ZAMP 9:276",
                "10.1007/BF02033031", ra_range=(1e1, 1e12), accuracy_note=_TYPICAL,
                boundaries=(("Ra_f2", 7e4, "lower"),), length_scale="area_over_perimeter",
                notes="Ra range from memory"),
    Correlation("mcadams", "horizontal_plate_down", "natural", _n.nusselt_horizontal_plate_down_mcadams, ("Ra",),
                "McAdams (1954), Heat Transmission, 3rd ed., ch. 7", None, ra_range=(3e5, 3e10),
                pr_range=("0.7", None), accuracy_note=_TYPICAL, length_scale="area_over_perimeter"),
    Correlation("vdi", "horizontal_plate_down", "natural", _n.nusselt_horizontal_plate_down_vdi, ("Ra", "Pr"),
                "VDI Heat Atlas, 2nd ed. (2010), part F2", None, ra_range=(1e3, 1e10), accuracy_note=_TYPICAL,
                length_scale="area_over_perimeter", notes="Ra range from memory"),
    # ---- sphere, natural
    Correlation("churchill", "sphere", "natural", _n.nusselt_sphere_churchill, ("Ra", "Pr"),
                "Churchill (1983), Heat Exchanger Design Handbook, section 2.5.7", None,
                ra_range=(0.0, 1e13), pr_range=("0.7", None), accuracy_note=_TYPICAL),
    Correlation("yuge", "sphere", "natural", _n.nusselt_sphere_yuge, ("Ra", "Pr"),
                "Yuge (1960), J. Heat Transfer 82:214", "10.1115/1.3679912", gr_range=(1.0, 1e5),
                pr_range=("0.6", "1.0"), fitted_for_air_only=True, accuracy_note=_TYPICAL),
    # ---- cylinder in cross-flow, forced
    Correlation("churchill_bernstein", "cylinder_crossflow", "forced",
                _f.nusselt_cylinder_crossflow_churchill_bernstein, ("Re", "Pr"),
                "Churchill & Bernstein (1977), J. Heat Transfer 99:300, eq. 25", "10.1115/1.3450685",
                re_range=(1e-2, 1e7), extra_ranges=(("RePr", 0.2, np.inf),), accuracy_percent=20.0,
                accuracy_note="about ±20 % for most data (source, from memory)"),
    Correlation("hilpert", "cylinder_crossflow", "forced", _f.nusselt_cylinder_crossflow_hilpert, ("Re", "Pr"),
                "Hilpert (1933), Forsch. Ing.-Wes. 4:215; constants of Knudsen & Katz (1958)",
                "10.1007/BF02719754", re_range=(0.4, 4e5), pr_range=("0.7", None), accuracy_percent=25.0,
                accuracy_note="about ±25 % (common practice, no source)",
                boundaries=(("Re", 4.0, "upper"), ("Re", 40.0, "upper"), ("Re", 4000.0, "upper"),
                            ("Re", 40000.0, "upper"))),
    Correlation("zukauskas", "cylinder_crossflow", "forced", _f.nusselt_cylinder_crossflow_zukauskas,
                ("Re", "Pr", "Pr_s"), "Zukauskas (1972), Advances in Heat Transfer 8:93",
                "10.1016/S0065-2717(08)70038-8", re_range=(1.0, 1e6), pr_range=("0.7", "500"),
                accuracy_percent=25.0, accuracy_note="about ±25 % (common practice, no source)",
                property_temperature="free_stream",
                boundaries=(("Re", 40.0, "upper"), ("Re", 1e3, "upper"), ("Re", 2e5, "upper"), ("Pr", 10.0, "lower")),
                notes="properties at the free stream, Pr_s at the surface"),
    # ---- sphere in a stream, forced
    Correlation("whitaker", "sphere_crossflow", "forced", _f.nusselt_sphere_crossflow_whitaker,
                ("Re", "Pr", "viscosity_ratio"), "Whitaker (1972), AIChE J. 18:361", "10.1002/aic.690180219",
                re_range=(3.5, 7.6e4), pr_range=("0.71", "380"), extra_ranges=(("viscosity_ratio", "1.0", "3.2"),),
                accuracy_percent=30.0, accuracy_note="±30 % (source)", property_temperature="free_stream"),
    # ---- square cylinder (duct) in cross flow, a flat face to the wind, forced (length scale = the side)
    Correlation("jakob", "square_cylinder_crossflow", "forced", _f.nusselt_square_cylinder_crossflow_jakob,
                ("Re", "Pr"), "Jakob (1949), Heat Transfer, Vol. 1, Wiley; constants as tabulated by Incropera et al., "
                "Fundamentals of Heat and Mass Transfer, 6th ed., Table 7.3", None, re_range=(5e3, 1e5),
                pr_range=("0.7", None), fitted_for_air_only=True, accuracy_percent=25.0,
                accuracy_note="about ±25 % (common practice, no source)", length_scale="side",
                notes="measured in gases; a section far from square is outside the law"),
    # ---- flat plate in parallel flow, forced (length scale = length along the flow)
    Correlation("laminar", "plate_parallel_flow", "forced", _f.nusselt_plate_parallel_flow_laminar, ("Re", "Pr"),
                "Pohlhausen (1921), ZAMM 1:115", "10.1002/zamm.19210010205", re_range=(1e2, 5e5),
                pr_range=("0.6", None), accuracy_percent=10.0,
                accuracy_note="exact similarity solution; real wind is rarely laminar (common practice, no source)",
                length_scale="flow_length"),
    Correlation("mixed_layer", "plate_parallel_flow", "forced", _f.nusselt_plate_parallel_flow_mixed_layer,
                ("Re", "Pr"), "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 7.38", None,
                re_range=(1e2, 1e8), pr_range=("0.6", "60"), accuracy_percent=25.0,
                accuracy_note="about ±25 % (common practice, no source)",
                boundaries=(("Re", 5e5, "lower"),), length_scale="flow_length"),
)

GEOMETRIES: tuple[str, ...] = tuple(dict.fromkeys(rec.geometry for rec in REGISTRY))
_LOOKUP: dict[tuple[str, str], Correlation] = {(rec.geometry, rec.key): rec for rec in REGISTRY}


def catalog(geometry: str | None = None, mode: str | None = None) -> list[dict]:
    """List the registry as plain records (optionally for one geometry and mode).

    Examples
    --------
    >>> [r["key"] for r in catalog("horizontal_cylinder")]
    ['churchill_chu', 'churchill_chu_laminar', 'morgan', 'kuehn_goldstein']
    """
    return [rec.as_dict() for rec in REGISTRY
            if (geometry is None or rec.geometry == geometry) and (mode is None or rec.mode == mode)]


def methods(geometry: str, mode: str | None = None) -> list[str]:
    """Keys of the correlations registered for a geometry.

    >>> methods("cylinder_crossflow")
    ['churchill_bernstein', 'hilpert', 'zukauskas']
    """
    _check_geometry(geometry)
    return [rec.key for rec in REGISTRY if rec.geometry == geometry and (mode is None or rec.mode == mode)]


def _check_geometry(geometry: str) -> None:
    if geometry not in GEOMETRIES:
        rule = f"one of: {', '.join(GEOMETRIES)}"
        raise InputError(f"unknown geometry {geometry!r}; choose {rule}", field="geometry", rule=rule, value=geometry)


def get(geometry: str, method: str) -> Correlation:
    """The record for (geometry, method); unknown names raise ``InputError`` (a ``ValueError``) listing the choices."""
    _check_geometry(geometry)
    try:
        return _LOOKUP[(geometry, method)]
    except KeyError:
        rule = f"one of: {', '.join(methods(geometry))}"
        raise InputError(f"unknown method {method!r} for geometry {geometry!r}; choose {rule}", field="method",
                         rule=rule, value=method) from None


def _outside(value, bounds, tolerance=(0.0, 0.0)) -> np.ndarray:
    """True where ``value`` lies outside the inclusive ``bounds``, widened by the source's rounding."""
    low, high = bounds
    out = np.zeros(np.shape(value), dtype=bool)
    if low is not None:
        out |= value < low - tolerance[0]
    if high is not None:
        out |= value > high + tolerance[1]
    return out


def evaluate(geometry: str, method: str, *, check: bool = True, **groups) -> tuple[np.ndarray, np.ndarray]:
    """Evaluate a correlation and its validity flags.

    Parameters
    ----------
    geometry, method : str
        Registry keys.
    check : bool
        Compute the validity flags (``False``: all zero; for solver iterations whose
        final point is checked separately).
    **groups : numeric
        The dimensionless inputs the record names (``Ra``, ``Re``, ``Pr``,
        ``Pr_s``, ``diameter_over_length``, ``viscosity_ratio``).

    Returns
    -------
    nusselt : numpy.ndarray
        Nusselt number on the record's length scale [-]
    flags : numpy.ndarray of int
        Bit mask of :class:`convlib.regimes.Flag` per point.
    """
    rec = get(geometry, method)
    missing = [name for name in rec.inputs if groups.get(name) is None and name not in ("Pr_s", "viscosity_ratio")]
    if missing:
        raise InputError(f"{geometry}/{method} needs {', '.join(missing)}; inputs are {', '.join(rec.inputs)}",
                         field=", ".join(missing), rule=f"given for {geometry}/{method}", value=None)
    nu = rec.nusselt(**groups)
    shape = np.broadcast_shapes(nu.shape, *(np.shape(v) for v in groups.values() if v is not None))
    nu = np.broadcast_to(nu, shape)
    pr = groups.get("Pr")
    range_bit = Flag.NATURAL_OUT_OF_RANGE if rec.mode == "natural" else Flag.FORCED_OUT_OF_RANGE
    flags = np.zeros(shape, dtype=np.int16)
    if not check:
        return np.where(np.isfinite(nu), nu, 0.0), flags
    if rec.ra_range is not None:
        flags |= np.where(_outside(np.asarray(groups["Ra"], float), rec.ra_range, rec.tolerance("Ra")), range_bit,
                          0).astype(np.int16)
    if rec.gr_range is not None:
        gr = np.asarray(groups["Ra"], float) / np.asarray(pr, float)
        flags |= np.where(_outside(gr, rec.gr_range, rec.tolerance("Gr")), range_bit, 0).astype(np.int16)
    if rec.re_range is not None:
        flags |= np.where(_outside(np.asarray(groups["Re"], float), rec.re_range, rec.tolerance("Re")), range_bit,
                          0).astype(np.int16)
    if rec.pr_range is not None and pr is not None:
        flags |= np.where(_outside(np.asarray(pr, float), rec.pr_range, rec.tolerance("Pr")),
                          Flag.PRANDTL_OUT_OF_RANGE, 0).astype(np.int16)
    for name, low, high in rec.extra_ranges:
        if name == "RePr":
            value = np.asarray(groups["Re"], float) * np.asarray(pr, float)
        elif groups.get(name) is None:
            continue
        else:
            value = np.asarray(groups[name], float)
        bit = Flag.PROPERTY_RATIO_OUT_OF_RANGE if name == "viscosity_ratio" else range_bit
        flags |= np.where(_outside(value, (low, high), rec.tolerance(name)), bit, 0).astype(np.int16)
    if rec.geometry == "vertical_cylinder":
        dol = groups["diameter_over_length"]
        slender = ~_n.thin_cylinder_criterion(groups["Ra"], pr, dol)
        flags |= np.where(slender, Flag.SLENDER_CYLINDER_CORRECTED, 0).astype(np.int16)
        # the curvature factor outside its fit is a range fault, not information (issue 12 item 7)
        flags |= np.where(_n.popiel_out_of_range(groups["Ra"], pr, dol), range_bit, 0).astype(np.int16)
        flags |= np.where(_outside(np.asarray(pr, float), _n.POPIEL_PRANDTL), Flag.PRANDTL_OUT_OF_RANGE,
                          0).astype(np.int16)
    bad = ~np.isfinite(nu)
    if bad.any():
        # A law evaluated where it has no meaning (e.g. zero Ra in a power law that
        # needs Ra > 0) returns its limit value 0 and is flagged, never NaN.
        nu = np.where(bad, 0.0, nu)
        flags |= np.where(bad, range_bit, 0).astype(np.int16)
    return nu, flags


def nusselt(geometry: str, method: str, Ra=None, Re=None, Pr=None, Pr_s=None, *, strict: bool = False,
            full_output: bool = False, **extra):
    """Nusselt number from the registry, vectorized.

    Parameters
    ----------
    geometry : str
        One of :data:`GEOMETRIES`, e.g. ``"horizontal_cylinder"``.
    method : str
        Registry key, e.g. ``"churchill_chu"``; :func:`methods` lists them.
    Ra, Re, Pr, Pr_s : numeric, optional
        Dimensionless groups the correlation needs [-].
    strict : bool
        Raise ``InputError`` (a ``ValueError``) instead of warning when any point is out of range.
        Groups outside :data:`convlib.validation.GROUP_RANGES` (no physical meaning) always raise it.
    full_output : bool
        Return ``(nusselt, flags)`` with the per-point bit mask.
    **extra : numeric
        Further groups some records need (``diameter_over_length``, ``viscosity_ratio``).

    Returns
    -------
    numpy.ndarray (or tuple, see ``full_output``)

    Examples
    --------
    >>> round(float(nusselt("horizontal_cylinder", "churchill_chu", Ra=1e6, Pr=0.71)), 2)
    14.54
    >>> nusselt("horizontal_cylinder", "churchill", Ra=1e6, Pr=0.71)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: unknown method 'churchill' for geometry 'horizontal_cylinder'; choose one of: churchill_chu, churchill_chu_laminar, morgan, kuehn_goldstein
    """
    groups = check_groups(Ra=Ra, Re=Re, Pr=Pr, Pr_s=Pr_s, **extra)  # physically meaningful, no overflow
    nu, flags = evaluate(geometry, method, **groups)
    if (flags & ~Flag.INFORMATIONAL).any():
        text = f"{geometry}/{method}: " + "; ".join(summarize_flags(flags & ~Flag.INFORMATIONAL))
        if strict:
            given = {name: v for name, v in (("Ra", Ra), ("Re", Re), ("Pr", Pr)) if v is not None}
            raise InputError(text, field=", ".join(given), value=given,
                             rule=f"within the validity range of {geometry}/{method} (strict=True)")
        if not full_output:
            warnings.warn(text, OutOfRangeWarning, stacklevel=2)
    return (nu, flags) if full_output else nu
