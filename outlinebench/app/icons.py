"""The editor's own icons: SVG files of the ``resources/icons`` folder, shipped as package data
(see :mod:`outlinebench.data_files`)."""

from __future__ import annotations

from functools import cache

from PySide6.QtGui import QIcon

from outlinebench.data_files import icon_path, resources_dir

__all__ = ["resources_dir", "icon"]


@cache
def icon(name: str) -> QIcon:
    """Icon ``resources/icons/<name>.svg``; an empty icon when the file is not there (the
    action then shows its text only)."""
    path = icon_path(name)
    return QIcon(str(path)) if path is not None else QIcon()
