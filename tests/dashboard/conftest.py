"""Fixtures of the dashboard tests: an app built in-process on the demo study, synchronous jobs."""
from __future__ import annotations

import pytest
from convlib.study import load_demo_study

from dashboard.app import App
from dashboard.runner import Runner


@pytest.fixture
def study():
    return load_demo_study()


@pytest.fixture
def app(study, tmp_path):
    """The dashboard on the demo study; jobs run at once (no kernel loop), snapshots in a temp dir."""
    return App(study, snapshot_dir=tmp_path / "snapshots", runner=Runner(synchronous=True))
