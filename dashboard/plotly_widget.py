"""plotly's ``FigureWidget`` as the dashboard creates it: quick to import in a fresh kernel, and loading plotly's
JavaScript bundle from the server when one publishes it.

Imports plotly and the dashboard's settings only, so that the latency benchmark's minimal page
(``benchmarks/dashboard_latency.py``) builds its figure the same way without importing the rest of the dashboard.
"""
from __future__ import annotations

import functools
import json
import os
import sys

import plotly.graph_objects as go

from .settings import BUNDLE_ENV

__all__ = ["figure_widget"]

_LOADER = """
const config = document.getElementById("jupyter-config-data");
const base = (config && JSON.parse(config.textContent).baseUrl) || "/";
const bundle = await import(new URL(base.replace(/\\/*$/, "/") + %s, window.location.origin).href);
export default bundle.default;
"""


#: Optional module that jsonschema imports for its IRI format checks; it compiles about 40 grammars when imported
#: (~3 s on a 2-core VM), on the path plotly's FigureWidget -> plotly.io -> nbformat -> jsonschema.
_IRI_GRAMMARS = "rfc3987_syntax"


@functools.lru_cache(maxsize=1)
def _figure_widget_class() -> type:
    """plotly's ``FigureWidget`` class, imported without jsonschema's IRI grammars when jsonschema is not loaded
    yet: the first plot of a fresh kernel does not wait for them. The one effect: jsonschema in this process has
    no ``iri`` / ``iri-reference`` format check (nothing of the dashboard validates IRIs); the module itself stays
    importable."""
    skip = "jsonschema" not in sys.modules and _IRI_GRAMMARS not in sys.modules
    if skip:
        sys.modules[_IRI_GRAMMARS] = None  # makes jsonschema's ``with suppress(ImportError)`` skip it
    try:
        return go.FigureWidget
    finally:
        if skip and sys.modules.get(_IRI_GRAMMARS, "") is None:
            del sys.modules[_IRI_GRAMMARS]


@functools.lru_cache(maxsize=4)
def _shared_bundle_class(path: str) -> type:
    return type("SharedBundleFigureWidget", (_figure_widget_class(),), {"_esm": _LOADER % json.dumps(path),
                                                                         "__module__": __name__})


def figure_widget(**kwargs) -> go.FigureWidget:
    """A ``FigureWidget``; one that loads plotly's bundle from the server when :data:`BUNDLE_ENV` is set."""
    path = os.environ.get(BUNDLE_ENV)
    return (_shared_bundle_class(path) if path else _figure_widget_class())(**kwargs)
