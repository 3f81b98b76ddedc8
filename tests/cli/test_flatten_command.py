"""``outlinebench flatten`` through the real entry point (python -m outlinebench)."""

import json
import subprocess
import sys

import numpy as np
import pytest
import shapely

# An invented part outline from "Kestrel Fabrication": a bracket with a rounded end (mm).
BRACKET = """<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="60mm"
 viewBox="0 0 100 60">
<path id="bracket" d="M 10 10 L 70 10 C 86 10 90 24 90 30 C 90 36 86 50 70 50 L 10 50 Z"/>
<path id="hook" d="M 20 20 Q 40 5 60 20"/>
</svg>
"""


def run(*args):
    return subprocess.run(
        [sys.executable, "-m", "outlinebench", *map(str, args)], capture_output=True, text=True
    )


@pytest.fixture
def bracket(tmp_path):
    p = tmp_path / "bracket.svg"
    p.write_text(BRACKET)
    return p


def test_json_schema_and_measured_deviation(bracket):
    res = run("flatten", bracket, "--tolerance", "0.05", "--json")
    assert res.returncode == 0, res.stderr
    out = json.loads(res.stdout)
    assert out["tolerance"] == 0.05
    assert 0 < out["max_deviation"] <= 0.05 + 1e-4
    assert [c["closed"] for c in out["contours"]] == [True, False]
    # on-curve points of the path data (10,10) and (90,30) are vertices (issue: every
    # on-curve point kept); the polygon is simple (shapely)
    pts = np.array(out["contours"][0]["points"])
    assert pts.shape[1] == 2 and [10, 10] in pts.tolist() and [90, 30] in pts.tolist()
    assert shapely.Polygon(pts).is_valid
    assert "preview" in out["caution"]


def test_svg_output_carries_the_caution(bracket, tmp_path):
    out = tmp_path / "cut.svg"
    res = run("flatten", bracket, "--tolerance", "0.1", "-o", out)
    assert res.returncode == 0, res.stderr
    text = out.read_text()
    assert "<!-- Caution: verify these toolpaths in the machine's own preview" in text
    assert text.count("<polygon") == 1 and text.count("<polyline") == 1


def test_unreadable_input_gives_one_line_and_no_output(tmp_path):
    bad = tmp_path / "bad.svg"
    bad.write_text('<svg xmlns="http://www.w3.org/2000/svg"><path d="M 0 0 L 10 x"/></svg>')
    out = tmp_path / "cut.svg"
    res = run("flatten", bad, "--tolerance", "0.1", "-o", out)
    assert res.returncode == 2
    assert res.stdout == ""
    assert len(res.stderr.strip().splitlines()) == 1 and "bad.svg" in res.stderr
    assert "Traceback" not in res.stderr
    assert not out.exists()


def test_unwritable_output_leaves_nothing_behind(bracket, tmp_path):
    out = tmp_path / "missing-folder" / "cut.svg"
    res = run("flatten", bracket, "-o", out)
    assert res.returncode == 2
    assert len(res.stderr.strip().splitlines()) == 1
    assert not out.parent.exists()


def test_bad_tolerance_is_a_usage_error(bracket):
    res = run("flatten", bracket, "--tolerance", "0")
    assert res.returncode == 2
    assert "above 0" in res.stderr


def test_written_coordinates_are_rounded_and_the_rounding_is_in_the_bound(bracket, tmp_path):
    # Resolution rule of the command's docstring: 10^-k ≤ min(1e-6, ε/1000) (project
    # convention); the curve is measured against the written, rounded points with shapely
    # and the `bezier` library (reference libraries), and must lie within the reported bound.
    import bezier

    out = tmp_path / "cut.svg"
    res = run("flatten", bracket, "--tolerance", "0.05", "--json", "-o", out)
    assert res.returncode == 0, res.stderr
    data = json.loads(res.stdout)
    assert data["resolution"] == 1e-6
    text = out.read_text()
    assert "coordinates rounded to 1e-06 mm" in text
    numbers = [n for pair in text.split('points="')[1:] for n in pair.split('"')[0].split()]
    for pair in numbers:
        for v in pair.split(","):
            assert len(v.split(".")[1]) <= 6 if "." in v else True
    # the hook Q 20 20, 40 5, 60 20 against its written polyline
    hook = np.array(data["contours"][1]["points"])
    for x in hook.ravel():
        assert round(x, 6) == x
    curve = bezier.Curve.from_nodes(np.array([[20, 20], [40, 5], [60, 20]], float).T)
    dense = curve.evaluate_multi(np.linspace(0, 1, 4000)).T
    far = float(np.max(shapely.distance(shapely.points(dense), shapely.LineString(hook))))
    assert far <= data["contours"][1]["max_deviation"] + 1e-9
    assert data["max_deviation"] <= 0.05
