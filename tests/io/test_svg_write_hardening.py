"""Regression tests of issue 15 in outlinebench/io/svg_write.py: special targets, killed saves,
declared encodings, one-line messages."""

import os
import stat
import subprocess
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest

from outlinebench.errors import SvgWriteError
from outlinebench.io import read_svg, svg_bytes, write_svg
from outlinebench.io.svg_write import one_line, write_file_atomic
from outlinebench.model.document import Contour

DATA = Path(__file__).resolve().parents[1] / "data" / "svg"
BRACKET = DATA / "kestrel_bracket.svg"


def _edited(path):
    doc = read_svg(path).document
    c = doc.outlines[0].contours[0]
    moved = Contour.from_points(
        [np.asarray(s) + [0.125, 0.0] for s in c.segments], closed=c.closed, joins=c.joins
    )
    return doc.replace_contour(0, 0, moved)


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="POSIX FIFOs")
def test_a_fifo_target_is_refused_and_stays_a_fifo(tmp_path):
    # Issue 15: "-o onto a device node or FIFO replaces it with a regular file". POSIX
    # rename(2) would replace the FIFO; refusing anything that is not a regular file (or a
    # new name) is the rule the issue states.
    fifo = tmp_path / "pipe.svg"
    os.mkfifo(fifo)
    with pytest.raises(SvgWriteError, match=r"pipe\.svg: not a regular file \(a FIFO\)"):
        write_file_atomic(fifo, b"<svg/>")
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["pipe.svg"]  # no temporary file


def _device_node(folder):
    """A character device equal to /dev/null (major 1, minor 3 on Linux) made in ``folder``:
    a regression then replaces a node in the test's folder, never the system's /dev/null."""
    node = folder / "null"
    try:
        os.mknod(node, stat.S_IFCHR | 0o666, os.makedev(1, 3))
    except (AttributeError, OSError):
        pytest.skip("creating device nodes needs privileges")
    return node


def test_a_device_node_target_is_refused(tmp_path):
    # A character device (POSIX.1-2017 §10.1) must not be replaced by a regular file (the
    # rename of a temporary file over it would do exactly that).
    node = _device_node(tmp_path)
    with pytest.raises(SvgWriteError, match="not a regular file .a character device."):
        write_file_atomic(node, b"<svg/>")
    assert stat.S_ISCHR(os.stat(node).st_mode)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["null"]


def test_a_folder_target_is_refused(tmp_path):
    with pytest.raises(SvgWriteError, match=r"not a regular file \(a folder\)"):
        write_file_atomic(tmp_path, b"<svg/>")


def test_a_killed_save_leaves_a_temporary_file_that_the_next_save_removes(tmp_path):
    # Issue 15: "a killed save's temporary file is never cleaned up, even by the next
    # successful save of the same target". A child process is killed (SIGKILL, which no
    # handler can catch) after creating its temporary file; the next save of the same
    # target removes that file. Common practice, no source (editors clean up after crashes).
    target = tmp_path / "bracket.svg"
    target.write_bytes(BRACKET.read_bytes())
    root = Path(__file__).resolve().parents[2]
    code = (
        "import os, signal, sys\n"
        f"sys.path.insert(0, {str(root)!r})\n"
        "from outlinebench.io import atomic\n"
        "def stuck(fh, data):\n"
        "    fh.write(data[:10]); fh.flush(); os.kill(os.getpid(), signal.SIGKILL)\n"
        "atomic._write_all = stuck\n"
        f"atomic.write_file_atomic({str(target)!r}, b'<svg/>' * 100)\n"
    )
    proc = subprocess.run([sys.executable, "-c", code], check=False)
    assert proc.returncode == -9
    left = sorted(p.name for p in tmp_path.iterdir())
    assert len(left) == 2 and left[0].startswith(".bracket.svg.") and left[0].endswith(".tmp")
    assert target.read_bytes() == BRACKET.read_bytes()  # the killed save changed nothing
    doc = _edited(target)
    write_svg(doc, target)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bracket.svg"]
    assert target.read_bytes() == svg_bytes(doc)


def test_a_save_in_progress_elsewhere_is_left_alone(tmp_path):
    # A temporary file whose process still runs may be another save in progress: kept.
    target = tmp_path / "bracket.svg"
    target.write_bytes(BRACKET.read_bytes())
    parent = os.getppid()  # a live process other than this one
    other = tmp_path / f".bracket.svg.{parent}.abcd1234.tmp"
    other.write_bytes(b"partial")
    write_svg(_edited(target), target)
    assert other.exists()


def test_an_edited_use_instance_in_a_latin1_file_is_written_in_latin1():
    # Issue 15: an edited use instance copied the referenced element's attributes as UTF-8
    # bytes into a file declaring ISO-8859-1. XML 1.0 §4.3.3: the bytes must be in the
    # declared encoding; the file must read back with the same text (checked with the
    # standard library's expat, outside the project) and no UTF-8 sequence may appear.
    data = (
        '<?xml version="1.0" encoding="ISO-8859-1"?>\n'
        '<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink">'
        "<title>Caf\u00e9 sign</title>"
        '<defs><rect id="tile" width="4" height="2" class="b\u00e9ton \u2116"/></defs>'
        '<use id="one" xlink:href="#tile" x="10"/></svg>'
    ).encode("iso-8859-1", "xmlcharrefreplace")
    doc = read_svg(data).document
    c = doc.outlines[0].contours[0]
    edited = doc.replace_contour(
        0, 0, Contour.from_points([np.asarray(s) + [0.5, 0.0] for s in c.segments], closed=True)
    )
    out = svg_bytes(edited)
    assert "béton".encode() not in out  # no UTF-8 bytes
    assert "b\u00e9ton".encode("iso-8859-1") in out
    root = ET.fromstring(out)  # expat decodes by the declaration
    path = [e for e in root if e.tag.endswith("path")][0]
    assert path.get("class") == "b\u00e9ton \u2116"  # № (not in Latin-1) as &#8470;
    assert root.find("{http://www.w3.org/2000/svg}title").text == "Caf\u00e9 sign"


def test_one_line_escapes_line_breaks():
    # Common practice, no source: Python's repr escapes for control characters.
    assert one_line("logo\nfake.svg: error") == "logo\\nfake.svg: error"
    assert one_line("a\r\tb\u2028c") == "a\\r\\tb\\u2028c"
    assert one_line("caf\u00e9") == "caf\u00e9"


def test_a_use_id_holding_a_newline_gives_a_one_line_refusal():
    # The refusal to fork a use that also shows text names the use by its id; an id with a
    # newline (&#10;) must not split the message into two lines.
    data = (
        b'<svg xmlns="http://www.w3.org/2000/svg"><defs><g id="g">'
        b'<path d="M0 0 L1 0 L1 1 Z"/><text>x</text></g></defs>'
        b'<use id="u&#10;other.svg: error" href="#g"/></svg>'
    )
    doc = read_svg(data).document
    c = doc.outlines[0].contours[0]
    edited = doc.replace_contour(
        0, 0, Contour.from_points([np.asarray(s) + [0.5, 0.0] for s in c.segments], closed=True)
    )
    with pytest.raises(SvgWriteError) as info:
        svg_bytes(edited)
    assert "\n" not in str(info.value)
    assert 'id="u\\nother.svg: error"' in str(info.value)
