"""Command line: ``convlib`` / ``python -m convlib``.

Commands
--------
``demo``          the invented demo site: bare surfaces, insulated lines, insulation sizing, annual energy
``surface``       one bare surface at a known temperature
``line``          one insulated (or bare) line with a known fluid temperature
``size``          insulation thickness for a touch, heat-loss or condensation limit
``run``           a study file (or ``--demo``): sweeps, maps, tornado, Monte Carlo; ``--save`` a snapshot
``verify``        re-run a snapshot's study and say whether the numbers still agree
``compare``       changed inputs and results between two snapshots
``report``        a snapshot as a self-contained HTML page
``lines``         a CSV line list: every line at once, totals, results to CSV (exit 1 if rows failed)
``outlet``        temperature along a line with flow: outlet temperature and loss
``trace``         heat-tracing duty to hold a line at a maintain temperature (minimum ambient, maximum wind)
``steam``         a saturated steam line: heat loss and condensate
``freeze``        time for stagnant water in a line to reach 0 degC and to freeze solid
``tank``          a vertical or horizontal tank face by face (wall, roof, floor; shell, heads) or a sphere
``duct``          a rectangular duct face by face (sides, top, bottom), bare or insulated
``vessels``       a CSV list of tanks, spheres and ducts: every item face by face, totals, results to CSV
``cooldown``      time for a stopped hot line to cool to a temperature
``warmup``        condensate while a steam line warms up
``survey``        a thermal survey: measured jackets -> heat flow now, effective k, condition, excess
``upgrade``       priced upgrade options per surveyed line, ranked, with uncertainty (``--workers N``: Dask)
``correlations``  the correlation registry

The commands live in ``cli.py`` (demo, surface, line, size, correlations), ``cli_study.py`` (run, verify,
compare, report, lines), ``cli_operation.py``, ``cli_transients.py``, ``cli_survey.py`` and ``cli_vessels.py`` (vessels).

Values may carry units (``90degC``, ``4.5in``, ``50mm``, ``10mph``, ``80W/m``, ``0.045W/m/degC``, ``6barg``,
``80%``); a temperature inside a compound unit is an interval. Plain numbers follow ``--units``: SI reads
degC, mm for diameters, walls, layers and duct sizes, m for lengths of runs, vessels and plates, bar absolute
for process pressures, kPa for air pressure, W/m/K, W/m2/K, W/m, kg/s; US reads degF, in, ft, psi absolute,
Btu*in/(h*ft2*degF), Btu/(h*ft2*degF), Btu/h/ft, lb/h (each option's help says which). Values outside the
ranges engineers use are refused with a hint unless ``--allow-unusual``. Tables print in the same system;
``--json`` prints SI values with a map of their units. Bad input prints one line naming the field and exits 2.
"""
from __future__ import annotations

import argparse
import json
import math
import os
import re
import sys

import numpy as np

from . import __version__
from .cli_common import (deprecated_options, LAYER_UNITS, add_quantity, conditions, display_unit, emit, from_si, layers, condensation_check,
                         condensation_options, output_options, pipe_diameter, add_line_options, pretty_unit,
                         surface_cautions, surface_row, table, units_map, value)
from .cli_operation import add_commands as add_operation_commands
from .cli_study import add_commands as add_study_commands
from .cli_survey import add_commands as add_survey_commands
from .cli_transients import add_commands as add_transient_commands
from .cli_vessels import add_commands as add_vessel_commands
from .correlations import catalog
from .demo import load_demo_site, operation_rows
from .errors import InputError
from .design import (CAUTION_CONDENSATION, CAUTION_TOUCH, COMMERCIAL_THICKNESSES, CONDENSATION_MARGIN, WeatherBins,
                     annual_energy, thickness_against_condensation,
                     thickness_for_heat_loss, thickness_for_surface_temperature)
from .fittings import CAUTION_BARE, PRESSURE_CLASSES, bare_flange_pair, bare_valve
from .geometry import SHAPES
from .pipe import insulated_pipe
from .surface import bare_surface

__all__ = ["main", "load_demo_site"]


# ----------------------------------------------------------------------------- commands
def _cmd_surface(args) -> int:
    kwargs = {}
    for option, _, _ in _SURFACE_OPTIONS:
        if getattr(args, option.replace("-", "_")) is not None:
            kwargs[option.replace("-", "_")] = value(args, option.replace("-", "_"))
    for name in ("emissivity", "sky_view_fraction"):
        if getattr(args, name) is not None:
            kwargs[name] = getattr(args, name)
    for required in ("surface_temperature", "air_temperature"):
        if required not in kwargs:
            raise InputError(f"--{required.replace('_', '-')} is required", field=f"--{required.replace('_', '-')}",
                             rule="given", value=None)
    if args.shape in ("horizontal_cylinder", "vertical_cylinder") and "length" not in kwargs:
        kwargs["length"] = 1.0
    rows = [surface_row(args.tag, bare_surface(args.shape, natural=args.natural, forced=args.forced, **kwargs))]
    emit(args, [("surface", rows)], surface_cautions(rows))
    return 0


def _cmd_line(args) -> int:
    given = layers(args)
    r = insulated_pipe(pipe_diameter(args), value(args, "fluid_temperature"), given,
                       length=value(args, "length"), **conditions(args))
    rows = [surface_row(args.tag, r, ("fluid_temperature", "outer_diameter"), layers=given)]
    checked = condensation_check(args, rows, value(args, "air_temperature"))
    sections, extra = [("line", rows)], _bare_items(args, float(r.q_total))
    if extra:
        sections.append(("bare items (extra heat over the line they replace)", extra.pop("rows")))
        checked.append(CAUTION_BARE)
    emit(args, sections, [*surface_cautions(rows), *checked], extra)
    return 0


def _bare_items(args, q_line: float) -> dict:
    """Rows and a summary of --bare-valves / --bare-flange-pairs on the line (convlib.fittings); {} without them."""
    counts = {"bare valve": args.bare_valves, "bare flange pair": args.bare_flange_pairs}
    if not any(counts.values()):
        return {}
    if args.nps is None:
        raise InputError("--bare-valves and --bare-flange-pairs need --nps (their sizes come from the ASME B16.5 / "
                         "B16.10 tables)", field="--nps", rule="given with bare items", value=None)
    around = conditions(args)
    for name in ("convection_coefficient", "solar_absorptivity"):  # of the jacket, not of the bare metal
        around.pop(name)
    rows, extra_total, equivalent_total = [], 0.0, 0.0
    for (label, count), item in zip(counts.items(), (bare_valve, bare_flange_pair)):
        if count:
            f = item(args.nps, value(args, "fluid_temperature"), pressure_class=args.pressure_class,
                     layers=layers(args), **around)
            extra_total += count * float(f.extra_heat)
            equivalent_total += count * float(f.equivalent_length)
            rows.append({"tag": label, "count": count, "pressure_class": args.pressure_class,
                         "area": float(f.area), "q_item": float(f.q_item), "extra_heat": count * float(f.extra_heat),
                         "equivalent_length": count * float(f.equivalent_length), "warnings": []})
    metres = equivalent_total if args.units == "SI" else equivalent_total / 0.3048
    total = from_si(q_line + extra_total, "power", display_unit("power", args.units))
    text = [f"bare items add as much heat as {metres:.1f} {'m' if args.units == 'SI' else 'ft'} of this line; "
            f"line with them: Q = {total:.0f} {pretty_unit(display_unit('power', args.units))}"]
    if args.json:
        return {"rows": rows, "q_total_with_bare_items": q_line + extra_total, "equivalent_length": equivalent_total}
    for row in rows:
        row.pop("equivalent_length")
    return {"rows": rows, "text": text}


def _count(text: str) -> int:
    """A whole number of items, 0 or more (argparse type)."""
    try:
        number = int(text)
    except ValueError:
        number = -1
    if number < 0:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of items (0 or more)")
    return number


def _sizing_rows(tag, result, kind_label) -> dict:
    """One row of a sizing: the limit, the assumptions it used (air, wind, emissivity, margin, dew point), the
    thicknesses and the jacket temperature and heat flow at the listed thickness (SI; ``None``: not applicable)."""
    def known(x):
        x = float(np.ravel(x)[0])
        return None if np.isnan(x) else x

    row = {"tag": tag, "limit on": kind_label}
    if result.quantity.startswith("heat"):
        row["heat_loss_limit"] = known(result.limit)
    elif kind_label == "condensation":
        row["dew_point"] = known(result.dew_point)
        row["margin"] = known(result.margin)
    else:
        row["surface_limit"] = known(result.limit)
    if "surface_limit" in row:
        row["limit_source"] = "given" if result.limit_given else "default"
    row.update(air_temperature=known(result.air_temperature),
               wind_speed=known(result.wind_speed), jacket_emissivity=known(result.jacket_emissivity),
               required_thickness=known(result.required_thickness),
               commercial_thickness=known(result.commercial_thickness),
               surface_temperature_at_listed=known(result.surface_temperature_at_commercial),
               q_per_length_at_listed=known(result.q_per_length_at_commercial),
               notes="; ".join(result.messages) or "-", warnings=result.warning_messages())
    return row


def _thickness_list(args):
    """``--thicknesses 25,40,50``: the catalogue of available thicknesses (plain numbers mm, US in)."""
    if args.thicknesses is None:
        return COMMERCIAL_THICKNESSES
    parts = [p.strip() for p in args.thicknesses.split(",") if p.strip()]
    if not parts:
        raise InputError("--thicknesses: give the available thicknesses separated by commas, e.g. 25mm,40mm,50mm",
                         field="--thicknesses", rule="a comma-separated list of thicknesses", value=args.thicknesses)
    values = [value(args, "", p, "thickness", "--thicknesses") for p in parts]
    if min(values) <= 0:
        raise InputError(f"--thicknesses: every thickness must be greater than 0; got {args.thicknesses!r}",
                         field="--thicknesses", rule="each greater than 0", value=args.thicknesses)
    return tuple(values)


def _cmd_size(args) -> int:
    d = pipe_diameter(args)
    tf = value(args, "fluid_temperature")
    k = value(args, "insulation_conductivity")
    outer = layers(args, "jacket")
    cond = conditions(args)
    common = dict(insulation_conductivity=k, outer_layers=outer, commercial_thicknesses=_thickness_list(args))
    chosen = [name for name in ("surface_limit", "heat_loss_limit", "relative_humidity") if getattr(args, name)]
    if len(chosen) != 1:
        raise InputError("give exactly one limit: --surface-limit, --heat-loss-limit or --relative-humidity",
                         field="--surface-limit, --heat-loss-limit, --relative-humidity", rule="exactly one of them",
                         value=chosen)
    for option, needs in (("hottest_air_temperature", "surface_limit"), ("wind_for_touch", "surface_limit"),
                          ("condensation_margin", "relative_humidity")):
        if getattr(args, option) and not getattr(args, needs):
            flag = f"--{option.replace('_', '-')}"
            raise InputError(f"{flag} applies to --{needs.replace('_', '-')} only", field=flag,
                             rule=f"only with --{needs.replace('_', '-')}", value=getattr(args, option))
    if args.surface_limit:
        # the worst case for a burn: the design hottest ambient and still air unless the user says otherwise
        hottest = value(args, "hottest_air_temperature")
        if hottest is not None:
            cond["air_temperature"] = hottest
        if not args.wind_for_touch:
            ignored = cond["wind_speed"]
            cond["wind_speed"] = 0.0
        res = thickness_for_surface_temperature(d, tf, surface_limit=value(args, "surface_limit"), **common, **cond)
        label = "touch temperature"
    elif args.heat_loss_limit:
        res = thickness_for_heat_loss(d, tf, heat_loss_limit=value(args, "heat_loss_limit"), **common, **cond)
        label = "heat loss"
    else:
        cond.pop("wind_speed")
        cond.pop("sky_view_fraction")
        margin = value(args, "condensation_margin")
        res = thickness_against_condensation(d, tf, relative_humidity=value(args, "relative_humidity"),
                                             **({} if margin is None else {"margin": margin}), **common, **cond)
        label = "condensation"
    row = _sizing_rows(args.tag, res, label)
    if args.surface_limit and not args.wind_for_touch and ignored:
        note = "sized in still air (the worst case); --wind-for-touch sizes in the given wind"
        row["notes"] = note if row["notes"] == "-" else f"{row['notes']}; {note}"
    if args.json:
        json.dump({"sizing": {**row, "required_thickness_m": row["required_thickness"],
                              "commercial_thickness_m": row["commercial_thickness"],
                              "achievable": bool(res.achievable)},
                   "units": units_map([row]), "cautions": list(res.cautions), "convlib_version": __version__},
                  sys.stdout, indent=2)
        print()
        return 0
    table([row], args.units)
    for c in res.cautions:
        print(c)
    return 0


def _nan_to_none(value):
    value = float(value)
    return None if np.isnan(value) else value


def _cmd_demo(args) -> int:
    from .lines import LineSpec  # pydantic: imported only by the commands that need it

    site = load_demo_site()
    bare = [surface_row(c["tag"], bare_surface(**{k: v for k, v in c.items() if k not in ("tag", "description")}))
            for c in site["surfaces"]]
    lines = [LineSpec(**c) for c in site["insulated_lines"]]
    insulated = [surface_row(s.tag, insulated_pipe(**s.pipe_arguments()), ("fluid_temperature",)) for s in lines]
    design = site["design"]
    sizing, cautions = [], set(surface_cautions(bare + insulated))
    for s in lines:
        jacket = [layer.layer() for layer in s.layers[1:]]
        common = dict(insulation_conductivity=design["insulation_conductivity"], outer_layers=jacket,
                      jacket_emissivity=s.jacket_emissivity)
        if s.fluid_temperature > s.air_temperature:
            sun = design["solar_irradiance"] if s.sky_view_fraction > 0 else 0.0
            res = thickness_for_surface_temperature(s.pipe_diameter(), s.fluid_temperature,
                                                    air_temperature=design["hottest_air_temperature"],
                                                    surface_limit=design["touch_limit"], solar_irradiance=sun,
                                                    **common)
            sizing.append(_sizing_rows(s.tag, res, "touch temperature"))
            res = thickness_for_heat_loss(s.pipe_diameter(), s.fluid_temperature, air_temperature=s.air_temperature,
                                          heat_loss_limit=design["heat_loss_limit"], wind_speed=s.wind_speed,
                                          sky_view_fraction=s.sky_view_fraction, **common)
            sizing.append(_sizing_rows(s.tag, res, "heat loss"))
            cautions.add(CAUTION_TOUCH)
        else:
            res = thickness_against_condensation(s.pipe_diameter(), s.fluid_temperature,
                                                 air_temperature=s.air_temperature,
                                                 relative_humidity=s.relative_humidity or 0.75,
                                                 margin=design["condensation_margin"], **common)
            sizing.append(_sizing_rows(s.tag, res, "condensation"))
            cautions.add(CAUTION_CONDENSATION)
    bins = WeatherBins(**site["weather_bins"])
    price = site["energy"]
    energy = []
    for s in lines:
        args_ = s.pipe_arguments()
        for key in ("air_temperature", "wind_speed", "length"):
            args_.pop(key)
        e = annual_energy(args_.pop("pipe_outer_diameter"), args_.pop("fluid_temperature"), args_.pop("layers"),
                          bins=bins, length=s.equivalent_length(), energy_price=price["price_per_kwh"],
                          heating_efficiency=price["heating_efficiency"], cooling_cop=price["cooling_cop"],
                          co2_per_kwh=price["co2_kg_per_kwh"], **args_)
        energy.append({"tag": s.tag, "equivalent length [m]": f"{s.equivalent_length():.0f}",
                       "heat [MWh/yr]": f"{float(e.heat_kwh) / 1000:.2f}",
                       "purchased [MWh/yr]": f"{float(e.purchased_kwh) / 1000:.2f}",
                       f"cost [{price['currency']}/yr]": f"{float(e.cost):.0f}",
                       "CO2 [t/yr]": f"{float(e.co2_kg) / 1000:.2f}"})
    operation, operation_cautions = operation_rows(site["operation"])
    cautions.update(operation_cautions)
    header = f"{site['site']}\n{site['note']}"
    if args.json:
        emit(args, [("bare_surfaces", bare), ("insulated_lines", insulated)], sorted(cautions),
              {"sizing": sizing, "annual_energy": energy, "in_operation": operation})
        return 0
    print(header)
    emit(args, [("Bare surfaces at a known surface temperature", bare),
                 ("Insulated lines (surface temperature solved)", insulated),
                 ("Insulation sizing (design conditions of the site)", sizing),
                 ("Annual energy over the site's weather bins", energy),
                 ("In operation: long line, traced line, outdoor water line, tank", operation)], sorted(cautions))
    return 0


def _bound(value) -> str:
    return "inf" if value is None else f"{value:g}"


def _cmd_correlations(args) -> int:
    records = catalog(args.geometry)
    if args.json:
        json.dump(records, sys.stdout, indent=2, default=lambda x: None if x is None else str(x))
        print()
        return 0
    for r in records:
        ranges = ", ".join(f"{g} {_bound(r[f'{g.lower()}_range'][0])}..{_bound(r[f'{g.lower()}_range'][1])}"
                           for g in ("Ra", "Gr", "Re", "Pr") if r[f"{g.lower()}_range"] is not None)
        print(f"{r['geometry']:<22} {r['key']:<22} {r['mode']:<8} {ranges}\n{'':<22} {r['citation']}")
    return 0


def _cmd_materials(args) -> int:
    from . import materials as library

    if args.file:
        library.load_materials(args.file)
    unit = display_unit("temperature", args.units)
    records = []
    for m in library.materials():
        k = m.conductivity
        low, high = k.valid_range
        record = {"name": m.name, "display_name": m.display_name, "kind": m.kind, "source": m.source, "note": m.note,
                  "max_temperature": m.max_temperature, "min_temperature": m.min_temperature}
        if k.is_constant:
            record["conductivity"] = float(k.constant_value)
        else:
            record.update(data_range=[low, high], conductivity_at_data_range=[float(k.at(max(low, 200.0))),
                                                                              float(k.at(high))],
                          one_point=k.kind == "polynomial" and len(k.coefficients) == 1)
        records.append(record)
    surfaces = {name: {"emissivity": e, "display_name": d, "source": src}
                for name, (e, d, src) in library.jacket_emissivities().items()}
    if args.json:
        json.dump({"materials": records, "jacket_emissivity": surfaces, "units": {"temperature": "K",
                   "conductivity": "W/m/K"}}, sys.stdout, indent=2)
        print()
        return 0

    def temp(t):
        return "-" if t is None or not math.isfinite(t) else f"{from_si(t, 'temperature', unit):.0f}"

    shown = pretty_unit(unit)
    print(f"materials (k in W/m/K; temperatures in {shown}; standards' values are specification maxima)")
    for r in records:
        if "conductivity" in r:
            k_text = f"k {r['conductivity']:g}"
        elif r["one_point"]:
            k_text = f"k {r['conductivity_at_data_range'][1]:.4f} at {temp(r['data_range'][1])} (one point)"
        else:
            k_text = (f"k {r['conductivity_at_data_range'][0]:.4f}..{r['conductivity_at_data_range'][1]:.4f} over "
                      f"{temp(r['data_range'][0])}..{temp(r['data_range'][1])} mean")
        print(f"{r['name']:<30} {k_text}; service {temp(r['min_temperature'])}..{temp(r['max_temperature'])}\n"
              f"{'':<30} {r['display_name']}: {r['source']}")
    print("\njacket surfaces (for --jacket-emissivity)")
    for name, r in surfaces.items():
        print(f"{name:<30} {r['emissivity']:.2f}  {r['display_name']}: {r['source']}")
    return 0


# ----------------------------------------------------------------------------- parser
# (option, input of convlib.units.INPUTS, help) for the surface command; the input drives unit parsing.
_SURFACE_OPTIONS = (
    ("surface-temperature", "temperature", "outer surface temperature, e.g. 90degC or 363.15K"),
    ("air-temperature", "air_temperature", "ambient air temperature, e.g. 20degC"),
    ("surroundings-temperature", "temperature", "temperature of walls/ground seen by the surface (default: air)"),
    ("diameter", "pipe_diameter", "outer diameter of a cylinder or sphere, e.g. 4.5in or 114.3mm"),
    ("length", "length", "cylinder length (vertical: height) or horizontal plate length (default 1 m)"),
    ("height", "size", "vertical plate height"),
    ("width", "size", "plate width"),
    ("wind-speed", "wind_speed", "wind speed, e.g. 3m/s or 10mph (default 0: still air)"),
    ("pressure", "air_pressure", "air pressure, e.g. 79.5kPa (default 1 atm)"),
)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="convlib", description="Heat loss or gain of pipes, ducts and vessels "
                                     "to the surrounding air.")
    parser.add_argument("--version", action="version", version=f"convlib {__version__}")
    sub = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")

    demo = sub.add_parser("demo", help="evaluate the invented demo site")
    output_options(demo, quantities=False)
    demo.set_defaults(func=_cmd_demo)

    surf = sub.add_parser("surface", help="one bare surface at a known temperature")
    surf.add_argument("--shape", default="horizontal_cylinder", choices=list(SHAPES))
    for option, name, text in _SURFACE_OPTIONS:
        add_quantity(surf, option, name, text)
    surf.add_argument("--emissivity", type=float, help="long-wave emissivity 0..1 (default 0.9)")
    surf.add_argument("--sky-view-fraction", type=float, help="part of the view that is sky, 0 indoors (default)")
    surf.add_argument("--natural", help="natural-convection correlation key (see 'convlib correlations')")
    surf.add_argument("--forced", help="forced-convection correlation key")
    surf.add_argument("--tag", default="case", help="label for the output")
    output_options(surf)
    surf.set_defaults(func=_cmd_surface)

    line = sub.add_parser("line", help="an insulated or bare line with a known fluid temperature")
    add_line_options(line)
    line.add_argument("--layer", action="append", help="THICKNESS,CONDUCTIVITY[,NAME] from the pipe outwards, "
                      "e.g. --layer 50mm,0.04,mineral wool --layer 0.7mm,200,jacket "
                      f"[{LAYER_UNITS}]")
    add_quantity(line, "length", "length", "line length (default 1 m)", default="1m")
    line.add_argument("--bare-valves", type=_count, default=0, help="uninsulated flanged gate valves on the line "
                      "(with their joints; needs --nps): their extra heat and equivalent length")
    line.add_argument("--bare-flange-pairs", type=_count, default=0, help="uninsulated flange pairs on the line")
    line.add_argument("--pressure-class", type=int, choices=PRESSURE_CLASSES, default=150,
                      help="ASME B16.5 / B16.10 class of the bare valves and flanges (default 150)")
    condensation_options(line)
    output_options(line)
    line.set_defaults(func=_cmd_line)

    size = sub.add_parser("size", help="insulation thickness for a limit")
    add_line_options(size)
    add_quantity(size, "insulation-conductivity", "insulation_conductivity",
                 "conductivity of the insulation to size, e.g. 0.04W/m/K", required=True)
    size.add_argument("--jacket", action="append", help="fixed layer outside it: THICKNESS,CONDUCTIVITY[,NAME] "
                      f"[{LAYER_UNITS}]")
    add_quantity(size, "surface-limit", "temperature", "highest jacket temperature, e.g. 60degC; sized in still air "
                 "at the hottest ambient")
    add_quantity(size, "hottest-air-temperature", "air_temperature", "touch sizing: design hottest ambient, e.g. "
                 "40degC (default --air-temperature)")
    size.add_argument("--wind-for-touch", action="store_true", help="touch sizing in the given --wind-speed "
                      "(default still air: wind cools the jacket and gives a thinner layer)")
    add_quantity(size, "heat-loss-limit", "heat_per_length", "highest heat flow per length, e.g. 50W/m")
    add_quantity(size, "relative-humidity", "relative_humidity", "design humidity, e.g. 0.8 or 80%: size against "
                 "condensation")
    add_quantity(size, "condensation-margin", "temperature_margin", "condensation sizing: jacket at least this "
                 f"above the dew point, e.g. 2K (default {CONDENSATION_MARGIN:g} K)")
    size.add_argument("--thicknesses", help="available thicknesses to pick from, e.g. 25mm,40mm,50mm,80mm (plain "
                      "numbers mm, --units US: in; default the usual metric steps 20-200 mm)")
    output_options(size)
    size.set_defaults(func=_cmd_size)

    add_study_commands(sub)
    add_operation_commands(sub)
    add_survey_commands(sub)
    add_transient_commands(sub)
    add_vessel_commands(sub)

    mat = sub.add_parser("materials", help="list the insulation and jacket materials (names for --layer and line "
                         "lists), their ranges and sources, and jacket emissivities")
    mat.add_argument("--file", help="also a user's material file (JSON or CSV, see convlib.materials)")
    output_options(mat, quantities=False)
    mat.set_defaults(func=_cmd_materials)

    cat = sub.add_parser("correlations", help="list the correlation registry")
    cat.add_argument("--geometry", help="only this geometry")
    cat.add_argument("--json", action="store_true")
    cat.set_defaults(func=_cmd_correlations)
    return parser


_NEGATIVE = re.compile(r"^-\.?\d")


def _join_negative_values(argv: list[str]) -> list[str]:
    """``--air-temperature -10degC`` as ``--air-temperature=-10degC``: argparse takes a token starting with ``-``
    for an option unless it is a plain number; no option of convlib starts with ``-`` and a digit."""
    out = []
    for token in argv:
        if out and _NEGATIVE.match(token) and out[-1].startswith("--") and "=" not in out[-1]:
            out[-1] = f"{out[-1]}={token}"
        else:
            out.append(token)
    return out


def main(argv=None) -> int:
    argv = _join_negative_values(sys.argv[1:] if argv is None else list(argv))
    args = build_parser().parse_args(argv or ["demo"])  # no command: the demo site
    for warning in deprecated_options(argv):
        print(warning, file=sys.stderr)
    try:
        return args.func(args)
    except BrokenPipeError:  # output piped into e.g. `head`: stop quietly
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0
    except FileExistsError as exc:
        print(f"convlib: error: {exc.args[0] if exc.args else exc} (command line: --overwrite)", file=sys.stderr)
        return 2
    except (ValueError, OSError) as exc:
        message = str(exc).replace("\n", "; ")
        if isinstance(exc, InputError) and "K for " in message:  # property data's kelvin, deep in a solve
            from .units import kelvin_for_reader

            message = kelvin_for_reader(message, getattr(args, "units", "SI") or "SI")
        print(f"convlib: error: {message}", file=sys.stderr)
        return 2


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
