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


def test_holes_move_the_other_way_so_the_material_grows(tmp_path):
    # Closed form: growing the washer's material by 2 gives radii 22 and 8; with
    # --per-contour both circles move outward (22 and 12). Cubic circles from the reader are
    # within 2.73e-4·r of true circles (Dokken et al. 1990).
    src = tmp_path / "washer.svg"
    src.write_text(WASHER)
    for flag, radii in (([], (22, 8)), (["--per-contour"], (22, 12))):
        res = run("offset", src, "--distance", "2", "--tolerance", "0.01", "--json", *flag)
        assert res.returncode == 0, res.stderr
        data = json.loads(res.stdout)
        got = []
        for c in data["contours"]:
            pts = np.array(c["points"])
            rad = np.hypot(pts[:, 0] - 30, pts[:, 1] - 30)
            assert np.ptp(rad) <= 0.02 + 20 * 3e-4
            got.append(float(np.mean(rad)))
        assert sorted(got, reverse=True) == pytest.approx(radii, abs=0.02)


def test_self_intersecting_contour_is_an_error_finding_and_not_offset(tmp_path):
    # A figure eight crossing itself at (5, 5) (closed form: the diagonals of a 10 × 10
    # square meet at its centre), invented for this test.
    src = tmp_path / "eight.svg"
    src.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg" width="20mm" height="20mm" '
        'viewBox="0 0 20 20"><path d="M 0 0 L 10 10 L 10 0 L 0 10 Z"/></svg>'
    )
    res = run("offset", src, "--distance", "1", "--json")
    assert res.returncode == 1, res.stderr
    data = json.loads(res.stdout)
    assert data["contours"] == []
    (f,) = data["findings"]
    assert f["kind"] == "self-intersection" and f["severity"] == "error"
    assert (f["x"], f["y"]) == pytest.approx((5, 5), abs=1e-9)


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
