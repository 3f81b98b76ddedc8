"""Flattening and offsetting whole documents: the computations behind ``flatten`` and ``offset``.

:func:`flatten_document` turns every contour into chords with proven deviation bounds;
:func:`offset_document` offsets the filled region of every outline with the region engine and
verifies the toolpaths independently before anything may be written.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import shapely

from outlinebench.diagnostics.findings import ERROR, INFO, WARNING
from outlinebench.errors import OutlinebenchError, WorkCapExceeded
from outlinebench.geometry import (
    evaluate,
    merge_offsets,
    offset_contour,
    offset_overlaps,
    offset_region,
    remove_overlaps,
    verify_toolpaths,
)
from outlinebench.geometry.flatten import flatten_contours_bounded
from outlinebench.model.document import Document

__all__ = ["flatten_document", "offset_document", "result_outline"]


def flatten_document(doc: Document, tolerance: float, rounding: float = 0.0) -> dict[str, Any]:
    """Flatten every contour within ``tolerance − rounding`` (user units) with proven bounds.

    ``max_deviation`` per contour and overall is the proven chord bound plus ``rounding`` (the
    largest displacement of a written vertex), so it bounds the written polylines' deviation.
    """
    refs = list(doc.contour_refs())
    target = tolerance - rounding
    if not target > 0.0:
        raise OutlinebenchError(
            f"tolerance {tolerance:g} is not above the output resolution {rounding:g}"
        )
    polys, bounds = flatten_contours_bounded([r.contour for r in refs], target)
    contours = []
    worst = 0.0
    for r, poly, bound in zip(refs, polys, bounds, strict=True):
        entry: dict[str, Any] = {
            "outline": r.outline,
            "contour": r.global_index,
            "closed": bool(r.contour.closed),
            "points": poly,
        }
        if len(r.contour.segments):
            entry["max_deviation"] = float(bound) + rounding
            worst = max(worst, entry["max_deviation"])
        contours.append(entry)
    return {
        "contours": contours,
        "tolerance": tolerance,
        "max_deviation": worst,
        "exceeded": worst > tolerance,
    }


def _severity(kind: str, value: float | None, count: int) -> str:
    if kind in ("vanishes", "self-intersection", "offset-failed"):
        return ERROR
    if kind == "tool-does-not-fit":
        # the summary of inside corners the tool rounds is the normal case of routing
        return INFO if count > 1 or value == 0.0 else WARNING
    return WARNING


def _geometry_key(contour: Any) -> tuple:
    """Exact identity of a contour's geometry: closedness, segment shapes and coordinates."""
    segs = [np.asarray(sg, dtype=float) for sg in contour.segments]
    return (
        bool(contour.closed),
        tuple(len(sg) for sg in segs),
        np.concatenate(segs).tobytes() if segs else b"",
    )


def _failed(oi: int, gi: int, contour: Any, exc: Exception) -> tuple:
    """An ``offset-failed`` problem (error): the outline's offset was refused, no toolpath."""
    p = np.asarray(contour.segments[0])[0]
    return (
        "offset-failed", ERROR, oi, gi, None, None, float(p[0]), float(p[1]), None,
        f"no toolpath for this outline: {exc}",
    )  # fmt: skip


def _source_contours(paths: list[Any], refs: list[Any], distance: float) -> list[int]:
    """For each toolpath, the input contour it runs along: the one whose distance from the
    toolpath's vertices is closest to |d| at the median (shapely distances to the contours
    flattened at 16 points a segment)."""
    if not paths:
        return []
    if len(refs) == 1:
        return [refs[0].global_index] * len(paths)
    t = np.linspace(0.0, 1.0, 17)[:-1]
    rings = []
    for r in refs:
        pts = np.vstack([evaluate(np.asarray(sg), t) for sg in r.contour.segments])
        rings.append(shapely.LinearRing(pts) if len(pts) >= 3 else shapely.Point(pts[0]))
    out = []
    for p in paths:
        pts = shapely.points(np.asarray(p)[:: max(1, len(p) // 64)])
        best = min(
            range(len(refs)),
            key=lambda k: abs(float(np.median(shapely.distance(rings[k], pts))) - abs(distance)),
        )
        out.append(refs[best].global_index)
    return out


def offset_document(
    doc: Document, distance: float, tolerance: float, *, merge: bool = False
) -> dict[str, Any]:
    """Offset the filled region of every outline (user units) and verify the toolpaths.

    Returns
    -------
    dict
        ``toolpaths`` (list of dicts ``{"outline", "contour", "closed", "points"}``),
        ``problems`` (list of (kind, severity, outline index, global contour, segment, t, x, y,
        value, message)), ``violations`` (list of ToolpathViolation), ``overlaps``
        (OffsetOverlap between outlines), ``times`` (seconds per stage, summed).

    Notes
    -----
    Closed contours of one outline are offset together as the region they fill under the
    outline's fill rule (:func:`outlinebench.geometry.offset_region`), so the toolpaths of
    one part never cross; the result is verified independently
    (:func:`outlinebench.geometry.verify_toolpaths`) before anything is written. Outlines
    whose toolpath regions overlap are reported (:func:`offset_overlaps`), or merged into
    one region (``merge``, :func:`merge_offsets`). Open contours are offset on their own to
    the side of their normal (:func:`outlinebench.geometry.offset_contour`).
    """
    toolpaths: list[dict[str, Any]] = []
    problems: list[tuple] = []
    violations: list[Any] = []
    regions: list[Any] = []
    region_outline: list[int] = []
    times: dict[str, float] = {}
    refs_by_outline: dict[int, list[Any]] = {}
    closed_refs: dict[int, list[Any]] = {}
    same_geometry: dict[tuple, Any] = {}
    for ref in doc.contour_refs():
        refs_by_outline.setdefault(ref.outline, []).append(ref)
    for oi, refs in refs_by_outline.items():
        outline = doc.outlines[oi]
        closed: list[Any] = []
        for ref in refs:
            c = ref.contour
            if not c.segments:
                continue  # a lone moveto draws nothing
            pts = np.vstack(c.segments)
            if float(np.ptp(pts, axis=0).max()) <= tolerance:
                # all control points within the tolerance of one place: no length, no area,
                # no toolpath (common practice, no source: a dot is not cut)
                problems.append(
                    ("vanishes", WARNING, oi, ref.global_index, None, None, float(pts[0, 0]),
                     float(pts[0, 1]), 0.0,
                     "the contour has no length (all its points coincide): no toolpath")
                )  # fmt: skip
                continue
            if c.closed:
                closed.append(ref)
                continue
            try:
                res = offset_contour(c.segments, False, distance, tolerance)
            except WorkCapExceeded as exc:  # past a cap on work (outlinebench.limits)
                problems.append(_failed(oi, ref.global_index, c, exc))
                continue
            for oc in res.contours:
                toolpaths.append(
                    {"outline": oi, "contour": ref.global_index, "closed": oc.closed,
                     "points": oc.polyline}
                )  # fmt: skip
            for pr in res.problems:
                sev = ERROR if pr.kind in ("vanishes", "self-intersection") else (
                    INFO if pr.radius == 0.0 else WARNING)  # fmt: skip
                value = pr.error if pr.error is not None else pr.radius
                problems.append(
                    (pr.kind, sev, oi, ref.global_index, pr.segment, pr.t, pr.x, pr.y, value,
                     pr.message)
                )  # fmt: skip
        if not closed:
            continue
        # outlines drawn with the same coordinates (``use`` instances at one place, copies)
        # have the same region offset: computed once (the region offset is a function of
        # the contours, the fill rule, the distance and the tolerance only)
        key = (outline.fill_rule, tuple(_geometry_key(r.contour) for r in closed))
        try:
            fresh = key not in same_geometry
            if fresh:
                same_geometry[key] = offset_region(
                    [r.contour for r in closed], distance, fill_rule=outline.fill_rule,
                    tolerance=tolerance,
                )  # fmt: skip
            reg = same_geometry[key]
        except WorkCapExceeded as exc:  # past a cap on work (outlinebench.limits)
            problems.append(_failed(oi, closed[0].global_index, closed[0].contour, exc))
            continue
        closed_refs[oi] = closed
        for k, v in (reg.times if fresh else {}).items():
            times[k] = times.get(k, 0.0) + v
        regions.append(reg)
        region_outline.append(oi)
        for rf in reg.findings:
            gi = (
                closed[rf.contour].global_index
                if rf.contour is not None
                else closed[0].global_index
            )
            problems.append(
                (rf.kind, _severity(rf.kind, rf.value, rf.count), oi, gi, rf.segment, rf.t,
                 rf.x, rf.y, rf.value, rf.message)
            )  # fmt: skip
    overlaps = offset_overlaps(regions, tolerance=tolerance) if len(regions) > 1 else []
    if merge and regions:
        merged = merge_offsets(regions, tolerance=tolerance)
        all_region = remove_overlaps(
            [c for r in regions for c in r.region.contours], fill_rule="positive"
        )
        violations.extend(
            verify_toolpaths(all_region.contours, merged, distance, tolerance=tolerance)
        )
        for oc in merged:
            toolpaths.append({"outline": -1, "contour": -1, "closed": True, "points": oc.polyline})
        overlaps = []
    else:
        for reg, oi in zip(regions, region_outline, strict=True):
            violations.extend(
                verify_toolpaths(reg.region.contours, reg.contours, distance, tolerance=tolerance)
            )
            sources = _source_contours(
                [oc.polyline for oc in reg.contours], closed_refs[oi], distance
            )
            for oc, gi in zip(reg.contours, sources, strict=True):
                toolpaths.append(
                    {"outline": oi, "contour": gi, "closed": True, "points": oc.polyline}
                )
    return {
        "region_outline": region_outline,
        "toolpaths": toolpaths,
        "problems": problems,
        "violations": violations,
        "overlaps": overlaps,
        "times": times,
    }


def result_outline(result: dict[str, Any], k: int) -> int:
    """The document outline of the k-th region offset."""
    return result["region_outline"][k]
