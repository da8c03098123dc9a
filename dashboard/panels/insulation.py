"""Insulation thickness: surface temperature and heat flow against thickness, with the sizings of convlib.design;
bare valves and flange pairs on the line (convlib.fittings)."""
from __future__ import annotations

import html

import ipywidgets as widgets
import traitlets
from ..compute import FITTINGS_NEED_NPS, PRESSURE_CLASSES, TOUCH_LIMITS, FittingsView, InsulationView
from ..figures import insulation_figure
from .base import Panel, card_html, card_value_text, message_html
from .controls import DESCRIPTION_STYLE, QuantityControl

__all__ = ["InsulationPanel"]

_TOUCH = TOUCH_LIMITS


class InsulationPanel(Panel):
    """Insulation sizing.

    Traits
    ------
    view : InsulationView or None
        Curves and sizings (set by the app).
    applicable : bool
        False for a bare surface (the panel says so).
    surface_limit : float
        Highest jacket temperature [K].
    heat_loss_limit : float
        Highest heat flow [W/m].
    still_air : bool
        Size in still air (worst case) instead of the case's wind (heat loss; touch is always in still air).
    hottest_air_temperature : float or None
        Design hottest ambient of the touch sizing [K]; ``None`` until set: it follows the case's air.
    fittings : FittingsView or None
        Bare valves and flange pairs on the line (set by the app).
    pipe_nps : float or None
        NPS of the line when the line panel sizes it by NPS (set by the app); the bare items need it.
    valves, flange_pairs : int
        Bare valves and bare flange pairs on the line.
    pressure_class : int
        ASME B16.5 class of the flanges and valves (150 or 300).
    """

    view = traitlets.Instance(InsulationView, allow_none=True)
    applicable = traitlets.Bool(True)
    surface_limit = traitlets.Float(TOUCH_LIMITS[0][1])
    heat_loss_limit = traitlets.Float(60.0)
    still_air = traitlets.Bool(True)
    hottest_air_temperature = traitlets.Float(None, allow_none=True)
    fittings = traitlets.Instance(FittingsView, allow_none=True)
    pipe_nps = traitlets.Float(None, allow_none=True)
    valves = traitlets.Int(0)
    flange_pairs = traitlets.Int(0)
    pressure_class = traitlets.Int(PRESSURE_CLASSES[0])

    #: Every setting the sizing and the bare items depend on besides the case.
    SETTINGS = ("surface_limit", "heat_loss_limit", "still_air", "hottest_air_temperature", "valves", "flange_pairs",
                "pressure_class")

    def __init__(self, heat_loss_limit: float = 60.0, **kwargs):
        super().__init__(**kwargs)
        self._default_limit = heat_loss_limit
        self.touch_box = widgets.Dropdown(description="Touch limit", style=DESCRIPTION_STYLE,
                                          layout=widgets.Layout(width="380px"))
        self.limit_control = QuantityControl("heat_loss_limit", heat_loss_limit, self.units, self._limit_changed)
        self.limit_control.box.layout.width = "330px"
        self._hottest_set = False   # False: the hottest ambient follows the case's air
        self.hottest_control = QuantityControl("hottest_air_temperature", 293.15, self.units, self._hottest_changed)
        self.hottest_control.box.layout.width = "330px"
        self.conditions = widgets.ToggleButtons(options=[("still air (worst case)", True), ("the case's wind", False)],
                                                description="Size in", style={**DESCRIPTION_STYLE,
                                                                              "button_width": "150px"})
        traitlets.link((self.conditions, "value"), (self, "still_air"))
        self.touch_box.observe(self._touch_changed, "value")
        self.summary = widgets.HTML()
        self.summary.add_class("cl-table")
        self._fill_touch()
        count = dict(min=0, max=999, step=1, style=DESCRIPTION_STYLE, layout=widgets.Layout(width="260px"))
        self.valve_box = widgets.BoundedIntText(value=0, description="Bare valves", **count)
        self.flange_box = widgets.BoundedIntText(value=0, description="Bare flange pairs", **count)
        self.class_box = widgets.Dropdown(options=[(f"Class {c}", c) for c in PRESSURE_CLASSES],
                                          value=PRESSURE_CLASSES[0], description="Pressure class",
                                          style=DESCRIPTION_STYLE, layout=widgets.Layout(width="290px"))
        for box, name in ((self.valve_box, "valves"), (self.flange_box, "flange_pairs"),
                          (self.class_box, "pressure_class")):
            box.add_class(f"cl-control-{name.replace('_', '-')}")
            traitlets.link((box, "value"), (self, name))
        self.fittings_hint = widgets.HTML()
        self.fittings_hint.add_class("cl-hint")
        self.fittings_card, self.equivalent_card = widgets.HTML(), widgets.HTML()
        for card, key in ((self.fittings_card, "fittings"), (self.equivalent_card, "equivalent-length")):
            card.add_class("cl-card")
            card.add_class(f"cl-card-{key}")
        self.fittings_cards = widgets.HBox([self.fittings_card, self.equivalent_card],
                                           layout=widgets.Layout(flex_flow="row wrap", width="100%"))
        self.fittings_notes = widgets.HTML()
        self.fittings_section = widgets.VBox([
            widgets.HTML('<div class="cl-section">Bare valves and flanges</div>'),
            widgets.HBox([self.valve_box, self.flange_box, self.class_box],
                         layout=widgets.Layout(flex_flow="row wrap")),
            self.fittings_hint, self.fittings_cards, self.fittings_notes],
            layout=widgets.Layout(width="100%"))
        self.children = [widgets.HBox([self.touch_box, self.hottest_control.box, self.limit_control.box],
                                      layout=widgets.Layout(flex_flow="row wrap")),
                         self.conditions, self.message, self.plot_box, self.summary, self.fittings_section]
        self._render_fittings()

    def interactive(self):
        return [self.touch_box, self.hottest_control, self.limit_control, self.conditions, self.valve_box,
                self.flange_box, self.class_box]

    def fittings_text(self) -> tuple[str, str]:
        """Plain texts of the bare items' cards, extra heat and equivalent length (what the browser shows)."""
        return card_value_text(self.fittings_card.value), card_value_text(self.equivalent_card.value)

    @traitlets.observe("fittings", "pipe_nps", "applicable")
    def _render_fittings(self, change=None):
        if not hasattr(self, "fittings_card"):
            return
        off = "" if self.pipe_nps is not None else FITTINGS_NEED_NPS
        f = self.fittings
        if not off and f is not None and f.off and f.nps == self.pipe_nps:
            off = f.off
        if not self.busy:  # freeze()/unfreeze() own the controls during long work
            for box in (self.valve_box, self.flange_box, self.class_box):
                box.disabled = bool(off)
        self.fittings_hint.value = html.escape(f"Off: {off}.") if off else html.escape(
            "Each item at the fluid temperature, bare steel (ε 0.9); flange and valve sizes of ASME B16.5 and "
            "B16.10 (convlib.fittings).")
        self.fittings_cards.layout.display = "none" if off or f is None else None
        self.fittings_notes.value = ""
        if off or f is None:
            return
        d = self.display
        self.fittings_card.value = card_html(
            "Extra heat, bare items", d.number(f.extra_heat, "fitting_heat"), d.label("fitting_heat"),
            f"valve {d.text(f.valve_extra_heat, 'fitting_heat')} · flange pair "
            f"{d.text(f.flange_extra_heat, 'fitting_heat')}")
        self.equivalent_card.value = card_html(
            "Equivalent line", d.number(f.equivalent_length, "equivalent_length"), d.label("equivalent_length"),
            f"valve {d.text(f.valve_equivalent_length, 'equivalent_length')} · flange pair "
            f"{d.text(f.flange_equivalent_length, 'equivalent_length')}")
        cautions = [n for n in f.notes if n.startswith("Caution")]
        self.fittings_notes.value = message_html([n for n in f.notes if n not in cautions], "info", d) + \
            message_html(cautions, "caution", d)

    def reset(self):
        super().reset()
        self.surface_limit = TOUCH_LIMITS[0][1]
        self.heat_loss_limit = self._default_limit
        self.still_air = True
        self.valves = self.flange_pairs = 0
        self.pressure_class = PRESSURE_CLASSES[0]
        self._hottest_set = False
        self.hottest_air_temperature = None
        self.limit_control.set_si(self._default_limit)
        self._fill_touch()

    def _limit_changed(self, name, value):
        self.heat_loss_limit = value

    def _hottest_changed(self, name, value):
        self._hottest_set = True
        self.hottest_air_temperature = value

    def set_case_defaults(self, defaults: dict) -> None:
        """Default the design hottest ambient (``defaults["hottest_air_temperature"]`` [K], the case's air)
        until the user sets it."""
        air = defaults.get("hottest_air_temperature")
        if air is not None and not self._hottest_set:
            self.hottest_control.set_si(air)
            self.hottest_air_temperature = float(air)

    def _touch_changed(self, change):
        if change["new"] is not None:
            self.surface_limit = change["new"]

    def _fill_touch(self):
        d = self.display
        keep = self.surface_limit
        self.touch_box.options = [(f"{label}, {d.text(value, 'surface_temperature')}", value)
                                  for label, value in _TOUCH]
        self.touch_box.value = min((v for _, v in _TOUCH), key=lambda v: abs(v - keep))

    @traitlets.observe("units")
    def _units_changed(self, change):
        if hasattr(self, "limit_control"):
            self.limit_control.set_system(change["new"])
            self.hottest_control.set_system(change["new"])
            self._fill_touch()
            self._render_fittings()

    @traitlets.observe("view", "units", "applicable")
    def _render(self, change=None):
        if not self.applicable:
            self.set_message("Insulation sizing applies to an insulated line: choose “insulated line” as the kind.")
            return
        v = self.view
        if v is None:
            return
        d = self.display
        self.show_figure(insulation_figure(v, d))
        rows, notes = [], []
        for s in v.sizings:
            quantity = "q_per_length" if s.name == "heat loss" else "surface_temperature"
            need = "not achievable" if s.required is None else d.text(s.required, "insulation_thickness")
            listed = "–" if s.commercial is None else d.text(s.commercial, "insulation_thickness")
            rows.append(f"<tr><td>{html.escape(s.name)}</td><td>{html.escape(d.text(s.limit, quantity))}</td>"
                        f"<td>{html.escape(need)}</td><td>{html.escape(listed)}</td></tr>")
            notes += [*s.messages]
        touch = [s for s in v.sizings if s.name == "touch"]
        if touch:
            t = touch[0]
            still = "still air" if t.wind_speed == 0 else d.text(t.wind_speed, "wind_speed")
            notes_touch = (f"Touch sized at: hottest air {d.text(t.air_temperature, 'air_temperature')}, {still}, "
                           f"jacket ε {t.jacket_emissivity:.2f}, limit {d.text(t.limit, 'surface_temperature')}.")
        critical = ("none" if v.critical <= 0 else d.text(v.critical, "insulation_thickness"))
        cautions = [c for s in v.sizings for c in s.cautions]
        self.summary.value = (
            "<table><tr><th>Limit</th><th>Value</th><th>Thickness that meets it</th><th>Next listed thickness</th>"
            "</tr>" + "".join(rows) + f"</table><p>Critical thickness: {html.escape(critical)}. "
            f"Current thickness: {html.escape(d.text(v.current_thickness, 'insulation_thickness'))}.</p>"
            + (f"<p class='cl-assumptions'>{html.escape(notes_touch)}</p>" if touch else "")
            + message_html(notes, "warning", self.display) + message_html(cautions, "caution", self.display))
        self.set_message()
