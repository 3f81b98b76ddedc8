"""The finding: one thing wrong or noteworthy about an outline, with its place and its number.

A finding names its kind (``gap``, ``kink``, ...), a severity (``error``, ``warning``,
``info``), where it is (outline, contour, segment, parameter t, position x, y) and what was
measured (``value`` with its ``unit``). Checks return findings and never print; reports
(:mod:`outlinebench.diagnostics.report`) turn them into text or JSON.

Severities
----------
error: gap, cusp, self-intersection, wrong-direction, duplicate-contour, and a kink or corner
at a join the file marks smooth. warning: kink, curvature-jump between two curved pieces,
open-contour, tiny-segment, degenerate-handle. info: corner, curvature-jump where a straight
piece runs into a curve (both configurable in :class:`~outlinebench.diagnostics.CheckSettings`),
missing-extremum, and an open contour whose ends all meet other ends. ``check`` exits with 1
when anything of warning level or worse is found.

Numbering
---------
``outline`` is the index of the SVG element the outline came from
(:attr:`outlinebench.model.Outline.source_index`, or its position in the document when that is
-1). ``contour`` is the contour's index in document order across the whole file, the numbering
``outlinebench measure`` uses (:meth:`outlinebench.model.Document.contour_refs`). ``segment``
is the index within that contour; ``join`` j is where segment j ends and segment j + 1 begins.
"""

from __future__ import annotations

import math
from typing import Any, NamedTuple

__all__ = [
    "ERROR",
    "WARNING",
    "INFO",
    "SEVERITIES",
    "SEVERITY_RANK",
    "CHECK_KINDS",
    "OFFSET_KINDS",
    "KINDS",
    "Finding",
    "is_problem",
]

ERROR = "error"
WARNING = "warning"
INFO = "info"
SEVERITIES: tuple[str, ...] = (ERROR, WARNING, INFO)
# Lower rank is more serious; reports sort by it.
SEVERITY_RANK = {ERROR: 0, WARNING: 1, INFO: 2}

# Every kind ``check`` can report, in the order reports list their counts.
CHECK_KINDS: tuple[str, ...] = (
    "gap",
    "kink",
    "corner",
    "curvature-jump",
    "cusp",
    "self-intersection",
    "open-contour",
    "tiny-segment",
    "degenerate-handle",
    "missing-extremum",
    "wrong-direction",
    "duplicate-contour",
    "overlap",
    "touch",
    "grid-kink",
)
# Kinds only the offset (tool radius compensation) reports: the tool cannot follow a concave
# feature tighter than its radius; a part of the outline disappears at this offset; a fitted
# piece still misses the exact offset by more than the tolerance (with the measured error).
OFFSET_KINDS: tuple[str, ...] = ("tool-does-not-fit", "vanishes", "offset-inaccurate")
# Every kind of finding, in the order reports list their counts.
KINDS: tuple[str, ...] = CHECK_KINDS + OFFSET_KINDS


class Finding(NamedTuple):
    """One finding (an immutable record; ``f._replace(...)`` gives a changed copy).

    A named tuple rather than a dataclass: a check of a large document creates tens of
    thousands of findings, and a tuple is built about five times faster than a frozen
    dataclass.

    Parameters
    ----------
    kind : str
        One of :data:`KINDS`.
    severity : str
        ``"error"``, ``"warning"`` or ``"info"``.
    outline : int
        Index of the SVG element (see module docstring).
    contour : int
        Global contour index in document order.
    segment : int or None
        Segment index within the contour (for a join: the incoming segment).
    t : float or None
        Parameter on that segment where the finding sits (1.0 for the end of a segment at a
        join).
    x, y : float
        Position in the document's user units (reports may convert).
    value : float or None
        The measured value (distance, angle, relative difference, area, ...).
    unit : str
        Unit of ``value``: ``"user"`` (document user units, for lengths), ``"user^2"`` (areas),
        ``"degrees"``, ``"relative"`` (a ratio), or a converted length unit such as ``"mm"``.
    message : str
        One plain sentence for people.
    join : int or None
        Join index within the contour, for join findings.
    limit : float or None
        The tolerance the value was compared with, in the same unit.
    curvature_before, curvature_after : float or None
        Signed curvature κ on each side of a join (1/length), for ``curvature-jump``.
    other_contour, other_segment, other_t : int, int, float or None
        The second place, for a gap between two contour ends and an intersection.
    """

    kind: str
    severity: str
    outline: int
    contour: int
    segment: int | None
    t: float | None
    x: float
    y: float
    value: float | None
    unit: str
    message: str
    join: int | None = None
    limit: float | None = None
    curvature_before: float | None = None
    curvature_after: float | None = None
    other_contour: int | None = None
    other_segment: int | None = None
    other_t: float | None = None

    def to_dict(self) -> dict[str, Any]:
        """A JSON-ready dict: every field, non-finite numbers as None (JSON has no inf/NaN)."""
        out: dict[str, Any] = self._asdict()
        for name, v in out.items():
            if isinstance(v, float) and not math.isfinite(v):
                out[name] = None
        return out


def is_problem(finding: Finding) -> bool:
    """True for findings of warning level or worse (they make ``check`` exit with 1)."""
    return finding.severity in (ERROR, WARNING)
