"""Tests of outlinebench/io/svg_write.py: write-back, round trips, atomic saving, cut files."""

import os
import stat
import xml.etree.ElementTree as ET
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
import svgpathtools
from hypothesis import given
from hypothesis import strategies as st

from outlinebench.errors import SvgWriteError
from outlinebench.io import atomic as atomic_module
from outlinebench.io import polylines_svg, read_svg, svg_bytes, write_svg
from outlinebench.io import svg_write as svg_write_module
from outlinebench.model.document import Contour, Document, Outline, documents_equal

DATA = Path(__file__).resolve().parents[1] / "data" / "svg"
# Our test files and the project's sample files (the issue: "for every sample and test file").
FILES = sorted(DATA.glob("*.svg")) + sorted((DATA.parents[2] / "samples").glob("*.svg"))


def moved(contour, dx=0.125, joins=None):
    return Contour.from_points(
        [np.asarray(s) + [dx, 0.0] for s in contour.segments],
        closed=contour.closed,
        joins=joins if joins is not None else contour.joins,
    )


@pytest.mark.parametrize("path", FILES, ids=lambda p: p.name)
def test_untouched_documents_are_written_byte_for_byte(path):
    doc = read_svg(path).document
    assert svg_bytes(doc) == path.read_bytes()


@pytest.mark.parametrize("path", FILES, ids=lambda p: p.name)
def test_edited_round_trip_is_bit_identical(path, tmp_path):
    # read → edit every outline without a transform → write → read: same floats, same joins
    # (the writer's shortest round-trip digits; documents_equal compares bit for bit).
    res = read_svg(path)
    doc = res.document
    for i, o in enumerate(doc.outlines):
        if o.source.use is None and np.array_equal(o.transform, np.eye(3)):
            for k, c in enumerate(o.contours):
                doc = doc.replace_contour(i, k, moved(c))
    target = tmp_path / path.name
    write_svg(doc, target)
    again = read_svg(target).document
    expected = replace(
        doc,
        outlines=tuple(
            replace(o, tag="path") if o.contours is not orig.contours else o
            for o, orig in zip(doc.outlines, res.document.outlines, strict=True)
        ),
        source=None,
    )
    for a, b in zip(expected.outlines, again.outlines, strict=True):
        assert a.element_id == b.element_id
        assert len(a.contours) == len(b.contours)
        for x, y in zip(a.contours, b.contours, strict=True):
            assert x.joins == y.joins and x.closed == y.closed
            for s, t in zip(x.segments, y.segments, strict=True):
                assert np.array_equal(s, t)
    assert documents_equal(read_svg(target).document, again)


def test_everything_else_survives_an_edit():
    path = DATA / "harbour_lane_sign.svg"
    doc = read_svg(path).document
    board = doc.outlines[0]
    assert board.tag == "rect"
    doc = doc.replace_contour(0, 0, moved(board.contours[0]))
    out = svg_bytes(doc).decode()
    original = path.read_text()
    # The rect became a path with its id, class and foreign attribute; its geometry
    # attributes are gone.
    assert '<path id="board" class="cut" hl:layer="outer" d="M' in out
    assert 'rx="12"' not in out
    # Every other line is untouched: comments, doctype, text, image, style, hidden path.
    changed = [a for a, b in zip(original.splitlines(), out.splitlines(), strict=True) if a != b]
    assert len(changed) == 1 and "board" in changed[0]


def test_shape_with_an_end_tag_becomes_a_path():
    data = (
        b'<svg xmlns="http://www.w3.org/2000/svg"><!-- keep -->'
        b'<circle id="c" cx="0" cy="0" r="1" fill="red"><title>dot</title></circle></svg>'
    )
    doc = read_svg(data).document
    doc = doc.replace_contour(0, 0, moved(doc.outlines[0].contours[0]))
    out = svg_bytes(doc)
    root = ET.fromstring(out)
    (el,) = [e for e in root if e.tag.endswith("path")]
    assert el.get("id") == "c" and el.get("fill") == "red" and el.get("r") is None
    assert el[0].text == "dot" and b"<!-- keep -->" in out


def test_an_outline_with_every_contour_deleted_keeps_a_valid_empty_element():
    # The element stays (its id may be referenced by a use, its attributes are the user's)
    # with d="": the SVG 1.1 §8.3.9 BNF allows empty path data (svg-path: wsp* groups? wsp*)
    # and SVG 2 §9.3.2 says it disables rendering. svgpathtools reads "" as an empty path.
    from outlinebench.model.commands import DeleteContour

    data = (
        b'<svg xmlns="http://www.w3.org/2000/svg"><path id="p" d="M0 0 L1 1 M2 2 L3 3" '
        b'fill="none"/><rect id="r" x="1" y="1" width="2" height="2"/><use href="#p"/></svg>'
    )
    doc = read_svg(data).document
    for outline, count in ((0, 2), (1, 1)):
        for _ in range(count):
            doc = DeleteContour(outline, len(doc.outlines[outline].contours) - 1).apply(doc)
    out = svg_bytes(doc)
    root = ET.fromstring(out)
    path, rect_now = [e for e in root if e.tag.endswith("path")]
    assert (path.get("id"), path.get("d"), path.get("fill")) == ("p", "", "none")
    assert (rect_now.get("id"), rect_now.get("d"), rect_now.get("width")) == ("r", "", None)
    assert len(svgpathtools.parse_path(path.get("d"))) == 0
    back = read_svg(out)
    assert back.error is None and not [n for n in back.notes if n.level == "error"]
    assert [len(o.contours) for o in back.document.outlines] == [0, 0, 0]


@pytest.mark.parametrize(
    "body",
    [
        '<path id="p" d="M0 0 L1 1 L2 0"/><use href="#p" x="5" transform="scale(2)"/>',
        '<g id="g"><path id="p" d="M0 0 L1 1 L2 0"/></g><use href="#g" x="5" '
        'transform="scale(2)"/>',
    ],
    ids=["use-of-path", "use-of-group"],
)
def test_editing_an_element_that_a_use_repeats_saves_and_the_instance_follows(body):
    # SVG 1.1 §5.6: a use renders its referenced element translated by (x, y) and then by its
    # own transform, so after the edit the instance is the edited path, shifted by x = 5 and
    # scaled by 2. Saving used to fail its own check because the instance's outline in the
    # document still held the old geometry.
    from outlinebench.model.commands import MovePoints, PointRef

    doc = read_svg(f'<svg xmlns="http://www.w3.org/2000/svg">{body}</svg>'.encode()).document
    doc = MovePoints([PointRef(0, 0, 1, 0)], (0.25, 0.5)).apply(doc)  # the middle node
    back = read_svg(svg_bytes(doc)).document
    assert [s.tolist() for s in back.outlines[0].contours[0].segments] == [
        [[0, 0], [1.25, 1.5]],
        [[1.25, 1.5], [2, 0]],
    ]
    assert [s.tolist() for s in back.outlines[1].contours[0].segments] == [
        [[10, 0], [12.5, 3]],
        [[12.5, 3], [14, 0]],
    ]


@pytest.mark.parametrize(
    "shape",
    ['<rect width="4" height="2"/>', '<circle r="2"/>', '<line x2="3" y2="1"/>'],
)
def test_an_empty_element_shape_right_before_its_parents_end_tag_becomes_a_path(shape):
    # Minified files write "<g><rect .../></g>"; the parser's end position of an empty
    # element is the end of its tag, where the parent's "</g>" begins. That end tag is the
    # parent's, not the shape's, and must stay "</g>" (XML 1.0 §3.1: an empty-element tag has
    # no end tag). The edit used to rename it and fail the save check.
    data = f'<svg xmlns="http://www.w3.org/2000/svg"><g id="layer">{shape}</g></svg>'.encode()
    doc = read_svg(data).document
    doc = doc.replace_contour(0, 0, moved(doc.outlines[0].contours[0]))
    out = svg_bytes(doc)
    assert out.endswith(b"/></g></svg>")
    (group,) = ET.fromstring(out)
    assert group.get("id") == "layer" and [e.tag.rpartition("}")[2] for e in group] == ["path"]


def test_join_intent_round_trip_and_namespace_declaration():
    data = b'<svg xmlns="http://www.w3.org/2000/svg"><path d="M0 0 L1 0 L1 1 L0 1 Z"/></svg>'
    doc = read_svg(data).document
    c = doc.outlines[0].contours[0]
    doc = doc.replace_contour(0, 0, Contour(c.segments, c.closed, ("smooth", None, "corner", None)))
    out = svg_bytes(doc)
    assert b'xmlns:ob="urn:outlinebench:join-intent"' in out
    assert b'ob:joins="s-c-"' in out
    assert b'd="M0 0 L1 0 L1 1 L0 1 Z"' in out  # only the joins changed: d kept as written
    back = read_svg(out).document
    assert back.outlines[0].contours[0].joins == ("smooth", None, "corner", None)


def test_new_outlines_are_added():
    data = b'<svg xmlns="http://www.w3.org/2000/svg"/>'
    doc = read_svg(data).document
    new = Outline((Contour.from_points([[[0, 0], [1, 2]], [[1, 2], [3, 0]]]),), element_id="n")
    doc = replace(doc, outlines=(new,))
    back = read_svg(svg_bytes(doc)).document
    assert back.outlines[0].element_id == "n"
    assert back.outlines[0].contours[0].segments[1].tolist() == [[1, 2], [3, 0]]


def test_edits_under_a_transform_go_back_to_element_coordinates():
    data = (
        b'<svg xmlns="http://www.w3.org/2000/svg"><g transform="rotate(33) scale(-1.1 0.7)">'
        b'<path id="t" d="M0 0 C1 2 3 4 5 6"/></g></svg>'
    )
    doc = read_svg(data).document
    doc = doc.replace_contour(0, 0, moved(doc.outlines[0].contours[0], 0.3))
    back = read_svg(svg_bytes(doc)).document
    # Inverse transform, then the reader's forward transform: equal to ~1e-15 relative (the
    # writer searches nearby floats; bit equality is not always reachable under rotation).
    np.testing.assert_allclose(
        back.outlines[0].contours[0].segments[0],
        doc.outlines[0].contours[0].segments[0],
        rtol=0,
        atol=1e-13,
    )


@pytest.mark.parametrize("transform", ["translate(0.1 0.2) scale(3)", "rotate(30 5 5)"])
def test_untouched_points_under_a_transform_keep_their_short_numbers(transform):
    # Moving one point rewrites the whole d; the other points' root coordinates are the
    # reader's transform of "3.3", "0.3", ... and the plain inverse gives neighbouring floats
    # (3.2999999999999994). Among element coordinates that map back bit for bit, the writer
    # takes the one with the fewest decimals, so the numbers the file had come back.
    from outlinebench.model.commands import MovePoints, PointRef

    d = "M1.1 2.2 L3.3 4.4 L5.7 0.3 L-7.25 1.05"
    data = f'<svg xmlns="http://www.w3.org/2000/svg"><path transform="{transform}" d="{d}"/></svg>'
    doc = read_svg(data.encode()).document
    doc = MovePoints([PointRef(0, 0, 0, 0)], (1.0, 0.0)).apply(doc)
    out = svg_bytes(doc).decode()
    written = ET.fromstring(out)[0].get("d")
    assert written.split(" ", 2)[2] == "L3.3 4.4 L5.7 0.3 L-7.25 1.05"
    back = read_svg(out.encode()).document  # and the root coordinates are bit-identical
    want, have = doc.outlines[0].contours[0].segments, back.outlines[0].contours[0].segments
    assert all(np.array_equal(a, b) for a, b in zip(want, have, strict=True))


def test_fresh_document_gets_a_minimal_root():
    c = Contour.from_points(
        [[[0, 0], [10, 0]], [[10, 0], [10, 5], [0, 5]], [[0, 5], [0, 0]]], closed=True
    )
    doc = Document(
        (Outline((c,)),),
        width_mm=20.0,
        height_mm=10.0,
        view_box=(0, 0, 20, 10),
        mm_per_unit=1.0,
        units="mm",
    )
    out = svg_bytes(doc)
    back = read_svg(out).document
    assert back.width_mm == 20 and back.mm_per_unit == 1.0
    for s, t in zip(c.segments, back.outlines[0].contours[0].segments, strict=True):
        assert np.array_equal(s, t)


def test_edited_use_instance_becomes_a_path():
    data = (
        b'<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink">'
        b'<defs><rect id="tile" width="4" height="2" fill="teal"/>'
        b'<g id="pair"><path d="M0 0 L1 0"/><path d="M0 1 L1 1"/></g></defs>'
        b'<use id="one" xlink:href="#tile" x="10" transform="rotate(90)"/>'
        b'<use id="two" href="#tile" x="20"/><use id="both" href="#pair"/></svg>'
    )
    doc = read_svg(data).document
    one = doc.replace_contour(0, 0, moved(doc.outlines[0].contours[0]))
    out = svg_bytes(one)
    root = ET.fromstring(out)
    kids = [e for e in root if not e.tag.endswith("defs")]
    # The edited instance is a path with the use's id and transform and the tile's fill;
    # the other use and the referenced rect are untouched.
    assert kids[0].tag.endswith("path") and kids[0].get("id") == "one"
    assert kids[0].get("transform") == "rotate(90)" and kids[0].get("fill") == "teal"
    assert kids[0].get("x") is None and kids[0].get("{http://www.w3.org/1999/xlink}href") is None
    assert kids[1].tag.endswith("use") and b'<rect id="tile"' in out
    back = read_svg(out).document
    np.testing.assert_allclose(
        back.outlines[0].contours[0].segments[0],
        one.outlines[0].contours[0].segments[0],
        rtol=0,
        atol=1e-12,
    )


@pytest.mark.parametrize("closing", ["/>", "></use>"])
def test_edited_instance_of_a_symbol_becomes_a_group_of_paths(closing):
    # Symbols are how some exporters write repeated artwork; their content is not an outline
    # of its own, so an edit of one instance must be saveable. The use becomes a <g> (same
    # id, transform and style) holding one path per outline of the instance, in the use's
    # own coordinates (SVG 1.1 §5.6: the use's x/y and the symbol's viewBox are baked in);
    # the symbol and the other instance stay as they were.
    symbol = (
        b'<symbol id="star" viewBox="-10 -10 20 20"><g transform="scale(0.5)">'
        b'<polygon class="st0" points="0,-19 4,-6 18,-6 7,2 11,16 0,8 -11,16 -7,2 -18,-6 -4,-6"/>'
        b'<circle cx="0" cy="0" r="3" fill="red"/></g></symbol>'
    )
    data = (
        b'<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink">'
        + symbol
        + b'<use id="a" xlink:href="#star" x="-10" y="-10" width="40" height="40" '
        b'transform="translate(100 50)" style="overflow:visible"'
        + closing.encode()
        + b'<use id="b" xlink:href="#star" x="30" y="0" width="20" height="20"/></svg>'
    )
    doc = read_svg(data).document
    assert [o.tag for o in doc.outlines] == ["polygon", "circle", "polygon", "circle"]
    edited = doc.replace_contour(0, 0, moved(doc.outlines[0].contours[0], dx=0.5))
    out = svg_bytes(edited)
    assert symbol in out and b'<use id="b" xlink:href="#star" x="30"' in out
    root = ET.fromstring(out)
    group = root[1]
    assert group.tag.endswith("}g") and group.get("id") == "a"
    assert group.get("transform") == "translate(100 50)" and group.get("x") is None
    assert group.get("{http://www.w3.org/1999/xlink}href") is None
    assert [(e.tag.rpartition("}")[2], e.get("fill"), e.get("class")) for e in group] == [
        ("path", None, "st0"),
        ("path", "red", None),
    ]
    back = read_svg(out).document
    assert len(back.outlines) == 4
    for want, have in zip(edited.outlines, back.outlines, strict=True):
        for cw, ch in zip(want.contours, have.contours, strict=True):
            assert cw.closed == ch.closed
            for sw, sh in zip(cw.segments, ch.segments, strict=True):
                np.testing.assert_allclose(sh, sw, rtol=0, atol=1e-12)


def test_an_instance_showing_text_is_not_forked_silently():
    # Forking writes only outlines; text (or an image, or a hidden shape) inside the symbol
    # would vanish from that instance, so the save is refused with a message that names the
    # use and what it shows (the issue: never silently drop content).
    data = (
        b'<svg xmlns="http://www.w3.org/2000/svg"><symbol id="tag"><rect width="4" height="2"/>'
        b'<text>HL</text></symbol>\n<use href="#tag" x="3"/></svg>'
    )
    doc = read_svg(data).document
    edited = doc.replace_contour(0, 0, moved(doc.outlines[0].contours[0]))
    with pytest.raises(SvgWriteError, match=r"<use> at line 2 .*text"):
        svg_bytes(edited)


# -- atomic saving ------------------------------------------------------------------------
def _edited(path):
    doc = read_svg(path).document
    return doc.replace_contour(0, 0, moved(doc.outlines[0].contours[0]))


def test_failed_write_leaves_the_old_file(tmp_path, monkeypatch):
    target = tmp_path / "bracket.svg"
    target.write_bytes((DATA / "kestrel_bracket.svg").read_bytes())
    before = target.read_bytes()
    doc = _edited(target)

    def half_then_fail(fh, data):
        fh.write(data[: len(data) // 2])
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(atomic_module, "_write_all", half_then_fail)
    with pytest.raises(SvgWriteError, match="old file is unchanged"):
        write_svg(doc, target)
    assert target.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bracket.svg"]  # no temp left
    monkeypatch.undo()
    write_svg(doc, target)
    assert target.read_bytes() != before
    assert documents_equal(read_svg(target).document, read_svg(svg_bytes(doc)).document)


def test_a_serialisation_that_does_not_read_back_is_refused_and_the_file_kept(
    tmp_path, monkeypatch
):
    # The issue: "serialise fully, re-read the result as a check". A writer fault (here: path
    # data that loses its last segment) must stop the save before the file is touched, and
    # name the outline as the reader does (id, or 1-based position).
    target = tmp_path / "bracket.svg"
    target.write_bytes((DATA / "kestrel_bracket.svg").read_bytes())
    before = target.read_bytes()
    doc = _edited(target)
    real = svg_write_module.format_path_data

    def lossy(contours):
        c = contours[0]
        return real([Contour(c.segments[:-1], False)] + list(contours[1:]))

    monkeypatch.setattr(svg_write_module, "format_path_data", lossy)
    name = doc.outlines[0].element_id
    where = f'id "{name}"' if name else "#1"
    with pytest.raises(SvgWriteError, match=f"save check failed: outline {where} does not"):
        write_svg(doc, target)
    assert target.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bracket.svg"]


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
def test_read_only_target_is_refused(tmp_path):
    target = tmp_path / "locked.svg"
    target.write_bytes((DATA / "kestrel_bracket.svg").read_bytes())
    target.chmod(stat.S_IRUSR)
    doc = _edited(target)
    with pytest.raises(SvgWriteError, match="read-only"):
        write_svg(doc, target)
    assert target.read_bytes() == (DATA / "kestrel_bracket.svg").read_bytes()


@pytest.mark.skipif(os.name != "posix", reason="POSIX symbolic links")
def test_saving_through_a_symbolic_link_writes_the_file_it_points_to(tmp_path):
    # Common practice, no source (what text editors do): a link stays a link and the file it
    # names gets the new content; replacing the link by a plain file would leave the real
    # file stale.
    real_dir = tmp_path / "shop"
    real_dir.mkdir()
    real = real_dir / "bracket.svg"
    real.write_bytes((DATA / "kestrel_bracket.svg").read_bytes())
    link = tmp_path / "current.svg"
    link.symlink_to(os.path.relpath(real, tmp_path))
    doc = _edited(link)
    write_svg(doc, link)
    assert link.is_symlink() and link.resolve() == real.resolve()
    assert real.read_bytes() == svg_bytes(doc)
    assert sorted(p.name for p in real_dir.iterdir()) == ["bracket.svg"]  # no temp left


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
def test_a_new_file_gets_the_usual_permissions(tmp_path):
    # POSIX open(2): a created file's mode is 0o666 masked by the umask; a temporary file
    # from mkstemp is 0o600, which must not leak into the saved drawing.
    doc = _edited(DATA / "kestrel_bracket.svg")
    old = os.umask(0o022)
    try:
        write_svg(doc, tmp_path / "new.svg")
    finally:
        os.umask(old)
    assert stat.S_IMODE((tmp_path / "new.svg").stat().st_mode) == 0o644


def test_no_target_name():
    with pytest.raises(SvgWriteError, match="no file name"):
        write_svg(Document())


# -- cut files ------------------------------------------------------------------------------
def test_polylines_carry_the_caution_and_read_back_in_mm():
    pts = [np.array([[0, 0], [10, 0], [10, 5]]), np.array([[1, 1], [2, 2], [3, 1]])]
    out = polylines_svg(
        pts, width_mm=30, height_mm=20, comment="tolerance 0.01 mm", closed=[True, False]
    )
    text = out.decode()
    assert "verify these toolpaths in the machine's own preview" in text
    assert "shop safety rules and local codes" in text
    doc = read_svg(out).document
    assert doc.width_mm == 30 and doc.mm_per_unit == 1.0
    assert doc.outlines[0].contours[0].closed and not doc.outlines[1].contours[0].closed
    assert doc.outlines[1].contours[0].segments[1].tolist() == [[2, 2], [3, 1]]


@given(st.lists(st.tuples(st.floats(-1e4, 1e4), st.floats(-1e4, 1e4)), min_size=2, max_size=8))
def test_polyline_points_round_trip_exactly(points):
    out = polylines_svg([points], width_mm=10, height_mm=10)
    doc = read_svg(out).document
    segs = doc.outlines[0].contours[0].segments
    got = [segs[0][0].tolist()] + [s[1].tolist() for s in segs]
    assert got == [[x + 0.0, y + 0.0] for x, y in points]


@pytest.mark.parametrize(
    "head",
    [b"\xef\xbb\xbf", b'<?xml version="1.0" encoding="ISO-8859-1"?>\r\n'],
    ids=["utf8-bom", "latin1-crlf"],
)
def test_splicing_keeps_byte_offsets_with_boms_and_other_encodings(head):
    # Expat's byte offsets count every byte, so a BOM, CRLF line ends and non-ASCII text
    # before the element must not shift the splice.
    text = "Kestrel \u00e5 \u00e9".encode("latin-1" if b"ISO" in head else "utf-8")
    data = (
        head
        + b'<svg xmlns="http://www.w3.org/2000/svg">\r\n<text>'
        + text
        + b'</text>\r\n<path id="p" d="M0 0 L1 1"/>\r\n</svg>\r\n'
    )
    doc = read_svg(data).document
    doc = doc.replace_contour(0, 0, moved(doc.outlines[0].contours[0]))
    out = svg_bytes(doc)
    assert out.startswith(head) and text in out
    assert b'<path id="p" d="M0.125 0 L1.125 1"/>\r\n</svg>\r\n' in out


def test_missing_folder_is_named_without_the_temporary_file(tmp_path):
    # A user sees the folder and the system's reason (strerror of ENOENT, POSIX), not the
    # name of an internal temporary file (review of the editor's save message).
    from outlinebench.io import write_file_atomic

    target = tmp_path / "no-such-folder" / "cut.svg"
    with pytest.raises(SvgWriteError, match=r"cannot create a file in .*no-such-folder") as err:
        write_file_atomic(target, b"<svg/>")
    assert ".tmp" not in str(err.value)
    assert not target.parent.exists()
