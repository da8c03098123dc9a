"""How far the published correlations disagree: spread along the sweep and h at the case."""
from __future__ import annotations

import ipywidgets as widgets
import traitlets
from ..compute import StudyResult, SweepAxis
from ..display import input_label
from ..figures import spread_figure
from .base import Panel
from .controls import DESCRIPTION_STYLE

__all__ = ["SpreadPanel"]


class SpreadPanel(Panel):
    """Correlation disagreement.

    Traits
    ------
    sweep_input : str
        Input of the sweep the spread is taken along (linked with the store's, as the sweep panel's).
    axes : list of SweepAxis
        The sweeps offered (from the store).
    result : StudyResult or None
        Base-case comparison and one sweep (set by the app).
    x_axis : str
        ``"input"`` (the swept input, the default) or ``"rayleigh"``.
    chosen : tuple
        Selected natural and forced law keys.
    """

    sweep_input = traitlets.Unicode("", allow_none=True)
    axes = traitlets.List(traitlets.Instance(SweepAxis))
    result = traitlets.Instance(StudyResult, allow_none=True)
    x_axis = traitlets.Unicode("input")
    chosen = traitlets.Tuple((None, None))

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.selector = widgets.Dropdown(description="Along the sweep of", style=DESCRIPTION_STYLE,
                                         layout=widgets.Layout(width="420px"))
        self.x_toggle = widgets.ToggleButtons(options=self._axis_options(), value="input",
                                              style={"button_width": "auto"})
        self.x_toggle.add_class("cl-spread-axis")
        traitlets.link((self.x_toggle, "value"), (self, "x_axis"))
        traitlets.link((self.selector, "value"), (self, "sweep_input"))
        self.children = [widgets.HBox([self.selector, self.x_toggle]), self.message, self.plot_box]

    def interactive(self):
        return [self.selector, self.x_toggle]

    def reset(self):
        super().reset()
        self.x_axis = "input"

    @traitlets.observe("axes")
    def _axes_changed(self, change) -> None:
        names = [a.input for a in self.axes]
        with self.hold_trait_notifications():
            self.selector.options = [(input_label(n), n) for n in names]
            if self.sweep_input in names:
                self.selector.value = self.sweep_input

    def _axis_options(self) -> list:
        what = input_label(self.sweep_input).lower() if self.sweep_input else "the swept input"
        return [(f"against {what}", "input"), ("against Ra", "rayleigh")]

    @traitlets.observe("sweep_input")
    def _sweep_input_changed(self, change):
        if hasattr(self, "x_toggle"):
            value = self.x_toggle.value
            self.x_toggle.options = self._axis_options()
            self.x_toggle.value = value

    @traitlets.observe("result", "units", "x_axis")
    def _render(self, change=None):
        if self.result is None or not self.result.sweeps:
            return
        self.show_figure(spread_figure(self.result, self.display, self.x_axis, chosen=self.chosen))
