"""Shared parts of the command line: output tables and JSON, cautions, pipe and layer options.

Used by :mod:`convlib.cli`, :mod:`convlib.cli_operation` and the list commands; nothing here is physics (units are
parsed here, at the edge, by :mod:`convlib.units`).
"""
from __future__ import annotations

import json
import math
import sys

from . import __version__
from .design import CAUTION_CONDENSATION, CONDENSATION_MARGIN, TOUCH_LIMIT_METAL_JACKET
from .errors import InputError
from .layer_text import layer_conductivity, split_layer
from .pipe import Layer
from .pipe_sizes import COPPER_WALL, SCHEDULES, is_copper, nominal_pipe, pipe_size
from .properties import dew_point
from .cautions import CAUTION_COLD_SURFACE, CAUTION_HOT_SURFACE
from .units import INPUTS, KIND_SI_UNIT, display_unit, from_si, help_units, read

#: The general cautions of :mod:`convlib.cautions` as the command line prints them.
CAUTION_HOT, CAUTION_COLD = CAUTION_HOT_SURFACE, CAUTION_COLD_SURFACE

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
    "tracing_energy": ("E_trace/yr", "energy", "{:.4g}"),
    "time_on": ("t_on/yr", "time", "{:.0f}"),
    "time_to_freezing_point": ("t_to_freezing", "time", "{:.2f}"),
    "time_to_freeze_solid": ("t_freeze_solid", "time", "{:.2f}"),
    "time_total": ("t_total", "time", "{:.2f}"),
    "area": ("A", "area", "{:.2f}"),
    "q_per_area": ("q/A", "heat_flux", "{:.1f}"),
    "steam_pressure": ("p_steam", "pressure", "{:.4g}"),
    "condensate_rate": ("condensate", "mass_flow", "{:.2f}"),
    "required_thickness": ("t_required", "length", "{:.3g}"),  # 3 digits: 0.157 in, 4.03 mm
    "commercial_thickness": ("t_listed", "length", "{:.3g}"),
    "surface_limit": ("T_limit", "temperature", "{:.1f}"),
    "heat_loss_limit": ("q_limit", "heat_per_length", "{:.1f}"),
    "dew_point": ("T_dew", "temperature", "{:.1f}"),
    "margin": ("margin", "temperature_difference", "{:.1f}"),
    "tracing_margin": ("margin", "dimensionless", "{:.2f}"),
    "wind_speed": ("wind", "speed", "{:.1f}"),
    "jacket_emissivity": ("emissivity", "dimensionless", "{:.2f}"),
    "surface_temperature_at_listed": ("T_surface@listed", "temperature", "{:.1f}"),
    "q_per_length_at_listed": ("q@listed", "heat_per_length", "{:.1f}"),
    "final_temperature": ("T_final", "temperature", "{:.1f}"),
    "q_initial": ("q_initial", "heat_per_length", "{:.1f}"),
    "q_item": ("Q_item", "power", "{:.0f}"),
    "extra_heat": ("Q_extra", "power", "{:.0f}"),
    "q_final": ("q_final", "heat_per_length", "{:.1f}"),
    "time": ("t", "time", "{:.2f}"),
    "saturation_temperature": ("T_sat", "temperature", "{:.1f}"),
    "wall_mass": ("M_wall", "mass", "{:.0f}"),
    "warm_up_condensate": ("condensate_warm-up", "mass", "{:.1f}"),
    "running_condensate_rate": ("condensate_running", "mass_flow", "{:.2f}"),
    "mean_condensate_rate": ("condensate_mean", "mass_flow", "{:.1f}"),
}


def surface_row(tag: str, r, extra_fields=(), layers=()) -> dict:
    """One output row of a solved surface; with ``layers``, a warning for each library material used beyond its
    service temperatures (:func:`convlib.materials.service_warnings`)."""
    row = {"tag": tag}
    for name in ("surface_temperature", *extra_fields, "air_temperature", "q_per_length", "q_total",
                 "h_convection", "h_radiation", "rayleigh", "reynolds"):
        row[name] = float(getattr(r, name))
    row["regime"] = f"{r.regime_names().item()}, {r.flow_regime_names().item()}"
    row["warnings"] = r.warning_messages()
    if layers:
        from .materials import service_warnings

        row["warnings"] += [text for _, text in service_warnings(layers, r)]
    return row


def surface_cautions(rows: list[dict]) -> list[str]:
    out = []
    if any(row["surface_temperature"] > TOUCH_LIMIT_METAL_JACKET for row in rows):
        out.append(CAUTION_HOT)
    if any(row["surface_temperature"] < row["air_temperature"] for row in rows):
        out.append(CAUTION_COLD)
    return out


def condensation_options(p) -> None:
    """``--relative-humidity`` and ``--condensation-margin``: a condensation check of the outer surfaces."""
    add_quantity(p, "relative-humidity", "relative_humidity", "design humidity of the air, e.g. 80%: check the "
                 "outer surface against the dew point")
    add_quantity(p, "condensation-margin", "temperature_margin", "with --relative-humidity: the surface must stay "
                 f"this far above the dew point, e.g. 2K (default {CONDENSATION_MARGIN:g} K)")


def condensation_check(args, rows: list[dict], air_temperature) -> list[str]:
    """Add the dew point of the air, the margin and whether each row's surface is at risk (colder than the dew point
    plus the margin) to ``rows``; returns the caution when a check ran. No check without ``--relative-humidity``."""
    rh = value(args, "relative_humidity")
    margin = value(args, "condensation_margin")
    if rh is None:
        if margin is not None:
            raise InputError("--condensation-margin needs --relative-humidity", field="--condensation-margin",
                             rule="only with --relative-humidity", value=args.condensation_margin)
        return []
    if rh <= 0:
        raise InputError("--relative-humidity must be greater than 0", field="--relative-humidity",
                         rule="greater than 0", value=args.relative_humidity)
    margin = CONDENSATION_MARGIN if margin is None else margin
    dew = float(dew_point(air_temperature, rh))
    for row in rows:
        risk = bool(row["surface_temperature"] < dew + margin)
        row["dew_point"], row["margin"] = dew, margin
        row["condensation"] = risk if args.json else ("yes" if risk else "no")
    return [CAUTION_CONDENSATION]


def table(rows: list[dict], units: str, out=None) -> None:
    out = sys.stdout if out is None else out  # the stream at call time (not at import)
    if not rows:
        return
    names = [n for n in dict.fromkeys(k for row in rows for k in row) if n not in ("warnings", "notes")]  # all
    names += ["notes"] if any("notes" in row for row in rows) else []
    heads, cells = [], [[] for _ in rows]
    for name in names:
        if name in FIELDS:
            label, kind, fmt = FIELDS[name]
            unit = display_unit(kind, units)
            heads.append(f"{label} [{pretty_unit(unit)}]" if unit else label)
            for cell, row in zip(cells, rows):  # None: no value (e.g. a limit not reachable)
                cell.append("-" if row.get(name) is None else fmt.format(float(from_si(row[name], kind, unit))))
        else:
            heads.append(name)
            for cell, row in zip(cells, rows):
                cell.append(str(row.get(name, "-")))
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
    return {n: KIND_SI_UNIT[FIELDS[n][1]] for r in rows for n in r if n in FIELDS}


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
    for c in cautions:  # every caution is labelled as one on the terminal
        print(c if c.startswith("Caution") else f"Caution -- {c}")


# ----------------------------------------------------------------------------- typed quantities
class Typed(str):
    """An option's text as typed, with the input it is (a key of :data:`convlib.units.INPUTS`); read once the
    whole command line is known (``--units`` may come after it)."""

    input: str


def quantity(name: str):
    """An argparse ``type`` keeping the text and the input ``name`` for :func:`value`."""
    def typed(text):
        out = Typed(text)
        out.input = name
        return out

    typed.__name__ = INPUTS[name].words
    return typed


#: Option names of 0.2.0, still read for one version with a warning: old -> the one name now used everywhere.
DEPRECATED_OPTIONS = {"--minimum-ambient": "--air-temperature", "--touch-limit": "--surface-limit",
                      "--pipe-diameter": "--pipe-outer-diameter"}


def add_quantity(p, option: str, name: str, help: str, **kwargs) -> None:
    """An option taking a quantity of input ``name``; its help says how a plain number is read. The option's
    deprecated name of 0.2.0 (:data:`DEPRECATED_OPTIONS`) is accepted too."""
    old = [o for o, new in DEPRECATED_OPTIONS.items() if new == f"--{option}"]
    p.add_argument(f"--{option}", *old, type=quantity(name), help=f"{help} [{help_units(name)}]".replace("%", "%%"),
                   **kwargs)


def deprecated_options(argv) -> list[str]:
    """Warnings for the deprecated option names in ``argv``."""
    used = {token.split("=", 1)[0] for token in argv if token.startswith("--")}
    return [f"convlib: warning: {old} is deprecated; use {new}" for old, new in DEPRECATED_OPTIONS.items()
            if old in used]


def value(args, dest: str, text=None, name: str | None = None, field: str | None = None):
    """SI value of option ``dest`` (or of ``text``): plain numbers in the ``--units`` system, refused outside
    the usual range unless ``--allow-unusual``; ``None`` when not given."""
    raw = getattr(args, dest) if text is None else text
    if raw is None:
        return None
    return read(raw, name or raw.input, field or f"--{dest.replace('_', '-')}", system=getattr(args, "units", "SI"),
                allow_unusual=getattr(args, "allow_unusual", False), override="--allow-unusual")


def parse_layer(text: str, index: int, args=None, option: str = "--layer") -> Layer:
    """``THICKNESS,CONDUCTIVITY[,NAME]``: plain thickness in mm (US in), conductivity W/m/K (US
    Btu·in/(h·ft²·°F)) or a material name of :mod:`convlib.materials` (its k(T))."""
    thickness_text, conductivity_text, name = split_layer(text, option)
    thickness = value(args, "", thickness_text, "thickness", f"{option} {index} thickness")
    field = f"{option} {index} conductivity"
    known, conductivity = layer_conductivity(conductivity_text, lambda t: value(args, "", t, "conductivity", field),
                                             field)
    if known is not None:
        from .materials import layer as material_layer

        return material_layer(thickness, known, layer_name=name or known)
    return Layer(thickness, conductivity, name=name or f"layer {index}")


def layers(args, dest: str = "layer") -> list[Layer]:
    return [parse_layer(t, i + 1, args, f"--{dest.replace('_', '-')}") for i, t in enumerate(getattr(args, dest) or [])]


def pipe_diameter(args) -> float:
    """The pipe's own outside diameter [m] from exactly one of --nps, --size or --pipe-outer-diameter."""
    given = [name for name in ("nps", "size", "pipe_outer_diameter") if getattr(args, name, None) is not None]
    if len(given) != 1:
        raise InputError("give the pipe as one of --nps (with --schedule), --size (DN100, CU22x1.0, B88-3/4-L) or "
                         "--pipe-outer-diameter", field="--nps, --size, --pipe-outer-diameter",
                         rule="exactly one of them", value=given)
    if args.nps is not None:
        return nominal_pipe(args.nps, args.schedule).outer_diameter
    if getattr(args, "size", None) is not None:
        return pipe_size(args.size).outer_diameter
    return value(args, "pipe_outer_diameter")




def wall_material(args) -> dict:
    """Density and specific heat of the pipe wall for a copper --size (else the steel defaults of the library)."""
    size = getattr(args, "size", None)
    if size is not None and is_copper(pipe_size(size)):
        return dict(COPPER_WALL)
    return {}


def pipe_wall(args) -> float | None:
    """The pipe wall [m]: --wall-thickness, else the standard size's (NPS schedule, copper tube); None if unknown
    (DN sizes of EN 10220 imply no wall)."""
    if getattr(args, "wall_thickness", None) is not None:
        return value(args, "wall_thickness")
    if args.nps is not None:
        return nominal_pipe(args.nps, args.schedule).wall_thickness
    if getattr(args, "size", None) is not None:
        wall = pipe_size(args.size).wall_thickness
        return None if math.isnan(wall) else wall
    return None


def outside(args) -> dict:
    """Wind, jacket emissivity, sky view and a given convective coefficient of a line's outer surface."""
    return dict(wind_speed=value(args, "wind_speed"), jacket_emissivity=args.jacket_emissivity,
                sky_view_fraction=args.sky_view_fraction, convection_coefficient=value(args, "convection_coefficient"),
                solar_irradiance=value(args, "solar_irradiance"), solar_absorptivity=args.solar_absorptivity)


def conditions(args) -> dict:
    return dict(air_temperature=value(args, "air_temperature"), **outside(args))


GIVEN_COEFFICIENT_HELP = ("outer convective coefficient to use instead of the correlations, when a specification "
                          "prescribes one; radiation still counts (emissivity 0 for a combined value)")
UNITS_HELP = ("unit system of plain numbers on this command line and of the printed table: SI (degC; mm for "
              "diameters and layers; m for lengths; bar absolute) or US (degF; in; ft; psi absolute); a number "
              "with its unit (90degC, 4.5in, 0.3Btu*in/(h*ft2*degF), 6barg, 80%%) is read as written. Default SI")
ALLOW_HELP = ("compute values outside the ranges engineers use (e.g. a temperature below 150 K, a diameter over "
              "5 m, a layer over 1 m), which are otherwise refused with a hint")


LAYER_UNITS = ("plain thickness: mm, --units US: in; plain conductivity: W/m/K, --units US: "
               "Btu*in/(h*ft2*degF)")


def output_options(p, quantities: bool = True) -> None:
    p.add_argument("--json", action="store_true", help="print JSON (SI values) instead of a table")
    p.add_argument("--units", choices=("SI", "US"), default="SI",
                   help=UNITS_HELP if quantities else "units of the printed table (default SI)")
    if quantities:
        p.add_argument("--allow-unusual", action="store_true", help=ALLOW_HELP)


def add_line_options(p) -> None:
    add_quantity(p, "fluid-temperature", "temperature", "fluid temperature, e.g. 180degC", required=True)
    add_quantity(p, "air-temperature", "air_temperature", "ambient air temperature, e.g. 20degC", required=True)
    pipe_size_options(p)


def emissivity(text: str) -> float:
    """An emissivity option: a number, or a jacket surface of :func:`convlib.materials.jacket_emissivity`."""
    try:
        return float(text)
    except ValueError:
        import argparse

        from .materials import jacket_emissivity

        try:
            return jacket_emissivity(text)
        except InputError as exc:  # argparse shows the text of this error only
            raise argparse.ArgumentTypeError(str(exc)) from None


emissivity.__name__ = "emissivity"


def pipe_size_options(p) -> None:
    p.add_argument("--nps", help="nominal pipe size, e.g. 4, 0.75, 3/4 or 1-1/2")
    p.add_argument("--schedule", default="40", choices=SCHEDULES, help="pipe schedule (default 40)")
    p.add_argument("--size", help="the pipe by a standard size instead of --nps: DN100 (steel, EN 10220), CU22x1.0 "
                   "(copper, EN 1057), B88-3/4-L (copper, ASTM B88 type K/L/M), NPS4/80")
    add_quantity(p, "pipe-outer-diameter", "pipe_diameter", "pipe outer diameter instead of --nps, e.g. 114.3mm")
    add_quantity(p, "wind-speed", "wind_speed", "wind speed (default 0: still air)", default="0")
    p.add_argument("--jacket-emissivity", "--emissivity", dest="jacket_emissivity", type=emissivity, default=0.9,
                   help="emissivity of the outer surface (jacket, or the bare pipe), a number or a jacket surface of "
                        "'convlib materials' (e.g. aluminium_oxidised); both names accepted, as on tank and duct")
    p.add_argument("--sky-view-fraction", type=float, default=0.0, help="part of the view that is sky (0 indoors)")
    add_quantity(p, "solar-irradiance", "heat_flux", "sun on the line's projected area, e.g. 600W/m2 (default none; "
                 "absorbed by the jacket at its emissivity unless --solar-absorptivity)")
    p.add_argument("--solar-absorptivity", type=float, default=None, help="short-wave absorptivity of the jacket "
                   "(default its emissivity)")
    add_quantity(p, "convection-coefficient", "coefficient", GIVEN_COEFFICIENT_HELP)
    p.add_argument("--tag", default="line", help="label for the output")


# ----------------------------------------------------------------------------- computed lists (lines, vessels)
def list_arguments(p, list_name: str, module: str, demo: str, each: str) -> None:
    """The input, ``--demo``, ``-o`` and ``--bins`` of a list command (``each``: what a row is, "line" or "item")."""
    p.add_argument("input", nargs="?", help=f"{list_name} CSV (see {module} for the columns)")
    p.add_argument("--demo", action="store_true", help=demo)
    p.add_argument("-o", "--output", help=f"write per-{each} results, errors and totals to this CSV")
    p.add_argument("--bins", help=f"weather bins JSON: air_temperature, wind_speed, hours (outdoor {each}s)")


def power_text(watts: float, units: str) -> str:
    """A design heat flow [W] in kW (SI) or Btu/h (US)."""
    return f"{watts / 1000:.1f} kW" if units == "SI" else f"{float(from_si(watts, 'power', 'Btu/hour')):,.0f} Btu/h"


def energy_text(kwh: float, units: str) -> str:
    """An annual energy [kWh/yr] in MWh/yr (SI) or MMBtu/yr (US)."""
    return (f"{kwh / 1000:.1f} MWh/yr" if units == "SI" else
            f"{float(from_si(kwh * 3.6e6, 'energy', 'MMBtu')):,.1f} MMBtu/yr")


def list_errors_and_json(args, result, name: str, units: dict, totals_units: dict, reason=None) -> bool:
    """A computed list's row errors on stderr (each through ``reason`` if given), then with ``--json`` the whole
    list under ``name``; True when the JSON was printed."""
    for e in result.errors:
        print(f"convlib: row {e.row} ({e.tag or 'no tag'}): {e.reason if reason is None else reason(e.reason)}",
              file=sys.stderr)
    if not args.json:
        return False
    json.dump({name: {"results": result.rows(), "units": units},
               "errors": [e._asdict() for e in result.errors], "totals": result.totals,
               "totals_units": totals_units, "warnings": list(result.warnings), "settings": result.settings,
               "output": args.output, "cautions": list(result.cautions), "convlib_version": __version__},
              sys.stdout, indent=2)
    print()
    return True


def list_table(args, result, rows: list[dict], each: str, head: str, tail=()) -> None:
    """A computed list's table, then ``head``, its heat lost and gained (``each``: "line", "item"), ``tail``, the
    output file and the warnings and cautions."""
    table(rows, args.units)
    t = result.totals
    print(f"\n{head}")
    print(f"heat lost by hot {each}s ({t[f'{each}s_losing']}): {power_text(t['q_lost'], args.units)}, "
          f"{energy_text(t['heat_lost_kwh'], args.units)}")
    print(f"heat gained by cold {each}s ({t[f'{each}s_gaining']}): {power_text(t['q_gained'], args.units)}, "
          f"{energy_text(t['heat_gained_kwh'], args.units)}")
    for line in tail:
        print(line)
    if args.output:
        print(f"results written to {args.output}")
    for c in (*result.warnings, *result.cautions):
        print(c)
