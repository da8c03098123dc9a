"""A numeric control shown in the current unit system and holding its value in SI."""
from __future__ import annotations

import math
from typing import Callable

import ipywidgets as widgets

from .. import settings
from ..display import Display

__all__ = ["QuantityControl", "DESCRIPTION_STYLE"]

DESCRIPTION_STYLE = {"description_width": "165px"}


def _decimals(step: float) -> int:
    return max(0, -int(math.floor(math.log10(step) + 1e-9)))


class QuantityControl:
    """A slider (or bounded number box) for one quantity.

    The displayed value is in the unit of the current system; :attr:`si` is the
    value in SI, converted with :mod:`convlib.units`. A value arriving from the
    browser is clamped to the widget's bounds by ipywidgets before it is read, and
    one within half a step of the shown value is the browser snapping it to the
    slider's grid, not a change of the input.

    A switch of unit system builds a new widget in :attr:`box` (and closes the old
    one): a value the browser sends late for the old widget, in the old units, can
    never be read in the new ones.

    Parameters
    ----------
    name : str
        Key of :data:`dashboard.settings.CONTROLS` (a CaseSpec field name).
    si_value : float
        Initial value [SI].
    system : str
        Unit system, ``"SI"`` or ``"US"``.
    on_change : callable, optional
        ``on_change(name, si_value)`` after the user changes the value.
    """

    def __init__(self, name: str, si_value: float, system: str = "SI",
                 on_change: Callable[[str, float], None] | None = None, label: str | None = None):
        self.name = name
        self.setting = settings.CONTROLS[name]
        self.label = label or self.setting.label
        self.on_change = on_change
        self._si = float(si_value)
        self._quiet = False
        self.system = system
        self.widget = self._build()
        self.box = widgets.Box([self.widget], layout=widgets.Layout(width="100%"))

    # ---- values
    @property
    def si(self) -> float:
        """Current value [SI]."""
        return self._si

    def set_si(self, value: float) -> None:
        """Set the value [SI] without calling ``on_change``; the range widens if it must."""
        self._si = float(value)
        self._update()

    def set_system(self, system: str) -> None:
        """Show the control in another unit system (the SI value is kept exactly)."""
        if system == self.system:
            self._update()
            return
        self.system = system
        old, self.widget = self.widget, self._build(disabled=self.widget.disabled)
        old.unobserve(self._changed, "value")
        self.box.children = (self.widget,)
        old.close()

    # ---- widget
    def _state(self) -> dict:
        display = Display(self.system)
        step = self.setting.step[self.system]
        value = float(display.value(self._si, self.name))
        low = float(display.value(self.setting.low, self.name))
        high = float(display.value(self.setting.high, self.name))
        low = round(math.floor(min(low, value) / step) * step, 10)
        high = round(math.ceil(max(high, value) / step) * step, 10)
        unit = display.label(self.name)
        description = self.label if unit == "–" else f"{self.label} [{unit}]"
        state = dict(min=low, max=high, step=step, value=value, description=description, tooltip=description)
        if self.setting.widget == "slider":
            state["readout_format"] = f".{_decimals(step)}f"
        else:
            state["value"] = round(value, _decimals(step) + 2)  # a number box shows every digit it is given
        return state

    def _build(self, disabled: bool = False) -> widgets.Widget:
        kind = widgets.FloatSlider if self.setting.widget == "slider" else widgets.BoundedFloatText
        extra = {"continuous_update": True} if kind is widgets.FloatSlider else {}
        widget = kind(style=DESCRIPTION_STYLE, layout=widgets.Layout(width="100%"), disabled=disabled,
                      **extra, **self._state())
        widget.add_class(f"cl-control-{self.name.replace('_', '-')}")
        widget.observe(self._changed, "value")
        return widget

    def _update(self) -> None:
        """Show the current SI value (and label) in the same unit system: one message to the browser."""
        state = self._state()
        self._quiet = True
        try:
            with self.widget.hold_sync(), self.widget.hold_trait_notifications():
                self.widget.max = max(state["max"], self.widget.min)
                for key in ("min", "max", "step", "value", "description", "tooltip", "readout_format"):
                    if key in state:
                        setattr(self.widget, key, state[key])
        finally:
            self._quiet = False

    def _changed(self, change) -> None:
        if self._quiet:
            return
        display = Display(self.system)
        shown = float(display.value(self._si, self.name))
        if abs(change["new"] - shown) < 0.5 * self.widget.step * (1.0 - 1e-9):
            return  # the browser snapped the shown value to the step grid: not a change of the input
        self._si = float(display.si(change["new"], self.name))
        if self.on_change is not None:
            self.on_change(self.name, self._si)

    # ---- convenience
    @property
    def disabled(self) -> bool:
        return self.widget.disabled

    @disabled.setter
    def disabled(self, value: bool) -> None:
        self.widget.disabled = value

    def show(self, visible: bool) -> None:
        """Show or hide the control."""
        self.box.layout.display = None if visible else "none"
