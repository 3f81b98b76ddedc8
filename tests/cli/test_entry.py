"""Tests of outlinebench/cli.py and outlinebench/__main__.py: dispatch, help, exit codes."""

import subprocess
import sys
from pathlib import Path

from outlinebench import __version__
from outlinebench.__main__ import main

ROOT = Path(__file__).resolve().parents[2]
SAMPLE = ROOT / "samples" / "signshop-lettering.svg"


def test_version_and_help(capsys):
    # argparse's version action exits 0 after printing (Python library reference, argparse).
    try:
        main(["--version"])
    except SystemExit as exc:
        assert exc.code == 0
    assert __version__ in capsys.readouterr().out
    try:
        main(["--help"])
    except SystemExit as exc:
        assert exc.code == 0
    out = capsys.readouterr().out
    for name in ("check", "measure", "flatten", "offset", "deviation"):
        assert name in out


def test_missing_file_is_one_line_and_exit_2():
    res = subprocess.run(
        [sys.executable, "-m", "outlinebench", "measure", "no-such-file.svg"],
        capture_output=True,
        text=True,
        cwd=ROOT,
    )
    assert res.returncode == 2
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1 and "no-such-file.svg" in lines[0]
    assert "Traceback" not in res.stderr


def test_closed_output_pipe_is_not_reported_as_bad_input(tmp_path):
    # `outlinebench measure f.svg | head -1`: the reader leaves after one line. Python's
    # documentation on SIGPIPE: quiet exit with code 1, no traceback, no "error:" line.
    # 20,000 segments make the report far larger than a pipe's 64 KiB buffer (Linux pipe(7)),
    # so the writer really meets the closed pipe.
    d = "M0 0 " + " ".join(f"L{i + 1} {(i * 7) % 13}" for i in range(20000))
    big = tmp_path / "long.svg"
    big.write_text(f'<svg xmlns="http://www.w3.org/2000/svg"><path d="{d}"/></svg>')
    proc = subprocess.Popen(
        [sys.executable, "-m", "outlinebench", "measure", str(big)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        cwd=ROOT,
    )
    proc.stdout.readline()
    proc.stdout.close()
    err = proc.stderr.read().decode()
    proc.stderr.close()
    code = proc.wait(timeout=60)
    assert "Traceback" not in err and "error" not in err
    assert code == 1
