"""``outlinebench repair`` through the real entry point (python -m outlinebench)."""

import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from outlinebench.diagnostics import CheckSettings, check_document, is_problem
from outlinebench.io import load_svg

SAMPLES = Path(__file__).resolve().parents[2] / "samples"

# An invented part from "Kestrel Fabrication": a plate left open 0.3 mm short of its start,
# a hole wound the same way as the plate, and a title that no repair may touch.
PLATE = """<?xml version="1.0" encoding="UTF-8"?>
<!-- Kestrel Fabrication: cover plate, rev. B -->
<svg xmlns="http://www.w3.org/2000/svg" width="80mm" height="60mm" viewBox="0 0 80 60">
  <title>cover plate</title>
  <path id="plate" style="fill:#123456"   d="M 10 10 L 70 10 L 70 50 L 10 50 L 10 10.3"/>
  <path id="hole" d="M 30 20 L 50 20 L 50 40 L 30 40 Z M 32 22 L 48 22 L 48 38 L 32 38 Z"/>
  <text x="5" y="58">KESTREL</text>
</svg>
"""


def run(*args):
    return subprocess.run(
        [sys.executable, "-m", "outlinebench", *map(str, args)], capture_output=True, text=True
    )


@pytest.fixture
def plate(tmp_path):
    p = tmp_path / "plate.svg"
    p.write_text(PLATE)
    return p


def problems(path):
    return [f for f in check_document(load_svg(str(path)), CheckSettings()) if is_problem(f)]


def test_fixes_and_keeps_every_other_byte(plate, tmp_path):
    out = tmp_path / "fixed.svg"
    before = plate.read_bytes()
    res = run(
        "repair",
        plate,
        "--fix",
        "close-gaps,fix-direction",
        "--max-change",
        "0.2",
        "-o",
        out,
        "--json",
    )
    assert res.returncode == 0, res.stderr
    report = json.loads(res.stdout)
    assert {f["kind"] for f in report["fixes"] if f["status"] == "fixed"} == {
        "close-gaps",
        "fix-direction",
    }
    gap = next(f for f in report["fixes"] if f["kind"] == "close-gaps")
    # closing a 0.3 gap at its start or end moves one end by 0.3; at the midpoint by 0.15
    assert 0.0 < gap["change"] <= 0.15 + 1e-3
    assert plate.read_bytes() == before  # the input is never written
    assert problems(plate) and not problems(out)
    data = out.read_text()
    # bytes the repairs do not own are kept: the comment, title, text and the style
    for kept in ("<!-- Kestrel Fabrication: cover plate, rev. B -->", "<title>cover plate</title>",
                 '<text x="5" y="58">KESTREL</text>', 'style="fill:#123456"   d='):  # fmt: skip
        assert kept in data
    # and everything outside the two d attributes is byte for byte the same
    strip = re.compile(r'\sd="[^"]*"')
    assert strip.sub("", data) == strip.sub("", PLATE)
    assert data.count(" d=") == PLATE.count(" d=")


def test_refused_beyond_the_limit_leaves_the_design(plate, tmp_path):
    out = tmp_path / "fixed.svg"
    res = run("repair", plate, "--fix", "close-gaps", "--max-change", "0.01", "-o", out)
    assert res.returncode == 1
    assert "refused" in res.stdout and "more than the allowed" in res.stdout
    # nothing applied: the output reads back to the same geometry as the input
    a, b = load_svg(str(plate)), load_svg(str(out))
    assert [len(c.segments) for o in a.outlines for c in o.contours] == [
        len(c.segments) for o in b.outlines for c in o.contours
    ]
    assert not b.outlines[0].contours[0].closed


def test_never_over_the_input_unless_in_place(plate, tmp_path):
    before = plate.read_bytes()
    res = run("repair", plate, "--fix", "all", "-o", plate)
    assert res.returncode == 2 and "--in-place" in res.stderr
    # the same file under another name (a hard link and a symbolic link): file identity
    link = tmp_path / "link.svg"
    os.link(plate, link)
    sym = tmp_path / "sym.svg"
    sym.symlink_to(plate)
    for other in (link, sym):
        res = run("repair", plate, "--fix", "all", "-o", other)
        assert res.returncode == 2, res.stdout
    assert plate.read_bytes() == before
    res = run("repair", plate, "--fix", "all", "--max-change", "0.2", "--in-place")
    assert res.returncode == 0, res.stdout + res.stderr
    assert plate.read_bytes() != before and not problems(plate)


def test_dry_run_writes_nothing(plate, tmp_path):
    out = tmp_path / "never.svg"
    res = run("repair", plate, "--fix", "all", "--max-change", "0.2", "--dry-run")
    assert res.returncode == 0 and "would be applied" in res.stdout
    assert not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plate.svg"]


def test_bad_options(plate):
    res = run("repair", plate, "--fix", "tidy-up", "--dry-run")
    assert res.returncode == 2 and "unknown kind 'tidy-up'" in res.stderr
    res = run("repair", plate, "--fix", "all")
    assert res.returncode == 2 and "-o OUT.svg" in res.stderr
    res = run("repair", plate.with_name("missing.svg"), "--fix", "all", "--dry-run")
    assert res.returncode == 2 and "Traceback" not in res.stderr


@pytest.mark.parametrize("name", ["workshop-bracket-defects.svg", "signshop-lettering-defects.svg"])
def test_defect_samples(name, tmp_path):
    src = tmp_path / name
    shutil.copy(SAMPLES / name, src)
    out = tmp_path / "out.svg"
    res = run("repair", src, "--fix", "all", "--units", "mm", "--max-change", "0.5", "-o", out,
              "--json")  # fmt: skip
    assert res.returncode in (0, 1), res.stderr
    report = json.loads(res.stdout)
    fixed = [f for f in report["fixes"] if f["status"] == "fixed"]
    assert fixed
    for f in report["fixes"]:
        assert f["reason"]  # every fix says what it did, every refusal why
        if f["status"] == "fixed":
            assert f["change"] <= 0.5
    # what check finds in the output is what was refused or has no repair, never more
    before = {(f.kind, f.contour) for f in problems(src)}
    after = problems(out)
    assert len(after) < len(before)
    # every problem still found is answered for: refused with a reason, or left with one
    unanswered = len(after) - sum(f["status"] in ("refused", "left") for f in report["fixes"])
    assert unanswered <= 0
    assert report["remaining_problems"] == len(after)
    assert {f.kind for f in after} <= {f[0] for f in before}
    if name.startswith("workshop"):
        assert res.returncode == 0 and after == []


def test_a_run_is_one_undo_step(plate):
    from outlinebench.model import History, documents_equal
    from outlinebench.subcommands.repair import repair_document

    doc = load_svg(str(plate))
    result = repair_document(doc, ["close-gaps", "fix-direction"], max_change=0.2)
    history = History(doc)
    history.do(result.command("Repair all"))
    assert documents_equal(history.document, result.document)
    assert not [f for f in check_document(history.document, CheckSettings()) if is_problem(f)]
    assert history.undo() is doc
