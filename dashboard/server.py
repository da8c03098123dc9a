"""The voila application of the shared server, hardened for viewers the team does not control.

``python -m dashboard.serve`` starts this module (``python -m dashboard.server <voila options>``);
it is voila with these changes, each answering a way one viewer could hurt the others:

* **Token before anything is allocated.** Every websocket (kernel channels and voila's query
  route) checks the token or the login cookie before the upgrade; refusals close the
  connection. The token in a page URL is exchanged for an http-only cookie and the browser is
  redirected to the same address without it, so the token never reaches a kernel, the query
  route or the browser history. Neither tokens nor kernel ids are written to the log at the
  default level (:class:`Redact`).
* **Bounded frames.** The kernel websocket requires the ``v1.kernel.websocket.jupyter.org``
  subprotocol (the legacy binary format is refused), messages are capped at
  :attr:`ConvlibVoila.max_message_bytes`, and a binary frame whose offset table is too long or
  points outside the frame is refused before jupyter_server parses it (:func:`check_v1_frame`).
* **Bounded clients.** At most :attr:`ConvlibVoila.max_connections_per_client` TCP connections
  and :attr:`ConvlibVoila.max_sockets_per_client` websockets per client address, at most
  :attr:`ConvlibVoila.max_kernels_per_client` session kernels; idle TCP connections are
  closed after :attr:`ConvlibVoila.idle_connection_timeout` seconds.
* **Kernels follow their pages.** A kernel whose last websocket closed is ended after
  :attr:`ConvlibVoila.disconnect_grace` seconds (a reload reconnects within it); one whose page
  never connected after :attr:`ConvlibVoila.connect_grace` seconds; the page's own shutdown
  beacon is accepted from the same origin. Preheated kernels waiting in the pool are never
  culled. The page shows a banner and locks its controls when its kernel is gone
  (template ``convlib``), so a viewer never reads stale numbers.
* **No tracebacks to browsers.** ``error`` messages and stderr streams from kernels are not
  forwarded; error pages are short, styled and carry no paths.
* **Nothing from outside.** The page template loads no font, script or style from another host.
"""
from __future__ import annotations

import collections
import contextlib
import contextvars
import json
import logging
import os
import resource
import sys
import time
from pathlib import Path
from urllib.parse import urlencode, urlparse

from jupyter_core.utils import ensure_async
from jupyter_server.base.handlers import JupyterHandler
from jupyter_server.services.kernels.kernelmanager import AsyncMappingKernelManager
from tornado import httpserver, ioloop, web
from traitlets import Bool, Float, Integer
from voila import handler as voila_handler_module
from voila.app import Voila
from voila.request_info_handler import RequestInfoSocketHandler
from voila.shutdown_kernel_handler import VoilaShutdownKernelHandler
from voila.tornado.handler import TornadoVoilaHandler
from voila.tornado.kernel_websocket_handler import VoilaKernelWebsocketHandler

from . import settings
from .server_hygiene import (UUID, Redact, check_v1_frame, error_page, frame_summary,  # noqa: F401
                             install_redaction, strip_token)

__all__ = ["ConvlibVoila", "CappedKernelManager", "Redact", "check_v1_frame", "frame_summary", "main",
           "TEMPLATE_ROOT", "V1_PROTOCOL"]

log = logging.getLogger(__name__)

V1_PROTOCOL = "v1.kernel.websocket.jupyter.org"
#: Jupyter data directory holding the ``convlib`` voila template (``voila/templates/convlib``).
TEMPLATE_ROOT = Path(__file__).with_name("share") / "jupyter"
_SECRET_ENV = ("JUPYTER_TOKEN", "JUPYTER_TOKEN_FILE", "VOILA_TOKEN")
_CLIENT: contextvars.ContextVar[str] = contextvars.ContextVar("convlib_client", default="")
#: The server's name for the viewer of the page being served (its login identity), for snapshots.
_VIEWER: contextvars.ContextVar[str] = contextvars.ContextVar("convlib_viewer", default="")
#: Beside a kernel's connection file, the server's identity of its viewer (read by dashboard.storage).
VIEWER_FILE = "viewer-{kernel_id}.json"


def _log_request(handler: web.RequestHandler) -> None:
    """Access log without query strings and with kernel ids masked."""
    status = handler.get_status()
    level = logging.INFO if status < 400 else logging.WARNING
    if status >= 500:
        level = logging.ERROR
    request = handler.request
    took = 1000.0 * request.request_time()
    logging.getLogger("tornado.access").log(level, "%d %s %s (%s) %.1f ms", status, request.method,
                                            UUID.sub("<kernel>", request.path), _client_ip(handler), took)


def _client_ip(handler: web.RequestHandler) -> str:
    return str(handler.request.remote_ip or "")


def _guard(handler: web.RequestHandler) -> "ConvlibVoila":
    return handler.settings["convlib_voila"]


# ----------------------------------------------------------------------------- kernels
def _option(kind, name: str, text: str):
    """A configurable trait whose default is the field ``name`` of :data:`dashboard.settings.SERVE`."""
    return kind(getattr(settings.SERVE, name), config=True, help=text)


class CappedKernelManager(AsyncMappingKernelManager):
    """Kernel manager with a cap, no secrets in kernels, presence tracking and pool-safe culling.

    Attributes
    ----------
    max_kernels : int
        Most kernels (viewers plus preheated pool) running at once; beyond it a viewer gets a
        styled "busy" page (HTTP 503).
    """

    max_kernels = _option(Integer, "max_kernels", "Most kernels (viewers plus preheated pool) running at once.")
    disconnect_grace = _option(Float, "disconnect_grace", "Seconds a kernel lives after its last websocket closed.")
    connect_grace = _option(Float, "connect_grace", "Seconds a session kernel waits for its page to connect.")

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self._sockets: collections.Counter = collections.Counter()
        self._ever_connected: set[str] = set()
        self._alone_since: dict[str, float] = {}
        self.owner: dict[str, str] = {}
        self._handlers: dict[str, set] = {}
        self._sweeper: ioloop.PeriodicCallback | None = None

    async def start_kernel(self, *args, **kwargs):
        """Start a kernel unless the cap is reached (HTTP 503 then); tokens are not passed to it."""
        if len(self.list_kernel_ids()) >= self.max_kernels:
            raise web.HTTPError(503, f"the dashboard already serves {self.max_kernels} sessions; try again later")
        env = dict(kwargs.pop("env", None) or os.environ)
        for key in _SECRET_ENV:
            env.pop(key, None)
        for key in ("QUERY_STRING", "VOILA_REQUEST_URL"):
            if key in env:
                env[key] = strip_token(env[key])
        kwargs["env"] = env
        kernel_id = await super().start_kernel(*args, **kwargs)
        client = _CLIENT.get()
        if client:
            self.owner[kernel_id] = client
            self.record_viewer(kernel_id, _VIEWER.get(), client)
        return kernel_id

    def record_viewer(self, kernel_id: str, name: str, address: str) -> None:
        """Write who the server says the viewer is beside the kernel's connection file (mode 0600), so that
        a snapshot saved from that page records it and not only a typed name."""
        try:
            folder = Path(self.connection_dir)
            data = json.dumps({"name": str(name)[:200], "address": str(address)[:100]}).encode()
            path = folder / VIEWER_FILE.format(kernel_id=kernel_id)
            fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
            with os.fdopen(fd, "wb") as fh:
                fh.write(data)
        except (OSError, TypeError, ValueError) as exc:  # the dashboard works without it
            log.warning("could not record the viewer of a session: %s", type(exc).__name__)

    # -- presence
    def pooled_ids(self) -> set[str]:
        """Kernels waiting in voila's preheated pool (no viewer yet)."""
        out = set()
        for pool in getattr(self, "_pools", {}).values():
            for task in pool:
                if task.done() and not task.cancelled() and task.exception() is None:
                    kid = (task.result() or {}).get("kernel_id")
                    if kid:
                        out.add(kid)
        return out

    def touch(self, kernel_id: str) -> None:
        """Restart the idle clock of a kernel just handed to a viewer (it waited in the pool, maybe long)."""
        from jupyter_server._tz import utcnow

        try:
            self.get_kernel(kernel_id).last_activity = utcnow()
        except KeyError:
            pass

    def kernels_of(self, client: str) -> int:
        """Session kernels started for ``client`` that are still running."""
        live = set(self.list_kernel_ids())
        return sum(1 for kid, who in self.owner.items() if who == client and kid in live)

    def socket_opened(self, kernel_id: str, handler=None) -> None:
        if handler is not None:
            self._handlers.setdefault(kernel_id, set()).add(handler)
        self._sockets[kernel_id] += 1
        self._ever_connected.add(kernel_id)
        self._alone_since.pop(kernel_id, None)

    def socket_closed(self, kernel_id: str, handler=None) -> None:
        self._handlers.get(kernel_id, set()).discard(handler)
        self._sockets[kernel_id] = max(0, self._sockets[kernel_id] - 1)
        if self._sockets[kernel_id] == 0:
            self._alone_since[kernel_id] = time.monotonic()

    def start_sweeping(self, interval: float) -> None:
        """End kernels without a page every ``interval`` seconds (on the server's loop)."""
        if self._sweeper is None:
            self._sweeper = ioloop.PeriodicCallback(self.sweep, max(0.5, interval) * 1000.0)
            self._sweeper.start()

    async def sweep(self) -> list[str]:
        """End session kernels whose page went away; returns the ids ended."""
        now = time.monotonic()
        pooled = self.pooled_ids()
        ended = []
        for kid in list(self.list_kernel_ids()):
            if kid in pooled or self._sockets.get(kid, 0) > 0:
                continue
            since = self._alone_since.setdefault(kid, now)
            grace = self.disconnect_grace if kid in self._ever_connected else self.connect_grace
            if now - since >= grace:
                ended.append(kid)
        for kid in ended:
            self.log.info("Ending a session kernel whose page has gone")
            try:
                await ensure_async(self.shutdown_kernel(kid))
            except Exception as exc:  # noqa: BLE001 - already gone or failing: forget it either way
                self.log.warning("Could not end a session kernel: %s", exc)
        return ended

    async def shutdown_kernel(self, kernel_id, *args, **kwargs):
        # jupyter_server leaves the page's websocket open when its kernel ends: close it, so the page knows
        for handler in list(self._handlers.pop(kernel_id, ())):
            try:
                handler.close(1001, "session ended")
            except Exception:  # noqa: BLE001 - already closing
                pass
        result = await ensure_async(super().shutdown_kernel(kernel_id, *args, **kwargs))
        self._forget(kernel_id)
        return result

    def _forget(self, kernel_id: str) -> None:
        self._sockets.pop(kernel_id, None)
        self._handlers.pop(kernel_id, None)
        self._ever_connected.discard(kernel_id)
        self._alone_since.pop(kernel_id, None)
        self.owner.pop(kernel_id, None)
        RequestInfoSocketHandler._cache.pop(kernel_id, None)
        with contextlib.suppress(OSError, TypeError):
            (Path(self.connection_dir) / VIEWER_FILE.format(kernel_id=kernel_id)).unlink()

    async def cull_kernel_if_idle(self, kernel_id):
        """Cull as usual, except kernels still waiting in the preheated pool (a viewer would get a dead one)."""
        if kernel_id in self.pooled_ids():
            return None
        return await ensure_async(super().cull_kernel_if_idle(kernel_id))


# ----------------------------------------------------------------------------- handlers
class _Refusing:
    """Refusals close the connection and say little."""

    def refuse(self, status: int, reason: str) -> None:
        self.set_status(status)
        self.set_header("Connection", "close")
        self.set_header("Content-Type", "text/plain; charset=utf-8")
        self.finish(f"{status}: {reason}\n")


class GuardedChannelsHandler(_Refusing, VoilaKernelWebsocketHandler):
    """Kernel websocket: token, v1 subprotocol, per-client socket cap, bounded frames, filtered output."""

    _per_client: collections.Counter = collections.Counter()

    async def get(self, kernel_id):
        if not self.current_user:
            return self.refuse(403, "the dashboard's token is required")
        offered = [p.strip() for p in self.request.headers.get("Sec-WebSocket-Protocol", "").split(",")]
        if V1_PROTOCOL not in offered:
            return self.refuse(400, f"the {V1_PROTOCOL} subprotocol is required")
        if kernel_id not in self.kernel_manager:
            return self.refuse(404, "this session has ended; reload the page")
        client = _client_ip(self)
        limit = _guard(self).max_sockets_per_client
        if self._per_client[client] >= limit:
            return self.refuse(429, f"at most {limit} open sessions per client")
        return await super().get(kernel_id)

    async def open(self, kernel_id):
        self._convlib_client = _client_ip(self)
        GuardedChannelsHandler._per_client[self._convlib_client] += 1
        self.kernel_manager.socket_opened(kernel_id, self)
        self._convlib_kernel = kernel_id
        return await super().open(kernel_id)

    def on_close(self):
        client = getattr(self, "_convlib_client", None)
        if client is not None:
            GuardedChannelsHandler._per_client[client] -= 1
            if GuardedChannelsHandler._per_client[client] <= 0:
                del GuardedChannelsHandler._per_client[client]
            self._convlib_client = None
            self.kernel_manager.socket_closed(self._convlib_kernel, self)
        if self.connection is not None:
            super().on_close()

    def on_message(self, ws_message):
        if isinstance(ws_message, bytes):
            problem = check_v1_frame(ws_message)
            if problem is not None:
                self.log.warning("Refused a malformed websocket frame: %s", problem)
                self.close(1003, "malformed frame")
                return None
        elif self.selected_subprotocol == V1_PROTOCOL:
            self.close(1003, "text frames are not part of the v1 protocol")
            return None
        return super().on_message(ws_message)

    def write_message(self, message, binary=False):
        if isinstance(message, bytes):
            msg_type, content = frame_summary(message)
        elif isinstance(message, dict):
            msg_type, content = str((message.get("header") or {}).get("msg_type", "")), message.get("content")
        else:
            msg_type, content = "", None
        if msg_type == "error":
            return None  # tracebacks stay on the server; the app shows its own short messages
        if msg_type == "stream" and isinstance(content, dict) and content.get("name") == "stderr":
            return None
        return super().write_message(message, binary)


class GuardedQueryHandler(_Refusing, RequestInfoSocketHandler, JupyterHandler):
    """voila's query route (request info for preheated kernels), behind the token, sent once, no token inside."""

    def set_default_headers(self):  # websockets: no page headers
        pass

    async def prepare(self):
        # a websocket never redirects to the login page: no token, 403
        return await JupyterHandler.prepare(self, _redirect_to_login=False)

    async def get(self, kernel_id):
        if not self.current_user:
            return self.refuse(403, "the dashboard's token is required")
        if kernel_id not in self.kernel_manager:
            return self.refuse(404, "no such session")
        return await super().get(kernel_id)

    def open(self, kernel_id: str) -> None:
        super().open(kernel_id)
        self._cache.pop(kernel_id, None)  # delivered: forget it

    def on_close(self) -> None:
        for kid, waiter in list(RequestInfoSocketHandler._waiters.items()):
            if waiter is self:
                del RequestInfoSocketHandler._waiters[kid]

    @classmethod
    def send_updates(cls, msg: dict) -> None:
        payload = dict(msg.get("payload") or {})
        for key in ("QUERY_STRING", "VOILA_REQUEST_URL"):
            if key in payload:
                payload[key] = strip_token(payload[key])
        client = _CLIENT.get()
        manager = getattr(cls, "_manager", None)
        if manager is not None:
            manager.touch(msg["kernel_id"])  # voila calls this right after taking the kernel from the pool
            if client:
                manager.owner[msg["kernel_id"]] = client
                if hasattr(manager, "record_viewer"):
                    manager.record_viewer(msg["kernel_id"], _VIEWER.get(), client)
        RequestInfoSocketHandler.send_updates({"kernel_id": msg["kernel_id"], "payload": payload})


class GuardedPageHandler(TornadoVoilaHandler):
    """The dashboard page: token exchanged for a cookie, session caps, styled error pages."""

    @web.authenticated
    async def get(self, path=None):
        if "token" in self.request.query_arguments:
            # the identity provider has set the login cookie: drop the token from the address bar
            rest = [(k, v.decode("utf-8", "replace")) for k, vs in self.request.query_arguments.items()
                    if k != "token" for v in vs]
            return self.redirect(self.request.path + (("?" + urlencode(rest)) if rest else ""))
        app = _guard(self)
        manager = self.kernel_manager
        client = _client_ip(self)
        if manager.kernels_of(client) >= app.max_kernels_per_client:
            return self._styled(429, limit=app.max_kernels_per_client)
        waiting = manager.get_pool_size(self.notebook_path) if hasattr(manager, "get_pool_size") else 0
        if not waiting and len(manager.list_kernel_ids()) >= manager.max_kernels:
            return self._styled(503, limit=manager.max_kernels)
        token = _CLIENT.set(client)
        user = self.current_user
        viewer = _VIEWER.set(str(getattr(user, "name", "") or getattr(user, "username", "") or ""))
        try:
            async for chunk in self.get_generator(path=path):
                self.write(chunk)
                self.flush()
        finally:
            _CLIENT.reset(token)
            _VIEWER.reset(viewer)

    def _styled(self, status: int, **kw) -> None:
        self.clear()
        self.set_status(status)
        if status in (429, 503):
            self.set_header("Retry-After", "60")
        self.set_header("Content-Type", "text/html; charset=utf-8")
        idle = max(1, int(self.kernel_manager.cull_idle_timeout // 60)) if self.kernel_manager.cull_idle_timeout else ""
        self.finish(error_page(status, idle=idle, **kw))

    def write_error(self, status_code: int, **kwargs) -> None:
        limit = getattr(self.kernel_manager, "max_kernels", "")
        exc = kwargs.get("exc_info", (None, None, None))[1]
        if status_code == 503 and exc is not None:
            log.warning("Refused a session: %s", getattr(exc, "log_message", exc))
        self._styled(status_code, limit=limit)


class GuardedShutdownHandler(VoilaShutdownKernelHandler):
    """The page's shutdown beacon on closing the tab: accepted from the same origin (the beacon has no xsrf)."""

    def check_xsrf_cookie(self):
        origin = self.request.headers.get("Origin") or self.request.headers.get("Referer") or ""
        host = urlparse(origin).netloc
        if not host or host != self.request.host:
            raise web.HTTPError(403, "shutdown only from the dashboard's own page")

    @web.authenticated
    async def post(self, kernel_id):
        manager = self.kernel_manager
        owner = manager.owner.get(kernel_id) if hasattr(manager, "owner") else None
        if kernel_id in manager and owner in (None, _client_ip(self)):
            await ensure_async(manager.shutdown_kernel(kernel_id))
        self.set_status(204)
        self.finish()


class CappedHTTPServer(httpserver.HTTPServer):
    """HTTP server with a cap on concurrent TCP connections per client address."""

    def initialize(self, *args, max_per_client: int = 64, **kwargs):
        super().initialize(*args, **kwargs)
        self.max_per_client = max_per_client
        self._per_client: collections.Counter = collections.Counter()

    def handle_stream(self, stream, address):
        client = str(address[0]) if isinstance(address, tuple) and address else ""
        if self._per_client[client] >= self.max_per_client:
            stream.close()
            return
        self._per_client[client] += 1
        stream._convlib_client = client
        super().handle_stream(stream, address)

    def on_close(self, server_conn) -> None:
        client = getattr(getattr(server_conn, "stream", None), "_convlib_client", None)
        if client is not None:
            self._per_client[client] -= 1
            if self._per_client[client] <= 0:
                del self._per_client[client]
        super().on_close(server_conn)


_REPLACE = {
    VoilaKernelWebsocketHandler: GuardedChannelsHandler,
    RequestInfoSocketHandler: GuardedQueryHandler,
    TornadoVoilaHandler: GuardedPageHandler,
    VoilaShutdownKernelHandler: GuardedShutdownHandler,
}


class ConvlibVoila(Voila):
    """voila with the protections listed in this module's docstring."""

    name = "convlib-voila"
    max_message_bytes = _option(Integer, "max_message_bytes", "Largest websocket message a browser may send [bytes].")
    max_connections_per_client = _option(Integer, "max_connections_per_client",
                                         "Most TCP connections at once from one client address.")
    max_sockets_per_client = _option(Integer, "max_sockets_per_client",
                                     "Most kernel websockets at once from one client address.")
    max_kernels_per_client = _option(Integer, "max_kernels_per_client",
                                     "Most session kernels at once for one client address.")
    idle_connection_timeout = _option(Float, "idle_connection_timeout",
                                      "Seconds before an idle TCP connection is closed.")
    sweep_interval = _option(Float, "sweep_interval", "Seconds between checks for kernels whose page has gone.")
    behind_proxy = _option(Bool, "behind_proxy",
                           "A reverse proxy on this machine forwards every viewer: the client address is taken from "
                           "its X-Real-IP / X-Forwarded-For header (listen on loopback only), and the TCP cap per "
                           "address is left to the proxy.")

    def initialize(self, argv=None):
        super().initialize(argv)
        self._redact = install_redaction(os.environ.get("JUPYTER_TOKEN") or self.token, [self.log])

    def init_settings(self):
        out = super().init_settings()
        out["websocket_max_message_size"] = int(self.max_message_bytes)
        out["log_function"] = _log_request
        out["convlib_voila"] = self
        return out

    def init_handlers(self):
        handlers = [(route, _REPLACE.get(cls, cls), *rest) for route, cls, *rest in super().init_handlers()]
        GuardedQueryHandler._manager = self.kernel_manager
        voila_handler_module.RequestInfoSocketHandler = GuardedQueryHandler  # voila calls send_updates by name
        app = self.app

        def listen(port, address="", **kwargs):
            per_address = int(self.max_connections_per_client)
            if self.behind_proxy:  # every connection comes from the proxy: its own limits bound each viewer
                per_address *= max(1, int(self.kernel_manager.max_kernels if hasattr(self.kernel_manager,
                                                                                  "max_kernels") else 20))
            server = CappedHTTPServer(app, max_per_client=per_address, xheaders=bool(self.behind_proxy),
                                      idle_connection_timeout=float(self.idle_connection_timeout),
                                      max_body_size=int(self.max_message_bytes), max_header_size=64 * 1024)
            server.listen(port, address, **kwargs)
            return server

        app.listen = listen
        if hasattr(self.kernel_manager, "start_sweeping"):
            self.kernel_manager.start_sweeping(self.sweep_interval)
        _raise_file_limit()
        return handlers


def _raise_file_limit() -> None:
    """Use the hard limit of open files (a flood then meets the per-client caps first)."""
    try:
        soft, hard = resource.getrlimit(resource.RLIMIT_NOFILE)
        target = hard if hard != resource.RLIM_INFINITY else 65536
        if soft < target:
            resource.setrlimit(resource.RLIMIT_NOFILE, (min(target, 65536), hard))
    except (ValueError, OSError):
        pass


def main(argv=None) -> None:
    """Run the hardened voila with voila's own command-line options."""
    ConvlibVoila.launch_instance(argv=argv)


if __name__ == "__main__":
    # run the importable module's copy: the kernel manager class is named as dashboard.server.CappedKernelManager,
    # and a second copy of this module (as __main__) would hold its own client context and counters
    from dashboard.server import main as _main

    _main(sys.argv[1:])
