"""Rules every cell function in the registry must obey, and the generated reference."""

from __future__ import annotations

import importlib
import re
import sys
import types
from pathlib import Path

import pytest

from stillair.addin.cells.registry import REGISTRY, Arg
from stillair.addin.cells.reference import reference_markdown

ROOT = Path(__file__).resolve().parent.parent

# Every cell function whose name the project fixed, plus the validity-note function we named.
DESIGN_NAMES = (
    [f"{p}_{q}" for p in ("AIR", "GAS") for q in ("DENSITY", "VISCOSITY", "KINVISC", "CONDUCTIVITY",
                                                  "CP", "DIFFUSIVITY", "PRANDTL", "EXPANSION")]
    + ["ALTITUDE_PRESSURE", "RAYLEIGH", "GRASHOF", "NU_VPLATE", "NU_HPLATE", "NU_TPLATE", "NU_HCYL",
       "NU_SPHERE", "NU_VCYL", "NU_CAVITY", "CAVITY_METHOD", "NU_NOTE", "H_VPLATE", "H_HPLATE", "H_TPLATE",
       "H_HCYL", "H_SPHERE", "H_VCYL", "H_CAVITY", "H_RAD", "NET_SOLVE", "NET_TEMP", "NET_HEAT", "NET_CHECK",
       "STILLAIR_VERSION"]
    + ["NU_CHANNEL", "H_CHANNEL", "CHANNEL_SPACING", "HEATSINK_Q", "HEATSINK_TBASE"]
    + ["NU_SPREAD", "NET_BAND"]
    + ["STACK_FLOW", "AIRFLOW_FOR", "NET_AIRFLOW"]
    + ["SAT_PRESSURE", "VAPOUR_PRESSURE", "HUMIDITY_RATIO", "DEW_POINT", "SURFACE_RH", "TEMP_FACTOR",
       "NET_HEAT_FOR", "INSULATION_THICKNESS"]
    + ["NET_TRANSIENT", "NET_PEAK"])

# VBA keywords and the names the generated VBA wrapper itself uses (Array, XLPy, Err...): an
# argument with one of these names would not compile.  From the VBA language specification
# (MS-VBAL, section 3.3.5.2 "Reserved Identifiers and IDENTIFIER"), plus the wrapper's names as
# written by xlwings.udfs.generate_vba_wrapper.
VBA_RESERVED = {w.lower() for w in """
Abs AddressOf And Any Array As Attribute Boolean ByRef Byte ByVal Call Case CBool CByte CCur CDate
CDbl CDec CDecl CInt CLng CLngLng CLngPtr Close Const CSng CStr CVar CVErr Currency Date Debug
Decimal Declare DefBool DefByte DefCur DefDate DefDbl DefDec DefInt DefLng DefLngLng DefLngPtr
DefObj DefSng DefStr DefVar Dim Do DoEvents Double Each Else ElseIf Empty End EndIf Enum Eqv Erase
Error Event Exit False Fix For Friend Function Get Global GoSub GoTo If Imp Implements In Input
InputB Int Integer Is LBound Len LenB Let Like LongLong LongPtr Lock Long Loop LSet Me Mid MidB Mod
New Next Not Nothing Null Object On Open Option Optional Or ParamArray Preserve Print Private PSet
Public Put RaiseEvent Randomize ReDim Rem Resume Return RSet Scale Seek Select Set Sgn Shared Single
Spc Static Step Stop String Sub Tab Then To True Type TypeOf UBound Unlock Until Variant Wend While
With WithEvents Write Xor
Application ActiveWorkbook ThisWorkbook XLPy Err failed caller
""".split()}

VBA_IDENTIFIER = re.compile(r"^[A-Za-z][A-Za-z0-9_]{0,254}$")
MAX_COLUMN = 16384       # XFD, Excel's last column (Excel specifications and limits)
MAX_ROW = 1048576


def is_a1_address(name: str) -> bool:
    m = re.fullmatch(r"([A-Za-z]{1,3})([0-9]+)", name)
    if not m:
        return False
    column = 0
    for ch in m.group(1).upper():
        column = column * 26 + ord(ch) - 64
    return column <= MAX_COLUMN and 1 <= int(m.group(2)) <= MAX_ROW


def is_r1c1_address(name: str) -> bool:
    return re.fullmatch(r"[Rr]([0-9]*)[Cc]([0-9]*)|[RrCc][0-9]*", name) is not None


def test_address_checks_themselves():
    assert is_a1_address("ABC12") and is_a1_address("XFD1048576") and is_a1_address("h1")
    assert not is_a1_address("XFE1") and not is_a1_address("A1048577") and not is_a1_address("NU_NOTE")
    assert is_r1c1_address("R1C1") and is_r1c1_address("RC") and not is_r1c1_address("RAD")


def test_every_design_function_is_registered_once():
    names = [f.name for f in REGISTRY]
    assert sorted(names) == sorted(DESIGN_NAMES)
    assert len({n.lower() for n in names}) == len(names)


@pytest.mark.parametrize("entry", REGISTRY, ids=lambda e: e.name)
def test_names_are_vba_identifiers_and_not_addresses(entry):
    assert VBA_IDENTIFIER.match(entry.name), entry.name
    assert not is_a1_address(entry.name) and not is_r1c1_address(entry.name)
    assert entry.name.lower() not in VBA_RESERVED
    arg_names = [a.name for a in entry.args]
    assert len({a.lower() for a in arg_names}) == len(arg_names)
    for name in arg_names:
        assert VBA_IDENTIFIER.match(name), name
        assert name.lower() not in VBA_RESERVED, f"{entry.name}: argument {name} is a VBA keyword"
        assert name.lower() != entry.name.lower()
    # Optional arguments come last (Excel and Python both require it).
    flags = [a.optional for a in entry.args]
    assert flags == sorted(flags)


def _formulas_builtins() -> set[str]:
    """Excel built-in names as formulas 1.3 lists them, from its own modules (not the shared
    table our functions are registered in)."""
    import formulas.functions as base
    names = set(base.FUNCTIONS)
    for sub in base.SUBMODULES:
        names.update(importlib.import_module(sub, base.__name__).FUNCTIONS)
    return {n.upper().removeprefix("_XLFN.").removeprefix("_XLWS.") for n in names}


def test_no_excel_builtin_is_shadowed():
    builtins = _formulas_builtins()
    assert {"SUM", "IF", "INDEX", "XLOOKUP"} <= builtins  # the list is the real one
    assert not [f.name for f in REGISTRY if f.name.upper() in builtins]


@pytest.mark.parametrize("entry", REGISTRY, ids=lambda e: e.name)
def test_texts_fit_the_function_wizard(entry):
    from stillair.addin.cells.registry import arg_doc
    assert 0 < len(entry.description) <= 255
    assert entry.category and len(entry.category) <= 255
    for arg in entry.args:
        assert 0 < len(arg_doc(arg)) <= 255, (entry.name, arg.name)
        assert arg.kind in ("number", "text", "table")
    assert entry.result in ("number", "text", "table")
    assert entry.engine.isidentifier()


def test_shared_arguments_are_defined_once():
    # "Nothing listed twice": identical argument definitions are the same object.
    seen = {}
    for entry in REGISTRY:
        for arg in entry.args:
            seen.setdefault((arg.name, arg.doc, arg.unit, arg.kind, repr(arg.default)), set()).add(id(arg))
    assert [key[0] for key, ids in seen.items() if len(ids) > 1] == []


def test_every_network_branch_kind_is_explained():
    from stillair.addin.cells.reference import network_markdown, network_text
    from stillair.network import BRANCH_KINDS
    for name, kind in BRANCH_KINDS.items():
        assert f"| `{name}` | q = " in network_markdown()
        assert f"{name}: q = " in network_text()
        for param in kind.params:
            assert param.describe() in network_markdown()


def test_readme_function_table_is_the_generated_reference():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    start, end = "<!-- functions:start -->", "<!-- functions:end -->"
    assert start in text and end in text
    block = text[text.index(start) + len(start):text.index(end)]
    assert block.strip() == reference_markdown().strip(), (
        "README function table is stale: regenerate it with `stillair functions --markdown`")


# ---------------------------------------------------------------------------------------------
# Contract with xlwings: generate its own VBA wrappers for our module on Linux.  xlwings.udfs
# imports pywin32 at module level; stub modules stand in for it.  This relies on xlwings
# internals (udfs.xlfunc/xlarg/xlret and generate_vba_wrapper) as of xlwings 0.37.


@pytest.fixture()
def xlwings_udfs(monkeypatch):
    stubs = {
        "pythoncom": types.SimpleNamespace(CoInitialize=lambda: None, IID_IDispatch=None),
        "pywintypes": types.SimpleNamespace(com_error=Exception),
        "win32com": types.ModuleType("win32com"),
        "win32com.client": types.SimpleNamespace(Dispatch=lambda *a, **k: None),
    }
    for name, module in stubs.items():
        monkeypatch.setitem(sys.modules, name, module)
    monkeypatch.delitem(sys.modules, "xlwings.udfs", raising=False)
    try:
        return importlib.import_module("xlwings.udfs")
    except Exception as error:  # pragma: no cover - a changed xlwings
        pytest.fail(f"xlwings.udfs no longer imports with pywin32 stubs: {error!r}")


def test_xlwings_generates_vba_for_every_function(xlwings_udfs):
    import io

    from stillair.addin.excel import udfs as xlfuncs

    namespace = {}
    xlfuncs.build(namespace, func=xlwings_udfs.xlfunc, arg=xlwings_udfs.xlarg, ret=xlwings_udfs.xlret)
    module = types.SimpleNamespace(**namespace)
    out = io.StringIO()
    xlwings_udfs.generate_vba_wrapper("stillair.addin.xlfuncs", module, out,
                                      types.SimpleNamespace(Name="stillair.xlam"))
    vba = out.getvalue()
    for entry in REGISTRY:
        params = ", ".join(("Optional " if a.optional else "") + a.name for a in entry.args)
        assert f"Function {entry.name}({params})" in vba
        assert f'XLPy.CallUDF("stillair.addin.xlfuncs", "{entry.name}", Array({", ".join(a.name for a in entry.args)})' in vba
        info = namespace[entry.name].__xlfunc__
        assert info["category"] == entry.category
        assert info["ret"]["doc"] == entry.description
        assert [a["doc"] for a in info["args"]] == [xlfuncs.arg_doc(a) for a in entry.args]
        assert [a.get("optional", "required") for a in info["args"]] == [
            None if a.optional else "required" for a in entry.args]
        for a, spec in zip(entry.args, info["args"]):
            assert spec["options"].get("err_to_str") is True
            two_d = a.kind == "table" or (a.kind == "number" and entry.takes_arrays)
            assert spec["options"].get("ndim") == (2 if two_d else None)
    assert "ActiveWorkbook" in vba  # the add-in form of the wrapper


def test_arg_kinds_and_defaults_are_consistent():
    for entry in REGISTRY:
        for arg in entry.args:
            assert isinstance(arg, Arg)
            if arg.kind == "table":   # an optional table is left blank: None, never a made-up table
                assert not arg.optional or arg.default is None
            if arg.optional and arg.kind == "number":
                assert arg.default is None or isinstance(arg.default, float)


@pytest.fixture
def throwaway_vplate_method():
    """A correlation registered with the engine's own decorator for the test only, removed after.
    The registry is a dict keyed by (geometry, method); methods_for's cached lists are renewed by
    the next registration, so a second throw-away is registered and removed at the end."""
    from stillair.correlations import CORRELATIONS, correlation, methods_for

    def register(method):
        correlation(geometry="vplate", method=method, title="test only", source="none (a test)",
                    equation="Nu = 1")(lambda ra, pr: 1.0 + 0.0 * ra)

    method = "throwawaytest"
    register(method)
    yield method
    del CORRELATIONS[("vplate", method)]
    register("throwawayrenewal")
    del CORRELATIONS[("vplate", "throwawayrenewal")]
    assert method not in methods_for("vplate")


def test_a_method_registered_in_the_engine_is_named_in_every_cell_help(throwaway_vplate_method, xlwings_udfs,
                                                                       capsys):
    """The method lists of the cell help are read from the engine's registry, never retyped:
    a new correlation appears in the cell help, the Excel function wizard's text, the
    LibreOffice function description and `stillair functions` without editing the cell layer."""
    from stillair.addin.cells.registry import BY_NAME, arg_doc
    from stillair.addin.cli import main
    from stillair.addin.excel import udfs
    from stillair.addin.libreoffice.build import function_spec

    method = throwaway_vplate_method
    for name in ("NU_VPLATE", "H_VPLATE"):
        entry = BY_NAME[name]
        (arg,) = [a for a in entry.args if a.name == "method"]
        assert method in arg.doc and len(arg_doc(arg)) <= 255
        namespace = {}
        udfs.build(namespace, func=xlwings_udfs.xlfunc, arg=xlwings_udfs.xlarg, ret=xlwings_udfs.xlret)
        assert any(method in a["doc"] for a in namespace[name].__xlfunc__["args"])
        (spec,) = [f for f in function_spec(paths={})["functions"] if f["name"] == name]
        assert any(method in a["doc"] for a in spec["args"])
    for argv in (["functions"], ["functions", "--markdown"]):
        assert main(argv) == 0
        assert method in capsys.readouterr().out
    assert method not in BY_NAME["NU_HCYL"].args[-1].doc       # only the geometry's own list


def test_no_user_visible_text_names_internal_modules(capsys):
    """Users see `stillair` functions and commands, never the source folders' module names."""
    from stillair.addin.cli import main

    internal = re.compile(r"\b(engine|addin)\.")
    texts = []
    for entry in REGISTRY:
        texts += [entry.description, entry.category] + [a.doc for a in entry.args]
    for argv in (["functions"], ["functions", "--markdown"]):
        main(argv)
        texts.append(capsys.readouterr().out)
    for command in ("", "calc", "audit", "templates", "functions", "excel-setup", "libreoffice-setup"):
        with pytest.raises(SystemExit):
            main([command, "--help"] if command else ["--help"])
        texts.append(capsys.readouterr().out)
    assert [t for t in texts if internal.search(t)] == []
