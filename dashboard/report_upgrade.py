"""A self-contained HTML report of an upgrade-study snapshot: ranked list, totals, assumptions, cautions, provenance.

The page is plain HTML and CSS (no script, no figure library, nothing fetched): it opens offline. Every number is
read from the loaded snapshot (:class:`convlib.upgrade_snapshot.UpgradeSnapshot`, loaded and hash-checked by the
caller: the dashboard layer imports convlib only through :mod:`dashboard.compute`) and shown in SI or US units by
:class:`dashboard.display.Display`; money is in the tariff's currency, per metre (SI) or per foot (US) of line.
"""
from __future__ import annotations

import html
import math
from pathlib import Path

import numpy as np

from .compute import from_si, write_atomic
from .display import Display, format_number
from .report import _STYLE, _table

__all__ = ["render_upgrade_report", "write_upgrade_report"]

_EXTRA_STYLE = """
h3 { font-size: 15px; margin-bottom: 2px; } .scroll { overflow-x: auto; } .scroll td { white-space: nowrap; }
details { margin: 6px 0 12px 0; } summary { cursor: pointer; color: #1b5e9a; }
"""


def _money(value) -> str:
    return "–" if value is None or not math.isfinite(value) else f"{value:,.0f}"


def _energy(kwh: float, d: Display) -> str:
    """Energy per year [kWh/yr] in MWh/yr (SI) or MMBtu/yr (US)."""
    if d.system == "SI":
        return f"{format_number(kwh / 1000.0, 3)} MWh/yr"
    return f"{format_number(float(from_si(kwh * 3.6e6, 'energy', 'MMBtu')), 3)} MMBtu/yr"


def _per_length(d: Display) -> tuple[float, str]:
    """Metres in the shown length unit, and its name (money per metre -> per foot in US units)."""
    return (1.0, "m") if d.system == "SI" else (float(d.scalar(1.0, "length")), "ft")


def _option(option: str, thickness: float, d: Display) -> str:
    if option.startswith("replace"):
        return f"replace at {d.text(thickness, 'insulation_thickness')}"
    if option == "add a layer":
        return f"add a layer of {d.text(thickness, 'insulation_thickness')}"
    return option


def _ranked(best: dict, horizon: float, d: Display) -> str:
    if not best:
        return "<p>No line was computed (see the row errors).</p>"
    header = ("Rank", "Tag", "Area", "Service", "Condition", "k_eff / k_design", "Best option", "Cost",
              "Saving per year P5 / P50 / P95", "Payback [yr]", "NPV (P50)", f"P(payback ≤ {horizon:g} yr)")
    rows = []
    for i in range(best["rank"].size):
        ratio = float(best["ratio"][i])
        rows.append((int(best["rank"][i]), best["tag"][i], best["area"][i] or "–", best["service"][i],
                     best["condition"][i], format_number(ratio, 3) if math.isfinite(ratio) else "–",
                     _option(str(best["option"][i]), float(best["thickness"][i]), d)
                     + ("" if best["worth_doing"][i] else " (not worth it)"),
                     _money(best["investment"][i]),
                     " / ".join(_money(best[k][i]) for k in ("saving_p5", "saving_p50", "saving_p95")),
                     format_number(float(best["payback_p50"][i]), 2), _money(best["npv_p50"][i]),
                     f"{float(best['probability_payback'][i]):.0%}"))
    return f"<div class='scroll'>{_table(rows, header)}</div>"


def _totals(totals: dict, d: Display) -> str:
    out = []
    for service, title, verb in (("hot", "Hot lines: heat lost", "lost"), ("cold", "Cold lines: heat gained",
                                                                          "gained")):
        t = totals.get(service) or {}
        if not t.get("lines"):
            out.append(f"<h3>{title}</h3><p>No {service} lines.</p>")
            continue
        rows = [("Lines surveyed", t["lines"]),
                (f"Heat {verb} now (at the survey's conditions)", d.text(abs(t["q_now"]), "q_total")),
                (f"Heat {verb} as designed (same conditions)", d.text(abs(t["q_design"]), "q_total")),
                ("Excess over design per year (median)", _energy(t["excess_kwh_p50"], d)),
                ("Lines worth upgrading (median NPV > 0)", t["lines_worth_doing"]),
                ("Investment in those lines", _money(t["investment"])),
                ("Saving per year (sum of medians)", _money(t["saving_p50"])),
                ("Net present value (sum of medians)", _money(t["npv_p50"])),
                ("CO₂ saved per year (sum of medians)", f"{format_number(t['co2_saved_kg_p50'] / 1000.0, 3)} t")]
        out.append(f"<h3>{title}</h3>" + _table(rows, ("Total", "Value")))
    out.append("<p class='muted'>Hot losses and cold gains are never netted. The P5 and P95 of a sum are not the sums "
               "of the lines' P5 and P95, so the totals give the sums of the medians.</p>")
    return "".join(out)


def _weather(settings, source: str, d: Display) -> list[tuple[str, str]]:
    b = settings.bins
    hours = float(np.sum(b.hours))
    mean = float(np.sum(b.air_temperature * b.hours) / hours) if hours > 0 else float("nan")
    return [("Weather", d.localize(source) if source else "not recorded"),
            ("Bins", f"{b.hours.size} bins, {hours:,.0f} h"),
            ("Air temperature of the bins", f"{d.text(float(b.air_temperature.min()), 'air_temperature')} to "
             f"{d.text(float(b.air_temperature.max()), 'air_temperature')} (mean over the hours "
             f"{d.text(mean, 'air_temperature')})"),
            ("Wind speed of the bins", f"{d.text(float(b.wind_speed.min()), 'wind_speed')} to "
             f"{d.text(float(b.wind_speed.max()), 'wind_speed')}"),
            ("Indoor lines", "their surveyed air temperature and air speed all year")]


def _assumptions(snap, d: Display) -> str:
    s = snap.settings
    m, f = s.measurement, s.finance
    rows = _weather(s, snap.weather_source, d)
    for label, t, per in (("Heat tariff (hot lines)", s.heat_tariff, "efficiency"),
                          ("Cold tariff (cold lines)", s.cold_tariff, "COP")):
        rows.append((label, f"{t.fuel}: {float(t.price):.4g} per purchased kWh, {per} {float(t.efficiency):.3g} "
                            f"-> {t.price_per_heat_kwh:.4g} per kWh of heat; {float(t.co2_per_kwh):.3g} kg CO₂ per "
                            f"purchased kWh"))
    listed = s.thicknesses or tuple(s.costs.thicknesses)
    rows += [("Finance", f"discount rate {float(f.discount_rate):.1%}, energy-price escalation "
                         f"{float(f.escalation):.1%}, lifetime {float(f.years):g} years (present-worth factor "
                         f"{float(f.factor):.3f})"),
             ("Payback horizon N", f"{float(s.payback_years):g} years"),
             ("Thermometer bound (surface and air)", f"± {d.text(float(m.thermometer), 'temperature_difference')}"),
             ("Emissivity bound", f"± {float(m.emissivity):g}"),
             ("Samples per line, seed", f"{int(m.samples):,}, seed {int(m.seed)}"),
             ("Listed thicknesses", ", ".join(d.text(float(x), "insulation_thickness") for x in listed))]
    return _table(rows, ("Assumption", "Value")) + _costs(s.costs, d)


def _costs(costs, d: Display) -> str:
    metres, unit = _per_length(d)
    rows = [(d.text(float(dia), "diameter"), d.text(float(t), "insulation_thickness"),
             *(format_number(float(getattr(costs, k)[i, j]) / metres, 3) for k in ("new", "removal", "over")))
            for i, dia in enumerate(costs.diameters) for j, t in enumerate(costs.thicknesses)]
    table = _table(rows, ("Pipe outer diameter", "Thickness", f"New per {unit}", f"Removal per {unit}",
                          f"Added layer per {unit}"))
    return f"<details><summary>Cost table ({len(rows)} prices)</summary>{table}</details>"


def render_upgrade_report(snap, units: str = "SI") -> str:
    """HTML text of an upgrade snapshot's report.

    Parameters
    ----------
    snap : convlib.upgrade_snapshot.UpgradeSnapshot
        A loaded snapshot (``convlib.upgrade_snapshot.load(path)``).
    units : {"SI", "US"}
        Unit system of the tables.
    """
    d = Display(units)
    name = snap.path.name if snap.path is not None else "upgrade snapshot"
    errors = [(e.index + 2, e.tag, e.reason) for e in snap.errors]
    n_rows = len(next(iter(snap.survey.values()), []))
    horizon = float(snap.settings.payback_years)
    parts = [
        "<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'>",
        f"<title>Upgrade study {html.escape(name)} — convlib report</title><style>{_STYLE}{_EXTRA_STYLE}</style>"
        "</head><body>",
        f"<h1>Upgrade study: {html.escape(name)}</h1>",
        "<p class='muted'>Per surveyed line: repair to design, one more layer, or replacement at the economic "
        "thickness, priced from the cost table; savings from the heat per year now (with the measurement's "
        "uncertainty) minus the heat per year after the measure, at the site weather.</p>",
        _table([("File", name), ("Author", snap.author or "—"), ("Saved (UTC)", snap.created_utc),
                ("Note", snap.note or "—"), ("Survey rows", f"{n_rows:,} ({len(errors)} not computed)")]),
        "<h2>Ranked list</h2><p class='muted'>The best option of each line (highest median NPV), best first; "
        "cost and money in the tariff's currency.</p>", _ranked(snap.ranked, horizon, d),
        "<h2>Totals</h2>", _totals(snap.totals, d),
        "<h2>Assumptions</h2>", _assumptions(snap, d)]
    if errors:
        parts += ["<h2>Rows not computed</h2>", _table(errors, ("Row", "Tag", "Reason"))]
    parts += ["<h2>Cautions</h2>", *(f'<div class="caution">{html.escape(d.localize(c))}</div>' for c in snap.cautions),
              "<h2>Provenance</h2>", _table(list(snap.provenance.model_dump().items()), ("Component", "Version")),
              f"<p>SHA-256 over survey rows, settings, results and provenance: <code>{html.escape(snap.sha256)}</code>"
              f"</p><p class='muted'>Re-run the study and check every number with <code>convlib verify "
              f"{html.escape(name)}</code>.</p>", "</body></html>"]
    return "\n".join(parts)


def write_upgrade_report(snap, out_path, units: str = "SI") -> Path:
    """Write the report of a loaded upgrade snapshot to ``out_path`` (UTF-8), atomically."""
    return write_atomic(Path(out_path), render_upgrade_report(snap, units).encode("utf-8"))
