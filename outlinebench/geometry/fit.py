"""Least-squares fitting of cubics to chains of segments and to polylines; shape change.

Used when an on-curve point is deleted: the two segments meeting there are replaced by one
cubic that keeps the chain's end points and end tangent directions and follows its shape as
closely as a cubic can. :func:`max_deviation` measures how far two curves are apart, which is
the shape change reported to the user.

:func:`fit_polyline` turns a polyline (traced, or exported elsewhere as chords) into few
lines and cubics within a tolerance: corners detected by angle, tangent-continuous (G1)
elsewhere. It builds on Schneider's method (least-squares handles with Newton parameter
correction, Graphics Gems 1990); :func:`fit_polyline_schneider` is that method in its plain
published form (recursive splitting at the worst point), kept as the reference the benchmark
``benchmarks/bench_fit.py`` compares with.

References
----------
P. J. Schneider, "An Algorithm for Automatically Fitting Digitized Curves", in A. S. Glassner
(ed.), *Graphics Gems*, Academic Press, 1990, pp. 612-626.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import OptionError
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
    "DEFAULT_FIT_CORNER_ANGLE",
    "polyline_corners",
    "fit_polyline",
    "fit_polyline_schneider",
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


# --------------------------------------------------------------------------------------------
# fitting curves to polylines
# --------------------------------------------------------------------------------------------

# A polyline vertex where the direction turns by more than this (degrees) is a corner: the
# fitted curve keeps it as an on-curve point with independent tangents. Our choice, no source
# (the check's default corner angle is 10°; traced curves turn by a few degrees per chord).
DEFAULT_FIT_CORNER_ANGLE = 30.0
# Curve points sampled per fitted cubic when checking it against the polyline (the other
# direction of the two-sided distance); the final shape change is measured with a proven bound
# by the caller.
_CHECK_SAMPLES = 48
# Edges are sampled at most this many tolerances apart as fitting data (distance to the curve
# is 1-Lipschitz along an edge, so between samples it can exceed the sampled values by at most
# half this spacing; the two-sided check and the caller's proven measure catch the rest).
_DENSIFY_SPACING = 8.0
# Schneider's "iteration error": when the first fit misses by less than this multiple of the
# tolerance, parameter correction is tried before splitting (Schneider 1990 uses 4).
_SCHNEIDER_ITERATION_FACTOR = 4.0
# Rounds of Newton parameter correction in the plain method (Schneider 1990: maxIterations 4).
_SCHNEIDER_MAX_ITERATIONS = 4


def _unit(v: FloatArray) -> FloatArray:
    n = float(np.hypot(v[0], v[1]))
    return v / n if n > 0.0 else np.array([1.0, 0.0])


def _clean_polyline(points: ArrayLike, closed: bool) -> FloatArray:
    pts = np.asarray(points, dtype=np.float64).reshape(-1, 2)
    if len(pts) == 0:
        return pts
    keep = np.ones(len(pts), dtype=bool)
    keep[1:] = np.any(pts[1:] != pts[:-1], axis=1)
    pts = pts[keep]
    if closed and len(pts) > 1 and np.array_equal(pts[0], pts[-1]):
        pts = pts[:-1]
    return pts


def polyline_corners(
    points: ArrayLike, closed: bool, corner_angle: float = DEFAULT_FIT_CORNER_ANGLE
) -> NDArray[np.intp]:
    """Indices of the vertices where a polyline turns by more than ``corner_angle`` degrees.

    Parameters
    ----------
    points : array_like, shape (P, 2)
        Vertices, consecutive duplicates not allowed (a closed polyline does not repeat its
        first vertex).
    closed : bool
    corner_angle : float
        Degrees.

    Returns
    -------
    ndarray of int
        Sorted. An open polyline's two ends are always included.

    Notes
    -----
    The turn at vertex i is the angle between dᵢ₋₁ = Pᵢ − Pᵢ₋₁ and dᵢ = Pᵢ₊₁ − Pᵢ,
    atan2(dᵢ₋₁ × dᵢ, dᵢ₋₁ · dᵢ).
    """
    pts = np.asarray(points, dtype=np.float64)
    n = len(pts)
    if n < 3:
        return np.arange(n, dtype=np.intp) if not closed else np.zeros(0, dtype=np.intp)
    nxt = np.roll(pts, -1, axis=0) - pts
    prev = pts - np.roll(pts, 1, axis=0)
    cross = prev[:, 0] * nxt[:, 1] - prev[:, 1] * nxt[:, 0]
    dot = np.sum(prev * nxt, axis=1)
    turn = np.degrees(np.abs(np.arctan2(cross, dot)))
    corner = turn > corner_angle
    if not closed:
        corner[0] = corner[-1] = True
    return np.flatnonzero(corner).astype(np.intp)


def _densify(run: FloatArray, spacing: float) -> tuple[FloatArray, NDArray[np.intp]]:
    """Points along a polyline run with gaps ≤ spacing, and the index of each vertex in them."""
    parts = [run[:1]]
    where = [0]
    count = 1
    for a, b in zip(run[:-1], run[1:], strict=True):
        k = max(1, int(np.ceil(float(np.hypot(*(b - a))) / spacing)))
        f = np.arange(1, k + 1)[:, None] / k
        seg = a + f * (b - a)
        seg[-1] = b
        parts.append(seg)
        count += k
        where.append(count - 1)
    return np.concatenate(parts), np.array(where, dtype=np.intp)


def _point_segment_distances(q: FloatArray, a: FloatArray, b: FloatArray) -> FloatArray:
    """Distance from each point q (Q, 2) to the nearest of the segments a–b (E, 2)."""
    ab = b - a
    ll = np.einsum("ij,ij->i", ab, ab)
    ap = q[:, None, :] - a[None, :, :]
    f = np.divide(np.einsum("qei,ei->qe", ap, ab), ll, out=np.zeros((len(q), len(a))), where=ll > 0)
    f = np.clip(f, 0.0, 1.0)
    d = ap - f[..., None] * ab
    return np.min(np.hypot(d[..., 0], d[..., 1]), axis=1)


def _fit_error(cubic: FloatArray, data: FloatArray, run: FloatArray) -> tuple[float, int]:
    """Two-sided error of a cubic against polyline data: (largest distance, worst data index).

    Data → cubic by the exact global nearest point; cubic → polyline at sample points.
    """
    _, dist = nearest_params(cubic, data)
    worst = int(np.argmax(dist))
    err = float(dist[worst])
    samples = evaluate(cubic, np.linspace(0.0, 1.0, _CHECK_SAMPLES + 1))
    back = float(np.max(_point_segment_distances(samples, run[:-1], run[1:])))
    return max(err, back), worst


def _line_fits(run: FloatArray, tolerance: float) -> bool:
    a, b = run[0], run[-1]
    return float(np.max(_point_segment_distances(run, a[None], b[None]))) <= tolerance


def _center_tangent(pts: FloatArray, i: int) -> FloatArray:
    """Schneider's centre tangent at an interior vertex: the direction of Pᵢ₋₁ → Pᵢ₊₁."""
    return _unit(pts[i + 1] - pts[i - 1])


def _run_end_tangents(run: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Directions at a run's ends from the parabola through its first (last) three vertices.

    Notes
    -----
    For vertices q₀, q₁, q₂ at chord-length parameters 0, h₁, h₁ + h₂, the interpolating
    parabola has derivative at q₀ (the three-point end formula for unequal steps, exact for
    quadratics): (q₁ − q₀)(h₁ + h₂)/(h₁h₂) − (q₂ − q₀)h₁/(h₂(h₁ + h₂)). The end direction is
    taken the same way from the last three vertices, pointing back into the run.
    """
    if len(run) < 3:
        d = _unit(run[-1] - run[0])
        return d, -d

    def end(q0: FloatArray, q1: FloatArray, q2: FloatArray) -> FloatArray:
        h1 = float(np.hypot(*(q1 - q0)))
        h2 = float(np.hypot(*(q2 - q1)))
        d = (q1 - q0) * (h1 + h2) / (h1 * h2) - (q2 - q0) * h1 / (h2 * (h1 + h2))
        return _unit(d)

    return end(run[0], run[1], run[2]), end(run[-1], run[-2], run[-3])


def _greedy_run(
    run: FloatArray, t_start: FloatArray, t_end: FloatArray, tolerance: float, spacing: float
) -> list[FloatArray]:
    """Few cubics through a corner-free run: the longest stretch that fits, then the next."""
    if len(run) == 2 or _line_fits(run, tolerance):
        return [np.array([run[0], run[-1]])]
    data, where = _densify(run, spacing)
    out: list[FloatArray] = []
    s = 0
    t1 = t_start
    last = len(run) - 1
    while s < last:
        # try the whole remaining run first, then a binary search for the longest fit
        def attempt(e: int, s: int = s, t1: FloatArray = t1) -> FloatArray | None:
            sub = run[s : e + 1]
            if e - s == 1 or _line_fits(sub, tolerance):
                return np.array([run[s], run[e]])
            t2 = t_end if e == last else -_center_tangent(run, e)
            d = data[where[s] : where[e] + 1]
            cubic, _ = fit_cubic(d, t1, t2)
            err, _ = _fit_error(cubic, d, sub)
            return cubic if err <= tolerance else None

        best = attempt(last)
        e_best = last
        if best is None:
            lo, hi = s + 1, last - 1  # s + 1 always fits (one edge is a line)
            best = attempt(lo)
            e_best = lo
            while lo < hi:
                mid = (lo + hi + 1) // 2
                got = attempt(mid)
                if got is not None:
                    lo, best, e_best = mid, got, mid
                else:
                    hi = mid - 1
        assert best is not None
        best = best.copy()
        best[0], best[-1] = run[s], run[e_best]
        out.append(best)
        if e_best < last:
            t1 = _center_tangent(run, e_best)
            if best.shape[0] == 2:
                t1 = _unit(run[e_best] - run[e_best - 1])
        s = e_best
    return out


def _runs_between_corners(
    pts: FloatArray, closed: bool, corners: NDArray[np.intp]
) -> list[tuple[FloatArray, bool, bool]]:
    """Runs of vertices between breakpoints: (run, starts at a corner, ends at a corner)."""
    n = len(pts)
    if closed:
        if len(corners) == 0:
            loop = np.vstack([pts, pts[:1]])
            return [(loop, False, False)]
        out = []
        for k, c in enumerate(corners):
            nxt = corners[(k + 1) % len(corners)]
            idx = np.arange(c, nxt + (n if nxt <= c else 0) + 1) % n
            out.append((pts[idx], True, True))
        return out
    out = []
    for a, b in zip(corners[:-1], corners[1:], strict=True):
        out.append((pts[a : b + 1], True, True))
    return out


def fit_polyline(
    points: ArrayLike,
    closed: bool,
    tolerance: float,
    *,
    corner_angle: float = DEFAULT_FIT_CORNER_ANGLE,
) -> list[FloatArray]:
    """Few lines and cubics following a polyline within a tolerance, G1 except at corners.

    Parameters
    ----------
    points : array_like, shape (P, 2)
        Vertices in order (a closed polyline may or may not repeat its first vertex).
    closed : bool
    tolerance : float
        Largest allowed distance between the polyline and the fitted curve (> 0), checked
        both ways at the data points and at curve samples; the caller measures the final shape
        change with a proven bound (:func:`outlinebench.geometry.hausdorff_bound`).
    corner_angle : float
        Vertices turning by more than this many degrees stay corners.

    Returns
    -------
    list of ndarray, each (2, 2) or (4, 2)
        Consecutive segments sharing end points exactly; they start at the polyline's first
        vertex (for a closed polyline without corners) or at its first corner, and a closed
        result ends where it starts. Every corner vertex is an on-curve point, bit for bit.

    Notes
    -----
    Built on Schneider's method (Graphics Gems 1990): for fixed end points and end tangent
    directions t̂₁, t̂₂, the handle lengths minimise Σ|Q(uᵢ) − dᵢ|² (a 2×2 linear system),
    alternated with Newton correction of the parameters uᵢ, here followed by joint
    Gauss-Newton refinement (:func:`fit_cubic`). Differences from the plain method
    (:func:`fit_polyline_schneider`):

    - Corners are found first by angle (:func:`polyline_corners`); runs between them are
      fitted separately, so corners stay exact.
    - End tangents at corners come from the parabola through the three nearest vertices
      instead of the first chord; tangents at split points are Schneider's centre tangents,
      shared by both sides (G1 by construction).
    - Splitting is greedy: the longest stretch from the current start that fits within the
      tolerance is found by binary search over the vertices, rather than splitting recursively
      at the worst point (which often ends with more pieces than needed).
    - Each edge is sampled at a spacing of 8 tolerances or less, so chord interiors count, and
      the curve is checked against the polyline at samples too (two-sided error).
    - A stretch whose vertices lie within the tolerance of its chord becomes a line.

    References
    ----------
    P. J. Schneider, "An Algorithm for Automatically Fitting Digitized Curves", in A. S.
    Glassner (ed.), *Graphics Gems*, Academic Press, 1990, pp. 612-626.
    """
    if not (np.isfinite(tolerance) and tolerance > 0.0):
        raise OptionError(f"the fitting tolerance must be > 0, got {tolerance!r}")
    pts = _clean_polyline(points, closed)
    if len(pts) < 2:
        return []
    corners = polyline_corners(pts, closed, corner_angle)
    spacing = _DENSIFY_SPACING * float(tolerance)
    out: list[FloatArray] = []
    for run, _, _ in _runs_between_corners(pts, closed, corners):
        if len(corners) == 0 and closed:
            # no corner: split the loop at vertex 0 with the centre tangent there (G1)
            t = _unit(pts[1] - pts[-1])
            pieces = _greedy_run(run, t, -t, tolerance, spacing)
        else:
            t1, t2 = _run_end_tangents(run)
            pieces = _greedy_run(run, t1, t2, tolerance, spacing)
        out.extend(pieces)
    for i in range(1, len(out)):
        out[i][0] = out[i - 1][-1]
    if closed and out:
        out[-1][-1] = out[0][0]
    return out


def _schneider_fit(
    d: FloatArray, t1: FloatArray, t2: FloatArray, tolerance: float, out: list[FloatArray]
) -> None:
    """FitCubic of Schneider (1990), recursive, on points d with end tangents t1, t2."""
    if len(d) == 2:
        dist = float(np.hypot(*(d[1] - d[0]))) / 3.0
        out.append(np.array([d[0], d[0] + t1 * dist, d[1] + t2 * dist, d[1]]))
        return
    u = chord_length_params(d)
    cubic = _solve_handles(d, u, d[0], d[-1], t1, t2)

    def max_error(c: FloatArray, uu: FloatArray) -> tuple[float, int]:
        # Schneider's ComputeMaxError: distance at the sample's own parameter
        dist = np.hypot(*(evaluate(c, uu) - d).T)
        k = int(np.argmax(dist[1:-1])) + 1
        return float(dist[k]), k

    err, split_at = max_error(cubic, u)
    if err < tolerance:
        out.append(cubic)
        return
    if err < _SCHNEIDER_ITERATION_FACTOR * tolerance:
        for _ in range(_SCHNEIDER_MAX_ITERATIONS):
            u = _newton_params(cubic, d, u)
            cubic = _solve_handles(d, u, d[0], d[-1], t1, t2)
            err, split_at = max_error(cubic, u)
            if err < tolerance:
                out.append(cubic)
                return
    tc = _center_tangent(d, split_at)
    _schneider_fit(d[: split_at + 1], t1, -tc, tolerance, out)
    _schneider_fit(d[split_at:], tc, t2, tolerance, out)


def fit_polyline_schneider(
    points: ArrayLike,
    closed: bool,
    tolerance: float,
    *,
    corner_angle: float = DEFAULT_FIT_CORNER_ANGLE,
) -> list[FloatArray]:
    """Schneider's curve fitting in its plain published form (the benchmark reference).

    Parameters and return as :func:`fit_polyline`; corners are found the same way so both
    fit the same runs.

    Notes
    -----
    Per run: chord-length parameters; least-squares handle lengths for end tangents given by
    the first and last chords; if the largest error (distance of each point from the curve at
    its own parameter) is below the tolerance, accept; if below 4 × the tolerance, up to four
    rounds of Newton-Raphson parameter correction; otherwise split at the worst point with the
    centre tangent there and recurse (Schneider 1990, ``FitCurve`` / ``FitCubic``). Only the
    polyline's vertices are data, as in the published method.
    """
    pts = _clean_polyline(points, closed)
    if len(pts) < 2:
        return []
    corners = polyline_corners(pts, closed, corner_angle)
    out: list[FloatArray] = []
    for run, _, _ in _runs_between_corners(pts, closed, corners):
        if len(run) == 2:
            out.append(np.array([run[0], run[1]]))
            continue
        if len(corners) == 0 and closed:
            t1 = _unit(pts[1] - pts[-1])
            t2 = -t1
        else:
            t1 = _unit(run[1] - run[0])
            t2 = _unit(run[-2] - run[-1])
        _schneider_fit(run, t1, t2, tolerance, out)
    for i in range(1, len(out)):
        out[i][0] = out[i - 1][-1]
    if closed and out:
        out[-1][-1] = out[0][0]
    return out
