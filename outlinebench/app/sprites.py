"""Small marks painted once into pixmaps and then copied wherever they are drawn.

Copying a prerendered pixmap costs Qt's raster engine a fraction of a microsecond, painting
the same antialiased shape several microseconds; at a thousand marks in view that is the
difference between a frame in time and a dropped one (benchmarks/bench_editor.py,
"zoomed 4×"). A mark is copied to the nearest of :data:`SPRITE_PHASES` sub-pixel offsets
per axis, so it lies within ``1 / (2 · SPRITE_PHASES)`` logical px of where painting it
would have put it.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Hashable, Sequence

import numpy as np
from PySide6.QtCore import Qt
from PySide6.QtGui import QPainter, QPixmap

__all__ = ["SPRITE_PHASES", "stamp", "painter_dpr"]

# Sub-pixel offsets per axis each sprite is painted at (4: a copy is at most 1/8 px off).
SPRITE_PHASES = 4
# Sprites kept at most; past this (colours or sizes changed many times) the cache starts over.
_MAX_SPRITES = 8192

# Up to this many copies are placed in plain Python (numpy's set-up costs more for a few).
_FEW = 16

_sprites: dict[tuple, QPixmap] = {}


def painter_dpr(p: QPainter) -> float:
    """Device pixel ratio of the device ``p`` paints on (1 when unknown)."""
    dev = p.device()
    return float(dev.devicePixelRatioF()) if dev is not None else 1.0


def _sprite(
    key: Hashable,
    draw: Callable[[QPainter, float, float], None],
    half: int,
    px: int,
    py: int,
    dpr: float,
    antialias: bool,
) -> QPixmap:
    full = (key, half, px, py, dpr, antialias)
    pm = _sprites.get(full)
    if pm is not None:
        return pm
    size = 2 * half + 1
    pm = QPixmap(int(math.ceil(size * dpr)), int(math.ceil(size * dpr)))
    pm.setDevicePixelRatio(dpr)
    pm.fill(Qt.GlobalColor.transparent)
    sp = QPainter(pm)
    try:
        sp.setRenderHint(QPainter.RenderHint.Antialiasing, antialias)
        draw(sp, half + px / SPRITE_PHASES, half + py / SPRITE_PHASES)
    finally:
        sp.end()
    if len(_sprites) >= _MAX_SPRITES:
        _sprites.clear()
    _sprites[full] = pm
    return pm


def stamp(
    p: QPainter,
    key: Hashable,
    draw: Callable[[QPainter, float, float], None],
    half: int,
    xy: Sequence[Sequence[float]] | np.ndarray,
    antialias: bool | None = None,
) -> None:
    """Copy one mark to every centre in ``xy`` (logical px, ``(N, 2)``).

    Parameters
    ----------
    p : QPainter
        Painting in logical px with no transform beyond a translation by whole pixels.
    key : hashable
        Names the mark's look completely (shape, colours, sizes): marks with equal keys
        share pixmaps.
    draw : callable ``(painter, x, y)``
        Paints the mark centred on (x, y) with the painter's pen and brush of its choice.
    half : int
        Logical px the mark may reach from its centre, pen and antialiased edge included;
        the pixmap is ``2 · half + 1`` px square.
    antialias : bool, optional
        Paint the sprite antialiased (default: as ``p`` is set).
    """
    if len(xy) == 0:
        return
    if antialias is None:
        antialias = bool(p.renderHints() & QPainter.RenderHint.Antialiasing)
    dpr = painter_dpr(p)
    draw_pixmap = p.drawPixmap
    if len(xy) <= _FEW:
        n = SPRITE_PHASES
        local: dict[tuple[int, int], QPixmap] = {}
        for x, y in xy.tolist() if isinstance(xy, np.ndarray) else xy:
            qx, qy = math.floor(x * n + 0.5), math.floor(y * n + 0.5)
            phase = (qx % n, qy % n)
            pm = local.get(phase)
            if pm is None:
                pm = local[phase] = _sprite(key, draw, half, *phase, dpr, antialias)
            draw_pixmap(qx // n - half, qy // n - half, pm)
        return
    q = np.floor(np.asarray(xy, dtype=np.float64) * SPRITE_PHASES + 0.5).astype(np.int64)
    corner = q // SPRITE_PHASES - half
    phase = q % SPRITE_PHASES
    code = phase[:, 0] * SPRITE_PHASES + phase[:, 1]
    order = np.argsort(code, kind="stable")  # one pixmap look-up per sub-pixel offset
    last = -1
    pm = None
    for (ix, iy), c in zip(corner[order].tolist(), code[order].tolist(), strict=True):
        if c != last:
            last = c
            pm = _sprite(key, draw, half, c // SPRITE_PHASES, c % SPRITE_PHASES, dpr, antialias)
        draw_pixmap(ix, iy, pm)
