"""Regenerate the workbooks in tests/data/libreoffice/ by driving a real LibreOffice headless.

Run with the system Python that has LibreOffice's ``uno`` module (not the project's venv):

    /usr/bin/python3 tests/data/make_libreoffice_books.py

It writes, from the templates in templates/ as they are now:

* ``saved-<template>.xlsx``: each template opened in LibreOffice and saved as .xlsx without any
  edit (LibreOffice rewrites every formula in its own way and recalculates array formulas when it
  opens a file; the stillair add-in is not installed, so our functions are unknown to it);
* ``edited-no-recalc.xlsx``: the air-layer template with one input changed, automatic
  calculation switched off, saved without recalculating;
* ``typed.xlsx``: a workbook typed cell by cell through LibreOffice's API that calls our
  functions by name (inputs, stillair calls, built-ins over them);
* ``templates/``: a copy of each template as it was when saved, so the tests compare every
  LibreOffice copy with the template it came from, whatever version templates/ is at later;
* ``manifest.json``: which template file (and its sha256) each saved copy came from.

The tests read only the committed files: CI needs no LibreOffice.  Re-run this script after the
templates change and commit its output.
"""

from __future__ import annotations

import hashlib
import json
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import uno  # noqa: F401  (LibreOffice's Python bridge; /usr/bin/python3 only)

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "libreoffice"))
from session import Session, _props  # noqa: E402  (the tests' LibreOffice driver, same Python)

ROOT = Path(__file__).resolve().parents[2]
OUT = Path(__file__).resolve().parent / "libreoffice"
EDITED_TEMPLATE = "air-layer"


class Office:
    """A private headless LibreOffice (own profile), closed on exit: the test suite's
    :class:`session.Session` with a throw-away profile and no extension."""

    def __enter__(self):
        self.profile = tempfile.mkdtemp(prefix="stillair-lo-profile-")
        self.session = Session("soffice", self.profile, None)
        self.desktop = self.session.desktop
        return self

    def load(self, path: Path):
        return self.desktop.loadComponentFromURL(uno.systemPathToFileUrl(str(path)), "_blank", 0,
                                                 _props(Hidden=True))

    def new_sheet(self):
        return self.desktop.loadComponentFromURL("private:factory/scalc", "_blank", 0,
                                                 _props(Hidden=True))

    @staticmethod
    def save_xlsx(doc, path: Path) -> None:
        doc.storeToURL(uno.systemPathToFileUrl(str(path)),
                       _props(FilterName="Calc MS Excel 2007 XML", Overwrite=True))

    def __exit__(self, *exc):
        self.session.close()
        shutil.rmtree(self.profile, ignore_errors=True)
        return False


def _sha256(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def _version() -> str:
    done = subprocess.run(["soffice", "--version"], capture_output=True, text=True)
    return " ".join(done.stdout.split()[:3])


def _named_cell(doc, name: str):
    """The cell a workbook-scoped defined name points to."""
    ranges = doc.NamedRanges
    if not ranges.hasByName(name):
        raise KeyError(f"{EDITED_TEMPLATE}: no defined name {name!r}")
    address = ranges.getByName(name).getReferredCells().getCellAddress()
    sheet = doc.Sheets.getByIndex(address.Sheet)
    return sheet.getCellByPosition(address.Column, address.Row)


# The edited copy: one input changed, automatic calculation off, saved without recalculating.
EDIT_NAME, EDIT_VALUE = "thickness", 0.03


def _typed(office, path: Path) -> None:
    """A small calculation typed through the API, calling our functions by name.

    Formulas go in with ``setFormula`` (the API grammar: English names, ';' between arguments);
    LibreOffice keeps names it does not know as written and stores them in the .xlsx."""
    doc = office.new_sheet()
    sheet = doc.Sheets.getByIndex(0)
    sheet.Name = "Wall"
    rows = [
        ("A1", "warm surface °C"), ("B1", 40.0),
        ("A2", "room air °C"), ("B2", 20.0),
        ("A3", "height m"), ("B3", 1.5),
        ("A4", "emissivity"), ("B4", 0.9),
        ("A6", "h convection W/(m²·K)"), ("B6", "=H_VPLATE(B1;B2;B3)"),
        ("A7", "h radiation W/(m²·K)"), ("B7", "=H_RAD(B1;B2;B4)"),
        ("A8", "h radiation, empty 4th argument"), ("B8", "=H_RAD(B1;B2;B4;)"),
        ("A9", "h total W/(m²·K)"), ("B9", "=B6+B7"),
        ("A10", "heat flux W/m²"), ("B10", "=B9*(B1-B2)"),
        ("A11", "Rayleigh"), ("B11", "=RAYLEIGH(B1;B2;B3)"),
        ("A12", "Nu, vertical plate"), ("B12", "=NU_VPLATE(B11;AIR_PRANDTL((B1+B2)/2))"),
        ("A13", "large Ra literal"), ("B13", "=NU_VPLATE(1E9;0.71)"),
        ("A14", "sum of h"), ("B14", "=SUM(B6:B8)"),
        ("A15", "check"), ("B15", '=IF(B10>0;"OK";"check")'),
    ]
    for ref, value in rows:
        cell = sheet.getCellRangeByName(ref)
        if isinstance(value, float):
            cell.setValue(value)
        elif value.startswith("="):
            cell.setFormula(value)
        else:
            cell.setString(value)
    office.save_xlsx(doc, path)
    doc.close(True)


def main() -> int:
    templates = sorted((ROOT / "templates").glob("*.xlsx"))
    if not templates:
        print("no templates in templates/", file=sys.stderr)
        return 2
    OUT.mkdir(parents=True, exist_ok=True)
    sources = OUT / "templates"
    if sources.exists():
        shutil.rmtree(sources)
    sources.mkdir()
    for template in templates:
        shutil.copyfile(template, sources / template.name)
    templates = sorted(sources.glob("*.xlsx"))
    manifest = {"libreoffice": _version(), "books": {}}
    with Office() as office:
        for template in templates:
            target = OUT / f"saved-{template.stem}.xlsx"
            doc = office.load(template)
            office.save_xlsx(doc, target)
            doc.close(True)
            manifest["books"][target.name] = {"kind": "saved unedited",
                                              "template": template.name,
                                              "template_sha256": _sha256(template)}
            print(f"wrote {target.relative_to(ROOT)}")
        template = sources / f"{EDITED_TEMPLATE}.xlsx"
        target = OUT / "edited-no-recalc.xlsx"
        doc = office.load(template)
        doc.enableAutomaticCalculation(False)
        cell = _named_cell(doc, EDIT_NAME)
        old = cell.getValue()
        cell.setValue(EDIT_VALUE)
        office.save_xlsx(doc, target)
        doc.close(True)
        manifest["books"][target.name] = {
            "kind": "edited, saved without recalculation", "template": template.name,
            "template_sha256": _sha256(template), "edit": {"name": EDIT_NAME, "from": old,
                                                          "to": EDIT_VALUE}}
        print(f"wrote {target.relative_to(ROOT)}")
        target = OUT / "typed.xlsx"
        _typed(office, target)
        manifest["books"][target.name] = {"kind": "typed in LibreOffice through its API"}
        print(f"wrote {target.relative_to(ROOT)}")
    (OUT / "manifest.json").write_text(json.dumps(manifest, indent=1) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
