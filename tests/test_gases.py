"""Gas properties: against handbook and standard tables, reference libraries and physical laws.

Sources named beside every check.  Table values recalled from memory say so.
"""

import dataclasses
import inspect

import CoolProp
import numpy as np
import pytest
from CoolProp.CoolProp import PT_INPUTS
from scipy.constants import R

from stillair import gases
from stillair.gases import GAS_NAMES, GASES, GAS_PROPERTY_TABLE, gas_properties, parse_gas
from stillair.validity import InputError

ATM = 101325.0


def kelvin(t):
    return t + 273.15


# --------------------------------------------------------------------------------------------
# Air against a handbook table
# --------------------------------------------------------------------------------------------

# Incropera, DeWitt, Bergman, Lavine, Fundamentals of Heat and Mass Transfer, 6th ed., Table A.4
# "Thermophysical properties of gases at atmospheric pressure", air.  From memory:
# T [K]: rho [kg/m3], cp [J/(kg K)], mu [Pa s], k [W/(m K)], Pr
INCROPERA_A4_AIR = {
    250: (1.3947, 1006.0, 159.6e-7, 22.3e-3, 0.720),
    300: (1.1614, 1007.0, 184.6e-7, 26.3e-3, 0.707),
    350: (0.9950, 1009.0, 208.2e-7, 30.0e-3, 0.700),
    400: (0.8711, 1014.0, 230.1e-7, 33.8e-3, 0.690),
    450: (0.7740, 1021.0, 250.7e-7, 37.3e-3, 0.686),
}


@pytest.mark.parametrize("t_kelvin", sorted(INCROPERA_A4_AIR))
def test_air_against_incropera_table_a4(t_kelvin):
    rho, cp, mu, k, pr = INCROPERA_A4_AIR[t_kelvin]
    state = gas_properties("air", t_kelvin - 273.15, ATM)
    # Density: Table A.4's air densities sit 1.2-1.4 % below p M/(R T) at every temperature
    # (1.1614 vs 1.1766 kg/m3 at 300 K), an offset of that table, not of the gas; 1.6 %.
    assert state.density == pytest.approx(rho, rel=0.016)
    # cp: air's cp is known to 0.1 %; the table prints 4 digits.  0.3 %.
    assert state.cp == pytest.approx(cp, rel=0.003)
    # Viscosity: tables and the Lemmon-Jacobsen (2004) correlation agree within ~0.5 %.  0.6 %.
    assert state.viscosity == pytest.approx(mu, rel=0.006)
    # Conductivity: handbook tables disagree by a few per cent (Table A.4 predates the 2004
    # reference correlation; 3 digits printed).  2 %.
    assert state.conductivity == pytest.approx(k, rel=0.02)
    # Pr combines the above (and inherits the k differences).  2 %.
    assert state.prandtl == pytest.approx(pr, rel=0.02)


# --------------------------------------------------------------------------------------------
# Fill gases against EN 673 and ISO 15099
# --------------------------------------------------------------------------------------------

# EN 673 (Glass in building - Determination of thermal transmittance, U value - Calculation
# method), table of gas properties, mean gas temperature 10 degC.  From memory:
# rho [kg/m3], mu [kg/(m s)], k [W/(m K)], c [J/(kg K)].  The densities match p M/(R T) at
# 1 bar rather than 1 atm (krypton: 3.56 = 1e5 * 0.083798 / (8.3145 * 283.15)), so they are
# compared at 1e5 Pa.
EN673_10C = {
    "air": (1.232, 1.761e-5, 2.496e-2, 1.008e3),
    "argon": (1.699, 2.164e-5, 1.684e-2, 0.519e3),
    "sf6": (6.36, 1.459e-5, 1.275e-2, 0.614e3),
    "krypton": (3.56, 2.388e-5, 0.900e-2, 0.245e3),
}
# Xenon (from memory, the least certain row; its density is not recalled reliably and is not
# checked): mu, k, c.
EN673_10C_XENON = (2.260e-5, 0.529e-2, 0.161e3)


@pytest.mark.parametrize("gas", ["air", "argon", "krypton"])
def test_fill_gases_against_en673(gas):
    rho, mu, k, cp = EN673_10C[gas]
    state = gas_properties(gas, 10.0, 1.0e5)
    # Density at 1 bar: the table's 4 digits against the reference EOS.  0.4 %.
    assert state.density == pytest.approx(rho, rel=0.004)
    # Viscosity: air and argon within 0.7 %; krypton is ISO 15099's linear fit, 1.5 % from
    # EN 673's value.  2 %.
    assert state.viscosity == pytest.approx(mu, rel=0.02)
    # Conductivity: EN 673 vs reference correlations / ISO fits, within 1 %.  1.2 %.
    assert state.conductivity == pytest.approx(k, rel=0.012)
    # cp: EN 673's krypton value 245 is 1.2 % below the ideal monatomic 5R/(2M) = 248.05, the
    # real gas adds 0.5 %.  2 %.
    assert state.cp == pytest.approx(cp, rel=0.02)


def test_sf6_against_en673():
    rho, mu, k, cp = EN673_10C["sf6"]
    state = gas_properties("sf6", 10.0, 1.0e5)
    # SF6 is far from ideal (Z = 0.988 at 1 bar): EN 673's density is 1.1 % above the Guder-Wagner
    # (2009) EOS.  1.5 %.
    assert state.density == pytest.approx(rho, rel=0.015)
    # Viscosity: Quinones-Cisneros et al. (2012) within 0.4 % of EN 673.  1 %.
    assert state.viscosity == pytest.approx(mu, rel=0.01)
    # Conductivity: EN 673's value predates Assael et al. (2012), the reference correlation
    # CoolProp uses, which is 7 % lower at 10 degC.  Checked to 8 % so that a gross error still
    # fails; the reference correlation is trusted over the older table.
    assert state.conductivity == pytest.approx(k, rel=0.08)
    # cp: the EOS (real gas, and its ideal-gas part from spectroscopic data) is 5 % above the
    # table.  6 %.
    assert state.cp == pytest.approx(cp, rel=0.06)


def test_xenon_against_en673():
    mu, k, cp = EN673_10C_XENON
    state = gas_properties("xenon", 10.0, 1.0e5)
    assert state.viscosity == pytest.approx(mu, rel=0.03)    # ISO fit is 2.4 % below
    assert state.conductivity == pytest.approx(k, rel=0.012)  # ISO fit is 0.8 % above
    assert state.cp == pytest.approx(cp, rel=0.01)            # 0.4 % apart


# ISO 15099:2003 Annex B, Table B.1, linear fits value = a + b T (T in K).  From memory:
# gas: (conductivity a, b), (viscosity a, b), (cp a, b)
ISO15099_B1 = {
    "air": ((2.873e-3, 7.760e-5), (3.723e-6, 4.940e-8), (1002.7370, 1.2324e-2)),
    "argon": ((2.285e-3, 5.149e-5), (3.379e-6, 6.451e-8), (521.9285, 0.0)),
    "krypton": ((9.443e-4, 2.826e-5), (2.213e-6, 7.777e-8), (248.0907, 0.0)),
    "xenon": ((4.538e-4, 1.723e-5), (1.069e-6, 7.414e-8), (158.3397, 0.0)),
}


def iso_fit(coefficients, t):
    a, b = coefficients
    return a + b * kelvin(np.asarray(t, dtype=float))


@pytest.mark.parametrize("gas", ["air", "argon"])
def test_air_and_argon_against_iso15099_fits(gas):
    conductivity, viscosity, cp = ISO15099_B1[gas]
    t = np.array([-20.0, 0.0, 10.0, 20.0, 40.0])   # the range of glazing cavities
    state = gas_properties(gas, t)
    # Conductivity: the linear fits are 1.3 % (air) / 0.8 % (argon) from the reference
    # correlations at -20 degC.  1.5 %.
    np.testing.assert_allclose(state.conductivity, iso_fit(conductivity, t), rtol=0.015)
    # Viscosity: within 0.2 % over -20..40 degC.  0.3 %.
    np.testing.assert_allclose(state.viscosity, iso_fit(viscosity, t), rtol=0.003)
    # cp: within 0.1 %.  0.15 %.
    np.testing.assert_allclose(state.cp, iso_fit(cp, t), rtol=0.0015)


@pytest.mark.parametrize("gas", ["krypton", "xenon"])
def test_krypton_and_xenon_transport_are_the_iso15099_fits(gas):
    conductivity, viscosity, _ = ISO15099_B1[gas]
    t = np.array([-50.0, 0.0, 10.0, 80.0, 150.0])
    state = gas_properties(gas, t)
    # The engine uses these fits (CoolProp 8 has no Kr/Xe transport model): a transcription check.
    np.testing.assert_allclose(state.conductivity, iso_fit(conductivity, t), rtol=1e-9)
    np.testing.assert_allclose(state.viscosity, iso_fit(viscosity, t), rtol=1e-9)


@pytest.mark.parametrize("gas", ["argon", "krypton", "xenon"])
def test_noble_gas_cp_tends_to_monatomic_value_and_iso_constant(gas):
    molar_mass = gas_properties(gas, 10.0).molar_mass
    monatomic = 2.5 * R / molar_mass   # kinetic theory, ideal monatomic gas
    iso_cp = ISO15099_B1[gas][2][0]
    # ISO 15099's constant cp is the monatomic value: 0.02 % for Kr and Xe, 0.3 % for Ar.
    assert iso_cp == pytest.approx(monatomic, rel=3.5e-3)
    # At 1 kPa the EOS is ideal: cp -> 5R/(2M) within 0.02 %.
    assert gas_properties(gas, 10.0, 1.0e3).cp == pytest.approx(monatomic, rel=2e-4)
    # At 1 atm the real-gas departure is 0.2 % (Ar), 0.5 % (Kr), 1.3 % (Xe) above it.
    assert gas_properties(gas, 10.0).cp == pytest.approx(iso_cp, rel=0.015)
    assert gas_properties(gas, 10.0).cp > gas_properties(gas, 10.0, 1.0e3).cp


# --------------------------------------------------------------------------------------------
# The tables against direct CoolProp evaluation
# --------------------------------------------------------------------------------------------

def random_states(gas, count, seed):
    rng = np.random.default_rng(seed)
    low, high = GASES[gas].t_range.low, GASES[gas].t_range.high
    t = rng.uniform(low, high, count)
    p = np.exp(rng.uniform(np.log(1e3), np.log(2e5), count))
    # include the corners and the default pressure
    t[:4] = [low, low, high, high]
    p[:4] = [1e3, 2e5, 1e3, 2e5]
    p[4:40] = ATM
    return t, p


@pytest.mark.parametrize("gas", GAS_NAMES)
def test_interpolation_matches_direct_coolprop(gas):
    """Every tabulated property within 1e-6 relative of a direct CoolProp AbstractState call."""
    data = GASES[gas]
    state = CoolProp.AbstractState("HEOS", data.coolprop_fluid)
    t, p = random_states(gas, 400, seed=len(gas))
    got = gas_properties(gas, t, p)
    reference = np.empty((len(t), 5))
    for i, (ti, pi) in enumerate(zip(t, p)):
        state.update(PT_INPUTS, pi, kelvin(ti))
        mu = data.viscosity_fit(kelvin(ti)) if data.viscosity_fit else state.viscosity()
        k = data.conductivity_fit(kelvin(ti)) if data.conductivity_fit else state.conductivity()
        reference[i] = (state.rhomass(), mu, k, state.cpmass(),
                        state.isobaric_expansion_coefficient())
    values = np.stack([got.density, got.viscosity, got.conductivity, got.cp, got.expansion], -1)
    assert np.max(np.abs(values / reference - 1.0)) < 1e-6


def test_interpolation_across_sf6_conductivity_kink():
    # CoolProp's SF6 conductivity has a slope discontinuity near 1.5 Tc = 478.1 K (its critical
    # enhancement ends there); the spline cannot follow a kink, so check it densely at 200 kPa.
    state = CoolProp.AbstractState("HEOS", "SulfurHexafluoride")
    t = np.linspace(kelvin(200.0), kelvin(210.0), 401) - 273.15
    reference = []
    for ti in t:
        state.update(PT_INPUTS, 2.0e5, kelvin(ti))
        reference.append(state.conductivity())
    got = gases.gas_conductivity("sf6", t, 2.0e5)
    assert np.max(np.abs(got / np.array(reference) - 1.0)) < 1e-6


def test_mixture_table_matches_mixing_rule_applied_directly():
    mixture = gases._parse_text("argon:0.7, krypton:0.2, air:0.1")
    t, p = random_states("krypton", 200, seed=7)
    parts = [gas_properties(name, t, p) for name, _ in mixture.components]
    primaries = [np.stack([s.density / p, s.viscosity, s.conductivity, s.cp, s.expansion], -1)
                 for s in parts]
    direct = gases._mix(mixture, primaries, p)
    got = gas_properties("argon:0.7, krypton:0.2, air:0.1", t, p)
    values = np.stack([got.density / p, got.viscosity, got.conductivity, got.cp, got.expansion], -1)
    assert np.max(np.abs(values / direct - 1.0)) < 1e-6


def test_scalar_path_equals_array_path_and_varying_pressure_path():
    t = np.array([-20.0, 5.0, 63.2, 150.0])
    p = np.array([3.0e4, 8.0e4, ATM, 1.9e5])
    varying = gases.gas_viscosity("argon", t, p)             # Chebyshev series per point
    single = [gases.gas_viscosity("argon", float(a), float(b)) for a, b in zip(t, p)]
    np.testing.assert_allclose(varying, single, rtol=1e-12)
    one_pressure = gases.gas_density("argon", t, ATM)      # the series summed once for 1 atm
    nearly_one = np.array([ATM, ATM, ATM, ATM * (1 + 1e-9)])  # not all equal: per-point series
    np.testing.assert_allclose(gases.gas_density("argon", t, nearly_one), one_pressure, rtol=2e-9)


# --------------------------------------------------------------------------------------------
# Physics
# --------------------------------------------------------------------------------------------

@pytest.mark.parametrize("gas", GAS_NAMES)
def test_ideal_gas_limit(gas):
    t = np.array([GASES[gas].t_range.low + 5.0, 20.0, GASES[gas].t_range.high])
    state = gas_properties(gas, t, 1.0e3)
    ideal = 1.0e3 * state.molar_mass / (R * kelvin(t))
    # At 1 kPa every gas is ideal to better than 0.03 % (second virial term B p/(R T)) ...
    np.testing.assert_allclose(state.density, ideal, rtol=3e-4)
    # ... and beta = 1/T - d ln Z/dT carries about twice that departure near the low limit.
    np.testing.assert_allclose(state.expansion, 1.0 / kelvin(t), rtol=1e-3)


@pytest.mark.parametrize("gas", ["air", "nitrogen", "argon"])
def test_ideal_gas_law_at_one_atmosphere(gas):
    # Air, nitrogen and argon at 1 atm and room temperature: Z - 1 below 0.1 % (common practice).
    state = gas_properties(gas, 20.0)
    assert state.density == pytest.approx(ATM * state.molar_mass / (R * kelvin(20.0)), rel=1e-3)


def test_air_expansion_is_about_one_over_t():
    t = np.array([-20.0, 20.0, 100.0, 200.0])
    # Real air at 1 atm: beta exceeds 1/T by 0.3 % at 20 degC, less when hotter.
    np.testing.assert_allclose(gases.air_expansion(t), 1.0 / kelvin(t), rtol=5e-3)
    assert np.all(gases.air_expansion(t) > 1.0 / kelvin(t))   # attractive forces dominate
    np.testing.assert_allclose(gases.air_expansion(t, ideal=True), 1.0 / kelvin(t), rtol=1e-15)
    assert gases.gas_expansion("xenon", 20.0, ideal=True) == pytest.approx(1 / 293.15, rel=1e-15)


@pytest.mark.parametrize("gas", list(GAS_NAMES) + ["argon:0.9, air:0.1", "krypton:0.5, xenon:0.5"])
def test_derived_properties_are_consistent(gas):
    t = np.linspace(max(GASES[n].t_range.low for n, _ in parse_gas(gas)), 150.0, 7)
    s = gas_properties(gas, t, 9.0e4)
    np.testing.assert_allclose(s.kinvisc, s.viscosity / s.density, rtol=1e-14)
    np.testing.assert_allclose(s.diffusivity, s.conductivity / (s.density * s.cp), rtol=1e-14)
    np.testing.assert_allclose(s.prandtl, s.viscosity * s.cp / s.conductivity, rtol=1e-14)
    for info in GAS_PROPERTY_TABLE:   # the single-property functions return the same numbers
        np.testing.assert_array_equal(getattr(gases, f"gas_{info.name}")(gas, t, 9.0e4),
                                      getattr(s, info.name))


def test_air_functions_equal_gas_functions_with_air():
    t = np.array([-10.0, 25.0, 300.0])
    for info in GAS_PROPERTY_TABLE:
        np.testing.assert_array_equal(getattr(gases, f"air_{info.name}")(t, 8.0e4),
                                      getattr(gases, f"gas_{info.name}")("air", t, 8.0e4))


def test_density_scales_with_pressure():
    t = 20.0
    for gas in GAS_NAMES:
        ratio = gases.gas_density(gas, t, 2.0e5) / gases.gas_density(gas, t, 1.0e5)
        # rho = p M / (Z R T): doubling p doubles rho but for Z, which falls with p (gases here
        # are below their Boyle temperature or close to it): ratio in [2, 2.03].
        assert 2.0 * (1 - 2e-4) <= ratio <= 2.03, gas
    # Transport properties of dilute gases barely depend on pressure (kinetic theory).
    assert gases.air_viscosity(20.0, 2.0e4) == pytest.approx(gases.air_viscosity(20.0), rel=2e-3)


def test_mixture_of_one_gas_is_that_gas():
    pure = gas_properties("argon", 15.0)
    for text in ("argon:1", "Argon : 1.0", "argon:1, air:0", "argon:0.9999999, air:0.0000001"):
        mixed = gas_properties(text, 15.0)
        for field in ("density", "viscosity", "conductivity", "cp", "expansion", "prandtl"):
            expected = getattr(pure, field)
            assert getattr(mixed, field) == pytest.approx(expected, rel=1e-6), (text, field)


def test_mixtures_lie_between_their_components():
    t = np.array([-20.0, 10.0, 60.0])
    for a, b in (("argon", "air"), ("krypton", "argon"), ("xenon", "krypton")):
        sa, sb = gas_properties(a, t), gas_properties(b, t)
        for x in (0.1, 0.5, 0.9):
            s = gas_properties(f"{a}:{x}, {b}:{1 - x}", t)
            for field in ("density", "viscosity", "conductivity", "cp"):
                low = np.minimum(getattr(sa, field), getattr(sb, field))
                high = np.maximum(getattr(sa, field), getattr(sb, field))
                value = getattr(s, field)
                assert np.all((low <= value) & (value <= high)), (a, b, x, field)
        # and move monotonically with the fraction
        k = [gases.gas_conductivity(f"{a}:{x}, {b}:{1 - x}", 10.0) for x in (0.2, 0.4, 0.6, 0.8)]
        assert np.all(np.diff(k) > 0) or np.all(np.diff(k) < 0)


def test_mixture_is_independent_of_the_order_written():
    one = gas_properties("argon:0.6, krypton:0.3, air:0.1", 10.0)
    two = gas_properties("air:0.1, argon:0.6, krypton:0.3", 10.0)
    for field in ("density", "viscosity", "conductivity", "cp", "expansion"):
        assert getattr(one, field) == pytest.approx(getattr(two, field), rel=1e-12)


def test_mixture_density_and_cp_follow_the_iso15099_ideal_gas_rules():
    # ISO 15099 Annex B: rho = p M_mix/(R T), cp = sum x_i M_i cp_i / M_mix.  With additive
    # volumes our density differs from it only by the real-gas departure (< 0.1 % for Ar/air).
    s = gas_properties("argon:0.9, air:0.1", 10.0)
    m_argon = gas_properties("argon", 10.0).molar_mass
    m_air = gas_properties("air", 10.0).molar_mass
    m_mix = 0.9 * m_argon + 0.1 * m_air
    assert s.molar_mass == pytest.approx(m_mix, rel=1e-12)
    assert s.density == pytest.approx(ATM * m_mix / (R * kelvin(10.0)), rel=1e-3)
    cp = (0.9 * m_argon * gases.gas_cp("argon", 10.0)
          + 0.1 * m_air * gases.gas_cp("air", 10.0)) / m_mix
    assert s.cp == pytest.approx(cp, rel=1e-7)


def test_wilke_viscosity_rule_against_textbook_example():
    # Bird, Stewart, Lightfoot, Transport Phenomena, 2nd ed., Example 1.4-2 (from memory):
    # CO2 / O2 / N2 at 293 K, 1 atm, x = 0.133 / 0.039 / 0.828, mu = 1462 / 2031 / 1754
    # (1e-7 g/(cm s)), M = 44.01 / 32.00 / 28.02; Phi_ij table and mu_mix = 1714e-7 g/(cm s).
    # ISO 15099's viscosity phi is the same Wilke expression.
    x = [0.133, 0.039, 0.828]
    molar = [44.01, 32.00, 28.02]
    mu = [1462e-7, 2031e-7, 1754e-7]
    phi = [[gases._wilke_phi(mu[i] / mu[j], molar[i], molar[j], -0.25) for j in range(3)]
           for i in range(3)]
    bsl_phi = [[1.0, 0.730, 0.727], [1.394, 1.0, 1.006], [1.370, 0.993, 1.0]]
    np.testing.assert_allclose(phi, bsl_phi, atol=1.5e-3)   # printed to 3 decimals
    assert gases._wilke_mix(x, mu, phi) == pytest.approx(1714e-7, rel=3e-4)  # 4 digits


@pytest.mark.parametrize("fluids, names", [
    ("Argon&Nitrogen", ("argon", "nitrogen")),
    ("CarbonDioxide&Nitrogen", ("co2", "nitrogen")),
    ("Argon&CarbonDioxide", ("argon", "co2")),
])
def test_mixing_rules_against_coolprop_mixture_model(fluids, names):
    # CoolProp 8 HEOS mixture model (GERG-type departure functions; its own mixture transport
    # model), an independent estimate.  Tolerances: the two mixture transport estimates differ
    # by up to 1.5 % (viscosity) and 2.5 % (conductivity, CO2-N2); densities by < 0.1 %.
    state = CoolProp.AbstractState("HEOS", fluids)
    for x in (0.1, 0.5, 0.9):
        state.set_mole_fractions([x, 1 - x])
        state.update(PT_INPUTS, ATM, 293.15)
        s = gas_properties(f"{names[0]}:{x}, {names[1]}:{1 - x}", 20.0)
        assert s.viscosity == pytest.approx(state.viscosity(), rel=0.02)
        assert s.conductivity == pytest.approx(state.conductivity(), rel=0.03)
        assert s.density == pytest.approx(state.rhomass(), rel=1e-3)
        assert s.cp == pytest.approx(state.cpmass(), rel=2e-3)


# --------------------------------------------------------------------------------------------
# Interface: names, parsing, shapes, signatures
# --------------------------------------------------------------------------------------------

def test_gas_names():
    assert GAS_NAMES == ("air", "argon", "krypton", "xenon", "sf6", "co2", "nitrogen")


def test_parse_gas_normalises():
    assert parse_gas("Argon") == (("argon", 1.0),)
    assert parse_gas("  SF6 ") == (("sf6", 1.0),)
    assert parse_gas(" argon : 0.9 , AIR:0.1") == (("argon", 0.9), ("air", 0.1))
    assert parse_gas("argon:1, air:0") == (("argon", 1.0),)
    fractions = [f for _, f in parse_gas("argon:0.7, krypton:0.2, air:0.1000005")]
    assert sum(fractions) == pytest.approx(1.0, abs=1e-15)


def test_scalars_give_floats_and_arrays_broadcast():
    assert type(gases.air_density(20.0)) is float
    assert type(gases.air_density(20)) is float
    assert type(gases.air_density(np.float64(20.0))) is float
    assert type(gases.air_density(np.array(20.0))) is float
    assert type(gases.gas_expansion("argon", 20.0, ideal=True)) is float
    rho = gases.gas_density("air", np.array([[0.0], [20.0]]), np.array([1e4, 1e5, 2e5]))
    assert rho.shape == (2, 3)
    assert rho[1, 2] == pytest.approx(gases.gas_density("air", 20.0, 2e5), rel=1e-12)
    state = gas_properties("air", [0.0, 10.0])
    assert state.t.shape == state.pressure.shape == state.density.shape == (2,)
    assert isinstance(gas_properties("air", [0.0, 10.0]).prandtl, np.ndarray)


def test_gas_properties_is_frozen_with_the_documented_fields():
    state = gas_properties("air", 20.0)
    assert [f.name for f in dataclasses.fields(state)] == [
        "gas", "t", "pressure", "density", "viscosity", "kinvisc", "conductivity", "cp",
        "diffusivity", "prandtl", "expansion", "molar_mass"]
    with pytest.raises(dataclasses.FrozenInstanceError):
        state.density = 1.0
    assert state.t == 20.0 and state.pressure == ATM and state.gas == "air"
    assert state.molar_mass == pytest.approx(0.0289647, rel=1e-4)   # CoolProp Air, kg/mol


def test_a_state_filled_without_its_init_is_the_record_its_init_makes():
    """The scalar path fills GasProperties through its __dict__ (the frozen __init__'s twelve
    setattr calls cost more than the look-up): exactly the dataclass's fields, equal to the
    record its own __init__ makes from them, and still frozen."""
    state = gas_properties("argon:0.9, air:0.1", 12.5, 90000.0)
    names = [f.name for f in dataclasses.fields(state)]
    assert list(vars(state)) == names
    assert state == type(state)(**{name: getattr(state, name) for name in names})
    with pytest.raises(dataclasses.FrozenInstanceError):
        state.t = 0.0


def test_signatures_show_the_real_arguments():
    for info in GAS_PROPERTY_TABLE:
        gas_fn = getattr(gases, f"gas_{info.name}")
        air_fn = getattr(gases, f"air_{info.name}")
        expected_gas = ["gas", "t", "pressure"] + (["ideal"] if info.name == "expansion" else [])
        assert list(inspect.signature(gas_fn).parameters) == expected_gas
        assert list(inspect.signature(air_fn).parameters) == expected_gas[1:]
        assert inspect.signature(gas_fn).parameters["pressure"].default == ATM
        assert gas_fn.__name__ == f"gas_{info.name}" and info.unit in gas_fn.__doc__
        assert f"gas_{info.name}" in gases.__all__ and f"air_{info.name}" in gases.__all__


# --------------------------------------------------------------------------------------------
# Errors: exact messages
# --------------------------------------------------------------------------------------------

GAS_ALLOWED = ('one of air, argon, krypton, xenon, sf6, co2, nitrogen or a mixture of them '
               'such as "argon:0.9, air:0.1"')
SYNTAX = ('a gas name or a mixture written "name:fraction, name:fraction" '
          '(e.g. "argon:0.9, air:0.1")')


@pytest.mark.parametrize("call, message", [
    (lambda: gases.gas_density("helium", 20.0),
     f"gas_density: gas must be {GAS_ALLOWED}, got 'helium'"),
    (lambda: gases.gas_conductivity("argon:0.9, helium:0.1", 20.0),
     f"gas_conductivity: gas must be {GAS_ALLOWED}, got 'helium'"),
    (lambda: gases.gas_density(5, 20.0),
     f"gas_density: gas must be {GAS_ALLOWED}, got 5"),
    (lambda: gases.gas_cp("argon=0.9, air=0.1", 20.0),
     f"gas_cp: gas must be {SYNTAX}, got 'argon=0.9, air=0.1'"),
    (lambda: gases.gas_cp("argon:0.9, air:lots", 20.0),
     f"gas_cp: gas must be {SYNTAX}, got 'argon:0.9, air:lots'"),
    (lambda: gases.gas_cp("argon:0.9,", 20.0),
     f"gas_cp: gas must be {SYNTAX}, got 'argon:0.9,'"),
    (lambda: gases.gas_viscosity("argon:0.8, air:0.1", 20.0),
     "gas_viscosity: gas must be a mixture with mole fractions summing to 1 within 1e-06 "
     "(these sum to 0.9), got 'argon:0.8, air:0.1'"),
    (lambda: gases.gas_viscosity("argon:1.1, air:-0.1", 20.0),
     "gas_viscosity: gas must be a mixture with mole fractions in [0, 1], "
     "got 'argon:1.1, air:-0.1'"),
    (lambda: gases.gas_viscosity("argon:0.5, Argon:0.5", 20.0),
     "gas_viscosity: gas must be a mixture naming each gas once, got 'argon:0.5, Argon:0.5'"),
    (lambda: parse_gas("neon"), f"parse_gas: gas must be {GAS_ALLOWED}, got 'neon'"),
    (lambda: gases.gas_density("air", -300.0),
     "gas_density: t must be above absolute zero (-273.15 °C), got -300"),
    (lambda: gases.air_density([20.0, -274.0]),
     "air_density: t must be above absolute zero (-273.15 °C), got -274"),
    (lambda: gases.gas_conductivity("krypton", 900),
     "gas_conductivity: t must be in [-100, 200] °C for krypton, got 900"),
    (lambda: gases.gas_conductivity("sf6", -48.0),
     "gas_conductivity: t must be in [-45, 350] °C for sf6, got -48"),
    (lambda: gases.gas_prandtl("argon:0.9, xenon:0.1", 500.0),
     "gas_prandtl: t must be in [-80, 200] °C for argon:0.9, xenon:0.1, got 500"),
    (lambda: gases.air_density(float("nan")), "air_density: t must be a finite number, got nan"),
    (lambda: gases.air_density("warm"), "air_density: t must be a number, not text, got 'warm'"),
    (lambda: gases.air_density(None), "air_density: t must be a number, got None"),
    (lambda: gases.gas_density("air", 20.0, -5.0), "gas_density: pressure must be > 0 Pa, got -5"),
    (lambda: gases.gas_density("air", 20.0, 1.0e6),
     "gas_density: pressure must be in [1000, 200000] Pa, got 1e+06"),
    (lambda: gas_properties("air", 20.0, "high"),
     "gas_properties: pressure must be a number, not text, got 'high'"),
    (lambda: gas_properties("xenon", 250.0, function_name="h_cavity"),
     "h_cavity: t must be in [-80, 200] °C for xenon, got 250"),
])
def test_error_messages(call, message):
    with pytest.raises(InputError) as error:
        call()
    assert str(error.value) == message
