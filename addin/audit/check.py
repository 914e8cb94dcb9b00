"""``stillair audit``: check a finished workbook's numbers against the engine.

The audit reads every formula and the value Excel cached for it, recomputes the workbook
headlessly from its own inputs (:class:`stillair.addin.workbook.model.Model`, calculating only our
cells, what they read and what reads them) and classifies every cell that calls one of our
functions, every cell downstream of one, built-in formulas included, and every formula those
read (in a template: every formula cell):

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
hand-formula            a formula typed by hand, recognised numerically (:mod:`.hand`), is wrong:
                        a mistyped constant, a correlation outside its range, a typed property
                        at the wrong temperature, beta or radiation in degC, a length, area or
                        temperature difference that disagrees between the group and the flow
iteration               iterative calculation is on and the stored values are not converged, or
                        a loop of formulas is saved with iterative calculation off
stale                   no cached value, or a cached error, or the template's old value after the
                        inputs changed, where the engine computes a value; the message says which
version                 the workbook records a different STILLAIR_VERSION or template version
======================  ==========================================================================

Tolerance: a numeric difference counts only when ``|a-b| > rtol*max(|a|,|b|)`` and
``|a-b| > atol + 1e-12*S``, S being the largest magnitude among the numbers the formula reads and
the two results: round-off around zero (a balance residual of -5.7e-14 against 1e-15) is ok.

Counts are cells (ok, and per kind the cells whose worst finding is of that kind); a range note
shown by many cells is one finding naming them.  Findings are listed worst first in that order.  The audited file is only ever read, through the
checks of :mod:`stillair.addin.workbook.safezip`; it is never written.  Exit status: 0 all ok, 1 findings, 2 the
file cannot be read (one line on stderr).
"""

from __future__ import annotations

import argparse
import difflib
import hashlib
import json
import os
import re
import sys
import time

from ..workbook.formulatext import Call, calls_in, normalise_formula, recognise_call
from ..workbook.formulatext import _families, _registry  # the grammar's own look-ups
from .drift import (blank_inputs, inputs_changed, pristine_template, template_drift,
                    template_marker)
from .hand import check_hand_book, hand_findings
from .findings import (DEFAULT_ATOL, DEFAULT_RTOL, EXIT_FINDINGS, EXIT_OK, EXIT_UNREADABLE, KINDS,
                       AuditError, AuditResult, CellRecord, Finding, Records, default_templates_dir,
                       differs, is_error_text, label, same_value, show)
from .report import format_table, summary_line, to_json, write_report

# The audit's public face: its functions, and the grammar and comparison it uses.
__all__ = ["KINDS", "Finding", "AuditResult", "AuditError", "audit_book", "summary_line",
           "format_table", "to_json", "write_report", "add_audit_parser", "run_audit", "main",
           "recognise_call", "calls_in", "normalise_formula", "Call", "differs",
           "default_templates_dir", "EXIT_OK", "EXIT_FINDINGS", "EXIT_UNREADABLE"]

_SEVERITY = {kind: i for i, kind in enumerate(KINDS)}


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
            # ours, what follows from them, and the formulas they read: a typed-over formula
            # upstream (an area, a film temperature) would otherwise be recomputed silently
            following = model.downstream(seeds)
            checked = following | {k for k in model.upstream(following)
                                   if k[0] != "#name" and k in model.nodes}
            if template_marker(book) is not None:
                # a template: every number it prints is checked (an input echoed on Results,
                # a chart's data), so a changed saved value anywhere is found
                checked |= {k for k in model.nodes if k[0] != "#name"}
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
    pristine = pristine_template(result, book, templates_dir)
    if evaluation is not None:
        _classify(result, model, cells, checked, evaluation, rtol, atol, version, pristine)
    blanks: list = []
    if pristine is not None:
        template_drift(result, book, cells, pristine)
        blanks = blank_inputs(result, book, pristine)
    hand_started = time.perf_counter()
    result.hand = check_hand_book(
        path, book, exclude=seeds, model=model if evaluation is not None else None,
        known={key: r.value for key, r in evaluation.results.items()
               if r.status in ("value", "note")} if evaluation is not None else None)
    findings.extend(hand_findings(result.hand, cells))
    timing["hand"] = time.perf_counter() - hand_started
    order = {s.name: i for i, s in enumerate(book.sheets)}

    def position(f: Finding):
        if f.sheet is None:
            return (-1, 0, 0)
        assert f.ref is not None  # a finding on a sheet names its cell
        row, col = split_ref(f.ref)
        return (order.get(f.sheet, len(order)), row, col)

    causes = _causes(model, findings) if evaluation is not None else {}
    inputs_first = {id(f) for f in blanks}

    def rank(f: Finding):
        if f.kind == "template-drift" or id(f) in inputs_first:
            return 0
        return 2 if id(f) in causes else 1

    findings.sort(key=lambda f: (rank(f), _SEVERITY[f.kind], -(f.rel_diff or 0.0), position(f)))
    timing["classify"] = time.perf_counter() - classify_started
    result.timing = timing
    return result


def _causes(model, findings) -> dict:
    """Cause first: for each finding that follows from another (a finding in a cell it reads,
    directly or not), that cell, by ``id`` of the finding.  A typed-over or drifted formula and a
    changed input have no finding upstream; everything downstream of them follows.  Their
    messages say so: a root mismatch whose inputs all agree was typed over."""
    anchors: dict = {}
    first_cause: dict = {}          # node -> the first finding cell upstream of it
    for finding in findings:
        if finding.sheet is not None:
            key = model.owner.get((finding.sheet, finding.ref), (finding.sheet, finding.ref))
            anchors.setdefault(key, finding)
    if not anchors:
        return {}
    from ..workbook.reader import split_ref
    inputs = [(f.sheet, f.ref, *split_ref(f.ref)) for f in findings
              if f.sheet is not None and (f.sheet, f.ref) not in model.nodes
              and (f.sheet, f.ref) not in model.owner]
    for finding in findings:
        if (finding.sheet, finding.ref) in {(i[0], i[1]) for i in inputs}:
            anchors.setdefault((finding.sheet, finding.ref), finding)
    for key in model.keys_in_order():
        node = model.nodes[key]
        read = next(((sheet, ref) for sheet, ref, row, col in inputs
                     for reference, source in zip(node.prepared.references if node.prepared
                                                  else (), node.sources)
                     if reference.kind == "area" and source == sheet
                     and reference.r1 <= row <= reference.r2
                     and reference.c1 <= col <= reference.c2), None) if inputs else None
        if read is not None:
            first_cause[key] = read
            continue
        for dep in sorted(node.deps, key=str):
            cause = dep if dep in anchors and dep != key else first_cause.get(dep)
            if cause is not None and cause != key:
                first_cause[key] = cause
                break
    follows = {}
    for finding in findings:
        if finding.sheet is None:
            continue
        key = model.owner.get((finding.sheet, finding.ref), (finding.sheet, finding.ref))
        cause = first_cause.get(key)
        seen = {key}
        while cause is not None and cause in first_cause and cause not in seen:
            seen.add(cause)                 # the finding at the start of the chain
            cause = first_cause[cause]
        if cause is not None:
            follows[id(finding)] = cause
            if finding.kind == "mismatch":
                finding.message += f" (follows from {label(*cause)})"
        elif finding.kind == "mismatch" and key in model.nodes:
            finding.message += (" (the cells it reads agree, so the saved value does not follow "
                                 "from its formula: typed over, or saved without recalculation?)")
    return follows


def _maybe_ours():
    """A quick test a formula must pass before it is tokenised to look for our calls: one of our
    name families, or an add-in prefix form."""
    families = "|".join(re.escape(f) for f in sorted(set(_families()) | set(_registry()),
                                                    key=len, reverse=True))
    return re.compile(rf"(?i)(?:{families})[\w.]*\s*\(|_xll\.|_xludf\.|!\s*[A-Za-z_][\w.]*\s*\(")


def _stale_advice(book, record, value, pristine_value, array: bool) -> str:
    """What happened to a cell whose saved value is missing or an error, in words."""
    app = book.application.split("/")[0].strip() or "the program that saved it"
    engine = f"the engine gives {show(value)}"
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
        return (f"cached {show(cached)} is the value the template was saved with; {engine} "
                f"(the inputs were changed and the workbook was saved by {app} without "
                "recalculation)")
    return (f"cached {cached}; {engine} (the workbook was not recalculated with the stillair "
            "add-in before it was saved)")


def _add_notes(result, notes: dict) -> None:
    """One out-of-range finding per distinct note, naming every cell it covers.

    A correlation used outside its range is one fact about the calculation, however many cells
    show its table (every element of a spilled table, every INDEX into a transient's rows): it
    is reported once, at the first of those cells, with the cells it covers compressed into
    ranges.  The values themselves are still compared one by one."""
    from ..workbook.report import compress_cells

    for message, carriers in notes.items():
        (sheet, ref), _, formula, value = carriers[0]
        covered = [label(s, m) for (s, _), members, _, _ in carriers for m in members]
        if len(covered) > 1:
            message = f"{message} (in {len(covered)} cells: {compress_cells(covered)})"
        result.findings.append(Finding("out-of-range", label(sheet, ref), message, formula=formula,
                                       computed=value, sheet=sheet, ref=ref, cells=covered))


def _classify(result, model, cells, checked, evaluation, rtol, atol, version, pristine) -> None:
    from ..workbook.reader import expand_range, split_ref

    book = model.book

    def add(kind, sheet, ref, message, **extra):
        result.findings.append(Finding(kind, label(sheet, ref) if sheet else "", message,
                                       sheet=sheet, ref=ref, **extra))

    sheet_index = {s.name: i for i, s in enumerate(book.sheets)}
    ordered = sorted(checked, key=lambda k: (sheet_index.get(k[0], 0), split_ref(k[1])))
    calls_of = {k: calls_in(model.nodes[k].text) for k in ordered}
    unknown_cells = {k for k, calls in calls_of.items() if any(c.unknown for c in calls)}
    edited_inputs = pristine is not None and inputs_changed(book, pristine)
    # A cell of an iterated loop is as exact as the workbook's delta allows, no more.
    loop_delta = {cell: loop.delta for loop in evaluation.loops for cell in loop.cells}
    notes: dict[str, list] = {}     # range note -> the cells (formulas) that carry it
    for key in ordered:
        node = model.nodes[key]
        record = cells.get(key)
        formula = "=" + node.text
        calls = calls_of[key]
        before = len(result.findings)
        members = expand_range(record.array_ref) if record and record.array_ref else [key[1]]
        result.checked.extend(label(key[0], m) for m in members)
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
                result.unchecked.extend(label(key[0], m) for m in members)
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
            if not has or is_error_text(cached) or (cached == "" and value not in (None, "")):
                advice = _stale_advice(book, member or CellRecord(key[0], ref, None), value, None,
                                       bool(record and record.array_ref))
                if len(members) > 1:
                    stale_members.append((ref, cached, value, advice))
                else:
                    add("stale", key[0], ref, advice, formula=formula, cached=cached,
                        computed=value)
                continue
            same, rel = same_value(cached, value, rtol,
                                   max(atol, loop_delta.get(label(key[0], ref), 0.0)), scale)
            if same:
                continue
            if calls_version:
                add("version", key[0], ref, f"the workbook records stillair "
                    f"{show(cached)}, this engine is {version}", formula=formula,
                    cached=cached, computed=value)
                continue
            if edited_inputs and template_value is not None and template_value.has_cached and \
                    same_value(cached, template_value.cached, 0.0, 0.0)[0]:
                add("stale", key[0], ref, _stale_advice(book, member, value, template_value,
                                                        False),
                    formula=formula, cached=cached, computed=value)
                continue
            detail = f" (relative difference {rel:.3g})" if rel is not None else ""
            add("mismatch", key[0], ref, f"workbook {show(cached)}, engine "
                f"{show(value)}{detail}", formula=formula, cached=cached, computed=value,
                rel_diff=rel)
        if stale_members:
            # An array formula's cells went stale together: one finding for the array.
            ref, cached, value, advice = stale_members[0]
            advice = re.sub(r"; the engine gives [^(]*\(", "; the engine gives values (", advice, count=1)
            add("stale", key[0], key[1], f"{len(stale_members)} of the {len(members)} cells of "
                f"the array {record.array_ref}: {advice}", formula=formula, cached=cached,
                computed=value, cells=[label(key[0], m[0]) for m in stale_members])
        if outcome.status == "note":
            for message in outcome.messages:
                notes.setdefault(message, []).append((key, members, formula, outcome.value))
        if len(result.findings) == before and not (outcome.status == "note" and outcome.messages):
            result.ok.extend(label(key[0], m) for m in members)
    _add_notes(result, notes)
    for cell, message in evaluation.notes:
        if not cell:
            result.findings.append(Finding("out-of-range", "", message))
    for loop in evaluation.loops:
        if loop.converged and not loop.stored_converged:
            sheet, _, ref = loop.cells[0].rpartition("!")
            add("stale", sheet.strip("'"), ref, f"the values saved for the circular loop "
                f"{', '.join(loop.cells[:8])} were not converged: one sweep of the workbook's "
                f"iterative calculation from them changed a value by more than its delta "
                f"{loop.delta:g}; recalculate (F9) until it settles and save")


# ---------------------------------------------------------------------------------------------
# Command line


def add_audit_parser(subparsers) -> argparse.ArgumentParser:
    """Add ``audit`` to the ``stillair`` subcommands."""
    audit = subparsers.add_parser(
        "audit", help="check a finished workbook's numbers against the engine",
        description="Recompute every formula that calls a stillair function (and every formula "
        "downstream of one) from the workbook's own inputs and compare with the values Excel "
        "saved; recognise the formulas typed by hand (groups, correlations, radiation) and "
        "check them. BOOK is only read, never modified. Exit status: 0 all ok, 1 findings, "
        "2 the file cannot be read.")
    _add_arguments(audit)
    return audit


def _add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("book", metavar="BOOK|DIR", help=".xlsx or .xlsm workbook, or .ods where LibreOffice is "
                        "installed (never modified), or a folder: every workbook in it and below, one "
                        "summary line each, the exit status the worst of them")
    parser.add_argument("--rtol", type=_tolerance, default=DEFAULT_RTOL,
                        help="relative tolerance for cached values (default %(default)g)")
    parser.add_argument("--atol", type=_tolerance, default=DEFAULT_ATOL,
                        help="absolute tolerance (default %(default)g); a difference must also "
                        "exceed atol + 1e-12 x the largest number the formula reads")
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.add_argument("--report", metavar="REPORT.xlsx",
                        help="also write the findings to a new workbook, one row per finding with "
                        "a link to the cell; an existing file is never replaced (REPORT-1.xlsx... "
                        "is used instead)")
    parser.add_argument("--jobs", type=int, default=1, metavar="N",
                        help="with a folder: audit N workbooks at a time, in N processes (default 1)")
    parser.add_argument("--templates", metavar="DIR", default=None,
                        help="directory of the pristine templates (default: the installed ones)")


def _tolerance(text: str) -> float:
    """A tolerance as typed on the command line: a number >= 0."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"must be a number >= 0, got {text!r}") from None
    if not value >= 0:
        raise argparse.ArgumentTypeError(f"must be >= 0, got {text}")
    return value


def run_audit(args) -> int:
    try:
        result = audit_book(args.book, args.rtol, getattr(args, "templates", None),
                            atol=getattr(args, "atol", DEFAULT_ATOL))
        result.path = getattr(args, "shown_as", None) or result.path
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
    from stillair._console import OneLineParser, UsageError, say_line

    parser = OneLineParser(prog="stillair audit", description=add_audit_parser.__doc__)
    _add_arguments(parser)
    try:
        args = parser.parse_args(argv)
    except UsageError as error:
        say_line(str(error))
        return EXIT_UNREADABLE
    return run_audit(args)


if __name__ == "__main__":
    sys.exit(main())
