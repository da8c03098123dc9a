"""Shared test set-up: a fixture that hashes every file in a folder, and hypothesis profiles for the
property-based tests (tests/test_fuzz_*.py, tests/test_units_property.py).

``fast`` (default, used by ``make test``): few examples, derandomized so that every run checks the
same cases. ``long`` (``HYPOTHESIS_PROFILE=long``, used by ``make fuzz``): thousands of random examples
per test. Set ``HYPOTHESIS_PROFILE`` to pick one.
"""
from __future__ import annotations

import hashlib
import os
import stat

import pytest
from hypothesis import HealthCheck, settings

settings.register_profile("fast", max_examples=60, deadline=None, derandomize=True, print_blob=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("long", max_examples=3000, deadline=None, print_blob=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "fast"))


def _digests(folder) -> dict[str, str]:
    """SHA-256 of every file below ``folder`` (links as their target text, hidden files included, pipes and
    devices by their type: never opened)."""
    out = {}
    for root, dirs, names in os.walk(folder):
        for name in dirs + names:
            path = os.path.join(root, name)
            info = os.lstat(path)
            if stat.S_ISLNK(info.st_mode):
                out[path] = "link -> " + os.readlink(path)
            elif stat.S_ISREG(info.st_mode):
                with open(path, "rb") as fh:
                    out[path] = hashlib.file_digest(fh, "sha256").hexdigest()
            else:
                out[path] = stat.filemode(info.st_mode)
    return out


@pytest.fixture
def folder_digests():
    """``folder_digests(folder)``: path -> SHA-256 of every file below it, to show that nothing changed."""
    return _digests
