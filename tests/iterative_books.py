"""Workbooks with circular loops, for the iteration tests (headless and against LibreOffice)."""

from __future__ import annotations

import re
import shutil
import zipfile
from pathlib import Path

import xlsxwriter


def set_iteration(path: Path, count: int | None, delta: float = 0.001) -> None:
    """Rewrite the file's calcPr: iterative calculation on with ``count`` and ``delta`` (as
    Excel saves it: ``<calcPr iterate="1" iterateCount=".." iterateDelta=".."/>``), or off
    when ``count`` is None."""
    temporary = path.with_suffix(".tmp")
    with zipfile.ZipFile(path) as source, zipfile.ZipFile(temporary, "w",
                                                         zipfile.ZIP_DEFLATED) as target:
        for item in source.infolist():
            data = source.read(item.filename)
            if item.filename == "xl/workbook.xml":
                text = re.sub(r"<calcPr\b[^>]*/>", "", data.decode("utf-8"))
                calc = '<calcPr calcId="191029"/>' if count is None else (
                    f'<calcPr calcId="191029" iterate="1" iterateCount="{count}" '
                    f'iterateDelta="{delta!r}"/>')
                text = text.replace("</workbook>", calc + "</workbook>") \
                    if "<definedNames" not in text else text.replace("</definedNames>",
                                                                     "</definedNames>" + calc)
                data = text.encode("utf-8")
            target.writestr(item, data)
    shutil.move(temporary, path)


def simple_loop(path: Path, count: int | None, delta: float, stored=(0.0, 0.0)) -> Path:
    """A1 = 1 + A2/2, A2 = A1/2 (fixed point A1 = 4/3) and B1 = 10*A1 downstream."""
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("S")
    ws.write_formula("A1", "=1+A2/2", None, stored[0])
    ws.write_formula("A2", "=A1/2", None, stored[1])
    ws.write_formula("B1", "=A1*10", None, stored[0] * 10)
    wb.close()
    set_iteration(path, count, delta)
    return path


# The hand-built sheet of the trade: a vertical plate of height H dissipating Q in still air at
# Ta; the wall temperature is guessed, h is computed from it, and the wall temperature that
# follows from h closes the loop.
PLATE = {"Q": 40.0, "height": 0.3, "width": 0.25, "ta": 25.0, "eps": 0.9}


def plate_loop(path: Path, count: int | None = 100, delta: float = 1e-6,
               stored=(50.0, 5.0, 5.0, 0.0)) -> Path:
    """``stored``: the values the file holds for Tw, h conv, h rad (the loop's start) and the
    heat check."""
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Plate")
    for row, (label, value) in enumerate([("Q W", PLATE["Q"]), ("height m", PLATE["height"]),
                                          ("width m", PLATE["width"]), ("Ta C", PLATE["ta"]),
                                          ("emissivity", PLATE["eps"])], start=1):
        ws.write(f"A{row}", label)
        ws.write(f"B{row}", value)
    ws.write("A7", "Tw C")
    ws.write_formula("B7", "=B4+B1/((B8+B9)*B2*B3)", None, stored[0])
    ws.write("A8", "h conv")
    ws.write_formula("B8", "=H_VPLATE(B7,B4,B2)", None, stored[1])
    ws.write("A9", "h rad")
    ws.write_formula("B9", "=H_RAD(B7,B4,B5,1)", None, stored[2])
    ws.write("A10", "heat check W")
    ws.write_formula("B10", "=(B8+B9)*B2*B3*(B7-B4)", None, stored[3])
    wb.close()
    set_iteration(path, count, delta)
    return path
