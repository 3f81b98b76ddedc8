"""Remembered settings: the recent files list, kept with QSettings."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QSettings

__all__ = ["RecentFiles", "MAX_RECENT"]

MAX_RECENT = 8  # entries in File ▸ Recent files


class RecentFiles:
    """Most recently opened files first, at most :data:`MAX_RECENT`, only existing files.

    Parameters
    ----------
    settings : QSettings, optional
        Where to keep the list (tests pass a settings object backed by a temporary file).
    """

    KEY = "recent_files"

    def __init__(self, settings: QSettings | None = None) -> None:
        self._settings = settings if settings is not None else QSettings("OutlineBench", "editor")

    def paths(self) -> list[str]:
        raw = self._settings.value(self.KEY, [])
        if isinstance(raw, str):
            raw = [raw]
        return [p for p in (raw or []) if isinstance(p, str) and Path(p).is_file()]

    def add(self, path: str) -> None:
        path = str(Path(path).resolve())
        items = [p for p in self.paths() if p != path]
        items.insert(0, path)
        self._settings.setValue(self.KEY, items[:MAX_RECENT])
        self._settings.sync()

    def clear(self) -> None:
        self._settings.setValue(self.KEY, [])
        self._settings.sync()
