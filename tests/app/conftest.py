"""Shared fixtures of the editor tests: documents built in code and a window without dialogs."""

import pytest
from PySide6.QtCore import QSettings

import outlinebench.app  # noqa: F401  (first: guards None before Qt calls)
from outlinebench.model.document import Contour, Document, Outline


def lettering_document() -> Document:
    """An invented Harbour Lane Signs letter bowl: one closed contour with smooth and corner
    joins, plus an open stroke. Units: mm, 0.5 mm per user unit (viewBox twice the width)."""
    bowl = Contour.from_points(
        [
            [[10, 50], [10, 25], [30, 10], [50, 10]],
            [[50, 10], [70, 10], [90, 25], [90, 50]],
            [[90, 50], [60, 50]],
            [[60, 50], [60, 70], [40, 80], [20, 75]],
            [[20, 75], [10, 50]],
        ],
        closed=True,
        joins=("smooth", "smooth", "corner", None, "corner"),
    )
    stroke = Contour.from_points(
        [[[110, 20], [130, 0], [150, 40], [170, 20]], [[170, 20], [180, 40], [170, 60]]],
        closed=False,
        joins=(None,),
    )
    return Document(
        (Outline((bowl,), "bowl", 0), Outline((stroke,), "stroke", 1)),
        width_mm=100.0,
        height_mm=50.0,
        view_box=(0.0, 0.0, 200.0, 100.0),
        mm_per_unit=0.5,
        units="mm",
    )


@pytest.fixture
def window(qtbot, tmp_path, monkeypatch):
    """A main window showing ``lettering_document`` whose dialogs are replaced by recorders."""
    from outlinebench.app.main_window import MainWindow

    settings = QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat)
    win = MainWindow(settings)
    win.dialog_log = []
    monkeypatch.setattr(win, "show_error", lambda title, text: win.dialog_log.append((title, text)))
    monkeypatch.setattr(win, "ask_save_changes", lambda: win.dialog_log.append("ask") or "discard")
    qtbot.addWidget(win)
    win.resize(1100, 700)
    win.show()
    qtbot.waitExposed(win)
    win.session.load(lettering_document())
    win.canvas.fit_to_outline()
    return win
