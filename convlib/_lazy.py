"""A module imported on first use, so that importing convlib (and starting the command line) stays fast.

CoolProp alone takes about 2.5 s to import; most command-line calls never need it (the default air table at
standard pressure ships with the package, see :mod:`convlib.air_table`).
"""
from __future__ import annotations

import importlib

__all__ = ["LazyModule"]


class LazyModule:
    """Stand-in for ``import name``: the module is imported at the first attribute access.

    >>> json = LazyModule("json")
    >>> json.dumps([1])
    '[1]'
    """

    __slots__ = ("_name", "_module")

    def __init__(self, name: str):
        self._name = name
        self._module = None

    def __getattr__(self, attr: str):
        module = self._module
        if module is None:
            module = importlib.import_module(self._name)
            self._module = module
        return getattr(module, attr)

    def __repr__(self) -> str:
        state = "imported" if self._module is not None else "not imported yet"
        return f"<lazy module {self._name!r} ({state})>"
