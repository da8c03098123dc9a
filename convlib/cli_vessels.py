"""Command line for vessel and duct lists: ``vessels`` (a CSV list of tanks, spheres and ducts, face by face).

Registered on the ``convlib`` parser by :func:`add_commands` (see :mod:`convlib.cli`). The file's columns:
:mod:`convlib.vessel_list`; plain numbers in the file are SI (or in the unit of the column's brackets);
``--units`` sets the printed table's units.
"""
from __future__ import annotations

from .cli_common import (ALLOW_HELP, add_quantity, from_si, list_arguments, list_errors_and_json, list_table,
                         output_options, value)
from .cli_study import weather_bins
from .design import TOUCH_LIMIT_METAL_JACKET
from .errors import InputError

__all__ = ["add_commands", "VESSEL_UNITS", "VESSEL_TOTAL_UNITS"]

#: SI units of the per-item and total fields of `vessels --json`.
VESSEL_UNITS = {"area": "m2", "air_temperature": "K", "q_total": "W", "surface_temperature": "K",
                "operating_hours": "h", "heat_kwh": "kWh"}
VESSEL_TOTAL_UNITS = {"area": "m2", "q_lost": "W", "q_gained": "W", "heat_lost_kwh": "kWh/yr",
                      "heat_gained_kwh": "kWh/yr"}


def _annual(kwh: float, units: str) -> str:
    return f"{kwh / 1000:.2f}" if units == "SI" else f"{float(from_si(kwh * 3.6e6, 'energy', 'MMBtu')):.2f}"


def _cmd_vessels(args) -> int:
    from .vessel_list import demo_vessels_path, run_vessel_list, write_vessel_results_csv

    if args.demo == bool(args.input):
        raise InputError("give a vessel-list CSV file or --demo (the invented Fernhill vessel list), not both",
                         field="input, --demo", rule="exactly one of them", value=(args.input, args.demo))
    limit = value(args, "surface_limit")
    result = run_vessel_list(demo_vessels_path() if args.demo else args.input, weather_bins(args),
                             surface_limit=TOUCH_LIMIT_METAL_JACKET if limit is None else limit,
                             allow_unusual=args.allow_unusual)
    if args.output:
        write_vessel_results_csv(result, args.output)
    if list_errors_and_json(args, result, "vessels", VESSEL_UNITS, VESSEL_TOTAL_UNITS):
        return 1 if result.errors else 0
    heat = "heat [MWh/yr]" if args.units == "SI" else "heat [MMBtu/yr]"
    rows = [{"tag": row["tag"], "kind": row["kind"], "location": row["location"], "area": row["area"],
             "q_total": row["q_total"], "hottest face": row["hottest_face"],
             "surface_temperature": row["surface_temperature"], heat: _annual(row["heat_kwh"], args.units),
             "flags": "touch" if row["touch_flag"] else "-", "warnings": [row["notes"]] if row["notes"] else []}
            for row in result.rows()]
    t = result.totals
    list_table(args, result, rows, "item", f"{t['items']} items computed, {t['rows_with_errors']} row(s) with "
               f"errors; T_surface: the hottest exposed face",
               [f"{t['touch_flags']} touch flag(s) (flags, not verdicts)"])
    return 1 if result.errors else 0


def add_commands(sub) -> None:
    """Add ``vessels`` to the ``convlib`` subparsers ``sub``."""
    p = sub.add_parser("vessels", help="compute a CSV list of tanks, spheres and ducts face by face; totals, "
                       "results as CSV (exit 1 if rows failed)")
    list_arguments(p, "vessel-list", "convlib.vessel_list", "the invented Fernhill vessel list and weather", "item")
    add_quantity(p, "surface-limit", "temperature", "touch flag above this surface temperature (default "
                 f"{TOUCH_LIMIT_METAL_JACKET - 273.15:g} degC, a design default)")
    output_options(p, quantities=False)
    p.add_argument("--allow-unusual", action="store_true", help=ALLOW_HELP)
    p.set_defaults(func=_cmd_vessels)
