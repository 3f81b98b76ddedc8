"""The drawing canvas: paints the document and turns mouse and keys into model gestures.

Navigation (handled here): the wheel scrolls (Shift + wheel scrolls sideways), Ctrl + wheel
zooms about the pointer, the middle button or Space + left button drags the view. Editing
gestures are not decided here: mouse events become :class:`outlinebench.model.tools`
pointer events in document coordinates and the active tool decides what they mean.
"""

from __future__ import annotations

import math
import time
from collections import deque
from operator import attrgetter
from typing import TYPE_CHECKING

import numpy as np
from PySide6.QtCore import QEvent, QPointF, QRect, QRectF, Qt, Signal
from PySide6.QtGui import (
    QHelpEvent,
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
from PySide6.QtWidgets import QSizePolicy, QToolTip, QWidget

from outlinebench.app import style
from outlinebench.app.canvas_painter import (
    PaintStats,
    count_points_in_view,
    document_bounds,
    page_rect,
    paint_background,
    paint_outlines,
    paint_selection,
    visible_contours,
)
from outlinebench.app.contour_graphics import GraphicsCache
from outlinebench.app.curvature_comb import (
    MAX_COMB_SEGMENTS,
    MAX_TOOTH_PX,
    CombCache,
    paint_comb,
)
from outlinebench.app.finding_marks import FRAME_REACH_PX, finding_at, paint_finding_marks
from outlinebench.app.preview_painter import (
    paint_fix_preview,
    paint_flatten_preview,
    paint_offset_preview,
)
from outlinebench.app.view_transform import MAX_SCALE, ViewTransform
from outlinebench.diagnostics import Finding
from outlinebench.model.document import Document

if TYPE_CHECKING:  # the session imports nothing from here; this is for type checkers
    from outlinebench.app.session import EditorSession

__all__ = ["Canvas", "WHEEL_ZOOM_PER_NOTCH", "WHEEL_PAN_PX_PER_NOTCH", "PLACE_MIN_PX"]

# Zoom factor per wheel notch (120 units of angleDelta, the Qt QWheelEvent convention).
WHEEL_ZOOM_PER_NOTCH = 1.2
# Scroll distance per wheel notch, logical px.
WHEEL_PAN_PX_PER_NOTCH = 60.0
# Showing a finding zooms in until its size (a gap's width, a tiny segment's length) spans
# at least this many logical px, so a 0.005 mm defect becomes visible.
PLACE_MIN_PX = 48.0


def _global_contours(doc: Document, outlines: set[int]) -> frozenset[int]:
    """Global contour numbers (the numbering findings use) of the given outlines."""
    out: list[int] = []
    k = 0
    for oi, outline in enumerate(doc.outlines):
        n = len(outline.contours)
        if oi in outlines:
            out.extend(range(k, k + n))
        k += n
    return frozenset(out)


_CONTOUR = attrgetter("contour")
_OTHER_CONTOUR = attrgetter("other_contour")


def _touches(f: Finding, contours: frozenset[int]) -> bool:
    return f.contour in contours or (f.other_contour is not None and f.other_contour in contours)


def _overlay_empty(ov) -> bool:
    """The tool draws nothing over the document (no rubber band, draft or insert mark)."""
    return ov is None or (
        ov.rubber_band is None
        and ov.segment_hit is None
        and not ov.draft_segments
        and not ov.draft_points
        and not ov.draft_handles
        and ov.draft_to_pointer is None
        and not ov.close_target
    )


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
        # The user zoomed or panned since the last fit: a resize then keeps the view; until
        # then a resize (the window laid out, a dock opened) fits the drawing again.
        self._user_view = False
        self._last_doc: Document | None = None  # last document painted outside a gesture
        self._seen_doc: Document | None = None  # document of the last change handled
        self.frames_painted = 0  # paint events handled (the benchmark checks frames happen)
        self.last_paint_rect = QRect()  # the region the last paint event asked for
        # (frames_painted, time.perf_counter() when that frame's painting ended) of the last
        # frames: the benchmark times a mouse move to its frame with these
        self.frame_ends: deque[tuple[int, float]] = deque(maxlen=16)
        self._painted_marks: tuple = (None, None)  # (selection, hover) the last frame drew
        # (key, pixmap, marks, contours being changed) while a gesture runs
        self._backdrop: tuple | None = None
        # Overlays: finding marks (the findings the list shows) and the curvature comb.
        self.finding_marks: list[Finding] = []
        # (finding list, moving contours, its findings on them) for the last two lists asked
        self._marks_on_cache: list[tuple] = [((), frozenset(), []), ((), frozenset(), [])]
        self.current_finding: Finding | None = None
        self.comb_on = False
        self.comb_scale = 1.0  # tooth length = comb_scale · κ (document units²)
        self.comb_cache = CombCache()
        self.comb_teeth = 0  # teeth drawn in the last frame
        self.comb_hidden = False  # too many segments in view for a comb
        # Cutting previews (app.cut_preview results) and the label of the largest deviation;
        # not drawn while a gesture runs (they belong to the document before it).
        self.flatten_preview = None
        self.flatten_label: str | None = None
        self.offset_preview = None
        # A fix being previewed (app.fix_preview.FixPreview) and its label (the change).
        self.fix_preview = None
        self.fix_label: str | None = None
        self.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
        self.setMouseTracking(True)
        self.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Expanding)
        self.setMinimumSize(200, 200)
        self.setAttribute(Qt.WidgetAttribute.WA_OpaquePaintEvent, True)
        editor.changed.connect(self._on_document_changed)
        editor.selection_changed.connect(self._on_selection_changed)

    # -- model → widget -----------------------------------------------------------------
    @property
    def document(self) -> Document:
        return self._editor.document

    def _on_document_changed(self) -> None:
        doc = self.document
        old, self._seen_doc = self._seen_doc, doc
        live = {id(c) for o in doc.outlines for c in o.contours}
        self.cache.prune(live)
        self.comb_cache.prune(live)
        damage = self._edit_damage(old, doc)
        if damage is None:
            self.update()
        elif not damage.isEmpty():
            self.update(damage.toAlignedRect())

    def _partial_ok(self) -> bool:
        """A gesture is running and the last frame was painted from its backdrop, so the
        widget shows everything but what changed since: repainting that is enough."""
        return (
            self._editor.history.in_group
            and self._backdrop is not None
            and self._last_doc is not None
            and _overlay_empty(self._editor.overlay())
        )

    def _damage_margin(self) -> float:
        """Logical px a changed segment's drawing may reach beyond its control points: join
        marks, handles, the selection and hover rings, and the comb's teeth when shown."""
        # hover ring (MARK_SIZE + 6, 1.2-px pen) is the widest mark; one px for antialiasing
        m = style.MARK_SIZE + 6.0 + 0.6 + 2.0
        m = max(m, style.MARK_SIZE * 1.45 + 0.8 + 2.0)
        if self.comb_on:
            m = max(m, MAX_TOOTH_PX + 2.0)
        return m

    def _edit_damage(self, old: Document | None, new: Document) -> QRectF | None:
        """Screen rectangle holding everything the edit ``old`` → ``new`` changed on the
        canvas during a drag, or None when the whole canvas must be repainted.

        Segments are immutable and an edit keeps the untouched ones as the same objects, so
        the changed ones are those not identical at the same place; what the canvas draws for
        a segment (curve, fill edge, handles, marks at its ends, comb teeth) lies within its
        control points' box (convex hull property) grown by :meth:`_damage_margin`.
        """
        if old is None or not self._partial_ok():
            return None
        if len(old.outlines) != len(new.outlines):
            return None
        boxes: list[np.ndarray] = []
        for a, b in zip(old.outlines, new.outlines, strict=True):
            if a is b:
                continue
            if len(a.contours) != len(b.contours):
                return None
            for ca, cb in zip(a.contours, b.contours, strict=True):
                if ca is cb:
                    continue
                if (
                    len(ca.segments) != len(cb.segments)
                    or ca.closed != cb.closed
                    or ca.joins != cb.joins
                ):
                    return None
                for sa, sb in zip(ca.segments, cb.segments, strict=True):
                    if sa is not sb:
                        boxes.append(sa)
                        boxes.append(sb)
        if not boxes:
            return QRectF()
        pts = self.view.to_screen_array(np.concatenate(boxes))
        lo, hi = pts.min(axis=0), pts.max(axis=0)
        m = self._damage_margin()
        return QRectF(lo[0] - m, lo[1] - m, hi[0] - lo[0] + 2 * m, hi[1] - lo[1] + 2 * m)

    def set_finding_marks(self, findings: list[Finding], current: Finding | None = None) -> None:
        """Findings to mark on the canvas (user units) and the one picked in the list."""
        old, old_current = self.finding_marks, self.current_finding
        self.finding_marks = findings
        self.current_finding = current
        if self._partial_ok() and current is old_current:
            # During a drag the checker keeps the Finding objects of everything the edit did
            # not touch, and the frames of findings off the dragged contours are part of the
            # backdrop: only the frames of findings on them that came or went need repainting.
            moving = self._backdrop[3]
            before = self._marks_on(old, moving)
            after = self._marks_on(findings, moving)
            ids_before = set(map(id, before))
            ids_after = set(map(id, after))
            changed = [f for f in before if id(f) not in ids_after]
            changed += [f for f in after if id(f) not in ids_before]
            if changed:
                xy = np.array([(f.x, f.y) for f in changed], dtype=float)
                scr = self.view.to_screen_array(xy)
                lo, hi = scr.min(axis=0), scr.max(axis=0)
                m = FRAME_REACH_PX
                rect = QRectF(lo[0] - m, lo[1] - m, hi[0] - lo[0] + 2 * m, hi[1] - lo[1] + 2 * m)
                self.update(rect.toAlignedRect())
            return
        self.update()

    def set_comb(self, on: bool, scale: float | None = None) -> None:
        """Show or hide the curvature comb; ``scale`` in document units² (tooth = scale·κ)."""
        self.comb_on = on
        if scale is not None:
            self.comb_scale = float(scale)
        self._backdrop = None
        self.update()

    def show_place(self, x: float, y: float, size: float | None = None) -> None:
        """Centre document point (x, y); zoom in until ``size`` spans :data:`PLACE_MIN_PX`."""
        v = self.view
        if size is not None and size > 0 and size * v.scale < PLACE_MIN_PX:
            v.scale = min(PLACE_MIN_PX / size, MAX_SCALE)
        v.offset_x = self.width() / 2 - x * v.scale
        v.offset_y = self.height() / 2 - y * v.scale
        self._user_view = True
        self.view_changed.emit()
        self.update()

    # -- view ---------------------------------------------------------------------------
    def fit_to_outline(self) -> None:
        """Show every outline (or the page, when the document has none) with a margin."""
        bounds = document_bounds(self.document, self.cache) or page_rect(self.document)
        if bounds is None:
            bounds = (0.0, 0.0, 100.0, 100.0)
        self.view.fit(bounds, self.width(), self.height())
        self._fitted_once = True
        self._user_view = False
        self.view_changed.emit()
        self.update()

    def zoom(self, factor: float, at: QPointF | None = None) -> None:
        """Zoom by ``factor`` about ``at`` (logical px), or about the centre of the canvas."""
        at = at if at is not None else QPointF(self.width() / 2, self.height() / 2)
        self._user_view = True
        self.view.zoom_about(at.x(), at.y(), factor)
        self.view_changed.emit()
        self.update()

    def to_doc(self, pos: QPointF) -> tuple[float, float]:
        return self.view.to_doc(pos.x(), pos.y())

    def to_screen(self, x: float, y: float) -> QPointF:
        return QPointF(*self.view.to_screen(x, y))

    def tool_changed(self) -> None:
        """The active tool asks for a repaint. During a drag that only moves points the
        document change has already asked for the damaged region; otherwise (a rubber band,
        a draft, another point hovered or selected) the whole canvas is repainted."""
        if self._partial_ok() and self._seen_doc is self.document and self._marks_same():
            return
        self.update()

    def _on_selection_changed(self) -> None:
        if self._partial_ok() and self._marks_same():
            return  # the selected points moved with the edit: their region is repainted
        self.update()

    def _marks_same(self) -> bool:
        """The selection and the hovered point are those the last frame drew."""
        return self._painted_marks == (self._editor.selected_points(), self._editor.hover)

    def pick_radius(self) -> float:
        """How close (document units) the pointer must be to a point to pick it."""
        return style.PICK_RADIUS_PX / self.view.scale

    # -- painting -----------------------------------------------------------------------
    def resizeEvent(self, event: QResizeEvent) -> None:  # noqa: N802 (Qt name)
        super().resizeEvent(event)
        if not self._fitted_once or not self._user_view:
            self.fit_to_outline()

    def paintEvent(self, event: QPaintEvent) -> None:  # noqa: N802 (Qt name)
        self.frames_painted += 1
        self.last_paint_rect = event.rect()
        doc = self.document
        p = QPainter(self)
        try:
            live = self._live_outlines(doc)
            if live is None:
                self._backdrop = None
                w, h = self.width(), self.height()
                paint_background(p, self.view, doc, w, h, self.devicePixelRatioF())
                self._paint_comb(p, doc, None)
                paint_outlines(p, self.view, doc, self.cache, w, h, stats=self.stats)
                self._paint_previews(p)
                paint_finding_marks(p, self.view, self.finding_marks, w, h, self.current_finding)
                sel = self._editor.selected_points()
                paint_selection(p, self.view, doc, sel, self._editor.hover)
            else:
                self._paint_with_backdrop(p, doc, live, QRectF(event.rect()))
            self._paint_tool_overlay(p)
        finally:
            p.end()
        self.frame_ends.append((self.frames_painted, time.perf_counter()))
        if not self._editor.history.in_group:
            self._last_doc = doc
        self._painted_marks = (self._editor.selected_points(), self._editor.hover)

    def set_previews(self, flatten=None, offset=None, flatten_label: str | None = None) -> None:
        """Show (or, with None, hide) the flattening and offset previews."""
        self.flatten_preview = flatten
        self.flatten_label = flatten_label
        self.offset_preview = offset
        self._backdrop = None
        self.update()

    def set_fix_preview(self, fix=None, label: str | None = None) -> None:
        """Show (or, with None, hide) a fix being previewed: the old outline ghosted, the new
        one drawn, ``label`` beside the finding."""
        self.fix_preview = fix
        self.fix_label = label
        self._backdrop = None
        self.update()

    def _paint_previews(self, p: QPainter) -> None:
        if self.offset_preview is not None:
            paint_offset_preview(p, self.view, self.offset_preview)
        if self.flatten_preview is not None:
            paint_flatten_preview(p, self.view, self.flatten_preview, self.flatten_label)
        fix = self.fix_preview
        if fix is not None and fix.before is self.document:
            paint_fix_preview(p, self.view, fix, self.fix_label)

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

    def _paint_with_backdrop(
        self, p: QPainter, doc: Document, live: set[int], clip: QRectF | None = None
    ) -> None:
        w, h, dpr = self.width(), self.height(), self.devicePixelRatioF()
        v = self.view
        key = (v.scale, v.offset_x, v.offset_y, w, h, dpr, frozenset(live), id(self._last_doc))
        key += (self.comb_on, self.comb_scale)
        if self._backdrop is None or self._backdrop[0] != key:
            base = self._last_doc
            marks = count_points_in_view(v, doc, self.cache, w, h) <= style.MAX_MARKED_POINTS
            pixmap = QPixmap(int(math.ceil(w * dpr)), int(math.ceil(h * dpr)))
            pixmap.setDevicePixelRatio(dpr)
            bp = QPainter(pixmap)
            try:
                paint_background(bp, v, doc, w, h, dpr)
                still = set(range(len(doc.outlines))) - live
                self._paint_comb(bp, base, still)
                paint_outlines(bp, v, base, self.cache, w, h, outlines=still, marks=marks)
                # Frames of findings the drag cannot change go into the backdrop too.
                moving = _global_contours(doc, live)
                fixed = [f for f in self.finding_marks if not _touches(f, moving)]
                paint_finding_marks(bp, v, fixed, w, h)
            finally:
                bp.end()
            self._backdrop = (key, pixmap, marks, moving)
        _, pixmap, marks, moving = self._backdrop
        p.drawPixmap(0, 0, pixmap)
        self._paint_comb(p, doc, live, clip)
        paint_outlines(
            p, v, doc, self.cache, w, h, outlines=live, marks=marks, stats=self.stats, clip=clip
        )
        changing = self._marks_on(self.finding_marks, moving)
        paint_finding_marks(p, v, changing, w, h, self.current_finding)
        paint_selection(p, v, doc, self._editor.selected_points(), self._editor.hover)

    def _marks_on(self, marks: list[Finding], moving: frozenset[int]) -> list[Finding]:
        """The findings of ``marks`` on the ``moving`` contours (kept for the last two lists:
        the frames between two checks of a drag paint the same ones)."""
        for hit in self._marks_on_cache:
            if hit[0] is marks and hit[1] == moving:
                return hit[2]
        if not marks or not moving:
            on: list[Finding] = []
        else:
            wanted = np.fromiter(moving, dtype=float, count=len(moving))
            contour = np.fromiter(map(_CONTOUR, marks), dtype=float, count=len(marks))
            # None (no other contour) becomes NaN, which is in no set
            other = np.array(list(map(_OTHER_CONTOUR, marks)), dtype=float)
            hit_rows = np.flatnonzero(np.isin(contour, wanted) | np.isin(other, wanted))
            on = [marks[k] for k in hit_rows.tolist()]
        self._marks_on_cache = [self._marks_on_cache[-1], (marks, moving, on)]
        return on

    def _paint_comb(
        self, p: QPainter, doc: Document, outlines: set[int] | None, clip: QRectF | None = None
    ) -> None:
        """The comb of the visible contours of ``outlines`` (default all), under the outline;
        with ``clip`` only the teeth near that part of the canvas."""
        if not self.comb_on:
            self.comb_teeth, self.comb_hidden = 0, False
            return
        w, h = self.width(), self.height()
        # Teeth reach up to MAX_TOOTH_PX beyond their contour's box.
        shown = visible_contours(self.view, doc, self.cache, w, h, outlines, MAX_TOOTH_PX)
        n = sum(len(doc.outlines[oi].contours[ci].segments) for oi, ci, *_ in shown)
        self.comb_hidden = n > MAX_COMB_SEGMENTS
        if self.comb_hidden:
            self.comb_teeth = 0
            return
        pairs = [(oi, ci) for oi, ci, *_ in shown]
        self.comb_teeth = paint_comb(
            p, self.view, doc, pairs, self.comb_cache, self.comb_scale, clip
        )

    def event(self, event: QEvent) -> bool:
        if event.type() == QEvent.Type.ToolTip:
            assert isinstance(event, QHelpEvent)
            hits = finding_at(self.view, self.finding_marks, event.pos().x(), event.pos().y())
            if hits:
                from outlinebench.app.findings_panel import where_text

                # Contour numbers as the findings list and `outlinebench check` give them.
                lines = [
                    f"<b>{f.kind}</b> ({f.severity}) at {where_text(f)}: {f.message}"
                    for f in hits[:6]
                ]
                if len(hits) > 6:
                    lines.append(f"… and {len(hits) - 6} more here")
                QToolTip.showText(event.globalPos(), "<br>".join(lines), self)
            else:
                QToolTip.hideText()
                event.ignore()
            return True
        return super().event(event)

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
            self._user_view = True
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
            self._user_view = True
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
