"""The ``stillair`` command line."""

from __future__ import annotations

import argparse
import json
import os
import stat
import sys
import tempfile

from stillair._console import UsageError, run_command, say, say_line
from stillair._parser import OneLineParser


EXIT_FINDINGS = 1   # done, with error cells (calc) or findings (audit)
EXIT_BAD_INPUT = 2  # could not run: one line on stderr


def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version
    try:
        return version("stillair")
    except PackageNotFoundError:  # running from a source tree without installing
        return "unknown"


def build_parser() -> argparse.ArgumentParser:
    parser = OneLineParser(prog="stillair", description="Still-air heat transfer for spreadsheets.")
    parser.add_argument("--version", action="version", version=f"stillair {_version()}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")

    calc = commands.add_parser("calc", help="evaluate a workbook without Excel",
                               description="Evaluate every formula of BOOK (stillair functions and "
                               "Excel built-ins) without Excel and print the results. BOOK is "
                               "only read, never modified. Exit status: 0 done, every cell "
                               "computed; 1 done, but some formula cell evaluates to an error "
                               "(an Excel error such as #VALUE! or a stillair function's error "
                               "text), listed in the notes; 2 could not run (one line on stderr).")
    calc.add_argument("book", metavar="BOOK", help=".xlsx or .xlsm workbook, or .ods where LibreOffice is installed (never modified)")
    calc.add_argument("--set", dest="sets", action="append", default=[], metavar="REF=VALUE",
                      help="change an input first: Sheet!B3=0.02 or name=0.02 (repeatable); the "
                      "value must pass the cell's data-validation rule; an empty value clears the "
                      "cell")
    calc.add_argument("--replace-formula", action="store_true",
                      help="let --set replace a formula cell with a value (refused otherwise)")
    calc.add_argument("--out", metavar="OUT.xlsx",
                      help="write a copy with formulas kept and cached values filled in; OUT must be "
                      "a new file (an existing file is never replaced). With --cases: RESULTS.csv")
    calc.add_argument("--json", action="store_true", help="print one JSON object")
    calc.add_argument("--cases", metavar="CASES.csv",
                      help="calculate BOOK once per row of CASES.csv: the header names inputs as "
                      "--set does, each row gives their values (an empty field keeps the "
                      "workbook's value); prints, or writes to --out, a CSV of the inputs, every "
                      "named result, a status and the notes per row. Exit status: the worst row's "
                      "(2 for a row that failed)")
    calc.add_argument("--jobs", type=int, default=1, metavar="N",
                      help="with --cases: spread the rows over N processes (default 1)")

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


def calc(args) -> int:
    from .workbook.cachewriter import same_file
    from .workbook.model import evaluate_book
    from .workbook.reader import BookError
    from .workbook.report import evaluation_json, report_lines

    if args.cases:
        return _calc_cases(args)
    try:
        sets = _parse_sets(args.sets)
        _require_regular_file(args.book)
        if args.out:
            if os.path.exists(args.book) and same_file(args.book, args.out):
                raise BookError(f"{args.out}: refusing to write over the input workbook")
            _check_new_file(args.out, "--out")
        evaluation = evaluate_book(args.book, sets,
                                   replace_formulas=getattr(args, "replace_formula", False))
        if args.out:
            _check_out_extension(evaluation.book, args.out)
            values = evaluation.writable_values()
            for (sheet, ref), value in evaluation.sets.items():
                formula = ref in evaluation.book.sheet(sheet).formulas
                if (isinstance(value, str) or value is None) and not formula:
                    raise BookError(f"--set {sheet}!{ref}: only numbers or TRUE/FALSE can be written "
                                    "into an input cell of the --out copy")
                values.setdefault(sheet, {})[ref] = value
            _write_copy(evaluation.book, args.out, values)
    except (BookError, ValueError) as error:
        say("stillair calc", str(error))
        return EXIT_BAD_INPUT

    # Exit 1 when a cell is an error or cannot be evaluated (its note says why); range notes
    # alone leave the result usable.  The evaluator records each cell's status as data.
    if args.json:
        print(json.dumps(evaluation_json(evaluation), ensure_ascii=False, indent=1))
    else:
        for line in report_lines(evaluation, getattr(args, "shown_as", None) or args.book,
                                 args.out):
            print(line)
    return EXIT_FINDINGS if evaluation.failed or evaluation.input_missing else 0


def _via_opendocument(args, prog: str, run) -> int:
    """Run a command on BOOK; an .ods is first converted by LibreOffice into a temporary .xlsx
    (the .ods itself is only copied), and the command says so."""
    from .libreoffice.convert import (ConversionError, converted_to_xlsx, is_opendocument, remove,
                                      temporary_folder)
    from .workbook.reader import BookError

    if not is_opendocument(args.book):
        return run(args)
    try:
        _require_regular_file(args.book)
    except BookError as error:
        say(prog, str(error))
        return EXIT_BAD_INPUT
    folder = temporary_folder()
    try:
        try:
            converted = converted_to_xlsx(args.book, folder)
        except ConversionError as error:
            say(prog, str(error))
            return EXIT_BAD_INPUT
        print(f"{prog}: {args.book}: an OpenDocument spreadsheet, converted by LibreOffice into a "
              f"temporary .xlsx (the .ods is not changed)", file=sys.stderr)
        args.shown_as, args.book = args.book, converted
        return run(args)
    finally:
        remove(folder)


def _calc_cases(args) -> int:
    from .workbook.batch import check_jobs
    from .workbook.cases import cases_command
    from .workbook.reader import BookError

    try:
        if args.sets or args.json:
            raise ValueError(f"--cases takes neither --set nor --json: give every input a column "
                             f"of {args.cases} (the results are CSV)")
        check_jobs(args.jobs)
        _require_regular_file(args.book)
        _require_regular_file(args.cases)
        if args.out:
            if not args.out.lower().endswith(".csv"):
                raise ValueError(f"--out {args.out}: with --cases the results are CSV; "
                                 "name the file RESULTS.csv")
            _check_new_file(args.out, "--out")
        return cases_command(args)
    except (BookError, ValueError) as error:
        say("stillair calc", str(error))
        return EXIT_BAD_INPUT


def _templates(args) -> int:
    from .templates import all_templates, copy_templates

    templates = all_templates()
    if not args.copy:
        print(f"Templates in {templates[0].path.parent}:")
        for template in templates:
            print(f"  {template.path.name:<24} {template.summary}")
        print("Next: stillair templates --copy DIR copies them into a folder of yours to fill in (a file "
              "already there is never replaced; the installed ones stay as shipped for the audit).")
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
    skipped, copied = 0, []
    for target, outcome in copy_templates(target_dir):
        if outcome == "copied":
            print(f"copied  {target}")
            copied.append(target)
        else:
            say("stillair templates", f"{target}: " + (
                "exists; left as it is (not copied)" if outcome == "kept existing file" else outcome))
            skipped += 1
    example = os.path.join(target_dir, templates[0].path.name)
    print(f"Next: open a copy in Excel (set up by stillair excel-setup) or LibreOffice Calc (stillair "
          f"libreoffice-setup), fill in the sand-coloured input cells, then check the finished "
          f"workbook: stillair audit {example}")
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
    if argv is None:
        # The command's own process (not a caller's, who passes argv): when it shuts down, the
        # interpreter runs the cycle collector over every object still alive (a model of 19,200
        # formulas and its results: ~0.25 s of CPU, measured, for a process that is ending).
        # Frozen objects are skipped; reference counting still frees them as modules go.
        import atexit
        import gc
        atexit.register(gc.freeze)
    return run_command("stillair", lambda: _dispatch(argv))


def _dispatch(argv: list[str] | None) -> int:
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except UsageError as error:
        say_line(str(error))
        return EXIT_BAD_INPUT
    if args.command is None:
        parser.print_help()
        return 0
    if args.command == "calc":
        return _via_opendocument(args, "stillair calc", calc)
    if args.command == "functions":
        from .cells.reference import reference_markdown, reference_text
        sys.stdout.write(reference_markdown() if args.markdown else reference_text())
        return 0
    if args.command == "audit":
        from .audit.check import run_audit
        from .workbook.reader import BookError
        if os.path.isdir(args.book):
            from .audit.folder import run_folder_audit
            return run_folder_audit(args)
        try:
            _require_regular_file(args.book)
        except BookError as error:
            say("stillair audit", str(error))
            if args.json:
                print(json.dumps({"book": args.book, "error": str(error), "exit": EXIT_BAD_INPUT}))
            return EXIT_BAD_INPUT
        return _via_opendocument(args, "stillair audit", run_audit)
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
