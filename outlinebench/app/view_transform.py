"""Pan and zoom: the map between document coordinates and the canvas's logical pixels.

The map is a uniform scale plus a translation, ``screen = doc * scale + offset``, with the
document's y axis pointing down as in SVG. Logical pixels are what Qt widgets lay out in;
Qt multiplies them by the screen's device pixel ratio when painting, so this class never
sees device pixels.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

__all__ = ["ViewTransform", "MIN_SCALE", "MAX_SCALE", "FIT_MARGIN_PX"]

# Smallest and largest logical pixels per document unit. Outside this range numbers on the
# canvas lose meaning (a 1 km drawing in one pixel, or 1e-5 units per pixel).
MIN_SCALE = 1e-4
MAX_SCALE = 1e5
# Space kept free around the outline by "fit to outline", in logical pixels.
FIT_MARGIN_PX = 32.0


@dataclass
class ViewTransform:
    """A mutable pan/zoom state.

    Parameters
    ----------
    scale : float
        Logical pixels per document unit.
    offset_x, offset_y : float
        Screen position (logical pixels) of the document origin.
    """

    scale: float = 1.0
    offset_x: float = 0.0
    offset_y: float = 0.0

    # -- mapping ------------------------------------------------------------------------
    def to_screen(self, x: float, y: float) -> tuple[float, float]:
        """Document point → logical pixel position."""
        return x * self.scale + self.offset_x, y * self.scale + self.offset_y

    def to_doc(self, sx: float, sy: float) -> tuple[float, float]:
        """Logical pixel position → document point."""
        return (sx - self.offset_x) / self.scale, (sy - self.offset_y) / self.scale

    def to_screen_array(self, pts: NDArray[np.float64]) -> NDArray[np.float64]:
        """Map an ``(N, 2)`` array of document points to logical pixels."""
        return pts * self.scale + np.array([self.offset_x, self.offset_y])

    def doc_rect(self, width: float, height: float) -> tuple[float, float, float, float]:
        """The document rectangle ``(xmin, ymin, xmax, ymax)`` a ``width × height`` view shows."""
        x0, y0 = self.to_doc(0.0, 0.0)
        x1, y1 = self.to_doc(width, height)
        return x0, y0, x1, y1

    # -- changing the view --------------------------------------------------------------
    def pan(self, dx: float, dy: float) -> None:
        """Move the drawing by (dx, dy) logical pixels."""
        self.offset_x += dx
        self.offset_y += dy

    def zoom_about(self, sx: float, sy: float, factor: float) -> None:
        """Multiply the scale by ``factor`` keeping the document point under (sx, sy) fixed.

        Notes
        -----
        With d = (s − o) / k the document point under screen point s, the new offset is
        o′ = s − d·k′, so that d maps to s again at the new scale k′.
        """
        dx, dy = self.to_doc(sx, sy)
        new_scale = float(np.clip(self.scale * factor, MIN_SCALE, MAX_SCALE))
        self.scale = new_scale
        self.offset_x = sx - dx * new_scale
        self.offset_y = sy - dy * new_scale

    def fit(
        self,
        bounds: tuple[float, float, float, float],
        width: float,
        height: float,
        margin: float = FIT_MARGIN_PX,
    ) -> None:
        """Show the document rectangle ``bounds = (xmin, ymin, xmax, ymax)`` centred in a
        ``width × height`` view with ``margin`` logical pixels free on every side."""
        xmin, ymin, xmax, ymax = bounds
        bw = max(xmax - xmin, 1e-9)
        bh = max(ymax - ymin, 1e-9)
        avail_w = max(width - 2 * margin, 1.0)
        avail_h = max(height - 2 * margin, 1.0)
        self.scale = float(np.clip(min(avail_w / bw, avail_h / bh), MIN_SCALE, MAX_SCALE))
        cx, cy = (xmin + xmax) / 2, (ymin + ymax) / 2
        self.offset_x = width / 2 - cx * self.scale
        self.offset_y = height / 2 - cy * self.scale
