"""SVG reading and writing, following the W3C SVG standard."""
