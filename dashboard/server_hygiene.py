"""What the dashboard server refuses and what it writes: v1 frame checks, log redaction, error pages.

Pure functions and a logging filter, no server state: :mod:`dashboard.server` uses them (and re-exports their
names).
"""
from __future__ import annotations

import html
import json
import logging
import re
import time

__all__ = ["Redact", "install_redaction", "check_v1_frame", "frame_summary", "error_page", "MAX_OFFSETS", "UUID", "strip_token"]

#: The server's logger: tracebacks are cut to one line unless it logs at DEBUG.
log = logging.getLogger("dashboard.server")

MAX_OFFSETS = 64  # a kernel message has channel, 5 JSON parts and a few buffers


# ----------------------------------------------------------------------------- log redaction
UUID = re.compile(r"[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}")
_TOKEN_ARG = re.compile(r"(token=)[^&\s\"']+", re.IGNORECASE)


class Redact(logging.Filter):
    """Remove tokens and kernel ids from log records (they grant or locate a viewer's session).

    Examples
    --------
    >>> Redact("s3cret").mask("GET /?token=s3cret kernel 1b2c3d4e-0000-4000-8000-123456789abc s3cret")
    'GET /?token=<hidden> kernel <kernel> <hidden>'
    """

    #: at most this many warnings of one kind per :attr:`window` seconds (a flood must not flood the log)
    burst = 20
    window = 10.0

    def __init__(self, token: str | None = None):
        super().__init__()
        self.token = token or ""
        self._seen: dict[tuple, list] = {}

    def _too_many(self, record: logging.LogRecord) -> bool:
        if record.levelno < logging.WARNING:
            return False
        key = (record.name, str(record.msg)[:60])
        now = time.monotonic()
        start, count, dropped = self._seen.get(key, (now, 0, 0))
        if now - start > self.window:
            if dropped:
                record.msg = f"{record.msg} [{dropped} more like it in the last {self.window:g} s not logged]"
            start, count, dropped = now, 0, 0
        count += 1
        if count > self.burst:
            self._seen[key] = (start, count, dropped + 1)
            return True
        self._seen[key] = (start, count, dropped)
        return False

    def mask(self, text: str) -> str:
        text = _TOKEN_ARG.sub(r"\1<hidden>", text)
        if len(self.token) >= 4:
            text = text.replace(self.token, "<hidden>")
        return UUID.sub("<kernel>", text)

    def filter(self, record: logging.LogRecord) -> bool:
        if getattr(record, "_convlib_checked", False):
            return True
        record._convlib_checked = True
        if self._too_many(record):
            record._convlib_checked = False
            return False
        try:
            message = record.getMessage()
        except Exception:  # noqa: BLE001 - a record that cannot format is passed on as it is
            return True
        masked = self.mask(message)
        if masked != message or record.exc_info:
            record.msg, record.args = masked, None
        if record.exc_info and not log.isEnabledFor(logging.DEBUG):
            # tracebacks carry paths and request data: one line at the default level
            record.msg = f"{masked} [{record.exc_info[0].__name__}: {self.mask(str(record.exc_info[1]))}]"
            record.exc_info = record.exc_text = None
        return True


def install_redaction(token: str | None, loggers=()) -> Redact:
    """Attach one :class:`Redact` filter to every handler of the given loggers, the root and tornado's."""
    flt = Redact(token)
    names = [None, "tornado", "tornado.access", "tornado.application", "tornado.general", "Voila",
             "ServerApp", "traitlets"]
    seen = set()
    for lg in [logging.getLogger(n) for n in names] + list(loggers):
        for h in lg.handlers:
            if id(h) not in seen:
                seen.add(id(h))
                h.addFilter(flt)
        lg.addFilter(flt)
    return flt


# ----------------------------------------------------------------------------- frames
def check_v1_frame(frame: bytes, max_offsets: int = MAX_OFFSETS) -> str | None:
    """Why a binary frame of the v1 kernel websocket protocol is malformed, or None when it is sound.

    A v1 frame starts with the number of offsets ``n`` (8 bytes, little endian), then ``n`` offsets
    of 8 bytes each into the frame. jupyter_server reads the offset table with a Python loop of
    ``n`` steps before looking at anything else, so an ``n`` of 2**62 from one client would spin a
    core and grow memory for everyone: the table is checked here first.

    Examples
    --------
    >>> check_v1_frame((2 ** 62).to_bytes(8, "little"))
    'offset table of 4611686018427387904 entries (at most 64)'
    >>> check_v1_frame(b"")
    'frame of 0 bytes is shorter than its offset count'
    """
    if len(frame) < 8:
        return f"frame of {len(frame)} bytes is shorter than its offset count"
    count = int.from_bytes(frame[:8], "little")
    if count < 3 or count > max_offsets:
        return f"offset table of {count} entries (at most {max_offsets})"
    table_end = 8 * (count + 1)
    if table_end > len(frame):
        return f"offset table of {count} entries does not fit in {len(frame)} bytes"
    offsets = [int.from_bytes(frame[8 * (i + 1): 8 * (i + 2)], "little") for i in range(count)]
    if offsets[0] < table_end or any(b < a for a, b in zip(offsets, offsets[1:])) or offsets[-1] > len(frame):
        return "offsets out of order or outside the frame"
    return None


def frame_summary(frame: bytes) -> tuple[str, dict | None]:
    """Message type of a v1 frame sent by a kernel, and its content for ``stream`` messages.

    Frames from the kernel are trusted; the parse is defensive all the same.
    """
    if check_v1_frame(frame) is not None:
        return "", None
    count = int.from_bytes(frame[:8], "little")
    offsets = [int.from_bytes(frame[8 * (i + 1): 8 * (i + 2)], "little") for i in range(count)] + [len(frame)]
    try:
        header = json.loads(frame[offsets[1]:offsets[2]])
        msg_type = str(header.get("msg_type", ""))
        content = None
        if msg_type == "stream" and count >= 6:
            content = json.loads(frame[offsets[4]:offsets[5]])
        return msg_type, content
    except (ValueError, UnicodeDecodeError, AttributeError):
        return "", None


# ----------------------------------------------------------------------------- error pages
_PAGE = """<!doctype html><html lang="en"><head><meta charset="utf-8"><title>{title}</title>
<style>body{{font-family:system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;background:#f4f5f7;color:#1f2933;
margin:0;display:flex;min-height:100vh;align-items:center;justify-content:center}}
main{{background:#fff;border-radius:8px;box-shadow:0 2px 12px rgba(0,0,0,.12);padding:2.2em 2.6em;max-width:34em}}
h1{{font-size:1.35em;margin:0 0 .6em}}p{{line-height:1.5;margin:.5em 0}}code{{font-size:.95em}}</style></head>
<body><main><h1>{title}</h1>{body}</main></body></html>"""

_MESSAGES = {
    403: ("Access needs the team's link", "<p>This dashboard is shared with a token. Open the link your team "
          "gave you (it ends in <code>?token=…</code>); the browser then keeps you signed in.</p>"),
    404: ("Not found", "<p>There is nothing at this address. Open the dashboard's main page.</p>"),
    429: ("Too many sessions from this computer", "<p>This computer already has {limit} dashboard sessions "
          "open on the server. Close a tab you no longer need; its session ends within a minute. Then reload "
          "this page.</p>"),
    503: ("The dashboard is busy", "<p>The server already runs its most sessions ({limit}) for the team. A "
          "session ends a few seconds after its tab is closed, or after {idle} minutes without use.</p><p>Try "
          "again in a minute (this page reloads itself).</p>"),
}


def error_page(status: int, limit: int | str = "", idle: int | str = "") -> str:
    """A short, styled error page without paths or tracebacks."""
    title, body = _MESSAGES.get(status, ("Something went wrong", "<p>The server could not answer this request. "
                                         "Reload the page; if it keeps happening, tell the dashboard's "
                                         "administrator the time it happened.</p>"))
    body = body.format(limit=html.escape(str(limit)), idle=html.escape(str(idle)))
    if status == 503:
        body += "<script>setTimeout(function(){location.reload()},60000)</script>"
    return _PAGE.format(title=html.escape(title), body=body)


def strip_token(text: str) -> str:
    """``text`` (a URL or query) without any ``token=...`` argument."""
    return _TOKEN_ARG.sub("", str(text)).replace("?&", "?").replace("&&", "&").rstrip("?&")
