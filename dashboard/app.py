"""The dashboard application: assembles the panels, the store and the runner.

Data flow: the line panel publishes a validated ``CaseSpec`` into the :class:`~dashboard.store.Store`; the
:class:`~dashboard.refresh.Refresher` evaluates the base case at once for the result cards, marks every view
stale and recomputes only the visible one (in a worker thread when a kernel loop runs, newest request wins;
the expensive parts wait for a quiet spell); a hidden view is recomputed when it is shown. Panels show what
the store holds (``dlink``) and never call each other. Adding a view is one line in :data:`VIEWS` (its
panel) and one in ``settings.PANELS`` (its tab title), plus its jobs in :data:`dashboard.refresh.JOBS`.
"""
from __future__ import annotations

import html
import logging
from pathlib import Path

import ipywidgets as widgets
import traitlets

from . import compute, guard, settings
from .panels import (InsulationPanel, LinePanel, OperationPanel, RegimePanel, SnapshotPanel, SpreadPanel,
                     SurveyPanel, SweepPanel, UncertaintyPanel, VesselPanel)
from .panels.base import message_html
from .refresh import Refresher
from .runner import Runner
from .snapshot_actions import SnapshotActions, snapshot_spec
from .store import Store
from .style import CSS

__all__ = ["App", "build_app", "VIEWS"]

log = logging.getLogger(__name__)

#: The tabbed views: key -> (panel factory (app) -> panel, links {panel trait: store trait}).
VIEWS = {
    "sweep": (lambda app: SweepPanel(), {"axes": "axes", "result": "sweep", "current": "current",
                                         "chosen": "chosen"}),
    "regimes": (lambda app: RegimePanel(), {"view": "regimes", "regime_map": "regime_map"}),
    "spread": (lambda app: SpreadPanel(), {"axes": "axes", "result": "spread", "chosen": "chosen"}),
    "uncertainty": (lambda app: UncertaintyPanel(app.store.study),
                    {"study": "spec", "opened": "opened", "tornado": "tornado", "monte_carlo": "monte_carlo",
                     "monte_carlo_stale": "monte_carlo_stale"}),
    "insulation": (lambda app: InsulationPanel(settings.HEAT_LOSS_LIMIT), {"view": "insulation",
                                                                            "fittings": "fittings"}),
    "operation": (lambda app: OperationPanel(), {"view": "operation", "transients": "transients"}),
    "vessels": (lambda app: VesselPanel(), {"view": "vessels"}),
    "survey": (lambda app: SurveyPanel(), {"view": "survey"}),
    "snapshots": (lambda app: SnapshotPanel(app.snapshot_dir), {"entries": "snapshot_entries"}),
}
#: Links from the store to panel traits that need a transform: (view, panel trait, store trait, transform).
DERIVED = (
    ("uncertainty", "base_q", "summary", lambda s: 0.0 if s is None else s.q_per_length),
    ("insulation", "applicable", "case", lambda c: c.kind == "insulated"),
    ("insulation", "pipe_nps", "pipe_size", lambda size: size[0]),
    ("operation", "applicable", "case", lambda c: c.kind == "insulated"),
)


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

    Attributes
    ----------
    store : Store
        The case, unit system and latest results (panels show what it holds).
    refresher : Refresher
        Recomputes what a change touches.
    """

    def __init__(self, study: compute.StudySpec, snapshot_dir=None, runner: Runner | None = None,
                 units: str = settings.DEFAULT_UNIT_SYSTEM):
        # first: every widget built below handles the page's messages through the guard
        guard.install(on_refused=self._show_refusal)
        super().__init__()
        self.add_class("cl-app")
        self.snapshot_dir = Path(snapshot_dir or settings.snapshot_dir()).expanduser()
        self.store = store = Store(study, units=units)
        self.runner = runner or Runner()
        self.line = LinePanel(study.case, units=units)
        self.panels = {key: VIEWS[key][0](self) for key, _ in settings.PANELS}
        for key, panel in self.panels.items():  # app.sweep, app.insulation, ...
            setattr(self, key, panel)
        self.order = [key for key, _ in settings.PANELS]
        self._link(store)
        self.refresher = Refresher(store, {"line": self.line, **self.panels}, self.runner)
        self.snapshot_actions = SnapshotActions(store, self.refresher, self.snapshot_dir)
        self._layout(units)
        self.refresher.refresh("snapshots")

    def _link(self, store: Store) -> None:
        """Panels show the store; the line panel and the sweep selectors write into it."""
        traitlets.dlink((store, "opened"), (self.line, "opened"))
        traitlets.dlink((self.line, "case"), (store, "case"))
        traitlets.dlink((self.line, "pipe_size"), (store, "pipe_size"))
        traitlets.dlink((store, "summary"), (self.line, "summary"))
        for key, panel in self.panels.items():
            panel.add_class(f"cl-panel-{key}")
            for trait, source in VIEWS[key][1].items():
                traitlets.dlink((store, source), (panel, trait))
            traitlets.dlink((store, "stale"), (panel, "stale"), lambda stale, key=key: key in stale)
        for key, trait, source, transform in DERIVED:
            traitlets.dlink((store, source), (self.panels[key], trait), transform)
        for panel in (self.line, *self.panels.values()):
            traitlets.dlink((store, "units"), (panel, "units"))
        for key in ("sweep", "spread"):
            traitlets.link((store, "sweep_input"), (self.panels[key], "sweep_input"))

    def _layout(self, units: str) -> None:
        store = self.store
        self.tabs = widgets.Tab(children=[self.panels[k] for k in self.order],
                                titles=[title for _, title in settings.PANELS], layout=widgets.Layout(width="100%"))
        self.tabs.add_class("cl-tabs")
        traitlets.dlink((self.tabs, "selected_index"), (store, "visible"), lambda i: self.order[i or 0])
        self.units_switch = widgets.ToggleButtons(options=list(settings.UNIT_SYSTEMS), value=units,
                                                  style={"button_width": "110px"})
        self.units_switch.add_class("cl-units")
        traitlets.dlink((self.units_switch, "value"), (store, "units"))
        self.status = widgets.HTML()
        self.status.add_class("cl-status")
        traitlets.dlink((store, "busy"), (self.status, "value"), lambda busy: "updating…" if busy else "")
        self.alert = widgets.HTML()
        traitlets.dlink((store, "alert"), (self.alert, "value"), lambda a: message_html([a[0]], a[1]))
        self.title = widgets.HTML(layout=widgets.Layout(flex="1 1 auto"))
        traitlets.dlink((store, "title"), (self.title, "value"), _title_html)
        header = widgets.HBox([self.title, self.units_switch, self.status], layout=widgets.Layout(width="100%"))
        header.add_class("cl-header")
        sidebar = widgets.VBox([self.line.inputs], layout=widgets.Layout(width=settings.SIDEBAR_WIDTH,
                                                                        min_width=settings.SIDEBAR_WIDTH))
        sidebar.add_class("cl-sidebar")
        main = widgets.VBox([self.line.results, self.alert, self.tabs],
                            layout=widgets.Layout(flex="1 1 0%", width="auto", min_width="0px"))
        self.children = [widgets.HTML(CSS), header, widgets.HBox([sidebar, main], layout=widgets.Layout(
            width="100%"))]

    def _show_refusal(self, widget, text: str) -> None:
        """Show why a value the page sent for one of this app's widgets was refused (see :mod:`.guard`)."""
        store = getattr(self, "store", None)
        if store is not None and guard.owns(self, widget):
            store.alert = (text, "warning")

    # ------------------------------------------------------------------ read-only views of the store
    @property
    def study(self) -> compute.StudySpec:
        """The study opened."""
        return self.store.study

    @property
    def spec(self) -> compute.StudySpec:
        """The study with the current case."""
        return self.store.spec

    @property
    def summary(self) -> compute.CaseSummary | None:
        """The base case's card values."""
        return self.store.summary

    @property
    def units(self) -> str:
        """The unit system on screen."""
        return self.store.units

    @units.setter
    def units(self, value: str) -> None:
        self.units_switch.value = value

    @property
    def visible(self) -> str:
        """Key of the tab on screen."""
        return self.store.visible

    def snapshot_spec(self) -> compute.StudySpec:
        """The study a snapshot saves: current case, the sweep on screen, the Monte Carlo settings."""
        return snapshot_spec(self.store, self.panels["uncertainty"])

    def save_snapshot(self, author: str = "", note: str = "", name: str | None = None) -> None:
        """Run the whole study as shown and save it in the snapshot directory."""
        self.snapshot_actions.save(author, note, name)

    def _checked(self, path_text: str | None) -> Path:
        return self.snapshot_actions.checked(path_text)


def _title_html(title: tuple) -> str:
    name, source = title
    small = source or "heat loss of a line to the air around it · convlib"
    return f'<div class="cl-title">{html.escape(name)}<small>{html.escape(small)}</small></div>'


def build_app(study: compute.StudySpec | None = None, **kwargs) -> App:
    """The dashboard on ``study`` (default: convlib's invented demo study)."""
    return App(study or compute.load_demo_study(), **kwargs)
