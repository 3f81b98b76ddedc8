"""Nothing lost: unsaved work goes to a recovery file a few seconds after each change, and the
next start offers it back (issue 13). The crash is real: an editor process killed with
SIGKILL, which no handler can catch."""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from PySide6.QtCore import QSettings

ROOT = Path(__file__).resolve().parents[2]
SAMPLE = ROOT / "samples" / "workshop-bracket.svg"
# Autosave delay used by these tests (the editor's own is AUTOSAVE_MS, 3 s): short so the
# tests are quick, long enough that two edits 0.1 s apart are written once.
INTERVAL_MS = 400

EDITOR = r"""
import os, sys
os.environ["QT_QPA_PLATFORM"] = "offscreen"
from PySide6.QtCore import QSettings, QTimer
from PySide6.QtWidgets import QApplication
app = QApplication([])
from outlinebench.app.main_window import MainWindow
ini, rec, drawing, interval = sys.argv[1], sys.argv[2], sys.argv[3], int(sys.argv[4])
win = MainWindow(QSettings(ini, QSettings.Format.IniFormat), recovery_dir=rec,
                 autosave_ms=interval)
win.show()
assert win.open_path(drawing, ask=False)
def first():
    win.session.set_point((0, 0, 0, 0), 12.3, 45.6)
    print("EDIT1", flush=True)
def second():
    win.session.set_point((0, 1, 0, 0), 31.4, 15.9)
    print("EDIT2", flush=True)
QTimer.singleShot(100, first)
QTimer.singleShot(100 + 3 * interval, second)
app.exec()
"""


def _editor(tmp_path, drawing):
    return subprocess.Popen(
        [sys.executable, "-c", EDITOR, str(tmp_path / "s.ini"), str(tmp_path / "rec"),
         str(drawing), str(INTERVAL_MS)],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, cwd=ROOT,
        env={**os.environ, "QT_QPA_PLATFORM": "offscreen"},
    )  # fmt: skip


def _wait_line(proc, word, timeout=30.0):
    t0 = time.monotonic()
    while time.monotonic() - t0 < timeout:
        line = proc.stdout.readline()
        if word in line:
            return time.monotonic()
        if not line and proc.poll() is not None:
            break
    raise AssertionError(f"the editor never printed {word}: {proc.stderr.read()}")


@pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="SIGKILL is POSIX")
def test_killed_editor_loses_nothing_older_than_the_interval(qtbot, tmp_path, monkeypatch):
    drawing = tmp_path / "bracket.svg"
    drawing.write_bytes(SAMPLE.read_bytes())
    proc = _editor(tmp_path, drawing)
    try:
        _wait_line(proc, "EDIT1")
        _wait_line(proc, "EDIT2")
        # Killed at once after the second edit: it is younger than the interval, the first
        # is 3 intervals old and must be in the recovery file.
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=10)
    finally:
        if proc.poll() is None:
            proc.kill()
        proc.stdout.close()
        proc.stderr.close()
    assert proc.returncode == -signal.SIGKILL
    rec_dir = tmp_path / "rec"
    assert len(sorted(rec_dir.glob("*.svg"))) == 1
    assert drawing.read_bytes() == SAMPLE.read_bytes()  # the drawing itself untouched

    # The next start: offered, restored as unsaved work on the original file.
    from outlinebench.app.main_window import MainWindow

    win = MainWindow(
        QSettings(str(tmp_path / "s2.ini"), QSettings.Format.IniFormat),
        recovery_dir=rec_dir,
        autosave_ms=INTERVAL_MS,
    )
    qtbot.addWidget(win)
    asked = []
    monkeypatch.setattr(win, "ask_restore", lambda rec: asked.append(rec) or "restore")
    assert win.offer_recovery()
    assert len(asked) == 1 and asked[0].original == str(drawing)
    assert win.path == str(drawing) and win.session.is_dirty
    p = win.session.document.outlines[0].contours[0].segments[0][0]
    assert (float(p[0]), float(p[1])) == (12.3, 45.6)  # the first edit, exactly (typed values)
    # The old pair is gone; this window's own recovery file holds the work now.
    assert [r.name for r in rec_dir.glob("*.svg")] == [win.recovery.svg.name]
    # Saved: the recovery file is removed.
    assert win.save()
    assert not list(rec_dir.glob("*.svg")) and not list(rec_dir.glob("*.json"))
    from outlinebench.io import load_svg

    saved = load_svg(str(drawing)).outlines[0].contours[0].segments[0][0]
    assert (float(saved[0]), float(saved[1])) == (12.3, 45.6)


def test_discarding_removes_the_recovery_file(qtbot, tmp_path, monkeypatch):
    from outlinebench.app.main_window import MainWindow

    drawing = tmp_path / "bracket.svg"
    drawing.write_bytes(SAMPLE.read_bytes())
    settings = QSettings(str(tmp_path / "s.ini"), QSettings.Format.IniFormat)
    win = MainWindow(settings, recovery_dir=tmp_path / "rec", autosave_ms=INTERVAL_MS)
    qtbot.addWidget(win)
    assert win.open_path(str(drawing), ask=False)
    win.session.set_point((0, 0, 0, 0), 5.0, 6.0)
    qtbot.waitUntil(lambda: win.recovery.exists, timeout=5000)
    monkeypatch.setattr(win, "ask_save_changes", lambda: "discard")
    assert win.maybe_save()
    assert not win.recovery.exists and not win.recovery.meta.exists()
    # Undoing back to the saved state also leaves nothing to recover.
    win.session.set_point((0, 0, 0, 0), 7.0, 8.0)
    qtbot.waitUntil(lambda: win.recovery.exists, timeout=5000)
    win.session.undo()
    assert not win.session.is_dirty and not win.recovery.exists


def test_a_long_drag_is_written_while_it_goes_on(qtbot, tmp_path):
    from outlinebench.app.main_window import MainWindow
    from outlinebench.model.commands import MovePoints, PointRef

    win = MainWindow(
        QSettings(str(tmp_path / "s.ini"), QSettings.Format.IniFormat),
        recovery_dir=tmp_path / "rec",
        autosave_ms=200,
    )
    qtbot.addWidget(win)
    assert win.open_path(str(SAMPLE), ask=False)
    h = win.session.history
    h.begin_group("Move points")
    t0 = time.monotonic()
    while time.monotonic() - t0 < 1.0:  # moves every 20 ms for a second: never a pause
        h.do(MovePoints([PointRef(0, 0, 0, 0)], (0.1, 0.0)))
        qtbot.wait(20)
    assert h.in_group
    # A timer restarted by each move would never fire; this one fires every 200 ms.
    assert win.recovery.writes >= 2
    h.end_group()
    win.session.mark_saved()  # closing the test window asks nothing
    assert not win.recovery.exists


def test_stale_files_of_running_editors_are_not_offered(tmp_path):
    from outlinebench.app.recovery import RecoveryStore, stale_recoveries
    from outlinebench.io import load_svg

    store = RecoveryStore(tmp_path)
    store.write(load_svg(str(SAMPLE)), str(SAMPLE))
    assert stale_recoveries(tmp_path) == []  # this process is alive
