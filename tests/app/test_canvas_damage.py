"""During a drag the canvas repaints only the region the edit changed: what is on screen must
equal a full repaint (checked pixel for pixel against Qt's own full repaint of the widget)."""

import numpy as np
import pytest
from conftest import lettering_document
from PySide6.QtCore import QEvent, QPointF
from PySide6.QtGui import QImage
from PySide6.QtWidgets import QApplication
from qt_mouse import _send, screen


def _pixels(canvas) -> np.ndarray:
    """What the screen shows of the canvas (the window system's copy, not a new paint)."""
    top_left = canvas.mapToGlobal(canvas.rect().topLeft())
    shot = QApplication.primaryScreen().grabWindow(
        0, top_left.x(), top_left.y(), canvas.width(), canvas.height()
    )
    img = shot.toImage().convertToFormat(QImage.Format.Format_RGB32)
    arr = np.frombuffer(img.constBits(), dtype=np.uint8).reshape(img.height(), -1)
    return arr[:, : img.width() * 4].copy()


@pytest.fixture
def bare_canvas(qtbot):
    """A canvas alone on screen, with live findings framed as the main window frames them."""
    from outlinebench.app.canvas import Canvas
    from outlinebench.app.live_findings import LiveFindings
    from outlinebench.app.session import EditorSession

    session = EditorSession(lettering_document())
    canvas = Canvas(session)
    live = LiveFindings(session)
    live.updated.connect(lambda: canvas.set_finding_marks(list(live.findings)))
    canvas.set_finding_marks(list(live.findings))
    qtbot.addWidget(canvas)
    canvas.resize(500, 400)
    canvas.move(0, 0)
    canvas.show()
    qtbot.waitExposed(canvas)
    canvas.fit_to_outline()
    canvas.set_comb(True, 40.0)
    QApplication.processEvents()
    return canvas, session, live


@pytest.mark.parametrize("zoom", [1.0, 3.0])
@pytest.mark.parametrize("which", [(0, 0, 1, 1), (0, 0, 1, 0)])  # handle, on-curve point
def test_a_drag_repaints_what_a_full_repaint_would_show(bare_canvas, qtbot, zoom, which):
    canvas, session, live = bare_canvas
    o, c, seg, i = which
    point = session.document.outlines[o].contours[c].segments[seg][i]
    canvas.zoom(zoom, screen(canvas, point))
    canvas.repaint()
    start = screen(canvas, point)
    session.set_tool("select")
    _send(canvas, QEvent.Type.MouseButtonPress, start)
    QApplication.processEvents()
    frames = canvas.frames_painted
    for k in range(1, 9):
        _send(canvas, QEvent.Type.MouseMove, start + QPointF(6.0 * k, -4.0 * k))
        QApplication.processEvents()  # the event loop paints what update() asked for
    # The findings follow the moved geometry's frame within one event-loop turn: wait for
    # them and for the frame that repaints their marks.
    qtbot.waitUntil(lambda: not live.pending and live.document is session.document)
    QApplication.processEvents()
    assert session.history.in_group  # still dragging: the frames came from the damage path
    assert canvas.frames_painted > frames
    painted = canvas.last_paint_rect
    assert painted.width() * painted.height() < canvas.width() * canvas.height()  # a part
    moved = session.document.outlines[o].contours[c].segments[seg][i]
    assert not np.array_equal(moved, point)
    shown = _pixels(canvas)
    canvas.repaint()  # a full repaint of the same state, for comparison
    full = _pixels(canvas)
    # Common practice, no source: an incremental repaint must leave no trace of old frames.
    assert np.array_equal(shown, full), f"{int((shown != full).sum())} bytes differ"
    _send(canvas, QEvent.Type.MouseButtonRelease, start + QPointF(48.0, -32.0))
