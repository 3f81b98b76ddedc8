"""The "Cutting" panel: flattening and offset previews, their numbers, and cut-file export.

Each preview has a tick box, its length (flattening tolerance ε or tool radius, in the
document's display units), a line of results, and an "Export cut file…" button. The window
computes the previews (:mod:`outlinebench.app.cut_preview`) and fills in the result lines.
"""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import (
    QCheckBox,
    QDoubleSpinBox,
    QGridLayout,
    QLabel,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from outlinebench.app.units import MM_PER_UNIT_NAME, DisplayUnits

__all__ = ["CuttingPanel", "DEFAULT_PREVIEW_TOLERANCE_MM", "DEFAULT_TOOL_RADIUS_MM"]

# Starting flattening tolerance of the preview, mm: coarse enough that chords are visible at
# working zoom (the command line's default is 0.01 user units, for the file itself).
DEFAULT_PREVIEW_TOLERANCE_MM = 0.05
# Starting tool radius, mm: a 3 mm end mill (radius 1.5 mm), a common small router bit.
DEFAULT_TOOL_RADIUS_MM = 1.5


class CuttingPanel(QWidget):
    """Controls of the two cutting previews.

    Signals
    -------
    changed
        A preview was switched or its length changed.
    export_requested(str)
        "flatten" or "offset": write that preview as a cut file.
    """

    changed = Signal()
    export_requested = Signal(str)

    def __init__(self, units, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._units = units  # callable returning DisplayUnits
        lay = QVBoxLayout(self)
        lay.setContentsMargins(6, 4, 6, 4)
        grid = QGridLayout()
        lay.addLayout(grid)
        self.flatten_on = QCheckBox("Flattening, tolerance")
        self.flatten_on.setToolTip(
            "Chords a cutter gets at this tolerance (largest allowed deviation), with the "
            "proven largest deviation and where it is"
        )
        self.flatten_tol = self._spin(0.0001, 10.0)
        self.flatten_info = self._info()
        self.flatten_export = QPushButton("Export…")
        self.flatten_export.setToolTip("Write these chords as an SVG cut file (mm)")
        grid.addWidget(self.flatten_on, 0, 0)
        grid.addWidget(self.flatten_tol, 0, 1)
        grid.addWidget(self.flatten_export, 0, 2)
        grid.addWidget(self.flatten_info, 1, 0, 1, 3)
        self.offset_on = QCheckBox("Offset, tool radius")
        self.offset_on.setToolTip(
            "The path of the tool's centre for an outside cut (holes move the other way), "
            "places where the tool does not fit, and where material vanishes"
        )
        self.offset_radius = self._spin(0.001, 100.0)
        self.offset_info = self._info()
        self.offset_export = QPushButton("Export…")
        self.offset_export.setToolTip("Write the offset outline as an SVG cut file (mm)")
        grid.addWidget(self.offset_on, 2, 0)
        grid.addWidget(self.offset_radius, 2, 1)
        grid.addWidget(self.offset_export, 2, 2)
        grid.addWidget(self.offset_info, 3, 0, 1, 3)
        grid.setColumnStretch(0, 1)
        lay.addStretch(1)  # the controls stay at the top of a tall dock
        for w in (self.flatten_on, self.offset_on):
            w.toggled.connect(lambda _on: self._on_changed())
        self.flatten_tol.valueChanged.connect(lambda v: self._typed("flatten", v))
        self.offset_radius.valueChanged.connect(lambda v: self._typed("offset", v))
        self.flatten_export.clicked.connect(lambda: self.export_requested.emit("flatten"))
        self.offset_export.clicked.connect(lambda: self.export_requested.emit("offset"))
        self._mm = {"flatten": DEFAULT_PREVIEW_TOLERANCE_MM, "offset": DEFAULT_TOOL_RADIUS_MM}
        self.show_units()
        self._on_changed(emit=False)

    @staticmethod
    def _spin(lo_mm: float, hi_mm: float) -> QDoubleSpinBox:
        s = QDoubleSpinBox()
        s.setKeyboardTracking(False)
        s.setDecimals(4)
        s.setRange(lo_mm, hi_mm)
        return s

    @staticmethod
    def _info() -> QLabel:
        lab = QLabel("")
        lab.setWordWrap(True)
        lab.setStyleSheet("color: #3d4852;")
        return lab

    def _on_changed(self, emit: bool = True) -> None:
        self.flatten_tol.setEnabled(True)
        self.flatten_export.setEnabled(self.flatten_on.isChecked())
        self.offset_export.setEnabled(self.offset_on.isChecked())
        if not self.flatten_on.isChecked():
            self.flatten_info.setText("")
        if not self.offset_on.isChecked():
            self.offset_info.setText("")
        self.flatten_info.setVisible(self.flatten_on.isChecked())
        self.offset_info.setVisible(self.offset_on.isChecked())
        if emit:
            self.changed.emit()

    def show_units(self) -> None:
        """Show the lengths in the document's display units (call after units change)."""
        u: DisplayUnits = self._units()
        per = MM_PER_UNIT_NAME.get(u.name, 1.0)
        for key, spin in (("flatten", self.flatten_tol), ("offset", self.offset_radius)):
            spin.blockSignals(True)
            spin.setDecimals({"in": 5, "cm": 5, "pc": 4}.get(u.name, 4))
            spin.setSuffix(f" {u.name}")
            spin.setRange(0.0001 / per, 100.0 / per)
            spin.setValue(self._mm[key] / per)
            spin.blockSignals(False)

    def _typed(self, key: str, shown: float) -> None:
        # Only a value the user typed replaces the exact millimetres kept (the field shows
        # them rounded to its decimals).
        self._mm[key] = shown * MM_PER_UNIT_NAME.get(self._units().name, 1.0)
        self.changed.emit()

    def tolerance_mm(self) -> float:
        return self._mm["flatten"]

    def radius_mm(self) -> float:
        return self._mm["offset"]

    def set_lengths_mm(self, tolerance_mm: float, radius_mm: float) -> None:
        self._mm = {"flatten": float(tolerance_mm), "offset": float(radius_mm)}
        self.show_units()
