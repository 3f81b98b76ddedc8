"""Continuity at joins: G0 (position), G1 (tangent direction) and G2 (curvature).

Definitions follow G. Farin, *Curves and Surfaces for CAGD*, 5th ed., the chapter on
geometric continuity (G¹ and G² joins of Bézier curves) and the end-point curvature formula of
the Bézier-curve chapters (section numbers from memory, so not given), and B. A. Barsky and
T. D. DeRose, "Geometric continuity of parametric curves: three equivalent characterizations",
IEEE Computer Graphics and Applications 9(6), 1989 (Gⁿ as continuity of the unit tangent and
curvature, independent of parametrization):

G0
    The incoming segment ends where the outgoing one begins: |P_end − Q_start| ≤ tol. Within a
    contour of the model this holds exactly (segments share end points); it is tested between
    the ends of open contours (``contour_checks``), where a break is a *gap*.
G1
    The unit tangents agree: the turn angle θ = atan2(|d_in × d_out|, d_in · d_out) between
    the incoming end tangent d_in and the outgoing start tangent d_out is below the kink
    angle. A handle lying on its on-curve point gives no direction; the tangent then comes
    from the first non-zero derivative, i.e. the next distinct control point
    (:func:`outlinebench.geometry.end_tangents`).
G2
    G1 and equal signed curvature κ = (x′y″ − y′x″) / |B′|³ on both sides. At the ends of a
    degree-n Bézier this is κ(0) = ((n − 1)/n) · ((P1 − P0) × (P2 − P1)) / |P1 − P0|³
    (Farin, end-point curvature; :func:`outlinebench.geometry.end_curvatures`). The relative
    difference |κ1 − κ2| / max(|κ1|, |κ2|) is compared with a tolerance; a straight piece
    (|κ| below a small threshold, counted as 0) meeting a curve gives exactly 1.0.

The functions here classify joins from end tangents and curvatures that were already
computed for all segments at once, so a whole document's joins are judged in a few array
operations.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

__all__ = [
    "INTENT_NONE",
    "INTENT_SMOOTH",
    "INTENT_CORNER",
    "INTENT_CODE",
    "JOIN_OK",
    "JOIN_KINK",
    "JOIN_CORNER",
    "JOIN_CURVATURE_JUMP",
    "turn_angles",
    "relative_curvature_jump",
    "classify_joins",
]

# Join intent as small integers, so intents of many joins fit one array.
INTENT_NONE = 0
INTENT_SMOOTH = 1
INTENT_CORNER = 2
INTENT_CODE = {None: INTENT_NONE, "smooth": INTENT_SMOOTH, "corner": INTENT_CORNER}

# What a join is found to be.
JOIN_OK = 0
JOIN_KINK = 1
JOIN_CORNER = 2
JOIN_CURVATURE_JUMP = 3


def turn_angles(d_in: NDArray[np.float64], d_out: NDArray[np.float64]) -> NDArray[np.float64]:
    """Angle in degrees by which the direction turns from ``d_in`` to ``d_out``.

    Parameters
    ----------
    d_in, d_out : ndarray, shape (J, 2)
        Tangent directions (need not be unit length).

    Returns
    -------
    ndarray, shape (J,)
        θ in [0, 180]; 0 where either direction is the zero vector (no direction to compare).

    Notes
    -----
    θ = atan2(|a × b|, a · b), accurate for tiny and for near-180° angles alike, unlike
    arccos of the dot product.
    """
    cross = d_in[:, 0] * d_out[:, 1] - d_in[:, 1] * d_out[:, 0]
    dot = np.einsum("ij,ij->i", d_in, d_out)
    return np.degrees(np.arctan2(np.abs(cross), dot))


def relative_curvature_jump(
    k_in: NDArray[np.float64], k_out: NDArray[np.float64], straight: float
) -> NDArray[np.float64]:
    """|κ1 − κ2| / max(|κ1|, |κ2|) with near-zero curvature counted as straight.

    Parameters
    ----------
    k_in, k_out : ndarray, shape (J,)
        Signed curvature at the end of the incoming and the start of the outgoing segment.
    straight : float
        |κ| below this counts as 0.

    Returns
    -------
    ndarray, shape (J,)
        In [0, 2] (2 when the curve bends the other way with the same magnitude); 0 when both
        sides are straight; 1 when exactly one side is straight or has infinite curvature
        (a degenerate handle) and the other finite.
    """
    a = np.where(np.abs(k_in) < straight, 0.0, k_in)
    b = np.where(np.abs(k_out) < straight, 0.0, k_out)
    m = np.maximum(np.abs(a), np.abs(b))
    with np.errstate(invalid="ignore", divide="ignore"):
        rel = np.abs(a - b) / m
    inf_a, inf_b = np.isinf(a), np.isinf(b)
    rel = np.where(inf_a ^ inf_b, 1.0, rel)
    rel = np.where((m == 0.0) | (inf_a & inf_b), 0.0, rel)
    return rel


def classify_joins(
    d_in: NDArray[np.float64],
    d_out: NDArray[np.float64],
    k_in: NDArray[np.float64],
    k_out: NDArray[np.float64],
    intent: NDArray[np.int8],
    *,
    kink_angle: float,
    corner_angle: float,
    curvature_jump: float,
    straight: float,
) -> tuple[NDArray[np.int8], NDArray[np.float64], NDArray[np.float64]]:
    """Judge many joins at once.

    Parameters
    ----------
    d_in, d_out : ndarray, shape (J, 2)
        Incoming end tangent and outgoing start tangent of each join.
    k_in, k_out : ndarray, shape (J,)
        Signed curvature on each side.
    intent : ndarray of int8, shape (J,)
        :data:`INTENT_NONE`, :data:`INTENT_SMOOTH` or :data:`INTENT_CORNER`.
    kink_angle, corner_angle : float
        Degrees; see :class:`outlinebench.diagnostics.CheckSettings`.
    curvature_jump : float
        Relative tolerance for G2.
    straight : float
        |κ| below this counts as straight (same length unit as the curvatures).

    Returns
    -------
    verdict : ndarray of int8, shape (J,)
        :data:`JOIN_OK`, :data:`JOIN_KINK`, :data:`JOIN_CORNER` or :data:`JOIN_CURVATURE_JUMP`.
    angle : ndarray, shape (J,)
        Turn angle in degrees.
    jump : ndarray, shape (J,)
        Relative curvature difference (meaningful where the join is tangent-continuous).

    Notes
    -----
    Rules (issue "Continuity diagnostics"): θ ≥ corner angle is a corner; kink angle ≤ θ <
    corner angle is a kink unless the intent is "corner" (then a corner); θ below the kink
    angle is G1, and a relative curvature difference above the tolerance is a curvature jump
    (not checked where the intent is "corner").
    """
    angle = turn_angles(d_in, d_out)
    jump = relative_curvature_jump(k_in, k_out, straight)
    verdict = np.zeros(angle.shape, dtype=np.int8)
    corner = angle >= corner_angle
    bent = (angle >= kink_angle) & ~corner
    is_corner_intent = intent == INTENT_CORNER
    verdict[corner | (bent & is_corner_intent)] = JOIN_CORNER
    verdict[bent & ~is_corner_intent] = JOIN_KINK
    verdict[(angle < kink_angle) & ~is_corner_intent & (jump > curvature_jump)] = (
        JOIN_CURVATURE_JUMP
    )
    return verdict, angle, jump
