"""Painting the cutting previews on the canvas: flattened chords and the tool's offset outline.

Flattening preview: every chord in blue over the outline, its vertices as small ticks when
they are far enough apart to tell, and the place of the largest deviation ringed with its
value. Offset preview: the offset outline in green (the tool centre's path), the tool drawn as
a dashed circle of its true radius at each place it cannot fit, and a crimson cross with the
word "vanishes" where material is lost. Fix preview: the contours a fix replaces ghosted, the
ones it makes in violet, with the measured change beside the finding.
"""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QFont, QPainter, QPainterPath, QPen, QPolygonF, QTransform

from outlinebench.app.cut_preview import FlattenPreview, OffsetPreview
from outlinebench.app.view_transform import ViewTransform

__all__ = [
    "paint_flatten_preview",
    "paint_offset_preview",
    "paint_fix_preview",
    "FIXED",
    "GHOST",
    "CHORD",
    "OFFSET",
    "VANISH",
    "TOOL",
    "VERTEX_MIN_GAP_PX",
]

CHORD = QColor("#1f5fbf")  # chords of the flattening preview
OFFSET = QColor("#2b8a3e")  # the offset outline
TOOL = QColor(43, 138, 62, 150)  # the tool circle where it does not fit
VANISH = QColor("#c3122f")  # material lost: same crimson as error findings
FIXED = QColor("#6a2c9c")  # the outline a fix makes: violet, unlike every other mark
GHOST = QColor("#4a525a")  # the outline a fix replaces, dashed
GHOST_WASH = QColor(251, 250, 246, 200)  # fades the replaced outline drawn beneath
# Chord vertices are ticked only when neighbouring ticks are at least this far apart on
# screen (logical px) on average; closer, they would merge into a thick line.
VERTEX_MIN_GAP_PX = 6.0


def _screen(view: ViewTransform, pts: np.ndarray) -> np.ndarray:
    return view.to_screen_array(np.asarray(pts, dtype=float))


def _polyline_path(view: ViewTransform, polys, closed) -> QPainterPath:
    path = QPainterPath()
    for p, c in zip(polys, closed, strict=True):
        if len(p) < 2:
            continue
        s = _screen(view, p)
        poly = QPolygonF([QPointF(float(x), float(y)) for x, y in s])
        if c:
            poly.append(poly[0])
        path.addPolygon(poly)
    return path


def _label(p: QPainter, at: QPointF, text: str, colour: QColor) -> None:
    font = QFont(p.font())
    font.setPointSizeF(max(font.pointSizeF(), 8.0))
    p.setFont(font)
    metrics = p.fontMetrics()
    w = metrics.horizontalAdvance(text) + 8
    h = metrics.height() + 2
    box = QRectF(at.x() + 10, at.y() - h - 6, w, h)
    p.setPen(QPen(colour, 1.0))
    p.setBrush(QColor(251, 250, 246, 230))
    p.drawRoundedRect(box, 3, 3)
    p.drawText(box, int(Qt.AlignmentFlag.AlignCenter), text)


def paint_flatten_preview(
    p: QPainter, view: ViewTransform, fp: FlattenPreview, value_text: str | None = None
) -> None:
    """Chords, vertex ticks and the largest-deviation place of ``fp``; ``value_text`` labels
    that place (e.g. "max 0.049 mm")."""
    p.save()
    p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    pen = QPen(CHORD, 1.2)
    pen.setCosmetic(True)
    p.setPen(pen)
    p.setBrush(Qt.BrushStyle.NoBrush)
    p.drawPath(_polyline_path(view, fp.polylines, fp.closed))
    ticks: list[QPointF] = []
    for poly in fp.polylines:
        if len(poly) < 2:
            continue
        s = _screen(view, poly)
        gaps = np.hypot(*np.diff(s, axis=0).T)
        if gaps.size and float(np.mean(gaps)) >= VERTEX_MIN_GAP_PX:
            ticks.extend(QPointF(float(x), float(y)) for x, y in s)
    if ticks:
        p.setPen(QPen(CHORD, 1.0))
        p.setBrush(QColor(251, 250, 246))
        for t in ticks:
            p.drawEllipse(t, 1.8, 1.8)
    if fp.where is not None:
        c = QPointF(*view.to_screen(*fp.where))
        p.setPen(QPen(CHORD, 2.0))
        p.setBrush(Qt.BrushStyle.NoBrush)
        p.drawEllipse(c, 9.0, 9.0)
        p.drawEllipse(c, 13.0, 13.0)
        if value_text:
            _label(p, c, value_text, CHORD)
    p.restore()


def paint_offset_preview(
    p: QPainter, view: ViewTransform, op: OffsetPreview, label_vanished: bool = True
) -> None:
    """The offset outline of ``op``, the tool circle where it does not fit, and crosses where
    material vanishes."""
    p.save()
    p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    pen = QPen(OFFSET, 1.6)
    pen.setCosmetic(True)
    p.setPen(pen)
    p.setBrush(Qt.BrushStyle.NoBrush)
    p.drawPath(_polyline_path(view, op.polylines, op.closed))
    r_px = abs(op.distance) * view.scale
    tool_pen = QPen(TOOL, 1.0, Qt.PenStyle.DashLine)
    for place in op.places:
        c = QPointF(*view.to_screen(place.x, place.y))
        if place.kind == "tool-does-not-fit":
            p.setPen(tool_pen)
            p.setBrush(Qt.BrushStyle.NoBrush)
            if r_px >= 3.0:
                p.drawEllipse(c, r_px, r_px)
            p.setPen(QPen(OFFSET, 1.4))
            p.drawEllipse(c, 2.5, 2.5)
    for place in op.vanished:
        c = QPointF(*view.to_screen(place.x, place.y))
        p.setPen(QPen(VANISH, 2.6))
        d = 7.0
        p.drawLine(c + QPointF(-d, -d), c + QPointF(d, d))
        p.drawLine(c + QPointF(-d, d), c + QPointF(d, -d))
        if label_vanished:
            _label(p, c, "vanishes", VANISH)
    p.restore()


def paint_fix_preview(p: QPainter, view: ViewTransform, fix, label: str | None = None) -> None:
    """A fix being previewed (:class:`outlinebench.app.fix_preview.FixPreview`): the contours
    it replaces ghosted (faded under a paper-coloured wash, then dashed grey over everything),
    the contours it makes drawn solid in violet, and ``label`` (the measured change) beside the
    finding."""
    from outlinebench.app.contour_graphics import contour_path  # the outline's own paths

    p.save()
    p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    old = QPainterPath()
    for c in fix.old_contours:
        old.addPath(contour_path(c))
    new = QPainterPath()
    for c in fix.new_contours:
        new.addPath(contour_path(c))
    p.setTransform(
        p.transform() * QTransform(view.scale, 0, 0, view.scale, view.offset_x, view.offset_y)
    )
    p.setBrush(Qt.BrushStyle.NoBrush)
    wash = QPen(GHOST_WASH, 5.0)
    wash.setCosmetic(True)
    p.setPen(wash)
    p.drawPath(old)
    pen = QPen(FIXED, 2.0)
    pen.setCosmetic(True)
    p.setPen(pen)
    p.drawPath(new)
    # the old outline dashed on top: where the two coincide the dashes lie on the violet
    ghost = QPen(GHOST, 1.2, Qt.PenStyle.DashLine)
    ghost.setCosmetic(True)
    p.setPen(ghost)
    p.drawPath(old)
    p.restore()
    if label:
        p.save()
        p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        # clear of the finding's frame (about 14 px across at most) drawn over it
        at = QPointF(*view.to_screen(fix.finding.x, fix.finding.y)) + QPointF(12.0, -8.0)
        _label(p, at, label, FIXED)
        p.restore()
