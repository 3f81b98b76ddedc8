"""Can the editor open a window here? Answered before any Qt application object exists.

When Qt cannot load its platform plugin (no display, a missing system library such as
``libxcb-cursor0``, an unknown ``QT_QPA_PLATFORM``) it prints several lines and aborts the
process (SIGABRT, a core dump on many systems) from inside the ``QApplication`` constructor;
Python cannot catch that. So the question is asked first, cheaply where possible:

1. Platforms that need no display (``offscreen``, ``minimal``, ``vnc``, ...) are fine.
2. On Linux and the BSDs without ``QT_QPA_PLATFORM``, a window needs ``WAYLAND_DISPLAY`` or
   ``DISPLAY``; neither set means no display (the answer takes no time).
3. Otherwise a child Python process loads the platform plugin's shared library (``dlopen``
   names a missing system library precisely) and creates a ``QGuiApplication``; if the
   child fails or aborts, the editor does not start and the reason is given in one line.

:func:`display_problem` returns that line or None. macOS and Windows always have their
platform plugin and are not probed.
"""

from __future__ import annotations

import os
import subprocess
import sys

__all__ = ["display_problem", "NO_DISPLAY_PLATFORMS", "CLI_STILL_WORKS", "PROBE_TIMEOUT_S"]

# Qt platform plugins that draw without a display server (Qt documentation, "Qt Platform
# Abstraction"): rendering to memory, a framebuffer, or a VNC client.
NO_DISPLAY_PLATFORMS = frozenset(
    {"offscreen", "minimal", "minimalegl", "vnc", "linuxfb", "eglfs", "vkkhrdisplay"}
)
CLI_STILL_WORKS = (
    "the command-line tools still work (outlinebench check FILE.svg; outlinebench --help)"
)
# A probe that has not answered by then is taken as a failure (a display server that does
# not answer would hang the editor too).
PROBE_TIMEOUT_S = 20.0

_PROBE = r"""
import ctypes, os, sys
from pathlib import Path
from PySide6.QtCore import QLibraryInfo
name = (os.environ.get("QT_QPA_PLATFORM") or sys.argv[1]).split(";")[0].split(":")[0]
plugins = Path(QLibraryInfo.path(QLibraryInfo.LibraryPath.PluginsPath)) / "platforms"
lib = plugins / f"libq{name}.so"
if sys.platform.startswith("linux") or "bsd" in sys.platform:
    if not lib.is_file():
        print(f"NOPLUGIN Qt has no platform plugin {name!r}")
        sys.exit(3)
    try:
        ctypes.CDLL(str(lib))
    except OSError as exc:
        print(f"NOLIB {exc}")
        sys.exit(3)
from PySide6.QtGui import QGuiApplication
app = QGuiApplication(sys.argv[:1])
print("OK", app.platformName())
"""


def _default_platform(env: dict[str, str]) -> str:
    # Qt 6 picks wayland in a Wayland session and xcb otherwise (Qt documentation, "Qt for
    # Linux/X11" and "Wayland and Qt").
    return "wayland" if env.get("WAYLAND_DISPLAY") else "xcb"


def display_problem(env: dict[str, str] | None = None, *, probe: bool = True) -> str | None:
    """Why the editor cannot open a window here, as one line, or None when it can.

    Parameters
    ----------
    env : dict, optional
        The environment to judge (default ``os.environ``); the probe runs with it.
    probe : bool
        Run the child-process probe (step 3 of the module notes) when the environment alone
        does not answer.

    Returns
    -------
    str or None
        ``"cannot open the editor: …; the command-line tools still work (…)"``.
    """
    env = dict(os.environ if env is None else env)
    unix = sys.platform.startswith("linux") or "bsd" in sys.platform
    if not unix:
        return None
    platform = env.get("QT_QPA_PLATFORM", "").strip()
    first = platform.split(";")[0].split(":")[0]
    if first in NO_DISPLAY_PLATFORMS:
        return None
    if not platform and not env.get("DISPLAY") and not env.get("WAYLAND_DISPLAY"):
        return (
            "cannot open the editor: no display (neither DISPLAY nor WAYLAND_DISPLAY is set); "
            + CLI_STILL_WORKS
        )
    if not probe:
        return None
    name = first or _default_platform(env)
    try:
        res = subprocess.run(
            [sys.executable, "-c", _PROBE, name],
            env=env,
            capture_output=True,
            text=True,
            timeout=PROBE_TIMEOUT_S,
        )
    except subprocess.TimeoutExpired:
        return (
            f"cannot open the editor: the display did not answer within {PROBE_TIMEOUT_S:g} s "
            f"(Qt platform {name!r}); " + CLI_STILL_WORKS
        )
    if res.returncode == 0 and res.stdout.startswith("OK"):
        return None
    out = res.stdout.strip()
    if out.startswith("NOLIB "):
        why = (
            f"the Qt platform plugin {name!r} cannot load a system library "
            f"({out[6:].strip()}); the README names the packages to install"
        )
    elif out.startswith("NOPLUGIN "):
        why = out[9:].strip()
    else:
        lines = [ln.strip() for ln in res.stderr.splitlines() if ln.strip()]
        reason = next((ln for ln in lines if "could not" in ln.lower()), lines[0] if lines else "")
        reason = reason.rstrip(".")
        why = f"the Qt platform plugin {name!r} could not start" + (
            f" ({reason})" if reason else ""
        )
    return f"cannot open the editor: {why}; " + CLI_STILL_WORKS
