"""``outlinebench deviation CURVES.svg POLYLINES.svg``: how far a polyline strays from a curve.

For a polyline version of an outline made elsewhere (a CAM export, a cutter's own
flattening), the contours of the two files are matched in document order, one to one, and for
each pair the Hausdorff distance between curve and polyline is measured
(:func:`outlinebench.geometry.polyline_deviation`), with where it occurs and whether it exceeds
the tolerance. Exit codes as for ``check``: 0 all within, 1 some exceed, 2 a file cannot be
read or the contour counts differ.
"""

from __future__ import annotations

import argparse
import sys
from typing import Any

from outlinebench.errors import OutlinebenchError
from outlinebench.geometry.flatten import DEFAULT_FLATTEN_TOLERANCE, polyline_deviation
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    positive_float,
    read_document,
    unit_factor,
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
        default=DEFAULT_FLATTEN_TOLERANCE,
        metavar="EPS",
        help=f"largest allowed deviation, in --units (default {DEFAULT_FLATTEN_TOLERANCE})",
    )
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of the tolerance and the reported distances: the curve file's user units "
        "(default) or mm, in, pt, px",
    )


def run(args: argparse.Namespace) -> int:
    """Measure every matched pair; exit 0 when all are within the tolerance, else 1."""
    curves, notes_a = read_document(args.curves)
    polys, notes_b = read_document(args.polylines)
    for path, notes in ((args.curves, notes_a), (args.polylines, notes_b)):
        for note in notes:
            print(f"outlinebench: {path}: {note}", file=sys.stderr)
    a = list(curves.contour_refs())
    b = list(polys.contour_refs())
    if len(a) != len(b):
        raise OutlinebenchError(
            f"{args.polylines}: has {len(b)} contours but {args.curves} has {len(a)}; "
            "contours are matched one to one in document order"
        )
    f = unit_factor(curves, args.units)
    # the polyline file may use another scale: bring its coordinates to the curve file's units
    scale = polys.mm_per_unit / curves.mm_per_unit
    tol_user = args.tolerance / f
    rows: list[dict[str, Any]] = []
    any_exceeds = False
    for ra, rb in zip(a, b, strict=True):
        pts = rb.contour.on_curve_points() * scale
        if not len(ra.contour.segments) or not len(pts):
            empty = args.curves if not len(ra.contour.segments) else args.polylines
            raise OutlinebenchError(f"{empty}: contour {ra.global_index} has no points")
        dev = polyline_deviation(
            ra.contour.segments, pts, closed=rb.contour.closed, tolerance=tol_user
        )
        exceeds = dev.distance - dev.accuracy > tol_user
        any_exceeds = any_exceeds or exceeds
        rows.append(
            {
                "contour": ra.global_index,
                "max_deviation": dev.distance * f,
                "x": dev.x * f,
                "y": dev.y * f,
                "on": dev.on,
                "segment": dev.segment,
                "t": dev.t,
                "accuracy": dev.accuracy * f,
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
        for r in rows:
            flag = "EXCEEDS" if r["exceeds"] else "ok"
            print(
                f"{args.polylines}: contour {r['contour']}: deviation {r['max_deviation']:.6g} "
                f"{args.units} at ({r['x']:.6g}, {r['y']:.6g}) on the {r['on']}, "
                f"segment {r['segment']} t={r['t']:.4f} [{flag}]"
            )
        bad = sum(r["exceeds"] for r in rows)
        print(
            f"{len(rows)} contours compared, {bad} exceed the tolerance "
            f"{args.tolerance:g} {args.units}"
        )
    return 1 if any_exceeds else 0
