"""Cells of one formula shape calculated together: one engine call for a whole column of cells.

A row copied down gives thousands of cells of one shape (``=H_CAVITY(A2,B2,C2,D2)``, the next
row ``...A3...``).  The engine's functions take arrays, so the cells of one shape that do not
read one another are calculated as one call on arrays (:class:`Batch`), the way a range given to
a cell function is (``cells.callpath.evaluate_arrays``).  The result of each cell must be the one
it gets alone (:func:`stillair.addin.workbook.execute.calculate_node`), notes and messages on
the cell that caused them, so a batch is only a shortcut for the plain case:

* a shape qualifies (:func:`plan_of`) when its formula is arithmetic (+ - * / ^, unary minus) on
  numbers, the library's element-by-element functions (ROUND, SQRT...) and calls of our
  functions that take numbers and give a number or a text, every input a single cell;
* a cell joins the batch when every input it reads is a finite number and nothing upstream is an
  error or could not be calculated;
* the part of a batch whose call gives a range note, a warning, an exception or a non-finite
  value is split in halves and tried again, down to single cells, which go the usual way, so
  each note and each message lands on its own cell;
* one note is worded for a whole call, not for any of its elements: temperatures that all look
  like kelvin (:data:`stillair.plausibility.KELVIN_LOOKING`).  An array call mixing a cell that
  gets it alone with cells that do not gives no note; so a call of a function of temperatures
  (°C arguments) is trusted only where every element has the same of those arguments inside
  that span (then the call notes exactly when each of its cells alone would, whichever of them
  the function checks), and a part that mixes them is split like a part with a note.
"""

from __future__ import annotations

from typing import Any

import math
import warnings
from dataclasses import dataclass

import numpy as np

from stillair.plausibility import KELVIN_LOOKING

from ..cells.callpath import evaluate_arrays
from ..cells.registry import BY_NAME
from .execute import calculate_node, judge
from .formulas_bridge import (call_registered, call_steps, compiled_function, is_identity_filter,
                              plain, step_name)
from .status import label

__all__ = ["Plan", "plan_of", "calculate_batch", "SMALLEST_BATCH"]

# Parts of a batch smaller than this are calculated cell by cell, and a part that fails is
# halved only while its halves are at least this long: an array call costs about as much as a
# few dozen single calls (H_CAVITY: ~1 ms against ~50 us), so trying smaller parts, where notes
# crowd, costs more than it saves.
SMALLEST_BATCH = 32

# The operators a plan computes on arrays: IEEE doubles, as the single-cell path computes them
# (formulas_bridge._fast_operator); a non-finite element leaves the batch (Excel's #DIV/0!, #NUM!).
_OPERATORS = {"+": np.add, "-": np.subtract, "*": np.multiply, "/": np.divide, "^": np.power}
_UNARY = {"u-": np.negative}
# The library's functions that compute element by element (formulas' wrap_ufunc): given a column
# they give each cell's own result, and an error anywhere makes the whole column an error, which
# sends it back to single cells.
_ELEMENTWISE = frozenset(("ROUND", "ROUNDUP", "ROUNDDOWN", "ABS", "SQRT", "EXP", "LN", "LOG10",
                          "POWER", "SIN", "COS", "TAN", "RADIANS", "DEGREES"))


@dataclass(frozen=True, slots=True)
class Plan:
    """A compiled shape as array operations: constants, steps (operator or registry entry, input
    names, output name), the compiled inputs' names and the output's."""

    constants: tuple
    steps: tuple
    inputs: tuple
    output: str
    ours: bool          # the formula calls one of our functions (the scale rule of execute)
    single: object = None   # the registry entry when the formula is one call of its inputs


def plan_of(function, ours: bool) -> Plan | None:
    """The array plan of a compiled formula, or None when any part of it needs the library.
    ``ours``: the formula's text calls one of our functions."""
    found = call_steps(compiled_function(function))
    if found is None:
        return None
    defaults, filters, calls, inputs, output = found
    if not inputs or any(not is_identity_filter(f) for found in filters.values() for f in found):
        return None     # a filter that changes a value (the output's own is an identity)
    constants = []
    for key, value in defaults.items():
        if isinstance(value, np.ndarray) and value.shape == ():
            value = value.item()    # a negative constant: the library's 0-d array
        if type(value) not in (int, float) or not math.isfinite(value):
            return None     # a text, a logical value or a precomputed message
        constants.append((key, float(value)))
    steps: list[tuple[Any, Any, Any]] = []
    for key, function, ins, outs in calls:
        name = step_name(key)
        if len(outs) != 1:
            return None
        if name in _OPERATORS and len(ins) == 2:
            steps.append((_OPERATORS[name], ins, outs[0]))
            continue
        if name in _UNARY and len(ins) == 1:
            steps.append((_UNARY[name], ins, outs[0]))
            continue
        if name.upper() in _ELEMENTWISE:
            steps.append((_Library(function), ins, outs[0]))
            continue
        entry = BY_NAME.get(name.upper())
        if entry is None or entry.plain is None or not entry.takes_arrays or \
                entry.result not in ("number", "text") or \
                not entry.plain[0] <= len(ins) <= len(entry.args) or \
                any(arg.kind != "number" for arg in entry.args[:len(ins)]):
            return None
        steps.append((entry, ins, outs[0]))
    single = steps[0][0] if len(steps) == 1 and not constants and \
        steps[0][1] == tuple(inputs) and not callable(steps[0][0]) else None
    return Plan(tuple(constants), tuple(steps), tuple(inputs), output, ours, single)


@dataclass(frozen=True, slots=True)
class _Library:
    """One of the library's element-by-element functions (:data:`_ELEMENTWISE`) on columns."""

    function: Any

    def __call__(self, args, size: int):
        cells: list = np.asarray(self.function(*args), dtype=object).ravel().tolist()
        if len(cells) != size or any(type(cell) is not float for cell in cells):
            raise ValueError("not a number in every cell")   # the cells, one by one
        return np.array(cells, dtype=float)


def _temperature_positions(entry) -> tuple[int, ...]:
    """Where ``entry`` takes temperatures (its °C arguments), from the cell registry."""
    found = _TEMPERATURES.get(entry.name)
    if found is None:
        found = _TEMPERATURES[entry.name] = tuple(i for i, arg in enumerate(entry.args) if arg.unit == "°C")
    return found


_TEMPERATURES: dict[str, tuple[int, ...]] = {}


def _mixes_kelvin_looking(entry, columns) -> bool:
    """Whether the elements of a call differ in which of their temperatures look like kelvin
    (the module docstring says why such a call is not trusted): the same pattern in every
    element is each temperature column wholly inside the span or wholly outside."""
    low, high = KELVIN_LOOKING
    for i in _temperature_positions(entry):
        if i < len(columns):
            inside = (columns[i] >= low) & (columns[i] <= high)
            if inside.any() and not inside.all():
                return True
    return False


def _run(plan: Plan, columns: list, size: int):
    """The plan on input columns: the output (one element per cell), or None when any part of
    the call gave a note, a warning or an exception, or an element is not a finite number or a
    text."""
    data = dict(plan.constants)
    data.update(zip(plan.inputs, columns))
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            with np.errstate(all="ignore"):
                for step, ins, out in plan.steps:
                    args = [data[i] for i in ins]
                    if isinstance(step, np.ufunc):
                        data[out] = step(*args)
                        continue
                    if isinstance(step, _Library):
                        data[out] = step(args, size)
                        continue
                    columns = [np.broadcast_to(np.asarray(a, dtype=float), (size,)) for a in args]
                    if _mixes_kelvin_looking(step, columns):
                        return None
                    value, notes = evaluate_arrays(step, *columns)
                    if notes:
                        return None
                    data[out] = value
        except Exception:  # the cells, one by one, word it on the cell that caused it
            return None
    if caught:
        return None
    result = np.broadcast_to(np.asarray(data[plan.output]), (size,))
    if result.dtype.kind == "f":
        return result.tolist() if np.isfinite(result).all() else None
    cells = result.tolist()
    return cells if all(type(cell) is str for cell in cells) else None


def _inputs_of(model, node, results, cell_value):
    """A cell's input numbers in the order of its references, or None when it must go the usual
    way (an input that is not a finite number, an error or a failure upstream)."""
    for dep in node.deps:
        found = results.get(dep)
        if found is not None and found.status not in ("value", "note"):
            return None
    numbers = []
    for source, ref in model.single_cells(node):
        value = cell_value(source, ref)
        if type(value) not in (float, int) or not math.isfinite(value):
            return None
        numbers.append(float(value))
    return numbers


def _calculate_call(plan: Plan, key, numbers, scale: float, values, results, recorder) -> None:
    """One cell whose formula is one call of our function on its inputs, which are finite
    numbers: the call a formula cell makes (``formulas_bridge.call_registered``) and the status
    :func:`calculate_node` gives it, without the library's wrappers around the call."""
    where = label(*key)
    notes, errors = len(recorder.notes), len(recorder.errors)
    recorder.current = where
    try:
        raw = call_registered(plan.single, *numbers)
    finally:
        recorder.current = None
    array = np.asarray(raw, dtype=object).reshape(-1)
    value = array[0] if array.size else raw
    values[key] = value
    plain_value = plain(value)
    own = abs(plain_value) if isinstance(plain_value, float) and math.isfinite(plain_value) else 0.0
    results[key] = judge(plain_value, value, own if plan.ours else max(scale, own), where,
                         tuple(m for _, m in recorder.errors[errors:]),
                         tuple(m for _, m in recorder.notes[notes:]), None)


def calculate_batch(model, keys, values, results, recorder, area_values, cell_value) -> None:
    """Calculate cells of one shape that do not read one another (``keys``, in calculation
    order): together where :mod:`this module <stillair.addin.workbook.vectorised>` allows, else
    each on its own; results and values land as :func:`calculate_node` puts them.
    ``cell_value(sheet, ref)``: a cell's value as the formulas read it."""
    first, rest = keys[0], keys[1:]
    # The first cell goes the usual way: it compiles the shape (a note of the compile is its).
    results.update(calculate_node(model, model.nodes[first], first, values, results, recorder,
                                  area_values))
    plan, positions = model.plan(model.nodes[first]) if rest else (None, None)
    batched: list[tuple[Any, Any]] = []
    alone: list[tuple[Any, Any]] = []
    for key in rest:
        numbers = _inputs_of(model, model.nodes[key], results, cell_value) if plan else None
        (alone if numbers is None else batched).append((key, numbers))
    for key, _ in alone:
        results.update(calculate_node(model, model.nodes[key], key, values, results, recorder,
                                      area_values))
    if not batched:
        return
    assert plan is not None and positions is not None   # batched only with a plan
    table = np.array([numbers for _, numbers in batched], dtype=np.float64)   # cells x references
    # Cells alike in which inputs look like kelvin side by side (stable, else as calculated):
    # a part mixing them is not trusted (_mixes_kelvin_looking), so the parts that must be
    # split are the few at the seams, not every part of a column where they alternate.
    low, high = KELVIN_LOOKING
    inside = (table >= low) & (table <= high)
    if inside.any():
        order = np.lexsort(inside.T[::-1]).tolist()
        batched, table = [batched[i] for i in order], table[order]
    scales = np.abs(table).max(axis=1)
    # (start, stop, sibling): a half of a part that failed names its first half's start, so
    # that once the first half went through, the second is known to fail untried (what failed
    # the whole is in it); the whole batch and first halves have no sibling (None).
    parts: list[tuple[int, int, int | None]] = [(0, len(batched), None)]
    known_to_fail: set[tuple[int, int]] = set()     # such second halves
    while parts:
        start, stop, _ = parts.pop()
        size = stop - start
        out = None
        if size >= SMALLEST_BATCH and (start, stop) not in known_to_fail:
            out = _run(plan, [table[start:stop, p] for p in positions], size)
        if out is None:
            if size >= 2 * SMALLEST_BATCH:
                middle = (start + stop) // 2
                parts.extend(((middle, stop, start), (start, middle, None)))
                continue
            for (key, numbers), scale in zip(batched[start:stop], scales[start:stop].tolist()):
                if plan.single is not None:
                    _calculate_call(plan, key, [numbers[p] for p in positions], scale, values,
                                    results, recorder)
                else:
                    results.update(calculate_node(model, model.nodes[key], key, values, results,
                                                  recorder, area_values))
            continue
        for (key, _), value, scale in zip(batched[start:stop], out, scales[start:stop].tolist()):
            values[key] = value
            own = abs(value) if type(value) is float else 0.0
            results[key] = judge(value, value, own if plan.ours else max(scale, own),
                                 label(*key), (), (), None)
        if parts and parts[-1][2] == start and parts[-1][0] == stop:   # this was a first half
            known_to_fail.add(parts[-1][:2])
