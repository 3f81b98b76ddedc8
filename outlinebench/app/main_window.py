"""The editor's main window: canvas, selection panel, menus, tool bar and file handling.

The window also wires the diagnostics overlays: the findings list (a dock on the left, fed by
:class:`~outlinebench.app.live_findings.LiveFindings`), finding frames on the canvas, the
curvature comb and its scale (View menu), and the check tolerances dialog.

``run_editor(args)`` is the entry point ``outlinebench [FILE.svg]`` reaches.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
from PySide6.QtCore import QSettings, Qt, QTimer
from PySide6.QtGui import QAction, QActionGroup, QCloseEvent, QKeySequence
from PySide6.QtWidgets import (
    QApplication,
    QDialog,
    QDockWidget,
    QFrame,
    QHBoxLayout,
    QLabel,
    QMainWindow,
    QPushButton,
    QScrollArea,
    QSlider,
    QVBoxLayout,
    QWidget,
    QWidgetAction,
)

from outlinebench import __version__
from outlinebench.app import dialogs, style
from outlinebench.app.canvas import PLACE_MIN_PX as PLACE_SIZE_PX
from outlinebench.app.canvas import Canvas
from outlinebench.app.canvas_painter import count_points_in_view
from outlinebench.app.curvature_comb import auto_comb_scale
from outlinebench.app.cut_preview import (
    cut_file_bytes,
    flatten_preview,
    offset_preview,
    verify_cut_file,
)
from outlinebench.app.cutting_panel import CuttingPanel
from outlinebench.app.edit_rounding import EDIT_RESOLUTION_MM, edit_decimals, round_edits
from outlinebench.app.findings_panel import FindingsPanel, column_widths
from outlinebench.app.fix_preview import FixPreview, change_text, fix_all, preview_fix
from outlinebench.app.icons import icon
from outlinebench.app.live_findings import LiveFindings, place_of
from outlinebench.app.recovery import Recovery, RecoveryStore, stale_recoveries
from outlinebench.app.selection_panel import SelectionPanel
from outlinebench.app.session import TOOLS, EditorSession
from outlinebench.app.settings import Preferences, RecentFiles, default_settings, recovery_folder
from outlinebench.app.tolerances_dialog import TolerancesDialog
from outlinebench.data_files import sample_files, samples_dir
from outlinebench.diagnostics import Finding
from outlinebench.errors import OutlinebenchError
from outlinebench.io import CUT_CAUTION, write_file_atomic
from outlinebench.model.document import Document
from outlinebench.model.point_names import PointRef

__all__ = [
    "MainWindow",
    "run_editor",
    "samples_dir",
    "sample_files",
    "new_document",
    "NAVIGATION_HINT",
    "AUTOSAVE_MS",
    "KEYS_AND_MOUSE",
]

NAVIGATION_HINT = (
    "Wheel: scroll · Shift+wheel: scroll sideways · Ctrl+wheel: zoom at pointer · "
    "Middle-drag or Space+drag: pan"
)


# The comb scale slider: position k multiplies the automatic scale by 2^(k/2), from 1/16 to 16.
COMB_STEPS = 8
# Starting width of the findings dock, logical px: the severity, kind, where and value columns
# (position scrolls into view); at 1280 px the canvas keeps about half the window.
FINDINGS_DOCK_WIDTH = 380
# The window's starting size: wide enough for the findings list's four columns, the selection
# panel and a canvas of 40 % of the width (at 1280 px the findings dock gives way to the
# canvas, see _fit_findings_dock); smaller screens get their available size.
DEFAULT_WINDOW_SIZE = (1440, 900)
# While a fix is previewed the canvas zooms in until its measured change spans this many
# logical px (common practice, no source: a few pixels tell dashed from solid).
FIX_CHANGE_PX = 4.0
# Share of the window's width the canvas keeps when the docks would take more (common
# practice, no source).
MIN_CANVAS_SHARE = 0.4
# The key to the marks in the selection panel starts open when the window is at least this
# tall (logical px); shorter windows start with it folded so the point's numbers need no
# scrolling.
KEY_OPEN_MIN_HEIGHT = 900
# Zoom 100 % = true size on a screen of 96 logical px per inch (the CSS reference pixel,
# W3C CSS Values and Units Level 3 §5.2).
PX_PER_MM_AT_100 = 96.0 / 25.4

# Unsaved work is written to the recovery file this long after the last change (and, during a
# long drag, this long after the drag's first unsaved move): "a few seconds", so a crash
# loses at most that much.
AUTOSAVE_MS = 3000
# The cutting previews follow an edit this long after it (they take up to a second on a
# large drawing; a burst of nudges recomputes them once).
PREVIEW_DELAY_MS = 250

KEYS_AND_MOUSE = """
<h3>Mouse</h3>
<table cellspacing=4>
<tr><td>Click a point</td><td>select it (Shift+click: add or remove)</td></tr>
<tr><td>Drag on empty canvas</td><td>select the points in the box</td></tr>
<tr><td>Drag a point or handle</td><td>move it; Alt (or B): break a smooth join;
Ctrl: keep the two handles equal</td></tr>
<tr><td>Drag an open end onto its start</td><td>close the contour there</td></tr>
<tr><td>Wheel / Shift+wheel</td><td>scroll / scroll sideways</td></tr>
<tr><td>Ctrl+wheel</td><td>zoom at the pointer</td></tr>
<tr><td>Middle-drag, Space+drag</td><td>pan</td></tr>
<tr><td>Hover a finding mark</td><td>what was found there</td></tr>
<tr><td>Right-click a finding</td><td>fix it (preview first) / fix all of its kind</td></tr>
</table>
<h3>Keys</h3>
<table cellspacing=4>
<tr><td>S, I, D</td><td>select / insert point / draw contour tools</td></tr>
<tr><td>Arrows (Shift: ×10)</td><td>nudge the selection</td></tr>
<tr><td>J</td><td>toggle join intent smooth ⇄ corner</td></tr>
<tr><td>Ctrl+1, 2, 3</td><td>make the segment a line, quadratic, cubic</td></tr>
<tr><td>Delete, Backspace</td><td>delete points (neighbours refitted)</td></tr>
<tr><td>Ctrl+Shift+C, R</td><td>close / reverse the contour</td></tr>
<tr><td>N, Shift+N</td><td>next / previous finding</td></tr>
<tr><td>Ctrl+Shift+F, Ctrl+Shift+A</td><td>preview the shown finding's fix / fix all of its
kind (selection, else everything)</td></tr>
<tr><td>F, Ctrl++, Ctrl+−</td><td>fit, zoom in, zoom out</td></tr>
<tr><td>Ctrl+Shift+K, [ ]</td><td>curvature comb, shorter / longer teeth</td></tr>
<tr><td>Enter, Esc</td><td>finish an open contour / cancel</td></tr>
<tr><td>Ctrl+Z, Ctrl+Shift+Z</td><td>undo, redo</td></tr>
</table>
"""

# A new drawing: a landscape A4 sheet in millimetres (ISO 216: 297 mm × 210 mm).
NEW_PAGE_MM = (297.0, 210.0)


def new_document() -> Document:
    """An empty drawing on a landscape A4 page, one user unit per millimetre."""
    w, h = NEW_PAGE_MM
    return Document(width_mm=w, height_mm=h, view_box=(0.0, 0.0, w, h), mm_per_unit=1.0, units="mm")


class StartPanel(QFrame):
    """Shown over an empty canvas: open a file or one of the bundled samples."""

    def __init__(self, window: MainWindow) -> None:
        super().__init__(window.canvas)
        self.setObjectName("startPanel")
        self.setFrameShape(QFrame.Shape.StyledPanel)
        self.setStyleSheet(
            "#startPanel { background: #fbfaf6; border: 1px solid #b9b3a5; border-radius: 6px; }"
            "QPushButton { text-align: left; padding: 4px 10px; }"
        )
        lay = QVBoxLayout(self)
        title = QLabel("<b>No drawing open</b>")
        lay.addWidget(title)
        lay.addWidget(QLabel("Open an SVG file to check and edit its outlines."))
        open_btn = QPushButton(icon("open"), "Open a file…")
        open_btn.clicked.connect(window.open_dialog)
        lay.addWidget(open_btn)
        samples = sample_files()
        if samples:
            lay.addWidget(QLabel("Or try a sample drawing:"))
            for path in samples:
                btn = QPushButton(path.stem.replace("-", " "))
                btn.setToolTip(str(path))
                btn.clicked.connect(lambda _=False, p=str(path): window.open_path(p))
                lay.addWidget(btn)
        else:
            lay.addWidget(QLabel("<i>No sample drawings are installed.</i>"))
        lay.addWidget(QLabel("Or draw a contour with the Draw contour tool."))
        self.adjustSize()


class MainWindow(QMainWindow):
    """The editor window.

    Parameters
    ----------
    settings : QSettings, optional
        Where settings and recent files are remembered (default
        :func:`outlinebench.app.settings.default_settings`; tests pass a temporary one).
    recovery_dir : str or Path, optional
        Folder of recovery files (default beside the settings, see
        :func:`outlinebench.app.settings.recovery_folder`).
    autosave_ms : int
        Delay of the recovery write after a change; 0 turns recovery off (``render``).
    """

    def __init__(
        self,
        settings: QSettings | None = None,
        *,
        recovery_dir=None,
        autosave_ms: int = AUTOSAVE_MS,
    ) -> None:
        super().__init__()
        self.settings = settings if settings is not None else default_settings()
        self.prefs = Preferences(self.settings)
        self.session = EditorSession(new_document())
        self.session.set_unit_name(self.prefs.units())
        self.path: str | None = None
        self._partial = False  # opened only the part of a file before a read error
        self._opened_doc: Document | None = None  # as read: edits are rounded against it
        self.recent = RecentFiles(self.settings)
        self.recovery: RecoveryStore | None = None
        if autosave_ms > 0:
            folder = recovery_dir if recovery_dir is not None else recovery_folder(self.settings)
            self.recovery = RecoveryStore(folder)
        self._autosave = QTimer(self)
        self._autosave.setSingleShot(True)
        self._autosave.setInterval(max(int(autosave_ms), 1))
        self._autosave.timeout.connect(self.write_recovery)
        self._preview_timer = QTimer(self)
        self._preview_timer.setSingleShot(True)
        self._preview_timer.setInterval(PREVIEW_DELAY_MS)
        self._preview_timer.timeout.connect(self.update_previews)
        self.flatten_result = None
        self.offset_result = None
        self.setWindowIcon(icon("app"))
        self.canvas = Canvas(self.session, self)
        self.setCentralWidget(self.canvas)
        self.panel = SelectionPanel(self.session, self)
        dock = QDockWidget("Selection", self)
        dock.setObjectName("selectionDock")
        scroll = QScrollArea()  # the panel scrolls on short screens instead of growing the window
        scroll.setWidgetResizable(True)
        scroll.setFrameShape(QFrame.Shape.NoFrame)
        scroll.setWidget(self.panel)
        scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        scroll.setMinimumWidth(  # the panel's least width: labels whole, fields 120 px
            self.panel.minimumSizeHint().width() + scroll.verticalScrollBar().sizeHint().width() + 4
        )
        dock.setWidget(scroll)
        dock.setFeatures(QDockWidget.DockWidgetFeature.DockWidgetMovable)
        self.addDockWidget(Qt.DockWidgetArea.RightDockWidgetArea, dock)
        self.selection_dock = dock
        # Findings: checked live after every edit, listed in a dock on the left.
        self.live = LiveFindings(self.session, self.prefs.check_settings(), parent=self)
        self.findings_panel = FindingsPanel(self.live, lambda: self.session.units, self)
        fdock = QDockWidget("Findings", self)
        fdock.setObjectName("findingsDock")
        fdock.setWidget(self.findings_panel)
        fdock.setFeatures(  # closable: View ▸ Findings brings it back
            QDockWidget.DockWidgetFeature.DockWidgetMovable
            | QDockWidget.DockWidgetFeature.DockWidgetClosable
        )
        self.addDockWidget(Qt.DockWidgetArea.LeftDockWidgetArea, fdock)
        self.findings_dock = fdock
        # Cutting previews: below the findings.
        self.cutting = CuttingPanel(lambda: self.session.units, self)
        cdock = QDockWidget("Cutting", self)
        cdock.setObjectName("cuttingDock")
        cdock.setWidget(self.cutting)
        cdock.setFeatures(
            QDockWidget.DockWidgetFeature.DockWidgetMovable
            | QDockWidget.DockWidgetFeature.DockWidgetClosable
        )
        self.addDockWidget(Qt.DockWidgetArea.LeftDockWidgetArea, cdock)
        self.cutting_dock = cdock
        self.cutting.set_lengths_mm(
            self.prefs.number("preview/flatten_tolerance_mm", self.cutting.tolerance_mm()),
            self.prefs.number("preview/offset_radius_mm", self.cutting.radius_mm()),
        )
        self.cutting.flatten_on.setChecked(self.prefs.flag("preview/flatten"))
        self.cutting.offset_on.setChecked(self.prefs.flag("preview/offset"))
        self.cutting.changed.connect(self._on_previews_changed)
        self.cutting.export_requested.connect(self.export_cut_file)
        self.session.close_gap = self._gap_user()
        self.current_finding: Finding | None = None
        self._comb_base: float | None = None  # automatic comb scale of the open document
        self._seen_doc = self.session.document
        self.session.changed.connect(self._on_maybe_new_document)
        self.live.updated.connect(self._on_findings_updated)
        self.findings_panel.filter_changed.connect(lambda _on: self._on_findings_updated())
        self.findings_panel.picked.connect(self.show_finding)
        self.findings_panel.settings_requested.connect(self.edit_tolerances)
        self.fix_preview: FixPreview | None = None  # a fix being previewed
        self.findings_panel.fix_requested.connect(self.preview_fix)
        self.findings_panel.fix_all_requested.connect(self.fix_all_of_kind)
        self.findings_panel.fix_applied.connect(self.apply_fix)
        self.findings_panel.fix_cancelled.connect(self.cancel_fix)
        self.session.changed.connect(self._drop_stale_fix)
        self._build_actions()
        self._build_menus_and_toolbar()
        self._build_status_bar()
        self.start_panel = StartPanel(self)
        self.session.changed.connect(self._on_document_changed)
        self.session.selection_changed.connect(self._on_selection_changed)
        self.session.message.connect(self._show_message)
        self.session.tool_changed.connect(self._on_tool_changed)
        self._on_tool_changed(self.session.tool_name)
        self.canvas.pointer_moved.connect(self._on_pointer_moved)
        self.canvas.view_changed.connect(self._on_view_changed)
        self.session.changed.connect(self._on_change_for_recovery)
        self.session.changed.connect(self._schedule_previews)
        self.resize(*self._default_size())
        geometry, state = self.prefs.layout()
        if geometry is not None:
            self.restoreGeometry(geometry)
        if state is not None:
            self.restoreState(state)
        comb_on = self.prefs.flag("view/comb")  # read before the slider writes it back
        self.comb_slider.setValue(self.prefs.comb_step())
        if comb_on:
            self.set_comb_visible(True)
        self._update_title()
        self._on_document_changed()
        self._on_selection_changed()

    def _default_size(self) -> tuple[int, int]:
        w, h = DEFAULT_WINDOW_SIZE
        screen = self.screen()
        if screen is not None and QApplication.platformName() != "offscreen":
            avail = screen.availableGeometry()
            w, h = min(w, avail.width()), min(h, avail.height())
        return w, h

    def _fit_findings_dock(self) -> None:
        """Let the findings dock be at most as wide as leaves the canvas MIN_CANVAS_SHARE of
        the window beside the selection dock (it starts at its full width, all four columns,
        when there is room)."""
        if not hasattr(self, "findings_dock"):
            return
        right = self.selection_dock
        need = self._findings_dock_width()
        share = int(self.width() * (1.0 - MIN_CANVAS_SHARE)) - 14
        right_min = right.minimumSizeHint().width()
        right_pref = max(right.sizeHint().width(), right_min)
        if share - right_pref < need:
            # Narrow window (1280 px): the selection panel keeps only its least width (labels
            # whole, fields as wide as their widest text) so the list's four columns fit;
            # the dock area follows only when told (resizeDocks).
            right.setMaximumWidth(right_min)
            self.resizeDocks([right], [right_min], Qt.Orientation.Horizontal)
            right_w = right_min
        else:
            right.setMaximumWidth(16777215)  # QWIDGETSIZE_MAX: as wide as the user drags
            right_w = max(right.width(), right_min)
        room = max(share - right_w, self.findings_panel.minimumSizeHint().width())
        width = min(need, room)
        # Minimum and maximum of the panel (not resizeDocks, which Qt may apply later or not
        # at all before the first frames): the dock layout honours them at once.
        self.findings_panel.setMinimumWidth(width)
        self.findings_panel.setMaximumWidth(max(room, width))

    def showEvent(self, event) -> None:  # noqa: N802 (Qt name)
        super().showEvent(event)
        self._fit_findings_dock()

    def _findings_dock_width(self) -> int:
        """Starting width of the findings dock: its four columns whole (column_widths), the
        list's frame and scroll bar and the dock's margins, at least FINDINGS_DOCK_WIDTH."""
        view = self.findings_panel.view
        # the last column stretches into what is left: its cells need only their text
        widths = column_widths(view.fontMetrics())
        columns = sum(max(w, view.columnWidth(c)) for c, w in enumerate(widths[:-1]))
        columns += widths[-1]
        m = self.findings_panel.layout().contentsMargins()
        extra = (
            view.verticalScrollBar().sizeHint().width()
            + 2 * view.frameWidth()
            + m.left()
            + m.right()
        )
        return max(FINDINGS_DOCK_WIDTH, columns + extra)

    # -- actions ------------------------------------------------------------------------
    def _action(self, text, slot, shortcut=None, icon_name=None, tip=None) -> QAction:
        act = QAction(text, self)
        if icon_name:
            act.setIcon(icon(icon_name))
        if shortcut is not None:
            if isinstance(shortcut, QKeySequence.StandardKey):
                act.setShortcuts(shortcut)
            else:
                act.setShortcut(QKeySequence(shortcut))
        act.setStatusTip(tip or text)
        act.setToolTip(f"{text} ({act.shortcut().toString()})" if shortcut else text)
        act.triggered.connect(slot)
        self.addAction(act)
        return act

    def _build_actions(self) -> None:
        sk = QKeySequence.StandardKey
        s = self.session
        self.act_open = self._action("&Open…", self.open_dialog, sk.Open, "open")
        self.act_save = self._action("&Save", self.save, sk.Save, "save")
        self.act_save_as = self._action("Save &as…", self.save_as, sk.SaveAs)
        self.act_quit = self._action("&Quit", self.close, sk.Quit)
        self.act_undo = self._action("&Undo", s.undo, sk.Undo, "undo")
        self.act_redo = self._action("&Redo", s.redo, sk.Redo, "redo")
        self.act_select_all = self._action("Select &all points", s.select_all, sk.SelectAll)
        self.act_delete = self._action(
            "&Delete points",
            s.delete_selection,
            sk.Delete,
            tip="Delete the selected points; the neighbouring segments are refitted",
        )
        self.act_delete.setShortcuts([QKeySequence(sk.Delete), QKeySequence("Backspace")])
        self.act_toggle_join = self._action(
            "Toggle join &intent (smooth ⇄ corner)",
            s.toggle_join_intent,
            "J",
            "join-intent",
        )
        self.act_reverse = self._action(
            "&Reverse contour direction", s.reverse_contours, "Ctrl+Shift+R", "reverse"
        )
        self.act_close_contour = self._action(
            "&Close contour", s.close_contours, "Ctrl+Shift+C", "close-contour"
        )
        self.act_delete_contour = self._action(
            "Delete &contour", s.delete_contours, "Ctrl+Shift+Backspace", "delete-contour"
        )
        self.act_degree = {
            deg: self._action(
                f"Make segment a {name}",
                lambda _=False, d=deg: s.set_degree(d),
                f"Ctrl+{deg}",
                "degree" if deg == 3 else None,
            )
            for deg, name in ((1, "line"), (2, "quadratic"), (3, "cubic"))
        }
        self.act_zoom_in = self._action(
            "Zoom &in", lambda: self.canvas.zoom(1.5), sk.ZoomIn, "zoom-in"
        )
        self.act_zoom_out = self._action(
            "Zoom &out", lambda: self.canvas.zoom(1 / 1.5), sk.ZoomOut, "zoom-out"
        )
        self.act_fit = self._action("&Fit to outline", self.canvas.fit_to_outline, "F", "fit")
        self.act_marks = self._action(
            "Finding &marks",
            lambda on: self._on_findings_updated(),
            "Ctrl+Shift+M",
            tip="Frame each finding on the canvas (diamond: error, square: warning, dotted: info)",
        )
        self.act_marks.setCheckable(True)
        self.act_marks.setChecked(True)
        self.act_comb = self._action(
            "Curvature &comb",
            self.set_comb_visible,
            "Ctrl+Shift+K",
            tip="Teeth of length proportional to curvature on the side each curve bends; a step "
            "where two segments meet is a curvature jump",
        )
        self.act_comb.setCheckable(True)
        self.act_comb_longer = self._action(
            "Comb teeth longer",
            lambda: self.comb_slider.setValue(self.comb_slider.value() + 1),
            "]",
        )
        self.act_comb_shorter = self._action(
            "Comb teeth shorter",
            lambda: self.comb_slider.setValue(self.comb_slider.value() - 1),
            "[",
        )
        self.act_next_finding = self._action(
            "&Next finding",
            lambda: self.step_finding(1),
            "N",
            tip="Show the next finding of the list on the canvas",
        )
        self.act_prev_finding = self._action(
            "&Previous finding", lambda: self.step_finding(-1), "Shift+N"
        )
        self.act_tolerances = self._action(
            "Check &tolerances…", self.edit_tolerances, tip="Gap, kink, corner and curvature limits"
        )
        self.act_fix = self._action(
            "&Fix the shown finding…",
            lambda: self.preview_fix(None),
            "Ctrl+Shift+F",
            tip="Preview the fix of the finding shown (picked in the list): the measured change "
            "comes first, Apply does it as one undo step",
        )
        self.act_fix_all = self._action(
            "Fix &all findings of this kind",
            lambda: self.fix_all_of_kind(None),
            "Ctrl+Shift+A",
            tip="Fix every finding of the shown finding's kind in the selected contours (or "
            "the whole drawing when nothing is selected), as one undo step",
        )
        self.act_max_change = self._action(
            "Allowed &change of a fix…",
            self.edit_tolerances,
            tip="The largest shape change a fix may make (in the tolerances dialog)",
        )
        self.act_break_joins = self._action(
            "&Break smooth joins while dragging",
            self._set_break_joins,
            "B",
            tip="While on, dragging a handle moves it alone and makes its join a corner (the "
            "same as holding Alt, for desktops that use Alt+drag to move windows)",
        )
        self.act_break_joins.setCheckable(True)
        self.tool_group = QActionGroup(self)
        self.tool_group.setExclusive(True)
        self.act_tools: dict[str, QAction] = {}
        for name, (text, key, icon_name, tip) in TOOLS.items():
            act = self._action(
                text, lambda _=False, n=name: self.session.set_tool(n), key, icon_name, tip
            )
            act.setCheckable(True)
            self.tool_group.addAction(act)
            self.act_tools[name] = act
        self.act_tools[self.session.tool_name].setChecked(True)

    def _build_menus_and_toolbar(self) -> None:
        mb = self.menuBar()
        m_file = mb.addMenu("&File")
        m_file.addAction(self.act_open)
        self.menu_samples = m_file.addMenu("Open sa&mple")
        self.menu_recent = m_file.addMenu("Open &recent")
        self.menu_recent.aboutToShow.connect(self._fill_recent_menu)
        self._fill_samples_menu()
        m_file.addSeparator()
        m_file.addAction(self.act_save)
        m_file.addAction(self.act_save_as)
        m_file.addSeparator()
        m_file.addAction(self.act_quit)
        m_edit = mb.addMenu("&Edit")
        for a in (self.act_undo, self.act_redo, None, self.act_select_all, self.act_delete):
            m_edit.addSeparator() if a is None else m_edit.addAction(a)
        m_points = mb.addMenu("&Points")
        m_points.addAction(self.act_toggle_join)
        m_points.addAction(self.act_break_joins)
        m_deg = m_points.addMenu("Segment &degree")
        for a in self.act_degree.values():
            m_deg.addAction(a)
        m_contour = mb.addMenu("&Contour")
        for a in (self.act_reverse, self.act_close_contour, self.act_delete_contour):
            m_contour.addAction(a)
        m_view = mb.addMenu("&View")
        for a in (self.act_zoom_in, self.act_zoom_out, self.act_fit):
            m_view.addAction(a)
        m_view.addSeparator()
        m_view.addAction(self.act_marks)
        m_view.addAction(self.act_comb)
        m_view.addAction(self._comb_scale_action())
        m_view.addAction(self.act_comb_longer)
        m_view.addAction(self.act_comb_shorter)
        m_view.addSeparator()
        m_view.addAction(self.act_next_finding)
        m_view.addAction(self.act_prev_finding)
        m_view.addAction(self.act_tolerances)
        m_units = m_view.addMenu("Length &units")
        self.unit_group = QActionGroup(self)
        self.act_units: dict[str, QAction] = {}
        for name, text in (("", "As written in the file"), ("mm", "mm"), ("cm", "cm"),
                           ("in", "in"), ("pt", "pt"), ("pc", "pc"), ("px", "px")):  # fmt: skip
            act = m_units.addAction(text)
            act.setCheckable(True)
            act.setChecked(name == self.session.unit_name)
            act.triggered.connect(lambda _=False, n=name: self.set_units(n))
            self.unit_group.addAction(act)
            self.act_units[name] = act
        m_view.addAction(self.findings_dock.toggleViewAction())
        m_view.addAction(self.cutting_dock.toggleViewAction())
        m_fix = mb.addMenu("Fi&x")
        m_fix.addAction(self.act_fix)
        m_fix.addAction(self.act_fix_all)
        m_fix.addSeparator()
        m_fix.addAction(self.act_max_change)
        m_cut = mb.addMenu("C&ut")
        self.act_flatten_preview = m_cut.addAction("&Flattening preview")
        self.act_flatten_preview.setCheckable(True)
        self.act_flatten_preview.setChecked(self.cutting.flatten_on.isChecked())
        self.act_flatten_preview.toggled.connect(self.cutting.flatten_on.setChecked)
        self.cutting.flatten_on.toggled.connect(self.act_flatten_preview.setChecked)
        self.act_offset_preview = m_cut.addAction("&Offset preview")
        self.act_offset_preview.setCheckable(True)
        self.act_offset_preview.setChecked(self.cutting.offset_on.isChecked())
        self.act_offset_preview.toggled.connect(self.cutting.offset_on.setChecked)
        self.cutting.offset_on.toggled.connect(self.act_offset_preview.setChecked)
        m_cut.addSeparator()
        m_cut.addAction("Export &flattened cut file…", lambda: self.export_cut_file("flatten"))
        m_cut.addAction("Export &offset cut file…", lambda: self.export_cut_file("offset"))
        m_help = mb.addMenu("&Help")
        self.act_help_keys = m_help.addAction("&Keys and mouse", self.show_keys_help)
        self.act_help_keys.setShortcut(QKeySequence(QKeySequence.StandardKey.HelpContents))
        self.act_about = m_help.addAction("&About OutlineBench", self.show_about)
        m_tools = mb.addMenu("&Tools")
        for a in self.act_tools.values():
            m_tools.addAction(a)

        tb = self.addToolBar("Main")
        tb.setObjectName("mainToolbar")
        tb.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextUnderIcon)
        tb.setMovable(False)
        for a in (self.act_open, self.act_save, None, self.act_undo, self.act_redo, None):
            tb.addSeparator() if a is None else tb.addAction(a)
        for a in self.act_tools.values():
            tb.addAction(a)
        tb.addSeparator()
        join = tb.addAction(self.act_toggle_join)  # noqa: F841
        for a in (
            self.act_degree[3],
            self.act_reverse,
            self.act_close_contour,
            self.act_delete_contour,
            None,
            self.act_zoom_in,
            self.act_zoom_out,
            self.act_fit,
        ):
            tb.addSeparator() if a is None else tb.addAction(a)
        # Short labels under toolbar icons; menus keep the full names.
        short = {
            self.act_toggle_join: "Smooth/corner",
            self.act_degree[3]: "To cubic",
            self.act_reverse: "Reverse",
            self.act_close_contour: "Close",
            self.act_delete_contour: "Delete contour",
            self.act_open: "Open",
            self.act_save: "Save",
            self.act_undo: "Undo",
            self.act_redo: "Redo",
            self.act_zoom_in: "Zoom in",
            self.act_zoom_out: "Zoom out",
            self.act_fit: "Fit",
        }
        for a, text in short.items():
            a.setIconText(text)

    def _build_status_bar(self) -> None:
        sb = self.statusBar()
        self.pos_label = QLabel("")
        self.zoom_label = QLabel("")
        self.tool_hint_label = QLabel("")
        sb.addWidget(self.tool_hint_label, 1)
        self.hint_label = QLabel("Ctrl+wheel: zoom")
        self.hint_label.setToolTip(NAVIGATION_HINT)
        self.hint_label.setStyleSheet("color: #5b6670;")
        sb.addPermanentWidget(self.hint_label)
        # Wide enough for long coordinates, so a new position (on every mouse move) repaints
        # only this label instead of laying out and repainting the whole status bar.
        self.pos_label.setMinimumWidth(
            self.pos_label.fontMetrics().horizontalAdvance("x -0000.00  y -0000.00 mm")
        )
        sb.addPermanentWidget(self.pos_label)
        sb.addPermanentWidget(self.zoom_label)

    def _comb_scale_action(self) -> QWidgetAction:
        """A "Comb scale" slider inside the View menu."""
        box = QWidget()
        lay = QHBoxLayout(box)
        lay.setContentsMargins(28, 2, 8, 2)
        lay.addWidget(QLabel("Comb scale"))
        self.comb_slider = QSlider(Qt.Orientation.Horizontal)
        self.comb_slider.setRange(-COMB_STEPS, COMB_STEPS)
        self.comb_slider.setValue(0)
        self.comb_slider.setMinimumWidth(120)
        self.comb_slider.setToolTip("Length of the comb teeth, relative to the automatic scale")
        self.comb_slider.valueChanged.connect(lambda _v: self._apply_comb())
        lay.addWidget(self.comb_slider)
        self.comb_label = QLabel("×1")
        self.comb_label.setMinimumWidth(44)
        lay.addWidget(self.comb_label)
        act = QWidgetAction(self)
        act.setDefaultWidget(box)
        return act

    # -- overlays -----------------------------------------------------------------------
    def set_comb_visible(self, on: bool) -> None:
        if self.act_comb.isChecked() != on:
            self.act_comb.setChecked(on)
        self._apply_comb()

    def comb_scale(self) -> float:
        """Tooth length per unit of curvature now in use (document units²)."""
        if self._comb_base is None:
            self._comb_base = auto_comb_scale(self.session.document)
        return self._comb_base * 2.0 ** (self.comb_slider.value() / 2.0)

    def _apply_comb(self) -> None:
        on = self.act_comb.isChecked()
        if hasattr(self, "prefs"):
            self.prefs.set_comb_step(self.comb_slider.value())
            self.prefs.set_flag("view/comb", on)
        factor = 2.0 ** (self.comb_slider.value() / 2.0)
        self.comb_label.setText(f"×{factor:.3g}")
        self.canvas.set_comb(on, self.comb_scale() if on else None)
        if on:
            u = self.session.units
            r = 10.0 / u.factor  # a radius of 10 display units, in user units
            tooth = u.text(self.comb_scale() / r)
            self._show_message(
                f"Curvature comb ×{factor:.3g}: a radius of 10 {u.name} gets teeth {tooth} long"
                + (" · too many segments in view: zoom in" if self.canvas.comb_hidden else "")
            )

    def _on_findings_updated(self) -> None:
        cur = self.current_finding
        if cur is not None and cur not in self.live.findings:
            # After an edit the picked finding is the one of the same kind and place nearest
            # to where it was (its value and position may have changed), or gone.
            same = [
                f
                for f in self.live.findings
                if (f.kind, f.contour, f.segment, f.join) == (cur.kind, cur.contour,
                                                             cur.segment, cur.join)
            ]  # fmt: skip
            cur = min(same, key=lambda f: math.hypot(f.x - cur.x, f.y - cur.y), default=None)
            self.current_finding = cur
        marks = self.findings_panel.shown_findings() if self.act_marks.isChecked() else []
        self.canvas.set_finding_marks(marks, cur if self.act_marks.isChecked() else None)

    def _on_maybe_new_document(self) -> None:
        # A document with no undo and no redo behind it was just loaded (a file opened, a
        # new drawing): it gets its own automatic comb scale, and no finding is picked.
        s = self.session
        fresh = not s.history.in_group and not s.can_undo and not s.can_redo
        if s.document is not self._seen_doc and fresh:
            self._comb_base = None
            self.current_finding = None
            if self.act_comb.isChecked():
                self._apply_comb()
        self._seen_doc = s.document

    def show_finding(self, f: Finding) -> None:
        """Select the point nearest to a finding, centre it, and zoom in if it is tiny."""
        doc = self.session.document
        self.current_finding = f
        place = place_of(doc, f)
        if place is not None:
            oi, ci = place
            contour = doc.outlines[oi].contours[ci]
            if f.segment is not None and 0 <= f.segment < len(contour.segments):
                candidates = [f.segment]
                if f.join is not None:  # the join's point starts the next segment
                    candidates = [(f.segment + 1) % len(contour.segments)]
            else:
                candidates = list(range(len(contour.segments)))
            best, best_d = None, math.inf
            for s in candidates:
                seg = contour.segments[s]
                for i in (0, seg.shape[0] - 1):
                    d = float(np.hypot(seg[i, 0] - f.x, seg[i, 1] - f.y))
                    if d < best_d:
                        best, best_d = PointRef(oi, ci, s, i), d
            if best is not None:
                self.session.set_selection([best], best)
        size = f.value if f.unit == "user" and f.value else None
        self.canvas.show_place(f.x, f.y, size)
        self._on_findings_updated()
        u = self.session.units
        self._show_message(
            f"{f.kind} ({f.severity}) at x {u.show(f.x):.{u.decimals}f}, "
            f"y {u.show(f.y):.{u.decimals}f} {u.name}: {f.message}"
        )

    def step_finding(self, step: int) -> Finding | None:
        """Show the finding ``step`` rows after (or before) the current one in the list's
        order, wrapping around; None when the list is empty."""
        model = self.findings_panel.model
        n = model.rowCount()
        if n == 0:
            self._show_message("No findings to show")
            return None
        rows = [model.finding(r) for r in range(n)]
        cur = self.current_finding
        at = rows.index(cur) if cur in rows else (-1 if step > 0 else 0)
        row = (at + step) % n
        self.findings_panel.view.setCurrentIndex(model.index(row, 0))
        self.show_finding(rows[row])
        return rows[row]

    def edit_tolerances(self) -> bool:
        """Ask for new check tolerances; True when they were changed."""
        dlg = TolerancesDialog(
            self.live.settings, self.session.units, self, self.prefs.max_change_mm()
        )
        if self.run_dialog(dlg) != QDialog.DialogCode.Accepted:
            return False
        self.prefs.set_max_change_mm(dlg.result_max_change_mm())
        self.live.set_settings(dlg.result_settings())
        self._renew_fix_preview()
        self.prefs.set_check_settings(self.live.settings)
        self.session.close_gap = self._gap_user()
        s = self.live.settings
        self._show_message(
            f"Checked again: gap {s.gap_mm:g} mm, kink {s.kink_angle:g}°, corner "
            f"{s.corner_angle:g}°, curvature jump {s.curvature_jump * 100:g} %"
        )
        return True

    def run_dialog(self, dialog: QDialog) -> int:
        """Run a modal dialog (tests replace this to fill it in)."""
        return dialog.exec()

    def _fill_samples_menu(self) -> None:
        self.menu_samples.clear()
        samples = sample_files()
        for path in samples:
            act = self.menu_samples.addAction(path.name)
            act.triggered.connect(lambda _=False, p=str(path): self.open_path(p))
        if not samples:
            act = self.menu_samples.addAction("(no samples installed)")
            act.setEnabled(False)

    def _fill_recent_menu(self) -> None:
        self.menu_recent.clear()
        paths = self.recent.paths()
        for p in paths:
            act = self.menu_recent.addAction(p)
            act.triggered.connect(lambda _=False, q=p: self.open_path(q))
        if not paths:
            act = self.menu_recent.addAction("(none yet)")
            act.setEnabled(False)

    # -- model → widgets ----------------------------------------------------------------
    def _on_document_changed(self) -> None:
        s = self.session
        self.setWindowModified(s.is_dirty)
        self.act_undo.setEnabled(s.can_undo)
        self.act_redo.setEnabled(s.can_redo)
        self.act_undo.setText(f"&Undo {s.undo_label}" if s.can_undo else "&Undo")
        self.act_redo.setText(f"&Redo {s.redo_label}" if s.can_redo else "&Redo")
        # A blank new drawing has nothing to save (it would write an empty page).
        has_something = self.path is not None or bool(s.document.outlines) or s.is_dirty
        self.act_save.setEnabled(has_something)
        self.act_save_as.setEnabled(has_something)
        if hasattr(self, "act_toggle_join") and not s.history.in_group:
            # e.g. a closed contour cannot be closed again (not during a drag: a drag does
            # not change what the menu edits can do, and each mouse move must stay quick)
            self._on_selection_changed()
        self._place_start_panel()

    def _on_selection_changed(self) -> None:
        # Each edit is enabled only when the selection gives it something to do.
        can = self.session.available_edits()
        self.act_delete.setEnabled(can["delete"])
        self.act_toggle_join.setEnabled(can["join"])
        self.act_reverse.setEnabled(can["reverse"])
        self.act_close_contour.setEnabled(can["close"])
        self.act_delete_contour.setEnabled(can["delete_contour"])
        for deg, act in self.act_degree.items():
            act.setEnabled(can[f"degree{deg}"])

    def _set_break_joins(self, on: bool) -> None:
        self.session.break_joins = bool(on)
        self.tool_hint_label.setText(self.session.tool_hint())
        self._show_message(
            "Dragging a handle now breaks its smooth join"
            if on
            else "Dragging a handle keeps smooth joins smooth (hold Alt to break one)"
        )

    def _on_tool_changed(self, name: str) -> None:
        act = self.act_tools.get(name)
        if act is not None and not act.isChecked():
            act.setChecked(True)
        self.tool_hint_label.setText(self.session.tool_hint())
        self.tool_hint_label.setToolTip(TOOLS[name][3] + "\n" + NAVIGATION_HINT)
        self._place_start_panel()

    def _on_pointer_moved(self, x: float, y: float) -> None:
        u = self.session.units
        self.pos_label.setText(
            f"x {u.show(x):.{u.decimals}f}  y {u.show(y):.{u.decimals}f} {u.name}"
        )

    def _on_view_changed(self) -> None:
        # Zoom as a percentage of true size (100 % = 96 screen px per inch); the tooltip
        # gives screen pixels per millimetre.
        doc = self.session.document
        px_per_mm = self.canvas.view.scale / doc.mm_per_unit
        text = f"Zoom {100.0 * px_per_mm / PX_PER_MM_AT_100:.0f} %"
        self.zoom_label.setToolTip(
            f"{px_per_mm:.3g} screen px per mm; 100 % is true size at 96 px per inch"
        )
        c = self.canvas
        shown = count_points_in_view(c.view, c.document, c.cache, c.width(), c.height())
        if shown > style.MAX_MARKED_POINTS:
            # Marks are left out at this density (see style.MAX_MARKED_POINTS).
            text += f" · {shown} points in view, marks hidden: zoom in to see them"
        if c.comb_on and c.comb_hidden:
            text += " · too many segments in view for the curvature comb: zoom in"
        self.zoom_label.setText(text)
        self._place_start_panel()

    def _show_message(self, text: str) -> None:
        self.statusBar().showMessage(text, 12000)

    def _place_start_panel(self) -> None:
        panel = getattr(self, "start_panel", None)
        if panel is None:
            return
        empty = (
            self.path is None
            and not self.session.document.outlines
            and self.session.tool_name != "draw"
        )
        panel.setVisible(empty)
        if empty:
            panel.move(
                max(8, (self.canvas.width() - panel.width()) // 2),
                max(8, (self.canvas.height() - panel.height()) // 3),
            )

    def resizeEvent(self, event) -> None:  # noqa: N802 (Qt name)
        super().resizeEvent(event)
        self._fit_findings_dock()
        if not self.panel.key_toggled_by_user:
            self.panel.set_key_open(self.height() >= KEY_OPEN_MIN_HEIGHT)
        self._place_start_panel()

    def _update_title(self) -> None:
        name = Path(self.path).name if self.path else "Untitled"
        # Lasting reminder that the file holds more than what was opened (Save asks for a
        # new name in that case, see save()).
        part = " (part before read error)" if self._partial else ""
        self.setWindowTitle(f"{name}{part}[*] — OutlineBench")

    # -- questions the window asks (tests replace these) ---------------------------------
    def ask_save_changes(self) -> str:
        """Ask about unsaved changes: "save", "discard" or "cancel"."""
        name = Path(self.path).name if self.path else "Untitled"
        return dialogs.ask_save_changes(self, name)

    def ask_open_partial(self, path: str, error: str, outline_count: int) -> bool:
        return dialogs.ask_open_partial(self, path, error, outline_count)

    def show_error(self, title: str, text: str) -> None:
        dialogs.show_error(self, title, text)

    def choose_open_path(self) -> str | None:
        start = str(Path(self.path).parent) if self.path else ""
        return dialogs.choose_open_path(self, start)

    def choose_save_path(self) -> str | None:
        return dialogs.choose_save_path(self, self.path or "")

    # -- files --------------------------------------------------------------------------
    def maybe_save(self) -> bool:
        """True when it is fine to drop the current document (saved, discarded or clean)."""
        if not self.session.is_dirty:
            return True
        answer = self.ask_save_changes()
        if answer == "save":
            return self.save()
        if answer == "discard":
            self._autosave.stop()
            self._drop_recovery()
            return True
        return False

    def open_dialog(self) -> bool:
        if not self.maybe_save():
            return False
        path = self.choose_open_path()
        return self.open_path(path, ask=False) if path else False

    def open_path(self, path: str, *, ask: bool = True) -> bool:
        """Open ``path``; on any read problem show why and keep the current document."""
        if ask and not self.maybe_save():
            return False
        try:
            from outlinebench.io import read_svg
        except ImportError as exc:
            self.show_error("Cannot open file", f"The SVG reader is not available ({exc}).")
            return False
        try:
            result = read_svg(path)
        except OutlinebenchError as exc:
            self.show_error("Cannot open file", str(exc))
            return False
        except OSError as exc:
            self.show_error("Cannot open file", f"{path}: {exc.strerror or exc}")
            return False
        partial = result.error is not None
        if partial and not self.ask_open_partial(
            path, str(result.error), len(result.document.outlines)
        ):
            return False
        self.session.load(result.document)  # resets the comb scale, see _on_maybe_new_document
        self._opened_doc = result.document
        self.path = str(path)
        self._partial = partial
        self.recent.add(self.path)
        self._update_title()
        self._on_tool_changed(self.session.tool_name)  # units in the hint may have changed
        self.canvas.fit_to_outline()
        self._on_document_changed()
        self._on_view_changed()
        notes = list(result.notes)
        doc = result.document
        parts = [
            f"Opened {Path(path).name}: {len(doc.outlines)} outlines, "
            f"{doc.segment_count()} segments, lengths in {self.session.units.name}"
        ]
        if notes:
            parts.append(f"{len(notes)} note(s) from reading: " + str(notes[0]))
        if partial:
            parts.append("only the part before the read error was opened")
        self._show_message("; ".join(parts))
        return True

    def save(self) -> bool:
        if self.path is None or self._partial:
            return self.save_as()
        return self._write(self.path)

    def save_as(self) -> bool:
        path = self.choose_save_path()
        if not path:
            return False
        if self._write(path):
            self.path = path
            self._partial = False
            self.recent.add(path)
            self._update_title()
            return True
        return False

    def _write(self, path: str) -> bool:
        try:
            from outlinebench.io import write_svg
        except ImportError as exc:
            self.show_error("Cannot save", f"The SVG writer is not available ({exc}).")
            return False
        try:
            write_svg(self.document_to_save(), path)
        except OutlinebenchError as exc:
            self.show_error("Cannot save", str(exc))
            return False
        except OSError as exc:
            self.show_error("Cannot save", f"{path}: {exc.strerror or exc}")
            return False
        self.session.mark_saved()
        self._drop_recovery()
        self._on_document_changed()
        self._show_message(
            f"Saved {path} (edited coordinates rounded to "
            f"{10.0 ** -edit_decimals(self.session.document):g} user units)"
        )
        return True

    def document_to_save(self) -> Document:
        """The document with the coordinates edits made rounded to the edit grid
        (:func:`outlinebench.app.edit_rounding.round_edits`; untouched segments keep every
        digit they were read with)."""
        return round_edits(self.session.document, self._opened_doc)

    def closeEvent(self, event: QCloseEvent) -> None:  # noqa: N802 (Qt name)
        if self.maybe_save():
            self._save_layout()
            self._drop_recovery()
            event.accept()
        else:
            event.ignore()

    def _save_layout(self) -> None:
        self.prefs.set_layout(self.saveGeometry(), self.saveState())

    # -- recovery -----------------------------------------------------------------------
    def _on_change_for_recovery(self) -> None:
        if self.recovery is None:
            return
        if not self.session.is_dirty:
            self._autosave.stop()
            self._drop_recovery()
        elif self.session.history.in_group:
            # During a drag the timer is not restarted by each move, so a long drag is
            # written every AUTOSAVE_MS while it goes on.
            if not self._autosave.isActive():
                self._autosave.start()
        else:
            self._autosave.start()  # (re)start: a few seconds after the last change

    def write_recovery(self) -> bool:
        """Write the unsaved work to the recovery file now; True when written."""
        if self.recovery is None or not self.session.is_dirty:
            return False
        try:
            self.recovery.write(self.document_to_save(), self.path)
        except (OutlinebenchError, OSError) as exc:
            self._show_message(f"Could not write the recovery file: {exc}")
            return False
        return True

    def _drop_recovery(self) -> None:
        if self.recovery is not None:
            self.recovery.remove()

    def ask_restore(self, rec: Recovery) -> str:
        """Ask about a recovery file: "restore", "discard" or "later" (tests replace this)."""
        import time as _time

        what = Path(rec.original).name if rec.original else "an untitled drawing"
        when = _time.strftime("%Y-%m-%d %H:%M:%S", _time.localtime(rec.saved_at))
        return dialogs.ask_restore(self, what, f"last written {when}")

    def offer_recovery(self) -> bool:
        """Offer to restore unsaved work left by an editor that ended unexpectedly; True
        when a document was restored."""
        if self.recovery is None:
            return False
        for rec in stale_recoveries(self.recovery.folder):
            answer = self.ask_restore(rec)
            if answer == "discard":
                rec.remove()
                continue
            if answer != "restore":
                continue
            if self.restore(rec):
                return True
        return False

    def restore(self, rec: Recovery) -> bool:
        """Open a recovery file as unsaved work belonging to its original file."""
        from outlinebench.io import read_svg

        try:
            result = read_svg(str(rec.svg))
        except (OutlinebenchError, OSError) as exc:
            self.show_error("Cannot restore", f"{rec.svg}: {exc}")
            return False
        if result.error is not None:
            self.show_error("Cannot restore", str(result.error))
            return False
        self.session.load(result.document, dirty=True)
        self._opened_doc = result.document
        self.path = rec.original
        self._partial = False
        self._update_title()
        self.canvas.fit_to_outline()
        self._on_document_changed()
        rec.remove()
        self.write_recovery()  # this window's own recovery file holds it from now on
        self._show_message(
            f"Restored unsaved work{' on ' + Path(rec.original).name if rec.original else ''}; "
            "save it to keep it"
        )
        return True

    # -- repairs at hand ----------------------------------------------------------------
    def max_change_user(self) -> float:
        """The allowed change of a fix in the document's user units."""
        doc = self.session.document
        mm = self.prefs.max_change_mm()
        return mm / doc.mm_per_unit if doc.mm_per_unit > 0 else mm

    def preview_fix(self, f: Finding | None = None) -> FixPreview | None:
        """Compute the fix of ``f`` (default: the finding shown) and show it: the measured
        change and note in the findings panel's fix bar, the old outline ghosted and the new
        one on the canvas; a refusal shows its reason. Nothing changes until Apply."""
        f = f if f is not None else self.current_finding
        if f is None or f not in self.live.findings:
            self._show_message("Fix: pick a finding in the list first")
            return None
        if f is not self.current_finding:
            self.show_finding(f)
        u = self.session.units
        limit = self.max_change_user()
        fp = preview_fix(
            self.session.document, f, max_change=limit, units=u, settings=self.live.settings
        )
        self.fix_preview = fp
        line = fp.summary(u, limit)
        if fp.ok:
            assert fp.change is not None
            html = (
                f"<b>Fix {f.kind}</b> ({fp.repair_kind}) at {f.x * u.factor:.1f}, "
                f"{f.y * u.factor:.1f}<br>the outline moves by at most "
                f"<b>{change_text(u, fp.change)}</b> (proven; allowed "
                f"{change_text(u, limit)})<br><span style='color:#5b6670'>{fp.note}</span>"
            )
            self._zoom_to_see_change(fp)
            self.canvas.set_fix_preview(fp, f"fix: ≤ {change_text(u, fp.change)}")
        else:
            html = f"<b>Fix {f.kind}</b>: <span style='color:#c3122f'>refused</span> — {fp.refusal}"
            self.canvas.set_fix_preview(None)
        self.findings_panel.show_fix(html, fp.ok)
        self._show_message(line)
        return fp

    def _zoom_to_see_change(self, fp: FixPreview) -> None:
        """Zoom in on the finding until the change spans FIX_CHANGE_PX on screen, but not
        beyond the zoom where the changed contours span four canvas widths (a change far
        below a pixel is then reported in numbers, not seen); never zooms out."""
        if not fp.change or not fp.new_contours:
            return
        pts = np.vstack([s for c in fp.old_contours + fp.new_contours for s in c.segments])
        extent = float(np.max(pts.max(axis=0) - pts.min(axis=0)))
        scale = FIX_CHANGE_PX / fp.change
        if extent > 0:
            scale = min(scale, 4.0 * self.canvas.width() / extent)
        if scale > self.canvas.view.scale:
            self.canvas.show_place(fp.finding.x, fp.finding.y, PLACE_SIZE_PX / scale)

    def apply_fix(self) -> bool:
        """Apply the fix being previewed as one undo step; True when applied."""
        fp = self.fix_preview
        if fp is None or not fp.ok or fp.command is None:
            return False
        if fp.before is not self.session.document:
            self.cancel_fix()
            self._show_message("Fix: the drawing changed since the preview; preview it again")
            return False
        u = self.session.units
        assert fp.change is not None
        fp.command.label = f"Fix {fp.finding.kind} ({fp.repair_kind})"  # the Undo menu's words
        done = self.session.do(fp.command)
        self.cancel_fix()
        if done:
            self._show_message(
                f"Fixed {fp.finding.kind} ({fp.repair_kind}): moved by at most "
                f"{change_text(u, fp.change)} — {fp.note}"
            )
        return done

    def cancel_fix(self) -> None:
        """Leave the fix preview; the drawing is as it was."""
        self.fix_preview = None
        self.canvas.set_fix_preview(None)
        self.findings_panel.hide_fix()

    def _drop_stale_fix(self) -> None:
        fp = self.fix_preview
        if fp is not None and fp.before is not self.session.document:
            self.cancel_fix()

    def selected_contour_numbers(self) -> set[int]:
        """Global numbers (as the findings list gives them) of the contours with a selected
        point."""
        s = self.session
        return {s.global_contour(o, c) for o, c, *_ in s.selected_points()}

    def fix_all_of_kind(self, f: Finding | None = None):
        """Fix every finding of ``f``'s kind (default: the finding shown) in the selected
        contours, or the whole drawing when nothing is selected, as one undo step; the status
        bar says how many were fixed and refused, and the largest change."""
        f = f if f is not None else self.current_finding
        if f is None:
            self._show_message("Fix all: pick a finding in the list first (its kind is fixed)")
            return None
        self.cancel_fix()
        picked = self.selected_contour_numbers()
        scope = f"{len(picked)} selected contours" if picked else "the whole drawing"
        result = fix_all(
            self.session.document,
            f.kind,
            max_change=self.max_change_user(),
            settings=self.live.settings,
            contours=picked or None,
            units=self.session.units,
        )
        if result.command is not None:
            self.session.do(result.command)
        text = result.summary(self.session.units, f.kind, scope)
        self.findings_panel.show_fix(text, False)  # stays until closed (the status bar fades)
        self._show_message(text)
        return result

    # -- cutting previews ---------------------------------------------------------------
    def _gap_user(self) -> float:
        doc = self.session.document
        return self.live.settings.gap_mm / doc.mm_per_unit if doc.mm_per_unit > 0 else 0.0

    def _on_previews_changed(self) -> None:
        c = self.cutting
        self.prefs.set_flag("preview/flatten", c.flatten_on.isChecked())
        self.prefs.set_flag("preview/offset", c.offset_on.isChecked())
        self.prefs.set_number("preview/flatten_tolerance_mm", c.tolerance_mm())
        self.prefs.set_number("preview/offset_radius_mm", c.radius_mm())
        self.update_previews()

    def _schedule_previews(self) -> None:
        self.session.close_gap = self._gap_user()
        if self.cutting.flatten_on.isChecked() or self.cutting.offset_on.isChecked():
            if self.session.history.in_group:
                self.canvas.set_previews(None, None)  # stale during a drag
            else:
                self._preview_timer.start()

    def update_previews(self) -> None:
        """Compute and show the previews that are switched on (now)."""
        self._preview_timer.stop()
        doc = self.session.document
        u = self.session.units
        c = self.cutting
        per_mm = 1.0 / doc.mm_per_unit if doc.mm_per_unit > 0 else 1.0
        self.flatten_result = self.offset_result = None
        label = None
        if c.flatten_on.isChecked():
            try:
                fp = flatten_preview(doc, c.tolerance_mm() * per_mm)
            except OutlinebenchError as exc:
                c.flatten_info.setText(f"Cannot flatten: {exc}")
            else:
                self.flatten_result = fp
                if fp.where is None:
                    c.flatten_info.setText("Nothing to flatten (no segment)")
                else:
                    x, y = fp.where
                    c.flatten_info.setText(
                        f"<b>{fp.chords} chords</b> · proven largest deviation "
                        f"<b>{u.text(fp.bound)}</b> (tolerance {u.text(fp.tolerance)}), "
                        f"in contour {fp.bound_contour}, segment {fp.where_segment}, at x "
                        f"{u.show(x):.{u.decimals}f}, y {u.show(y):.{u.decimals}f}"
                    )
                    label = f"largest deviation {u.text(fp.bound)}"
        if c.offset_on.isChecked():
            tol = min(0.01, c.radius_mm() / 100.0) * per_mm  # 0.01 mm, finer for tiny tools
            try:
                op = offset_preview(doc, c.radius_mm() * per_mm, tol)
            except OutlinebenchError as exc:
                c.offset_info.setText(f"Cannot offset: {exc}")
            else:
                self.offset_result = op
                misfit = sum(p.kind == "tool-does-not-fit" for p in op.places)
                lost = len(op.vanished)
                n_off = len(op.polylines)
                c.offset_info.setText(
                    f"<b>{n_off} offset contour{'' if n_off == 1 else 's'}</b> · tool does "
                    f"not fit at {misfit} place{'' if misfit == 1 else 's'} · "
                    + (
                        f"<span style='color:#c3122f'><b>material vanishes at {lost}</b></span>"
                        if lost
                        else "no material vanishes"
                    )
                )
        self.canvas.set_previews(self.flatten_result, self.offset_result, label)

    def choose_cut_path(self) -> str | None:
        base = Path(self.path).with_suffix("") if self.path else Path("drawing")
        return dialogs.choose_cut_path(self, f"{base}-cut.svg")

    def export_cut_file(self, which: str) -> bool:
        """Write the flattening (``"flatten"``) or offset (``"offset"``) preview as a cut
        file, verified before it is written; never over the drawing itself."""
        import os

        doc = self.session.document
        if which == "flatten" and not self.cutting.flatten_on.isChecked():
            self.cutting.flatten_on.setChecked(True)
        if which == "offset" and not self.cutting.offset_on.isChecked():
            self.cutting.offset_on.setChecked(True)
        self.update_previews()
        result = self.flatten_result if which == "flatten" else self.offset_result
        if result is None or not result.polylines:
            self.show_error("Nothing to export", "The preview has no polylines to cut.")
            return False
        target = self.choose_cut_path()
        if not target:
            return False
        if self.path and os.path.exists(target) and os.path.samefile(target, self.path):
            self.show_error(
                "Cut file not written",
                f"{target} is the drawing itself; a cut file never replaces the drawing.",
            )
            return False
        name = Path(self.path).name if self.path else "an unsaved drawing"
        u = self.session.units
        if which == "flatten":
            fp = result
            tol = fp.tolerance
            polys, closed = fp.polylines, fp.closed
            what = (
                f"Flattened from {name} by outlinebench (editor) with tolerance "
                f"{u.text(tol)}; proven largest deviation {u.text(fp.bound)} before rounding"
            )
        else:
            op = result
            tol = op.tolerance
            polys, closed = op.polylines, op.closed
            what = (
                f"Offset of {name} by {u.text(op.distance)} (tool radius) with tolerance "
                f"{u.text(tol)}, by outlinebench (editor); {len(op.places)} places where the "
                f"tool does not fit, material vanishes at {len(op.vanished)}"
            )
        try:
            data, resolution = cut_file_bytes(doc, polys, closed, what, tol)
            what += f"; coordinates rounded to {resolution:.0e} mm"
            data, resolution = cut_file_bytes(doc, polys, closed, what, tol)
            verify_cut_file(data, doc, polys, resolution)
            write_file_atomic(target, data)
        except (OutlinebenchError, OSError) as exc:
            self.show_error("Cut file not written", str(exc))
            return False
        self._show_message(f"Wrote {target}. {CUT_CAUTION}")
        return True

    # -- settings and help --------------------------------------------------------------
    def set_units(self, name: str) -> None:
        """Show lengths in ``name`` ("" = as the file was written) and remember it."""
        self.session.set_unit_name(name)
        self.prefs.set_units(self.session.unit_name)
        act = self.act_units.get(self.session.unit_name)
        if act is not None and not act.isChecked():
            act.setChecked(True)
        self.cutting.show_units()
        self.findings_panel.refresh()
        self._on_tool_changed(self.session.tool_name)
        self.update_previews()
        self._renew_fix_preview()

    def _renew_fix_preview(self) -> None:
        """Measure the fix being previewed again (the unit or the allowed change changed)."""
        fp = self.fix_preview
        if fp is not None and fp.before is self.session.document:
            self.preview_fix(fp.finding)

    def help_about_text(self) -> str:
        rec = str(self.recovery.folder) if self.recovery is not None else "(recovery is off)"
        return (
            f"<h3>OutlineBench {__version__}</h3>"
            "<p>Editor and checker for Bézier outlines headed for cutters and typefaces.</p>"
            f"<p><b>Settings:</b> {self.settings.fileName()}<br>"
            f"<b>Recovery files:</b> {rec}<br>"
            f"Unsaved work is written there {AUTOSAVE_MS / 1000:g} s after each change.</p>"
            f"<p>Edited coordinates are saved rounded to 10<sup>-k</sup> user units, the "
            f"largest power of ten ≤ {EDIT_RESOLUTION_MM * 1000:g} µm.</p>"
        )

    def show_keys_help(self) -> None:
        self.show_info("Keys and mouse", KEYS_AND_MOUSE)

    def show_about(self) -> None:
        self.show_info("About OutlineBench", self.help_about_text())

    def show_info(self, title: str, html: str) -> None:
        """Show an information text (tests replace this)."""
        dialogs.show_text(self, title, html)


def run_editor(args: list[str]) -> int:
    """Open the editor window; ``args`` is ``[]`` or ``[FILE.svg]``. Returns the exit code."""
    if len(args) > 1:
        print("outlinebench: error: the editor opens one file at a time", file=sys.stderr)
        return 2
    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("OutlineBench")
    app.setOrganizationName("OutlineBench")
    window = MainWindow()
    window.show()

    def start() -> None:
        restored = window.offer_recovery()
        if args and not restored:
            window.open_path(args[0])

    QTimer.singleShot(0, start)
    return app.exec()
