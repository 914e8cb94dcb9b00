"""The wind as the H_ cell functions take it: optional trailing arguments, the engine's values and
its messages in cell wording (the one call path, stillair.addin.cells.callpath.evaluate)."""

from __future__ import annotations

import pytest

import stillair
from stillair.addin.cells.callpath import evaluate
from stillair.addin.cells.reference import reference_markdown
from stillair.addin.cells.registry import lookup

BLANK = None   # a blank cell


CELLS = [  # cell name, leading arguments, engine call without the wind, wind keywords
    ("H_VPLATE", (60.0, 20.0, 0.5, BLANK, BLANK, BLANK), lambda **w: stillair.h_vplate(60.0, 20.0, 0.5, **w),
     (2.0, 1.2)),
    ("H_HPLATE", (60.0, 20.0, 0.25, "up", BLANK, BLANK, BLANK),
     lambda **w: stillair.h_hplate(60.0, 20.0, 0.25, "up", **w), (2.0, 1.0)),
    ("H_TPLATE", (60.0, 20.0, 1.0, 30.0, "down", BLANK, BLANK, BLANK),
     lambda **w: stillair.h_tplate(60.0, 20.0, 1.0, 30.0, "down", **w), (2.0, 2.5)),
    ("H_HCYL", (60.0, 20.0, 0.05, BLANK, BLANK, BLANK), lambda **w: stillair.h_hcyl(60.0, 20.0, 0.05, **w), (3.0,)),
    ("H_SPHERE", (60.0, 20.0, 0.1, BLANK, BLANK, BLANK), lambda **w: stillair.h_sphere(60.0, 20.0, 0.1, **w), (3.0,)),
    ("H_VCYL", (60.0, 20.0, 0.5, 0.05, BLANK, BLANK, BLANK),
     lambda **w: stillair.h_vcyl(60.0, 20.0, 0.5, 0.05, **w), (3.0,)),
]


@pytest.mark.parametrize("name, leading, engine, wind", CELLS, ids=[c[0] for c in CELLS])
def test_the_wind_arguments_follow_every_existing_argument(name, leading, engine, wind):
    entry = lookup(name)
    names = [arg.name for arg in entry.args]
    assert names[len(leading):] == ["wind", "wind_length"][:len(wind)]
    assert names[:len(leading)][-1] == "method"          # every earlier position kept
    still = evaluate(entry, *leading)
    assert still == engine()
    assert evaluate(entry, *leading, 0.0) == still       # wind 0 is still air exactly
    assert evaluate(entry, *leading, BLANK) == still     # and so is a blank wind
    keywords = dict(zip(("wind", "wind_length"), wind))
    assert evaluate(entry, *leading, *wind) == engine(**keywords)
    assert evaluate(entry, *leading, *wind) > still


def test_wind_messages_name_the_cell_function_argument_and_value():
    assert evaluate(lookup("H_VPLATE"), 60.0, 20.0, 0.5, BLANK, BLANK, BLANK, -2.0) == (
        "H_VPLATE: wind must be >= 0 m/s, got -2")
    assert evaluate(lookup("H_HCYL"), 60.0, 20.0, 0.05, BLANK, BLANK, BLANK, "breezy") == (
        "H_HCYL: wind must be a number, not text, got 'breezy'")
    assert evaluate(lookup("H_HPLATE"), 60.0, 20.0, 0.25, "up", BLANK, BLANK, BLANK, 2.0) == (
        "H_HPLATE: wind_length must be the plate's length along the wind in m (> 0) when wind > 0 "
        "(area/perimeter is not a length along the wind), got an empty cell")
    assert evaluate(lookup("H_TPLATE"), 60.0, 20.0, 1.0, 30.0, "up", BLANK, BLANK, BLANK, 2.0, 0.0) == (
        "H_TPLATE: wind_length must be > 0 m, got 0")


def test_nu_note_and_nu_spread_take_only_the_geometries_that_read_ra():
    message = ('NU_SPREAD: geometry must be one of "vplate", "hplate", "tplate", "hcyl", "sphere", "vcyl", '
               "\"cavity\", \"channel\", got 'plate-flow'")
    assert evaluate(lookup("NU_SPREAD"), "plate-flow", 1e5, 0.7) == message
    assert "plate-flow" not in lookup("NU_NOTE").args[0].doc


def test_the_function_reference_documents_the_wind():
    text = reference_markdown()
    assert "H_VPLATE(ts, tf, height, [gas], [pressure], [method], [wind], [wind_length])" in text
    assert "H_HCYL(ts, tf, diameter, [gas], [pressure], [method], [wind])" in text
    assert "churchill-bernstein" in text and "pohlhausen" in text and "whitaker" in text
