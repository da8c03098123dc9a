"""The wheel built from this checkout: what it holds, and that it installs and runs from a fresh venv.

The build runs without isolation, with the setuptools and wheel of this venv (the ``test`` extra lists them),
on a copy of the checkout, so that the checkout gets no ``build/`` or ``*.egg-info``. No network: ``--no-index``.
The installed wheel finds its dependencies (numpy, CoolProp, voila, ...) through ``PYTHONPATH`` pointing at this
venv's site-packages, where ``.pth`` files -- the editable install of convlib among them -- are not read.
"""
import importlib.util
import json
import os
import re
import shutil
import subprocess
import sys
import sysconfig
import zipfile
from pathlib import Path

import pytest

import convlib

pytestmark = pytest.mark.packaging

REPO = Path(__file__).resolve().parents[1]
NOT_SOURCE = {".venv", ".git", "build", "dist", "__pycache__", ".pytest_cache", ".benchmarks", "screenshots"}
#: Folders of dashboard/ whose every file the server may read (package-data globs of pyproject.toml).
DASHBOARD_DATA = ("share", "templates", "static")


def _run(command, **kwargs):
    done = subprocess.run([str(c) for c in command], capture_output=True, text=True, timeout=300, **kwargs)
    assert done.returncode == 0, (f"{' '.join(map(str, command))} failed ({done.returncode}):\n"
                                  f"{done.stdout}\n{done.stderr}")
    return done


def _ignore(folder, names):
    return [n for n in names if n in NOT_SOURCE or n.endswith((".egg-info", ".pyc"))]


@pytest.fixture(scope="module")
def source(tmp_path_factory):
    copy = tmp_path_factory.mktemp("checkout") / "convlib-src"
    shutil.copytree(REPO, copy, ignore=_ignore)
    return copy


@pytest.fixture(scope="module")
def wheel(source, tmp_path_factory):
    for module in ("setuptools", "wheel"):
        assert importlib.util.find_spec(module) is not None, (
            f"{module} is missing from {sys.prefix}; the wheel is built without build isolation: "
            f"pip install -e '.[test]'")
    out = tmp_path_factory.mktemp("wheelhouse")
    _run([sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation", "--no-index", "-q",
          "-w", out, source], cwd=out)
    built = sorted(out.glob("convlib-*.whl"))
    assert len(built) == 1, f"expected one convlib wheel in {out}; got {[p.name for p in out.iterdir()]}"
    return built[0]


def test_wheel_holds_code_data_notebook_license_and_one_version(wheel, source):
    with zipfile.ZipFile(wheel) as z:
        names = set(z.namelist())
        dist_info = f"convlib-{convlib.__version__}.dist-info"
        metadata = z.read(f"{dist_info}/METADATA").decode("utf-8")
        licenses = [n for n in names if re.fullmatch(rf"{re.escape(dist_info)}/(licenses/)?LICENSE", n)]
        assert licenses, f"no LICENSE in {dist_info}: {sorted(n for n in names if n.startswith(dist_info))}"
        assert "Copyright (c) 2026 the convlib developers" in z.read(licenses[0]).decode("utf-8")
    wanted = ["convlib/__init__.py", "convlib/__main__.py", "convlib/errors.py", "dashboard/app.ipynb",
              "dashboard/serve.py"]
    wanted += [p.relative_to(source).as_posix() for p in (source / "convlib" / "data").iterdir() if p.is_file()]
    wanted += [p.relative_to(source).as_posix() for folder in DASHBOARD_DATA
               for p in (source / "dashboard" / folder).rglob("*") if p.is_file()]
    wanted += [p.relative_to(source).as_posix() for package in ("convlib", "dashboard")
               for p in (source / package).rglob("*.py")]
    missing = sorted(set(wanted) - names)
    assert not missing, f"missing from {wheel.name}: {missing}"
    assert any(n.startswith("convlib/data/") for n in wanted)
    version = re.search(r"^Version: (.+)$", metadata, re.MULTILINE)[1].strip()
    assert version == convlib.__version__
    requires = re.findall(r"^Requires-Dist: ([A-Za-z0-9_.\-]+)(.*)$", metadata, re.MULTILINE)
    runtime = {name.lower() for name, rest in requires if "extra ==" not in rest}
    assert runtime == {"numpy", "coolprop", "pydantic", "pint", "fluids"}  # scipy: tests only
    assert "scipy" in {name.lower() for name, rest in requires if "extra == \"test\"" in rest.replace("'", '"')}


def test_wheel_installs_and_runs_from_a_fresh_venv(wheel, tmp_path):
    venv = tmp_path / "v"
    _run([sys.executable, "-m", "venv", venv])
    bin_dir = venv / ("Scripts" if os.name == "nt" else "bin")
    python = bin_dir / "python"
    _run([python, "-m", "pip", "install", "--no-deps", "--no-index", "-q", wheel], cwd=tmp_path)
    here = {sysconfig.get_paths()[key] for key in ("purelib", "platlib")}  # this venv's dependencies
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONHOME", "PYTHONSTARTUP")}
    env["PYTHONPATH"] = os.pathsep.join(sorted(here))
    outside = tmp_path / "elsewhere"  # cwd outside the checkout: nothing imported from it
    outside.mkdir()
    probe = ("import json, convlib, dashboard, dashboard.serve as serve; "
             "print(json.dumps({'convlib': convlib.__file__, 'dashboard': dashboard.__file__, "
             "'version': convlib.__version__, 'notebook': str(serve.NOTEBOOK), "
             "'template_root': str(getattr(serve, 'TEMPLATE_ROOT', '') or '')}))")
    found = json.loads(_run([python, "-c", probe], cwd=outside, env=env).stdout.splitlines()[-1])
    root = venv.resolve()
    for name in ("convlib", "dashboard", "notebook"):
        assert root in Path(found[name]).resolve().parents, f"{name}: {found[name]} is not in the new venv {root}"
    assert found["version"] == convlib.__version__
    assert Path(found["notebook"]).is_file(), f"dashboard.serve.NOTEBOOK {found['notebook']} is not a file"
    if found["template_root"]:  # the voila template of the shared server, where dashboard.serve names one
        template_root = Path(found["template_root"])
        assert template_root.is_dir() and root in template_root.resolve().parents, f"TEMPLATE_ROOT: {template_root}"
    usage = _run([python, "-m", "convlib", "--help"], cwd=outside, env=env).stdout
    assert usage.startswith("usage:") and "convlib" in usage
    script = _run([bin_dir / "convlib", "--version"], cwd=outside, env=env).stdout.strip()
    assert script == f"convlib {convlib.__version__}"


def test_convlib_runs_and_records_provenance_without_scipy(tmp_path):
    """SciPy is a test dependency only: with its import blocked and its metadata absent, convlib computes and a
    snapshot records it as "not installed"."""
    probe = """
import sys
from importlib import metadata

class NoScipy:
    def find_spec(self, name, path=None, target=None):
        if name.split(".")[0] == "scipy":
            raise ImportError("scipy is blocked in this test")

sys.meta_path.insert(0, NoScipy())
real_version = metadata.version
def version(name):
    if name.lower() == "scipy":
        raise metadata.PackageNotFoundError(name)
    return real_version(name)
metadata.version = version

import convlib as cl
from convlib.snapshot import current_provenance
result = cl.run_line_list(cl.linelist.demo_lines_path())
assert len(result) > 0 and result.errors == (), result.errors
print(current_provenance().scipy, sorted(m for m in sys.modules if m.split(".")[0] == "scipy"))
"""
    out = _run([sys.executable, "-c", probe], cwd=tmp_path).stdout.strip().splitlines()[-1]
    assert out == "not installed []"
