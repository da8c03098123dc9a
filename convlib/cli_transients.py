"""Command line for lines that stop and start: ``cooldown`` (a stopped line) and ``warmup`` (a steam line).

Registered on the ``convlib`` parser by :func:`add_commands` (see :mod:`convlib.cli`).
"""
from __future__ import annotations

from .cli_common import (LAYER_UNITS, add_quantity, emit, layers, output_options, pipe_diameter, pipe_size_options,
                         pipe_wall, value, wall_material)
from .errors import InputError

LAYER_HELP = f"THICKNESS,CONDUCTIVITY[,NAME] from the pipe outwards, e.g. --layer 50mm,0.04,mineral wool [{LAYER_UNITS}]"


def _wall(args) -> float:
    wall = pipe_wall(args)
    if wall is None:
        raise InputError("--wall-thickness is required with --pipe-outer-diameter or a DN size (with --nps or a "
                         "copper --size it comes from the standard)", field="--wall-thickness",
                         rule="given unless the size implies it", value=None)
    return wall


def _around(args) -> dict:
    return dict(air_temperature=value(args, "air_temperature"), wind_speed=value(args, "wind_speed"),
                sky_view_fraction=args.sky_view_fraction, solar_irradiance=value(args, "solar_irradiance"),
                jacket_emissivity=args.jacket_emissivity, convection_coefficient=value(args, "convection_coefficient"))


def _cmd_cooldown(args) -> int:
    from .transients import cool_down_time

    initial, final = value(args, "initial_temperature"), value(args, "final_temperature")
    r = cool_down_time(pipe_diameter(args), _wall(args), initial, final, layers(args), fluid=args.fluid,
                       fluid_pressure=value(args, "fluid_pressure"), **wall_material(args), **_around(args))
    row = {"tag": args.tag, "initial_temperature": initial, "final_temperature": final,
           "air_temperature": value(args, "air_temperature"), "reaches": "no" if bool(r.never_reaches) else "yes",
           "q_initial": float(r.q_initial), "q_final": float(r.q_final), "warnings": r.warning_messages()}
    if not bool(r.never_reaches):  # said in the row, never as an inf time
        row["time"] = float(r.time)
    emit(args, [("cool-down of a stopped line", [row])], [*r.notes, *r.cautions])
    return 0


def _cmd_warmup(args) -> int:
    from .transients import warm_up_condensate

    length = value(args, "length")
    w = warm_up_condensate(pipe_diameter(args), _wall(args), value(args, "steam_pressure"),
                           value(args, "start_temperature") if args.start_temperature is not None
                           else value(args, "air_temperature"), value(args, "warm_up_time"), layers(args),
                           length=length, **wall_material(args), **_around(args))
    row = {"tag": args.tag, "steam_pressure": value(args, "steam_pressure"),
           "saturation_temperature": float(w.saturation_temperature),
           "wall_mass": float(w.wall_mass), "warm_up_condensate": float(w.warm_up_condensate),
           "running_condensate_rate": float(w.running_condensate_rate),
           "mean_condensate_rate": float(w.mean_condensate_rate), "warnings": w.warning_messages()}
    emit(args, [("warm-up of a steam line", [row])], list(w.cautions))
    return 0


def _surroundings_options(p) -> None:
    add_quantity(p, "air-temperature", "air_temperature", "ambient air temperature, e.g. -10degC", required=True)
    p.add_argument("--layer", action="append", help=LAYER_HELP)
    add_quantity(p, "wall-thickness", "wall_thickness", "pipe wall, e.g. 6.02mm (default from --nps and --schedule)")


def add_commands(sub) -> None:
    """Add ``cooldown`` and ``warmup`` to the ``convlib`` subparsers ``sub``."""
    cool = sub.add_parser("cooldown", help="time for a stopped line to cool (or a stopped cold line to warm) to a "
                          "temperature")
    pipe_size_options(cool)
    _surroundings_options(cool)
    add_quantity(cool, "initial-temperature", "temperature", "fluid temperature when the flow stops, e.g. 90degC",
                 required=True)
    add_quantity(cool, "final-temperature", "temperature", "temperature whose time is asked, e.g. 40degC",
                 required=True)
    cool.add_argument("--fluid", default="Water", help="CoolProp fluid in the line (default Water)")
    add_quantity(cool, "fluid-pressure", "fluid_pressure", "absolute pressure of the fluid (liquid over the range), "
                 "e.g. 4bar (default 1.01325 bar)", default="101325Pa")
    output_options(cool)
    cool.set_defaults(func=_cmd_cooldown)

    warm = sub.add_parser("warmup", help="condensate formed bringing a cold steam line up to temperature")
    pipe_size_options(warm)
    _surroundings_options(warm)
    add_quantity(warm, "steam-pressure", "fluid_pressure", "absolute steam pressure, e.g. 10bar or 9barg",
                 required=True)
    add_quantity(warm, "start-temperature", "temperature", "line temperature before steam (default the air)")
    add_quantity(warm, "warm-up-time", "duration", "time allowed to warm up, e.g. 30min or 1h", required=True)
    add_quantity(warm, "length", "length", "line length, e.g. 100m", required=True)
    output_options(warm)
    warm.set_defaults(func=_cmd_warmup)
