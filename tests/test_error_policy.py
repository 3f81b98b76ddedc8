"""One error policy (DEVELOPERS.md, Conventions): errors carry their file and reason as fields,
the line a user sees is rendered once and names the file exactly once, and decisions are made
from fields, not message text. The rule itself is the project's ("every error line names the
file", issue 9 and 15); the checks below are against the command line's real output."""

import pickle
import subprocess
import sys

import pytest

from outlinebench import api
from outlinebench.errors import (
    FontReadError,
    OptionError,
    OutlinebenchError,
    SvgReadError,
    UnsafeXmlError,
    error_line,
)

BAD_SVG = {
    "malformed.svg": b"<svg xmlns='http://www.w3.org/2000/svg'><path d='M0 0 L1 1'></svg>",
    "entity.svg": (
        b"<?xml version='1.0'?><!DOCTYPE svg [<!ENTITY shop 'Lindqvist Signs'>]>"
        b"<svg xmlns='http://www.w3.org/2000/svg'><title>&shop;</title></svg>"
    ),
    "external.svg": (
        b"<?xml version='1.0'?><!DOCTYPE svg [<!ENTITY x SYSTEM 'file:///etc/hostname'>]>"
        b"<svg xmlns='http://www.w3.org/2000/svg'><title>&x;</title></svg>"
    ),
    "notsvg.svg": b"<drawing><path d='M0 0 L1 1'/></drawing>",
}


@pytest.mark.parametrize("name", sorted(BAD_SVG))
def test_reader_errors_carry_the_file_and_name_it_once(tmp_path, name):
    path = tmp_path / name
    path.write_bytes(BAD_SVG[name])
    with pytest.raises(OutlinebenchError) as info:
        api.read_source(path)
    exc = info.value
    assert exc.file == str(path)
    line = error_line(exc, str(path))
    assert line.startswith(f"{path}: ")
    assert line.count(str(path)) == 1


def test_a_refused_entity_says_why_in_a_field(tmp_path):
    path = tmp_path / "entity.svg"
    path.write_bytes(BAD_SVG["entity.svg"])
    with pytest.raises(UnsafeXmlError) as info:
        api.read_source(path)
    assert info.value.reason == "internal-entity"
    path = tmp_path / "external.svg"
    path.write_bytes(BAD_SVG["external.svg"])
    with pytest.raises(UnsafeXmlError) as info:
        api.read_source(path)
    assert info.value.reason == "external"


def test_a_font_that_is_not_a_font_names_its_file(tmp_path):
    path = tmp_path / "sign-letters.ttf"
    path.write_bytes(b"not a font at all, only text from the sign shop's order sheet")
    with pytest.raises(FontReadError) as info:
        api.read_source(path)
    assert info.value.file == str(path)
    assert error_line(info.value, str(path)).count(str(path)) == 1


def test_fields_survive_pickling_from_worker_processes():
    exc = UnsafeXmlError("a.svg: entity refused", reason="internal-entity", file="a.svg")
    back = pickle.loads(pickle.dumps(exc))
    assert (type(back), back.reason, back.file, str(back)) == (
        UnsafeXmlError,
        "internal-entity",
        "a.svg",
        "a.svg: entity refused",
    )


def test_error_line_names_the_callers_file_when_the_error_does_not():
    assert error_line(OptionError("--tolerance must be > 0"), "a.svg") == (
        "a.svg: --tolerance must be > 0"
    )
    assert error_line(SvgReadError("b.svg: bad", file="b.svg"), "a.svg") == "b.svg: bad"
    assert error_line(OSError(2, "No such file or directory", "c.svg")) == (
        "c.svg: No such file or directory"
    )
    # an error text holding a newline stays one line (a second line could pose as another file's)
    assert "\n" not in error_line(OptionError("x\ny"), "a.svg")


def _run(*args):
    return subprocess.run(
        [sys.executable, "-m", "outlinebench", *args], capture_output=True, text=True
    )


@pytest.mark.parametrize("command", ["check", "measure", "flatten"])
def test_the_command_line_names_the_file_exactly_once(tmp_path, command):
    path = tmp_path / "notsvg.svg"
    path.write_bytes(BAD_SVG["notsvg.svg"])
    extra = ["-o", str(tmp_path / "out.svg")] if command == "flatten" else []
    res = _run(command, str(path), *extra)
    assert res.returncode == 2, res.stderr
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1, res.stderr
    assert lines[0].count(str(path)) == 1, lines[0]


def test_the_entity_hint_names_the_option_once(tmp_path):
    path = tmp_path / "entity.svg"
    path.write_bytes(BAD_SVG["entity.svg"])
    res = _run("check", str(path))
    assert res.returncode == 2
    assert res.stderr.count("--allow-internal-entities") == 1, res.stderr
    assert res.stderr.count(str(path)) == 1, res.stderr
