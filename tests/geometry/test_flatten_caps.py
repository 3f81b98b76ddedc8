"""Regression tests of issue 15 in outlinebench/geometry/flatten.py: the cap on chords."""

import math

import numpy as np
import pytest

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.flatten import (
    MAX_CHORDS,
    flatten_contours_bounded,
    flatten_uniform_wang,
)
from outlinebench.io.svg_path import parse_path_data

CIRCLE = parse_path_data("M10 0 A10 10 0 1 1 -10 0 A10 10 0 1 1 10 0Z")


def test_a_tolerance_whose_chords_pass_the_cap_is_refused_naming_it():
    # Issue 15: "flatten --tolerance 1e-12 on a radius-10 circle makes 12.4 M chords". The
    # sagitta formula (any surveying handbook) gives N* = 2π·10 / sqrt(8·10·1e-12) ≈ 7.0e6
    # chords for a circle of radius 10, over the cap of 1,000,000.
    expected = 2 * math.pi * 10 / math.sqrt(8 * 10 * 1e-12)
    with pytest.raises(InvalidGeometryError, match=r"tolerance 1e-12 needs about 7,0\d\d,\d{3}"):
        flatten_contours_bounded(CIRCLE, 1e-12)
    assert expected > MAX_CHORDS
    with pytest.raises(InvalidGeometryError, match="over the cap of 1,000,000 chords"):
        flatten_uniform_wang(CIRCLE, 1e-12)


def test_the_suggested_tolerance_fits_under_the_cap():
    # N ∝ 1/sqrt(ε) (sagitta formula), so the tolerance the message suggests flattens.
    with pytest.raises(InvalidGeometryError, match=r"at least ([0-9.e-]+)") as info:
        flatten_contours_bounded(CIRCLE, 1e-12)
    suggested = float(str(info.value).rsplit(" ", 1)[1])
    polys, bounds = flatten_contours_bounded(CIRCLE, suggested)
    assert len(polys[0]) <= MAX_CHORDS and bounds[0] <= suggested


def test_a_tolerance_under_the_cap_still_flattens_within_it():
    # ε = 1e-6: N* ≈ 2π·10 / sqrt(8e-5) ≈ 7,025 chords (sagitta formula); the proven bound
    # holds (the flattener's guarantee).
    polys, bounds = flatten_contours_bounded(CIRCLE, 1e-6)
    assert 7025 <= len(polys[0]) < 1.1 * 7025
    r = np.hypot(polys[0][:, 0], polys[0][:, 1])
    assert np.all(np.abs(r - 10.0) <= 1e-6 + 1e-7) and bounds[0] <= 1e-6
