"""The crossing search alone: broad-phase candidate pairs and measure's self-crossings."""

from __future__ import annotations

import math

import numpy as np
import pytest
import shapely
from diag_docs import circle, doc_of, polygon

from outlinebench.diagnostics import check_document
from outlinebench.diagnostics.checker import self_crossings
from outlinebench.diagnostics.contour_checks import lines_apart, overlapping_pairs
from outlinebench.model.document import Contour


def _shapely_pairs(boxes: np.ndarray, group: np.ndarray, pad: float) -> set[tuple[int, int]]:
    """Box pairs that overlap (closed boxes), from shapely's STRtree (reference library)."""
    grown = boxes + np.array([-pad, -pad, pad, pad])
    polys = shapely.box(grown[:, 0], grown[:, 1], grown[:, 2], grown[:, 3])
    tree = shapely.STRtree(polys)
    a, b = tree.query(polys, predicate="intersects")
    keep = (a < b) & (group[a] == group[b])
    return set(zip(a[keep].tolist(), b[keep].tolist(), strict=True))


def _zigzag_ring(n: int, r: float = 1000.0, depth: float = 40.0) -> np.ndarray:
    """Boxes of the n lines of a closed zig-zag ring (teeth alternately in and out)."""
    a = 2.0 * math.pi * np.arange(n + 1) / n
    rad = r + depth * (np.arange(n + 1) % 2)
    pts = np.stack([rad * np.cos(a), rad * np.sin(a)], axis=1)
    p, q = pts[:-1], pts[1:]
    return np.concatenate([np.minimum(p, q), np.maximum(p, q)], axis=1)


@pytest.mark.parametrize("seed", range(6))
def test_pairs_equal_shapely_on_random_boxes(seed):
    rng = np.random.default_rng(seed)
    m = 300
    lo = rng.uniform(0, 100, (m, 2))
    boxes = np.concatenate([lo, lo + rng.exponential(4.0, (m, 2))], axis=1)
    group = rng.integers(0, 3, m)
    i, j = overlapping_pairs(boxes, group, 0.25)
    got = set(zip(i.tolist(), j.tolist(), strict=True))
    assert len(got) == i.size  # each pair once
    assert got == _shapely_pairs(boxes, group, 0.25)  # reference: shapely STRtree


def _ring_points(n: int, depth: float) -> np.ndarray:
    a = 2.0 * math.pi * np.arange(n + 1) / n
    rad = 1000.0 + depth * (np.arange(n + 1) % 2)
    pts = np.stack([rad * np.cos(a), rad * np.sin(a)], axis=1)
    pts[-1] = pts[0]  # closed exactly
    return pts


def test_zigzag_ring_pairs_equal_shapely_with_candidates_near_the_overlaps():
    # A ring of radial teeth: the x sweep alone makes far more candidates than there are
    # overlapping boxes (issue 15: 141 M candidate pairs at 100 k segments).
    n = 4000
    boxes = _zigzag_ring(n)
    group = np.zeros(n, dtype=np.intp)
    stats: dict[str, int] = {}
    i, j = overlapping_pairs(boxes, group, 0.0, stats)
    expected = _shapely_pairs(boxes, group, 0.0)  # reference: shapely STRtree
    assert set(zip(i.tolist(), j.tolist(), strict=True)) == expected
    assert stats["method"] == 1  # the grid, not the sweep
    # the grid examines a small multiple of the overlapping pairs (common practice, no source)
    assert stats["candidates"] <= 6 * len(expected)


def test_zigzag_lines_screen_keeps_every_meeting_pair_and_few_others():
    n = 20_000
    pts = _ring_points(n, 40.0)
    cubics = np.stack([pts[:-1], pts[:-1], pts[1:], pts[1:]], axis=1)  # lines as cubics
    degree = np.ones(n, dtype=np.int8)
    boxes = np.concatenate([np.minimum(pts[:-1], pts[1:]), np.maximum(pts[:-1], pts[1:])], 1)
    stats: dict[str, int] = {}
    i, j = overlapping_pairs(
        boxes, np.zeros(n, dtype=np.intp), 0.0, stats, keep=lines_apart(cubics, degree, 0.0)
    )
    got = set(zip(i.tolist(), j.tolist(), strict=True))
    # reference: the lines that meet, from shapely (STRtree with the "intersects" predicate)
    lines = shapely.linestrings(np.stack([pts[:-1], pts[1:]], axis=1))
    a, b = shapely.STRtree(lines).query(lines, predicate="intersects")
    meet = {(x, y) for x, y in zip(a.tolist(), b.tolist(), strict=True) if x < y}
    assert meet <= got
    # each line meets only its two neighbours (closed form for this ring): n pairs
    assert len(meet) == n
    assert len(got) <= 2 * n


def test_smooth_ring_of_many_segments_is_bounded():
    n = 200_000
    boxes = _zigzag_ring(n, depth=0.0)  # a polygon close to a circle
    stats: dict[str, int] = {}
    i, j = overlapping_pairs(boxes, np.zeros(n, dtype=np.intp), 1e-6, stats)
    # neighbours only: n pairs around the closed ring (closed form)
    assert i.size == n
    assert stats["candidates"] <= 20 * n


def _figure_eight() -> Contour:
    return polygon([(0, 0), (10, 10), (10, 0), (0, 10)])


def _loop_cubic() -> Contour:
    # one cubic whose handles cross: a loop inside the segment, closed by a line
    return Contour.from_points([[(0, 0), (30, 20), (-10, 20), (20, 0)], [(20, 0), (0, 0)]], True)


@pytest.mark.parametrize(
    "contours",
    [
        (_figure_eight(),),
        (_loop_cubic(), circle(50, 50, 10)),
        (circle(0, 0, 10), circle(5, 0, 10)),  # two contours crossing: not a self-crossing
        (polygon([(0, 0), (10, 0), (10, 10), (0, 10), (0.0, 0.0001)], closed=False),),
    ],
)
def test_self_crossings_are_the_full_checks_own_contour_crossings(contours):
    doc = doc_of(contours, (_figure_eight(),))
    # reference: the whole check's findings of the same kind (the behaviour measure had)
    want = [
        f
        for f in check_document(doc)
        if f.kind == "self-intersection" and f.other_contour == f.contour
    ]
    got = self_crossings(doc)
    assert sorted(got) == sorted(want)
    assert any(f.contour == len(contours) for f in got)  # the figure-eight of outline 1
