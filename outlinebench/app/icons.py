"""The editor's own icons, drawn as SVG files in the repository's ``resources/icons``."""

from __future__ import annotations

from functools import cache
from pathlib import Path

from PySide6.QtGui import QIcon

__all__ = ["resources_dir", "icon"]


def resources_dir() -> Path | None:
    """The ``resources`` folder next to the package (a source checkout), or None."""
    here = Path(__file__).resolve()
    for parent in here.parents:
        candidate = parent / "resources" / "icons"
        if candidate.is_dir():
            return candidate.parent
    return None


@cache
def icon(name: str) -> QIcon:
    """Icon ``resources/icons/<name>.svg``; an empty icon when the file is not there (the
    action then shows its text only)."""
    base = resources_dir()
    if base is None:
        return QIcon()
    path = base / "icons" / f"{name}.svg"
    return QIcon(str(path)) if path.is_file() else QIcon()
