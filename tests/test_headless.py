"""Headless evaluation of a workbook that uses every cell function, and the --out copy."""

from __future__ import annotations

import os
import json
import math
import re
import zipfile

import openpyxl
import pytest
import xlsxwriter

from stillair.addin.cells.callpath import engine_callable
from stillair.addin.workbook.rewrite import prepare
from stillair.addin.workbook.model import evaluate_book
from stillair.addin.cells.registry import BY_NAME
from stillair.addin.workbook.reader import index_to_col
from test_cells import BOUNDARIES, BRANCHES, SAMPLES, direct

RTOL = 1e-12
NETWORK_ROWS = 1 + 3 + 2          # header, nodes in/1/out, branches wall/skin


def _literal(value) -> str:
    if value is None:
        return ""
    if isinstance(value, str):
        return '"' + value.replace('"', '""') + '"'
    return repr(float(value))


@pytest.fixture(scope="module")
def book(tmp_path_factory):
    """Inputs sheet with every sample argument in cells; Calc sheet calling every function on
    them, wrapped and followed by built-ins; names; a network table feeding NET_* cells."""
    path = tmp_path_factory.mktemp("headless") / "every function.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    inputs, calc, net = wb.add_worksheet("Inputs"), wb.add_worksheet("Calc"), wb.add_worksheet("Net 1")
    expected = {}
    for row, (name, raw) in enumerate(SAMPLES.items()):
        refs = []
        inputs.write(row, 0, name)
        for j, value in enumerate(raw):
            if value is not None:
                inputs.write(row, 1 + j, value)
            # A blank optional argument is a reference to a blank cell (formulas reads an
            # omitted argument "F(a,,b)" as 0, unlike Excel; see the README).
            refs.append(f"Inputs!{index_to_col(2 + j)}{row + 1}")
        excel_row = row + 1
        calc.write(row, 0, name)
        calc.write_formula(row, 1, f"={name}({','.join(refs)})")
        # Built-ins around the function: arithmetic and IF/ISNUMBER on its result.
        calc.write_formula(row, 2, f"=IF(ISNUMBER(B{excel_row}),B{excel_row}*2+1,LEN(B{excel_row}))")
        wb.define_name(f"r_{name.lower()}", f"=Calc!$B${excel_row}")
        expected[name] = (f"B{excel_row}", f"C{excel_row}")
    last = len(SAMPLES) + 1
    # Literal arguments and an add-in prefix that formulas cannot load as written.
    calc.write_formula(last, 1, "=_xludf.NU_VPLATE(1E+8,0.71)")
    calc.write_formula(last + 1, 1, "='stillair.xlam'!NU_VPLATE(1E+8,0.71)")
    calc.write_formula(last + 2, 1, "=NU_NOTE(\"vplate\",1E+14,0.71)")
    calc.write_formula(last + 3, 1, "=STILLAIR_VERSION()")
    calc.write_formula(last + 4, 1, "=NU_VPLATE(1E+14,0.71)")
    calc.write_formula(last + 5, 1, "=NU_VPLATE(-1,0.71)*2")   # text result -> #VALUE! downstream
    wb.define_name("Calc!local_nu", f"=Calc!$B${last + 1}")

    for i, row in enumerate(BRANCHES):
        for j, value in enumerate(row):
            if value not in (None, ""):
                net.write(i + 1, j, value)
    for i, row in enumerate(BOUNDARIES):
        for j, value in enumerate(row):
            if value is not None:
                net.write(i + 1, 12 + j, value)
    tables = "A2:J5,M2:O4"
    net.write_dynamic_array_formula(f"A10:J{9 + NETWORK_ROWS}", f"=NET_SOLVE({tables})")
    net.write_formula("L10", f"=NET_TEMP({tables},1)")
    net.write_formula("L11", f"=NET_HEAT({tables},\"wall\")")
    net.write_formula("L12", f"=NET_CHECK({tables})")
    net.write_formula("L13", "=L11*2")
    wb.define_name("q_wall", "='Net 1'!$L$11")
    chart = wb.add_chart({"type": "line"})
    chart.add_series({"values": "=Calc!$C$1:$C$5"})
    calc.insert_chart("E2", chart)
    wb.close()
    return path, expected, last


@pytest.fixture(scope="module")
def evaluation(book):
    path, _, _ = book
    return evaluate_book(str(path))


def _close(a, b):
    if isinstance(b, float):
        return isinstance(a, float) and abs(a - b) <= RTOL * abs(b)
    return a == b


@pytest.mark.parametrize("name", list(SAMPLES))
def test_every_function_matches_the_engine(evaluation, book, name):
    if engine_callable(BY_NAME[name]) is None:
        pytest.skip(f"engine.{BY_NAME[name].engine} is not provided yet")
    _, expected, _ = book
    cell, around = expected[name]
    value = direct(name, SAMPLES[name])
    got = evaluation.values["Calc"][cell]
    assert _close(got, value), (got, value)
    wrapped = evaluation.values["Calc"][around]
    assert _close(wrapped, value * 2 + 1 if isinstance(value, float) else float(len(value)))
    assert _close(evaluation.names[f"r_{name.lower()}"], value)


def test_literals_prefixes_notes_and_errors(evaluation, book):
    import stillair
    _, _, last = book
    cells = evaluation.values["Calc"]
    nu = direct("NU_VPLATE", (1e8, 0.71))
    assert _close(cells[f"B{last + 1}"], nu) and _close(cells[f"B{last + 2}"], nu)
    assert cells[f"B{last + 3}"] == stillair.nusselt("vplate", "auto", None, ra=1e14, pr=0.71).scalar().note
    assert cells[f"B{last + 4}"] == stillair.__version__
    assert cells[f"B{last + 6}"] == "#VALUE!"
    assert evaluation.names["Calc!local_nu"] == cells[f"B{last + 1}"]  # sheet-scoped name
    notes = dict(evaluation.notes)
    assert notes[f"Calc!B{last + 5}"].startswith("NU_VPLATE: outside validity range: churchill-chu")
    assert notes[f"Calc!B{last + 6}"] == "NU_VPLATE: Ra must be >= 0, got -1"


def test_network_feeds_array_and_scalar_cells(evaluation):
    if engine_callable(BY_NAME["NET_SOLVE"]) is None:
        pytest.skip("stillair.solve_network is not provided yet")
    from test_cells import Q_EXACT, R_WALL
    net = evaluation.values["Net 1"]
    assert _close(net["L11"], direct_net_heat())
    assert net["L11"] == pytest.approx(Q_EXACT, rel=1e-9)
    assert net["L10"] == pytest.approx(20.0 - Q_EXACT * R_WALL, rel=1e-9)
    assert _close(net["L13"], net["L11"] * 2)
    assert net["L12"].startswith("OK: ")
    assert net["A10"] == "item" and net[f"A{9 + NETWORK_ROWS}"] in ("wall", "skin")
    rows = {net[f"A{r}"]: r for r in range(11, 10 + NETWORK_ROWS)}
    assert _close(net[f"C{rows['wall']}"], net["L11"])
    assert evaluation.names["q_wall"] == net["L11"]


def direct_net_heat():
    import stillair
    return float(stillair.solve_network(BRANCHES, BOUNDARIES).heat["wall"])


def test_every_addin_prefix_form_is_rewritten_for_the_evaluator():
    formula = ("[1]!H_CAVITY(A1)+'C:\\x\\stillair.xlam'!NU_NOTE(1)+_xll.NET_TEMP(A1)"
               "+_xludf.STILLAIR_VERSION()+tools.xlsm!H_RAD(1,2,0.9)+h_rad(1,2,0.9)")
    prepared = prepare(formula, 1, 1, {}, "Calc")
    assert prepared.problem is None
    assert prepared.text == ("H_CAVITY(A1)+NU_NOTE(1)+NET_TEMP(A1)+STILLAIR_VERSION()"
                             "+H_RAD(1,2,0.9)+H_RAD(1,2,0.9)")
    # Another add-in's function is not ours: the cell is reported, not silently evaluated.
    assert prepare("[1]!OTHER(2)", 1, 1, {}, "Calc").problem == "[1]!OTHER is not a stillair function"


# ---------------------------------------------------------------------------------------------
# The --out copy

_VALUE_PARTS = re.compile(rb'<v>[^<]*</v>|\st="[^"]*"')


def test_out_copy_changes_only_cached_values(evaluation, book, tmp_path):
    from stillair.addin.workbook.cachewriter import write_cached_values
    path, _, _ = book
    out = tmp_path / "copy.xlsx"
    write_cached_values(evaluation.book, str(out), evaluation.values)
    sheet_parts = {s.part for s in evaluation.book.sheets}
    with zipfile.ZipFile(path) as a, zipfile.ZipFile(out) as b:
        assert a.namelist() == b.namelist()
        changed = []
        for name in a.namelist():
            old, new = a.read(name), b.read(name)
            if old != new:
                changed.append(name)
                # The same bytes once cell values and their types are taken out.
                assert _VALUE_PARTS.sub(b"", old) == _VALUE_PARTS.sub(b"", new), name
        assert changed and set(changed) <= sheet_parts
    formulas_before = openpyxl.load_workbook(path)
    formulas_after = openpyxl.load_workbook(out)
    values_after = openpyxl.load_workbook(out, data_only=True)
    for sheet in evaluation.book.sheets:
        for ref, value in evaluation.values[sheet.name].items():
            if ref in sheet.formulas:  # array members hold only a cached value
                before = formulas_before[sheet.name][ref].value
                after = formulas_after[sheet.name][ref].value
                assert getattr(after, "text", after) == getattr(before, "text", before)
            read = values_after[sheet.name][ref].value
            if isinstance(value, float):
                assert read == value  # repr round-trips a double exactly
            else:  # openpyxl reads an empty text as None
                assert read == (None if value in ("", None) else value)
    assert formulas_after.defined_names.keys() == formulas_before.defined_names.keys()
    with zipfile.ZipFile(out) as b:
        assert any(n.startswith("xl/charts/") for n in b.namelist())


# ---------------------------------------------------------------------------------------------
# Ranges for numeric arguments: array formulas (spilled in Excel 365, array-entered before)


@pytest.fixture(scope="module")
def array_evaluation(tmp_path_factory):
    path = tmp_path_factory.mktemp("arrays") / "arrays.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Arrays")
    temperatures = [0.0, 20.0, 40.0]
    for row, t in enumerate(temperatures, start=2):
        ws.write(f"A{row}", t)
    ws.write_row("D1", [0.012, 0.016])
    ws.write_array_formula("B2:B4", "{=AIR_CONDUCTIVITY(A2:A4)}")           # array-entered
    ws.write_dynamic_array_formula("C2:C4", "=H_CAVITY(A2:A4,5,0.016,1.2)")  # spilled
    ws.write_dynamic_array_formula("D2:E4", "=H_CAVITY(A2:A4,5,D1:E1,1.2)")  # column x row
    ws.write_formula("F2", "=SUM(B2:B4)")
    wb.close()
    return temperatures, evaluate_book(str(path))


def test_array_formulas_give_the_scalar_values_elementwise(array_evaluation):
    from stillair.addin.cells.callpath import call
    temperatures, evaluation = array_evaluation
    cells = evaluation.values["Arrays"]
    for row, t in enumerate(temperatures, start=2):
        assert _close(cells[f"B{row}"], call("AIR_CONDUCTIVITY", t))
        assert _close(cells[f"C{row}"], call("H_CAVITY", t, 5.0, 0.016, 1.2))
        assert _close(cells[f"D{row}"], call("H_CAVITY", t, 5.0, 0.012, 1.2))
        assert _close(cells[f"E{row}"], call("H_CAVITY", t, 5.0, 0.016, 1.2))
    assert cells["F2"] == pytest.approx(sum(call("AIR_CONDUCTIVITY", t) for t in temperatures),
                                        rel=1e-12)


# ---------------------------------------------------------------------------------------------
# Real workbooks: one odd formula spoils only its own cells; constructs rewritten before loading

from stillair.addin.cells.callpath import call  # noqa: E402
from stillair.addin.workbook.model import Model  # noqa: E402
from stillair.addin.workbook.reader import BookError, read_book  # noqa: E402

# Each formula that the evaluator cannot calculate, and the construct its note must name.
ODD = {
    "C1": ("=SUM(S2:S3!A1)", "3-D reference S2:S3!A1 (a range of sheets) is not supported headlessly"),
    "C2": ("=SUM(Table1[Col])", "structured table reference Table1[Col] is not supported headlessly"),
    "C3": ('=INDIRECT("A1")*2', "INDIRECT builds its reference from text while calculating"),
    "C4": ("=OFFSET(A1,1,0)", "OFFSET builds its reference while calculating"),
    "C5": ("=_xlfn.STOCKHISTORY(A1)", "function STOCKHISTORY (a newer Excel function) is not "
           "available headlessly"),
    "C6": ("=_xlfn.LAMBDA(_xlpm.x,_xlpm.x+1)(A1)", "a LAMBDA called in place"),
    "C7": ("=SUM(A1:XFD1048576)", "covers 17,179,869,184 cells"),
    "C8": ("=[1]Other!A1", "points into another workbook"),
}


@pytest.fixture(scope="module")
def odd_book(tmp_path_factory):
    """Inputs in A1:A5; good stillair and built-in cells in B; one odd formula per cell of C;
    D1 depends on an odd cell, D2 on a good one."""
    path = tmp_path_factory.mktemp("odd") / "odd.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Calc")
    for sheet, value in (("S2", 1.0), ("S3", 2.0)):
        wb.add_worksheet(sheet).write("A1", value)
    for row, value in enumerate([20.0, 10.0, 0.9, 0.02, 1.0]):
        ws.write(row, 0, value)
    good = {
        "B1": "=H_RAD(A1,A2,A3)",
        "B2": "=1E9+2.5e3",                              # unsigned exponents: must simply work
        "B3": "=SUM(A:A)", "B4": "=SUM(20:20)",          # whole column / row: the used range
        "B5": "=_xlfn.XLOOKUP(10,A1:A5,A1:A5)*2",
        "B6": "=_xlfn.LET(_xlpm.x,A1,_xlpm.x*2)",
        "B7": "=_xlfn.SUM(_xlfn._xlws.FILTER(A1:A5,A1:A5>5))",
        "B8": '=_xlfn.TEXTJOIN("/",TRUE,A1:A2)',
        "B9": "=ROW()*10+COLUMN()",
        "B10": "=tools.xlsm!H_RAD(A1,A2,A3)",
        "B11": "=NU_VPLATE(1E9,0.71)",
    }
    ws.write_row("A20", [1.0, 2.0])
    for ref, formula in good.items():
        ws.write_formula(ref, formula)
    for ref, (formula, _) in ODD.items():
        ws.write_formula(ref, formula)
    ws.write_formula("D1", "=C1+B1")
    ws.write_formula("D2", "=B1*2")
    wb.close()
    return path


def test_one_odd_formula_spoils_only_its_cells(odd_book):
    evaluation = evaluate_book(str(odd_book))
    results = {ref: evaluation.results[("Calc", ref)] for ref in evaluation.values["Calc"]}
    for ref, (_, construct) in ODD.items():
        assert results[ref].status == "cannot-evaluate", ref
        assert construct in results[ref].messages[0], (ref, results[ref].messages)
    assert results["D1"].status == "cannot-evaluate"
    assert results["D1"].messages == ("depends on Calc!C1, which cannot be evaluated",)
    h = call("H_RAD", 20.0, 10.0, 0.9)
    assert results["B1"].value == h and results["D2"].value == 2 * h
    notes = dict(evaluation.notes)
    assert set(notes) == {f"Calc!{ref}" for ref in ODD} | {"Calc!D1"}
    assert all(result.status == "value" for ref, result in results.items() if ref[0] == "B")


def test_constructs_the_evaluator_is_taught(odd_book):
    cells = evaluate_book(str(odd_book)).values["Calc"]
    h = call("H_RAD", 20.0, 10.0, 0.9)
    column_a = 20.0 + 10.0 + 0.9 + 0.02 + 1.0 + 1.0
    assert cells["B2"] == 1e9 + 2500.0
    assert cells["B3"] == pytest.approx(column_a, rel=1e-15)
    assert cells["B4"] == 3.0
    assert cells["B5"] == 20.0 and cells["B6"] == 40.0 and cells["B7"] == 30.0
    assert cells["B8"] == "20/10"
    assert cells["B9"] == 9 * 10 + 2
    assert cells["B10"] == h
    assert cells["B11"] == call("NU_VPLATE", 1e9, 0.71)


def test_whole_columns_cost_the_used_range(odd_book):
    model = Model(read_book(str(odd_book)))
    assert model.nodes[("Calc", "B3")].prepared.text == "SUM(A1:A20)"   # rows in use: 1..20
    assert model.nodes[("Calc", "B4")].prepared.text == "SUM(A20:D20)"  # columns in use: A..D


def test_empty_argument_takes_the_default_never_zero(tmp_path):
    path = tmp_path / "empty.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Calc")
    for row, value in enumerate([20.0, 10.0, 0.9, 0.02, 1.0]):
        ws.write(row, 0, value)
    ws.write_formula("B1", "=H_RAD(A1,A2,A3,)")                 # eps2 missing at the end
    ws.write_formula("B2", '=H_CAVITY(A1,A2,A4,A5,,"air")')     # tilt missing in the middle
    ws.write_formula("B3", "=H_RAD(A1,,A3)")                    # a required argument missing
    ws.write_formula("B4", "=MAX(-1,,-2)")                      # built-ins keep Excel's 0
    wb.close()
    cells = evaluate_book(str(path)).values["Calc"]
    assert cells["B1"] == call("H_RAD", 20.0, 10.0, 0.9)        # not "eps2 must be ..., got 0"
    assert cells["B2"] == call("H_CAVITY", 20.0, 10.0, 0.02, 1.0)   # tilt 90, not 0
    assert cells["B3"] == "H_RAD: t2 must be a number, got an empty cell"
    assert cells["B4"] == 0.0


def test_sheet_scoped_name_shadows_the_workbook_name(tmp_path):
    """Excel resolves a name on a sheet that has its own name of that spelling to the sheet's
    name; elsewhere, and as Sheet!name, to the named scope."""
    path = tmp_path / "names.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    inputs, calc, other = (wb.add_worksheet(n) for n in ("Inputs", "Calc", "Other"))
    inputs.write_column("A1", [20.0, 10.0, 0.02, 0.05, 1.0])
    wb.define_name("gap", "=Inputs!$A$3")
    wb.define_name("Calc!gap", "=Inputs!$A$4")
    calc.write_formula("A1", "=H_CAVITY(Inputs!A1,Inputs!A2,gap,Inputs!A5)")
    other.write_formula("A1", "=H_CAVITY(Inputs!A1,Inputs!A2,gap,Inputs!A5)")
    other.write_formula("A2", "=Calc!gap*2")
    wb.close()
    evaluation = evaluate_book(str(path))
    assert evaluation.values["Calc"]["A1"] == call("H_CAVITY", 20.0, 10.0, 0.05, 1.0)
    assert evaluation.values["Other"]["A1"] == call("H_CAVITY", 20.0, 10.0, 0.02, 1.0)
    assert evaluation.values["Other"]["A2"] == 0.1
    assert evaluation.names == {"gap": 0.02, "Calc!gap": 0.05}


def test_status_is_data_not_the_shape_of_a_text(tmp_path):
    path = tmp_path / "status.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Calc")
    ws.write_formula("A1", '="NU_VPLATE: a label someone typed"')   # looks like our message
    ws.write_formula("A2", "=NU_VPLATE(-1,0.71)")                   # our error message
    ws.write_formula("A3", "=NU_VPLATE(1E14,0.71)")                 # a value with a range note
    ws.write_formula("A4", "=1/0")                                  # an Excel error
    ws.write_formula("A5", "=NU_VPLATE(1E8,0.71)")
    ws.write_formula("A6", "=SUM(A2,A5)")       # SUM skips the text: a number over an error
    ws.write_formula("A7", "=A2*2")             # #VALUE!, following from A2
    ws.write_formula("A8", '=CAVITY_METHOD(1E4,0.71,20)')           # a text result
    wb.close()
    evaluation = evaluate_book(str(path))
    status = {ref: evaluation.results[("Calc", ref)] for ref in evaluation.values["Calc"]}
    assert [status[r].status for r in ("A1", "A2", "A3", "A4", "A5", "A6", "A7", "A8")] == [
        "value", "error", "note", "error", "value", "error", "error", "value"]
    assert status["A2"].messages == ("NU_VPLATE: Ra must be >= 0, got -1",)
    assert status["A4"].messages == ("Excel error #DIV/0!",)
    assert status["A6"].value == status["A5"].value
    assert status["A6"].messages == ("depends on an error in Calc!A2",)
    assert status["A7"].messages == ("follows from the error in Calc!A2",)
    assert [cell for cell, _ in evaluation.failed] == ["Calc!A2", "Calc!A4", "Calc!A6", "Calc!A7"]


def test_limits_are_checked_before_the_work(tmp_path, monkeypatch, odd_book):
    from stillair.addin.workbook import reader as xlsx
    monkeypatch.setattr(xlsx.Limits, "max_cells", 10)
    with pytest.raises(BookError, match=r"refused: more than 10 cells; calc and the audit take "
                                        r"workbooks up to that size"):
        read_book(str(odd_book))
    monkeypatch.setattr(xlsx.Limits, "max_cells", 2_000_000)
    monkeypatch.setattr(xlsx.Limits, "max_formulas", 5)
    with pytest.raises(BookError, match=r"refused: more than 5 formula cells"):
        read_book(str(odd_book))


def test_one_model_calculates_many_times_and_only_what_is_asked(odd_book):
    model = Model(read_book(str(odd_book)))
    first = model.calculate({("Calc", "A1"): 30.0})
    second = model.calculate({("Calc", "A1"): 40.0})
    assert first.values["Calc"]["B1"] == call("H_RAD", 30.0, 10.0, 0.9)
    assert second.values["Calc"]["B1"] == call("H_RAD", 40.0, 10.0, 0.9)
    only = model.calculate(only={("Calc", "D2")})
    assert set(only.values["Calc"]) == {"B1", "D2"}


def test_formulas_of_one_relative_form_share_their_preparation(tmp_path):
    """A row copied down is prepared once; every copy still reads its own row, and the result
    equals preparing each formula on its own."""
    from stillair.addin.workbook import model as headless
    path = tmp_path / "rows.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Rows")
    for r in range(1, 41):
        ws.write_row(f"A{r}", [15.0 + r, 5.0, 0.01 + 0.0005 * r, 1.0])
        ws.write_formula(f"E{r}", f"=H_CAVITY(A{r},B{r},C{r},D{r})+$A$1*0")
        ws.write_formula(f"F{r}", f'=IF(E{r}>1.5,"high","low")')
    wb.close()
    book = read_book(str(path))
    model = Model(book)
    assert len(model._templates) == 2
    shared = model.calculate().values["Rows"]
    prepare = headless.prepare
    try:
        headless.prepare = lambda *args, **kw: prepare(*args[:5], **kw)     # no sharing
        alone = Model(book).calculate().values["Rows"]
    finally:
        headless.prepare = prepare
    assert shared == alone
    assert shared["E40"] == call("H_CAVITY", 55.0, 5.0, 0.03, 1.0)


def test_scipy_stats_is_imported_only_when_a_statistics_function_needs_it(tmp_path):
    """MAX and STDEV.P do not need scipy.stats; WEIBULL.DIST does, and gets the real module."""
    import subprocess
    import sys
    path = tmp_path / "stats.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("S")
    ws.write_column("A1", [2.0, 4.0, 4.0, 4.0, 5.0, 5.0, 7.0, 9.0])
    ws.write_formula("B1", "=STDEV.P(A1:A8)+MAX(A1:A8)")
    ws.write_formula("B2", "=STDEVP(A1:A8)")                  # a compatibility name
    wb.close()
    probe = ("import sys, json; from stillair.addin.workbook.model import evaluate_book; "
             f"e = evaluate_book({str(path)!r}); "
             "print(json.dumps([e.values['S'], type(sys.modules['scipy.stats']).__name__, "
             "[type(sys.modules[m]).__name__ for m in ('scipy.interpolate', 'scipy.linalg')]]))")
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, check=True)
    values, kind, others = json.loads(done.stdout)
    # population SD of 2,4,4,4,5,5,7,9 is 2 (common practice: the textbook example)
    assert values == {"B1": 11.0, "B2": 2.0} and kind == "LazyModule"
    assert others == ["LazyModule", "LazyModule"]   # formulas' statistics imports them unused
    with_dist = tmp_path / "dist.xlsx"
    wb = xlsxwriter.Workbook(str(with_dist))
    wb.add_worksheet("S").write_formula("A1", "=_xlfn.WEIBULL.DIST(1,1,1,TRUE)")
    wb.close()
    probe = probe.replace(repr(str(path)), repr(str(with_dist)))
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, check=True)
    values, kind, _ = json.loads(done.stdout)
    # Weibull CDF 1 - exp(-(x/scale)^shape) at x = scale: 1 - 1/e (common practice)
    assert values["A1"] == pytest.approx(1 - math.exp(-1), rel=1e-12) and kind == "module"
    # a name formulas took from a deferred module at import (interp1d, linalg) works when used
    fitted = tmp_path / "fit.xlsx"
    wb = xlsxwriter.Workbook(str(fitted))
    ws = wb.add_worksheet("S")
    ws.write_column("A1", [1.0, 2.0, 3.0, 4.0])
    ws.write_column("B1", [2.0, 4.1, 5.9, 8.2])
    ws.write_formula("C1", "=PERCENTILE(A1:A4,0.4)")
    ws.write_formula("C2", "=INDEX(LINEST(B1:B4,A1:A4),1)")
    wb.close()
    probe = probe.replace(repr(str(with_dist)), repr(str(fitted)))
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, check=True)
    values, _, _ = json.loads(done.stdout)
    # by hand: rank 0.4 * (4 - 1) = 1.2 between 2 and 3 gives 2.2; the least-squares slope
    # sum((x - 2.5)(y - 5.05)) / sum((x - 2.5)^2) = 10.2 / 5 = 2.04
    assert values["C1"] == pytest.approx(2.2, rel=1e-12)
    assert values["C2"] == pytest.approx(2.04, rel=1e-12)


def test_cells_and_rows_without_positions(tmp_path):
    """The r attributes of <row> and <c> are optional in the file format: a cell without one
    follows the cell before it, a row the row before it."""
    import zipfile
    path = tmp_path / "positions.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("P")
    ws.write_row("A1", [20.0, 10.0, 0.9])
    ws.write_formula("A2", "=H_RAD(A1,B1,C1)")
    wb.close()
    with zipfile.ZipFile(path) as source:
        items = {i.filename: source.read(i) for i in source.infolist()}
    sheet = items["xl/worksheets/sheet1.xml"]
    stripped = re.sub(rb'<c r="[A-Z]+\d+"', b"<c", sheet)
    stripped = re.sub(rb'(<row r="2"[^>]*>)', lambda m: re.sub(rb' r="2"', b"", m.group(1)), stripped)
    assert stripped.count(b' r="') == 1       # only row 1 keeps its number
    items["xl/worksheets/sheet1.xml"] = stripped
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as target:
        for name, data in items.items():
            target.writestr(name, data)
    book = read_book(str(path))
    assert book.sheet("P").values == {"A1": 20.0, "B1": 10.0, "C1": 0.9}
    assert evaluate_book(book).values["P"] == {"A2": call("H_RAD", 20.0, 10.0, 0.9)}


def test_rows_and_columns_count_a_computed_array_as_excel_does(tmp_path):
    """ROWS(NET_SOLVE(...)) is the solved table's row count (header, nodes, branches) in Excel and
    LibreOffice; formulas counted references only and gave #VALUE!."""
    path = tmp_path / "count.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("S")
    for r, row in enumerate(BRANCHES):
        for c, value in enumerate(row):
            if value is not None:
                ws.write(r, c, value)
    for r, row in enumerate(BOUNDARIES):
        for c, value in enumerate(row):
            ws.write(20 + r, c, value)
    ws.write(0, 11, "the used range reaches past the branch table's ten columns")
    wb.define_name("br", f"=S!$A$1:$J${len(BRANCHES)}")
    wb.define_name("bd", f"=S!$A$21:$C${20 + len(BOUNDARIES)}")
    ws.write_formula("M1", "=ROWS(NET_SOLVE(br, bd))")
    ws.write_formula("M2", "=COLUMNS(NET_SOLVE(br, bd))")
    ws.write_formula("M3", "=ROWS(A1:B7)+COLUMNS(A1:C1)")
    wb.close()
    import stillair

    result = stillair.solve_network(BRANCHES, BOUNDARIES)
    values = evaluate_book(str(path)).values["S"]
    assert values["M1"] == 1 + len(result.temperatures) + len(result.heat)
    assert values["M2"] == 10 and values["M3"] == 10


def test_cells_past_the_used_range_are_blank_in_every_range(tmp_path):
    """A range reaching past the last written row and column reads blank cells there (they read
    as the text "empty": COUNTA counted them, a network refused its own trailing blank rows)."""
    path = tmp_path / "past.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("S")
    ws.write_row("A1", ["wall", "in", "out", "conduction", 0.1, 0.5, 2.0])   # used range ends at G
    ws.write_row("A5", ["in", "T", 20.0])
    ws.write_row("A6", ["out", "T", 0.0])
    ws.write_formula("A12", '=NET_HEAT(A1:J3, A5:C9, "wall")')                # rows and columns past it
    ws.write_formula("B12", "=COUNTA(H1:J11)")
    ws.write_formula("C12", '=SUMPRODUCT((A13:A30<>"")*1)')
    wb.close()
    values = evaluate_book(str(path)).values["S"]
    assert values["A12"] == pytest.approx(0.5 * 2.0 * 20.0 / 0.1, rel=1e-12)  # k A dT / L, Fourier's law
    assert values["B12"] == 0 and values["C12"] == 0


def test_the_cause_a_reader_names_does_not_follow_the_hash_seed(tmp_path):
    """A cell reading two failing cells names one cause, the same in every run (a set's order
    follows PYTHONHASHSEED, so the first failure found used to change between runs)."""
    import subprocess
    import sys

    import openpyxl
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Calc"
    for row in range(1, 13):
        sheet[f"A{row}"] = f"=AIR_DENSITY(-{400 + row})"     # below absolute zero: an error
    sheet["B1"] = "=" + "+".join(f"A{row}" for row in range(12, 0, -1))
    path = tmp_path / "two_causes.xlsx"
    book.save(path)
    probe = ("from stillair.addin.workbook.model import evaluate_book; import sys; "
             "print(evaluate_book(sys.argv[1]).results[('Calc', 'B1')].cause)")
    causes = set()
    for seed in ("1", "2", "3", "4", "5", "6"):
        done = subprocess.run([sys.executable, "-c", probe, str(path)], capture_output=True, text=True,
                              env={**os.environ, "PYTHONHASHSEED": seed})
        causes.add(done.stdout.strip() or done.stderr)
    assert causes == {"Calc!A1"}     # the first in reading order


def test_the_reported_times_hold_what_their_names_say(tmp_path, monkeypatch):
    """calc's "engine import" is what importing the engine took (it happened when the command
    started, before the model is built), and "load" counts reading the file."""
    import time

    import stillair
    from stillair.addin.workbook import model as model_module

    path = tmp_path / "timed.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    wb.add_worksheet("S").write_formula("A1", "=AIR_DENSITY(20)")
    wb.close()
    real_read = model_module.read_book

    def slow_read(where):
        time.sleep(0.05)
        return real_read(where)

    monkeypatch.setattr(model_module, "read_book", slow_read)
    evaluation = evaluate_book(str(path))
    assert evaluation.load_seconds >= 0.05
    assert evaluation.engine_seconds >= stillair._IMPORT_SECONDS > 0
