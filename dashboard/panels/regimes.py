"""Where the case sits: Nu against Ra and Re for every law of the shape, and the convection-mode map."""
from __future__ import annotations

import traitlets

from ..compute import RegimeMap, RegimeView
from ..figures import regime_figure
from .base import Panel

__all__ = ["RegimePanel"]


class RegimePanel(Panel):
    """Regime charts.

    Traits
    ------
    view : RegimeView or None
        Law curves and the case's point (set by the app on every change while shown).
    regime_map : RegimeMap or None
        The mode map (set by the app after a quiet spell; the last one stays until then).
    """

    view = traitlets.Instance(RegimeView, allow_none=True)
    regime_map = traitlets.Instance(RegimeMap, allow_none=True)

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.children = [self.message, self.plot_box]

    @traitlets.observe("view", "regime_map", "units")
    def _render(self, change=None):
        if self.view is None:
            return
        self.show_figure(regime_figure(self.view, self.regime_map, self.display))
