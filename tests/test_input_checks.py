"""Every input checked as typed: exact messages naming the argument and the value the user gave."""

from __future__ import annotations

import math

import pytest

import stillair
from stillair.addin.cells.callpath import call


@pytest.mark.parametrize("cell, expected", [
    # absolute zero is -273.15 °C (common practice); every temperature argument, not the mean
    (("H_VPLATE", -300.0, 20.0, 0.5), "H_VPLATE: ts must be above absolute zero (-273.15 °C), got -300"),
    (("H_VPLATE", 20.0, -300.0, 0.5), "H_VPLATE: tf must be above absolute zero (-273.15 °C), got -300"),
    (("RAYLEIGH", -300.0, 20.0, 0.5), "RAYLEIGH: t1 must be above absolute zero (-273.15 °C), got -300"),
    (("GRASHOF", 20.0, -280.0, 0.5), "GRASHOF: t2 must be above absolute zero (-273.15 °C), got -280"),
    (("H_CAVITY", 15.0, -500.0, 0.01, 1.0), "H_CAVITY: t2 must be above absolute zero (-273.15 °C), got -500"),
    # the value typed, not the film temperature (5010 °C before)
    (("H_VPLATE", 10000.0, 20.0, 0.5), "H_VPLATE: ts must be in [-150, 800] °C for air, got 10000"),
    (("H_HCYL", 20.0, 900.0, 0.05), "H_HCYL: tf must be in [-150, 800] °C for air, got 900"),
    # NaN and infinity named as such
    (("H_VPLATE", math.nan, 20.0, 0.5), "H_VPLATE: ts must be a finite number, got nan"),
    (("H_VPLATE", 20.0, math.inf, 0.5), "H_VPLATE: tf must be a finite number, got inf"),
    (("NU_VPLATE", math.nan, 0.71), "NU_VPLATE: Ra must be a finite number, got nan"),
    (("NU_CAVITY", 1e5, 0.71, -math.inf), "NU_CAVITY: aspect must be a finite number, got -inf"),
    (("H_CAVITY", 15.0, 5.0, 0.01, 1.0, math.nan), "H_CAVITY: tilt must be a finite number, got nan"),
    (("AIR_DENSITY", math.nan), "AIR_DENSITY: t must be a finite number, got nan"),
])
def test_cell_messages_name_the_argument_and_the_value_typed(cell, expected):
    assert call(*cell) == expected


def test_engine_messages_match():
    with pytest.raises(stillair.InputError) as error:
        stillair.h_vplate(-300.0, 20.0, 0.5)
    assert str(error.value) == "h_vplate: ts must be above absolute zero (-273.15 °C), got -300"
    with pytest.raises(stillair.InputError) as error:
        stillair.rayleigh(20.0, math.nan, 0.5)
    assert str(error.value) == "rayleigh: t2 must be a finite number, got nan"
    with pytest.raises(stillair.InputError) as error:
        stillair.h_cavity([15.0, 5000.0], 5.0, 0.01, 1.0)
    assert str(error.value) == "h_cavity: t1 must be in [-150, 800] °C for air, got 5000"


def test_a_film_inside_the_range_from_an_end_outside_is_refused():
    # (-200 + 60)/2 = -70 °C is inside air's range; -200 °C itself is not.
    with pytest.raises(stillair.InputError, match="ts must be in"):
        stillair.h_vplate(-200.0, 60.0, 0.5)
