"""The PySide6 editor: the only package that imports Qt."""

__all__: list[str] = []
