"""The dashboard application: owns the study, wires the panels, calls convlib, pushes results.

Data flow: a change in the line panel publishes a validated ``CaseSpec``; the
app evaluates the base case at once for the result cards, marks every tab
stale and recomputes only the visible one (in a worker thread when a kernel
loop runs, newest request wins); the expensive parts (regime map, Monte Carlo,
insulation sizing) wait for a quiet spell. A hidden tab is recomputed when it
is shown.
"""
from __future__ import annotations

import functools
import html
import logging
from pathlib import Path

import ipywidgets as widgets
import traitlets
from convlib import snapshot as cl_snapshot
from convlib.study import StudySpec, load_demo_study, run_study

from . import compute, guard, settings, storage
from .display import input_label
from .panels import (InsulationPanel, LinePanel, OperationPanel, RegimePanel, SnapshotPanel, SpreadPanel,
                     SweepPanel, UncertaintyPanel, VesselPanel)
from .panels.base import message_html
from .report import render_report
from .runner import Runner
from .style import CSS

__all__ = ["App", "build_app"]

log = logging.getLogger(__name__)


def _guarded(method):
    """Show any error of an event handler as a message in the app, never a traceback."""
    @functools.wraps(method)
    def wrapper(self, *args, **kwargs):
        try:
            return method(self, *args, **kwargs)
        except Exception as exc:  # noqa: BLE001 - everything a user can trigger ends here
            log.exception("dashboard handler failed")
            self.alert.value = message_html([f"Could not update: {exc}"], "error")
    return wrapper


class App(widgets.VBox):
    """The whole dashboard.

    Parameters
    ----------
    study : StudySpec
        The study to open (its case is the first line shown).
    snapshot_dir : path-like, optional
        Where snapshots are saved; default :func:`dashboard.settings.snapshot_dir`.
    runner : Runner, optional
        Job runner; default a worker thread when a kernel loop runs, else synchronous.
    units : {"SI", "US"}
        Unit system on screen at start.

    Traits
    ------
    spec : StudySpec
        The study with the current case (what a snapshot saves).
    units : str
        The unit system on screen.
    """

    spec = traitlets.Instance(StudySpec)
    units = traitlets.Unicode(settings.DEFAULT_UNIT_SYSTEM)

    def __init__(self, study: StudySpec, snapshot_dir=None, runner: Runner | None = None,
                 units: str = settings.DEFAULT_UNIT_SYSTEM):
        # first: every widget built below handles the page's messages through the guard
        guard.install(on_refused=self._show_refusal)
        super().__init__()
        self.add_class("cl-app")
        self.study = study
        self.runner = runner or Runner()
        self.snapshot_dir = Path(snapshot_dir or settings.snapshot_dir()).expanduser()
        self.summary: compute.CaseSummary | None = None
        self._sweep_cache: dict[str, tuple] = {}  # panel key -> (spec and axis JSON, result)
        self._case_serial = 0
        self._operation_quiet = False
        self.line = LinePanel(study.case, units=units)
        self.sweep = SweepPanel()
        self.regimes = RegimePanel()
        self.spread = SpreadPanel()
        self.uncertainty = UncertaintyPanel(study)
        self.insulation = InsulationPanel(settings.HEAT_LOSS_LIMIT)
        self.operation = OperationPanel()
        self.vessels = VesselPanel()
        self.snapshots = SnapshotPanel(self.snapshot_dir)
        self.panels = {"sweep": self.sweep, "regimes": self.regimes, "spread": self.spread,
                       "uncertainty": self.uncertainty, "insulation": self.insulation, "operation": self.operation,
                       "vessels": self.vessels, "snapshots": self.snapshots}
        for key, panel in self.panels.items():
            panel.add_class(f"cl-panel-{key}")
        self.order = [key for key, _ in settings.PANELS]
        self.tabs = widgets.Tab(children=[self.panels[k] for k in self.order],
                                titles=[title for _, title in settings.PANELS], layout=widgets.Layout(width="100%"))
        self.tabs.add_class("cl-tabs")
        self.units_switch = widgets.ToggleButtons(options=list(settings.UNIT_SYSTEMS), value=units,
                                                  style={"button_width": "110px"})
        self.units_switch.add_class("cl-units")
        self.status = widgets.HTML()
        self.status.add_class("cl-status")
        self.alert = widgets.HTML()
        title = widgets.HTML(f'<div class="cl-title">{html.escape(study.name)}<small>heat loss of a line to the '
                             f'air around it · convlib</small></div>', layout=widgets.Layout(flex="1 1 auto"))
        self.title = title
        header = widgets.HBox([title, self.units_switch, self.status], layout=widgets.Layout(width="100%"))
        header.add_class("cl-header")
        sidebar = widgets.VBox([self.line.inputs], layout=widgets.Layout(width=settings.SIDEBAR_WIDTH,
                                                                        min_width=settings.SIDEBAR_WIDTH))
        sidebar.add_class("cl-sidebar")
        main = widgets.VBox([self.line.results, self.alert, self.tabs],
                            layout=widgets.Layout(flex="1 1 0%", width="auto", min_width="0px"))
        self.children = [widgets.HTML(CSS), header, widgets.HBox([sidebar, main], layout=widgets.Layout(
            width="100%"))]
        # ---- wiring
        traitlets.dlink((self.units_switch, "value"), (self, "units"))
        for panel in (self.line, *self.panels.values()):
            traitlets.dlink((self, "units"), (panel, "units"))
        traitlets.link((self.sweep, "sweep_input"), (self.spread, "sweep_input"))
        self.line.observe(self._on_case, "case")
        self.tabs.observe(self._on_tab, "selected_index")
        self.sweep.observe(self._on_sweep_input, "sweep_input")
        self.uncertainty.observe(self._on_monte_carlo_request, "run_requests")
        self.uncertainty.observe(self._on_monte_carlo_settings, ["samples", "seed", "model_form"])
        self.insulation.observe(self._on_sizing_settings, ["surface_limit", "heat_loss_limit", "still_air",
                                                             "hottest_air_temperature"])
        self.operation.observe(self._on_operation_settings, list(OperationPanel.SETTINGS))
        self.vessels.observe(self._on_vessel_settings, list(VesselPanel.SETTINGS))
        self.line.schedule.observe(self._on_schedule, "value")
        self.snapshots.on_action(self._on_snapshot_action)
        self._apply_case(self.line.case)
        self._list_snapshots()

    def _show_refusal(self, widget, text: str) -> None:
        """Show why a value the page sent for one of this app's widgets was refused (see :mod:`.guard`)."""
        alert = getattr(self, "alert", None)
        if alert is not None and guard.owns(self, widget):
            alert.value = message_html([text], "warning")

    # ------------------------------------------------------------------ case changes
    @property
    def visible(self) -> str:
        """Key of the tab on screen."""
        return self.order[self.tabs.selected_index or 0]

    def _on_case(self, change):
        self._apply_case(change["new"])

    @_guarded
    def _apply_case(self, case) -> None:
        self._case_serial += 1
        self.alert.value = ""
        self.spec = compute.study_for_case(self.study, case)
        try:
            summary = compute.summarize_case(case)
        except ValueError as exc:
            self.line.set_message([f"This case cannot be evaluated: {exc}"], "error")
            return
        self.summary = summary
        self.line.summary = summary
        chosen = (case.natural or _default(case, "natural"), case.forced or _default(case, "forced"))
        self.sweep.chosen = self.spread.chosen = chosen
        axes = compute.sweep_axes(self.study, case)
        if [a.input for a in axes] != [a.input for a in self.sweep.axes]:
            self.spread.set_options([(input_label(a.input), a.input) for a in axes])
            self.sweep.axes = axes
        self._update_current()
        self.uncertainty.base_q = summary.q_per_length
        self.uncertainty.monte_carlo_stale = self.uncertainty.monte_carlo is not None
        self.insulation.applicable = case.kind == "insulated"
        self._operation_defaults(case)
        self._operation_quiet = True  # the refresh below recomputes
        try:
            self.vessels.set_case_defaults(compute.vessel_defaults(case))
        finally:
            self._operation_quiet = False
        for key, panel in self.panels.items():
            panel.stale = key != "snapshots"
        self.refresh(self.visible)

    def _update_current(self):
        axis = self.sweep.axis()
        case = self.spec.case
        if axis is None:
            return
        value = getattr(case, axis.input, None)
        if value is None and axis.input == "surroundings_temperature":
            value = case.air_temperature
        self.sweep.current = value

    @_guarded
    def _on_tab(self, change):
        key = self.visible
        if self.panels[key].stale:
            self.refresh(key)
        elif key == "snapshots":
            self._list_snapshots()

    @_guarded
    def _on_sweep_input(self, change):
        self._update_current()
        if self.visible in ("sweep", "spread"):
            self.refresh(self.visible)
        else:
            self.sweep.stale = self.spread.stale = True

    @_guarded
    def _on_monte_carlo_request(self, change):
        self._run_monte_carlo(delay=0.0)

    @_guarded
    def _on_monte_carlo_settings(self, change):
        self.uncertainty.monte_carlo_stale = self.uncertainty.monte_carlo is not None
        if self.uncertainty.auto and self.visible == "uncertainty":
            self._run_monte_carlo(delay=settings.EXPENSIVE_DELAY)

    @_guarded
    def _on_sizing_settings(self, change):
        if self.visible == "insulation":
            self.refresh("insulation")
        else:
            self.insulation.stale = True

    def _operation_defaults(self, case) -> None:
        """Coldest air and pipe wall of the operation panel follow the line (NPS/schedule when chosen)."""
        self.operation.applicable = case.kind == "insulated"
        if case.kind != "insulated":
            return
        line = self.line
        nps = line.nps.value if line.size_mode.value == "nps" else None
        wall = compute.pipe_wall_thickness(case.diameter, nps, line.schedule.value)
        self._operation_quiet = True  # the caller recomputes
        try:
            self.operation.set_case_defaults({"design_air_temperature": compute.design_air_temperature(case),
                                              "pipe_wall_thickness": wall})
        finally:
            self._operation_quiet = False

    @_guarded
    def _on_operation_settings(self, change):
        if self._operation_quiet:
            self.operation.stale = True
        elif self.visible == "operation":
            self.refresh("operation")
        else:
            self.operation.stale = True

    @_guarded
    def _on_vessel_settings(self, change):
        if self.visible == "vessels" and not self._operation_quiet:
            self.refresh("vessels")
        else:
            self.vessels.stale = True

    @_guarded
    def _on_schedule(self, change):
        case = self.spec.case
        if case.kind == "insulated":
            before = self.operation.inputs()
            self._operation_defaults(case)
            if self.operation.inputs() != before:
                self._on_operation_settings(None)

    # ------------------------------------------------------------------ recomputation
    def _submit(self, key, panel, compute_fn, apply_fn, delay=0.0, freeze=False):
        """Run ``compute_fn`` for ``panel`` (worker thread) and ``apply_fn`` its result; errors become messages."""
        def apply(result):
            if freeze:
                panel.unfreeze()
            apply_fn(result)
            panel.stale = False
            self._show_status()

        def failed(exc):
            if freeze:
                panel.unfreeze()
            panel.set_message([f"Could not compute: {exc}"], "error")
            self._show_status()

        if freeze:
            panel.freeze()
        self.runner.submit(key, compute_fn, apply, delay=delay, on_error=failed)
        self._show_status()

    def _progress_message(self, panel, what: str):
        """A ``progress(fraction, text)`` callback showing run_study's progress in ``panel`` (from any thread)."""
        def show(fraction, text):
            panel.set_message([f"{what}: {text} ({100 * fraction:.0f} %)"], "info")

        return lambda fraction, text: self.runner.call_in_loop(show, fraction, text)

    def _show_status(self):
        self.status.value = "updating…" if self.runner.busy else ""

    def refresh(self, key: str) -> None:
        """Recompute the numbers of one tab for the current case."""
        spec, summary = self.spec, self.summary
        if summary is None:
            return
        case = spec.case
        if key in ("sweep", "spread"):
            axis = self.sweep.axis()
            if axis is None:
                return
            token = (spec.model_dump_json(), axis.model_dump_json())
            full = self._sweep_cache.get("spread")  # (token, StudyResult): holds the sweep too
            if full is not None and full[0] == token:
                self._show_sweep(full[1] if key == "spread" else full[1].sweeps[0], key)
                return
            if key == "sweep":  # the sweep alone: no base-case comparison to redraw
                own = self._sweep_cache.get("sweep")
                if own is not None and own[0] == token:
                    self._show_sweep(own[1], key)
                    return
                work = lambda: (token, compute.sweep_only(spec, axis))  # noqa: E731
            else:
                work = lambda: (token, compute.sweep_study(spec, axis))  # noqa: E731
            self._submit(key, self.panels[key], work, lambda out: self._store_sweep(out, key))
        elif key == "regimes":
            self._submit("regimes", self.regimes, lambda: compute.regime_view(case, summary),
                         lambda view: setattr(self.regimes, "view", view))
            self._submit("regime_map", self.regimes, lambda: compute.regime_map(case, summary),
                         lambda m: setattr(self.regimes, "regime_map", m), delay=settings.EXPENSIVE_DELAY)
        elif key == "uncertainty":
            self.uncertainty.set_study(spec)
            self._submit("tornado", self.uncertainty,
                         lambda: compute.uncertainty_study(spec, run_monte_carlo=False).tornado,
                         lambda bars: setattr(self.uncertainty, "tornado", bars))
            if self.uncertainty.auto:
                self._run_monte_carlo(delay=settings.EXPENSIVE_DELAY)
        elif key == "insulation":
            if case.kind != "insulated":
                self.insulation.applicable = False
                return
            panel = self.insulation
            panel.follow_case_air(case.air_temperature)
            touch, limit, still = panel.surface_limit, panel.heat_loss_limit, panel.still_air
            hottest = panel.hottest_air_temperature
            self._submit("insulation", panel, lambda: compute.insulation_view(case, touch, limit, still, hottest),
                         lambda view: setattr(panel, "view", view), delay=settings.EXPENSIVE_DELAY / 2)
        elif key == "operation":
            panel = self.operation
            if case.kind != "insulated":
                panel.applicable = False
                return
            inputs, axis = panel.inputs(), panel.sweep_input
            self._submit("operation", panel, lambda: compute.operation_view(case, inputs, axis),
                         lambda view: setattr(panel, "view", view), delay=settings.EXPENSIVE_DELAY / 2)
        elif key == "vessels":
            panel = self.vessels
            inputs, axis = panel.inputs(), panel.sweep_input
            self._submit("vessels", panel, lambda: compute.vessel_view(case, inputs, axis),
                         lambda view: setattr(panel, "view", view), delay=settings.EXPENSIVE_DELAY / 2)
        elif key == "snapshots":
            self._list_snapshots()

    def _store_sweep(self, out, key):
        self._sweep_cache[key] = out
        self._show_sweep(out[1], key)

    def _show_sweep(self, result, key):
        panel = self.panels[key]
        if panel.result is not None and panel.result == result:
            panel.redraw()  # equal numbers (a sweep of wind does not depend on the case's wind): move the marker
        else:
            panel.result = result
        panel.stale = False
        panel.set_message()

    def _run_monte_carlo(self, delay: float) -> None:
        panel, spec = self.uncertainty, self.spec
        samples, seed, form = panel.samples, panel.seed, panel.model_form

        def progress(fraction, text):
            self.runner.call_in_loop(self._progress, fraction, text)

        def run():
            return compute.uncertainty_study(spec, run_monte_carlo=True, samples=samples, seed=seed,
                                             model_form=form, progress=progress).monte_carlo

        def apply(mc):
            panel.monte_carlo = mc
            panel.monte_carlo_stale = False
            panel.progress_text = f"done: {mc.samples:,} samples"
            panel.unfreeze()

        def failed(exc):
            panel.unfreeze()
            panel.set_message([f"Monte Carlo failed: {exc}"], "error")
            self._show_status()

        panel.freeze()
        panel.progress, panel.progress_text = 0.0, "waiting…" if delay else "starting…"
        self.runner.submit("monte_carlo", run, lambda mc: (apply(mc), self._show_status()), delay=delay,
                           on_error=failed)
        self._show_status()

    def _progress(self, fraction, text):
        self.uncertainty.progress = fraction
        self.uncertainty.progress_text = text

    # ------------------------------------------------------------------ snapshots
    def snapshot_spec(self) -> StudySpec:
        """The study to save: current case, the sweep on screen and the Monte Carlo settings of the panel."""
        spec = self.spec
        sweeps = list(spec.sweeps)
        axis = self.sweep.axis()
        if axis is not None and axis.input not in [s.input for s in sweeps]:
            sweeps.append(axis)
        panel = self.uncertainty
        u = spec.uncertainty
        if u is not None or panel.monte_carlo is not None:
            u = compute.monte_carlo_settings(spec, panel.samples, panel.seed, panel.model_form)
        return StudySpec.model_validate({**spec.model_dump(), "sweeps": [s.model_dump() for s in sweeps],
                                         "uncertainty": None if u is None else u.model_dump()})

    def _checked(self, path_text: str | None) -> Path:
        if not path_text:
            raise ValueError("select a snapshot in the list first")
        path = Path(path_text).resolve()
        if path.parent != self.snapshot_dir.resolve():
            raise ValueError("that file is not in the snapshot directory")
        return path

    @_guarded
    def _on_snapshot_action(self, action: str) -> None:
        panel = self.snapshots
        panel.set_message()
        try:
            if action == "save":
                self.save_snapshot(panel.author, panel.note, panel.name or None)
            elif action == "open":
                path = self._checked(panel.selected)
                self._submit("snapshot_io", panel, lambda: cl_snapshot.load(path), self.open_snapshot, freeze=True)
            elif action == "verify":
                path = self._checked(panel.selected)
                progress = self._progress_message(panel, "Re-running the study")
                self._submit("snapshot_io", panel, lambda: cl_snapshot.verify(path, progress=progress),
                             self._show_verify, freeze=True)
            elif action == "compare":
                a, b = self._checked(panel.selected), self._checked(panel.other)
                self._submit("snapshot_io", panel, lambda: cl_snapshot.diff(a, b),
                             lambda d: panel.show_text(f"{a.name} → {b.name}", d.text()), freeze=True)
            elif action == "report":
                path = self._checked(panel.selected)
                units = self.units
                self._submit("snapshot_io", panel, lambda: render_report(cl_snapshot.load(path), units).encode(),
                             lambda data: panel.show_link(data, path.name.removesuffix(".json") + ".html"),
                             freeze=True)
            elif action == "refresh":
                self._list_snapshots()
        except ValueError as exc:
            panel.set_message([str(exc)], "error")

    def save_snapshot(self, author: str = "", note: str = "", name: str | None = None) -> None:
        """Run the whole study as shown and save it in the snapshot directory."""
        panel = self.snapshots
        path = storage.snapshot_path(self.snapshot_dir, name or storage.default_name(self.study.name))
        spec = self.snapshot_spec()
        saved_by = storage.viewer_identity()  # the shared server's name for the viewer ("" on a local dashboard)

        progress = self._progress_message(panel, "Running the study")

        def run():
            result = run_study(spec, progress=progress)
            path.parent.mkdir(parents=True, exist_ok=True)
            written = cl_snapshot.save(path, spec, result, author=author, note=note, saved_by=saved_by)
            storage.record_snapshot(path.parent, written)  # the listing that follows need not open it
            return written

        def saved(written):
            panel.set_message([f"Saved {written.name}"], "info")
            self._list_snapshots()

        self._submit("snapshot_io", panel, run, saved, freeze=True)

    def open_snapshot(self, snap) -> None:
        """Restore every control from a loaded snapshot and show its stored uncertainty results."""
        self.study = snap.spec
        u = snap.spec.uncertainty
        panel = self.uncertainty
        with panel.hold_trait_notifications():
            if u is not None:
                panel.samples, panel.seed, panel.model_form = u.samples, u.seed, u.model_form
        panel.set_study(snap.spec)
        serial = self._case_serial
        self.line.set_case(snap.spec.case)
        if serial == self._case_serial:
            self._apply_case(self.line.case)
        panel.tornado = snap.result.tornado
        panel.monte_carlo = snap.result.monte_carlo
        panel.monte_carlo_stale = False
        self.title.value = (f'<div class="cl-title">{html.escape(snap.spec.name)}<small>opened from '
                            f'{html.escape(snap.path.name if snap.path else "a snapshot")}</small></div>')
        who = snap.author or "no author"
        self.snapshots.set_message([f"Opened {snap.path.name if snap.path else ''} ({who}, {snap.created_utc}, "
                                    f"SHA-256 {snap.sha256[:16]}…): every control restored."], "info")

    def _show_verify(self, report) -> None:
        self.snapshots.show_text("Verification", report.text())
        verdict = ("The numbers agree with a re-run." if report.agrees else
                   "The numbers do NOT agree with a re-run: see the quantities marked NO.")
        self.snapshots.set_message([verdict], "info" if report.agrees else "error")

    def _list_snapshots(self) -> None:
        directory = self.snapshot_dir
        self._submit("snapshot_list", self.snapshots, lambda: storage.list_snapshots(directory),
                     lambda entries: setattr(self.snapshots, "entries", entries))


def _default(case, mode: str) -> str:
    from convlib.geometry import SHAPES

    info = SHAPES[case.shape]
    return info.default_natural if mode == "natural" else info.default_forced


def build_app(study: StudySpec | None = None, **kwargs) -> App:
    """The dashboard on ``study`` (default: convlib's invented demo study)."""
    return App(study or load_demo_study(), **kwargs)
