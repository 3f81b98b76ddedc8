"""Small analytic documents shared by the diagnostics tests (coordinates in mm)."""

from __future__ import annotations

import math

import numpy as np

from outlinebench.model.document import Contour, Document, Outline

K_CIRCLE = 4.0 * (math.sqrt(2.0) - 1.0) / 3.0  # quarter-circle handle ratio, closed form


def doc_of(*outlines: tuple[Contour, ...] | Contour, mm_per_unit: float = 1.0) -> Document:
    """A document with one outline per argument (a contour or a tuple of contours)."""
    outs = []
    for i, o in enumerate(outlines):
        contours = (o,) if isinstance(o, Contour) else tuple(o)
        outs.append(Outline(contours, element_id=f"o{i}", source_index=i))
    return Document(tuple(outs), mm_per_unit=mm_per_unit, units="mm")


def polygon(points, closed=True, joins=()) -> Contour:
    pts = [tuple(map(float, p)) for p in points]
    segs = [[pts[i], pts[i + 1]] for i in range(len(pts) - 1)]
    if closed:
        segs.append([pts[-1], pts[0]])
    return Contour.from_points(segs, closed=closed, joins=joins)


def circle(cx: float, cy: float, r: float, ccw: bool = True) -> Contour:
    """Four cubic quarter arcs; counter-clockwise in a y-up frame when ``ccw``."""
    k = K_CIRCLE
    pts = [(1, 0), (0, 1), (-1, 0), (0, -1)] if ccw else [(1, 0), (0, -1), (-1, 0), (0, 1)]
    segs = []
    for i in range(4):
        p0 = np.array(pts[i], float)
        p3 = np.array(pts[(i + 1) % 4], float)
        segs.append(
            [
                (cx + r * p0[0], cy + r * p0[1]),
                (cx + r * (p0[0] + k * p3[0]), cy + r * (p0[1] + k * p3[1])),
                (cx + r * (p3[0] + k * p0[0]), cy + r * (p3[1] + k * p0[1])),
                (cx + r * p3[0], cy + r * p3[1]),
            ]
        )
    return Contour.from_points(segs, closed=True)


def kinds(findings) -> list[str]:
    return sorted(f.kind for f in findings)


def of_kind(findings, kind: str):
    return [f for f in findings if f.kind == kind]
