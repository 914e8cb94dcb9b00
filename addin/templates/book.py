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
import math
import os
import re
import tempfile
from dataclasses import dataclass, field
from importlib import import_module
from pathlib import Path
from typing import Any, Callable, Sequence

import xlsxwriter
from xlsxwriter.utility import xl_rowcol_to_cell

from stillair.network import BOUNDARY_COLUMNS, BRANCH_COLUMNS

__all__ = ["TemplateBook", "Template", "Valid", "TEMPLATE_DIR", "MARKER_NAME", "FAILED", "build_template",
           "TemplateBuildError", "limit_check",
           "is_error_value", "source_of"]

# The workbooks ship as the package stillair.templates (the top-level templates/ folder).
TEMPLATE_DIR = Path(import_module("stillair.templates").__file__).resolve().parent
MARKER_NAME = "stillair_template"
# A fixed creation date keeps rebuilt files identical apart from what changed in the code.
FIXED_DATE = _dt.datetime(2026, 1, 1, 0, 0, 0)

# Our own palette: warm sand input cells, slate headings, pale sage results; a failed check is
# printed white on ink, which stays the darkest thing on a grey-scale page.  Charts draw their
# series in INK, SLATE and SAND_EDGE too.
INK = "#23313F"
SLATE = "#3E5C76"
_SAND = "#FBEFD5"
SAND_EDGE = "#C98B2B"
_SAGE = "#E3EEDF"
_RULE = "#B8C4CE"
_CAUTION = "#F6DCD5"
_WHITE = "#FFFFFF"

FONT_SIZE = 10            # every cell's font; with the print scale kept >= 0.8 it prints >= 8 pt
CHART_FONT_SIZE = 10
MIN_PRINT_SCALE = 0.8

# The text a check shows when a quantity it needs did not calculate.
FAILED = "CALC FAILED"

# Column widths (characters) of each sheet's grid.  Inputs: label | value | unit | note;
# Calculation: step | label | value | unit | note; Results: label | value | unit | note;
# Notes: one wrapped column; Tables (network tables and sweeps): ten narrow columns.
# LibreOffice fits a sheet to the page width by its columns (a single wide column is clipped, not
# shrunk) and measures a character wider than Excel, so every grid stays within ~112 characters:
# that prints at full size on A4 landscape in both.
GRIDS = {
    "Inputs": (42, 14, 11, 45),
    "Calculation": (5, 40, 14, 11, 42),
    "Results": (42, 14, 11, 45),
    "Notes": (110,),
    "Tables": (14, 9, 9, 11, 9, 9, 9, 9, 18, 13),
}
# Columns of the row layout: where the label, value, unit and note of a row go.
_ROW_COLUMNS = {"Inputs": (0, 1, 2, 3), "Calculation": (1, 2, 3, 4), "Results": (0, 1, 2, 3)}

# A4 landscape, margins in inches (left/right, top/bottom, header/footer).
PAGE = {"width_in": 11.69, "height_in": 8.27, "side": 0.5, "top": 0.6, "bottom": 0.6, "header": 0.25,
        "footer": 0.25}
ROW_HEIGHT = 13.5         # points, one line of 10-pt text
# Height a printed page holds, points: A4 landscape less margins, header and footer, and a reserve
# for a viewer that prints slightly larger than 100 %.
PAGE_CAPACITY = 460.0
CHART_PX = (760, 280)     # width, height of every chart

# Number formats by quantity (the unit shown beside the value).  SIG3 marks three significant
# figures: the build evaluates the workbook once and writes each such cell with the fixed decimals
# its value needs (a conditional format such as [>=10]0.0;... loses the minus sign in some viewers).
SIG3 = "sig3"
SCIENTIFIC = "0.000E+00"
UNIT_FORMATS = {
    "°C": "0.0", "K": "0.0", "°": "0.0", "%": "0.0", "mm": "0.0",
    "W/(m²·K)": SIG3, "W/(m·K)": SIG3, "W/K": SIG3, "m²·K/W": SIG3, "K/W": SIG3, "-": SIG3,
    "W": "0.0", "W/m²": "0.0", "W/m": "0.0", "W/m or W/m²": "0.0",
    "m": "0.0000", "m²": "0.000", "m or m²": "0.000", "Pa": "0", "m/s": "0.00", "m/s²": "0.00000",
    "W/(m²·K⁴)": SCIENTIFIC, "m²/s": SCIENTIFIC, "1/K": SCIENTIFIC, "1/(K·m³)": SCIENTIFIC,
}

# The Stefan-Boltzmann constant as a Calculation step writes it, W/(m²·K⁴): CODATA 2018 to the
# digits the value is quoted with (scipy.constants.Stefan_Boltzmann, the engine's SIGMA).
SIGMA_TEXT = "5.670374419E-8"

# Network tables in the engine's columns: p1..p5 hold numbers (or a facing word), the rest text.
BRANCH_FORMATS = (None, None, None, None, SIG3, SIG3, SIG3, SIG3, SIG3, None)
BOUNDARY_FORMATS = (None, None, "0.0")

_NAME_RE = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")

# The sign-off block at the top of the Inputs sheet: the fields a checker fills in and signs.
SIGNOFF_FIELDS = ("Project", "Calculation number", "Subject", "Prepared by", "Checked by", "Date", "Revision")


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


@dataclass(frozen=True)
class Valid:
    """The accepted values of a numeric input and why; the input cell's data validation.

    Bounds are inclusive unless ``low_open`` / ``high_open`` (a gap must be above 0, not 0).
    ``extra`` adds conditions on other inputs to the cell's validation formula ("{cell}" stands
    for the cell, e.g. "{cell}=INT({cell})"), ``extra_words`` says them in the message; the
    build's own check of the default (:meth:`admits`) sees the bounds only."""

    low: float | None = None
    high: float | None = None
    why: str = ""
    low_open: bool = False
    high_open: bool = False
    extra: tuple[str, ...] = ()
    extra_words: str = ""

    def describe(self, unit: str) -> str:
        u = f" {unit}" if unit not in ("", "-") else ""
        low = None if self.low is None else f"{'above' if self.low_open else 'at least'} {_num(self.low)}{u}"
        high = None if self.high is None else f"{'below' if self.high_open else 'at most'} {_num(self.high)}{u}"
        if low and high and not self.low_open and not self.high_open:
            words = f"from {_num(self.low)} to {_num(self.high)}{u}"
        else:
            words = " and ".join(part for part in (low, high) if part)
        return words + (f", {self.extra_words}" if self.extra_words else "")

    def admits(self, value: float) -> bool:
        if self.low is not None and (value < self.low or (self.low_open and value == self.low)):
            return False
        return not (self.high is not None and (value > self.high or (self.high_open and value == self.high)))

    def options(self, cell: str) -> dict:
        """XlsxWriter data-validation options (without the messages)."""
        closed = not self.low_open and not self.high_open
        if self.low is not None and self.high is not None and closed and not self.extra:
            return {"validate": "decimal", "criteria": "between", "minimum": self.low, "maximum": self.high}
        if (self.low is not None and self.high is not None) or self.extra:
            tests = [f"ISNUMBER({cell})"]
            if self.low is not None:
                tests.append(f"{cell}{'>' if self.low_open else '>='}{_num(self.low)}")
            if self.high is not None:
                tests.append(f"{cell}{'<' if self.high_open else '<='}{_num(self.high)}")
            tests += [condition.format(cell=cell) for condition in self.extra]
            return {"validate": "custom", "value": f"=AND({','.join(tests)})"}
        if self.low is not None:
            return {"validate": "decimal", "criteria": ">" if self.low_open else ">=", "value": self.low}
        if self.high is not None:
            return {"validate": "decimal", "criteria": "<" if self.high_open else "<=", "value": self.high}
        raise TemplateBuildError("a Valid range needs a lower or an upper bound")


def _num(value: float) -> str:
    return f"{value:g}"


def gas_temperature(gas: str = "air", why: str = "") -> Valid:
    """Temperatures that set the properties of ``gas``: the range of the engine's gas tables."""
    from stillair.gases import GASES

    band = GASES[gas].t_range
    return Valid(band.low, band.high, why or f"the {gas} property tables cover {_num(band.low)} to "
                 f"{_num(band.high)} °C")


def gas_pressure() -> Valid:
    """Gas pressures the engine's property tables cover."""
    from stillair.gases import GAS_PRESSURE_RANGE as band

    return Valid(band.low, band.high, f"the gas property tables cover {_num(band.low)} to {_num(band.high)} Pa")


def altitude() -> Valid:
    """Altitudes of the standard atmosphere (ALTITUDE_PRESSURE)."""
    from stillair.atmosphere import ALTITUDE_RANGE as band

    return Valid(band.low, band.high, f"the standard atmosphere is defined from {_num(band.low)} to "
                 f"{_num(band.high)} m")


# Shared ranges of common inputs.
EMISSIVITY = Valid(0.0, 1.0, "an emissivity is a fraction of black-body emission, 0 to 1")
# one of two faces exchanging radiation: both above 0, or the exchange factor is undefined
FACE_PAIR_EMISSIVITY = Valid(0.01, 1.0, "an emissivity is at most 1, and at least 0.01 (the exchange factor "
                             "1/(1/e1 + 1/e2 - 1) needs both above 0)")
ABSOLUTE_ZERO = -273.15
SKY_TEMPERATURE = Valid(-100.0, 60.0, "an effective sky temperature lies from about -100 °C (clear, dry, cold "
                        "sky) up to the air temperature (common practice)")
OUTDOOR_AIR = Valid(-60.0, 60.0, "outdoor shade air temperatures lie between about -60 and +60 °C "
                    "(common practice)")
LIMIT_TEMPERATURE = Valid(ABSOLUTE_ZERO, 800.0, "a temperature is above absolute zero (-273.15 °C) and this "
                          "sheet's air tables end at 800 °C", low_open=True)


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
        self.formats = self._formats()
        self.sheets: dict[str, _SheetState] = {}
        for name in self.SHEETS:
            self._add_sheet(name)
        self._signoff()

    # ---------------------------------------------------------------- formats and layout

    def _formats(self) -> dict[str, Any]:
        self._format_cache: dict[tuple, Any] = {}
        base = {"font_name": "Calibri", "font_size": FONT_SIZE, "font_color": INK, "valign": "top"}
        input_style = {**base, "bg_color": _SAND, "border": 1, "border_color": SAND_EDGE, "bold": True,
                       "locked": False}
        return {
            "title": {**base, "bold": True, "font_size": 15, "font_color": SLATE},
            "subtitle": {**base, "italic": True, "font_color": SLATE, "text_wrap": True},
            "section": {**base, "bold": True, "font_color": _WHITE, "bg_color": SLATE},
            "label": {**base, "text_wrap": True},
            "unit": {**base, "font_color": SLATE},
            "note": {**base, "italic": True, "font_color": "#4A5661", "text_wrap": True},
            "input": {**input_style, "num_format": "General"},
            "input_text": input_style,
            "signoff": {**base, "border": 1, "border_color": SLATE, "locked": False, "text_wrap": True},
            "value": {**base, "bottom": 1, "bottom_color": _RULE},
            "text_value": {**base, "bottom": 1, "bottom_color": _RULE, "text_wrap": True},
            "text_run": {**base, "bottom": 1, "bottom_color": _RULE},
            "failed": {"bold": True, "font_color": _WHITE, "bg_color": INK},
            "result": {**base, "bold": True, "bg_color": _SAGE, "border": 1, "border_color": _RULE},
            "result_text": {**base, "bold": True, "bg_color": _SAGE, "border": 1, "border_color": _RULE,
                            "text_wrap": True},
            "step": {**base, "font_color": SLATE, "align": "center"},
            "header": {**base, "bold": True, "bottom": 2, "bottom_color": SLATE, "text_wrap": True},
            "header_number": {**base, "bold": True, "bottom": 2, "bottom_color": SLATE, "text_wrap": True,
                              "align": "right"},
            "cell": {**base},
            "paragraph": {**base, "text_wrap": True},
            "caution": {**base, "text_wrap": True, "bg_color": _CAUTION, "bold": True},
        }

    def fmt(self, style: str, num_format: str | None = None, at: tuple[Any, int, int] | None = None):
        """The workbook format of a named style, with a number format when given.

        ``at`` = (worksheet, row, col) of the cell, needed for SIG3."""
        if num_format == SIG3:
            self.uses_sig3 = True
            value = self.values.get(at[0].name, {}).get(xl_rowcol_to_cell(at[1], at[2])) if at else None
            num_format = significant_format(value)
        key = (style, num_format)
        if key not in self._format_cache:
            props = dict(self.formats[style])
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
        if unit:
            ws.write(row, unit_col, unit, self.fmt("unit"))
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
        tests = [f'LEFT({cell},{len(text)})="{text}"' for text in (FAILED, *fails)]
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
        if unit not in UNIT_FORMATS:
            raise TemplateBuildError(f"{self.template.name}: {what!r}: no number format for the unit {unit!r}; "
                                     "give number_format")
        return UNIT_FORMATS[unit]

    def paragraph(self, text: str, caution: bool = False) -> None:
        """A paragraph on the Notes sheet; ``caution`` highlights it."""
        state = self.sheets["Notes"]
        self._write_wrapped(state, state.row, 0, 0, text, "caution" if caution else "paragraph")
        state.row += 1

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

    def _keep_together(self, state: _SheetState, first: int, last: int) -> None:
        """Start a new page before a table (with its section bar) that would otherwise split."""
        if state.section_row == first - 1:
            first -= 1
        height = sum(self._height(state, r) for r in range(first, last + 1))
        if height <= PAGE_CAPACITY and self._page_used(state, first) + height > PAGE_CAPACITY:
            state.breaks.append(first)

    def _height(self, state: _SheetState, row: int) -> float:
        return ROW_HEIGHT * state.lines.get(row, 1)

    def _page_used(self, state: _SheetState, row: int) -> float:
        """Points of the current printed page filled above ``row`` (pages break automatically
        when full, and at the manual breaks)."""
        used = 0.0
        for r in range(row):
            height = self._height(state, r)
            if r in state.breaks or used + height > PAGE_CAPACITY:
                used = 0.0
            used += height
        return 0.0 if row in state.breaks else used

    def chart(self, sheet: str, kind: str, title: str, series: Sequence[dict], x_title: str, y_title: str,
              subtype: str | None = None, x_axis: dict | None = None, y_axis: dict | None = None) -> None:
        """An XlsxWriter chart placed below the sheet's rows, never beside or over another block.

        A run of charts starts on a new printed page and each chart reserves the rows it covers,
        so charts neither overlap nor split across pages.  Each series dict holds name,
        categories and values references; ``x_axis`` / ``y_axis`` add XlsxWriter axis options."""
        state = self.sheet(sheet)
        options = {"type": kind}
        if subtype:
            options["subtype"] = subtype
        chart = self.workbook.add_chart(options)
        for entry in series:
            chart.add_series(entry)
        font = {"size": CHART_FONT_SIZE, "color": INK}
        chart.set_title({"name": title, "name_font": {"size": 11, "color": SLATE, "bold": True}})
        chart.set_x_axis({"name": x_title, "name_font": font, "num_font": font, **(x_axis or {})})
        chart.set_y_axis({"name": y_title, "name_font": font, "num_font": font,
                          "major_gridlines": {"visible": True, "line": {"color": _RULE}}, **(y_axis or {})})
        chart.set_legend({"position": "bottom", "font": font})
        chart.set_size({"width": CHART_PX[0], "height": CHART_PX[1]})
        if not state.chart_run:
            state.row += 1
            state.breaks.append(state.row)
        rows = math.ceil(CHART_PX[1] / (ROW_HEIGHT * 4 / 3)) + 1
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
        no_ra = ("conduction", "radiation", "film", "resistance")
        for i, (branch, kind) in enumerate(((row[0], row[3]) for row in branches), start=1):
            at = 1 + len(nodes) + i          # row of the branch in NET_SOLVE's table (header first)

            def pick(col, applies=True):
                return f"=INDEX({solve}, {at}, {col})" if applies else None
            picks[f"method:{branch}"] = f"INDEX({solve}, {at}, 9)"
            picks[f"h:{branch}"] = f"INDEX({solve}, {at}, 5)"
            rows.append([branch, kind, f'=NET_HEAT({tables}, "{branch}"{tail})', pick(5, kind != "resistance"),
                         pick(6), pick(7, kind not in no_ra), pick(8, kind not in no_ra), pick(9)])
        self.table(sheet, ["branch", "kind", "heat flow W", "h W/(m²·K)", "R K/W", "Ra", "Nu", "method"], rows,
                   formats=[None, None, "0.0", SIG3, SCIENTIFIC, "0.00E+00", SIG3, None])
        return picks

    def _write_any(self, ws, row: int, col: int, value, number_format: str | None) -> None:
        style = "cell"
        if value is None:
            return
        if isinstance(value, str) and value.startswith("="):
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

    def close(self) -> None:
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


def limit_check(value: str, limit: str, within: str = "OK", beyond: str = "EXCEEDS LIMIT",
                failed: str = f'"{FAILED}"') -> str:
    """Formula text of the check "``value`` at most ``limit``": ``within`` or ``beyond``, and
    ``failed`` (a formula term; FAILED unless given) where ``value`` did not calculate."""
    return f'=IF(ISNUMBER({value}), IF({value}<={limit}, "{within}", "{beyond}"), {failed})'


def significant_format(value, figures: int = 3) -> str:
    """A fixed-decimals number format showing ``value`` to ``figures`` significant figures
    (three decimals when the value is unknown, zero or not a number)."""
    if isinstance(value, bool) or not isinstance(value, (int, float)) or value == 0 or not math.isfinite(value):
        return "0.000"
    decimals = figures - 1 - math.floor(math.log10(abs(value)))
    return "0" if decimals <= 0 else "0." + "0" * min(decimals, 9)


def text_lines(text: str, width: float) -> int:
    """Lines ``text`` takes wrapped in a column of ``width`` characters.

    A character of running text counts 0.9 units of column width: measured, DejaVu Sans (which
    LibreOffice prints for Calibri where Calibri is missing) takes about 0.82, Calibri less; the
    rest is slack for word breaks."""
    lines = 0
    for paragraph in str(text).split("\n"):
        lines += max(1, math.ceil(0.9 * len(paragraph) / max(width - 1, 1)))
    return lines


def _clip(text: str, limit: int) -> str:
    return text if len(text) <= limit else text[:limit - 1] + "…"


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
    from ..workbook.cachewriter import write_cached_values
    from ..workbook.model import evaluate_book

    out = Path(out_path) if out_path is not None else template.path
    out.parent.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory(prefix="stillair-template-") as directory:
        raw = os.path.join(directory, f"{template.name}.raw.xlsx")
        book = TemplateBook(template, raw)
        template.build(book)
        book.close()
        evaluation = evaluate_book(raw)
        if book.uses_sig3:
            # the same cells again, three-significant-figure cells now with their decimals
            book = TemplateBook(template, raw, values=evaluation.values)
            template.build(book)
            book.close()
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
    from ..cells.registry import BY_NAME

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


def render_pdf(paths: Sequence[str | os.PathLike], out_dir: str | os.PathLike, timeout: float = 300) -> list[Path]:
    """Print workbooks to PDF with LibreOffice headless, as a checker's printer would.

    Uses a throw-away user profile, so nothing of the user's LibreOffice changes.  Raises
    FileNotFoundError when ``soffice`` is not installed."""
    import shutil
    import subprocess

    soffice = shutil.which("soffice") or shutil.which("libreoffice")
    if soffice is None:
        raise FileNotFoundError("LibreOffice (soffice) is not installed")
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory(prefix="stillair-lo-profile-") as profile:
        subprocess.run([soffice, f"-env:UserInstallation={Path(profile).as_uri()}", "--headless", "--norestore",
                        "--convert-to", "pdf", "--outdir", str(out)] + [str(p) for p in paths],
                       check=True, capture_output=True, timeout=timeout)
    return [out / (Path(p).stem + ".pdf") for p in paths]


def render_pictures(out_dir: str | os.PathLike, dpi: int = 80) -> list[Path]:
    """The README's pictures: the first printed page of each template's Results sheet, as PNG.

    Needs LibreOffice and poppler-utils (pdftotext, pdftoppm)."""
    import subprocess

    from . import all_templates

    out = Path(out_dir)
    templates = all_templates()
    pictures = []
    with tempfile.TemporaryDirectory(prefix="stillair-render-") as directory:
        for template, pdf in zip(templates, render_pdf([t.path for t in templates], directory)):
            page = 1
            while True:
                text = subprocess.run(["pdftotext", "-f", str(page), "-l", str(page), "-layout", str(pdf), "-"],
                                      check=True, capture_output=True, text=True).stdout
                if f"{template.path.name} - Results" in text:
                    break
                page += 1
            target = out / f"{template.name}-results"
            subprocess.run(["pdftoppm", "-png", "-r", str(dpi), "-f", str(page), "-l", str(page), "-singlefile",
                            str(pdf), str(target)], check=True)
            pictures.append(target.with_suffix(".png"))
    return pictures

