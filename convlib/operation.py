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

import time
import warnings

import numpy as np

from .errors import InputError
from .pipe import PipeResult, insulated_pipe
from .regimes import summarize_flags
from .surroundings import Surroundings, resolve
from .properties import CP, fluid_properties  # CP: CoolProp.CoolProp, imported on first use
from .roots import find_root
from .validation import SIZE_RANGE, _show, as_array, as_bounded, check_choice

__all__ = [
    "TRACING_MARGIN", "LATENT_HEAT_OF_FUSION", "WATER_FREEZING_TEMPERATURE", "CARBON_STEEL_DENSITY",
    "CARBON_STEEL_SPECIFIC_HEAT", "CAUTION_FREEZE", "CAUTION_TRACING", "CAUTION_STEAM",
    "CAUTION_LINE_FREEZE", "LineProfile", "line_temperature_profile", "MinimumFlow", "minimum_flow",
    "saturation_temperature", "latent_heat_of_vaporization",
    "condensate_rate", "SteamLine", "steam_line", "TracingDuty", "tracing_duty", "FreezeTime", "freeze_time",
]

#: Design margin on the calculated heat loss of a traced line [-] (duty = loss x (1 + margin)).
#: IEEE Std 515 and IEC/IEEE 60079-30-2 recommend a safety factor of roughly 10-25 % on the
#: calculated loss for electric trace heating (from memory; check the edition that governs).
TRACING_MARGIN = 0.20

#: Latent heat of fusion of ice at 0 degC and 1 atm [J/kg]: 333.42 kJ/kg, the enthalpy of liquid water
#: (IAPWS-95) less that of ice Ih (IAPWS R10-06(2009)) at 273.15 K and 101325 Pa, as the ``iapws``
#: package computes it (checked in the tests); handbooks round it to 333.5-333.6 kJ/kg.
LATENT_HEAT_OF_FUSION = 333.42e3

#: Freezing point of water at 1 atm [K] (0 degC; the ice point of the ITS-90 scale is 273.15 K).
WATER_FREEZING_TEMPERATURE = 273.15

#: Steel pipe wall: density [kg/m3] and specific heat [J/kg/K], the design values of DIN EN 12524:2000
#: (continued in EN ISO 10456) for steel, 7800 kg/m3 and 450 J/kg/K, as tabulated in the ``ht`` package's
#: building materials (checked in the tests). Plain carbon steel at 300 K has 434 J/kg/K (Incropera et al.,
#: 6th ed., Table A.1, from memory); a lower value shortens the freeze time slightly (the safe side).
CARBON_STEEL_DENSITY = 7800.0
CARBON_STEEL_SPECIFIC_HEAT = 450.0

CAUTION_FREEZE = ("Freeze time is an estimate; no substitute for draining or heat tracing; local codes govern. "
                  "It assumes still water cooling uniformly, no supercooling and no heat from supports or soil.")
CAUTION_TRACING = ("Tracing duty is the heat the tracer must replace at the design minimum ambient and maximum "
                   "wind; tracer selection, sheath temperature, hazardous-area rating, control and installation "
                   "are governed by IEEE 515 / IEC/IEEE 60079-30, the manufacturer's design and local codes.")
CAUTION_STEAM = ("Condensate load is for the steady running line; warm-up loads are larger, and trap sizing and "
                 "spacing follow the governing standard and the trap manufacturer.")

# ----------------------------------------------------------------------------- marching
_MIN_STEP = 1e-9      # smallest normalized step before giving up
_MAX_STEPS = 20000    # accepted + rejected steps before giving up
#: Default wall-clock bound of one march [s] (``time_limit`` of the marching functions); a march
#: normally takes well under a second, so reaching it means the inputs ask for something unreasonable.
TIME_LIMIT = 60.0
#: Largest design margin on a tracing duty [-] (1000 %).
MARGIN_MAX = 10.0


class _OutOfRange(InputError):
    """A trial stage left the fluid's property range: the march retries with a smaller step."""


def _rk4(rhs, s, y, h, k1):
    """One classical Runge-Kutta step of dy/ds = rhs(s, y) from (s, y) with slope k1 there."""
    k2 = rhs(s + 0.5 * h, y + 0.5 * h * k1)
    k3 = rhs(s + 0.5 * h, y + 0.5 * h * k2)
    k4 = rhs(s + h, y + h * k3)
    return y + h / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4)


def _march(rhs, y0, scale, tolerance, max_step, time_limit=TIME_LIMIT):
    """dy/ds = rhs(s, y) from s = 0 to 1 by RK4 with step doubling (module docstring); a step passes when every
    element's error estimate is <= tolerance * scale (an array, or a callable of y at the step's start).
    Returns s grid, y stacked on it, accepted, rejected, evaluations.

    Bounded: at most ``_MAX_STEPS`` accepted plus rejected steps and ``time_limit`` seconds of wall-clock time;
    reaching either raises InputError saying where the march stopped (field ``tolerance`` or ``time_limit``).
    """
    deadline = time.monotonic() + time_limit
    s, y, h = 0.0, np.asarray(y0, dtype=float), float(max_step)
    grid, values = [0.0], [y]
    accepted = rejected = 0
    k1, last_error, evaluations = rhs(s, y), None, 1
    while s < 1.0 - 1e-13:
        if h < _MIN_STEP and last_error is not None:
            # the solution itself leaves the range
            raise InputError(str(last_error), field=last_error.field, rule=last_error.rule,
                             value=last_error.value) from None
        if time.monotonic() >= deadline:
            raise InputError(f"marching stopped at its time limit of {time_limit:g} s, {s:.3g} of the way along "
                             f"({accepted} steps); loosen the tolerance or raise time_limit", field="time_limit",
                             rule="the march completes within it", value=time_limit)
        if accepted + rejected >= _MAX_STEPS or h < _MIN_STEP:
            raise InputError(f"marching failed to meet the tolerance {tolerance:g} (step {h:.3g} of the "
                             f"normalized range after {accepted} steps); loosen the tolerance", field="tolerance",
                             rule="met by the marching within its step limits", value=tolerance)
        h = min(h, 1.0 - s)
        try:
            whole = _rk4(rhs, s, y, h, k1)
            half = _rk4(rhs, s, y, 0.5 * h, k1)
            two = _rk4(rhs, s + 0.5 * h, half, 0.5 * h, rhs(s + 0.5 * h, half))
            evaluations += 10
            last_error = None
        except _OutOfRange as exc:  # a trial stage overshot: retry with a quarter of the step
            rejected, h, last_error = rejected + 1, 0.25 * h, exc
            continue
        delta = (two - whole) / 15.0
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.abs(delta) / (tolerance * (scale(y) if callable(scale) else scale))
        err = float(np.max(ratio, initial=0.0))
        if not np.isfinite(err):
            raise InputError("marching met a non-finite value; check the inputs", field="inputs",
                             rule="finite values along the march", value=None)
        if err <= 1.0:
            s, y, accepted = (1.0 if h >= 1.0 - s - 1e-13 else s + h), two + delta, accepted + 1
            grid.append(s)
            values.append(y)
            if s < 1.0:
                k1 = rhs(s, y)
                evaluations += 1
            h = min(h * (4.0 if err == 0.0 else min(4.0, 0.9 * err ** -0.2)), float(max_step))
        else:
            rejected += 1
            h *= max(0.1, 0.9 * err ** -0.2)
    return np.array(grid), np.stack(values), accepted, rejected, evaluations


def _coolprop(call, value, field):
    """``call()`` of CoolProp; its ValueError (a state it cannot compute, an unknown fluid) as InputError."""
    try:
        return call()
    except ValueError as err:
        shown = repr(value) if isinstance(value, str) else _show(np.asarray(value, dtype=float))
        raise InputError(f"{field}: CoolProp could not compute it for {shown}: {err}", field=field,
                         rule="a state CoolProp can compute", value=value) from None


def _positive(name, value, unit=""):
    return as_array(name, value, unit=unit, low=0.0, low_inclusive=False)


#: How the functions of this module document the keywords they pass on to :func:`convlib.pipe.insulated_pipe`.
PIPE_KEYWORDS_DOC = ("jacket_emissivity, solar_absorptivity, pipe_wall_thickness, pipe_conductivity, inner_coefficient, "
                     "natural, forced, mixing_exponent, convection_factor, convection_coefficient, exact_properties: "
                     "as in convlib.pipe.insulated_pipe; surroundings or its fields air_temperature, wind_speed, "
                     "surroundings_temperature, sky_view_fraction, sky_temperature, solar_irradiance, pressure")


def _pipe_keywords(**given) -> dict:
    """The insulated_pipe keywords a caller gave (``None``: not given)."""
    return {name: value for name, value in given.items() if value is not None}


class _Flags:
    """Union of the warning flags of every insulated_pipe solve a function makes, per case."""

    def __init__(self):
        self.seen = []

    def add(self, warnings):
        self.seen.append(np.asarray(warnings))

    def union(self, shape) -> np.ndarray:
        out = np.zeros(shape, dtype=np.int16)
        for w in self.seen:
            if w.ndim > len(shape):  # quadrature nodes or grids on leading axes
                w = np.bitwise_or.reduce(w.reshape((-1, *w.shape[w.ndim - len(shape):])), axis=0)
            out |= np.broadcast_to(w, shape).astype(np.int16)
        return out


def _loss_function(pipe_outer_diameter, layers, around: Surroundings, pipe_keywords: dict, flags: _Flags):
    """q'(T) [W/m] of the line with the fluid at T, outer coefficient re-evaluated (surface solved to 1e-8 K);
    the flags of every solve go to ``flags``."""
    def loss(temperature):
        r = insulated_pipe(pipe_outer_diameter, temperature, layers, length=1.0, tolerance=1e-8, surroundings=around,
                           **pipe_keywords)
        flags.add(r.warnings)
        return r.q_per_length
    return loss


def _frozen_coefficient(loss, reference_temperature, air_temperature):
    """U' = q'(T_ref) / (T_ref - T_a) [W/m/K]; within 0.01 K of the air, taken 1 K above it."""
    ta = np.asarray(air_temperature, dtype=float)
    near = np.abs(reference_temperature - ta) < 0.01
    t_ref = np.where(near, ta + 1.0, reference_temperature)
    return loss(t_ref) / (t_ref - ta)


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
    flags: _Flags


def _line_model(pipe_outer_diameter, inlet_temperature, layers, around: Surroundings, fluid, fluid_pressure,
                fluid_phase, specific_heat, constant_coefficient, freezing_temperature, pipe_keywords,
                extra_shapes=()) -> _Line:
    tin = _positive("inlet_temperature", inlet_temperature, "K")
    p_fluid = _positive("fluid_pressure", fluid_pressure, "Pa")
    fixed_cp = None if specific_heat is None else _positive("specific_heat", specific_heat, "J/kg/K")
    ta = around.air_temperature
    check_choice("fluid_phase", fluid_phase, ("liquid", "gas"))
    calls = [0]
    flags = _Flags()
    pipe_loss = _loss_function(pipe_outer_diameter, layers, around, pipe_keywords, flags)

    def loss(temperature):
        calls[0] += 1
        return pipe_loss(temperature)

    coefficient_in = _frozen_coefficient(loss, tin, ta)
    given_freezing = (None if isinstance(freezing_temperature, str) or freezing_temperature is None
                      else _positive("freezing_temperature", freezing_temperature, "K"))
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
            raise _OutOfRange(f"fluid {fluid} at fluid_pressure leaves its single-phase range along the line (it "
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
                             tolerance=1e-6, max_step=0.1, time_limit=TIME_LIMIT, jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None, mixing_exponent=None, convection_factor=None, convection_coefficient=None, exact_properties=False, surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None) -> LineProfile:
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
    flow = _positive("mass_flow", mass_flow, "kg/s")
    run = as_bounded("length", length, unit="m", low_inclusive=False, accepted=SIZE_RANGE)
    tol = float(_positive("tolerance", tolerance, "K"))
    limit_s = float(as_array("time_limit", time_limit, unit="s", low=0.0))
    step = float(as_array("max_step", max_step, low=0.0, high=1.0, low_inclusive=False))
    line = _line_model(pipe_outer_diameter, inlet_temperature, layers, resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure), fluid, fluid_pressure,
                       fluid_phase, specific_heat, constant_coefficient, freezing_temperature, _pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity, pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity, inner_coefficient=inner_coefficient, natural=natural, forced=forced, mixing_exponent=mixing_exponent, convection_factor=convection_factor, convection_coefficient=convection_coefficient, exact_properties=exact_properties),
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

    grid, values, accepted, rejected, _ = _march(rhs, np.zeros((2, *shape)), scale, tol, step, limit_s)
    temperature, theta = state(values[:, 0])
    q_line = line.coefficient(theta) * theta
    position = np.broadcast_to(grid.reshape((-1,) + (1,) * len(shape)) * run, temperature.shape).copy()
    t_out, q_total = temperature[-1].copy(), values[-1, 1] * capacity_in
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
    drop = flow * _integral_of_cp(line.cp, t_out, tin)
    with np.errstate(divide="ignore", invalid="ignore"):
        balance = np.where(q_total != 0, (drop - q_total) / np.abs(q_total), drop - q_total)
    return LineProfile(
        outlet_temperature=t_out, q_total=q_total, enthalpy_drop=drop, energy_balance_error=balance,
        fraction=grid, position=position, temperature=temperature, q_per_length=q_line,
        inlet_loss_coefficient=line.coefficient_in.copy(), steps=accepted, rejected_steps=rejected,
        evaluations=line.evaluations[0], equilibrium_temperature=t_eq.copy(), freezes=freezes,
        freezing_position=x_freeze, notes=tuple(notes), cautions=tuple(cautions), warnings=line.flags.union(shape))


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
                 constant_coefficient=False, freezing_temperature="auto", jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None, mixing_exponent=None, convection_factor=None, convection_coefficient=None, exact_properties=False, surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None) -> MinimumFlow:
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
    run = _positive("length", length, "m")
    limit = _positive("outlet_limit", outlet_limit, "K")
    line = _line_model(pipe_outer_diameter, inlet_temperature, layers, resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure), fluid, fluid_pressure,
                       fluid_phase, specific_heat, constant_coefficient, freezing_temperature, _pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity, pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity, inner_coefficient=inner_coefficient, natural=natural, forced=forced, mixing_exponent=mixing_exponent, convection_factor=convection_factor, convection_coefficient=convection_coefficient, exact_properties=exact_properties),
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
    critical, triple = _coolprop(lambda: (CP.PropsSI("pcrit", fluid), CP.PropsSI("ptriple", fluid)), fluid, "fluid")
    for p in np.unique(pressure[(pressure > triple) & (pressure < critical)]):
        boiling = _coolprop(lambda: CP.PropsSI("T", "P", float(p), "Q", 0.0 if phase == "liquid" else 1.0, fluid),
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


# ----------------------------------------------------------------------------- steam lines
def _saturated(key, steam_pressure, quality, fluid):
    """CoolProp (IAPWS-95 for water) at saturation; the pressure checked between triple and critical points."""
    triple, critical = _coolprop(lambda: (CP.PropsSI("ptriple", fluid), CP.PropsSI("pcrit", fluid)), fluid, "fluid")
    p = as_array("steam_pressure", steam_pressure, unit="Pa", low=triple, high=critical, low_inclusive=False,
                 high_inclusive=False)
    values = _coolprop(lambda: CP.PropsSI(key, "P", np.atleast_1d(p).ravel(), "Q", quality, fluid), p,
                       "steam_pressure")
    return np.asarray(values, dtype=float).reshape(p.shape)


def saturation_temperature(steam_pressure, fluid="Water"):
    """Saturation temperature [K] at ``steam_pressure`` [Pa], from CoolProp (IAPWS-95 for water).

    >>> round(float(saturation_temperature(101325.0)) - 273.15, 2)
    99.97
    """
    return _saturated("T", steam_pressure, 0.0, fluid)


def latent_heat_of_vaporization(steam_pressure, fluid="Water"):
    """Latent heat :math:`h_{fg} = h_g - h_f` at saturation [J/kg] at ``steam_pressure`` [Pa], from CoolProp.

    >>> round(float(latent_heat_of_vaporization(101325.0)) / 1e3, 1)
    2256.5
    """
    return _saturated("H", steam_pressure, 1.0, fluid) - _saturated("H", steam_pressure, 0.0, fluid)


def condensate_rate(q_total, steam_pressure, fluid="Water"):
    r"""Condensate formed by a heat loss from saturated steam [kg/s]: :math:`Q / h_{fg}(p)`.

    Parameters
    ----------
    q_total : numeric
        Heat lost by the steam [W]; a net gain (< 0) condenses nothing (0 is returned).
    steam_pressure : numeric
        Absolute steam pressure [Pa], between the triple and critical points.
    fluid : str
        CoolProp fluid, default ``"Water"``.

    Examples
    --------
    >>> round(float(condensate_rate(10_000.0, 1.0e6)) * 3600.0, 2)   # kg/h
    17.87
    """
    q = as_array("q_total", q_total, unit="W")
    return np.maximum(q, 0.0) / latent_heat_of_vaporization(steam_pressure, fluid)


@dataclass(frozen=True)
class SteamLine:
    """A saturated steam line: its loss and the condensate it forms (arrays over the cases)."""

    saturation_temperature: np.ndarray   # [K]
    latent_heat: np.ndarray              # h_fg [J/kg]
    q_per_length: np.ndarray             # [W/m]
    q_total: np.ndarray                  # [W]
    condensate_per_length: np.ndarray    # [kg/s per m]
    condensate_rate: np.ndarray          # [kg/s]
    pipe: PipeResult
    cautions: tuple[str, ...]

    @property
    def warnings(self) -> np.ndarray:
        """Flags of the line's solve (convlib.regimes.Flag)."""
        return self.pipe.warnings

    def warning_messages(self) -> list[str]:
        return self.pipe.warning_messages()


def steam_line(pipe_outer_diameter, steam_pressure, layers=(), *, length=1.0, jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None, mixing_exponent=None, convection_factor=None, convection_coefficient=None, exact_properties=False, surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None) -> SteamLine:
    """Heat loss and condensate of a line of saturated steam at ``steam_pressure`` [Pa].

    The fluid is at the saturation temperature all along (a condensing vapour stays at it);
    the loss is :func:`convlib.pipe.insulated_pipe` at that temperature and the condensate
    :func:`condensate_rate` (kg/s).

    Parameters
    ----------
    pipe_outer_diameter, steam_pressure : numeric
        Pipe [m]; absolute steam pressure [Pa].
    layers : sequence of Layer
    length : numeric
        Line length [m].
    jacket_emissivity, solar_absorptivity, pipe_wall_thickness, pipe_conductivity, inner_coefficient, natural,
    forced, mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`.
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords.

    Examples
    --------
    100 m of 4 in steam main at 10 bar(a) with 80 mm mineral wool and an aluminium jacket, air at 0 degC:

    >>> from convlib.pipe import Layer
    >>> s = steam_line(0.1143, 1.0e6, [Layer(0.08, 0.045)], air_temperature=273.15, length=100.0,
    ...                jacket_emissivity=0.1)
    >>> round(float(s.saturation_temperature) - 273.15, 1), round(float(s.q_total)), round(float(s.condensate_rate) * 3600, 2)
    (179.9, 5346, 9.55)
    """
    run = as_bounded("length", length, unit="m", accepted=(0.0, SIZE_RANGE[1]))
    t_sat, h_fg = saturation_temperature(steam_pressure), latent_heat_of_vaporization(steam_pressure)
    r = insulated_pipe(pipe_outer_diameter, t_sat, layers, length=1.0, surroundings=resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure),
                       **_pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity, pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity, inner_coefficient=inner_coefficient, natural=natural, forced=forced, mixing_exponent=mixing_exponent, convection_factor=convection_factor, convection_coefficient=convection_coefficient, exact_properties=exact_properties))
    shape = np.broadcast_shapes(r.q_per_length.shape, run.shape, h_fg.shape)
    per_metre = np.maximum(r.q_per_length, 0.0) / h_fg
    full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    return SteamLine(saturation_temperature=full(t_sat), latent_heat=full(h_fg), q_per_length=full(r.q_per_length),
                     q_total=full(r.q_per_length * run), condensate_per_length=full(per_metre),
                     condensate_rate=full(per_metre * run), pipe=r, cautions=(CAUTION_STEAM,))


# ----------------------------------------------------------------------------- heat tracing
@dataclass(frozen=True)
class TracingDuty:
    """Power a tracer must supply (arrays over the cases)."""

    heat_loss_per_length: np.ndarray     # q' of the line at the maintain temperature [W/m]
    duty_per_length: np.ndarray          # max(q', 0) x (1 + margin) [W/m]
    duty_total: np.ndarray               # duty_per_length x length [W]
    margin: np.ndarray                   # [-]
    surface_temperature: np.ndarray      # jacket temperature at the maintain temperature [K]
    pipe: PipeResult
    notes: tuple[str, ...]
    cautions: tuple[str, ...]

    @property
    def warnings(self) -> np.ndarray:
        return self.pipe.warnings

    def warning_messages(self) -> list[str]:
        return self.pipe.warning_messages()


def tracing_duty(pipe_outer_diameter, maintain_temperature, layers=(), *, margin=TRACING_MARGIN, length=1.0,
                 jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None, mixing_exponent=None, convection_factor=None, convection_coefficient=None, exact_properties=False, surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None) -> TracingDuty:
    r"""Heat-tracing duty to hold a line at its maintain temperature with no flow [W/m].

    .. math:: P' = (1 + m)\, \max(q'(T_{maintain}),\ 0)

    with :math:`q'` from :func:`convlib.pipe.insulated_pipe` with the fluid (and pipe) at the
    maintain temperature -- the tracer replaces what the insulated line loses -- evaluated at
    the design minimum ambient and maximum wind, and :math:`m` the design margin.

    Parameters
    ----------
    pipe_outer_diameter, maintain_temperature : numeric
        Pipe [m]; temperature the tracer holds [K] (e.g. 278.15 K = 5 degC against freezing).
    layers : sequence of Layer
        Insulation and jacket (a traced line usually takes the next larger insulation size).
    margin : numeric
        Design margin on the loss [-], >= 0; default :data:`TRACING_MARGIN`.
    length : numeric
        Traced length [m], fittings as equivalent length.
    jacket_emissivity, solar_absorptivity, pipe_wall_thickness, pipe_conductivity, inner_coefficient, natural,
    forced, mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`.
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords: the design
        minimum ambient and maximum wind (0 indoors).

    Examples
    --------
    A 2 in line held at 5 degC under 25 mm of insulation, at -20 degC and 10 m/s:

    >>> from convlib.pipe import Layer
    >>> d = tracing_duty(0.0603, 278.15, [Layer(0.025, 0.04)], air_temperature=253.15, wind_speed=10.0)
    >>> round(float(d.heat_loss_per_length), 2), round(float(d.duty_per_length), 2)
    (10.14, 12.17)
    """
    t_maintain = _positive("maintain_temperature", maintain_temperature, "K")
    m = as_bounded("margin", margin, accepted=(0.0, MARGIN_MAX))
    run = as_bounded("length", length, unit="m", accepted=(0.0, SIZE_RANGE[1]))
    r = insulated_pipe(pipe_outer_diameter, t_maintain, layers, length=1.0, surroundings=resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure),
                       **_pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity, pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity, inner_coefficient=inner_coefficient, natural=natural, forced=forced, mixing_exponent=mixing_exponent, convection_factor=convection_factor, convection_coefficient=convection_coefficient, exact_properties=exact_properties))
    shape = np.broadcast_shapes(r.q_per_length.shape, m.shape, run.shape)
    loss = np.broadcast_to(r.q_per_length, shape)
    duty = np.maximum(loss, 0.0) * (1.0 + m)
    notes = []
    if np.any(loss <= 0):
        notes.append(f"{int(np.count_nonzero(loss <= 0))} case(s): the line at its maintain temperature gains heat "
                     f"from its surroundings; no tracing duty")
    return TracingDuty(heat_loss_per_length=loss.copy(), duty_per_length=np.broadcast_to(duty, shape).copy(),
                       duty_total=np.broadcast_to(duty * run, shape).copy(), margin=np.broadcast_to(m, shape).copy(),
                       surface_temperature=np.broadcast_to(r.surface_temperature, shape).copy(), pipe=r,
                       notes=tuple(notes), cautions=(CAUTION_TRACING,))


# ----------------------------------------------------------------------------- freeze time
@dataclass(frozen=True)
class FreezeTime:
    """Stagnant water in a line: times and the cooling curve (arrays over the cases).

    Cases whose line settles above the freezing point are flagged ``never_freezes``, and ``notes`` says so in
    words; their times are inf and their curves NaN (no time exists). Test the flag, not the inf: an inf or NaN
    summed into a total or written to a file says nothing. Every other case has finite times.
    """

    time_to_freezing_point: np.ndarray       # sensible cooling from the initial temperature [s]
    time_to_freeze_solid: np.ndarray         # further time, at the freezing point, until all water is ice [s]
    time_total: np.ndarray                   # [s]
    never_freezes: np.ndarray                # bool: q' at the freezing point <= 0
    water_mass_per_length: np.ndarray        # [kg/m]
    heat_capacity_per_length: np.ndarray     # water + pipe wall at the initial temperature [J/m/K]
    q_at_freezing_point: np.ndarray          # q' with the water at the freezing point [W/m]
    curve_time: np.ndarray                   # (n, *shape) [s]; last point: frozen solid
    curve_temperature: np.ndarray            # (n, *shape) [K]
    inlet_loss_coefficient: np.ndarray       # U' = q'(T_0) / (T_0 - T_a) [W/m/K]
    steps: int
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    warnings: np.ndarray = None              # union of the flags of every insulated_pipe solve, per case

    def warning_messages(self) -> list[str]:
        return [] if self.warnings is None else summarize_flags(self.warnings)

    # ---- names of 0.2.0 in hours: deprecated, removed in the next version (the results are SI now)
    def _hours(self, old: str, new: str) -> np.ndarray:
        warnings.warn(f"FreezeTime.{old} is deprecated: use {new} (seconds) / 3600", DeprecationWarning, stacklevel=3)
        return getattr(self, new) / 3600.0

    @property
    def hours_to_freezing_point(self) -> np.ndarray:
        return self._hours("hours_to_freezing_point", "time_to_freezing_point")

    @property
    def hours_to_freeze_solid(self) -> np.ndarray:
        return self._hours("hours_to_freeze_solid", "time_to_freeze_solid")

    @property
    def hours_total(self) -> np.ndarray:
        return self._hours("hours_total", "time_total")

    @property
    def curve_hours(self) -> np.ndarray:
        return self._hours("curve_hours", "curve_time")


#: Water properties are taken no lower than this [K]: CoolProp's IAPWS-95 liquid starts at the
#: triple point, 273.16 K; cp changes by < 1e-4 % over the 0.02 K below it.
_WATER_PROPERTY_FLOOR = 273.17
_WATER_PROPERTY_CEILING = 372.0   # liquid at 1 atm (boils at 373.12 K)


def freeze_time(pipe_outer_diameter, pipe_wall_thickness, initial_temperature, layers=(), *,
                pipe_density=CARBON_STEEL_DENSITY, pipe_specific_heat=CARBON_STEEL_SPECIFIC_HEAT,
                water_specific_heat=None, latent_heat=LATENT_HEAT_OF_FUSION,
                freezing_temperature=WATER_FREEZING_TEMPERATURE, constant_coefficient=False, tolerance=1e-7,
                max_step=0.1, time_limit=TIME_LIMIT, jacket_emissivity=0.9, solar_absorptivity=None, pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None, mixing_exponent=None, convection_factor=None, convection_coefficient=None, exact_properties=False, surroundings: Surroundings | None = None, air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None) -> FreezeTime:
    r"""Time for stagnant water in an insulated line to reach the freezing point and to freeze solid.

    Sensible cooling of the water and the pipe wall, the outer coefficient re-evaluated:

    .. math:: (m_w c_w(T) + m_p c_p)\,\frac{dT}{dt} = -q'(T)
        \quad\Rightarrow\quad t_1 = \int_{T_f}^{T_0} \frac{m_w c_w(T) + m_p c_p}{q'(T)}\,dT

    (marched in temperature), then freezing at :math:`T_f` until all the water is ice,
    :math:`t_2 = m_w L_f / q'(T_f)`. For constant :math:`U'` and :math:`C'`:
    :math:`t_1 = C'/U' \ln\frac{T_0 - T_a}{T_f - T_a}`, :math:`t_2 = m_w L_f / (U'(T_f - T_a))`.
    Lumped: the water well mixed; the ice layer's resistance, supercooling and the insulation's heat
    capacity neglected. Water density (at :math:`T_0`) and :math:`c_w(T)` from CoolProp at 1 atm.

    Parameters
    ----------
    pipe_outer_diameter, pipe_wall_thickness : numeric
        Pipe and its wall [m] (the water's diameter, the wall's heat capacity).
    initial_temperature : numeric
        Water temperature when the flow stops [K], from the freezing point to 372 K.
    layers : sequence of Layer
    pipe_density, pipe_specific_heat : numeric
        Wall [kg/m3], [J/kg/K]; default carbon steel (common practice).
    water_specific_heat : numeric, optional
        Fixed [J/kg/K] instead of CoolProp's (hand-calculation checks).
    latent_heat, freezing_temperature : numeric
        [J/kg], [K]; default :data:`LATENT_HEAT_OF_FUSION`, 273.15 K.
    constant_coefficient : bool
        Freeze :math:`U' = q'(T_0)/(T_0 - T_a)` at the initial temperature.
    tolerance : float
        Local error per step relative to the case's time scale :math:`(T_0 - T_f) C'/q'(T_0)` [-].
    max_step : float
        Largest step as a fraction of the temperature fall (0-1].
    time_limit : float
        Wall-clock bound of the march [s], as in :func:`line_temperature_profile`.
    jacket_emissivity, solar_absorptivity, pipe_conductivity, inner_coefficient, natural, forced,
    mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe` (with ``pipe_conductivity`` the wall's resistance counts too).
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings, or its fields as keywords: the design minimum ambient.

    Examples
    --------
    A 2 in schedule 40 line (3.91 mm wall) at 10 degC, 25 mm of insulation, -15 degC and 5 m/s:

    >>> from convlib.pipe import Layer
    >>> f = freeze_time(0.0603, 0.00391, 283.15, [Layer(0.025, 0.04)], air_temperature=258.15, wind_speed=5.0)
    >>> round(float(f.time_to_freezing_point) / 3600, 2), round(float(f.time_to_freeze_solid) / 3600, 1)
    (4.08, 33.3)
    """
    d = _positive("pipe_outer_diameter", pipe_outer_diameter, "m")
    wall = _positive("pipe_wall_thickness", pipe_wall_thickness, "m")
    if np.any(2.0 * wall >= d):
        raise InputError(f"pipe_wall_thickness must be less than half the pipe_outer_diameter; got "
                         f"{np.max(wall):g} m for a {np.min(d):g} m pipe", field="pipe_wall_thickness",
                         rule="less than half the pipe_outer_diameter", value=float(np.max(wall)))
    tf = _positive("freezing_temperature", freezing_temperature, "K")
    t0 = as_array("initial_temperature", initial_temperature, unit="K", low=0.0, low_inclusive=False,
                  high=_WATER_PROPERTY_CEILING)
    if np.any(t0 < tf):
        raise InputError(f"initial_temperature must be at least the freezing_temperature "
                         f"({float(np.max(tf)):g} K); got {float(np.min(t0)):g} K", field="initial_temperature",
                         rule="at least the freezing_temperature", value=float(np.min(t0)))
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed, surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    ta = around.air_temperature
    rho_p = _positive("pipe_density", pipe_density, "kg/m3")
    c_p = _positive("pipe_specific_heat", pipe_specific_heat, "J/kg/K")
    lf = _positive("latent_heat", latent_heat, "J/kg")
    tol = float(_positive("tolerance", tolerance))
    step = float(as_array("max_step", max_step, low=0.0, high=1.0, low_inclusive=False))
    limit_s = float(as_array("time_limit", time_limit, unit="s", low=0.0))
    fixed_cw = None if water_specific_heat is None else _positive("water_specific_heat", water_specific_heat,
                                                                  "J/kg/K")
    options = _pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                             pipe_conductivity=pipe_conductivity, inner_coefficient=inner_coefficient, natural=natural,
                             forced=forced, mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                             convection_coefficient=convection_coefficient, exact_properties=exact_properties)
    if "pipe_conductivity" in options:
        options["pipe_wall_thickness"] = wall
    flags = _Flags()
    loss = _loss_function(d, layers, around, options, flags)

    def water(temperature):
        return fluid_properties("Water", np.clip(temperature, _WATER_PROPERTY_FLOOR, _WATER_PROPERTY_CEILING))

    def cw(temperature):
        return water(temperature).cp if fixed_cw is None else np.broadcast_to(fixed_cw, np.shape(temperature))

    bore = d - 2.0 * wall
    m_w = water(t0).rho * np.pi * bore ** 2 / 4.0               # [kg/m]
    c_wall = rho_p * c_p * np.pi * (d ** 2 - bore ** 2) / 4.0   # [J/m/K]
    coefficient = _frozen_coefficient(loss, t0, ta)
    loss_at = (lambda t: coefficient * (t - ta)) if constant_coefficient else loss  # noqa: E731
    q_start = loss_at(t0)
    shape = np.broadcast_shapes(q_start.shape, m_w.shape, c_wall.shape, tf.shape, lf.shape,
                                () if fixed_cw is None else fixed_cw.shape)
    t0, tf = np.broadcast_to(t0, shape), np.broadcast_to(tf, shape)
    q_freeze = np.broadcast_to(loss_at(tf), shape)
    never = q_freeze <= 0.0
    fall = np.where(never, 0.0, t0 - tf)

    def capacity(temperature):
        return m_w * cw(temperature) + c_wall

    def rhs(u, y):
        temperature = t0 - u * fall
        return (fall * capacity(temperature) / np.where(never, 1.0, loss_at(temperature)))[None]

    scale = np.where(never | (fall == 0), 1.0, np.abs(fall * capacity(t0) / np.where(never, 1.0, q_start)))
    grid, values, accepted, _, _ = _march(rhs, np.zeros((1, *shape)), scale, tol, step, limit_s)
    sensible, solid = values[-1, 0], np.broadcast_to(m_w * lf, shape) / np.where(never, 1.0, q_freeze)
    curve_t = np.concatenate([t0[None] - grid.reshape((-1,) + (1,) * len(shape)) * fall[None], tf[None]])
    curve_s = np.concatenate([values[:, 0], (sensible + solid)[None]])
    notes = [f"{int(never.sum())} case(s) settle above the freezing point: no freezing under these conditions"
             ] if never.any() else []
    seconds = lambda t: np.where(never, np.inf, t)  # noqa: E731
    return FreezeTime(
        time_to_freezing_point=seconds(sensible), time_to_freeze_solid=seconds(solid), time_total=seconds(sensible + solid),
        never_freezes=never.copy(), water_mass_per_length=np.broadcast_to(m_w, shape).copy(),
        heat_capacity_per_length=np.broadcast_to(capacity(t0), shape).copy(), q_at_freezing_point=q_freeze.copy(),
        curve_time=np.where(never[None], np.nan, curve_s), curve_temperature=np.where(never[None], np.nan, curve_t),
        inlet_loss_coefficient=np.broadcast_to(coefficient, shape).copy(), steps=accepted, notes=tuple(notes),
        cautions=(CAUTION_FREEZE,), warnings=flags.union(shape))
