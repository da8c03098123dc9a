"""Figures as pure functions of results: convlib results (SI) and a :class:`Display` in, plotly figure out.

No function here computes physics: every plotted number is a field of a
:class:`convlib.study.StudyResult` or of a :mod:`dashboard.compute` result,
converted for display with :mod:`convlib.units`. The running app copies the
returned figure into a ``FigureWidget`` in place (:func:`dashboard.panels.base.sync_figure`).

Figures are built with the kit of :mod:`dashboard.plotting`. This module holds the study's figures
(sweep, correlation spread, regimes, uncertainty, maps); :mod:`dashboard.figures_design` those of
insulation, lines in operation and tanks (importable from here too).
"""
from __future__ import annotations

import numpy as np
import plotly.graph_objects as go

from . import settings
from .display import Display, geometry_name, input_label, law_name, regime_text
from .plotting import (BAND, GREY, STAR, TEMPLATE, VALIDATE, Plot, decade_ticks, empty_figure, hover_template,  # noqa: F401
                       law_traces, line_trace, method_name, one_two_five_ticks, split_by_validity, styled)

__all__ = ["sweep_figure", "sweep_marker", "spread_figure", "regime_figure", "uncertainty_figure", "insulation_figure",
           "map_figure", "operation_profile_figure", "operation_sweep_figure", "split_by_validity", "empty_figure",
           "styled", "TEMPLATE", "VALIDATE", "vessel_figure"]

# ----------------------------------------------------------------------------- sweep
def sweep_figure(sweep, display: Display, current: float | None = None, log_x: bool = False,
                 chosen: tuple[str, str] | None = None) -> go.Figure:
    """Heat loss against one input: default laws with convection and radiation parts, every law, model-form band.

    Parameters
    ----------
    sweep : convlib.study.SweepResult
    display : Display
    current : float, optional
        The case's value of the swept input [SI], marked by a vertical line.
    log_x : bool
        Logarithmic x axis (for a log-spaced sweep).
    chosen : (str, str), optional
        Selected natural and forced law keys.
    """
    name = sweep.input
    x = display.value(sweep.values, name)
    q = lambda values: display.value(values, "q_per_length")  # noqa: E731
    hover = hover_template(display, name, "q_per_length")
    plot = Plot()
    plot.add(line_trace(x, q(sweep.band_low), "band, low", line=dict(width=0), showlegend=False, hoverinfo="skip"))
    plot.add(line_trace(x, q(sweep.band_high), "model-form band (stated accuracy)", line=dict(width=0), fill="tonexty",
                   fillcolor=BAND, hoverinfo="skip"))
    plot.add(line_trace(x, q(sweep.default.q_per_length), "total (selected laws)", line=dict(color="#111111", width=3),
                   hovertemplate=hover))
    plot.add(line_trace(x, q(sweep.default.q_convection_per_length), "convection part",
                   line=dict(color=GREY, width=2, dash="dash"), hovertemplate=hover))
    plot.add(line_trace(x, q(sweep.default.q_radiation_per_length), "radiation part",
                   line=dict(color="#b05a00", width=2, dash="dashdot"), hovertemplate=hover))
    for i, m in enumerate(sweep.methods):
        is_chosen = chosen is not None and m.method == chosen[0 if m.mode == "natural" else 1]
        law_traces(plot, x, q(m.values.q_per_length), m.in_range, method_name(m.mode, m.method, is_chosen),
                    settings.PALETTE[i % len(settings.PALETTE)], f"{m.mode}:{m.method}", hover=hover)
    if current is not None:  # first shape and first annotation: moved alone by sweep_marker
        plot.vline(float(display.value(current, name)), line=dict(color="#111111", width=1, dash="dot"),
                   text="this case")
    plot.hline(0.0, line=dict(color="#999999", width=1))
    plot.axis("x", title=dict(text=display.axis_title(name)), type="log" if log_x else "linear")
    plot.axis("y", title=dict(text=display.axis_title("q_per_length", "Heat loss")))
    return plot.figure(f"Heat loss against {input_label(name).lower()}<br><sup>thin lines: total with each "
                       f"correlation (the other mode at its selected law); dotted: outside the law's validity range"
                       f"</sup>", legend=dict(font=dict(size=11), groupclick="togglegroup"))


def sweep_marker(name: str, current: float, display: Display) -> dict:
    """Where :func:`sweep_figure` marks the case (``current`` [SI] of input ``name``), as plotly relayout
    properties: moving the marker alone is a redraw of one shape and one label in the browser, not of the plot.

    >>> sweep_marker("wind_speed", 2.5, Display("SI"))
    {'shapes[0].x0': 2.5, 'shapes[0].x1': 2.5, 'annotations[0].x': 2.5}
    """
    x = float(display.value(current, name))
    return {"shapes[0].x0": x, "shapes[0].x1": x, "annotations[0].x": x}


# ----------------------------------------------------------------------------- correlation spread
def _is_log(values) -> bool:
    v = np.asarray(values, dtype=float)
    if v.size < 3 or np.any(v <= 0):
        return False
    return bool(np.allclose(np.diff(np.log(v)), np.log(v[1] / v[0]), rtol=1e-6))


def spread_figure(result, display: Display, x_axis: str = "input",
                  chosen: tuple[str, str] | None = None) -> go.Figure:
    """Spread between correlations along the sweep, and h_convection of every law at the case.

    Parameters
    ----------
    result : convlib.study.StudyResult
        With one sweep (``result.sweeps[0]``) and the base-case comparison.
    x_axis : {"rayleigh", "input"}
        Plot the spread against the Rayleigh number of each sweep point or against the swept input.
    """
    sweep = result.sweeps[0]
    plot = Plot("spread", ("Spread along the sweep", "h convection of each law at this case"))
    if x_axis == "rayleigh":
        x, x_title, log_x = np.asarray(sweep.default.rayleigh), "Rayleigh number Ra [–]", True
        x_hover = "Ra %{x:.3g}"
    else:
        x = display.value(sweep.values, sweep.input)
        x_title, log_x = display.axis_title(sweep.input), _is_log(sweep.values)
        x_hover = f"%{{x:.4g}} {display.label(sweep.input)}"
    hover = x_hover + "<br>%{y:.3g} %<extra>%{fullData.name}</extra>"
    colours = {"natural": settings.PALETTE[0], "forced": settings.PALETTE[1]}
    as_percent = lambda v: np.array([np.nan if s is None else 100.0 * s for s in v])  # noqa: E731
    for sp in sweep.spreads:
        colour = colours[sp.mode]
        plot.add(line_trace(x, as_percent(sp.nusselt), f"{sp.mode} laws: Nu", mode="lines+markers", marker=dict(size=4),
                       line=dict(color=colour, width=2.2), hovertemplate=hover))
        plot.add(line_trace(x, as_percent(sp.q_per_length), f"{sp.mode} laws: heat loss",
                       line=dict(color=colour, width=1.6, dash="dash"), hovertemplate=hover))
        plot.add(line_trace(x, as_percent(sp.extrapolated_nusselt), f"{sp.mode} laws: Nu, all (extrapolated)",
                       opacity=0.55, line=dict(color=colour, width=1.4, dash="dot"), hovertemplate=hover))
    methods = result.base_methods
    is_chosen = [bool(chosen) and m.method == chosen[0 if m.mode == "natural" else 1] for m in methods]
    plot.add(dict(type="bar", x=[[m.mode for m in methods], [law_name(m.method) for m in methods]],
                  y=display.value([m.values.h_convection[0] for m in methods], "h_convection"), name="h convection by law",
                  marker=dict(color=[colours[m.mode] for m in methods],
                              line=dict(color=["#111111" if c else "rgba(0,0,0,0)" for c in is_chosen], width=2),
                              opacity=[1.0 if m.in_range[0] else 0.4 for m in methods]),
                  text=[display.number(m.values.h_convection[0], "h_convection") for m in methods],
                  textposition="outside", showlegend=False,
                  hovertemplate="%{x}<br>%{y:.3g} " + display.label("h_convection") + "<extra></extra>"), 1, 2)
    plot.axis("x", 1, 1, title=dict(text=x_title), type="log" if log_x else "linear",
              **(decade_ticks(x) if log_x else {}))
    plot.axis("y", 1, 1, title=dict(text="Spread [%]"), rangemode="tozero")
    plot.axis("y", 1, 2, title=dict(text=display.axis_title("h_convection", "h convection")))
    return plot.figure("Correlation disagreement<br><sup>spread = (max − min) / median over the laws that apply at "
                       "each point (Nu, and the heat loss it gives); faded bars: law outside its validity range; "
                       "outlined: selected law</sup>")


# ----------------------------------------------------------------------------- regimes
def regime_figure(view, rmap, display: Display) -> go.Figure:
    """Nu against Ra and Re for every law of the shape, laminar/turbulent limits, the case, and the mode map.

    Parameters
    ----------
    view : dashboard.compute.RegimeView
    rmap : dashboard.compute.RegimeMap or None
        The map (``None`` while it is being computed).
    """
    plot = Plot("regimes", (f"Natural convection: Nu against Ra ({geometry_name(view.natural_geometry)})",
                             "Convection mode of the outer surface",
                             f"Forced convection: Nu against Re ({geometry_name(view.forced_geometry)})"))
    for row, curves, limits, group in ((1, view.natural, view.natural_limits, "Ra"),
                                       (2, view.forced, view.forced_limits, "Re")):
        hover = f"{group} %{{x:.3g}}<br>Nu %{{y:.3g}}<extra>%{{fullData.name}}</extra>"
        for i, c in enumerate(curves):
            colour = settings.PALETTE[(i + (0 if row == 1 else 4)) % len(settings.PALETTE)]
            law_traces(plot, c.x, c.nusselt, c.in_range, method_name(c.mode, c.method, c.chosen), colour,
                        f"{c.mode}:{c.method}", row=row, col=1, hover=hover, width=2.6 if c.chosen else 1.4)
        if np.isfinite(limits[0]):
            plot.vrect(limits[0], limits[1], row, 1)
        x_all = np.concatenate([np.asarray(c.x, dtype=float) for c in curves]) if curves else np.array([1.0])
        y_all = np.concatenate([np.asarray(c.nusselt, dtype=float) for c in curves]) if curves else np.array([1.0])
        plot.axis("x", row, 1, type="log", **decade_ticks(x_all),
                  title=dict(text=f"{'Rayleigh' if row == 1 else 'Reynolds'} number {group} [–]"))
        plot.axis("y", row, 1, type="log", **decade_ticks(y_all), title=dict(text="Nusselt number Nu [–]"))
    # one "this case" entry in the legend: the star of each chart belongs to the same group
    plot.add(dict(type="scatter", mode="markers", x=[view.rayleigh], y=[view.natural_nusselt],
                  name="this case", legendgroup="this case", marker=STAR,
                  hovertemplate="this case, natural law<br>Ra %{x:.3g}<br>Nu %{y:.3g}<extra></extra>"), 1, 1)
    still = view.reynolds is None
    plot.add(dict(type="scatter", mode="markers", x=[] if still else [view.reynolds],
                  y=[] if still else [view.forced_nusselt], name="this case", legendgroup="this case",
                  showlegend=False, marker=STAR,
                  hovertemplate="this case, forced law<br>Re %{x:.3g}<br>Nu %{y:.3g}<extra></extra>"), 2, 1)
    # ---- mode map (log axes: still air and small differences get room)
    c = settings.MODE_COLOURS
    scale = [[0.0, c[0]], [1 / 3, c[0]], [1 / 3, c[1]], [2 / 3, c[1]], [2 / 3, c[2]], [1.0, c[2]]]
    cold = view.temperature_difference < 0
    if rmap is None:
        x, y, z, ri = [], [], [[]], [[]]
        plot.note("computing the map…", 1, 2)
    else:
        x = display.value(rmap.wind_speed, "wind_speed")
        y = display.value(np.abs(rmap.temperature_difference), "temperature_difference")
        z, ri = rmap.regime, rmap.richardson
    plot.add(dict(type="heatmap", x=x, y=y, z=z, customdata=ri, zmin=-0.5, zmax=2.5, colorscale=scale,
                  name="mode map", colorbar=dict(tickvals=[0, 1, 2], ticktext=["natural", "mixed", "forced"],
                                                 len=0.9, x=1.02, thickness=14),
                  hovertemplate=(f"wind %{{x:.3g}} {display.label('wind_speed')}<br>ΔT %{{y:.3g}} "
                                 f"{display.label('temperature_difference')}<br>Ri = Gr/Re² %{{customdata:.3g}}"
                                 "<extra></extra>")), 1, 2)
    still_air = view.wind_speed <= 0
    px = view.wind_speed if not still_air or rmap is None else rmap.wind_speed[0]  # still air: at the axis start
    plot.add(dict(type="scatter", mode="markers", x=[float(display.value(px, "wind_speed"))],
                  y=[float(display.value(abs(view.temperature_difference), "temperature_difference"))],
                  name="this case", legendgroup="this case", showlegend=False, marker=dict(STAR, size=16),
                  hovertemplate="this case<extra></extra>"), 1, 2)
    plot.axis("x", 1, 2, type="log", **one_two_five_ticks(x), title=dict(
        text=display.axis_title("wind_speed") + (" (this case: still air)" if still_air else "")))
    plot.axis("y", 1, 2, type="log", **one_two_five_ticks(y), automargin=True, title=dict(
        standoff=6, text=display.axis_title("temperature_difference",
                                            "Air − surface temperature" if cold else "Surface − air temperature")))
    subtitle = (f"this case: {regime_text(view.regime, view.flow)} · laws drawn at the case's film Pr = "
                f"{view.prandtl:.3f}; dotted: outside the law's range; grey band: laminar→turbulent transition")
    return plot.figure(f"Regimes<br><sup>{subtitle}</sup>", height=620,
                       legend=dict(orientation="h", y=-0.12, font=dict(size=10)),
                       margin=dict(l=70, r=20, t=90, b=40))


# ----------------------------------------------------------------------------- uncertainty
def _range_text(display: Display, name: str, low: float, high: float) -> str:
    unit = display.label(name)
    text = f"{display.number(low, name)}–{display.number(high, name)}"
    return f"{input_label(name)} {text}" + ("" if unit == "–" else f" {unit}")


def uncertainty_figure(tornado, monte_carlo, display: Display, base_q: float) -> go.Figure:
    """Tornado of the study's input ranges and the Monte Carlo histogram with P5, P50 and P95.

    Parameters
    ----------
    tornado : list of convlib.study.TornadoBar
        Largest swing first (as :func:`convlib.study.run_study` returns them).
    monte_carlo : convlib.study.MonteCarloResult or None
        ``None`` until a Monte Carlo run is asked for.
    base_q : float
        Heat loss of the case [W/m], the tornado's axis.
    """
    plot = Plot("uncertainty", ("Tornado: one input at a time", "Monte Carlo histogram"))
    bars = list(reversed(tornado or []))
    labels = [_range_text(display, b.input, b.low, b.high) for b in bars]
    base = float(display.value(base_q, "q_per_length"))
    unit = display.label("q_per_length")
    for attr, name, colour in (("q_low", "input at its low value", settings.PALETTE[0]),
                               ("q_high", "input at its high value", settings.PALETTE[1])):
        values = np.asarray(display.value([getattr(b, attr) for b in bars], "q_per_length"))
        plot.add(dict(type="bar", y=labels, x=values - base, base=base, orientation="h", name=name,
                      marker=dict(color=colour),
                      hovertemplate=f"%{{y}}<br>heat loss %{{x:.4g}} {unit}<extra>{name}</extra>"), 1, 1)
    plot.vline(base, 1, 1, line=dict(color="#111111", width=1))
    mc = monte_carlo
    if mc is None:
        plot.add(dict(type="bar", x=[], y=[], name="samples", showlegend=False), 1, 2)
        plot.note("press “Run Monte Carlo”", 1, 2)
        sub = "bars from the case's heat loss to the value with one input at its end of range"
    else:
        edges = np.asarray(display.value(mc.histogram_edges, "q_per_length"))
        plot.add(dict(type="bar", x=0.5 * (edges[1:] + edges[:-1]), y=mc.histogram_counts, width=np.diff(edges),
                      name="samples", marker=dict(color=settings.PALETTE[5]), showlegend=False,
                      hovertemplate=f"%{{x:.4g}} {unit}<br>%{{y}} samples<extra></extra>"), 1, 2)
        for label, value, pos, height in (("P5", mc.p5, "top left", 1.0), ("P50", mc.p50, "top right", 0.93),
                                          ("P95", mc.p95, "top right", 1.0)):
            plot.vline(float(display.value(value, "q_per_length")), 1, 2,
                       line=dict(color="#111111", width=1.5, dash="solid" if label == "P50" else "dash"),
                       text=f"{label} {display.number(value, 'q_per_length')}", position=pos, height=height)
        sub = (f"{mc.samples:,} samples (seed {mc.seed}), model form: {settings.MODEL_FORMS.get(mc.model_form, mc.model_form)}; mean "
               f"{display.text(mc.mean, 'q_per_length')}, std {display.number(mc.std, 'q_per_length')}")
    for col in (1, 2):
        plot.axis("x", 1, col, title=dict(text=display.axis_title("q_per_length", "Heat loss")))
    plot.axis("y", 1, 2, title=dict(text="Samples"))
    plot.axis("y", 1, 1, tickfont=dict(size=11))
    return plot.figure(f"Uncertainty of the heat loss<br><sup>{sub}</sup>", barmode="overlay",
                       legend=dict(orientation="h", y=-0.18, font=dict(size=11)),
                       margin=dict(l=20, r=20, t=90, b=60))


# ----------------------------------------------------------------------------- maps (report)
def map_figure(m, display: Display) -> go.Figure:
    """Heat loss over a 2-D map of two inputs (:class:`convlib.study.MapResult`)."""
    plot = Plot()
    x = display.value(m.x, m.x_input)
    y = display.value(m.y, m.y_input)
    z = display.value(np.asarray(m.q_per_length, dtype=float), "q_per_length")
    plot.add(dict(type="heatmap", x=x, y=y, z=z, colorscale="Viridis", name="heat loss",
                  colorbar=dict(title=dict(text=display.axis_title("q_per_length", "Heat loss"), side="right")),
                  hovertemplate=(f"{input_label(m.x_input)} %{{x:.3g}} {display.label(m.x_input)}<br>"
                                 f"{input_label(m.y_input)} %{{y:.3g}} {display.label(m.y_input)}<br>"
                                 f"%{{z:.4g}} {display.label('q_per_length')}<extra></extra>")))
    plot.add(dict(type="contour", x=x, y=y, z=z, showscale=False, contours=dict(coloring="none", showlabels=True),
                  line=dict(color="white", width=1), hoverinfo="skip", name="contours"))
    plot.axis("x", title=dict(text=display.axis_title(m.x_input)))
    plot.axis("y", title=dict(text=display.axis_title(m.y_input)))
    return plot.figure(f"Heat loss over {input_label(m.x_input).lower()} and {input_label(m.y_input).lower()}")


from .figures_design import insulation_figure, operation_profile_figure, operation_sweep_figure, vessel_figure  # noqa: E402
