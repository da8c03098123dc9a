"""The shared server under hostile and careless clients: a real server on loopback, raw clients and Chromium.

Each test names the case of the shared-server issue it covers. The server is ``python -m dashboard.serve``
in shared mode with short grace times so that kernels ending can be watched. Raw websocket clients come
from :mod:`dashboard.wire`; browser checks drive Debian's Chromium (skipped outside CI when it is missing).
"""
from __future__ import annotations

import asyncio
import re
import secrets
import socket
import time
from pathlib import Path

import psutil
import pytest
from tornado.httpclient import HTTPClientError
from tornado.websocket import WebSocketClosedError

from dashboard.browser import VoilaServer
from dashboard.server import Redact, check_v1_frame, error_page
from dashboard.wire import V1, WireClient, v1_frame

from test_dashboard_browser import _require_browser

TOKEN = "tok-" + secrets.token_urlsafe(18)
UUID = re.compile(r"[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}")


@pytest.fixture(scope="module")
def server():
    srv = VoilaServer(token=TOKEN, pool_size=1, extra_args=[
        "--disconnect-grace", "2", "--connect-grace", "12", "--max-kernels", "6",
        "--max-kernels-per-client", "6", "--max-connections-per-client", "96"])
    with srv:
        yield srv


def run(coro):
    return asyncio.run(coro)


async def _viewer(server) -> tuple[WireClient, str]:
    client = WireClient(server.base_url, server.token)
    await client.login()
    kernel_id, page = await client.claim()
    assert kernel_id, page[:500]
    return client, kernel_id


async def _alive(client: WireClient, kernel_id: str) -> bool:
    resp = await client.fetch(f"api/kernels/{kernel_id}")
    assert resp.code in (200, 404), resp.code
    return resp.code == 200


async def _until_gone(client, kernel_id, within: float) -> float:
    start = time.monotonic()
    while time.monotonic() - start < within:
        if not await _alive(client, kernel_id):
            return time.monotonic() - start
        await asyncio.sleep(0.5)
    raise AssertionError(f"kernel still running {within:g} s later")


def _rss_mib(server) -> float:
    proc = psutil.Process(server.process.pid)
    return proc.memory_info().rss / 2**20


# ----------------------------------------------------------------------------- pure pieces
def test_frame_check_refuses_huge_and_inconsistent_offset_tables():
    good = v1_frame("shell", {"header": {"msg_type": "kernel_info_request"}, "content": {}})
    assert check_v1_frame(good) is None
    assert "at most" in check_v1_frame((2**62).to_bytes(8, "little") + b"\0" * 64)
    assert "does not fit" in check_v1_frame((40).to_bytes(8, "little") + b"\0" * 16)
    bad = bytearray(good)
    bad[8:16] = (10**9).to_bytes(8, "little")  # first offset far outside the frame
    assert "outside" in check_v1_frame(bytes(bad))


def test_redaction_hides_tokens_and_kernel_ids():
    flt = Redact("abcdef123")
    text = flt.mask("503 GET /?token=abcdef123&x=1 kernel 0b9f7c2e-1111-4222-8333-444455556666 abcdef123")
    assert "abcdef123" not in text and not UUID.search(text) and "x=1" in text


def test_error_pages_are_styled_and_say_why():
    busy = error_page(503, limit=20, idle=30)
    assert "<style>" in busy and "busy" in busy and "20" in busy and "Traceback" not in busy
    assert "Too many sessions" in error_page(429, limit=6)


# ----------------------------------------------------------------------------- case 1: legacy / malformed frames
def test_legacy_protocol_is_refused_and_a_malformed_frame_costs_nothing(server):
    async def go():
        client, kid = await _viewer(server)
        with pytest.raises(HTTPClientError) as err:  # no subprotocol: the legacy binary format
            await client.channels(kid, subprotocols=())
        assert err.value.code == 400
        before = _rss_mib(server)
        for frame in ((2**62).to_bytes(8, "little") + b"\0" * 56,  # offset table of 2**62 entries
                      (2**31 - 1).to_bytes(4, "big") + b"\0" * 60):  # legacy nbufs header
            ws = await client.channels(kid)
            await ws.write_message(frame, binary=True)
            got = await WireClient.collect(ws, 10)
            assert got and got[-1][0] == "closed", "the server should close a socket that sends a malformed frame"
        ws = await client.channels(kid)
        await ws.write_message('{"header": {"msg_type": "comm_info_request"}}')  # text frames are not v1
        assert (await WireClient.collect(ws, 10))[-1][0] == "closed"
        resp = await client.fetch("api/kernels/" + kid, timeout=10)  # the server still answers at once
        assert resp.code == 200
        assert _rss_mib(server) - before < 50
        client.close()

    run(go())


# ----------------------------------------------------------------------------- case 2: token
def test_token_is_exchanged_for_an_http_only_cookie_and_removed_from_the_url(server):
    async def go():
        client = WireClient(server.base_url, server.token)
        resp = await client.login()
        assert resp.code == 302 and "token" not in resp.headers["Location"]
        cookies = resp.headers.get_list("Set-Cookie")
        assert cookies and all("HttpOnly" in c for c in cookies)
        resp = await client.fetch(f"?token={server.token}&units=US", cookie=False)
        assert resp.code == 302 and resp.headers["Location"].endswith("?units=US")
        client.close()

    run(go())


def test_query_route_needs_the_token_and_never_tells_it(server):
    async def go():
        client, kid = await _viewer(server)
        stranger = WireClient(server.base_url)
        with pytest.raises(HTTPClientError) as err:
            await stranger.query_socket(kid, cookie=False)
        assert err.value.code == 403
        ws = await client.query_socket(kid)
        got = await WireClient.collect(ws, 3)
        assert all(server.token not in str(m) for _, m in got)
        ws.close()
        client.close()
        stranger.close()

    run(go())


def test_the_log_holds_neither_token_nor_kernel_ids(server):
    async def go():
        client, kid = await _viewer(server)
        await client.fetch(f"nothing-here?token={server.token}", cookie=False)  # a failed request with the token
        client.close()
        return kid

    kid = run(go())
    time.sleep(1.0)
    log = server.log_path.read_text(errors="replace")
    assert server.token not in log
    assert kid not in log and not UUID.search(log), [line for line in log.splitlines() if UUID.search(line)][:3]


# ----------------------------------------------------------------------------- case 3: floods
def test_unauthenticated_websocket_flood_is_refused_cheaply(server):
    async def go():
        client, kid = await _viewer(server)
        stranger = WireClient(server.base_url)
        outcome = {"opened": 0, "403": 0, "cut": 0}

        async def one():
            try:
                ws = await stranger.channels(kid, cookie=False, timeout=30)
            except HTTPClientError as exc:
                # 403: refused before the upgrade; 599: the connection was closed by the per-client cap
                outcome["403" if exc.code == 403 else "cut"] += 1
                assert exc.code in (403, 599), exc
            except (OSError, asyncio.TimeoutError, WebSocketClosedError):
                outcome["cut"] += 1
            else:
                outcome["opened"] += 1
                ws.close()

        for _ in range(6):
            await asyncio.gather(*(one() for _ in range(150)))
        assert outcome["opened"] == 0 and outcome["403"] > 0, outcome
        assert (await client.fetch("api/kernels/" + kid, timeout=15)).code == 200
        stranger.close()
        client.close()

    run(go())


def test_idle_tcp_connections_beyond_the_per_client_cap_are_closed(server):
    socks = []
    try:
        for _ in range(160):
            s = socket.create_connection(("127.0.0.1", server.port), timeout=5)
            socks.append(s)
        time.sleep(1.0)
        closed = 0
        for s in socks:
            s.settimeout(0.05)
            try:
                closed += s.recv(1) == b""
            except (socket.timeout, TimeoutError):
                pass
            except OSError:
                closed += 1
        assert closed >= 160 - 96
    finally:
        for s in socks:
            s.close()

    async def still_serving():
        client = WireClient(server.base_url, server.token)
        assert (await client.login()).code == 302
        client.close()

    time.sleep(0.5)
    run(still_serving())


# ----------------------------------------------------------------------------- case 5: kernels follow their pages
def test_closed_page_ends_its_kernel_and_an_unconnected_claim_ends_too(server):
    async def go():
        client, kid = await _viewer(server)
        ws = await client.channels(kid)
        await client.send(ws, "shell", "kernel_info_request", {})
        await WireClient.collect(ws, 2)
        assert await _alive(client, kid)
        ws.close()
        await _until_gone(client, kid, within=20)  # grace 2 s + sweep every 5 s
        _, kid2 = await _viewer(server)  # a page fetched (like curl) but never connected
        assert await _alive(client, kid2)
        await _until_gone(client, kid2, within=40)  # connect grace 12 s + sweep
        client.close()

    run(go())


def test_the_shutdown_beacon_of_a_closing_tab_is_accepted_from_the_same_origin(server):
    async def go():
        client, kid = await _viewer(server)
        origin = server.base_url.rstrip("/")
        other = await client.fetch(f"voila/api/shutdown/{kid}", method="POST", body=b"",
                                   headers={"Origin": "http://elsewhere.invalid"})
        assert other.code == 403 and await _alive(client, kid)
        resp = await client.fetch(f"voila/api/shutdown/{kid}", method="POST", body=b"", headers={"Origin": origin})
        assert resp.code == 204
        assert not await _alive(client, kid)
        client.close()

    run(go())


def test_sessions_beyond_the_cap_get_a_styled_page():
    with VoilaServer(token=TOKEN, pool_size=0, extra_args=["--max-kernels", "1", "--connect-grace", "300"]) as srv:
        async def go():
            client = WireClient(srv.base_url, srv.token)
            await client.login()
            kid, _ = await client.claim()
            assert kid
            resp = await client.fetch("")
            body = resp.body.decode()
            assert resp.code == 503 and "busy" in body and "<style>" in body and "Traceback" not in body
            assert resp.headers.get("Retry-After")
            client.close()

        run(go())


# ----------------------------------------------------------------------------- case 6: no tracebacks, no code
def test_bad_widget_values_and_code_requests_reach_nothing(server, tmp_path):
    marker = Path(tmp_path) / "executed"

    async def go():
        client, kid = await _viewer(server)
        ws = await client.channels(kid)
        await client.send(ws, "shell", "comm_info_request", {"target_name": "jupyter.widget"})
        comms = {}
        for channel, msg in await WireClient.collect(ws, 5):
            if msg.get("header", {}).get("msg_type") == "comm_info_reply":
                comms = msg["content"].get("comms", {})
        assert comms, "the dashboard's widgets should be listed"
        for comm_id in comms:  # ask for every widget's state, keep the sliders
            await client.send(ws, "shell", "comm_msg", {"comm_id": comm_id, "data": {"method": "request_state"}})
        sliders = []
        for channel, msg in await WireClient.collect(ws, 8):
            data = msg.get("content", {}).get("data", {})
            if data.get("method") == "update" and str(data.get("state", {}).get("_model_name", "")).endswith(
                    "SliderModel"):
                sliders.append(msg["content"]["comm_id"])
        assert sliders
        for value in ("abc", None, [1] * 1000, {"x": 1}):
            await client.send(ws, "shell", "comm_msg", {"comm_id": sliders[0], "data": {
                "method": "update", "state": {"value": value}, "buffer_paths": []}})
        await client.send(ws, "shell", "execute_request", {
            "code": f"open({str(marker)!r}, 'w').write('x')", "silent": False, "store_history": False,
            "user_expressions": {}, "allow_stdin": False})
        got = await WireClient.collect(ws, 6)
        text = repr(got)
        assert not any(m.get("header", {}).get("msg_type") == "error" for _, m in got)
        assert "Traceback" not in text and "site-packages" not in text and "/work/" not in text
        ws.close()
        client.close()

    run(go())
    assert not marker.exists()


# ----------------------------------------------------------------------------- cases 4 and 7: in the browser
@pytest.fixture(scope="module")
def culling_server():
    _require_browser()
    srv = VoilaServer(token=TOKEN, pool_size=1, extra_args=[
        "--cull-idle-timeout", "25", "--cull-interval", "3", "--disconnect-grace", "5"])
    with srv:
        yield srv


def test_pool_kernels_survive_culling_and_a_culled_page_says_so(culling_server):
    from playwright.sync_api import sync_playwright

    from dashboard.browser import browser_context, wait_for_dashboard

    time.sleep(32)  # the preheated kernel has now waited longer than the idle timeout
    outside = []
    with sync_playwright() as pw, browser_context(pw) as context:
        page = context.new_page()
        page.on("request", lambda r: outside.append(r.url) if not re.match(
            r"^(https?|wss?)://(127\.0\.0\.1|localhost)(:\d+)?/|^(data|blob):", r.url) else None)
        page.goto(culling_server.url)
        wait_for_dashboard(page)  # the pool kernel was kept: the page works
        assert "token" not in page.url
        assert not outside, outside  # case 7: nothing fetched from another host
        assert not page.is_visible(".cl-session-ended")
        page.wait_for_selector(".cl-session-ended", timeout=90_000)  # idle > 25 s: culled, and the page says so
        assert "session has ended" in page.inner_text(".cl-session-ended")
        with pytest.raises(Exception):  # the controls are covered
            page.locator(".cl-control-wind-speed .noUi-handle").first.click(timeout=2_000)


# ----------------------------------------------------------------------------- behind a reverse proxy
def test_behind_a_proxy_each_viewer_keeps_its_own_session_cap():
    """Behind a proxy every viewer arrives from the proxy's address; ``--behind-proxy`` takes the forwarded one."""
    with VoilaServer(token=TOKEN, pool_size=0, extra_args=[
            "--behind-proxy", "--max-kernels", "4", "--max-kernels-per-client", "1", "--connect-grace", "300"]) as srv:
        async def go():
            first = WireClient(srv.base_url, srv.token, headers={"X-Real-IP": "10.20.0.11"})
            again = WireClient(srv.base_url, srv.token, headers={"X-Real-IP": "10.20.0.11"})
            other = WireClient(srv.base_url, srv.token, headers={"X-Real-IP": "10.20.0.12"})
            for client in (first, again, other):
                await client.login()
            kid, page = await first.claim()
            assert kid, page[:300]
            refused = await again.fetch("")
            assert refused.code == 429 and "Too many sessions" in refused.body.decode()
            kid_other, page = await other.claim()
            assert kid_other and kid_other != kid, page[:300]
            for client in (first, again, other):
                client.close()

        run(go())


def test_behind_proxy_refuses_to_listen_beyond_loopback(capsys):
    from dashboard.serve import main

    with pytest.raises(SystemExit):
        main(["--behind-proxy", "--host", "0.0.0.0", "--dry-run"])
    assert "127.0.0.1" in capsys.readouterr().err


# ----------------------------------------------------------------------------- who saved a snapshot
def test_the_server_records_who_each_session_belongs_to(tmp_path):
    """Snapshots record the server's identity of the viewer, not only a typed name (issue 14, point 3)."""
    from dashboard.storage import viewer_identity

    with VoilaServer(token=TOKEN, pool_size=1, extra_args=["--behind-proxy", "--connect-grace", "300"]) as srv:
        time.sleep(3.0)

        async def go():
            client = WireClient(srv.base_url, srv.token, headers={"X-Real-IP": "10.20.0.31"})
            await client.login()
            kid, page = await client.claim()
            assert kid, page[:300]
            found = list(Path("/").glob("tmp/voila_*/kernel-" + kid + ".json"))
            assert found, "connection file of the claimed kernel not found"
            identity = viewer_identity(found[0])
            assert identity.endswith(" at 10.20.0.31") and len(identity) > len(" at 10.20.0.31"), identity
            record = found[0].with_name(f"viewer-{kid}.json")
            assert record.stat().st_mode & 0o077 == 0  # only the server's user reads it
            from convlib import snapshot
            from convlib.study import CaseSpec, StudySpec, run_study

            spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
            path = snapshot.save(tmp_path / "s.snapshot.json", spec, run_study(spec), author="A. Engineer",
                                 saved_by=identity)
            loaded = snapshot.load(path)
            assert (loaded.author, loaded.saved_by) == ("A. Engineer", identity)
            client.close()

        run(go())


def test_a_kernel_without_a_server_record_signs_nothing(tmp_path):
    from dashboard.storage import viewer_identity

    conn = tmp_path / "kernel-0000.json"
    conn.write_text("{}")
    assert viewer_identity(conn) == ""
    (tmp_path / "viewer-0000.json").write_text("[1, 2]")
    assert viewer_identity(conn) == ""
    (tmp_path / "viewer-0000.json").write_text('{"name": "Anonymous Io", "address": "10.0.0.7"}')
    assert viewer_identity(conn) == "Anonymous Io at 10.0.0.7"
