"""Small helpers shared by the subcommands: reading a file, length units, JSON output.

Public to the other subcommand modules (not to users):

- :func:`read_document` reads an SVG file through :mod:`outlinebench.io` and raises the
  reader's one-line error (naming the file and the place) when it cannot;
  :func:`read_svg_file` does the same and gives the reader's notes as JSON-ready dicts.
- :data:`LENGTH_UNITS`, :func:`unit_factor`, :func:`mm_per` convert the document's user units
  to mm, in, pt or px through the root's width/height and viewBox
  (:attr:`outlinebench.model.Document.mm_per_unit`).
- :func:`positive_float`, :func:`nonnegative_float` are argparse ``type=`` checkers whose
  messages name the bad value.
- :func:`write_json` prints JSON with a trailing newline (non-finite numbers become null).
- :func:`output_decimals` and :func:`cut_file_bytes` make the cut files of ``flatten`` and
  ``offset`` (polylines in mm at a stated resolution, with the cutting caution).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import stat
import sys
from dataclasses import dataclass
from pathlib import Path
from typing import Any, TextIO

import numpy as np

from outlinebench import api
from outlinebench.diagnostics.file_findings import FileFinding, has_segments
from outlinebench.diagnostics.report import unit_words as _unit_words
from outlinebench.diagnostics.settings import DEFAULT_GAP_MM
from outlinebench.errors import (
    OutlinebenchError,
    SvgReadError,
    UnsafeXmlError,
)
from outlinebench.io import polylines_svg
from outlinebench.io.svg_read import ReadNote, ReadResult
from outlinebench.model.document import Document
from outlinebench.model.units import LENGTH_UNITS, MM_PER, axis_scales, mm_per, unit_factor

__all__ = [
    "LENGTH_UNITS",
    "MM_PER",
    "mm_per",
    "unit_factor",
    "axis_scales",
    "read_document",
    "read_svg_file",
    "read_svg_partly",
    "PartialRead",
    "ENTITY_OPTION",
    "add_entity_option",
    "add_glyphs_option",
    "note_line",
    "DEFAULT_TOLERANCE_MM",
    "TOLERANCE_RULE",
    "tolerance_user",
    "refuse_overwrite",
    "require_segments",
    "unit_words",
    "positive_float",
    "nonnegative_float",
    "clean_json",
    "write_json",
    "MAX_OUTPUT_RESOLUTION",
    "output_decimals",
    "cut_file_bytes",
]

# The command-line option that lets the reader expand internal XML entities.
ENTITY_OPTION = "--allow-internal-entities"


def add_entity_option(parser: argparse.ArgumentParser) -> None:
    """Add ``--allow-internal-entities`` to a subcommand's parser."""
    parser.add_argument(
        ENTITY_OPTION,
        dest="allow_entities",
        action="store_true",
        help="expand internal XML entities declared in the file (refused by default: "
        "entity expansion can blow up without bound); external entities stay refused",
    )


def add_glyphs_option(parser: argparse.ArgumentParser) -> None:
    """Add ``--glyphs`` (fonts and font sources: which glyphs) to a subcommand's parser."""
    parser.add_argument(
        "--glyphs",
        metavar="NAMES",
        default=None,
        help="fonts and font sources only: the glyphs to read, by name or range (e.g. "
        "'A,B,a-z'); default every glyph",
    )


def _with_option_hint(err: UnsafeXmlError) -> UnsafeXmlError:
    """The reader's entity error, pointing at the command-line option."""
    return UnsafeXmlError(
        f"{err} (to read it anyway: {ENTITY_OPTION})", reason=err.reason, file=err.file
    )


def _note_dict(n: ReadNote) -> dict[str, Any]:
    return {"level": n.level, "kind": n.kind, "count": n.count, "message": n.message}


def _read(
    path: str | Path, allow_entities: bool, option_hint: bool, glyphs: str | None = None
) -> ReadResult:
    try:
        return api.read_source(path, glyphs=glyphs, allow_entities=allow_entities)
    except UnsafeXmlError as exc:
        if option_hint and not allow_entities and exc.reason == "internal-entity":
            raise _with_option_hint(exc) from None
        raise


def read_svg_file(
    path: str | Path,
    *,
    allow_entities: bool = False,
    option_hint: bool = False,
    glyphs: str | None = None,
) -> tuple[Document, list[dict[str, Any]]]:
    """Read an SVG file into a document, strictly, with the reader's notes as JSON-ready dicts.

    For the commands that write files from the drawing (flatten, offset) or compare two
    drawings (deviation): a file that could not be read in full is refused, since a cut file
    of part of a design is silently wrong.

    Parameters
    ----------
    path : str or Path
    allow_entities : bool
        Let the reader expand internal XML entities (``--allow-internal-entities``); off by
        default, since entity expansion is how XML bombs work.
    option_hint : bool
        The caller offers ``--allow-internal-entities``: an error about internal entities
        names that option.

    Returns
    -------
    (document, notes)
        ``notes``: ``{"level", "kind", "count", "message"}`` per note of
        :func:`outlinebench.io.read_svg` (text not converted, arcs converted, ...).

    Raises
    ------
    outlinebench.errors.SvgReadError
        The file is not a readable SVG, or something in it that could be geometry could not
        be read (the message names the file, element and place, and how many more errors
        there are).
    OSError
        The file cannot be opened.
    """
    result = _read(path, allow_entities, option_hint, glyphs)
    errors = [n for n in result.all_notes if n.level == "error"]
    if errors:
        more = f" (and {len(errors) - 1} more error(s))" if len(errors) > 1 else ""
        first = errors[0].message
        if result.error is not None and first == str(result.error) and not more:
            raise result.error
        raise SvgReadError(
            f"{first}{more}; not all of the file could be read", file=os.fspath(path)
        )
    return result.document, [_note_dict(n) for n in result.notes]


@dataclass
class PartialRead:
    """A file read as far as it could be: for the commands that report (check, measure).

    Attributes
    ----------
    document : Document
        Everything that could be read.
    file_findings : list of FileFinding
        What could not be read, live text, and "nothing to check"
        (:func:`outlinebench.diagnostics.file_findings.file_findings`).
    notes : list of dict
        The other notes of the reader (JSON-ready, as :func:`read_svg_file` gives them).
    """

    document: Document
    file_findings: list[FileFinding]
    notes: list[dict[str, Any]]


def read_svg_partly(
    path: str | Path,
    *,
    allow_entities: bool = False,
    allow_text: bool = False,
    glyphs: str | None = None,
) -> PartialRead:
    """Read an SVG file as far as it can be read, every error kept as a file finding.

    Raises
    ------
    outlinebench.errors.SvgReadError
        Nothing can be read at all: not well-formed XML, not an SVG root, bad root size.
    outlinebench.errors.UnsafeXmlError
        Entities, DTDs or a file too large (the message names ``--allow-internal-entities``
        where it helps).
    OSError
        The file cannot be opened.
    """
    try:
        drawing = api.read(
            path, glyphs=glyphs, allow_entities=allow_entities, allow_text=allow_text
        )
    except UnsafeXmlError as exc:
        if not allow_entities and exc.reason == "internal-entity":
            raise _with_option_hint(exc) from None
        raise
    return PartialRead(
        drawing.document, drawing.file_findings, [_note_dict(n) for n in drawing.notes]
    )


def note_line(note: dict[str, Any]) -> str:
    """One note as a line for stderr: ``level: message``."""
    return f"{note['level']}: {note['message']}"


def read_document(
    path: str | Path, *, allow_entities: bool = False, glyphs: str | None = None
) -> tuple[Document, list[str]]:
    """Read an SVG file into a document.

    Returns
    -------
    (document, notes)
        ``notes`` are the reader's notes as one-line strings ("warning: FILE: ...").

    Raises
    ------
    outlinebench.errors.SvgReadError
        The file is not a readable SVG or a path in it is bad (the message names the file,
        element and offset).
    OSError
        The file cannot be opened.
    """
    doc, notes = read_svg_file(path, allow_entities=allow_entities, glyphs=glyphs)
    return doc, [note_line(n) for n in notes]


# Default tolerance of flatten, offset and deviation: the same physical length as check's gap
# tolerance (0.01 mm), converted to each file's user units through its scale, so the three
# commands mean the same thing by "the default" on the same file.
DEFAULT_TOLERANCE_MM = DEFAULT_GAP_MM
TOLERANCE_RULE = (
    f"default {DEFAULT_TOLERANCE_MM:g} mm, converted through the file's width/height and "
    "viewBox (96 px per inch where it states no unit): the same physical length as check's "
    "default gap tolerance"
)


def tolerance_user(doc: Document, given: float | None, unit: str) -> float:
    """A tolerance in the document's user units: ``given`` in ``unit``, or the default.

    The default is :data:`DEFAULT_TOLERANCE_MM` millimetres through the file's scale
    (:attr:`Document.mm_per_unit`), whatever ``--units`` says.
    """
    if given is None:
        return DEFAULT_TOLERANCE_MM / doc.mm_per_unit
    return given / unit_factor(doc, unit)


def refuse_overwrite(output: str | os.PathLike[str], inputs: list[str]) -> None:
    """Refuse an output path that is one of the inputs, or not a regular file.

    Compared by file identity (device and inode, :func:`os.path.samefile`), not by name, so
    ``./a.svg``, a hard link or a symbolic link to an input are refused too. An existing
    target that is not a regular file (a device, a FIFO, a folder) is refused: replacing it
    would change what it is.

    Raises
    ------
    OutlinebenchError
        One line naming the output and the input it would overwrite.
    """
    out = os.fspath(output)
    try:
        st = os.stat(out)
    except FileNotFoundError:
        return
    except OSError as exc:
        raise OutlinebenchError(
            f"{out}: cannot write the output here ({exc.strerror})", file=str(out)
        ) from None
    if not stat.S_ISREG(st.st_mode):
        raise OutlinebenchError(
            f"{out}: output refused: it exists and is not a regular file", file=str(out)
        )
    for src in inputs:
        try:
            same = os.path.samefile(out, src)
        except OSError:
            continue
        if same:
            raise OutlinebenchError(
                f"{out}: output refused: it is the input file {src}; write to a new file",
                file=str(out),
            )


def unit_words(unit: str) -> str:
    """The name of a length unit in sentences: "user units", "mm", "inches", "pt", "px"."""
    return _unit_words(unit)


def require_segments(doc: Document, path: str | Path, verb: str) -> None:
    """Refuse a document with nothing to work on: no contour of it has a segment.

    Raises
    ------
    OutlinebenchError
        ``FILE: nothing to <verb>: no outline has a segment`` (an empty cut file would be
        silently wrong).
    """
    if not has_segments(doc):
        raise OutlinebenchError(
            f"{path}: nothing to {verb}: no outline of the file has a segment", file=str(path)
        )


def positive_float(text: str) -> float:
    """argparse type: a finite number > 0."""
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if not math.isfinite(v) or v <= 0:
        raise argparse.ArgumentTypeError(f"expected a number above 0, got {text!r}")
    return v


def nonnegative_float(text: str) -> float:
    """argparse type: a finite number ≥ 0."""
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if not math.isfinite(v) or v < 0:
        raise argparse.ArgumentTypeError(f"expected a number of at least 0, got {text!r}")
    return v


def clean_json(obj: Any) -> Any:
    """A copy with non-finite floats replaced by None (JSON has no inf or NaN)."""
    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if isinstance(obj, dict):
        return {k: clean_json(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [clean_json(v) for v in obj]
    return obj


def write_json(obj: Any, stream: TextIO | None = None) -> None:
    """Print ``obj`` as indented JSON followed by a newline (stdout by default)."""
    stream = stream or sys.stdout
    json.dump(clean_json(obj), stream, indent=2, ensure_ascii=False, allow_nan=False)
    stream.write("\n")


# Coarsest resolution of written coordinates, in the unit written (mm in cut files): finer than
# any cutter's step; the resolution is also at most 1/1000 of the tolerance (output_decimals).
MAX_OUTPUT_RESOLUTION = 1e-6


def output_decimals(tolerance: float) -> int:
    """Decimals k of written coordinates: 10^-k ≤ min(MAX_OUTPUT_RESOLUTION, tolerance / 1000).

    Parameters
    ----------
    tolerance : float
        The tolerance in the unit written (> 0).

    Returns
    -------
    int
        k ≥ 6; the resolution is 10^-k.
    """
    limit = min(MAX_OUTPUT_RESOLUTION, tolerance / 1000.0)
    return max(6, int(np.ceil(-np.log10(limit) - 1e-9)))


def cut_file_bytes(
    doc: Document,
    polylines: list[np.ndarray],
    closed: list[bool],
    comment: str,
    decimals: int | None = None,
) -> bytes:
    """An SVG cut file of polylines (document user units converted to mm).

    With ``decimals``, coordinates in mm are rounded to that many decimals (the caller
    accounts for the rounding in its stated deviation).

    Uses :func:`outlinebench.io.polylines_svg` (which writes the cutting caution as the first
    comment). The page keeps the document's size when known, else the polylines' extent.

    Raises
    ------
    OutlinebenchError
        A polyline cannot be written (fewer than 2 points, non-finite values).
    """
    f = doc.mm_per_unit
    origin = np.array(doc.view_box[:2]) if doc.view_box else np.zeros(2)
    keep = [(p, c) for p, c in zip(polylines, closed, strict=True) if len(p) >= 2]
    pts_mm = [(p - origin) * f for p, _ in keep]
    if decimals is not None:
        pts_mm = [np.round(p, decimals) for p in pts_mm]
    width, height = doc.width_mm, doc.height_mm
    if not width or not height:
        if doc.view_box:
            width, height = doc.view_box[2] * f, doc.view_box[3] * f
        else:
            allp = np.vstack(pts_mm) if pts_mm else np.zeros((1, 2))
            width = max(float(np.max(allp[:, 0])), 1.0)
            height = max(float(np.max(allp[:, 1])), 1.0)
    try:
        return polylines_svg(
            pts_mm,
            width_mm=float(width),
            height_mm=float(height),
            comment=comment,
            closed=[c for _, c in keep],
        )
    except ValueError as exc:
        raise OutlinebenchError(f"cannot write the cut file: {exc}") from None
