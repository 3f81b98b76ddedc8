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
