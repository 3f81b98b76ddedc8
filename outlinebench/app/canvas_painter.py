"""Painting a document on the canvas: page, grid, outlines, handles, join marks, selection.

Outlines are drawn as one cached QPainterPath per contour under the view transform with a
cosmetic pen (constant width in pixels), skipping contours outside the visible rectangle.
Marks and handles are drawn in screen coordinates so they keep their size at every zoom.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable

import numpy as np
from PySide6.QtCore import QLineF, QPointF, QRectF, Qt
from PySide6.QtGui import QBrush, QPainter, QPainterPath, QPen, QPolygonF, QTransform

from outlinebench.app import style
from outlinebench.app.contour_graphics import (
    MARK_KINDS,
    ContourGraphics,
    GraphicsCache,
    JoinMark,
)
from outlinebench.app.sprites import stamp
from outlinebench.app.view_transform import ViewTransform
from outlinebench.model.document import Document
from outlinebench.model.point_names import PointRef

__all__ = [
    "page_rect",
    "paint_document",
    "paint_background",
    "paint_outlines",
    "paint_selection",
    "count_points_in_view",
    "visible_contours",
    "PaintStats",
    "document_bounds",
    "mark_path",
    "mark_scale",
]


class PaintStats:
    """What the last paint did (for the status bar and the benchmark)."""

    def __init__(self) -> None:
        self.contours_drawn = 0
        self.points_in_view = 0
        self.marks_drawn = False


def page_rect(doc: Document) -> tuple[float, float, float, float] | None:
    """The page in document coordinates ``(xmin, ymin, xmax, ymax)``, or None if unknown."""
    if doc.view_box is not None:
        x, y, w, h = doc.view_box
        return (x, y, x + w, y + h)
    if doc.width_mm and doc.height_mm:
        return (0.0, 0.0, doc.width_mm / doc.mm_per_unit, doc.height_mm / doc.mm_per_unit)
    return None


def document_bounds(
    doc: Document, cache: GraphicsCache
) -> tuple[float, float, float, float] | None:
    """Bounding box of every contour's control points, or None for an empty document."""
    boxes = [cache.get(c).bounds for o in doc.outlines for c in o.contours if c.segments]
    if not boxes:
        return None
    arr = np.array(boxes)
    return (
        float(arr[:, 0].min()),
        float(arr[:, 1].min()),
        float(arr[:, 2].max()),
        float(arr[:, 3].max()),
    )


def _grid_step_mm(px_per_mm: float) -> float:
    # Minor grid lines at least 10 px apart: 1, 5, 10, 50, 100 … mm.
    step = 1.0
    while step * px_per_mm < 10.0:
        step *= 5.0 if str(step).startswith("1") else 2.0
    return step


def paint_grid(
    p: QPainter,
    view: ViewTransform,
    doc: Document,
    visible: tuple[float, float, float, float],
    dpr: float,
) -> None:
    """Millimetre grid inside the page (every 5th line darker), snapped to device pixels."""
    page = page_rect(doc)
    if page is None:
        return
    px_per_mm = view.scale / doc.mm_per_unit
    step_mm = _grid_step_mm(px_per_mm)
    step = step_mm / doc.mm_per_unit
    x0, y0 = max(page[0], visible[0]), max(page[1], visible[1])
    x1, y1 = min(page[2], visible[2]), min(page[3], visible[3])
    if x1 <= x0 or y1 <= y0:
        return
    minor: list[QLineF] = []
    major: list[QLineF] = []

    def snap(v: float) -> float:  # centre 1-device-pixel lines on device pixels
        return (math.floor(v * dpr) + 0.5) / dpr

    sy0, sy1 = view.to_screen(0, y0)[1], view.to_screen(0, y1)[1]
    sx0, sx1 = view.to_screen(x0, 0)[0], view.to_screen(x1, 0)[0]
    i0 = math.ceil((x0 - page[0]) / step)
    i1 = math.floor((x1 - page[0]) / step)
    for i in range(i0, i1 + 1):
        sx = snap(view.to_screen(page[0] + i * step, 0)[0])
        (major if i % 5 == 0 else minor).append(QLineF(sx, sy0, sx, sy1))
    j0 = math.ceil((y0 - page[1]) / step)
    j1 = math.floor((y1 - page[1]) / step)
    for j in range(j0, j1 + 1):
        sy = snap(view.to_screen(0, page[1] + j * step)[1])
        (major if j % 5 == 0 else minor).append(QLineF(sx0, sy, sx1, sy))
    pen = QPen(style.GRID_MINOR, 0)
    p.setPen(pen)
    p.drawLines(minor)
    pen.setColor(style.GRID_MAJOR)
    p.setPen(pen)
    p.drawLines(major)


def _intersects(a: tuple[float, float, float, float], b: tuple[float, float, float, float]):
    return a[0] <= b[2] and b[0] <= a[2] and a[1] <= b[3] and b[1] <= a[3]


def mark_path(
    path: QPainterPath, x: float, y: float, mark: JoinMark, size: float = style.MARK_SIZE
) -> None:
    """Add the outline of one join mark of half-length ``size`` at screen point (x, y)."""
    s = size
    dx, dy = mark.direction
    nx, ny = -dy, dx
    if mark.kind == "smooth":
        # capsule along the tangent: two half circles joined by straight sides
        r = s * 0.55
        L = s * 0.9
        t = QTransform()
        t.translate(x, y)
        t.rotateRadians(math.atan2(dy, dx))
        cap = QPainterPath()
        cap.addRoundedRect(QRectF(-L - r, -r, 2 * (L + r), 2 * r), r, r)
        path.addPath(t.map(cap))
    elif mark.kind == "corner":
        # triangle whose apex points where the corner points
        tip = QPointF(x + dx * s * 1.5, y + dy * s * 1.5)
        b1 = QPointF(x - dx * s * 0.9 + nx * s * 1.1, y - dy * s * 0.9 + ny * s * 1.1)
        b2 = QPointF(x - dx * s * 0.9 - nx * s * 1.1, y - dy * s * 0.9 - ny * s * 1.1)
        path.addPolygon(QPolygonF([tip, b1, b2, tip]))
        path.closeSubpath()
    elif mark.kind == "start":
        # bar across the tangent, set just before the point
        w = s * 0.45
        a = QPointF(x + nx * s * 1.3 - dx * w, y + ny * s * 1.3 - dy * w)
        b = QPointF(x - nx * s * 1.3 - dx * w, y - ny * s * 1.3 - dy * w)
        c = QPointF(x - nx * s * 1.3 + dx * w, y - ny * s * 1.3 + dy * w)
        d = QPointF(x + nx * s * 1.3 + dx * w, y + ny * s * 1.3 + dy * w)
        path.addPolygon(QPolygonF([a, b, c, d, a]))
        path.closeSubpath()
    else:  # "end": arrowhead in travel direction
        tip = QPointF(x + dx * s * 1.2, y + dy * s * 1.2)
        b1 = QPointF(x - dx * s * 0.8 + nx * s, y - dy * s * 0.8 + ny * s)
        b2 = QPointF(x - dx * s * 0.8 - nx * s, y - dy * s * 0.8 - ny * s)
        notch = QPointF(x - dx * s * 0.2, y - dy * s * 0.2)
        path.addPolygon(QPolygonF([tip, b1, notch, b2, tip]))
        path.closeSubpath()


def paint_document(
    p: QPainter,
    view: ViewTransform,
    doc: Document,
    cache: GraphicsCache,
    width: float,
    height: float,
    dpr: float,
    selected: set[PointRef],
    hover: PointRef | None = None,
    stats: PaintStats | None = None,
) -> PaintStats:
    """Paint ``doc`` into a ``width × height`` logical-pixel area.

    Parameters
    ----------
    selected : set of (outline, contour, segment, index)
        Control points drawn as selected (canonical names, see
        :func:`outlinebench.model.commands.canonical_ref`).
    hover : (outline, contour, segment, index) or None
        The point under the pointer.
    """
    stats = stats or PaintStats()
    paint_background(p, view, doc, width, height, dpr)
    paint_outlines(p, view, doc, cache, width, height, stats=stats)
    paint_selection(p, view, doc, selected, hover)
    return stats


def paint_background(
    p: QPainter, view: ViewTransform, doc: Document, width: float, height: float, dpr: float
) -> None:
    """Desk, page with its shadow and edge, and the millimetre grid."""
    p.fillRect(QRectF(0, 0, width, height), style.DESK)
    page = page_rect(doc)
    if page is not None:
        sx0, sy0 = view.to_screen(page[0], page[1])
        sx1, sy1 = view.to_screen(page[2], page[3])
        p.fillRect(QRectF(sx0 + 3, sy0 + 3, sx1 - sx0, sy1 - sy0), style.PAGE_SHADOW)
        p.fillRect(QRectF(sx0, sy0, sx1 - sx0, sy1 - sy0), style.PAPER)
    visible = view.doc_rect(width, height)
    paint_grid(p, view, doc, visible, dpr)
    if page is not None:
        p.setPen(QPen(style.PAGE_EDGE, 0))
        p.setBrush(Qt.BrushStyle.NoBrush)
        p.drawRect(QRectF(sx0, sy0, sx1 - sx0, sy1 - sy0))


def count_points_in_view(
    view: ViewTransform, doc: Document, cache: GraphicsCache, width: float, height: float
) -> int:
    """On-curve points inside the view (decides whether marks are drawn)."""
    return sum(int(v[4].sum()) for v in _visible(view, doc, cache, width, height, None))


def _visible(
    view: ViewTransform,
    doc: Document,
    cache: GraphicsCache,
    width: float,
    height: float,
    outlines: set[int] | None,
    margin_px: float = style.MARK_SIZE * 2,
) -> list[tuple[int, int, ContourGraphics, np.ndarray, np.ndarray]]:
    visible = view.doc_rect(width, height)
    margin = margin_px / view.scale
    vis = (visible[0] - margin, visible[1] - margin, visible[2] + margin, visible[3] + margin)
    out = []
    for oi, outline in enumerate(doc.outlines):
        if outlines is not None and oi not in outlines:
            continue
        for ci, contour in enumerate(outline.contours):
            if not contour.segments:
                continue
            g = cache.get(contour)
            # Bounding boxes of control points contain the curves (convex hull property).
            if not _intersects(g.bounds, vis):
                continue
            scr = view.to_screen_array(g.on_curve)
            inside = (
                (scr[:, 0] >= -20)
                & (scr[:, 0] <= width + 20)
                & (scr[:, 1] >= -20)
                & (scr[:, 1] <= height + 20)
            )
            out.append((oi, ci, g, scr, inside))
    return out


def visible_contours(
    view: ViewTransform,
    doc: Document,
    cache: GraphicsCache,
    width: float,
    height: float,
    outlines: set[int] | None = None,
    margin_px: float = style.MARK_SIZE * 2,
) -> list[tuple[int, int, ContourGraphics, np.ndarray, np.ndarray]]:
    """Contours whose control-point box, grown by ``margin_px`` logical px, meets the view:
    ``(outline, contour, graphics, on-curve points on screen, which of them are inside)``."""
    return _visible(view, doc, cache, width, height, outlines, margin_px)


def paint_outlines(
    p: QPainter,
    view: ViewTransform,
    doc: Document,
    cache: GraphicsCache,
    width: float,
    height: float,
    *,
    outlines: set[int] | None = None,
    marks: bool | None = None,
    stats: PaintStats | None = None,
    clip: QRectF | None = None,
) -> PaintStats:
    """Fill, stroke and mark the visible contours of the given outlines (default: all).

    ``marks`` forces marks on or off; by default they are drawn when at most
    :data:`style.MAX_MARKED_POINTS` on-curve points of these outlines are in view. ``clip``
    (logical px) is the part of the canvas being repainted: marks and handles entirely
    outside it are not drawn.
    """
    stats = stats or PaintStats()
    shown = _visible(view, doc, cache, width, height, outlines)
    stats.contours_drawn = len(shown)
    # Fill closed contours per outline (even-odd, so counters stay open), then stroke. The
    # fill is drawn without antialiasing: its edge lies under the antialiased stroke, and
    # aliased filling is several times faster (benchmarks/bench_editor.py).
    p.save()
    p.setTransform(QTransform(view.scale, 0, 0, view.scale, view.offset_x, view.offset_y), False)
    p.setRenderHint(QPainter.RenderHint.Antialiasing, False)
    p.setPen(Qt.PenStyle.NoPen)
    p.setBrush(QBrush(style.OUTLINE_FILL))
    for oi in sorted({v[0] for v in shown}):
        fill = cache.fill_path(doc.outlines[oi])
        if fill is not None:
            p.drawPath(fill)
    p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    # A cosmetic 1-px pen (a hairline: one device pixel on any screen): Qt's raster engine
    # strokes it on a fast path (a 1.3-px pen is about ten times slower on 10,000 segments).
    pen = QPen(style.OUTLINE, 1.0)
    pen.setCosmetic(True)
    p.setPen(pen)
    p.setBrush(Qt.BrushStyle.NoBrush)
    for v in shown:
        p.drawPath(v[2].path)
    p.restore()
    stats.points_in_view = sum(int(v[4].sum()) for v in shown)
    stats.marks_drawn = stats.points_in_view <= style.MAX_MARKED_POINTS if marks is None else marks
    if stats.marks_drawn:
        _paint_marks(p, view, shown, width, height, clip)
    return stats


# Mark directions are drawn at the nearest of this many angles (a 10-px mark turned by at
# most half a step, 2.8°, moves its tip by under 0.3 px): each (kind, angle) is painted once
# into a small pixmap and then copied, ten times faster than painting each shape
# (benchmarks/bench_editor.py, "zoomed 4×").
SPRITE_ANGLES = 64


def _mark_look(
    spec: tuple, scale: float = 1.0
) -> tuple[tuple, Callable[[QPainter, float, float], None], int]:
    """Sprite key, painting function and reach (see :func:`sprites.stamp`) of
    ``("handle", colour)`` or ``("mark", kind, stated, angle index, colour)``, drawn at
    ``scale`` times the full mark size."""
    colour = spec[-1]
    size = style.MARK_SIZE * scale
    radius = style.HANDLE_RADIUS * max(scale, 0.75)
    key = (*spec[:-1], colour.rgba(), style.PAPER.rgba(), size, radius)
    if spec[0] == "handle":

        def draw_handle(sp: QPainter, x: float, y: float) -> None:
            sp.setPen(QPen(colour, 1.4))
            sp.setBrush(style.PAPER)
            sp.drawEllipse(QPointF(x, y), radius, radius)

        return key, draw_handle, math.ceil(radius + 0.7 + 1.5)
    _, kind, stated, a, _ = spec

    def draw_mark(sp: QPainter, x: float, y: float) -> None:
        ang = a * 2 * math.pi / SPRITE_ANGLES
        path = QPainterPath()
        mark_path(path, x, y, JoinMark(kind, stated, (math.cos(ang), math.sin(ang))), size)
        if stated:
            sp.setPen(QPen(colour.darker(130), 1.0))
            sp.setBrush(colour)
        else:
            sp.setPen(QPen(colour, 1.6))
            sp.setBrush(style.PAPER)
        sp.drawPath(path)

    # A join mark reaches at most 1.45 · MARK_SIZE from its point (see mark_path), plus its
    # pen and a pixel for the antialiased edge.
    return key, draw_mark, math.ceil(size * 1.45 + 0.8 + 1.5)


def _stamp(p: QPainter, spec: tuple, xy: np.ndarray, scale: float = 1.0) -> None:
    if len(xy):
        key, draw, half = _mark_look(spec, scale)
        stamp(p, key, draw, half, xy)


def _spacing(g: ContourGraphics) -> float:
    """Median distance between neighbouring on-curve points of a contour, document units
    (cached on the graphics object, which lives as long as its contour)."""
    if g.mark_spacing >= 0.0:
        return g.mark_spacing
    pts = g.on_curve
    if len(pts) < 2:
        value = math.inf
    else:
        d = np.hypot(*np.diff(pts, axis=0).T)
        d = d[d > 0]
        value = float(np.median(d)) if len(d) else 0.0
    g.mark_spacing = value
    return value


def _level(px: float, hide: float, full: float) -> float:
    if px < hide:
        return 0.0
    ratio = px / full
    for level in style.MARK_SCALES:
        if ratio >= level:
            return level
    return style.MARK_SCALES[-1]


def mark_scale(g: ContourGraphics, view_scale: float) -> float:
    """How large one contour's point marks are drawn at this zoom: 0 (left out), or one of
    :data:`style.MARK_SCALES` (1 = full size).

    Two measures on screen decide, the smaller level winning: the median distance between
    the contour's neighbouring on-curve points (:data:`style.MARK_FULL_SPACING_PX`, below
    :data:`style.MARK_HIDE_SPACING_PX` left out) and the larger side of its box
    (:data:`style.MARK_FULL_SIZE_PX`, below :data:`style.MARK_HIDE_SIZE_PX` left out). So at
    fit-to-view a line of lettering shows its outlines and findings, and the points appear
    as you zoom in.
    """
    x0, y0, x1, y1 = g.bounds
    size = max(x1 - x0, y1 - y0) * view_scale
    by_size = _level(size, style.MARK_HIDE_SIZE_PX, style.MARK_FULL_SIZE_PX)
    if by_size == 0.0:
        return 0.0
    spacing = _spacing(g) * view_scale
    return min(by_size, _level(spacing, style.MARK_HIDE_SPACING_PX, style.MARK_FULL_SPACING_PX))


def _paint_marks(
    p: QPainter,
    view: ViewTransform,
    in_view: Iterable[tuple[int, int, ContourGraphics, np.ndarray, np.ndarray]],
    width: float,
    height: float,
    clip: QRectF | None = None,
) -> None:
    # Contours are grouped by the size their marks are drawn at (mark_scale), then drawn as
    # arrays per kind and look in batches.
    groups: dict[float, list] = {}
    for item in in_view:
        level = mark_scale(item[2], view.scale)
        if level > 0:
            groups.setdefault(level, []).append(item)
    for level in sorted(groups):
        _paint_marks_at(p, view, groups[level], width, height, clip, level)


def _paint_marks_at(
    p: QPainter,
    view: ViewTransform,
    in_view: Iterable[tuple[int, int, ContourGraphics, np.ndarray, np.ndarray]],
    width: float,
    height: float,
    clip: QRectF | None,
    scale: float,
) -> None:
    # Gathered as arrays over the contours in view, then drawn per kind and look in batches.
    # Marks reach at most this far from their point, handle rings from their handle.
    reach = style.MARK_SIZE * 1.45 + 3.0
    if clip is None:
        x0, y0, x1, y1 = -20.0, -20.0, width + 20.0, height + 20.0
    else:
        x0, y0 = clip.left() - reach, clip.top() - reach
        x1, y1 = clip.right() + reach, clip.bottom() + reach
    hl_parts: list[np.ndarray] = []
    hcode_parts: list[np.ndarray] = []
    xy_parts: list[np.ndarray] = []
    code_parts: list[np.ndarray] = []
    angle_parts: list[np.ndarray] = []
    offset = np.array([view.offset_x, view.offset_y])
    for _oi, _ci, g, scr, inside in in_view:
        if len(g.handle_lines):
            hl = g.handle_lines * view.scale + offset
            # the handle line's box meets the region
            lo, hi = hl.min(axis=1), hl.max(axis=1)
            shown = (hi[:, 0] >= x0) & (lo[:, 0] <= x1) & (hi[:, 1] >= y0) & (lo[:, 1] <= y1)
            hl_parts.append(hl[shown])
            hcode_parts.append(g.handle_code[shown])
        if clip is not None:
            inside = inside & (scr[:, 0] >= x0) & (scr[:, 0] <= x1)
            inside &= (scr[:, 1] >= y0) & (scr[:, 1] <= y1)
        xy_parts.append(scr[inside])
        code_parts.append(g.mark_code[inside])
        angle_parts.append(g.mark_angle[inside])
    if not xy_parts:
        return
    hl = np.concatenate(hl_parts) if hl_parts else np.zeros((0, 2, 2))
    hcode = np.concatenate(hcode_parts) if hcode_parts else np.zeros(0, dtype=np.intp)
    xy = np.concatenate(xy_parts)
    code = np.concatenate(code_parts)
    step = 2 * math.pi / SPRITE_ANGLES
    angle = np.round(np.concatenate(angle_parts) / step).astype(np.intp) % SPRITE_ANGLES
    colours = [style.JOIN_COLOURS[k] for k in MARK_KINDS]
    for kind, colour in enumerate(colours):
        rows = hl[hcode == kind].tolist()
        if rows:
            p.setPen(QPen(colour, 1.0))
            p.drawLines([QLineF(ax, ay, bx, by) for (ax, ay), (bx, by) in rows])
    # Per kind: handles, then stated marks, then inferred (hollow) ones, each batch sorted
    # by direction.
    look = code * SPRITE_ANGLES + angle
    order = np.argsort(look, kind="stable")
    look_sorted = look[order]
    cuts = np.flatnonzero(np.diff(look_sorted)) + 1
    groups = np.split(order, cuts) if len(order) else []
    by_kind: dict[int, list[tuple[bool, int, np.ndarray]]] = {}
    for rows in groups:
        c, a = divmod(int(look[rows[0]]), SPRITE_ANGLES)
        kind, stated = divmod(c, 2)
        by_kind.setdefault(kind, []).append((bool(stated), a, rows))
    for kind, colour in enumerate(colours):
        handle_rows = hcode == kind
        if handle_rows.any():
            _stamp(p, ("handle", colour), hl[handle_rows, 1], scale)
        batches = sorted(by_kind.get(kind, []), key=lambda b: (not b[0], b[1]))
        for stated, a, rows in batches:
            _stamp(p, ("mark", MARK_KINDS[kind], stated, a, colour), xy[rows], scale)


def paint_selection(
    p: QPainter,
    view: ViewTransform,
    doc: Document,
    selected: set[PointRef],
    hover: PointRef | None,
) -> None:
    """Ring the selected points and the point under the pointer (screen-space marks)."""
    ring = QPainterPath()
    for oi, ci, si, k in selected:
        try:
            pt = doc.outlines[oi].contours[ci].segments[si][k]
        except IndexError:
            continue
        x, y = view.to_screen(float(pt[0]), float(pt[1]))
        ring.addEllipse(QPointF(x, y), style.MARK_SIZE + 3.5, style.MARK_SIZE + 3.5)
    if not ring.isEmpty():
        p.setPen(QPen(style.SELECTED, 2.4))
        p.setBrush(Qt.BrushStyle.NoBrush)
        p.drawPath(ring)
    if hover is not None:
        oi, ci, si, k = hover
        try:
            pt = doc.outlines[oi].contours[ci].segments[si][k]
        except IndexError:
            return
        x, y = view.to_screen(float(pt[0]), float(pt[1]))
        p.setPen(QPen(style.HOVER, 1.2))
        p.setBrush(Qt.BrushStyle.NoBrush)
        p.drawEllipse(QPointF(x, y), style.MARK_SIZE + 6, style.MARK_SIZE + 6)
