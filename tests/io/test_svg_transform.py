"""Tests of outlinebench/io/svg_transform.py: transform lists to matrices."""

import math

import numpy as np
import pytest

from outlinebench.errors import SvgReadError
from outlinebench.io.svg_transform import is_mirroring, parse_transform


def m(a, b, c, d, e, f):
    return np.array([[a, c, e], [b, d, f], [0, 0, 1.0]])


C30, S30 = math.cos(math.radians(30)), math.sin(math.radians(30))


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        # Matrices from SVG 1.1 §7.4 and §7.6 definitions.
        ("matrix(1 2 3 4 5 6)", m(1, 2, 3, 4, 5, 6)),
        ("translate(5)", m(1, 0, 0, 1, 5, 0)),
        ("translate(5,-6)", m(1, 0, 0, 1, 5, -6)),
        ("scale(2)", m(2, 0, 0, 2, 0, 0)),
        ("scale(2 -3)", m(2, 0, 0, -3, 0, 0)),
        ("rotate(30)", m(C30, S30, -S30, C30, 0, 0)),
        ("skewX(45)", m(1, 0, math.tan(math.pi / 4), 1, 0, 0)),
        ("skewY(45)", m(1, math.tan(math.pi / 4), 0, 1, 0, 0)),
        ("", np.eye(3)),
        # Lists apply right to left: translate(10) scale(2) maps x to 2x + 10.
        ("translate(10) scale(2)", m(2, 0, 0, 2, 10, 0)),
        ("translate(10),scale(2)", m(2, 0, 0, 2, 10, 0)),
        ("  translate ( 10 ) \n scale(2)  ", m(2, 0, 0, 2, 10, 0)),
    ],
)
def test_transform_items(text, expected):
    np.testing.assert_allclose(parse_transform(text), expected, atol=1e-15)


def test_rotate_about_a_centre():
    # SVG 1.1 §7.6: rotate(a cx cy) = translate(cx cy) rotate(a) translate(-cx -cy); the
    # centre is fixed and (cx + 1, cy) goes to (cx + cos a, cy + sin a).
    r = parse_transform("rotate(30 10 20)")
    np.testing.assert_allclose(r @ [10, 20, 1], [10, 20, 1], atol=1e-12)
    np.testing.assert_allclose(r @ [11, 20, 1], [10 + C30, 20 + S30, 1], atol=1e-12)


def test_mirror_detection():
    # Orientation reverses exactly when the 2×2 determinant is negative (linear algebra).
    assert is_mirroring(parse_transform("scale(-1 1)"))
    assert is_mirroring(parse_transform("matrix(1 0 0 -1 0 80)"))
    assert not is_mirroring(parse_transform("scale(-1 -1)"))
    assert not is_mirroring(parse_transform("rotate(170) skewX(30)"))


@pytest.mark.parametrize(
    "text",
    [
        "rotate(1 2)",
        "matrix(1 2 3)",
        "scale()",
        "spin(3)",
        "translate(1 x)",
        "translate(1,)",
        "translate(1) junk",
        "scale(1e999)",
    ],
)
def test_bad_transforms_raise_read_errors(text):
    with pytest.raises(SvgReadError):
        parse_transform(text, "f.svg: <g>")
