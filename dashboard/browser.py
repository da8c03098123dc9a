"""Tooling for the real-browser checks: a voila server on a free loopback port and a sandboxed Chromium.

Used by the browser tests, ``make screenshots`` and the latency benchmark; not
imported by the dashboard itself. Chromium is the system one
(``/usr/bin/chromium``, or ``$CONVLIB_CHROMIUM``); every request to an address
other than the loopback is aborted, and each run uses a fresh profile.
"""
from __future__ import annotations

import contextlib
import os
import shutil
import signal
import socket
import subprocess
import sys
import tempfile
import time
import urllib.error
import urllib.request
from pathlib import Path
from urllib.parse import urlparse

__all__ = ["CHROMIUM", "CHROMIUM_ARGS", "chromium_path", "free_port", "VoilaServer", "browser_context",
           "wait_for_dashboard", "LOOPBACK"]

CHROMIUM = "/usr/bin/chromium"
CHROMIUM_ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update",
                 "--disable-sync", "--no-first-run"]
LOOPBACK = ("127.0.0.1", "localhost", "::1", "[::1]")


def chromium_path() -> str | None:
    """Path of the Chromium to drive, or None when there is none."""
    path = os.environ.get("CONVLIB_CHROMIUM") or CHROMIUM
    return path if Path(path).exists() else shutil.which("chromium")


def free_port() -> int:
    """A free TCP port on the loopback interface."""
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


class VoilaServer:
    """``python -m dashboard.serve`` in a subprocess on a free loopback port.

    Parameters
    ----------
    token : str, optional
        Shared mode with this token; ``None`` runs local mode (no token).
    pool_size : int
        Preheated kernels (shared mode only).
    snapshot_dir : path-like, optional
        Snapshot directory of the kernels (default: a fresh temporary directory).
    extra_args : sequence of str
        More options of ``python -m dashboard.serve`` (grace times, caps, culling).
    notebook : path-like, optional
        Another notebook to serve the same way (default: the dashboard).
    """

    def __init__(self, token: str | None = None, pool_size: int = 0, snapshot_dir=None, timeout: float = 120.0,
                 log_path=None, extra_args=(), notebook=None):
        self.token = token
        self.notebook = notebook
        self.pool_size = pool_size
        self.port = free_port()
        self._tmp = None
        if snapshot_dir is None:
            self._tmp = tempfile.TemporaryDirectory(prefix="convlib-snapshots-")
            snapshot_dir = self._tmp.name
        self.snapshot_dir = Path(snapshot_dir)
        self.timeout = timeout
        self.log_path = Path(log_path or tempfile.mktemp(prefix="convlib-voila-", suffix=".log"))
        self.process: subprocess.Popen | None = None
        self.extra_args = [str(a) for a in extra_args]

    @property
    def base_url(self) -> str:
        return f"http://127.0.0.1:{self.port}/"

    @property
    def url(self) -> str:
        """The dashboard's URL (with the token in shared mode)."""
        return self.base_url + (f"?token={self.token}" if self.token else "")

    def start(self) -> "VoilaServer":
        cmd = [sys.executable, "-m", "dashboard.serve", "--port", str(self.port), "--host", "127.0.0.1",
               "--snapshot-dir", str(self.snapshot_dir), "--cull-idle-timeout", "600", "--cull-interval", "60"]
        env = dict(os.environ)
        env.pop("VOILA_TOKEN", None)
        if self.token is None:
            cmd.append("--local")
        else:
            cmd += ["--pool-size", str(self.pool_size)]
            env["VOILA_TOKEN"] = self.token
        if self.notebook is not None:
            cmd += ["--notebook", str(self.notebook)]
        cmd += self.extra_args  # later options win (e.g. --cull-idle-timeout)
        self._log = open(self.log_path, "wb")
        self.process = subprocess.Popen(cmd, stdout=self._log, stderr=subprocess.STDOUT, env=env,
                                        start_new_session=True, cwd=str(Path(__file__).resolve().parents[1]))
        deadline = time.monotonic() + self.timeout
        while time.monotonic() < deadline:
            if self.process.poll() is not None:
                raise RuntimeError(f"voila exited with {self.process.returncode}; log:\n{self.log()}")
            try:
                with urllib.request.urlopen(self.url, timeout=5):
                    return self
            except urllib.error.HTTPError:
                return self  # it answers (e.g. 403 without token)
            except (urllib.error.URLError, ConnectionError, TimeoutError, OSError):
                time.sleep(0.3)
        self.stop()
        raise RuntimeError(f"voila did not answer within {self.timeout:g} s; log:\n{self.log()}")

    def log(self) -> str:
        try:
            return self.log_path.read_text(errors="replace")[-5000:]
        except OSError:
            return ""

    def stop(self) -> None:
        """Stop voila and its kernels (the whole process group it leads)."""
        if self.process is not None and self.process.poll() is None:
            with contextlib.suppress(ProcessLookupError):
                os.killpg(self.process.pid, signal.SIGTERM)
            try:
                self.process.wait(timeout=15)
            except subprocess.TimeoutExpired:
                with contextlib.suppress(ProcessLookupError):
                    os.killpg(self.process.pid, signal.SIGKILL)
                self.process.wait(timeout=10)
        if getattr(self, "_log", None):
            self._log.close()
        if self._tmp is not None:
            self._tmp.cleanup()
            self._tmp = None

    def __enter__(self):
        return self.start()

    def __exit__(self, *exc):
        self.stop()


def _loopback_only(route):
    host = urlparse(route.request.url).hostname or ""
    if route.request.url.startswith(("data:", "blob:")) or host in LOOPBACK:
        route.continue_()
    else:
        route.abort()


@contextlib.contextmanager
def browser_context(playwright, viewport=(1280, 800), downloads: bool = False):
    """A headless Chromium context with a fresh profile that reaches only the loopback."""
    path = chromium_path()
    if path is None:
        raise RuntimeError("no Chromium: install it (apt-get install -y chromium) or set CONVLIB_CHROMIUM")
    profile = tempfile.mkdtemp(prefix="convlib-chromium-")
    context = playwright.chromium.launch_persistent_context(
        profile, executable_path=path, headless=True, args=CHROMIUM_ARGS,
        viewport={"width": viewport[0], "height": viewport[1]}, accept_downloads=downloads)
    try:
        context.route("**/*", _loopback_only)
        yield context
    finally:
        context.close()
        shutil.rmtree(profile, ignore_errors=True)


def wait_for_dashboard(page, timeout: float = 120_000) -> None:
    """Wait until the result cards show numbers and a plotly graph has drawn data."""
    page.wait_for_selector(".cl-card-q-per-length .cl-value", timeout=timeout)
    page.wait_for_function(
        "() => { const v = document.querySelector('.cl-card-q-per-length .cl-value');"
        " return v && v.textContent.trim().length > 0; }", timeout=timeout)
    page.wait_for_function(
        "() => [...document.querySelectorAll('.js-plotly-plot')].some(g => g.data && g.data.length > 0)",
        timeout=timeout)
