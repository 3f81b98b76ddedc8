"""The drawing canvas: paints the document and turns mouse and keys into model gestures.

Navigation (handled here): the wheel scrolls (Shift + wheel scrolls sideways), Ctrl + wheel
zooms about the pointer, the middle button or Space + left button drags the view. Editing
gestures are not decided here: mouse events become :class:`outlinebench.model.tools`
pointer events in document coordinates and the active tool decides what they mean.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from PySide6.QtCore import QPointF, QRectF, Qt, Signal
from PySide6.QtGui import (
    QKeyEvent,
    QMouseEvent,
    QPainter,
    QPainterPath,
    QPaintEvent,
    QPen,
    QPixmap,
    QResizeEvent,
    QWheelEvent,
)
from PySide6.QtWidgets import QSizePolicy, QWidget

from outlinebench.app import style
from outlinebench.app.canvas_painter import (
    PaintStats,
    count_points_in_view,
    document_bounds,
    page_rect,
    paint_background,
    paint_document,
    paint_outlines,
    paint_selection,
)
from outlinebench.app.contour_graphics import GraphicsCache
from outlinebench.app.view_transform import ViewTransform
from outlinebench.model.document import Document

if TYPE_CHECKING:  # the session imports nothing from here; this is for type checkers
    from outlinebench.app.session import EditorSession

__all__ = ["Canvas", "WHEEL_ZOOM_PER_NOTCH", "WHEEL_PAN_PX_PER_NOTCH"]

# Zoom factor per wheel notch (120 units of angleDelta, the Qt QWheelEvent convention).
WHEEL_ZOOM_PER_NOTCH = 1.2
# Scroll distance per wheel notch, logical px.
WHEEL_PAN_PX_PER_NOTCH = 60.0


class Canvas(QWidget):
    """Shows a document and forwards editing gestures to the active tool.

    Parameters
    ----------
    editor : EditorSession
        The session (history, selection and tools) the canvas shows and edits.
    """

    view_changed = Signal()
    pointer_moved = Signal(float, float)  # document coordinates

    def __init__(self, editor: EditorSession, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._editor = editor
        self.view = ViewTransform()
        self.cache = GraphicsCache()
        self.stats = PaintStats()
        self._panning = False
        self._space_down = False
        self._last_pan = QPointF()
        self._fitted_once = False
        self._last_doc: Document | None = None  # last document painted outside a gesture
        self._backdrop: tuple | None = None  # (key, pixmap, marks) while a gesture runs
        self.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
        self.setMouseTracking(True)
        self.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Expanding)
        self.setMinimumSize(200, 200)
        self.setAttribute(Qt.WidgetAttribute.WA_OpaquePaintEvent, True)
        editor.changed.connect(self._on_document_changed)
        editor.selection_changed.connect(self.update)

    # -- model → widget -----------------------------------------------------------------
    @property
    def document(self) -> Document:
        return self._editor.document

    def _on_document_changed(self) -> None:
        doc = self.document
        self.cache.prune({id(c) for o in doc.outlines for c in o.contours})
        self.update()

    # -- view ---------------------------------------------------------------------------
    def fit_to_outline(self) -> None:
        """Show every outline (or the page, when the document has none) with a margin."""
        bounds = document_bounds(self.document, self.cache) or page_rect(self.document)
        if bounds is None:
            bounds = (0.0, 0.0, 100.0, 100.0)
        self.view.fit(bounds, self.width(), self.height())
        self._fitted_once = True
        self.view_changed.emit()
        self.update()

    def zoom(self, factor: float, at: QPointF | None = None) -> None:
        """Zoom by ``factor`` about ``at`` (logical px), or about the centre of the canvas."""
        at = at if at is not None else QPointF(self.width() / 2, self.height() / 2)
        self.view.zoom_about(at.x(), at.y(), factor)
        self.view_changed.emit()
        self.update()

    def to_doc(self, pos: QPointF) -> tuple[float, float]:
        return self.view.to_doc(pos.x(), pos.y())

    def to_screen(self, x: float, y: float) -> QPointF:
        return QPointF(*self.view.to_screen(x, y))

    def pick_radius(self) -> float:
        """How close (document units) the pointer must be to a point to pick it."""
        return style.PICK_RADIUS_PX / self.view.scale

    # -- painting -----------------------------------------------------------------------
    def resizeEvent(self, event: QResizeEvent) -> None:  # noqa: N802 (Qt name)
        super().resizeEvent(event)
        if not self._fitted_once:
            self.fit_to_outline()

    def paintEvent(self, event: QPaintEvent) -> None:  # noqa: N802 (Qt name)
        doc = self.document
        p = QPainter(self)
        try:
            live = self._live_outlines(doc)
            if live is None:
                self._backdrop = None
                paint_document(
                    p,
                    self.view,
                    doc,
                    self.cache,
                    self.width(),
                    self.height(),
                    self.devicePixelRatioF(),
                    self._editor.selected_points(),
                    self._editor.hover,
                    self.stats,
                )
            else:
                self._paint_with_backdrop(p, doc, live)
            self._paint_tool_overlay(p)
        finally:
            p.end()
        if not self._editor.history.in_group:
            self._last_doc = doc

    def _live_outlines(self, doc: Document) -> set[int] | None:
        """Outlines a gesture in progress has changed, or None when no gesture is running.

        During a drag only these are repainted each frame; everything else comes from a
        backdrop pixmap painted once per drag (and again if the view changes).
        """
        base = self._last_doc
        if not self._editor.history.in_group or base is None:
            return None
        if len(base.outlines) != len(doc.outlines):
            return None
        pairs = zip(base.outlines, doc.outlines, strict=True)
        return {i for i, (a, b) in enumerate(pairs) if a is not b}

    def _paint_with_backdrop(self, p: QPainter, doc: Document, live: set[int]) -> None:
        w, h, dpr = self.width(), self.height(), self.devicePixelRatioF()
        v = self.view
        key = (v.scale, v.offset_x, v.offset_y, w, h, dpr, frozenset(live), id(self._last_doc))
        if self._backdrop is None or self._backdrop[0] != key:
            base = self._last_doc
            marks = count_points_in_view(v, doc, self.cache, w, h) <= style.MAX_MARKED_POINTS
            pixmap = QPixmap(int(math.ceil(w * dpr)), int(math.ceil(h * dpr)))
            pixmap.setDevicePixelRatio(dpr)
            bp = QPainter(pixmap)
            try:
                paint_background(bp, v, doc, w, h, dpr)
                still = set(range(len(doc.outlines))) - live
                paint_outlines(bp, v, base, self.cache, w, h, outlines=still, marks=marks)
            finally:
                bp.end()
            self._backdrop = (key, pixmap, marks)
        _, pixmap, marks = self._backdrop
        p.drawPixmap(0, 0, pixmap)
        paint_outlines(p, v, doc, self.cache, w, h, outlines=live, marks=marks, stats=self.stats)
        paint_selection(p, v, doc, self._editor.selected_points(), self._editor.hover)

    def _paint_tool_overlay(self, p: QPainter) -> None:
        ov = self._editor.overlay()
        if ov is None:
            return
        p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        if ov.rubber_band is not None:
            x0, y0, x1, y1 = ov.rubber_band
            p.setPen(QPen(style.BAND_EDGE, 1.0, Qt.PenStyle.DashLine))
            p.setBrush(style.BAND_FILL)
            p.drawRect(QRectF(self.to_screen(x0, y0), self.to_screen(x1, y1)).normalized())
        hit = ov.segment_hit
        if hit is not None:
            # Where the new point would go: a plus inside a ring, in the draft colour.
            c = self.to_screen(*hit.point)
            seg = self.document.outlines[hit.outline].contours[hit.contour].segments[hit.segment]
            p.setPen(QPen(style.DRAFT, 2.4))
            p.setBrush(Qt.BrushStyle.NoBrush)
            p.drawPath(self._screen_path(seg))
            p.setPen(QPen(style.DRAFT, 1.6))
            p.setBrush(style.PAPER)
            p.drawEllipse(c, 6.0, 6.0)
            p.drawLine(c + QPointF(-3.5, 0), c + QPointF(3.5, 0))
            p.drawLine(c + QPointF(0, -3.5), c + QPointF(0, 3.5))
        draft_pen = QPen(style.DRAFT, 1.6)
        p.setBrush(Qt.BrushStyle.NoBrush)
        p.setPen(draft_pen)
        for seg in ov.draft_segments:
            p.drawPath(self._screen_path(seg))
        if ov.draft_to_pointer is not None:
            p.setPen(QPen(style.DRAFT, 1.0, Qt.PenStyle.DashLine))
            p.drawPath(self._screen_path(ov.draft_to_pointer))
        p.setPen(QPen(style.DRAFT, 1.0))
        for (ax, ay), (bx, by) in ov.draft_handles:
            a, b = self.to_screen(ax, ay), self.to_screen(bx, by)
            p.drawLine(a, b)
            p.setBrush(style.PAPER)
            p.drawEllipse(b, style.HANDLE_RADIUS, style.HANDLE_RADIUS)
            p.setBrush(Qt.BrushStyle.NoBrush)
        p.setPen(QPen(style.DRAFT, 1.4))
        p.setBrush(style.DRAFT)
        for x, y in ov.draft_points:
            p.drawEllipse(self.to_screen(x, y), 3.5, 3.5)
        if ov.close_target and ov.draft_points:
            # The pointer is on the first point: clicking closes the contour.
            p.setPen(QPen(style.DRAFT, 2.0))
            p.setBrush(Qt.BrushStyle.NoBrush)
            p.drawEllipse(self.to_screen(*ov.draft_points[0]), 9.0, 9.0)

    def _screen_path(self, seg) -> QPainterPath:
        pts = [self.to_screen(float(x), float(y)) for x, y in seg]
        path = QPainterPath(pts[0])
        if len(pts) == 4:
            path.cubicTo(pts[1], pts[2], pts[3])
        elif len(pts) == 3:
            path.quadTo(pts[1], pts[2])
        else:
            path.lineTo(pts[-1])
        return path

    # -- navigation ---------------------------------------------------------------------
    def wheelEvent(self, event: QWheelEvent) -> None:  # noqa: N802 (Qt name)
        mods = event.modifiers()
        angle = event.angleDelta()
        pixel = event.pixelDelta()
        if mods & Qt.KeyboardModifier.ControlModifier:
            notches = angle.y() / 120.0
            if notches:
                self.zoom(WHEEL_ZOOM_PER_NOTCH**notches, event.position())
        else:
            if not pixel.isNull():
                dx, dy = float(pixel.x()), float(pixel.y())
            else:
                dx = angle.x() / 120.0 * WHEEL_PAN_PX_PER_NOTCH
                dy = angle.y() / 120.0 * WHEEL_PAN_PX_PER_NOTCH
            if mods & Qt.KeyboardModifier.ShiftModifier:
                dx, dy = dy, dx
            self.view.pan(dx, dy)
            self.view_changed.emit()
            self.update()
        event.accept()

    def _start_pan(self, event: QMouseEvent) -> bool:
        if event.button() == Qt.MouseButton.MiddleButton or (
            event.button() == Qt.MouseButton.LeftButton and self._space_down
        ):
            self._panning = True
            self._last_pan = event.position()
            self.setCursor(Qt.CursorShape.ClosedHandCursor)
            return True
        return False

    # -- mouse → tool -------------------------------------------------------------------
    def mousePressEvent(self, event: QMouseEvent) -> None:  # noqa: N802 (Qt name)
        self.setFocus(Qt.FocusReason.MouseFocusReason)
        if self._start_pan(event):
            return
        if event.button() == Qt.MouseButton.LeftButton:
            self._editor.pointer("press", *self.to_doc(event.position()), event, self)
        event.accept()

    def mouseMoveEvent(self, event: QMouseEvent) -> None:  # noqa: N802 (Qt name)
        if self._panning:
            d = event.position() - self._last_pan
            self._last_pan = event.position()
            self.view.pan(d.x(), d.y())
            self.view_changed.emit()
            self.update()
            return
        x, y = self.to_doc(event.position())
        self.pointer_moved.emit(x, y)
        self._editor.pointer("move", x, y, event, self)

    def mouseReleaseEvent(self, event: QMouseEvent) -> None:  # noqa: N802 (Qt name)
        if self._panning and event.button() in (
            Qt.MouseButton.MiddleButton,
            Qt.MouseButton.LeftButton,
        ):
            self._panning = False
            self.setCursor(
                Qt.CursorShape.OpenHandCursor if self._space_down else Qt.CursorShape.ArrowCursor
            )
            return
        if event.button() == Qt.MouseButton.LeftButton:
            self._editor.pointer("release", *self.to_doc(event.position()), event, self)

    def mouseDoubleClickEvent(self, event: QMouseEvent) -> None:  # noqa: N802 (Qt name)
        # Treat as a second press so quick clicks are not lost.
        self.mousePressEvent(event)

    def keyPressEvent(self, event: QKeyEvent) -> None:  # noqa: N802 (Qt name)
        if event.key() == Qt.Key.Key_Space and not event.isAutoRepeat():
            self._space_down = True
            self.setCursor(Qt.CursorShape.OpenHandCursor)
            return
        if self._editor.key(event):
            event.accept()
            return
        super().keyPressEvent(event)

    def keyReleaseEvent(self, event: QKeyEvent) -> None:  # noqa: N802 (Qt name)
        if event.key() == Qt.Key.Key_Space and not event.isAutoRepeat():
            self._space_down = False
            self.setCursor(Qt.CursorShape.ArrowCursor)
            return
        super().keyReleaseEvent(event)
