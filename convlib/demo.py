"""The invented demo site (Fernhill district-energy plant) shipped with the package.

Invented lines for demonstration only. The command line and the dashboard both
show them through the functions here, so they show the same numbers.
"""
from __future__ import annotations

import json
import re
from importlib import resources

import numpy as np

from .pipe import Layer
from .pipe_sizes import nominal_pipe
from .units import from_si

__all__ = ["load_demo_site", "layers", "operation_rows", "fill_template"]


def load_demo_site() -> dict:
    """The invented demo site: surfaces, insulated lines, design data, weather bins, lines in operation."""
    return json.loads(resources.files("convlib").joinpath("data/demo_site.json").read_text())


def layers(records) -> list:
    """Layers from records {"thickness" [m], "conductivity" [W/m/K], "name"}."""
    return [Layer(r["thickness"], r["conductivity"], name=r.get("name", "layer")) for r in records]


#: Text of an SI value in the demo's tables: kind -> (pint unit, label) where the kind alone decides it.
_SI_UNIT = {"temperature": ("degC", "°C"), "length": ("m", "m"), "speed": ("m/s", "m/s"), "power": ("kW", "kW"),
            "heat_per_length": ("W/m", "W/m"), "time": ("hour", "h"), "pressure": ("bar", "bar(a)"),
            "dimensionless": ("percent", "%")}
#: Quantities whose kind is not enough (name -> pint unit, label): a line's flow in kg/s, a condensate rate in
#: kg/h, a tracer's total in W.
_UNIT_BY_NAME = {"mass_flow": ("kg/s", "kg/s"), "condensate_rate": ("kg/hour", "kg/h"), "duty_total": ("W", "W")}
_PLACEHOLDER = re.compile(r"\{(\w+)\}")


def _si_text(name: str, value: float, kind: str, number_format: str) -> str:
    unit, label = _UNIT_BY_NAME.get(name) or _SI_UNIT[kind]
    return f"{float(from_si(value, kind, unit)):{number_format}} {label}"


def fill_template(template: str, values: dict, text) -> str:
    """``template`` with each ``{name}`` replaced by ``text(name, value)`` (``value`` an entry of ``values``).

    >>> fill_template("{a} to {b}", {"a": 1, "b": 2}, lambda name, v: f"<{v}>")
    '<1> to <2>'
    """
    return _PLACEHOLDER.sub(lambda m: text(m.group(1), values[m.group(1)]), template)


def _row(tag: str, what: str, result: str, **values) -> dict:
    """A row of the demo's table: texts in SI and, for other unit systems, the templates and the numbers.

    ``values``: name -> (SI value, kind of :data:`convlib.units.KIND_SI_UNIT`, number format of the SI text).
    """
    numbers = {name: {"value": float(v), "kind": kind} for name, (v, kind, _) in values.items()}

    def si(name, entry):
        return _si_text(name, entry["value"], entry["kind"], values[name][2])

    return {"tag": tag, "what": fill_template(what, numbers, si), "result": fill_template(result, numbers, si),
            "what_template": what, "result_template": result, "values": numbers}


def operation_rows(op: dict, numbers: bool = False) -> tuple[list[dict], set[str]]:
    """The demo site's lines in operation: outlet temperature, steam condensate, tracing duty, freeze time, tank loss.

    Returns rows ``{"tag", "what", "result"}`` (readable text, SI and degC) and the cautions that apply. With
    ``numbers``, each row also holds ``"what_template"`` and ``"result_template"`` (the texts with ``{name}``
    where a quantity goes) and ``"values"`` (name -> ``{"value": SI value, "kind": kind of quantity}``), for
    showing the same rows in another unit system (:func:`fill_template`).
    """
    from .operation import freeze_time, line_temperature_profile, steam_line, tracing_duty
    from .vessels import vertical_tank

    rows, cautions = [], set()
    c = op["long_line"]
    r = line_temperature_profile(nominal_pipe(c["nps"], c["schedule"]).outer_diameter, c["inlet_temperature"],
                                 layers(c["layers"]), mass_flow=c["mass_flow"], length=c["length"],
                                 air_temperature=c["air_temperature"], fluid_pressure=c["fluid_pressure"],
                                 wind_speed=c["wind_speed"], sky_view_fraction=c["sky_view_fraction"],
                                 jacket_emissivity=c["jacket_emissivity"])
    rows.append(_row(c["tag"], "outlet after {length} at {mass_flow}", "{inlet} -> {outlet}, loss {loss}",
                     length=(c["length"], "length", "g"), mass_flow=(c["mass_flow"], "mass_flow", "g"),
                     inlet=(c["inlet_temperature"], "temperature", ".1f"),
                     outlet=(r.outlet_temperature, "temperature", ".2f"), loss=(r.q_total, "power", ".1f")))
    c = op["steam_line"]
    s = steam_line(nominal_pipe(c["nps"], c["schedule"]).outer_diameter, c["steam_pressure"], layers(c["layers"]),
                   air_temperature=c["air_temperature"], length=c["length"], wind_speed=c["wind_speed"],
                   sky_view_fraction=c["sky_view_fraction"], jacket_emissivity=c["jacket_emissivity"])
    rows.append(_row(c["tag"], "saturated steam at {steam_pressure} ({saturation}), {length}",
                     "condensate {condensate_rate}, loss {loss}",
                     steam_pressure=(c["steam_pressure"], "pressure", "g"),
                     saturation=(s.saturation_temperature, "temperature", ".1f"), length=(c["length"], "length", "g"),
                     condensate_rate=(s.condensate_rate, "mass_flow", ".1f"), loss=(s.q_total, "power", ".1f")))
    cautions.update(s.cautions)
    c = op["traced_line"]
    t = tracing_duty(nominal_pipe(c["nps"], c["schedule"]).outer_diameter, c["maintain_temperature"],
                     layers(c["layers"]), air_temperature=c["minimum_air_temperature"],
                     wind_speed=c["maximum_wind_speed"], length=c["length"], sky_view_fraction=c["sky_view_fraction"],
                     jacket_emissivity=c["jacket_emissivity"])
    rows.append(_row(c["tag"], "tracing to hold {maintain} at {air}, {wind}",
                     "{duty_per_length} ({duty_total}) with {margin} margin",
                     maintain=(c["maintain_temperature"], "temperature", ".0f"),
                     air=(c["minimum_air_temperature"], "temperature", ".0f"),
                     wind=(c["maximum_wind_speed"], "speed", "g"),
                     duty_per_length=(t.duty_per_length, "heat_per_length", ".1f"),
                     duty_total=(t.duty_total, "power", ".0f"), margin=(t.margin, "dimensionless", ".0f")))
    cautions.update(t.cautions)
    c = op["water_line"]
    pipe = nominal_pipe(c["nps"], c["schedule"])
    f = freeze_time(pipe.outer_diameter, pipe.wall_thickness, c["initial_temperature"], layers(c["layers"]),
                    air_temperature=c["minimum_air_temperature"], wind_speed=c["wind_speed"],
                    sky_view_fraction=c["sky_view_fraction"], jacket_emissivity=c["jacket_emissivity"])
    never = bool(np.all(f.never_freezes))
    times = {} if never else dict(to_zero=(f.time_to_freezing_point, "time", ".1f"),
                                  solid=(f.time_total, "time", ".1f"))
    rows.append(_row(c["tag"], "stagnant water from {initial} at {air} air",
                     "never freezes" if never else "{freezing_point} after {to_zero}, solid after {solid}",
                     initial=(c["initial_temperature"], "temperature", ".0f"),
                     air=(c["minimum_air_temperature"], "temperature", ".0f"),
                     freezing_point=(273.15, "temperature", ".0f"), **times))
    cautions.update(f.cautions)
    c = op["tank"]
    k = vertical_tank(c["diameter"], c["height"], air_temperature=c["air_temperature"],
                      fluid_temperature=c["fluid_temperature"], wall_layers=layers(c["wall_layers"]),
                      roof_layers=layers(c["roof_layers"]), floor=c["floor"], floor_layers=layers(c["floor_layers"]),
                      emissivity=c["emissivity"], wind_speed=c["wind_speed"], outdoor=c["outdoor"])
    faces = {f"face_{i}": (face["face"], face["q_total"]) for i, face in enumerate(k.rows())}
    rows.append(_row(c["tag"], "tank {diameter} x {height} at {fluid}",
                     "{loss} (" + ", ".join(f"{name} {{{key}}}" for key, (name, _) in faces.items()) + ")",
                     diameter=(c["diameter"], "length", "g"), height=(c["height"], "length", "g"),
                     fluid=(c["fluid_temperature"], "temperature", ".0f"), loss=(k.q_total, "power", ".2f"),
                     **{key: (q, "power", ".2f") for key, (_, q) in faces.items()}))
    if not numbers:
        rows = [{key: row[key] for key in ("tag", "what", "result")} for row in rows]
    return rows, cautions
