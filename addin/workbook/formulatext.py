"""Formula text: the one add-in-prefix grammar, references, and a formula's meaning.

Every command that reads a formula goes through this module, so calc, the audit and template
drift agree on what a formula says:

* :func:`recognise_call` reads a function-call token in every form a spreadsheet writes an add-in
  function's name: ``NAME(``, ``[1]!NAME(``, ``'C:\\...\\stillair.xlam'!NAME(``,
  ``book.xlsm!NAME(``, ``_xll.NAME(``, ``_xludf.NAME(``, LibreOffice's lower-case ``name(`` and its
  programmatic ``ORG.X.Y.NAME(`` for an extension's functions.
* :func:`parse_reference` reads a reference operand (cells, areas, whole rows or columns,
  names, sheet-qualified forms).
* :func:`normalise_formula` gives a formula's meaning for comparison: numbers by value, function
  names in any case and without prefixes, no whitespace, sheet names quoted only where needed.

Rewriting a formula for the evaluator is :mod:`stillair.addin.workbook.rewrite`.
"""

from __future__ import annotations

import functools
import re
from dataclasses import dataclass

from .reader import col_to_index, index_to_col

__all__ = ["Call", "recognise_call", "calls_in", "tokens", "normalise_formula", "Reference",
           "parse_reference", "area_text", "bare_name", "CELL_IN_TEXT", "QUALIFIED_RE", "MAX_ROW",
           "MAX_COL"]

MAX_ROW, MAX_COL = 1_048_576, 16_384
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
    key = CELL_IN_TEXT.sub("\x00", formula)
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
QUALIFIED_RE = re.compile(r"^(?P<sheet>'(?:[^']|'')+'|[^'!]+)!(?P<rest>.+)$")
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
    m = QUALIFIED_RE.match(operand)
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


# The prefixes newer Excel versions write before a built-in's name (_xlfn.IFS, _xlfn._xlws.SORT).
_EXCEL_PREFIX = re.compile(r"^(?:_XLFN\.)?(?:_XLWS\.)?")


def bare_name(name: str) -> str:
    """A built-in's name in upper case without the _xlfn. / _xlws. prefixes."""
    return _EXCEL_PREFIX.sub("", name.upper())


# A cell reference outside a string: A1, $A1, A$1, $A$1 (not part of a name, a number written
# with an exponent, a function name such as LOG10( or a sheet name such as Sheet1!).
CELL_IN_TEXT = re.compile(r"(?<![\w.$])(\$?)([A-Za-z]{1,3})(\$?)(\d+)(?![\w.(!])")


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
                value = bare_name(value[:-1]) + "("
        elif kind == "OPERAND" and sub == "NUMBER":
            value = _number(value)
        elif kind == "OPERAND" and sub == "RANGE":
            m = QUALIFIED_RE.match(value)
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
