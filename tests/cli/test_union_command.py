"""``outlinebench union`` and the cutting profile's overlap finding.

Expected areas are closed forms (inclusion–exclusion of squares) cross-checked with shapely.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
import shapely

from outlinebench.cli import main
from outlinebench.geometry import signed_area
from outlinebench.io import read_svg

NS = 'xmlns="http://www.w3.org/2000/svg"'
ROOT = Path(__file__).resolve().parents[2]


def run(args, capsys):
    code = main([str(a) for a in args])
    out, err = capsys.readouterr()
    return code, out, err


def test_union_of_crossing_contours_of_one_outline(tmp_path, capsys):
    # two squares of one path overlapping by 10 × 20: union area 1600 + 400 − 200 = 1800
    src = tmp_path / "two.svg"
    src.write_text(
        f'<svg {NS} width="100mm" height="100mm" viewBox="0 0 100 100"><desc>kept</desc>'
        '<path id="p" d="M0 0 H40 V40 H0 Z M30 10 H50 V30 H30 Z"/></svg>'
    )
    out = tmp_path / "u.svg"
    code, text, _ = run(["union", src, "-o", out], capsys)
    assert code == 0 and "2 contours → 1" in text
    doc = read_svg(out).document
    (c,) = doc.outlines[0].contours
    ref = shapely.union(shapely.box(0, 0, 40, 40), shapely.box(30, 10, 50, 30)).area
    assert abs(signed_area(list(c.segments))) == pytest.approx(ref) == 1800.0
    assert "<desc>kept</desc>" in out.read_text() and 'id="p"' in out.read_text()
    code, text, _ = run(["check", out, "--json"], capsys)
    assert not [f for f in json.loads(text)["findings"] if f["kind"] == "self-intersection"]


def test_union_refuses_to_overwrite_and_leaves_clean_files_byte_for_byte(tmp_path, capsys):
    src = ROOT / "samples" / "signshop-lettering.svg"
    code, _, err = run(["union", src, "-o", src], capsys)
    assert code == 2 and "output refused" in err
    out = tmp_path / "same.svg"
    code, _, _ = run(["union", src, "-o", out], capsys)
    assert code == 0 and out.read_bytes() == src.read_bytes()


def test_cutting_profile_reports_overlapping_outlines_with_the_area(tmp_path, capsys):
    # two separate paths: squares 40 × 40 at (0, 0) and 20 × 20 at (30, 10) share 10 × 20 =
    # 200 (closed form); the type profile does not report it (overlaps are normal in glyphs)
    src = tmp_path / "apart.svg"
    src.write_text(
        f'<svg {NS} width="100mm" height="100mm" viewBox="0 0 100 100">'
        '<path d="M0 0 H40 V40 H0 Z"/><path d="M30 10 H50 V30 H30 Z"/></svg>'
    )
    code, text, _ = run(["check", src, "--json"], capsys)
    (ov,) = [f for f in json.loads(text)["findings"] if f["kind"] == "overlap"]
    assert code == 1 and ov["severity"] == "error" and ov["value"] == pytest.approx(200.0)
    assert ov["other_contour"] == 0 and ov["contour"] == 1
    code, text, _ = run(["check", src, "--json", "--profile", "type"], capsys)
    assert not [f for f in json.loads(text)["findings"] if f["kind"] == "overlap"]
    out = tmp_path / "merged.svg"
    code, text, _ = run(["union", src, "--across", "-o", out], capsys)
    assert code == 0 and "merged into outline 0" in text
    code, text, _ = run(["check", out, "--json"], capsys)
    kinds = {f["kind"] for f in json.loads(text)["findings"]}
    assert "overlap" not in kinds and "self-intersection" not in kinds
