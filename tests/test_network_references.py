"""stillair.solve_network against outside references, each rebuilt as a network.

1. ISO 6946 (2007 Table 2 / 2017 Table 8): thermal resistance of unventilated air layers with
   high-emissivity faces, heat flow up, horizontal and down, 5-300 mm.
2. EN 673: centre-of-glass U-values of double glazing, the standard's own calculation method
   (its Nu = A (Gr Pr)^n, its boundary conditions), recomputed here independently.
3. Klein's empirical equation for the top-loss coefficient of flat-plate solar collectors
   (Duffie & Beckman, Solar Engineering of Thermal Processes, eq. 6.4.9).

Every number recalled from memory says so beside it.  The worst deviations measured when these
tests were written are quoted in each test's docstring.
"""

from __future__ import annotations

import itertools

import pytest
from scipy.optimize import fsolve

from stillair.network import solve_network
from stillair.radiation import SIGMA

# ----------------------------------------------------------------------------------------------
# 1. ISO 6946 unventilated air layers

# ISO 6946:2007 Table 2 (= ISO 6946:2017 Table 8), R in m²·K/W, surfaces of emissivity >= 0.8
# (from memory: the table's values; the 0 mm column, R = 0, is no layer and is left out).
ISO6946_THICKNESS_MM = (5, 7, 10, 15, 25, 50, 100, 300)
ISO6946_TABLE = {
    "up": (0.11, 0.13, 0.15, 0.16, 0.16, 0.16, 0.16, 0.16),
    "horizontal": (0.11, 0.13, 0.15, 0.17, 0.18, 0.18, 0.18, 0.18),
    "down": (0.11, 0.13, 0.15, 0.17, 0.19, 0.21, 0.22, 0.23),
}
# The standard's conditions (from memory, ISO 6946 Annex B (2007) / D (2017)): mean temperature
# 10 °C, temperature difference across the layer 5 K (its h_a formulas hold "for dT <= 5 K"),
# h_r = E 4 sigma Tm^3 with E = 1/(1/eps1 + 1/eps2 - 1); table computed with eps = 0.9 both faces.
ISO6946_MEAN, ISO6946_DELTA_T, ISO6946_EPS = 10.0, 5.0, 0.9
CAVITY_TILT = {"up": 0.0, "horizontal": 90.0, "down": 180.0}


def iso6946_annex_h_a(d, direction):
    """ISO 6946 Annex B/D convective coefficient of an air layer, W/(m²·K) (from memory):
    up max(1.95, 0.025/d); horizontal max(1.25, 0.025/d); down max(0.12 d^-0.44, 0.025/d)."""
    floor = {"up": 1.95, "horizontal": 1.25, "down": 0.12 * d ** -0.44}[direction]
    return max(floor, 0.025 / d)


def layer_resistance(convection_row):
    """R (m²·K/W) of a 1 m² layer: a convection row plus grey radiation between its faces."""
    branches = [convection_row, ["radiation", "a", "b", "radiation", ISO6946_EPS, ISO6946_EPS, 1.0]]
    warm, cold = ISO6946_MEAN + ISO6946_DELTA_T / 2, ISO6946_MEAN - ISO6946_DELTA_T / 2
    result = solve_network(branches, [["a", "T", warm], ["b", "T", cold]])
    return ISO6946_DELTA_T / sum(result.heat.values()), result


CELLS = [(direction, mm, r) for direction, values in ISO6946_TABLE.items()
         for mm, r in zip(ISO6946_THICKNESS_MM, values)]


@pytest.mark.parametrize("direction, mm, r_table", CELLS)
def test_iso6946_annex_formulas_as_a_network_give_the_table(direction, mm, r_table):
    """The network with the standard's own h_a (a film branch) and exact radiation reproduces
    every cell to the table's rounding (0.005) plus 0.001 for T^4 at dT = 5 K versus 4 sigma Tm^3
    (worst measured: 0.0036)."""
    d = mm / 1000
    r, _ = layer_resistance(["air", "a", "b", "film", iso6946_annex_h_a(d, direction), 1.0])
    assert abs(r - r_table) <= 0.006


# Tolerances of the correlation-based rebuild, per direction of heat flow, m²·K/W:
# - horizontal and down: the table's rounding (0.005) plus 0.003 for the difference between the
#   published Nu correlations (ElSherbiny/Catton vertical, conduction downward) and the Annex's
#   envelope formulas, whose h_a differs from theirs by less than 0.1 W/(m²·K) there.
# - up: the Annex takes h_a = 1.95 W/(m²·K) for every layer thicker than 12.8 mm, while Hollands
#   (1975) and Globe-Dropkin give h_a from 1.4 to 2.4 W/(m²·K) at dT = 5 K over 15-300 mm;
#   with h_r = 4.2 W/(m²·K) in parallel that spread is +-0.017 m²·K/W in R, so 0.005 + 0.017.
CORRELATION_TOLERANCE = {"horizontal": 0.008, "down": 0.008, "up": 0.022}


@pytest.mark.parametrize("direction, mm, r_table", CELLS)
def test_iso6946_table_rebuilt_with_cavity_correlations(direction, mm, r_table):
    """Cavity (method auto, a 1 m high layer) + radiation at 10 °C mean and 5 K difference.

    Worst deviation measured: up 300 mm, +0.017 m²·K/W (globe-dropkin); horizontal 0.002;
    down 0.004."""
    d = mm / 1000
    r, result = layer_resistance(["air", "a", "b", "cavity", d, 1.0, 1.0, CAVITY_TILT[direction], None])
    assert abs(r - r_table) <= CORRELATION_TOLERANCE[direction], (r, result.branches["air"].method)
    assert result.notes == ()
    if direction == "down":
        assert result.branches["air"].Nu == pytest.approx(1.0)   # heated from above: conduction


def test_iso6946_downward_resistance_grows_with_thickness_and_exceeds_upward():
    resistances = [layer_resistance(["air", "a", "b", "cavity", mm / 1000, 1.0, 1.0, 180, None])[0]
                   for mm in ISO6946_THICKNESS_MM]
    assert resistances == sorted(resistances)
    up = layer_resistance(["air", "a", "b", "cavity", 0.1, 1.0, 1.0, 0, None])[0]
    assert resistances[-2] > up


# ----------------------------------------------------------------------------------------------
# 2. EN 673 centre-of-glass U-values

# EN 673 declared gas properties at 10 °C (from memory, EN 673 Table 1/Annex; density kg/m³,
# dynamic viscosity kg/(m·s), conductivity W/(m·K), specific heat J/(kg·K)).
EN673_GASES = {
    "air": (1.232, 1.761e-5, 2.496e-2, 1.008e3),
    "argon": (1.699, 2.164e-5, 1.684e-2, 0.519e3),
    "krypton": (3.560, 2.400e-5, 0.900e-2, 0.245e3),
}
# EN 673 conditions (from memory): mean gas temperature Tm = 283 K, 15 K across the gap,
# vertical glazing Nu = 0.035 (Gr Pr)^0.38 (at least 1), h_r = 4 sigma Tm^3 / (1/e1 + 1/e2 - 1),
# h_e = 23 W/(m²·K), h_i = 3.6 + 4.4 eps/0.837 (= 8.0 for uncoated soda-lime glass,
# eps = 0.837), glass conductivity 1.0 W/(m·K).
EN673_TM, EN673_DT, EN673_HE, GLASS_EPS, GLASS_K = 283.0, 15.0, 23.0, 0.837, 1.0
EN673_HI = 3.6 + 4.4 * GLASS_EPS / 0.837
EN673_MEAN_C = 10.0   # °C: the standard's 283 K, as "10 °C" (its beta = 1/Tm taken at 283.15 K here)
PANE = 0.004


def en673_standard_u(gap, gas, eps_coated):
    """EN 673's own calculation, from its equations and its gas table (independent of the engine)."""
    density, viscosity, conductivity, cp = EN673_GASES[gas]
    grashof = 9.81 * gap ** 3 * EN673_DT * density ** 2 / (EN673_TM * viscosity ** 2)
    prandtl = viscosity * cp / conductivity
    nusselt = max(1.0, 0.035 * (grashof * prandtl) ** 0.38)
    h_gas = nusselt * conductivity / gap
    h_rad = 4 * SIGMA * EN673_TM ** 3 / (1 / eps_coated + 1 / GLASS_EPS - 1)
    return 1 / (1 / EN673_HE + 1 / EN673_HI + 2 * PANE / GLASS_K + 1 / (h_gas + h_rad))


def en673_network_u(gap, gas, eps_coated):
    """U of the glazing network at the standard's conditions.

    Outdoor and indoor temperatures are chosen (fsolve) so that the gap sees 15 K and a 10 °C mean,
    as the standard declares; properties at 10 °C with beta = 1/T, method "en673"."""
    def solve(t_out, t_in):
        branches = [
            ["h-e", "out", "o1", "film", EN673_HE, 1.0],
            ["pane-1", "o1", "o2", "conduction", PANE, GLASS_K, 1.0],
            ["gas", "o2", "i2", "cavity", gap, 1.0, 1.0, 90, gas, "en673"],
            ["radiation", "o2", "i2", "radiation", eps_coated, GLASS_EPS, 1.0],
            ["pane-2", "i2", "i1", "conduction", PANE, GLASS_K, 1.0],
            ["h-i", "i1", "in", "film", EN673_HI, 1.0],
        ]
        return solve_network(branches, [["out", "T", t_out], ["in", "T", t_in]],
                             property_temperature=EN673_MEAN_C, ideal_expansion=True)

    def conditions(temperatures):
        t = solve(*temperatures).temperatures
        return [t["i2"] - t["o2"] - EN673_DT, (t["i2"] + t["o2"]) / 2 - EN673_MEAN_C]

    t_out, t_in = fsolve(conditions, [0.0, 25.0], xtol=1e-12)
    result = solve(t_out, t_in)
    return -result.heat["h-e"] / (t_in - t_out), result


BUILDS = [(gap, gas, eps) for gap in (0.012, 0.016) for gas in ("air", "argon", "krypton")
          for eps in (GLASS_EPS, 0.1)]


@pytest.mark.parametrize("gap, gas, eps", BUILDS)
def test_en673_u_value_within_005_of_the_standards_calculation(gap, gas, eps):
    """4-12-4 and 4-16-4, air/argon/krypton, uncoated and low-e 0.1.

    Worst deviation measured: +0.012 W/(m²·K) (4-16-4 argon, low-e 0.1); the difference is the
    engine's gas properties (CoolProp: argon conductivity 0.01699 against EN 673's 0.01684)."""
    u_network, result = en673_network_u(gap, gas, eps)
    assert abs(u_network - en673_standard_u(gap, gas, eps)) <= 0.05
    assert result.branches["gas"].method == "en673"
    assert result.temperatures["i2"] - result.temperatures["o2"] == pytest.approx(EN673_DT, abs=1e-6)


# Rounded U-values as EN 673 (and glazing catalogues following it) tabulate them, W/(m²·K)
# (from memory): 4-12-4 air 2.9, 4-16-4 air 2.7, 4-12-4 argon 2.7, 4-16-4 argon 2.6,
# 4-16-4 air low-e 0.1 1.5, 4-16-4 argon low-e 0.1 1.3.
EN673_TABULATED = [(0.012, "air", GLASS_EPS, 2.9), (0.016, "air", GLASS_EPS, 2.7),
                   (0.012, "argon", GLASS_EPS, 2.7), (0.016, "argon", GLASS_EPS, 2.6),
                   (0.016, "air", 0.1, 1.5), (0.016, "argon", 0.1, 1.3)]


@pytest.mark.parametrize("gap, gas, eps, u_tabulated", EN673_TABULATED)
def test_en673_u_value_rounds_to_the_tabulated_value(gap, gas, eps, u_tabulated):
    """Within the table's rounding (0.05) plus 0.01 for the property difference.
    Worst measured: 4-16-4 air low-e 0.1, 1.551 against 1.5 (and 4-16-4 air uncoated,
    2.749 against 2.7): both sit at the rounding edge, as the standard's own 1.542 and 2.742 do."""
    u_network, _ = en673_network_u(gap, gas, eps)
    assert abs(u_network - u_tabulated) <= 0.06


# ----------------------------------------------------------------------------------------------
# 3. Klein's top-loss equation for flat-plate collectors


def klein_top_loss(t_plate, t_air, covers, eps_plate, eps_glass, slope, h_wind):
    """Duffie & Beckman, Solar Engineering of Thermal Processes (3rd/4th ed.), eq. 6.4.9, Klein
    (1979) (from memory):

        U_t = {N / [(C/Tpm) ((Tpm - Ta)/(N + f))^e] + 1/h_w}^-1
              + sigma (Tpm + Ta)(Tpm² + Ta²) / {(eps_p + 0.00591 N h_w)^-1
                                                + (2N + f - 1 + 0.133 eps_p)/eps_g - N}
        f = (1 + 0.089 h_w - 0.1166 h_w eps_p)(1 + 0.07866 N)
        C = 520 (1 - 0.000051 beta²) for 0 <= beta <= 70 (beta = 70 above),  e = 0.430 (1 - 100/Tpm)
    """
    tp, ta = t_plate + 273.15, t_air + 273.15
    f = (1 + 0.089 * h_wind - 0.1166 * h_wind * eps_plate) * (1 + 0.07866 * covers)
    c = 520 * (1 - 0.000051 * min(slope, 70.0) ** 2)
    e = 0.430 * (1 - 100 / tp)
    convective = 1 / (covers / ((c / tp) * ((tp - ta) / (covers + f)) ** e) + 1 / h_wind)
    radiative = SIGMA * (tp + ta) * (tp ** 2 + ta ** 2) / (
        1 / (eps_plate + 0.00591 * covers * h_wind) + (2 * covers + f - 1 + 0.133 * eps_plate) / eps_glass
        - covers)
    return convective + radiative


def collector_top_loss(t_plate, t_air, covers, eps_plate, eps_glass, slope, h_wind, gap=0.025):
    """plate -(cavity + radiation)- cover ... -(film h_w to air, radiation to sky)- ambient.

    The cover gaps are 25 mm and 2 m long (from memory: Klein's fit and D&B's charts assume
    25 mm spacing); the sky is taken at the air temperature, as Klein's equation assumes
    (from memory); thin glass covers have no conduction resistance."""
    branches, previous, eps_below = [], "plate", eps_plate
    for k in range(covers):
        cover = f"cover-{k + 1}"
        branches += [[f"gap-{k + 1}", previous, cover, "cavity", gap, 2.0, 1.0, slope, None],
                     [f"rad-{k + 1}", previous, cover, "radiation", eps_below, eps_glass, 1.0]]
        previous, eps_below = cover, eps_glass
    branches += [["wind", previous, "air", "film", h_wind, 1.0],
                 ["sky", previous, "sky", "radiation", eps_glass, None, 1.0]]
    result = solve_network(branches, [["plate", "T", t_plate], ["air", "T", t_air], ["sky", "T", t_air]])
    return (result.heat["gap-1"] + result.heat["rad-1"]) / (t_plate - t_air), result


KLEIN_GRID = list(itertools.product((50.0, 100.0, 150.0), (1, 2), (0.1, 0.5, 0.95),
                                    (0.0, 20.0, 45.0, 60.0, 75.0), (5.0, 10.0)))


def test_klein_top_loss_within_its_stated_accuracy_over_a_grid():
    """180 cases: plate 50/100/150 °C, ambient 10 °C, 1-2 covers, plate emittance 0.1/0.5/0.95,
    glass 0.88, slope 0-75°, h_w 5 and 10 W/(m²·K).  Klein's stated accuracy: +-0.3 W/(m²·K)
    for plate temperatures from ambient to 200 °C (from memory: D&B sec. 6.4).

    Worst deviation measured: +0.289 W/(m²·K) (150 °C, 1 cover, eps_p 0.5, 60°, h_w 10).
    Left out: h_w >= 20 W/(m²·K), where the equation as recalled here loses up to 1.2 W/(m²·K)
    against the network and even falls as h_w rises, which points at a recall error or a
    narrower fitted range than remembered (see the report)."""
    worst = 0.0
    for t_plate, covers, eps_plate, slope, h_wind in KLEIN_GRID:
        u_network, result = collector_top_loss(t_plate, 10.0, covers, eps_plate, 0.88, slope, h_wind)
        u_klein = klein_top_loss(t_plate, 10.0, covers, eps_plate, 0.88, slope, h_wind)
        worst = max(worst, abs(u_network - u_klein))
        assert abs(u_network - u_klein) <= 0.3, (t_plate, covers, eps_plate, slope, h_wind, u_network, u_klein)
        assert result.notes == ()
    assert worst > 0.05   # the two are independent: a perfect match would mean a rigged comparison


def test_klein_worked_example_value():
    """Duffie & Beckman Example 6.4.2 (from memory: 1 cover, 25 mm, plate 100 °C, eps_p 0.95,
    ambient 10 °C, slope 45°, h_w 10, glass 0.88; Klein's equation gives about 6.6 W/(m²·K))."""
    assert klein_top_loss(100.0, 10.0, 1, 0.95, 0.88, 45.0, 10.0) == pytest.approx(6.6, abs=0.05)
    u_network, _ = collector_top_loss(100.0, 10.0, 1, 0.95, 0.88, 45.0, 10.0)
    assert u_network == pytest.approx(6.6, abs=0.1)
