"""Test set-up shared by the whole suite."""

import os

# Qt runs headless in tests (no display on CI machines); set before any Qt import.
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
