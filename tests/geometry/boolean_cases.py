"""Seeded outlines and reference conversions shared by the boolean and region-offset tests.

Random outlines are star-shaped loops of lines, quadratics and cubics (an imaginary sign
shop's blobs), invented here. References are built with shapely from dense flattenings and
with skia-pathops from the same control points.
"""

from __future__ import annotations

import math

import numpy as np
import pathops
import shapely

from outlinebench.geometry.flatten import flatten_contours

__all__ = [
    "arc",
    "circle",
    "rect",
    "random_outline",
    "random_simple_outline",
    "region_polygon",
    "result_polygon",
    "skia_path",
    "skia_area",
    "perimeter",
    "polygon_winding",
    "reference_region",
]


def arc(cx, cy, r, a0, a1):
    """One cubic circular arc, handle 4/3·tan(φ/4)·r (Dokken et al. 1990)."""
    k = 4 / 3 * math.tan((a1 - a0) / 4) * r
    p0 = np.array([cx + r * math.cos(a0), cy + r * math.sin(a0)])
    p3 = np.array([cx + r * math.cos(a1), cy + r * math.sin(a1)])
    d0 = np.array([-math.sin(a0), math.cos(a0)])
    d3 = np.array([-math.sin(a1), math.cos(a1)])
    return np.array([p0, p0 + k * d0, p3 - k * d3, p3])


def circle(r, cx=0.0, cy=0.0, ccw=True):
    segs = [arc(cx, cy, r, i * math.pi / 2, (i + 1) * math.pi / 2) for i in range(4)]
    segs[-1][3] = segs[0][0]
    if not ccw:
        segs = [s[::-1].copy() for s in segs[::-1]]
    return (segs, True)


def rect(x0, y0, x1, y1, ccw=True):
    p = [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]
    if not ccw:
        p = p[::-1]
    return ([np.array([p[i], p[(i + 1) % 4]], dtype=float) for i in range(4)], True)


def random_outline(rng: np.random.Generator, cx=50.0, cy=50.0, rmin=10.0, rmax=40.0, wobble=6.0):
    """A closed loop of random lines, quadratics and cubics round (cx, cy); may cross itself."""
    n = int(rng.integers(3, 9))
    ang = np.sort(rng.uniform(0, 2 * np.pi, n))
    rad = rng.uniform(rmin, rmax, n)
    p = np.stack([cx + rad * np.cos(ang), cy + rad * np.sin(ang)], 1)
    segs = []
    for i in range(n):
        a, b = p[i], p[(i + 1) % n]
        kind = int(rng.integers(2, 5))
        if kind == 2:
            segs.append(np.array([a, b]))
        elif kind == 3:
            segs.append(np.array([a, (a + b) / 2 + rng.normal(0, wobble, 2), b]))
        else:
            segs.append(
                np.array(
                    [
                        a,
                        a + (b - a) / 3 + rng.normal(0, wobble, 2),
                        a + 2 * (b - a) / 3 + rng.normal(0, wobble, 2),
                        b,
                    ]
                )
            )
    return (segs, True)


def random_simple_outline(rng, **kw):
    """As :func:`random_outline`, redrawn until its flattening is a simple ring (shapely)."""
    while True:
        c = random_outline(rng, **kw)
        ring = flatten_contours([c], 1e-3)[0]
        if shapely.Polygon(ring).is_valid:
            return c


def region_polygon(contours, fill_rule="evenodd", tol=1e-3):
    """Shapely region of simple, non-crossing closed contours (flattened within ``tol``).

    Even-odd: the exclusive-or of the rings' polygons. Nonzero for contours that do not
    cross: rings grouped by nesting, a ring filled where the sum of orientations is ≠ 0.
    """
    polys = flatten_contours(list(contours), tol)
    if fill_rule == "evenodd":
        out = None
        for p in polys:
            if len(p) >= 3:
                poly = shapely.Polygon(p)
                out = poly if out is None else out.symmetric_difference(poly)
        return shapely.Polygon() if out is None else out
    raise ValueError(fill_rule)


def result_polygon(result, tol=1e-3):
    """Shapely region of a boolean result (its contours never cross: exclusive-or)."""
    return region_polygon([(c.segments, True) for c in result.contours], "evenodd", tol)


def skia_path(contours, fill_rule="nonzero"):
    """A skia-pathops Path with the same segments (lines, quads, cubics)."""
    path = pathops.Path()
    pen = path.getPen()
    for segs, _closed in contours:
        pen.moveTo(tuple(segs[0][0]))
        for s in segs:
            if len(s) == 2:
                pen.lineTo(tuple(s[1]))
            elif len(s) == 3:
                pen.qCurveTo(tuple(s[1]), tuple(s[2]))
            else:
                pen.curveTo(tuple(s[1]), tuple(s[2]), tuple(s[3]))
        pen.closePath()
    path.fillType = (
        pathops.FillType.WINDING if fill_rule == "nonzero" else pathops.FillType.EVEN_ODD
    )
    return path


def skia_area(path) -> float:
    """Area of a skia-pathops path's region (its contours flattened by skia's own area)."""
    return abs(path.area)


def perimeter(contours, tol=1e-3) -> float:
    return float(
        sum(
            shapely.LinearRing(p).length
            for p in flatten_contours(list(contours), tol)
            if len(p) > 2
        )
    )


def polygon_winding(poly, q):
    """Winding numbers of points q (Q, 2) round a closed polygon (P, 2): the sum of the
    signed angles its edges subtend, over 2π (the angle-sum definition of the winding
    number; any complex analysis text, e.g. Ahlfors, *Complex Analysis*, §4.2)."""
    d = poly[None, :, :] - q[:, None, :]
    a = np.arctan2(d[..., 1], d[..., 0])
    da = np.diff(np.concatenate([a, a[:, :1]], 1), axis=1)
    da = (da + np.pi) % (2 * np.pi) - np.pi
    return np.rint(da.sum(1) / (2 * np.pi)).astype(int)


def _filled(w, rule):
    return w != 0 if rule == "nonzero" else (w % 2 != 0 if rule == "evenodd" else w > 0)


def reference_region(operands, op, fill_rule="nonzero", tol=1e-3):
    """Shapely reference of a boolean of (possibly self-crossing) flattened operands.

    The flattened rings of all operands are noded and polygonized by shapely; each face is
    in the result if ``op`` of the operands' fill-rule tests at a point inside the face
    (shapely ``point_on_surface``), with :func:`polygon_winding`, says so.
    """
    rings = [[p for p in flatten_contours(list(ops), tol) if len(p) > 2] for ops in operands]
    lines = [shapely.LineString(np.vstack([p, p[:1]])) for rs in rings for p in rs]
    noded = shapely.unary_union(lines)
    faces = list(shapely.polygonize(list(getattr(noded, "geoms", [noded]))).geoms)
    if not faces:
        return shapely.Polygon()
    reps = np.array([f.point_on_surface().coords[0] for f in faces])
    ins = []
    for rs in rings:
        w = sum((polygon_winding(p, reps) for p in rs), np.zeros(len(reps), dtype=int))
        ins.append(_filled(w, fill_rule))
    if op == "self":
        keep = ins[0]
    elif op == "union":
        keep = ins[0] | ins[1]
    elif op == "intersection":
        keep = ins[0] & ins[1]
    elif op == "difference":
        keep = ins[0] & ~ins[1]
    else:
        keep = ins[0] ^ ins[1]
    chosen = [f for f, k in zip(faces, keep, strict=True) if k]
    return shapely.union_all(chosen) if chosen else shapely.Polygon()
