"""The editor's visual language: colours, sizes and mark shapes, in one place.

Marks (sizes in logical pixels, independent of zoom):

* smooth join — a capsule lying along the tangent, teal: the curve runs straight through it;
* corner join — a triangle pointing where the corner points, rust: the outline turns here;
* filled marks are stated intent; hollow marks are inferred from the angle (no intent stated);
* start of an open contour — a bar across the tangent; end — an arrowhead in travel direction;
* handles — hollow dots in their join's colour, joined to their on-curve point by a thin line
  of the same colour, so a smooth join reads as one straight teal bar through the point;
* selected points — an amber ring; the point under the pointer — a thin ring.

Findings (from :mod:`outlinebench.diagnostics`) are frames drawn AROUND the place, so the
join mark inside stays readable; the frame's shape tells the severity even without colour:

* error — a diamond frame, crimson, with a faint crimson wash;
* warning — a square frame, ochre;
* info — a small dotted square, slate grey (hidden with the info filter);
* the finding picked in the findings list — the same frame drawn again, larger and doubled.

Curvature comb: olive teeth (normals of length scale·κ, on the side the curve bends) and a
darker olive line through their tips; a step in that line at a join is a curvature jump.
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
    "MARK_FULL_SPACING_PX",
    "MARK_HIDE_SPACING_PX",
    "MARK_SCALES",
    "MARK_FULL_SIZE_PX",
    "MARK_HIDE_SIZE_PX",
    "FINDING_ERROR",
    "FINDING_WARNING",
    "FINDING_INFO",
    "FINDING_COLOURS",
    "FINDING_WASH",
    "FINDING_SIZE",
    "COMB_TOOTH",
    "COMB_EDGE",
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
# Marks thin out at low zoom (canvas_painter.mark_scale): a contour whose neighbouring
# on-curve points lie at least MARK_FULL_SPACING_PX apart on screen (median) gets full-size
# marks; closer, its marks shrink to the next of MARK_SCALES; below MARK_HIDE_SPACING_PX its
# points are not marked at all (a join mark reaches 1.45 · MARK_SIZE = 7 px from its point:
# two marks closer than about twice that overlap each other and the stroke between them).
MARK_FULL_SPACING_PX = 60.0
MARK_HIDE_SPACING_PX = 30.0
# The same by the larger side of the contour's box on screen: a letter 120 px tall carries
# about ten marks of 14 px across its strokes, which then hide the letter's shape.
MARK_FULL_SIZE_PX = 240.0
MARK_HIDE_SIZE_PX = 120.0
MARK_SCALES = (1.0, 0.8, 0.6)

FINDING_ERROR = QColor("#c3122f")  # crimson: redder and darker than the corner rust
FINDING_WARNING = QColor("#a87400")  # ochre: darker and browner than the selection amber
FINDING_INFO = QColor("#6f7a86")  # slate grey: present but quiet
FINDING_COLOURS = {"error": FINDING_ERROR, "warning": FINDING_WARNING, "info": FINDING_INFO}
FINDING_WASH = QColor(195, 18, 47, 36)  # inside an error's diamond
FINDING_SIZE = {"error": 11.0, "warning": 9.0, "info": 6.0}  # half-width of the frame, px

COMB_TOOTH = QColor(128, 142, 52, 150)  # the normals
COMB_EDGE = QColor("#5b6b12")  # the line through the tips
