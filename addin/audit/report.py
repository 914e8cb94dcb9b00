"""The audit's output: the terminal table, the JSON object and the report workbook."""

from __future__ import annotations

import math
import os
from typing import TYPE_CHECKING

from .findings import KINDS, AuditError, AuditResult, show

if TYPE_CHECKING:
    from .hand import HandCheck

__all__ = ["summary_line", "format_table", "to_json", "free_report_path", "write_report",
           "write_findings", "new_report"]


_HAND_KINDS = ("hand-formula", "iteration")   # counted in the hand check's own words


def summary_line(result: AuditResult) -> str:
    counts = result.counts()
    parts = [f"{counts['ok']} ok"] + [f"{counts[k]} {k}" for k in KINDS
                                      if counts[k] and k not in _HAND_KINDS]
    extra = []
    if result.follow_on:
        extra.append(f"{result.follow_on} follow-on error{'s' if result.follow_on != 1 else ''}")
    if result.unchecked:
        extra.append(f"{len(result.unchecked)} not checkable")
    if result.workbook_findings:
        extra.append(f"{result.workbook_findings} about the whole workbook")
    tail = f" ({', '.join(extra)})" if extra else ""
    cells = len(result.checked)    # the counts before the dash are cells; after it, findings
    hand: HandCheck | None = result.hand
    # a book with nothing recognised by hand reads as before (its counts are in the JSON)
    hand_words = f"; {hand.summary()}" if hand is not None and (
        hand.recognised or hand.findings or hand.iteration) else ""
    return (f"{cells} cell{'s' if cells != 1 else ''} checked: {', '.join(parts)}{tail}{hand_words}"
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
            "report": result.report, "timing": result.timing, "exit": result.exit_code,
            "hand": _hand_json(result.hand)}


def _hand_json(hand):
    if hand is None:
        return None
    from .hand import hand_json
    data = hand_json(hand)
    data.pop("findings")   # they are the report's own findings (kinds hand-formula, iteration)
    data.pop("book")
    return data


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
    text = show(value) if not isinstance(value, str) else value
    return text[:32000]


def _hand_sheet(wb, bold, hand) -> None:
    """Every formula the hand check recognised: what as, its value, whether it agrees, and what
    was stated about it (rounded constants, typed properties within the threshold)."""
    sheet = wb.add_worksheet("Hand formulas")
    header = ["cell", "recognised as", "value", "agrees", "inputs", "notes"]
    for col, title in enumerate(header):
        sheet.write_string(0, col, title, bold)
    for row, rec in enumerate(hand.recognised, start=1):
        sheet.write_string(row, 0, rec.cell)
        sheet.write_string(row, 1, rec.title)
        if math.isfinite(rec.value):
            sheet.write_number(row, 2, rec.value)
        sheet.write_string(row, 3, "yes" if not rec.findings else "no: see Findings")
        sheet.write_string(row, 4, ", ".join(f"{role} {_label(key)}" for role, key in
                                             rec.roles.items()))
        sheet.write_string(row, 5, _excel_text("; ".join(rec.statements)))
    sheet.write_string(len(hand.recognised) + 2, 0, hand.summary())
    sheet.set_column(0, 0, 18)
    sheet.set_column(1, 1, 60)
    sheet.set_column(2, 3, 14)
    sheet.set_column(4, 5, 60)
    sheet.freeze_panes(1, 0)


def _label(key) -> str:
    from ..workbook.status import label
    return label(*key)


def write_report(result: AuditResult, requested: str) -> str:
    """Write the findings to a new .xlsx (one row per finding, a link to each cell); returns the
    path written, which differs from ``requested`` when that file exists already."""

    def fill(wb, styles, directory):
        book_link = os.path.relpath(os.path.abspath(result.path), directory)
        sheet = wb.add_worksheet("Findings")
        write_findings(sheet, styles, [(book_link, f) for f in result.findings])
        if result.hand is not None and result.hand.recognised:
            _hand_sheet(wb, styles["bold"], result.hand)
        about = wb.add_worksheet("Summary")
        rows: list[tuple[str, str | int]] = [("workbook", os.path.abspath(result.path)), ("sha256", result.sha256),
                ("engine version", result.engine_version), ("template", result.template or ""),
                ("summary", summary_line(result))]
        rows += [(f"{kind} (cells)", result.counts()[kind]) for kind in ("ok",) + KINDS]
        for row, (key, value) in enumerate(rows):
            about.write_string(row, 0, key, styles["bold"])
            if isinstance(value, int):
                about.write_number(row, 1, value)
            else:
                about.write_string(row, 1, value)
        about.set_column(0, 0, 18)
        about.set_column(1, 1, 80)

    return new_report(requested, fill)


FINDING_HEADER = ["kind", "cell", "message", "workbook value", "engine value",
                  "relative difference", "formula", "template formula"]


def write_findings(sheet, styles, findings, book_column: bool = False) -> None:
    """One row per finding under a header: kind, the cell (a link into its workbook), message,
    both values, the difference, the formulas; ``book_column`` puts the workbook first (a
    report of many workbooks).  ``findings``: (link to the workbook, Finding) pairs."""
    header = (["workbook"] if book_column else []) + FINDING_HEADER
    first = 1 if book_column else 0
    for col, title in enumerate(header):
        sheet.write_string(0, col, title, styles["bold"])
    for row, (book_link, f) in enumerate(findings, start=1):
        if book_column:
            sheet.write_string(row, 0, book_link)
        sheet.write_string(row, first, f.kind)
        if f.sheet is not None:
            assert f.ref is not None  # a finding on a sheet names its cell
            location = "'" + f.sheet.replace("'", "''") + "'!" + f.ref
            url = f"external:{book_link}#{location}"
            if len(url) <= 2079:
                sheet.write_url(row, first + 1, url, styles["link"], string=f.cell)
            else:
                sheet.write_string(row, first + 1, f.cell)
        else:
            sheet.write_string(row, first + 1, f.cell or "(workbook)")
        sheet.write_string(row, first + 2, _excel_text(f.message))
        for col, value in ((first + 3, f.cached), (first + 4, f.computed)):
            if isinstance(value, float) and math.isfinite(value):
                sheet.write_number(row, col, value)
            elif value is not None:
                sheet.write_string(row, col, _excel_text(value))
        if f.rel_diff is not None:
            sheet.write_number(row, first + 5, f.rel_diff)
        if f.formula:
            sheet.write_string(row, first + 6, _excel_text(f.formula))
        if f.original_formula:
            sheet.write_string(row, first + 7, _excel_text(f.original_formula))
    if book_column:
        sheet.set_column(0, 0, 40)
    sheet.set_column(first, first + 1, 18)
    sheet.set_column(first + 2, first + 2, 70)
    sheet.set_column(first + 3, first + 7, 18)
    sheet.freeze_panes(1, 0)
    if findings:
        sheet.autofilter(0, 0, len(findings), len(header) - 1)


def new_report(requested: str, fill) -> str:
    """A new report workbook at ``requested`` (or the next free REPORT-n.xlsx): ``fill(wb,
    styles, directory)`` writes its sheets into a temporary file in the same folder, which then
    takes the reserved name.  Text from audited workbooks is written as text, never as a
    formula or a link.  Returns the path written."""
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
        wb = xlsxwriter.Workbook(temporary, {"strings_to_formulas": False, "strings_to_urls": False,
                                             "strings_to_numbers": False})
        styles = {"bold": wb.add_format({"bold": True, "bg_color": "#DCE3EA", "border": 1}),
                  "link": wb.add_format({"font_color": "#1F4E79", "underline": 1})}
        fill(wb, styles, directory)
        wb.close()
        os.replace(temporary, target)  # onto the empty file reserved above
    except BaseException:
        for leftover in (temporary, target):
            if os.path.exists(leftover) and (leftover == temporary or os.path.getsize(leftover) == 0):
                os.unlink(leftover)
        raise
    return target
