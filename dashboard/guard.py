"""Refuse bad widget state sent by a viewer's page (kernel side of the shared server).

On a shared voila server a viewer's browser can send any JSON through the widget
comm channel. ipywidgets applies it with the traits' own validation and, when
that raises, prints a full traceback (with server paths) to the kernel's output
channel, which reaches the page. :func:`install` makes every widget of the
kernel check what arrives first and refuse what a real control could not have
sent:

* a message that is not an ``update``, ``request_state`` or ``custom`` message of
  the widget protocol, or whose binary buffers do not fit its state;
* a state with more than :data:`MAX_KEYS` keys, a list or mapping of more than
  :data:`MAX_ITEMS` items, a text longer than :data:`MAX_STRING` characters,
  nesting deeper than :data:`MAX_DEPTH` or more than :data:`MAX_NODES` values;
* for a numeric trait: anything but a finite number (text, ``None`` unless the
  trait allows it, lists, mappings, booleans, NaN, infinity, huge integers);
* for a bounded control (slider, bounded number box): a value outside its
  min/max (ipywidgets would clamp it silently), and any change of its bounds,
  step or base;
* for a selection (dropdown, radio buttons, ...): an index that is not one of its
  choices, and any change of its labels; for tabs, an index that is not a tab;
* a change of ``children``, ``layout`` or ``style`` (only the app sets them).

Keys a widget does not sync are ignored, as ipywidgets does, and logged.
Callbacks the page triggers (button clicks, text submissions, custom messages)
that raise are reported the same way instead of with ipywidgets' traceback.

A refused state is not applied: the widget's current state is sent back so the
page snaps back, the incident is logged at warning level as one line (no
traceback, no path) and every ``on_refused`` callback is told, with a short text
for the page (the app shows it in its alert area). A state that passes the
checks but still fails while being applied (a trait's own validation, or an
observer raising) is rolled back the same way.

The comm loggers of the kernel (``Comm``, ``ipykernel.comm``) log failures of
comm messages with their traceback, and the kernel forwards its stderr to the
page; :func:`install` makes them log one line instead.

Everything is per process, i.e. per kernel; :func:`install` may be called any
number of times (each app calls it once when it is built).
"""
from __future__ import annotations

import inspect
import logging
import math
import re
import threading
import types
import weakref
from typing import Callable

import ipywidgets as widgets
import traitlets
from ipywidgets.widgets.widget import _instances
from ipywidgets.widgets.widget_selection import _MultipleSelection, _Selection
from ipywidgets.widgets.widget_selectioncontainer import _SelectionContainer

__all__ = ["install", "installed", "forget", "owns", "MAX_KEYS", "MAX_ITEMS", "MAX_STRING", "MAX_DEPTH",
           "MAX_NODES", "MAX_BUFFERS", "MAX_BUFFER_BYTES"]

log = logging.getLogger(__name__)

#: Most keys one state update may carry (a real control sends one or two).
MAX_KEYS = 64
#: Most items of one list or mapping in a state.
MAX_ITEMS = 10_000
#: Longest text in a state [characters].
MAX_STRING = 100_000
#: Deepest nesting of lists and mappings in a state.
MAX_DEPTH = 32
#: Most values in one state, all levels together.
MAX_NODES = 200_000
#: Most binary buffers one message may carry.
MAX_BUFFERS = 16
#: Largest binary buffer [bytes].
MAX_BUFFER_BYTES = 16 * 2**20
#: Refusals logged one by one; afterwards one line every :data:`LOG_EVERY`.
LOG_FIRST = 50
LOG_EVERY = 1000

_METHODS = ("update", "request_state", "custom")
_APP_OWNED = frozenset({"children", "layout", "style"})
_BOUND_KEYS = frozenset({"min", "max", "step", "base"})
_NUMERIC = (traitlets.Float, traitlets.Int)
_COMM_LOGGERS = ("Comm", "ipykernel.comm")

_lock = threading.Lock()
_originals: dict[str, Callable] = {}
_callbacks: list[Callable[[], Callable | None]] = []
_refusals = 0


class _Refused(Exception):
    """A state or message that is not applied; ``reason`` is short text fit for the page."""

    def __init__(self, reason: str):
        super().__init__(reason)
        self.reason = reason


# ---------------------------------------------------------------------------- installation
def install(on_refused: Callable[[widgets.Widget, str], object] | None = None) -> None:
    """Make every widget of this kernel refuse bad state from the page (idempotent).

    Call it before the widgets it should guard are created (the app calls it first
    thing); widgets that already exist are switched over as well.

    Parameters
    ----------
    on_refused : callable, optional
        ``on_refused(widget, text)`` after a message to ``widget`` was refused;
        ``text`` is one short sentence for the page (no traceback, no path). Bound
        methods are held weakly; registering the same callback again does nothing.
    """
    with _lock:
        if not _originals:
            _patch()
        if on_refused is not None and not any(ref() == on_refused for ref in _callbacks):
            _callbacks.append(weakref.WeakMethod(on_refused) if inspect.ismethod(on_refused)
                              else (lambda cb=on_refused: cb))


def installed() -> bool:
    """True once :func:`install` has run in this kernel."""
    return bool(_originals)


def forget(on_refused: Callable) -> None:
    """Stop telling ``on_refused`` about refusals."""
    with _lock:
        _callbacks[:] = [ref for ref in _callbacks if ref() is not None and ref() != on_refused]


def _patch() -> None:
    cls = widgets.Widget
    for name in ("_handle_msg", "set_state", "_handle_custom_msg"):
        _originals[name] = cls.__dict__[name]
    cls._handle_msg = _guarded_handle_msg
    cls.set_state = _guarded_set_state
    cls._handle_custom_msg = _guarded_handle_custom_msg
    _originals["dispatch"] = widgets.CallbackDispatcher.__dict__["__call__"]
    widgets.CallbackDispatcher.__call__ = _guarded_dispatch
    # a widget's comm holds the handler bound when the comm was opened: switch existing ones over
    original = _originals["_handle_msg"]
    for widget in list(_instances.values()):
        comm = getattr(widget, "comm", None)
        if comm is not None and getattr(comm, "_msg_callback", None) == types.MethodType(original, widget):
            comm.on_msg(widget._handle_msg)
    for name in _COMM_LOGGERS:
        logger = logging.getLogger(name)
        if not any(isinstance(f, _OneLine) for f in logger.filters):
            logger.addFilter(_OneLine())


class _OneLine(logging.Filter):
    """Log a failure as one line with the exception's type, without its traceback."""

    def filter(self, record: logging.LogRecord) -> bool:
        if record.exc_info:
            exc = record.exc_info[1]
            kind = type(exc).__name__ if exc is not None else "error"
            try:
                text = record.getMessage()
            except Exception:  # noqa: BLE001 - a filter must not fail: keep the bare format
                text = str(record.msg)
            record.msg = f"{text} ({kind}; traceback not shown)"
            record.args = ()
            record.exc_info = None
            record.exc_text = None
        return True


# ---------------------------------------------------------------------------- guarded handlers
def _guarded_handle_msg(self: widgets.Widget, msg) -> None:
    """Handle a message from the page like ipywidgets does, refusing what does not fit."""
    keys: list[str] = []
    try:
        data = _message_data(msg)
        method = data["method"]
        if method == "update":
            if "state" not in data:
                return
            state = data["state"]
            if not isinstance(state, dict):
                raise _Refused("not a widget state")
            keys = _sent_keys(self, state)
            if "buffer_paths" in data:
                _put_buffers(state, data["buffer_paths"], msg.get("buffers"))
            self.set_state(state)
        elif method == "request_state":
            self.send_state()
        elif "content" in data:
            buffers = msg.get("buffers") or []
            if not isinstance(buffers, (list, tuple)) or len(buffers) > MAX_BUFFERS:
                raise _Refused("too much binary data")
            self._handle_custom_msg(data["content"], list(buffers))
    except _Refused as exc:
        _refuse(self, keys, exc.reason, action=not keys)
    except Exception as exc:  # noqa: BLE001 - nothing from the page may end in a traceback
        _refuse(self, keys, "it could not be handled", exc, action=not keys)


def _guarded_set_state(self: widgets.Widget, sync_data) -> None:
    """Apply a state from the page after checking it; roll back and refuse what fails."""
    keys = _sent_keys(self, sync_data) if isinstance(sync_data, dict) else []
    try:
        state = _checked_state(self, sync_data)
    except _Refused as exc:
        _refuse(self, keys, exc.reason)
        return
    except Exception as exc:  # noqa: BLE001
        _refuse(self, keys, "it could not be read", exc)
        return
    if not state:
        return
    before = {name: getattr(self, name) for name in state}
    try:
        _originals["set_state"](self, state)
    except Exception as exc:  # noqa: BLE001 - a trait's validation or an observer
        _restore(self, before)
        _refuse(self, keys, "it was not accepted", exc)


def _guarded_handle_custom_msg(self: widgets.Widget, content, buffers) -> None:
    """Pass a custom message (e.g. a button click) on; refuse it when too large or when it fails."""
    try:
        _check_size(content)
        _originals["_handle_custom_msg"](self, content, buffers)
    except _Refused as exc:
        _refuse(self, [], exc.reason, action=True)
    except Exception as exc:  # noqa: BLE001
        _refuse(self, [], "it could not be handled", exc, action=True)


def _guarded_dispatch(self: widgets.CallbackDispatcher, *args, **kwargs):
    """Call every registered callback (as ipywidgets does); one that raises is reported without traceback.

    Callback dispatchers run what the page triggers: ``on_click``, ``on_submit``, ``on_msg``; the widget is
    their first argument.
    """
    value = None
    for callback in list(self.callbacks):
        try:
            result = callback(*args, **kwargs)
        except Exception as exc:  # noqa: BLE001 - ipywidgets would print the traceback to the page
            widget = args[0] if args and isinstance(args[0], widgets.Widget) else None
            _refuse(widget, [], "it could not be handled", exc, action=True)
        else:
            value = result if result is not None else value
    return value


# ---------------------------------------------------------------------------- checks
def _message_data(msg) -> dict:
    content = msg.get("content") if isinstance(msg, dict) else None
    data = content.get("data") if isinstance(content, dict) else None
    if not isinstance(data, dict) or data.get("method") not in _METHODS:
        raise _Refused("not a widget message")
    return data


def _sent_keys(widget: widgets.Widget, state: dict) -> list[str]:
    """The synced keys of ``widget`` in ``state`` (what the page may have changed on its side)."""
    return [key for key in widget.keys if key in state]


def _put_buffers(state: dict, paths, buffers) -> None:
    """Put the binary buffers of a message into its state, where its buffer paths say."""
    buffers = [] if buffers is None else buffers
    if not isinstance(paths, list) or not isinstance(buffers, (list, tuple)):
        raise _Refused("binary data that does not fit")
    if len(paths) > MAX_BUFFERS or len(paths) > len(buffers):
        raise _Refused("binary data that does not fit")
    for path, buffer in zip(paths, buffers):
        if not isinstance(path, list) or not path or len(path) > MAX_DEPTH:
            raise _Refused("binary data that does not fit")
        if not isinstance(buffer, (bytes, bytearray, memoryview)):
            raise _Refused("binary data that does not fit")
        where = state
        for key in path[:-1]:
            where = _item(where, key)
        last = path[-1]
        if isinstance(where, dict) and isinstance(last, str):
            where[last] = buffer
        elif isinstance(where, list) and _is_index(last, len(where)):
            where[last] = buffer
        else:
            raise _Refused("binary data that does not fit")


def _item(container, key):
    if isinstance(container, dict) and isinstance(key, str) and key in container:
        return container[key]
    if isinstance(container, list) and _is_index(key, len(container)):
        return container[key]
    raise _Refused("binary data that does not fit")


def _is_index(value, length: int) -> bool:
    return isinstance(value, int) and not isinstance(value, bool) and 0 <= value < length


def _checked_state(widget: widgets.Widget, sync_data) -> dict:
    """The synced part of ``sync_data``, checked; raises :class:`_Refused`."""
    if not isinstance(sync_data, dict):
        raise _Refused("not a widget state")
    if len(sync_data) > MAX_KEYS:
        raise _Refused("too many values at once")
    synced = set(widget.keys)
    unknown = [key for key in sync_data if key not in synced]
    if unknown:
        _log(logging.WARNING, "ignored %d key(s) that %s does not sync: %s", len(unknown),
             type(widget).__name__, ", ".join(_short(key) for key in unknown[:5]))
    state = {key: value for key, value in sync_data.items() if key in synced}
    _check_size(state)
    for name, value in state.items():
        _check_value(widget, name, value)
    return state


def _check_size(value) -> None:
    """Refuse values too large or too deep to come from a control."""
    stack, nodes = [(value, 0)], 0
    while stack:
        item, depth = stack.pop()
        nodes += 1
        if nodes > MAX_NODES:
            raise _Refused("too much data")
        if depth > MAX_DEPTH:
            raise _Refused("data nested too deeply")
        if isinstance(item, str):
            if len(item) > MAX_STRING:
                raise _Refused("too long a text")
        elif isinstance(item, (bytes, bytearray, memoryview)):
            if memoryview(item).nbytes > MAX_BUFFER_BYTES:
                raise _Refused("too much binary data")
        elif isinstance(item, dict):
            if len(item) > MAX_ITEMS:
                raise _Refused("too many values in one item")
            for key, sub in item.items():
                if isinstance(key, str) and len(key) > MAX_STRING:
                    raise _Refused("too long a text")
                stack.append((sub, depth + 1))
        elif isinstance(item, (list, tuple)):
            if len(item) > MAX_ITEMS:
                raise _Refused("too long a list")
            stack.extend((sub, depth + 1) for sub in item)


def _trait(widget: widgets.Widget, name: str):
    trait = getattr(type(widget), name, None)
    return trait if isinstance(trait, traitlets.TraitType) else None


def _bounds(widget: widgets.Widget) -> tuple[float, float] | None:
    """(low, high) of the values a bounded control accepts, or None when it has no numeric bounds."""
    if not all(isinstance(_trait(widget, key), _NUMERIC) for key in ("min", "max")):
        return None
    low, high = widget.min, widget.max
    if low is None or high is None:
        return None
    if isinstance(widget, widgets.FloatLogSlider):  # its min and max are exponents
        try:
            low, high = widget.base ** low, widget.base ** high
        except (OverflowError, ZeroDivisionError, TypeError, ValueError):
            return None
    return float(low), float(high)


def _check_value(widget: widgets.Widget, name: str, value) -> None:
    trait = _trait(widget, name)
    bounds = _bounds(widget)
    if name in _APP_OWNED or (name in _BOUND_KEYS and bounds is not None):
        raise _Refused("only the app sets this")
    if isinstance(widget, _MultipleSelection):
        if name == "_options_labels":
            raise _Refused("only the app sets the choices")
        if name == "index":
            count = len(widget._options_labels)
            if not isinstance(value, (list, tuple)) or len(value) > count or not all(
                    _is_index(i, count) for i in value):
                raise _Refused("not one of the choices")
            return
    if isinstance(widget, _Selection):
        if name == "_options_labels":
            raise _Refused("only the app sets the choices")
        if name == "index":
            count = len(widget._options_labels)
            if value is None and (widget.index is None or count == 0):
                return
            if not _is_index(value, count):
                raise _Refused("not one of the choices")
            return
    if isinstance(widget, _SelectionContainer) and name == "selected_index":
        if value is not None and not _is_index(value, len(widget.children)):
            raise _Refused("not one of the tabs")
        return
    if isinstance(trait, _NUMERIC):
        _check_number(trait, value)
        if name == "value" and bounds is not None:
            _check_range(value, bounds)
    elif isinstance(trait, traitlets.Tuple) and name == "value" and trait._traits and all(
            isinstance(t, _NUMERIC) for t in trait._traits):  # a range slider: (lower, upper)
        if not isinstance(value, (list, tuple)) or len(value) != len(trait._traits):
            raise _Refused("not a pair of numbers")
        for part, sub in zip(value, trait._traits):
            _check_number(sub, part)
            if bounds is not None:
                _check_range(part, bounds)
        if len(value) == 2 and value[0] > value[1]:
            raise _Refused("a range whose ends are swapped")


def _check_number(trait: traitlets.TraitType, value) -> None:
    if value is None:
        if trait.allow_none:
            return
        raise _Refused("no number")
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise _Refused("not a number")
    try:
        number = float(value)
    except OverflowError:
        raise _Refused("a number far too large") from None
    if not math.isfinite(number):
        raise _Refused("not a finite number")
    if isinstance(trait, traitlets.Int) and isinstance(value, float) and not value.is_integer():
        raise _Refused("not a whole number")


def _check_range(value, bounds: tuple[float, float]) -> None:
    low, high = bounds
    number = float(value)
    slack = 1e-9 * max(1.0, abs(low), abs(high))  # rounding of the page's slider, not a different value
    if number < low - slack or number > high + slack:
        raise _Refused(f"outside {low:g} … {high:g}")


# ---------------------------------------------------------------------------- refusing
def _restore(widget: widgets.Widget, before: dict) -> None:
    """Put back the values a failed state changed (their observers see the change back)."""
    for name, old in before.items():
        try:
            if not _same(getattr(widget, name), old):
                setattr(widget, name, old)
        except Exception as exc:  # noqa: BLE001
            _log(logging.WARNING, "could not restore %s.%s (%s)", type(widget).__name__, name,
                 type(exc).__name__, force=True)


def _same(a, b) -> bool:
    if a is b:
        return True
    try:
        return bool(a == b)
    except Exception:  # noqa: BLE001 - e.g. arrays: treat as changed
        return False


def _refuse(widget: widgets.Widget | None, keys: list[str], reason: str, exc: BaseException | None = None,
            action: bool = False) -> None:
    """Log one line, send ``keys`` back to the page and tell the callbacks (``action``: a click or the like)."""
    global _refusals
    with _lock:
        _refusals += 1
        count = _refusals
    detail = reason if exc is None else f"{reason} ({type(exc).__name__})"
    what = type(widget).__name__ + (f" {', '.join(keys)}" if keys else "")
    if count <= LOG_FIRST or count % LOG_EVERY == 0:
        suffix = f" [{count} refused in this kernel]" if count > LOG_FIRST else ""
        _log(logging.WARNING, "refused %s from the page for %s: %s%s", "an action" if action else "an update",
             what, detail, suffix, force=True)
    if widget is None:
        return
    if keys:
        try:
            widget.send_state(keys)  # the page snaps back to the value the kernel holds
        except Exception as err:  # noqa: BLE001
            _log(logging.WARNING, "could not send %s back to the page (%s)", what, type(err).__name__, force=True)
    if action:
        text = f"{_label(widget)}: " + ("the action could not be carried out." if exc is not None else
                                        f"the request sent by the page was refused ({reason}).")
    else:
        text = f"{_label(widget)}: the value sent by the page was refused ({reason}); the control shows its " \
               "current value again."
    _notify(widget, text)


def _label(widget: widgets.Widget) -> str:
    """The control's description without its unit, shortened; "A control" when it has none."""
    text = getattr(widget, "description", "") or ""
    text = re.sub(r"\s*\[[^\]]*\]\s*$", "", text if isinstance(text, str) else "").strip()
    if not text:
        return "A control"
    return text if len(text) <= 60 else text[:59] + "…"


def _notify(widget: widgets.Widget, text: str) -> None:
    with _lock:
        live = [(ref, ref()) for ref in _callbacks]
        _callbacks[:] = [ref for ref, cb in live if cb is not None]
    for _, callback in live:
        if callback is None:
            continue
        try:
            callback(widget, text)
        except Exception as exc:  # noqa: BLE001
            _log(logging.WARNING, "showing a refusal failed (%s)", type(exc).__name__, force=True)


_log_lock = threading.Lock()
_unknown_logged = 0


def _log(level: int, fmt: str, *args, force: bool = False) -> None:
    """One line, never a traceback; messages about ignored keys are limited like refusals."""
    global _unknown_logged
    if not force:
        with _log_lock:
            _unknown_logged += 1
            if _unknown_logged > LOG_FIRST and _unknown_logged % LOG_EVERY:
                return
    log.log(level, fmt, *args)


def _short(key) -> str:
    text = repr(key)
    return text if len(text) <= 40 else text[:39] + "…"


# ---------------------------------------------------------------------------- ownership
def owns(root: widgets.Widget, widget: widgets.Widget) -> bool:
    """True when ``widget`` is ``root`` or inside it (children, layout, style, any widget-valued trait)."""
    seen: set[int] = set()
    stack = [root]
    while stack:
        item = stack.pop()
        if item is widget:
            return True
        if id(item) in seen:
            continue
        seen.add(id(item))
        for name in item.keys:
            try:
                value = getattr(item, name)
            except Exception:  # noqa: BLE001
                continue
            if isinstance(value, widgets.Widget):
                stack.append(value)
            elif isinstance(value, (list, tuple)):
                stack.extend(v for v in value if isinstance(v, widgets.Widget))
    return False
