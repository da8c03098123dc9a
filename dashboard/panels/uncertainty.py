"""Uncertainty of the heat loss: tornado of the study's input ranges, Monte Carlo on demand."""
from __future__ import annotations

import html

import ipywidgets as widgets
import traitlets
from .. import settings
from ..compute import MonteCarloResult, StudySpec, TornadoBar
from ..display import input_label
from ..figures import uncertainty_figure
from .base import Panel

__all__ = ["UncertaintyPanel"]

_PARAMETERS = {"normal": ("mean", "std"), "uniform": ("low", "high"), "triangular": ("low", "mode", "high"),
               "lognormal": ("median", "sigma")}


class UncertaintyPanel(Panel):
    """Tornado and Monte Carlo.

    Traits
    ------
    study : StudySpec
        The study the numbers are for (its input distributions are listed).
    opened : tuple
        ``(serial, StudySpec)``: a study opened from outside; its Monte Carlo settings become the panel's.
    tornado : list of TornadoBar
        Set by the app on every change while shown.
    monte_carlo : MonteCarloResult or None
        Set by the app when a run finishes (the last result stays on screen).
    monte_carlo_stale : bool
        The case changed since the Monte Carlo result was computed.
    base_q : float
        Heat loss of the case [W/m].
    samples, seed : int
        Monte Carlo settings.
    model_form : str
        ``"none"``, ``"stated_accuracy"`` or ``"choose_correlation"``.
    auto : bool
        Re-run the Monte Carlo after each change (debounced).
    run_requests : int
        Counts presses of the run button (the app observes it).
    progress : float
        0..1 while a run goes on.
    """

    study = traitlets.Instance(StudySpec)
    opened = traitlets.Tuple((0, None))
    tornado = traitlets.List(traitlets.Instance(TornadoBar))
    monte_carlo = traitlets.Instance(MonteCarloResult, allow_none=True)
    monte_carlo_stale = traitlets.Bool(False)
    base_q = traitlets.Float(0.0)
    samples = traitlets.Int(20_000)
    seed = traitlets.Int(12345)
    model_form = traitlets.Unicode("stated_accuracy")
    auto = traitlets.Bool(True)
    run_requests = traitlets.Int(0)
    progress = traitlets.Float(0.0)
    progress_text = traitlets.Unicode("")

    #: Settings of the Monte Carlo (its result is stale when one changes).
    SETTINGS = ("samples", "seed", "model_form")

    def __init__(self, study: StudySpec, **kwargs):
        super().__init__(**kwargs)
        u = study.uncertainty
        self._defaults = dict(samples=u.samples if u else 20_000, seed=u.seed if u else 12345,
                              model_form=u.model_form if u else "stated_accuracy", auto=True)
        counts = sorted({*settings.MONTE_CARLO_SAMPLES, self._defaults["samples"]})
        self.samples_box = widgets.Dropdown(options=[(f"{n:,}", n) for n in counts], description="Samples",
                                            style={"description_width": "60px"}, layout=widgets.Layout(width="170px"))
        self.seed_box = widgets.BoundedIntText(min=0, max=2**31 - 1, description="Seed",
                                               style={"description_width": "40px"},
                                               layout=widgets.Layout(width="150px"))
        self.model_box = widgets.Dropdown(options=[(text, key) for key, text in settings.MODEL_FORMS.items()],
                                          description="Model form", style={"description_width": "80px"},
                                          layout=widgets.Layout(width="270px"))
        self.auto_box = widgets.Checkbox(description="re-run after changes", indent=False,
                                         layout=widgets.Layout(width="170px"))
        self.run_button = widgets.Button(description="Run Monte Carlo", button_style="primary")
        self.run_button.add_class("cl-run-mc")
        self.run_button.on_click(lambda _: setattr(self, "run_requests", self.run_requests + 1))
        self.bar = widgets.FloatProgress(min=0.0, max=1.0, description="", layout=widgets.Layout(width="160px"))
        self.bar_text = widgets.Label()
        for box, trait in ((self.samples_box, "samples"), (self.seed_box, "seed"), (self.model_box, "model_form"),
                           (self.auto_box, "auto")):
            traitlets.link((box, "value"), (self, trait))
        traitlets.dlink((self, "progress"), (self.bar, "value"))
        traitlets.dlink((self, "progress_text"), (self.bar_text, "value"))
        self.table = widgets.HTML()
        self.table.add_class("cl-table")
        self.study = study
        self.reset()
        self.children = [
            widgets.HBox([self.samples_box, self.seed_box, self.model_box, self.auto_box],
                         layout=widgets.Layout(flex_flow="row wrap")),
            widgets.HBox([self.run_button, self.bar, self.bar_text], layout=widgets.Layout(align_items="center")),
            self.message, self.plot_box,
            widgets.HTML('<div class="cl-section">Input distributions of the study</div>'), self.table]

    def interactive(self):
        return [self.samples_box, self.seed_box, self.model_box, self.auto_box, self.run_button]

    def reset(self):
        super().reset()
        for name, value in self._defaults.items():
            setattr(self, name, value)

    def show_progress(self, fraction: float, text: str) -> None:
        """Show how far a Monte Carlo run is (0..1) and what it does."""
        self.progress, self.progress_text = fraction, text

    @traitlets.observe("opened")
    def _opened(self, change):
        study = change["new"][1]
        u = study.uncertainty if study is not None else None
        if u is not None:
            with self.hold_trait_notifications():
                self.samples, self.seed, self.model_form = u.samples, u.seed, u.model_form

    @traitlets.observe("units", "study")
    def _render_table(self, change=None):
        if not hasattr(self, "table"):
            return
        u = self.study.uncertainty
        if u is None or not u.distributions:
            self.table.value = "<p>The study gives no input distributions: only the model form is sampled.</p>"
            return
        d = self.display
        rows = []
        for dist in u.distributions:
            params = []
            for p in _PARAMETERS[dist.kind]:
                value = getattr(dist, p)
                if p == "sigma":
                    params.append(f"σ(ln) = {value:.3g}")
                elif p == "std" and d.label(dist.input) in ("°C", "°F"):  # a spread of temperature
                    params.append(f"std = {d.text(value, 'temperature_difference')}")
                else:
                    params.append(f"{p} = {d.text(value, dist.input)}")
            rows.append(f"<tr><td>{html.escape(input_label(dist.input))}</td><td>{dist.kind}</td>"
                        f"<td>{html.escape(', '.join(params))}</td></tr>")
        self.table.value = ("<table><tr><th>Input</th><th>Distribution</th><th>Parameters</th></tr>"
                            + "".join(rows) + "</table>")

    @traitlets.observe("tornado", "monte_carlo", "units", "base_q", "monte_carlo_stale")
    def _render(self, change=None):
        if not self.tornado and self.monte_carlo is None:
            return
        self.show_figure(uncertainty_figure(self.tornado, self.monte_carlo, self.display, self.base_q))
        if self.monte_carlo is not None and self.monte_carlo_stale:
            self.set_message("The Monte Carlo result shown is for an earlier case: press “Run Monte Carlo”.",
                             "warning")
        elif self.monte_carlo is not None and self.monte_carlo.clipped and any(self.monte_carlo.clipped.values()):
            clipped = ", ".join(f"{input_label(k)} {v}" for k, v in self.monte_carlo.clipped.items() if v)
            self.set_message(f"Samples clipped to the physical range: {clipped}.", "info")
        else:
            self.set_message()
