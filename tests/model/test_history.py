"""Tests for outlinebench/model/history.py: undo/redo exactness, groups, merging, dirtiness."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from outlinebench.errors import CommandError
from outlinebench.model import (
    AddContour,
    ChangeDegree,
    Contour,
    DeleteContour,
    DeletePoint,
    Document,
    History,
    InsertPoint,
    MovePoints,
    Outline,
    PointRef,
    ReverseContour,
    SegmentRef,
    SetClosed,
    SetJoinIntent,
    SetPoint,
    documents_equal,
    point_refs,
)

# Invented sign outlines ("Harbour Lane Signs" wave and a plaque).
WAVE = [
    [[0.0, 0.0], [10.0, 15.0], [25.0, 15.0], [35.0, 0.0]],
    [[35.0, 0.0], [45.0, -15.0], [60.0, -15.0]],
    [[60.0, -15.0], [70.0, 0.0]],
]
PLAQUE = [
    [[0.0, 0.0], [100.0, 0.0]],
    [[100.0, 0.0], [110.0, 0.0], [110.0, 10.0], [110.0, 20.0]],
    [[110.0, 20.0], [0.0, 20.0]],
    [[0.0, 20.0], [0.0, 0.0]],
]


def sample_doc() -> Document:
    return Document(
        (
            Outline((Contour.from_points(WAVE, joins=("smooth", None)),), element_id="wave"),
            Outline(
                (
                    Contour.from_points(PLAQUE, closed=True),
                    Contour.from_points(WAVE[:2]),
                ),
                element_id="plaque",
                source_index=1,
            ),
        )
    )


def _pick(seq, i):
    return seq[i % len(seq)]


def make_command(doc: Document, op):
    """Turn a random op tuple into a command valid-or-not for the current document."""
    kind, a, b, c, x, y = op
    refs = [r.contour for r in doc.contour_refs()]
    if not refs:
        return AddContour(len(doc.outlines), Contour.from_points(WAVE))
    cr = _pick(list(doc.contour_refs()), a)
    o, ci, contour = cr.outline, cr.index, cr.contour
    n = len(contour.segments)
    if kind == "move":
        pts = point_refs(doc, o, ci)
        chosen = [_pick(pts, b), _pick(pts, c)][: 1 + (a % 2)]
        return MovePoints(chosen, (x, y), break_join=b % 3 == 0, symmetric=c % 4 == 1)
    if kind == "set":
        return SetPoint(_pick(point_refs(doc, o, ci), b), (x, y))
    if kind == "insert":
        return InsertPoint(o, ci, b % n, 0.05 + 0.9 * (c % 17) / 16)
    if kind == "delete":
        pts = [r for r in point_refs(doc, o, ci) if r.index == 0 or r.index == 3]
        return DeletePoint(_pick(pts, b))
    if kind == "degree":
        return ChangeDegree(SegmentRef(o, ci, b % n), 1 + c % 3, tolerance=1e9)
    if kind == "join":
        if not contour.joins:
            return SetClosed(o, ci, True)
        return SetJoinIntent(o, ci, b % len(contour.joins), (None, "smooth", "corner")[c % 3])
    if kind == "close":
        return SetClosed(o, ci, not contour.closed)
    if kind == "reverse":
        return ReverseContour(o, ci)
    if kind == "add":
        return AddContour(b % (len(doc.outlines) + 1), Contour.from_points(PLAQUE, closed=True))
    return DeleteContour(o, ci)


def check_invariants(doc: Document) -> None:
    """Model invariants of document.py: shared end points are bit-identical, join counts."""
    for ref in doc.contour_refs():
        c = ref.contour
        n = len(c.segments)
        assert len(c.joins) == (n if c.closed else max(n - 1, 0))
        for i in range(n - 1 + (1 if c.closed else 0)):
            assert np.array_equal(c.segments[i][-1], c.segments[(i + 1) % n][0])
        for s in c.segments:
            assert not s.flags.writeable and np.all(np.isfinite(s))


coord = st.floats(-50, 50, allow_nan=False, allow_infinity=False)
ops = st.tuples(
    st.sampled_from(
        [
            "move",
            "move",
            "set",
            "insert",
            "delete",
            "degree",
            "join",
            "close",
            "reverse",
            "add",
            "remove",
        ]
    ),
    st.integers(0, 50),
    st.integers(0, 50),
    st.integers(0, 50),
    coord,
    coord,
)


@given(st.lists(ops, min_size=1, max_size=14), st.booleans())
def test_random_edits_undo_to_the_original_and_redo_to_the_edited(op_list, grouped):
    start = sample_doc()
    h = History(start)
    snapshots = [start]
    done = 0
    for op in op_list:
        try:
            cmd = make_command(h.document, op)
            if grouped and op[1] % 2:
                with h.group("Gesture"):
                    h.do(cmd)
            else:
                h.do(cmd)
            done += 1
        except CommandError:
            continue
        check_invariants(h.document)
        snapshots.append(h.document)
    edited = h.document
    # Undo all: the identical original (documents_equal is the project's exact equality).
    steps = 0
    while h.can_undo:
        h.undo()
        steps += 1
    assert steps <= done
    assert h.document is start and documents_equal(h.document, start)
    assert not h.is_dirty
    while h.can_redo:
        h.redo()
    assert h.document is edited and documents_equal(h.document, edited)
    assert h.is_dirty == (not documents_equal(edited, start))


def test_group_makes_a_drag_one_step_and_merges_moves():
    start = sample_doc()
    h = History(start)
    seen = []
    h.subscribe(lambda old, new: seen.append((old, new)))
    handle = PointRef(0, 0, 0, 2)
    with h.group("Drag handles"):
        for _ in range(10):
            h.do(MovePoints([handle], (0.5, 0.25)))
    # Observers see every intermediate document, then the group's end (same object twice).
    assert len(seen) == 11
    assert seen[-1][0] is seen[-1][1] is seen[-2][1]
    assert h.undo_label == "Drag handles" and h.can_undo
    group = h._undo[-1]
    assert len(group.commands) == 1  # ten moves of the same point merged
    np.testing.assert_allclose(group.commands[0].delta, (5.0, 2.5))
    # 10 × (0.5, 0.25) are exact binary fractions, so the sum is exact (IEEE 754).
    np.testing.assert_array_equal(h.document.contour(0, 0).segments[0][2], [30.0, 17.5])
    h.undo()
    assert h.document is start and not h.can_undo and h.redo_label == "Drag handles"
    h.redo()
    assert h.document is seen[-1][1]


def test_separate_nudges_merge_but_not_across_a_group_or_save():
    h = History(sample_doc())
    p = PointRef(0, 0, 1, 0)
    h.do(MovePoints([p], (1, 0)))
    h.do(MovePoints([p], (1, 0)))
    assert len(h._undo) == 1
    h.mark_saved()
    h.do(MovePoints([p], (1, 0)))
    assert len(h._undo) == 2  # the save point is a merge barrier
    h.do(MovePoints([PointRef(0, 0, 2, 0)], (1, 0)))
    assert len(h._undo) == 3  # other points: separate step


def test_new_edit_clears_redo_and_limit_drops_oldest():
    h = History(sample_doc(), limit=3)
    for i in range(5):
        h.do(SetJoinIntent(0, 0, 0, ("smooth", "corner")[i % 2]))
    assert len(h._undo) == 3
    h.undo()
    assert h.can_redo
    h.do(ReverseContour(0, 0))
    assert not h.can_redo
    with pytest.raises(CommandError, match="nothing to redo"):
        h.redo()


def test_dirty_after_undoing_past_the_save_point():
    start = sample_doc()
    h = History(start)
    assert not h.is_dirty
    h.do(InsertPoint(0, 0, 0, 0.5))
    assert h.is_dirty
    h.mark_saved()
    assert not h.is_dirty
    h.undo()
    assert h.is_dirty  # before the save point differs from the saved document
    h.redo()
    assert not h.is_dirty


def test_failed_group_is_taken_back_and_undo_inside_a_group_is_refused():
    start = sample_doc()
    h = History(start)
    with pytest.raises(CommandError):
        with h.group("Broken"):
            h.do(MovePoints([PointRef(0, 0, 0, 1)], (1, 1)))
            with pytest.raises(CommandError, match="while an edit is in progress"):
                h.undo()
            h.do(InsertPoint(0, 0, 99, 0.5))
    assert h.document is start and not h.can_undo
    h.begin_group("Drag")
    h.do(MovePoints([PointRef(0, 0, 0, 1)], (1, 1)))
    h.abort_group()
    assert h.document is start
    with pytest.raises(CommandError, match="nothing to undo"):
        h.undo()


def test_unsubscribe_and_reset():
    h = History(sample_doc())
    calls = []
    unsubscribe = h.subscribe(lambda old, new: calls.append(new))
    h.do(ReverseContour(0, 0))
    unsubscribe()
    h.undo()
    assert len(calls) == 1
    other = Document()
    h.reset(other)
    assert h.document is other and not h.can_undo and not h.is_dirty


def test_regression_aborted_gesture_keeps_the_redo_stack():
    # Defect: an aborted drag cleared the redo stack although the document ended as it was.
    # Expected from the undo model itself: a cancelled gesture changes nothing (common
    # practice, no source).
    start = sample_doc()
    h = History(start)
    h.do(ReverseContour(0, 0))
    h.undo()
    assert h.can_redo
    h.begin_group("Drag")
    h.do(MovePoints([PointRef(0, 0, 1, 0)], (0.5, 0.0)))
    h.abort_group()
    assert h.document is start and h.can_redo and h.redo_label == "Reverse contour"
    # A gesture that is finished is a new edit and does clear it.
    with h.group("Drag"):
        h.do(MovePoints([PointRef(0, 0, 1, 0)], (0.5, 0.0)))
    assert not h.can_redo


def test_regression_closing_a_group_notifies_so_undo_becomes_available():
    # Defect: end_group recorded the step silently, so a window kept its undo command
    # disabled after a drag. Expected: one notification when the outermost group closes,
    # after which can_undo is True; aborting notifies with the restored document.
    start = sample_doc()
    h = History(start)
    seen = []
    h.subscribe(lambda old, new: seen.append((old, new, h.can_undo)))
    h.begin_group("Outer")
    h.begin_group("Inner")
    h.do(MovePoints([PointRef(0, 0, 1, 0)], (0.5, 0.0)))
    h.end_group()
    assert len(seen) == 1 and seen[0][2] is False  # inside a group undo is refused
    h.end_group()
    assert len(seen) == 2 and seen[1][0] is seen[1][1] is h.document and seen[1][2] is True
    h.begin_group("Cancelled")
    h.do(MovePoints([PointRef(0, 0, 1, 0)], (0.5, 0.0)))
    edited = h.document
    h.abort_group()
    assert seen[-1][:2] == (edited, seen[1][1]) and seen[-1][2] is True
    h.begin_group("Empty")
    h.end_group()
    assert len(seen) == 5 and seen[-1][0] is seen[-1][1]


def test_regression_reusing_an_applied_command_is_refused():
    # Defect: doing one command object twice, then undoing three times, failed on the third
    # undo because the object only remembered its second application. Expected: the second
    # do is refused and leaves history and document as they were (one object = one step).
    start = sample_doc()
    h = History(start)
    cmd = MovePoints([PointRef(0, 0, 1, 0)], (0.1, 0.0))
    h.do(cmd)
    h.do(SetJoinIntent(0, 0, 0, "corner"))
    before = h.document
    with pytest.raises(CommandError, match="already applied"):
        h.do(cmd)
    assert h.document is before and len(h._undo) == 2
    h.undo()
    h.undo()
    assert h.document is start
    h.redo()  # redo applies the same object to the same document again: allowed
    assert h.can_redo
