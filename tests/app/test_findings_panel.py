"""Findings list: the planted defects of a sample, live findings while dragging, clicking a row."""

import json
import math
from pathlib import Path

import numpy as np
import pytest
from PySide6.QtCore import QEvent, QPointF, Qt
from PySide6.QtTest import QTest
from PySide6.QtWidgets import QApplication
from qt_mouse import _send, screen

from outlinebench.app.findings_panel import COLUMNS
from outlinebench.cli import main as cli_main
from outlinebench.diagnostics import CheckSettings, check_document
from outlinebench.io import load_svg
from outlinebench.model.document import Contour, Document, Outline

VALUE = COLUMNS.index("Value")
SAMPLE = Path(__file__).resolve().parents[2] / "samples" / "signshop-lettering-defects.svg"


def _key(f):
    # Identity of a finding for comparing lists (value rounded: the CLI prints JSON floats).
    return (f["kind"], f["severity"], f["contour"], f["segment"], round(f["value"] or 0.0, 9))


def _cli_findings(capsys, path, *extra):
    """The command-line checker's findings of ``path`` (the outside reference)."""
    code = cli_main(["check", "--json", *extra, str(path)])
    assert code in (0, 1)
    out = json.loads(capsys.readouterr().out)
    report = out[0] if isinstance(out, list) else out
    if "files" in report:
        report = report["files"][0]
    return report["findings"]


@pytest.fixture
def sample_window(window):
    assert window.open_path(str(SAMPLE))
    return window


def test_sample_lists_every_planted_defect(sample_window, capsys):
    win = sample_window
    panel = win.findings_panel
    reference = _cli_findings(capsys, SAMPLE)
    # The same file read with outlinebench.io and checked directly agrees with the CLI.
    direct = check_document(load_svg(SAMPLE))
    assert sorted(_key(f._asdict()) for f in direct) == sorted(_key(f) for f in reference)
    # Info hidden (the default): exactly the warnings and errors, errors listed first.
    problems = [f for f in reference if f["severity"] != "info"]
    rows = [panel.model.finding(r) for r in range(panel.model.rowCount())]
    assert sorted(_key(f._asdict()) for f in rows) == sorted(_key(f) for f in problems)
    severities = [f.severity for f in rows]
    assert severities == sorted(severities, key=["error", "warning"].index)
    # The planted defects are all there (samples/README.md lists them).
    kinds = {f.kind for f in rows}
    planted = {"gap", "kink", "cusp", "self-intersection", "wrong-direction", "tiny-segment"}
    planted |= {"degenerate-handle", "curvature-jump", "open-contour"}
    assert planted <= kinds
    # The count line sums up every finding, hidden info ones included.
    n_err = sum(f["severity"] == "error" for f in reference)
    n_warn = sum(f["severity"] == "warning" for f in reference)
    n_info = sum(f["severity"] == "info" for f in reference)
    text = panel.summary.text()
    assert f"{n_err} errors" in text and f"{n_warn} warnings" in text and f"{n_info} info" in text
    # Show info: every finding of the CLI is listed.
    panel.show_info.setChecked(True)
    rows = [panel.model.finding(r) for r in range(panel.model.rowCount())]
    assert sorted(_key(f._asdict()) for f in rows) == sorted(_key(f) for f in reference)
    # The canvas frames what the list shows.
    assert len(win.canvas.finding_marks) == len(reference)


def test_values_are_shown_in_the_document_units(sample_window, capsys):
    panel = sample_window.findings_panel
    reference = _cli_findings(capsys, SAMPLE, "--units", "mm")
    gap_ref = next(f for f in reference if f["kind"] == "gap")
    row = next(r for r in range(panel.model.rowCount()) if panel.model.rows[r][0].kind == "gap")
    text = panel.model.cell_text(panel.model.rows[row][0], VALUE)
    # width="370mm" on a 370-unit viewBox: 1 user unit = 1 mm (SVG 1.1 §7.10).
    number, unit = text.split()
    assert unit == "mm"
    assert float(number) == pytest.approx(gap_ref["value"], abs=5e-4)  # shown to 0.001 mm
    kink = next(r for r in range(panel.model.rowCount()) if panel.model.rows[r][0].kind == "kink")
    assert panel.model.cell_text(panel.model.rows[kink][0], VALUE).endswith("°")


def test_clicking_a_finding_selects_and_centres_its_place(sample_window, qtbot):
    win = sample_window
    panel, canvas, s = win.findings_panel, win.canvas, win.session
    model = panel.model
    row = next(r for r in range(model.rowCount()) if model.finding(r).kind == "tiny-segment")
    f = model.finding(row)
    index = model.index(row, 1)
    rect = panel.view.visualRect(index)
    QTest.mouseClick(panel.view.viewport(), Qt.MouseButton.LeftButton, pos=rect.center())
    assert win.current_finding == f
    # The selected point is the on-curve point of that segment nearest to the finding.
    (key,) = s.selected_points()
    oi, ci, si, i = key
    doc = s.document
    pt = doc.outlines[oi].contours[ci].segments[si][i]
    seg = doc.outlines[0].contours[0].segments[f.segment]  # contour 0 is letter H
    ends = [seg[0], seg[-1]]
    nearest = min(ends, key=lambda p: math.hypot(p[0] - f.x, p[1] - f.y))
    np.testing.assert_allclose(pt, nearest)
    # Centred: the canvas centre shows the finding's place.
    cx, cy = canvas.to_doc(QPointF(canvas.width() / 2, canvas.height() / 2))
    assert cx == pytest.approx(f.x, abs=1e-9) and cy == pytest.approx(f.y, abs=1e-9)
    # Tiny (0.005 mm long): zoomed in until it spans PLACE_MIN_PX on screen.
    from outlinebench.app.canvas import PLACE_MIN_PX

    assert f.value * canvas.view.scale >= PLACE_MIN_PX - 1e-9
    # The picked finding is drawn doubled on the canvas.
    assert canvas.current_finding == f


def _s_curve_document() -> Document:
    """An invented Harbour Lane Signs swash: a line running into a cubic, tangent at (40, 50)
    (both leave along +x), no join intent stated. mm, 1 unit = 1 mm."""
    c = Contour.from_points(
        [[[0, 50], [40, 50]], [[40, 50], [60, 50], [80, 30], [80, 10]]],
        closed=False,
        joins=(None,),
    )
    return Document(
        (Outline((c,), "swash", 0),),
        width_mm=120.0,
        height_mm=80.0,
        view_box=(0.0, 0.0, 120.0, 80.0),
        mm_per_unit=1.0,
        units="mm",
    )


def test_dragging_a_point_opens_a_kink_live(window, qtbot):
    win, canvas, s = window, window.canvas, window.session
    s.load(_s_curve_document())
    canvas.fit_to_outline()
    assert not [f for f in win.live.findings if f.kind == "kink"]
    start = screen(canvas, (0.0, 50.0))
    end = start + QPointF(0.0, 12.0)  # down: the line now arrives at (40, 50) slanted
    _send(canvas, QEvent.Type.MouseButtonPress, start)
    for k in range(1, 5):
        _send(canvas, QEvent.Type.MouseMove, start + (end - start) * (k / 4))
    # Still dragging: the kink is already listed and framed on the canvas.
    assert s.history.in_group
    # (Checked at every move while checks are quick; else within THROTTLE_MS.)
    qtbot.waitUntil(lambda: win.live.document is s.document, timeout=2000)
    kink = next(f for f in win.live.findings if f.kind == "kink")
    assert kink in win.canvas.finding_marks
    # The list follows within its throttle interval (LIST_THROTTLE_MS), still mid-drag.
    model = win.findings_panel.model
    qtbot.waitUntil(lambda: any(f.kind == "kink" for f, _ in model.rows), timeout=2000)
    assert s.history.in_group
    # Its angle, measured independently: the turn between the line's direction and the
    # cubic's first handle, atan2 of the cross and dot products (closed form).
    c = s.document.outlines[0].contours[0]
    a = c.segments[0][1] - c.segments[0][0]
    b = c.segments[1][1] - c.segments[1][0]
    turn = math.degrees(abs(math.atan2(a[0] * b[1] - a[1] * b[0], float(np.dot(a, b)))))
    assert 0.5 < turn < 10.0  # between the default kink and corner angles
    assert kink.value == pytest.approx(turn, abs=1e-9)
    assert (kink.x, kink.y) == pytest.approx((40.0, 50.0))
    _send(canvas, QEvent.Type.MouseButtonRelease, end)
    # Undoing the drag removes the finding again.
    s.undo()
    qtbot.waitUntil(lambda: not any(f.kind == "kink" for f in win.live.findings), timeout=2000)


def test_tolerances_dialog_checks_again(sample_window, monkeypatch):
    win = sample_window

    def fill(dialog):
        dialog.kink.setValue(4.0)  # the O's 3.04° kink is now below the limit
        dialog.accept()
        return dialog.result()

    monkeypatch.setattr(win, "run_dialog", fill)
    assert win.edit_tolerances()
    ref = check_document(load_svg(SAMPLE), CheckSettings(kink_angle=4.0))
    assert sorted(win.live.findings) == sorted(ref)
    assert win.live.settings.kink_angle == 4.0

    def defaults(dialog):
        dialog.show_settings(CheckSettings())
        dialog.corner.setValue(0.2)  # not above the kink angle: refused, stays open
        dialog.accept()
        assert "kink angle < corner angle" in dialog.error_label.text()
        dialog.reject()
        return dialog.result()

    monkeypatch.setattr(win, "run_dialog", defaults)
    assert not win.edit_tolerances()
    assert win.live.settings.kink_angle == 4.0


def test_hovering_a_finding_mark_names_its_kind(sample_window, qtbot):
    from PySide6.QtGui import QHelpEvent
    from PySide6.QtWidgets import QApplication, QToolTip

    canvas = sample_window.canvas
    f = next(f for f in canvas.finding_marks if f.kind == "cusp")
    pos = screen(canvas, (f.x, f.y)).toPoint()
    ev = QHelpEvent(QEvent.Type.ToolTip, pos, canvas.mapToGlobal(pos))
    QApplication.sendEvent(canvas, ev)
    qtbot.waitUntil(QToolTip.isVisible, timeout=2000)
    assert "cusp" in QToolTip.text() and "error" in QToolTip.text()
    # The place in the CLI's numbering (diagnostics/report.py: "contour N, segment M").
    assert f"contour {f.contour}, segment {f.segment}" in QToolTip.text()
    QToolTip.hideText()


def test_next_finding_walks_the_list_in_order(sample_window):
    win = sample_window
    model = win.findings_panel.model
    order = [model.finding(r) for r in range(model.rowCount())]
    seen = [win.step_finding(1) for _ in range(len(order) + 1)]
    assert seen[:-1] == order and seen[-1] == order[0]  # wraps around
    assert win.step_finding(-1) == order[-1]
    assert win.canvas.current_finding == order[-1]


def test_marks_are_hit_where_the_findings_are(sample_window):
    from outlinebench.app.finding_marks import HIT_RADIUS_PX, finding_at

    canvas = sample_window.canvas
    marks = canvas.finding_marks
    gap = next(f for f in marks if f.kind == "gap")
    sx, sy = canvas.view.to_screen(gap.x, gap.y)
    hits = finding_at(canvas.view, marks, sx + 3.0, sy - 3.0)
    assert gap in hits
    assert hits[0].severity == "error"  # most serious first
    far = finding_at(canvas.view, marks, sx + 3 * HIT_RADIUS_PX, sy + 3 * HIT_RADIUS_PX)
    assert gap not in far


def test_many_findings_are_painted_plainly_and_all_counted(window):
    # 500 invented findings in a grid: above DENSE_FINDING_MARKS, painted from arrays.
    from PySide6.QtGui import QImage, QPainter

    from outlinebench.app.finding_marks import DENSE_FINDING_MARKS, paint_finding_marks
    from outlinebench.diagnostics import Finding

    fs = [
        Finding("kink", "warning", 0, 0, 0, 1.0, 10 + (k % 25) * 7, 5 + (k // 25) * 4, 2.0,
                "degrees", "kink")
        for k in range(500)
    ]  # fmt: skip
    assert len(fs) > DENSE_FINDING_MARKS
    canvas = window.canvas
    img = QImage(canvas.size(), QImage.Format.Format_ARGB32)
    img.fill(0)
    p = QPainter(img)
    drawn = paint_finding_marks(p, canvas.view, fs, canvas.width(), canvas.height())
    p.end()
    inside = [
        f for f in fs
        if -30 <= canvas.view.to_screen(f.x, f.y)[0] <= canvas.width() + 30
        and -30 <= canvas.view.to_screen(f.x, f.y)[1] <= canvas.height() + 30
    ]  # fmt: skip
    assert drawn == len(inside) > DENSE_FINDING_MARKS
    # Something was drawn in the warning colour (ochre) at a frame's edge.
    from outlinebench.app import style

    f = inside[0]
    sx, sy = canvas.view.to_screen(f.x, f.y)
    half = style.FINDING_SIZE["warning"]
    edge = [img.pixelColor(int(sx + dx), int(sy - half)).name() for dx in (-2, 0, 2)]
    assert style.FINDING_WARNING.name() in edge


def test_arrow_keys_in_the_list_show_each_finding(sample_window, qtbot):
    win = sample_window
    view, model = win.findings_panel.view, win.findings_panel.model
    view.setFocus()
    qtbot.waitUntil(view.hasFocus, timeout=2000)
    view.setCurrentIndex(model.index(0, 0))
    QTest.keyClick(view, Qt.Key.Key_Down)
    assert win.current_finding == model.finding(1)
    cx, cy = win.canvas.to_doc(QPointF(win.canvas.width() / 2, win.canvas.height() / 2))
    assert (cx, cy) == pytest.approx((model.finding(1).x, model.finding(1).y), abs=1e-9)


def test_list_count_and_canvas_show_the_same_check_during_a_drag(window, qtbot):
    win, canvas, s = window, window.canvas, window.session
    s.load(_s_curve_document())
    canvas.fit_to_outline()
    start = screen(canvas, (0.0, 50.0))
    end = start + QPointF(0.0, 12.0)
    _send(canvas, QEvent.Type.MouseButtonPress, start)
    for k in range(1, 5):
        _send(canvas, QEvent.Type.MouseMove, start + (end - start) * (k / 4))
        # No waiting: after every mouse move the rows listed are the findings framed on the
        # canvas (review item 12: both from the same check result).
        listed = [orig for _f, orig in win.findings_panel.model.rows]
        assert sorted(map(id, listed)) == sorted(map(id, win.canvas.finding_marks))
    # The check of the last move runs right after its frame (next event-loop turn).
    qtbot.waitUntil(lambda: win.live.document is s.document)
    listed = [orig for _f, orig in win.findings_panel.model.rows]
    assert sorted(map(id, listed)) == sorted(map(id, win.canvas.finding_marks))
    assert s.history.in_group
    assert any(f.kind == "kink" for f in win.canvas.finding_marks)
    warnings = sum(f.severity == "warning" for f in win.canvas.finding_marks)
    assert f"{warnings} warnings" in win.findings_panel.summary.text()
    _send(canvas, QEvent.Type.MouseButtonRelease, end)


def test_a_fault_in_a_check_is_logged_with_its_traceback(window, monkeypatch, caplog):
    import logging

    from outlinebench.diagnostics import Checker

    def broken(self, doc):
        raise ZeroDivisionError("planted fault")

    monkeypatch.setattr(Checker, "update", broken)
    with caplog.at_level(logging.ERROR, logger="outlinebench.app.live_findings"):
        window.live.refresh()
    assert "planted fault" in window.live.error
    rec = next(r for r in caplog.records if r.name == "outlinebench.app.live_findings")
    assert rec.exc_info is not None and rec.exc_info[0] is ZeroDivisionError


def test_during_a_drag_the_check_follows_the_frame_once_however_many_moves(window, qtbot):
    # Common practice, no source: the moved geometry is painted first and the live check runs
    # in the next event-loop turn; moves that arrive before it runs share one check.
    win, canvas, s = window, window.canvas, window.session
    s.load(_s_curve_document())
    canvas.fit_to_outline()
    QApplication.processEvents()
    start = screen(canvas, (0.0, 50.0))
    _send(canvas, QEvent.Type.MouseButtonPress, start)
    QApplication.processEvents()
    runs = win.live.checks_run
    for k in range(1, 4):  # three moves, no event-loop turn between them
        _send(canvas, QEvent.Type.MouseMove, start + QPointF(0.0, 4.0 * k))
    assert win.live.pending and win.live.checks_run == runs
    assert win.live.document is not s.document
    qtbot.waitUntil(lambda: win.live.document is s.document)
    assert win.live.checks_run == runs + 1
    # The findings are those of the moved document, as the batch check computes them.
    expected = check_document(s.document, win.live.settings)
    assert sorted((f.kind, f.segment, f.join) for f in win.live.findings) == sorted(
        (f.kind, f.segment, f.join) for f in expected
    )
    assert any(f.kind == "kink" for f in win.live.findings)
    _send(canvas, QEvent.Type.MouseButtonRelease, start + QPointF(0.0, 12.0))


def test_the_list_names_places_in_the_command_lines_words(sample_window, capsys):
    # Reference: the command line's own text lines (`outlinebench check`, one per finding,
    # "FILE: contour 5, join 5: kind ..."); the list's Where cells are the same words.
    code = cli_main(["check", str(SAMPLE)])
    assert code == 1
    lines = [ln for ln in capsys.readouterr().out.splitlines() if ": contour " in ln]
    cli_places = {ln.split(": ")[1] for ln in lines}
    panel = sample_window.findings_panel
    panel.show_info.setChecked(True)
    model = panel.model
    where = COLUMNS.index("Where")
    cells = {model.cell_text(model.rows[r][0], where) for r in range(model.rowCount())}
    assert cells == cli_places
    assert "contour 5, join 5" in cells  # the example


def test_the_position_column_is_readable_at_the_default_window_size(qtbot, tmp_path):
    from PySide6.QtCore import QSettings

    from outlinebench.app.main_window import DEFAULT_WINDOW_SIZE, MainWindow

    win = MainWindow(QSettings(str(tmp_path / "s.ini"), QSettings.Format.IniFormat))
    qtbot.addWidget(win)
    win.resize(*DEFAULT_WINDOW_SIZE)
    win.show()
    qtbot.waitExposed(win)
    assert win.open_path(str(SAMPLE), ask=False)
    view = win.findings_panel.view
    qtbot.waitUntil(lambda: view.viewport().width() > 0)
    # Every column at least as wide as its widest cell (Qt's own measure, sizeHintForColumn)
    # and all four inside the list's viewport: nothing cut off, no sideways scrolling.
    for c in range(len(COLUMNS)):
        assert view.columnWidth(c) >= view.sizeHintForColumn(c), COLUMNS[c]
    starts = [view.header().sectionPosition(c) for c in range(len(COLUMNS))]
    last = len(COLUMNS) - 1
    assert starts[last] + view.sizeHintForColumn(last) <= view.viewport().width()
    # At 1280 px the canvas keeps 40 % and the findings dock gives way (test_main_window).


@pytest.mark.parametrize("size", [(1280, 800), "default"])
def test_position_column_text_is_whole_and_in_view(qtbot, tmp_path, size):
    """Issue 13: the Position column readable at 1280 × 800 and at the default size — its
    longest text (font metrics) fits the column, and the column lies inside the list's
    viewport (no sideways scrolling to read it); the canvas keeps 40 % of the window (common
    practice, no source; review item 11)."""
    from PySide6.QtCore import QSettings

    from outlinebench.app.main_window import DEFAULT_WINDOW_SIZE, MainWindow

    w, h = DEFAULT_WINDOW_SIZE if size == "default" else size
    win = MainWindow(QSettings(str(tmp_path / "s.ini"), QSettings.Format.IniFormat))
    qtbot.addWidget(win)
    win.resize(w, h)
    win.show()
    qtbot.waitExposed(win)
    assert win.open_path(str(SAMPLE), ask=False)
    panel = win.findings_panel
    panel.show_info.setChecked(True)
    view, model = panel.view, panel.model
    qtbot.wait(50)  # the dock layout settles after the first frames
    col = COLUMNS.index("Position")
    fm = view.fontMetrics()
    texts = [model.cell_text(model.rows[r][0], col) for r in range(model.rowCount())]
    longest = max(texts, key=fm.horizontalAdvance)
    # Qt elides a cell whose text is wider than the column less its margins (3 px a side)
    assert fm.horizontalAdvance(longest) + 6 <= view.columnWidth(col), longest
    start = view.header().sectionViewportPosition(col)
    assert start + fm.horizontalAdvance(longest) + 6 <= view.viewport().width()
    for c in range(len(COLUMNS)):  # every column whole by Qt's own measure
        assert view.columnWidth(c) >= view.sizeHintForColumn(c), COLUMNS[c]
    assert view.horizontalScrollBar().maximum() == 0  # nothing beyond the viewport
    assert win.canvas.width() >= 0.4 * w
