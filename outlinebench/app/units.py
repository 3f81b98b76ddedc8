"""Document units shown on screen: converting user units to the unit the file was written in."""

from __future__ import annotations

from dataclasses import dataclass

from outlinebench.model.document import Document

__all__ = ["MM_PER_UNIT_NAME", "DisplayUnits", "display_units"]

# Millimetres per CSS absolute unit (W3C CSS Values and Units Level 3, §5.2: 1in = 25.4mm =
# 96px = 72pt = 6pc).
MM_PER_UNIT_NAME: dict[str, float] = {
    "mm": 1.0,
    "cm": 10.0,
    "in": 25.4,
    "pt": 25.4 / 72.0,
    "pc": 25.4 / 6.0,
    "px": 25.4 / 96.0,
}


@dataclass(frozen=True)
class DisplayUnits:
    """How to show document lengths: ``shown = user_units * factor``, labelled ``name``."""

    name: str
    factor: float
    decimals: int

    def show(self, value: float) -> float:
        return value * self.factor

    def parse(self, shown: float) -> float:
        return shown / self.factor

    def text(self, value: float) -> str:
        return f"{value * self.factor:.{self.decimals}f} {self.name}"


def display_units(doc: Document) -> DisplayUnits:
    """The unit the editor shows ``doc``'s lengths in: the unit its width/height were written
    in when that is an absolute unit, else millimetres when the file gives a physical size,
    else plain user units ("px")."""
    name = doc.units if doc.units in MM_PER_UNIT_NAME else "mm"
    if doc.units not in MM_PER_UNIT_NAME and doc.width_mm is None and doc.height_mm is None:
        name = "px"
    factor = doc.mm_per_unit / MM_PER_UNIT_NAME[name]
    decimals = {"mm": 3, "cm": 4, "in": 4, "pt": 2, "pc": 3, "px": 2}[name]
    return DisplayUnits(name, factor, decimals)
