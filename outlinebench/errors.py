"""Every exception type OutlineBench raises.

All derive from :class:`OutlinebenchError`, so callers (the command line, the editor) can catch
one base class and show its one-line message. Types that describe a bad input value also derive
from :class:`ValueError`.
"""

from __future__ import annotations

__all__ = [
    "OutlinebenchError",
    "OptionError",
    "InvalidGeometryError",
    "WorkCapExceeded",
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
    """Base class of every error OutlineBench raises on purpose.

    Parameters
    ----------
    message : str
        The one-line message.
    file : str, optional
        The file the error belongs to, set by whoever raises it knowing the file, or by the
        reader's front door (:func:`outlinebench.api.read_source`) for errors of reading it.
        When it is set the message names that file; when it is not, whoever shows the error
        names the file (:func:`error_line`). Decisions about an error are made from its type
        and fields, never from its message text.

    Examples
    --------
    >>> error_line(OptionError("--tolerance must be > 0"), "part.svg")
    'part.svg: --tolerance must be > 0'
    >>> error_line(SvgReadError("part.svg: line 3: bad number", file="part.svg"), "part.svg")
    'part.svg: line 3: bad number'
    """

    def __init__(self, message: str = "", *args: object, file: str | None = None) -> None:
        super().__init__(message, *args)
        self.file = file

    def __reduce__(self) -> tuple[object, ...]:
        # keep the fields through pickling (errors travel back from worker processes)
        return (_rebuild, (type(self), self.args, dict(self.__dict__)))


def _rebuild(
    cls: type[BaseException], args: tuple[object, ...], fields: dict[str, object]
) -> BaseException:
    exc: BaseException = Exception.__new__(cls)
    exc.args = args
    exc.__dict__.update(fields)
    return exc


def error_line(exc: BaseException, file: str | None = None) -> str:
    """The one-line text of an error, naming its file once.

    Parameters
    ----------
    exc : BaseException
        An :class:`OutlinebenchError` (its ``file`` field says whether its message names the
        file) or an :class:`OSError` (its ``filename`` and ``strerror``).
    file : str, optional
        The file the caller was working on, named when the error does not name one itself.
    """
    if isinstance(exc, OSError) and not isinstance(exc, OutlinebenchError):
        where = exc.filename if exc.filename is not None else file
        text = exc.strerror or str(exc)
        return f"{where}: {text}" if where else text
    text = str(exc).replace("\n", " ")
    if getattr(exc, "file", None) is not None or not file:
        return text
    return f"{file}: {text}"


class OptionError(OutlinebenchError, ValueError):
    """An option or argument value is out of range or does not fit the others."""


class InvalidGeometryError(OutlinebenchError, ValueError):
    """Control points of the wrong shape, or not finite."""


class WorkCapExceeded(InvalidGeometryError):
    """A computation refused: its input is past a cap on work (:mod:`outlinebench.limits`)."""


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
    """The XML asks for entity expansion, external entities or a DTD, or is too large.

    Attributes
    ----------
    reason : str
        What was refused: ``"internal-entity"`` (an entity declaration, which an explicit
        option may allow), ``"external"`` (external entities, DTDs, references),
        ``"nested-entity"``, ``"entity-size"``, ``"size"`` (the file is over the size limit)
        or ``"xml"`` (another refusal of the XML parser).
    """

    def __init__(
        self, message: str = "", *args: object, reason: str = "xml", file: str | None = None
    ) -> None:
        super().__init__(message, *args, file=file)
        self.reason = reason


class SvgWriteError(OutlinebenchError):
    """A document cannot be saved (read-only target, failed check, disk error)."""


class CommandError(OutlinebenchError, ValueError):
    """An edit cannot be applied to the document as it is (bad index, wrong segment kind)."""


class FontReadError(OutlinebenchError, ValueError):
    """A font file or UFO source cannot be read, or a glyph selection names no glyph there."""


class FontWriteError(OutlinebenchError):
    """Glyphs cannot be written back (a binary font, an edited component, a failed check)."""
