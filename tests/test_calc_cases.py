"""`stillair calc BOOK --cases CASES.csv`: one prepared workbook, one calculation per row."""

from __future__ import annotations

import csv
import io
import json
import sys
from pathlib import Path

import pytest
import xlsxwriter

import stillair
from stillair.addin.cli import main
from stillair.addin.workbook.cases import read_cases, result_columns
from stillair.addin.workbook.reader import BookError, read_book

ROOT = Path(__file__).resolve().parents[1]
CABINET = ROOT / "templates" / "sealed-cabinet.xlsx"
EXAMPLE = ROOT / "docs" / "examples" / "sealed-cabinet-cases.csv"


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def rows_of(text: str) -> list[dict]:
    return list(csv.DictReader(io.StringIO(text)))


@pytest.fixture(scope="module")
def plate_book(tmp_path_factory):
    """A small workbook: Nu of a vertical plate from Ra and Pr, with names."""
    path = tmp_path_factory.mktemp("cases") / "plate.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Plate")
    ws.write("A1", "Ra"); ws.write("B1", 1e8)
    ws.write("A2", "Pr"); ws.write("B2", 0.71)
    ws.write("A3", "Nu"); ws.write_formula("B3", "=NU_VPLATE(B1,B2)")
    ws.write("A4", "twice"); ws.write_formula("B4", "=2*B3")
    wb.define_name("ra", "=Plate!$B$1")
    wb.define_name("pr", "=Plate!$B$2")
    wb.define_name("nu", "=Plate!$B$3")
    wb.define_name("nu_twice", "=Plate!$B$4")
    wb.close()
    return path


def write_cases(tmp_path, text, name="cases.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_each_row_is_the_engine_value_and_a_failing_row_stays_in_its_row(plate_book, tmp_path, capsys):
    cases = write_cases(tmp_path, "ra,Plate!B2\n1e6,0.71\n1e9,0.70,9\n1e10,0.72\n\n")
    code, out, err = run(capsys, "calc", plate_book, "--cases", cases)
    rows = rows_of(out)
    # Named results only (ra and pr are the inputs, not results); status and notes last.
    assert list(rows[0]) == ["line", "ra", "Plate!B2", "nu", "nu_twice", "status", "notes"]
    assert [r["line"] for r in rows] == ["2", "3", "4"]
    for row, (ra, pr) in zip((rows[0], rows[2]), ((1e6, 0.71), (1e10, 0.72))):
        expected = stillair.nu_vplate(ra, pr)   # Churchill-Chu, the engine's own value
        assert float(row["nu"]) == pytest.approx(expected, rel=1e-12)
        assert float(row["nu_twice"]) == pytest.approx(2 * expected, rel=1e-12)
        assert row["status"] == "ok" and row["notes"] == ""
    failed = rows[1]
    assert failed["status"] == "failed" and failed["nu"] == ""
    assert failed["notes"] == "line 3 has 3 fields, the header names 2 inputs"
    # The worst row decides the exit status; the summary goes to stderr (stdout is the CSV).
    assert code == 2
    assert err.strip() == ("stillair calc: 3 cases: 2 ok, 1 failed (first failure, line 3: "
                           "line 3 has 3 fields, the header names 2 inputs)")


@pytest.mark.slow  # prepares the cabinet template and calculates it six times (about 2 s)
def test_a_row_equals_a_single_calc_with_set_of_the_same_inputs(tmp_path, capsys):
    code, out, _ = run(capsys, "calc", CABINET, "--cases", EXAMPLE)
    assert code == 0
    rows = rows_of(out)
    table = read_cases(str(EXAMPLE))
    assert len(rows) == len(table.rows) == 4
    for row in (rows[0], rows[-1]):
        sets = [a for h in table.headers for a in ("--set", f"{h}={row[h]}")]
        single_code, single_out, _ = run(capsys, "calc", CABINET, "--json", *sets)
        assert single_code == 0
        names = json.loads(single_out)["names"]
        compared = 0
        for column, text in row.items():
            if column in names and column not in table.headers and isinstance(names[column], float):
                assert float(text) == pytest.approx(names[column], rel=1e-12, abs=1e-12), column
                compared += 1
        assert compared > 30
        assert row["status"] == "ok"


def test_a_value_the_workbook_cannot_use_is_an_error_row_naming_the_cell(tmp_path, capsys):
    cases = write_cases(tmp_path, "dissipation\n150\nlots\n")
    code, out, err = run(capsys, "calc", CABINET, "--cases", cases)
    good, bad = rows_of(out)
    assert good["status"] == "ok"
    assert bad["status"] in ("error", "failed")
    assert bad["notes"]   # says which cell and why
    assert code in (1, 2)


def test_the_workbooks_input_rules_apply_to_every_row(tmp_path, capsys):
    """A row whose value the input cell's data-validation rule refuses (the cabinet allows
    -60..60 degC of ambient; 303.15 is a kelvin value) fails in its row with the rule's own
    message, as --set does; the other rows go on (issue 21)."""
    cases = write_cases(tmp_path, "ambient_t\n25\n303.15\n30\n")
    code, out, err = run(capsys, "calc", CABINET, "--cases", cases)
    first, kelvin, last = rows_of(out)
    assert first["status"] == last["status"] == "ok"
    assert kelvin["status"] == "failed"
    assert kelvin["notes"].startswith("ambient_t=303.15: Inputs!") and "refuses 303.15" in kelvin["notes"]
    code_set, _, err_set = run(capsys, "calc", CABINET, "--set", "ambient_t=303.15")
    assert code_set == 2 and err_set.split("refuses 303.15: ")[1].strip() == \
        kelvin["notes"].split("refuses 303.15: ")[1].strip()


def test_without_names_the_results_sheet_is_reported(tmp_path):
    path = tmp_path / "unnamed.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    wb.add_worksheet("Inputs").write("B1", 1e8)
    results = wb.add_worksheet("Results")
    results.write("A3", "Nu"); results.write_formula("B3", "=NU_VPLATE(Inputs!B1,0.71)")
    results.write_formula("B4", "=B3/2")
    wb.close()
    book = read_book(str(path))
    assert result_columns(book) == [("Results!B3", ("Results", "B3")), ("Results!B4", ("Results", "B4"))]


@pytest.mark.parametrize("text, message", [
    ("", "no header line"),
    ("ra,,pr\n1,2,3\n", "column 2 of the header is blank"),
    ("ra,RA\n1,2\n", "the header names 'RA' twice (columns 1 and 2)"),
    ("ra,Plate!B1\n1,2\n", "columns 'ra' and 'Plate!B1' name the same cell Plate!B1"),
    ("rayleigh\n1\n", "column 1 (rayleigh): not a cell reference (Sheet!B3) or a defined name"),
    ("Nosheet!B1\n1\n", "column 1 (Nosheet!B1): no sheet named 'Nosheet'"),
])
def test_a_header_no_row_could_use_stops_with_one_line(plate_book, tmp_path, capsys, text, message):
    cases = write_cases(tmp_path, text)
    code, out, err = run(capsys, "calc", plate_book, "--cases", cases)
    assert code == 2 and out == ""
    assert err.startswith(f"stillair calc: {cases}: ") and message in err
    assert err.count("\n") == 1


def test_results_go_to_a_new_file_only(plate_book, tmp_path, capsys):
    cases = write_cases(tmp_path, "ra\n1e6\n")
    existing = tmp_path / "results.csv"
    existing.write_bytes(b"keep me")
    code, out, err = run(capsys, "calc", plate_book, "--cases", cases, "--out", existing)
    assert code == 2 and existing.read_bytes() == b"keep me"
    assert "exists; stillair never writes over a file" in err

    fresh = tmp_path / "fresh.csv"
    code, out, err = run(capsys, "calc", plate_book, "--cases", cases, "--out", fresh)
    assert code == 0 and err == ""
    assert out.strip() == f"1 case: 1 ok; wrote {fresh}"
    (row,) = rows_of(fresh.read_text(encoding="utf-8"))
    assert float(row["nu"]) == pytest.approx(stillair.nu_vplate(1e6, 0.71), rel=1e-12)


@pytest.mark.parametrize("argv, message", [
    (["--jobs", "0"], "--jobs must be a whole number from 1 to"),
    (["--set", "ra=1"], "--cases takes neither --set nor --json"),
    (["--json"], "--cases takes neither --set nor --json"),
    (["--out", "results.xlsx"], "--out results.xlsx: with --cases the results are CSV"),
])
def test_options_that_do_not_go_with_cases(plate_book, tmp_path, capsys, argv, message):
    cases = write_cases(tmp_path, "ra\n1e6\n")
    code, out, err = run(capsys, "calc", plate_book, "--cases", cases, *argv)
    assert code == 2 and out == "" and message in err


def test_missing_cases_file(plate_book, tmp_path, capsys):
    code, _, err = run(capsys, "calc", plate_book, "--cases", tmp_path / "none.csv")
    assert code == 2 and err.strip() == f"stillair calc: {tmp_path / 'none.csv'}: no such file"


def test_semicolons_and_excel_byte_order_mark(plate_book, tmp_path):
    cases = tmp_path / "excel.csv"
    cases.write_bytes("\ufeffra;pr\n1e6;0.7\n".encode("utf-8"))
    table = read_cases(str(cases))
    assert table.headers == ("ra", "pr") and table.rows == ((2, ("1e6", "0.7")),)
    cases.write_bytes(b"ra\n\xff\n")
    with pytest.raises(BookError, match="not UTF-8 text"):
        read_cases(str(cases))


@pytest.mark.slow  # starts two worker processes, each preparing the template (several seconds)
def test_two_jobs_write_what_one_job_writes(tmp_path, capsys):
    lines = ["dissipation,ambient_t"] + [f"{100 + 10 * i},{20 + i}" for i in range(12)] + ["x,y,z"]
    cases = write_cases(tmp_path, "\n".join(lines) + "\n")
    one = run(capsys, "calc", CABINET, "--cases", cases, "--jobs", "1")
    two = run(capsys, "calc", CABINET, "--cases", cases, "--jobs", "2")
    assert one == two
    assert one[0] == 2 and rows_of(one[1])[-1]["status"] == "failed"


class _Terminal(io.StringIO):
    def isatty(self):
        return True


def test_the_progress_bar_shows_on_a_terminal_only_and_after_its_delay(monkeypatch):
    from stillair.addin.workbook import batch

    # formulas_bridge sets TQDM_DISABLE for formulas' own bar; ours decides for itself.
    monkeypatch.setenv("TQDM_DISABLE", "1")
    monkeypatch.setattr("sys.stderr", _Terminal())
    monkeypatch.setattr(batch, "PROGRESS_DELAY", 0.0)
    with batch.progress_bar(4, "case") as bar:
        bar.update(4)
    assert "0/4 [" in sys.stderr.getvalue()   # drawn (and cleared when done: leave=False)
    monkeypatch.setattr("sys.stderr", io.StringIO())   # a file or a pipe: no bar
    with batch.progress_bar(4, "case") as bar:
        assert bar.disable
        bar.update(4)
    assert sys.stderr.getvalue() == ""


def test_text_from_the_workbook_stays_text_in_a_spreadsheet(tmp_path, capsys):
    path = tmp_path / "texts.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("S")
    ws.write("A1", "x")
    ws.write_formula("B1", '="=HYPERLINK(""http://example.invalid"")"&A1')
    ws.write_formula("B2", "=-2*LEN(A1)")
    wb.define_name("link", "=S!$B$1")
    wb.define_name("minus", "=S!$B$2")
    wb.close()
    cases = write_cases(tmp_path, "S!A1\nab\n")
    code, out, _ = run(capsys, "calc", path, "--cases", cases)
    (row,) = rows_of(out)
    assert row["link"] == "'=HYPERLINK(\"http://example.invalid\")ab"   # shown as text
    assert row["minus"] == "-4.0"                                        # a number stays a number
    assert code == 0
