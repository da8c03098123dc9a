"""The survey tab: a thermal survey's ranked upgrades (convlib.upgrade), totals hot and cold apart, a chart of
saving against cost, a filter, an upload of the viewer's own survey and the survey's cautions."""
from __future__ import annotations

import html

import ipywidgets as widgets
import numpy as np
import traitlets

from .. import settings
from ..compute import DEMO_SURVEY, SURVEY_MAX_BYTES, SurveySource, SurveyView
from ..figures_survey import money_text, survey_figure, survey_table
from .base import Panel, card_html, card_value_text, message_html
from .controls import DESCRIPTION_STYLE

__all__ = ["SurveyPanel", "ALL_AREAS"]

#: The area menu's entry for no area filter.
ALL_AREAS = "every area"
#: Row errors listed on the tab (the rest are counted).
_ERRORS_SHOWN = 8
_SIDES = (("hot", "Hot lines, heat lost", "lost"), ("cold", "Cold lines, heat gained", "gained"))


class SurveyPanel(Panel):
    """A survey priced and ranked: the demo survey at first, or a CSV the viewer uploads.

    Traits
    ------
    view : SurveyView or None
        The ranked list and totals shown (set by the app).
    source : SurveySource
        The survey to compute (the demo survey, or an uploaded file); a file that cannot be read is put back
        to the survey shown (:meth:`refused`).
    payback_years : float
        The horizon N of the probability of payback [years].
    filter_text, area : str
        Rows shown: tag or area containing the text; one area (``""``: every area).
    """

    view = traitlets.Instance(SurveyView, allow_none=True)
    source = traitlets.Instance(SurveySource, default_value=DEMO_SURVEY)
    payback_years = traitlets.Float(settings.SURVEY["payback_years"])
    filter_text = traitlets.Unicode("")
    area = traitlets.Unicode("")

    #: Every setting the numbers depend on (the filter only chooses the rows shown).
    SETTINGS = ("source", "payback_years")

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        s = settings.SURVEY
        self.upload = widgets.FileUpload(accept=".csv,text/csv", multiple=False, description="Upload survey CSV",
                                         layout=widgets.Layout(width="190px"))
        self.upload.add_class("cl-survey-upload")
        self.upload.observe(self._uploaded, "value")
        self.demo_button = widgets.Button(description="Back to the demo survey", layout=widgets.Layout(width="210px"))
        self.demo_button.add_class("cl-survey-demo")
        self.demo_button.on_click(lambda _: setattr(self, "source", DEMO_SURVEY))
        self.shown = widgets.HTML()
        self.shown.add_class("cl-hint")
        self.upload_hint = widgets.HTML(html.escape(
            f"Your own survey: a CSV with the columns of convlib's survey list (tag, pipe size, fluid temperature, "
            f"insulation and its design conductivity, the jacket and air temperatures measured at the survey; see "
            f"the README), up to {s['max_lines']} lines."))
        self.upload_hint.add_class("cl-hint")
        self.years_box = widgets.BoundedFloatText(value=self.payback_years, min=s["payback_low"],
                                                  max=s["payback_high"], step=0.5,
                                                  description="Payback horizon N [years]", style=DESCRIPTION_STYLE,
                                                  layout=widgets.Layout(width="260px"))
        self.years_box.add_class("cl-survey-years")
        traitlets.link((self.years_box, "value"), (self, "payback_years"))
        self.filter_box = widgets.Text(description="Tag or area contains", placeholder="e.g. FS-1 or yard",
                                       style=DESCRIPTION_STYLE, continuous_update=True,
                                       layout=widgets.Layout(width="360px"))
        self.filter_box.add_class("cl-survey-filter")
        traitlets.link((self.filter_box, "value"), (self, "filter_text"))
        self.area_box = widgets.Dropdown(options=[(ALL_AREAS, "")], value="", description="Area",
                                         style=DESCRIPTION_STYLE, layout=widgets.Layout(width="400px"))
        self.area_box.add_class("cl-survey-area")
        traitlets.link((self.area_box, "value"), (self, "area"))
        self.cards = [widgets.HTML(layout=widgets.Layout(flex="1 1 260px")) for _ in range(4)]
        for k, card in enumerate(self.cards):
            card.add_class("cl-card")
            card.add_class(f"cl-card-survey-{k}")
        self.card_row = widgets.HBox(self.cards, layout=widgets.Layout(flex_flow="row wrap", width="100%"))
        self.table = widgets.HTML(layout=widgets.Layout(width="100%", max_height="420px", overflow="auto"))
        self.table.add_class("cl-table")
        self.table.add_class("cl-survey-table")
        self.notes = widgets.HTML()
        self.cautions = widgets.HTML()
        source_row = widgets.HBox([self.upload, self.demo_button, self.shown],
                                  layout=widgets.Layout(flex_flow="row wrap", align_items="center", width="100%"))
        filter_row = widgets.HBox([self.filter_box, self.area_box, self.years_box],
                                  layout=widgets.Layout(flex_flow="row wrap", width="100%"))
        self.children = [source_row, self.upload_hint, filter_row, self.message, self.card_row, self.table, self.plot_box, self.notes,
                         self.cautions]

    # ------------------------------------------------------------------ interface
    def interactive(self):
        return [self.upload, self.demo_button, self.years_box]

    def reset(self):
        super().reset()
        self.source = DEMO_SURVEY
        self.payback_years = settings.SURVEY["payback_years"]
        self.filter_text, self.area = "", ""

    def refused(self, exc: Exception) -> None:
        """A survey could not be computed: say why, and put the source back to the survey shown."""
        self.source = self.view.source if self.view is not None else DEMO_SURVEY
        shown = f" Still showing the {self._source_text(self.source)}." if self.view is not None else ""
        self.set_message([f"Not used: {exc}.{shown}"], "error")

    def matching(self) -> np.ndarray:
        """Rows of the ranked list the filter keeps."""
        return self.view.matching(self.filter_text, self.area) if self.view is not None else np.zeros(0, bool)

    def columns(self):
        """The ranked table as shown (filtered): list of :class:`dashboard.figures_survey.Column`."""
        return [] if self.view is None else survey_table(self.view, self.display, self.matching())

    def card_text(self, index: int) -> str:
        """Plain text of a totals card's value and unit (0, 1: hot lines; 2, 3: cold lines)."""
        return card_value_text(self.cards[index].value)

    # ------------------------------------------------------------------ events
    def _uploaded(self, change):
        files = change["new"]
        if not files:
            return
        f = files[0]
        size = int(f.get("size") or len(f["content"]))
        if size > SURVEY_MAX_BYTES:  # refused before its bytes are copied; the compute layer checks again
            self.set_message([f"{f['name']} was not used: {size / 1e6:.3g} MB, larger than the "
                              f"{SURVEY_MAX_BYTES / 1e6:.3g} MB limit."], "error")
        else:
            self.source = SurveySource(str(f["name"]), bytes(f["content"]))
        self.upload.value = ()  # the same file may be chosen again

    @staticmethod
    def _source_text(source: SurveySource) -> str:
        return source.name if source.demo else f"uploaded file {source.name}"

    # ------------------------------------------------------------------ rendering
    @traitlets.observe("view")
    def _view_changed(self, change):
        v = self.view
        if v is None or not hasattr(self, "area_box"):
            return
        areas = [(ALL_AREAS, "")] + [(a, a) for a in v.areas]
        if [o[1] for o in self.area_box.options] != [o[1] for o in areas]:
            keep = self.area if self.area in v.areas else ""
            self.area_box.options = areas
            self.area_box.value = keep
        self.set_message()
        self._render()

    @traitlets.observe("units", "filter_text", "area")
    def _render(self, change=None):
        v = self.view
        if v is None or not hasattr(self, "cards"):
            return
        d = self.display
        self.shown.value = html.escape(f"Showing the {self._source_text(v.source)}: {v.lines} lines")
        self._render_totals(v)
        keep = self.matching()
        self.table.value = _table_html(survey_table(v, d, keep)) if keep.any() else \
            message_html(["No line matches the filter."], "info")
        self.show_figure(survey_figure(v, d, keep))
        errors = [f"Row {i + 2} ({tag}) not computed: {reason}" for i, tag, reason in v.errors[:_ERRORS_SHOWN]]
        if len(v.errors) > _ERRORS_SHOWN:
            errors.append(f"… and {len(v.errors) - _ERRORS_SHOWN} more rows not computed.")
        sampling = (f"Uncertainty: {v.samples} samples per line (kept small so that the tab answers quickly), fixed "
                    f"seed {v.seed}; thermometer ± {v.thermometer:g} K, emissivity ± {v.emissivity:g}. Savings are "
                    f"P5 / P50 / P95 of those samples; the payback column is at the median saving.")
        self.notes.value = message_html(errors, "warning", d) + message_html([sampling, *v.notes], "info", d)
        self.cautions.value = message_html(v.cautions, "caution", d)

    def _render_totals(self, v: SurveyView) -> None:
        d = self.display
        for k, (side, title, verb) in enumerate(_SIDES):
            t = v.totals[side]
            heat, money = self.cards[2 * k], self.cards[2 * k + 1]
            shown = t["lines"] > 0
            heat.layout.display = money.layout.display = None if shown else "none"
            if not shown:
                heat.value = money.value = ""
                continue
            excess = d.text(v.energy(t["excess_kwh_p50"]), "survey_energy")
            heat.value = card_html(f"{title} now ({t['lines']} lines)", d.number(abs(t["q_now"]), "survey_heat"),
                                   d.label("survey_heat"), f"{d.text(abs(t['q_design']), 'survey_heat')} as "
                                   f"designed; {excess} a year {verb} beyond design (median)")
            money.value = card_html(f"{title}: worth doing {t['lines_worth_doing']} of {t['lines']}",
                                    money_text(t["investment"]), "to invest",
                                    f"saves {money_text(t['saving_p50'])} a year (median), NPV "
                                    f"{money_text(t['npv_p50'])}, CO₂ {d.text(t['co2_saved_kg_p50'], 'survey_co2')} a year")


def _table_html(columns) -> str:
    head = "".join(f"<th>{html.escape(c.header)}</th>" for c in columns)
    rows = "".join("<tr>" + "".join(f"<td>{html.escape(c.texts[i])}</td>" for c in columns) + "</tr>"
                   for i in range(len(columns[0].texts)))
    return f"<table><thead><tr>{head}</tr></thead><tbody>{rows}</tbody></table>"
