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

import math
import re
from dataclasses import dataclass, field
from typing import Any, Sequence

import xlsxwriter
from xlsxwriter.utility import xl_rowcol_to_cell

from stillair.network import BOUNDARY_COLUMNS, BRANCH_COLUMNS, BRANCH_KINDS
from stillair.network.advection import AdvectionKind

from ..cells.registry import BY_NAME

from .pages import CHART_PX, GRIDS, PAGE, PAGE_CAPACITY, ROW_HEIGHT, row_height, starts_new_page, text_lines
from .spec import (BOUNDARY_FORMATS, BRANCH_FORMATS, CELL_STYLES, CHART_FONT_SIZE, FAILED, FIXED_DATE, INK,
                   MISSING, MISSING_NAME,
                   MARKER_NAME, RULE, SAND_EDGE, SCIENTIFIC, SIG3, SIGNOFF_FIELDS, SLATE, UNIT_FORMATS, Template,
                   TemplateBuildError, Valid, significant_format)

__all__ = ["TemplateBook", "limit_check", "source_of"]

# Columns of the row layout: where the label, value, unit and note of a row go.
_ROW_COLUMNS = {"Inputs": (0, 1, 2, 3), "Calculation": (1, 2, 3, 4), "Results": (0, 1, 2, 3)}

_NAME_RE = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")


@dataclass
class _SheetState:
    worksheet: Any
    widths: tuple[float, ...]
    row: int = 0
    step: int = 0
    lines: dict[int, float] = field(default_factory=dict)      # row -> lines of wrapped text
    breaks: list[int] = field(default_factory=list)            # manual page breaks (row before which)
    chart_run: bool = False                                     # the last block was a chart
    section_row: int = -1                                       # row of the last section bar


class TemplateBook:
    """Describe a template's sheets; :func:`build_template` writes and evaluates it."""

    SHEETS = ("Inputs", "Calculation", "Results", "Notes")

    def __init__(self, template: Template, path: str, values: dict[str, dict[str, object]] | None = None):
        """``values`` (sheet -> cell -> value, from a first evaluation) sets the decimals of the
        three-significant-figure cells."""
        self.template = template
        self.values = {sheet: dict(cells) for sheet, cells in (values or {}).items()}
        self.uses_sig3 = False
        self.workbook = xlsxwriter.Workbook(path)
        self.workbook.set_properties({"title": template.title, "subject": template.summary,
                                      "author": "stillair", "created": FIXED_DATE,
                                      "comments": f"stillair template {template.marker}"})
        self.workbook.set_custom_property(MARKER_NAME, template.marker)
        self.workbook.define_name(MARKER_NAME, f'="{template.marker}"')
        self.names: dict[str, str] = {}
        self.unverified_constants: list[str] = []
        self.required: list[str] = []       # every input cell ("B16"): a blank one is missing
        self._format_cache: dict[tuple, Any] = {}
        self.sheets: dict[str, _SheetState] = {}
        for name in self.SHEETS:
            self._add_sheet(name)
        self._signoff()

    # ---------------------------------------------------------------- formats and layout

    def fmt(self, style: str, num_format: str | None = None, at: tuple[Any, int, int] | None = None):
        """The workbook format of a named style, with a number format when given.

        ``at`` = (worksheet, row, col) of the cell, needed for SIG3."""
        if num_format == SIG3:
            self.uses_sig3 = True
            value = self.values.get(at[0].name, {}).get(xl_rowcol_to_cell(at[1], at[2])) if at else None
            num_format = significant_format(value)
        key = (style, num_format)
        if key not in self._format_cache:
            props = dict(CELL_STYLES[style])
            if num_format is not None:
                props["num_format"] = num_format
            self._format_cache[key] = self.workbook.add_format(props)
        return self._format_cache[key]

    def _add_sheet(self, name: str) -> _SheetState:
        worksheet = self.workbook.add_worksheet(name)
        worksheet.hide_gridlines(2)
        # Checkers print these: A4 landscape, one page wide, a footer naming file, sheet and page.
        worksheet.set_paper(9)
        worksheet.set_landscape()
        worksheet.fit_to_pages(1, 0)
        worksheet.set_default_row(ROW_HEIGHT)
        worksheet.set_margins(left=PAGE["side"], right=PAGE["side"], top=PAGE["top"], bottom=PAGE["bottom"])
        title = self.template.title.replace("&", "&&")
        worksheet.set_header(f"&L{title}&R{self.template.name} version {self.template.version}",
                             {"margin": PAGE["header"]})
        worksheet.set_footer("&L&F - &A&CPage &P of &N&RPrinted &D", {"margin": PAGE["footer"]})
        widths = GRIDS[name]
        for index, width in enumerate(widths):
            worksheet.set_column(index, index, width)
        state = _SheetState(worksheet, widths)
        self.sheets[name] = state
        worksheet.write(0, 0, f"{self.template.title} - {name}", self.fmt("title"))
        state.lines[0] = 1.4
        self._write_wrapped(state, 1, 0, len(widths) - 1, self.template.summary, "subtitle")
        state.row = 2
        return state

    def sheet(self, name: str) -> _SheetState:
        """A sheet by name; the extra sheet "Tables" is added (after Notes) on first use."""
        if name not in self.sheets:
            if name not in GRIDS:
                raise TemplateBuildError(f"{self.template.name}: no sheet layout named {name!r}")
            self._add_sheet(name)
        return self.sheets[name]

    def _write_wrapped(self, state: _SheetState, row: int, first_col: int, last_col: int, text: str,
                       style: str) -> None:
        """Text over one cell or merged cells, its row made tall enough for the wrapped lines."""
        if last_col > first_col:
            state.worksheet.merge_range(row, first_col, row, last_col, text, self.fmt(style))
        else:
            state.worksheet.write(row, first_col, text, self.fmt(style))
        self._need_lines(state, row, text, sum(state.widths[first_col:last_col + 1]))

    @staticmethod
    def _need_lines(state: _SheetState, row: int, text: str, width: float) -> None:
        state.lines[row] = max(state.lines.get(row, 1), text_lines(text, width))

    # ---------------------------------------------------------------- sign-off

    def _signoff(self) -> None:
        """The block a checker fills in and signs, first on the first printed page."""
        state = self.sheets["Inputs"]
        self.section("Inputs", "Sign-off (fill in before issue)")
        for label in SIGNOFF_FIELDS:
            state.worksheet.write(state.row, 0, label, self.fmt("label"))
            state.worksheet.merge_range(state.row, 1, state.row, 3, "", self.fmt("signoff"))
            state.row += 1
        state.worksheet.write(state.row, 0, "stillair version used", self.fmt("label"))
        state.worksheet.write_formula(state.row, 1, "=STILLAIR_VERSION()", self.fmt("text_value"))
        state.worksheet.write(state.row, 3, "recalculated by the add-in; the audit reports a change",
                              self.fmt("note"))
        state.row += 1
        state.worksheet.write(state.row, 0, "Template and its version", self.fmt("label"))
        state.worksheet.merge_range(state.row, 1, state.row, 3,
                                    f"{self.template.name} version {self.template.version}",
                                    self.fmt("text_value"))
        state.row += 1

    # ---------------------------------------------------------------- names

    def _define(self, name: str, sheet: str, row: int, col: int, last_row: int | None = None,
                last_col: int | None = None) -> str:
        if not _NAME_RE.match(name) or re.match(r"^[A-Za-z]{1,3}\d+$", name):
            raise TemplateBuildError(f"{self.template.name}: {name!r} is not a usable defined name")
        if name.lower() in (n.lower() for n in self.names):
            raise TemplateBuildError(f"{self.template.name}: name {name!r} defined twice")
        if name.upper() in BY_NAME:
            # LibreOffice reads NAME( as the defined name followed by a bracket (Err:509)
            raise TemplateBuildError(f"{self.template.name}: name {name!r} is the cell function {name.upper()}")
        ref = xl_rowcol_to_cell(row, col, row_abs=True, col_abs=True)
        if last_row is not None:
            ref += ":" + xl_rowcol_to_cell(last_row, last_col, row_abs=True, col_abs=True)
        address = f"{sheet}!{ref}"
        self.workbook.define_name(name, f"={address}")
        self.names[name] = address
        return name

    def name_range(self, name: str, sheet: str, first_row: int, first_col: int, last_row: int | None = None,
                   last_col: int | None = None) -> str:
        """A workbook-scoped name for a cell or a block (0-based rows and columns)."""
        return self._define(name, sheet, first_row, first_col, last_row, last_col)

    # ---------------------------------------------------------------- rows

    def section(self, sheet: str, title: str) -> None:
        """A heading bar starting a group of rows."""
        state = self.sheet(sheet)
        state.row += 1
        state.chart_run = False
        width = len(state.widths)
        for col in range(width):
            state.worksheet.write_blank(state.row, col, None, self.fmt("section"))
        state.worksheet.write(state.row, 0, title, self.fmt("section"))
        state.section_row = state.row
        state.row += 1

    def _row(self, sheet: str, row: int, label: str, unit: str, note: str) -> tuple[int, int]:
        state = self.sheets[sheet]
        label_col, value_col, unit_col, note_col = _ROW_COLUMNS[sheet]
        ws = state.worksheet
        ws.write(row, label_col, label, self.fmt("label"))
        self._need_lines(state, row, label, state.widths[label_col])
        if unit.startswith("="):      # a unit that follows an input (W/m for a pipe, W/m² for a face)
            ws.write_formula(row, unit_col, unit, self.fmt("unit"))
        elif unit:
            ws.write_string(row, unit_col, unit, self.fmt("unit"))
        if note:
            ws.write(row, note_col, note, self.fmt("note"))
            self._need_lines(state, row, note, state.widths[note_col])
        return value_col, note_col

    def input(self, name: str, label: str, value, unit: str = "", note: str = "",
              choices: Sequence[str] | None = None, valid: Valid | None = None) -> str:
        """An input cell with its defined name and its data validation.

        A numeric input needs ``valid`` (its range and why); ``choices`` gives a drop-down list."""
        state = self.sheets["Inputs"]
        ws, row = state.worksheet, state.row
        value_col, _ = self._row("Inputs", row, label, unit, note)
        cell = xl_rowcol_to_cell(row, value_col)
        if isinstance(value, str):
            ws.write_string(row, value_col, value, self.fmt("input_text"))
        else:
            ws.write_number(row, value_col, value, self.fmt("input"))
        if choices:
            listed = ", ".join(choices)
            ws.data_validation(row, value_col, row, value_col, {
                "validate": "list", "source": list(choices),
                "input_title": _clip(label, 32), "input_message": _clip(f"Choose one of: {listed}.", 255),
                "error_title": "Not one of the choices",
                "error_message": _clip(f"{label}: choose one of {listed}.", 255)})
        elif isinstance(value, str):
            raise TemplateBuildError(f"{self.template.name}: text input {name!r} needs its choices")
        else:
            if valid is None:
                raise TemplateBuildError(f"{self.template.name}: numeric input {name!r} needs a Valid range")
            if not valid.admits(value):
                raise TemplateBuildError(f"{self.template.name}: default {value} of {name!r} is outside "
                                         f"{valid.describe(unit)}")
            allowed = valid.describe(unit)
            unit_text = unit if unit and unit != "-" else "none (a pure number)"
            ws.data_validation(row, value_col, row, value_col, {
                **valid.options(cell), "ignore_blank": False,
                "input_title": _clip(label, 32),
                "input_message": _clip(f"Unit: {unit_text}. Allowed: {allowed}.", 255),
                "error_title": "Value outside the allowed range",
                "error_message": _clip(f"{label} must be {allowed}. Why: {valid.why}.", 255)})
        state.row += 1
        self.required.append(cell)
        return self._define(name, "Inputs", row, value_col)

    def step(self, name: str | None, label: str, formula: str, unit: str = "", note: str = "",
             number_format: str | None = None) -> str | None:
        """One labelled calculation step; its value cell gets ``name`` when given.

        The number format follows the unit (``UNIT_FORMATS``) unless given; no unit means text."""
        state = self.sheets["Calculation"]
        ws, row = state.worksheet, state.row
        state.step += 1
        state.chart_run = False
        ws.write_number(row, 0, state.step, self.fmt("step"))
        value_col, _ = self._row("Calculation", row, label, unit, note)
        number_format = self._number_format(name or label, unit, number_format)
        if number_format is not None:
            ws.write_formula(row, value_col, formula, self.fmt("value", number_format, (ws, row, value_col)))
        elif note:
            # text beside a note wraps in its cell; reserve two lines
            ws.write_formula(row, value_col, formula, self.fmt("text_value"))
            self._need_lines(state, row, "x" * 20, state.widths[value_col])
        else:
            # text with empty cells to its right runs on over them, as a checker reads it
            ws.write_formula(row, value_col, formula, self.fmt("text_run"))
        state.row += 1
        return self._define(name, "Calculation", row, value_col) if name else None

    def result(self, name: str | None, label: str, formula: str, unit: str = "", note: str = "",
               text: bool = False, fails: Sequence[str] = (), number_format: str | None = None) -> str | None:
        """A key result on the Results sheet.

        ``text=True`` for checks and notes: the value spans the unit and note columns and the note
        joins the label.  ``fails`` lists how failing verdicts begin ("EXCEEDS LIMIT"): those,
        and a failed calculation, print white on ink."""
        state = self.sheets["Results"]
        ws, row = state.worksheet, state.row
        state.chart_run = False
        label_col, value_col, unit_col, note_col = _ROW_COLUMNS["Results"]
        formula = guarded(formula)
        if text:
            full = f"{label} ({note})" if note else label
            self._row("Results", row, full, "", "")
            ws.merge_range(row, value_col, row, note_col, "", self.fmt("result_text"))
            ws.write_formula(row, value_col, formula, self.fmt("result_text"))
            self._need_lines(state, row, "x" * 110, sum(state.widths[value_col:note_col + 1]))
        else:
            self._row("Results", row, label, unit, note)
            number_format = self._number_format(name or label, unit, number_format)
            ws.write_formula(row, value_col, formula, self.fmt("result", number_format, (ws, row, value_col)))
        self._verdict_format(ws, row, value_col, row, value_col, fails, numeric=not text)
        state.row += 1
        return self._define(name, "Results", row, value_col) if name else None

    def _verdict_format(self, ws, first_row, col, last_row, last_col, fails: Sequence[str], numeric: bool):
        """Conditional formats: a failing verdict or a failed calculation prints white on ink."""
        failed = self.fmt("failed")
        cell = xl_rowcol_to_cell(first_row, col)
        tests = [f'LEFT({cell},{len(text)})="{text}"' for text in (FAILED, MISSING, *fails)]
        # a number expected and text or an error value came back: the engine reported a failure
        if numeric:
            tests.append(f"NOT(ISNUMBER({cell}))")
        else:
            tests.append(f"ISERROR({cell})")
        ws.conditional_format(first_row, col, last_row, last_col,
                              {"type": "formula", "criteria": "=OR(" + ",".join(tests) + ")",
                               "format": failed, "stop_if_true": True})

    def verdicts(self, sheet: str, first_row: int, col: int, last_row: int, fails: Sequence[str]) -> None:
        """Verdict formatting for a column of a table (e.g. "meets limit": "no")."""
        self._verdict_format(self.sheets[sheet].worksheet, first_row, col, last_row, col, fails, numeric=False)

    def _number_format(self, what: str, unit: str, number_format: str | None) -> str | None:
        if number_format is not None:
            return number_format
        if not unit:
            return None
        if unit.startswith("="):
            raise TemplateBuildError(f"{self.template.name}: {what!r}: a unit given by a formula needs "
                                     "number_format")
        if unit not in UNIT_FORMATS:
            raise TemplateBuildError(f"{self.template.name}: {what!r}: no number format for the unit {unit!r}; "
                                     "give number_format")
        return UNIT_FORMATS[unit]

    def paragraph(self, text: str, caution: bool = False) -> None:
        """A paragraph on the Notes sheet; ``caution`` highlights it."""
        state = self.sheets["Notes"]
        self._write_wrapped(state, state.row, 0, 0, text, "caution" if caution else "paragraph")
        state.row += 1

    def unverified(self, constant: str) -> str:
        """Record a constant whose source no one on the project could read (a standard's value
        recalled, an equation number); the Notes sheet lists every one as unverified, and the
        text returned ("unverified: see Notes") is all that is printed beside the result, so a
        checker signs nothing that rests on memory alone without being told."""
        if constant not in self.unverified_constants:
            self.unverified_constants.append(constant)
        return "unverified: see Notes"

    def _unverified_paragraph(self) -> None:
        if self.unverified_constants:
            self.paragraph("UNVERIFIED CONSTANTS. The following are stated as recalled by the template's "
                           "authors; no source they could read confirmed them. Check each against the cited "
                           "document before signing: " + "; ".join(self.unverified_constants) + ".",
                           caution=True)

    def spread_note(self, what: str) -> None:
        """The Notes paragraph saying what the correlation spread beside a key result means."""
        self.paragraph(f"Correlation spread ({what}): the same calculation with every convection "
                       "coefficient at the lowest and at the highest Nusselt number among the published "
                       "correlations whose validity ranges cover the case (NET_BAND for a network, NU_SPREAD "
                       "for one coefficient). It shows how much the literature disagrees about this case; "
                       "it is not a confidence interval and not a bound on the error of any correlation, and "
                       "a temperature that depends on the ratio of two convection coefficients can lie "
                       "outside it. "
                       "A wide spread is a reason for margin or for a measurement.")

    def cite(self, label: str, geometry: str, method: str) -> None:
        """A Notes paragraph "label: source" for a registered correlation the template uses."""
        self.paragraph(f"{label}: {source_of(geometry, method)}")

    def caution(self, sheet: str, text: str) -> None:
        """A caution across a sheet's width (Notes carries the full caution as a paragraph)."""
        state = self.sheets[sheet]
        state.chart_run = False
        self._write_wrapped(state, state.row, 0, len(state.widths) - 1, text, "caution")
        state.row += 1

    def blank(self, sheet: str, rows: int = 1) -> None:
        self.sheet(sheet).row += rows

    # ---------------------------------------------------------------- blocks

    def table(self, sheet: str, header: Sequence[str], rows: Sequence[Sequence[Any]], name: str | None = None,
              col: int = 0, formats: Sequence[str | None] | None = None) -> tuple[int, int, int, int]:
        """A block of cells: numbers, text, None (blank) or formulas (strings starting "=").

        ``formats`` gives each column's number format (None: a text column); number columns get
        right-aligned headings.  Returns (first_row, first_col, last_row, last_col) of the data
        rows; ``name`` names them (e.g. the branches range of a network).
        """
        state = self.sheet(sheet)
        state.chart_run = False
        ws = state.worksheet
        width = max([len(header)] + [len(r) for r in rows])
        formats = list(formats) if formats is not None else [None] * width
        if len(formats) != width:
            raise TemplateBuildError(f"{self.template.name}: table {header[:2]}: {width} columns, "
                                     f"{len(formats)} formats")
        for j, title in enumerate(header):
            ws.write(state.row, col + j, title, self.fmt("header" if formats[j] is None else "header_number"))
            self._need_lines(state, state.row, title, state.widths[col + j])
        header_row = state.row
        self._keep_together(state, header_row, header_row + len(rows))
        state.row += 1
        first = state.row
        for row in rows:
            for j, value in enumerate(row):
                self._write_any(ws, state.row, col + j, value, formats[j])
            state.row += 1
        last = state.row - 1
        if name:
            self._define(name, sheet, first, col, last, col + width - 1)
        return first, col, last, col + width - 1

    def input_table(self, sheet: str, header: Sequence[str], rows: Sequence[Sequence[Any]], count: int, name: str,
                    formats: Sequence[str | None], col: int = 0, lines: float = 1,
                    validations: dict[int, dict] | None = None) -> tuple[int, int]:
        """A table the user fills in: ``count`` rows of unlocked input cells under ``header``, the
        first filled from ``rows`` (None: blank), the rest blank; the data rows named ``name``.

        ``formats`` marks the number columns (None: text); ``lines`` is each row's height in lines;
        ``validations`` maps a column to its XlsxWriter data-validation options (blanks allowed),
        a custom rule written with {cell} and {left} (the row's cell and the one on its left) for
        the first row.  Returns the first and last data row."""
        state = self.sheet(sheet)
        state.chart_run = False
        ws = state.worksheet
        for j, title in enumerate(header):
            ws.write(state.row, col + j, title, self.fmt("header" if formats[j] is None else "header_number"))
            self._need_lines(state, state.row, title, state.widths[col + j])
        state.row += 1
        first = state.row
        for i in range(count):
            row = rows[i] if i < len(rows) else [None] * len(header)
            for j, value in enumerate(row):
                if isinstance(value, str):
                    ws.write_string(state.row, col + j, value, self.fmt("input_text"))
                elif value is None:
                    ws.write_blank(state.row, col + j, None, self.fmt("input" if formats[j] else "input_text"))
                else:
                    ws.write_number(state.row, col + j, value, self.fmt("input"))
            if lines > 1:
                state.lines[state.row] = lines
            state.row += 1
        last = state.row - 1
        for j, options in (validations or {}).items():
            if options.get("validate") == "custom":
                options = {**options, "value": options["value"].format(
                    cell=xl_rowcol_to_cell(first, col + j), left=xl_rowcol_to_cell(first, col + j - 1))}
            ws.data_validation(first, col + j, last, col + j, {"ignore_blank": True, **options})
        self._define(name, sheet, first, col, last, col + len(header) - 1)
        return first, last

    def _keep_together(self, state: _SheetState, first: int, last: int) -> None:
        """Start a new page before a table (with its section bar) that would otherwise split."""
        if state.section_row == first - 1:
            first -= 1
        if starts_new_page(state.lines, state.breaks, first, last):
            state.breaks.append(first)

    def chart(self, sheet: str, kind: str, title: str, series: Sequence[dict], x_title: str, y_title: str,
              subtype: str | None = None, x_axis: dict | None = None, y_axis: dict | None = None,
              height: int = CHART_PX[1], with_previous: bool = False) -> None:
        """An XlsxWriter chart placed below the sheet's rows, never beside or over another block.

        A run of charts starts on a new printed page and each chart reserves the rows it covers,
        so charts neither overlap nor split across pages.  Each series dict holds name,
        categories and values references; a series that names no colour is drawn in the next of
        the palette's colours (``SERIES_COLOURS``), never the viewer's own.  The axes cross at
        their lowest values and carry their tick labels there, outside the plot, wherever zero
        lies; ``x_axis`` / ``y_axis`` add or override XlsxWriter axis options.  ``height`` (px)
        sets its size; ``with_previous`` prints a chart on one page with the section just above it
        (the table it draws): the page starts at that section's bar instead of at the chart."""
        state = self.sheet(sheet)
        options = {"type": kind}
        if subtype:
            options["subtype"] = subtype
        chart = self.workbook.add_chart(options)
        for k, entry in enumerate(series):
            chart.add_series(_in_palette(entry, SERIES_COLOURS[k % len(SERIES_COLOURS)]))
        font = {"size": CHART_FONT_SIZE, "color": INK}
        edge = {"crossing": "min", "label_position": "low"}
        chart.set_title({"name": title, "name_font": {"size": 11, "color": SLATE, "bold": True}})
        chart.set_x_axis({"name": x_title, "name_font": font, "num_font": font, **edge, **(x_axis or {})})
        chart.set_y_axis({"name": y_title, "name_font": font, "num_font": font, **edge,
                          "major_gridlines": {"visible": True, "line": {"color": RULE}}, **(y_axis or {})})
        chart.set_legend({"position": "bottom", "font": font})
        chart.set_size({"width": CHART_PX[0], "height": height})
        rows = math.ceil(height / (ROW_HEIGHT * 4 / 3)) + 1
        if not state.chart_run:
            state.row += 1
            first = state.section_row if with_previous else state.row
            height_pt = sum(row_height(state.lines, r) for r in range(first, state.row)) + rows * ROW_HEIGHT
            if height_pt > PAGE_CAPACITY:
                raise TemplateBuildError(f"{self.template.name}: chart {title!r} and the section above it "
                                         f"take {height_pt:.0f} pt, more than a page ({PAGE_CAPACITY:.0f} pt)")
            state.breaks.append(first)
        state.worksheet.insert_chart(state.row, 0, chart, {"x_offset": 4, "y_offset": 4, "object_position": 1})
        state.row += rows
        state.chart_run = True

    def branch_table(self, sheet: str, rows: Sequence[Sequence[Any]], name: str) -> tuple[int, int, int, int]:
        """A network's branch table under the engine's column headings, named ``name``."""
        return self.table(sheet, BRANCH_COLUMNS, rows, name=name, formats=BRANCH_FORMATS)

    def boundary_table(self, sheet: str, rows: Sequence[Sequence[Any]], name: str) -> tuple[int, int, int, int]:
        """A network's boundary table under the engine's column headings, named ``name``."""
        return self.table(sheet, BOUNDARY_COLUMNS, rows, name=name, formats=BOUNDARY_FORMATS)

    def network_solution(self, sheet: str, tables: str, fluid: str,
                         branches: Sequence[Sequence[Any]]) -> dict[str, str]:
        """The solved network as tables of single-cell formulas, one per entry.

        NET_SOLVE's table is an array formula, which some viewers recalculate on opening (and
        show an error without the add-in); one NET_TEMP / NET_HEAT / INDEX(NET_SOLVE(...)) cell
        per entry keeps the engine's cached value in every viewer.  ``tables`` is
        "branches, boundaries", ``fluid`` the gas and pressure arguments ("" for the defaults),
        ``branches`` the rows of the branch table (names and nodes as text).  Returns formulas by
        key: "method:<branch>" picks a branch's correlation, "h:<branch>" its coefficient."""
        tail = f", {fluid}" if fluid else ""
        solve = f"NET_SOLVE({tables}{tail})"
        # NET_SOLVE lists the nodes in order of first appearance in the branch table, then the branches
        nodes = list(dict.fromkeys(node for row in branches for node in (row[1], row[2])))
        self.table(sheet, ["node", "T °C"],
                   [[node, f'=NET_TEMP({tables}, "{node}"{tail})'] for node in nodes], formats=[None, "0.0"])
        self.blank(sheet)
        rows, picks = [], {}
        for i, (branch, kind) in enumerate(((row[0], row[3]) for row in branches), start=1):
            at = 1 + len(nodes) + i          # row of the branch in NET_SOLVE's table (header first)
            # Ra and Nu where a correlation gives h; no h for a resistance or an airflow branch
            correlated = BRANCH_KINDS[kind].has_correlation
            has_h = kind != "resistance" and not isinstance(BRANCH_KINDS[kind], AdvectionKind)

            def pick(col, applies=True):
                return f"=INDEX({solve}, {at}, {col})" if applies else None
            picks[f"method:{branch}"] = f"INDEX({solve}, {at}, 9)"
            picks[f"h:{branch}"] = f"INDEX({solve}, {at}, 5)"
            rows.append([branch, kind, f'=NET_HEAT({tables}, "{branch}"{tail})', pick(5, has_h),
                         pick(6), pick(7, correlated), pick(8, correlated), pick(9)])
        self.table(sheet, ["branch", "kind", "heat flow W", "h W/(m²·K)", "R K/W", "Ra", "Nu", "method"], rows,
                   formats=[None, None, "0.0", SIG3, SCIENTIFIC, "0.00E+00", SIG3, None])
        return picks

    def _write_any(self, ws, row: int, col: int, value, number_format: str | None) -> None:
        style = "cell"
        if value is None:
            return
        if isinstance(value, str) and value.startswith("="):
            if ws.name == "Results":      # what the checker reads: never computed from a blank
                value = guarded(value)
            ws.write_formula(row, col, value, self.fmt(style, number_format, (ws, row, col)))
        elif isinstance(value, str):
            ws.write_string(row, col, value, self.fmt(style))
        else:
            self.values.setdefault(ws.name, {}).setdefault(xl_rowcol_to_cell(row, col), value)
            ws.write_number(row, col, value, self.fmt(style, number_format, (ws, row, col)))

    @staticmethod
    def column(sheet: str, first: int, last: int, col: int) -> str:
        """An absolute reference "Sheet!$B$4:$B$9" to part of one column (chart series, sums)."""
        return (f"{sheet}!{xl_rowcol_to_cell(first, col, row_abs=True, col_abs=True)}:"
                f"{xl_rowcol_to_cell(last, col, row_abs=True, col_abs=True)}")

    def cell(self, sheet: str, row: int, col: int) -> str:
        """An absolute reference "Sheet!$B$4" for use in formulas and charts."""
        return f"{sheet}!{xl_rowcol_to_cell(row, col, row_abs=True, col_abs=True)}"

    def _missing_count(self) -> None:
        """The row under the inputs counting those left blank (the name ``inputs_missing``):
        every key result reads it and shows INPUT MISSING instead of computing with 0, as
        Excel, LibreOffice and stillair calc all would."""
        state = self.sheets["Inputs"]
        row = state.row
        value_col, _ = self._row("Inputs", row, "Required inputs left blank (must be 0)", "", "")
        count = "+".join(f"COUNTBLANK({cell})" for cell in self.required) or "0"
        state.worksheet.write_formula(row, value_col, f"={count}", self.fmt("value", "0"))
        state.row += 1
        self._define(MISSING_NAME, "Inputs", row, value_col)

    def close(self) -> None:
        self._unverified_paragraph()
        self._missing_count()
        for state in self.sheets.values():
            ws = state.worksheet
            for row, lines in sorted(state.lines.items()):
                if lines > 1:
                    ws.set_row(row, round(ROW_HEIGHT * lines, 2))
            if state.breaks:
                ws.set_h_pagebreaks(sorted(set(state.breaks)))
            ws.print_area(0, 0, max(state.row, 1) - 1, len(state.widths) - 1)
            # without a password: a user can unprotect deliberately; input cells stay unlocked
            ws.protect("", {"format_columns": True, "format_rows": True})
        self.sheets["Inputs"].worksheet.activate()
        self.workbook.close()


# The colours of chart series that name none, in order.
SERIES_COLOURS = (INK, SAND_EDGE, SLATE)   # neighbours that differ in grey too


def _in_palette(entry: dict, colour: str) -> dict:
    """A chart series with its line and markers in ``colour`` where the builder gave no colour."""
    entry = dict(entry)
    line = entry.get("line", {})
    if not line.get("none") and "color" not in line:
        entry["line"] = {**line, "color": colour}
    marker = entry.get("marker")
    if marker and marker.get("type") != "none":
        marker = dict(marker)
        if "fill" not in marker:
            marker["fill"] = {"color": colour}
        if "border" not in marker:
            marker["border"] = {"color": colour}
        entry["marker"] = marker
    return entry


def guarded(formula: str) -> str:
    """A key result's formula that shows INPUT MISSING while a required input is blank."""
    body = formula[1:] if formula.startswith("=") else formula
    return f'=IF({MISSING_NAME}>0,"{MISSING}",{body})'


def limit_check(value: str, limit: str, within: str = "OK", beyond: str = "EXCEEDS LIMIT",
                failed: str = f'"{FAILED}"') -> str:
    """Formula text of the check "``value`` at most ``limit``": ``within`` or ``beyond``, and
    ``failed`` (a formula term; FAILED unless given) where ``value`` did not calculate."""
    return f'=IF(ISNUMBER({value}), IF({value}<={limit}, "{within}", "{beyond}"), {failed})'


def _clip(text: str, limit: int) -> str:
    return text if len(text) <= limit else text[:limit - 1] + "…"


def source_of(geometry: str, method: str) -> str:
    """The published source of a registered correlation, for a template's Notes sheet.

    The registry says "from memory" where a detail of a source (an equation number, a constant)
    was not read; on a sheet a checker signs it reads "unverified", the word the Notes sheet's
    list of unverified constants uses."""
    from stillair.correlations import CORRELATIONS

    return printed_source(CORRELATIONS[(geometry, method)].source)


def printed_source(source: str) -> str:
    """A source as a template prints it: the engine's "from memory" (a detail not read) reads
    "unverified", the word of the Notes sheet's list of unverified constants."""
    return source.replace("from memory of the number", "equation number unverified").replace(
        "from memory", "unverified")
