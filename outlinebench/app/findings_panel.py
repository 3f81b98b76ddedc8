"""The findings list beside the canvas: every finding of the open document, live.

One row per finding — its kind with its severity as the icon (the canvas mark: diamond
error, square warning, dotted info; named in the tooltip), contour and place in it (segment or
join), the measured value with its unit in the document's units, and the position. Rows
are sorted by severity (errors first), then in document order; clicking a column header sorts
by that column instead. A count line sums up the document, and "Show info" hides or shows the
info-level findings (on the canvas too). Clicking a row asks the window to show that place.

Repairs at hand: "Fix…" (and the row's context menu) asks the window to preview the picked
finding's fix; the fix bar under the list then shows the measured change and the fix's note
(or why it is refused) with Apply and Cancel. The context menu also offers "Fix all findings
of this kind".
"""

from __future__ import annotations

import math
import time
from collections import Counter
from collections.abc import Sequence
from operator import attrgetter
from typing import Any

from PySide6.QtCore import (
    QAbstractTableModel,
    QModelIndex,
    QPersistentModelIndex,
    Qt,
    QTimer,
    Signal,
)
from PySide6.QtWidgets import (
    QAbstractItemView,
    QCheckBox,
    QFrame,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QMenu,
    QPushButton,
    QTreeView,
    QVBoxLayout,
    QWidget,
)

from outlinebench.app.finding_marks import finding_icon
from outlinebench.app.live_findings import LiveFindings
from outlinebench.app.units import DisplayUnits
from outlinebench.diagnostics import KINDS, Finding, convert_units, place_text
from outlinebench.diagnostics.findings import ERROR, INFO, SEVERITY_RANK, WARNING

__all__ = [
    "FindingsModel",
    "FindingsPanel",
    "value_text",
    "where_text",
    "short_where_text",
    "COLUMNS",
    "COLUMN_SAMPLES",
    "column_widths",
    "LIST_THROTTLE_MS",
    "LIST_LIVE_ROWS",
]

# While a drag runs, the list is rebuilt at most this often (milliseconds); sorting and
# converting thousands of findings on every mouse move would slow the drag.
LIST_THROTTLE_MS = 150
# Up to this many findings the list is rebuilt on every check, drags included, so list and
# canvas always show the same check (rebuilding a few hundred rows costs well under a
# millisecond); only longer lists are throttled, and their count line then says so.
LIST_LIVE_ROWS = 500
COLUMNS = ("Finding", "Where", "Value", "Position")
_HEADER_TIPS = (
    "What was found; the icon is its severity (diamond: error, square: warning, dotted: "
    "info). Sorting by this column puts errors first.",
    "Contour number (counted from 0 through the file) and place in it, in the words "
    "`outlinebench check` prints; ↔ names the other contour of a crossing",
    "The measured value",
    "x, y of the place, in the document's units (full digits in each row's tooltip)",
)
_Index = QModelIndex | QPersistentModelIndex


def _num(v: float, decimals: int) -> str:
    if not math.isfinite(v):
        return "∞" if v > 0 else "−∞"
    return f"{v:.{decimals}f}"


def value_text(f: Finding, units: DisplayUnits, detail: bool = True) -> str:
    """The measured value with its unit, for a finding already converted to ``units``
    (with ``detail``, a curvature jump also gives κ on both sides)."""
    if f.value is None:
        return ""
    if f.unit == "degrees":
        return f"{_num(f.value, 2)}°"
    if f.unit == "relative":
        text = f"{f.value * 100:.1f} %"
        if detail and f.curvature_before is not None and f.curvature_after is not None:
            text += f"  (κ {f.curvature_before:.4g} → {f.curvature_after:.4g} per {units.name})"
        return text
    if f.unit == units.name:
        return f"{_num(f.value, units.decimals)} {units.name}"
    if f.unit == f"{units.name}^2":
        return f"{_num(f.value, units.decimals)} {units.name}²" + (" (area)" if detail else "")
    return f"{f.value:.4g} {f.unit}"


def where_text(f: Finding) -> str:
    """The place in the command line's words ("contour 5, join 5", "contour 3"), plus the
    other contour of a gap or crossing between two contours ("↔ contour 2")."""
    text = place_text(f)
    if f.other_contour is not None and f.other_contour != f.contour:
        text += f" ↔ contour {f.other_contour}"
    return text


def short_where_text(f: Finding) -> str:
    """The list's "Where" cell: the place in the command line's words,
    :func:`outlinebench.diagnostics.place_text` ("contour 5, join 5"); the other contour of a
    crossing is named in the row's tooltip and message, as the command line does."""
    return place_text(f)


def _count(n: int, word: str) -> str:
    """``1 error``, ``2 errors``: the count line in plain English."""
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def _severity_counts(findings: Sequence[Finding]) -> dict[str, int]:
    """``total``, ``errors``, ``warnings`` and ``info`` as
    :func:`outlinebench.diagnostics.summarize` counts them, in one C-level pass (the count
    line is redrawn after every check of a drag)."""
    sev = Counter(map(attrgetter("severity"), findings))
    return {
        "total": len(findings),
        "errors": sev.get(ERROR, 0),
        "warnings": sev.get(WARNING, 0),
        "info": sev.get(INFO, 0),
    }


def _order_key(f: Finding) -> tuple:
    return (
        SEVERITY_RANK.get(f.severity, 3),
        f.contour,
        -1 if f.segment is None else f.segment,
        -1.0 if f.t is None else f.t,
        KINDS.index(f.kind) if f.kind in KINDS else len(KINDS),
    )


# Widest texts each column is sized for at the default font: the longest kind name beside its
# icon, a place with two-digit numbers, a value, and a position of four digits before the
# point in the document's display decimals less one.
COLUMN_SAMPLES = (
    "degenerate-handle",
    "contour 16, segment 9",
    "188.991 mm²",
    "358.0, 140.0",
)


# Room around a cell's text (Qt's item margins, 3 px a side, and 1 px to spare) and beside
# it for the severity icon (16 px and its margins); Qt's own measure of the cells,
# sizeHintForColumn, is no wider (test_findings_panel).
CELL_PAD_PX = 7
ICON_ROOM_PX = 22


def column_widths(metrics) -> list[int]:
    """Starting widths (logical px) of the list's columns for a font's metrics: each sample
    text of :data:`COLUMN_SAMPLES` plus the cell's padding (and the icon in the first)."""
    widths = [metrics.horizontalAdvance(t) + CELL_PAD_PX for t in COLUMN_SAMPLES]
    widths[0] += ICON_ROOM_PX
    return widths


class FindingsModel(QAbstractTableModel):
    """Table of findings (already converted to display units), sortable by any column."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.rows: list[tuple[Finding, Finding]] = []  # (converted, original)
        self.units: DisplayUnits | None = None
        self._sort = (0, Qt.SortOrder.AscendingOrder)

    def set_findings(
        self, shown: Sequence[Finding], original: Sequence[Finding], units: DisplayUnits
    ) -> None:
        self.beginResetModel()
        self.units = units
        self.rows = list(zip(shown, original, strict=True))
        self._apply_sort()
        self.endResetModel()

    # -- Qt model interface -------------------------------------------------------------
    def rowCount(self, parent: _Index = QModelIndex()) -> int:  # noqa: N802, B008
        return 0 if parent.isValid() else len(self.rows)

    def columnCount(self, parent: _Index = QModelIndex()) -> int:  # noqa: N802, B008
        return 0 if parent.isValid() else len(COLUMNS)

    def headerData(self, section: int, orientation, role: int = Qt.ItemDataRole.DisplayRole):  # noqa: N802
        if orientation == Qt.Orientation.Horizontal and role == Qt.ItemDataRole.DisplayRole:
            return COLUMNS[section]
        if orientation == Qt.Orientation.Horizontal and role == Qt.ItemDataRole.ToolTipRole:
            return _HEADER_TIPS[section]
        return None

    def data(self, index: _Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid():
            return None
        f, _orig = self.rows[index.row()]
        col = index.column()
        if role == Qt.ItemDataRole.DisplayRole:
            return self.cell_text(f, col)
        if role == Qt.ItemDataRole.DecorationRole and col == 0:
            return finding_icon(f.severity)
        if role == Qt.ItemDataRole.ToolTipRole:
            units = self.units
            assert units is not None
            return (
                f"<b>{f.kind}</b> ({f.severity}) at {where_text(f)}: "
                f"{f.message}<br>measured "
                f"{value_text(f, units)} at x {f.x:.{units.decimals}f}, "
                f"y {f.y:.{units.decimals}f} {units.name}"
            )
        if role == Qt.ItemDataRole.TextAlignmentRole and col in (2, 3):
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        return None

    def cell_text(self, f: Finding, col: int) -> str:
        units = self.units
        assert units is not None
        if col == 0:
            return f.kind
        if col == 1:
            return short_where_text(f)
        if col == 2:
            return value_text(f, units, detail=False)
        # Two digits fewer than the selection panel (0.1 mm), so the column fits the dock at
        # the default window size: enough to find the place; the tooltip has every digit.
        d = max(units.decimals - 2, 1)
        return f"{f.x:.{d}f}, {f.y:.{d}f}"

    def sort(self, column: int, order: Qt.SortOrder = Qt.SortOrder.AscendingOrder) -> None:
        self.layoutAboutToBeChanged.emit()
        self._sort = (column, order)
        self._apply_sort()
        self.layoutChanged.emit()

    def _apply_sort(self) -> None:
        column, order = self._sort
        if column == 0:
            key = lambda r: _order_key(r[0])  # noqa: E731
        elif column == 1:
            key = lambda r: (r[0].contour, _order_key(r[0]))  # noqa: E731
        elif column == 2:
            key = lambda r: (r[0].unit, r[0].value if r[0].value is not None else -1.0)  # noqa: E731
        elif column == 3:
            key = lambda r: (r[0].y, r[0].x)  # noqa: E731
        else:
            key = lambda r: (self.cell_text(r[0], column), _order_key(r[0]))  # noqa: E731
        self.rows.sort(key=key, reverse=order == Qt.SortOrder.DescendingOrder)

    def finding(self, row: int) -> Finding:
        """The original finding (user units) of a row."""
        return self.rows[row][1]


class FindingsPanel(QWidget):
    """Count line, "Show info" filter, tolerance button and the sortable list.

    Parameters
    ----------
    live : LiveFindings
        Where the findings come from.
    units : callable returning DisplayUnits
        The document's display units (they change when another file is opened).

    Signals
    -------
    picked(object)
        A finding (user units) was clicked or chosen with the keyboard.
    filter_changed(bool)
        "Show info" was toggled.
    settings_requested
        The tolerance button was pressed.
    fix_requested(object), fix_all_requested(object)
        Preview the fix of a finding (user units; None from the button when no row is
        current: the finding the window shows); fix every finding of its kind.
    fix_applied, fix_cancelled
        The fix bar's Apply or Cancel was pressed.
    """

    picked = Signal(object)
    filter_changed = Signal(bool)
    settings_requested = Signal()
    fix_requested = Signal(object)
    fix_all_requested = Signal(object)
    fix_applied = Signal()
    fix_cancelled = Signal()

    def __init__(self, live: LiveFindings, units, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._live = live
        self._units = units
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 6, 4, 6)
        self.summary = QLabel("")
        self.summary.setWordWrap(True)
        lay.addWidget(self.summary)
        row = QHBoxLayout()
        self.show_info = QCheckBox("Show info")
        self.show_info.setToolTip(
            "Info findings are notes, not problems (for example corners the file does not "
            "mark smooth); shown here and on the canvas when ticked"
        )
        self.show_info.setChecked(False)
        self.show_info.toggled.connect(self._on_filter)
        row.addWidget(self.show_info)
        row.addStretch(1)
        self.fix_button = QPushButton("Fix…")
        self.fix_button.setToolTip(
            "Preview the picked finding's fix: the measured change (proven Hausdorff distance) "
            "is shown before anything is applied"
        )
        self.fix_button.setEnabled(False)
        self.fix_button.clicked.connect(self._on_fix_button)
        row.addWidget(self.fix_button)
        self.tolerances = QPushButton("Tolerances…")
        self.tolerances.setToolTip("Gap, kink angle, corner angle and curvature jump limits")
        self.tolerances.clicked.connect(self.settings_requested.emit)
        row.addWidget(self.tolerances)
        lay.addLayout(row)
        self.model = FindingsModel(self)
        self.view = QTreeView()
        self.view.setRootIsDecorated(False)
        self.view.setUniformRowHeights(True)
        self.view.setAlternatingRowColors(True)
        self.view.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.view.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.view.setModel(self.model)
        self.view.setSortingEnabled(True)
        self.view.sortByColumn(0, Qt.SortOrder.AscendingOrder)
        header = self.view.header()
        header.setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        header.setStretchLastSection(True)
        widths = column_widths(self.view.fontMetrics())
        for col, width in enumerate(widths):
            # never narrower than the header's own text and sort arrow; the last column
            # stretches into the rest of the list (its header reads whole there)
            if col < len(widths) - 1:
                width = max(width, header.sectionSizeHint(col))
            self.view.setColumnWidth(col, width)
        self.view.setContextMenuPolicy(Qt.ContextMenuPolicy.CustomContextMenu)
        self.view.customContextMenuRequested.connect(self._on_context_menu)
        self.view.clicked.connect(self._on_row)
        self.view.activated.connect(self._on_row)
        # Walking the list with the arrow keys shows each finding in turn.
        self.view.selectionModel().currentRowChanged.connect(self._on_current_row)
        lay.addWidget(self.view, 1)
        # The fix bar: a fix being previewed, its measured change and note, Apply / Cancel.
        self.fix_bar = QFrame()
        self.fix_bar.setFrameShape(QFrame.Shape.StyledPanel)
        bar = QVBoxLayout(self.fix_bar)
        bar.setContentsMargins(6, 4, 6, 4)
        self.fix_text = QLabel("")
        self.fix_text.setWordWrap(True)
        self.fix_text.setTextFormat(Qt.TextFormat.RichText)
        bar.addWidget(self.fix_text)
        buttons = QHBoxLayout()
        buttons.addStretch(1)
        self.fix_apply = QPushButton("Apply")
        self.fix_apply.setToolTip("Apply this fix (one undo step)")
        self.fix_apply.clicked.connect(self.fix_applied.emit)
        self.fix_cancel = QPushButton("Cancel")
        self.fix_cancel.clicked.connect(self.fix_cancelled.emit)
        buttons.addWidget(self.fix_apply)
        buttons.addWidget(self.fix_cancel)
        bar.addLayout(buttons)
        self.fix_bar.hide()
        lay.addWidget(self.fix_bar)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(LIST_THROTTLE_MS)
        self._timer.timeout.connect(self.refresh)
        self._last_refresh = 0.0
        self._shown: tuple | None = None  # (findings, info shown, filtered list), last asked
        # id(original finding) -> (original, converted), for the units in _conversions_key
        self._conversions: dict[int, tuple[Finding, Finding]] = {}
        self._conversions_key: tuple[float, str] | None = None
        live.updated.connect(self._on_updated)
        self.refresh()

    def _on_updated(self) -> None:
        # During a drag a long list follows at most every LIST_THROTTLE_MS (the canvas frames
        # follow every check); the timer brings it up to date after the last move. The count
        # line always shows the check the canvas shows.
        if (
            self._live.in_gesture
            and len(self._live.findings) > LIST_LIVE_ROWS
            and (time.perf_counter() - self._last_refresh) * 1e3 < LIST_THROTTLE_MS
        ):
            if not self._timer.isActive():
                self._timer.start()
            self._refresh_summary(stale=True)
            return
        self.refresh()

    @property
    def info_shown(self) -> bool:
        return self.show_info.isChecked()

    def shown_findings(self) -> list[Finding]:
        """The findings the filter lets through (user units)."""
        fs = self._live.findings
        info = self.info_shown
        hit = self._shown
        if hit is not None and hit[0] is fs and hit[1] == info:
            return hit[2]  # the list and the canvas ask after every check: filter once
        shown = list(fs) if info else [f for f in fs if f.severity != "info"]
        self._shown = (fs, info, shown)
        return shown

    def _on_filter(self, checked: bool) -> None:
        self.refresh()
        self.filter_changed.emit(checked)

    def refresh(self) -> None:
        self._timer.stop()
        self._last_refresh = time.perf_counter()
        units: DisplayUnits = self._units()
        original = self.shown_findings()
        shown = self._converted(original, units)
        self.model.set_findings(shown, original, units)
        self.fix_button.setEnabled(bool(original))
        self._refresh_summary()

    def _converted(self, original: Sequence[Finding], units: DisplayUnits) -> list[Finding]:
        """``convert_units(original, ...)``, converting only findings not converted before.

        The checker keeps the Finding objects of contours an edit did not touch, so during a
        drag all but a handful are the same objects as in the previous list.
        """
        key = (units.factor, units.name)
        cache = self._conversions if self._conversions_key == key else {}
        todo = [f for f in original if id(f) not in cache]
        done = convert_units(todo, units.factor, units.name)
        for f, c in zip(todo, done, strict=True):
            cache[id(f)] = (f, c)  # the original is kept so its id stays its own
        shown = [cache[id(f)][1] for f in original]
        self._conversions = {id(f): cache[id(f)] for f in original}
        self._conversions_key = key
        return shown

    def _refresh_summary(self, stale: bool = False) -> None:
        """The count line, from the same check as the canvas marks."""
        units: DisplayUnits = self._units()
        s = _severity_counts(self._live.findings)
        info = f"{s['info']} info" + ("" if self.info_shown else " (hidden)")
        if s["total"] == 0:
            text = "<b>No findings</b> with the current tolerances"
        else:
            text = (
                f"<b>{_count(s['errors'], 'error')} · {_count(s['warnings'], 'warning')}</b>"
                f" · {info}"
                f"<br><span style='color:#5b6670'>lengths in {units.name}</span>"
            )
        if stale:
            text += " · <i>list updating…</i>"
        if self._live.error:
            text += f"<br><span style='color:#c3122f'>Check failed: {self._live.error}</span>"
        self.summary.setText(text)

    def _on_current_row(self, index: QModelIndex, _previous: QModelIndex) -> None:
        if self.view.hasFocus() and index.isValid():
            self.picked.emit(self.model.finding(index.row()))

    def _on_row(self, index: QModelIndex) -> None:
        if index.isValid():
            self.picked.emit(self.model.finding(index.row()))

    # -- repairs at hand ----------------------------------------------------------------
    def current_finding(self) -> Finding | None:
        """The finding of the list's current row (user units), or None."""
        index = self.view.currentIndex()
        if not index.isValid() or index.row() >= self.model.rowCount():
            return None
        return self.model.finding(index.row())

    def _on_fix_button(self) -> None:
        # the list's current row, or None: the window then takes the finding it shows
        self.fix_requested.emit(self.current_finding())

    def context_menu_for(self, row: int) -> QMenu:
        """The context menu of a row: fix this finding, fix all of its kind."""
        f = self.model.finding(row)
        menu = QMenu(self)
        act = menu.addAction(f"Fix this {f.kind}…")
        act.triggered.connect(lambda: self.fix_requested.emit(f))
        act_all = menu.addAction(f"Fix all {f.kind} findings")
        act_all.setToolTip("In the selected contours if any are selected, else everywhere")
        act_all.triggered.connect(lambda: self.fix_all_requested.emit(f))
        return menu

    def _on_context_menu(self, pos) -> None:
        index = self.view.indexAt(pos)
        if not index.isValid():
            return
        self.view.setCurrentIndex(index)
        self.context_menu_for(index.row()).exec(self.view.viewport().mapToGlobal(pos))

    def show_fix(self, html: str, can_apply: bool) -> None:
        """Show the fix bar with ``html``; Apply is offered only when ``can_apply``."""
        self.fix_text.setText(html)
        self.fix_apply.setVisible(can_apply)
        self.fix_cancel.setText("Cancel" if can_apply else "Close")
        self.fix_bar.show()

    def hide_fix(self) -> None:
        self.fix_bar.hide()
        self.fix_text.setText("")
