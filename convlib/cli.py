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
``outlet``        temperature along a line with flow; ``trace`` heat-tracing duty; ``freeze`` freeze time;
``tank``          a vertical tank's loss by face
``lines``         a CSV line list: every line at once, totals, results to CSV (exit 1 if rows failed)
``trace``         heat-tracing duty to hold a line at a maintain temperature (minimum ambient, maximum wind)
``freeze``        time for stagnant water in a line to reach 0 degC and to freeze solid
``tank``          a vertical tank face by face (wall, roof, floor), bare or insulated
``correlations``  the correlation registry

Values may carry units (``90degC``, ``4.5in``, ``50mm``, ``10mph``, ``80W/m``);
plain numbers are SI (kelvin for temperatures). Tables print in ``--units SI``
(degC, mm, W/m) or ``US`` (degF, in, Btu/h/ft); ``--json`` prints SI values with
a map of their units. Bad input prints one line naming the field and exits 2.
"""
from __future__ import annotations

import argparse
import json
import os
import sys

import numpy as np

from . import __version__
from .correlations import catalog
from .demo import load_demo_site, operation_rows
from .design import (CAUTION_CONDENSATION, CAUTION_TOUCH, TOUCH_LIMIT_METAL_JACKET, WeatherBins, annual_energy,
                     thickness_against_condensation, thickness_for_heat_loss, thickness_for_surface_temperature)
from .geometry import SHAPES
from .lines import LineSpec
from .operation import TRACING_MARGIN, freeze_time, line_temperature_profile, steam_line, tracing_duty
from .pipe import Layer, insulated_pipe
from .pipe_sizes import SCHEDULES, nominal_pipe
from .surface import bare_surface
from .units import KIND_SI_UNIT, display_unit, from_si, parse
from .vessels import FLOORS, GROUND_CONDUCTIVITY, spherical_tank, vertical_tank

__all__ = ["main", "load_demo_site"]

CAUTION_HOT = ("Caution: surfaces above about 60 degC can burn on contact (ISO 13732-1 gives limits by material "
               "and contact time); local codes and licensed practice govern guarding and insulation.")
CAUTION_COLD = ("Caution: a surface colder than the air gathers condensation where it is below the air's dew "
                "point (and ice below 0 degC); check it against the site's design humidity and local practice.")

#: Output fields: name -> (column label, quantity kind, format). JSON carries SI values of these.
FIELDS = {
    "surface_temperature": ("T_surface", "temperature", "{:.1f}"),
    "fluid_temperature": ("T_fluid", "temperature", "{:.1f}"),
    "air_temperature": ("T_air", "temperature", "{:.1f}"),
    "outer_diameter": ("D_outer", "length", "{:.1f}"),
    "q_per_length": ("q", "heat_per_length", "{:.1f}"),
    "q_total": ("Q", "power", "{:.0f}"),
    "h_convection": ("h_conv", "coefficient", "{:.2f}"),
    "h_radiation": ("h_rad", "coefficient", "{:.2f}"),
    "rayleigh": ("Ra", "dimensionless", "{:.3g}"),
    "reynolds": ("Re", "dimensionless", "{:.3g}"),
    "outlet_temperature": ("T_outlet", "temperature", "{:.2f}"),
    "maintain_temperature": ("T_maintain", "temperature", "{:.1f}"),
    "initial_temperature": ("T_initial", "temperature", "{:.1f}"),
    "heat_loss_per_length": ("q_loss", "heat_per_length", "{:.2f}"),
    "duty_per_length": ("P_trace", "heat_per_length", "{:.2f}"),
    "duty_total": ("P_trace_total", "power", "{:.0f}"),
    "time_to_freezing_point": ("t_to_freezing", "time", "{:.2f}"),
    "time_to_freeze_solid": ("t_freeze_solid", "time", "{:.2f}"),
    "time_total": ("t_total", "time", "{:.2f}"),
    "area": ("A", "area", "{:.2f}"),
    "q_per_area": ("q/A", "heat_flux", "{:.1f}"),
    "steam_pressure": ("p_steam", "pressure", "{:.4g}"),
    "condensate_rate": ("condensate", "mass_flow", "{:.2f}"),
}


def _row(tag: str, r, extra_fields=()) -> dict:
    row = {"tag": tag}
    for name in ("surface_temperature", *extra_fields, "air_temperature", "q_per_length", "q_total",
                 "h_convection", "h_radiation", "rayleigh", "reynolds"):
        row[name] = float(getattr(r, name))
    row["regime"] = f"{r.regime_names().item()}, {r.flow_regime_names().item()}"
    row["warnings"] = r.warning_messages()
    return row


def _cautions(rows: list[dict]) -> list[str]:
    out = []
    if any(row["surface_temperature"] > TOUCH_LIMIT_METAL_JACKET for row in rows):
        out.append(CAUTION_HOT)
    if any(row["surface_temperature"] < row["air_temperature"] for row in rows):
        out.append(CAUTION_COLD)
    return out


def _table(rows: list[dict], units: str, out=sys.stdout) -> None:
    if not rows:
        return
    names = [n for n in rows[0] if n not in ("warnings",)]
    heads, cells = [], [[] for _ in rows]
    for name in names:
        if name in FIELDS:
            label, kind, fmt = FIELDS[name]
            unit = display_unit(kind, units)
            heads.append(f"{label} [{_pretty(unit)}]" if unit else label)
            for cell, row in zip(cells, rows):
                cell.append(fmt.format(float(from_si(row[name], kind, unit))))
        else:
            heads.append(name)
            for cell, row in zip(cells, rows):
                cell.append(str(row[name]))
    widths = [max(len(h), *(len(c[i]) for c in cells)) for i, h in enumerate(heads)]
    print("  ".join(h.ljust(w) for h, w in zip(heads, widths)).rstrip(), file=out)
    print("  ".join("-" * w for w in widths), file=out)
    for c in cells:
        print("  ".join(v.ljust(w) for v, w in zip(c, widths)).rstrip(), file=out)
    for row in rows:
        for w in row.get("warnings", ()):
            print(f"  ! {row['tag']}: {w}", file=out)


def _pretty(unit: str) -> str:
    return (unit.replace("degC", "°C").replace("degF", "°F").replace("delta_", "").replace("**2", "²")
            .replace("hour", "h").replace("foot", "ft").replace("inch", "in"))


def _units_map(rows: list[dict]) -> dict:
    return {n: KIND_SI_UNIT[FIELDS[n][1]] for r in rows[:1] for n in r if n in FIELDS}


def _emit(args, sections: list[tuple[str, list[dict]]], cautions: list[str], extra: dict | None = None) -> None:
    if args.json:
        payload = {title: {"results": rows, "units": _units_map(rows)} for title, rows in sections}
        payload.update(extra or {})
        payload["cautions"] = cautions
        payload["convlib_version"] = __version__
        json.dump(payload, sys.stdout, indent=2)
        print()
        return
    for title, rows in sections:
        print(f"\n{title}")
        _table(rows, args.units)
    for line in (extra or {}).get("text", []):
        print(line)
    if cautions:
        print()
    for c in cautions:
        print(c)


# ----------------------------------------------------------------------------- commands
def _cmd_surface(args) -> int:
    kwargs = {}
    for option, kind, _ in _SURFACE_OPTIONS:
        text = getattr(args, option.replace("-", "_"))
        if text is not None:
            kwargs[option.replace("-", "_")] = parse(text, kind, option)
    for name in ("emissivity", "sky_view_fraction"):
        if getattr(args, name) is not None:
            kwargs[name] = getattr(args, name)
    for required in ("surface_temperature", "air_temperature"):
        if required not in kwargs:
            raise ValueError(f"--{required.replace('_', '-')} is required")
    if args.shape in ("horizontal_cylinder", "vertical_cylinder") and "length" not in kwargs:
        kwargs["length"] = 1.0
    rows = [_row(args.tag, bare_surface(args.shape, natural=args.natural, forced=args.forced, **kwargs))]
    _emit(args, [("surface", rows)], _cautions(rows))
    return 0


def _parse_layer(text: str, index: int) -> Layer:
    parts = [p.strip() for p in text.split(",")]
    if len(parts) not in (2, 3):
        raise ValueError(f"--layer {text!r}: write THICKNESS,CONDUCTIVITY[,NAME], e.g. 50mm,0.04,mineral wool")
    thickness = parse(parts[0], "length", f"layer {index} thickness")
    conductivity = parse(parts[1], "conductivity", f"layer {index} conductivity")
    return Layer(thickness, conductivity, name=parts[2] if len(parts) == 3 else f"layer {index}")


def _pipe_diameter(args) -> float:
    if (args.nps is None) == (args.pipe_diameter is None):
        raise ValueError("give the pipe as --nps (with --schedule) or as --pipe-diameter, not both")
    if args.nps is not None:
        return nominal_pipe(args.nps, args.schedule).outer_diameter
    return parse(args.pipe_diameter, "length", "pipe-diameter")


def _outside(args) -> dict:
    """Wind, jacket emissivity, sky view and a given convective coefficient of a line's outer surface."""
    given = None if args.convection_coefficient is None else parse(args.convection_coefficient, "coefficient",
                                                                   "convection-coefficient")
    return dict(wind_speed=parse(args.wind_speed, "speed", "wind-speed"), jacket_emissivity=args.jacket_emissivity,
                sky_view_fraction=args.sky_view_fraction, convection_coefficient=given)


def _conditions(args) -> dict:
    return dict(air_temperature=parse(args.air_temperature, "temperature", "air-temperature"), **_outside(args))


def _cmd_line(args) -> int:
    layers = [_parse_layer(t, i + 1) for i, t in enumerate(args.layer or [])]
    r = insulated_pipe(_pipe_diameter(args), parse(args.fluid_temperature, "temperature", "fluid-temperature"),
                       layers, length=parse(args.length, "length", "length"), **_conditions(args))
    rows = [_row(args.tag, r, ("fluid_temperature", "outer_diameter"))]
    _emit(args, [("line", rows)], _cautions(rows))
    return 0


def _cmd_trace(args) -> int:
    layers = [_parse_layer(t, i + 1) for i, t in enumerate(args.layer or [])]
    maintain = parse(args.maintain_temperature, "temperature", "maintain-temperature")
    ambient = parse(args.minimum_ambient, "temperature", "minimum-ambient")
    r = tracing_duty(_pipe_diameter(args), maintain, layers, air_temperature=ambient, margin=args.margin,
                     length=parse(args.length, "length", "length"), **_outside(args))
    row = {"tag": args.tag, "maintain_temperature": maintain, "air_temperature": ambient,
           "surface_temperature": float(r.surface_temperature), "heat_loss_per_length": float(r.heat_loss_per_length),
           "margin": float(r.margin), "duty_per_length": float(r.duty_per_length), "duty_total": float(r.duty_total),
           "warnings": r.pipe.warning_messages()}
    _emit(args, [("heat tracing", [row])], [*r.notes, *r.cautions])
    return 0


def _cmd_outlet(args) -> int:
    layers = [_parse_layer(t, i + 1) for i, t in enumerate(args.layer or [])]
    inlet = parse(args.inlet_temperature, "temperature", "inlet-temperature")
    air = parse(args.air_temperature, "temperature", "air-temperature")
    mass_flow = parse(args.mass_flow, "mass_flow", "mass-flow")
    length = parse(args.length, "length", "length")
    r = line_temperature_profile(_pipe_diameter(args), inlet, layers, mass_flow=mass_flow, length=length,
                                 air_temperature=air, fluid=args.fluid,
                                 fluid_pressure=parse(args.fluid_pressure, "pressure", "fluid-pressure"),
                                 **_outside(args))
    row = {"tag": args.tag, "fluid_temperature": inlet, "outlet_temperature": float(r.outlet_temperature),
           "air_temperature": air, "q_total": float(r.q_total), "warnings": []}
    _emit(args, [("temperature along the line", [row])], [],
          {"text": [f"energy balance: loss {float(r.q_total):.6g} W vs enthalpy drop {float(r.enthalpy_drop):.6g} W "
                    f"({float(r.energy_balance_error):.1e} relative); {int(np.max(r.steps))} steps"]}
          if not args.json else {"profile": {"position_m": np.asarray(r.position).ravel().tolist(),
                                             "temperature_K": np.asarray(r.temperature).ravel().tolist()}})
    return 0


def _cmd_steam(args) -> int:
    layers = [_parse_layer(t, i + 1) for i, t in enumerate(args.layer or [])]
    pressure = parse(args.steam_pressure, "pressure", "steam-pressure")
    air = parse(args.air_temperature, "temperature", "air-temperature")
    r = steam_line(_pipe_diameter(args), pressure, layers, air_temperature=air,
                   length=parse(args.length, "length", "length"), **_outside(args))
    row = {"tag": args.tag, "steam_pressure": pressure, "fluid_temperature": float(r.saturation_temperature),
           "air_temperature": air, "surface_temperature": float(r.pipe.surface_temperature),
           "q_per_length": float(r.q_per_length), "q_total": float(r.q_total),
           "condensate_rate": float(r.condensate_rate) / 3600.0, "warnings": r.pipe.warning_messages()}
    _emit(args, [("saturated steam line", [row])], [*_cautions([row]), *r.cautions])
    return 0


def _cmd_freeze(args) -> int:
    layers = [_parse_layer(t, i + 1) for i, t in enumerate(args.layer or [])]
    d = _pipe_diameter(args)
    if args.wall_thickness is not None:
        wall = parse(args.wall_thickness, "length", "wall-thickness")
    elif args.nps is not None:
        wall = nominal_pipe(args.nps, args.schedule).wall_thickness
    else:
        raise ValueError("--wall-thickness is required with --pipe-diameter (with --nps it comes from the schedule)")
    initial = parse(args.initial_temperature, "temperature", "initial-temperature")
    ambient = parse(args.minimum_ambient, "temperature", "minimum-ambient")
    r = freeze_time(d, wall, initial, layers, air_temperature=ambient, **_outside(args))
    row = {"tag": args.tag, "initial_temperature": initial, "air_temperature": ambient}
    if not bool(r.never_freezes):
        row.update(time_to_freezing_point=3600.0 * float(r.hours_to_freezing_point),
                   time_to_freeze_solid=3600.0 * float(r.hours_to_freeze_solid),
                   time_total=3600.0 * float(r.hours_total))
    _emit(args, [("freeze time (stagnant water)", [row])], [*r.notes, *r.cautions])
    return 0


def _cmd_tank(args) -> int:
    def layers(texts):
        return [_parse_layer(t, i + 1) for i, t in enumerate(texts or [])]

    if (args.surface_temperature is None) == (args.fluid_temperature is None):
        raise ValueError("give --surface-temperature (a bare tank) or --fluid-temperature (with layers), not both")
    temperature = {"surface_temperature" if args.surface_temperature else "fluid_temperature":
                   parse(args.surface_temperature or args.fluid_temperature, "temperature",
                         "surface-temperature" if args.surface_temperature else "fluid-temperature")}
    common = dict(air_temperature=parse(args.air_temperature, "temperature", "air-temperature"),
                  emissivity=args.emissivity, wind_speed=parse(args.wind_speed, "speed", "wind-speed"),
                  outdoor=args.outdoor, convection_coefficient=None if args.convection_coefficient is None else
                  parse(args.convection_coefficient, "coefficient", "convection-coefficient"), **temperature)
    diameter = parse(args.diameter, "length", "diameter")
    if args.shape == "sphere":
        if args.height is not None or args.roof_layer or args.floor_layer:
            raise ValueError("a sphere takes no --height, --roof-layer or --floor-layer (its layers: --wall-layer)")
        if (args.wall_thickness is None) != (args.wall_conductivity is None):
            raise ValueError("give --wall-thickness and --wall-conductivity together")
        wall = {} if args.wall_thickness is None else dict(
            wall_thickness=parse(args.wall_thickness, "length", "wall-thickness"),
            wall_conductivity=parse(args.wall_conductivity, "conductivity", "wall-conductivity"))
        inner = None if args.inner_coefficient is None else parse(args.inner_coefficient, "coefficient",
                                                                  "inner-coefficient")
        r = spherical_tank(diameter, layers=layers(args.wall_layer), inner_coefficient=inner, **wall, **common)
    else:
        if args.height is None:
            raise ValueError("--height is required for a vertical tank")
        if args.wall_thickness is not None or args.inner_coefficient is not None:
            raise ValueError("--wall-thickness, --wall-conductivity and --inner-coefficient are for --shape sphere; "
                             "a vertical tank's shell is taken as thin")
        ground = None if args.ground_temperature is None else parse(args.ground_temperature, "temperature",
                                                                    "ground-temperature")
        r = vertical_tank(diameter, parse(args.height, "length", "height"), wall_layers=layers(args.wall_layer),
                          roof_layers=layers(args.roof_layer), floor=args.floor,
                          floor_layers=layers(args.floor_layer), ground_temperature=ground,
                          ground_conductivity=args.ground_conductivity, **common)
    rows = [{"tag": f.name, "shape": f.shape, "area": float(f.area), "surface_temperature": float(f.surface_temperature),
             "q_per_area": float(f.q_per_area), "q_total": float(f.q_total)} for f in r.faces]
    total = float(r.q_total)
    extra = {"q_total": total, "notes": list(r.notes)}
    if not args.json:
        extra["text"] = [f"\ntotal {total:.0f} W", *r.notes]
    _emit(args, [("tank faces", rows)], [], extra)
    return 0


def _sizing_rows(tag, result, kind_label) -> dict:
    return {"tag": tag, "limit on": kind_label,
            "required thickness [mm]": _mm(result.required_thickness),
            "commercial thickness [mm]": _mm(result.commercial_thickness),
            "notes": "; ".join(result.messages) or "-"}


def _mm(value) -> str:
    value = float(value)
    return "not reachable" if np.isnan(value) else f"{value * 1000:.1f}"


def _cmd_size(args) -> int:
    d = _pipe_diameter(args)
    tf = parse(args.fluid_temperature, "temperature", "fluid-temperature")
    k = parse(args.insulation_conductivity, "conductivity", "insulation-conductivity")
    outer = [_parse_layer(args.jacket, 1)] if args.jacket else []
    cond = _conditions(args)
    chosen = [name for name in ("touch_limit", "heat_loss_limit", "relative_humidity") if getattr(args, name)]
    if len(chosen) != 1:
        raise ValueError("give exactly one limit: --touch-limit, --heat-loss-limit or --relative-humidity")
    if args.touch_limit:
        res = thickness_for_surface_temperature(d, tf, insulation_conductivity=k, outer_layers=outer,
                                                surface_limit=parse(args.touch_limit, "temperature", "touch-limit"),
                                                **cond)
        label = "touch temperature"
    elif args.heat_loss_limit:
        res = thickness_for_heat_loss(d, tf, insulation_conductivity=k, outer_layers=outer,
                                      heat_loss_limit=parse(args.heat_loss_limit, "heat_per_length",
                                                            "heat-loss-limit"), **cond)
        label = "heat loss"
    else:
        cond.pop("wind_speed")
        cond.pop("sky_view_fraction")
        res = thickness_against_condensation(d, tf, insulation_conductivity=k, outer_layers=outer,
                                             relative_humidity=args.relative_humidity, **cond)
        label = "condensation"
    row = _sizing_rows(args.tag, res, label)
    if args.json:
        json.dump({"sizing": {**row, "required_thickness_m": _nan_to_none(res.required_thickness),
                              "commercial_thickness_m": _nan_to_none(res.commercial_thickness),
                              "achievable": bool(res.achievable)},
                   "cautions": list(res.cautions), "convlib_version": __version__}, sys.stdout, indent=2)
        print()
        return 0
    _table([row], args.units)
    for c in res.cautions:
        print(c)
    return 0


def _nan_to_none(value):
    value = float(value)
    return None if np.isnan(value) else value


def _cmd_demo(args) -> int:
    site = load_demo_site()
    bare = [_row(c["tag"], bare_surface(**{k: v for k, v in c.items() if k not in ("tag", "description")}))
            for c in site["surfaces"]]
    lines = [LineSpec(**c) for c in site["insulated_lines"]]
    insulated = [_row(s.tag, insulated_pipe(**s.pipe_arguments()), ("fluid_temperature",)) for s in lines]
    design = site["design"]
    sizing, cautions = [], set(_cautions(bare + insulated))
    for s in lines:
        jacket = [layer.layer() for layer in s.layers[1:]]
        common = dict(insulation_conductivity=design["insulation_conductivity"], outer_layers=jacket,
                      jacket_emissivity=s.jacket_emissivity)
        if s.fluid_temperature > s.air_temperature:
            sun = design["solar_irradiance"] if s.sky_view_fraction > 0 else 0.0
            res = thickness_for_surface_temperature(s.outer_diameter(), s.fluid_temperature,
                                                    air_temperature=design["hottest_air_temperature"],
                                                    surface_limit=design["touch_limit"], solar_irradiance=sun,
                                                    **common)
            sizing.append(_sizing_rows(s.tag, res, "touch temperature"))
            res = thickness_for_heat_loss(s.outer_diameter(), s.fluid_temperature, air_temperature=s.air_temperature,
                                          heat_loss_limit=design["heat_loss_limit"], wind_speed=s.wind_speed,
                                          sky_view_fraction=s.sky_view_fraction, **common)
            sizing.append(_sizing_rows(s.tag, res, "heat loss"))
            cautions.add(CAUTION_TOUCH)
        else:
            res = thickness_against_condensation(s.outer_diameter(), s.fluid_temperature,
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
        _emit(args, [("bare_surfaces", bare), ("insulated_lines", insulated)], sorted(cautions),
              {"sizing": sizing, "annual_energy": energy, "in_operation": operation})
        return 0
    print(header)
    _emit(args, [("Bare surfaces at a known surface temperature", bare),
                 ("Insulated lines (surface temperature solved)", insulated),
                 ("Insulation sizing (design conditions of the site)", sizing),
                 ("Annual energy over the site's weather bins", energy),
                 ("In operation: long line, traced line, outdoor water line, tank", operation)], sorted(cautions))
    return 0


def _progress_bar(fraction: float, text: str) -> None:
    """A one-line progress bar on stderr (only when stderr is a terminal or CONVLIB_PROGRESS is set)."""
    if not (sys.stderr.isatty() or os.environ.get("CONVLIB_PROGRESS")):
        return
    width = 30
    filled = int(round(width * min(max(fraction, 0.0), 1.0)))
    sys.stderr.write(f"\r[{'#' * filled}{'.' * (width - filled)}] {fraction * 100:5.1f} % {text[:40]:<40}")
    if fraction >= 1.0:
        sys.stderr.write("\n")
    sys.stderr.flush()


def _load_spec(args):
    from .study import StudySpec, load_demo_study

    if args.demo == bool(args.study):
        raise ValueError("give a study file or --demo (the invented demo study), not both")
    if args.demo:
        return load_demo_study()
    try:
        text = open(args.study, encoding="utf-8").read()
    except OSError as exc:
        raise ValueError(f"cannot read study file {args.study}: {exc.strerror}") from None
    try:
        return StudySpec.model_validate_json(text)
    except ValueError as exc:
        raise ValueError(f"study file {args.study}: {_pydantic_text(exc)}") from None


def _pydantic_text(exc) -> str:
    errors = getattr(exc, "errors", None)
    if callable(errors):
        return "; ".join(f"{'.'.join(str(p) for p in e['loc']) or '(file)'}: {e['msg']}" for e in errors())
    return str(exc)


def study_summary(spec, result, units: str = "SI") -> list[str]:
    """Readable lines summarizing a study result (used by `run` and the report)."""
    def show(value, kind):
        unit = display_unit(kind, units)
        return f"{float(from_si(value, kind, unit)):.4g} {_pretty(unit)}".strip()

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

    spec = _load_spec(args)
    result = run_study(spec, progress=_progress_bar)
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


def _cmd_verify(args) -> int:
    from . import snapshot

    report = snapshot.verify(args.snapshot, progress=_progress_bar)
    if args.json:
        json.dump({"agrees": report.agrees, "text": report.text()}, sys.stdout, indent=2)
        print()
    else:
        print(report.text())
    return 0 if report.agrees else 1


def _cmd_compare(args) -> int:
    from . import snapshot

    d = snapshot.diff(args.first, args.second)
    if args.json:
        json.dump({"identical": d.identical, "text": d.text()}, sys.stdout, indent=2)
        print()
    else:
        print(d.text())
    return 0


def _weather_bins(args):
    """Weather bins from --bins FILE.json ({"air_temperature": [...], "wind_speed": [...], "hours": [...]},
    numbers SI or text with units such as "-5degC"), the demo site's bins with --demo, else None."""
    if args.bins:
        try:
            data = json.loads(open(args.bins, encoding="utf-8").read())
        except (OSError, json.JSONDecodeError) as exc:
            raise ValueError(f"cannot read weather bins {args.bins}: {exc}") from None
        missing = {"air_temperature", "hours"} - set(data)
        if missing:
            raise ValueError(f"weather bins {args.bins}: missing {', '.join(sorted(missing))}")
        air = [parse(v, "temperature", "bins air_temperature") for v in data["air_temperature"]]
        wind = [parse(v, "speed", "bins wind_speed") for v in data.get("wind_speed", [0.0] * len(air))]
        return WeatherBins(air, wind, data["hours"])
    if args.demo:
        return WeatherBins(**load_demo_site()["weather_bins"])
    return None


_LINE_UNITS = {"length": "m", "equivalent_length": "m", "outer_diameter": "m", "fluid_temperature": "K",
               "air_temperature": "K", "surface_temperature": "K", "dew_point": "K", "q_per_length": "W/m",
               "q_total": "W", "operating_hours": "h", "heat_kwh": "kWh", "purchased_kwh": "kWh", "co2_kg": "kg"}


def _cmd_lines(args) -> int:
    from .linelist import demo_lines_path, run_line_list, write_results_csv

    if args.demo == bool(args.input):
        raise ValueError("give a line-list CSV file or --demo (the invented Fernhill line list), not both")
    source = demo_lines_path() if args.demo else args.input
    energy = load_demo_site()["energy"] if args.demo else {}
    price = args.energy_price if args.energy_price is not None else energy.get("price_per_kwh", 0.0)
    efficiency = args.heating_efficiency or energy.get("heating_efficiency", 0.85)
    cop = args.cooling_cop or energy.get("cooling_cop", 3.0)
    co2 = args.co2_per_kwh if args.co2_per_kwh is not None else energy.get("co2_kg_per_kwh", 0.0)
    try:
        result = run_line_list(source, _weather_bins(args), energy_price=price, heating_efficiency=efficiency,
                               cooling_cop=cop, co2_per_kwh=co2, progress=_progress_bar)
    except OSError as exc:
        raise ValueError(f"cannot read line list {args.input}: {exc.strerror}") from None
    if args.output:
        write_results_csv(result, args.output)
    for e in result.errors:
        print(f"convlib: row {e.row} ({e.tag or 'no tag'}): {e.reason}", file=sys.stderr)
    if args.json:
        json.dump({"lines": {"results": result.rows(), "units": _LINE_UNITS},
                   "errors": [e._asdict() for e in result.errors], "totals": result.totals,
                   "settings": result.settings, "output": args.output, "cautions": list(result.cautions),
                   "convlib_version": __version__}, sys.stdout, indent=2)
        print()
        return 1 if result.errors else 0
    rows = []
    for row in result.rows():
        flags = [name for name, on in (("touch", row["touch_flag"]), ("condensation", row["condensation_flag"])) if on]
        rows.append({"tag": row["tag"], "location": row["location"],
                     "surface_temperature": row["surface_temperature"], "q_per_length": row["q_per_length"],
                     "q_total": row["q_total"], "heat [MWh/yr]": f"{row['heat_kwh'] / 1000:.2f}",
                     "cost/yr": f"{row['cost']:.0f}", "flags": ", ".join(flags) or "-",
                     "warnings": [row["notes"]] if row["notes"] else []})
    _table(rows, args.units)
    t = result.totals
    print(f"\n{t['lines']} lines computed, {t['rows_with_errors']} row(s) with errors; total "
          f"{t['q_total'] / 1000:.1f} kW, {t['heat_kwh'] / 1000:.1f} MWh/yr, purchased "
          f"{t['purchased_kwh'] / 1000:.1f} MWh/yr, cost {t['cost']:.0f}/yr, CO2 {t['co2_kg'] / 1000:.1f} t/yr; "
          f"{t['touch_flags']} touch and {t['condensation_flags']} condensation flag(s) (flags, not verdicts)")
    if args.output:
        print(f"results written to {args.output}")
    for c in result.cautions:
        print(c)
    return 1 if result.errors else 0


def _cmd_report(args) -> int:
    try:  # the report shares the dashboard's figures (plotly): the one place the CLI reaches that layer
        from dashboard.report import write_report
    except ImportError as exc:
        raise ValueError(f"the HTML report needs the dashboard extra (pip install 'convlib[dashboard]'): {exc}") \
            from None
    out = args.output or str(args.snapshot).removesuffix(".json") + ".html"
    if os.path.exists(out) and not args.overwrite:
        raise FileExistsError(f"{out} already exists")
    path = write_report(args.snapshot, out, units=args.units)
    print(f"report written: {path}")
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


# ----------------------------------------------------------------------------- parser
# (option, kind, help) for the surface command; kind drives unit parsing.
_SURFACE_OPTIONS = (
    ("surface-temperature", "temperature", "outer surface temperature, e.g. 90degC or 363.15 (K)"),
    ("air-temperature", "temperature", "ambient air temperature, e.g. 20degC"),
    ("surroundings-temperature", "temperature", "temperature of walls/ground seen by the surface (default: air)"),
    ("diameter", "length", "outer diameter of a cylinder or sphere, e.g. 4.5in or 0.1143 (m)"),
    ("length", "length", "cylinder length (vertical: height) or horizontal plate length"),
    ("height", "length", "vertical plate height"),
    ("width", "length", "plate width"),
    ("wind-speed", "speed", "wind speed, e.g. 3 or 10mph (default 0: still air)"),
    ("pressure", "pressure", "air pressure, e.g. 101325 or 79.5kPa (default 1 atm)"),
)


_GIVEN_COEFFICIENT_HELP = ("outer convective coefficient to use instead of the correlations, e.g. 10 (W/m2/K) "
                           "when a specification prescribes one; radiation still counts (emissivity 0 for a "
                           "combined value)")


def _output_options(p) -> None:
    p.add_argument("--json", action="store_true", help="print JSON (SI values) instead of a table")
    p.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the printed table (default SI)")


def _pipe_options(p) -> None:
    p.add_argument("--fluid-temperature", required=True, help="fluid temperature, e.g. 180degC")
    p.add_argument("--air-temperature", required=True, help="ambient air temperature, e.g. 20degC")
    _pipe_size_options(p)


def _pipe_size_options(p) -> None:
    p.add_argument("--nps", type=float, help="nominal pipe size, e.g. 4 or 0.75")
    p.add_argument("--schedule", default="40", choices=SCHEDULES, help="pipe schedule (default 40)")
    p.add_argument("--pipe-diameter", help="pipe outer diameter instead of --nps, e.g. 114.3mm")
    p.add_argument("--wind-speed", default="0", help="wind speed (default 0: still air)")
    p.add_argument("--jacket-emissivity", type=float, default=0.9, help="emissivity of the outer surface")
    p.add_argument("--sky-view-fraction", type=float, default=0.0, help="part of the view that is sky (0 indoors)")
    p.add_argument("--convection-coefficient", help=_GIVEN_COEFFICIENT_HELP)
    p.add_argument("--tag", default="line", help="label for the output")


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="convlib", description="Heat loss or gain of pipes, ducts and vessels "
                                     "to the surrounding air.")
    parser.add_argument("--version", action="version", version=f"convlib {__version__}")
    sub = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")

    demo = sub.add_parser("demo", help="evaluate the invented demo site")
    _output_options(demo)
    demo.set_defaults(func=_cmd_demo)

    surf = sub.add_parser("surface", help="one bare surface at a known temperature")
    surf.add_argument("--shape", default="horizontal_cylinder", choices=list(SHAPES))
    for option, _, text in _SURFACE_OPTIONS:
        surf.add_argument(f"--{option}", help=text)
    surf.add_argument("--emissivity", type=float, help="long-wave emissivity 0..1 (default 0.9)")
    surf.add_argument("--sky-view-fraction", type=float, help="part of the view that is sky, 0 indoors (default)")
    surf.add_argument("--natural", help="natural-convection correlation key (see 'convlib correlations')")
    surf.add_argument("--forced", help="forced-convection correlation key")
    surf.add_argument("--tag", default="case", help="label for the output")
    _output_options(surf)
    surf.set_defaults(func=_cmd_surface)

    line = sub.add_parser("line", help="an insulated or bare line with a known fluid temperature")
    _pipe_options(line)
    line.add_argument("--layer", action="append", help="THICKNESS,CONDUCTIVITY[,NAME] from the pipe outwards, "
                      "e.g. --layer 50mm,0.04,mineral wool --layer 0.7mm,200,jacket")
    line.add_argument("--length", default="1", help="line length (default 1 m)")
    _output_options(line)
    line.set_defaults(func=_cmd_line)

    size = sub.add_parser("size", help="insulation thickness for a limit")
    _pipe_options(size)
    size.add_argument("--insulation-conductivity", required=True, help="W/m/K of the insulation to size")
    size.add_argument("--jacket", help="fixed layer outside it: THICKNESS,CONDUCTIVITY[,NAME]")
    size.add_argument("--touch-limit", help="highest jacket temperature, e.g. 60degC (give the hottest ambient)")
    size.add_argument("--heat-loss-limit", help="highest heat flow per metre, e.g. 50 (W/m)")
    size.add_argument("--relative-humidity", type=float, help="design humidity 0..1: size against condensation")
    _output_options(size)
    size.set_defaults(func=_cmd_size)

    run = sub.add_parser("run", help="run a study file (or the demo study) and optionally save a snapshot")
    run.add_argument("study", nargs="?", help="study file (JSON)")
    run.add_argument("--demo", action="store_true", help="the invented demo study")
    run.add_argument("--save", metavar="SNAPSHOT", help="save spec + results + provenance to this JSON file")
    run.add_argument("--author", default="", help="author recorded in the snapshot")
    run.add_argument("--note", default="", help="note recorded in the snapshot")
    run.add_argument("--overwrite", action="store_true", help="replace an existing snapshot file")
    _output_options(run)
    run.set_defaults(func=_cmd_run)

    ver = sub.add_parser("verify", help="re-run a snapshot's study and say whether the numbers still agree "
                         "(exit 1 if not)")
    ver.add_argument("snapshot", help="snapshot file (JSON)")
    ver.add_argument("--json", action="store_true")
    ver.set_defaults(func=_cmd_verify)

    cmp_ = sub.add_parser("compare", help="changed inputs and results between two snapshots")
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
    lines.add_argument("input", nargs="?", help="line-list CSV (see convlib.linelist for the columns)")
    lines.add_argument("--demo", action="store_true", help="the invented Fernhill line list, weather and prices")
    lines.add_argument("-o", "--output", help="write per-line results, errors and totals to this CSV")
    lines.add_argument("--bins", help="weather bins JSON: air_temperature, wind_speed, hours (outdoor lines)")
    lines.add_argument("--energy-price", type=float, help="price per purchased kWh (default 0)")
    lines.add_argument("--heating-efficiency", type=float, help="efficiency of the heat source (default 0.85)")
    lines.add_argument("--cooling-cop", type=float, help="COP of the chiller (default 3)")
    lines.add_argument("--co2-per-kwh", type=float, help="kg CO2 per purchased kWh (default 0)")
    _output_options(lines)
    lines.set_defaults(func=_cmd_lines)

    layer_help = "THICKNESS,CONDUCTIVITY[,NAME] from the pipe outwards, e.g. --layer 25mm,0.04,mineral wool"
    outlet = sub.add_parser("outlet", help="temperature along a line with flow: outlet temperature and loss")
    _pipe_size_options(outlet)
    outlet.add_argument("--inlet-temperature", required=True, help="fluid temperature at the inlet, e.g. 115degC")
    outlet.add_argument("--air-temperature", required=True, help="ambient air temperature, e.g. -5degC")
    outlet.add_argument("--mass-flow", required=True, help="mass flow, e.g. 12 (kg/s) or 43000 kg/h")
    outlet.add_argument("--length", required=True, help="line length, e.g. 1400 or 1.4km")
    outlet.add_argument("--fluid", default="Water", help="CoolProp fluid name (default Water)")
    outlet.add_argument("--fluid-pressure", default="101325", help="fluid pressure, e.g. 6bar (default 1 atm)")
    outlet.add_argument("--layer", action="append", help=layer_help)
    _output_options(outlet)
    outlet.set_defaults(func=_cmd_outlet)

    trace = sub.add_parser("trace", help="heat-tracing duty to hold a line at a maintain temperature")
    _pipe_size_options(trace)
    trace.add_argument("--maintain-temperature", required=True, help="temperature the tracer holds, e.g. 5degC")
    trace.add_argument("--minimum-ambient", required=True, help="design minimum air temperature, e.g. -20degC "
                       "(give the design maximum wind as --wind-speed)")
    trace.add_argument("--layer", action="append", help=layer_help)
    trace.add_argument("--margin", type=float, default=TRACING_MARGIN,
                       help=f"design margin on the loss (default {TRACING_MARGIN:g})")
    trace.add_argument("--length", default="1", help="traced length (default 1 m)")
    _output_options(trace)
    trace.set_defaults(func=_cmd_trace)

    steam = sub.add_parser("steam", help="a saturated steam line: heat loss and the condensate it forms")
    steam.add_argument("--steam-pressure", required=True, help="absolute steam pressure, e.g. 3.5bar")
    steam.add_argument("--air-temperature", required=True, help="ambient air temperature, e.g. -10degC")
    steam.add_argument("--length", default="1", help="line length (default 1 m)")
    steam.add_argument("--layer", action="append", help=layer_help)
    _pipe_size_options(steam)
    _output_options(steam)
    steam.set_defaults(func=_cmd_steam)

    freeze = sub.add_parser("freeze", help="time for stagnant water in a line to reach 0 degC and to freeze solid")
    _pipe_size_options(freeze)
    freeze.add_argument("--wall-thickness", help="pipe wall, e.g. 3.91mm (default from --nps and --schedule)")
    freeze.add_argument("--initial-temperature", required=True, help="water temperature when flow stops, e.g. 10degC")
    freeze.add_argument("--minimum-ambient", required=True, help="design minimum air temperature, e.g. -15degC")
    freeze.add_argument("--layer", action="append", help=layer_help)
    _output_options(freeze)
    freeze.set_defaults(func=_cmd_freeze)

    tank = sub.add_parser("tank", help="a vertical tank face by face (wall, roof, floor) or a sphere (shell)")
    tank.add_argument("--shape", choices=("vertical", "sphere"), default="vertical",
                      help="vertical cylindrical tank (default) or spherical vessel")
    tank.add_argument("--diameter", required=True, help="tank diameter (of a sphere: outer shell), e.g. 10m")
    tank.add_argument("--height", help="wall height of a vertical tank, e.g. 12m")
    tank.add_argument("--wall-thickness", help="sphere: shell wall, e.g. 20mm (with --wall-conductivity)")
    tank.add_argument("--wall-conductivity", help="sphere: shell wall conductivity, e.g. 45 (W/m/K)")
    tank.add_argument("--inner-coefficient", help="sphere: film coefficient inside, e.g. 200 (W/m2/K)")
    tank.add_argument("--convection-coefficient", help=_GIVEN_COEFFICIENT_HELP)
    tank.add_argument("--surface-temperature", help="known temperature of every face (a bare tank), e.g. 60degC")
    tank.add_argument("--fluid-temperature", help="temperature of the contents (with layers), e.g. 80degC")
    tank.add_argument("--air-temperature", required=True, help="ambient air temperature, e.g. 10degC")
    tank.add_argument("--wind-speed", default="0", help="wind speed (default 0: still air)")
    tank.add_argument("--emissivity", type=float, default=0.9, help="emissivity of the outer surfaces")
    tank.add_argument("--outdoor", action="store_true", help="faces see the sky (wall 0.5, roof 1)")
    for face in ("wall", "roof", "floor"):
        tank.add_argument(f"--{face}-layer", action="append", help=f"{face} layer THICKNESS,CONDUCTIVITY[,NAME]")
    tank.add_argument("--floor", choices=FLOORS, default="ground", help="on the ground (default), open underneath, "
                      "or left out")
    tank.add_argument("--ground-temperature", help="undisturbed soil temperature (default the air temperature)")
    tank.add_argument("--ground-conductivity", type=float, default=GROUND_CONDUCTIVITY,
                      help=f"soil W/m/K (default {GROUND_CONDUCTIVITY:g})")
    tank.add_argument("--tag", default="tank", help="label for the output")
    _output_options(tank)
    tank.set_defaults(func=_cmd_tank)

    cat = sub.add_parser("correlations", help="list the correlation registry")
    cat.add_argument("--geometry", help="only this geometry")
    cat.add_argument("--json", action="store_true")
    cat.set_defaults(func=_cmd_correlations)
    return parser


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    args = build_parser().parse_args(argv or ["demo"])  # no command: the demo site
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
        print(f"convlib: error: {message}", file=sys.stderr)
        return 2


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
