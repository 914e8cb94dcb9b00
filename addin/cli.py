"""The ``stillair`` command line."""

from __future__ import annotations

import argparse
import json
import os
import sys

EXIT_BAD_INPUT = 2


def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version
    try:
        return version("stillair")
    except PackageNotFoundError:  # running from a source tree without installing
        return "unknown"


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="stillair", description="Still-air heat transfer for spreadsheets.")
    parser.add_argument("--version", action="version", version=f"stillair {_version()}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")

    calc = commands.add_parser("calc", help="evaluate a workbook without Excel",
                               description="Evaluate every formula of BOOK (stillair functions and "
                               "Excel built-ins) without Excel and print the results.")
    calc.add_argument("book", metavar="BOOK", help=".xlsx or .xlsm workbook (never modified)")
    calc.add_argument("--set", dest="sets", action="append", default=[], metavar="REF=VALUE",
                      help="change an input first: Sheet!B3=0.02 or name=0.02 (repeatable)")
    calc.add_argument("--out", metavar="OUT.xlsx",
                      help="write a copy with formulas kept and cached values filled in")
    calc.add_argument("--json", action="store_true", help="print one JSON object")

    from .audit import add_audit_parser
    add_audit_parser(commands)

    functions = commands.add_parser("functions", help="list the cell functions")
    functions.add_argument("--markdown", action="store_true", help="markdown tables (as in README.md)")

    templates = commands.add_parser("templates", help="list the template workbooks, or copy them out",
                                    description="List the shipped calculation templates; with --copy, "
                                    "copy them into DIR for filling in (existing files are never overwritten).")
    templates.add_argument("--copy", metavar="DIR", help="copy every template into DIR")

    setup = commands.add_parser("excel-setup", help="prepare xlwings for Windows Excel")
    setup.add_argument("--dry-run", action="store_true", help="show what would be written")
    return parser


def _parse_sets(items: list[str]) -> dict[str, str]:
    sets = {}
    for item in items:
        target, sep, value = item.partition("=")
        if not sep or not target.strip():
            raise ValueError(f"--set {item}: expected REF=VALUE, e.g. Sheet1!B3=0.02 or gap=0.02")
        sets[target.strip()] = value
    return sets


def _format(value) -> str:
    if isinstance(value, float):
        return f"{value:.6g}"
    if isinstance(value, list):
        return "[" + "; ".join(", ".join(_format(v) for v in row) for row in value) + "]"
    return "" if value is None else str(value)


def _summary_cells(evaluation):
    """Cells to print when the workbook has no names: the last row of formulas of each sheet."""
    from .headless import _quote
    from .xlsx import split_ref

    rows = []
    for sheet in evaluation.book.sheets:
        cells = evaluation.values.get(sheet.name, {})
        if not cells:
            continue
        last_row = max(split_ref(ref)[0] for ref in cells)
        for ref in sorted(cells, key=split_ref):
            if split_ref(ref)[0] == last_row:
                rows.append((f"{_quote(sheet.name)}!{ref}", cells[ref]))
    return rows


def calc(args) -> int:
    from .cachewriter import same_file, write_cached_values
    from .headless import evaluate_book
    from .xlsx import BookError

    try:
        sets = _parse_sets(args.sets)
        if args.out:
            if os.path.exists(args.book) and same_file(args.book, args.out):
                raise BookError(f"{args.out}: refusing to write over the input workbook")
        evaluation = evaluate_book(args.book, sets)
        if args.out:
            _check_out_extension(evaluation.book, args.out)
            values = evaluation.writable_values()
            for (sheet, ref), value in evaluation.sets.items():
                formula = ref in evaluation.book.sheet(sheet).formulas
                if isinstance(value, str) and not formula:
                    raise BookError(f"--set {sheet}!{ref}: only numbers or TRUE/FALSE can be written "
                                    "into an input cell of the --out copy")
                values.setdefault(sheet, {})[ref] = value
            write_cached_values(evaluation.book, args.out, values)
    except (BookError, ValueError) as error:
        print(f"stillair calc: {error}", file=sys.stderr)
        return EXIT_BAD_INPUT

    # Exit 1 when a cell is an error or cannot be evaluated (its note says why); range notes
    # alone leave the result usable.
    status = 1 if evaluation.failed else 0
    if args.json:
        print(json.dumps({
            "values": evaluation.flat_values(),
            "names": evaluation.names,
            "notes": [{"cell": cell, "message": message} for cell, message in evaluation.notes],
        }, ensure_ascii=False, indent=1))
        return status

    count = sum(len(c) for c in evaluation.values.values())
    print(f"{args.book}: {count} formula cells (engine import {evaluation.engine_seconds:.2f} s, "
          f"load {evaluation.load_seconds:.2f} s, calculate {evaluation.calc_seconds:.2f} s)")
    named = [(name, value) for name, value in evaluation.names.items() if name != "stillair_template"]
    results = _results_sheet_rows(args.book, evaluation)
    if results:
        _print_results(results)
    elif named:
        print("Named results:")
        width = max(len(n) for n, _ in named)
        for name, value in named:
            print(f"  {name:<{width}}  {_format(value)}")
    else:
        print("Last computed cells:")
        for label, value in _summary_cells(evaluation):
            print(f"  {label}  {_format(value)}")
    if evaluation.notes:
        print(f"Notes ({len(evaluation.notes)}):")
        for cell, message in evaluation.notes:
            print(f"  {cell}: {message}" if cell else f"  {message}")
    else:
        print("Notes: none (every correlation used inside its validity range)")
    if evaluation.failed:
        print(f"{len(evaluation.failed)} cell(s) are errors or cannot be evaluated; see the notes")
    if args.out:
        print(f"Wrote {args.out}")
    return status


def _results_sheet_rows(path: str, evaluation) -> list[tuple[str, object, str]]:
    """(label, value, unit) rows of a "Results" sheet laid out label | value | unit, as the
    templates are; a row with a label only is a heading (value None).  Read from the workbook
    calc has read already (no second reader)."""
    if "Results" not in evaluation.values:
        return []
    computed = evaluation.values["Results"]
    sheet = evaluation.book.sheet("Results")
    rows = []
    for index in range(4, sheet.last_row + 1):
        label, unit = sheet.values.get(f"A{index}"), sheet.values.get(f"C{index}")
        ref = f"B{index}"
        if ref in computed:
            rows.append((ref if label is None else label if isinstance(label, str)
                         else _format(label), computed[ref],
                         "" if unit is None else str(unit)))
        elif isinstance(label, str) and label.strip():
            rows.append((label, None, ""))
    return rows


def _print_results(rows) -> None:
    width = max(len(label) for label, value, _ in rows if value is not None)
    print("Results:")
    for label, value, unit in rows:
        if value is None:
            print(f"  {label}")
        else:
            shown = _format(value)
            print(f"    {label:<{width}}  {shown:<12}" if isinstance(value, str)
                  else f"    {label:<{width}}  {shown:>12}  {unit}".rstrip())


def _templates(args) -> int:
    from .templates import all_templates, copy_templates

    if args.copy:
        for target, outcome in copy_templates(args.copy):
            print(f"{outcome:<18} {target}")
        return 0
    for template in all_templates():
        print(f"{template.path.name:<24} {template.summary}")
    return 0


def _check_out_extension(book, out: str) -> None:
    from .xlsx import BookError

    has_vba = any(m.lower().endswith("vbaproject.bin") for m in book.members)
    if has_vba and not out.lower().endswith(".xlsm"):
        raise BookError(f"{out}: the workbook holds VBA; name the copy .xlsm so Excel opens it")
    if not has_vba and out.lower().endswith(".xlsm"):
        raise BookError(f"{out}: the workbook has no VBA; name the copy .xlsx so Excel opens it")


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return 0
    if args.command == "calc":
        return calc(args)
    if args.command == "functions":
        from .reference import reference_markdown, reference_text
        sys.stdout.write(reference_markdown() if args.markdown else reference_text())
        return 0
    if args.command == "audit":
        from .audit import run_audit
        return run_audit(args)
    if args.command == "templates":
        return _templates(args)
    if args.command == "excel-setup":
        from .excel_setup import run
        return run(dry_run=args.dry_run)
    return 0


if __name__ == "__main__":
    sys.exit(main())
