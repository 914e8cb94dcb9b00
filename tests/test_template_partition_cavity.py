"""partition-cavity template: the converged column equals the engine's network, the single-pass
column equals the published correlations evaluated by hand, and every input moves the results
the expected way."""

from __future__ import annotations

import pytest
from scipy.constants import Stefan_Boltzmann, zero_Celsius

import stillair
from stillair.addin.templates import partition_cavity as partition
from template_support import assert_direction, evaluate_template, input_names, named

NAME = "partition-cavity"
GRAVITY = 9.80665  # m/s², standard gravity (CODATA / ISO 80000-3)


def _v(evaluation):
    names = ("warm_t", "cold_t", "part_height", "part_width", "board_t", "board_k", "gap", "eps_room",
             "eps_cav_warm", "eps_cav_cold", "cav_method", "g_warm_face", "g_warm_cav", "g_cold_cav",
             "g_cold_face", "g_prop_t")
    return {n: named(evaluation, n) for n in names}


@pytest.mark.parametrize("sets", [{}, {"cav_method": "wright", "gap": 0.03, "eps_cav_warm": 0.05}],
                         ids=["default", "wright-foil"])
def test_converged_column_equals_the_engine_network(sets):
    evaluation = evaluate_template(NAME, **sets)
    v = _v(evaluation)
    area = v["part_height"] * v["part_width"]
    result = stillair.solve_network(partition.branch_rows(
        height=v["part_height"], area=area, board_t=v["board_t"], board_k=v["board_k"], gap=v["gap"],
        eps_room=v["eps_room"], eps_cav_warm=v["eps_cav_warm"], eps_cav_cold=v["eps_cav_cold"],
        method=v["cav_method"]), partition.boundary_rows(v["warm_t"], v["cold_t"]))
    q = result.heat["board_warm"]
    assert named(evaluation, "res_q") == pytest.approx(q, rel=1e-9)
    assert named(evaluation, "res_u") == pytest.approx(q / (area * (v["warm_t"] - v["cold_t"])), rel=1e-9)
    for node in ("warm_face", "warm_cav", "cold_cav", "cold_face"):
        assert named(evaluation, f"n_{node}") == pytest.approx(result.temperatures[node], rel=1e-9)
    assert named(evaluation, "res_h_cav") == pytest.approx(result.branches["cav_conv"].h, rel=1e-9)
    # series heat flow: what enters the warm face leaves the cold face
    assert result.heat["board_cold"] == pytest.approx(q, rel=1e-9)


def _churchill_chu_vertical(ra, pr):
    """Churchill & Chu (1975), vertical plate, all Ra: Incropera et al. 6th ed. eq. 9.26."""
    return (0.825 + 0.387 * ra ** (1 / 6) / (1 + (0.492 / pr) ** (9 / 16)) ** (8 / 27)) ** 2


def _elsherbiny_vertical(ra, aspect):
    """ElSherbiny, Raithby & Hollands, J. Heat Transfer 104 (1982) 96-102, vertical air layers
    (equations from memory): the largest of the three regime terms, returned separately."""
    nu_ct = (1 + (0.104 * ra ** 0.293 / (1 + (6310 / ra) ** 1.36)) ** 3) ** (1 / 3)
    nu_l = 0.242 * (ra / aspect) ** 0.273
    nu_t = 0.0605 * ra ** (1 / 3)
    return nu_ct, nu_l, nu_t


def _h_rad(t1, t2, factor):
    """Linearised grey radiation, Incropera et al. 6th ed. eqs. 1.9 and 13.24."""
    k1, k2 = t1 + zero_Celsius, t2 + zero_Celsius
    return factor * Stefan_Boltzmann * (k1 ** 2 + k2 ** 2) * (k1 + k2)


def test_single_pass_equals_the_published_correlations_evaluated_by_hand():
    evaluation = evaluate_template(NAME)
    v = _v(evaluation)
    tp = v["g_prop_t"]  # every property at the one guessed temperature, as the Notes sheet's single-pass paragraph says
    k, nu, alpha = stillair.air_conductivity(tp), stillair.air_kinvisc(tp), stillair.air_diffusivity(tp)
    beta, pr = stillair.air_expansion(tp), stillair.air_prandtl(tp)
    group = GRAVITY * beta / (nu * alpha)
    height, gap = v["part_height"], v["gap"]

    h_warm = _churchill_chu_vertical(group * (v["warm_t"] - v["g_warm_face"]) * height ** 3, pr) * k / height
    h_cold = _churchill_chu_vertical(group * (v["g_cold_face"] - v["cold_t"]) * height ** 3, pr) * k / height
    nu_ct, nu_l, nu_t = _elsherbiny_vertical(group * (v["g_warm_cav"] - v["g_cold_cav"]) * gap ** 3, height / gap)
    # the conduction-transition term decides here, so the exponent of nu_l (0.273 or 0.272 in
    # different transcriptions) cannot matter
    assert nu_ct > max(nu_l, nu_t)
    h_cav = nu_ct * k / gap
    hr_warm = _h_rad(v["g_warm_face"], v["warm_t"], v["eps_room"])
    hr_cold = _h_rad(v["g_cold_face"], v["cold_t"], v["eps_room"])
    hr_cav = _h_rad(v["g_warm_cav"], v["g_cold_cav"], 1 / (1 / v["eps_cav_warm"] + 1 / v["eps_cav_cold"] - 1))
    r_total = 1 / (h_warm + hr_warm) + 2 * v["board_t"] / v["board_k"] + 1 / (h_cav + hr_cav) + 1 / (h_cold + hr_cold)
    u = 1 / r_total

    assert named(evaluation, "sp_cav_method") == "elsherbiny"
    assert named(evaluation, "sp_h_warm") == pytest.approx(h_warm, rel=1e-9)
    assert named(evaluation, "sp_h_cav") == pytest.approx(h_cav, rel=1e-9)
    assert named(evaluation, "sp_hr_cav") == pytest.approx(hr_cav, rel=1e-9)
    assert named(evaluation, "res_sp_u") == pytest.approx(u, rel=1e-9)
    q = u * height * v["part_width"] * (v["warm_t"] - v["cold_t"])
    assert named(evaluation, "res_sp_q") == pytest.approx(q, rel=1e-9)
    assert named(evaluation, "res_sp_diff") == pytest.approx(100 * (q - named(evaluation, "res_q")) /
                                                             named(evaluation, "res_q"), rel=1e-9)


def test_a_second_pass_from_the_converged_temperatures_comes_much_closer():
    """Physical check of the iteration: guessing the converged surface temperatures (and the mean
    air temperature for the properties) leaves only the one-property-temperature error."""
    base = evaluate_template(NAME)
    better = evaluate_template(NAME, g_warm_face=named(base, "n_warm_face"), g_warm_cav=named(base, "n_warm_cav"),
                               g_cold_cav=named(base, "n_cold_cav"), g_cold_face=named(base, "n_cold_face"))
    assert abs(named(better, "res_sp_diff")) < 0.25 * abs(named(base, "res_sp_diff"))
    assert abs(named(better, "res_sp_diff")) < 1.0  # per cent


def test_default_case_is_in_range_and_sensible():
    evaluation = evaluate_template(NAME)
    assert named(evaluation, "res_net_check").startswith("OK")
    assert named(evaluation, "res_cav_method") == "elsherbiny"
    assert named(evaluation, "res_sp_note").startswith("in range")
    warm, cold = named(evaluation, "warm_t"), named(evaluation, "cold_t")
    faces = [named(evaluation, n) for n in ("n_warm_face", "n_warm_cav", "n_cold_cav", "n_cold_face")]
    assert warm > faces[0] > faces[1] > faces[2] > faces[3] > cold  # temperatures fall along the heat flow
    assert not evaluation.notes


# input -> (new value, result, direction, why)
DIRECTIONS = {
    "warm_t": (25.0, "res_q", +1, "a larger air-to-air difference"),
    "cold_t": (10.0, "res_q", -1, "a smaller air-to-air difference"),
    "part_height": (3.5, "res_u", -1, "Churchill-Chu h and the cavity Nu both fall with height"),
    "board_t": (0.025, "res_u", -1, "thicker boards add resistance"),
    "board_k": (0.5, "res_u", +1, "more conductive boards"),
    "gap": (0.01, "res_u", +1, "a narrow gap is in the conduction regime: conductance k/gap rises"),
    "eps_room": (0.5, "res_u", -1, "less radiation to the rooms"),
    "eps_cav_warm": (0.05, "res_u", -1, "a foil face blocks most cavity radiation"),
    "eps_cav_cold": (0.05, "res_u", -1, "a foil face blocks most cavity radiation"),
    "g_warm_face": (20.0, "res_sp_q", -1, "a guess closer to the warm air gives a smaller convection h; "
                                          "the radiation h it raises grows far less"),
    "g_warm_cav": (18.0, "res_sp_q", +1, "a larger guessed cavity difference raises the cavity h"),
    "g_cold_cav": (9.0, "res_sp_q", -1, "a smaller guessed cavity difference lowers the cavity h"),
    "g_cold_face": (7.0, "res_sp_q", +1, "a larger guessed cold-side difference raises that h"),
    "g_prop_t": (20.0, "res_sp_q", -1, "at a fixed temperature difference natural-convection h falls "
                                       "as the air gets warmer (k (g beta/(nu alpha))^(1/3) decreases)"),
}
GUESSES = ("g_warm_face", "g_warm_cav", "g_cold_cav", "g_cold_face", "g_prop_t")


def test_every_input_has_a_direction_test():
    inputs = input_names(partition.TEMPLATE)
    assert inputs == set(DIRECTIONS) | {"cav_method", "part_width"}


@pytest.mark.parametrize("input_name", sorted(DIRECTIONS))
def test_set_moves_the_result_the_expected_way(input_name):
    value, result, direction, _why = DIRECTIONS[input_name]
    assert_direction(NAME, input_name, value, result, direction)


@pytest.mark.parametrize("input_name", GUESSES)
def test_guesses_never_touch_the_converged_answer(input_name):
    """The network does not use the hand calculation's guesses at all."""
    value = DIRECTIONS[input_name][0]
    assert_direction(NAME, input_name, value, "res_q", 0)


def test_width_scales_the_heat_flow_and_leaves_u_unchanged():
    """part_width has no effect on U by design (a 1-D partition: width only scales the area); U is
    Q/(A dT), so it agrees to rounding rather than bit for bit."""
    base, wider = evaluate_template(NAME), evaluate_template(NAME, part_width=6.0)
    assert named(wider, "res_u") == pytest.approx(named(base, "res_u"), rel=1e-12)
    assert named(wider, "res_sp_u") == pytest.approx(named(base, "res_sp_u"), rel=1e-12)
    assert named(wider, "res_q") == pytest.approx(1.5 * named(base, "res_q"), rel=1e-9)
    assert named(wider, "res_sp_q") == pytest.approx(1.5 * named(base, "res_sp_q"), rel=1e-9)


def test_cold_face_spread_equals_the_engine_band():
    evaluation = evaluate_template(NAME)
    v = _v(evaluation)
    result = stillair.solve_network(partition.branch_rows(
        height=v["part_height"], area=v["part_height"] * v["part_width"], board_t=v["board_t"],
        board_k=v["board_k"], gap=v["gap"], eps_room=v["eps_room"], eps_cav_warm=v["eps_cav_warm"],
        eps_cav_cold=v["eps_cav_cold"], method=v["cav_method"]),
        partition.boundary_rows(v["warm_t"], v["cold_t"]), band=True)
    low, high = result.band["cold_face"]
    assert named(evaluation, "res_cold_face_low") == pytest.approx(low, rel=1e-9)
    assert named(evaluation, "res_cold_face_high") == pytest.approx(high, rel=1e-9)
    # the band lies between the two air temperatures (second law)
    assert v["cold_t"] < low <= high < v["warm_t"]
