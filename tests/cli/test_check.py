"""``outlinebench check`` through its real entry points: exit codes, text lines, JSON schema,
units, options and one-line errors on bad input."""

import json
import math
import re
import subprocess
import sys
from pathlib import Path

import pytest

from outlinebench.__main__ import main
from outlinebench.diagnostics import CHECK_KINDS

ROOT = Path(__file__).resolve().parents[2]
SAMPLES = ROOT / "samples"
CLEAN = str(SAMPLES / "signshop-lettering.svg")
DEFECTS = str(SAMPLES / "signshop-lettering-defects.svg")
BRACKET = str(SAMPLES / "workshop-bracket.svg")
BRACKET_DEFECTS = str(SAMPLES / "workshop-bracket-defects.svg")

# "file: contour N, segment M (or join J): kind value at (x, y) [severity]"
LINE = re.compile(
    r"^(?P<file>.+?): contour (?P<c>\d+)(, (segment|join) (?P<s>\d+))?: (?P<kind>[a-z-]+)"
    r"(?P<value>.*) at \((?P<x>[-\d.e+]+), (?P<y>[-\d.e+]+)\) \[(error|warning|info)\]$"
)


def run(args, capsys):
    code = main(["check", *args])
    out = capsys.readouterr()
    return code, out.out, out.err


def test_clean_sample_exits_0_with_only_info(capsys):
    code, out, err = run([CLEAN], capsys)
    assert code == 0, out + err
    lines = out.strip().splitlines()
    assert all(LINE.match(x) for x in lines[:-1]), lines[:3]
    assert "0 errors, 0 warnings" in lines[-1]


def test_defects_sample_exits_1_and_has_every_kind(capsys):
    code, out, err = run([DEFECTS, "--json"], capsys)
    assert code == 1
    data = json.loads(out)
    assert isinstance(data, dict)
    assert set(data) >= {"findings", "summary", "file", "units", "caution"}
    kinds = {f["kind"] for f in data["findings"]}
    # every kind is planted (samples/README.md); duplicate contours are checked in
    # tests/diagnostics/test_duplicates.py, the profile kinds (overlap, touch, grid-kink) in
    # tests/diagnostics/test_profiles.py and tests/cli/test_union_command.py
    assert kinds == set(CHECK_KINDS) - {"duplicate-contour", "overlap", "touch", "grid-kink"}
    for f in data["findings"]:
        assert set(f) >= {"kind", "severity", "outline", "contour", "segment", "t", "x", "y",
                          "value", "unit", "message"}  # fmt: skip
        assert f["severity"] in ("error", "warning", "info")
    s = data["summary"]
    assert s["total"] == len(data["findings"]) and s["clean"] is False
    assert s["errors"] + s["warnings"] + s["info"] == s["total"]


def test_planted_defects_are_where_the_readme_says(capsys):
    _, out, _ = run([DEFECTS, "--json"], capsys)
    found = json.loads(out)["findings"]

    def one(kind, **where):
        hits = [f for f in found if f["kind"] == kind and all(f[k] == v for k, v in where.items())]
        assert hits, (kind, where)
        return hits[0]

    # gap: letter H (outline 0, contour 0) stops 0.4 mm short of its start (10, 10)
    g = one("gap", contour=0)
    assert g["value"] == pytest.approx(0.4) and (g["x"], g["y"]) == (10.0, 10.0)
    # tiny segment of 0.005 mm on H's right stem
    assert one("tiny-segment", contour=0)["value"] == pytest.approx(0.005)
    # corner against the stated smooth intent: A's join 1 at (92, 70), an error
    c = one("corner", contour=1, segment=1)
    assert c["severity"] == "error" and (c["x"], c["y"]) == (92.0, 70.0)
    # cusp of the U at t = ½, at (240.5, 76) (construction in make_samples.py)
    cu = one("cusp")
    assert (cu["x"], cu["y"]) == pytest.approx((240.5, 76.0)) and cu["t"] == pytest.approx(0.5)
    # R's counter winds like the R: wrong direction on contour 4, inside contour 3
    assert one("wrong-direction", contour=4)["other_contour"] == 3
    # review item 8, every other planted defect where samples/README.md puts it:
    # kink of the O (contour 8) at (222, 40): the outgoing handle (−0.88, K·30) against the
    # vertical arc end, atan(0.88 / (30 K)) = 3.04° with K = 4(√2 − 1)/3 (make_samples.py)
    k = 4 * (math.sqrt(2) - 1) / 3
    kink = one("kink", contour=8)
    assert (kink["x"], kink["y"]) == pytest.approx((222.0, 40.0))
    expect = math.degrees(math.atan(0.88 / (30 * k)))
    assert kink["value"] == pytest.approx(expect, abs=1e-4)  # the file rounds K·30
    # curvature jumps of the O's counter (contour 9), warnings at (192, 40) and (202, 60)
    for x, y in ((192.0, 40.0), (202.0, 60.0)):
        jump = one("curvature-jump", contour=9, x=pytest.approx(x), y=pytest.approx(y))
        assert jump["severity"] == "warning"
    # A's counter crosses A (contours 1 × 2); the flourish crosses itself at (125, 76):
    # symmetric about x = 125 by construction, so the crossing lies on that axis
    assert one("self-intersection", contour=1, other_contour=2)
    flourish = one("self-intersection", contour=16, other_contour=16)
    assert (flourish["x"], flourish["y"]) == pytest.approx((125.0, 76.0), abs=1e-6)
    # the O2's right side as one arc with both handles at x = 338 + 1.3333·20: by symmetry
    # its x extremum is at t = ½, x(½) = (P0 + 3P1 + 3P2 + P3)/8 = 338 + 0.75·1.3333·20
    ext = one("missing-extremum", contour=13)
    assert (ext["x"], ext["y"]) == pytest.approx((338.0 + 0.75 * 1.3333 * 20, 40.0), abs=1e-9)
    # B's lower bowl: the last handle on its end point (contour 5, segment 6, t = 1)
    dh = one("degenerate-handle", contour=5, segment=6)
    assert dh["t"] == 1.0 and dh["value"] == 0.0
    # the stray underline M10,76 L100,76: open, ends 90 apart
    assert one("open-contour", contour=15)["value"] == pytest.approx(90.0)
    # side effects the README lists (review item 9)
    for y in (70.0, 10.0):
        side = one("curvature-jump", contour=13, x=pytest.approx(338.0), y=pytest.approx(y))
        assert side["severity"] == "warning"
    bend = one("corner", contour=5, segment=6)
    assert (bend["x"], bend["y"]) == (160.0, 70.0) and bend["value"] == pytest.approx(
        24.12, abs=0.01
    )
    # no missing-extremum at the U's cusp (the cusp's tip is not an extremum, review item 6)
    assert not [f for f in found if f["kind"] == "missing-extremum" and f["contour"] == 10]


def test_several_files_give_a_list_and_worst_exit_code(capsys):
    code, out, _ = run([CLEAN, BRACKET, BRACKET_DEFECTS, "--json"], capsys)
    data = json.loads(out)
    assert [d["file"] for d in data] == [CLEAN, BRACKET, BRACKET_DEFECTS]
    assert code == 1


def test_unreadable_file_one_line_exit_2_others_checked(tmp_path, capsys):
    # SVG 2 §9.5.4 "Error handling in path data": render up to the error, so the file is read
    # in part and its error becomes a read-error finding; a missing file is unreadable.
    bad = tmp_path / "broken.svg"
    bad.write_text('<svg xmlns="http://www.w3.org/2000/svg"><path d="M 0 0 L 1 x"/></svg>')
    missing = tmp_path / "missing.svg"
    code, out, err = run([CLEAN, str(bad), str(missing)], capsys)
    assert code == 2
    err_lines = [x for x in err.splitlines() if x.startswith("outlinebench: error")]
    assert len(err_lines) == 1 and str(missing) in err_lines[0]
    assert f"{bad}: read-error: " in out and "offset 10" in out
    assert f"{bad}: " in out and out.count("not clean") >= 1
    assert "Traceback" not in err
    assert f"{CLEAN}: " in out  # the good file was still checked


def test_real_entry_point_bad_input_no_traceback(tmp_path):
    bad = tmp_path / "not-svg.svg"
    bad.write_text("this is not xml")
    res = subprocess.run(
        [sys.executable, "-m", "outlinebench", "check", str(bad)],
        capture_output=True, text=True, cwd=ROOT, timeout=60,
    )  # fmt: skip
    assert res.returncode == 2
    assert len(res.stderr.strip().splitlines()) == 1 and str(bad) in res.stderr
    assert "Traceback" not in res.stderr


def test_real_entry_point_clean_and_defects():
    res = subprocess.run(
        [sys.executable, "-m", "outlinebench", "check", CLEAN, DEFECTS],
        capture_output=True, text=True, cwd=ROOT, timeout=120,
    )  # fmt: skip
    assert res.returncode == 1, res.stderr
    assert "checking [" not in res.stderr  # no progress bar when stderr is not a terminal


def test_units_convert_positions_and_lengths(tmp_path, capsys):
    # 100 mm wide, viewBox 1000 wide: one user unit is 0.1 mm (W3C SVG 1.1 §7.7 viewBox);
    # an open line from (0,0) to (300,400): ends 500 user units = 50 mm apart
    f = tmp_path / "scaled.svg"
    f.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="100mm" '
        'viewBox="0 0 1000 1000"><path d="M0,0 L300,400"/></svg>'
    )
    _, out, _ = run([str(f), "--json"], capsys)
    user = json.loads(out)["findings"][0]
    _, out, _ = run([str(f), "--json", "--units", "mm"], capsys)
    mm = json.loads(out)
    f_mm = mm["findings"][0]
    assert user["kind"] == "open-contour" and user["value"] == pytest.approx(500.0)
    assert f_mm["value"] == pytest.approx(50.0) and f_mm["unit"] == "mm"
    assert mm["units"] == "mm"
    _, out, _ = run([str(f), "--json", "--units", "in"], capsys)
    assert json.loads(out)["findings"][0]["value"] == pytest.approx(50.0 / 25.4)  # 1 in = 25.4 mm


def test_gap_and_angle_options(capsys):
    # --gap 0.5 (mm, the file's user unit): H's 0.4 mm gap counts as joined
    _, out, _ = run([DEFECTS, "--json", "--gap", "0.5"], capsys)
    kinds = [f["kind"] for f in json.loads(out)["findings"]]
    assert "gap" not in kinds
    # --kink-angle 10 --corner-angle 20: the O's 3° kink is no longer a kink
    _, out, _ = run([DEFECTS, "--json", "--kink-angle", "10", "--corner-angle", "20"], capsys)
    kinks = [f for f in json.loads(out)["findings"] if f["kind"] == "kink"]
    assert all(f["value"] >= 10 for f in kinks)
    code, _, err = run([DEFECTS, "--kink-angle", "30", "--corner-angle", "20"], capsys)
    assert code == 2 and "kink-angle" in err


def test_bad_option_value_is_a_usage_error(capsys):
    with pytest.raises(SystemExit) as exc:
        main(["check", CLEAN, "--gap", "-1"])
    assert exc.value.code == 2
    assert "expected a number above 0" in capsys.readouterr().err


def test_text_lists_every_finding_unless_info_is_hidden(capsys):
    # issue 4: "one line per finding" by default (review item 7); --hide-info leaves the info
    # lines out and the summary still counts them
    _, out, _ = run([BRACKET_DEFECTS], capsys)
    lines = out.strip().splitlines()
    assert out.count("[info]") == 14 and "[warning]" in out and "[error]" in out
    assert len(lines) - 1 == 19 and "19 findings" in lines[-1]  # one line each + summary
    _, hidden, _ = run([BRACKET_DEFECTS, "--hide-info"], capsys)
    assert "[info]" not in hidden and "[warning]" in hidden
    assert "14 info" in hidden.splitlines()[-1]


def test_bad_option_combination_is_one_usage_line_before_any_file(tmp_path, capsys):
    # review item 3: a bad option is the user's, not the files'; one line, exit 2, nothing
    # read (a missing file is not even mentioned). Limits from CheckSettings' docstring:
    # 0 < kink angle < corner angle ≤ 180°, gap search ≥ gap.
    missing = str(tmp_path / "missing.svg")
    code, out, err = run([CLEAN, BRACKET, missing, "--corner-angle", "200", "--json"], capsys)
    assert code == 2 and out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "--corner-angle" in lines[0] and "180" in lines[0]
    assert missing not in err
    # --gap-search below the default gap tolerance (0.01 mm), compared in the user's unit
    code, out, err = run([CLEAN, missing, "--gap-search", "0.001", "--units", "mm"], capsys)
    lines = err.strip().splitlines()
    assert code == 2 and out == "" and len(lines) == 1
    assert "--gap-search 0.001 mm" in lines[0] and "0.01 mm" in lines[0]
    code, _, err = run([CLEAN, "--gap", "0.5", "--gap-search", "0.1", "--units", "mm"], capsys)
    assert code == 2 and "--gap-search 0.1 mm" in err and "--gap 0.5 mm" in err
    # in px (1 px = 25.4/96 mm, CSS Values 3 §5.2): the default gap is 0.03780 px
    code, _, err = run([CLEAN, "--gap-search", "0.001", "--units", "px"], capsys)
    assert code == 2 and "--gap-search 0.001 px" in err and "0.0378 px" in err
    # in user units the default gap depends on the file (the samples: 1 unit = 1 mm), so the
    # file is named: one line for it, exit 2
    code, _, err = run([CLEAN, "--gap-search", "0.001"], capsys)
    lines = err.strip().splitlines()
    assert code == 2 and len(lines) == 1 and CLEAN in lines[0] and "0.01 user units" in lines[0]


def test_json_carries_the_readers_notes(tmp_path, capsys):
    # issue "never silently wrong": a file whose only content is a <text> element is not
    # clean; live text is an error finding unless --allow-text, and an empty drawing is a
    # nothing-to-check finding (common practice, no source: a gate passes only what it read)
    text_only = tmp_path / "textonly.svg"
    text_only.write_text('<svg xmlns="http://www.w3.org/2000/svg"><text>Harbour</text></svg>')
    code, out, _ = run([str(text_only), "--json"], capsys)
    data = json.loads(out)
    assert code == 1 and data["clean"] is False
    kinds = {f["kind"]: f for f in data["findings"]}
    assert set(kinds) == {"live-text", "nothing-to-check"}
    assert kinds["live-text"]["severity"] == "error" and kinds["live-text"]["count"] == 1
    assert "text" in kinds["live-text"]["message"]
    code, out, _ = run([str(text_only), "--json", "--allow-text"], capsys)
    data = json.loads(out)
    kinds = {f["kind"]: f for f in data["findings"]}
    assert kinds["live-text"]["severity"] == "info" and code == 1  # still nothing to check
    empty = tmp_path / "empty.svg"
    empty.write_text('<svg xmlns="http://www.w3.org/2000/svg"/>')
    code, out, err = run([str(empty), "--json"], capsys)
    data = json.loads(out)
    assert code == 1 and [f["kind"] for f in data["findings"]] == ["nothing-to-check"]
    assert "no outline" in data["findings"][0]["message"]
    code, out, _ = run([str(empty)], capsys)
    assert code == 1 and "nothing-to-check" in out and "not clean" in out
    # a file with outlines has no file findings and an empty list of notes
    code, out, _ = run([BRACKET, "--json"], capsys)
    data = json.loads(out)
    assert data["notes"] == [] and data["clean"] is True and code == 0
    assert not [f for f in data["findings"] if f.get("place") == "file"]


ENTITY_SVG = (
    '<?xml version="1.0"?>\n<!DOCTYPE svg [<!ENTITY d "M0,0 L3,4">]>\n'
    '<svg xmlns="http://www.w3.org/2000/svg"><path d="&d;"/></svg>\n'
)


def test_internal_entities_need_the_command_line_option(tmp_path, capsys):
    # review item 13: refused by default (XML 1.0 §4.2 internal entities can expand without
    # bound), with a hint a command-line user can follow, not a Python keyword
    f = tmp_path / "entity.svg"
    f.write_text(ENTITY_SVG)
    code, out, err = run([str(f)], capsys)
    assert code == 2 and "--allow-internal-entities" in err and "allow_entities=" not in err
    code, out, err = run([str(f), "--allow-internal-entities", "--json"], capsys)
    found = json.loads(out)["findings"]
    # the entity expands to M0,0 L3,4: an open line whose ends are 5 apart (3-4-5 triangle)
    (finding,) = [f for f in found if f["kind"] == "open-contour"]
    assert finding["value"] == pytest.approx(5.0)


def test_units_refused_when_x_and_y_scale_differently(tmp_path, capsys):
    # review item 12 (see tests/cli/test_measure.py): x 1 mm per unit, y 0.5 (W3C SVG 1.1 §7.8)
    f = tmp_path / "none.svg"
    f.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="50mm" '
        'viewBox="0 0 100 100" preserveAspectRatio="none"><path d="M0,0 L0,100"/></svg>'
    )
    code, out, err = run([str(f), "--units", "mm"], capsys)
    lines = [x for x in err.splitlines() if "error" in x]
    assert code == 2 and len(lines) == 1 and str(f) in lines[0] and "--units user" in lines[0]
    code, _, _ = run([str(f)], capsys)
    assert code == 1  # user units: checked (an open line)


def test_jobs_gives_the_same_report_as_one_worker_and_refuses_zero(capsys):
    files = [CLEAN, DEFECTS, BRACKET, BRACKET_DEFECTS]
    code1, out1, _ = run(["--json", "--jobs", "1", *files], capsys)
    code2, out2, _ = run(["--json", "--jobs", "2", *files], capsys)
    # reference: each file checked on its own (one call per file), in the order given
    alone = [json.loads(run(["--json", f], capsys)[1]) for f in files]
    assert json.loads(out1) == alone
    assert (code1, out1) == (code2, out2)
    with pytest.raises(SystemExit) as exc:
        main(["check", "--jobs", "0", CLEAN])
    assert exc.value.code == 2  # argparse usage error (Python argparse documentation)
    assert "--jobs" in capsys.readouterr().err
