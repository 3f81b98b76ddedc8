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
    assert lines[1] == "a.svg: contour 0, segment 0: kink 3° at (10, 0) [warning]"
    assert lines[-1].startswith("a.svg: 2 findings: 0 errors, 2 warnings, 0 info")
    assert text_report("b.svg", []) == "b.svg: no findings"


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
