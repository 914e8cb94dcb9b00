"""`stillair audit DIR`: every workbook in a folder, one line each, the worst exit status."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import openpyxl
import pytest

from stillair.addin.audit.folder import find_workbooks
from stillair.addin.cli import main

ROOT = Path(__file__).resolve().parents[1]
TEMPLATES = sorted((ROOT / "templates").glob("*.xlsx"))


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(scope="module")
def folder(tmp_path_factory):
    """Every committed template, one copy edited as a user would (a result typed over), one
    file that is not a workbook, and an Excel lock file, in a folder and a sub-folder."""
    base = tmp_path_factory.mktemp("books")
    for template in TEMPLATES:
        shutil.copy(template, base / template.name)
    (base / "jobs").mkdir()
    assert main(["calc", str(ROOT / "templates" / "air-layer.xlsx"), "--set", "h_conv=2.5", "--replace-formula",
                 "--out", str(base / "jobs" / "edited-air-layer.xlsx")]) == 0
    (base / "jobs" / "notes.xlsx").write_bytes(b"not a zip at all")
    (base / "jobs" / "~$edited-air-layer.xlsx").write_bytes(b"\x00lock")
    (base / "jobs" / "readme.txt").write_text("not a workbook", encoding="utf-8")
    return base


def test_the_walk_finds_workbooks_below_and_leaves_lock_files_and_other_files(tmp_path):
    for name in ("b.xlsx", "A.XLSM", "jobs/c.xlsx", "jobs/~$c.xlsx", "jobs/.~lock.c.xlsx#",
                 "jobs/readme.txt", "jobs/plan.ods"):
        (tmp_path / name).parent.mkdir(exist_ok=True)
        (tmp_path / name).write_bytes(b"")
    books, skipped = find_workbooks(str(tmp_path), ods=False)
    assert [Path(b).relative_to(tmp_path).as_posix() for b in books] == ["A.XLSM", "b.xlsx", "jobs/c.xlsx"]
    assert skipped == [str(tmp_path / "jobs" / "plan.ods")]
    books, skipped = find_workbooks(str(tmp_path), ods=True)
    assert str(tmp_path / "jobs" / "plan.ods") in books and skipped == []


@pytest.mark.slow  # audits the eight templates and the edited copy (several seconds)
def test_one_line_per_book_a_total_and_the_worst_exit_status(folder, tmp_path, capsys):
    report = tmp_path / "REPORT.xlsx"
    code, out, err = run(capsys, "audit", folder, "--report", report)
    lines = out.rstrip("\n").split("\n")
    by_book = {line.split()[1]: line for line in lines[:-2]}
    assert len(by_book) == len(TEMPLATES) + 2
    for template in TEMPLATES:
        line = by_book[str(folder / template.name)]
        if template.stem == "cabinet-day":   # its dawn-and-dusk range notes (tests/test_audit.py)
            # counted in cells, each note once for the cells it covers (it was "166 ok, 504
            # out-of-range - 504 findings": findings counted as cells, one per cell and note)
            assert line.startswith("findings ") and "mismatch" not in line
            assert line.endswith(" cells checked: 166 ok, 252 out-of-range - 4 findings"), line
            continue
        assert line.startswith("clean ") and line.endswith("- no findings")
    edited = by_book[str(folder / "jobs" / "edited-air-layer.xlsx")]
    assert edited.startswith("findings ") and "11 mismatch - 11 findings" in edited
    broken = by_book[str(folder / "jobs" / "notes.xlsx")]
    assert broken.startswith("unreadable ") and "not an .xlsx/.xlsm workbook" in broken
    assert lines[-2] == f"{len(TEMPLATES) + 2} workbooks: {len(TEMPLATES) - 1} clean, 2 with findings, " \
                        "1 could not be read"
    assert lines[-1] == f"report: {report}"
    assert code == 2 and err == ""   # the unreadable file is the worst

    wb = openpyxl.load_workbook(report, read_only=True)
    assert wb.sheetnames == ["Books", "Findings"]
    books = list(wb["Books"].iter_rows(values_only=True))
    assert books[0] == ("workbook", "state", "exit status", "summary")
    findings = list(wb["Findings"].iter_rows(values_only=True))
    assert findings[0][:3] == ("workbook", "kind", "cell")
    edited_rows = [row for row in findings[1:] if str(row[0]).endswith("edited-air-layer.xlsx")]
    assert len(edited_rows) == 11
    others = [row[:2] for row in findings[1:] if not str(row[0]).endswith("edited-air-layer.xlsx")]
    assert all(row == (others[0][0], "out-of-range") and str(row[0]).endswith("cabinet-day.xlsx") for row in others), others[:3]
    assert len(others) == 4   # the cabinet day's two notes, from NET_PEAK and NET_TRANSIENT
    assert all(row[1] == "mismatch" for row in edited_rows)

    # Without the unreadable file the worst is the findings: 1; --json carries each book's own
    # audit object; two jobs give what one gives.
    (folder / "jobs" / "notes.xlsx").rename(folder / "jobs" / "notes.bin")
    try:
        code, out, _ = run(capsys, "audit", folder / "jobs", "--json")
        data = json.loads(out)
        assert code == 1 and data["exit"] == 1
        (book,) = data["books"]
        assert book["book"] == str(folder / "jobs" / "edited-air-layer.xlsx")
        assert book["counts"]["mismatch"] == 11
        one = run(capsys, "audit", folder, "--jobs", "1")
        two = run(capsys, "audit", folder, "--jobs", "2")
        assert one == two and one[0] == 1
    finally:
        (folder / "jobs" / "notes.bin").rename(folder / "jobs" / "notes.xlsx")


def test_a_folder_without_workbooks_could_not_run(tmp_path, capsys):
    (tmp_path / "readme.txt").write_text("x", encoding="utf-8")
    code, out, err = run(capsys, "audit", tmp_path)
    assert code == 2 and out == ""
    assert err.startswith(f"stillair audit: {tmp_path}: no workbook (.xlsx, .xlsm")


def test_an_unreadable_book_is_a_line_not_a_stop(tmp_path, capsys):
    (tmp_path / "a.xlsx").write_bytes(b"junk")
    (tmp_path / "b.xlsm").write_bytes(b"PK\x03\x04junk")
    code, out, err = run(capsys, "audit", tmp_path)
    lines = out.rstrip("\n").split("\n")
    assert [line.split()[:2] for line in lines[:2]] == [["unreadable", str(tmp_path / "a.xlsx")],
                                                        ["unreadable", str(tmp_path / "b.xlsm")]]
    assert lines[2] == "2 workbooks: 0 clean, 2 could not be read"
    assert code == 2


def test_bad_jobs_is_refused(tmp_path, capsys):
    (tmp_path / "a.xlsx").write_bytes(b"junk")
    code, out, err = run(capsys, "audit", tmp_path, "--jobs", "-1")
    assert code == 2 and out == "" and "--jobs must be a whole number from 1 to" in err
