"""`stillair calc`, `stillair functions` and `stillair excel-setup` from the command line."""

from __future__ import annotations

import json
import os
import zipfile

import pytest
import xlsxwriter

import stillair
from stillair.addin.cli import main
from stillair.addin.cells.reference import reference_markdown


@pytest.fixture(scope="module")
def small_book(tmp_path_factory):
    path = tmp_path_factory.mktemp("cli") / "gap.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Gap")
    ws.write("A1", "Ra"); ws.write("B1", 1e8)
    ws.write("A2", "Pr"); ws.write("B2", 0.71)
    ws.write("A3", "Nu"); ws.write_formula("B3", "=NU_VPLATE(B1,B2)")
    ws.write("A4", "note"); ws.write_formula("B4", '=NU_NOTE("vplate",B1,B2)')
    wb.define_name("ra", "=Gap!$B$1")
    wb.define_name("nu", "=Gap!$B$3")
    wb.close()
    return path


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_json_shape_and_set_by_name_and_by_cell(small_book, capsys):
    code, out, _ = run(capsys, "calc", small_book, "--json", "--set", "ra=1e14", "--set", "Gap!B2=0.72")
    assert code == 0
    data = json.loads(out)
    assert set(data) == {"values", "names", "notes"}
    full = stillair.nusselt("vplate", "auto", None, ra=1e14, pr=0.72).scalar()
    assert data["values"]["Gap!B3"] == pytest.approx(float(full.nu), rel=1e-12)
    assert data["values"]["Gap!B4"] == full.note
    assert data["names"] == {"ra": 1e14, "nu": data["values"]["Gap!B3"]}
    assert data["notes"] == [{"cell": "Gap!B3", "message": f"NU_VPLATE: outside validity range: {full.note}"}]


def test_text_output_lists_names_and_notes(small_book, capsys):
    code, out, _ = run(capsys, "calc", small_book)
    assert code == 0
    assert "Defined names:" in out and "nu" in out
    assert "Notes: none" in out


def test_an_own_workbook_prints_every_cell_of_ours_by_sheet_then_the_names(tmp_path, capsys):
    """Not a template: each cell calling one of our functions with its caption, value, unit
    and note, grouped by sheet; then the defined names."""
    import sys
    from pathlib import Path
    sys.path.insert(0, str(Path(__file__).parent))
    from iterative_books import plate_loop
    path = plate_loop(tmp_path / "plate.xlsx", 100, 1e-9)
    code, out, _ = run(capsys, "calc", path)
    assert code == 0
    lines = out.splitlines()
    start = lines.index("Plate:")
    assert lines[start + 1].split()[:3] == ["B8", "h", "conv"]
    assert lines[start + 1].endswith("W/(m²·K)")
    assert lines[start + 2].split()[:3] == ["B9", "h", "rad"]


def test_out_copy_and_refusals(small_book, tmp_path, capsys):
    out_path = tmp_path / "filled.xlsx"
    code, _, _ = run(capsys, "calc", small_book, "--out", out_path, "--set", "Gap!B1=2e8")
    assert code == 0
    import openpyxl
    values = openpyxl.load_workbook(out_path, data_only=True)["Gap"]
    formulas = openpyxl.load_workbook(out_path)["Gap"]
    assert values["B1"].value == 2e8                       # the --set input is in the copy
    assert values["B3"].value == pytest.approx(stillair.nu_vplate(2e8, 0.71), rel=1e-12)
    assert formulas["B3"].value == "=NU_VPLATE(B1,B2)"
    before = os.path.getmtime(small_book)
    # Same file, through a symlink, and differing only by case: all refused, input untouched.
    link = tmp_path / "link.xlsx"
    link.symlink_to(small_book)
    for target in (small_book, link, str(small_book)[:-5] + ".XLSX"):
        code, _, err = run(capsys, "calc", small_book, "--out", target)
        assert code == 2 and "refusing to write over the input workbook" in err
    assert os.path.getmtime(small_book) == before


def test_bad_files_give_one_line_and_exit_2(tmp_path, capsys):
    text = tmp_path / "notes.xlsx"
    text.write_text("not a workbook")
    empty_zip = tmp_path / "empty.xlsx"
    with zipfile.ZipFile(empty_zip, "w") as z:
        z.writestr("hello.txt", "x")
    for path, reason in ((tmp_path / "missing.xlsx", "no such file"),
                         (text, "not an .xlsx/.xlsm workbook"),
                         (empty_zip, "no xl/workbook.xml")):
        code, out, err = run(capsys, "calc", path)
        assert code == 2 and out == ""
        assert err.count("\n") == 1 and reason in err


def test_bad_set_arguments(small_book, capsys):
    code, _, err = run(capsys, "calc", small_book, "--set", "B1")
    assert code == 2 and "expected REF=VALUE" in err
    code, _, err = run(capsys, "calc", small_book, "--set", "Nope!B1=1")
    assert code == 2 and "no sheet named 'Nope'" in err
    code, _, err = run(capsys, "calc", small_book, "--set", "gap=1")
    assert code == 2 and "not a cell reference" in err


def test_functions_reference(capsys):
    code, out, _ = run(capsys, "functions", "--markdown")
    assert code == 0 and out == reference_markdown()
    code, out, _ = run(capsys, "functions")
    assert "H_CAVITY(t1, t2, gap, height, [tilt], [gas], [pressure], [method]) -> W/(m²·K)" in out


def test_excel_setup_dry_run_writes_nothing_and_keeps_user_settings(tmp_path, capsys, monkeypatch):
    from stillair.addin.excel import setup as excel_setup
    home = tmp_path / "home"
    conf = home / ".xlwings" / "xlwings.conf"
    conf.parent.mkdir(parents=True)
    conf.write_text('"UDF MODULES","mytools"\n"LICENSE_KEY","abc"\n')
    original = conf.read_bytes()
    assert excel_setup.run(dry_run=True, home=home) == 0
    out = capsys.readouterr().out
    assert conf.read_bytes() == original and not (home / ".stillair").exists()
    assert "would add" in out and "kept your setting: UDF MODULES" in out
    assert excel_setup.run(dry_run=False, home=home) == 0
    text = conf.read_text()
    assert text.startswith(original.decode())                 # nothing of the user's changed
    assert '"UDF MODULES","mytools"' in text and "stillair.addin.xlfuncs" not in text
    assert '"INTERPRETER_WIN",' in text
    assert list(conf.parent.glob("xlwings.conf.bak-*"))        # backup of the previous file
    custom = (home / ".stillair" / "stillair.conf").read_text()
    assert '"UDF MODULES","stillair.addin.xlfuncs"' in custom
    capsys.readouterr()
    excel_setup.run(dry_run=False, home=home)                  # idempotent
    assert "nothing to add" in capsys.readouterr().out


def test_a_formula_that_cannot_be_evaluated_is_a_note_and_exit_1(tmp_path, capsys, monkeypatch):
    from stillair.addin.workbook import safezip
    path = tmp_path / "indirect.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Gap")
    ws.write("B1", 1e8)
    ws.write("B2", 0.71)
    ws.write_formula("B3", "=NU_VPLATE(B1,B2)")
    ws.write_formula("B4", '=INDIRECT("B3")*2', None, 123.0)
    ws.write_formula("B5", "=B4+1", None, 124.0)
    wb.close()
    checks = []
    original = safezip.check_archive
    monkeypatch.setattr(safezip, "check_archive", lambda *a, **k: (checks.append(a[1]),
                                                                     original(*a, **k))[1])
    out_path = tmp_path / "out.xlsx"
    code, out, err = run(capsys, "calc", path, "--out", out_path)
    assert code == 1 and err == ""
    assert checks == [str(path)]               # opened and checked once for calc and --out
    assert ("Gap!B4: cannot evaluate: INDIRECT builds its reference from text while calculating; "
            "it is not supported headlessly") in out
    assert "Gap!B5: depends on Gap!B4, which cannot be evaluated" in out
    import openpyxl
    values = openpyxl.load_workbook(out_path, data_only=True)["Gap"]
    assert values["B3"].value == pytest.approx(stillair.nu_vplate(1e8, 0.71), rel=1e-12)
    assert (values["B4"].value, values["B5"].value) == (123.0, 124.0)   # left as they were
    code, out, _ = run(capsys, "calc", path, "--json")
    data = json.loads(out)
    assert code == 1 and data["values"]["Gap!B4"] is None
    assert [n["cell"] for n in data["notes"]] == ["Gap!B4", "Gap!B5"]


def test_work_beyond_the_limit_is_refused_before_calculating(tmp_path, capsys, monkeypatch):
    """Running totals over whole columns: each formula reads the used range, so the cells read
    grow with the square of the rows; above the limit both commands refuse with the count."""
    from stillair.addin.audit import check as audit
    from stillair.addin.workbook import model as headless
    path = tmp_path / "totals.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("T")
    for r in range(1, 201):
        ws.write(f"A{r}", float(r))
        ws.write_formula(f"B{r}", f"=SUM(A:A)-A{r}+H_RAD(20,10,0.9)")
    wb.close()
    monkeypatch.setattr(headless, "MAX_CELLS_READ", 10_000)
    code, out, err = run(capsys, "calc", path)
    assert code == 2 and out == ""
    assert err.strip().endswith("refused: its formulas read 40,200 cells in all (each formula's "
                                "ranges counted), more than the limit of 10,000 that keeps calc "
                                "and the audit bounded in time")
    assert audit.main([str(path)]) == 2
    assert "refused: its formulas read 40,200 cells" in capsys.readouterr().err
    monkeypatch.setattr(headless, "MAX_CELLS_READ", 50_000)
    code, out, _ = run(capsys, "calc", path, "--json")
    assert code == 0 and json.loads(out)["values"]["T!B200"] == pytest.approx(
        sum(range(1, 200)) + stillair.h_rad(20, 10, 0.9), rel=1e-12)


def test_a_note_many_cells_share_names_them_as_ranges(tmp_path, capsys):
    """A block of cells with one message (a table row by row) is printed as rectangles, not one
    cell after another; the exact message is the cell function's own."""
    path = tmp_path / "block.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Tables")
    for row in range(33, 36):                      # D34:F36, nine cells with the same bad gap
        for col in range(3, 6):
            ws.write_formula(row, col, "=H_CAVITY(20, 10, -0.01, 1)")
    ws.write_formula("H2", "=H_CAVITY(20, 10, -0.01, 1)")
    wb.close()
    code, out, _ = run(capsys, "calc", path)
    assert code == 1
    assert "  Tables!H2, Tables!D34:F36: H_CAVITY: gap must be > 0 m, got -0.01" in out.splitlines()
    assert out.splitlines()[-1].startswith("10 formula cells are errors or cannot be evaluated "
                                           "(Tables!H2, Tables!D34:F36; see the notes)")


@pytest.mark.parametrize("cells, shown", [
    (["S!D34", "S!E34", "S!F34", "S!D35", "S!E35", "S!F35"], "S!D34:F35"),
    (["S!B3", "S!B4", "S!B5", "S!D2"], "S!D2, S!B3:B5"),
    (["S!B3", "T!A1", "S!B4", "(workbook)", "S!C3"], "S!B3:C3, S!B4, T!A1, (workbook)"),
    (["'My sheet'!AA10", "'My sheet'!AB10", "S!A1"], "'My sheet'!AA10:AB10, S!A1"),
    (["S!A1", "S!A1"], "S!A1"),
])
def test_cells_compress_to_rectangles_in_reading_order(cells, shown):
    from stillair.addin.workbook.report import compress_cells

    assert compress_cells(cells) == shown
