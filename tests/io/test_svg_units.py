"""Tests of outlinebench/io/svg_units.py: lengths, viewBox and preserveAspectRatio."""

import numpy as np
import pytest

from outlinebench.errors import SvgReadError
from outlinebench.io.svg_units import parse_aspect, parse_length, parse_view_box, view_box_transform


@pytest.mark.parametrize(
    ("text", "mm"),
    [
        # CSS Values 3 §5.2: 1in = 25.4mm = 2.54cm = 72pt = 6pc = 96px.
        ("25.4mm", 25.4),
        ("2.54cm", 25.4),
        ("1in", 25.4),
        ("72pt", 25.4),
        ("6pc", 25.4),
        ("96px", 25.4),
        ("96", 25.4),
    ],
)
def test_absolute_units(text, mm):
    assert parse_length(text).to_mm() == pytest.approx(mm, rel=1e-15)


def test_px_per_inch_is_overridable():
    # Some exporters assumed 90 or 72 px per inch; 90 px is then one inch.
    assert parse_length("90").to_mm(90.0) == pytest.approx(25.4)
    assert parse_length("72px").to_mm(72.0) == pytest.approx(25.4)


def test_relative_lengths_have_no_physical_size():
    assert parse_length("50%").to_mm() is None
    assert parse_length(None) is None
    with pytest.raises(SvgReadError):
        parse_length("12 furlongs")


def test_view_box():
    assert parse_view_box("0 0 210 297") == (0, 0, 210, 297)
    assert parse_view_box("-5,-5,10,10") == (-5, -5, 10, 10)
    assert parse_view_box("0 0 0 10") is None  # SVG 1.1 §7.7: zero size disables it
    with pytest.raises(SvgReadError):
        parse_view_box("0 0 10")


@pytest.mark.parametrize(
    ("aspect", "scale", "shift"),
    [
        # viewBox 100×50 into a 200×200 viewport (SVG 1.1 §7.8): meet scales by min(2, 4) = 2
        # and xMidYMid centres the leftover 100 in y; slice scales by 4 and shifts x by
        # -(400-200)/2; none scales x by 2, y by 4.
        ("xMidYMid meet", (2, 2), (0, 50)),
        ("xMinYMin meet", (2, 2), (0, 0)),
        ("xMaxYMax meet", (2, 2), (0, 100)),
        ("xMidYMid slice", (4, 4), (-100, 0)),
        ("none", (2, 4), (0, 0)),
    ],
)
def test_view_box_transform(aspect, scale, shift):
    t = view_box_transform((0, 0, 100, 50), 200, 200, parse_aspect(aspect))
    np.testing.assert_allclose([t[0, 0], t[1, 1]], scale)
    np.testing.assert_allclose([t[0, 2], t[1, 2]], shift)


def test_aspect_defaults_on_bad_values():
    # SVG 1.1 §7.8: default xMidYMid meet.
    assert parse_aspect(None) == ("xMidYMid", "meet")
    assert parse_aspect("bogus") == ("xMidYMid", "meet")
    assert parse_aspect("defer xMinYMax slice") == ("xMinYMax", "slice")


def test_units_are_case_insensitive():
    # CSS Values and Units 3, distance units: unit identifiers are ASCII case-insensitive
    # (from memory; SVG 2 takes its lengths from CSS).
    assert parse_length("10MM") == parse_length("10mm")
    assert parse_length("2In").to_mm() == pytest.approx(50.8, rel=1e-15)


def test_auto_is_the_same_as_no_value():
    # SVG 2 geometry properties (from memory): "auto" for an outer svg's width/height is 100%
    # (no physical size, like a missing attribute); SVG 2 §10.2: a rect's rx/ry "auto" takes
    # the other radius (like a missing one).
    assert parse_length("auto") is None
    assert parse_length(" AUTO ") is None
