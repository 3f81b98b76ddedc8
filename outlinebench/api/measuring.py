"""Lengths, areas, bounds and joins of every contour: the measurements behind ``measure``.

Per contour: ``closed``, ``self_intersecting``, ``length``, ``area`` (absolute enclosed area
of a closed contour — for one that crosses itself, the union of its faces — null when open),
``bbox`` (tight), and per segment its ``kind`` and ``length``; with ``joins``, every join's
gap, tangent turn angle and curvature on each side.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from outlinebench.diagnostics.checker import self_crossings
from outlinebench.diagnostics.continuity import turn_angles
from outlinebench.diagnostics.enclosed_area import enclosed_area
from outlinebench.geometry import (
    KIND_BY_DEGREE,
    arc_length,
    bounding_box,
    end_curvatures,
    end_tangents,
    signed_area,
)
from outlinebench.model.document import Contour, Document
from outlinebench.model.units import unit_factor

__all__ = ["measure_document"]


def _joins(contour: Contour, f: float) -> list[dict[str, Any]]:
    segs = contour.segments
    out = []
    if not contour.joins:
        return out
    d_in, d_out, k_in, k_out, gaps = [], [], [], [], []
    for j in range(len(contour.joins)):
        a, b = contour.join_segments(j)
        sa, sb = segs[a], segs[b]
        d_in.append(end_tangents(sa)[1])
        d_out.append(end_tangents(sb)[0])
        k_in.append(end_curvatures(sa)[1])
        k_out.append(end_curvatures(sb)[0])
        gaps.append(float(np.hypot(*(sb[0] - sa[-1]))))
    angles = turn_angles(np.array(d_in), np.array(d_out))
    for j in range(len(contour.joins)):
        out.append(
            {
                "join": j,
                "x": float(segs[j][-1][0]) * f,
                "y": float(segs[j][-1][1]) * f,
                "intent": contour.joins[j],
                "gap": gaps[j] * f,
                "angle": float(angles[j]),
                "curvature_before": float(k_in[j]) / f + 0.0,
                "curvature_after": float(k_out[j]) / f + 0.0,
            }
        )
    return out


def _self_crossings(doc: Document) -> dict[int, list[list[float]]]:
    """Contours that cross themselves (global index) → per segment, the crossing parameters.

    From :func:`outlinebench.diagnostics.checker.self_crossings` (a loop inside a segment,
    and crossings between two segments of the same contour): the crossing search alone, not a
    whole check.
    """
    out: dict[int, list[list[float]]] = {}
    sizes = {ref.global_index: len(ref.contour.segments) for ref in doc.contour_refs()}
    for fnd in self_crossings(doc):
        cuts = out.setdefault(fnd.contour, [[] for _ in range(sizes[fnd.contour])])
        for seg, t in ((fnd.segment, fnd.t), (fnd.other_segment, fnd.other_t)):
            if seg is not None and t is not None:
                cuts[seg].append(float(t))
    return out


def measure_document(doc: Document, unit: str = "user", joins: bool = False) -> dict[str, Any]:
    """The measurements of every contour as a JSON-ready dict.

    Parameters
    ----------
    doc : Document
    unit : str
        One of ``"user"``, ``"mm"``, ``"in"``, ``"pt"``, ``"px"``.
    joins : bool
        Include the join table of each contour.

    Returns
    -------
    dict
        ``{"units", "contours": [...], "totals": {...}}``; lengths in ``unit``, areas in
        ``unit``², curvatures in 1/``unit``.

    Notes
    -----
    Lengths come from :func:`outlinebench.geometry.arc_length` (Gauss–Legendre quadrature to
    its default tolerance), areas from the exact signed area of
    :func:`outlinebench.geometry.signed_area` (Green's theorem) — or, for a contour that
    crosses itself (``self_intersecting``), the area of the union of its faces of non-zero
    winding number (:func:`outlinebench.diagnostics.enclosed_area.enclosed_area`, exact for
    the pieces between crossings; a figure-eight's two lobes add up), boxes from
    :func:`outlinebench.geometry.bounding_box` (end points and interior extrema).
    """
    f = unit_factor(doc, unit)
    crossings = _self_crossings(doc)
    contours = []
    total_len = 0.0
    total_segs = 0
    # every segment's length and tight box at once, one batch per degree
    segments = [s for ref in doc.contour_refs() for s in ref.contour.segments]
    seg_len = np.zeros(len(segments))
    seg_box = np.zeros((len(segments), 4))
    degree = np.array([s.shape[0] - 1 for s in segments], dtype=np.intp)
    for deg in (1, 2, 3):
        rows = np.flatnonzero(degree == deg)
        if rows.size:
            batch = np.stack([segments[r] for r in rows])
            seg_len[rows] = arc_length(batch)
            seg_box[rows] = bounding_box(batch)
    first = 0
    for ref in doc.contour_refs():
        c = ref.contour
        outline = doc.outlines[ref.outline]
        n = len(c.segments)
        lens = seg_len[first : first + n]
        seg_rows = [
            {"kind": KIND_BY_DEGREE[int(d)], "length": float(v) * f}
            for d, v in zip(degree[first : first + n], lens, strict=True)
        ]
        length = float(lens.sum())
        if n:
            b = seg_box[first : first + n]
            bbox: list[float] | None = [
                float(b[:, 0].min()) * f,
                float(b[:, 1].min()) * f,
                float(b[:, 2].max()) * f,
                float(b[:, 3].max()) * f,
            ]
        else:
            bbox = None
        first += n
        cuts = crossings.get(ref.global_index)
        if not c.closed:
            area = None  # an open contour encloses nothing
        elif not c.segments:
            area = 0.0  # a closed lone moveto ("M x y Z") draws a point
        elif cuts is None:
            area = abs(float(signed_area(list(c.segments)))) * f * f
        else:
            area = enclosed_area(c.segments, cuts) * f * f
        row: dict[str, Any] = {
            "contour": ref.global_index,
            "outline": outline.source_index if outline.source_index >= 0 else ref.outline,
            "element_id": outline.element_id,
            "closed": c.closed,
            "self_intersecting": cuts is not None,
            "length": length * f,
            "area": area,
            "bbox": bbox,
            "segments": seg_rows,
        }
        if not c.closed and c.segments:
            row["ends_distance"] = float(np.hypot(*(c.segments[-1][-1] - c.segments[0][0]))) * f
        if joins:
            row["joins"] = _joins(c, f)
        contours.append(row)
        total_len += length
        total_segs += len(c.segments)
    return {
        "units": unit,
        "contours": contours,
        "totals": {
            "contours": len(contours),
            "segments": total_segs,
            "length": total_len * f,
        },
    }
