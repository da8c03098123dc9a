"""The invented demo site (Fernhill district-energy plant) shipped with the package.

Invented lines for demonstration only. The command line and the dashboard both
show them through the functions here, so they show the same numbers.
"""
from __future__ import annotations

import json
from importlib import resources

import numpy as np

from .pipe import Layer
from .pipe_sizes import nominal_pipe
from .units import from_si

__all__ = ["load_demo_site", "layers", "operation_rows"]


def load_demo_site() -> dict:
    """The invented demo site: surfaces, insulated lines, design data, weather bins, lines in operation."""
    return json.loads(resources.files("convlib").joinpath("data/demo_site.json").read_text())


def layers(records) -> list:
    """Layers from records {"thickness" [m], "conductivity" [W/m/K], "name"}."""
    return [Layer(r["thickness"], r["conductivity"], name=r.get("name", "layer")) for r in records]


def operation_rows(op: dict) -> tuple[list[dict], set[str]]:
    """The demo site's lines in operation: outlet temperature, steam condensate, tracing duty, freeze time, tank loss.

    Returns rows ``{"tag", "what", "result"}`` (readable text, SI and degC) and the cautions that apply.
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
    rows.append({"tag": c["tag"], "what": f"outlet after {c['length']:g} m at {c['mass_flow']:g} kg/s",
                 "result": f"{c['inlet_temperature'] - 273.15:.1f} -> {float(r.outlet_temperature) - 273.15:.2f} °C, "
                           f"loss {float(r.q_total) / 1000:.1f} kW"})
    c = op["steam_line"]
    s = steam_line(nominal_pipe(c["nps"], c["schedule"]).outer_diameter, c["steam_pressure"], layers(c["layers"]),
                   air_temperature=c["air_temperature"], length=c["length"], wind_speed=c["wind_speed"],
                   sky_view_fraction=c["sky_view_fraction"], jacket_emissivity=c["jacket_emissivity"])
    rows.append({"tag": c["tag"], "what": f"saturated steam at {c['steam_pressure'] / 1e5:g} bar(a) "
                                          f"({float(s.saturation_temperature) - 273.15:.1f} °C), {c['length']:g} m",
                 "result": f"condensate {float(from_si(s.condensate_rate, 'mass_flow', 'kg/h')):.1f} kg/h, loss {float(s.q_total) / 1000:.1f} kW"})
    cautions.update(s.cautions)
    c = op["traced_line"]
    t = tracing_duty(nominal_pipe(c["nps"], c["schedule"]).outer_diameter, c["maintain_temperature"],
                     layers(c["layers"]), air_temperature=c["minimum_air_temperature"],
                     wind_speed=c["maximum_wind_speed"], length=c["length"], sky_view_fraction=c["sky_view_fraction"],
                     jacket_emissivity=c["jacket_emissivity"])
    rows.append({"tag": c["tag"], "what": f"tracing to hold {c['maintain_temperature'] - 273.15:.0f} °C at "
                                          f"{c['minimum_air_temperature'] - 273.15:.0f} °C, {c['maximum_wind_speed']:g} m/s",
                 "result": f"{float(t.duty_per_length):.1f} W/m ({float(t.duty_total):.0f} W) with "
                           f"{float(t.margin) * 100:.0f} % margin"})
    cautions.update(t.cautions)
    c = op["water_line"]
    pipe = nominal_pipe(c["nps"], c["schedule"])
    f = freeze_time(pipe.outer_diameter, pipe.wall_thickness, c["initial_temperature"], layers(c["layers"]),
                    air_temperature=c["minimum_air_temperature"], wind_speed=c["wind_speed"],
                    sky_view_fraction=c["sky_view_fraction"], jacket_emissivity=c["jacket_emissivity"])
    rows.append({"tag": c["tag"], "what": f"stagnant water from {c['initial_temperature'] - 273.15:.0f} °C at "
                                          f"{c['minimum_air_temperature'] - 273.15:.0f} °C air",
                 "result": "never freezes" if bool(np.all(f.never_freezes)) else
                           f"0 °C after {float(from_si(f.time_to_freezing_point, 'time', 'h')):.1f} h, solid after "
                           f"{float(from_si(f.time_total, 'time', 'h')):.1f} h"})
    cautions.update(f.cautions)
    c = op["tank"]
    k = vertical_tank(c["diameter"], c["height"], air_temperature=c["air_temperature"],
                      fluid_temperature=c["fluid_temperature"], wall_layers=layers(c["wall_layers"]),
                      roof_layers=layers(c["roof_layers"]), floor=c["floor"], floor_layers=layers(c["floor_layers"]),
                      emissivity=c["emissivity"], wind_speed=c["wind_speed"], outdoor=c["outdoor"])
    faces = ", ".join(f"{face['face']} {face['q_total'] / 1000:.2f} kW" for face in k.rows())
    rows.append({"tag": c["tag"], "what": f"tank {c['diameter']:g} m x {c['height']:g} m at "
                                          f"{c['fluid_temperature'] - 273.15:.0f} °C",
                 "result": f"{float(k.q_total) / 1000:.2f} kW ({faces})"})
    return rows, cautions
