"""``outlinebench flatten FILE --tolerance ε``: polylines within a guaranteed deviation.

Every contour of the file is flattened with :func:`outlinebench.geometry.flatten_contours`
(each chord verified to stay within ε of its curve piece). The deviation of the result is
then measured independently (:func:`outlinebench.geometry.polyline_deviation`) and reported.
``--json`` prints ``{"contours": [{"closed", "points", ...}], "tolerance", "max_deviation"}``
(a closed contour's points do not repeat the first one; the closing chord is implied);
``-o OUT.svg`` writes the polylines as a cut file in millimetres, atomically (a temporary file
renamed into place, so an error never leaves a partial file), with the cutting caution as an
XML comment. Lengths are in the document's user units unless ``--units`` says otherwise.
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
from outlinebench.geometry.flatten import (
    DEFAULT_FLATTEN_TOLERANCE,
    flatten_contours,
    polyline_deviation,
)
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
]

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


def cut_file_bytes(
    doc: Document, polylines: list[np.ndarray], closed: list[bool], comment: str
) -> bytes:
    """An SVG cut file of polylines (document user units converted to mm).

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


def flatten_document(doc: Document, tolerance: float) -> dict[str, Any]:
    """Flatten every contour and measure the result (lengths in user units)."""
    refs = list(doc.contour_refs())
    polys = flatten_contours([r.contour for r in refs], tolerance)
    contours = []
    worst = 0.0
    exceeded = False
    for r, poly in zip(refs, polys, strict=True):
        entry: dict[str, Any] = {
            "outline": r.outline,
            "contour": r.global_index,
            "closed": bool(r.contour.closed),
            "points": poly.tolist(),
        }
        if len(r.contour.segments):
            dev = polyline_deviation(
                r.contour.segments, poly, closed=r.contour.closed, tolerance=tolerance
            )
            entry["max_deviation"] = dev.distance
            worst = max(worst, dev.distance)
            # the measurement is within ±accuracy of the true deviation
            exceeded = exceeded or dev.distance - dev.accuracy > tolerance
        contours.append(entry)
    return {
        "contours": contours,
        "tolerance": tolerance,
        "max_deviation": worst,
        "exceeded": exceeded,
    }


def run(args: argparse.Namespace) -> int:
    """Flatten ``args.file``; exit 0, or 1 if a measured deviation exceeds the tolerance."""
    doc, notes = read_document(args.file)
    for note in notes:
        print(f"outlinebench: {args.file}: {note}", file=sys.stderr)
    f = unit_factor(doc, args.units)
    tol_user = args.tolerance / f
    result = flatten_document(doc, tol_user)
    exceeded = result["exceeded"]
    if args.output:
        comment = (
            f"Flattened from {Path(args.file).name} by outlinebench with tolerance "
            f"{args.tolerance:g} {args.units}; measured largest deviation "
            f"{result['max_deviation'] * f:.6g} {args.units}."
        )
        polys = [np.array(c["points"]).reshape(-1, 2) for c in result["contours"]]
        data = cut_file_bytes(doc, polys, [c["closed"] for c in result["contours"]], comment)
        write_atomic(args.output, data)
    if args.json:
        out = {
            "file": str(args.file),
            "units": args.units,
            "tolerance": args.tolerance,
            "max_deviation": result["max_deviation"] * f,
            "caution": CUT_CAUTION_TEXT,
            "contours": [
                {
                    **c,
                    "points": (np.array(c["points"]) * f).tolist(),
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
            f"tolerance {args.tolerance:g} {args.units}, measured largest deviation "
            f"{result['max_deviation'] * f:.6g} {args.units}"
            + (" — EXCEEDS the tolerance" if exceeded else "")
        )
        if args.output:
            print(f"wrote {args.output}")
        print(CUT_CAUTION_TEXT)
    return 1 if exceeded else 0
