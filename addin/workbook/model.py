"""The model of a workbook: its formulas prepared, their dependency graph and calculation order.

The workbook is read once (:func:`stillair.addin.workbook.reader.read_book`).  Each formula is
prepared on its own (:func:`stillair.addin.workbook.formulatext.prepare`) and compiled by the
``formulas`` library (:mod:`stillair.addin.workbook.formulas_bridge`); formulas of the same shape
(a row copied down) share one compiled function.  :class:`Model` then calculates the cells itself,
in dependency order (each cell by :func:`stillair.addin.workbook.execute.calculate_node`), so that

* a formula the evaluator cannot read or has no implementation for spoils only that cell and the
  cells that depend on it: they get the status "cannot-evaluate" with the construct named, and
  everything else is calculated;
* only the cells a job needs are calculated (:class:`Model` takes the cells of interest; the
  audit passes ours, their precedents and their dependents);
* a model is built once and calculated many times (``--set`` values, sweeps);
* whole rows and columns cost what the sheet's used range costs.

Every formula cell gets a :class:`~stillair.addin.workbook.status.CellResult`: its value and
whether that value is a plain value, a value with range notes, an error (one of our functions'
messages, an Excel error, or a value computed over an error upstream) or could not be evaluated.
Commands read this status; none of them infers an error from the shape of a text.
"""

from __future__ import annotations

import contextlib
import gc
import math
import os
import re
import threading
import time
from dataclasses import dataclass, field
from typing import Iterator

from .execute import CellRecorder, calculate_node
from .formulas_bridge import (blank, compile_formula, fast_runner, load, parse_problem, plain,
                              input_reference_text, reads_references, to_formulas, xl_error)
from .formulatext import Reference, calls_in, parse_reference
from .rewrite import Prepared, prepare
from .reader import Book, BookError, CellError, index_to_col, read_book, split_ref
from .sets import parse_value, resolve_target
from .status import CellResult, Evaluation, LoopReport, label, quote_sheet
from .vectorised import calculate_batch, plan_of

__all__ = ["Model", "evaluate_book", "MAX_CELLS_READ"]

# Bounds on the work of one calculation: the cells all formulas read together (ranges cut to
# the used range), and the cells of the range arrays kept for reuse.
MAX_CELLS_READ = 50_000_000
_AREA_CACHE_CELLS = 5_000_000


@dataclass(slots=True)
class _Node:
    sheet: str
    ref: str                    # anchor ref ("" for a defined name's node)
    row: int
    col: int
    text: str                   # the workbook's formula, without "="
    prepared: Prepared | None = None
    array: tuple | None = None  # (r1, c1, r2, c2) for an array formula
    deps: set = field(default_factory=set)
    sources: list = field(default_factory=list)  # per reference: the sheet an area is on (None:
                                                 # no such sheet), a name's node key (None: undefined)
    compiled: object = None
    problem: str | None = None
    name: str | None = None     # a defined name's node: its label


class _Loop(tuple):
    """The keys of one circular loop, in sweep order (a step of :attr:`Model.order`)."""


class _Batch(list):
    """The keys of cells of one shape that read none of one another, in calculation order:
    calculated together (:mod:`stillair.addin.workbook.vectorised`)."""


def _keys_of(step) -> tuple:
    return tuple(step) if isinstance(step, (_Loop, _Batch)) else (step,)


# Functions whose result does not follow from the references a formula names: a cell calling
# one is calculated again in every case (Model._reached).
_VOLATILE = re.compile(r"(?i)(?<![\w.])(?:_XLFN\.)?(?:NOW|TODAY|RAND|RANDBETWEEN|RANDARRAY|OFFSET|"
                       r"INDIRECT|CELL|INFO)\s*\(")


@dataclass(slots=True)
class _Stored:
    """What one calculation step left: its cells' values and results, and the notes and error
    messages it recorded (replayed in order, as if the step had been calculated again)."""

    values: dict
    results: dict
    notes: list
    errors: list

    @classmethod
    def of(cls, model, step, values, results, recorder, notes: int, errors: int) -> "_Stored":
        members: list = []
        for key in _keys_of(step):
            node = model.nodes[key]
            members.extend([key] if node.name is not None else model.members(node))
        return cls({k: values[k] for k in members if k in values},
                   {k: results[k] for k in members if k in results},
                   recorder.notes[notes:], recorder.errors[errors:])

    def replay(self, values, results, recorder) -> None:
        values.update(self.values)
        results.update(self.results)
        for item in self.notes:
            if item not in recorder.notes:
                recorder.notes.append(item)
        recorder.errors.extend(self.errors)


# Python's cycle collector runs, at its default threshold, every 700 allocations, and every few
# runs it scans every object still alive: preparing and calculating 19,200 formulas (nodes,
# sets, references, results) paid ~0.3 s of ~2 s of CPU for it (measured, issue 21).  One run
# per 50,000 allocations keeps cyclic garbage bounded (memory stays linear) at a fraction of it.
_RARE_COLLECTIONS = 50_000


_rarely_lock = threading.Lock()
_rarely_state: dict = {"inside": 0, "thresholds": None}   # nested or concurrent uses share one


@contextlib.contextmanager
def collecting_rarely() -> Iterator[None]:
    """While inside, the cycle collector runs at most every :data:`_RARE_COLLECTIONS`
    allocations (never more rarely than the caller asked); the thresholds are restored when
    the last of nested (or concurrent, in threads) uses leaves."""
    with _rarely_lock:
        if _rarely_state["inside"] == 0:
            thresholds = _rarely_state["thresholds"] = gc.get_threshold()
            gc.set_threshold(max(thresholds[0], _RARE_COLLECTIONS), *thresholds[1:])
        _rarely_state["inside"] += 1
    try:
        yield
    finally:
        with _rarely_lock:
            _rarely_state["inside"] -= 1
            if _rarely_state["inside"] == 0:
                gc.set_threshold(*_rarely_state["thresholds"])


class Model:
    """A workbook prepared for calculation; :meth:`calculate` runs it (as often as needed).

    ``cells``: the (sheet, ref) formula cells of interest, or None for all.  Only they, the cells
    they read (transitively) and the defined names they use are prepared and calculated."""

    def __init__(self, book: Book, cells=None):
        with collecting_rarely():
            self._build(book, cells)

    def _build(self, book: Book, cells) -> None:
        import stillair
        started = time.perf_counter()
        load()      # formulas, with our functions registered (once per process)
        # the engine was imported with this package, before any of this ran: its own clock
        self.engine_seconds = stillair._IMPORT_SECONDS + time.perf_counter() - started
        started = time.perf_counter()
        self.book = book
        self.sheet_case = {s.name.upper(): s.name for s in book.sheets}
        self.used: dict[str | None, tuple[int, int]] = {s.name.upper(): (s.last_row, s.last_col) for s in book.sheets}
        self.sheets = {s.name: s for s in book.sheets}
        # Formula cells by position: sheet -> column -> sorted rows (array members point to
        # their anchor through ``owner``).
        self.owner: dict[tuple[str, str], tuple[str, str]] = {}
        # the same by (sheet, row, column): a reference's cells are found without spelling refs
        self._owner_at: dict[tuple[str, int, int], tuple[str, str]] = {}
        self.columns: dict[str, dict[int, list[int]]] = {}
        for sheet in book.sheets:
            columns = self.columns.setdefault(sheet.name, {})
            for ref, cell in sheet.formulas.items():
                self.owner[(sheet.name, ref)] = (sheet.name, ref)
                row, col = split_ref(ref)
                self._owner_at[(sheet.name, row, col)] = (sheet.name, ref)
                columns.setdefault(col, []).append(row)
            for member, anchor in sheet.array_members.items():
                self.owner[(sheet.name, member)] = (sheet.name, anchor)
                row, col = split_ref(member)
                self._owner_at[(sheet.name, row, col)] = (sheet.name, anchor)
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
        # data-validation rules' formulas compiled by rules.py, by (sheet, cell, formula): --cases
        # checks the same rules on every row
        self._compiled_rules: dict[tuple, tuple | None] = {}
        self._plans: dict[tuple, tuple] = {}
        self._steps: list | None = None
        self._base_steps: list | None = None    # the workbook's own calculation, by step (keep_base)
        self._reach_cache: dict = {}
        self._single_cells: dict = {}
        self._templates: dict = {}     # formulas of one relative form share their preparation
        self._digit_forms: dict = {}   # ... found by their text outside the digits (rewrite.prepare)
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
                     name=entry.name if entry.sheet is None else f"{quote_sheet(entry.sheet)}!{entry.name}")
        self._prepare(node)
        return node

    def _prepare(self, node: _Node) -> None:
        used = self.used
        templates: dict | None = self._templates
        if node.array is not None:
            # A whole row or column in an array formula is cut no shorter than the formula's own
            # range: {=First!1:1} over A1:XFD1 shows 0 for the blank cells, not #N/A.
            used = {sheet: (max(rows, node.array[2]), max(cols, node.array[3]))
                    for sheet, (rows, cols) in self.used.items()}
            templates = None
        prepared = prepare(node.text, node.row, node.col, used, node.sheet, templates,
                           is_formula=self._is_formula, digits=self._digit_forms)
        node.prepared = prepared
        if prepared.problem:
            node.problem = prepared.problem
        owner_at = self._owner_at
        for reference in prepared.references:
            source = None
            if reference.kind == "area":
                source = self.sheet_case.get((reference.sheet or node.sheet).upper())
                if reference.r1 == reference.r2 and reference.c1 == reference.c2:  # most
                    owner = owner_at.get((source, reference.r1, reference.c1)) \
                        if source is not None else None
                    if owner is not None:
                        node.deps.add(owner)
                else:
                    node.deps |= self._area_deps(source, reference)
            elif reference.kind == "name":
                source = self._resolve_name(reference, node.sheet)
                if source is None:
                    node.problem = node.problem or f"the name {reference.name} is not defined"
                else:
                    node.deps.add(source)
            node.sources.append(source)

    def _is_formula(self, sheet: str, row: int, col: int) -> bool:
        name = self.sheet_case.get(sheet.upper())
        return name is not None and (name, f"{index_to_col(col)}{row}") in self.owner

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
        if reference.r1 == reference.r2 and reference.c1 == reference.c2:   # one cell: most
            owner = self._owner_at.get((target, reference.r1, reference.c1))
            return {owner} if owner is not None else set()
        found = set()
        for col, rows in self.columns.get(target, {}).items():
            if reference.c1 <= col <= reference.c2:
                for row in rows[bisect_left(rows, reference.r1):bisect_right(rows, reference.r2)]:
                    owner = self._owner_at.get((target, row, col))
                    if owner is not None:
                        found.add(owner)
        return found

    def _order(self) -> list:
        """Calculation steps in dependency order: a cell's key, or a tuple of the keys of one
        circular loop (a strongly connected component, Tarjan's algorithm), which is iterated
        when the workbook enables iterative calculation and reported otherwise.  Components are
        emitted after every component they read, so each step's inputs are final."""
        keys = self.nodes.keys()

        def deps_of(key):
            return iter(sorted(self.nodes[key].deps & keys, key=str))

        order: list = []
        self.cycles: dict = {}          # key -> the loop (tuple of keys) it belongs to
        index: dict = {}
        low: dict = {}
        stack: list = []
        on_stack: set = set()
        for start in self.nodes:
            if start in index:
                continue
            index[start] = low[start] = len(index)
            stack.append(start)
            on_stack.add(start)
            work = [(start, deps_of(start))]
            while work:
                key, children = work[-1]
                for child in children:
                    if child not in index:
                        index[child] = low[child] = len(index)
                        stack.append(child)
                        on_stack.add(child)
                        work.append((child, deps_of(child)))
                        break
                    if child in on_stack:
                        low[key] = min(low[key], index[child])
                else:
                    work.pop()
                    if work:
                        parent = work[-1][0]
                        low[parent] = min(low[parent], low[key])
                    if low[key] != index[key]:
                        continue
                    component = []
                    while True:
                        member = stack.pop()
                        on_stack.discard(member)
                        component.append(member)
                        if member == key:
                            break
                    if len(component) == 1 and key not in self.nodes[key].deps:
                        order.append(key)
                        continue
                    loop = _Loop(sorted(component, key=self._sweep_position))
                    for member in loop:
                        self.cycles[member] = loop
                    order.append(loop)
        return order

    def keys_in_order(self):
        """Every node's key in calculation order (a loop's cells in sweep order)."""
        for step in self.order:
            yield from (step if isinstance(step, _Loop) else (step,))

    def _sweep_position(self, key):
        """Where a loop's cell comes in a sweep: sheet by sheet, row by row (names first)."""
        if key[0] == "#name":
            return (-1, 0, 0, str(key))
        sheet_index = next((i for i, s in enumerate(self.book.sheets) if s.name == key[0]), 0)
        row, col = split_ref(key[1])
        return (sheet_index, row, col, "")

    def loop_text(self, loop) -> str:
        """A loop's cells for a message: 'S!A1, S!A2' (the first eight, then how many more)."""
        shown = [self.nodes[k].name or label(k[0], k[1]) for k in loop[:8]]
        more = f" and {len(loop) - 8} more" if len(loop) > 8 else ""
        return ", ".join(shown) + more

    def compile(self, node: _Node, share: bool = True):
        """The compiled function for the node's shape, which reference feeds each input, the
        problem, and the inputs' texts where the formula reads its arguments as references
        (ROW, ROWS, AREAS...: the inputs are then passed as the library's reference objects)."""
        prepared = node.prepared
        assert prepared is not None  # only prepared nodes are compiled
        cached = self._compiled.get(prepared.key) if share else None
        if cached is None:
            try:
                function, inputs = compile_formula(prepared.text)
            except Exception as error:
                cached = (None, None, parse_problem(error, node.text), None)
            else:
                positions = []
                wanted = [_reference_id(r, None) for r in prepared.references]
                for key in inputs:
                    ident = _reference_id(parse_reference(input_reference_text(key)), None)
                    positions.append(wanted.index(ident) if ident in wanted else None)
                if None in positions:
                    cached = (None, None, "the evaluator reads this formula's references "
                              "differently from Excel", None)
                else:
                    keys = list(inputs) if reads_references(prepared.text) else None
                    cached = (fast_runner(function) if share else function, positions, None, keys)
            if share:
                self._compiled[prepared.key] = cached
        return cached

    def plan(self, node: _Node):
        """The array plan of the node's shape and the reference feeding each of its inputs,
        or (None, None) when the shape is calculated cell by cell."""
        assert node.prepared is not None   # prepared when the model was built
        key = node.prepared.key
        found = self._plans.get(key)
        if found is None:
            function, positions, problem, reference_keys = self.compile(node)
            plan = None
            if problem is None and reference_keys is None:
                plan = plan_of(function, any(call.ours for call in calls_in(node.text)))
            found = self._plans[key] = (plan, positions) if plan is not None else (None, None)
        return found

    def single_cells(self, node: _Node) -> list:
        """(sheet, ref) of each reference of a node whose references are single cells."""
        found = self._single_cells.get((node.sheet, node.ref))
        if found is None:
            assert node.prepared is not None
            found = self._single_cells[(node.sheet, node.ref)] = [
                (source, f"{index_to_col(reference.c1)}{reference.r1}")
                for reference, source in zip(node.prepared.references, node.sources)]
        return found

    def _batchable(self, key) -> bool:
        """Whether a cell may be calculated in a batch of its shape: a plain cell formula
        outside any loop whose every reference is one cell of a sheet that exists."""
        node = self.nodes[key]
        if node.name is not None or node.array is not None or node.problem is not None or \
                key in self.cycles or node.prepared is None or not node.prepared.references:
            return False
        for reference, source in zip(node.prepared.references, node.sources):
            if source is None or reference.kind != "area" or reference.whole or \
                    reference.cells != 1:
                return False
        return True

    def _schedule(self) -> list:
        """:attr:`order` by dependency depth (a step after every step it reads, in their order
        within a depth), the cells of one shape and depth gathered in a :class:`_Batch`."""
        if self._steps is not None:
            return self._steps
        depth: dict = {}
        deepened = []
        for step in self.order:
            if not isinstance(step, _Loop):     # a cell (most): it is not among its own deps
                level = depth[step] = 1 + max([depth.get(d, 0) for d in self.nodes[step].deps],
                                              default=0)
                deepened.append((level, step))
                continue
            level = 1 + max((depth.get(d, 0) for k in step for d in self.nodes[k].deps
                             if d not in step), default=0)
            for k in step:
                depth[k] = level
            deepened.append((level, step))
        deepened.sort(key=lambda item: item[0])     # stable: the order within a depth stays
        steps: list = []
        batches: dict = {}
        for level, step in deepened:
            if not isinstance(step, _Loop) and self._batchable(step):
                shape = (level, self.nodes[step].prepared.key)  # type: ignore[union-attr]  # _batchable: prepared
                batch = batches.get(shape)
                if batch is None:
                    batch = batches[shape] = _Batch()
                    steps.append(batch)
                batch.append(step)
            else:
                steps.append(step)
        if all(len(b) == 1 for b in batches.values()):
            self._steps = self.order       # nothing to gather: the order as it was
        else:
            self._steps = [s[0] if isinstance(s, _Batch) and len(s) == 1 else s for s in steps]
        return self._steps

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
        seen = _closure(seeds, self._users())
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

    def calculate(self, sets: dict[tuple[str, str], object] | None = None, only=None, *,
                  reuse: bool = False) -> Evaluation:
        """Calculate the model; ``sets`` maps (sheet, ref) to a value that replaces the cell;
        ``only`` limits the work to those cells and what they read.  ``reuse``: calculate only
        the cells the set cells reach and take every other cell's value, status and notes from
        one calculation of the workbook as it is, made once (many cases of one workbook)."""
        base = self.keep_base() if reuse and sets and only is None else None
        with collecting_rarely():
            return self._calculate(sets, only, base)

    def keep_base(self) -> list:
        """Each step of :meth:`_schedule` as the workbook's own calculation left it (None for a
        loop, which is always calculated again): made once, on first use."""
        if self._base_steps is None:
            record: list = []
            self._calculate(None, None, None, record)
            self._base_steps = record
        return self._base_steps

    def _reached(self, set_keys) -> set:
        """The formula cells and names whose value can change when ``set_keys`` are set: those
        that read a set cell (or a replaced formula), what reads them, and every formula with a
        function whose result does not follow from its references (NOW, RAND, OFFSET...)."""
        set_keys = frozenset(set_keys)
        found = self._reach_cache.get(set_keys)
        if found is not None:
            return found
        users = self._users()
        seeds = set(self._volatile())
        for key in set_keys:
            seeds.add(key)
            seeds |= users.get(key, set())
            sheet, ref = key
            row, col = split_ref(ref)
            for node_key, node in self.nodes.items():
                for reference, source in zip(node.prepared.references if node.prepared else (),
                                             node.sources):
                    if reference.kind == "area" and source == sheet and \
                            reference.r1 <= row <= reference.r2 and reference.c1 <= col <= reference.c2:
                        seeds.add(node_key)
        seen = _closure(seeds, users)
        if len(self._reach_cache) < 64:
            self._reach_cache[set_keys] = seen
        return seen

    def _volatile(self) -> list:
        return [key for key, node in self.nodes.items() if _VOLATILE.search(node.text)]

    def _calculate(self, sets, only, base, record=None) -> Evaluation:
        """:meth:`calculate`; ``base``: the steps to take from :meth:`keep_base` where no set cell
        reaches them; ``record``: a list that gets each step's :class:`_Stored`."""
        import numpy as np

        started = time.perf_counter()
        sets = dict(sets or {})
        values: dict[tuple[str, str], object] = {}     # computed values, formulas' own types
        results: dict = {}
        recorder = CellRecorder()
        empty = blank()

        def cell_value(sheet_name, ref):
            key = (sheet_name, ref)
            if key in sets:
                return to_formulas(sets[key])
            if key in values:
                return values[key]
            sheet = self.sheets[sheet_name]
            if ref in sheet.values:
                return to_formulas(sheet.values[ref])
            return empty

        def area_values(sheet_name, reference: Reference):
            if reference.r1 == reference.r2 and reference.c1 == reference.c2:
                one_cell = np.empty((1, 1), dtype=object)
                one_cell[0, 0] = cell_value(sheet_name, f"{index_to_col(reference.c1)}{reference.r1}")
                return one_cell
            # Cells are calculated after every formula cell they read, so a range's values are
            # final when it is first read: later readers of the same range share the array.
            area_key = (sheet_name, reference.r1, reference.c1, reference.r2, reference.c2)
            array = area_cache.get(area_key)
            if array is not None:
                return array
            # ndarray.fill keeps the blank marker itself: np.full would turn it (a str subclass)
            # into the plain text 'empty', which COUNTA counts and our functions refuse.
            array = np.empty((reference.r2 - reference.r1 + 1, reference.c2 - reference.c1 + 1),
                             dtype=object)
            array.fill(empty)
            sheet = self.sheets[sheet_name]
            last_row, last_col = sheet.last_row, sheet.last_col
            letters = [index_to_col(c) for c in range(reference.c1, min(reference.c2, last_col) + 1)]
            for r in range(reference.r1, min(reference.r2, last_row) + 1):
                for j, column in enumerate(letters):
                    array[r - reference.r1, j] = cell_value(sheet_name, f"{column}{r}")
            if caching[0] and cached_cells[0] + array.size <= _AREA_CACHE_CELLS:
                cached_cells[0] += array.size
                area_cache[area_key] = array
            return array

        area_cache: dict = {}
        cached_cells = [0]
        caching = [True]
        loops: list = []
        needed = self.upstream(only) if only is not None else None
        self._check_volume(needed)
        from .safezip import offline
        reached = self._reached(sets) if base is not None else None
        with recorder, offline():   # nothing in a workbook may reach the network
            for index, step in enumerate(self._schedule()):
                if base is not None and base[index] is not None and reached is not None and \
                        not any(k in reached for k in _keys_of(step)):
                    base[index].replay(values, results, recorder)
                    continue
                notes, errors = len(recorder.notes), len(recorder.errors)
                if isinstance(step, _Batch):
                    batch = [k for k in step if k not in sets and (needed is None or k in needed)]
                    if batch:
                        calculate_batch(self, batch, values, results, recorder, area_values,
                                        cell_value)
                elif isinstance(step, _Loop):
                    if needed is not None and not any(k in needed for k in step):
                        pass
                    elif self.book.iteration is not None:
                        caching[0] = False   # a loop's ranges change from sweep to sweep
                        loops.append(self._iterate(step, sets, values, results, recorder,
                                                   area_values))
                        caching[0] = True
                    else:
                        for key in step:
                            if key not in sets and (needed is None or key in needed):
                                results.update(calculate_node(self, self.nodes[key], key, values,
                                                              results, recorder, area_values))
                elif step not in sets and (needed is None or step in needed):
                    results.update(calculate_node(self, self.nodes[step], step, values, results,
                                                  recorder, area_values))
                if record is not None:
                    record.append(None if isinstance(step, _Loop) else _Stored.of(
                        self, step, values, results, recorder, notes, errors))
        calculated = time.perf_counter()
        evaluation = self._evaluation(values, results, recorder, sets, calculated - started)
        evaluation.loops = loops
        return evaluation

    def _iterate(self, loop, sets, values, results, recorder, area_values) -> LoopReport:
        """A circular loop calculated as Excel's iterative calculation does it: starting from
        the values the file stores for its cells (0 where none), sweeps over the loop's cells in
        sheet order (each sweep reads the newest values), at most the workbook's count, stopping
        when no number changed by more than its delta.  A loop still changing after the count
        keeps its last values with the status error and the last change named."""
        iteration = self.book.iteration
        assert iteration is not None   # called only when the workbook enables iteration
        members = []
        for key in loop:
            node = self.nodes[key]
            if node.name is not None:
                continue
            for member in self.members(node):
                members.append(member)
                if member in sets:
                    continue
                sheet = self.sheets[member[0]]
                cell = sheet.formulas.get(member[1])
                stored = cell.cached if cell is not None and cell.has_cached else \
                    sheet.cached.get(member[1])
                if stored is None or isinstance(stored, CellError):
                    stored = 0.0
                values[member] = to_formulas(stored)
        computed = [k for k in loop if k not in sets]
        sweeps, change, first_change = 0, math.inf, None
        while sweeps < iteration.count:
            before = {m: plain(values.get(m)) for m in members}
            for key in computed:
                results.update(calculate_node(self, self.nodes[key], key, values, results,
                                              recorder, area_values, in_loop=True))
            sweeps += 1
            change = max((_change(before[m], plain(values.get(m))) for m in members), default=0.0)
            if first_change is None:
                first_change = change
            if change <= iteration.delta:
                break
        converged = change <= iteration.delta
        cells = tuple(label(*m) for m in members)
        if not converged:
            message = (f"iterative calculation did not converge: after {sweeps} sweeps (the "
                       f"workbook's limit) the loop {self.loop_text(loop)} still changed by "
                       f"{change:.3g}, more than its delta {iteration.delta:g}")
            for member in members:
                result = results.get(member)
                if result is not None and result.status in ("value", "note"):
                    results[member] = CellResult(result.value, "error", (message,),
                                                 label(*members[0]), result.scale)
        return LoopReport(cells, sweeps, change, iteration.delta, converged,
                          first_change is not None and first_change <= iteration.delta)

    def _check_volume(self, needed) -> None:
        """Refuse, before calculating, a workbook whose formulas would read more cells in all than
        the limit (each formula's ranges cut to the used range and counted per formula)."""
        total = 0
        used = {name: (sheet.last_row, sheet.last_col) for name, sheet in self.sheets.items()}
        for key, node in self.nodes.items():
            if needed is not None and key not in needed or node.prepared is None:
                continue
            for reference, source in zip(node.prepared.references, node.sources):
                if reference.kind != "area" or source not in used:
                    continue
                last_row, last_col = used[source]
                r1, c1, r2, c2 = reference.r1, reference.c1, reference.r2, reference.c2
                if r1 == r2 and c1 == c2:        # one cell (most): inside the used range or not
                    total += r1 <= last_row and c1 <= last_col
                    continue
                total += max(0, min(r2, last_row) - r1 + 1) * max(0, min(c2, last_col) - c1 + 1)
        if total > MAX_CELLS_READ:
            raise BookError(f"{self.book.path}: refused: its formulas read {total:,} cells in all "
                            f"(each formula's ranges counted), more than the limit of "
                            f"{MAX_CELLS_READ:,} that keeps calc and the audit bounded in time")

    def members(self, node) -> list:
        """The cells a node fills: its own, or every cell of its array formula's range."""
        if node.array is None:
            return [(node.sheet, node.ref)]
        r1, c1, r2, c2 = node.array
        return [(node.sheet, f"{index_to_col(c)}{r}") for r in range(r1, r2 + 1)
                for c in range(c1, c2 + 1)]

    def name_value(self, target, values, area_values):
        """A defined name's value as a formula reading it gets it (a range: its cells)."""
        import numpy as np
        if target is None:
            return np.asarray([[xl_error("#NAME?")]], dtype=object)
        if target in values:
            value = values[target]
            return value if isinstance(value, np.ndarray) else np.asarray([[value]], dtype=object)
        node = self.nodes.get(target)
        if node is not None and node.prepared is not None and len(node.prepared.references) == 1 \
                and node.prepared.references[0].kind == "area" and \
                _is_plain_reference(node.prepared.text):
            if node.sources[0] is None:
                return np.asarray([[xl_error("#REF!")]], dtype=object)
            return area_values(node.sources[0], node.prepared.references[0])
        return np.asarray([[xl_error("#NAME?")]], dtype=object)

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
            shown = name.name if name.sheet is None else f"{quote_sheet(name.sheet)}!{name.name}"
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
            return plain(value) if value is not None and not hasattr(value, "shape") else None
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


def _change(before, after) -> float:
    """How much one cell changed in a sweep: the difference of numbers; any other change
    (text, an error appearing) counts as not settled."""
    if before == after:
        return 0.0
    if isinstance(before, float) and isinstance(after, float):
        difference = abs(after - before)
        return difference if math.isfinite(difference) else math.inf
    return math.inf


def _is_plain_reference(text: str) -> bool:
    return not re.search(r"[(),+*/&^<>=\-\"]", text.strip())


def _reference_id(reference: Reference, default_sheet):
    if reference.kind == "area":
        return ("area", (reference.sheet or "").upper(), reference.r1, reference.c1, reference.r2,
                reference.c2)
    if reference.alias:
        return ("name", "", reference.alias.upper())
    return (reference.kind, (reference.sheet or "").upper(), reference.name.upper())


def evaluate_book(path: str | Book, sets: dict[str, str] | None = None, cells=None, *,
                  replace_formulas: bool = False, validate: bool = True) -> Evaluation:
    """Read and calculate a workbook; ``sets`` maps a cell ("Sheet!B3") or name to a new value.

    ``path`` may be a :class:`Book` already read.  ``cells`` limits the work to those formula
    cells and what they read.  A set value must pass the cell's data-validation rule, and a
    formula cell is replaced only with ``replace_formulas`` (else BookError).  ``validate=False``
    skips the data-validation rules (what the sheet computes from a value pasted over them)."""
    from .rules import check_sets
    with collecting_rarely():       # reading too: what it keeps is not rescanned while preparing
        model = _model_of(path) if cells is None else _read_model(path, cells)
    targets, shown = {}, {}
    for target, text in (sets or {}).items():
        key = resolve_target(model.book, target, replace_formulas, typed=f"{target}={text}")
        targets[key] = parse_value(text) if isinstance(text, str) else text
        shown[key] = f"{target}={text}"
    evaluation = model.calculate(targets)
    _note_blank_inputs(model, evaluation, targets)
    if targets and validate:
        for message in check_sets(model, evaluation, targets, shown):
            evaluation.notes.append(("", message))
    return evaluation


# The count of blank required inputs a template keeps (templates/spec.py MISSING_NAME).
_MISSING_NAME = "inputs_missing"


def _note_blank_inputs(model, evaluation, targets) -> None:
    """A template whose count of blank required inputs is above 0 shows INPUT MISSING in its
    results; the note names the blank cells (by their defined names) and calc exits 1."""
    count = evaluation.names.get(_MISSING_NAME)
    if not isinstance(count, float) or count <= 0:
        return
    blank = []
    for name in model.book.names:
        m = re.match(r"^'?Inputs'?!\$?([A-Z]{1,3})\$?(\d+)$", name.text.strip().lstrip("="))
        if name.sheet is not None or not m or name.name == _MISSING_NAME:
            continue
        ref = f"{m.group(1)}{m.group(2)}"
        sheet = model.sheets.get("Inputs")
        if sheet is None or ref in sheet.formulas:
            continue
        value = targets.get(("Inputs", ref), sheet.values.get(ref)) \
            if ("Inputs", ref) in targets else sheet.values.get(ref)
        if value is None or (isinstance(value, str) and not value.strip()):
            blank.append(f"Inputs!{ref} ({name.name})")
    message = (f"INPUT MISSING: {int(count)} required input{'s are' if count > 1 else ' is'} "
               f"blank{': ' + ', '.join(blank) if blank else ''}; the results are not computed "
               f"until {'they are' if count > 1 else 'it is'} filled in")
    evaluation.notes.insert(0, ("", message))
    evaluation.input_missing = message


_MODELS: dict = {}


def _read_model(path: str | Book, cells=None) -> Model:
    """The model of a workbook file read now (or of a Book already read); its load time counts
    reading the file, as the report's "load" says."""
    if isinstance(path, Book):
        return Model(path, cells)
    started = time.perf_counter()
    book = read_book(path)
    read_seconds = time.perf_counter() - started
    model = Model(book, cells)
    model.load_seconds += read_seconds
    return model


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
    model = _read_model(path)
    if key is not None:
        if len(_MODELS) >= 8:
            _MODELS.pop(next(iter(_MODELS)))
        _MODELS[key] = model
    return model


def _closure(seeds, users: dict) -> set:
    """The seeds and everything that reads them, directly or through others (``users``: each
    key's readers)."""
    seen, todo = set(seeds), list(seeds)
    while todo:
        for user in users.get(todo.pop(), ()):
            if user not in seen:
                seen.add(user)
                todo.append(user)
    return seen
