r"""Plant line lists: read a survey of lines from CSV, compute them all at once, write the results.

A line list is a table with one line (pipe run) per row. Columns (case and spaces in
the header do not matter; ``Fluid temperature [degC]`` reads as ``fluid_temperature[degC]``):

=====================  ========  ======================================================================
column                 default   meaning [default unit]
=====================  ========  ======================================================================
``tag``                required  line identifier, e.g. ``FH-103``
``description``        ""        free text
``nps``                --        nominal pipe size: ``4``, ``1.5``, ``1-1/2``, ``3/4`` (ASME B36.10M)
``schedule``           ``40``    pipe schedule with ``nps``: 40, 80, STD, XS, 10S, ...
``size``               --        the pipe or tube by name, instead of ``nps``: ``DN100`` (EN 10220),
                                 ``CU22x1.0`` (EN 1057), ``B88-3/4-L`` (ASTM B88), ``NPS4/80``
                                 (:func:`convlib.pipe_sizes.pipe_size`)
``outer_diameter``     --        outer diameter of the pipe itself [m], instead of ``nps``
``length``             required  run length [m]
``fluid_temperature``  required  temperature of the fluid [K]
``air_temperature``    required  design air temperature around the line [K]
``relative_humidity``  none      design relative humidity, a fraction 0-1 (or head it ``[%]``)
``layers``             bare      layers from the pipe outwards, see below
``location``           indoor    ``indoor`` or ``outdoor``
``sky_view_fraction``  0 / 0.5   part of the view that is sky [-]; 0 indoors, 0.5 outdoors
``wind_speed``         0         design wind speed [m/s]
``jacket_emissivity``  0.9       long-wave emissivity of the outer surface [-]
``operating_hours``    8760      hours per year the line is hot or cold [h] (no unit suffix)
``valve`` ...          0         number of fittings: ``valve``, ``flange_pair``, ``support``,
                                 ``elbow``, ``strainer`` (:data:`convlib.design.FITTING_EQUIVALENT_LENGTH`)
``bare_valve``         0         number of uninsulated flanged gate valves (with their joints) on the line;
                                 their extra heat (:func:`convlib.fittings.bare_valve`) is added to
                                 ``q_total`` and the annual figures; needs ``nps``
``bare_flange_pair``   0         number of uninsulated flange pairs (:func:`convlib.fittings.bare_flange_pair`),
                                 added the same way
``pressure_class``     150       ASME B16.5 / B16.10 class of the bare valves and flanges: 150 or 300
``mass_flow``          none      flow in the line [kg/s]: outlet temperature over the
                                 equivalent length (:func:`convlib.operation.line_temperature_profile`)
``fluid``              Water     CoolProp name of what flows (with ``mass_flow``), e.g. ``Water``, ``Air``
``fluid_pressure``     1 atm     absolute pressure of the fluid [Pa] (hot water above 100 degC needs it)
``fluid_phase``        liquid    ``liquid`` or ``gas`` (air, superheated steam); checked against the
                                 boiling point at ``fluid_pressure``
``maintain_temperature`` none    temperature a tracer holds [K]: tracing duty
                                 (:func:`convlib.operation.tracing_duty`, default margin)
``minimum_ambient``    air       design minimum air temperature for the tracing duty [K]
``steam_pressure``     none      absolute pressure of a saturated steam line [Pa]: condensate formed by
                                 the line's loss (:func:`convlib.operation.condensate_rate`); the
                                 fluid temperature should be the saturation temperature (else a note)
``pipe_wall_thickness`` table    the pipe wall [m] for cool-down and warm-up (default: the NPS schedule's or the
                                 named size's wall; a DN size names none)
``cool_down_to``       none      temperature a stopped line cools to [K]: ``cool_down_time`` [s]
                                 (:func:`convlib.transients.cool_down_time`, the wall steel or copper by size)
``warm_up_time``       none      with ``steam_pressure``: time to bring the line to saturation [s] from the design
                                 air: ``warm_up_condensate`` [kg] (:func:`convlib.transients.warm_up_condensate`)
=====================  ========  ======================================================================

Give each line one of ``nps``, ``size`` or ``outer_diameter``. Columns with an empty header are ignored; an
unknown column is an error for the whole file (a misspelt column must not go unnoticed).

**Units.** Plain numbers are SI, kelvin for temperatures. A unit in brackets after the column name
applies to the plain numbers of that column: ``fluid_temperature[degC]``, ``air_temperature[°F]``,
``outer_diameter[mm]``, ``length[ft]``, ``wind_speed[km/h]``, ``relative_humidity[%]``, ``layers[mm]``
(thicknesses). A unit in a cell wins: ``6 in``, ``90 degC``, ``0.045 W/m/degC``, ``6 barg``, ``80%``. Cells
are read by :func:`convlib.units.split`, the reader of the command line (a temperature inside a compound unit
is an interval), and a value outside the range engineers use (:data:`convlib.units.INPUTS`) makes its row an
error with a hint unless ``allow_unusual=True``.

**Layers.** ``THICKNESS,CONDUCTIVITY[,NAME]`` per layer, the command line's ``--layer`` syntax
(:mod:`convlib.layer_text`; conductivity in W/m/K or with its unit), separated by ``;``, from the pipe
outwards, the cell quoted (it holds commas); empty, ``bare`` or ``none``: a bare pipe. With ``layers[mm]``:
``"80,0.045,mineral wool; 0.7,200,aluminium jacket"``; without it ``"80mm,0.045,..."``. The form of 0.2.0,
``80@0.045 mineral wool``, is still read, with a ``DeprecationWarning``. The conductivity may be a material name of
:mod:`convlib.materials` instead (``"50,calcium_silicate_c533_type1"``): the layer takes its k(T), and a layer
beyond the material's service temperature gets a note.

**Rows.** Row numbers are those of the file (header = row 1; blank lines count, and are skipped).
A row that fails validation becomes a :class:`RowError` naming the column and the problem; the
other rows are still computed. So does a row that the solvers or the property data cannot compute
(:class:`~convlib.errors.InputError` from the computation). Any other exception is a fault of the
program, not of the row: it is raised, not reported as a row error.

**Results.** Per line at its design conditions: surface temperature, heat flow per metre and over the
equivalent length (length plus fittings), plus the extra heat of its bare valves and flange pairs
(``bare_fittings_heat``, at the design condition and, for outdoor lines with weather bins, in every bin; the
outlet temperature and tracing duty leave it out, the condensate of a steam line counts it); per year: heat lost (> 0) or gained (< 0), purchased energy
(hot service, fluid above the design air: net loss / efficiency; cold service: net gain / COP), its
cost and CO2. With :class:`~convlib.design.WeatherBins`, outdoor lines see each bin's air temperature
and wind, indoor lines keep their design air and wind; a given ``operating_hours`` scales every bin's
hours by ``operating_hours / total bin hours``; without them every line takes its design condition for
all its hours, and :attr:`LineListResult.warnings` says so. Totals never net a cold line's gain against
a hot line's loss: heat lost by hot lines and heat gained by cold lines are summed apart.
``touch_flag`` (surface above a touch limit) and ``condensation_flag`` (surface below the dew point
of the line's air) are flags for review, not verdicts (:data:`~convlib.design.CAUTION_TOUCH`,
:data:`~convlib.design.CAUTION_CONDENSATION`).

Examples
--------
>>> text = '''tag,nps,length[m],fluid_temperature[degC],air_temperature[degC],layers[mm],jacket_emissivity
... FH-001,4,10,180,20,"50,0.045,mineral wool",0.1
... '''
>>> res = run_line_list(io.StringIO(text))
>>> round(float(res.q_per_length[0]), 1), round(float(res.q_total[0]))
(63.1, 631)
"""
from __future__ import annotations

import csv
import io
import math
import warnings
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from .annual import check_bins
from .design import (CAUTION_CONDENSATION, CAUTION_TOUCH, DEFAULT_COOLING_COP, DEFAULT_HEATING_EFFICIENCY,
                     TOUCH_LIMIT_METAL_JACKET, WeatherBins)
from .errors import InputError
from .fittings import CAUTION_BARE, bare_flange_pair, bare_valve
from .files import write_atomic
from .linelist_read import (COLUMNS, FORMULA_PREFIXES, HOURS_PER_YEAR, MAX_BYTES, MAX_CELLS, MAX_ROWS,
                            OPERATION_COLUMNS, OUTDOOR_SKY_VIEW_FRACTION, REQUIRED,
                            ParsedLine, RowError, demo_lines_path, read_line_list)
from .pipe_sizes import COPPER_WALL, nominal_pipe
from .transients import cool_down_time, warm_up_condensate
from .operation import (CAUTION_LINE_FREEZE, condensate_rate, line_temperature_profile, saturation_temperature,
                        tracing_duty)
from .materials import layer as material_layer, service_warnings
from .pipe import Layer, insulated_pipe
from .properties import dew_point
from .radiation import sky_temperature
from .regimes import describe_flags
from .units import from_si
from .validation import as_array

__all__ = ["COLUMNS", "OPERATION_COLUMNS", "OUTPUT_COLUMNS", "OUTDOOR_SKY_VIEW_FRACTION", "WARNING_DESIGN_AIR_ALL_YEAR",
           "RowError", "ParsedLine", "LineListResult", "read_line_list", "run_line_list", "write_results_csv",
           "demo_lines_path", "REQUIRED", "MAX_BYTES", "MAX_ROWS", "MAX_CELLS"]


# ----------------------------------------------------------------------------- computing
def _one_side(name: str, sign: float, doc: str) -> property:
    """A read-only property: ``max(sign * self.<name>, 0)`` per line."""
    return property(lambda self: np.maximum(sign * getattr(self, name), 0.0), doc=doc)


@dataclass(frozen=True)
class LineListResult:
    """Per-line results (arrays in file order, one entry per computed line), failed rows, settings.

    Temperatures [K], lengths and ``outer_diameter`` (of the pipe itself) [m], ``q_per_length``
    [W/m] and ``q_total`` (= q_per_length x equivalent_length + bare_fittings_heat) [W] at the design conditions;
    ``operating_hours`` [h/yr]; ``heat_kwh`` (lost > 0, gained < 0) and ``purchased_kwh`` [kWh/yr],
    ``cost`` (currency of the energy price), ``co2_kg`` [kg/yr]. ``dew_point`` is NaN where no
    humidity was given. ``touch_flag`` and ``condensation_flag`` are flags for review, not verdicts.
    ``notes``: warnings of the physics per line.
    """

    row: np.ndarray
    tag: tuple[str, ...]
    location: tuple[str, ...]
    layer_count: np.ndarray
    length: np.ndarray
    equivalent_length: np.ndarray
    outer_diameter: np.ndarray
    fluid_temperature: np.ndarray
    air_temperature: np.ndarray
    surface_temperature: np.ndarray
    dew_point: np.ndarray
    q_per_length: np.ndarray
    q_total: np.ndarray
    operating_hours: np.ndarray
    heat_kwh: np.ndarray
    purchased_kwh: np.ndarray
    cost: np.ndarray
    co2_kg: np.ndarray
    touch_flag: np.ndarray
    condensation_flag: np.ndarray
    outlet_temperature: np.ndarray         # NaN without mass_flow [K]; the freezing point where the water freezes
    freezing_position: np.ndarray          # where the water reaches 0 degC [m from the inlet]; NaN if it does not
    tracing_duty_per_length: np.ndarray    # NaN without maintain_temperature [W/m]
    tracing_duty: np.ndarray               # over the equivalent length [W]
    bare_fittings_heat: np.ndarray         # extra heat of bare valves and flange pairs, in q_total [W]
    condensate: np.ndarray                 # NaN without steam_pressure [kg/s]
    cool_down_time: np.ndarray             # NaN without cool_down_to: stopped line to that temperature [s]
    warm_up_condensate: np.ndarray         # NaN without warm_up_time: condensed heating the wall [kg]
    notes: tuple[str, ...]
    errors: tuple[RowError, ...] = ()
    settings: dict = field(default_factory=dict)

    def __len__(self) -> int:
        return len(self.tag)

    # heat on each side, positive numbers, 0 for a line on the other side: never netted across lines
    q_lost = _one_side("q_total", 1.0, "Heat lost at the design conditions by each line that loses heat [W].")
    q_gained = _one_side("q_total", -1.0, "Heat gained at the design conditions by each line that gains heat [W].")
    heat_lost_kwh = _one_side("heat_kwh", 1.0, "Annual heat lost by each line whose year is a loss [kWh/yr].")
    heat_gained_kwh = _one_side("heat_kwh", -1.0, "Annual heat gained by each line whose year is a gain [kWh/yr].")

    @property
    def totals(self) -> dict:
        """Sums over the computed lines. Heat is never netted across lines: ``q_lost`` / ``heat_lost_kwh`` sum the
        lines that lose heat (hot lines), ``q_gained`` / ``heat_gained_kwh`` those that gain it (cold lines), both
        positive [W], [kWh/yr]; ``lines_losing`` and ``lines_gaining`` count them (at the design conditions).
        Purchased energy, cost and CO2 are sums of per-line figures, each already on the right side.
        ``annual_basis`` says what the annual figures assume (see :attr:`warnings`)."""
        sums = {name: float(np.nansum(getattr(self, name))) for name in SUMMED}
        return {"lines": len(self), "rows_with_errors": len(self.errors), **sums,
                "lines_losing": int(np.sum(self.q_total > 0)), "lines_gaining": int(np.sum(self.q_total < 0)),
                "annual_basis": "weather bins" if self.settings.get("weather_bins") else ANNUAL_BASIS_DESIGN,
                "touch_flags": int(np.sum(self.touch_flag)), "condensation_flags": int(np.sum(self.condensation_flag))}

    @property
    def warnings(self) -> tuple[str, ...]:
        """Warnings on the whole result: :data:`WARNING_DESIGN_AIR_ALL_YEAR` when no weather bins were given."""
        return () if self.settings.get("weather_bins") or not len(self) else (WARNING_DESIGN_AIR_ALL_YEAR,)

    @property
    def cautions(self) -> tuple[str, ...]:
        """The cautions that apply: touch and condensation where any line is flagged."""
        return tuple(text for text, flags in ((CAUTION_TOUCH, self.touch_flag),
                                              (CAUTION_CONDENSATION, self.condensation_flag),
                                              (CAUTION_BARE, self.bare_fittings_heat != 0),
                                              (CAUTION_LINE_FREEZE, ~np.isnan(self.freezing_position)))
                     if np.any(flags))

    def rows(self) -> list[dict]:
        """One dict per computed line with SI values (None for a missing dew point), e.g. for JSON."""
        names = [n for n in self.__dataclass_fields__ if n not in ("errors", "settings")]
        values = [[v.item() if isinstance(v, np.generic) else v for v in getattr(self, n)] for n in names]
        return [{n: None if isinstance(v, float) and math.isnan(v) else v for n, v in zip(names, row)}
                for row in zip(*values)]


#: Fields of LineListResult summed in its totals (heat lost and gained apart).
SUMMED = ("length", "equivalent_length", "q_lost", "q_gained", "heat_lost_kwh", "heat_gained_kwh", "purchased_kwh",
           "cost", "co2_kg", "tracing_duty", "condensate", "bare_fittings_heat")

ANNUAL_BASIS_DESIGN = "design air for all operating hours"
#: Warning of every output of a line list computed without weather bins.
WARNING_DESIGN_AIR_ALL_YEAR = (
    "Warning: no weather bins were given, so the annual figures take each line's design air temperature and wind "
    "for every operating hour (8,760 h/yr unless operating_hours is given). For outdoor lines a cold design "
    "condition overstates the annual loss; give weather bins (CLI: --bins FILE.json) for annual energy.")


def _settings(energy_price, heating_efficiency, cooling_cop, co2_per_kwh, surface_limit, chunk_size, bins) -> dict:
    """The checked settings of :func:`run_line_list` (SI)."""
    if isinstance(chunk_size, bool) or not isinstance(chunk_size, (int, np.integer)) or chunk_size < 1:
        raise InputError(f"chunk_size must be a whole number of at least 1; got {chunk_size!r}", field="chunk_size",
                         rule="a whole number of at least 1", value=chunk_size)
    check_bins(bins)
    return {"energy_price": float(as_array("energy_price", energy_price, low=0.0)),
            "heating_efficiency": float(as_array("heating_efficiency", heating_efficiency, low=0.0, high=1.0,
                                                 low_inclusive=False)),
            "cooling_cop": float(as_array("cooling_cop", cooling_cop, low=0.0, low_inclusive=False)),
            "co2_per_kwh": float(as_array("co2_per_kwh", co2_per_kwh, unit="kg/kWh", low=0.0)),
            "surface_limit": float(as_array("surface_limit", surface_limit, unit="K", low=0.0, low_inclusive=False)),
            "weather_bins": bins is not None}


def _one_by_one_on_input_error(idx, compute, fail) -> None:
    """``compute(idx)``; if it raises InputError, ``compute`` each line alone and ``fail(i, exc)`` those that raise.

    Only input errors are caught: any other exception is a fault of the program and propagates.
    """
    try:
        compute(idx)
    except InputError:
        for i in idx:
            try:
                compute(np.array([i]))
            except InputError as exc:
                fail(int(i), exc)


class _Columns:
    """The parsed lines as SI arrays (one entry per line, NaN where a cell was not given)."""

    def __init__(self, lines: list[ParsedLine], bins: WeatherBins | None):
        self.lines, self.specs, self.n = lines, [p.spec for p in lines], len(lines)
        specs = self.specs
        self.d, self.tf, self.ta = (self.col(s.pipe_diameter() for s in specs),
                                    self.col(s.fluid_temperature for s in specs),
                                    self.col(s.air_temperature for s in specs))
        self.wind, self.eps, self.sky = (self.col(s.wind_speed for s in specs),
                                         self.col(s.jacket_emissivity for s in specs),
                                         self.col(s.sky_view_fraction for s in specs))
        self.outdoor = np.array([p.location == "outdoor" for p in lines], dtype=bool)
        given = self.col(p.operating_hours for p in lines)
        self.hours = np.where(np.isnan(given), HOURS_PER_YEAR if bins is None else bins.hours.sum(), given)
        self.count = np.array([len(s.layers) for s in specs], dtype=int)
        # lines solved together share their number of layers and the material of each (one k(T) per layer)
        kinds = [(len(s.layers), tuple(layer.material for layer in s.layers)) for s in specs]
        codes = {kind: i for i, kind in enumerate(dict.fromkeys(kinds))}
        self.group = np.array([codes[kind] for kind in kinds], dtype=int).reshape(self.n)
        self.length = self.col(s.length for s in specs)
        self.leq, self.rh = self.col(s.equivalent_length() for s in specs), self.col(s.relative_humidity for s in specs)
        self.operation = [p.operation or {} for p in lines]
        self.nps = self.col(s.nps for s in specs)
        self.bare_valves, self.bare_pairs = (self.col(s.bare_valves for s in specs),
                                             self.col(s.bare_flange_pairs for s in specs))
        self.pressure_class = self.col(s.pressure_class for s in specs)

    def col(self, values) -> np.ndarray:
        return np.array([np.nan if v is None else v for v in values], dtype=float).reshape(self.n)

    def given(self, name: str) -> np.ndarray:
        """An operation column (NaN where not given)."""
        return self.col(g.get(name) for g in self.operation)

    def layers(self, idx, extra_axis=True) -> list[Layer]:
        """The layers of lines ``idx`` (all of one :attr:`group`: the same number of layers and materials) as
        arrays over the lines; a layer of a library material takes its k(T)."""
        k = self.count[idx[0]]
        thick, cond = (np.array([[getattr(ly, a) for ly in self.specs[i].layers] for i in idx], dtype=float)
                       .reshape(idx.size, k) for a in ("thickness", "conductivity"))  # a material's: NaN
        if extra_axis:
            thick, cond = thick[:, :, None], cond[:, :, None]
        first = np.atleast_1d(idx)[0]
        return [Layer(thick[:, j], cond[:, j], name=f"layer {j + 1}") if spec.material is None
                else material_layer(thick[:, j], spec.material, layer_name=f"layer {j + 1}")
                for j, spec in enumerate(self.specs[first].layers)]

    def sky_of(self, air, idx):
        """The sky temperature a one-line call takes, so that a line's numbers do not depend on its group."""
        return np.where(self.sky[idx] > 0, sky_temperature(air), air)


def _design_and_year(c: _Columns, bins, chunk_size, report, errors) -> dict:
    """Heat flow, surface temperature, flags and annual energy [Wh/m] of every line; ``ok`` False for row errors.

    Lines with the same number of layers are solved ``chunk_size`` at a time (design condition in column 0,
    then one column per weather bin for outdoor lines).
    """
    n = c.n
    out = {"q": np.full(n, np.nan), "ts": np.full(n, np.nan), "energy": np.full(n, np.nan),
           "flags": np.zeros(n, dtype=np.int64), "ok": np.ones(n, dtype=bool), "extra": np.zeros(n),
           "extra_energy": np.zeros(n), "service": {}}

    def year(idx, per_condition):
        """Energy [Wh (per metre for a per-metre figure)] from the design column, or the weather bins."""
        return (per_condition[:, 0] * c.hours[idx] if bins is None else
                (per_condition[:, 1:] * bins.hours).sum(axis=1) * c.hours[idx] / bins.hours.sum())

    def solve(idx):
        air, wnd = c.ta[idx, None], c.wind[idx, None]
        if bins is not None:
            air = np.concatenate([air, np.where(c.outdoor[idx, None], bins.air_temperature, air)], axis=1)
            wnd = np.concatenate([wnd, np.where(c.outdoor[idx, None], bins.wind_speed, wnd)], axis=1)
        layers = c.layers(idx)
        r = insulated_pipe(c.d[idx, None], c.tf[idx, None], layers, air_temperature=air, wind_speed=wnd,
                           jacket_emissivity=c.eps[idx, None], sky_view_fraction=c.sky[idx, None],
                           sky_temperature=c.sky_of(air, (idx, None)), length=1.0)
        out["q"][idx], out["ts"][idx] = r.q_per_length[:, 0], r.surface_temperature[:, 0]
        out["flags"][idx] = np.bitwise_or.reduce(r.warnings.astype(np.int64), axis=1)
        for mask, text in service_warnings(layers, r):  # a library material beyond its service temperatures
            for i in idx[mask.any(axis=1)]:
                out["service"].setdefault(int(i), []).append(text)
        out["energy"][idx] = year(idx, r.q_per_length)
        bare = (c.bare_valves[idx] + c.bare_pairs[idx]) > 0
        if bare.any():  # bare valves and flange pairs: their extra heat in every condition
            sub = idx[bare]
            around = dict(air_temperature=air[bare], wind_speed=wnd[bare], sky_view_fraction=c.sky[sub, None],
                          sky_temperature=c.sky_of(air[bare], (sub, None)), jacket_emissivity=c.eps[sub, None],
                          pressure_class=c.pressure_class[sub, None], layers=c.layers(sub))
            extra = np.zeros(air[bare].shape)
            for count, item in ((c.bare_valves[sub], bare_valve), (c.bare_pairs[sub], bare_flange_pair)):
                if count.any():
                    f = item(c.nps[sub, None], c.tf[sub, None], **around)
                    extra = extra + count[:, None] * f.extra_heat
                    out["flags"][sub] |= np.bitwise_or.reduce(f.warnings.astype(np.int64), axis=1)
            out["extra"][sub], out["extra_energy"][sub] = extra[:, 0], year(sub, extra)

    def fail(i, exc):
        out["ok"][i] = False
        errors.append(RowError(c.lines[i].row, c.specs[i].tag, f"could not be computed: {exc}"))

    done = 0
    for g in np.unique(c.group):
        members = np.flatnonzero(c.group == g)
        k = c.count[members[0]]
        for start in range(0, members.size, chunk_size):
            idx = members[start:start + chunk_size]
            _one_by_one_on_input_error(idx, solve, fail)
            done += idx.size
            report(done / n, f"{k}-layer lines: {done} of {n}")
    if n == 0:
        report(1.0, "no lines to compute")
    return out


def _in_operation(c: _Columns, ok, q_total, notes) -> dict:
    """Outlet temperature and where the water freezes (``mass_flow``), tracing duty (``maintain_temperature`` at
    ``minimum_ambient``), condensate (``steam_pressure``) and dew point (``relative_humidity``); a line the physics
    refuses gets a note instead of the figure."""
    n = c.n
    out = {name: np.full(n, np.nan) for name in ("outlet", "frozen_at", "duty", "condensate", "t_sat", "dew")}
    flow, maintain, steam = c.given("mass_flow"), c.given("maintain_temperature"), c.given("steam_pressure")
    coldest = c.given("minimum_ambient")
    coldest = np.where(np.isnan(coldest), c.ta, coldest)
    fluid_pressure = c.col(g.get("fluid_pressure", 101325.0) for g in c.operation)
    fluid = [(g.get("fluid", "Water"), g.get("fluid_phase", "liquid")) for g in c.operation]

    def per_layer_count(idx, label, compute):
        for g in np.unique(c.group[idx]):
            _one_by_one_on_input_error(idx[c.group[idx] == g], compute,
                                       lambda i, exc: notes[i].append(f"{label} not computed: {exc}"))

    def outlet(i, name, phase):
        p = line_temperature_profile(c.d[i], c.tf[i], c.layers(i, extra_axis=False), mass_flow=flow[i],
                                     length=c.leq[i], air_temperature=c.ta[i], fluid=name,
                                     fluid_pressure=fluid_pressure[i], fluid_phase=phase, wind_speed=c.wind[i],
                                     jacket_emissivity=c.eps[i], sky_view_fraction=c.sky[i],
                                     sky_temperature=c.sky_of(c.ta[i], i))
        out["frozen_at"][i], out["outlet"][i] = p.freezing_position, p.outlet_temperature

    flowing = np.flatnonzero(ok & ~np.isnan(flow))
    for name, phase in sorted({fluid[i] for i in flowing}):
        per_layer_count(np.array([i for i in flowing if fluid[i] == (name, phase)]), "outlet temperature",
                        lambda i, name=name, phase=phase: outlet(i, name, phase))
    for i in np.flatnonzero(~np.isnan(out["frozen_at"])):
        notes[int(i)].append(f"the water reaches 0 degC {out['frozen_at'][i]:.1f} m from the inlet, before the "
                             f"outlet (outlet temperature shown: 0 degC)")

    def duty(i):
        out["duty"][i] = tracing_duty(c.d[i], maintain[i], c.layers(i, extra_axis=False), air_temperature=coldest[i],
                                      wind_speed=c.wind[i], jacket_emissivity=c.eps[i], sky_view_fraction=c.sky[i],
                                      sky_temperature=c.sky_of(coldest[i], i)).duty_per_length

    per_layer_count(np.flatnonzero(ok & ~np.isnan(maintain)), "tracing duty", duty)

    def saturated(i):
        out["condensate"][i] = condensate_rate(q_total[i], steam[i])
        out["t_sat"][i] = saturation_temperature(steam[i])

    _one_by_one_on_input_error(np.flatnonzero(ok & ~np.isnan(steam)), saturated,
                               lambda i, exc: notes[i].append(f"condensate not computed: {exc}"))
    for i in np.flatnonzero(np.abs(c.tf - out["t_sat"]) > 1.0):
        notes[int(i)].append(f"fluid temperature {c.tf[i] - 273.15:.1f} degC is not the saturation temperature "
                             f"{out['t_sat'][i] - 273.15:.1f} degC at steam_pressure: condensate from the loss as given")

    def dew(i):
        out["dew"][i] = dew_point(c.ta[i], c.rh[i])

    _one_by_one_on_input_error(np.flatnonzero(ok & ~np.isnan(c.rh)), dew,
                               lambda i, exc: notes[i].append(f"dew point not computed: {exc}"))
    return out


def _pipe_walls(c: _Columns) -> np.ndarray:
    """Each line's pipe wall [m]: the ``pipe_wall_thickness`` column (or a named size's wall), else its NPS and
    schedule's, else NaN."""
    wall = c.given("pipe_wall_thickness")
    for i in np.flatnonzero(np.isnan(wall)):
        spec = c.specs[i]
        if spec.nps is not None:
            wall[i] = nominal_pipe(spec.nps, spec.schedule).wall_thickness
    return wall


def _stops_and_starts(c: _Columns, ok, notes) -> dict:
    """Cool-down time of a stopped line to ``cool_down_to`` and the warm-up condensate of a steam line over
    ``warm_up_time`` from the design air (:mod:`convlib.transients`); a line without a known pipe wall, or one
    the physics refuses, gets a note instead."""
    n = c.n
    out = {"cool": np.full(n, np.nan), "warm": np.full(n, np.nan)}
    cool_to, warm_time, steam = c.given("cool_down_to"), c.given("warm_up_time"), c.given("steam_pressure")
    wanted = ok & (~np.isnan(cool_to) | ~np.isnan(warm_time))
    wall = _pipe_walls(c) if wanted.any() else np.full(n, np.nan)
    fluid_pressure = c.col(g.get("fluid_pressure", 101325.0) for g in c.operation)
    for i in np.flatnonzero(wanted & np.isnan(wall)):
        notes[int(i)].append("cool-down / warm-up not computed: give the pipe wall (nps, a size with a wall, or "
                             "pipe_wall_thickness)")
    exposure = lambda i: dict(air_temperature=c.ta[i], wind_speed=c.wind[i], jacket_emissivity=c.eps[i],  # noqa: E731
                              sky_view_fraction=c.sky[i], sky_temperature=c.sky_of(c.ta[i], i))

    def cool(i):
        given = c.operation[int(i[0])]
        r = cool_down_time(c.d[i], wall[i], c.tf[i], cool_to[i], c.layers(i, extra_axis=False),
                           fluid=given.get("fluid", "Water"), fluid_pressure=fluid_pressure[i], **exposure(i),
                           **(COPPER_WALL if given.get("wall_material") == "copper" else {}))
        out["cool"][i] = np.where(r.never_reaches, np.nan, r.time)
        for j in np.asarray(i)[np.atleast_1d(r.never_reaches)]:
            notes[int(j)].append(f"a stopped line settles before {cool_to[j] - 273.15:.1f} degC: no cool-down time")

    def warm(i):
        copper = c.operation[int(i[0])].get("wall_material") == "copper"
        r = warm_up_condensate(c.d[i], wall[i], steam[i], c.ta[i], warm_time[i], c.layers(i, extra_axis=False),
                               length=c.leq[i], **exposure(i), **(COPPER_WALL if copper else {}))
        out["warm"][i] = r.warm_up_condensate

    known = ok & ~np.isnan(wall)
    for label, compute, todo in (("cool-down time", cool, np.flatnonzero(known & ~np.isnan(cool_to))),
                                 ("warm-up condensate", warm, np.flatnonzero(known & ~np.isnan(warm_time)
                                                                             & ~np.isnan(steam)))):
        key = {int(i): (int(c.group[i]), c.operation[i].get("fluid", "Water"), c.operation[i].get("wall_material", ""))
               for i in todo}
        for group in sorted(set(key.values())):  # lines of one layer group and fluid at once
            _one_by_one_on_input_error(np.array([i for i in todo if key[int(i)] == group]), compute,
                                       lambda j, exc, label=label: notes[j].append(f"{label} not computed: {exc}"))
    for i in np.flatnonzero(ok & ~np.isnan(warm_time) & np.isnan(steam)):
        notes[int(i)].append("warm-up condensate not computed: warm_up_time needs steam_pressure")
    return out


def run_line_list(source, bins: WeatherBins | None = None, *, energy_price=0.0,
                  heating_efficiency=DEFAULT_HEATING_EFFICIENCY, cooling_cop=DEFAULT_COOLING_COP, co2_per_kwh=0.0,
                  surface_limit=TOUCH_LIMIT_METAL_JACKET, chunk_size: int = 5000, allow_unusual: bool = False,
                  progress: Callable[[float, str], None] | None = None, touch_limit=None) -> LineListResult:
    """Compute every line of a line list: surface temperature, heat flow, annual energy, flags.

    Lines with the same number of layers (and the same material in each, for layers given by material) are solved
    together, ``chunk_size`` at a time, in one
    :func:`convlib.pipe.insulated_pipe` call (design condition and weather bins on a second axis);
    each line's numbers equal those of a call for that line alone. A chunk the solver rejects
    (:class:`~convlib.errors.InputError`) is re-solved line by line, so that only the offending rows
    become errors; any other exception propagates.

    Parameters
    ----------
    source : path, file-like, or list of dict or LineSpec
        See :func:`read_line_list`.
    bins : WeatherBins, optional
        Weather for the annual figures of outdoor lines; default: each line's design condition
        for its ``operating_hours`` (8760 h unless given).
    energy_price, heating_efficiency, cooling_cop, co2_per_kwh : float
        Price per purchased kWh [currency/kWh]; seasonal efficiency of the heat source (0-1] and
        COP of the chiller (> 0); emission factor of the purchased energy [kg/kWh].
    surface_limit : float
        Surface temperature above which ``touch_flag`` is set [K]; default
        :data:`~convlib.design.TOUCH_LIMIT_METAL_JACKET`, a design default, not a rule. (``touch_limit``, its
        name in 0.2.0, is still read for one version with a ``DeprecationWarning``.)
    chunk_size : int
        Lines per solver call.
    allow_unusual : bool
        See :func:`read_line_list`.
    progress : callable, optional
        ``progress(fraction, text)`` after reading and after each chunk; fractions increase to 1.

    Returns
    -------
    LineListResult
    """
    if touch_limit is not None:
        warnings.warn("run_line_list(touch_limit=) is deprecated: use surface_limit=", DeprecationWarning, stacklevel=2)
        surface_limit = touch_limit
    settings = _settings(energy_price, heating_efficiency, cooling_cop, co2_per_kwh, surface_limit, chunk_size, bins)
    report = progress or (lambda fraction, text: None)
    lines, errors = read_line_list(source, allow_unusual=allow_unusual)
    c = _Columns(lines, bins)
    report(0.0, f"read {c.n} line(s), {len(errors)} row(s) with errors")
    solved = _design_and_year(c, bins, chunk_size, report, errors)
    ok, q, ts = solved["ok"], solved["q"], solved["ts"]
    keep = np.flatnonzero(ok)
    notes = {i: [] for i in keep}
    q_total = q * c.leq + solved["extra"]
    run = _in_operation(c, ok, q_total, notes)
    stops = _stops_and_starts(c, ok, notes)
    texts = {m: describe_flags(m) for m in np.unique(solved["flags"][keep])}
    heat = (solved["energy"] * c.leq + solved["extra_energy"]) / 1000.0
    # hot service (fluid above the design air): net loss / efficiency; cold service: net gain / COP
    purchased = np.where(c.tf >= c.ta, np.maximum(heat, 0.0) / settings["heating_efficiency"],
                         np.maximum(-heat, 0.0) / settings["cooling_cop"])
    return LineListResult(
        row=np.array([p.row for p in lines], dtype=int)[keep], tag=tuple(c.specs[i].tag for i in keep),
        location=tuple(lines[i].location for i in keep), layer_count=c.count[keep], length=c.length[keep],
        equivalent_length=c.leq[keep], outer_diameter=c.d[keep], fluid_temperature=c.tf[keep],
        air_temperature=c.ta[keep], surface_temperature=ts[keep], dew_point=run["dew"][keep],
        q_per_length=q[keep], q_total=q_total[keep], operating_hours=c.hours[keep], heat_kwh=heat[keep],
        purchased_kwh=purchased[keep], cost=(purchased * settings["energy_price"])[keep],
        co2_kg=(purchased * settings["co2_per_kwh"])[keep], touch_flag=(ts > settings["surface_limit"])[keep],
        condensation_flag=(ts < run["dew"])[keep], outlet_temperature=run["outlet"][keep],
        freezing_position=run["frozen_at"][keep], tracing_duty_per_length=run["duty"][keep],
        tracing_duty=(run["duty"] * c.leq)[keep], condensate=run["condensate"][keep],
        bare_fittings_heat=solved["extra"][keep], cool_down_time=stops["cool"][keep],
        warm_up_condensate=stops["warm"][keep],
        notes=tuple("; ".join(texts[solved["flags"][i]] + solved["service"].get(int(i), []) + notes[i]) for i in keep),
        errors=tuple(sorted(errors, key=lambda e: e.row)), settings=settings)


# writing the results: convlib.linelist_write (its names are importable from here)
from .linelist_write import OUTPUT_COLUMNS, write_results_csv  # noqa: E402
