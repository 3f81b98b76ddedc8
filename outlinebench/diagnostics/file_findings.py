"""Findings about the file as a whole: what could not be read, and files with nothing to check.

A check is only as true as the reading behind it. Whatever in a file could be geometry but was
not read (bad path data after which the rest of the path was dropped, an element skipped for a
bad transform or an unresolvable length, a ``use`` cycle, an external reference not fetched),
live text that a renderer draws but a cutter does not cut, and a file that holds no outline
with a segment at all are reported as *file findings*. They count like any other finding: an
error or warning among them means the file is not clean.

Kinds
-----
read-error
    (error) something that could be geometry was not read; the message names the element and
    the place, and what was kept.
live-text
    (error, or info with ``allow_text=True``) text elements, drawn by a renderer from a font,
    not converted to outlines: nothing of them is checked, and a cutter would not cut them.
nothing-to-check
    (error) no outline of the file has a segment: an empty drawing is never clean.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from typing import Any

from outlinebench.diagnostics.findings import ERROR, INFO
from outlinebench.io.svg_read import ReadNote
from outlinebench.model.document import Document

__all__ = ["FILE_KINDS", "FileFinding", "file_findings", "has_segments"]

FILE_KINDS: tuple[str, ...] = ("read-error", "live-text", "nothing-to-check")

# Reader note kinds that mean geometry a renderer would draw was not read.
_UNREAD_KINDS = frozenset({"external"})


@dataclass(frozen=True, slots=True)
class FileFinding:
    """One finding about the file, not about a place on an outline.

    Attributes
    ----------
    kind : str
        One of :data:`FILE_KINDS`.
    severity : str
        ``"error"``, ``"warning"`` or ``"info"``.
    message : str
        One line naming the element(s) and what happened, without the file name (reports add
        it).
    count : int
        How many occurrences the finding stands for (text elements, ...).
    """

    kind: str
    severity: str
    message: str
    count: int = 1

    def to_dict(self) -> dict[str, Any]:
        """A JSON-ready dict: ``{"kind", "severity", "place": "file", "count", "message"}``."""
        return {
            "kind": self.kind,
            "severity": self.severity,
            "place": "file",
            "count": self.count,
            "message": self.message,
        }


def has_segments(doc: Document) -> bool:
    """True when some contour of the document has at least one segment."""
    return any(c.segments for o in doc.outlines for c in o.contours)


def _strip_where(message: str, where: str | None) -> str:
    if where and message.startswith(f"{where}: "):
        return message[len(where) + 2 :]
    return message


def file_findings(
    notes: Iterable[ReadNote],
    doc: Document,
    *,
    allow_text: bool = False,
    where: str | None = None,
) -> tuple[list[FileFinding], list[ReadNote]]:
    """Split the reader's notes into file findings and the notes that stay notes.

    Parameters
    ----------
    notes : iterable of ReadNote
        Every note of the reader, errors included (:attr:`outlinebench.io.ReadResult.all_notes`).
    doc : Document
        The document as read (whatever part of it could be read).
    allow_text : bool
        Live text is info rather than an error (a shop that engraves text by other means).
    where : str, optional
        The file name the reader put at the start of its messages; it is taken off, since
        reports name the file themselves.

    Returns
    -------
    (findings, remaining_notes)
        ``findings`` in the order read-error, live-text, nothing-to-check; the other notes
        (arcs converted, hidden elements, images, ...) unchanged.

    Examples
    --------
    >>> found, rest = file_findings([], Document())
    >>> [f.kind for f in found], rest
    (['nothing-to-check'], [])
    """
    found: list[FileFinding] = []
    text: list[FileFinding] = []
    rest: list[ReadNote] = []
    for n in notes:
        msg = _strip_where(n.message, where)
        if n.level == "error" or n.kind in _UNREAD_KINDS:
            found.append(FileFinding("read-error", ERROR, msg, n.count))
        elif n.kind == "text":
            text.append(FileFinding("live-text", INFO if allow_text else ERROR, msg, n.count))
        else:
            rest.append(n)
    found.extend(text)
    if not has_segments(doc):
        n_outlines = len(doc.outlines)
        what = (
            "the file holds no outline"
            if n_outlines == 0
            else f"none of its {n_outlines} outline(s) has a segment"
        )
        found.append(FileFinding("nothing-to-check", ERROR, what))
    return found, rest
