"""Intersections of two Bézier segments, and self-intersections of one cubic.

References
----------
T. W. Sederberg and T. Nishita, "Curve intersection using Bézier clipping", CAD 22(9), 1990,
§2 (subdivision with convex-hull culling; a segment lies inside its control points' box).
J. M. Lane and R. F. Riesenfeld, "A theoretical development for the computer generation and
display of piecewise polynomial surfaces", IEEE PAMI 2(1), 1980 (subdivision termination).
M. Stone and T. DeRose, "A geometric characterization of parametric cubic curves", ACM TOG
8(3), 1989 (the self-intersection of a cubic in closed form).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.geometry._batch import cross, horner, segment_scale
from outlinebench.geometry.bezier import evaluate, power_coefficients, to_cubic

__all__ = [
    "INTERSECTION_TOLERANCE",
    "intersections",
    "intersections_batch",
    "self_intersections",
    "line_intersection",
]

FloatArray = NDArray[np.float64]

# Largest distance |A(ta) − B(tb)| of a reported intersection, as a fraction of the size of
# the two segments together (the larger side of the box around all their control points).
# Newton polishing usually brings it to ~1e-16; 1e-9 leaves room for tangential crossings,
# where Newton converges only linearly.
INTERSECTION_TOLERANCE = 1e-9

# A piece whose control points lie within this fraction of the joint size from its chord is
# treated as straight for the first guess (the guess is then polished by Newton's method).
_FLAT = 1e-6
# Two answers closer than this in both parameters are one intersection (at least; see
# intersections(): √tolerance, since where two curves touch tangentially a distance
# tolerance ε leaves the contact undetermined by ~√ε along them).
_SAME_PARAM = 1e-7
# More live pairs than this after subdivision means the segments share a stretch (overlap):
# transversal crossings of two cubics (at most 9) never keep this many boxes alive.
_MAX_PAIRS = 4096
_MAX_DEPTH = 64


def line_intersection(
    a: ArrayLike, b: ArrayLike, tolerance: float = INTERSECTION_TOLERANCE
) -> FloatArray:
    """Intersections of two straight segments in closed form.

    Parameters
    ----------
    a, b : array_like, shape (2, 2)
    tolerance : float
        As :data:`INTERSECTION_TOLERANCE`: relative to the joint size; decides parallel and
        touching cases.

    Returns
    -------
    ndarray, shape (N, 2)
        (ta, tb) pairs. N is 0 or 1 for lines that cross or touch; for collinear segments
        that overlap, the two ends of the shared stretch (a single pair if they only touch).

    Notes
    -----
    A0 + s dA = B0 + u dB is solved by Cramer's rule: s = (e × dB)/(dA × dB),
    u = (e × dA)/(dA × dB) with e = B0 − A0.
    """
    a = np.asarray(a, dtype=np.float64)
    b = np.asarray(b, dtype=np.float64)
    origin = a[0].copy()
    size = float(segment_scale(np.concatenate([a, b])[None])[0])
    if size == 0.0:
        return np.array([[0.0, 0.0]])
    a0, b0 = (a - origin) / size, (b - origin) / size
    da, db, e = a0[1] - a0[0], b0[1] - b0[0], b0[0] - a0[0]
    den = float(cross(da, db))
    la, lb = float(np.hypot(*da)), float(np.hypot(*db))
    if abs(den) > tolerance * max(la * lb, 1e-300):
        s = float(cross(e, db)) / den
        u = float(cross(e, da)) / den
        slack_a = tolerance / la if la > 0 else 0.0
        slack_b = tolerance / lb if lb > 0 else 0.0
        if -slack_a <= s <= 1 + slack_a and -slack_b <= u <= 1 + slack_b:
            return np.array([[min(max(s, 0.0), 1.0), min(max(u, 0.0), 1.0)]])
        return np.empty((0, 2))
    # Parallel (or a zero-length segment): report end points lying on the other segment.
    return _endpoint_contacts(a0[None], b0[None], tolerance)


def _project(seg: FloatArray, p: FloatArray) -> tuple[float, float]:
    from outlinebench.geometry.nearest import nearest_point

    t, d, _ = nearest_point(seg, p)
    return t, d


def _endpoint_contacts(a: FloatArray, b: FloatArray, tolerance: float) -> FloatArray:
    """(ta, tb) for every end point of one segment lying on the other (normalized input)."""
    a, b = a[0], b[0]
    out = []
    for ta, p in ((0.0, a[0]), (1.0, a[-1])):
        tb, d = _project(b, p)
        if d <= tolerance:
            out.append((ta, tb))
    for tb, p in ((0.0, b[0]), (1.0, b[-1])):
        ta, d = _project(a, p)
        if d <= tolerance:
            out.append((ta, tb))
    return _dedupe(np.array(out).reshape(-1, 2), None, None)


def _dedupe(
    cands: FloatArray,
    a: FloatArray | None,
    b: FloatArray | None,
    same: float = _SAME_PARAM,
    limit: int | None = None,
) -> FloatArray:
    """One answer per intersection: candidates within ``same`` in both parameters merge.

    The candidate with the smallest residual |A(s) − B(u)| of each group is kept (exact end
    point matches have residual 0 and win). Each kept answer removes its neighbours in one
    numpy step, so the cost is (answers × candidates), not candidates². With ``limit``, the
    search stops as soon as more than ``limit`` answers are kept (the caller then knows the
    segments overlap) and returns those.
    """
    if cands.shape[0] == 0:
        return cands.reshape(0, 2)
    if a is not None:
        res = np.linalg.norm(evaluate(a, cands[:, 0]) - evaluate(b, cands[:, 1]), axis=-1)
    else:
        res = np.zeros(cands.shape[0])
    rest = cands[np.argsort(res, kind="stable")]
    kept: list[FloatArray] = []
    while rest.shape[0]:
        best = rest[0]
        kept.append(best)
        if limit is not None and len(kept) > limit:
            break
        rest = rest[np.abs(rest - best).max(axis=1) > same]
    out = np.array(kept)
    return out[np.lexsort((out[:, 1], out[:, 0]))]


def _poly(c: FloatArray, t: FloatArray) -> FloatArray:
    """Σ c_k t^k for monomial coefficients ``(k, 2)`` at ``(N,)`` parameters → ``(N, 2)``."""
    return horner(c[:, None, :], t[:, None])


def _newton(a, b, s, u, iterations=40):
    """Polish A(s) = B(u) by Newton's method on the 2×2 system, kept inside [0, 1]².

    Stops when no parameter moves by more than a few ulps. The inputs are unit-sized (see
    callers), where the monomial form is accurate to ~1e-15.
    """
    ca, cb = power_coefficients(a), power_coefficients(b)
    dca = ca[1:] * np.arange(1, ca.shape[0])[:, None]
    dcb = cb[1:] * np.arange(1, cb.shape[0])[:, None]
    stop = 4.0 * np.finfo(np.float64).eps
    for _ in range(iterations):
        r = _poly(ca, s) - _poly(cb, u)  # (N, 2)
        ja = _poly(dca, s)
        jb = -_poly(dcb, u)
        # Levenberg–Marquardt step (JᵀJ + λI) δ = Jᵀr with a tiny λ: Newton's step where the
        # Jacobian [A′, −B′] is regular, a bounded step where the curves are tangent (there
        # JᵀJ is singular and plain Newton stalls). Nocedal & Wright §10.3.
        g11 = np.sum(ja * ja, axis=1)
        g22 = np.sum(jb * jb, axis=1)
        g12 = np.sum(ja * jb, axis=1)
        lam = 1e-14 * (g11 + g22) + 1e-300
        g11, g22 = g11 + lam, g22 + lam
        r1 = np.sum(ja * r, axis=1)
        r2 = np.sum(jb * r, axis=1)
        det = g11 * g22 - g12 * g12
        det = np.where(det > 0.0, det, np.inf)
        ds = (g22 * r1 - g12 * r2) / det
        du = (g11 * r2 - g12 * r1) / det
        s_new = np.clip(s - ds, 0.0, 1.0)
        u_new = np.clip(u - du, 0.0, 1.0)
        moved = max(np.abs(s_new - s).max(initial=0.0), np.abs(u_new - u).max(initial=0.0))
        s, u = s_new, u_new
        if moved <= stop:
            break
    return s, u


def _piece_flat(p: FloatArray) -> FloatArray:
    """Largest distance of the control points from the chord, per piece (N,)."""
    chord = p[:, -1] - p[:, 0]
    n = np.linalg.norm(chord, axis=-1)
    rel = p - p[:, :1]
    dist_line = np.abs(cross(rel, chord[:, None, :])) / np.where(n > 0, n, 1.0)[:, None]
    dist_pt = np.linalg.norm(rel, axis=-1)
    d = np.where(n[:, None] > 0, dist_line, dist_pt)
    # a handle beyond the chord's ends is not flat either
    proj = np.sum(rel * chord[:, None, :], axis=-1) / np.where(n > 0, n * n, 1.0)[:, None]
    beyond = (proj < -1e-12) | (proj > 1 + 1e-12)
    d = np.where(beyond, np.maximum(d, dist_pt), d)
    return d.max(axis=1)


def _on_one_line(a: FloatArray, b: FloatArray, tolerance: float) -> bool:
    """Whether every control point of both (unit-sized) segments lies on one line.

    Each segment must be flat in the sense of :func:`_piece_flat` (no handle beyond its
    chord's ends) within ``tolerance`` and longer than ``tolerance``; the line is the one
    through the two end points farthest apart, and every control point must lie within
    ``tolerance`` of it.
    """
    if _piece_flat(a[None])[0] > tolerance or _piece_flat(b[None])[0] > tolerance:
        return False
    if min(np.ptp(a, axis=0).max(), np.ptp(b, axis=0).max()) <= tolerance:
        return False  # a segment shrunk to a point meets the other once, not along a stretch
    ends = np.stack([a[0], a[-1], b[0], b[-1]])
    gaps = np.linalg.norm(ends[:, None, :] - ends[None, :, :], axis=-1)
    i, j = np.unravel_index(int(np.argmax(gaps)), gaps.shape)
    direction = ends[j] - ends[i]
    length = float(np.hypot(*direction))
    if length == 0.0:
        return True
    dist = np.abs(cross(np.concatenate([a, b]) - ends[i], direction)) / length
    return bool(dist.max() <= tolerance)


def intersections(
    a: ArrayLike, b: ArrayLike, tolerance: float = INTERSECTION_TOLERANCE
) -> FloatArray:
    """Parameters where two segments meet.

    Parameters
    ----------
    a, b : array_like, shape (Ka, 2) and (Kb, 2)
        Segments of any degree 1 … 3.
    tolerance : float
        Largest distance |A(ta) − B(tb)| reported, as a fraction of the two segments' joint
        size (see :data:`INTERSECTION_TOLERANCE`).

    Returns
    -------
    ndarray, shape (N, 2)
        (ta, tb) pairs sorted by ta, each intersection once (shared end points included).
        Segments that share a whole stretch (overlap, e.g. collinear lines or a segment and
        its own sub-segment) have infinitely many common points: the two ends of each
        shared stretch are returned instead, so the answer stays finite.

    Notes
    -----
    Subdivision with box culling (Sederberg & Nishita 1990, §2), run on all live pairs at
    once: each segment lies in the box of its control points, so pairs of pieces whose boxes
    are apart are dropped and the rest are halved until both pieces are straight within
    1e-6 of the joint size. The crossing of their chords is then polished by Newton's
    method on A(s) − B(u) = 0 with the original segments (a Levenberg–Marquardt step where
    they touch tangentially), and answers closer than √tolerance (3e-5 by default) in both
    parameters are merged: near a tangential contact the points within the distance
    tolerance spread over ~√tolerance of parameter. Coinciding end points (joins) are
    reported exactly. More answers than Bézout's bound deg(a)·deg(b), or more
    live pairs than subdivision of crossings can produce, means a shared stretch. Two lines
    use :func:`line_intersection`; two straight segments (any degree) on one line are
    answered by the end points of each lying on the other, before any subdivision. Work is
    done after moving and scaling both segments together to unit size.
    """
    pa = np.asarray(a, dtype=np.float64)
    pb = np.asarray(b, dtype=np.float64)
    return intersections_batch([pa], [pb], tolerance)[0]


def _newton_batch(a, b, s, u, iterations=40):
    """:func:`_newton` with one pair of (unit-sized) segments per candidate.

    ``a`` (N, Ka, 2), ``b`` (N, Kb, 2), parameters (N,). A candidate stops when neither of
    its parameters moves by more than a few ulps; the others go on.
    """
    ca, cb = power_coefficients(a), power_coefficients(b)
    dca = ca[:, 1:] * np.arange(1, ca.shape[1])[None, :, None]
    dcb = cb[:, 1:] * np.arange(1, cb.shape[1])[None, :, None]
    ca, cb = np.moveaxis(ca, 1, 0), np.moveaxis(cb, 1, 0)
    dca, dcb = np.moveaxis(dca, 1, 0), np.moveaxis(dcb, 1, 0)
    stop = 4.0 * np.finfo(np.float64).eps
    s, u = s.copy(), u.copy()
    act = np.arange(s.shape[0])
    for _ in range(iterations):
        if act.shape[0] == 0:
            break
        sa, ua = s[act], u[act]
        sc, uc = sa[:, None], ua[:, None]
        r = horner(ca[:, act], sc) - horner(cb[:, act], uc)
        ja = horner(dca[:, act], sc)
        jb = -horner(dcb[:, act], uc)
        # Levenberg–Marquardt step, as in _newton (Nocedal & Wright §10.3).
        g11 = ja[:, 0] * ja[:, 0] + ja[:, 1] * ja[:, 1]
        g22 = jb[:, 0] * jb[:, 0] + jb[:, 1] * jb[:, 1]
        g12 = ja[:, 0] * jb[:, 0] + ja[:, 1] * jb[:, 1]
        lam = 1e-14 * (g11 + g22) + 1e-300
        g11, g22 = g11 + lam, g22 + lam
        r1 = ja[:, 0] * r[:, 0] + ja[:, 1] * r[:, 1]
        r2 = jb[:, 0] * r[:, 0] + jb[:, 1] * r[:, 1]
        det = g11 * g22 - g12 * g12
        det = np.where(det > 0.0, det, np.inf)
        s_new = np.clip(sa - (g22 * r1 - g12 * r2) / det, 0.0, 1.0)
        u_new = np.clip(ua - (g11 * r2 - g12 * r1) / det, 0.0, 1.0)
        moved = np.maximum(np.abs(s_new - sa), np.abs(u_new - ua))
        s[act], u[act] = s_new, u_new
        act = act[moved > stop]
    return s, u


def _evaluate_rows(p: FloatArray, t: FloatArray) -> FloatArray:
    """De Casteljau evaluation of one segment per row: ``p`` (N, K, 2) at ``t`` (N,)."""
    w = p
    tc = t[:, None, None]
    for _ in range(p.shape[1] - 1):
        w = (1.0 - tc) * w[:, :-1] + tc * w[:, 1:]
    return w[:, 0]


def _split_half(p: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Halves of every piece ``(N, K, 2)`` at t = ½ by de Casteljau (Farin §4.4)."""
    k = p.shape[1]
    left = np.empty_like(p)
    right = np.empty_like(p)
    left[:, 0] = p[:, 0]
    right[:, -1] = p[:, -1]
    w = p
    for i in range(1, k):
        w = 0.5 * w[:, :-1] + 0.5 * w[:, 1:]
        left[:, i] = w[:, 0]
        right[:, k - 1 - i] = w[:, -1]
    return left, right


def _subdivide_group(a0: FloatArray, b0: FloatArray, tolerance: float):
    """Subdivision with box culling for many pairs of one degree pair at once.

    ``a0`` (P, Ka, 2), ``b0`` (P, Kb, 2), unit-sized. Returns (owner, s, u) of the first
    guesses and a boolean (P,) flag for pairs that kept more than ``_MAX_PAIRS`` live pieces
    (a shared stretch).
    """
    n_pairs = a0.shape[0]
    overlap = np.zeros(n_pairs, dtype=bool)
    pa, pb = a0, b0
    owner = np.arange(n_pairs)
    ra0 = np.zeros(n_pairs)
    rb0 = np.zeros(n_pairs)
    width = 1.0
    found_o: list[NDArray[np.int64]] = []
    found_s: list[FloatArray] = []
    found_u: list[FloatArray] = []
    pad = tolerance
    for _ in range(_MAX_DEPTH):
        if pa.shape[0] == 0:
            break
        if pa.shape[0] > _MAX_PAIRS:
            live = np.bincount(owner, minlength=n_pairs)
            big = live > _MAX_PAIRS
            if big.any():
                overlap |= big
                keep = ~big[owner]
                pa, pb, owner, ra0, rb0 = pa[keep], pb[keep], owner[keep], ra0[keep], rb0[keep]
                if pa.shape[0] == 0:
                    break
        amin, amax = pa.min(axis=1), pa.max(axis=1)
        bmin, bmax = pb.min(axis=1), pb.max(axis=1)
        hit = np.all((amin <= bmax + pad) & (bmin <= amax + pad), axis=1)
        pa, pb, owner, ra0, rb0 = pa[hit], pb[hit], owner[hit], ra0[hit], rb0[hit]
        if pa.shape[0] == 0:
            break
        flat = (_piece_flat(pa) <= _FLAT) & (_piece_flat(pb) <= _FLAT)
        if flat.any():
            fa, fb = pa[flat], pb[flat]
            da, db = fa[:, -1] - fa[:, 0], fb[:, -1] - fb[:, 0]
            e = fb[:, 0] - fa[:, 0]
            den = cross(da, db)
            ok = np.abs(den) > 1e-300
            # Nearly parallel chords (the curves touch): start from the middle of piece a
            # and its projection on chord b.
            ok &= np.abs(den) > 1e-9 * np.linalg.norm(da, axis=1) * np.linalg.norm(db, axis=1)
            nb2 = np.sum(db * db, axis=1)
            proj = np.sum((fa[:, 0] + 0.5 * da - fb[:, 0]) * db, axis=1) / np.where(
                nb2 > 0.0, nb2, np.inf
            )
            with np.errstate(divide="ignore", invalid="ignore"):
                s = np.where(ok, cross(e, db) / np.where(ok, den, 1.0), 0.5)
                u = np.where(ok, cross(e, da) / np.where(ok, den, 1.0), proj)
            s, u = np.clip(s, 0.0, 1.0), np.clip(u, 0.0, 1.0)
            found_o.append(owner[flat])
            found_s.append(ra0[flat] + s * width)
            found_u.append(rb0[flat] + u * width)
            keep = ~flat
            pa, pb, owner, ra0, rb0 = pa[keep], pb[keep], owner[keep], ra0[keep], rb0[keep]
            if pa.shape[0] == 0:
                break
        # Halve both pieces: four pairs.
        al, ar = _split_half(pa)
        bl, br = _split_half(pb)
        width *= 0.5
        pa = np.concatenate([al, al, ar, ar])
        pb = np.concatenate([bl, br, bl, br])
        owner = np.concatenate([owner, owner, owner, owner])
        rar0 = ra0 + width
        rbr0 = rb0 + width
        ra0 = np.concatenate([ra0, ra0, rar0, rar0])
        rb0 = np.concatenate([rb0, rbr0, rb0, rbr0])
    if found_o:
        return np.concatenate(found_o), np.concatenate(found_s), np.concatenate(found_u), overlap
    return np.empty(0, dtype=np.int64), np.empty(0), np.empty(0), overlap


def intersections_batch(
    firsts: list[FloatArray], seconds: list[FloatArray], tolerance: float = INTERSECTION_TOLERANCE
) -> list[FloatArray]:
    """:func:`intersections` of many pairs of segments at once.

    Parameters
    ----------
    firsts, seconds : lists of array_like, shapes (Ka, 2) and (Kb, 2)
        Pair i is (firsts[i], seconds[i]).
    tolerance : float
        As for :func:`intersections`.

    Returns
    -------
    list of ndarray, shape (N_i, 2)
        The answer of :func:`intersections` for each pair.

    Notes
    -----
    The same method as :func:`intersections` (Sederberg & Nishita 1990, §2, then Newton's
    method), but the subdivision runs on the live pieces of all pairs of the same degrees in
    one set of numpy steps, and Newton's method polishes all first guesses together, so the
    cost per pair is a few array rows instead of a few hundred small numpy calls.
    """
    n = len(firsts)
    out: list[FloatArray | None] = [None] * n
    norm_a: dict[int, FloatArray] = {}
    norm_b: dict[int, FloatArray] = {}
    groups: dict[tuple[int, int], list[int]] = {}
    for i in range(n):
        a = np.asarray(firsts[i], dtype=np.float64)
        b = np.asarray(seconds[i], dtype=np.float64)
        if a.shape[0] == 2 and b.shape[0] == 2:
            out[i] = line_intersection(a, b, tolerance)
            continue
        both = np.concatenate([a, b])
        lo, hi = both.min(axis=0), both.max(axis=0)
        slack = tolerance * float((hi - lo).max())
        if np.any(a.min(axis=0) > b.max(axis=0) + slack) or np.any(
            b.min(axis=0) > a.max(axis=0) + slack
        ):
            out[i] = np.empty((0, 2))  # control-point boxes apart: the segments cannot meet
            continue
        size = float(segment_scale(both[None])[0])
        if size == 0.0:
            out[i] = np.array([[0.0, 0.0]])
            continue
        a0, b0 = (a - lo) / size, (b - lo) / size
        if _on_one_line(a0, b0, tolerance):
            # Both straight on one line: they overlap along a stretch, touch, or miss; the
            # ends of each lying on the other say which (subdivision would see one flat pair
            # with parallel chords and could report only one point).
            out[i] = _endpoint_contacts(a0[None], b0[None], tolerance)
            continue
        norm_a[i], norm_b[i] = a0, b0
        groups.setdefault((a.shape[0], b.shape[0]), []).append(i)
    if groups:
        # One batch for all degrees: lines and quadratics are elevated exactly to cubics
        # (Farin §6.1; the same curves, so the same intersections).
        idx = [i for members in groups.values() for i in members]
        ga = to_cubic(np.stack([to_cubic(norm_a[i]) for i in idx]))
        gb = to_cubic(np.stack([to_cubic(norm_b[i]) for i in idx]))
        owner, s, u, overlap = _subdivide_group(ga, gb, tolerance)
        if s.shape[0]:
            s, u = _newton_batch(ga[owner], gb[owner], s, u)
            res = np.linalg.norm(
                _evaluate_rows(ga[owner], s) - _evaluate_rows(gb[owner], u), axis=-1
            )
            good = res <= tolerance
            owner, s, u = owner[good], s[good], u[good]
        order = np.argsort(owner, kind="stable")
        owner, s, u = owner[order], s[order], u[order]
        bounds = np.searchsorted(owner, np.arange(len(idx) + 1))
        for k, i in enumerate(idx):
            a0, b0 = norm_a[i], norm_b[i]
            if overlap[k]:
                out[i] = _endpoint_contacts(a0[None], b0[None], tolerance)
                continue
            out[i] = _finish(
                a0, b0, s[bounds[k] : bounds[k + 1]], u[bounds[k] : bounds[k + 1]], tolerance
            )
    return [o if o is not None else np.empty((0, 2)) for o in out]


def _finish(a0: FloatArray, b0: FloatArray, s: FloatArray, u: FloatArray, tolerance: float):
    """Coinciding end points, merging of polished guesses and the Bézout check of one pair."""
    # End points that coincide (a join between consecutive segments) are reported exactly.
    ends = [
        (ta, tb)
        for ta in (0.0, 1.0)
        for tb in (0.0, 1.0)
        if np.hypot(*(a0[0 if ta == 0.0 else -1] - b0[0 if tb == 0.0 else -1])) <= tolerance
    ]
    if s.shape[0] == 0 and not ends:
        return np.empty((0, 2))
    cands = np.concatenate([np.array(ends).reshape(-1, 2), np.stack([s, u], axis=1)])
    bound = (a0.shape[0] - 1) * (b0.shape[0] - 1)
    out = _dedupe(cands, a0, b0, max(_SAME_PARAM, float(np.sqrt(tolerance))), limit=bound)
    if out.shape[0] > bound:
        # More common points than Bézout's bound deg(a)·deg(b) allows two different
        # polynomial curves: they share a stretch.
        return _endpoint_contacts(a0[None], b0[None], tolerance)
    return out


def self_intersections(points: ArrayLike, tolerance: float = INTERSECTION_TOLERANCE) -> FloatArray:
    """Parameter pairs (t1 < t2) where one segment crosses itself.

    Parameters
    ----------
    points : array_like, shape (K, 2)
    tolerance : float
        As :data:`INTERSECTION_TOLERANCE`; also the smallest parameter gap t2 − t1 counted
        (a cusp is the limit t1 = t2 and is not a self-intersection).

    Returns
    -------
    ndarray, shape (N, 2), N ≤ 1
        Lines and quadratics never cross themselves. A cubic crosses itself at most once (a
        loop). A segment that runs back over itself along a line overlaps itself along a
        stretch; that is a cusp (see :func:`~outlinebench.geometry.curvature.cusps`) and is
        not reported here.

    Notes
    -----
    With B(t) = c3 t³ + c2 t² + c1 t + c0, B(s) = B(t) for s ≠ t means
    c3 (σ² − π) + c2 σ + c1 = 0 with σ = s + t, π = s t (divide B(s) − B(t) by s − t). The
    cross product with c3 gives σ = −(c3 × c1)/(c3 × c2); the dot product with c3 then gives
    π = σ² + (c3·c2 σ + c3·c1)/|c3|²; s and t are the roots of x² − σx + π (Stone & DeRose
    1989 treat the same loop condition geometrically). The pair is polished by Newton's
    method on B(s) − B(t) = 0.
    """
    pts = np.asarray(points, dtype=np.float64)
    if pts.shape[0] < 4:
        return np.empty((0, 2))
    size = float(segment_scale(pts[None])[0])
    if size == 0.0:
        return np.empty((0, 2))
    q = (pts - pts[0]) / size
    c = power_coefficients(q)
    c1, c2, c3 = c[1], c[2], c[3]
    k32 = float(cross(c3, c2))
    n3 = float(c3 @ c3)
    if abs(k32) <= 1e-14 or n3 <= 1e-28:
        return np.empty((0, 2))
    sigma = -float(cross(c3, c1)) / k32
    pi = sigma * sigma + (float(c3 @ c2) * sigma + float(c3 @ c1)) / n3
    disc = sigma * sigma - 4.0 * pi
    if disc <= 0.0:
        return np.empty((0, 2))
    r = np.sqrt(disc)
    t1, t2 = (sigma - r) / 2.0, (sigma + r) / 2.0
    if t2 - t1 <= tolerance or t1 < -tolerance or t2 > 1.0 + tolerance:
        return np.empty((0, 2))
    s, u = _newton(q, q, np.array([max(t1, 0.0)]), np.array([min(t2, 1.0)]), iterations=8)
    s, u = float(s[0]), float(u[0])
    if u - s <= tolerance:
        return np.empty((0, 2))
    res = float(np.linalg.norm(evaluate(q, s) - evaluate(q, u)))
    if res > tolerance:
        return np.empty((0, 2))
    return np.array([[s, u]])
