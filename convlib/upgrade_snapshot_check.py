"""Checking upgrade snapshots: :func:`verify` re-runs the study and compares every number; :func:`diff` compares two.

Tolerance of :func:`verify`: relative :data:`convlib.snapshot.DETERMINISTIC_TOLERANCE` (1e-9) on every number. The
upgrade engine is deterministic for a seed: each line draws from its own ``SeedSequence(seed, spawn_key=(row,))``
stream, every other step is closed-form or a vectorized solve to a fixed tolerance, so the same code, property
tables and platform reproduce every stored number bit for bit (the percentiles too: they are order statistics of the
same samples). The margin only absorbs round-off of another CPU or math library; anything larger means the
computation changed, or numpy changed the stream of ``Generator.uniform`` (numpy keeps the right to do so between
versions, NEP 19): the report lists the versions then and now. Texts, integers and flags (tags, options, conditions,
ranks, row errors) must be equal. Non-finite numbers agree when both sides are the same (NaN with NaN, inf with inf).
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any

import numpy as np

from .errors import InputError
from .snapshot import SnapshotError, current_provenance
from .snapshot_check import DETERMINISTIC_TOLERANCE, QuantityCheck, VerifyReport, _leaf_changes
from .upgrade_snapshot import COLUMN_UNITS, _encode_float, as_upgrade_snapshot, rerun, settings_document

__all__ = ["verify", "diff", "UpgradeDiff", "LINE_QUANTITIES"]

#: What :func:`diff` compares per line (of the ranked list: the best option of each line).
LINE_QUANTITIES = ("option", "rank", "investment", "saving_p5", "saving_p50", "saving_p95", "payback_p50",
                   "npv_p50", "probability_payback", "excess_kwh_p50", "co2_saved_kg_p50")
_SETTING_UNITS = (("weather.air_temperature", "K"), ("weather.wind_speed", "m/s"), ("weather.hours", "h"),
                  ("costs.diameters", "m"), ("costs.thicknesses", "m"), ("costs.", "currency/m"),
                  ("measurement.thermometer", "K"), ("_tariff.price", "currency/kWh"),
                  ("_tariff.co2_per_kwh", "kg/kWh"), ("finance.years", "yr"), ("payback_years", "yr"),
                  ("thicknesses", "m"))
_COST_CELL = re.compile(r"^costs\.(new|removal|over)\[(\d+)\]\[(\d+)\]$")
_SHOWN = 40  # changes per section in the text of a diff (records() has them all)


# ----------------------------------------------------------------------------- verify
def _labels(columns: dict) -> list[str]:
    n = len(next(iter(columns.values()))) if columns else 0
    tags = columns.get("tag", [f"row {i}" for i in range(n)])
    options = columns.get("option", [""] * n)
    return [f"{t} ({o})" if o else str(t) for t, o in zip(tags, options)]


def _compare(name: str, a, b, labels) -> QuantityCheck:
    """One column (or total) stored vs now: largest relative difference, exact for texts, integers and flags."""
    tol = DETERMINISTIC_TOLERANCE
    if a is None or b is None:
        return QuantityCheck(name, math.inf, tol, False, "deterministic", "present on one side only")
    a, b = np.asarray(a), np.asarray(b)
    if a.shape != b.shape:
        return QuantityCheck(name, math.inf, tol, False, "deterministic", f"{a.size} values stored, {b.size} now")
    if a.size == 0:
        return QuantityCheck(name, 0.0, tol, True, "deterministic", "")
    if a.dtype.kind == "f" or b.dtype.kind == "f":
        x, y = a.astype(float), b.astype(float)
        finite = np.isfinite(x) & np.isfinite(y)
        same = (x == y) | (np.isnan(x) & np.isnan(y))
        scale = np.maximum(np.abs(x), np.abs(y))
        floor = max(1e-12 * float(np.max(np.where(finite, scale, 0.0))), np.finfo(float).tiny)
        with np.errstate(invalid="ignore", over="ignore"):  # inf - inf where not finite: masked below
            rel = np.where(same, 0.0, np.where(finite, np.abs(x - y) / np.maximum(scale, floor), math.inf))
        i = int(np.argmax(rel))
        detail = f"largest at {labels[i]}: stored {x[i]:.12g}, now {y[i]:.12g}" if rel[i] > 0 else ""
        return QuantityCheck(name, float(rel[i]), tol, bool(rel[i] <= tol), "deterministic", detail)
    differ = np.flatnonzero([p != q for p, q in zip(a.tolist(), b.tolist())])
    if differ.size == 0:
        return QuantityCheck(name, 0.0, tol, True, "deterministic", "")
    i = int(differ[0])
    return QuantityCheck(name, math.inf, tol, False, "deterministic",
                         f"{differ.size} of {a.size} differ; first at {labels[i]}: stored {a[i]!r}, now {b[i]!r}")


def _columns(section: str, stored: dict, now: dict) -> list[QuantityCheck]:
    labels = _labels(stored)
    return [_compare(f"{section}.{key}", stored.get(key), now.get(key), labels)
            for key in [*stored, *(k for k in now if k not in stored)]]


def _totals(stored: dict, now: dict) -> list[QuantityCheck]:
    out = []
    for service in ("hot", "cold"):
        a, b = stored.get(service, {}), now.get(service, {})
        for key in [*a, *(k for k in b if k not in a)]:
            x = None if key not in a else [a[key]]
            y = None if key not in b else [b[key]]
            out.append(_compare(f"totals.{service}.{key}", x, y, [f"{service} lines"]))
    return out


def verify(source) -> VerifyReport:
    """Re-run an upgrade snapshot's study serially (the stored seed) and compare every stored number.

    Every result column of every row, of the ranked list, every total (hot and cold apart) and the row errors;
    tolerance and its reason in the module's docstring. Returns a :class:`convlib.snapshot.VerifyReport`
    (``.agrees``, ``.text()``, one :class:`~convlib.snapshot.QuantityCheck` per quantity named
    ``rows.<column>``, ``ranked.<column>``, ``totals.<hot|cold>.<key>``, ``errors``).
    """
    snap = as_upgrade_snapshot(source)
    name = str(snap.path) if snap.path is not None else f"upgrade snapshot {snap.sha256[:12]}"
    try:
        output, best, tot = rerun(snap)
    except InputError as exc:  # valid when saved, refused now: report it; any other exception is a fault, raised
        raise SnapshotError(f"{name}: re-running the upgrade study failed with this convlib: {exc}") from exc
    checks = _columns("rows", snap.rows, output.rows) + _columns("ranked", snap.ranked, best) + _totals(snap.totals,
                                                                                                        tot)
    stored_errors, now_errors = [tuple(e) for e in snap.errors], [tuple(e) for e in output.errors]
    same = stored_errors == now_errors
    checks.append(QuantityCheck("errors", 0.0 if same else math.inf, DETERMINISTIC_TOLERANCE, same, "deterministic",
                                "" if same else f"{len(stored_errors)} row errors stored, {len(now_errors)} now"))
    return VerifyReport(name, checks, snap.provenance, current_provenance())


# ----------------------------------------------------------------------------- diff
def _setting_unit(path: str) -> str:
    return next((unit for key, unit in _SETTING_UNITS if key in path), "")


def _setting_name(path: str, costs: dict) -> str:
    """``costs.new[2][3]`` -> ``costs.new at pipe 168.3 mm, 80 mm thick``."""
    m = _COST_CELL.match(path)
    if not m:
        return path
    i, j = int(m.group(2)), int(m.group(3))
    d, t = costs["diameters"], costs["thicknesses"]
    if i >= len(d) or j >= len(t):
        return path
    return f"costs.{m.group(1)} at pipe {1000 * d[i]:.1f} mm, {1000 * t[j]:.0f} mm thick"


def _number(x) -> bool:
    return isinstance(x, (int, float, np.integer, np.floating)) and not isinstance(x, (bool, np.bool_))


def _change(key: str, before, after, unit: str) -> dict | None:
    """A change as a record (before, after, unit, change, relative_change); None when equal."""
    if _number(before) and _number(after):
        x, y = float(before), float(after)
        if x == y or (math.isnan(x) and math.isnan(y)) or abs(y - x) <= DETERMINISTIC_TOLERANCE * max(abs(x), abs(y)):
            return None  # equal, or round-off (a sum taken in another order)
        change = y - x if math.isfinite(x) and math.isfinite(y) else None
        rel = change / abs(x) if change is not None and x != 0 else None
        return {"key": key, "before": _encode_float(x), "after": _encode_float(y), "unit": unit,
                "change": change, "relative_change": rel}
    if before == after:
        return None
    return {"key": key, "before": before, "after": after, "unit": unit, "change": None, "relative_change": None}


def change_text(r: dict) -> str:
    """``FS-101 saving_p50: 1234 currency/yr -> 1500 currency/yr (+266 currency/yr, +21.6 %)``."""
    unit = f" {r['unit']}" if r["unit"] else ""

    def side(x):
        if x is None:
            return "absent" if r["change"] is None and not _number(x) else "NaN"
        return f"{x:.6g}{unit}" if _number(x) else f"{x}{unit}" if x in ("inf", "-inf") else repr(x)
    if r["change"] is None:
        return f"{r['key']}: {side(r['before'])} -> {side(r['after'])}"
    relative = "" if r["relative_change"] is None else f", {100.0 * r['relative_change']:+.3g} %"
    return f"{r['key']}: {side(r['before'])} -> {side(r['after'])} ({r['change']:+.4g}{unit}{relative})"


def _line_changes(a: dict, b: dict) -> list[dict]:
    """Per line (matched by row number) of the ranked lists, each of :data:`LINE_QUANTITIES` that changed."""
    def by_line(best):
        if not best:
            return {}
        return {int(i): {k: (best[k][j].item() if hasattr(best[k][j], "item") else best[k][j]) for k in best}
                for j, i in enumerate(best["index"])}
    la, lb = by_line(a), by_line(b)
    out = []
    for index in [*la, *(i for i in lb if i not in la)]:
        x, y = la.get(index), lb.get(index)
        tag = (x or y).get("tag", f"row {index}")
        if x is None or y is None:
            out.append({"key": f"{tag}", "before": None if x is None else "ranked", "after": None if y is None
                        else "ranked", "unit": "", "change": None, "relative_change": None})
            continue
        for q in LINE_QUANTITIES:
            r = _change(f"{tag} {q}", x.get(q), y.get(q), COLUMN_UNITS.get(q, ""))
            if r is not None:
                out.append(r)
    return out


def _total_changes(a: dict, b: dict) -> list[dict]:
    out = []
    for service in ("hot", "cold"):
        x, y = a.get(service, {}), b.get(service, {})
        for key in [*x, *(k for k in y if k not in x)]:
            r = _change(f"{service} {key}", x.get(key), y.get(key), COLUMN_UNITS.get(key, ""))
            if r is not None:
                out.append(r)
    return out


def _survey_changes(a: dict, b: dict) -> list[tuple[str, Any, Any]]:
    out = []
    for column in [*a, *(c for c in b if c not in a)]:
        x, y = a.get(column), b.get(column)
        if x is None or y is None:
            out.append((f"column {column}", "present" if x else "absent", "present" if y else "absent"))
            continue
        for i in range(max(len(x), len(y))):
            p = x[i] if i < len(x) else "<absent>"
            q = y[i] if i < len(y) else "<absent>"
            if p != q or type(p) is not type(q):
                out.append((f"row {i + 2} {column}", p, q))
    return out


@dataclass(frozen=True)
class UpgradeDiff:
    """What differs between two upgrade snapshots (a -> b)."""

    changed_settings: list[tuple[str, Any, Any, str]]   # (setting, before, after, unit)
    changed_survey: list[tuple[str, Any, Any]]          # (row and column, before, after)
    line_changes: list[dict]                            # per line of the ranked lists: see :func:`change_text`
    total_changes: list[dict]                           # hot and cold totals
    changed_provenance: list[tuple[str, str, str]]

    @property
    def identical(self) -> bool:
        """Same settings, survey and results (author, note, time and versions may differ)."""
        return not (self.changed_settings or self.changed_survey or self.line_changes or self.total_changes)

    def records(self) -> dict:
        """The changes as JSON data."""
        return {"identical": self.identical,
                "settings": [{"key": k, "before": x, "after": y, "unit": u} for k, x, y, u in self.changed_settings],
                "survey": [{"key": k, "before": x, "after": y} for k, x, y in self.changed_survey],
                "lines": [dict(r) for r in self.line_changes], "totals": [dict(r) for r in self.total_changes],
                "versions": [{"component": k, "before": x, "after": y} for k, x, y in self.changed_provenance]}

    def text(self) -> str:
        """Readable list of the changes (at most 40 per section, with the count of the rest)."""
        if self.identical:
            return "Settings, survey rows and results identical."

        def section(title, items):
            if not items:
                return []
            more = [f"  ... and {len(items) - _SHOWN} more"] if len(items) > _SHOWN else []
            return [title, *(f"  {line}" for line in items[:_SHOWN]), *more]
        settings = [f"{k}: {x!r} -> {y!r}{' ' + u if u else ''}" for k, x, y, u in self.changed_settings]
        lines = section("Changed settings (a -> b):", settings)
        lines += section("Changed survey cells (a -> b):", [f"{k}: {x!r} -> {y!r}" for k, x, y in self.changed_survey])
        lines += section("Changed results per line (best option; a -> b):", [change_text(r) for r in self.line_changes])
        lines += section("Changed totals (hot losses and cold gains apart; a -> b):",
                         [change_text(r) for r in self.total_changes])
        lines += [f"Version {k}: {x} -> {y}" for k, x, y in self.changed_provenance]
        return "\n".join(lines)


def diff(a, b) -> UpgradeDiff:
    """Differences between two upgrade snapshots (paths or :class:`~convlib.upgrade_snapshot.UpgradeSnapshot`).

    Settings as (setting, before, after, unit): a cost-table cell is named by its pipe diameter and thickness; the
    survey's changed cells; per line of the ranked lists (matched by row number) each of :data:`LINE_QUANTITIES`
    that changed and the totals, each before -> after with its unit, signed change and relative change. Numbers
    within round-off (relative 1e-9, e.g. a total summed in another order) are not listed.
    """
    a, b = as_upgrade_snapshot(a), as_upgrade_snapshot(b)
    sa, sb = settings_document(a.settings, a.weather_source), settings_document(b.settings, b.weather_source)
    leaves: list = []
    _leaf_changes(sa, sb, "", leaves)
    settings = [(_setting_name(p, sa["costs"]), x, y, _setting_unit(p)) for p, x, y in leaves]
    then, now = a.provenance.model_dump(), b.provenance.model_dump()
    return UpgradeDiff(settings, _survey_changes(a.survey, b.survey), _line_changes(a.ranked, b.ranked),
                       _total_changes(a.totals, b.totals), [(k, then[k], now[k]) for k in then if then[k] != now[k]])
