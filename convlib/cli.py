"""Command line: ``convlib`` / ``python -m convlib``.

Commands
--------
``demo``          the demo site's surfaces as a table
``surface``       one bare surface at a known temperature (values with units, e.g. ``90degC``, ``4.5in``)
``correlations``  the correlation registry

Every command takes ``--json``. Bad input prints one line naming the field
and exits with status 2.
"""
from __future__ import annotations

import argparse
import json
import sys
from importlib import resources


from . import __version__
from .correlations import catalog
from .geometry import SHAPES
from .surface import bare_surface
from .units import parse

__all__ = ["main", "load_demo_site"]

CAUTION_HOT = ("Caution: surfaces above about 60 degC can burn on contact (ISO 13732-1 gives limits by material "
               "and contact time); local codes and licensed practice govern guarding and insulation.")
CAUTION_COLD = ("Caution: a surface below the air's dew point gathers condensation (and ice below 0 degC); "
                "check against the site's design humidity and local practice.")
TOUCH_WARNING_K = 333.15  # 60 degC: common practice, no source (ISO 13732-1 gives material- and time-dependent limits)

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


def load_demo_site() -> dict:
    """The invented demo site shipped with the package."""
    return json.loads(resources.files("convlib").joinpath("data/demo_site.json").read_text())


def _result_row(tag: str, description: str, r) -> dict:
    return {
        "tag": tag,
        "description": description,
        "surface_temperature_degC": float(r.surface_temperature) - 273.15,
        "air_temperature_degC": float(r.air_temperature) - 273.15,
        "q_per_length_W_per_m": float(r.q_per_length),
        "q_total_W": float(r.q_total),
        "q_convection_per_length_W_per_m": float(r.q_convection_per_length),
        "q_radiation_per_length_W_per_m": float(r.q_radiation_per_length),
        "h_convection_W_per_m2K": float(r.h_convection),
        "h_radiation_W_per_m2K": float(r.h_radiation),
        "rayleigh": float(r.rayleigh),
        "reynolds": float(r.reynolds),
        "regime": f"{r.regime_names().item()}, {r.flow_regime_names().item()}",
        "warnings": r.warning_messages(),
    }


def _cautions(rows: list[dict]) -> list[str]:
    out = []
    if any(row["surface_temperature_degC"] + 273.15 > TOUCH_WARNING_K for row in rows):
        out.append(CAUTION_HOT)
    if any(row["surface_temperature_degC"] < row["air_temperature_degC"] for row in rows):
        out.append(CAUTION_COLD)
    return out


_COLUMNS = (
    ("tag", "tag", "{}"),
    ("surface_temperature_degC", "T_s [degC]", "{:.1f}"),
    ("air_temperature_degC", "T_air [degC]", "{:.1f}"),
    ("q_per_length_W_per_m", "q [W/m]", "{:.1f}"),
    ("q_total_W", "Q [W]", "{:.0f}"),
    ("h_convection_W_per_m2K", "h_conv [W/m2K]", "{:.2f}"),
    ("h_radiation_W_per_m2K", "h_rad [W/m2K]", "{:.2f}"),
    ("rayleigh", "Ra [-]", "{:.3g}"),
    ("reynolds", "Re [-]", "{:.3g}"),
    ("regime", "regime", "{}"),
)


def _print_table(rows: list[dict], out) -> None:
    cells = [[fmt.format(row[key]) for key, _, fmt in _COLUMNS] for row in rows]
    heads = [head for _, head, _ in _COLUMNS]
    widths = [max(len(h), *(len(c[i]) for c in cells)) for i, h in enumerate(heads)]
    print("  ".join(h.ljust(w) for h, w in zip(heads, widths)), file=out)
    print("  ".join("-" * w for w in widths), file=out)
    for c in cells:
        print("  ".join(v.ljust(w) for v, w in zip(c, widths)), file=out)
    for row in rows:
        for w in row["warnings"]:
            print(f"  ! {row['tag']}: {w}", file=out)


def _emit(rows: list[dict], args, title: str | None = None) -> None:
    cautions = _cautions(rows)
    if args.json:
        json.dump({"results": rows, "cautions": cautions, "convlib_version": __version__}, sys.stdout, indent=2)
        print()
        return
    if title:
        print(title)
    _print_table(rows, sys.stdout)
    for c in cautions:
        print(c)


def _cmd_demo(args) -> int:
    site = load_demo_site()
    rows = []
    for case in site["surfaces"]:
        inputs = {k: v for k, v in case.items() if k not in ("tag", "description")}
        rows.append(_result_row(case["tag"], case["description"], bare_surface(**inputs)))
    _emit(rows, args, title=f"{site['site']}\n{site['note']}\n")
    return 0


def _cmd_surface(args) -> int:
    kwargs = {}
    for option, kind, _ in _SURFACE_OPTIONS:
        text = getattr(args, option.replace("-", "_"))
        if text is not None:
            kwargs[option.replace("-", "_")] = parse(text, kind, option)
    for name in ("emissivity", "sky_view_fraction"):
        if getattr(args, name) is not None:
            kwargs[name] = getattr(args, name)
    missing = [o for o in ("surface_temperature", "air_temperature") if o not in kwargs]
    if missing:
        raise ValueError(f"--{missing[0].replace('_', '-')} is required")
    if args.shape in ("horizontal_cylinder", "vertical_cylinder") and "length" not in kwargs:
        kwargs["length"] = 1.0
    r = bare_surface(args.shape, natural=args.natural, forced=args.forced, **kwargs)
    _emit([_result_row(args.tag, "", r)], args)
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


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="convlib", description="Heat loss or gain of pipes, ducts and vessels "
                                     "to the surrounding air.")
    parser.add_argument("--version", action="version", version=f"convlib {__version__}")
    sub = parser.add_subparsers(dest="command", required=True)

    demo = sub.add_parser("demo", help="evaluate the invented demo site")
    demo.add_argument("--json", action="store_true", help="print JSON instead of a table")
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
    surf.add_argument("--json", action="store_true", help="print JSON instead of a table")
    surf.set_defaults(func=_cmd_surface)

    cat = sub.add_parser("correlations", help="list the correlation registry")
    cat.add_argument("--geometry", help="only this geometry")
    cat.add_argument("--json", action="store_true")
    cat.set_defaults(func=_cmd_correlations)
    return parser


def main(argv=None) -> int:
    args = build_parser().parse_args(argv)
    try:
        return args.func(args)
    except ValueError as exc:
        print(f"convlib: error: {exc}", file=sys.stderr)
        return 2


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
