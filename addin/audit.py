"""``stillair audit``: check a finished workbook's numbers against the engine.

The audit reads every formula and the value Excel cached for it, recomputes the workbook
headlessly from its own inputs (:func:`stillair.addin.headless.evaluate_book`) and classifies every cell
that calls one of our functions and every cell downstream of one:

======================  ==========================================================================
ok                      the cached value is what the engine gives (within ``rtol``)
mismatch                the cached value differs: both values and the relative difference
template-drift          a formula cell of the pristine template was overwritten or edited
error                   the engine rejects the inputs (its message), or the cell is an Excel error
unknown-function        a name that looks like ours (or is written as an add-in call) is not ours
out-of-range            a correlation was used outside its validity range (which bound)
stale                   no cached value, or a cached error, where the engine computes a value
version                 the workbook records a different STILLAIR_VERSION or template version
======================  ==========================================================================

Findings are listed worst first in that order.  The audited file is only ever read, through the
checks of :mod:`stillair.addin.safezip`; it is never written.  Exit status: 0 all ok, 1 findings, 2 the
file cannot be read (one line on stderr).
"""

from __future__ import annotations

import argparse
import difflib
import hashlib
import json
import logging
import math
import os
import re
import sys
import tempfile
import time
from dataclasses import asdict, dataclass, field
from pathlib import Path

__all__ = ["KINDS", "Finding", "AuditResult", "audit_book", "format_table", "to_json",
           "write_report", "add_audit_parser", "run_audit", "main", "recognise_call",
           "EXIT_OK", "EXIT_FINDINGS", "EXIT_UNREADABLE"]

EXIT_OK, EXIT_FINDINGS, EXIT_UNREADABLE = 0, 1, 2
DEFAULT_RTOL = 1e-6

# Worst first: silent wrong numbers, then changed calculations, failures, cells that cannot be
# checked, correlations outside their range, missing recalculation, and traceability.
KINDS = ("mismatch", "template-drift", "error", "unknown-function", "out-of-range", "stale",
         "version")
_SEVERITY = {kind: i for i, kind in enumerate(KINDS)}
MARKER_NAME = "stillair_template"
_ERROR_VALUES = {"#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A",
                 "#GETTING_DATA", "#SPILL!", "#CALC!"}


def default_templates_dir() -> Path:
    from .templatebook import TEMPLATE_DIR
    return TEMPLATE_DIR


# ---------------------------------------------------------------------------------------------
# Findings


@dataclass
class Finding:
    kind: str
    cell: str                      # "Sheet!B3" ('quoted' where Excel needs it), "" for the book
    message: str
    formula: str | None = None     # the workbook's formula, with "="
    cached: object = None          # the value Excel saved
    computed: object = None        # the value the engine gives
    rel_diff: float | None = None  # mismatch only
    original_formula: str | None = None  # template drift only
    sheet: str | None = field(default=None, repr=False)
    ref: str | None = field(default=None, repr=False)

    def public(self) -> dict:
        data = asdict(self)
        data.pop("sheet"), data.pop("ref")
        return data


@dataclass
class AuditResult:
    path: str
    engine_version: str
    findings: list[Finding]
    checked: list[str]             # every classified cell, in sheet order
    ok: list[str]
    template: str | None = None
    follow_on: int = 0             # error cells whose error comes from an upstream finding
    unchecked: list[str] = field(default_factory=list)  # downstream of an unknown function
    timing: dict[str, float] = field(default_factory=dict)
    sha256: str = ""
    report: str | None = None

    def counts(self) -> dict[str, int]:
        counts = {"ok": len(self.ok)}
        for kind in KINDS:
            counts[kind] = sum(1 for f in self.findings if f.kind == kind)
        return counts

    @property
    def exit_code(self) -> int:
        return EXIT_FINDINGS if self.findings else EXIT_OK


# ---------------------------------------------------------------------------------------------
# Recognising our functions in every form Excel writes them


_PREFIX_RE = re.compile(r"^(?P<prefix>\[\d+\]!|'(?:[^']|'')*'!|[^!'\s(]+!|_xll\.|_xludf\.)?"
                        r"(?P<name>[^(]+)\($")


def _registry():
    from .registry import BY_NAME
    return BY_NAME


def _families() -> tuple[str, ...]:
    """Name prefixes of our functions (AIR_, GAS_, NU_, H_, NET_...): a name that starts with
    one and is not in the registry looks like ours but is not."""
    return tuple(sorted({n.split("_")[0] + "_" for n in _registry() if "_" in n}))


@dataclass(frozen=True)
class Call:
    prefix: str          # "", "[1]!", "'C:\\x\\stillair.xlam'!", "_xll.", "_xludf."
    name: str            # as written, without the prefix
    ours: bool           # in the registry
    unknown: bool        # looks like ours (or is an add-in call) but is not in the registry


def recognise_call(token: str) -> Call | None:
    """A FUNC-OPEN token ("_xludf.NU_VPLATE(") as a :class:`Call`; None for Excel built-ins."""
    m = _PREFIX_RE.match(token)
    if not m:
        return None
    prefix, name = m.group("prefix") or "", m.group("name").strip()
    upper = name.upper()
    if upper.startswith(("_XLFN.", "_XLWS.")):
        return None
    if upper in _registry():
        return Call(prefix, name, True, False)
    if prefix or upper.startswith(_families()):
        return Call(prefix, name, False, True)
    return None


def _tokens(formula: str):
    from openpyxl.formula.tokenizer import Tokenizer, TokenizerError
    try:
        return Tokenizer(formula if formula.startswith("=") else "=" + formula).items
    except TokenizerError:
        return []


def calls_in(formula: str) -> list[Call]:
    found = []
    for token in _tokens(formula):
        if token.type == "FUNC" and token.subtype == "OPEN":
            call = recognise_call(token.value)
            if call is not None:
                found.append(call)
    return found


def normalise_formula(formula: str) -> str:
    """Formula text for comparison: add-in and _xlfn. prefixes dropped, blanks outside strings
    dropped, case folded outside strings."""
    parts = []
    for token in _tokens(formula):
        value = token.value
        if token.type == "WHITE-SPACE":
            continue
        if token.type == "FUNC" and token.subtype == "OPEN":
            m = _PREFIX_RE.match(value)
            name = m.group("name") if m else value[:-1]
            if m and m.group("prefix") and name.upper() not in _registry():
                name = m.group("prefix") + name
            value = re.sub(r"^_xl(?:fn|ws)\.", "", name, flags=re.I).upper() + "("
        elif not (token.type == "OPERAND" and token.subtype == "TEXT"):
            value = value.upper()
        parts.append(value)
    return "".join(parts)


# ---------------------------------------------------------------------------------------------
# Reading formulas, cached values and constants (bytes scanned as stillair.addin.xlsx does)


@dataclass
class CellRecord:
    sheet: str
    ref: str
    formula: str | None            # "=..." for formula cells (shared formulas expanded)
    cached: object = None
    has_cached: bool = False
    array_ref: str | None = None


def _decode_value(cell_attrs: dict, body: bytes, shared: list[str]):
    from .xlsx import _unescape
    t = cell_attrs.get("t", "n")
    if t == "inlineStr":
        texts = re.findall(rb"<(?:[\w.-]+:)?t(?:\s[^>]*)?>([^<]*)</", body)
        return True, _unescape(b"".join(texts).decode("utf-8"))
    v = re.search(rb"<(?:[\w.-]+:)?v\s*(?:/>|>([^<]*)</)", body)
    if not v:
        return False, None
    text = _unescape((v.group(1) or b"").decode("utf-8"))
    if t == "str":
        return True, text
    if t == "b":
        return True, text.strip() in ("1", "true")
    if t == "e":
        return True, text.strip()
    if t == "s":
        try:
            return True, shared[int(text)]
        except (ValueError, IndexError):
            return True, None
    try:
        return True, float(text)
    except ValueError:
        return True, text


def _shared_strings(archive) -> list[str]:
    from .safezip import parse_xml
    try:
        data = archive.read("xl/sharedStrings.xml")
    except KeyError:
        return []
    root = parse_xml(data)
    ns = "{http://schemas.openxmlformats.org/spreadsheetml/2006/main}"
    return ["".join(t.text or "" for t in si.iter(f"{ns}t")) for si in root.iter(f"{ns}si")]


def read_cells(archive, book) -> dict[tuple[str, str], CellRecord]:
    """Every cell with a formula or a value, keyed by (sheet, ref)."""
    from openpyxl.formula.translate import Translator

    from .xlsx import CELL_RE, F_RE, attrs, _unescape

    shared = _shared_strings(archive)
    cells: dict[tuple[str, str], CellRecord] = {}
    for sheet in book.sheets:
        anchors: dict[str, tuple[str, str]] = {}   # shared-formula index -> (anchor ref, text)
        pending: list[tuple[CellRecord, str]] = []
        for match in CELL_RE.finditer(archive.read(sheet.part)):
            a = attrs(match.group(1))
            ref = a.get("r")
            if ref is None:
                continue
            body = match.group(2) or b""
            f = F_RE.search(body)
            has, value = _decode_value(a, body, shared)
            record = CellRecord(sheet.name, ref, None, value, has)
            if f:
                fa = attrs(f.group(1))
                text = _unescape(f.group(2).decode("utf-8")) if f.group(2) else None
                if fa.get("t") == "array":
                    record.array_ref = fa.get("ref")
                if fa.get("t") == "shared" and "si" in fa:
                    if text is not None:
                        anchors[fa["si"]] = (ref, text)
                    else:
                        pending.append((record, fa["si"]))
                record.formula = "=" + text if text is not None else None
            elif sheet.array_members.get(ref):
                pass  # a member of an array formula: its value is checked with the anchor
            cells[(sheet.name, ref)] = record
        for record, si in pending:
            if si in anchors:
                origin, text = anchors[si]
                record.formula = Translator("=" + text, origin=origin).translate_formula(record.ref)
    return cells


# ---------------------------------------------------------------------------------------------
# The dependency graph over formula references (cells, ranges, whole rows/columns, names)

_CELL_AREA = re.compile(r"^\$?([A-Za-z]{1,3})\$?(\d+)(?::\$?([A-Za-z]{1,3})\$?(\d+))?$")
_COLS = re.compile(r"^\$?([A-Za-z]{1,3}):\$?([A-Za-z]{1,3})$")
_ROWS = re.compile(r"^\$?(\d+):\$?(\d+)$")
_QUALIFIED = re.compile(r"^(?P<sheet>'(?:[^']|'')+'|[^'!]+)!(?P<rest>.+)$")
_MAX_ROW, _MAX_COL = 1_048_576, 16_384


def _operand_targets(operand: str, sheet: str):
    """("area", sheet, r1, c1, r2, c2) / ("name", scope sheet or None, name) / ("external",)."""
    from .xlsx import col_to_index
    m = _QUALIFIED.match(operand)
    scope = None
    if m:
        raw = m.group("sheet")
        raw = raw[1:-1].replace("''", "'") if raw.startswith("'") else raw
        if re.match(r"^\[\d+\]", raw) or raw.startswith("["):
            return [("external",)]
        sheet = scope = raw.split(":")[0]   # a 3-D reference counts its first sheet
        operand = m.group("rest")
    if operand.startswith("[") or "[" in operand:
        return [("external",)] if operand.startswith("[") else []
    m = _CELL_AREA.match(operand)
    if m:
        c1, r1 = col_to_index(m.group(1)), int(m.group(2))
        c2, r2 = (col_to_index(m.group(3)), int(m.group(4))) if m.group(3) else (c1, r1)
        return [("area", sheet, min(r1, r2), min(c1, c2), max(r1, r2), max(c1, c2))]
    m = _COLS.match(operand)
    if m:
        c1, c2 = sorted((col_to_index(m.group(1)), col_to_index(m.group(2))))
        return [("area", sheet, 1, c1, _MAX_ROW, c2)]
    m = _ROWS.match(operand)
    if m:
        r1, r2 = sorted((int(m.group(1)), int(m.group(2))))
        return [("area", sheet, r1, 1, r2, _MAX_COL)]
    if re.match(r"^[A-Za-z_\\][\w.\\]*$", operand):
        return [("name", scope if scope is not None else sheet, operand, scope is not None)]
    return []


class Graph:
    """Direct formula-cell dependencies of every formula cell of the workbook."""

    def __init__(self, book, cells: dict[tuple[str, str], CellRecord]):
        from .xlsx import expand_range, split_ref
        self.book = book
        self.sheet_case = {s.name.upper(): s.name for s in book.sheets}
        self.formula_cells = {k: c for k, c in cells.items() if c.formula is not None}
        # Position of every computed cell (array members point to their anchor).
        self.positions: dict[str, list[tuple[int, int, tuple[str, str]]]] = {}
        self.owner: dict[tuple[str, str], tuple[str, str]] = {}
        for key, cell in self.formula_cells.items():
            members = expand_range(cell.array_ref) if cell.array_ref else [cell.ref]
            for member in members:
                self.owner[(cell.sheet, member)] = key
                row, col = split_ref(member)
                self.positions.setdefault(cell.sheet.upper(), []).append((row, col, key))
        self.names = {}
        for name in book.names:
            self.names[(name.sheet.upper() if name.sheet else None, name.name.upper())] = name
        self._name_deps: dict[tuple, tuple[set, bool]] = {}
        self.external: set[tuple[str, str]] = set()   # cells that refer to another workbook
        self.deps: dict[tuple[str, str], set[tuple[str, str]]] = {}
        for key, cell in self.formula_cells.items():
            self.deps[key], external = self._formula_deps(cell.formula, cell.sheet)
            if external:
                self.external.add(key)

    def _formula_deps(self, formula: str, sheet: str, stack=()) -> tuple[set, bool]:
        """(formula cells the formula reads, whether it reads another workbook)."""
        found: set[tuple[str, str]] = set()
        external = False
        for token in _tokens(formula):
            if token.type != "OPERAND" or token.subtype != "RANGE":
                continue
            for target in _operand_targets(token.value, sheet):
                if target[0] == "external":
                    external = True
                elif target[0] == "area":
                    found |= self._area(*target[1:])
                else:
                    deps, outside = self._name(target[1], target[2], target[3], stack)
                    found |= deps
                    external = external or outside
        return found, external

    def _area(self, sheet, r1, c1, r2, c2) -> set:
        sheet = self.sheet_case.get(sheet.upper(), sheet)
        if r1 == r2 and c1 == c2:
            from .xlsx import index_to_col
            owner = self.owner.get((sheet, f"{index_to_col(c1)}{r1}"))
            return {owner} if owner else set()
        return {key for row, col, key in self.positions.get(sheet.upper(), ())
                if r1 <= row <= r2 and c1 <= col <= c2}

    def _name(self, sheet, name, qualified, stack) -> tuple[set, bool]:
        """A defined name's dependencies: sheet scope first, then the workbook's."""
        upper = name.upper()
        entry = self.names.get((sheet.upper(), upper))
        if entry is None and not qualified:
            entry = self.names.get((None, upper))
        if entry is None:
            return set(), False
        ident = (entry.sheet, entry.name.upper())
        if ident in stack:
            return set(), False
        if ident not in self._name_deps:
            self._name_deps[ident] = self._formula_deps(entry.text, entry.sheet or sheet,
                                                        stack + (ident,))
        return self._name_deps[ident]

    def downstream(self, seeds: set) -> set:
        """The seeds and every formula cell that depends on one, transitively."""
        users: dict[tuple, set] = {}
        for key, deps in self.deps.items():
            for dep in deps:
                users.setdefault(dep, set()).add(key)
        seen, todo = set(seeds), list(seeds)
        while todo:
            for user in users.get(todo.pop(), ()):
                if user not in seen:
                    seen.add(user)
                    todo.append(user)
        return seen

    def ancestors(self, key) -> set:
        seen, todo = set(), [key]
        while todo:
            for dep in self.deps.get(todo.pop(), ()):
                if dep not in seen:
                    seen.add(dep)
                    todo.append(dep)
        seen.discard(key)
        return seen


# ---------------------------------------------------------------------------------------------
# Comparing values


def _is_error(value) -> bool:
    return isinstance(value, str) and value.strip() in _ERROR_VALUES


def relative_difference(cached: float, computed: float) -> float:
    scale = max(abs(cached), abs(computed))
    return 0.0 if scale == 0 else abs(cached - computed) / scale


def _same(cached, computed, rtol: float) -> tuple[bool, float | None]:
    if isinstance(cached, bool) or isinstance(computed, bool):
        return cached == computed, None
    if isinstance(cached, float) and isinstance(computed, float):
        if not (math.isfinite(cached) and math.isfinite(computed)):
            return cached == computed, None
        rel = relative_difference(cached, computed)
        return rel <= rtol, rel
    if computed is None:
        return cached in (None, "", 0.0), None
    return cached == computed, None


def _show(value) -> str:
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        return f"{value:.10g}"
    if value is None:
        return "(blank)"
    text = str(value)
    return repr(text) if not _is_error(text) else text


# ---------------------------------------------------------------------------------------------
# The audit


class AuditError(Exception):
    """The workbook cannot be audited; one line for the user."""


def _label(sheet: str, ref: str) -> str:
    from .headless import _quote
    return f"{_quote(sheet)}!{ref}"


def audit_book(path: str, rtol: float = DEFAULT_RTOL, templates_dir: str | os.PathLike | None = None
               ) -> AuditResult:
    """Audit ``path``; raises :class:`AuditError` when it cannot be read."""
    from .safezip import UnsafeWorkbook, open_package
    from .xlsx import BookError, read_book, split_ref

    if not (rtol >= 0):
        raise AuditError(f"--rtol must be >= 0, got {rtol}")
    started = time.perf_counter()
    try:
        with open_package(path) as archive:
            digest = hashlib.sha256()
            with open(path, "rb") as handle:
                for chunk in iter(lambda: handle.read(1 << 20), b""):
                    digest.update(chunk)
            book = read_book(path)
            cells = read_cells(archive, book)
    except (UnsafeWorkbook, BookError) as error:
        raise AuditError(str(error)) from None
    except (KeyError, ValueError, UnicodeDecodeError) as error:
        raise AuditError(f"{path}: damaged workbook ({type(error).__name__}: {error})") from None
    read_done = time.perf_counter()

    graph = Graph(book, cells)
    seeds = {key for key, cell in graph.formula_cells.items() if calls_in(cell.formula)}
    checked = graph.downstream(seeds)
    findings: list[Finding] = []
    timing = {"read": read_done - started}
    evaluation = None
    if checked:
        from .headless import ANY_PREFIX_RE, evaluate_book, prefix_free_copy
        formulas_log = logging.getLogger("formulas")
        level = formulas_log.level
        formulas_log.setLevel(logging.CRITICAL)  # it logs refused external links as warnings
        needs_copy = any(c.unknown and c.prefix for cell in graph.formula_cells.values()
                         for c in calls_in(cell.formula))
        try:
            # evaluate_book runs under safezip.guarded(): offline, no linked workbooks.
            with tempfile.TemporaryDirectory(prefix="stillair-audit-") as directory:
                load = (prefix_free_copy(book, directory, ANY_PREFIX_RE) or path) if needs_copy else path
                try:
                    evaluation = evaluate_book(load)
                except (UnsafeWorkbook, BookError) as error:
                    raise AuditError(str(error).replace(load, path)) from None
        finally:
            formulas_log.setLevel(level)
        timing.update(engine_import=evaluation.engine_seconds, load=evaluation.load_seconds,
                      calculate=evaluation.calc_seconds)
    classify_started = time.perf_counter()

    import stillair
    version = str(stillair.__version__)
    result = AuditResult(path, version, findings, [], [], sha256=digest.hexdigest())
    if evaluation is not None:
        _classify(result, graph, cells, checked, evaluation, rtol, version)
    result.template = _template_drift(result, book, cells, templates_dir)
    order = {s.name: i for i, s in enumerate(book.sheets)}

    def position(f: Finding):
        if f.sheet is None:
            return (-1, 0, 0)
        row, col = split_ref(f.ref)
        return (order.get(f.sheet, len(order)), row, col)

    findings.sort(key=lambda f: (_SEVERITY[f.kind], -(f.rel_diff or 0.0), position(f)))
    timing["classify"] = time.perf_counter() - classify_started
    result.timing = timing
    return result


def _classify(result, graph, cells, checked, evaluation, rtol, version) -> None:
    from .xlsx import expand_range, split_ref

    notes: dict[str, list[str]] = {}
    for label, message in evaluation.notes:
        notes.setdefault(label, []).append(message)
    computed_by_sheet = evaluation.values

    def computed(sheet, ref):
        return computed_by_sheet.get(sheet, {}).get(ref)

    def add(kind, sheet, ref, message, **extra):
        result.findings.append(Finding(kind, _label(sheet, ref) if sheet else "", message,
                                       sheet=sheet, ref=ref, **extra))

    unknown_cells = {k for k in checked
                     if any(c.unknown for c in calls_in(graph.formula_cells[k].formula))}
    error_cells = set()
    for key in checked:
        cell = graph.formula_cells[key]
        members = expand_range(cell.array_ref) if cell.array_ref else [cell.ref]
        for ref in members:
            value = computed(cell.sheet, ref)
            if isinstance(value, str) and (_is_error(value) or value in notes.get(
                    _label(cell.sheet, cell.ref), ())):
                error_cells.add(key)
            elif isinstance(value, float) and not math.isfinite(value):
                error_cells.add(key)

    ordered = sorted(checked, key=lambda k: (
        [s.name for s in graph.book.sheets].index(k[0]), split_ref(k[1])))
    for key in ordered:
        cell = graph.formula_cells[key]
        label = _label(cell.sheet, cell.ref)
        formula = cell.formula
        calls = calls_in(formula)
        before = len(result.findings)
        members = expand_range(cell.array_ref) if cell.array_ref else [cell.ref]
        result.checked.extend(_label(cell.sheet, m) for m in members)
        if key in unknown_cells:
            for call in (c for c in calls if c.unknown):
                close = difflib.get_close_matches(call.name.upper(), list(_registry()), n=1)
                hint = f" (did you mean {close[0]}?)" if close else ""
                written = f"{call.prefix}{call.name}"
                add("unknown-function", cell.sheet, cell.ref,
                    f"{written} is not a stillair function{hint}; this cell cannot be checked",
                    formula=formula, cached=cell.cached)
            continue
        upstream = graph.ancestors(key)
        if upstream & unknown_cells:
            result.unchecked.extend(_label(cell.sheet, m) for m in members)
            continue
        cell_notes = notes.get(label, [])
        if key in error_cells:
            value = computed(cell.sheet, cell.ref)
            if upstream & error_cells:
                result.follow_on += 1
            elif key in graph.external:
                add("error", cell.sheet, cell.ref, "refers to another workbook; the audit does not "
                    "open linked files, so this cell cannot be recomputed", formula=formula,
                    cached=cell.cached, computed=value)
            else:
                message = value if isinstance(value, str) and not _is_error(value) else (
                    f"Excel error {value}" if _is_error(value) else f"not a finite number ({value})")
                add("error", cell.sheet, cell.ref, message, formula=formula, cached=cell.cached,
                    computed=value)
        else:
            calls_version = any(c.ours and c.name.upper() == "STILLAIR_VERSION" for c in calls)
            for ref in members:
                record = cells.get((cell.sheet, ref))
                has = record is not None and record.has_cached
                cached = record.cached if record is not None else None
                value = computed(cell.sheet, ref)
                if not has or _is_error(cached):
                    why = "no cached value" if not has else f"cached {cached}"
                    add("stale", cell.sheet, ref, f"{why}; the engine gives {_show(value)} "
                        "(the workbook was not recalculated and saved)", formula=formula,
                        cached=cached, computed=value)
                    continue
                same, rel = _same(cached, value, rtol)
                if same:
                    continue
                if calls_version:
                    add("version", cell.sheet, ref, f"the workbook records stillair "
                        f"{_show(cached)}, this engine is {version}", formula=formula,
                        cached=cached, computed=value)
                    continue
                detail = f" (relative difference {rel:.3g})" if rel is not None else ""
                add("mismatch", cell.sheet, ref, f"workbook {_show(cached)}, engine "
                    f"{_show(value)}{detail}", formula=formula, cached=cached, computed=value,
                    rel_diff=rel)
        for message in cell_notes:
            if message.startswith("Excel error ") or message == computed(cell.sheet, cell.ref):
                continue
            add("out-of-range", cell.sheet, cell.ref, message, formula=formula,
                computed=computed(cell.sheet, cell.ref))
        if len(result.findings) == before:
            result.ok.extend(_label(cell.sheet, m) for m in members)
    for label, message in evaluation.notes:
        if not label and not message.startswith("Excel error "):
            result.findings.append(Finding("out-of-range", "", message))


def _marker(book) -> str | None:
    for name in book.names:
        if name.name.lower() == MARKER_NAME and name.sheet is None:
            text = name.text.strip().lstrip("=").strip()
            if len(text) >= 2 and text[0] == text[-1] == '"':
                text = text[1:-1].replace('""', '"')
            return text.strip()
    return None


def _template_drift(result, book, cells, templates_dir) -> str | None:
    """Compare a filled-in template with its pristine copy; returns the marker text."""
    from .safezip import UnsafeWorkbook, open_package
    from .xlsx import BookError, read_book, split_ref

    marker = _marker(book)
    if marker is None:
        return None
    name, _, version = marker.rpartition(" ")
    if not name:
        name, version = marker, ""
    directory = Path(templates_dir) if templates_dir is not None else default_templates_dir()
    pristine_path = directory / f"{name}.xlsx"
    if not re.match(r"^[A-Za-z0-9][A-Za-z0-9_.-]*$", name) or not pristine_path.is_file():
        result.findings.append(Finding(
            "template-drift", "", f"the workbook says it was made from template {marker!r}, "
            f"which is not among the templates in {directory}; drift cannot be checked"))
        return marker
    try:
        with open_package(str(pristine_path)) as archive:
            pristine_book = read_book(str(pristine_path))
            pristine = read_cells(archive, pristine_book)
    except (UnsafeWorkbook, BookError) as error:
        raise AuditError(f"template {name}: {error}") from None
    installed = _marker(pristine_book)
    if installed != marker:
        result.findings.append(Finding(
            "version", "", f"the workbook was made from template {marker!r}; the installed "
            f"template is {installed!r}, so drift is not checked"))
        return marker
    present = {s.name.upper(): s.name for s in book.sheets}
    order = {s.name: i for i, s in enumerate(pristine_book.sheets)}
    originals = sorted((c for c in pristine.values() if c.formula is not None),
                       key=lambda c: (order.get(c.sheet, 0), split_ref(c.ref)))
    for original in originals:
        sheet = present.get(original.sheet.upper())
        if sheet is None:
            result.findings.append(Finding(
                "template-drift", _label(original.sheet, original.ref),
                f"sheet {original.sheet!r} of the template is missing",
                original_formula=original.formula, sheet=None, ref=None))
            continue
        now = cells.get((sheet, original.ref))
        if now is not None and now.formula is not None:
            if normalise_formula(now.formula) == normalise_formula(original.formula):
                continue
            message = f"formula edited: now {now.formula}, template {original.formula}"
            cached = now.cached
        elif now is not None and now.has_cached:
            message = f"formula overwritten by the constant {_show(now.cached)}; template " \
                      f"{original.formula}"
            cached = now.cached
        else:
            message = f"formula cleared; template {original.formula}"
            cached = None
        result.findings.append(Finding(
            "template-drift", _label(sheet, original.ref), message,
            formula=now.formula if now is not None else None, cached=cached,
            original_formula=original.formula, sheet=sheet, ref=original.ref))
    return marker


# ---------------------------------------------------------------------------------------------
# Output: terminal table, JSON, report workbook


def summary_line(result: AuditResult) -> str:
    counts = result.counts()
    parts = [f"{counts['ok']} ok"] + [f"{counts[k]} {k}" for k in KINDS if counts[k]]
    extra = []
    if result.follow_on:
        extra.append(f"{result.follow_on} follow-on error{'s' if result.follow_on != 1 else ''}")
    if result.unchecked:
        extra.append(f"{len(result.unchecked)} not checkable")
    tail = f" ({', '.join(extra)})" if extra else ""
    cells = len(result.checked)
    return (f"{cells} cell{'s' if cells != 1 else ''} checked: {', '.join(parts)}{tail}"
            f" - {'no findings' if not result.findings else f'{len(result.findings)} findings'}")


def format_table(result: AuditResult) -> str:
    head = f"stillair audit {result.path} (engine {result.engine_version}"
    head += f", template {result.template})" if result.template else ")"
    lines = [head]
    if result.findings:
        rows = [(f.kind, f.cell or "(workbook)", f.message) for f in result.findings]
        widths = [max(len(r[i]) for r in rows + [("KIND", "CELL", "")]) for i in (0, 1)]
        lines.append(f"{'KIND':<{widths[0]}}  {'CELL':<{widths[1]}}  DETAIL")
        for kind, cell, message in rows:
            lines.append(f"{kind:<{widths[0]}}  {cell:<{widths[1]}}  {message}")
    lines.append(summary_line(result))
    if result.report:
        lines.append(f"report: {result.report}")
    return "\n".join(lines)


def _jsonable(value):
    if isinstance(value, float) and not math.isfinite(value):
        return str(value)
    return value


def to_json(result: AuditResult) -> dict:
    findings = []
    for f in result.findings:
        item = f.public()
        item["cached"], item["computed"] = _jsonable(item["cached"]), _jsonable(item["computed"])
        findings.append(item)
    return {"book": result.path, "sha256": result.sha256, "engine_version": result.engine_version,
            "template": result.template, "rtol": None, "checked": len(result.checked),
            "counts": result.counts(), "follow_on_errors": result.follow_on,
            "unchecked": result.unchecked, "findings": findings, "ok": result.ok,
            "report": result.report, "timing": result.timing, "exit": result.exit_code}


def free_report_path(requested: str) -> tuple[str, int]:
    """Reserve a file name for the report that holds nothing yet: ``requested`` when it does not
    exist, else ``stem-1.xlsx``, ``stem-2.xlsx``...  The name is created empty (O_EXCL), so no
    existing file - the audited workbook included - is ever replaced.  Returns (path, fd)."""
    stem, ext = os.path.splitext(requested)
    for i in range(0, 1000):
        candidate = requested if i == 0 else f"{stem}-{i}{ext}"
        try:
            return candidate, os.open(candidate, os.O_CREAT | os.O_EXCL | os.O_WRONLY, 0o644)
        except FileExistsError:
            continue
    raise OSError(f"{requested}: no free report name (tried {stem}-1{ext} to {stem}-999{ext})")


def _excel_text(value) -> str:
    text = _show(value) if not isinstance(value, str) else value
    return text[:32000]


def write_report(result: AuditResult, requested: str) -> str:
    """Write the findings to a new .xlsx (one row per finding, a link to each cell); returns the
    path written, which differs from ``requested`` when that file exists already."""
    import tempfile

    import xlsxwriter

    if not requested.lower().endswith(".xlsx"):
        raise AuditError(f"--report {requested}: the report is an .xlsx file; name it REPORT.xlsx")
    target, fd = free_report_path(requested)
    os.close(fd)
    directory = os.path.dirname(os.path.abspath(target))
    handle, temporary = tempfile.mkstemp(suffix=".xlsx", prefix=".stillair-report-", dir=directory)
    os.close(handle)
    try:
        book_link = os.path.relpath(os.path.abspath(result.path), directory)
        # Text from the audited workbook is written as text, never as a formula or a link.
        wb = xlsxwriter.Workbook(temporary, {"strings_to_formulas": False, "strings_to_urls": False,
                                             "strings_to_numbers": False})
        bold = wb.add_format({"bold": True, "bg_color": "#DCE3EA", "border": 1})
        link = wb.add_format({"font_color": "#1F4E79", "underline": 1})
        sheet = wb.add_worksheet("Findings")
        header = ["kind", "cell", "message", "workbook value", "engine value",
                  "relative difference", "formula", "template formula"]
        for col, title in enumerate(header):
            sheet.write_string(0, col, title, bold)
        for row, f in enumerate(result.findings, start=1):
            sheet.write_string(row, 0, f.kind)
            if f.sheet is not None:
                location = "'" + f.sheet.replace("'", "''") + "'!" + f.ref
                url = f"external:{book_link}#{location}"
                if len(url) <= 2079:
                    sheet.write_url(row, 1, url, link, string=f.cell)
                else:
                    sheet.write_string(row, 1, f.cell)
            else:
                sheet.write_string(row, 1, f.cell or "(workbook)")
            sheet.write_string(row, 2, _excel_text(f.message))
            for col, value in ((3, f.cached), (4, f.computed)):
                if isinstance(value, float) and math.isfinite(value):
                    sheet.write_number(row, col, value)
                elif value is not None:
                    sheet.write_string(row, col, _excel_text(value))
            if f.rel_diff is not None:
                sheet.write_number(row, 5, f.rel_diff)
            if f.formula:
                sheet.write_string(row, 6, _excel_text(f.formula))
            if f.original_formula:
                sheet.write_string(row, 7, _excel_text(f.original_formula))
        sheet.set_column(0, 1, 18)
        sheet.set_column(2, 2, 70)
        sheet.set_column(3, 7, 18)
        sheet.freeze_panes(1, 0)
        if result.findings:
            sheet.autofilter(0, 0, len(result.findings), len(header) - 1)
        about = wb.add_worksheet("Summary")
        rows = [("workbook", os.path.abspath(result.path)), ("sha256", result.sha256),
                ("engine version", result.engine_version), ("template", result.template or ""),
                ("summary", summary_line(result))]
        rows += [(kind, result.counts()[kind]) for kind in ("ok",) + KINDS]
        for row, (key, value) in enumerate(rows):
            about.write_string(row, 0, key, bold)
            if isinstance(value, int):
                about.write_number(row, 1, value)
            else:
                about.write_string(row, 1, value)
        about.set_column(0, 0, 18)
        about.set_column(1, 1, 80)
        wb.close()
        os.replace(temporary, target)  # onto the empty file reserved above
    except BaseException:
        for leftover in (temporary, target):
            if os.path.exists(leftover) and (leftover == temporary or os.path.getsize(leftover) == 0):
                os.unlink(leftover)
        raise
    return target


# ---------------------------------------------------------------------------------------------
# Command line


def add_audit_parser(subparsers) -> argparse.ArgumentParser:
    """Add ``audit`` to the ``stillair`` subcommands."""
    audit = subparsers.add_parser(
        "audit", help="check a finished workbook's numbers against the engine",
        description="Recompute every formula that calls a stillair function (and every formula "
        "downstream of one) from the workbook's own inputs and compare with the values Excel "
        "saved. BOOK is only read, never modified. Exit status: 0 all ok, 1 findings, "
        "2 the file cannot be read.")
    _add_arguments(audit)
    return audit


def _add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("book", metavar="BOOK", help=".xlsx or .xlsm workbook (never modified)")
    parser.add_argument("--rtol", type=float, default=DEFAULT_RTOL,
                        help="relative tolerance for cached values (default %(default)g)")
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.add_argument("--report", metavar="REPORT.xlsx",
                        help="also write the findings to a new workbook, one row per finding with "
                        "a link to the cell; an existing file is never replaced (REPORT-1.xlsx... "
                        "is used instead)")
    parser.add_argument("--templates", metavar="DIR", default=None,
                        help="directory of the pristine templates (default: the installed ones)")


def run_audit(args) -> int:
    try:
        result = audit_book(args.book, args.rtol, getattr(args, "templates", None))
    except AuditError as error:
        return _unreadable(args, str(error))
    except Exception as error:  # a damaged file must not show a traceback
        if os.environ.get("STILLAIR_DEBUG"):
            raise
        return _unreadable(args, f"{args.book}: cannot audit this workbook "
                                 f"({type(error).__name__}: {' '.join(str(error).split())[:200]})")
    report_error = None
    if args.report:
        try:
            result.report = write_report(result, args.report)
        except (AuditError, OSError) as error:
            report_error = str(error) if isinstance(error, AuditError) else \
                f"--report {args.report}: cannot write ({error.strerror or error})"
    if args.json:
        data = to_json(result)
        data["rtol"] = args.rtol
        if report_error:
            data["report_error"] = report_error
        print(json.dumps(data, ensure_ascii=False, indent=1))
    else:
        print(format_table(result))
        if result.report and os.path.abspath(result.report) != os.path.abspath(args.report):
            print(f"({args.report} exists and was left alone; the report went to {result.report})")
    if report_error:
        print(f"stillair audit: {report_error}", file=sys.stderr)
        return EXIT_UNREADABLE
    return result.exit_code


def _unreadable(args, reason: str) -> int:
    reason = " ".join(reason.split())
    print(f"stillair audit: {reason}", file=sys.stderr)
    if getattr(args, "json", False):
        print(json.dumps({"book": args.book, "error": reason, "exit": EXIT_UNREADABLE}))
    return EXIT_UNREADABLE


def main(argv: list[str] | None = None) -> int:
    """``stillair audit`` on its own: ``python -m stillair.addin.audit BOOK ...``."""
    parser = argparse.ArgumentParser(prog="stillair audit", description=add_audit_parser.__doc__)
    _add_arguments(parser)
    return run_audit(parser.parse_args(argv))


if __name__ == "__main__":
    sys.exit(main())
