"""Shared test set-up: hypothesis profiles for the property-based tests (tests/test_fuzz_*.py).

``fast`` (default, used by ``make test``): few examples, derandomized so that every run checks the
same cases. ``long`` (``HYPOTHESIS_PROFILE=long``, used by ``make fuzz``): thousands of random examples
per test. Set ``HYPOTHESIS_PROFILE`` to pick one.
"""
import os

from hypothesis import HealthCheck, settings

settings.register_profile("fast", max_examples=60, deadline=None, derandomize=True, print_blob=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("long", max_examples=3000, deadline=None, print_blob=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "fast"))
