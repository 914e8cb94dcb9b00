"""The engine at the edges of its map: absurd sizes and unit slips, in Python and in cells.

Every call below is given a size no correlation covers (a length of 1e300 or 1e-9 m, a fin
height of 30 m, a height typed in mm) or a temperature typed in kelvin.  Each must end in one of
two ways a user can act on: an InputError naming the argument and the value typed, or a number
with a note (a range note, or the unit-slip note).  Never a silent number, never a raw
exception (OverflowError, KeyError, a numpy error), never a numpy warning on stderr.  The counts
are printed (pytest -s).
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

import stillair
from stillair.addin.cells.callpath import NoteRecorder, call
from stillair.correlations import GEOMETRIES
from stillair.plausibility import UnitSlipWarning
from stillair.validity import CorrelationRangeWarning, InputError, format_value

T = (50.0, 20.0)
#: name -> (the call with one length argument free, that argument's name, a typical value in m)
LENGTH_CALLS = {
    "h_vplate": (lambda x: stillair.h_vplate(*T, x), "height", 0.5),
    "h_hplate": (lambda x: stillair.h_hplate(*T, x, "up"), "length", 0.2),
    "h_tplate": (lambda x: stillair.h_tplate(*T, x, 30.0, "up"), "length", 0.5),
    "h_hcyl": (lambda x: stillair.h_hcyl(*T, x), "diameter", 0.05),
    "h_sphere": (lambda x: stillair.h_sphere(*T, x), "diameter", 0.1),
    "h_vcyl/height": (lambda x: stillair.h_vcyl(*T, x, 0.05), "height", 0.5),
    "h_vcyl/diameter": (lambda x: stillair.h_vcyl(*T, 0.5, x), "diameter", 0.05),
    "h_cavity/gap": (lambda x: stillair.h_cavity(30.0, 10.0, x, 1.0), "gap", 0.02),
    "h_cavity/height": (lambda x: stillair.h_cavity(30.0, 10.0, 0.02, x), "height", 1.0),
    "h_channel/spacing": (lambda x: stillair.h_channel(*T, x, 0.1), "spacing", 0.01),
    "h_channel/height": (lambda x: stillair.h_channel(*T, 0.01, x), "height", 0.1),
    "channel_spacing/height": (lambda x: stillair.channel_spacing(*T, x), "height", 0.1),
    "heatsink_q/base_width": (lambda x: stillair.heatsink_q(60, 20, x, 0.03, 0.1, 0.002, 10, 200, 0.8),
                              "base_width", 0.1),
    "heatsink_q/fin_height": (lambda x: stillair.heatsink_q(60, 20, 0.1, x, 0.1, 0.002, 10, 200, 0.8),
                              "fin_height", 0.03),
    "heatsink_q/fin_length": (lambda x: stillair.heatsink_q(60, 20, 0.1, 0.03, x, 0.002, 10, 200, 0.8),
                              "fin_length", 0.1),
    "heatsink_q/fin_thickness": (lambda x: stillair.heatsink_q(60, 20, 0.1, 0.03, 0.1, x, 10, 200, 0.8),
                                 "fin_thickness", 0.002),
    "heatsink_tbase/fin_height": (lambda x: stillair.heatsink_tbase(10, 20, 0.1, x, 0.1, 0.002, 10, 200, 0.8),
                                  "fin_height", 0.03),
    "rayleigh": (lambda x: stillair.rayleigh(*T, x), "length", 0.5),
    "grashof": (lambda x: stillair.grashof(*T, x), "length", 0.5),
}
#: Sizes no correlation covers: far too large, far too small (finite all).
ABSURD = (1e300, 1e30, 1e6, 2e3, 1e-9, 1e-7)
#: Dimensionless inputs no still fluid reaches, for the nu_ functions.
NU_CALLS = {
    "nu_vplate/Pr": (lambda x: stillair.nu_vplate(1e6, x), "Pr", (1e300, 1e8)),
    "nu_vplate/Ra": (lambda x: stillair.nu_vplate(x, 0.71), "Ra", (1e300, 1e40)),
    "nu_cavity/aspect": (lambda x: stillair.nu_cavity(1e5, 0.71, x), "aspect", (1e300, 1e12)),
    "nu_vcyl/slenderness": (lambda x: stillair.nu_vcyl(1e8, 0.71, x), "slenderness", (1e300, 1e12)),
    "nu_sphere/Pr": (lambda x: stillair.nu_sphere(1e6, x), "Pr", (1e300,)),
}


def outcome(function, value):
    """("error", message) | ("note", text) | ("silent", value) | ("raw", text) | ("numpy", text)."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            result = function(value)
        except InputError as error:
            return "error", str(error)
        except Exception as error:  # noqa: BLE001 - what the test is looking for
            return "raw", f"{type(error).__name__}: {error}"
    categories = [w.category for w in caught]
    if any(issubclass(c, RuntimeWarning) for c in categories):
        return "numpy", "; ".join(str(w.message) for w in caught)
    notes = [str(w.message) for w in caught if issubclass(w.category, CorrelationRangeWarning)]
    if notes:
        return "note", notes[0]
    return "silent", repr(result)


def _absurd_cases():
    for name, (function, argument, _) in LENGTH_CALLS.items():
        for value in ABSURD:
            yield name, function, argument, value
    for name, (function, argument, values) in NU_CALLS.items():
        for value in values:
            yield name, function, argument, value


ABSURD_CASES = list(_absurd_cases())


def test_absurd_sizes_are_never_silent_and_never_raw():
    counts: dict[str, int] = {}
    bad = []
    for name, function, argument, value in ABSURD_CASES:
        kind, text = outcome(function, value)
        counts[kind] = counts.get(kind, 0) + 1
        if kind in ("silent", "raw", "numpy"):
            bad.append((name, value, kind, text))
        if kind == "error":
            # the message names the argument as typed and the value as typed
            assert f" {argument} must be " in text and text.endswith(format_value(value)), (name, text)
    print(f"absurd sizes: {len(ABSURD_CASES)} cases: {counts}")
    assert not bad, bad
    assert counts.get("silent", 0) == 0 and counts.get("raw", 0) == 0


@pytest.mark.parametrize("name", sorted(LENGTH_CALLS))
def test_a_length_typed_in_mm_gets_a_note_or_an_error(name):
    function, argument, typical = LENGTH_CALLS[name]
    kind, text = outcome(function, typical * 1000.0)
    assert kind in ("error", "note"), (kind, text)
    if kind == "note":
        assert "mm" in text or "valid" in text, text


KELVIN_CALLS = {
    "h_vplate": lambda: stillair.h_vplate(323.15, 293.15, 0.5),
    "h_hplate": lambda: stillair.h_hplate(323.15, 293.15, 0.2, "up"),
    "h_tplate": lambda: stillair.h_tplate(323.15, 293.15, 0.5, 30.0, "up"),
    "h_hcyl": lambda: stillair.h_hcyl(323.15, 293.15, 0.05),
    "h_sphere": lambda: stillair.h_sphere(323.15, 293.15, 0.1),
    "h_vcyl": lambda: stillair.h_vcyl(323.15, 293.15, 0.5, 0.05),
    "h_cavity": lambda: stillair.h_cavity(293.15, 283.15, 0.02, 1.0),
    "h_channel": lambda: stillair.h_channel(323.15, 293.15, 0.01, 0.1),
    "air_density": lambda: stillair.air_density(293.15),
    "gas_conductivity": lambda: stillair.gas_conductivity("argon", 293.15),
    "rayleigh": lambda: stillair.rayleigh(323.15, 293.15, 0.5),
    "heatsink_q": lambda: stillair.heatsink_q(333.15, 298.15, 0.1, 0.03, 0.1, 0.002, 10, 200, 0.8),
}


@pytest.mark.parametrize("name", sorted(KELVIN_CALLS))
def test_kelvin_typed_as_celsius_gets_the_kelvin_note(name):
    with pytest.warns(UnitSlipWarning, match="temperatures are in °C; .* looks like a kelvin value"):
        KELVIN_CALLS[name]()


def test_everyday_celsius_gets_no_kelvin_note():
    with warnings.catch_warnings():
        warnings.simplefilter("error", UnitSlipWarning)
        stillair.h_cavity(20.0, 10.0, 0.02, 1.0)
        stillair.h_vplate(300.0, 20.0, 0.5)       # a hot face in room air: one argument in °C range
        stillair.air_density(20.0)


def test_a_network_boundary_in_kelvin_is_noted():
    result = stillair.solve_network([["film", "plate", "air", "film", 5.0, 1.0]],
                                    [["plate", "T", 298.15], ["air", "T", 293.15]])
    assert result.notes[0].startswith("boundaries: temperatures are in °C;")
    assert "kelvin" in result.notes[0]


# --- in cells: the same, as a sheet shows it -----------------------------------------------------

@pytest.mark.parametrize("formula, expected", [
    (("H_CAVITY", 30, 10, 1e300, 1), "H_CAVITY: gap must be at most 1000 m (is it in mm?), got 1e+300"),
    (("H_CHANNEL", 50, 20, 1e300, 0.1), "H_CHANNEL: spacing must be at most 1000 m (is it in mm?), got 1e+300"),
    (("HEATSINK_Q", 60, 20, 0.1, 30, 0.1, 0.002, 10, 200, 0.8),
     "HEATSINK_Q: fin_height must be at most 1 m (is it in mm?), got 30"),
    (("HEATSINK_TBASE", 10, -300, 0.1, 0.03, 0.1, 0.002, 10, 200, 0.8),
     "HEATSINK_TBASE: t_ambient must be above absolute zero (-273.15 °C), got -300"),
    (("NU_VPLATE", 1e6, 1e300), "NU_VPLATE: Pr must be at most 1e+07 (no still fluid reaches more), got 1e+300"),
])
def test_cells_name_the_argument_and_the_value_typed(formula, expected):
    assert call(*formula) == expected


def test_a_cell_in_kelvin_keeps_its_number_and_records_the_note():
    with NoteRecorder() as recorder:
        value = call("H_CAVITY", 293.15, 283.15, 0.02, 1)
    assert isinstance(value, float)
    assert any("looks like a kelvin value" in note for _, note in recorder.notes)


# --- array arguments: every h_ function broadcasts every numeric argument ------------------------

ARRAY_CALLS = {
    "h_vplate/height": lambda a: stillair.h_vplate(50, 20, a),
    "h_hplate/length": lambda a: stillair.h_hplate(50, 20, a, "up"),
    "h_tplate/tilt": lambda a: stillair.h_tplate(50, 20, 0.5, [10.0, 20.0], "up") if a is None else
    stillair.h_tplate(50, 20, a, 30.0, "up"),
    "h_hcyl/diameter": lambda a: stillair.h_hcyl(50, 20, a),
    "h_sphere/diameter": lambda a: stillair.h_sphere(50, 20, a),
    "h_vcyl/diameter": lambda a: stillair.h_vcyl(50, 20, 0.5, a),
    "h_cavity/height": lambda a: stillair.h_cavity(30, 10, 0.02, [1.0, 2.0]) if a is None else
    stillair.h_cavity(30, 10, a, 1.0),
    "h_channel/height": lambda a: stillair.h_channel(50, 20, 0.01, [0.1, 0.2]) if a is None else
    stillair.h_channel(50, 20, a, 0.1),
}


@pytest.mark.parametrize("name", sorted(ARRAY_CALLS))
def test_every_h_function_broadcasts_an_array_argument(name):
    """Typed ArrayLike: a list in one argument gives one value per element, each equal to the
    scalar call (a tilt or diameter list once failed to broadcast)."""
    sizes = [0.02, 0.05]
    whole = np.asarray(ARRAY_CALLS[name](sizes))
    assert whole.shape == (2,)
    assert [ARRAY_CALLS[name](s) for s in sizes] == pytest.approx(list(whole), rel=1e-12)
    assert np.shape(ARRAY_CALLS[name](None) if name in ("h_tplate/tilt", "h_cavity/height",
                                                         "h_channel/height") else whole) == (2,)


def test_calc_lists_the_kelvin_note_of_a_cell(tmp_path, capsys):
    """`stillair calc` lists the unit-slip note as it lists range notes (the note travels as a
    CorrelationRangeWarning from the cell's one call path)."""
    import json

    import xlsxwriter

    from stillair.addin.cli import main

    path = tmp_path / "kelvin.xlsx"
    book = xlsxwriter.Workbook(str(path))
    sheet = book.add_worksheet("Gap")
    sheet.write_formula("B1", "=H_CAVITY(293.15,283.15,0.02,1)")
    book.close()
    assert main(["calc", str(path), "--json"]) == 0
    notes = json.loads(capsys.readouterr().out)["notes"]
    assert notes and notes[0]["cell"] == "Gap!B1"
    assert "293.15 looks like a kelvin value" in notes[0]["message"]


@pytest.mark.parametrize("geometry", sorted(g for g in GEOMETRIES if "ra" in GEOMETRIES[g].inputs))
def test_no_numpy_warning_at_ra_zero_in_an_array(geometry):
    """Ra = 0 beside an ordinary Ra in one array: auto's weights meet inf - inf (every step
    infinitely far below its bound), which must stay a tie and never reach stderr as a numpy
    RuntimeWarning (issue 19: no numpy warning leaves a public function).  Found by the
    network property sweep."""
    geo = GEOMETRIES[geometry]
    extra = {"aspect": 20.0, "tilt": 90.0, "slenderness": 20.0}
    inputs = {name: extra[name] for name in geo.inputs if name in extra}
    for case in (geo.cases or (None,)):
        with warnings.catch_warnings():
            warnings.simplefilter("error", RuntimeWarning)
            warnings.simplefilter("ignore", stillair.CorrelationRangeWarning)
            result = stillair.nusselt(geometry, "auto", ra=np.array([0.0, 1e5]), pr=0.71, case=case,
                                      **inputs)
        assert np.all(np.isfinite(result.nu))
