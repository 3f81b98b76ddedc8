"""Kinks that rounding the points to a coordinate grid could cause (finding kind ``grid-kink``).

Font outlines are stored on an integer grid (``glyf`` coordinates are 16-bit integers; CFF
and UFO coordinates are integers by common practice), so a join drawn tangent-continuous
(G1) can come out of the font with a small turn. Such a turn is not a drafting mistake; it
is reported as its own kind, ``grid-kink``, with the grid step, at info level.

The rule
--------
At a join, let P be the shared on-curve point, A the control point before it (the incoming
segment's last handle, or the previous on-curve point of a line) and B the control point
after it. The tangent directions there are P − A and B − P. Rounding to a grid of step g
moves every coordinate by at most g/2, so the drawn (unrounded) points A*, P*, B* lay in the
closed squares of half-side g/2 around A, P, B. The drawn join was smooth, with the tangent
running on through it, exactly when P* lay on the segment A*B*. So rounding can explain the
turn at P exactly when

    S(P, g/2) ∩ conv(S(A, g/2) ∪ S(B, g/2)) ≠ ∅,

S(c, h) the square of centre c and half-side h. The convex hull of two equal squares is the
segment AB swept by the square, so the condition is

    d∞(P, AB) ≤ g,

the Chebyshev (L∞) distance from P to the segment AB at most one grid step. If it holds, the
preimage is explicit: with q the L∞-nearest point of AB to P and e = (P − q)/2, the points
A + e, B + e, q + e are collinear with q + e between the others and each lies within g/2 per
axis of A, B, P. If it fails, no drawing of a smooth join rounds to these points. This is the
whole rule; it needs no angle threshold and holds for any handle lengths (a handle shorter
than about g can take any direction, and the test says so: P is then within g of A or B).

The largest turn
----------------
For handle lengths a = |P − A|, b = |B − P| and turn θ ≤ 90°, the Euclidean distance from P
to the line AB is h = ab sin θ / |AB| with |AB|² = a² + b² + 2ab cos θ, increasing in θ.
The L∞ distance is h / (|n_x| + |n_y|) for the unit normal n of AB, so the rule allows
h ≤ D = g (|n_x| + |n_y|): D = g for an axis-parallel chord, D = √2 g at 45°. Solving
h = D for θ gives

    cos θ_max = (√((a² − D²)(b² − D²)) − D²) / (ab),      D < min(a, b),

and for a = b = L, sin(θ_max / 2) = D / L. Any angle is possible when D ≥ min(a, b).
:func:`max_rounding_angle` gives this bound for messages; the decision itself is the
distance test, which also covers the case where the L∞-nearest point of the line falls
outside the chord.

References
----------
The derivation above (elementary convex geometry: the convex hull of two translates of a
convex set is their Minkowski sum with the segment between the translation vectors).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.diagnostics.findings import ERROR, INFO, Finding
from outlinebench.errors import OptionError
from outlinebench.model.document import Contour, Document

__all__ = [
    "GRID_KINK",
    "ROUNDING_SLACK",
    "chebyshev_distance_to_segment",
    "explained_by_rounding",
    "max_rounding_angle",
    "join_points",
    "grid_kink_findings",
]

GRID_KINK = "grid-kink"
# Relative slack on the test d∞ ≤ g, for the rounding of the distance computation itself
# (a few units in the last place: the boundary case d∞ = g must count as explained).
ROUNDING_SLACK = 8.0 * np.finfo(np.float64).eps

FloatArray = NDArray[np.float64]


def chebyshev_distance_to_segment(p: ArrayLike, a: ArrayLike, b: ArrayLike) -> float | FloatArray:
    """L∞ distance from point(s) p to segment(s) ab: min over t in [0, 1] of
    max(|x(t) − p_x|, |y(t) − p_y|).

    Parameters
    ----------
    p, a, b : array_like, shape (2,) or (N, 2)

    Returns
    -------
    float or ndarray, shape (N,)

    Notes
    -----
    f(t) = max(|u_x + t d_x|, |u_y + t d_y|) with u = a − p, d = b − a is convex and
    piecewise linear, so its minimum on [0, 1] is at t = 0, t = 1, a zero of one of the two
    linear parts (−u_x/d_x, −u_y/d_y) or where the parts have equal size
    ((u_y − u_x)/(d_x − d_y), −(u_x + u_y)/(d_x + d_y)). All six are evaluated.

    Examples
    --------
    >>> float(chebyshev_distance_to_segment([0.0, 1.0], [-5.0, 0.0], [5.0, 0.0]))
    1.0
    >>> float(chebyshev_distance_to_segment([2.0, 2.0], [0.0, 0.0], [0.0, 0.0]))
    2.0
    """
    p = np.asarray(p, dtype=np.float64)
    a = np.asarray(a, dtype=np.float64)
    b = np.asarray(b, dtype=np.float64)
    single = p.ndim == 1 and a.ndim == 1 and b.ndim == 1
    p, a, b = np.atleast_2d(p), np.atleast_2d(a), np.atleast_2d(b)
    u = a - p
    d = b - a
    ux, uy, dx, dy = u[:, 0], u[:, 1], d[:, 0], d[:, 1]
    with np.errstate(divide="ignore", invalid="ignore"):
        cands = np.stack(
            [
                np.zeros_like(ux),
                np.ones_like(ux),
                -ux / dx,
                -uy / dy,
                (uy - ux) / (dx - dy),
                -(ux + uy) / (dx + dy),
            ],
            axis=1,
        )
    cands = np.clip(np.where(np.isfinite(cands), cands, 0.0), 0.0, 1.0)
    fx = np.abs(ux[:, None] + cands * dx[:, None])
    fy = np.abs(uy[:, None] + cands * dy[:, None])
    out = np.min(np.maximum(fx, fy), axis=1)
    return float(out[0]) if single else out


def explained_by_rounding(
    before: ArrayLike, at: ArrayLike, after: ArrayLike, step: float
) -> NDArray[np.bool_] | bool:
    """Whether rounding to a grid of ``step`` could have turned a smooth join into this one.

    Parameters
    ----------
    before, at, after : array_like, shape (2,) or (N, 2)
        A, P, B of the module docstring: the control point before the join, the join's
        on-curve point, the control point after it.
    step : float
        Grid step g (1.0 for font units).

    Returns
    -------
    bool or ndarray of bool
        d∞(P, AB) ≤ g (with :data:`ROUNDING_SLACK`).

    Examples
    --------
    >>> explained_by_rounding([-100.0, 0.0], [0.0, 1.0], [100.0, 0.0], 1.0)
    True
    >>> explained_by_rounding([-100.0, 0.0], [0.0, 2.0], [100.0, 0.0], 1.0)
    False
    """
    if not (step > 0 and math.isfinite(step)):
        raise OptionError(f"the grid step must be a positive number, got {step!r}")
    d = chebyshev_distance_to_segment(at, before, after)
    ok = np.asarray(d) <= step * (1.0 + ROUNDING_SLACK)
    return bool(ok) if ok.ndim == 0 else ok


def max_rounding_angle(
    before_length: float,
    after_length: float,
    step: float,
    chord_direction: float | None = None,
) -> float:
    """Largest turn (degrees) rounding to a grid of ``step`` can give a smooth join.

    Parameters
    ----------
    before_length, after_length : float
        a = |P − A| and b = |B − P|, the lengths of the two tangent handles at the join.
    step : float
        Grid step g.
    chord_direction : float, optional
        Direction of the chord AB in radians. Default: the worst case, a chord at 45° to
        the axes (D = √2 g); 0 gives the axis-parallel case (D = g).

    Returns
    -------
    float
        θ_max in degrees, in (0, 180]; 180 when D ≥ min(a, b) (a handle so short that
        rounding can point it anywhere).

    Notes
    -----
    cos θ_max = (√((a² − D²)(b² − D²)) − D²) / (ab), D = g (|cos φ| + |sin φ|) for a chord
    at angle φ (module docstring). Exact where the L∞-nearest point of the chord's line lies
    within the chord, which holds when both handles are longer than about 2g.

    Examples
    --------
    >>> round(max_rounding_angle(100.0, 100.0, 1.0, 0.0), 6)  # 2 asin(1/100)
    1.145935
    >>> max_rounding_angle(0.5, 100.0, 1.0)
    180.0
    """
    a, b, g = float(before_length), float(after_length), float(step)
    if chord_direction is None:
        d = math.sqrt(2.0) * g
    else:
        d = g * (abs(math.cos(chord_direction)) + abs(math.sin(chord_direction)))
    if d >= min(a, b):
        return 180.0
    c = (math.sqrt((a * a - d * d) * (b * b - d * d)) - d * d) / (a * b)
    return math.degrees(math.acos(max(-1.0, min(1.0, c))))


def join_points(contour: Contour, join: int) -> tuple[FloatArray, FloatArray, FloatArray]:
    """(A, P, B) at a join: the incoming segment's last handle, the shared point, the outgoing
    segment's first handle (for a line, its other end).

    The adjacent control points are used even when one coincides with P (a retracted
    handle): the drawn handle could have been shorter than the grid step in any direction,
    and the rule then explains the join, as it should.
    """
    i, o = contour.join_segments(join)
    seg_in, seg_out = contour.segments[i], contour.segments[o]
    return seg_in[-2], seg_in[-1], seg_out[1]


def grid_kink_findings(
    findings: Sequence[Finding],
    doc: Document,
    step: float | dict[int, float | None] | None,
) -> list[Finding]:
    """The findings with every kink that rounding could cause turned into a ``grid-kink``.

    Parameters
    ----------
    findings : sequence of Finding
        From :func:`outlinebench.diagnostics.check_document` on ``doc``.
    doc : Document
    step : float, dict, or None
        The grid step for every outline, or outline number (``Finding.outline``) → step
        (None: that outline is not on a grid); None leaves the findings as they are.

    Returns
    -------
    list of Finding
        Same order. A ``kink`` (or a ``corner`` at a join the file marks smooth, severity
        error) that :func:`explained_by_rounding` explains becomes kind ``grid-kink``,
        severity info, ``limit`` the largest turn rounding can give at that join
        (:func:`max_rounding_angle` for its handle lengths and chord direction); others are
        unchanged.
    """
    if step is None:
        return list(findings)
    contours = {ref.global_index: ref.contour for ref in doc.contour_refs()}
    # the joins to test, gathered first so the rule runs on all of them in one batch
    picked: list[int] = []
    steps: list[float] = []
    pts: list[tuple[FloatArray, FloatArray, FloatArray]] = []
    for k, f in enumerate(findings):
        if f.kind != "kink" and not (f.kind == "corner" and f.severity == ERROR):
            continue
        g = step.get(f.outline) if isinstance(step, dict) else step
        c = contours.get(f.contour)
        if g is None or f.join is None or c is None or f.join >= c.join_count:
            continue
        picked.append(k)
        steps.append(g)
        pts.append(join_points(c, f.join))
    out = list(findings)
    if not picked:
        return out
    g_arr = np.array(steps, dtype=np.float64)
    if not np.all((g_arr > 0) & np.isfinite(g_arr)):
        bad = float(g_arr[~((g_arr > 0) & np.isfinite(g_arr))][0])
        raise OptionError(f"the grid step must be a positive number, got {bad!r}")
    a_all = np.array([t[0] for t in pts], dtype=np.float64)
    p_all = np.array([t[1] for t in pts], dtype=np.float64)
    b_all = np.array([t[2] for t in pts], dtype=np.float64)
    d = np.asarray(chebyshev_distance_to_segment(p_all, a_all, b_all))
    explained = d <= g_arr * (1.0 + ROUNDING_SLACK)  # explained_by_rounding, batched
    for q in np.flatnonzero(explained).tolist():
        f = findings[picked[q]]
        g = steps[q]
        a, p, b = a_all[q], p_all[q], b_all[q]
        chord = b - a
        direction = math.atan2(float(chord[1]), float(chord[0])) if np.any(chord) else None
        limit = max_rounding_angle(
            float(np.hypot(*(p - a))), float(np.hypot(*(b - p))), g, direction
        )
        angle = f.value if f.value is not None else float("nan")
        out[picked[q]] = f._replace(
            kind=GRID_KINK,
            severity=INFO,
            limit=limit,
            message=(
                f"grid kink: the tangent turns {angle:.2f}°, which rounding the points to a "
                f"grid of {g:g} unit(s) can cause (up to {limit:.2f}° for these handles)"
            ),
        )
    return out
