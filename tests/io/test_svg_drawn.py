"""The reader reads the drawing a renderer draws (issue "never silently wrong").

Each test is named after the section of the W3C standard it checks; the expected geometry is
worked out from that section by hand (in the comment beside it) and, where the case renders,
compared with an independent renderer from the registries: resvg (resvg_py, user language
"en" as ours), whose coverage image gives the filled area and the box of the drawing in
pixels. One user unit is one pixel in these files (width = height = 200, no viewBox on the
root unless said). resvg does not implement the CSS ``transform`` property nor the SVG 2
geometry properties in CSS (checked: it draws those shapes untransformed, or not at all), so
those cases are checked against the hand-worked geometry alone (``agree_with_standard``).
"""

from __future__ import annotations

import io

import numpy as np
import pytest
import resvg_py
from PIL import Image

from outlinebench.geometry import signed_area
from outlinebench.io import read_svg

NS = 'xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink"'


def svg(body: str, root: str = 'width="200" height="200"') -> str:
    return f"<svg {NS} {root}>{body}</svg>"


def rendered(text: str) -> tuple[float, tuple[float, float, float, float] | None]:
    """resvg's drawing: (filled area in px², box of the covered pixels or None)."""
    png = resvg_py.svg_to_bytes(svg_string=text, skip_system_fonts=True, languages=["en"])
    alpha = np.asarray(Image.open(io.BytesIO(bytes(png))).convert("RGBA"))[:, :, 3] / 255.0
    area = float(alpha.sum())
    ys, xs = np.nonzero(alpha > 0.5)
    if xs.size == 0:
        return area, None
    return area, (float(xs.min()), float(ys.min()), float(xs.max() + 1), float(ys.max() + 1))


def ours(text: str) -> tuple[float, tuple[float, float, float, float] | None, list]:
    """Our reading: (sum of the contours' enclosed areas, their box, the notes)."""
    res = read_svg(text.encode())
    area = 0.0
    pts = []
    for o in res.document.outlines:
        for c in o.contours:
            if c.segments:
                area += abs(float(signed_area(list(c.segments))))
                pts.extend(np.vstack(c.segments))
    if not pts:
        return area, None, res.all_notes
    p = np.array(pts)
    return area, (p[:, 0].min(), p[:, 1].min(), p[:, 0].max(), p[:, 1].max()), res.all_notes


def agree_with_renderer(text: str, area: float, box: tuple[float, float, float, float]) -> None:
    """Our area and box equal the hand-worked ones, and resvg draws the same (anti-aliased
    edges: area within 1 % and box within a pixel)."""
    a, b, _ = ours(text)
    assert a == pytest.approx(area, rel=1e-9)
    np.testing.assert_allclose(b, box, atol=1e-9)
    ra, rb = rendered(text)
    assert ra == pytest.approx(area, rel=0.01)
    assert rb is not None
    np.testing.assert_allclose(rb, box, atol=1.0)


def agree_with_standard(text: str, area: float, box: tuple[float, float, float, float]) -> None:
    """Our area and box equal the ones worked out from the standard by hand."""
    a, b, _ = ours(text)
    assert a == pytest.approx(area, rel=1e-9)
    np.testing.assert_allclose(b, box, atol=1e-9)


def errors(notes) -> list[str]:
    return [n.message for n in notes if n.level == "error"]


# -- SVG 2 §5.6 "The 'use' element" ---------------------------------------------------------
def test_use_5_6_a_use_of_a_use_is_a_chain_not_a_cycle():
    # §5.6: the referenced element of a use may itself be a use; each adds its x, y.
    # The rect 10×20 at (0, 0) moves by 30 + 40 = 70 in x and 5 in y.
    text = svg(
        '<defs><rect id="r" width="10" height="20"/><use id="u1" href="#r" x="30"/></defs>'
        '<use href="#u1" x="40" y="5"/>'
    )
    agree_with_renderer(text, 200.0, (70, 5, 80, 25))
    assert not errors(ours(text)[2])


def test_use_5_6_a_use_of_its_own_ancestor_is_an_error_for_that_use_only():
    # §5.6.2 (SVG 2): a use whose referenced element is the use or one of its ancestors is a
    # circular reference, an error; that use draws nothing; the rest of the group draws.
    text = svg('<g id="g"><rect x="10" y="10" width="30" height="30"/><use href="#g"/></g>')
    a, b, notes = ours(text)
    assert a == 900.0 and b == (10, 10, 40, 40)
    (msg,) = errors(notes)
    assert "use cycle" in msg and "<use>" in msg
    ra, _ = rendered(text)
    assert ra == pytest.approx(900.0, rel=0.01)  # resvg too draws the square once


def test_use_5_6_a_cycle_through_defs_blanks_only_the_use_that_closes_it():
    # a → group A holding a rect and a use of group B; B holds a rect and a use of A: the
    # use inside B closes the cycle and draws nothing; both rects draw once through the
    # outer use (10×10 each).
    text = svg(
        '<defs><g id="A"><rect width="10" height="10"/><use href="#B"/></g>'
        '<g id="B"><rect x="20" width="10" height="10"/><use href="#A"/></g></defs>'
        '<use href="#A" x="50" y="50"/>'
    )
    a, b, notes = ours(text)
    assert a == 200.0 and b == (50, 50, 80, 60)
    assert len(errors(notes)) == 1


# -- SVG 2 §8.2 / §5.6.2: viewports of nested svg, symbol and use ---------------------------
def test_viewports_8_2_nested_svg_without_size_fills_its_parent():
    # SVG 2 §5.1.2: width and height of an inner svg are "auto" = 100 %; the root is 200 × 200
    # so the viewBox 0 0 10 10 scales by 20: the 5 × 5 square at (1, 1) becomes 100 × 100 at
    # (20, 20).
    text = svg('<svg viewBox="0 0 10 10"><rect x="1" y="1" width="5" height="5"/></svg>')
    agree_with_renderer(text, 10000.0, (20, 20, 120, 120))


def test_viewports_5_6_2_symbol_used_without_a_size_fills_the_viewport():
    # symbol width/height "auto" = 100 % (SVG 2 §5.5); with viewBox 0 0 20 20 on 200 × 200 the
    # scale is 10; use x = 0: the 2 × 4 rect at (1, 1) becomes 20 × 40 at (10, 10).
    text = svg(
        '<defs><symbol id="s" viewBox="0 0 20 20"><rect x="1" y="1" width="2" height="4"/>'
        '</symbol></defs><use href="#s"/>'
    )
    agree_with_renderer(text, 800.0, (10, 10, 30, 50))


def test_viewports_5_6_2_use_width_and_height_override_the_symbols():
    # §5.6.2: width/height on the use override those of the referenced symbol (50 × 50 here,
    # not 100 × 100): scale 5 for viewBox 0 0 10 10, then x = 20: the 4 × 4 rect at (0, 0)
    # becomes 20 × 20 at (20, 0).
    text = svg(
        '<defs><symbol id="s" viewBox="0 0 10 10" width="100" height="100">'
        '<rect width="4" height="4"/></symbol></defs><use href="#s" x="20" width="50" height="50"/>'
    )
    agree_with_renderer(text, 400.0, (20, 0, 40, 20))


def test_viewports_5_6_2_use_width_and_height_override_an_svgs():
    # the same for a referenced svg element: its own width 10 is replaced by the use's 100;
    # viewBox 0 0 10 10 on 100 × 100 (meet, centred): scale 10; the 1 × 1 rect at (2, 3)
    # becomes 10 × 10 at (20, 30).
    text = svg(
        '<defs><svg id="v" viewBox="0 0 10 10" width="10" height="10">'
        '<rect x="2" y="3" width="1" height="1"/></svg></defs>'
        '<use href="#v" width="100" height="100"/>'
    )
    agree_with_renderer(text, 100.0, (20, 30, 30, 40))


def test_viewports_8_6_preserve_aspect_ratio_on_a_nested_svg():
    # §8.6: viewBox 0 0 10 20 into 100 × 100 with xMaxYMax meet: scale min(10, 5) = 5, the
    # content is 50 wide and pushed right by 50: the 10 × 20 rect fills x 50..100, y 0..100.
    text = svg(
        '<svg width="100" height="100" viewBox="0 0 10 20" preserveAspectRatio="xMaxYMax meet">'
        '<rect width="10" height="20"/></svg>'
    )
    agree_with_renderer(text, 5000.0, (50, 0, 100, 100))


# -- SVG 2 §6 "Styling" -------------------------------------------------------------------
def test_styling_6_style_attribute_transform_display_visibility():
    # SVG 2 §8.5: transform is a CSS property; in a style attribute it takes CSS syntax
    # (units on angles and lengths). display:none and visibility:hidden in style hide.
    text = svg(
        '<rect width="10" height="10" style="transform: translate(50px, 60px) scale(2)"/>'
        '<rect width="10" height="10" style="display: none"/>'
        '<rect width="10" height="10" style="visibility:hidden"/>'
    )
    agree_with_standard(text, 400.0, (50, 60, 70, 80))


def test_styling_6_3_style_sheet_selectors_class_id_type_descendant():
    # §6.3: <style> rules by class, id, type and descendant selectors hide or move shapes.
    text = svg(
        "<style>.gone { display: none } #moved { transform: translate(100px, 0) }"
        " g circle { visibility: hidden } rect.big { transform: scale(2) }</style>"
        '<rect class="gone" width="50" height="50"/>'
        '<rect id="moved" width="10" height="10"/>'
        '<g><circle cx="50" cy="50" r="10"/></g>'
        '<rect class="big" x="10" y="50" width="10" height="10"/>'
    )
    # moved: 10×10 at (100, 0); big: scale 2 of the rect at (10, 50) → 20×20 at (20, 100)
    agree_with_standard(text, 500.0, (20, 0, 110, 120))


def test_styling_6_4_cascade_order_attribute_sheet_style_important():
    # §6.4: presentation attribute < style sheet < style attribute; !important in a sheet
    # beats a normal style attribute (CSS Cascade 4 §6.1). Expected: the first rect is moved
    # by the sheet (translate 100) although its attribute says translate(50); the second is
    # moved by the style attribute (translate 20) over the sheet; the third by the sheet's
    # !important (translate 150) over its style attribute.
    text = svg(
        "<style>.a { transform: translate(100px, 0) } .b { transform: translate(60px, 0) }"
        " .c { transform: translate(150px, 0) !important }</style>"
        '<rect class="a" transform="translate(50 0)" width="10" height="10"/>'
        '<rect class="b" y="20" width="10" height="10" style="transform: translate(20px, 0)"/>'
        '<rect class="c" y="40" width="10" height="10" style="transform: translate(5px, 0)"/>'
    )
    res = read_svg(text.encode())
    xs = [o.contours[0].segments[0][0][0] for o in res.document.outlines]
    assert xs == [100.0, 20.0, 150.0]
    agree_with_standard(text, 300.0, (20, 0, 160, 50))


def test_styling_6_4_specificity_id_beats_class_beats_type():
    # CSS Selectors 4 §16: id (1,0,0) > class (0,1,0) > type (0,0,1), whatever the order.
    text = svg(
        "<style>#k { transform: translate(30px, 0) } .k { transform: translate(20px, 0) }"
        " rect { transform: translate(10px, 0) }</style>"
        '<rect id="k" class="k" width="10" height="10"/><rect class="k" y="20" width="10"'
        ' height="10"/><rect y="40" width="10" height="10"/>'
    )
    res = read_svg(text.encode())
    assert [o.contours[0].segments[0][0][0] for o in res.document.outlines] == [30, 20, 10]
    agree_with_standard(text, 300.0, (10, 0, 40, 50))


def test_styling_6_4_geometry_properties_from_css():
    # SVG 2 §6.4 makes width, height, x, y, r, cx, cy, rx, ry presentation attributes, so a
    # sheet can size a rect: 40 × 30 at (5, 5).
    text = svg("<style>rect { width: 40px; height: 30px; x: 5px; y: 5px }</style><rect/>")
    agree_with_standard(text, 1200.0, (5, 5, 45, 35))


# -- SVG 1.1 §7.10 "Units" / CSS Values 3 §6 -------------------------------------------------
def test_units_7_10_percentages_on_shapes():
    # §7.10: x and width against the viewport width (200), y and height against its height
    # (100), r against sqrt((w² + h²)/2) = sqrt(25000) = 158.11...
    text = svg(
        '<rect x="10%" y="10%" width="25%" height="50%"/>',
        root='width="200" height="100"',
    )
    agree_with_renderer(text, 50 * 50, (20, 10, 70, 60))
    res = read_svg(svg('<circle cx="50%" cy="50%" r="10%"/>', 'width="200" height="100"').encode())
    seg = res.document.outlines[0].contours[0].segments[0]
    r = 0.1 * np.sqrt((200**2 + 100**2) / 2)
    assert seg[0][0] == pytest.approx(100 + r, rel=1e-12) and seg[0][1] == 50


def test_units_7_10_percentages_against_a_viewbox():
    # with a viewBox the viewport's width in user units is the viewBox's (here 50 × 50):
    # width 50 % = 25 units, shown at scale 4 → 100 px
    text = svg(
        '<rect width="50%" height="50%"/>', root='width="200" height="200" viewBox="0 0 50 50"'
    )
    a, b, _ = ours(text)
    assert a == 625.0 and b == (0, 0, 25, 25)
    ra, rb = rendered(text)
    assert ra == pytest.approx(10000.0, rel=0.01)  # resvg in pixels: 100 × 100


def test_units_css_values_em_and_ex():
    # CSS Values 3 §6.1.1: em is the element's font-size (16 px initially, common practice);
    # ex is 0.5 em where the x-height cannot be determined. font-size on a group inherits.
    text = svg(
        '<g font-size="10"><rect width="2em" height="3ex"/></g>'
        '<rect x="100" width="1em" height="1em"/>'
    )
    a, b, _ = ours(text)
    assert a == pytest.approx(20 * 15 + 16 * 16)
    ra, _ = rendered(text)
    assert ra == pytest.approx(20 * 15 + 16 * 16, rel=0.01)


def test_units_percent_width_on_a_nested_svg_viewport():
    # a nested svg 50 % × 50 % of 200 × 200 with viewBox 0 0 1 1: scale 100
    text = svg('<svg width="50%" height="50%" viewBox="0 0 1 1"><rect width="1" height="1"/></svg>')
    agree_with_renderer(text, 10000.0, (0, 0, 100, 100))


# -- SVG 2 §5.8 "Conditional processing" ----------------------------------------------------
def test_conditional_5_8_required_extensions_on_any_element():
    # §5.8.5: requiredExtensions evaluates to false for extensions not supported (we support
    # none, an empty list included); the element and its children are not rendered, in or
    # out of a switch.
    text = svg(
        '<rect width="10" height="10" requiredExtensions="http://example.org/ext"/>'
        '<g requiredExtensions=""><rect x="50" width="10" height="10"/></g>'
        '<rect x="100" width="10" height="10"/>'
    )
    a, b, _ = ours(text)
    assert a == 100.0 and b == (100, 0, 110, 10)
    ra, _ = rendered(text)
    assert ra == pytest.approx(100.0, rel=0.01)


def test_conditional_5_8_system_language_on_any_element():
    # §5.8.5: systemLanguage is true when a user language equals a listed tag or is its
    # prefix before "-": "en" matches "en-GB", not "fr". A warning names the assumed
    # language, since the drawing depends on the reader's settings.
    text = svg(
        '<rect width="10" height="10" systemLanguage="fr"/>'
        '<rect x="50" width="10" height="10" systemLanguage="de, en-GB"/>'
    )
    res = read_svg(text.encode())
    (o,) = res.document.outlines
    assert o.contours[0].segments[0][0][0] == 50.0
    assert any(n.kind == "language" and "en" in n.message for n in res.notes)
    res = read_svg(text.encode(), languages=("fr",))
    assert res.document.outlines[0].contours[0].segments[0][0][0] == 0.0
    ra, _ = rendered(text)  # resvg's default language list is ["en"]
    assert ra == pytest.approx(100.0, rel=0.01)


def test_conditional_5_8_3_switch_renders_the_first_child_that_holds():
    text = svg(
        '<switch><rect width="10" height="10" systemLanguage="fr"/>'
        '<rect x="30" width="10" height="10"/><rect x="60" width="10" height="10"/></switch>'
    )
    agree_with_renderer(text, 100.0, (30, 0, 40, 10))


# -- SVG 2 §10.6-10.7 polyline and polygon ----------------------------------------------------
def test_polygon_10_7_odd_coordinates_drop_the_last_and_render():
    # §10.7: "If an odd number of coordinates is provided, then the element is in error ...
    # the user agent will drop the last, odd coordinate and otherwise render the shape":
    # the triangle (0,0) (100,0) (100,100) is drawn closed; the error says what was kept.
    text = svg('<polygon points="0,0 100,0 100,100 50"/>')
    a, b, notes = ours(text)
    assert a == 5000.0 and b == (0, 0, 100, 100)
    (msg,) = errors(notes)
    assert "odd number of coordinates (7)" in msg and "'50'" in msg and "3 point(s)" in msg
    ra, _ = rendered(text)
    assert ra == pytest.approx(5000.0, rel=0.01)
    res = read_svg(text.encode())
    assert res.document.outlines[0].contours[0].closed


# -- a transform on the root is applied once ------------------------------------------------
def test_root_transform_applied_once():
    # SVG 2 allows transform on the outermost svg; translate(20 30) moves the drawing once.
    text = svg(
        '<rect width="10" height="10"/>',
        root='width="200" height="200" transform="translate(20 30)"',
    )
    a, b, _ = ours(text)
    assert b == (20, 30, 30, 40)
    _, rb = rendered(text)
    np.testing.assert_allclose(rb, (20, 30, 30, 40), atol=1.0)


def test_styling_6_3_sheet_display_and_visibility_match_the_renderer():
    # display and visibility from a sheet (class, type and descendant selectors), checked
    # against resvg: only the 20 × 10 rect at (100, 100) is drawn.
    text = svg(
        "<style>.off { display: none } g.ghost rect { visibility: hidden }</style>"
        '<rect class="off" width="50" height="50"/>'
        '<g class="ghost"><rect x="10" y="60" width="30" height="30"/></g>'
        '<rect x="100" y="100" width="20" height="10"/>'
    )
    agree_with_renderer(text, 200.0, (100, 100, 120, 110))
