"""Tests of the dashboard's plumbing: safe snapshot names, the server command, the job runner, units, doctests."""
from __future__ import annotations

import asyncio
import doctest
import importlib
import json
import os
import subprocess
import sys
from pathlib import Path

import plotly.graph_objects as go
import pytest
from convlib.units import from_si

from convlib.study import run_study

from dashboard import compute, figures, plotting, serve, server, settings, storage
from dashboard.display import Display, format_number
from dashboard.panels.base import sync_figure
from dashboard.runner import Runner

MODULES = ["dashboard.display", "dashboard.figures", "dashboard.storage", "dashboard.panels.line"]


@pytest.mark.parametrize("name", MODULES)
def test_doctests(name):
    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0


# ----------------------------------------------------------------------------- snapshot names
@pytest.mark.parametrize("name, expected", [
    ("steam main", "steam_main.snapshot.json"),
    ("a/b\\c", "a_b_c.snapshot.json"),
    ("run-2.snapshot.json", "run-2.snapshot.json"),
    ("Über; rm -rf", "ber_rm_-rf.snapshot.json"),
])
def test_safe_name_keeps_only_plain_characters(name, expected):
    assert storage.safe_name(name) == expected


@pytest.mark.parametrize("name", ["..", "../x", "a/../../b", ".hidden", "", "///", "x..y"])
def test_safe_name_refuses_traversal_and_hidden(name):
    with pytest.raises(ValueError, match="not allowed"):
        storage.safe_name(name)


def test_snapshot_path_stays_inside_the_directory(tmp_path):
    root = tmp_path / "snaps"
    root.mkdir()
    assert storage.snapshot_path(root, "ok").parent == root.resolve()
    (root / "link.snapshot.json").symlink_to(tmp_path / "outside.snapshot.json")
    with pytest.raises(ValueError, match="leaves the snapshot directory"):
        storage.snapshot_path(root, "link")


def test_listing_reports_damaged_files(tmp_path):
    (tmp_path / "broken.snapshot.json").write_text("{not json")
    (entry,) = storage.list_snapshots(tmp_path)
    assert entry.problem and "cannot be read" in entry.label


# ----------------------------------------------------------------------------- server
def test_shared_server_command():
    cmd = serve.build_command(host="0.0.0.0", port=8123, pool_size=3, local=False, max_kernels=7,
                              cull_idle_timeout=900, cull_interval=60)
    text = " ".join(cmd)
    for flag in ("--strip_sources=True", "--show_tracebacks=False", "--preheat_kernel=True", "--pool_size=3",
                 "--MappingKernelManager.cull_idle_timeout=900", "--MappingKernelManager.cull_interval=60",
                 "--MappingKernelManager.cull_connected=True", "--CappedKernelManager.max_kernels=7",
                 "--Voila.auto_token=True", "--port=8123", "--Voila.ip=0.0.0.0",
                 "multi_kernel_manager_class=dashboard.server.CappedKernelManager", "-m dashboard.server",
                 "--template=convlib",
                 "--VoilaConfiguration.extra_labextensions_path="):
        assert flag in text
    assert "token=" not in text.replace("auto_token", "")  # the token never appears on the command line
    local = " ".join(serve.build_command(host="127.0.0.1", port=1, pool_size=0, local=True, max_kernels=1,
                                         cull_idle_timeout=1, cull_interval=1))
    assert "auto_token" not in local and "preheat" not in local


def test_plots_load_plotly_from_the_server_when_it_publishes_it(monkeypatch):
    from dashboard.panels.base import figure_widget

    monkeypatch.delenv(serve.BUNDLE_ENV, raising=False)
    assert len(figure_widget()._esm) > 1_000_000  # its own copy of the bundle
    monkeypatch.setenv(serve.BUNDLE_ENV, serve.BUNDLE_PATH)
    loader = figure_widget()._esm
    assert len(loader) < 1_000 and serve.BUNDLE_PATH in loader
    assert (Path(serve._plotly_package_data()) / Path(serve.BUNDLE_PATH).name).is_file()


def test_serve_generates_a_token_when_none_is_given(capsys, monkeypatch):
    monkeypatch.delenv("VOILA_TOKEN", raising=False)
    assert serve.main(["--dry-run", "--port", "8124"]) == 0
    out = capsys.readouterr().out
    assert "generated" in out
    monkeypatch.setenv("VOILA_TOKEN", "from-env")
    serve.main(["--dry-run"])
    assert "generated" not in capsys.readouterr().out


def test_kernel_cap_and_secrets(monkeypatch):
    manager = serve.CappedKernelManager(max_kernels=2)
    started = {}

    async def fake_start(self, *args, **kwargs):
        started.update(kwargs)
        return "kernel-id"

    monkeypatch.setattr(server.AsyncMappingKernelManager, "start_kernel", fake_start)
    monkeypatch.setattr(manager, "list_kernel_ids", lambda: ["a"])
    env = {"JUPYTER_TOKEN": "secret", "VOILA_TOKEN": "secret", "PATH": os.environ.get("PATH", ""),
           "QUERY_STRING": "token=secret&units=US", "VOILA_REQUEST_URL": "http://h:1/?token=secret"}
    assert asyncio.run(manager.start_kernel(env=env)) == "kernel-id"
    assert "JUPYTER_TOKEN" not in started["env"] and "VOILA_TOKEN" not in started["env"]
    assert "secret" not in started["env"]["QUERY_STRING"] + started["env"]["VOILA_REQUEST_URL"]
    monkeypatch.setattr(manager, "list_kernel_ids", lambda: ["a", "b"])
    with pytest.raises(Exception, match="already serves 2"):
        asyncio.run(manager.start_kernel())


# ----------------------------------------------------------------------------- runner
def test_runner_applies_only_the_newest_job():
    applied = []

    async def scenario():
        runner = Runner()
        assert not runner.synchronous
        for i in range(5):
            runner.submit("sweep", lambda i=i: i * 10, applied.append)
        runner.submit("map", lambda: "late", applied.append, delay=0.05)
        runner.submit("map", lambda: "latest", applied.append, delay=0.05)
        for _ in range(100):
            await asyncio.sleep(0.01)
            if not runner.busy:
                break
        return runner

    runner = asyncio.run(scenario())
    assert applied[-1] in (40, "latest") and 40 in applied and "latest" in applied and "late" not in applied
    assert applied.count(40) == 1 and not runner.busy


def test_runner_reports_errors():
    errors = []
    Runner(synchronous=True).submit("x", lambda: 1 / 0, lambda _: None, on_error=errors.append)
    assert isinstance(errors[0], ZeroDivisionError)


# ----------------------------------------------------------------------------- display and figures
def test_display_uses_convlib_units():
    us = Display("US")
    assert us.scalar(0.1143, "diameter") == pytest.approx(float(from_si(0.1143, "length", "inch")))
    assert us.label("h_convection") == "Btu/h·ft²·°F"
    assert Display("SI").text(333.15, "surface_temperature") == "60.0 °C"
    assert Display("SI").text(0.8, "relative_humidity") == "80.0 %"
    with pytest.raises(ValueError, match="unknown unit system"):
        Display("imperial")
    assert format_number(float("nan")) == "–"


def test_every_figure_is_valid_plotly(monkeypatch, study):
    """The app builds figures without plotly's property checks; here every figure is built with them."""
    monkeypatch.setattr(plotting, "VALIDATE", True)
    spec = compute.study_for_case(study, study.case)
    summary = compute.summarize_case(study.case)
    d = Display("US")
    result = compute.sweep_study(spec, spec.sweeps[0])
    unc = compute.uncertainty_study(spec, run_monte_carlo=True, samples=500)
    built = [figures.sweep_figure(result.sweeps[0], d, current=3.0), figures.spread_figure(result, d),
             figures.regime_figure(compute.regime_view(study.case, summary),
                                   compute.regime_map(study.case, summary), d),
             figures.regime_figure(compute.regime_view(study.case, summary), None, d),
             figures.uncertainty_figure(unc.tornado, unc.monte_carlo, d, summary.q_per_length),
             figures.uncertainty_figure(unc.tornado, None, d, summary.q_per_length),
             figures.insulation_figure(compute.insulation_view(study.case, 333.15, 60.0, True), d),
             figures.map_figure(run_study(spec.model_copy(update={"sweeps": [], "tornado": [], "uncertainty": None}))
                                .maps[0], d),
             figures.vessel_figure(compute.vessel_view(study.case, compute.VesselInputs(
                 shape="vertical_tank", contents_temperature=353.15,
                 **{k: v for k, v in settings.VESSEL.items() if k.startswith(("vessel_", "duct_"))})), d),
             figures.empty_figure("t", "m")]
    for fig in built:
        go.Figure(fig.to_dict())  # validates every property
        assert fig.layout.title.text


def test_sync_figure_updates_traces_and_replaces_annotations():
    a = go.Figure(go.Scatter(x=[1, 2], y=[1, 2], name="q"))
    a.add_annotation(text="old", x=1, y=1)
    b = go.Figure(go.Scatter(x=[1, 2, 3], y=[3, 2, 1], name="q"))
    b.add_vline(x=2)
    widget = go.FigureWidget(a)
    trace = widget.data[0]
    sync_figure(widget, b)
    assert widget.data[0] is trace and list(widget.data[0].y) == [3, 2, 1]
    assert len(widget.layout.annotations) == 0 and len(widget.layout.shapes) == 1
    c = go.Figure([go.Bar(x=[1], y=[1], name="other")])
    sync_figure(widget, c)
    assert [t.type for t in widget.data] == ["bar"]


def test_page_skips_front_end_extensions_it_does_not_use():
    cmd = serve.build_command(host="127.0.0.1", port=1, pool_size=0, local=True, max_kernels=1,
                              cull_idle_timeout=1, cull_interval=1)
    (flag,) = [c for c in cmd if c.startswith("--VoilaConfiguration.extension_denylist=")]
    assert json.loads(flag.split("=", 1)[1]) == ["jupyterlab-plotly", "jupyterlab_pygments"]
    # the widget bundle the plots load is still published (extra_labextensions_path, not an extension)
    assert any(c.startswith("--VoilaConfiguration.extra_labextensions_path=") for c in cmd)


def test_first_figure_widget_does_not_compile_jsonschemas_iri_grammars():
    # a fresh interpreter, as a new kernel: the widget class comes without rfc3987_syntax's grammars (lark),
    # jsonschema still works, and the module stays importable for whoever asks for it
    code = ("import sys\nfrom dashboard.plotly_widget import figure_widget\nw = figure_widget()\n"
            "assert 'jsonschema' in sys.modules and 'lark' not in sys.modules, sorted(sys.modules)\n"
            "import jsonschema\njsonschema.validate({'a': 1}, {'type': 'object'})\n"
            "import rfc3987_syntax\nprint('ok')\n")
    env = {**os.environ, "PYTHONPATH": str(Path(serve.__file__).resolve().parents[1])}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=120)
    assert out.returncode == 0 and out.stdout.strip() == "ok", out.stderr
