"""Fluid properties for convection: CoolProp, cached interpolation tables, dew point.

CoolProp is the source of truth. :func:`fluid_properties` (and :func:`air`)
interpolates a :class:`PropertyTable` built once per (fluid, pressure, phase)
on a uniform grid of about 1 K; ``exact=True`` calls CoolProp for every point
and is the check of the tables (relative error < 0.05 % for every property).
The table of air at 101325 Pa, the default of every bare-surface and
insulated-pipe call, ships with the package (:mod:`convlib.air_table`, made
from CoolProp by the same code): with it CoolProp, slow to import, is imported
only by calls that need it (other pressures or fluids, ``exact=True``, dew point).

Pressure [Pa] is an input everywhere: at 2000 m the air density is 22 % lower
and the kinematic viscosity 27 % higher. With at most 8 distinct pressures,
one table per pressure is used. With more (a Monte Carlo over pressure),
tables at fixed nodes :math:`p_k = 2^{k/8}` Pa (about 9 % apart, cached and
reused) bracket each point and are interpolated linearly in pressure: for a
gas :math:`\\rho \\propto p` up to the second-virial term and the transport
properties barely depend on pressure. Measured for air against CoolProp, the
added error is about 1e-5 at 50-110 kPa and 200-1000 K, < 2e-4 at 20 kPa-1 MPa
and 150-1000 K.

A table covers one phase: ``"gas"`` from :math:`T_{dew} + 0.5` K (or CoolProp
``Tmin`` below the triple-point pressure) to ``Tmax``; ``"liquid"`` from the
melting temperature (at least ``Tmin``) to :math:`T_{bubble} - 0.5` K;
``"supercritical"`` (above the critical pressure) over the whole range.

References
----------
.. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort (2014), "Pure and
   pseudo-pure fluid thermophysical property evaluation and the open-source
   thermophysical property library CoolProp", Ind. Eng. Chem. Res. 53:2498,
   doi:10.1021/ie4033999
.. [2] E. W. Lemmon, R. T Jacobsen, S. G. Penoncello, D. G. Friend (2000),
   "Thermodynamic properties of air and mixtures of nitrogen, argon and oxygen
   from 60 to 2000 K at pressures to 2000 MPa", J. Phys. Chem. Ref. Data
   29:331, doi:10.1063/1.1285884
.. [3] E. W. Lemmon, R. T Jacobsen (2004), "Viscosity and thermal
   conductivity equations for nitrogen, oxygen, argon, and air", Int. J.
   Thermophys. 25:21, doi:10.1023/B:IJOT.0000022327.04529.f3
.. [4] H. Herrmann, H.-J. Kretzschmar, D. P. Gatley (2009), "Thermodynamic
   properties of real moist air, dry air, steam, water, and ice", ASHRAE
   RP-1485 (the humid-air model behind CoolProp's ``HAPropsSI``).
"""
from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from typing import ClassVar, NamedTuple

import numpy as np

from convlib._lazy import LazyModule
from convlib.errors import InputError
from convlib.validation import as_array, check_choice

__all__ = ["FluidProperties", "PropertyTable", "air", "dew_point", "fluid_properties", "solver_properties"]

GRID_STEP = 1.0  # [K] nominal table spacing
SATURATION_MARGIN = 0.5  # [K] tables stop this far from the saturation line
MAX_PRESSURE_GROUPS = 8  # more distinct pressures -> interpolation between pressure nodes
NODES_PER_OCTAVE = 8  # pressure nodes p_k = 2**(k / NODES_PER_OCTAVE) Pa
BETA_CHOICES = (None, "ideal_gas", "coolprop")
_COOLPROP_KEYS = ("D", "V", "L", "C", "isobaric_expansion_coefficient")

# CoolProp takes about 2.5 s to import: imported at the first call that needs it. The air table at
# 101325 Pa (and the facts about air it rests on) ships with the package, see convlib.air_table.
CoolProp = LazyModule("CoolProp")
CP = LazyModule("CoolProp.CoolProp")


@dataclass(frozen=True, eq=False)
class FluidProperties:
    """Properties of a fluid; every field is an array of the inputs' broadcast shape.

    Attributes
    ----------
    T : temperature [K]
    pressure : pressure [Pa]
    rho : density [kg/m3]
    mu : dynamic viscosity [Pa s]
    nu : kinematic viscosity ``mu / rho`` [m2/s]
    k : thermal conductivity [W/m/K]
    cp : isobaric specific heat capacity [J/kg/K]
    pr : Prandtl number ``cp mu / k`` [-]
    alpha : thermal diffusivity ``k / (rho cp)`` [m2/s]
    beta : isobaric (volumetric) expansion coefficient [1/K]
    """

    T: np.ndarray
    pressure: np.ndarray
    rho: np.ndarray
    mu: np.ndarray
    nu: np.ndarray
    k: np.ndarray
    cp: np.ndarray
    pr: np.ndarray
    alpha: np.ndarray
    beta: np.ndarray


class _Fluid(NamedTuple):
    name: str  # CoolProp's canonical name, e.g. "CarbonDioxide" for "CO2"
    T_min: float
    T_max: float
    p_critical: float
    p_triple: float


@functools.lru_cache(maxsize=None)
def _fluid(fluid: str) -> _Fluid:
    shipped = _shipped(fluid)
    return shipped.fluid if shipped is not None else _coolprop_fluid(fluid)


def _coolprop_fluid(fluid: str) -> _Fluid:
    try:
        state = CoolProp.AbstractState("HEOS", fluid)
    except ValueError:
        names = CP.get_global_param_string("FluidsList").split(",")
        raise InputError(
            f"unknown fluid {fluid!r}; use a CoolProp fluid name such as Air, Nitrogen, "
            f"Oxygen, CO2, Water, Helium, Argon ({len(names)} in all: "
            "CoolProp.CoolProp.get_global_param_string('FluidsList'))",
            field="fluid", rule="a CoolProp fluid name", value=fluid,
        ) from None
    return _Fluid(state.name(), state.Tmin(), state.Tmax(), state.p_critical(), state.p_triple())


@functools.lru_cache(maxsize=256)
def _saturation(name: str, pressure: float) -> tuple[float, float] | None:
    """Bubble and dew temperatures [K] at ``pressure``; None if there is no liquid-vapour line."""
    shipped = _shipped(name, pressure)
    return shipped.saturation if shipped is not None else _coolprop_saturation(_fluid(name), pressure)


def _coolprop_saturation(info: _Fluid, pressure: float) -> tuple[float, float] | None:
    name = info.name
    if not info.p_triple < pressure < info.p_critical:
        return None
    state = CoolProp.AbstractState("HEOS", name)
    try:
        state.update(CoolProp.PQ_INPUTS, pressure, 0.0)
        bubble = state.T()
        state.update(CoolProp.PQ_INPUTS, pressure, 1.0)
        return bubble, state.T()
    except ValueError as err:
        raise InputError(f"CoolProp could not find the saturation temperature of {name} "
                         f"at {pressure:g} Pa: {err}", field="pressure",
                         rule=f"a pressure where CoolProp finds the saturation temperature of {name}",
                         value=pressure) from None


def _phase(info: _Fluid, pressure: float, T_low: float, T_high: float) -> str:
    """Phase of the table that serves temperatures T_low..T_high [K] at ``pressure``."""
    saturation = _saturation(info.name, pressure)
    if saturation is None:
        return "supercritical" if pressure >= info.p_critical else "gas"
    bubble, dew = saturation
    if T_low >= dew:
        return "gas"
    if T_high <= bubble:
        return "liquid"
    point = f"{bubble:.2f} K ({bubble - 273.15:.2f} °C)"
    if dew - bubble > 0.01:
        point = (f"range {bubble:.2f} to {dew:.2f} K "
                 f"({bubble - 273.15:.2f} to {dew - 273.15:.2f} °C)")
    raise InputError(
        f"temperatures straddle the boiling point of {info.name} at {pressure:g} Pa, {point}; "
        f"got {T_low:g} to {T_high:g} K. Evaluate the liquid and the vapour in separate calls.",
        field="temperature", rule=f"all on one side of the boiling point of {info.name} at {pressure:g} Pa",
        value=(T_low, T_high),
    )


@functools.lru_cache(maxsize=256)
def _temperature_range(name: str, pressure: float, phase: str) -> tuple[float, float]:
    shipped = _shipped(name, pressure, phase)
    if shipped is not None:
        return shipped.temperature_range
    return _coolprop_temperature_range(_fluid(name), _saturation(name, pressure), pressure, phase)


def _coolprop_temperature_range(info: _Fluid, saturation: tuple[float, float] | None, pressure: float,
                                phase: str) -> tuple[float, float]:
    name = info.name
    low, high = info.T_min, info.T_max
    state = CoolProp.AbstractState("HEOS", name)
    if state.has_melting_line():
        try:
            low = max(low, state.melting_line(CoolProp.iT, CoolProp.iP, pressure))
        except ValueError:  # pressure outside the melting-line fit (e.g. below the triple point)
            pass
    low += 1e-6  # CoolProp refuses T == Tmin below the triple-point pressure
    if phase == "gas" and saturation is not None:
        low = saturation[1] + SATURATION_MARGIN
    elif phase == "liquid":
        if saturation is None:
            raise InputError(f"{name} has no liquid phase at {pressure:g} Pa", field="pressure",
                             rule=f"a pressure at which {name} can be liquid", value=pressure)
        high = saturation[0] - SATURATION_MARGIN
    if high - low < GRID_STEP:
        raise InputError(f"{name} at {pressure:g} Pa has no {phase} range wider than {GRID_STEP} K",
                         field="pressure", rule=f"a pressure with a {phase} range wider than {GRID_STEP} K",
                         value=pressure)
    return low, high


def _check_range(name: str, pressure: float, phase: str, T: np.ndarray) -> None:
    low, high = _temperature_range(name, pressure, phase)
    if T.size and (T.min() < low or T.max() > high):
        bad = T[(T < low) | (T > high)]
        shown = (f"{bad[0]:g} K" if bad.size == 1
                 else f"{bad.min():g} to {bad.max():g} K ({bad.size} values)")
        rule = f"between {low:.6g} and {high:.6g} K for {name} ({phase}) at {pressure:g} Pa"
        raise InputError(f"temperature must be {rule}; got {shown}", field="temperature", rule=rule,
                         value=float(bad[0]) if bad.size == 1 else bad)


@dataclass(frozen=True, eq=False)
class PropertyTable:
    """Properties of one fluid, at one pressure and in one phase, on a uniform temperature grid.

    Built once (10-40 ms for 2000 points) from CoolProp's low-level
    ``AbstractState("HEOS", fluid)`` [1]_ and cached; get one with
    :meth:`PropertyTable.get`. :meth:`lookup` interpolates linearly in
    temperature, computing the grid index and weight once for all columns.
    ``values`` holds the columns ``rho, mu, k, cp, beta`` (beta from CoolProp,
    SI units) at the grid temperatures ``T_low + i * T_step`` [K], with
    ``T_step`` <= 1 K chosen so the grid ends on the range limit.
    """

    fluid: str
    pressure: float
    phase: str
    T_low: float
    T_step: float
    values: np.ndarray
    columns: ClassVar[tuple[str, ...]] = ("rho", "mu", "k", "cp", "beta")

    @classmethod
    def get(cls, fluid: str, pressure: float, phase: str | None = None) -> PropertyTable:
        """The cached table of ``fluid`` at ``pressure`` [Pa].

        ``phase=None`` picks ``"supercritical"`` above the critical pressure and ``"gas"`` below.
        """
        info = _fluid(fluid)
        if phase is None:
            phase = "supercritical" if pressure >= info.p_critical else "gas"
        check_choice("phase", phase, ("gas", "liquid", "supercritical"))
        return _table(info.name, float(pressure), phase)

    @property
    def T_high(self) -> float:
        """Last grid temperature [K]."""
        return self.T_low + self.T_step * (self.values.shape[0] - 1)

    @property
    def temperature(self) -> np.ndarray:
        """Grid temperatures [K]."""
        return self.T_low + self.T_step * np.arange(self.values.shape[0])

    def lookup(self, T) -> np.ndarray:
        """Interpolated columns at temperatures ``T`` [K]: array of shape ``T.shape + (5,)``."""
        T = np.asarray(T, dtype=float)
        _check_range(self.fluid, self.pressure, self.phase, T)
        x = (T - self.T_low) / self.T_step
        i = np.minimum(x.astype(np.intp), self.values.shape[0] - 2)  # x >= 0: truncation = floor
        lower = self.values[i]
        return lower + (x - i)[..., None] * (self.values[i + 1] - lower)

    @functools.cached_property
    def by_column(self) -> np.ndarray:
        """``values`` column by column, shape (5, n), each column contiguous in memory."""
        return np.ascontiguousarray(self.values.T)

    def interpolate(self, T: np.ndarray) -> list[np.ndarray]:
        """``rho, mu, k, cp, beta`` at temperatures ``T`` [K] inside the table's range, column by column.

        The numbers of :meth:`lookup`, without its range check (a solver checks its range once per
        evaluation, see :func:`solver_properties`); each column is read from contiguous memory.
        """
        x = (T - self.T_low) / self.T_step
        i = np.minimum(x.astype(np.intp), self.values.shape[0] - 2)
        weight = x - i
        out = []
        for column in self.by_column:
            lower = column[i]
            out.append(lower + weight * (column[i + 1] - lower))
        return out


@functools.lru_cache(maxsize=128)
def _table(name: str, pressure: float, phase: str) -> PropertyTable:
    shipped = _shipped(name, pressure, phase)
    if shipped is not None:
        return shipped.table
    return _coolprop_table(name, pressure, phase, *_temperature_range(name, pressure, phase))


def _coolprop_table(name: str, pressure: float, phase: str, low: float, high: float) -> PropertyTable:
    """The table on the grid ``low..high`` [K], every row from CoolProp's ``AbstractState``."""
    n = math.ceil((high - low) / GRID_STEP) + 1
    grid = np.linspace(low, high, n)
    state = CoolProp.AbstractState("HEOS", name)
    values = np.empty((n, 5))
    for row, T in enumerate(grid):  # once per table, not on the hot path
        try:
            state.update(CoolProp.PT_INPUTS, pressure, T)
            values[row] = (state.rhomass(), state.viscosity(), state.conductivity(),
                           state.cpmass(), state.isobaric_expansion_coefficient())
        except ValueError as err:  # CoolProp's own error type for states it cannot compute
            raise InputError(f"CoolProp could not compute {name} ({phase}) at {pressure:g} Pa and {T:g} K: {err}",
                             field="temperature, pressure", rule=f"a state of {name} CoolProp can compute",
                             value=(float(T), pressure)) from None
    return PropertyTable(name, pressure, phase, low, (high - low) / (n - 1), values)


def _shipped(name: str, pressure: float | None = None, phase: str | None = None):
    """The data shipped with the package (:mod:`convlib.air_table`) if it serves this fluid, pressure
    and phase (``None``: any), else None (then CoolProp is asked)."""
    from convlib import air_table  # it imports this module: imported here, on first use

    shipped = air_table.shipped()
    if shipped is None or name != shipped.fluid.name or pressure not in (None, shipped.pressure) \
            or phase not in (None, shipped.phase):
        return None
    return shipped


def _exact(name: str, T: np.ndarray, pressure: np.ndarray) -> np.ndarray:
    """CoolProp ``PropsSI`` for every point: array (n, 5) like ``PropertyTable.values``."""
    try:
        return np.column_stack([CP.PropsSI(key, "T", T, "P", pressure, f"HEOS::{name}")
                                for key in _COOLPROP_KEYS])
    except ValueError as err:  # CoolProp's own error type for states it cannot compute
        raise InputError(f"CoolProp could not compute {name} at temperature {T.min():g}-{T.max():g} K and "
                         f"pressure {pressure.min():g}-{pressure.max():g} Pa: {err}", field="temperature, pressure",
                         rule=f"states of {name} CoolProp can compute", value=(T, pressure)) from None


def _pressure_nodes(p_low: float, p_high: float) -> np.ndarray:
    k_low = math.floor(math.log2(p_low) * NODES_PER_OCTAVE)
    k_high = max(math.ceil(math.log2(p_high) * NODES_PER_OCTAVE), k_low + 1)
    return np.array([2.0 ** (k / NODES_PER_OCTAVE) for k in range(k_low, k_high + 1)])


def _evaluate(info: _Fluid, T: np.ndarray, pressure: np.ndarray, groups, exact: bool):
    """Columns (5, n), each contiguous, and a liquid mask (n,) for flat ``T`` and ``pressure``.

    ``groups`` is a list of (selection, pressure value) for the few-pressures
    path, or None for the pressure-node path. Loops run over pressure groups
    or node intervals (a handful), never over points.
    """
    values = np.empty((5, T.size))
    liquid = np.zeros(T.size, dtype=bool)
    if groups is not None:
        for sel, p in groups:
            T_group = T[sel]
            phase = _phase(info, p, T_group.min(), T_group.max())
            if exact:
                _check_range(info.name, p, phase, T_group)
                values[:, sel] = _exact(info.name, T_group, pressure[sel]).T
            else:
                _check_range(info.name, p, phase, T_group)
                values[:, sel] = _table(info.name, p, phase).interpolate(T_group)
            liquid[sel] = phase == "liquid"
        return values, liquid
    nodes = _pressure_nodes(pressure.min(), pressure.max())
    interval = np.clip(np.searchsorted(nodes, pressure, side="right") - 1, 0, nodes.size - 2)
    for j in np.unique(interval):
        sel = interval == j
        T_group = T[sel]
        p_lo, p_hi = float(nodes[j]), float(nodes[j + 1])
        phases = [_phase(info, p, T_group.min(), T_group.max()) for p in (p_lo, p_hi)]
        liquid[sel] = phases[0] == "liquid"
        if exact:
            for p, phase in zip((p_lo, p_hi), phases):
                _check_range(info.name, p, phase, T_group)
        else:
            weight = (pressure[sel] - p_lo) / (p_hi - p_lo)
            lower = np.array(_table(info.name, p_lo, phases[0]).lookup(T_group).T)
            upper = np.array(_table(info.name, p_hi, phases[1]).lookup(T_group).T)
            values[:, sel] = lower + weight * (upper - lower)
    if exact:
        values = np.ascontiguousarray(_exact(info.name, T, pressure).T)
    return values, liquid


def fluid_properties(fluid: str, T, pressure=101325.0, exact: bool = False,
                     beta: str | None = None) -> FluidProperties:
    """Density, transport properties and expansion coefficient of a single-phase fluid.

    Parameters
    ----------
    fluid : str
        CoolProp fluid name [1]_, e.g. ``"Air"``, ``"Nitrogen"``, ``"CO2"``, ``"Water"``.
    T : numeric
        Temperature [K]. All temperatures at one pressure must be on one side
        of the boiling point (liquid or gas), at least 0.5 K away from it.
    pressure : numeric, default 101325.0
        Absolute pressure [Pa]; broadcast with ``T``.
    exact : bool, default False
        ``False`` interpolates cached tables (fast, relative error < 0.05 %);
        ``True`` calls CoolProp ``PropsSI`` for every point.
    beta : {None, "ideal_gas", "coolprop"}
        Expansion coefficient: ``"ideal_gas"`` is :math:`\\beta = 1/T`,
        ``"coolprop"`` is :math:`\\beta = -\\rho^{-1}(\\partial\\rho/\\partial T)_p`
        from the equation of state. ``None``: ideal gas for a gas below the
        critical pressure, CoolProp for a liquid or a supercritical fluid.

    Returns
    -------
    FluidProperties
        Arrays of the broadcast shape of ``T`` and ``pressure``.

    Raises
    ------
    InputError
        (a ``ValueError``) Unknown fluid or ``beta``; non-finite or non-positive ``T`` or
        ``pressure``; temperatures outside the table range (the message gives
        the range) or straddling the boiling point.

    Notes
    -----
    With more than 8 distinct pressures the tables are taken at pressure
    nodes :math:`p_k = 2^{k/8}` Pa and interpolated linearly in pressure
    (see the module docstring); the phase and range checks then use the
    bracketing nodes, so near saturation they are slightly conservative.

    Examples
    --------
    >>> p = fluid_properties("Water", [300.0, 350.0])
    >>> np.round(p.rho, 1), np.round(p.pr, 2)
    (array([996.6, 973.7]), array([5.86, 2.32]))
    """
    check_choice("beta", beta, BETA_CHOICES)
    info = _fluid(fluid)
    T = as_array("temperature", T, unit="K", low=0, low_inclusive=False)
    p_in = as_array("pressure", pressure, unit="Pa", low=0, low_inclusive=False)
    T_full, p_full = (np.array(a) for a in np.broadcast_arrays(T, p_in))
    t, p = T_full.ravel(), p_full.ravel()
    if t.size == 0:
        values, liquid = np.empty((5, 0)), np.zeros(0, dtype=bool)
    else:
        if p_in.size == 1:
            groups = [(slice(None), float(p_in.flat[0]))]
        else:
            unique, inverse = np.unique(p, return_inverse=True)
            groups = None
            if unique.size <= MAX_PRESSURE_GROUPS:
                groups = ([(slice(None), float(unique[0]))] if unique.size == 1 else
                          [(inverse.ravel() == g, float(u)) for g, u in enumerate(unique)])
        values, liquid = _evaluate(info, t, p, groups, exact)
    rho, mu, k, cp, beta_eos = (values[c].reshape(T_full.shape) for c in range(5))
    if beta == "ideal_gas":
        beta_out = 1.0 / T_full
    elif beta == "coolprop":
        beta_out = beta_eos
    else:
        ideal = (~liquid.reshape(T_full.shape)) & (p_full < info.p_critical)
        beta_out = np.where(ideal, 1.0 / T_full, beta_eos)
    return FluidProperties(T=T_full, pressure=p_full, rho=rho, mu=mu, nu=mu / rho, k=k, cp=cp,
                           pr=cp * mu / k, alpha=k / (rho * cp), beta=beta_out)


def solver_properties(fluid: str, pressure, exact: bool = False):
    """A lean property evaluator for the inner loop of a solver, or None where only :func:`fluid_properties` serves.

    For one fluid at one pressure from its table (``exact`` False): returns ``evaluate(T)`` giving
    ``(k, nu, pr, beta, mu)`` at temperatures ``T`` [K] -- the numbers :func:`fluid_properties` gives, bit for
    bit, with the fluid, the pressure, the table and the expansion coefficient's rule settled once -- or None
    when a ``T`` lies outside the table's range (the caller then asks :func:`fluid_properties`, which raises
    or serves the other phase). The inputs are trusted: validate them before (an ``OuterSurface`` has).

    >>> evaluate = solver_properties("Air", 101325.0)
    >>> k, nu, pr, beta, mu = evaluate(np.array([300.0]))
    >>> bool(k[0] == air(300.0).k and beta[0] == 1 / 300.0)
    True
    """
    p = np.asarray(pressure, dtype=float)
    if exact or p.size == 0 or not np.all(p == p.flat[0]):
        return None
    info, p0 = _fluid(fluid), float(p.flat[0])
    phase = "supercritical" if p0 >= info.p_critical else "gas"
    table = _table(info.name, p0, phase)
    low, high = _temperature_range(info.name, p0, phase)
    ideal = phase == "gas"

    def evaluate(T):
        if T.size and (T.min() < low or T.max() > high):
            return None
        rho, mu, k, cp, beta = table.interpolate(T)
        return k, mu / rho, cp * mu / k, 1.0 / T if ideal else beta, mu

    return evaluate


def air(T, pressure=101325.0, exact: bool = False, beta: str | None = None) -> FluidProperties:
    """Properties of dry air (CoolProp ``"Air"``, pseudo-pure fluid [2]_, transport [3]_).

    Same as ``fluid_properties("Air", T, pressure, exact, beta)``; see
    :func:`fluid_properties`. The gas table spans about 82-2000 K at 1 atm.

    Examples
    --------
    >>> p = air(300.0)
    >>> round(float(p.rho), 4), round(float(p.nu) * 1e6, 2), round(float(p.pr), 3)
    (1.177, 15.75, 0.707)
    >>> air([300.0, 300.0], pressure=[101325.0, 79500.0]).rho.round(3)
    array([1.177, 0.923])
    """
    return fluid_properties("Air", T, pressure=pressure, exact=exact, beta=beta)


def dew_point(air_temperature, relative_humidity, pressure=101325.0) -> np.ndarray:
    """Dew (or frost) point of humid air [K], from CoolProp ``HAPropsSI("D", ...)`` [4]_.

    Parameters
    ----------
    air_temperature : numeric
        Dry-bulb air temperature [K].
    relative_humidity : numeric
        Relative humidity as a fraction, 0 < RH <= 1 [-].
    pressure : numeric, default 101325.0
        Absolute pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Dew point [K], broadcast shape of the inputs.

    Notes
    -----
    Below 0 °C CoolProp works with ice, not supercooled water (checked
    against the Magnus formulas of Alduchov & Eskridge (1996),
    doi:10.1175/1520-0450(1996)035<0601:IMFAOS>2.0.CO;2, in the tests):

    * when the result is below 273.15 K it is the **frost point**
      (saturation over ice);
    * when the air temperature is below 273.15 K, the relative humidity is
      taken **with respect to ice**. Weather stations report RH with respect
      to liquid water (WMO convention), which is larger by the ratio
      :math:`e_w/e_i` (about 1.10 at -10 °C); convert before calling.

    ``HAPropsSI`` accepts arrays but costs about 60 µs per point (a loop in
    C++); it is called once on the unique (T, RH, p) combinations. Use it
    for design limits, not inside iterative solvers.

    Examples
    --------
    >>> round(float(dew_point(293.15, 0.6)) - 273.15, 1)
    12.0
    """
    T = as_array("air_temperature", air_temperature, unit="K", low=0, low_inclusive=False)
    rh = as_array("relative_humidity", relative_humidity, low=0, high=1, low_inclusive=False)
    p = as_array("pressure", pressure, unit="Pa", low=0, low_inclusive=False)
    T, rh, p = np.broadcast_arrays(T, rh, p)
    if T.size == 0:
        return np.empty(T.shape)
    cases = np.stack([T.ravel(), rh.ravel(), p.ravel()], axis=1)
    unique, inverse = np.unique(cases, axis=0, return_inverse=True)
    try:
        result = CP.HAPropsSI("D", "T", unique[:, 0], "R", unique[:, 1], "P", unique[:, 2])
    except ValueError as err:
        low, high = unique.min(axis=0), unique.max(axis=0)
        raise InputError(f"CoolProp HAPropsSI could not compute the dew point for air_temperature "
                         f"{low[0]:g}-{high[0]:g} K, relative_humidity {low[1]:g}-{high[1]:g}, "
                         f"pressure {low[2]:g}-{high[2]:g} Pa: {err}",
                         field="air_temperature, relative_humidity, pressure",
                         rule="humid air CoolProp HAPropsSI can compute",
                         value=(unique[:, 0], unique[:, 1], unique[:, 2])) from None
    return np.asarray(result, dtype=float)[inverse.ravel()].reshape(T.shape)
