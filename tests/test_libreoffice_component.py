"""The LibreOffice component's own Python (addin/libreoffice/stillair_calc.py), without LibreOffice.

The component runs inside LibreOffice's Python; here it is imported with stand-ins for the UNO
modules (only the base classes it names), beside the ``stillair_functions.json`` the set-up
writes from the registry.  What is checked: a cell's arguments reach the one call path as the
values they stand for (a required single cell unwrapped, a range kept, an empty reference to an
optional text read as blank), so a cell shows what ``callpath.call`` gives; and the load job's
cheap scan for called names never skips a formula that the full rewrite would change.
"""

from __future__ import annotations

import importlib.util
import itertools
import json
import random
import shutil
import sys
import types
from pathlib import Path

import pytest

from stillair.addin.cells.callpath import call, evaluate
from stillair.addin.cells.registry import BY_NAME
from stillair.addin.libreoffice import build

COMPONENT = Path(build.__file__).with_name("stillair_calc.py")

_UNO_NAMES = {
    "com.sun.star.lang": ("Locale", "XLocalizable", "XServiceInfo", "XServiceName"),
    "com.sun.star.sheet": ("LocalizedName", "XAddIn", "XCompatibilityNames"),
    "com.sun.star.task": ("XJob",),
    "org.stillair.calc": ("XStillairFunctions",),
}


@pytest.fixture(scope="module")
def component(tmp_path_factory):
    folder = tmp_path_factory.mktemp("component")
    shutil.copyfile(COMPONENT, folder / COMPONENT.name)
    (folder / "stillair_functions.json").write_text(json.dumps(build.function_spec()))
    stand_ins = {"uno": types.ModuleType("uno"), "unohelper": types.ModuleType("unohelper")}
    stand_ins["unohelper"].Base = type("Base", (), {})
    stand_ins["unohelper"].ImplementationHelper = lambda: types.SimpleNamespace(
        addImplementation=lambda *args: None)
    for module, names in _UNO_NAMES.items():
        parts = module.split(".")
        for depth in range(1, len(parts)):
            stand_ins.setdefault(".".join(parts[:depth]), types.ModuleType(".".join(parts[:depth])))
        stand_ins[module] = types.ModuleType(module)
        for name in names:  # distinct classes: the add-in class derives from several at once
            setattr(stand_ins[module], name, type(name, (), {"__init__": lambda self, *a: None}))
    saved = {name: sys.modules.get(name) for name in stand_ins}
    sys.modules.update(stand_ins)
    try:
        spec = importlib.util.spec_from_file_location("stillair_calc_under_test", folder / COMPONENT.name)
        module = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(module)
    finally:
        for name, previous in saved.items():
            if previous is None:
                sys.modules.pop(name, None)
            else:
                sys.modules[name] = previous
    # As _load_stillair leaves it, without touching this interpreter's sys.path.
    module._state.update(evaluate=evaluate, entries=BY_NAME, error=None)
    return module


def _cell(value):
    return ((value,),)  # how Calc passes a single cell to an argument declared as a mixed array


def test_required_single_cells_are_unwrapped_and_give_what_the_call_path_gives(component):
    add_in = component.StillairAddIn(None)
    # H_CAVITY: four required numbers, then tilt (number), gas (text), pressure, method (text)
    got = add_in.H_CAVITY(_cell(15.0), _cell(5.0), _cell(0.016), _cell(1.2), None, None, None, None)
    assert got == ((call("H_CAVITY", 15.0, 5.0, 0.016, 1.2),),)
    got = add_in.AIR_CONDUCTIVITY(_cell(20.0), None)
    assert got == ((call("AIR_CONDUCTIVITY", 20.0),),)


def test_a_range_stays_a_range(component):
    add_in = component.StillairAddIn(None)
    got = add_in.AIR_CONDUCTIVITY(((10.0,), (20.0,), (30.0,)), None)
    assert got == tuple((call("AIR_CONDUCTIVITY", t),) for t in (10.0, 20.0, 30.0))


def test_an_empty_reference_is_blank_for_an_optional_text_only(component):
    positions = component._positions("H_CAVITY")
    args = component._arguments(positions, (_cell(15.0), _cell(5.0), _cell(0.016), _cell(1.2),
                                            0.0, 0.0, 0.0, 0.0))
    # tilt and pressure are numbers (0 may be meant); gas and method are texts (0 cannot be)
    assert args == [15.0, 5.0, 0.016, 1.2, 0.0, None, 0.0, None]


def test_bad_input_in_a_single_cell_is_named_as_in_the_call_path(component):
    add_in = component.StillairAddIn(None)
    got = add_in.H_CAVITY(_cell("warm"), _cell(5.0), _cell(0.016), _cell(1.2), None, None, None, None)
    assert got == ((call("H_CAVITY", "warm", 5.0, 0.016, 1.2),),)
    assert "t1" in got[0][0] and "'warm'" in got[0][0]


def _full_rewrite(component, formula):
    """The rewrite without the cheap scan: what rebind_formula must equal."""
    parts = component._STRING.split(formula)
    for index in range(0, len(parts), 2):
        parts[index] = component._CALL.sub(component._bound, parts[index])
    new = "".join(parts)
    return new if new != formula else None


def test_the_scan_for_called_names_skips_only_formulas_the_rewrite_leaves_alone(component):
    ours = ["H_CAVITY", "air_density", "Air_Conductivity", "NET_SOLVE"]
    prefixes = ["", "_xll.", "_xludf.", "[1]!", "'C:\\x\\stillair.xlam'!", "stillair.xlam!",
                component.IMPLEMENTATION + ".", "X", "1", ".", "$"]
    others = ["SUM", "ROUND", "IF", "H_CAVITYX", "MY_H_CAVITY"]
    pieces = [p + n + "(A1;2)" for p, n in itertools.product(prefixes, ours + others)]
    pieces += ['"H_CAVITY(1)"', "H_CAVITY (A1)", "A1+B2", '"say ""AIR_DENSITY(20)"""']
    rng = random.Random(21)
    formulas = ["=" + "+".join(rng.choice(pieces) for _ in range(rng.randint(1, 4))) for _ in range(3000)]
    rewritten = 0
    for formula in formulas:
        expected = _full_rewrite(component, formula)
        assert component.rebind_formula(formula) == expected, formula
        rewritten += expected is not None
    assert 0 < rewritten < len(formulas)  # the sample holds both kinds


def test_column_runs_and_chunk_rows(component):
    new = [[None, "=F()", None, "=F()", "=F()", None],
           [None, None, None, None, "=F()", None]]
    assert component._column_runs(new) == [(1, 1), (3, 4)]
    assert component._column_runs([[None, None]]) == []
    assert component.chunk_rows(100) == component.MIN_CHUNK_ROWS
    assert component.chunk_rows(3200) == 226  # 4 * sqrt(3200) = 226.3


def test_the_copied_form_sees_relative_rows_only(component):
    form = component._copied_form
    # copied down one row: relative rows move, absolute rows and function names do not
    assert form("=F(A1;$B$1;C$1;LOG10(2);Q1_a)", 0) == form("=F(A2;$B$1;C$1;LOG10(2);Q1_a)", 1)
    assert form("=F(A1;$B$1)", 0) != form("=F(A2;$B$2)", 1)  # an absolute row that moved
    assert form("=F($Sheet2.A1)", 0) != form("=F($Sheet2.A2)", 1)  # another sheet: not guessed


class _FilledColumn:
    """One column of a sheet as _copy_down sees it: ``fillAuto`` copies the top formula down,
    moving the row numbers of its references and not its texts, as LibreOffice does."""

    def __init__(self, component, formulas, formats=1):
        self.component, self.formulas, self.formats = component, list(formulas), formats
        self.set_first, self.filled = None, False

    # the range
    def getCellFormatRanges(self):
        return types.SimpleNamespace(getCount=lambda: self.formats)

    def getCellByPosition(self, column, row):
        assert (column, row) == (0, 0)
        return types.SimpleNamespace(setFormula=self._set_first)

    def _set_first(self, formula):
        self.set_first = formula
        self.formulas[0] = formula.replace("=", "=" + self.component._RESOLVED % "", 1)

    def fillAuto(self, direction, count):
        assert count == 1
        self.filled = True
        pattern, texts = self.component._ROW_REFERENCE, self.component._STRING
        parts = texts.split(self.formulas[0])  # odd parts are texts: a fill leaves them alone
        self.formulas = ["".join(part if k % 2 else pattern.sub(
            lambda m, i=i: m.group(1) + str(int(m.group(2)) + i), part) for k, part in enumerate(parts))
            for i in range(len(self.formulas))]

    def getFormulaArray(self):
        return tuple((f,) for f in self.formulas)

    # the sheet
    def getCellRangeByPosition(self, *corners):
        return self

    def getAnnotations(self):
        return types.SimpleNamespace(getCount=lambda: 0)


def _copy_down(component, column, monkeypatch):
    monkeypatch.setattr(component.uno, "Enum", lambda *names: names, raising=False)
    address = types.SimpleNamespace(StartColumn=0, StartRow=0, EndRow=len(column.formulas) - 1)
    return component._copy_down(column, address, 0, list(column.formulas))


def test_a_copied_down_column_is_filled_from_its_one_rewritten_first_formula(component, monkeypatch):
    rows = 300
    column = _FilledColumn(component, [f"=h_cavity(A{n};B{n};0.016;1.2)" for n in range(1, rows + 1)])
    assert _copy_down(component, column, monkeypatch) == rows
    assert column.set_first == "=H_CAVITY(A1;B1;0.016;1.2)" and column.filled
    assert column.formulas[-1] == f"={component._RESOLVED % 'H_CAVITY'}(A{rows};B{rows};0.016;1.2)"


def test_a_column_that_only_looks_copied_is_left_to_the_rows(component, monkeypatch):
    # "A1" in a text looks like a reference: the forms agree, the fill reads back wrong
    column = _FilledColumn(component, [f'=air_density(A{n})&"A{n}"' for n in range(1, 301)])
    assert _copy_down(component, column, monkeypatch) is None and column.filled
    # not copied down (a row differs), or one format does not cover it: never filled
    for formulas, formats in (([f"=air_density(A{n})" for n in range(1, 300)] + ["=air_density(A1)"], 1),
                              ([f"=air_density(A{n})" for n in range(1, 301)], 2),
                              ([f"=SUM(A{n};1)" for n in range(1, 301)], 1)):  # none of ours
        column = _FilledColumn(component, formulas, formats)
        assert _copy_down(component, column, monkeypatch) is None
        assert not column.filled and column.set_first is None


def test_timing_marks_are_written_only_when_asked(component, tmp_path, monkeypatch):
    log = tmp_path / "timing.jsonl"
    monkeypatch.setattr(component, "TIMING_LOG", None)
    component._timing("job_started")
    assert not log.exists()
    monkeypatch.setattr(component, "TIMING_LOG", str(log))
    component._timing("rebound", formulas=12)
    mark = json.loads(log.read_text())
    assert mark["event"] == "rebound" and mark["formulas"] == 12 and mark["cpu"] >= 0 and mark["wall"] > 0
