"""The snapshot view's buttons: save the study as shown, open, verify, compare, report (work in the runner)."""
from __future__ import annotations

from pathlib import Path

from . import compute, storage
from .compute import snapshot as cl_snapshot
from .refresh import Job, Refresher
from .report import render_report
from .store import Store

__all__ = ["SnapshotActions", "snapshot_spec"]


def snapshot_spec(store: Store, uncertainty) -> compute.StudySpec:
    """The study to save: the current case, the sweep on screen and the Monte Carlo settings of the
    uncertainty panel (when the study has distributions or a Monte Carlo result is shown)."""
    spec = store.spec
    sweeps = list(spec.sweeps)
    axis = store.axis()
    if axis is not None and axis.input not in [s.input for s in sweeps]:
        sweeps.append(axis)
    u = spec.uncertainty
    if u is not None or store.monte_carlo is not None:
        u = compute.monte_carlo_settings(spec, uncertainty.samples, uncertainty.seed, uncertainty.model_form)
    return compute.StudySpec.model_validate({**spec.model_dump(), "sweeps": [s.model_dump() for s in sweeps],
                                             "uncertainty": None if u is None else u.model_dump()})


class SnapshotActions:
    """Handles ``action`` of the snapshot panel (``save, open, verify, compare, report, refresh``).

    Parameters
    ----------
    store : Store
    refresher : Refresher
        Runs the work (its runner) and refreshes the views after an opened snapshot.
    directory : Path
        The snapshot directory (files elsewhere are refused).
    """

    def __init__(self, store: Store, refresher: Refresher, directory: Path):
        self.store, self.refresher, self.directory = store, refresher, Path(directory)
        self.panel = refresher.panels["snapshots"]
        self.panel.on_action(self.handle)

    def checked(self, path_text: str | None) -> Path:
        """``path_text`` as a path inside the snapshot directory (``ValueError`` otherwise)."""
        if not path_text:
            raise ValueError("select a snapshot in the list first")
        path = Path(path_text).resolve()
        if path.parent != self.directory.resolve():
            raise ValueError("that file is not in the snapshot directory")
        return path

    def _run(self, work, done) -> None:
        self.refresher.submit("snapshots", Job("", work), freeze=True, on_done=done)

    def handle(self, action: str) -> None:
        """Do one button's work; a refused input becomes the panel's message."""
        panel = self.panel
        panel.set_message()
        try:
            if action == "save":
                self.save(panel.author, panel.note, panel.name or None)
            elif action == "open":
                path = self.checked(panel.selected)
                self._run(lambda: cl_snapshot.load(path), self.opened)
            elif action == "verify":
                path = self.checked(panel.selected)
                progress = self.refresher.progress_message("snapshots", "Re-running the study")
                self._run(lambda: cl_snapshot.verify(path, progress=progress), self._verified)
            elif action == "compare":
                a, b = self.checked(panel.selected), self.checked(panel.other)
                self._run(lambda: cl_snapshot.diff(a, b), lambda d: panel.show_text(f"{a.name} → {b.name}", d.text()))
            elif action == "report":
                path, units = self.checked(panel.selected), self.store.units
                self._run(lambda: render_report(cl_snapshot.load(path), units).encode(),
                          lambda data: panel.show_link(data, path.name.removesuffix(".json") + ".html"))
            elif action == "refresh":
                self.refresher.refresh("snapshots")
        except ValueError as exc:
            panel.set_message([str(exc)], "error")

    def save(self, author: str = "", note: str = "", name: str | None = None) -> None:
        """Run the whole study as shown and save it in the snapshot directory."""
        path = storage.snapshot_path(self.directory, name or storage.default_name(self.store.study.name))
        spec = snapshot_spec(self.store, self.refresher.panels["uncertainty"])
        saved_by = storage.viewer_identity()  # the shared server's name for the viewer ("" on a local dashboard)
        progress = self.refresher.progress_message("snapshots", "Running the study")

        def run():
            result = compute.run_study(spec, progress=progress)
            path.parent.mkdir(parents=True, exist_ok=True)
            written = cl_snapshot.save(path, spec, result, author=author, note=note, saved_by=saved_by)
            storage.record_snapshot(path.parent, written)  # the listing that follows need not open it
            return written

        def saved(written):
            self.panel.set_message([f"Saved {written.name}"], "info")
            self.refresher.refresh("snapshots")

        self._run(run, saved)

    def opened(self, snap) -> None:
        """Show a loaded snapshot: its study and case in every control, its stored uncertainty results."""
        store = self.store
        with self.refresher.batch():
            store.open(snap.spec, f"opened from {snap.path.name if snap.path else 'a snapshot'}")
        store.tornado = snap.result.tornado
        store.monte_carlo_stale = False
        store.monte_carlo = snap.result.monte_carlo
        who = snap.author or "no author"
        self.panel.set_message([f"Opened {snap.path.name if snap.path else ''} ({who}, {snap.created_utc}, "
                                f"SHA-256 {snap.sha256[:16]}…): every control restored."], "info")

    def _verified(self, report) -> None:
        self.panel.show_text("Verification", report.text())
        verdict = ("The numbers agree with a re-run." if report.agrees else
                   "The numbers do NOT agree with a re-run: see the quantities marked NO.")
        self.panel.set_message([verdict], "info" if report.agrees else "error")
