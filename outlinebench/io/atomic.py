"""Writing a file atomically: the old file stays intact on any failure.

Write a temporary file in the same folder, fsync it, ``os.replace`` it over the target, fsync
the folder. Used for every file the project saves (SVG write-back, cut files, UFO glyphs).
"""

from __future__ import annotations

import os
import stat
import tempfile
from pathlib import Path
from typing import BinaryIO

from outlinebench.errors import SvgWriteError

__all__ = ["write_file_atomic"]


def _write_all(fh: BinaryIO, data: bytes) -> None:
    """Write every byte (a separate function so tests can make it fail halfway)."""
    view = memoryview(data)
    while view:
        n = fh.write(view)
        view = view[n:]


def _fsync_dir(directory: Path) -> None:
    try:
        fd = os.open(directory, os.O_RDONLY)
    except OSError:
        return  # platforms without directory handles (Windows)
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _umask() -> int:
    """The process's file-creation mask (read by setting it and putting it back)."""
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def _temporary_prefix(target: Path) -> str:
    return f".{target.name}."


def _remove_stale_temporaries(target: Path) -> None:
    """Remove temporary files that earlier saves of ``target`` left behind.

    A save killed between creating its temporary file and renaming it (power cut, SIGKILL)
    leaves ``.NAME.PID.XXXX.tmp`` beside the target. The next save of the same target
    removes every such file whose process is gone; one whose process still runs may be a
    save in progress and is left alone.
    """
    prefix = _temporary_prefix(target)
    try:
        names = [e.name for e in os.scandir(target.parent) if e.name.startswith(prefix)]
    except OSError:
        return
    for name in names:
        rest = name[len(prefix) :]
        pid_text, _, tail = rest.partition(".")
        if not (tail.endswith(".tmp") and pid_text.isdigit()):
            continue
        pid = int(pid_text)
        if pid != os.getpid():
            try:
                os.kill(pid, 0)
                continue  # that process still runs: maybe a save in progress
            except ProcessLookupError:
                pass
            except OSError:
                continue  # another user's process: not ours to judge
        try:
            os.unlink(target.parent / name)
        except OSError:
            pass


def write_file_atomic(path: str | os.PathLike[str], data: bytes) -> None:
    """Write ``data`` to ``path`` atomically: the old file stays intact on any failure.

    Parameters
    ----------
    path : str or path-like
        Target file: a regular file or a new name. A symbolic link is followed (the file it
        names is replaced, the link stays).
    data : bytes
        The complete new content.

    Raises
    ------
    SvgWriteError
        A target that is not a regular file (a FIFO, a device node such as ``/dev/null``,
        a folder, a socket: refused, never replaced), a read-only target (refused), a
        folder where no file can be created, or a disk error; the old file is then left as
        it was and no temporary file remains.

    Notes
    -----
    Write a temporary file ``.NAME.PID.XXXX.tmp`` in the target's folder, flush and fsync
    it; ``os.replace`` it over the target (atomic on POSIX and Windows); fsync the folder so
    the rename itself is durable. The file keeps the old file's permission bits, or gets
    ``0o666`` minus the umask when new, as ``open(2)`` would. Temporary files of earlier
    saves of the same target whose process is gone (a killed save) are removed first.
    """
    shown = Path(path)  # the name the user knows, for messages
    target = Path(os.path.realpath(shown))
    try:
        st = os.stat(target)
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise SvgWriteError(
            f"{shown}: cannot save: {exc.strerror or exc}", file=str(shown)
        ) from None
    if st is not None:
        if not stat.S_ISREG(st.st_mode):
            raise SvgWriteError(
                f"{shown}: not a regular file ({_file_kind(st.st_mode)}); refused, nothing was "
                "written (save to a file name)",
                file=str(shown),
            )
        mode = st.st_mode & 0o7777
        # Permission bits too, not only os.access: an administrator could write anyway, but
        # a file marked read-only is not meant to be replaced.
        if not os.access(target, os.W_OK) or not mode & 0o222:
            raise SvgWriteError(
                f"{shown}: the file is read-only; it was not replaced", file=str(shown)
            )
    else:
        mode = 0o666 & ~_umask()  # what open(2) would give a new file
    directory = target.parent
    _remove_stale_temporaries(target)
    try:
        fd, tmp = tempfile.mkstemp(
            prefix=f"{_temporary_prefix(target)}{os.getpid()}.", suffix=".tmp", dir=directory
        )
    except OSError as exc:
        raise SvgWriteError(
            f"{shown}: cannot create a file in {directory}: {exc.strerror or exc}", file=str(shown)
        ) from None
    try:
        with os.fdopen(fd, "wb") as fh:
            _write_all(fh, data)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, mode)
        os.replace(tmp, target)
    except BaseException as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if isinstance(exc, OSError):
            raise SvgWriteError(
                f"{shown}: save failed, the old file is unchanged: {exc}", file=str(shown)
            ) from None
        raise
    _fsync_dir(directory)


def _file_kind(mode: int) -> str:
    for test, name in (
        (stat.S_ISFIFO, "a FIFO"),
        (stat.S_ISCHR, "a character device"),
        (stat.S_ISBLK, "a block device"),
        (stat.S_ISDIR, "a folder"),
        (stat.S_ISSOCK, "a socket"),
    ):
        if test(mode):
            return name
    return "not a plain file"
