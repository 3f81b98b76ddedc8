"""Recovery files: unsaved work written aside a few seconds after each change, for a crash.

Each running editor window writes ``<pid>-<n>.svg`` (the document as Save would write it,
:func:`outlinebench.io.svg_bytes`, which reads its own output back as a check) and beside it
``<pid>-<n>.json`` (which file it belongs to, when, and what the window title said) into one
folder, both through :func:`outlinebench.io.write_file_atomic` (a temporary file renamed into
place, so a crash during the write leaves the previous recovery file whole). The pair is
removed when the work is saved or discarded and when the window closes normally.

At the next start, pairs whose process is no longer running are offered for restoring
(:func:`stale_recoveries`); a pair of a live process belongs to another open window and is
left alone. Qt-free.
"""

from __future__ import annotations

import json
import os
import time
from dataclasses import dataclass
from pathlib import Path

from outlinebench.io import svg_bytes, write_file_atomic
from outlinebench.model.document import Document

__all__ = ["RecoveryStore", "Recovery", "stale_recoveries", "process_alive"]


def process_alive(pid: int) -> bool:
    """Whether a process ``pid`` exists (POSIX ``kill(pid, 0)``; on Windows, assumed alive
    only for our own process)."""
    if pid == os.getpid():
        return True
    if os.name != "posix":
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:  # exists, owned by someone else
        return True
    except OSError:
        return False
    return True


@dataclass(frozen=True)
class Recovery:
    """One recovery file found at start-up."""

    svg: Path
    meta: Path
    original: str | None  # the file the work belongs to (None: never saved)
    saved_at: float  # time.time() of the write
    pid: int

    def remove(self) -> None:
        for p in (self.svg, self.meta):
            try:
                p.unlink()
            except FileNotFoundError:
                pass


def stale_recoveries(folder: str | Path) -> list[Recovery]:
    """Recovery files in ``folder`` left by processes no longer running, newest first."""
    base = Path(folder)
    if not base.is_dir():
        return []
    out: list[Recovery] = []
    for meta in base.glob("*.json"):
        svg = meta.with_suffix(".svg")
        try:
            info = json.loads(meta.read_text(encoding="utf-8"))
            pid = int(info["pid"])
        except (OSError, ValueError, KeyError, TypeError):
            continue
        if not svg.is_file() or process_alive(pid):
            continue
        original = info.get("original")
        out.append(
            Recovery(svg, meta, original if isinstance(original, str) else None,
                     float(info.get("saved_at", 0.0)), pid)
        )  # fmt: skip
    out.sort(key=lambda r: r.saved_at, reverse=True)
    return out


class RecoveryStore:
    """The recovery file pair of one window.

    Parameters
    ----------
    folder : str or Path
        Where recovery files live (created when first needed).
    """

    _counter = 0

    def __init__(self, folder: str | Path) -> None:
        self.folder = Path(folder)
        RecoveryStore._counter += 1
        stem = f"{os.getpid()}-{RecoveryStore._counter}"
        self.svg = self.folder / f"{stem}.svg"
        self.meta = self.folder / f"{stem}.json"
        self.writes = 0  # recovery files written (tests and the status bar read it)

    @property
    def exists(self) -> bool:
        return self.svg.is_file()

    def write(self, document: Document, original: str | None) -> None:
        """Write ``document`` aside (raises what :func:`svg_bytes` or the disk raises)."""
        data = svg_bytes(document)
        self.folder.mkdir(parents=True, exist_ok=True)
        write_file_atomic(self.svg, data)
        info = {"pid": os.getpid(), "original": original, "saved_at": time.time()}
        write_file_atomic(self.meta, json.dumps(info).encode("utf-8"))
        self.writes += 1

    def remove(self) -> None:
        """Remove the pair (nothing unsaved is left, or the user discarded it)."""
        for p in (self.svg, self.meta):
            try:
                p.unlink()
            except FileNotFoundError:
                pass
