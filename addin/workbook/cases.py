"""``calc BOOK --cases CASES.csv``: one workbook calculated once per row of a table of inputs.

The header of CASES.csv names the inputs as ``--set`` does (a defined name or Sheet!B3); each
row gives their values.  The workbook is read, prepared and calculated as it is once; every row
is then one ``Model.calculate(sets=..., reuse=True)``, which calculates only the cells the row's
inputs reach and takes the others from that first calculation, with each header resolved by ``sets.resolve_target`` and each value
read by ``sets.parse_value`` — the very path of ``--set``, so every rule ``--set`` applies to a
value applies to every case.  An empty field leaves that input as the workbook has it.

A row that cannot be calculated (a value the input refuses, a row of the wrong width) is
reported in its own row, status "failed", and the other rows go on.  The results hold, per row,
the inputs as typed, every named result (each defined name of one formula cell) — or, in a
workbook without such names, the Results sheet's computed cells — the row's status and its notes.

Status of a row: "ok" (every cell a value), "notes" (a correlation outside its range, or another
note), "error" (a formula cell is an error or cannot be evaluated: what makes ``calc`` exit 1),
"failed" (the row was not calculated).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import csv
import io
import math
import os
from dataclasses import dataclass

from .reader import Book, BookError, split_ref
from .report import group_notes
from .rules import check_sets
from .sets import parse_value, resolve_target
from .status import label

if TYPE_CHECKING:
    from .model import Model

__all__ = ["CaseTable", "CaseOutcome", "CaseRun", "read_cases", "result_columns", "run_cases",
           "write_results", "summary", "exit_status", "cases_command", "ROW_STATUSES", "MAX_CASES"]

ROW_STATUSES = ("ok", "notes", "error", "failed")
# Bounds a table of cases is read within (a hostile or mistaken file stops with a message).
MAX_CASES = 1_000_000
MAX_CASES_BYTES = 200 * 1024 * 1024
# The results' own columns, after the inputs and the results.
LINE_COLUMN, STATUS_COLUMN, NOTES_COLUMN = "line", "status", "notes"


@dataclass(frozen=True)
class CaseTable:
    """CASES.csv as read: its header (the inputs) and its rows, each with its line number."""

    path: str
    headers: tuple[str, ...]
    rows: tuple[tuple[int, tuple[str, ...]], ...]


@dataclass(frozen=True)
class CaseOutcome:
    """One row calculated: its line in CASES.csv, the fields as typed, the status, one value per
    result column (empty for a failed row) and the notes in one text."""

    line: int
    fields: tuple[str, ...]
    status: str
    values: tuple
    notes: str


def read_cases(path: str) -> CaseTable:
    """Read CASES.csv (UTF-8, with or without Excel's byte-order mark; comma, semicolon or tab).

    Raises BookError for a file that has no header or a header with a blank or repeated name:
    nothing could be calculated from it."""
    try:
        if os.path.getsize(path) > MAX_CASES_BYTES:
            raise BookError(f"{path}: larger than {MAX_CASES_BYTES // 2**20} MiB; split the cases")
        with open(path, encoding="utf-8-sig", newline="") as handle:
            text = handle.read()
    except UnicodeDecodeError as error:
        raise BookError(f"{path}: not UTF-8 text (byte {error.start}); save the table as CSV UTF-8") \
            from None
    except OSError as error:
        raise BookError(f"{path}: cannot read ({error.strerror or error})") from None
    lines = text.splitlines()
    if not lines or not lines[0].strip():
        raise BookError(f"{path}: no header line; the first line names the inputs, "
                        "e.g. dissipation,ambient_t")
    delimiter = _delimiter(lines[0])
    reader = csv.reader(io.StringIO(text), delimiter=delimiter)
    try:
        header = next(reader)
    except csv.Error as error:
        raise BookError(f"{path}: line 1: {error}") from None
    headers = tuple(h.strip() for h in header)
    for number, name in enumerate(headers, start=1):
        if not name:
            raise BookError(f"{path}: column {number} of the header is blank; name the input "
                            "(a defined name or Sheet!B3)")
    seen: dict[str, int] = {}
    for number, name in enumerate(headers, start=1):
        if name.lower() in seen:
            raise BookError(f"{path}: the header names {name!r} twice (columns {seen[name.lower()]} "
                            f"and {number})")
        seen[name.lower()] = number
    rows = []
    try:
        for fields in reader:
            if not any(f.strip() for f in fields):
                continue   # a blank line (Excel adds one at the end)
            rows.append((reader.line_num, tuple(fields)))
            if len(rows) > MAX_CASES:
                raise BookError(f"{path}: more than {MAX_CASES:,} cases; split the table")
    except csv.Error as error:
        raise BookError(f"{path}: line {reader.line_num}: {error}") from None
    return CaseTable(path, headers, tuple(rows))


def _delimiter(header_line: str) -> str:
    """The header's separator: the one of comma, semicolon, tab it uses (Excel writes ';' where
    the decimal sign is a comma); a one-column header has none, so comma."""
    counts = {d: header_line.count(d) for d in (",", ";", "\t")}
    best = max(counts, key=lambda delimiter: counts[delimiter])
    return best if counts[best] else ","


def _resolve_headers(book: Book, table: CaseTable) -> tuple[tuple[str, str], ...]:
    """Each header's cell, through --set's own resolution; a header no cell answers to stops
    the run (no row could be calculated), with the column named."""
    targets = []
    seen: dict[tuple[str, str], str] = {}
    for number, header in enumerate(table.headers, start=1):
        try:
            target = resolve_target(book, header)
        except BookError as error:
            reason = str(error)
            prefix = f"--set {header}: "
            reason = reason[len(prefix):] if reason.startswith(prefix) else reason
            raise BookError(f"{table.path}: column {number} ({header}): {reason}") from None
        if target in seen:
            raise BookError(f"{table.path}: columns {seen[target]} and {header!r} name the same "
                            f"cell {label(*target)}")
        seen[target] = repr(header)
        targets.append(target)
    return tuple(targets)


def result_columns(book: Book, inputs=()) -> list[tuple[str, tuple[str, str]]]:
    """(column name, cell) of every result: each visible defined name of one formula cell, in
    the workbook's order; without any, the Results sheet's formula cells (named "Results!B5").
    Cells set as inputs are left out (their value is already in the input columns)."""
    inputs = set(inputs)
    columns = []
    for name in book.names:
        if name.hidden or name.name.startswith("_xlnm.") or name.sheet is not None:
            continue
        try:
            # a result is a formula cell: found, not refused as a --set target would be
            sheet_name, ref = resolve_target(book, name.name, replace_formulas=True)
        except BookError:
            continue   # a name of a range, a constant or a formula: not one cell's result
        if ref in book.sheet(sheet_name).formulas and (sheet_name, ref) not in inputs:
            columns.append((name.name, (sheet_name, ref)))
    if columns:
        return columns
    for sheet in book.sheets:
        if sheet.name.lower() == "results":
            refs = sorted(sheet.formula_refs(), key=split_ref)
            return [(label(sheet.name, ref), (sheet.name, ref)) for ref in refs
                    if (sheet.name, ref) not in inputs]
    return []


@dataclass
class CaseRun:
    """A workbook's model, the inputs the header names and the result columns: what every row
    reads.  Built once per process."""

    book_path: str
    table: CaseTable
    model: "Model"
    targets: tuple[tuple[str, str], ...]
    columns: list[tuple[str, tuple[str, str]]]

    @classmethod
    def prepare(cls, book_path: str, table: CaseTable) -> "CaseRun":
        from .model import _model_of

        model = _model_of(book_path)
        targets = _resolve_headers(model.book, table)
        model.keep_base()   # before the workers fork: each row calculates only what it reaches
        return cls(book_path, table, model, targets, result_columns(model.book, targets))

    def run(self, row: tuple[int, tuple[str, ...]]) -> CaseOutcome:
        """One row: set its inputs the way --set does, calculate, collect the results.  Any
        failure stays in the row."""
        line, fields = row
        headers = self.table.headers
        try:
            if len(fields) > len(headers):
                raise BookError(f"line {line} has {len(fields)} fields, the header names "
                                f"{len(headers)} inputs")
            sets, shown = {}, {}
            for header, text in zip(headers, fields):
                if not text.strip():
                    continue   # an empty field: the workbook's own value
                key = resolve_target(self.model.book, header)
                sets[key] = parse_value(text)
                shown[key] = f"{header}={text.strip()}"
            evaluation = self.model.calculate(sets, reuse=True)
            # the workbook's input rules apply to every row's values, as to --set
            unchecked = check_sets(self.model, evaluation, sets, shown, command="")
            evaluation.notes.extend(("", message) for message in unchecked)
        except Exception as error:  # noqa: BLE001  a failing row must not stop the others
            reason = " ".join(str(error).split()) or type(error).__name__
            if not isinstance(error, (BookError, ValueError)):
                reason = f"{type(error).__name__}: {reason}"
            return CaseOutcome(line, fields, "failed", (), reason)
        values = tuple(_plain(evaluation.values.get(sheet, {}).get(ref))
                       for _, (sheet, ref) in self.columns)
        if evaluation.failed:
            status = "error"
        elif evaluation.notes:
            status = "notes"
        else:
            status = "ok"
        notes = " | ".join(f"{cells}: {message}" if cells else message
                           for cells, message in group_notes(evaluation.notes))
        return CaseOutcome(line, fields, status, values, notes)


def _plain(value):
    """A result as one CSV field's value: numbers, TRUE/FALSE, text; a range's value is not a
    single result and shows as empty."""
    if isinstance(value, (list, tuple)):
        return None
    return value


# The state of a worker process: the run it prepared (or, after a fork, inherited).
_RUN: CaseRun | None = None


def _start_worker(book_path: str, table: CaseTable) -> None:
    global _RUN
    if _RUN is None or _RUN.book_path != book_path or _RUN.table != table:
        _RUN = CaseRun.prepare(book_path, table)


def _run_row(row) -> CaseOutcome:
    assert _RUN is not None, "the worker was not started"
    return _RUN.run(row)


def run_cases(book_path: str, cases_path: str, jobs: int = 1) -> tuple[CaseRun, list[CaseOutcome]]:
    """Read CASES.csv, prepare the workbook once and calculate every row (in ``jobs``
    processes).  Raises BookError when nothing can be calculated (the table or the header)."""
    from .batch import run_jobs

    table = read_cases(cases_path)
    _start_worker(book_path, table)
    assert _RUN is not None
    outcomes = run_jobs(_run_row, table.rows, jobs, unit="case", start=_start_worker,
                        start_args=(book_path, table))
    return _RUN, outcomes


# A text field starting with one of these is read as a formula when the CSV is opened in a
# spreadsheet; text from a workbook (perhaps someone else's) must stay text.
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def _text(text: str) -> str:
    return "'" + text if text.startswith(_FORMULA_STARTS) else text


def _field(value) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, (int, float)):
        # repr: the shortest text that reads back as the same float (results compare exactly).
        return repr(float(value)) if math.isfinite(value) else "#NUM!"
    return _text(str(value))


def write_results(run: CaseRun, outcomes: list[CaseOutcome], stream) -> None:
    """RESULTS.csv: line, the inputs as typed, the results, status, notes; one row per case."""
    writer = csv.writer(stream, lineterminator="\n")
    result_names = [name for name, _ in run.columns]
    writer.writerow([LINE_COLUMN, *run.table.headers, *result_names, STATUS_COLUMN, NOTES_COLUMN])
    width = len(run.table.headers)
    for outcome in outcomes:
        inputs = list(outcome.fields[:width]) + [""] * (width - len(outcome.fields[:width]))
        values = [_field(v) for v in outcome.values] or [""] * len(result_names)
        writer.writerow([outcome.line, *inputs, *values, outcome.status, _text(outcome.notes)])


def summary(outcomes: list[CaseOutcome]) -> str:
    """"1000 cases: 997 ok, 2 with notes, 1 failed (line 18: ...)"."""
    counts = {status: 0 for status in ROW_STATUSES}
    for outcome in outcomes:
        counts[outcome.status] += 1
    words = {"ok": "ok", "notes": "with notes", "error": "with error cells", "failed": "failed"}
    parts = [f"{counts[s]} {words[s]}" for s in ROW_STATUSES if counts[s] or s == "ok"]
    text = f"{len(outcomes)} case{'s' if len(outcomes) != 1 else ''}: " + ", ".join(parts)
    first_failed = next((o for o in outcomes if o.status == "failed"), None)
    if first_failed is not None:
        text += f" (first failure, line {first_failed.line}: {first_failed.notes})"
    return text


def exit_status(outcomes: list[CaseOutcome]) -> int:
    """The worst row decides: 0 every row ok or with notes, 1 a row with error cells, 2 a row
    that could not be calculated."""
    statuses = {o.status for o in outcomes}
    return 2 if "failed" in statuses else 1 if "error" in statuses else 0


def cases_command(args) -> int:
    """``calc BOOK --cases CASES.csv [--out RESULTS.csv] [--jobs N]`` after the command line's
    file checks: RESULTS.csv to --out (a new file only) or to stdout, the summary line on
    stdout (with --out) or stderr, the exit status of the worst row."""
    import sys

    from stillair._console import say

    run, outcomes = run_cases(args.book, args.cases, args.jobs)
    if args.out:
        try:
            # "x": created here or not at all; the command line checked the name is free, and
            # a file that appeared during the run is left alone.
            with open(args.out, "x", encoding="utf-8", newline="") as handle:
                write_results(run, outcomes, handle)
        except FileExistsError:
            raise BookError(f"{args.out}: appeared while calculating; left as it is") from None
        except OSError as error:
            raise BookError(f"{args.out}: cannot write ({error.strerror or error})") from None
        print(summary(outcomes) + f"; wrote {args.out}")
    else:
        write_results(run, outcomes, sys.stdout)
        sys.stdout.flush()
        say("stillair calc", summary(outcomes))
    return exit_status(outcomes)
