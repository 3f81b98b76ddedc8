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
from typing import Any

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
    chords = shapely.linestrings(np.stack([chain[:-1], chain[1:]], axis=1))
    tree = shapely.STRtree(chords)
    _check_crossing_budget(tree, chords)
    ref_pts = np.vstack(flatten_contours([(list(orig), False)], tol / 8))
    ref = shapely.LineString(ref_pts)
    near = _NearestChord(ref_pts)
    noded = shapely.unary_union(line)
    # intersection points: ends of noded pieces that are not ends of the raw chain (each
    # crossing is the end of up to four noded pieces: taken once)
    cut_pts = []
    for g in getattr(noded, "geoms", [noded]):
        cs = np.asarray(g.coords)
        cut_pts.extend([cs[0], cs[-1]])
    cut_pts = np.unique(np.array(cut_pts).reshape(-1, 2), axis=0)
    # parameters on the raw pieces: nearest chord, then Newton on the cubic; the two pieces
    # that cross there are then solved together (A(ta) = B(tb)) so that both are cut at the
    # same point and the kept parts meet exactly
    splits: dict[int, list[float]] = {}
    if len(cut_pts):
        hits = tree.query(shapely.points(cut_pts), predicate="dwithin", distance=tol * 1e-6)
        at: dict[int, list[tuple[int, float]]] = {}
        hit_k = owner[hits[1]]
        hit_t: Any = _project_many(raw[hit_k], cut_pts[hits[0]]) if len(hit_k) else []
        for pi, k, t in zip(
            hits[0].tolist(), hit_k.tolist(), np.asarray(hit_t).tolist(), strict=True
        ):
            locs = at.setdefault(int(pi), [])
            if all(k != k2 or abs(t - t2) > 1e-7 for k2, t2 in locs):
                locs.append((k, t))
        # every pair (first, j-th) of pieces through one crossing, refined together
        pa, pb, pta, ptb, where = [], [], [], [], []
        for n_at, locs in enumerate(at.values()):
            for j in range(1, len(locs)):
                pa.append(locs[0][0])
                pta.append(locs[0][1])
                pb.append(locs[j][0])
                ptb.append(locs[j][1])
                where.append((n_at, j))
        ra, rb, ok = _refine_crossings(
            raw[np.array(pa, dtype=np.intp)], raw[np.array(pb, dtype=np.intp)],
            np.array(pta, dtype=float), np.array(ptb, dtype=float),
        )  # fmt: skip
        refined_at = [list(locs) for locs in at.values()]
        for q, (n_at, j) in enumerate(where):
            if ok[q]:
                refined_at[n_at][0] = (pa[q], float(ra[q]))
                refined_at[n_at][j] = (pb[q], float(rb[q]))
        for refined in refined_at:
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
    sd = near.distance(sp.reshape(-1, 2)).reshape(len(pieces_arr), -1)
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
            md = near.distance(mp[:, 0]) >= thr
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
    dist = near.distance(mids)
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


class _NearestChord:
    """Distances from points to a polyline through an STRtree of its chords.

    ``shapely.distance(points, line)`` visits every vertex of the line for every point
    (points × vertices); the tree's nearest-neighbour search (``STRtree.query_nearest``,
    exact distances, branch and bound over the chords' boxes) takes about log(vertices) per
    point. The distance to the polyline is the least distance to one of its chords, so the
    values are the same.
    """

    def __init__(self, pts: FloatArray) -> None:
        import shapely

        self._tree = shapely.STRtree(shapely.linestrings(np.stack([pts[:-1], pts[1:]], axis=1)))

    def distance(self, p: FloatArray) -> FloatArray:
        """Distance (N,) of each point p (N, 2) to the polyline."""
        import shapely

        out = np.full(len(p), np.inf)
        if len(p):
            (qi, _), d = self._tree.query_nearest(
                shapely.points(p), return_distance=True, all_matches=False
            )
            out[qi] = d
        return out


def _refine_crossings(a: FloatArray, b: FloatArray, ta: FloatArray, tb: FloatArray):
    """Parameters where cubics a[i] and b[i] cross, by Newton's method on A(ta) − B(tb) = 0.

    a, b (N, 4, 2), starting guesses ta, tb (N,). Returns (ta, tb, ok): ``ok`` False where
    the iteration does not converge inside [0, 1]² within 30 steps or meets a singular
    Jacobian (the starting guesses are then kept). Each row's 2 × 2 Newton system is solved
    by Cramer's rule, all rows at once (Newton's method for a system of two equations).
    """
    n = len(ta)
    ok = np.zeros(n, dtype=bool)
    if n == 0:
        return ta, tb, ok
    ca, cb = _coef(a), _coef(b)
    scale = 1.0 + np.max(np.abs(np.concatenate([a, b], axis=1)), axis=(1, 2))
    ta, tb = ta.astype(float).copy(), tb.astype(float).copy()
    xa, xb = ta.copy(), tb.copy()
    live = np.ones(n, dtype=bool)
    for _ in range(30):
        rows = np.nonzero(live)[0]
        if len(rows) == 0:
            break
        pa, da, _ = _eval(ca[rows], xa[rows, None])
        pb, db, _ = _eval(cb[rows], xb[rows, None])
        f = pa[:, 0] - pb[:, 0]
        done = np.hypot(f[:, 0], f[:, 1]) <= 1e-13 * scale[rows]
        ok[rows[done]] = True
        live[rows[done]] = False
        j00, j01 = da[:, 0, 0], -db[:, 0, 0]
        j10, j11 = da[:, 0, 1], -db[:, 0, 1]
        det = j00 * j11 - j01 * j10
        singular = ~done & (np.abs(det) <= 1e-14 * (j00**2 + j01**2 + j10**2 + j11**2 + 1e-300))
        live[rows[singular]] = False
        go = ~done & ~singular
        r2 = rows[go]
        dg, fx, fy = det[go], -f[go, 0], -f[go, 1]
        xa[r2] += (fx * j11[go] - j01[go] * fy) / dg
        xb[r2] += (j00[go] * fy - j10[go] * fx) / dg
        out = ~((-1e-9 <= xa[r2]) & (xa[r2] <= 1 + 1e-9) & (-1e-9 <= xb[r2]) & (xb[r2] <= 1 + 1e-9))
        live[r2[out]] = False
    ta = np.where(ok, np.clip(xa, 0.0, 1.0), ta)
    tb = np.where(ok, np.clip(xb, 0.0, 1.0), tb)
    return ta, tb, ok


def _check_crossing_budget(tree, chords) -> None:
    """Refuse a raw offset whose chords cross each other more than the crossing budget.

    A contour far more detailed than the tool (a zig-zag of steps much narrower than the
    tool diameter) has a raw offset where every piece crosses the offsets of all its
    neighbours within the tool's reach: the crossings, and the work of trimming them, grow
    as segments × reach. They are counted in blocks with the chords' STRtree (pairs of
    crossing chords, the neighbouring pair sharing an end left out), stopping at
    :data:`outlinebench.limits.OFFSET_CROSSINGS` with an ``InvalidGeometryError``.
    """
    from outlinebench import limits

    total = 0
    block = 20_000
    for s0 in range(0, len(chords), block):
        qi, ti = tree.query(chords[s0 : s0 + block], predicate="intersects")
        qi = qi + s0
        total += int(np.count_nonzero(ti > qi + 1))
        if total > limits.OFFSET_CROSSINGS:
            raise limits.WorkCapExceeded(
                f"the raw offset crosses itself more than {limits.OFFSET_CROSSINGS} times "
                "(the contour is far more detailed than the tool): offset refused"
            )


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
    node = _snap_nodes(ends, snap)
    n_nodes = int(node.max()) + 1
    start_node = node[0::2]
    end_node = node[1::2]
    # control polygon lengths: ≥ the arc lengths, and not 0 for a piece that closes on itself
    kept_arr = np.asarray(kept)
    lengths = np.sum(np.hypot(*np.diff(kept_arr, axis=1).transpose(2, 0, 1)), axis=1)
    # pieces shorter than the snap distance that start and end on one node are specks
    alive = ~((start_node == end_node) & (lengths <= snap))
    _remove_spurs(start_node, end_node, lengths, alive, n_nodes)

    used = ~alive
    # the unused pieces leaving each node, lowest index first (a cursor skips used ones)
    order = np.argsort(start_node, kind="stable")
    first = np.searchsorted(start_node[order], np.arange(n_nodes + 1))
    cursor = first[:-1].copy()

    def next_unused(w: int) -> int:
        k = int(cursor[w])
        while k < first[w + 1] and used[order[k]]:
            k += 1
        cursor[w] = k
        return int(order[k]) if k < first[w + 1] else -1

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
                nxt = next_unused(int(w))
                if nxt < 0:
                    break
            piece = kept[nxt].copy()
            piece[0] = ch[-1][3]
            ch.append(piece)
            idx.append(nxt)
            used[nxt] = True
            cur = nxt
        is_closed = end_node[cur] == start_node[s] and (closed or len(ch) > 1)
        # cut out sub-loops holding a backwards piece (the walk visits a node twice)
        nodes = [int(start_node[s])] + [int(end_node[k]) for k in idx]
        while True:
            found = _backward_loop(nodes, [bool(rev[k]) for k in idx], bool(is_closed))
            if found is None:
                break
            how, i, j = found
            if how == "cut":
                del ch[i:j], idx[i:j], nodes[i + 1 : j + 1]
            else:  # the loop runs round the walk's start: keep the part between
                ch, idx, nodes = ch[i:j], idx[i:j], nodes[i : j + 1]
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


def _snap_nodes(ends: FloatArray, snap: float) -> NDArray[np.intp]:
    """Node number of each point: the first earlier representative within ``snap``, else new.

    A point joins the lowest-numbered representative within ``snap`` (Euclidean), as a scan
    over all representatives would; candidates come from a hash grid of cell ``snap`` (any
    representative within ``snap`` lies in the 3 × 3 cells around the point), so the work
    is linear in the number of points instead of quadratic.
    """
    cell = snap if snap > 0 else 1.0
    keys = np.floor(ends / cell)
    grid: dict[tuple[float, float], list[int]] = {}
    reps: list[FloatArray] = []
    node = np.full(len(ends), -1, dtype=np.intp)
    for i, (q, kq) in enumerate(zip(ends, keys.tolist(), strict=True)):
        best = -1
        for dx in (-1.0, 0.0, 1.0):
            for dy in (-1.0, 0.0, 1.0):
                for j in grid.get((kq[0] + dx, kq[1] + dy), ()):
                    if (best < 0 or j < best) and np.hypot(*(q - reps[j])) <= snap:
                        best = j
        if best < 0:
            best = len(reps)
            reps.append(q)
            grid.setdefault((kq[0], kq[1]), []).append(best)
        node[i] = best
    return node


def _first_by(node_of: NDArray[np.intp], alive: NDArray[np.bool_], n_nodes: int):
    """For each node, the lowest-numbered alive piece with ``node_of[piece]`` there (−1: none)."""
    al = np.nonzero(alive)[0]
    out = np.full(n_nodes, -1, dtype=np.intp)
    u, fi = np.unique(node_of[al], return_index=True)
    out[u] = al[fi]
    return out


def _remove_spurs(start_node, end_node, lengths, alive, n_nodes: int) -> None:
    """Mark dead (``alive`` False) the spurs of the piece graph, the shortest first.

    A spur is a run of pieces leaving a node with surplus out-degree and ending where nothing
    starts (or its mirror image: arriving at a node with surplus in-degree from where nothing
    arrives). Each round finds all runs in time linear in the pieces (each piece lies on at
    most one run each way) and removes, shortest first, those that share no node with a
    shorter one removed in the same round; removing a spur changes degrees only at its own
    nodes, so the others stay spurs, and the next round finds the ones it created.
    """
    while True:
        n_out = np.bincount(start_node[alive], minlength=n_nodes)
        n_in = np.bincount(end_node[alive], minlength=n_nodes)
        first_out = _first_by(start_node, alive, n_nodes)
        first_in = _first_by(end_node, alive, n_nodes)
        spurs: list[tuple[float, list[int]]] = []
        for forward in (True, False):
            head, tail = (start_node, end_node) if forward else (end_node, start_node)
            n_head, n_tail = (n_out, n_in) if forward else (n_in, n_out)
            step = first_out if forward else first_in
            for s0 in np.nonzero(alive & (n_head[head] >= 2))[0].tolist():
                run, seen, cur, length = [s0], {s0}, s0, float(lengths[s0])
                while True:
                    w = tail[cur]
                    if n_head[w] == 0:  # dead end: a spur
                        spurs.append((length, run))
                        break
                    if n_head[w] != 1 or n_tail[w] != 1:
                        break
                    nxt = int(step[w])
                    if nxt in seen:
                        break
                    run.append(nxt)
                    seen.add(nxt)
                    cur = nxt
                    length += float(lengths[nxt])
        if not spurs:
            return
        spurs.sort(key=lambda x: x[0])
        touched: set[int] = set()
        for _, run in spurs:
            nodes = {int(start_node[k]) for k in run} | {int(end_node[k]) for k in run}
            if nodes & touched:
                continue
            touched |= nodes
            alive[run] = False


def _backward_loop(nodes: list[int], rev: list[bool], is_closed: bool):
    """The first sub-loop of a walk to cut: ("cut" | "keep", i, j) or None.

    ``nodes`` (L + 1) are the walk's nodes, ``rev`` (L) its pieces' backwards flags. Pairs
    i < j with ``nodes[i] == nodes[j]`` (not the closing pair 0, L) are taken in the order
    (i, then j); a loop holding a backwards piece (``rev`` in pieces i..j−1) is cut
    ("cut"); on a closed walk a loop round the start holding one (pieces j.. and ..i−1)
    leaves the part between ("keep"). Prefix counts of ``rev`` and the positions of each
    node make it linear in the walk plus the repeated pairs.
    """
    cnt = [0]
    for f in rev:
        cnt.append(cnt[-1] + int(f))
    total = cnt[-1]
    if total == 0:
        return None
    pos: dict[int, list[int]] = {}
    for k, v in enumerate(nodes):
        pos.setdefault(v, []).append(k)
    last = len(nodes) - 1
    for i, v in enumerate(nodes):
        ps = pos[v]
        if len(ps) < 2:
            continue
        for j in ps:
            if j <= i or (i == 0 and j == last):
                continue
            if cnt[j] - cnt[i] > 0:
                return ("cut", i, j)
            if is_closed and total - cnt[j] + cnt[i] > 0:
                return ("keep", i, j)
    return None


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
