"""Small fonts built with fontTools' FontBuilder for the font tests (invented glyphs only).

The glyphs are workshop shapes: a sign plaque with rounded corners, a washer (a ring with a
hole), a peg (a dot), a bracket made of two pegs (a composite), a tag made of a plaque and a
scaled peg (a composite with a transformation), and an empty ``space``.

``draw_*`` functions draw in font units (y up) into any fontTools segment pen; quadratic
fonts get runs of several off-curve points (so implied on-curve points occur) and one contour
made of off-curve points only.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from fontTools.fontBuilder import FontBuilder
from fontTools.pens.t2CharStringPen import T2CharStringPen
from fontTools.pens.ttGlyphPen import TTGlyphPen

GLYPH_ORDER = [".notdef", "space", "plaque", "washer", "peg", "bracket", "tag"]
CMAP = {0x20: "space", 0x50: "plaque", 0x57: "washer", 0x2E: "peg", 0x5B: "bracket", 0x54: "tag"}
ADVANCES = {".notdef": 500, "space": 250, "plaque": 700, "washer": 640, "peg": 300,
            "bracket": 600, "tag": 720}  # fmt: skip
UPM = 1000


def draw_notdef(pen: Any, quadratic: bool) -> None:
    pen.moveTo((50, 0))
    pen.lineTo((50, 700))
    pen.lineTo((450, 700))
    pen.lineTo((450, 0))
    pen.closePath()


def draw_plaque(pen: Any, quadratic: bool) -> None:
    """A rounded rectangle 40…660 × 0…500, counter-clockwise in the font's y-up frame."""
    pen.moveTo((40, 80))
    if quadratic:
        pen.qCurveTo((40, 40), (60, 10), (120, 0))  # two off-curve points: one implied point
    else:
        pen.curveTo((40, 36), (76, 0), (120, 0))
    pen.lineTo((580, 0))
    if quadratic:
        pen.qCurveTo((660, 0), (660, 80))
    else:
        pen.curveTo((624, 0), (660, 36), (660, 80))
    pen.lineTo((660, 420))
    if quadratic:
        pen.qCurveTo((660, 500), (580, 500))
    else:
        pen.curveTo((660, 464), (624, 500), (580, 500))
    pen.lineTo((120, 500))
    if quadratic:
        pen.qCurveTo((40, 500), (40, 420))
    else:
        pen.curveTo((76, 500), (40, 464), (40, 420))
    pen.closePath()


def draw_washer(pen: Any, quadratic: bool) -> None:
    """A ring: outer contour and a hole winding the other way."""
    if quadratic:
        # outer ring of off-curve points only (every on-curve point implied), clockwise
        pen.qCurveTo((320, 600), (570, 450), (570, 150), (320, 0), (70, 150), (70, 450), None)
        pen.closePath()
        pen.moveTo((320, 150))  # the hole, counter-clockwise
        pen.qCurveTo((440, 150), (440, 300))
        pen.qCurveTo((440, 450), (320, 450))
        pen.qCurveTo((200, 450), (200, 300))
        pen.qCurveTo((200, 150), (320, 150))
        pen.closePath()
    else:
        k = 0.5523
        for cx, cy, r, ccw in ((320, 300, 250, True), (320, 300, 120, False)):
            pts = [(cx + r, cy), (cx, cy + r), (cx - r, cy), (cx, cy - r)]
            if not ccw:
                pts = pts[::-1]
            pen.moveTo(pts[0])
            for i in range(4):
                a, b = pts[i], pts[(i + 1) % 4]
                ta = (a[1] - cy, -(a[0] - cx)) if not ccw else (-(a[1] - cy), a[0] - cx)
                tb = (b[1] - cy, -(b[0] - cx)) if not ccw else (-(b[1] - cy), b[0] - cx)
                c1 = (round(a[0] + k * ta[0]), round(a[1] + k * ta[1]))
                c2 = (round(b[0] - k * tb[0]), round(b[1] - k * tb[1]))
                pen.curveTo(c1, c2, b)
            pen.closePath()


def draw_peg(pen: Any, quadratic: bool) -> None:
    """A small lozenge-shaped dot."""
    pen.moveTo((150, 0))
    if quadratic:
        pen.qCurveTo((250, 0), (250, 100), (150, 200), (50, 100), (50, 0), (150, 0))
    else:
        pen.curveTo((220, 0), (250, 50), (250, 100))
        pen.curveTo((250, 160), (200, 200), (150, 200))
        pen.curveTo((100, 200), (50, 160), (50, 100))
        pen.curveTo((50, 50), (80, 0), (150, 0))
    pen.closePath()


DRAW = {
    ".notdef": draw_notdef,
    "plaque": draw_plaque,
    "washer": draw_washer,
    "peg": draw_peg,
}
# Composites: (base glyph, transformation (xx, xy, yx, yy, dx, dy)).
COMPOSITES = {
    "bracket": [("peg", (1, 0, 0, 1, 0, 0)), ("peg", (1, 0, 0, 1, 300, 400))],
    "tag": [("plaque", (1, 0, 0, 1, 0, 0)), ("peg", (0.5, 0, 0, 0.5, 500, 300))],
}


def _finish(fb: FontBuilder, path: Path, lsb: dict[str, int]) -> Path:
    # left side bearing = xMin, as the OpenType hmtx chapter recommends (fontTools' glyph
    # sets move a glyf outline by lsb − xMin when they differ)
    fb.setupHorizontalMetrics({n: (ADVANCES[n], lsb.get(n, 0)) for n in GLYPH_ORDER})
    fb.setupHorizontalHeader(ascent=800, descent=-200)
    fb.setupNameTable({"familyName": "Workshop Test", "styleName": "Regular"})
    fb.setupOS2(sTypoAscender=800, usWinAscent=800, usWinDescent=200)
    fb.setupPost()
    fb.save(str(path))
    return path


def build_ttf(path: Path) -> Path:
    """A TrueType-flavoured font (glyf quadratics, composites as glyf components)."""
    fb = FontBuilder(UPM, isTTF=True)
    fb.setupGlyphOrder(GLYPH_ORDER)
    fb.setupCharacterMap(CMAP)
    glyphs: dict[str, Any] = {}
    for name in GLYPH_ORDER:
        pen = TTGlyphPen(glyphs)
        if name in DRAW:
            DRAW[name](pen, True)
        for base, t in COMPOSITES.get(name, []):
            pen.addComponent(base, t)
        glyphs[name] = pen.glyph()
    fb.setupGlyf(glyphs)
    glyf = fb.font["glyf"]
    lsb = {}
    for name in GLYPH_ORDER:
        g = glyf[name]
        g.recalcBounds(glyf)
        lsb[name] = int(getattr(g, "xMin", 0))
    return _finish(fb, path, lsb)


def build_otf(path: Path) -> Path:
    """A CFF-flavoured font (cubic charstrings; composites drawn out, as CFF has none)."""
    from fontTools.pens.transformPen import TransformPen

    fb = FontBuilder(UPM, isTTF=False)
    fb.setupGlyphOrder(GLYPH_ORDER)
    fb.setupCharacterMap(CMAP)
    charstrings = {}
    for name in GLYPH_ORDER:
        pen = T2CharStringPen(ADVANCES[name], None)
        if name in DRAW:
            DRAW[name](pen, False)
        for base, t in COMPOSITES.get(name, []):
            DRAW[base](TransformPen(pen, t), False)
        charstrings[name] = pen.getCharString()
    fb.setupCFF("WorkshopTest-Regular", {"FullName": "Workshop Test"}, charstrings, {})
    lsb = {}
    for name, cs in charstrings.items():
        box = cs.calcBounds(None)
        lsb[name] = int(box[0]) if box else 0
    return _finish(fb, path, lsb)


def build_ufo(path: Path) -> Path:
    """A UFO source with the same glyphs (cubic curves, real components, smooth flags)."""
    import ufoLib2

    font = ufoLib2.Font()
    font.info.unitsPerEm = UPM
    font.info.familyName = "Workshop Test"
    font.lib["public.glyphOrder"] = list(GLYPH_ORDER)
    for name in GLYPH_ORDER:
        g = font.newGlyph(name)
        g.width = ADVANCES[name]
        g.unicodes = [cp for cp, n in CMAP.items() if n == name]
        if name in DRAW:
            DRAW[name](g.getPen(), False)
        for base, t in COMPOSITES.get(name, []):
            g.getPen().addComponent(base, t)
    # mark the plaque's on-curve points between a curve and a line smooth, as editors do
    for p in font["plaque"].contours[0].points:
        if p.type is not None:
            p.smooth = True
    font["peg"].appendAnchor({"x": 150, "y": 220, "name": "top"})
    font.save(str(path))
    return path
