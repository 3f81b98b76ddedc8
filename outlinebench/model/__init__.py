"""The in-house document model and every edit as an undoable command (no Qt)."""

from outlinebench.model.document import (
    IDENTITY,
    JOIN_INTENTS,
    Contour,
    ContourRef,
    Document,
    JoinIntent,
    Outline,
    documents_equal,
    frozen_points,
)

__all__ = [
    "IDENTITY",
    "JOIN_INTENTS",
    "Contour",
    "ContourRef",
    "Document",
    "JoinIntent",
    "Outline",
    "documents_equal",
    "frozen_points",
]
