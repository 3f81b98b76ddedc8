"""Repairs at hand (issues 11 "Editor" and 13): each finding's fix previewed with its measured
change before it is applied, applied as one undo step, refused with the document identical,
and "fix all findings of this kind" as one undo step.

The samples are the project's invented workshop bracket and sign-shop lettering (samples/,
written by samples/make_samples.py); both are in millimetres, one user unit per mm.
"""

import math
from pathlib import Path

import numpy as np
import pytest
from PySide6.QtCore import QSettings

ROOT = Path(__file__).resolve().parents[2]
BRACKET = ROOT / "samples" / "workshop-bracket-defects.svg"
LETTERING = ROOT / "samples" / "signshop-lettering-defects.svg"
DENSE = 400  # samples per segment for the independent measurement


def _open(window, path):
    assert window.open_path(str(path), ask=False)
    window.canvas.fit_to_outline()
    return window.session.document


def _find(window, kind, contour=None, join=None):
    for f in window.live.findings:
        if f.kind == kind and (contour is None or f.contour == contour):
            if join is None or f.join == join:
                return f
    raise AssertionError(f"no {kind} finding in the sample")


def _bernstein(seg, t):
    """Points of a Bézier segment by the Bernstein form (closed form, independent of the
    project's de Casteljau): B(t) = Σ C(n,i) (1−t)^(n−i) t^i P_i."""
    seg = np.asarray(seg, dtype=float)
    n = seg.shape[0] - 1
    t = t[:, None]
    return sum(math.comb(n, i) * (1 - t) ** (n - i) * t**i * seg[i] for i in range(n + 1))


def _dense(contours):
    t = np.linspace(0.0, 1.0, DENSE + 1)
    pts = np.vstack([_bernstein(s, t) for c in contours for s in c.segments])
    step = max(
        float(np.max(np.hypot(*np.diff(_bernstein(s, t), axis=0).T)))
        for c in contours
        for s in c.segments
    )
    return pts, step


def _sampled_hausdorff(old_contours, new_contours):
    """Reference: shapely.hausdorff_distance of dense samples of the old and new contours, and
    how far it can be from the true distance (one sample step: every curve point is within
    half a step of a sample, on either curve)."""
    import shapely

    a, sa = _dense(old_contours)
    b, sb = _dense(new_contours)
    h = shapely.hausdorff_distance(shapely.MultiPoint(a), shapely.MultiPoint(b))
    return h, max(sa, sb)


def _kink(window):
    # the planted kink of the bracket: contour 3, join 1, a 2.86° turn at a smooth join
    return _find(window, "kink", contour=3, join=1)


def test_preview_shows_the_measured_change_and_leaves_the_document(window):
    from outlinebench.app.fix_preview import change_text
    from outlinebench.model.document import documents_equal

    doc = _open(window, BRACKET)
    f = _kink(window)
    fp = window.preview_fix(f)
    assert fp is not None and fp.ok
    # nothing applied yet: the same document object, no undo step
    assert window.session.document is doc and not window.session.can_undo
    # the change shown is the proven bound, and the independent measurement agrees with it
    ref, slack = _sampled_hausdorff(fp.old_contours, fp.new_contours)
    assert fp.change_lower - slack <= ref <= fp.change + slack
    assert 0.0 < fp.change <= window.max_change_user()
    # the fix bar and the canvas show it, in the display unit (mm)
    u = window.session.units
    assert window.findings_panel.fix_bar.isVisibleTo(window.findings_panel)
    assert change_text(u, fp.change) in window.findings_panel.fix_text.text()
    assert change_text(u, fp.change).endswith(" mm")
    assert window.findings_panel.fix_apply.isVisibleTo(window.findings_panel)
    assert window.canvas.fix_preview is fp
    assert fp.note and fp.note in window.findings_panel.fix_text.text()
    # the new contour is the old one changed, the others are untouched (documents_equal of
    # the preview's document with the original fails only because of that contour)
    assert not documents_equal(fp.after, doc)
    assert len(fp.old_contours) == len(fp.new_contours) == 1
    # Cancel: the preview goes, the document is as it was
    window.findings_panel.fix_cancel.click()
    assert window.canvas.fix_preview is None and window.session.document is doc


def test_preview_draws_the_new_outline_on_the_canvas(window):
    from outlinebench.app.preview_painter import FIXED

    _open(window, BRACKET)

    def violet_pixels():
        img = window.canvas.grab().toImage()
        want = (FIXED.red(), FIXED.green(), FIXED.blue())
        n = 0
        for y in range(0, img.height(), 2):
            for x in range(0, img.width(), 2):
                c = img.pixelColor(x, y)
                if (
                    max(abs(c.red() - want[0]), abs(c.green() - want[1]), abs(c.blue() - want[2]))
                    < 40
                ):
                    n += 1
        return n

    before = violet_pixels()  # the violet is the fix's own colour (common practice, no source)
    window.preview_fix(_kink(window))
    during = violet_pixels()
    window.cancel_fix()
    assert before == 0 and during > 20 and violet_pixels() == 0


def test_apply_removes_the_finding_and_one_undo_restores(window):
    from outlinebench.diagnostics import check_document
    from outlinebench.model.document import documents_equal

    doc = _open(window, BRACKET)
    f = _kink(window)
    window.preview_fix(f)
    window.findings_panel.fix_apply.click()
    assert window.session.undo_label == "Fix kink (smooth-kinks)"
    new = window.session.document
    assert new is not doc
    # re-check with the library's whole-document check: the kink at contour 3, join 1 is gone
    left = check_document(new, window.live.settings)
    assert not any(g.kind == "kink" and g.contour == 3 and g.join == 1 for g in left)
    assert not window.findings_panel.fix_bar.isVisibleTo(window.findings_panel)
    window.session.undo()  # ONE undo step brings the design back
    assert documents_equal(window.session.document, doc)
    assert not window.session.can_undo


def test_refusal_past_the_allowed_change_leaves_the_document_identical(window):
    doc = _open(window, BRACKET)
    # the planted gap of the bracket is 0.25 mm wide: closing it moves the outline by more
    # than the default allowed change, 0.05 mm (the command line's repair default)
    f = _find(window, "gap")
    fp = window.preview_fix(f)
    assert fp is not None and not fp.ok
    assert "more than the allowed 0.050 mm" in fp.refusal
    assert fp.change is not None and fp.change > window.max_change_user()
    text = window.findings_panel.fix_text.text()
    assert "refused" in text and "0.050 mm" in text
    assert not window.findings_panel.fix_apply.isVisibleTo(window.findings_panel)
    assert window.canvas.fix_preview is None
    assert not window.apply_fix()
    assert window.session.document is doc and not window.session.can_undo


def test_refusal_when_no_repair_fixes_the_kind(window):
    doc = _open(window, LETTERING)
    fp = window.preview_fix(_find(window, "cusp"))
    assert fp is not None and not fp.ok and fp.refusal == "no repair fixes a cusp"
    assert "no repair fixes a cusp" in window.findings_panel.fix_text.text()
    assert window.session.document is doc and not window.session.can_undo


def test_allowed_change_setting_persists_and_lets_the_gap_close(window, tmp_path, qtbot):
    from outlinebench.api.repairing import DEFAULT_MAX_CHANGE_MM
    from outlinebench.app.main_window import MainWindow

    assert window.prefs.max_change_mm() == DEFAULT_MAX_CHANGE_MM  # the CLI's default
    _open(window, BRACKET)

    def fill(dlg):
        dlg.max_change.setValue(0.3)  # mm, the display unit
        return 1  # QDialog.Accepted

    window.run_dialog = fill
    assert window.edit_tolerances()
    assert float(window.settings.value("repair/max_change_mm")) == pytest.approx(0.3)
    fp = window.preview_fix(_find(window, "gap"))
    assert fp.ok and fp.change <= 0.3
    ref, slack = _sampled_hausdorff(fp.old_contours, fp.new_contours)
    assert fp.change_lower - slack <= ref <= fp.change + slack  # shapely, dense samples
    # a new window with the same settings file starts with it
    again = MainWindow(QSettings(window.settings.fileName(), QSettings.Format.IniFormat))
    qtbot.addWidget(again)
    assert again.prefs.max_change_mm() == pytest.approx(0.3)


def test_fix_all_of_a_kind_is_one_undo_step(window):
    from outlinebench.api.repairing import repair_document
    from outlinebench.diagnostics import check_document
    from outlinebench.model.document import documents_equal

    doc = _open(window, BRACKET)
    result = window.fix_all_of_kind(_kink(window))
    # the same outcome as the library's whole-document run of that repair kind
    ref = repair_document(doc, ["smooth-kinks"], max_change=window.max_change_user())
    assert result.fixed == sum(o.status == "fixed" for o in ref.outcomes) == 2
    assert result.refused >= 1  # the kink between two lines: only moving the point would do
    assert documents_equal(window.session.document, ref.document)
    assert result.largest <= window.max_change_user()
    assert "2 fixed" in window.statusBar().currentMessage()
    assert "2 fixed" in window.findings_panel.fix_text.text()  # stays in the fix bar
    kinks = [g for g in check_document(window.session.document) if g.kind == "kink"]
    assert len(kinks) == 1
    window.session.undo()
    assert documents_equal(window.session.document, doc) and not window.session.can_undo


def test_fix_all_in_the_selection_only(window):
    doc = _open(window, BRACKET)
    # select a point of contour 0 (no kinks there): nothing to fix in the selection
    window.session.set_selection([(0, 0, 0, 0)])
    result = window.fix_all_of_kind(_kink(window))
    assert result.fixed == 0 and result.command is None
    assert window.session.document is doc
    assert "1 selected contours" in window.statusBar().currentMessage()


def test_context_menu_offers_both_fixes(window):
    _open(window, BRACKET)
    panel = window.findings_panel
    f = _kink(window)
    row = next(r for r in range(panel.model.rowCount()) if panel.model.finding(r) is f)
    menu = panel.context_menu_for(row)
    texts = [a.text() for a in menu.actions()]
    assert texts == ["Fix this kink…", "Fix all kink findings"]
    menu.actions()[0].trigger()
    assert window.fix_preview is not None and window.fix_preview.finding is f


def test_stale_preview_is_dropped_after_an_edit(window):
    doc = _open(window, BRACKET)
    window.preview_fix(_kink(window))
    window.session.set_selection([(0, 0, 0, 0)])
    window.session.nudge(1, 0, False)
    assert window.session.document is not doc
    assert window.fix_preview is None and window.canvas.fix_preview is None


def test_preview_zooms_in_until_the_change_can_be_seen(window):
    from outlinebench.app.main_window import FIX_CHANGE_PX

    _open(window, BRACKET)
    before = window.canvas.view.scale
    fp = window.preview_fix(_kink(window))
    scale = window.canvas.view.scale
    assert scale > before  # 0.044 mm is far below a pixel at fit zoom
    # the change spans FIX_CHANGE_PX on screen, or the zoom stops where the changed contour
    # (control-point box) spans four canvas widths (common practice, no source)
    pts = np.vstack([s for c in fp.old_contours + fp.new_contours for s in c.segments])
    extent = float(np.max(pts.max(axis=0) - pts.min(axis=0)))
    assert fp.change * scale >= FIX_CHANGE_PX * (
        1 - 1e-9
    ) or extent * scale >= 4.0 * window.canvas.width() * (1 - 1e-9)
    # centred on the finding
    sx, sy = window.canvas.view.to_screen(fp.finding.x, fp.finding.y)
    assert abs(sx - window.canvas.width() / 2) < 1 and abs(sy - window.canvas.height() / 2) < 1


def test_a_shown_refusal_is_measured_again_when_the_allowed_change_grows(window):
    _open(window, BRACKET)
    fp = window.preview_fix(_find(window, "gap"))
    assert not fp.ok  # 0.25 mm > the default 0.05 mm

    def fill(dlg):
        dlg.max_change.setValue(0.3)
        return 1

    window.run_dialog = fill
    assert window.edit_tolerances()
    assert window.fix_preview is not None and window.fix_preview.ok
    assert window.findings_panel.fix_apply.isVisibleTo(window.findings_panel)


def _near_loop_document():
    """An invented workshop cover plate: a cubic whose start handle, turned 5.8° to meet the
    straight side before it (a kink), would swing the curve into a loop. mm, 1 unit per mm."""
    from outlinebench.model.document import Contour, Document, Outline

    plate = Contour.from_points(
        [
            [[50, 50], [64, 58], [54, 57], [60, 50]],
            [[60, 50], [60, 90]],
            [[60, 90], [32, 90]],
            [[32, 90], [32, 42]],
            [[32, 42], [50, 50]],
        ],
        closed=True,
        joins=(None, None, None, None, None),
    )
    return Document(
        (Outline((plate,), "plate", 0),),
        width_mm=100.0,
        height_mm=100.0,
        view_box=(0.0, 0.0, 100.0, 100.0),
        mm_per_unit=1.0,
        units="mm",
    )


def _is_simple(contour):
    """Reference: shapely's ``is_simple`` of the contour densely sampled by the Bernstein form
    (a ring that crosses itself is not simple)."""
    import shapely

    pts, _ = _dense([contour])
    return shapely.LineString(pts).is_simple


def test_single_fix_refused_when_it_would_add_a_worse_finding(window):
    from outlinebench.api.repairing import repair_document, repair_for_finding
    from outlinebench.app.fix_preview import preview_fix
    from outlinebench.app.units import display_units
    from outlinebench.diagnostics import Checker, CheckSettings

    doc = _near_loop_document()
    settings = CheckSettings()
    found = Checker(settings).update(doc)
    kink = next(f for f in found if f.kind == "kink")
    assert not any(f.kind == "self-intersection" for f in found)
    # what the smoothing alone would make: a contour that crosses itself (shapely says so),
    # where the original does not
    cmd = repair_for_finding(doc, kink, max_change=50.0, settings=settings)
    made = cmd.apply(doc).outlines[0].contours[0]
    assert _is_simple(doc.outlines[0].contours[0]) and not _is_simple(made)
    # the single fix is refused, as "fix all" (repair_document) refuses the same fix
    fp = preview_fix(doc, kink, max_change=50.0, units=display_units(doc), settings=settings)
    assert not fp.ok and fp.command is None and fp.after is None
    assert fp.refusal == "it would add a self-intersection finding in the same outline"
    run = repair_document(doc, ["smooth-kinks"], max_change=50.0, settings=settings)
    assert [(o.status, o.reason) for o in run.outcomes] == [("refused", fp.refusal)]
    # in the window (allowed change 50 mm): refused in the fix bar, nothing applied
    window.prefs.set_max_change_mm(50.0)
    window.session.load(doc)
    shown = next(f for f in window.live.findings if f.kind == "kink")
    assert window.preview_fix(shown).refusal == fp.refusal
    assert "refused" in window.findings_panel.fix_text.text()
    assert not window.apply_fix() and window.session.document is doc


def _end_turn_degrees(a, b):
    """Turn at the join of segments a → b from their end tangents (closed form: the last and
    first control-polygon legs are the end tangents of a Bézier segment, Farin ch. 5), by
    numpy's arctan2 of cross and dot products."""
    u = np.asarray(a[-1], float) - np.asarray(a[-2], float)
    v = np.asarray(b[1], float) - np.asarray(b[0], float)
    return abs(math.degrees(math.atan2(u[0] * v[1] - u[1] * v[0], float(np.dot(u, v)))))


def test_residual_turn_below_1e_9_degrees_reads_0(window):
    _open(window, BRACKET)
    f = _kink(window)
    fp = window.preview_fix(f)
    assert fp.ok
    # the smoothed join really has no turn left: its end tangents, measured independently
    for contour in fp.new_contours:
        i, k = contour.join_segments(f.join)
        assert _end_turn_degrees(contour.segments[i], contour.segments[k]) < 1e-9
    assert fp.command.residual_angle < 1e-9
    # so the note reads "→ 0°", never a rounding residue like 2.5e-14°
    text = window.findings_panel.fix_text.text()
    assert f"turn {f.value:.4g}° → 0°" in fp.note and fp.note in text
    assert "e-" not in fp.note and "e-" not in text


def test_a_residual_turn_on_the_grid_keeps_its_digits():
    from outlinebench.app.fix_preview import angle_text, fix_note
    from outlinebench.diagnostics import Checker, CheckSettings
    from outlinebench.model.repairs import SmoothKink

    # common practice, no source: three significant digits, zero below 1e-9°
    assert angle_text(2.5e-14) == "0°" and angle_text(-3e-10) == "0°"
    assert angle_text(0.333) == "0.333°" and angle_text(2.8617, 4) == "2.862°"
    doc = _near_loop_document()
    kink = next(f for f in Checker(CheckSettings()).update(doc) if f.kind == "kink")
    cmd = SmoothKink(0, 0, kink.join, max_change=50.0, grid=1.0)
    new = cmd.apply(doc)
    c = new.outlines[0].contours[0]
    i, k = c.join_segments(kink.join)
    left = _end_turn_degrees(c.segments[i], c.segments[k])  # measured independently
    assert left > 1e-3 and cmd.residual_angle == pytest.approx(left, rel=1e-9)
    assert fix_note(cmd, kink) == f"turn {kink.value:.4g}° → {left:.3g}° (best on the grid)"
