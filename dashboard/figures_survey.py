"""What the survey tab shows, as pure functions of a :class:`dashboard.compute.SurveyView`: the ranked table and
the savings-against-cost chart with P5-P95 bars.

No function here computes physics or money: every number is a column of :func:`convlib.upgrade.ranked`, converted
for display with :class:`dashboard.display.Display` (heat in kW or Btu/h; thicknesses in mm or in; money in the
cost table's currency, never converted).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import plotly.graph_objects as go

from .display import Display, format_number
from .plotting import GREY, Plot, empty_figure

__all__ = ["Column", "option_text", "service_text", "money_text", "survey_table", "survey_figure",
           "SERVICE_COLOURS"]

#: Marker colours: hot lines (heat lost), cold lines (heat gained).
SERVICE_COLOURS = {"hot": "#c2571a", "cold": "#1b5e9a"}
_SERVICE_NAMES = {"hot": "hot line (heat lost)", "cold": "cold line (heat gained)"}


@dataclass(frozen=True)
class Column:
    """One column of the ranked table: header, values (numbers in the displayed unit, or text), texts shown."""

    header: str
    values: tuple
    texts: tuple[str, ...]


def money_text(value) -> str:
    """Money in whole units of the cost table's currency, e.g. ``"35,460"``; ``"–"`` when not finite."""
    return f"{value:,.0f}" if value is not None and math.isfinite(value) else "–"


def service_text(service: str) -> str:
    """``"hot"`` / ``"cold"`` as the table says it."""
    return {"hot": "hot", "cold": "cold"}.get(str(service), str(service))


def option_text(option: str, thickness: float, display: Display, worth_doing: bool = True) -> str:
    """The measure as people say it, its thickness in the unit system: ``"replace at 3.94 in"``,
    ``"add a layer of 25 mm"``, ``"repair to design"``; ``(not worth it)`` when its median NPV is negative."""
    kind = str(option).split(" at ")[0]
    if kind == "replace":
        text = f"replace at {display.text(thickness, 'insulation_thickness')}"
    elif kind == "add a layer":
        text = f"add a layer of {display.text(thickness, 'insulation_thickness')}"
    else:
        text = kind
    return text if worth_doing else f"{text} (not worth it)"


def _numbers(values, texts, header) -> Column:
    return Column(header, tuple(float(v) for v in values), tuple(texts))


def survey_table(view, display: Display, keep=None) -> list[Column]:
    """Columns of the ranked table (best option per line, best first), of the rows ``keep`` (default all).

    Heat flows are shown as magnitudes: the side column says whether the line loses or gains heat.
    """
    b = view.best
    rows = np.flatnonzero(np.ones(view.lines, dtype=bool) if keep is None else keep)
    pick = {k: np.asarray(v)[rows] for k, v in b.items()}
    heat = lambda key: display.value(np.abs(pick[key].astype(float)), "survey_heat")  # noqa: E731
    unit = display.label("survey_heat")
    n = view.payback_years
    columns = [
        _numbers(pick["rank"], [str(int(r)) for r in pick["rank"]], "Rank"),
        Column("Tag", tuple(str(t) for t in pick["tag"]), tuple(str(t) for t in pick["tag"])),
    ]
    if any(a not in (None, "") for a in b.get("area", ())):
        areas = tuple("" if a is None else str(a) for a in pick["area"])
        columns.append(Column("Area", areas, areas))
    columns += [
        Column("Side", tuple(pick["service"]), tuple(service_text(s) for s in pick["service"])),
        Column("Condition", tuple(pick["condition"]), tuple(str(c) for c in pick["condition"])),
        _numbers(heat("q_now"), [format_number(v) for v in heat("q_now")], f"Heat now [{unit}]"),
        _numbers(heat("q_design"), [format_number(v) for v in heat("q_design")], f"As designed [{unit}]"),
    ]
    options = tuple(option_text(o, t, display, bool(w)) for o, t, w in
                    zip(pick["option"], pick["thickness"], pick["worth_doing"]))
    columns.append(Column("Best option", options, options))
    for key, header in (("investment", "Cost"), ("saving_p5", "Saving a year P5"),
                        ("saving_p50", "P50"), ("saving_p95", "P95")):
        columns.append(_numbers(pick[key], [money_text(v) for v in pick[key]], header))
    payback = pick["payback_p50"].astype(float)
    columns.append(_numbers(payback, [f"{v:.1f}" if math.isfinite(v) else "never" for v in payback],
                            "Payback [years]"))
    chance = pick["probability_payback"].astype(float)
    columns.append(_numbers(100.0 * chance, [f"{100 * v:.0f} %" for v in chance], f"Pays back in {n:g} years"))
    return columns


def survey_figure(view, display: Display, keep=None) -> go.Figure:
    """Saving a year (median, bars from P5 to P95) against the cost of each line's best option, one marker per
    line; hollow markers: not worth doing (negative median NPV). The dashed line pays back in exactly N years."""
    if view is None or view.lines == 0:
        return empty_figure("Saving against cost", "no survey shown")
    rows = np.flatnonzero(np.ones(view.lines, dtype=bool) if keep is None else keep)
    if rows.size == 0:
        return empty_figure("Saving against cost", "no line matches the filter")
    b = {k: np.asarray(v)[rows] for k, v in view.best.items()}
    plot = Plot()
    for service in ("hot", "cold"):
        m = b["service"] == service
        if not m.any():
            continue
        p5, p50, p95 = (b[k][m].astype(float) for k in ("saving_p5", "saving_p50", "saving_p95"))
        options = [option_text(o, t, display, bool(w)) for o, t, w in
                   zip(b["option"][m], b["thickness"][m], b["worth_doing"][m])]
        hover = [f"{tag} · {option}<br>cost {money_text(cost)}<br>saving a year P5 {money_text(a)} · P50 "
                 f"{money_text(c)} · P95 {money_text(e)}" for tag, option, cost, a, c, e in
                 zip(b["tag"][m], options, b["investment"][m], p5, p50, p95)]
        colour = SERVICE_COLOURS[service]
        plot.add({"type": "scatter", "mode": "markers", "name": _SERVICE_NAMES[service],
                  "x": b["investment"][m].astype(float), "y": p50,
                  "error_y": {"type": "data", "symmetric": False, "array": p95 - p50, "arrayminus": p50 - p5,
                              "color": colour, "thickness": 1.2, "width": 4},
                  "marker": {"size": 10, "color": colour, "line": {"color": colour, "width": 2},
                             "symbol": ["circle" if w else "circle-open" for w in b["worth_doing"][m]]},
                  "text": hover, "hovertemplate": "%{text}<extra></extra>"})
    high = float(np.nanmax(b["investment"].astype(float))) * 1.05
    n = view.payback_years
    plot.add({"type": "scatter", "mode": "lines", "name": f"pays back in {n:g} years", "x": [0.0, high],
              "y": [0.0, high / n], "line": {"color": GREY, "width": 1.2, "dash": "dash"}, "hoverinfo": "skip"})
    plot.axis("x", title={"text": "Cost of the best option (currency of the cost table)"}, rangemode="tozero")
    plot.axis("y", title={"text": "Saving a year"}, rangemode="tozero")
    return plot.figure("Saving a year against cost, best option per line<br><sup>marker: median saving; bars: P5 "
                       f"to P95 of the survey's measurement uncertainty ({view.samples} samples); hollow: not worth "
                       "doing</sup>", height=460, legend=dict(orientation="h", y=-0.18, font=dict(size=11)))
