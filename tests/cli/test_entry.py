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


# -- the first argument: a command, a file, or neither (issue 9, issue 13) ------------------
def _run(args, env_extra=None, drop=(), cwd=ROOT, timeout=60):
    import os

    env = {k: v for k, v in os.environ.items() if k not in drop}
    env.update(env_extra or {})
    return subprocess.run(
        [sys.executable, "-m", "outlinebench", *args],
        capture_output=True,
        text=True,
        cwd=cwd,
        env=env,
        timeout=timeout,
    )


NO_DISPLAY = ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")


def test_a_mistyped_command_names_the_closest_one_even_without_a_display():
    # difflib (Python library reference): "chek" is closest to "check" (ratio 0.89 ≥ 0.6).
    res = _run(["chek", str(SAMPLE)], drop=NO_DISPLAY)
    assert res.returncode == 2
    assert res.stderr.strip() == (
        "outlinebench: error: unknown command 'chek'; did you mean 'check'?"
    )
    assert res.stdout == ""
    res = _run(["flaten", str(SAMPLE)], drop=NO_DISPLAY)
    assert "did you mean 'flatten'?" in res.stderr and res.returncode == 2
    # "render" is a command of the editor package, suggested too.
    res = _run(["rendr", str(SAMPLE)], drop=NO_DISPLAY)
    assert "did you mean 'render'?" in res.stderr and res.returncode == 2


def test_a_missing_file_is_one_line_and_does_not_open_the_editor(tmp_path):
    res = _run([str(tmp_path / "check.svg")], drop=NO_DISPLAY)  # a name, not a typo
    assert res.stderr.strip() == f"outlinebench: error: {tmp_path / 'check.svg'}: no such file"
    res = _run([str(tmp_path / "no-such-drawing.svg")], drop=NO_DISPLAY)
    assert res.returncode == 2
    lines = res.stderr.strip().splitlines()
    assert lines == [f"outlinebench: error: {tmp_path / 'no-such-drawing.svg'}: no such file"]
    res = _run(["zzqqxx"], drop=NO_DISPLAY)  # no command is close: list them
    assert res.returncode == 2 and "commands are check" in res.stderr
    assert len(res.stderr.strip().splitlines()) == 1
    res = _run([str(tmp_path)], drop=NO_DISPLAY)  # a folder: point at check
    assert res.returncode == 2 and "outlinebench check" in res.stderr


def test_command_words_come_from_the_subcommand_list():
    from outlinebench.__main__ import command_names
    from outlinebench.subcommands import SUBCOMMANDS

    assert command_names()[: len(SUBCOMMANDS)] == tuple(SUBCOMMANDS)
    assert "render" in command_names()


def test_without_a_display_the_editor_says_so_in_one_line():
    # No DISPLAY, WAYLAND_DISPLAY or QT_QPA_PLATFORM on Linux: Qt would abort (SIGABRT) in
    # the QApplication constructor; the entry point answers first (common practice).
    if not sys.platform.startswith("linux"):
        import pytest

        pytest.skip("displays are probed on Linux and the BSDs")
    res = _run([str(SAMPLE)], drop=NO_DISPLAY)
    assert res.returncode == 2
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1, res.stderr
    assert "no display" in lines[0] and "command-line tools still work" in lines[0]
    assert "Traceback" not in res.stderr and "Aborted" not in res.stderr


def test_a_platform_plugin_that_cannot_load_is_one_line_not_an_abort():
    # An unknown platform name, and xcb pointed at a display nobody serves (:97): both make
    # Qt print its own lines and abort; here a probe process takes the blow.
    if not sys.platform.startswith("linux"):
        import pytest

        pytest.skip("displays are probed on Linux and the BSDs")
    for env in (
        {"QT_QPA_PLATFORM": "nosuchplatform"},
        {"QT_QPA_PLATFORM": "xcb", "DISPLAY": ":97"},
    ):
        res = _run([str(SAMPLE)], env_extra=env, drop=NO_DISPLAY)
        assert res.returncode == 2, (env, res.stderr)
        lines = res.stderr.strip().splitlines()
        assert len(lines) == 1, (env, res.stderr)
        assert lines[0].startswith("outlinebench: cannot open the editor:")
        assert "command-line tools still work" in lines[0]
    # The command line itself needs no display at all.
    res = _run(["check", str(SAMPLE)], drop=NO_DISPLAY)
    assert res.returncode == 0, res.stderr


def test_render_needs_no_display_and_never_overwrites_its_input(tmp_path):
    out = tmp_path / "canvas.png"
    res = _run(["render", str(SAMPLE), "-o", str(out), "--size", "320x200"], drop=NO_DISPLAY)
    assert res.returncode == 0, res.stderr
    # PNG signature (W3C PNG specification, §5.2) and the IHDR width and height.
    data = out.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    assert int.from_bytes(data[16:20], "big") == 320 and int.from_bytes(data[20:24], "big") == 200
    copy = tmp_path / "drawing.png"
    copy.write_bytes(SAMPLE.read_bytes())  # an input that happens to end in .png
    before = copy.read_bytes()
    res = _run(["render", str(copy), "-o", str(copy)], drop=NO_DISPLAY)
    assert res.returncode == 2 and "never overwrites its input" in res.stderr
    assert copy.read_bytes() == before
    res = _run(["render", str(SAMPLE), "-o", str(tmp_path / "x.svg")], drop=NO_DISPLAY)
    assert res.returncode == 2 and len(res.stderr.strip().splitlines()) == 1
