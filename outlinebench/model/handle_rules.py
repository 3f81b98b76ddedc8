"""How handles follow when points move: the rules every point-moving edit obeys.

Moving an on-curve point moves the handles next to it by the same amount (for a quadratic
its single handle is next to both ends). Moving a handle at a join whose intent is smooth —
or is unstated but whose tangents currently agree within :data:`SMOOTH_ANGLE_TOLERANCE_DEG` —
rotates the opposite handle about the on-curve point so the two stay collinear, keeping its
length; when the opposite side is a line, the moved handle is kept on the line's direction
instead. ``break_join=True`` moves the handle freely and sets the join's intent to corner;
``symmetric=True`` mirrors the opposite handle through the on-curve point (same length) and
sets the intent to smooth.

Moved out of :mod:`outlinebench.model.commands` (which still exports
``SMOOTH_ANGLE_TOLERANCE_DEG``); the commands apply these rules through
:func:`_move_in_contour`.
"""

from __future__ import annotations

import math
from collections.abc import Iterable

import numpy as np
from numpy.typing import NDArray

from outlinebench.geometry.curvature import end_tangents
from outlinebench.model.document import Contour
from outlinebench.model.point_names import _Key

__all__ = ["SMOOTH_ANGLE_TOLERANCE_DEG"]

FloatArray = NDArray[np.float64]

# An unstated join counts as smooth while its two tangent directions differ by less than this
# angle (degrees); then moving one handle turns the other with it.
SMOOTH_ANGLE_TOLERANCE_DEG = 1.0
# A handle typed next to a smooth join with a line still counts as on the line's direction
# when it is within this fraction of the line's length (at least 1 unit) of it: rounding of
# typed coordinates, not a kink.
_ON_LINE_RELATIVE = 1e-9


def _freeze(a: FloatArray) -> FloatArray:
    a.flags.writeable = False
    return a


def _tangents_agree(incoming: FloatArray, outgoing: FloatArray) -> bool:
    """Whether the end direction of ``incoming`` and start of ``outgoing`` agree (G1).

    Directions from :func:`~outlinebench.geometry.curvature.end_tangents` (the first
    non-zero derivative where a handle lies on its point); a segment shrunk to a point has
    none and never agrees.
    """
    _, a = end_tangents(incoming)
    b, _ = end_tangents(outgoing)
    if not (a.any() and b.any()):
        return False
    cos = float(a[0] * b[0] + a[1] * b[1])
    return cos >= math.cos(math.radians(SMOOTH_ANGLE_TOLERANCE_DEG))


def _node_slots(c: Contour, node: int) -> list[tuple[int, int]]:
    n = len(c.segments)
    slots = []
    if node < n:
        slots.append((node, 0))
    if node > 0:
        slots.append((node - 1, c.segments[node - 1].shape[0] - 1))
    elif c.closed:
        slots.append((n - 1, c.segments[n - 1].shape[0] - 1))
    return slots


def _node_handles(c: Contour, node: int) -> list[_Key]:
    out = []
    for s, i in _node_slots(c, node):
        k = c.segments[s].shape[0]
        if k > 2:
            out.append(("h", s, 1 if i == 0 else k - 2))
    return out


def _join_at_node(c: Contour, node: int) -> int | None:
    n = len(c.segments)
    if c.closed:
        return (node - 1) % n
    if 0 < node < n:
        return node - 1
    return None


def _move_in_contour(  # noqa: C901 (older than the complexity gate; split when next changed)
    c: Contour,
    keys: Iterable[_Key],
    delta: FloatArray,
    *,
    targets: dict[_Key, FloatArray] | None = None,
    break_join: bool = False,
    symmetric: bool = False,
    move_handles: bool = True,
) -> Contour:
    """Move the keyed points of one contour; see the module docstring for the rules."""
    segs = _LazyCopies(c.segments)
    joins = list(c.joins)
    targets = targets or {}
    keys = list(dict.fromkeys(keys))
    moved_nodes = {k[1] for k in keys if k[0] == "n"}
    direct_handles = [k for k in keys if k[0] == "h"]
    moving: dict[_Key, None] = {}
    for k in keys:
        moving[k] = None
        if k[0] == "n" and move_handles:
            for h in _node_handles(c, k[1]):
                moving[h] = None

    def pos(k: _Key) -> FloatArray:
        if k[0] == "n":
            s, i = _node_slots(c, k[1])[0]
            return c.segments[s][i]
        return c.segments[k[1]][k[2]]

    def put(k: _Key, p: FloatArray) -> None:
        if k[0] == "n":
            for s, i in _node_slots(c, k[1]):
                segs[s][i] = p
        else:
            segs[k[1]][k[2]] = p

    for k in moving:
        put(k, targets[k] if k in targets else pos(k) + delta)

    for h in direct_handles:
        s, i = h[1], h[2]
        kk = c.segments[s].shape[0]
        ends = []
        if i == 1:
            ends.append((s, "start"))
        if i == kk - 2:
            ends.append((s, "end"))
        for seg_i, side in ends:
            n = len(c.segments)
            node = seg_i if side == "start" else seg_i + 1
            if node == n and c.closed:
                node = 0
            j = _join_at_node(c, node)
            if j is None or node in moved_nodes:
                continue
            inc, out = c.join_segments(j)
            other = inc if side == "start" else out
            other_seg = c.segments[other]
            ko = other_seg.shape[0]
            opp_key = ("h", other, ko - 2 if side == "start" else 1) if ko > 2 else None
            if opp_key is not None and opp_key in moving:
                continue
            if break_join:
                joins[j] = "corner"
                continue
            intent = c.joins[j]
            smooth = intent == "smooth" or (
                intent is None and _tangents_agree(c.segments[inc], c.segments[out])
            )
            if not (smooth or symmetric):
                continue
            p = pos(("n", node))
            hp = segs[s][i]
            if opp_key is None:
                # The other side is a line: keep the handle on the line's direction. A handle
                # given exact coordinates (SetPoint) keeps them; if they leave the line's
                # direction the join becomes a corner, so the stated intent stays true.
                far = other_seg[0] if side == "start" else other_seg[-1]
                d = p - far
                dn = math.hypot(d[0], d[1])
                if dn > 0.0:
                    u = d / dn
                    along = max(0.0, float(np.dot(hp - p, u)))
                    on_line = p + along * u
                    if h not in targets:
                        segs[s][i] = on_line
                    elif math.hypot(*(hp - on_line)) > _ON_LINE_RELATIVE * max(1.0, dn):
                        joins[j] = "corner"
                continue
            if symmetric:
                segs[opp_key[1]][opp_key[2]] = 2.0 * p - hp
                joins[j] = "smooth"
                continue
            away = p - hp
            an = math.hypot(away[0], away[1])
            op = c.segments[opp_key[1]][opp_key[2]]
            length = math.hypot(op[0] - p[0], op[1] - p[1])
            if an > 0.0 and length > 0.0:
                segs[opp_key[1]][opp_key[2]] = p + away * (length / an)
    out_segs = list(c.segments)
    for i, new in segs.copies.items():
        if not np.array_equal(out_segs[i], new):
            out_segs[i] = _freeze(new)
    return c.with_segments(out_segs, joins)


class _LazyCopies:
    """Writable copies of a contour's segments, made only for the segments touched."""

    def __init__(self, segments: tuple[FloatArray, ...]) -> None:
        self.segments = segments
        self.copies: dict[int, FloatArray] = {}

    def __getitem__(self, i: int) -> FloatArray:
        arr = self.copies.get(i)
        if arr is None:
            arr = self.copies[i] = self.segments[i].copy()
        return arr
