"""Formula text: the one add-in-prefix grammar, references, rewriting for the evaluator, meaning.

Every command that reads a formula goes through this module, so calc, the audit and template
drift agree on what a formula says:

* :func:`recognise_call` reads a function-call token in every form a spreadsheet writes an add-in
  function's name: ``NAME(``, ``[1]!NAME(``, ``'C:\\...\\stillair.xlam'!NAME(``,
  ``book.xlsm!NAME(``, ``_xll.NAME(``, ``_xludf.NAME(``, LibreOffice's lower-case ``name(`` and its
  programmatic ``ORG.X.Y.NAME(`` for an extension's functions.
* :func:`prepare` turns a cell's formula into what the ``formulas`` library can compile, or says in
  plain words which construct it cannot evaluate (3-D and structured references, INDIRECT,
  OFFSET, unknown functions...).  Constructs it can be taught are rewritten: add-in prefixes
  removed, unsigned exponents (``1E9``) given their sign, an empty argument of one of our
  functions made blank (Excel passes a missing argument, never 0), whole rows and columns cut to
  the sheet's used range, ``ROW()``/``COLUMN()`` replaced by the cell's own row and column.
* :func:`normalise_formula` gives a formula's meaning for comparison: numbers by value, function
  names in any case and without prefixes, no whitespace, sheet names quoted only where needed.
"""

from __future__ import annotations

import functools
import re
from dataclasses import dataclass

from .formulas_bridge import builtin_names
from .reader import col_to_index, index_to_col

__all__ = ["Call", "recognise_call", "calls_in", "tokens", "normalise_formula", "Reference",
           "parse_reference", "Prepared", "prepare", "MAX_ROW", "MAX_COL", "MAX_AREA_CELLS"]

MAX_ROW, MAX_COL = 1_048_576, 16_384
# A reference that would hand the evaluator more cells than this (after whole rows and columns
# are cut to the used range) is refused for that cell: a range this size is never a calculation
# input, and building it would take the memory a workbook of 10 MB may not claim.
MAX_AREA_CELLS = 2_000_000

# The prefix before a function's name: "[1]!", "'...'!", "book.xlsm!", "_xll.", "_xludf.".
_CALL_RE = re.compile(r"^(?P<prefix>\[\d+\]!|'(?:[^']|'')*'!|[^!'\s(]+!|_xll\.|_xludf\.)?"
                      r"(?P<name>[^(]+)\($", re.I)


@functools.lru_cache(maxsize=1)
def _registry() -> dict:
    from ..cells.registry import BY_NAME
    return BY_NAME


@functools.lru_cache(maxsize=1)
def _families() -> tuple[str, ...]:
    """Name prefixes of our functions (AIR_, GAS_, NU_, H_, NET_...): a name that starts with one
    and is not in the registry looks like ours but is not."""
    return tuple(sorted({n.split("_")[0] + "_" for n in _registry() if "_" in n}))


@dataclass(frozen=True)
class Call:
    prefix: str          # "", "[1]!", "'C:\\x\\stillair.xlam'!", "_xll.", "_xludf.", "ORG.X."
    name: str            # as written, without the prefix
    ours: bool           # in the registry
    unknown: bool        # looks like ours (or is an add-in call) but is not in the registry

    @property
    def canonical(self) -> str:
        return self.name.upper()


def recognise_call(token: str) -> Call | None:
    """A FUNC-OPEN token ("_xludf.NU_VPLATE(") as a :class:`Call`; None for built-ins."""
    m = _CALL_RE.match(token)
    if not m:
        return None
    prefix, name = m.group("prefix") or "", m.group("name").strip()
    upper = name.upper()
    if upper.startswith(("_XLFN.", "_XLWS.")):
        return None
    if upper in _registry():
        return Call(prefix, name, True, False)
    if not prefix and "." in upper:  # LibreOffice: an extension function's programmatic name
        head, _, last = upper.rpartition(".")
        if last in _registry() and not head.startswith("_"):
            return Call(name[:len(head) + 1], name[len(head) + 1:], True, False)
    if prefix or upper.startswith(_families()):
        return Call(prefix, name, False, True)
    return None


@functools.lru_cache(maxsize=4096)
def tokens(formula: str) -> tuple:
    """openpyxl's tokens of a formula (with or without "="); () when it cannot be tokenised."""
    from openpyxl.formula.tokenizer import Tokenizer, TokenizerError
    try:
        return tuple(Tokenizer(formula if formula.startswith("=") else "=" + formula).items)
    except (TokenizerError, IndexError, ValueError):
        return ()


_CALLS: dict[str, tuple] = {}


def calls_in(formula: str) -> list[Call]:
    """Our calls (and calls written like add-in calls) in a formula, in order.

    Formulas that differ only in their cell references make the same calls: the answer is kept
    per formula with its references blotted out, so a column of copied formulas is tokenised
    once."""
    key = _CELL_IN_TEXT.sub("\x00", formula)
    found = _CALLS.get(key)
    if found is None:
        found = tuple(call for call in (recognise_call(t.value) for t in tokens(formula)
                                        if t.type == "FUNC" and t.subtype == "OPEN")
                      if call is not None)
        if len(_CALLS) > 20_000:
            _CALLS.clear()
        _CALLS[key] = found
    return list(found)


# ---------------------------------------------------------------------------------------------
# References

_CELL = r"\$?([A-Za-z]{1,3})\$?(\d+)"
_AREA_RE = re.compile(rf"^{_CELL}(?::{_CELL})?$")
_COLS_RE = re.compile(r"^\$?([A-Za-z]{1,3}):\$?([A-Za-z]{1,3})$")
_ROWS_RE = re.compile(r"^\$?(\d+):\$?(\d+)$")
_QUALIFIED_RE = re.compile(r"^(?P<sheet>'(?:[^']|'')+'|[^'!]+)!(?P<rest>.+)$")
_NAME_RE = re.compile(r"^[A-Za-z_\\][\w.\\?]*$")


@dataclass(frozen=True, slots=True)
class Reference:
    """One reference operand: an area of a sheet (``sheet`` None: the formula's own sheet), a
    defined name, or something the evaluator cannot follow (``problem``)."""

    kind: str                       # "area", "name", "local" (a LET/LAMBDA parameter), "problem"
    sheet: str | None = None
    r1: int = 0
    c1: int = 0
    r2: int = 0
    c2: int = 0
    name: str = ""
    problem: str = ""
    whole: str = ""                 # "columns" / "rows" for A:A and 1:1
    alias: str = ""                 # Sheet!name is handed to the evaluator under this name

    @property
    def cells(self) -> int:
        return (self.r2 - self.r1 + 1) * (self.c2 - self.c1 + 1)


def _unquote(sheet: str) -> str:
    return sheet[1:-1].replace("''", "'") if sheet.startswith("'") else sheet


def parse_reference(operand: str) -> Reference:
    """A RANGE operand as a :class:`Reference`."""
    sheet = None
    rest = operand
    m = _QUALIFIED_RE.match(operand)
    if m:
        sheet = _unquote(m.group("sheet"))
        rest = m.group("rest")
        if sheet.startswith("[") or re.match(r"^\[?\d+\]", sheet):
            return Reference("problem", problem=f"reference {operand} points into another "
                             "workbook, which is not opened")
        if ":" in sheet:
            return Reference("problem", problem=f"3-D reference {operand} (a range of sheets) is "
                             "not supported headlessly")
    elif operand.startswith("["):
        return Reference("problem", problem=f"reference {operand} points into another workbook, "
                         "which is not opened")
    if "[" in rest:
        return Reference("problem", problem=f"structured table reference {operand} is not "
                         "supported headlessly")
    m = _AREA_RE.match(rest)
    if m:
        c1, r1 = col_to_index(m.group(1)), int(m.group(2))
        c2, r2 = (col_to_index(m.group(3)), int(m.group(4))) if m.group(3) else (c1, r1)
        return Reference("area", sheet, min(r1, r2), min(c1, c2), max(r1, r2), max(c1, c2))
    m = _COLS_RE.match(rest)
    if m:
        c1, c2 = sorted((col_to_index(m.group(1)), col_to_index(m.group(2))))
        return Reference("area", sheet, 1, c1, MAX_ROW, c2, whole="columns")
    m = _ROWS_RE.match(rest)
    if m:
        r1, r2 = sorted((int(m.group(1)), int(m.group(2))))
        return Reference("area", sheet, r1, 1, r2, MAX_COL, whole="rows")
    if rest.lower().startswith("_xlpm."):
        return Reference("local", name=rest)
    if _NAME_RE.match(rest):
        return Reference("name", sheet, name=rest)
    return Reference("problem", problem=f"reference {operand} is not understood")


def _sheet_text(sheet: str) -> str:
    if re.match(r"^[A-Za-z_][A-Za-z0-9_.]*$", sheet) and not _AREA_RE.match(sheet):
        return sheet
    return "'" + sheet.replace("'", "''") + "'"


def area_text(sheet: str | None, r1: int, c1: int, r2: int, c2: int) -> str:
    head = f"{_sheet_text(sheet)}!" if sheet is not None else ""
    first = f"{index_to_col(c1)}{r1}"
    return head + (first if (r1, c1) == (r2, c2) else f"{first}:{index_to_col(c2)}{r2}")


# ---------------------------------------------------------------------------------------------
# Preparing a formula for the evaluator

_UNSIGNED_EXPONENT = re.compile(r"^(\d*\.?\d*[Ee])(\d+)$")
_DYNAMIC = {"INDIRECT": "INDIRECT builds its reference from text while calculating",
            "OFFSET": "OFFSET builds its reference while calculating"}


@dataclass
class Prepared:
    """A formula ready for ``formulas``: its text, the reference of each reference token (by
    position), a key shared by every formula of the same shape (R1C1-like), or the problem."""

    text: str
    references: list[Reference]
    key: tuple
    problem: str | None = None


# Functions the formulas parser itself implements (they bind names rather than take values).
_PARSER_FUNCTIONS = {"LET", "LAMBDA"}


# The prefixes newer Excel versions write before a built-in's name (_xlfn.IFS, _xlfn._xlws.SORT).
_EXCEL_PREFIX = re.compile(r"^(?:_XLFN\.)?(?:_XLWS\.)?")


def _bare(name: str) -> str:
    """A built-in's name in upper case without the _xlfn. / _xlws. prefixes."""
    return _EXCEL_PREFIX.sub("", name.upper())


@functools.lru_cache(maxsize=4096)
def _builtin_name(name: str) -> str | None:
    """The name ``formulas`` knows a built-in by, or None when it has no implementation."""
    upper = name.upper()
    bare = _bare(name)
    if bare in _PARSER_FUNCTIONS:
        return upper
    known = builtin_names()
    for candidate in (upper, bare, "_XLFN." + bare, "_XLFN._XLWS." + bare):
        if candidate in known:
            return candidate
    return None


def _problem_of_function(name: str) -> str:
    bare = _bare(name)
    if bare in _DYNAMIC:
        return f"{_DYNAMIC[bare]}; it is not supported headlessly"
    newer = " (a newer Excel function)" if name.lower().startswith("_xlfn.") else ""
    return f"function {bare}{newer} is not available headlessly"


# A cell reference outside a string: A1, $A1, A$1, $A$1 (not part of a name, a number written
# with an exponent, a function name such as LOG10( or a sheet name such as Sheet1!).
_CELL_IN_TEXT = re.compile(r"(?<![\w.$])(\$?)([A-Za-z]{1,3})(\$?)(\d+)(?![\w.(!])")
_STRING = re.compile(r'("(?:[^"]|"")*")')


def _relative_form(formula: str, row: int, col: int):
    """The formula with its cell references made relative to the cell, and the references'
    positions (column, row) in order; None when the text has quoted sheet names or functions
    whose value depends on the cell."""
    if "'" in formula or re.search(r"(?i)\b(?:ROW|COLUMN)\s*\(", formula):
        return None
    parts, cells = [], []
    for index, piece in enumerate(_STRING.split(formula)):
        if index % 2:                      # a string literal, kept as written
            parts.append(piece)
            continue
        last = 0
        for m in _CELL_IN_TEXT.finditer(piece):
            c, r = col_to_index(m.group(2)), int(m.group(4))
            cells.append((c, r))
            parts.append(piece[last:m.start()])
            parts.append(f"{'$' + str(c) if m.group(1) else 'C' + str(c - col)}"
                         f"{'$' + str(r) if m.group(3) else 'R' + str(r - row)}\x00")
            last = m.end()
        parts.append(piece[last:])
    return "".join(parts), cells


class _Template:
    """A prepared formula and, for each reference, which cell positions of the text give its
    corners: formulas of the same relative form reuse it instead of being tokenised again."""

    def __init__(self, prepared: Prepared, corners: list[tuple[int, ...]]):
        self.prepared, self.corners = prepared, corners


def prepare(formula: str, row: int, col: int, used: dict[str | None, tuple[int, int]],
            own_sheet: str, cache: dict | None = None) -> Prepared:
    """Rewrite ``formula`` (with or without "=") of the cell at ``row``/``col`` of ``own_sheet``.

    ``used`` maps a sheet name (upper case) to its used range's last (row, column): whole rows
    and columns are cut there, so they cost what the used range costs.  A formula of the same
    relative form as one prepared before (a row copied down) reuses that one's work."""
    relative = _relative_form(formula.lstrip("="), row, col) if cache is not None else None
    if relative is None:
        return _prepare(formula, row, col, used, own_sheet)
    form, cells = relative
    cache_key = (form, own_sheet.upper())
    template = cache.get(cache_key)
    if template is None:
        prepared = _prepare(formula, row, col, used, own_sheet)
        corners = _corners(prepared, cells)
        if corners is None:
            return prepared
        cache[cache_key] = _Template(prepared, corners)
        return prepared
    references = []
    for reference, corner in zip(template.prepared.references, template.corners):
        if corner:
            (c1, r1), (c2, r2) = cells[corner[0]], cells[corner[-1]]
            reference = Reference("area", reference.sheet, min(r1, r2), min(c1, c2),
                                  max(r1, r2), max(c1, c2))
        references.append(reference)
    return _LazyPrepared(formula, row, col, used, own_sheet, references, template.prepared.key,
                         template.prepared.problem)


class _LazyPrepared(Prepared):
    """A prepared formula from a template: its references and key are known; its own text is
    rewritten only if someone asks for it (the compiled function of its key is shared)."""

    def __init__(self, formula, row, col, used, own_sheet, references, key, problem):
        self._source = (formula, row, col, used, own_sheet)
        self._text = None
        self.references, self.key, self.problem = references, key, problem

    @property
    def text(self) -> str:
        if self._text is None:
            self._text = _prepare(*self._source).text
        return self._text


def _corners(prepared: Prepared, cells: list) -> list[tuple[int, ...]] | None:
    """For each reference of ``prepared``, the indices in ``cells`` of its written corners
    (none for names and whole rows or columns); None when they cannot be matched up."""
    corners, at = [], 0
    for reference in prepared.references:
        if reference.kind != "area" or reference.whole:
            corners.append(())
            continue
        if at < len(cells) and cells[at] == (reference.c1, reference.r1) and \
                at + 1 < len(cells) and cells[at + 1] == (reference.c2, reference.r2) and \
                (reference.c1, reference.r1) != (reference.c2, reference.r2):
            corners.append((at, at + 1))
            at += 2
        elif at < len(cells) and cells[at] == (reference.c1, reference.r1) == \
                (reference.c2, reference.r2):
            corners.append((at,))
            at += 1
        else:
            return None
    return corners if at == len(cells) else None


def _prepare(formula: str, row: int, col: int, used: dict[str | None, tuple[int, int]],
             own_sheet: str) -> Prepared:
    items = tokens(formula)
    if not items:
        text = formula.lstrip("=")
        return Prepared(text, [], ("?", text), "the formula cannot be read")
    out: list[str] = []
    references: list[Reference] = []
    key: list = []
    problem = None
    # One entry per open function or parenthesis: is it one of our functions, and was the last
    # significant token an argument separator or the opening itself?
    stack: list[list] = []

    def note(message: str) -> None:
        nonlocal problem
        if problem is None:
            problem = message

    def blank_argument_here() -> bool:
        return bool(stack) and stack[-1][0] and stack[-1][1]

    lambda_closed = False
    for token in items:
        kind, sub, value = token.type, token.subtype, token.value
        if kind == "WHITE-SPACE":
            out.append(value)
            continue
        if lambda_closed and kind == "PAREN" and sub == "OPEN":
            note("a LAMBDA called in place, LAMBDA(...)(...), is not supported headlessly")
        lambda_closed = False
        if kind == "FUNC" and sub == "OPEN":
            call = recognise_call(value)
            if call is not None and call.ours:
                value = call.canonical + "("
            elif call is not None:
                note(f"{call.prefix}{call.name} is not a stillair function")
            else:
                name = value[:-1]
                builtin = None if _bare(name) in _DYNAMIC else _builtin_name(name)
                if builtin is None:
                    note(_problem_of_function(name))
                else:
                    value = builtin + "("
            if stack:
                stack[-1][1] = False
            stack.append([call is not None and call.ours, True, value])
            out.append(value)
            key.append(value.upper())
            continue
        if kind == "FUNC" and sub == "CLOSE":
            if blank_argument_here() and out and not out[-1].endswith("("):
                out.append('""')            # F(a,) : the last argument is missing
                key.append('""')
            opened = stack.pop() if stack else None
            lambda_closed = bool(opened) and opened[2].upper().endswith("LAMBDA(")
            if opened and opened[2].upper() in ("ROW(", "COLUMN(") and out and out[-1] == opened[2]:
                # ROW() / COLUMN() without an argument: this cell's own row or column.
                out[-1] = str(row if opened[2].upper() == "ROW(" else col)
                key[-1] = ("#own", opened[2].upper())
                continue
            if stack:
                stack[-1][1] = False
            out.append(value)
            key.append(value)
            continue
        if kind == "SEP" and sub == "ARG":
            if blank_argument_here():
                out.append('""')            # F(a,,b): a missing argument takes its default
                key.append('""')
            if stack:
                stack[-1][1] = True
            out.append(",")
            key.append(",")
            continue
        if kind == "PAREN" or kind == "ARRAY":
            if sub == "OPEN":
                if stack:
                    stack[-1][1] = False
                stack.append([False, False, value])
            elif stack:
                stack.pop()
            out.append(value)
            key.append(value)
            continue
        if stack:
            stack[-1][1] = False
        if kind == "OPERAND" and sub == "NUMBER":
            m = _UNSIGNED_EXPONENT.match(value)
            if m:
                value = f"{m.group(1)}+{m.group(2)}"
            out.append(value)
            key.append(value)
            continue
        if kind == "OPERAND" and sub == "RANGE":
            reference = parse_reference(value)
            if reference.kind == "problem":
                note(reference.problem)
            elif reference.kind == "area" and reference.whole:
                target = (reference.sheet or own_sheet).upper()
                last_row, last_col = used.get(target, (1, 1))
                if reference.whole == "columns":
                    reference = Reference("area", reference.sheet, 1, reference.c1,
                                          max(last_row, 1), reference.c2, whole="columns")
                else:
                    reference = Reference("area", reference.sheet, reference.r1, 1, reference.r2,
                                          max(last_col, 1), whole="rows")
                value = area_text(reference.sheet, reference.r1, reference.c1, reference.r2,
                                  reference.c2)
            if reference.kind == "name" and reference.sheet is not None:
                # formulas drops the sheet of Sheet!name; a name of its own keeps them apart.
                alias = f"_stillair_scoped_{len(references)}"
                reference = Reference("name", reference.sheet, name=reference.name, alias=alias)
                value = alias
            if reference.kind == "area" and reference.cells > MAX_AREA_CELLS:
                note(f"reference {value} covers {reference.cells:,} cells, more than the "
                     f"{MAX_AREA_CELLS:,} the evaluator takes in one range")
            references.append(reference)
            out.append(value)
            key.append(_shape(value, reference, row, col))
            continue
        out.append(value)
        key.append(value.upper() if kind == "OPERAND" and sub in ("LOGICAL", "ERROR") else value)
    text = "".join(out)
    return Prepared(text, references, tuple(key), problem)


def _shape(text: str, reference: Reference, row: int, col: int):
    """A reference relative to the cell (absolute parts kept), so shifted copies share a key."""
    if reference.kind != "area":
        return ("ref", text.upper())
    m = _QUALIFIED_RE.match(text)
    rest = m.group("rest") if m else text
    sheet = reference.sheet.upper() if reference.sheet else None
    parts = []
    for piece in rest.split(":"):
        cm = re.match(r"^(\$?)([A-Za-z]{1,3})(\$?)(\d+)$", piece)
        if not cm:
            return ("ref", text.upper())
        c, r = col_to_index(cm.group(2)), int(cm.group(4))
        parts.append((c if cm.group(1) else ("c", c - col), r if cm.group(3) else ("r", r - row)))
    return ("area", sheet, tuple(parts))


# ---------------------------------------------------------------------------------------------
# Meaning of a formula, for comparisons (template drift)


def _number(text: str) -> str:
    try:
        value = float(text)
    except ValueError:
        return text.upper()
    return repr(value)


def normalise_formula(formula: str) -> str:
    """The formula's meaning as text: numbers by value (``3.0`` = ``3``, ``5.67E-8`` =
    ``0.0000000567``), function names upper case without add-in, ``_xlfn.`` or LibreOffice
    prefixes, no whitespace, sheet names quoted only where needed, case folded outside strings."""
    parts = []
    for token in tokens(formula):
        kind, sub, value = token.type, token.subtype, token.value
        if kind == "WHITE-SPACE":
            continue
        if kind == "FUNC" and sub == "OPEN":
            call = recognise_call(value)
            if call is not None and call.ours:
                value = call.canonical + "("
            elif call is not None:
                value = (call.prefix + call.name).upper() + "("
            else:
                value = _bare(value[:-1]) + "("
        elif kind == "OPERAND" and sub == "NUMBER":
            value = _number(value)
        elif kind == "OPERAND" and sub == "RANGE":
            m = _QUALIFIED_RE.match(value)
            if m:
                value = _sheet_text(_unquote(m.group("sheet"))).upper() + "!" + m.group("rest").upper()
            else:
                value = value.upper()
        elif kind == "OPERAND" and sub == "LOGICAL":
            value = value.upper()
        elif kind == "SEP" and sub == "ARG":
            value = ","
        elif not (kind == "OPERAND" and sub == "TEXT"):
            value = value.upper()
        parts.append(value)
    text = "".join(parts)
    # LibreOffice writes the logical constants as functions: TRUE() for TRUE.
    return re.sub(r"\b(TRUE|FALSE)\(\)", r"\1", text)
