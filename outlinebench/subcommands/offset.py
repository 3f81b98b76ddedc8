"""``outlinebench offset FILE --distance d --tolerance ε``: tool-radius offsets of every contour.

Closed contours move outward for d > 0 and inward for d < 0; a closed contour nested inside an
odd number of the other contours of its outline (a hole, by the even-odd rule) moves the other
way, so the material as a whole grows for d > 0 (``--per-contour`` offsets each contour from
its own area instead). Open contours move to the side of the normal (T_y, −T_x) (left of the
direction of travel as seen on an SVG page). Corners
turning away from the tool get round joins; loops are cut away
(:func:`outlinebench.geometry.offset_contour`). The places where the tool cannot fit are
reported as findings: ``tool-does-not-fit`` (a bend toward the tool on a radius smaller than
|d|: warning; a sharp corner toward the tool, which the tool rounds to radius |d|: info) and
``vanishes`` (a part or the whole contour narrower than the tool: error). A contour that
crosses itself is not offset and is reported as ``self-intersection`` (error); a fit that still
misses the tolerance after the deepest halving is ``offset-inaccurate`` (warning, the value is
the measured distance from the exact offset). ``--json`` prints the
offset contours as polylines (``{"closed", "points"}``) with the findings; ``-o OUT.svg``
writes the polylines as a cut file, atomically, with the cutting caution. Exit code 0 when no
finding of warning level or worse, 1 otherwise, 2 for unreadable input.
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path
from typing import Any

import numpy as np

from outlinebench.diagnostics.findings import ERROR, INFO, WARNING, Finding, is_problem
from outlinebench.diagnostics.report import format_finding
from outlinebench.geometry.offset import hole_flags, offset_contour
from outlinebench.io import CUT_CAUTION, write_file_atomic
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    TOLERANCE_RULE,
    cut_file_bytes,
    output_decimals,
    positive_float,
    read_document,
    refuse_overwrite,
    require_segments,
    tolerance_user,
    unit_factor,
    unit_words,
    write_json,
)

__all__ = ["NAME", "HELP", "add_arguments", "run"]

NAME = "offset"
HELP = "offset outlines by a tool radius and report where the tool cannot fit"


def _finite_float(text: str) -> float:
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if not math.isfinite(v):
        raise argparse.ArgumentTypeError(f"expected a finite number, got {text!r}")
    return v


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench offset``."""
    parser.add_argument("file", metavar="FILE", help="SVG file to offset")
    parser.add_argument(
        "--distance",
        type=_finite_float,
        required=True,
        metavar="D",
        help="offset distance in --units (the tool radius); > 0 outward for closed contours",
    )
    parser.add_argument(
        "--tolerance",
        type=positive_float,
        default=None,
        metavar="EPS",
        help=f"largest distance of the result from the exact offset, in --units ({TOLERANCE_RULE})",
    )
    parser.add_argument(
        "--per-contour",
        action="store_true",
        help="offset every closed contour outward from its own area, holes too (default: "
        "holes of an outline move the other way, so the material grows or shrinks as a whole)",
    )
    parser.add_argument("-o", "--output", metavar="OUT.svg", help="write the polylines here")
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of distance, tolerance and output: the SVG root's user units (default) "
        "or mm, in, pt, px",
    )


def run(args: argparse.Namespace) -> int:
    """Offset every contour of ``args.file``; exit 1 when the tool does not fit somewhere."""
    if args.output:
        refuse_overwrite(args.output, [args.file])
    doc, notes = read_document(args.file)
    for note in notes:
        print(f"outlinebench: {note}", file=sys.stderr)
    require_segments(doc, args.file, "offset")
    f = unit_factor(doc, args.units)
    args.tolerance = tolerance_user(doc, args.tolerance, args.units) * f  # in --units
    d_user = args.distance / f
    # written coordinates are rounded (JSON in --units, the cut file in mm; see
    # outlinebench.subcommands.flatten): the offset is computed within the tolerance less
    # that rounding, so the written polylines stay within the tolerance
    k_json = output_decimals(args.tolerance)
    k_mm = output_decimals(args.tolerance / f * doc.mm_per_unit)
    rounding = max(10.0**-k_json / f, 10.0**-k_mm / doc.mm_per_unit)
    tol_user = args.tolerance / f - rounding
    contours: list[dict[str, Any]] = []
    findings: list[Finding] = []
    holes: dict[tuple[int, int], bool] = {}
    if not args.per_contour:
        for oi, outline in enumerate(doc.outlines):
            for ci, flag in enumerate(hole_flags(outline.contours, tol_user)):
                holes[(oi, ci)] = flag
    for ref in doc.contour_refs():
        if not ref.contour.segments:
            continue  # a lone moveto draws nothing
        pts = np.vstack(ref.contour.segments)
        if float(np.ptp(pts, axis=0).max()) <= tol_user:
            # every control point within the tolerance of one place: no length, no area, so
            # no toolpath (common practice, no source: a dot is not cut)
            outline = doc.outlines[ref.outline].source_index
            findings.append(
                Finding(
                    kind="vanishes",
                    severity=WARNING,
                    outline=outline if outline >= 0 else ref.outline,
                    contour=ref.global_index,
                    segment=None,
                    t=None,
                    x=float(pts[0, 0]) * f,
                    y=float(pts[0, 1]) * f,
                    value=0.0,
                    unit=args.units,
                    message="the contour has no length (all its points coincide): no toolpath",
                )
            )
            continue
        # material grows for d > 0: outer boundaries move outward, holes inward
        d_here = -d_user if holes.get((ref.outline, ref.index), False) else d_user
        res = offset_contour(ref.contour.segments, ref.contour.closed, d_here, tol_user)
        for c in res.contours:
            contours.append(
                {
                    "outline": ref.outline,
                    "contour": ref.global_index,
                    "closed": c.closed,
                    "points": c.polyline,
                }
            )
        for p in res.problems:
            if p.kind in ("vanishes", "self-intersection"):
                severity = ERROR
            elif p.radius == 0.0:
                severity = INFO
            else:
                severity = WARNING
            outline = doc.outlines[ref.outline].source_index
            findings.append(
                Finding(
                    kind=p.kind,
                    severity=severity,
                    outline=outline if outline >= 0 else ref.outline,
                    contour=ref.global_index,
                    segment=p.segment,
                    t=p.t,
                    x=p.x * f,
                    y=p.y * f,
                    value=(
                        p.error * f
                        if p.error is not None
                        else None
                        if p.radius is None
                        else p.radius * f
                    ),
                    unit=args.units,
                    message=p.message,
                    limit=abs(args.distance),
                )
            )
    if args.output:
        comment = (
            f"Offset of {Path(args.file).name} by {args.distance:g} {unit_words(args.units)} "
            f"with tolerance {args.tolerance:.6g} {unit_words(args.units)}, by outlinebench; "
            f"{sum(is_problem(x) for x in findings)} places where the tool does not fit; "
            f"coordinates rounded to {10.0**-k_mm:.0e} mm (included in the tolerance)."
        )
        data = cut_file_bytes(
            doc,
            [c["points"] for c in contours],
            [c["closed"] for c in contours],
            comment,
            decimals=k_mm,
        )
        write_file_atomic(args.output, data)
    if args.json:
        write_json(
            {
                "file": str(args.file),
                "units": args.units,
                "distance": args.distance,
                "tolerance": args.tolerance,
                "resolution": 10.0**-k_json,
                "caution": CUT_CAUTION,
                "contours": [
                    {**c, "points": np.round(np.asarray(c["points"]) * f, k_json).tolist()}
                    for c in contours
                ],
                "findings": [x.to_dict() for x in findings],
            }
        )
    else:
        for x in findings:
            print(f"{format_finding(args.file, x)}: {x.message}")
        print(
            f"{args.file}: {len(contours)} offset contours, {len(findings)} findings "
            f"({sum(is_problem(x) for x in findings)} of warning level or worse)"
        )
        if args.output:
            print(f"wrote {args.output}")
        print(CUT_CAUTION)
    return 1 if any(is_problem(x) for x in findings) else 0
