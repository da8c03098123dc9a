"""Helpers shared by the dashboard tests."""
from __future__ import annotations


def show(app, key: str) -> None:
    """Open the tab of panel ``key``."""
    app.tabs.selected_index = app.order.index(key)


def trace(widget, name: str):
    """The trace of a FigureWidget with this name (exactly one)."""
    found = [t for t in widget.data if t.name == name]
    assert len(found) == 1, f"{name!r} not in {[t.name for t in widget.data]}"
    return found[0]

