"""Short form of the load test (``make loadtest`` runs the long one): two viewers on a real shared server.

Asserts what must hold at any load: every page loads, no page or HTTP error, every slider press updates the
result card, and the kernels of closed tabs end (the server returns to its preheated pool) within the grace
times of ``dashboard.settings.SERVE`` plus one sweep. Latency figures are printed, never asserted.
"""
from __future__ import annotations

from test_dashboard_browser import _require_browser

from dashboard import settings
from dashboard.loadtest import run_load


def test_two_viewers_work_and_their_kernels_end_after_close():
    _require_browser()
    report = run_load(viewers=2, duration=20.0, pool_size=1, settle=90.0)
    print("\n" + "\n".join(report.lines()))
    assert report.loaded == 2, report.errors
    assert not report.errors and not report.http_errors, report.errors + report.http_errors
    assert report.latencies and report.missed_updates == 0
    assert report.seconds_to_pool is not None, f"{report.kernels_after} kernels still running"
    assert report.seconds_to_pool <= settings.SERVE.disconnect_grace + 2 * settings.SERVE.sweep_interval + 15
