"""Load test of the shared server: N viewers in headless Chromium moving sliders and switching tabs.

``make loadtest`` (or ``python -m dashboard.loadtest --viewers 10 --duration 120``) starts the shared
server on a free loopback port (or uses ``--url`` and ``--token`` of a running one), opens N viewers,
each pressing the wind slider's arrow keys every second or so and switching tabs now and then, and
prints: page errors, pages that never loaded, key press -> result card latency (p50 / p95), server and
kernel memory during the run, and after every tab has closed how long the kernels take to return to the
preheated pool. Only loopback addresses are contacted.

Figures depend on the machine and on what else runs on it: read them beside the machine's load.
"""
from __future__ import annotations

import argparse
import asyncio
import random
import re
import statistics
import sys
import time
from dataclasses import dataclass, field

from .browser import CHROMIUM_ARGS, LOOPBACK, VoilaServer, chromium_path

__all__ = ["LoadReport", "run_load", "kernel_processes", "main"]

_CARD = ".cl-card-q-per-length .cl-card-body"
_HANDLE = ".cl-control-wind-speed .noUi-handle"
_TABS = ".cl-tabs .lm-TabBar-tab"
_HOOK = """
() => { if (window.__load) return; const w = window.__load = {press: [], card: []};
  const text = () => { const c = document.querySelector('%s'); return c ? c.innerText : ''; };
  let last = text();
  document.querySelector('%s').addEventListener('keydown', () => w.press.push(performance.now()), true);
  const root = document.querySelector('.cl-card-regime').parentElement;
  new MutationObserver(() => { const t = text(); if (t !== last) { last = t; w.card.push(performance.now()); } })
      .observe(root, {subtree: true, childList: true, characterData: true}); }
""" % (_CARD, _HANDLE)
_SINCE = "(i) => { const w = window.__load; const t = w.press[i]; const c = w.card.find(x => x > t);" \
         " return c === undefined ? null : c - t; }"
_FATAL = re.compile(r"Failed to initialize model|Error: .*kernel|Traceback", re.IGNORECASE)


@dataclass
class LoadReport:
    """What a load run measured (times in ms and s, memory in MiB)."""

    viewers: int
    duration: float
    loaded: int = 0
    load_times: list = field(default_factory=list)
    latencies: list = field(default_factory=list)
    missed_updates: int = 0
    errors: list = field(default_factory=list)
    http_errors: list = field(default_factory=list)
    peak_server_mib: float = 0.0
    peak_kernels_mib: float = 0.0
    peak_kernels: int = 0
    kernels_after: int = 0
    pool_size: int = 0
    seconds_to_pool: float | None = None
    memory_after_mib: float = 0.0

    def percentile(self, q: float) -> float:
        if not self.latencies:
            return float("nan")
        values = sorted(self.latencies)
        return values[min(len(values) - 1, int(round(q / 100.0 * (len(values) - 1))))]

    def lines(self) -> list[str]:
        p50, p95 = self.percentile(50), self.percentile(95)
        load = (f"{statistics.median(self.load_times):.1f} s median, {max(self.load_times):.1f} s slowest"
                if self.load_times else "none loaded")
        after = (f"{self.seconds_to_pool:.0f} s" if self.seconds_to_pool is not None
                 else f"not within the wait ({self.kernels_after} kernels left)")
        return [
            f"viewers {self.viewers}, {self.duration:.0f} s of slider moves and tab switches",
            f"  pages loaded        : {self.loaded} of {self.viewers} ({load})",
            f"  key -> card         : p50 {p50:.0f} ms, p95 {p95:.0f} ms over {len(self.latencies)} presses; "
            f"{self.missed_updates} presses without an update within 30 s",
            f"  errors              : {len(self.errors)} page errors, {len(self.http_errors)} HTTP errors",
            f"  memory during       : server {self.peak_server_mib:.0f} MiB, kernels {self.peak_kernels_mib:.0f} MiB "
            f"in {self.peak_kernels} kernels at the peak",
            f"  after every tab shut: kernels back to the pool of {self.pool_size} in {after}; "
            f"server and kernels then {self.memory_after_mib:.0f} MiB",
        ]


def kernel_processes(server_pid: int) -> list:
    """The ipykernel processes under the server."""
    import psutil

    out = []
    try:
        children = psutil.Process(server_pid).children(recursive=True)
    except psutil.Error:
        return out
    for child in children:
        try:
            if "ipykernel" in " ".join(child.cmdline()):
                out.append(child)
        except psutil.Error:
            continue
    return out


def _memory(server_pid: int) -> tuple[float, float, int]:
    import psutil

    try:
        server = psutil.Process(server_pid).memory_info().rss / 2**20
    except psutil.Error:
        server = 0.0
    kernels = kernel_processes(server_pid)
    total = 0.0
    for k in kernels:
        try:
            total += k.memory_info().rss / 2**20
        except psutil.Error:
            pass
    return server, total, len(kernels)


async def _viewer(browser, url: str, report: LoadReport, duration: float, seed: int) -> None:
    rng = random.Random(seed)
    context = await browser.new_context(viewport={"width": 1280, "height": 800})

    async def only_loopback(route):
        host = re.sub(r":\d+$", "", route.request.url.split("/")[2]) if "://" in route.request.url else ""
        if route.request.url.startswith(("data:", "blob:")) or host in LOOPBACK:
            await route.continue_()
        else:
            await route.abort()

    await context.route("**/*", only_loopback)
    page = await context.new_page()
    page.on("pageerror", lambda exc: report.errors.append(f"page error: {str(exc)[:200]}"))
    page.on("console", lambda msg: report.errors.append(f"console: {msg.text[:200]}")
            if msg.type == "error" and _FATAL.search(msg.text) else None)
    page.on("response", lambda resp: report.http_errors.append(f"{resp.status} {resp.url.split('?')[0][-60:]}")
            if resp.status >= 500 else None)
    try:
        start = time.monotonic()
        await page.goto(url, timeout=300_000)
        await page.wait_for_function(f"() => {{ const v = document.querySelector('{_CARD}');"
                                     " return v && v.textContent.trim().length > 0; }", timeout=300_000)
        report.load_times.append(time.monotonic() - start)
        report.loaded += 1
        stop_at = time.monotonic() + duration  # each viewer works for the whole duration once its page is up
        await page.evaluate(_HOOK)
        handle = page.locator(_HANDLE).first
        presses, key = 0, "ArrowRight"
        tabs = await page.locator(_TABS).count()
        while time.monotonic() < stop_at:
            if tabs and rng.random() < 0.15:
                await page.locator(_TABS).nth(rng.randrange(tabs)).click()
            await handle.focus()
            key = "ArrowLeft" if key == "ArrowRight" else "ArrowRight"
            await page.keyboard.press(key)
            try:
                handle_js = await page.wait_for_function(_SINCE, arg=presses, timeout=30_000)
                report.latencies.append(float(await handle_js.json_value()))
            except Exception:  # noqa: BLE001 - a press that never updated the card is counted, not raised
                report.missed_updates += 1
            presses += 1
            await asyncio.sleep(rng.uniform(0.6, 1.4))
    except Exception as exc:  # noqa: BLE001 - a viewer that failed is reported, the others go on
        report.errors.append(f"viewer {seed}: {type(exc).__name__}: {str(exc)[:200]}")
    finally:
        await context.close()


async def _run(url: str, server_pid: int | None, viewers: int, duration: float, pool_size: int,
               settle: float, report: LoadReport) -> None:
    from playwright.async_api import async_playwright

    async with async_playwright() as pw:
        browser = await pw.chromium.launch(executable_path=chromium_path(), headless=True, args=CHROMIUM_ARGS)
        sampler_done = asyncio.Event()

        async def sample():
            while not sampler_done.is_set():
                if server_pid:
                    server, kernels, count = _memory(server_pid)
                    report.peak_server_mib = max(report.peak_server_mib, server)
                    report.peak_kernels_mib = max(report.peak_kernels_mib, kernels)
                    report.peak_kernels = max(report.peak_kernels, count)
                await asyncio.sleep(1.0)

        sampler = asyncio.create_task(sample())
        jobs = []
        for i in range(viewers):
            jobs.append(asyncio.create_task(_viewer(browser, url, report, duration, i)))
            await asyncio.sleep(0.5)  # viewers arrive a little apart, as people do
        await asyncio.gather(*jobs)
        await browser.close()
        sampler_done.set()
        await sampler
    if server_pid:
        closed = time.monotonic()
        while time.monotonic() - closed < settle:
            count = len(kernel_processes(server_pid))
            report.kernels_after = count
            if count <= pool_size:
                report.seconds_to_pool = time.monotonic() - closed
                break
            await asyncio.sleep(1.0)
        server, kernels, _ = _memory(server_pid)
        report.memory_after_mib = server + kernels


def run_load(viewers: int = 10, duration: float = 120.0, pool_size: int = 2, settle: float = 120.0,
             url: str | None = None, server_pid: int | None = None, extra_args=()) -> LoadReport:
    """Run the load test; starts its own shared server unless ``url`` is given."""
    if chromium_path() is None:
        raise RuntimeError("no Chromium: apt-get install -y chromium (or set CONVLIB_CHROMIUM)")
    report = LoadReport(viewers=viewers, duration=duration, pool_size=pool_size)
    if url is not None:
        asyncio.run(_run(url, server_pid, viewers, duration, pool_size, settle, report))
        return report
    args = ["--max-kernels", str(viewers + pool_size + 2), "--max-kernels-per-client", str(viewers + pool_size + 2),
            "--max-sockets-per-client", str(4 * viewers + 4), "--max-connections-per-client",
            str(16 * viewers + 64), *extra_args]
    with VoilaServer(token="load-" + str(random.getrandbits(64)), pool_size=pool_size, extra_args=args) as srv:
        time.sleep(5.0)  # the pool's kernels run the notebook first
        asyncio.run(_run(srv.url, srv.process.pid, viewers, duration, pool_size, settle, report))
    return report


def main(argv=None) -> int:
    p = argparse.ArgumentParser(prog="python -m dashboard.loadtest", description=__doc__.split("\n\n")[0])
    p.add_argument("--viewers", type=int, default=10, help="viewers at once (default 10)")
    p.add_argument("--duration", type=float, default=120.0, help="seconds of slider moves per viewer, counted from its page load (default 120)")
    p.add_argument("--pool-size", type=int, default=2, help="preheated kernels of the server it starts (default 2)")
    p.add_argument("--settle", type=float, default=120.0, help="seconds to wait for kernels to end after the "
                   "tabs close (default 120)")
    p.add_argument("--url", default=None, help="a running server's address with ?token=... (default: start one)")
    args = p.parse_args(argv)
    print(f"load test: {args.viewers} viewers for {args.duration:.0f} s (headless Chromium, loopback)", flush=True)
    report = run_load(args.viewers, args.duration, args.pool_size, args.settle, url=args.url)
    print("\n".join(report.lines()))
    for line in (report.errors + report.http_errors)[:10]:
        print("  " + line)
    return 0 if not report.errors and report.loaded == report.viewers else 1


if __name__ == "__main__":
    sys.exit(main())
