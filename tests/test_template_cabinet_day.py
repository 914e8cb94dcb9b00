"""cabinet-day template: equals a direct engine calculation, meets the quasi-steady limit when the
cabinet has next to no mass, lags the steady peak-sun result when it has mass, and every input
moves the results the expected way."""

from __future__ import annotations

import numpy as np
import pytest

import stillair
from stillair.addin.templates import cabinet_day as day
from template_support import assert_direction, evaluate_template, input_names, named

pytestmark = pytest.mark.slow  # every test solves the cabinet through a whole day (1-3 s each)

NAME = "cabinet-day"


def _inputs(evaluation):
    return {name: named(evaluation, name) for name in list(day.DEFAULTS) + ["altitude", "vplate_method"]}


def test_the_coldest_inner_wall_is_checked_against_the_dew_point_of_the_air_sealed_in():
    evaluation = evaluate_template(NAME)
    network, result, _ = _engine_day(_inputs(evaluation))
    dew = stillair.dew_point(named(evaluation, "seal_t"), named(evaluation, "seal_rh"), network.pressure)
    coldest = min(result.minimum["side_in"][0], result.minimum["top_in"][0])
    assert named(evaluation, "res_t_dew") == pytest.approx(dew, rel=1e-12)
    assert named(evaluation, "res_dew_clearance") == pytest.approx(coldest - dew, rel=1e-9)
    assert named(evaluation, "res_condensation").startswith("OK: coldest inner wall ")
    # air sealed in warm and humid: its dew point lies above the night's coldest wall
    humid = evaluate_template(NAME, seal_t=30, seal_rh=0.9)
    assert named(humid, "res_dew_clearance") < 0
    assert named(humid, "res_condensation").startswith("CONDENSATION: coldest inner wall ")


def _engine_day(inputs):
    network = day.day_network(**inputs)
    result = stillair.solve_transient(network.branches, network.boundaries, network.capacities, day.OUTPUT_TIMES,
                                      series=network.series, pressure=network.pressure, initial="periodic")
    steady = stillair.solve_network(network.branches, network.peak_boundaries, pressure=network.pressure)
    return network, result, steady


@pytest.mark.parametrize("sets", [{}, {"vplate_method": "mcadams", "altitude": 1500, "equipment_c": 250000}],
                         ids=["default", "mcadams-altitude-heavy"])
def test_results_equal_a_direct_engine_calculation(sets):
    evaluation = evaluate_template(NAME, **sets)
    _, result, steady = _engine_day(_inputs(evaluation))
    peak, when = result.peak["air_in"]
    pairs = {"res_t_air_peak": peak, "res_t_air_peak_hour": when / 3600,
             "res_side_in_min": result.minimum["side_in"][0], "res_side_in_min_hour": result.minimum["side_in"][1] / 3600,
             "res_top_in_min": result.minimum["top_in"][0], "res_top_in_min_hour": result.minimum["top_in"][1] / 3600,
             "res_t_air_steady": steady.temperatures["air_in"],
             "res_cycle_gap": result.temperatures["air_in"][-1] - result.temperatures["air_in"][0]}
    for name, expected in pairs.items():
        assert named(evaluation, name) == pytest.approx(expected, rel=1e-9, abs=1e-12), name
    assert named(evaluation, "res_steady_excess") == pytest.approx(steady.temperatures["air_in"] - peak, rel=1e-9)
    network = day.day_network(**_inputs(evaluation))
    band = stillair.solve_network(network.branches, network.peak_boundaries, pressure=network.pressure, band=True)
    assert named(evaluation, "res_t_air_steady_high") == pytest.approx(band.band["air_in"][1], rel=1e-9)
    assert named(evaluation, "res_t_air_steady_high") > steady.temperatures["air_in"]


def test_the_default_day_repeats_and_its_peak_lags_below_the_steady_result():
    evaluation = evaluate_template(NAME)
    assert abs(named(evaluation, "res_cycle_gap")) <= 1e-3       # a periodic day (engine: PERIODIC_TOLERANCE)
    peak, steady = named(evaluation, "res_t_air_peak"), named(evaluation, "res_t_air_steady")
    assert peak < steady
    # the mass carries the peak past the sun's (12:00) and the ambient's (15:00)
    assert 15.0 < named(evaluation, "res_t_air_peak_hour") < 18.0
    # the inner walls are coldest before sunrise, above the night's air minimum (the cabinet dissipates)
    assert named(evaluation, "res_side_in_min_hour") < named(evaluation, "sunrise")
    assert named(evaluation, "res_side_in_min") > named(evaluation, "ambient_min")
    assert named(evaluation, "res_check") == ("OK" if peak <= named(evaluation, "max_internal_t") else "EXCEEDS LIMIT")
    assert named(evaluation, "res_net_check").startswith("OK")


def test_a_cabinet_without_mass_follows_the_steady_network_hour_by_hour():
    """Limit: with the equipment's capacity 0 and a wall of next to no mass, only the internal air's
    own capacity (under a minute's time constant) remains, so the day's peak is the largest of the
    steady solutions at every output time."""
    sets = {"equipment_c": 0, "wall_density": 100, "wall_cp": 100}
    evaluation = evaluate_template(NAME, **sets)
    network = day.day_network(**_inputs(evaluation))
    series = {}
    for label, time, value in network.series:
        series.setdefault(label, []).append((time, value))
    steady_max = -np.inf
    for time in day.OUTPUT_TIMES:
        at = {label: float(np.interp(time, *zip(*points))) for label, points in series.items()}
        boundaries = [[node, kind, at[value] if isinstance(value, str) else value]
                      for node, kind, value in network.boundaries]
        steady_max = max(steady_max, stillair.solve_network(network.branches, boundaries,
                                                            pressure=network.pressure).temperatures["air_in"])
    assert named(evaluation, "res_t_air_peak") == pytest.approx(steady_max, abs=0.05)


def test_limit_check_reports_an_exceeded_limit():
    evaluation = evaluate_template(NAME, max_internal_t=45)
    assert named(evaluation, "res_check") == "EXCEEDS LIMIT"
    assert named(evaluation, "res_margin") < 0


# input -> (new value, result, direction, why); directions measured at the defaults and explained
DIRECTIONS = {
    "cab_height": (2.0, "res_t_air_peak", -1, "more area to lose the heat (more side sun too, less per W)"),
    "cab_width": (1.0, "res_t_air_peak", -1, "more area"),
    "cab_depth": (0.9, "res_t_air_peak", -1, "more area"),
    "wall_thickness": (0.004, "res_t_air_peak", -1, "more wall mass; a steel skin's resistance is negligible"),
    "wall_k": (5.0, "res_t_air_peak", +1, "a less conductive wall adds resistance"),
    "emissivity": (0.3, "res_t_air_peak", +1, "a low-emissivity finish radiates less"),
    "wall_density": (2700.0, "res_t_air_peak", +1, "a lighter wall lags less"),
    "wall_cp": (900.0, "res_t_air_peak", -1, "more wall capacity lags more"),
    "equipment_c": (300000.0, "res_t_air_peak", -1, "heavier contents lag more"),
    "dissipation": (300.0, "res_t_air_peak", +1, "more heat in"),
    "absorptance": (0.8, "res_t_air_peak", +1, "more sun absorbed"),
    "sun_top_peak": (1100.0, "res_t_air_peak", +1, "more sun on the top"),
    "sun_sides_peak": (300.0, "res_t_air_peak", +1, "more sun on the sides"),
    "sunrise": (7.0, "res_t_air_peak_hour", +1, "the sun, and the peak, come later"),
    "sunset": (19.0, "res_t_air_peak", +1, "a longer day brings more sun"),
    "ambient_min": (22.0, "res_side_in_min", +1, "warmer nights keep the walls warmer"),
    "ambient_max": (36.0, "res_t_air_peak", +1, "a hotter afternoon"),
    "ambient_max_hour": (17.0, "res_t_air_peak_hour", +1, "the hottest air comes later"),
    "sky_depression": (20.0, "res_t_air_peak", -1, "a colder sky takes more radiation from the top"),
    "altitude": (2500.0, "res_t_air_peak", +1, "thinner air convects less"),
    "max_internal_t": (60.0, "res_margin", +1, "the limit only moves the margin"),
    "seal_t": (28.0, "res_dew_clearance", -1, "warmer air sealed in holds more water: a higher dew point"),
    "seal_rh": (0.7, "res_dew_clearance", -1, "more humid air sealed in: a higher dew point"),
    "dew_margin": (13.0, "res_condensation", 0, "only the verdict reads the margin"),
}


def test_every_input_has_a_direction_test():
    assert input_names(day.TEMPLATE) == set(DIRECTIONS) | {"vplate_method"}


@pytest.mark.parametrize("input_name", sorted(name for name in DIRECTIONS if DIRECTIONS[name][2]))
def test_set_moves_the_result_the_expected_way(input_name):
    value, result, direction, _why = DIRECTIONS[input_name]
    assert_direction(NAME, input_name, value, result, direction)


def test_the_limit_does_not_change_the_temperatures():
    assert_direction(NAME, "max_internal_t", 60.0, "res_t_air_peak", 0)


def test_the_margin_moves_only_the_condensation_verdict():
    assert_direction(NAME, "dew_margin", 13.0, "res_dew_clearance", 0)
    assert named(evaluate_template(NAME, dew_margin=13.0), "res_condensation").startswith("MARGIN SHORT: ")


def test_choosing_the_vertical_correlation_changes_the_result():
    assert named(evaluate_template(NAME, vplate_method="mcadams"), "res_t_air_peak") != \
        named(evaluate_template(NAME), "res_t_air_peak")
