"""Marks thin out at low zoom (issue 13): at fit-to-view a line of lettering shows its outline
and its findings; point marks shrink, then are left out, and come back as you zoom in."""

from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
DEFECTS = ROOT / "samples" / "signshop-lettering-defects.svg"


def _count(image, colour, tol=30):
    from PySide6.QtGui import QColor

    c = QColor(colour)
    img = image.convertToFormat(image.Format.Format_RGB32)
    arr = np.frombuffer(img.constBits(), np.uint8).reshape(img.height(), img.bytesPerLine() // 4, 4)
    arr = arr[:, : img.width(), :3].astype(int)
    return int((np.abs(arr - [c.blue(), c.green(), c.red()]).sum(axis=2) < tol).sum())


def test_mark_scale_steps_with_the_spacing_of_points_on_screen():
    from outlinebench.app import style
    from outlinebench.app.canvas_painter import mark_scale
    from outlinebench.app.contour_graphics import build_graphics
    from outlinebench.model.document import Contour

    # A square of side 10 units cut into 8 segments: box side 10, on-curve points 5 apart.
    pts = [(0, 0), (5, 0), (10, 0), (10, 5), (10, 10), (5, 10), (0, 10), (0, 5)]
    sq = Contour.from_points(
        [[list(pts[i]), list(pts[(i + 1) % 8])] for i in range(8)], closed=True
    )
    g = build_graphics(sq)
    # View scales (px per unit) at which each measure reaches its full or hiding size.
    full = max(style.MARK_FULL_SPACING_PX / 5.0, style.MARK_FULL_SIZE_PX / 10.0)
    hide = max(style.MARK_HIDE_SPACING_PX / 5.0, style.MARK_HIDE_SIZE_PX / 10.0)
    assert mark_scale(g, full) == 1.0
    assert mark_scale(g, 10 * full) == 1.0
    assert mark_scale(g, 0.99 * hide) == 0.0
    # In between: a step of MARK_SCALES, never above the smaller of the two ratios.
    mid = mark_scale(g, 0.7 * full)
    assert mid in style.MARK_SCALES and mid <= 0.7


def test_at_fit_zoom_findings_stay_and_point_marks_go(qtbot):
    from PySide6.QtCore import QPointF

    from outlinebench.app import style
    from outlinebench.app.canvas import Canvas
    from outlinebench.app.session import EditorSession
    from outlinebench.diagnostics import check_document
    from outlinebench.io import load_svg

    doc = load_svg(str(DEFECTS))
    session = EditorSession(doc)
    canvas = Canvas(session)
    qtbot.addWidget(canvas)
    canvas.resize(560, 420)  # the canvas of a 1280 × 800 window beside the docks
    canvas.show()
    qtbot.waitExposed(canvas)
    canvas.fit_to_outline()
    canvas.set_finding_marks([f for f in check_document(doc) if f.severity != "info"])
    fit = canvas.grab().toImage()
    # Findings visible: crimson error frames (style.FINDING_ERROR).
    assert _count(fit, style.FINDING_ERROR) > 50
    # Point marks left out: no teal smooth marks or handle dots (style.SMOOTH).
    assert _count(fit, style.SMOOTH) == 0
    # Zoomed in 6× about the O: the marks appear.
    canvas.zoom(6.0, QPointF(canvas.width() * 0.72, canvas.height() * 0.5))
    near = canvas.grab().toImage()
    assert _count(near, style.SMOOTH) > 50
