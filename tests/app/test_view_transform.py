"""Pan and zoom arithmetic (no widgets)."""

import pytest

from outlinebench.app.view_transform import MAX_SCALE, ViewTransform


def test_round_trip_and_zoom_about_a_point():
    v = ViewTransform(scale=2.5, offset_x=-40.0, offset_y=12.0)
    assert v.to_doc(*v.to_screen(13.0, -7.0)) == pytest.approx((13.0, -7.0))
    before = v.to_doc(300.0, 200.0)
    v.zoom_about(300.0, 200.0, 3.0)
    # Closed form: the document point under the pointer is fixed, the scale multiplied.
    assert v.scale == pytest.approx(7.5)
    assert v.to_doc(300.0, 200.0) == pytest.approx(before)


def test_zoom_is_clamped():
    v = ViewTransform(scale=MAX_SCALE / 2)
    v.zoom_about(0.0, 0.0, 10.0)
    assert v.scale == MAX_SCALE


def test_fit_centres_the_box_with_margins():
    v = ViewTransform()
    v.fit((10.0, 20.0, 110.0, 70.0), 500.0, 400.0, margin=50.0)
    # 100 × 50 units into 400 × 300 px: the width limits, 4 px per unit (closed form).
    assert v.scale == pytest.approx(4.0)
    assert v.to_screen(60.0, 45.0) == pytest.approx((250.0, 200.0))  # centre → centre
    assert v.to_screen(10.0, 45.0)[0] == pytest.approx(50.0)  # left edge at the margin
