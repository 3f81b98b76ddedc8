"""Tolerances of the checks, with documented defaults.

Lengths are given in millimetres, so one set of settings means the same physical thing for
every file; the checker converts them to each document's user units through
:attr:`outlinebench.model.Document.mm_per_unit`. Angles are in degrees; the curvature-jump
tolerance is a ratio.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from outlinebench.diagnostics.findings import INFO, SEVERITIES, WARNING
from outlinebench.errors import OptionError

__all__ = [
    "DEFAULT_GAP_MM",
    "DEFAULT_GAP_SEARCH_MM",
    "DEFAULT_KINK_ANGLE",
    "DEFAULT_CORNER_ANGLE",
    "DEFAULT_CURVATURE_JUMP",
    "DEFAULT_STRAIGHT_CURVATURE_PER_MM",
    "DEFAULT_EXTREMUM_OVERSHOOT_MM",
    "DEFAULT_CUSP_TOLERANCE",
    "DEFAULT_SAMPLES_PER_SEGMENT",
    "CheckSettings",
]

# Two points closer than this are the same point: ends within it count as joined, a segment
# shorter than it is tiny, a handle within it of its on-curve point is degenerate.
# Common practice, no source: 0.01 mm is the positioning resolution usually quoted for hobby
# and shop CNC routers, laser and vinyl cutters, so a smaller gap cannot be cut anyway.
DEFAULT_GAP_MM = 0.01

# Open contour ends farther apart than the gap tolerance but within this distance are reported
# as a gap (the outline was probably meant to continue there). Our choice, no source: 2 mm is
# well above drafting slips and below the spacing of separate letters on a sign.
DEFAULT_GAP_SEARCH_MM = 2.0

# A join whose tangent direction turns by at least this angle is not tangent-continuous (G1).
# Our choice, no source: 0.5° is about the smallest turn a drafter notices on a cut edge
# (a 0.5° turn across a 100 mm edge moves its end by 0.9 mm).
DEFAULT_KINK_ANGLE = 0.5

# A turn of at least this angle is taken as an intended corner when the file states no join
# intent; smaller turns (≥ the kink angle) look like mistakes and are reported as kinks.
# Our choice, no source.
DEFAULT_CORNER_ANGLE = 10.0

# Relative curvature difference |κ1 − κ2| / max(|κ1|, |κ2|) above which a tangent-continuous
# join is reported as a curvature jump (G2 break). Our choice, no source: 5 % is where the
# break starts to show as a flat or bright spot on a curvature comb.
DEFAULT_CURVATURE_JUMP = 0.05

# |κ| below this (per mm, i.e. a radius above 1 km) counts as straight, so two straight
# pieces meeting in line are not a curvature jump of 0/0. Common practice, no source.
DEFAULT_STRAIGHT_CURVATURE_PER_MM = 1e-6

# A segment whose interior x or y extremum lies more than this beyond its end points is
# reported as missing an extremum point. Our choice, no source (same size as the gap).
DEFAULT_EXTREMUM_OVERSHOOT_MM = 0.01

# Relative tolerance handed to the cusp search: |B′(t)| below this fraction of the segment's
# size (the larger side of its control-point box) counts as vanishing. Our choice, no source.
DEFAULT_CUSP_TOLERANCE = 1e-6

# Points per segment of the flattened copy used for the point-in-polygon test that decides
# which contour is a hole of which. Containment only needs a probe point well inside or
# outside; 8 is plenty for outlines whose contours do not touch. Our choice, no source.
DEFAULT_SAMPLES_PER_SEGMENT = 8


@dataclass(frozen=True, slots=True)
class CheckSettings:
    """Tolerances for :func:`outlinebench.diagnostics.check_document` and ``Checker``.

    Parameters
    ----------
    gap_mm : float
        Points closer than this are the same point (mm). Default :data:`DEFAULT_GAP_MM`.
    gap_search_mm : float
        Largest distance between open ends reported as a gap (mm).
    kink_angle : float
        Smallest tangent turn at a join that breaks G1 (degrees).
    corner_angle : float
        Smallest turn taken as an intended corner when the file states no intent (degrees).
    curvature_jump : float
        Largest allowed relative curvature difference at a tangent-continuous join.
    straight_curvature_per_mm : float
        |κ| below this (1/mm) counts as a straight piece.
    extremum_overshoot_mm : float
        Smallest overshoot of an interior extremum worth reporting (mm).
    cusp_tolerance : float
        Relative size below which the derivative counts as vanishing.
    samples_per_segment : int
        Density of the flattened copy used for containment (holes).
    curvature_jump_severity : str
        Severity of a curvature jump between two curved pieces (default ``"warning"``).
    straight_into_curve_severity : str
        Severity of a curvature jump where one side is straight (default ``"info"``: a line
        running tangentially into an arc is a deliberate construction in lettering and parts,
        and every such join breaks G2 by definition).
    missing_extremum_severity : str
        Severity of a missing extremum point (default ``"info"``; the ``type`` profile makes
        it a warning).

    Raises
    ------
    ValueError
        A tolerance that is negative or not finite, a corner angle not above the kink angle, or
        an unknown severity.
    """

    gap_mm: float = DEFAULT_GAP_MM
    gap_search_mm: float = DEFAULT_GAP_SEARCH_MM
    kink_angle: float = DEFAULT_KINK_ANGLE
    corner_angle: float = DEFAULT_CORNER_ANGLE
    curvature_jump: float = DEFAULT_CURVATURE_JUMP
    straight_curvature_per_mm: float = DEFAULT_STRAIGHT_CURVATURE_PER_MM
    extremum_overshoot_mm: float = DEFAULT_EXTREMUM_OVERSHOOT_MM
    cusp_tolerance: float = DEFAULT_CUSP_TOLERANCE
    samples_per_segment: int = DEFAULT_SAMPLES_PER_SEGMENT
    curvature_jump_severity: str = WARNING
    straight_into_curve_severity: str = INFO
    missing_extremum_severity: str = INFO

    def __post_init__(self) -> None:
        for name in (
            "gap_mm",
            "gap_search_mm",
            "kink_angle",
            "corner_angle",
            "curvature_jump",
            "straight_curvature_per_mm",
            "extremum_overshoot_mm",
            "cusp_tolerance",
        ):
            v = getattr(self, name)
            if not isinstance(v, (int, float)) or not math.isfinite(v) or v < 0:
                raise OptionError(f"setting {name} must be a finite number ≥ 0, got {v!r}")
        if not 0 < self.kink_angle < self.corner_angle <= 180:
            raise OptionError(
                f"need 0 < kink angle < corner angle ≤ 180 degrees, got kink {self.kink_angle}, "
                f"corner {self.corner_angle}"
            )
        if self.gap_search_mm < self.gap_mm:
            raise OptionError(
                f"the gap search distance ({self.gap_search_mm} mm) must not be below the gap "
                f"tolerance ({self.gap_mm} mm)"
            )
        if int(self.samples_per_segment) < 2:
            raise OptionError("samples_per_segment must be at least 2")
        for name in (
            "curvature_jump_severity",
            "straight_into_curve_severity",
            "missing_extremum_severity",
        ):
            if getattr(self, name) not in SEVERITIES:
                raise OptionError(f"{name} must be one of {', '.join(SEVERITIES)}")
