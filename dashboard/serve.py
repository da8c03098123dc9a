"""Serve the dashboard with voila: locally for one engineer, or shared by a team.

Shared mode (the default)::

    python -m dashboard.serve --host 0.0.0.0 --port 8866 --pool-size 2 --snapshot-dir /srv/convlib/snapshots

* A token is required: ``--token``, else ``$VOILA_TOKEN``, else one is generated with
  :mod:`secrets` and printed. It reaches voila through ``$JUPYTER_TOKEN`` (never on the
  command line, so ``ps`` does not show it) and is removed from every kernel's environment.
* Notebook sources are stripped; no tracebacks are sent to browsers; voila exposes no
  execute endpoint (widget messages only), so viewers cannot run code.
* Kernels are preheated in a pool (``--pool-size``); idle kernels are culled after
  ``--cull-idle-timeout`` seconds even with a tab still open (``cull_connected``); a closed
  tab does not end its kernel by itself. At most ``--max-kernels`` kernels run at once
  (pool included): voila has no such option, :class:`CappedKernelManager` adds it.
* Snapshots are saved only in ``--snapshot-dir`` (``$CONVLIB_SNAPSHOT_DIR`` for the kernels).

Local mode (``--local``, used by ``make demo``): loopback only, no token, no pool.
"""
from __future__ import annotations

import argparse
import os
import secrets
import sys
from pathlib import Path

from jupyter_server.services.kernels.kernelmanager import AsyncMappingKernelManager
from tornado import web
from traitlets import Integer

from . import settings
from .settings import BUNDLE_ENV

__all__ = ["CappedKernelManager", "build_command", "main", "NOTEBOOK"]

NOTEBOOK = Path(__file__).with_name("app.ipynb")
#: Where voila publishes plotly's widget bundle (the directory of plotly's package data, served under
#: /voila/labextensions/); the kernels learn the path from $CONVLIB_PLOTLY_BUNDLE.
BUNDLE_PATH = "voila/labextensions/widgetbundle.js"
_SECRET_ENV = ("JUPYTER_TOKEN", "JUPYTER_TOKEN_FILE", "VOILA_TOKEN")


class CappedKernelManager(AsyncMappingKernelManager):
    """A kernel manager that refuses new kernels beyond :attr:`max_kernels` and keeps secrets out of kernels."""

    max_kernels = Integer(settings.SERVE.max_kernels, config=True,
                          help="Most kernels (viewers plus preheated pool) running at once.")

    async def start_kernel(self, *args, **kwargs):
        """Start a kernel unless the cap is reached (HTTP 503 then); tokens are not passed to it."""
        if len(self.list_kernel_ids()) >= self.max_kernels:
            raise web.HTTPError(503, f"the dashboard already serves {self.max_kernels} sessions; try again later")
        env = dict(kwargs.pop("env", None) or os.environ)
        for key in _SECRET_ENV:
            env.pop(key, None)
        kwargs["env"] = env
        return await super().start_kernel(*args, **kwargs)


def build_command(*, host: str, port: int, pool_size: int, local: bool, max_kernels: int,
                  cull_idle_timeout: int, cull_interval: int, notebook: Path = NOTEBOOK) -> list[str]:
    """The voila command line (without the token, which travels in the environment)."""
    cmd = [sys.executable, "-m", "voila", str(notebook), "--no-browser", f"--port={port}", f"--Voila.ip={host}",
           "--strip_sources=True", "--show_tracebacks=False", "--theme=light",
           "--VoilaConfiguration.multi_kernel_manager_class=dashboard.serve.CappedKernelManager",
           f"--CappedKernelManager.max_kernels={max_kernels}",
           f"--MappingKernelManager.cull_idle_timeout={cull_idle_timeout}",
           f"--MappingKernelManager.cull_interval={cull_interval}",
           "--MappingKernelManager.cull_connected=True",
           f"--VoilaConfiguration.extra_labextensions_path={_plotly_package_data()}"]
    if pool_size > 0:
        cmd += ["--preheat_kernel=True", f"--pool_size={pool_size}"]
    if not local:
        cmd.append("--Voila.auto_token=True")  # token from $JUPYTER_TOKEN
    return cmd


def _plotly_package_data() -> str:
    import plotly

    return str(Path(plotly.__file__).parent / "package_data")


def _parser() -> argparse.ArgumentParser:
    d = settings.SERVE
    p = argparse.ArgumentParser(prog="python -m dashboard.serve", description=__doc__.split("\n\n")[0])
    p.add_argument("--host", default=d.host, help=f"address to listen on (default {d.host})")
    p.add_argument("--port", type=int, default=d.port, help=f"port (default {d.port})")
    p.add_argument("--token", default=None, help="access token (default $VOILA_TOKEN, else generated)")
    p.add_argument("--pool-size", type=int, default=d.pool_size, help="preheated kernels (0: none)")
    p.add_argument("--max-kernels", type=int, default=d.max_kernels, help="most kernels at once")
    p.add_argument("--cull-idle-timeout", type=int, default=d.cull_idle_timeout, help="seconds before an idle "
                   "kernel is shut down")
    p.add_argument("--cull-interval", type=int, default=d.cull_interval, help="seconds between idle checks")
    p.add_argument("--snapshot-dir", default=None, help="where snapshots are saved (default "
                   "$CONVLIB_SNAPSHOT_DIR or ~/convlib-snapshots)")
    p.add_argument("--local", action="store_true", help="one engineer on this machine: loopback, no token, no pool")
    p.add_argument("--dry-run", action="store_true", help="print the command and exit")
    return p


def main(argv=None) -> int:
    """Parse the options, print the URL and replace this process with voila."""
    args = _parser().parse_args(argv)
    env = dict(os.environ)
    if args.local:
        args.host, args.pool_size = "127.0.0.1", 0
    snapshot_dir = Path(args.snapshot_dir or settings.snapshot_dir()).expanduser().resolve()
    env["CONVLIB_SNAPSHOT_DIR"] = str(snapshot_dir)
    env[BUNDLE_ENV] = BUNDLE_PATH
    cmd = build_command(host=args.host, port=args.port, pool_size=args.pool_size, local=args.local,
                        max_kernels=args.max_kernels, cull_idle_timeout=args.cull_idle_timeout,
                        cull_interval=args.cull_interval)
    shown_host = "localhost" if args.host in ("127.0.0.1", "0.0.0.0", "") else args.host
    url = f"http://{shown_host}:{args.port}/"
    for key in _SECRET_ENV:
        env.pop(key, None)
    if not args.local:
        token = args.token or os.environ.get("VOILA_TOKEN") or secrets.token_urlsafe(32)
        env["JUPYTER_TOKEN"] = token
        if not (args.token or os.environ.get("VOILA_TOKEN")):
            print("No token given: generated one for this run (set VOILA_TOKEN to choose your own).")
        url += f"?token={token}"
    print(" ".join(cmd))
    if args.dry_run:
        return 0
    snapshot_dir.mkdir(parents=True, exist_ok=True)
    print(f"convlib dashboard: open {url}", flush=True)
    print(f"snapshots are saved in {snapshot_dir}", flush=True)
    os.execve(cmd[0], cmd, env)
    return 0  # not reached


if __name__ == "__main__":
    sys.exit(main())
