"""Figures as pure functions of results: convlib results (SI) and a :class:`Display` in, plotly figure out.

No function here computes physics: every plotted number is a field of a
:class:`convlib.study.StudyResult` or of a :mod:`dashboard.compute` result,
converted for display with :mod:`convlib.units`. The running app copies the
returned figure into a ``FigureWidget`` in place (:func:`dashboard.panels.base.sync_figure`).

Figures are assembled from plain dicts and built once without plotly's property
checks (building through plotly's objects costs more than the physics of a
sweep); a test builds every figure with the checks on (:data:`VALIDATE`).
"""
from __future__ import annotations

import copy
import functools
import math

import numpy as np
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from . import settings
from .display import Display, geometry_name, input_label, law_name, regime_text

__all__ = ["sweep_figure", "spread_figure", "regime_figure", "uncertainty_figure", "insulation_figure",
           "map_figure", "operation_profile_figure", "operation_sweep_figure", "split_by_validity", "empty_figure",
           "styled", "TEMPLATE", "VALIDATE"]

#: Check every property when a figure is built (tests switch it on).
VALIDATE = False
#: Plotly template of every figure, applied where a figure is first shown (:func:`styled`).
TEMPLATE = "plotly_white"

_GREY = "#5f6b76"
_BAND = "rgba(27, 94, 154, 0.14)"
_STAR = dict(symbol="star", size=15, color="#d62728", line=dict(color="#111111", width=1))

#: Subplot grids (make_subplots arguments) by name.
_GRIDS = {
    "spread": dict(rows=1, cols=2, column_widths=[0.58, 0.42], horizontal_spacing=0.12),
    "regimes": dict(rows=2, cols=2, specs=[[{}, {"rowspan": 2}], [{}, None]], horizontal_spacing=0.13,
                    vertical_spacing=0.2, column_widths=[0.5, 0.5]),
    "uncertainty": dict(rows=1, cols=2, column_widths=[0.5, 0.5], horizontal_spacing=0.26),
    "insulation": dict(rows=2, cols=1, shared_xaxes=True, vertical_spacing=0.1),
    "operation": dict(rows=3, cols=1, shared_xaxes=True, vertical_spacing=0.09),
    "vessels": dict(rows=1, cols=2, column_widths=[0.34, 0.66], horizontal_spacing=0.12),
}


@functools.lru_cache(maxsize=None)
def _grid(name: str, titles: int) -> tuple[dict, dict]:
    """Layout (without template) and axis references per cell of a named grid."""
    spec = _GRIDS[name]
    fig = make_subplots(**spec, subplot_titles=[f"title {i}" for i in range(titles)])
    layout = fig.layout.to_plotly_json()
    layout.pop("template", None)
    refs = {}
    for r in range(1, spec["rows"] + 1):
        for c in range(1, spec["cols"] + 1):
            cell = fig.get_subplot(r, c)
            if cell is not None:
                refs[(r, c)] = (cell.xaxis.plotly_name.replace("axis", ""), cell.yaxis.plotly_name.replace("axis", ""))
    return layout, refs


class _Plot:
    """Traces, shapes and annotations collected as dicts, built into one figure at the end."""

    def __init__(self, grid: str | None = None, titles: tuple[str, ...] = ()):
        if grid is None:
            self.layout, self.refs = {}, {(1, 1): ("x", "y")}
        else:
            base, self.refs = _grid(grid, len(titles))
            self.layout = copy.deepcopy(base)
            for note, text in zip(self.layout["annotations"], titles):
                note["text"] = text
        self.layout.setdefault("annotations", [])
        self.layout["shapes"] = []
        self.data: list[dict] = []

    def add(self, trace: dict, row: int = 1, col: int = 1) -> None:
        x, y = self.refs[(row, col)]
        if (x, y) != ("x", "y"):
            trace.update(xaxis=x, yaxis=y)
        self.data.append(trace)

    def axis(self, which: str, row: int = 1, col: int = 1, **props) -> None:
        ref = self.refs[(row, col)][0 if which == "x" else 1]
        self.layout.setdefault(f"{which}axis{ref[1:]}", {}).update(props)

    def vline(self, x, row=1, col=1, line=None, text=None, position="top left", height=None) -> None:
        xr, yr = self.refs[(row, col)]
        self.layout["shapes"].append(dict(type="line", xref=xr, yref=f"{yr} domain", x0=x, x1=x, y0=0, y1=1,
                                          line=line or {}))
        if text:
            anchor = {"top left": ("right", "top"), "top right": ("left", "top"), "bottom right": ("left", "bottom"),
                      "top": ("center", "bottom")}[position]
            y = height if height is not None else (0 if "bottom" in position else 1)
            self.layout["annotations"].append(dict(text=text, x=x, xref=xr, y=y, yref=f"{yr} domain",
                                                   xanchor=anchor[0], yanchor=anchor[1], showarrow=False,
                                                   font=dict(size=11), bgcolor="rgba(255,255,255,0.8)"))

    def hline(self, y, row=1, col=1, line=None, text=None) -> None:
        xr, yr = self.refs[(row, col)]
        self.layout["shapes"].append(dict(type="line", xref=f"{xr} domain", yref=yr, x0=0, x1=1, y0=y, y1=y,
                                          line=line or {}))
        if text:
            self.layout["annotations"].append(dict(text=text, x=1, xref=f"{xr} domain", y=y, yref=yr,
                                                   xanchor="right", yanchor="bottom", showarrow=False,
                                                   font=dict(size=11)))

    def vrect(self, x0, x1, row=1, col=1, fill="rgba(120,120,120,0.15)") -> None:
        xr, yr = self.refs[(row, col)]
        self.layout["shapes"].append(dict(type="rect", xref=xr, yref=f"{yr} domain", x0=x0, x1=x1, y0=0, y1=1,
                                          fillcolor=fill, line=dict(width=0), layer="below"))

    def note(self, text, row=1, col=1, x=0.5, y=0.5) -> None:
        xr, yr = self.refs[(row, col)]
        self.layout["annotations"].append(dict(text=text, x=x, y=y, xref=f"{xr} domain", yref=f"{yr} domain",
                                               showarrow=False, font=dict(size=14, color=_GREY)))

    def figure(self, title: str, height: int = settings.FIGURE_HEIGHT, width: int | None = None,
               **extra) -> go.Figure:
        """The figure; ``width`` None leaves the width to the page (reports), the app sets its own."""
        layout = dict(title=dict(text=title, x=0.01, font=dict(size=15)), height=height, width=width,
                      margin=dict(l=70, r=20, t=80, b=60), legend=dict(font=dict(size=11)), uirevision="keep",
                      hoverlabel=dict(namelength=-1))
        layout.update(extra)
        self.layout.update(layout)
        return go.Figure({"data": self.data, "layout": self.layout}, _validate=VALIDATE)


def styled(fig: go.Figure) -> go.Figure:
    """A checked copy of ``fig`` with the dashboard's template (for a new FigureWidget or a report)."""
    return go.Figure(fig.to_plotly_json()).update_layout(template=TEMPLATE)


def empty_figure(title: str, message: str) -> go.Figure:
    """A figure with a message instead of data (nothing to show yet, or not applicable)."""
    plot = _Plot()
    plot.note(message)
    plot.axis("x", visible=False)
    plot.axis("y", visible=False)
    return plot.figure(title, height=320)


def split_by_validity(y, in_range) -> tuple[np.ndarray, np.ndarray]:
    """Two copies of ``y``: NaN outside the valid points, and NaN inside (bordering points kept in both).

    Examples
    --------
    >>> a, b = split_by_validity([1.0, 2.0, 3.0, 4.0], [True, True, False, False])
    >>> a.tolist(), b.tolist()
    ([1.0, 2.0, nan, nan], [nan, 2.0, 3.0, 4.0])
    """
    y = np.asarray(y, dtype=float)
    ok = np.asarray(in_range, dtype=bool)
    out = ~ok
    grown = out.copy()
    grown[1:] |= out[:-1]
    grown[:-1] |= out[1:]
    return np.where(ok, y, np.nan), np.where(grown, y, np.nan)


def decade_ticks(values) -> dict:
    """Log-axis properties that label powers of ten only, as 10ⁿ (every decade, or every second or third
    one over a wide range): no bare minor-tick digits.

    >>> decade_ticks([1e-4, 1e14])
    {'dtick': 3, 'exponentformat': 'power', 'showexponent': 'all'}
    >>> decade_ticks([10.0, 1e5])["dtick"]
    1
    """
    v = np.asarray(values, dtype=float)
    v = v[np.isfinite(v) & (v > 0)]
    span = float(np.log10(v.max() / v.min())) if v.size else 1.0
    step = 1 if span <= 8 else 2 if span <= 14 else 3
    return dict(dtick=step, exponentformat="power", showexponent="all")


def one_two_five_ticks(values) -> dict:
    """Log-axis properties with labels at 1, 2 and 5 times each power of ten, written as plain numbers
    (0.05, 0.1, 0.2 ... 20), for axes of a few decades read in engineering units.

    >>> one_two_five_ticks([0.01, 0.5])["ticktext"]
    ['0.01', '0.02', '0.05', '0.1', '0.2', '0.5']
    """
    v = np.asarray(values, dtype=float)
    v = v[np.isfinite(v) & (v > 0)]
    if v.size == 0:
        return dict(exponentformat="power")
    low, high = math.floor(math.log10(v.min())), math.ceil(math.log10(v.max()))
    ticks = [m * 10.0 ** e for e in range(low, high + 1) for m in (1, 2, 5)]
    ticks = [t for t in ticks if v.min() / 1.5 <= t <= v.max() * 1.5]
    return dict(tickmode="array", tickvals=ticks, ticktext=[f"{t:.10g}" for t in ticks])


def _hover(display: Display, x_name: str, y_name: str) -> str:
    return (f"{input_label(x_name)}: %{{x:.4g}} {display.label(x_name)}<br>"
            f"%{{y:.4g}} {display.label(y_name)}<extra>%{{fullData.name}}</extra>")


def _line(x, y, name, **style) -> dict:
    return {"type": "scatter", "mode": "lines", "x": x, "y": y, "name": name, **style}


def _law_traces(plot, x, y, ok, name, colour, group, row=1, col=1, hover=None, width=1.6):
    inside, outside = split_by_validity(y, ok)
    # a part with no point is sent empty: plotly.js echoes an all-NaN array back in a form that plotly's
    # FigureWidget cannot read (the page's update is then refused)
    part = lambda v: (x, v) if np.isfinite(v).any() else ([], [])  # noqa: E731
    (x_in, inside), (x_out, outside) = part(inside), part(outside)
    plot.add(_line(x_in, inside, name, legendgroup=group, hovertemplate=hover, line=dict(color=colour, width=width)),
             row, col)
    plot.add(_line(x_out, outside, f"{name} (outside range)", legendgroup=group, showlegend=False,
                   hovertemplate=hover, opacity=0.5, line=dict(color=colour, width=width, dash="dot")), row, col)


def _method_name(mode: str, method: str, chosen: bool = False) -> str:
    return f"{mode}: {law_name(method)}" + (" (selected)" if chosen else "")


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
    hover = _hover(display, name, "q_per_length")
    plot = _Plot()
    plot.add(_line(x, q(sweep.band_low), "band, low", line=dict(width=0), showlegend=False, hoverinfo="skip"))
    plot.add(_line(x, q(sweep.band_high), "model-form band (stated accuracy)", line=dict(width=0), fill="tonexty",
                   fillcolor=_BAND, hoverinfo="skip"))
    plot.add(_line(x, q(sweep.default.q_per_length), "total (selected laws)", line=dict(color="#111111", width=3),
                   hovertemplate=hover))
    plot.add(_line(x, q(sweep.default.q_convection_per_length), "convection part",
                   line=dict(color=_GREY, width=2, dash="dash"), hovertemplate=hover))
    plot.add(_line(x, q(sweep.default.q_radiation_per_length), "radiation part",
                   line=dict(color="#b05a00", width=2, dash="dashdot"), hovertemplate=hover))
    for i, m in enumerate(sweep.methods):
        is_chosen = chosen is not None and m.method == chosen[0 if m.mode == "natural" else 1]
        _law_traces(plot, x, q(m.values.q_per_length), m.in_range, _method_name(m.mode, m.method, is_chosen),
                    settings.PALETTE[i % len(settings.PALETTE)], f"{m.mode}:{m.method}", hover=hover)
    if current is not None:
        plot.vline(float(display.value(current, name)), line=dict(color="#111111", width=1, dash="dot"),
                   text="this case")
    plot.hline(0.0, line=dict(color="#999999", width=1))
    plot.axis("x", title=dict(text=display.axis_title(name)), type="log" if log_x else "linear")
    plot.axis("y", title=dict(text=display.axis_title("q_per_length", "Heat loss")))
    return plot.figure(f"Heat loss against {input_label(name).lower()}<br><sup>thin lines: total with each "
                       f"correlation (the other mode at its selected law); dotted: outside the law's validity range"
                       f"</sup>", legend=dict(font=dict(size=11), groupclick="togglegroup"))


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
    plot = _Plot("spread", ("Spread along the sweep", "h convection of each law at this case"))
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
        plot.add(_line(x, as_percent(sp.nusselt), f"{sp.mode} laws: Nu", mode="lines+markers", marker=dict(size=4),
                       line=dict(color=colour, width=2.2), hovertemplate=hover))
        plot.add(_line(x, as_percent(sp.q_per_length), f"{sp.mode} laws: heat loss",
                       line=dict(color=colour, width=1.6, dash="dash"), hovertemplate=hover))
        plot.add(_line(x, as_percent(sp.extrapolated_nusselt), f"{sp.mode} laws: Nu, all (extrapolated)",
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
    plot = _Plot("regimes", (f"Natural convection: Nu against Ra ({geometry_name(view.natural_geometry)})",
                             "Convection mode of the outer surface",
                             f"Forced convection: Nu against Re ({geometry_name(view.forced_geometry)})"))
    for row, curves, limits, group in ((1, view.natural, view.natural_limits, "Ra"),
                                       (2, view.forced, view.forced_limits, "Re")):
        hover = f"{group} %{{x:.3g}}<br>Nu %{{y:.3g}}<extra>%{{fullData.name}}</extra>"
        for i, c in enumerate(curves):
            colour = settings.PALETTE[(i + (0 if row == 1 else 4)) % len(settings.PALETTE)]
            _law_traces(plot, c.x, c.nusselt, c.in_range, _method_name(c.mode, c.method, c.chosen), colour,
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
                  name="this case", legendgroup="this case", marker=_STAR,
                  hovertemplate="this case, natural law<br>Ra %{x:.3g}<br>Nu %{y:.3g}<extra></extra>"), 1, 1)
    still = view.reynolds is None
    plot.add(dict(type="scatter", mode="markers", x=[] if still else [view.reynolds],
                  y=[] if still else [view.forced_nusselt], name="this case", legendgroup="this case",
                  showlegend=False, marker=_STAR,
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
                  name="this case", legendgroup="this case", showlegend=False, marker=dict(_STAR, size=16),
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
    plot = _Plot("uncertainty", ("Tornado: one input at a time", "Monte Carlo histogram"))
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
    plot = _Plot("insulation", ("Surface temperature against insulation thickness",
                                f"Heat {flow} against insulation thickness"))
    t = lambda si: float(display.value(si, "insulation_thickness"))  # noqa: E731
    x = display.value(view.thickness, "insulation_thickness")
    sign = 1.0 if view.hot else -1.0
    plot.add(_line(x, display.value(view.surface_temperature, "surface_temperature"), "surface temperature",
                   line=dict(color="#111111", width=2.5),
                   hovertemplate=_hover(display, "insulation_thickness", "surface_temperature")), 1, 1)
    plot.add(_line(x, display.value(sign * view.q_per_length, "q_per_length"), f"heat {flow}",
                   line=dict(color=settings.PALETTE[0], width=2.5),
                   hovertemplate=_hover(display, "insulation_thickness", "q_per_length")), 2, 1)
    for s in view.sizings:
        colour = _SIZING_COLOURS.get(s.name, _GREY)
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
        plot.add(_line([None], [None], f"{s.name}: {need}", line=dict(color=colour, width=1.5)), 1, 1)
    for r in (1, 2):
        if view.critical > 0:
            plot.vline(t(view.critical), r, 1, line=dict(color=_GREY, width=1, dash="dashdot"),
                       text="critical" if r == 2 else None, position="bottom right")
        plot.vline(t(view.current_thickness), r, 1, line=dict(color="#111111", width=1, dash="dot"))
    plot.add(_line([t(view.current_thickness)], [None], "this case", line=dict(color="#111111", width=1, dash="dot")),
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
    plot = _Plot()
    x = display.value(view.position, "position")
    i = view.inputs
    steam = i.service == "steam"
    plot.add(_line(x, display.value(view.temperature, "fluid_temperature"), "fluid temperature",
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
    plot = _Plot("operation", ("Condensate (the case's air and wind)" if steam else
                               "Outlet temperature (the case's air and wind)",
                               "Tracing duty (coldest air, strongest wind)",
                               "Time until the stopped line freezes (coldest air, strongest wind)"))
    x = display.value(view.sweep_values, name)
    hover = lambda y_name: _hover(display, name, y_name)  # noqa: E731
    if steam:
        plot.add(_line(x, display.value(view.sweep_condensate, "condensate_rate"), "condensate",
                       line=dict(color="#111111", width=2.5), hovertemplate=hover("condensate_rate")), 1, 1)
    else:
        plot.add(_line(x, display.value(view.sweep_outlet, "outlet_temperature"), "outlet temperature",
                       line=dict(color="#111111", width=2.5), hovertemplate=hover("outlet_temperature")), 1, 1)
        plot.hline(float(display.value(view.inlet_temperature, "fluid_temperature")), 1, 1,
                   line=dict(color=_GREY, width=1, dash="dot"), text="inlet")
    plot.add(_line(x, display.value(view.sweep_tracing, "tracing_per_length"), "tracing duty",
                   line=dict(color=settings.PALETTE[1], width=2.5), hovertemplate=hover("tracing_per_length")),
             2, 1)
    zero = display.text(273.15, "air_temperature", 0)  # the label only: 0 °C or 32 °F
    plot.add(_line(x, display.value(view.sweep_freezing_point, "freeze_time"), f"time to {zero}",
                   line=dict(color=settings.PALETTE[0], width=2.5), hovertemplate=hover("freeze_time")), 3, 1)
    plot.add(_line(x, display.value(view.sweep_frozen, "freeze_time"), "time to frozen solid",
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
    plot = _Plot("vessels", ("Per face, this case", f"Against {input_label(name).lower()}"))
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
    hover = _hover(display, name, "face_loss")
    plot.add(_line(x, display.value(view.sweep_total, "face_loss"), "total", hovertemplate=hover,
                   line=dict(color="#111111", width=2.8)), 1, 2)
    if len(names) > 1:
        for n in names:
            plot.add(_line(x, display.value(view.sweep_faces[n], "face_loss"), n, hovertemplate=hover,
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


# ----------------------------------------------------------------------------- maps (report)
def map_figure(m, display: Display) -> go.Figure:
    """Heat loss over a 2-D map of two inputs (:class:`convlib.study.MapResult`)."""
    plot = _Plot()
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
