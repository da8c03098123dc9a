"""Real-browser check of the horizontal tank on the tanks tab: picked from the menu, its controls (shell length,
heads) are shown and nothing is cut off at 1280×800 and 1024×768, in SI and US customary units.

Skipped outside CI when Chromium or Playwright is missing (as the other browser tests).
"""
from __future__ import annotations

from dashboard.browser import VoilaServer, browser_context, wait_for_dashboard
from dashboard.layout_check import clipped
from dashboard.screenshots import open_tab, wait_for_panel
from dashboard.settings import PANELS

from dashboard_helpers import require_browser


def test_horizontal_tank_controls_fit():
    require_browser()
    from playwright.sync_api import sync_playwright

    title = dict(PANELS)["vessels"]
    with VoilaServer() as server, sync_playwright() as p, browser_context(p) as context:
        page = context.new_page()
        page.goto(server.url)
        wait_for_dashboard(page)
        open_tab(page, title)
        wait_for_panel(page, "vessels")
        page.locator(".cl-vessel-shape select").select_option(label="horizontal tank")
        page.wait_for_selector(".cl-vessel-heads select", state="visible", timeout=20_000)
        page.locator(".cl-vessel-heads select").select_option(label="torispherical (F&D)")
        page.wait_for_function("() => [...document.querySelectorAll('.cl-panel-vessels .cl-card')]"
                               ".some(c => c.textContent.includes('heads'))", timeout=30_000)
        problems = []
        for units in ("SI", "US customary"):
            page.locator(".cl-units button", has_text=units).click()
            page.wait_for_timeout(1500)
            for width, height in ((1280, 800), (1024, 768)):
                page.set_viewport_size({"width": width, "height": height})
                page.wait_for_timeout(300)
                problems += [f"{width}×{height} {units}: {c['what']} “{c['text']}” ({c['reason']})"
                             for c in clipped(page)]
        assert not problems, "\n".join(problems)
