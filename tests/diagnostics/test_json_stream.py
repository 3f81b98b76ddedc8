"""JSON written piece by piece: the same text as the standard library's indented encoder."""

from __future__ import annotations

import io
import json
import math
from pathlib import Path

from hypothesis import given
from hypothesis import strategies as st

from outlinebench.__main__ import main
from outlinebench.api.measuring import measure_document
from outlinebench.diagnostics.report import iter_json, write_json_stream
from outlinebench.subcommands.check import check_file
from outlinebench.subcommands.measure import read_svg_partly

ROOT = Path(__file__).resolve().parents[2]
DEFECTS = str(ROOT / "samples" / "signshop-lettering-defects.svg")
BRACKET = str(ROOT / "samples" / "workshop-bracket.svg")


def _reference(obj) -> str:
    """The standard library's text (non-finite floats as null first, as the CLI always did)."""

    def clean(o):
        if isinstance(o, float):
            return o if math.isfinite(o) else None
        if isinstance(o, dict):
            return {k: clean(v) for k, v in o.items()}
        if isinstance(o, (list, tuple)):
            return [clean(v) for v in o]
        return o

    return json.dumps(clean(obj), indent=2, ensure_ascii=False, allow_nan=False) + "\n"


_scalars = (
    st.none()
    | st.booleans()
    | st.integers(-(10**20), 10**20)
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.text(max_size=8)
)
_json = st.recursive(
    _scalars,
    lambda inner: (
        st.lists(inner, max_size=5) | st.dictionaries(st.text(max_size=5), inner, max_size=5)
    ),
    max_leaves=30,
)


@given(_json)
def test_equals_the_standard_librarys_indented_text(obj):
    out = io.StringIO()
    write_json_stream(obj, out)
    assert out.getvalue() == _reference(obj)  # reference: json.dumps(indent=2)


def test_a_generator_is_written_as_a_list():
    rows = [{"kind": "kink", "value": 1.5}, {"kind": "gap", "value": None}]
    got = "".join(iter_json({"findings": (r for r in rows)}))
    assert got + "\n" == _reference({"findings": rows})  # reference: json.dumps(indent=2)


_OPTIONS = {
        "json": True, "hide_info": False, "allow_entities": False, "allow_text": False,
        "gap": None, "gap_search": None, "kink_angle": None, "corner_angle": None,
        "curvature_jump": None, "profile": None, "glyphs": None, "units": "user",
}  # fmt: skip


def test_check_json_equals_json_dumps_of_the_report(capsys):
    report = check_file(DEFECTS, dict(_OPTIONS))["json"]  # the structure, not streamed
    assert len(report["findings"]) > 3
    main(["check", "--json", DEFECTS])
    assert capsys.readouterr().out == _reference(report)  # reference: json.dumps(indent=2)


def test_check_json_of_several_files_equals_json_dumps_of_the_list(capsys):
    files = [DEFECTS, BRACKET, str(ROOT / "samples" / "no-such-file.svg")]
    reports = [check_file(f, dict(_OPTIONS)) for f in files]
    want = [r["json"] for r in reports[:2]]
    want.append({"file": files[2], "clean": False, "error": reports[2]["error"]})
    main(["check", "--json", "--jobs", "2", *files])
    assert capsys.readouterr().out == _reference(want)  # reference: json.dumps(indent=2)


def test_measure_json_equals_json_dumps_of_the_measurements(capsys):
    read = read_svg_partly(BRACKET, allow_entities=False, allow_text=True, glyphs=None)
    m = measure_document(read.document, "user", True)
    want = {
        "file": BRACKET,
        "complete": True,
        **m,
        "findings": [f.to_dict() for f in read.file_findings],
        "notes": read.notes,
    }
    main(["measure", "--json", "--joins", BRACKET])
    assert capsys.readouterr().out == _reference(want)  # reference: json.dumps(indent=2)
