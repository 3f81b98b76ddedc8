"""Seeded fuzzing of the path-data reader against an independent reader of the W3C grammar.

The large-budget run is ``benchmarks/fuzz/campaign.py`` (hundreds of thousands of inputs);
here a small seeded budget keeps the suite at a few seconds. Every class of disagreement it
ever found is pinned below as a regression case (issue 15).
"""

import math
import warnings

import numpy as np
import pytest
from fuzz_inputs import path_data_strategy
from hypothesis import given, settings
from path_reference import disagreements

from outlinebench.io.svg_path import read_path_data

_PAD = " L1 1" * 500  # over 2,048 characters: the reader's long-data route


def _check(d):
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no numpy RuntimeWarning may escape
        res = read_path_data(d)
    for c in res.contours:
        for s in c.segments:
            assert np.all(np.isfinite(s))
    assert disagreements(d, res.contours, res.error.offset if res.error else None) == []
    return res


@settings(max_examples=300)
@given(path_data_strategy())
def test_reader_agrees_with_the_independent_grammar_reader(d):
    # Reference: tests/fuzz/path_reference.py, written from the BNF of SVG 1.1 §8.3.9 and
    # the error rule of SVG 2 §9.5.4.
    _check(d)


@pytest.mark.parametrize("pad", ["", _PAD], ids=["short", "long"])
@pytest.mark.parametrize(
    ("tail", "offset_of"),
    [
        ("M0 0 L - 5 5", "- 5"),  # a lone sign is not a number (it read as 0 in long data)
        ("M0 0 L 5 5 +", "+"),
        ("M0 0 L 1e999 5", "1e999"),  # out of range: blamed on its own token ...
        ("M0 0 L1 2 3 1e999", "1e999"),  # ... also inside an incomplete group
        ("M0 0 A 1 1 0 0 1 1e999 5", "1e999"),
        ("m101e309.,-1.0e8", "101e309"),  # ... not on the "." after it
        ("M0 0 A 5 5 0 0 1 10 0,", None),  # the arc before the trailing comma is kept
        ("M0 0 L 5 5,", None),  # as the line is
    ],
)
def test_one_grammar_one_behaviour_for_short_and_long_data(pad, tail, offset_of):
    # SVG 2 §9.5.4: render up to the error; the same rule whatever the data's length.
    d = "M9 9 L8 8" + pad + " " + tail
    res = _check(d)
    assert res.error is not None
    if offset_of is not None:
        assert res.error.offset == d.index(offset_of, len(d) - len(tail))
    else:
        assert res.error.offset == len(d)
        assert res.contours[-1].segments[-1][-1].tolist() == [10.0, 0.0] or tail.startswith(
            "M0 0 L"
        )


@pytest.mark.parametrize("pad", ["", _PAD], ids=["short", "long"])
@pytest.mark.parametrize("radius", ["1e300", "1e308", "1e20", "5e-324"])
def test_a_square_with_an_arc_of_any_radius_stays_a_square(pad, radius):
    # Issue 15: an arc whose radius overflows a later computation was dropped with a false
    # note (a square read as a triangle). SVG 1.1 F.6.6 scales radii that are too small;
    # radii far larger than the chord give a near-straight arc, kept. The four corners are
    # the arc's and lines' end points (reference reader).
    d = f"M0 0 A{radius} {radius} 0 0 1 10 0 L10 10 L0 10 Z" + pad
    res = _check(d)
    assert res.error is None
    corners = [tuple(s[-1].tolist()) for s in res.contours[0].segments]
    assert (10.0, 0.0) in corners and corners[-1] == (0.0, 0.0)
    assert [len(s) for s in res.contours[0].segments][-3:] == [2, 2, 2]  # L, L, Z
    assert all(len(s) == 4 for s in res.contours[0].segments[:-3])  # the arc: cubics


def test_a_near_straight_arc_bulges_by_its_sagitta():
    # Closed form: a circular arc of radius r over a chord c has sagitta r − sqrt(r² − c²/4)
    # ≈ c²/(8r); r = 1e6, c = 10 gives 1.25e-5 (sweep flag 1: to the right of the chord in
    # a y-up frame, i.e. y < 0 for a chord along +x).
    res = _check("M0 0 A1e6 1e6 0 0 1 10 0")
    (arc,) = res.contours[0].segments
    mid = 0.125 * (arc[0] + 3 * arc[1] + 3 * arc[2] + arc[3])
    assert math.isclose(mid[0], 5.0, rel_tol=1e-12)
    assert math.isclose(-mid[1], 100 / 8e6, rel_tol=1e-6)


@pytest.mark.parametrize("pad", ["", " M2 2 L3 3" * 300], ids=["short", "long"])
def test_a_moveto_beyond_binary64_is_an_error_at_its_group(pad):
    # Found by the campaign (path inputs #28342, #57272): the second relative moveto puts
    # the current point at 2e308, beyond the largest double, with no segment drawn from it;
    # it is an overflow at that group (reference reader), everything before it is kept.
    d = "M0 0 L1 1 m1e308 0 m1e308 0" + pad
    res = _check(d)
    assert res.error is not None and res.error.offset == d.index("m1e308", 12)
    assert [s.tolist() for c in res.contours for s in c.segments] == [[[0, 0], [1, 1]]]
