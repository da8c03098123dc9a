"""Dashboard latency in a real browser, beside a minimal voila page (run by ``make bench``; a measurement, not a test).

Measures, with voila on a free loopback port and headless Chromium, for the dashboard on its demo study and, as
the baseline in the same run, for a minimal page served and driven the same way (one ipywidgets ``FloatSlider``, one
plotly ``FigureWidget`` whose trace follows the slider and an ``HTML`` label that follows it, written to a temporary
directory at run time; the floor that voila + ipywidgets + plotly impose on this machine):

* slider key press -> redrawn plot (``plotly_afterplot`` or a changed trace path) and -> updated card or label
  (text change), waiting for both before the next press; ``--presses`` presses on each of ``--rounds`` pages;
* page request -> first interactive plot (cards or label shown and a plot drawn), with a cold kernel (no pool,
  the kernel starts with the request) and with a preheated one (a pool of one, the notebook run before the
  request); ``--page-rounds`` requests of each;
* memory (RSS) of the dashboard's viewer kernel.

Each figure is printed with its target (speed issue: sweep redraw median <= 60 ms and p95 <= 150 ms, cards <= 35 ms,
first plot <= 2.0 s preheated and <= 8 s cold), the baseline and the ratio dashboard / baseline, and recorded
with :mod:`benchmarks.record` (value: the median over all presses or rounds; baseline: the minimal page's).
Timings on a shared 2-core machine are noisy: read the medians and ratios, re-run for a clean figure.

Usage: ``.venv/bin/python benchmarks/dashboard_latency.py [--presses 30] [--rounds 2] [--page-rounds 3]``
(about 3 minutes with the defaults).
"""
from __future__ import annotations

import argparse
import json
import statistics
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from benchmarks.record import record  # noqa: E402
from dashboard.browser import VoilaServer, browser_context, chromium_path, wait_for_dashboard  # noqa: E402

TARGETS = {"sweep_redraw": 60.0, "sweep_redraw_p95": 150.0, "card_update": 35.0, "first_plot_preheated": 2.0,
           "first_plot_cold": 8.0}
BASELINE_LABEL = "minimal voila page"

#: Where each page's slider handle, plot and cards are (CSS selectors; the cards' parent is observed).
DASHBOARD = {"handle": ".cl-control-wind-speed .noUi-handle", "graph": ".cl-panel-sweep .js-plotly-plot",
             "cards": ".cl-card-regime"}
MINIMAL = {"handle": ".bl-slider .noUi-handle", "graph": ".bl-plot .js-plotly-plot", "cards": ".bl-label"}

#: The minimal page: a slider, a figure whose one trace follows it, a label that follows it.
_MINIMAL_SOURCE = '''\
import ipywidgets as widgets
import numpy as np
from dashboard.plotly_widget import figure_widget  # the dashboard's widget class: bundle from the server

x = np.linspace(0.0, 20.0, 61)
slider = widgets.FloatSlider(value=3.0, min=0.0, max=20.0, step=0.1, description="input",
                             continuous_update=True)
slider.add_class("bl-slider")
fig = figure_widget(data=[{"type": "scatter", "mode": "lines", "x": x, "y": 50.0 + 10.0 * np.sqrt(x + 3.0)}],
                    layout={"width": 900, "height": 420, "template": "plotly_white"})
box = widgets.Box([fig])
box.add_class("bl-plot")
label = widgets.HTML('<span class="cl-value">3.0</span>')
label.add_class("bl-label")


def follow(change):
    value = change["new"]
    fig.data[0].y = 50.0 + 10.0 * np.sqrt(x + value)
    label.value = f'<span class="cl-value">{value:.1f}</span>'


slider.observe(follow, "value")
widgets.VBox([slider, widgets.Box([label]), box])
'''

_HOOKS = """
(sel) => {
  const w = window.__lat = {press: [], plot: [], card: []};
  const handle = document.querySelector(sel.handle);
  handle.addEventListener('keydown', () => w.press.push(performance.now()), true);
  const graph = document.querySelector(sel.graph);
  graph.on('plotly_afterplot', () => w.plot.push(performance.now()));
  new MutationObserver(() => w.plot.push(performance.now()))
      .observe(graph.querySelector('.scatterlayer') || graph, {subtree: true, attributes: true,
                                                              attributeFilter: ['d']});
  const cards = document.querySelector(sel.cards).parentElement;
  new MutationObserver(() => w.card.push(performance.now()))
      .observe(cards, {subtree: true, childList: true, characterData: true});
}
"""

_DONE = """
(i) => { const w = window.__lat; if (w.press.length <= i) return false;
  const t = w.press[i]; return w.plot.some(x => x > t) && w.card.some(x => x > t); }
"""

_RESULT = """
() => { const w = window.__lat; return w.press.map((t, i) => {
  const next = i + 1 < w.press.length ? w.press[i + 1] : Infinity;
  const p = w.plot.filter(x => x > t && x < next), c = w.card.filter(x => x > t && x < next);
  return [p.length ? Math.max(...p) - t : null, c.length ? Math.min(...c) - t : null]; }); }
"""

_READY = """
(sel) => { const c = document.querySelector(sel.cards + ' .cl-value');
  return !!(c && c.textContent.trim().length) &&
    [...document.querySelectorAll('.js-plotly-plot')].some(g => g.data && g.data.length > 0); }
"""


def minimal_notebook(folder: Path) -> Path:
    """Write the minimal page's notebook into ``folder`` and return its path."""
    notebook = {"cells": [{"cell_type": "code", "execution_count": None, "id": "minimal", "metadata": {},
                           "outputs": [], "source": _MINIMAL_SOURCE.splitlines(keepends=True)}],
                "metadata": {"kernelspec": {"display_name": "Python 3", "language": "python", "name": "python3"},
                             "language_info": {"name": "python"}},
                "nbformat": 4, "nbformat_minor": 5}
    path = folder / "minimal.ipynb"
    path.write_text(json.dumps(notebook, indent=1), encoding="utf-8")
    return path


def _ready(page, sel: dict) -> None:
    if sel is DASHBOARD:
        wait_for_dashboard(page)
    else:
        page.wait_for_function(_READY, arg=sel, timeout=120_000)


def _load(pw, server, sel: dict):
    """Open the page; (context manager, page, seconds from request to the first interactive plot)."""
    context_manager = browser_context(pw)
    context = context_manager.__enter__()
    page = context.new_page()
    start = time.perf_counter()
    page.goto(server.url)
    _ready(page, sel)
    return context_manager, page, time.perf_counter() - start


def _press(pw, notebook, sel: dict, presses: int, rounds: int) -> tuple[list, list, list[float]]:
    """Key presses on ``rounds`` pages of one server: (plot ms, card ms) per press, and the kernels' RSS."""
    plots, cards, rss = [], [], []
    with VoilaServer(notebook=notebook) as server:
        for _ in range(rounds):
            cm, page, _ = _load(pw, server, sel)
            page.wait_for_timeout(1500)
            page.evaluate(_HOOKS, sel)
            page.locator(sel["handle"]).first.focus()
            for i in range(presses):
                page.keyboard.press("ArrowRight")
                page.wait_for_function(_DONE, arg=i, timeout=30_000)
            rows = page.evaluate(_RESULT)
            plots.append([r[0] for r in rows])
            cards.append([r[1] for r in rows])
            rss = _kernel_rss(server) or rss
            cm.__exit__(None, None, None)
    return plots, cards, rss


def _first_plot(pw, notebook, sel: dict, rounds: int, preheat_wait: float) -> tuple[list[float], list[float]]:
    """Seconds from request to first interactive plot: cold kernels (one server each), preheated ones."""
    cold, warm = [], []
    for _ in range(rounds):
        with VoilaServer(notebook=notebook) as server:
            cm, _, seconds = _load(pw, server, sel)
            cm.__exit__(None, None, None)
            cold.append(seconds)
    with VoilaServer(token="latency-benchmark", pool_size=1, notebook=notebook) as shared:
        for _ in range(rounds):
            time.sleep(preheat_wait)  # the pool's (next) kernel runs the notebook before the request
            cm, _, seconds = _load(pw, shared, sel)
            cm.__exit__(None, None, None)
            warm.append(seconds)
    return cold, warm


def _kernel_rss(server) -> list[float]:
    try:
        import psutil
    except ImportError:
        return []
    out = []
    for child in psutil.Process(server.process.pid).children(recursive=True):
        try:
            if "ipykernel" in " ".join(child.cmdline()):
                out.append(child.memory_info().rss / 2**20)
        except psutil.Error:
            continue
    return out


def _stats(rounds: list[list]) -> dict:
    """Median and p95 over every press of every round; best and median of the rounds' medians."""
    every = np.asarray([x for r in rounds for x in r if x is not None], dtype=float)
    per_round = [float(np.median([x for x in r if x is not None])) for r in rounds if any(x is not None for x in r)]
    if every.size == 0:
        return {"median": float("nan"), "p95": float("nan"), "n": 0, "rounds": []}
    return {"median": float(np.median(every)), "p95": float(np.percentile(every, 95)), "n": int(every.size),
            "rounds": per_round}


def _line(key: str, label: str, value: float, base: float, unit: str, spread: str) -> str:
    target = TARGETS[key]
    verdict = "meets" if value <= target else f"MISSES by {value - target:.3g} {unit}"
    ratio = value / base if base > 0 else float("nan")
    fmt = ".0f" if unit == "ms" else ".2f"
    return (f"  {label:<36} {value:7{fmt}} {unit}  (target <= {target:g} {unit}: {verdict}); baseline "
            f"{base:{fmt}} {unit}, ratio {ratio:4.2f}{spread}")


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--presses", type=int, default=30, help="key presses per page (default 30)")
    parser.add_argument("--rounds", type=int, default=2, help="pages pressed on, each (default 2)")
    parser.add_argument("--page-rounds", type=int, default=3, help="page requests, cold and preheated each "
                        "(default 3)")
    parser.add_argument("--preheat-wait", type=float, default=12.0, help="seconds given to the pool's kernel "
                        "to run the notebook before each preheated request (default 12)")
    args = parser.parse_args(argv)
    if chromium_path() is None:
        print("dashboard latency: skipped, no Chromium (apt-get install -y chromium)")
        return 0
    from playwright.sync_api import sync_playwright

    print("Dashboard latency (demo study, wind slider with the wind sweep on screen; headless Chromium 1280x800, "
          f"voila on loopback); baseline: {BASELINE_LABEL} (slider + FigureWidget + label), same server and driving")
    with tempfile.TemporaryDirectory(prefix="convlib-latency-") as tmp, sync_playwright() as pw:
        minimal = minimal_notebook(Path(tmp))
        d_plot, d_card, rss = _press(pw, None, DASHBOARD, args.presses, args.rounds)
        b_plot, b_card, _ = _press(pw, minimal, MINIMAL, args.presses, args.rounds)
        d_cold, d_warm = _first_plot(pw, None, DASHBOARD, args.page_rounds, args.preheat_wait)
        b_cold, b_warm = _first_plot(pw, minimal, MINIMAL, args.page_rounds, args.preheat_wait)

    dp, dc, bp, bc = _stats(d_plot), _stats(d_card), _stats(b_plot), _stats(b_card)
    rounds_ms = lambda s: ", rounds' medians " + " / ".join(f"{m:.0f}" for m in s["rounds"])  # noqa: E731
    rows = [("sweep_redraw", "key press -> redrawn sweep, median", dp["median"], bp["median"], "ms",
             rounds_ms(dp), dp),
            ("sweep_redraw_p95", "key press -> redrawn sweep, p95", dp["p95"], bp["p95"], "ms", "", dp),
            ("card_update", "key press -> cards, median", dc["median"], bc["median"], "ms", rounds_ms(dc), dc)]
    for key, label, value, base, unit, spread, stats in rows:
        print(_line(key, label, value, base, unit, spread + f" ({stats['n']} presses)"))
        record(key, value=value, baseline=base, baseline_label=BASELINE_LABEL,
               best=min(stats["rounds"]) if stats["rounds"] and key != "sweep_redraw_p95" else None,
               median=statistics.median(stats["rounds"]) if stats["rounds"] and key != "sweep_redraw_p95" else None,
               note=f"{stats['n']} presses on {len(stats['rounds'])} pages")
    for key, label, runs, base_runs in (("first_plot_preheated", "first interactive plot, preheated", d_warm, b_warm),
                                        ("first_plot_cold", "first interactive plot, cold", d_cold, b_cold)):
        value, base = statistics.median(runs), statistics.median(base_runs)
        spread = f", best {min(runs):.2f} s, rounds " + " / ".join(f"{r:.2f}" for r in runs)
        print(_line(key, label, value, base, "s", spread))
        record(key, value=value, baseline=base, baseline_label=BASELINE_LABEL, best=min(runs), median=value,
               note=f"{len(runs)} page requests; baseline best {min(base_runs):.2f} s")
    if rss:
        print(f"  viewer kernel memory (RSS): {statistics.mean(rss):.0f} MiB per kernel ({len(rss)} kernel(s))")
    else:
        print("  viewer kernel memory: psutil not installed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
