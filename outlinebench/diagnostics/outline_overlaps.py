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
from outlinebench.limits import FINDINGS_PER_KIND, OVERLAP_CANDIDATE_PAIRS
from outlinebench.model.document import Document

__all__ = ["outline_overlap_findings"]


def _regions(doc: Document, tolerance: float) -> list[object | None]:
    """Each outline's filled region as a shapely geometry (None: no closed contour).

    All closed contours are flattened in one call; an outline of one contour whose ring does
    not cross itself is that ring's polygon; any other outline goes through the boolean
    engine first (its region under its fill rule, as contours that do not cross), whose
    contours fill the region by the even-odd rule.
    """
    rings_of: list[list[int]] = []
    contours = []
    for o in doc.outlines:
        ks = []
        for c in o.contours:
            if c.closed and c.segments:
                ks.append(len(contours))
                contours.append(c)
        rings_of.append(ks)
    if not contours:
        return [None] * len(doc.outlines)
    # at least 1e-9 of the drawing's extent: a finer flattening is below the resolution of
    # its coordinates (shared areas are compared with tolerance × perimeter anyway)
    extent = max(float(np.abs(sg).max()) for c in contours for sg in c.segments)
    tolerance = max(tolerance, 1e-9 * extent)
    flat = flatten_contours(contours, tolerance)
    out: list[object | None] = []
    for o, ks in zip(doc.outlines, rings_of, strict=True):
        if not ks:
            out.append(None)
            continue
        if len(ks) == 1 and len(flat[ks[0]]) >= 3:
            ring = shapely.LinearRing(flat[ks[0]])
            if ring.is_simple:
                out.append(shapely.Polygon(ring))
                continue
        res = remove_overlaps([contours[k] for k in ks], fill_rule=o.fill_rule)
        rings = flatten_contours([(rc.segments, True) for rc in res.contours], tolerance)
        region = shapely.Polygon()
        for r in rings:
            if len(r) >= 3:
                region = region.symmetric_difference(shapely.make_valid(shapely.Polygon(r)))
        out.append(region)
    return out


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

    Notes
    -----
    Candidate pairs come from a shapely STRtree of the regions (n log n plus the pairs whose
    boxes meet); the shared areas of all candidates are computed in one vectorised call.
    Work and output are bounded (:mod:`outlinebench.limits`): at most
    ``OVERLAP_CANDIDATE_PAIRS`` candidate pairs are examined and ``FINDINGS_PER_KIND``
    overlaps listed; what is past either cap is counted in one more ``overlap`` finding
    (``value`` the number of pairs, unit ``pairs``), so the document is never clean by a cap.

    Examples
    --------
    >>> outline_overlap_findings(Document(), 0.01)
    []
    """
    firsts: list[int] = []
    gi = 0
    for o in doc.outlines:
        firsts.append(gi)
        gi += len(o.contours)
    regions = _regions(doc, tolerance)
    idx = [k for k, r in enumerate(regions) if r is not None and not r.is_empty]
    if len(idx) < 2:
        return []
    geoms = np.array([regions[k] for k in idx], dtype=object)
    tree = shapely.STRtree(geoms)
    # candidate pairs in blocks (bounded memory); past the cap they are only counted
    pa, pb = [], []
    kept = unexamined = 0
    block = 2_000
    for s0 in range(0, len(geoms), block):
        qa, qb = tree.query(geoms[s0 : s0 + block], predicate="intersects")
        qa = qa + s0
        keep = qa < qb
        qa, qb = qa[keep], qb[keep]
        room = max(0, OVERLAP_CANDIDATE_PAIRS - kept)
        pa.append(qa[:room])
        pb.append(qb[:room])
        kept += min(room, len(qa))
        unexamined += max(0, len(qa) - room)
    a, b = np.concatenate(pa), np.concatenate(pb)
    if a.size == 0:
        return []
    shared = shapely.intersection(geoms[a], geoms[b])
    areas = shapely.area(shared)
    perim = np.minimum(shapely.length(geoms[a]), shapely.length(geoms[b]))
    over = np.flatnonzero(areas > tolerance * perim)
    out: list[Finding] = []
    for q in over[:FINDINGS_PER_KIND].tolist():
        i, j = idx[int(a[q])], idx[int(b[q])]
        pt = shared[q].representative_point()
        oj = doc.outlines[j]
        out.append(
            Finding(
                "overlap", ERROR, oj.source_index if oj.source_index >= 0 else j, firsts[j],
                None, None, float(pt.x), float(pt.y), float(areas[q]), "user^2",
                f"outline overlaps outline {i} (contour {firsts[i]}); each is cut on its own, "
                "so the cuts run into each other: merge them (outlinebench union) or move one",
                other_contour=firsts[i],
            )
        )  # fmt: skip
    out.sort(key=lambda f: (f.contour, f.other_contour))
    unlisted = len(over) - len(out)
    if unlisted or unexamined:
        first = out[0] if out else None
        oi = idx[int(a[0])]
        here = geoms[int(a[0])].representative_point()
        hx, hy = (first.x, first.y) if first else (float(here.x), float(here.y))
        parts = []
        if unlisted:
            parts.append(f"{unlisted} more overlapping pairs of outlines are not listed")
        if unexamined:
            parts.append(
                f"{unexamined} pairs of outlines whose boxes meet were not examined (at most "
                f"{OVERLAP_CANDIDATE_PAIRS} are)"
            )
        out.append(
            Finding(
                "overlap", ERROR,
                first.outline if first else doc.outlines[oi].source_index,
                first.contour if first else firsts[oi],
                None, None, hx, hy,
                float(unlisted + unexamined), "pairs",
                "; ".join(parts) + f" (at most {FINDINGS_PER_KIND} overlaps are listed): the "
                "document has more outlines drawn over each other than can be checked one by "
                "one; merge or separate them",
            )
        )  # fmt: skip
    return out
