"""A bounded undo/redo history of commands over one document (no Qt).

Usage::

    history = History(document)
    history.do(MovePoints([ref], (1.0, 0.0)))      # applies, records, clears redo
    with history.group("Drag handles"):             # one gesture = one undo step
        history.do(MovePoints([h], (0.5, 0.0)))
        history.do(MovePoints([h], (0.5, 0.2)))     # merged with the previous move
    history.undo(); history.redo()
    unsubscribe = history.subscribe(lambda old, new: ...)
    history.mark_saved(); history.is_dirty

Commands done inside a group are applied at once (observers see every intermediate
document, so a drag repaints live) and recorded as one :class:`CommandGroup` when the
outermost group ends. Consecutive mergeable commands (moves of the same points) merge into
one step, both inside a group and between separate ``do`` calls (nudging), but never across
a group boundary or the save point. Closing (or aborting) the outermost group notifies the
observers once more, so that a window can enable its undo and redo commands again.
"""

from __future__ import annotations

from collections import deque
from collections.abc import Callable, Iterator
from contextlib import contextmanager

from outlinebench.errors import CommandError, OptionError
from outlinebench.model.commands import Command, CommandGroup
from outlinebench.model.document import Document, documents_equal

__all__ = ["History", "HISTORY_LIMIT", "Observer"]

# Undo steps kept by default; the oldest is forgotten beyond this.
HISTORY_LIMIT = 1000

Observer = Callable[[Document, Document], None]


class History:
    """Undo and redo stacks of commands over a document.

    Parameters
    ----------
    document : Document
        The starting document; it counts as saved.
    limit : int
        Largest number of undo steps kept (the oldest are dropped).
    """

    def __init__(self, document: Document, limit: int = HISTORY_LIMIT) -> None:
        if limit < 1:
            raise OptionError(f"the history limit must be at least 1, got {limit}")
        self._doc = document
        self._saved: Document | None = document
        self._undo: deque[Command] = deque(maxlen=limit)
        self._redo: list[Command] = []
        self._observers: list[Observer] = []
        self._group_stack: list[str] = []
        self._group_commands: list[Command] = []
        self._group_start: Document | None = None
        self._last_merge_barrier = True
        self.limit = limit

    # -- state ---------------------------------------------------------------------------
    @property
    def document(self) -> Document:
        """The current document."""
        return self._doc

    @property
    def can_undo(self) -> bool:
        return bool(self._undo) and not self._group_stack

    @property
    def can_redo(self) -> bool:
        return bool(self._redo) and not self._group_stack

    @property
    def undo_label(self) -> str | None:
        """Menu text of the step :meth:`undo` would take back, or None."""
        return self._undo[-1].label if self._undo else None

    @property
    def redo_label(self) -> str | None:
        return self._redo[-1].label if self._redo else None

    @property
    def in_group(self) -> bool:
        """Whether a gesture group is open."""
        return bool(self._group_stack)

    @property
    def is_dirty(self) -> bool:
        """Whether the current document differs from the last saved one (geometry, joins)."""
        if self._saved is None:
            return True
        return not documents_equal(self._doc, self._saved)

    def mark_saved(self) -> None:
        """Record the current document as the saved one."""
        self._saved = self._doc
        self._last_merge_barrier = True

    def reset(self, document: Document) -> None:
        """Start over with another document (opening a file): clears both stacks."""
        if self._group_stack:
            raise CommandError("cannot replace the document while an edit is in progress")
        old = self._doc
        self._doc = document
        self._saved = document
        self._undo.clear()
        self._redo.clear()
        self._last_merge_barrier = True
        self._notify(old, document)

    # -- observers -----------------------------------------------------------------------
    def subscribe(self, callback: Observer) -> Callable[[], None]:
        """Call ``callback(old_doc, new_doc)`` after every change; returns an unsubscriber."""
        self._observers.append(callback)

        def unsubscribe() -> None:
            if callback in self._observers:
                self._observers.remove(callback)

        return unsubscribe

    def _notify(self, old: Document, new: Document) -> None:
        for cb in list(self._observers):
            cb(old, new)

    # -- editing -------------------------------------------------------------------------
    def do(self, command: Command) -> Document:
        """Apply a command and record it (merging with the previous step when it can).

        Returns
        -------
        Document
            The new current document.

        Raises
        ------
        CommandError
            From the command; or the command object was already applied to another
            document (a command records the documents before and after it, so one object
            cannot stand for two steps: make a new one). The document and history are then
            unchanged.
        """
        old = self._doc
        if command._before is not None and command._before is not old:
            raise CommandError(
                f"'{command.label}' was already applied to another document; "
                "make a new command for a new edit"
            )
        new = command.apply(old)
        self._doc = new
        if self._group_stack:
            # The redo stack is cleared when the group ends with something done, so an
            # aborted gesture keeps it.
            cmds = self._group_commands
            if not (cmds and cmds[-1].merge(command)):
                cmds.append(command)
        else:
            self._redo.clear()
            top = self._undo[-1] if self._undo else None
            if top is None or self._last_merge_barrier or not top.merge(command):
                self._undo.append(command)
            self._last_merge_barrier = False
        self._notify(old, new)
        return new

    def _step(self, back: bool) -> Document:
        """Undo (``back``) or redo one step: move it between the stacks and notify."""
        verb, source, target = (
            ("undo", self._undo, self._redo) if back else ("redo", self._redo, self._undo)
        )
        if self._group_stack:
            raise CommandError(f"cannot {verb} while an edit is in progress")
        if not source:
            raise CommandError(f"nothing to {verb}")
        cmd = source[-1]
        old = self._doc
        new = cmd.revert(old) if back else cmd.apply(old)
        source.pop()
        target.append(cmd)
        self._doc = new
        self._last_merge_barrier = True
        self._notify(old, new)
        return new

    def undo(self) -> Document:
        """Take back the last step.

        Raises
        ------
        CommandError
            Nothing to undo, or a gesture group is open.
        """
        return self._step(back=True)

    def redo(self) -> Document:
        """Do again the last step taken back.

        Raises
        ------
        CommandError
            Nothing to redo, or a gesture group is open.
        """
        return self._step(back=False)

    # -- gestures ------------------------------------------------------------------------
    def begin_group(self, label: str) -> None:
        """Open a gesture group (nested groups join the outermost one)."""
        if not self._group_stack:
            self._group_commands = []
            self._group_start = self._doc
        self._group_stack.append(label)

    def end_group(self) -> None:
        """Close a gesture group; the outermost one records one step (if anything was done).

        Closing the outermost group notifies the observers with ``(document, document)``
        (the same object twice: nothing new to draw, but undo and redo are available
        again), after the edits done inside it were each notified as they happened.
        """
        if not self._group_stack:
            raise CommandError("no edit group is open")
        label = self._group_stack.pop()
        if self._group_stack:
            return
        cmds = self._group_commands
        start = self._group_start
        self._group_commands = []
        self._group_start = None
        if cmds:
            assert start is not None
            group = CommandGroup(label, cmds)
            group._record(start, self._doc)
            self._undo.append(group)
            self._redo.clear()
            self._last_merge_barrier = True
        self._notify(self._doc, self._doc)

    def abort_group(self) -> None:
        """Close every open group and take back what was done in it (a cancelled gesture).

        The redo stack is kept. Observers are notified with ``(edited, start)`` when
        something was taken back, otherwise with ``(document, document)`` as in
        :meth:`end_group`.
        """
        if not self._group_stack:
            raise CommandError("no edit group is open")
        self._group_stack.clear()
        cmds = self._group_commands
        start = self._group_start
        self._group_commands = []
        self._group_start = None
        old = self._doc
        if cmds:
            doc = old
            for cmd in reversed(cmds):
                doc = cmd.revert(doc)
            assert start is not None
            self._doc = start
        self._notify(old, self._doc)

    @contextmanager
    def group(self, label: str) -> Iterator[History]:
        """Context manager making every command done inside one undo step.

        If the block raises, what it did is taken back and the exception propagates.
        """
        self.begin_group(label)
        try:
            yield self
        except BaseException:
            if self._group_stack:
                self.abort_group()
            raise
        self.end_group()
