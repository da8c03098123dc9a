r"""Lines in operation: temperature along a flowing line, steam condensate, heat-tracing duty, freeze time.

Each builds on :func:`convlib.pipe.insulated_pipe`: :math:`q'(T)`, the heat flow per metre of a line
whose fluid is at :math:`T`, the outer coefficient re-evaluated at every temperature.
:func:`line_temperature_profile` (a flowing fluid, :math:`\dot m c_p dT/dx = -q'`), :func:`steam_line`
and :func:`condensate_rate` (:math:`Q/h_{fg}`), :func:`tracing_duty`, :func:`freeze_time`.

Marching (along the line; in temperature for the freeze time) takes classical RK4 steps with step
doubling (W. H. Press et al., *Numerical Recipes*, 3rd ed., section 17.2): each step once whole and
once as two halves; :math:`\Delta = (y_{h/2,h/2} - y_h)/15` estimates the local error of the halves,
the step is accepted when :math:`|\Delta| \le` ``tolerance`` (stated unit) for every case and then
kept as :math:`y_{h/2,h/2} + \Delta` (local extrapolation, fifth order); the next step is scaled by
:math:`0.9 (\mathrm{tolerance}/|\Delta|)^{1/5}` within 0.1-4x. All cases march together on one grid
of the normalized variable (position over each case's length; fraction of each case's temperature
fall); the loop is over steps, never over cases.

Results are design estimates: freeze protection, heat tracing and steam trapping are governed by
the applicable standards (e.g. IEEE 515, IEC/IEEE 60079-30), manufacturers' designs and local codes.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .freezing import (CARBON_STEEL_DENSITY, CARBON_STEEL_SPECIFIC_HEAT, CAUTION_FREEZE, LATENT_HEAT_OF_FUSION,
                       WATER_FREEZING_TEMPERATURE, FreezeTime, freeze_time)
from .marching import (TIME_LIMIT, OutOfRange, SolveFlags, coolprop, frozen_coefficient,
                       loss_function, march, pipe_keywords, positive)
from .properties import CP, fluid_properties  # CP: CoolProp.CoolProp, imported on first use
from .regimes import summarize_flags
from .roots import find_root
from .steam import (CAUTION_STEAM, SteamLine, condensate_rate, latent_heat_of_vaporization, saturation_temperature,
                    steam_line)
from .surroundings import Surroundings, resolve
from .tracing import CAUTION_TRACING, TRACING_MARGIN, TracingDuty, tracing_duty
from .validation import SIZE_RANGE, as_array, as_bounded, check_choice

# Steam lines, heat tracing and freeze time live in convlib.steam, convlib.tracing and convlib.freezing; their names
# stay importable from here.
__all__ = [
    "TRACING_MARGIN", "LATENT_HEAT_OF_FUSION", "WATER_FREEZING_TEMPERATURE", "CARBON_STEEL_DENSITY",
    "CARBON_STEEL_SPECIFIC_HEAT", "CAUTION_FREEZE", "CAUTION_TRACING", "CAUTION_STEAM",
    "CAUTION_LINE_FREEZE", "LineProfile", "line_temperature_profile", "MinimumFlow", "minimum_flow",
    "saturation_temperature", "latent_heat_of_vaporization",
    "condensate_rate", "SteamLine", "steam_line", "TracingDuty", "tracing_duty", "FreezeTime", "freeze_time",
]

# ----------------------------------------------------------------------------- temperature along a line
#: Within this distance of the equilibrium temperature [K] the line's coefficient U' = q'/(T - T_eq) is taken at it
#: (q' and T - T_eq both vanish there; U' itself stays finite and varies by < 0.1 % over the last 0.01 K).
_NEAR_EQUILIBRIUM = 0.01

CAUTION_LINE_FREEZE = ("Caution: where the water reaches 0 degC it starts to freeze; ice blocks the line and can "
                       "burst it. The estimate assumes steady flow and no supercooling. Minimum flow, draining or "
                       "heat tracing against freezing is a design decision; local codes and licensed practice govern.")


@dataclass(frozen=True)
class LineProfile:
    """Temperature along a flowing line; arrays over the cases, profiles with the point first.

    ``q_total`` is the heat lost along the line, integrated with the temperature; ``enthalpy_drop``
    is :math:`\\dot m \\int_{T_{out}}^{T_{in}} c_p\\,dT`; they agree to the marching tolerance
    (``energy_balance_error`` is their relative difference).

    Where the water reaches its freezing point (``freezes``), the profile stops there: the outlet
    temperature is the freezing temperature, ``freezing_position`` the distance from the inlet where it
    is reached, ``q_total`` the heat lost up to it; the first profile point past it is moved to it and
    the later points are NaN (``fraction`` stays the common grid; ``position`` is per case).
    """

    outlet_temperature: np.ndarray       # [K]; the freezing temperature where the water freezes
    q_total: np.ndarray                  # heat lost along the line (up to the freezing position), integral of q' dx [W]
    enthalpy_drop: np.ndarray            # mass_flow x integral of cp dT, inlet minus outlet [W]
    energy_balance_error: np.ndarray     # (enthalpy_drop - q_total) / |q_total| [-]
    fraction: np.ndarray                 # (n,) normalized position x / length of the profile points [-]
    position: np.ndarray                 # (n, *shape) distance from the inlet [m]
    temperature: np.ndarray              # (n, *shape) fluid temperature [K]
    q_per_length: np.ndarray             # (n, *shape) heat flow per metre at the points [W/m]
    inlet_loss_coefficient: np.ndarray   # U' = q'(T_in) / (T_in - T_a) [W/m/K]
    steps: int                           # accepted steps
    rejected_steps: int
    evaluations: int                     # calls of insulated_pipe for q'(T) (setup, march, freezing point)
    equilibrium_temperature: np.ndarray  # fluid temperature at which q' = 0 [K]: the air's, or below it under a sky
    freezes: np.ndarray                  # bool: the water reaches its freezing point within the length
    freezing_position: np.ndarray        # distance from the inlet where it does [m]; NaN where it does not
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    warnings: np.ndarray = None          # union of the flags of every insulated_pipe solve, per case

    def warning_messages(self) -> list[str]:
        return [] if self.warnings is None else summarize_flags(self.warnings)


@dataclass(frozen=True)
class _Line:
    """A line's model shared by the profile and the minimum flow: q'(T) = U'(T) (T - T_eq), cp(T)."""

    tin: np.ndarray
    theta_in: np.ndarray           # T_in - T_eq [K]
    t_eq: np.ndarray
    coefficient_in: np.ndarray     # U' at the inlet against the air [W/m/K]
    coefficient: object            # theta -> U'(T_eq + theta) [W/m/K]
    cp: object                     # T -> cp [J/kg/K]
    freezing: np.ndarray           # freezing temperature [K], NaN where not checked
    shape: tuple
    evaluations: list
    flags: SolveFlags


def _line_model(pipe_outer_diameter, inlet_temperature, layers, around: Surroundings, fluid, fluid_pressure,
                fluid_phase, specific_heat, constant_coefficient, freezing_temperature, pipe_keywords,
                extra_shapes=()) -> _Line:
    tin = positive("inlet_temperature", inlet_temperature, "K")
    p_fluid = positive("fluid_pressure", fluid_pressure, "Pa")
    fixed_cp = None if specific_heat is None else positive("specific_heat", specific_heat, "J/kg/K")
    ta = around.air_temperature
    check_choice("fluid_phase", fluid_phase, ("liquid", "gas"))
    calls = [0]
    flags = SolveFlags()
    pipe_loss = loss_function(pipe_outer_diameter, layers, around, pipe_keywords, flags)

    def loss(temperature):
        calls[0] += 1
        return pipe_loss(temperature)

    coefficient_in = frozen_coefficient(loss, tin, ta)
    given_freezing = (None if isinstance(freezing_temperature, str) or freezing_temperature is None
                      else positive("freezing_temperature", freezing_temperature, "K"))
    shape = np.broadcast_shapes(coefficient_in.shape, tin.shape, p_fluid.shape, ta.shape, around.shape, *extra_shapes,
                                () if given_freezing is None else given_freezing.shape,
                                () if fixed_cp is None else fixed_cp.shape)
    tin = np.broadcast_to(tin, shape)
    if isinstance(freezing_temperature, str):
        check_choice("freezing_temperature", freezing_temperature, ("auto",))
        water = fixed_cp is None and fluid_phase == "liquid" and str(fluid).lower() == "water"
        tf = np.full(shape, WATER_FREEZING_TEMPERATURE if water else np.nan)
    elif freezing_temperature is None:
        tf = np.full(shape, np.nan)
    else:
        tf = np.broadcast_to(given_freezing, shape).astype(float)
        if np.any(tin <= tf):
            raise InputError(f"inlet_temperature must be above the freezing_temperature; got {np.min(tin):g} K "
                             f"with freezing at {np.max(tf):g} K", field="inlet_temperature",
                             rule="above the freezing_temperature", value=float(np.min(tin)))
    if fixed_cp is None:
        try:
            fluid_properties(fluid, tin, pressure=p_fluid)
        except InputError as exc:
            raise InputError(f"fluid, inlet_temperature or fluid_pressure: {exc}",
                             field="fluid, inlet_temperature, fluid_pressure", rule=exc.rule, value=exc.value) from None
        _check_phase(fluid, fluid_phase, tin, np.broadcast_to(p_fluid, shape))
    # below the freezing point the march only runs on to locate it: cp is taken at the freezing point there
    cp_floor = np.where(np.isnan(tf), 0.0, tf + 0.02)

    def cp(temperature):
        if fixed_cp is not None:
            return np.broadcast_to(fixed_cp, np.shape(temperature))
        try:
            return fluid_properties(fluid, np.maximum(temperature, cp_floor), pressure=p_fluid).cp
        except InputError as exc:
            raise OutOfRange(f"fluid {fluid} at fluid_pressure leaves its single-phase range along the line (it "
                              f"would freeze, boil or condense): {exc}", field="fluid, fluid_pressure",
                              rule="single-phase all along the line", value=exc.value) from None

    ta_full = np.broadcast_to(ta, shape).astype(float)
    if constant_coefficient:
        t_eq = ta_full

        def coefficient(theta):
            return np.broadcast_to(coefficient_in, np.broadcast_shapes(np.shape(theta), shape))
    else:
        t_eq = _equilibrium_temperature(loss, ta_full, np.broadcast_to(coefficient_in, shape))
        sign = np.where(tin < t_eq, -1.0, 1.0)

        def coefficient(theta):
            safe = sign * np.maximum(np.abs(theta), _NEAR_EQUILIBRIUM)
            return loss(t_eq + safe) / safe
    return _Line(tin=tin, theta_in=tin - t_eq, t_eq=t_eq, coefficient_in=np.broadcast_to(coefficient_in, shape),
                 coefficient=coefficient, cp=cp, freezing=tf, shape=shape, evaluations=calls, flags=flags)


def _equilibrium_temperature(loss, ta, coefficient_in):
    """Fluid temperature at which q'(T) = 0 [K], each case: the air temperature, unless the line also exchanges
    with a sky colder than the air (or gains sun); then bracketed from the air outwards and solved (Chandrupatla)."""
    q_air = loss(ta)
    with np.errstate(divide="ignore", invalid="ignore"):
        shift = np.where(coefficient_in > 0, q_air / coefficient_in, 0.0)  # first estimate of T_a - T_eq [K]
    need = np.abs(shift) > 1e-9
    if not np.any(need):
        return ta.copy()
    factors = np.array([1.25, 2.0, 4.0, 8.0, 16.0]).reshape((-1,) + (1,) * ta.ndim)
    trials = np.maximum(ta[None] - factors * shift[None], 0.5 * ta[None])
    q_trials = loss(trials)
    crossed = np.sign(q_trials) != np.sign(q_air)[None]
    first = np.argmax(crossed, axis=0)
    if np.any(need & ~crossed.any(axis=0)):
        raise InputError("no fluid temperature within reach of the air temperature at which the line neither "
                         "loses nor gains heat (sky, sun); check the surroundings", field="air_temperature",
                         rule="an equilibrium fluid temperature near the air temperature", value=float(np.min(ta)))
    hi = np.take_along_axis(trials, first[None], axis=0)[0]
    lo = np.where(first > 0, np.take_along_axis(trials, np.maximum(first - 1, 0)[None], axis=0)[0], ta)
    idx = np.flatnonzero(need)
    base = ta.copy()

    def f(x, where):
        full = base.copy()
        full.flat[where.astype(int)] = x
        return np.broadcast_to(loss(full), base.shape).ravel()[where.astype(int)]

    root = find_root(f, lo.ravel()[idx], hi.ravel()[idx], args=(idx,), xatol=1e-7)
    if not np.all(root.success):
        raise InputError("the equilibrium fluid temperature of the line did not converge", field="air_temperature",
                         rule="an equilibrium fluid temperature the solver finds", value=float(np.min(ta)))
    out = ta.copy()
    out.flat[idx] = root.x
    return out


def _log_quadrature(integrand, theta_from, theta_to, panels=4):
    r"""Integral of ``integrand(theta)`` over :math:`d\ln|\theta|` from ``theta_from`` to ``theta_to`` (same sign,
    non-zero): composite 8-point Gauss-Legendre in :math:`\ln|\theta|`, nodes on a leading axis."""
    sign = np.sign(theta_to)
    a, b = np.log(np.abs(theta_from)), np.log(np.abs(theta_to))
    edges = a[None] + (b - a)[None] * np.linspace(0.0, 1.0, panels + 1).reshape((-1,) + (1,) * a.ndim)
    mid, half = 0.5 * (edges[1:] + edges[:-1]), 0.5 * (edges[1:] - edges[:-1])
    nodes = (mid[None] + half[None] * _GL_NODES.reshape((-1,) + (1,) * mid.ndim)).reshape((-1, *a.shape))
    values = integrand(sign * np.exp(nodes)).reshape((_GL_NODES.size, panels, *a.shape))
    weights = _GL_WEIGHTS.reshape((-1,) + (1,) * mid.ndim)
    return np.sum(weights * values * half[None], axis=(0, 1))


def _length_between(line, flow, theta_from, theta_to):
    r"""Distance along the line [m] over which the fluid goes from :math:`T_{eq} + \theta_{from}` to
    :math:`T_{eq} + \theta_{to}`: :math:`\dot m \int c_p / U'\, d\ln\theta` (exact, from
    :math:`\dot m c_p\, d\theta/dx = -U'\theta`)."""
    return flow * _log_quadrature(lambda theta: line.cp(line.t_eq + theta) / line.coefficient(theta),
                                  theta_to, theta_from)


def line_temperature_profile(pipe_outer_diameter, inlet_temperature, layers=(), *, mass_flow, length,
                             fluid="Water", fluid_pressure=101325.0, fluid_phase="liquid",
                             specific_heat=None, constant_coefficient=False, freezing_temperature="auto",
                             tolerance=1e-6, max_step=0.1, time_limit=TIME_LIMIT, jacket_emissivity=0.9,
                             solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None,
                             inner_coefficient=None, natural=None, forced=None, mixing_exponent=None,
                             convection_factor=None, convection_coefficient=None, exact_properties=False,
                             surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None,
                             surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None,
                             solar_irradiance=None, pressure=None) -> LineProfile:
    r"""Fluid temperature along a line that loses (or gains) heat to the air, from trickle to full flow.

    The fluid tends to its equilibrium temperature :math:`T_{eq}`, at which :math:`q'(T_{eq}) = 0`
    (the air temperature; below it for a line that also sees a cold sky). With
    :math:`\theta = T - T_{eq}` and :math:`U'(T) = q'(T)/\theta`, the energy balance
    :math:`\dot m c_p\, dT/dx = -q'(T)` is exactly

    .. math:: \frac{d \ln\theta}{dx} = -\frac{U'(T)}{\dot m\, c_p(T)}

    marched in :math:`z = \ln(\theta/\theta_{in})` (module docstring: RK4 with step doubling), so
    :math:`T = T_{eq} + \theta_{in} e^{z}` can never pass the equilibrium, however small the flow:
    each step is the exponential solution with the local :math:`U'` and :math:`c_p`. :math:`q'(T)` comes
    from :func:`convlib.pipe.insulated_pipe` at the local fluid temperature (outer coefficient and surface
    temperature re-evaluated), :math:`c_p` from CoolProp at ``fluid_pressure``. With a constant
    :math:`U' = q'(T_{in})/(T_{in} - T_a)` and constant :math:`c_p` the solution is

    .. math:: T(x) = T_a + (T_{in} - T_a)\exp\left(-\frac{U' x}{\dot m c_p}\right)

    (Incropera et al., *Fundamentals of Heat and Mass Transfer*, 6th ed., eq. 8.45b form, from memory).

    Where liquid water would fall to its freezing point, the profile stops there: ``freezes`` is set,
    ``freezing_position`` is :math:`\dot m \int_{\ln\theta_f}^{\ln\theta_{in}} c_p/U'\, d\ln\theta`
    (Gauss-Legendre), and :data:`CAUTION_LINE_FREEZE` is among the cautions.

    Parameters
    ----------
    pipe_outer_diameter, inlet_temperature : numeric
        Pipe [m]; fluid at the inlet [K].
    layers : sequence of Layer
        Insulation and jacket from the pipe outwards (empty: bare).
    mass_flow, length : numeric
        [kg/s] > 0; line length [m] > 0 (fittings as equivalent length).
    air_temperature : numeric
        [K]
    fluid : str
        CoolProp name of the single-phase fluid inside (default liquid water); ignored with ``specific_heat``.
    fluid_pressure : numeric
        Absolute pressure of the fluid [Pa] (a liquid must stay below its boiling point).
    fluid_phase : {"liquid", "gas"}
        What the line carries: the inlet must be below (liquid) or above (gas: air, superheated
        steam) the boiling point at ``fluid_pressure``, else ``InputError`` -- so that pressurized hot
        water is not silently taken as steam at the default 1 atm. Not checked above the critical pressure.
    specific_heat : numeric, optional
        A fixed specific heat [J/kg/K] instead of CoolProp's.
    constant_coefficient : bool
        Freeze :math:`U' = q'(T_{in})/(T_{in} - T_a)` at the inlet (the hand-calculation model).
    freezing_temperature : "auto", numeric or None
        Where the fluid freezes [K]: ``"auto"`` is 273.15 K for liquid ``"Water"`` (properties from
        CoolProp) and no check otherwise; a number checks it for any fluid; ``None`` never checks.
    tolerance : float
        Local error per step [K] on the temperature and on :math:`Q / (\dot m c_{p,in})`.
    max_step : float
        Largest step as a fraction of the length (0-1]; the profile's coarsest spacing.
    time_limit : float
        Wall-clock bound of the march [s], default :data:`TIME_LIMIT`; reaching it (or the step bound)
        raises ``InputError`` saying where the march stopped.
    jacket_emissivity, solar_absorptivity, pipe_wall_thickness, pipe_conductivity, inner_coefficient, natural,
    forced, mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe` (give ``inner_coefficient`` for gas lines and bare lines, where
        the inside film is not negligible).
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords.

    Examples
    --------
    200 m of a 2 in (60.3 mm) hot-water line with 40 mm of insulation, 0.2 kg/s at 80 degC, air at 0 degC:

    >>> from convlib.pipe import Layer
    >>> p = line_temperature_profile(0.0603, 353.15, [Layer(0.04, 0.04)], mass_flow=0.2, length=200.0,
    ...                              air_temperature=273.15)
    >>> round(float(p.outlet_temperature) - 273.15, 2), round(float(p.q_total)), abs(float(p.energy_balance_error)) < 1e-6
    (74.95, 4233, True)

    A trickle of 2 g/s through 2.5 km of 8 in line at -10 degC air freezes on the way:

    >>> p = line_temperature_profile(0.2191, 368.15, [Layer(0.08, 0.03)], mass_flow=0.002, length=2500.0,
    ...                              air_temperature=263.15)
    >>> bool(p.freezes), round(float(p.freezing_position))
    (True, 60)
    """
    flow = positive("mass_flow", mass_flow, "kg/s")
    run = as_bounded("length", length, unit="m", low_inclusive=False, accepted=SIZE_RANGE)
    tol = float(positive("tolerance", tolerance, "K"))
    limit_s = float(as_array("time_limit", time_limit, unit="s", low=0.0))
    step = float(as_array("max_step", max_step, low=0.0, high=1.0, low_inclusive=False))
    line = _line_model(pipe_outer_diameter, inlet_temperature, layers, resolve(surroundings,
                       air_temperature=air_temperature, wind_speed=wind_speed,
                       surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                       sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure), fluid,
                       fluid_pressure,
                       fluid_phase, specific_heat, constant_coefficient, freezing_temperature,
                           pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                           pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
                           inner_coefficient=inner_coefficient, natural=natural, forced=forced,
                           mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                           convection_coefficient=convection_coefficient, exact_properties=exact_properties),
                       (flow.shape, run.shape))
    shape, tin, t_eq, theta_in = line.shape, line.tin, line.t_eq, line.theta_in
    capacity_in = flow * line.cp(tin)  # [W/K]

    def state(z):
        with np.errstate(under="ignore"):
            theta = theta_in * np.exp(z)
        return t_eq + theta, theta

    def rhs(s, y):
        temperature, theta = state(y[0])
        u = line.coefficient(theta)
        return np.stack([-run * u / (flow * line.cp(temperature)), run * u * theta / capacity_in])

    def scale(y):  # the temperature error of an error dz in z is |theta| dz, theta at the step's start
        theta = np.abs(state(y[0])[1])
        return np.stack([1.0 / np.where(theta > 0, theta, 1.0), np.ones(shape)])

    grid, values, accepted, rejected, _ = march(rhs, np.zeros((2, *shape)), scale, tol, step, limit_s)
    temperature, theta = state(values[:, 0])
    q_line = line.coefficient(theta) * theta
    position = np.broadcast_to(grid.reshape((-1,) + (1,) * len(shape)) * run, temperature.shape).copy()
    t_out, q_total = temperature[-1].copy(), values[-1, 1] * capacity_in
    (temperature, position, q_line, q_total, t_out, freezes, x_freeze, notes,
     cautions) = _stop_at_freezing(line, flow, run, capacity_in, theta_in, t_eq, values, temperature, position,
                                   q_line, q_total, t_out)
    drop = flow * _integral_of_cp(line.cp, t_out, tin)
    with np.errstate(divide="ignore", invalid="ignore"):
        balance = np.where(q_total != 0, (drop - q_total) / np.abs(q_total), drop - q_total)
    return LineProfile(
        outlet_temperature=t_out, q_total=q_total, enthalpy_drop=drop, energy_balance_error=balance,
        fraction=grid, position=position, temperature=temperature, q_per_length=q_line,
        inlet_loss_coefficient=line.coefficient_in.copy(), steps=accepted, rejected_steps=rejected,
        evaluations=line.evaluations[0], equilibrium_temperature=t_eq.copy(), freezes=freezes,
        freezing_position=x_freeze, notes=tuple(notes), cautions=tuple(cautions), warnings=line.flags.union(shape))


def _stop_at_freezing(line, flow, run, capacity_in, theta_in, t_eq, values, temperature, position, q_line, q_total,
                      t_out):
    """Where the fluid reaches its freezing point before the outlet: the position (closed form in theta), the heat
    up to it (cubic Hermite between the march points), and the profile cut there (NaN after it)."""
    shape = line.shape
    tf = line.freezing
    freezes = ~np.isnan(tf) & (t_out < tf)
    x_freeze = np.full(shape, np.nan)
    notes, cautions = [], []
    if np.any(freezes):
        theta_f = np.where(freezes, tf - t_eq, theta_in)
        x_freeze = np.where(freezes, np.minimum(_length_between(line, flow, theta_in, theta_f), run), np.nan)
        past = freezes[None] & (temperature < tf[None])
        cut = np.argmax(past, axis=0)[None]      # first point at or past the freezing point, >= 1
        qn = np.broadcast_to(values[:, 1], temperature.shape)
        slope = run * q_line / capacity_in       # dQn/ds at the points
        take = lambda a, i: np.take_along_axis(a, i, axis=0)[0]  # noqa: E731
        s0, s1 = take(position, cut - 1) / run, take(position, cut) / run
        h = s1 - s0
        t = np.where(freezes, (x_freeze / run - s0) / np.where(h > 0, h, 1.0), 0.0)
        h00, h10 = 2 * t ** 3 - 3 * t ** 2 + 1, t ** 3 - 2 * t ** 2 + t       # cubic Hermite basis
        h01, h11 = -2 * t ** 3 + 3 * t ** 2, t ** 3 - t ** 2
        qn_f = (h00 * take(qn, cut - 1) + h10 * h * take(slope, cut - 1) + h01 * take(qn, cut)
                + h11 * h * take(slope, cut))     # cubic Hermite between the march points
        q_total = np.where(freezes, qn_f * capacity_in, q_total)
        t_out = np.where(freezes, tf, t_out)
        index = np.arange(temperature.shape[0]).reshape((-1,) + (1,) * len(shape))
        at_cut, after = freezes[None] & (index == cut), freezes[None] & (index > cut)
        position = np.where(at_cut, x_freeze[None], np.where(after, np.nan, position))
        q_at_freezing = line.coefficient(theta_f) * theta_f
        q_line = np.where(at_cut, q_at_freezing[None], np.where(after, np.nan, q_line))
        temperature = np.where(at_cut, tf[None], np.where(after, np.nan, temperature))
        notes.append(f"{int(freezes.sum())} case(s): the fluid reaches its freezing point ({float(np.nanmin(tf)):g} K) "
                     f"{float(np.nanmin(x_freeze)):.1f} m from the inlet" + (" (nearest)" if freezes.sum() > 1 else "")
                     + ", before the outlet; the profile stops there")
        cautions.append(CAUTION_LINE_FREEZE)
    return temperature, position, q_line, q_total, t_out, freezes, x_freeze, notes, cautions


@dataclass(frozen=True)
class MinimumFlow:
    """The smallest mass flow that keeps a line's outlet at a limit (arrays over the cases)."""

    mass_flow: np.ndarray                # [kg/s]; 0 where any flow keeps the outlet within the limit
    outlet_limit: np.ndarray             # [K]
    equilibrium_temperature: np.ndarray  # the fluid's temperature at no flow [K]
    any_flow: np.ndarray                 # bool: the equilibrium itself is within the limit
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    warnings: np.ndarray = None          # union of the flags of every insulated_pipe solve, per case

    def warning_messages(self) -> list[str]:
        return [] if self.warnings is None else summarize_flags(self.warnings)


def minimum_flow(pipe_outer_diameter, inlet_temperature, layers=(), *, outlet_limit, length,
                 fluid="Water", fluid_pressure=101325.0, fluid_phase="liquid", specific_heat=None,
                 constant_coefficient=False, freezing_temperature="auto", jacket_emissivity=0.9,
                 solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None,
                 inner_coefficient=None, natural=None, forced=None, mixing_exponent=None, convection_factor=None,
                 convection_coefficient=None, exact_properties=False, surroundings: Surroundings | None = None,
                 air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None,
                 sky_temperature=None, solar_irradiance=None, pressure=None) -> MinimumFlow:
    r"""Smallest mass flow [kg/s] whose outlet stays at ``outlet_limit``: at or above it on a line hotter than
    its surroundings, at or below it on a colder one.

    The outlet temperature rises monotonically with the flow, and the energy balance of
    :func:`line_temperature_profile` inverts exactly: the fluid goes from :math:`T_{in}` to
    :math:`T_{lim}` over

    .. math:: L = \dot m \int_{\ln\theta_{lim}}^{\ln\theta_{in}} \frac{c_p(T)}{U'(T)}\, d\ln\theta
        \quad\Rightarrow\quad \dot m_{min} = L \Big/ \int_{\ln\theta_{lim}}^{\ln\theta_{in}} \frac{c_p}{U'}\, d\ln\theta

    (:math:`\theta = T - T_{eq}`), integrated by composite Gauss-Legendre quadrature -- the root of
    :math:`T_{out}(\dot m) = T_{lim}` without iterating on the flow. With constant :math:`U'` and
    :math:`c_p` it is :math:`\dot m = U'L / (c_p \ln(\theta_{in}/\theta_{lim}))`.

    Parameters
    ----------
    outlet_limit : numeric
        Outlet temperature to keep [K], between the equilibrium and the inlet temperature (a limit beyond the
        equilibrium is kept by any flow: 0 is returned, ``any_flow`` set); for water, not below freezing.
    Other parameters
        As :func:`line_temperature_profile`.

    The surroundings, the layers and the insulated_pipe keywords as in :func:`line_temperature_profile`.

    Examples
    --------
    The 8 in line of 2.5 km under 80 mm of insulation at -10 degC air, 95 degC in, outlet kept above 5 degC:

    >>> from convlib.pipe import Layer
    >>> m = minimum_flow(0.2191, 368.15, [Layer(0.08, 0.03)], outlet_limit=278.15, length=2500.0,
    ...                  air_temperature=263.15)
    >>> round(float(m.mass_flow) * 3600.0)
    362
    """
    run = positive("length", length, "m")
    limit = positive("outlet_limit", outlet_limit, "K")
    line = _line_model(pipe_outer_diameter, inlet_temperature, layers, resolve(surroundings,
                       air_temperature=air_temperature, wind_speed=wind_speed,
                       surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                       sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure), fluid,
                       fluid_pressure,
                       fluid_phase, specific_heat, constant_coefficient, freezing_temperature,
                           pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                           pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
                           inner_coefficient=inner_coefficient, natural=natural, forced=forced,
                           mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                           convection_coefficient=convection_coefficient, exact_properties=exact_properties),
                       (run.shape, limit.shape))
    shape, theta_in = line.shape, line.theta_in
    limit = np.broadcast_to(limit, shape)
    theta_lim = limit - line.t_eq
    if np.any(theta_in == 0):
        raise InputError("inlet_temperature equals the equilibrium temperature of the line: the outlet does not "
                         "depend on the flow", field="inlet_temperature", rule="different from the equilibrium",
                         value=float(line.tin[theta_in == 0][0]))
    ratio = theta_lim / theta_in
    beyond_inlet = ratio >= 1.0
    if np.any(beyond_inlet):
        i = np.flatnonzero(beyond_inlet.ravel())[0]
        side = "below" if theta_in.ravel()[i] > 0 else "above"
        raise InputError(f"outlet_limit must be {side} the inlet_temperature {line.tin.ravel()[i]:g} K (no flow "
                         f"keeps the outlet beyond its inlet); got {limit.ravel()[i]:g} K", field="outlet_limit",
                         rule=f"{side} the inlet_temperature", value=float(limit.ravel()[i]))
    frozen = ~np.isnan(line.freezing) & (limit < line.freezing)
    if np.any(frozen):
        raise InputError(f"outlet_limit is below the freezing point {np.nanmax(line.freezing):g} K: the water would "
                         f"freeze first; keep at least the freezing point", field="outlet_limit",
                         rule="at or above the freezing point", value=float(np.min(limit[frozen])))
    any_flow = ratio <= 0.0
    safe = np.where(any_flow, 0.5 * theta_in, theta_lim)
    span = _length_between(line, 1.0, theta_in, safe)
    flow = np.where(any_flow, 0.0, run / span)
    notes = ([f"{int(any_flow.sum())} case(s): the outlet stays within the limit at any flow (the line settles at "
              f"{float(np.min(line.t_eq[any_flow])):.2f} K)"] if np.any(any_flow) else [])
    freeze_risk = ~np.isnan(line.freezing) & (line.t_eq < line.freezing)
    return MinimumFlow(mass_flow=flow, outlet_limit=limit.copy(), equilibrium_temperature=line.t_eq.copy(),
                       any_flow=any_flow, notes=tuple(notes),
                       cautions=(CAUTION_LINE_FREEZE,) if np.any(freeze_risk) else (),
                       warnings=line.flags.union(shape))


def _check_phase(fluid, phase, inlet, pressure):
    """Raise unless the inlet is on the ``phase`` side of the boiling point at its pressure (CoolProp)."""
    critical, triple = coolprop(lambda: (CP.PropsSI("pcrit", fluid), CP.PropsSI("ptriple", fluid)), fluid, "fluid")
    for p in np.unique(pressure[(pressure > triple) & (pressure < critical)]):
        boiling = coolprop(lambda: CP.PropsSI("T", "P", float(p), "Q", 0.0 if phase == "liquid" else 1.0, fluid),
                            float(p), "fluid_pressure")
        t = inlet[pressure == p]
        wrong = t >= boiling if phase == "liquid" else t <= boiling
        if np.any(wrong):
            raise InputError(f"fluid_phase: {fluid} at inlet_temperature {float(t[wrong][0]):g} K is not {phase} at "
                             f"fluid_pressure {p:g} Pa (boiling point {boiling:.2f} K); give the line's absolute "
                             f"pressure as fluid_pressure, or fluid_phase='{'gas' if phase == 'liquid' else 'liquid'}'",
                             field="fluid_phase", rule=f"{phase} at the inlet (boiling point {boiling:.2f} K)",
                             value=phase)


# 8-point Gauss-Legendre nodes and weights on [-1, 1] (Abramowitz & Stegun, Table 25.4)
_GL_NODES, _GL_WEIGHTS = np.polynomial.legendre.leggauss(8)


def _integral_of_cp(cp, low, high, panels=4):
    """Integral of cp(T) dT from ``low`` to ``high`` [J/kg]: composite 8-point Gauss-Legendre."""
    edges = low[None] + (high - low)[None] * np.linspace(0.0, 1.0, panels + 1).reshape((-1,) + (1,) * low.ndim)
    mid, half = 0.5 * (edges[1:] + edges[:-1]), 0.5 * (edges[1:] - edges[:-1])
    nodes = mid[None] + half[None] * _GL_NODES.reshape((-1,) + (1,) * mid.ndim)
    weights = _GL_WEIGHTS.reshape((-1,) + (1,) * mid.ndim)
    return np.sum(weights * cp(nodes) * half[None], axis=(0, 1))
