"""Real-browser check that nothing an engineer reads is cut off: tab titles, result cards, control labels,
buttons, menus and the snapshot list, at 1280×800 and 1024×768, in SI and in US customary units.

One server and one page for the whole module; the window is resized and the units switched in place.
Skipped outside CI when Chromium or Playwright is missing (as the other browser tests).
"""
from __future__ import annotations

import pytest

from dashboard.browser import VoilaServer, browser_context, wait_for_dashboard
from dashboard.layout_check import clipped
from dashboard.screenshots import open_tab, save_snapshot, wait_for_panel
from dashboard.settings import PANELS

from dashboard_helpers import require_browser as _require_browser

VIEWPORTS = ((1280, 800), (1024, 768))
UNITS = ("SI", "US customary")


@pytest.fixture(scope="module")
def page():
    _require_browser()
    from playwright.sync_api import sync_playwright

    with VoilaServer() as server, sync_playwright() as p, browser_context(p) as context:
        page = context.new_page()
        page.goto(server.url)
        wait_for_dashboard(page)
        # one saved snapshot, so that the list shows a real entry
        open_tab(page, "Snapshots")
        wait_for_panel(page, "snapshots")
        save_snapshot(page, "Layout check")
        yield page


def test_the_checker_finds_a_cut_label(page):
    """The check itself: a label squeezed to 20 px is reported (so a pass below means something)."""
    open_tab(page, "Sweep")
    page.evaluate("() => { const l = document.querySelector('.cl-control-wind-speed .widget-label');"
                  " l.dataset.keep = l.style.cssText; l.style.cssText += ';width:20px;max-width:20px;"
                  "min-width:20px;flex:0 0 20px;white-space:nowrap;overflow:hidden'; }")
    try:
        found = clipped(page)
    finally:
        page.evaluate("() => { const l = document.querySelector('.cl-control-wind-speed .widget-label');"
                      " l.style.cssText = l.dataset.keep; }")
    assert any(c["what"] == "control label" and c["text"].startswith("Wind speed") for c in found), found


@pytest.mark.parametrize("units", UNITS)
def test_nothing_is_cut_off_or_wraps_past_two_lines(page, units):
    page.locator(".cl-units button", has_text=units).click()
    unit = "mph" if units != "SI" else "m/s"
    page.wait_for_function("(u) => document.querySelector('.cl-control-wind-speed .widget-label')"
                           ".textContent.includes(u)", arg=unit, timeout=20_000)
    problems = []
    for width, height in VIEWPORTS:
        page.set_viewport_size({"width": width, "height": height})
        for key, title in PANELS:
            open_tab(page, title)
            page.wait_for_selector(f".cl-panel-{key}", state="visible", timeout=20_000)
            if key == "survey":  # its table, cards and chart come with the survey (computed when first shown)
                wait_for_panel(page, key)
            page.wait_for_timeout(300)  # the panel's controls laid out
            problems += [f"{width}×{height} {units}, {title}: {c['what']} “{c['text']}” ({c['reason']})"
                         for c in clipped(page)]
    page.set_viewport_size({"width": 1280, "height": 800})
    assert not sorted(set(problems)), "\n".join(sorted(set(problems)))
