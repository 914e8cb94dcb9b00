"""The public API: what `import stillair` offers, its annotations and its docstrings."""

from __future__ import annotations

import doctest
import importlib
import inspect
import re

import pytest

import stillair
from stillair.addin.cells.registry import REGISTRY

# The engine modules whose functions stillair.__all__ exports: every one of those functions
# carries type hints and a full numpydoc docstring.  (The contributor mechanisms in a module's
# own __all__, such as correlation() or require_positive(), are not held to it.)
DOCUMENTED_MODULES = ("stillair.gases", "stillair.atmosphere", "stillair.groups", "stillair.external",
                      "stillair.cavity", "stillair.correlations", "stillair.convection",
                      "stillair.channel", "stillair.radiation", "stillair.network",
                      "stillair.ventilation",
                      "stillair.humid",
                      "stillair.insulation",
                      "stillair.network.inverse",
                      "stillair.network.transient")
ENGINE_MODULES = ("validity", "correlations", "external", "cavity", "gases", "atmosphere",
                  "groups", "radiation", "convection", "network")
PUBLIC_PREFIXES = ("nu_", "h_", "gas_", "air_")


def _public_functions(module_name: str):
    module = importlib.import_module(module_name)
    return [(name, getattr(module, name)) for name in module.__all__
            if inspect.isfunction(getattr(module, name))]


def test_all_lists_existing_public_names_once():
    assert len(stillair.__all__) == len(set(stillair.__all__))
    for name in stillair.__all__:
        assert hasattr(stillair, name), name
        assert not name.startswith("_") or name == "__version__", name


def test_every_correlation_coefficient_and_property_function_is_public():
    exported = set(stillair.__all__)
    for module in ENGINE_MODULES:
        for name, _ in _public_functions(f"stillair.{module}"):
            if name.startswith(PUBLIC_PREFIXES):
                assert name in exported, f"stillair.{module}.{name} is missing from stillair.__all__"


def test_every_cell_function_computes_with_a_public_name():
    exported = set(stillair.__all__)
    assert {entry.engine for entry in REGISTRY} <= exported


def test_the_engine_never_imports_the_spreadsheet_layer():
    import subprocess
    import sys
    code = ("import sys, stillair; stillair.h_cavity(20, 10, 0.02, 1.0); "
            "print(sorted(m for m in sys.modules if m.startswith(('stillair.addin', 'xlwings', "
            "'formulas', 'openpyxl'))))")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0 and done.stdout.strip() == "[]", done.stderr


def _sections(doc: str) -> dict[str, str]:
    """numpydoc sections: a title line followed by a line of dashes as long as it."""
    parts = re.split(r"^(\w[\w ]*)\n(-+)\n", inspect.cleandoc(doc), flags=re.M)
    return {parts[i]: parts[i + 2] for i in range(1, len(parts) - 2, 3)
            if len(parts[i + 1]) == len(parts[i])}


def _exported_functions():
    return [(name, getattr(stillair, name)) for name in stillair.__all__
            if inspect.isfunction(getattr(stillair, name))]


DOCUMENTED = [(function.__module__, name, function) for name, function in _exported_functions()
              if function.__module__ in DOCUMENTED_MODULES]


def test_every_exported_function_is_held_to_the_documentation_standard():
    outside = [f"{function.__module__}.{name}" for name, function in _exported_functions()
               if function.__module__ not in DOCUMENTED_MODULES]
    assert outside == []


@pytest.mark.parametrize("module, name, function", DOCUMENTED,
                         ids=[f"{m.split('.')[-1]}.{n}" for m, n, _ in DOCUMENTED])
def test_public_function_has_type_hints_and_a_numpydoc_docstring(module, name, function):
    signature = inspect.signature(function)
    for parameter in signature.parameters.values():
        assert parameter.annotation is not inspect.Parameter.empty, f"{name}({parameter.name})"
    assert signature.return_annotation is not inspect.Signature.empty, name
    sections = _sections(function.__doc__ or "")
    titles = ("Parameters", "Returns", "Examples") if signature.parameters else ("Returns", "Examples")
    for title in titles:
        assert title in sections and sections[title].strip(), f"{name}: no {title} section"
    documented = re.findall(r"^(\w+) :", sections.get("Parameters", ""), flags=re.M)
    assert documented == list(signature.parameters), name
    assert ">>> " in sections["Examples"]
    assert "References" in sections or "Notes" in sections, f"{name}: no source"


@pytest.mark.parametrize("module, name, function", DOCUMENTED,
                         ids=[f"{m.split('.')[-1]}.{n}" for m, n, _ in DOCUMENTED])
def test_docstring_examples_run(module, name, function):
    finder, runner = doctest.DocTestFinder(), doctest.DocTestRunner(optionflags=doctest.ELLIPSIS)
    # In the module's namespace, as doctest runs a module: every exported name is also
    # stillair.<name>, so the examples run after ``from stillair import *`` too.
    for test in finder.find(function, name, globs=dict(vars(importlib.import_module(module)))):
        runner.run(test)
    assert runner.failures == 0 and runner.tries > 0


def test_package_docstring_example_runs():
    result = doctest.testmod(stillair, optionflags=doctest.ELLIPSIS)
    assert result.failed == 0 and result.attempted > 0
