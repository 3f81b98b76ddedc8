"""What the canvas needs to draw one contour, computed once per contour object and cached.

Contours are immutable and an edit keeps every untouched contour as the same object, so a
cache keyed by object identity rebuilds only what an edit changed (a drag rebuilds one contour
per mouse move, not the document).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray
from PySide6.QtCore import Qt
from PySide6.QtGui import QPainterPath

from outlinebench.model.commands import SMOOTH_ANGLE_TOLERANCE_DEG
from outlinebench.model.document import Contour, Outline

__all__ = [
    "SMOOTH_DISPLAY_DEG",
    "MARK_KINDS",
    "JoinMark",
    "ContourGraphics",
    "GraphicsCache",
    "end_directions",
    "contour_path",
]

# A join without a stated intent is drawn as smooth when its tangents differ by less than this
# many degrees: the model's own threshold, so the mark shows what a handle drag will do (turn
# the opposite handle with it, or not). The checks use their own documented tolerances.
SMOOTH_DISPLAY_DEG = SMOOTH_ANGLE_TOLERANCE_DEG

_EPS = 1e-12

# The kinds of join marks, in the order they are drawn (later ones on top).
MARK_KINDS = ("smooth", "corner", "start", "end")


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
    mark_code : ndarray of int, shape (N,)
        ``MARK_KINDS.index(kind) * 2 + stated`` of each mark (for drawing marks in batches).
    mark_angle : ndarray, shape (N,)
        Direction of each mark, radians (``atan2`` of its direction vector).
    handle_code : ndarray of int, shape (H,)
        ``MARK_KINDS.index`` of each handle line's kind.
    """

    path: QPainterPath
    bounds: tuple[float, float, float, float]
    on_curve: NDArray[np.float64]
    marks: list[JoinMark]
    handle_lines: NDArray[np.float64]
    handle_kind: list[str]
    mark_code: NDArray[np.intp] = field(default_factory=lambda: np.zeros(0, dtype=np.intp))
    mark_angle: NDArray[np.float64] = field(default_factory=lambda: np.zeros(0))
    handle_code: NDArray[np.intp] = field(default_factory=lambda: np.zeros(0, dtype=np.intp))
    # median distance of neighbouring on-curve points (canvas_painter.mark_scale); -1: not yet
    mark_spacing: float = -1.0

    def __post_init__(self) -> None:
        if len(self.mark_code) != len(self.marks):
            kind_ix = {k: i for i, k in enumerate(MARK_KINDS)}
            self.mark_code = np.array(
                [kind_ix[m.kind] * 2 + int(m.stated) for m in self.marks], dtype=np.intp
            )
            self.mark_angle = np.array(
                [math.atan2(m.direction[1], m.direction[0]) for m in self.marks], dtype=float
            )
        if len(self.handle_code) != len(self.handle_kind):
            self.handle_code = np.array(
                [MARK_KINDS.index(k) for k in self.handle_kind], dtype=np.intp
            )


def _directions(
    segs: tuple[NDArray[np.float64], ...],
) -> tuple[NDArray, NDArray, NDArray, NDArray]:
    """Unit start and end travel directions of every segment, ``(n, 2)`` each (as
    :func:`end_directions`, vectorised over the contour), and the control points padded to
    four per segment forwards and backwards, ``(n, 4, 2)`` each."""
    n = len(segs)
    if all(seg.shape[0] == 4 for seg in segs):  # all cubics: one copy, no padding
        fwd = np.stack(segs)
        bwd = fwd[:, ::-1]
    else:
        fwd = np.empty((n, 4, 2))
        bwd = np.empty((n, 4, 2))
        for i, seg in enumerate(segs):
            k = seg.shape[0]
            fwd[i, :k] = seg
            fwd[i, k:] = seg[-1]
            bwd[i, :k] = seg[::-1]
            bwd[i, k:] = seg[0]

    def first_distinct(d: NDArray[np.float64]) -> NDArray[np.float64]:
        norms = np.hypot(d[..., 0], d[..., 1])  # (n, 3)
        ok = norms > _EPS
        idx = np.argmax(ok, axis=1)
        rows = np.arange(n)
        pick = d[rows, idx]
        length = norms[rows, idx]
        good = ok[rows, idx]
        out = np.zeros((n, 2))
        out[good] = pick[good] / length[good, None]
        return out

    start = first_distinct(fwd[:, 1:] - fwd[:, :1])
    end = first_distinct(bwd[:, :1] - bwd[:, 1:])
    return start, end, fwd, bwd


def _join_arrays(
    incoming: NDArray[np.float64], outgoing: NDArray[np.float64], intents: list[str | None]
) -> tuple[NDArray[np.bool_], NDArray[np.bool_], NDArray[np.float64]]:
    """(smooth, stated, unit mark direction) of each join, as arrays."""
    cos = np.clip(np.einsum("ij,ij->i", incoming, outgoing), -1.0, 1.0)
    inferred_smooth = np.degrees(np.arccos(cos)) < SMOOTH_DISPLAY_DEG
    stated = np.array([i is not None for i in intents])
    smooth = np.where(stated, np.array([i == "smooth" for i in intents]), inferred_smooth)
    d = np.where(smooth[:, None], incoming + outgoing, incoming - outgoing)
    norm = np.hypot(d[:, 0], d[:, 1])
    straight = ~smooth & (norm < 1e-6)  # a corner stated on a straight-through join
    d[straight] = np.stack([-incoming[straight, 1], incoming[straight, 0]], axis=1)
    norm = np.hypot(d[:, 0], d[:, 1])
    ok = norm > _EPS
    d[ok] /= norm[ok, None]
    d[~ok] = (1.0, 0.0)
    return smooth, stated, d


def build_graphics(contour: Contour) -> ContourGraphics:
    """Compute the drawing data of ``contour``."""
    segs = contour.segments
    n = len(segs)
    if not n:
        empty = np.zeros((0, 2))
        return ContourGraphics(QPainterPath(), (0.0, 0.0, 0.0, 0.0), empty, [], empty, [])
    allpts = np.concatenate(segs)
    lo = allpts.min(axis=0)
    hi = allpts.max(axis=0)
    bounds = (float(lo[0]), float(lo[1]), float(hi[0]), float(hi[1]))
    start, end, fwd, bwd = _directions(segs)
    on_curve = contour.on_curve_points()
    intents = list(contour.joins)
    if contour.closed:
        # join j (segment j → j + 1) sits at on-curve point j + 1 (mod n)
        smooth, stated, d = _join_arrays(end, np.roll(start, -1, axis=0), intents)
        smooth, stated, d = np.roll(smooth, 1), np.roll(stated, 1), np.roll(d, 1, axis=0)
        code = np.where(smooth, 0, 2) + stated
    else:
        if n > 1:
            smooth, stated, d = _join_arrays(end[:-1], start[1:], intents)
        else:
            smooth, stated, d = np.zeros(0, bool), np.zeros(0, bool), np.zeros((0, 2))
        ends_code = [MARK_KINDS.index("start") * 2 + 1, MARK_KINDS.index("end") * 2 + 1]
        code = np.concatenate([[ends_code[0]], np.where(smooth, 0, 2) + stated, [ends_code[1]]])
        d = np.concatenate([start[:1], d, end[-1:]])
        stated = np.concatenate([[True], stated, [True]])
    code = code.astype(np.intp)
    point_kind = code // 2
    marks = [
        JoinMark(MARK_KINDS[k], bool(st), (x, y))
        for k, st, (x, y) in zip(point_kind.tolist(), stated.tolist(), d.tolist(), strict=True)
    ]
    count = len(on_curve)
    sizes = np.array([seg.shape[0] for seg in segs])
    curved = np.flatnonzero(sizes > 2)
    # (on-curve point, handle) pairs: P0–P1 at each curved segment's start, then P(k-1)–P(k-2)
    # at its end, interleaved in segment order.
    handle_lines = np.empty((2 * len(curved), 2, 2))
    handle_lines[0::2, 0] = fwd[curved, 0]
    handle_lines[0::2, 1] = fwd[curved, 1]
    handle_lines[1::2, 0] = bwd[curved, 0]
    handle_lines[1::2, 1] = bwd[curved, 1]
    handle_code = np.empty(2 * len(curved), dtype=np.intp)
    handle_code[0::2] = point_kind[curved]
    handle_code[1::2] = point_kind[(curved + 1) % count]
    kinds = [MARK_KINDS[k] for k in handle_code.tolist()]
    return ContourGraphics(
        contour_path(contour),
        bounds,
        on_curve,
        marks,
        handle_lines,
        kinds,
        code,
        np.arctan2(d[:, 1], d[:, 0]),
        handle_code,
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
