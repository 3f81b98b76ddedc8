"""Curve fitting benchmark: segments used and deviation at the same tolerance, ours vs plain.

Compares :func:`outlinebench.geometry.fit_polyline` (Schneider's least-squares fit with
Newton parameter correction, plus corners by angle, parabola end tangents, greedy longest
stretches and two-sided checking) with :func:`outlinebench.geometry.fit.fit_polyline_schneider`,
the plain published form (P. J. Schneider, "An Algorithm for Automatically Fitting Digitized
Curves", Graphics Gems 1990: recursive split at the worst point), on the same polylines at
the same tolerance ε. Polyline sets (invented, seeded):

- smooth: chains of 3 tangent-continuous random cubics in a 100-unit box, flattened within
  ε/20 (:func:`outlinebench.geometry.flatten_contour`, proven);
- traced: the same chains sampled at 400 uniform parameters with Gaussian noise of ε/10
  (a scanner's or tracer's polyline);
- circles: closed regular 120-gons of radius 10-40 (chords of a circle);
- cornered: chains with a 60° corner between two cubics, flattened within ε/20.

Prints per set and ε: seg ratio (our segment count / plain), source seg ratio (ours / the
cubics the polyline came from), dev/ε for each (largest proven two-sided Hausdorff distance
between the polyline and the fitted curve, :func:`outlinebench.geometry.hausdorff_bound`;
not the fitters' own sampled check), and time ratio (ours / plain, CPU, whole set).

Run: python benchmarks/bench_fit.py
"""

from __future__ import annotations

import math
import time

import numpy as np

from outlinebench.geometry.bezier import evaluate
from outlinebench.geometry.fit import fit_polyline, fit_polyline_schneider
from outlinebench.geometry.flatten import flatten_contour
from outlinebench.geometry.hausdorff import hausdorff_bound

CASES = 12  # polylines per set
TOLERANCES = (0.1, 0.02)


def g1_chain(rng: np.random.Generator, count: int = 3, corner: float | None = None):
    """``count`` cubics in a 100-unit box, G1 at the joins (or turned by ``corner`` degrees)."""
    segs = []
    p0 = rng.uniform(0, 100, 2)
    d = rng.normal(size=2)
    d /= np.linalg.norm(d)
    for k in range(count):
        p3 = p0 + rng.uniform(20, 40) * np.array([math.cos(a := rng.uniform(0, 2 * math.pi)),
                                                  math.sin(a)])  # fmt: skip
        if corner is not None and k > 0:
            th = math.radians(corner)
            d = np.array([d[0] * math.cos(th) - d[1] * math.sin(th),
                          d[0] * math.sin(th) + d[1] * math.cos(th)])  # fmt: skip
        p1 = p0 + d * rng.uniform(5, 15)
        out = rng.normal(size=2)
        out /= np.linalg.norm(out)
        p2 = p3 - out * rng.uniform(5, 15)
        segs.append(np.array([p0, p1, p2, p3]))
        p0, d = p3, out
    return segs


def polylines(kind: str, eps: float, rng: np.random.Generator):
    out = []
    for _ in range(CASES):
        if kind == "smooth":
            src = g1_chain(rng)
            out.append((flatten_contour(src, False, eps / 20), False, len(src)))
        elif kind == "traced":
            src = g1_chain(rng)
            t = np.linspace(0, 1, 134)[:-1]
            pts = np.vstack([evaluate(s, t) for s in src] + [src[-1][-1][None]])
            pts[1:-1] += rng.normal(0, eps / 10, pts[1:-1].shape)
            out.append((pts, False, len(src)))
        elif kind == "circles":
            r = rng.uniform(10, 40)
            t = np.linspace(0, 2 * math.pi, 121)[:-1]
            out.append((np.column_stack([r * np.cos(t), r * np.sin(t)]), True, 4))
        else:
            src = g1_chain(rng, 2, corner=60.0)
            out.append((flatten_contour(src, False, eps / 20), False, len(src)))
    return out


def deviation(poly: np.ndarray, closed: bool, fitted, eps: float) -> float:
    pts = np.vstack([poly, poly[:1]]) if closed else poly
    lines = [np.array([a, b]) for a, b in zip(pts[:-1], pts[1:], strict=True)]
    return hausdorff_bound(lines, fitted, accuracy=eps / 100).upper


def main() -> None:
    print(f"{'set':9} {'eps':>5} {'seg ours/plain':>15} {'ours/source':>12} "
          f"{'dev/eps ours':>13} {'plain':>7} {'time ours/plain':>16}")  # fmt: skip
    for kind in ("smooth", "traced", "circles", "cornered"):
        for eps in TOLERANCES:
            rng = np.random.default_rng(11)
            cases = polylines(kind, eps, rng)
            seg_o = seg_p = src = 0
            dev_o = dev_p = 0.0
            t_o = t_p = 0.0
            for poly, closed, n_src in cases:
                c0 = time.process_time()
                ours = fit_polyline(poly, closed, eps)
                c1 = time.process_time()
                plain = fit_polyline_schneider(poly, closed, eps)
                c2 = time.process_time()
                t_o += c1 - c0
                t_p += c2 - c1
                seg_o += len(ours)
                seg_p += len(plain)
                src += n_src
                dev_o = max(dev_o, deviation(poly, closed, ours, eps))
                dev_p = max(dev_p, deviation(poly, closed, plain, eps))
            ratio = t_o / max(t_p, 1e-9)
            print(
                f"{kind:9} {eps:5g} {seg_o / seg_p:15.3f} {seg_o / src:12.3f} "
                f"{dev_o / eps:13.3f} {dev_p / eps:7.3f} {ratio:16.1f}"
            )


if __name__ == "__main__":
    main()
