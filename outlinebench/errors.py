"""Every exception type OutlineBench raises.

All derive from :class:`OutlinebenchError`, so callers (the command line, the editor) can catch
one base class and show its one-line message. Types that describe a bad input value also derive
from :class:`ValueError`.
"""

from __future__ import annotations

__all__ = [
    "OutlinebenchError",
    "InvalidGeometryError",
    "SvgReadError",
    "SvgPathError",
    "UnsupportedSvgFeature",
    "UnsafeXmlError",
    "SvgWriteError",
    "CommandError",
    "FontReadError",
    "FontWriteError",
]


class OutlinebenchError(Exception):
    """Base class of every error OutlineBench raises on purpose."""


class InvalidGeometryError(OutlinebenchError, ValueError):
    """Control points of the wrong shape, or not finite."""


class SvgReadError(OutlinebenchError, ValueError):
    """An SVG file cannot be read. The message names the file and the place."""


class SvgPathError(SvgReadError):
    """Bad path data.

    Attributes
    ----------
    offset : int
        Character offset in the ``d`` attribute where reading stopped.
    token : str
        The text found there (empty at the end of the data).
    """

    def __init__(self, message: str, offset: int = -1, token: str = "") -> None:
        super().__init__(message)
        self.offset = offset
        self.token = token


class UnsupportedSvgFeature(SvgReadError):
    """The file uses something the model cannot hold, under ``on_unsupported="raise"``."""


class UnsafeXmlError(SvgReadError):
    """The XML asks for entity expansion, external entities or a DTD, or is too large."""


class SvgWriteError(OutlinebenchError):
    """A document cannot be saved (read-only target, failed check, disk error)."""


class CommandError(OutlinebenchError, ValueError):
    """An edit cannot be applied to the document as it is (bad index, wrong segment kind)."""


class FontReadError(OutlinebenchError, ValueError):
    """A font file or UFO source cannot be read, or a glyph selection names no glyph there."""


class FontWriteError(OutlinebenchError):
    """Glyphs cannot be written back (a binary font, an edited component, a failed check)."""
