"""``stillair audit``: check a finished workbook's numbers against the engine.

The audit reads every formula and the value Excel cached for it, recomputes the workbook
headlessly from its own inputs (:class:`stillair.addin.workbook.model.Model`, calculating only our
cells, what they read and what reads them) and classifies every cell that calls one of our
functions and every cell downstream of one, built-in formulas included:

======================  ==========================================================================
ok                      the cached value is what the engine gives (within the tolerance)
mismatch                the cached value differs: both values and the relative difference
template-drift          a formula cell of the pristine template was overwritten or edited (compared
                        by meaning: numbers by value, names in any case, prefixes, whitespace)
error                   the engine rejects the inputs (its message), the cell is an Excel error,
                        or it computes a value over an error (a SUM skipping one of our messages)
unknown-function        a name that looks like ours (or is written as an add-in call) is not ours
cannot-evaluate         a construct the headless evaluator cannot calculate (named), or a cell
                        that depends on one
out-of-range            a correlation was used outside its validity range (which bound)
stale                   no cached value, or a cached error, or the template's old value after the
                        inputs changed, where the engine computes a value; the message says which
version                 the workbook records a different STILLAIR_VERSION or template version
======================  ==========================================================================

Tolerance: a numeric difference counts only when ``|a-b| > rtol*max(|a|,|b|)`` and
``|a-b| > atol + 1e-12*S``, S being the largest magnitude among the numbers the formula reads and
the two results: round-off around zero (a balance residual of -5.7e-14 against 1e-15) is ok.

Findings are listed worst first in that order.  The audited file is only ever read, through the
checks of :mod:`stillair.addin.workbook.safezip`; it is never written.  Exit status: 0 all ok, 1 findings, 2 the
file cannot be read (one line on stderr).
"""

from __future__ import annotations

import argparse
import difflib
import hashlib
import json
import math
import os
import re
import sys
import time
from dataclasses import asdict, dataclass, field
from pathlib import Path

from ..workbook.cachewriter import ERROR_VALUES

__all__ = ["KINDS", "Finding", "AuditResult", "audit_book", "format_table", "to_json",
           "write_report", "add_audit_parser", "run_audit", "main", "recognise_call", "calls_in",
           "normalise_formula", "Call", "differs",
           "EXIT_OK", "EXIT_FINDINGS", "EXIT_UNREADABLE"]

EXIT_OK, EXIT_FINDINGS, EXIT_UNREADABLE = 0, 1, 2
DEFAULT_RTOL = 1e-6

# Worst first: silent wrong numbers, then changed calculations, failures, cells that cannot be
# checked, correlations outside their range, missing recalculation, and traceability.
KINDS = ("mismatch", "template-drift", "error", "unknown-function", "cannot-evaluate",
         "out-of-range", "stale", "version")
_SEVERITY = {kind: i for i, kind in enumerate(KINDS)}
MARKER_NAME = "stillair_template"


def default_templates_dir() -> Path:
    from ..templates.spec import TEMPLATE_DIR
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
# Recognising our functions: the one grammar of stillair.addin.workbook.formulatext

from ..workbook.formulatext import Call, calls_in, normalise_formula, recognise_call  # noqa: E402
from ..workbook.formulatext import _families, _registry  # noqa: E402  (the grammar's own look-ups)


@dataclass
class CellRecord:
    """A formula cell (or an array formula's member) as the file holds it."""

    sheet: str
    ref: str
    formula: str | None            # "=..." (shared formulas expanded); None for array members
    cached: object = None
    has_cached: bool = False
    array_ref: str | None = None


class Records:
    """The cells of a book as :class:`CellRecord`, made when asked for (a workbook's constants
    are not copied: the audit looks at formula cells and the few cells drift asks about)."""

    def __init__(self, book):
        self.sheets = {s.name: s for s in book.sheets}

    def get(self, key) -> CellRecord | None:
        sheet = self.sheets.get(key[0])
        if sheet is None:
            return None
        name, ref = key
        cell = sheet.formulas.get(ref)
        if cell is not None:
            return CellRecord(name, ref, "=" + cell.formula if cell.formula is not None else None,
                              _stored(cell.cached), cell.has_cached, cell.array_ref)
        for values in (sheet.cached, sheet.values):
            if ref in values:
                return CellRecord(name, ref, None, _stored(values[ref]), True)
        if ref in sheet.array_members:
            return CellRecord(name, ref, None, None, False)
        return None

    def formulas(self):
        """Every formula cell's record, sheet by sheet."""
        for sheet in self.sheets.values():
            for ref in sheet.formulas:
                yield self.get((sheet.name, ref))


def _stored(value):
    from ..workbook.reader import CellError
    return str(value) if isinstance(value, CellError) else value


# ---------------------------------------------------------------------------------------------
# Comparing values


def _is_error(value) -> bool:
    return isinstance(value, str) and value.strip() in ERROR_VALUES


def relative_difference(cached: float, computed: float) -> float:
    scale = max(abs(cached), abs(computed))
    return 0.0 if scale == 0 else abs(cached - computed) / scale


# The absolute floor of a comparison grows with the size of the numbers the formula reads:
# a difference of two flows of 100 W cannot be trusted below about 1e-12 x 100 W.
ROUND_OFF = 1e-12
DEFAULT_ATOL = 1e-12


def differs(cached: float, computed: float, rtol: float, atol: float, scale: float = 0.0) -> bool:
    """Whether two numbers differ for the audit: |a-b| must exceed both rtol*max(|a|,|b|) and
    the absolute floor atol + ROUND_OFF*S, S being the largest magnitude among the numbers the
    formula reads and its results."""
    difference = abs(cached - computed)
    size = max(abs(cached), abs(computed), scale)
    return difference > rtol * max(abs(cached), abs(computed)) and \
        difference > atol + ROUND_OFF * size


def _same(cached, computed, rtol: float, atol: float = DEFAULT_ATOL, scale: float = 0.0
          ) -> tuple[bool, float | None]:
    if isinstance(cached, bool) or isinstance(computed, bool):
        return cached == computed, None
    if isinstance(cached, float) and isinstance(computed, float):
        if not (math.isfinite(cached) and math.isfinite(computed)):
            return cached == computed, None
        return not differs(cached, computed, rtol, atol, scale), relative_difference(cached, computed)
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
    from ..workbook.status import label
    return label(sheet, ref)


def audit_book(path: str, rtol: float = DEFAULT_RTOL, templates_dir: str | os.PathLike | None = None,
               atol: float = DEFAULT_ATOL) -> AuditResult:
    """Audit ``path``; raises :class:`AuditError` when it cannot be read."""
    from ..workbook.reader import BookError, read_book, split_ref

    if not (rtol >= 0):
        raise AuditError(f"--rtol must be >= 0, got {rtol}")
    if not (atol >= 0):
        raise AuditError(f"--atol must be >= 0, got {atol}")
    started = time.perf_counter()
    try:
        book = read_book(path)   # opened and safety-checked once; everything below uses it
    except BookError as error:
        raise AuditError(str(error)) from None
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for chunk in iter(lambda: handle.read(1 << 20), b""):
            digest.update(chunk)
    cells = Records(book)
    read_done = time.perf_counter()

    from ..workbook.model import Model
    maybe = _maybe_ours()
    seeds = {(sheet.name, ref) for sheet in book.sheets for ref, cell in sheet.formulas.items()
             if cell.formula and maybe.search(cell.formula) and calls_in(cell.formula)}
    checked, evaluation = set(), None
    timing = {"read": read_done - started}
    if seeds:   # a workbook without our functions has nothing to recompute
        try:
            model = Model(book)
            checked = model.downstream(seeds)
            evaluation = model.calculate(only=checked)
        except BookError as error:
            raise AuditError(str(error)) from None
        timing.update(engine_import=model.engine_seconds, load=model.load_seconds)
    findings: list[Finding] = []
    if evaluation is not None:
        timing["calculate"] = evaluation.calc_seconds
    classify_started = time.perf_counter()

    import stillair
    version = str(stillair.__version__)
    result = AuditResult(path, version, findings, [], [], sha256=digest.hexdigest())
    pristine = _pristine_template(result, book, templates_dir)
    if evaluation is not None:
        _classify(result, model, cells, checked, evaluation, rtol, atol, version, pristine)
    if pristine is not None:
        _template_drift(result, book, cells, pristine)
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


def _maybe_ours():
    """A quick test a formula must pass before it is tokenised to look for our calls: one of our
    name families, or an add-in prefix form."""
    families = "|".join(re.escape(f) for f in sorted(set(_families()) | set(_registry()),
                                                    key=len, reverse=True))
    return re.compile(rf"(?i)(?:{families})[\w.]*\s*\(|_xll\.|_xludf\.|!\s*[A-Za-z_][\w.]*\s*\(")


def _stale_advice(book, record, value, pristine_value, array: bool) -> str:
    """What happened to a cell whose saved value is missing or an error, in words."""
    app = book.application.split("/")[0].strip() or "the program that saved it"
    engine = f"the engine gives {_show(value)}"
    if not record.has_cached or (record.cached == "" and value not in (None, "")):
        return (f"no cached value; {engine} (the file holds no calculated value for this cell: "
                "it was written by a program that does not calculate, or saved without "
                "recalculation; recalculate where the stillair add-in is installed and save)")
    cached = record.cached
    if cached == "#NAME?" and book.saved_by_libreoffice:
        what = ("LibreOffice recalculates array formulas whenever it opens a file"
                if array else "LibreOffice recalculated this cell")
        return (f"cached #NAME?; {engine} ({what}, and without the stillair add-in installed "
                "our functions were unknown to it; open the workbook where the add-in is "
                "installed and recalculate)")
    if pristine_value is not None:
        return (f"cached {_show(cached)} is the value the template was saved with; {engine} "
                f"(the inputs were changed and the workbook was saved by {app} without "
                "recalculation)")
    return (f"cached {cached}; {engine} (the workbook was not recalculated with the stillair "
            "add-in before it was saved)")


def _classify(result, model, cells, checked, evaluation, rtol, atol, version, pristine) -> None:
    from ..workbook.reader import expand_range, split_ref

    book = model.book

    def add(kind, sheet, ref, message, **extra):
        result.findings.append(Finding(kind, _label(sheet, ref) if sheet else "", message,
                                       sheet=sheet, ref=ref, **extra))

    sheet_index = {s.name: i for i, s in enumerate(book.sheets)}
    ordered = sorted(checked, key=lambda k: (sheet_index.get(k[0], 0), split_ref(k[1])))
    calls_of = {k: calls_in(model.nodes[k].text) for k in ordered}
    unknown_cells = {k for k, calls in calls_of.items() if any(c.unknown for c in calls)}
    inputs_changed = pristine is not None and _inputs_changed(book, pristine)
    for key in ordered:
        node = model.nodes[key]
        record = cells.get(key)
        formula = "=" + node.text
        calls = calls_of[key]
        before = len(result.findings)
        members = expand_range(record.array_ref) if record and record.array_ref else [key[1]]
        result.checked.extend(_label(key[0], m) for m in members)
        if key in unknown_cells:
            for call in (c for c in calls if c.unknown):
                close = difflib.get_close_matches(call.name.upper(), list(_registry()), n=1)
                hint = f" (did you mean {close[0]}?)" if close else ""
                add("unknown-function", key[0], key[1],
                    f"{call.prefix}{call.name} is not a stillair function{hint}; this cell "
                    "cannot be checked", formula=formula, cached=record.cached if record else None)
            continue
        outcome = evaluation.results.get(key)
        if outcome is None:
            continue
        if outcome.status == "cannot-evaluate":
            if outcome.cause is not None and any(
                    k in unknown_cells for k in model.upstream([key]) if k[0] != "#name"):
                result.unchecked.extend(_label(key[0], m) for m in members)
                continue
            add("cannot-evaluate", key[0], key[1], outcome.messages[0], formula=formula,
                cached=record.cached if record else None)
            continue
        if outcome.status == "error":
            message = outcome.messages[0] if outcome.messages else "error"
            if message.startswith("follows from"):
                result.follow_on += 1
            else:
                add("error", key[0], key[1], message, formula=formula,
                    cached=record.cached if record else None, computed=outcome.value)
            continue
        calls_version = any(c.ours and c.canonical == "STILLAIR_VERSION" for c in calls)
        stale_members: list = []
        for ref in members:
            member = cells.get((key[0], ref))
            computed = evaluation.results.get((key[0], ref))
            value = computed.value if computed is not None else None
            scale = computed.scale if computed is not None else 0.0
            has = member is not None and member.has_cached
            cached = member.cached if member is not None else None
            template_value = pristine.get((key[0], ref)) if pristine else None
            if not has or _is_error(cached) or (cached == "" and value not in (None, "")):
                advice = _stale_advice(book, member or CellRecord(key[0], ref, None), value, None,
                                       bool(record and record.array_ref))
                if len(members) > 1:
                    stale_members.append((ref, cached, value, advice))
                else:
                    add("stale", key[0], ref, advice, formula=formula, cached=cached,
                        computed=value)
                continue
            same, rel = _same(cached, value, rtol, atol, scale)
            if same:
                continue
            if calls_version:
                add("version", key[0], ref, f"the workbook records stillair "
                    f"{_show(cached)}, this engine is {version}", formula=formula,
                    cached=cached, computed=value)
                continue
            if inputs_changed and template_value is not None and template_value.has_cached and \
                    _same(cached, template_value.cached, 0.0, 0.0)[0]:
                add("stale", key[0], ref, _stale_advice(book, member, value, template_value,
                                                        False),
                    formula=formula, cached=cached, computed=value)
                continue
            detail = f" (relative difference {rel:.3g})" if rel is not None else ""
            add("mismatch", key[0], ref, f"workbook {_show(cached)}, engine "
                f"{_show(value)}{detail}", formula=formula, cached=cached, computed=value,
                rel_diff=rel)
        if stale_members:
            # An array formula's cells went stale together: one finding for the array.
            ref, cached, value, advice = stale_members[0]
            advice = re.sub(r"; the engine gives [^(]*\(", "; the engine gives values (", advice, count=1)
            add("stale", key[0], key[1], f"{len(stale_members)} of the {len(members)} cells of "
                f"the array {record.array_ref}: {advice}", formula=formula, cached=cached,
                computed=value)
        if outcome.status == "note":
            for message in outcome.messages:
                add("out-of-range", key[0], key[1], message, formula=formula,
                    computed=outcome.value)
        if len(result.findings) == before:
            result.ok.extend(_label(key[0], m) for m in members)
    for cell, message in evaluation.notes:
        if not cell:
            result.findings.append(Finding("out-of-range", "", message))


def _marker(book) -> str | None:
    for name in book.names:
        if name.name.lower() == MARKER_NAME and name.sheet is None:
            text = name.text.strip().lstrip("=").strip()
            if len(text) >= 2 and text[0] == text[-1] == '"':
                text = text[1:-1].replace('""', '"')
            return text.strip()
    return None


@dataclass
class _Pristine:
    marker: str
    book: object
    cells: dict

    def get(self, key):
        return self.cells.get(key)


def _pristine_template(result, book, templates_dir):
    """The pristine template a filled-in workbook names in its marker (None when it names none,
    or names one that is not installed, or another version: each said in a finding)."""
    from ..workbook.reader import BookError, read_book

    marker = _marker(book)
    if marker is None:
        return None
    result.template = marker
    name = marker.rpartition(" ")[0] or marker
    directory = Path(templates_dir) if templates_dir is not None else default_templates_dir()
    pristine_path = directory / f"{name}.xlsx"
    if not re.match(r"^[A-Za-z0-9][A-Za-z0-9_.-]*$", name) or not pristine_path.is_file():
        result.findings.append(Finding(
            "template-drift", "", f"the workbook says it was made from template {marker!r}, "
            f"which is not among the templates in {directory}; drift cannot be checked"))
        return None
    try:
        pristine_book = read_book(str(pristine_path))
    except BookError as error:
        raise AuditError(f"template {name}: {error}") from None
    installed = _marker(pristine_book)
    if installed != marker:
        result.findings.append(Finding(
            "version", "", f"the workbook was made from template {marker!r}; the installed "
            f"template is {installed!r}, so drift is not checked"))
        return None
    return _Pristine(marker, pristine_book, Records(pristine_book))


def _inputs_changed(book, pristine) -> bool:
    """Whether a constant the template holds was changed in the workbook."""
    for sheet in pristine.book.sheets:
        try:
            now = book.sheet(sheet.name).values
        except KeyError:
            continue
        for ref, value in sheet.values.items():
            if ref in now and now[ref] != value:
                return True
    return False


def _template_drift(result, book, cells, pristine) -> None:
    """Compare a filled-in template's formulas with its pristine copy, by meaning."""
    from ..workbook.reader import split_ref

    present = {s.name.upper(): s.name for s in book.sheets}
    order = {s.name: i for i, s in enumerate(pristine.book.sheets)}
    originals = sorted((c for c in pristine.cells.formulas() if c.formula is not None),
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
            if now.formula == original.formula or \
                    normalise_formula(now.formula) == normalise_formula(original.formula):
                continue   # the same text needs no tokenising to mean the same
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
            "template": result.template, "rtol": None, "atol": None, "checked": len(result.checked),
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
    parser.add_argument("--atol", type=float, default=DEFAULT_ATOL,
                        help="absolute tolerance (default %(default)g); a difference must also "
                        "exceed atol + 1e-12 x the largest number the formula reads")
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.add_argument("--report", metavar="REPORT.xlsx",
                        help="also write the findings to a new workbook, one row per finding with "
                        "a link to the cell; an existing file is never replaced (REPORT-1.xlsx... "
                        "is used instead)")
    parser.add_argument("--templates", metavar="DIR", default=None,
                        help="directory of the pristine templates (default: the installed ones)")


def run_audit(args) -> int:
    try:
        result = audit_book(args.book, args.rtol, getattr(args, "templates", None),
                            atol=getattr(args, "atol", DEFAULT_ATOL))
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
        data["atol"] = getattr(args, "atol", DEFAULT_ATOL)
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
