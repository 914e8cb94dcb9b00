"""The Excel functions, generated for xlwings: one Excel function per registry entry.

xlwings imports the module named in its config (``UDF Modules: stillair.addin.xlfuncs``, see
``stillair excel-setup``), which calls :func:`build` here.  Nothing is written per function: the
functions, their signatures, docs and decorators are generated from the cell registry.
"""

from __future__ import annotations

import inspect

import xlwings as xw

from ..cells.callpath import evaluate
from ..cells.registry import REGISTRY, CellFunction, arg_doc

# Excel error values that reach Python as COM integer codes when they are passed directly (not
# as a cell reference); xlwings' err_to_str covers the cell-reference case.  The codes are
# Excel's CVErr values, as listed in xlwings._xlwindows.cell_errors.
_EXCEL_ERROR_CODES = {
    -2146826281: "#DIV/0!", -2146826246: "#N/A", -2146826259: "#NAME?", -2146826288: "#NULL!",
    -2146826252: "#NUM!", -2146826265: "#REF!", -2146826273: "#VALUE!",
}


def _from_excel(value):
    if isinstance(value, list):  # a range (ndim=2): its cells may hold error codes too
        return [_from_excel(v) for v in value]
    if type(value) is int and value in _EXCEL_ERROR_CODES:
        return _EXCEL_ERROR_CODES[value]
    return value


def make_function(entry: CellFunction, module: str = __name__):
    """A plain Python function NAME(arg1, arg2=None, ...) that evaluates ``entry``."""

    def cell_function(*args):
        return evaluate(entry, *(_from_excel(a) for a in args))

    cell_function.__name__ = cell_function.__qualname__ = entry.name
    cell_function.__doc__ = entry.description
    cell_function.__module__ = module
    # inspect.signature (and so xlwings) reads __signature__, which functions do not declare
    setattr(cell_function, "__signature__", inspect.Signature([
        inspect.Parameter(a.name, inspect.Parameter.POSITIONAL_OR_KEYWORD,
                          default=None if a.optional else inspect.Parameter.empty)
        for a in entry.args]))
    return cell_function


def decorate(function, entry: CellFunction, func=xw.func, arg=xw.arg, ret=xw.ret):
    """Apply the xlwings decorators (innermost first, as written above a def).

    Numeric arguments of functions that broadcast arrive as 2-D lists (a single cell as
    [[x]]), so a range keeps its shape; the result is then a 2-D list, which spills in
    Excel 365 and fills an array-entered range in older Excel."""
    for a in reversed(entry.args):
        options = {"doc": arg_doc(a), "err_to_str": True}
        if a.kind == "table" or (a.kind == "number" and entry.takes_arrays):
            options["ndim"] = 2  # keeps a range's shape: a column stays a column
        function = arg(a.name, **options)(function)
    function = ret()(function)
    return func(category=entry.category)(function)


def build(namespace: dict, func=xw.func, arg=xw.arg, ret=xw.ret) -> list[str]:
    """Put every registry function into ``namespace``; returns the names."""
    for entry in REGISTRY:
        function = make_function(entry, namespace.get("__name__", __name__))
        namespace[entry.name] = decorate(function, entry, func, arg, ret)
    return [entry.name for entry in REGISTRY]

