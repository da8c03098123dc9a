"""One vocabulary: every parameter of every public function is in the glossary of DEVELOPERS.md.

A new parameter fails this test until the glossary says what it means and its unit (issue: one name per
meaning across Python, CLI, files and dashboard).
"""
import importlib
import inspect
import re
from pathlib import Path

import pytest

import convlib

#: Modules whose public functions (their ``__all__``) make the engineering API, beside ``convlib.__all__``.
MODULES = ["surface", "pipe", "surroundings", "design", "operation", "vessels", "survey", "upgrade", "economics", "ducts", "faces", "face_sizing", "annual", "study_spec",
           "weather", "pipe_sizes", "materials", "fittings", "wall", "transients", "vessel_list"]
#: Public classes built by users with keywords (their constructor parameters are public parameters too).
CLASSES = {"Surroundings", "Layer", "WeatherBins", "Tariff", "Finance", "Conductivity"}


def _public_callables():
    seen = {}
    for name in convlib.__all__:
        obj = getattr(convlib, name)
        if inspect.isfunction(obj) or (inspect.isclass(obj) and name in CLASSES):
            seen[f"convlib.{name}"] = obj
    for module_name in MODULES:
        try:
            module = importlib.import_module(f"convlib.{module_name}")
        except ModuleNotFoundError:
            continue
        for name in getattr(module, "__all__", []):
            obj = getattr(module, name)
            if inspect.isfunction(obj) or (inspect.isclass(obj) and name in CLASSES):
                seen.setdefault(f"convlib.{module_name}.{name}", obj)
    return seen


def _parameters():
    found = {}
    for where, obj in _public_callables().items():
        for p in inspect.signature(obj).parameters.values():
            if p.name in ("self", "cls") or p.name.startswith("_") or p.kind in (p.VAR_POSITIONAL, p.VAR_KEYWORD):
                continue
            found.setdefault(p.name, where)
    return found


def _glossary() -> set[str]:
    text = (Path(__file__).parents[1] / "DEVELOPERS.md").read_text(encoding="utf-8")
    section = text.split("## Glossary of parameter names", 1)[1].split("\n## ", 1)[0]
    rows = [line for line in section.splitlines() if line.startswith("|")]
    return {name for row in rows for name in re.findall(r"`([A-Za-z_][A-Za-z0-9_]*)`", row.split("|")[1])}


PARAMETERS = _parameters()


def test_the_api_is_not_empty():
    assert {"air_temperature", "surroundings", "pipe_outer_diameter", "layers"} <= set(PARAMETERS)


@pytest.mark.parametrize("name", sorted(PARAMETERS))
def test_every_public_parameter_is_in_the_glossary(name):
    assert name in _glossary(), (f"parameter {name!r} of {PARAMETERS[name]} is not in the glossary of "
                                 f"DEVELOPERS.md: add a row (name | meaning | unit)")


#: The one public ``**`` parameter: further dimensionless groups a law takes (``diameter_over_length``), each checked
#: against the law's declared inputs -- not options passed through to another function.
GROUPS_BY_NAME = {"convlib.nusselt": "extra"}


def test_no_public_signature_passes_options_through():
    for where, obj in _public_callables().items():
        for p in inspect.signature(obj).parameters.values():
            if p.kind is p.VAR_KEYWORD:
                assert GROUPS_BY_NAME.get(where) == p.name, f"{where} takes **{p.name}: name its keywords"
