"""Where the editor's icons and sample drawings are: inside an installed package, or beside it.

An installed wheel carries them as package data, ``outlinebench/resources/icons/*.svg`` and
``outlinebench/samples/*.svg`` (pyproject.toml maps the repository's top-level ``resources/``
and ``samples/`` folders there); they are found with :mod:`importlib.resources`. A source
checkout (the package imported from the repository, as in development and the tests) has them
at the repository root, next to the ``outlinebench`` folder.

This module holds no Qt (the editor and the library both use it): :mod:`outlinebench.app.icons`
turns the paths into icons.
"""

from __future__ import annotations

import importlib.resources
from pathlib import Path

__all__ = ["data_dir", "icon_path", "sample_files", "samples_dir", "resources_dir"]


def data_dir(name: str) -> Path | None:
    """The folder ``name`` ("resources" or "samples") of the running installation, or None.

    Parameters
    ----------
    name : str
        Folder name: inside the installed package first (``importlib.resources``, the
        wheel's layout), else at the root of the source checkout the package was imported
        from.

    Returns
    -------
    Path or None
        An existing folder on disk, or None when neither layout has it.

    Notes
    -----
    ``importlib.resources.files`` gives a :class:`~importlib.resources.abc.Traversable`; for
    a package installed from a wheel into a folder (pip's only layout) it is a real path,
    which Qt needs to load an icon. A zipped installation (no real path) is not supported
    and counts as absent.
    """
    try:
        inside = importlib.resources.files("outlinebench") / name
    except (ModuleNotFoundError, TypeError):  # pragma: no cover (the package is importable)
        inside = None
    if inside is not None and isinstance(inside, Path) and inside.is_dir():
        return inside
    package = Path(__file__).resolve().parent  # …/outlinebench
    beside = package.parent / name
    if beside.is_dir() and (package.parent / "pyproject.toml").is_file():
        return beside
    return None


def resources_dir() -> Path | None:
    """The folder holding ``icons/``, or None."""
    return data_dir("resources")


def icon_path(name: str) -> Path | None:
    """``icons/<name>.svg`` of the resources folder, or None when it is not there."""
    base = resources_dir()
    if base is None:
        return None
    path = base / "icons" / f"{name}.svg"
    return path if path.is_file() else None


def samples_dir() -> Path | None:
    """The folder of the bundled sample drawings, or None."""
    return data_dir("samples")


def sample_files() -> list[Path]:
    """The bundled sample drawings (``*.svg``), sorted by name; empty when none are shipped."""
    base = samples_dir()
    return sorted(base.glob("*.svg")) if base is not None else []
