"""A small dialog for the check tolerances: gap, kink angle, corner angle, curvature jump,
and the allowed change of a fix (repairs at hand).

Starts from the settings in use; "Restore defaults" puts back the documented defaults of
:mod:`outlinebench.diagnostics.settings`. The gap is shown in the document's display unit
(settings keep millimetres); values the checks refuse (a corner angle not above the kink
angle, ...) are reported in the dialog and nothing is applied.
"""

from __future__ import annotations

import dataclasses

from PySide6.QtWidgets import (
    QDialog,
    QDialogButtonBox,
    QDoubleSpinBox,
    QFormLayout,
    QLabel,
    QVBoxLayout,
    QWidget,
)

from outlinebench.api.repairing import DEFAULT_MAX_CHANGE_MM
from outlinebench.app.units import MM_PER_UNIT_NAME, DisplayUnits
from outlinebench.diagnostics import CheckSettings

__all__ = ["TolerancesDialog"]


def _box(lo: float, hi: float, decimals: int, suffix: str, tip: str) -> QDoubleSpinBox:
    box = QDoubleSpinBox()
    box.setRange(lo, hi)
    box.setDecimals(decimals)
    box.setSuffix(f" {suffix}" if suffix else "")
    box.setToolTip(tip)
    return box


class TolerancesDialog(QDialog):
    """Edit the four main check tolerances; ``result_settings()`` gives the new settings.

    Parameters
    ----------
    settings : CheckSettings
        The settings in use (the other fields are kept as they are).
    units : DisplayUnits
        The unit the gap and the allowed change are shown in.
    max_change_mm : float
        The allowed shape change of a fix, mm (``result_max_change_mm()`` gives the new one).
    """

    def __init__(
        self,
        settings: CheckSettings,
        units: DisplayUnits,
        parent: QWidget | None = None,
        max_change_mm: float = DEFAULT_MAX_CHANGE_MM,
    ) -> None:
        super().__init__(parent)
        self.setWindowTitle("Check tolerances")
        self._base = settings
        self._mm_per_shown = MM_PER_UNIT_NAME[units.name]
        lay = QVBoxLayout(self)
        form = QFormLayout()
        self.gap = _box(
            0.0, 1e6, max(units.decimals, 3) + 1, units.name,
            "Ends closer than this are the same point; a segment shorter than this is tiny",
        )  # fmt: skip
        self.kink = _box(
            0.001, 179.0, 3, "°",
            "A tangent turn at a join of at least this angle breaks G1 (a kink)",
        )  # fmt: skip
        self.corner = _box(
            0.01, 180.0, 2, "°",
            "A turn of at least this angle is taken as an intended corner when the file "
            "states no join intent",
        )  # fmt: skip
        self.jump = _box(
            0.0, 100.0, 1, "%",
            "Largest allowed relative curvature difference |κ1 − κ2| / max(|κ1|, |κ2|) at a "
            "smooth join (G2)",
        )  # fmt: skip
        form.addRow("Gap:", self.gap)
        form.addRow("Kink angle:", self.kink)
        form.addRow("Corner angle:", self.corner)
        self.max_change = _box(
            0.0, 1e6, max(units.decimals, 3) + 1, units.name,
            "A fix is refused when it would move the outline farther than this (proven "
            "Hausdorff distance between the old and new outline)",
        )  # fmt: skip
        form.addRow("Curvature jump:", self.jump)
        form.addRow("Allowed change of a fix:", self.max_change)
        lay.addLayout(form)
        self.error_label = QLabel("")
        self.error_label.setStyleSheet("color: #c3122f;")
        self.error_label.setWordWrap(True)
        lay.addWidget(self.error_label)
        buttons = QDialogButtonBox(
            QDialogButtonBox.StandardButton.Ok
            | QDialogButtonBox.StandardButton.Cancel
            | QDialogButtonBox.StandardButton.RestoreDefaults
        )
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        restore = buttons.button(QDialogButtonBox.StandardButton.RestoreDefaults)
        restore.clicked.connect(self._restore_defaults)
        lay.addWidget(buttons)
        self.show_settings(settings)
        self.max_change.setValue(max_change_mm / self._mm_per_shown)

    def _restore_defaults(self) -> None:
        self.show_settings(CheckSettings())
        self.max_change.setValue(DEFAULT_MAX_CHANGE_MM / self._mm_per_shown)

    def result_max_change_mm(self) -> float:
        """The allowed change of a fix shown, mm."""
        return self.max_change.value() * self._mm_per_shown

    def show_settings(self, s: CheckSettings) -> None:
        self.gap.setValue(s.gap_mm / self._mm_per_shown)
        self.kink.setValue(s.kink_angle)
        self.corner.setValue(s.corner_angle)
        self.jump.setValue(s.curvature_jump * 100.0)

    def result_settings(self) -> CheckSettings:
        """The settings shown; raises ValueError (with the checks' own message) if invalid."""
        gap_mm = self.gap.value() * self._mm_per_shown
        return dataclasses.replace(
            self._base,
            gap_mm=gap_mm,
            gap_search_mm=max(self._base.gap_search_mm, gap_mm),
            kink_angle=self.kink.value(),
            corner_angle=self.corner.value(),
            curvature_jump=self.jump.value() / 100.0,
        )

    def accept(self) -> None:
        try:
            self.result_settings()
        except ValueError as exc:
            self.error_label.setText(str(exc))
            return
        super().accept()
