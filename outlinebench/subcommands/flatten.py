"""``outlinebench flatten FILE --tolerance ε``: polylines within a guaranteed deviation.

Every contour of the file is flattened with
:func:`outlinebench.geometry.flatten.flatten_contours_bounded`: each chord is admitted by a
proven bound of its deviation from its curve piece (the exact closed-form extremes of two
cubics, or Wang's bound), and the reported ``max_deviation`` is the largest of those bounds
plus the rounding of the written coordinates — an upper bound of the Hausdorff distance
between each written polyline and its contour. (The independent measurement of any polyline
against the curves is ``outlinebench deviation``.)

Written coordinates are rounded to a decimal resolution r, the power of ten at or below
min(1e-6, ε/1000) in the unit written (mm in the SVG, ``--units`` in the JSON). Rounding
moves a vertex by at most r/√2, and every chord point by no more than its ends move, so the
flattening targets ε − r (r also covers the unit conversion's floating-point error) and the
reported bound includes r.

``--json`` prints ``{"contours": [{"closed", "points", ...}], "tolerance", "max_deviation",
"resolution"}`` (a closed contour's points do not repeat the first one; the closing chord is
implied); ``-o OUT.svg`` writes the polylines as a cut file in millimetres, atomically (a
temporary file renamed into place, so an error never leaves a partial file), with the cutting
caution and the resolution as XML comments. Lengths are in the document's user units unless
``--units`` says otherwise.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

import numpy as np

from outlinebench.api.cutting import flatten_document
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

__all__ = ["NAME", "HELP", "add_arguments", "run", "flatten_document"]

NAME = "flatten"
HELP = "turn curves into polylines whose deviation stays within a tolerance"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench flatten``."""
    parser.add_argument("file", metavar="FILE", help="SVG file to flatten")
    parser.add_argument(
        "--tolerance",
        type=positive_float,
        default=None,
        metavar="EPS",
        help=f"largest allowed deviation of a chord from its curve, in --units ({TOLERANCE_RULE})",
    )
    parser.add_argument("-o", "--output", metavar="OUT.svg", help="write the polylines here")
    add_glyphs_option(parser)
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of the tolerance and of reported lengths: the SVG root's user units "
        "(default) or mm, in, pt, px",
    )


def run(args: argparse.Namespace) -> int:
    """Flatten ``args.file``; exit 0, or 1 if a measured deviation exceeds the tolerance."""
    if args.output:
        refuse_overwrite(args.output, [args.file])
    doc, notes = read_document(args.file, glyphs=args.glyphs)
    for note in notes:
        print(f"outlinebench: {note}", file=sys.stderr)
    require_segments(doc, args.file, "flatten")
    f = unit_factor(doc, args.units)
    tol_user = tolerance_user(doc, args.tolerance, args.units)
    args.tolerance = tol_user * f  # in --units from here on
    # resolution of the written coordinates: JSON in --units, the cut file in mm
    k_json = output_decimals(args.tolerance)
    k_mm = output_decimals(tol_user * doc.mm_per_unit)
    rounding = 0.0
    if args.json:
        rounding = max(rounding, 10.0**-k_json / f)
    if args.output:
        rounding = max(rounding, 10.0**-k_mm / doc.mm_per_unit)
    result = flatten_document(doc, tol_user, rounding)
    exceeded = result["exceeded"]
    if args.output:
        comment = (
            f"Flattened from {Path(args.file).name} by outlinebench with tolerance "
            f"{args.tolerance:.6g} {unit_words(args.units)}; coordinates rounded to "
            f"{10.0**-k_mm:.0e} mm; proven largest deviation including that rounding "
            f"{result['max_deviation'] * f:.6g} {unit_words(args.units)}."
        )
        polys = [c["points"] for c in result["contours"]]
        data = cut_file_bytes(
            doc, polys, [c["closed"] for c in result["contours"]], comment, decimals=k_mm
        )
        write_file_atomic(args.output, data)
    if args.json:
        out = {
            "file": str(args.file),
            "units": args.units,
            "tolerance": args.tolerance,
            "max_deviation": result["max_deviation"] * f,
            "resolution": 10.0**-k_json,
            "caution": CUT_CAUTION,
            "contours": [
                {
                    **c,
                    "points": np.round(c["points"] * f, k_json).tolist(),
                    "max_deviation": c.get("max_deviation", 0.0) * f,
                }
                for c in result["contours"]
            ],
        }
        write_json(out)
    else:
        chords = sum(len(c["points"]) - (0 if c["closed"] else 1) for c in result["contours"])
        print(
            f"{args.file}: {len(result['contours'])} contours, {chords} chords, "
            f"tolerance {args.tolerance:.6g} {unit_words(args.units)}, proven largest "
            f"deviation {result['max_deviation'] * f:.6g} {unit_words(args.units)}"
            + (" — EXCEEDS the tolerance" if exceeded else "")
        )
        if args.output:
            print(f"wrote {args.output}")
        print(CUT_CAUTION)
    return 1 if exceeded else 0
