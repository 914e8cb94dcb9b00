"""insulation_thickness: the thickness at which an insulated pipe or face has a given outer surface
temperature.

Checks: the network solver, with the cylindrical-shell resistance of the `ht` library
(ht.conduction.R_cylinder) for the insulation, puts the outer surface on the target at the
returned thickness; the flat face's explicit law; directions; the errors.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

import stillair
from stillair import InputError, insulation_thickness
from stillair.plausibility import UnitSlipWarning

ht_conduction = pytest.importorskip("ht.conduction")


def _surface_with(thickness, t_inner, t_air, conductivity, emissivity, diameter, length=1.0):
    """The outer surface temperature of the insulated pipe solved as a network (ht's resistance)."""
    outer = diameter + 2.0 * thickness
    resistance = ht_conduction.R_cylinder(diameter, outer, conductivity, length)
    branches = [["ins", "pipe", "surf", "resistance", resistance],
                ["conv", "surf", "air", "hcyl", outer, math.pi * outer * length],
                ["rad", "surf", "room", "radiation", emissivity, None, math.pi * outer * length]]
    bounds = [["pipe", "T", t_inner], ["air", "T", t_air], ["room", "T", t_air]]
    return stillair.solve_network(branches, bounds).temperatures["surf"]


@pytest.mark.parametrize("t_inner, t_air, t_surface, k, eps, diameter", [
    (150.0, 20.0, 50.0, 0.04, 0.3, 0.1143),     # a steam pipe to a touch limit
    (6.0, 25.0, 20.1, 0.035, 0.9, 0.0603),      # a chilled-water pipe above its dew point
    (-30.0, 20.0, 15.0, 0.03, 0.9, 0.0334),     # a refrigerant line
    (400.0, 30.0, 55.0, 0.06, 0.2, 0.2731),
])
def test_the_network_puts_the_pipe_surface_on_the_target(t_inner, t_air, t_surface, k, eps, diameter):
    thickness = insulation_thickness(t_inner, t_air, t_surface, k, eps, "hcyl", diameter)
    assert thickness > 0
    assert _surface_with(thickness, t_inner, t_air, k, eps, diameter) == pytest.approx(t_surface, abs=1e-6)


@pytest.mark.parametrize("geometry, size, facing", [("vplate", 1.2, None), ("hplate", 0.4, "up"),
                                                    ("hplate", 0.4, "down")])
def test_a_flat_face_follows_the_slab_law(geometry, size, facing):
    t_inner, t_air, t_surface, k, eps = 5.0, 24.0, 19.0, 0.035, 0.85
    thickness = insulation_thickness(t_inner, t_air, t_surface, k, eps, geometry, size, facing)
    h_conv = stillair.surface_convection(geometry, t_surface, t_air, size, facing=facing).h
    passed = float(h_conv) * (t_air - t_surface) + stillair.h_rad(t_surface, t_air, eps) * (t_air - t_surface)
    assert k * (t_surface - t_inner) / thickness == pytest.approx(passed, rel=1e-12)


def test_directions_and_limits():
    base = insulation_thickness(6.0, 25.0, 20.0, 0.035, 0.9, "hcyl", 0.06)
    assert insulation_thickness(6.0, 25.0, 21.0, 0.035, 0.9, "hcyl", 0.06) > base   # closer to the air
    assert insulation_thickness(6.0, 25.0, 20.0, 0.045, 0.9, "hcyl", 0.06) > base   # a worse insulant
    assert insulation_thickness(2.0, 25.0, 20.0, 0.035, 0.9, "hcyl", 0.06) > base   # a colder pipe
    assert insulation_thickness(6.0, 25.0, 6.0, 0.035, 0.9, "hcyl", 0.06) == 0.0     # the bare pipe
    # separate surroundings colder than the air pull the surface down: more insulation needed
    assert insulation_thickness(6.0, 25.0, 20.0, 0.035, 0.9, "hcyl", 0.06, t_surroundings=22.0) > base


def test_arrays_broadcast():
    thickness = insulation_thickness(6.0, 25.0, [19.0, 20.0, 21.0], 0.035, 0.9, "hcyl", [[0.03], [0.06]])
    assert thickness.shape == (2, 3)
    assert np.all(np.diff(thickness, axis=1) > 0)
    assert thickness[1, 1] == insulation_thickness(6.0, 25.0, 20.0, 0.035, 0.9, "hcyl", 0.06)


@pytest.mark.parametrize("kwargs, message", [
    (dict(t_surface=26.0), "insulation_thickness: t_surface must be between t_inner (6 °C) and the temperature an "
                           "unlimited thickness approaches, near t_air (25 °C): no insulated diameter up to 10000 x "
                           "the pipe's reaches it, got 26"),
    (dict(conductivity=0.0), "insulation_thickness: conductivity must be > 0 W/(m·K), got 0"),
    (dict(geometry="sphere"), 'insulation_thickness: geometry must be one of "hcyl", "vplate", "hplate", got '
                              "'sphere'"),
    (dict(facing="up"), "insulation_thickness: facing must be blank for hcyl (only a horizontal face has one), "
                        "got 'up'"),
    (dict(geometry="hplate"), 'insulation_thickness: facing must be one of "up", "down", got None'),
    (dict(emissivity=1.5), "insulation_thickness: emissivity must be in [0, 1], got 1.5"),
])
def test_bad_input_is_named(kwargs, message):
    arguments = dict(t_inner=6.0, t_air=25.0, t_surface=20.0, conductivity=0.035, emissivity=0.9, geometry="hcyl",
                     size=0.06)
    arguments.update(kwargs)
    with pytest.raises(InputError) as caught:
        insulation_thickness(**arguments)
    assert str(caught.value) == message


def test_a_face_target_beyond_the_air_is_refused():
    with pytest.raises(InputError, match="would not take the heat"):
        insulation_thickness(6.0, 25.0, 26.0, 0.035, 0.9, "vplate", 1.0)


@settings(max_examples=30, deadline=None)
@given(t_inner=st.floats(-40.0, 400.0), t_air=st.floats(-20.0, 40.0), fraction=st.floats(0.05, 0.9),
       k=st.floats(0.02, 0.2), eps=st.floats(0.05, 1.0), diameter=st.floats(0.01, 0.6))
def test_any_pipe_reaches_its_target_through_the_network(t_inner, t_air, fraction, k, eps, diameter):
    """Property sweep: a target a fraction of the way from the pipe to the air."""
    assume(abs(t_inner - t_air) > 2.0)
    t_surface = t_inner + fraction * (t_air - t_inner)
    with warnings.catch_warnings():   # the balance holds in or out of the correlation's range
        warnings.simplefilter("ignore", stillair.CorrelationRangeWarning)
        thickness = insulation_thickness(t_inner, t_air, t_surface, k, eps, "hcyl", diameter)
    assert _surface_with(thickness, t_inner, t_air, k, eps, diameter) == pytest.approx(t_surface, abs=1e-6)


def test_unit_slips_speak_of_what_the_user_typed_only():
    """A pipe diameter typed in mm and kelvin temperatures get the unit-slip note; the search's
    own trial diameters (up to metres of insulation) never do (engine/plausibility.py rules)."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        insulation_thickness(150.0, 20.0, 50.0, 0.04, 0.3, "hcyl", 0.1143)
        insulation_thickness(150.0, 20.0, 20.5, 0.04, 0.3, "hcyl", 0.1143)   # a thick layer
        insulation_thickness(150.0, 20.0, 40.0, 0.04, 0.3, "vplate", 2.0)
    assert not [w for w in caught if issubclass(w.category, UnitSlipWarning)]
    for args, expected in [((150.0, 20.0, 50.0, 0.04, 0.3, "hcyl", 114.3),
                            "size = 114.3 m is large for this geometry"),
                           ((373.15, 293.15, 313.15, 0.04, 0.3, "vplate", 1.0),
                            "t_inner = 373.15 looks like a kelvin value")]:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            insulation_thickness(*args)
        slips = [str(w.message) for w in caught if issubclass(w.category, UnitSlipWarning)]
        assert len(slips) == 1 and expected in slips[0], slips
