"""`--set` keeps the workbook's own rules; damaged sheet parts are refused by name; a cleared
input is blank (0 in arithmetic), as the spreadsheet has it."""

from __future__ import annotations

import shutil
import zipfile

import openpyxl
import pytest
from openpyxl.worksheet.datavalidation import DataValidation

from stillair.addin.cli import main
from stillair.addin.workbook.model import evaluate_book
from stillair.addin.workbook.reader import BookError
from stillair.addin.templates.spec import TEMPLATE_DIR

CABINET = TEMPLATE_DIR / "sealed-cabinet.xlsx"


@pytest.fixture
def cabinet(tmp_path):
    copy = tmp_path / "cabinet.xlsx"
    shutil.copyfile(CABINET, copy)
    return copy


def _run(capsys, *argv):
    code = main(["calc", *map(str, argv)])
    out, err = capsys.readouterr()
    return code, out, err


def test_a_value_the_cells_rule_refuses_is_refused_with_the_rules_message(cabinet, capsys):
    # The template's ambient rule allows -60..60 degC; 303.15 (a kelvin value) is refused.
    before = cabinet.read_bytes()
    code, out, err = _run(capsys, cabinet, "--set", "ambient_t=303.15")
    assert code == 2 and out == ""
    assert err.count("\n") == 1
    assert "--set ambient_t=303.15" in err and "Inputs!B30 refuses 303.15" in err
    assert "must be from -60 to 60" in err        # the rule's own error text
    assert cabinet.read_bytes() == before
    assert _run(capsys, cabinet, "--set", "ambient_t=35")[0] == 0


def test_a_formula_cell_is_refused_unless_the_flag_says_replace(cabinet, capsys):
    code, out, err = _run(capsys, cabinet, "--set", "Results!B5=300")
    assert code == 2 and "holds a formula" in err and "--replace-formula" in err
    code, out, err = _run(capsys, cabinet, "--set", "Results!B5=300", "--replace-formula")
    assert code == 0


def test_a_cell_outside_the_sheet_and_an_unknown_name_are_refused(cabinet, capsys):
    code, _, err = _run(capsys, cabinet, "--set", "Inputs!ZZ99999999=1")
    assert code == 2 and "outside the sheet" in err and "ZZ99999999" in err
    code, _, err = _run(capsys, cabinet, "--set", "ambiant_t=20")
    assert code == 2 and "did you mean ambient_t" in err
    code, _, err = _run(capsys, cabinet, "--set", "Inptus!B30=20")
    assert code == 2 and "did you mean Inputs?" in err


def test_plain_rule_types_are_checked(tmp_path):
    """decimal between, whole, list: the three common rule types of ECMA-376 dataValidation."""
    path = tmp_path / "rules.xlsx"
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    ws["A1"], ws["A2"], ws["A3"] = 1.0, 2, "air"
    ws["B1"] = "=A1*2"
    rules = [DataValidation(type="decimal", operator="between", formula1="0", formula2="10",
                            error="between 0 and 10", errorTitle="Range"),
             DataValidation(type="whole", operator="greaterThan", formula1="0"),
             DataValidation(type="list", formula1='"air,argon,krypton"')]
    for rule, ref in zip(rules, ("A1", "A2", "A3")):
        ws.add_data_validation(rule)
        rule.add(ref)
    wb.save(path)
    assert evaluate_book(str(path), {"S!A1": "9.5"}).values["S"]["B1"] == 19.0
    with pytest.raises(BookError, match="Range: between 0 and 10"):
        evaluate_book(str(path), {"S!A1": "11"})
    with pytest.raises(BookError, match="refuses 2.5"):
        evaluate_book(str(path), {"S!A2": "2.5"})
    evaluate_book(str(path), {"S!A3": "Argon"})
    with pytest.raises(BookError, match="refuses 'xenon'"):
        evaluate_book(str(path), {"S!A3": "xenon"})


def test_a_cleared_input_is_blank_as_in_the_spreadsheet(cabinet):
    """An empty --set value clears the cell (never checked, as the Delete key is not); a
    formula reading it gets 0, as LibreOffice computes =dissipation of a cleared cell."""
    cleared = evaluate_book(str(cabinet), {"dissipation": ""})
    assert cleared.sets[("Inputs", "B24")] is None
    heat = [r for (s, ref), r in cleared.results.items() if s == "Calculation" and r.value == 0.0]
    assert heat, "a formula reading the cleared cell shows 0"


def _damaged_copy(source, target, part, keep=0.6):
    with zipfile.ZipFile(source) as zin, zipfile.ZipFile(target, "w") as zout:
        for item in zin.infolist():
            data = zin.read(item.filename)
            if item.filename == part:
                data = data[:int(len(data) * keep)]
            zout.writestr(item, data)


@pytest.mark.parametrize("command", ["calc", "audit"])
def test_a_truncated_sheet_part_is_reported_as_damaged_naming_it(tmp_path, capsys, command):
    damaged = tmp_path / "damaged.xlsx"
    _damaged_copy(CABINET, damaged, "xl/worksheets/sheet2.xml")
    code = main([command, str(damaged)])
    out, err = capsys.readouterr()
    assert code == 2
    assert "damaged file" in err and "xl/worksheets/sheet2.xml" in err
    assert "not well-formed XML" in err and err.count("\n") == 1


def _cleared_copy(source, target, sheet_name, ref):
    """The workbook as a spreadsheet saves it after the Delete key on one input cell: the cell
    keeps its style and loses its value; every other byte as it was."""
    import re
    from stillair.addin.workbook.reader import read_book
    part = read_book(str(source)).sheet(sheet_name).part
    with zipfile.ZipFile(source) as zin, zipfile.ZipFile(target, "w") as zout:
        for item in zin.infolist():
            data = zin.read(item.filename)
            if item.filename == part:
                data, count = re.subn(rb'<c r="' + ref.encode() + rb'"([^>]*?)(?: t="[^"]*")?([^>]*)>.*?</c>',
                                      rb'<c r="' + ref.encode() + rb'"\1\2/>', data, count=1,
                                      flags=re.S)
                assert count == 1
            zout.writestr(item, data)


def test_the_audit_names_a_cleared_required_input_first(tmp_path):
    """The cabinet with its dissipation cleared (Inputs!B24) and saved without recalculation:
    the audit's first finding is the blank input, by name; what follows from it comes after."""
    from stillair.addin.audit.check import audit_book
    cleared = tmp_path / "cleared.xlsx"
    _cleared_copy(CABINET, cleared, "Inputs", "B24")
    result = audit_book(str(cleared))
    first = result.findings[0]
    assert first.cell == "Inputs!B24" and "required input dissipation is blank" in first.message
    mismatches = [f for f in result.findings if f.kind == "mismatch"]
    assert mismatches and all("follows from Inputs!B24" in f.message for f in mismatches)


def test_calc_on_a_template_with_a_cleared_input_says_which_and_exits_1(cabinet, capsys):
    code, out, _ = _run(capsys, cabinet, "--set", "dissipation=")
    assert code == 1
    assert "INPUT MISSING: 1 required input is blank: Inputs!B24 (dissipation)" in out
    results = out.split("Results:")[1].split("Notes")[0]
    assert "INPUT MISSING" in results and "°C" in results
