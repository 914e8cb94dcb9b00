"""Radiation between grey surfaces and the linearised coefficient."""

import numpy as np
import pytest
from ht.radiation import q_rad, sigma as HT_SIGMA

from stillair import InputError
from stillair.radiation import SIGMA, exchange_factor, h_rad, radiation_flux


@pytest.mark.parametrize("eps, t_surface, t_surroundings", [(0.85, 126.85, 31.85), (1.0, 126.85, -273.15 + 1e-9),
                                                               (0.3, 20.0, 60.0)])
def test_flux_to_surroundings_matches_ht_q_rad(eps, t_surface, t_surroundings):
    # ht.radiation.q_rad: q = eps sigma (T1^4 - T2^4), temperatures in K.  ht uses the CODATA 2014
    # sigma (5.670367e-8); we use the exact SI 2019 value from scipy.constants, hence the rescale.
    expected = q_rad(eps, t_surface + 273.15, t_surroundings + 273.15) * SIGMA / HT_SIGMA
    assert radiation_flux(t_surface, t_surroundings, eps) == pytest.approx(expected, rel=1e-12)


def test_ht_docstring_example_value():
    # ht.radiation.q_rad docstring example (Bergman et al., Introduction to Heat Transfer 6th ed.):
    # q_rad(0.85, T=400 K, T2=305 K) = 816.7821722650002 W/m²
    # computed there with the CODATA 2014 sigma; the SI 2019 value differs by 1.3e-6 relative.
    assert radiation_flux(400 - 273.15, 305 - 273.15, 0.85) == pytest.approx(816.7821722650002, rel=2e-6)


@pytest.mark.parametrize("t1, t2", [(80.0, 20.0), (-30.0, 10.0), (400.0, -40.0), (15.0, 15.0 + 1e-9)])
@pytest.mark.parametrize("eps2", [None, 0.84, 0.05])
def test_linearised_coefficient_reproduces_fourth_power_exchange(t1, t2, eps2):
    # Physical law: h_rad (T1 - T2) is exactly the grey exchange F sigma (T1^4 - T2^4).
    q = radiation_flux(t1, t2, 0.9, eps2)
    assert h_rad(t1, t2, 0.9, eps2) * (t1 - t2) == pytest.approx(q, rel=1e-9, abs=1e-12)


def test_small_difference_limit_is_four_sigma_tm_cubed():
    # ISO 6946 Annex (air layers): h_r0 = 4 sigma Tm^3 = 5.1 W/(m²K) at 10 °C (from memory:
    # the standard tabulates 4.6 at 0 °C, 5.1 at 10 °C, 5.7 at 20 °C).
    assert h_rad(10.0, 10.0, 1.0, 1.0) == pytest.approx(4 * SIGMA * 283.15 ** 3, rel=1e-12)
    assert round(h_rad(10.0, 10.0, 1.0, 1.0), 1) == 5.1
    assert round(h_rad(0.0, 0.0, 1.0, 1.0), 1) == 4.6
    assert round(h_rad(20.0, 20.0, 1.0, 1.0), 1) == 5.7


def test_exact_form_differs_from_tm_cubed_at_large_difference():
    # Algebra: with T1,2 = Tm +- d, (T1^2+T2^2)(T1+T2) / (4 Tm^3) = 1 + (d/Tm)^2, so the Tm^3 form
    # underestimates by that factor (here 4.4 %).
    t1, t2 = 300.0, 100.0
    tm = 0.5 * (t1 + t2) + 273.15
    ratio = h_rad(t1, t2, 1.0, 1.0) / (4 * SIGMA * tm ** 3)
    assert ratio == pytest.approx(1 + (100 / tm) ** 2, rel=1e-12)


def test_parallel_plate_exchange_factor():
    # Incropera 6th ed. eq. 13.24: F = 1/(1/eps1 + 1/eps2 - 1)
    assert exchange_factor(0.84, 0.84) == pytest.approx(1 / (2 / 0.84 - 1), rel=1e-15)
    assert exchange_factor(1.0, 1.0) == 1.0
    # symmetry and ordering: one low-e face dominates
    assert exchange_factor(0.1, 0.84) == exchange_factor(0.84, 0.1)
    assert exchange_factor(0.1, 0.84) < 0.1


def test_arrays_broadcast():
    result = h_rad(np.array([20.0, 40.0]), 10.0, np.array([0.9, 0.1]))
    assert result.shape == (2,)
    assert result[0] == pytest.approx(h_rad(20.0, 10.0, 0.9))


@pytest.mark.parametrize("args, message", [
    ((20, 10, 0.0), "h_rad: eps1 must be in (0, 1], got 0"),
    ((20, 10, 1.2), "h_rad: eps1 must be in (0, 1], got 1.2"),
    ((20, 10, 0.9, -0.1), "h_rad: eps2 must be in (0, 1], got -0.1"),
    ((-274, 10, 0.9), "h_rad: t1 must be above -273.15 °C, got -274"),
    ((20, float("nan"), 0.9), "h_rad: t2 must be a finite number, got nan"),
    (("hot", 10, 0.9), "h_rad: t1 must be a number, not text, got 'hot'"),
])
def test_bad_input_messages(args, message):
    with pytest.raises(InputError) as caught:
        h_rad(*args)
    assert str(caught.value) == message
