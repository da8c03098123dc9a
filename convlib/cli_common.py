"""Shared parts of the command line: output tables and JSON, cautions, pipe and layer options.

Used by :mod:`convlib.cli` and :mod:`convlib.cli_operation`; nothing here is physics (units are
parsed here, at the edge, by :mod:`convlib.units`).
"""
from __future__ import annotations

import json
import sys

from . import __version__
from .design import TOUCH_LIMIT_METAL_JACKET
from .errors import InputError
from .pipe import Layer
from .pipe_sizes import SCHEDULES, nominal_pipe
from .units import KIND_SI_UNIT, display_unit, from_si, parse

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
    "outlet_limit": ("T_limit", "temperature", "{:.2f}"),
    "equilibrium_temperature": ("T_equilibrium", "temperature", "{:.2f}"),
    "mass_flow": ("m", "mass_flow", "{:.4g}"),
    "minimum_mass_flow": ("m_min", "mass_flow", "{:.4g}"),
    "freezing_position": ("x_freezing", "length", "{:.1f}"),
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
    "required_thickness": ("t_required", "length", "{:.1f}"),
    "commercial_thickness": ("t_listed", "length", "{:.0f}"),
}


def surface_row(tag: str, r, extra_fields=()) -> dict:
    row = {"tag": tag}
    for name in ("surface_temperature", *extra_fields, "air_temperature", "q_per_length", "q_total",
                 "h_convection", "h_radiation", "rayleigh", "reynolds"):
        row[name] = float(getattr(r, name))
    row["regime"] = f"{r.regime_names().item()}, {r.flow_regime_names().item()}"
    row["warnings"] = r.warning_messages()
    return row


def surface_cautions(rows: list[dict]) -> list[str]:
    out = []
    if any(row["surface_temperature"] > TOUCH_LIMIT_METAL_JACKET for row in rows):
        out.append(CAUTION_HOT)
    if any(row["surface_temperature"] < row["air_temperature"] for row in rows):
        out.append(CAUTION_COLD)
    return out


def table(rows: list[dict], units: str, out=sys.stdout) -> None:
    if not rows:
        return
    names = [n for n in rows[0] if n not in ("warnings",)]
    heads, cells = [], [[] for _ in rows]
    for name in names:
        if name in FIELDS:
            label, kind, fmt = FIELDS[name]
            unit = display_unit(kind, units)
            heads.append(f"{label} [{pretty_unit(unit)}]" if unit else label)
            for cell, row in zip(cells, rows):  # None: no value (e.g. a limit not reachable)
                cell.append("-" if row[name] is None else fmt.format(float(from_si(row[name], kind, unit))))
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


def pretty_unit(unit: str) -> str:
    return (unit.replace("degC", "°C").replace("degF", "°F").replace("delta_", "").replace("**2", "²")
            .replace("hour", "h").replace("foot", "ft").replace("inch", "in"))


def units_map(rows: list[dict]) -> dict:
    return {n: KIND_SI_UNIT[FIELDS[n][1]] for r in rows[:1] for n in r if n in FIELDS}


def emit(args, sections: list[tuple[str, list[dict]]], cautions: list[str], extra: dict | None = None) -> None:
    if args.json:
        payload = {title: {"results": rows, "units": units_map(rows)} for title, rows in sections}
        payload.update(extra or {})
        payload["cautions"] = cautions
        payload["convlib_version"] = __version__
        json.dump(payload, sys.stdout, indent=2)
        print()
        return
    for title, rows in sections:
        print(f"\n{title}")
        table(rows, args.units)
    for line in (extra or {}).get("text", []):
        print(line)
    if cautions:
        print()
    for c in cautions:
        print(c)


def parse_layer(text: str, index: int) -> Layer:
    parts = [p.strip() for p in text.split(",")]
    if len(parts) not in (2, 3):
        raise InputError(f"--layer {text!r}: write THICKNESS,CONDUCTIVITY[,NAME], e.g. 50mm,0.04,mineral wool",
                         field="--layer", rule="THICKNESS,CONDUCTIVITY[,NAME]", value=text)
    thickness = parse(parts[0], "length", f"layer {index} thickness")
    conductivity = parse(parts[1], "conductivity", f"layer {index} conductivity")
    return Layer(thickness, conductivity, name=parts[2] if len(parts) == 3 else f"layer {index}")


def pipe_diameter(args) -> float:
    if (args.nps is None) == (args.pipe_diameter is None):
        raise InputError("give the pipe as --nps (with --schedule) or as --pipe-diameter, not both",
                         field="--nps, --pipe-diameter", rule="exactly one of them",
                         value=(args.nps, args.pipe_diameter))
    if args.nps is not None:
        return nominal_pipe(args.nps, args.schedule).outer_diameter
    return parse(args.pipe_diameter, "length", "pipe-diameter")


def outside(args) -> dict:
    """Wind, jacket emissivity, sky view and a given convective coefficient of a line's outer surface."""
    given = None if args.convection_coefficient is None else parse(args.convection_coefficient, "coefficient",
                                                                   "convection-coefficient")
    return dict(wind_speed=parse(args.wind_speed, "speed", "wind-speed"), jacket_emissivity=args.jacket_emissivity,
                sky_view_fraction=args.sky_view_fraction, convection_coefficient=given)


def conditions(args) -> dict:
    return dict(air_temperature=parse(args.air_temperature, "temperature", "air-temperature"), **outside(args))


GIVEN_COEFFICIENT_HELP = ("outer convective coefficient to use instead of the correlations, e.g. 10 (W/m2/K) "
                           "when a specification prescribes one; radiation still counts (emissivity 0 for a "
                           "combined value)")


def output_options(p) -> None:
    p.add_argument("--json", action="store_true", help="print JSON (SI values) instead of a table")
    p.add_argument("--units", choices=("SI", "US"), default="SI", help="units of the printed table (default SI)")


def pipe_options(p) -> None:
    p.add_argument("--fluid-temperature", required=True, help="fluid temperature, e.g. 180degC")
    p.add_argument("--air-temperature", required=True, help="ambient air temperature, e.g. 20degC")
    pipe_size_options(p)


def pipe_size_options(p) -> None:
    p.add_argument("--nps", type=float, help="nominal pipe size, e.g. 4 or 0.75")
    p.add_argument("--schedule", default="40", choices=SCHEDULES, help="pipe schedule (default 40)")
    p.add_argument("--pipe-diameter", help="pipe outer diameter instead of --nps, e.g. 114.3mm")
    p.add_argument("--wind-speed", default="0", help="wind speed (default 0: still air)")
    p.add_argument("--jacket-emissivity", type=float, default=0.9, help="emissivity of the outer surface")
    p.add_argument("--sky-view-fraction", type=float, default=0.0, help="part of the view that is sky (0 indoors)")
    p.add_argument("--convection-coefficient", help=GIVEN_COEFFICIENT_HELP)
    p.add_argument("--tag", default="line", help="label for the output")
