"""Real-browser tests: voila serving the dashboard, headless Chromium driven by Playwright.

The server runs on a free loopback port (subprocess, killed at teardown); the
browser reaches nothing but the loopback. Expected numbers come from convlib
called here. Outside CI (``CI`` unset) the tests are skipped, with the reason
printed, when Chromium or Playwright is missing; under CI they fail instead.
"""
from __future__ import annotations

import os
import urllib.error
import urllib.request

import numpy as np
import pytest
from convlib import snapshot as cl_snapshot
from convlib.study import evaluate_case, load_demo_study, run_study

from dashboard import compute
from dashboard.browser import VoilaServer, browser_context, wait_for_dashboard
from dashboard.display import Display
from dashboard.screenshots import open_tab, wait_for_panel
from dashboard.settings import PANELS
from dashboard_helpers import require_browser as _require_browser


@pytest.fixture(scope="module")
def server():
    _require_browser()
    with VoilaServer() as srv:
        yield srv


@pytest.fixture(scope="module")
def pw():
    _require_browser()
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        yield p


@pytest.fixture(scope="module")
def page(server, pw):
    with browser_context(pw) as context:
        page = context.new_page()
        page.goto(server.url)
        wait_for_dashboard(page)
        yield page


def _card(page, key="q-per-length") -> str:
    return page.locator(f".cl-card-{key} .cl-card-body").inner_text().strip()


def _q_text(case) -> str:
    return Display("SI").text(abs(float(evaluate_case(case).q_per_length)), "q_per_length")


def _wind_key(page, key: str, expected_wind: float) -> None:
    handle = page.locator(".cl-control-wind-speed .noUi-handle").first
    handle.focus()
    page.keyboard.press(key)
    page.wait_for_function(
        "(v) => Math.abs(parseFloat(document.querySelector('.cl-control-wind-speed .widget-readout').textContent)"
        " - v) < 1e-9", arg=expected_wind, timeout=20_000)


def test_page_loads_with_convlib_numbers(page):
    assert _card(page) == _q_text(load_demo_study().case)


def test_units_switch_keeps_the_case(page):
    """Switching units converts what is shown; the browser snapping sliders to the new grid changes nothing."""
    q = float(evaluate_case(load_demo_study().case).q_per_length)
    for label, system in (("US customary", "US"), ("SI", "SI")):
        page.locator(".cl-units button", has_text=label).click()
        expected = Display(system).text(q, "q_per_length")
        page.wait_for_function("(t) => document.querySelector('.cl-card-q-per-length .cl-card-body').innerText"
                               ".replace(/\\s+/g, ' ').trim() === t", arg=expected, timeout=20_000)
        page.wait_for_timeout(500)  # any echo of snapped slider values has arrived by now
        assert _card(page) == expected


def test_every_panel_renders(page):
    for key, title in PANELS:
        open_tab(page, title)
        wait_for_panel(page, key)
    open_tab(page, "Sweep")


def test_arrow_key_on_slider_updates_card_and_plot(page):
    open_tab(page, "Sweep")
    study = load_demo_study()
    case = study.case.model_copy(update={"wind_speed": 3.1})
    _wind_key(page, "ArrowRight", 3.1)
    expected_card = _q_text(case)
    page.wait_for_function("(t) => document.querySelector('.cl-card-q-per-length .cl-card-body').innerText"
                           ".replace(/\\s+/g, ' ').trim() === t", arg=expected_card, timeout=20_000)
    # the sweep redraws for the new case: the case marker at 3.1 m/s and run_study's curve
    page.wait_for_function(
        "() => { const g = document.querySelector('.cl-panel-sweep .js-plotly-plot');"
        " return g && (g.layout.shapes || []).some(s => Math.abs(s.x0 - 3.1) < 1e-9); }", timeout=20_000)
    axis = next(a for a in compute.sweep_axes(study, case) if a.input == "wind_speed")
    expected = compute.sweep_study(compute.study_for_case(study, case), axis).sweeps[0]
    shown = page.evaluate(
        "() => { const g = document.querySelector('.cl-panel-sweep .js-plotly-plot');"
        " const t = g.data.find(t => t.name === 'total (selected laws)'); return Array.from(t.y); }")
    np.testing.assert_allclose(shown, expected.default.q_per_length, rtol=1e-9)


def test_snapshot_save_and_open_restores_controls(page, server):
    open_tab(page, "Snapshots")
    wait_for_panel(page, "snapshots")
    page.locator(".cl-snapshot-author input").fill("Browser Test")
    page.locator(".cl-snapshot-save").click()
    page.wait_for_function("() => document.querySelectorAll('.cl-snapshot-list option').length >= 1",
                           timeout=30_000)
    files = sorted(server.snapshot_dir.glob("*.snapshot.json"))
    assert len(files) == 1
    snap = cl_snapshot.load(files[0])  # valid, hash-checked
    assert snap.author == "Browser Test" and snap.spec.case.wind_speed == pytest.approx(3.1)
    rerun = run_study(snap.spec)
    assert rerun.base.q_per_length == snap.result.base.q_per_length
    # move away, then open the snapshot: the slider and the card come back
    _wind_key(page, "ArrowRight", 3.2)
    page.locator(".cl-snapshot-list select").select_option(index=0)  # newest first: the one just saved
    page.locator(".cl-snapshot-open").click()
    _wait_readout(page, 3.1)
    page.wait_for_function("(t) => document.querySelector('.cl-card-q-per-length .cl-card-body').innerText"
                           ".replace(/\\s+/g, ' ').trim() === t", arg=_q_text(snap.spec.case), timeout=20_000)


def _wait_readout(page, value):
    page.wait_for_function(
        "(v) => Math.abs(parseFloat(document.querySelector('.cl-control-wind-speed .widget-readout').textContent)"
        " - v) < 1e-9", arg=value, timeout=20_000)


def test_shared_mode_needs_the_token(pw):
    with VoilaServer(token="t0ken-for-tests", pool_size=1) as srv:
        request = urllib.request.Request(srv.base_url)
        opener = urllib.request.build_opener(_NoRedirect())
        with pytest.raises(urllib.error.HTTPError) as refused:
            opener.open(request, timeout=30)
        assert refused.value.code in (302, 403)
        if refused.value.code == 302:
            assert "login" in refused.value.headers.get("Location", "")
        with browser_context(pw) as context:
            page = context.new_page()
            response = page.goto(srv.url)
            assert response.status == 200
            wait_for_dashboard(page)
            assert _card(page) == _q_text(load_demo_study().case)
            assert "build_app" not in page.content()  # notebook sources stripped


class _NoRedirect(urllib.request.HTTPRedirectHandler):
    def redirect_request(self, *args, **kwargs):
        return None
