"""Real-browser check of the survey tab's upload: a file chosen in the page's file dialog passes the widget guard;
one that is not a survey leaves the ranked list as it was with the reason shown, a good one replaces it, and the
button goes back to the demo survey.

Skipped outside CI when Chromium or Playwright is missing (as the other browser tests).
"""
from __future__ import annotations

from dashboard.browser import VoilaServer, browser_context, wait_for_dashboard
from dashboard.screenshots import open_tab, wait_for_panel
from dashboard.settings import PANELS

from dashboard_helpers import require_browser

_TABLE = ".cl-panel-survey .cl-survey-table"
_SHOWN = ".cl-panel-survey .cl-hint"


def _choose(page, path) -> None:
    with page.expect_file_chooser() as chooser:
        page.locator(".cl-survey-upload").click()
    chooser.value.set_files(str(path))


def test_upload_in_the_browser(tmp_path):
    require_browser()
    from playwright.sync_api import sync_playwright

    from convlib.survey import demo_survey_path

    bad = tmp_path / "not_a_survey.csv"
    bad.write_text("a,b\n1,2\n", encoding="utf-8")
    mine = tmp_path / "site.csv"
    mine.write_bytes(demo_survey_path().read_bytes().replace(b"FS-101", b"SITE-1"))
    with VoilaServer() as server, sync_playwright() as p, browser_context(p) as context:
        page = context.new_page()
        page.goto(server.url)
        wait_for_dashboard(page)
        open_tab(page, dict(PANELS)["survey"])
        wait_for_panel(page, "survey")
        table = page.locator(_TABLE).inner_text()
        assert "FS-101" in table
        _choose(page, bad)
        page.wait_for_selector(".cl-panel-survey .cl-msg-error", timeout=30_000)
        message = page.locator(".cl-panel-survey .cl-msg-error").inner_text()
        assert "not_a_survey.csv" in message and "unknown survey column" in message
        assert page.locator(_TABLE).inner_text() == table
        _choose(page, mine)
        page.wait_for_function("(s) => document.querySelector(s).textContent.includes('site.csv')", arg=_SHOWN,
                               timeout=30_000)
        assert "SITE-1" in page.locator(_TABLE).inner_text()
        page.locator(".cl-survey-demo").click()
        page.wait_for_function("(s) => document.querySelector(s).textContent.includes('demo survey')", arg=_SHOWN,
                               timeout=30_000)
        assert page.locator(_TABLE).inner_text() == table
