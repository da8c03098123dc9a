"""Fixtures shared by all tests."""
from __future__ import annotations

import hashlib
import os
import stat

import pytest


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
