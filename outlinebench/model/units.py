"""Length units of a document: user units and their size in mm, in, pt and px.

A document's user units (the SVG root's, or font units) have a physical size given by the
file's width, height and viewBox (:attr:`outlinebench.model.Document.mm_per_unit`); reports
convert lengths through it.
"""

from __future__ import annotations

import math

from outlinebench.errors import UnsupportedSvgFeature
from outlinebench.model.document import Document

__all__ = ["LENGTH_UNITS", "MM_PER", "mm_per", "axis_scales", "unit_factor"]

# Length units a user can ask for. "user" means the SVG root's user units after all
# transforms (the coordinates of the model).
LENGTH_UNITS: tuple[str, ...] = ("user", "mm", "in", "pt", "px")

# Millimetres per unit: 1 in = 25.4 mm exactly, 1 pt = 1/72 in, 1 px = 1/96 in (CSS Values
# and Units Level 3, §5.2 "Absolute lengths", as used by SVG).
MM_PER: dict[str, float] = {"mm": 1.0, "in": 25.4, "pt": 25.4 / 72.0, "px": 25.4 / 96.0}


def mm_per(unit: str, doc: Document) -> float:
    """Millimetres in one ``unit`` ("user" uses the document's own scale)."""
    if unit == "user":
        return doc.mm_per_unit
    return MM_PER[unit]


def axis_scales(doc: Document) -> tuple[float, float] | None:
    """Millimetres per user unit along x and along y when they differ, else None.

    Notes
    -----
    The root's viewBox maps onto its width × height; with ``preserveAspectRatio="none"`` x
    and y scale separately, by width/viewBox width and height/viewBox height (W3C SVG 1.1
    §7.8), and the reader gives ``mm_per_unit`` as their geometric mean. "meet" and "slice"
    scale both axes by the smaller or the larger of the two, so the scale is uniform when
    ``mm_per_unit`` equals either.
    """
    vb, w, h = doc.view_box, doc.width_mm, doc.height_mm
    if vb is None or w is None or h is None or vb[2] <= 0 or vb[3] <= 0:
        return None
    sx, sy = w / vb[2], h / vb[3]
    same = math.isclose(sx, sy, rel_tol=1e-9)
    if same or any(math.isclose(doc.mm_per_unit, s, rel_tol=1e-9) for s in (sx, sy)):
        return None
    return sx, sy


def unit_factor(doc: Document, unit: str) -> float:
    """Size of one user unit of ``doc`` expressed in ``unit`` (1.0 for "user").

    Raises
    ------
    outlinebench.errors.UnsupportedSvgFeature
        ``unit`` is not "user" and the file scales x and y differently
        (:func:`axis_scales`): no single factor converts its lengths.
    """
    if unit == "user":
        return 1.0
    scales = axis_scales(doc)
    if scales is not None:
        name = doc.path or "the document"
        raise UnsupportedSvgFeature(
            f'{name}: preserveAspectRatio="none" scales x by {scales[0]:.6g} and y by '
            f"{scales[1]:.6g} mm per user unit, so lengths have no single size in {unit}; "
            "use --units user"
        )
    return doc.mm_per_unit / MM_PER[unit]
