"""Evaluate a workbook without Excel: our cell functions and Excel's built-ins.

The workbook is read once (:func:`stillair.addin.workbook.reader.read_book`).  Each formula is prepared on
its own (:func:`stillair.addin.workbook.formulatext.prepare`) and compiled by the ``formulas`` library;
formulas of the same shape (a row copied down) share one compiled function.  This module then
calculates the cells itself, in dependency order, so that

* a formula the evaluator cannot read or has no implementation for spoils only that cell and the
  cells that depend on it: they get the status "cannot-evaluate" with the construct named, and
  everything else is calculated;
* only the cells a job needs are calculated (:class:`Model` takes the cells of interest; the
  audit passes ours, their precedents and their dependents);
* a model is built once and calculated many times (``--set`` values, sweeps);
* whole rows and columns cost what the sheet's used range costs.

Every formula cell gets a :class:`CellResult`: its value and whether that value is a plain value,
a value with range notes, an error (one of our functions' messages, an Excel error, or a value
computed over an error upstream) or could not be evaluated.  Commands read this status; none of
them infers an error from the shape of a text.

Facts about formulas 1.3.4 relied on (checked by tests/test_headless.py): custom functions are
registered in ``formulas.get_functions()`` before compiling and wrapped with
``formulas.functions.wrap_func``; a compiled formula takes its inputs in ``inputs`` order as 2-D
object arrays with ``schedula.EMPTY`` for blank cells; an unknown function fails only when called.
"""

from __future__ import annotations

import logging
import math
import os
import re
import time
from dataclasses import dataclass, field

os.environ.setdefault("TQDM_DISABLE", "1")  # formulas shows a progress bar while compiling

from ..cells.callpath import NoteRecorder, evaluate as evaluate_cell  # noqa: E402
from .formulatext import Reference, calls_in, parse_reference, prepare  # noqa: E402
from ..cells.registry import REGISTRY  # noqa: E402
from .reader import Book, BookError, CellError, index_to_col, read_book, split_ref  # noqa: E402

__all__ = ["register_functions", "Evaluation", "CellResult", "Model", "evaluate_book",
           "parse_value", "resolve_target", "STATUSES"]

# What a formula cell's value is: a plain value, a value with validity notes, an error, or
# nothing because the evaluator cannot calculate the formula (or one it depends on).
STATUSES = ("value", "note", "error", "cannot-evaluate")

_registered = False

# Bounds on the work of one calculation: the cells all formulas read together (ranges cut to
# the used range), and the cells of the range arrays kept for reuse.
MAX_CELLS_READ = 50_000_000
_AREA_CACHE_CELLS = 5_000_000


class _CellRecorder(NoteRecorder):
    """Notes as cells.NoteRecorder collects them, plus which results were error messages."""

    def __init__(self):
        super().__init__()
        self.errors: list[tuple[str | None, str]] = []


_LAZY = "scipy.stats"


def _lazy_module_type():
    import types

    class LazyModule(types.ModuleType):
        """Stands in for a module until an attribute of it is first used."""

        def __getattr__(self, attribute):
            return getattr(_real_module(self.__name__), attribute)

    return LazyModule


def _real_module(name: str):
    import importlib
    import sys
    if getattr(sys.modules.get(name), "stand_in", False):
        del sys.modules[name]
    return importlib.import_module(name)


def defer_statistics() -> None:
    """Import scipy.stats when a statistics function first needs it, not with formulas.

    formulas' function table imports its statistics module, which imports scipy.stats at the
    top (about a second of CPU in every command), although MAX, MIN, AVERAGE... never use it.
    A stand-in module takes scipy.stats' place until one of its attributes is used; then the
    real module is imported and answers (tests/test_headless.py checks a distribution)."""
    import sys

    if _LAZY in sys.modules:
        return
    stand_in = _lazy_module_type()(_LAZY)
    stand_in.stand_in = True
    sys.modules[_LAZY] = stand_in


def register_functions() -> None:
    """Register every registry function in formulas' function table (idempotent)."""
    global _registered
    if _registered:
        return
    defer_statistics()
    import formulas
    import numpy as np
    from formulas.functions import wrap_func

    table = formulas.get_functions()
    for entry in REGISTRY:
        def cell_function(*args, _entry=entry):
            recorder = NoteRecorder._active
            before = len(recorder.notes) if recorder is not None else 0
            result = evaluate_cell(_entry, *args)
            if isinstance(result, str) and recorder is not None and _is_error_result(
                    _entry, result, recorder.notes[before:]):
                getattr(recorder, "errors", []).append((recorder.current, result))
            if isinstance(result, list):
                return np.asarray(result, dtype=object)
            return result

        cell_function.__name__ = entry.name
        table[entry.name] = wrap_func(cell_function)
    _registered = True


def _is_error_result(entry, result: str, new_notes) -> bool:
    """cells.evaluate returns a message instead of a value, and notes that same message, when it
    rejects a call; a function whose result is a number or a table never returns text otherwise."""
    if entry.result != "text":
        return True
    return any(message == result for _, message in new_notes)


def parse_value(text: str):
    """A --set value: number, TRUE/FALSE, or text."""
    stripped = text.strip()
    if stripped.upper() in ("TRUE", "FALSE"):
        return stripped.upper() == "TRUE"
    try:
        return float(stripped)
    except ValueError:
        return text


_SHEET_REF_RE = re.compile(r"^(?:'((?:[^']|'')+)'|([^!]+))!\$?([A-Za-z]{1,3})\$?(\d+)$")


def resolve_target(book: Book, target: str) -> tuple[str, str]:
    """(sheet name, "B3") for "Sheet!B3", "'My sheet'!$B$3" or a defined name of one cell."""
    m = _SHEET_REF_RE.match(target.strip())
    if m:
        sheet_name = (m.group(1) or "").replace("''", "'") or m.group(2)
        try:
            sheet = book.sheet(sheet_name)
        except KeyError:
            raise BookError(f"--set {target}: no sheet named {sheet_name!r}") from None
        return sheet.name, f"{m.group(3).upper()}{m.group(4)}"
    for name in book.names:
        if name.name.lower() == target.strip().lower() and not name.name.startswith("_xlnm."):
            inner = _SHEET_REF_RE.match(name.text.strip().lstrip("="))
            if not inner:
                raise BookError(f"--set {target}: the name refers to {name.text}, not one cell")
            return resolve_target(book, name.text.strip().lstrip("="))
    raise BookError(f"--set {target}: not a cell reference (Sheet!B3) or a defined name of the workbook")


def _quote(sheet: str) -> str:
    return f"'{sheet}'" if re.search(r"[^A-Za-z0-9_.]", sheet) or sheet[:1].isdigit() else sheet


def label(sheet: str, ref: str) -> str:
    return f"{_quote(sheet)}!{ref}"


@dataclass(slots=True)
class CellResult:
    """What the evaluator made of one formula cell (array members each have their own)."""

    value: object                         # float, bool, str (Excel errors as "#N/A"), None
    status: str = "value"                 # one of STATUSES
    messages: tuple[str, ...] = ()        # range notes, the error, or what cannot be evaluated
    cause: str | None = None              # the upstream cell an error or failure comes from
    scale: float = 0.0                    # largest magnitude among the numbers the formula read


@dataclass
class Evaluation:
    """Result of evaluating a workbook headlessly."""

    book: Book
    values: dict[str, dict[str, object]]       # sheet -> ref -> value (formula cells only)
    names: dict[str, object]                    # defined name -> value
    notes: list[tuple[str, str]]                # (cell "Sheet!B3" or "", message)
    load_seconds: float
    calc_seconds: float
    sets: dict[tuple[str, str], object] = field(default_factory=dict)
    engine_seconds: float = 0.0                 # importing the engine and formulas
    results: dict[tuple[str, str], CellResult] = field(default_factory=dict)

    def flat_values(self) -> dict[str, object]:
        return {label(sheet, ref): value for sheet, cells in self.values.items()
                for ref, value in cells.items()}

    def status(self, sheet: str, ref: str) -> str | None:
        result = self.results.get((sheet, ref))
        return result.status if result is not None else None

    def writable_values(self) -> dict[str, dict[str, object]]:
        """Values to store as cached values: every formula cell except those that could not be
        evaluated (their saved values are left as they were)."""
        return {sheet: {ref: value for ref, value in cells.items()
                        if self.status(sheet, ref) != "cannot-evaluate"}
                for sheet, cells in self.values.items()}

    @property
    def failed(self) -> list[tuple[str, CellResult]]:
        """Cells whose status is error or cannot-evaluate, labelled, in sheet order."""
        return [(label(s, r), res) for (s, r), res in self.results.items()
                if res.status in ("error", "cannot-evaluate")]


# ---------------------------------------------------------------------------------------------
# The model: prepared formulas, their dependencies, compiled functions shared by shape


@dataclass(slots=True)
class _Node:
    sheet: str
    ref: str                    # anchor ref ("" for a defined name's node)
    row: int
    col: int
    text: str                   # the workbook's formula, without "="
    prepared: object = None     # formulatext.Prepared
    array: tuple | None = None  # (r1, c1, r2, c2) for an array formula
    deps: set = field(default_factory=set)
    sources: list = field(default_factory=list)  # per reference: the sheet an area is on (None:
                                                 # no such sheet), a name's node key (None: undefined)
    compiled: object = None
    problem: str | None = None
    name: str | None = None     # a defined name's node: its label


class Model:
    """A workbook prepared for calculation; :meth:`calculate` runs it (as often as needed).

    ``cells``: the (sheet, ref) formula cells of interest, or None for all.  Only they, the cells
    they read (transitively) and the defined names they use are prepared and calculated."""

    def __init__(self, book: Book, cells=None):
        started = time.perf_counter()
        import formulas  # noqa: F401
        import stillair  # noqa: F401  (the engine: imported once, timed apart)
        register_functions()
        logging.getLogger("schedula").setLevel(logging.CRITICAL)  # unknown functions log tracebacks
        logging.getLogger("formulas").setLevel(logging.CRITICAL)
        self.engine_seconds = time.perf_counter() - started
        started = time.perf_counter()
        self.book = book
        self.sheet_case = {s.name.upper(): s.name for s in book.sheets}
        self.used = {s.name.upper(): (s.last_row, s.last_col) for s in book.sheets}
        self.sheets = {s.name: s for s in book.sheets}
        # Formula cells by position: sheet -> column -> sorted rows (array members point to
        # their anchor through ``owner``).
        self.owner: dict[tuple[str, str], tuple[str, str]] = {}
        self.columns: dict[str, dict[int, list[int]]] = {}
        for sheet in book.sheets:
            columns = self.columns.setdefault(sheet.name, {})
            for ref, cell in sheet.formulas.items():
                self.owner[(sheet.name, ref)] = (sheet.name, ref)
                row, col = split_ref(ref)
                columns.setdefault(col, []).append(row)
            for member, anchor in sheet.array_members.items():
                self.owner[(sheet.name, member)] = (sheet.name, anchor)
                row, col = split_ref(member)
                columns.setdefault(col, []).append(row)
            for rows in columns.values():
                rows.sort()
        self.names = {}
        for name in book.names:
            if name.name.startswith("_xlnm."):
                continue
            self.names[(name.sheet.upper() if name.sheet else None, name.name.upper())] = name
        self.nodes: dict[tuple, _Node] = {}
        self._compiled: dict[tuple, tuple] = {}
        self._templates: dict = {}     # formulas of one relative form share their preparation
        wanted = cells if cells is not None else [
            (s.name, ref) for s in book.sheets for ref in s.formulas]
        todo = list(wanted)
        while todo:
            key = todo.pop()
            if key in self.nodes:
                continue
            node = self._make_node(key)
            if node is None:
                continue
            self.nodes[key] = node
            todo.extend(d for d in node.deps if d not in self.nodes)
        self.order = self._order()
        self.load_seconds = time.perf_counter() - started

    # -- building -------------------------------------------------------------------------

    def _make_node(self, key) -> _Node | None:
        if key[0] == "#name":
            return self._name_node(key)
        sheet_name, ref = key
        sheet = self.sheets.get(sheet_name)
        cell = sheet.formulas.get(ref) if sheet is not None else None
        if cell is None:
            return None
        row, col = split_ref(ref)
        node = _Node(sheet_name, ref, row, col, cell.formula or "")
        if cell.array_ref:
            first, _, last = cell.array_ref.partition(":")
            r1, c1 = split_ref(first.replace("$", ""))
            r2, c2 = split_ref((last or first).replace("$", ""))
            node.array = (min(r1, r2), min(c1, c2), max(r1, r2), max(c1, c2))
        if cell.formula is None:
            node.problem = "the formula text is missing from the file (a damaged shared formula)"
            return node
        self._prepare(node)
        return node

    def _name_node(self, key) -> _Node | None:
        _, scope, upper = key
        entry = self.names.get((scope, upper))
        if entry is None:
            return None
        sheet = entry.sheet or (self.book.sheets[0].name if self.book.sheets else "")
        node = _Node(sheet, "", 1, 1, entry.text.strip().lstrip("="),
                     name=entry.name if entry.sheet is None else f"{_quote(entry.sheet)}!{entry.name}")
        self._prepare(node)
        return node

    def _prepare(self, node: _Node) -> None:
        prepared = prepare(node.text, node.row, node.col, self.used, node.sheet, self._templates)
        node.prepared = prepared
        if prepared.problem:
            node.problem = prepared.problem
        for reference in prepared.references:
            source = None
            if reference.kind == "area":
                source = self.sheet_case.get((reference.sheet or node.sheet).upper())
                node.deps |= self._area_deps(source, reference)
            elif reference.kind == "name":
                source = self._resolve_name(reference, node.sheet)
                if source is None:
                    node.problem = node.problem or f"the name {reference.name} is not defined"
                else:
                    node.deps.add(source)
            node.sources.append(source)

    def _resolve_name(self, reference: Reference, sheet: str):
        """A name as Excel resolves it: the formula's sheet's own name first, then the
        workbook's; ``Sheet!name`` looks only at that sheet's names."""
        upper = reference.name.upper()
        if reference.sheet is not None:
            scope = reference.sheet.upper()
            return ("#name", scope, upper) if (scope, upper) in self.names else None
        if (sheet.upper(), upper) in self.names:
            return ("#name", sheet.upper(), upper)
        if (None, upper) in self.names:
            return ("#name", None, upper)
        return None

    def _area_deps(self, target: str | None, reference: Reference) -> set:
        from bisect import bisect_left, bisect_right
        if target is None:
            return set()
        found = set()
        for col, rows in self.columns.get(target, {}).items():
            if reference.c1 <= col <= reference.c2:
                for row in rows[bisect_left(rows, reference.r1):bisect_right(rows, reference.r2)]:
                    owner = self.owner.get((target, f"{index_to_col(col)}{row}"))
                    if owner is not None:
                        found.add(owner)
        return found

    def _order(self) -> list:
        """Nodes in calculation order; a cycle's cells are reported, not calculated."""
        order, state = [], {}
        self.cycles: set = set()
        for start in self.nodes:
            if start in state:
                continue
            stack = [(start, iter(sorted(self.nodes[start].deps & self.nodes.keys(), key=str)))]
            state[start] = 1
            while stack:
                key, children = stack[-1]
                for child in children:
                    if state.get(child) == 1:
                        self.cycles.add(child)
                        self.cycles.add(key)
                    elif child not in state:
                        state[child] = 1
                        stack.append((child, iter(sorted(self.nodes[child].deps & self.nodes.keys(),
                                                          key=str))))
                        break
                else:
                    stack.pop()
                    state[key] = 2
                    order.append(key)
        return order

    def _compile(self, node: _Node, share: bool = True):
        """The compiled function for the node's shape, and which reference feeds each input."""
        from formulas import Parser

        prepared = node.prepared
        cached = self._compiled.get(prepared.key) if share else None
        if cached is None:
            try:
                function = Parser().ast("=" + prepared.text)[1].compile()
            except Exception as error:
                cached = (None, None, _parse_problem(error, node.text))
            else:
                positions = []
                wanted = [_reference_id(r, None) for r in prepared.references]
                for key in function.inputs:
                    ident = _reference_id(parse_reference(str(key)), None)
                    positions.append(wanted.index(ident) if ident in wanted else None)
                if None in positions:
                    cached = (None, None, "the evaluator reads this formula's references "
                              "differently from Excel")
                else:
                    fast = straight_line(function) if share else None
                    cached = (_Checked(function, fast) if fast is not None else function,
                              positions, None)
            if share:
                self._compiled[prepared.key] = cached
        return cached

    # -- the dependency graph -------------------------------------------------------------

    def _users(self) -> dict:
        users = getattr(self, "_users_cache", None)
        if users is None:
            users = {}
            for key, node in self.nodes.items():
                for dep in node.deps:
                    users.setdefault(dep, set()).add(key)
            self._users_cache = users
        return users

    def downstream(self, seeds) -> set:
        """The seed cells and every formula cell that depends on one (through names too)."""
        users = self._users()
        seen, todo = set(seeds), list(seeds)
        while todo:
            for user in users.get(todo.pop(), ()):
                if user not in seen:
                    seen.add(user)
                    todo.append(user)
        return {k for k in seen if k[0] != "#name"}

    def upstream(self, keys) -> set:
        """The cells and names the given cells read, transitively (the cells themselves too)."""
        seen, todo = set(keys), list(keys)
        while todo:
            node = self.nodes.get(todo.pop())
            for dep in (node.deps if node is not None else ()):
                if dep not in seen:
                    seen.add(dep)
                    todo.append(dep)
        return seen

    # -- calculating ----------------------------------------------------------------------

    def calculate(self, sets: dict[tuple[str, str], object] | None = None, only=None) -> Evaluation:
        """Calculate the model; ``sets`` maps (sheet, ref) to a value that replaces the cell;
        ``only`` limits the work to those cells and what they read."""
        import numpy as np
        import schedula as sh

        started = time.perf_counter()
        sets = dict(sets or {})
        values: dict[tuple[str, str], object] = {}     # computed values, formulas' own types
        results: dict = {}
        recorder = _CellRecorder()
        empty = sh.EMPTY

        def cell_value(sheet_name, ref):
            key = (sheet_name, ref)
            if key in sets:
                return _to_formulas(sets[key])
            if key in values:
                return values[key]
            sheet = self.sheets[sheet_name]
            if ref in sheet.values:
                return _to_formulas(sheet.values[ref])
            return empty

        def area_values(sheet_name, reference: Reference):
            if reference.r1 == reference.r2 and reference.c1 == reference.c2:
                array = np.empty((1, 1), dtype=object)
                array[0, 0] = cell_value(sheet_name, f"{index_to_col(reference.c1)}{reference.r1}")
                return array
            # Cells are calculated after every formula cell they read, so a range's values are
            # final when it is first read: later readers of the same range share the array.
            area_key = (sheet_name, reference.r1, reference.c1, reference.r2, reference.c2)
            array = area_cache.get(area_key)
            if array is not None:
                return array
            array = np.full((reference.r2 - reference.r1 + 1, reference.c2 - reference.c1 + 1),
                            empty, dtype=object)
            sheet = self.sheets[sheet_name]
            last_row, last_col = sheet.last_row, sheet.last_col
            letters = [index_to_col(c) for c in range(reference.c1, min(reference.c2, last_col) + 1)]
            for r in range(reference.r1, min(reference.r2, last_row) + 1):
                for j, column in enumerate(letters):
                    array[r - reference.r1, j] = cell_value(sheet_name, f"{column}{r}")
            if cached_cells[0] + array.size <= _AREA_CACHE_CELLS:
                cached_cells[0] += array.size
                area_cache[area_key] = array
            return array

        area_cache: dict = {}
        cached_cells = [0]
        needed = self.upstream(only) if only is not None else None
        self._check_volume(needed)
        from .safezip import offline
        with recorder, offline():   # nothing in a workbook may reach the network
            for key in self.order:
                node = self.nodes[key]
                if key in sets or (needed is not None and key not in needed):
                    continue
                results_here = self._calculate_node(node, key, values, results, recorder,
                                                    area_values)
                for member_key, result in results_here.items():
                    results[member_key] = result
        calculated = time.perf_counter()
        return self._evaluation(values, results, recorder, sets, calculated - started)

    def _check_volume(self, needed) -> None:
        """Refuse, before calculating, a workbook whose formulas would read more cells in all than
        the limit (each formula's ranges cut to the used range and counted per formula)."""
        total = 0
        for key, node in self.nodes.items():
            if needed is not None and key not in needed or node.prepared is None:
                continue
            for reference, source in zip(node.prepared.references, node.sources):
                if reference.kind != "area":
                    continue
                sheet = self.sheets.get(source)
                if sheet is None:
                    continue
                rows = max(0, min(reference.r2, sheet.last_row) - reference.r1 + 1)
                cols = max(0, min(reference.c2, sheet.last_col) - reference.c1 + 1)
                total += rows * cols
        if total > MAX_CELLS_READ:
            raise BookError(f"{self.book.path}: refused: its formulas read {total:,} cells in all "
                            f"(each formula's ranges counted), more than the limit of "
                            f"{MAX_CELLS_READ:,} that keeps calc and the audit bounded in time")

    def _calculate_node(self, node, key, values, results, recorder, area_values):
        import numpy as np

        where = label(node.sheet, node.ref) if node.name is None else node.name
        members = [key] if node.name is not None else self._members(node)
        upstream = [results.get(d) for d in node.deps if d in results]
        failed = next((r for r in upstream if r.status == "cannot-evaluate"), None)
        problem = node.problem
        if key in self.cycles and problem is None:
            problem = "circular reference: the formula depends on its own value"
        function = positions = None
        notes_before, errors_before = len(recorder.notes), len(recorder.errors)
        if problem is None and failed is None:
            # formulas computes a formula without references while compiling it: the notes of
            # such a call belong to this cell, so it is compiled for each cell.
            recorder.current = where
            try:
                function, positions, problem = self._compile(
                    node, share=bool(node.prepared.references) or not calls_in(node.text))
            finally:
                recorder.current = None
        if problem is not None or failed is not None:
            if problem is not None:
                message, cause = f"cannot evaluate: {problem}", where
            else:
                cause = failed.cause
                message = f"depends on {cause}, which cannot be evaluated"
            out = {}
            for member in members:
                values[member] = _xl_error("#N/A")
                out[member] = CellResult(None, "cannot-evaluate", (message,), cause)
            return out
        args = []
        scale = 0.0
        for position in positions:
            reference, source = node.prepared.references[position], node.sources[position]
            if reference.kind == "area":
                if source is None:
                    args.append(np.asarray([[_xl_error("#REF!")]], dtype=object))
                    continue
                arg = area_values(source, reference)
            else:
                arg = self._name_value(source, values, area_values)
            scale = max(scale, _magnitude(arg))
            args.append(arg)
        recorder.current = where
        try:
            raw = function(*args)
        except Exception as error:  # the library's failure on one formula spoils only it
            problem = _run_problem(error)
            out = {}
            for member in members:
                values[member] = _xl_error("#N/A")
                out[member] = CellResult(None, "cannot-evaluate", (f"cannot evaluate: {problem}",),
                                         where)
            return out
        finally:
            recorder.current = None
        own_notes = tuple(m for c, m in recorder.notes[notes_before:])
        own_errors = tuple(m for c, m in recorder.errors[errors_before:])
        array = np.asarray(raw, dtype=object)
        if array.ndim < 2:
            array = array.reshape(1, -1) if array.ndim == 1 else array.reshape(1, 1)
        upstream_error = next((r for r in upstream if r.status == "error"), None)
        out = {}
        if node.name is not None:
            values[key] = array if array.size > 1 else array[0, 0]
            plain = _plain(array[0, 0]) if array.size else None
            if upstream_error is not None:
                out[key] = CellResult(plain, "error", (f"depends on an error in "
                                                        f"{upstream_error.cause}",),
                                      upstream_error.cause, scale)
            else:
                out[key] = CellResult(plain, "value", own_notes, None, scale)
            return out
        r0, c0 = (node.array[0], node.array[1]) if node.array else (node.row, node.col)
        for member in members:
            row, col = split_ref(member[1])
            i, j = row - r0, col - c0
            if array.shape == (1, 1):
                raw_value = array[0, 0]
            elif i < array.shape[0] and j < array.shape[1]:
                raw_value = array[i, j]
            elif array.shape[0] == 1 and j < array.shape[1]:
                raw_value = array[0, j]
            elif array.shape[1] == 1 and i < array.shape[0]:
                raw_value = array[i, 0]
            else:
                raw_value = _xl_error("#N/A")
            values[member] = raw_value
            plain = _plain(raw_value)
            member_scale = max(scale, abs(plain) if isinstance(plain, float) and math.isfinite(plain)
                               else 0.0)
            if own_errors and (plain in own_errors or _is_xl_error(raw_value)):
                result = CellResult(plain, "error", own_errors, where, member_scale)
            elif _is_xl_error(raw_value) or (isinstance(plain, float) and not math.isfinite(plain)):
                if upstream_error is not None:
                    cause = upstream_error.cause
                    result = CellResult(plain, "error", (f"follows from the error in {cause}",),
                                        cause, member_scale)
                else:
                    result = CellResult(plain, "error", (f"Excel error {plain}",), where,
                                        member_scale)
            elif upstream_error is not None:
                cause = upstream_error.cause
                result = CellResult(plain, "error", (f"depends on an error in {cause}",), cause,
                                    member_scale)
            elif own_notes:
                result = CellResult(plain, "note", own_notes, None, member_scale)
            else:
                result = CellResult(plain, "value", (), None, member_scale)
            out[member] = result
        return out

    def _members(self, node) -> list:
        if node.array is None:
            return [(node.sheet, node.ref)]
        r1, c1, r2, c2 = node.array
        return [(node.sheet, f"{index_to_col(c)}{r}") for r in range(r1, r2 + 1)
                for c in range(c1, c2 + 1)]

    def _name_value(self, target, values, area_values):
        import numpy as np
        if target is None:
            return np.asarray([[_xl_error("#NAME?")]], dtype=object)
        if target in values:
            value = values[target]
            return value if isinstance(value, np.ndarray) else np.asarray([[value]], dtype=object)
        node = self.nodes.get(target)
        if node is not None and node.prepared is not None and len(node.prepared.references) == 1 \
                and node.prepared.references[0].kind == "area" and \
                _is_plain_reference(node.prepared.text):
            if node.sources[0] is None:
                return np.asarray([[_xl_error("#REF!")]], dtype=object)
            return area_values(node.sources[0], node.prepared.references[0])
        return np.asarray([[_xl_error("#NAME?")]], dtype=object)

    def _evaluation(self, values, results, recorder, sets, seconds) -> Evaluation:

        by_sheet: dict[str, dict[str, object]] = {}
        ordered: dict[tuple[str, str], CellResult] = {}
        for sheet in self.book.sheets:
            cells = by_sheet.setdefault(sheet.name, {})
            for ref in sheet.formula_refs():
                key = (sheet.name, ref)
                if key in results:
                    cells[ref] = results[key].value
                    ordered[key] = results[key]
                elif key in sets:
                    cells[ref] = sets[key]
        names: dict[str, object] = {}
        for name in self.book.names:
            if name.hidden or name.name.startswith("_xlnm."):
                continue
            node_key = ("#name", name.sheet.upper() if name.sheet else None, name.name.upper())
            shown = name.name if name.sheet is None else f"{_quote(name.sheet)}!{name.name}"
            names[shown] = self._named_value(name, node_key, values, by_sheet, sets)
        notes: list[tuple[str, str]] = []
        seen = set()
        for key, result in ordered.items():
            if result.status == "value":
                continue
            if result.messages and result.messages[0].startswith("follows from"):
                continue   # an Excel error that follows from one listed where it happens
            anchor = self.owner.get(key, key)
            for message in result.messages:
                item = (label(*anchor), message)
                if item not in seen:
                    seen.add(item)
                    notes.append(item)
        labelled = {label(*k) for k in ordered} if recorder.notes else set()
        for cell, message in recorder.notes:
            if cell is not None and cell not in labelled and (cell, message) not in seen:
                seen.add((cell, message))
                notes.append((cell, message))
        return Evaluation(self.book, by_sheet, names, notes, self.load_seconds, seconds,
                          sets=dict(sets), engine_seconds=self.engine_seconds, results=ordered)

    def _named_value(self, name, node_key, values, by_sheet, sets):
        text = name.text.strip().lstrip("=")
        reference = parse_reference(text) if _is_plain_reference(text) else None
        if reference is None or reference.kind != "area" or reference.sheet is None:
            value = values.get(node_key)
            return _plain(value) if value is not None and not hasattr(value, "shape") else None
        sheet = self.sheet_case.get(reference.sheet.upper())
        if sheet is None:
            return None
        cells = by_sheet.get(sheet, {})
        constants = self.sheets[sheet].values

        def one(r, c):
            ref = f"{index_to_col(c)}{r}"
            if (sheet, ref) in sets:
                return sets[(sheet, ref)]
            if ref in cells:
                return cells[ref]
            value = constants.get(ref)
            return str(value) if isinstance(value, CellError) else value

        if reference.cells == 1:
            return one(reference.r1, reference.c1)
        if reference.cells > 100_000:
            return None
        return [[one(r, c) for c in range(reference.c1, reference.c2 + 1)]
                for r in range(reference.r1, reference.r2 + 1)]


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
                out = np.empty((1, 1), dtype=object)
                out[0, 0] = result
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


def straight_line(function):
    """Run a compiled formula without its dispatcher: the same node functions called in
    dependency order.  ``formulas`` builds one small schedula dispatcher per formula, whose
    bookkeeping costs several times the arithmetic; a formula's nodes are a tree, so running them
    in order gives the same result.  Returns None for dispatchers that use other features."""
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
            if set(node) - {"type", "inputs", "outputs", "function", "wait_inputs", "solve_cycle",
                            "index"}:
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
            function_ = node["function"]
            operator_ = _FAST_OPERATORS.get(key.split("<")[0])
            if operator_ is not None and len(node["inputs"]) == 2:
                function_ = _fast_operator(operator_, function_)
            steps.append((key, function_, tuple(node["inputs"]), tuple(node["outputs"])))
            available |= set(node["outputs"])
    inputs = tuple(function.inputs)
    output = function.outputs[0]
    if output not in available:
        return None

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
                raise _NotAvailable(name.split("<")[0]) from None
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


def _is_plain_reference(text: str) -> bool:
    return not re.search(r"[(),+*/&^<>=\-\"]", text.strip())


def _reference_id(reference: Reference, default_sheet):
    if reference.kind == "area":
        return ("area", (reference.sheet or "").upper(), reference.r1, reference.c1, reference.r2,
                reference.c2)
    if reference.alias:
        return ("name", "", reference.alias.upper())
    return (reference.kind, (reference.sheet or "").upper(), reference.name.upper())


def _parse_problem(error: Exception, text: str) -> str:
    detail = " ".join(str(error).split())
    if "Not a valid formula" in detail:
        return "the evaluator cannot parse this formula"
    return f"the evaluator cannot compile this formula ({type(error).__name__})"


def _run_problem(error: Exception) -> str:
    text = " ".join(str(error).split())
    m = re.search(r"DISPATCHING '([^']+)'", text)
    if m and "NotImplemented" in text:
        return f"function {m.group(1)} is not available headlessly"
    if isinstance(error, _NotAvailable):
        return f"function {error} is not available headlessly"
    return f"the evaluator failed on this formula ({type(error).__name__})"


def _xl_error(code: str):
    from formulas.tokens.operand import XlError
    return XlError(code)


def _is_xl_error(value) -> bool:
    from formulas.tokens.operand import XlError
    return isinstance(value, XlError)


def _to_formulas(value):
    """A stored cell value as formulas takes it."""
    if isinstance(value, CellError):
        return _xl_error(str(value))
    if value is None:
        import schedula as sh
        return sh.EMPTY
    return value


def _magnitude(arg) -> float:
    import numpy as np
    array = np.asarray(arg, dtype=object).ravel()
    best = 0.0
    for v in array[:10_000]:
        if isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, (bool, np.bool_)):
            f = abs(float(v))
            if math.isfinite(f) and f > best:
                best = f
    return best


def _plain(value):
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


def evaluate_book(path: str | Book, sets: dict[str, str] | None = None, cells=None) -> Evaluation:
    """Read and calculate a workbook; ``sets`` maps a cell ("Sheet!B3") or name to a new value.

    ``path`` may be a :class:`Book` already read.  ``cells`` limits the work to those formula
    cells and what they read."""
    model = _model_of(path) if cells is None else Model(
        path if isinstance(path, Book) else read_book(path), cells)
    targets = {}
    for target, text in (sets or {}).items():
        targets[resolve_target(model.book, target)] = parse_value(text) if isinstance(text, str) else text
    return model.calculate(targets)


_MODELS: dict = {}


def _model_of(path) -> Model:
    """The model of a workbook file, built once while the file is unchanged (a sweep of --set
    values or the template tests calculate one model many times)."""
    if isinstance(path, Book):
        return Model(path)
    try:
        stat = os.stat(path)
        key = (os.path.realpath(path), stat.st_ino, stat.st_mtime_ns, stat.st_ctime_ns,
               stat.st_size)
    except OSError:
        key = None
    if key is not None and key in _MODELS:
        return _MODELS[key]
    model = Model(read_book(path))
    if key is not None:
        if len(_MODELS) >= 8:
            _MODELS.pop(next(iter(_MODELS)))
        _MODELS[key] = model
    return model
