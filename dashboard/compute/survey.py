"""The survey tab: a thermal survey priced by :mod:`convlib.upgrade`, ranked, with totals hot and cold apart.

The survey is the demo survey of the invented Fernhill plant (:func:`convlib.survey.demo_survey_path`) or a CSV a
viewer uploads; the weather, costs and tariffs are those the command line's ``--demo`` uses (the invented demo
year binned as :mod:`convlib.cli_survey` bins it, the demo cost table, the demo tariffs). The study itself is
:func:`convlib.scale.run_study` in this process (serial; rows that cannot be computed come back as errors),
:func:`convlib.upgrade.ranked` and :func:`convlib.upgrade.totals`: no number is computed here.
"""
from __future__ import annotations

import functools
import io
from dataclasses import dataclass

import numpy as np
from convlib.errors import InputError
from convlib.linelist import MAX_BYTES, MAX_CELLS, MAX_ROWS
from convlib.scale import run_study
from convlib.survey import CAUTIONS, Measurement, demo_survey_path
from convlib.upgrade import CostTable, StudySettings, demo_costs_path, ranked, totals
from convlib.weather import demo_weather_path, read_epw, to_bins

from .. import settings

__all__ = ["SurveySource", "SurveyView", "survey_view", "survey_settings", "survey_text", "DEMO_SURVEY",
           "SURVEY_CAUTIONS", "SURVEY_MAX_BYTES"]

#: Cautions of a survey (convlib.survey): hot surfaces, condensation, asbestos-era insulation, local codes.
SURVEY_CAUTIONS = tuple(CAUTIONS)
#: Largest file accepted for upload [bytes]: the cap of a line list (convlib.linelist).
SURVEY_MAX_BYTES = MAX_BYTES
#: Joules in a kilowatt-hour (exact by definition): energies of convlib.upgrade are kWh, the display converts
#: from SI (J).
_JOULES_PER_KWH = 3.6e6


@dataclass(frozen=True)
class SurveySource:
    """Which survey the tab shows: ``content`` None is the demo survey, else the bytes of an uploaded CSV file
    (checked when the survey is computed, :func:`survey_text`)."""

    name: str
    content: bytes | None = None

    @property
    def demo(self) -> bool:
        return self.content is None


#: The demo survey, preloaded.
DEMO_SURVEY = SurveySource("demo survey of the invented Fernhill plant")


@dataclass(frozen=True, eq=False)
class SurveyView:
    """The ranked list of a survey (one row per line: its best option) and the totals, as convlib returns them.

    ``best`` holds the columns of :func:`convlib.upgrade.ranked` (SI: W, kWh, m; money in the cost table's
    currency); ``totals`` those of :func:`convlib.upgrade.totals` (``{"hot": {...}, "cold": {...}}``).
    """

    source: SurveySource
    payback_years: float
    samples: int
    seed: int
    thermometer: float               # bound of the thermometer [K]
    emissivity: float                # bound of the emissivity [-]
    best: dict
    totals: dict
    errors: tuple                    # (row from 0, tag, reason) of the rows not computed
    notes: tuple[str, ...]
    cautions: tuple[str, ...] = SURVEY_CAUTIONS

    @property
    def lines(self) -> int:
        return int(len(self.best.get("index", ())))

    @property
    def areas(self) -> tuple[str, ...]:
        """The plant areas named in the survey, in file order (blank ones left out)."""
        order = np.argsort(self.best.get("index", np.zeros(0, dtype=int)), kind="stable")
        areas = self.best.get("area", np.zeros(0, dtype=object))
        return tuple(dict.fromkeys(str(areas[i]) for i in order if areas[i] not in (None, "")))

    def matching(self, text: str = "", area: str = "") -> np.ndarray:
        """Rows whose tag or area contains ``text`` (any case) and, when ``area`` is given, in that area."""
        tags = np.asarray([str(t) for t in self.best.get("tag", ())], dtype=object)
        areas = np.asarray(["" if a is None else str(a) for a in self.best.get("area", ())], dtype=object)
        keep = np.ones(tags.size, dtype=bool)
        needle = text.strip().lower()
        if needle:
            keep &= np.asarray([needle in t.lower() or needle in a.lower() for t, a in zip(tags, areas)], dtype=bool)
        if area:
            keep &= areas == area
        return keep

    def energy(self, kwh):
        """Energy per year in joules (SI) for :class:`dashboard.display.Display`, from convlib's kWh."""
        return np.asarray(kwh, dtype=float) * _JOULES_PER_KWH


@functools.lru_cache(maxsize=1)
def _demo_inputs():
    """The demo year's bins and the demo cost table (read once per process)."""
    bins = to_bins(read_epw(demo_weather_path()), settings.SURVEY["temperature_step"], settings.SURVEY["wind_edges"])
    return bins, CostTable.read(demo_costs_path())


def survey_settings(payback_years: float, samples: int = settings.SURVEY["samples"],
                    seed: int = settings.SURVEY["seed"]) -> StudySettings:
    """The study settings of the tab: the demo weather, costs, tariffs and finance, ``samples`` per line."""
    bins, costs = _demo_inputs()
    return StudySettings(bins, costs, Measurement(samples=samples, seed=seed), payback_years=float(payback_years))


def survey_text(source: SurveySource) -> str:
    """The text of an uploaded survey file, checked: size, UTF-8, rows and cells within the line list's caps, and
    at most ``settings.SURVEY["max_lines"]`` lines; raises :class:`convlib.errors.InputError` naming the file."""
    name, content = source.name, source.content
    label = f"survey file {name}"
    size = len(content)
    if size == 0:
        raise InputError(f"{label} is empty", field="survey file", rule="a header and rows", value=0)
    if size > SURVEY_MAX_BYTES:
        raise InputError(f"{label}: {size / 1e6:.3g} MB, larger than the {SURVEY_MAX_BYTES / 1e6:.3g} MB limit",
                         field="survey file", rule=f"at most {SURVEY_MAX_BYTES / 1e6:.3g} MB", value=size)
    try:
        text = bytes(content).decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputError(f"{label} is not UTF-8 text (byte {exc.start}); save it as 'CSV UTF-8'",
                         field="survey file", rule="UTF-8 text", value=name) from None
    rows = text.count("\n") + 1
    if rows > 2 * MAX_ROWS or rows + text.count(",") > MAX_CELLS:
        raise InputError(f"{label}: more than {MAX_ROWS} rows or {MAX_CELLS} cells; split the list",
                         field="survey file", rule=f"at most {MAX_ROWS} rows and {MAX_CELLS} cells", value=rows)
    lines = sum(1 for row in text.splitlines()[1:] if row.strip() and not row.lstrip().startswith("#"))
    most = settings.SURVEY["max_lines"]
    if lines > most:
        raise InputError(f"{label}: {lines} lines, more than the {most} this tab computes; run the command line "
                         f"(convlib upgrade FILE --workers N) for long lists", field="survey file",
                         rule=f"at most {most} lines", value=lines)
    return text


def survey_view(source: SurveySource = DEMO_SURVEY, payback_years: float = settings.SURVEY["payback_years"],
                samples: int = settings.SURVEY["samples"], seed: int = settings.SURVEY["seed"]) -> SurveyView:
    """Run the upgrade study of ``source`` (:func:`convlib.scale.run_study`, serial) and rank it.

    Raises :class:`convlib.errors.InputError` when the file cannot be read as a survey or no line of it can be
    computed (the reasons of the first rows in the message).
    """
    study = survey_settings(payback_years, samples, seed)
    try:
        out = run_study(demo_survey_path() if source.demo else io.StringIO(survey_text(source)), study)
    except InputError as exc:
        message = str(exc) if str(exc).startswith("survey file") else f"survey file {source.name}: {exc}"
        raise InputError(message, field=exc.field, rule=exc.rule, value=exc.value) from None
    errors = tuple((e.index, e.tag, e.reason) for e in out.errors)
    if not out.rows:
        first = "; ".join(f"row {i + 2} {tag}: {reason}" for i, tag, reason in errors[:3])
        raise InputError(f"survey file {source.name}: no line could be computed" + (f" ({first})" if first else ""),
                         field="survey file", rule="at least one valid line", value=source.name)
    best = ranked(out.rows)
    m, tariffs, finance = study.measurement, (study.heat_tariff, study.cold_tariff), study.finance
    notes = (
        "Weather: the invented demo year of the Fernhill site; costs: the invented demo cost table (currency per "
        "metre); tariffs: invented demo prices.",
        f"Heat: {tariffs[0].fuel} at {tariffs[0].price_per_heat_kwh:.4f} per kWh of heat; cold: "
        f"{tariffs[1].fuel} at {tariffs[1].price_per_heat_kwh:.4f} per kWh of heat gained; discount "
        f"{finance.discount_rate:.1%}, escalation {finance.escalation:.1%}, lifetime {finance.years:g} years.",
    )
    return SurveyView(source=source, payback_years=float(payback_years), samples=int(m.samples), seed=int(m.seed),
                      thermometer=float(m.thermometer), emissivity=float(m.emissivity), best=best,
                      totals=totals(best), errors=errors, notes=notes)
