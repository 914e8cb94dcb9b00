"""Template drift: a filled-in template's formulas compared, by meaning, with the pristine
template its marker names."""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

from ..templates.spec import MARKER_NAME
from ..workbook.formulatext import normalise_formula
from .findings import AuditError, Finding, Records, default_templates_dir, label, show

__all__ = ["pristine_template", "inputs_changed", "template_drift"]


def _marker(book) -> str | None:
    for name in book.names:
        if name.name.lower() == MARKER_NAME and name.sheet is None:
            text = name.text.strip().lstrip("=").strip()
            if len(text) >= 2 and text[0] == text[-1] == '"':
                text = text[1:-1].replace('""', '"')
            return text.strip()
    return None


@dataclass
class _Pristine:
    marker: str
    book: object
    cells: dict

    def get(self, key):
        return self.cells.get(key)


def template_marker(book) -> str | None:
    """The template name and version a workbook says it was made from, or None."""
    return _marker(book)


def pristine_template(result, book, templates_dir):
    """The pristine template a filled-in workbook names in its marker (None when it names none,
    or names one that is not installed, or another version: each said in a finding)."""
    from ..workbook.reader import BookError, read_book

    marker = _marker(book)
    if marker is None:
        return None
    result.template = marker
    name = marker.rpartition(" ")[0] or marker
    directory = Path(templates_dir) if templates_dir is not None else default_templates_dir()
    pristine_path = directory / f"{name}.xlsx"
    if not re.match(r"^[A-Za-z0-9][A-Za-z0-9_.-]*$", name) or not pristine_path.is_file():
        result.findings.append(Finding(
            "template-drift", "", f"the workbook says it was made from template {marker!r}, "
            f"which is not among the templates in {directory}; drift cannot be checked"))
        return None
    try:
        pristine_book = read_book(str(pristine_path))
    except BookError as error:
        raise AuditError(f"template {name}: {error}") from None
    installed = _marker(pristine_book)
    if installed != marker:
        result.findings.append(Finding(
            "version", "", f"the workbook was made from template {marker!r}; the installed "
            f"template is {installed!r}, so drift is not checked"))
        return None
    return _Pristine(marker, pristine_book, Records(pristine_book))


def inputs_changed(book, pristine) -> bool:
    """Whether a constant the template holds was changed in the workbook."""
    for sheet in pristine.book.sheets:
        try:
            now = book.sheet(sheet.name).values
        except KeyError:
            continue
        for ref, value in sheet.values.items():
            if ref in now and now[ref] != value:
                return True
    return False


def blank_inputs(result, book, pristine) -> list:
    """Each input of the template (a named constant on its Inputs sheet) left blank in the
    workbook: a finding at the cell (every spreadsheet computes a blank as 0, so the results
    that follow would look plausible).  Returns the findings added."""
    from ..workbook.reader import split_ref

    added: list = []
    pristine_inputs = {s.name: s for s in pristine.book.sheets}.get("Inputs")
    try:
        inputs = book.sheet("Inputs")
    except KeyError:
        return added
    if pristine_inputs is None:
        return added
    for name in pristine.book.names:
        text = name.text.strip().lstrip("=")
        m = re.match(r"^'?Inputs'?!\$?([A-Z]{1,3})\$?(\d+)$", text)
        if name.sheet is not None or not m:
            continue
        ref = f"{m.group(1)}{m.group(2)}"
        if ref not in pristine_inputs.values or ref in inputs.formulas:
            continue
        now = inputs.values.get(ref)
        if now is None or (isinstance(now, str) and not now.strip()):
            finding = Finding("error", label("Inputs", ref),
                              f"required input {name.name} is blank (the template holds "
                              f"{show(pristine_inputs.values[ref])}); a blank is computed as 0 "
                              f"in every spreadsheet program: fill it in", sheet="Inputs",
                              ref=ref)
            result.findings.append(finding)
            added.append(finding)
    added.sort(key=lambda f: split_ref(f.ref or "A1"))
    return added


def template_drift(result, book, cells, pristine) -> None:
    """Compare a filled-in template's formulas with its pristine copy, by meaning."""
    from ..workbook.reader import split_ref

    present = {s.name.upper(): s.name for s in book.sheets}
    order = {s.name: i for i, s in enumerate(pristine.book.sheets)}
    originals = sorted((c for c in pristine.cells.formulas() if c.formula is not None),
                       key=lambda c: (order.get(c.sheet, 0), split_ref(c.ref)))
    for original in originals:
        sheet = present.get(original.sheet.upper())
        if sheet is None:
            result.findings.append(Finding(
                "template-drift", label(original.sheet, original.ref),
                f"sheet {original.sheet!r} of the template is missing",
                original_formula=original.formula, sheet=None, ref=None))
            continue
        now = cells.get((sheet, original.ref))
        if now is not None and now.formula is not None:
            if now.formula == original.formula or \
                    normalise_formula(now.formula) == normalise_formula(original.formula):
                continue   # the same text needs no tokenising to mean the same
            message = f"formula edited: now {now.formula}, template {original.formula}"
            cached = now.cached
        elif now is not None and now.has_cached:
            message = f"formula overwritten by the constant {show(now.cached)}; template " \
                      f"{original.formula}"
            cached = now.cached
        else:
            message = f"formula cleared; template {original.formula}"
            cached = None
        result.findings.append(Finding(
            "template-drift", label(sheet, original.ref), message,
            formula=now.formula if now is not None else None, cached=cached,
            original_formula=original.formula, sheet=sheet, ref=original.ref))
