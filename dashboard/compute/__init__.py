"""Every convlib call the dashboard makes, each returning a plain result for a panel.

These functions touch no widget: the app runs them (in a worker thread when a
kernel loop is running) and pushes what they return into the panels. All
numbers come from :mod:`convlib`: :func:`convlib.study.evaluate_case`,
:func:`convlib.study.run_study`, :func:`convlib.correlations.nusselt`, the
sizing functions of :mod:`convlib.design`, :mod:`convlib.operation`,
:mod:`convlib.vessels` and the survey studies of :mod:`convlib.upgrade`.

The layer is a package: :mod:`.case` (base case, sweeps, regimes, uncertainty), :mod:`.insulation`,
:mod:`.operation`, :mod:`.vessels`, :mod:`.sizes` and :mod:`.survey`; this module re-exports their names and the
few convlib names the other dashboard modules use (it is the only part of the dashboard that imports convlib).
"""
from __future__ import annotations

from convlib import design, snapshot
from convlib.correlations.registry import display_name
from convlib.demo import fill_template
from convlib.errors import InputError
from convlib.files import read_capped, write_atomic
from convlib.geometry import SHAPES
from convlib.fittings import PRESSURE_CLASSES
from convlib.operation import CAUTION_FREEZE, CAUTION_TRACING, TRACING_MARGIN
from convlib.transients import CAUTION_COOL_DOWN, CAUTION_WARM_UP
from convlib.pipe_sizes import SCHEDULES, nominal_pipe, nominal_sizes
from convlib.regimes import flow_names, mode_names
from convlib.study import (CaseSpec, MonteCarloResult, StudyResult, StudySpec, SweepAxis, SweepResult, TornadoBar,
                           load_demo_study, run_study)
from convlib.units import display_unit, from_si, to_si

from .case import (CaseSummary, LawCurve, RegimeMap, RegimeView, SweepCache, chosen_laws, current_value,
                   insulation_materials, law_keys, material_source, monte_carlo_settings, regime_map, regime_view, study_for_case, summarize_case, sweep_axes,
                   sweep_only, sweep_study, uncertainty_study)
from .insulation import FITTINGS_NEED_NPS, FittingsView, InsulationView, Sizing, fittings_view, insulation_view
from .operation import (COOL_DOWN_STEAM, OperationInputs, OperationView, TransientView, cool_to_default,
                        demo_site_operation, design_air_temperature, operation_defaults, operation_layers,
                        operation_options, operation_view, pipe_wall_thickness, transient_options, transient_view,
                        warm_up_pressure_default)
from .sizes import SIZE_SYSTEMS, StandardSize, size_grades, standard_sizes
from .survey import DEMO_SURVEY, SURVEY_CAUTIONS, SURVEY_MAX_BYTES, SurveySource, SurveyView, survey_view
from .vessels import VesselInputs, VesselView, vessel_defaults, vessel_view

#: What the other dashboard modules use of convlib, re-exported: this module is the only one importing convlib.
REEXPORTED = (
    "CaseSpec", "StudySpec", "StudyResult", "SweepAxis", "SweepResult", "MonteCarloResult", "TornadoBar",
    "InputError", "SHAPES", "SCHEDULES", "nominal_pipe", "nominal_sizes", "load_demo_study", "run_study", "snapshot",
    "read_capped", "write_atomic", "display_name", "display_unit", "from_si", "to_si", "flow_names", "mode_names",
    "CAUTION_FREEZE", "CAUTION_TRACING", "TRACING_MARGIN", "TOUCH_LIMITS", "law_keys", "fill_template",
    "CAUTION_COOL_DOWN", "CAUTION_WARM_UP", "PRESSURE_CLASSES",
)
#: Touch limits offered for a jacket: (label, surface temperature [K]) (values of convlib.design).
TOUCH_LIMITS = (("metal jacket", design.TOUCH_LIMIT_METAL_JACKET),
                ("non-metal finish", design.TOUCH_LIMIT_NONMETAL_JACKET))

__all__ = [
    *REEXPORTED, "CaseSummary", "summarize_case", "study_for_case", "sweep_axes", "chosen_laws", "current_value",
    "SweepCache", "sweep_study", "sweep_only", "LawCurve",
    "RegimeView",
    "regime_view", "RegimeMap", "regime_map", "uncertainty_study", "monte_carlo_settings", "Sizing",
    "InsulationView", "insulation_view", "FittingsView", "fittings_view", "FITTINGS_NEED_NPS", "OperationInputs", "OperationView", "operation_view", "operation_layers",
    "operation_options", "design_air_temperature", "pipe_wall_thickness", "VesselInputs", "VesselView",
    "vessel_defaults", "vessel_view", "operation_defaults", "demo_site_operation", "insulation_materials",
    "material_source", "TransientView", "transient_view", "COOL_DOWN_STEAM",
    "transient_options", "cool_to_default", "warm_up_pressure_default", "SIZE_SYSTEMS", "StandardSize",
    "size_grades", "standard_sizes", "SurveySource", "SurveyView", "survey_view", "DEMO_SURVEY", "SURVEY_CAUTIONS",
    "SURVEY_MAX_BYTES",
]
