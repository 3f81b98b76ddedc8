"""Caps on the work one input may cause: the single place where they are stated.

A gate fed with whatever customers upload must end every input in bounded time and memory
with a result or a clear error naming the file, never a hang. Each cap below is checked
where the work it bounds is done; an input past it gets a read error or a finding that
names the file and the cap (never a silent cut). ``benchmarks/fuzz/KNOWN.md`` repeats them.

Time and memory per file (stated targets, measured by ``benchmarks/fuzz/campaign.py``):

- :data:`TIME_PER_FILE_S`: seconds one file may take through one subcommand;
- :data:`MEMORY_FLOOR_MB` + :data:`MEMORY_PER_INPUT_BYTE` × the file's size: the peak
  resident memory above the interpreter's start (the geometry of a file is at most a few
  doubles per byte of its text, so this is a multiple of the geometry).
"""

from __future__ import annotations

from outlinebench.errors import WorkCapExceeded

__all__ = [
    "WorkCapExceeded",
    "TIME_PER_FILE_S",
    "MEMORY_FLOOR_MB",
    "MEMORY_PER_INPUT_BYTE",
    "USE_SEGMENTS",
    "FINDINGS_PER_KIND",
    "OVERLAP_CANDIDATE_PAIRS",
    "OFFSET_CROSSINGS",
]

#: Seconds one file may take through one subcommand (campaign cap; common practice, no source).
TIME_PER_FILE_S = 10.0
#: Peak memory above the start, fixed part (MB).
MEMORY_FLOOR_MB = 256.0
#: Peak memory above the start per byte of input (bytes per byte).
MEMORY_PER_INPUT_BYTE = 1000.0
#: Segments that ``use`` instances may add to a document, counted on the geometry they
#: expand to (each instance adds its referenced element's segments).
USE_SEGMENTS = 250_000
#: Findings of one kind listed per document by the overlap check; the rest are counted in
#: one summary finding of that kind.
FINDINGS_PER_KIND = 1_000
#: Candidate pairs (outlines whose boxes meet) the overlap check examines; past it, one
#: finding states the pairs not examined and the document is not clean.
OVERLAP_CANDIDATE_PAIRS = 20_000
#: Crossings of a contour's raw offset with itself that the trim may resolve.
OFFSET_CROSSINGS = 50_000
