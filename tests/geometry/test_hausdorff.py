"""Tests for outlinebench/geometry/hausdorff.py: two-sided Hausdorff distance, proven bounds."""

import math

import numpy as np
import pytest
import shapely

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.bezier import evaluate
from outlinebench.geometry.hausdorff import hausdorff_bound, polyline_hausdorff

# Samples per segment of the independent measurement (shapely on uniformly sampled
# polylines). The sampled polyline lies within Wang's bound Δt²·max|Pᵢ₊₂ − 2Pᵢ₊₁ + Pᵢ|·n(n−1)/8
# of its curve (Wang 1984, as in Filip, Magedson & Markot 1986), so the sampled distance is
# within the two curves' bounds of the true one.
SAMPLES = 2000


def sampled(segments):
    """Dense polyline of a chain, and Wang's bound of its distance from the chain."""
    t = np.linspace(0.0, 1.0, SAMPLES + 1)
    pts = np.vstack([evaluate(np.asarray(s, float), t) for s in segments])
    bound = 0.0
    for s in segments:
        s = np.asarray(s, float)
        n = s.shape[0] - 1
        if n >= 2:
            sd = s[2:] - 2 * s[1:-1] + s[:-2]
            bound = max(bound, n * (n - 1) * float(np.max(np.hypot(*sd.T))) / (8 * SAMPLES**2))
    return pts, bound


def reference(a, b):
    """shapely's discrete Hausdorff distance of the samples, and how far it can be off.

    The discrete distance of the vertex sets differs from the continuous one of the sampled
    polylines by at most half the longest sample step (every polyline point is that close to
    a vertex), and those from the curves by Wang's bounds.
    """
    pa, wa = sampled(a)
    pb, wb = sampled(b)
    h = shapely.hausdorff_distance(shapely.MultiPoint(pa), shapely.MultiPoint(pb))
    step = max(float(np.max(np.hypot(*np.diff(p, axis=0).T))) for p in (pa, pb))
    return h, wa + wb + step / 2


def test_identical_curves_are_zero_apart():
    seg = [[0.0, 0.0], [1.0, 2.0], [3.0, 2.0], [4.0, 0.0]]
    assert hausdorff_bound([seg], [seg]).upper == 0.0


def test_parallel_segments_closed_form():
    # Two parallel segments of equal length, offset by d perpendicular: H = d (closed form).
    d = 0.37
    h = hausdorff_bound([[[0, 0], [10, 0]]], [[[0, d], [10, d]]], accuracy=1e-6)
    assert h.lower - 1e-12 <= d <= h.upper + 1e-12
    assert h.accuracy <= 1e-6


def test_squares_closed_form():
    # Concentric squares of half-side 1 and 0.8: the outer corner (1, 1) is 0.2·√2 from the
    # inner square, every inner point within 0.2 of the outer: H = 0.2·√2 (closed form).
    outer = np.array([[1, 1], [-1, 1], [-1, -1], [1, -1], [1, 1]], float)
    h = polyline_hausdorff(outer, 0.8 * outer, accuracy=1e-9)
    assert h.lower - 1e-12 <= 0.2 * math.sqrt(2) <= h.upper + 1e-12


@pytest.mark.parametrize("seed", range(4))
def test_random_cubics_match_shapely_within_the_bound(seed):
    rng = np.random.default_rng(seed)
    a = [rng.uniform(0, 50, (4, 2)), None]
    a[1] = np.vstack([a[0][-1], rng.uniform(0, 50, (3, 2))])
    b = [s + rng.normal(0, 0.3, s.shape) for s in a]
    b[1][0] = b[0][-1]
    acc = 1e-3
    h = hausdorff_bound(a, b, accuracy=acc)
    ref, slack = reference(a, b)
    # reference: shapely.hausdorff_distance on dense samples (slack = Wang's bound of samples)
    assert h.lower - slack - 1e-9 <= ref <= h.upper + slack + 1e-9
    assert h.accuracy <= acc


def test_disconnected_runs_are_measured_as_a_union():
    # Two separate lines against the same two lines, one shifted by 0.5: H = 0.5.
    a = [np.array([[0.0, 0.0], [1.0, 0.0]]), np.array([[5.0, 0.0], [6.0, 0.0]])]
    b = [a[0], a[1] + [0.0, 0.5]]
    h = hausdorff_bound(a, b, accuracy=1e-6)
    assert h.lower - 1e-12 <= 0.5 <= h.upper + 1e-12


def test_empty_curve_is_an_error():
    with pytest.raises(InvalidGeometryError, match="no segments"):
        hausdorff_bound([], [[[0, 0], [1, 0]]])
    with pytest.raises(InvalidGeometryError, match="accuracy"):
        hausdorff_bound([[[0, 0], [1, 0]]], [[[0, 0], [1, 0]]], accuracy=0.0)
