"""Make the README's screenshots with ``outlinebench render`` (the editor's own painting, offscreen).

Run from the repository root: ``python docs/screenshots/render.py docs/screenshots``.
Every picture but two is one ``outlinebench render --window`` command, listed in SHOTS below;
the start page (no drawing open) and a fix being previewed are the editor window grabbed.
"""

import os
import subprocess
import sys
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

DEFECTS = "samples/signshop-lettering-defects.svg"
SIZE = "1280x800"

# name -> arguments of `outlinebench render`
SHOTS = {
    # The defects sample at fit zoom: findings framed, point marks left out at this zoom.
    "editor-findings.png": [DEFECTS, "--window", "--findings", "--size", SIZE],
    # The curvature comb on the B and O.
    "editor-comb.png": [
        DEFECTS, "--window", "--findings", "--combs", "--size", SIZE,
        "--region", "140,2,260,78",
    ],
    # Flattening preview at 0.25 mm on the second O, where the largest deviation lies: the
    # chords, their count and the proven largest deviation, ringed where it occurs.
    "editor-flattening.png": [
        DEFECTS, "--window", "--flatten", "0.25", "--size", SIZE,
        "--region", "318,4,366,44",
    ],
    # Offset preview for a 10 mm cutter (radius 5 mm): the B's counters vanish.
    "editor-offset.png": [
        DEFECTS, "--window", "--offset", "5", "--size", SIZE,
        "--region", "120,-2,200,82",
    ],
}  # fmt: skip


def start_page(out: Path) -> None:
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from outlinebench.app.main_window import MainWindow

    app = QApplication.instance() or QApplication([])
    settings = QSettings(str(out / ".render-settings.ini"), QSettings.Format.IniFormat)
    w = MainWindow(settings, autosave_ms=0)
    w.resize(1280, 800)
    w.show()
    for _ in range(3):
        app.processEvents()
    w.grab().save(str(out / "editor-start.png"))
    w.close()
    (out / ".render-settings.ini").unlink(missing_ok=True)


def fix_preview(out: Path) -> None:
    """The bracket's planted kink (contour 3, join 1) with its fix previewed."""
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from outlinebench.app.main_window import MainWindow

    app = QApplication.instance() or QApplication([])
    settings = QSettings(str(out / ".render-settings.ini"), QSettings.Format.IniFormat)
    w = MainWindow(settings, autosave_ms=0)
    w.resize(1280, 800)
    w.show()
    app.processEvents()
    assert w.open_path("samples/workshop-bracket-defects.svg", ask=False)
    app.processEvents()
    found = next(f for f in w.live.findings if f.kind == "kink" and f.contour == 3 and f.join == 1)
    w.show_finding(found)
    w.preview_fix(found)
    for _ in range(10):
        app.processEvents()
    w.grab().save(str(out / "editor-fix-preview.png"))
    w.close()
    (out / ".render-settings.ini").unlink(missing_ok=True)


def main() -> int:
    out = Path(sys.argv[1] if len(sys.argv) > 1 else "docs/screenshots")
    for name, args in SHOTS.items():
        cmd = [sys.executable, "-m", "outlinebench", "render", *args, "-o", str(out / name)]
        res = subprocess.run(cmd, capture_output=True, text=True)
        sys.stdout.write(res.stdout)
        if res.returncode != 0:
            sys.stderr.write(res.stderr)
            return res.returncode
    start_page(out)
    fix_preview(out)
    print(f"wrote {out / 'editor-start.png'} and {out / 'editor-fix-preview.png'}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
