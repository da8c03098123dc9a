"""Tanks and ducts on the tanks tab: faces, totals and insulation per face."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from convlib import design
from convlib import vessels
from convlib.pipe import Layer
from convlib.properties import dew_point
from convlib.study import CaseSpec

from .. import settings
from .case import scalar


# ----------------------------------------------------------------------------- tanks and ducts
@dataclass(frozen=True)
class VesselInputs:
    """Inputs of the "Tanks & ducts" panel (SI); the air, wind, emissivity and sky come from the case."""

    shape: str                       # key of settings.VESSEL_SHAPES
    vessel_diameter: float           # tank or sphere [m]
    vessel_height: float             # wall of a vertical tank [m]
    duct_width: float                # [m]
    duct_height: float               # [m]
    duct_length: float               # [m]
    contents_temperature: float      # [K]
    vessel_insulation: float         # thickness on every exposed face [m], 0: bare
    vessel_insulation_k: float       # [W/m/K]
    floor: str = "ground"            # vertical tank: key of settings.VESSEL_FLOORS
    wind_direction: str = "along"    # duct: key of settings.VESSEL_WIND
    vessel_length: float = settings.VESSEL["vessel_length"]  # horizontal tank: shell between the heads [m]
    heads: str = settings.VESSEL["heads"]  # horizontal tank: key of settings.VESSEL_HEADS


@dataclass(frozen=True)
class VesselView:
    """Faces of a tank, sphere or duct, their total, and the total against one input (SI)."""

    inputs: VesselInputs
    air_temperature: float
    wind_speed: float
    outdoor: bool
    faces: tuple[dict, ...]          # name, shape, area [m2], surface_temperature [K], q_per_area [W/m2], q_total [W]
    q_total: float                   # [W]
    area: float                      # exposed (and ground-contact) area [m2]
    sweep_input: str
    sweep_values: np.ndarray
    sweep_faces: dict                # face name -> (n,) q_total [W]
    sweep_total: np.ndarray          # (n,) [W]
    current: float                   # the case's value of the swept input
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    sizing_limit: float = float("nan")  # surface limit of the sizing [K]: touch (hot) or dew point + margin (cold)
    sizing: tuple = ()               # convlib.vessels.FaceThickness per exposed face at that limit, in still air


def vessel_defaults(case: CaseSpec) -> dict:
    """Contents temperature and insulation of the panel taken from the line: its fluid (or surface) temperature,
    its insulation when insulated; the design hottest air of the touch sizing is the line's air."""
    out = {"contents_temperature": case.fluid_temperature if case.kind == "insulated" else case.surface_temperature,
           "hottest_air_temperature": case.air_temperature}
    if case.kind == "insulated":
        out.update(vessel_insulation=case.insulation_thickness, vessel_insulation_k=case.insulation_conductivity)
    return out


def vessel_view(case: CaseSpec, inputs: VesselInputs, sweep_input: str = "vessel_insulation",
                hottest_air_temperature: float | None = None) -> VesselView:
    """:func:`convlib.vessels.vertical_tank`, :func:`~convlib.vessels.horizontal_tank`,
    :func:`~convlib.vessels.spherical_tank` or :func:`~convlib.vessels.rectangular_duct` with the contents at
    ``inputs.contents_temperature`` and one insulation layer on every exposed face, at the case's air, wind,
    emissivity and sky (outdoors when the case sees the sky), and the same against ``sweep_input`` in one
    vectorized call.

    The insulation per face (:func:`convlib.vessels.insulation_per_face`) is sized in still air: for hot
    contents against the touch limit at the design hottest air ``hottest_air_temperature`` [K] (default: the
    case's air), for cold contents above the dew point plus a margin at the case's air."""
    i = inputs
    for name, value, choices in (("shape", i.shape, settings.VESSEL_SHAPES), ("floor", i.floor, settings.VESSEL_FLOORS),
                                 ("heads", i.heads, settings.VESSEL_HEADS),
                                 ("wind_direction", i.wind_direction, settings.VESSEL_WIND),
                                 ("sweep input", sweep_input, settings.VESSEL_SWEEPS)):
        if value not in choices:
            raise ValueError(f"unknown {name} {value!r}; choose one of: {', '.join(choices)}")
    outdoor = case.sky_view_fraction > 0

    def run(thickness=i.vessel_insulation, wind=case.wind_speed, air=case.air_temperature):
        layers = [Layer(thickness, i.vessel_insulation_k, name="insulation")]
        common = dict(air_temperature=air, fluid_temperature=i.contents_temperature, emissivity=case.emissivity,
                      wind_speed=wind, outdoor=outdoor, pressure=case.pressure, convection_factor=case.convection_factor)
        if i.shape == "vertical_tank":
            return vessels.vertical_tank(i.vessel_diameter, i.vessel_height, wall_layers=layers, roof_layers=layers,
                                         floor=i.floor, floor_layers=layers if i.floor == "open" else [], **common)
        if i.shape == "horizontal_tank":
            return vessels.horizontal_tank(i.vessel_diameter, i.vessel_length, heads=i.heads, shell_layers=layers,
                                           head_layers=layers, **common)
        if i.shape == "sphere":
            return vessels.spherical_tank(i.vessel_diameter, layers=layers, **common)
        return vessels.rectangular_duct(i.duct_width, i.duct_height, i.duct_length, layers=layers,
                                        wind_direction=i.wind_direction, **common)

    base = run()
    _, low, high = settings.VESSEL_SWEEPS[sweep_input]
    current = {"vessel_insulation": i.vessel_insulation, "wind_speed": case.wind_speed,
               "air_temperature": case.air_temperature}[sweep_input]
    grid = np.linspace(min(low, current), max(high, 1.5 * current if sweep_input != "air_temperature" else current
                                                  + 10.0), settings.VESSEL["sweep_points"])
    key = {"vessel_insulation": "thickness", "wind_speed": "wind", "air_temperature": "air"}[sweep_input]
    swept = run(**{key: grid})
    limit = design.TOUCH_LIMIT_METAL_JACKET
    hot = [f for f in base.faces if f.surface is not None and float(f.surface_temperature) > limit]
    # sized at the case's air in still air (the worst case for both): a hot vessel for the touch limit, a cold
    # one above the dew point plus a margin
    hot_contents = i.contents_temperature >= case.air_temperature
    sizing_limit = (limit if hot_contents else
                    scalar(dew_point(case.air_temperature, case.relative_humidity, case.pressure))
                    + design.CONDENSATION_MARGIN)
    hottest = None if hottest_air_temperature is None or not hot_contents else float(hottest_air_temperature)

    def build(thickness, *, air_temperature=case.air_temperature, wind_speed=0.0):
        return run(thickness=thickness, wind=wind_speed, air=air_temperature)

    cautions = ((design.CAUTION_TOUCH,) if hot else ()) + (
        (design.CAUTION_CONDENSATION,) if i.contents_temperature < case.air_temperature else ())
    return VesselView(
        inputs=i, air_temperature=case.air_temperature, wind_speed=case.wind_speed, outdoor=outdoor,
        faces=tuple({"name": f.name, "shape": f.shape, "area": scalar(f.area),
                     "surface_temperature": scalar(f.surface_temperature), "q_per_area": scalar(f.q_per_area),
                     "q_total": scalar(f.q_total)} for f in base.faces),
        q_total=scalar(base.q_total), area=scalar(base.area), sweep_input=sweep_input, sweep_values=grid,
        sweep_faces={f.name: np.broadcast_to(np.asarray(f.q_total, float), grid.shape).copy() for f in swept.faces},
        sweep_total=np.broadcast_to(np.asarray(swept.q_total, float), grid.shape).copy(), current=float(current),
        notes=tuple(base.notes), cautions=cautions, sizing_limit=sizing_limit,
        sizing=vessels.insulation_per_face(build, surface_limit=sizing_limit, hottest_air_temperature=hottest))
