"""own-network template: the solution tables equal a direct stillair.solve_network call on the
typed tables, row by row (blank rows skipped), the p1..p5 column says what the engine's kind
registry says, the heat inputs leave through the fixed nodes, the workbook audits clean, and
LibreOffice prints it without error text."""

from __future__ import annotations

import functools
import re
import shutil
import subprocess

import openpyxl
import pytest

import stillair
from stillair.addin.audit.check import audit_book
from stillair.addin.templates.build import build_template
from stillair.addin.templates.render import render_pdf
from stillair.addin.workbook.model import evaluate_book
from stillair.addin.templates import own_network
from stillair.network import BRANCH_KINDS

TEMPLATE = own_network.TEMPLATE
PATH = str(TEMPLATE.path)


@functools.lru_cache(maxsize=None)
def _layout():
    """Rows (1-based) of the Network sheet's blocks, read from the committed file's headings."""
    ws = openpyxl.load_workbook(PATH)["Network"]
    headings = {}
    for row in ws.iter_rows(min_col=1, max_col=1):
        if row[0].value in ("name", "node", "branch") and row[0].value not in headings:
            headings[row[0].value] = row[0].row
        elif row[0].value == "node":
            headings["solved node"] = row[0].row
    return headings


def _cells(evaluation, column: str, first: int, count: int) -> list:
    return [evaluation.values["Network"].get(f"{column}{first + k}") for k in range(count)]


@functools.lru_cache(maxsize=None)
def _evaluate(sets: tuple = ()):
    # a misspelt kind is typed past the kind cell's list rule on purpose (as pasting does): the
    # engine's message in the K column is what is checked
    return evaluate_book(PATH, {ref: str(value) for ref, value in sets}, validate=False)


def _solution(evaluation):
    """{branch: (q, h, R, method, note)} and {node: (T, low, high, state, heat in)} as the sheet shows them."""
    at = _layout()
    first_branch = at["branch"] + 1
    branch_columns = [_cells(evaluation, c, first_branch, own_network.BRANCH_ROWS) for c in "ABCDEK"]
    branches = {row[0]: row[1:] for row in zip(*branch_columns) if row[0] != ""}
    first_node = at["solved node"] + 1
    node_columns = [_cells(evaluation, c, first_node, own_network.NODE_ROWS) for c in "ACDEBF"]
    nodes = {row[0]: row[1:] for row in zip(*node_columns) if row[0] != ""}
    return branches, nodes


def _assert_equals_engine(evaluation, branch_rows, boundary_rows):
    result = stillair.solve_network(branch_rows, boundary_rows, "air", pressure=101325.0, band=True)
    branches, nodes = _solution(evaluation)
    assert list(branches) == list(result.heat)
    for name, (q, h, r, method, note) in branches.items():
        record = result.branches[name]
        assert q == pytest.approx(result.heat[name], rel=1e-9), name
        assert r == pytest.approx(record.R, rel=1e-9), name
        assert h == ("-" if record.h != record.h else pytest.approx(record.h, rel=1e-9)), name
        assert method == record.method
        assert note == (record.note or "none")
    assert list(nodes) == list(result.temperatures)
    fixed = {row[0] for row in boundary_rows if row[1] == "T"}
    for node, (t, low, high, state, _heat_in) in nodes.items():
        assert t == pytest.approx(result.temperatures[node], rel=1e-9, abs=1e-9), node
        assert (low, high) == pytest.approx(result.band[node], rel=1e-9, abs=1e-9), node
        assert state == ("fixed" if node in fixed else "solved")
    return result


def test_the_worked_example_equals_a_direct_engine_solution():
    evaluation = _evaluate()
    result = _assert_equals_engine(evaluation, own_network.EXAMPLE_BRANCHES, own_network.EXAMPLE_BOUNDARIES)
    names = evaluation.names
    solved = [t for node, t in result.temperatures.items() if node not in ("room_air", "room_walls")]
    assert names["res_t_hottest"] == pytest.approx(max(solved), rel=1e-12)
    assert names["res_hottest_node"] == "board"
    assert names["res_t_hottest_high"] == pytest.approx(
        max(result.band[n][1] for n in result.temperatures if n not in ("room_air", "room_walls")), rel=1e-12)
    assert names["res_branches"] == len(own_network.EXAMPLE_BRANCHES)
    assert names["res_nodes"] == len(result.temperatures)
    assert names["res_listed"] == "yes"
    assert names["res_net_check"].startswith("OK")
    assert not evaluation.notes     # the example is inside every correlation's range


def test_a_branch_typed_after_blank_rows_joins_the_network_and_its_row():
    """Blank rows are skipped: a branch typed on the 30th row (rows 16-29 blank) is solved, and its
    solution appears on its own row, the rows above it unmoved."""
    row = _layout()["name"] + 30
    extra = ["lid_film", "lid_out", "room_air", "film", 1.5, 0.06, None, None, None, None]
    sets = tuple((f"Network!{col}{row}", value) for col, value in zip("ABCDEF", extra[:6]))
    evaluation = _evaluate(sets)
    _assert_equals_engine(evaluation, own_network.EXAMPLE_BRANCHES + [extra], own_network.EXAMPLE_BOUNDARIES)
    shown = _cells(evaluation, "A", _layout()["branch"] + 1, own_network.BRANCH_ROWS)
    assert shown[29] == "lid_film" and shown[15:29] == [""] * 14
    # a cooler lid: every solved temperature falls (an extra path to the room)
    assert evaluation.names["res_t_hottest"] < _evaluate().names["res_t_hottest"]


def test_heat_inputs_leave_through_the_fixed_nodes():
    """Energy balance (first law): the Q rows equal the heat into the fixed-temperature nodes."""
    for q in (20.0, 55.0):
        evaluation = _evaluate((("Network!C" + str(_layout()["node"] + 1), q),))
        names = evaluation.names
        assert names["res_heat_inputs"] == pytest.approx(q, rel=1e-12)
        assert names["res_heat_to_fixed"] == pytest.approx(q, rel=1e-8)
        _, nodes = _solution(evaluation)
        taken = {node: heat for node, (_t, _l, _h, state, heat) in nodes.items() if state == "fixed"}
        assert set(taken) == {"room_air", "room_walls"} and all(h > 0 for h in taken.values())
        assert sum(taken.values()) == pytest.approx(q, rel=1e-8)
        assert all(heat == "" for _t, _l, _h, state, heat in nodes.values() if state == "solved")


def test_no_heat_input_leaves_every_node_between_the_fixed_temperatures():
    """Second law: without a heat input nothing is warmer than the room air or colder than its walls."""
    _, nodes = _solution(_evaluate((("Network!C" + str(_layout()["node"] + 1), 0),)))
    for node, (t, *_rest) in nodes.items():
        assert 21.0 - 1e-9 <= t <= 23.0 + 1e-9, node


def test_the_p_columns_say_what_the_kind_registry_says():
    """Beside every branch row: the kind's parameter labels and units, in order, from BRANCH_KINDS;
    every kind typed in turn, and a word that is not a kind."""
    first = _layout()["name"] + 1
    kinds = list(BRANCH_KINDS)
    sets = tuple((f"Network!D{first + 20 + k}", kind) for k, kind in enumerate(kinds))
    evaluation = _evaluate(sets + ((f"Network!D{first + 39}", "Cavity"),))
    shown = _cells(evaluation, "K", first, own_network.BRANCH_ROWS)
    for k, kind in enumerate(kinds):
        params = BRANCH_KINDS[kind].params
        assert shown[20 + k] == ", ".join(f"{p.label} {p.unit}".strip() for p in params), kind
    assert shown[39] == own_network.kind_columns(BRANCH_KINDS["cavity"])   # as the engine, case ignored
    assert shown[3] == "thickness m, conductivity W/(m·K), area m²"       # panel_wall, conduction
    assert shown[15] == ""                                                  # a blank row says nothing
    assert _cells(_evaluate(((f"Network!D{first}", "cavitty"),)), "K", first, 1) == \
        ["not a kind: choose from the list"]


def test_the_kind_cells_offer_the_kinds_of_the_registry():
    ws = openpyxl.load_workbook(PATH)["Network"]
    first = _layout()["name"] + 1
    lists = [v for v in ws.data_validations.dataValidation if v.type == "list"
             and f"D{first}" in str(v.sqref)]
    assert len(lists) == 1 and lists[0].allow_blank
    assert lists[0].formula1.strip('"').split(",") == list(BRANCH_KINDS)
    assert str(lists[0].sqref) == f"D{first}:D{first + own_network.BRANCH_ROWS - 1}"


def test_a_bad_cell_is_named_by_row_column_and_value():
    first = _layout()["name"] + 1
    evaluation = _evaluate(((f"Network!E{first + 3}", -0.0015),))
    assert evaluation.names["res_net_check"] == (
        "NET_CHECK: branch row 4 (panel_wall), column p1 (thickness) must be > 0 m, got -0.0015")


def test_the_limit_check_reads_the_hottest_solved_node():
    assert _evaluate().names["res_check"] == "OK"
    evaluation = _evaluate((("max_node_t", 50),))
    assert evaluation.names["res_check"] == "EXCEEDS LIMIT"
    assert evaluation.names["res_check_high"] == "EXCEEDS LIMIT"


def test_thinner_air_at_altitude_runs_the_box_hotter():
    assert _evaluate((("site_altitude", 2500),)).names["res_t_hottest"] > _evaluate().names["res_t_hottest"]


def test_room_for_forty_branches_and_the_committed_file_is_its_code(tmp_path):
    assert own_network.BRANCH_ROWS >= 40
    rebuilt = build_template(TEMPLATE, tmp_path / "own-network.xlsx")
    fresh, committed = openpyxl.load_workbook(rebuilt), openpyxl.load_workbook(PATH)
    for sheet in committed.sheetnames:
        a = {c.coordinate: c.value for row in committed[sheet].iter_rows() for c in row if c.value is not None}
        b = {c.coordinate: c.value for row in fresh[sheet].iter_rows() for c in row if c.value is not None}
        assert a == b, f"{sheet}: rebuild the committed template"


def test_the_template_audits_clean():
    result = audit_book(PATH)
    assert not result.findings, [str(f) for f in result.findings[:5]]


SOFFICE = shutil.which("soffice") or shutil.which("libreoffice")


@pytest.mark.slow
@pytest.mark.skipif(SOFFICE is None or shutil.which("pdftotext") is None,
                    reason="LibreOffice and pdftotext are needed to print the template")
def test_libreoffice_prints_the_template_without_error_text(tmp_path):
    pdf = render_pdf([PATH], tmp_path)[0]
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], check=True, capture_output=True,
                          text=True).stdout
    assert not re.findall(r"#NAME\?|#VALUE!|#REF!|#DIV/0!|#N/A|Err:\d+|###", text)
    assert "OK: " in text and "elsherbiny" in text and "p1..p5 of this kind" in text


def test_every_input_row_is_one_line_high():
    """A wrapped label or note makes the sand input box twice as tall, which reads as a second,
    empty input cell under the value."""
    ws = openpyxl.load_workbook(PATH)["Inputs"]
    inputs = [row[0].row for row in ws.iter_rows(min_col=2, max_col=2)
              if row[0].fill.fgColor.rgb == "FFFBEFD5" and row[0].value is not None]
    assert len(inputs) == 3
    assert all((ws.row_dimensions[r].height or 13.5) <= 13.5 for r in inputs)


def test_the_hottest_node_is_named_from_the_solution():
    """A strong heat input on the lid's outer face makes it the hottest node; the sheet names it
    and its temperature is the engine's."""
    row = _layout()["node"] + 1 + len(own_network.EXAMPLE_BOUNDARIES)
    extra = ["lid_out", "Q", 150.0]
    evaluation = _evaluate(tuple((f"Network!{col}{row}", value) for col, value in zip("ABC", extra)))
    result = stillair.solve_network(own_network.EXAMPLE_BRANCHES, own_network.EXAMPLE_BOUNDARIES + [extra])
    assert max(result.temperatures, key=result.temperatures.get) == "lid_out"
    assert evaluation.names["res_hottest_node"] == "lid_out"
    assert evaluation.names["res_t_hottest"] == pytest.approx(result.temperatures["lid_out"], rel=1e-9)
