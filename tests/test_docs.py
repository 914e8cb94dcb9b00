"""Docstrings of the public functions: numpydoc sections generated from the registry, and
their examples run (doctest), so a documented value cannot drift from the code."""

from __future__ import annotations

import doctest
import inspect

import pytest

import stillair
from stillair.correlations import CORRELATIONS

MODULES = [stillair.correlations, stillair.cavity, stillair.external, stillair.convection, stillair.gases]
DOCUMENTED = ["nu_vplate", "nu_hplate", "nu_tplate", "nu_hcyl", "nu_sphere", "nu_vcyl", "nu_cavity",
              "cavity_method", "h_vplate", "h_hplate", "h_tplate", "h_hcyl", "h_sphere", "h_vcyl", "h_cavity",
              "nu_spread"]


@pytest.mark.parametrize("module", MODULES, ids=lambda m: m.__name__)
def test_examples_in_docstrings_run(module):
    failed, attempted = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert failed == 0


@pytest.mark.parametrize("name", DOCUMENTED)
def test_public_functions_have_the_numpydoc_sections(name):
    doc = inspect.getdoc(getattr(stillair, name))
    for section in ("Parameters\n----------", "Returns\n-------", "Examples\n--------"):
        assert section in doc, section


@pytest.mark.parametrize("name", [n for n in DOCUMENTED if n.startswith(("nu_", "h_")) and n != "nu_spread"])
def test_the_methods_section_is_the_registry(name):
    geometry = name.split("_", 1)[1]
    doc = getattr(stillair, name).__doc__
    for (g, method), corr in CORRELATIONS.items():
        if g == geometry:
            assert f"``{method}``" in doc
            assert " ".join(corr.source.split())[:60] in " ".join(doc.split())
