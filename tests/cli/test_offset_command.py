"""``outlinebench offset`` through the real entry point (python -m outlinebench)."""

import json
import subprocess
import sys

import numpy as np
import pytest

# An invented "Harbour Lane Signs" letter blank: a block 40 × 50 with a slot 4 wide.
SLOT = """<svg xmlns="http://www.w3.org/2000/svg" width="60mm" height="60mm" viewBox="0 0 60 60">
<path d="M 0 0 L 0 50 L 18 50 L 18 12 A 2 2 0 0 1 22 12 L 22 50 L 40 50 L 40 0 Z"/>
<circle cx="50" cy="10" r="5"/>
</svg>
"""


def run(*args):
    return subprocess.run(
        [sys.executable, "-m", "outlinebench", *map(str, args)], capture_output=True, text=True
    )


def test_json_has_polylines_and_findings_where_the_tool_does_not_fit(tmp_path):
    src = tmp_path / "slot.svg"
    src.write_text(SLOT)
    out = tmp_path / "off.svg"
    res = run("offset", src, "--distance", "3", "--tolerance", "0.01", "--json", "-o", out)
    assert res.returncode == 1, res.stderr  # the tool does not fit the slot
    data = json.loads(res.stdout)
    kinds = {f["kind"] for f in data["findings"]}
    assert {"tool-does-not-fit", "vanishes"} <= kinds
    for c in data["contours"]:
        assert isinstance(c["closed"], bool)
        assert np.array(c["points"]).shape[1] == 2
    # the circle of radius 5 grows to radius 8 (closed form r + d); the cubic circle of the
    # SVG reader is within 2.73e-4·r of the true circle (Dokken et al. 1990)
    circle = [c for c in data["contours"] if c["contour"] == 1]
    pts = np.array(circle[0]["points"])
    assert np.max(np.abs(np.hypot(pts[:, 0] - 50, pts[:, 1] - 10) - 8)) <= 0.01 + 5 * 3e-4
    assert "Caution" in out.read_text()


def test_small_tool_fits_and_exits_zero(tmp_path):
    src = tmp_path / "slot.svg"
    src.write_text(SLOT)
    res = run("offset", src, "--distance", "1")
    assert res.returncode == 0, res.stdout + res.stderr


def test_missing_distance_and_bad_file(tmp_path):
    src = tmp_path / "slot.svg"
    src.write_text(SLOT)
    res = run("offset", src)
    assert res.returncode == 2 and "--distance" in res.stderr
    bad = tmp_path / "bad.svg"
    bad.write_text("<svg")
    out = tmp_path / "o.svg"
    res = run("offset", bad, "--distance", "1", "-o", out)
    assert res.returncode == 2 and len(res.stderr.strip().splitlines()) == 1
    assert "bad.svg" in res.stderr and not out.exists()


# A washer (invented Kestrel Fabrication part): outer circle radius 20, hole radius 10, in one
# path, both drawn the same way round.
WASHER = """<svg xmlns="http://www.w3.org/2000/svg" width="60mm" height="60mm" viewBox="0 0 60 60">
<path d="M 50 30 A 20 20 0 0 1 10 30 A 20 20 0 0 1 50 30 Z
         M 40 30 A 10 10 0 0 1 20 30 A 10 10 0 0 1 40 30 Z"/>
</svg>
"""


def test_holes_follow_the_files_fill_rule(tmp_path):
    # W3C SVG 1.1 §11.3 "fill-rule": both circles are drawn the same way round, so under
    # nonzero (the default) the inner one is not a hole (winding 2 inside it): the region is
    # the disc of radius 20, grown by 2 to one toolpath of radius 22. Under evenodd the inner
    # circle is a hole: the material grows to radii 22 and 8 (closed form r ± d). Cubic
    # circles from the reader are within 2.73e-4·r of true circles (Dokken et al. 1990).
    for rule, radii in (("nonzero", (22,)), ("evenodd", (22, 8))):
        src = tmp_path / f"washer-{rule}.svg"
        src.write_text(WASHER.replace("<path ", f'<path fill-rule="{rule}" '))
        res = run("offset", src, "--distance", "2", "--tolerance", "0.01", "--json")
        assert res.returncode == 0, res.stderr
        data = json.loads(res.stdout)
        assert data["verified"] is True
        got = []
        for c in data["contours"]:
            pts = np.array(c["points"])
            rad = np.hypot(pts[:, 0] - 30, pts[:, 1] - 30)
            assert np.ptp(rad) <= 0.02 + 20 * 3e-4
            got.append(float(np.mean(rad)))
        assert sorted(got, reverse=True) == pytest.approx(radii, abs=0.02)


def test_a_self_crossing_contour_is_offset_as_the_region_it_fills(tmp_path):
    # A bow tie crossing itself at (5, 5) (the diagonals of a 10 × 10 square meet at its
    # centre): under nonzero both triangles are filled (winding ±1), so the toolpath is the
    # offset of that region, verified; `check` reports the crossing itself.
    src = tmp_path / "bowtie.svg"
    src.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg" width="20mm" height="20mm" '
        'viewBox="0 0 20 20"><path d="M 0 0 L 10 10 L 10 0 L 0 10 Z"/></svg>'
    )
    res = run("offset", src, "--distance", "1", "--json")
    data = json.loads(res.stdout)
    assert data["verified"] is True and len(data["contours"]) == 1
    pts = np.array(data["contours"][0]["points"])
    # the grown region's box is the square's grown by the tool radius (closed form)
    assert pts.min(axis=0) == pytest.approx((-1, -1), abs=0.02)
    assert pts.max(axis=0) == pytest.approx((11, 11), abs=0.02)
    res = run("check", src, "--json")
    assert "self-intersection" in {f["kind"] for f in json.loads(res.stdout)["findings"]}


def test_written_offset_coordinates_are_rounded(tmp_path):
    # Resolution rule of outlinebench.subcommands.flatten: 10^-k ≤ min(1e-6, ε/1000)
    # (project convention, no source); the circle of radius 5 grown by 3 is still within
    # ε + 5·3e-4 of radius 8 (closed form r + d; cubic circle error, Dokken et al. 1990).
    src = tmp_path / "slot.svg"
    src.write_text(SLOT)
    out = tmp_path / "off.svg"
    res = run("offset", src, "--distance", "3", "--tolerance", "0.01", "--json", "-o", out)
    data = json.loads(res.stdout)
    assert data["resolution"] == 1e-6
    assert "coordinates rounded to 1e-06 mm" in out.read_text()
    pts = np.array([c for c in data["contours"] if c["contour"] == 1][0]["points"])
    assert np.all(np.round(pts, 6) == pts)
    assert np.max(np.abs(np.hypot(pts[:, 0] - 50, pts[:, 1] - 10) - 8)) <= 0.01 + 5 * 3e-4


NOTCHED = """<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="100mm"
 viewBox="0 0 100 100"><path d="M10 10 H50 V50 H10 Z"/><path d="M60 10 H90 V40 L75 25 L60 40 Z"/>
</svg>
"""


@pytest.mark.parametrize("d", ["1.5", "-1.5"])
def test_sharp_concave_corner_gives_closed_contours_only(tmp_path, d):
    # A square and a block with a V notch (a sharp concave corner): a closed contour offset
    # must stay one closed toolpath each (common practice, no source: a cutter needs closed
    # paths), never open fragments.
    src = tmp_path / "notched.svg"
    src.write_text(NOTCHED)
    res = run("offset", src, "--distance", d, "--units", "mm", "--json")
    assert res.returncode in (0, 1), res.stderr
    data = json.loads(res.stdout)
    assert [c["contour"] for c in data["contours"]] == [0, 1]
    assert all(c["closed"] is True for c in data["contours"])


def _rings(data):
    import shapely

    return [shapely.LinearRing(c["points"]) for c in data["contours"] if len(c["points"]) >= 3]


def _never_cross(rings):
    """Two toolpaths either miss each other, touch at points, or one holds the other: the
    area their polygons share is 0 or the whole smaller one (shapely)."""
    import shapely

    polys = [shapely.Polygon(r) for r in rings]
    for a in range(len(polys)):
        for b in range(a + 1, len(polys)):
            shared = polys[a].intersection(polys[b]).area
            small = min(polys[a].area, polys[b].area)
            assert shared <= 1e-6 * small or shared >= small * (1 - 1e-6), (a, b, shared)


def test_bracket_shrunk_by_the_tool_radius_never_crosses(tmp_path):
    # issue regression: the bracket at -4.5 mm used to give an outer contour crossing all
    # three holes' offsets. Now: the toolpaths are simple and meet nowhere (checked with
    # shapely), and the material between the holes and the edge that is narrower than the
    # 9 mm tool is reported as vanishing.
    from pathlib import Path

    import shapely

    src = Path(__file__).resolve().parents[2] / "samples" / "workshop-bracket.svg"
    out = tmp_path / "tp.svg"
    res = run("offset", src, "--distance", "-4.5", "--units", "mm", "--json", "-o", out)
    data = json.loads(res.stdout)
    assert data["verified"] is True and out.exists()
    rings = _rings(data)
    assert all(r.is_simple for r in rings)
    _never_cross(rings)
    assert any(f["kind"] == "vanishes" for f in data["findings"])
    assert shapely.unary_union([shapely.Polygon(r) for r in rings]).is_valid


def test_grown_lettering_overlaps_are_reported_or_merged(tmp_path):
    # issue regression: growing the lettering by 3.5 mm makes neighbouring letters' toolpaths
    # overlap; that is an error with the place, and --merge-outlines cuts them as one region
    # whose toolpaths do not overlap (checked with shapely).

    from pathlib import Path

    src = Path(__file__).resolve().parents[2] / "samples" / "signshop-lettering.svg"
    res = run("offset", src, "--distance", "3.5", "--units", "mm", "--json")
    data = json.loads(res.stdout)
    overlaps = [f for f in data["findings"] if f["kind"] == "toolpaths-overlap"]
    assert res.returncode == 1 and overlaps and all(f["value"] > 0 for f in overlaps)
    res = run("offset", src, "--distance", "3.5", "--units", "mm", "--json", "--merge-outlines")
    data = json.loads(res.stdout)
    assert data["verified"] is True
    assert not [f for f in data["findings"] if f["kind"] == "toolpaths-overlap"]
    rings = _rings(data)
    _never_cross(rings)
    assert all(r.is_simple for r in rings)
