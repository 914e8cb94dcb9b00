"""``stillair audit DIR``: every workbook in a folder and below, one summary line each.

Each workbook is audited exactly as ``stillair audit BOOK`` audits it (:func:`audit_book`), in
``--jobs`` processes.  A book is "clean" (no findings), has "findings", or "could not be read"
(the reason); the exit status is the worst of them (0, 1, 2).  ``--json`` prints one object with
every book's own audit object; ``--report`` writes one workbook: a "Books" sheet (one row per
workbook) and a "Findings" sheet (every finding, its workbook in the first column, a link to
the cell).

Which files: .xlsx and .xlsm, and .ods where LibreOffice is installed (without it an .ods is
named as skipped, never silently passed over).  Office lock files (``~$book.xlsx``,
``.~lock.book.xlsx#``) are not workbooks and are left out; folders are not followed through
symbolic links (a link loop cannot make the walk endless).
"""

from __future__ import annotations

import json
import os
import shutil
import sys
from dataclasses import dataclass, field

from .findings import DEFAULT_ATOL, EXIT_FINDINGS, EXIT_OK, EXIT_UNREADABLE, AuditError, AuditResult
from .report import new_report, summary_line, to_json, write_findings

__all__ = ["find_workbooks", "BookOutcome", "audit_folder", "run_folder_audit", "main",
           "WORKBOOK_SUFFIXES"]

WORKBOOK_SUFFIXES = (".xlsx", ".xlsm")
LIBREOFFICE_SUFFIXES = (".ods",)
# The book's state in the summary, by exit status.
STATES = {EXIT_OK: "clean", EXIT_FINDINGS: "findings", EXIT_UNREADABLE: "unreadable"}


def libreoffice_installed() -> bool:
    return shutil.which("soffice") is not None or shutil.which("libreoffice") is not None


def find_workbooks(folder: str, ods: bool | None = None) -> tuple[list[str], list[str]]:
    """(workbooks to audit, .ods files skipped because LibreOffice is missing), each sorted by
    path, found in ``folder`` and every folder below it."""
    if ods is None:
        ods = libreoffice_installed()
    books: list[str] = []
    skipped: list[str] = []
    for root, folders, files in os.walk(folder):
        folders.sort()
        for name in files:
            lower = name.lower()
            if name.startswith("~$") or name.startswith(".~lock."):
                continue   # an Office lock file beside an open workbook
            path = os.path.join(root, name)
            if lower.endswith(WORKBOOK_SUFFIXES):
                books.append(path)
            elif lower.endswith(LIBREOFFICE_SUFFIXES):
                (books if ods else skipped).append(path)
    return sorted(books), sorted(skipped)


@dataclass
class BookOutcome:
    """One workbook of the folder: its audit, or why it could not be read."""

    path: str
    result: AuditResult | None = None
    error: str | None = None

    @property
    def exit_code(self) -> int:
        return EXIT_UNREADABLE if self.result is None else self.result.exit_code

    @property
    def state(self) -> str:
        return STATES[self.exit_code]

    def line(self, width: int) -> str:
        detail = self.error if self.result is None else summary_line(self.result)
        return f"{self.state:<10}  {self.path:<{width}}  {detail}"

    def public(self) -> dict:
        if self.result is None:
            return {"book": self.path, "error": self.error, "exit": EXIT_UNREADABLE}
        return to_json(self.result)


@dataclass
class FolderAudit:
    folder: str
    books: list[BookOutcome]
    skipped: list[str] = field(default_factory=list)

    @property
    def exit_code(self) -> int:
        return max((b.exit_code for b in self.books), default=EXIT_UNREADABLE)

    def total_line(self) -> str:
        counts = {state: sum(1 for b in self.books if b.state == state) for state in STATES.values()}
        words = {"clean": "clean", "findings": "with findings", "unreadable": "could not be read"}
        parts = [f"{counts[s]} {words[s]}" for s in STATES.values() if counts[s] or s == "clean"]
        count = len(self.books)
        text = f"{count} workbook{'s' if count != 1 else ''}: {', '.join(parts)}"
        if self.skipped:
            text += (f"; {len(self.skipped)} .ods file{'s' if len(self.skipped) != 1 else ''} "
                     "skipped (LibreOffice is not installed)")
        return text


# Settings of a worker process (set once by _configure: every book is audited alike).
_SETTINGS: dict = {}


def _configure(rtol: float, atol: float, templates) -> None:
    _SETTINGS.update(rtol=rtol, atol=atol, templates=templates)


def _audit_one(path: str) -> BookOutcome:
    from .check import audit_book

    try:
        return BookOutcome(path, audit_book(path, _SETTINGS["rtol"], _SETTINGS["templates"],
                                            atol=_SETTINGS["atol"]))
    except AuditError as error:
        return BookOutcome(path, error=" ".join(str(error).split()))
    except Exception as error:  # noqa: BLE001  one damaged file must not stop the others
        if os.environ.get("STILLAIR_DEBUG"):
            raise
        reason = " ".join(str(error).split())[:200]
        return BookOutcome(path, error=f"{path}: cannot audit this workbook "
                                       f"({type(error).__name__}: {reason})")


def audit_folder(folder: str, rtol: float, atol: float = DEFAULT_ATOL, templates=None,
                 jobs: int = 1) -> FolderAudit:
    """Audit every workbook in ``folder`` and below (``jobs`` processes)."""
    from ..workbook.batch import run_jobs

    books, skipped = find_workbooks(folder)
    _configure(rtol, atol, templates)
    outcomes = run_jobs(_audit_one, books, jobs, unit="book", start=_configure,
                        start_args=(rtol, atol, templates))
    return FolderAudit(folder, outcomes, skipped)


def write_folder_report(audit: FolderAudit, requested: str) -> str:
    """One workbook: "Books" (each workbook's state and summary) and "Findings" (every finding
    with its workbook first and a link to the cell)."""

    def fill(wb, styles, directory):
        books = wb.add_worksheet("Books")
        for col, title in enumerate(("workbook", "state", "exit status", "summary")):
            books.write_string(0, col, title, styles["bold"])
        findings = []
        for row, outcome in enumerate(audit.books, start=1):
            link = os.path.relpath(os.path.abspath(outcome.path), directory)
            books.write_string(row, 0, link)
            books.write_string(row, 1, outcome.state)
            books.write_number(row, 2, outcome.exit_code)
            books.write_string(row, 3, outcome.error if outcome.result is None
                               else summary_line(outcome.result))
            if outcome.result is not None:
                findings.extend((link, f) for f in outcome.result.findings)
        books.write_string(len(audit.books) + 2, 0, "total", styles["bold"])
        books.write_string(len(audit.books) + 2, 3, audit.total_line())
        books.set_column(0, 0, 40)
        books.set_column(1, 2, 12)
        books.set_column(3, 3, 90)
        books.freeze_panes(1, 0)
        write_findings(wb.add_worksheet("Findings"), styles, findings, book_column=True)

    return new_report(requested, fill)


def run_folder_audit(args) -> int:
    """The command: summary lines (or --json), the total, the report; exit the worst status."""
    from ..workbook.batch import check_jobs

    try:
        jobs = check_jobs(getattr(args, "jobs", 1))
        if not (args.rtol >= 0) or not (getattr(args, "atol", DEFAULT_ATOL) >= 0):
            raise ValueError(f"--rtol and --atol must be >= 0, got {args.rtol} and "
                             f"{getattr(args, 'atol', DEFAULT_ATOL)}")
    except ValueError as error:
        print(f"stillair audit: {error}", file=sys.stderr)
        return EXIT_UNREADABLE
    audit = audit_folder(args.book, args.rtol, getattr(args, "atol", DEFAULT_ATOL),
                         getattr(args, "templates", None), jobs)
    if not audit.books:
        print(f"stillair audit: {args.book}: no workbook (.xlsx, .xlsm"
              f"{', .ods' if libreoffice_installed() else ''}) in this folder or below"
              + (f"; {len(audit.skipped)} .ods skipped (LibreOffice is not installed)"
                 if audit.skipped else ""), file=sys.stderr)
        return EXIT_UNREADABLE
    report, report_error = None, None
    if args.report:
        try:
            report = write_folder_report(audit, args.report)
        except (AuditError, OSError) as error:
            report_error = str(error) if isinstance(error, AuditError) else \
                f"--report {args.report}: cannot write ({error.strerror or error})"
    if args.json:
        data = {"folder": args.book, "books": [b.public() for b in audit.books],
                "skipped": audit.skipped, "summary": audit.total_line(), "report": report,
                "exit": audit.exit_code}
        if report_error:
            data["report_error"] = report_error
        print(json.dumps(data, ensure_ascii=False, indent=1))
    else:
        width = max(len(b.path) for b in audit.books)
        for outcome in audit.books:
            print(outcome.line(width))
        print(audit.total_line())
        if report:
            print(f"report: {report}" + (f" ({args.report} exists and was left alone)"
                                         if os.path.abspath(report) != os.path.abspath(args.report)
                                         else ""))
    if report_error:
        print(f"stillair audit: {report_error}", file=sys.stderr)
        return EXIT_UNREADABLE
    return audit.exit_code



def main(argv: list[str] | None = None) -> int:
    """``python -m stillair.addin.audit BOOK|DIR ...``: a folder here, a workbook by the
    single-book audit (this module sits above check.py, so the routing lives here)."""
    import argparse

    from .check import _add_arguments, add_audit_parser, run_audit

    parser = argparse.ArgumentParser(prog="stillair audit", description=add_audit_parser.__doc__)
    _add_arguments(parser)
    args = parser.parse_args(argv)
    return run_folder_audit(args) if os.path.isdir(args.book) else run_audit(args)
