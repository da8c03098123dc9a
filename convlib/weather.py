r"""Hourly site weather from EPW files: hour-by-hour arrays, weather bins, freezing and condensation hours.

The EPW format (EnergyPlus weather, described in the EnergyPlus *Auxiliary Programs* manual, chapter "Weather
Converter Program", section "EnergyPlus Weather File (EPW) Data Dictionary") is a text file of 8 header lines
(LOCATION, DESIGN CONDITIONS, TYPICAL/EXTREME PERIODS, GROUND TEMPERATURES, HOLIDAYS/DAYLIGHT SAVINGS,
COMMENTS 1, COMMENTS 2, DATA PERIODS) followed by one comma-separated row per hour. The fields read here,
numbered from 1 as in the manual, with the manual's "missing" codes:

====  ===============================================  ======  =========
 no.  field                                            unit    missing
====  ===============================================  ======  =========
 1-4  year, month, day, hour (1-24: the hour ending)   -
   7  dry bulb temperature                             degC    >= 99.9
   8  dew point temperature                            degC    >= 99.9
   9  relative humidity                                %       999
  10  atmospheric station pressure                     Pa      999999
  13  horizontal infrared radiation intensity (sky)    Wh/m2   >= 9999
  22  wind speed                                       m/s     999
====  ===============================================  ======  =========

Missing hours of dry bulb, relative humidity, pressure and wind are filled by linear interpolation in time
(their count is kept in :attr:`HourlyWeather.filled`); a file with none valid raises
:class:`convlib.InputError`. Missing infrared leaves NaN (the sky temperature then falls back to a model).

The effective sky temperature from the horizontal infrared intensity :math:`I` (W/m2 over the hour) is
:math:`T_{sky} = (I/\sigma)^{1/4}`, as EnergyPlus uses it.
"""
from __future__ import annotations

import io
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path

import numpy as np

from .design import WeatherBins
from .errors import InputError
from .radiation import STEFAN_BOLTZMANN

__all__ = ["HourlyWeather", "read_epw", "demo_weather_path", "to_bins", "hours_below", "condensation_hours",
           "synthetic_epw_text", "EPW_FIELDS", "jacket_condensation_hours",
           "insulated_pipe_by_hour", "TracingEnergy", "tracing_energy"]

#: 0-based column of each field read, and the value at or above which the manual marks it missing.
EPW_FIELDS = {
    "dry_bulb": (6, 99.9),
    "dew_point": (7, 99.9),
    "relative_humidity": (8, 999.0),
    "pressure": (9, 999999.0),
    "horizontal_infrared": (12, 9999.0),
    "wind_speed": (21, 999.0),
}
_HEADER_LINES = 8
_DEMO_FILE = "data/demo_weather.epw"


@dataclass(frozen=True)
class HourlyWeather:
    """One row per hour of a weather file, SI units; arrays of length ``n_hours``."""

    month: np.ndarray
    day: np.ndarray
    hour: np.ndarray                    # 1-24, the hour ending
    air_temperature: np.ndarray         # [K]
    dew_point: np.ndarray               # [K] (NaN where missing)
    relative_humidity: np.ndarray       # 0-1
    pressure: np.ndarray                # [Pa]
    horizontal_infrared: np.ndarray     # [W/m2] mean over the hour (NaN where missing)
    wind_speed: np.ndarray              # [m/s]
    location: dict = field(default_factory=dict)
    filled: dict = field(default_factory=dict)   # field -> number of missing hours filled by interpolation

    def __len__(self) -> int:
        return int(self.air_temperature.size)

    @property
    def sky_temperature(self) -> np.ndarray:
        """Effective sky temperature [K] from the infrared intensity, NaN where it is missing."""
        return (self.horizontal_infrared / STEFAN_BOLTZMANN) ** 0.25


def demo_weather_path():
    """The invented hourly weather file of the demo site (Fernhill, invented)."""
    return resources.files("convlib").joinpath(_DEMO_FILE)


def _fill(name: str, values: np.ndarray, missing: np.ndarray, filled: dict) -> np.ndarray:
    if missing.all():
        raise InputError(f"EPW file: every hour of {name} is missing", field=name, rule="at least one valid hour",
                         value=None)
    if missing.any():
        t = np.arange(values.size)
        values = values.copy()
        values[missing] = np.interp(t[missing], t[~missing], values[~missing])
    filled[name] = int(missing.sum())
    return values


def read_epw(source) -> HourlyWeather:
    """Read an EPW file (path, text stream, or the text itself when it contains newlines).

    Examples
    --------
    >>> w = read_epw(demo_weather_path())
    >>> len(w), w.location["city"]
    (8760, 'Fernhill (invented)')
    """
    if hasattr(source, "read"):
        text = source.read()
    elif isinstance(source, str) and "\n" in source:
        text = source
    else:
        text = Path(str(source)).read_text(encoding="utf-8", errors="replace") if not hasattr(source, "read_text") \
            else source.read_text(encoding="utf-8", errors="replace")
    lines = text.splitlines()
    if len(lines) <= _HEADER_LINES or not lines[0].upper().startswith("LOCATION"):
        raise InputError("not an EPW file: it must start with 8 header lines, the first 'LOCATION,...', then hourly "
                         "rows", field="weather file", rule="EPW format", value=lines[0][:60] if lines else "")
    head = [c.strip() for c in lines[0].split(",")]
    location = {"city": head[1] if len(head) > 1 else "", "region": head[2] if len(head) > 2 else "",
                "country": head[3] if len(head) > 3 else ""}
    for key, idx in (("latitude", 6), ("longitude", 7), ("time_zone", 8), ("elevation", 9)):
        try:
            location[key] = float(head[idx])
        except (IndexError, ValueError):
            location[key] = float("nan")
    rows = [ln for ln in lines[_HEADER_LINES:] if ln.strip()]
    # only the numeric columns we need are converted; field 6 (flags) is text
    wanted = [0, 1, 2, 3] + [col for col, _ in EPW_FIELDS.values()]
    try:
        table = np.genfromtxt(io.StringIO("\n".join(rows)), delimiter=",", usecols=wanted, dtype=float,
                              invalid_raise=True, ndmin=2)
    except ValueError as err:
        raise InputError(f"EPW file: hourly rows must have at least 22 comma-separated fields ({err})",
                         field="weather file", rule="EPW hourly rows of 35 fields", value=None) from None
    col = {name: table[:, 4 + k] for k, name in enumerate(EPW_FIELDS)}
    missing = {name: ~np.isfinite(col[name]) | (col[name] >= EPW_FIELDS[name][1]) for name in EPW_FIELDS}
    filled: dict = {}
    dry = _fill("dry_bulb", col["dry_bulb"], missing["dry_bulb"], filled)
    rh = _fill("relative_humidity", col["relative_humidity"], missing["relative_humidity"], filled)
    pressure = _fill("pressure", col["pressure"], missing["pressure"], filled)
    wind = _fill("wind_speed", col["wind_speed"], missing["wind_speed"], filled)
    dew = np.where(missing["dew_point"], np.nan, col["dew_point"] + 273.15)
    ir = np.where(missing["horizontal_infrared"], np.nan, col["horizontal_infrared"])
    return HourlyWeather(month=table[:, 1].astype(int), day=table[:, 2].astype(int), hour=table[:, 3].astype(int),
                         air_temperature=dry + 273.15, dew_point=dew,
                         relative_humidity=np.clip(rh / 100.0, 0.0, 1.0), pressure=pressure,
                         horizontal_infrared=ir, wind_speed=np.maximum(wind, 0.0), location=location, filled=filled)


def to_bins(weather: HourlyWeather, temperature_step=2.0, wind_edges=(0.0, 1.0, 3.0, 6.0, 10.0),
            hours_per_year=None) -> WeatherBins:
    """Weather bins of the hours: air temperature steps x wind classes, each bin at its mean values.

    Parameters
    ----------
    temperature_step : float
        Width of the temperature bins [K].
    wind_edges : sequence
        Lower edges of the wind classes [m/s]; the last class is open above.
    hours_per_year : float, optional
        Scale the hours to this total (e.g. the line's operating hours); default the file's hours.

    Examples
    --------
    >>> b = to_bins(read_epw(demo_weather_path()))
    >>> round(float(b.hours.sum()))
    8760
    """
    step = float(temperature_step)
    if not step > 0:
        raise InputError(f"temperature_step must be > 0 K, got {step!r}", field="temperature_step", rule="> 0 K",
                         value=step)
    t_index = np.floor(weather.air_temperature / step).astype(np.int64)
    w_index = np.searchsorted(np.asarray(wind_edges, dtype=float), weather.wind_speed, side="right")
    key = (t_index - t_index.min()) * (len(wind_edges) + 1) + w_index
    unique, inverse, counts = np.unique(key, return_inverse=True, return_counts=True)
    inverse = inverse.ravel()
    mean_t = np.bincount(inverse, weather.air_temperature) / counts
    mean_w = np.bincount(inverse, weather.wind_speed) / counts
    hours = counts.astype(float)
    if hours_per_year is not None:
        hours = hours * float(hours_per_year) / hours.sum()
    return WeatherBins(mean_t, mean_w, hours)


def hours_below(weather: HourlyWeather, temperature=273.15) -> int:
    """Hours with the air below ``temperature`` [K] (default freezing).

    Examples
    --------
    >>> hours_below(read_epw(demo_weather_path())) > 0
    True
    """
    return int(np.count_nonzero(weather.air_temperature < temperature))


def condensation_hours(weather: HourlyWeather, surface_temperature, margin=0.0) -> np.ndarray:
    """Hours in which a surface is colder than the dew point of the air plus ``margin`` [h].

    Parameters
    ----------
    surface_temperature : numeric
        [K], broadcast against the hours (last axis): a constant per case (shape ``(n_cases, 1)``) or hour by hour.
    margin : float
        [K] above the dew point still counted as risk.

    The dew point is the file's where given, else computed from dry bulb, RH and pressure with CoolProp
    (:func:`convlib.properties.dew_point`).

    Examples
    --------
    >>> w = read_epw(demo_weather_path())
    >>> int(condensation_hours(w, 250.0)) == len(w)  # a surface at -23 degC is below every dew point
    True
    """
    dew = weather.dew_point
    if np.isnan(dew).any():
        from .properties import dew_point

        gap = np.isnan(dew)
        dew = dew.copy()
        dew[gap] = dew_point(weather.air_temperature[gap], np.maximum(weather.relative_humidity[gap], 1e-3),
                             weather.pressure[gap])
    ts = np.asarray(surface_temperature, dtype=float)
    return np.count_nonzero(ts < dew + float(margin), axis=-1)


def jacket_condensation_hours(pipe_outer_diameter, fluid_temperature, layers, weather: HourlyWeather, *,
                              jacket_emissivity=0.9, margin=0.0, sky_view_fraction=None, sky_temperature=None,
                              solar_absorptivity=None, convection_coefficient=None) -> np.ndarray:
    """Hours a year in which the jacket of a (cold) outdoor line is below the dew point plus ``margin`` [h].

    The jacket temperature is solved hour by hour (:func:`convlib.pipe.insulated_pipe` over lines x hours, the
    hour's air temperature and wind), then compared with the hour's dew point (:func:`condensation_hours`).

    Parameters
    ----------
    pipe_outer_diameter, fluid_temperature, jacket_emissivity : numeric
        Per line [m], [K], [-] (1-D or scalars).
    layers : sequence of Layer
        Layer arrays per line need a trailing axis of 1 (the hours).
    margin : numeric
        How far the jacket must stay above the dew point [K].
    sky_view_fraction, sky_temperature, solar_absorptivity, convection_coefficient
        As in :func:`convlib.pipe.insulated_pipe` (the weather gives air, wind and pressure).

    Examples
    --------
    >>> from convlib.pipe import Layer
    >>> w = read_epw(demo_weather_path())
    >>> h = jacket_condensation_hours([0.0603, 0.0603], 280.15, [Layer(np.array([[0.005], [0.05]]), 0.035)], w)
    >>> bool(h[0] > h[1])
    True
    """
    r = insulated_pipe_by_hour(pipe_outer_diameter, fluid_temperature, layers, weather,
                               jacket_emissivity=jacket_emissivity, sky_view_fraction=sky_view_fraction,
                               sky_temperature=sky_temperature, solar_absorptivity=solar_absorptivity,
                               convection_coefficient=convection_coefficient)
    return condensation_hours(weather, r.surface_temperature, margin)


def insulated_pipe_by_hour(pipe_outer_diameter, fluid_temperature, layers, weather: HourlyWeather, *,
                           jacket_emissivity=0.9, sky_view_fraction=None, sky_temperature=None,
                           solar_absorptivity=None, convection_coefficient=None):
    """:func:`convlib.pipe.insulated_pipe` over lines x hours: per line (1-D or scalars) in each hour's air, wind
    and pressure; the other keywords as there. Layer arrays per line need a trailing axis of 1 (the hours).

    Examples
    --------
    >>> from convlib.pipe import Layer
    >>> w = read_epw(demo_weather_path())
    >>> r = insulated_pipe_by_hour([0.0603, 0.1143], 280.15, [Layer(0.05, 0.035)], w)
    >>> r.surface_temperature.shape == (2, len(w))
    True
    """
    from .pipe import insulated_pipe

    def per_line(value):
        return np.atleast_1d(np.asarray(value, dtype=float))[:, None]

    return insulated_pipe(per_line(pipe_outer_diameter), per_line(fluid_temperature), layers,
                          air_temperature=weather.air_temperature, wind_speed=weather.wind_speed,
                          pressure=weather.pressure, jacket_emissivity=per_line(jacket_emissivity),
                          sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature,
                          solar_absorptivity=solar_absorptivity, convection_coefficient=convection_coefficient)


@dataclass(frozen=True)
class TracingEnergy:
    """A year of heat tracing from hourly weather (arrays over the lines)."""

    energy_per_length: np.ndarray   # heat the tracer supplies over the year per metre [J/m]
    energy: np.ndarray              # over the traced length [J]
    time_on: np.ndarray             # time the control calls for heat and the line needs it [s]
    peak_per_length: np.ndarray     # largest hourly duty [W/m]
    warnings: np.ndarray            # union over the hours of the flags of every solve

    def warning_messages(self) -> list[str]:
        from .regimes import summarize_flags

        return summarize_flags(self.warnings)


def tracing_energy(pipe_outer_diameter, maintain_temperature, layers, weather: HourlyWeather, *, length=1.0,
                   switch_on_below=None, jacket_emissivity=0.9, sky_view_fraction=None, solar_absorptivity=None,
                   convection_coefficient=None) -> TracingEnergy:
    r"""Heat a controlled tracer supplies in a year of hourly weather: :math:`E' = \sum_h \max(q'_h, 0)\,\Delta t`.

    Each hour in which the air is below ``switch_on_below`` (default the maintain temperature: an ambient-sensing
    thermostat), the tracer replaces what the line loses at its maintain temperature in that hour's air, wind and
    pressure (:func:`convlib.pipe.insulated_pipe`, lines x hours); other hours it is off. A line-sensing control
    gives the same figure; a tracer left on all year, or one without control, uses more. No design margin is
    added: this is the energy, not the rating (:func:`convlib.tracing.tracing_duty` sizes the tracer).

    Parameters
    ----------
    pipe_outer_diameter, maintain_temperature, jacket_emissivity : numeric
        Per line [m], [K], [-] (1-D or scalars).
    layers : sequence of Layer
        Layer arrays per line need a trailing axis of 1 (the hours).
    length : numeric
        Traced length per line [m].
    switch_on_below : numeric, optional
        Air temperature below which the control calls for heat [K]; default the maintain temperature.
    sky_view_fraction, solar_absorptivity, convection_coefficient
        As in :func:`convlib.pipe.insulated_pipe`; the sky temperature is the file's where it gives the infrared.

    Examples
    --------
    >>> from convlib.pipe import Layer
    >>> w = read_epw(demo_weather_path())
    >>> e = tracing_energy(0.0603, 278.15, [Layer(0.025, 0.04)], w)
    >>> bool(0 < e.time_on[0] / 3600 < len(w)), bool(e.energy_per_length[0] > 0)
    (True, True)
    """
    from .validation import as_array

    d = np.atleast_1d(as_array("pipe_outer_diameter", pipe_outer_diameter, unit="m", low=0.0, low_inclusive=False))
    tm = np.atleast_1d(as_array("maintain_temperature", maintain_temperature, unit="K", low=0.0, low_inclusive=False))
    eps = np.atleast_1d(as_array("jacket_emissivity", jacket_emissivity, low=0.0, high=1.0))
    run = np.atleast_1d(as_array("length", length, unit="m", low=0.0))
    on_below = tm if switch_on_below is None else np.atleast_1d(
        as_array("switch_on_below", switch_on_below, unit="K", low=0.0, low_inclusive=False))
    sky = weather.sky_temperature
    sky = np.where(np.isnan(sky), weather.air_temperature, sky) if sky_view_fraction else None
    r = insulated_pipe_by_hour(d, tm, layers, weather, jacket_emissivity=eps, sky_view_fraction=sky_view_fraction,
                               sky_temperature=sky, solar_absorptivity=solar_absorptivity,
                               convection_coefficient=convection_coefficient)
    on = weather.air_temperature < np.broadcast_to(on_below, r.q_per_length.shape[:-1])[..., None]
    duty = np.where(on, np.maximum(r.q_per_length, 0.0), 0.0)   # [W/m] hour by hour
    per_length = duty.sum(axis=-1) * 3600.0                      # one hour per row [J/m]
    return TracingEnergy(energy_per_length=per_length, energy=per_length * run,
                         time_on=3600.0 * np.count_nonzero(on & (duty > 0), axis=-1),
                         peak_per_length=duty.max(axis=-1),
                         warnings=np.bitwise_or.reduce(np.where(on, r.warnings, 0), axis=-1).astype(np.int16))


# ----------------------------------------------------------------------------- invented demo file
_MONTH_DAYS = (31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31)


def synthetic_epw_text(seed: int = 20261203, *, city: str = "Fernhill (invented)", mean=9.0, annual_swing=10.0,
                       daily_swing=4.0) -> str:
    """An invented EPW year (8760 rows) from a seeded random generator: not measured weather of any place.

    Temperature: annual and daily cosines plus an AR(1) disturbance; dew point a random depression below it;
    wind Weibull-like with persistence; sky infrared from an invented sky emissivity. Only the fields convlib
    reads carry values; the rest hold the manual's missing codes.
    """
    rng = np.random.default_rng(seed)
    n = 8760
    month = np.repeat(np.arange(1, 13), np.array(_MONTH_DAYS) * 24)
    day = np.concatenate([np.repeat(np.arange(1, d + 1), 24) for d in _MONTH_DAYS])
    hour = np.tile(np.arange(1, 25), 365)
    t = np.arange(n)
    noise = np.empty(n)
    shocks = rng.normal(0.0, 0.45, n)
    noise[0] = 0.0
    for k in range(1, n):  # generator only, run once to write the file
        noise[k] = 0.985 * noise[k - 1] + shocks[k]
    dry = (mean - annual_swing * np.cos(2 * np.pi * (t - 480) / n)
           - daily_swing * np.cos(2 * np.pi * (hour - 5) / 24) + noise)
    depression = np.abs(rng.gamma(2.0, 1.6, n)) + 0.3 * daily_swing * (1 + np.cos(2 * np.pi * (hour - 15) / 24))
    dew = dry - depression
    # relative humidity over water from the Magnus form (Alduchov & Eskridge 1996) -- only to fill the field
    es = lambda x: np.exp(17.625 * x / (x + 243.04))  # noqa: E731
    rh = np.clip(np.round(100 * es(dew) / es(dry)), 5, 100)
    pressure = np.round(100300 + np.cumsum(rng.normal(0, 25, n)) * 0.3 - 0)
    gust = np.empty(n)
    gust_shocks = rng.normal(0, 0.35, n)
    gust[0] = 0.0
    for k in range(1, n):
        gust[k] = 0.95 * gust[k - 1] + gust_shocks[k]
    wind = np.round(np.clip(3.2 + 1.6 * gust + 0.8 * np.cos(2 * np.pi * (hour - 15) / 24), 0.0, None), 1)
    cloud = np.clip(0.5 + 0.4 * np.sin(t / 53.0) + rng.normal(0, 0.2, n), 0, 1)
    sky_emissivity = 0.72 + 0.006 * dew + 0.2 * cloud  # invented
    ir = np.round(np.clip(sky_emissivity, 0.5, 1.0) * STEFAN_BOLTZMANN * (dry + 273.15) ** 4)
    header = [
        f"LOCATION,{city},Demo Region,XX,Invented,000000,52.00,-1.00,0.0,85.0",
        "DESIGN CONDITIONS,0",
        "TYPICAL/EXTREME PERIODS,0",
        "GROUND TEMPERATURES,0",
        "HOLIDAYS/DAYLIGHT SAVINGS,No,0,0,0",
        f"COMMENTS 1,INVENTED weather for the invented Fernhill demo site; generated by convlib.weather."
        f"synthetic_epw_text(seed={seed}); not measured data of any place",
        "COMMENTS 2,Only dry bulb / dew point / RH / pressure / infrared / wind carry values",
        "DATA PERIODS,1,1,Data,Sunday, 1/ 1,12/31",
    ]
    rows = []
    for k in range(n):  # generator only
        rows.append(f"2026,{month[k]},{day[k]},{hour[k]},60,?9?9?9?9E0?9?9?9?9?9?9?9?9?9?9?9?9?9*9*9*9*9*9,"
                    f"{dry[k]:.1f},{dew[k]:.1f},{rh[k]:.0f},{pressure[k]:.0f},9999,9999,{ir[k]:.0f},"
                    f"9999,9999,9999,999999,999999,999999,9999,999,{wind[k]:.1f},99,99,9999,99999,9,999999999,"
                    f"999,.999,999,99,999,999,99")
    return "\n".join(header + rows) + "\n"


if __name__ == "__main__":  # python -m convlib.weather: rewrite the invented demo file
    target = Path(__file__).with_name("data") / "demo_weather.epw"
    target.write_text(synthetic_epw_text(), encoding="utf-8")
    print(f"wrote {target}")
