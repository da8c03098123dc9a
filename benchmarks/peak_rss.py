"""Peak resident memory of this process around one piece of work (Linux; elsewhere the peak so far).

``base = reset_peak()`` before the work, ``peak()`` after: their difference is what the work added at its peak
(results kept plus temporaries). On Linux ``reset_peak`` writes 5 to ``/proc/self/clear_refs``, which resets the
peak (``VmHWM``) to the current RSS, so that an earlier, higher peak (imports, a warm-up) does not hide the work's;
elsewhere both return ``ru_maxrss`` and the difference can be 0.
"""
from __future__ import annotations

import resource

__all__ = ["reset_peak", "peak"]


def _status(field: str) -> int | None:
    """A ``/proc/self/status`` figure [KiB], or None."""
    try:
        with open("/proc/self/status") as f:
            for line in f:
                if line.startswith(field + ":"):
                    return int(line.split()[1])
    except OSError:
        pass
    return None


def reset_peak() -> int:
    """Reset the peak RSS to the current RSS and return it [KiB]."""
    try:
        with open("/proc/self/clear_refs", "w") as f:
            f.write("5")
        current = _status("VmRSS")
    except OSError:
        current = None
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss if current is None else current


def peak() -> int:
    """Peak RSS since :func:`reset_peak` [KiB]."""
    value = _status("VmHWM")
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss if value is None else value
