"""Every cell function called the way Excel (xlwings) and `formulas` call it.

The cell layer is a skin over the engine: good inputs must give exactly the engine's value as
an Excel-shaped result (float, str, 2-D list); bad inputs must give the exact message, never a
number.  Physical values are checked against outside sources where the cell layer does more
than pass values through (the network tables, radiation).
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
import schedula as sh
from scipy.constants import sigma as STEFAN_BOLTZMANN  # CODATA value via scipy

import stillair
from stillair.addin.cells.callpath import NoteRecorder, call, engine_callable
from stillair.addin.cells.registry import BY_NAME, REGISTRY

PROPERTY_NAMES = [e.name for e in REGISTRY if e.name.startswith(("AIR_", "GAS_"))]

# Excel-style arguments for one good call of every numeric/text function.
SAMPLES: dict[str, tuple] = {}
for _name in PROPERTY_NAMES:
    SAMPLES[_name] = ("argon", 10.0, None) if _name.startswith("GAS_") else (20.0, 95000.0)
SAMPLES.update({
    "ALTITUDE_PRESSURE": (1000.0,),
    "RAYLEIGH": (15.0, 5.0, 0.016),
    "GRASHOF": (15.0, 5.0, 0.016, "argon", None),
    "NU_VPLATE": (1e8, 0.71),
    "NU_HPLATE": (1e6, 0.71, "hot-up"),
    "NU_TPLATE": (1e8, 0.71, 30.0, "hot-up"),
    "NU_HCYL": (1e6, 0.71, None),
    "NU_SPHERE": (1e6, 0.71),
    "NU_VCYL": (1e8, 0.71, 2.0),
    "NU_CAVITY": (1e4, 0.71, 40.0),
    "CAVITY_METHOD": (1e4, 0.71, 40.0, 90.0),
    "H_VPLATE": (60.0, 20.0, 0.5),
    "H_HPLATE": (60.0, 20.0, 0.25, "up"),
    "H_TPLATE": (60.0, 20.0, 0.5, 30.0, "up"),
    "H_HCYL": (60.0, 20.0, 0.05),
    "H_SPHERE": (60.0, 20.0, 0.1, "air", 101325.0),
    "H_VCYL": (60.0, 20.0, 0.5, 0.1),
    "H_CAVITY": (15.0, 5.0, 0.016, 1.2),
    "H_RAD": (15.0, 5.0, 0.84, 0.04),
    "NU_CHANNEL": (5e3, 0.71, 20.0, "flux"),
    "H_CHANNEL": (60.0, 20.0, 0.008, 0.15),
    "CHANNEL_SPACING": (60.0, 20.0, 0.15, "isothermal-adiabatic", "plate"),
    "HEATSINK_Q": (60.0, 25.0, 0.1, 0.03, 0.1, 0.0015, 10.0, 200.0, 0.85),
    "HEATSINK_TBASE": (20.0, 25.0, 0.1, 0.03, 0.1, 0.0015, 10.0, 200.0, 0.85, "air", 95000.0),
    "STACK_FLOW": (40.0, 25.0, 0.01, 0.012, 1.2, None, 3.8),
    "AIRFLOW_FOR": (300.0, 15.0, 30.0, 95000.0),
    "SAT_PRESSURE": (-5.0, "ice"),
    "VAPOUR_PRESSURE": (20.0, 0.5, 95000.0),
    "HUMIDITY_RATIO": (20.0, 0.5),
    "DEW_POINT": (20.0, 0.5, None),
    "SURFACE_RH": (20.0, 0.5, 12.0),
    "TEMP_FACTOR": (15.0, 20.0, 0.0),
    "INSULATION_THICKNESS": (6.0, 25.0, 20.0, 0.035, 0.9, "hcyl", 0.06),
})
DIRECT = [n for n in SAMPLES]  # functions whose cell value is the engine callable's value


def needs_engine(name: str):
    """Skip while the engine callable is missing (the engine is written in parallel)."""
    entry = BY_NAME[name]
    if engine_callable(entry) is None:
        pytest.skip(f"engine.{entry.engine} is not provided yet")
    return entry


def engine_kwargs(entry, raw: tuple) -> dict:
    """The keyword arguments the engine receives for an Excel-style call (blanks -> defaults)."""
    raw = tuple(raw) + (None,) * (len(entry.args) - len(raw))
    return {a.keyword: (a.default if v is None else v) for a, v in zip(entry.args, raw)}


def direct(name: str, raw: tuple):
    entry = BY_NAME[name]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", stillair.CorrelationRangeWarning)
        value = engine_callable(entry)(**engine_kwargs(entry, raw))
    return value if isinstance(value, str) else float(value)


@pytest.mark.parametrize("name", DIRECT)
def test_good_call_returns_the_engine_value_as_a_cell_value(name):
    needs_engine(name)
    raw = SAMPLES[name]
    value = call(name, *raw)
    expected = direct(name, raw)
    assert type(value) is type(expected)
    assert value == expected


@pytest.mark.parametrize("name", DIRECT)
def test_formulas_style_arguments_give_the_same_value(name):
    """`formulas` passes 1x1 object arrays for cell references and schedula.EMPTY for blanks."""
    needs_engine(name)
    raw = SAMPLES[name]
    wrapped = tuple(sh.EMPTY if v is None else np.asarray([[v]], dtype=object) for v in raw)
    assert call(name, *wrapped) == call(name, *raw)


def _first(entry, kind):
    return next((i, a) for i, a in enumerate(entry.args) if a.kind == kind and not a.optional)


@pytest.mark.parametrize("name", [n for n in DIRECT if BY_NAME[n].args])
@pytest.mark.parametrize("bad, got, allowed", [
    ("abc", "'abc'", "a number, not text"),
    ("#DIV/0!", "'#DIV/0!'", "a number, not text"),   # an Excel error value (err_to_str)
    (True, "True", "a number, not a logical value"),
    (None, "an empty cell", "a number"),
])
def test_bad_number_gives_the_exact_message(name, bad, got, allowed):
    entry = BY_NAME[name]
    index, arg = _first(entry, "number")
    raw = list(SAMPLES[name]) + [None] * (len(entry.args) - len(SAMPLES[name]))
    raw[index] = bad
    assert call(name, *raw) == f"{name}: {arg.name} must be {allowed}, got {got}"


@pytest.mark.parametrize("name", [n for n in DIRECT if any(a.kind == "text" and not a.optional
                                                           for a in BY_NAME[n].args)])
def test_missing_text_gives_the_exact_message(name):
    entry = BY_NAME[name]
    index, arg = _first(entry, "text")
    raw = list(SAMPLES[name])
    raw[index] = None
    assert call(name, *raw) == f"{name}: {arg.name} must be text, got an empty cell"


def test_a_range_is_refused_where_the_function_does_not_broadcast():
    assert call("NET_TEMP", BRANCHES, BOUNDARIES, "in", "air", [[1e5], [9e4]]) == (
        "NET_TEMP: pressure must be a single cell, got a range of 2 cells")


def test_nu_note_of_a_range_notes_each_element():
    assert call("NU_NOTE", "vplate", [[1e8], [1e14]], 0.71) == [
        [call("NU_NOTE", "vplate", 1e8, 0.71)], [call("NU_NOTE", "vplate", 1e14, 0.71)]]


# ---------------------------------------------------------------------------------------------
# Ranges for numeric arguments: an array of the broadcast shape, each element what the same
# call on that element's single values gives (Excel's own functions behave so).

ARRAY_FUNCTIONS = [n for n in DIRECT if BY_NAME[n].takes_arrays]


def _same(got, expected):
    if isinstance(expected, float):
        return isinstance(got, float) and got == pytest.approx(expected, rel=1e-12)
    return got == expected


def _padded(name):
    entry = BY_NAME[name]
    return list(SAMPLES[name]) + [None] * (len(entry.args) - len(SAMPLES[name]))


def test_every_numeric_function_takes_arrays():
    broadcasting = {"air_", "gas_", "nu_", "h_", "rayleigh", "grashof", "altitude_pressure",
                    "cavity_method"}
    for entry in REGISTRY:
        if entry.engine.startswith(tuple(broadcasting)) or entry.name == "NU_NOTE":
            assert entry.takes_arrays, entry.name


@pytest.mark.parametrize("name", ARRAY_FUNCTIONS)
def test_a_column_range_gives_a_column_of_cell_values(name):
    needs_engine(name)
    index, _ = _first(BY_NAME[name], "number")
    raw = _padded(name)
    column = [[raw[index]], [raw[index] * 1.1], [raw[index] * 1.2]]
    expected = [[call(name, *(raw[:index] + [v] + raw[index + 1:]))] for (v,) in column]
    for given in (column, np.asarray(column, dtype=object)):   # xlwings (ndim=2), formulas
        got = call(name, *(raw[:index] + [given] + raw[index + 1:]))
        assert len(got) == 3 and all(len(row) == 1 for row in got)
        assert all(_same(g[0], e[0]) for g, e in zip(got, expected)), (got, expected)


def test_a_column_and_a_row_broadcast_to_a_table():
    """=H_CAVITY(B2:B4, 5, C1:D1, 1.2): temperatures down, gaps across."""
    needs_engine("H_CAVITY")
    t1, gaps = [[10.0], [15.0], [20.0]], [[0.012, 0.016]]
    got = call("H_CAVITY", t1, 5.0, gaps, 1.2)
    for r, (t,) in enumerate(t1):
        for c, gap in enumerate(gaps[0]):
            assert _same(got[r][c], call("H_CAVITY", t, 5.0, gap, 1.2))
    flat = call("AIR_CONDUCTIVITY", [10.0, 20.0])  # xlwings' one-row range without ndim: a row
    assert flat == [[call("AIR_CONDUCTIVITY", 10.0), call("AIR_CONDUCTIVITY", 20.0)]]


def test_a_bad_element_shows_its_message_only_in_its_place():
    needs_engine("H_CAVITY")
    got = call("H_CAVITY", [[15.0], ["abc"], [None]], 5.0, [[0.016], [0.016], [-0.01]], 1.2)
    assert _same(got[0][0], call("H_CAVITY", 15.0, 5.0, 0.016, 1.2))
    assert got[1][0] == "H_CAVITY: t1 must be a number, not text, got 'abc'"
    assert got[2][0] == "H_CAVITY: t1 must be a number, got an empty cell"
    assert call("H_CAVITY", [[15.0], [16.0]], 5.0, [[0.01], [0.02], [0.03]], 1.2) == (
        "H_CAVITY: ranges of 2x1 and 3x1 cells do not combine; give ranges of the same shape, "
        "or one column and one row")


def test_notes_of_an_array_call_are_recorded():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with NoteRecorder() as recorder:
            values = call("NU_VPLATE", [[1e8], [1e14]], 0.71)
    assert _same(values[1][0], call("NU_VPLATE", 1e14, 0.71))
    assert len(recorder.notes) == 1 and "1e+14 above 1e+12" in recorder.notes[0][1]


# ---------------------------------------------------------------------------------------------
# The vertical cylinder


def test_thick_vertical_cylinder_is_the_vertical_plate():
    """A cylinder whose boundary layer is thin against its diameter, (D/L) Gr^(1/4) >= 35,
    transfers heat as a vertical plate (Incropera et al., 6th ed., sec. 9.6.1); auto hands over
    to Popiel across 35..70, so slenderness 1 (criterion 109) is the plate alone."""
    needs_engine("NU_VCYL")
    assert call("NU_VCYL", 1e8, 0.71, 1.0) == call("NU_VPLATE", 1e8, 0.71)
    assert call("NU_NOTE", "vcyl", 1e8, 0.71, None, None, 1.0) == "in range (churchill-chu)"
    # A slender one (criterion not met) transfers more than the plate: curvature.
    assert call("NU_VCYL", 1e6, 0.71, 40.0) > call("NU_VPLATE", 1e6, 0.71)
    assert call("NU_NOTE", "vcyl", 1e6, 0.71, None, None, 40.0) == "in range (popiel)"


def test_h_vcyl_is_nu_k_over_height():
    needs_engine("H_VCYL")
    ts, tf, height, diameter = 60.0, 20.0, 0.5, 0.1
    film = (ts + tf) / 2
    ra = stillair.rayleigh(ts, tf, height)
    nu = stillair.nu_vcyl(ra, stillair.air_prandtl(film), height / diameter)
    assert call("H_VCYL", ts, tf, height, diameter) == pytest.approx(
        nu * stillair.air_conductivity(film) / height, rel=1e-9)


def test_nu_note_geometry_names_ignore_case():
    assert call("NU_NOTE", "VPLATE", 1e8, 0.71) == call("NU_NOTE", "vplate", 1e8, 0.71)
    assert call("NU_NOTE", " Cavity ", 1e4, 0.71, None, None, 40.0) == \
        call("NU_NOTE", "cavity", 1e4, 0.71, None, None, 40.0)
    assert call("NU_NOTE", "vcyl", 1e8, 0.71) == (
        'NU_NOTE: aspect must be a number for geometry "vcyl", got an empty cell')
    assert call("NU_NOTE", "cone", 1e4, 0.71) == (
        'NU_NOTE: geometry must be one of "vplate", "hplate", "tplate", "hcyl", "sphere", "vcyl", '
        "\"cavity\", \"channel\", got 'cone'")


def test_tilted_functions_state_their_tilt_convention():
    for entry in REGISTRY:
        if any(a.name == "tilt" for a in entry.args):
            text = entry.description
            assert ("from the vertical" in text) or ("from the horizontal" in text), entry.name


def test_too_many_arguments():
    assert call("NU_VPLATE", 1e8, 0.71, "auto", 5.0) == "NU_VPLATE: takes at most 3 arguments, got 4"


def test_engine_range_errors_are_reworded_with_the_cell_name():
    assert call("NU_VPLATE", -1.0, 0.71) == "NU_VPLATE: Ra must be >= 0, got -1"
    assert call("NU_VPLATE", 1e8, 0.0) == "NU_VPLATE: Pr must be > 0, got 0"
    message = call("NU_VPLATE", 1e8, 0.71, "foo")
    assert message.startswith('NU_VPLATE: method must be one of "auto", "churchill-chu"')
    assert message.endswith("got 'foo'")


def test_vba_safe_argument_name_is_used_in_messages():
    """The engine says "case"; the cell argument is plate_case (Case is a VBA keyword)."""
    needs_engine("NU_HPLATE")
    assert call("NU_HPLATE", 1e6, 0.71, "sideways") == (
        'NU_HPLATE: plate_case must be one of "hot-up", "hot-down", "cold-up", "cold-down", '
        "got 'sideways'")


def test_design_example_message():
    needs_engine("H_CAVITY")
    assert call("H_CAVITY", 15.0, 5.0, -0.01, 1.2) == "H_CAVITY: gap must be > 0 m, got -0.01"


def test_out_of_range_returns_the_number_and_records_the_note():
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # nothing may escape the cell layer
        with NoteRecorder() as recorder:
            value = call("NU_VPLATE", 1e14, 0.71)
    full = stillair.nusselt("vplate", "auto", None, ra=1e14, pr=0.71).scalar()
    assert value == full.nu and not full.in_range
    assert recorder.notes == [(None, f"NU_VPLATE: outside validity range: {full.note}")]


def test_nu_note_in_and_out_of_range():
    inside = stillair.nusselt("vplate", "auto", None, ra=1e8, pr=0.71).scalar()
    assert call("NU_NOTE", "vplate", 1e8, 0.71) == f"in range ({inside.method})"
    outside = stillair.nusselt("vplate", "auto", None, ra=1e14, pr=0.71).scalar()
    assert call("NU_NOTE", "vplate", 1e14, 0.71) == outside.note
    assert call("NU_NOTE", "cavity", 1e4, 0.71, None, None, None) == (
        'NU_NOTE: aspect must be a number for geometry "cavity", got an empty cell')
    assert call("NU_NOTE", "cone", 1e4, 0.71).startswith("NU_NOTE: ")


def test_nu_note_cavity_defaults_to_vertical():
    needs_engine("NU_CAVITY")
    full = stillair.nusselt("cavity", "auto", None, ra=1e4, pr=0.71, aspect=40.0, tilt=90.0).scalar()
    assert call("NU_NOTE", "cavity", 1e4, 0.71, None, None, 40.0).endswith(str(full.method) + ")") \
        or call("NU_NOTE", "cavity", 1e4, 0.71, None, None, 40.0) == full.note


def test_cavity_nusselt_has_the_conduction_limit():
    # Physical limit: across a very weakly driven layer heat crosses by conduction, Nu -> 1.
    needs_engine("NU_CAVITY")
    assert call("NU_CAVITY", 1.0, 0.71, 40.0) == pytest.approx(1.0, rel=1e-6)


def test_radiation_coefficient_follows_stefan_boltzmann():
    # Linearised exchange between parallel grey planes:
    # h = sigma (T1² + T2²)(T1 + T2) / (1/e1 + 1/e2 - 1)  (Incropera 6th ed., eq. 13.19 and 1.9).
    needs_engine("H_RAD")
    t1, t2 = 15.0 + 273.15, 5.0 + 273.15
    expected = STEFAN_BOLTZMANN * (t1**2 + t2**2) * (t1 + t2) / (1 / 0.84 + 1 / 0.04 - 1)
    assert call("H_RAD", 15.0, 5.0, 0.84, 0.04) == pytest.approx(expected, rel=1e-9)
    # Blank eps2: a small surface in large surroundings, h = eps sigma (T1²+T2²)(T1+T2).
    surroundings = 0.9 * STEFAN_BOLTZMANN * (313.15**2 + 293.15**2) * (313.15 + 293.15)
    assert call("H_RAD", 40.0, 20.0, 0.9, None) == pytest.approx(surroundings, rel=1e-9)


def test_air_density_against_coolprop():
    needs_engine("AIR_DENSITY")
    from CoolProp.CoolProp import PropsSI
    expected = PropsSI("D", "T", 293.15, "P", 101325.0, "Air")  # CoolProp pseudo-pure dry air
    assert call("AIR_DENSITY", 20.0) == pytest.approx(expected, rel=5e-3)


def test_version_is_text():
    assert call("STILLAIR_VERSION") == stillair.__version__
    assert call("STILLAIR_VERSION", 1.0) == "STILLAIR_VERSION: takes at most 0 arguments, got 1"


# ---------------------------------------------------------------------------------------------
# Network: an all-conduction series wall has an exact answer (Fourier's law, resistances in
# series): q = (T_in - T_out) / (L1/(k1 A) + R2); the node between them is T_in - q L1/(k1 A).

BRANCHES = [
    ["wall", "in", 1, "conduction", 0.1, 0.5, 2.0, None, None, None],    # node typed as a number
    ["skin", 1.0, "out", "resistance", 0.05, None, None, None, None, None],
    [None] * 10,                                                          # trailing blank rows
    ["", "", "", "", "", "", "", "", "", ""],
]
BOUNDARIES = [["in", "T", 20.0], ["out", "T", 0.0], [None, None, None]]
R_WALL = 0.1 / (0.5 * 2.0)
Q_EXACT = 20.0 / (R_WALL + 0.05)


def test_network_cells_solve_the_series_wall_exactly():
    needs_engine("NET_SOLVE")
    assert call("NET_HEAT", BRANCHES, BOUNDARIES, "wall") == pytest.approx(Q_EXACT, rel=1e-9)
    assert call("NET_HEAT", BRANCHES, BOUNDARIES, "skin") == pytest.approx(Q_EXACT, rel=1e-9)
    assert call("NET_TEMP", BRANCHES, BOUNDARIES, 1.0) == pytest.approx(20.0 - Q_EXACT * R_WALL, rel=1e-9)
    assert call("NET_TEMP", BRANCHES, BOUNDARIES, "1") == call("NET_TEMP", BRANCHES, BOUNDARIES, 1.0)
    assert call("NET_CHECK", BRANCHES, BOUNDARIES).startswith("OK: ")


def test_net_heat_for_turns_the_series_wall_round():
    """The heat input at the middle node that puts it at 15 °C: what leaves through the skin
    (15 K / 0.05 K/W) minus what arrives through the wall (5 K / R_WALL), Fourier's law."""
    bounds = [["in", "T", 20.0], ["out", "T", 0.0], [1, "Q", 7.0]]
    expected = 15.0 / 0.05 - 5.0 / R_WALL
    assert call("NET_HEAT_FOR", BRANCHES, bounds, 1, 15.0) == pytest.approx(expected, rel=1e-9)
    assert call("NET_HEAT_FOR", BRANCHES, BOUNDARIES, "1", 15.0, None, None, "1") == pytest.approx(expected, rel=1e-9)
    assert call("NET_HEAT_FOR", BRANCHES, BOUNDARIES, "in", 15.0) == (
        "NET_HEAT_FOR: node must be a node whose temperature is solved (boundary row 1 fixes it at 20 °C), "
        "got 'in'")
    assert call("NET_HEAT_FOR", BRANCHES, BOUNDARIES, "1", "warm") == (
        "NET_HEAT_FOR: temperature must be a number, not text, got 'warm'")


def test_humid_air_cells_refuse_a_percentage_with_what_was_meant():
    assert call("DEW_POINT", 20.0, 50) == (
        "DEW_POINT: rh must be a fraction from 0 to 1 (50 reads as 5,000 %; for 50 % enter 0.5), got 50")
    assert call("DEW_POINT", [[20.0], [25.0]], [0.5, 0.6]) == [
        [stillair.dew_point(20.0, 0.5), stillair.dew_point(20.0, 0.6)],
        [stillair.dew_point(25.0, 0.5), stillair.dew_point(25.0, 0.6)]]


def test_net_solve_returns_a_padded_table():
    needs_engine("NET_SOLVE")
    from stillair.addin.cells.network import RESULT_HEADER
    table = call("NET_SOLVE", BRANCHES, BOUNDARIES)
    result = stillair.solve_network([r for r in BRANCHES[:2]], BOUNDARIES[:2])
    assert table[0] == RESULT_HEADER
    assert all(len(row) == len(RESULT_HEADER) for row in table)
    assert len(table) == 1 + len(result.temperatures) + len(result.heat)
    for row in table:
        for cell in row:
            assert type(cell) in (float, str)
    rows = {row[0]: row for row in table[1:]}
    assert rows["1"][2] == pytest.approx(20.0 - Q_EXACT * R_WALL, rel=1e-9)
    assert rows["wall"][1:4] == ["conduction", pytest.approx(Q_EXACT, rel=1e-9), "W"]
    assert rows["skin"][4] == ""  # h of a bare resistance is not a number: blank, not nan


def test_net_airflow_reads_the_vent_branch_of_the_solved_network():
    needs_engine("NET_SOLVE")
    branches = [["vent", "air", "outside", "vent", 0.01, 0.01, 0.8, None, None, None],
                ["walls", "air", "outside", "film", 4.0, 2.0, None, None, None, None]]
    boundaries = [["air", "Q", 150.0], ["outside", "T", 25.0]]
    record = stillair.solve_network(branches, boundaries).branches["vent"]
    assert call("NET_AIRFLOW", branches, boundaries, "vent") == pytest.approx(record.volume_flow, rel=1e-12)
    assert call("NET_AIRFLOW", branches, boundaries, "walls") == (
        "NET_AIRFLOW: branch must be a vent or airflow branch: 'vent', got 'walls'")
    assert call("NET_AIRFLOW", BRANCHES, BOUNDARIES, "wall") == (
        "NET_AIRFLOW: branch must be a vent or airflow branch: the network has none, got 'wall'")


def test_network_input_errors_name_the_cell_function():
    needs_engine("NET_SOLVE")
    message = call("NET_TEMP", BRANCHES, BOUNDARIES, "nowhere")
    assert message.startswith("NET_TEMP: node must be one of ") and message.endswith("got 'nowhere'")
    assert "'1'" in message and "'in'" in message and "'out'" in message
    bad = [["wall", "in", "out", "conduction", -0.1, 0.5, 2.0]]
    message = call("NET_SOLVE", bad, BOUNDARIES)
    assert message.startswith("NET_SOLVE: ") and "-0.1" in message
    assert call("NET_SOLVE", None, BOUNDARIES) == (
        "NET_SOLVE: branches must be a range with at least one row, got an empty cell")
    assert call("NET_CHECK", [[None, None]], BOUNDARIES) == (
        "NET_CHECK: branches must be a range with at least one row, got a range of 2 cells")


def test_nu_note_names_both_correlations_inside_an_auto_blend():
    # Ra 1e7 at aspect 7 lies in the band where auto hands ElSherbiny over to Catton's tall form
    # (the band inside ElSherbiny's Ra <= 2e7 bound, both in range; at aspect 9 Catton is itself
    # in the band of its own H/L <= 10 bound and the hand-over comes later, issue 19's rule);
    # the note names both, as the engine's blend does.
    blend = stillair.nusselt("cavity", "auto", ra=1e7, pr=0.71, aspect=7.0, tilt=90.0).scalar().blend
    assert blend == "auto blend of elsherbiny and catton"
    assert call("NU_NOTE", "cavity", 1e7, 0.71, None, 90.0, 7.0) == f"in range ({blend})"


# ---------------------------------------------------------------------------------------------
# The call path's fast path for plain values (callpath._plain_kwargs) and the range notes the
# engine hands over as data (validity.collect_range_notes)


@pytest.mark.parametrize("name", [n for n in DIRECT if BY_NAME[n].plain is not None])
def test_plain_values_take_the_fast_path_with_the_general_coercions_arguments(name):
    from stillair.addin.cells.callpath import _coerce, _plain_kwargs

    entry = BY_NAME[name]
    raw = SAMPLES[name]
    fast = _plain_kwargs(entry.plain, raw)
    assert fast is not None
    padded = tuple(raw) + (None,) * (len(entry.args) - len(raw))
    general = _coerce(entry, padded)
    assert fast == general and {k: type(v) for k, v in fast.items()} == {k: type(v) for k, v in general.items()}
    # what only the general coercion may handle goes there
    wrapped = tuple(np.asarray([[v]], dtype=object) if v is not None else v for v in raw)
    assert _plain_kwargs(entry.plain, wrapped) is None


@pytest.mark.parametrize("raw", [(True,), (np.float64(20.0),), ("  ",), ("20",), (20.0, 1e5, 3.0)])
def test_values_the_fast_path_leaves_to_the_general_coercion(raw):
    from stillair.addin.cells.callpath import _plain_kwargs

    assert _plain_kwargs(BY_NAME["AIR_DENSITY"].plain, raw) is None


def test_an_int_is_passed_as_the_float_the_general_coercion_gives():
    from stillair.addin.cells.callpath import _plain_kwargs

    assert _plain_kwargs(BY_NAME["AIR_DENSITY"].plain, (20,)) == {"t": 20.0, "pressure": 101325.0}
    assert call("AIR_DENSITY", 20) == call("AIR_DENSITY", 20.0)


@pytest.mark.parametrize("name, raw", [
    ("NU_VPLATE", (1e14, 0.71)),
    ("H_CAVITY", (15.0, 5.0, 0.016, 1.2, 90.0, "air", None, "catton")),  # aspect 75 > 10
    ("NU_CAVITY", (1e3, 0.71, 1.2, None, " elsherbiny")),                  # aspect 1.2 < 5
])
def test_out_of_range_notes_are_the_same_on_both_paths(name, raw):
    """A plain call (fast path) and the same call through formulas-style 1x1 arrays (general
    coercion) record the same note, and nothing escapes as a warning."""
    from stillair.addin.cells.callpath import _plain_kwargs

    wrapped = tuple(np.asarray([[v]], dtype=object) for v in raw)
    assert _plain_kwargs(BY_NAME[name].plain, raw) is not None
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with NoteRecorder() as fast:
            value = call(name, *raw)
        with NoteRecorder() as general:
            again = call(name, *wrapped)
    assert value == again and isinstance(value, float)
    assert fast.notes == general.notes and len(fast.notes) == 1
    assert fast.notes[0][1].startswith(f"{name}: outside validity range: ")


def test_the_engine_hands_range_notes_to_a_collector_and_warns_again_after():
    from stillair.validity import _NOTE_SINK, collect_range_notes

    notes: list[str] = []
    token = collect_range_notes(notes)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            stillair.nu_vplate(1e14, 0.71)
    finally:
        _NOTE_SINK.reset(token)
    assert len(notes) == 1 and notes[0].startswith("nu_vplate: outside validity range: ")
    with pytest.warns(stillair.CorrelationRangeWarning, match="outside validity range"):
        stillair.nu_vplate(1e14, 0.71)


def test_no_note_is_recorded_for_a_call_that_fails():
    with NoteRecorder() as recorder:
        message = call("H_CAVITY", 15.0, 5.0, 0.001, -1.2)
    assert recorder.notes == [(None, message)] and "height" in message
