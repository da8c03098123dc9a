"""Command line for thermal surveys and upgrade studies: ``survey`` and ``upgrade``.

Registered on the ``convlib`` parser by :func:`add_commands` (see :mod:`convlib.cli`). Both read a survey list
(CSV or Parquet; ``--demo``: the invented Fernhill survey), the site weather (an EPW file; ``--demo`` or no
``--weather``: the invented demo weather), run serially or on Dask (``--workers N`` / ``--scheduler``), print a
table with totals (hot losses and cold gains apart) and may write every row to ``--output`` (.parquet / .csv).
"""
from __future__ import annotations

import json
import os
import sys

import numpy as np

from . import __version__
from .cli_common import table
from .economics import DEMO_TARIFFS, Finance, Tariff, steam_tariff
from .errors import InputError
from .scale import DEFAULT_CHUNK, run_study, write_rows
from .survey import CAUTIONS, Measurement, demo_survey_path
from .units import parse
from .upgrade import CostTable, StudySettings, demo_costs_path, ranked, totals
from .pipe import Layer
from .survey import K_EFFECTIVE_BOUNDS, read_survey
from .weather import demo_weather_path, hours_below, jacket_condensation_hours, read_epw, to_bins

#: Hour-by-hour condensation counts are solved for at most this many cold outdoor lines (lines x 8760 points).
MAX_CONDENSATION_LINES = 2000

__all__ = ["add_commands"]


def _settings(args):
    """Settings, notes for the reader, and the hourly weather."""
    notes = []
    if args.weather:
        weather = read_epw(args.weather)
    else:
        weather = read_epw(demo_weather_path())
        notes.append("weather: the invented demo year of the Fernhill site (give --weather FILE.epw for yours)")
    bins = to_bins(weather, args.temperature_step, (0.0, 1.0, 3.0, 6.0))
    notes.append(f"weather: {weather.location.get('city', '?')}, {len(weather)} h, {bins.hours.size} bins, "
                 f"{hours_below(weather)} h below 0 degC")
    if args.costs:
        costs = CostTable.read(args.costs)
    else:
        costs = CostTable.read(demo_costs_path())
        notes.append("costs: the invented demo cost table (give --costs FILE.csv with your contractor's prices)")
    measurement = Measurement(thermometer=args.thermometer, emissivity=args.emissivity_range, samples=args.samples,
                              seed=args.seed)
    if getattr(args, "steam_price", None) is not None:
        heat = steam_tariff(args.steam_price, parse(args.steam_pressure, "pressure", "steam-pressure"),
                            parse(args.condensate_temperature, "temperature", "condensate-temperature"),
                            co2_per_tonne=args.steam_co2_per_tonne)
    elif getattr(args, "fuel_price", None) is not None:
        heat = Tariff(args.fuel, args.fuel_price, args.efficiency, args.co2_per_kwh)
    else:
        heat = DEMO_TARIFFS["natural gas"]
        notes.append("heat tariff: invented demo gas price (give --fuel-price or --steam-price)")
    cold = (Tariff("electricity (chiller)", args.chiller_price, args.cop, args.chiller_co2_per_kwh)
            if getattr(args, "chiller_price", None) is not None else DEMO_TARIFFS["electricity (chiller)"])
    finance = Finance(getattr(args, "discount_rate", 0.08), getattr(args, "escalation", 0.02),
                      getattr(args, "years", 15.0))
    settings = StudySettings(bins, costs, measurement, heat, cold, finance, getattr(args, "payback_years", 3.0))
    return settings, notes, weather


def _source(args):
    if args.demo or not args.survey_file:
        if not args.demo:
            raise InputError("give a survey file (CSV or Parquet) or --demo", field="survey_file", rule="given",
                             value=None)
        return demo_survey_path()
    return args.survey_file


def _run(args):
    settings, notes, weather = _settings(args)
    out = run_study(_source(args), settings, workers=args.workers, scheduler=args.scheduler,
                    chunk_size=args.chunk_size, processes=not args.threads, progress=args.progress)
    if args.output:
        for path in write_rows(out.rows, args.output, out.errors):
            notes.append(f"wrote {path}")
    return settings, notes, out, weather


def _first_per_line(rows: dict) -> dict:
    if not rows:
        return {}
    keep = np.ones(rows["index"].size, dtype=bool)
    keep[1:] = rows["index"][1:] != rows["index"][:-1]
    return {k: v[keep] for k, v in rows.items()}


def _c(kelvin_or_value, fmt="{:.3g}"):
    return "-" if not np.isfinite(kelvin_or_value) else fmt.format(kelvin_or_value)


def _print_json(sections: dict, notes, out):
    payload = {name: {k: (v.tolist() if isinstance(v, np.ndarray) else v) for k, v in rows.items()}
               for name, rows in sections.items()}
    payload["errors"] = [e._asdict() for e in out.errors]
    payload["notes"] = notes
    payload["cautions"] = list(CAUTIONS)
    payload["convlib_version"] = __version__
    json.dump(payload, sys.stdout, indent=2, default=float)
    print()


def _footer(notes, out, tot, what):
    for service, label in (("hot", "hot lines (heat lost)"), ("cold", "cold lines (heat gained)")):
        t = tot[service]
        if t["lines"]:
            print(f"\n{label}: {t['lines']} lines, now {abs(t['q_now']) / 1000:.1f} kW vs {abs(t['q_design']) / 1000:.1f} kW "
                  f"as designed, excess {t['excess_kwh_p50'] / 1000:.1f} MWh/yr (median)" + what(t))
    for e in out.errors:
        print(f"  ! row {e.index + 2} {e.tag}: {e.reason}")
    print()
    for n in notes:
        print(n)
    print()
    for c in CAUTIONS:
        print(c)


def _condensation(args, per_line, weather, notes) -> dict:
    """Hours a year below the dew point for the jackets of cold outdoor lines at their surveyed k_eff."""
    if not per_line:
        return {}
    lines, _ = read_survey(_source(args))
    k_by_index = dict(zip(per_line["index"].tolist(), per_line["k_effective"].tolist()))
    cold = np.array([(i in k_by_index) and lines.location[j] == "outdoor" and
                     lines.fluid_temperature[j] < lines.air_temperature[j] for j, i in enumerate(lines.index)],
                    dtype=bool)
    if not cold.any():
        return {}
    if cold.sum() > MAX_CONDENSATION_LINES:
        notes.append(f"condensation hours: skipped ({int(cold.sum())} cold outdoor lines; at most "
                     f"{MAX_CONDENSATION_LINES} are solved hour by hour)")
        return {}
    c = lines.take(cold)
    k = np.clip(np.nan_to_num(np.array([k_by_index[i] for i in c.index]), nan=K_EFFECTIVE_BOUNDS[1],
                              posinf=K_EFFECTIVE_BOUNDS[1]), *K_EFFECTIVE_BOUNDS)
    hours = jacket_condensation_hours(c.pipe_outer_diameter, c.fluid_temperature,
                                      [Layer(c.insulation_thickness[:, None], k[:, None])], weather,
                                      jacket_emissivity=c.jacket_emissivity)
    notes.append("condensing: hours a year the jacket of a cold outdoor line, at its surveyed conductivity, is below "
                 "the dew point of the weather file's air")
    return {int(i): str(int(h)) for i, h in zip(c.index, hours)}


def _cmd_survey(args) -> int:
    settings, notes, out, weather = _run(args)
    notes = [n for n in notes if not n.startswith(("costs:", "heat tariff:"))]
    per_line = _first_per_line(out.rows)
    if args.json:
        _print_json({"survey": {k: per_line[k] for k in _SURVEY_KEYS if k in per_line}}, notes, out)
        return 1 if out.errors else 0
    wet_hours = _condensation(args, per_line, weather, notes)
    rows = []
    for i in range(len(per_line.get("index", ()))):
        rows.append({"tag": per_line["tag"][i], "plant area": per_line["area"][i], "service": per_line["service"][i],
                     "condition": per_line["condition"][i],
                     "k_eff [W/m/K]": _c(per_line["k_effective"][i]), "k/k_design": _c(per_line["ratio"][i]),
                     "now [kW]": f"{per_line['q_now'][i] / 1000:.2f}",
                     "designed [kW]": f"{per_line['q_design'][i] / 1000:.2f}",
                     "excess P5/P50/P95 [MWh/yr]": "/".join(f"{per_line[k][i] / 1000:.1f}" for k in
                                                             ("excess_kwh_p5", "excess_kwh_p50", "excess_kwh_p95")),
                     "condensing [h/yr]": wet_hours.get(int(per_line["index"][i]), "-")})
    print(f"\nthermal survey ({settings.measurement.samples} samples: thermometer +/-{settings.measurement.thermometer:g}"
          f" K, emissivity +/-{settings.measurement.emissivity:g})")
    table(rows, "SI", out=sys.stdout)  # the current stdout, not the one bound at import
    _footer(notes, out, totals(ranked(out.rows)) if out.rows else {"hot": {"lines": 0}, "cold": {"lines": 0}},
            lambda t: "")
    return 1 if out.errors else 0


def _save(args, settings, out, weather, notes) -> None:
    """``--save``: the study as an upgrade snapshot (convlib.upgrade_snapshot)."""
    from .upgrade_snapshot import save

    where = args.weather or "the invented demo year of the Fernhill site"
    source = (f"{where}: {weather.location.get('city', '?')}, {len(weather)} h in {settings.bins.hours.size} bins "
              f"(air temperature steps of {args.temperature_step:g} K, wind classes from 0, 1, 3, 6 m/s)")
    path = save(args.save, _source(args), settings, output=out, weather_source=source, author=args.author,
                note=args.note, overwrite=args.overwrite)
    notes.append(f"snapshot saved: {path} (convlib verify / compare / report take it)")


def _cmd_upgrade(args) -> int:
    if args.save and os.path.exists(args.save) and not args.overwrite:  # before the study runs
        raise FileExistsError(f"{args.save} already exists; give --overwrite to replace it")
    settings, notes, out, weather = _run(args)
    if args.save:
        _save(args, settings, out, weather, notes)
    if not out.rows:
        _footer(notes, out, {"hot": {"lines": 0}, "cold": {"lines": 0}}, lambda t: "")
        return 1
    best = ranked(out.rows)
    tot = totals(best)
    if args.json:
        _print_json({"ranked": best, "all_options": out.rows, "totals": tot}, notes, out)
        return 1 if out.errors else 0
    n_years = settings.payback_years
    rows = []
    for i in range(best["rank"].size):
        rows.append({"rank": int(best["rank"][i]), "tag": best["tag"][i], "service": best["service"][i],
                     "condition": best["condition"][i],
                     "best option": best["option"][i] + ("" if best["worth_doing"][i] else " (not worth it)"),
                     "cost": f"{best['investment'][i]:,.0f}",
                     "saving/yr P5/P50/P95": "/".join(f"{best[k][i]:,.0f}" for k in
                                                       ("saving_p5", "saving_p50", "saving_p95")),
                     "payback [yr]": _c(best["payback_p50"][i], "{:.1f}"),
                     "NPV P50": f"{best['npv_p50'][i]:,.0f}",
                     f"P(payback<={n_years:g} yr)": f"{best['probability_payback'][i]:.0%}"})
    f = settings.finance
    print(f"\nupgrade ranking (heat {settings.heat_tariff.fuel}: {settings.heat_tariff.price_per_heat_kwh:.4f}/kWh of "
          f"heat; cold: {settings.cold_tariff.price_per_heat_kwh:.4f}/kWh; discount {f.discount_rate:.1%}, "
          f"escalation {f.escalation:.1%}, {f.years:g} years)")
    table(rows, "SI", out=sys.stdout)  # the current stdout, not the one bound at import

    def money(t):
        return (f"\n  worth doing: {t['lines_worth_doing']} lines, invest {t['investment']:,.0f}, save "
                f"{t['saving_p50']:,.0f}/yr (median), NPV {t['npv_p50']:,.0f}, CO2 {t['co2_saved_kg_p50'] / 1000:.1f} "
                f"t/yr")
    _footer(notes, out, tot, money)
    return 1 if out.errors else 0


_SURVEY_KEYS = ("index", "tag", "area", "service", "condition", "k_effective", "ratio", "q_now", "q_design",
                "excess_kwh_p5", "excess_kwh_p50", "excess_kwh_p95")


def _common(p) -> None:
    p.add_argument("survey_file", nargs="?", help="survey list, CSV or Parquet (see convlib.survey.read_survey)")
    p.add_argument("--demo", action="store_true", help="the invented Fernhill demo survey")
    p.add_argument("--weather", help="site weather as an EPW file (default: the invented demo year)")
    p.add_argument("--temperature-step", type=float, default=3.0, help="weather bin width in K (default 3)")
    p.add_argument("--costs", help="cost table CSV (default: the invented demo table)")
    p.add_argument("--thermometer", type=float, default=1.0, help="thermometer bound +/- K (default 1)")
    p.add_argument("--emissivity-range", type=float, default=0.05, help="emissivity bound +/- (default 0.05)")
    p.add_argument("--samples", type=int, default=200, help="samples per line (default 200)")
    p.add_argument("--seed", type=int, default=20261203, help="random seed (default 20261203)")
    p.add_argument("--workers", type=int, help="run on a Dask LocalCluster with N worker processes")
    p.add_argument("--threads", action="store_true", help="LocalCluster workers as threads, not processes")
    p.add_argument("--scheduler", help="address of a running Dask scheduler, e.g. tcp://10.0.0.5:8786")
    p.add_argument("--chunk-size", type=int, default=DEFAULT_CHUNK, help=f"lines per task (default {DEFAULT_CHUNK})")
    p.add_argument("--progress", action="store_true", help="show finished chunks on stderr")
    p.add_argument("--output", help="write every row to FILE.parquet or FILE.csv (errors to FILE_errors.csv)")
    p.add_argument("--json", action="store_true", help="print JSON (SI values) instead of a table")


def add_commands(sub) -> None:
    """Add ``survey`` and ``upgrade`` to the ``convlib`` subparsers ``sub``."""
    survey = sub.add_parser("survey", help="thermal survey: measured jacket temperatures -> heat flow now, "
                                           "effective conductivity, condition, annual excess with uncertainty")
    _common(survey)
    survey.set_defaults(func=_cmd_survey)

    upgrade = sub.add_parser("upgrade", help="price repair / add a layer / replace per surveyed line; ranked list "
                                             "with savings P5/P50/P95, payback, NPV")
    _common(upgrade)
    upgrade.add_argument("--fuel", default="fuel", help="name of the heating fuel (label)")
    upgrade.add_argument("--fuel-price", type=float, help="price per purchased kWh of fuel")
    upgrade.add_argument("--efficiency", type=float, default=0.85, help="boiler/plant efficiency (default 0.85)")
    upgrade.add_argument("--co2-per-kwh", type=float, default=0.0, help="kg CO2 per purchased kWh of fuel")
    upgrade.add_argument("--steam-price", type=float, help="price per tonne of steam (instead of --fuel-price)")
    upgrade.add_argument("--steam-pressure", default="10bar", help="steam pressure, absolute (default 10bar)")
    upgrade.add_argument("--condensate-temperature", default="100degC", help="condensate return (default 100degC)")
    upgrade.add_argument("--steam-co2-per-tonne", type=float, default=0.0, help="kg CO2 per tonne of steam")
    upgrade.add_argument("--chiller-price", type=float, help="electricity price per kWh for cold lines")
    upgrade.add_argument("--cop", type=float, default=3.0, help="chiller COP (default 3)")
    upgrade.add_argument("--chiller-co2-per-kwh", type=float, default=0.0, help="kg CO2 per kWh of electricity")
    upgrade.add_argument("--discount-rate", type=float, default=0.08, help="per year (default 0.08)")
    upgrade.add_argument("--escalation", type=float, default=0.02, help="energy price growth per year (default 0.02)")
    upgrade.add_argument("--years", type=float, default=15.0, help="lifetime of the measure (default 15)")
    upgrade.add_argument("--payback-years", type=float, default=3.0, help="payback horizon N (default 3)")
    upgrade.add_argument("--save", metavar="SNAPSHOT", help="save survey rows, settings, results and provenance "
                         "to this JSON file (convlib verify / compare / report read it)")
    upgrade.add_argument("--author", default="", help="author recorded in the snapshot")
    upgrade.add_argument("--note", default="", help="note recorded in the snapshot")
    upgrade.add_argument("--overwrite", action="store_true", help="replace an existing snapshot file")
    upgrade.set_defaults(func=_cmd_upgrade)
