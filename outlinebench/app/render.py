"""``outlinebench render FILE -o OUT.png``: the editor's canvas drawn into an image, no screen.

The picture is painted by the editor's own canvas (:class:`outlinebench.app.canvas.Canvas`,
the same ``paintEvent``) on Qt's offscreen platform, so reports, the README's pictures and
tests show exactly what the editor shows. Options:

- ``--size WxH`` (logical px, default 1280x800);
- ``--findings``: frame every finding of warning level or worse (``--info`` adds info);
- ``--combs``: the curvature comb at its automatic scale;
- ``--flatten EPS``: the flattening preview at tolerance EPS (mm);
- ``--offset R``: the offset preview for a tool of radius R (mm);
- ``--region X0,Y0,X1,Y1``: fit this rectangle (user units) instead of the whole drawing;
- ``--window``: the whole editor window (findings list, selection panel, cutting panel) at
  that size, as the README's screenshots show it.

The output is never the input: a target that is the input file (same file by identity, or the
same path) is refused, as is a target that is not a raster image name (``.png``, ``.jpg``,
``.jpeg``, ``.bmp``, ``.webp``). Exit codes: 0 written, 2 bad input or usage (one line).
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
from collections.abc import Sequence
from pathlib import Path

from outlinebench.errors import OutlinebenchError

__all__ = ["main", "build_parser", "render_canvas", "IMAGE_SUFFIXES", "DEFAULT_SIZE"]

IMAGE_SUFFIXES = (".png", ".jpg", ".jpeg", ".bmp", ".webp")
DEFAULT_SIZE = (1280, 800)
# Largest image side accepted (logical px): 16384 px is the largest QImage side Qt paints
# reliably everywhere; beyond it the raster engine may refuse to allocate.
MAX_SIDE = 16384


class _Usage(Exception):
    """A usage or input error: one line, exit 2."""


def _size(text: str) -> tuple[int, int]:
    try:
        w, h = (int(v) for v in text.lower().replace("×", "x").split("x"))
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected WxH such as 1280x800, got {text!r}") from None
    if not (16 <= w <= MAX_SIDE and 16 <= h <= MAX_SIDE):
        raise argparse.ArgumentTypeError(f"each side must be 16 to {MAX_SIDE} px, got {text!r}")
    return w, h


def _region(text: str) -> tuple[float, float, float, float]:
    try:
        x0, y0, x1, y1 = (float(v) for v in text.split(","))
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected X0,Y0,X1,Y1, got {text!r}") from None
    if not (x1 > x0 and y1 > y0):
        raise argparse.ArgumentTypeError(f"the region must have X1 > X0 and Y1 > Y0: {text!r}")
    return x0, y0, x1, y1


def _positive(text: str) -> float:
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if not (v > 0 and v < float("inf")):
        raise argparse.ArgumentTypeError(f"expected a number above 0, got {text!r}")
    return v


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one line, exit 2 (argparse's own convention)
        self.exit(2, f"outlinebench render: error: {message}\n")


def build_parser() -> argparse.ArgumentParser:
    """The ``outlinebench render`` command line (FILE, output image, view options)."""
    p = _Parser(
        prog="outlinebench render",
        description="Draw the editor's canvas for FILE into an image, without a screen.",
        epilog="Exit codes: 0 written, 2 bad input or usage.",
    )
    p.add_argument("file", metavar="FILE", help="SVG drawing")
    p.add_argument("-o", "--output", required=True, metavar="OUT.png", help="image to write")
    p.add_argument("--size", type=_size, default=DEFAULT_SIZE, metavar="WxH")
    p.add_argument("--findings", action="store_true", help="frame the findings")
    p.add_argument("--info", action="store_true", help="with --findings: info findings too")
    p.add_argument("--combs", action="store_true", help="draw the curvature comb")
    p.add_argument("--flatten", type=_positive, metavar="EPS", help="flattening preview, mm")
    p.add_argument("--offset", type=_positive, metavar="R", help="offset preview, mm")
    p.add_argument("--region", type=_region, metavar="X0,Y0,X1,Y1", help="fit this region")
    p.add_argument("--window", action="store_true", help="the whole editor window")
    return p


def _check_output(src: str, out: str) -> None:
    if Path(out).suffix.lower() not in IMAGE_SUFFIXES:
        raise _Usage(
            f"{out}: the image name must end in {', '.join(IMAGE_SUFFIXES)} (render never "
            "writes a drawing)"
        )
    same = Path(out).resolve() == Path(src).resolve()
    if not same and os.path.exists(out) and os.path.exists(src):
        same = os.path.samefile(out, src)
    if same:
        raise _Usage(f"{out} is the input file; render never overwrites its input")


def _quiet_handler(_mode, _context, message: str) -> None:
    # The offscreen platform says it "does not support propagateSizeHints()" for every
    # window: not our concern. Everything else Qt says goes to stderr as usual.
    if "propagateSizeHints" not in message:
        print(message, file=sys.stderr)


def _qt_app():
    if "QT_QPA_PLATFORM" not in os.environ:
        os.environ["QT_QPA_PLATFORM"] = "offscreen"  # no screen needed, ever
    from PySide6.QtCore import qInstallMessageHandler
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance()
    if app is None:
        qInstallMessageHandler(_quiet_handler)
        app = QApplication(["outlinebench-render"])
    return app


def _read(path: str):
    from outlinebench.errors import OutlinebenchError
    from outlinebench.io import read_svg

    try:
        result = read_svg(path)
    except OutlinebenchError as exc:
        raise _Usage(str(exc)) from None
    except OSError as exc:
        raise _Usage(f"{path}: {exc.strerror or exc}") from None
    if result.error is not None:
        raise _Usage(f"{result.error} (render draws whole files only)")
    return result.document


def render_canvas(doc, args) -> tuple:
    """Paint ``doc`` with a bare editor canvas of ``args.size``; returns (QImage, notes)."""
    from PySide6.QtCore import Qt

    from outlinebench.app.canvas import Canvas
    from outlinebench.app.curvature_comb import auto_comb_scale
    from outlinebench.app.cut_preview import flatten_preview, offset_preview
    from outlinebench.app.session import EditorSession
    from outlinebench.diagnostics import check_document

    w, h = args.size
    session = EditorSession(doc)
    canvas = Canvas(session)
    canvas.setAttribute(Qt.WidgetAttribute.WA_DontShowOnScreen, True)
    canvas.resize(w, h)
    canvas.show()
    _fit(canvas, args.region)
    notes: list[str] = []
    if args.findings:
        try:
            found = check_document(doc)
        except Exception as exc:  # noqa: BLE001 — a fault in a check: said, not raised
            found = None
            print(
                f"outlinebench render: the check failed ({type(exc).__name__}: {exc}); "
                "no findings are framed",
                file=sys.stderr,
            )
        if found is not None:
            shown = [f for f in found if args.info or f.severity != "info"]
            canvas.set_finding_marks(shown)
            notes.append(f"{len(shown)} findings framed")
        else:
            notes.append("check failed: no findings framed")
    if args.combs:
        canvas.set_comb(True, auto_comb_scale(doc))
    per_mm = 1.0 / doc.mm_per_unit if doc.mm_per_unit > 0 else 1.0
    fp = op = None
    label = None
    if args.flatten:
        fp = flatten_preview(doc, args.flatten * per_mm)
        notes.append(
            f"{fp.chords} chords, proven largest deviation {fp.bound * doc.mm_per_unit:.4g} mm"
        )
        label = f"largest deviation {fp.bound * doc.mm_per_unit:.4g} mm"
    if args.offset:
        op = offset_preview(doc, args.offset * per_mm, min(0.01, args.offset / 100) * per_mm)
        notes.append(
            f"{len(op.polylines)} offset contours, material vanishes at {len(op.vanished)}"
        )
    canvas.set_previews(fp, op, label)
    image = canvas.grab().toImage()
    canvas.close()
    canvas.deleteLater()
    return image, notes


def _fit(canvas, region) -> None:
    if region is None:
        canvas.fit_to_outline()
    else:
        canvas.view.fit(region, canvas.width(), canvas.height())
        canvas._user_view = True  # a chosen view: kept if the layout resizes the canvas
        canvas.view_changed.emit()
        canvas.update()


def _render_window(path: str, args) -> tuple:
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from outlinebench.app.main_window import MainWindow

    app = QApplication.instance()
    with tempfile.TemporaryDirectory() as tmp:
        settings = QSettings(str(Path(tmp) / "render.ini"), QSettings.Format.IniFormat)
        win = MainWindow(settings, autosave_ms=0)
        errors: list[str] = []
        win.show_error = lambda title, text: errors.append(f"{title}: {text}")
        win.ask_open_partial = lambda *a: False
        win.resize(*args.size)
        win.show()
        app.processEvents()
        if not win.open_path(path, ask=False):
            raise _Usage(errors[0] if errors else f"{path}: cannot be opened")
        win.findings_panel.show_info.setChecked(bool(args.info))
        win.act_marks.setChecked(bool(args.findings))
        win._on_findings_updated()
        if args.combs:
            win.set_comb_visible(True)
        c = win.cutting
        if args.flatten:
            c.set_lengths_mm(args.flatten, c.radius_mm())
        if args.offset:
            c.set_lengths_mm(c.tolerance_mm(), args.offset)
        c.flatten_on.setChecked(bool(args.flatten))
        c.offset_on.setChecked(bool(args.offset))
        for _ in range(3):
            app.processEvents()
        _fit(win.canvas, args.region)
        win.update_previews()
        win.statusBar().clearMessage()
        for _ in range(3):
            app.processEvents()
        image = win.grab().toImage()
        notes = [f"{len(win.live.findings)} findings listed"]
        win.session.mark_saved()
        win.close()
        win.deleteLater()
        app.processEvents()
    return image, notes


def main(argv: Sequence[str] | None = None) -> int:
    """Run ``outlinebench render``; returns the exit code."""
    args = build_parser().parse_args(list(sys.argv[1:] if argv is None else argv))
    try:
        _check_output(args.file, args.output)
        doc = _read(args.file)
        _qt_app()
        try:
            if args.window:
                image, notes = _render_window(args.file, args)
            else:
                image, notes = render_canvas(doc, args)
        except OutlinebenchError as exc:  # a preview that cannot be computed
            raise _Usage(str(exc)) from None
        if image.isNull() or not image.save(args.output):
            raise _Usage(f"{args.output}: the image could not be written")
    except _Usage as exc:
        print(f"outlinebench render: error: {exc}", file=sys.stderr)
        return 2
    w, h = image.width(), image.height()
    print(f"wrote {args.output} ({w}×{h} px){': ' + '; '.join(notes) if notes else ''}")
    return 0
