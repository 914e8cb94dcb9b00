"""``--set``: a new value for one cell, named as a reference or a defined name."""

from __future__ import annotations

import re

from .formulatext import MAX_COL, MAX_ROW
from .reader import Book, BookError, col_to_index

__all__ = ["parse_value", "resolve_target"]


def parse_value(text: str):
    """A --set value: number, TRUE/FALSE, text, or None for an empty value (the cell cleared)."""
    stripped = text.strip()
    if stripped == "":
        return None
    if stripped.upper() in ("TRUE", "FALSE"):
        return stripped.upper() == "TRUE"
    try:
        return float(stripped)
    except ValueError:
        return text


_SHEET_REF_RE = re.compile(r"^(?:'((?:[^']|'')+)'|([^!]+))!\$?([A-Za-z]{1,3})\$?(\d+)$")


def resolve_target(book: Book, target: str, replace_formulas: bool = False,
                   typed: str | None = None) -> tuple[str, str]:
    """(sheet name, "B3") for "Sheet!B3", "'My sheet'!$B$3" or a defined name of one cell.

    Refused (BookError): a cell outside the sheet's grid, a formula cell (unless
    ``replace_formulas``), an unknown sheet or name (with the closest existing ones)."""
    typed = typed or target
    m = _SHEET_REF_RE.match(target.strip())
    if m:
        sheet_name = (m.group(1) or "").replace("''", "'") or m.group(2)
        try:
            sheet = book.sheet(sheet_name)
        except KeyError:
            raise BookError(f"--set {typed}: no sheet named {sheet_name!r}"
                            f"{_did_you_mean(sheet_name, [s.name for s in book.sheets])}") from None
        ref = f"{m.group(3).upper()}{m.group(4)}"
        row, col = int(m.group(4)), col_to_index(m.group(3))
        if not (1 <= row <= MAX_ROW and 1 <= col <= MAX_COL):
            raise BookError(f"--set {typed}: {ref} is outside the sheet (the last cell is "
                            f"XFD{MAX_ROW})")
        if not replace_formulas and (ref in sheet.formulas or ref in sheet.array_members):
            formula = sheet.formulas.get(ref)
            shown = f" (={formula.formula})" if formula is not None and formula.formula else ""
            raise BookError(f"--set {typed}: {sheet.name}!{ref} holds a formula{shown}, not an "
                            f"input; add --replace-formula to replace it with the value anyway")
        return sheet.name, ref
    for name in book.names:
        if name.name.lower() == target.strip().lower() and not name.name.startswith("_xlnm."):
            inner = _SHEET_REF_RE.match(name.text.strip().lstrip("="))
            if not inner:
                raise BookError(f"--set {target}: the name refers to {name.text}, not one cell")
            return resolve_target(book, name.text.strip().lstrip("="), replace_formulas, typed)
    names = [n.name for n in book.names if not n.name.startswith("_xlnm.")]
    raise BookError(f"--set {typed}: not a cell reference (Sheet!B3) or a defined name of the "
                    f"workbook{_did_you_mean(target.strip(), names)}")


def _did_you_mean(typed: str, known: list[str]) -> str:
    import difflib
    lower = {k.lower(): k for k in known}
    close = difflib.get_close_matches(typed.lower(), list(lower), n=3, cutoff=0.6)
    return f" (did you mean {' or '.join(lower[c] for c in close)}?)" if close else ""
