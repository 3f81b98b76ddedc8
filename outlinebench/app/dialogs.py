"""Message and file dialogs the main window asks through (tests replace these methods)."""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QFileDialog, QMessageBox, QWidget

__all__ = [
    "ask_save_changes",
    "ask_open_partial",
    "show_error",
    "choose_open_path",
    "choose_save_path",
    "choose_cut_path",
    "ask_restore",
    "show_text",
    "SVG_FILTER",
]

SVG_FILTER = "SVG drawings (*.svg);;All files (*)"


def ask_save_changes(parent: QWidget, name: str) -> str:
    """Ask what to do with unsaved changes: returns "save", "discard" or "cancel"."""
    box = QMessageBox(parent)
    box.setIcon(QMessageBox.Icon.Question)
    box.setWindowTitle("Unsaved changes")
    box.setText(f"“{name}” has changes that are not saved.")
    box.setInformativeText("Save them before going on?")
    box.setStandardButtons(
        QMessageBox.StandardButton.Save
        | QMessageBox.StandardButton.Discard
        | QMessageBox.StandardButton.Cancel
    )
    box.setDefaultButton(QMessageBox.StandardButton.Save)
    answer = box.exec()
    if answer == QMessageBox.StandardButton.Save:
        return "save"
    if answer == QMessageBox.StandardButton.Discard:
        return "discard"
    return "cancel"


def ask_open_partial(parent: QWidget, path: str, error: str, outline_count: int) -> bool:
    """The file has bad path data: offer to open what was read before it."""
    box = QMessageBox(parent)
    box.setIcon(QMessageBox.Icon.Warning)
    box.setWindowTitle("Part of the file cannot be read")
    box.setText(f"Reading stopped at an error:\n{error}")
    box.setInformativeText(
        f"{outline_count} outline(s) before the error were read. Open them? "
        "Saving will then ask for a new file name so the original is kept."
    )
    box.setStandardButtons(QMessageBox.StandardButton.Open | QMessageBox.StandardButton.Cancel)
    box.setDefaultButton(QMessageBox.StandardButton.Cancel)
    return box.exec() == QMessageBox.StandardButton.Open


def show_error(parent: QWidget, title: str, text: str) -> None:
    """A clear message that something could not be done; the editor stays as it was."""
    QMessageBox.warning(parent, title, text)


def choose_open_path(parent: QWidget, start: str = "") -> str | None:
    """Ask for an SVG file to open; None when the user cancels."""
    path, _ = QFileDialog.getOpenFileName(parent, "Open drawing", start, SVG_FILTER)
    return path or None


def choose_save_path(parent: QWidget, start: str = "") -> str | None:
    """Ask where to save the drawing (``.svg`` added when missing); None when cancelled."""
    path, _ = QFileDialog.getSaveFileName(parent, "Save drawing as", start, SVG_FILTER)
    if path and not path.lower().endswith(".svg"):
        path += ".svg"
    return path or None


def choose_cut_path(parent: QWidget, start: str = "") -> str | None:
    """Where to write a cut file (a new SVG of polylines; never the drawing itself)."""
    path, _ = QFileDialog.getSaveFileName(parent, "Export cut file", start, SVG_FILTER)
    if path and not path.lower().endswith(".svg"):
        path += ".svg"
    return path or None


def ask_restore(parent: QWidget, what: str, when: str) -> str:
    """Unsaved work from a session that ended unexpectedly was found: returns "restore",
    "discard" or "later" (keep the recovery file, ask again next start)."""
    box = QMessageBox(parent)
    box.setIcon(QMessageBox.Icon.Question)
    box.setWindowTitle("Restore unsaved work?")
    box.setText(f"OutlineBench ended without saving changes to {what} ({when}).")
    box.setInformativeText("Restore them? Discarding removes the recovery file.")
    restore = box.addButton("Restore", QMessageBox.ButtonRole.AcceptRole)
    discard = box.addButton("Discard", QMessageBox.ButtonRole.DestructiveRole)
    box.addButton("Ask next time", QMessageBox.ButtonRole.RejectRole)
    box.setDefaultButton(restore)
    box.exec()
    clicked = box.clickedButton()
    if clicked is restore:
        return "restore"
    if clicked is discard:
        return "discard"
    return "later"


def show_text(parent: QWidget, title: str, html: str) -> None:
    """An information window with rich text (Help ▸ keys and mouse, Help ▸ about)."""
    box = QMessageBox(parent)
    box.setWindowTitle(title)
    box.setTextFormat(Qt.TextFormat.RichText)
    box.setText(html)
    box.exec()
