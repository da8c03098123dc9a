"""Snapshots: save the study as shown, list, open, verify, compare, download a report."""
from __future__ import annotations

import base64
import html
import tempfile
from pathlib import Path
from typing import Callable

import ipywidgets as widgets
import traitlets

from ..storage import SnapshotEntry
from .base import Panel
from .controls import DESCRIPTION_STYLE

__all__ = ["SnapshotPanel", "download_link", "entry_label", "is_temporary"]

def download_link(data: bytes, filename: str, text: str) -> str:
    """An HTML anchor that downloads ``data`` as ``filename`` (a data: URI; nothing is served)."""
    encoded = base64.b64encode(data).decode("ascii")
    return (f'<a class="cl-download" download="{html.escape(filename)}" '
            f'href="data:text/html;base64,{encoded}">{html.escape(text)}</a>')


def entry_label(entry: SnapshotEntry) -> str:
    """One line of the snapshot list: the file name first (what people look for), then who, and when
    unless the name already says it (the automatic names end in the UTC date and time)."""
    name = entry.path.name.removesuffix(".json").removesuffix(".snapshot")
    if entry.problem:
        return f"{name} · cannot be read"
    label = f"{name} · {entry.author or 'no author'}"
    if entry.created_utc[:10].replace("-", "") not in name:
        label += f" · {entry.created_utc.replace('T', ' ').replace('Z', '')[:16]} UTC"
    return label


def is_temporary(directory: Path | str) -> bool:
    """True when ``directory`` lies in the system's temporary folder (emptied at reboot on many systems)."""
    try:
        Path(directory).resolve().relative_to(Path(tempfile.gettempdir()).resolve())
    except ValueError:
        return False
    return True


class SnapshotPanel(Panel):
    """Save, list, open, verify and compare snapshots.

    Traits
    ------
    entries : list of SnapshotEntry
        The directory's snapshots, newest first (set by the app).
    directory : str
        Where snapshots are saved (shown).
    selected : str
        Path of the selected snapshot ("" for none).
    author, note, name : str
        For the next save (the name is optional; made safe by the app).

    Buttons call the handler registered with :meth:`on_action` as ``handler(action)``
    with ``action`` one of ``save, open, verify, compare, report, refresh``.
    """

    entries = traitlets.List(traitlets.Instance(SnapshotEntry))
    directory = traitlets.Unicode("")
    selected = traitlets.Unicode("", allow_none=True)
    other = traitlets.Unicode("", allow_none=True)
    author = traitlets.Unicode("")
    note = traitlets.Unicode("")
    name = traitlets.Unicode("")

    def __init__(self, directory: Path | str, **kwargs):
        super().__init__(**kwargs)
        self._handlers: list[Callable[[str], None]] = []
        self.directory = str(directory)
        self.author_box = widgets.Text(description="Author", placeholder="your name", style=DESCRIPTION_STYLE,
                                       layout=widgets.Layout(width="420px"))
        self.name_box = widgets.Text(description="File name", placeholder="automatic (study name and time)",
                                     style=DESCRIPTION_STYLE, layout=widgets.Layout(width="420px"))
        self.note_box = widgets.Textarea(description="Note", placeholder="what this snapshot is for",
                                         style=DESCRIPTION_STYLE, layout=widgets.Layout(width="600px", height="60px"))
        for box, trait in ((self.author_box, "author"), (self.note_box, "note"), (self.name_box, "name")):
            box.add_class(f"cl-snapshot-{trait}")
            traitlets.link((box, "value"), (self, trait))
        self.buttons = {}
        for action, text, style in (("save", "Save snapshot", "primary"), ("open", "Open", ""),
                                    ("verify", "Verify", ""), ("compare", "Compare", ""),
                                    ("report", "HTML report", ""), ("refresh", "Refresh list", "")):
            button = widgets.Button(description=text, button_style=style, layout=widgets.Layout(width="auto", flex="0 0 auto"))
            button.add_class(f"cl-snapshot-{action}")
            button.on_click(lambda _, a=action: self._fire(a))
            self.buttons[action] = button
        self.listing = widgets.Select(options=[], rows=8, layout=widgets.Layout(width="100%"))
        self.listing.add_class("cl-snapshot-list")
        self.compare_box = widgets.Dropdown(description="Compare with", style=DESCRIPTION_STYLE,
                                            layout=widgets.Layout(width="600px", flex="0 1 auto"))
        traitlets.link((self.listing, "value"), (self, "selected"))
        traitlets.link((self.compare_box, "value"), (self, "other"))
        self.where = widgets.HTML()
        self.output = widgets.HTML()
        self.output.add_class("cl-snapshot-output")
        self.link = widgets.HTML()
        self.link.add_class("cl-snapshot-link")
        b = self.buttons
        self.children = [
            widgets.HTML('<div class="cl-section">Save the study as shown</div>'), self.author_box, self.name_box,
            self.note_box, widgets.HBox([b["save"]]), self.where,
            widgets.HTML('<div class="cl-section">Saved snapshots</div>'), self.listing,
            widgets.HBox([b["open"], b["verify"], b["report"], b["refresh"]]),
            widgets.HBox([self.compare_box, b["compare"]], layout=widgets.Layout(width="100%")),
            self.message, self.output, self.link]
        self._entries_changed()

    def interactive(self):
        return [*self.buttons.values(), self.listing, self.compare_box, self.author_box, self.note_box,
                self.name_box]

    def reset(self):
        super().reset()
        self.note = ""
        self.name = ""
        self.output.value = ""
        self.link.value = ""

    def on_action(self, handler: Callable[[str], None]) -> None:
        """Register ``handler(action)`` for the buttons."""
        self._handlers.append(handler)

    def _fire(self, action: str) -> None:
        for handler in self._handlers:
            handler(action)

    def show_text(self, title: str, text: str) -> None:
        """Show a report (verification, comparison) as preformatted text."""
        self.output.value = (f'<div class="cl-section">{html.escape(title)}</div>'
                             f'<pre class="cl-pre">{html.escape(text)}</pre>')

    def show_link(self, data: bytes, filename: str) -> None:
        """Offer ``data`` for download as ``filename``."""
        self.link.value = download_link(data, filename, f"Download {filename} ({len(data) / 1e6:.1f} MB)")

    @traitlets.observe("directory")
    def _directory_changed(self, change=None):
        if hasattr(self, "where"):
            where = f'<div class="cl-hint">Saved in {html.escape(self.directory)}</div>'
            if is_temporary(self.directory):
                where += ('<div class="cl-msg cl-msg-warn">This folder is a temporary one: its snapshots may be '
                          'lost when the machine restarts. Start the dashboard with --snapshot-dir to keep '
                          'them elsewhere.</div>')
            self.where.value = where

    @traitlets.observe("entries")
    def _entries_changed(self, change=None):
        if not hasattr(self, "listing"):
            return
        options = [(entry_label(e), str(e.path)) for e in self.entries]
        keep, keep_other = self.selected, self.other
        with self.hold_trait_notifications():
            self.listing.options = options
            self.compare_box.options = [("—", "")] + options
            paths = [p for _, p in options]
            self.listing.value = keep if keep in paths else (paths[0] if paths else None)
            self.compare_box.value = keep_other if keep_other in paths else ""
        self._directory_changed()
