"""The incremental checker gives the same findings as a full check, computing only what an edit
touched."""

import math

import numpy as np
import pytest
from diag_docs import circle, doc_of, polygon

from outlinebench.diagnostics import Checker, CheckSettings, check_document
from outlinebench.model.document import Contour, Document, frozen_points


def as_set(findings):
    # findings as comparable rows (repr of each field; floats compared to 9 significant digits)
    def row(f):
        return tuple(f"{v:.9g}" if isinstance(v, float) else repr(v) for v in f.to_dict().values())

    return sorted(row(f) for f in findings)


def _move_point(doc: Document, outline: int, contour: int, segment: int, dx: float, dy: float):
    """Move the end point of one segment (and the start of the next): two new segment arrays,
    everything else shared, as an editor's move does."""
    c = doc.contour(outline, contour)
    segs = list(c.segments)
    n = len(segs)
    a = segs[segment].copy()
    a[-1] += (dx, dy)
    segs[segment] = frozen_points(a)
    if c.closed or segment + 1 < n:
        k = (segment + 1) % n
        b = segs[k].copy()
        b[0] += (dx, dy)
        segs[k] = frozen_points(b)
    return doc.replace_contour(outline, contour, c.with_segments(segs, c.joins))


def _sample_doc():
    r = math.radians(3)
    return doc_of(
        (polygon([(0, 0), (20, 0), (20, 20), (0, 20)]), circle(10, 10, 4, ccw=True)),
        circle(40, 10, 8),
        polygon([(60, 0), (70, 0), (70 + 10 * math.cos(r), 10 * math.sin(r))], closed=False),
        (polygon([(0, 30), (10, 40), (10, 30), (0, 40)]),),
    )


def test_update_without_change_computes_nothing():
    doc = _sample_doc()
    ch = Checker()
    first = ch.update(doc)
    assert ch.last_segments_computed == doc.segment_count()
    again = ch.update(doc)
    assert ch.last_segments_computed == 0 and ch.last_joins_computed == 0
    assert as_set(first) == as_set(again)


@pytest.mark.parametrize("where", [(0, 0, 1), (0, 1, 2), (1, 0, 3), (2, 0, 0), (3, 0, 1)])
def test_update_after_a_move_matches_a_full_check(where):
    doc = _sample_doc()
    ch = Checker()
    ch.update(doc)
    moved = _move_point(doc, *where, 0.7, -0.4)
    got = ch.update(moved)
    assert as_set(got) == as_set(check_document(moved))
    # only the two segments sharing the moved point were computed again, and only the joins
    # next to them (at most 3: before, at and after the point)
    assert ch.last_segments_computed == 2 or (ch.last_segments_computed == 1 and where[0] == 2)
    assert ch.last_joins_computed <= 3


def test_a_series_of_edits_and_undo_stays_consistent():
    doc0 = _sample_doc()
    ch = Checker()
    ch.update(doc0)
    rng = np.random.default_rng(5)
    doc = doc0
    for _ in range(25):
        o = int(rng.integers(len(doc.outlines)))
        c = int(rng.integers(len(doc.outlines[o].contours)))
        n = len(doc.contour(o, c).segments)
        s = int(rng.integers(n - (0 if doc.contour(o, c).closed else 1)))
        doc = _move_point(doc, o, c, s, *rng.normal(scale=2.0, size=2))
        assert as_set(ch.update(doc)) == as_set(check_document(doc))
    # back to the first version (undo): all its contours are the original objects again
    assert as_set(ch.update(doc0)) == as_set(check_document(doc0))


def test_changing_a_join_intent_recomputes_that_join():
    r = math.radians(3)
    c = polygon([(0, 0), (1, 0), (1 + math.cos(r), math.sin(r))], closed=False)
    doc = doc_of(c)
    ch = Checker()
    assert [f.kind for f in ch.update(doc) if f.kind in ("kink", "corner")] == ["kink"]
    c2 = c.with_segments(c.segments, ("corner",))  # same segment objects, new intent
    doc2 = doc.replace_contour(0, 0, c2)
    got = ch.update(doc2)
    assert ch.last_segments_computed == 0 and ch.last_joins_computed == 1
    assert [f.kind for f in got if f.kind in ("kink", "corner")] == ["corner"]


def test_inserting_a_point_shifts_segment_numbers():
    doc = doc_of(polygon([(0, 0), (10, 0), (10, 10), (0, 10)]))
    ch = Checker()
    ch.update(doc)
    c = doc.contour(0, 0)
    segs = list(c.segments)
    # split segment 0 at its middle with a 20° bend: three segments where there was one
    new = [frozen_points([(0, 0), (5, 1.8)]), frozen_points([(5, 1.8), (10, 0)])]
    c2 = Contour(tuple(new + segs[1:]), True)
    doc2 = doc.replace_contour(0, 0, c2)
    assert as_set(ch.update(doc2)) == as_set(check_document(doc2))
    assert ch.last_segments_computed == 2


def test_structure_change_falls_back_to_full_check():
    doc = _sample_doc()
    ch = Checker()
    ch.update(doc)
    smaller = Document(doc.outlines[1:], mm_per_unit=doc.mm_per_unit)
    assert as_set(ch.update(smaller)) == as_set(check_document(smaller))


def test_settings_are_used():
    r = math.radians(3)
    pts = [(0, 0), (10, 0), (10 + 10 * math.cos(r), 10 * math.sin(r))]
    doc = doc_of(polygon(pts, closed=False))
    assert [f.kind for f in check_document(doc, CheckSettings(kink_angle=5.0))] == ["open-contour"]
    with pytest.raises(ValueError, match="kink angle"):
        CheckSettings(kink_angle=20.0, corner_angle=10.0)


def test_degenerate_contours_give_no_false_crossings():
    # an empty contour, a closed contour of one looping segment (its ends are its only join),
    # and a zero-length segment (tiny, not crossing its neighbour): common practice, no source
    loop = Contour.from_points([[(0, 0), (10, 10), (-10, 10), (0, 0)]], closed=True)
    zero = Contour.from_points([[(40, 0), (40, 0)], [(40, 0), (50, 0)]])
    doc = doc_of((Contour((), False), loop), zero)
    found = check_document(doc)
    assert not [f for f in found if f.kind == "self-intersection"]
    assert [f.segment for f in found if f.kind == "tiny-segment"] == [0]
    # the loop's join turns 90° (tangents (1,1) and (1,−1) directions: closed form)
    (c,) = [f for f in found if f.kind == "corner"]
    assert c.value == pytest.approx(90.0)
    assert check_document(Document()) == []


def test_opening_and_closing_a_contour_incrementally():
    doc = _sample_doc()
    ch = Checker()
    ch.update(doc)
    c = doc.contour(1, 0)  # the circle
    opened = Contour(c.segments, False)
    doc2 = doc.replace_contour(1, 0, opened)
    assert as_set(ch.update(doc2)) == as_set(check_document(doc2))
    assert ch.last_segments_computed == 0  # same segment objects, only joins and ends redone
    assert any(f.kind == "open-contour" for f in ch.findings)
    assert as_set(ch.update(doc)) == as_set(check_document(doc))


def test_updates_with_the_touched_hint_match_full_checks_and_old_results_stay(monkeypatch):
    # review item 4: the caller may name the outlines an edit replaced; the results must be
    # those of a full check (the reference), and earlier results must not change afterwards
    from outlinebench.diagnostics import finding_sequence

    monkeypatch.setattr(finding_sequence, "MAX_REPLACED_BLOCKS", 2)  # flatten often too
    rng = np.random.default_rng(11)
    doc = _sample_doc()
    ch = Checker()
    first = ch.update(doc)
    kept = list(first)
    for _ in range(40):
        o = int(rng.integers(len(doc.outlines)))
        c = int(rng.integers(len(doc.outlines[o].contours)))
        s = int(rng.integers(len(doc.outlines[o].contours[c].segments)))
        doc = _move_point(doc, o, c, s, *rng.normal(scale=0.3, size=2))
        got = ch.update(doc, touched=[o])
        assert as_set(got) == as_set(check_document(doc))
        assert len(got) == len(list(got)) and [got[k] for k in range(len(got))] == list(got)
    assert list(first) == kept


def test_finding_sequence_behaves_as_a_list():
    # reference: Python's own list semantics (indexing, negative indices, slices, len, ==, in)
    from outlinebench.diagnostics import Finding
    from outlinebench.diagnostics.finding_sequence import FindingSequence

    def f(k):
        return Finding("corner", "info", 0, k, 0, 1.0, 0.0, 0.0, float(k), "degrees", "m")

    base = [f(k) for k in range(10)]
    starts = np.array([0, 3, 3, 7, 10])  # blocks of 3, 0, 4, 3
    seq = FindingSequence(base, starts)
    assert list(seq) == base and seq == base and len(seq) == 10
    new = seq.replace_blocks({1: [f(20), f(21)], 2: [f(30)]})
    model = base[:3] + [f(20), f(21)] + [f(30)] + base[7:]
    assert list(new) == model and len(new) == len(model) and new == model
    assert [new[k] for k in range(-len(model), len(model))] == model + model
    assert new[2:5] == model[2:5] and f(21) in new and f(5) not in new
    assert list(seq) == base  # the older sequence is unchanged
    again = new.replace_blocks({0: []})
    assert list(again) == model[3:] and list(new) == model
    with pytest.raises(IndexError):
        new[len(model)]
