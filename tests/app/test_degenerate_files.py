"""The editor does not crash on files whose paths have nothing to draw (issue 9, issue 13):
``d=""``, no ``d``, a lone ``M x y``, ``M x y Z``, zero-size rect and circle, and a file whose
contours are all degenerate. Each is opened, shown, checked, previewed, edited and rendered."""

import pytest
from PySide6.QtCore import QSettings

HEAD = '<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="50mm" viewBox="0 0 100 50">'
CASES = {
    # W3C SVG 1.1 §8.3.9 (path data error handling): an empty d renders nothing.
    "empty-d": '<path d=""/>',
    "no-d": "<path/>",
    # §8.3.2: a moveto alone starts a subpath with no segment.
    "lone-moveto": '<path d="M 10 10"/>',
    "moveto-close": '<path d="M 10 10 Z"/>',
    # §9.2 / §9.3: width or height 0 (rect), r 0 (circle) disable rendering.
    "zero-rect": '<rect x="5" y="5" width="0" height="10"/>',
    "zero-circle": '<circle cx="20" cy="20" r="0"/>',
    # All degenerate: every segment of zero length.
    "all-degenerate": (
        '<path d="M 30 30 L 30 30 L 30 30 Z"/><path d="M 40 40 C 40 40 40 40 40 40"/>'
    ),
    # One glyph per path, an empty one for a space, beside a real one.
    "glyph-with-space": (
        '<path id="space" d=""/><path id="i" d="M 60 10 L 64 10 L 64 40 L 60 40 Z"/>'
    ),
}


@pytest.fixture
def win(qtbot, tmp_path, monkeypatch):
    from outlinebench.app.main_window import MainWindow

    w = MainWindow(
        QSettings(str(tmp_path / "s.ini"), QSettings.Format.IniFormat),
        recovery_dir=tmp_path / "rec",
    )
    w.errors = []
    monkeypatch.setattr(w, "show_error", lambda title, text: w.errors.append((title, text)))
    monkeypatch.setattr(w, "ask_save_changes", lambda: "discard")
    qtbot.addWidget(w)
    w.resize(900, 600)
    w.show()
    qtbot.waitExposed(w)
    return w


@pytest.mark.parametrize("name", sorted(CASES))
def test_opening_showing_and_editing_an_empty_path_does_not_crash(win, qtbot, tmp_path, name):
    path = tmp_path / f"{name}.svg"
    path.write_text(HEAD + CASES[name] + "</svg>", encoding="utf-8")
    opened = win.open_path(str(path), ask=False)
    # Either opened, or refused with a message; never an exception out of the editor.
    assert opened or win.errors
    if not opened:
        return
    doc = win.session.document
    win.canvas.fit_to_outline()
    win.canvas.repaint()
    win.live.refresh()
    # A check that fails (the checker's own empty-path fault, issue 9) is shown in the
    # findings panel, never raised into the editor.
    assert win.live.error is None or "Check failed" in win.findings_panel.summary.text()
    win.set_comb_visible(True)
    win.cutting.flatten_on.setChecked(True)
    win.cutting.offset_on.setChecked(True)
    win.update_previews()
    win.canvas.repaint()
    win.session.select_all()
    for act in (win.act_reverse, win.act_close_contour, win.act_delete, win.act_toggle_join):
        if act.isEnabled():
            act.trigger()
    win.step_finding(1)
    win.canvas.zoom(8.0)
    win.canvas.repaint()
    win.session.undo()
    assert win.session.document.segment_count() == doc.segment_count()


@pytest.mark.parametrize("name", sorted(CASES))
def test_render_draws_an_empty_path_file(tmp_path, name, capsys):
    from outlinebench.app.render import main as render

    path = tmp_path / f"{name}.svg"
    path.write_text(HEAD + CASES[name] + "</svg>", encoding="utf-8")
    out = tmp_path / f"{name}.png"
    code = render([str(path), "-o", str(out), "--findings", "--combs", "--flatten", "0.05",
                   "--offset", "1", "--size", "200x120"])  # fmt: skip
    assert code == 0, capsys.readouterr().err
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # W3C PNG specification §5.2
