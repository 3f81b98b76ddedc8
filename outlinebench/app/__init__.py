"""The PySide6 editor: the only package that imports Qt."""

import sys

__all__: list[str] = []


def _keep_none_alive() -> None:
    """Work around a reference-count fault of PySide6 6.12 on Python 3.11.

    With PySide6-Essentials 6.12.0 on CPython 3.11, every call of a wrapped Qt method that
    returns nothing releases one reference to ``None`` it never took (measured: 1000 calls of
    ``QPointF.setX`` lower ``sys.getrefcount(None)`` by 1000). From Python 3.12 on ``None``
    is immortal (PEP 683) and this is harmless; on 3.11 the count reaches zero after a few
    thousand calls and the interpreter aborts with "none_dealloc: deallocating None" — a few
    seconds of painting. ``None`` is a static object that is never freed, so raising its count
    by 2**40 up front only keeps the count away from zero.
    """
    if sys.version_info >= (3, 12) or sys.implementation.name != "cpython":
        return
    import ctypes

    ctypes.c_ssize_t.from_address(id(None)).value += 1 << 40


_keep_none_alive()
