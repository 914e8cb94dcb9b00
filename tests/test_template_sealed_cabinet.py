"""sealed-cabinet template: equals a direct engine calculation, closes its energy balance, stays
physically bounded, and every input moves the results the expected way."""

from __future__ import annotations

import pytest

import stillair
from stillair.addin.templates import sealed_cabinet as cabinet
from template_support import assert_direction, evaluate_template, input_names, named

NAME = "sealed-cabinet"


def _inputs(evaluation):
    names = ("cab_height", "cab_width", "cab_depth", "wall_thickness", "wall_k", "emissivity", "dissipation",
             "absorptance", "sun_top", "sun_sides", "ambient_t", "sky_t", "altitude", "vplate_method",
             "max_internal_t", "night_ambient_t", "night_sky_t", "night_dissipation", "seal_t", "seal_rh",
             "dew_margin", "wind_speed", "night_wind_speed")
    return {n: named(evaluation, n) for n in names}


def engine_tables(v, wind="wind_speed"):
    """The cabinet's branch and (day) boundary rows and its air pressure, from the input values
    (the vented cabinet's test builds on them); the outer faces in the wind named by ``wind``."""
    side_area = 2 * (v["cab_width"] + v["cab_depth"]) * v["cab_height"]
    top_area = v["cab_width"] * v["cab_depth"]
    branches = cabinet.branch_rows(
        height=v["cab_height"], side_area=side_area, top_area=top_area,
        top_length=top_area / (2 * (v["cab_width"] + v["cab_depth"])), wall_thickness=v["wall_thickness"],
        wall_k=v["wall_k"], emissivity=v["emissivity"], method=v["vplate_method"],
        wind=v.get(wind, 0.0), wind_length=max(v["cab_width"], v["cab_depth"]))
    day = cabinet.boundary_rows(
        dissipation=v["dissipation"], sun_side=v["absorptance"] * v["sun_sides"] * side_area,
        sun_top=v["absorptance"] * v["sun_top"] * top_area, ambient=v["ambient_t"], sky=v["sky_t"])
    return branches, day, stillair.altitude_pressure(v["altitude"])


def _engine_tables(v, night=False):
    """The cabinet's branch table (in the day's wind, or with ``night`` the night's) and its day
    and night boundary tables, from the inputs."""
    branches, day, _ = engine_tables(v, "night_wind_speed" if night else "wind_speed")
    night = cabinet.night_boundary_rows(dissipation=v["night_dissipation"], ambient=v["night_ambient_t"],
                                        sky=v["night_sky_t"])
    return branches, day, night


def _engine_case(v, **options):
    """The same cabinet built directly from the engine's Python API."""
    branches, bounds, pressure = engine_tables(v)
    return stillair.solve_network(branches, bounds, "air", pressure=pressure, **options)


@pytest.mark.parametrize("sets", [{}, {"vplate_method": "mcadams", "altitude": 1500, "dissipation": 300},
                                  {"wind_speed": 4.0, "cab_depth": 1.1}],
                         ids=["default", "mcadams-altitude", "windy"])
def test_results_equal_a_direct_engine_network(sets):
    evaluation = evaluate_template(NAME, **sets)
    result = _engine_case(_inputs(evaluation))
    pairs = {"t_air": result.temperatures["air_in"], "t_side_in": result.temperatures["side_in"],
             "t_side_out": result.temperatures["side_out"], "t_top_in": result.temperatures["top_in"],
             "t_top_out": result.temperatures["top_out"], "q_conv_sides": result.heat["conv_side_out"],
             "q_rad_sides": result.heat["rad_side"], "q_conv_top": result.heat["conv_top_out"],
             "q_rad_top": result.heat["rad_top"]}
    for name, expected in pairs.items():
        assert named(evaluation, name) == pytest.approx(expected, rel=1e-9), name
    # the checker's re-computed coefficients equal the network's own
    assert named(evaluation, "h_out_sides") == pytest.approx(result.branches["conv_side_out"].h, rel=1e-9)
    assert named(evaluation, "h_in_top") == pytest.approx(result.branches["conv_top_in"].h, rel=1e-9)


def test_default_case_reads_well_and_is_in_range():
    evaluation = evaluate_template(NAME)
    t_air = named(evaluation, "res_t_air")
    # common practice: a sealed cabinet runs above ambient, and the top (in the sun) above the sides
    assert named(evaluation, "ambient_t") < named(evaluation, "res_t_side_out") < t_air
    assert named(evaluation, "res_t_top_out") > named(evaluation, "res_t_side_out")
    assert named(evaluation, "res_margin") == pytest.approx(named(evaluation, "max_internal_t") - t_air, rel=1e-12)
    assert named(evaluation, "res_check") == ("OK" if t_air <= named(evaluation, "max_internal_t") else "EXCEEDS LIMIT")
    assert named(evaluation, "res_net_check").startswith("OK")
    assert named(evaluation, "res_method_sides") == "churchill-chu"
    assert named(evaluation, "res_method_top") == "lloyd-moran"
    assert not evaluation.notes  # every correlation inside its range by default


def test_limit_check_reports_an_exceeded_limit():
    evaluation = evaluate_template(NAME, max_internal_t=40)
    assert named(evaluation, "res_check") == "EXCEEDS LIMIT"
    assert named(evaluation, "res_margin") < 0


@pytest.mark.parametrize("sets", [{}, {"dissipation": 400, "sun_top": 0, "sun_sides": 0},
                                  {"absorptance": 0.9, "sky_t": -10}], ids=["default", "no-sun", "dark-clear-sky"])
def test_energy_balance_dissipation_plus_sun_equals_loss(sets):
    evaluation = evaluate_template(NAME, **sets)
    heat_in = named(evaluation, "dissipation") + named(evaluation, "res_sun")
    heat_out = named(evaluation, "res_conv") + named(evaluation, "res_rad_ambient") + named(evaluation, "res_rad_sky")
    assert heat_out == pytest.approx(heat_in, rel=1e-9)
    assert abs(named(evaluation, "res_balance")) < 1e-9 * heat_in


def test_no_heat_input_leaves_the_cabinet_between_sky_and_ambient():
    """Limit: with no dissipation and no sun, nothing can heat the cabinet above the ambient, and
    it cannot fall below the sky (second law)."""
    evaluation = evaluate_template(NAME, dissipation=0, sun_top=0, sun_sides=0)
    sky, ambient = named(evaluation, "sky_t"), named(evaluation, "ambient_t")
    for name in ("t_air", "t_side_in", "t_side_out", "t_top_in", "t_top_out"):
        assert sky < named(evaluation, name) < ambient, name
    # the top, seeing the cold sky, is the coldest face
    assert named(evaluation, "t_top_out") < named(evaluation, "t_side_out")


def test_no_heat_input_and_sky_at_ambient_is_isothermal():
    evaluation = evaluate_template(NAME, dissipation=0, sun_top=0, sun_sides=0, sky_t=30)
    for name in ("t_air", "t_side_out", "t_top_out"):
        assert named(evaluation, name) == pytest.approx(30.0, abs=1e-9)


def test_internal_temperature_rises_monotonically_with_dissipation():
    temperatures = [named(evaluate_template(NAME, dissipation=q), "res_t_air") for q in (0, 75, 150, 300, 450)]
    assert all(a < b for a, b in zip(temperatures, temperatures[1:]))


# input -> (new value, result, direction, why)
DAY_DIRECTIONS = {  # the inputs the vented cabinet shares (tests/test_template_vented_cabinet.py)
    "cab_height": (2.0, "res_t_air", -1, "a larger cabinet has more area to lose heat"),
    "cab_width": (1.0, "res_t_air", -1, "more area"),
    "cab_depth": (0.9, "res_t_air", -1, "more area"),
    "wall_thickness": (0.02, "res_t_air", +1, "a thicker wall adds conduction resistance"),
    "wall_k": (5.0, "res_t_air", +1, "a less conductive wall adds resistance"),
    "emissivity": (0.3, "res_t_air", +1, "a low-emissivity finish radiates less (sun absorbed separately)"),
    "dissipation": (300.0, "res_t_air", +1, "more heat in"),
    "absorptance": (0.8, "res_t_air", +1, "more sun absorbed"),
    "sun_top": (1000.0, "res_t_air", +1, "more sun on the top"),
    "sun_sides": (300.0, "res_t_air", +1, "more sun on the sides"),
    "ambient_t": (40.0, "res_t_air", +1, "warmer surroundings"),
    "sky_t": (25.0, "res_t_air", +1, "a warmer sky takes less radiation from the top"),
    "altitude": (2500.0, "res_t_air", +1, "thinner air convects less"),
    "max_internal_t": (60.0, "res_margin", +1, "the limit only moves the margin"),
    "wind_speed": (3.0, "res_t_air", -1, "a wind cools the outer faces (mixed convection)"),
}
NIGHT_DIRECTIONS = {
    "night_ambient_t": (12.0, "res_t_coldest_night", +1, "a warmer night"),
    "night_sky_t": (0.0, "res_t_coldest_night", +1, "a cloudier, warmer sky takes less from the top"),
    "night_dissipation": (80.0, "res_heater_q", -1, "the equipment's own heat does part of the heater's work"),
    "seal_t": (25.0, "res_t_dew", +1, "warmer air sealed at the same RH holds more water"),
    "seal_rh": (0.6, "res_t_dew", +1, "more moisture sealed in"),
    "dew_margin": (5.0, "res_heater_q", +1, "a larger margin needs warmer walls"),
    "night_wind_speed": (3.0, "res_t_coldest_night", +1, "a wind ties the sky-cooled top to the warmer air"),
}
DIRECTIONS = {**DAY_DIRECTIONS, **NIGHT_DIRECTIONS}


def test_every_input_has_a_direction_test():
    inputs = input_names(cabinet.TEMPLATE)
    assert inputs == set(DIRECTIONS) | {"vplate_method"}


@pytest.mark.parametrize("input_name", sorted(DIRECTIONS))
def test_set_moves_the_result_the_expected_way(input_name):
    value, result, direction, _why = DIRECTIONS[input_name]
    assert_direction(NAME, input_name, value, result, direction)


def test_the_limit_does_not_change_the_temperatures():
    assert_direction(NAME, "max_internal_t", 60.0, "res_t_air", 0)


def test_choosing_the_vertical_correlation_changes_the_result():
    """vplate_method has no physical direction; it must reach the network (checked against the
    engine in test_results_equal_a_direct_engine_network) and change the answer."""
    assert named(evaluate_template(NAME, vplate_method="mcadams"), "res_t_air") != \
        named(evaluate_template(NAME), "res_t_air")


@pytest.mark.parametrize("sets", [{}, {"vplate_method": "mcadams", "max_internal_t": 49.0}], ids=["default", "mcadams"])
def test_correlation_spread_equals_the_engine_band(sets):
    evaluation = evaluate_template(NAME, **sets)
    low, high = _engine_case(_inputs(evaluation), band=True).band["air_in"]
    assert named(evaluation, "res_t_air_low") == pytest.approx(low, rel=1e-9)
    assert named(evaluation, "res_t_air_high") == pytest.approx(high, rel=1e-9)
    assert low < high
    verdict = "OK" if high <= named(evaluation, "max_internal_t") else "EXCEEDS LIMIT"
    assert named(evaluation, "res_check_high") == verdict


# ---------------------------------------------------------------------------------------------
# The limit turned round, and the night case


@pytest.mark.parametrize("sets", [{}, {"dissipation": 400}, {"max_internal_t": 45, "altitude": 1500}],
                         ids=["default", "over-the-limit", "lower-limit-altitude"])
def test_allowed_dissipation_and_cooling_equal_the_engine(sets):
    evaluation = evaluate_template(NAME, **sets)
    v = _inputs(evaluation)
    branches, day, _ = _engine_tables(v)
    pressure = stillair.altitude_pressure(v["altitude"])
    answer = stillair.heat_for_temperature(branches, day, "air_in", v["max_internal_t"], "air", pressure)
    assert named(evaluation, "res_allowed_q") == pytest.approx(answer.heat, rel=1e-9)
    assert named(evaluation, "res_cooling_q") == pytest.approx(max(0.0, v["dissipation"] - answer.heat), abs=1e-9)
    # the defining property: the cabinet dissipating the allowance sits at the limit
    at_limit = [row if row[0] != "air_in" else ["air_in", "Q", named(evaluation, "res_allowed_q")] for row in day]
    stillair.clear_network_cache()
    reached = stillair.solve_network(branches, at_limit, "air", pressure).temperatures["air_in"]
    assert reached == pytest.approx(v["max_internal_t"], abs=1e-6)


def test_cooling_is_what_exceeds_the_allowance():
    evaluation = evaluate_template(NAME, dissipation=400)
    assert named(evaluation, "res_check") == "EXCEEDS LIMIT"
    assert named(evaluation, "res_cooling_q") == pytest.approx(400 - named(evaluation, "res_allowed_q"), rel=1e-12)
    assert named(evaluate_template(NAME), "res_cooling_q") == 0.0      # default: within the limit


def test_the_allowance_rises_with_the_limit_and_falls_with_the_sun():
    base = named(evaluate_template(NAME), "res_allowed_q")
    assert named(evaluate_template(NAME, max_internal_t=60), "res_allowed_q") > base
    assert named(evaluate_template(NAME, sun_top=1000), "res_allowed_q") < base
    # the dissipation itself does not change what the limit allows
    assert named(evaluate_template(NAME, dissipation=300), "res_allowed_q") == pytest.approx(base, rel=1e-9)


@pytest.mark.parametrize("sets", [{}, {"seal_rh": 0.2, "night_sky_t": -20}, {"night_dissipation": 0, "seal_t": 30},
                                  {"night_wind_speed": 2.5, "wind_speed": 6.0}],
                         ids=["default", "dry-seal-cold-sky", "no-night-load-warm-seal", "night-wind"])
def test_night_case_equals_the_engine(sets):
    evaluation = evaluate_template(NAME, **sets)
    v = _inputs(evaluation)
    branches, _, night = _engine_tables(v, night=True)
    pressure = stillair.altitude_pressure(v["altitude"])
    solved = stillair.solve_network(branches, night, "air", pressure)
    coldest = min(solved.temperatures["top_in"], solved.temperatures["side_in"])
    dew = stillair.dew_point(v["seal_t"], v["seal_rh"], pressure)
    assert named(evaluation, "res_t_air_night") == pytest.approx(solved.temperatures["air_in"], rel=1e-9)
    assert named(evaluation, "res_t_coldest_night") == pytest.approx(coldest, rel=1e-9)
    assert named(evaluation, "res_t_dew") == pytest.approx(dew, rel=1e-12)
    assert named(evaluation, "res_dew_clearance") == pytest.approx(coldest - dew, rel=1e-9)
    holds = [stillair.heat_for_temperature(branches, night, "air_in", dew + v["dew_margin"], "air", pressure,
                                           at=wall).heat for wall in ("top_in", "side_in")]
    heater = max(0.0, max(holds) - v["night_dissipation"])
    assert named(evaluation, "res_heater_q") == pytest.approx(heater, rel=1e-9, abs=1e-9)
    assert named(evaluation, "res_rh_air_night") == pytest.approx(
        stillair.surface_rh(v["seal_t"], v["seal_rh"], solved.temperatures["air_in"], pressure), rel=1e-9)


def test_the_heater_power_holds_every_inner_wall_at_the_target():
    evaluation = evaluate_template(NAME)
    v = _inputs(evaluation)
    branches, _, night = _engine_tables(v, night=True)
    heated = [row if row[0] != "air_in" else ["air_in", "Q", v["night_dissipation"] + named(evaluation, "res_heater_q")]
              for row in night]
    solved = stillair.solve_network(branches, heated, "air", stillair.altitude_pressure(v["altitude"]))
    target = named(evaluation, "res_t_dew") + v["dew_margin"]
    walls = [solved.temperatures["top_in"], solved.temperatures["side_in"]]
    assert min(walls) == pytest.approx(target, abs=1e-6)        # the coldest wall sits on the target
    assert all(t >= target - 1e-6 for t in walls)


@pytest.mark.parametrize("sets, verdict", [
    ({}, "CONDENSATION: coldest inner wall "),
    ({"seal_rh": 0.3}, "MARGIN SHORT: coldest inner wall "),
    ({"seal_rh": 0.15}, "OK: coldest inner wall "),
])
def test_condensation_verdicts(sets, verdict):
    evaluation = evaluate_template(NAME, **sets)
    clearance, margin = named(evaluation, "res_dew_clearance"), named(evaluation, "dew_margin")
    text = named(evaluation, "res_condensation")
    assert text.startswith(verdict), text
    assert f"{abs(clearance):.1f} K" in text
    if verdict.startswith("OK"):
        assert clearance >= margin
        assert named(evaluation, "res_heater_q") == 0.0      # the night load alone keeps the walls dry
    else:
        assert named(evaluation, "res_heater_q") > 0.0


def test_still_air_by_default_and_the_wind_is_the_engine_s():
    """Wind 0 is the still-air network exactly; a wind gives the one-call coefficients of the faces
    in it (mixed convection), the longer side the length along the wind; at night a wind warms the
    sky-cooled walls but takes more heater power to hold them at the target."""
    evaluation = evaluate_template(NAME, wind_speed=3.0)
    v = _inputs(evaluation)
    pressure = stillair.altitude_pressure(v["altitude"])
    along = max(v["cab_width"], v["cab_depth"])
    h_sides = stillair.h_vplate(named(evaluation, "t_side_out"), v["ambient_t"], v["cab_height"], "air", pressure,
                                wind=3.0, wind_length=along)
    assert named(evaluation, "h_out_sides") == pytest.approx(h_sides, rel=1e-9)
    h_top = stillair.h_hplate(named(evaluation, "t_top_out"), v["ambient_t"], named(evaluation, "top_length"), "up",
                              "air", pressure, wind=3.0, wind_length=along)
    assert named(evaluation, "h_out_top") == pytest.approx(h_top, rel=1e-9)
    assert named(evaluation, "res_method_sides") == "churchill-chu + pohlhausen (wind)"
    still = evaluate_template(NAME)
    assert named(still, "res_method_sides") == "churchill-chu"
    assert named(evaluate_template(NAME, wind_speed=0.0), "t_air") == named(still, "t_air")
    windy_night = evaluate_template(NAME, night_wind_speed=3.0)
    assert named(windy_night, "res_heater_q") > named(still, "res_heater_q")


def test_every_input_row_is_one_line_high():
    """A wrapped label or note (row 27, the sun on the sides, did) makes the sand input box twice
    as tall, which reads as an empty second input cell under the value."""
    import openpyxl

    ws = openpyxl.load_workbook(cabinet.TEMPLATE.path)["Inputs"]
    inputs = [row[0].row for row in ws.iter_rows(min_col=2, max_col=2)
              if row[0].fill.fgColor.rgb == "FFFBEFD5" and row[0].value is not None]
    assert len(inputs) == len(input_names(cabinet.TEMPLATE))
    tall = [(r, ws.cell(r, 1).value) for r in inputs if (ws.row_dimensions[r].height or 13.5) > 13.5]
    assert not tall
