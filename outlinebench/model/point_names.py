"""Naming the points of a document: which control point a reference means, and its canonical name.

A :class:`PointRef` ``(outline, contour, segment, index)`` names control point ``index`` of a
segment. An on-curve point where two segments meet has two names (the end of the incoming
segment and the start of the outgoing one); its *canonical* name is the start of the outgoing
segment, ``index 0``. Only the end point of an open contour is named by its last segment's
last index. Node ``k`` of a contour is the start of segment ``k`` (and, for an open contour of
n segments, node ``n`` is its end). :func:`canonical_ref`, :func:`on_curve_refs`,
:func:`handle_refs` and :func:`point_refs` list and normalise names. Bad indices raise
:class:`~outlinebench.errors.CommandError` naming what is missing.

Moved out of :mod:`outlinebench.model.commands` (which still exports these names).
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import NamedTuple

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import CommandError
from outlinebench.geometry.bezier import KIND_BY_DEGREE
from outlinebench.model.document import Contour, Document

__all__ = [
    "PointRef",
    "SegmentRef",
    "canonical_ref",
    "node_ref",
    "node_of",
    "is_on_curve",
    "point_position",
    "on_curve_refs",
    "handle_refs",
    "point_refs",
]

FloatArray = NDArray[np.float64]


class PointRef(NamedTuple):
    """Control point ``index`` of segment ``segment`` of a contour of an outline."""

    outline: int
    contour: int
    segment: int
    index: int


class SegmentRef(NamedTuple):
    """Segment ``segment`` of contour ``contour`` of outline ``outline``."""

    outline: int
    contour: int
    segment: int


# -- validation -----------------------------------------------------------------------------


def _contour_at(doc: Document, outline: int, contour: int) -> Contour:
    if not 0 <= outline < len(doc.outlines):
        raise CommandError(
            f"outline {outline} does not exist (the document has {len(doc.outlines)} outlines)"
        )
    contours = doc.outlines[outline].contours
    if not 0 <= contour < len(contours):
        raise CommandError(
            f"contour {contour} does not exist in outline {outline} "
            f"(it has {len(contours)} contours)"
        )
    return contours[contour]


def _check_segment(c: Contour, outline: int, contour: int, segment: int) -> FloatArray:
    if not 0 <= segment < len(c.segments):
        raise CommandError(
            f"segment {segment} does not exist in contour {contour} of outline {outline} "
            f"(it has {len(c.segments)} segments)"
        )
    return c.segments[segment]


def _check_ref(doc: Document, ref: PointRef) -> Contour:
    c = _contour_at(doc, ref.outline, ref.contour)
    seg = _check_segment(c, ref.outline, ref.contour, ref.segment)
    if not 0 <= ref.index < seg.shape[0]:
        raise CommandError(
            f"control point {ref.index} does not exist in segment {ref.segment} of contour "
            f"{ref.contour} of outline {ref.outline} (a {KIND_BY_DEGREE[seg.shape[0] - 1]} "
            f"has {seg.shape[0]} control points)"
        )
    return c


# -- point addressing -----------------------------------------------------------------------

# Inside a contour a point is keyed ("n", node) for on-curve points and ("h", segment, index)
# for handles.
_Key = tuple


def _key(c: Contour, segment: int, index: int) -> _Key:
    n = len(c.segments)
    k = c.segments[segment].shape[0]
    if index == 0:
        return ("n", segment)
    if index == k - 1:
        nxt = segment + 1
        if nxt == n:
            return ("n", 0 if c.closed else n)
        return ("n", nxt)
    return ("h", segment, index)


def node_of(doc: Document, ref: PointRef) -> int | None:
    """Node number of an on-curve point (start of segment k is node k), None for a handle."""
    c = _check_ref(doc, ref)
    key = _key(c, ref.segment, ref.index)
    return key[1] if key[0] == "n" else None


def _node_name(outline: int, contour: int, c: Contour, node: int) -> PointRef:
    n = len(c.segments)
    if node < n:
        return PointRef(outline, contour, node, 0)
    return PointRef(outline, contour, n - 1, c.segments[n - 1].shape[0] - 1)


def node_ref(doc: Document, outline: int, contour: int, node: int) -> PointRef:
    """Canonical reference of on-curve node ``node`` of a contour."""
    c = _contour_at(doc, outline, contour)
    n = len(c.segments)
    count = n if c.closed else n + 1
    if n == 0 or not 0 <= node < count:
        raise CommandError(
            f"on-curve point {node} does not exist in contour {contour} of outline {outline} "
            f"(it has {count if n else 0})"
        )
    return _node_name(outline, contour, c, node)


def canonical_ref(doc: Document, ref: PointRef) -> PointRef:
    """The canonical name of a control point (see the module docstring)."""
    c = _check_ref(doc, ref)
    key = _key(c, ref.segment, ref.index)
    if key[0] == "h":
        return PointRef(*ref)
    return _node_name(ref.outline, ref.contour, c, key[1])


def is_on_curve(doc: Document, ref: PointRef) -> bool:
    """Whether the control point lies on the curve (a segment end point)."""
    c = _check_ref(doc, ref)
    return _key(c, ref.segment, ref.index)[0] == "n"


def point_position(doc: Document, ref: PointRef) -> FloatArray:
    """Coordinates of a control point, shape (2,) (a read-only view)."""
    c = _check_ref(doc, ref)
    return c.segments[ref.segment][ref.index]


def on_curve_refs(doc: Document, outline: int, contour: int) -> list[PointRef]:
    """Canonical references of a contour's on-curve points, in order along it."""
    c = _contour_at(doc, outline, contour)
    n = len(c.segments)
    if n == 0:
        return []
    count = n if c.closed else n + 1
    return [_node_name(outline, contour, c, k) for k in range(count)]


def handle_refs(doc: Document, outline: int, contour: int) -> list[PointRef]:
    """References of a contour's handles (off-curve control points), in order along it."""
    c = _contour_at(doc, outline, contour)
    return [
        PointRef(outline, contour, s, i)
        for s, seg in enumerate(c.segments)
        for i in range(1, seg.shape[0] - 1)
    ]


def point_refs(doc: Document, outline: int, contour: int) -> list[PointRef]:
    """Canonical references of every control point of a contour, in order along it."""
    c = _contour_at(doc, outline, contour)
    out: list[PointRef] = []
    n = len(c.segments)
    for s, seg in enumerate(c.segments):
        out.append(PointRef(outline, contour, s, 0))
        out.extend(PointRef(outline, contour, s, i) for i in range(1, seg.shape[0] - 1))
    if n and not c.closed:
        out.append(_node_name(outline, contour, c, n))
    return out


def _group_keys(doc: Document, refs: Iterable[PointRef]) -> dict[tuple[int, int], list[_Key]]:
    groups: dict[tuple[int, int], list[_Key]] = {}
    for r in refs:
        r = PointRef(*r)
        c = _check_ref(doc, r)
        groups.setdefault((r.outline, r.contour), []).append(_key(c, r.segment, r.index))
    return groups
