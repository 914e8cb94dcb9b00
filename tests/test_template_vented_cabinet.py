"""vented-cabinet template: equals a direct engine calculation (the sealed cabinet's network with
a vent branch), re-computes the stack flow the network solved, closes its energy balance, tends
to the sealed cabinet as the openings close, prints the loss coefficients of the `fluids` library
(Blevins, Applied Fluid Dynamics Handbook, 1984), and every input moves the results the expected
way."""

from __future__ import annotations

import re

import openpyxl
import pytest
from fluids.filters import square_edge_grill, square_edge_screen

import stillair
from stillair.addin.templates import vented_cabinet as vented
from template_support import assert_direction, evaluate_template, input_names, named
from test_template_sealed_cabinet import DAY_DIRECTIONS as SEALED_DIRECTIONS, engine_tables

NAME = "vented-cabinet"
INPUTS = ("cab_height", "cab_width", "cab_depth", "wall_thickness", "wall_k", "emissivity", "dissipation",
          "absorptance", "sun_top", "sun_sides", "ambient_t", "sky_t", "altitude", "vplate_method",
          "inlet_area", "outlet_area", "vent_height", "discharge", "filter_loss")


def _engine_case(v, vent=True, **options):
    """The same cabinet built directly from the engine's Python API: the sealed cabinet's rows
    (tests/test_template_sealed_cabinet.py) with the vent branch."""
    branches, bounds, pressure = engine_tables(v)
    if vent:
        branches.append(vented.vent_row(inlet_area=v["inlet_area"], outlet_area=v["outlet_area"],
                                        height=v["vent_height"], discharge=v["discharge"],
                                        extra_loss=v["filter_loss"]))
    return stillair.solve_network(branches, bounds, "air", pressure=pressure, **options)


def _inputs(evaluation):
    return {n: named(evaluation, n) for n in INPUTS}


@pytest.mark.parametrize("sets", [{}, {"vplate_method": "mcadams", "altitude": 1500, "dissipation": 700,
                                       "filter_loss": 0, "outlet_area": 0.005}],
                         ids=["default", "mcadams-altitude-no-screen"])
def test_results_equal_a_direct_engine_network(sets):
    evaluation = evaluate_template(NAME, **sets)
    values = _inputs(evaluation)
    result = _engine_case(values)
    vent = result.branches["vent"]
    pairs = {"t_air": result.temperatures["air_in"], "t_side_out": result.temperatures["side_out"],
             "t_top_out": result.temperatures["top_out"], "q_air": result.heat["vent"],
             "q_conv_sides": result.heat["conv_side_out"], "q_rad_top": result.heat["rad_top"],
             "mass_flow": vent.mass_flow, "volume_flow_check": vent.volume_flow, "airflow": vent.volume_flow,
             "res_mass_flow": vent.mass_flow,
             "t_air_sealed": _engine_case(values, vent=False).temperatures["air_in"]}
    for name, expected in pairs.items():
        assert named(evaluation, name) == pytest.approx(expected, rel=1e-9), name
    # the sheet's own stack balance carries what the network's vent branch carries
    assert named(evaluation, "q_air_check") == pytest.approx(result.heat["vent"], rel=1e-9)
    assert named(evaluation, "res_volume_flow") == pytest.approx(3600 * vent.volume_flow, rel=1e-9)


def test_default_case_reads_well_and_is_in_range():
    evaluation = evaluate_template(NAME)
    t_air, limit = named(evaluation, "res_t_air"), named(evaluation, "max_internal_t")
    assert named(evaluation, "ambient_t") < t_air < named(evaluation, "res_t_sealed")
    assert named(evaluation, "res_t_outlet") == t_air   # well mixed: the air leaves at its temperature
    assert named(evaluation, "res_check") == ("OK" if t_air <= limit else "EXCEEDS LIMIT")
    assert named(evaluation, "res_direction").startswith("upward")
    assert named(evaluation, "res_net_check").startswith("OK")
    assert 0 < named(evaluation, "res_air_share") < 100
    assert not evaluation.notes


@pytest.mark.parametrize("sets", [{}, {"dissipation": 900, "sun_top": 0, "sun_sides": 0},
                                  {"filter_loss": 50, "sky_t": -10}], ids=["default", "no-sun", "filter-clear-sky"])
def test_energy_balance_dissipation_plus_sun_equals_walls_plus_air(sets):
    evaluation = evaluate_template(NAME, **sets)
    heat_in = named(evaluation, "dissipation") + named(evaluation, "res_sun")
    heat_out = named(evaluation, "res_q_walls") + named(evaluation, "res_q_air")
    assert heat_out == pytest.approx(heat_in, rel=1e-9)
    assert abs(named(evaluation, "res_balance")) < 1e-9 * heat_in


def test_the_cabinet_tends_to_the_sealed_one_as_the_openings_close():
    tiny = evaluate_template(NAME, inlet_area=1e-8, outlet_area=1e-8)
    assert named(tiny, "res_t_air") == pytest.approx(named(tiny, "res_t_sealed"), abs=1e-3)
    inside = [named(evaluate_template(NAME, inlet_area=a, outlet_area=a), "res_t_air")
              for a in (1e-4, 0.005, 0.02, 0.08)]
    assert all(later < earlier for earlier, later in zip(inside, inside[1:]))


def test_the_fan_airflow_is_the_engine_s_and_holds_the_limit_alone():
    evaluation = evaluate_template(NAME)
    heat_in, ambient = named(evaluation, "heat_in"), named(evaluation, "ambient_t")
    rise = named(evaluation, "max_internal_t") - ambient
    volume = stillair.airflow_for(heat_in, rise, ambient, stillair.altitude_pressure(named(evaluation, "altitude")))
    assert named(evaluation, "res_fan_flow") == pytest.approx(3600 * volume, rel=1e-9)
    # that flow as an airflow branch carrying all the heat holds the air at the limit
    result = stillair.solve_network([["fan", "air", "ambient", "airflow", volume]],
                                    [["air", "Q", heat_in], ["ambient", "T", ambient]],
                                    pressure=stillair.altitude_pressure(named(evaluation, "altitude")))
    assert result.temperatures["air"] == pytest.approx(named(evaluation, "max_internal_t"), rel=1e-9)


def test_no_fan_can_hold_a_limit_at_or_below_the_ambient():
    evaluation = evaluate_template(NAME, max_internal_t=30)
    assert named(evaluation, "res_fan_flow") == vented.NO_FAN
    assert named(evaluation, "res_check") == "EXCEEDS LIMIT"


def test_notes_print_the_loss_coefficients_of_the_fluids_library():
    notes = "\n".join(str(c.value) for row in openpyxl.load_workbook(vented.TEMPLATE.path)["Notes"].iter_rows()
                      for c in row if c.value)
    for kind in (square_edge_screen, square_edge_grill):
        for fraction in (0.3, 0.5, 0.7):
            assert re.search(rf"\b{kind(fraction):.3g} at {fraction:.0%} open", notes), (kind.__name__, fraction)
    assert "Blevins" in notes and "BS 5925" in notes
    # the default extra loss is the 50 %-open square-edged screen's
    assert named(evaluate_template(NAME), "filter_loss") == pytest.approx(square_edge_screen(0.5))


# input -> (new value, result, direction, why): the sealed cabinet's, for the inputs the two share
DIRECTIONS = {
    **SEALED_DIRECTIONS,
    "dissipation": (600.0, "res_t_air", +1, "more heat in"),
    "altitude": (2500.0, "res_t_air", +1, "thinner air convects less and carries less heat per volume"),
    "max_internal_t": (60.0, "res_fan_flow", -1, "a higher limit lets a smaller airflow warm more"),
    "inlet_area": (0.04, "res_t_air", -1, "a larger low opening passes more air"),
    "outlet_area": (0.04, "res_t_air", -1, "a larger high opening passes more air"),
    "vent_height": (1.5, "res_t_air", -1, "a taller stack drives more air"),
    "discharge": (0.8, "res_t_air", -1, "rounder openings pass more air"),
    "filter_loss": (20.0, "res_t_air", +1, "a denser screen or a filter passes less air"),
}


def test_every_input_has_a_direction_test():
    assert input_names(vented.TEMPLATE) == set(DIRECTIONS) | {"vplate_method"}


@pytest.mark.parametrize("input_name", sorted(DIRECTIONS))
def test_set_moves_the_result_the_expected_way(input_name):
    value, result, direction, _why = DIRECTIONS[input_name]
    assert_direction(NAME, input_name, value, result, direction)


def test_the_limit_does_not_change_the_temperatures():
    assert_direction(NAME, "max_internal_t", 60.0, "res_t_air", 0)


def test_correlation_spread_equals_the_engine_band():
    evaluation = evaluate_template(NAME)
    low, high = _engine_case(_inputs(evaluation), band=True).band["air_in"]
    assert named(evaluation, "res_t_air_low") == pytest.approx(low, rel=1e-9)
    assert named(evaluation, "res_t_air_high") == pytest.approx(high, rel=1e-9)
    assert low < high
