"""Finding marks on the canvas: a frame around each finding's place, shaped by severity.

The shapes and colours are set out in :mod:`outlinebench.app.style`: a crimson diamond for
errors, an ochre square for warnings, a small dotted grey square for info. They are frames
around the place, so the join mark at the centre stays visible, and the severity reads from
the shape alone (for colour-blind users and grey-scale prints). The findings list uses the
same drawing for its icons, and the canvas key shows all three.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QIcon, QPainter, QPainterPath, QPen, QPixmap, QPolygonF

from outlinebench.app import style
from outlinebench.app.array_paths import frames_path
from outlinebench.app.sprites import stamp
from outlinebench.app.view_transform import ViewTransform
from outlinebench.diagnostics import Finding

__all__ = [
    "frame_path",
    "paint_finding_marks",
    "paint_frame",
    "finding_icon",
    "finding_at",
    "HIT_RADIUS_PX",
    "DENSE_FINDING_MARKS",
    "FRAME_REACH_PX",
]

# The pointer within this many logical px of a finding's place shows its tooltip.
HIT_RADIUS_PX = 12.0
# Above this many frames in view they are drawn plainly (no antialiasing, no halo): 400
# frames drawn fully take about 5 ms (benchmarks/bench_editor.py), a third of a frame.
DENSE_FINDING_MARKS = 400
# How far (logical px) a finding's frame reaches from its place: the largest frame's corner
# (half-width · √2), half its widest pen (the 4.2-px halo, mitred) and a px of antialiasing.
FRAME_REACH_PX = max(style.FINDING_SIZE.values()) * 1.42 + 3.0 + 2.0


def frame_path(path: QPainterPath, x: float, y: float, severity: str, grow: float = 0.0) -> None:
    """Add the frame of one finding mark centred on screen point (x, y) to ``path``."""
    s = style.FINDING_SIZE.get(severity, 6.0) + grow
    if severity == "error":
        path.addPolygon(
            QPolygonF(
                [
                    QPointF(x, y - s * 1.25),
                    QPointF(x + s * 1.25, y),
                    QPointF(x, y + s * 1.25),
                    QPointF(x - s * 1.25, y),
                    QPointF(x, y - s * 1.25),
                ]
            )
        )
        path.closeSubpath()
    else:
        path.addRect(QRectF(x - s, y - s, 2 * s, 2 * s))


def _pen(severity: str, width: float | None = None) -> QPen:
    colour = style.FINDING_COLOURS.get(severity, style.FINDING_INFO)
    if severity == "info":
        pen = QPen(colour, width or 1.2, Qt.PenStyle.DotLine)
    else:
        pen = QPen(colour, width or (2.2 if severity == "error" else 1.8))
    pen.setJoinStyle(Qt.PenJoinStyle.MiterJoin)
    return pen


def paint_frame(p: QPainter, x: float, y: float, severity: str) -> None:
    """One finding mark (for the key and the list icons)."""
    path = QPainterPath()
    frame_path(path, x, y, severity)
    p.setPen(_pen(severity))
    p.setBrush(style.FINDING_WASH if severity == "error" else Qt.BrushStyle.NoBrush)
    p.drawPath(path)


_POSITIONS: list = [None, None, None]  # [findings list, (N, 2) positions, severities]


def _positions(findings: Sequence[Finding]) -> tuple[np.ndarray, np.ndarray]:
    """Positions and severities as arrays, kept for the last list seen (every frame of a
    view change paints the same list)."""
    if _POSITIONS[0] is not findings:
        xy = np.array([(f.x, f.y) for f in findings], dtype=float).reshape(-1, 2)
        sev = np.array([f.severity for f in findings], dtype=object)
        _POSITIONS[:] = [findings, xy, sev]
    return _POSITIONS[1], _POSITIONS[2]


def _frame_polygon(x: float, y: float, severity: str, grow: float = 0.0) -> QPolygonF:
    path = QPainterPath()
    frame_path(path, x, y, severity, grow)
    return path.toFillPolygon()


def _frame_look(severity: str, halo: bool) -> tuple[tuple, Callable, int]:
    """Sprite key, painting function and reach of a finding's frame or of its paper halo."""
    colour = style.FINDING_COLOURS.get(severity, style.FINDING_INFO)
    size = style.FINDING_SIZE.get(severity, 6.0)
    key = ("finding", severity, halo, colour.rgba(), style.PAPER.rgba(), size)
    key += (style.FINDING_WASH.rgba(),)

    def draw(sp: QPainter, x: float, y: float) -> None:
        path = QPainterPath()
        frame_path(path, x, y, severity)
        if halo:
            sp.setPen(QPen(style.PAPER, 4.2 if severity == "error" else 3.8))
            sp.setBrush(Qt.BrushStyle.NoBrush)
        else:
            sp.setPen(_pen(severity))
            sp.setBrush(style.FINDING_WASH if severity == "error" else Qt.BrushStyle.NoBrush)
        sp.drawPolygon(path.toFillPolygon())

    # An error's diamond reaches 1.25 · size, a square's corner size · √2; plus half the
    # widest pen (the halo, 4.2 px, mitred) and a pixel for the antialiased edge.
    return key, draw, math.ceil(size * 1.42 + 3.0 + 1.5)


def paint_finding_marks(
    p: QPainter,
    view: ViewTransform,
    findings: Sequence[Finding],
    width: float,
    height: float,
    current: Finding | None = None,
) -> int:
    """Frame every finding whose place is in view; returns how many were drawn.

    Less serious findings are drawn first so an error's frame lies on top where they share
    a place. ``current`` (the finding picked in the list) is drawn larger and doubled. Above
    :data:`DENSE_FINDING_MARKS` frames in view they are drawn as plain 1-px outlines (no
    antialiasing, wash or halo), so painting stays within a frame.

    Notes
    -----
    Each frame is drawn as its own polygon: Qt strokes one path of thousands of overlapping
    antialiased frames about twenty times slower than the same frames one by one
    (benchmarks/bench_editor.py).
    """
    if not findings and current is None:
        return 0
    xy, sev_of = _positions(findings)
    scr = view.to_screen_array(xy)
    m = 2 * max(style.FINDING_SIZE.values())
    inside = (scr[:, 0] >= -m) & (scr[:, 0] <= width + m)
    inside &= (scr[:, 1] >= -m) & (scr[:, 1] <= height + m)
    shown = np.flatnonzero(inside)
    p.save()
    if len(shown) > DENSE_FINDING_MARKS:
        # Plain 1-px frames, all of a severity in one path built from arrays.
        p.setRenderHint(QPainter.RenderHint.Antialiasing, False)
        p.setBrush(Qt.BrushStyle.NoBrush)
        for sev in ("info", "warning", "error"):
            rows = shown[sev_of[shown] == sev]
            if rows.size:
                half = style.FINDING_SIZE[sev] * (1.25 if sev == "error" else 1.0)
                pen = QPen(style.FINDING_COLOURS[sev], 1.0)
                pen.setCosmetic(True)
                p.setPen(pen)
                p.drawPath(frames_path(scr[rows], half, sev == "error"))
    else:
        # Antialiased frames copied from prerendered pixmaps (outlinebench.app.sprites):
        # per severity first every paper halo, then every frame, as painted shapes were.
        p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        for sev in ("info", "warning", "error"):
            rows = shown[sev_of[shown] == sev]
            if not rows.size:
                continue
            where = scr[rows]
            if sev != "info":  # a paper halo keeps the frame readable over the outline
                stamp(p, *_frame_look(sev, halo=True), where)
            stamp(p, *_frame_look(sev, halo=False), where)
        other = shown[~np.isin(sev_of[shown], ("info", "warning", "error"))]
        if other.size:  # an unknown severity is drawn as info
            stamp(p, *_frame_look("info", halo=False), scr[other])
    if current is not None:
        x, y = view.to_screen(current.x, current.y)
        p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        p.setBrush(Qt.BrushStyle.NoBrush)
        p.setPen(_pen(current.severity, 1.6))
        p.drawPolygon(_frame_polygon(x, y, current.severity, 5.0))
        p.drawPolygon(_frame_polygon(x, y, current.severity, 8.0))
    p.restore()
    return int(len(shown))


def finding_at(
    view: ViewTransform, findings: Sequence[Finding], sx: float, sy: float
) -> list[Finding]:
    """Findings whose mark is within :data:`HIT_RADIUS_PX` of screen point (sx, sy),
    most serious first."""
    if not findings:
        return []
    xy = np.array([(f.x, f.y) for f in findings], dtype=float)
    scr = view.to_screen_array(xy)
    d = np.hypot(scr[:, 0] - sx, scr[:, 1] - sy)
    near = np.flatnonzero(d <= HIT_RADIUS_PX)
    rank = {"error": 0, "warning": 1, "info": 2}
    return sorted((findings[k] for k in near.tolist()), key=lambda f: rank.get(f.severity, 3))


_ICONS: dict[str, QIcon] = {}


def finding_icon(severity: str) -> QIcon:
    """The severity's mark as a small icon (cached)."""
    icon = _ICONS.get(severity)
    if icon is None:
        size = 20
        pix = QPixmap(size * 2, size * 2)
        pix.setDevicePixelRatio(2.0)
        pix.fill(QColor(0, 0, 0, 0))
        p = QPainter(pix)
        p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        # Scaled so every severity's frame fills the icon alike (half-width 7 px).
        half = style.FINDING_SIZE.get(severity, 6.0) * (1.25 if severity == "error" else 1.0)
        p.translate(size / 2, size / 2)
        p.scale(7.0 / half, 7.0 / half)
        paint_frame(p, 0.0, 0.0, severity)
        p.end()
        icon = QIcon(pix)
        _ICONS[severity] = icon
    return icon
