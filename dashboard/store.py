"""The one store of the dashboard: the current case, the unit system and the latest result of every view.

Panels never call each other: the app links their traits to the store's (``dlink``), the
:class:`~dashboard.refresh.Refresher` observes the store and the panels' settings and writes the results
back here. Everything in the store is a plain value; nothing here touches a widget.
"""
from __future__ import annotations

import traitlets

from . import compute, settings

__all__ = ["Store", "VIEWS"]

#: The views whose latest result the store keeps, each with its staleness.
VIEWS = ("base", "sweep", "spread", "regimes", "uncertainty", "insulation", "operation", "vessels", "survey",
         "snapshots")


class Store(traitlets.HasTraits):
    """The dashboard's state.

    Traits
    ------
    study : StudySpec
        The study opened (its sweeps, tornado and uncertainty settings); a new one is an opened snapshot.
    case : CaseSpec
        The case the line panel describes.
    spec : StudySpec
        The study at the current case (what the views compute and a snapshot saves); derived.
    units : str
        Unit system on screen.
    pipe_size : tuple
        ``(nps or None, schedule)`` chosen on the line panel (the pipe wall of the operation view follows it).
    sweep_input : str
        The input swept on the sweep and correlation views.
    axes : list of SweepAxis
        The sweeps offered for the case; derived.
    current : float or None
        The case's value of the swept input [SI]; derived.
    chosen : tuple
        The case's natural and forced laws (keys); derived.
    visible : str
        The view on screen.
    summary, sweep, spread, regimes, regime_map, tornado, monte_carlo, insulation, fittings, operation, transients,
    vessels, survey, snapshot_entries
        The latest result of each view (``summary`` is the base case).
    stale : set of str
        Views whose result is older than the case or their settings.
    monte_carlo_stale : bool
        The Monte Carlo result on screen is for an earlier case or settings.
    busy : bool
        Work is queued or running.
    alert : tuple
        ``(text, level)`` of the app's message line (``("", "info")`` for none).
    title : tuple
        ``(study name, where it came from)`` for the header.
    opened : tuple
        ``(serial, StudySpec)``: a study to show in every control (counts up on each :meth:`open`, so opening
        the same study twice is still news to the panels).
    """

    study = traitlets.Instance(compute.StudySpec, allow_none=True)
    case = traitlets.Instance(compute.CaseSpec, allow_none=True)
    spec = traitlets.Instance(compute.StudySpec, allow_none=True)
    units = traitlets.Unicode(settings.DEFAULT_UNIT_SYSTEM)
    pipe_size = traitlets.Tuple((None, settings.DEFAULT_SCHEDULE))
    sweep_input = traitlets.Unicode("", allow_none=True)
    axes = traitlets.List(traitlets.Instance(compute.SweepAxis))
    current = traitlets.Float(None, allow_none=True)
    chosen = traitlets.Tuple((None, None))
    visible = traitlets.Unicode(settings.PANELS[0][0])

    summary = traitlets.Instance(compute.CaseSummary, allow_none=True)
    sweep = traitlets.Instance(compute.SweepResult, allow_none=True)
    spread = traitlets.Instance(compute.StudyResult, allow_none=True)
    regimes = traitlets.Instance(compute.RegimeView, allow_none=True)
    regime_map = traitlets.Instance(compute.RegimeMap, allow_none=True)
    tornado = traitlets.List(traitlets.Instance(compute.TornadoBar))
    monte_carlo = traitlets.Instance(compute.MonteCarloResult, allow_none=True)
    insulation = traitlets.Instance(compute.InsulationView, allow_none=True)
    fittings = traitlets.Instance(compute.FittingsView, allow_none=True)
    operation = traitlets.Instance(compute.OperationView, allow_none=True)
    transients = traitlets.Instance(compute.TransientView, allow_none=True)
    vessels = traitlets.Instance(compute.VesselView, allow_none=True)
    survey = traitlets.Instance(compute.SurveyView, allow_none=True)
    snapshot_entries = traitlets.List()

    stale = traitlets.Set(traitlets.Unicode(), default_value=set(VIEWS))
    monte_carlo_stale = traitlets.Bool(False)
    busy = traitlets.Bool(False)
    alert = traitlets.Tuple(("", "info"))
    title = traitlets.Tuple(("", ""))
    opened = traitlets.Tuple((0, None))

    def __init__(self, study, case=None, **kwargs):
        super().__init__(**kwargs)
        self.title = (study.name, "")
        self.study = study
        self.case = case or study.case

    @traitlets.observe("study", "case")
    def _derive_spec(self, change):
        if self.study is None or self.case is None:
            return
        case = self.case
        axes = compute.sweep_axes(self.study, case)
        if [a.input for a in axes] != [a.input for a in self.axes]:
            self.axes = axes
            if self.sweep_input not in [a.input for a in axes]:
                self.sweep_input = axes[0].input if axes else None
        # the spec first: the cards (base case) update before a marker of the sweep is redrawn
        self.spec = compute.study_for_case(self.study, case)
        self.chosen = compute.chosen_laws(case)
        self.current = compute.current_value(case, self.sweep_input)

    @traitlets.observe("sweep_input")
    def _derive_current(self, change):
        if self.case is not None:
            self.current = compute.current_value(self.case, self.sweep_input)

    def open(self, study, source: str = "") -> None:
        """Show ``study`` (e.g. from a snapshot, ``source`` says where from) in every control."""
        self.title = (study.name, source)
        self.study = study
        self.opened = (self.opened[0] + 1, study)

    def axis(self):
        """The selected sweep axis (the first offered when none is selected)."""
        for a in self.axes:
            if a.input == self.sweep_input:
                return a
        return self.axes[0] if self.axes else None

    def mark_stale(self, *views: str) -> None:
        """Mark ``views`` (default: every view) out of date."""
        self.stale = self.stale | set(views or VIEWS)

    def mark_fresh(self, view: str) -> None:
        """Mark ``view`` up to date."""
        if view in self.stale:
            self.stale = self.stale - {view}
