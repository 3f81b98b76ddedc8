"""A key to the canvas marks, drawn with the same code that draws them on the canvas."""
# Rows: join marks, handles and selection; then finding frames by severity; then the comb.

from __future__ import annotations

from PySide6.QtCore import QPointF, QSize, Qt
from PySide6.QtGui import QPainter, QPainterPath, QPen
from PySide6.QtWidgets import QWidget

from outlinebench.app import style
from outlinebench.app.canvas_painter import mark_path
from outlinebench.app.contour_graphics import JoinMark
from outlinebench.app.finding_marks import paint_frame

__all__ = ["MarkKey"]

_ROWS = [
    ("smooth", True, "Smooth join (stated)"),
    ("corner", True, "Corner join (stated)"),
    ("smooth", False, "Hollow: not stated, judged by angle"),
    ("start", True, "Start of an open contour"),
    ("end", True, "End of an open contour"),
    ("handle", True, "Handle, in the colour of its join"),
    ("selected", True, "Selected point"),
    ("error", True, "Error found here (diamond)"),
    ("warning", True, "Warning found here (square)"),
    ("info", True, "Note found here (dotted; Show info)"),
    ("comb", True, "Curvature comb; a step = G2 break"),
]
_ROW_H = 22


class MarkKey(QWidget):
    """Rows of "mark — meaning" for the canvas's visual language."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setMinimumHeight(_ROW_H * len(_ROWS) + 6)

    def sizeHint(self) -> QSize:  # noqa: N802 (Qt name)
        return QSize(260, _ROW_H * len(_ROWS) + 6)

    def paintEvent(self, event) -> None:  # noqa: N802 (Qt name)
        p = QPainter(self)
        p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        for row, (kind, stated, text) in enumerate(_ROWS):
            y = 4 + row * _ROW_H + _ROW_H / 2
            x = 18.0
            if kind in ("error", "warning", "info"):
                paint_frame(p, x, y, kind)
                p.setPen(QPen(style.OUTLINE, 1.0))
                p.drawPoint(QPointF(x, y))
            elif kind == "comb":
                self._paint_comb_sample(p, x, y)
            elif kind == "handle":
                colour = style.SMOOTH
                p.setPen(QPen(colour, 1.0))
                p.drawLine(QPointF(x - 12, y), QPointF(x + 8, y))
                p.setPen(QPen(colour, 1.4))
                p.setBrush(style.PAPER)
                p.drawEllipse(QPointF(x + 8, y), style.HANDLE_RADIUS, style.HANDLE_RADIUS)
            elif kind == "selected":
                mk = JoinMark("smooth", True, (1.0, 0.0))
                path = QPainterPath()
                mark_path(path, x, y, mk)
                p.setPen(Qt.PenStyle.NoPen)
                p.setBrush(style.SMOOTH)
                p.drawPath(path)
                p.setPen(QPen(style.SELECTED, 2.4))
                p.setBrush(Qt.BrushStyle.NoBrush)
                r = style.MARK_SIZE + 3.5
                p.drawEllipse(QPointF(x, y), r, r)
            else:
                direction = (0.0, -1.0) if kind == "corner" else (1.0, 0.0)
                mk = JoinMark(kind, stated, direction)
                path = QPainterPath()
                mark_path(path, x, y, mk)
                colour = style.JOIN_COLOURS[kind]
                if stated:
                    p.setPen(QPen(colour.darker(130), 1.0))
                    p.setBrush(colour)
                else:
                    p.setPen(QPen(colour, 1.6))
                    p.setBrush(style.PAPER)
                p.drawPath(path)
                if not stated:
                    tri = QPainterPath()
                    mark_path(tri, x + 20, y, JoinMark("corner", False, (0.0, -1.0)))
                    p.setPen(QPen(style.CORNER, 1.6))
                    p.drawPath(tri)
            p.setPen(self.palette().color(self.foregroundRole()))
            p.drawText(QPointF(48, y + 5), text)
        p.end()

    @staticmethod
    def _paint_comb_sample(p: QPainter, x: float, y: float) -> None:
        """A straight stroke with a comb whose teeth double in length at the middle: the
        step a curvature jump (G2 break) makes."""
        x0, xm, x1, base = x - 14.0, x + 1.0, x + 16.0, y + 6.0
        p.setPen(QPen(style.COMB_TOOTH, 1.0))
        for k in range(11):
            sx = x0 + (x1 - x0) * k / 10
            p.drawLine(QPointF(sx, base), QPointF(sx, base - (4.0 if sx < xm else 10.0)))
        p.setPen(QPen(style.COMB_EDGE, 1.3))
        p.drawLine(QPointF(x0, base - 4.0), QPointF(xm, base - 4.0))
        p.drawLine(QPointF(xm, base - 10.0), QPointF(x1, base - 10.0))
        p.setPen(QPen(style.OUTLINE, 1.0))
        p.drawLine(QPointF(x0, base), QPointF(x1, base))
