"""Command line for studies, snapshots, reports and line lists: ``run``, ``verify``, ``compare``, ``report``, ``lines``."""
from __future__ import annotations

import json
import os
import sys

import numpy as np

from .cli_common import (ALLOW_HELP, display_unit, energy_text, from_si, list_arguments, list_errors_and_json,
                         list_table, output_options, pretty_unit)
from .cli_common import power_text  # noqa: F401  (moved to cli_common; importable from here too)
from .demo import load_demo_site
from .errors import InputError
from .files import read_json
from .design import WeatherBins
from .units import INPUTS, KIND_SI_UNIT, read

__all__ = ["add_commands", "load_spec", "weather_bins", "study_summary", "progress_bar", "MAX_STUDY_BYTES",
           "MAX_BINS_BYTES", "MAX_BINS"]

MAX_STUDY_BYTES = 10_000_000   #: largest study file read [bytes] (a study spec is a few kB)
MAX_BINS_BYTES = 10_000_000    #: largest weather-bins file read [bytes]
MAX_BINS = 10_000              #: most weather bins (hourly bins of a leap year: 8784)


def progress_bar(fraction: float, text: str) -> None:
    """A one-line progress bar on stderr (only when stderr is a terminal or CONVLIB_PROGRESS is set)."""
    if not (sys.stderr.isatty() or os.environ.get("CONVLIB_PROGRESS")):
        return
    width = 30
    filled = int(round(width * min(max(fraction, 0.0), 1.0)))
    sys.stderr.write(f"\r[{'#' * filled}{'.' * (width - filled)}] {fraction * 100:5.1f} % {text[:40]:<40}")
    if fraction >= 1.0:
        sys.stderr.write("\n")
    sys.stderr.flush()


def load_spec(args):
    from .study import StudySpec, check_plausible, load_demo_study

    if args.demo == bool(args.study):
        raise InputError("give a study file or --demo (the invented demo study), not both", field="study, --demo",
                         rule="exactly one of them", value=(args.study, args.demo))
    if args.demo:
        return load_demo_study()
    data = read_json(args.study, MAX_STUDY_BYTES, label=f"study file {args.study}", field="study")
    try:
        spec = StudySpec.model_validate(data)
    except ValueError as exc:
        raise InputError(f"study file {args.study}: {_pydantic_text(exc)}", field="study", rule="a valid study",
                         value=args.study) from None
    try:
        check_plausible(spec, allow_unusual=getattr(args, "allow_unusual", False), override="--allow-unusual")
    except InputError as exc:
        raise InputError(f"study file {args.study}: {exc}", field=exc.field, rule=exc.rule, value=exc.value) from None
    return spec


def _pydantic_text(exc) -> str:
    errors = getattr(exc, "errors", None)
    if callable(errors):
        return "; ".join(f"{'.'.join(str(p) for p in e['loc']) or '(file)'}: {e['msg']}" for e in errors())
    return str(exc)


def study_summary(spec, result, units: str = "SI") -> list[str]:
    """Readable lines summarizing a study result (used by `run` and the report)."""
    def show(value, kind):
        unit = display_unit(kind, units)
        return f"{float(from_si(value, kind, unit)):.4g} {pretty_unit(unit)}".strip()

    b = result.base
    lines = [f"{spec.name}", f"  base case: q = {show(b.q_per_length[0], 'heat_per_length')}, "
             f"surface {show(b.surface_temperature[0], 'temperature')}, h_conv "
             f"{show(b.h_convection[0], 'coefficient')}, h_rad {show(b.h_radiation[0], 'coefficient')}"]
    for sp in result.base_spreads:
        spread = "not available (fewer than two correlations apply)" if sp.q_per_length[0] is None else \
            f"{sp.q_per_length[0] * 100:.1f} % in q over {sp.applicable_count[0]} {sp.mode} correlations"
        lines.append(f"  correlation spread ({sp.mode}): {spread}")
    for bar in result.tornado[:5]:
        lines.append(f"  tornado: {bar.input} {bar.low:g}..{bar.high:g} {bar.unit}: q "
                     f"{show(bar.q_low, 'heat_per_length')} .. {show(bar.q_high, 'heat_per_length')}")
    mc = result.monte_carlo
    if mc is not None:
        lines.append(f"  Monte Carlo ({mc.samples} samples, seed {mc.seed}, model form {mc.model_form}): q P5 "
                     f"{show(mc.p5, 'heat_per_length')}, P50 {show(mc.p50, 'heat_per_length')}, P95 "
                     f"{show(mc.p95, 'heat_per_length')}")
    for sweep in result.sweeps:
        lines.append(f"  sweep of {sweep.input}: {len(sweep.values)} points, q "
                     f"{show(min(sweep.default.q_per_length), 'heat_per_length')} .. "
                     f"{show(max(sweep.default.q_per_length), 'heat_per_length')}")
    lines += [f"  ! {w}" for w in result.warnings]
    lines += result.cautions
    return lines


def _cmd_run(args) -> int:
    from .study import run_study

    spec = load_spec(args)
    result = run_study(spec, progress=progress_bar)
    saved = None
    if args.save:
        from . import snapshot

        saved = str(snapshot.save(args.save, spec, result, author=args.author, note=args.note,
                                  overwrite=args.overwrite))
    if args.json:
        json.dump({"spec": spec.model_dump(mode="json"), "result": result.model_dump(mode="json"),
                   "snapshot": saved}, sys.stdout)
        print()
        return 0
    print("\n".join(study_summary(spec, result, args.units)))
    if saved:
        print(f"snapshot saved: {saved}")
    return 0


def _is_upgrade(path) -> bool:
    """True for an upgrade-study snapshot (``kind`` "convlib-upgrade-snapshot"); study snapshots go on as before."""
    from . import upgrade_snapshot

    return upgrade_snapshot.file_kind(path) == upgrade_snapshot.KIND


def _cmd_verify(args) -> int:
    from . import snapshot

    if _is_upgrade(args.snapshot):
        from . import upgrade_snapshot

        report = upgrade_snapshot.verify(args.snapshot)
    else:
        report = snapshot.verify(args.snapshot, progress=progress_bar)
    if args.json:
        json.dump({"agrees": report.agrees, "text": report.text()}, sys.stdout, indent=2)
        print()
    else:
        print(report.text())
    return 0 if report.agrees else 1


def _cmd_compare(args) -> int:
    from . import snapshot

    upgrade = [_is_upgrade(args.first), _is_upgrade(args.second)]
    if upgrade[0] != upgrade[1]:
        kinds = ["upgrade" if u else "study" for u in upgrade]
        raise InputError(f"cannot compare an upgrade snapshot with a study snapshot ({args.first}: {kinds[0]}, "
                         f"{args.second}: {kinds[1]})",
                         field="first, second", rule="two snapshots of the same kind", value=(args.first, args.second))
    if upgrade[0]:
        from . import upgrade_snapshot

        d = upgrade_snapshot.diff(args.first, args.second)
    else:
        d = snapshot.diff(args.first, args.second)
    if args.json:
        json.dump(d.records(), sys.stdout, indent=2)
        print()
    else:
        print(d.text())
    return 0


def weather_bins(args):
    """Weather bins from --bins FILE.json ({"air_temperature": [...], "wind_speed": [...], "hours": [...]},
    numbers SI or text with units such as "-5degC"), the demo site's bins with --demo, else None."""
    if args.bins:
        label = f"weather bins {args.bins}"
        data = read_json(args.bins, MAX_BINS_BYTES, label=label, field="--bins")
        missing = {"air_temperature", "hours"} - set(data)
        if missing:
            raise InputError(f"weather bins {args.bins}: missing {', '.join(sorted(missing))}", field="--bins",
                             rule="air_temperature and hours given", value=sorted(missing))
        for key in ("air_temperature", "wind_speed", "hours"):
            if key in data and (not isinstance(data[key], list) or len(data[key]) > MAX_BINS):
                raise InputError(f"{label}: {key} must be a list of at most {MAX_BINS} values; got "
                                 f"{type(data[key]).__name__}", field=f"--bins {key}",
                                 rule=f"a list of at most {MAX_BINS} values", value=type(data[key]).__name__)
        counts = {key: len(data[key]) for key in ("air_temperature", "wind_speed", "hours") if key in data}
        if len(set(counts.values())) != 1 or not counts["hours"]:
            raise InputError(f"{label}: the lists must have one value per bin, at least one bin; got "
                             + ", ".join(f"{n} {key}" for key, n in counts.items()), field="--bins",
                             rule="lists of equal length, at least one bin", value=counts)

        def each(key, name, values):  # plain numbers SI (K, m/s) as in every file; text with a unit as written
            return [read(v, name, f"bins {key}", allow_unusual=getattr(args, "allow_unusual", False), override="--allow-unusual",
                         plain_unit=KIND_SI_UNIT[INPUTS[name].kind]) for v in values]

        try:
            air = each("air_temperature", "air_temperature", data["air_temperature"])
            wind = each("wind_speed", "wind_speed", data.get("wind_speed", [0.0] * len(air)))
            return WeatherBins(air, wind, data["hours"])
        except InputError as exc:  # say which file
            raise InputError(f"{label}: {exc}", field=exc.field, rule=exc.rule, value=exc.value) from None
    if args.demo:
        return WeatherBins(**load_demo_site()["weather_bins"])
    return None


#: SI units of the per-line and total fields of `lines --json` (one table with cli_common.FIELDS).
LINE_UNITS = {"cool_down_time": "s", "warm_up_condensate": "kg", "length": "m", "equivalent_length": "m",
              "outer_diameter": "m", "fluid_temperature": "K",
               "air_temperature": "K", "surface_temperature": "K", "dew_point": "K", "q_per_length": "W/m",
               "q_total": "W", "operating_hours": "h", "heat_kwh": "kWh", "purchased_kwh": "kWh", "co2_kg": "kg",
               "outlet_temperature": "K", "freezing_position": "m", "tracing_duty_per_length": "W/m",
               "tracing_duty": "W", "condensate": "kg/s"}
TOTAL_UNITS = {"length": "m", "equivalent_length": "m", "q_lost": "W", "q_gained": "W", "heat_lost_kwh": "kWh/yr",
                "heat_gained_kwh": "kWh/yr", "purchased_kwh": "kWh/yr", "co2_kg": "kg/yr", "tracing_duty": "W",
                "condensate": "kg/s"}


def _cmd_lines(args) -> int:
    from .linelist import demo_lines_path, run_line_list, write_results_csv

    if args.demo == bool(args.input):
        raise InputError("give a line-list CSV file or --demo (the invented Fernhill line list), not both",
                         field="input, --demo", rule="exactly one of them", value=(args.input, args.demo))
    source = demo_lines_path() if args.demo else args.input
    energy = load_demo_site()["energy"] if args.demo else {}
    price = args.energy_price if args.energy_price is not None else energy.get("price_per_kwh", 0.0)
    efficiency = args.heating_efficiency or energy.get("heating_efficiency", 0.85)
    cop = args.cooling_cop or energy.get("cooling_cop", 3.0)
    co2 = args.co2_per_kwh if args.co2_per_kwh is not None else energy.get("co2_kg_per_kwh", 0.0)
    try:
        result = run_line_list(source, weather_bins(args), energy_price=price, heating_efficiency=efficiency,
                               cooling_cop=cop, co2_per_kwh=co2, progress=progress_bar,
                               allow_unusual=args.allow_unusual)
    except OSError as exc:
        raise InputError(f"cannot read line list {args.input}: {exc.strerror}", field="input",
                         rule="a readable file", value=args.input) from None
    if args.output:
        write_results_csv(result, args.output)
    if list_errors_and_json(args, result, "lines", LINE_UNITS, TOTAL_UNITS,
                            reason=lambda text: _reader_kelvin(text, args.units)):
        return 1 if result.errors else 0
    rows = []
    for row in result.rows():
        flags = [name for name, on in (("touch", row["touch_flag"]), ("condensation", row["condensation_flag"])) if on]
        rows.append({"tag": row["tag"], "location": row["location"],
                     "surface_temperature": row["surface_temperature"], "q_per_length": row["q_per_length"],
                     "q_total": row["q_total"], "heat [MWh/yr]": f"{row['heat_kwh'] / 1000:.2f}",
                     "cost/yr": f"{row['cost']:.0f}", "flags": ", ".join(flags) or "-",
                     "warnings": [row["notes"]] if row["notes"] else []})
    t = result.totals
    tail = [f"purchased energy {energy_text(t['purchased_kwh'], args.units)}, cost {t['cost']:.0f}/yr, "
            f"CO2 {t['co2_kg'] / 1000:.1f} t/yr; {t['touch_flags']} touch and {t['condensation_flags']} "
            f"condensation flag(s) (flags, not verdicts)"]
    shown = {"condensate": float(from_si(t["condensate"], "mass_flow", "kg/h")), "tracing_duty": t["tracing_duty"]}
    extras = [f"{label} {shown[name]:.{digits}f} {unit} on {int(np.sum(~np.isnan(getattr(result, name))))} line(s)"
              for name, label, unit, digits in (("condensate", "steam condensate", "kg/h", 1),
                                                ("tracing_duty", "tracing duty", "W", 0))
              if np.any(~np.isnan(getattr(result, name)))]
    if extras:
        tail.append("; ".join(extras))
    list_table(args, result, rows, "line", f"{t['lines']} lines computed, {t['rows_with_errors']} row(s) with errors",
               tail)
    return 1 if result.errors else 0


def _reader_kelvin(reason: str, units: str) -> str:
    """A row error's kelvin (the property data's) also in the reader's unit."""
    if "K for " not in reason:
        return reason
    from .units import kelvin_for_reader

    return kelvin_for_reader(reason, units)


def _cmd_report(args) -> int:
    try:  # the report shares the dashboard's figures (plotly): the one place the CLI reaches that layer
        from dashboard.report import write_report, write_upgrade_report
    except ImportError as exc:
        raise ValueError(f"the HTML report needs the dashboard extra (pip install 'convlib[dashboard]'): {exc}") \
            from None
    out = args.output or str(args.snapshot).removesuffix(".json") + ".html"
    if os.path.exists(out) and not args.overwrite:
        raise FileExistsError(f"{out} already exists")
    if _is_upgrade(args.snapshot):  # loaded here: the dashboard layer imports convlib only through compute
        from . import upgrade_snapshot

        path = write_upgrade_report(upgrade_snapshot.load(args.snapshot), out, units=args.units)
    else:
        path = write_report(args.snapshot, out, units=args.units)
    print(f"report written: {path}")
    return 0


def add_commands(sub) -> None:
    """The subcommands of this module on the main parser's subparsers."""
    run = sub.add_parser("run", help="run a study file (or the demo study) and optionally save a snapshot")
    run.add_argument("study", nargs="?", help="study file (JSON)")
    run.add_argument("--demo", action="store_true", help="the invented demo study")
    run.add_argument("--save", metavar="SNAPSHOT", help="save spec + results + provenance to this JSON file")
    run.add_argument("--author", default="", help="author recorded in the snapshot")
    run.add_argument("--note", default="", help="note recorded in the snapshot")
    run.add_argument("--overwrite", action="store_true", help="replace an existing snapshot file")
    run.add_argument("--allow-unusual", action="store_true", help=ALLOW_HELP)
    output_options(run, quantities=False)
    run.set_defaults(func=_cmd_run)

    ver = sub.add_parser("verify", help="re-run a snapshot's study (or upgrade study) and say whether the numbers "
                         "still agree (exit 1 if not)")
    ver.add_argument("snapshot", help="snapshot file (JSON)")
    ver.add_argument("--json", action="store_true")
    ver.set_defaults(func=_cmd_verify)

    cmp_ = sub.add_parser("compare", help="changed inputs and results between two snapshots (or two upgrade "
                          "snapshots)")
    cmp_.add_argument("first")
    cmp_.add_argument("second")
    cmp_.add_argument("--json", action="store_true")
    cmp_.set_defaults(func=_cmd_compare)

    rep = sub.add_parser("report", help="a snapshot as a self-contained HTML page (opens offline)")
    rep.add_argument("snapshot", help="snapshot file (JSON)")
    rep.add_argument("-o", "--output", help="HTML file (default: the snapshot's name with .html)")
    rep.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the report (default SI)")
    rep.add_argument("--overwrite", action="store_true", help="replace an existing HTML file")
    rep.set_defaults(func=_cmd_report)

    lines = sub.add_parser("lines", help="compute a CSV line list (every line at once); write results as CSV "
                           "(exit 1 if rows failed)")
    list_arguments(lines, "line-list", "convlib.linelist", "the invented Fernhill line list, weather and prices",
                   "line")
    lines.add_argument("--energy-price", type=float, help="price per purchased kWh (default 0)")
    lines.add_argument("--heating-efficiency", type=float, help="efficiency of the heat source (default 0.85)")
    lines.add_argument("--cooling-cop", type=float, help="COP of the chiller (default 3)")
    lines.add_argument("--co2-per-kwh", type=float, help="kg CO2 per purchased kWh (default 0)")
    output_options(lines, quantities=False)
    lines.add_argument("--allow-unusual", action="store_true", help=ALLOW_HELP)
    lines.set_defaults(func=_cmd_lines)
