"""What ``stillair calc`` shows of an evaluation: the Results sheet as text (or the named
results, or the last computed cells), the notes grouped by message, and the JSON form."""

from __future__ import annotations

from .reader import index_to_col, split_ref
from .status import Evaluation, label

__all__ = ["report_lines", "evaluation_json", "render_results", "group_notes", "compress_cells"]


def evaluation_json(evaluation: Evaluation) -> dict:
    """``calc --json``: every formula cell's value, the defined names' values and the notes."""
    return {
        "values": evaluation.flat_values(),
        "names": evaluation.names,
        "notes": [{"cell": cell, "message": message} for cell, message in evaluation.notes],
        **({"loops": [{"cells": list(loop.cells), "sweeps": loop.sweeps,
                       "last_change": loop.last_change, "delta": loop.delta,
                       "converged": loop.converged} for loop in evaluation.loops]}
           if evaluation.loops else {}),
    }


def report_lines(evaluation: Evaluation, book: str, out: str | None = None) -> list[str]:
    """The text ``calc`` prints for the workbook ``book`` (``out``: the copy it wrote)."""
    lines: list[str] = []
    errors = [cell for cell, _ in evaluation.failed]
    count = sum(len(c) for c in evaluation.values.values())
    lines.append(f"{book}: {count} formula cells (engine import {evaluation.engine_seconds:.2f} s, "
                 f"load {evaluation.load_seconds:.2f} s, calculate {evaluation.calc_seconds:.2f} s)")
    named = [(name, value) for name, value in evaluation.names.items() if name != "stillair_template"]
    results = _results_sheet_rows(evaluation)
    if results:
        lines.append("Results:")
        for line in render_results(results):
            lines.append(line)
    else:
        lines.extend(_own_workbook_lines(evaluation, named))
    for loop in evaluation.loops:
        cells = compress_cells(list(loop.cells))
        if loop.converged:
            lines.append(f"Circular loop {cells}: iterated as the workbook asks, settled after "
                         f"{loop.sweeps} sweeps (last change {loop.last_change:.3g} <= delta "
                         f"{loop.delta:g})")
        else:
            lines.append(f"Circular loop {cells}: NOT converged after {loop.sweeps} sweeps (last "
                         f"change {loop.last_change:.3g} > delta {loop.delta:g})")
    grouped = group_notes(evaluation.notes)
    if grouped:
        lines.append(f"Notes ({len(grouped)}):")
        for cells, message in grouped:
            lines.append(f"  {cells}: {message}" if cells else f"  {message}")
    else:
        lines.append("Notes: none (every correlation used inside its validity range)")
    if out:
        lines.append(f"Wrote {out}")
    if errors:
        lines.append(f"{len(errors)} formula cell{'s' if len(errors) > 1 else ''} are errors or cannot be "
                     f"evaluated ({compress_cells(errors)}; see the notes): exit status 1")
    return lines


def _format(value) -> str:
    if isinstance(value, float):
        return f"{value:.6g}"
    if isinstance(value, list):
        return "[" + "; ".join(", ".join(_format(v) for v in row) for row in value) + "]"
    return "" if value is None else str(value)


def _captions(sheet) -> dict[int, list[tuple[int, str]]]:
    """The texts typed on a sheet, by row: (column, text) in column order (read once per sheet;
    looking left of each of thousands of cells cell by cell costs more than the calculation)."""
    by_row: dict[int, list[tuple[int, str]]] = {}
    for ref, value in sheet.values.items():
        if isinstance(value, str) and value.strip():
            row, col = split_ref(ref)
            by_row.setdefault(row, []).append((col, value.strip()))
    for texts in by_row.values():
        texts.sort()
    return by_row


def _caption(captions: dict[int, list[tuple[int, str]]], ref: str) -> str:
    """The nearest text typed to the left of a cell in its row (what the user called it)."""
    row, col = split_ref(ref)
    found = ""
    for column, text in captions.get(row, ()):
        if column >= col:
            break
        found = text
    return found


def _own_workbook_lines(evaluation, named) -> list[str]:
    """A workbook that is not a template: every cell that calls one of our functions (sheet by
    sheet: cell, value, unit where the function has one, its note), then the defined names."""
    from .formulatext import calls_in
    from ..cells.registry import BY_NAME

    lines = []
    for sheet in evaluation.book.sheets:
        cells = evaluation.values.get(sheet.name, {})
        rows = []
        captions = _captions(sheet)
        for ref in sorted(cells, key=split_ref):
            anchor = sheet.formulas.get(ref) or sheet.formulas.get(sheet.array_members.get(ref, ""))
            calls = [c for c in calls_in(anchor.formula or "") if c.ours] if anchor else []
            if not calls:
                continue
            function = BY_NAME.get(calls[0].canonical)
            result = evaluation.results.get((sheet.name, ref))
            value = cells[ref]
            unit = function.unit if function is not None and isinstance(value, float) else ""
            shown = _format(value)
            note = ""
            if result is not None and result.status in ("error", "cannot-evaluate"):
                shown = value if isinstance(value, str) and value.startswith("#") else "error"
                note = "(see the notes)"      # each message once, under Notes
            elif result is not None and result.status == "note":
                note = "; ".join(result.messages)
            rows.append((ref, _caption(captions, ref), shown, unit, note))
        if not rows:
            continue
        lines.append(f"{sheet.name}:")
        ref_width = max(len(r[0]) for r in rows)
        caption_width = min(max(len(r[1]) for r in rows), 40)
        value_width = min(max(len(r[2]) for r in rows), 40)
        unit_width = max(len(r[3]) for r in rows)
        for ref, caption, value, unit, note in rows:
            lines.append(f"  {ref:<{ref_width}}  {caption[:40]:<{caption_width}}  "
                         f"{value:>{value_width}}  {unit:<{unit_width}}  {note}".rstrip())
    if not lines:
        lines.append("No cell calls a stillair function.")
    if named:
        lines.append("Defined names:")
        width = max(len(n) for n, _ in named)
        for name, value in named:
            lines.append(f"  {name:<{width}}  {_format(value)}")
    return lines


def compress_cells(labels: list[str]) -> str:
    """Cells named one by one as ranges: "S!D34, S!E34, S!D35, S!E35, S!B3" -> "S!B3, S!D34:E35".

    Per sheet (in the order the sheets first occur), runs along a row are joined first, then
    equal runs on consecutive rows into one rectangle; each sheet's ranges in reading order.
    A label that is not a cell ("(workbook)") is kept as it is, where it first occurs."""
    cells: dict[str, set[tuple[int, int]]] = {}
    order: list[tuple[str, str | None]] = []       # (sheet, None) or ("", a label kept as is)
    for text in labels:
        sheet, sep, ref = text.rpartition("!")
        try:
            at = split_ref(ref) if sep else None
        except ValueError:
            at = None
        if at is None:
            order.append(("", text))
            continue
        if sheet not in cells:
            cells[sheet] = set()
            order.append((sheet, None))
        cells[sheet].add(at)
    parts = []
    for sheet, kept in order:
        parts += [kept] if kept is not None else [f"{sheet}!{block}" for block in _rectangles(cells[sheet])]
    return ", ".join(parts)


def _rectangles(cells: set[tuple[int, int]]) -> list[str]:
    """(row, column) cells as "A1" / "B2:D5" blocks: row runs, stacked where they repeat."""
    runs: list[list[int]] = []                      # [row, first column, last column]
    for row, col in sorted(cells):
        if runs and runs[-1][0] == row and runs[-1][2] == col - 1:
            runs[-1][2] = col
        else:
            runs.append([row, col, col])
    blocks: list[list[int]] = []                    # [first row, last row, first column, last column]
    open_blocks: dict[tuple[int, int], list[int]] = {}
    for row, first, last in runs:
        block = open_blocks.get((first, last))
        if block is not None and block[1] == row - 1:
            block[1] = row
        else:
            block = [row, row, first, last]
            blocks.append(block)
            open_blocks[(first, last)] = block
    names = []
    for top, bottom, left, right in blocks:
        start, end = f"{index_to_col(left)}{top}", f"{index_to_col(right)}{bottom}"
        names.append(start if start == end else f"{start}:{end}")
    return names


def group_notes(notes) -> list[tuple[str, str]]:
    """(cells, message) with each distinct message once, its cells listed (ranges compressed),
    in the order the messages first occur."""
    by_message: dict[str, list[str]] = {}
    for cell, message in notes:
        cells = by_message.setdefault(message, [])
        if cell and cell not in cells:
            cells.append(cell)
    return [(compress_cells(cells), message) for message, cells in by_message.items()]


def _results_sheet_rows(evaluation) -> list[list[tuple[object, bool]]]:
    """The rows of a "Results" sheet below its title (row 3 on), each a list of
    (value, is_formula) cells: the computed value for a formula cell, the cell's own value
    otherwise; trailing blank cells dropped.  Read from the workbook calc has read already."""
    if "Results" not in evaluation.values:
        return []
    computed = evaluation.values["Results"]
    sheet = evaluation.book.sheet("Results")
    rows = []
    for index in range(3, sheet.last_row + 1):
        cells = []
        for column in range(1, sheet.last_col + 1):
            ref = f"{index_to_col(column)}{index}"
            if ref in computed:
                cells.append((computed[ref], True))
            elif ref in sheet.formulas:
                cells.append((None, True))  # a formula the evaluation did not reach
            else:
                cells.append((sheet.values.get(ref), False))
        while cells and _blank(cells[-1][0]):
            cells.pop()
        rows.append(cells)
    return rows


def _blank(value) -> bool:
    return value is None or (isinstance(value, str) and not value.strip())


def _is_table_header(row, following) -> bool:
    """A row of text captions only (two or more), with a computed row under it."""
    captions = [v for v, formula in row if not _blank(v)]
    return (len(captions) >= 2 and all(isinstance(v, str) and not f for v, f in row if not _blank(v))
            and bool(following) and any(f for _, f in following))


def render_results(rows) -> list[str]:
    """The Results sheet as text: headings, label | value | unit | remark lines with the values
    aligned, and tables (a caption row over computed rows) with every column aligned."""
    lines: list[str] = []
    labelled = [r for r in rows if len(r) >= 2 and not _blank(r[0][0])]
    width = max((len(_format(r[0][0])) for r in labelled), default=0)
    index = 0
    while index < len(rows):
        row = rows[index]
        if not row:
            index += 1
            continue
        following = rows[index + 1] if index + 1 < len(rows) else []
        if _is_table_header(row, following):
            table = [row]
            index += 1
            while index < len(rows) and len(rows[index]) >= 2:
                table.append(rows[index])
                index += 1
            lines.extend(_render_table(table))
            continue
        if len(row) == 1:
            lines.append(f"  {_format(row[0][0])}")
        else:
            label, (value, _), rest = _format(row[0][0]), row[1], row[2:]
            shown = _format(value)
            shown = f"{shown:>12}" if isinstance(value, (int, float)) and not isinstance(value, bool) \
                else f"{shown:<12}"
            extra = "  ".join(_format(v) for v, _ in rest if not _blank(v))
            lines.append(f"    {label:<{width}}  {shown}  {extra}".rstrip())
        index += 1
    return lines


def _render_table(table) -> list[str]:
    cells = [[_format(v) for v, _ in row] for row in table]
    numeric = [[isinstance(v, (int, float)) and not isinstance(v, bool) for v, _ in row] for row in table]
    columns = max(len(r) for r in cells)
    widths = [max((len(r[c]) for r in cells if c < len(r)), default=0) for c in range(columns)]
    lines = []
    for row, kinds in zip(cells, numeric):
        parts = [text.rjust(widths[c]) if kinds[c] else text.ljust(widths[c])
                 for c, text in enumerate(row)]
        lines.append("    " + "  ".join(parts).rstrip())
    return lines
