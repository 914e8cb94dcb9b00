"""The module xlwings imports for Excel (``UDF Modules: stillair.addin.xlfuncs``).

Its name is what users' xlwings configuration and the README name, so it stays here; the
functions are built by :mod:`stillair.addin.excel.udfs` from the cell registry.
"""

from .excel.udfs import build

__all__ = build(globals())
