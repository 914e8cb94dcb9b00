"""Building calculation workbooks (templates) as reviewable code.

A template is a Python function that receives a :class:`TemplateBook` and describes its sheets
through the methods below; the book then writes the .xlsx with XlsxWriter, evaluates it headlessly
with the engine and stores the cached values, so the file shows correct numbers in any viewer
before Excel recalculates.

Sheets, always in this order:

* **Inputs** - one row per input: label | value | unit | note.  Input cells carry the input style
  and a workbook-scoped defined name (so formulas read ``=H_VPLATE(wall_t, ambient_t, height)``);
  choices get a drop-down list.
* **Calculation** - one labelled step per row: step | label | value (the formula) | unit | note.
  Each step has a defined name too, so later steps and results read like the hand calculation.
* **Results** - the key numbers, limit checks and validity notes.
* **Notes** - method, correlations with their sources, assumptions, cautions.

Extra blocks (network tables, sweep tables, charts) are placed with :meth:`TemplateBook.table`,
:meth:`TemplateBook.spill` and :meth:`TemplateBook.chart` on any of the sheets.

The marker: a workbook-scoped defined name ``stillair_template`` whose value is the text
"NAME VERSION", and the same text in the custom document property ``stillair_template``; the audit
recognises a filled-in template by it.
"""

from __future__ import annotations

import datetime as _dt
import os
import re
import tempfile
from dataclasses import dataclass, field
from importlib import import_module
from pathlib import Path
from typing import Any, Callable, Sequence

import xlsxwriter
from xlsxwriter.utility import xl_rowcol_to_cell

__all__ = ["TemplateBook", "Template", "TEMPLATE_DIR", "MARKER_NAME", "build_template", "TemplateBuildError",
           "is_error_value", "source_of"]

# The workbooks ship as the package stillair.templates (the top-level templates/ folder).
TEMPLATE_DIR = Path(import_module("stillair.templates").__file__).resolve().parent
MARKER_NAME = "stillair_template"
# A fixed creation date keeps rebuilt files identical apart from what changed in the code.
FIXED_DATE = _dt.datetime(2026, 1, 1, 0, 0, 0)

# Our own palette: warm sand input cells, slate headings, pale sage results.
_INK = "#23313F"
_SLATE = "#3E5C76"
_SAND = "#FBEFD5"
_SAND_EDGE = "#C98B2B"
_SAGE = "#E3EEDF"
_RULE = "#B8C4CE"
_CAUTION = "#F6DCD5"

# Columns of each sheet's row layout (label | value | unit | note, with a step number on Calculation).
_SHEET_WIDTHS = {"Inputs": 4, "Calculation": 5, "Results": 4, "Notes": 1}

_NAME_RE = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")


class TemplateBuildError(RuntimeError):
    """A template's code produced a workbook that does not evaluate cleanly."""


@dataclass(frozen=True)
class Template:
    """One shipped template: file name stem, version, one-line summary and its builder."""

    name: str
    version: int
    title: str
    summary: str
    build: Callable[["TemplateBook"], None]

    @property
    def marker(self) -> str:
        return f"{self.name} {self.version}"

    @property
    def path(self) -> Path:
        return TEMPLATE_DIR / f"{self.name}.xlsx"


@dataclass
class _SheetState:
    worksheet: Any
    row: int = 0
    step: int = 0


class TemplateBook:
    """Describe a template's sheets; :func:`build_template` writes and evaluates it."""

    SHEETS = ("Inputs", "Calculation", "Results", "Notes")

    def __init__(self, template: Template, path: str):
        self.template = template
        self.workbook = xlsxwriter.Workbook(path)
        self.workbook.set_properties({"title": template.title, "subject": template.summary,
                                      "author": "stillair", "created": FIXED_DATE,
                                      "comments": f"stillair template {template.marker}"})
        self.workbook.set_custom_property(MARKER_NAME, template.marker)
        self.workbook.define_name(MARKER_NAME, f'="{template.marker}"')
        self.names: dict[str, str] = {}
        self.formats = self._formats()
        self.sheets: dict[str, _SheetState] = {}
        for name in self.SHEETS:
            worksheet = self.workbook.add_worksheet(name)
            worksheet.hide_gridlines(2)
            # Checkers print these: A4 landscape, every column on the page width.
            worksheet.set_paper(9)
            worksheet.set_landscape()
            worksheet.fit_to_pages(1, 0)
            worksheet.set_footer(f"&L{template.title} - &A&R&P / &N")
            self.sheets[name] = _SheetState(worksheet)
        self._lay_out_columns()
        self._title_block()

    # ---------------------------------------------------------------- formats and layout

    def _formats(self) -> dict[str, Any]:
        add = self.workbook.add_format
        base = {"font_name": "Calibri", "font_size": 10, "font_color": _INK, "valign": "vcenter"}
        return {
            "title": add({**base, "bold": True, "font_size": 15, "font_color": _SLATE}),
            "subtitle": add({**base, "italic": True, "font_color": _SLATE}),
            "section": add({**base, "bold": True, "font_color": "#FFFFFF", "bg_color": _SLATE}),
            "label": add({**base}),
            "unit": add({**base, "font_color": _SLATE}),
            "note": add({**base, "italic": True, "font_color": "#5B6770", "text_wrap": False}),
            "input": add({**base, "bg_color": _SAND, "border": 1, "border_color": _SAND_EDGE, "bold": True,
                          "num_format": "General"}),
            "input_text": add({**base, "bg_color": _SAND, "border": 1, "border_color": _SAND_EDGE, "bold": True}),
            "value": add({**base, "num_format": "0.000", "bottom": 1, "bottom_color": _RULE}),
            "value_general": add({**base, "num_format": "General", "bottom": 1, "bottom_color": _RULE}),
            "text_value": add({**base, "bottom": 1, "bottom_color": _RULE}),
            "result": add({**base, "bold": True, "bg_color": _SAGE, "num_format": "0.000", "border": 1,
                           "border_color": _RULE}),
            "result_text": add({**base, "bold": True, "bg_color": _SAGE, "border": 1, "border_color": _RULE}),
            "step": add({**base, "font_color": _SLATE, "align": "center"}),
            "header": add({**base, "bold": True, "bottom": 2, "bottom_color": _SLATE}),
            "cell": add({**base, "num_format": "General"}),
            "table_value": add({**base, "num_format": "0.000"}),
            "paragraph": add({**base, "text_wrap": True, "valign": "top"}),
            "caution": add({**base, "text_wrap": True, "valign": "top", "bg_color": _CAUTION, "bold": True}),
        }

    def _lay_out_columns(self) -> None:
        widths = {"Inputs": [38, 16, 12, 60], "Calculation": [6, 44, 16, 12, 60],
                  "Results": [44, 16, 12, 70], "Notes": [110]}
        for sheet, columns in widths.items():
            for index, width in enumerate(columns):
                self.sheets[sheet].worksheet.set_column(index, index, width)

    def _title_block(self) -> None:
        for name, state in self.sheets.items():
            state.worksheet.write(0, 0, f"{self.template.title} - {name}", self.formats["title"])
            state.worksheet.write(1, 0, self.template.summary, self.formats["subtitle"])
            state.row = 3

    # ---------------------------------------------------------------- names

    def _define(self, name: str, sheet: str, row: int, col: int, last_row: int | None = None,
                last_col: int | None = None) -> str:
        if not _NAME_RE.match(name) or re.match(r"^[A-Za-z]{1,3}\d+$", name):
            raise TemplateBuildError(f"{self.template.name}: {name!r} is not a usable defined name")
        if name.lower() in (n.lower() for n in self.names):
            raise TemplateBuildError(f"{self.template.name}: name {name!r} defined twice")
        ref = xl_rowcol_to_cell(row, col, row_abs=True, col_abs=True)
        if last_row is not None:
            ref += ":" + xl_rowcol_to_cell(last_row, last_col, row_abs=True, col_abs=True)
        address = f"{sheet}!{ref}"
        self.workbook.define_name(name, f"={address}")
        self.names[name] = address
        return name

    # ---------------------------------------------------------------- rows

    def section(self, sheet: str, title: str) -> None:
        """A heading bar starting a group of rows."""
        state = self.sheets[sheet]
        state.row += 1
        width = _SHEET_WIDTHS[sheet]
        for col in range(width):
            state.worksheet.write_blank(state.row, col, None, self.formats["section"])
        state.worksheet.write(state.row, 0, title, self.formats["section"])
        state.row += 1

    def input(self, name: str, label: str, value, unit: str = "", note: str = "",
              choices: Sequence[str] | None = None) -> str:
        """An input cell with its defined name; ``choices`` gives it a drop-down list."""
        state = self.sheets["Inputs"]
        ws, row = state.worksheet, state.row
        ws.write(row, 0, label, self.formats["label"])
        if isinstance(value, str):
            ws.write_string(row, 1, value, self.formats["input_text"])
        else:
            ws.write_number(row, 1, value, self.formats["input"])
        ws.write(row, 2, unit, self.formats["unit"])
        if note:
            ws.write(row, 3, note, self.formats["note"])
        if choices:
            ws.data_validation(row, 1, row, 1, {"validate": "list", "source": list(choices),
                                                 "error_title": label[:32],
                                                 "error_message": ("Choose one of: " + ", ".join(choices))[:255]})
        state.row += 1
        return self._define(name, "Inputs", row, 1)

    def step(self, name: str | None, label: str, formula: str, unit: str = "", note: str = "",
             number_format: str | None = None) -> str | None:
        """One labelled calculation step; its value cell gets ``name`` when given."""
        state = self.sheets["Calculation"]
        ws, row = state.worksheet, state.row
        state.step += 1
        ws.write_number(row, 0, state.step, self.formats["step"])
        ws.write(row, 1, label, self.formats["label"])
        ws.write_formula(row, 2, formula, self._value_format(number_format))
        ws.write(row, 3, unit, self.formats["unit"])
        if note:
            ws.write(row, 4, note, self.formats["note"])
        state.row += 1
        return self._define(name, "Calculation", row, 2) if name else None

    def result(self, name: str | None, label: str, formula: str, unit: str = "", note: str = "",
               text: bool = False) -> str | None:
        """A key result on the Results sheet (text=True for checks and notes)."""
        state = self.sheets["Results"]
        ws, row = state.worksheet, state.row
        ws.write(row, 0, label, self.formats["label"])
        ws.write_formula(row, 1, formula, self.formats["result_text" if text else "result"])
        ws.write(row, 2, unit, self.formats["unit"])
        if note:
            ws.write(row, 3, note, self.formats["note"])
        state.row += 1
        return self._define(name, "Results", row, 1) if name else None

    def paragraph(self, text: str, caution: bool = False) -> None:
        """A paragraph on the Notes sheet; ``caution`` highlights it."""
        state = self.sheets["Notes"]
        lines = max(1, len(text) // 120 + 1)
        state.worksheet.set_row(state.row, 14 * lines)
        state.worksheet.write(state.row, 0, text, self.formats["caution" if caution else "paragraph"])
        state.row += 1

    def cite(self, label: str, geometry: str, method: str) -> None:
        """A Notes paragraph "label: source" for a registered correlation the template uses."""
        self.paragraph(f"{label}: {source_of(geometry, method)}")

    def caution(self, sheet: str, text: str) -> None:
        """A caution line on any sheet (and the Notes sheet gets it through :meth:`paragraph`)."""
        state = self.sheets[sheet]
        last_col = _SHEET_WIDTHS[sheet] - 1
        if last_col > 0:
            state.worksheet.merge_range(state.row, 0, state.row, last_col, text, self.formats["caution"])
        else:
            state.worksheet.write(state.row, 0, text, self.formats["caution"])
        state.worksheet.set_row(state.row, 14 * (len(text) // 110 + 1))
        state.row += 1

    def blank(self, sheet: str, rows: int = 1) -> None:
        self.sheets[sheet].row += rows

    # ---------------------------------------------------------------- blocks

    def table(self, sheet: str, header: Sequence[str], rows: Sequence[Sequence[Any]], name: str | None = None,
              col: int = 0, include_header_in_name: bool = False) -> tuple[int, int, int, int]:
        """A block of cells: numbers, text, None (blank) or formulas (strings starting "=").

        Returns (first_row, first_col, last_row, last_col) of the data rows; ``name`` names them
        (a workbook-scoped name for a whole table, e.g. the branches range of a network).
        """
        state = self.sheets[sheet]
        ws = state.worksheet
        for j, title in enumerate(header):
            ws.write(state.row, col + j, title, self.formats["header"])
        header_row = state.row
        state.row += 1
        first = state.row
        width = max([len(header)] + [len(r) for r in rows])
        for row in rows:
            for j, value in enumerate(row):
                self._write_any(ws, state.row, col + j, value)
            state.row += 1
        last = state.row - 1
        if name:
            start = header_row if include_header_in_name else first
            self._define(name, sheet, start, col, last, col + width - 1)
        return first, col, last, col + width - 1

    def spill(self, sheet: str, formula: str, rows: int, cols: int, name: str | None = None,
              col: int = 0, header: Sequence[str] | None = None) -> tuple[int, int, int, int]:
        """A formula returning a table (NET_SOLVE), stored as an array formula over its range."""
        state = self.sheets[sheet]
        ws = state.worksheet
        if header:
            for j, title in enumerate(header):
                ws.write(state.row, col + j, title, self.formats["header"])
            state.row += 1
        first = state.row
        ws.write_dynamic_array_formula(first, col, first + rows - 1, col + cols - 1, formula,
                                       self.formats["cell"])
        state.row += rows
        if name:
            self._define(name, sheet, first, col, first + rows - 1, col + cols - 1)
        return first, col, first + rows - 1, col + cols - 1

    def chart(self, sheet: str, kind: str, title: str, series: Sequence[dict], x_title: str, y_title: str,
              anchor: str, subtype: str | None = None, x_axis: dict | None = None,
              y_axis: dict | None = None) -> None:
        """An XlsxWriter chart; each series dict holds name, categories and values references.

        ``x_axis`` / ``y_axis`` add XlsxWriter axis options (e.g. ``{"log_base": 10}``)."""
        options = {"type": kind}
        if subtype:
            options["subtype"] = subtype
        chart = self.workbook.add_chart(options)
        for entry in series:
            chart.add_series(entry)
        chart.set_title({"name": title, "name_font": {"size": 11, "color": _SLATE}})
        chart.set_x_axis({"name": x_title, **(x_axis or {})})
        chart.set_y_axis({"name": y_title, "major_gridlines": {"visible": True, "line": {"color": _RULE}},
                          **(y_axis or {})})
        chart.set_legend({"position": "bottom"})
        self.sheets[sheet].worksheet.insert_chart(anchor, chart, {"x_scale": 1.3, "y_scale": 1.2})

    def _write_any(self, ws, row: int, col: int, value) -> None:
        if value is None:
            return
        if isinstance(value, str) and value.startswith("="):
            ws.write_formula(row, col, value, self.formats["table_value"])
        elif isinstance(value, str):
            ws.write_string(row, col, value, self.formats["cell"])
        else:
            ws.write_number(row, col, value, self.formats["cell"])

    def _value_format(self, number_format: str | None):
        if number_format is None:
            return self.formats["value"]
        key = f"value:{number_format}"
        if key not in self.formats:
            self.formats[key] = self.workbook.add_format({"font_name": "Calibri", "font_size": 10,
                                                          "font_color": _INK, "num_format": number_format,
                                                          "bottom": 1, "bottom_color": _RULE})
        return self.formats[key]

    @staticmethod
    def column(sheet: str, first: int, last: int, col: int) -> str:
        """An absolute reference "Sheet!$B$4:$B$9" to part of one column (chart series, sums)."""
        return (f"{sheet}!{xl_rowcol_to_cell(first, col, row_abs=True, col_abs=True)}:"
                f"{xl_rowcol_to_cell(last, col, row_abs=True, col_abs=True)}")

    def cell(self, sheet: str, row: int, col: int) -> str:
        """An absolute reference "Sheet!$B$4" for use in formulas and charts."""
        return f"{sheet}!{xl_rowcol_to_cell(row, col, row_abs=True, col_abs=True)}"

    def close(self) -> None:
        self.sheets["Inputs"].worksheet.activate()
        self.workbook.close()


def source_of(geometry: str, method: str) -> str:
    """The published source of a registered correlation, for a template's Notes sheet."""
    from stillair.correlations import CORRELATIONS

    return CORRELATIONS[(geometry, method)].source


def build_template(template: Template, out_path: str | os.PathLike | None = None) -> Path:
    """Write ``template`` to ``out_path`` (default: templates/NAME.xlsx) with cached values.

    The workbook is written to a temporary file, evaluated headlessly, and the copy with cached
    values is moved into place.  Any error value or failed evaluation aborts the build: a template
    that does not calculate cleanly is never written.
    """
    from .cachewriter import write_cached_values
    from .headless import evaluate_book

    out = Path(out_path) if out_path is not None else template.path
    out.parent.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory(prefix="stillair-template-") as directory:
        raw = os.path.join(directory, f"{template.name}.raw.xlsx")
        book = TemplateBook(template, raw)
        template.build(book)
        book.close()
        evaluation = evaluate_book(raw)
        errors = [(cell, result.value if result.status == "error" else result.messages[0])
                  for cell, result in evaluation.failed]
        if errors:
            shown = ", ".join(f"{cell} = {value}" for cell, value in errors[:8])
            raise TemplateBuildError(f"{template.name}: {len(errors)} cells evaluate to errors: {shown}")
        staged = os.path.join(directory, f"{template.name}.xlsx")
        write_cached_values(evaluation.book, staged, evaluation.values)
        os.replace(staged, out) if _same_device(staged, out) else _copy(staged, out)
    return out


def is_error_value(value) -> bool:
    """An Excel error (#VALUE!, ...) or one of our cell functions' error messages
    ("NET_TEMP: node must be ..."), which arrive as text."""
    from .registry import BY_NAME

    if not isinstance(value, str):
        return False
    if value.startswith("#"):
        return True
    match = _CELL_ERROR_RE.match(value)
    return bool(match) and match.group(1) in BY_NAME


_CELL_ERROR_RE = re.compile(r"^([A-Z][A-Z0-9_]*): ")


def _same_device(a: str, b: Path) -> bool:
    try:
        return os.stat(a).st_dev == os.stat(b.parent).st_dev
    except OSError:
        return False


def _copy(source: str, target: Path) -> None:
    import shutil

    shutil.copyfile(source, target)
