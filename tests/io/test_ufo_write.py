"""Writing edited glyphs back into a UFO source: only edited .glif files change, atomically."""

from __future__ import annotations

import hashlib
import os
from pathlib import Path

import numpy as np
import pytest
import ufoLib2
from font_cases import build_otf, build_ttf, build_ufo
from fontTools.pens.areaPen import AreaPen

from outlinebench.errors import FontWriteError
from outlinebench.geometry import signed_area
from outlinebench.io.font_read import read_font
from outlinebench.io.ufo_write import edited_glyphs, write_ufo_glyphs
from outlinebench.model.document import Document, frozen_points


def _tree(root: Path) -> dict[str, str]:
    """Every file under a folder → SHA-256 of its bytes."""
    out = {}
    for dirpath, _, names in os.walk(root):
        for n in names:
            p = Path(dirpath) / n
            out[str(p.relative_to(root))] = hashlib.sha256(p.read_bytes()).hexdigest()
    return out


def _move_handle(doc: Document, glyph: str, contour: int, segment: int, by) -> Document:
    """The document with one handle of one segment moved (a new segment array)."""
    k = [o.element_id for o in doc.outlines].index(glyph)
    c = doc.outlines[k].contours[contour]
    seg = np.array(c.segments[segment])
    seg[1] += by
    segs = list(c.segments)
    segs[segment] = frozen_points(seg)
    return doc.replace_contour(k, contour, c.with_segments(segs, c.joins))


def test_round_trip_rewrites_only_the_edited_glyph(tmp_path: Path) -> None:
    path = build_ufo(tmp_path / "shop.ufo")
    before = _tree(path)
    doc = read_font(path).document
    edited = _move_handle(doc, "peg", 0, 1, (7.0, -3.5))
    assert [edited.outlines[k].element_id for k in edited_glyphs(edited)] == ["peg"]
    write_ufo_glyphs(edited)
    after = _tree(path)
    changed = {name for name in before if before[name] != after.get(name)}
    # byte for byte: every file but the edited glyph's .glif (common practice, no source:
    # the promise), and no file added or removed
    assert changed == {"glyphs/peg.glif"}
    assert set(after) == set(before)
    # read back: the edited contour bit for bit, the rest as before
    again = read_font(path).document
    k = [o.element_id for o in again.outlines].index("peg")
    for a, b in zip(
        again.outlines[k].contours[0].segments, edited.outlines[k].contours[0].segments, strict=True
    ):
        np.testing.assert_array_equal(a, b)
    # fontTools' AreaPen on the glyph as ufoLib2 reads it agrees with our area of the edit
    # (reference library; the sign flips with the y axis)
    font = ufoLib2.Font.open(path)
    pen = AreaPen(font.layers.defaultLayer)
    font["peg"].draw(pen)
    ours = signed_area(list(edited.outlines[k].contours[0].segments))
    assert ours == pytest.approx(-pen.value, rel=1e-12)
    # the glyph's other data survive: anchor, advance, unicode, smooth points
    peg = font["peg"]
    assert [(a.x, a.y, a.name) for a in peg.anchors] == [(150, 220, "top")]
    assert peg.width == 300 and peg.unicodes == [0x2E]
    assert [p.smooth for p in peg.contours[0].points if p.type] == [True] * 4


def test_nothing_edited_writes_nothing(tmp_path: Path) -> None:
    path = build_ufo(tmp_path / "shop.ufo")
    stamps = {p: p.stat().st_mtime_ns for p in path.rglob("*")}
    before = _tree(path)
    doc = read_font(path).document
    assert edited_glyphs(doc) == []
    assert write_ufo_glyphs(doc) is doc
    assert _tree(path) == before
    assert {p: p.stat().st_mtime_ns for p in path.rglob("*")} == stamps


def test_a_second_save_writes_only_what_changed_since(tmp_path: Path) -> None:
    path = build_ufo(tmp_path / "shop.ufo")
    doc = write_ufo_glyphs(_move_handle(read_font(path).document, "peg", 0, 0, (1.0, 1.0)))
    assert edited_glyphs(doc) == []
    before = _tree(path)
    write_ufo_glyphs(_move_handle(doc, "plaque", 0, 0, (0.0, -2.0)))
    after = _tree(path)
    assert {n for n in before if before[n] != after[n]} == {"glyphs/plaque.glif"}


def test_binary_fonts_are_read_only(tmp_path: Path) -> None:
    for build, name in ((build_ttf, "shop.ttf"), (build_otf, "shop.otf")):
        path = build(tmp_path / name)
        data = path.read_bytes()
        doc = _move_handle(read_font(path).document, "plaque", 0, 1, (1.0, 0.0))
        with pytest.raises(FontWriteError, match=r"read-only here; write the repair to a UFO"):
            write_ufo_glyphs(doc)
        assert path.read_bytes() == data


def test_an_edited_component_contour_is_refused(tmp_path: Path) -> None:
    path = build_ufo(tmp_path / "shop.ufo")
    before = _tree(path)
    doc = _move_handle(read_font(path).document, "bracket", 1, 0, (5.0, 5.0))
    with pytest.raises(
        FontWriteError, match=r"glyph 'bracket': a contour from its component 'peg'"
    ):
        write_ufo_glyphs(doc)
    assert _tree(path) == before


def test_save_as_a_new_ufo_copies_the_source(tmp_path: Path) -> None:
    path = build_ufo(tmp_path / "shop.ufo")
    before = _tree(path)
    doc = _move_handle(read_font(path).document, "washer", 1, 2, (2.0, 0.0))
    out = write_ufo_glyphs(doc, tmp_path / "shop-fixed.ufo")
    assert _tree(path) == before  # the design itself is never overwritten
    copy = _tree(tmp_path / "shop-fixed.ufo")
    assert {n for n in before if before[n] != copy[n]} == {"glyphs/washer.glif"}
    assert out.path == str(tmp_path / "shop-fixed.ufo")
    with pytest.raises(FontWriteError, match="already exists"):
        write_ufo_glyphs(doc, tmp_path / "shop-fixed.ufo")


def test_a_read_only_glyph_file_is_not_replaced(tmp_path: Path) -> None:
    path = build_ufo(tmp_path / "shop.ufo")
    glif = path / "glyphs" / "peg.glif"
    data = glif.read_bytes()
    glif.chmod(0o444)
    doc = _move_handle(read_font(path).document, "peg", 0, 1, (1.0, 0.0))
    with pytest.raises(FontWriteError, match=r"peg\.glif: the file is read-only"):
        write_ufo_glyphs(doc)
    assert glif.read_bytes() == data
