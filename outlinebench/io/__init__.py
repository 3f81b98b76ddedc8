"""SVG reading and writing, following the W3C SVG standard."""

from outlinebench.io.atomic import write_file_atomic
from outlinebench.io.cut_file import CUT_CAUTION, polylines_svg
from outlinebench.io.font_read import (
    FontSource,
    GlyphRef,
    contour_origin,
    is_font_path,
    load_font,
    read_font,
    select_glyphs,
)
from outlinebench.io.svg_path import format_path_data, parse_path_data
from outlinebench.io.svg_read import ReadNote, ReadResult, load_svg, read_svg
from outlinebench.io.svg_write import svg_bytes, write_svg
from outlinebench.io.ufo_write import write_ufo_glyphs

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
    "read_font",
    "load_font",
    "select_glyphs",
    "is_font_path",
    "contour_origin",
    "FontSource",
    "GlyphRef",
    "write_ufo_glyphs",
]
