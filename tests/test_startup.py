"""What the command line imports at start-up (no timings here: `make bench` measures them, benchmarks/startup.py).

Each command runs in a fresh interpreter through the same path as ``python -m convlib``; afterwards the
probe prints the top-level packages in ``sys.modules``. CoolProp (about 2.5 s to import), pydantic, plotly,
ipywidgets and the dashboard must stay out of commands that do not need them. pint is imported by
commands that read or print units; when scipy is installed, pint's import probes ``import scipy`` (the
package's top level only), so there the check is that no scipy subpackage is loaded.
"""
import json
import subprocess
import sys

import pytest

import convlib

NEVER = {"CoolProp", "pydantic", "plotly", "ipywidgets", "dashboard", "fluids"}
SCIPY_TOP_LEVEL = {"scipy", "scipy.__config__", "scipy.version", "scipy._distributor_init",
                   "scipy._distributor_init_local", "scipy._cyutility", "scipy._lib", "scipy._lib._ccallback",
                   "scipy._lib._ccallback_c", "scipy._lib._pep440", "scipy._lib._testutils"}

_PROBE = """
import json, runpy, sys
sys.argv = ["convlib"] + sys.argv[1:]
code = 0
try:
    runpy.run_module("convlib", run_name="__main__")
except SystemExit as exc:
    code = exc.code
sys.stdout.flush()
print("\\nMODULES=" + json.dumps({"code": code, "modules": sorted(sys.modules)}))
"""


def run_cli(*args):
    out = subprocess.run([sys.executable, "-c", _PROBE, *args], capture_output=True, text=True, timeout=120)
    text, _, tail = out.stdout.rpartition("\nMODULES=")
    assert tail, out.stderr
    probe = json.loads(tail)
    assert probe["code"] in (0, None), out.stderr
    return text, set(probe["modules"])


def top_level(modules):
    return {m.split(".")[0] for m in modules}


def test_help_imports_no_heavy_package():
    text, modules = run_cli("--help")
    assert "surface" in text and "usage: convlib" in text
    assert not top_level(modules) & (NEVER | {"scipy", "pint"})


@pytest.mark.parametrize("command", ["--help", "surface --help", "line --help", "tank --help", "lines --help"])
def test_subcommand_help_imports_no_heavy_package(command):
    text, modules = run_cli(*command.split())
    assert "usage: convlib" in text
    assert not top_level(modules) & (NEVER | {"scipy", "pint"})


def test_surface_with_units_imports_pint_but_not_coolprop_pydantic_or_plotly():
    text, modules = run_cli("surface", "--surface-temperature", "90degC", "--air-temperature", "20degC",
                            "--diameter", "4.5in", "--wind-speed", "2")
    assert "T_surface" in text and "Caution" in text  # it ran and printed its table
    assert not top_level(modules) & NEVER
    assert "pint" in top_level(modules)
    assert not {m for m in modules if m.split(".")[0] == "scipy"} - SCIPY_TOP_LEVEL


def test_surface_in_plain_numbers_with_json_imports_neither_pint_nor_scipy():
    # plain numbers on the command line: degC and mm (README, "plain numbers")
    text, modules = run_cli("surface", "--surface-temperature", "90", "--air-temperature", "20",
                            "--diameter", "114.3", "--json")
    row = json.loads(text)["surface"]["results"][0]
    direct = convlib.bare_surface(surface_temperature=363.15, air_temperature=293.15, diameter=0.1143, length=1.0)
    assert row["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-12)
    assert not top_level(modules) & (NEVER | {"scipy", "pint"})


def test_import_convlib_alone_loads_no_physics_and_names_resolve_on_use():
    probe = ("import sys, convlib\nbefore = {m.split('.')[0] for m in sys.modules}\n"
             "from convlib import *\nimport convlib.pipe\n"
             "assert convlib.pipe.insulated_pipe is convlib.insulated_pipe\n"
             "print(' '.join(sorted(before)))")
    out = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    assert not set(out.stdout.split()) & (NEVER | {"scipy", "pint", "numpy"})


def test_every_public_name_resolves():
    for name in convlib.__all__:
        assert getattr(convlib, name) is not None, name
        assert name in dir(convlib)
    assert convlib.units.__name__ == "convlib.units"  # submodules by attribute, as before
    with pytest.raises(AttributeError, match="no attribute 'not_a_name'"):
        convlib.not_a_name  # noqa: B018
