"""Lines in operation on the operation tab: outlet temperature, tracing, freezing, the demo site's lines."""
from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np
from convlib import operation as op
from convlib.geometry import SHAPES
from convlib.pipe import Layer
from convlib.pipe_sizes import nominal_pipe, nominal_sizes
from convlib.steam import saturation_temperature
from convlib.study import CaseSpec, case_layers

from .. import settings
from .case import scalar


# ----------------------------------------------------------------------------- lines in operation
@dataclass(frozen=True)
class OperationInputs:
    """Inputs of the "In operation" panel (SI)."""

    mass_flow: float                 # [kg/s]
    fluid_pressure: float            # [Pa] absolute
    maintain_temperature: float      # [K]
    design_air_temperature: float    # coldest air [K]
    design_wind_speed: float         # strongest wind [m/s]
    tracing_margin: float            # [-]
    initial_temperature: float       # water when the flow stops [K]
    pipe_wall_thickness: float       # [m]
    service: str = "water"           # what flows: "water" (liquid, at fluid_pressure) or "steam" (saturated)
    cool_to_temperature: float = float("nan")  # stopped line: cool-down until the fluid is at [K]; NaN: halfway
    warm_up_time: float = 1800.0     # steam line brought to saturation in [s]
    warm_up_pressure: float = 1.0e6  # steam admitted at [Pa] absolute


@dataclass(frozen=True)
class OperationView:
    """A flowing line's temperature profile, its tracing duty and freeze time, and sweeps of them (SI)."""

    inputs: OperationInputs
    length: float
    inlet_temperature: float
    air_temperature: float
    wind_speed: float
    position: np.ndarray             # (n,) [m]
    temperature: np.ndarray          # (n,) [K]
    outlet_temperature: float        # steam: the saturation temperature
    q_total: float                   # lost along the line [W]
    condensate_rate: float           # steam: condensate formed along the line [kg/s]; NaN for water
    tracing_loss_per_length: float   # [W/m]
    tracing_per_length: float        # [W/m]
    tracing_total: float             # [W]
    time_to_freezing_point: float    # stopped line: sensible cooling to 0 degC [s], inf: never
    time_to_frozen: float            # stopped line: until frozen solid [s], inf: never
    never_freezes: bool
    sweep_input: str
    sweep_values: np.ndarray
    sweep_outlet: np.ndarray         # [K]
    sweep_condensate: np.ndarray     # steam: [kg/s]; NaN for water
    sweep_tracing: np.ndarray        # [W/m]
    sweep_freezing_point: np.ndarray  # [s], NaN: never
    sweep_frozen: np.ndarray         # [s], NaN: never
    current_operating: float         # the case's value of the swept input (profile row)
    current_design: float            # the value the tracing and freeze rows use
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    site_rows: tuple[dict, ...] = ()  # the demo site's lines in operation (convlib.demo): SI text, templates, numbers


@functools.lru_cache(maxsize=1)
def demo_site_operation() -> tuple[dict, ...]:
    """The demo site's long line, steam main, traced line, outdoor water line and tank
    (:func:`convlib.demo.operation_rows` with its numbers: SI text, and templates with SI values and their kinds
    for the other unit system)."""
    from convlib.demo import load_demo_site, operation_rows

    rows, _ = operation_rows(load_demo_site()["operation"], numbers=True)
    return tuple(rows)


def design_air_temperature(case: CaseSpec) -> float:
    """Default coldest air of the tracing and freeze estimates: the case's air less a margin, clipped [K]."""
    o = settings.OPERATION
    return max(case.air_temperature - o["design_air_drop"], o["design_air_floor"])


def operation_defaults(case: CaseSpec, nps: float | None = None, schedule: str | None = None) -> dict:
    """Defaults of the operation view that follow the line: coldest air and pipe wall (NPS/schedule when
    chosen), the cool-down's final temperature and the warm-up's steam pressure; none for a bare surface."""
    if case.kind != "insulated":
        return {}
    return {"design_air_temperature": design_air_temperature(case),
            "pipe_wall_thickness": pipe_wall_thickness(case.diameter, nps, schedule),
            "cool_to_temperature": cool_to_default(case), "warm_up_pressure": warm_up_pressure_default(case)}


def cool_to_default(case: CaseSpec) -> float:
    """Default final temperature of the cool-down: halfway from the fluid to the air, to the whole kelvin [K]."""
    return float(round(0.5 * (case.fluid_temperature + case.air_temperature) - 273.15) + 273.15)


def warm_up_pressure_default(case: CaseSpec) -> float:
    """Default steam pressure of the warm-up [Pa] absolute: saturated at the line's fluid temperature
    (:func:`convlib.steam.saturation_temperature` inverted on a grid), to 0.1 bar; the setting's pressure when
    the fluid is outside saturated steam at 1.1 to 40 bar."""
    grid, t_sat = _saturation_grid(*settings.OPERATION["warm_up_pressure_range"])
    if not t_sat[0] <= case.fluid_temperature <= t_sat[-1]:
        return float(settings.OPERATION["fluid_pressure"])
    pressure = float(np.exp(np.interp(case.fluid_temperature, t_sat, np.log(grid))))
    return round(pressure / 1e4) * 1e4


@functools.lru_cache(maxsize=4)
def _saturation_grid(lo: float, hi: float) -> tuple[np.ndarray, np.ndarray]:
    """Pressures [Pa] from ``lo`` to ``hi`` and their saturation temperatures [K] (computed once: the
    default follows the line on every change of the case)."""
    grid = np.geomspace(lo, hi, 400)
    t_sat = np.asarray(saturation_temperature(grid), float)
    grid.flags.writeable = t_sat.flags.writeable = False
    return grid, t_sat


def pipe_wall_thickness(diameter: float, nps: float | None = None, schedule: str | None = None) -> float:
    """Wall of the line [m]: the NPS/schedule wall when known or when ``diameter`` is a listed size
    (:func:`convlib.pipe_sizes.nominal_pipe`), else the setting (below a quarter of the diameter)."""
    schedule = schedule or settings.DEFAULT_SCHEDULE
    if nps is not None:
        return nominal_pipe(nps, schedule).wall_thickness
    for n in nominal_sizes(schedule):
        pipe = nominal_pipe(n, schedule)
        if abs(pipe.outer_diameter - diameter) < 1e-6:
            return pipe.wall_thickness
    return min(settings.OPERATION["pipe_wall_thickness"], 0.25 * diameter)


def operation_layers(case: CaseSpec, insulation_thickness=None) -> list[Layer]:
    """The case's insulation (``insulation_thickness`` may be an array) and jacket, as in evaluate_case."""
    return case_layers(case, insulation_thickness)


def operation_options(case: CaseSpec, design: bool = False) -> dict:
    """Options of :func:`convlib.pipe.insulated_pipe` for the case; ``design``: no sun, surroundings at the air."""
    info = SHAPES[case.shape]
    natural, forced = case.natural or info.default_natural, case.forced or info.default_forced
    common = dict(jacket_emissivity=case.emissivity, sky_view_fraction=case.sky_view_fraction, pressure=case.pressure,
                  convection_factor=case.convection_factor, natural=natural, forced=forced)
    if not design:
        common.update(surroundings_temperature=case.surroundings_temperature, solar_irradiance=case.solar_irradiance)
    return common


def _sweep_grid(case: CaseSpec, inputs: OperationInputs, name: str) -> np.ndarray:
    _, low, high = settings.OPERATION_SWEEPS[name]
    if name == "wind_speed":
        high = max(high, 1.5 * case.wind_speed, 1.5 * inputs.design_wind_speed)
    elif name == "air_temperature":
        high = max(high, case.air_temperature + 10.0)
        low = min(low, inputs.design_air_temperature - 5.0)
    else:
        high = max(high, 2.0 * case.insulation_thickness)
    return np.linspace(low, high, settings.OPERATION["sweep_points"])


def operation_view(case: CaseSpec, inputs: OperationInputs, sweep_input: str = "wind_speed") -> OperationView:
    """Temperature along the line (:func:`convlib.operation.line_temperature_profile`; for saturated steam
    the saturation temperature and the condensate, :func:`convlib.operation.steam_line`) at the case's air and
    wind, the tracing duty (:func:`convlib.operation.tracing_duty`) and the freeze time
    (:func:`convlib.operation.freeze_time`) at the coldest air and strongest wind, and each against
    ``sweep_input`` (one vectorized call per quantity)."""
    if case.kind != "insulated":
        raise ValueError("for insulated lines with a known fluid temperature")
    if sweep_input not in settings.OPERATION_SWEEPS:
        raise ValueError(f"unknown sweep input {sweep_input!r}; choose one of: {', '.join(settings.OPERATION_SWEEPS)}")
    if inputs.service not in ("water", "steam"):
        raise ValueError(f"unknown service {inputs.service!r}; choose water or steam")
    d, i = case.diameter, inputs
    steam = i.service == "steam"

    def profile(air=case.air_temperature, wind=case.wind_speed, thickness=None):
        if steam:
            return op.steam_line(d, i.fluid_pressure, operation_layers(case, thickness), air_temperature=air,
                                 wind_speed=wind, length=case.length, **operation_options(case))
        return op.line_temperature_profile(
            d, case.fluid_temperature, operation_layers(case, thickness), mass_flow=i.mass_flow, length=case.length,
            air_temperature=air, fluid_pressure=i.fluid_pressure, wind_speed=wind, **operation_options(case))

    def tracing(air=i.design_air_temperature, wind=i.design_wind_speed, thickness=None):
        return op.tracing_duty(d, i.maintain_temperature, operation_layers(case, thickness), air_temperature=air,
                               wind_speed=wind, margin=i.tracing_margin, length=case.length,
                               **operation_options(case, design=True))

    def freeze(air=i.design_air_temperature, wind=i.design_wind_speed, thickness=None):
        return op.freeze_time(d, i.pipe_wall_thickness, i.initial_temperature, operation_layers(case, thickness),
                              air_temperature=air, wind_speed=wind, **operation_options(case, design=True))

    p, t, f = profile(), tracing(), freeze()
    grid = _sweep_grid(case, inputs, sweep_input)
    if sweep_input == "wind_speed":
        sp, st, sf = profile(wind=grid), tracing(wind=grid), freeze(wind=grid)
        current = (case.wind_speed, i.design_wind_speed)
    elif sweep_input == "air_temperature":
        sp, st, sf = profile(air=grid), tracing(air=grid), freeze(air=grid)
        current = (case.air_temperature, i.design_air_temperature)
    else:
        sp, st, sf = profile(thickness=grid), tracing(thickness=grid), freeze(thickness=grid)
        current = (case.insulation_thickness, case.insulation_thickness)
    seconds = lambda t: np.where(np.isfinite(t), np.asarray(t, float), np.nan)  # noqa: E731
    notes = tuple(dict.fromkeys((*t.notes, *f.notes)))
    cautions = (*f.cautions, *t.cautions)
    if steam:  # saturated all along: the profile is flat at the saturation temperature
        t_sat = scalar(p.saturation_temperature)
        position, temperature = np.array([0.0, case.length]), np.full(2, t_sat)
        outlet, condensate = t_sat, scalar(p.condensate_rate)
        sweep_outlet, sweep_condensate = np.asarray(sp.saturation_temperature, float), np.asarray(
            sp.condensate_rate, float)
        cautions = (*p.cautions, *cautions)
        if abs(case.fluid_temperature - t_sat) > 0.5:
            notes = (f"saturated steam at the pressure given is at {t_sat - 273.15:.1f} degC: the steam results use "
                     f"it, not the line's fluid temperature of {case.fluid_temperature - 273.15:.1f} degC", *notes)
    else:
        position, temperature = np.asarray(p.position, float), np.asarray(p.temperature, float)
        outlet, condensate = scalar(p.outlet_temperature), float("nan")
        notes, cautions = (*p.notes, *notes), (*p.cautions, *cautions)  # where the water would freeze
        sweep_outlet = np.asarray(sp.outlet_temperature, float)
        sweep_condensate = np.full(sweep_outlet.shape, np.nan)
    return OperationView(
        site_rows=demo_site_operation(),
        inputs=inputs, length=case.length, inlet_temperature=outlet if steam else case.fluid_temperature,
        air_temperature=case.air_temperature, wind_speed=case.wind_speed, position=position,
        temperature=temperature, outlet_temperature=outlet, condensate_rate=condensate,
        q_total=scalar(p.q_total), tracing_loss_per_length=scalar(t.heat_loss_per_length),
        tracing_per_length=scalar(t.duty_per_length), tracing_total=scalar(t.duty_total),
        time_to_freezing_point=scalar(f.time_to_freezing_point),
        time_to_frozen=scalar(f.time_total),
        never_freezes=bool(np.asarray(f.never_freezes).ravel()[0]), sweep_input=sweep_input, sweep_values=grid,
        sweep_outlet=sweep_outlet, sweep_condensate=sweep_condensate,
        sweep_tracing=np.asarray(st.duty_per_length, float),
        sweep_freezing_point=seconds(sf.time_to_freezing_point), sweep_frozen=seconds(sf.time_total),
        current_operating=float(current[0]), current_design=float(current[1]), notes=notes, cautions=cautions)


# ----------------------------------------------------------------------------- starting and stopping
#: Why a steam line has no cool-down time.
COOL_DOWN_STEAM = "for a line full of liquid (a stopped steam line condenses and drains)"

@dataclass(frozen=True)
class TransientView:
    """Cool-down of the stopped line and warm-up condensate of it as a steam line (SI); ``None`` or NaN where
    it does not apply, with the reason in ``cool_down_note`` / ``warm_up_note``."""

    initial_temperature: float       # the line's fluid when it stops [K]
    cool_to_temperature: float       # [K]
    air_temperature: float           # [K]
    cool_down_time: float            # [s]; inf: settles before it; NaN: not computed (see cool_down_note)
    cool_down_note: str              # why there is no time ("" when there is one)
    steam_pressure: float            # [Pa] absolute
    saturation_temperature: float    # [K]
    start_temperature: float         # the cold line [K]
    warm_up_time: float              # [s]
    warm_up_condensate: float        # heating the wall [kg]; NaN: not computed
    mean_condensate_rate: float      # over the warm-up time, wall + share of running loss [kg/s]
    running_condensate_rate: float   # [kg/s]
    warm_up_note: str
    notes: tuple[str, ...]
    cautions: tuple[str, ...]


def transient_options(case: CaseSpec) -> dict:
    """Options of :mod:`convlib.transients` for the case: its air, wind, sky, sun and jacket (the transients use
    the shape's default laws and no convection factor)."""
    return dict(jacket_emissivity=case.emissivity, air_temperature=case.air_temperature, wind_speed=case.wind_speed,
                surroundings_temperature=case.surroundings_temperature, sky_view_fraction=case.sky_view_fraction,
                solar_irradiance=case.solar_irradiance, pressure=case.pressure)


def transient_view(case: CaseSpec, inputs: OperationInputs) -> TransientView:
    """Time for the stopped line (water at the panel's pressure, from the case's fluid temperature, at the
    case's air and wind) to reach ``inputs.cool_to_temperature`` (:func:`convlib.transients.cool_down_time`),
    and the condensate of warming the line from the case's air with steam at ``inputs.warm_up_pressure`` in
    ``inputs.warm_up_time`` (:func:`convlib.transients.warm_up_condensate`); both over the case's run length
    with the panel's pipe wall. A value convlib refuses (an :class:`~convlib.errors.InputError`) is shown as
    the reason instead of a number."""
    from convlib.errors import InputError
    from convlib.transients import cool_down_time, warm_up_condensate

    if case.kind != "insulated":
        raise ValueError("for insulated lines with a known fluid temperature")
    i, layers = inputs, operation_layers(case)
    final = cool_to_default(case) if np.isnan(i.cool_to_temperature) else i.cool_to_temperature
    nan = float("nan")
    cool, cool_note, notes, cautions = nan, "", [], []
    if i.service == "steam":
        cool_note = COOL_DOWN_STEAM
    else:
        try:
            r = cool_down_time(case.diameter, i.pipe_wall_thickness, case.fluid_temperature, final, layers,
                               fluid_pressure=i.fluid_pressure, **transient_options(case))
            cool = scalar(r.time)
            notes += [*r.notes, *r.warning_messages()]
            cautions += r.cautions
        except InputError as exc:
            cool_note = str(exc)
    start = case.air_temperature
    sat = scalar(saturation_temperature(i.warm_up_pressure))
    condensate = mean = running = nan
    warm_note = ""
    try:
        w = warm_up_condensate(case.diameter, i.pipe_wall_thickness, i.warm_up_pressure, start, i.warm_up_time,
                               layers, length=case.length, **transient_options(case))
        condensate, mean = scalar(w.warm_up_condensate), scalar(w.mean_condensate_rate)
        running = scalar(w.running_condensate_rate)
        notes += w.warning_messages()
        cautions += w.cautions
    except InputError as exc:
        warm_note = str(exc)
    return TransientView(
        initial_temperature=case.fluid_temperature, cool_to_temperature=final, air_temperature=case.air_temperature,
        cool_down_time=cool, cool_down_note=cool_note, steam_pressure=i.warm_up_pressure,
        saturation_temperature=sat, start_temperature=start, warm_up_time=i.warm_up_time,
        warm_up_condensate=condensate, mean_condensate_rate=mean, running_condensate_rate=running,
        warm_up_note=warm_note, notes=tuple(dict.fromkeys(notes)), cautions=tuple(dict.fromkeys(cautions)))
