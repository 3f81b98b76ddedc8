"""Remembered settings, kept with QSettings: recent files, check tolerances, units, comb scale,
cutting previews and the window layout.

Where they live: ``QSettings("OutlineBench", "editor")`` (on Linux
``~/.config/OutlineBench/editor.conf``), unless the environment variable
:data:`CONFIG_ENV` names a folder, which then holds ``editor.ini`` and the ``recovery``
folder (tests and portable installs use it). Help ▸ About shows both paths.
"""

from __future__ import annotations

import dataclasses
import os
from pathlib import Path

from PySide6.QtCore import QByteArray, QSettings, QStandardPaths

from outlinebench.api.repairing import DEFAULT_MAX_CHANGE_MM
from outlinebench.diagnostics import CheckSettings

__all__ = [
    "RecentFiles",
    "Preferences",
    "MAX_RECENT",
    "CONFIG_ENV",
    "default_settings",
    "recovery_folder",
    "TOLERANCE_FIELDS",
]

MAX_RECENT = 8  # entries in File ▸ Recent files
# Environment variable naming a folder for the settings file and recovery files.
CONFIG_ENV = "OUTLINEBENCH_CONFIG_DIR"
# CheckSettings fields the tolerances dialog edits, and so the ones remembered.
TOLERANCE_FIELDS = ("gap_mm", "gap_search_mm", "kink_angle", "corner_angle", "curvature_jump")


def default_settings() -> QSettings:
    """The editor's settings store (see the module notes)."""
    folder = os.environ.get(CONFIG_ENV)
    if folder:
        return QSettings(str(Path(folder) / "editor.ini"), QSettings.Format.IniFormat)
    return QSettings("OutlineBench", "editor")


def recovery_folder(settings: QSettings | None = None) -> Path:
    """Where recovery files are written: ``recovery`` beside an ini settings file, under
    :data:`CONFIG_ENV` when set, else in the platform's application data folder."""
    folder = os.environ.get(CONFIG_ENV)
    if folder:
        return Path(folder) / "recovery"
    if settings is not None and settings.format() == QSettings.Format.IniFormat:
        return Path(settings.fileName()).parent / "recovery"
    base = QStandardPaths.writableLocation(QStandardPaths.StandardLocation.GenericDataLocation)
    return Path(base or Path.home()) / "OutlineBench" / "recovery"


class RecentFiles:
    """Most recently opened files first, at most :data:`MAX_RECENT`, only existing files.

    Parameters
    ----------
    settings : QSettings, optional
        Where to keep the list (tests pass a settings object backed by a temporary file).
    """

    KEY = "recent_files"

    def __init__(self, settings: QSettings | None = None) -> None:
        self._settings = settings if settings is not None else default_settings()

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


def _float(v, default: float) -> float:
    try:
        x = float(v)
    except (TypeError, ValueError):
        return default
    return x if x == x and abs(x) != float("inf") else default


def _bool(v, default: bool) -> bool:
    if isinstance(v, bool):
        return v
    if isinstance(v, str):
        return v.lower() in ("1", "true", "yes")
    return default if v is None else bool(v)


class Preferences:
    """Typed access to the remembered settings (unknown or bad stored values fall back to the
    defaults).

    Keys: ``check/<field>`` (tolerances, :data:`TOLERANCE_FIELDS`), ``view/units`` ("" = as
    in the file, else a unit name), ``view/comb_step`` (the comb scale slider), ``view/comb``,
    ``preview/flatten``, ``preview/flatten_tolerance_mm``, ``preview/offset``,
    ``preview/offset_radius_mm``, ``repair/max_change_mm`` (the allowed change of a fix,
    default the command line's ``repair --max-change``), ``window/geometry``, ``window/state``.
    """

    def __init__(self, settings: QSettings) -> None:
        self.settings = settings

    def _get(self, key: str, default):
        return self.settings.value(key, default)

    def _set(self, key: str, value) -> None:
        self.settings.setValue(key, value)
        self.settings.sync()

    # tolerances
    def check_settings(self) -> CheckSettings:
        base = CheckSettings()
        values = {
            f: _float(self._get(f"check/{f}", None), getattr(base, f)) for f in TOLERANCE_FIELDS
        }
        try:
            return dataclasses.replace(base, **values)
        except (ValueError, TypeError):
            return base

    def set_check_settings(self, s: CheckSettings) -> None:
        for f in TOLERANCE_FIELDS:
            self.settings.setValue(f"check/{f}", float(getattr(s, f)))
        self.settings.sync()

    # repairs
    def max_change_mm(self) -> float:
        """Allowed shape change of a fix, mm (≥ 0; a bad stored value gives the default)."""
        v = _float(self._get("repair/max_change_mm", None), DEFAULT_MAX_CHANGE_MM)
        return v if v >= 0.0 else DEFAULT_MAX_CHANGE_MM

    def set_max_change_mm(self, mm: float) -> None:
        self._set("repair/max_change_mm", float(mm))

    # plain values
    def units(self) -> str:
        v = self._get("view/units", "")
        return v if isinstance(v, str) else ""

    def set_units(self, name: str) -> None:
        self._set("view/units", name)

    def comb_step(self) -> int:
        return int(_float(self._get("view/comb_step", 0), 0.0))

    def set_comb_step(self, step: int) -> None:
        self._set("view/comb_step", int(step))

    def flag(self, key: str, default: bool = False) -> bool:
        return _bool(self._get(key, default), default)

    def set_flag(self, key: str, on: bool) -> None:
        self._set(key, bool(on))

    def number(self, key: str, default: float) -> float:
        return _float(self._get(key, default), default)

    def set_number(self, key: str, value: float) -> None:
        self._set(key, float(value))

    def layout(self) -> tuple[QByteArray | None, QByteArray | None]:
        g, s = self._get("window/geometry", None), self._get("window/state", None)
        return (
            g if isinstance(g, QByteArray) else None,
            s if isinstance(s, QByteArray) else None,
        )

    def set_layout(self, geometry: QByteArray, state: QByteArray) -> None:
        self.settings.setValue("window/geometry", geometry)
        self.settings.setValue("window/state", state)
        self.settings.sync()
