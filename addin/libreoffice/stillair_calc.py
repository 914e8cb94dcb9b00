"""stillair's cell functions as a LibreOffice Calc add-in (UNO component, run by LibreOffice).

This file is shipped unchanged inside the extension built by ``stillair libreoffice-setup``;
LibreOffice's Python loader runs it, never the stillair package itself.  Everything specific to
the functions comes from ``stillair_functions.json``, written into the same extension from the
cell-function registry when the extension is built: the names, argument names and descriptions
shown in the Function Wizard, and the Python paths of the environment that ran the set-up.  The
computation goes through stillair's one call path (``stillair.addin.cells.callpath.evaluate``), so a cell
shows the same value or the same short message as in Excel.
"""

import importlib.util
import json
import math
import os
import re
import site
import sys
import time

import uno  # noqa: F401  (installs the import hook that the com.sun.star imports below need)
import unohelper
from com.sun.star.lang import Locale, XLocalizable, XServiceInfo, XServiceName
from com.sun.star.sheet import LocalizedName, XAddIn, XCompatibilityNames
from com.sun.star.task import XJob

from org.stillair.calc import XStillairFunctions

HERE = os.path.dirname(os.path.abspath(__file__))
with open(os.path.join(HERE, "stillair_functions.json"), encoding="utf-8") as _file:
    SPEC = json.load(_file)
FUNCTIONS = {f["name"]: f for f in SPEC["functions"]}
IMPLEMENTATION = SPEC["implementation"]
SERVICES = ("com.sun.star.sheet.AddIn",)
REBIND_IMPLEMENTATION = SPEC["rebind_implementation"]
REBIND_SERVICES = ("com.sun.star.task.Job",)

_state = {"evaluate": None, "entries": None, "error": None}

# Where the load job and the first import append their timings, one JSON object a line, when
# set (tests/bench/bench_libreoffice.py --growth reads them to break a book's opening down).
# The clocks: time.perf_counter (CLOCK_MONOTONIC, the same in every process on Linux, so a
# driver can place the marks within its own load) and time.process_time (soffice's CPU, all
# its threads).  Unset, nothing is timed.
TIMING_LOG = os.environ.get("STILLAIR_LIBREOFFICE_TIMING")


def _timing(event, **marks):
    if TIMING_LOG:
        marks.update(event=event, wall=time.perf_counter(), cpu=time.process_time())
        with open(TIMING_LOG, "a", encoding="utf-8") as log:
            log.write(json.dumps(marks) + "\n")


def _load_stillair():
    """Import stillair from the environment recorded at set-up; remember a failure's reason."""
    if _state["evaluate"] is not None or _state["error"] is not None:
        return
    setup = SPEC["python"]
    here = "%d.%d" % sys.version_info[:2]
    if here != setup["version"]:
        _state["error"] = ("stillair: LibreOffice runs Python %s but stillair was set up from Python %s "
                           "(%s); run stillair libreoffice-setup from a Python %s environment"
                           % (here, setup["version"], setup["executable"], here))
        return
    # The set-up environment goes first, so its numpy and scipy win over any system copies; its
    # .pth files (an editable install's finder among them) are processed as at interpreter start.
    for directory in reversed(setup["paths"]):
        if directory in sys.path:
            sys.path.remove(directory)
        sys.path.insert(0, directory)
    for directory in setup["site_dirs"]:
        site.addsitedir(directory)
    if importlib.util.find_spec("stillair") is None:
        _state["error"] = ("stillair: cannot import stillair from %s (not found on its paths); run "
                           "stillair libreoffice-setup again" % setup["executable"])
        return
    _timing("import_started")
    try:
        from stillair.addin.cells.callpath import evaluate
        from stillair.addin.cells.registry import BY_NAME
    except Exception as error:  # shown in every cell instead of #NAME? with no reason
        _state["error"] = ("stillair: cannot import stillair from %s (%s: %s); run stillair "
                           "libreoffice-setup again" % (setup["executable"], type(error).__name__, error))
        return
    _state["evaluate"], _state["entries"] = evaluate, BY_NAME
    _timing("imported")


def _positions(name):
    """(required, optional texts): the positions of a function's required arguments and of its
    optional text arguments, the two that ``_arguments`` reads differently from how they come."""
    specs = FUNCTIONS[name]["args"]
    return (tuple(i for i, a in enumerate(specs) if not a["optional"]),
            tuple(i for i, a in enumerate(specs) if a["optional"] and a["kind"] == "text"))


def _arguments(positions, args):
    """The arguments as the call path takes them, from what Calc passed (once per cell: cheap).

    A required argument is declared as a mixed array (so that the Function Wizard shows it as
    required): a single value or cell arrives as a 1x1 array and is passed on as that value; a
    range stays a range.  Calc hands an add-in a reference to an empty cell as 0, never as
    blank: for an optional text argument (gas, method...) 0 cannot be meant, so it is read as
    the blank it came from; an optional number argument cannot be told apart (see the README).
    Types are compared exactly (pyuno gives exactly tuple and float): ``isinstance`` costs more."""
    required, texts = positions
    args = list(args)
    count = len(args)
    for i in required:
        if i < count:
            value = args[i]
            if type(value) is tuple and len(value) == 1:
                row = value[0]
                if type(row) is tuple and len(row) == 1:
                    args[i] = row[0]
    for i in texts:
        if i < count and type(args[i]) is float and args[i] == 0.0:
            args[i] = None
    return args


def _as_declared(array, result):
    """The result in the form the method is declared with: a function that may return an array
    (``array``: a table, or ranges given to its numeric arguments) always returns a 2-D array, a
    single value or message as a 1x1 one (shown as that value); the others return the value."""
    if not array:
        return result
    if type(result) is list:
        return tuple(tuple(row) for row in result)
    return ((result,),)


def _call(name, args):
    """A call before the method is bound (the first) or when it cannot be (a message)."""
    array = FUNCTIONS[name]["array_result"]
    _load_stillair()
    if _state["error"] is not None:
        return _as_declared(array, _state["error"][:255])
    entry = _state["entries"].get(name)
    if entry is None:
        return _as_declared(array, "%s: not in the installed stillair; run stillair "
                                   "libreoffice-setup again" % name)
    return _as_declared(array, _state["evaluate"](entry, *_arguments(_positions(name), args)))


def _function_method(name):
    """The method Calc calls for one function.  What ``_call`` does is looked up once: after
    the first call the entry and the call path are bound, the argument positions known, so a
    call costs the call path and little more (Calc calls it once per cell)."""
    positions = _positions(name)
    array = FUNCTIONS[name]["array_result"]
    bound = []  # [evaluate, entry] once stillair is imported and has the function

    def method(self, *args):
        if not bound:
            _load_stillair()
            if _state["error"] is not None or _state["entries"].get(name) is None:
                return _call(name, args)  # the message, in the declared form
            bound.extend((_state["evaluate"], _state["entries"][name]))
        return _as_declared(array, bound[0](bound[1], *_arguments(positions, args)))

    method.__name__ = name
    return method


class StillairAddIn(unohelper.Base, XStillairFunctions, XAddIn, XCompatibilityNames,
                    XServiceName, XServiceInfo, XLocalizable):
    def __init__(self, ctx):
        self.ctx = ctx
        self.locale = Locale("en", "US", "")

    # XAddIn: what the Function Wizard shows, straight from the registry's texts.
    def getProgrammaticFuntionName(self, display_name):  # (sic) the interface's own spelling
        return display_name if display_name in FUNCTIONS else ""

    def getDisplayFunctionName(self, name):
        return name if name in FUNCTIONS else ""

    def getFunctionDescription(self, name):
        return FUNCTIONS[name]["description"] if name in FUNCTIONS else ""

    def _arg(self, name, index):
        args = FUNCTIONS.get(name, {}).get("args", [])
        return args[index] if 0 <= index < len(args) else None

    def getDisplayArgumentName(self, name, index):
        arg = self._arg(name, index)
        return arg["name"] if arg else ""

    def getArgumentDescription(self, name, index):
        arg = self._arg(name, index)
        return arg["doc"] if arg else ""

    def getProgrammaticCategoryName(self, name):
        return SPEC["wizard_category"]

    def getDisplayCategoryName(self, name):
        return FUNCTIONS[name]["category"] if name in FUNCTIONS else ""

    # XCompatibilityNames: the name an Excel workbook (.xlsx) stores the call under.  LibreOffice
    # 7.4 does not use it when it reads or writes .xlsx (hence the load job below).
    def getCompatibilityNames(self, name):
        if name not in FUNCTIONS:
            return ()
        return (LocalizedName(Locale("en", "US", ""), name), LocalizedName(Locale("en", "", ""), name))

    # XLocalizable
    def setLocale(self, locale):
        self.locale = locale

    def getLocale(self):
        return self.locale

    # XServiceName: the prefix of the functions' programmatic names in files and the API.
    def getServiceName(self):
        return IMPLEMENTATION

    # XServiceInfo
    def getImplementationName(self):
        return IMPLEMENTATION

    def supportsService(self, name):
        return name in SERVICES

    def getSupportedServiceNames(self):
        return SERVICES


for _name in FUNCTIONS:
    setattr(StillairAddIn, _name, _function_method(_name))


# ---------------------------------------------------------------------------------------------
# Workbooks written by Excel.  LibreOffice reads a call of an unknown function in an .xlsx file
# (H_CAVITY(...), also with the prefixes Excel writes for add-in functions) as a call of a Basic
# macro of that name, and shows #NAME?.  When such a workbook has been loaded, this job rewrites
# those calls of our functions to the add-in's own calls, in cells, array formulas and defined
# names; the formulas are otherwise unchanged.

_NAMES = "|".join(sorted((re.escape(n) for n in FUNCTIONS), key=len, reverse=True))
# The prefixes Excel writes before an add-in function ([1]!, 'path\stillair.xlam'!, stillair.xlam!,
# _xll., _xludf.) and the add-in's programmatic name that LibreOffice itself writes into .xlsx,
# as LibreOffice shows them after the import.
_PREFIX = (r"(?:_xll\.|_xludf\.|" + re.escape(IMPLEMENTATION) + r"\.|\[\d+\]!|'[^']*'!"
           r"|[\w.-]+\.xla[m]?!)?")
_CALL = re.compile(r"(?<![\w.$])" + _PREFIX + r"(" + _NAMES + r")(?=\s*\()", re.I)
_STRING = re.compile(r'("(?:[^"]|"")*")')


_RESOLVED = IMPLEMENTATION.upper() + ".%s"  # a call already bound, as the API shows it


def _bound(match):
    name = match.group(1).upper()
    return match.group(0) if match.group(0) == _RESOLVED % name else name


# Every name written as a call: a superset of what _CALL finds, and much cheaper to scan for.
# Measured: _CALL over 19,200 long built-in formulas takes 0.33 s (its optional prefixes are
# tried at every character), this scan 0.07 s; most formulas of a workbook call none of ours.
_CALLED = re.compile(r"([A-Za-z_]\w*)\s*\(")
_UPPER_NAMES = frozenset(name.upper() for name in FUNCTIONS)


def rebind_formula(formula):
    """The formula with our function calls in their add-in form (None if nothing changes)."""
    if not any(name.upper() in _UPPER_NAMES for name in _CALLED.findall(formula)):
        return None
    parts = _STRING.split(formula)
    for index in range(0, len(parts), 2):  # odd parts are string literals: left alone
        parts[index] = _CALL.sub(_bound, parts[index])
    new = "".join(parts)
    return new if new != formula else None


FORMULA_CELLS = 16  # com.sun.star.sheet.CellFlags.FORMULA
MIN_CHUNK_ROWS = 64


def chunk_rows(rows):
    """Rows of formulas written per call in a column of ``rows`` rows (see _rebind_block).

    Measured (LibreOffice 7.4, 3,200 rows of formulas in six columns, bottom-up): a call costs
    time growing with the square of its own rows and each call time growing with the column,
    so the whole costs about rows^2/chunk + rows*chunk: 3.5 s of CPU in chunks of 32 rows, 2.3
    to 2.7 s in chunks of 256, 5.3 s in chunks of 2,048.  The least is near 4*sqrt(rows)."""
    return max(MIN_CHUNK_ROWS, int(4 * math.sqrt(rows)))


def _column_runs(new):
    """(first, last): the runs of adjacent columns holding a formula to rewrite; the columns
    between them are left alone (rewriting an unchanged formula costs as much as a changed one)."""
    runs, first = [], None
    for column in range(len(new[0]) + 1):
        changed = column < len(new[0]) and any(row[column] is not None for row in new)
        if changed and first is None:
            first = column
        elif not changed and first is not None:
            runs.append((first, column - 1))
            first = None
    return runs


COPY_MIN_ROWS = 256  # shorter columns are written in chunks (a few calls)
# A cell reference's row number: not after a sheet name's dot, not in a name like LOG10( or Q1_a.
_ROW_REFERENCE = re.compile(r"(?<![\w.$])(\$?[A-Za-z]{1,3})(\d+)(?![\w(])")


def _copied_form(formula, row):
    """The formula with each row number written as its offset from ``row``: two rows' forms are
    equal when one formula is the other copied down.  A guess (a text such as "A1" looks like a
    reference, an absolute row like a relative one); ``_copy_down`` checks what it wrote.
    Split and joined (NUL never occurs in a formula) rather than substituted through a Python
    function per reference: a third less time (measured, 3,200 formulas of five references)."""
    parts = _ROW_REFERENCE.split(formula)  # text, column, row, text, column, row ..., text
    parts[2::3] = [str(int(number) - row) for number in parts[2::3]]
    return "\0".join(parts)


def _shown_alike(formula):
    """A formula as the API shows it once bound, compared without the add-in's prefix."""
    return formula.replace(_RESOLVED % "", "")


def _copy_down(sheet, address, column, formulas):
    """Rebind one column of the rectangle at once when its formulas are the first one copied
    down and the first calls ours: returns the count of cells rewritten, or None when the column
    is not handled so (the caller then rewrites it formula by formula, in chunks).

    The first formula alone is rewritten (``rebind_formula``), set into the top cell and filled
    down the column (``fillAuto``: one operation of LibreOffice that builds the column's formula
    group at once).  Measured (LibreOffice 7.4, 19,200 formulas, 3,200 rows): the fill costs half
    of copying the first cell onto the next 1, 2, 4 ... rows (0.08 s against 0.14 s of soffice
    CPU), and rewriting only the first formula saves the rewrite of every other row (0.10 s).
    A fill copies everything of the cell, so it is used only where that changes nothing but the
    formulas: one format over the whole column (``getCellFormatRanges``: number format, style,
    conditional format, validation, merging) and no comment in it.  The column is kept only if
    every row then reads back as the rewritten first formula copied down to it (the forms are
    compared, as the guess was made); otherwise, and where the fill is refused (a protected
    sheet), None: the caller rewrites every row over whatever was filled."""
    new = rebind_formula(formulas[0])
    if new is None:  # the first calls none of ours: the rows are rewritten one by one, if needed
        return None
    form = _copied_form(formulas[0], 0)
    if any(_copied_form(f, i) != form for i, f in enumerate(formulas)):
        return None
    x, top = address.StartColumn + column, address.StartRow
    target = sheet.getCellRangeByPosition(x, top, x, address.EndRow)
    if target.getCellFormatRanges().getCount() != 1:
        return None
    if any(note.getPosition().Column == x and top <= note.getPosition().Row <= address.EndRow
           for note in _annotations(sheet)):
        return None
    try:
        target.getCellByPosition(0, 0).setFormula(new)
        target.fillAuto(uno.Enum("com.sun.star.sheet.FillDirection", "TO_BOTTOM"), 1)
    except Exception:  # refused (a protected sheet): the chunks fall back cell by cell
        return None
    intended = _copied_form(_shown_alike(new), 0)
    if all(_copied_form(_shown_alike(row[0]), i) == intended
           for i, row in enumerate(target.getFormulaArray())):
        return len(formulas)
    return None


def _annotations(sheet):
    notes = sheet.getAnnotations()
    return [notes.getByIndex(i) for i in range(notes.getCount())]


def _rebind_block(sheet, address):
    """Rebind one rectangle of formula cells; returns the count of cells or arrays rewritten.

    The rectangle is read at once.  A long column whose formulas are the first copied down is
    rebound by filling its rewritten first formula down (``_copy_down``); the other column runs
    holding our calls are written in chunks of rows (``getFormulaArray`` / ``setFormulaArray``,
    the API grammar both ways, as ``getFormula`` / ``setFormula``), not one call per cell.  A
    rectangle holding part of an array formula cannot be written so (an array formula is changed
    only as a whole), and is rebound cell by cell, each array once."""
    block = sheet.getCellRangeByPosition(address.StartColumn, address.StartRow,
                                         address.EndColumn, address.EndRow)
    formulas = block.getFormulaArray()
    arrays = any(f.startswith("{") for row in formulas for f in row)  # "{=...}": an array's cell
    copied = {}  # column: cells rewritten by filling the first formula down
    if not arrays and len(formulas) >= COPY_MIN_ROWS:
        for column in range(len(formulas[0])):
            done = _copy_down(sheet, address, column, [row[column] for row in formulas])
            if done is not None:
                copied[column] = done
    new = [[None if c in copied else rebind_formula(f) for c, f in enumerate(row)]
           for row in formulas]
    count = sum(copied.values()) + sum(1 for row in new for f in row if f is not None)
    if not count:
        return 0
    if not arrays:
        rows = [tuple(f if n is None else n for f, n in zip(old_row, new_row))
                for old_row, new_row in zip(formulas, new)]
        step = chunk_rows(len(rows))
        for first, last in _column_runs(new):
            # From the bottom up: measured (LibreOffice 7.4), setting formulas below cells of
            # the same form costs time growing with the square of the column (12,800 rows of
            # =A+B: 7.0 s of CPU in one call or top-down in chunks of any size, 0.49 s bottom-up
            # in chunks of 512, 51,200 rows 152 s top-down; clearing the cells first and then
            # writing top-down: 13.5 s for 3,200 rows of six columns against 2.3 s).
            for top in reversed(range(0, len(rows), step)):
                bottom = min(top + step, len(rows)) - 1
                if not any(new[r][c] is not None for r in range(top, bottom + 1)
                           for c in range(first, last + 1)):
                    continue
                try:
                    sheet.getCellRangeByPosition(
                        address.StartColumn + first, address.StartRow + top,
                        address.StartColumn + last, address.StartRow + bottom).setFormulaArray(
                        tuple(row[first:last + 1] for row in rows[top:bottom + 1]))
                except Exception:  # refused on a protected sheet (measured), where setFormula works
                    for r in range(top, bottom + 1):
                        for c in range(first, last + 1):
                            if new[r][c] is not None:
                                block.getCellByPosition(c, r).setFormula(new[r][c])
        return count
    changed, arrays_done = 0, set()
    for r, row in enumerate(new):
        for c, formula in enumerate(row):
            if formula is None:
                continue
            cell = block.getCellByPosition(c, r)
            cursor = sheet.createCursorByRange(cell)
            cursor.collapseToCurrentArray()  # stays the one cell outside an array formula
            if not cursor.getArrayFormula():
                cell.setFormula(formula)
                changed += 1
                continue
            a = cursor.getRangeAddress()
            key = (a.StartColumn, a.StartRow, a.EndColumn, a.EndRow)
            if key not in arrays_done:
                arrays_done.add(key)
                # The cell's formula reads "{=...}" in the API grammar (";" separators), the
                # grammar setArrayFormula takes; getArrayFormula's text is in another one.
                if formula.startswith("{") and formula.endswith("}"):
                    formula = formula[1:-1]
                cursor.setArrayFormula(formula)
                changed += 1
    return changed


def rebind_document(doc):
    """Rewrite every unresolved call of our functions in a spreadsheet; returns the count.

    Opening 19,200 formulas cost 65 s, growing with the square of the cells: writing a formula
    below a column of formulas of the same form costs time in proportion to the column
    (measured, LibreOffice 7.4; see _rebind_block), so rectangles are written bottom-up in
    chunks of rows.  Automatic calculation is off and the controllers and actions are locked
    while rewriting.  Nothing is calculated here: a rewritten formula, and every formula that
    reads it, is dirty, and LibreOffice computes a dirty cell when its value is first read
    (shown, saved, printed, read through the API) - so a book opens without computing calls
    that nobody looks at yet, as its built-in formulas open with their cached values.  (A
    ``calculateAll`` here cost 0.56 s of a 19,200-formula book's open.)"""
    changed = 0
    automatic = doc.isAutomaticCalculationEnabled()
    doc.lockControllers()
    doc.addActionLock()
    doc.enableAutomaticCalculation(False)
    try:
        sheets = doc.getSheets()
        for index in range(sheets.getCount()):
            sheet = sheets.getByIndex(index)
            for address in sheet.queryContentCells(FORMULA_CELLS).getRangeAddresses():
                changed += _rebind_block(sheet, address)
        names = doc.getPropertyValue("NamedRanges")
        for name in names.getElementNames():
            named = names.getByName(name)
            new = rebind_formula(named.getContent())
            if new is not None:
                named.setContent(new)
                changed += 1
        _timing("rebound", formulas=changed)
    finally:
        doc.enableAutomaticCalculation(automatic)
        doc.removeActionLock()
        doc.unlockControllers()
    return changed


def rebind_loaded(doc):
    _timing("job_started")
    try:
        if doc is None or not doc.supportsService("com.sun.star.sheet.SpreadsheetDocument"):
            return
        was_modified = doc.isModified()
        if rebind_document(doc):
            doc.getUndoManager().clear()  # nothing the user did to undo
            if not was_modified:
                doc.setModified(False)
    except Exception:  # a document that cannot be rewritten is left as it was loaded
        pass


class RebindExcelCalls(unohelper.Base, XJob, XServiceInfo):
    """A job run when a document has been loaded (Jobs.xcu, event OnLoadFinished)."""

    def __init__(self, ctx):
        self.ctx = ctx

    def execute(self, arguments):
        environment = {}
        for argument in arguments:
            if argument.Name == "Environment":
                environment = {v.Name: v.Value for v in argument.Value}
        rebind_loaded(environment.get("Model"))
        return None

    def getImplementationName(self):
        return REBIND_IMPLEMENTATION

    def supportsService(self, name):
        return name in REBIND_SERVICES

    def getSupportedServiceNames(self):
        return REBIND_SERVICES


g_ImplementationHelper = unohelper.ImplementationHelper()
g_ImplementationHelper.addImplementation(StillairAddIn, IMPLEMENTATION, SERVICES)
g_ImplementationHelper.addImplementation(RebindExcelCalls, REBIND_IMPLEMENTATION, REBIND_SERVICES)
