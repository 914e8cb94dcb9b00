"""Every template is a sheet a checker can sign and print: sign-off block, footers, validated and
unlocked inputs, protected formulas, verdict formats, number formats by quantity, charts that
neither overlap nor split, no array formulas; and, where LibreOffice is installed, a rendered PDF
without error text and with no text below 8 pt."""

from __future__ import annotations

import math
import re
import shutil
import subprocess
import zipfile
import zlib
from functools import lru_cache

import openpyxl
import pytest
from openpyxl.utils import range_boundaries

from stillair.addin.templates.pages import GRIDS, MIN_PRINT_SCALE, PAGE, ROW_HEIGHT
from stillair.addin.templates.render import render_pdf
from stillair.addin.templates.spec import FAILED, SIGNOFF_FIELDS, SIG3, UNIT_FORMATS
from stillair.addin.templates import all_templates

TEMPLATES = all_templates()
IDS = [t.name for t in TEMPLATES]
PROTECTED = ("Calculation", "Results", "Notes", "Tables")
SAND = "FFFBEFD5"


@lru_cache(maxsize=None)
def _book(name: str, data_only: bool = False):
    template = next(t for t in TEMPLATES if t.name == name)
    return openpyxl.load_workbook(template.path, data_only=data_only)


def _inputs(template):
    """(cell, value) of every input cell: sand-filled cells of the Inputs sheet's value column."""
    ws = _book(template.name)["Inputs"]
    return [(row[0], row[0].value) for row in ws.iter_rows(min_col=2, max_col=2)
            if row[0].value is not None and row[0].fill.fgColor.rgb == SAND]


# ------------------------------------------------------------------------------ sign-off

@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_sign_off_block_heads_the_first_page(template):
    ws = _book(template.name)["Inputs"]
    labels = {ws.cell(row, 1).value: row for row in range(1, 20)}
    first_input = min(cell.row for cell, _ in _inputs(template))
    for field in SIGNOFF_FIELDS:
        assert field in labels, f"{template.name}: no {field!r} in the sign-off block"
        row = labels[field]
        assert row < first_input
        cell = ws.cell(row, 2)
        assert cell.value is None and not cell.protection.locked, f"{field}: a blank cell to fill in"
    version_row = labels["stillair version used"]
    assert ws.cell(version_row, 2).value == "=STILLAIR_VERSION()"
    assert ws.cell(labels["Template and its version"], 2).value == \
        f"{template.name} version {template.version}"


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_every_sheet_prints_file_sheet_page_and_date_on_a4_one_page_wide(template):
    for ws in _book(template.name).worksheets:
        footer = ws.oddFooter.left.text + ws.oddFooter.center.text + ws.oddFooter.right.text
        for code, what in (("&F", "file name"), ("&A", "sheet name"), ("&P", "page"), ("&N", "pages"),
                           ("&D", "print date")):
            assert code in footer, f"{template.name} {ws.title}: footer lacks the {what}"
        assert ws.page_setup.paperSize == 9, "A4"
        assert ws.sheet_properties.pageSetUpPr.fitToPage
        assert ws.page_setup.fitToWidth in (None, 1) and ws.page_setup.fitToHeight == 0


# ------------------------------------------------------------------------------ inputs and protection

def _admits(validation, value) -> bool:
    """Whether an input's data validation accepts its own default value."""
    if validation.type == "custom":
        ref = str(validation.sqref)
        formula = validation.formula1.replace(ref, repr(float(value)))
        tests = re.findall(r"([-\d.e]+)(>=|<=|>|<)([-\d.e]+)", formula)
        ops = {">": float.__gt__, ">=": float.__ge__, "<": float.__lt__, "<=": float.__le__}
        return all(ops[op](float(a), float(b)) for a, op, b in tests) and len(tests) == 2
    low, high = float(validation.formula1), validation.formula2
    operator = validation.operator or "between"
    return {"between": lambda: low <= value <= float(high), "greaterThan": lambda: value > low,
            "greaterThanOrEqual": lambda: value >= low, "lessThan": lambda: value < low,
            "lessThanOrEqual": lambda: value <= low}[operator]()


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_every_input_is_validated_with_unit_range_and_reason(template):
    ws = _book(template.name)["Inputs"]
    validations = {}
    for validation in ws.data_validations.dataValidation:
        for ref in str(validation.sqref).split():
            validations[ref] = validation
    inputs = _inputs(template)
    # own-network's inputs are mostly its tables on the Network sheet (their checks: its own tests)
    assert len(inputs) >= (3 if template.name == "own-network" else 8)
    for cell, value in inputs:
        validation = validations.get(cell.coordinate)
        assert validation is not None, f"{template.name}: input {cell.coordinate} has no data validation"
        assert validation.showErrorMessage and validation.error and validation.errorTitle
        assert validation.showInputMessage and validation.prompt
        if validation.type == "list":
            assert str(value) in validation.formula1, f"{cell.coordinate}: default not among the choices"
            continue
        assert validation.type in ("decimal", "custom"), cell.coordinate
        assert validation.prompt.startswith("Unit: ") and "Allowed: " in validation.prompt
        assert " must be " in validation.error
        assert not validation.allow_blank, f"{cell.coordinate}: a blank input must be refused"
        assert _admits(validation, float(value)), f"{template.name} {cell.coordinate}: default {value} refused"


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_inputs_are_unlocked_and_formulas_protected_without_a_password(template):
    book = _book(template.name)
    for cell, _ in _inputs(template):
        assert not cell.protection.locked, f"{template.name}: input {cell.coordinate} is locked"
    for ws in book.worksheets:
        if ws.title in PROTECTED:
            assert ws.protection.sheet, f"{template.name}: {ws.title} is not protected"
            assert not ws.protection.password, f"{template.name}: {ws.title} has a password"
        for row in ws.iter_rows():
            for cell in row:
                if isinstance(cell.value, str) and cell.value.startswith("="):
                    assert cell.protection.locked, f"{template.name} {ws.title}!{cell.coordinate} unlocked"


def test_numeric_inputs_without_a_range_are_refused_by_the_builder(tmp_path):
    from stillair.addin.templates.build import build_template
    from stillair.addin.templates.spec import Template, TemplateBuildError

    def build(b):
        b.input("gap", "Gap", 0.01, "m")

    with pytest.raises(TemplateBuildError, match="numeric input 'gap' needs a Valid range"):
        build_template(Template("probe", 1, "Probe", "probe", build), tmp_path / "probe.xlsx")


def test_a_defined_name_may_not_be_a_cell_function(tmp_path):
    """LibreOffice reads DEW_POINT( as the defined name dew_point and a bracket: Err:509."""
    from stillair.addin.templates.build import build_template
    from stillair.addin.templates.spec import Template, TemplateBuildError, Valid

    def build(b):
        b.input("dew_point", "Dew point", 10.0, "°C", valid=Valid(-50.0, 50.0, "a test range"))

    with pytest.raises(TemplateBuildError, match="name 'dew_point' is the cell function DEW_POINT"):
        build_template(Template("probe", 1, "Probe", "probe", build), tmp_path / "probe.xlsx")


# ------------------------------------------------------------------------------ verdicts

def _conditional_cells(ws) -> set[str]:
    cells = set()
    for ranges in ws.conditional_formatting:
        for ref in str(ranges.sqref).split():
            min_col, min_row, max_col, max_row = range_boundaries(ref)
            cells.update(f"{openpyxl.utils.get_column_letter(c)}{r}" for c in range(min_col, max_col + 1)
                         for r in range(min_row, max_row + 1))
    return cells


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_every_verdict_cell_is_formatted_to_stand_out_when_it_fails(template):
    verdict = re.compile(r"EXCEEDS LIMIT|CONDENSATION|\"no\"")
    found = 0
    for ws in _book(template.name).worksheets:
        formatted = _conditional_cells(ws)
        for row in ws.iter_rows():
            for cell in row:
                if isinstance(cell.value, str) and verdict.search(cell.value) and ws.title != "Calculation":
                    found += 1
                    assert cell.coordinate in formatted, f"{template.name} {ws.title}!{cell.coordinate}"
    assert found or template.name in ("air-layer", "solar-collector", "partition-cavity")


# ------------------------------------------------------------------------------ layout and print

@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_sheets_fit_the_page_width_at_full_size(template):
    """Grids narrow enough to print unscaled (Excel: 7 px a character; LibreOffice needs ~112
    characters), every font at least 8 pt / the smallest print scale allowed."""
    printable_px = (PAGE["width_in"] - 2 * PAGE["side"]) * 96
    for ws in _book(template.name).worksheets:
        # XlsxWriter stores a width as characters + 0.71 (Excel's cell padding); equal neighbours
        # share one <col min max> entry
        by_column = {}
        for dimension in ws.column_dimensions.values():
            for index in range(dimension.min, dimension.max + 1):
                by_column[index] = dimension.width - 0.7109375
        widths = [by_column[i + 1] for i in range(len(GRIDS[ws.title]))]
        assert sum(widths) <= 112, f"{template.name} {ws.title}: {sum(widths)} characters wide"
        assert sum(7 * w + 5 for w in widths) <= printable_px
        assert ws.print_area, f"{ws.title}: no print area"
        for row in ws.iter_rows():
            for cell in row:
                if cell.value is not None:
                    assert cell.font.sz >= 8 / MIN_PRINT_SCALE, f"{ws.title}!{cell.coordinate}"


def _row_heights(ws, first: int, last: int) -> float:
    default = ws.sheet_format.defaultRowHeight or ROW_HEIGHT
    return sum(ws.row_dimensions[r + 1].height or default for r in range(first, last + 1))


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_charts_neither_overlap_nor_split_across_pages(template):
    printable_pt = (PAGE["height_in"] - PAGE["top"] - PAGE["bottom"]) * 72 - 2 * 20  # less header/footer
    for ws in _book(template.name).worksheets:
        boxes = [(c.anchor._from.row, c.anchor._from.col, c.anchor.to.row, c.anchor.to.col) for c in ws._charts]
        for i, a in enumerate(boxes):
            for b in boxes[i + 1:]:
                apart = a[2] < b[0] or b[2] < a[0] or a[3] < b[1] or b[3] < a[1]
                assert apart, f"{template.name} {ws.title}: charts at rows {a[0]} and {b[0]} overlap"
        breaks = sorted(brk.id for brk in ws.row_breaks.brk)
        for top, _, bottom, _ in boxes:
            page_start = max((b for b in breaks if b <= top), default=None)
            assert page_start is not None, f"{template.name} {ws.title}: chart at row {top} after no page break"
            assert _row_heights(ws, page_start, bottom) <= printable_pt, \
                f"{template.name} {ws.title}: chart at row {top} runs off its page"


def _chart_parts(path) -> dict[str, str]:
    with zipfile.ZipFile(path) as archive:
        return {name: archive.read(name).decode() for name in archive.namelist()
                if name.startswith("xl/charts/chart")}


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_chart_axes_cross_at_their_low_ends_with_the_labels_outside_the_plot(template):
    """Axes crossing at zero put the tick labels inside the plot (the glazing profile did)."""
    for name, xml in _chart_parts(template.path).items():
        for axis in re.findall(r"<c:(?:valAx|catAx)>.*?</c:(?:valAx|catAx)>", xml, re.S):
            assert '<c:tickLblPos val="low"/>' in axis, f"{template.name} {name}: tick labels at the axis"
            assert '<c:crosses val="min"/>' in axis, f"{template.name} {name}: axes cross inside the plot"


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_every_chart_series_is_drawn_in_colours_the_template_names(template):
    """A series without colours takes the viewer's defaults (the cabinet's profile did): every
    line and marker names its colour, and those without a colour of their own the palette's."""
    for name, xml in _chart_parts(template.path).items():
        for series in re.findall(r"<c:ser>.*?</c:ser>", xml, re.S):
            line = re.search(r"<c:spPr><a:ln[^>]*>(.*?)</a:ln>", series, re.S)
            assert line and ("<a:srgbClr" in line.group(1) or "<a:noFill/>" in line.group(1)), \
                f"{template.name} {name}: a series line in the viewer's colour"
            marker = re.search(r"<c:marker>(.*?)</c:marker>", series, re.S)
            if marker and '<c:symbol val="none"/>' not in marker.group(1):
                assert "<a:srgbClr" in marker.group(1), f"{template.name} {name}: a marker in the viewer's colour"


def _array_formulas(path) -> list[str]:
    with zipfile.ZipFile(path) as archive:
        return [name for name in archive.namelist() if name.startswith("xl/worksheets/sheet")
                and b't="array"' in archive.read(name)]


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_no_array_formulas_so_every_viewer_shows_the_cached_values(template):
    """LibreOffice recalculates array formulas on opening; single-cell formulas keep the engine's
    cached values (NET_SOLVE stays for users' own sheets, documented in the README)."""
    assert _array_formulas(template.path) == []


# ------------------------------------------------------------------------------ number formats

def _decimals(number_format: str, value: float) -> int | None:
    """Decimals a number format shows for ``value``; None for scientific formats."""
    if "E+" in number_format:
        return None
    match = re.fullmatch(r"0(?:\.(0+))?(?:\"?.*)?", number_format)
    assert match, f"unexpected number format {number_format!r}"
    return len(match.group(1) or "")


UNIT_COLUMN = {"Calculation": "D", "Results": "C"}


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_numbers_print_by_quantity_and_never_as_a_bare_zero(template):
    formulas, values = _book(template.name), _book(template.name, data_only=True)
    checked = 0
    for ws in formulas.worksheets:
        if ws.title in ("Inputs", "Notes"):
            continue
        for row in ws.iter_rows():
            for cell in row:
                value = values[ws.title][cell.coordinate].value
                if not (isinstance(cell.value, str) and cell.value.startswith("=")) or \
                        isinstance(value, bool) or not isinstance(value, (int, float)):
                    continue
                where = f"{template.name} {ws.title}!{cell.coordinate} = {value!r}"
                assert cell.number_format != "General", f"{where}: no number format"
                decimals = _decimals(cell.number_format, value)
                if decimals is not None and value != 0:
                    assert round(abs(value), decimals) > 0, f"{where} prints as 0 ({cell.number_format})"
                unit_col = UNIT_COLUMN.get(ws.title)
                unit = ws[f"{unit_col}{cell.row}"].value if unit_col and cell.column_letter == \
                    chr(ord(unit_col) - 1) else None
                if unit == "°C":
                    assert cell.number_format == "0.0", f"{where}: temperatures to 0.1 °C"
                label = str(ws.cell(cell.row, cell.column - 1).value or "")
                deliberate = label.startswith("Difference") or "rounded" in label
                if UNIT_FORMATS.get(unit) == SIG3 and decimals is not None and value != 0 and not deliberate:
                    shown = decimals + 1 + math.floor(math.log10(abs(value)))
                    assert shown >= 3, f"{where}: {shown} significant figures ({cell.number_format})"
                checked += 1
    assert checked > 20


def test_stefan_boltzmann_prints_in_scientific_form():
    ws = _book("air-layer")["Calculation"]
    sigma = next(row[2] for row in ws.iter_rows() if row[1].value == "Stefan-Boltzmann constant")
    assert "E+" in sigma.number_format


# ------------------------------------------------------------------------------ rendered by LibreOffice

SOFFICE = shutil.which("soffice") or shutil.which("libreoffice")
ERROR_TEXT = re.compile(r"#NAME\?|#VALUE!|#REF!|#DIV/0!|#N/A|Err:\d+|###")


@pytest.fixture(scope="module")
def rendered(tmp_path_factory):
    """Each template printed to PDF by LibreOffice headless (a throw-away profile)."""
    if SOFFICE is None:
        pytest.skip("LibreOffice (soffice) is not installed: the rendered check needs it")
    if shutil.which("pdftotext") is None:
        pytest.skip("pdftotext (poppler-utils) is not installed: the rendered check needs it")
    out = tmp_path_factory.mktemp("rendered")
    render_pdf([t.path for t in TEMPLATES], out)
    return out


def pdf_font_sizes(path) -> list[float]:
    """Every font size set in the PDF's content streams (LibreOffice writes scaled sizes)."""
    data = path.read_bytes()
    sizes = []
    for match in re.finditer(rb"stream\r?\n(.*?)\r?\nendstream", data, re.S):
        try:
            stream = zlib.decompress(match.group(1))
        except zlib.error:
            continue
        sizes += [float(size) for size in re.findall(rb"([\d.]+) Tf", stream)]
    return sizes


def pdf_pages(path) -> int:
    return len(re.findall(rb"/Type\s*/Page\b", path.read_bytes()))


@pytest.mark.slow  # renders every template through LibreOffice
@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_libreoffice_prints_no_error_text_and_nothing_below_8_pt(template, rendered):
    pdf = rendered / f"{template.name}.pdf"
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], check=True, capture_output=True,
                          text=True).stdout
    errors = sorted(set(ERROR_TEXT.findall(text)))
    assert not errors, f"{template.name}: the printed pages show {errors}"
    assert FAILED not in text
    for field in SIGNOFF_FIELDS:
        assert field in text
    sizes = pdf_font_sizes(pdf)
    assert sizes and min(sizes) >= 7.95, f"{template.name}: text printed at {min(sizes)} pt"
    assert pdf_pages(pdf) <= 14
