"""Coefficients in one call: film temperature -> properties -> Ra -> Nu -> h."""

import numpy as np
import pytest

import stillair

from stillair import (CorrelationRangeWarning, InputError, gas_conductivity, gas_prandtl, h_cavity, h_hcyl,
                    h_hplate, h_tplate, h_vplate, nu_cavity, nu_hplate, nu_vplate, rayleigh)
from stillair.convection import cavity_convection, surface_convection


def test_vertical_plate_worked_example():
    # Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., Example 9.2 (glass door
    # 0.71 m high at 232 °C in room air at 23 °C; from memory: Ra = 1.813e9, Nu = 147,
    # h = 7.0 W/(m²K), with Table A.4 properties at 400 K and beta = 1/Tf).  Table properties
    # and CoolProp's differ by ~1 % in k and nu, so 2 % on h.
    result = surface_convection("vplate", 232.0, 23.0, 0.71, ideal_expansion=True).scalar()
    assert result.t_film == pytest.approx(127.5)
    assert result.ra == pytest.approx(1.813e9, rel=0.03)
    assert result.nu == pytest.approx(147, rel=0.02)
    assert result.h == pytest.approx(7.0, rel=0.02)


def test_h_is_nu_k_over_length_at_the_film_temperature():
    # Definition of h (any textbook): h = Nu k / L, all properties at the film temperature.
    ts, tf, height = 60.0, 20.0, 0.5
    ra = rayleigh(ts, tf, height)
    nu = nu_vplate(ra, gas_prandtl("air", 40.0))
    assert h_vplate(ts, tf, height) == pytest.approx(nu * gas_conductivity("air", 40.0) / height, rel=1e-12)


def test_horizontal_plate_cases_follow_the_sign_of_the_difference():
    # Physics: a hot face looking up and a cold face looking down are the same unstable problem
    # (same film temperature and |dT| -> same Ra), so the same correlation gives the same h.
    assert h_hplate(40.0, 20.0, 0.2, "up") == pytest.approx(h_hplate(20.0, 40.0, 0.2, "down"), rel=1e-12)
    assert h_hplate(40.0, 20.0, 0.2, "down") == pytest.approx(h_hplate(20.0, 40.0, 0.2, "up"), rel=1e-12)
    # and the unstable face transfers more than the stable one (common practice)
    assert h_hplate(40.0, 20.0, 0.2, "up") > h_hplate(40.0, 20.0, 0.2, "down")
    result = surface_convection("hplate", np.array([40.0, 0.0]), 20.0, 0.2, facing="up")
    assert list(result.case) == ["hot-up", "cold-up"]
    ra = rayleigh(40.0, 20.0, 0.2)
    assert result.nu[0] == pytest.approx(nu_hplate(ra, gas_prandtl("air", 30.0), "hot-up"), rel=1e-12)


def test_tilted_plate_at_zero_tilt_is_the_vertical_plate():
    # Definition of the tilted plate (tilt from vertical): 0 deg is the vertical plate.
    assert h_tplate(50.0, 20.0, 0.4, 0.0, "up") == pytest.approx(h_vplate(50.0, 20.0, 0.4), rel=1e-12)


def test_zero_temperature_difference_gives_the_correlation_limit():
    # Churchill-Chu vertical plate at Ra = 0: Nu = 0.825^2 (its conduction-like limit), no NaN.
    # Ra = 0 lies below the published Ra >= 0.1, and that is reported, not hidden.
    with pytest.warns(CorrelationRangeWarning, match="Ra = 0 below 0.1"):
        h = h_vplate(20.0, 20.0, 1.0)
    assert h == pytest.approx(0.825 ** 2 * gas_conductivity("air", 20.0), rel=1e-12)
    # cylinder and sphere limits: Churchill-Chu cylinder 0.60^2, Churchill sphere Nu = 2
    with pytest.warns(CorrelationRangeWarning, match="Ra = 0 below"):
        h_cylinder = h_hcyl(20.0, 20.0, 0.1)
    assert h_cylinder == pytest.approx(0.36 * gas_conductivity("air", 20.0) / 0.1, rel=1e-12)
    h_ball = surface_convection("sphere", 20.0, 20.0, 0.1).scalar().h
    assert h_ball == pytest.approx(2 * gas_conductivity("air", 20.0) / 0.1, rel=1e-12)


def test_vertical_cavity_is_symmetric_in_its_surfaces():
    # Physics: a vertical layer has no up or down; swapping the surfaces changes nothing.
    assert h_cavity(20.0, 0.0, 0.02, 1.0) == pytest.approx(h_cavity(0.0, 20.0, 0.02, 1.0), rel=1e-12)


def test_horizontal_cavity_heated_from_above_conducts():
    # Physics: a layer heated from above is stable: pure conduction, h = k/gap.
    gap = 0.05
    h = h_cavity(0.0, 20.0, gap, 1.0, tilt=0.0)
    assert h == pytest.approx(gas_conductivity("air", 10.0) / gap, rel=1e-12)
    # heated from below it convects, and more strongly
    assert h_cavity(20.0, 0.0, gap, 1.0, tilt=0.0) > 1.5 * h


def test_cavity_h_uses_nu_on_the_gap():
    t1, t2, gap, height = 15.0, 5.0, 0.03, 1.2
    ra = rayleigh(t1, t2, gap)
    nu = nu_cavity(ra, gas_prandtl("air", 10.0), height / gap, 90.0)
    assert h_cavity(t1, t2, gap, height) == pytest.approx(nu * gas_conductivity("air", 10.0) / gap, rel=1e-12)


def test_fixed_property_temperature_is_used_for_every_property():
    fixed = cavity_convection(30.0, 10.0, 0.02, 1.0, property_temperature=0.0).scalar()
    assert fixed.t_film == 0.0
    assert fixed.conductivity == pytest.approx(gas_conductivity("air", 0.0), rel=1e-12)


def test_arrays_in_arrays_out():
    h = h_vplate(np.array([30.0, 50.0, 80.0]), 20.0, 0.3)
    assert h.shape == (3,)
    assert np.all(np.diff(h) > 0)  # physics: h grows with dT in laminar natural convection


def test_out_of_range_use_warns_but_returns_a_value():
    # A 10 m hot wall at 300 K difference is beyond Churchill-Chu's Ra <= 1e12.
    with pytest.warns(CorrelationRangeWarning, match="churchill-chu: Ra = .* above 1e\\+12"):
        h = h_vplate(320.0, 20.0, 10.0)
    assert h > 0


@pytest.mark.parametrize("call, message", [
    (lambda: h_vplate(60.0, 20.0, -0.1), "h_vplate: height must be > 0 m, got -0.1"),
    (lambda: h_hplate(60.0, 20.0, 0.2, "sideways"), 'h_hplate: facing must be one of "up", "down", got \'sideways\''),
    (lambda: h_tplate(60.0, 20.0, 0.2, 120.0, "up"), "h_tplate: tilt must be in [0, 90] deg, got 120"),
    (lambda: h_cavity(20.0, 10.0, -0.01, 1.0), "h_cavity: gap must be > 0 m, got -0.01"),
    (lambda: h_cavity(20.0, 10.0, 0.01, 1.0, tilt=200.0), "h_cavity: tilt must be in [0, 180] deg, got 200"),
])
def test_bad_input_messages(call, message):
    with pytest.raises(InputError) as caught:
        call()
    assert str(caught.value) == message


# --- one call for every geometry, read from the geometry's data ------------------------------

def test_geometry_convection_by_name_equals_the_named_functions():
    assert stillair.geometry_convection("vcyl", 60.0, 20.0, height=0.5, diameter=0.05).h == stillair.h_vcyl(60.0, 20.0, 0.5, 0.05)
    assert stillair.geometry_convection("cavity", 15.0, 5.0, gap=0.016, height=1.2).h == stillair.h_cavity(15.0, 5.0, 0.016, 1.2)
    assert stillair.geometry_convection("tplate", 60.0, 20.0, length=0.5, tilt=30.0, facing="up").h == (
        stillair.h_tplate(60.0, 20.0, 0.5, 30.0, "up"))
    assert stillair.geometry_convection("channel", 60.0, 20.0, spacing=0.01, height=0.2, case="flux").h == (
        stillair.h_channel(60.0, 20.0, 0.01, 0.2, "flux"))
    assert stillair.geometry_convection("channel", 60.0, 20.0, spacing=0.01, height=0.2).h == (
        stillair.h_channel(60.0, 20.0, 0.01, 0.2))


def test_every_geometry_lists_its_parameters_length_first():
    for geometry in stillair.convection_geometries():
        assert geometry.parameters[0].name == geometry.length
        assert geometry.title and geometry.length_doc
        names = [p.name for p in geometry.parameters]
        plate_cases = bool(geometry.cases) and set(geometry.cases) == set(stillair.PLATE_CASES)
        # plate cases follow from a facing and the sign of the difference; other cases are named
        assert ("facing" in names) == plate_cases
        assert ("case" in names) == (bool(geometry.cases) and not plate_cases)


def test_geometry_convection_names_a_wrong_or_missing_parameter():
    with pytest.raises(stillair.InputError) as error:
        stillair.geometry_convection("hplate", 60.0, 20.0, length=0.5, facing="up", tilt=3.0)
    assert str(error.value) == "h_hplate: parameter must be one of length, facing for hplate, got 'tilt'"
    with pytest.raises(stillair.InputError) as error:
        stillair.geometry_convection("hplate", 60.0, 20.0, length=0.5)
    assert str(error.value) == "h_hplate: facing must be text for hplate, got None"


def test_nusselt_and_nu_cavity_default_to_the_vertical_layer_alike():
    assert stillair.nusselt("cavity", ra=1e5, pr=0.71, aspect=20.0).nu == stillair.nu_cavity(1e5, 0.71, 20.0)


def test_a_blend_is_named_in_the_convection_result():
    # A 20 um wire: Ra ~ 2e-5 on the diameter, inside Churchill-Chu's hand-over band to Morgan.
    result = stillair.geometry_convection("hcyl", 60.0, 20.0, diameter=2e-5)
    assert 1e-5 < result.ra < 4e-5
    assert result.blend == "auto blend of churchill-chu and morgan" and result.in_range
