"""Helpers shared by the dashboard tests."""
from __future__ import annotations

import os

import pytest

from dashboard.browser import chromium_path


def show(app, key: str) -> None:
    """Open the tab of panel ``key``."""
    app.tabs.selected_index = app.order.index(key)


def trace(widget, name: str):
    """The trace of a FigureWidget with this name (exactly one)."""
    found = [t for t in widget.data if t.name == name]
    assert len(found) == 1, f"{name!r} not in {[t.name for t in widget.data]}"
    return found[0]


def require_browser() -> None:
    """Skip (outside CI) or fail (under CI) when Playwright or Chromium is missing."""
    reason = None
    try:
        import playwright.sync_api  # noqa: F401
    except ImportError:
        reason = "playwright is not installed"
    if reason is None and chromium_path() is None:
        reason = "Chromium not found (/usr/bin/chromium; apt-get install -y chromium)"
    if reason is not None:
        if "CI" in os.environ:
            pytest.fail(f"browser tests must run under CI: {reason}")
        print(f"\nskipping the browser tests: {reason}")
        pytest.skip(reason)
