"""Cutting in view (issue 13): the flattening and offset previews against the library's own
results, drawn on the canvas, and exported as verified cut files with the caution."""

from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
LETTERING = ROOT / "samples" / "signshop-lettering-defects.svg"
BRACKET = ROOT / "samples" / "workshop-bracket.svg"


def _doc(path):
    from outlinebench.io import load_svg

    return load_svg(str(path))


def test_flatten_preview_is_the_library_flattening_with_its_proven_bound():
    from outlinebench.app.cut_preview import flatten_preview
    from outlinebench.geometry import flatten_contours_bounded, polyline_deviation

    doc = _doc(LETTERING)
    fp = flatten_preview(doc, 0.05)
    contours = [r.contour for r in doc.contour_refs()]
    polys, bounds = flatten_contours_bounded(contours, 0.05)  # the reference: the library
    assert len(fp.polylines) == len(polys)
    for a, b in zip(fp.polylines, polys, strict=True):
        np.testing.assert_array_equal(a, b)
    assert fp.bound == float(bounds.max()) <= 0.05
    # Chord count: P vertices of a closed polyline make P chords, of an open one P - 1.
    want = sum(len(p) - (0 if c.closed else 1) for p, c in zip(polys, contours, strict=True))
    assert fp.chords == want
    # Where: an independent measurement of that contour (svgpathtools samples, dense).
    import svgpathtools

    k = fp.bound_contour
    c = contours[k]
    poly = polys[k]
    chain = np.vstack([poly, poly[:1]]) if c.closed else poly
    worst = 0.0
    for seg in c.segments:
        pts = [complex(*p) for p in seg]
        bez = {2: svgpathtools.Line, 3: svgpathtools.QuadraticBezier, 4: svgpathtools.CubicBezier}[
            len(pts)
        ](*pts)
        ts = np.linspace(0.0, 1.0, 400)
        samples = np.array([[bez.point(t).real, bez.point(t).imag] for t in ts])
        a, b = chain[:-1], chain[1:]
        ab = b - a
        t = np.clip(
            np.einsum("pij,ij->pi", samples[:, None, :] - a[None], ab)
            / np.einsum("ij,ij->i", ab, ab),
            0.0,
            1.0,
        )
        d = np.linalg.norm(samples[:, None, :] - (a[None] + t[..., None] * ab[None]), axis=2)
        worst = max(worst, float(d.min(axis=1).max()))
    # The sampled curve→polyline distance never exceeds the proven bound, and the measured
    # deviation the preview reports sits between the samples and the bound.
    assert worst <= fp.bound + 1e-9
    assert worst - 1e-4 <= fp.measured <= fp.bound + 1e-9
    ref = polyline_deviation(c.segments, poly, closed=c.closed, tolerance=0.05)
    assert (fp.where, fp.measured) == ((ref.x, ref.y), ref.distance)


def test_offset_preview_is_the_offset_command_rule():
    import shapely

    from outlinebench import api
    from outlinebench.app.cut_preview import offset_preview
    from outlinebench.geometry import flatten_contours

    doc = _doc(BRACKET)
    op = offset_preview(doc, 4.5, 0.01)
    # The preview is the library's region offset, exactly as outlinebench offset writes it.
    res = api.offset(doc, 4.5, tolerance=0.01)
    want = [np.asarray(t["points"], dtype=float) for t in res.toolpaths if len(t["points"]) >= 2]
    assert len(op.polylines) == len(want)
    for a, b in zip(op.polylines, want, strict=True):
        np.testing.assert_array_equal(a, b)
    # Independent reference: shapely's buffer of the flattened region (even-odd, the file's
    # fill rule) by 4.5 has the area of the toolpaths' region, within the flattening error
    # times the perimeter.
    outline = doc.outlines[0]
    rings = flatten_contours([(c.segments, c.closed) for c in outline.contours], 0.001)
    region = shapely.Polygon()
    for ring in rings:
        region = region.symmetric_difference(shapely.Polygon(ring))
    grown = region.buffer(4.5, quad_segs=256)
    paths = shapely.Polygon()
    for p in op.polylines:
        paths = paths.symmetric_difference(shapely.Polygon(p))
    assert abs(paths.area - grown.area) <= 0.02 * grown.length
    # The two Ø8 mm holes and the 8 mm wide slot close up for a 9 mm tool (radius 4.5):
    # material vanishes at all three (closed form: a hole of radius 4 offset inward by 4.5
    # has no area; so has a strip 8 wide offset by 4.5 from both sides).
    assert len(op.vanished) == 3


def _pixels(image, colour, tol=40):
    from PySide6.QtGui import QColor

    want = QColor(colour)
    arr = np.frombuffer(image.convertToFormat(image.Format.Format_RGB32).constBits(), np.uint8)
    arr = arr.reshape(image.height(), image.bytesPerLine() // 4, 4)[:, : image.width(), :3]
    target = np.array([want.blue(), want.green(), want.red()])
    return int((np.abs(arr.astype(int) - target).sum(axis=2) < tol).sum())


def test_previews_are_drawn_on_the_canvas_and_follow_an_edit(window, qtbot):
    from outlinebench.app.preview_painter import CHORD, OFFSET

    before = window.canvas.grab().toImage()
    assert _pixels(before, CHORD) == 0 and _pixels(before, OFFSET) == 0
    window.cutting.flatten_on.setChecked(True)
    window.cutting.offset_on.setChecked(True)
    assert window.flatten_result is not None and window.offset_result is not None
    after = window.canvas.grab().toImage()
    assert _pixels(after, CHORD) > 100 and _pixels(after, OFFSET) > 100
    text = window.cutting.flatten_info.text()
    assert f"{window.flatten_result.chords} chords" in text
    assert "proven largest deviation" in text
    # An edit: the preview is recomputed for the new document.
    old = window.flatten_result
    window.session.set_point((0, 0, 0, 0), 12.0, 52.0)
    qtbot.waitUntil(lambda: window.flatten_result is not old, timeout=3000)


def test_exported_cut_file_is_verified_carries_the_caution_and_spares_the_drawing(
    window, tmp_path, monkeypatch
):
    from outlinebench.io import CUT_CAUTION, load_svg

    drawing = tmp_path / "plate.svg"
    drawing.write_bytes(LETTERING.read_bytes())
    assert window.open_path(str(drawing), ask=False)
    out = tmp_path / "plate-cut.svg"
    monkeypatch.setattr(window, "choose_cut_path", lambda: str(out))
    assert window.export_cut_file("flatten")
    text = out.read_text(encoding="utf-8")
    assert CUT_CAUTION in text and "proven largest deviation" in text
    # Read back by an independent SVG library: the polylines are the preview's (mm, 1e-6).
    import svgelements

    svg = svgelements.SVG.parse(str(out))
    shapes = [
        e for e in svg.elements() if isinstance(e, (svgelements.Polyline, svgelements.Polygon))
    ]
    fp = window.flatten_result
    kept = [p for p in fp.polylines if len(p) >= 2]
    assert len(shapes) == len(kept)
    for shape, poly in zip(shapes, kept, strict=True):
        # svgelements gives CSS px (96 per inch, CSS Values and Units §5.2) through its own
        # mm→px factor 3.7795296 (rounded: 5.4e-7 relative); the sample's user unit is 1 mm,
        # the cut file's too.
        got = np.array([[p.x, p.y] for p in shape.points]) * (25.4 / 96.0)
        np.testing.assert_allclose(got[: len(poly)], poly, rtol=1e-6, atol=2e-6)
    # Never over the drawing itself.
    monkeypatch.setattr(window, "choose_cut_path", lambda: str(drawing))
    assert not window.export_cut_file("offset")
    assert window.dialog_log and "never replaces the drawing" in window.dialog_log[-1][1]
    assert drawing.read_bytes() == LETTERING.read_bytes()
    assert load_svg(str(drawing)).segment_count() > 0


def test_render_draws_what_the_editor_canvas_draws(qtbot, tmp_path):
    # `outlinebench render` paints with the editor's Canvas itself: its image and an editor
    # canvas of the same size, findings and comb are the same pixels.
    from PySide6.QtGui import QImage

    from outlinebench.app.canvas import Canvas
    from outlinebench.app.curvature_comb import auto_comb_scale
    from outlinebench.app.render import main as render
    from outlinebench.app.session import EditorSession
    from outlinebench.diagnostics import check_document

    out = tmp_path / "r.png"
    args = [str(LETTERING), "-o", str(out), "--findings", "--combs", "--size", "400x260"]
    assert render(args) == 0
    doc = _doc(LETTERING)
    canvas = Canvas(EditorSession(doc))
    qtbot.addWidget(canvas)
    canvas.resize(400, 260)
    canvas.show()
    qtbot.waitExposed(canvas)
    canvas.fit_to_outline()
    canvas.set_finding_marks([f for f in check_document(doc) if f.severity != "info"])
    canvas.set_comb(True, auto_comb_scale(doc))
    mine = canvas.grab().toImage().convertToFormat(QImage.Format.Format_RGB32)
    theirs = QImage(str(out)).convertToFormat(QImage.Format.Format_RGB32)
    assert (theirs.width(), theirs.height()) == (400, 260)
    assert mine == theirs
