r"""Thermal surveys: from measured jacket temperatures to heat flow now, effective conductivity and condition.

A surveyed line gives its outer (jacket) temperature :math:`T_s`, measured with the air temperature, wind and the
jacket's emissivity at the time of the survey. The outer exchange at that known temperature
(:func:`convlib.surface.bare_surface` on the outer diameter) is the heat flow now, :math:`q'`. The same heat crosses
the insulation, so its effective (constant-equivalent) conductivity follows from the cylindrical wall:

.. math::
    q' = \frac{2\pi k_{eff} (T_f - T_s)}{\ln(r_o/r_i)}
    \quad\Rightarrow\quad
    k_{eff} = \frac{q' \ln(r_o/r_i)}{2\pi (T_f - T_s)}

This is the exact inverse of :func:`convlib.pipe.insulated_pipe` with one constant-k layer (no wall or film
resistance): solving ``insulated_pipe`` for :math:`T_s` at this :math:`k_{eff}` returns the measured :math:`T_s`
to the solver's tolerance (checked in the tests by a bracketed root over k on the forward solve). No iteration is
needed because the outer exchange at the *measured* temperature is known directly.

Condition classes (our own names; thresholds on :math:`k_{eff}/k_{design}`, common practice, no source -- set your
own with ``thresholds``):

=====================  ====================================================================
``as designed``        ratio <= 1.3
``degraded``           1.3 < ratio <= 2 (settled, aged, gaps at joints)
``wet or damaged``     2 < ratio <= 6
``missing``            ratio > 6 (or the jacket is within the thermometer's reach of the fluid)
``unresolved``         the jacket is within 2x the thermometer uncertainty of the air: the
                       measurement cannot tell (re-survey at a larger temperature difference)
=====================  ====================================================================

Measurement uncertainty: the thermometer bound :math:`\pm a` (surface and air) and the emissivity range are treated
as rectangular distributions (a stated bound, GUM type B) and sampled. Each line draws from its own generator seeded
by ``SeedSequence(seed, spawn_key=(line_index,))`` -- the child that ``SeedSequence(seed).spawn`` gives for that
index -- so a line's samples do not depend on how the list is split into chunks.

Cautions: hot jackets burn; cold lines with wet insulation drip and freeze; old plants may have asbestos-era
insulation, which needs a survey by a qualified person before anyone cuts or removes it. Local codes and licensed
practice govern.
"""
from __future__ import annotations

import csv
import io
from dataclasses import dataclass, fields
from pathlib import Path
from typing import NamedTuple

import numpy as np

from .design import WeatherBins
from .errors import InputError
from .pipe import Layer, insulated_pipe
from .pipe_sizes import nominal_pipe
from .surface import bare_surface
from .validation import as_array

__all__ = ["SurveyLines", "RowError", "Measurement", "SurveyResult", "read_survey", "effective_conductivity",
           "condition_class", "run_survey", "line_weather", "annual_heat_per_metre", "CONDITIONS", "CONDITION_THRESHOLDS", "CAUTIONS", "demo_survey_path",
           "line_samples"]

CONDITIONS = ("as designed", "degraded", "wet or damaged", "missing", "unresolved")
#: Upper limits of k_eff / k_design for the first three classes. Common practice, no source.
CONDITION_THRESHOLDS = (1.3, 2.0, 6.0)
#: Emissivity of a bare (uninsulated) length of oxidized steel pipe. Common practice, no source.
BARE_EMISSIVITY = 0.8
#: Bounds of the effective conductivity used in annual sums [W/m/K]: below, "better than any insulation";
#: above, effectively bare.
K_EFFECTIVE_BOUNDS = (0.005, 20.0)

CAUTIONS = (
    "Hot surfaces: jackets and bare lengths of hot lines burn on contact; survey with gloves and keep clear of "
    "bare flanges and valves.",
    "Condensation: wet insulation on cold lines drips, corrodes the pipe beneath and may freeze; repair the vapour "
    "retarder, not only the insulation.",
    "Old plants: insulation installed before the asbestos bans may contain asbestos; have it surveyed by a "
    "qualified person before any cutting, repair or removal.",
    "Local codes and licensed practice govern; these figures support, not replace, an engineer's judgement.",
)


def demo_survey_path():
    """The invented thermal survey of the Fernhill demo site shipped with the package."""
    from importlib import resources

    return resources.files("convlib").joinpath("data/demo_survey.csv")


class RowError(NamedTuple):
    """A line not computed: index (row in the input, from 0), tag, reason."""

    index: int
    tag: str
    reason: str


@dataclass(frozen=True)
class SurveyLines:
    """Surveyed lines as arrays (SI, kelvin), one element per line; ``index`` is the line's row in the input."""

    index: np.ndarray
    tag: np.ndarray
    area: np.ndarray
    location: np.ndarray                 # "indoor" / "outdoor"
    pipe_outer_diameter: np.ndarray
    fluid_temperature: np.ndarray
    insulation_thickness: np.ndarray
    design_conductivity: np.ndarray
    jacket_emissivity: np.ndarray
    surface_temperature: np.ndarray
    air_temperature: np.ndarray
    wind_speed: np.ndarray
    length: np.ndarray
    bare_length: np.ndarray
    operating_hours: np.ndarray

    def __len__(self) -> int:
        return int(self.index.size)

    def take(self, which) -> "SurveyLines":
        return SurveyLines(**{f.name: getattr(self, f.name)[which] for f in fields(self)})


# name in the file -> (field, unit conversion to SI, default or None if required)
_COLUMNS = {
    "tag": ("tag", None, None),
    "area": ("area", None, ""),
    "location": ("location", None, "outdoor"),
    "nps": ("nps", None, ""),
    "schedule": ("schedule", None, "40"),
    "outer_diameter[mm]": ("pipe_outer_diameter", lambda v: v / 1000.0, ""),
    "fluid_temperature[degC]": ("fluid_temperature", lambda v: v + 273.15, None),
    "insulation_thickness[mm]": ("insulation_thickness", lambda v: v / 1000.0, None),
    "design_conductivity[W/m/K]": ("design_conductivity", lambda v: v, None),
    "jacket_emissivity": ("jacket_emissivity", lambda v: v, 0.9),
    "surface_temperature[degC]": ("surface_temperature", lambda v: v + 273.15, None),
    "air_temperature[degC]": ("air_temperature", lambda v: v + 273.15, None),
    "wind_speed[m/s]": ("wind_speed", lambda v: v, 0.0),
    "length[m]": ("length", lambda v: v, 1.0),
    "bare_length[m]": ("bare_length", lambda v: v, 0.0),
    "operating_hours[h]": ("operating_hours", lambda v: v, 8760.0),
}
#: Per-row checks: field -> (low, high, low_inclusive). The upper bounds are those a study accepts
#: (:data:`convlib.study.INPUTS`: 10 m, 2000 K, air 400 K, 1 m of insulation, k 5 W/m/K, wind 60 m/s) and 100 km of
#: line: beyond them a value is a typing error, and the physics would overflow rather than answer.
_RULES = {
    "pipe_outer_diameter": (0.0, 10.0, False), "fluid_temperature": (0.0, 2000.0, False),
    "insulation_thickness": (0.0, 1.0, False), "design_conductivity": (0.0, 5.0, False),
    "jacket_emissivity": (0.0, 1.0, False), "surface_temperature": (0.0, 2000.0, False),
    "air_temperature": (0.0, 400.0, False), "wind_speed": (0.0, 60.0, True), "length": (0.0, 1e5, False),
    "bare_length": (0.0, 1e5, True), "operating_hours": (0.0, 8784.0, True),
}


def _columns_of(source) -> dict:
    """Columns (name -> list of cells) from a CSV path / text / stream, a Parquet path, or a dict of columns."""
    if isinstance(source, dict):
        return {k: list(v) for k, v in source.items()}
    if isinstance(source, (str, Path)) and str(source).lower().endswith((".parquet", ".pq")):
        import pyarrow.parquet as pq

        return pq.read_table(str(source)).to_pydict()
    if hasattr(source, "read"):
        text = source.read()
    elif isinstance(source, str) and "\n" in source:
        text = source
    else:
        text = (source.read_text() if hasattr(source, "read_text") else Path(source).read_text(encoding="utf-8"))
    rows = list(csv.reader(io.StringIO(text)))
    rows = [r for r in rows if r and not r[0].lstrip().startswith("#")]
    if not rows:
        raise InputError("the survey file is empty", field="survey file", rule="a header and rows", value=None)
    header = [h.strip() for h in rows[0]]
    return {h: [r[j].strip() if j < len(r) else "" for r in rows[1:]] for j, h in enumerate(header)}


def read_survey(source, first_index: int = 0) -> tuple[SurveyLines, list[RowError]]:
    """Read surveyed lines from CSV or Parquet (or a dict of columns); bad rows are kept as :class:`RowError`.

    Columns: ``tag``, ``nps`` (with ``schedule``) or ``outer_diameter[mm]``, ``fluid_temperature[degC]``,
    ``insulation_thickness[mm]``, ``design_conductivity[W/m/K]``, ``surface_temperature[degC]`` (measured jacket),
    ``air_temperature[degC]`` (at the survey); optional ``area``, ``location`` (``indoor``: the surveyed air and
    air speed hold all year; ``outdoor``, the default: the site weather), ``jacket_emissivity`` (0.9), ``wind_speed[m/s]``
    (0), ``length[m]`` (1), ``bare_length[m]`` (0), ``operating_hours[h]`` (8760). ``index`` numbers the lines from
    ``first_index`` in file order (errors included), so chunks of a long list keep their global numbers.

    Examples
    --------
    >>> lines, errors = read_survey(demo_survey_path())
    >>> len(lines) > 5, errors
    (True, [])
    """
    cols = _columns_of(source)
    unknown = [c for c in cols if c not in _COLUMNS]
    if unknown:
        raise InputError(f"unknown survey column(s) {', '.join(unknown)}; known: {', '.join(_COLUMNS)}",
                         field="survey columns", rule="known column names", value=unknown)
    missing = [c for c, (_, _, default) in _COLUMNS.items() if default is None and c not in cols]
    if missing:
        raise InputError(f"survey file lacks required column(s) {', '.join(missing)}", field="survey columns",
                         rule="all required columns", value=missing)
    n = len(next(iter(cols.values()))) if cols else 0
    cols = {c: cols.get(c, [None] * n) for c in _COLUMNS}  # absent optional columns: blank cells (once)
    values = {f: [] for f, _, _ in _COLUMNS.values()}
    good, errors = [], []
    for i in range(n):  # file edge: one pass over the cells
        row, reason = {}, None
        for column, (name, convert, default) in _COLUMNS.items():
            cell = cols[column][i]
            blank = cell is None or (isinstance(cell, str) and cell.strip() == "") or \
                (isinstance(cell, float) and np.isnan(cell))
            if convert is None:
                row[name] = default if blank else str(cell).strip()
                if blank and default is None:
                    reason = f"{column} is empty"
                continue
            if blank:
                if default is None:
                    reason = reason or f"{column} is empty"
                row[name] = default if default != "" else None
                continue
            try:
                row[name] = convert(float(cell))
            except (TypeError, ValueError):
                reason = reason or f"{column}: {cell!r} is not a number"
        if reason is None:
            try:
                if row["pipe_outer_diameter"] is None:
                    if not row["nps"]:
                        raise InputError("give nps or outer_diameter[mm]", field="nps", rule="given", value=None)
                    row["pipe_outer_diameter"] = nominal_pipe(float(row["nps"]), row["schedule"]).outer_diameter
                for name, (low, high, inclusive) in _RULES.items():
                    as_array(name, row[name], low=low, high=high, low_inclusive=inclusive)
                if row["location"].lower() not in ("indoor", "outdoor"):
                    raise InputError(f"location {row['location']!r}: write indoor or outdoor", field="location",
                                     rule="indoor or outdoor", value=row["location"])
                if row["bare_length"] > row["length"]:
                    raise InputError(f"bare_length {row['bare_length']:g} m exceeds length {row['length']:g} m",
                                     field="bare_length", rule="at most length", value=row["bare_length"])
                hot = row["fluid_temperature"] > row["air_temperature"]
                ts, tf, ta = row["surface_temperature"], row["fluid_temperature"], row["air_temperature"]
                if (hot and not ta <= ts < tf) or (not hot and not tf < ts <= ta):
                    raise InputError(f"surface_temperature {ts - 273.15:.1f} degC must lie between the air "
                                     f"({ta - 273.15:.1f}) and the fluid ({tf - 273.15:.1f}) temperatures",
                                     field="surface_temperature", rule="between air and fluid temperature",
                                     value=ts)
            except (InputError, ValueError) as err:
                reason = str(err)
        if reason is not None:
            errors.append(RowError(first_index + i, str(row.get("tag") or f"row {i + 2}"), reason))
            continue
        good.append(first_index + i)
        for name in values:
            values[name].append(row.get(name))
    arrays = {name: np.asarray(v, dtype=float) for name, v in values.items()
              if name not in ("tag", "area", "location", "nps", "schedule")}
    return SurveyLines(index=np.asarray(good, dtype=np.int64), tag=np.asarray(values["tag"], dtype=object),
                       area=np.asarray(values["area"], dtype=object),
                       location=np.asarray([v.lower() for v in values["location"]], dtype=object),
                       **{f.name: arrays[f.name] for f in fields(SurveyLines)
                          if f.name not in ("index", "tag", "area", "location")}), errors


def effective_conductivity(pipe_outer_diameter, fluid_temperature, insulation_thickness, surface_temperature, *,
                           jacket_emissivity=0.9, solar_absorptivity=None, convection_coefficient=None,
                           surroundings=None, air_temperature=None, wind_speed=None, surroundings_temperature=None,
                           sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None):
    """Effective conductivity of the insulation from a measured jacket temperature, and the heat flow now.

    Parameters
    ----------
    pipe_outer_diameter, insulation_thickness : numeric
        [m]
    fluid_temperature, surface_temperature : numeric
        [K]; the surface between air and fluid.
    jacket_emissivity, solar_absorptivity, convection_coefficient : numeric
        Of the jacket at the survey, as in :func:`convlib.surface.bare_surface`.
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings at the survey (:class:`convlib.surroundings.Surroundings`), or its fields as keywords.

    Returns
    -------
    (k_effective [W/m/K], q_per_length [W/m])
        ``k_effective`` is NaN where heat flow and temperature difference disagree in sign (the surface reads
        beyond the air temperature).

    Examples
    --------
    >>> r = insulated_pipe(0.1143, 453.15, [Layer(0.05, 0.045)], air_temperature=293.15, jacket_emissivity=0.1)
    >>> k, q = effective_conductivity(0.1143, 453.15, 0.05, r.surface_temperature, air_temperature=293.15,
    ...                               jacket_emissivity=0.1)
    >>> round(float(k), 5), round(float(q), 1)
    (0.045, 63.1)
    """
    d = as_array("pipe_outer_diameter", pipe_outer_diameter, unit="m", low=0.0, low_inclusive=False)
    t = as_array("insulation_thickness", insulation_thickness, unit="m", low=0.0, low_inclusive=False)
    tf = as_array("fluid_temperature", fluid_temperature, unit="K", low=0.0, low_inclusive=False)
    ts = as_array("surface_temperature", surface_temperature, unit="K", low=0.0, low_inclusive=False)
    outer = d + 2.0 * t
    q = bare_surface("horizontal_cylinder", surface_temperature=ts, diameter=outer, length=1.0,
                     emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                     convection_coefficient=convection_coefficient, surroundings=surroundings,
                     air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance,
                     pressure=pressure).q_per_length
    drop = tf - ts
    with np.errstate(divide="ignore", invalid="ignore"):
        k = q * np.log(outer / d) / (2.0 * np.pi * drop)
    k = np.where((k > 0) & np.isfinite(k), k, np.where(drop * q > 0, np.inf, np.nan))
    return k, np.broadcast_to(q, k.shape).copy()


def condition_class(ratio, resolvable=True, thresholds=CONDITION_THRESHOLDS) -> np.ndarray:
    """Condition code per line (index into :data:`CONDITIONS`) from k_eff / k_design.

    Examples
    --------
    >>> [CONDITIONS[c] for c in condition_class([1.0, 1.5, 3.0, 50.0, np.inf, 1.0], [1, 1, 1, 1, 1, 0])]
    ['as designed', 'degraded', 'wet or damaged', 'missing', 'missing', 'unresolved']
    """
    r = np.asarray(ratio, dtype=float)
    code = np.searchsorted(np.asarray(thresholds, dtype=float), np.where(np.isnan(r), np.inf, r), side="left")
    return np.where(np.asarray(resolvable, dtype=bool) & ~np.isnan(r), code, len(CONDITIONS) - 1).astype(np.int64)


@dataclass(frozen=True)
class Measurement:
    """Uncertainty of the survey and the sampling: thermometer bound [K] (surface and air), emissivity bound [-]."""

    thermometer: float = 1.0
    emissivity: float = 0.05
    samples: int = 200
    seed: int = 20261203

    def __post_init__(self):
        as_array("thermometer", self.thermometer, unit="K", low=0.0)
        as_array("emissivity uncertainty", self.emissivity, low=0.0, high=0.5)
        as_array("samples", self.samples, low=1.0)


def line_samples(index, measurement: Measurement) -> np.ndarray:
    """Uniform(-1, 1) draws per line: array (n_lines, 3, samples) for surface, air and emissivity.

    Line ``i`` draws from ``Generator(PCG64(SeedSequence(seed, spawn_key=(i,))))``: independent of chunking.
    """
    s = int(measurement.samples)
    out = np.empty((len(index), 3, s))
    for j, i in enumerate(np.asarray(index, dtype=np.int64)):  # one generator per line; the physics is vectorized
        rng = np.random.Generator(np.random.PCG64(np.random.SeedSequence(measurement.seed, spawn_key=(int(i),))))
        out[j] = rng.uniform(-1.0, 1.0, (3, s))
    return out


@dataclass(frozen=True)
class SurveyResult:
    """Per line (first axis); ``*_samples`` carry a last axis of samples."""

    lines: SurveyLines
    hot: np.ndarray                    # bool: fluid above the air at the survey
    q_now: np.ndarray                  # heat flow now at survey conditions, whole line incl. bare length [W]
    q_design: np.ndarray               # the same line as designed at survey conditions [W]
    k_effective: np.ndarray            # [W/m/K] from the measured values (inf: no insulating effect)
    ratio: np.ndarray                  # k_effective / design_conductivity
    condition: np.ndarray              # code into CONDITIONS
    k_samples: np.ndarray              # (n, S) effective conductivity per sample, clipped to K_EFFECTIVE_BOUNDS
    emissivity_samples: np.ndarray     # (n, S)
    annual_now_samples: np.ndarray     # (n, S) heat per year now at site weather [kWh] (signed: < 0 a gain)
    annual_design: np.ndarray          # (n,) heat per year as designed [kWh]
    annual_bare_per_m: np.ndarray      # (n,) per metre of bare pipe [kWh/m]
    annual_now_insulated_per_m: np.ndarray  # (n, S) per metre of the insulated part now [kWh/m]

    @property
    def condition_names(self) -> np.ndarray:
        return np.asarray(CONDITIONS, dtype=object)[self.condition]

    @property
    def annual_excess_samples(self) -> np.ndarray:
        """(n, S) heat per year beyond design [kWh], positive = more loss (hot) or more gain (cold)."""
        sign = np.where(self.hot, 1.0, -1.0)[:, None]
        return sign * (self.annual_now_samples - self.annual_design[:, None])


def line_weather(lines: SurveyLines, bins: WeatherBins):
    """Air temperature, wind and hours per line and bin, arrays (n_lines, n_bins).

    Outdoor lines see the site weather; indoor lines their surveyed air temperature and air speed all year. The
    hours of every line add up to its operating hours.
    """
    indoor = np.asarray([str(v).strip().lower() == "indoor" for v in lines.location], dtype=bool)[:, None]
    hours = bins.hours[None, :] * (lines.operating_hours / max(float(bins.hours.sum()), 1e-300))[:, None]
    air = np.where(indoor, lines.air_temperature[:, None], bins.air_temperature[None, :])
    wind = np.where(indoor, lines.wind_speed[:, None], bins.wind_speed[None, :])
    return air, wind, hours


def annual_heat_per_metre(pipe_outer_diameter, fluid_temperature, layers, weather, *, jacket_emissivity):
    """Heat per metre and year [kWh/m], signed: a solve over the last axis of ``weather`` = (air, wind, hours).

    ``pipe_outer_diameter``, ``fluid_temperature`` and ``jacket_emissivity`` have the leading axes; the weather arrays
    those axes (or 1) plus the bins; layer arrays carry a trailing bin axis of 1.
    """
    air, wind, hours = weather
    r = insulated_pipe(np.asarray(pipe_outer_diameter)[..., None], np.asarray(fluid_temperature)[..., None], layers,
                       air_temperature=air, wind_speed=wind, length=1.0,
                       jacket_emissivity=np.asarray(jacket_emissivity)[..., None])
    return (r.q_per_length * hours).sum(axis=-1) / 1000.0


def run_survey(lines: SurveyLines, bins: WeatherBins, measurement: Measurement = Measurement()) -> SurveyResult:
    """Heat flow now and as designed, effective conductivity, condition and annual excess with its uncertainty.

    Every step is vectorized over lines x samples (x weather bins). ``bins`` are the site weather for the year
    (outdoor lines; indoor lines keep their surveyed air, :func:`line_weather`); each line's hours are scaled to its
    ``operating_hours``.

    Examples
    --------
    >>> from convlib.weather import demo_weather_path, read_epw, to_bins
    >>> lines, _ = read_survey(demo_survey_path())
    >>> r = run_survey(lines, to_bins(read_epw(demo_weather_path()), 5.0, (0, 3)), Measurement(samples=20))
    >>> sorted(set(r.condition_names)) <= sorted(CONDITIONS)
    True
    """
    n = len(lines)
    d, t, tf = lines.pipe_outer_diameter, lines.insulation_thickness, lines.fluid_temperature
    ta, ts, wind, eps = lines.air_temperature, lines.surface_temperature, lines.wind_speed, lines.jacket_emissivity
    insulated_length = lines.length - lines.bare_length
    hot = tf > ta
    k_nominal, q_ins = effective_conductivity(d, tf, t, ts, air_temperature=ta, jacket_emissivity=eps,
                                              wind_speed=wind)
    bare_now = bare_surface("horizontal_cylinder", surface_temperature=tf, air_temperature=ta, diameter=d, length=1.0,
                            wind_speed=wind, emissivity=BARE_EMISSIVITY).q_per_length
    design = insulated_pipe(d, tf, [Layer(t, lines.design_conductivity)], air_temperature=ta, wind_speed=wind,
                            jacket_emissivity=eps).q_per_length
    q_now = q_ins * insulated_length + bare_now * lines.bare_length
    ratio = k_nominal / lines.design_conductivity
    resolvable = np.abs(ts - ta) > 2.0 * measurement.thermometer
    condition = condition_class(ratio, resolvable)

    # ---- samples: (n, S)
    u = line_samples(lines.index, measurement)
    a = float(measurement.thermometer)
    ts_s = ts[:, None] + a * u[:, 0]
    ta_s = ta[:, None] + a * u[:, 1]
    eps_s = np.clip(eps[:, None] + float(measurement.emissivity) * u[:, 2], 0.02, 1.0)
    # a sampled surface on the far side of the sampled air, or at the fluid: no solvable k -> the bounds below
    ts_s = np.where(hot[:, None], np.minimum(ts_s, tf[:, None] - 1e-3), np.maximum(ts_s, tf[:, None] + 1e-3))
    k_s, _ = effective_conductivity(d[:, None], tf[:, None], t[:, None], ts_s, air_temperature=ta_s,
                                    jacket_emissivity=eps_s, wind_speed=wind[:, None])
    k_s = np.clip(np.where(np.isnan(k_s), K_EFFECTIVE_BOUNDS[0], k_s), *K_EFFECTIVE_BOUNDS)

    weather = line_weather(lines, bins)
    with_samples = tuple(w[:, None, :] for w in weather)
    per_m_now = annual_heat_per_metre(d[:, None], tf[:, None], [Layer(t[:, None, None], k_s[..., None])],
                                      with_samples, jacket_emissivity=eps_s)
    per_m_design = annual_heat_per_metre(d, tf, [Layer(t[:, None], lines.design_conductivity[:, None])], weather,
                                         jacket_emissivity=eps)
    per_m_bare = annual_heat_per_metre(d, tf, [], weather, jacket_emissivity=np.full(n, BARE_EMISSIVITY))
    annual_now = per_m_now * insulated_length[:, None] + (per_m_bare * lines.bare_length)[:, None]
    return SurveyResult(lines=lines, hot=hot, q_now=q_now, q_design=design * lines.length, k_effective=k_nominal,
                        ratio=ratio, condition=condition, k_samples=k_s, emissivity_samples=eps_s,
                        annual_now_samples=annual_now, annual_design=per_m_design * lines.length,
                        annual_bare_per_m=per_m_bare, annual_now_insulated_per_m=per_m_now)
