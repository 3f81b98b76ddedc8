"""Trimming the raw offset of a contour: cut at its self-intersections, keep what lies far enough.

The raw offset (fitted cubics, round joins) of a contour crosses itself where the contour is
concave or narrower than the tool. :func:`_trim` cuts it at those crossings and at the places
where its distance to the contour crosses |d| − ε, keeps the pieces at least that far away
(and on the offset's side), and :func:`_chain` joins the kept pieces end to start into
contours, removing spurs and the small loops near cusps. The power-basis helpers
:func:`_coef` and :func:`_eval` shared with :mod:`outlinebench.geometry.offset` live here.

References
----------
- W. Tiller and E. G. Hanson, "Offsets of two-dimensional profiles", *IEEE Computer Graphics
  and Applications* 4(9), 1984, 36–46 (trimming the raw offset at its self-intersections).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from outlinebench.geometry.bezier import split_many
from outlinebench.geometry.flatten import flatten_contours

FloatArray = NDArray[np.float64]


def _coef(c: FloatArray) -> FloatArray:
    p0, p1, p2, p3 = (c[..., i, :] for i in range(4))
    return np.stack([p0, 3 * (p1 - p0), 3 * (p2 - 2 * p1 + p0), p3 - 3 * p2 + 3 * p1 - p0], axis=-2)


def _eval(coef: FloatArray, t: FloatArray):
    """Point, first and second derivative for rows coef (R, 4, 2) at t (R, S)."""
    tt = t[..., None]
    c0, c1, c2, c3 = (coef[:, None, i, :] for i in range(4))
    p = ((c3 * tt + c2) * tt + c1) * tt + c0
    d1 = (3 * c3 * tt + 2 * c2) * tt + c1
    d2 = 6 * c3 * tt + 2 * c2
    return p, d1, d2


def _trim(
    raw: FloatArray,
    rev,
    closed: bool,
    orig: FloatArray,
    r: float,
    tol: float,
    inward: bool = False,
):
    """Cut the raw offset at its self-intersections and keep what lies ≥ r − ε away.

    ``rev`` (R,) flags the raw pieces that run backwards (1 + eκ < 0); the pieces cut from
    them keep the flag (see :func:`_chain`). For a closed contour a kept piece must also lie
    on the offset's side: inside the contour for an inward offset, outside for an outward one
    (a piece of the offset of one wall can reach past the opposite wall of a part narrower
    than the tool, and then again lie ≥ r away from everything)."""
    import shapely

    # flatten the raw chain with a record of which raw piece each chord belongs to
    polys = flatten_contours([([c], False) for c in raw], tol / 4)
    pts = [p[:-1] for p in polys]
    owner = np.concatenate([np.full(len(p), i) for i, p in enumerate(pts)])
    chain = np.vstack([*pts, raw[-1][3][None]])
    line = shapely.LineString(chain)
    ref = shapely.LineString(np.vstack(flatten_contours([(list(orig), False)], tol / 8)))
    noded = shapely.unary_union(line)
    # intersection points: ends of noded pieces that are not ends of the raw chain
    cut_pts = []
    for g in getattr(noded, "geoms", [noded]):
        cs = np.asarray(g.coords)
        cut_pts.extend([cs[0], cs[-1]])
    cut_pts = np.array(cut_pts).reshape(-1, 2)
    # parameters on the raw pieces: nearest chord, then Newton on the cubic; the two pieces
    # that cross there are then solved together (A(ta) = B(tb)) so that both are cut at the
    # same point and the kept parts meet exactly
    splits: dict[int, list[float]] = {}
    if len(cut_pts):
        tree = shapely.STRtree(shapely.linestrings(np.stack([chain[:-1], chain[1:]], axis=1)))
        hits = tree.query(shapely.points(cut_pts), predicate="dwithin", distance=tol * 1e-6)
        at: dict[int, list[tuple[int, float]]] = {}
        hit_k = owner[hits[1]]
        hit_t = _project_many(raw[hit_k], cut_pts[hits[0]]) if len(hit_k) else []
        for pi, k, t in zip(
            hits[0].tolist(), hit_k.tolist(), np.asarray(hit_t).tolist(), strict=True
        ):
            locs = at.setdefault(int(pi), [])
            if all(k != k2 or abs(t - t2) > 1e-7 for k2, t2 in locs):
                locs.append((k, t))
        for locs in at.values():
            refined = list(locs)
            for j in range(1, len(locs)):
                ka, ta = locs[0]
                kb, tb = locs[j]
                ra, rb = _refine_crossing(raw[ka], raw[kb], ta, tb)
                if ra is not None:
                    refined[0] = (ka, ra)
                    refined[j] = (kb, rb)
            for k, t in refined:
                if 1e-9 < t < 1 - 1e-9:
                    splits.setdefault(k, []).append(t)
    pieces: list[FloatArray] = []
    prev: list[bool] = []
    for k, c in enumerate(raw):
        if k in splits:
            ts = np.sort(np.array(splits[k]))
            ts = ts[np.concatenate([[True], np.diff(ts) > 1e-12])]
            parts = split_many(c, ts)
        else:
            parts = [c]
        pieces.extend(parts)
        prev.extend([bool(rev[k])] * len(parts))
    pieces_arr = np.array(pieces)
    prev_arr = np.array(prev, dtype=bool)
    thr = r - max(tol, 1e-9 * r) * 1.5
    # Pieces that are partly nearer than the threshold (no self-intersection marks where:
    # the ends of open contours, near-tangent crossings) are split where their distance to
    # the original crosses it, found by bisection between samples.
    ns = 16
    su = np.linspace(0.0, 1.0, ns + 1)
    sp, _, _ = _eval(_coef(pieces_arr), np.tile(su, (len(pieces_arr), 1)))
    sd = shapely.distance(shapely.points(sp.reshape(-1, 2)), ref).reshape(len(pieces_arr), -1)
    above = sd >= thr
    rows, cols = np.nonzero(above[:, 1:] != above[:, :-1])
    if len(rows):
        lo = su[cols]
        hi = su[cols + 1]
        up = above[rows, cols]
        pc = _coef(pieces_arr[rows])
        for _ in range(40):
            mid = 0.5 * (lo + hi)
            mp, _, _ = _eval(pc, mid[:, None])
            md = shapely.distance(shapely.points(mp[:, 0]), ref) >= thr
            same = md == up
            lo = np.where(same, mid, lo)
            hi = np.where(same, hi, mid)
        cut = 0.5 * (lo + hi)
        refined: list[FloatArray] = []
        refined_rev: list[bool] = []
        for k, c in enumerate(pieces_arr):
            ts = cut[rows == k]
            parts = split_many(c, ts) if len(ts) else [c]
            refined.extend(parts)
            refined_rev.extend([bool(prev_arr[k])] * len(parts))
        pieces_arr = np.array(refined)
        prev_arr = np.array(refined_rev, dtype=bool)
    mids = 0.125 * (
        pieces_arr[:, 0] + 3 * pieces_arr[:, 1] + 3 * pieces_arr[:, 2] + pieces_arr[:, 3]
    )
    dist = shapely.distance(shapely.points(mids), ref)
    keep = dist >= thr
    if closed:
        area = shapely.Polygon(np.asarray(ref.coords))
        if not area.is_valid:
            area = area.buffer(0)
        inside = shapely.contains_xy(area, mids[:, 0], mids[:, 1])
        keep &= inside if inward else ~inside
    removed = pieces_arr[~keep]
    kept = [p for p, k in zip(pieces_arr, keep, strict=True) if k]
    return _chain(kept, closed, tol, prev_arr[keep], r), removed


def _refine_crossing(a: FloatArray, b: FloatArray, ta: float, tb: float):
    """Parameters (ta, tb) where cubics a and b cross, by Newton's method on A(ta) − B(tb) = 0
    from a starting guess; (None, None) when it does not converge inside [0, 1]²."""
    ca = _coef(a[None])
    cb = _coef(b[None])
    scale = 1.0 + float(np.max(np.abs(np.concatenate([a, b]))))
    for _ in range(30):
        pa, da, _ = _eval(ca, np.array([[ta]]))
        pb, db, _ = _eval(cb, np.array([[tb]]))
        f = pa[0, 0] - pb[0, 0]
        if np.hypot(*f) <= 1e-13 * scale:
            break
        jac = np.array([[da[0, 0, 0], -db[0, 0, 0]], [da[0, 0, 1], -db[0, 0, 1]]])
        det = jac[0, 0] * jac[1, 1] - jac[0, 1] * jac[1, 0]
        if abs(det) <= 1e-14 * (np.sum(jac * jac) + 1e-300):
            return None, None
        step = np.linalg.solve(jac, -f)
        ta += float(step[0])
        tb += float(step[1])
        if not (-1e-9 <= ta <= 1 + 1e-9 and -1e-9 <= tb <= 1 + 1e-9):
            return None, None
    else:
        return None, None
    return min(1.0, max(0.0, ta)), min(1.0, max(0.0, tb))


def _project_many(c: FloatArray, p: FloatArray) -> FloatArray:
    """Parameters of the points of cubics nearest to points, pairwise: c (N, 4, 2), p (N, 2) → (N,).

    Best of 65 samples, then up to 20 Newton steps on (B − p)·B′ = 0, each pair frozen
    where the second derivative of the squared distance is not positive.
    """
    coef = _coef(c)
    ts = np.linspace(0.0, 1.0, 65)
    pts, _, _ = _eval(coef, np.tile(ts, (len(c), 1)))
    d = np.hypot(pts[..., 0] - p[:, None, 0], pts[..., 1] - p[:, None, 1])
    t = ts[np.argmin(d, axis=1)]
    live = np.ones(len(c), dtype=bool)
    for _ in range(20):
        b, d1, d2 = _eval(coef, t[:, None])
        b, d1, d2 = b[:, 0], d1[:, 0], d2[:, 0]
        g = np.sum((b - p) * d1, axis=1)
        gp = np.sum(d1 * d1, axis=1) + np.sum((b - p) * d2, axis=1)
        live &= gp > 0
        step = np.divide(g, gp, out=np.zeros_like(g), where=live)
        t = np.where(live, np.clip(t - step, 0.0, 1.0), t)
    return t


def _chain(kept: list[FloatArray], closed: bool, tol: float, rev=None, r: float = 0.0):
    """Join the kept pieces end to start into contours.

    Piece ends within a small distance are one node. Where a cut by distance left a spur — a
    run of pieces leaving a node that another piece also leaves and ending where nothing
    starts (or the mirror image: arriving at a node another piece also arrives at, from
    where nothing arrives), such as the bit of an offset edge just beyond the point where it
    crosses its neighbour at a concave corner — the spur is removed, the shortest first. The
    walk then goes from one edge to the next through their crossing, so a closed contour
    gives closed contours.

    Near a cusp of the offset (where the radius of curvature is just about |d|) a small loop
    of the raw offset can lie within the tolerance band and be kept; a sub-loop of a walk
    (between two visits of one node) that holds a piece running backwards (``rev``) is such
    a loop and is cut out. For a closed contour, an open run left over no longer than
    4·√(r·tol) is a bit of such a loop's tail and is dropped.
    """
    if rev is None:
        rev = np.zeros(len(kept), dtype=bool)
    if not kept:
        return []
    snap = tol * 0.5
    ends = np.array([[p[0], p[3]] for p in kept]).reshape(-1, 2)  # start 2i, end 2i + 1
    node = np.full(len(ends), -1)
    reps: list[FloatArray] = []
    for i, q in enumerate(ends):
        for j, rp in enumerate(reps):
            if np.hypot(*(q - rp)) <= snap:
                node[i] = j
                break
        else:
            node[i] = len(reps)
            reps.append(q)
    start_node = node[0::2]
    end_node = node[1::2]
    # control polygon lengths: ≥ the arc lengths, and not 0 for a piece that closes on itself
    lengths = np.array([float(np.sum(np.hypot(*np.diff(p, axis=0).T))) for p in kept])
    # pieces shorter than the snap distance that start and end on one node are specks
    alive = ~((start_node == end_node) & (lengths <= snap))

    def counts():
        n_out = np.bincount(start_node[alive], minlength=len(reps))
        n_in = np.bincount(end_node[alive], minlength=len(reps))
        return n_in, n_out

    while True:
        n_in, n_out = counts()
        spurs = []
        # runs leaving a node with surplus out-degree and ending where nothing starts
        for s0 in np.nonzero(alive)[0]:
            v = start_node[s0]
            if n_out[v] < 2:
                continue
            run, cur, length = [int(s0)], int(s0), lengths[s0]
            while True:
                w = end_node[cur]
                if n_out[w] == 0:  # dead end: a spur
                    spurs.append((length, run))
                    break
                if n_out[w] != 1 or n_in[w] != 1:
                    break
                nxt = int(np.nonzero(alive & (start_node == w))[0][0])
                if nxt in run:
                    break
                run.append(nxt)
                cur = nxt
                length += lengths[nxt]
        # runs arriving at a node with surplus in-degree from where nothing arrives
        for s0 in np.nonzero(alive)[0]:
            v = end_node[s0]
            if n_in[v] < 2:
                continue
            run, cur, length = [int(s0)], int(s0), lengths[s0]
            while True:
                w = start_node[cur]
                if n_in[w] == 0:
                    spurs.append((length, run))
                    break
                if n_in[w] != 1 or n_out[w] != 1:
                    break
                prv = int(np.nonzero(alive & (end_node == w))[0][0])
                if prv in run:
                    break
                run.append(prv)
                cur = prv
                length += lengths[prv]
        if not spurs:
            break
        _, run = min(spurs, key=lambda x: x[0])
        alive[run] = False

    used = ~alive
    out = []
    for s in range(len(kept)):
        if used[s]:
            continue
        ch = [kept[s].copy()]
        idx = [s]
        used[s] = True
        cur = s
        while True:
            w = end_node[cur]
            # prefer the next piece in order
            nxt = cur + 1
            if not (nxt < len(kept) and not used[nxt] and start_node[nxt] == w):
                cand = np.nonzero(~used & (start_node == w))[0]
                if len(cand) == 0:
                    break
                nxt = int(cand[0])
            piece = kept[nxt].copy()
            piece[0] = ch[-1][3]
            ch.append(piece)
            idx.append(nxt)
            used[nxt] = True
            cur = nxt
        is_closed = end_node[cur] == start_node[s] and (closed or len(ch) > 1)
        # cut out sub-loops holding a backwards piece (the walk visits a node twice)
        nodes = [int(start_node[s])] + [int(end_node[k]) for k in idx]
        changed = True
        while changed:
            changed = False
            for i in range(len(nodes)):
                for j in range(i + 1, len(nodes)):
                    if nodes[i] != nodes[j] or (i == 0 and j == len(nodes) - 1):
                        continue
                    if any(rev[k] for k in idx[i:j]):
                        del ch[i:j], idx[i:j], nodes[i + 1 : j + 1]
                        changed = True
                        break
                    if is_closed and any(rev[k] for k in idx[j:] + idx[:i]):
                        # the loop runs round the walk's start: keep the part between
                        ch, idx, nodes = ch[i:j], idx[i:j], nodes[i : j + 1]
                        changed = True
                        break
                if changed:
                    break
        if not ch:
            continue
        for a, b in zip(ch[:-1], ch[1:], strict=True):
            b[0] = a[3]
        if is_closed:
            ch[-1][3] = ch[0][0]
        # drop specks left by numerical noise
        length = sum(float(np.sum(np.hypot(*np.diff(p, axis=0).T))) for p in ch)
        if closed and not is_closed and length <= 4 * math.sqrt(r * tol):
            continue
        if length > 2 * tol:
            out.append((ch, bool(is_closed)))
    if closed and any(not cl for _, cl in out) and any(cl for _, cl in out):
        out = _drop_doubles(out, tol)
    return out


def _drop_doubles(chains, tol: float):
    """Drop open runs (of a closed contour's offset) lying along a closed one within 8·tol.

    Where a segment ends in a tiny hook, two strands of the raw offset can both stay inside
    the tolerance band along the same stretch; the walk takes one into the closed contour and
    leaves the other as an open double of it.
    """
    import shapely

    u = np.linspace(0.0, 1.0, 9)
    rings = [
        shapely.LineString(_eval(_coef(np.array(ch)), np.tile(u, (len(ch), 1)))[0].reshape(-1, 2))
        for ch, cl in chains
        if cl
    ]
    whole = shapely.union_all(rings)
    out = []
    for ch, cl in chains:
        if not cl:
            pts = _eval(_coef(np.array(ch)), np.tile(u, (len(ch), 1)))[0].reshape(-1, 2)
            if np.max(shapely.distance(shapely.points(pts), whole)) <= 8 * tol:
                continue
        out.append((ch, cl))
    return out
