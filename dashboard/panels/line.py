"""The line under study: every input of the base case, and the result cards."""
from __future__ import annotations

import html
from fractions import Fraction

import ipywidgets as widgets
import traitlets
from pydantic import ValidationError

from .. import settings
from ..display import law_name, regime_text, scientific, shape_name
from ..compute import (SHAPES, SIZE_SYSTEMS, CaseSpec, CaseSummary, insulation_materials, law_keys,
                       material_source, size_grades, standard_sizes)
from .base import Panel, message_html, card_html, card_value_text
from .controls import DESCRIPTION_STYLE, QuantityControl

__all__ = ["LinePanel", "nps_label", "size_label", "validation_text"]

_NUMERIC = ("diameter", "length", "height", "width", "surface_temperature", "fluid_temperature",
            "insulation_thickness", "insulation_conductivity", "air_temperature", "surroundings_temperature",
            "wind_speed", "emissivity", "sky_view_fraction", "solar_irradiance", "relative_humidity", "pressure")


def _wide() -> widgets.Layout:
    """A full-width layout of its own: widgets must not share a Layout (hiding one would hide them all)."""
    return widgets.Layout(width="100%")

#: Dropdown value meaning "the shape's default law" (CaseSpec ``None``).
DEFAULT_LAW = "(default)"
#: Insulation menu value meaning "the typed constant k" (CaseSpec ``insulation_material`` None).
CONSTANT_K = ""


def nps_label(nps: float) -> str:
    """``1.5`` -> ``"NPS 1 1/2"``.

    >>> nps_label(0.75), nps_label(6.0), nps_label(2.5)
    ('NPS 3/4', 'NPS 6', 'NPS 2 1/2')
    """
    whole, part = int(nps), Fraction(nps - int(nps)).limit_denominator(16)
    text = " ".join(p for p in (str(whole) if whole else "", str(part) if part else "") if p)
    return f"NPS {text or '0'}"


def size_label(system: str, key: float, outer_diameter: float, display) -> str:
    """Name of a standard size in the size list, with its outside diameter in the unit system of ``display``.

    >>> from dashboard.display import Display
    >>> size_label("dn", 100, 0.1143, Display("SI")), size_label("copper_en", 22.0, 0.022, Display("US"))
    ('DN 100 · 114.3 mm', 'Cu 22 mm · 0.8661 in')
    >>> size_label("copper_astm", 0.75, 0.022225, Display("US"))
    'Cu 3/4 · 0.8750 in'
    """
    od = display.text(outer_diameter, "diameter")
    if system == "nps":
        name = nps_label(key)
    elif system == "dn":
        name = f"DN {key:g}"
    elif system == "copper_en":
        name = f"Cu {key:g} mm"
        if display.system == "SI":
            return name
    else:
        name = "Cu " + nps_label(key).removeprefix("NPS ")
    return f"{name} · {od}"


def validation_text(exc: Exception) -> str:
    """Readable text of a CaseSpec validation error (field and message, no traceback)."""
    if isinstance(exc, ValidationError):
        parts = []
        for err in exc.errors():
            where = ".".join(str(p) for p in err.get("loc", ()) if p != "__root__")
            msg = str(err.get("msg", "")).removeprefix("Value error, ")
            parts.append(f"{where}: {msg}" if where else msg)
        return "; ".join(parts)
    return str(exc)


def _default_value(case: CaseSpec, name: str) -> float:
    value = getattr(case, name, None)
    if value is not None:
        return float(value)
    fallback = {"surface_temperature": 353.15, "fluid_temperature": 433.15, "height": 1.0, "width": 1.0,
                "surroundings_temperature": case.air_temperature, "length": 1.0}
    return fallback[name]


class LinePanel(Panel):
    """Inputs of the base case and the result cards.

    Traits
    ------
    case : CaseSpec
        The validated case the controls describe (set by the panel; the app observes it).
    summary : CaseSummary or None
        Numbers for the result cards (set by the app).
    error : str
        Why the controls do not make a valid case ("" when they do).
    pipe_size : tuple
        ``(nps, schedule)`` of the line, ``nps`` None unless sized by NPS (set by the panel).
    opened : tuple
        ``(serial, StudySpec)``: a study whose case to show in every control (an opened snapshot; the panel
        then publishes it).
    """

    case = traitlets.Instance(CaseSpec)
    pipe_size = traitlets.Tuple((None, settings.DEFAULT_SCHEDULE))
    opened = traitlets.Tuple((0, None))
    summary = traitlets.Instance(CaseSummary, allow_none=True)
    error = traitlets.Unicode("")

    def __init__(self, case: CaseSpec, **kwargs):
        self._initial = case
        self._base = case
        self._quiet = False
        system = kwargs.pop("units", settings.DEFAULT_UNIT_SYSTEM)
        super().__init__(**kwargs)
        self.units = system
        c = {n: QuantityControl(n, _default_value(case, n), system, self._numeric_changed) for n in _NUMERIC}
        self.controls = c
        self.kind = widgets.RadioButtons(options=[("bare surface at a known temperature", "bare"),
                                                  ("insulated line with a known fluid temperature", "insulated")],
                                         description="Kind", style=DESCRIPTION_STYLE, layout=_wide())
        self.shape = widgets.Dropdown(options=[(shape_name(s), s) for s in SHAPES], description="Shape",
                                      style=DESCRIPTION_STYLE, layout=_wide())
        self.size_mode = widgets.ToggleButtons(options=[("by value", "value"), ("standard size", "nps")],
                                               style={"button_width": "140px"})
        self.size_system = widgets.Dropdown(options=[(name, key) for key, (name, _) in SIZE_SYSTEMS.items()],
                                            value="nps", description="Size system", style=DESCRIPTION_STYLE,
                                            layout=_wide())
        self.size_system.add_class("cl-control-size-system")
        self.schedule = widgets.Dropdown(options=list(size_grades("nps")), value=settings.DEFAULT_SCHEDULE,
                                         description="Schedule", style=DESCRIPTION_STYLE, layout=_wide())
        self.nps = widgets.Dropdown(description="Pipe size", style=DESCRIPTION_STYLE, layout=_wide())
        self.same_surroundings = widgets.Checkbox(description="surroundings at the air temperature",
                                                  indent=False, layout=_wide())
        self.sky = widgets.ToggleButtons(options=[("indoors", "indoors"), ("outdoors", "outdoors")],
                                         style={"button_width": "140px"})
        # "" stands for the typed constant k: a Dropdown shows nothing for a None value
        self.material = widgets.Dropdown(options=[("constant k (typed below)", CONSTANT_K), *insulation_materials()],
                                         value=CONSTANT_K, description="Insulation", style=DESCRIPTION_STYLE,
                                         layout=_wide())
        self.material.add_class("cl-control-material")
        self.material_hint = widgets.HTML()
        self.material_hint.add_class("cl-hint")
        self.natural = widgets.Dropdown(description="Natural law", style=DESCRIPTION_STYLE, layout=_wide())
        self.forced = widgets.Dropdown(description="Forced law", style=DESCRIPTION_STYLE, layout=_wide())
        for w in (self.kind, self.shape, self.size_mode, self.size_system, self.schedule, self.nps,
                  self.same_surroundings, self.sky, self.natural, self.forced, self.material):
            w.observe(self._choice_changed, "value")
        self.kind.add_class("cl-control-kind")
        head = lambda text: widgets.HTML(f'<div class="cl-section">{text}</div>')  # noqa: E731
        self.inputs = widgets.VBox([
            head("Line"), self.kind, self.shape, self.size_mode, self.size_system, self.nps, self.schedule,
            c["diameter"].box,
            c["length"].box, c["height"].box, c["width"].box, c["surface_temperature"].box,
            c["fluid_temperature"].box, c["insulation_thickness"].box, self.material, self.material_hint,
            c["insulation_conductivity"].box, head("Surroundings"), c["air_temperature"].box, self.same_surroundings,
            c["surroundings_temperature"].box, c["wind_speed"].box, c["emissivity"].box, self.sky,
            c["sky_view_fraction"].box, c["solar_irradiance"].box, c["relative_humidity"].box, c["pressure"].box,
            head("Correlations"), self.natural, self.forced,
        ], layout=widgets.Layout(width="100%"))
        self.inputs.add_class("cl-inputs")
        self.cards = {key: widgets.HTML() for key in
                      ("q_per_length", "q_total", "surface_temperature", "h_convection", "h_radiation", "regime")}
        for key, card in self.cards.items():
            card.add_class("cl-card")
            card.add_class(f"cl-card-{key.replace('_', '-')}")
        self.card_row = widgets.HBox(list(self.cards.values()), layout=widgets.Layout(flex_flow="row wrap",
                                                                                       width="100%"))
        self.notes = widgets.HTML()
        self.notes.add_class("cl-notes")
        self.results = widgets.VBox([self.card_row, self.notes, self.message], layout=widgets.Layout(width="100%"))
        self.children = [self.inputs, self.results]
        self.set_case(case)

    # ------------------------------------------------------------------ interface
    def interactive(self):
        return [self.kind, self.shape, self.size_mode, self.size_system, self.schedule, self.nps,
                self.same_surroundings, self.sky, self.natural, self.forced, self.material, *self.controls.values()]

    def reset(self) -> None:
        """Back to the case the panel was built with."""
        super().reset()
        self.set_case(self._initial)

    def set_case(self, case: CaseSpec) -> None:
        """Show ``case`` in every control, then publish it once as :attr:`case`."""
        self._quiet = True
        try:
            self._base = case
            for name, control in self.controls.items():
                control.set_si(_default_value(case, name))
            self.kind.value = case.kind
            self.shape.value = case.shape
            self.material.value = case.insulation_material or CONSTANT_K
            self.same_surroundings.value = case.surroundings_temperature is None
            self.sky.value = "outdoors" if case.sky_view_fraction > 0 else "indoors"
            self._fill_laws(case.natural, case.forced)
            matched = self._match_nps(case.diameter)
            self.size_mode.value = "nps" if matched and self._pipe_shape() else "value"
            self._arrange()
        finally:
            self._quiet = False
        self._publish()

    # ------------------------------------------------------------------ events
    @traitlets.observe("units")
    def _units_changed(self, change):
        if not hasattr(self, "controls"):
            return
        for control in self.controls.values():
            control.set_system(change["new"])
        self._refresh_nps_labels()
        self._render_cards()

    @traitlets.observe("summary")
    def _summary_changed(self, change):
        self._render_cards()

    def _numeric_changed(self, name, value):
        if self._quiet:
            return
        if name == "diameter" and self.size_mode.value == "nps":
            return
        self._publish()

    def _choice_changed(self, change):
        if self._quiet:
            return
        self._quiet = True
        try:
            owner = change["owner"]
            if owner is self.kind and self.kind.value == "insulated":
                self.shape.value = "horizontal_cylinder"
            if owner in (self.kind, self.shape):
                self._fill_laws(None, None)
            if owner is self.size_system:
                self._fill_grades()
                self._fill_nps(None, diameter=self.controls["diameter"].si)
            if owner is self.schedule:
                self._fill_nps(self.nps.value)
            if owner is self.sky and self.sky.value == "outdoors" and self.controls["sky_view_fraction"].si == 0:
                self.controls["sky_view_fraction"].set_si(SHAPES[self._shape()].sky_view_fraction)
            if self.size_mode.value == "nps" and owner in (self.nps, self.schedule, self.size_mode, self.size_system):
                self._apply_nps()
            self._arrange()
        finally:
            self._quiet = False
        self._publish()

    # ------------------------------------------------------------------ helpers
    def _shape(self) -> str:
        return "horizontal_cylinder" if self.kind.value == "insulated" else self.shape.value

    def _pipe_shape(self) -> bool:
        return self._shape() in ("horizontal_cylinder", "vertical_cylinder")

    def _fill_laws(self, natural, forced) -> None:
        info = SHAPES[self._shape()]
        for widget, geometry, default, value in ((self.natural, info.natural_geometry, info.default_natural, natural),
                                                 (self.forced, info.forced_geometry, info.default_forced, forced)):
            keys = law_keys(geometry)
            widget.options = [(f"{law_name(default)} (default)", DEFAULT_LAW)] + [(law_name(k), k) for k in keys
                                                                                 if k != default]
            widget.value = value if value in keys and value != default else DEFAULT_LAW

    def _sizes(self) -> list:
        grades = size_grades(self.size_system.value)
        return standard_sizes(self.size_system.value, self.schedule.value if grades else None)

    def _fill_grades(self) -> None:
        """The schedules (NPS) or types (ASTM B88) of the size system; hidden when it has none."""
        system = self.size_system.value
        grades, title = size_grades(system), SIZE_SYSTEMS[system][1]
        if grades:
            keep = self.schedule.value
            self.schedule.options = list(grades)
            self.schedule.value = keep if keep in grades else (settings.DEFAULT_SCHEDULE if system == "nps"
                                                                else grades[1 if len(grades) > 1 else 0])
            self.schedule.description = title

    def _fill_nps(self, keep: float | None, diameter: float | None = None) -> None:
        """The size list of the size system (values: NPS, DN, outside diameter [mm] or nominal size [in]),
        keeping the size nearest ``keep`` (a key) or ``diameter`` [m]."""
        sizes, system, display = self._sizes(), self.size_system.value, self.display
        self.nps.options = [(size_label(system, s.key, s.outer_diameter, display), s.key) for s in sizes]
        if sizes and keep is not None:
            self.nps.value = min(sizes, key=lambda s: abs(s.key - keep)).key
        elif sizes and diameter is not None:
            self.nps.value = min(sizes, key=lambda s: abs(s.outer_diameter - diameter)).key

    def _refresh_nps_labels(self) -> None:
        quiet, self._quiet = self._quiet, True
        try:
            self._fill_nps(self.nps.value)
        finally:
            self._quiet = quiet

    def _match_nps(self, diameter: float) -> bool:
        self._fill_nps(None)
        for size in self._sizes():
            if abs(size.outer_diameter - diameter) < 1e-6:
                self.nps.value = size.key
                return True
        return False

    def _apply_nps(self) -> None:
        if self.nps.value is None:
            return
        size = next(s for s in self._sizes() if s.key == self.nps.value)
        self.controls["diameter"].set_si(size.outer_diameter)

    def _arrange(self) -> None:
        """Show only the controls that apply to the kind and shape."""
        kind, shape = self.kind.value, self._shape()
        sizes = SHAPES[shape].sizes
        c = self.controls
        self.shape.disabled = kind == "insulated"
        pipe = self._pipe_shape()
        nps = pipe and self.size_mode.value == "nps"
        graded = bool(size_grades(self.size_system.value))
        for w, visible in ((self.size_mode, pipe), (self.size_system, nps), (self.nps, nps),
                           (self.schedule, nps and graded)):
            w.layout.display = None if visible else "none"
        c["diameter"].show("diameter" in sizes)
        c["diameter"].disabled = nps
        c["diameter"].label = "Pipe outer Ø" if kind == "insulated" else "Outer Ø"
        c["length"].label = "Height" if shape == "vertical_cylinder" else (
            "Length" if shape.startswith("horizontal_plate") else "Run length")
        for name in ("diameter", "length"):
            c[name].set_system(c[name].system)
        c["length"].show("length" in sizes)
        c["height"].show("height" in sizes)
        c["width"].show("width" in sizes)
        c["surface_temperature"].show(kind == "bare")
        for name in ("fluid_temperature", "insulation_thickness", "insulation_conductivity"):
            c[name].show(kind == "insulated")
        by_material = kind == "insulated" and self.material.value != CONSTANT_K
        self.material.layout.display = None if kind == "insulated" else "none"
        self.material_hint.layout.display = None if by_material else "none"
        self.material_hint.value = html.escape(material_source(self.material.value)) if by_material else ""
        c["insulation_conductivity"].show(kind == "insulated" and not by_material)
        c["surroundings_temperature"].show(not self.same_surroundings.value)
        c["sky_view_fraction"].show(self.sky.value == "outdoors")
        c["solar_irradiance"].show(self.sky.value == "outdoors" or c["solar_irradiance"].si > 0)
        self.forced.disabled = False

    def _values(self) -> dict:
        c = {n: ctl.si for n, ctl in self.controls.items()}
        kind, shape = self.kind.value, self._shape()
        sizes = SHAPES[shape].sizes
        values = self._base.model_dump()
        values.update(
            kind=kind, shape=shape, diameter=c["diameter"],
            length=c["length"] if "length" in sizes else self._base.length,
            height=c["height"] if "height" in sizes else None, width=c["width"] if "width" in sizes else None,
            surface_temperature=c["surface_temperature"] if kind == "bare" else None,
            fluid_temperature=c["fluid_temperature"] if kind == "insulated" else None,
            insulation_thickness=c["insulation_thickness"], insulation_conductivity=c["insulation_conductivity"],
            insulation_material=self.material.value if kind == "insulated" and self.material.value else None,
            air_temperature=c["air_temperature"],
            surroundings_temperature=None if self.same_surroundings.value else c["surroundings_temperature"],
            wind_speed=c["wind_speed"], emissivity=c["emissivity"],
            sky_view_fraction=c["sky_view_fraction"] if self.sky.value == "outdoors" else 0.0,
            relative_humidity=c["relative_humidity"], solar_irradiance=c["solar_irradiance"], pressure=c["pressure"],
            natural=None if self.natural.value == DEFAULT_LAW else self.natural.value,
            forced=None if self.forced.value == DEFAULT_LAW else self.forced.value)
        return values

    def _publish(self) -> None:
        try:
            case = CaseSpec.model_validate(self._values())
        except (ValidationError, ValueError) as exc:
            self.error = validation_text(exc)
            self.set_message([f"Input not accepted: {self.error}"], "error")
            return
        self.error = ""
        self.set_message()
        by_nps = self.size_mode.value == "nps" and self.size_system.value == "nps"
        self.pipe_size = (self.nps.value if by_nps else None,
                          self.schedule.value if self.size_system.value == "nps" else settings.DEFAULT_SCHEDULE)
        self.case = case

    @traitlets.observe("opened")
    def _opened(self, change):
        if change["new"][1] is not None:
            self.set_case(change["new"][1].case)

    # ------------------------------------------------------------------ cards
    def _card(self, key: str, title: str, value: str, unit: str = "", sub: str = "") -> None:
        self.cards[key].value = card_html(title, value, unit, sub)

    def card_text(self, key: str) -> str:
        """Plain text of a card's value and unit (what the browser shows)."""
        return card_value_text(self.cards[key].value)

    def _render_cards(self) -> None:
        s = self.summary
        if s is None:
            return
        d = self.display
        q = s.q_per_length
        sun = f" · sun −{d.number(s.q_solar_per_length, 'q_per_length')}" if s.q_solar_per_length > 0 else ""
        self._card("q_per_length", "Heat loss" if q >= 0 else "Heat gain", d.number(abs(q), "q_per_length"),
                   d.label("q_per_length"),
                   f"conv. {d.number(s.q_convection_per_length, 'q_per_length')} · rad. "
                   f"{d.number(s.q_radiation_per_length, 'q_per_length')}{sun}")
        length = self.case.length if self.case is not None else None
        self._card("q_total", "Total " + ("loss" if s.q_total >= 0 else "gain"), d.number(abs(s.q_total), "q_total"),
                   d.label("q_total"), "" if length is None else f"over {d.text(length, 'length')}")
        self._card("surface_temperature", "Surface", d.number(s.surface_temperature, "surface_temperature"),
                   d.label("surface_temperature"), f"dew point {d.text(s.dew_point, 'dew_point')}")
        self._card("h_convection", "h convection", d.number(s.h_convection, "h_convection"), d.label("h_convection"),
                   f"Nu {scientific(s.nusselt, 3)}")
        self._card("h_radiation", "h radiation", d.number(s.h_radiation, "h_radiation"), d.label("h_radiation"),
                   "surroundings + sky")
        ri = "still air" if s.richardson is None else f"Ri {scientific(s.richardson)}"
        self._card("regime", "Regime", regime_text(s.regime, s.flow), "", f"{ri} · Ra {scientific(s.rayleigh)}")
        notes = message_html(s.cautions, "caution", d) + message_html(s.warnings, "warning", d)
        self.notes.value = notes
