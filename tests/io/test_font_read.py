"""Reading fonts (TrueType glyf, CFF, UFO) into glyph outlines, checked against fontTools' pens."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
import ufoLib2
from font_cases import COMPOSITES, GLYPH_ORDER, build_otf, build_ttf, build_ufo
from fontTools.pens.areaPen import AreaPen
from fontTools.pens.basePen import BasePen
from fontTools.pens.boundsPen import BoundsPen
from fontTools.pens.perimeterPen import PerimeterPen
from fontTools.ttLib import TTFont

from outlinebench.diagnostics import check_document
from outlinebench.errors import FontReadError
from outlinebench.geometry import arc_length, bounding_box, signed_area
from outlinebench.io.font_read import (
    FontSource,
    GlyphRef,
    contour_origin,
    load_font,
    read_font,
    select_glyphs,
)

# Areas: our exact Bernstein formula and fontTools' AreaPen (its own closed form per segment)
# differ only by float rounding of sums of products of coordinates up to ~1e3.
AREA_RTOL = 1e-12
# Tight boxes: both solve the derivative's roots in closed form; rounding only.
BOUNDS_ATOL = 1e-9
# PerimeterPen at tolerance 1e-10 (recursive cubic subdivision, exact quadratic formula)
# against our adaptive Gauss–Kronrod at its default target.
LENGTH_RTOL = 1e-8


def _builders(tmp_path: Path) -> dict[str, Path]:
    return {
        "ttf": build_ttf(tmp_path / "workshop.ttf"),
        "otf": build_otf(tmp_path / "workshop.otf"),
        "ufo": build_ufo(tmp_path / "workshop.ufo"),
    }


@pytest.fixture(scope="module")
def fonts(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    return _builders(tmp_path_factory.mktemp("fonts"))


def _reference_glyphset(kind: str, path: Path):
    if kind == "ufo":
        return ufoLib2.Font.open(path).layers.defaultLayer
    return TTFont(path).getGlyphSet()


class _Segments(BasePen):
    """fontTools' own splitting of a glyph into atomic segments (implied points made
    explicit by BasePen), in font coordinates."""

    def __init__(self, glyphset):
        super().__init__(glyphset)
        self.segments: list[tuple] = []

    def _moveTo(self, pt):
        self.start = pt

    def _lineTo(self, pt):
        self.segments.append((self._getCurrentPoint(), pt))

    def _qCurveToOne(self, p1, p2):
        self.segments.append((self._getCurrentPoint(), p1, p2))

    def _curveToOne(self, p1, p2, p3):
        self.segments.append((self._getCurrentPoint(), p1, p2, p3))

    def _closePath(self):
        cur = self._getCurrentPoint()
        if cur != self.start:
            self.segments.append((cur, self.start))


def _font_points(seg: np.ndarray) -> tuple:
    return tuple((float(x), float(-y)) for x, y in seg)


@pytest.mark.parametrize("kind", ["ttf", "otf", "ufo"])
def test_areas_bounds_lengths_match_fonttools_pens(fonts: dict[str, Path], kind: str) -> None:
    result = read_font(fonts[kind])
    assert result.error is None
    doc = result.document
    gs = _reference_glyphset(kind, fonts[kind])
    assert [o.element_id for o in doc.outlines] == GLYPH_ORDER
    for outline in doc.outlines:
        name = outline.element_id
        area_pen, bounds_pen, length_pen = AreaPen(gs), BoundsPen(gs), PerimeterPen(gs, 1e-10)
        for pen in (area_pen, bounds_pen, length_pen):
            gs[name].draw(pen)
        segments = [s for c in outline.contours for s in c.segments]
        ours = sum(signed_area(list(c.segments)) for c in outline.contours)
        # y is flipped on reading, which reverses the sign of every signed area
        assert ours == pytest.approx(-area_pen.value, rel=AREA_RTOL, abs=1e-9), name
        if bounds_pen.bounds is None:
            assert segments == [], name
            continue
        boxes = np.array([bounding_box(s) for s in segments])
        x0, y0, x1, y1 = bounds_pen.bounds
        got = (boxes[:, 0].min(), boxes[:, 1].min(), boxes[:, 2].max(), boxes[:, 3].max())
        np.testing.assert_allclose(got, (x0, -y1, x1, -y0), atol=BOUNDS_ATOL, err_msg=name)
        length = sum(float(arc_length(s)) for s in segments)
        assert length == pytest.approx(length_pen.value, rel=LENGTH_RTOL), name


@pytest.mark.parametrize("kind", ["ttf", "otf", "ufo"])
def test_segments_are_fonttools_segments(fonts: dict[str, Path], kind: str) -> None:
    # Every segment, implied on-curve points included, is the segment fontTools' BasePen
    # makes of the same glyph (reference library; OpenType "glyf": the implied point is the
    # midpoint of two consecutive off-curve points).
    doc = read_font(fonts[kind]).document
    gs = _reference_glyphset(kind, fonts[kind])
    for outline in doc.outlines:
        pen = _Segments(gs)
        gs[outline.element_id].draw(pen)
        ours = {_font_points(s) for c in outline.contours for s in c.segments}
        theirs = {tuple((float(x), float(y)) for x, y in seg) for seg in pen.segments}
        # same segments; a closed contour may start at another of its on-curve points
        assert ours == theirs, outline.element_id
        assert sum(len(c.segments) for c in outline.contours) == len(pen.segments)


def test_implied_on_curve_points(fonts: dict[str, Path]) -> None:
    doc = read_font(fonts["ttf"], glyphs="plaque,washer").document
    plaque, washer = doc.outlines
    # plaque: qCurveTo((40, 40), (60, 10), (120, 0)) from (40, 80): the implied point is
    # ((40 + 60) / 2, (40 + 10) / 2) = (50, 25) (OpenType "glyf", closed form).
    first = plaque.contours[0].segments
    assert _font_points(first[0]) == ((40.0, 80.0), (40.0, 40.0), (50.0, 25.0))
    assert _font_points(first[1]) == ((50.0, 25.0), (60.0, 10.0), (120.0, 0.0))
    # washer: the outer ring is six off-curve points only, so six quadratic segments whose
    # end points are the midpoints of neighbouring off-curve points.
    ring = washer.contours[0].segments
    offs = [(320, 600), (570, 450), (570, 150), (320, 0), (70, 150), (70, 450)]
    assert [s.shape for s in ring] == [(3, 2)] * 6
    mids = {
        ((a[0] + b[0]) / 2, (a[1] + b[1]) / 2)
        for a, b in zip(offs, offs[1:] + offs[:1], strict=False)
    }
    assert {_font_points(s)[0] for s in ring} == mids
    assert {_font_points(s)[1] for s in ring} == {(float(x), float(y)) for x, y in offs}


def test_segments_share_end_points_and_are_read_only(fonts: dict[str, Path]) -> None:
    # The model's invariant (outlinebench.model.document): consecutive segments share end
    # points exactly and a closed contour ends where it starts; arrays are read-only.
    for kind in ("ttf", "otf", "ufo"):
        for outline in read_font(fonts[kind]).document.outlines:
            for c in outline.contours:
                assert c.closed
                for a, b in zip(c.segments, c.segments[1:] + c.segments[:1], strict=True):
                    assert np.array_equal(a[-1], b[0])
                    assert not a.flags.writeable


def test_y_axis_is_flipped_exactly(fonts: dict[str, Path]) -> None:
    # (x, y) in the font is (x, 0 − y) in the document: bit-exact, and no negative zero.
    doc = read_font(fonts["ttf"], glyphs="plaque").document
    pts = np.concatenate(doc.outlines[0].contours[0].segments)
    assert set(map(float, pts[:, 1])) <= {
        -0.0 - v for v in (0, 10, 25, 40, 80, 420, 460, 480, 500)
    } | {0.0}
    zeros = pts[pts[:, 1] == 0.0, 1]
    assert zeros.size and not np.any(np.signbit(zeros))  # +0.0, not −0.0


def test_composites_are_decomposed_with_their_component_named(fonts: dict[str, Path]) -> None:
    for kind in ("ttf", "ufo"):
        doc = read_font(fonts[kind]).document
        names = [o.element_id for o in doc.outlines]
        bracket = doc.outlines[names.index("bracket")]
        peg = doc.outlines[names.index("peg")]
        tag = doc.outlines[names.index("tag")]
        assert isinstance(bracket.source, GlyphRef)
        assert bracket.source.origins == ("peg", "peg")
        assert bracket.source.components == ("peg", "peg")
        assert contour_origin(doc, names.index("bracket"), 1) == "bracket/peg"
        assert contour_origin(doc, names.index("peg"), 0) == "peg"
        # second peg placed at (300, 400) in the font: (300, −400) in the document
        a = np.concatenate(peg.contours[0].segments)
        b = np.concatenate(bracket.contours[1].segments)
        np.testing.assert_array_equal(b, a + np.array([300.0, -400.0]))
        # the tag's peg is scaled by ½: its area is ¼ of the peg's (closed form: a linear
        # map multiplies areas by its determinant)
        dx, dy = COMPOSITES["tag"][1][1][4:]
        assert tag.source.origins == ("plaque", "peg")
        assert signed_area(list(tag.contours[1].segments)) == pytest.approx(
            0.25 * signed_area(list(peg.contours[0].segments)), rel=1e-14
        )
        assert (dx, dy) == (500, 300)


def test_empty_glyph_reads_as_an_outline_without_contours(fonts: dict[str, Path]) -> None:
    for kind in ("ttf", "otf", "ufo"):
        result = read_font(fonts[kind], glyphs="space")
        (space,) = result.document.outlines
        assert space.element_id == "space" and space.contours == ()
        assert any(n.kind == "empty-glyph" for n in result.notes)
        # nothing to check is not a crash (never-silently-wrong issue): no findings
        assert check_document(result.document) == []


def test_document_scale_and_notes(fonts: dict[str, Path]) -> None:
    result = read_font(fonts["otf"])
    doc = result.document
    src = doc.source
    assert isinstance(src, FontSource)
    # head.unitsPerEm as written by the builder (fontTools reads it back)
    assert src.units_per_em == TTFont(fonts["otf"])["head"].unitsPerEm == 1000
    assert src.flavour == "cff" and not src.writable
    assert doc.mm_per_unit == 25.4 / 96  # one font unit read as one CSS px (CSS Values §5.2)
    assert any(n.kind == "units-per-em" and "1000 units per em" in n.message for n in result.notes)
    assert read_font(fonts["ttf"]).document.source.flavour == "truetype"
    assert src.grid_step == 1.0  # the builder wrote integer coordinates only


def test_ufo_smooth_points_give_smooth_joins(fonts: dict[str, Path]) -> None:
    # UFO 3 glif: smooth="yes" on an on-curve point states G1 intent there.
    doc = read_font(fonts["ufo"], glyphs="plaque").document
    ufo = ufoLib2.Font.open(fonts["ufo"])
    smooth = [p.smooth for p in ufo["plaque"].contours[0].points if p.type is not None]
    joins = doc.outlines[0].contours[0].joins
    assert all(smooth) and joins == ("smooth",) * len(joins)


def test_glyph_selection() -> None:
    order = ["a", "b", "c-d", "c", "d", "e"]
    cmap = {0x61: "a", 0x62: "b", 0x65: "e"}
    # common practice, no source: the documented syntax of select_glyphs
    assert select_glyphs("c-d", order) == ["c-d"]  # a name with a hyphen is a name first
    assert select_glyphs("b-d", order) == ["b", "c-d", "c", "d"]
    assert select_glyphs("#4-#5, a", order) == ["a", "d", "e"]
    assert select_glyphs("U+0061-U+0062,U+0065", order, cmap) == ["a", "b", "e"]
    assert select_glyphs(["e", "a", "a"], order) == ["a", "e"]
    with pytest.raises(FontReadError, match="no glyph named 'zz'"):
        select_glyphs("zz", order, where="f.ttf")
    with pytest.raises(FontReadError, match="runs backwards"):
        select_glyphs("e-a", order)
    with pytest.raises(FontReadError, match="outside 0-5"):
        select_glyphs("#9", order)
    with pytest.raises(FontReadError, match="character map"):
        select_glyphs("U+0100", order, cmap)


def test_selected_glyphs_keep_their_glyph_order_index(fonts: dict[str, Path]) -> None:
    doc = read_font(fonts["ttf"], glyphs="U+002E,#2").document
    assert [(o.element_id, o.source_index) for o in doc.outlines] == [("plaque", 2), ("peg", 4)]


def test_bad_input_is_one_line_error(tmp_path: Path) -> None:
    junk = tmp_path / "junk.ttf"
    junk.write_bytes(b"not a font at all")
    with pytest.raises(FontReadError, match=r"junk\.ttf: not a readable OpenType font"):
        read_font(junk)
    with pytest.raises(FontReadError, match="not a font"):
        read_font(tmp_path / "drawing.svg")
    folder = tmp_path / "empty.ufo"
    folder.mkdir()
    with pytest.raises(FontReadError, match=r"empty\.ufo: not a readable UFO source"):
        read_font(folder)
    with pytest.raises(FileNotFoundError):
        read_font(tmp_path / "missing.otf")


def test_a_broken_glyph_is_an_error_not_a_gap(tmp_path: Path) -> None:
    # A component naming a glyph that is not there: that glyph is reported, the others read.
    path = build_ufo(tmp_path / "broken.ufo")
    font = ufoLib2.Font.open(path)
    font["bracket"].components[0].baseGlyph = "nothing"
    font.save(path, overwrite=True)
    result = read_font(path)
    assert isinstance(result.error, FontReadError)
    assert "'bracket'" in str(result.error) and "'nothing'" in str(result.error)
    assert "bracket" not in [o.element_id for o in result.document.outlines]
    assert len(result.document.outlines) == len(GLYPH_ORDER) - 1
    with pytest.raises(FontReadError, match="bracket"):
        load_font(path)


def _random_glyf_font(path: Path, seed: int) -> Path:
    """Glyphs of random integer points over the whole int16 range and in small steps, so
    every flag form occurs (short and long deltas, same-as-before, repeated flags)."""
    from fontTools.fontBuilder import FontBuilder
    from fontTools.pens.ttGlyphPen import TTGlyphPen

    rng = np.random.default_rng(seed)
    order = [".notdef"] + [f"g{k}" for k in range(40)]
    glyphs = {}
    for name in order:
        pen = TTGlyphPen(None)
        for _ in range(int(rng.integers(1, 4))):
            n = int(rng.integers(3, 30))
            big = rng.integers(-16000, 16000, (n, 2))  # deltas stay within int16
            small = np.cumsum(rng.integers(-3, 4, (n, 2)), axis=0) + 100
            pts = np.where(rng.random((n, 1)) < 0.5, big, small)
            pts[rng.random(n) < 0.2, 0] = pts[0, 0]  # same x as some other point
            pen.moveTo(tuple(int(v) for v in pts[0]))
            k = 1
            while k < n:
                run = int(rng.integers(0, 3))
                offs = [tuple(int(v) for v in p) for p in pts[k : k + run]]
                end = tuple(int(v) for v in pts[min(k + run, n - 1)])
                if offs:
                    pen.qCurveTo(*offs, end)
                else:
                    pen.lineTo(end)
                k += run + 1
            pen.closePath()
        glyphs[name] = pen.glyph()
    fb = FontBuilder(2048, isTTF=True)
    fb.setupGlyphOrder(order)
    fb.setupCharacterMap({})
    fb.setupGlyf(glyphs)
    glyf = fb.font["glyf"]
    for n in order:
        glyf[n].recalcBounds(glyf)
    fb.setupHorizontalMetrics({n: (600, int(getattr(glyf[n], "xMin", 0))) for n in order})
    fb.setupHorizontalHeader(ascent=1800, descent=-400)
    fb.setupNameTable({"familyName": "Random Parts", "styleName": "Regular"})
    fb.setupOS2()
    fb.setupPost()
    fb.save(str(path))
    return path


def test_glyf_decoder_matches_fonttools(tmp_path: Path) -> None:
    # Our reading of the glyf bytes (OpenType "glyf", simple glyph description) against
    # fontTools' own decoding of the same glyphs, point for point and flag for flag.
    from outlinebench.io.font_read import _glyf_coordinates

    path = _random_glyf_font(tmp_path / "random.ttf", 5)
    raw = TTFont(path)
    ref = TTFont(path)
    glyf, ref_glyf = raw["glyf"], ref["glyf"]
    for name in raw.getGlyphOrder():
        data = glyf.glyphs[name].data
        xy, on, ends = _glyf_coordinates(data, name)
        coords, ref_ends, flags = ref_glyf[name].getCoordinates(ref_glyf)
        np.testing.assert_array_equal(xy, np.array(coords).reshape(-1, 2))
        np.testing.assert_array_equal(on, np.array([f & 1 for f in flags], dtype=bool))
        assert ends == list(ref_ends)
    # and the whole font reads to fontTools' segments (through the pen as reference)
    doc = read_font(path).document
    gs = TTFont(path).getGlyphSet()
    for outline in doc.outlines:
        pen = _Segments(gs)
        gs[outline.element_id].draw(pen)
        ours = sorted(_font_points(s) for c in outline.contours for s in c.segments)
        assert ours == sorted(tuple(map(tuple, s)) for s in pen.segments)


def test_glyf_decoder_refuses_truncated_data() -> None:
    from outlinebench.io.font_read import _glyf_coordinates

    # one contour of 3 points, no instructions, flags say "long x, long y", data cut short
    data = (1).to_bytes(2, "big") + bytes(8) + (2).to_bytes(2, "big") + bytes(2) + bytes(3)
    with pytest.raises(FontReadError, match="run past the end"):
        _glyf_coordinates(data, "font.ttf: glyph 'x'")


class _Private:
    nominalWidthX = 0
    defaultWidthX = 0

    def __init__(self, subrs):
        self.Subrs = subrs


def _t2(program, private=None, global_subrs=()):
    from fontTools.misc.psCharStrings import T2CharString

    cs = T2CharString(program=list(program), private=private, globalSubrs=list(global_subrs))
    cs.compile()
    return cs


def _t2_reference(cs) -> list[tuple]:
    pen = _Segments(None)
    cs.draw(pen)
    return [tuple((float(x), float(y)) for x, y in s) for s in pen.segments]


def _t2_ours(cs) -> list[tuple]:
    from outlinebench.io.font_read import _contour_from_flat, _T2Reader

    reader = _T2Reader(getattr(cs.private, "Subrs", []) or [], cs.globalSubrs or [])
    return [
        _font_points(seg)
        for flat, sizes in reader.read(cs.bytecode)
        for seg in _contour_from_flat(flat, sizes, True).segments
    ]


def test_charstring_reader_matches_fonttools_on_every_operator() -> None:
    # Adobe TN #5177 operators, each program read by fontTools' interpreter (reference
    # library) and by ours: the same segments in the same order.
    local = [_t2([10, 20, 30, 40, 50, 60, "rrcurveto", "return"]) for _ in range(3)]
    glob = [_t2([5, 0, "rlineto", "return"]) for _ in range(2)]
    private = _Private(local)
    programs = [
        # width, stems, hint masks with an implied vstem, moves of every kind
        [
            77,
            10,
            20,
            30,
            40,
            "hstemhm",
            5,
            6,
            "vstemhm",
            1,
            2,
            "hintmask",
            bytes([0b11100000]),
            100,
            200,
            "rmoveto",
            50,
            "hlineto",
            60,
            70,
            80,
            "vlineto",
            1,
            2,
            3,
            4,
            "rlineto",
            "endchar",
        ],
        # curves: rrcurveto, hhcurveto (odd count), vvcurveto (odd), hvcurveto, vhcurveto
        # with and without the final extra argument, rcurveline, rlinecurve
        [
            10,
            10,
            "rmoveto",
            1,
            2,
            3,
            4,
            5,
            6,
            7,
            8,
            9,
            10,
            11,
            12,
            "rrcurveto",
            3,
            10,
            20,
            30,
            40,
            11,
            21,
            31,
            41,
            "hhcurveto",
            4,
            10,
            20,
            30,
            40,
            "vvcurveto",
            10,
            20,
            30,
            40,
            50,
            60,
            70,
            80,
            "hvcurveto",
            10,
            20,
            30,
            40,
            5,
            "vhcurveto",
            10,
            20,
            30,
            40,
            50,
            60,
            70,
            80,
            "rcurveline",
            5,
            6,
            7,
            8,
            10,
            20,
            30,
            40,
            50,
            60,
            "rlinecurve",
            0,
            -30,
            "rmoveto",
            10,
            20,
            30,
            40,
            50,
            "hvcurveto",
            "endchar",
        ],
        # flex family
        [
            0,
            0,
            "rmoveto",
            10,
            5,
            20,
            5,
            30,
            0,
            30,
            0,
            20,
            -5,
            10,
            -5,
            50,
            "flex",
            10,
            20,
            5,
            30,
            30,
            20,
            10,
            "hflex",
            10,
            5,
            20,
            5,
            30,
            30,
            20,
            -5,
            10,
            "hflex1",
            10,
            5,
            20,
            5,
            30,
            0,
            30,
            0,
            20,
            -5,
            17,
            "flex1",
            5,
            60,
            20,
            5,
            30,
            0,
            30,
            0,
            20,
            -5,
            17,
            "flex1",
            "endchar",
        ],
        # subroutines (local and global, with the bias for small indexes: 107)
        [
            0,
            0,
            "rmoveto",
            0 - 107,
            "callsubr",
            2 - 107,
            "callsubr",
            1 - 107,
            "callgsubr",
            "endchar",
        ],
        # a 16.16 fixed number and a width before a vmoveto
        [33, 12.5, "vmoveto", 100.25, 3, "rlineto", "endchar"],
    ]
    for program in programs:
        cs = _t2(program, private, glob)
        assert _t2_ours(cs) == _t2_reference(cs), program


def test_charstring_reader_leaves_arithmetic_to_fonttools() -> None:
    from outlinebench.io.font_read import _T2Reader, _Unsupported

    cs = _t2([0, 0, "rmoveto", 3, 4, "add", 0, "rlineto", "endchar"], _Private([]))
    with pytest.raises(_Unsupported):
        _T2Reader([], []).read(cs.bytecode)


def test_ufo_selection_by_code_point_and_by_name(fonts: dict[str, Path]) -> None:
    # the UFO's own unicodes (glif <unicode hex>) serve U+ items; names need no glyph loaded
    doc = read_font(fonts["ufo"], glyphs=iter(["U+0057", "peg"])).document
    assert [o.element_id for o in doc.outlines] == ["washer", "peg"]
