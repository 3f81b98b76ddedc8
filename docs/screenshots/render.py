"""Render the editor offscreen on the samples and save screenshots.

Run from the repository root: ``python docs/screenshots/render.py docs/screenshots``.
"""
import os
import sys

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
from PySide6.QtCore import QPointF
from PySide6.QtWidgets import QApplication

from outlinebench.app.main_window import MainWindow

out = sys.argv[1]
app = QApplication.instance() or QApplication([])
w = MainWindow()
w.resize(1600, 940)
w.show()
app.processEvents()
w.grab().save(f"{out}/editor-start.png")
w.open_path("samples/signshop-lettering-defects.svg", ask=False)
for _ in range(5):
    app.processEvents()
w.canvas.fit_to_outline()
app.processEvents()
w.grab().save(f"{out}/editor-findings.png")
w.act_comb.setChecked(True)
w.set_comb_visible(True)
c = w.canvas
c.zoom(3.0, QPointF(c.width() * 0.42, c.height() * 0.5))
for _ in range(5):
    app.processEvents()
w.grab().save(f"{out}/editor-comb.png")
print("saved")
