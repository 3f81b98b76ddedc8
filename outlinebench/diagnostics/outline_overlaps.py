"""Separate outlines whose filled regions overlap: a defect where each outline is cut alone.

A cutter follows each outline on its own, so two letters or parts drawn over each other are
cut into each other. This check finds pairs of outlines of one document whose regions (each by
its own fill rule) share area, and reports each pair once as an ``overlap`` finding with the
shared area and a point inside it. Fonts do not need it (overlapping components are normal in
glyphs and removed at build time): the cutting profile runs it.

Method: outlines are screened by their boxes; the candidates' regions are made overlap-free
with the boolean engine (:func:`outlinebench.geometry.remove_overlaps`, exact on the curves),
flattened within the tolerance (a proven bound), and the shared area is shapely's polygon
intersection of the flattenings. An overlap of area at most tolerance × the shorter perimeter
is what touching within the flattening can produce and is not reported.
"""

from __future__ import annotations

import numpy as np
import shapely

from outlinebench.diagnostics.findings import ERROR, Finding
from outlinebench.geometry import flatten_contours, remove_overlaps
from outlinebench.model.document import Document

__all__ = ["outline_overlap_findings"]


def _region_polygon(outline, tolerance: float):
    closed = [c for c in outline.contours if c.closed and c.segments]
    if not closed:
        return None
    res = remove_overlaps(closed, fill_rule=outline.fill_rule)
    if not res.contours:
        return None
    rings = flatten_contours([(rc.segments, True) for rc in res.contours], tolerance)
    polys = [shapely.Polygon(r) for r in rings if len(r) >= 3]
    # the engine's contours do not cross; the region is their even-odd fill
    region = shapely.Polygon()
    for p in polys:
        region = region.symmetric_difference(shapely.make_valid(p))
    return region


def outline_overlap_findings(doc: Document, tolerance: float) -> list[Finding]:
    """``overlap`` findings (error) for pairs of outlines whose regions share area.

    Parameters
    ----------
    doc : Document
    tolerance : float
        Flattening tolerance in user units (the gap tolerance): shared areas up to
        tolerance × perimeter are touching, not overlap.

    Returns
    -------
    list of Finding
        One per overlapping pair, on the later outline's first contour, ``other_contour``
        the earlier outline's first contour, ``value`` the shared area (``user^2``), ``x, y``
        a point inside the shared area.

    Examples
    --------
    >>> outline_overlap_findings(Document(), 0.01)
    []
    """
    firsts: list[int] = []
    boxes: list[tuple[float, float, float, float] | None] = []
    gi = 0
    for o in doc.outlines:
        firsts.append(gi)
        gi += len(o.contours)
        pts = [s for c in o.contours if c.closed for s in c.segments]
        if not pts:
            boxes.append(None)
            continue
        p = np.vstack(pts)
        boxes.append((p[:, 0].min(), p[:, 1].min(), p[:, 0].max(), p[:, 1].max()))
    idx = [k for k, b in enumerate(boxes) if b is not None]
    if len(idx) < 2:
        return []
    b = np.array([boxes[k] for k in idx])
    order = np.argsort(b[:, 0], kind="stable")
    pairs: list[tuple[int, int]] = []
    for a_pos, a in enumerate(order):
        for bb in order[a_pos + 1 :]:
            if b[bb, 0] > b[a, 2]:
                break
            if b[bb, 1] <= b[a, 3] and b[a, 1] <= b[bb, 3]:
                pairs.append((idx[min(a, bb)], idx[max(a, bb)]))
    if not pairs:
        return []
    regions: dict[int, object] = {}
    out: list[Finding] = []
    for i, j in sorted(pairs):
        for k in (i, j):
            if k not in regions:
                regions[k] = _region_polygon(doc.outlines[k], tolerance)
        ri, rj = regions[i], regions[j]
        if ri is None or rj is None or ri.is_empty or rj.is_empty:
            continue
        shared = ri.intersection(rj)
        perimeter = min(ri.length, rj.length)
        if shared.is_empty or shared.area <= tolerance * perimeter:
            continue
        pt = shared.representative_point()
        oj = doc.outlines[j]
        out.append(
            Finding(
                "overlap", ERROR, oj.source_index if oj.source_index >= 0 else j, firsts[j],
                None, None, float(pt.x), float(pt.y), float(shared.area), "user^2",
                f"outline overlaps outline {i} (contour {firsts[i]}); each is cut on its own, "
                "so the cuts run into each other: merge them (outlinebench union) or move one",
                other_contour=firsts[i],
            )
        )  # fmt: skip
    return out
