"""A line in operation: temperature along the flowing line, tracing duty and freeze time (convlib.operation),
cool-down of the stopped line and warm-up condensate (convlib.transients)."""
from __future__ import annotations

import html

import ipywidgets as widgets
import numpy as np
import plotly.graph_objects as go
import traitlets
from .. import settings
from ..compute import (CAUTION_COOL_DOWN, CAUTION_FREEZE, CAUTION_TRACING, CAUTION_WARM_UP, TRACING_MARGIN,
                       COOL_DOWN_STEAM, OperationInputs, OperationView, TransientView)
from ..display import Display
from ..figures import TEMPLATE, operation_profile_figure, operation_sweep_figure
from .base import InputsPanel, figure_widget, message_html, sync_figure, card_html, card_value_text
from .controls import DESCRIPTION_STYLE, QuantityControl

__all__ = ["OperationPanel", "NOT_APPLICABLE"]

NOT_APPLICABLE = ("This panel is for insulated lines with a known fluid temperature: choose “insulated line” as "
                  "the kind.")

#: Controls of the panel: trait name -> group title.
_GROUPS = (
    ("Flow", ("mass_flow", "fluid_pressure")),
    ("Tracing", ("maintain_temperature", "design_air_temperature", "design_wind_speed", "tracing_margin")),
    ("Flow stopped", ("initial_temperature", "pipe_wall_thickness")),
    ("Cool-down and warm-up", ("cool_to_temperature", "warm_up_pressure", "warm_up_time")),
)
#: Controls whose default follows the case until the user changes them.
_FOLLOW_CASE = ("design_air_temperature", "pipe_wall_thickness", "cool_to_temperature", "warm_up_pressure")
_CARDS = ("outlet_temperature", "condensate", "line_loss", "tracing_per_length", "time_to_freezing_point",
          "time_to_frozen", "cool_down", "warm_up")


#: Why a steam line has no cool-down time (:func:`dashboard.compute.transient_view`).
_COOL_DOWN_STEAM = COOL_DOWN_STEAM
#: Cool-down's final temperature before the line gives its own (halfway from the fluid to the air) [K].
_COOL_TO = 333.15


def _defaults() -> dict:
    o = settings.OPERATION
    return {"mass_flow": o["mass_flow"], "fluid_pressure": o["fluid_pressure"],
            "maintain_temperature": o["maintain_temperature"], "design_air_temperature": 253.15,
            "design_wind_speed": o["design_wind_speed"], "tracing_margin": TRACING_MARGIN,
            "initial_temperature": o["initial_temperature"], "pipe_wall_thickness": o["pipe_wall_thickness"],
            "cool_to_temperature": _COOL_TO, "warm_up_pressure": o["fluid_pressure"],
            "warm_up_time": o["warm_up_time"]}


class OperationPanel(InputsPanel):
    """The line in operation.

    Traits
    ------
    view : OperationView or None
        Results (set by the app).
    transients : TransientView or None
        Cool-down and warm-up of the line (set by the app).
    applicable : bool
        False for a bare surface (the panel says so instead of results).
    sweep_input : str
        Input of the sweeps (key of :data:`dashboard.settings.OPERATION_SWEEPS`).
    mass_flow, fluid_pressure, maintain_temperature, design_air_temperature, design_wind_speed,
    tracing_margin, initial_temperature, pipe_wall_thickness, cool_to_temperature, warm_up_pressure,
    warm_up_time : float
        Inputs [SI], as in :class:`dashboard.compute.OperationInputs`.
    service : str
        What the line carries, a key of :data:`dashboard.settings.OPERATION_SERVICES`.
    """

    view = traitlets.Instance(OperationView, allow_none=True)
    transients = traitlets.Instance(TransientView, allow_none=True)
    applicable = traitlets.Bool(True)
    sweep_input = traitlets.Unicode("wind_speed")
    mass_flow = traitlets.Float(settings.OPERATION["mass_flow"])
    fluid_pressure = traitlets.Float(settings.OPERATION["fluid_pressure"])
    maintain_temperature = traitlets.Float(settings.OPERATION["maintain_temperature"])
    design_air_temperature = traitlets.Float(253.15)
    design_wind_speed = traitlets.Float(settings.OPERATION["design_wind_speed"])
    tracing_margin = traitlets.Float(TRACING_MARGIN)
    initial_temperature = traitlets.Float(settings.OPERATION["initial_temperature"])
    pipe_wall_thickness = traitlets.Float(settings.OPERATION["pipe_wall_thickness"])
    cool_to_temperature = traitlets.Float(_COOL_TO)
    warm_up_pressure = traitlets.Float(settings.OPERATION["fluid_pressure"])
    warm_up_time = traitlets.Float(settings.OPERATION["warm_up_time"])
    service = traitlets.Unicode("water")

    INPUTS = tuple(name for _, names in _GROUPS for name in names)
    FOLLOW_CASE = _FOLLOW_CASE
    #: Every setting the app listens to (the numeric inputs, the service and the sweep).
    SETTINGS = (*INPUTS, "service", "sweep_input")

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.controls = {name: QuantityControl(name, getattr(self, name), self.units, self._control_changed)
                         for name in self.INPUTS}
        self.service_box = widgets.ToggleButtons(options=[(label, key) for key, label in
                                                          settings.OPERATION_SERVICES.items()],
                                                 value=self.service, description="Carries", style=DESCRIPTION_STYLE)
        self.service_box.add_class("cl-operation-service")
        traitlets.link((self.service_box, "value"), (self, "service"))
        columns = []
        for title, names in _GROUPS:
            head = widgets.HTML(f'<div class="cl-section">{html.escape(title)}</div>')
            extra = [self.service_box] if title == "Flow" else []
            columns.append(widgets.VBox([head, *extra, *(self.controls[n].box for n in names)],
                                        layout=widgets.Layout(width="400px", margin="0 12px 0 0")))
        self.length_note = widgets.HTML()
        self.length_note.add_class("cl-hint")
        self.inputs_box = widgets.HBox(columns, layout=widgets.Layout(flex_flow="row wrap"))
        self.cards = {key: widgets.HTML() for key in _CARDS}
        for key, card in self.cards.items():
            card.add_class("cl-card")
            card.add_class(f"cl-card-{key.replace('_', '-')}")
        self.card_row = widgets.HBox(list(self.cards.values()), layout=widgets.Layout(flex_flow="row wrap",
                                                                                      width="100%"))
        self.sweep_box = widgets.Dropdown(options=[(v[0], k) for k, v in settings.OPERATION_SWEEPS.items()],
                                          value=self.sweep_input, description="Sweep against",
                                          style=DESCRIPTION_STYLE, layout=widgets.Layout(width="400px"))
        traitlets.link((self.sweep_box, "value"), (self, "sweep_input"))
        self.sweep_plot: go.FigureWidget | None = None
        self.sweep_plot_box = widgets.Box(layout=widgets.Layout(width="100%", min_height="60px"))
        self.notes = widgets.HTML()
        self.site = widgets.HTML()
        self.results = widgets.VBox([self.card_row, self.length_note, self.notes, self.plot_box, self.sweep_box,
                                     self.sweep_plot_box, self.site], layout=widgets.Layout(width="100%"))
        self.children = [self.inputs_box, self.message, self.results]

    # ------------------------------------------------------------------ interface
    def interactive(self):
        return [*self.controls.values(), self.service_box, self.sweep_box]

    def inputs(self) -> OperationInputs:
        """The panel's inputs [SI]."""
        return OperationInputs(**{name: getattr(self, name) for name in self.INPUTS}, service=self.service)

    def reset(self):
        super().reset()
        with self.hold_trait_notifications():
            self.reset_inputs(_defaults())
            self.sweep_input = "wind_speed"
            self.service = "water"

    # ------------------------------------------------------------------ cards
    def _card(self, key: str, title: str, value: str, unit: str = "", sub: str = "") -> None:
        self.cards[key].value = card_html(title, value, unit, sub)

    def card_text(self, key: str) -> str:
        """Plain text of a card's value and unit (what the browser shows)."""
        return card_value_text(self.cards[key].value)


    def _render_cards(self, v: OperationView) -> None:
        d = self.display
        steam = v.inputs.service == "steam"
        self.cards["outlet_temperature"].layout.display = "none" if steam else None
        self.cards["condensate"].layout.display = None if steam else "none"
        if steam:
            self._card("condensate", "Condensate", d.number(v.condensate_rate, "condensate_rate"),
                       d.label("condensate_rate"), f"steam at {d.text(v.outlet_temperature, 'fluid_temperature')}")
        else:
            drop = v.inlet_temperature - v.outlet_temperature
            self._card("outlet_temperature", "Outlet", d.number(v.outlet_temperature, "outlet_temperature"),
                       d.label("outlet_temperature"),
                       f"{'drop' if drop >= 0 else 'rise'} {d.text(abs(drop), 'temperature_drop')} from the inlet")
        self._card("line_loss", "Lost along the line" if v.q_total >= 0 else "Gained along the line",
                   d.number(abs(v.q_total), "line_loss"), d.label("line_loss"),
                   f"over {d.text(v.length, 'length')}")
        self._card("tracing_per_length", "Tracing duty", d.number(v.tracing_per_length, "tracing_per_length"),
                   d.label("tracing_per_length"), f"total {d.text(v.tracing_total, 'tracing_total')}")
        zero = d.text(273.15, "air_temperature", 0)
        if v.never_freezes:
            for key, title in (("time_to_freezing_point", f"Stopped: to {zero}"), ("time_to_frozen", "Frozen solid")):
                self._card(key, title, "never", "", "settles above the freezing point")
        else:
            self._card("time_to_freezing_point", f"Stopped: to {zero}",
                       d.number(v.time_to_freezing_point, "freeze_time"), d.label("freeze_time"),
                       f"water from {d.text(v.inputs.initial_temperature, 'initial_temperature')}")
            self._card("time_to_frozen", "Frozen solid", d.number(v.time_to_frozen, "freeze_time"),
                       d.label("freeze_time"),
                       "after the flow stops")

    def _render_transients(self, t: TransientView) -> None:
        d = self.display
        if np.isfinite(t.cool_down_time):
            value, unit, sub = (d.number(t.cool_down_time, "cool_down_time"), d.label("cool_down_time"),
                                f"from {d.text(t.initial_temperature, 'fluid_temperature')}, no flow")
        elif np.isinf(t.cool_down_time):
            value, unit, sub = "never", "", "settles before it (surroundings)"
        else:
            value, unit, sub = "–", "", ("liquid-filled lines only" if t.cool_down_note == _COOL_DOWN_STEAM
                                         else "see the note below")
        self._card("cool_down", f"Stopped: to {d.text(t.cool_to_temperature, 'cool_to_temperature')}", value, unit,
                   sub)
        if np.isfinite(t.warm_up_condensate):
            self._card("warm_up", "Warm-up condensate", d.number(t.warm_up_condensate, "warm_up_condensate"),
                       d.label("warm_up_condensate"),
                       f"mean {d.text(t.mean_condensate_rate, 'condensate_rate')} over "
                       f"{d.text(t.warm_up_time, 'warm_up_time')}")
        else:
            self._card("warm_up", "Warm-up condensate", "–", "", "see the note below")

    def _transient_notes(self) -> str:
        t, d = self.transients, self.display
        if t is None:
            return ""
        reasons = [f"{what}: {note}" for what, note in (("Cool-down", t.cool_down_note), ("Warm-up", t.warm_up_note))
                   if note and note != _COOL_DOWN_STEAM]
        assumptions = (f"Cool-down and warm-up: the line stops at {d.text(t.initial_temperature, 'fluid_temperature')} in "
                       f"the case's air and wind; warm-up from {d.text(t.start_temperature, 'air_temperature')} with "
                       f"steam at {d.text(t.steam_pressure, 'warm_up_pressure')} abs. "
                       f"({d.text(t.saturation_temperature, 'fluid_temperature')}), half the running loss counted.")
        return (f'<div class="cl-hint">{html.escape(assumptions)}</div>' + message_html(reasons, "warning", d)
                + message_html([*t.notes], "warning", d))

    @traitlets.observe("transients")
    def _transients_changed(self, change=None):
        if hasattr(self, "results") and self.applicable and self.transients is not None:
            self._render_transients(self.transients)
            if self.view is not None:
                self._render_notes(self.view)

    def _render_notes(self, v: OperationView) -> None:
        d = self.display
        cautions = (*(v.cautions or (CAUTION_FREEZE, CAUTION_TRACING)),
                    *(self.transients.cautions if self.transients is not None else (CAUTION_COOL_DOWN,
                                                                                    CAUTION_WARM_UP)))
        self.notes.value = (message_html(v.notes, "warning", d) + self._transient_notes()
                            + message_html(tuple(dict.fromkeys(cautions)), "caution", d))

    # ------------------------------------------------------------------ rendering
    def _show_sweep_figure(self, fig: go.Figure) -> None:
        if fig.layout.width is None:
            fig.update_layout(width=settings.FIGURE_WIDTH)
        if self.sweep_plot is None:
            self.sweep_plot = figure_widget(data=fig.data, layout={**fig.layout.to_plotly_json(),
                                                                   "template": TEMPLATE})
            self.sweep_plot.add_class("cl-plot")
            self.sweep_plot_box.children = (self.sweep_plot,)
        else:
            sync_figure(self.sweep_plot, fig)

    @traitlets.observe("view", "units", "applicable")
    def _render(self, change=None):
        if not hasattr(self, "results"):
            return
        self.results.layout.display = None if self.applicable else "none"
        self.inputs_box.layout.display = None if self.applicable else "none"
        if not self.applicable:
            self.set_message(NOT_APPLICABLE)
            return
        v = self.view
        if v is None:
            return
        d = self.display
        self._render_cards(v)
        self.controls["mass_flow"].box.layout.display = "none" if v.inputs.service == "steam" else None
        carries = ("saturated steam at " if v.inputs.service == "steam" else "inlet ") + d.text(
            v.inlet_temperature, "fluid_temperature")
        self.length_note.value = (f"Line: {html.escape(d.text(v.length, 'length'))} (the case's run length), "
                                  f"{html.escape(carries)}. Tracing and freeze: coldest air, strongest wind, no sun.")
        self.show_figure(operation_profile_figure(v, d))
        self._show_sweep_figure(operation_sweep_figure(v, d))
        if self.transients is not None:
            self._render_transients(self.transients)
        self._render_notes(v)
        self.site.value = _site_table(v.site_rows, d)
        self.set_message()


def _site_table(rows, display: Display | None = None) -> str:
    """The demo site's lines in operation as short lines (numbers from convlib.demo) in the unit system of
    ``display`` (SI: the texts of convlib.demo, as the command line prints them)."""
    if not rows:
        return ""
    display = display or Display("SI")

    def texts(r):
        if display.system == "SI" or "values" not in r:
            return r["what"], r["result"]
        return display.fill(r["what_template"], r["values"]), display.fill(r["result_template"], r["values"])

    body = "".join(f"<div><b>{html.escape(r['tag'])}</b> &middot; {html.escape(what)}: {html.escape(result)}</div>"
                   for r in rows for what, result in (texts(r),))
    return f'<div class="cl-section">Demo site in operation</div><div class="cl-hint">{body}</div>'
