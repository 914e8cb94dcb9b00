"""``--set``: a new value for one cell, named as a reference or a defined name."""

from __future__ import annotations

import re

from .reader import Book, BookError

__all__ = ["parse_value", "resolve_target"]


def parse_value(text: str):
    """A --set value: number, TRUE/FALSE, or text."""
    stripped = text.strip()
    if stripped.upper() in ("TRUE", "FALSE"):
        return stripped.upper() == "TRUE"
    try:
        return float(stripped)
    except ValueError:
        return text


_SHEET_REF_RE = re.compile(r"^(?:'((?:[^']|'')+)'|([^!]+))!\$?([A-Za-z]{1,3})\$?(\d+)$")


def resolve_target(book: Book, target: str) -> tuple[str, str]:
    """(sheet name, "B3") for "Sheet!B3", "'My sheet'!$B$3" or a defined name of one cell."""
    m = _SHEET_REF_RE.match(target.strip())
    if m:
        sheet_name = (m.group(1) or "").replace("''", "'") or m.group(2)
        try:
            sheet = book.sheet(sheet_name)
        except KeyError:
            raise BookError(f"--set {target}: no sheet named {sheet_name!r}") from None
        return sheet.name, f"{m.group(3).upper()}{m.group(4)}"
    for name in book.names:
        if name.name.lower() == target.strip().lower() and not name.name.startswith("_xlnm."):
            inner = _SHEET_REF_RE.match(name.text.strip().lstrip("="))
            if not inner:
                raise BookError(f"--set {target}: the name refers to {name.text}, not one cell")
            return resolve_target(book, name.text.strip().lstrip("="))
    raise BookError(f"--set {target}: not a cell reference (Sheet!B3) or a defined name of the workbook")
