"""Settings of the dashboard: control limits, units shown, panel order, timings, colours.

Everything a deployment may want to change lives here, not in the notebook.
Limits are in SI (kelvin, metres, W/m); the controls convert them to the unit
system on screen with :mod:`convlib.units`.
"""
from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

__all__ = [
    "ControlSetting", "CONTROLS", "QUANTITIES", "PANELS", "UNIT_SYSTEMS", "DEFAULT_UNIT_SYSTEM",
    "EXTRA_SWEEPS", "DEFAULT_SCHEDULE", "EXPENSIVE_DELAY", "MAP_POINTS", "RA_GRID", "RE_GRID",
    "MONTE_CARLO_SAMPLES", "MODEL_FORMS", "HEAT_LOSS_LIMIT", "SIZING_MAX_THICKNESS", "snapshot_dir", "convlib_home", "MAX_SNAPSHOT_BYTES", "PALETTE",
    "MODE_COLOURS", "PRETTY_UNITS", "FIGURE_HEIGHT", "FIGURE_WIDTH", "SIDEBAR_WIDTH", "MAP_LOWEST_WIND",
    "ServeDefaults", "SERVE", "BUNDLE_ENV", "OPERATION", "OPERATION_SERVICES", "OPERATION_SWEEPS", "VESSEL",
    "VESSEL_SHAPES", "VESSEL_FLOORS", "VESSEL_HEADS", "VESSEL_WIND", "VESSEL_SWEEPS", "SURVEY",
]

#: Unit systems offered by the units switch (keys of :data:`convlib.units.DISPLAY_UNITS`).
UNIT_SYSTEMS = (("SI", "SI"), ("US customary", "US"))
DEFAULT_UNIT_SYSTEM = "SI"


@dataclass(frozen=True)
class ControlSetting:
    """One numeric control.

    Attributes
    ----------
    label : str
        Text before the control (the unit is appended).
    kind : str
        Quantity kind of :data:`convlib.units.KIND_SI_UNIT` (``"temperature"``, ``"length"``...).
    low, high : float
        Limits in SI units [K, m, m/s, ...].
    step : dict
        Step per unit system, in the displayed unit.
    units : dict, optional
        Displayed unit per unit system when it differs from :func:`convlib.units.display_unit`.
    widget : str
        ``"slider"`` or ``"text"`` (a bounded number box).
    """

    label: str
    kind: str
    low: float
    high: float
    step: dict
    units: dict | None = None
    widget: str = "slider"


_METRES = {"SI": "m", "US": "foot"}
_PERCENT = {"SI": "percent", "US": "percent"}

#: Numeric controls of the line panel and the insulation panel, keyed by CaseSpec field (SI limits).
CONTROLS: dict[str, ControlSetting] = {
    "diameter": ControlSetting("Outer Ø", "length", 0.006, 1.5, {"SI": 0.1, "US": 0.001}),
    "length": ControlSetting("Run length", "length", 0.1, 5000.0, {"SI": 1.0, "US": 5.0}, _METRES, "text"),
    "height": ControlSetting("Height", "length", 0.05, 10.0, {"SI": 0.05, "US": 0.1}, _METRES),
    "width": ControlSetting("Width", "length", 0.05, 10.0, {"SI": 0.05, "US": 0.1}, _METRES),
    "surface_temperature": ControlSetting("Surface temperature", "temperature", 213.15, 873.15,
                                          {"SI": 1.0, "US": 2.0}),
    "fluid_temperature": ControlSetting("Fluid temperature", "temperature", 213.15, 873.15, {"SI": 1.0, "US": 2.0}),
    "insulation_thickness": ControlSetting("Insulation", "length", 0.0, 0.3, {"SI": 1.0, "US": 0.05}),
    "insulation_conductivity": ControlSetting("Insulation k", "conductivity", 0.01, 0.2,
                                              {"SI": 0.001, "US": 0.005}),
    "air_temperature": ControlSetting("Air temperature", "temperature", 233.15, 323.15, {"SI": 0.5, "US": 0.5}),
    "surroundings_temperature": ControlSetting("Surroundings", "temperature", 233.15, 423.15,
                                               {"SI": 0.5, "US": 0.5}),
    "wind_speed": ControlSetting("Wind speed", "speed", 0.0, 20.0, {"SI": 0.1, "US": 0.2}),
    "emissivity": ControlSetting("Emissivity", "dimensionless", 0.02, 1.0, {"SI": 0.01, "US": 0.01}),
    "sky_view_fraction": ControlSetting("Sky view", "dimensionless", 0.0, 1.0, {"SI": 0.05, "US": 0.05}),
    "relative_humidity": ControlSetting("Humidity", "dimensionless", 0.05, 1.0, {"SI": 1.0, "US": 1.0}, _PERCENT),
    "solar_irradiance": ControlSetting("Sun on the line", "heat_flux", 0.0, 1400.0, {"SI": 10.0, "US": 5.0}),
    "pressure": ControlSetting("Air pressure", "pressure", 2.0e4, 2.0e5, {"SI": 0.1, "US": 0.1}, widget="text"),
    "hottest_air_temperature": ControlSetting("Hottest air", "temperature", 233.15, 333.15, {"SI": 0.5, "US": 1.0}),
    "heat_loss_limit": ControlSetting("Heat-loss limit", "heat_per_length", 1.0, 5000.0, {"SI": 1.0, "US": 1.0},
                                      widget="text"),
    # "In operation" panel
    "mass_flow": ControlSetting("Mass flow", "mass_flow", 0.01, 200.0, {"SI": 0.01, "US": 10.0}, widget="text"),
    "fluid_pressure": ControlSetting("Pressure, absolute", "pressure", 1.0e5, 1.0e7, {"SI": 0.1, "US": 1.0},
                                     widget="text"),
    "maintain_temperature": ControlSetting("Hold the line at", "temperature", 274.15, 423.15, {"SI": 1.0, "US": 2.0}),
    "design_air_temperature": ControlSetting("Coldest air", "temperature", 223.15, 313.15, {"SI": 0.5, "US": 1.0}),
    "design_wind_speed": ControlSetting("Strongest wind", "speed", 0.0, 40.0, {"SI": 0.5, "US": 1.0}),
    "tracing_margin": ControlSetting("Margin on the loss", "dimensionless", 0.0, 1.0, {"SI": 1.0, "US": 1.0},
                                     _PERCENT),
    "initial_temperature": ControlSetting("Water at stop", "temperature", 273.15, 363.15,
                                          {"SI": 0.5, "US": 1.0}),
    "pipe_wall_thickness": ControlSetting("Pipe wall", "length", 0.0005, 0.05, {"SI": 0.01, "US": 0.001},
                                          widget="text"),
    "cool_to_temperature": ControlSetting("Cool-down to", "temperature", 223.15, 873.15, {"SI": 1.0, "US": 2.0}),
    "warm_up_pressure": ControlSetting("Warm-up steam, abs.", "pressure", 1.1e5, 4.0e6, {"SI": 0.1, "US": 1.0},
                                       {"SI": "bar", "US": "psi"}, "text"),
    "warm_up_time": ControlSetting("Warm-up time", "time", 60.0, 86400.0, {"SI": 1.0, "US": 1.0},
                                   {"SI": "minute", "US": "minute"}, "text"),
    # "Tanks & ducts" panel
    "vessel_diameter": ControlSetting("Diameter", "length", 0.3, 80.0, {"SI": 0.1, "US": 0.5}, _METRES, "text"),
    "vessel_height": ControlSetting("Wall height", "length", 0.3, 40.0, {"SI": 0.1, "US": 0.5}, _METRES, "text"),
    "vessel_length": ControlSetting("Shell length", "length", 0.3, 80.0, {"SI": 0.1, "US": 0.5}, _METRES, "text"),
    "duct_width": ControlSetting("Duct width", "length", 0.05, 5.0, {"SI": 0.01, "US": 0.05}, _METRES, "text"),
    "duct_height": ControlSetting("Duct height", "length", 0.05, 5.0, {"SI": 0.01, "US": 0.05}, _METRES, "text"),
    "duct_length": ControlSetting("Duct run", "length", 0.5, 5000.0, {"SI": 1.0, "US": 5.0}, _METRES, "text"),
    "contents_temperature": ControlSetting("Contents at", "temperature", 213.15, 673.15, {"SI": 1.0, "US": 2.0}),
    "vessel_insulation": ControlSetting("Insulation", "length", 0.0, 0.4, {"SI": 1.0, "US": 0.05}),
    "vessel_insulation_k": ControlSetting("Insulation k", "conductivity", 0.01, 0.2, {"SI": 0.001, "US": 0.005}),
}

#: Displayed quantities: name -> (kind, units per system or None for convlib's display unit, significant digits).
QUANTITIES: dict[str, tuple[str, dict | None, int]] = {
    "q_per_length": ("heat_per_length", None, 3),
    "q_convection_per_length": ("heat_per_length", None, 3),
    "q_radiation_per_length": ("heat_per_length", None, 3),
    "q_total": ("power", {"SI": "kW", "US": "Btu/hour"}, 3),
    "surface_temperature": ("temperature", None, 1),
    "fluid_temperature": ("temperature", None, 1),
    "air_temperature": ("temperature", None, 1),
    "surroundings_temperature": ("temperature", None, 1),
    "dew_point": ("temperature", None, 1),
    "temperature_difference": ("temperature_difference", None, 3),
    "h_convection": ("coefficient", None, 3),
    "h_radiation": ("coefficient", None, 3),
    "diameter": ("length", None, 4),
    "insulation_thickness": ("length", None, 3),
    "length": ("length", _METRES, 4),
    "height": ("length", _METRES, 3),
    "width": ("length", _METRES, 3),
    "wind_speed": ("speed", None, 3),
    "emissivity": ("dimensionless", None, 3),
    "sky_view_fraction": ("dimensionless", None, 2),
    "relative_humidity": ("dimensionless", _PERCENT, 3),
    "insulation_conductivity": ("conductivity", None, 3),
    "jacket_thickness": ("length", None, 3),
    "jacket_conductivity": ("conductivity", None, 3),
    "solar_irradiance": ("heat_flux", None, 3),
    "pressure": ("pressure", None, 4),
    "convection_factor": ("dimensionless", None, 3),
    "heat_loss_limit": ("heat_per_length", None, 3),
    # "In operation" panel
    "mass_flow": ("mass_flow", {"SI": "kg/s", "US": "lb/hour"}, 3),
    "fluid_pressure": ("pressure", {"SI": "bar", "US": "psi"}, 3),
    "maintain_temperature": ("temperature", None, 1),
    "design_air_temperature": ("temperature", None, 1),
    "hottest_air_temperature": ("temperature", None, 1),
    "design_wind_speed": ("speed", None, 3),
    "tracing_margin": ("dimensionless", _PERCENT, 3),
    "initial_temperature": ("temperature", None, 1),
    "pipe_wall_thickness": ("length", None, 3),
    "outlet_temperature": ("temperature", None, 1),
    "condensate_rate": ("mass_flow", {"SI": "kg/hour", "US": "lb/hour"}, 3),
    "temperature_drop": ("temperature_difference", None, 3),
    "line_loss": ("power", {"SI": "kW", "US": "Btu/hour"}, 3),
    "tracing_per_length": ("heat_per_length", None, 3),
    "tracing_total": ("power", {"SI": "kW", "US": "Btu/hour"}, 3),
    "freeze_time": ("time", None, 3),
    "cool_to_temperature": ("temperature", None, 1),
    "warm_up_pressure": ("pressure", {"SI": "bar", "US": "psi"}, 3),
    "warm_up_time": ("time", {"SI": "minute", "US": "minute"}, 3),
    "cool_down_time": ("time", None, 3),
    "warm_up_condensate": ("mass", None, 3),
    "fitting_heat": ("power", {"SI": "W", "US": "Btu/hour"}, 3),
    "equivalent_length": ("length", _METRES, 3),
    # "Tanks & ducts" panel
    "vessel_diameter": ("length", _METRES, 3),
    "vessel_height": ("length", _METRES, 3),
    "vessel_length": ("length", _METRES, 3),
    "duct_width": ("length", _METRES, 3),
    "duct_height": ("length", _METRES, 3),
    "duct_length": ("length", _METRES, 4),
    "contents_temperature": ("temperature", None, 1),
    "vessel_insulation": ("length", None, 3),
    "vessel_insulation_k": ("conductivity", None, 3),
    "face_loss": ("power", {"SI": "kW", "US": "Btu/hour"}, 3),
    "face_area": ("area", None, 3),
    "position": ("length", _METRES, 4),
    # "Survey" panel: heat flow of a whole line, energy per year
    "survey_heat": ("power", {"SI": "kW", "US": "Btu/hour"}, 3),
    "survey_energy": ("energy", {"SI": "MWh", "US": "MMBtu"}, 3),
    "survey_co2": ("mass", {"SI": "tonne", "US": "lb"}, 3),
}

#: Pretty text of the pint unit strings used by convlib's display units.
PRETTY_UNITS = {
    "degC": "°C", "degF": "°F", "delta_degC": "K", "delta_degF": "°F", "K": "K", "inch": "in", "foot": "ft",
    "W/m**2": "W/m²", "Btu/hour/foot": "Btu/h·ft", "Btu/hour/foot**2": "Btu/h·ft²", "Btu/hour": "Btu/h",
    "W/m**2/K": "W/(m²·K)", "Btu/hour/foot**2/delta_degF": "Btu/h·ft²·°F", "W/m/K": "W/(m·K)",
    "Btu*inch/hour/foot**2/delta_degF": "Btu·in/h·ft²·°F", "percent": "%", "": "–", "ft/s": "ft/s", "mph": "mph",
    "hour": "h", "minute": "min", "lb/hour": "lb/h", "kg/s": "kg/s", "kg/hour": "kg/h", "m**2": "m²", "foot**2": "ft²",
    "tonne": "t",
}

#: Sweeps offered in addition to the study's own (used when the study has none of that input).
EXTRA_SWEEPS = (
    {"input": "wind_speed", "start": 0.0, "stop": 15.0, "count": 61},
    {"input": "diameter", "start": 0.02, "stop": 0.6, "count": 60, "scale": "log"},
    {"input": "emissivity", "start": 0.03, "stop": 0.95, "count": 47},
    {"input": "air_temperature", "start": 253.15, "stop": 313.15, "count": 61},
    {"input": "surface_temperature", "start": 283.15, "stop": 673.15, "count": 79},
    {"input": "fluid_temperature", "start": 283.15, "stop": 673.15, "count": 79},
    {"input": "insulation_thickness", "start": 0.0, "stop": 0.2, "count": 81},
    {"input": "insulation_conductivity", "start": 0.02, "stop": 0.1, "count": 41},
)

#: Tabs in order: (key, title). The line panel sits beside them.
PANELS = (
    ("sweep", "Sweep"),
    ("regimes", "Regimes"),
    ("spread", "Correlations"),
    ("uncertainty", "Uncertainty"),
    ("insulation", "Insulation"),
    ("operation", "Operation"),
    ("vessels", "Tanks & ducts"),
    ("survey", "Survey"),
    ("snapshots", "Snapshots"),
)

#: Defaults of the "In operation" panel (SI). The coldest air is the case's air less ``design_air_drop``,
#: no lower than ``design_air_floor``; the pipe wall is the NPS/schedule wall when the line's diameter is a
#: listed pipe size, else ``pipe_wall_thickness`` (kept below a quarter of the diameter).
OPERATION = {
    "mass_flow": 1.0,                  # [kg/s]
    "fluid_pressure": 1.0e6,           # [Pa] absolute: keeps water liquid to 179 degC
    "maintain_temperature": 278.15,    # [K] 5 degC against freezing
    "design_air_drop": 25.0,           # [K]
    "design_air_floor": 233.15,        # [K]
    "design_wind_speed": 10.0,         # [m/s]
    "initial_temperature": 278.15,     # [K] water when the flow stops
    "pipe_wall_thickness": 0.005,      # [m]
    "sweep_points": 21,
    "warm_up_time": 1800.0,            # [s] half an hour (common practice, no source)
    "warm_up_pressure_range": (1.1e5, 4.0e6),  # [Pa] absolute: the warm-up's default follows the line within it
}

#: The "Tanks & ducts" panel: what it shows, its defaults [SI] and the inputs its sweep offers
#: (name -> (label, lowest, highest) [SI]; the highest widens to include the case).
VESSEL_SHAPES = {"vertical_tank": "vertical tank", "horizontal_tank": "horizontal tank", "sphere": "sphere",
                 "duct": "rectangular duct"}
VESSEL = {"shape": "vertical_tank", "vessel_diameter": 3.0, "vessel_height": 6.0, "vessel_length": 8.0,
          "duct_width": 0.6, "duct_height": 0.4, "duct_length": 20.0, "vessel_insulation": 0.1,
          "vessel_insulation_k": 0.04, "floor": "ground", "heads": "ellipsoidal_2to1", "wind_direction": "along",
          "sweep_points": 21}
#: Heads of a horizontal tank: key of convlib.vessels.HEADS -> display name.
VESSEL_HEADS = {"ellipsoidal_2to1": "2:1 ellipsoidal", "torispherical": "torispherical (F&D)",
                "hemispherical": "hemispherical", "flat": "flat"}
VESSEL_FLOORS = {"ground": "on the ground", "open": "open underneath", "none": "left out"}
VESSEL_WIND = {"along": "along the duct", "across": "across the duct"}
VESSEL_SWEEPS = {
    "vessel_insulation": ("Insulation thickness", 0.0, 0.2),
    "wind_speed": ("Wind speed", 0.0, 15.0),
    "air_temperature": ("Air temperature", 233.15, 313.15),
}

#: The "Survey" panel: samples per line of the measurement uncertainty (kept small so that the tab answers in
#: about a second; the command line takes more), the seed (convlib.survey.Measurement's default), the payback
#: horizon N [years] with its bounds, the largest survey it computes (longer lists: the command line on Dask),
#: and the weather bins of the demo year as the command line makes them (bin width [K], wind edges [m/s]).
SURVEY = {"samples": 200, "seed": 20261203, "payback_years": 3.0, "payback_low": 0.5, "payback_high": 30.0,
          "max_lines": 2000, "temperature_step": 3.0, "wind_edges": (0.0, 1.0, 3.0, 6.0)}

#: What the line of the "In operation" panel carries: value -> label.
OPERATION_SERVICES = {"water": "water (liquid)", "steam": "saturated steam"}

#: Inputs the "In operation" sweeps offer: name -> (label, lowest, highest) [SI]; the highest widens to
#: include the case (x 1.5 for wind, x 2 for insulation, + 10 K for air).
OPERATION_SWEEPS = {
    "wind_speed": ("Wind speed", 0.0, 15.0),
    "air_temperature": ("Air temperature", 233.15, 293.15),
    "insulation_thickness": ("Insulation thickness", 0.005, 0.15),
}

DEFAULT_SCHEDULE = "40"

#: Seconds of quiet before the expensive parts (regime map, Monte Carlo, sizing) recompute.
EXPENSIVE_DELAY = 0.4

#: Regime map: points along wind speed and temperature difference.
MAP_POINTS = (61, 46)
#: Lowest wind speed of the map [m/s] (its axis is logarithmic; still air is drawn there).
MAP_LOWEST_WIND = 0.01
#: Rayleigh and Reynolds grids of the Nu charts: (low, high, points).
RA_GRID = (1e-4, 1e14, 181)
RE_GRID = (1e-1, 1e7, 161)

#: Model-form choices of the Monte Carlo run: value -> text on screen.
MODEL_FORMS = {"none": "none", "stated_accuracy": "stated accuracy", "choose_correlation": "random choice of law"}

#: Monte Carlo sample counts offered, and the default (the study's own count is added to the list).
MONTE_CARLO_SAMPLES = (2_000, 20_000, 100_000, 500_000)

#: Default heat-loss limit of the insulation panel [W/m].
HEAT_LOSS_LIMIT = 60.0
#: Largest thickness a sizing looks at [m].
SIZING_MAX_THICKNESS = 0.3


#: Environment variable naming the path (under the server's base URL) where the server publishes
#: plotly's widget bundle (``python -m dashboard.serve`` sets it). When it is set, every plot loads
#: the 5 MB bundle from that one URL (fetched and compiled once per page, cached by the browser)
#: instead of receiving its own copy over the kernel's websocket.
BUNDLE_ENV = "CONVLIB_PLOTLY_BUNDLE"


def convlib_home() -> Path:
    """convlib's own folder of the user: ``$CONVLIB_HOME``, else ``~/.convlib``."""
    return Path(os.environ.get("CONVLIB_HOME") or Path.home() / ".convlib").expanduser()


def snapshot_dir() -> Path:
    """Directory where snapshots are saved: ``$CONVLIB_SNAPSHOT_DIR``, else ``snapshots`` in
    :func:`convlib_home` (``~/.convlib/snapshots``): a folder that outlives a reboot, never a temporary one."""
    return Path(os.environ.get("CONVLIB_SNAPSHOT_DIR") or convlib_home() / "snapshots").expanduser()


#: Largest snapshot file the listing opens to read its author, note and hash [bytes]; larger files are
#: listed as "too large to open here" without being read (one 100 MB file would otherwise cost seconds
#: and hundreds of MB of memory on every listing). The dashboard's own snapshots are about 1 MB.
MAX_SNAPSHOT_BYTES = 20 * 2**20


#: Colours of curves (one per correlation, in registry order), chosen for contrast on white.
PALETTE = ("#1b5e9a", "#c2571a", "#2e8540", "#8a3ea8", "#b8860b", "#00838f", "#a0304a", "#5d6d7e")
#: Regime colours: natural, mixed, forced.
MODE_COLOURS = ("#f2c14e", "#8fb8de", "#4a6fa5")

FIGURE_HEIGHT = 520
#: Width of the figures [px]: fits the main column of a 1280 px wide window beside the sidebar.
FIGURE_WIDTH = 820
SIDEBAR_WIDTH = "390px"


@dataclass(frozen=True)
class ServeDefaults:
    """Defaults of the shared server (``python -m dashboard.serve``)."""

    host: str = "127.0.0.1"
    port: int = 8866
    pool_size: int = 2
    max_kernels: int = 20
    cull_idle_timeout: int = 1800
    cull_interval: int = 300
    #: a kernel lives this long after its page's last websocket closed (a reload reconnects within it) [s]
    disconnect_grace: float = 15.0
    #: a session kernel whose page never connected is ended after this long [s]
    connect_grace: float = 120.0
    #: how often kernels without a page are looked for [s]
    sweep_interval: float = 5.0
    #: largest websocket message or request body a browser may send [bytes]
    max_message_bytes: int = 4 * 2**20
    #: per client address: TCP connections, kernel websockets and session kernels at once
    max_connections_per_client: int = 128
    max_sockets_per_client: int = 16
    max_kernels_per_client: int = 6
    #: an idle keep-alive TCP connection is closed after this long [s]
    idle_connection_timeout: float = 60.0
    #: a reverse proxy on this machine forwards every viewer: the client is its X-Real-IP / X-Forwarded-For
    behind_proxy: bool = False


SERVE = ServeDefaults()
