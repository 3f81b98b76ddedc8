"""An immutable sequence of findings made of blocks, so an edit replaces one block cheaply.

:class:`~outlinebench.diagnostics.Checker` returns its findings as one
:class:`FindingSequence`: the flat list of the last full check (never changed afterwards),
cut into blocks (one per outline, then the gaps), plus the blocks that later updates
replaced. Replacing a block makes a new sequence in time proportional to the number of
replaced blocks, not to the number of findings (80,000 findings on a 100,000-segment
document would otherwise be copied after every point moved). Sequences returned earlier never
change. It behaves as a read-only list: ``len``, iteration, indexing, slicing (a list),
``in``, and ``==`` with any sequence of the same findings in the same order.
"""

from __future__ import annotations

from bisect import bisect_right
from collections.abc import Iterator, Sequence
from itertools import chain, islice
from typing import Any, overload

import numpy as np
from numpy.typing import NDArray

from outlinebench.diagnostics.findings import Finding

__all__ = ["FindingSequence", "MAX_REPLACED_BLOCKS"]

# Past this many replaced blocks the next sequence is flattened into a new base list (one
# O(findings) copy now and then instead of ever longer block tables). Our choice, no source:
# an editing session touches a few outlines; 64 keeps each update's table small.
MAX_REPLACED_BLOCKS = 64


class FindingSequence(Sequence[Finding]):
    """Read-only findings: ``base`` cut at ``starts``, with some blocks replaced.

    Parameters
    ----------
    base : list of Finding
        All blocks one after the other. Not copied: the caller must never change it.
    starts : ndarray of int, shape (B + 1,)
        Block b is ``base[starts[b]:starts[b + 1]]``.
    replaced : dict of int to sequence of Finding, optional
        Blocks given anew (block index → its findings).
    """

    __slots__ = ("_base", "_starts", "_replaced", "_len", "_pieces")

    def __init__(
        self,
        base: list[Finding],
        starts: NDArray[np.intp],
        replaced: dict[int, Sequence[Finding]] | None = None,
        length: int | None = None,
    ) -> None:
        self._base = base
        self._starts = starts
        self._replaced = replaced or {}
        if length is None:
            length = len(base) + sum(
                len(v) - int(starts[k + 1] - starts[k]) for k, v in self._replaced.items()
            )
        self._len = length
        self._pieces: tuple[list[int], list[tuple[Sequence[Finding], int]]] | None = None

    @classmethod
    def from_list(cls, findings: list[Finding]) -> FindingSequence:
        """One block holding ``findings`` (not copied)."""
        return cls(findings, np.array([0, len(findings)], dtype=np.intp))

    def replace_blocks(self, blocks: dict[int, Sequence[Finding]]) -> FindingSequence:
        """A new sequence with the given blocks replaced (this one is unchanged)."""
        replaced = {**self._replaced, **blocks}
        length = self._len
        for k, v in blocks.items():
            old = self._replaced.get(k)
            old_len = len(old) if old is not None else int(self._starts[k + 1] - self._starts[k])
            length += len(v) - old_len
        new = FindingSequence(self._base, self._starts, replaced, length)
        if len(replaced) > MAX_REPLACED_BLOCKS:
            return new._flattened()
        return new

    def _flattened(self) -> FindingSequence:
        lens = np.diff(self._starts)
        for k, v in self._replaced.items():
            lens[k] = len(v)
        starts = np.concatenate([[0], np.cumsum(lens)]).astype(np.intp)
        return FindingSequence(list(self), starts)

    def _runs(self) -> Iterator[Sequence[Finding] | Iterator[Finding]]:
        base, starts, pos = self._base, self._starts, 0
        for k in sorted(self._replaced):
            lo = int(starts[k])
            if lo > pos:
                yield islice(base, pos, lo)
            yield self._replaced[k]
            pos = int(starts[k + 1])
        if pos < len(base):
            yield islice(base, pos, None) if pos else base

    def __iter__(self) -> Iterator[Finding]:
        if not self._replaced:
            return iter(self._base)
        return chain.from_iterable(self._runs())

    def __len__(self) -> int:
        return self._len

    def _piece_table(self) -> tuple[list[int], list[tuple[Sequence[Finding], int]]]:
        if self._pieces is None:
            firsts: list[int] = []
            pieces: list[tuple[Sequence[Finding], int]] = []
            base, starts, pos, at = self._base, self._starts, 0, 0
            for k in sorted(self._replaced):
                lo = int(starts[k])
                if lo > pos:
                    firsts.append(at)
                    pieces.append((base, pos))
                    at += lo - pos
                firsts.append(at)
                pieces.append((self._replaced[k], 0))
                at += len(self._replaced[k])
                pos = int(starts[k + 1])
            firsts.append(at)
            pieces.append((base, pos))
            self._pieces = (firsts, pieces)
        return self._pieces

    @overload
    def __getitem__(self, index: int) -> Finding: ...

    @overload
    def __getitem__(self, index: slice) -> list[Finding]: ...

    def __getitem__(self, index: int | slice) -> Finding | list[Finding]:
        if isinstance(index, slice):
            return list(self)[index]
        i = index.__index__()
        if i < 0:
            i += self._len
        if not 0 <= i < self._len:
            raise IndexError("finding index out of range")
        if not self._replaced:
            return self._base[i]
        firsts, pieces = self._piece_table()
        p = bisect_right(firsts, i) - 1
        seq, offset = pieces[p]
        return seq[offset + i - firsts[p]]

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Sequence) or isinstance(other, (str, bytes)):
            return NotImplemented
        return len(self) == len(other) and all(a == b for a, b in zip(self, other, strict=True))

    __hash__ = None  # type: ignore[assignment]

    def __repr__(self) -> str:
        return repr(list(self))

    def __reduce__(self) -> tuple[Any, ...]:
        return (FindingSequence.from_list, (list(self),))
