"""Each geometry carries its facts once; the layers above read them (and must agree)."""

from __future__ import annotations

import re

import pytest

from stillair.addin.cells.registry import REGISTRY
from stillair.correlations import CORRELATIONS, GEOMETRIES

METHOD_CELLS = [(entry, entry.engine.split("_", 1)[1]) for entry in REGISTRY
                if entry.engine.startswith(("nu_", "h_")) and entry.engine.split("_", 1)[1] in GEOMETRIES
                and any(arg.name == "method" for arg in entry.args)]


@pytest.mark.parametrize("entry, geometry", METHOD_CELLS, ids=lambda v: getattr(v, "name", v))
def test_cell_method_help_lists_exactly_the_geometrys_methods(entry, geometry):
    doc = next(arg.doc for arg in entry.args if arg.name == "method")
    listed = re.search(r": (.*); blank", doc).group(1)
    names = {re.sub(r"\s*\(.*?\)", "", part).strip() for part in re.split(r",\s*(?![^()]*\))", listed)}
    assert names == set(GEOMETRIES[geometry].methods)


def test_method_help_names_the_cases_a_method_serves():
    assert GEOMETRIES["tplate"].method_help() == (
        "churchill-chu-cos (hot-down, cold-up), raithby-hollands (hot-up, cold-down)")
    assert GEOMETRIES["hcyl"].method_help() == "churchill-chu, morgan, kuehn-goldstein"


def test_every_auto_step_names_a_registered_method_and_form():
    for geometry in GEOMETRIES.values():
        for case in geometry.cases or (None,):
            steps = geometry.auto[case]
            assert steps[-1].when == ()
            for step in steps:
                corr = CORRELATIONS[(geometry.name, step.method)]
                assert step.form is None or step.form in corr.forms
                assert not corr.cases or case in corr.cases
                assert step.method in geometry.description


def test_define_geometry_refuses_a_rule_without_a_last_step_covering_everything():
    from stillair.correlations import AutoStep, Geometry, define_geometry
    with pytest.raises(RuntimeError, match="must end with a step that covers everything"):
        define_geometry(Geometry(name="test-only", inputs=("ra", "pr"), description="",
                                 auto={None: (AutoStep("churchill-chu"),)}))
    assert "test-only" not in GEOMETRIES
