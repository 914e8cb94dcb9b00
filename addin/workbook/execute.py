"""Per-cell execution: one formula node calculated, and the status of every cell it fills.

A node's result is decided in one place (:func:`judge`): our function's own message, an Excel
error (its own, or following from one upstream), a value computed over an error upstream, a
value with range notes, or a plain value.  A node that cannot be calculated fills every member
with #N/A for its readers and the status "cannot-evaluate" (:func:`cannot_evaluate`).
"""

from __future__ import annotations

import math

from ..cells.callpath import NoteRecorder
from .formulas_bridge import as_reference, blank, is_xl_error, plain, run_problem, xl_error
from .formulatext import area_text, calls_in
from .reader import split_ref
from .status import CellResult, label

__all__ = ["CellRecorder", "calculate_node", "judge", "cannot_evaluate"]


class CellRecorder(NoteRecorder):
    """Notes as cells.NoteRecorder collects them, plus which results were error messages."""

    def __init__(self):
        super().__init__()
        self.errors: list[tuple[str | None, str]] = []


def magnitude(arg) -> float:
    """The largest finite number among (the first 10,000 of) a formula's argument's cells."""
    import numpy as np
    if type(arg) is np.ndarray and arg.size == 1:    # one cell, most arguments: no object copy
        return _finite_size(arg.flat[0])
    best = 0.0
    for v in np.asarray(arg, dtype=object).ravel()[:10_000]:
        best = max(best, _finite_size(v))
    return best


def _finite_size(value) -> float:
    """abs(value) for a finite number (not a boolean), else 0."""
    import numpy as np
    if isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(value, (bool, np.bool_)):
        size = abs(float(value))
        if math.isfinite(size):
            return size
    return 0.0


def cannot_evaluate(members, values, message: str, cause: str) -> dict:
    """Every member of a node that could not be calculated: #N/A to its readers."""
    for member in members:
        values[member] = xl_error("#N/A")
    return {member: CellResult(None, "cannot-evaluate", (message,), cause) for member in members}


def judge(value, raw, scale: float, where: str, own_errors, own_notes, upstream_error, *,
          name: bool = False) -> CellResult:
    """The status of one computed value.  ``raw`` is the library's value, ``value`` its plain
    form; ``upstream_error`` the first error among the cells the formula read.  A defined
    name's value keeps its notes under "value": only an error upstream matters to its readers."""
    messages: tuple[str, ...]
    if name:
        if upstream_error is not None:
            status, messages, cause = ("error", (f"depends on an error in {upstream_error.cause}",),
                                       upstream_error.cause)
        else:
            status, messages, cause = "value", own_notes, None
    elif own_errors and (value in own_errors or is_xl_error(raw)):
        status, messages, cause = "error", own_errors, where
    elif is_xl_error(raw) or (isinstance(value, float) and not math.isfinite(value)):
        if upstream_error is not None:
            status, messages, cause = ("error", (f"follows from the error in {upstream_error.cause}",),
                                       upstream_error.cause)
        else:
            status, messages, cause = "error", (f"Excel error {value}",), where
    elif upstream_error is not None:
        status, messages, cause = ("error", (f"depends on an error in {upstream_error.cause}",),
                                   upstream_error.cause)
    elif own_notes:
        status, messages, cause = "note", own_notes, None
    else:
        status, messages, cause = "value", (), None
    return CellResult(value, status, messages, cause, scale)


def _as_reference(model, key: str, reference, source, values):
    """An input as the library's reference object, for formulas that read where their
    arguments lie (ROW, ROWS, AREAS, ISREF, INDEX); a defined name of a plain area becomes that
    area.  Anything the library cannot read as a reference stays values."""
    if reference.kind == "area":
        # this cell's own area: ``key`` is the input's text in the formula the shape was compiled
        # from, and a row copied down shares that compiled function (its own rows differ)
        key = area_text(source, reference.r1, reference.c1, reference.r2, reference.c2)
    else:
        node = model.nodes.get(source) if source is not None else None
        if node is None or node.prepared is None or len(node.prepared.references) != 1 or \
                node.prepared.references[0].kind != "area" or node.sources[0] is None:
            return values
        area = node.prepared.references[0]
        key = area_text(node.sources[0], area.r1, area.c1, area.r2, area.c2)
    found = as_reference(key, values)
    return values if found is None else found


def _member_value(array, i: int, j: int):
    """The value an array formula's member (row i, column j of its range) shows, as Excel
    spreads a result over the range: a single value everywhere, a row or column repeated,
    #N/A beyond the result."""
    if array.shape == (1, 1):
        return array[0, 0]
    if i < array.shape[0] and j < array.shape[1]:
        return array[i, j]
    if array.shape[0] == 1 and j < array.shape[1]:
        return array[0, j]
    if array.shape[1] == 1 and i < array.shape[0]:
        return array[i, 0]
    return xl_error("#N/A")


def _reading_order(key) -> tuple:
    """A sort key: cells by sheet, row, column; defined names after them, by name."""
    try:
        row, col = split_ref(key[1])
        return (0, str(key[0]), row, col, "")
    except (ValueError, TypeError, IndexError):
        return (1, "", 0, 0, str(key))


def calculate_node(model, node, key, values, results, recorder, area_values, *,
                   in_loop: bool = False) -> dict:
    """Calculate one node of ``model``; returns the CellResult of each cell it fills and puts
    the library's values in ``values`` for the formulas that read them.  ``in_loop``: the node
    is one sweep's step of an iterated circular loop (else a loop's cell is not calculated)."""
    import numpy as np

    where = label(node.sheet, node.ref) if node.name is None else node.name
    members = [key] if node.name is not None else model.members(node)
    # the cells read that failed, in reading order (deps is a set: its order follows the hash
    # seed, and the cause a reader names must not change from run to run)
    upstream = sorted(((_reading_order(d), results[d]) for d in node.deps
                       if d in results and results[d].status in ("error", "cannot-evaluate")),
                      key=lambda found: found[0])
    failed = next((r for _, r in upstream if r.status == "cannot-evaluate"), None)
    problem = node.problem
    if key in model.cycles and problem is None and not in_loop:
        problem = (f"circular reference: the formula depends on its own value through the loop "
                   f"{model.loop_text(model.cycles[key])} (the workbook does not enable "
                   f"iterative calculation)")
    function = positions = reference_keys = None
    notes_before, errors_before = len(recorder.notes), len(recorder.errors)
    if problem is None and failed is None:
        # formulas computes a formula without references while compiling it: the notes of
        # such a call belong to this cell, so it is compiled for each cell.
        recorder.current = where
        try:
            function, positions, problem, reference_keys = model.compile(
                node, share=bool(node.prepared.references) or not calls_in(node.text))
        finally:
            recorder.current = None
    if problem is not None:
        return cannot_evaluate(members, values, f"cannot evaluate: {problem}", where)
    if failed is not None:
        return cannot_evaluate(members, values, f"depends on {failed.cause}, which cannot be evaluated",
                               failed.cause)
    assert function is not None and positions is not None  # compile gives both when no problem
    args = []
    scale = 0.0
    for position in positions:
        reference, source = node.prepared.references[position], node.sources[position]
        if reference.kind == "area":
            if source is None:
                args.append(np.asarray([[xl_error("#REF!")]], dtype=object))
                continue
            arg = area_values(source, reference)
        else:
            arg = model.name_value(source, values, area_values)
        scale = max(scale, magnitude(arg))
        if reference_keys is not None:
            arg = _as_reference(model, reference_keys[len(args)], reference, source, arg)
        args.append(arg)
    recorder.current = where
    try:
        raw = function(*args)
    except Exception as error:  # the library's failure on one formula spoils only it
        return cannot_evaluate(members, values, f"cannot evaluate: {run_problem(error)}", where)
    finally:
        recorder.current = None
    own_notes = tuple(m for c, m in recorder.notes[notes_before:])
    own_errors = tuple(m for c, m in recorder.errors[errors_before:])
    array = np.asarray(raw, dtype=object)
    if array.ndim < 2:
        array = array.reshape(1, -1) if array.ndim == 1 else array.reshape(1, 1)
    upstream_error = next((r for _, r in upstream if r.status == "error"), None)
    if node.name is not None:
        values[key] = array if array.size > 1 else array[0, 0]
        value = plain(array[0, 0]) if array.size else None
        return {key: judge(value, None, scale, where, own_errors, own_notes, upstream_error,
                           name=True)}
    out = {}
    empty = blank()
    ours = any(call.ours for call in calls_in(node.text))
    r0, c0 = (node.array[0], node.array[1]) if node.array else (node.row, node.col)
    for member in members:
        row, col = split_ref(member[1])
        raw_value = _member_value(array, row - r0, col - c0)
        if raw_value is empty:
            raw_value = 0.0      # =A1 of a blank cell shows 0, and its readers see a 0, not a blank
        values[member] = raw_value
        value = plain(raw_value)
        own = abs(value) if isinstance(value, float) and math.isfinite(value) else 0.0
        # Each value against its own scale where the formula calls our functions (a spilled
        # table's 1e-5 K/W beside a Ra of 1e9; our results are not differences of their
        # inputs); a built-in formula can cancel what it reads (a balance residual), so its
        # round-off floor scales with the largest number it reads.
        member_scale = own if ours else max(scale, own)
        out[member] = judge(value, raw_value, member_scale, where, own_errors, own_notes,
                            upstream_error)
    return out
