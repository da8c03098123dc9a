"""What every panel shares: units trait, freeze/unfreeze/reset, a message line, an in-place figure."""
from __future__ import annotations

import html
import re

import ipywidgets as widgets
import numpy as np
import plotly.graph_objects as go
import traitlets

from .. import settings
from ..display import Display
from ..figures import TEMPLATE
from ..plotly_widget import figure_widget

__all__ = ["Panel", "InputsPanel", "sync_figure", "message_html", "figure_widget", "BUNDLE_ENV", "card_html", "card_value_text"]

BUNDLE_ENV = settings.BUNDLE_ENV


_LEVEL_CLASS = {"info": "cl-msg-info", "warning": "cl-msg-warn", "caution": "cl-msg-caution",
                "error": "cl-msg-error"}


def message_html(lines, level: str = "info", display: Display | None = None) -> str:
    """HTML of message lines in a box of the given level (info, warning, caution, error); with a
    ``display``, temperatures in the lines are shown in its unit system."""
    lines = [display.localize(str(line)) if display is not None else line for line in lines if line]
    if not lines:
        return ""
    items = "".join(f"<div>{html.escape(str(line))}</div>" for line in lines)
    return f'<div class="cl-msg {_LEVEL_CLASS[level]}">{items}</div>'


def _signature(traces) -> list[tuple]:
    return [(t.type, t.legendgroup if getattr(t, "legendgroup", None) else t.name) for t in traces]


def _same(a, b) -> bool:
    """Deep equality of plotly JSON values (numpy arrays compared by value)."""
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(_same(a[k], b[k]) for k in a)
    if isinstance(a, (list, tuple, np.ndarray)) or isinstance(b, (list, tuple, np.ndarray)):
        try:
            x, y = np.asarray(a), np.asarray(b)
        except (ValueError, TypeError):
            return False
        if x.dtype == object or y.dtype == object:
            return len(a) == len(b) and all(_same(u, v) for u, v in zip(a, b))
        return x.shape == y.shape and bool(np.array_equal(x, y, equal_nan=x.dtype.kind == "f" and
                                                         y.dtype.kind == "f"))
    return a == b


def _changes(old: dict, new: dict) -> dict:
    """Top-level properties of ``new`` that differ from ``old``."""
    return {k: v for k, v in new.items() if k not in old or not _same(old[k], v)}


def sync_figure(widget: go.FigureWidget, fig: go.Figure) -> None:
    """Make ``widget`` show ``fig`` by updating its traces and layout in place.

    Only properties that changed are set, inside one ``batch_update()`` (one message
    to the browser), when the new figure has the same traces (type and group);
    otherwise the traces are replaced within the same widget.
    """
    layout = fig.layout.to_plotly_json()
    layout.pop("template", None)
    current = widget.layout.to_plotly_json()
    # arrays of layout objects are replaced whole (an update would merge them element by element)
    arrays = {key: layout.pop(key, []) for key in ("annotations", "shapes")}

    def apply_layout():
        changed = _changes(current, layout)
        if changed:
            widget.layout.update(changed)
        for key, value in arrays.items():
            if not _same(current.get(key, []), value):
                widget.layout[key] = value

    if _signature(widget.data) == _signature(fig.data):
        with widget.batch_update():
            for old, new in zip(widget.data, fig.data):
                changed = _changes(old.to_plotly_json(), new.to_plotly_json())
                if changed:
                    old.update(changed)
            apply_layout()
        return
    with widget.batch_update():
        apply_layout()
    widget.data = ()
    widget.add_traces(list(fig.data))


class Panel(widgets.VBox):
    """Base of the dashboard's panels.

    Traits
    ------
    units : str
        Unit system on screen, ``"SI"`` or ``"US"`` (linked from the app's switch).
    busy : bool
        True while the panel is frozen for long work.
    stale : bool
        The panel's numbers are out of date (recomputed when it is next shown).
    """

    units = traitlets.Unicode(settings.DEFAULT_UNIT_SYSTEM)
    busy = traitlets.Bool(False)
    stale = traitlets.Bool(True)

    def __init__(self, **kwargs):
        self.message = widgets.HTML(layout=widgets.Layout(min_height="0px"))
        self.message.add_class("cl-message")
        self.plot: go.FigureWidget | None = None
        self.plot_box = widgets.Box(layout=widgets.Layout(width="100%", min_height="60px"))
        self._frozen: list = []
        super().__init__(**kwargs)
        self.add_class("cl-panel")

    # ---- interface
    @property
    def display(self) -> Display:
        """Converter and formatter for the current unit system."""
        return Display(self.units)

    def interactive(self) -> list:
        """Controls that :meth:`freeze` disables (widgets or QuantityControls); panels override."""
        return []

    def freeze(self) -> None:
        """Disable the panel's controls during long work (keeps the last result on screen)."""
        if self.busy:
            return
        self._frozen = [w for w in self.interactive() if not getattr(w, "disabled", True)]
        for w in self._frozen:
            w.disabled = True
        self.busy = True
        self.add_class("cl-busy")

    def unfreeze(self) -> None:
        """Enable the controls that :meth:`freeze` disabled."""
        for w in self._frozen:
            w.disabled = False
        self._frozen = []
        self.busy = False
        self.remove_class("cl-busy")

    def reset(self) -> None:
        """Return the panel's own controls to their defaults; panels override."""
        self.set_message()

    def set_message(self, lines=(), level: str = "info") -> None:
        """Show message lines above the panel's content (nothing to clear it)."""
        if isinstance(lines, str):
            lines = [lines]
        self.message.value = message_html(lines, level, self.display)

    def show_figure(self, fig: go.Figure) -> go.FigureWidget:
        """Show ``fig``: the first time in a new FigureWidget, afterwards by updating it in place."""
        if fig.layout.width is None:
            fig.update_layout(width=settings.FIGURE_WIDTH)
        if self.plot is None:
            # from the trace objects (not a figure dict): arrays stay numpy arrays on the Python side
            self.plot = figure_widget(data=fig.data, layout={**fig.layout.to_plotly_json(), "template": TEMPLATE})
            self.plot.add_class("cl-plot")
            self.plot_box.children = (self.plot,)
        else:
            sync_figure(self.plot, fig)
        return self.plot


class InputsPanel(Panel):
    """A panel with numeric inputs of its own (``self.controls``: name -> QuantityControl, built by the
    subclass with :meth:`_control_changed` as their callback), some of whose defaults follow the line
    (:attr:`FOLLOW_CASE`) until the user sets them."""

    FOLLOW_CASE: tuple[str, ...] = ()

    def __init__(self, **kwargs):
        self._case_defaults = {}
        self._follow = dict.fromkeys(self.FOLLOW_CASE, True)
        super().__init__(**kwargs)

    def reset_inputs(self, defaults: dict) -> None:
        """Every control back to ``defaults`` (then the line's defaults), following the line again."""
        self._follow = dict.fromkeys(self.FOLLOW_CASE, True)
        for name, value in {**defaults, **self._case_defaults}.items():
            setattr(self, name, value)
            self.controls[name].set_si(value)

    def set_case_defaults(self, defaults: dict) -> None:
        """Defaults that follow the line (SI, by input name); a value the user has set is kept."""
        self._case_defaults = dict(defaults)
        for name, value in self._case_defaults.items():
            if self._follow[name] and getattr(self, name) != value:
                self.controls[name].set_si(value)
                setattr(self, name, value)

    def _control_changed(self, name, value):
        if name in self._follow:
            self._follow[name] = False
        setattr(self, name, value)

    @traitlets.observe("units")
    def _units_changed(self, change):
        if hasattr(self, "controls"):
            for control in self.controls.values():
                control.set_system(change["new"])


def card_html(title: str, value: str, unit: str = "", sub: str = "") -> str:
    """HTML of a result card: title, value with its unit, and a small line below."""
    return (f'<div class="cl-card-title">{html.escape(title)}</div>'
            f'<div class="cl-card-body"><span class="cl-value">{html.escape(value)}</span> '
            f'<span class="cl-unit">{html.escape(unit)}</span></div>'
            f'<div class="cl-card-sub">{html.escape(sub)}</div>')


def card_value_text(card: str) -> str:
    """Plain text of a card's value and unit, e.g. ``"62.6 W/m"`` (what the browser shows)."""
    body = re.search(r'class="cl-value">([^<]*)</span> <span class="cl-unit">([^<]*)<', card)
    return "" if body is None else html.unescape(f"{body.group(1)} {body.group(2)}".strip())
