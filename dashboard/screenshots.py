"""Save a PNG of each panel of the dashboard on the demo study (``make screenshots``).

Starts voila on a free loopback port, opens the dashboard in headless Chromium
at 1280x800, clicks through the tabs and saves ``00-first-view.png`` (what the
window shows) and ``NN-<panel>.png`` (the whole app with that tab open).
"""
from __future__ import annotations

import argparse
import sys
from pathlib import Path

from . import settings
from .browser import VoilaServer, browser_context, chromium_path, wait_for_dashboard

__all__ = ["main", "open_tab", "wait_for_panel", "save_snapshot"]


def open_tab(page, title: str) -> None:
    """Click the tab with this title."""
    page.locator(".cl-tabs .lm-TabBar-tab", has_text=title).first.click()


def wait_for_panel(page, key: str, timeout: float = 60_000) -> None:
    """Wait until the panel's plotly graph is drawn with data (snapshots: its list)."""
    if key == "snapshots":
        page.wait_for_selector(".cl-panel-snapshots .cl-snapshot-list", state="visible", timeout=timeout)
        return
    page.wait_for_function(
        "(key) => { const g = document.querySelector(`.cl-panel-${key} .js-plotly-plot`);"
        " return g && g.data && g.data.some(t => (t.x && t.x.length) || (t.z && t.z.length > 0 && t.z[0].length)); }",
        arg=key, timeout=timeout)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(prog="python -m dashboard.screenshots", description=__doc__.split("\n\n")[0])
    parser.add_argument("--out", default="screenshots", help="directory for the PNG files")
    parser.add_argument("--units", choices=("SI", "US"), default="SI")
    args = parser.parse_args(argv)
    if chromium_path() is None:
        print("no Chromium found (apt-get install -y chromium)", file=sys.stderr)
        return 2
    from playwright.sync_api import sync_playwright

    out = Path(args.out)
    out.mkdir(parents=True, exist_ok=True)
    with VoilaServer() as server, sync_playwright() as p, browser_context(p) as context:
        page = context.new_page()
        page.goto(server.url)
        wait_for_dashboard(page)
        if args.units == "US":
            page.locator(".cl-units button", has_text="US customary").click()
        page.wait_for_timeout(1500)
        page.screenshot(path=str(out / "00-first-view.png"))
        page.set_viewport_size({"width": 1280, "height": 1900})  # whole panels, nothing scrolled away
        for i, (key, title) in enumerate(settings.PANELS, start=1):
            open_tab(page, title)
            wait_for_panel(page, key)
            if key == "snapshots":
                _save_and_verify(page)
            page.wait_for_timeout(2500)  # debounced parts (map, Monte Carlo, sizing)
            path = out / f"{i:02d}-{key}.png"
            page.locator(".cl-app").screenshot(path=str(path))
            print(path)
        other = "SI" if args.units == "US" else "US customary"
        page.locator(".cl-units button", has_text=other).click()
        open_tab(page, "Sweep")
        page.wait_for_timeout(2500)
        path = out / f"{len(settings.PANELS) + 1:02d}-sweep-{'si' if args.units == 'US' else 'us'}.png"
        page.locator(".cl-app").screenshot(path=str(path))
        print(path)
    return 0


def save_snapshot(page, author: str, note: str = "", timeout: float = 120_000) -> None:
    """On the open snapshots tab: save the study as shown and wait until the list shows a file."""
    page.locator(".cl-snapshot-author input").fill(author)
    page.locator(".cl-snapshot-note textarea").fill(note)
    page.locator(".cl-snapshot-save").click()
    page.wait_for_function("() => document.querySelectorAll('.cl-snapshot-list option').length >= 1",
                           timeout=timeout)


def _save_and_verify(page) -> None:
    """Save one snapshot of the demo study and verify it, so that the panel shows a list and a report."""
    save_snapshot(page, "Screenshot", "demo study as opened")
    page.locator(".cl-snapshot-verify").click()
    page.wait_for_selector(".cl-snapshot-output pre", timeout=60_000)


if __name__ == "__main__":
    sys.exit(main())
