"""The selection panel's lengths (outlinebench.app.lengths): the geometry package's arc length,
cached per read-only segment, checked against svgpathtools' arc length."""

import numpy as np
import pytest
import svgpathtools

from outlinebench.app import lengths
from outlinebench.app.lengths import DRAG_TOLERANCE, contour_length, segment_length

# An invented sign-shop letter stroke: a cubic, a quadratic and a line (mm).
STROKE = [
    np.array([[0.0, 0.0], [10.0, 25.0], [30.0, -5.0], [40.0, 10.0]]),
    np.array([[40.0, 10.0], [55.0, 30.0], [60.0, 5.0]]),
    np.array([[60.0, 5.0], [60.0, -20.0]]),
]


def _frozen(seg):
    seg = seg.copy()
    seg.flags.writeable = False
    return seg


def _reference(seg):
    """svgpathtools' own arc length (its adaptive quadrature), error 1e-12 asked."""
    z = [complex(x, y) for x, y in seg]
    kind = {2: svgpathtools.Line, 3: svgpathtools.QuadraticBezier, 4: svgpathtools.CubicBezier}
    piece = kind[len(z)](*z)
    return piece.length(error=1e-12) if len(z) > 2 else piece.length()


@pytest.mark.parametrize("quick", [False, True])
def test_contour_length_matches_svgpathtools(quick):
    segs = [_frozen(s) for s in STROKE]
    want = sum(_reference(s) for s in segs)
    rel = DRAG_TOLERANCE if quick else 1e-11
    assert contour_length(segs, quick=quick) == pytest.approx(want, rel=rel)
    for s in segs:
        assert segment_length(s, quick=quick) == pytest.approx(_reference(s), rel=rel)
    # a line is its chord (closed form)
    assert segment_length(segs[2]) == pytest.approx(25.0, rel=1e-15)


def test_read_only_segments_are_cached_and_a_drag_does_not_fill_the_cache():
    seg = _frozen(STROKE[0])
    lengths._CACHE.pop(id(seg), None)
    segment_length(seg, quick=True)
    assert id(seg) not in lengths._CACHE  # a drag's lengths are not kept
    value = segment_length(seg)
    assert lengths._CACHE[id(seg)] == (seg, value)
    assert value == pytest.approx(_reference(seg), rel=1e-11)  # svgpathtools
    writable = STROKE[1].copy()
    segment_length(writable)
    assert id(writable) not in lengths._CACHE  # a writable array may change: never cached
