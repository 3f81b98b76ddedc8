"""Tests for outlinebench/model/edit_rules.py (the editor's edit rules, Qt-free) and for the
split of model/commands.py and model/tools.py: the moved names stay importable from the old
places and are the same objects."""

import math

import numpy as np
import pytest
from scipy.integrate import quad

from outlinebench.errors import CommandError
from outlinebench.model import Contour, DeletePoint, Document, History, Outline, PointRef
from outlinebench.model.edit_rules import (
    deletion_order,
    join_reads_smooth,
    segment_length_commands,
    selected_contours,
    selected_segments,
)

# An invented sign-shop plate corner (Harbour Lane Signs): cubic, cubic, line, line, closed.
PLATE = [
    [[0.0, 0.0], [10.0, -8.0], [30.0, -8.0], [40.0, 0.0]],
    [[40.0, 0.0], [50.0, 8.0], [60.0, 20.0], [60.0, 30.0]],
    [[60.0, 30.0], [0.0, 30.0]],
    [[0.0, 30.0], [0.0, 0.0]],
]


def plate_doc(joins=(None, None, "corner", "corner")):
    c = Contour.from_points(PLATE, closed=True, joins=joins)
    return Document((Outline((c,)), Outline((c,))))


def bernstein_speed(points):
    """|B'(t)| from the closed-form derivative of the Bernstein form:
    B'(t) = n Σ C(n-1, i) (1-t)^(n-1-i) t^i (P_{i+1} - P_i)."""
    p = np.asarray(points, dtype=float)
    n = len(p) - 1
    d = n * np.diff(p, axis=0)

    def speed(t):
        v = sum(math.comb(n - 1, i) * (1 - t) ** (n - 1 - i) * t**i * d[i] for i in range(n))
        return float(np.hypot(v[0], v[1]))

    return speed


def arc_length(points):
    """Reference arc length: scipy.integrate.quad of |B'(t)| over [0, 1]."""
    value, _err = quad(bernstein_speed(points), 0.0, 1.0, epsabs=1e-12, epsrel=1e-12)
    return value


def test_segment_length_commands_give_the_asked_arc_length():
    doc = plate_doc()
    before = doc.contour(0, 0).segments[1]
    current = arc_length(before)
    history = History(doc)
    with history.group("Set segment length"):
        for cmd in segment_length_commands(doc, (0, 0, 1), 1.5 * current, current):
            history.do(cmd)
    after = history.document.contour(0, 0).segments[1]
    # reference: scipy.integrate.quad of the closed-form speed
    assert arc_length(after) == pytest.approx(1.5 * current, rel=1e-9)
    # the start stays; every control point is the start plus 1.5 × its offset (closed form)
    np.testing.assert_allclose(after, before[0] + 1.5 * (before - before[0]), atol=1e-12)
    # the end point's other handle (segment 2 is a line: its start) moved with the end
    np.testing.assert_allclose(history.document.contour(0, 0).segments[2][0], after[-1])
    history.undo()  # one undo step
    assert history.document is doc


def test_segment_length_of_a_line_moves_its_end_along_it():
    doc = plate_doc()
    cmds = segment_length_commands(doc, (0, 0, 2), 30.0, 60.0)  # the top edge, 60 long
    assert len(cmds) == 1
    new = cmds[0].apply(doc)
    np.testing.assert_allclose(new.contour(0, 0).segments[2], [[60.0, 30.0], [30.0, 30.0]])


@pytest.mark.parametrize("length, current", [(0.0, 10.0), (-1.0, 10.0), (5.0, 0.0), (math.nan, 1)])
def test_segment_length_must_be_positive(length, current):
    with pytest.raises(CommandError, match="greater than zero"):
        segment_length_commands(plate_doc(), (0, 0, 0), length, current)


def test_selected_contours_and_segments():
    doc = plate_doc()
    # a handle of segment 0 of outline 1; both ends of segment 2 of outline 0 (its end is the
    # start of segment 3, named canonically)
    refs = [(1, 0, 0, 1), (0, 0, 2, 0), (0, 0, 3, 0)]
    assert selected_contours(refs) == [(0, 0), (1, 0)]
    assert selected_segments(doc, refs) == [(0, 0, 2), (1, 0, 0)]
    # one on-curve point alone means the segment it starts (common practice, no source)
    assert selected_segments(doc, [(0, 0, 1, 0)], primary=(0, 0, 1, 0)) == [(0, 0, 1)]
    assert selected_segments(doc, [], primary=None) == []


def test_deletion_order_keeps_names_valid():
    doc = plate_doc()
    refs = [(0, 0, 1, 0), (0, 0, 3, 0), (0, 0, 0, 2)]  # two on-curve points and a handle
    order = deletion_order(doc, refs)
    assert order == [PointRef(0, 0, 3, 0), PointRef(0, 0, 1, 0)]
    history = History(doc)
    with history.group("Delete points"):
        for ref in order:
            history.do(DeletePoint(ref))
    # 4 on-curve points less 2 deleted: two segments remain (closed form of the count)
    assert len(history.document.contour(0, 0).segments) == 2
    # the other order fails: deleting node 1 first renames node 3 (segment 3 is gone)
    doc2 = DeletePoint(PointRef(0, 0, 1, 0)).apply(doc)
    with pytest.raises(CommandError):
        DeletePoint(PointRef(0, 0, 3, 0)).apply(doc2)


def test_join_reads_smooth_follows_the_stated_intent_then_the_angle():
    def corner(turn_deg, intent=None):
        # incoming cubic ending along +x, outgoing line turned by turn_deg (closed form)
        a = math.radians(turn_deg)
        segs = [
            [[0.0, 0.0], [5.0, 0.0], [8.0, 0.0], [10.0, 0.0]],
            [[10.0, 0.0], [10.0 + 10 * math.cos(a), 10 * math.sin(a)]],
        ]
        return Contour.from_points(segs, closed=False, joins=(intent,))

    # unstated: smooth while the tangents differ by less than SMOOTH_ANGLE_TOLERANCE_DEG = 1°
    assert join_reads_smooth(corner(0.0), 0)
    assert join_reads_smooth(corner(0.5), 0)
    assert not join_reads_smooth(corner(2.0), 0)
    # stated intent wins over the angle
    assert not join_reads_smooth(corner(0.0, "corner"), 0)
    assert join_reads_smooth(corner(30.0, "smooth"), 0)


def test_moved_names_are_importable_from_their_old_places():
    from outlinebench.model import commands, handle_rules, picking, point_names, tools

    for name in point_names.__all__:
        assert getattr(commands, name) is getattr(point_names, name)
    assert commands.SMOOTH_ANGLE_TOLERANCE_DEG is handle_rules.SMOOTH_ANGLE_TOLERANCE_DEG
    assert commands._contour_at is point_names._contour_at  # used by model/repairs.py
    for name in picking.__all__:
        assert getattr(tools, name) is getattr(picking, name)
