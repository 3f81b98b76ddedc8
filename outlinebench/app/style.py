"""The editor's visual language: colours, sizes and mark shapes, in one place.

Marks (sizes in logical pixels, independent of zoom):

* smooth join — a capsule lying along the tangent, teal: the curve runs straight through it;
* corner join — a triangle pointing where the corner points, rust: the outline turns here;
* filled marks are stated intent; hollow marks are inferred from the angle (no intent stated);
* start of an open contour — a bar across the tangent; end — an arrowhead in travel direction;
* handles — hollow dots in their join's colour, joined to their on-curve point by a thin line
  of the same colour, so a smooth join reads as one straight teal bar through the point;
* selected points — an amber ring; the point under the pointer — a thin ring.
"""

from __future__ import annotations

from PySide6.QtGui import QColor

__all__ = [
    "PAPER",
    "DESK",
    "PAGE_EDGE",
    "PAGE_SHADOW",
    "GRID_MINOR",
    "GRID_MAJOR",
    "OUTLINE",
    "OUTLINE_FILL",
    "SMOOTH",
    "CORNER",
    "ENDS",
    "SELECTED",
    "HOVER",
    "BAND_EDGE",
    "BAND_FILL",
    "DRAFT",
    "JOIN_COLOURS",
    "MARK_SIZE",
    "HANDLE_RADIUS",
    "PICK_RADIUS_PX",
    "MAX_MARKED_POINTS",
]

DESK = QColor("#e4e1d8")  # around the page
PAPER = QColor("#fbfaf6")  # the page (document width × height)
PAGE_EDGE = QColor("#b9b3a5")
PAGE_SHADOW = QColor("#d2cec3")  # opaque: blending a translucent shadow costs a frame
GRID_MINOR = QColor("#efece4")
GRID_MAJOR = QColor("#e0dccf")
OUTLINE = QColor("#1d2b36")
OUTLINE_FILL = QColor(64, 110, 140, 28)
SMOOTH = QColor("#13857f")
CORNER = QColor("#c2521c")
ENDS = QColor("#4d4a63")
SELECTED = QColor("#f0a800")
HOVER = QColor("#2f6fb3")
BAND_EDGE = QColor("#2f6fb3")
BAND_FILL = QColor(47, 111, 179, 30)
DRAFT = QColor("#8a3fa0")  # the contour being drawn

JOIN_COLOURS = {"smooth": SMOOTH, "corner": CORNER, "start": ENDS, "end": ENDS}

MARK_SIZE = 5.0  # half-length of a join mark, logical px
HANDLE_RADIUS = 3.2  # logical px
PICK_RADIUS_PX = 7.0  # how close the pointer must be to pick a point, logical px
# Above this many on-curve points in view, marks are left out (only the outline and the
# selection are drawn) so that painting stays within one frame; zooming in brings them back.
MAX_MARKED_POINTS = 1500
