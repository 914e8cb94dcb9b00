"""The ``stillair`` command line."""

from __future__ import annotations

import argparse
import json
import os
import re
import stat
import sys
import tempfile

from stillair._console import run_command, say


EXIT_FINDINGS = 1   # done, with error cells (calc) or findings (audit)
EXIT_BAD_INPUT = 2  # could not run: one line on stderr


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
                               "Excel built-ins) without Excel and print the results. BOOK is "
                               "only read, never modified. Exit status: 0 done, every cell "
                               "computed; 1 done, but some formula cell evaluates to an error "
                               "(an Excel error such as #VALUE! or a stillair function's error "
                               "text), listed in the notes; 2 could not run (one line on stderr).")
    calc.add_argument("book", metavar="BOOK", help=".xlsx or .xlsm workbook (never modified)")
    calc.add_argument("--set", dest="sets", action="append", default=[], metavar="REF=VALUE",
                      help="change an input first: Sheet!B3=0.02 or name=0.02 (repeatable)")
    calc.add_argument("--out", metavar="OUT.xlsx",
                      help="write a copy with formulas kept and cached values filled in; OUT must be "
                      "a new file (an existing file is never replaced)")
    calc.add_argument("--json", action="store_true", help="print one JSON object")

    from .audit.check import add_audit_parser
    add_audit_parser(commands)

    functions = commands.add_parser("functions", help="list the cell functions")
    functions.add_argument("--markdown", action="store_true", help="markdown tables (as in README.md)")

    templates = commands.add_parser("templates", help="list the template workbooks, or copy them out",
                                    description="List the shipped calculation templates; with --copy, "
                                    "copy them into DIR for filling in (existing files are never overwritten).")
    templates.add_argument("--copy", metavar="DIR", help="copy every template into DIR "
                           "(created if missing); files already there are left as they are and "
                           "named on stderr (exit status 2)")

    setup = commands.add_parser("excel-setup", help="prepare xlwings for Windows Excel")
    setup.add_argument("--dry-run", action="store_true", help="show what would be written")

    lo = commands.add_parser("libreoffice-setup", help="build and install the LibreOffice Calc extension",
                             description="Build the LibreOffice extension (.oxt) from the cell functions "
                             "and install it with LibreOffice's unopkg (for the current user; as root, "
                             "shared for every user). Other extensions are never touched.")
    lo.add_argument("--dry-run", action="store_true", help="check and show what would be installed")
    lo.add_argument("--oxt", metavar="PATH", help="only write the extension file (never over an existing file)")
    lo.add_argument("--profile", metavar="DIR", help="LibreOffice user profile to use (default: yours)")
    lo.add_argument("--shared-cache", metavar="DIR",
                    help="install as a shared extension into DIR only (an isolated install, e.g. for tests)")
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
    from .workbook.status import label
    from .workbook.reader import split_ref

    rows = []
    for sheet in evaluation.book.sheets:
        cells = evaluation.values.get(sheet.name, {})
        if not cells:
            continue
        last_row = max(split_ref(ref)[0] for ref in cells)
        for ref in sorted(cells, key=split_ref):
            if split_ref(ref)[0] == last_row:
                rows.append((label(sheet.name, ref), cells[ref]))
    return rows


def calc(args) -> int:
    from .workbook.cachewriter import same_file
    from .workbook.model import evaluate_book
    from .workbook.reader import BookError

    try:
        sets = _parse_sets(args.sets)
        _require_regular_file(args.book)
        if args.out:
            if os.path.exists(args.book) and same_file(args.book, args.out):
                raise BookError(f"{args.out}: refusing to write over the input workbook")
            _check_new_file(args.out, "--out")
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
            _write_copy(evaluation.book, args.out, values)
    except (BookError, ValueError) as error:
        say("stillair calc", str(error))
        return EXIT_BAD_INPUT

    # Exit 1 when a cell is an error or cannot be evaluated (its note says why); range notes
    # alone leave the result usable.  The evaluator records each cell's status as data.
    errors = [cell for cell, _ in evaluation.failed]
    if args.json:
        print(json.dumps({
            "values": evaluation.flat_values(),
            "names": evaluation.names,
            "notes": [{"cell": cell, "message": message} for cell, message in evaluation.notes],
        }, ensure_ascii=False, indent=1))
        return EXIT_FINDINGS if errors else 0

    count = sum(len(c) for c in evaluation.values.values())
    print(f"{args.book}: {count} formula cells (engine import {evaluation.engine_seconds:.2f} s, "
          f"load {evaluation.load_seconds:.2f} s, calculate {evaluation.calc_seconds:.2f} s)")
    named = [(name, value) for name, value in evaluation.names.items() if name != "stillair_template"]
    results = _results_sheet_rows(evaluation)
    if results:
        print("Results:")
        for line in render_results(results):
            print(line)
    elif named:
        print("Named results:")
        width = max(len(n) for n, _ in named)
        for name, value in named:
            print(f"  {name:<{width}}  {_format(value)}")
    else:
        print("Last computed cells:")
        for label, value in _summary_cells(evaluation):
            print(f"  {label}  {_format(value)}")
    grouped = group_notes(evaluation.notes)
    if grouped:
        print(f"Notes ({len(grouped)}):")
        for cells, message in grouped:
            print(f"  {cells}: {message}" if cells else f"  {message}")
    else:
        print("Notes: none (every correlation used inside its validity range)")
    if args.out:
        print(f"Wrote {args.out}")
    if errors:
        print(f"{len(errors)} formula cell{'s' if len(errors) > 1 else ''} are errors or cannot be "
              f"evaluated ({compress_cells(errors)}; see the notes): exit status 1")
        return EXIT_FINDINGS
    return 0



def _split_label(label: str) -> tuple[str, str, int] | None:
    from .workbook.reader import split_ref

    sheet, sep, ref = label.rpartition("!")
    try:
        row, _ = split_ref(ref)
    except ValueError:
        return None
    return (sheet, re.sub(r"\d", "", ref), row) if sep else None


def compress_cells(labels: list[str]) -> str:
    """"S!B3, S!B4, S!B5, S!D2" -> "S!B3:B5, S!D2": runs down one column become ranges."""
    runs: list[list] = []  # [sheet, column, first row, last row] or [label]
    for label in labels:
        parts = _split_label(label)
        last = runs[-1] if runs else None
        if parts and last and len(last) == 4 and last[:2] == list(parts[:2]) and parts[2] == last[3] + 1:
            last[3] = parts[2]
        else:
            runs.append([*parts[:2], parts[2], parts[2]] if parts else [label])
    return ", ".join(f"{r[0]}!{r[1]}{r[2]}" + (f":{r[1]}{r[3]}" if r[3] != r[2] else "")
                     if len(r) == 4 else r[0] for r in runs)


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
    from .workbook.reader import index_to_col

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


def _templates(args) -> int:
    from .templates import all_templates, copy_templates

    if not args.copy:
        for template in all_templates():
            print(f"{template.path.name:<24} {template.summary}")
        return 0
    target_dir = args.copy
    if os.path.exists(target_dir) and not os.path.isdir(target_dir):
        say("stillair templates", f"{target_dir}: exists and is not a folder")
        return EXIT_BAD_INPUT
    try:
        os.makedirs(target_dir, exist_ok=True)
    except OSError as error:
        say("stillair templates", f"{target_dir}: cannot create the folder ({error.strerror or error})")
        return EXIT_BAD_INPUT
    skipped = 0
    for target, outcome in copy_templates(target_dir):
        if outcome == "copied":
            print(f"copied  {target}")
        else:
            say("stillair templates", f"{target}: " + (
                "exists; left as it is (not copied)" if outcome == "kept existing file" else outcome))
            skipped += 1
    return EXIT_BAD_INPUT if skipped else 0


def _require_regular_file(path: str) -> None:
    """Refuse at once anything that is not a regular file: reading a FIFO or a device would
    hang or never end."""
    from .workbook.reader import BookError

    try:
        mode = os.stat(path).st_mode
    except FileNotFoundError:
        raise BookError(f"{path}: no such file") from None
    except OSError as error:
        raise BookError(f"{path}: cannot read ({error.strerror or error})") from None
    if stat.S_ISDIR(mode):
        raise BookError(f"{path}: is a directory, not a workbook")
    if not stat.S_ISREG(mode):
        kind = ("a FIFO (named pipe)" if stat.S_ISFIFO(mode) else
                "a device" if stat.S_ISCHR(mode) or stat.S_ISBLK(mode) else
                "a socket" if stat.S_ISSOCK(mode) else "a special file")
        raise BookError(f"{path}: is {kind}, not a regular file; give a workbook file")


def _check_new_file(path: str, option: str) -> None:
    """A file name stillair may create: its folder exists, and nothing is there yet."""
    from .workbook.reader import BookError

    if os.path.isdir(path):
        raise BookError(f"{path}: is a folder; {option} takes the name of a new file, "
                        f"e.g. {os.path.join(path, 'result.xlsx')}")
    if os.path.lexists(path):
        raise BookError(f"{path}: exists; stillair never writes over a file "
                        "(choose another name or remove it first)")
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise BookError(f"{path}: the folder {folder} does not exist")


def _default_permissions() -> int:
    """The mode a new file gets from the user's umask (tempfile's files are private, 0600)."""
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


def _write_copy(book, out: str, values) -> None:
    """Write the --out copy next to its target under a temporary name, give it the user's
    normal permissions, and link it into place only if nothing appeared there meanwhile."""
    from .workbook.cachewriter import write_cached_values
    from .workbook.reader import BookError

    folder = os.path.dirname(os.path.abspath(out))
    try:
        handle, temporary = tempfile.mkstemp(prefix=".stillair-", suffix=os.path.splitext(out)[1],
                                             dir=folder)
    except OSError as error:
        raise BookError(f"{out}: cannot write in {folder} ({error.strerror or error})") from None
    os.close(handle)
    try:
        try:
            write_cached_values(book, temporary, values)
            os.chmod(temporary, _default_permissions())
            try:
                os.link(temporary, out)
            except FileExistsError:
                raise BookError(f"{out}: appeared while calculating; left as it is") from None
            except OSError:  # a file system without hard links: rename, which was checked free
                if os.path.lexists(out):
                    raise BookError(f"{out}: appeared while calculating; left as it is") from None
                os.rename(temporary, out)
        except OSError as error:
            raise BookError(f"{out}: cannot write ({error.strerror or error})") from None
    finally:
        if os.path.lexists(temporary):
            os.unlink(temporary)


def _check_out_extension(book, out: str) -> None:
    from .workbook.reader import BookError

    has_vba = any(m.lower().endswith("vbaproject.bin") for m in book.members)
    if has_vba and not out.lower().endswith(".xlsm"):
        raise BookError(f"{out}: the workbook holds VBA; name the copy .xlsm so Excel opens it")
    if not has_vba and out.lower().endswith(".xlsm"):
        raise BookError(f"{out}: the workbook has no VBA; name the copy .xlsx so Excel opens it")


def main(argv: list[str] | None = None) -> int:
    """The ``stillair`` command; returns the exit status (0 clean, 1 findings or error cells,
    2 could not run), and never lets a traceback reach the user."""
    return run_command("stillair", lambda: _dispatch(argv))


def _dispatch(argv: list[str] | None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return 0
    if args.command == "calc":
        return calc(args)
    if args.command == "functions":
        from .cells.reference import reference_markdown, reference_text
        sys.stdout.write(reference_markdown() if args.markdown else reference_text())
        return 0
    if args.command == "audit":
        from .audit.check import run_audit
        from .workbook.reader import BookError
        try:
            _require_regular_file(args.book)
        except BookError as error:
            say("stillair audit", str(error))
            if args.json:
                print(json.dumps({"book": args.book, "error": str(error), "exit": EXIT_BAD_INPUT}))
            return EXIT_BAD_INPUT
        return run_audit(args)
    if args.command == "templates":
        return _templates(args)
    if args.command == "excel-setup":
        from .excel.setup import run
        return run(dry_run=args.dry_run)
    if args.command == "libreoffice-setup":
        from .libreoffice.setup import run as libreoffice_setup
        return libreoffice_setup(dry_run=args.dry_run, oxt=args.oxt, profile=args.profile,
                                 shared_cache=args.shared_cache)
    return 0


if __name__ == "__main__":
    sys.exit(main())
