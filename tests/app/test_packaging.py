"""The installed editor has its icons and samples: package data read with importlib.resources.

The slow test builds a real wheel from a copy of the source tree (no editable install),
installs it into a fresh virtual environment and runs the installed ``outlinebench`` there.
It needs no network: the wheel is built with this interpreter's setuptools and wheel
(``--no-build-isolation``) and installed with ``--no-deps``; the fresh environment sees the
already installed dependencies (numpy, PySide6, ...) through a ``.pth`` line naming this
environment's site-packages, after its own, so ``outlinebench`` itself comes from the wheel.
"""

import importlib.util
import os
import shutil
import subprocess
import sys
import sysconfig
import tomllib
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def _pyproject() -> dict:
    return tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))


def test_every_package_folder_is_listed_for_the_wheel():
    # pyproject.toml lists packages by name (two are mapped from top-level folders), so a
    # new package folder must be added there or the wheel would lack it.
    listed = set(_pyproject()["tool"]["setuptools"]["packages"])
    found = {
        ".".join(p.parent.relative_to(ROOT).parts)
        for p in (ROOT / "outlinebench").rglob("__init__.py")
    }
    assert found <= listed, f"add to [tool.setuptools] packages: {sorted(found - listed)}"
    dirs = _pyproject()["tool"]["setuptools"]["package-dir"]
    assert dirs["outlinebench.resources"] == "resources"
    assert dirs["outlinebench.samples"] == "samples"


def test_the_source_checkout_finds_icons_and_samples():
    from outlinebench.data_files import icon_path, sample_files

    assert icon_path("app") == ROOT / "resources" / "icons" / "app.svg"
    assert [p.name for p in sample_files()] == sorted(p.name for p in ROOT.glob("samples/*.svg"))
    assert icon_path("no-such-icon") is None


def _build_backend_available() -> bool:
    # setuptools builds wheels by itself from 70.1 on; older ones need the wheel package.
    import setuptools

    major, minor = (int(x) for x in setuptools.__version__.split(".")[:2])
    return (major, minor) >= (70, 1) or importlib.util.find_spec("wheel") is not None


CHECK_INSTALLED = r"""
import json, os, sys
os.environ["QT_QPA_PLATFORM"] = "offscreen"
import outlinebench
from outlinebench.data_files import icon_path, sample_files, samples_dir
from PySide6.QtCore import QSettings
from PySide6.QtWidgets import QApplication
app = QApplication([])
from outlinebench.app.icons import icon
from outlinebench.app.main_window import MainWindow
win = MainWindow(QSettings(sys.argv[1], QSettings.Format.IniFormat), autosave_ms=0)
names = [a.text() for a in win.menu_samples.actions()]
first = win.menu_samples.actions()[0]
first.trigger()  # File > Open sample > the first sample
out = {
    "package": outlinebench.__file__,
    "icon": str(icon_path("app")),
    "icon_null": icon("app").isNull(),
    "samples": [str(p) for p in sample_files()],
    "menu": names,
    "opened": win.path,
    "outlines": len(win.session.document.outlines),
}
print(json.dumps(out))
"""


@pytest.mark.slow
def test_a_built_wheel_ships_icons_and_samples_into_a_fresh_environment(tmp_path):
    if not _build_backend_available():
        pytest.skip("building a wheel offline needs setuptools >= 70.1 or the wheel package")
    src = tmp_path / "src"
    src.mkdir()
    for name in ("pyproject.toml", "README.md"):
        shutil.copy2(ROOT / name, src / name)
    ignore = shutil.ignore_patterns("__pycache__", "*.pyc")
    for name in ("outlinebench", "resources", "samples"):
        shutil.copytree(ROOT / name, src / name, ignore=ignore)
    dist = tmp_path / "dist"
    build = subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation",
         "--no-index", "-q", "-w", str(dist), str(src)],
        capture_output=True, text=True, timeout=300,
    )  # fmt: skip
    assert build.returncode == 0, build.stdout + build.stderr
    (wheel,) = dist.glob("outlinebench-*.whl")
    with zipfile.ZipFile(wheel) as z:
        names = set(z.namelist())
    # The wheel's own listing (PEP 427 archive) holds the data at the package's paths.
    for p in (ROOT / "resources" / "icons").glob("*.svg"):
        assert f"outlinebench/resources/icons/{p.name}" in names
    for p in (ROOT / "samples").glob("*.svg"):
        assert f"outlinebench/samples/{p.name}" in names
    # A fresh environment with this one's packages behind its own.
    env_dir = tmp_path / "venv"
    subprocess.run([sys.executable, "-m", "venv", "--without-pip", str(env_dir)], check=True)
    py = env_dir / ("Scripts/python.exe" if os.name == "nt" else "bin/python")
    purelib = subprocess.run(
        [str(py), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
        capture_output=True, text=True, check=True,
    ).stdout.strip()  # fmt: skip
    ours = sysconfig.get_paths()
    lines = sorted({ours["purelib"], ours["platlib"]})
    Path(purelib, "zz_shared_env.pth").write_text("\n".join(lines) + "\n", encoding="utf-8")
    install = subprocess.run(
        [sys.executable, "-m", "pip", "--python", str(py), "install", "--no-deps",
         "--no-index", "-q", str(wheel)],
        capture_output=True, text=True, timeout=300,
    )  # fmt: skip
    assert install.returncode == 0, install.stdout + install.stderr
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH",)}
    env["QT_QPA_PLATFORM"] = "offscreen"
    run_dir = tmp_path / "elsewhere"  # not the source tree: nothing there to import
    run_dir.mkdir()
    exe = env_dir / ("Scripts/outlinebench.exe" if os.name == "nt" else "bin/outlinebench")
    version = subprocess.run(
        [str(exe), "--version"], capture_output=True, text=True, cwd=run_dir, env=env, timeout=60
    )
    assert version.returncode == 0, version.stderr
    from outlinebench import __version__

    assert version.stdout.strip() == f"outlinebench {__version__}"
    # The installed entry point draws a sample from the installed package data.
    png = run_dir / "sample.png"
    sample = Path(purelib, "outlinebench", "samples", "workshop-bracket.svg")
    rendered = subprocess.run(
        [str(exe), "render", str(sample), "-o", str(png), "--size", "200x120"],
        capture_output=True, text=True, cwd=run_dir, env=env, timeout=120,
    )  # fmt: skip
    assert rendered.returncode == 0, rendered.stderr
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # W3C PNG specification §5.2
    check = subprocess.run(
        [str(py), "-c", CHECK_INSTALLED, str(tmp_path / "s.ini")],
        capture_output=True, text=True, cwd=run_dir, env=env, timeout=120,
    )  # fmt: skip
    assert check.returncode == 0, check.stderr
    import json

    got = json.loads(check.stdout.strip().splitlines()[-1])
    installed = Path(purelib, "outlinebench")
    assert Path(got["package"]).parent == installed  # the wheel's copy, not the source tree
    assert got["icon"] == str(installed / "resources" / "icons" / "app.svg")
    assert not got["icon_null"]
    wanted = sorted(p.name for p in ROOT.glob("samples/*.svg"))
    assert [Path(p).name for p in got["samples"]] == wanted
    assert all(Path(p).parent == installed / "samples" for p in got["samples"])
    assert got["menu"] == wanted
    assert got["opened"] == str(installed / "samples" / wanted[0])
    assert got["outlines"] > 0
    for name in wanted:  # byte for byte the files of the source tree
        assert (installed / "samples" / name).read_bytes() == (ROOT / "samples" / name).read_bytes()
