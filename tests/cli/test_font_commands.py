"""Fonts and font sources through the command line (issue "type drafters").

Test fonts are built with fontTools' FontBuilder from the invented workshop glyphs of
tests/io/font_cases.py; areas come from fontTools' AreaPen (the reference library).
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest
from fontTools.pens.areaPen import AreaPen
from fontTools.ttLib import TTFont

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "io"))
from font_cases import build_otf, build_ttf, build_ufo  # noqa: E402

from outlinebench.cli import main  # noqa: E402


def run(args, capsys):
    code = main([str(a) for a in args])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(scope="module")
def fonts(tmp_path_factory):
    d = tmp_path_factory.mktemp("fonts")
    return {
        "ttf": build_ttf(d / "Shop.ttf"),
        "otf": build_otf(d / "Shop.otf"),
        "ufo": build_ufo(d / "Shop.ufo"),
    }


@pytest.mark.parametrize("kind", ["ttf", "otf", "ufo"])
def test_check_a_font_uses_the_type_profile(fonts, capsys, kind):
    code, out, err = run(["check", fonts[kind], "--json"], capsys)
    data = json.loads(out)
    assert data["profile"]["name"] == "type" and "internal error" not in err
    # the empty space glyph is not "nothing to check": the font has other glyphs
    assert not [f for f in data["findings"] if f["kind"] == "nothing-to-check"]
    code, out, _ = run(["check", fonts[kind], "--profile", "cutting"], capsys)
    assert "profile cutting" in out


def test_measure_a_font_matches_fonttools_areas(fonts, capsys):
    code, out, _ = run(["measure", fonts["ttf"], "--json", "--glyphs", "washer"], capsys)
    data = json.loads(out)
    font = TTFont(fonts["ttf"])
    pen = AreaPen(font.getGlyphSet())
    font.getGlyphSet()["washer"].draw(pen)
    # the washer is a ring: outer minus hole; our areas are unsigned per contour
    areas = [c["area"] for c in data["contours"]]
    assert code == 0 and len(areas) == 2
    assert abs(areas[0] - areas[1]) == pytest.approx(abs(pen.value), rel=1e-12)


def test_glyph_selection_and_its_errors(fonts, capsys):
    code, out, _ = run(["check", fonts["otf"], "--glyphs", "peg", "--json"], capsys)
    assert code in (0, 1) and json.loads(out)["file"].endswith("Shop.otf")
    code, _, err = run(["check", fonts["otf"], "--glyphs", "nosuchglyph"], capsys)
    assert code == 2 and "nosuchglyph" in err
    svg = Path(__file__).resolve().parents[2] / "samples" / "signshop-lettering.svg"
    code, _, err = run(["check", svg, "--glyphs", "A"], capsys)
    assert code == 2 and "fonts" in err


def test_a_folder_with_fonts_and_a_ufo_source(fonts, capsys):
    folder = Path(fonts["ttf"]).parent
    code, out, _ = run(["check", folder, "--json"], capsys)
    names = [Path(d["file"]).name for d in json.loads(out)]
    assert names == sorted(["Shop.otf", "Shop.ttf", "Shop.ufo"])


def test_flatten_a_font_glyph(fonts, capsys, tmp_path):
    out_svg = tmp_path / "peg-cut.svg"
    code, out, _ = run(["flatten", fonts["ttf"], "--glyphs", "peg", "-o", out_svg], capsys)
    assert code == 0 and out_svg.exists()
