"""Cut files: polylines in millimetres, carrying the cutting caution as an XML comment."""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike

from outlinebench.errors import InvalidGeometryError, OptionError
from outlinebench.io.numbers import format_number
from outlinebench.io.svg_read import SVG_NS

__all__ = ["CUT_CAUTION", "polylines_svg"]

CUT_CAUTION = (
    "Caution: verify these toolpaths in the machine's own preview before cutting, follow the "
    "machine maker's instructions, shop safety rules and local codes."
)


def polylines_svg(
    contours_points: Sequence[ArrayLike],
    *,
    width_mm: float,
    height_mm: float,
    comment: str = "",
    closed: Sequence[bool] | None = None,
    stroke_mm: float = 0.1,
) -> bytes:
    """An SVG cut file of polylines in millimetres, carrying the cutting caution.

    Parameters
    ----------
    contours_points : sequence of array_like, each (N, 2)
        Points in millimetres (y down, as in SVG).
    width_mm, height_mm : float
        Page size; the viewBox is ``0 0 width_mm height_mm`` so one user unit is 1 mm.
    comment : str
        Extra text for an XML comment (tolerance used, source file, ...).
    closed : sequence of bool, optional
        Per contour: write a ``polygon`` (closed) instead of a ``polyline``.
    stroke_mm : float
        Stroke width for viewing.

    Returns
    -------
    bytes
        UTF-8 SVG whose first comment is :data:`CUT_CAUTION`.

    Raises
    ------
    ValueError
        Non-finite points, a contour with fewer than 2 points, or a bad size.
    """
    if not (width_mm > 0 and height_mm > 0 and math.isfinite(width_mm * height_mm)):
        raise OptionError(f"page size must be positive, got {width_mm} × {height_mm} mm")
    f = format_number
    w, h = f(width_mm), f(height_mm)
    out = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        f'<svg xmlns="{SVG_NS}" width="{w}mm" height="{h}mm" viewBox="0 0 {w} {h}">',
        f"<!-- {_comment_text(CUT_CAUTION)} -->",
    ]
    if comment:
        out.append(f"<!-- {_comment_text(comment)} -->")
    for k, pts in enumerate(contours_points):
        arr = np.asarray(pts, dtype=np.float64)
        if arr.ndim != 2 or arr.shape[1] != 2 or arr.shape[0] < 2:
            raise InvalidGeometryError(
                f"contour {k}: points must have shape (N >= 2, 2), got {arr.shape}"
            )
        if not np.all(np.isfinite(arr)):
            raise InvalidGeometryError(f"contour {k}: points must be finite")
        text = " ".join(f"{f(x)},{f(y)}" for x, y in arr.tolist())
        tag = "polygon" if closed is not None and closed[k] else "polyline"
        out.append(
            f'<{tag} points="{text}" fill="none" stroke="black" stroke-width="{f(stroke_mm)}"/>'
        )
    out.append("</svg>")
    return ("\n".join(out) + "\n").encode("utf-8")


def _comment_text(text: str) -> str:
    text = text.replace("--", "- -")
    return text[:-1] + "- " if text.endswith("-") else text
