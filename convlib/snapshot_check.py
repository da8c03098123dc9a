"""Checking snapshots: :func:`verify` re-runs a snapshot's study and compares; :func:`diff` compares two.

Deterministic quantities must agree to :data:`DETERMINISTIC_TOLERANCE` (relative); Monte Carlo figures within
:data:`STANDARD_ERRORS` standard errors of a difference (quantiles: :func:`quantile_standard_error`). The names
are importable from :mod:`convlib.snapshot` too.
"""
from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from dataclasses import field as dataclass_field
from typing import Any, Literal, NamedTuple

import numpy as np

from .errors import InputError
from .snapshot import Provenance, SnapshotError, as_snapshot, current_provenance
from .study import MonteCarloResult, StudyResult, run_study

__all__ = ["DETERMINISTIC_TOLERANCE", "STANDARD_ERRORS", "QuantityCheck", "VerifyReport", "SnapshotDiff", "verify",
           "diff", "quantile_standard_error"]

DETERMINISTIC_TOLERANCE = 1e-9         #: relative tolerance of re-computed deterministic quantities [-]
STANDARD_ERRORS = 4.0                  #: Monte Carlo tolerance in standard errors of a difference [-]
_MIN_HISTOGRAM_COUNT = 20              # samples a density window must hold (quantile standard error)
_ABSENT = "<absent>"                   # stands for a value one side of a diff does not have


def _relative(a, b) -> np.ndarray:
    """|a - b| / max(|a|, |b|), the denominator floored at 1e-12 of the array's largest magnitude (NaN kept)."""
    a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    scale = np.maximum(np.abs(a), np.abs(b))
    floor = max(1e-12 * float(np.nanmax(scale, initial=0.0)), np.finfo(float).tiny)
    return np.abs(a - b) / np.maximum(scale, floor)


def _number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


class _Tally:
    """Largest relative difference (and where) and structural mismatches between two JSON trees."""

    def __init__(self):
        self.largest, self.where, self.mismatches = 0.0, "", []

    def walk(self, a, b, path):
        if isinstance(a, dict) and isinstance(b, dict):
            for key in [*a, *(k for k in b if k not in a)]:
                self.walk(a.get(key, _ABSENT), b.get(key, _ABSENT), f"{path}.{key}")
        elif isinstance(a, list) and isinstance(b, list):
            if len(a) != len(b):
                self.mismatches.append(f"{path}: {len(a)} vs {len(b)} entries")
            elif a and all(isinstance(x, float) or x is None for x in [*a, *b]) and any(map(_number, a)):
                if [x is None for x in a] != [x is None for x in b]:
                    self.mismatches.append(f"{path}: missing values (null) at different points")
                    return
                self._note(_relative(*([math.nan if x is None else x for x in v] for v in (a, b))), path)
            elif not any(isinstance(x, (dict, list)) for x in [*a, *b]):  # flags, regimes, texts: exact
                bad = [i for i, (x, y) in enumerate(zip(a, b)) if x != y or type(x) is not type(y)]
                if bad:
                    self.mismatches.append(f"{path}: {len(bad)} of {len(a)} values differ (first "
                                           f"[{bad[0]}]: {a[bad[0]]!r} vs {b[bad[0]]!r})")
            else:
                for i, (x, y) in enumerate(zip(a, b)):
                    self.walk(x, y, f"{path}[{i}]")
        elif isinstance(a, float) and _number(b) or isinstance(b, float) and _number(a):
            self._note(_relative([a], [b]), path)
        elif a != b or type(a) is not type(b):
            self.mismatches.append(f"{path}: {a!r} vs {b!r}")

    def _note(self, rel, path):
        rel = np.nan_to_num(rel, nan=0.0)
        if rel.size and rel.max() > self.largest:
            self.largest, self.where = float(rel.max()), f"{path}[{int(rel.argmax())}]"


class QuantityCheck(NamedTuple):
    """One row of a :class:`VerifyReport`; ``difference`` and ``tolerance`` are relative [-]."""

    name: str
    difference: float
    tolerance: float
    within: bool
    kind: Literal["deterministic", "statistical"]
    detail: str = ""


def _deterministic(name: str, stored, now) -> QuantityCheck:
    tally = _Tally()
    tally.walk(stored, now, name)
    if tally.mismatches:
        shown = "; ".join(tally.mismatches[:3]) + (f" (+{len(tally.mismatches) - 3} more)"
                                                   if len(tally.mismatches) > 3 else "")
        return QuantityCheck(name, math.inf, DETERMINISTIC_TOLERANCE, False, "deterministic", shown)
    detail = f"largest at {tally.where}" if tally.largest > 0 else "identical"
    return QuantityCheck(name, tally.largest, DETERMINISTIC_TOLERANCE, tally.largest <= DETERMINISTIC_TOLERANCE,
                         "deterministic", detail)


def quantile_standard_error(p: float, edges, counts) -> float:
    """Standard error of a sample ``p``-quantile from a histogram, sqrt(p (1 - p) / n) / f(x_p).

    x_p is the histogram's own ``p``-quantile (cumulative counts interpolated
    linearly), so a wrong stored quantile cannot widen its own tolerance. The density
    f(x_p) is the frequency polygon's (bin densities interpolated between bin
    centres) where the two bins around x_p hold at least 20 samples, else the mean
    density of the bin holding x_p widened one bin each side until it does. The law
    is the asymptotic normal distribution of a sample quantile (H. Cramer,
    *Mathematical Methods of Statistics*, 1946, sec. 28.5); for a normal
    distribution it gives sqrt(pi / 2) sigma / sqrt(n) for the median, as below
    (n = 10^6, sigma = 1).

    Parameters
    ----------
    p : float
        Probability of the quantile, 0 < p < 1 [-].
    edges, counts : array_like
        Histogram bin edges [unit of the quantity] and counts (n = sum of counts).

    Returns
    -------
    float
        Standard error [unit of the quantity].

    >>> edges = np.linspace(-5.125, 5.125, 42)
    >>> counts = np.diff([math.erf(x / math.sqrt(2)) / 2 for x in edges]) * 1e6
    >>> round(quantile_standard_error(0.5, edges, counts) * 1e3 / math.sqrt(math.pi / 2), 2)
    1.0
    """
    edges, counts = np.asarray(edges, dtype=float), np.asarray(counts, dtype=float)
    n, last = counts.sum(), len(counts) - 1
    value = float(np.interp(p, np.concatenate([[0.0], np.cumsum(counts)]) / n, edges))
    centres = (edges[:-1] + edges[1:]) / 2
    right = int(np.clip(np.searchsorted(centres, value), 1, max(last, 1)))
    density = float(np.interp(value, centres, counts / (n * np.diff(edges))))
    if counts[right - 1:right + 1].sum() < _MIN_HISTOGRAM_COUNT or not density > 0:
        lo = hi = int(np.clip(np.searchsorted(edges, value, side="right") - 1, 0, last))
        while counts[lo:hi + 1].sum() < _MIN_HISTOGRAM_COUNT and (lo > 0 or hi < last):
            lo, hi = max(lo - 1, 0), min(hi + 1, last)
        density = counts[lo:hi + 1].sum() / (n * (edges[hi + 1] - edges[lo]))
    return float(math.sqrt(p * (1.0 - p) / n) / density) if density > 0 else math.inf


def _statistical(stored: MonteCarloResult, now: MonteCarloResult) -> list[QuantityCheck]:
    """Mean and P5/P50/P95 within STANDARD_ERRORS standard errors of the difference of two runs."""
    n = stored.samples
    errors = {"mean": stored.std / math.sqrt(n)}
    for p in (5, 50, 95):
        errors[f"p{p}"] = quantile_standard_error(p / 100, stored.histogram_edges, stored.histogram_counts)
    rows = []
    for key, error in errors.items():
        a, b = getattr(stored, key), getattr(now, key)
        scale = max(abs(a), abs(b)) or 1.0
        allowed = max(STANDARD_ERRORS * math.sqrt(2.0) * error, DETERMINISTIC_TOLERANCE * scale)
        detail = f"{abs(a - b) / error:.2g} standard errors (limit {allowed / error:.2g})" if error else ""
        rows.append(QuantityCheck(f"monte_carlo.{key}", abs(a - b) / scale, allowed / scale, abs(a - b) <= allowed,
                                  "statistical", detail))
    return rows


@dataclass(frozen=True)
class VerifyReport:
    """Outcome of :func:`verify`: one :class:`QuantityCheck` per quantity, and the versions then and now."""

    source: str
    quantities: list[QuantityCheck]
    provenance_then: Provenance
    provenance_now: Provenance

    @property
    def agrees(self) -> bool:
        """True when every quantity is within its tolerance."""
        return all(q.within for q in self.quantities)

    @property
    def provenance_differences(self) -> list[tuple[str, str, str]]:
        """(name, version then, version now) for each library or platform that changed."""
        then, now = self.provenance_then.model_dump(), self.provenance_now.model_dump()
        return [(k, then[k], now[k]) for k in then if then[k] != now[k]]

    def text(self) -> str:
        """Readable report: verdict, one line per quantity, then version differences."""
        bad = [q for q in self.quantities if not q.within]
        verdict = "AGREES" if not bad else f"DOES NOT AGREE ({len(bad)} of {len(self.quantities)} outside tolerance)"
        width = max([len(q.name) for q in self.quantities] + [8])
        lines = [f"Verification of {self.source}: {verdict}",
                 f"{'quantity':<{width}} {'difference':>10} {'tolerance':>10}  {'kind':<13} ok  detail"]
        for q in self.quantities:
            lines.append(f"{q.name:<{width}} {q.difference:>10.2e} {q.tolerance:>10.2e}  {q.kind:<13} "
                         f"{'yes' if q.within else 'NO ':<3} {q.detail}")
        changes = self.provenance_differences
        lines.append("Versions then -> now: " + ("unchanged" if not changes else ""))
        lines += [f"  {name}: {then} -> {now}" for name, then, now in changes]
        if changes and any(q.kind == "deterministic" for q in bad):
            lines.append("Note: deterministic results repeat bit for bit with the same code, property tables and "
                         "platform. With other versions, small differences can be round-off amplified by the "
                         "surface-temperature solve (tolerance 1e-6 K); large ones mean the computation changed.")
        return "\n".join(lines)


def verify(source, progress: Callable[[float, str], None] | None = None) -> VerifyReport:
    """Re-run a snapshot's study with this convlib and compare with the stored result.

    Deterministic quantities (base case, correlation comparison and spreads, dew point,
    warnings, each sweep, each map, tornado) must agree to a relative
    :data:`DETERMINISTIC_TOLERANCE` (1e-9): the same code on the same property tables
    reproduces them bit for bit, so the margin only absorbs round-off, and anything
    larger means the computation changed (a new CoolProp can change the tables: the
    report lists version differences). Monte Carlo mean and P5/P50/P95 may move when
    numpy changes its random streams; each must lie within :data:`STANDARD_ERRORS`
    standard errors of the difference of two independent runs, sqrt(2) times the
    stored estimate's error: std/sqrt(n) for the mean, sqrt(p (1 - p) / n) / f(x_p)
    for a quantile (:func:`quantile_standard_error`). A false alarm between two
    honest runs is then about 1 in 10^4 per quantity (4 sigma of a normal difference). Histogram, convergence
    trace and surface-temperature percentiles are not compared.

    Parameters
    ----------
    source : path-like or Snapshot
    progress : callable, optional
        ``progress(fraction, text)``, passed to :func:`~convlib.study.run_study`.
    """
    snap = as_snapshot(source)
    name = str(snap.path) if snap.path is not None else f"snapshot {snap.sha256[:12]}"
    try:
        now = run_study(snap.spec, progress=progress)
    except InputError as exc:  # valid when saved, refused now: report it; any other exception is a fault, raised
        raise SnapshotError(f"{name}: re-running the study failed with this convlib: {exc}") from exc
    a, b = snap.result.model_dump(mode="json"), now.model_dump(mode="json")
    rows = [_deterministic(key, a[key], b[key]) for key in
            ("base", "base_methods", "base_spreads", "dew_point", "warnings", "cautions")]
    for key in ("sweeps", "maps"):
        if len(a[key]) != len(b[key]):
            rows.append(_deterministic(key, a[key], b[key]))
            continue
        for i, item in enumerate(a[key]):
            label = item.get("input") or f"{item.get('x_input')} x {item.get('y_input')}"
            rows.append(_deterministic(f"{key}[{i}] ({label})", item, b[key][i]))
    rows.append(_deterministic("tornado", a["tornado"], b["tornado"]))
    if snap.result.monte_carlo is not None and now.monte_carlo is not None:
        rows += _statistical(snap.result.monte_carlo, now.monte_carlo)
    elif (snap.result.monte_carlo is None) != (now.monte_carlo is None):
        rows.append(QuantityCheck("monte_carlo", math.inf, 0.0, False, "statistical", "present on one side only"))
    return VerifyReport(name, rows, snap.provenance, current_provenance())


# ----------------------------------------------------------------------------- diff
@dataclass(frozen=True)
class SnapshotDiff:
    """What differs between two snapshots (a -> b)."""

    changed_inputs: list[tuple[str, Any, Any]]
    changed_results: list[tuple[str, float]]
    changed_provenance: list[tuple[str, str, str]]
    #: each changed result as before -> after (SI, with its unit): see :meth:`records`
    result_changes: list[dict] = dataclass_field(default_factory=list)

    def records(self) -> dict:
        """The changes as structured data (for JSON): ``inputs`` (key, before, after), ``results`` (key, before,
        after, unit, change = after - before, relative_change = change / |before|; ``None`` where a side has no
        value) and ``versions`` (component, before, after)."""
        return {"identical": self.identical,
                "inputs": [{"key": k, "before": _json_side(x), "after": _json_side(y)}
                           for k, x, y in self.changed_inputs],
                "results": [dict(r) for r in self.result_changes],
                "versions": [{"component": k, "before": x, "after": y} for k, x, y in self.changed_provenance]}

    @property
    def identical(self) -> bool:
        """Same inputs and same results (author, note, time and versions may differ)."""
        return not self.changed_inputs and not self.changed_results

    def text(self) -> str:
        """Readable list of the changes."""
        if self.identical:
            return "Inputs and results identical."
        lines = ["Changed inputs (a -> b):"] + [f"  {p}: {x!r} -> {y!r}" for p, x, y in self.changed_inputs]
        lines += ["Changed results (a -> b; of a curve, the point that changed most):"]
        lines += [f"  {_change_text(r)}" for r in self.result_changes]
        lines += [f"Version {k}: {x} -> {y}" for k, x, y in self.changed_provenance]
        return "\n".join(lines)


def _json_side(x):
    return None if isinstance(x, str) and x == _ABSENT else x


def _signed(x: float, digits: int = 4) -> str:
    return f"{x:+.{digits}g}"


def _change_text(r: dict) -> str:
    """``base.q_per_length: 52.31 W/m -> 55.02 W/m (+2.71 W/m, +5.18 %)``."""
    unit = f" {r['unit']}" if r["unit"] else ""
    side = lambda x: "absent" if x is None else f"{x:.6g}{unit}"  # noqa: E731
    if r["change"] is None:
        return f"{r['key']}: {side(r['before'])} -> {side(r['after'])}"
    relative = "" if r["relative_change"] is None else f", {_signed(100.0 * r['relative_change'], 3)} %"
    return f"{r['key']}: {side(r['before'])} -> {side(r['after'])} ({_signed(r['change'])}{unit}{relative})"


def _result_unit(name: str) -> str:
    return "K" if name.startswith("dew_point") else "W/m"


def _result_change(name: str, x, y) -> dict | None:
    """The change of one headline quantity (its point of largest relative difference); None when unchanged."""
    unit = _result_unit(name)
    if x is None or y is None or len(x) != len(y):
        before = None if x is None or len(x) != 1 else x[0]
        after = None if y is None or len(y) != 1 else y[0]
        note = {} if x is None or y is None else {"note": f"{len(x)} values -> {len(y)} values"}
        return {"key": name, "before": before, "after": after, "unit": unit, "change": None,
                "relative_change": None, **note}
    a = np.array([math.nan if v is None else v for v in x], dtype=float)
    b = np.array([math.nan if v is None else v for v in y], dtype=float)
    rel = _relative(a, b)
    if not np.any(rel > 0):
        return None
    i = int(np.nanargmax(rel))
    key = name if a.size == 1 else f"{name}[{i}]"
    change = float(b[i] - a[i])
    return {"key": key, "before": float(a[i]), "after": float(b[i]), "unit": unit, "change": change,
            "relative_change": change / abs(float(a[i])) if a[i] != 0 else None}


def _leaf_changes(a, b, path, out):
    if isinstance(a, dict) and isinstance(b, dict):
        for key in [*a, *(k for k in b if k not in a)]:
            _leaf_changes(a.get(key, _ABSENT), b.get(key, _ABSENT), f"{path}.{key}" if path else key, out)
    elif isinstance(a, list) and isinstance(b, list):
        for i in range(max(len(a), len(b))):
            _leaf_changes(a[i] if i < len(a) else _ABSENT, b[i] if i < len(b) else _ABSENT, f"{path}[{i}]", out)
    elif a != b or type(a) is not type(b) and not (_number(a) and _number(b)):
        out.append((path, a, b))


def _headline(result: StudyResult) -> dict[str, list[float]]:
    """The top-level quantities :func:`diff` compares."""
    out = {"base.q_per_length": result.base.q_per_length, "dew_point": [result.dew_point]}
    for i, s in enumerate(result.sweeps):
        out[f"sweeps[{i}].default.q_per_length"] = s.default.q_per_length
    for i, m in enumerate(result.maps):
        out[f"maps[{i}].q_per_length"] = [x for row in m.q_per_length for x in row]
    for bar in result.tornado:
        out[f"tornado[{bar.input}].swing"] = [bar.swing]
    if result.monte_carlo is not None:
        for key in ("mean", "p5", "p50", "p95"):
            out[f"monte_carlo.{key}"] = [getattr(result.monte_carlo, key)]
    return out


def diff(a, b) -> SnapshotDiff:
    """Differences between two snapshots (paths or :class:`Snapshot`).

    ``changed_inputs``: (JSON path such as ``case.wind_speed`` or ``sweeps[0].count``,
    value in a, value in b), ``"<absent>"`` where one side has no such field.
    ``changed_results``: (quantity, largest relative difference [-]) for the base
    q_per_length, dew point, each sweep's and map's q_per_length (default
    correlations), each tornado swing (matched by input) and the Monte Carlo mean and
    percentiles; ``inf`` where a quantity exists on one side only or changed length.
    """
    a, b = as_snapshot(a), as_snapshot(b)
    inputs: list = []
    _leaf_changes(a.spec.model_dump(mode="json"), b.spec.model_dump(mode="json"), "", inputs)
    qa, qb = _headline(a.result), _headline(b.result)
    results, changes = [], []
    for name in [*qa, *(k for k in qb if k not in qa)]:
        x, y = qa.get(name), qb.get(name)
        rel = float(_relative(x, y).max(initial=0.0)) if x is not None and y is not None and len(x) == len(y) \
            else math.inf
        if rel > 0:
            results.append((name, rel))
            change = _result_change(name, x, y)
            if change is not None:
                changes.append(change)
    then, now = a.provenance.model_dump(), b.provenance.model_dump()
    return SnapshotDiff(inputs, results, [(k, then[k], now[k]) for k in then if then[k] != now[k]], changes)
