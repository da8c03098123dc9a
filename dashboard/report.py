"""A self-contained HTML report of a snapshot: inputs, results, cautions, interactive figures, provenance.

The report opens offline: plotly.js is inlined once (``include_plotlyjs=True``
on the first figure), nothing is fetched. Every number is read from the
snapshot (the stored :class:`convlib.study.StudyResult`) and shown in the unit
system asked for, converted by :mod:`convlib.units`.
"""
from __future__ import annotations

import html
from pathlib import Path

from . import settings
from .compute import flow_names, mode_names, write_atomic
from .compute import snapshot as cl_snapshot
from .display import Display, input_label, law_name, regime_text, scientific, shape_name
from .figures import map_figure, spread_figure, styled, sweep_figure, uncertainty_figure

__all__ = ["render_report", "write_report"]

_CASE_ROWS = ("diameter", "length", "height", "width", "surface_temperature", "fluid_temperature",
              "insulation_thickness", "insulation_conductivity", "jacket_thickness", "jacket_conductivity",
              "air_temperature", "surroundings_temperature", "wind_speed", "emissivity", "sky_view_fraction",
              "solar_irradiance", "pressure", "relative_humidity", "convection_factor")

_STYLE = """
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: #1d252c; margin: 24px auto;
       max-width: 1100px; padding: 0 16px; }
h1 { font-size: 22px; margin-bottom: 0; } h2 { font-size: 17px; color: #1b5e9a; border-bottom: 1px solid #d6dde3; }
table { border-collapse: collapse; font-size: 13px; margin: 6px 0 12px 0; }
th, td { border-bottom: 1px solid #e3e8ec; padding: 3px 14px 3px 0; text-align: left; vertical-align: top; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
.caution { background: #fdecea; border-left: 4px solid #c0392b; padding: 6px 10px; margin: 4px 0; }
.warning { background: #fff7e0; border-left: 4px solid #b8860b; padding: 6px 10px; margin: 4px 0; }
.muted { color: #5f6b76; font-size: 12px; } code { font-size: 12px; word-break: break-all; }
"""


def _table(rows, header=None) -> str:
    head = "" if header is None else "<tr>" + "".join(f"<th>{html.escape(h)}</th>" for h in header) + "</tr>"
    body = "".join("<tr>" + "".join(f"<td>{html.escape(str(c))}</td>" for c in row) + "</tr>" for row in rows)
    return f"<table>{head}{body}</table>"


def _case_rows(case, d: Display) -> list[tuple[str, str]]:
    rows = [("Kind", "bare surface at a known temperature" if case.kind == "bare" else
             "insulated line with a known fluid temperature"), ("Shape", shape_name(case.shape))]
    for name in _CASE_ROWS:
        value = getattr(case, name)
        if value is None:
            text = "same as the air" if name == "surroundings_temperature" else None
        else:
            text = d.text(value, name)
        if text is not None:
            rows.append((input_label(name), text))
    rows.append(("Natural-convection law", case.natural or "shape default"))
    rows.append(("Forced-convection law", case.forced or "shape default"))
    return rows


def _study_rows(spec, d: Display) -> list[str]:
    parts = []
    if spec.sweeps:
        parts.append(_table([(input_label(s.input), f"{d.text(s.start, s.input)} to {d.text(s.stop, s.input)}",
                              s.count, s.scale) for s in spec.sweeps], ("Sweep of", "Range", "Points", "Spacing")))
    if spec.tornado:
        parts.append(_table([(input_label(t.input), d.text(t.low, t.input), d.text(t.high, t.input))
                             for t in spec.tornado], ("Tornado input", "Low", "High")))
    u = spec.uncertainty
    if u is not None:
        dists = [(input_label(x.input), x.kind, ", ".join(f"{k} = {v:g}" for k, v in x.model_dump().items()
                                                           if k not in ("input", "kind") and v is not None))
                 for x in u.distributions]
        parts.append(_table(dists, ("Uncertain input", "Distribution", "Parameters (SI)")))
        parts.append(f"<p>Monte Carlo: {u.samples:,} samples, seed {u.seed}, model form "
                     f"{html.escape(settings.MODEL_FORMS.get(u.model_form, u.model_form))}.</p>")
    return parts


def _line_totals(res, length: float, d: Display) -> str:
    """The line's totals over its run, losses and gains on separate rows (never netted). A study result holds
    one design condition, so no annual figures: the page says where they come from."""
    total = float(res.base.q_total[0])
    rows = [("Heat lost by the line", d.text(max(total, 0.0), "q_total")),
            ("Heat gained by the line", d.text(max(-total, 0.0), "q_total"))]
    note = ("No annual figures: a study holds one design condition, and its heat flow times 8,760 h would take the "
            "design air for every hour. Annual energy over weather bins: <code>convlib lines --bins FILE.json</code>.")
    head = f"<h3>Line totals over the run of {html.escape(d.text(length, 'length'))}</h3>"
    return head + _table(rows, ("Total", "Value")) + f"<p class='muted'>{note}</p>"


def _results(res, length: float, d: Display) -> str:
    b = res.base
    # a loss and a gain are named as such, never shown as a negative loss; the parts keep the sign of the total
    gains = b.q_per_length[0] < 0
    sign = -1.0 if gains else 1.0
    rows = [("Heat gained per length (the line is colder than its surroundings)" if gains else "Heat lost per length",
             d.text(sign * b.q_per_length[0], "q_per_length")),
            ("  convection part", d.text(sign * b.q_convection_per_length[0], "q_per_length")),
            ("  radiation part", d.text(sign * b.q_radiation_per_length[0], "q_per_length")),
            ("Surface temperature", d.text(b.surface_temperature[0], "surface_temperature")),
            ("Dew point of the air", d.text(res.dew_point, "dew_point")),
            ("h convection", d.text(b.h_convection[0], "h_convection")),
            ("h radiation", d.text(b.h_radiation[0], "h_radiation")),
            ("Nusselt number Nu", scientific(b.nusselt[0], 4)), ("Rayleigh number Ra", scientific(b.rayleigh[0], 4)),
            ("Reynolds number Re", scientific(b.reynolds[0], 4)),
            ("Richardson number Ri", "still air" if b.richardson[0] is None else scientific(b.richardson[0], 4)),
            ("Regime", regime_text(mode_names(b.regime[0]), flow_names(b.flow_regime[0])))]
    out = [_table(rows, ("Quantity", "Value"))]
    out.append(_line_totals(res, length, d))
    out += [f'<div class="caution">{html.escape(d.localize(c))}</div>' for c in res.cautions]
    out += [f'<div class="warning">{html.escape(d.localize(w))}</div>' for w in res.warnings]
    methods = [(m.mode, law_name(m.method), d.text(m.values.q_per_length[0], "q_per_length"),
                d.text(m.values.h_convection[0], "h_convection"), "yes" if m.in_range[0] else "no (extrapolated)")
               for m in res.base_methods]
    out.append("<h3>Every correlation at this case</h3>")
    out.append(_table(methods, ("Mode", "Law", "Heat loss", "h convection", "In validity range")))
    if res.monte_carlo is not None:
        mc = res.monte_carlo
        out.append(_table([("Mean", d.text(mc.mean, "q_per_length")), ("P5", d.text(mc.p5, "q_per_length")),
                           ("P50", d.text(mc.p50, "q_per_length")), ("P95", d.text(mc.p95, "q_per_length")),
                           ("Surface temperature P5–P95",
                            f"{d.text(mc.surface_temperature_p5, 'surface_temperature')} – "
                            f"{d.text(mc.surface_temperature_p95, 'surface_temperature')}")],
                          ("Monte Carlo heat loss", "Value")))
    return "".join(out)


def render_report(snap, units: str = "SI") -> str:
    """HTML text of a snapshot's report.

    Parameters
    ----------
    snap : convlib.snapshot.Snapshot or path-like
        A loaded snapshot or its file (loaded and hash-checked here).
    units : {"SI", "US"}
        Unit system of tables and axes.
    """
    if not isinstance(snap, cl_snapshot.Snapshot):
        snap = cl_snapshot.load(snap)
    d = Display(units)
    spec, res = snap.spec, snap.result
    chosen = (spec.case.natural, spec.case.forced)
    figures = []
    for axis, sweep in zip(spec.sweeps, res.sweeps):
        current = getattr(spec.case, sweep.input, None)
        figures.append(sweep_figure(sweep, d, current=current, log_x=axis.scale == "log", chosen=chosen))
    if res.sweeps:
        figures.append(spread_figure(res.model_copy(update={"sweeps": res.sweeps[:1]}), d, chosen=chosen))
    figures += [map_figure(m, d) for m in res.maps]
    if res.tornado or res.monte_carlo is not None:
        figures.append(uncertainty_figure(res.tornado, res.monte_carlo, d, res.base.q_per_length[0]))
    plots = [styled(fig).to_html(full_html=False, include_plotlyjs=(i == 0), config={"displaylogo": False})
             for i, fig in enumerate(figures)]
    prov = snap.provenance.model_dump()
    name = snap.path.name if snap.path is not None else "snapshot"
    parts = [
        "<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'>",
        f"<title>{html.escape(spec.name)} — convlib report</title><style>{_STYLE}</style></head><body>",
        f"<h1>{html.escape(spec.name)}</h1><p class='muted'>{html.escape(spec.description)}</p>",
        _table([("File", name), ("Author", snap.author or "—"), ("Signed in as (server)", snap.saved_by or "—"),
                ("Saved (UTC)", snap.created_utc),
                ("Note", snap.note or "—")]),
        "<h2>Inputs</h2>", _table(_case_rows(spec.case, d), ("Input", "Value")), *_study_rows(spec, d),
        "<h2>Results</h2>", _results(res, spec.case.length, d),
        "<h2>Figures</h2><p class='muted'>Interactive: hover for values, drag to zoom, double-click to reset.</p>",
        *plots,
        "<h2>Provenance</h2>", _table([(k, v) for k, v in prov.items()], ("Component", "Version")),
        f"<p>SHA-256 over inputs, results and provenance: <code>{snap.sha256}</code></p>",
        "<p class='muted'>Results are engineering estimates from published correlations. Hot surfaces can burn; "
        "cold surfaces below the dew point gather condensation. Local codes, the applicable standards and "
        "licensed practice govern. Re-run the study and check the numbers with "
        f"<code>convlib verify {html.escape(name)}</code>.</p>",
        "</body></html>"]
    return "\n".join(parts)


def write_report(snapshot_path, out_path, units: str = "SI") -> Path:
    """Write the report of a snapshot file to ``out_path`` (UTF-8), atomically (a link there is replaced)."""
    return write_atomic(Path(out_path), render_report(snapshot_path, units).encode("utf-8"))


# the report of an upgrade-study snapshot lives in dashboard.report_upgrade; its names are importable from here
from .report_upgrade import render_upgrade_report, write_upgrade_report  # noqa: E402

__all__ += ["render_upgrade_report", "write_upgrade_report"]
