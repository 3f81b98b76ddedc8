"""The editor's questions about named control points: where a point is, its join, its handles.

Points are named by the model's one vocabulary, :class:`outlinebench.model.point_names.PointRef`
``(outline, contour, segment, index)``: an on-curve point shared by two segments is named by
the segment it starts (index 0); the last point of an open contour by its last segment's last
index. Handles are named by their own segment and index. (A PointRef is a named tuple, so a
plain 4-tuple compares and hashes equal to it.)
"""

from __future__ import annotations

import math

import numpy as np

from outlinebench.model.document import Document
from outlinebench.model.point_names import PointRef, canonical_ref
from outlinebench.model.point_names import is_on_curve as model_is_on_curve

__all__ = [
    "PointRef",
    "normalize",
    "point_at",
    "exists",
    "is_on_curve",
    "join_of",
    "handles_of",
    "owner_of_handle",
    "opposite_handle",
    "polar",
    "screen_angle_deg",
]


def exists(doc: Document, key: PointRef) -> bool:
    """Whether ``key`` names a control point of ``doc`` (no index negative or past the end)."""
    o, c, s, i = key
    try:
        seg = doc.outlines[o].contours[c].segments[s]
    except IndexError:
        return False
    return min(o, c, s, i) >= 0 and i < seg.shape[0]


def normalize(doc: Document, key: PointRef) -> PointRef:
    """The canonical name of a control point (as `model.commands.canonical_ref`)."""
    return canonical_ref(doc, PointRef(*key))


def point_at(doc: Document, key: PointRef) -> np.ndarray:
    """The control point's coordinates (document units)."""
    o, c, s, i = key
    return doc.outlines[o].contours[c].segments[s][i]


def is_on_curve(doc: Document, key: PointRef) -> bool:
    """Whether the point lies on the curve (a segment end point)."""
    return model_is_on_curve(doc, PointRef(*key))


def join_of(doc: Document, key: PointRef) -> int | None:
    """Join index at an on-curve point (None at the free ends of an open contour)."""
    o, c, s, i = normalize(doc, key)
    contour = doc.outlines[o].contours[c]
    n = len(contour.segments)
    if i != 0:  # the end of an open contour
        return None
    if s == 0 and not contour.closed:
        return None
    return (s - 1) % n


def handles_of(doc: Document, key: PointRef) -> tuple[PointRef | None, PointRef | None]:
    """(incoming handle, outgoing handle) of an on-curve point; None where the adjacent
    segment is a line or missing."""
    o, c, s, i = normalize(doc, key)
    contour = doc.outlines[o].contours[c]
    n = len(contour.segments)
    incoming = outgoing = None
    if i == 0:
        seg = contour.segments[s]
        if seg.shape[0] > 2:
            outgoing = PointRef(o, c, s, 1)
        if s > 0 or contour.closed:
            prev = (s - 1) % n
            k = contour.segments[prev].shape[0]
            if k > 2:
                incoming = PointRef(o, c, prev, k - 2)
    else:  # end of open contour
        k = contour.segments[s].shape[0]
        if k > 2:
            incoming = PointRef(o, c, s, k - 2)
    return incoming, outgoing


def owner_of_handle(doc: Document, key: PointRef) -> PointRef:
    """The on-curve point a handle hangs from (the nearer end of its segment; for a
    quadratic's single handle, the segment's start)."""
    o, c, s, i = key
    k = doc.outlines[o].contours[c].segments[s].shape[0]
    if i == 1 or k == 3:
        return PointRef(o, c, s, 0)
    return normalize(doc, PointRef(o, c, s, k - 1))


def opposite_handle(doc: Document, key: PointRef) -> PointRef | None:
    """The handle on the other side of the same on-curve point, if any."""
    owner = owner_of_handle(doc, key)
    inc, out = handles_of(doc, owner)
    if key == inc:
        return out
    if key == out:
        return inc
    return None


def polar(origin: np.ndarray, p: np.ndarray) -> tuple[float, float]:
    """Length and on-screen angle (degrees) of the vector origin → p."""
    d = p - origin
    return float(math.hypot(d[0], d[1])), screen_angle_deg(d)


def screen_angle_deg(d: np.ndarray) -> float:
    """Angle of a document-space vector as seen on screen: anticlockwise from +x with the
    screen's y axis up (SVG's y axis points down, so y is negated)."""
    a = math.degrees(math.atan2(-float(d[1]), float(d[0])))
    return 180.0 if a == -180.0 else a + 0.0  # one name for the leftward direction, no −0
