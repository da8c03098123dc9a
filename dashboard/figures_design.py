"""Figures of the design tabs: insulation sizing, lines in operation, tanks and ducts (pure functions of results).

No function here computes physics: every plotted number is a field of a :mod:`dashboard.compute` result,
converted for display with :mod:`convlib.units`.
"""
from __future__ import annotations

import numpy as np
import plotly.graph_objects as go

from . import settings
from .display import Display, input_label
from .plotting import GREY, Plot, hover_template, line_trace

__all__ = ["insulation_figure", "operation_profile_figure", "operation_sweep_figure", "vessel_figure"]


# ----------------------------------------------------------------------------- insulation
_SIZING_COLOURS = {"touch": "#c0392b", "heat loss": "#1b5e9a", "condensation": "#2e8540"}
_LIMIT_NAMES = {"touch": "touch limit", "heat loss": "heat-loss limit", "condensation": "dew point + margin"}


def insulation_figure(view, display: Display) -> go.Figure:
    """Surface temperature and heat flow against insulation thickness with limits and required thicknesses.

    Parameters
    ----------
    view : dashboard.compute.InsulationView
    """
    flow = "loss" if view.hot else "gain"
    plot = Plot("insulation", ("Surface temperature against insulation thickness",
                                f"Heat {flow} against insulation thickness"))
    t = lambda si: float(display.value(si, "insulation_thickness"))  # noqa: E731
    x = display.value(view.thickness, "insulation_thickness")
    sign = 1.0 if view.hot else -1.0
    plot.add(line_trace(x, display.value(view.surface_temperature, "surface_temperature"), "surface temperature",
                   line=dict(color="#111111", width=2.5),
                   hovertemplate=hover_template(display, "insulation_thickness", "surface_temperature")), 1, 1)
    plot.add(line_trace(x, display.value(sign * view.q_per_length, "q_per_length"), f"heat {flow}",
                   line=dict(color=settings.PALETTE[0], width=2.5),
                   hovertemplate=hover_template(display, "insulation_thickness", "q_per_length")), 2, 1)
    for s in view.sizings:
        colour = _SIZING_COLOURS.get(s.name, GREY)
        row = 2 if s.name == "heat loss" else 1
        quantity = "q_per_length" if row == 2 else "surface_temperature"
        plot.hline(float(display.value(s.limit, quantity)), row, 1, line=dict(color=colour, width=1.5, dash="dash"),
                   text=f"{_LIMIT_NAMES[s.name]} {display.text(s.limit, quantity)}")
        for r in (1, 2):
            if s.required is not None:
                plot.vline(t(s.required), r, 1, line=dict(color=colour, width=1.5))
            if s.commercial is not None:
                plot.vline(t(s.commercial), r, 1, line=dict(color=colour, width=1, dash="dot"))
        if s.required is None:
            need = "not achievable"
        else:
            need = "needs " + display.text(s.required, "insulation_thickness")
            if s.commercial is not None:
                need += f", next listed {display.text(s.commercial, 'insulation_thickness')}"
        plot.add(line_trace([None], [None], f"{s.name}: {need}", line=dict(color=colour, width=1.5)), 1, 1)
    for r in (1, 2):
        if view.critical > 0:
            plot.vline(t(view.critical), r, 1, line=dict(color=GREY, width=1, dash="dashdot"),
                       text="critical" if r == 2 else None, position="bottom right")
        plot.vline(t(view.current_thickness), r, 1, line=dict(color="#111111", width=1, dash="dot"))
    plot.add(line_trace([t(view.current_thickness)], [None], "this case", line=dict(color="#111111", width=1, dash="dot")),
             1, 1)
    plot.axis("x", 2, 1, title=dict(text=display.axis_title("insulation_thickness")))
    plot.axis("y", 1, 1, title=dict(text=display.axis_title("surface_temperature", "Surface")))
    plot.axis("y", 2, 1, title=dict(text=display.axis_title("q_per_length", f"Heat {flow}")), rangemode="tozero")
    return plot.figure(f"Insulation thickness<br><sup>at {display.text(view.wind_speed, 'wind_speed')} wind; solid "
                       "vertical lines: thickness that just meets a limit; dotted: next listed thickness</sup>",
                       height=600, legend=dict(orientation="h", y=-0.12, font=dict(size=11)))


# ----------------------------------------------------------------------------- lines in operation
def operation_profile_figure(view, display: Display) -> go.Figure:
    """Fluid temperature along the line (the air temperature in the subtitle).

    Parameters
    ----------
    view : dashboard.compute.OperationView
    """
    plot = Plot()
    x = display.value(view.position, "position")
    i = view.inputs
    steam = i.service == "steam"
    plot.add(line_trace(x, display.value(view.temperature, "fluid_temperature"), "fluid temperature",
                   line=dict(color="#111111", width=2.5), mode="lines+markers", marker=dict(size=5),
                   hovertemplate=(f"%{{x:.4g}} {display.label('position')} from the inlet<br>%{{y:.2f}} "
                                  f"{display.label('fluid_temperature')}<extra></extra>")))
    plot.axis("x", title=dict(text=display.axis_title("position", "Distance from the inlet")), rangemode="tozero")
    plot.axis("y", title=dict(text=display.axis_title("fluid_temperature", "Fluid temperature")))
    if steam:
        at = display.text(view.outlet_temperature, "fluid_temperature")
        return plot.figure(f"Saturated steam along the line<br><sup>at {at} all along, condensing "
                           f"{display.text(view.condensate_rate, 'condensate_rate')} over "
                           f"{display.text(view.length, 'length')}; air "
                           f"{display.text(view.air_temperature, 'air_temperature')}, wind "
                           f"{display.text(view.wind_speed, 'wind_speed')}</sup>", height=340, showlegend=False)
    return plot.figure(f"Fluid temperature along the line<br><sup>{display.text(i.mass_flow, 'mass_flow')} over "
                       f"{display.text(view.length, 'length')}, air "
                       f"{display.text(view.air_temperature, 'air_temperature')}, wind "
                       f"{display.text(view.wind_speed, 'wind_speed')}; markers: the solver's steps</sup>",
                       height=340, showlegend=False)


def operation_sweep_figure(view, display: Display) -> go.Figure:
    """Outlet temperature (steam: condensate), tracing duty and freeze times against one input
    (:class:`compute.OperationView`).

    The first row is at the case's air and wind, the tracing and freeze rows at the coldest air and
    strongest wind; each row marks the value it uses. Never-freezing points are gaps.
    """
    name = view.sweep_input
    steam = view.inputs.service == "steam"
    plot = Plot("operation", ("Condensate (the case's air and wind)" if steam else
                               "Outlet temperature (the case's air and wind)",
                               "Tracing duty (coldest air, strongest wind)",
                               "Time until the stopped line freezes (coldest air, strongest wind)"))
    x = display.value(view.sweep_values, name)
    hover = lambda y_name: hover_template(display, name, y_name)  # noqa: E731
    if steam:
        plot.add(line_trace(x, display.value(view.sweep_condensate, "condensate_rate"), "condensate",
                       line=dict(color="#111111", width=2.5), hovertemplate=hover("condensate_rate")), 1, 1)
    else:
        plot.add(line_trace(x, display.value(view.sweep_outlet, "outlet_temperature"), "outlet temperature",
                       line=dict(color="#111111", width=2.5), hovertemplate=hover("outlet_temperature")), 1, 1)
        plot.hline(float(display.value(view.inlet_temperature, "fluid_temperature")), 1, 1,
                   line=dict(color=GREY, width=1, dash="dot"), text="inlet")
    plot.add(line_trace(x, display.value(view.sweep_tracing, "tracing_per_length"), "tracing duty",
                   line=dict(color=settings.PALETTE[1], width=2.5), hovertemplate=hover("tracing_per_length")),
             2, 1)
    zero = display.text(273.15, "air_temperature", 0)  # the label only: 0 °C or 32 °F
    plot.add(line_trace(x, display.value(view.sweep_freezing_point, "freeze_time"), f"time to {zero}",
                   line=dict(color=settings.PALETTE[0], width=2.5), hovertemplate=hover("freeze_time")), 3, 1)
    plot.add(line_trace(x, display.value(view.sweep_frozen, "freeze_time"), "time to frozen solid",
                   line=dict(color=settings.PALETTE[0], width=2.5, dash="dash"), hovertemplate=hover("freeze_time")),
             3, 1)
    marker = dict(color="#111111", width=1, dash="dot")
    plot.vline(float(display.value(view.current_operating, name)), 1, 1, line=marker, text="this case")
    for row in (2, 3):
        plot.vline(float(display.value(view.current_design, name)), row, 1, line=marker,
                   text="design" if row == 2 else None)
    plot.axis("x", 3, 1, title=dict(text=display.axis_title(name)))
    if steam:
        plot.axis("y", 1, 1, title=dict(text=display.axis_title("condensate_rate", "Condensate")), rangemode="tozero")
    else:
        plot.axis("y", 1, 1, title=dict(text=display.axis_title("outlet_temperature", "Outlet")))
    plot.axis("y", 2, 1, title=dict(text=display.axis_title("tracing_per_length", "Duty")), rangemode="tozero")
    plot.axis("y", 3, 1, title=dict(text=display.axis_title("freeze_time", "Time")), rangemode="tozero")
    return plot.figure(f"The line in operation against {input_label(name).lower()}<br><sup>gaps in the bottom row: "
                       f"the stopped line settles above {zero} there</sup>", height=720,
                       legend=dict(orientation="h", y=-0.08, font=dict(size=11)))


# ----------------------------------------------------------------------------- tanks and ducts
def vessel_figure(view, display: Display) -> go.Figure:
    """Heat flow per face (bars) and the faces and total against one input (:class:`compute.VesselView`)."""
    name = view.sweep_input
    plot = Plot("vessels", ("Per face, this case", f"Against {input_label(name).lower()}"))
    names = [f["name"] for f in view.faces]
    colours = {n: settings.PALETTE[k % len(settings.PALETTE)] for k, n in enumerate(names)}
    plot.add(dict(type="bar", x=names, y=display.value(np.array([f["q_total"] for f in view.faces]), "face_loss"),
                  marker=dict(color=[colours[n] for n in names]), name="per face", showlegend=False,
                  customdata=[[display.number(f["surface_temperature"], "surface_temperature"),
                               display.number(f["area"], "face_area")] for f in view.faces],
                  hovertemplate=(f"%{{x}}: %{{y:.4g}} {display.label('face_loss')}<br>surface %{{customdata[0]}} "
                                 f"{display.label('surface_temperature')}, %{{customdata[1]}} "
                                 f"{display.label('face_area')}<extra></extra>")), 1, 1)
    x = display.value(view.sweep_values, name)
    hover = hover_template(display, name, "face_loss")
    plot.add(line_trace(x, display.value(view.sweep_total, "face_loss"), "total", hovertemplate=hover,
                   line=dict(color="#111111", width=2.8)), 1, 2)
    if len(names) > 1:
        for n in names:
            plot.add(line_trace(x, display.value(view.sweep_faces[n], "face_loss"), n, hovertemplate=hover,
                           line=dict(color=colours[n], width=1.8)), 1, 2)
    plot.vline(float(display.value(view.current, name)), 1, 2, line=dict(color="#111111", width=1, dash="dot"),
               text="this case")
    plot.axis("y", 1, 1, title=dict(text=display.axis_title("face_loss", "Heat flow")))
    plot.axis("x", 1, 2, title=dict(text=display.axis_title(name)))
    plot.axis("y", 1, 2, title=dict(text=display.axis_title("face_loss", "Heat flow")))
    i = view.inputs
    what = settings.VESSEL_SHAPES[i.shape]
    return plot.figure(f"Heat flow of the {what}<br><sup>contents at "
                       f"{display.text(i.contents_temperature, 'contents_temperature')}, air "
                       f"{display.text(view.air_temperature, 'air_temperature')}, wind "
                       f"{display.text(view.wind_speed, 'wind_speed')}, {'outdoors' if view.outdoor else 'indoors'}"
                       f"; positive: a loss</sup>", height=430, legend=dict(orientation="h", y=-0.2, font=dict(size=11)))
