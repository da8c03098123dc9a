"""Heat loss against one input of the study, every applicable correlation, the model-form band."""
from __future__ import annotations

import ipywidgets as widgets
import traitlets
from ..compute import SweepAxis, SweepResult
from ..display import input_label
from ..figures import sweep_figure, sweep_marker
from .base import Panel
from .controls import DESCRIPTION_STYLE

__all__ = ["SweepPanel"]


class SweepPanel(Panel):
    """Sweep of one input.

    Traits
    ------
    axes : list of SweepAxis
        The sweeps offered (set by the app).
    sweep_input : str
        The selected input (linked with the correlation-spread panel).
    result : SweepResult or None
        The selected sweep (set by the app).
    current : float or None
        The case's value of the swept input [SI] (drawn when the next result arrives).
    chosen : tuple
        Selected natural and forced law keys (drawn when the next result arrives).
    """

    axes = traitlets.List(traitlets.Instance(SweepAxis))
    sweep_input = traitlets.Unicode("", allow_none=True)
    result = traitlets.Instance(SweepResult, allow_none=True)
    current = traitlets.Float(None, allow_none=True)
    chosen = traitlets.Tuple((None, None))

    def __init__(self, **kwargs):
        self._drawn: tuple | None = None  # (result, units, laws, log x, marked) of the figure on screen
        super().__init__(**kwargs)
        self.selector = widgets.Dropdown(description="Swept input", style=DESCRIPTION_STYLE,
                                         layout=widgets.Layout(width="420px"))
        self.selector.add_class("cl-sweep-input")
        traitlets.link((self.selector, "value"), (self, "sweep_input"))
        self.children = [self.selector, self.message, self.plot_box]

    def interactive(self):
        return [self.selector]

    def reset(self):
        super().reset()
        if self.axes:
            self.sweep_input = self.axes[0].input

    def axis(self) -> SweepAxis | None:
        """The selected sweep axis."""
        for a in self.axes:
            if a.input == self.sweep_input:
                return a
        return self.axes[0] if self.axes else None

    @traitlets.observe("axes")
    def _axes_changed(self, change):
        names = [a.input for a in self.axes]
        keep = self.sweep_input if self.sweep_input in names else (names[0] if names else None)
        with self.hold_trait_notifications():
            self.selector.options = [(input_label(n), n) for n in names]
            self.selector.value = keep

    @traitlets.observe("result", "units", "current", "chosen")
    def _render(self, change=None):
        if self.result is None:
            return
        sweep = self.result
        axis = next((a for a in self.axes if a.input == sweep.input), None)
        log_x = bool(axis and axis.scale == "log")
        drawn = (self.units, self.chosen, log_x)
        if (self.plot is not None and self.current is not None and self._drawn is not None
                and self._drawn[0] is sweep and self._drawn[1:] == (*drawn, True)):
            # the same sweep on screen (the cache returned it), only the case moved along it: move its marker
            self.plot.plotly_relayout(sweep_marker(sweep.input, self.current, self.display))
            return
        fig = sweep_figure(sweep, self.display, current=self.current, log_x=log_x, chosen=self.chosen)
        self.show_figure(fig)
        self._drawn = (sweep, *drawn, self.current is not None)
