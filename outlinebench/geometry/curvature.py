"""Differential geometry of Bézier segments: signed curvature, unit tangent and normal, cusps.

Shapes follow :func:`outlinebench.geometry.bezier.evaluate`: control points ``(K, 2)`` or
``(M, K, 2)``, parameter t scalar or ``(T,)``.

Degenerate ends (a handle lying on its on-curve point, so B′ = 0 there) get the answer of the
first non-zero derivative, the one-sided limit along the curve. A segment whose control points
all coincide has no direction: its tangent and normal are (0, 0) and its curvature 0. Nothing
here returns NaN.

References
----------
M. P. do Carmo, *Differential Geometry of Curves and Surfaces*, §1-5 (signed curvature of a
plane curve). G. Farin, *Curves and Surfaces for CAGD*, 5th ed., §4.5 and §11.2 (end
derivatives and end curvature of a Bézier curve). M. Stone and T. DeRose, "A geometric
characterization of parametric cubic curves", ACM TOG 8(3), 1989 (inflections, cusps, loops).
"""

from __future__ import annotations

import numpy as np
from numpy.polynomial import polynomial as P
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry._batch import as_batch, as_params, cross, normalized, unbatch
from outlinebench.geometry.bezier import derivative, evaluate, power_coefficients

__all__ = [
    "ZERO_DERIVATIVE_TOLERANCE",
    "CUSP_RELATIVE_TOLERANCE",
    "curvature",
    "unit_tangent",
    "unit_normal",
    "end_tangents",
    "end_curvatures",
    "inflections",
    "cusps",
]

FloatArray = NDArray[np.float64]

# A derivative vector shorter than this fraction of the segment's size (the larger side of its
# control-point box) counts as zero when choosing the direction: below it the direction is
# rounding noise, not drawing intent, and the next derivative gives the direction instead.
ZERO_DERIVATIVE_TOLERANCE = 1e-12

# Default cusp threshold: the radius |B′|²/|B″| of the tip at a local minimum of the speed, as a
# fraction of the segment's size. 1e-9 separates exact cusps computed in float64 (radius at
# the rounding level, ~1e-16) from visibly rounded tips with a wide margin.
CUSP_RELATIVE_TOLERANCE = 1e-9

# Two derivative vectors whose cross product is below this fraction of the product of their
# lengths are taken as parallel (float64 rounding of collinear control points is ~1e-16).
_PARALLEL_TOLERANCE = 1e-12


def _derivatives(q: FloatArray, tt: FloatArray) -> list[FloatArray]:
    """B′, B″, B‴ of the batch q at tt, each ``(M, T, 2)`` (zero above the degree).

    At t = 0 and t = 1 the values are the first and last hodograph control points exactly
    (de Casteljau at t = 1 can differ from them in the last bit).
    """
    m, k, _ = q.shape
    out = []
    at0 = tt == 0.0
    at1 = tt == 1.0
    for order in (1, 2, 3):
        if order >= k:
            out.append(np.zeros((m, tt.size, 2)))
            continue
        h = derivative(q, order)
        v = evaluate(h, tt)
        if at0.any() or at1.any():
            v = v.copy()
            v[:, at0, :] = h[:, None, 0, :]
            v[:, at1, :] = h[:, None, -1, :]
        out.append(v)
    return out


def _curvature_normalized(q: FloatArray, tt: FloatArray) -> FloatArray:
    d1, d2, d3 = _derivatives(q, tt)
    c12 = cross(d1, d2)
    denom = np.sum(d1 * d1, axis=-1) ** 1.5
    regular = denom > 0.0
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        kappa = np.where(regular, c12 / np.where(regular, denom, 1.0), 0.0)
    if not regular.all():
        # B′ = 0 at t. Near t, B′ ≈ D2·h + D3·h²/2, so κ ≈ (D2 × D3) / (2 |D2|³ |h|): it grows
        # without bound with the sign of D2 × D3 on both sides, unless D2 ∥ D3 (the curve is
        # straight there, κ = 0). With D2 = 0 too the curve is P + D3 h³/6, straight: κ = 0.
        c23 = cross(d2, d3)
        n2 = np.linalg.norm(d2, axis=-1)
        n3 = np.linalg.norm(d3, axis=-1)
        turning = (n2 > 0.0) & (np.abs(c23) > _PARALLEL_TOLERANCE * n2 * n3)
        limit = np.where(turning, np.copysign(np.inf, c23), 0.0)
        kappa = np.where(regular, kappa, limit)
    return kappa


def curvature(points: ArrayLike, t: ArrayLike) -> FloatArray | float:
    """Signed curvature κ(t) of the segment(s).

    Parameters
    ----------
    points : array_like, shape (K, 2) or (M, K, 2)
    t : float or array_like, shape (T,)

    Returns
    -------
    float or ndarray
        Shape as :func:`~outlinebench.geometry.bezier.evaluate` without the last axis: a float
        for one segment and scalar t, (T,), (M,) or (M, T). Positive where the curve turns
        left (counter-clockwise in a y-up frame). Where B′(t) = 0 the one-sided limit is
        returned: ±inf when the curve turns there (a cusp, or the end of a retracted handle
        whose neighbours are not collinear), 0 when it is straight there. Lines and segments
        whose points all coincide give 0.

    Notes
    -----
    κ = (x′y″ − y′x″) / (x′² + y′²)^{3/2} (do Carmo §1-5). At t = 0 the derivatives are the
    closed forms B′(0) = n(P1 − P0), B″(0) = n(n − 1)(P2 − 2P1 + P0), which give
    κ(0) = ((n − 1)/n) · (P1 − P0) × (P2 − P1) / |P1 − P0|³ (Farin §11.2), and symmetrically
    at t = 1. The points are first moved to the origin and scaled to unit size, so the cube of
    the speed neither overflows nor underflows for coordinates between about 1e-150 and 1e150;
    κ scales as 1/size, so a segment smaller than about 1e-308 (subnormal coordinates) has a
    curvature beyond the largest double and gets ±inf.

    Examples
    --------
    >>> curvature(np.array([[0.0, 0.0], [1/3, 0.0], [2/3, 1/3], [1.0, 1.0]]), 0.0)  # y = x²
    2.0
    >>> curvature(np.zeros((4, 2)), 0.5)  # every point the same
    0.0
    """
    pts, single = as_batch(points)
    tt, scalar_t = as_params(t)
    q, scale = normalized(pts)
    kappa = _curvature_normalized(q, tt)
    # |κ| scales as 1/size: for segments below ~1e-308 it passes the largest double and is
    # ±inf, the same value as at a cusp (documented; not a warning).
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        kappa = np.where(
            scale[:, None] > 0.0, kappa / np.where(scale > 0.0, scale, 1.0)[:, None], 0.0
        )
    kappa += 0.0  # −0.0 (from a zero cross product of negative sign) reads as 0.0
    out = unbatch(kappa, single, scalar_t)
    return float(out) if np.ndim(out) == 0 else out


def _tangent_normalized(q: FloatArray, tt: FloatArray, tolerance: float) -> FloatArray:
    d = _derivatives(q, tt)
    at1 = (tt == 1.0)[None, :, None]
    result = np.zeros_like(d[0])
    found = np.zeros(result.shape[:2], dtype=bool)
    for p, dp in enumerate(d, start=1):
        norm = np.linalg.norm(dp, axis=-1)
        use = ~found & (norm > tolerance)
        if not use.any():
            continue
        # Near t, B′(t + h) ≈ D_p h^{p−1}/(p−1)!: the direction of travel is D_p after t and
        # (−1)^{p−1} D_p before it. t = 1 takes the side before; every other t the side after.
        sign = np.where(at1 & (p % 2 == 0), -1.0, 1.0)
        unit = sign * dp / np.where(norm > 0.0, norm, 1.0)[..., None]
        result = np.where(use[..., None], unit, result)
        found |= use
    return result


def unit_tangent(
    points: ArrayLike, t: ArrayLike, tolerance: float = ZERO_DERIVATIVE_TOLERANCE
) -> FloatArray:
    """Unit tangent (direction of travel) of the segment(s) at t.

    Parameters
    ----------
    points : array_like, shape (K, 2) or (M, K, 2)
    t : float or array_like, shape (T,)
    tolerance : float
        A derivative shorter than ``tolerance`` times the segment's size counts as zero
        (see :data:`ZERO_DERIVATIVE_TOLERANCE`).

    Returns
    -------
    ndarray
        Shape as :func:`~outlinebench.geometry.bezier.evaluate`: (2,), (T, 2), (M, 2) or
        (M, T, 2). (0, 0) for a segment whose control points all coincide.

    Notes
    -----
    T = B′/|B′|. Where B′ vanishes (a handle on its on-curve point, a cusp) the first
    non-zero derivative D_p gives the one-sided limit: B′(t + h) ≈ D_p h^{p−1}/(p−1)!, so the
    direction is D_p just after t and (−1)^{p−1} D_p just before. t = 1 uses the side before
    (the direction in which the segment arrives at its end), every other t the side after.

    Examples
    --------
    >>> unit_tangent(np.array([[0.0, 0.0], [0.0, 0.0], [1.0, 1.0], [2.0, 0.0]]), 0.0)
    array([0.70710678, 0.70710678])
    """
    pts, single = as_batch(points)
    tt, scalar_t = as_params(t)
    q, _ = normalized(pts)
    return unbatch(_tangent_normalized(q, tt, tolerance), single, scalar_t)


def unit_normal(
    points: ArrayLike, t: ArrayLike, tolerance: float = ZERO_DERIVATIVE_TOLERANCE
) -> FloatArray:
    """Unit normal: the unit tangent turned +90° (to the left of the direction of travel).

    With this normal, κ > 0 means the curve bends towards it. Shapes and degenerate cases as
    in :func:`unit_tangent`.
    """
    tan = unit_tangent(points, t, tolerance)
    return np.stack([-tan[..., 1], tan[..., 0]], axis=-1)


def end_tangents(
    points: ArrayLike, tolerance: float = ZERO_DERIVATIVE_TOLERANCE
) -> tuple[FloatArray, FloatArray]:
    """Unit directions of travel at the start and at the end of the segment(s).

    Parameters
    ----------
    points : array_like, shape (K, 2) or (M, K, 2)
    tolerance : float
        As in :func:`unit_tangent`.

    Returns
    -------
    (start_dir, end_dir) : ndarrays, shape (2,) or (M, 2)
        Both point along the direction of travel. A zero-length handle falls back to the
        first non-zero derivative: for a cubic with P1 = P0 the start direction is that of
        P2 − P0, with P1 = P0 = P2 that of P3 − P0. (0, 0) when all points coincide.

    Notes
    -----
    B′(0) = n(P1 − P0), B′(1) = n(Pn − Pn−1) (Farin §4.5); see :func:`unit_tangent` for the
    fallback.
    """
    pts, single = as_batch(points)
    q, _ = normalized(pts)
    k = q.shape[1]
    ends = np.zeros((2, q.shape[0], 2))  # start and end directions
    found = np.zeros((2, q.shape[0]), dtype=bool)
    for p in range(1, k):
        # D_p at t = 0 and t = 1 are the first and last hodograph points (Farin §4.5); the
        # direction of arrival at t = 1 is (−1)^{p−1} D_p, as in unit_tangent.
        h = derivative(q, p)
        dp = np.stack([h[:, 0], h[:, -1] * (-1.0 if p % 2 == 0 else 1.0)])
        norm = np.hypot(dp[..., 0], dp[..., 1])
        use = ~found & (norm > tolerance)
        ends = np.where(use[..., None], dp / np.where(norm > 0.0, norm, 1.0)[..., None], ends)
        found |= use
        if found.all():
            break
    if single:
        return ends[0, 0], ends[1, 0]
    return ends[0], ends[1]


def end_curvatures(points: ArrayLike) -> tuple[FloatArray | float, FloatArray | float]:
    """Signed curvature at the start and at the end of the segment(s).

    Returns
    -------
    (k0, k1) : floats, or ndarrays of shape (M,)

    Notes
    -----
    Closed forms (Farin §11.2): κ(0) = ((n − 1)/n) · (P1 − P0) × (P2 − P1) / |P1 − P0|³ and
    κ(1) = ((n − 1)/n) · (Pn−1 − Pn−2) × (Pn − Pn−1) / |Pn − Pn−1|³; for a cubic the factor is
    2/3. A zero-length end handle gives the limit described in :func:`curvature`.

    Examples
    --------
    >>> end_curvatures(np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0]]))
    (0.5, 0.5)
    """
    k = curvature(points, np.array([0.0, 1.0]))
    k0, k1 = k[..., 0], k[..., 1]
    if np.ndim(k0) == 0:
        return float(k0), float(k1)
    return k0, k1


def _real_roots_in(coeffs: FloatArray, lo: float, hi: float, imag_tol: float = 1e-9) -> FloatArray:
    """Real roots of a polynomial (lowest power first) inside [lo, hi], sorted."""
    c = np.trim_zeros(np.asarray(coeffs, dtype=np.float64), "b")
    if c.size <= 1:
        return np.empty(0)
    r = P.polyroots(c)
    r = r[np.abs(r.imag) <= imag_tol * np.maximum(1.0, np.abs(r.real))].real
    return np.sort(r[(r >= lo) & (r <= hi)])


def _one_segment(points: ArrayLike, name: str) -> FloatArray:
    """``(1, K, 2)`` view of one segment; a batch is refused (its answers would be lost)."""
    pts, single = as_batch(points)
    if not single:
        raise InvalidGeometryError(f"{name} takes one segment (K, 2), got shape {pts.shape}")
    return pts


def inflections(points: ArrayLike) -> FloatArray:
    """Parameters in (0, 1) where the curvature of one segment changes sign.

    Parameters
    ----------
    points : array_like, shape (K, 2)

    Returns
    -------
    ndarray, shape (N,), sorted
        At most 2 for a cubic; always empty for lines and quadratics (a quadratic's
        B′ × B″ is constant). Double roots (a cusp, or curvature touching zero without
        changing sign) are not inflections and are left out; so are straight segments.

    Raises
    ------
    InvalidGeometryError
        ``points`` is a batch (M, K, 2): each segment has its own number of answers, so
        call once per segment.

    Notes
    -----
    With a = P1 − P0, b = P2 − 2P1 + P0, c = P3 − 3P2 + 3P1 − P0 one has B′/3 = a + 2bt + ct²
    and B″/6 = b + ct, so B′ × B″ ∝ (b × c) t² + (a × c) t + (a × b) (Stone & DeRose 1989).
    Its simple roots in (0, 1) are returned.
    """
    pts = _one_segment(points, "inflections")
    q, scale = normalized(pts)
    q = q[0]
    if q.shape[0] < 4 or scale[0] == 0.0:
        return np.empty(0)
    a = q[1] - q[0]
    b = q[2] - 2.0 * q[1] + q[0]
    c = q[3] - 3.0 * q[2] + 3.0 * q[1] - q[0]
    qa, qb, qc = cross(b, c), cross(a, c), cross(a, b)  # qa t² + qb t + qc
    big = max(abs(qa), abs(qb), abs(qc))
    if big <= _PARALLEL_TOLERANCE:
        return np.empty(0)  # straight: every control point on one line
    qa, qb, qc = qa / big, qb / big, qc / big
    if abs(qa) <= 1e-14:
        roots = np.array([-qc / qb]) if abs(qb) > 1e-14 else np.empty(0)
    else:
        disc = qb * qb - 4.0 * qa * qc
        if disc <= 1e-14 * max(qb * qb, abs(4.0 * qa * qc)):
            return np.empty(0)
        # Stable quadratic formula (Numerical Recipes §5.6): no cancellation in either root.
        s = -0.5 * (qb + np.copysign(np.sqrt(disc), qb))
        roots = np.array([s / qa, qc / s]) if s != 0.0 else np.array([0.0])
    roots = np.sort(roots[(roots > 0.0) & (roots < 1.0)])
    return roots


def cusps(points: ArrayLike, tolerance: float | None = None) -> FloatArray:
    """Parameters in (0, 1) where one segment turns back on itself (a cusp).

    Parameters
    ----------
    points : array_like, shape (K, 2)
    tolerance : float, optional
        Largest tip radius, in the segment's coordinate units, still called a cusp. The tip
        radius at a local minimum of the speed |B′| is |B′|²/|B″| (there B′ ⊥ B″, so it is the
        radius of curvature). ``None`` means :data:`CUSP_RELATIVE_TOLERANCE` times the
        segment's size, which finds exact cusps at any scale.

    Returns
    -------
    ndarray, shape (N,), sorted
        Empty for lines. A collinear segment that reverses along its line has a cusp (tip
        radius 0). Ends are not reported: a zero-length end handle is a degenerate handle,
        not a turn-back inside the segment.

    Raises
    ------
    InvalidGeometryError
        ``points`` is a batch (M, K, 2): call once per segment.

    Notes
    -----
    Local minima of the speed are the roots of d|B′|²/dt = 2 B′·B″ (a cubic polynomial for a
    cubic segment) with (B′·B″)′ = |B″|² + B′·B‴ > 0, found as eigenvalues of the companion
    matrix (numpy ``polyroots``) in normalized coordinates. A point where B′ = 0 exactly
    has tip radius 0; one where B′ = B″ = 0 (the curve P + D3 h³/6) does not turn back and is
    skipped.
    """
    pts = _one_segment(points, "cusps")
    q, scale = normalized(pts)
    q = q[0]
    size = float(scale[0])
    if q.shape[0] < 3 or size == 0.0:
        return np.empty(0)
    rel_tol = CUSP_RELATIVE_TOLERANCE if tolerance is None else tolerance / size
    c = power_coefficients(q)
    d1 = P.polyder(c, axis=0)
    d2 = P.polyder(d1, axis=0)
    g = P.polyadd(P.polymul(d1[:, 0], d2[:, 0]), P.polymul(d1[:, 1], d2[:, 1]))
    cand = _real_roots_in(g, 0.0, 1.0, imag_tol=1e-7)
    found = []
    for t in cand:
        if not 0.0 < t < 1.0:
            continue
        v1 = P.polyval(t, d1)
        v2 = P.polyval(t, d2)
        n2 = float(np.hypot(*v2))
        if n2 <= _PARALLEL_TOLERANCE:
            continue
        v3 = P.polyval(t, P.polyder(d2, axis=0)) if d2.shape[0] > 1 else np.zeros(2)
        if n2 * n2 + float(v1 @ v3) <= 0.0:
            continue  # a maximum of the speed, not a minimum
        radius = float(v1 @ v1) / n2
        if radius <= rel_tol:
            found.append(float(t))
    if not found:
        return np.empty(0)
    out = np.unique(np.round(np.array(found), 12))
    return out
