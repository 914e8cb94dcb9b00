"""Write a copy of a workbook with the cached values of its formula cells filled in.

Only the value elements (``<v>``, and the cell's ``t`` type attribute that says how to read it)
of the cells given are changed, inside the sheet XML, by byte-level substitution.  Every other
zip member is copied unchanged, and so is every other byte of the changed sheets: formulas,
styles, charts, defined names and VBA stay exactly as they were.
"""

from __future__ import annotations

import math
import os
import re
import shutil
import tempfile
import zipfile

from .reader import ATTR_RE, CELL_RE, F_RE, Book, BookError

__all__ = ["write_cached_values", "same_file", "ERROR_VALUES"]

ERROR_VALUES = {"#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A", "#GETTING_DATA",
                "#SPILL!", "#CALC!"}
_V_RE = re.compile(rb"<((?:[A-Za-z_][\w.-]*:)?)v\s*(?:/>|>[^<]*</(?:[A-Za-z_][\w.-]*:)?v>)")
_T_ATTR_RE = re.compile(rb'\st\s*=\s*("[^"]*"|\'[^\']*\')')


def same_file(a: str, b: str) -> bool:
    """True when a and b name the same file (symlinks, case-insensitive file systems...)."""
    if os.path.exists(b):
        try:
            return os.path.samefile(a, b)
        except OSError:
            pass
    return os.path.normcase(os.path.realpath(a)) == os.path.normcase(os.path.realpath(b)) or (
        os.path.realpath(a).lower() == os.path.realpath(b).lower())


def _xml_escape(text: str) -> bytes:
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;").encode("utf-8")


def _number_text(value: float) -> str:
    text = repr(float(value))
    return text[:-2] if text.endswith(".0") else text


def encode(value) -> tuple[str | None, bytes]:
    """(t attribute, or None for a number; content of <v>) for a cell value."""
    if isinstance(value, bool):
        return "b", b"1" if value else b"0"
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            return "e", b"#NUM!"
        return None, _number_text(value).encode()
    text = "" if value is None else str(value)
    if text in ERROR_VALUES:
        return "e", text.encode()
    return "str", _xml_escape(text)


def _rewrite_cell(match: re.Match, value) -> bytes:
    whole, start_attrs, body = match.group(0), match.group(1), match.group(2)
    opening = re.match(rb"<((?:[A-Za-z_][\w.-]*:)?)c", whole)
    assert opening is not None  # CELL_RE matched this text, which starts with the same <c
    prefix = opening.group(1)
    t, content = encode(value)
    if t is None:
        start_attrs = _T_ATTR_RE.sub(b"", start_attrs)
    elif _T_ATTR_RE.search(start_attrs):  # keep the attribute where it was
        start_attrs = _T_ATTR_RE.sub(f' t="{t}"'.encode(), start_attrs, count=1)
    else:
        start_attrs += f' t="{t}"'.encode()
    v_element = b"<" + prefix + b"v>" + content + b"</" + prefix + b"v>"
    if body is None:
        body = v_element
    elif _V_RE.search(body):
        body = _V_RE.sub(lambda m: v_element, body, count=1)
    else:
        f = F_RE.search(body)
        body = body[:f.end()] + v_element + body[f.end():] if f else v_element + body
    return b"<" + prefix + b"c" + start_attrs + b">" + body + b"</" + prefix + b"c>"


def rewrite_sheet(xml: bytes, values: dict[str, object]) -> tuple[bytes, set[str]]:
    """Return the sheet XML with the given cells' values replaced, and the refs changed."""
    done: set[str] = set()

    def substitute(match: re.Match) -> bytes:
        ref = None
        for key, raw in ATTR_RE.findall(match.group(1)):
            if key == b"r":
                ref = raw[1:-1].decode()
        if ref is None or ref not in values:
            return match.group(0)
        done.add(ref)
        return _rewrite_cell(match, values[ref])

    return CELL_RE.sub(substitute, xml), done


def write_cached_values(book: Book, out_path: str, values: dict[str, dict[str, object]]) -> dict:
    """Copy ``book`` to ``out_path`` with ``values`` ({sheet: {ref: value}}) as cached values.

    Cells absent from the sheet XML are left out (they hold nothing to fill); the result maps
    each sheet to the refs written.  The copy is written next to the target and renamed into
    place, so a failure never leaves half a file.
    """
    if same_file(book.path, out_path):
        raise BookError(f"{out_path}: refusing to write over the input workbook")
    by_part = {s.part: values.get(s.name, {}) for s in book.sheets}
    written: dict[str, set[str]] = {}
    directory = os.path.dirname(os.path.abspath(out_path))
    handle, temporary = tempfile.mkstemp(suffix=".xlsx", dir=directory)
    os.close(handle)
    try:
        with zipfile.ZipFile(book.path) as source, zipfile.ZipFile(temporary, "w") as target:
            for info in source.infolist():
                data = source.read(info)
                cells = by_part.get(info.filename)
                if cells:
                    data, done = rewrite_sheet(data, cells)
                    written[info.filename] = done
                target.writestr(info, data, compress_type=info.compress_type)
        shutil.move(temporary, out_path)
    except BaseException:
        if os.path.exists(temporary):
            os.unlink(temporary)
        raise
    names = {s.part: s.name for s in book.sheets}
    return {names[p]: refs for p, refs in written.items()}
