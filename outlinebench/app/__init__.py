"""The PySide6 editor: the only package that imports Qt."""
