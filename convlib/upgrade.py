"""Upgrade studies of surveyed lines: options priced from a cost table, savings with uncertainty, a ranked list.

Per line three options are priced (a cost table gives installed cost per metre by pipe size and thickness):

``repair to design``
    Strip and re-insulate at the design thickness and conductivity: the whole line if its condition is
    "degraded", "wet or damaged" or "missing", otherwise only its bare length (none: not offered).
``add a layer``
    One more layer of the design material over the existing insulation (at its effective conductivity) on the
    insulated part, the bare length re-insulated at design; the added thickness is the listed one of highest NPV
    at the nominal survey values. Not offered over "wet or damaged" insulation (a new layer keeps water against the
    pipe: corrosion under insulation) nor over "missing" insulation.
``replace at <t> mm``
    Strip and re-insulate the whole line at the listed thickness of least life-cycle cost (the economic thickness,
    :func:`convlib.economics.life_cycle_cost`).

Savings are the heat per year now (per sample of the measurement uncertainty, :mod:`convlib.survey`) minus the
heat per year after the measure, at the site weather. Hot lines are priced with the heat tariff and cold lines with
the chiller tariff; their totals stay separate. For each option: P5/P50/P95 of the yearly saving, simple payback
at the median saving, NPV at the median, and the probability that the simple payback is within ``payback_years``.
"""
from __future__ import annotations

import csv
import io
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from .design import WeatherBins
from .economics import DEMO_TARIFFS, Finance, Tariff
from .errors import InputError
from .pipe import Layer
from .pipe_sizes import nominal_pipe
from .survey import CONDITIONS, Measurement, SurveyLines, annual_heat_per_metre, line_weather, run_survey

__all__ = ["CostTable", "StudySettings", "upgrade_study", "ranked", "totals", "demo_costs_path", "OPTIONS"]

OPTIONS = ("repair to design", "add a layer", "replace")
_PERCENTILES = (5.0, 50.0, 95.0)


def demo_costs_path():
    """The invented demo cost table (currency per metre) shipped with the package."""
    from importlib import resources

    return resources.files("convlib").joinpath("data/demo_costs.csv")


@dataclass(frozen=True)
class CostTable:
    """Installed cost per metre by pipe outer diameter (rows) and insulation thickness (columns).

    Values between the listed sizes are interpolated linearly in diameter and thickness; outside, NaN (no price,
    the option is not offered).
    """

    diameters: np.ndarray    # pipe outer diameter [m], increasing
    thicknesses: np.ndarray  # [m], increasing
    new: np.ndarray          # (n_d, n_t) new insulation on a bare pipe [currency/m]
    removal: np.ndarray      # (n_d, n_t) strip old insulation of that thickness [currency/m]
    over: np.ndarray         # (n_d, n_t) added layer of that thickness over existing insulation [currency/m]

    @classmethod
    def read(cls, source) -> "CostTable":
        """From CSV with columns ``nps`` (schedule 40 diameters) or ``outer_diameter[mm]``, ``thickness[mm]``,
        ``new_per_m``, ``removal_per_m``, ``over_per_m``; a full grid of sizes x thicknesses."""
        text = source if isinstance(source, str) and "\n" in source else \
            (source.read_text() if hasattr(source, "read_text") else Path(source).read_text(encoding="utf-8"))
        rows = [r for r in csv.reader(io.StringIO(text)) if r and not r[0].lstrip().startswith("#")]
        head = [h.strip() for h in rows[0]]
        need = ["thickness[mm]", "new_per_m", "removal_per_m", "over_per_m"]
        if not set(need) <= set(head) or not ({"nps", "outer_diameter[mm]"} & set(head)):
            raise InputError(f"cost table needs columns nps or outer_diameter[mm], {', '.join(need)}",
                             field="cost table", rule="required columns", value=head)
        col = {h: j for j, h in enumerate(head)}
        try:
            diam = [nominal_pipe(float(r[col["nps"]]), "40").outer_diameter if "nps" in col
                    else float(r[col["outer_diameter[mm]"]]) / 1000 for r in rows[1:]]
            t = [float(r[col["thickness[mm]"]]) / 1000 for r in rows[1:]]
            vals = {k: [float(r[col[f"{k}_per_m"]]) for r in rows[1:]] for k in ("new", "removal", "over")}
        except (ValueError, IndexError) as err:
            raise InputError(f"cost table: {err}", field="cost table", rule="numbers in every cell",
                             value=None) from None
        ds, ts = np.unique(diam), np.unique(t)
        grids = {k: np.full((ds.size, ts.size), np.nan) for k in vals}
        i, j = np.searchsorted(ds, diam), np.searchsorted(ts, t)
        for k in vals:
            grids[k][i, j] = vals[k]
        if any(np.isnan(g).any() for g in grids.values()):
            raise InputError("cost table must give every thickness for every pipe size", field="cost table",
                             rule="a full grid of sizes x thicknesses", value=None)
        if np.any(np.array([g for g in grids.values()]) < 0):
            raise InputError("cost table: costs must be >= 0", field="cost table", rule=">= 0", value=None)
        return cls(ds, ts, grids["new"], grids["removal"], grids["over"])

    def price(self, kind: str, pipe_outer_diameter, thickness) -> np.ndarray:
        """Cost per metre [currency/m] of ``kind`` ("new", "removal", "over"), bilinear; NaN outside the table."""
        grid = getattr(self, kind)
        d = np.asarray(pipe_outer_diameter, dtype=float)
        t = np.asarray(thickness, dtype=float)
        d, t = np.broadcast_arrays(d, t)

        def position(axis, x):
            k = np.clip(np.searchsorted(axis, x, side="right") - 1, 0, max(axis.size - 2, 0))
            span = (axis[k + 1] - axis[k]) if axis.size > 1 else np.ones_like(x)
            w = (x - axis[k]) / span if axis.size > 1 else np.zeros_like(x)
            inside = (x >= axis[0] - 1e-12) & (x <= axis[-1] + 1e-12)
            return k, np.clip(w, 0, 1), inside

        i, wi, in_d = position(self.diameters, d)
        j, wj, in_t = position(self.thicknesses, t)
        i1, j1 = np.minimum(i + 1, self.diameters.size - 1), np.minimum(j + 1, self.thicknesses.size - 1)
        value = ((1 - wi) * (1 - wj) * grid[i, j] + wi * (1 - wj) * grid[i1, j] + (1 - wi) * wj * grid[i, j1]
                 + wi * wj * grid[i1, j1])
        return np.where(in_d & in_t, value, np.nan)


@dataclass(frozen=True)
class StudySettings:
    """Everything an upgrade study needs besides the lines (picklable: it travels to the workers)."""

    bins: WeatherBins
    costs: CostTable
    measurement: Measurement = Measurement()
    heat_tariff: Tariff = DEMO_TARIFFS["natural gas"]
    cold_tariff: Tariff = DEMO_TARIFFS["electricity (chiller)"]
    finance: Finance = Finance()
    payback_years: float = 3.0
    thicknesses: tuple = field(default=())  # listed thicknesses [m]; default the cost table's


def _money(kwh, hot, settings):
    price = np.where(hot, settings.heat_tariff.price_per_heat_kwh, settings.cold_tariff.price_per_heat_kwh)
    co2 = np.where(hot, settings.heat_tariff.co2_per_heat_kwh, settings.cold_tariff.co2_per_heat_kwh)
    shape = (-1,) + (1,) * (np.ndim(kwh) - 1)
    return kwh * price.reshape(shape), kwh * co2.reshape(shape)


def _columns(survey, option, thickness, investment, saved_kwh_samples, settings) -> dict:
    """One row per line for one option (NaN investment: not offered)."""
    hot = survey.hot
    money, co2 = _money(saved_kwh_samples, hot, settings)
    p5, p50, p95 = np.percentile(money, _PERCENTILES, axis=1)
    factor = float(settings.finance.factor)
    with np.errstate(divide="ignore", invalid="ignore"):
        payback_samples = np.where(money > 0, investment[:, None] / np.where(money > 0, money, 1.0), np.inf)
    npv = money * factor - investment[:, None]
    excess = np.percentile(survey.annual_excess_samples, _PERCENTILES, axis=1)  # one pass per array
    npv_p = np.percentile(npv, _PERCENTILES, axis=1)
    lines = survey.lines
    n = len(lines)
    return {
        "index": lines.index, "tag": lines.tag, "area": lines.area,
        "service": np.where(hot, "hot", "cold").astype(object),
        "condition": survey.condition_names, "k_effective": survey.k_effective, "ratio": survey.ratio,
        "q_now": survey.q_now, "q_design": survey.q_design,
        "excess_kwh_p5": excess[0], "excess_kwh_p50": excess[1], "excess_kwh_p95": excess[2],
        "option": np.full(n, option, dtype=object), "thickness": thickness, "investment": investment,
        "saved_kwh_p50": np.percentile(saved_kwh_samples, 50, axis=1),
        "saving_p5": p5, "saving_p50": p50, "saving_p95": p95,
        "payback_p50": np.where(p50 > 0, investment / np.where(p50 > 0, p50, 1.0), np.inf),  # at the median saving
        "npv_p5": npv_p[0], "npv_p50": npv_p[1], "npv_p95": npv_p[2],
        "probability_payback": np.mean(payback_samples <= settings.payback_years, axis=1),
        "co2_saved_kg_p50": np.percentile(co2, 50, axis=1),
    }


def upgrade_study(lines: SurveyLines, settings: StudySettings) -> dict:
    """Survey and price the options of every line; returns columns (arrays), one row per line and offered option.

    Rows come in line order, options in :data:`OPTIONS` order; options not offered are dropped.

    Examples
    --------
    >>> from convlib.survey import read_survey, demo_survey_path
    >>> lines, _ = read_survey(demo_survey_path())
    >>> s = StudySettings(WeatherBins.single(283.15, 3.0, 8760), CostTable.read(demo_costs_path()),
    ...                   Measurement(samples=20))
    >>> rows = upgrade_study(lines, s)
    >>> sorted(set(o.split(" at ")[0] for o in rows["option"])) == sorted(OPTIONS)
    True
    """
    survey = run_survey(lines, settings.bins, settings.measurement)
    d, tf, t = lines.pipe_outer_diameter, lines.fluid_temperature, lines.insulation_thickness
    k_design, eps = lines.design_conductivity, lines.jacket_emissivity
    length, bare = lines.length, lines.bare_length
    insulated = length - bare
    weather = tuple(w[:, None, :] for w in line_weather(lines, settings.bins))  # (n, 1, bins)
    sign = np.where(survey.hot, 1.0, -1.0)[:, None]
    now = survey.annual_now_samples
    design_per_m = survey.annual_design / length
    costs = settings.costs
    listed = np.asarray(settings.thicknesses or tuple(costs.thicknesses), dtype=float)
    cond = survey.condition
    damaged = np.isin(cond, [CONDITIONS.index(c) for c in ("degraded", "wet or damaged", "missing")])
    columns = []

    # ---- repair to design
    scope = np.where(damaged, length, bare)
    renew = costs.price("new", d, t) * scope + costs.price("removal", d, t) * np.where(damaged, insulated, 0.0)
    after = design_per_m[:, None] * scope[:, None] + survey.annual_now_insulated_per_m * (length - scope)[:, None]
    columns.append(_columns(survey, "repair to design", t, np.where(scope > 0, renew, np.nan),
                            sign * (now - after), settings))

    # ---- add a layer: best listed added thickness at the nominal k_eff, then the samples at that thickness
    k_nom = np.clip(np.where(np.isfinite(survey.k_effective), survey.k_effective, 20.0), 0.005, 20.0)
    grid_layers = [Layer(t[:, None, None], k_nom[:, None, None]), Layer(listed[None, :, None], k_design[:, None, None])]
    per_m_add = annual_heat_per_metre(d[:, None], tf[:, None], grid_layers, weather, jacket_emissivity=eps[:, None])
    cost_add = (costs.price("over", d[:, None], listed[None, :]) * insulated[:, None]
                + (costs.price("new", d, t) * bare)[:, None])
    now_nominal = np.median(now, axis=1)
    saving_add = _money(sign * (now_nominal[:, None] - (per_m_add * insulated[:, None] + (design_per_m * bare)[:, None])),
                        survey.hot, settings)[0]
    npv_add = np.where(np.isfinite(cost_add), saving_add * float(settings.finance.factor) - cost_add, -np.inf)
    best = np.argmax(npv_add, axis=1)
    t_add = listed[best]
    per_m_add_s = annual_heat_per_metre(d[:, None], tf[:, None], [Layer(t[:, None, None], survey.k_samples[..., None]),
                                                                 Layer(t_add[:, None, None], k_design[:, None, None])],
                                        weather, jacket_emissivity=survey.emissivity_samples)
    after_add = per_m_add_s * insulated[:, None] + (design_per_m * bare)[:, None]
    # never over wet insulation (it keeps the pipe wet: corrosion under insulation) nor over missing insulation
    offered = ~np.isin(cond, [CONDITIONS.index("missing"), CONDITIONS.index("wet or damaged")]) & np.isfinite(npv_add[np.arange(len(lines)), best])
    columns.append(_columns(survey, "add a layer", t_add, np.where(offered, cost_add[np.arange(len(lines)), best],
                                                                   np.nan), sign * (now - after_add), settings))

    # ---- replace at the economic thickness
    per_m_new = annual_heat_per_metre(d[:, None], tf[:, None], [Layer(listed[None, :, None], k_design[:, None, None])],
                                      weather, jacket_emissivity=eps[:, None])
    cost_new = ((costs.price("new", d[:, None], listed[None, :]) * length[:, None])
                + (costs.price("removal", d, t) * insulated)[:, None])
    price = np.where(survey.hot, settings.heat_tariff.price_per_heat_kwh, settings.cold_tariff.price_per_heat_kwh)
    lcc = np.where(np.isfinite(cost_new), cost_new + np.abs(per_m_new * length[:, None]) * price[:, None]
                   * float(settings.finance.factor), np.inf)
    best = np.argmin(lcc, axis=1)
    t_new = listed[best]
    rows = np.arange(len(lines))
    after_new = (per_m_new[rows, best] * length)[:, None]
    option = np.array([f"replace at {1000 * x:.0f} mm" for x in t_new], dtype=object)
    col = _columns(survey, "replace", t_new, np.where(np.isfinite(lcc[rows, best]), cost_new[rows, best], np.nan),
                   sign * (now - after_new), settings)
    col["option"] = option
    columns.append(col)

    # ---- rows: line by line, options in order; drop options not offered
    out = {k: np.stack([c[k] for c in columns], axis=1).ravel() for k in columns[0]}
    keep = np.isfinite(out["investment"].astype(float))
    return {k: v[keep] for k, v in out.items()}


def ranked(rows: dict, by: str = "npv_p50") -> dict:
    """The best option per line (highest ``by``), lines sorted by it, best first; ``rank`` from 1.

    ``worth_doing`` is False where even the best option has a negative median NPV (leave the line as it is).

    Examples
    --------
    >>> r = ranked({"index": np.array([0, 0, 1]), "npv_p50": np.array([5.0, 9.0, 7.0])})
    >>> r["index"].tolist(), r["npv_p50"].tolist(), r["rank"].tolist()
    ([0, 1], [9.0, 7.0], [1, 2])
    """
    index, score = rows["index"], np.asarray(rows[by], dtype=float)
    order = np.lexsort((-score, index))          # per line, best option first
    first = np.ones(order.size, dtype=bool)
    first[1:] = index[order][1:] != index[order][:-1]
    best = order[first]
    best = best[np.lexsort((index[best], -score[best]))]  # lines by score, ties by line index
    out = {k: v[best] for k, v in rows.items()}
    out["rank"] = np.arange(1, best.size + 1)
    out["worth_doing"] = np.asarray(out.get("npv_p50", score[best]), dtype=float) > 0
    return out


def totals(best: dict) -> dict:
    """Sums of the ranked list, hot losses and cold gains apart: {"hot": {...}, "cold": {...}}.

    Heat flows and excess cover every line; investment, savings, NPV and CO2 only the lines ``worth_doing``.
    The P5/P95 of a sum are not the sums of P5/P95; the totals give the median sums.
    """
    out = {}
    for service in ("hot", "cold"):
        every = best["service"] == service
        m = every & best["worth_doing"]
        out[service] = {"lines": int(every.sum()), "lines_worth_doing": int(m.sum()),
                        "q_now": float(np.sum(best["q_now"][every])),
                        "q_design": float(np.sum(best["q_design"][every])),
                        "excess_kwh_p50": float(np.sum(best["excess_kwh_p50"][every])),
                        "investment": float(np.sum(best["investment"][m])),
                        "saving_p50": float(np.sum(best["saving_p50"][m])),
                        "npv_p50": float(np.sum(best["npv_p50"][m])),
                        "co2_saved_kg_p50": float(np.sum(best["co2_saved_kg_p50"][m]))}
    return out
