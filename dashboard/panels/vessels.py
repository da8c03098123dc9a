"""Tanks and ducts: heat flow face by face and against one input (convlib.vessels)."""
from __future__ import annotations

import html

import ipywidgets as widgets
import numpy as np
import traitlets

from .. import settings
from ..compute import VesselInputs, VesselView
from ..figures import vessel_figure
from .base import InputsPanel, card_html, card_value_text, message_html
from .controls import DESCRIPTION_STYLE, QuantityControl

__all__ = ["VesselPanel"]

#: Numeric controls per shape (the others are hidden).
_SIZES = {"vertical_tank": ("vessel_diameter", "vessel_height"),
          "horizontal_tank": ("vessel_diameter", "vessel_length"), "sphere": ("vessel_diameter",),
          "duct": ("duct_width", "duct_height", "duct_length")}
#: Every size control, in screen order.
_ALL_SIZES = ("vessel_diameter", "vessel_height", "vessel_length", "duct_width", "duct_height", "duct_length")
#: Choices shown only for one shape: choice -> shape.
_CHOICE_FOR = {"floor": "vertical_tank", "heads": "horizontal_tank", "wind_direction": "duct"}
_NUMERIC = ("vessel_diameter", "vessel_height", "vessel_length", "duct_width", "duct_height", "duct_length",
            "contents_temperature", "vessel_insulation", "vessel_insulation_k")
#: Controls whose default follows the line until the user changes them.
_FOLLOW_CASE = ("contents_temperature", "vessel_insulation", "vessel_insulation_k")
_MAX_FACES = 3


class VesselPanel(InputsPanel):
    """A vertical or horizontal tank, a sphere or a rectangular duct beside the line, at the line's air, wind and
    emissivity.

    Traits
    ------
    view : VesselView or None
        Results (set by the app).
    shape, floor, heads, wind_direction, sweep_input : str
        Keys of :data:`dashboard.settings.VESSEL_SHAPES`, ``VESSEL_FLOORS``, ``VESSEL_HEADS``, ``VESSEL_WIND``,
        ``VESSEL_SWEEPS``.
    vessel_diameter, vessel_height, vessel_length, duct_width, duct_height, duct_length, contents_temperature,
    vessel_insulation, vessel_insulation_k : float
        Inputs [SI], as in :class:`dashboard.compute.VesselInputs`.
    hottest_air_temperature : float
        Design hottest air of the touch sizing [K] (hot contents); follows the line's air until set.
    """

    view = traitlets.Instance(VesselView, allow_none=True)
    shape = traitlets.Unicode(settings.VESSEL["shape"])
    floor = traitlets.Unicode(settings.VESSEL["floor"])
    heads = traitlets.Unicode(settings.VESSEL["heads"])
    wind_direction = traitlets.Unicode(settings.VESSEL["wind_direction"])
    sweep_input = traitlets.Unicode("vessel_insulation")
    vessel_diameter = traitlets.Float(settings.VESSEL["vessel_diameter"])
    vessel_height = traitlets.Float(settings.VESSEL["vessel_height"])
    vessel_length = traitlets.Float(settings.VESSEL["vessel_length"])
    duct_width = traitlets.Float(settings.VESSEL["duct_width"])
    duct_height = traitlets.Float(settings.VESSEL["duct_height"])
    duct_length = traitlets.Float(settings.VESSEL["duct_length"])
    contents_temperature = traitlets.Float(353.15)
    vessel_insulation = traitlets.Float(settings.VESSEL["vessel_insulation"])
    vessel_insulation_k = traitlets.Float(settings.VESSEL["vessel_insulation_k"])
    hottest_air_temperature = traitlets.Float(293.15)

    #: Every setting the numbers depend on besides the case.
    SETTINGS = ("shape", "floor", "heads", "wind_direction", "sweep_input", *_NUMERIC, "hottest_air_temperature")
    FOLLOW_CASE = (*_FOLLOW_CASE, "hottest_air_temperature")

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.controls = {name: QuantityControl(name, getattr(self, name), self.units, self._control_changed)
                         for name in (*_NUMERIC, "hottest_air_temperature")}
        hottest = self.controls["hottest_air_temperature"]
        hottest.box.layout.width = "330px"
        hottest.box.add_class("cl-vessel-hottest")
        self.choices = {}
        for name, options, label in (("shape", settings.VESSEL_SHAPES, "What"),
                                     ("floor", settings.VESSEL_FLOORS, "Floor"),
                                     ("heads", settings.VESSEL_HEADS, "Heads"),
                                     ("wind_direction", settings.VESSEL_WIND, "Wind"),
                                     ("sweep_input", {k: v[0] for k, v in settings.VESSEL_SWEEPS.items()},
                                      "Sweep against")):
            box = widgets.Dropdown(options=[(text, key) for key, text in options.items()], value=getattr(self, name),
                                   description=label, style=DESCRIPTION_STYLE, layout=widgets.Layout(width="400px"))
            box.add_class(f"cl-vessel-{name.replace('_', '-')}")
            traitlets.link((box, "value"), (self, name))
            self.choices[name] = box
        size = widgets.VBox([widgets.HTML('<div class="cl-section">Size</div>'), self.choices["shape"],
                             *(self.controls[n].box for n in _ALL_SIZES),
                             *(self.choices[n] for n in _CHOICE_FOR)],
                            layout=widgets.Layout(width="400px", margin="0 12px 0 0"))
        contents = widgets.VBox([widgets.HTML('<div class="cl-section">Contents and insulation</div>'),
                                 *(self.controls[n].box for n in _FOLLOW_CASE)],
                                layout=widgets.Layout(width="400px"))
        self.inputs_box = widgets.HBox([size, contents], layout=widgets.Layout(flex_flow="row wrap"))
        self.hint = widgets.HTML()
        self.hint.add_class("cl-hint")
        self.cards = [widgets.HTML() for _ in range(_MAX_FACES + 1)]
        for k, card in enumerate(self.cards):
            card.add_class("cl-card")
            card.add_class("cl-card-vessel-total" if k == 0 else f"cl-card-vessel-face-{k}")
        self.card_row = widgets.HBox(self.cards, layout=widgets.Layout(flex_flow="row wrap", width="100%"))
        self.notes = widgets.HTML(layout=widgets.Layout(flex="1 1 300px"))
        # the touch sizing's design hottest air, beside its result (the first line of the notes)
        self.sizing_row = widgets.HBox([hottest.box, self.notes],
                                       layout=widgets.Layout(flex_flow="row wrap", width="100%",
                                                             align_items="flex-start"))
        self.children = [self.inputs_box, self.message, self.card_row, self.hint, self.sizing_row,
                         self.choices["sweep_input"], self.plot_box]
        self._show_shape_controls()

    # ------------------------------------------------------------------ interface
    def interactive(self):
        return [*self.controls.values(), *self.choices.values()]

    def inputs(self) -> VesselInputs:
        """The panel's inputs [SI] (the touch sizing's hottest air is :attr:`hottest_air_temperature`)."""
        return VesselInputs(shape=self.shape, floor=self.floor, heads=self.heads, wind_direction=self.wind_direction,
                            **{name: getattr(self, name) for name in _NUMERIC})

    def reset(self):
        super().reset()
        with self.hold_trait_notifications():
            self.reset_inputs({name: settings.VESSEL[name] for name in _NUMERIC if name in settings.VESSEL})
            for name in ("shape", "floor", "heads", "wind_direction"):
                setattr(self, name, settings.VESSEL[name])
            self.sweep_input = "vessel_insulation"

    def card_text(self, index: int) -> str:
        """Plain text of a card's value and unit (0: the total, then the faces in order)."""
        return card_value_text(self.cards[index].value)

    @traitlets.observe("shape")
    def _shape_changed(self, change):
        if hasattr(self, "controls"):
            self._show_shape_controls()

    def _show_shape_controls(self):
        shown = set(_SIZES[self.shape])
        for name in _ALL_SIZES:
            self.controls[name].box.layout.display = None if name in shown else "none"
        for name, shape in _CHOICE_FOR.items():
            self.choices[name].layout.display = None if self.shape == shape else "none"

    def _sizing_text(self, v: VesselView) -> str:
        """One line: the insulation each face needs for the touch limit (hot) or against condensation (cold)."""
        if not v.sizing:
            return ""
        d = self.display
        hot = v.inputs.contents_temperature >= v.air_temperature
        limit = d.text(v.sizing_limit, "surface_temperature")
        what = (f"to keep the jacket at or below {limit} (touch)" if hot else
                f"to keep the jacket at or above {limit} (dew point + margin)")
        air = v.sizing[0].air_temperature
        air = v.air_temperature if np.isnan(air) else air
        where = f"in still air at {'hottest air ' if hot else 'air '}{d.text(air, 'air_temperature')}"
        parts = []
        for f in v.sizing:
            if np.isnan(f.required):
                parts.append(f"{f.face} not reachable")
            elif np.isnan(f.commercial):
                parts.append(f"{f.face} {d.text(f.required, 'vessel_insulation')} (beyond the listed thicknesses)")
            else:
                parts.append(f"{f.face} {d.text(f.required, 'vessel_insulation')} "
                             f"(listed {d.text(f.commercial, 'vessel_insulation')})")
        return f"Insulation of this k {what}, {where}: " + "; ".join(parts)

    # ------------------------------------------------------------------ rendering
    @traitlets.observe("view", "units")
    def _render(self, change=None):
        v = self.view
        if v is None or not hasattr(self, "cards"):
            return
        d = self.display
        flow = "Loss" if v.q_total >= 0 else "Gain"
        self.cards[0].value = card_html(f"{flow}, all faces", d.number(abs(v.q_total), "face_loss"),
                                        d.label("face_loss"), f"over {d.text(v.area, 'face_area')}")
        for k, card in enumerate(self.cards[1:]):
            if k < len(v.faces):
                f = v.faces[k]
                card.value = card_html(f["name"], d.number(f["q_total"], "face_loss"), d.label("face_loss"),
                                       f"surface {d.text(f['surface_temperature'], 'surface_temperature')}")
                card.layout.display = None
            else:
                card.value, card.layout.display = "", "none"
        bare_floor = v.inputs.shape == "vertical_tank" and v.inputs.floor == "ground"
        self.hint.value = html.escape(
            f"At the line's air ({d.text(v.air_temperature, 'air_temperature')}), wind "
            f"({d.text(v.wind_speed, 'wind_speed')}), emissivity and sky ({'outdoors' if v.outdoor else 'indoors'}); "
            f"the insulation on every exposed face" + ("; the floor on the ground has none, and the soil is at the "
                                                       "air temperature." if bare_floor else "."))
        d = self.display
        hot = v.inputs.contents_temperature >= v.air_temperature
        self.controls["hottest_air_temperature"].show(hot)
        self.notes.value = message_html([self._sizing_text(v)], "info", d) + message_html(v.notes, "info", d) + \
            message_html(v.cautions, "caution", d)
        self.show_figure(vessel_figure(v, d))
        self.set_message()
