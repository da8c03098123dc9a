"""A study case insulated with a material of the library (issue 15 point 1: materials by name in the dashboard and
study files): the case's insulation takes the material's k(T)."""
from __future__ import annotations

import pytest
from pydantic import ValidationError

from convlib.materials import layer, material_names
from convlib.pipe import Layer, insulated_pipe
from convlib.study import CaseSpec, case_layers, evaluate_case, run_study
from convlib.study_spec import StudySpec, SweepAxis

NAME = "glass_fiber_pipe_alley_k"  # the library's tabulated k(T) entry (a manufacturer's data sheet, see its source)


def _case(**extra):
    return CaseSpec(kind="insulated", diameter=0.1683, fluid_temperature=453.15, air_temperature=288.15,
                    insulation_thickness=0.05, **extra)


def test_the_case_uses_the_material_k_of_t():
    assert NAME in material_names()
    r = evaluate_case(_case(insulation_material=NAME))
    direct = insulated_pipe(0.1683, 453.15, [layer(0.05, NAME)], air_temperature=288.15, jacket_emissivity=0.9)
    assert float(r.q_per_length) == pytest.approx(float(direct.q_per_length), rel=1e-12)
    constant = evaluate_case(_case())
    assert float(r.q_per_length) != pytest.approx(float(constant.q_per_length), rel=1e-3)


def test_a_sweep_of_the_conductivity_replaces_the_material():
    case = _case(insulation_material=NAME)
    swept = evaluate_case(case, insulation_conductivity=0.05)
    direct = insulated_pipe(0.1683, 453.15, [Layer(0.05, 0.05)], air_temperature=288.15, jacket_emissivity=0.9)
    assert float(swept.q_per_length) == pytest.approx(float(direct.q_per_length), rel=1e-12)
    assert case_layers(case)[0].conductivity is not None


def test_unknown_material_and_a_bare_case_are_refused_by_name():
    with pytest.raises(ValidationError, match="insulation_material"):
        _case(insulation_material="no_such_wool")
    with pytest.raises(ValidationError, match="insulation_material"):
        CaseSpec(kind="bare", surface_temperature=350.0, insulation_material=NAME)


def test_a_study_with_a_material_runs_and_round_trips():
    spec = StudySpec(case=_case(insulation_material=NAME),
                     sweeps=[SweepAxis(input="insulation_thickness", start=0.02, stop=0.1, count=5)])
    again = StudySpec.model_validate_json(spec.model_dump_json())
    assert again.case.insulation_material == NAME
    result = run_study(again)
    assert len(result.sweeps[0].default.q_per_length) == 5
