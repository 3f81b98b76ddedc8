"""SVG reading and writing, following the W3C SVG standard."""

from outlinebench.io.svg_path import format_path_data, parse_path_data
from outlinebench.io.svg_read import ReadNote, ReadResult, load_svg, read_svg
from outlinebench.io.svg_write import (
    CUT_CAUTION,
    polylines_svg,
    svg_bytes,
    write_file_atomic,
    write_svg,
)

__all__ = [
    "read_svg",
    "ReadResult",
    "ReadNote",
    "load_svg",
    "parse_path_data",
    "format_path_data",
    "write_svg",
    "write_file_atomic",
    "CUT_CAUTION",
    "svg_bytes",
    "polylines_svg",
]
