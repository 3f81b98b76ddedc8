"""``outlinebench deviation`` through the real entry point (python -m outlinebench)."""

import json
import subprocess
import sys

# A quadratic y = 4t(1 − t)·10 over x = 20t (invented); its chord from (0,0) to (20,0) is
# 10 away at (10, 10) (closed form: the parabola's apex).
CURVE = """<svg xmlns="http://www.w3.org/2000/svg" width="40mm" height="40mm" viewBox="0 0 40 40">
<path d="M 0 0 Q 10 20 20 0"/></svg>
"""
CHORD = """<svg xmlns="http://www.w3.org/2000/svg" width="40mm" height="40mm" viewBox="0 0 40 40">
<polyline points="0,0 20,0"/></svg>
"""


def run(*args):
    return subprocess.run(
        [sys.executable, "-m", "outlinebench", *map(str, args)], capture_output=True, text=True
    )


def test_exceeding_polyline_is_found_with_its_place(tmp_path):
    (tmp_path / "c.svg").write_text(CURVE)
    (tmp_path / "p.svg").write_text(CHORD)
    res = run("deviation", tmp_path / "c.svg", tmp_path / "p.svg", "--tolerance", "0.1", "--json")
    assert res.returncode == 1, res.stderr
    out = json.loads(res.stdout)
    (row,) = out["contours"]
    assert abs(row["max_deviation"] - 10.0) <= row["accuracy"]
    assert abs(row["x"] - 10.0) < 0.05 and abs(row["y"] - 10.0) < 1e-3
    assert row["exceeds"] is True and out["exceeds"] is True


def test_our_own_flattening_passes(tmp_path):
    (tmp_path / "c.svg").write_text(CURVE)
    flat = tmp_path / "flat.svg"
    assert run("flatten", tmp_path / "c.svg", "--tolerance", "0.01", "-o", flat).returncode == 0
    res = run("deviation", tmp_path / "c.svg", flat, "--tolerance", "0.01")
    assert res.returncode == 0, res.stdout + res.stderr
    assert "0 exceed" in res.stdout


def test_contour_count_mismatch_and_missing_file(tmp_path):
    (tmp_path / "c.svg").write_text(CURVE)
    (tmp_path / "two.svg").write_text(CHORD.replace("</svg>", '<polyline points="1,1 2,2"/></svg>'))
    res = run("deviation", tmp_path / "c.svg", tmp_path / "two.svg")
    assert res.returncode == 2 and len(res.stderr.strip().splitlines()) == 1
    assert "matched one to one" in res.stderr
    res = run("deviation", tmp_path / "c.svg", tmp_path / "nope.svg")
    assert res.returncode == 2 and "nope.svg" in res.stderr and "Traceback" not in res.stderr
