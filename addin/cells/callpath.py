"""Calling engine functions the way a cell does: coerce, compute, catch, shape.

:func:`evaluate` is the single entry point every cell function goes through, from xlwings
(:mod:`stillair.addin.xlfuncs`) and from the headless evaluator (:mod:`stillair.addin.workbook.model`) alike.  It never
raises: invalid input becomes a short message naming the function, the argument, the value and
what is allowed; a correlation used outside its range still returns the number and the note is
handed to the active :class:`NoteRecorder` (used by ``stillair calc``).
"""

from __future__ import annotations

import numpy as np

from .coerce import CellInputError, describe, is_blank, to_cell_table, to_cell_value, to_number, to_table, to_text
from .registry import BY_NAME, CellFunction

__all__ = ["evaluate", "evaluate_arrays", "call", "NoteRecorder", "engine_callable", "MAX_MESSAGE"]

MAX_MESSAGE = 255  # a message must stay readable in a cell and in Excel's function wizard

# Columns of the network tables that hold names (branch name, from, to; boundary node).
_NAME_COLUMNS = {"branches": (0, 1, 2), "boundaries": (0,), "capacities": (0,), "series": (0,)}
# Text arguments that are names and may be typed as numbers.
_NAME_ARGS = {"node", "branch", "at"}


class NoteRecorder:
    """Collects (cell, message) notes from cell evaluations while active.

    ``cell`` is whatever the caller set as :attr:`current` (the headless evaluator sets the
    formula cell being computed); notes of one cell are kept once, in order.
    """

    _active: "NoteRecorder | None" = None

    def __init__(self):
        self.current: str | None = None
        self.notes: list[tuple[str | None, str]] = []

    def add(self, message: str) -> None:
        item = (self.current, message)
        if item not in self.notes:
            self.notes.append(item)

    def __enter__(self):
        self._previous, NoteRecorder._active = NoteRecorder._active, self
        return self

    def __exit__(self, *exc):
        NoteRecorder._active = self._previous
        return False


def _note(message: str) -> None:
    if NoteRecorder._active is not None:
        NoteRecorder._active.add(message)


_engine: dict = {}  # the engine module and its validity module, once imported (engine_callable)


def _engine_modules():
    if not _engine:
        import stillair
        import stillair.validity
        _engine.update(stillair=stillair, validity=stillair.validity)
    return _engine


def engine_callable(entry: CellFunction):
    """The engine attribute the entry names, or None while the engine does not provide it.

    ``stillair`` (the engine) is imported here, on first use, not with this module: importing it takes about
    0.2 s (numpy, scipy), which `stillair functions` and `excel-setup` do not need.  CoolProp
    itself loads only if a gas table has to be computed."""
    return getattr(_engine.get("stillair") or _engine_modules()["stillair"], entry.engine, None)


def _coerce(entry: CellFunction, raw: tuple, arrays: bool = False) -> dict:
    """Keyword arguments for the engine; with ``arrays``, float arrays (already coerced
    element by element) pass through."""
    kwargs: dict[str, object] = {}
    for arg, value in zip(entry.args, raw):
        default = arg.default if arg.optional else None
        if arrays and isinstance(value, np.ndarray) and value.dtype == float:
            kwargs[arg.keyword] = value
        elif arg.kind == "number":
            kwargs[arg.keyword] = to_number(arg.name, value, arg.optional, default)
        elif arg.kind == "text":
            kwargs[arg.keyword] = to_text(arg.name, value, arg.optional, default,
                                          allow_numbers=arg.name in _NAME_ARGS)
        elif arg.kind == "table":
            kwargs[arg.keyword] = default if arg.optional and _blank_range(value) else \
                to_table(arg.name, value, _NAME_COLUMNS.get(arg.name, ()))
        else:  # pragma: no cover - the registry tests forbid other kinds
            raise RuntimeError(f"unknown argument kind {arg.kind!r}")
    return kwargs


def _blank_range(value) -> bool:
    """A blank cell, or a range of blank cells (an optional table left empty)."""
    return all(is_blank(v) for v in np.asarray(value, dtype=object).ravel())


def _noting_result_notes(function, sink: list):
    """Report a network result's range notes like a correlation's, so every cell that uses the
    solve (NET_SOLVE, NET_TEMP, ...) carries them.  The engine caches the solve itself: the
    cells of one network share it."""

    def solve(**kwargs):
        result = function(**kwargs)
        sink.extend(str(note) for note in getattr(result, "notes", ()))
        return result

    return solve


def _message(entry: CellFunction, argument: str, allowed: str, value) -> str:
    cell_names = {a.keyword: a.name for a in entry.args}
    argument = cell_names.get(argument, argument)
    return f"{entry.name}: {argument} must be {allowed}, got {describe(value)}"


def _short(text: str) -> str:
    text = " ".join(str(text).split())
    return text if len(text) <= MAX_MESSAGE else text[:MAX_MESSAGE - 3] + "..."


class _Missing(Exception):
    """The registry names an engine attribute this engine version does not have."""


def _compute(entry: CellFunction, kwargs: dict):
    """Call the engine with coerced arguments; the range notes it gives are recorded.

    The engine hands its range notes to a list while the call runs
    (``stillair.validity.collect_range_notes``: the notes it would warn as
    CorrelationRangeWarning, each one as issued); they are recorded only if the call returns."""
    target = engine_callable(entry)
    if target is None:
        raise _Missing()
    notes: list[str] = []
    token = _engine["validity"].collect_range_notes(notes)
    try:
        if not entry.call:
            value = target
        else:
            if entry.has_table:
                target = _noting_result_notes(target, notes)
            value = entry.invoke(target, kwargs) if entry.invoke else target(**kwargs)
    finally:
        _engine["validity"]._NOTE_SINK.reset(token)
    for message in notes:
        _note(_short(f"{entry.name}: {_strip_function(message)}"))
    return value


def _ranges(entry: CellFunction, raw: tuple) -> dict[int, np.ndarray]:
    """The numeric arguments given as ranges of more than one cell, as 2-D object arrays
    (a flat list, as xlwings passes a one-row range, is one row)."""
    if not entry.takes_arrays:
        return {}
    found = {}
    for index, (arg, value) in enumerate(zip(entry.args, raw)):
        if arg.kind == "number" and isinstance(value, (list, tuple, np.ndarray)):
            array = np.asarray(value, dtype=object)
            if array.size > 1:
                found[index] = array.reshape(1, -1) if array.ndim < 2 else array
    return found


def _evaluate_ranges(entry: CellFunction, raw: tuple, ranges: dict[int, np.ndarray]):
    """A call with ranges: an array of the broadcast shape, as Excel's own functions give.

    The engine is called once on the whole arrays; if any element is bad (text, blank where a
    number is needed, out of the allowed range), each element is computed on its own so that
    only the bad ones show their message."""
    try:
        shape = np.broadcast_shapes(*(a.shape for a in ranges.values()))
    except ValueError:
        sizes = " and ".join(f"{a.shape[0]}x{a.shape[1]}" for a in ranges.values())
        message = _short(f"{entry.name}: ranges of {sizes} cells do not combine; give ranges of "
                         "the same shape, or one column and one row")
        _note(message)
        return message
    if len(shape) != 2:
        raise ValueError("ranges must be at most two-dimensional")
    spread = {i: np.broadcast_to(a, shape) for i, a in ranges.items()}
    try:
        if entry.invoke is not None:  # it does more than call a broadcasting function
            raise NotImplementedError
        with NoteRecorder() as trial:  # notes count only if the whole-array call stands
            kwargs = _coerce(entry, tuple(
                np.vectorize(lambda v, a=arg: to_number(a.name, v, a.optional,
                                                        a.default if a.optional else None),
                             otypes=[float])(spread[i]) if i in spread else value
                for i, (arg, value) in enumerate(zip(entry.args, raw))), arrays=True)
            values = np.broadcast_to(np.asarray(_compute(entry, kwargs), dtype=object), shape)
            cells = [[to_cell_value(v) for v in row] for row in values]
    except Exception:
        return [[evaluate(entry, *(spread[i][r, c] if i in spread else v for i, v in enumerate(raw)))
                 for c in range(shape[1])] for r in range(shape[0])]
    for _, message in trial.notes:
        _note(message)
    return cells


def _plain_kwargs(plain: tuple, raw: tuple) -> dict | None:
    """The engine's keyword arguments, equal to what :func:`_coerce` gives, when every value is
    one the cell passes on as it is: a float or int (not a logical value) for a number, a text
    that is not blank for a text, None (omitted) for an optional argument.  None when anything
    else arrives (a range, a blank text, a wrong type, a missing required value): the general
    coercion handles it and words any message.  ``plain`` is ``CellFunction.plain``."""
    required, defaults, args = plain
    if not required <= len(raw) <= len(args):
        return None
    kwargs = dict(defaults)
    for (keyword, text), value in zip(args, raw):
        kind = type(value)
        if kind is float and not text:
            kwargs[keyword] = value
        elif value is None:
            if keyword not in kwargs:  # a required argument left blank
                return None
        elif text:
            if kind is not str or not value.strip():
                return None
            kwargs[keyword] = value.strip()
        elif kind is int:
            kwargs[keyword] = float(value)
        else:
            return None
    return kwargs


def evaluate(entry: CellFunction, *raw):
    """Compute one cell function call; returns a cell value, a 2-D list (a table, or an array
    when numeric arguments are ranges) or an error message (str)."""
    validity = _engine.get("validity") or _engine_modules()["validity"]  # see engine_callable
    try:
        kwargs = _plain_kwargs(entry.plain, raw) if entry.plain is not None else None
        if kwargs is None:  # anything but plain numbers and texts: the general coercion
            if len(raw) > len(entry.args):
                raise ValueError(f"takes at most {len(entry.args)} arguments, got {len(raw)}")
            raw = tuple(raw) + (None,) * (len(entry.args) - len(raw))
            ranges = _ranges(entry, raw)
            if ranges:
                return _evaluate_ranges(entry, raw, ranges)
            kwargs = _coerce(entry, raw)
        value = _compute(entry, kwargs)
        if entry.result == "table":
            return to_cell_table(value)
        if type(value) is float and value - value == 0.0:  # finite: to_cell_value's own answer
            return value
        return to_cell_value(value)
    except _Missing:
        return _short(f"{entry.name}: not available in this engine version "
                      f"(stillair.{entry.engine} is missing)")
    except validity.InputError as error:
        if type(error).render is not validity.InputError.render:  # the error words its own value
            message = _short(error.render(entry.name))
        else:
            message = _short(_message(entry, error.argument, error.allowed, error.value))
    except CellInputError as error:
        message = _short(_message(entry, error.argument, error.allowed, error.value))
    except Exception as error:  # a cell must never show a traceback
        message = _short(f"{entry.name}: {type(error).__name__}: {error}"
                         if not str(error) else f"{entry.name}: {error}")
    _note(message)
    return message


def evaluate_arrays(entry: CellFunction, *raw) -> tuple:
    """One engine call over float arrays given for number arguments (the headless evaluator's
    batch of cells of one shape): the engine's result and the notes the call gave, worded as
    :func:`evaluate` words them.  Raises where a cell would show a message; the caller then
    evaluates cell by cell, so every message keeps its cell."""
    with NoteRecorder() as trial:
        value = _compute(entry, _coerce(entry, tuple(raw) + (None,) * (len(entry.args) - len(raw)),
                                        arrays=True))
    return value, [message for _, message in trial.notes]


def _strip_function(message: str) -> str:
    """Drop the engine's own "function_name: " prefix from a note; the cell name replaces it."""
    head, sep, rest = message.partition(": ")
    if sep and head.replace("_", "").isalnum() and head == head.lower():
        return rest
    return message


def call(name: str, *raw):
    """Evaluate a cell function by name, as a cell would: ``call("AIR_DENSITY", 20.0)``."""
    return evaluate(BY_NAME[name.upper()], *raw)
