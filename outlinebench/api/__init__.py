"""The front door for library users: read, check, measure, flatten, offset, repair, write.

Three lines check a file the way ``outlinebench check`` does:

>>> import outlinebench as ob
>>> result = ob.check(ob.read(ob.sample_path("workshop-bracket.svg")))
>>> result.clean, result.profile
(True, 'cutting')

Every function is a pure function of its inputs and every result is a plain, picklable
object with ``to_json()``, so a shop can map :func:`check_file` over a folder with any process
pool (see :func:`check_file`). The command line is a thin layer over these functions.

Lengths are in the document's user units (``Document.mm_per_unit`` gives their size); a
tolerance left as None means 0.01 mm through the file's scale, as on the command line.
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from outlinebench.api.cutting import flatten_document, offset_document
from outlinebench.api.measuring import measure_document
from outlinebench.api.repairing import DEFAULT_MAX_CHANGE_MM, Outcome, parse_kinds, repair_document
from outlinebench.data_files import samples_dir
from outlinebench.diagnostics import (
    CheckSettings,
    Finding,
    check_document,
    convert_units,
    json_report,
    summarize,
    text_report,
)
from outlinebench.diagnostics.file_findings import FileFinding, file_findings
from outlinebench.diagnostics.outline_overlaps import outline_overlap_findings
from outlinebench.diagnostics.profiles import apply_profile, default_profile_name, profile_settings
from outlinebench.diagnostics.settings import DEFAULT_GAP_MM
from outlinebench.errors import OptionError, OutlinebenchError
from outlinebench.io import is_font_path, read_font, read_svg, svg_bytes, write_file_atomic
from outlinebench.io.svg_read import ReadNote, ReadResult
from outlinebench.model.document import Document

__all__ = [
    "Drawing",
    "CheckResult",
    "Measurements",
    "Flattening",
    "OffsetResult",
    "RepairResult",
    "read",
    "read_source",
    "check",
    "check_file",
    "measure",
    "flatten",
    "offset",
    "repair",
    "write",
    "sample_path",
    "DEFAULT_TOLERANCE_MM",
]

# The default tolerance of flatten and offset: check's gap tolerance, 0.01 mm.
DEFAULT_TOLERANCE_MM = DEFAULT_GAP_MM


def _tolerance(doc: Document, tolerance: float | None) -> float:
    return DEFAULT_TOLERANCE_MM / doc.mm_per_unit if tolerance is None else float(tolerance)


@dataclass
class Drawing:
    """A file as read: the document and what could not be read.

    Attributes
    ----------
    document : Document
        Everything that could be read.
    file_findings : list of FileFinding
        Read errors, live text, nothing to check (never silently dropped).
    notes : list of ReadNote
        The reader's other notes (arcs converted, hidden elements, ...).
    path : str or None
    """

    document: Document
    file_findings: list[FileFinding] = field(default_factory=list)
    notes: list[ReadNote] = field(default_factory=list)
    path: str | None = None

    @property
    def complete(self) -> bool:
        """Everything in the file that could be geometry was read."""
        return not any(f.kind == "read-error" for f in self.file_findings)


def read_source(
    source: str | os.PathLike[str] | bytes,
    *,
    glyphs: str | None = None,
    allow_entities: bool = False,
) -> ReadResult:
    """The reader for a source: SVG (a file or its bytes), or a font or UFO source by its
    name; the reader's own result, errors as notes (:func:`read` builds on it)."""
    if isinstance(source, bytes | bytearray):
        return read_svg(bytes(source), allow_entities=allow_entities)
    path = os.fspath(source)
    if glyphs is not None and not is_font_path(path):
        raise OptionError(
            f"{path}: choosing glyphs applies to fonts and font sources only", file=path
        )
    try:
        if is_font_path(path):
            return read_font(path, glyphs=glyphs)
        return read_svg(path, allow_entities=allow_entities)
    except OutlinebenchError as exc:
        # the readers begin every message with the file's name as the caller gave it
        if exc.file is None:
            exc.file = path
        raise


def read(
    source: str | os.PathLike[str] | bytes,
    *,
    glyphs: str | None = None,
    allow_entities: bool = False,
    allow_text: bool = False,
) -> Drawing:
    """Read an SVG file (or its bytes), a font (``.ttf``, ``.otf``) or a UFO source.

    Read as far as it can be read: every error is kept as a file finding, never raised
    (unless nothing at all can be read).

    Parameters
    ----------
    source : str, path-like or bytes
    glyphs : str, optional
        Fonts: the glyphs to read (names, ranges: ``"A,B,a-z"``).
    allow_entities : bool
        Expand harmless internal XML entities (refused by default).
    allow_text : bool
        Live text is info, not an error finding.

    Raises
    ------
    OutlinebenchError
        Nothing can be read (not XML, not SVG, not a font; the message names the file).
    OSError
        The file cannot be opened.

    Examples
    --------
    >>> d = read(b'<svg xmlns="http://www.w3.org/2000/svg"><path d="M0 0 L1 x"/></svg>')
    >>> d.complete, [f.kind for f in d.file_findings]
    (False, ['read-error', 'nothing-to-check'])
    """
    res = read_source(source, glyphs=glyphs, allow_entities=allow_entities)
    path = None if isinstance(source, bytes | bytearray) else os.fspath(source)
    where = path if path is not None else "<bytes>"
    found, rest = file_findings(res.all_notes, res.document, allow_text=allow_text, where=where)
    return Drawing(res.document, found, rest, path)


@dataclass
class CheckResult:
    """The findings of one document and whether it is clean.

    Attributes
    ----------
    label : str
        The file name (or ``<document>``).
    profile : str
        The check profile used (``"cutting"`` or ``"type"``).
    findings : list of Finding
        In document order, lengths in user units.
    file_findings : list of FileFinding
    mm_per_unit : float
        Size of a user unit, for :meth:`to_json` in other units.
    """

    label: str
    profile: str
    findings: list[Finding]
    file_findings: list[FileFinding]
    mm_per_unit: float

    @property
    def clean(self) -> bool:
        """Nothing of warning level or worse, and everything read."""
        return bool(summarize(self.findings, self.file_findings)["clean"])

    def summary(self) -> dict[str, Any]:
        """Counts by severity and kind (:func:`outlinebench.diagnostics.summarize`)."""
        return summarize(self.findings, self.file_findings)

    def _converted(self, unit: str) -> list[Finding]:
        if unit == "user":
            return list(self.findings)
        from outlinebench.model.units import MM_PER

        return convert_units(self.findings, self.mm_per_unit / MM_PER[unit], unit)

    def to_json(self, unit: str = "user") -> dict[str, Any]:
        """The JSON object ``outlinebench check --json`` prints for this file."""
        out = json_report(
            self.label, self._converted(unit), unit=unit, file_findings=self.file_findings
        )
        out["profile"] = {"name": self.profile}
        return out

    def text(self, unit: str = "user", show_info: bool = True) -> str:
        """The text report ``outlinebench check`` prints for this file."""
        return text_report(
            self.label,
            self._converted(unit),
            unit=unit,
            show_info=show_info,
            file_findings=self.file_findings,
            profile=self.profile,
        )


def check(
    drawing: Drawing | Document,
    *,
    profile: str | None = None,
    tolerances: CheckSettings | dict[str, Any] | None = None,
) -> CheckResult:
    """Every finding of a drawing (or a bare document).

    Parameters
    ----------
    drawing : Drawing or Document
    profile : {"cutting", "type"}, optional
        Default: ``type`` for fonts and font sources, ``cutting`` otherwise.
    tolerances : CheckSettings or dict, optional
        The profile's tolerances, or these (a dict changes only the fields it names, e.g.
        ``{"kink_angle": 1.0}``).

    Examples
    --------
    >>> r = check(Document())
    >>> r.clean, [f.kind for f in r.file_findings]
    (False, ['nothing-to-check'])
    """
    if isinstance(drawing, Document):
        drawing = Drawing(drawing, file_findings([], drawing)[0], [], drawing.path)
    doc = drawing.document
    name = profile or default_profile_name(doc)
    settings = profile_settings(name, doc)
    if isinstance(tolerances, CheckSettings):
        settings = tolerances
    elif tolerances:
        from dataclasses import replace

        settings = replace(settings, **tolerances)
    findings = apply_profile(check_document(doc, settings), name, doc)
    if name == "cutting":
        findings += outline_overlap_findings(doc, settings.gap_mm / doc.mm_per_unit)
    label = drawing.path or "<document>"
    return CheckResult(label, name, findings, list(drawing.file_findings), doc.mm_per_unit)


def check_file(path: str | os.PathLike[str], **options: Any) -> CheckResult:
    """:func:`read` then :func:`check` one file: a pure function to map over many files.

    Examples
    --------
    Any process pool works, for instance the standard library's:

    >>> from concurrent.futures import ProcessPoolExecutor
    >>> files = [sample_path("workshop-bracket.svg"), sample_path("signshop-lettering.svg")]
    >>> with ProcessPoolExecutor(max_workers=2) as pool:  # doctest: +SKIP
    ...     results = list(pool.map(check_file, files))
    >>> [check_file(f).clean for f in files]
    [True, True]
    """
    read_keys = {"glyphs", "allow_entities", "allow_text"}
    drawing = read(path, **{k: v for k, v in options.items() if k in read_keys})
    return check(drawing, **{k: v for k, v in options.items() if k not in read_keys})


@dataclass
class Measurements:
    """Lengths, areas and bounds of every contour (:func:`measure`)."""

    data: dict[str, Any]

    @property
    def contours(self) -> list[dict[str, Any]]:
        return self.data["contours"]

    @property
    def totals(self) -> dict[str, Any]:
        return self.data["totals"]

    def to_json(self) -> dict[str, Any]:
        return dict(self.data)


def measure(doc: Drawing | Document, *, unit: str = "user", joins: bool = False) -> Measurements:
    """Closedness, length, enclosed area, tight box of every contour, lengths of segments.

    Examples
    --------
    >>> d = read(b'<svg xmlns="http://www.w3.org/2000/svg"><path d="M0 0 L3 4"/></svg>')
    >>> measure(d).totals["length"]  # the 3-4-5 triangle's hypotenuse
    5.0
    """
    document = doc.document if isinstance(doc, Drawing) else doc
    return Measurements(measure_document(document, unit, joins))


@dataclass
class Flattening:
    """Polylines of every contour within a proven deviation (:func:`flatten`).

    Attributes
    ----------
    polylines : list of ndarray (P, 2)
    closed : list of bool
    tolerance : float
    max_deviation : float
        Proven upper bound of the Hausdorff distance, all contours.
    """

    polylines: list[Any]
    closed: list[bool]
    tolerance: float
    max_deviation: float

    def to_json(self) -> dict[str, Any]:
        return {
            "tolerance": self.tolerance,
            "max_deviation": self.max_deviation,
            "contours": [
                {"closed": c, "points": p.tolist()}
                for p, c in zip(self.polylines, self.closed, strict=True)
            ],
        }


def flatten(doc: Drawing | Document, *, tolerance: float | None = None) -> Flattening:
    """Chords within ``tolerance`` of the curves (user units; default 0.01 mm), proven.

    Examples
    --------
    >>> d = read(b'<svg xmlns="http://www.w3.org/2000/svg"><path d="M0 0 Q5 10 10 0"/></svg>')
    >>> f = flatten(d, tolerance=0.01)
    >>> f.max_deviation <= 0.01, len(f.polylines)
    (True, 1)
    """
    document = doc.document if isinstance(doc, Drawing) else doc
    tol = _tolerance(document, tolerance)
    r = flatten_document(document, tol)
    return Flattening(
        [c["points"] for c in r["contours"]],
        [c["closed"] for c in r["contours"]],
        tol,
        r["max_deviation"],
    )


@dataclass
class OffsetResult:
    """Toolpaths of a document's regions, verified (:func:`offset`).

    Attributes
    ----------
    toolpaths : list of dict
        ``{"outline", "contour", "closed", "points"}``.
    problems : list of tuple
        (kind, severity, outline, contour, segment, t, x, y, value, message).
    verified : bool
        The independent verification passed: the toolpaths may be written.
    overlaps : list
        Separate outlines whose toolpaths overlap.
    times : dict
        Seconds per stage.
    """

    toolpaths: list[dict[str, Any]]
    problems: list[tuple]
    verified: bool
    overlaps: list[Any]
    times: dict[str, float]

    def to_json(self) -> dict[str, Any]:
        return {
            "verified": self.verified,
            "times": self.times,
            "contours": [{**t, "points": list(map(list, t["points"]))} for t in self.toolpaths],
            "findings": [
                dict(
                    zip(
                        (
                            "kind",
                            "severity",
                            "outline",
                            "contour",
                            "segment",
                            "t",
                            "x",
                            "y",
                            "value",
                            "message",
                        ),
                        p,
                        strict=True,
                    )
                )
                for p in self.problems
            ],  # fmt: skip
            "overlaps": [
                {"first": o.first, "second": o.second, "x": o.x, "y": o.y, "area": o.area}
                for o in self.overlaps
            ],
        }


def offset(
    doc: Drawing | Document,
    distance: float,
    *,
    tolerance: float | None = None,
    merge_outlines: bool = False,
) -> OffsetResult:
    """Offset the filled region of every outline by ``distance`` (user units; > 0 grows).

    Examples
    --------
    >>> d = read(b'<svg xmlns="http://www.w3.org/2000/svg"><rect width="10" height="10"/></svg>')
    >>> r = offset(d, -2.0, tolerance=0.01)
    >>> r.verified, len(r.toolpaths)
    (True, 1)
    """
    document = doc.document if isinstance(doc, Drawing) else doc
    r = offset_document(
        document, float(distance), _tolerance(document, tolerance), merge=merge_outlines
    )
    return OffsetResult(
        r["toolpaths"], r["problems"], not r["violations"], r["overlaps"], r["times"]
    )


@dataclass
class RepairResult:
    """The repaired document and what came of each fix (:func:`repair`)."""

    document: Document
    outcomes: list[Outcome]

    def to_json(self, factor: float = 1.0) -> dict[str, Any]:
        return {"fixes": [o.to_dict(factor) for o in self.outcomes]}


def repair(
    doc: Drawing | Document,
    fixes: str | Sequence[str] = "all",
    *,
    max_change: float | None = None,
) -> RepairResult:
    """Apply fixes (kind words, or "all") within an allowed shape change (user units;
    default 0.05 mm), each measured with a proven Hausdorff bound and refused beyond it.

    Examples
    --------
    >>> svg = b'<svg xmlns="http://www.w3.org/2000/svg"><path d="M0 0 H10 V10 H0 V0.001"/></svg>'
    >>> d = read(svg)
    >>> r = repair(d, "close-gaps", max_change=0.01)
    >>> [o.status for o in r.outcomes], r.document.outlines[0].contours[0].closed
    (['fixed'], True)
    """
    document = doc.document if isinstance(doc, Drawing) else doc
    kinds = parse_kinds(fixes if isinstance(fixes, str) else ",".join(fixes))
    limit = DEFAULT_MAX_CHANGE_MM / document.mm_per_unit if max_change is None else max_change
    r = repair_document(document, kinds, max_change=limit)
    return RepairResult(r.document, list(r.outcomes))


def write(
    doc: Drawing | Document, path: str | os.PathLike[str], *, overwrite: bool = False
) -> None:
    """Write a document as SVG, atomically (into its original bytes when it was read from SVG).

    An existing file is refused unless ``overwrite=True``: no output overwrites a design by
    accident.

    Raises
    ------
    OutlinebenchError
        The target exists (without ``overwrite``), or is not a regular file.
    """
    document = doc.document if isinstance(doc, Drawing) else doc
    target = os.fspath(path)
    if os.path.exists(target) and not overwrite:
        raise OutlinebenchError(
            f"{target}: exists; pass overwrite=True to replace it", file=str(target)
        )
    write_file_atomic(target, svg_bytes(document))


def sample_path(name: str) -> str:
    """The path of a bundled sample drawing (``"workshop-bracket.svg"``, ...).

    Examples
    --------
    >>> sample_path("workshop-bracket.svg").endswith("workshop-bracket.svg")
    True
    """
    base = samples_dir()
    path = base / name if base is not None else None
    if path is None or not path.is_file():
        raise OutlinebenchError(f"no bundled sample named {name!r}")
    return str(path)
