"""Errors by kind: bad input raises convlib.InputError (a ValueError with field, rule, value); the line lists
turn only InputError into row errors, and any other exception -- a fault of the program -- propagates.

The expected fields, rules and values are those of the inputs written in each test.
"""
import importlib
import io
import pickle

import numpy as np
import pytest

import convlib as cl
from convlib import linelist, linelist_read
from convlib.errors import InputError
from convlib.linelist import RowError, read_line_list, run_line_list
from convlib.validation import as_array, check_choice

HEADER = "tag,nps,outer_diameter,length,fluid_temperature,air_temperature,layers"
GOOD = "A-1,4,,10,453.15,293.15,0.05@0.04 mineral wool"


def csv_text(*rows):
    return io.StringIO("\n".join(rows) + "\n")


# ----------------------------------------------------------------------------- the class
def test_input_error_is_a_value_error_exported_at_the_top():
    assert cl.InputError is InputError
    assert "InputError" in cl.__all__
    assert issubclass(InputError, ValueError)


def test_as_array_names_field_rule_and_value():
    with pytest.raises(InputError) as info:
        as_array("pipe_outer_diameter", -0.1, unit="m", low=0.0, low_inclusive=False)
    err = info.value
    assert (err.field, err.rule, err.value) == ("pipe_outer_diameter", "greater than 0 m", -0.1)
    assert str(err) == "pipe_outer_diameter must be greater than 0 m; got -0.1 m"  # today's text, unchanged


@pytest.mark.parametrize("value, rule, shown", [
    ("abc", "a number or an array of numbers", "abc"),
    (float("nan"), "a finite number", None),
    ([0.5, 1.5, 2.0], "between 0 and 1", None),
])
def test_as_array_rules(value, rule, shown):
    with pytest.raises(InputError) as info:
        as_array("emissivity", value, low=0.0, high=1.0)
    assert info.value.field == "emissivity"
    assert info.value.rule == rule
    if shown is not None:
        assert info.value.value == shown
    if isinstance(value, list):
        np.testing.assert_array_equal(info.value.value, [1.5, 2.0])  # the values that break the rule


def test_check_choice_lists_the_choices():
    with pytest.raises(InputError) as info:
        check_choice("shape", "cube", ["sphere", "vertical_plate"])
    assert (info.value.field, info.value.rule, info.value.value) == ("shape", "one of: sphere, vertical_plate", "cube")


def test_input_error_survives_pickling_and_within():
    err = InputError("unknown method 'x'", field="method", rule="one of: a, b", value="x")
    back = pickle.loads(pickle.dumps(err))
    assert (type(back), str(back), back.field, back.rule, back.value) == (
        InputError, "unknown method 'x'", "method", "one of: a, b", "x")
    outer = err.within("natural")
    assert (str(outer), outer.field, outer.rule, outer.value) == (
        "natural: unknown method 'x'", "natural", "one of: a, b", "x")


# ----------------------------------------------------------------------------- raised across the library
@pytest.mark.parametrize("call, field", [
    (lambda: cl.units.parse("3 kg", "length", "diameter"), "diameter"),
    (lambda: cl.units.display_unit("length", "imperial"), "unit system"),
    (lambda: cl.nominal_pipe(4.3, "40"), "nps"),
    (lambda: cl.nominal_pipe(4, "41"), "schedule"),
    (lambda: cl.nusselt("horizontal_cylinder", "churchill", Ra=1e6, Pr=0.71), "method"),
    (lambda: cl.fluid_properties("Unobtainium", 300.0), "fluid"),
    (lambda: cl.air(5000.0), "temperature"),
    (lambda: cl.geometry.dimensions("sphere", diameter=0.5, width=1.0), "width"),
    (lambda: cl.insulated_pipe(0.1, 400.0, [cl.Layer(0.05, 0.04)], air_temperature=293.15,
                               pipe_wall_thickness=0.06, pipe_conductivity=50.0), "pipe_wall_thickness"),
    (lambda: cl.bare_surface(surface_temperature=353.15, air_temperature=293.15, diameter=0.1, natural="nope"),
     "natural"),
    (lambda: cl.operation.condensate_rate(1000.0, 3.0e7), "steam_pressure"),
    (lambda: cl.design.equivalent_length(40.0, {"gate": 1}), "fittings"),
])
def test_library_input_errors_name_the_field(call, field):
    with pytest.raises(InputError) as info:
        call()
    assert info.value.field == field


# ----------------------------------------------------------------------------- line lists: row errors
def test_bad_rows_are_row_errors_naming_the_column():
    result = run_line_list(csv_text(
        HEADER, GOOD,
        "B-1,,-0.1,10,453.15,293.15,",          # negative diameter (LineSpec range)
        "C-1,4.3,,10,453.15,293.15,",           # no such nominal size
        "D-1,,0.1,10,4000,293.15,"),             # valid cells, but the air film is beyond the property data
        allow_unusual=True)                      # (past the reader's plausibility guard, so the solver sees it)
    assert result.tag == ("A-1",)
    reasons = {e.tag: e.reason for e in result.errors}
    assert reasons["B-1"].startswith("outer_diameter: ") and "'-0.1'" in reasons["B-1"]
    assert reasons["C-1"].startswith("nps: NPS 4.3 is not a standard size in schedule 40")
    # the message names the inputs whose values leave the property range, and the range
    assert reasons["D-1"].startswith("could not be computed: fluid_temperature or air_temperature: ")
    assert "temperature must be between" in reasons["D-1"]
    assert all(isinstance(e, RowError) for e in result.errors)


def test_input_error_in_the_solver_becomes_a_row_error_for_that_row_only(monkeypatch):
    real = linelist.insulated_pipe

    def refuse_hot(pipe_outer_diameter, fluid_temperature, *args, **kwargs):
        if np.any(np.asarray(fluid_temperature) > 500.0):
            raise InputError("fluid_temperature refused", field="fluid_temperature", rule="test", value=None)
        return real(pipe_outer_diameter, fluid_temperature, *args, **kwargs)

    monkeypatch.setattr(linelist, "insulated_pipe", refuse_hot)
    result = run_line_list(csv_text(HEADER, GOOD, "H-1,4,,10,600,293.15,0.05@0.04"))
    assert result.tag == ("A-1",)
    assert result.errors == (RowError(3, "H-1", "could not be computed: fluid_temperature refused"),)


@pytest.mark.parametrize("fault", [ValueError("bug"), IndexError("bug"), TypeError("bug"), KeyError("bug")])
def test_a_fault_in_the_solver_is_raised_not_reported_as_a_row_error(monkeypatch, fault):
    def broken(*args, **kwargs):
        raise fault

    monkeypatch.setattr(linelist, "insulated_pipe", broken)
    with pytest.raises(type(fault), match="bug") as info:
        run_line_list(csv_text(HEADER, GOOD, GOOD.replace("A-1", "A-2")))
    assert not isinstance(info.value, InputError)


@pytest.mark.parametrize("fault", [ValueError("bug"), IndexError("bug")])
def test_a_fault_while_reading_a_cell_is_raised(monkeypatch, fault):
    def broken(cell):
        raise fault

    monkeypatch.setattr(linelist_read, "_nps", broken)
    with pytest.raises(type(fault), match="bug"):
        read_line_list(csv_text(HEADER, GOOD))


@pytest.mark.parametrize("target, column, cell", [
    ("tracing_duty", "maintain_temperature", "278.15"),
    ("line_temperature_profile", "mass_flow", "1.0"),
    ("condensate_rate", "steam_pressure", "1e6"),
    ("dew_point", "relative_humidity", "0.6"),
])
def test_a_fault_in_the_operation_figures_is_raised(monkeypatch, target, column, cell):
    def broken(*args, **kwargs):
        raise ValueError("bug")

    monkeypatch.setattr(linelist, target, broken)
    with pytest.raises(ValueError, match="^bug$"):
        run_line_list(csv_text(f"{HEADER},{column}", f"{GOOD},{cell}"))


def test_input_error_in_the_operation_figures_is_a_note_of_that_line():
    # water at 180 degC and the default 1 atm is steam, not the liquid fluid_phase says: the outlet is not computed
    result = run_line_list(csv_text(f"{HEADER},mass_flow", f"{GOOD},1.0"))
    assert result.errors == ()
    assert np.isnan(result.outlet_temperature[0])
    assert "outlet temperature not computed: fluid_phase: Water at inlet_temperature 453.15 K is not liquid" in (
        result.notes[0])


# ----------------------------------------------------------------------------- snapshot verify
@pytest.fixture(scope="module")
def small_snapshot(tmp_path_factory):
    from convlib.study import CaseSpec, StudySpec, run_study

    spec = StudySpec(name="errors", case=CaseSpec(kind="bare", diameter=0.1, surface_temperature=353.15))
    return cl.snapshot.save(tmp_path_factory.mktemp("snap") / "s.json", spec, run_study(spec))


def test_verify_reports_an_input_error_of_the_rerun_as_snapshot_error(small_snapshot, monkeypatch):
    def refuse(spec, progress=None):
        raise InputError("wind_speed must be at most 100 m/s; got 120.0 m/s", field="wind_speed",
                         rule="at most 100 m/s", value=120.0)

    monkeypatch.setattr(importlib.import_module("convlib.snapshot_check"), "run_study", refuse)
    with pytest.raises(cl.snapshot.SnapshotError, match="re-running the study failed with this convlib: wind_speed"):
        cl.snapshot.verify(small_snapshot)


@pytest.mark.parametrize("fault", [ValueError("bug"), IndexError("bug")])
def test_verify_raises_a_fault_of_the_rerun(small_snapshot, monkeypatch, fault):
    def broken(spec, progress=None):
        raise fault

    monkeypatch.setattr(importlib.import_module("convlib.snapshot_check"), "run_study", broken)
    with pytest.raises(type(fault), match="^bug$") as info:
        cl.snapshot.verify(small_snapshot)
    assert type(info.value) is type(fault)  # not wrapped in SnapshotError
