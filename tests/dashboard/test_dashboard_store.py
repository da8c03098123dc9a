"""The store and the slider path: one store, compute.py the only dashboard module importing convlib, and a
sweep that is not recomputed when only its own swept input moves.

The expected numbers are convlib's own (:func:`convlib.study.run_study` called afresh): the dashboard must show
exactly them, whatever it cached.
"""
from __future__ import annotations

import ast
from pathlib import Path

import numpy as np
import pytest
import convlib.study as cl_study
from convlib.study import run_study, sweep_key

from dashboard import compute

from dashboard_helpers import show, trace

#: The dashboard package, and its compute layer (a package: compute/__init__.py and its modules).
COMPUTE = Path(compute.__file__).resolve().parent
DASHBOARD = COMPUTE.parent


def _imports_convlib(path: Path) -> list[int]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    lines = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import) and any(a.name.split(".")[0] == "convlib" for a in node.names):
            lines.append(node.lineno)
        elif isinstance(node, ast.ImportFrom) and node.level == 0 and (node.module or "").split(".")[0] == "convlib":
            lines.append(node.lineno)
    return lines


def test_only_compute_imports_convlib():
    assert COMPUTE.name == "compute" and (COMPUTE / "__init__.py").is_file()
    offenders = {str(p.relative_to(DASHBOARD)): _imports_convlib(p) for p in DASHBOARD.rglob("*.py")
                 if COMPUTE not in p.resolve().parents}
    assert {k: v for k, v in offenders.items() if v} == {}
    assert any(_imports_convlib(p) for p in COMPUTE.glob("*.py"))  # the layer is where convlib comes in


class _Counter:
    """Counts calls of convlib.study.evaluate_case by the swept input it overrides."""

    def __init__(self, monkeypatch):
        self.calls: list[tuple[str, ...]] = []
        real = cl_study.evaluate_case

        def spy(case, *args, **overrides):
            self.calls.append(tuple(sorted(overrides)))
            return real(case, *args, **overrides)

        monkeypatch.setattr(cl_study, "evaluate_case", spy)

    def sweeps_of(self, name: str) -> int:
        return sum(1 for c in self.calls if name in c)


def test_wind_sweep_not_recomputed_when_only_the_wind_moves(app, study, monkeypatch):
    show(app, "sweep")
    assert app.sweep.sweep_input == "wind_speed"  # the demo study's first sweep
    spy = _Counter(monkeypatch)
    app.line.controls["wind_speed"].widget.value = 5.0
    assert spy.sweeps_of("wind_speed") == 0          # the cards' base case only, no sweep solve
    assert app.line.case.wind_speed == pytest.approx(5.0)
    # what is on screen equals run_study of the new case, computed afresh
    axis = app.store.axis()
    fresh = run_study(app.spec.model_copy(update={"sweeps": [axis], "maps": [], "tornado": [],
                                                  "uncertainty": None})).sweeps[0]
    assert app.store.sweep == fresh
    plot = app.sweep.plot
    np.testing.assert_array_equal(trace(plot, "total (selected laws)").y, fresh.default.q_per_length)
    np.testing.assert_array_equal(trace(plot, "band, low").y, fresh.band_low)
    assert any(s.x0 == pytest.approx(5.0) for s in plot.layout.shapes)  # the case's marker moved
    # another input does change the sweep: it is recomputed
    app.line.controls["air_temperature"].widget.value = 25.0
    assert spy.sweeps_of("wind_speed") > 0


def test_spread_view_reuses_the_cached_sweep_and_equals_run_study(app, monkeypatch):
    show(app, "spread")
    spy = _Counter(monkeypatch)
    app.line.controls["wind_speed"].widget.value = 6.0
    assert spy.sweeps_of("wind_speed") == 0          # base case and comparison only
    axis = app.store.axis()
    fresh = run_study(app.spec.model_copy(update={"sweeps": [axis], "maps": [], "tornado": [],
                                                  "uncertainty": None}))
    assert app.store.spread == fresh


def test_sweep_key_ignores_only_the_swept_input(study):
    axis = compute.sweep_axes(study, study.case)[0]
    assert axis.input == "wind_speed"
    windy = study.model_copy(update={"case": study.case.model_copy(update={"wind_speed": 9.0})})
    warm = study.model_copy(update={"case": study.case.model_copy(update={"air_temperature": 300.0})})
    assert sweep_key(study, axis) == sweep_key(windy, axis)
    assert sweep_key(study, axis) != sweep_key(warm, axis)
    other = axis.model_copy(update={"stop": 20.0})
    assert sweep_key(study, axis) != sweep_key(study, other)


def test_sweep_solves_each_distinct_case_once(study, monkeypatch):
    # a sweep needs: the case's laws, every other compared law, and the band's two ends (one stacked solve)
    spy = _Counter(monkeypatch)
    axis = compute.sweep_axes(study, study.case)[0]
    cl_study.run_sweep(study, axis)
    natural = study.compared_methods("natural")
    forced = study.compared_methods("forced")
    assert len(spy.calls) == 1 + (len(natural) - 1) + (len(forced) - 1) + 1


def test_store_marks_views_stale_and_fresh(app):
    assert "sweep" not in app.store.stale and "regimes" in app.store.stale
    app.line.controls["emissivity"].widget.value = 0.3
    assert "regimes" in app.store.stale and "sweep" not in app.store.stale  # the visible view recomputed
    show(app, "regimes")
    assert "regimes" not in app.store.stale and not app.regimes.stale


def test_moving_the_swept_input_moves_only_the_marker_and_plots_convlibs_numbers(app, monkeypatch):
    # the wind slider with the wind sweep on screen: the cached sweep stays, only the case's marker moves
    # (expected values: convlib.study.run_study called afresh on the new case, outside the dashboard's caches)
    show(app, "sweep")
    plot = app.sweep.plot
    rebuilt = []
    monkeypatch.setattr(app.sweep, "show_figure", lambda fig: rebuilt.append(fig))
    sent = []
    real_relayout = plot.plotly_relayout
    monkeypatch.setattr(plot, "plotly_relayout", lambda data, **kw: (sent.append(dict(data)),
                                                                     real_relayout(data, **kw)))
    for wind in (4.0, 7.5):
        app.line.controls["wind_speed"].widget.value = wind
    assert rebuilt == [] and len(sent) == 2        # no figure rebuilt: two marker moves
    assert set(sent[-1]) == {"shapes[0].x0", "shapes[0].x1", "annotations[0].x"}
    axis = app.store.axis()
    fresh = run_study(app.spec.model_copy(update={"sweeps": [axis], "maps": [], "tornado": [],
                                                  "uncertainty": None}))
    assert app.line.case.wind_speed == pytest.approx(7.5)
    np.testing.assert_array_equal(trace(plot, "total (selected laws)").y, fresh.sweeps[0].default.q_per_length)
    np.testing.assert_array_equal(trace(plot, "model-form band (stated accuracy)").y,
                                  fresh.sweeps[0].band_high)
    assert plot.layout.shapes[0].x0 == plot.layout.shapes[0].x1 == pytest.approx(7.5)
    assert plot.layout.annotations[0].x == pytest.approx(7.5) and plot.layout.annotations[0].text == "this case"
    # the cards follow the new case
    assert app.summary.q_per_length == pytest.approx(float(fresh.base.q_per_length[0]), rel=1e-12)
    # a change of another input redraws the whole figure (new sweep)
    app.line.controls["air_temperature"].widget.value = 25.0
    assert len(rebuilt) == 1


def test_a_cached_sweep_is_applied_without_the_worker(app):
    show(app, "sweep")
    seen = []
    real = app.runner.submit
    app.runner.submit = lambda key, *a, **kw: (seen.append((key, kw.get("at_once"))), real(key, *a, **kw))
    app.line.controls["wind_speed"].widget.value = 6.0     # the sweep of wind is in the cache
    assert ("sweep", True) in seen
    seen.clear()
    app.line.controls["emissivity"].widget.value = 0.5    # a new sweep: computed in the worker
    assert ("sweep", False) in seen
