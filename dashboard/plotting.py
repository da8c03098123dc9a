"""The dashboard's plotting kit: a figure built from plain dicts, grids, ticks, styles, common traces.

Figures are assembled from plain dicts and built once without plotly's property checks (building through
plotly's objects costs more than the physics of a sweep); a test builds every figure with the checks on
(:data:`VALIDATE`). The figures themselves are in :mod:`dashboard.figures` and :mod:`dashboard.figures_design`.
"""
from __future__ import annotations

import copy
import functools
import math

import numpy as np
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from . import settings
from .display import Display, input_label, law_name

__all__ = ["VALIDATE", "TEMPLATE", "Plot", "grid_layout", "styled", "empty_figure", "split_by_validity", "decade_ticks",
           "one_two_five_ticks", "hover_template", "line_trace", "law_traces", "method_name"]

#: Check every property when a figure is built (tests switch it on).
VALIDATE = False
#: Plotly template of every figure, applied where a figure is first shown (:func:`styled`).
TEMPLATE = "plotly_white"

GREY = "#5f6b76"
BAND = "rgba(27, 94, 154, 0.14)"
STAR = dict(symbol="star", size=15, color="#d62728", line=dict(color="#111111", width=1))

#: Subplot grids (make_subplots arguments) by name.
GRIDS = {
    "spread": dict(rows=1, cols=2, column_widths=[0.58, 0.42], horizontal_spacing=0.12),
    "regimes": dict(rows=2, cols=2, specs=[[{}, {"rowspan": 2}], [{}, None]], horizontal_spacing=0.13,
                    vertical_spacing=0.2, column_widths=[0.5, 0.5]),
    "uncertainty": dict(rows=1, cols=2, column_widths=[0.5, 0.5], horizontal_spacing=0.26),
    "insulation": dict(rows=2, cols=1, shared_xaxes=True, vertical_spacing=0.1),
    "operation": dict(rows=3, cols=1, shared_xaxes=True, vertical_spacing=0.09),
    "vessels": dict(rows=1, cols=2, column_widths=[0.34, 0.66], horizontal_spacing=0.12),
}


@functools.lru_cache(maxsize=None)
def grid_layout(name: str, titles: int) -> tuple[dict, dict]:
    """Layout (without template) and axis references per cell of a named grid."""
    spec = GRIDS[name]
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


class Plot:
    """Traces, shapes and annotations collected as dicts, built into one figure at the end."""

    def __init__(self, grid: str | None = None, titles: tuple[str, ...] = ()):
        if grid is None:
            self.layout, self.refs = {}, {(1, 1): ("x", "y")}
        else:
            base, self.refs = grid_layout(grid, len(titles))
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
                                               showarrow=False, font=dict(size=14, color=GREY)))

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
    plot = Plot()
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


def hover_template(display: Display, x_name: str, y_name: str) -> str:
    """Hover text of a curve: the input with its unit, the value with its unit, the curve's name."""
    return (f"{input_label(x_name)}: %{{x:.4g}} {display.label(x_name)}<br>"
            f"%{{y:.4g}} {display.label(y_name)}<extra>%{{fullData.name}}</extra>")


def line_trace(x, y, name, **style) -> dict:
    """A plain line trace as a dict."""
    return {"type": "scatter", "mode": "lines", "x": x, "y": y, "name": name, **style}


def law_traces(plot, x, y, ok, name, colour, group, row=1, col=1, hover=None, width=1.6):
    """A law's curve: solid inside its validity range, dotted (same legend group) outside."""
    inside, outside = split_by_validity(y, ok)
    # a part with no point is sent empty: plotly.js echoes an all-NaN array back in a form that plotly's
    # FigureWidget cannot read (the page's update is then refused)
    part = lambda v: (x, v) if np.isfinite(v).any() else ([], [])  # noqa: E731
    (x_in, inside), (x_out, outside) = part(inside), part(outside)
    plot.add(line_trace(x_in, inside, name, legendgroup=group, hovertemplate=hover, line=dict(color=colour, width=width)),
             row, col)
    plot.add(line_trace(x_out, outside, f"{name} (outside range)", legendgroup=group, showlegend=False,
                   hovertemplate=hover, opacity=0.5, line=dict(color=colour, width=width, dash="dot")), row, col)


def method_name(mode: str, method: str, chosen: bool = False) -> str:
    """Legend name of a law: its display name, marked when it is the selected one."""
    return f"{mode}: {law_name(method)}" + (" (selected)" if chosen else "")
