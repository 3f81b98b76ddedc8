"""``outlinebench deviation CURVES.svg POLYLINES.svg``: how far a polyline strays from a curve.

For a polyline version of an outline made elsewhere (a CAM export, a cutter's own
flattening), the contours of the two files are matched in document order, one to one, and for
each pair the Hausdorff distance between curve and polyline is measured
(:func:`outlinebench.geometry.polyline_deviation`), with where it occurs and whether it exceeds
the tolerance. Where the second file still has curves, they are measured as curves: flattened
within 1/1000 of the tolerance by a proven bound that is added to the stated accuracy (the
triangle inequality of the Hausdorff distance), never replaced by their control points; a
contour identical to its match gives exactly 0. Exit codes as for ``check``: 0 all within,
1 some exceed, 2 a file cannot be read or the contour counts differ.
"""

from __future__ import annotations

import argparse
import sys
from typing import Any

import numpy as np

from outlinebench.errors import OutlinebenchError
from outlinebench.geometry.deviation import polyline_deviation
from outlinebench.geometry.flatten import flatten_contours_bounded
from outlinebench.model.document import Contour
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    TOLERANCE_RULE,
    positive_float,
    read_document,
    require_segments,
    tolerance_user,
    unit_factor,
    unit_words,
    write_json,
)

__all__ = ["NAME", "HELP", "add_arguments", "run"]

NAME = "deviation"
HELP = "measure how far the polylines of one file stray from the curves of another"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench deviation``."""
    parser.add_argument("curves", metavar="CURVES.svg", help="SVG file with the designed curves")
    parser.add_argument(
        "polylines", metavar="POLYLINES.svg", help="SVG file with their polyline versions"
    )
    parser.add_argument(
        "--tolerance",
        type=positive_float,
        default=None,
        metavar="EPS",
        help=f"largest allowed deviation, in --units ({TOLERANCE_RULE})",
    )
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of the tolerance and the reported distances: the curve file's user units "
        "(default) or mm, in, pt, px",
    )


# The curves of the second file, when it has curves, are flattened within this fraction of
# the tolerance (a proven bound) and the flattening's bound is added to the measuring accuracy
# (Hausdorff distance obeys the triangle inequality): the measurement stays a proven one.
_CURVE_FLATTEN_SHARE = 1e-3


def _same_contour(a: Any, b: Any, scale: float) -> bool:
    """The two contours have the same segments, point for point (after scaling)."""
    if a.closed != b.closed or len(a.segments) != len(b.segments):
        return False
    return all(
        sa.shape == sb.shape and np.array_equal(sa, sb * scale)
        for sa, sb in zip(a.segments, b.segments, strict=True)
    )


def run(args: argparse.Namespace) -> int:
    """Measure every matched pair; exit 0 when all are within the tolerance, else 1."""
    curves, notes_a = read_document(args.curves)
    polys, notes_b = read_document(args.polylines)
    for notes in (notes_a, notes_b):
        for note in notes:
            print(f"outlinebench: {note}", file=sys.stderr)
    require_segments(curves, args.curves, "compare")
    require_segments(polys, args.polylines, "compare")
    a = [r for r in curves.contour_refs() if r.contour.segments]
    b = [r for r in polys.contour_refs() if r.contour.segments]
    if len(a) != len(b):
        raise OutlinebenchError(
            f"{args.polylines}: has {len(b)} contours with segments but {args.curves} has "
            f"{len(a)}; contours are matched one to one in document order",
            file=str(args.polylines),
        )
    f = unit_factor(curves, args.units)
    # the polyline file may use another scale: bring its coordinates to the curve file's units
    scale = polys.mm_per_unit / curves.mm_per_unit
    tol_user = tolerance_user(curves, args.tolerance, args.units)
    args.tolerance = tol_user * f
    rows: list[dict[str, Any]] = []
    any_exceeds = False
    for ra, rb in zip(a, b, strict=True):
        cb = rb.contour
        if _same_contour(ra.contour, cb, scale):
            # the same curve: the Hausdorff distance is 0 exactly
            p0 = ra.contour.segments[0][0]
            dev_row = (0.0, float(p0[0]), float(p0[1]), "curve", 0, 0.0, 0.0)
        else:
            extra = 0.0
            if any(len(sg) > 2 for sg in cb.segments):
                # true curves in the second file: compare with them, not their control points
                scaled = Contour(tuple(np.asarray(sg) * scale for sg in cb.segments), cb.closed)
                (pts,), bound = flatten_contours_bounded([scaled], tol_user * _CURVE_FLATTEN_SHARE)
                extra = float(bound[0])
            else:
                pts = cb.on_curve_points() * scale
            dev = polyline_deviation(ra.contour.segments, pts, closed=cb.closed, tolerance=tol_user)
            dev_row = (dev.distance, dev.x, dev.y, dev.on, dev.segment, dev.t, dev.accuracy + extra)
        dist, x, y, on, seg, t, acc = dev_row
        exceeds = dist - acc > tol_user
        any_exceeds = any_exceeds or exceeds
        rows.append(
            {
                "contour": ra.global_index,
                "max_deviation": dist * f,
                "x": x * f,
                "y": y * f,
                "on": "curve" if on == "curve" else "second file",
                "segment": seg,
                "t": t,
                "accuracy": acc * f,
                "exceeds": bool(exceeds),
            }
        )
    if args.json:
        write_json(
            {
                "curves": str(args.curves),
                "polylines": str(args.polylines),
                "units": args.units,
                "tolerance": args.tolerance,
                "max_deviation": max((r["max_deviation"] for r in rows), default=0.0),
                "exceeds": any_exceeds,
                "contours": rows,
            }
        )
    else:
        u = unit_words(args.units)
        for r in rows:
            flag = "EXCEEDS" if r["exceeds"] else "ok"
            print(
                f"{args.polylines}: contour {r['contour']}: deviation {r['max_deviation']:.6g} "
                f"{u} (± {r['accuracy']:.2g}) at ({r['x']:.8g}, {r['y']:.8g}) on the {r['on']}, "
                f"nearest segment {r['segment']} at t = {r['t']:.4f} [{flag}]"
            )
        bad = sum(r["exceeds"] for r in rows)
        print(f"{len(rows)} contours compared, {bad} exceed the tolerance {args.tolerance:.6g} {u}")
    return 1 if any_exceeds else 0
