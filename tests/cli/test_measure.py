"""``outlinebench measure``: lengths, areas, boxes and joins against svgpathtools and closed
forms."""

import json
import math
import re
from pathlib import Path

import numpy as np
import pytest

from outlinebench.__main__ import main

ROOT = Path(__file__).resolve().parents[2]
BRACKET = str(ROOT / "samples" / "workshop-bracket.svg")


def measure(args, capsys):
    code = main(["measure", *args])
    out = capsys.readouterr()
    return code, out.out, out.err


def bracket_subpaths():
    d = re.search(r' d="([^"]+)"', Path(BRACKET).read_text()).group(1)
    return ["M" + part for part in d.split("M") if part.strip()]


def test_lengths_and_areas_match_svgpathtools(capsys):
    svgpathtools = pytest.importorskip("svgpathtools")
    code, out, _ = measure([BRACKET, "--json"], capsys)
    assert code == 0
    data = json.loads(out)
    contours = data["contours"]
    subpaths = bracket_subpaths()
    assert len(contours) == len(subpaths) == 4
    for c, d in zip(contours, subpaths, strict=True):
        ref = svgpathtools.parse_path(d)  # reference library
        assert c["closed"] is True
        assert c["length"] == pytest.approx(ref.length(), rel=1e-6)
        assert c["area"] == pytest.approx(abs(ref.area()), rel=1e-9)
        assert len(c["segments"]) == len(ref)
        xmin, xmax, ymin, ymax = ref.bbox()
        assert c["bbox"] == pytest.approx([xmin, ymin, xmax, ymax], abs=1e-9)
    # a mounting hole of radius 4 drawn with four cubic quarter arcs: π r² within the known
    # 0.03 % excess of the cubic circle (k = 4(√2 − 1)/3, closed form)
    assert contours[1]["area"] == pytest.approx(math.pi * 16, rel=4e-4)
    kinds = {s["kind"] for s in contours[0]["segments"]}
    assert kinds == {"line", "cubic"}


def test_units_and_joins(capsys):
    _, out, _ = measure([BRACKET, "--json", "--joins"], capsys)
    user = json.loads(out)
    _, out, _ = measure([BRACKET, "--json", "--units", "in"], capsys)
    inch = json.loads(out)
    # the file is in mm (viewBox = width/height in mm), 1 in = 25.4 mm
    assert inch["contours"][0]["length"] == pytest.approx(user["contours"][0]["length"] / 25.4)
    assert inch["contours"][0]["area"] == pytest.approx(user["contours"][0]["area"] / 25.4**2)
    joins = user["contours"][0]["joins"]
    assert len(joins) == len(user["contours"][0]["segments"])  # closed: one join per segment
    assert all(j["gap"] == 0.0 for j in joins)  # segments share end points exactly
    # every join of the outline is tangent: straight sides run into quarter arcs
    assert max(j["angle"] for j in joins) < 1e-6
    # straight side into an arc of radius 6: κ 0 on one side; on the arc side the cubic
    # quarter arc's end curvature, from κ(0) = (2/3)(P1−P0)×(P2−P1)/|P1−P0|³ (Farin) with
    # P0 = (r, 0), P1 = (r, kr), P2 = (kr, r): κ = (2/3)(1 − k)/(k² r), about 2 % below 1/r
    k = 4 * (math.sqrt(2) - 1) / 3
    ks = sorted(abs(j["curvature_after"]) for j in joins)
    assert ks[0] == 0.0
    # (the file rounds control points to 4 decimals, hence rel=1e-4)
    assert any(x == pytest.approx((2 / 3) * (1 - k) / (k * k * 6), rel=1e-4) for x in ks)


def test_text_output_and_open_contour(tmp_path, capsys):
    f = tmp_path / "open.svg"
    f.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg" width="10mm" height="10mm" viewBox="0 0 10 10">'
        '<path id="stroke" d="M0,0 L3,4"/></svg>'
    )
    code, out, _ = measure([str(f)], capsys)
    assert code == 0
    assert "contour 0 (outline 0, id stroke): open (ends 5 apart), length 5, no area (open)" in out
    _, out, _ = measure([str(f), "--json"], capsys)
    c = json.loads(out)["contours"][0]
    assert c["area"] is None and c["length"] == pytest.approx(5.0)  # 3-4-5 triangle


def test_missing_file_exit_2_one_line(tmp_path, capsys):
    code, out, err = measure([str(tmp_path / "nope.svg")], capsys)
    assert code == 2 and out == ""
    assert len(err.strip().splitlines()) == 1 and "nope.svg" in err


def test_json_carries_the_readers_notes(tmp_path, capsys):
    # the unconverted <text> is listed (info: measuring does not cut) and the file is complete
    f = tmp_path / "mixed.svg"
    f.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg"><text>Kestrel</text><path d="M0,0 L3,4"/></svg>'
    )
    code, out, _ = measure([str(f), "--json"], capsys)
    data = json.loads(out)
    assert code == 0 and data["complete"] is True
    assert [(x["kind"], x["severity"]) for x in data["findings"]] == [("live-text", "info")]


def test_a_partly_readable_file_is_measured_and_every_error_listed(tmp_path, capsys):
    # SVG 2 §9.5.4: path data is rendered up to its first error; the second path's error and
    # a rect with a bad width (skipped) are listed too, not only the first. The first path
    # keeps M0,0 L3,4 (length 5: the 3-4-5 triangle), the third is whole (length 10).
    f = tmp_path / "partly.svg"
    f.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg"><path d="M0,0 L3,4 L x"/>'
        '<path d="M0,0 Q"/><rect width="bad" height="3"/><path d="M0,0 H10"/></svg>'
    )
    code, out, _ = measure([str(f), "--json"], capsys)
    data = json.loads(out)
    assert code == 1 and data["complete"] is False
    errs = [x for x in data["findings"] if x["kind"] == "read-error"]
    assert len(errs) == 3
    lengths = [c["length"] for c in data["contours"]]
    assert lengths[0] == pytest.approx(5.0) and lengths[-1] == pytest.approx(10.0)
    code, out, _ = measure([str(f)], capsys)
    assert code == 1 and out.count("read-error") == 3


def test_internal_entities_need_the_command_line_option(tmp_path, capsys):
    # review item 13: as for check; the entity expands to M0,0 L3,4 (length 5, 3-4-5 triangle)
    f = tmp_path / "entity.svg"
    f.write_text(
        '<?xml version="1.0"?>\n<!DOCTYPE svg [<!ENTITY d "M0,0 L3,4">]>\n'
        '<svg xmlns="http://www.w3.org/2000/svg"><path d="&d;"/></svg>\n'
    )
    code, out, err = measure([str(f), "--json"], capsys)
    assert code == 2 and "--allow-internal-entities" in err and "allow_entities=" not in err
    code, out, _ = measure([str(f), "--json", "--allow-internal-entities"], capsys)
    assert code == 0 and json.loads(out)["contours"][0]["length"] == pytest.approx(5.0)


def _scaled_line(tmp_path, aspect):
    f = tmp_path / f"scaled-{aspect or 'default'}.svg"
    par = f' preserveAspectRatio="{aspect}"' if aspect else ""
    f.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="50mm" '
        f'viewBox="0 0 100 100"{par}><path d="M0,0 L0,100"/></svg>'
    )
    return str(f)


def test_units_refused_when_x_and_y_scale_differently(tmp_path, capsys):
    # review item 12: preserveAspectRatio="none" maps the 100-unit viewBox onto 100 × 50 mm, so
    # x has 1 mm per unit and y 0.5 (W3C SVG 1.1 §7.8): no single mm length exists for the
    # vertical line (really 50 mm). Refused with one line naming the file; user units work.
    f = _scaled_line(tmp_path, "none")
    code, out, err = measure([f, "--units", "mm"], capsys)
    assert code == 2 and out == ""
    assert len(err.strip().splitlines()) == 1 and f in err and "preserveAspectRatio" in err
    code, out, _ = measure([f, "--json"], capsys)
    assert code == 0 and json.loads(out)["contours"][0]["length"] == pytest.approx(100.0)
    # the default "xMidYMid meet" scales both by min(100/100, 50/100) = 0.5 mm per unit
    # (W3C SVG 1.1 §7.8): 100 units = 50 mm
    code, out, _ = measure([_scaled_line(tmp_path, None), "--json", "--units", "mm"], capsys)
    assert code == 0 and json.loads(out)["contours"][0]["length"] == pytest.approx(50.0)


def test_area_of_a_contour_that_crosses_itself(tmp_path, capsys):
    # review item 5: a figure-eight's signed area is 0, but it encloses two lobes
    shapely = pytest.importorskip("shapely")
    from outlinebench.geometry import evaluate
    from outlinebench.io import read_svg

    f = tmp_path / "eight.svg"
    f.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg">'
        '<path d="M0,0 C0,-20 40,20 40,0 C40,-20 0,20 0,0 Z"/>'
        '<path d="M0,40 L20,60 L20,40 L0,60 Z"/>'
        '<path d="M50,0 L60,0 L60,10 L50,10 Z"/></svg>'
    )
    code, out, _ = measure([str(f), "--json"], capsys)
    eight, bowtie, square = json.loads(out)["contours"]
    # reference: shapely make_valid on a dense polyline of the curve (4,000 points per segment;
    # its chords cut off about 1e-7 of the area)
    segs = read_svg(f).document.outlines[0].contours[0].segments
    t = np.linspace(0.0, 1.0, 4001)[:-1]
    ring = np.vstack([evaluate(s, t) for s in segs])
    ref = shapely.make_valid(shapely.Polygon(ring)).area
    assert eight["self_intersecting"] is True
    assert eight["area"] == pytest.approx(ref, rel=1e-6)
    # bow-tie: two triangles ½ · 20 · 10 = 100 each (closed form), signed area 0
    assert bowtie["self_intersecting"] is True and bowtie["area"] == pytest.approx(200.0)
    assert square["self_intersecting"] is False and square["area"] == pytest.approx(100.0)
    _, text, _ = measure([str(f)], capsys)
    assert "crosses itself" in text
