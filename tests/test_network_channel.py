"""The open-channel branch kind (``channel``) of the thermal network.

Checks, each by another path or a law:
* one branch between fixed temperatures is stillair.h_channel's one-call result times area and
  difference (the same correlation, film temperature and flux-case solution by the one-call path),
  with its Nu, Ra, method and note;
* energy balance of a vented card cage whose two channel walls exchange radiation (demo data);
* a very wide channel is the isolated vertical plate: Bar-Cohen and Rohsenow's isolated-plate
  limit 0.59 El^(1/4) is McAdams' laminar vertical plate 0.59 Ra_L^(1/4) (McAdams, Heat
  Transmission, 3rd ed.; the rule tests/test_channel.py establishes for h_channel, to 1e-3);
* the correlation band with the channel's two published correlations for symmetric isothermal
  walls (Elenbaas 1942 and Bar-Cohen and Rohsenow 1984);
* exact messages for bad columns.
"""

from __future__ import annotations

import pytest

import stillair
from stillair.network import NetworkError, solve_network

AMBIENT = 25.0


def channel_row(case=None, method=None, spacing=0.012, height=0.16, area=0.016, name="c"):
    return [name, "wall", "inlet", "channel", spacing, height, area, case, None, method]


@pytest.mark.parametrize("case", [None, "isothermal", "isothermal-adiabatic", "flux", "flux-adiabatic"])
def test_a_channel_branch_between_fixed_temperatures_is_the_one_call_coefficient(case):
    wall, inlet = 65.0, AMBIENT
    result = solve_network([channel_row(case)], [["wall", "T", wall], ["inlet", "T", inlet]])
    record = result.branches["c"]
    one_call = stillair.channel_convection(wall, inlet, 0.012, 0.16, case=case or "isothermal").scalar()
    h = stillair.h_channel(wall, inlet, 0.012, 0.16, case or "isothermal")
    assert record.heat == pytest.approx(h * 0.016 * (wall - inlet), rel=1e-9)
    assert record.h == pytest.approx(one_call.h, rel=1e-9)
    assert record.Nu == pytest.approx(one_call.nu, rel=1e-9)
    # Ra as the correlation read it: Ra_S, or Ra*_S on the wall heat flux for the flux cases
    assert record.Ra == pytest.approx(one_call.ra, rel=1e-9)
    assert (record.method, record.case, record.note, record.in_range) == (
        one_call.method, one_call.case, one_call.note, one_call.in_range)


def test_a_wall_colder_than_the_inlet_air_takes_heat_with_the_same_coefficient():
    # Boussinesq symmetry: the downward flow along a cold channel is the upward one mirrored
    result = solve_network([channel_row("isothermal")], [["wall", "T", 10.0], ["inlet", "T", 30.0]])
    h = stillair.h_channel(10.0, 30.0, 0.012, 0.16)
    assert result.branches["c"].heat == pytest.approx(-h * 0.016 * 20.0, rel=1e-9)


@pytest.mark.parametrize("case", ["isothermal", "flux-adiabatic"])
def test_a_heated_wall_settles_where_the_channel_carries_its_heat(case):
    result = solve_network([channel_row(case), ["back", "wall", "inlet", "resistance", 400.0]],
                           [["wall", "Q", 1.5], ["inlet", "T", AMBIENT]])
    wall = result.temperatures["wall"]
    h = stillair.h_channel(wall, AMBIENT, 0.012, 0.16, case)
    channel = result.branches["c"].heat
    assert channel == pytest.approx(h * 0.016 * (wall - AMBIENT), rel=1e-9)
    assert channel + result.branches["back"].heat == pytest.approx(1.5, rel=1e-9)


def card_cage(emissivity_card=0.9, emissivity_wall=0.8, power=2.0):
    """A vented card cage (demo data): a 160 mm tall, 100 mm deep card dissipating ``power`` W
    faces the cage's aluminium side wall 12 mm away; room air enters the gap at the bottom.  Each
    wall of the gap is a channel wall heated on one side (isothermal-adiabatic, h on its own
    area); the card's face and the wall exchange radiation; the wall's outer face loses heat to
    the room as a vertical plate."""
    area = 0.16 * 0.10
    branches = [
        ["card-gap", "card", "room", "channel", 0.012, 0.16, area, "isothermal-adiabatic"],
        ["wall-gap", "wall", "room", "channel", 0.012, 0.16, area, "isothermal-adiabatic"],
        ["card-wall", "card", "wall", "radiation", emissivity_card, emissivity_wall, area],
        ["wall-outside", "wall", "room", "vplate", 0.16, area],
    ]
    return solve_network(branches, [["card", "Q", power], ["room", "T", AMBIENT]])


def test_a_card_cage_with_radiation_between_the_channel_walls_balances_its_energy():
    result = card_cage()
    b = result.branches
    # every watt the card dissipates reaches the room (conservation of energy)
    to_room = b["card-gap"].heat + b["wall-gap"].heat + b["wall-outside"].heat
    assert to_room == pytest.approx(2.0, rel=1e-9)
    assert b["card-gap"].heat + b["card-wall"].heat == pytest.approx(2.0, rel=1e-9)
    assert b["card-wall"].heat == pytest.approx(b["wall-gap"].heat + b["wall-outside"].heat, rel=1e-9)
    # heat runs downhill: the card is the hottest, the wall between it and the room
    t = result.temperatures
    assert t["card"] > t["wall"] > AMBIENT
    assert b["card-wall"].heat > 0 and b["wall-gap"].heat > 0
    # each channel branch is the one-call coefficient at the solved wall temperature
    for name, node in (("card-gap", "card"), ("wall-gap", "wall")):
        h = stillair.h_channel(t[node], AMBIENT, 0.012, 0.16, "isothermal-adiabatic")
        assert b[name].heat == pytest.approx(h * 0.016 * (t[node] - AMBIENT), rel=1e-9)
        assert b[name].in_range


def test_radiation_between_the_channel_walls_cools_the_card():
    # a parallel path for the card's heat can only lower its temperature
    assert card_cage(0.9, 0.8).temperatures["card"] < card_cage(0.05, 0.05).temperatures["card"]


@pytest.mark.parametrize("height", [0.1, 0.3])
def test_a_very_wide_channel_is_the_vertical_plate_branch(height):
    """At 1 m spacing the boundary layers never meet: each wall is an isolated vertical plate,
    and the channel's isolated-plate limit is McAdams' laminar plate (tests/test_channel.py
    holds h_channel to it within 1e-3)."""
    area = height * 0.5
    boundaries = [["wall", "Q", 8.0 * height], ["inlet", "T", AMBIENT]]
    channel = solve_network([channel_row(spacing=1.0, height=height, area=area)], boundaries)
    plate = solve_network([["c", "wall", "inlet", "vplate", height, area, None, None, None, "mcadams"]],
                          boundaries)
    assert channel.branches["c"].h == pytest.approx(plate.branches["c"].h, rel=1e-3)
    assert channel.temperatures["wall"] - AMBIENT == pytest.approx(plate.temperatures["wall"] - AMBIENT, rel=1e-3)


def test_the_band_of_a_channel_spans_its_two_correlations_for_isothermal_walls():
    branches = [channel_row("isothermal", spacing=0.01, height=0.1, area=0.02)]
    boundaries = [["wall", "Q", 1.0], ["inlet", "T", AMBIENT]]
    result = solve_network(branches, boundaries, band=True)
    record = result.branches["c"]
    el = record.Ra * 0.01 / 0.1
    assert 0.1 < el < 1e5 and record.in_range        # both correlations cover the case
    low, high = result.band["wall"]
    by_method = {}
    for solution in result.band_solutions:
        branch = solution.branches["c"]
        wall = solution.temperatures["wall"]
        h = stillair.h_channel(wall, AMBIENT, 0.01, 0.1, "isothermal", method=branch.method)
        assert branch.heat == pytest.approx(h * 0.02 * (wall - AMBIENT), rel=1e-9)
        by_method[branch.method] = wall
    assert set(by_method) == {"elenbaas", "bar-cohen-rohsenow"}
    assert (low, high) == (min(by_method.values()), max(by_method.values()))
    assert low < high and low <= result.temperatures["wall"] <= high


@pytest.mark.parametrize("row,message", [
    (channel_row(spacing=0), "solve_network: branch row 1 (c), column p1 (spacing) must be > 0 m, got 0"),
    (channel_row(spacing=None), "solve_network: branch row 1 (c), column p1 (spacing) must be a number in m, got blank"),
    (channel_row(height=-0.2), "solve_network: branch row 1 (c), column p2 (height) must be > 0 m, got -0.2"),
    (channel_row(area="big"), "solve_network: branch row 1 (c), column p3 (area) must be a number in m², not text, "
                              "got 'big'"),
    (channel_row("sideways"), 'solve_network: branch row 1 (c), column p4 (case) must be blank or one of "isothermal", '
                              '"isothermal-adiabatic", "flux", "flux-adiabatic", got \'sideways\''),
    (channel_row(3), 'solve_network: branch row 1 (c), column p4 (case) must be blank or one of "isothermal", '
                     '"isothermal-adiabatic", "flux", "flux-adiabatic", got 3'),
    (channel_row("flux")[:8] + [0.5], "solve_network: branch row 1 (c), column p5 must be blank for kind channel "
                                      "(it uses p1..p4), got 0.5"),
    (channel_row("flux", "elenbaas"), 'solve_network: branch row 1 (c), column method must be blank or one of "auto", '
                                      '"bar-cohen-rohsenow" for case "flux", got \'elenbaas\''),
    (channel_row(None, "churchill-chu"), 'solve_network: branch row 1 (c), column method must be blank or one of '
                                         '"auto", "bar-cohen-rohsenow", "elenbaas" for case "isothermal", '
                                         'got \'churchill-chu\''),
])
def test_bad_channel_columns_are_named(row, message):
    with pytest.raises(NetworkError) as caught:
        solve_network([row], [["wall", "T", 60.0], ["inlet", "T", AMBIENT]])
    assert str(caught.value) == message


def test_case_and_method_ignore_case_and_spaces():
    result = solve_network([channel_row(" Flux-Adiabatic ", "Bar-Cohen-Rohsenow")],
                           [["wall", "T", 60.0], ["inlet", "T", AMBIENT]])
    assert (result.branches["c"].case, result.branches["c"].method) == ("flux-adiabatic", "bar-cohen-rohsenow")


@pytest.mark.parametrize("case", ["isothermal", "isothermal-adiabatic", "flux", "flux-adiabatic"])
def test_card_cages_from_narrow_to_wide_gaps_converge_and_balance(case):
    # from the fully developed (2 mm) to the isolated-plate regime (0.5 m), 0.05 to 20 W (demo data)
    for spacing in (0.002, 0.012, 0.5):
        for power in (0.05, 2.0, 20.0):
            branches = [["card-gap", "card", "room", "channel", spacing, 0.16, 0.016, case],
                        ["wall-gap", "wall", "room", "channel", spacing, 0.16, 0.016, case],
                        ["card-wall", "card", "wall", "radiation", 0.9, 0.8, 0.016],
                        ["wall-outside", "wall", "room", "vplate", 0.16, 0.016]]
            result = solve_network(branches, [["card", "Q", power], ["room", "T", AMBIENT]])
            b = result.branches
            assert b["card-gap"].heat + b["wall-gap"].heat + b["wall-outside"].heat == pytest.approx(power, rel=1e-9)
            assert result.temperatures["card"] > result.temperatures["wall"] > AMBIENT
