"""Docstrings of the public functions: numpydoc sections generated from the registry, and
their examples run (doctest), so a documented value cannot drift from the code."""

from __future__ import annotations

import doctest
import inspect
import textwrap

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import stillair
from stillair._docs import fill
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


# The docstrings are written at import with stillair._docs.fill, textwrap.fill's layout without
# its regular expressions where they cannot matter; textwrap itself is the reference.
_WORDS = st.sampled_from(["a", "bb", "Nusselt", "Churchill-Chu", "x--y", "w-", "-z", "long" * 8, "1e-6",
                          "(H/L)", "°C", "a-b-c", "--", "\xa0", "\u2009x", "Ra\tPr", ""])


@settings(max_examples=3000, deadline=None)
@given(words=st.lists(_WORDS, max_size=25), width=st.integers(10, 60),  # (textwrap hangs on lines
       # the indent leaves no room on, so it cannot be the reference there; no docstring has them)
       initial=st.integers(0, 6), subsequent=st.integers(0, 6))
def test_fill_lays_out_text_as_textwrap_does(words, width, initial, subsequent):
    text = " ".join(words)
    expected = textwrap.fill(text, width, initial_indent=" " * initial, subsequent_indent=" " * subsequent)
    assert fill(text, width, " " * initial, " " * subsequent) == expected


def test_every_generated_docstring_paragraph_is_textwraps(monkeypatch):
    """Each paragraph the engine wraps at import, wrapped again by textwrap: the same text."""
    import importlib

    import stillair._docs as docs_module
    seen = []
    real = docs_module.fill

    def recording(text, width, initial_indent="", subsequent_indent=""):
        seen.append((text, width, initial_indent, subsequent_indent))
        return real(text, width, initial_indent, subsequent_indent)

    monkeypatch.setattr(docs_module, "fill", recording)
    for name in ("stillair.gases.data", "stillair.correlations.docs"):
        monkeypatch.setattr(importlib.import_module(name), "fill", recording)
    stillair.correlations.docs.methods_section.cache_clear()
    for geometry in {geometry for geometry, _ in CORRELATIONS}:
        stillair.correlations.docs.methods_section(geometry)
    stillair.gases.data._source_lines("    ")
    stillair.gases.data._gas_doc("    ")
    assert len(seen) > 50
    for text, width, initial, subsequent in seen:
        assert real(text, width, initial, subsequent) == textwrap.fill(
            text, width, initial_indent=initial, subsequent_indent=subsequent)
