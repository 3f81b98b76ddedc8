"""The command line never passes as clean what it did not read, and one bad file hides nothing.

Expected values: exit codes as the README and ``--help`` state them; geometry from closed
forms named beside each check; "common practice, no source" for the rules of a gate (a file
not fully read is not clean).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from outlinebench.cli import main

ROOT = Path(__file__).resolve().parents[2]
SAMPLES = ROOT / "samples"
CLEAN = str(SAMPLES / "signshop-lettering.svg")
NS = 'xmlns="http://www.w3.org/2000/svg"'

# A file exported with one path per glyph, the space glyph an empty path, plus every other
# kind of element with no segment (the list).
EMPTY_KINDS = (
    f'<svg {NS} width="100mm" height="100mm" viewBox="0 0 100 100">'
    '<path id="H" d="M10 10 H30 V40 H10 Z"/><path id="space" d=""/><path id="nod"/>'
    '<path id="lone" d="M5 5"/><path id="lonez" d="M5 5 Z"/>'
    '<rect id="flat" width="0" height="4"/><circle id="dot" r="0"/>'
    '<path id="point" d="M7 7 L7 7 Z"/><path id="zero" d="M1 1 C1 1 1 1 1 1"/></svg>'
)
NOTHING = f'<svg {NS} width="10mm" height="10mm"><path d=""/><path d="M1 1"/></svg>'


def run(args, capsys):
    code = main([str(a) for a in args])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture
def files(tmp_path):
    (tmp_path / "glyphs.svg").write_text(EMPTY_KINDS)
    (tmp_path / "nothing.svg").write_text(NOTHING)
    return tmp_path


@pytest.mark.parametrize(
    "cmd",
    [
        ["check"],
        ["measure"],
        ["flatten"],
        ["offset", "--distance", "1", "--units", "mm"],
        ["offset", "--distance", "-1", "--units", "mm"],
    ],
)
def test_paths_without_segments_never_crash(files, capsys, cmd):
    code, out, err = run([cmd[0], files / "glyphs.svg", *cmd[1:]], capsys)
    assert "Traceback" not in err and "internal error" not in err
    assert code in (0, 1)
    code, out, err = run([cmd[0], files / "nothing.svg", *cmd[1:]], capsys)
    assert "internal error" not in err
    # nothing to check is never clean: a finding (check, measure) or a refusal (cut files)
    assert code == (1 if cmd[0] in ("check", "measure") else 2)


def test_deviation_of_files_with_empty_paths(files, capsys):
    code, out, err = run(["deviation", files / "glyphs.svg", files / "glyphs.svg"], capsys)
    assert code == 0 and "internal error" not in err
    assert "deviation 0 " in out  # the same drawing: exactly 0


def test_nothing_to_check_is_a_finding_in_text_and_json(files, capsys):
    code, out, _ = run(["check", files / "nothing.svg", "--json"], capsys)
    data = json.loads(out)
    assert code == 1 and data["clean"] is False and data["summary"]["clean"] is False
    assert [f["kind"] for f in data["findings"]] == ["nothing-to-check"]


def test_partly_read_file_reports_what_was_read_and_every_error(tmp_path, capsys):
    f = tmp_path / "partly.svg"
    f.write_text(
        f'<svg {NS}><path d="M0,0 L10,0 L10,10 Z"/><path d="M0 0 L 5 x"/>'
        '<g transform="scale(2,"><rect width="3" height="3"/></g>'
        '<use href="#missing"/></svg>'
    )
    code, out, _ = run(["check", f, "--json"], capsys)
    data = json.loads(out)
    read_errors = [x for x in data["findings"] if x["kind"] == "read-error"]
    assert code == 1 and data["clean"] is False and len(read_errors) == 3
    # what was read is checked: the triangle's three corners (90°, 135°, 135°: its angles)
    corners = sorted(round(x["value"]) for x in data["findings"] if x["kind"] == "corner")
    assert corners == [90, 135, 135]


def test_live_text_blocks_a_pass_unless_allowed(tmp_path, capsys):
    f = tmp_path / "sign.svg"
    f.write_text(f'<svg {NS}><path d="M0 0 H10 V10 H0 Z"/><text>OPEN</text></svg>')
    code, out, _ = run(["check", f], capsys)
    assert code == 1 and "live-text" in out and "[error]" in out
    code, out, _ = run(["check", f, "--allow-text"], capsys)
    assert code == 0 and "live-text" in out and "[info]" in out


def test_a_crash_in_one_file_is_reported_and_the_others_still_checked(
    tmp_path, capsys, monkeypatch
):
    # A defect of ours in one file (simulated: the checker raises for that file) is reported
    # in one line with its own exit code 3; the good files are checked and printed; --debug
    # adds the traceback. Worker processes are forked, so they see the patched checker.
    import outlinebench.api as check_mod

    real = check_mod.check_document

    def flaky(doc, settings=None):
        if doc.path and doc.path.endswith("boom.svg"):
            raise ZeroDivisionError("simulated defect")
        return real(doc, settings)

    monkeypatch.setattr(check_mod, "check_document", flaky)
    boom = tmp_path / "boom.svg"
    boom.write_text(f'<svg {NS}><path d="M0 0 H10 V10 Z"/></svg>')
    bad = tmp_path / "bad.svg"
    bad.write_text("not xml")
    code, out, err = run(["check", CLEAN, boom, bad, CLEAN], capsys)
    assert code == 3
    lines = [x for x in err.splitlines() if x.startswith("outlinebench: error")]
    assert len(lines) == 2 and str(boom) in lines[0] and "internal error" in lines[0]
    assert str(bad) in lines[1] and "Traceback" not in err
    assert out.count(f"{CLEAN}: ") >= 2
    code, out, err = run(["check", CLEAN, boom, "--json"], capsys)
    data = json.loads(out)
    assert code == 3 and data[1]["clean"] is False and "internal_error" in data[1]
    assert data[0]["clean"] is True
    code, out, err = run(["check", boom, "--debug"], capsys)
    assert code == 3 and "Traceback" in err and "ZeroDivisionError" in err


def test_exit_codes_are_stated_in_help():
    res = subprocess.run(
        [sys.executable, "-m", "outlinebench", "check", "--help"],
        capture_output=True, text=True, cwd=ROOT, timeout=60,
    )  # fmt: skip
    text = " ".join(res.stdout.split())
    assert "0 clean" in text and "3 internal error" in text and "--allow-text" in text
    assert "--debug" in text


def test_check_walks_a_folder_sorted(tmp_path, capsys):
    (tmp_path / "b").mkdir()
    (tmp_path / "b" / "z.svg").write_text(f'<svg {NS}><path d="M0 0 H9 V9 H0 Z"/></svg>')
    (tmp_path / "a.svg").write_text(f'<svg {NS}><path d="M0 0 H9 V9 H0 Z"/></svg>')
    (tmp_path / "notes.txt").write_text("not an svg")
    code, out, _ = run(["check", tmp_path, "--json"], capsys)
    data = json.loads(out)
    assert [Path(d["file"]).name for d in data] == ["a.svg", "z.svg"] and code == 0
    empty = tmp_path / "empty"
    empty.mkdir()
    code, _, err = run(["check", empty], capsys)
    assert code == 2 and "no .svg file" in err


@pytest.mark.parametrize("cmd", [["flatten"], ["offset", "--distance", "1"]])
def test_output_never_overwrites_an_input(tmp_path, capsys, cmd):
    src = tmp_path / "design.svg"
    src.write_text(Path(CLEAN).read_text())
    before = src.read_bytes()
    link = tmp_path / "link.svg"
    link.symlink_to(src)
    hard = tmp_path / "hard.svg"
    os.link(src, hard)
    for target in (src, tmp_path / "." / "design.svg", link, hard):
        code, _, err = run([cmd[0], src, *cmd[1:], "-o", target], capsys)
        assert code == 2 and "output refused" in err and len(err.strip().splitlines()) == 1
    assert src.read_bytes() == before
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    code, _, err = run([cmd[0], src, *cmd[1:], "-o", fifo], capsys)
    assert code == 2 and "not a regular file" in err


def circle(cx: float, cy: float, r: float) -> str:
    return (
        f'<svg {NS} width="100mm" height="100mm" viewBox="0 0 100 100">'
        f'<circle cx="{cx}" cy="{cy}" r="{r}"/></svg>'
    )


def test_deviation_measures_the_second_files_curves_not_their_control_points(tmp_path, capsys):
    # Closed form: a circle and the same circle moved by v are |v| apart (Hausdorff distance:
    # the point of one farthest from the other lies on the line of v, |v| away). Here
    # v = (0.3, 0.4), |v| = 0.5 (the 3-4-5 triangle). Taking only the second circle's
    # on-curve points would give about r (1 − cos 45°) = 2.9 for r = 10.
    a, b = tmp_path / "a.svg", tmp_path / "b.svg"
    a.write_text(circle(50, 50, 10))
    b.write_text(circle(50.3, 50.4, 10))
    code, out, _ = run(["deviation", a, b, "--tolerance", "0.6", "--json"], capsys)
    (row,) = json.loads(out)["contours"]
    assert code == 0 and row["max_deviation"] == pytest.approx(0.5, abs=1e-3)
    code, out, _ = run(["deviation", a, b, "--tolerance", "0.4"], capsys)
    assert code == 1 and "EXCEEDS" in out
    code, out, _ = run(["deviation", a, a, "--json"], capsys)
    assert json.loads(out)["contours"][0]["max_deviation"] == 0.0


def test_default_tolerances_mean_the_same_length_for_every_command(tmp_path, capsys):
    # A drawing in inches (1 user unit = 25.4 mm): the default of flatten, offset and
    # deviation is 0.01 mm = 0.01 / 25.4 user units, as check's default gap.
    f = tmp_path / "inch.svg"
    f.write_text(
        f'<svg {NS} width="4in" height="4in" viewBox="0 0 4 4">'
        '<path d="M1 1 C2 0 3 2 3 3 Z"/></svg>'
    )
    want = 0.01 / 25.4
    _, out, _ = run(["flatten", f, "--json"], capsys)
    assert json.loads(out)["tolerance"] == pytest.approx(want, rel=1e-12)
    _, out, _ = run(["offset", f, "--distance", "0.1", "--json"], capsys)
    assert json.loads(out)["tolerance"] == pytest.approx(want, rel=1e-12)
    _, out, _ = run(["flatten", f, "--json", "--units", "mm"], capsys)
    assert json.loads(out)["tolerance"] == pytest.approx(0.01, rel=1e-12)
    _, out, _ = run(["check", f, "--json"], capsys)
    gaps = [x["limit"] for x in json.loads(out)["findings"] if x["kind"] == "tiny-segment"]
    assert all(g == pytest.approx(want) for g in gaps)


def test_words_and_units_are_consistent(tmp_path, capsys):
    f = tmp_path / "inch.svg"
    f.write_text(
        f'<svg {NS} width="4in" height="4in" viewBox="0 0 4 4"><path d="M1 1 L2 1 L2.02 1.5"/>'
        '<path d="M0 0 C0 0 1 0 1 1"/></svg>'
    )
    _, out, _ = run(["check", f, "--units", "in"], capsys)
    assert "lengths in inches" in out and "lengths in in;" not in out
    _, out, _ = run(["flatten", f], capsys)
    assert "user units" in out and "0.01 user" not in out.replace("user units", "")
    _, out, _ = run(["offset", f, "--distance", "0.2"], capsys)
    assert "None" not in out and "null" not in out and "-0 " not in out and "(-0," not in out
    _, out, _ = run(["measure", f], capsys)
    assert "null" not in out and "None" not in out
    _, out, _ = run(["check", f, "--json"], capsys)
    (handle,) = [x for x in json.loads(out)["findings"] if x["kind"] == "degenerate-handle"]
    assert handle["value"] == 0.0  # the handle lies exactly on its point


def test_positions_carry_enough_digits_for_a_large_font_outline(tmp_path, capsys):
    # a 200,000-unit outline: a kink at x = 199,999.53 must be findable from the text line
    f = tmp_path / "big.svg"
    f.write_text(
        f'<svg {NS} viewBox="0 0 250000 250000"><path d="M100000 100000 L199999.53 100000.25 '
        'L199999.53 200000 L100000 200000 Z"/></svg>'
    )
    _, out, _ = run(["check", f], capsys)
    assert "(199999.53, 100000.25)" in out


@pytest.mark.slow
def test_hostile_input_gives_one_line_errors_naming_the_file_and_no_numpy_warnings(tmp_path):
    # issue "hardened against broken and hostile input": an id holding a newline stays on
    # one line; coordinates near the largest double are a read error (lengths past it cannot
    # be measured); a geometry error names the file; numpy's warnings never reach stderr.
    head = f'<svg {NS} width="100mm" height="100mm" viewBox="0 0 100 100">'
    cases = {
        "newline.svg": head + '<path id="a&#10;other.svg: fine" d="M0 0 L1 1 L5"/></svg>',
        "huge.svg": head + '<path d="M0 0 L1e308 0 L1e308 1e308 Z"/></svg>',
        "e20.svg": head + '<path d="M0 0 L1e20 0 L1e20 1e20 Z"/></svg>',
    }
    for name, text in cases.items():
        (tmp_path / name).write_text(text)
    for cmd in (["check"], ["measure"], ["flatten"], ["offset", "--distance", "1"]):
        for name in cases:
            res = subprocess.run(
                [sys.executable, "-m", "outlinebench", cmd[0], str(tmp_path / name), *cmd[1:]],
                capture_output=True, text=True, cwd=ROOT, timeout=120,
            )  # fmt: skip
            assert "Warning" not in res.stderr and "Traceback" not in res.stderr, res.stderr
            for line in res.stderr.strip().splitlines():
                assert name in line, (cmd, name, line)
            if name == "newline.svg":
                lines = (res.stdout + res.stderr).splitlines()
                assert all(not x.startswith("other.svg") for x in lines)
            if name == "huge.svg" and cmd[0] in ("check", "measure"):
                assert res.returncode == 1 and "beyond ±1e+150" in res.stdout
