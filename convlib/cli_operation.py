"""Command line for lines in operation: ``outlet``, ``trace``, ``steam``, ``freeze``, ``tank``, ``duct``.

Registered on the ``convlib`` parser by :func:`add_commands` (see :mod:`convlib.cli`).
"""
from __future__ import annotations

import numpy as np

from .cli_common import (GIVEN_COEFFICIENT_HELP, LAYER_UNITS, add_quantity, condensation_check, condensation_options,
                         emit, layers, output_options, outside, pipe_diameter, pipe_size_options, pipe_wall, wall_material,
                         pretty_unit, surface_cautions, value)
from .errors import InputError
from .operation import (TRACING_MARGIN, freeze_time, line_temperature_profile, minimum_flow, steam_line,
                        tracing_duty)
from .pipe import Layer
from .units import display_unit, from_si
from .vessels import (FLOORS, GROUND_CONDUCTIVITY, HEADS, WIND_DIRECTIONS, horizontal_tank, insulation_per_face,
                      rectangular_duct, spherical_tank, vertical_tank)


def _cmd_trace(args) -> int:
    maintain = value(args, "maintain_temperature")
    ambient = value(args, "air_temperature")
    r = tracing_duty(pipe_diameter(args), maintain, layers(args), air_temperature=ambient, margin=args.margin,
                     length=value(args, "length"), **outside(args))
    row = {"tag": args.tag, "maintain_temperature": maintain, "air_temperature": ambient,
           "surface_temperature": float(r.surface_temperature), "heat_loss_per_length": float(r.heat_loss_per_length),
           "tracing_margin": float(r.margin), "duty_per_length": float(r.duty_per_length), "duty_total": float(r.duty_total),
           "warnings": r.pipe.warning_messages()}
    sections = [("heat tracing", [row])]
    if args.weather:  # a year of hourly weather: the energy the controlled tracer supplies
        from .weather import demo_weather_path, read_epw, tracing_energy

        weather = read_epw(demo_weather_path() if args.weather == "demo" else args.weather)
        year = tracing_energy(pipe_diameter(args), maintain, layers(args), weather, length=value(args, "length"),
                              switch_on_below=value(args, "switch_on_below"), **_weather_exposure(args))
        sections.append((f"a year of weather ({len(weather)} h, air < switch-on temperature: tracer on)",
                         [{"tag": args.tag, "tracing_energy": float(year.energy[0]), "time_on": float(year.time_on[0]),
                           "duty_per_length": float(year.peak_per_length[0]), "warnings": year.warning_messages()}]))
    emit(args, sections, [*r.notes, *r.cautions])
    return 0


def _weather_exposure(args) -> dict:
    """The options of :func:`outside` that a year of weather does not replace (emissivity, sky view, a given
    coefficient); the file gives air, wind and pressure hour by hour, and no sun."""
    given = outside(args)
    return {k: v for k, v in given.items() if v is not None and k in ("jacket_emissivity", "sky_view_fraction",
                                                                      "convection_coefficient")}


def _cmd_outlet(args) -> int:
    try:
        return _outlet(args)
    except InputError as exc:  # the library's names as this command spells them
        if exc.field != "fluid_phase":
            raise
        text = str(exc).replace("fluid_phase='", "--fluid-phase '").replace("fluid_pressure", "--fluid-pressure")
        raise InputError(text.replace("fluid_phase:", "--fluid-phase:").replace("inlet_temperature",
                                                                                "--inlet-temperature"),
                         field="--fluid-phase", rule=exc.rule, value=exc.value) from None


def _outlet(args) -> int:
    given_layers = layers(args)
    inlet = value(args, "inlet_temperature")
    air = value(args, "air_temperature")
    length = value(args, "length")
    if args.keep_above is not None and args.keep_below is not None:
        raise InputError("give --keep-above (a hot line) or --keep-below (a cold line), not both",
                         field="--keep-above, --keep-below", rule="at most one of them",
                         value=(args.keep_above, args.keep_below))
    keep = args.keep_above if args.keep_above is not None else args.keep_below
    if args.mass_flow is None and keep is None:
        raise InputError("give --mass-flow, or --keep-above / --keep-below for the minimum flow",
                         field="--mass-flow", rule="given unless --keep-above or --keep-below is", value=None)
    common = dict(air_temperature=air, fluid=args.fluid, fluid_phase=args.fluid_phase,
                  fluid_pressure=value(args, "fluid_pressure"), **outside(args))
    sections, notes, cautions, text, extra = [], [], [], [], {}
    flow = value(args, "mass_flow")
    if keep is not None:
        option = "keep-above" if args.keep_above is not None else "keep-below"
        limit = value(args, option.replace("-", "_"))
        side = "above" if option == "keep-below" else "below"
        if (limit > inlet) != (option == "keep-below"):
            raise InputError(f"--{option} {keep}: the limit must be {side} the inlet temperature", field=f"--{option}",
                             rule=f"{side} the inlet temperature", value=keep)
        m = minimum_flow(pipe_diameter(args), inlet, given_layers, outlet_limit=limit, length=length, **common)
        row = {"tag": args.tag, "fluid_temperature": inlet, "outlet_limit": limit, "air_temperature": air,
               "equilibrium_temperature": float(m.equilibrium_temperature),
               "minimum_mass_flow": float(m.mass_flow), "warnings": m.warning_messages()}
        if flow is not None:
            row["mass_flow"] = flow
            row["enough"] = "yes" if flow >= float(m.mass_flow) else "no"
        sections.append((f"minimum flow to keep the outlet {option.split('-')[1]} the limit", [row]))
        if args.json or not bool(m.any_flow):
            notes += list(m.notes)
        else:
            unit = display_unit("temperature", args.units)
            settles = float(from_si(float(m.equilibrium_temperature), "temperature", unit))
            text.append(f"any flow keeps the outlet {option.split('-')[1]} the limit: with no flow the line settles "
                        f"at {settles:.1f} {pretty_unit(unit)}")
        cautions += list(m.cautions)
        if flow is None:
            flow = float(m.mass_flow) if float(m.mass_flow) > 0 else None
    if flow is not None:
        r = line_temperature_profile(pipe_diameter(args), inlet, given_layers, mass_flow=flow, length=length, **common)
        freezes = bool(r.freezes)
        row = {"tag": args.tag, "mass_flow": flow, "fluid_temperature": inlet,
               "outlet_temperature": float(r.outlet_temperature), "air_temperature": air, "q_total": float(r.q_total)}
        if args.json:
            row.update(equilibrium_temperature=float(r.equilibrium_temperature), freezes=freezes,
                       freezing_position=float(r.freezing_position) if freezes else None)
        else:
            unit = "foot" if args.units == "US" else "m"
            row["freezes"] = (f"at {float(from_si(float(r.freezing_position), 'length', unit)):.1f} "
                              f"{pretty_unit(unit)}" if freezes else "no")
        row["warnings"] = r.warning_messages()
        sections.append(("temperature along the line", [row]))
        cautions += list(r.cautions)
        if not freezes or args.json:
            notes += list(r.notes)
        else:
            text.append(f"the water reaches 0 degC {row['freezes']} from the inlet, before the outlet: the profile "
                        f"stops there and the outlet temperature shown is the freezing point")
        text.append(f"energy balance: loss {float(r.q_total):.6g} W vs enthalpy drop {float(r.enthalpy_drop):.6g} W "
                    f"({float(r.energy_balance_error):.1e} relative); {int(np.max(r.steps))} steps")
        keep_points = ~np.isnan(np.asarray(r.position).ravel())
        extra["profile"] = {"position_m": np.asarray(r.position).ravel()[keep_points].tolist(),
                            "temperature_K": np.asarray(r.temperature).ravel()[keep_points].tolist()}
    if args.json:
        extra.update(notes=notes)
    else:
        extra = {"text": [*text, *notes]}
    emit(args, sections, cautions, extra)
    return 0


def _cmd_steam(args) -> int:
    pressure = value(args, "steam_pressure")
    air = value(args, "air_temperature")
    r = steam_line(pipe_diameter(args), pressure, layers(args), air_temperature=air, length=value(args, "length"),
                   **outside(args))
    row = {"tag": args.tag, "steam_pressure": pressure, "fluid_temperature": float(r.saturation_temperature),
           "air_temperature": air, "surface_temperature": float(r.pipe.surface_temperature),
           "q_per_length": float(r.q_per_length), "q_total": float(r.q_total),
           "condensate_rate": float(r.condensate_rate), "warnings": r.warning_messages()}
    emit(args, [("saturated steam line", [row])], [*surface_cautions([row]), *r.cautions])
    return 0


def _cmd_freeze(args) -> int:
    d = pipe_diameter(args)
    wall = pipe_wall(args)
    if wall is None:
        raise InputError("--wall-thickness is required with --pipe-outer-diameter or a DN size (with --nps or a "
                         "copper --size it comes from the standard)", field="--wall-thickness",
                         rule="given unless the size implies it", value=None)
    initial = value(args, "initial_temperature")
    ambient = value(args, "air_temperature")
    r = freeze_time(d, wall, initial, layers(args), air_temperature=ambient, **wall_material(args), **outside(args))
    row = {"tag": args.tag, "initial_temperature": initial, "air_temperature": ambient,
           "freezes": "no" if bool(r.never_freezes) else "yes"}  # said in the row, never as an inf time
    if not bool(r.never_freezes):
        row.update(time_to_freezing_point=float(r.time_to_freezing_point),
                   time_to_freeze_solid=float(r.time_to_freeze_solid), time_total=float(r.time_total))
    row["warnings"] = r.warning_messages()
    emit(args, [("freeze time (stagnant water)", [row])], [*r.notes, *r.cautions])
    return 0


def _cmd_tank(args) -> int:
    def face_layers(face):
        return layers(args, f"{face}_layer")

    def refuse(options, why):
        given = {o: getattr(args, o.strip("-").replace("-", "_")) for o in options}
        given = {o: g for o, g in given.items() if g not in (None, [], False)}
        if given:
            raise InputError(f"{', '.join(given)}: not for --shape {args.shape} ({why})", field=", ".join(given),
                             rule=f"not given with --shape {args.shape}", value=tuple(given.values()))

    common = _exposure(args, "tank")
    diameter = value(args, "diameter")
    if args.shape != "horizontal":
        refuse(("--length", "--heads", "--head-layer"), "only for --shape horizontal")
    if args.shape == "sphere":
        if args.height is not None or args.roof_layer or args.floor_layer:
            raise InputError("a sphere takes no --height, --roof-layer or --floor-layer (its layers: --wall-layer)",
                             field="--height, --roof-layer, --floor-layer", rule="not given for a sphere",
                             value=(args.height, args.roof_layer, args.floor_layer))
        if (args.wall_thickness is None) != (args.wall_conductivity is None):
            raise InputError("give --wall-thickness and --wall-conductivity together",
                             field="--wall-thickness, --wall-conductivity", rule="both or neither",
                             value=(args.wall_thickness, args.wall_conductivity))
        wall = {} if args.wall_thickness is None else dict(
            wall_thickness=value(args, "wall_thickness"), wall_conductivity=value(args, "wall_conductivity"))

        def build(extra, **over):
            return spherical_tank(diameter, layers=[*extra, *face_layers("wall")], **wall, **{**common, **over})
    elif args.shape == "horizontal":
        refuse(("--height", "--roof-layer", "--floor-layer", "--floor", "--ground-temperature", "--wall-thickness",
                "--wall-conductivity"), "a horizontal tank takes --length, --heads, --shell-layer and --head-layer")
        if args.length is None:
            raise InputError("--length is required for a horizontal tank (the shell between the heads' tangent "
                             "lines)", field="--length", rule="given for a horizontal tank", value=None)
        length = value(args, "length")
        heads = args.heads or "ellipsoidal_2to1"

        def build(extra, **over):
            return horizontal_tank(diameter, length, heads=heads, shell_layers=[*extra, *face_layers("wall")],
                                   head_layers=[*extra, *face_layers("head")], **{**common, **over})
    else:
        if args.height is None:
            raise InputError("--height is required for a vertical tank", field="--height",
                             rule="given for a vertical tank", value=None)
        if args.wall_thickness is not None or args.wall_conductivity is not None:
            raise InputError("--wall-thickness and --wall-conductivity are for --shape sphere; a vertical tank's "
                             "shell is taken as thin", field="--wall-thickness, --wall-conductivity",
                             rule="only with --shape sphere", value=(args.wall_thickness, args.wall_conductivity))
        ground = value(args, "ground_temperature")
        height = value(args, "height")
        floor = args.floor or "ground"

        def build(extra, **over):
            return vertical_tank(diameter, height, wall_layers=[*extra, *face_layers("wall")],
                                 roof_layers=[*extra, *face_layers("roof")], floor=floor,
                                 floor_layers=face_layers("floor"), ground_temperature=ground,
                                 ground_conductivity=args.ground_conductivity, **{**common, **over})
    _emit_faces(args, "tank faces", build([]), common["air_temperature"], _sizing(args, build))
    return 0


def _sizing(args, build) -> list[dict]:
    """Rows of insulation per face for ``--surface-limit`` / ``--heat-flux-limit`` (none without a limit)."""
    limits = {name: getattr(args, name) for name in ("surface_limit", "heat_flux_limit") if getattr(args, name)}
    for option in ("hottest_air_temperature", "wind_for_touch"):
        if getattr(args, option) and not args.surface_limit:
            flag = f"--{option.replace('_', '-')}"
            raise InputError(f"{flag} applies to --surface-limit only", field=flag, rule="only with --surface-limit",
                             value=getattr(args, option))
    if not limits:
        return []
    if len(limits) > 1 or args.insulation_conductivity is None:
        raise InputError("to size insulation give one of --surface-limit or --heat-flux-limit, and "
                         "--insulation-conductivity",
                         field="--surface-limit, --heat-flux-limit, --insulation-conductivity",
                         rule="one limit and --insulation-conductivity", value=(limits, args.insulation_conductivity))
    k = value(args, "insulation_conductivity")
    limit = ({"surface_limit": value(args, "surface_limit")} if args.surface_limit else
             {"heat_flux_limit": value(args, "heat_flux_limit")})
    if args.surface_limit:  # the worst case for a burn: still air at the design hottest ambient unless told
        limit.update(hottest_air_temperature=value(args, "hottest_air_temperature"),
                     wind_for_touch=bool(args.wind_for_touch))
    sized = insulation_per_face(lambda t, **over: build([Layer(t, k, name="sized insulation")], **over), **limit)

    def known(x):
        return None if np.isnan(x) else x

    def echo(f):
        if not args.surface_limit:
            return {}
        air = f.air_temperature if not np.isnan(f.air_temperature) else value(args, "air_temperature")
        wind = f.wind_speed if not np.isnan(f.wind_speed) else value(args, "wind_speed")
        return {"surface_limit": limit["surface_limit"], "air_temperature": air, "wind_speed": wind,
                "jacket_emissivity": args.emissivity}
    return [{"tag": f.face, "limit on": "surface temperature" if args.surface_limit else "heat flux", **echo(f),
             "required_thickness": known(f.required), "commercial_thickness": known(f.commercial),
             "notes": "not reachable within 300 mm" if np.isnan(f.required) else (
                 "beyond the listed thicknesses" if np.isnan(f.commercial) else "-")} for f in sized]


def _cmd_duct(args) -> int:
    common = _exposure(args, "duct")
    r = rectangular_duct(value(args, "width"), value(args, "height"), value(args, "length"), layers=layers(args),
                         wind_direction=args.wind_direction, **common)
    _emit_faces(args, "duct faces", r, common["air_temperature"])
    return 0


def _exposure(args, what: str) -> dict:
    """The inputs a tank and a duct share (options of :func:`_exposure_options`), SI, as keyword arguments."""
    if (args.surface_temperature is None) == (args.fluid_temperature is None):
        raise InputError(f"give --surface-temperature (a bare {what}) or --fluid-temperature (with layers), not both",
                         field="--surface-temperature, --fluid-temperature", rule="exactly one of them",
                         value=(args.surface_temperature, args.fluid_temperature))
    known = "surface_temperature" if args.surface_temperature else "fluid_temperature"
    out = {known: value(args, known), "air_temperature": value(args, "air_temperature"),
           "wind_speed": value(args, "wind_speed"), "emissivity": args.emissivity, "outdoor": args.outdoor,
           "sky_view_fraction": args.sky_view_fraction, "solar_irradiance": value(args, "solar_irradiance")}
    if args.outdoor and args.sky_view_fraction is not None:
        raise InputError("give --outdoor (typical sky view per face) or --sky-view-fraction, not both",
                         field="--outdoor, --sky-view-fraction", rule="at most one of them",
                         value=(args.outdoor, args.sky_view_fraction))
    for name in ("inner_coefficient", "convection_coefficient"):  # optional
        out[name] = value(args, name)
    return out


def _exposure_options(p, what: str, contents: str, sky: str) -> None:
    """Options of the contents, air, wind, emissivity, sky and coefficients shared by ``tank`` and ``duct``."""
    add_quantity(p, "surface-temperature", "temperature", f"known temperature of every face (a bare {what}), "
                 "e.g. 60degC")
    add_quantity(p, "fluid-temperature", "temperature", f"temperature of the {contents} (with layers), e.g. 80degC")
    add_quantity(p, "air-temperature", "air_temperature", "ambient air temperature, e.g. 10degC", required=True)
    add_quantity(p, "wind-speed", "wind_speed", "wind speed (default 0: still air)", default="0")
    p.add_argument("--emissivity", "--jacket-emissivity", dest="emissivity", type=float, default=0.9,
                   help="emissivity of the outer surfaces (bare shell or jacket; both names accepted, as on the "
                        "line commands)")
    p.add_argument("--outdoor", action="store_true", help=f"faces see the sky, each by the typical fraction of its "
                   f"orientation ({sky})")
    p.add_argument("--sky-view-fraction", type=float, default=None,
                   help="part of every face's view that is sky, as on the line commands (instead of --outdoor)")
    add_quantity(p, "solar-irradiance", "heat_flux", "sun on the projected area of the faces, e.g. 600W/m2")
    add_quantity(p, "inner-coefficient", "inner_coefficient", "film coefficient inside, every face, e.g. 200W/m2/K")
    add_quantity(p, "convection-coefficient", "coefficient", GIVEN_COEFFICIENT_HELP)
    condensation_options(p)


def _emit_faces(args, title, r, air_temperature, sizing=()) -> None:
    """Face rows, the total and the notes of a vessel or duct, and any sizing rows; hot/cold cautions from the
    exposed faces."""
    rows = [{"item": args.tag, "tag": f.name, "shape": f.shape, "area": float(f.area),
             "surface_temperature": float(f.surface_temperature),
             "q_per_area": float(f.q_per_area), "q_total": float(f.q_total),
             "warnings": [] if f.surface is None else f.surface.warning_messages()} for f in r.faces]
    total = float(r.q_total)
    extra = {"tag": args.tag, "q_total": total, "notes": list(r.notes)}
    if not args.json:
        unit = display_unit("power", args.units)
        extra["text"] = [f"\n{args.tag}: total {float(from_si(total, 'power', unit)):,.0f} {pretty_unit(unit)}",
                         *r.notes]
    exposed = [{"surface_temperature": float(f.surface_temperature), "air_temperature": air_temperature}
               for f in r.faces if f.surface is not None]
    checked = condensation_check(args, [row for row, f in zip(rows, r.faces) if f.surface is not None],
                                 air_temperature)
    if checked:  # a face on the ground sees no air
        for row in rows:
            for key in ("dew_point", "margin"):
                row.setdefault(key, None)
            row.setdefault("condensation", None if args.json else "-")
    sections = [(title, rows)] + ([("insulation per face (sized; the layers given stay outside it)", list(sizing))]
                                  if sizing else [])
    emit(args, sections, [*surface_cautions(exposed), *checked], extra)


#: Help of --layer on the line commands.
_LAYER_HELP = ("THICKNESS,CONDUCTIVITY[,NAME] from the pipe outwards, e.g. --layer 25mm,0.04,mineral wool "
               f"[{LAYER_UNITS}]")


def add_commands(sub) -> None:
    """Add the commands of lines in operation and of vessels to the ``convlib`` subparsers ``sub``."""
    _add_line_commands(sub)
    _add_tank(sub)
    _add_duct(sub)


def _add_line_commands(sub) -> None:
    """``outlet``, ``trace``, ``steam``, ``freeze``."""
    layer_help = _LAYER_HELP
    outlet = sub.add_parser("outlet", help="temperature along a line with flow: outlet temperature and loss, "
                            "where water reaches 0 degC, the minimum flow for an outlet limit")
    pipe_size_options(outlet)
    add_quantity(outlet, "inlet-temperature", "temperature", "fluid temperature at the inlet, e.g. 115degC",
                 required=True)
    add_quantity(outlet, "air-temperature", "air_temperature", "ambient air temperature, e.g. -5degC", required=True)
    add_quantity(outlet, "mass-flow", "mass_flow", "mass flow, e.g. 12kg/s or 43000kg/h (optional with --keep-above "
                 "or --keep-below)")
    add_quantity(outlet, "keep-above", "temperature", "minimum flow that keeps the outlet of a hot line at or above "
                 "this, e.g. 5degC (with --mass-flow: also whether that flow is enough)")
    add_quantity(outlet, "keep-below", "temperature", "minimum flow that keeps the outlet of a cold line at or below "
                 "this, e.g. 8degC")
    add_quantity(outlet, "length", "length", "line length, e.g. 1400m or 1.4km", required=True)
    outlet.add_argument("--fluid", default="Water", help="CoolProp fluid name (default Water)")
    outlet.add_argument("--fluid-phase", choices=("liquid", "gas"), default="liquid",
                        help="phase of the fluid all along the line (default liquid), e.g. gas for air or steam")
    add_quantity(outlet, "fluid-pressure", "fluid_pressure", "fluid pressure, e.g. 6bar or 5barg (default 1 atm)",
                 default="101325Pa")
    outlet.add_argument("--layer", action="append", help=layer_help)
    output_options(outlet)
    outlet.set_defaults(func=_cmd_outlet)

    trace = sub.add_parser("trace", help="heat-tracing duty to hold a line at a maintain temperature")
    pipe_size_options(trace)
    add_quantity(trace, "maintain-temperature", "temperature", "temperature the tracer holds, e.g. 5degC",
                 required=True)
    add_quantity(trace, "air-temperature", "air_temperature", "design minimum air temperature, e.g. -20degC "
                 "(give the design maximum wind as --wind-speed)", required=True)
    trace.add_argument("--layer", action="append", help=layer_help)
    trace.add_argument("--margin", type=float, default=TRACING_MARGIN,
                       help=f"design margin on the loss (default {TRACING_MARGIN:g})")
    add_quantity(trace, "length", "length", "traced length (default 1 m)", default="1m")
    output_options(trace)
    trace.add_argument("--weather", help="EPW hourly weather file (or 'demo'): also the energy a controlled tracer "
                       "supplies in that year")
    add_quantity(trace, "switch-on-below", "air_temperature", "with --weather: air temperature below which the "
                 "control switches the tracer on (default the maintain temperature)")
    trace.set_defaults(func=_cmd_trace)

    steam = sub.add_parser("steam", help="a saturated steam line: heat loss and the condensate it forms")
    add_quantity(steam, "steam-pressure", "fluid_pressure", "absolute steam pressure, e.g. 3.5bar or 2.5barg",
                 required=True)
    add_quantity(steam, "air-temperature", "air_temperature", "ambient air temperature, e.g. -10degC", required=True)
    add_quantity(steam, "length", "length", "line length (default 1 m)", default="1m")
    steam.add_argument("--layer", action="append", help=layer_help)
    pipe_size_options(steam)
    output_options(steam)
    steam.set_defaults(func=_cmd_steam)

    freeze = sub.add_parser("freeze", help="time for stagnant water in a line to reach 0 degC and to freeze solid")
    pipe_size_options(freeze)
    add_quantity(freeze, "wall-thickness", "wall_thickness", "pipe wall, e.g. 3.91mm (default from --nps and "
                 "--schedule)")
    add_quantity(freeze, "initial-temperature", "temperature", "water temperature when flow stops, e.g. 10degC",
                 required=True)
    add_quantity(freeze, "air-temperature", "air_temperature", "design minimum air temperature, e.g. -15degC",
                 required=True)
    freeze.add_argument("--layer", action="append", help=layer_help)
    output_options(freeze)
    freeze.set_defaults(func=_cmd_freeze)


def _add_tank(sub) -> None:
    tank = sub.add_parser("tank", help="a vertical tank face by face (wall, roof, floor), a horizontal tank (shell, "
                          "heads) or a sphere (shell)")
    tank.add_argument("--shape", choices=("vertical", "horizontal", "sphere"), default="vertical",
                      help="vertical cylindrical tank (default), horizontal tank with heads, or spherical vessel")
    add_quantity(tank, "diameter", "size", "tank diameter (of a sphere: outer shell), e.g. 10m", required=True)
    add_quantity(tank, "height", "size", "wall height of a vertical tank, e.g. 12m")
    add_quantity(tank, "length", "size", "horizontal tank: shell length between the heads' tangent lines, e.g. 8m")
    tank.add_argument("--heads", choices=HEADS, default=None,
                      help="horizontal tank: shape of both heads, one of " + ", ".join(HEADS) + " (default "
                      "ellipsoidal_2to1; torispherical is the ASME F&D head, crown radius D, knuckle 0.06 D)")
    add_quantity(tank, "wall-thickness", "wall_thickness", "sphere: shell wall, e.g. 20mm (with --wall-conductivity)")
    add_quantity(tank, "wall-conductivity", "conductivity", "sphere: shell wall conductivity, e.g. 45W/m/K")
    _exposure_options(tank, "tank", "contents", "wall, shell and heads 0.5, roof 1")
    tank.add_argument("--wall-layer", "--shell-layer", dest="wall_layer", action="append",
                      help=f"wall (horizontal tank: shell; sphere: shell) layer THICKNESS,CONDUCTIVITY[,NAME] "
                      f"[{LAYER_UNITS}]")
    for face in ("roof", "floor", "head"):
        tank.add_argument(f"--{face}-layer", action="append", help=f"{face} layer THICKNESS,CONDUCTIVITY[,NAME] "
                          f"[{LAYER_UNITS}]" + (" (both heads of a horizontal tank)" if face == "head" else ""))
    tank.add_argument("--floor", choices=FLOORS, default=None, help="vertical tank: on the ground (default), open "
                      "underneath, or left out")
    add_quantity(tank, "ground-temperature", "air_temperature", "undisturbed soil temperature (default the air "
                 "temperature)")
    tank.add_argument("--ground-conductivity", type=float, default=GROUND_CONDUCTIVITY,
                      help=f"soil W/m/K (default {GROUND_CONDUCTIVITY:g})")
    add_quantity(tank, "insulation-conductivity", "insulation_conductivity", "size insulation of this k, e.g. "
                 "0.04W/m/K, for a limit:")
    add_quantity(tank, "surface-limit", "temperature", "hottest jacket (or, on a cold tank, coldest), e.g. 60degC")
    add_quantity(tank, "hottest-air-temperature", "air_temperature", "touch sizing: design hottest ambient, e.g. "
                 "40degC (default --air-temperature)")
    tank.add_argument("--wind-for-touch", action="store_true", help="touch sizing in the given --wind-speed "
                      "(default: still air, the worst case)")
    add_quantity(tank, "heat-flux-limit", "heat_flux", "largest heat flow per area, e.g. 50W/m2")
    tank.add_argument("--tag", default="tank", help="label for the output")
    output_options(tank)
    tank.set_defaults(func=_cmd_tank)


def _add_duct(sub) -> None:
    duct = sub.add_parser("duct", help="a horizontal rectangular duct face by face (sides, top, bottom)")
    add_quantity(duct, "width", "duct_size", "duct width (sheet metal; layers add outside), e.g. 600mm",
                 required=True)
    add_quantity(duct, "height", "duct_size", "duct height, e.g. 400mm", required=True)
    add_quantity(duct, "length", "length", "duct run, e.g. 20m", required=True)
    _exposure_options(duct, "duct", "air inside", "sides 0.5, top 1")
    duct.add_argument("--layer", action="append", help=f"layer of every face, THICKNESS,CONDUCTIVITY[,NAME] "
                      f"[{LAYER_UNITS}]")
    duct.add_argument("--wind-direction", choices=WIND_DIRECTIONS, default="along",
                      help="wind along the duct (plate laws, default) or across it (square-section law)")
    duct.add_argument("--tag", default="duct", help="label for the output")
    output_options(duct)
    duct.set_defaults(func=_cmd_duct)
