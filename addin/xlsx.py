"""Reading the parts of an .xlsx/.xlsm package that calc and the cached-value writer need.

Sheet XML is scanned with regular expressions on the raw bytes rather than parsed and
re-serialised, so that the writer can change the value elements of formula cells and leave every
other byte as it was.  workbook.xml and its relationships are small and parsed with defusedxml.
"""

from __future__ import annotations

import posixpath
import re
import zipfile
from dataclasses import dataclass, field

from defusedxml import ElementTree

__all__ = ["BookError", "Book", "Sheet", "FormulaCell", "DefinedName", "read_book",
           "CELL_RE", "split_ref", "col_to_index", "index_to_col", "expand_range"]

_NS_MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
_NS_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
_NS_PKG_REL = "http://schemas.openxmlformats.org/package/2006/relationships"

# One <c> element (optionally namespace-prefixed): attributes, and its body when not empty.
CELL_RE = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?c\b([^>]*?)(?:/>|>(.*?)</(?:[A-Za-z_][\w.-]*:)?c>)", re.S)
F_RE = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?f\b([^>]*?)(?:/>|>(.*?)</(?:[A-Za-z_][\w.-]*:)?f>)", re.S)
ATTR_RE = re.compile(rb'\s([\w:.-]+)\s*=\s*("[^"]*"|\'[^\']*\')')
_REF_RE = re.compile(r"^\$?([A-Za-z]{1,3})\$?(\d+)$")


class BookError(Exception):
    """The file is not a workbook calc can read; the message is one line for the user."""


def attrs(raw: bytes) -> dict[str, str]:
    return {k.decode(): v[1:-1].decode() for k, v in ATTR_RE.findall(raw)}


def col_to_index(col: str) -> int:
    n = 0
    for ch in col.upper():
        n = n * 26 + ord(ch) - 64
    return n


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


@dataclass
class FormulaCell:
    ref: str                      # "B3"
    formula: str | None           # text of <f>, None for shared/array members without text
    array_ref: str | None = None  # "C1:D5" for the anchor of an array formula


@dataclass
class Sheet:
    name: str
    part: str                                     # "xl/worksheets/sheet1.xml"
    formulas: dict[str, FormulaCell] = field(default_factory=dict)
    array_members: dict[str, str] = field(default_factory=dict)  # member ref -> anchor ref
    constants: dict[str, str] = field(default_factory=dict)      # ref -> raw <v> text (numbers)

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


@dataclass
class Book:
    path: str
    sheets: list[Sheet]
    names: list[DefinedName]
    members: list[str]

    def sheet(self, name: str) -> Sheet:
        for sheet in self.sheets:
            if sheet.name.lower() == name.lower():
                return sheet
        raise KeyError(name)


def _open(path: str) -> zipfile.ZipFile:
    try:
        archive = zipfile.ZipFile(path)
    except FileNotFoundError:
        raise BookError(f"{path}: no such file") from None
    except IsADirectoryError:
        raise BookError(f"{path}: is a directory, not a workbook") from None
    except (zipfile.BadZipFile, OSError) as error:
        raise BookError(f"{path}: not an .xlsx/.xlsm workbook ({error})") from None
    if "xl/workbook.xml" not in archive.namelist():
        archive.close()
        raise BookError(f"{path}: not an .xlsx/.xlsm workbook (no xl/workbook.xml; .xls and .xlsb "
                        "are not supported)")
    from .safezip import UnsafeWorkbook, check_archive  # workbooks come from other people

    try:
        check_archive(archive, path)
    except UnsafeWorkbook as error:
        archive.close()
        raise BookError(str(error)) from None
    return archive


def read_book(path: str) -> Book:
    with _open(path) as archive:
        try:
            workbook = ElementTree.fromstring(archive.read("xl/workbook.xml"))
            rels = ElementTree.fromstring(archive.read("xl/_rels/workbook.xml.rels"))
        except (KeyError, ElementTree.ParseError) as error:
            raise BookError(f"{path}: damaged workbook ({error})") from None
        except Exception as error:  # defusedxml refuses entity tricks
            raise BookError(f"{path}: refused workbook XML ({type(error).__name__})") from None
        targets = {r.get("Id"): r.get("Target") for r in rels.iter(f"{{{_NS_PKG_REL}}}Relationship")}
        sheets = []
        for element in workbook.iter(f"{{{_NS_MAIN}}}sheet"):
            target = targets.get(element.get(f"{{{_NS_REL}}}id"), "")
            part = target.lstrip("/") if target.startswith("/") else posixpath.normpath(
                posixpath.join("xl", target))
            if part not in archive.namelist():
                continue  # a chart sheet or a dangling relationship
            sheet = Sheet(element.get("name"), part)
            _scan_sheet(sheet, archive.read(part))
            sheets.append(sheet)
        sheet_names = [s.get("name") for s in workbook.iter(f"{{{_NS_MAIN}}}sheet")]
        names = []
        for element in workbook.iter(f"{{{_NS_MAIN}}}definedName"):
            local = element.get("localSheetId")
            names.append(DefinedName(
                element.get("name"), element.text or "",
                sheet_names[int(local)] if local is not None and int(local) < len(sheet_names) else None,
                element.get("hidden") in ("1", "true")))
        return Book(path, sheets, names, archive.namelist())


def _scan_sheet(sheet: Sheet, xml: bytes) -> None:
    for match in CELL_RE.finditer(xml):
        a = attrs(match.group(1))
        ref = a.get("r")
        body = match.group(2) or b""
        if ref is None:
            continue
        f = F_RE.search(body)
        if f:
            fa = attrs(f.group(1))
            text = _unescape(f.group(2).decode()) if f.group(2) else None
            array = fa.get("ref") if fa.get("t") == "array" else None
            sheet.formulas[ref] = FormulaCell(ref, text, array)
        elif a.get("t") in (None, "n"):
            v = re.search(rb"<(?:[\w.-]+:)?v>([^<]*)</", body)
            if v:
                sheet.constants[ref] = v.group(1).decode()
    for anchor, cell in sheet.formulas.items():
        if cell.array_ref:
            for member in expand_range(cell.array_ref):
                if member != anchor:
                    sheet.array_members[member] = anchor


def _unescape(text: str) -> str:
    return (text.replace("&lt;", "<").replace("&gt;", ">").replace("&quot;", '"')
            .replace("&apos;", "'").replace("&amp;", "&"))
