"""Headless evaluation of a workbook that uses every cell function, and the --out copy."""

from __future__ import annotations

import re
import zipfile

import openpyxl
import pytest
import xlsxwriter

from stillair.addin.cells import engine_callable
from stillair.addin.headless import evaluate_book, rewrite_prefixes
from stillair.addin.registry import BY_NAME, REGISTRY
from stillair.addin.xlsx import index_to_col
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


def test_prefix_rewrite_touches_only_our_functions():
    xml = (b"<f>[1]!H_CAVITY(A1)+'C:\\x\\stillair.xlam'!NU_NOTE(1)+_xll.NET_TEMP(A1)"
           b"+_xludf.STILLAIR_VERSION()+[1]!OTHER(2)+_xludf.OTHER(3)</f>")
    assert rewrite_prefixes(xml) == (b"<f>H_CAVITY(A1)+NU_NOTE(1)+NET_TEMP(A1)+STILLAIR_VERSION()"
                                     b"+[1]!OTHER(2)+_xludf.OTHER(3)</f>")


# ---------------------------------------------------------------------------------------------
# The --out copy

_VALUE_PARTS = re.compile(rb'<v>[^<]*</v>|\st="[^"]*"')


def test_out_copy_changes_only_cached_values(evaluation, book, tmp_path):
    from stillair.addin.cachewriter import write_cached_values
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
    from stillair.addin.cells import call
    temperatures, evaluation = array_evaluation
    cells = evaluation.values["Arrays"]
    for row, t in enumerate(temperatures, start=2):
        assert _close(cells[f"B{row}"], call("AIR_CONDUCTIVITY", t))
        assert _close(cells[f"C{row}"], call("H_CAVITY", t, 5.0, 0.016, 1.2))
        assert _close(cells[f"D{row}"], call("H_CAVITY", t, 5.0, 0.012, 1.2))
        assert _close(cells[f"E{row}"], call("H_CAVITY", t, 5.0, 0.016, 1.2))
    assert cells["F2"] == pytest.approx(sum(call("AIR_CONDUCTIVITY", t) for t in temperatures),
                                        rel=1e-12)
