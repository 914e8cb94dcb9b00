"""End to end in LibreOffice Calc: the extension built by `stillair libreoffice-setup`, installed
into a fresh profile and an isolated shared-extension cache, computes every template and a workbook
typed through LibreOffice's API exactly as `stillair calc` and the cell call path do.

Needs LibreOffice (Debian: libreoffice-calc, python3-uno, libreoffice-script-provider-python) and
the SDK's unoidl-write (libreoffice-dev); skipped with that reason when they are missing.
"""

from __future__ import annotations

import json
import math
import shutil
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest
import xlsxwriter

from stillair.addin.cells.callpath import call
from stillair.addin.cli import main
from stillair.addin.libreoffice.setup import libreoffice_environment

pytestmark = pytest.mark.slow  # drives LibreOffice with the extension installed

ROOT = Path(__file__).resolve().parent.parent
SESSION = Path(__file__).resolve().parent / "libreoffice" / "session.py"
TEMPLATES = sorted((ROOT / "templates").glob("*.xlsx"))
COMPARED_SHEETS = ("Calculation", "Results")
OPTIONAL_SHEETS = ("Network",)   # own-network's typed tables and their row-by-row solution
RTOL = 1e-6
# LibreOffice, like Excel, returns exactly 0 for a difference of two nearly equal numbers (an
# energy balance's residual, 4e-13 W of 426 W, computes as 0); below this magnitude both values
# are zero for every quantity in these workbooks.
ZERO = 1e-9
ENABLE = ("install LibreOffice and its SDK to run it (Debian/Ubuntu: apt-get install "
          "libreoffice-calc python3-uno libreoffice-script-provider-python libreoffice-dev)")


def _tools():
    from stillair.addin.libreoffice.build import ToolMissing, find_program_dir, find_unoidl_write
    from stillair.addin.libreoffice.setup import libreoffice_python

    try:
        program = find_program_dir()
        find_unoidl_write(program)
    except ToolMissing as error:
        pytest.skip(f"LibreOffice end-to-end test: {error}; {ENABLE}", allow_module_level=True)
    python = libreoffice_python(program)
    probe = subprocess.run([str(python), "-c", "import sys, uno; print('%d.%d' % sys.version_info[:2])"],
                           capture_output=True, text=True, env=libreoffice_environment()) if python else None
    if probe is None or probe.returncode:
        pytest.skip(f"LibreOffice end-to-end test: LibreOffice's Python cannot import uno; {ENABLE}",
                    allow_module_level=True)
    here = "%d.%d" % sys.version_info[:2]
    if probe.stdout.strip() != here:
        pytest.skip(f"LibreOffice end-to-end test: LibreOffice runs Python {probe.stdout.strip()}, this "
                    f"environment is Python {here}; run the tests from a Python {probe.stdout.strip()} "
                    "environment (stillair's compiled dependencies must match LibreOffice's Python)",
                    allow_module_level=True)
    return program, python


PROGRAM, LO_PYTHON = _tools()


@pytest.fixture(scope="module")
def installation(tmp_path_factory):
    """`stillair libreoffice-setup` into a fresh profile and an isolated shared cache."""
    base = tmp_path_factory.mktemp("libreoffice")
    profile, cache = base / "profile", base / "shared"
    assert main(["libreoffice-setup", "--profile", str(profile), "--shared-cache", str(cache)]) == 0
    return {"profile": str(profile), "shared_cache": str(cache), "soffice": str(PROGRAM / "soffice")}


def run_session(installation, jobs, tmp_path) -> list[dict]:
    request = tmp_path / "request.json"
    request.write_text(json.dumps(dict(installation, jobs=jobs)), encoding="utf-8")
    done = subprocess.run([str(LO_PYTHON), str(SESSION), str(request)], capture_output=True,
                          text=True, timeout=1800, cwd=tmp_path, env=libreoffice_environment())
    assert done.returncode == 0, done.stderr[-2000:]
    results = json.loads(done.stdout)["results"]
    for result in results:
        assert "failed" not in result, result["failed"]
    return results


def lo_value(item):
    """A LibreOffice cell as `stillair calc` reports it: float, or text (errors as their text)."""
    return item["value"] if "value" in item else item["text"]


def relative_difference(a, b) -> float:
    if a == b:
        return 0.0
    return abs(a - b) / max(abs(a), abs(b))


def same(expected, actual) -> tuple[bool, float]:
    """(equal within RTOL, relative difference) for numbers; exact equality for text."""
    if isinstance(expected, bool):
        expected = float(expected)
    if expected is None:
        expected = ""
    if isinstance(expected, float) and isinstance(actual, float):
        if abs(expected) < ZERO and abs(actual) < ZERO:
            return True, 0.0
        diff = relative_difference(expected, actual)
        return diff <= RTOL, diff
    return expected == actual, 0.0 if expected == actual else math.inf


# ---------------------------------------------------------------------------------------------
# Every template, recalculated by LibreOffice, against `stillair calc`


@pytest.fixture(scope="module")
def templates_in_libreoffice(installation, tmp_path_factory):
    work = tmp_path_factory.mktemp("templates")
    copies = []
    for template in TEMPLATES:  # copies: LibreOffice writes lock files beside what it opens
        copies.append(work / template.name)
        shutil.copyfile(template, copies[-1])
    results = run_session(installation, [{"open": str(p)} for p in copies], work)
    return {Path(r["path"]).name: r for r in results}


@pytest.mark.parametrize("template", TEMPLATES, ids=[t.stem for t in TEMPLATES])
def test_template_recalculated_in_libreoffice_matches_calc(template, templates_in_libreoffice):
    from stillair.addin.workbook.model import evaluate_book

    calc = evaluate_book(str(template)).values
    lo = templates_in_libreoffice[template.name]["sheets"]
    compared, worst, failures = 0, 0.0, []
    for sheet in COMPARED_SHEETS + tuple(s for s in OPTIONAL_SHEETS if s in calc):
        assert sheet in lo, f"{template.name}: no {sheet} sheet in LibreOffice"
        assert set(lo[sheet]) == set(calc[sheet]), f"{template.name}!{sheet}: formula cells differ"
        for ref, item in lo[sheet].items():
            ok, diff = same(calc[sheet][ref], lo_value(item))
            compared += 1
            worst = max(worst, diff)
            if not ok:
                failures.append(f"{sheet}!{ref} {item['formula']}: calc {calc[sheet][ref]!r}, "
                                f"LibreOffice {lo_value(item)!r}")
    print(f"{template.name}: {compared} formula cells compared, max relative difference {worst:.3g}")
    assert not failures, "\n".join(failures[:20])
    assert compared > 0


# ---------------------------------------------------------------------------------------------
# A workbook typed through LibreOffice's API

BRANCHES = [["conv", "face", "room", "vplate", 0.6, 0.48, None, None, None, None],
            ["rad", "face", "room", "radiation", 0.9, None, 0.48, None, None, None]]
BOUNDARIES = [["face", "Q", 40.0], ["room", "T", 25.0]]
NET_ROWS = 1 + 2 + 2  # header, two nodes, two branches


def _table_cells(rows, top_left_row, first_column="D"):
    cells = {}
    for r, row in enumerate(rows):
        for c, value in enumerate(row):
            if value is not None:
                cells[f"{chr(ord(first_column) + c)}{top_left_row + r}"] = value
    return cells


TYPED = {
    "B1": ("=AIR_DENSITY(A1)", ("AIR_DENSITY", 20.0)),
    "B2": ("=AIR_DENSITY(A1;)", ("AIR_DENSITY", 20.0)),
    "B3": ("=H_CAVITY(15;5;0.016;1.2;;;;)", ("H_CAVITY", 15.0, 5.0, 0.016, 1.2)),
    "B4": ('=H_CAVITY(15;5;0.016;1.2;90;"argon:0.9, air:0.1")',
           ("H_CAVITY", 15.0, 5.0, 0.016, 1.2, 90.0, "argon:0.9, air:0.1")),
    "B5": ('=GAS_PRANDTL("argon:0.9, air:0.1";10)', ("GAS_PRANDTL", "argon:0.9, air:0.1", 10.0)),
    "B6": ('=AIR_DENSITY("x")', ("AIR_DENSITY", "x")),
    "B7": ('=NET_TEMP(D1:M2;D5:F6;"face")', ("NET_TEMP", BRANCHES, BOUNDARIES, "face")),
    "B8": ('=NET_HEAT(D1:M3;D5:F7;"conv";A3)', ("NET_HEAT", BRANCHES, BOUNDARIES, "conv")),
    "B9": ("=NET_CHECK(D1:M2;D5:F6)", ("NET_CHECK", BRANCHES, BOUNDARIES)),
    "B10": ('=H_VPLATE(60;20;0.5;A3;;A3)', ("H_VPLATE", 60.0, 20.0, 0.5)),  # empty text cells
    # LibreOffice passes a reference to an empty cell as 0 (README): tilt 0, not the default 90.
    "B14": ("=H_CAVITY(15;5;0.016;1.2;A3)", ("H_CAVITY", 15.0, 5.0, 0.016, 1.2, 0.0)),
    "B11": ('=NU_VPLATE(-1;0.7)', ("NU_VPLATE", -1.0, 0.7)),
    "B12": ("=AIR_DENSITY(A1:A2)", ("AIR_DENSITY", [[20.0], [None]])),
    "B13": ("=STILLAIR_VERSION()", ("STILLAIR_VERSION",)),
    "B15": ("=AIR_DENSITY(A1)", ("AIR_DENSITY", 20.0)),  # formatted 0.00 (FORMATS)
    "B16": ("=DEW_POINT(A1;0.5)", ("DEW_POINT", 20.0, 0.5)),
    "B17": ("=DEW_POINT(A1;50)", ("DEW_POINT", 20.0, 50.0)),   # a percentage typed: the message
    "B18": ('=NET_HEAT_FOR(D1:M2;D5:F6;"face";45)', ("NET_HEAT_FOR", BRANCHES, BOUNDARIES, "face", 45.0)),
}
FORMATS = {"B15": "0.00"}
ARRAYS = {f"A20:J{19 + NET_ROWS}": "=NET_SOLVE(D1:M2;D5:F6)",
          "P1:P2": "=AIR_DENSITY(A1:A2)",  # a range: one element per cell
          "Q1:Q2": "=AIR_DENSITY(A1)"}  # a single value: repeated in every cell, as in Excel


@pytest.fixture(scope="module")
def typed_workbook(installation, tmp_path_factory):
    work = tmp_path_factory.mktemp("typed")
    cells = {"A1": 20.0, **_table_cells(BRANCHES, 1), **_table_cells(BOUNDARIES, 5)}
    cells.update({ref: formula for ref, (formula, _) in TYPED.items()})
    saved = work / "typed-in-libreoffice.xlsx"
    job = {"type": {"Sheet1": cells},
           "arrays": {"Sheet1": ARRAYS}, "formats": {"Sheet1": FORMATS}, "save": str(saved)}
    reopened = work / "reopened.xlsx"
    typed = run_session(installation, [job], work)[0]["sheets"]["Sheet1"]
    shutil.copyfile(saved, reopened)
    again = run_session(installation, [{"open": str(reopened)}], work)[0]["sheets"]["Sheet1"]
    return typed, again, saved


@pytest.mark.parametrize("ref", sorted(TYPED, key=lambda r: int(r[1:])))
def test_typed_call_matches_the_cell_call_path(ref, typed_workbook):
    typed, _, _ = typed_workbook
    name, *args = TYPED[ref][1]
    expected = call(name, *args)
    if isinstance(expected, list):  # an array result shows its first element in a single cell
        expected = expected[0][0]
    ok, diff = same(expected, lo_value(typed[ref]))
    assert ok, f"{ref} {typed[ref]['formula']}: expected {expected!r}, LibreOffice {lo_value(typed[ref])!r}"


def test_error_text_is_the_excel_text(typed_workbook):
    typed, _, _ = typed_workbook
    assert typed["B6"]["text"] == "AIR_DENSITY: t must be a number, not text, got 'x'"
    assert typed["B11"]["text"] == call("NU_VPLATE", -1.0, 0.7)


def test_a_range_argument_spreads_over_an_array_formula(typed_workbook):
    typed, _, _ = typed_workbook
    expected = call("AIR_DENSITY", [[20.0], [None]])
    assert [lo_value(typed["P1"]), lo_value(typed["P2"])] == [expected[0][0], expected[1][0]]
    assert expected[1][0] == "AIR_DENSITY: t must be a number, got an empty cell"


def test_a_single_value_shows_as_a_plain_value(typed_workbook):
    """Functions that may return arrays are declared to return one (README): a single value
    comes back as a 1x1 array.  It must show exactly as a plain number or text would: with
    Calc's general format or the cell's own number format, as text for a message, and in every
    cell of an array formula."""
    typed, _, _ = typed_workbook
    density = call("AIR_DENSITY", 20.0)
    assert typed["B1"]["shown"] == format(density, ".15g")  # Calc's general format: 15 digits
    assert typed["B15"]["value"] == density and typed["B15"]["shown"] == f"{density:.2f}"
    assert typed["B6"]["shown"] == typed["B6"]["text"] and typed["B6"]["error"] == 0
    assert [lo_value(typed["Q1"]), lo_value(typed["Q2"])] == [density, density]


def test_net_solve_is_an_array_formula(typed_workbook):
    typed, _, _ = typed_workbook
    table = call("NET_SOLVE", BRANCHES, BOUNDARIES)
    assert len(table) == NET_ROWS
    for r, row in enumerate(table):
        for c, expected in enumerate(row):
            item = typed[f"{'ABCDEFGHIJ'[c]}{20 + r}"]
            assert item["formula"].startswith("{=") and "NET_SOLVE" in item["formula"]
            ok, _ = same(expected, lo_value(item))
            assert ok, f"row {r} column {c}: expected {expected!r}, LibreOffice {lo_value(item)!r}"


def test_saved_xlsx_reopens_with_the_same_results(typed_workbook):
    """Saved as .xlsx by LibreOffice, the workbook opens in LibreOffice again with the same
    results.  LibreOffice 7.4 writes the add-in's programmatic name into the file
    (ORG.STILLAIR.CALC.FUNCTIONS.H_CAVITY(...)), which the load job rebinds like Excel's forms."""
    typed, again, saved = typed_workbook
    with zipfile.ZipFile(saved) as book:
        sheet = next(n for n in book.namelist() if n.startswith("xl/worksheets/sheet"))
        xml = book.read(sheet).decode("utf-8")
    assert "ORG.STILLAIR.CALC.FUNCTIONS.H_CAVITY(" in xml.upper()
    for ref in list(TYPED) + ["P1", "P2", "Q1", "Q2"] + [
            f"{c}{r}" for c in "ABCDEFGHIJ" for r in range(20, 20 + NET_ROWS)]:
        assert same(lo_value(typed[ref]), lo_value(again[ref]))[0], (ref, typed[ref], again[ref])


# ---------------------------------------------------------------------------------------------
# Excel's add-in prefixes

PREFIXES = ["", "[1]!", "'C:\\Users\\someone\\AppData\\Roaming\\stillair.xlam'!", "_xll.",
            "_xludf.", "stillair.xlam!"]


def with_external_link(source: Path, target: Path, names: list[str]) -> None:
    """A copy of ``source`` with the externalLink part Excel writes beside ``[1]!NAME(`` calls
    of an add-in's functions (the add-in workbook and the names it provides)."""
    main_ns = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
    rel_ns = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
    link = (f'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<externalLink xmlns="{main_ns}" '
            f'xmlns:r="{rel_ns}"><externalBook r:id="rId1"><definedNames>'
            + "".join(f'<definedName name="{n}"/>' for n in names)
            + "</definedNames></externalBook></externalLink>")
    link_rels = ('<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<Relationships '
                 'xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship '
                 f'Id="rId1" Type="{rel_ns}/externalLinkPath" Target="file:///C:\\Users\\someone\\'
                 'AppData\\Roaming\\Microsoft\\AddIns\\stillair.xlam" TargetMode="External"/></Relationships>')
    edits = {
        "xl/workbook.xml": ("</sheets>", '</sheets><externalReferences><externalReference r:id="rId99"/>'
                                         "</externalReferences>"),
        "xl/_rels/workbook.xml.rels": ("</Relationships>", f'<Relationship Id="rId99" Type="{rel_ns}/'
                                       'externalLink" Target="externalLinks/externalLink1.xml"/></Relationships>'),
        "[Content_Types].xml": ("</Types>", '<Override PartName="/xl/externalLinks/externalLink1.xml" '
                                'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.'
                                'externalLink+xml"/></Types>'),
    }
    with zipfile.ZipFile(source) as zin, zipfile.ZipFile(target, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename in edits:
                old, new = edits[info.filename]
                data = data.decode("utf-8").replace(old, new, 1).encode("utf-8")
            zout.writestr(info, data)
        zout.writestr("xl/externalLinks/externalLink1.xml", link)
        zout.writestr("xl/externalLinks/_rels/externalLink1.xml.rels", link_rels)


def test_excel_prefixed_calls_are_rebound(installation, tmp_path):
    path = tmp_path / "prefixes.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Calc")
    ws.write("A1", 20.0)
    for row, prefix in enumerate(PREFIXES, start=2):
        ws.write_formula(f"B{row}", f"={prefix}AIR_DENSITY(A1)", None, 0)
        ws.write_formula(f"C{row}", f'=2*{prefix}H_CAVITY(15,5,0.016,1.2,,"air")', None, 0)
    wb.close()
    linked = tmp_path / "linked.xlsx"  # as Excel saves [1]!NAME calls: with the link part
    with_external_link(path, linked, ["AIR_DENSITY", "H_CAVITY"])
    density = call("AIR_DENSITY", 20.0)
    h = call("H_CAVITY", 15.0, 5.0, 0.016, 1.2, None, "air")
    for result in run_session(installation, [{"open": str(path)}, {"open": str(linked)}], tmp_path):
        cells = result["sheets"]["Calc"]
        for row, prefix in enumerate(PREFIXES, start=2):
            assert same(density, lo_value(cells[f"B{row}"]))[0], (result["path"], prefix, cells[f"B{row}"])
            assert same(2 * h, lo_value(cells[f"C{row}"]))[0], (result["path"], prefix, cells[f"C{row}"])


def _rows_book(path, rows: int, formulas: list[str]):
    """An open xlsxwriter book: sheet Calc, row n holding 10 + 0.05 (n - 1) in column A and the
    ``formulas`` (``{n}`` the row) in the columns from B on, each cached as 0."""
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Calc")
    for r in range(rows):
        ws.write(r, 0, 10.0 + 0.05 * r)
        for c, formula in enumerate(formulas, start=1):
            ws.write_formula(r, c, formula.format(n=r + 1), None, 0)
    return wb, ws


def test_an_opened_book_shows_every_value_without_a_recalculation(installation, tmp_path):
    """The load job rebinds our calls and computes nothing itself: LibreOffice computes a
    rebound cell when its value is read (shown, saved, printed or read through the API), as it
    does any formula it has to recompute.  Read with no recalculation at all, every cell of a
    book written with stale cached values (xlsxwriter stores 0) shows its own value: ours, a
    built-in formula that reads ours (in the same row and across rows), ours reading ours, a
    named formula and an array formula."""
    rows = 300
    path = tmp_path / "lazy.xlsx"
    wb, ws = _rows_book(path, rows, ["=AIR_DENSITY(A{n})", "=B{n}*2",       # a built-in reading ours
                                     '=H_CAVITY(A{n},5,0.016,1.2,,"air")',
                                     "=AIR_CONDUCTIVITY(B{n})"])              # ours reading ours
    ws.write_formula(0, 6, f"=SUM(D1:D{rows})", None, 0)                   # across every row
    ws.write_formula(1, 6, "=2*Gap_h", None, 0)
    wb.define_name("Gap_h", '=H_CAVITY(15,5,0.016,1.2,,"air")')
    ws.write_array_formula("H1:H2", "{=AIR_CONDUCTIVITY(A1:A2)}")            # an array formula
    wb.close()
    result = run_session(installation, [{"open": str(path), "recalculate": False}], tmp_path)[0]
    cells = result["sheets"]["Calc"]
    total = 0.0
    for r in range(rows):
        n, t = r + 1, 10.0 + 0.05 * r
        density, h = call("AIR_DENSITY", t), call("H_CAVITY", t, 5.0, 0.016, 1.2)
        total += h
        assert same(density, lo_value(cells[f"B{n}"]))[0], (n, cells[f"B{n}"])
        assert same(2 * density, lo_value(cells[f"C{n}"]))[0], (n, cells[f"C{n}"])
        assert same(h, lo_value(cells[f"D{n}"]))[0], (n, cells[f"D{n}"])
        assert same(call("AIR_CONDUCTIVITY", density), lo_value(cells[f"E{n}"]))[0], (n, cells[f"E{n}"])
    assert same(total, lo_value(cells["G1"]))[0], cells["G1"]
    assert same(2 * call("H_CAVITY", 15.0, 5.0, 0.016, 1.2), lo_value(cells["G2"]))[0], cells["G2"]
    for n in (1, 2):
        assert same(call("AIR_CONDUCTIVITY", 10.0 + 0.05 * (n - 1)), lo_value(cells[f"H{n}"]))[0], cells[f"H{n}"]


def test_a_long_block_is_rebound_in_every_row(installation, tmp_path):
    """The load job writes the columns of a rectangle that hold our calls in chunks of rows
    from the bottom up (stillair_calc.chunk_rows(600) = 97 rows): every row of a block longer
    than two chunks is rebound, a built-in column between two of ours keeps its values, and a
    block holding part of an array formula is rebound cell by cell, the array once."""
    rows = 600
    path = tmp_path / "long.xlsx"
    wb, ws = _rows_book(path, rows, ["=AIR_DENSITY(A{n})", "=A{n}*2",       # built-in, in the same rectangle
                                     '=H_CAVITY(A{n},5,0.016,1.2,,"air")'])
    ws.write_formula(0, 5, "=AIR_CONDUCTIVITY(A1)", None, 0)
    ws.write_array_formula("F2:F3", "{=AIR_CONDUCTIVITY(A2:A3)}")
    wb.close()
    cells = run_session(installation, [{"open": str(path)}], tmp_path)[0]["sheets"]["Calc"]
    for r in range(rows):
        n, t = r + 1, 10.0 + 0.05 * r
        assert same(call("AIR_DENSITY", t), lo_value(cells[f"B{n}"]))[0], (n, cells[f"B{n}"])
        assert same(2 * t, lo_value(cells[f"C{n}"]))[0], (n, cells[f"C{n}"])
        assert same(call("H_CAVITY", t, 5.0, 0.016, 1.2), lo_value(cells[f"D{n}"]))[0], (n, cells[f"D{n}"])
    for n in (1, 2, 3):
        assert same(call("AIR_CONDUCTIVITY", 10.0 + 0.05 * (n - 1)), lo_value(cells[f"F{n}"]))[0], cells[f"F{n}"]


def test_a_long_column_copied_down_keeps_formats_and_is_checked(installation, tmp_path):
    """Columns of 256 rows or more whose formulas are the first copied down are rebound by
    filling the first down (stillair_calc._copy_down): a column with one cell formatted
    differently is written in chunks instead, so that format stays; a column that only looks
    copied (a text "A1" in row 1, "A2" in row 2 ...) reads back wrong after the fill and is
    rewritten in chunks; every cell shows its own value."""
    rows = 300
    path = tmp_path / "copied.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Calc")
    three = wb.add_format({"num_format": "0.000"})
    for r in range(rows):
        n = r + 1
        ws.write(r, 0, 10.0 + 0.05 * r)
        ws.write_formula(r, 1, f"=AIR_DENSITY(A{n})", None, 0)  # copied down
        ws.write_formula(r, 2, f"=AIR_DENSITY(A{n})", three if r == 150 else None, 0)
        ws.write_formula(r, 3, f'=AIR_DENSITY(A{n})&"A{n}"', None, 0)  # looks copied, is not
    wb.close()
    cells = run_session(installation, [{"open": str(path)}], tmp_path)[0]["sheets"]["Calc"]
    for r in range(rows):
        n, density = r + 1, call("AIR_DENSITY", 10.0 + 0.05 * r)
        assert same(density, lo_value(cells[f"B{n}"]))[0], (n, cells[f"B{n}"])
        assert same(density, lo_value(cells[f"C{n}"]))[0], (n, cells[f"C{n}"])
        text = cells[f"D{n}"].get("text", "")
        assert text.endswith(f"A{n}") and same(density, float(text[:-len(f"A{n}")]))[0], (n, cells[f"D{n}"])
    assert cells["C151"]["shown"] == f"{call('AIR_DENSITY', 10.0 + 0.05 * 150):.3f}", cells["C151"]
    assert cells["C150"]["shown"] != f"{call('AIR_DENSITY', 10.0 + 0.05 * 149):.3f}", cells["C150"]


# ---------------------------------------------------------------------------------------------
# The Function Wizard


def test_function_wizard_lists_every_registry_function(installation, tmp_path):
    from stillair.addin.libreoffice.build import WIZARD_CATEGORY
    from stillair.addin.cells.registry import REGISTRY
    from stillair.addin.cells.registry import arg_doc

    listed = run_session(installation, [{"functions": [f.name for f in REGISTRY]}], tmp_path)[0]["functions"]
    assert sorted(listed) == sorted(f.name for f in REGISTRY)
    add_in = 11  # Calc's category id of "Add-In" (its own numbering, from 1 = Database)
    assert WIZARD_CATEGORY == "Add-In"
    for entry in REGISTRY:
        shown = listed[entry.name]
        assert shown["description"] == f"[{entry.category}] {entry.description}"
        assert shown["category"] == add_in
        assert [a["name"] for a in shown["arguments"]] == [a.name for a in entry.args]
        assert [a["description"] for a in shown["arguments"]] == [arg_doc(a) for a in entry.args]
        # required arguments are not optional in the Wizard (H_CAVITY's t1, t2, gap, height)
        assert [a["optional"] for a in shown["arguments"]] == [a.optional for a in entry.args], \
            entry.name


def _lo_version() -> str:
    return subprocess.run([str(LO_PYTHON), "-c", "import sys; print('%d.%d' % sys.version_info[:2])"],
                          capture_output=True, text=True, env=libreoffice_environment()).stdout.strip()


@pytest.mark.parametrize("broken", ["environment gone", "other Python version"])
def test_cells_say_why_when_stillair_cannot_be_imported(tmp_path, broken):
    """An extension whose recorded environment is gone or of another Python version: every
    cell names the reason instead of showing #NAME?."""
    from stillair.addin.libreoffice.build import build_oxt, python_paths
    from stillair.addin.libreoffice.setup import install_options

    paths = dict(python_paths(), executable="/gone/venv/bin/python3", site_dirs=[],
                 paths=["/gone/venv/lib/python3/site-packages"])
    if broken == "other Python version":
        paths["version"] = "3.99"
    oxt = tmp_path / "stillair.oxt"
    build_oxt(oxt, paths=paths, program_dir=PROGRAM)
    install = {"profile": str(tmp_path / "profile"), "shared_cache": str(tmp_path / "shared"),
               "soffice": str(PROGRAM / "soffice")}
    options, _ = install_options(install["profile"], install["shared_cache"])
    subprocess.run([str(PROGRAM / "unopkg"), "add", *options, str(oxt)], check=True,
                   capture_output=True, env=libreoffice_environment())
    job = {"type": {"Sheet1": {"A1": "=AIR_DENSITY(20)"}},
           "arrays": {"Sheet1": {"C1:D2": "=NET_SOLVE(F1:G1;F2:G2)"}}}
    cells = run_session(install, [job], tmp_path)[0]["sheets"]["Sheet1"]
    message = ("stillair: cannot import stillair from /gone/venv/bin/python3 (not found on its "
               "paths); run stillair libreoffice-setup again")
    if broken == "other Python version":
        here = _lo_version()
        message = (f"stillair: LibreOffice runs Python {here} but stillair was set up from Python 3.99 "
                   f"(/gone/venv/bin/python3); run stillair libreoffice-setup from a Python {here} environment")
    assert cells["A1"]["text"] == message
    assert cells["C1"]["text"] == message


def test_setup_updates_in_place_and_keeps_other_extensions(tmp_path, capsys):
    """A second set-up updates org.stillair.calc in place; another extension stays installed."""
    from stillair.addin.libreoffice.setup import install_options

    profile, cache = tmp_path / "profile", tmp_path / "shared"
    other = tmp_path / "other.oxt"
    with zipfile.ZipFile(other, "w") as oxt:
        oxt.writestr("META-INF/manifest.xml", '<?xml version="1.0" encoding="UTF-8"?>\n'
                     '<manifest:manifest xmlns:manifest="http://openoffice.org/2001/manifest"/>\n')
        oxt.writestr("description.xml", '<?xml version="1.0" encoding="UTF-8"?>\n'
                     '<description xmlns="http://openoffice.org/extensions/description/2006">'
                     '<identifier value="org.example.someone.else"/><version value="1.0"/></description>\n')
    options, _ = install_options(str(profile), str(cache))
    unopkg = str(PROGRAM / "unopkg")
    subprocess.run([unopkg, "add", *options, str(other)], check=True, capture_output=True,
                   env=libreoffice_environment())
    for verb in ("Installed", "Updated"):
        assert main(["libreoffice-setup", "--profile", str(profile), "--shared-cache", str(cache)]) == 0
        assert f"{verb} org.stillair.calc" in capsys.readouterr().out
    listing = subprocess.run([unopkg, "list", *options], check=True, capture_output=True, text=True,
                             env=libreoffice_environment()).stdout
    assert listing.count("Identifier: org.stillair.calc") == 1
    assert "Identifier: org.example.someone.else" in listing


def test_setup_refuses_another_python_version(monkeypatch, tmp_path, capsys):
    from stillair.addin.libreoffice import setup

    real = setup.python_paths
    monkeypatch.setattr(setup, "python_paths", lambda: dict(real(), version="3.99"))
    assert main(["libreoffice-setup", "--profile", str(tmp_path / "p"), "--shared-cache", str(tmp_path / "c")]) == 2
    out, err = capsys.readouterr()
    assert f"is Python {_lo_version()}, this environment" in out and "is Python 3.99" in out
    assert err == "stillair libreoffice-setup: nothing installed (the reason is above)\n"
    assert not (tmp_path / "c").exists()
