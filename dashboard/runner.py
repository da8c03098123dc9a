"""Run convlib work without blocking the kernel, newest request wins.

In a running kernel (voila, Jupyter) a :class:`Runner` computes in one worker
thread and applies the result on the kernel's event loop, so widget messages
keep flowing while numbers are being computed. Each job has a key (one per
panel part); a newer job of the same key makes older ones stale: a stale job
is skipped before it starts and its result is dropped if it finishes. Without
a running loop (tests, scripts) jobs run at once in the caller's thread.
"""
from __future__ import annotations

import asyncio
import logging
import threading
from concurrent.futures import ThreadPoolExecutor
from typing import Any, Callable

__all__ = ["Runner"]

log = logging.getLogger(__name__)


class _Stale(Exception):
    """Raised inside a job that was superseded before it started."""


class Runner:
    """Schedule ``compute`` (no widget access) and then ``apply`` (widgets) per key.

    Parameters
    ----------
    synchronous : bool, optional
        Run jobs at once in the caller's thread. Default: only when no event loop is running.
    """

    def __init__(self, synchronous: bool | None = None):
        self._loop = None
        if synchronous is None:
            try:
                self._loop = asyncio.get_running_loop()
            except RuntimeError:
                synchronous = True
            else:
                synchronous = False
        elif not synchronous:
            self._loop = asyncio.get_running_loop()
        self.synchronous = synchronous
        self._executor = None if synchronous else ThreadPoolExecutor(1, thread_name_prefix="convlib-worker")
        self._latest: dict[str, object] = {}
        self._pending: set[str] = set()
        self._lock = threading.Lock()

    @property
    def busy(self) -> bool:
        """True while any job is queued or running."""
        return bool(self._pending)

    def submit(self, key: str, compute: Callable[[], Any], apply: Callable[[Any], None], *,
               delay: float = 0.0, on_error: Callable[[BaseException], None] | None = None,
               at_once: bool = False) -> None:
        """Compute and apply a result for ``key``, superseding earlier jobs of that key.

        Parameters
        ----------
        key : str
            Which result this is (e.g. ``"sweep"``).
        compute : callable
            ``compute() -> result``; runs in the worker thread; must not touch widgets.
        apply : callable
            ``apply(result)``; runs on the kernel loop (or at once when synchronous).
        delay : float
            Seconds to wait for quiet before starting [s] (debounce).
        on_error : callable, optional
            ``on_error(exception)`` on the loop when ``compute`` raises.
        at_once : bool
            Compute and apply now in the caller's thread (for a look-up that costs less than a trip to the
            worker); it still supersedes earlier jobs of ``key``.
        """
        token = object()
        with self._lock:
            self._latest[key] = token
            self._pending.add(key)
        if self.synchronous or at_once:
            self._finish(key, token, compute, apply, on_error)
            return

        def job():
            if self._latest.get(key) is not token:
                raise _Stale()
            return compute()

        def start():
            if self._latest.get(key) is not token:
                return
            future = self._loop.run_in_executor(self._executor, job)
            future.add_done_callback(lambda f: self._done(key, token, f, apply, on_error))

        if delay > 0:
            self._loop.call_later(delay, start)
        else:
            self._loop.call_soon(start)

    def _finish(self, key, token, compute, apply, on_error):
        try:
            result = compute()
        except Exception as exc:  # shown to the user, never a traceback
            self._settle(key, token)
            self._report(exc, on_error)
            return
        self._settle(key, token)
        apply(result)

    def _done(self, key, token, future, apply, on_error):
        if self._latest.get(key) is not token:
            return
        self._settle(key, token)
        exc = future.exception()
        if isinstance(exc, _Stale):
            return
        if exc is not None:
            self._report(exc, on_error)
            return
        try:
            apply(future.result())
        except Exception as err:
            self._report(err, on_error)

    def _settle(self, key, token):
        with self._lock:
            if self._latest.get(key) is token:
                self._pending.discard(key)

    @staticmethod
    def _report(exc, on_error):
        if on_error is None:
            log.exception("dashboard job failed", exc_info=exc)
        else:
            on_error(exc)

    def call_in_loop(self, fn: Callable, *args) -> None:
        """Call ``fn(*args)`` on the kernel loop (from any thread); at once when synchronous."""
        if self.synchronous or self._loop is None:
            fn(*args)
        else:
            self._loop.call_soon_threadsafe(fn, *args)
