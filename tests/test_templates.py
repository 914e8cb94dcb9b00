"""Properties every shipped template must have."""

from __future__ import annotations

import zipfile

import openpyxl
import pytest

from stillair.addin.templates.build import build_template, is_error_value
from stillair.addin.workbook.reader import read_book

from stillair.addin.templates.spec import MARKER_NAME
from stillair.addin.templates import MODULES, all_templates, copy_templates
from template_support import evaluate_template

TEMPLATES = all_templates()
IDS = [t.name for t in TEMPLATES]


def test_ten_templates_ship_with_their_files():
    assert len(MODULES) == 10
    for template in TEMPLATES:
        assert template.path.is_file(), f"{template.path} missing: run python -m stillair.addin.templates"


def _formulas_and_values(path):
    """{(sheet, cell): (formula or constant, cached value)} for every non-empty cell."""
    formulas = openpyxl.load_workbook(path)
    values = openpyxl.load_workbook(path, data_only=True)
    cells = {}
    for sheet in formulas.worksheets:
        for row in sheet.iter_rows():
            for cell in row:
                if cell.value is not None:
                    text = cell.value.text if hasattr(cell.value, "text") else cell.value
                    cells[(sheet.title, cell.coordinate)] = (text, values[sheet.title][cell.coordinate].value)
    return cells


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_rebuilding_reproduces_the_committed_file(template, tmp_path):
    rebuilt = build_template(template, tmp_path / template.path.name)
    committed = _formulas_and_values(template.path)
    fresh = _formulas_and_values(rebuilt)
    assert committed.keys() == fresh.keys()
    drift = {cell: (committed[cell], fresh[cell]) for cell in committed
             if committed[cell][0] != fresh[cell][0] or not _same_value(committed[cell][1], fresh[cell][1])}
    assert not drift, f"{template.name}: committed file differs from its code (rebuild it): {list(drift)[:5]}"


def _same_value(a, b) -> bool:
    try:
        return float(a) == pytest.approx(float(b), rel=1e-9, abs=1e-12)
    except (TypeError, ValueError):
        return a == b


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_template_evaluates_without_a_single_error_value(template):
    evaluation = evaluate_template(template.name)
    errors = [(sheet, ref, value) for sheet, cells in evaluation.values.items() for ref, value in cells.items()
              if is_error_value(value)]
    assert not errors


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_template_has_the_four_sheets_marker_and_cached_values(template):
    workbook = openpyxl.load_workbook(template.path, data_only=True)
    assert workbook.sheetnames[:4] == ["Inputs", "Calculation", "Results", "Notes"]
    assert workbook.custom_doc_props[MARKER_NAME].value == template.marker
    assert MARKER_NAME in workbook.defined_names
    # cached values are filled: every formula cell shows a value in a viewer that never calculates
    # (empty text is a value: a blank row of own-network's tables; openpyxl reads it as None)
    for sheet in read_book(str(template.path)).sheets:
        for ref, cell in sheet.formulas.items():
            assert cell.has_cached, f"{template.name} {sheet.name}!{ref} has no cached value"


@pytest.mark.parametrize("template", TEMPLATES, ids=IDS)
def test_every_input_is_a_workbook_scoped_name(template):
    workbook = openpyxl.load_workbook(template.path)
    inputs = workbook["Inputs"]
    named_cells = set()
    for name, definition in workbook.defined_names.items():
        for sheet, ref in definition.destinations:
            if sheet == "Inputs":
                named_cells.add(ref.replace("$", ""))
    for row in inputs.iter_rows(min_col=2, max_col=2):
        cell = row[0]
        if cell.value is not None and cell.fill.fgColor.rgb not in (None, "00000000") and cell.row > 3:
            assert cell.coordinate in named_cells, f"{template.name}: input Inputs!{cell.coordinate} has no name"


def test_copy_never_overwrites(tmp_path):
    existing = tmp_path / TEMPLATES[0].path.name
    existing.write_bytes(b"the user's own file")
    outcomes = dict((p.name, o) for p, o in copy_templates(tmp_path))
    assert existing.read_bytes() == b"the user's own file"
    assert outcomes[existing.name] == "kept existing file"
    for template in TEMPLATES[1:]:
        assert outcomes[template.path.name] == "copied"
        assert zipfile.is_zipfile(tmp_path / template.path.name)


def _cleared_results(template, name):
    from stillair.addin.templates.spec import MISSING
    from stillair.addin.workbook.model import evaluate_book
    evaluation = evaluate_book(str(template.path), {name: ""})
    # Results: label | value | unit | note; a unit worked out by formula (W/m for a pipe, W/m² for
    # a plate) is a label, not a result
    shown = [v for ref, v in evaluation.values["Results"].items() if v is not None and not ref.startswith("C")]
    return evaluation, shown, MISSING


@pytest.mark.parametrize("template", all_templates(), ids=lambda t: t.name)
def test_a_cleared_required_input_shows_input_missing_in_every_result(template):
    """A blank reads as 0 in every spreadsheet program (LibreOffice computed a cabinet at
    35.5 degC with its dissipation cleared); each template guards its inputs instead: every key
    result shows INPUT MISSING, and the count under the inputs says how many are blank."""
    from template_support import input_names
    name = sorted(input_names(template))[0]
    evaluation, shown, missing = _cleared_results(template, name)
    assert shown and all(v == missing for v in shown), shown
    assert evaluation.names["inputs_missing"] == 1.0
    untouched = evaluate_book_names(template)
    assert untouched["inputs_missing"] == 0.0


def evaluate_book_names(template):
    from stillair.addin.workbook.model import evaluate_book
    return evaluate_book(str(template.path)).names
