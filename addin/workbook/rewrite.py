"""Rewriting a formula for the evaluator: what the ``formulas`` library can be taught, or the
construct it cannot evaluate, in plain words.

:func:`prepare` turns a cell's formula into what the ``formulas`` library can compile, or says in
plain words which construct it cannot evaluate (3-D and structured references, INDIRECT,
OFFSET, unknown functions...).  Constructs it can be taught are rewritten: add-in prefixes
removed, unsigned exponents (``1E9``) given their sign, an empty argument of one of our
functions made blank (Excel passes a missing argument, never 0), whole rows and columns cut to
the sheet's used range, ``ROW()``/``COLUMN()`` replaced by the cell's own row and column.
Formulas of one relative form (a row copied down) share one preparation.
"""

from __future__ import annotations

import functools
import operator
import re
from dataclasses import dataclass
from typing import Any

from .formulas_bridge import builtin_names
from .formulatext import (CELL_IN_TEXT, QUALIFIED_RE, Reference, area_text, bare_name,
                          parse_reference, recognise_call, tokens)
from .reader import col_to_index

__all__ = ["Prepared", "prepare", "MAX_AREA_CELLS"]

# A reference that would hand the evaluator more cells than this (after whole rows and columns
# are cut to the used range) is refused for that cell: a range this size is never a calculation
# input, and building it would take the memory a workbook of 10 MB may not claim.
MAX_AREA_CELLS = 2_000_000


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


@functools.lru_cache(maxsize=4096)
def _builtin_name(name: str) -> str | None:
    """The name ``formulas`` knows a built-in by, or None when it has no implementation."""
    upper = name.upper()
    bare = bare_name(name)
    if bare in _PARSER_FUNCTIONS:
        return upper
    known = builtin_names()
    for candidate in (upper, bare, "_XLFN." + bare, "_XLFN._XLWS." + bare):
        if candidate in known:
            return candidate
    return None


def _problem_of_function(name: str) -> str:
    bare = bare_name(name)
    if bare in _DYNAMIC:
        return f"{_DYNAMIC[bare]}; it is not supported headlessly"
    newer = " (a newer Excel function)" if name.lower().startswith("_xlfn.") else ""
    return f"function {bare}{newer} is not available headlessly"


_STRING = re.compile(r'("(?:[^"]|"")*")')
_CELL_DEPENDENT = re.compile(r"(?i)\b(?:ROW|COLUMN|ISFORMULA)\s*\(")


def _relative_form(formula: str, row: int, col: int):
    """The formula with its cell references made relative to the cell, and the references'
    positions (column, row) in order; None when the text has quoted sheet names or functions
    whose value depends on the cell."""
    if "'" in formula or _CELL_DEPENDENT.search(formula):
        return None
    parts, cells = [], []
    for index, piece in enumerate(_STRING.split(formula) if '"' in formula else (formula,)):
        if index % 2:                      # a string literal, kept as written
            parts.append(piece)
            continue
        # split gives the text before each reference, then the reference's four groups
        # ($, letters, $, digits): one C call per piece instead of one match object per reference
        bits = CELL_IN_TEXT.split(piece)
        parts.append(bits[0])
        for at in range(1, len(bits), 5):
            fixed_col, letters, fixed_row, digits, after = bits[at:at + 5]
            c, r = col_to_index(letters), int(digits)
            cells.append((c, r))
            parts.append(f"{'$' + str(c) if fixed_col else 'C' + str(c - col)}"
                         f"{'$' + str(r) if fixed_row else 'R' + str(r - row)}\x00{after}")
    return "".join(parts), cells


class _Template:
    """A prepared formula and, for each reference, which cell positions of the text give its
    corners: formulas of the same relative form reuse it instead of being tokenised again."""

    def __init__(self, prepared: Prepared, corners: list[tuple[int, ...]]):
        self.prepared, self.corners = prepared, corners


_DIGITS = re.compile(r"(\d+)")


def _picker(indices: list[int]):
    """A function giving the items at ``indices`` of a sequence as a tuple (itemgetter gives a
    bare item for one index)."""
    if len(indices) == 1:
        only = indices[0]
        return lambda items: (items[only],)
    return operator.itemgetter(*indices) if indices else (lambda items: ())


@dataclass(frozen=True)
class _DigitRoles:
    """What each run of digits of a formula's text is, for :func:`_by_digits`: the runs that
    must read as written (constants and $-fixed rows), the relative rows (their offsets from
    the formula's row) and, for every reference in order, its column and its row's run."""

    template: _Template
    fixed: Any            # picks the runs that must read as written
    written: tuple        # what they read
    relative: Any         # picks the relative rows' runs
    offsets: tuple        # their offsets from the formula's row
    rows: Any             # picks every reference's row run, in order
    columns: tuple        # every reference's column, in order


def _digit_roles(text: str, row: int, template: _Template, cells: list) -> _DigitRoles | bool:
    """The roles of the runs of digits in ``text`` (a formula of the cell in ``row``, prepared
    as ``template`` with the relative form's ``cells``).  A formula whose text matches
    ``text`` outside its digit runs has its references at the same places (the pattern of a
    reference reads letters, $ and the characters around the digits, never which digits), so
    it shares ``template`` when every run checks out.  False when the runs do not line up with
    the relative form's cells."""
    references: dict[int, tuple] = {}
    offset = 0
    for index, piece in enumerate(_STRING.split(text) if '"' in text else (text,)):
        if not index % 2:                  # outside string literals, as _relative_form reads
            for m in CELL_IN_TEXT.finditer(piece):
                references[offset + m.start(4)] = (col_to_index(m.group(2)), bool(m.group(3)))
        offset += len(piece)
    fixed, written, relative, offsets, rows, columns, found = [], [], [], [], [], [], []
    for index, m in enumerate(_DIGITS.finditer(text)):
        reference = references.get(m.start())
        if reference is None or reference[1]:
            fixed.append(index)
            written.append(m.group())
        else:
            relative.append(index)
            offsets.append(int(m.group()) - row)
        if reference is not None:
            rows.append(index)
            columns.append(reference[0])
            found.append((reference[0], int(m.group())))
    if found != cells:
        return False
    return _DigitRoles(template, _picker(fixed), tuple(written), _picker(relative),
                       tuple(offsets), _picker(rows), tuple(columns))


def _by_digits(formula: str, row: int, col: int, own_sheet: str, digits: dict):
    """The template and cells of a formula whose text differs from one seen before in this
    column only in the digits of its rows (a row copied down): a regex split and a few
    comparisons of tuples instead of the relative form's rewrite; (key, None) when not seen."""
    pieces = _DIGITS.split(formula)
    key = (tuple(pieces[0::2]), own_sheet.upper(), col)
    roles = digits.get(key)
    if not roles:                          # not seen, or seen with runs that do not line up
        return key, None
    runs = pieces[1::2]
    # rows written with leading zeros (A02) read differently here: the relative form decides
    if roles.fixed(runs) != roles.written or \
            roles.relative(runs) != tuple(map(str, map(row.__add__, roles.offsets))):
        return key, None
    return key, (roles.template, list(zip(roles.columns, map(int, roles.rows(runs)))))


def prepare(formula: str, row: int, col: int, used: dict[str | None, tuple[int, int]],
            own_sheet: str, cache: dict | None = None, is_formula=None,
            digits: dict | None = None) -> Prepared:
    """Rewrite ``formula`` (with or without "=") of the cell at ``row``/``col`` of ``own_sheet``.

    ``used`` maps a sheet name (upper case) to its used range's last (row, column): whole rows
    and columns are cut there, so they cost what the used range costs.  A formula of the same
    relative form as one prepared before (a row copied down) reuses that one's work.
    ``is_formula(sheet, row, col)`` says whether a cell holds a formula (ISFORMULA reads it;
    without it ISFORMULA is left to the library).  ``digits`` (with ``cache``) remembers, per
    column, the text of each form outside its digits: a copy that differs only in its rows'
    digits finds its template without the relative form's rewrite."""
    if cache is None:
        return _prepare(formula, row, col, used, own_sheet, is_formula)
    text = formula.lstrip("=")
    if digits is None:
        digits = {}
    digits_key, known = _by_digits(text, row, col, own_sheet, digits)
    if known is not None:
        template, cells = known
    else:
        relative = _relative_form(text, row, col)
        if relative is None:
            return _prepare(formula, row, col, used, own_sheet, is_formula)
        form, cells = relative
        cache_key = (form, own_sheet.upper())
        template = cache.get(cache_key)
        if template is None:
            prepared = _prepare(formula, row, col, used, own_sheet)
            corners = _corners(prepared, cells)
            if corners is None:
                return prepared
            template = cache[cache_key] = _Template(prepared, corners)
            digits[digits_key] = _digit_roles(text, row, template, cells)
            return prepared
        digits[digits_key] = _digit_roles(text, row, template, cells)
    references = []
    for reference, corner in zip(template.prepared.references, template.corners):
        if len(corner) == 1:
            c, r = cells[corner[0]]
            reference = _area(reference.sheet, r, c, r, c)
        elif corner:
            (c1, r1), (c2, r2) = cells[corner[0]], cells[corner[1]]
            reference = _area(reference.sheet, min(r1, r2), min(c1, c2), max(r1, r2), max(c1, c2))
        references.append(reference)
    return _LazyPrepared(formula, row, col, used, own_sheet, references, template.prepared.key,
                         template.prepared.problem)


@functools.lru_cache(maxsize=1 << 16)
def _area(sheet: str | None, r1: int, c1: int, r2: int, c2: int) -> Reference:
    """An area reference, shared (a reference is immutable): the cells of a row are read by
    several formulas of the row, and making a frozen Reference costs several lookups' worth."""
    return Reference("area", sheet, r1, c1, r2, c2)


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

    @text.setter  # Prepared's text is a writable field; so is this one
    def text(self, value: str) -> None:
        self._text = value


def _corners(prepared: Prepared, cells: list) -> list[tuple[int, ...]] | None:
    """For each reference of ``prepared``, the indices in ``cells`` of its written corners
    (none for names and whole rows or columns); None when they cannot be matched up."""
    corners: list[tuple[int, ...]] = []
    at = 0
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


def _is_area(token) -> bool:
    return token.type == "OPERAND" and token.subtype == "RANGE" and \
        parse_reference(token.value).kind == "area"


def _reference_operators(items: tuple, own_sheet: str, is_formula) -> list:
    """Tokens with what depends on the reference itself, not on values, worked out here:

    * the intersection operator (a space between two areas, ``B2:E5 C3:D4``): the common area,
      or #NULL! where they do not meet (Excel's rule; formulas reads the pair as one operand);
    * ``ISFORMULA(cell)``: TRUE or FALSE from the workbook (formulas asks its own dispatcher);
    * ``--X`` as ``0+X`` (formulas cancels the two minus signs and keeps a logical)."""
    from openpyxl.formula.tokenizer import Token
    out = list(items)
    i = 0
    while i + 1 < len(out):
        # "--X" (a logical made a number, --(A1=B1)): formulas drops the pair and keeps TRUE or
        # FALSE; Excel gives 1 or 0.  0+X has the value and type of --X in every case.
        if all(t.type == "OPERATOR-PREFIX" and t.value == "-" for t in out[i:i + 2]):
            out[i:i + 2] = [Token("0", "OPERAND", "NUMBER"), Token("+", "OPERATOR-INFIX", "")]
        i += 1
    i = 0
    while i + 2 < len(out):
        a, gap, b = out[i], out[i + 1], out[i + 2]
        if gap.type == "WHITE-SPACE" and _is_area(a) and _is_area(b):
            ra, rb = parse_reference(a.value), parse_reference(b.value)
            if (ra.sheet or own_sheet).upper() == (rb.sheet or own_sheet).upper() and \
                    not ra.whole and not rb.whole:
                r1, c1 = max(ra.r1, rb.r1), max(ra.c1, rb.c1)
                r2, c2 = min(ra.r2, rb.r2), min(ra.c2, rb.c2)
                if r1 <= r2 and c1 <= c2:
                    merged = Token(area_text(ra.sheet, r1, c1, r2, c2), "OPERAND", "RANGE")
                else:
                    merged = Token("#NULL!", "OPERAND", "ERROR")
                out[i:i + 3] = [merged]
                continue
        i += 1
    i = 0
    while i + 2 < len(out):
        # Functions of where a reference lies, not of its cells' values, with an area typed as
        # their argument: worked out here, so the cells they name are not read (ROWS(A1:C50)
        # in C7 is no circular reference, in LibreOffice as in Excel).
        f, arg, close = out[i], out[i + 1], out[i + 2]
        if f.type == "FUNC" and f.subtype == "OPEN" and _is_area(arg) and \
                close.type == "FUNC" and close.subtype == "CLOSE":
            reference = parse_reference(arg.value)
            name = bare_name(f.value[:-1])
            single = reference.r1 == reference.r2 and reference.c1 == reference.c2
            answer = {"ROWS": reference.r2 - reference.r1 + 1,
                      "COLUMNS": reference.c2 - reference.c1 + 1, "AREAS": 1,
                      "ROW": reference.r1 if single else None,
                      "COLUMN": reference.c1 if single else None}.get(name)
            if name == "ISREF":
                out[i:i + 3] = [Token("TRUE", "OPERAND", "LOGICAL")]
            elif answer is not None and not reference.whole:
                out[i:i + 3] = [Token(str(answer), "OPERAND", "NUMBER")]
        i += 1
    if is_formula is not None:
        i = 0
        while i + 2 < len(out):
            f, arg, close = out[i], out[i + 1], out[i + 2]
            if f.type == "FUNC" and f.subtype == "OPEN" and \
                    bare_name(f.value[:-1]) == "ISFORMULA" and _is_area(arg) and \
                    close.type == "FUNC" and close.subtype == "CLOSE":
                reference = parse_reference(arg.value)
                if reference.cells == 1:
                    answer = is_formula(reference.sheet or own_sheet, reference.r1, reference.c1)
                    out[i:i + 3] = [Token("TRUE" if answer else "FALSE", "OPERAND", "LOGICAL")]
            i += 1
    return out


def _prepare(formula: str, row: int, col: int, used: dict[str | None, tuple[int, int]],
             own_sheet: str, is_formula=None) -> Prepared:
    read = tokens(formula)
    if not read:
        text = formula.lstrip("=")
        return Prepared(text, [], ("?", text), "the formula cannot be read")
    items = _reference_operators(read, own_sheet, is_formula)
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
                builtin = None if bare_name(name) in _DYNAMIC else _builtin_name(name)
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
            lambda_closed = opened is not None and opened[2].upper().endswith("LAMBDA(")
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
    m = QUALIFIED_RE.match(text)
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
