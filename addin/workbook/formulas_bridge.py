"""Everything that touches the ``formulas`` library's and schedula's internals, in one module.

An upgrade of ``formulas`` (or schedula, its engine) is one file to read.  Facts about formulas
1.3.4 relied on (checked by tests/test_headless.py): custom functions are registered in
``formulas.get_functions()`` before compiling and wrapped with ``formulas.functions.wrap_func``; a
compiled formula takes its inputs in ``inputs`` order as 2-D object arrays with
``schedula.EMPTY`` for blank cells; an unknown function fails only when called; a compiled
formula's dispatcher (``dsp.nodes``, ``dsp.default_values``) is a tree of node functions, which
:func:`straight_line` runs in order.
"""

from __future__ import annotations

import functools
import logging
from collections import OrderedDict
import math
import os
import re

os.environ.setdefault("TQDM_DISABLE", "1")  # formulas shows a progress bar while compiling

from ..cells.callpath import NoteRecorder, evaluate as evaluate_cell  # noqa: E402
from ..cells.registry import REGISTRY  # noqa: E402
from .reader import CellError  # noqa: E402

__all__ = ["load", "register_functions", "defer_statistics", "builtin_names", "compile_formula", "fast_runner",
           "blank", "xl_error", "is_xl_error", "to_formulas", "plain", "parse_problem",
           "run_problem", "reads_references", "as_reference", "input_reference_text", "call_steps",
           "step_name", "compiled_function", "is_identity_filter", "call_registered"]

_registered = False


def load() -> None:
    """Import formulas with our functions registered and its dispatcher's logging quiet."""
    import formulas  # noqa: F401
    register_functions()
    logging.getLogger("schedula").setLevel(logging.CRITICAL)  # unknown functions log tracebacks
    logging.getLogger("formulas").setLevel(logging.CRITICAL)


# The scipy modules formulas' statistics module imports at its top; none of them is needed
# until a statistics function runs (interp1d by PERCENTILE..., linalg by LINEST...).
_LAZY = ("scipy.stats", "scipy.interpolate", "scipy.linalg")
_deferring = False   # True while formulas' function table is imported (register_functions)


def _lazy_module_type():
    import types

    class LazyModule(types.ModuleType):
        """Stands in for a module until an attribute of it is first used.  While formulas'
        function table is imported, a name taken from it (``from scipy.interpolate import
        interp1d``) is a stand-in too, fetched when first called."""

        def __getattr__(self, attribute):
            if _deferring:
                if attribute.startswith("__"):   # the import system asking for __path__...
                    raise AttributeError(attribute)
                return _LazyAttribute(self.__name__, attribute)
            return getattr(_real_module(self.__name__), attribute)

    return LazyModule


class _LazyAttribute:
    """A function or class of a deferred module, taken by name at import; the real one is
    fetched when it is first called or read."""

    def __init__(self, module: str, name: str):
        self._where = (module, name)

    def _real(self):
        module, name = self._where
        return getattr(_real_module(module), name)

    def __call__(self, *args, **kwargs):
        return self._real()(*args, **kwargs)

    def __getattr__(self, attribute):
        return getattr(self._real(), attribute)


def _real_module(name: str):
    import importlib
    import sys
    if getattr(sys.modules.get(name), "stand_in", False):
        del sys.modules[name]
    return importlib.import_module(name)


def defer_statistics() -> None:
    """Import scipy.stats, scipy.interpolate and scipy.linalg when a statistics function first
    needs them, not with formulas.

    formulas' function table imports its statistics module, which imports those at the top
    (about a second of CPU in every command for scipy.stats, a third of a second for the other
    two, which bring scipy.optimize), although MAX, MIN, AVERAGE... never use them.  A stand-in
    module takes each one's place (one already imported is left alone) until one of its
    attributes is used; then the real module is imported and answers (tests/test_headless.py
    checks a distribution and an interpolated percentile)."""
    import sys

    for name in _LAZY:
        if name in sys.modules:
            continue
        stand_in = _lazy_module_type()(name)
        stand_in.stand_in = True
        sys.modules[name] = stand_in


def register_functions() -> None:
    """Register every registry function in formulas' function table (idempotent)."""
    global _registered, _deferring
    if _registered:
        return
    defer_statistics()
    import formulas
    from formulas.functions import wrap_func

    _deferring = True
    try:
        table = formulas.get_functions()
    finally:
        _deferring = False
    for entry in REGISTRY:
        def cell_function(*args, _entry=entry):
            return call_registered(_entry, *args)

        cell_function.__name__ = entry.name
        table[entry.name] = wrap_func(cell_function)
    for name, axis in (("ROWS", 0), ("COLUMNS", 1)):
        table[name] = _counting_arrays_too(table[name], axis)
    _registered = True


# Calls of the functions that take tables (the network's), by their arguments' values: the
# cells of one network call NET_SOLVE on the same tables dozens of times, and reading the tables
# costs more than the engine's own cached solve.  A repeated call gives the stored result and
# records the stored notes on the new cell; values of other types are not kept.
_TABLE_CALLS: OrderedDict = OrderedDict()
_TABLE_CALLS_KEPT = 64
_KEY_TYPES = frozenset((float, int, bool, str, type(None)))


def _table_call_key(entry, args):
    """The key of a call by its arguments' values and types (1, 1.0 and TRUE differ), or None
    when an argument holds something else (a reference object, an Excel error)."""
    import numpy as np
    import schedula as sh

    parts: list = [entry.name]
    for arg in args:
        flat = arg.ravel().tolist() if isinstance(arg, np.ndarray) else [arg]
        kinds = tuple(map(type, flat))
        if not all(kind in _KEY_TYPES or value is sh.EMPTY for kind, value in zip(kinds, flat)):
            return None
        parts.append((np.shape(arg), tuple(flat), kinds))
    return tuple(parts)


def call_registered(entry, *args):
    """A registry function called as a formula cell calls it (what formulas runs for our
    functions): the cell path's result, a table as an array; its notes go to the active
    recorder and a rejection to the recorder's errors, both under its current cell."""
    import numpy as np

    recorder = NoteRecorder._active
    key = _table_call_key(entry, args) if entry.has_table else None
    stored = _TABLE_CALLS.get(key) if key is not None else None
    if stored is not None:
        result, messages, error = stored
        _TABLE_CALLS.move_to_end(key)
        if recorder is not None:   # the call's notes, on this cell
            for message in messages:
                recorder.add(message)
            if error:
                getattr(recorder, "errors", []).append((recorder.current, result))
    else:
        before = len(recorder.notes) if recorder is not None else 0
        result = evaluate_cell(entry, *args)
        messages = tuple(m for _, m in recorder.notes[before:]) if recorder else ()
        error = isinstance(result, str) and recorder is not None and _is_error_result(
            entry, result, recorder.notes[before:])
        if error:
            getattr(recorder, "errors", []).append((recorder.current, result))
        if key is not None:
            _TABLE_CALLS[key] = (result, messages, error)
            if len(_TABLE_CALLS) > _TABLE_CALLS_KEPT:
                _TABLE_CALLS.popitem(last=False)
    if isinstance(result, list):
        return np.asarray(result, dtype=object)
    return result


def _counting_arrays_too(original, axis: int):
    """ROWS / COLUMNS that also count a computed array, as Excel and LibreOffice do
    (``ROWS(NET_SOLVE(...))`` is the rows of the solved table); formulas counts references only."""
    import numpy as np

    def count(value, *rest):
        if isinstance(value, np.ndarray) and not rest:
            shape = value.shape if value.ndim == 2 else (1, value.size)
            return shape[axis]
        return original(value, *rest)

    count.__name__ = getattr(original, "__name__", "count")
    return count


def _is_error_result(entry, result: str, new_notes) -> bool:
    """cells.evaluate returns a message instead of a value, and notes that same message, when it
    rejects a call; a function whose result is a number or a table never returns text otherwise."""
    if entry.result != "text":
        return True
    return any(message == result for _, message in new_notes)


@functools.lru_cache(maxsize=1)
def builtin_names() -> frozenset:
    """The names of the functions formulas implements (ours included once registered)."""
    import formulas
    return frozenset(formulas.get_functions())


_OPEN_ENDED = re.compile(r"^(?P<head>.*?\$?[A-Za-z]{1,3}\$?\d+):(?P<tail>\$?[A-Za-z]{0,3}\$?\d*)$")


def input_reference_text(key: str) -> str:
    """A compiled formula's input name in A1 notation: formulas shortens an area reaching the
    grid's last column or row ("A1:XFD3" -> "A1:3", "C5:C1048576" -> "C5:C", "B2:XFD1048576"
    -> "B2:")."""
    m = _OPEN_ENDED.match(key)
    if not m:
        return key
    tail = m.group("tail")
    letters = re.sub(r"[^A-Za-z]", "", tail)
    digits = re.sub(r"[^0-9]", "", tail)
    if letters and digits:
        return key
    return f"{m.group('head')}:{letters or 'XFD'}{digits or '1048576'}"


def compile_formula(text: str):
    """A prepared formula compiled by formulas, and its inputs' reference texts in the order
    the compiled function takes them."""
    from formulas import Parser
    function = Parser().ast("=" + text)[1].compile()
    return function, [str(key) for key in function.inputs]


# Functions formulas implements on the reference itself (its rows, columns, areas), not on the
# values: a compiled formula calling one must be given ``Ranges`` inputs, or they answer #VALUE!.
_REFERENCE_FUNCTIONS = re.compile(
    r"(?i)(?<![\w.])(?:_XLFN\.)?(?:ROW|COLUMN|ROWS|COLUMNS|AREAS|ISREF|INDEX|SINGLE)\(")


def reads_references(text: str) -> bool:
    """Whether a prepared formula calls a function that reads its argument as a reference."""
    return bool(_REFERENCE_FUNCTIONS.search(text))


def as_reference(key: str, values):
    """An input of a compiled formula as the library's reference object (``Ranges``): where it
    lies and its cells' values; None when the library cannot read ``key`` as a reference."""
    from formulas.errors import BaseError
    from formulas.ranges import Ranges
    try:
        return Ranges().push(key, values)
    except (BaseError, ValueError, AttributeError):
        return None


def fast_runner(function):
    """The compiled function run straight through (:func:`straight_line`) where that is
    possible, checked against the dispatcher on its first call; else the function itself."""
    fast = straight_line(function)
    return _Checked(function, fast) if fast is not None else function


def blank():
    """The value formulas takes for a blank cell."""
    import schedula as sh
    return sh.EMPTY


_FAST_OPERATORS = {"+": float.__add__, "-": float.__sub__, "*": float.__mul__,
                   "/": float.__truediv__, "^": float.__pow__}


def _number_of(value):
    """A single cell holding a number (not a logical value) as a float, else None."""
    import numpy as np
    if isinstance(value, np.ndarray):
        if value.shape != (1, 1):
            return None
        value = value[0, 0]
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer,
                                                                      np.floating)):
        return None
    return float(value)


def _fast_operator(operation, original):
    """Arithmetic on two single numbers directly (IEEE doubles, as Excel and numpy compute it);
    anything else - blanks, text, errors, ranges, division by zero, overflow - goes to the
    library's operator, which knows Excel's rules for those."""
    import numpy as np
    from formulas.functions import Array

    def run(a, b):
        x, y = _number_of(a), _number_of(b)
        if x is not None and y is not None:
            try:
                result = operation(x, y)
            except (ZeroDivisionError, OverflowError, ValueError):
                return original(a, b)
            if type(result) is float and math.isfinite(result):
                # The library's shape: a single cell's (1, 1) where an operand was a cell, 0-d
                # where both were plain numbers (a SUM's result divided by a constant).
                cell = isinstance(a, np.ndarray) or isinstance(b, np.ndarray)
                out = np.empty((1, 1) if cell else (), dtype=object)
                out[(0, 0) if cell else ()] = result
                return out.view(Array)
        return original(a, b)

    return run


class _Checked:
    """The straight-line runner, checked against the dispatcher on its first call."""

    def __init__(self, function, fast):
        self.function, self.fast, self.checked = function, fast, False

    def __call__(self, *args):
        if self.checked:
            return self.fast(*args)
        slow = self.function(*args)
        try:
            quick = self.fast(*args)
        except Exception:
            quick = None
        self.checked = True
        if quick is None or not _same_result(slow, quick):
            self.fast = self.function
        return slow


def _same_result(a, b) -> bool:
    import numpy as np
    try:
        return np.asarray(a, dtype=object).tolist() == np.asarray(b, dtype=object).tolist() and \
            type(a) is type(b)
    except Exception:
        return False


class _NotAvailable(Exception):
    """A function the library names but does not implement."""


def call_steps(function):
    """A compiled formula's node functions in dependency order, read from its dispatcher:
    ``(defaults, filters, steps, inputs, output)`` with ``steps`` as (node key, function, input
    names, output names), or None for dispatchers that use other features.  ``formulas`` builds
    one small schedula dispatcher per formula; its nodes are a tree, so running them in this
    order gives the dispatcher's result (:func:`straight_line`; the batches of
    :mod:`stillair.addin.workbook.vectorised`)."""
    dsp = function.dsp
    defaults = {k: v["value"] for k, v in dsp.default_values.items()}
    available = set(defaults) | set(function.inputs)
    steps, pending = [], []
    filters = {}
    for key, node in dsp.nodes.items():
        if node["type"] == "data":
            if set(node) - {"type", "wait_inputs", "filters", "index"}:
                return None
            if node.get("filters"):
                filters[key] = tuple(node["filters"])
        elif node["type"] == "function":
            # extra_inputs (INDEX's and a few others' compile-time flags) are already at the
            # head of the node's inputs, their values among the defaults.
            if set(node) - {"type", "inputs", "outputs", "function", "wait_inputs", "solve_cycle",
                            "index", "extra_inputs"}:
                return None
            pending.append((key, node))
        else:
            return None
    while pending:
        ready = [(k, n) for k, n in pending if set(n["inputs"]) <= available]
        if not ready:
            return None
        for key, node in ready:
            pending.remove((key, node))
            steps.append((key, node["function"], tuple(node["inputs"]), tuple(node["outputs"])))
            available |= set(node["outputs"])
    output = function.outputs[0]
    if output not in available:
        return None
    return defaults, filters, steps, tuple(function.inputs), output


def is_identity_filter(function) -> bool:
    """Whether a dispatcher's filter is schedula's ``bypass``, the identity formulas puts on a
    compiled formula's output (compared by name: the dispatcher may hold a copy of it)."""
    return getattr(function, "__module__", None) == "schedula.utils.dsp" and \
        getattr(function, "__qualname__", None) == "bypass"


def step_name(key: str) -> str:
    """The function or operator a dispatcher node calls: "+<0>" -> "+", "H_CAVITY<1>" -> "H_CAVITY"."""
    return key.split("<")[0]


def straight_line(function):
    """Run a compiled formula without its dispatcher: the same node functions called in
    dependency order (:func:`call_steps`).  The dispatcher's bookkeeping costs several times
    the arithmetic.  Returns None for dispatchers that use other features."""
    found = call_steps(function)
    if found is None:
        return None
    defaults, filters, calls, inputs, output = found
    steps = []
    for key, function_, ins, outs in calls:
        operator_ = _FAST_OPERATORS.get(step_name(key))
        if operator_ is not None and len(ins) == 2:
            function_ = _fast_operator(operator_, function_)
        steps.append((key, function_, ins, outs))

    def run(*args):
        data = dict(defaults)
        for key, value in zip(inputs, args):
            for f in filters.get(key, ()):
                value = f(value)
            data[key] = value
        for name, call, ins, outs in steps:
            try:
                result = call(*[data[i] for i in ins])
            except NotImplementedError:
                raise _NotAvailable(step_name(name)) from None
            if len(outs) == 1:
                results = (result,)
            else:
                results = tuple(result)
            for key, value in zip(outs, results):
                for f in filters.get(key, ()):
                    value = f(value)
                data[key] = value
        return data[output]

    return run


def compiled_function(function):
    """The library's compiled formula behind what :func:`fast_runner` gave."""
    return function.function if isinstance(function, _Checked) else function


def parse_problem(error: Exception, text: str) -> str:
    detail = " ".join(str(error).split())
    if "Not a valid formula" in detail:
        return "the evaluator cannot parse this formula"
    return f"the evaluator cannot compile this formula ({type(error).__name__})"


def run_problem(error: Exception) -> str:
    text = " ".join(str(error).split())
    m = re.search(r"DISPATCHING '([^']+)'", text)
    if m and "NotImplemented" in text:
        return f"function {m.group(1)} is not available headlessly"
    if isinstance(error, _NotAvailable):
        return f"function {error} is not available headlessly"
    return f"the evaluator failed on this formula ({type(error).__name__})"


def xl_error(code: str):
    from formulas.tokens.operand import XlError
    return XlError(code)


def is_xl_error(value) -> bool:
    from formulas.tokens.operand import XlError
    return isinstance(value, XlError)


def to_formulas(value):
    """A stored cell value as formulas takes it."""
    if isinstance(value, CellError):
        return xl_error(str(value))
    if value is None:
        import schedula as sh
        return sh.EMPTY
    return value


def plain(value):
    """A formulas value as a Python scalar: float, bool, str (errors as "#VALUE!"), None."""
    import numpy as np
    import schedula as sh

    if isinstance(value, np.ndarray):
        value = value.ravel()[0] if value.size else None
    if value is sh.EMPTY or value is None:
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        return float(value)
    return str(value)
