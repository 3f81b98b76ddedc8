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
import os
import sys
import tempfile
from pathlib import Path
from typing import Any

import numpy as np

from outlinebench.errors import OutlinebenchError
from outlinebench.geometry.flatten import DEFAULT_FLATTEN_TOLERANCE, flatten_contours_bounded
from outlinebench.model.document import Document
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    positive_float,
    read_document,
    unit_factor,
    write_json,
)

__all__ = [
    "NAME",
    "HELP",
    "CUT_CAUTION_TEXT",
    "add_arguments",
    "run",
    "write_atomic",
    "cut_file_bytes",
    "output_decimals",
    "MAX_OUTPUT_RESOLUTION",
]

# Coarsest resolution of written coordinates, in the unit written (mm in cut files): finer than
# any cutter's step; the resolution is also at most 1/1000 of the tolerance (output_decimals).
MAX_OUTPUT_RESOLUTION = 1e-6

NAME = "flatten"
HELP = "turn curves into polylines whose deviation stays within a tolerance"

# Used when the SVG reader's own caution constant is not available.
CUT_CAUTION_TEXT = (
    "Caution: verify these toolpaths in the machine's own preview before cutting, follow the "
    "machine maker's instructions, shop safety rules and local codes."
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench flatten``."""
    parser.add_argument("file", metavar="FILE", help="SVG file to flatten")
    parser.add_argument(
        "--tolerance",
        type=positive_float,
        default=DEFAULT_FLATTEN_TOLERANCE,
        metavar="EPS",
        help=f"largest allowed deviation of a chord from its curve, in --units "
        f"(default {DEFAULT_FLATTEN_TOLERANCE})",
    )
    parser.add_argument("-o", "--output", metavar="OUT.svg", help="write the polylines here")
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of the tolerance and of reported lengths: the SVG root's user units "
        "(default) or mm, in, pt, px",
    )


def write_atomic(path: str | Path, data: bytes) -> None:
    """Write ``data`` to ``path`` through a temporary file in the same folder and a rename.

    Raises
    ------
    OSError
        The folder is not writable (the temporary file is removed; ``path`` is untouched).
    """
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise


def output_decimals(tolerance: float) -> int:
    """Decimals k of written coordinates: 10^-k ≤ min(MAX_OUTPUT_RESOLUTION, tolerance / 1000).

    Parameters
    ----------
    tolerance : float
        The tolerance in the unit written (> 0).

    Returns
    -------
    int
        k ≥ 6; the resolution is 10^-k.
    """
    limit = min(MAX_OUTPUT_RESOLUTION, tolerance / 1000.0)
    return max(6, int(np.ceil(-np.log10(limit) - 1e-9)))


def cut_file_bytes(
    doc: Document,
    polylines: list[np.ndarray],
    closed: list[bool],
    comment: str,
    decimals: int | None = None,
) -> bytes:
    """An SVG cut file of polylines (document user units converted to mm).

    With ``decimals``, coordinates in mm are rounded to that many decimals (the caller
    accounts for the rounding in its stated deviation).

    Uses :func:`outlinebench.io.polylines_svg` (which writes the cutting caution as the first
    comment). The page keeps the document's size when known, else the polylines' extent.

    Raises
    ------
    OutlinebenchError
        A polyline cannot be written (fewer than 2 points, non-finite values).
    """
    from outlinebench.io import polylines_svg

    f = doc.mm_per_unit
    origin = np.array(doc.view_box[:2]) if doc.view_box else np.zeros(2)
    keep = [(p, c) for p, c in zip(polylines, closed, strict=True) if len(p) >= 2]
    pts_mm = [(p - origin) * f for p, _ in keep]
    if decimals is not None:
        pts_mm = [np.round(p, decimals) for p in pts_mm]
    width, height = doc.width_mm, doc.height_mm
    if not width or not height:
        if doc.view_box:
            width, height = doc.view_box[2] * f, doc.view_box[3] * f
        else:
            allp = np.vstack(pts_mm) if pts_mm else np.zeros((1, 2))
            width = max(float(np.max(allp[:, 0])), 1.0)
            height = max(float(np.max(allp[:, 1])), 1.0)
    try:
        return polylines_svg(
            pts_mm,
            width_mm=float(width),
            height_mm=float(height),
            comment=comment,
            closed=[c for _, c in keep],
        )
    except ValueError as exc:
        raise OutlinebenchError(f"cannot write the cut file: {exc}") from None


def flatten_document(doc: Document, tolerance: float, rounding: float = 0.0) -> dict[str, Any]:
    """Flatten every contour within ``tolerance − rounding`` (user units) with proven bounds.

    ``max_deviation`` per contour and overall is the proven chord bound plus ``rounding`` (the
    largest displacement of a written vertex), so it bounds the written polylines' deviation.
    """
    refs = list(doc.contour_refs())
    target = tolerance - rounding
    if not target > 0.0:
        raise OutlinebenchError(
            f"tolerance {tolerance:g} is not above the output resolution {rounding:g}"
        )
    polys, bounds = flatten_contours_bounded([r.contour for r in refs], target)
    contours = []
    worst = 0.0
    for r, poly, bound in zip(refs, polys, bounds, strict=True):
        entry: dict[str, Any] = {
            "outline": r.outline,
            "contour": r.global_index,
            "closed": bool(r.contour.closed),
            "points": poly,
        }
        if len(r.contour.segments):
            entry["max_deviation"] = float(bound) + rounding
            worst = max(worst, entry["max_deviation"])
        contours.append(entry)
    return {
        "contours": contours,
        "tolerance": tolerance,
        "max_deviation": worst,
        "exceeded": worst > tolerance,
    }


def run(args: argparse.Namespace) -> int:
    """Flatten ``args.file``; exit 0, or 1 if a measured deviation exceeds the tolerance."""
    doc, notes = read_document(args.file)
    for note in notes:
        print(f"outlinebench: {args.file}: {note}", file=sys.stderr)
    f = unit_factor(doc, args.units)
    tol_user = args.tolerance / f
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
            f"{args.tolerance:g} {args.units}; coordinates rounded to {10.0**-k_mm:.0e} mm; "
            f"proven largest deviation including that rounding "
            f"{result['max_deviation'] * f:.6g} {args.units}."
        )
        polys = [c["points"] for c in result["contours"]]
        data = cut_file_bytes(
            doc, polys, [c["closed"] for c in result["contours"]], comment, decimals=k_mm
        )
        write_atomic(args.output, data)
    if args.json:
        out = {
            "file": str(args.file),
            "units": args.units,
            "tolerance": args.tolerance,
            "max_deviation": result["max_deviation"] * f,
            "resolution": 10.0**-k_json,
            "caution": CUT_CAUTION_TEXT,
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
            f"tolerance {args.tolerance:g} {args.units}, proven largest deviation "
            f"{result['max_deviation'] * f:.6g} {args.units}"
            + (" — EXCEEDS the tolerance" if exceeded else "")
        )
        if args.output:
            print(f"wrote {args.output}")
        print(CUT_CAUTION_TEXT)
    return 1 if exceeded else 0
