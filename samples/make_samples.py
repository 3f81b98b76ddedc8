"""Write the sample SVG files of this folder (run: python samples/make_samples.py).

Every shape here is our own invention: block lettering "HARBOUR" for the imaginary sign shop
Harbour Lane Signs, and a mounting bracket for the imaginary workshop Kestrel Fabrication.
All coordinates are millimetres (the root's viewBox equals its width and height in mm).
Planted defects are listed in README.md of this folder.
"""

from __future__ import annotations

from pathlib import Path

HERE = Path(__file__).resolve().parent
K = 0.5522847498  # quarter-ellipse handle ratio 4(√2 − 1)/3


def fmt(v: float) -> str:
    s = f"{v:.4f}".rstrip("0").rstrip(".")
    return "0" if s == "-0" else s


def pt(p: tuple[float, float]) -> str:
    return f"{fmt(p[0])},{fmt(p[1])}"


class Pen:
    """Collects absolute M/L/C/Z path data."""

    def __init__(self) -> None:
        self.parts: list[str] = []
        self.cur = (0.0, 0.0)

    def move(self, p):
        self.parts.append(f"M{pt(p)}")
        self.cur = p
        return self

    def line(self, *ps):
        for p in ps:
            self.parts.append(f"L{pt(p)}")
            self.cur = p
        return self

    def curve(self, c1, c2, p):
        self.parts.append(f"C{pt(c1)} {pt(c2)} {pt(p)}")
        self.cur = p
        return self

    def quarter(self, center, rx, ry, start_deg, end_deg):
        """Quarter ellipse arc from the axis point at start_deg to the one at end_deg
        (degrees, 0 = +x, 90 = +y, i.e. down in SVG); handles along the tangents."""
        import math

        cx, cy = center

        def at(a):
            r = math.radians(a)
            return (cx + rx * math.cos(r), cy + ry * math.sin(r))

        def tan(a, s):
            r = math.radians(a)
            return (-rx * math.sin(r) * s, ry * math.cos(r) * s)

        s = 1 if end_deg > start_deg else -1
        p0, p3 = at(start_deg), at(end_deg)
        t0, t3 = tan(start_deg, s), tan(end_deg, s)
        c1 = (p0[0] + K * t0[0], p0[1] + K * t0[1])
        c2 = (p3[0] - K * t3[0], p3[1] - K * t3[1])
        return self.curve(c1, c2, p3)

    def close(self):
        self.parts.append("Z")
        return self

    def d(self) -> str:
        return " ".join(self.parts)


# Letter box: cap height 60 mm from y = 10 (top) to y = 70 (baseline); stroke 10 mm.
TOP, BASE, S = 10.0, 70.0, 10.0


def letter_h(x: float) -> str:
    w = 36.0
    return (
        Pen().move((x, TOP))
        .line((x + S, TOP), (x + S, 35), (x + w - S, 35), (x + w - S, TOP), (x + w, TOP))
        .line((x + w, BASE), (x + w - S, BASE), (x + w - S, 45), (x + S, 45), (x + S, BASE))
        .line((x, BASE)).close().d()
    )  # fmt: skip


def letter_a(x: float, hole_crosses: bool = False) -> str:
    w = 40.0
    outer = (
        Pen().move((x + 15, TOP))
        .line((x + 25, TOP), (x + w, BASE), (x + w - 10, BASE), (x + w - 13, 57))
        .line((x + 13, 57), (x + 10, BASE), (x, BASE)).close().d()
    )  # fmt: skip
    # counter (hole), wound the other way: a small triangle
    apex_y = 24.0 if not hole_crosses else 8.0  # defect: apex pokes out through the top
    hole = Pen().move((x + 20, apex_y)).line((x + 16, 47), (x + 24, 47)).close().d()
    return f"{outer} {hole}"


def bowl_outline(p: Pen, x_stem: float, y0: float, y1: float, reach: float) -> Pen:
    """From the pen (on the stem at y0) right along the top and round the bowl to its bottom,
    arriving there heading back towards the stem."""
    r = (y1 - y0) / 2
    cx = x_stem + reach - r
    p.line((cx, y0))
    p.quarter((cx, y0 + r), r, r, -90, 0)
    p.quarter((cx, y0 + r), r, r, 0, 90)
    return p


def bowl_hole(x_stem: float, y0: float, y1: float, reach: float, same_way: bool = False) -> str:
    """A D-shaped counter, wound against the outline (or, with ``same_way``, with it)."""
    r = (y1 - y0) / 2
    cx = x_stem + reach - r
    if same_way:
        p = Pen().move((x_stem, y0)).line((cx, y0))
        p.quarter((cx, y0 + r), r, r, -90, 0).quarter((cx, y0 + r), r, r, 0, 90)
        return p.line((x_stem, y1)).close().d()
    p = Pen().move((x_stem, y0)).line((x_stem, y1), (cx, y1))
    p.quarter((cx, y0 + r), r, r, 90, 0)
    p.quarter((cx, y0 + r), r, r, 0, -90)
    return p.close().d()


def letter_r(x: float, hole_same_way: bool = False) -> str:
    p = Pen().move((x, TOP))
    bowl_outline(p, x, TOP, 44, 32)  # bowl centre (x + 15, 27), radius 17
    p.line((x + 34, BASE), (x + 23, BASE), (x + 12, 47), (x + S, 47), (x + S, BASE))
    p.line((x, BASE)).close()
    # defect variant: the counter runs the same way round as the outline
    hole = bowl_hole(x + S, 20, 34, 15, same_way=hole_same_way)
    return f"{p.d()} {hole}"


def letter_b(x: float, bad_handle: bool = False) -> str:
    p = Pen().move((x, TOP))
    bowl_outline(p, x, TOP, 38, 30)  # upper bowl centre (x + 16, 24), radius 14
    p.line((x + 20, 40), (x + 20, 42))  # waist notch
    r, cx = 14.0, x + 20
    p.quarter((cx, 42 + r), r, r, -90, 0)
    if bad_handle:
        # defect: the second handle sits on the end point (the tangent there comes from the
        # first handle)
        p.curve((cx + r, 42 + r + K * r), (cx, BASE), (cx, BASE))
    else:
        p.quarter((cx, 42 + r), r, r, 0, 90)
    p.line((x, BASE)).close()
    upper = bowl_hole(x + S, 20, 28, 10)
    lower = bowl_hole(x + S, 52, 60, 14)
    return f"{p.d()} {upper} {lower}"


def letter_o(x: float, kink: bool = False, jump: bool = False, off_extremum: bool = False) -> str:
    rx, ry = 20.0, 30.0
    c = (x + rx, (TOP + BASE) / 2)
    p = Pen().move((c[0], c[1] - ry))
    if off_extremum:
        # defect: the right side is drawn as one arc from the top to the bottom point, so
        # its x extremum has no on-curve point
        p.curve((c[0] + 1.3333 * rx, c[1] - ry), (c[0] + 1.3333 * rx, c[1] + ry), (c[0], c[1] + ry))
    else:
        p.quarter(c, rx, ry, -90, 0)
        if kink:
            # defect: the outgoing handle is turned by about 3°
            p.curve(
                (c[0] + rx - 0.88, c[1] + K * ry), (c[0] + K * rx, c[1] + ry), (c[0], c[1] + ry)
            )
        else:
            p.quarter(c, rx, ry, 0, 90)
    p.quarter(c, rx, ry, 90, 180).quarter(c, rx, ry, 180, 270).close()
    hx, hy = 10.0, 20.0
    h = Pen().move((c[0], c[1] - hy)).quarter(c, hx, hy, 270, 180)
    if jump:
        # defect: tangent-continuous but the handle is 40 % longer: a curvature jump
        h.curve((c[0] - hx, c[1] + K * 1.4 * hy), (c[0] - K * hx, c[1] + hy), (c[0], c[1] + hy))
    else:
        h.quarter(c, hx, hy, 180, 90)
    h.quarter(c, hx, hy, 90, 0).quarter(c, hx, hy, 0, -90).close()
    return f"{p.d()} {h.d()}"


def letter_u(x: float, cusp: bool = False) -> str:
    w, r = 36.0, 18.0
    cy = BASE - r
    p = Pen().move((x, TOP)).line((x + S, TOP), (x + S, cy))
    ri = r - S
    p.quarter((x + r, cy), ri, ri, 180, 90).quarter((x + r, cy), ri, ri, 90, 0)
    p.line((x + w - S, TOP), (x + w, TOP), (x + w, cy))
    p.quarter((x + r, cy), r, r, 0, 90)
    if cusp:
        # defect: the handles cross over, so the curve turns back on itself (a cusp)
        # P2 = P1 + P0 − P3 makes a + 2b + c = 0 (with a, b, c the control-polygon legs), so
        # B′(½) = 0: a cusp at t = ½, at (x + 10.5, 76)
        p.curve((x + 2, 72), (x + 20, 90), (x, cy))
    else:
        p.quarter((x + r, cy), r, r, 90, 180)
    return p.close().d()


# Join intent is stored in OutlineBench's own namespace: one string per contour, separated by
# ";", one letter per join: s = smooth, c = corner, - = not stated.
JOINS = {}


def svg(width: float, height: float, title: str, paths: list[tuple[str, str]]) -> str:
    def attrs(pid: str) -> str:
        return f' ob:joins="{JOINS[pid]}"' if pid in JOINS else ""

    body = "\n".join(
        f'  <path id="{pid}"{attrs(pid)} d="{d}" fill="#1d3557" fill-rule="nonzero"/>'
        for pid, d in paths
    )
    return (
        '<?xml version="1.0" encoding="UTF-8"?>\n'
        '<svg xmlns="http://www.w3.org/2000/svg" xmlns:ob="urn:outlinebench:join-intent" '
        f'width="{fmt(width)}mm" height="{fmt(height)}mm" '
        f'viewBox="0 0 {fmt(width)} {fmt(height)}">\n'
        f"  <title>{title}</title>\n{body}\n</svg>\n"
    )


def lettering(defects: bool) -> str:
    JOINS.clear()
    # the H states its intent: every join a corner
    JOINS["letter-H"] = "c" * 12
    # the A states corners everywhere, but in the defects file join 1 (at the right foot) is
    # marked smooth although it turns 104°: a corner against the stated intent
    JOINS["letter-A"] = "cccccccc;ccc" if not defects else "cscccccc;ccc"
    paths = [
        ("letter-H", letter_h(10)),
        ("letter-A", letter_a(52, hole_crosses=defects)),
        ("letter-R", letter_r(98, hole_same_way=defects)),
        ("letter-B", letter_b(140, bad_handle=defects)),
        ("letter-O", letter_o(182, kink=defects, jump=defects)),
        ("letter-U", letter_u(230, cusp=defects)),
        ("letter-R2", letter_r(272)),
    ]
    if defects:
        # H without its close command, stopping 0.4 mm short of its start (a gap), and with a
        # 0.005 mm sliver segment inserted on its right stem
        h = letter_h(10).replace(" Z", " L10,10.4").replace("L46,70", "L46,69.995 L46,70")
        paths[0] = ("letter-H", h)
        # a second O drawn with one wide arc (missing extremum) for the sign's border dot
        paths.append(("letter-O2", letter_o(318, off_extremum=True)))
        # a stray underline stroke, open, nowhere near anything else
        paths.append(("underline", "M10,76 L100,76"))
        # a figure-eight flourish that crosses itself
        paths.append(("flourish", "M110,76 C120,70 130,82 140,76 C130,70 120,82 110,76 Z"))
    title = "Harbour Lane Signs: HARBOUR lettering" + (" (with planted defects)" if defects else "")
    return svg(370 if defects else 320, 80, title, paths)


def bracket(defects: bool) -> str:
    # An L-shaped mounting bracket, 120 × 80 mm, 20 mm wide arms, 6 mm outside corner radii,
    # an inside fillet of 8 mm, two 8 mm mounting holes and a 20 × 8 mm adjustment slot.
    p = Pen().move((16, 10)).line((104, 10))
    p.quarter((104, 16), 6, 6, -90, 0).line((110, 24))
    p.quarter((104, 24), 6, 6, 0, 90).line((44, 30))
    p.quarter((44, 38), 8, 8, -90, -180)  # inside fillet
    p.line((36, 84))
    p.quarter((30, 84), 6, 6, 0, 90).line((16, 90))
    p.quarter((16, 84), 6, 6, 90, 180).line((10, 16))
    p.quarter((16, 16), 6, 6, 180, 270).close()
    outer = p.d()

    def hole(cx: float, cy: float, r: float) -> str:
        h = Pen().move((cx + r, cy))
        for a0 in (0, -90, -180, -270):
            h.quarter((cx, cy), r, r, a0, a0 - 90)
        return h.close().d()

    def slot(x0: float, x1: float, cy: float, r: float) -> str:
        s = Pen().move((x0, cy - r)).quarter((x0, cy), r, r, -90, -180)
        s.quarter((x0, cy), r, r, 180, 90).line((x1, cy + r))
        s.quarter((x1, cy), r, r, 90, 0).quarter((x1, cy), r, r, 0, -90)
        return s.close().d()

    holes = [hole(23, 20, 4), hole(23, 78, 4), slot(70, 82, 20, 4)]
    if defects:
        # the lower mounting hole is left open, its last arc ending 0.5 mm short of its start
        h = Pen().move((27, 78))
        for a0 in (0, -90, -180):
            h.quarter((23, 78), 4, 4, a0, a0 - 90)
        h.curve((23 + K * 4, 82), (27, 78 + K * 4), (27, 78.5))
        holes[1] = h.d()
        # the slot's lower straight side is bent in the middle by 0.3 mm (kinks)
        holes[2] = slot(70, 82, 20, 4).replace("L82,24", "L76,24.3 L82,24")
    d = " ".join([outer, *holes])
    title = "Kestrel Fabrication: mounting bracket KF-12" + (
        " (with planted defects)" if defects else ""
    )
    return svg(120, 100, title, [("bracket", d)])


def main() -> None:
    (HERE / "signshop-lettering.svg").write_text(lettering(False), encoding="utf-8")
    (HERE / "signshop-lettering-defects.svg").write_text(lettering(True), encoding="utf-8")
    (HERE / "workshop-bracket.svg").write_text(bracket(False), encoding="utf-8")
    (HERE / "workshop-bracket-defects.svg").write_text(bracket(True), encoding="utf-8")


if __name__ == "__main__":
    main()
