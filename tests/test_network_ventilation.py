"""Air carried through an enclosure: the ``vent`` and ``airflow`` branch kinds, ``stack_flow`` and
``airflow_for`` (engine/ventilation.py).

Checks, each by another path or a law:
* the single-opening-pair stack flow is its closed form, written out here from the stack
  pressure (rho_out - rho_in) g H against the orifice losses of the two openings in series
  (BS 5925:1991 clause 12 and ASHRAE Fundamentals, Ventilation and Infiltration, from memory),
  with air's density at each temperature and cp at the mean, to 1e-9;
* ideal-gas scaling: with no other path, m ~ Q^(1/3) and dT ~ Q^(2/3) for small differences;
* the stack formula of the ventilation literature, Q = Cd A* (2 g H dT / T)^(1/2) with
  1/A*^2 = 1/A_in^2 + 1/A_out^2 (the Boussinesq form; Wikipedia, "Stack effect", the flow
  induced by the stack effect, and BS 5925 from memory), to its Boussinesq error;
* airflow_for: the enclosure-climate rule of thumb V [m³/h] = 3.1 P [W] / dT [K] (from memory,
  common practice at sea level), and a network airflow branch of that flow holds the rise exactly;
* energy balance of every answer; a vented cabinet's inside temperature falls as the openings
  grow and tends to the sealed cabinet's as they close;
* the derivatives the solver uses against central differences of the flow;
* exact messages for bad columns and arguments.
Demo data are scenarios of our own.
"""

from __future__ import annotations

import math

import fluids
import numpy as np
import pytest
from scipy.constants import g, zero_Celsius

import stillair
from stillair.network import BRANCH_KINDS, NetworkError, solve_network
from stillair.validity import InputError

AMBIENT = 25.0


def closed_form_mass_flow(t_in, t_out, a_in, a_out, height, cd=0.61, k=0.0):
    """The stack balance solved by hand: (rho_out - rho_in) g H = losses of both openings."""
    rho_in, rho_out = stillair.air_density(t_in), stillair.air_density(t_out)
    rho_low, rho_high = (rho_out, rho_in) if rho_out >= rho_in else (rho_in, rho_out)
    losses = (1 / cd ** 2 + k) / (2 * rho_low * a_in ** 2) + 1 / (2 * cd ** 2 * rho_high * a_out ** 2)
    return math.sqrt(abs(rho_out - rho_in) * g * height / losses)


def vent_row(inlet=0.004, outlet=0.004, height=0.6, cd=None, k=None, name="vent"):
    return [name, "air", "outside", "vent", inlet, outlet, height, cd, k]


def cabinet(vent=None, heat=60.0):
    """Inside air -> inner face of the four walls (0.8 m tall) -> steel sheet -> outer face ->
    outside air and surroundings; the vent (or fan) from the inside air to the outside air."""
    rows = [["in-film", "inner", "air", "vplate", 0.8, 1.6],
            ["sheet", "inner", "outer", "conduction", 0.0015, 16.0, 1.6],
            ["out-film", "outer", "outside", "vplate", 0.8, 1.6],
            ["out-rad", "outer", "outside", "radiation", 0.9, None, 1.6]]
    if vent is not None:
        rows.append(vent)
    return rows, [["air", "Q", heat], ["outside", "T", AMBIENT]]


@pytest.mark.parametrize("inlet, outlet, height, cd, k", [
    (0.004, 0.004, 0.6, None, None),
    (0.002, 0.008, 1.2, 0.65, None),
    (0.01, 0.003, 0.3, None, fluids.square_edge_screen(0.5)),   # Blevins via fluids: K = 3.8
])
def test_the_stack_flow_is_its_closed_form(inlet, outlet, height, cd, k):
    result = solve_network([vent_row(inlet, outlet, height, cd, k)], [["air", "Q", 40.0], ["outside", "T", AMBIENT]])
    record = result.branches["vent"]
    t_in = result.temperatures["air"]
    mass = closed_form_mass_flow(t_in, AMBIENT, inlet, outlet, height, cd or 0.61, k or 0.0)
    assert record.mass_flow == pytest.approx(mass, rel=1e-9)
    assert record.volume_flow == pytest.approx(mass / stillair.air_density(AMBIENT), rel=1e-9)
    cp = stillair.air_cp(0.5 * (t_in + AMBIENT))
    assert record.heat == pytest.approx(mass * cp * (t_in - AMBIENT), rel=1e-9)
    assert record.heat == pytest.approx(40.0, rel=1e-9)          # no other path
    assert stillair.stack_flow(t_in, AMBIENT, inlet, outlet, height, cd or 0.61, k or 0.0) \
        == pytest.approx(mass, rel=1e-12)
    assert (record.method, record.note) == ("stack flow through two openings", "")


def test_the_mass_flow_grows_as_the_cube_root_of_the_heat_for_small_differences():
    # m ~ (dT)^(1/2) and Q = m cp dT ~ dT^(3/2): m ~ Q^(1/3), dT ~ Q^(2/3) (constant properties)
    flows, rises = [], []
    for heat in (1e-4, 8e-4):   # dT of a few mK: the departures of order dT/T stay below 1e-4
        result = solve_network([vent_row()], [["air", "Q", heat], ["outside", "T", AMBIENT]])
        flows.append(result.branches["vent"].mass_flow)
        rises.append(result.temperatures["air"] - AMBIENT)
    assert flows[1] / flows[0] == pytest.approx(2.0, rel=1e-4)
    assert rises[1] / rises[0] == pytest.approx(4.0, rel=1e-4)


def test_the_stack_flow_agrees_with_the_literature_formula_to_its_boussinesq_error():
    t_in, area, height = 35.0, 0.005, 0.9
    literature = 0.61 * area / math.sqrt(2.0) * math.sqrt(
        2 * g * height * (t_in - AMBIENT) / (t_in + zero_Celsius))
    ours = stillair.stack_flow(t_in, AMBIENT, area, area, height) / stillair.air_density(AMBIENT)
    # the two differ by terms of order dT/T = 3 %: the densities of the two openings' air
    assert ours == pytest.approx(literature, rel=0.02)


def test_airflow_for_follows_the_rule_of_thumb_and_holds_the_rise_in_a_network():
    # enclosure-climate rule of thumb at sea level (from memory): V [m³/h] = 3.1 P [W] / dT [K]
    assert stillair.airflow_for(300.0, 10.0, 35.0) * 3600 == pytest.approx(3.1 * 300.0 / 10.0, rel=0.01)
    volume = stillair.airflow_for(150.0, 12.0, AMBIENT)
    result = solve_network([["fan", "air", "outside", "airflow", volume]],
                           [["air", "Q", 150.0], ["outside", "T", AMBIENT]])
    assert result.temperatures["air"] - AMBIENT == pytest.approx(12.0, rel=1e-9)
    record = result.branches["fan"]
    assert record.volume_flow == pytest.approx(volume, rel=1e-12)
    assert record.mass_flow == pytest.approx(volume * stillair.air_density(AMBIENT), rel=1e-12)
    assert record.R == pytest.approx(12.0 / 150.0, rel=1e-9)


def test_airflow_for_broadcasts():
    volumes = stillair.airflow_for(np.array([100.0, 200.0]), 10.0)
    assert volumes[1] == pytest.approx(2 * volumes[0], rel=1e-12)


@pytest.mark.parametrize("vent", [None, vent_row(), vent_row(0.02, 0.02, 0.7, None, 10.0),
                                  ["fan", "air", "outside", "airflow", 0.01]])
@pytest.mark.parametrize("heat", [5.0, 60.0, 400.0])
def test_every_answer_balances_its_energy(vent, heat):
    rows, boundaries = cabinet(vent, heat)
    result = solve_network(rows, boundaries)
    for node, imbalance in result.balance().items():
        assert abs(imbalance) <= 1e-9 * heat, node
    # what leaves the cabinet, through the walls and with the air, is the dissipation
    leaving = result.heat["out-film"] + result.heat["out-rad"] + (result.heat[vent[0]] if vent else 0.0)
    assert leaving == pytest.approx(heat, rel=1e-9)


def test_the_cabinet_cools_as_the_openings_grow_and_is_the_sealed_cabinet_as_they_close():
    sealed = solve_network(*cabinet()).temperatures["air"]
    areas = [1e-10, 1e-6, 1e-4, 1e-3, 4e-3, 1e-2, 4e-2]
    inside = [solve_network(*cabinet(vent_row(a, a))).temperatures["air"] for a in areas]
    assert all(later < earlier for earlier, later in zip(inside, inside[1:]))
    assert inside[0] == pytest.approx(sealed, abs=1e-6)
    assert inside[0] < sealed
    assert inside[-1] - AMBIENT < 0.5 * (sealed - AMBIENT)


def test_a_larger_loss_coefficient_or_a_smaller_discharge_coefficient_warms_the_cabinet():
    plain = solve_network(*cabinet(vent_row())).temperatures["air"]
    screened = solve_network(*cabinet(vent_row(k=fluids.square_edge_screen(0.5)))).temperatures["air"]
    narrow = solve_network(*cabinet(vent_row(cd=0.4))).temperatures["air"]
    assert screened > plain and narrow > plain


def test_inside_air_colder_than_outside_runs_the_flow_downward_with_a_note():
    result = solve_network([vent_row()], [["air", "Q", -20.0], ["outside", "T", AMBIENT]])
    record = result.branches["vent"]
    t_in = result.temperatures["air"]
    assert t_in < AMBIENT
    # downward: outside air enters at the high opening, inside air leaves at the low one
    assert record.mass_flow == pytest.approx(closed_form_mass_flow(t_in, AMBIENT, 0.004, 0.004, 0.6), rel=1e-9)
    assert record.heat == pytest.approx(-20.0, rel=1e-9)
    assert "runs downward" in record.note
    assert result.notes == (f"branch vent: {record.note}",)
    assert stillair.stack_flow(t_in, AMBIENT, 0.004, 0.004, 0.6) < 0


@pytest.mark.parametrize("kind, params", [
    ("vent", (0.004, 0.006, 0.5, 0.61, 2.0)), ("airflow", (0.01, None, None, None, None)),
    ("airflow", (((0.0, 60.0), (0.01, 45.0), (0.02, 0.0)), 0.002, 0.003, 0.61, 0.0))])
@pytest.mark.parametrize("t_from, t_to", [(45.0, 25.0), (25.5, 25.0), (10.0, 30.0)])
def test_the_derivatives_are_those_of_the_flow(kind, params, t_from, t_to):
    group = BRANCH_KINDS[kind].group(np.array([0]), [params], {"gas": "air", "pressure": 101325.0})

    def flow(a, b):
        return group.flows(np.array([a]), np.array([b]), np.array([a - b]))[0][0]

    _, d_from, d_to = group.flows(np.array([t_from]), np.array([t_to]), np.array([t_from - t_to]))
    h = 1e-3
    assert d_from[0] == pytest.approx((flow(t_from + h, t_to) - flow(t_from - h, t_to)) / (2 * h), rel=2e-3)
    assert d_to[0] == pytest.approx((flow(t_from, t_to + h) - flow(t_from, t_to - h)) / (2 * h), rel=2e-3)


@pytest.mark.parametrize("row, message", [
    (vent_row(cd=1.5), "solve_network: branch row 1 (vent), column p4 (discharge coefficient) must be in (0, 1], got 1.5"),
    (vent_row(k=-1.0), "solve_network: branch row 1 (vent), column p5 (extra loss coefficient) must be >= 0, got -1"),
    (vent_row(inlet=0.0), "solve_network: branch row 1 (vent), column p1 (inlet area) must be > 0 m², got 0"),
    (["fan", "air", "outside", "airflow", 0.01, None, None, None, None, "auto"],
     "solve_network: branch row 1 (fan), column method must be blank for kind airflow (it has no correlation), got 'auto'"),
])
def test_bad_columns_are_named(row, message):
    with pytest.raises(NetworkError) as error:
        solve_network([row], [["air", "Q", 10.0], ["outside", "T", AMBIENT]])
    assert str(error.value) == message


def test_an_unknown_gas_is_refused_before_any_iteration_in_a_network_of_vents_only():
    with pytest.raises(InputError, match="gas"):
        solve_network([vent_row()], [["air", "Q", 10.0], ["outside", "T", AMBIENT]], gas="steam")


@pytest.mark.parametrize("call, message", [
    (lambda: stillair.airflow_for(100.0, 0.0), "airflow_for: rise must be > 0 K, got 0"),
    (lambda: stillair.airflow_for(-1.0, 10.0), "airflow_for: heat must be >= 0 W, got -1"),
    (lambda: stillair.airflow_for(100.0, 900.0), "airflow_for: rise must be such that t_air + rise <= 800 °C"),
    (lambda: stillair.stack_flow(30.0, 20.0, 0.01, 0.01, 0.5, discharge=0.0),
     "stack_flow: discharge must be in (0, 1], got 0"),
    (lambda: stillair.stack_flow(30.0, 20.0, 0.01, 0.01, -0.5), "stack_flow: height must be > 0 m, got -0.5"),
])
def test_bad_arguments_are_named(call, message):
    with pytest.raises(InputError) as error:
        call()
    assert message in str(error.value)


def test_the_reference_table_lists_the_new_kinds_with_their_default():
    rows = {row["kind"]: row for row in stillair.network.kind_reference()}
    assert rows["vent"]["p4"] == "discharge coefficient (blank: 0.61, a sharp-edged opening)"
    assert rows["airflow"]["p1"].startswith("volume flow m³/s")
    assert rows["vent"]["from"].startswith("from: the inside air")


FAN = "0:60, 0.01:45, 0.02:0"   # a small fan of our own: shut-off 60 Pa, free delivery 0.02 m³/s


def fan_row(curve=FAN, inlet=0.002, outlet=0.003, cd=None, k=None):
    return ["fan", "air", "outside", "airflow", curve, inlet, outlet, cd, k]


@pytest.mark.parametrize("inlet, outlet, cd, k", [(0.002, 0.003, None, None), (0.004, 0.004, 0.65, 3.8)])
def test_a_fan_curve_runs_where_its_pressure_meets_the_losses_of_the_openings(inlet, outlet, cd, k):
    result = solve_network([fan_row(FAN, inlet, outlet, cd, k)], [["air", "Q", 100.0], ["outside", "T", AMBIENT]])
    record = result.branches["fan"]
    t_in = result.temperatures["air"]
    rho_out, rho_in = stillair.air_density(AMBIENT), stillair.air_density(t_in)
    mass = rho_out * record.volume_flow
    cd, k = cd or 0.61, k or 0.0
    losses = mass ** 2 * ((1 / cd ** 2 + k) / (2 * rho_out * inlet ** 2) + 1 / (2 * cd ** 2 * rho_in * outlet ** 2))
    fan = np.interp(record.volume_flow, [0.0, 0.01, 0.02], [60.0, 45.0, 0.0])
    assert fan == pytest.approx(losses, rel=1e-9)
    assert record.heat == pytest.approx(mass * stillair.air_cp(0.5 * (t_in + AMBIENT)) * (t_in - AMBIENT), rel=1e-9)
    assert record.heat == pytest.approx(100.0, rel=1e-9)


def test_a_stronger_fan_or_larger_openings_move_more_air():
    def flow(row):
        return solve_network([row], [["air", "Q", 100.0], ["outside", "T", AMBIENT]]).branches["fan"].volume_flow
    base = flow(fan_row())
    assert flow(fan_row("0:120, 0.01:90, 0.02:0")) > base
    assert flow(fan_row(inlet=0.02, outlet=0.03)) > base
    # openings far larger than the fan: it runs near free delivery
    assert flow(fan_row(inlet=10.0, outlet=10.0)) == pytest.approx(0.02, rel=1e-6)


@pytest.mark.parametrize("row, message", [
    (["fan", "air", "outside", "airflow", 0.01, 0.002],
     "solve_network: branch row 1 (fan), column p2 must be blank for kind airflow with a fixed volume flow "
     "(p2..p5 are the openings a fan curve works against), got 0.002"),
    (fan_row(inlet=None),
     "solve_network: branch row 1 (fan), column p2 (inlet area) must be an area in m² (the openings the fan "
     "curve works against), got blank"),
    (fan_row("0:60, 0.02:3"),
     "solve_network: branch row 1 (fan), column p1 (volume flow) must be a volume flow in m³/s or a fan curve "
     "\"V:dp, ...\" in m³/s:Pa (the last point is free delivery, at 0 Pa), got '0:60, 0.02:3'"),
    (fan_row("0:60, 0.01:70, 0.02:0"),
     "solve_network: branch row 1 (fan), column p1 (volume flow) must be a volume flow in m³/s or a fan curve "
     "\"V:dp, ...\" in m³/s:Pa (flows must rise and pressures must not rise from point to point), "
     "got '0:60, 0.01:70, 0.02:0'"),
    (fan_row("0:60 0.02:0"),
     "solve_network: branch row 1 (fan), column p1 (volume flow) must be a volume flow in m³/s or a fan curve "
     "\"V:dp, ...\" in m³/s:Pa (the point \"0:60 0.02:0\" is not \"flow:pressure\"), got '0:60 0.02:0'"),
])
def test_bad_fan_columns_are_named(row, message):
    with pytest.raises(NetworkError) as error:
        solve_network([row], [["air", "Q", 10.0], ["outside", "T", AMBIENT]])
    assert str(error.value) == message


from hypothesis import assume, given, settings, strategies as st  # noqa: E402


@pytest.mark.slow  # a long sweep: 150 generated enclosures
@settings(max_examples=150, deadline=None)
@given(heat=st.floats(-300.0, 2000.0), outside=st.floats(-30.0, 50.0), inlet=st.floats(1e-4, 0.1),
       outlet=st.floats(1e-4, 0.1), height=st.floats(0.05, 3.0), loss=st.floats(0.0, 50.0),
       wall=st.floats(0.05, 20.0))
def test_sweep_vented_enclosures_balance_and_keep_the_closed_form(heat, outside, inlet, outlet, height, loss, wall):
    """A vent beside a wall conductance, over sizes, climates and heat (negative: cooling inside).
    The wall alone would hold the air within -100..+300 K of outside: inside air's range."""
    assume(-100.0 * wall <= heat <= 300.0 * wall)
    rows = [["vent", "air", "outside", "vent", inlet, outlet, height, None, loss],
            ["wall", "air", "outside", "film", 5.0, wall]]
    result = solve_network(rows, [["air", "Q", heat], ["outside", "T", outside]])
    (imbalance,) = result.balance().values()
    assert abs(imbalance) <= 1e-9 * max(abs(heat), 1e-3)
    t_in = result.temperatures["air"]
    record = result.branches["vent"]
    # heat runs from the warmer air to the colder, and the air is warmer inside when heated
    if abs(heat) > 1e-6:
        assert record.heat * record.delta_t >= 0 and record.delta_t * heat > 0
    if abs(t_in - outside) > 1e-6:
        mass = closed_form_mass_flow(t_in, outside, inlet, outlet, height, 0.61, loss)
        assert record.mass_flow == pytest.approx(mass, rel=1e-8)
