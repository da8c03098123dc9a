"""Published convection correlations and their registry.

``natural``, ``forced`` and ``mixed`` hold one pure function per law; the
registry holds one frozen record per law and is the only dispatcher.
"""
from . import forced, mixed, natural
from .registry import (
    GEOMETRIES,
    REGISTRY,
    Correlation,
    OutOfRangeWarning,
    catalog,
    evaluate,
    get,
    methods,
    nusselt,
)

__all__ = [
    "natural", "forced", "mixed", "REGISTRY", "GEOMETRIES", "Correlation", "OutOfRangeWarning",
    "catalog", "evaluate", "get", "methods", "nusselt",
]
