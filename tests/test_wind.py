"""Wind on exposed surfaces: forced convection (engine/forced.py) and its combination with
natural convection in the h functions and the network.

Outside checks: the forced correlations against the `ht` library (ht.conv_external, function
named beside each check) to 1e-9; where ht has no such function (the mixed laminar-turbulent
plate, the sphere), against the published formula written out here and against ht's pieces;
the combination against an independent route (ht's natural and forced Nusselt numbers at our
film properties, summed as Churchill and Usagi's cube, written out here).  Physical laws:
still air is unchanged, the wind only adds, the forced part dominates a strong wind.
"""

from __future__ import annotations

import math

import ht
import numpy as np
import pytest

import stillair
from stillair.correlations import GEOMETRIES, nusselt
from stillair.forced import MIXING_EXPONENT, WIND_FLOWS
from stillair.validity import CorrelationRangeWarning, InputError

PRANDTL = (0.7, 1.0, 7.0)
REYNOLDS = np.logspace(0, 7, 43)


def forced_nu(geometry, re, pr, method="auto"):
    return nusselt(geometry, method, re=re, pr=pr).nu


# ------------------------------------------------------------------------------------------
# The forced correlations against ht
# ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("pr", PRANDTL)
def test_laminar_plate_matches_ht_baehr(pr):
    # ht.Nu_horizontal_plate_laminar_Baehr: 0.664 Re^0.5 Pr^(1/3) for 0.05 <= Pr < 10 (Baehr &
    # Stephan; Incropera eq. 7.30)
    re = np.logspace(1, math.log10(5e5), 25)
    ours = forced_nu("plate-flow", re, pr, "pohlhausen")
    theirs = [ht.Nu_horizontal_plate_laminar_Baehr(x, pr) for x in re]
    np.testing.assert_allclose(ours, theirs, rtol=1e-9, atol=0)


@pytest.mark.parametrize("pr", PRANDTL)
def test_cylinder_matches_ht_churchill_bernstein(pr):
    # ht.Nu_cylinder_Churchill_Bernstein (Churchill & Bernstein 1977; Incropera eq. 7.54)
    ours = forced_nu("cylinder-crossflow", REYNOLDS, pr)
    theirs = [ht.Nu_cylinder_Churchill_Bernstein(x, pr) for x in REYNOLDS]
    np.testing.assert_allclose(ours, theirs, rtol=1e-9, atol=0)


def test_cylinder_reproduces_the_textbook_example_quoted_by_ht():
    # ht's docstring: Incropera (Bergman et al.) 6th ed. Example 7.3, Re = 6071, Pr = 0.7 -> 40.637
    assert forced_nu("cylinder-crossflow", 6071.0, 0.7) == pytest.approx(40.63708594124974, rel=1e-9)


def test_mixed_boundary_layer_constant_is_the_laminar_value_carried_to_transition():
    # Incropera eq. 7.38: A = 0.037 Re_c^0.8 - 0.664 Re_c^0.5 = 871 at Re_c = 5e5, the laminar
    # term from ht.Nu_horizontal_plate_laminar_Baehr (at Pr = 1 it is 0.664 Re^0.5)
    re_c = 5e5
    a = 0.037 * re_c ** 0.8 - ht.Nu_horizontal_plate_laminar_Baehr(re_c, 1.0)
    assert abs(a - 871.0) < 0.5
    # so the two plate methods meet at Re_c within the rounding of 871
    for pr in PRANDTL:
        laminar = forced_nu("plate-flow", re_c, pr, "pohlhausen")
        mixed = forced_nu("plate-flow", re_c, pr, "mixed-boundary-layer")
        assert mixed == pytest.approx(laminar, rel=1e-3)


@pytest.mark.parametrize("pr", (0.7, 1.0, 7.0, 50.0))
def test_mixed_boundary_layer_matches_its_published_form(pr):
    # Incropera eq. 7.38, written out independently: (0.037 Re^(4/5) - 871) Pr^(1/3)
    re = np.logspace(math.log10(5e5), 8, 20)
    expected = (0.037 * re ** (4 / 5) - 871) * pr ** (1 / 3)
    np.testing.assert_allclose(forced_nu("plate-flow", re, pr, "mixed-boundary-layer"), expected, rtol=1e-12)


@pytest.mark.parametrize("pr", (0.7, 1.0, 7.0))
def test_sphere_matches_whitakers_published_form(pr):
    # ht has no forced-sphere correlation (ht 1.2: ht.conv_external holds plates and cylinders);
    # Whitaker, AIChE J. 18 (1972) 361, as transcribed e.g. in openterrace-python
    # (shapes/sphere.py): 2 + (0.4 Re^(1/2) + 0.06 Re^(2/3)) Pr^0.4 (mu/mu_s)^(1/4), ratio 1 here
    re = np.logspace(math.log10(3.5), math.log10(7.6e4), 20)
    expected = 2 + (0.4 * np.sqrt(re) + 0.06 * np.cbrt(re) ** 2) * pr ** 0.4
    np.testing.assert_allclose(forced_nu("sphere-flow", re, pr), expected, rtol=1e-12)


def test_plate_auto_is_laminar_then_mixed_without_a_step():
    re = np.logspace(3, 8, 4001)
    result = nusselt("plate-flow", "auto", re=re, pr=0.71)
    assert set(result.method[re <= 5e5]) == {"pohlhausen"}
    assert set(result.method[re > 5e5]) == {"mixed-boundary-layer"}
    assert np.all(np.diff(result.nu) > 0)
    assert np.max(np.abs(np.diff(np.log(result.nu)))) < 0.01


def test_forced_ranges_are_reported():
    result = nusselt("sphere-flow", "auto", re=np.array([1.0, 100.0, 1e5]), pr=0.71)
    assert list(result.note) == ["whitaker: Re = 1 below 3.5 (valid 3.5 <= Re <= 76000)", "",
                                 "whitaker: Re = 100000 above 76000 (valid 3.5 <= Re <= 76000)"]
    assert nusselt("cylinder-crossflow", "auto", re=0.1, pr=0.7).note.item() == (
        "churchill-bernstein: Re*Pr = 0.07 below 0.2 (valid Re*Pr >= 0.2)")
    assert nusselt("plate-flow", "auto", re=2e8, pr=0.7).note.item() == (
        "mixed-boundary-layer: Re = 2e+08 above 1e+08 (valid 500000 <= Re <= 1e+08)")


# ------------------------------------------------------------------------------------------
# The combination, against an independent route
# ------------------------------------------------------------------------------------------

def _film(ts, tf):
    return stillair.gas_properties("air", 0.5 * (ts + tf))


def _independent(natural_nu, natural_length, forced, forced_length, props, wind):
    """Churchill-Usagi on coefficients, n = 3, written out here."""
    h_n = natural_nu * props.conductivity / natural_length
    h_f = forced(wind * forced_length / props.kinvisc, props.prandtl) * props.conductivity / forced_length
    return (h_n ** 3 + h_f ** 3) ** (1 / 3)


def _gr(props, ts, tf, length):
    return 9.80665 * props.expansion * abs(ts - tf) * length ** 3 / props.kinvisc ** 2


@pytest.mark.parametrize("wind", (0.3, 1.0, 4.0, 8.0))   # Re < 5e5: the laminar plate
@pytest.mark.parametrize("ts, tf", ((60.0, 20.0), (5.0, 25.0), (35.0, -10.0)))
def test_vertical_plate_in_a_wind_is_the_cube_sum_of_ht_parts(ts, tf, wind):
    height, along = 0.6, 0.8
    props = _film(ts, tf)
    natural = ht.Nu_vertical_plate_Churchill(props.prandtl, _gr(props, ts, tf, height))
    expected = _independent(natural, height, ht.Nu_horizontal_plate_laminar_Baehr, along, props, wind)
    assert stillair.h_vplate(ts, tf, height, wind=wind, wind_length=along) == pytest.approx(expected, rel=1e-9)


@pytest.mark.parametrize("wind", (0.3, 1.0, 4.0, 12.0))
@pytest.mark.parametrize("ts, tf", ((60.0, 20.0), (5.0, 25.0), (35.0, -10.0)))
def test_horizontal_cylinder_in_a_wind_is_the_cube_sum_of_ht_parts(ts, tf, wind):
    d = 0.08
    props = _film(ts, tf)
    natural = ht.Nu_horizontal_cylinder_Churchill_Chu(props.prandtl, _gr(props, ts, tf, d))
    expected = _independent(natural, d, ht.Nu_cylinder_Churchill_Bernstein, d, props, wind)
    assert stillair.h_hcyl(ts, tf, d, wind=wind) == pytest.approx(expected, rel=1e-9)


def test_vertical_cylinder_takes_the_wind_across_its_diameter():
    ts, tf, height, d, wind = 50.0, 10.0, 0.6, 0.1, 2.0
    props = _film(ts, tf)
    still = stillair.h_vcyl(ts, tf, height, d)
    h_f = ht.Nu_cylinder_Churchill_Bernstein(wind * d / props.kinvisc, props.prandtl) * props.conductivity / d
    assert stillair.h_vcyl(ts, tf, height, d, wind=wind) == pytest.approx((still ** 3 + h_f ** 3) ** (1 / 3),
                                                                          rel=1e-9)


def test_sphere_and_tilted_and_horizontal_plates_combine_the_same_way():
    ts, tf, wind = 45.0, 15.0, 1.5
    props = _film(ts, tf)

    def cube_sum(still, h_forced):
        return (still ** 3 + h_forced ** 3) ** (1 / 3)

    d = 0.15
    re = wind * d / props.kinvisc
    h_f = (2 + (0.4 * re ** 0.5 + 0.06 * re ** (2 / 3)) * props.prandtl ** 0.4) * props.conductivity / d
    assert stillair.h_sphere(ts, tf, d, wind=wind) == pytest.approx(cube_sum(stillair.h_sphere(ts, tf, d), h_f),
                                                                    rel=1e-9)
    length, along = 0.25, 1.0
    h_f = ht.Nu_horizontal_plate_laminar_Baehr(wind * along / props.kinvisc, props.prandtl) * props.conductivity / along
    assert stillair.h_hplate(ts, tf, length, "up", wind=wind, wind_length=along) == pytest.approx(
        cube_sum(stillair.h_hplate(ts, tf, length, "up"), h_f), rel=1e-9)
    # the tilted plate's blank wind length is its length along the slope
    h_f = ht.Nu_horizontal_plate_laminar_Baehr(wind * 2.0 / props.kinvisc, props.prandtl) * props.conductivity / 2.0
    assert stillair.h_tplate(ts, tf, 2.0, 35.0, "up", wind=wind) == pytest.approx(
        cube_sum(stillair.h_tplate(ts, tf, 2.0, 35.0, "up"), h_f), rel=1e-9)
    assert MIXING_EXPONENT == 3.0


# ------------------------------------------------------------------------------------------
# Still air is unchanged; the wind only adds; a strong wind is forced convection
# ------------------------------------------------------------------------------------------

CALLS = {
    "vplate": lambda ts, tf, **w: stillair.h_vplate(ts, tf, 0.7, **w),
    "hplate": lambda ts, tf, **w: stillair.h_hplate(ts, tf, 0.3, "down", **w, **({"wind_length": 1.2} if w else {})),
    "tplate": lambda ts, tf, **w: stillair.h_tplate(ts, tf, 1.1, 40.0, "up", **w),
    "hcyl": lambda ts, tf, **w: stillair.h_hcyl(ts, tf, 0.05, **w),
    "vcyl": lambda ts, tf, **w: stillair.h_vcyl(ts, tf, 0.9, 0.11, **w),
    "sphere": lambda ts, tf, **w: stillair.h_sphere(ts, tf, 0.2, **w),
}


@pytest.mark.parametrize("geometry", sorted(CALLS))
def test_wind_zero_is_still_air_bit_for_bit_over_a_sweep(geometry):
    rng = np.random.default_rng(7)
    ts = rng.uniform(-30.0, 150.0, 300)
    tf = rng.uniform(-30.0, 40.0, 300)
    call = CALLS[geometry]
    with np.errstate(all="ignore"):
        import warnings
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", CorrelationRangeWarning)
            still = call(ts, tf)
            assert np.array_equal(call(ts, tf, wind=0.0), still)
            assert np.array_equal(call(ts, tf, wind=np.zeros(300)), still)
            mixed = call(ts, tf, wind=np.where(np.arange(300) % 2 == 0, 0.0, 3.0))
            assert np.array_equal(mixed[::2], still[::2])
            for k in range(0, 300, 30):   # the scalar path too
                assert call(float(ts[k]), float(tf[k]), wind=0) == call(float(ts[k]), float(tf[k]))


@pytest.mark.parametrize("geometry", sorted(CALLS))
def test_wind_only_adds_and_a_strong_wind_is_forced_convection(geometry):
    import warnings
    winds = np.array([0.0, 0.05, 0.2, 1.0, 3.0, 10.0, 30.0])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CorrelationRangeWarning)
        h = CALLS[geometry](55.0, 15.0, wind=winds)
    assert np.all(np.diff(h) > 0)
    result = stillair.surface_convection(
        {"vplate": "vplate", "hplate": "hplate", "tplate": "tplate", "hcyl": "hcyl", "vcyl": "vcyl",
         "sphere": "sphere"}[geometry], 55.0, 15.0, 0.2 if geometry == "sphere" else 0.05,
        facing="up", tilt=30.0, diameter=0.05, wind=30.0, wind_length=0.5 if "plate" in geometry else None)
    assert float(result.h) == pytest.approx(float(result.h_forced), rel=0.02)     # forced dominates
    assert float(result.h) > max(float(result.h_forced), float(result.h_natural))
    assert float(result.nu) == pytest.approx(float(result.h * result.length / result.conductivity), rel=1e-12)


def test_the_result_tells_the_parts():
    result = stillair.surface_convection("vplate", 60.0, 20.0, 0.5, wind=2.0, wind_length=1.0).scalar()
    props = _film(60.0, 20.0)
    assert result.re == pytest.approx(2.0 * 1.0 / props.kinvisc, rel=1e-12)
    assert result.forced_method == "pohlhausen" and result.method == "churchill-chu"
    assert result.h_natural == stillair.h_vplate(60.0, 20.0, 0.5)
    still = stillair.surface_convection("vplate", 60.0, 20.0, 0.5).scalar()
    assert still.re is None and still.forced_method is None


# ------------------------------------------------------------------------------------------
# Bad input and out-of-range use
# ------------------------------------------------------------------------------------------

def test_bad_wind_input_names_the_argument_and_value():
    with pytest.raises(InputError, match=r"^h_vplate: wind must be >= 0 m/s, got -1$"):
        stillair.h_vplate(40.0, 20.0, 0.5, wind=-1.0)
    with pytest.raises(InputError, match=r"^h_vplate: wind_length must be > 0 m, got 0$"):
        stillair.h_vplate(40.0, 20.0, 0.5, wind=1.0, wind_length=0.0)
    with pytest.raises(InputError, match=r"^h_hcyl: wind must be a finite number, got nan$"):
        stillair.h_hcyl(40.0, 20.0, 0.05, wind=math.nan)
    with pytest.raises(InputError, match=r"^h_hplate: wind_length must be the plate's length along the wind in m "
                                         r"\(> 0\) when wind > 0 \(area/perimeter is not a length along the wind\), "
                                         r"got None$"):
        stillair.h_hplate(40.0, 20.0, 0.25, "up", wind=1.0)
    with pytest.raises(InputError, match=r"^h_sphere: wind_length must be blank for sphere \(the wind crosses its "
                                         r"diameter\), got 0.3$"):
        stillair.surface_convection("sphere", 40.0, 20.0, 0.1, wind=1.0, wind_length=0.3)
    # still air needs no wind length, even on a horizontal plate
    assert stillair.h_hplate(40.0, 20.0, 0.25, "up", wind=0.0) == stillair.h_hplate(40.0, 20.0, 0.25, "up")


def test_a_forced_correlation_out_of_range_is_reported_not_silent():
    with pytest.warns(CorrelationRangeWarning, match=r"h_sphere: outside validity range: whitaker: Re = .* below 3.5"):
        stillair.h_sphere(30.0, 20.0, 0.01, wind=0.001)
    result = stillair.surface_convection("sphere", 30.0, 20.0, 0.01, wind=0.001).scalar()
    assert not result.in_range and result.note.startswith("whitaker: Re = ")


# ------------------------------------------------------------------------------------------
# The network
# ------------------------------------------------------------------------------------------

def _solve(kind_row, heat=60.0):
    branches = [["face", "s", "air", *kind_row], ["sky", "s", "air", "radiation", 0.9, None, 1.0, None, None, None]]
    return stillair.solve_network(branches, [["s", "Q", heat], ["air", "T", 10.0]])


ROWS = {  # demo data: a 1 m² face or a pipe losing 60 W, with the wind column(s) last
    "vplate": (["vplate", 1.0, 1.0, None, None, None, None], 3, (0.3, 0.9)),
    "hplate": (["hplate", 0.25, 1.0, "up", None, None, None], 4, (0.8, 1.0)),
    "tplate": (["tplate", 1.2, 1.0, 30.0, "up", None, None], 5, (0.4,)),
    "hcyl": (["hcyl", 0.1, 1.0, None, None, None, None], 3, (0.7,)),
    "sphere": (["sphere", 0.3, 0.28, None, None, None, None], 3, (0.5,)),
    "vcyl": (["vcyl", 1.5, 0.2, 0.94, None, None, None], 4, (0.6,)),
}


@pytest.mark.parametrize("kind", sorted(ROWS))
def test_a_wind_branch_is_the_one_call_coefficient_at_the_solution(kind):
    row, column, values = ROWS[kind]
    blank = _solve(row)
    zero = list(row)
    zero[column] = 0.0
    assert _solve(zero).temperatures == blank.temperatures    # wind 0 = blank = still air, exactly
    windy = list(row)
    windy[column:column + len(values)] = values
    result = _solve(windy)
    t = result.temperatures["s"]
    assert t < blank.temperatures["s"]
    record = result.branches["face"]
    geometry = row[0]
    kwargs = dict(wind=values[0])
    if len(values) > 1:
        kwargs["wind_length"] = values[1]
    if geometry in ("hplate", "tplate"):
        kwargs["facing"] = "up"
    if geometry == "tplate":
        kwargs["tilt"] = 30.0
    if geometry == "vcyl":
        kwargs["diameter"] = 0.2
    one_call = stillair.surface_convection(geometry, t, 10.0, row[1], **kwargs).scalar()
    assert record.h == pytest.approx(one_call.h, rel=1e-12)
    assert record.Re == pytest.approx(one_call.re, rel=1e-12)
    assert record.Nu == pytest.approx(one_call.nu, rel=1e-12)
    assert record.method == f"{one_call.method} + {one_call.forced_method} (wind)"
    assert sum(r.heat for r in result.branches.values()) == pytest.approx(60.0, rel=1e-9)   # energy balance
    assert result.iterations < 20


def test_network_wind_columns_are_checked():
    with pytest.raises(InputError, match=r"column p4 \(wind\) must be >= 0 m/s, got -2"):
        _solve(["hplate", 0.25, 1.0, "up", -2.0, 1.0, None])
    with pytest.raises(InputError, match=r"column p5 \(wind length\) must be the plate's length along the wind"):
        _solve(["hplate", 0.25, 1.0, "up", 2.0, None, None])
    with pytest.raises(InputError, match=r"column p4 \(wind length\) must be > 0 m, got 0"):
        _solve(["vplate", 1.0, 1.0, 2.0, 0.0, None, None])
    with pytest.raises(InputError, match=r"column p4 must be blank for kind hcyl"):
        _solve(["hcyl", 0.1, 1.0, 2.0, 0.5, None, None])


def test_network_reports_a_forced_correlation_out_of_range():
    result = _solve(["sphere", 0.01, 0.0003, 0.001, None, None, None], heat=0.05)
    assert any("whitaker: Re = " in note and "below 3.5" in note for note in result.notes)
    assert not result.branches["face"].in_range


def test_the_band_keeps_the_wind():
    branches = [["pipe", "s", "air", "hcyl", 0.1, 1.0, 1.5, None, None, None]]
    result = stillair.solve_network(branches, [["s", "Q", 80.0], ["air", "T", 5.0]], band=True)
    low, high = result.band["s"]
    assert low <= result.temperatures["s"] <= high
    still = stillair.solve_network([["pipe", "s", "air", "hcyl", 0.1, 1.0, None, None, None, None]],
                                   [["s", "Q", 80.0], ["air", "T", 5.0]], band=True)
    assert high < still.band["s"][0]     # the wind cools it below every still-air correlation


def test_every_exposed_surface_has_a_wind_flow_of_the_registry():
    for geometry, flow in WIND_FLOWS.items():
        assert flow.geometry in GEOMETRIES and geometry in GEOMETRIES
        assert "wind" in (stillair.__dict__[f"h_{geometry}"].__doc__ or "")
        assert "Churchill" in stillair.__dict__[f"h_{geometry}"].__doc__


@pytest.mark.parametrize("geometry", sorted(CALLS))
def test_the_scalar_wind_path_gives_the_array_result(geometry):
    # one case in plain numbers takes the registry's scalar path; numpy's scalar and vectorised
    # pow may differ in the last bits (as for still air, tests/test_scalar_path.py)
    import warnings
    call = CALLS[geometry]
    rng = np.random.default_rng(5)
    ts, tf, wind = rng.uniform(-20, 120, 40), rng.uniform(-20, 35, 40), rng.uniform(0.01, 25, 40)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CorrelationRangeWarning)
        whole = call(ts, tf, wind=wind)
        for k in range(40):
            assert call(float(ts[k]), float(tf[k]), wind=float(wind[k])) == pytest.approx(whole[k], rel=1e-14, abs=0)
    one = stillair.surface_convection("sphere", 30.0, 20.0, 0.01, wind=0.001).scalar()
    many = stillair.surface_convection("sphere", 30.0, 20.0, 0.01, wind=np.array([0.001])).scalar()
    assert (one.note, one.in_range, one.forced_method) == (many.note[0], many.in_range[0], many.forced_method[0])


def test_geometry_convection_passes_the_wind_to_exposed_surfaces_only():
    by_name = stillair.geometry_convection("vcyl", 50.0, 10.0, height=0.6, diameter=0.1, wind=2.0)
    assert float(by_name.h) == stillair.h_vcyl(50.0, 10.0, 0.6, 0.1, wind=2.0)
    with pytest.raises(InputError, match=r"^h_cavity: wind must be 0 for cavity \(wind acts on exposed surfaces: "
                                         r"vplate, hplate, tplate, hcyl, vcyl, sphere\), got 2$"):
        stillair.geometry_convection("cavity", 20.0, 10.0, gap=0.02, height=1.0, wind=2.0)


from hypothesis import given, settings, strategies as st  # noqa: E402


@settings(max_examples=150, deadline=None)
@given(ts=st.floats(-40.0, 200.0), tf=st.floats(-40.0, 45.0), wind=st.floats(0.0, 40.0),
       geometry=st.sampled_from(sorted(CALLS)))
def test_the_cube_sum_lies_between_the_larger_part_and_the_sum_of_both(ts, tf, wind, geometry):
    """Churchill-Usagi with n = 3 > 1: max(h_N, h_F) <= h <= h_N + h_F, and more wind never cools less."""
    import warnings
    kwargs = {"vplate": dict(wind_length=0.9), "hplate": dict(facing="up", wind_length=0.9),
              "tplate": dict(facing="down", tilt=20.0)}.get(geometry, {})
    if geometry == "vcyl":
        kwargs["diameter"] = 0.08
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CorrelationRangeWarning)
        result = stillair.surface_convection(geometry, ts, tf, 0.4, wind=wind, **kwargs).scalar()
        more = stillair.surface_convection(geometry, ts, tf, 0.4, wind=wind * 1.1 + 0.01, **kwargs).scalar()
    if result.h_forced is None:   # still air: no wind, or one so light that Re underflows to 0
        assert wind < 1e-300
        return
    assert max(result.h_natural, result.h_forced) * (1 - 1e-12) <= result.h
    assert result.h <= (result.h_natural + result.h_forced) * (1 + 1e-12)
    assert more.h >= result.h * (1 - 1e-12)


def test_insulation_thickness_in_a_wind_balances_the_combined_coefficient():
    """The exact thickness with a wind: conduction through it equals what the outer surface passes
    on by the mixed-convection coefficient and radiation (a flat face: x = k (t_i - t_s) / F)."""
    ti, ta, ts, k, eps = 150.0, 20.0, 45.0, 0.04, 0.3
    x = stillair.insulation_thickness(ti, ta, ts, k, eps, "vplate", 1.2, wind=4.0, wind_length=2.0)
    passed = (stillair.h_vplate(ts, ta, 1.2, wind=4.0, wind_length=2.0) * (ts - ta)
              + stillair.h_rad(ts, ta, eps) * (ts - ta))
    assert x == pytest.approx(k * (ti - ts) / passed, rel=1e-12)
    assert x < stillair.insulation_thickness(ti, ta, ts, k, eps, "vplate", 1.2)     # a wind cools: less needed
    assert stillair.insulation_thickness(ti, ta, ts, k, eps, "hcyl", 0.1, wind=0.0) == \
        stillair.insulation_thickness(ti, ta, ts, k, eps, "hcyl", 0.1)
    with pytest.raises(InputError, match=r"^insulation_thickness: wind_length must be blank for hcyl"):
        stillair.insulation_thickness(ti, ta, ts, k, eps, "hcyl", 0.1, wind=2.0, wind_length=1.0)
