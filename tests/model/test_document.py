"""Tests of outlinebench/model/document.py: contour building, joins, sharing, equality."""

import numpy as np
import pytest

from outlinebench.errors import InvalidGeometryError
from outlinebench.model import Contour, Document, Outline, documents_equal


def test_from_points_makes_shared_end_points_identical():
    # The model's rule (module docstring): consecutive segments share end points exactly.
    c = Contour.from_points([[[0, 0], [1, 0]], [[1 + 1e-12, 0], [1, 1], [0, 1]]], closed=False)
    assert c.segments[0][-1].tobytes() == c.segments[1][0].tobytes()
    assert c.joins == (None,)
    assert c.kinds() == ["line", "quad"]


def test_closed_contour_has_one_join_per_segment():
    # Join j joins segment j to j+1 (mod n): n joins when closed, n-1 when open.
    pts = [[[0, 0], [1, 0]], [[1, 0], [1, 1]], [[1, 1], [0, 0]]]
    assert Contour.from_points(pts, closed=True).join_count == 3
    assert Contour.from_points(pts, closed=False).join_count == 2


def test_real_gap_is_refused_with_both_points_in_the_message():
    with pytest.raises(InvalidGeometryError, match=r"segment 0 ends at \(1, 0\)"):
        Contour.from_points([[[0, 0], [1, 0]], [[1.5, 0], [2, 0]]])


def test_gap_far_from_origin_is_not_hidden_by_the_coordinate_size():
    # Regression (review item 18): the allowed mismatch follows the contour's size, so a
    # half-unit gap at x = 1e9 is still a gap; a few-ulp rounding there is not.
    with pytest.raises(InvalidGeometryError):
        Contour.from_points([[[1e9, 0], [1e9 + 10, 0]], [[1e9 + 10.5, 0], [1e9 + 20, 0]]])
    ulp = np.spacing(1e9 + 10)  # IEEE 754 double spacing at 1e9: 2**-23 ≈ 1.19e-7
    Contour.from_points([[[1e9, 0], [1e9 + 10, 0]], [[1e9 + 10 + ulp, 0], [1e9 + 20, 0]]])


def test_segments_are_read_only():
    c = Contour.from_points([[[0, 0], [1, 0]]])
    with pytest.raises(ValueError):
        c.segments[0][0, 0] = 5.0


def test_wrong_join_count_is_refused():
    c = Contour.from_points([[[0, 0], [1, 0]], [[1, 0], [2, 0]]])
    with pytest.raises(InvalidGeometryError, match="1 joins, got 2"):
        Contour(c.segments, False, ("smooth", "corner"))


def test_replace_contour_shares_everything_untouched():
    a = Contour.from_points([[[0, 0], [1, 0]]])
    b = Contour.from_points([[[5, 5], [6, 5]]])
    doc = Document((Outline((a, b), "p1", 0),))
    new = Contour.from_points([[[0, 0], [2, 0]]])
    doc2 = doc.replace_contour(0, 0, new)
    assert doc2.outlines[0].contours[1] is b
    assert doc2.outlines[0].contours[0] is new
    assert not documents_equal(doc, doc2)
    back = doc2.replace_contour(0, 0, a)
    assert documents_equal(doc, back)


def test_contour_refs_number_contours_across_outlines_in_document_order():
    a = Contour.from_points([[[0, 0], [1, 0]]])
    doc = Document((Outline((a, a)), Outline((a,))))
    refs = [(r.outline, r.index, r.global_index) for r in doc.contour_refs()]
    assert refs == [(0, 0, 0), (0, 1, 1), (1, 0, 2)]
