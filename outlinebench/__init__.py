"""OutlineBench: check, repair, measure, flatten and offset piecewise Bézier outlines."""

__version__ = "0.1.0"
__all__ = ["__version__"]
