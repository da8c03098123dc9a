"""What to recompute and when: observes the store and the panels' settings, runs convlib work, writes results.

A change of the case makes every view stale and recomputes the visible one (through
:class:`~dashboard.runner.Runner`: in a worker thread, newest request wins); a hidden view is recomputed
when it is shown. A change of a view's own settings (``SETTINGS`` of its panel) makes that view stale.
What each view computes is one entry of :data:`JOBS`: a function of the store and the view's panel that
returns the jobs to run, each writing one trait of the store.
"""
from __future__ import annotations

import contextlib
import functools
import logging
from dataclasses import dataclass
from typing import Any, Callable

from . import compute, settings, storage
from .store import Store

__all__ = ["Job", "JOBS", "CASE_DEFAULTS", "CASE_FREE", "Refresher"]

log = logging.getLogger(__name__)


def _guarded(method):
    """Show any error of an event handler in the app's alert line, never a traceback."""
    @functools.wraps(method)
    def wrapper(self, *args, **kwargs):
        try:
            return method(self, *args, **kwargs)
        except Exception as exc:  # noqa: BLE001 - everything a user can trigger ends here
            log.exception("dashboard handler failed")
            self.store.alert = (f"Could not update: {exc}", "error")
    return wrapper


@dataclass(frozen=True)
class Job:
    """One piece of work: ``compute()`` in the worker, its result into ``store.<target>``."""

    target: str                      # trait of the store (and key of the runner); "": the result goes nowhere
    compute: Callable[[], Any]
    delay: float = 0.0               # seconds of quiet to wait for (debounce of the expensive parts)
    on_error: Callable | None = None  # ``on_error(exception)`` instead of the panel's "Could not compute" line
    ready: bool = False              # ``compute`` only looks a result up: run at once on the loop, no worker


def _sweep_jobs(store: Store, panel, cache) -> list[Job]:
    spec, axis = store.spec, store.axis()
    if axis is None:
        return []
    cached = cache.peek(spec, axis)  # the slider of the swept input itself: the sweep on screen still holds
    if cached is not None:
        return [Job("sweep", lambda: cached, ready=True)]
    return [Job("sweep", lambda: compute.sweep_only(spec, axis, cache))]


def _spread_jobs(store: Store, panel, cache) -> list[Job]:
    spec, axis = store.spec, store.axis()
    return [] if axis is None else [Job("spread", lambda: compute.sweep_study(spec, axis, cache))]


def _regime_jobs(store: Store, panel, cache) -> list[Job]:
    case, summary = store.case, store.summary
    return [Job("regimes", lambda: compute.regime_view(case, summary)),
            Job("regime_map", lambda: compute.regime_map(case, summary), settings.EXPENSIVE_DELAY)]


def _uncertainty_jobs(store: Store, panel, cache) -> list[Job]:
    spec = store.spec  # the Monte Carlo follows when the panel re-runs after changes (Refresher.refresh)
    return [Job("tornado", lambda: compute.uncertainty_study(spec, run_monte_carlo=False).tornado)]


def _insulation_jobs(store: Store, panel, cache) -> list[Job]:
    case = store.case
    if case.kind != "insulated":
        return []
    touch, limit, still, hottest = (panel.surface_limit, panel.heat_loss_limit, panel.still_air,
                                    panel.hottest_air_temperature)
    nps, items = store.pipe_size[0], (panel.pressure_class, panel.valves, panel.flange_pairs)
    return [Job("insulation", lambda: compute.insulation_view(case, touch, limit, still, hottest),
                settings.EXPENSIVE_DELAY / 2),
            Job("fittings", lambda: compute.fittings_view(case, nps, *items))]


def _operation_jobs(store: Store, panel, cache) -> list[Job]:
    case, inputs, axis = store.case, panel.inputs(), panel.sweep_input
    if case.kind != "insulated":
        return []
    return [Job("operation", lambda: compute.operation_view(case, inputs, axis), settings.EXPENSIVE_DELAY / 2),
            Job("transients", lambda: compute.transient_view(case, inputs), settings.EXPENSIVE_DELAY / 2)]


def _vessel_jobs(store: Store, panel, cache) -> list[Job]:
    case, inputs, axis, hottest = store.case, panel.inputs(), panel.sweep_input, panel.hottest_air_temperature
    return [Job("vessels", lambda: compute.vessel_view(case, inputs, axis, hottest), settings.EXPENSIVE_DELAY / 2)]


def _survey_jobs(store: Store, panel, cache) -> list[Job]:
    source, years, shown = panel.source, panel.payback_years, store.survey
    if shown is not None and shown.source == source and shown.payback_years == years:
        return [Job("survey", lambda: shown)]  # the survey shown already (a refused file was put back)
    return [Job("survey", lambda: compute.survey_view(source, years), settings.EXPENSIVE_DELAY / 2,
                on_error=panel.refused)]


def _snapshot_jobs(store: Store, panel, cache) -> list[Job]:
    directory = panel.directory
    return [Job("snapshot_entries", lambda: storage.list_snapshots(directory))]


#: View -> ``defaults(case, pipe_size)``: inputs of the view's panel that follow the line until the user sets them.
CASE_DEFAULTS: dict[str, Callable] = {
    "insulation": lambda case, size: {"hottest_air_temperature": case.air_temperature},
    "operation": lambda case, size: compute.operation_defaults(case, *size),
    "vessels": lambda case, size: compute.vessel_defaults(case),
}

#: View -> ``jobs(store, panel, sweep_cache)``: what the view recomputes.
JOBS: dict[str, Callable] = {
    "sweep": _sweep_jobs, "spread": _spread_jobs, "regimes": _regime_jobs, "uncertainty": _uncertainty_jobs,
    "insulation": _insulation_jobs, "operation": _operation_jobs, "vessels": _vessel_jobs,
    "survey": _survey_jobs, "snapshots": _snapshot_jobs,
}
#: Views whose numbers do not depend on the line panel's case (a change of the case leaves them fresh).
CASE_FREE = ("line", "snapshots", "survey")


class Refresher:
    """Keeps the store's results up to date for the views on screen.

    Parameters
    ----------
    store : Store
    panels : dict
        View key -> panel; a panel's ``SETTINGS`` (trait names) are the inputs of its numbers besides the case.
    runner : Runner
    """

    def __init__(self, store: Store, panels: dict, runner):
        self.store, self.panels, self.runner = store, panels, runner
        self.sweep_cache = compute.SweepCache()
        self._depth = 0
        self._pending: set[str] = set()
        store.observe(self._on_spec, "spec")
        store.observe(self._on_visible, "visible")
        store.observe(self._on_sweep_input, "sweep_input")
        store.observe(self._on_pipe_size, "pipe_size")
        for key, panel in panels.items():
            names = list(getattr(panel, "SETTINGS", ()))
            if names:
                panel.observe(lambda change, key=key: self._on_settings(key, change), names)
        uncertainty = panels.get("uncertainty")
        if uncertainty is not None:
            uncertainty.observe(lambda change: self.run_monte_carlo(), "run_requests")
        self._on_spec(None)

    # ------------------------------------------------------------------ batching
    @contextlib.contextmanager
    def batch(self):
        """Collect refreshes asked for inside the block and run each view's once at its end."""
        self._depth += 1
        try:
            yield
        finally:
            self._depth -= 1
            if not self._depth:
                pending, self._pending = self._pending, set()
                for key in pending:
                    self.refresh(key)

    # ------------------------------------------------------------------ events
    @_guarded
    def _on_spec(self, change) -> None:
        store = self.store
        with self.batch():
            store.alert = ("", "info")
            try:
                store.summary = compute.summarize_case(store.case)
            except ValueError as exc:
                store.mark_stale("base")
                self.panels["line"].set_message([f"This case cannot be evaluated: {exc}"], "error")
                return
            store.mark_fresh("base")
            store.mark_stale(*(k for k in self.panels if k not in CASE_FREE))
            store.monte_carlo_stale = store.monte_carlo is not None
            self._case_defaults()
            self.request(store.visible)

    def _case_defaults(self) -> None:
        """Inputs of the views that follow the line until the user sets them (:data:`CASE_DEFAULTS`)."""
        for key, defaults in CASE_DEFAULTS.items():
            if key in self.panels:
                self.panels[key].set_case_defaults(defaults(self.store.case, self.store.pipe_size))

    @_guarded
    def _on_pipe_size(self, change) -> None:
        self._case_defaults()
        if "insulation" in self.panels:  # the bare valves and flanges follow the NPS
            self.store.mark_stale("insulation")
            if self.store.visible == "insulation":
                self.request("insulation")

    @_guarded
    def _on_visible(self, change) -> None:
        if change["new"] in self.store.stale or change["new"] == "snapshots":
            self.refresh(change["new"])

    @_guarded
    def _on_sweep_input(self, change) -> None:
        self.store.mark_stale("sweep", "spread")
        if self.store.visible in ("sweep", "spread"):
            self.request(self.store.visible)

    @_guarded
    def _on_settings(self, key: str, change) -> None:
        if key == "uncertainty":
            self.store.monte_carlo_stale = self.store.monte_carlo is not None
            if self.panels[key].auto and self.store.visible == key:
                self.run_monte_carlo(settings.EXPENSIVE_DELAY)
            return
        self.store.mark_stale(key)
        if self.store.visible == key:
            self.request(key)

    # ------------------------------------------------------------------ work
    def request(self, key: str) -> None:
        """Refresh ``key`` now, or at the end of the current :meth:`batch`."""
        if self._depth:
            self._pending.add(key)
        else:
            self.refresh(key)

    def refresh(self, key: str) -> None:
        """Recompute the numbers of view ``key`` for the current case."""
        store = self.store
        if store.summary is None or key not in JOBS:
            return
        panel = self.panels[key]
        for job in JOBS[key](store, panel, self.sweep_cache):
            self.submit(key, job)
        if key == "uncertainty" and panel.auto:
            self.run_monte_carlo(settings.EXPENSIVE_DELAY)

    def submit(self, view: str, job: Job, *, freeze: bool = False, on_done: Callable | None = None) -> None:
        """Run ``job`` for ``view``; its result goes to ``store.<job.target>``, errors to the view's panel."""
        panel = self.panels.get(view)

        def apply(result):
            if job.target == "monte_carlo":
                self.store.monte_carlo_stale = False
            if job.target:
                setattr(self.store, job.target, result)
            if freeze and panel is not None:
                panel.unfreeze()
            if on_done is not None:
                on_done(result)
            self.store.mark_fresh(view)
            self._status()

        def failed(exc):
            if freeze and panel is not None:
                panel.unfreeze()
            if job.on_error is not None:
                job.on_error(exc)
            elif panel is not None:
                panel.set_message([f"Could not compute: {exc}"], "error")
            self._status()

        if freeze and panel is not None:
            panel.freeze()
        self.runner.submit(job.target or f"{view}_work", job.compute, apply, delay=job.delay, on_error=failed,
                           at_once=job.ready)
        self._status()

    def run_monte_carlo(self, delay: float = 0.0) -> None:
        """Run the Monte Carlo of the uncertainty view with its panel's settings (progress shown there)."""
        panel = self.panels["uncertainty"]
        spec, samples, seed, form = self.store.spec, panel.samples, panel.seed, panel.model_form

        def progress(fraction, text):
            self.runner.call_in_loop(panel.show_progress, fraction, text)

        def run():
            return compute.uncertainty_study(spec, run_monte_carlo=True, samples=samples, seed=seed,
                                             model_form=form, progress=progress).monte_carlo

        panel.show_progress(0.0, "waiting…" if delay else "starting…")
        self.submit("uncertainty", Job("monte_carlo", run, delay), freeze=True,
                    on_done=lambda mc: panel.show_progress(1.0, f"done: {mc.samples:,} samples"))

    def progress_message(self, view: str, what: str):
        """A ``progress(fraction, text)`` callback showing a long run's progress on ``view`` (from any thread)."""
        panel = self.panels[view]

        def show(fraction, text):
            panel.set_message([f"{what}: {text} ({100 * fraction:.0f} %)"], "info")

        return lambda fraction, text: self.runner.call_in_loop(show, fraction, text)

    def _status(self) -> None:
        self.store.busy = self.runner.busy
