"""Test set-up shared by the whole suite."""

import os

# Qt runs headless in tests (no display on CI machines); set before any Qt import.
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from hypothesis import HealthCheck, settings

# Property tests are seeded and bounded so the suite is repeatable and stays fast on CI's
# two cores: the same examples every run, no per-example deadline.
settings.register_profile(
    "outlinebench",
    derandomize=True,
    deadline=None,
    max_examples=60,
    suppress_health_check=[HealthCheck.too_slow],
)
settings.load_profile("outlinebench")
