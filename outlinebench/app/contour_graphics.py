"""What the canvas needs to draw one contour, computed once per contour object and cached.

Contours are immutable and an edit keeps every untouched contour as the same object, so a
cache keyed by object identity rebuilds only what an edit changed (a drag rebuilds one contour
per mouse move, not the document).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from PySide6.QtCore import QPointF, Qt
from PySide6.QtGui import QPainterPath

from outlinebench.model.document import Contour, Outline

__all__ = [
    "SMOOTH_DISPLAY_DEG",
    "JoinMark",
    "ContourGraphics",
    "GraphicsCache",
    "end_directions",
    "contour_path",
]

# A join without a stated intent is drawn as smooth when its tangents differ by less than this
# many degrees (display only; the checks use their own documented tolerances).
SMOOTH_DISPLAY_DEG = 0.5

_EPS = 1e-12


def end_directions(seg: NDArray[np.float64]) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Unit travel directions at the start and at the end of a segment.

    Notes
    -----
    B′(0) is parallel to P1 − P0; when handles coincide with their on-curve point the tangent
    is along the first distinct control point (Farin, *Curves and Surfaces for CAGD*, §5.3:
    the first non-vanishing derivative at an end is a multiple of P_k − P_0). A segment whose
    control points all coincide has no direction; zeros are returned.
    """
    p0 = seg[0]
    start = np.zeros(2)
    for q in seg[1:]:
        d = q - p0
        n = float(np.hypot(d[0], d[1]))
        if n > _EPS:
            start = d / n
            break
    p1 = seg[-1]
    end = np.zeros(2)
    for q in seg[-2::-1]:
        d = p1 - q
        n = float(np.hypot(d[0], d[1]))
        if n > _EPS:
            end = d / n
            break
    return start, end


def contour_path(contour: Contour) -> QPainterPath:
    """The contour as a QPainterPath in document coordinates (lines, quads and cubics)."""
    path = QPainterPath()
    segs = contour.segments
    if not segs:
        return path
    x, y = segs[0][0]
    path.moveTo(float(x), float(y))
    for s in segs:
        k = s.shape[0]
        if k == 4:
            path.cubicTo(s[1, 0], s[1, 1], s[2, 0], s[2, 1], s[3, 0], s[3, 1])
        elif k == 3:
            path.quadTo(s[1, 0], s[1, 1], s[2, 0], s[2, 1])
        else:
            path.lineTo(s[1, 0], s[1, 1])
    if contour.closed:
        path.closeSubpath()
    return path


@dataclass(frozen=True, slots=True)
class JoinMark:
    """How one on-curve point is drawn.

    Attributes
    ----------
    kind : str
        "smooth", "corner", "start" or "end" (the free ends of an open contour).
    stated : bool
        True when the file or an edit stated the intent; False when it is inferred from the
        angle between the tangents (drawn hollow).
    direction : tuple of float
        Unit vector the mark is oriented along: the tangent for smooth joins and ends, the
        direction the corner points to for corners.
    """

    kind: str
    stated: bool
    direction: tuple[float, float]


@dataclass(eq=False, slots=True)
class ContourGraphics:
    """Cached drawing data of one contour.

    Attributes
    ----------
    path : QPainterPath
    bounds : tuple (xmin, ymin, xmax, ymax)
        Bounding box of all control points (contains the curve: convex hull property).
    on_curve : ndarray, shape (N, 2)
        On-curve points: start of each segment, plus the last end of an open contour.
    marks : list of JoinMark, length N
    handle_lines : ndarray, shape (H, 2, 2)
        (on-curve point, handle) pairs.
    handle_kind : list of str, length H
        The kind of the join each handle line belongs to (for its colour).
    handle_ref : list of (segment, index), length H
        The control point each handle line ends at.
    """

    path: QPainterPath
    bounds: tuple[float, float, float, float]
    on_curve: NDArray[np.float64]
    marks: list[JoinMark]
    handle_lines: NDArray[np.float64]
    handle_kind: list[str]
    handle_ref: list[tuple[int, int]]


def _mark_for(
    incoming: NDArray[np.float64], outgoing: NDArray[np.float64], intent: str | None
) -> JoinMark:
    cos = float(np.clip(incoming @ outgoing, -1.0, 1.0))
    angle = float(np.degrees(np.arccos(cos)))
    kind = intent if intent is not None else ("smooth" if angle < SMOOTH_DISPLAY_DEG else "corner")
    if kind == "smooth":
        d = incoming + outgoing
    else:
        d = incoming - outgoing
        if float(np.hypot(*d)) < 1e-6:  # a corner stated on a straight-through join
            d = np.array([-incoming[1], incoming[0]])
    n = float(np.hypot(d[0], d[1]))
    direction = (float(d[0] / n), float(d[1] / n)) if n > _EPS else (1.0, 0.0)
    return JoinMark(kind, intent is not None, direction)


def build_graphics(contour: Contour) -> ContourGraphics:
    """Compute the drawing data of ``contour``."""
    segs = contour.segments
    n = len(segs)
    allpts = np.concatenate(segs) if n else np.zeros((0, 2))
    if n:
        lo = allpts.min(axis=0)
        hi = allpts.max(axis=0)
        bounds = (float(lo[0]), float(lo[1]), float(hi[0]), float(hi[1]))
    else:
        bounds = (0.0, 0.0, 0.0, 0.0)
    dirs = [end_directions(s) for s in segs]
    on_curve = contour.on_curve_points()
    marks: list[JoinMark] = []
    point_kind: list[str] = []
    for k in range(len(on_curve)):
        if not contour.closed and k == 0:
            d = dirs[0][0]
            mark = JoinMark("start", True, (float(d[0]), float(d[1])))
        elif not contour.closed and k == n:
            d = dirs[-1][1]
            mark = JoinMark("end", True, (float(d[0]), float(d[1])))
        else:
            j = (k - 1) % n  # join j is where segment j ends and segment j + 1 begins
            mark = _mark_for(dirs[j][1], dirs[(j + 1) % n][0], contour.joins[j])
        marks.append(mark)
        point_kind.append(mark.kind)
    lines = []
    kinds = []
    refs = []
    count = len(on_curve)
    for i, s in enumerate(segs):
        k = s.shape[0]
        if k == 2:
            continue
        start_kind = point_kind[i]
        end_kind = point_kind[(i + 1) % count] if count else "corner"
        lines.append((s[0], s[1]))
        kinds.append(start_kind)
        refs.append((i, 1))
        lines.append((s[-1], s[-2]))
        kinds.append(end_kind)
        refs.append((i, k - 2))
    handle_lines = np.array(lines, dtype=np.float64).reshape(-1, 2, 2)
    return ContourGraphics(
        contour_path(contour), bounds, on_curve, marks, handle_lines, kinds, refs
    )


class GraphicsCache:
    """Drawing data per contour object, rebuilt only for contours an edit replaced."""

    def __init__(self) -> None:
        self._items: dict[int, tuple[Contour, ContourGraphics]] = {}
        self._fills: dict[int, tuple[Outline, QPainterPath | None]] = {}

    def get(self, contour: Contour) -> ContourGraphics:
        key = id(contour)
        hit = self._items.get(key)
        if hit is not None and hit[0] is contour:
            return hit[1]
        g = build_graphics(contour)
        self._items[key] = (contour, g)
        return g

    def fill_path(self, outline: Outline) -> QPainterPath | None:
        """Closed contours of one outline as one even-odd path (None when none is closed)."""
        key = id(outline)
        hit = self._fills.get(key)
        if hit is not None and hit[0] is outline:
            return hit[1]
        path: QPainterPath | None = None
        for c in outline.contours:
            if c.closed and c.segments:
                if path is None:
                    path = QPainterPath()
                    path.setFillRule(Qt.FillRule.OddEvenFill)
                path.addPath(self.get(c).path)
        self._fills[key] = (outline, path)
        return path

    def prune(self, live: set[int]) -> None:
        """Forget contours whose ids are not in ``live`` (call after the document changed)."""
        for key in [k for k in self._items if k not in live]:
            del self._items[key]
        self._fills.clear()


def qpoint(p: NDArray[np.float64]) -> QPointF:
    return QPointF(float(p[0]), float(p[1]))
