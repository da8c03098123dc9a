"""Serve the dashboard with voila: locally for one engineer, or shared by a team.

Shared mode (the default)::

    python -m dashboard.serve --host 0.0.0.0 --port 8866 --pool-size 2 --snapshot-dir /srv/convlib/snapshots

* It runs :mod:`dashboard.server`: voila hardened for a team server (token checked on every
  route before anything is allocated and exchanged for an http-only cookie; bounded frames,
  connections and sessions per client; kernels that follow their pages; no tracebacks or
  outside requests). See that module for the list.
* A token is required: ``--token``, else ``$VOILA_TOKEN``, else one is generated with
  :mod:`secrets` and printed. It reaches voila through ``$JUPYTER_TOKEN`` (never on the
  command line, so ``ps`` does not show it) and is removed from every kernel's environment.
* Notebook sources are stripped; voila exposes no execute endpoint (widget messages only),
  so viewers cannot run code.
* Kernels are preheated in a pool (``--pool-size``) and never culled while they wait there;
  idle kernels are culled after ``--cull-idle-timeout`` seconds even with a tab still open
  (the page then says the session has ended); a closed tab ends its kernel within
  ``--disconnect-grace`` seconds. At most ``--max-kernels`` kernels run at once (pool included).
* Snapshots are saved only in ``--snapshot-dir`` (``$CONVLIB_SNAPSHOT_DIR`` for the kernels).

Local mode (``--local``, used by ``make demo``): loopback only, no token, no pool.
"""
from __future__ import annotations

import argparse
import json
import os
import secrets
import sys
from pathlib import Path

from . import settings
from .server import TEMPLATE_ROOT, CappedKernelManager
from .settings import BUNDLE_ENV

__all__ = ["CappedKernelManager", "build_command", "main", "NOTEBOOK"]

NOTEBOOK = Path(__file__).with_name("app.ipynb")
#: Where voila publishes plotly's widget bundle (the directory of plotly's package data, served under
#: /voila/labextensions/); the kernels learn the path from $CONVLIB_PLOTLY_BUNDLE.
BUNDLE_PATH = "voila/labextensions/widgetbundle.js"
#: Front-end extensions the page does not load: plotly's renderer of plot outputs (our plots are widgets, whose
#: bundle is :data:`BUNDLE_PATH`; the renderer is another 4.8 MB of JavaScript) and code highlighting (sources
#: are stripped).
UNUSED_LABEXTENSIONS = ("jupyterlab-plotly", "jupyterlab_pygments")
_SECRET_ENV = ("JUPYTER_TOKEN", "JUPYTER_TOKEN_FILE", "VOILA_TOKEN")
_KM = "CappedKernelManager"


def build_command(*, host: str, port: int, pool_size: int, local: bool, max_kernels: int,
                  cull_idle_timeout: int, cull_interval: int, notebook: Path = NOTEBOOK,
                  disconnect_grace: float = settings.SERVE.disconnect_grace,
                  connect_grace: float = settings.SERVE.connect_grace,
                  max_kernels_per_client: int = settings.SERVE.max_kernels_per_client,
                  max_sockets_per_client: int = settings.SERVE.max_sockets_per_client,
                  max_connections_per_client: int = settings.SERVE.max_connections_per_client,
                  behind_proxy: bool = settings.SERVE.behind_proxy) -> list[str]:
    """The command line of the hardened voila (without the token, which travels in the environment)."""
    cmd = [sys.executable, "-m", "dashboard.server", str(notebook), "--no-browser", f"--port={port}",
           f"--Voila.ip={host}", "--strip_sources=True", "--show_tracebacks=False", "--theme=light",
           "--template=convlib",
           "--VoilaConfiguration.multi_kernel_manager_class=dashboard.server.CappedKernelManager",
           f"--{_KM}.max_kernels={max_kernels}",
           f"--{_KM}.disconnect_grace={disconnect_grace:g}", f"--{_KM}.connect_grace={connect_grace:g}",
           f"--MappingKernelManager.cull_idle_timeout={cull_idle_timeout}",
           f"--MappingKernelManager.cull_interval={cull_interval}",
           "--MappingKernelManager.cull_connected=True",
           f"--ConvlibVoila.max_kernels_per_client={max_kernels_per_client}",
           f"--ConvlibVoila.max_sockets_per_client={max_sockets_per_client}",
           f"--ConvlibVoila.max_connections_per_client={max_connections_per_client}",
           f"--VoilaConfiguration.extra_labextensions_path={_plotly_package_data()}",
           "--VoilaConfiguration.extension_denylist=" + json.dumps(list(UNUSED_LABEXTENSIONS), separators=(",", ":"))]
    if behind_proxy:
        cmd.append("--ConvlibVoila.behind_proxy=True")
    if pool_size > 0:
        cmd += ["--preheat_kernel=True", f"--pool_size={pool_size}"]
    if not local:
        cmd.append("--Voila.auto_token=True")  # token from $JUPYTER_TOKEN
    return cmd


def _write_token(token: str) -> Path:
    """Write a generated token to ``~/.convlib/dashboard-token`` (mode 0600) and return the path."""
    folder = settings.convlib_home()
    folder.mkdir(parents=True, exist_ok=True)
    path = folder / "dashboard-token"
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
    with os.fdopen(fd, "w") as fh:
        fh.write(token + "\n")
    os.chmod(path, 0o600)
    return path


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
    p.add_argument("--disconnect-grace", type=float, default=d.disconnect_grace,
                   help=f"seconds a kernel outlives its closed tab (default {d.disconnect_grace:g})")
    p.add_argument("--connect-grace", type=float, default=d.connect_grace,
                   help=f"seconds a new session waits for its page to connect (default {d.connect_grace:g})")
    p.add_argument("--max-kernels-per-client", type=int, default=d.max_kernels_per_client,
                   help="most sessions per client address (behind a reverse proxy, give --behind-proxy so that each "
                        f"viewer keeps its own address; default {d.max_kernels_per_client})")
    p.add_argument("--max-sockets-per-client", type=int, default=d.max_sockets_per_client,
                   help=f"most kernel websockets per client address (default {d.max_sockets_per_client})")
    p.add_argument("--max-connections-per-client", type=int, default=d.max_connections_per_client,
                   help=f"most TCP connections per client address (default {d.max_connections_per_client})")
    p.add_argument("--behind-proxy", action="store_true",
                   help="a reverse proxy on this machine forwards the viewers: each viewer's address comes from "
                        "the proxy's X-Real-IP / X-Forwarded-For header, so per-viewer caps still apply (needs "
                        "--host 127.0.0.1 so that no one reaches the server past the proxy)")
    p.add_argument("--snapshot-dir", default=None, help="where snapshots are saved (default "
                   "$CONVLIB_SNAPSHOT_DIR, else $CONVLIB_HOME/snapshots, else ~/.convlib/snapshots)")
    p.add_argument("--local", action="store_true", help="one engineer on this machine: loopback, no token, no pool")
    p.add_argument("--notebook", default=str(NOTEBOOK), help="notebook to serve (default: the dashboard; the "
                   "latency benchmark serves a minimal page the same way)")
    p.add_argument("--dry-run", action="store_true", help="print the command and exit")
    return p


def main(argv=None) -> int:
    """Parse the options, print the URL and replace this process with voila."""
    args = _parser().parse_args(argv)
    env = dict(os.environ)
    if args.local:
        args.host, args.pool_size = "127.0.0.1", 0
    if args.behind_proxy and args.host not in ("127.0.0.1", "localhost", "::1"):
        _parser().error(f"--behind-proxy trusts the address the proxy forwards: listen on 127.0.0.1 only "
                        f"(--host {args.host} would let anyone reach the server past the proxy and choose it)")
    snapshot_dir = Path(args.snapshot_dir or settings.snapshot_dir()).expanduser().resolve()
    env["CONVLIB_SNAPSHOT_DIR"] = str(snapshot_dir)
    env[BUNDLE_ENV] = BUNDLE_PATH
    env["JUPYTER_PATH"] = os.pathsep.join(p for p in (str(TEMPLATE_ROOT), env.get("JUPYTER_PATH", "")) if p)
    cmd = build_command(host=args.host, port=args.port, pool_size=args.pool_size, local=args.local,
                        max_kernels=args.max_kernels, cull_idle_timeout=args.cull_idle_timeout,
                        cull_interval=args.cull_interval, disconnect_grace=args.disconnect_grace,
                        connect_grace=args.connect_grace, max_kernels_per_client=args.max_kernels_per_client,
                        max_sockets_per_client=args.max_sockets_per_client,
                        max_connections_per_client=args.max_connections_per_client,
                        behind_proxy=args.behind_proxy, notebook=Path(args.notebook))
    shown_host = "localhost" if args.host in ("127.0.0.1", "0.0.0.0", "") else args.host
    url = f"http://{shown_host}:{args.port}/"
    for key in _SECRET_ENV:
        env.pop(key, None)
    generated = False
    if not args.local:
        token = args.token or os.environ.get("VOILA_TOKEN") or secrets.token_urlsafe(32)
        env["JUPYTER_TOKEN"] = token
        generated = not (args.token or os.environ.get("VOILA_TOKEN"))
    print(" ".join(cmd))
    if args.dry_run:
        if generated:
            print("No token given: one would be generated for this run (set VOILA_TOKEN to choose your own).")
        return 0
    snapshot_dir.mkdir(parents=True, exist_ok=True)
    if args.local:
        print(f"convlib dashboard: open {url}", flush=True)
    elif generated:
        # a generated token goes to a file only its owner can read, never into a log
        token_file = _write_token(token)
        print("No token given: generated one for this run (set VOILA_TOKEN to choose your own); it is in "
              f"{token_file}. Open {url}?token=<that token>", flush=True)
    else:
        print(f"convlib dashboard: open {url}?token=<the team's token> (the browser then keeps a cookie and the "
              "address loses the token)", flush=True)
    print(f"snapshots are saved in {snapshot_dir}", flush=True)
    os.execve(cmd[0], cmd, env)
    return 0  # not reached


if __name__ == "__main__":
    sys.exit(main())
