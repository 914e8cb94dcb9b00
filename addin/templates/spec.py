"""What a template is made of: :class:`Template`, the accepted values of its inputs
(:class:`Valid` and the shared ranges), the marker, and the house style (palette, number formats
by unit) every template shares."""

from __future__ import annotations

import datetime as _dt
import math
from dataclasses import dataclass
from importlib import import_module
from pathlib import Path
from typing import Any, Callable

__all__ = ["Template", "Valid", "TemplateBuildError", "TEMPLATE_DIR", "MARKER_NAME", "FAILED",
           "CELL_STYLES", "significant_format", "gas_temperature", "gas_pressure", "altitude"]

# The workbooks ship as the package stillair.templates (the top-level templates/ folder).
_TEMPLATES_PACKAGE = import_module("stillair.templates")
assert _TEMPLATES_PACKAGE.__file__ is not None, "stillair.templates is a regular package (has __init__.py)"
TEMPLATE_DIR = Path(_TEMPLATES_PACKAGE.__file__).resolve().parent
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
RULE = "#B8C4CE"
_CAUTION = "#F6DCD5"
_WHITE = "#FFFFFF"

FONT_SIZE = 10            # every cell's font; with the print scale kept >= 0.8 it prints >= 8 pt
CHART_FONT_SIZE = 10

# The named cell styles the sheets are written in (XlsxWriter format properties).
_BASE = {"font_name": "Calibri", "font_size": FONT_SIZE, "font_color": INK, "valign": "top"}
_INPUT_STYLE = {**_BASE, "bg_color": _SAND, "border": 1, "border_color": SAND_EDGE, "bold": True,
               "locked": False}
CELL_STYLES = {
    "title": {**_BASE, "bold": True, "font_size": 15, "font_color": SLATE},
    "subtitle": {**_BASE, "italic": True, "font_color": SLATE, "text_wrap": True},
    "section": {**_BASE, "bold": True, "font_color": _WHITE, "bg_color": SLATE},
    "label": {**_BASE, "text_wrap": True},
    "unit": {**_BASE, "font_color": SLATE},
    "note": {**_BASE, "italic": True, "font_color": "#4A5661", "text_wrap": True},
    "input": {**_INPUT_STYLE, "num_format": "General"},
    "input_text": _INPUT_STYLE,
    "signoff": {**_BASE, "border": 1, "border_color": SLATE, "locked": False, "text_wrap": True},
    "value": {**_BASE, "bottom": 1, "bottom_color": RULE},
    "text_value": {**_BASE, "bottom": 1, "bottom_color": RULE, "text_wrap": True},
    "text_run": {**_BASE, "bottom": 1, "bottom_color": RULE},
    "failed": {"bold": True, "font_color": _WHITE, "bg_color": INK},
    "result": {**_BASE, "bold": True, "bg_color": _SAGE, "border": 1, "border_color": RULE},
    "result_text": {**_BASE, "bold": True, "bg_color": _SAGE, "border": 1, "border_color": RULE,
                    "text_wrap": True},
    "step": {**_BASE, "font_color": SLATE, "align": "center"},
    "header": {**_BASE, "bold": True, "bottom": 2, "bottom_color": SLATE, "text_wrap": True},
    "header_number": {**_BASE, "bold": True, "bottom": 2, "bottom_color": SLATE, "text_wrap": True,
                      "align": "right"},
    "cell": {**_BASE},
    "paragraph": {**_BASE, "text_wrap": True},
    "caution": {**_BASE, "text_wrap": True, "bg_color": _CAUTION, "bold": True},
}

# The text a check shows when a quantity it needs did not calculate.
FAILED = "CALC FAILED"
# The text every key result shows while a required input is blank (a blank reads as 0 in every
# spreadsheet program, which would compute a plausible wrong answer), and the defined name of
# the count of blank required inputs.
MISSING = "INPUT MISSING"
MISSING_NAME = "inputs_missing"

# Number formats by quantity (the unit shown beside the value).  SIG3 marks three significant
# figures: the build evaluates the workbook once and writes each such cell with the fixed decimals
# its value needs (a conditional format such as [>=10]0.0;... loses the minus sign in some viewers).
SIG3 = "sig3"
SCIENTIFIC = "0.000E+00"
UNIT_FORMATS = {
    "°C": "0.0", "K": "0.0", "°": "0.0", "%": "0.0", "mm": "0.0",
    "W/(m²·K)": SIG3, "W/(m·K)": SIG3, "W/K": SIG3, "m²·K/W": SIG3, "K/W": SIG3, "-": SIG3,
    "W": "0.0", "W/m²": "0.0", "W/m": "0.0",
    "m": "0.0000", "m²": "0.000", "Pa": "0", "m/s": "0.00", "m/s²": "0.00000",
    "W/(m²·K⁴)": SCIENTIFIC, "m²/s": SCIENTIFIC, "1/K": SCIENTIFIC, "1/(K·m³)": SCIENTIFIC,
    "kg/m³": "0.0000", "J/(kg·K)": "0.0", "kg/s": SIG3, "m³/s": SIG3, "m³/h": SIG3, "1/(kg·m)": SCIENTIFIC,
}

# The Stefan-Boltzmann constant as a Calculation step writes it, W/(m²·K⁴): CODATA 2018 to the
# digits the value is quoted with (scipy.constants.Stefan_Boltzmann, the engine's SIGMA).
SIGMA_TEXT = "5.670374419E-8"

# Network tables in the engine's columns: p1..p5 hold numbers (or a facing word), the rest text.
BRANCH_FORMATS = (None, None, None, None, SIG3, SIG3, SIG3, SIG3, SIG3, None)
BOUNDARY_FORMATS = (None, None, "0.0")

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
    # takes a book.TemplateBook; book.py imports this module and addin's modules import without a
    # cycle (tests/test_addin_layout.py), so the type is not named here
    build: Callable[[Any], None]

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
        if self.low is not None and self.high is not None and not self.low_open and not self.high_open:
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


def significant_format(value, figures: int = 3) -> str:
    """A fixed-decimals number format showing ``value`` to ``figures`` significant figures
    (three decimals when the value is unknown, zero or not a number)."""
    if isinstance(value, bool) or not isinstance(value, (int, float)) or value == 0 or not math.isfinite(value):
        return "0.000"
    decimals = figures - 1 - math.floor(math.log10(abs(value)))
    return "0" if decimals <= 0 else "0." + "0" * min(decimals, 9)
