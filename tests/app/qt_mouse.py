"""Mouse helpers for the editor tests: real QMouseEvents delivered to the canvas."""

from PySide6.QtCore import QEvent, QPointF, Qt
from PySide6.QtGui import QMouseEvent
from PySide6.QtWidgets import QApplication

NO_MOD = Qt.KeyboardModifier.NoModifier
LEFT = Qt.MouseButton.LeftButton


def _send(canvas, kind, pos, mods=NO_MOD):
    """Deliver one mouse event to the canvas as Qt would (button state and modifiers set)."""
    if kind == QEvent.Type.MouseMove:
        button, buttons = Qt.MouseButton.NoButton, LEFT
    elif kind == QEvent.Type.MouseButtonPress:
        button, buttons = LEFT, LEFT
    else:
        button, buttons = LEFT, Qt.MouseButton.NoButton
    ev = QMouseEvent(kind, QPointF(pos), canvas.mapToGlobal(QPointF(pos)), button, buttons, mods)
    QApplication.sendEvent(canvas, ev)


def drag(canvas, start, end, mods=NO_MOD, steps=6):
    start, end = QPointF(start), QPointF(end)
    _send(canvas, QEvent.Type.MouseButtonPress, start, mods)
    for k in range(1, steps + 1):
        _send(canvas, QEvent.Type.MouseMove, start + (end - start) * (k / steps), mods)
    _send(canvas, QEvent.Type.MouseButtonRelease, end, mods)


def click(canvas, pos, mods=NO_MOD):
    _send(canvas, QEvent.Type.MouseButtonPress, QPointF(pos), mods)
    _send(canvas, QEvent.Type.MouseButtonRelease, QPointF(pos), mods)


def screen(canvas, xy):
    return canvas.to_screen(float(xy[0]), float(xy[1]))
