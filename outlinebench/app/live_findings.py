"""The findings of the open document, kept up to date after every edit and during drags.

:class:`LiveFindings` listens to the session's ``changed`` signal and hands each new document
to an incremental :class:`outlinebench.diagnostics.Checker`, which recomputes only the
contours and segments an edit replaced (the model keeps untouched ones as the same objects).
A small edit therefore costs a fraction of a millisecond. During a drag the check does not
run inside the mouse move: it is queued to run right after the frame that shows the moved
geometry (a zero-interval timer, so the findings follow within one event-loop turn, and at most
one check is ever pending however many moves arrive). A check that took longer than
:data:`LIVE_BUDGET_MS` is not repeated on every mouse move but at most once per
:data:`THROTTLE_MS`, so the drag stays smooth on large documents. Outside a drag (an edit, undo,
a file opened) the document is checked at once.
"""

from __future__ import annotations

import logging
import time
from typing import TYPE_CHECKING

from PySide6.QtCore import QObject, QTimer, Signal

from outlinebench.diagnostics import Checker, CheckSettings, Finding
from outlinebench.errors import OutlinebenchError
from outlinebench.model.document import Document

if TYPE_CHECKING:  # the session imports nothing from here; this is for type checkers
    from outlinebench.app.session import EditorSession

__all__ = ["LiveFindings", "LIVE_BUDGET_MS", "THROTTLE_MS", "place_of"]

# A fault inside a check is shown in one line in the findings panel and written here in
# full (with its traceback; Python's last-resort handler prints it on stderr when the
# application configures no logging), so a bug is never hidden.
log = logging.getLogger(__name__)

# A check that took at most this long is redone on every change (a drag's mouse moves
# included); one that took longer is redone at most every THROTTLE_MS. 8 ms is half a frame
# at 60 frames per second (benchmarks/bench_editor.py measures the drag update).
LIVE_BUDGET_MS = 8.0
THROTTLE_MS = 60


def place_of(doc: Document, finding: Finding) -> tuple[int, int] | None:
    """(outline index, contour index within it) of a finding's contour, or None when the
    document has no such contour (the finding is stale)."""
    k = finding.contour
    for oi, outline in enumerate(doc.outlines):
        n = len(outline.contours)
        if k < n:
            return oi, k
        k -= n
    return None


class LiveFindings(QObject):
    """Findings of ``session.document``, in user units, recomputed incrementally.

    Parameters
    ----------
    session : EditorSession
    settings : CheckSettings, optional
        Tolerances (default: the diagnostics defaults).

    Signals
    -------
    updated
        ``findings`` (or ``error``) changed.

    Attributes
    ----------
    findings : list of Finding
        As :func:`outlinebench.diagnostics.check_document` returns them (user units).
    document : Document or None
        The document they belong to.
    error : str or None
        Why the last check failed (the findings are then those of the last good check).
    last_ms : float
        Wall time of the last check, milliseconds.
    """

    updated = Signal()

    def __init__(
        self, session: EditorSession, settings: CheckSettings | None = None, parent=None
    ) -> None:
        super().__init__(parent)
        self._session = session
        self._checker = Checker(settings)
        self.findings: list[Finding] = []
        self.document: Document | None = None
        self.error: str | None = None
        self.last_ms = 0.0
        self.checks_run = 0
        self._gesture_ms: float | None = None  # last check time during the current drag
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(THROTTLE_MS)
        self._timer.timeout.connect(self.refresh)
        # During a drag: the check queued to run after the frame (one at most).
        self._soon = QTimer(self)
        self._soon.setSingleShot(True)
        self._soon.setInterval(0)
        self._soon.timeout.connect(self._refresh_in_gesture)
        session.changed.connect(self._on_document_changed)
        self.refresh()

    @property
    def settings(self) -> CheckSettings:
        return self._checker.settings

    def set_settings(self, settings: CheckSettings) -> None:
        """Check again from scratch with other tolerances."""
        self._checker = Checker(settings)
        self.refresh()

    def _on_document_changed(self) -> None:
        if not self.in_gesture:
            self._gesture_ms = None  # the next drag starts with a check of its own
        if self._session.document is self.document:
            return
        # Outside a gesture (an edit, undo, a file opened) the check runs at once; during a
        # drag it runs after the frame (next event-loop turn) while the drag's checks are
        # quick, else at most every THROTTLE_MS. (The first check of a drag always runs: the
        # check of a whole file that came before says nothing about the cost of one contour.)
        if not self.in_gesture:
            self.refresh()
        elif self._gesture_ms is None or self._gesture_ms <= LIVE_BUDGET_MS:
            if not self._timer.isActive():
                self._soon.start()  # restarting an active zero timer keeps it one check
        elif not self._timer.isActive():
            self._timer.start()

    @property
    def pending(self) -> bool:
        """A check of a newer document is queued (the findings are about to follow)."""
        return self._soon.isActive() or self._timer.isActive()

    def _refresh_in_gesture(self) -> None:
        if self._session.document is self.document:
            return
        self.refresh()
        if self.in_gesture:
            self._gesture_ms = self.last_ms

    @property
    def in_gesture(self) -> bool:
        """A drag (one undo step being recorded) is under way."""
        return self._session.history.in_group

    def refresh(self) -> None:
        """Check the session's document now."""
        self._timer.stop()
        self._soon.stop()
        doc = self._session.document
        t0 = time.perf_counter()
        try:
            self.findings = self._checker.update(doc)
            self.error = None
        except OutlinebenchError as exc:  # a check that cannot run is shown, not raised
            self.error = str(exc)
            self._checker = Checker(self._checker.settings)
        except Exception as exc:  # noqa: BLE001 — a fault in a check must not end the editing
            self.error = f"internal error in the checks ({type(exc).__name__}: {exc})"
            log.exception("internal error in the checks")
            self._checker = Checker(self._checker.settings)
        self.last_ms = (time.perf_counter() - t0) * 1e3
        self.checks_run += 1
        self.document = doc
        self.updated.emit()
