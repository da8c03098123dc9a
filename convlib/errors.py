"""Errors by kind.

:class:`InputError` is raised for input that breaks a rule: a value out of its range, a name that is
not one of the choices, a cell of a line list that is not a number, a unit of the wrong kind, inputs
outside what the property data and solvers can compute. It is a :class:`ValueError`, so code that
catches ``ValueError`` keeps working; code that must tell a user's mistake from a fault of the
program (a line list computing the good rows and reporting the bad ones) catches ``InputError``
only and lets every other exception through.

>>> from convlib.validation import as_array
>>> try:
...     as_array("emissivity", 1.2, low=0, high=1)
... except InputError as exc:
...     print(exc.field, "|", exc.rule, "|", exc.value)
emissivity | between 0 and 1 | 1.2
"""
from __future__ import annotations

from typing import Any

__all__ = ["InputError"]


class InputError(ValueError):
    """Input that breaks a rule; ``str(error)`` is the whole message for the user.

    Parameters and attributes
    -------------------------
    message : str
        The text shown to the user; it names the field, the rule and the value given.
    field : str
        The input as the caller named it: an argument (``"pipe_outer_diameter"``), a line-list column
        (``"nps"``), a command-line option (``"--layer"``); inputs that a rule ties together are joined
        by ``", "`` (``"pipe_wall_thickness, pipe_conductivity"``).
    rule : str
        The rule, short: ``"greater than 0 m"``, ``"one of: indoor, outdoor"``, ``"a number"``.
    value : object
        What was given (``None`` when the rule is that the input is missing).
    """

    def __init__(self, message: str, *, field: str, rule: str = "", value: Any = None):
        super().__init__(message)
        self.field = field
        self.rule = rule
        self.value = value

    def within(self, field: str) -> InputError:
        """The same error reported under an enclosing ``field``: message ``"field: message"``.

        >>> InputError("unknown method 'x'", field="method", rule="one of: a, b", value="x").within("natural").field
        'natural'
        """
        return type(self)(f"{field}: {self}", field=field, rule=self.rule, value=self.value)

    def __reduce__(self):  # pickle (process pools) with the keyword-only attributes
        return _rebuild, (type(self), str(self), self.field, self.rule, self.value)


def _rebuild(cls, message, field, rule, value):
    return cls(message, field=field, rule=rule, value=value)
