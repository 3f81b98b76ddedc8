"""Check profiles: type and cutting tolerances and severities, each rule against its source."""

from __future__ import annotations

import sys
from collections import Counter
from pathlib import Path

import pytest
from fontTools.fontBuilder import FontBuilder
from fontTools.pens.areaPen import AreaPen
from fontTools.pens.ttGlyphPen import TTGlyphPen
from fontTools.ttLib import TTFont

from outlinebench.diagnostics import CheckSettings, check_document
from outlinebench.diagnostics.findings import ERROR, INFO, WARNING
from outlinebench.diagnostics.profiles import (
    CUTTING,
    TYPE,
    apply_profile,
    check_with_profile,
    default_profile_name,
    direction_convention,
    get_profile,
    profile_settings,
)
from outlinebench.io.font_read import read_font
from outlinebench.model.document import Contour, Document, Outline

sys.path.insert(0, str(Path(__file__).parents[1] / "io"))
from font_cases import build_otf, build_ttf, build_ufo  # noqa: E402


def _polygon(points) -> Contour:
    n = len(points)
    return Contour.from_points([[points[i], points[(i + 1) % n]] for i in range(n)], closed=True)


def _square(x0, y0, x1, y1) -> Contour:
    # clockwise on screen (y down): positive signed area
    return _polygon([(x0, y0), (x1, y0), (x1, y1), (x0, y1)])


def _doc(*contours: Contour) -> Document:
    return Document((Outline(tuple(contours), "part", 0),))


def _kinds(findings) -> Counter:
    return Counter((f.kind, f.severity) for f in findings if f.kind != "corner")


@pytest.fixture(scope="module")
def fonts(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    d = tmp_path_factory.mktemp("profile-fonts")
    return {
        "ttf": build_ttf(d / "w.ttf"),
        "otf": build_otf(d / "w.otf"),
        "ufo": build_ufo(d / "w.ufo"),
    }


def test_profiles_by_name_and_default_by_input(fonts: dict[str, Path]) -> None:
    # the rule: fonts → type, SVG → cutting
    assert get_profile("type") is TYPE and get_profile("cutting") is CUTTING
    with pytest.raises(ValueError, match="choose one of: type, cutting"):
        get_profile("engraving")
    assert default_profile_name("sign.svg") == "cutting"
    assert [default_profile_name(p) for p in fonts.values()] == ["type"] * 3
    assert default_profile_name(read_font(fonts["otf"]).document) == "type"
    assert default_profile_name(Document()) == "cutting"


def test_type_tolerances_are_in_font_units(fonts: dict[str, Path]) -> None:
    doc = read_font(fonts["ttf"]).document
    s = profile_settings("type", doc)
    # 0.5, 10 and 1 font unit, one unit read as 25.4 / 96 mm (CSS px, CSS Values §5.2)
    assert s.gap_mm == pytest.approx(0.5 * 25.4 / 96)
    assert s.gap_search_mm == pytest.approx(10 * 25.4 / 96)
    assert s.extremum_overshoot_mm == pytest.approx(25.4 / 96)
    assert s.curvature_jump_severity == INFO
    # cutting keeps today's defaults exactly
    assert profile_settings("cutting", doc) == CheckSettings()


def test_touching_contours_are_one_finding() -> None:
    # Two squares meeting corner to corner: the crossing test sees four segment pairs meet
    # at (100, 100) ("crossings" at 0° and 90°). Common practice, no source: one touch.
    doc = _doc(_square(0, 0, 100, 100), _square(100, 100, 200, 200))
    today = check_document(doc)
    assert _kinds(today) == {("self-intersection", ERROR): 4}
    assert apply_profile(today, "cutting", doc) == today  # cutting keeps today's findings
    typed = apply_profile(today, "type", doc, grid_step=None)
    assert _kinds(typed) == {("touch", INFO): 1}
    (touch,) = [f for f in typed if f.kind == "touch"]
    assert (touch.x, touch.y) == (100.0, 100.0) and "without crossing" in touch.message


def test_overlapping_contours_are_info_for_type() -> None:
    # Two squares overlapping: two true crossings (at (100, 50) and (50, 100)); a glyph with
    # overlapping contours fills by the non-zero rule (OpenType "glyf"), so one info finding
    # for the pair; a cutter would cut into both, so cutting keeps two errors.
    doc = _doc(_square(0, 0, 100, 100), _square(50, 50, 150, 150))
    today = check_document(doc)
    assert _kinds(today) == {("self-intersection", ERROR): 2}
    typed = apply_profile(today, "type", doc, grid_step=None)
    assert _kinds(typed) == {("overlap", INFO): 1}
    assert "crossing at 2 point(s)" in next(f.message for f in typed if f.kind == "overlap")


def test_a_contour_touching_itself_is_one_warning_and_crossing_itself_stays_an_error() -> None:
    # The vertex (50, 0) of this contour lies on its own first edge, approached from above
    # on both sides: a pinch, not a crossing (common practice, no source: a warning).
    pinch = _polygon([(0, 0), (100, 0), (100, 100), (60, 100), (50, 0), (40, 100), (0, 100)])
    doc = _doc(pinch)
    typed = apply_profile(check_document(doc), "type", doc, grid_step=None)
    assert _kinds(typed) == {("touch", WARNING): 1}
    # A figure eight crosses itself at (50, 50): the crossing stays an error.
    eight = _polygon([(0, 0), (100, 100), (100, 0), (0, 100)])
    doc = _doc(eight)
    typed = apply_profile(check_document(doc), "type", doc, grid_step=None)
    assert _kinds(typed)[("self-intersection", ERROR)] == 1
    assert ("touch", WARNING) not in _kinds(typed)


def test_curvature_jumps_are_info_and_missing_extrema_warnings_for_type() -> None:
    # A quadratic bulge (0, 0) (50, −40) (100, 0): its y extremum −20 at t = ½ lies 20 units
    # beyond its ends (closed form: y(½) = ½·(−40)), so it is missing an extremum point.
    bulge = Contour.from_points(
        [[(0, 0), (50, -40), (100, 0)], [(100, 0), (100, 50)], [(100, 50), (0, 50)],
         [(0, 50), (0, 0)]],
        closed=True,
    )  # fmt: skip
    doc = _doc(bulge)
    today = check_document(doc)
    assert ("missing-extremum", INFO) in _kinds(today)  # today's severity (findings.py)
    typed = apply_profile(today, "type", doc, grid_step=None)
    assert ("missing-extremum", WARNING) in _kinds(typed)  # common practice, no source
    # A curvature jump between two arcs of different radius meeting tangentially.
    k = 0.5522847498  # cubic quarter-circle handle ratio (closed form 4(√2 − 1)/3)
    arcs = Contour.from_points(
        [
            [(0, 0), (0, -k * 50), (50 - k * 50, -50), (50, -50)],  # r = 50
            [(50, -50), (50 + k * 100, -50), (150, -50 + k * 100), (150, 50)],  # r = 100
            [(150, 50), (0, 50)],
            [(0, 50), (0, 0)],
        ],
        closed=True,
    )
    doc = _doc(arcs)
    today = check_document(doc)
    jumps = [f for f in today if f.kind == "curvature-jump"]
    assert jumps and jumps[0].severity == WARNING  # today: warning between two curves
    typed = apply_profile(today, "type", doc, grid_step=None)
    assert all(f.severity == INFO for f in typed if f.kind == "curvature-jump")


def _ft_area(path: Path, glyph: str) -> float:
    gs = TTFont(path).getGlyphSet()
    pen = AreaPen(gs)
    gs[glyph].draw(pen)
    return pen.value


def test_direction_follows_the_format(fonts: dict[str, Path]) -> None:
    # OpenType "glyf": TrueType outer contours run clockwise; "CFF" (Type 1 convention) and
    # UFO sources counter-clockwise. fontTools' AreaPen gives the reference turning sense:
    # its value is negative for a clockwise contour in the font's y-up frame.
    assert _ft_area(fonts["ttf"], "plaque") > 0  # plaque drawn counter-clockwise
    assert _ft_area(fonts["ttf"], "peg") > 0
    ttf = read_font(fonts["ttf"]).document
    assert direction_convention(ttf) == "clockwise"
    _, found = check_with_profile(ttf)
    wrong = {(ttf.outlines[f.outline].element_id, f.severity) for f in found
             if f.kind == "wrong-direction"}  # fmt: skip
    # counter-clockwise outer contours are wrong for TrueType: plaque, peg, the bracket's
    # two pegs, the tag's plaque (its peg lies inside the plaque, so it is no outer contour)
    assert wrong == {("plaque", WARNING), ("peg", WARNING), ("bracket", WARNING),
                     ("tag", WARNING)}  # fmt: skip
    # the washer's outer ring runs clockwise: fine
    assert _ft_area(fonts["ttf"], "washer") < 0
    otf = read_font(fonts["otf"]).document
    assert direction_convention(otf) == "counter-clockwise"
    _, found = check_with_profile(otf)
    wrong = {otf.outlines[f.outline].element_id for f in found if f.kind == "wrong-direction"}
    assert "plaque" not in wrong and "peg" not in wrong
    # cutting does not judge outer direction at all (today's behaviour)
    _, found = check_with_profile(otf, "cutting")
    assert not [f for f in found if f.kind == "wrong-direction" and f.other_contour is None]


def test_nested_components_winding_alike_are_an_overlap(fonts: dict[str, Path]) -> None:
    # The tag is a plaque with a half-size peg inside it, both components winding the same
    # way: by the non-zero rule the peg adds nothing (OpenType "glyf"); no hole was meant.
    doc = read_font(fonts["ufo"], glyphs="tag").document
    today = check_document(doc, profile_settings("type", doc))
    assert [f.severity for f in today if f.kind == "wrong-direction"] == [ERROR]
    typed = apply_profile(today, "type", doc)
    assert [f.kind for f in typed if f.other_contour is not None] == ["overlap"]
    assert not [f for f in typed if f.kind == "wrong-direction"]


def _kink_font(path: Path, lift: int) -> Path:
    """A TrueType font with one glyph whose bottom edge bends up by ``lift`` units at x = 60."""
    fb = FontBuilder(1000, isTTF=True)
    fb.setupGlyphOrder([".notdef", "bar"])
    fb.setupCharacterMap({0x42: "bar"})
    glyphs = {}
    for name in (".notdef", "bar"):
        pen = TTGlyphPen(None)
        if name == "bar":  # clockwise in the font: up the left side first
            for i, p in enumerate([(0, 0), (0, 100), (600, 100), (600, 0), (60, lift)]):
                (pen.moveTo if i == 0 else pen.lineTo)(p)
            pen.closePath()
        glyphs[name] = pen.glyph()
    fb.setupGlyf(glyphs)
    fb.setupHorizontalMetrics({".notdef": (500, 0), "bar": (600, 0)})
    fb.setupHorizontalHeader(ascent=800, descent=-200)
    fb.setupNameTable({"familyName": "Kink Test", "styleName": "Regular"})
    fb.setupOS2()
    fb.setupPost()
    fb.save(str(path))
    return path


@pytest.mark.parametrize(
    ("lift", "kind", "severity"), [(1, "grid-kink", INFO), (2, "kink", WARNING)]
)
def test_rounding_kinks_are_grid_kinks_for_type(tmp_path: Path, lift, kind, severity) -> None:
    # The bottom edge runs (600, 0) → (60, lift) → (0, 0); the turn at (60, lift) is
    # atan(lift/540) + atan(lift/60) (closed form): 1.06° for lift 1, 2.12° for lift 2, both
    # kinks (0.5° … 10°). Lift 1 is what rounding a straight edge can give (the point is one
    # grid unit off the chord, the boundary of the rule); lift 2 is not.
    import math

    path = _kink_font(tmp_path / f"k{lift}.ttf", lift)
    doc = read_font(path, glyphs="bar").document
    found = check_document(doc, profile_settings("type", doc))
    at = [f for f in found if f.x == 60.0 and f.join is not None]
    expect = math.degrees(math.atan(lift / 540) + math.atan(lift / 60))
    assert [(f.kind, round(f.value, 9)) for f in at] == [("kink", round(expect, 9))]
    typed = apply_profile(found, "type", doc)
    at = [f for f in typed if f.x == 60.0 and f.join is not None]
    assert [(f.kind, f.severity) for f in at] == [(kind, severity)]


def test_touch_and_crossing_through_a_node_are_told_apart() -> None:
    # Closed-form geometry: the line x + y = 200 meets the square 0…100 only at its corner
    # (100, 100), where x + y is largest: a touch. The line y = x runs through the same
    # corner from inside the square to outside: a crossing (plus the crossing of the
    # triangle's bottom edge with the square's right side at (100, 50)).
    square = _square(0, 0, 100, 100)
    touching = _polygon([(50, 150), (150, 50), (200, 200)])
    doc = _doc(square, touching)
    typed = apply_profile(check_document(doc), "type", doc, grid_step=None)
    assert _kinds(typed) == {("touch", INFO): 1}
    crossing = _polygon([(50, 50), (150, 150), (150, 50)])
    doc = _doc(square, crossing)
    typed = apply_profile(check_document(doc), "type", doc, grid_step=None)
    assert _kinds(typed) == {("overlap", INFO): 1}
    assert "crossing at 2 point(s)" in next(f.message for f in typed if f.kind == "overlap")
