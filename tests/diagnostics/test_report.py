"""Text and JSON reports, and unit conversion of findings."""

import json
import math

import pytest
from diag_docs import doc_of, polygon

from outlinebench.diagnostics import (
    CAUTION,
    Finding,
    check_document,
    convert_units,
    json_report,
    summarize,
    text_report,
)
from outlinebench.diagnostics.report import format_finding
from outlinebench.model.document import Contour


def _findings():
    r = math.radians(3)
    return check_document(
        doc_of(polygon([(0, 0), (10, 0), (10 + 10 * math.cos(r), 10 * math.sin(r))], False))
    )


def test_text_line_format_and_summary():
    text = text_report("a.svg", _findings())
    lines = text.splitlines()
    # issue format: "file: contour N, segment M: kind value at (x, y)" (+ severity)
    assert lines[0] == "a.svg: contour 0: open-contour 19.99 at (0, 0) [warning]"
    assert lines[1] == "a.svg: contour 0, join 0: kink 3° at (10, 0) [warning]"
    assert lines[-1].startswith("a.svg: 2 findings: 0 errors, 2 warnings, 0 info")
    assert text_report("b.svg", []) == "b.svg: no findings; clean"


def test_json_report_is_serialisable_and_complete():
    data = json_report("a.svg", _findings())
    text = json.dumps(data, allow_nan=False)
    back = json.loads(text)
    assert back["caution"] == CAUTION
    assert [f["kind"] for f in back["findings"]] == ["open-contour", "kink"]
    assert back["summary"] == {
        "total": 2, "errors": 0, "warnings": 2, "info": 0,
        "by_kind": {"kink": 1, "open-contour": 1}, "clean": False,
    }  # fmt: skip


def test_infinite_values_become_null():
    f = Finding("curvature-jump", "info", 0, 0, 0, 1.0, 0.0, 0.0, 1.0, "relative", "m",
                curvature_before=math.inf)  # fmt: skip
    assert f.to_dict()["curvature_before"] is None


def test_convert_units():
    # 1 user unit = 0.5 mm: lengths ×0.5, areas ×0.25, curvature ×2; angles unchanged
    fs = [
        Finding("gap", "error", 0, 0, 0, 1.0, 2.0, 4.0, 3.0, "user", "m", limit=0.02),
        Finding("wrong-direction", "error", 0, 1, 0, 0.5, 2.0, 4.0, 8.0, "user^2", "m"),
        Finding("curvature-jump", "warning", 0, 0, 0, 1.0, 2.0, 4.0, 0.5, "relative", "m",
                curvature_before=1.0, curvature_after=2.0),
        Finding("kink", "warning", 0, 0, 0, 1.0, 2.0, 4.0, 3.0, "degrees", "m"),
    ]  # fmt: skip
    g, a, c, k = convert_units(fs, 0.5, "mm")
    assert (g.x, g.y, g.value, g.unit, g.limit) == (1.0, 2.0, 1.5, "mm", 0.01)
    assert (a.value, a.unit) == (2.0, "mm^2")
    assert (c.value, c.curvature_before, c.curvature_after) == (0.5, 2.0, 4.0)
    assert (k.value, k.unit) == (3.0, "degrees")
    assert format_finding("f", g) == "f: contour 0, segment 0: gap 1.5 mm at (1, 2) [error]"


def test_summary_clean_only_with_info():
    info = Finding("corner", "info", 0, 0, 0, 1.0, 0, 0, 90.0, "degrees", "m")
    assert summarize([info])["clean"] is True
    assert summarize([info._replace(severity="warning")])["clean"] is False


def test_settings_validation():
    from outlinebench.diagnostics import CheckSettings

    with pytest.raises(ValueError, match="gap_mm"):
        CheckSettings(gap_mm=-1)
    with pytest.raises(ValueError, match="search distance"):
        CheckSettings(gap_mm=3.0, gap_search_mm=1.0)
    with pytest.raises(ValueError, match="severity"):
        CheckSettings(curvature_jump_severity="fatal")


def test_converted_messages_speak_the_new_unit():
    # 1 user unit = 0.5 mm; the outline stops 1 unit short of its start (closed form: the
    # open polygon's ends (0, 0) and (0, 1)), so the gap is 0.5 mm and the message must say
    # so, not "1" in user units (review item 2)
    doc = doc_of(polygon([(0, 0), (20, 0), (20, 20), (0, 20), (0, 1)], False), mm_per_unit=0.5)
    found = convert_units(check_document(doc), 0.5, "mm")
    (gap,) = [f for f in found if f.kind == "gap"]
    assert gap.value == pytest.approx(0.5) and "0.5 mm" in gap.message
    assert "short of its own start" in gap.message
    (open_c,) = [f for f in found if f.kind == "open-contour"]
    assert "0.5 mm apart" in open_c.message
    # a tiny segment of 0.01 units = 0.005 mm against the 0.01 mm tolerance (settings default)
    doc = doc_of(polygon([(0, 0), (10, 0), (10.01, 0), (10, 10)]), mm_per_unit=0.5)
    (tiny,) = [f for f in convert_units(check_document(doc), 0.5, "mm") if f.kind == "tiny-segment"]
    assert "0.005 mm long" in tiny.message and "tolerance 0.01 mm" in tiny.message
    # curvatures per mm: the cubic quarter arc's start curvature (2/3)(1 − k)/k² per unit
    # (Farin end curvature formula with P1 − P0 = (k, 0), P2 − P1 = (1 − k, 1 − k)) doubles
    k = 4 * (math.sqrt(2) - 1) / 3
    doc = doc_of(Contour.from_points([[(-1, 0), (0, 0)], [(0, 0), (k, 0), (1, 1 - k), (1, 1)]]))
    found = convert_units(check_document(doc), 0.5, "mm")
    (jump,) = [f for f in found if f.kind == "curvature-jump"]
    expect = 2 * (2 / 3) * (1 - k) / k**2
    assert jump.curvature_after == pytest.approx(expect, rel=1e-12)
    assert f"from 0 per mm to {expect:.4g} per mm" in jump.message
    # user units: unchanged
    assert convert_units(found, 1.0, "user") == list(found)
