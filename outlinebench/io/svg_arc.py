"""SVG elliptical arcs (endpoint form) converted to cubic Bézier segments within a stated error.

References
----------
W3C, *Scalable Vector Graphics (SVG) 1.1 (Second Edition)*, Appendix F.6 "Elliptical arc
implementation notes": F.6.2 (out-of-range parameters), F.6.5 (endpoint to centre
parameterization), F.6.6 (correction of out-of-range radii).
T. Dokken, M. Dæhlen, T. Lyche, K. Mørken, "Good approximation of circles by
curvature-continuous Bézier curves", CAGD 7 (1990); M. Goldapp, "Approximation of circular
arcs by cubic polynomials", CAGD 8 (1991) — the handle length 4/3·tan(θ/4) and its error.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import OptionError

__all__ = ["ARC_TOLERANCE", "arc_pieces", "arc_piece_error", "arc_to_cubics", "ArcResult"]

# Largest allowed distance between an arc and its cubic approximation, as a fraction of the
# ellipse's larger radius (a guaranteed bound, see arc_piece_error).
ARC_TOLERANCE = 1e-7

_TWO_PI = 2.0 * math.pi


def arc_piece_error(sweep: float) -> float:
    """Largest radial error of one cubic approximating a unit-circle arc of this sweep.

    Parameters
    ----------
    sweep : float
        Sweep angle θ in radians, 0 < |θ| ≤ π/2 in practice.

    Returns
    -------
    float
        ``e(θ) = (2/27) · sin⁶(θ/4) / cos²(θ/4)`` ≈ θ⁶ / 55296 for small θ.

    Notes
    -----
    With end handles of length h = 4/3·tan(θ/4) along the tangents, the cubic's distance from
    the centre never falls below the radius and exceeds it by at most e(θ): the radial
    deviation at t = 1/2 (Goldapp 1991), which equals the true maximum to leading order
    θ⁶/55296 and is slightly above it for larger sweeps (2.72567e-4 against the measured
    2.72530e-4 at θ = π/2); the tests check it stays above the measured maximum for sweeps up
    to π/2, which is all this module uses. An affine map with largest singular value ``s``
    moves the curve at most ``s·e(θ)`` from the image ellipse, and ``s`` is the ellipse's
    larger radius, so the bound holds for ellipses relative to max(rx, ry).
    """
    q = abs(sweep) / 4.0
    return (2.0 / 27.0) * math.sin(q) ** 6 / math.cos(q) ** 2


def arc_pieces(sweep: float, tolerance: float = ARC_TOLERANCE) -> int:
    """Number of equal cubic pieces so each stays within ``tolerance`` (relative to radius).

    Notes
    -----
    Start from the small-angle form θ_max = (55296·tolerance)^(1/6) of
    :func:`arc_piece_error`, then increase the count until the exact formula is met. Never
    fewer pieces than quarter turns (a piece sweeps at most 90°).
    """
    total = abs(sweep)
    if total == 0.0:
        return 0
    if tolerance <= 0.0 or not math.isfinite(tolerance):
        raise OptionError(f"arc tolerance must be a positive number, got {tolerance!r}")
    theta_max = (55296.0 * tolerance) ** (1.0 / 6.0)
    n = max(1, math.ceil(total / theta_max), math.ceil(total / (math.pi / 2.0) - 1e-12))
    while arc_piece_error(total / n) > tolerance:
        n += 1
    return n


class ArcResult:
    """What :func:`arc_to_cubics` made of one arc command.

    Attributes
    ----------
    kind : str
        "cubics", "line" (a zero radius, or radii whose ratio passes the largest double: an
        ellipse of zero width, SVG 1.1 F.6.2) or "none" (end point equals start point).
    cubics : ndarray, shape (N, 4, 2)
        The cubic pieces when kind is "cubics"; the first starts exactly at the start point
        and the last ends exactly at the end point.
    negative_radius : bool
        A radius was negative and its absolute value was used (SVG 1.1 F.6.6 step 1).
    radii_scaled : bool
        The radii were too small to reach the end point and were scaled up (F.6.6 step 3).
    """

    __slots__ = ("kind", "cubics", "negative_radius", "radii_scaled")

    def __init__(
        self,
        kind: str,
        cubics: NDArray[np.float64] | None = None,
        negative_radius: bool = False,
        radii_scaled: bool = False,
    ) -> None:
        self.kind = kind
        self.cubics = cubics if cubics is not None else np.zeros((0, 4, 2))
        self.negative_radius = negative_radius
        self.radii_scaled = radii_scaled


def arc_to_cubics(
    x1: float,
    y1: float,
    rx: float,
    ry: float,
    phi_degrees: float,
    large_arc: bool,
    sweep: bool,
    x2: float,
    y2: float,
    tolerance: float = ARC_TOLERANCE,
) -> ArcResult:
    """Convert an SVG endpoint arc to cubic Bézier pieces.

    Parameters
    ----------
    x1, y1 : float
        Start point (the current point).
    rx, ry : float
        Radii as written (negative values are made positive).
    phi_degrees : float
        Rotation of the ellipse's x axis, degrees.
    large_arc, sweep : bool
        The arc flags.
    x2, y2 : float
        End point.
    tolerance : float
        Largest distance from the true ellipse, as a fraction of max(rx, ry) after any radius
        correction. Default :data:`ARC_TOLERANCE`.

    Returns
    -------
    ArcResult
        Never drops an arc whose end points differ and whose radii are not zero: radii far
        larger than the chord give a near-straight cubic, radii too small are scaled up.
        Coordinates are not finite only when the arc itself does not fit in binary64 (the
        caller reports that as an overflow).

    Notes
    -----
    Follows SVG 1.1 Appendix F.6: an arc whose end point equals its start point is omitted
    (F.6.2); a zero radius makes a straight line (F.6.2); radii too small are scaled by √Λ
    with Λ = x1'²/rx² + y1'²/ry² (F.6.6).

    The arc is computed in the frame of its chord rather than from its centre (F.6.5), so
    that radii of any size, up to the largest double, neither overflow nor lose the arc to
    cancellation. Map the ellipse to the unit circle; there the chord's half length is
    L = √Λ ≤ 1, so the small arc sweeps δ = 2·asin(L) and the large one 2π − δ (exact
    for every size, where the centre-and-angles form loses everything once L is below the
    rounding of 1). With φ from −δ/2 to δ/2 and the chord along the x axis, the unit arc is
    X = sin φ, Y = cos φ − cos(δ/2) = 2·sin((δ/2 + φ)/2)·sin((δ/2 − φ)/2) (the product form
    has no cancellation), and the arc lies left of the chord when it turns in the negative
    angle direction (sweep-flag 0), right of it otherwise. Mapped back by
    p = M + R(φ_x)·diag(rx, ry)·(X·e + Y·n) with M the chord's midpoint, e the chord's unit
    direction and n its normal in the unit frame; diag(rx, ry)·e = −(x1', y1')/L, so the
    end points come out as ±(x1', y1') with no large intermediate. The sweep is split into
    :func:`arc_pieces` equal parts, each a cubic with handles 4/3·tan(σ/4) along the unit
    tangents (cos φ, −sin φ), mapped by the same affine map (exact for Béziers). Half-sums
    ``x1/2 + x2/2`` keep the midpoint and chord finite for coordinates near the largest
    double.
    """
    x1, y1, x2, y2 = float(x1), float(y1), float(x2), float(y2)
    rx, ry, phi_degrees = float(rx), float(ry), float(phi_degrees)
    negative = rx < 0.0 or ry < 0.0
    if x1 == x2 and y1 == y2:
        return ArcResult("none", negative_radius=negative)
    rx, ry = abs(rx), abs(ry)
    if rx == 0.0 or ry == 0.0:
        return ArcResult("line", negative_radius=negative)
    phi = math.radians(math.fmod(phi_degrees, 360.0))
    cos_phi, sin_phi = math.cos(phi), math.sin(phi)
    dx2, dy2 = x1 / 2.0 - x2 / 2.0, y1 / 2.0 - y2 / 2.0
    x1p = cos_phi * dx2 + sin_phi * dy2
    y1p = -sin_phi * dx2 + cos_phi * dy2
    half = math.hypot(x1p, y1p)
    if half == 0.0:  # end points one rounding step apart: the arc is that straight step
        return _straight(x1, y1, x2, y2, negative)
    # Half chord in the unit-circle frame, L = √Λ (hypot of the two ratios cannot overflow
    # unless a radius is below the chord by a factor of 1e308, then L is inf and scaled).
    ell = math.hypot(x1p / rx, y1p / ry)
    scaled = False
    if not ell <= 1.0:
        # F.6.6: rx·√Λ = √(x1'² + (y1'·rx/ry)²), written so that it cannot overflow when
        # the radii are tiny (√Λ alone can be inf); likewise ry·√Λ.
        rx, ry = math.hypot(x1p, y1p * (rx / ry)), math.hypot(x1p * (ry / rx), y1p)
        if not (math.isfinite(rx) and math.isfinite(ry)) or rx == 0.0 or ry == 0.0:
            # an aspect ratio beyond 1e308: an ellipse of zero width (F.6.2, a line)
            return ArcResult("line", negative_radius=negative, radii_scaled=True)
        ell = 1.0
        scaled = True
    small = 2.0 * math.asin(ell)
    delta = (_TWO_PI - small) if large_arc else small
    if delta == 0.0:  # radii beyond 1e308 times the chord: straight to the last digit
        return _straight(x1, y1, x2, y2, negative)
    n = arc_pieces(delta, tolerance)
    step = delta / n
    phis = -delta / 2.0 + step * np.arange(n + 1)
    phis[-1] = delta / 2.0
    big_x = np.sin(phis)
    big_y = 2.0 * np.sin((delta / 2.0 + phis) / 2.0) * np.sin((delta / 2.0 - phis) / 2.0)
    h = 4.0 / 3.0 * math.tan(step / 4.0)
    tx, ty = np.cos(phis), -np.sin(phis)
    u = np.empty((n, 4, 2))
    u[:, 0, 0], u[:, 0, 1] = big_x[:-1], big_y[:-1]
    u[:, 3, 0], u[:, 3, 1] = big_x[1:], big_y[1:]
    u[:, 1, 0] = big_x[:-1] + h * tx[:-1]
    u[:, 1, 1] = big_y[:-1] + h * ty[:-1]
    u[:, 2, 0] = big_x[1:] - h * tx[1:]
    u[:, 2, 1] = big_y[1:] - h * ty[1:]
    # Unit-frame axes mapped by diag(rx, ry): the chord direction e = −(x1'/rx, y1'/ry)/L
    # gives diag·e = −(x1', y1')/L; the normal on the arc's side gives diag·n =
    # ±(rx·(y1'/ry), −ry·(x1'/rx))/L (left of e for sweep-flag 0).
    side = -1.0 if sweep else 1.0
    ex, ey = -x1p / ell, -y1p / ell
    nx, ny = side * rx * (y1p / ry) / ell, -side * ry * (x1p / rx) / ell
    with np.errstate(over="ignore", invalid="ignore"):
        px = u[..., 0] * ex + u[..., 1] * nx
        py = u[..., 0] * ey + u[..., 1] * ny
        out = np.empty_like(u)
        out[..., 0] = cos_phi * px - sin_phi * py + (x1 / 2.0 + x2 / 2.0)
        out[..., 1] = sin_phi * px + cos_phi * py + (y1 / 2.0 + y2 / 2.0)
    # Shared end points exactly: the pieces' joins and the arc's own ends.
    out[1:, 0] = out[:-1, 3]
    out[0, 0] = (x1, y1)
    out[-1, 3] = (x2, y2)
    return ArcResult("cubics", out, negative_radius=negative, radii_scaled=scaled)


def _straight(x1: float, y1: float, x2: float, y2: float, negative: bool) -> ArcResult:
    """An arc straight to the last digit, as one cubic with handles at thirds of the chord."""
    out = np.empty((1, 4, 2))
    out[0, 0] = (x1, y1)
    out[0, 1] = (x1 + (x2 / 3.0 - x1 / 3.0), y1 + (y2 / 3.0 - y1 / 3.0))
    out[0, 2] = (x2 - (x2 / 3.0 - x1 / 3.0), y2 - (y2 / 3.0 - y1 / 3.0))
    out[0, 3] = (x2, y2)
    return ArcResult("cubics", out, negative_radius=negative)
