"""A raw client of the shared server, for its tests and the load test: cookie login, page claim, kernel websocket.

Not imported by the dashboard. It speaks the ``v1.kernel.websocket.jupyter.org`` protocol the way a
browser does, and can also send what a hostile client would (legacy frames, oversized offset tables).
"""
from __future__ import annotations

import asyncio
import json
import re
import uuid
from http.cookies import SimpleCookie

from tornado.httpclient import AsyncHTTPClient, HTTPClientError, HTTPRequest
from tornado.websocket import websocket_connect

__all__ = ["V1", "v1_frame", "parse_v1_frame", "WireClient", "KERNEL_ID"]

V1 = "v1.kernel.websocket.jupyter.org"
KERNEL_ID = re.compile(r'"kernelId":\s*"([0-9a-f-]{36})"')


def v1_frame(channel: str, msg: dict, buffers=()) -> bytes:
    """Serialise one kernel message for the v1 websocket protocol."""
    parts = [json.dumps(msg.get(k, {})).encode() for k in ("header", "parent_header", "metadata", "content")]
    parts += [bytes(b) for b in buffers]
    chan = channel.encode()
    offsets = [8 * (1 + 1 + len(parts) + 1)]
    offsets.append(offsets[-1] + len(chan))
    for p in parts:
        offsets.append(offsets[-1] + len(p))
    table = len(offsets).to_bytes(8, "little") + b"".join(o.to_bytes(8, "little") for o in offsets)
    return table + chan + b"".join(parts)


def parse_v1_frame(frame: bytes) -> tuple[str, dict]:
    """Channel and message (header, parent_header, metadata, content) of a v1 frame."""
    n = int.from_bytes(frame[:8], "little")
    offs = [int.from_bytes(frame[8 * (i + 1): 8 * (i + 2)], "little") for i in range(n)]
    channel = frame[offs[0]:offs[1]].decode()
    keys = ("header", "parent_header", "metadata", "content")
    msg = {k: json.loads(frame[offs[i + 1]:offs[i + 2]]) for i, k in enumerate(keys) if i + 2 < len(offs)}
    return channel, msg


def message(msg_type: str, content: dict, session: str) -> dict:
    return {"header": {"msg_id": uuid.uuid4().hex, "msg_type": msg_type, "session": session, "username": "probe",
                       "version": "5.3", "date": "2026-01-01T00:00:00Z"},
            "parent_header": {}, "metadata": {}, "content": content}


class WireClient:
    """One viewer without a browser.

    Parameters
    ----------
    base_url : str
        ``http://127.0.0.1:PORT/``.
    token : str, optional
        Exchanged for the login cookie by :meth:`login`.
    headers : dict, optional
        Sent with every request (e.g. the ``X-Real-IP`` a reverse proxy would add).
    """

    def __init__(self, base_url: str, token: str | None = None, headers: dict | None = None):
        self.base_url = base_url.rstrip("/") + "/"
        self.token = token
        self.headers = dict(headers or {})
        self.cookie = ""
        self.http = AsyncHTTPClient(force_instance=True)
        self.session = uuid.uuid4().hex

    @property
    def ws_base(self) -> str:
        return "ws" + self.base_url[4:]

    async def fetch(self, path: str = "", *, cookie: bool = True, follow: bool = False, timeout: float = 60.0,
                    method: str = "GET", body=None, headers=None):
        """The response (never raises for HTTP status codes)."""
        hdrs = {**self.headers, **(headers or {})}
        if cookie and self.cookie:
            hdrs["Cookie"] = self.cookie
        req = HTTPRequest(self.base_url + path.lstrip("/"), method=method, body=body, headers=hdrs,
                          follow_redirects=follow, request_timeout=timeout, connect_timeout=timeout,
                          allow_nonstandard_methods=True)
        try:
            return await self.http.fetch(req, raise_error=False)
        except HTTPClientError as exc:  # pragma: no cover - raise_error=False returns responses
            return exc.response

    async def login(self):
        """``GET /?token=...``: keep the cookie the server sets; the response (a redirect) is returned."""
        resp = await self.fetch(f"?token={self.token}", cookie=False)
        jar = SimpleCookie()
        for value in resp.headers.get_list("Set-Cookie"):
            jar.load(value)
        self.cookie = "; ".join(f"{k}={m.value}" for k, m in jar.items())
        return resp

    async def claim(self, timeout: float = 120.0) -> tuple[str, str]:
        """``GET /`` with the cookie: a session kernel for this client; returns (kernel id, page)."""
        resp = await self.fetch("", timeout=timeout)
        page = resp.body.decode("utf-8", "replace") if resp.body else ""
        found = KERNEL_ID.search(page)
        return (found.group(1) if found else ""), page

    async def channels(self, kernel_id: str, subprotocols=(V1,), cookie: bool = True, timeout: float = 30.0):
        """Open the kernel websocket (raises ``HTTPClientError`` when refused)."""
        hdrs = {**self.headers, **({"Cookie": self.cookie} if cookie and self.cookie else {})}
        url = f"{self.ws_base}api/kernels/{kernel_id}/channels?session_id={self.session}"
        req = HTTPRequest(url, headers=hdrs, connect_timeout=timeout, request_timeout=timeout)
        return await websocket_connect(req, subprotocols=list(subprotocols) if subprotocols else None)

    async def query_socket(self, kernel_id: str, cookie: bool = True, timeout: float = 30.0):
        hdrs = {**self.headers, **({"Cookie": self.cookie} if cookie and self.cookie else {})}
        req = HTTPRequest(f"{self.ws_base}voila/query/{kernel_id}", headers=hdrs, connect_timeout=timeout,
                          request_timeout=timeout)
        return await websocket_connect(req)

    async def send(self, ws, channel: str, msg_type: str, content: dict) -> dict:
        msg = message(msg_type, content, self.session)
        await ws.write_message(v1_frame(channel, msg), binary=True)
        return msg

    @staticmethod
    async def collect(ws, seconds: float) -> list[tuple[str, dict]]:
        """Every message the server sends within ``seconds`` (stops early when the socket closes)."""
        out = []
        loop = asyncio.get_running_loop()
        end = loop.time() + seconds
        while (left := end - loop.time()) > 0:
            try:
                frame = await asyncio.wait_for(ws.read_message(), left)
            except asyncio.TimeoutError:
                break
            if frame is None:
                out.append(("closed", {}))
                break
            if isinstance(frame, bytes):
                out.append(parse_v1_frame(frame))
            else:
                out.append(("text", {"text": frame}))
        return out

    def close(self) -> None:
        self.http.close()
