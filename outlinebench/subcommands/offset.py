"""``outlinebench offset FILE --distance d``: toolpaths of the filled region, verified.

Each outline's closed contours are offset together as the region they fill under the
outline's fill rule (:func:`outlinebench.geometry.offset_region`): the region grows for d > 0
and shrinks for d < 0 by the tool radius |d|, and the toolpaths of one part never cross.
Where the material (shrinking) or the gap between parts (growing) is narrower than the tool,
that part vanishes: ``vanishes`` with the place and the width. Inside corners the tool rounds
are one ``tool-does-not-fit`` summary per outline (info: the normal case of routing, with the
count and the smallest radius), and individual findings only where the tool leaves material
deeper than the tolerance. Separate outlines whose toolpaths overlap (neighbouring letters)
are ``toolpaths-overlap`` errors with the place and area, or one merged region with
``--merge-outlines``. Open contours move to the side of their normal (T_y, −T_x).

Before anything is written the toolpaths are verified independently
(:func:`outlinebench.geometry.verify_toolpaths`): no toolpath crosses itself or another, every
point is |d| ± ε from the region. A violation is an ``unverified-toolpath`` error and no cut
file is written. ``--json`` prints the toolpaths as polylines with the findings and the
per-stage times; ``-o OUT.svg`` writes the cut file atomically, with the cutting caution.
Exit code 0 when no finding of warning level or worse, 1 otherwise, 2 for unreadable input
or a refused output.
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

import numpy as np

from outlinebench.api.cutting import offset_document, result_outline
from outlinebench.diagnostics.findings import ERROR, Finding, is_problem
from outlinebench.diagnostics.report import format_finding
from outlinebench.errors import OutlinebenchError
from outlinebench.io import CUT_CAUTION, write_file_atomic
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    TOLERANCE_RULE,
    add_glyphs_option,
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
        "--merge-outlines",
        action="store_true",
        help="merge the toolpaths of separate outlines that overlap into one region (their "
        "union: touching lettering cut as one piece); by default overlaps are reported",
    )
    parser.add_argument("-o", "--output", metavar="OUT.svg", help="write the polylines here")
    add_glyphs_option(parser)
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of distance, tolerance and output: the SVG root's user units (default) "
        "or mm, in, pt, px",
    )


def _finding(
    kind: str,
    severity: str,
    outline: int,
    contour: int,
    segment: int | None,
    t: float | None,
    x: float,
    y: float,
    value: float | None,
    unit: str,
    message: str,
    limit: float | None = None,
) -> Finding:
    return Finding(
        kind=kind, severity=severity, outline=outline, contour=contour, segment=segment, t=t,
        x=x, y=y, value=value, unit=unit, message=message, limit=limit,
    )  # fmt: skip


def run(args: argparse.Namespace) -> int:
    """Offset every outline of ``args.file``; exit 1 when the tool does not fit somewhere or
    the toolpaths failed their verification (then nothing is written)."""
    if args.output:
        refuse_overwrite(args.output, [args.file])
    doc, notes = read_document(args.file, glyphs=args.glyphs)
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
    result = offset_document(doc, d_user, tol_user, merge=args.merge_outlines)
    findings: list[Finding] = []
    for kind, sev, oi, gi, seg, t, x, y, value, message in result["problems"]:
        src = doc.outlines[oi].source_index
        findings.append(
            _finding(kind, sev, src if src >= 0 else oi, gi, seg, t, x * f, y * f,
                     None if value is None else value * f, args.units, message,
                     limit=abs(args.distance))
        )  # fmt: skip
    refs = {r.global_index: r for r in doc.contour_refs()}
    first_of = {}
    for r in refs.values():
        first_of.setdefault(r.outline, r.global_index)
    for ov in result["overlaps"]:
        a, b = ov.first, ov.second
        oa, ob = result_outline(result, a), result_outline(result, b)
        findings.append(
            _finding("toolpaths-overlap", ERROR, doc.outlines[ob].source_index,
                     first_of.get(ob, 0), None, None, ov.x * f, ov.y * f, ov.area * f * f,
                     f"{args.units}^2", f"the toolpaths of outline {oa} and outline {ob} "
                     f"overlap ({ov.area * f * f:.4g} {unit_words(args.units)}²): the cuts "
                     "run into each other; offset less, or merge them with --merge-outlines"
                     + (f"; {ov.unlisted} more pairs of outlines overlap or were not examined "
                        "(the caps of outlinebench.limits)" if ov.unlisted else ""))
        )  # fmt: skip
    for v in result["violations"]:
        findings.append(
            _finding("unverified-toolpath", ERROR, -1, -1, None, None, v.x * f, v.y * f,
                     None if v.value is None else v.value * f, args.units,
                     f"{v.kind}: {v.message}")
        )  # fmt: skip
    verified = not result["violations"]
    contours = result["toolpaths"]
    if args.output:
        if not verified:
            raise OutlinebenchError(
                f"{args.output}: not written: the toolpaths failed their verification "
                f"({result['violations'][0].kind}: {result['violations'][0].message}); "
                "a cut file must be right or absent"
            )
        comment = (
            f"Offset of {Path(args.file).name} by {args.distance:g} {unit_words(args.units)} "
            f"with tolerance {args.tolerance:.6g} {unit_words(args.units)}, by outlinebench; "
            f"toolpaths verified (no crossings, distance within the tolerance); "
            f"{sum(is_problem(x) for x in findings)} findings of warning level or worse; "
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
                "verified": verified,
                "caution": CUT_CAUTION,
                "times": result["times"],
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
            f"{args.file}: {len(contours)} toolpaths, {len(findings)} findings "
            f"({sum(is_problem(x) for x in findings)} of warning level or worse); "
            + ("toolpaths verified" if verified else "toolpaths FAILED verification")
        )
        if args.output:
            print(f"wrote {args.output}")
        print(CUT_CAUTION)
    return 1 if any(is_problem(x) for x in findings) else 0
