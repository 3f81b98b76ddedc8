"""Least-squares fitting of one cubic to a chain of segments, and measuring shape change.

Used when an on-curve point is deleted: the two segments meeting there are replaced by one
cubic that keeps the chain's end points and end tangent directions and follows its shape as
closely as a cubic can. :func:`max_deviation` measures how far two curves are apart, which is
the shape change reported to the user.

References
----------
P. J. Schneider, "An Algorithm for Automatically Fitting Digitized Curves", in A. S. Glassner
(ed.), *Graphics Gems*, Academic Press, 1990, pp. 612-626.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.geometry.bezier import derivative, evaluate
from outlinebench.geometry.curvature import end_tangents
from outlinebench.geometry.nearest import nearest_point

__all__ = [
    "FIT_SAMPLES_PER_SEGMENT",
    "SCHNEIDER_ROUNDS",
    "FIT_MAX_ITERATIONS",
    "FIT_PARAMETER_TOLERANCE",
    "DEVIATION_SAMPLES_PER_SEGMENT",
    "end_directions",
    "sample_chain",
    "chord_length_params",
    "fit_cubic",
    "fit_chain",
    "nearest_params",
    "distances_to_chain",
    "max_deviation",
]

FloatArray = NDArray[np.float64]

# Points sampled (uniformly in t) on each old segment as the data a cubic is fitted to.
FIT_SAMPLES_PER_SEGMENT = 64
# Rounds of Schneider's alternation (least-squares handles, then Newton parameter correction)
# used to get close before the joint Gauss-Newton refinement takes over.
SCHNEIDER_ROUNDS = 4
# Upper bound on joint Gauss-Newton refinement steps (handle lengths and parameters).
FIT_MAX_ITERATIONS = 40
# Parameter correction stops when no sample parameter moves by more than this (in t units).
FIT_PARAMETER_TOLERANCE = 1e-14
# Points sampled (uniformly in t) on each segment when measuring the deviation of two curves;
# the maximum between samples is missed by at most (spacing)² × curvature / 8.
DEVIATION_SAMPLES_PER_SEGMENT = 200


def end_directions(segments: Sequence[FloatArray]) -> tuple[FloatArray, FloatArray]:
    """Unit tangent at the start of a chain and unit vector *into* the chain at its end.

    Parameters
    ----------
    segments : sequence of ndarray, each (K, 2)

    Returns
    -------
    (start_dir, end_dir) : ndarrays, shape (2,)
        ``start_dir`` points along the curve at its start; ``end_dir`` points from the end
        point back along the curve (Schneider's t̂₂ convention). A handle that coincides with
        its on-curve point falls back to the next distinct control point; a chain whose
        segment is a single point falls back to the chord.

    Notes
    -----
    The direction of B′(0) is that of P₁ − P₀, or of the first non-zero Pᵢ − P₀ when the
    leading handles coincide (Farin, *Curves and Surfaces for CAGD*, §5.3); both ends come
    from :func:`~outlinebench.geometry.curvature.end_tangents`.
    """
    first, last = segments[0], segments[-1]
    t1, _ = end_tangents(first)
    _, arrive = end_tangents(last)
    t2 = -arrive
    chord = last[-1] - first[0]
    cn = float(np.hypot(chord[0], chord[1]))
    chord_dir = chord / cn if cn > 0.0 else np.array([1.0, 0.0])
    if not t1.any():
        t1 = chord_dir
    if not t2.any():
        t2 = -chord_dir
    return t1, t2


def sample_chain(segments: Sequence[FloatArray], per_segment: int) -> FloatArray:
    """Points on a chain of segments, ``per_segment`` intervals each, shared ends once.

    Returns
    -------
    ndarray, shape (len(segments) * per_segment + 1, 2)
    """
    t = np.linspace(0.0, 1.0, per_segment + 1)
    parts = [evaluate(s, t[:-1]) for s in segments]
    parts.append(segments[-1][-1][None, :])
    return np.concatenate(parts, axis=0)


def chord_length_params(points: FloatArray) -> FloatArray:
    """Chord-length parameters in [0, 1] for a polyline of points, shape (N,).

    Notes
    -----
    uᵢ = Σ_{j≤i} |dⱼ − dⱼ₋₁| / Σ_j |dⱼ − dⱼ₋₁| (Schneider 1990, ``ChordLengthParameterize``).
    On densely sampled curves this approaches arc-length parametrisation. A chain of zero
    length gets uniform parameters.
    """
    steps = np.hypot(*np.diff(points, axis=0).T)
    cum = np.concatenate([[0.0], np.cumsum(steps)])
    total = cum[-1]
    if total <= 0.0:
        return np.linspace(0.0, 1.0, len(points))
    u = cum / total
    u[-1] = 1.0
    return u


def _basis(u: FloatArray) -> FloatArray:
    s = 1.0 - u
    return np.stack([s * s * s, 3.0 * s * s * u, 3.0 * s * u * u, u * u * u], axis=1)


def _solve_handles(
    data: FloatArray, u: FloatArray, p0: FloatArray, p3: FloatArray, t1: FloatArray, t2: FloatArray
) -> FloatArray:
    """Schneider's least-squares handle lengths for fixed end points, directions and params."""
    b = _basis(u)
    a1 = b[:, 1:2] * t1
    a2 = b[:, 2:3] * t2
    c00 = float(np.sum(a1 * a1))
    c01 = float(np.sum(a1 * a2))
    c11 = float(np.sum(a2 * a2))
    tmp = data - (np.outer(b[:, 0] + b[:, 1], p0) + np.outer(b[:, 2] + b[:, 3], p3))
    x0 = float(np.sum(a1 * tmp))
    x1 = float(np.sum(a2 * tmp))
    det = c00 * c11 - c01 * c01
    chord = float(np.hypot(*(p3 - p0)))
    scale = max(c00 * c11, 1e-300)
    if abs(det) > 1e-12 * scale:
        alpha1 = (x0 * c11 - x1 * c01) / det
        alpha2 = (c00 * x1 - c01 * x0) / det
    else:
        # Parallel end tangents with a singular system: Schneider's fallback.
        alpha1 = alpha2 = chord / 3.0
    # Non-positive handle lengths would reverse a tangent; Schneider falls back to the
    # Wu/Barsky heuristic of one third of the chord.
    eps = 1e-6 * max(chord, 1e-300)
    if alpha1 < eps or alpha2 < eps:
        alpha1 = alpha2 = chord / 3.0
    return np.array([p0, p0 + alpha1 * t1, p3 + alpha2 * t2, p3])


def _newton_params(cubic: FloatArray, data: FloatArray, u: FloatArray) -> FloatArray:
    """One Newton-Raphson step on f(u) = (Q(u) − d)·Q′(u) per sample (Schneider 1990)."""
    q = evaluate(cubic, u)
    d1 = evaluate(derivative(cubic, 1), u)
    d2 = evaluate(derivative(cubic, 2), u)
    diff = q - data
    num = np.sum(diff * d1, axis=1)
    den = np.sum(d1 * d1, axis=1) + np.sum(diff * d2, axis=1)
    step = np.zeros_like(u)
    ok = np.abs(den) > 1e-300
    step[ok] = num[ok] / den[ok]
    new = np.clip(u - step, 0.0, 1.0)
    new[0], new[-1] = 0.0, 1.0
    return new


def fit_cubic(
    data: ArrayLike,
    start_dir: ArrayLike,
    end_dir: ArrayLike,
    *,
    params: ArrayLike | None = None,
    max_iterations: int = FIT_MAX_ITERATIONS,
    tolerance: float = FIT_PARAMETER_TOLERANCE,
) -> tuple[FloatArray, FloatArray]:
    """Fit one cubic to ordered points, keeping the first and last point and end directions.

    Parameters
    ----------
    data : array_like, shape (N, 2)
        Ordered points, N ≥ 2; the cubic starts at ``data[0]`` and ends at ``data[-1]``.
    start_dir, end_dir : array_like, shape (2,)
        Unit tangent at the start, and unit vector from the end back into the curve.
    params : array_like, shape (N,), optional
        Initial parameters; chord-length parameters by default.
    max_iterations : int
        Upper bound on rounds of fit + parameter correction.
    tolerance : float
        Stop when no parameter moves by more than this (t units).

    Returns
    -------
    (cubic, params) : ndarray (4, 2), ndarray (N,)
        The fitted control points (end points are exactly ``data[0]`` and ``data[-1]``) and
        the parameters of the samples on it.

    Notes
    -----
    Schneider's method (Graphics Gems, 1990): with parameters uᵢ fixed, the handle lengths
    α₁, α₂ of Q(u) = B₀P₀ + B₁(P₀ + α₁t̂₁) + B₂(P₃ + α₂t̂₂) + B₃P₃ minimise Σ|Q(uᵢ) − dᵢ|², a
    2×2 linear system; then each uᵢ is corrected by one Newton-Raphson step towards the
    nearest point of Q to dᵢ, and the two alternate. When the data lie on a cubic with these
    end directions, the iteration converges to it.
    """
    pts = np.asarray(data, dtype=np.float64)
    t1 = np.asarray(start_dir, dtype=np.float64)
    t2 = np.asarray(end_dir, dtype=np.float64)
    p0, p3 = pts[0].copy(), pts[-1].copy()
    u = chord_length_params(pts) if params is None else np.asarray(params, dtype=np.float64)
    cubic = _solve_handles(pts, u, p0, p3, t1, t2)
    for _ in range(SCHNEIDER_ROUNDS):
        u = _newton_params(cubic, pts, u)
        cubic = _solve_handles(pts, u, p0, p3, t1, t2)
    cubic, u = _refine_jointly(cubic, pts, u, t1, t2, max_iterations, tolerance)
    cubic[0], cubic[3] = p0, p3
    return cubic, u


def _cost(cubic: FloatArray, data: FloatArray, u: FloatArray) -> float:
    return float(np.sum((evaluate(cubic, u) - data) ** 2))


def _refine_jointly(
    cubic: FloatArray,
    data: FloatArray,
    u: FloatArray,
    t1: FloatArray,
    t2: FloatArray,
    max_iterations: int,
    tolerance: float,
) -> tuple[FloatArray, FloatArray]:
    """Gauss-Newton on handle lengths and sample parameters together.

    The sample parameters are eliminated per sample (each only affects its own residual):
    residuals and the handle-length Jacobian are projected on the curve normal at Q(uᵢ),
    which gives the 2×2 system for the handle-length step; each uᵢ then moves along the
    tangent. Converges quadratically when the data lie on such a cubic, where plain
    alternation (fit, then correct parameters) converges only linearly.
    """
    p0, p3 = cubic[0], cubic[3]
    alpha = np.array([np.dot(cubic[1] - p0, t1), np.dot(cubic[2] - p3, t2)])
    cost = _cost(cubic, data, u)
    for _ in range(max_iterations):
        b = _basis(u)
        q = evaluate(cubic, u)
        r = q - data
        d1 = evaluate(derivative(cubic, 1), u)
        speed2 = np.sum(d1 * d1, axis=1)
        ok = speed2 > 1e-300
        inv_speed = np.zeros_like(speed2)
        inv_speed[ok] = 1.0 / np.sqrt(speed2[ok])
        normal = np.stack([-d1[:, 1], d1[:, 0]], axis=1) * inv_speed[:, None]
        ja = np.stack([b[:, 1:2] * t1, b[:, 2:3] * t2], axis=2)  # (N, 2, 2)
        rn = np.sum(normal * r, axis=1)
        jn = np.einsum("ni,nij->nj", normal, ja)
        m = jn.T @ jn
        rhs = -(jn.T @ rn)
        if abs(np.linalg.det(m)) <= 1e-300:
            break
        dalpha = np.linalg.solve(m, rhs)
        moved_r = r + np.einsum("nij,j->ni", ja, dalpha)
        du = np.zeros_like(u)
        du[ok] = -np.sum(d1[ok] * moved_r[ok], axis=1) / speed2[ok]
        du[0] = du[-1] = 0.0
        step = 1.0
        accepted = False
        for _ in range(12):
            new_alpha = alpha + step * dalpha
            new_u = np.clip(u + step * du, 0.0, 1.0)
            trial = np.array([p0, p0 + new_alpha[0] * t1, p3 + new_alpha[1] * t2, p3])
            new_cost = _cost(trial, data, new_u)
            if new_cost <= cost:
                accepted = True
                break
            step *= 0.5
        if not accepted or np.any(new_alpha <= 0.0):
            break
        moved = float(np.max(np.abs(new_u - u)))
        alpha, u, cubic, cost = new_alpha, new_u, trial, new_cost
        if moved <= tolerance or cost == 0.0:
            break
    return cubic, u


def fit_chain(
    segments: Sequence[FloatArray],
    *,
    samples_per_segment: int = FIT_SAMPLES_PER_SEGMENT,
    max_iterations: int = FIT_MAX_ITERATIONS,
) -> FloatArray:
    """One cubic replacing a chain of segments (end points and end directions kept).

    Parameters
    ----------
    segments : sequence of ndarray, each (K, 2)
        Consecutive segments sharing end points.

    Returns
    -------
    ndarray, shape (4, 2)
        Its first and last points are bit-identical to the chain's.

    Notes
    -----
    The chain is sampled uniformly in t on each segment, parametrised by chord length (close
    to arc length on dense samples), and fitted with :func:`fit_cubic`.
    """
    data = sample_chain(segments, samples_per_segment)
    t1, t2 = end_directions(segments)
    cubic, _ = fit_cubic(data, t1, t2, max_iterations=max_iterations)
    cubic[0] = segments[0][0]
    cubic[3] = segments[-1][-1]
    return cubic


def nearest_params(segment: FloatArray, queries: ArrayLike) -> tuple[FloatArray, FloatArray]:
    """Parameter and distance of the nearest point of one segment to each query point.

    Parameters
    ----------
    segment : ndarray, shape (K, 2)
    queries : array_like, shape (Q, 2)

    Returns
    -------
    (t, distance) : ndarrays, shape (Q,)

    Notes
    -----
    The global nearest point of :func:`outlinebench.geometry.nearest.nearest_point` (all
    roots of the stationarity polynomial, then both ends), for all queries at once.
    """
    q = np.asarray(queries, dtype=np.float64).reshape(-1, 2)
    t, dist, _ = nearest_point(segment, q)
    return t, dist


def distances_to_chain(segments: Sequence[FloatArray], queries: ArrayLike) -> FloatArray:
    """Distance from each query point to the nearest point of a chain of segments, (Q,)."""
    q = np.asarray(queries, dtype=np.float64).reshape(-1, 2)
    best = np.full(len(q), np.inf)
    for seg in segments:
        _, d = nearest_params(seg, q)
        np.minimum(best, d, out=best)
    return best


def max_deviation(
    segments_a: Sequence[FloatArray],
    segments_b: Sequence[FloatArray],
    *,
    samples_per_segment: int = DEVIATION_SAMPLES_PER_SEGMENT,
) -> float:
    """Largest distance between two curves (two-sided, a Hausdorff distance estimate).

    Parameters
    ----------
    segments_a, segments_b : sequence of ndarray, each (K, 2)
        The two curves as chains of segments (e.g. the old and the new shape).
    samples_per_segment : int
        Dense samples taken on each segment of each curve.

    Returns
    -------
    float
        max( max_{p∈A} d(p, B), max_{q∈B} d(q, A) ), in the curves' units.

    Notes
    -----
    Each curve is sampled densely (uniformly in t) and each sample's distance to the other
    curve is computed with the global nearest point (:func:`nearest_params`, to rounding).
    The maximum over samples is therefore at most the true two-sided maximum (a lower bound
    of the Hausdorff distance, up to rounding); it misses the maximum between two samples by
    at most about h²κ/8 for sample spacing h along the curve and curvature κ of the
    distance profile there (the sagitta of a chord; common practice, no source).
    """
    pa = sample_chain(list(segments_a), samples_per_segment)
    pb = sample_chain(list(segments_b), samples_per_segment)
    dab = float(np.max(distances_to_chain(segments_b, pa)))
    dba = float(np.max(distances_to_chain(segments_a, pb)))
    return max(dab, dba)
