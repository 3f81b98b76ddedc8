"""Pure-numpy geometry of Bézier segments.

A segment is a float64 control-point array of shape ``(K, 2)`` with K = 2 (line), 3 (quadratic)
or 4 (cubic); a batch of same-degree segments has shape ``(M, K, 2)``. Functions never mutate
their inputs, print, or keep state. Validate foreign input once with :func:`as_control_points`.

Modules: ``bezier`` (evaluation, hodographs, split, elevation, power basis), ``curvature``
(signed κ, tangents and normals with degenerate-end fallback, inflections, cusps),
``quadrature`` (Gauss–Legendre and Gauss–Kronrod rules, batched adaptive integration),
``arclength`` (lengths, sub-range lengths, parameter at a length), ``extrema`` (x/y extrema,
tight boxes), ``area`` (Green's-theorem signed area), ``nearest`` (global nearest point),
``intersect`` (segment–segment and self-intersections), plus ``flatten``, ``offset`` and
``fit``. The core modules never return NaN for finite input: degenerate segments get defined
answers, documented per function.
"""

from outlinebench.geometry.arclength import (
    arc_length,
    arc_length_between,
    param_at_length,
    quadratic_arc_length,
    segment_lengths,
)
from outlinebench.geometry.area import segment_area_terms, signed_area
from outlinebench.geometry.bezier import (
    DEGREE_BY_KIND,
    KIND_BY_DEGREE,
    as_control_points,
    bernstein_matrix,
    degree,
    derivative,
    derivative_at,
    elevate,
    evaluate,
    power_coefficients,
    reverse,
    split,
    split_many,
    subsegment,
    to_cubic,
)
from outlinebench.geometry.boolean import (
    BOOLEAN_OPERATIONS,
    DEFAULT_BOOLEAN_TOLERANCE,
    FILL_RULES,
    BooleanResult,
    RegionContour,
    SegmentSource,
    boolean_op,
    remove_overlaps,
    winding_numbers,
)
from outlinebench.geometry.curvature import (
    curvature,
    cusps,
    end_curvatures,
    end_tangents,
    inflections,
    unit_normal,
    unit_tangent,
)
from outlinebench.geometry.deviation import Deviation, polyline_deviation
from outlinebench.geometry.extrema import bounding_box, extrema_params
from outlinebench.geometry.fit import (
    fit_chain,
    fit_cubic,
    fit_polyline,
    fit_polyline_schneider,
    max_deviation,
    polyline_corners,
)
from outlinebench.geometry.flatten import (
    DEFAULT_FLATTEN_TOLERANCE,
    chord_bound,
    flatten_contour,
    flatten_contours,
    flatten_contours_bounded,
    flatten_uniform_wang,
    optimal_chord_count,
)
from outlinebench.geometry.hausdorff import HausdorffBound, hausdorff_bound, polyline_hausdorff
from outlinebench.geometry.intersect import intersections, line_intersection, self_intersections
from outlinebench.geometry.nearest import distance_to, nearest_point
from outlinebench.geometry.offset import (
    DEFAULT_OFFSET_TOLERANCE,
    OffsetContour,
    OffsetOverlap,
    OffsetProblem,
    OffsetResult,
    RegionFinding,
    RegionOffset,
    ToolpathViolation,
    merge_offsets,
    offset_contour,
    offset_contours,
    offset_overlaps,
    offset_region,
    verify_toolpaths,
)
from outlinebench.geometry.quadrature import gauss_legendre

__all__ = [
    "DEGREE_BY_KIND",
    "KIND_BY_DEGREE",
    "as_control_points",
    "bernstein_matrix",
    "degree",
    "derivative",
    "derivative_at",
    "elevate",
    "evaluate",
    "power_coefficients",
    "reverse",
    "split",
    "split_many",
    "subsegment",
    "to_cubic",
    "curvature",
    "cusps",
    "end_curvatures",
    "end_tangents",
    "inflections",
    "unit_normal",
    "unit_tangent",
    "arc_length",
    "arc_length_between",
    "param_at_length",
    "quadratic_arc_length",
    "segment_lengths",
    "gauss_legendre",
    "bounding_box",
    "extrema_params",
    "signed_area",
    "segment_area_terms",
    "nearest_point",
    "distance_to",
    "intersections",
    "line_intersection",
    "self_intersections",
    "fit_chain",
    "fit_cubic",
    "max_deviation",
    "DEFAULT_FLATTEN_TOLERANCE",
    "Deviation",
    "chord_bound",
    "flatten_contour",
    "flatten_contours",
    "flatten_contours_bounded",
    "flatten_uniform_wang",
    "optimal_chord_count",
    "polyline_deviation",
    "DEFAULT_OFFSET_TOLERANCE",
    "OffsetContour",
    "OffsetProblem",
    "OffsetResult",
    "offset_contour",
    "offset_contours",
    "fit_polyline",
    "fit_polyline_schneider",
    "polyline_corners",
    "HausdorffBound",
    "hausdorff_bound",
    "polyline_hausdorff",
    "BOOLEAN_OPERATIONS",
    "DEFAULT_BOOLEAN_TOLERANCE",
    "FILL_RULES",
    "BooleanResult",
    "RegionContour",
    "SegmentSource",
    "boolean_op",
    "remove_overlaps",
    "winding_numbers",
    "OffsetOverlap",
    "RegionFinding",
    "RegionOffset",
    "ToolpathViolation",
    "merge_offsets",
    "offset_overlaps",
    "offset_region",
    "verify_toolpaths",
]
