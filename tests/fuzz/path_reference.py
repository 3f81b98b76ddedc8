"""An independent, deliberately plain reader of SVG path data, for differential fuzzing.

Written straight from the BNF of W3C SVG 1.1 §8.3.9 / SVG 2 §9.3.9 as a character-at-a-time
recursive-descent parser, sharing no code with :mod:`outlinebench.io.svg_path`, and from the
error rule of SVG 2 §9.5.4 ("render up to the error": everything up to the last complete
parameter group before the first error is drawn). It does not convert arcs to cubics; it
reports, per subpath, the on-curve points the reader must produce, so a comparison can
check that every one of them is there, in order, and that the error is found at the same
offset.

Arcs follow SVG 1.1 F.6.2: omitted when the end point equals the start point, a straight
line when a radius is zero; otherwise they are kept (the radius correction of F.6.6 makes
every other arc drawable), unless the arc's own extent cannot be held in binary64, which
is bounded here by ``2·max(|rx|, |ry|, chord/2) + max |coordinate|``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

__all__ = ["RefSubpath", "RefResult", "reference_read"]

_WSP = " \t\r\n\f"
_ARITY = {"M": 2, "L": 2, "H": 1, "V": 1, "C": 6, "S": 4, "Q": 4, "T": 2, "A": 7, "Z": 0}
# An arc whose extent bound passes this is allowed to be refused as an overflow.
_ARC_LIMIT = 1e307


@dataclass
class RefSubpath:
    """One subpath: its on-curve points in order (start first) and whether it is closed."""

    points: list[tuple[float, float]]
    closed: bool = False
    segments: int = 0
    kinds: list[str] = field(default_factory=list)


@dataclass
class RefResult:
    """Subpaths with at least one segment, and the error offset (None: no error)."""

    subpaths: list[RefSubpath]
    error_offset: int | None
    overflow: bool = False
    uncertain: bool = False


class _Stop(Exception):
    def __init__(self, offset: int) -> None:
        self.offset = offset


class _Scanner:
    def __init__(self, d: str) -> None:
        self.d = d
        self.i = 0

    def wsp(self) -> None:
        while self.i < len(self.d) and self.d[self.i] in _WSP:
            self.i += 1

    def comma_wsp(self) -> bool:
        """Optional comma-wsp; True when a comma was eaten."""
        self.wsp()
        if self.i < len(self.d) and self.d[self.i] == ",":
            self.i += 1
            self.wsp()
            return True
        return False

    def digits(self) -> int:
        j = self.i
        while self.i < len(self.d) and self.d[self.i].isascii() and self.d[self.i].isdigit():
            self.i += 1
        return self.i - j

    def number(self) -> float:
        """number ::= sign? (digits ('.' digits?)? | '.' digits) exponent? (longest match)."""
        start = self.i
        d = self.d
        if self.i < len(d) and d[self.i] in "+-":
            self.i += 1
        whole = self.digits()
        frac = 0
        if self.i < len(d) and d[self.i] == ".":
            self.i += 1
            frac = self.digits()
            if not whole and not frac:
                raise _Stop(start)
        elif not whole:
            raise _Stop(start)
        if self.i < len(d) and d[self.i] in "eE":
            j = self.i
            self.i += 1
            if self.i < len(d) and d[self.i] in "+-":
                self.i += 1
            if not self.digits():
                self.i = j  # "1e" is the number 1 followed by an "e"
        value = float(d[start : self.i])
        if not math.isfinite(value):
            raise _Stop(start)  # out of range: blamed on its own token
        return value

    def flag(self) -> float:
        if self.i < len(self.d) and self.d[self.i] in "01":
            self.i += 1
            return float(self.d[self.i - 1])
        raise _Stop(self.i)


def _group(sc: _Scanner, letter: str) -> list[float]:
    up = letter.upper()
    out: list[float] = []
    for j in range(_ARITY[up]):
        if j:
            sc.comma_wsp()
        out.append(sc.flag() if up == "A" and j in (3, 4) else sc.number())
    return out


def _arc_kind(x0, y0, p, x, y) -> str:  # noqa: ANN001
    if x0 == x and y0 == y:
        return "omitted"
    if p[0] == 0.0 or p[1] == 0.0:
        return "line"
    half = math.hypot(x - x0, y - y0) / 2.0
    extent = 2.0 * max(abs(p[0]), abs(p[1]), half) + max(abs(x0), abs(y0), abs(x), abs(y))
    return "arc" if extent < _ARC_LIMIT else "may-overflow"


def reference_read(d: str) -> RefResult:  # noqa: C901 (older than the complexity gate; split when next changed)
    """Read path data by the grammar; see the module docstring for what is reported."""
    sc = _Scanner(d)
    subs: list[RefSubpath] = []
    cur: RefSubpath | None = None
    x = y = sx = sy = 0.0
    last_c2: tuple[float, float] | None = None
    last_q: tuple[float, float] | None = None
    error: int | None = None
    overflow = False
    uncertain = False

    def seg(px: float, py: float, kind: str) -> None:
        nonlocal cur, overflow
        if not all(math.isfinite(v) for v in (px, py, *ctrl)):
            overflow = True
            raise _Stop(-1)
        if cur is None:
            cur = RefSubpath([(sx, sy)])
            subs.append(cur)
        cur.points.append((px, py))
        cur.segments += 1
        cur.kinds.append(kind)

    ctrl: list[float] = []
    sc.wsp()
    if sc.i >= len(d):
        return RefResult([], None)
    if d[sc.i] not in "Mm":
        return RefResult([], sc.i)
    first = True
    try:
        while True:
            sc.wsp()
            if sc.i >= len(d):
                break
            letter = d[sc.i]
            if letter not in _ARITY and letter.upper() not in _ARITY:
                raise _Stop(sc.i)
            sc.i += 1
            up = letter.upper()
            if up == "Z":
                if x != sx or y != sy:
                    seg(sx, sy, "line")
                if cur is not None:
                    cur.closed = True
                cur = None
                x, y = sx, sy
                last_c2 = last_q = None
                first = False
                continue
            sc.wsp()
            groups = 0
            while True:
                save = sc.i
                try:
                    p = _group(sc, letter)
                except _Stop as stop:
                    if groups == 0:
                        raise
                    # After a complete group: either the next command or an error.
                    if stop.offset == save and not (save > 0 and d[save - 1] == ","):
                        sc.i = save
                        break
                    raise
                groups += 1
                ctrl = []
                # A leading "m" is absolute for its first pair only (SVG 1.1 §8.3.2).
                rel = letter != up and not (first and groups == 1)
                bx, by = (x, y) if rel else (0.0, 0.0)
                if up == "M" and groups == 1:
                    x, y = p[0] + bx, p[1] + by
                    sx, sy = x, y
                    cur = None
                    last_c2 = last_q = None
                elif up in "ML":
                    x, y = p[0] + bx, p[1] + by
                    seg(x, y, "line")
                    last_c2 = last_q = None
                elif up == "H":
                    x = p[0] + bx
                    seg(x, y, "line")
                    last_c2 = last_q = None
                elif up == "V":
                    y = p[0] + by
                    seg(x, y, "line")
                    last_c2 = last_q = None
                elif up == "C":
                    last_c2 = (p[2] + bx, p[3] + by)
                    ctrl = [p[0] + bx, p[1] + by, *last_c2]
                    x, y = p[4] + bx, p[5] + by
                    seg(x, y, "cubic")
                    last_q = None
                elif up == "S":
                    if last_c2 is not None:
                        ctrl = [2 * x - last_c2[0], 2 * y - last_c2[1]]
                    last_c2 = (p[0] + bx, p[1] + by)
                    ctrl += list(last_c2)
                    x, y = p[2] + bx, p[3] + by
                    seg(x, y, "cubic")
                    last_q = None
                elif up == "Q":
                    last_q = (p[0] + bx, p[1] + by)
                    ctrl = list(last_q)
                    x, y = p[2] + bx, p[3] + by
                    seg(x, y, "quad")
                    last_c2 = None
                elif up == "T":
                    last_q = (2 * x - last_q[0], 2 * y - last_q[1]) if last_q else (x, y)
                    ctrl = list(last_q)
                    x, y = p[0] + bx, p[1] + by
                    seg(x, y, "quad")
                    last_c2 = None
                else:  # A
                    x0, y0 = x, y
                    x, y = p[5] + bx, p[6] + by
                    kind = _arc_kind(x0, y0, p, x, y)
                    if kind == "may-overflow":
                        uncertain = True  # whether the arc fits in binary64 is not decided here
                        raise _Stop(-1)
                    if kind != "omitted":
                        seg(x, y, "arc" if kind == "arc" else "line")
                    last_c2 = last_q = None
                if not all(math.isfinite(v) for v in (x, y)):
                    overflow = True
                    raise _Stop(-1)
                if sc.comma_wsp():
                    # A comma must be followed by another parameter group.
                    if sc.i >= len(d) or d[sc.i] not in "+-.0123456789":
                        raise _Stop(sc.i)
                sc.wsp()
            first = False
    except _Stop as stop:
        error = stop.offset
    subs = [s for s in subs if s.segments]
    return RefResult(subs, error, overflow or uncertain, uncertain)


def disagreements(d: str, contours: list, error_offset: int | None) -> list[str]:  # noqa: ANN001
    """Where a reader's result (contours of (K, 2) segments, error offset) departs from
    :func:`reference_read` on ``d``; empty when they agree.

    Checked: an error is reported exactly when the grammar has one, at the same offset
    (an overflow only needs some error at or before the overflowing command); the same
    number of subpaths with at least one segment, the same start and end points and closed
    flags; every on-curve point of the reference appears, in order, among the reader's
    segment end points (arcs become several cubics, so the reader may have more).
    """
    ref = reference_read(d)
    out: list[str] = []
    if ref.overflow:
        if error_offset is None and not ref.uncertain:
            out.append("overflow not reported")
    elif (ref.error_offset is None) != (error_offset is None):
        out.append(f"error: reference {ref.error_offset}, reader {error_offset}")
    elif ref.error_offset != error_offset:
        out.append(f"error offset: reference {ref.error_offset}, reader {error_offset}")
    if ref.uncertain:
        subs = ref.subpaths[: len(contours)]
    elif ref.overflow:
        # The reader keeps a prefix: compare only as many subpaths as it kept.
        subs = ref.subpaths[: len(contours)]
        if len(contours) > len(ref.subpaths):
            out.append(f"subpaths: reference {len(ref.subpaths)}, reader {len(contours)}")
    else:
        subs = ref.subpaths
        if len(subs) != len(contours):
            out.append(f"subpaths: reference {len(subs)}, reader {len(contours)}")
            return out
    for k, (rs, c) in enumerate(zip(subs, contours, strict=False)):
        segs = c.segments
        ends = [(float(s[-1][0]), float(s[-1][1])) for s in segs]
        start = (float(segs[0][0][0]), float(segs[0][0][1]))
        if start != rs.points[0]:
            out.append(f"subpath {k}: start {start} vs reference {rs.points[0]}")
        if rs.closed != c.closed and not ref.overflow:
            out.append(f"subpath {k}: closed {c.closed} vs reference {rs.closed}")
        want = rs.points[1:]
        it = iter(ends)
        if not all(any(p == q for q in it) for p in want):
            out.append(f"subpath {k}: on-curve points {want[:6]} not all among {ends[:6]}")
        elif not ref.overflow and ends and want and ends[-1] != want[-1]:
            out.append(f"subpath {k}: ends at {ends[-1]}, reference {want[-1]}")
    return out
