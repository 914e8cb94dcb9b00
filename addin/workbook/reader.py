"""The one workbook reader: what calc, the cached-value writer, the audit and drift read.

Sheet XML is scanned with regular expressions on the raw bytes rather than parsed and
re-serialised, so that the writer can change the value elements of formula cells and leave every
other byte as it was.  workbook.xml and its relationships are small and parsed with defusedxml.
"""

from __future__ import annotations

import functools
import posixpath
import re
import zipfile
from dataclasses import dataclass, field
from typing import Any, Iterator

from defusedxml import ElementTree

__all__ = ["BookError", "Book", "Sheet", "FormulaCell", "DefinedName", "CellError", "Limits",
           "read_book", "decode_value",
           "CELL_RE", "split_ref", "col_to_index", "index_to_col", "expand_range"]

_NS_MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
_NS_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
_NS_PKG_REL = "http://schemas.openxmlformats.org/package/2006/relationships"

# One <c> element (optionally namespace-prefixed): attributes, and its body when not empty.
CELL_RE = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?c\b([^>]*?)(?:/>|>(.*?)</(?:[A-Za-z_][\w.-]*:)?c>)", re.S)
F_RE = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?f\b([^>]*?)(?:/>|>(.*?)</(?:[A-Za-z_][\w.-]*:)?f>)", re.S)
ATTR_RE = re.compile(rb'\s([\w:.-]+)\s*=\s*("[^"]*"|\'[^\']*\')')
_REF_RE = re.compile(r"^\$?([A-Za-z]{1,3})\$?(\d+)$")
_R_ATTR_RE = re.compile(rb'\sr="([A-Z]{1,3})(\d+)"')
_T_ATTR_RE = re.compile(rb'\st="([^"]*)"')
_V_FAST_RE = re.compile(rb"<(?:[\w.-]+:)?v>([^<&]*)</")


class BookError(Exception):
    """The file is not a workbook calc can read; the message is one line for the user."""


def attrs(raw: bytes) -> dict[str, str]:
    return {k.decode(): v[1:-1].decode() for k, v in ATTR_RE.findall(raw)}


# Both conversions are cached: a workbook names the same few columns hundreds of thousands of
# times (every reference of every formula), and a cached call costs a tenth of spelling it out.
@functools.lru_cache(maxsize=1 << 16)
def col_to_index(col: str) -> int:
    n = 0
    for ch in col.upper():
        n = n * 26 + ord(ch) - 64
    return n


@functools.lru_cache(maxsize=1 << 15)
def index_to_col(n: int) -> str:
    s = ""
    while n:
        n, r = divmod(n - 1, 26)
        s = chr(65 + r) + s
    return s


def split_ref(ref: str) -> tuple[int, int]:
    m = _REF_RE.match(ref)
    if not m:
        raise ValueError(f"not a cell reference: {ref!r}")
    return int(m.group(2)), col_to_index(m.group(1))


def expand_range(ref: str) -> list[str]:
    """"C1:D2" -> ["C1", "D1", "C2", "D2"] (row-major)."""
    first, _, last = ref.partition(":")
    r1, c1 = split_ref(first)
    r2, c2 = split_ref(last or first)
    return [f"{index_to_col(c)}{r}" for r in range(r1, r2 + 1) for c in range(c1, c2 + 1)]


class CellError(str):
    """An error value saved in a cell (``#N/A``...): text that says it is an error."""


class Limits:
    """What one workbook may hold before calc or the audit starts work (checked while reading)."""

    max_cells = 2_000_000          # cells with a value or a formula, all sheets
    max_formulas = 200_000         # formula cells, all sheets


@dataclass(slots=True)
class FormulaCell:
    ref: str                      # "B3"
    formula: str | None           # text of <f> without "="; shared formulas expanded
    array_ref: str | None = None  # "C1:D5" for the anchor of an array formula
    cached: object = None         # the value the file holds for the cell
    has_cached: bool = False      # False when the file holds no value (never calculated)


@dataclass(frozen=True)
class Validation:
    """One data-validation rule of a sheet (ECMA-376 Part 1, 18.3.1.32 dataValidation): the
    cells it covers, its type and operator, its formulas (relative to the top-left cell of its
    first area), whether blanks pass, and the message the spreadsheet shows on a refusal."""

    areas: tuple[str, ...]          # "B5", "C3:C9"
    type: str                       # custom, decimal, whole, list, textLength, date, time, any
    operator: str                   # between (default), notBetween, equal, greaterThan ...
    formula1: str | None
    formula2: str | None
    allow_blank: bool
    error: str                      # errorTitle and error, as the spreadsheet shows them


@dataclass
class Sheet:
    name: str
    part: str                                     # "xl/worksheets/sheet1.xml"
    formulas: dict[str, FormulaCell] = field(default_factory=dict)
    array_members: dict[str, str] = field(default_factory=dict)  # member ref -> anchor ref
    values: dict[str, object] = field(default_factory=dict)      # ref -> value of non-formula cells
    cached: dict[str, object] = field(default_factory=dict)      # array member ref -> cached value
    last_row: int = 0                             # the used range: last row and column with content
    last_col: int = 0
    validations: list[Validation] = field(default_factory=list)

    def validation_of(self, ref: str) -> Validation | None:
        """The data-validation rule that covers a cell, if any."""
        row, col = split_ref(ref)
        for rule in self.validations:
            for area in rule.areas:
                first, _, last = area.partition(":")
                try:
                    r1, c1 = split_ref(first.replace("$", ""))
                    r2, c2 = split_ref((last or first).replace("$", ""))
                except ValueError:
                    continue
                if min(r1, r2) <= row <= max(r1, r2) and min(c1, c2) <= col <= max(c1, c2):
                    return rule
        return None

    def formula_refs(self) -> list[str]:
        """Every cell whose value a formula computes (array ranges expanded), row-major."""
        refs = set(self.formulas)
        for cell in self.formulas.values():
            if cell.array_ref:
                refs.update(expand_range(cell.array_ref))
        return sorted(refs, key=split_ref)


@dataclass
class DefinedName:
    name: str
    text: str
    sheet: str | None   # scope: None for the workbook
    hidden: bool


@dataclass(frozen=True)
class Iteration:
    """The workbook's iterative calculation (``calcPr iterate="1"``): at most ``count`` sweeps,
    stopping when no value changes by more than ``delta`` (Excel's defaults 100 and 0.001)."""

    count: int = 100
    delta: float = 0.001


@dataclass
class Book:
    path: str
    sheets: list[Sheet]
    names: list[DefinedName]
    members: list[str]
    application: str = ""   # docProps/app.xml: the program that saved the file
    iteration: Iteration | None = None   # None: iterative calculation is off (cycles are errors)

    def sheet(self, name: str) -> Sheet:
        for sheet in self.sheets:
            if sheet.name.lower() == name.lower():
                return sheet
        raise KeyError(name)

    @property
    def saved_by_libreoffice(self) -> bool:
        return "libreoffice" in self.application.lower() or "openoffice" in self.application.lower()


def read_book(path: str) -> Book:
    """Open, safety-check and read ``path`` once: sheets, formulas (shared ones expanded), cached
    values, constants, defined names.  Every command works from what this returns."""
    from .safezip import UnsafeWorkbook, open_package

    try:
        archive = open_package(path)
    except UnsafeWorkbook as error:
        raise BookError(str(error)) from None
    with archive:
        members = archive.namelist()
        present = set(members)   # up to safezip's 10,000 members, looked up once per sheet
        if "xl/workbook.xml" not in present:
            raise BookError(f"{path}: not an .xlsx/.xlsm workbook (no xl/workbook.xml; .xls and "
                            ".xlsb are not supported)")
        try:
            workbook = ElementTree.fromstring(archive.read("xl/workbook.xml"))
            rels = ElementTree.fromstring(archive.read("xl/_rels/workbook.xml.rels"))
        except (KeyError, ElementTree.ParseError) as error:
            raise BookError(f"{path}: damaged workbook ({error})") from None
        except Exception as error:  # defusedxml refuses entity tricks
            raise BookError(f"{path}: refused workbook XML ({type(error).__name__})") from None
        targets = {r.get("Id"): r.get("Target") for r in rels.iter(f"{{{_NS_PKG_REL}}}Relationship")}
        shared = _shared_strings(archive, path)
        sheets = []
        counts = [0, 0]
        for element in workbook.iter(f"{{{_NS_MAIN}}}sheet"):
            target = targets.get(element.get(f"{{{_NS_REL}}}id"), "")
            part = target.lstrip("/") if target.startswith("/") else posixpath.normpath(
                posixpath.join("xl", target))
            if part not in present:
                continue  # a chart sheet or a dangling relationship
            sheet = Sheet(element.get("name"), part)
            data = archive.read(part)
            _require_well_formed(data, path, sheet.name, part)
            sheet.validations = _validations(data)
            try:
                _scan_sheet(sheet, data, shared, counts, path)
            except (UnicodeDecodeError, ValueError) as error:
                raise BookError(f"{path}: damaged sheet {sheet.name!r} ({error})") from None
            sheets.append(sheet)
        sheet_names = [s.get("name") for s in workbook.iter(f"{{{_NS_MAIN}}}sheet")]
        names = []
        for element in workbook.iter(f"{{{_NS_MAIN}}}definedName"):
            local = element.get("localSheetId")
            names.append(DefinedName(
                element.get("name"), element.text or "",
                sheet_names[int(local)] if local is not None and local.isdigit()
                and int(local) < len(sheet_names) else None,
                element.get("hidden") in ("1", "true")))
        application = ""
        if "docProps/app.xml" in present:
            m = re.search(rb"<(?:\w+:)?Application>([^<]*)<", archive.read("docProps/app.xml"))
            application = _unescape(m.group(1).decode("utf-8", "replace")) if m else ""
        return Book(path, sheets, names, members, application, _iteration(workbook))


_VALIDATIONS_RE = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?dataValidations\b.*?</(?:[A-Za-z_][\w.-]*:)?"
                             rb"dataValidations>", re.S)


def _validations(xml: bytes) -> list[Validation]:
    """The sheet's data-validation rules (the block is small: parsed on its own)."""
    from .safezip import parse_xml
    found = _VALIDATIONS_RE.search(xml)
    if found is None:
        return []
    block = found.group(0)
    if not block.startswith(b"<dataValidations") or b"xmlns" not in block[:200]:
        block = re.sub(rb"^<(?:[A-Za-z_][\w.-]*:)?dataValidations\b",
                       b'<dataValidations xmlns="' + _NS_MAIN.encode() + b'"', block)
        block = re.sub(rb"(</?)[A-Za-z_][\w.-]*:", rb"\1", block)
    try:
        root = parse_xml(block)
    except Exception:
        return []
    rules = []
    for element in root:
        if not element.tag.endswith("dataValidation"):
            continue
        texts = {}
        for child in element:
            texts[child.tag.rpartition("}")[2]] = (child.text or "").strip()
        title, message = element.get("errorTitle") or "", element.get("error") or ""
        rules.append(Validation(
            tuple((element.get("sqref") or "").split()), element.get("type") or "any",
            element.get("operator") or "between", texts.get("formula1"), texts.get("formula2"),
            element.get("allowBlank") in ("1", "true"),
            f"{title}: {message}" if title and message else (message or title)))
    return rules


def _iteration(workbook) -> Iteration | None:
    """The calcPr element's iteration settings, or None when iteration is off."""
    element = workbook.find(f"{{{_NS_MAIN}}}calcPr")
    if element is None or element.get("iterate") not in ("1", "true"):
        return None
    try:
        count = int(element.get("iterateCount", "100"))
    except ValueError:
        count = 100
    try:
        delta = float(element.get("iterateDelta", "0.001"))
    except ValueError:
        delta = 0.001
    return Iteration(max(count, 1), abs(delta))


def _require_well_formed(data: bytes, path: str, sheet: str, part: str) -> None:
    """A sheet part that is not well-formed XML (a truncated or damaged file) is refused by
    name: read leniently, it would look like an empty sheet and spoil every formula that
    reads it.  The prolog was checked by safezip (no DTD), so expat only checks the syntax."""
    from xml.parsers import expat
    parser = expat.ParserCreate()
    try:
        parser.Parse(data, True)
    except expat.ExpatError as error:
        raise BookError(f"{path}: damaged file: sheet {sheet!r} (part {part}) is not well-formed "
                        f"XML ({expat.errors.messages[error.code]} at line {error.lineno}, column "
                        f"{error.offset}); open it in the spreadsheet program that made it and "
                        f"save it again, or use a backup") from None


def _shared_strings(archive: zipfile.ZipFile, path: str) -> list[str]:
    if "xl/sharedStrings.xml" not in archive.namelist():
        return []
    from .safezip import UnsafeWorkbook, parse_xml
    try:
        root = parse_xml(archive.read("xl/sharedStrings.xml"))
    except UnsafeWorkbook as error:
        raise BookError(f"{path}: sharedStrings.xml: {error}") from None
    ns = f"{{{_NS_MAIN}}}"
    strings = []
    for si in root.iter(f"{ns}si"):
        # Rich text runs are joined; phonetic guides (rPh) are not part of the value.
        phonetic = {id(t) for rph in si.iter(f"{ns}rPh") for t in rph.iter(f"{ns}t")}
        texts = [t.text or "" for t in si.iter(f"{ns}t") if id(t) not in phonetic]
        strings.append("".join(texts))
    return strings


_V_RE = re.compile(rb"<(?:[\w.-]+:)?v\s*(?:/>|>([^<]*)</)")
_T_RE = re.compile(rb"<(?:[\w.-]+:)?t(?:\s[^>]*)?>([^<]*)</")


def decode_value(cell_type: str, body: bytes, shared: list[str]) -> tuple[bool, object]:
    """(whether the cell holds a value, the value) of a <c> element's body."""
    if cell_type == "inlineStr":
        return True, _unescape(b"".join(_T_RE.findall(body)).decode("utf-8"))
    v = _V_RE.search(body)
    if not v:
        return False, None
    text = _unescape((v.group(1) or b"").decode("utf-8"))
    if cell_type == "str":
        return True, text
    if cell_type == "b":
        return True, text.strip() in ("1", "true")
    if cell_type == "e":
        return True, CellError(text.strip())
    if cell_type == "s":
        try:
            return True, shared[int(text)]
        except (ValueError, IndexError):
            return True, None
    if text == "":
        return False, None   # an empty <v/>: nothing was calculated
    try:
        return True, float(text)
    except ValueError:
        return True, text


_ROW_RE = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?row\b([^>]*?)(?:/>|>(.*?)</(?:[A-Za-z_][\w.-]*:)?row>)",
                     re.S)


def _position(head: bytes):
    """(column letters, row digits) of a cell's r attribute, or None when it has none."""
    position = _R_ATTR_RE.search(head)
    if position is not None:
        return position.group(1), position.group(2)
    a = attrs(head)
    m = _REF_RE.match(a.get("r", "").replace("$", ""))
    return (m.group(1).upper().encode(), m.group(2).encode()) if m else None


class _NoPosition(Exception):
    """A cell without an r attribute: the sheet is read again row by row."""


def _cells_by_row(xml: bytes) -> Iterator[tuple[re.Match[bytes], bytes, bytes]]:
    """Every <c> with its position; the r attributes of rows and cells are optional in the file
    format (some writers leave them out): then a cell follows the one before it in its row, and
    a row the row before it."""
    done = set()
    row = 0
    for row_match in _ROW_RE.finditer(xml):
        r = attrs(row_match.group(1)).get("r", "")
        row = int(r) if r.isdigit() else row + 1
        col = 0
        for match in CELL_RE.finditer(row_match.group(2) or b""):
            position = _position(match.group(1))
            if position is not None:
                col = col_to_index(position[0].decode())
            else:
                col += 1
            key = (index_to_col(col).encode(), str(row).encode())
            if key in done:
                continue
            done.add(key)
            yield match, key[0], key[1]


def _scan_sheet(sheet: Sheet, xml: bytes, shared: list[str], counts: list[int], path: str) -> None:
    before = list(counts)
    try:
        _scan_cells(sheet, xml, shared, counts, path, by_row=False)
    except _NoPosition:
        sheet.formulas.clear()
        sheet.values.clear()
        counts[:] = before
        _scan_cells(sheet, xml, shared, counts, path, by_row=True)


def _scan_cells(sheet: Sheet, xml: bytes, shared: list[str], counts: list[int], path: str,
                by_row: bool) -> None:
    from openpyxl.formula.translate import Translator

    anchors: dict[str, Translator] = {}
    pending: list[tuple[FormulaCell, str]] = []
    last_row = last_col = 0
    columns: dict[bytes, int] = {}
    formulas, values = sheet.formulas, sheet.values
    search = _R_ATTR_RE.search
    item: Any  # a (match, column, row) triple by row, else a bare match: `by_row` tells which
    for item in (_cells_by_row(xml) if by_row else CELL_RE.finditer(xml)):
        if by_row:
            match, letters, digits = item
            head = match.group(1)
        else:
            match, head = item, item.group(1)
            position = search(head)
            if position is not None:
                letters, digits = position.group(1), position.group(2)
            else:
                position = _position(head)
                if position is None:
                    raise _NoPosition
                letters, digits = position
        counts[0] += 1
        if counts[0] > Limits.max_cells:
            raise BookError(f"{path}: refused: more than {Limits.max_cells:,} cells; calc and the "
                            "audit take workbooks up to that size")
        col = columns.get(letters)
        if col is None:
            col = columns[letters] = col_to_index(letters.decode())
        row = int(digits)
        ref = (letters + digits).decode() if digits[:1] != b"0" else f"{letters.decode()}{row}"
        body = match.group(2) or b""
        kind = _T_ATTR_RE.search(head)
        cell_type = kind.group(1).decode() if kind else "n"
        if cell_type == "n" and b"<f" not in body and b"<" in body:
            v = _V_FAST_RE.search(body)     # the common case: a number
            if v is None or not v.group(1):
                continue
            try:
                values[ref] = float(v.group(1))
            except ValueError:
                values[ref] = v.group(1).decode("utf-8", "replace")
        else:
            has, value = decode_value(cell_type, body, shared)
            f = F_RE.search(body)
            if f:
                counts[1] += 1
                if counts[1] > Limits.max_formulas:
                    raise BookError(f"{path}: refused: more than {Limits.max_formulas:,} formula "
                                    "cells; calc and the audit take workbooks up to that size")
                fa = attrs(f.group(1))
                text = _unescape(f.group(2).decode("utf-8")) if f.group(2) else None
                array = fa.get("ref") if fa.get("t") == "array" else None
                cell = FormulaCell(ref, text, array, value, has)
                if fa.get("t") == "shared" and "si" in fa:
                    if text is not None:
                        anchors[fa["si"]] = Translator("=" + text, origin=ref)
                    else:
                        pending.append((cell, fa["si"]))
                formulas[ref] = cell
            elif has:
                values[ref] = value
            else:
                continue
        if row > last_row:
            last_row = row
        if col > last_col:
            last_col = col
    for cell, si in pending:
        if si in anchors:
            cell.formula = anchors[si].translate_formula(cell.ref)[1:]
    for anchor, cell in sheet.formulas.items():
        if cell.array_ref:
            try:
                (r1, c1), (r2, c2) = (split_ref(p) for p in (cell.array_ref.split(":") + [anchor])[:2])
            except ValueError:
                raise BookError(f"{path}: damaged array formula range {cell.array_ref!r} in "
                                f"{sheet.name}!{anchor}") from None
            if (abs(r2 - r1) + 1) * (abs(c2 - c1) + 1) > Limits.max_cells:
                raise BookError(f"{path}: refused: the array formula in {sheet.name}!{anchor} "
                                f"spans {cell.array_ref}, more than {Limits.max_cells:,} cells")
            for member in expand_range(cell.array_ref):
                if member != anchor:
                    sheet.array_members[member] = anchor
                    if member in sheet.values:
                        sheet.cached[member] = sheet.values.pop(member)
                    row, col = split_ref(member)
                    last_row, last_col = max(last_row, row), max(last_col, col)
    sheet.last_row, sheet.last_col = last_row, last_col


def _unescape(text: str) -> str:
    if "&" not in text:
        return text
    return (text.replace("&lt;", "<").replace("&gt;", ">").replace("&quot;", '"')
            .replace("&apos;", "'").replace("&amp;", "&"))
