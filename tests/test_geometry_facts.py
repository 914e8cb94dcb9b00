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
            # issue 19: no catch-all last step any more (the rule's nearest-valid part keeps a
            # correlation beyond every range); an unconditional step (when=()) is a rule of one
            # correlation, never one step among several
            assert len(steps) == 1 or all(step.when != () for step in steps), (geometry.name, case)
            for step in steps:
                corr = CORRELATIONS[(geometry.name, step.method)]
                assert step.form is None or step.form in corr.forms
                assert not corr.cases or case in corr.cases
                assert step.method in geometry.description


@pytest.mark.parametrize("ra", [0.0, 1e-20, 1e29])
def test_auto_gives_every_case_a_value_beyond_every_range(ra):
    """What the catch-all step used to guarantee, the rule now does (issue 19): beyond every
    range the nearest correlation is kept, extrapolated with its out-of-range note."""
    import math
    from stillair.correlations import nusselt
    inputs = {"pr": 0.71, "aspect": 1e6, "slenderness": 1e6, "tilt": 90.0, "re": 1e-9}
    for geometry in GEOMETRIES.values():
        for case in geometry.cases or (None,):
            args = {k: v for k, v in inputs.items() if k in geometry.inputs}
            if "ra" in geometry.inputs:
                args["ra"] = ra
            result = nusselt(geometry.name, "auto", case, **args).scalar()
            assert math.isfinite(result.nu) and result.nu >= 0.0 and result.method in geometry.methods, (geometry.name, case)
            # (the sphere's Ra and the plate's laminar Re have no lower bound: in range there)
            assert result.in_range or result.note, (geometry.name, case)


def test_define_geometry_refuses_a_case_without_an_auto_rule():
    # the rule needs at least one step per case (a catch-all last step is no longer required:
    # issue 19's rule keeps the nearest correlation beyond every range)
    from stillair.correlations import AutoStep, Geometry, define_geometry
    with pytest.raises(RuntimeError, match="case 'hot-up' has no auto rule"):
        define_geometry(Geometry(name="test-only", inputs=("ra", "pr"), description="",
                                 cases=("hot-up",), auto={None: (AutoStep("churchill-chu"),)}))
    assert "test-only" not in GEOMETRIES
