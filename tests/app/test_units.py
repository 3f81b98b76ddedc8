"""Display units: user units shown in the unit the file was written in."""

import pytest

from outlinebench.app.units import display_units
from outlinebench.model.document import Document


def test_inches_and_millimetres():
    # W3C CSS Values and Units Level 3 §5.2: 1in = 25.4mm = 96px = 72pt.
    doc = Document(width_mm=254.0, height_mm=127.0, mm_per_unit=0.254, units="in")
    u = display_units(doc)
    assert u.name == "in"
    assert u.show(100.0) == pytest.approx(1.0)  # 100 units × 0.254 mm = 25.4 mm = 1 in
    assert u.parse(u.show(37.5)) == pytest.approx(37.5)
    mm = display_units(Document(width_mm=10.0, height_mm=10.0, mm_per_unit=0.5, units="mm"))
    assert mm.text(3.0) == "1.500 mm"


def test_unitless_file_shows_user_units():
    # No width/height: CSS px user units (SVG 1.1 §7.10 default), shown as px.
    u = display_units(Document())
    assert u.name == "px" and u.show(12.0) == pytest.approx(12.0)


def test_percent_size_with_physical_scale_shows_mm():
    u = display_units(Document(width_mm=50.0, height_mm=20.0, mm_per_unit=0.5, units="%"))
    assert u.name == "mm" and u.show(4.0) == pytest.approx(2.0)
