"""Regression cases of the fuzzing campaign: the caps on work (outlinebench.limits) hold.

Each input is a small version of a campaign finding; the checks compare with shapely or with
the previous, quadratic implementation's known answers, and with the stated caps.
"""

import numpy as np
import pytest
import shapely

import outlinebench.limits as limits
from outlinebench.diagnostics.outline_overlaps import outline_overlap_findings
from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.offset import offset_contour
from outlinebench.geometry.offset_trim import _backward_loop, _refine_crossings, _snap_nodes
from outlinebench.io import read_svg

H = '<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="100mm" viewBox="0 0 100 100">'


def test_hash_grid_snapping_matches_the_scan_over_all_representatives():
    # the definition (first earlier representative within snap, Euclidean), computed by the
    # plain quadratic scan (common practice, no source)
    rng = np.random.default_rng(4)
    pts = rng.uniform(0, 1, (400, 2))
    snap = 0.03
    reps, want = [], []
    for q in pts:
        for j, rp in enumerate(reps):
            if np.hypot(*(q - rp)) <= snap:
                want.append(j)
                break
        else:
            want.append(len(reps))
            reps.append(q)
    assert _snap_nodes(pts, snap).tolist() == want


def test_backward_loop_is_the_first_pair_the_double_loop_finds():
    # brute force over pairs (i, then j) as the definition (common practice, no source)
    rng = np.random.default_rng(5)
    for _ in range(200):
        n = int(rng.integers(2, 12))
        nodes = rng.integers(0, 4, n + 1).tolist()
        rev = (rng.random(n) < 0.3).tolist()
        closed = bool(rng.random() < 0.5)
        want = None
        for i in range(len(nodes)):
            for j in range(i + 1, len(nodes)):
                if nodes[i] != nodes[j] or (i == 0 and j == len(nodes) - 1):
                    continue
                if any(rev[i:j]):
                    want = ("cut", i, j)
                elif closed and any(rev[j:] + rev[:i]):
                    want = ("keep", i, j)
                if want:
                    break
            if want:
                break
        assert _backward_loop(nodes, rev, closed) == want


def test_vectorised_crossing_refinement_lands_on_the_crossing():
    # two straight cubics crossing at (5, 5): closed form of the line intersection
    a = np.array([[[0, 0], [10 / 3, 10 / 3], [20 / 3, 20 / 3], [10, 10]]], float)
    b = np.array([[[0, 10], [10 / 3, 20 / 3], [20 / 3, 10 / 3], [10, 0]]], float)
    ta, tb, ok = _refine_crossings(a, b, np.array([0.4]), np.array([0.6]))
    assert ok[0] and abs(ta[0] - 0.5) < 1e-12 and abs(tb[0] - 0.5) < 1e-12


def test_offset_of_a_long_smooth_ring_is_at_distance_d():
    # 4,000 segments (quadratic before: about 60 s): every vertex of the outward offset at
    # distance d from the ring within the tolerance (shapely distance)
    th = np.linspace(0, 2 * np.pi, 4001)
    r = 40 + 0.5 * np.sin(7 * th)
    p = np.stack([50 + r * np.cos(th), 50 + r * np.sin(th)], 1)
    segs = [np.array([p[i], p[i + 1]]) for i in range(4000)]
    res = offset_contour(segs, True, 1.0, 0.01)
    assert len(res.contours) == 1
    ring = shapely.LinearRing(p[:-1])
    d = shapely.distance(shapely.points(res.contours[0].polyline), ring)
    assert np.max(np.abs(d - 1.0)) <= 0.01


def test_a_contour_far_more_detailed_than_the_tool_is_refused_with_the_cap(monkeypatch):
    # star of 400 spikes 0.5 wide under a tool of diameter 2: every piece of the raw offset
    # crosses its neighbours' (campaign class "many-segments"); with the cap lowered the
    # project's error names it
    monkeypatch.setattr(limits, "OFFSET_CROSSINGS", 100)
    th = np.linspace(0, 2 * np.pi, 800, endpoint=False)
    rad = np.where(np.arange(800) % 2, 30, 40)
    p = np.stack([50 + rad * np.cos(th), 50 + rad * np.sin(th)], 1)
    segs = [np.array([p[i], p[(i + 1) % 800]]) for i in range(800)]
    with pytest.raises(InvalidGeometryError, match="crosses itself more than 100"):
        offset_contour(segs, True, 1.0, 0.01)


def test_self_crossings_listed_are_capped_and_the_rest_counted(monkeypatch):
    # a zig-zag closed across itself: the closing line crosses every tooth (closed form)
    import outlinebench.geometry.offset as off

    monkeypatch.setattr(off, "FINDINGS_PER_KIND", 10)
    pts = np.array([[0, 0]] + [[i % 2 * 10, i * 0.5] for i in range(1, 200)], float)
    segs = [np.array([pts[i], pts[(i + 1) % len(pts)]]) for i in range(len(pts))]
    res = offset_contour(segs, True, 1.0, 0.01)
    assert not res.contours
    assert len(res.problems) == 11
    assert "were not examined" in res.problems[-1].message


def test_overlap_flood_is_capped_with_the_rest_counted(monkeypatch):
    # 60 unit squares shifted by 0.1: pairs closer than 1 overlap (closed form: squares
    # k and m overlap iff |k − m| · 0.1 < 1, i.e. |k − m| ≤ 9)
    monkeypatch.setattr("outlinebench.diagnostics.outline_overlaps.FINDINGS_PER_KIND", 20)
    body = "".join(f'<path d="M{k * 0.1:.1f} 0 h1 v1 h-1 Z"/>' for k in range(60))
    doc = read_svg((H + body + "</svg>").encode()).document
    found = outline_overlap_findings(doc, 0.001)
    total = sum(60 - g for g in range(1, 10))
    assert len(found) == 21
    assert found[-1].value == total - 20 and found[-1].unit == "pairs"
    assert found[-1].severity == "error"


def test_overlap_candidate_pairs_past_the_cap_are_counted(monkeypatch):
    monkeypatch.setattr("outlinebench.diagnostics.outline_overlaps.OVERLAP_CANDIDATE_PAIRS", 30)
    body = "".join(f'<path d="M{k * 0.1:.1f} 0 h1 v1 h-1 Z"/>' for k in range(60))
    doc = read_svg((H + body + "</svg>").encode()).document
    found = outline_overlap_findings(doc, 0.001)
    # candidates: boxes that meet, |k − m| ≤ 10 (the tenth neighbour touches along an edge;
    # closed form); 30 are examined, the rest counted
    candidates = sum(60 - g for g in range(1, 11))
    assert 2 <= len(found) <= 31
    assert "were not examined" in found[-1].message
    assert found[-1].value == candidates - 30


def test_an_outline_past_the_crossing_cap_is_an_offset_failed_error(monkeypatch):
    # the document offset goes on: that outline gets an error finding and no toolpath, the
    # other (a plain square, offset by 1 outward: 4 sides + 4 round corners, closed form
    # length 4·10 + 2π·1) is offset
    from outlinebench.api.cutting import offset_document

    monkeypatch.setattr(limits, "OFFSET_CROSSINGS", 100)
    th = np.linspace(0, 2 * np.pi, 800, endpoint=False)
    rad = np.where(np.arange(800) % 2, 30, 40)
    p = np.stack([50 + rad * np.cos(th), 50 + rad * np.sin(th)], 1)
    star = "M" + " L".join(f"{x:.4f} {y:.4f}" for x, y in p) + " Z"
    svg = H + f'<path d="{star}"/><path d="M200 0 h10 v10 h-10 Z"/></svg>'
    doc = read_svg(svg.encode()).document
    res = offset_document(doc, 1.0, 0.01)
    failed = [pr for pr in res["problems"] if pr[0] == "offset-failed"]
    assert len(failed) == 1 and failed[0][1] == "error" and "crosses itself" in failed[0][9]
    assert len(res["toolpaths"]) == 1
    length = shapely.LinearRing(res["toolpaths"][0]["points"]).length
    assert abs(length - (40 + 2 * np.pi)) < 0.05


def test_copies_at_one_place_are_offset_once_and_their_overlaps_capped(monkeypatch):
    # 30 copies of one square (as `use` instances at one place): every pair overlaps
    # (closed form: 30·29/2 = 435 pairs); with 10 listed the other 425 are counted; every
    # copy still gets its toolpath, equal to the first's (the offset is a function of the
    # geometry)
    from outlinebench.api.cutting import offset_document

    monkeypatch.setattr("outlinebench.geometry.offset.FINDINGS_PER_KIND", 10)
    svg = H + '<path d="M10 10 h10 v10 h-10 Z"/>' * 30 + "</svg>"
    doc = read_svg(svg.encode()).document
    res = offset_document(doc, 1.0, 0.01)
    assert len(res["toolpaths"]) == 30
    first = np.asarray(res["toolpaths"][0]["points"])
    assert all(np.array_equal(np.asarray(t["points"]), first) for t in res["toolpaths"])
    assert len(res["overlaps"]) == 10
    assert res["overlaps"][-1].unlisted == 435 - 10


def test_a_use_offset_that_overflows_is_refused_with_a_note_naming_the_element():
    # campaign input #480: use x = 1e308 under scale(10) overflows a double (IEEE 754
    # binary64 largest finite ~1.8e308); the element was a KeyError before
    svg = (
        H + '<defs><path id="p" d="M0 0 L9 0 L9 9 Z"/></defs>'
        '<g transform="scale(10)"><use href="#p" x="1e308"/></g></svg>'
    )
    res = read_svg(svg.encode())
    msgs = [n.message for n in res.notes]
    assert any("overflows a double" in m and "element skipped" in m for m in msgs), msgs
