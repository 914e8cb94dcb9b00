"""Open vertical channels and plate-fin heat sinks (stillair.channel).

Outside sources named beside each check:
* Bar-Cohen & Rohsenow, J. Heat Transfer 106 (1984) 116-123, as tabulated in Incropera, DeWitt,
  Bergman, Lavine, Fundamentals of Heat and Mass Transfer, 6th ed. (2007), sec. 9.7, Table 9.3
  (C1, C2, S_opt = 2.71 / 2.15 (Ra_S/(S^3 L))^-1/4, S_max/S_opt = 1.71) -- from memory.
* Elenbaas, Physica 9 (1942) 1-28, Incropera 6th ed. eq. 9.36 -- from memory.
* Cengel, Heat and Mass Transfer: A Practical Approach, 3rd ed. (2007), ch. 9, example
  "Optimum fin spacing of a heat sink" -- from memory (see the test).
* ht 1.2 (PyPI), ht.fin_efficiency_Kern_Kraus (annular fin; its large-radius limit is the
  straight fin).  ht has no parallel-plate channel or heat-sink function to compare with.
Physics: the fully developed limits from a first-principles energy balance, the composite's
limits, agreement with the single vertical plate at large spacing, energy balance of the
heat-sink model, the fin equation solved numerically (scipy solve_bvp).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.constants import Stefan_Boltzmann as SIGMA, g as GRAVITY, zero_Celsius
from scipy.integrate import solve_bvp
from scipy.optimize import minimize_scalar

import stillair
from stillair import CORRELATIONS, CorrelationRangeWarning, InputError, get_correlation, nusselt
from stillair.channel import (
    BAR_COHEN_ROHSENOW,
    CHANNEL_CASES,
    FLUX_CASES,
    _fin_efficiency,
    fully_developed_limit,
    isolated_plate_limit,
)

FLUX = set(FLUX_CASES)

# Incropera 6th ed. Table 9.3 (from memory): (C1, C2) per case.
TABLE_9_3 = {"isothermal": (576, 2.87), "isothermal-adiabatic": (144, 2.87),
             "flux": (48, 2.51), "flux-adiabatic": (24, 2.51)}


def published_composite(el, case):
    """Incropera 6th ed. eqs. 9.37 / 9.40 written out (from memory), independently of the engine."""
    c1, c2 = TABLE_9_3[case]
    if case in FLUX:
        return (c1 / el + c2 / el ** 0.4) ** -0.5
    return (c1 / el ** 2 + c2 / el ** 0.5) ** -0.5


def corr(method):
    return get_correlation("channel", method).function


# ------------------------------------------------------------------------------------------
# The correlations against their published forms and limits
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("case", CHANNEL_CASES)
def test_bar_cohen_rohsenow_is_the_published_composite(case):
    assert BAR_COHEN_ROHSENOW[case] == TABLE_9_3[case]
    el = np.logspace(-2, 6, 17)
    aspect = 20.0
    nu = corr("bar-cohen-rohsenow")(ra=el * aspect, pr=0.71, aspect=aspect, case=case)
    np.testing.assert_allclose(nu, published_composite(el, case), rtol=1e-13)


@pytest.mark.parametrize("case", CHANNEL_CASES)
def test_composite_tends_to_its_fully_developed_and_isolated_plate_limits(case):
    c1, c2 = TABLE_9_3[case]
    small, large = (1e-6, 1e14) if case in FLUX else (1e-4, 1e9)
    f = corr("bar-cohen-rohsenow")
    # fully developed: El/sqrt(C1) (El/24 symmetric isothermal), sqrt(El*/C1) for flux
    expected_fd = math.sqrt(small / c1) if case in FLUX else small / math.sqrt(c1)
    assert f(ra=small, pr=0.71, aspect=1.0, case=case) == pytest.approx(expected_fd, rel=1e-4)
    assert fully_developed_limit(small, case) == pytest.approx(expected_fd, rel=1e-14)
    # isolated plate: El^(1/4)/sqrt(C2) = 0.590 El^(1/4); El*^(1/5)/sqrt(C2) = 0.631 El*^(1/5)
    expected_iso = (large ** 0.2 if case in FLUX else large ** 0.25) / math.sqrt(c2)
    assert f(ra=large, pr=0.71, aspect=1.0, case=case) == pytest.approx(expected_iso, rel=1e-4)
    assert isolated_plate_limit(large, case) == pytest.approx(expected_iso, rel=1e-14)
    # the composite lies below both limits everywhere (Churchill-Usagi, exponent -2)
    el = np.logspace(-3, 8, 45)
    nu = f(ra=el, pr=0.71, aspect=1.0, case=case)
    assert np.all(nu < fully_developed_limit(el, case)) and np.all(nu < isolated_plate_limit(el, case))
    assert np.all(np.diff(nu) > 0)


def test_isolated_plate_coefficients_are_the_single_plate_constants():
    """The isothermal isolated-plate limit is McAdams' laminar vertical plate, Nu_L = 0.59 Ra_L^(1/4)
    (stillair's vplate "mcadams" band; McAdams, Heat Transmission, 3rd ed.); the flux limit's
    1/sqrt(2.51) = 0.631 is the local uniform-flux plate constant Bar-Cohen and Rohsenow used
    (from memory)."""
    assert 1 / math.sqrt(BAR_COHEN_ROHSENOW["isothermal"][1]) == pytest.approx(0.59, abs=1e-3)
    ra_l = 1e7
    assert stillair.nu_vplate(ra_l, 0.71, "mcadams") == pytest.approx(
        isolated_plate_limit(ra_l, "isothermal"), rel=1.5e-3)
    assert 1 / math.sqrt(BAR_COHEN_ROHSENOW["flux"][1]) == pytest.approx(0.631, abs=1e-3)


def test_elenbaas_published_form_and_its_limits():
    el = np.logspace(-1, 5, 13)
    nu = corr("elenbaas")(ra=el * 10.0, pr=0.71, aspect=10.0, case="isothermal")
    np.testing.assert_allclose(nu, el / 24 * (1 - np.exp(-35 / el)) ** 0.75, rtol=1e-13)
    f = corr("elenbaas")
    assert f(ra=1e-3, pr=0.71, aspect=1.0, case="isothermal") == pytest.approx(1e-3 / 24, rel=1e-12)
    assert f(ra=1e8, pr=0.71, aspect=1.0, case="isothermal") == pytest.approx(
        35 ** 0.75 / 24 * 1e8 ** 0.25, rel=1e-5)
    # Elenbaas and Bar-Cohen-Rohsenow share the fully developed limit El/24 and agree within
    # 10 % everywhere on the symmetric isothermal channel (the composite was fitted to his data)
    bcr = corr("bar-cohen-rohsenow")(ra=el * 10.0, pr=0.71, aspect=10.0, case="isothermal")
    assert np.all(np.abs(bcr / nu - 1) < 0.10)


@pytest.mark.parametrize("case", CHANNEL_CASES)
def test_fully_developed_limit_is_the_energy_balance_of_buoyant_poiseuille_flow(case):
    """First principles (no correlation): in a tall narrow channel the air is driven by the
    buoyancy of its mean temperature excess through a slot, u_m = g beta dT_mean S^2/(12 nu), and
    carries the heat of the heated walls: rho cp u_m S dT_out = q'' A_heated per unit depth.
    Isothermal: the air leaves at the wall temperature (dT_mean = dT_out = dT).  Flux: it warms
    linearly (dT_mean = dT_out/2) and the top wall temperature equals the outlet temperature."""
    rho, cp, k, nu_kin, beta = 1.1, 1007.0, 0.027, 1.7e-5, 1 / 320.0
    alpha = k / (rho * cp)
    spacing, height = 0.004, 0.5
    walls = 1 if case.endswith("adiabatic") else 2
    if case in FLUX:
        q_flux = 50.0
        # dT_out from rho cp g beta (dT_out/2) S^3/(12 nu) dT_out = q'' walls L
        dt_out = math.sqrt(24 * q_flux * walls * height * nu_kin / (rho * cp * GRAVITY * beta * spacing ** 3))
        nu_first_principles = q_flux * spacing / (k * dt_out)
        el_star = GRAVITY * beta * q_flux * spacing ** 5 / (k * alpha * nu_kin * height)
        assert fully_developed_limit(el_star, case) == pytest.approx(nu_first_principles, rel=1e-12)
    else:
        dt = 10.0
        u_mean = GRAVITY * beta * dt * spacing ** 2 / (12 * nu_kin)
        heat = rho * cp * u_mean * spacing * dt  # W per m of depth
        h = heat / (walls * height * dt)
        el = GRAVITY * beta * dt * spacing ** 4 / (nu_kin * alpha * height)
        assert fully_developed_limit(el, case) == pytest.approx(h * spacing / k, rel=1e-12)


def test_every_channel_correlation_has_source_equation_and_ranges():
    methods = [m for (g, m) in CORRELATIONS if g == "channel"]
    assert methods == ["bar-cohen-rohsenow", "elenbaas"]
    for method in methods:
        c = get_correlation("channel", method)
        assert c.source and c.equation and c.title and c.validity


@pytest.mark.parametrize("case,quantity,edge,knob", [
    ("isothermal", "Ra_L", 1e9, lambda v: dict(ra=v / 8.0, aspect=2.0)),
    ("flux", "Ra*_L", 1e11, lambda v: dict(ra=v / 16.0, aspect=2.0)),
    ("flux-adiabatic", "Ra*_L", 1e11, lambda v: dict(ra=v / 16.0, aspect=2.0)),
])
def test_bar_cohen_rohsenow_range_just_inside_and_outside(case, quantity, edge, knob):
    bound = get_correlation("channel", "bar-cohen-rohsenow").ranges(case)[0]
    assert bound.quantity == quantity and bound.high == edge
    inside = nusselt("channel", "bar-cohen-rohsenow", case, pr=0.71, **knob(edge * (1 - 1e-9))).scalar()
    assert inside.in_range and inside.note == ""
    outside = nusselt("channel", "bar-cohen-rohsenow", case, pr=0.71, **knob(edge * 2)).scalar()
    assert outside.note == (f"bar-cohen-rohsenow: {quantity} = {edge * 2:g} above {edge:g} "
                            f"(valid {quantity} <= {edge:g})")


def test_elenbaas_range_just_inside_and_outside():
    for value, note in ((0.1 * (1 + 1e-9), ""), (1e5 * (1 - 1e-9), ""),
                        (0.05, "elenbaas: El = 0.05 below 0.1 (valid 0.1 <= El <= 100000)"),
                        (2e5, "elenbaas: El = 200000 above 100000 (valid 0.1 <= El <= 100000)")):
        result = nusselt("channel", "elenbaas", "isothermal", ra=value * 4.0, pr=0.71, aspect=4.0).scalar()
        assert result.note == note


def test_auto_uses_bar_cohen_rohsenow_and_elenbaas_serves_only_isothermal():
    for case in CHANNEL_CASES:
        assert nusselt("channel", "auto", case, ra=1e3, pr=0.71, aspect=10).method.item() == "bar-cohen-rohsenow"
    with pytest.raises(InputError) as error:
        stillair.nu_channel(1e3, 0.71, 10.0, "flux", "elenbaas")
    assert str(error.value) == ('nu_channel: method must be one of "auto", "bar-cohen-rohsenow" for case '
                                '"flux" (elenbaas serves only "isothermal"), got \'elenbaas\'')


def test_nu_channel_warns_outside_the_range():
    with pytest.warns(CorrelationRangeWarning, match="nu_channel: outside validity range: bar-cohen-rohsenow: Ra_L"):
        stillair.nu_channel(1e9, 0.71, 10.0)


# ------------------------------------------------------------------------------------------
# h in one call, flux cases on the top temperature, the single plate at large spacing
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("case", FLUX_CASES)
def test_flux_h_is_on_the_top_wall_temperature_and_consistent_with_ra_star(case):
    ts, tf, spacing, height = 70.0, 20.0, 0.008, 0.15
    result = stillair.channel_convection(ts, tf, spacing, height, case=case).scalar()
    props = stillair.gas_properties("air", 45.0)
    q_flux = result.h * (ts - tf)            # the heat flux that gives this top temperature
    ra_star = GRAVITY * props.expansion * q_flux * spacing ** 4 / (props.conductivity * props.diffusivity
                                                                   * props.kinvisc)
    assert result.ra == pytest.approx(ra_star, rel=1e-10)
    assert result.nu == pytest.approx(stillair.nu_channel(ra_star, props.prandtl, height / spacing, case),
                                      rel=1e-10)
    assert stillair.h_channel(ts, tf, spacing, height, case) == result.h


@pytest.mark.parametrize("height", [0.05, 0.2, 0.5])
def test_wide_channel_agrees_with_the_single_vertical_plate(height):
    """At a spacing far beyond the boundary-layer thickness each wall is an isolated plate:
    h_channel tends to 0.59 Ra_L^(1/4) k/L, which is stillair.nu_vplate's "mcadams" laminar band
    exactly, and lies within 15 % of Churchill-Chu (the default): above it at low Ra (McAdams'
    measured 0.59 against the laminar similarity solution's 0.515 Ra^(1/4) for Pr = 0.71), below it
    towards Ra_L = 1e9, where Churchill-Chu's all-Ra form already grows like Ra^(1/3)."""
    ts, tf = 60.0, 20.0
    h_wide = stillair.h_channel(ts, tf, 1.0, height)
    assert h_wide == pytest.approx(stillair.h_vplate(ts, tf, height, method="mcadams"), rel=1e-3)
    assert abs(h_wide / stillair.h_vplate(ts, tf, height) - 1) < 0.15
    # and the narrow channel falls well below the plate (the boundary layers choke it)
    assert stillair.h_channel(ts, tf, 0.002, height) < 0.5 * stillair.h_vplate(ts, tf, height)


def test_h_channel_arrays_and_errors():
    h = stillair.h_channel(np.array([40.0, 60.0, 80.0]), 20.0, 0.01, 0.1)
    assert h.shape == (3,) and np.all(np.diff(h) > 0)
    assert isinstance(stillair.h_channel(60.0, 20.0, 0.01, 0.1), float)
    with pytest.raises(InputError, match=r"^h_channel: spacing must be > 0 m, got -0.01$"):
        stillair.h_channel(60.0, 20.0, -0.01, 0.1)
    with pytest.raises(InputError) as error:
        stillair.h_channel(60.0, 20.0, 0.01, 0.1, "sideways")
    assert str(error.value) == ('h_channel: case must be one of "isothermal", "isothermal-adiabatic", '
                                '"flux", "flux-adiabatic", got \'sideways\'')
    assert stillair.h_channel(20.0, 20.0, 0.01, 0.1, "flux") == 0.0


# ------------------------------------------------------------------------------------------
# Optimum spacing
# ------------------------------------------------------------------------------------------

def _drive(ts, tf, height):
    props = stillair.gas_properties("air", (ts + tf) / 2)
    return GRAVITY * props.expansion * abs(ts - tf) / (props.kinvisc * props.diffusivity * height)


@pytest.mark.parametrize("case,coefficient", [("isothermal", 2.714), ("isothermal-adiabatic", 2.154)])
def test_optimum_spacing_is_the_published_value_for_air(case, coefficient):
    """Bar-Cohen & Rohsenow (1984): S_opt = 2.714 (Ra_S/(S^3 L))^(-1/4) for symmetric isothermal
    plates, 2.154 with one wall adiabatic (Incropera 6th ed. Table 9.3 gives 2.71 and 2.15 --
    from memory; Cengel 3rd ed. eq. 9-32 gives 2.714 -- from memory).  The composite's own
    (2 C1/C2)^(1/6) is 2.716 and 2.156: the published coefficients are rounded, hence 1e-3."""
    for ts, tf, height in ((80.0, 30.0, 0.18), (45.0, 25.0, 0.5)):
        published = coefficient * _drive(ts, tf, height) ** -0.25
        assert stillair.channel_spacing(ts, tf, height, case) == pytest.approx(published, rel=1e-3)


@pytest.mark.parametrize("case", CHANNEL_CASES)
def test_optimum_spacing_maximises_heat_from_a_fixed_width(case):
    """Numerical check of the closed forms: h/S (heat per unit width of an array of thin plates
    at a fixed (top) wall temperature) is largest at channel_spacing(..., "array")."""
    ts, tf, height = 70.0, 20.0, 0.15
    best = stillair.channel_spacing(ts, tf, height, case)
    found = minimize_scalar(lambda log_s: -stillair.h_channel(ts, tf, math.exp(log_s), height, case)
                            / math.exp(log_s), bounds=(math.log(best / 4), math.log(best * 4)),
                            method="bounded", options={"xatol": 1e-9})
    assert math.exp(found.x) == pytest.approx(best, rel=1e-4)


@pytest.mark.parametrize("case", CHANNEL_CASES)
def test_plate_optimum_is_where_h_reaches_99_percent_of_the_isolated_plate(case):
    ts, tf, height = 70.0, 20.0, 0.15
    spacing = stillair.channel_spacing(ts, tf, height, case, "plate")
    result = stillair.channel_convection(ts, tf, spacing, height, case=case).scalar()
    props = stillair.gas_properties("air", 45.0)
    el = _drive(ts, tf, height) * spacing ** 4
    c2 = TABLE_9_3[case][1]
    # isolated plate at the same wall temperature: El^(1/4)/sqrt(C2), or for flux
    # Nu = (El Nu)^(1/5)/sqrt(C2) -> El^(1/4) C2^(-5/8)
    nu_isolated = el ** 0.25 * (c2 ** -0.625 if case in FLUX else c2 ** -0.5)
    assert result.h / (nu_isolated * props.conductivity / spacing) == pytest.approx(0.99, rel=1e-6)
    if case not in FLUX:  # Bar-Cohen & Rohsenow: S_max/S_opt = 1.71 (Incropera Table 9.3, from memory)
        assert spacing / stillair.channel_spacing(ts, tf, height, case) == pytest.approx(1.71, abs=0.01)


def test_channel_spacing_errors():
    with pytest.raises(InputError) as error:
        stillair.channel_spacing(60.0, 20.0, 0.1, optimum="widest")
    assert str(error.value) == 'channel_spacing: optimum must be one of "array", "plate", got \'widest\''
    with pytest.raises(InputError) as error:
        stillair.channel_spacing(20.0, 20.0, 0.1)
    assert str(error.value) == "channel_spacing: ts must be different from tf (no buoyancy, no optimum), got 20"


# ------------------------------------------------------------------------------------------
# A textbook worked example
# ------------------------------------------------------------------------------------------

def test_cengel_optimum_fin_spacing_of_a_heat_sink():
    """Cengel, Heat and Mass Transfer: A Practical Approach, 3rd ed. (2007), ch. 9, example
    "Optimum fin spacing of a heat sink" (from memory): a 12 cm wide, 18 cm high vertical
    surface at 80 degC in 30 degC air with 1 mm thick, 2.4 cm high fins along the 18 cm height.
    Air at 55 degC, beta = 1/328 K: Ra_L = 1.845e7, S_opt = 2.714 L/Ra_L^(1/4) = 7.45 mm,
    h = 1.307 k/S_opt = 4.86 W/(m²K), 14 fins, Q = h (2 n L H) dT = 29.4 W (fins only, efficiency 1).
    Differences expected: real-gas beta and our property data (about 1 %)."""
    assert stillair.channel_spacing(80.0, 30.0, 0.18) == pytest.approx(0.00745, rel=0.015)
    assert stillair.h_channel(80.0, 30.0, 0.00745, 0.18) == pytest.approx(4.86, rel=0.02)
    # Nu at the optimum: 1.307 (from the composite at El_opt; the example's value)
    assert stillair.nu_channel(stillair.optimum_elenbaas("isothermal", "array") * 20, 0.72, 20.0) == \
        pytest.approx(1.307, abs=0.003)
    # Our heat-sink model with the example's idealisations (very conductive fins, adiabatic tips, no
    # radiation) and 14 fins at the example's spacing: q_fins within 5 % (our fins include their
    # two narrow edges, the outer faces see free air rather than a channel).
    width = 14 * 0.001 + 13 * 0.00745
    result = stillair.heatsink(80.0, 30.0, width, 0.024, 0.18, 0.001, 14, 1e9, 0.0, tip="adiabatic").scalar()
    assert result.q_fins == pytest.approx(29.4, rel=0.05)


# ------------------------------------------------------------------------------------------
# Fin efficiency
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("h,k,t,height", [(5.0, 180.0, 0.0015, 0.03), (8.0, 20.0, 0.001, 0.05),
                                          (4.0, 400.0, 0.002, 0.1)])
def test_fin_efficiency_is_the_large_radius_limit_of_ht_annular_fin(h, k, t, height):
    """ht.fin_efficiency_Kern_Kraus (annular fin, adiabatic tip, m = sqrt(2h/(k t))): with the
    root radius very large the annular fin is a straight fin, tanh(mH)/(mH).  The annular
    efficiency departs from it like H/r, so the values at r = 5 m and 10 m are extrapolated to
    1/r = 0 (larger radii overflow ht's unscaled Bessel functions)."""
    ht = pytest.importorskip("ht")
    at = {root: ht.fin_efficiency_Kern_Kraus(2 * root, 2 * (root + height), t, k, h) for root in (5.0, 10.0)}
    annular = 2 * at[10.0] - at[5.0]
    eta, _ = _fin_efficiency(np.float64(h), k, t, 1e9, height, "adiabatic")  # length >> t: P = 2L
    assert float(eta) == pytest.approx(annular, rel=2e-5)


def test_corrected_tip_matches_the_fin_equation_with_a_convective_tip():
    """The fin equation theta'' = m^2 theta, theta(0) = theta_b, -k theta'(H) = h theta(H)
    (Incropera 6th ed. eq. 3.70 with case A tip) solved by scipy's solve_bvp; the corrected
    length Lc = H + t/2 reproduces its heat within 0.5 % for thin fins (ht/k << 1)."""
    h, k, t, height, length = 6.0, 180.0, 0.0015, 0.03, 0.1
    m2 = h * 2 * (length + t) / (k * length * t)
    sol = solve_bvp(lambda x, y: np.vstack([y[1], m2 * y[0]]),
                    lambda ya, yb: np.array([ya[0] - 1.0, k * yb[1] + h * yb[0]]),
                    np.linspace(0, height, 50), np.ones((2, 50)), tol=1e-10)
    q_exact = -k * length * t * sol.sol(0.0)[1]  # per kelvin of base excess
    q_exact += 0.0  # the fin's two end edges (2 t H) are inside P = 2 (L + t)
    eta, lc = _fin_efficiency(np.float64(h), k, t, length, height, "corrected")
    q_model = float(eta) * h * 2 * (length + t) * lc
    assert q_model == pytest.approx(q_exact, rel=5e-3)


# ------------------------------------------------------------------------------------------
# The heat-sink model
# ------------------------------------------------------------------------------------------

SINK = dict(base_width=0.1, fin_height=0.03, fin_length=0.1, fin_thickness=0.0015, fin_count=10,
            conductivity=200.0, emissivity=0.85)


def test_heat_sink_energy_balance_and_its_parts():
    result = stillair.heatsink(60.0, 25.0, **SINK).scalar()
    assert result.q == pytest.approx(result.q_fins + result.q_base + result.q_radiation, rel=1e-14)
    w, hf, length, t, n = (SINK[k] for k in ("base_width", "fin_height", "fin_length", "fin_thickness",
                                              "fin_count"))
    s = (w - n * t) / (n - 1)
    assert result.spacing == pytest.approx(s, rel=1e-14)
    excess = 35.0
    # base strips between the fins at the channel h
    assert result.q_base == pytest.approx((n - 1) * s * length * result.h_channel * excess, rel=1e-13)
    # fins: N - 2 inner fins on the channel h, 2 outer fins on the mean of channel and plate h
    assert result.h_outer == pytest.approx(stillair.h_vplate(60.0, 25.0, length), rel=1e-13)
    assert result.h_channel == pytest.approx(stillair.h_channel(60.0, 25.0, s, length), rel=1e-13)
    lc = hf + t / 2
    area = 2 * (length + t) * lc
    expected = ((n - 2) * result.fin_efficiency * result.h_channel
                + 2 * result.outer_fin_efficiency * (result.h_channel + result.h_outer) / 2) * area * excess
    assert result.q_fins == pytest.approx(expected, rel=1e-13)
    assert 0.9 < result.fin_efficiency < 1.0


def test_black_envelope_radiates_as_one_surface_and_zero_emissivity_not_at_all():
    w, hf, length, t, n = 0.1, 0.03, 0.1, 0.0015, 10
    s = (w - n * t) / (n - 1)
    tb, ta = 60.0 + zero_Celsius, 25.0 + zero_Celsius
    black = stillair.heatsink(60.0, 25.0, **dict(SINK, emissivity=1.0)).scalar()
    envelope = w * length + 2 * hf * length + 2 * (n - 1) * s * hf  # tip plane, outer faces, channel ends
    assert black.emissivity_effective == 1.0
    assert black.q_radiation == pytest.approx(SIGMA * envelope * (tb ** 4 - ta ** 4), rel=1e-13)
    assert stillair.heatsink(60.0, 25.0, **dict(SINK, emissivity=0.0)).q_radiation == 0.0
    # a grey channel's openings look blacker than its walls (cavity effect), never blacker than black
    grey = stillair.heatsink(60.0, 25.0, **dict(SINK, emissivity=0.3)).scalar()
    assert 0.3 < grey.emissivity_effective < 1.0


def test_heat_rises_with_base_temperature_and_tbase_inverts_q():
    t_base = np.linspace(30.0, 120.0, 10)
    q = stillair.heatsink_q(t_base, 25.0, **SINK)
    assert np.all(np.diff(q) > 0)
    q_target = 20.0
    tb = stillair.heatsink_tbase(q_target, 25.0, **SINK)
    assert stillair.heatsink_q(tb, 25.0, **SINK) == pytest.approx(q_target, rel=1e-9)
    assert stillair.heatsink_tbase(0.0, 25.0, **SINK) == 25.0
    both = stillair.heatsink_tbase(np.array([5.0, 20.0]), 25.0, **SINK)
    assert both[1] == pytest.approx(tb, rel=1e-12) and both[0] < both[1]


def test_fin_count_sweep_has_an_interior_optimum_near_the_channel_optimum():
    """Few fins: little area; many fins: choked channels.  The best count of the sweep lies
    inside it, at a gap within 35 % of the thin-plate optimum (fin thickness shifts it)."""
    counts = np.arange(2, 50)
    q = stillair.heatsink_q(70.0, 25.0, 0.1, 0.03, 0.1, 0.001, counts, 200.0, 0.0)
    best = int(np.argmax(q))
    assert 0 < best < len(counts) - 1
    s_best = (0.1 - counts[best] * 0.001) / (counts[best] - 1)
    assert s_best == pytest.approx(stillair.channel_spacing(70.0, 25.0, 0.1), rel=0.35)


def test_heat_sink_errors_are_exact():
    def message(**changes):
        with pytest.raises(InputError) as error:
            stillair.heatsink_q(60.0, 25.0, **dict(SINK, **changes))
        return str(error.value)

    assert message(fin_count=70) == ("heatsink_q: fin_count must be small enough that the fins fit on "
                                     "the base (fin_count × fin_thickness < base_width), got 70")
    assert message(fin_count=2.5) == "heatsink_q: fin_count must be a whole number >= 2, got 2.5"
    assert message(fin_count=1) == "heatsink_q: fin_count must be a whole number >= 2, got 1"
    assert message(emissivity=1.2) == "heatsink_q: emissivity must be in [0, 1], got 1.2"
    assert message(conductivity=0.0) == "heatsink_q: conductivity must be > 0 W/(m·K), got 0"
    with pytest.raises(InputError) as error:
        stillair.heatsink_tbase(-1.0, 25.0, **SINK)
    assert str(error.value) == "heatsink_tbase: q must be in [0, inf] W, got -1"
    with pytest.raises(InputError) as error:   # text in a cell names the argument, as heatsink_q does
        stillair.heatsink_tbase(10.0, 25.0, **dict(SINK, base_width="wide"))
    assert str(error.value) == "heatsink_tbase: base_width must be a number, not text, got 'wide'"
    with pytest.raises(InputError) as error:
        stillair.heatsink_tbase(1e6, 25.0, **SINK)
    # every temperature is checked against the gas data, the base temperature too (not only the
    # film), so the search for the base temperature meets air's 800 °C before 2000 K above ambient
    assert str(error.value) == ("heatsink_tbase: q must be small enough that the base temperature stays "
                                "inside the gas data (in [-150, 800] °C for air), got 1e+06")


def test_heat_sink_out_of_range_note_is_reported():
    # a 2 m tall sink: Ra_L of the channel beyond the laminar bound
    with pytest.warns(CorrelationRangeWarning, match="heatsink_q: outside validity range: bar-cohen-rohsenow"):
        stillair.heatsink_q(90.0, 20.0, 0.3, 0.05, 2.0, 0.002, 4, 200.0, 0.8)


def test_heatsink_tbase_outside_a_correlation_range_still_solves_and_warns():
    # 1 m long fins put the channel's Ra_L past Bar-Cohen & Rohsenow's laminar bound (1e9): the
    # base temperature is still solved, it inverts heatsink_q, and the note is reported.
    args = (35.0, 0.1, 0.035, 1.0, 0.0015, 12, 200.0, 0.85)
    with pytest.warns(stillair.CorrelationRangeWarning, match="Ra_L = .* above 1e\\+09"):
        t_base = stillair.heatsink_tbase(400.0, *args)
    with pytest.warns(stillair.CorrelationRangeWarning):
        assert stillair.heatsink_q(t_base, *args) == pytest.approx(400.0, rel=1e-9)
