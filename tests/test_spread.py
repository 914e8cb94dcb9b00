"""The spread of the published correlations: stillair.nu_spread and NU_SPREAD."""

from __future__ import annotations

import math

import numpy as np
import pytest

import stillair
from stillair.addin.cells.callpath import call
from stillair.correlations import methods_for


def _direct_in_range(geometry, case, **inputs):
    """Every covering method's Nu, computed one method at a time (the definition of the spread)."""
    values = {}
    for method in methods_for(geometry, case):
        result = stillair.nusselt(geometry, method, case, **inputs).scalar()
        if result.in_range:
            values[method] = result.nu
    return values


@pytest.mark.parametrize("geometry, case, inputs", [
    ("hcyl", None, dict(ra=1e6, pr=0.71)),
    ("hcyl", None, dict(ra=1e-7, pr=0.71)),
    ("vplate", None, dict(ra=1e8, pr=0.71)),
    ("hplate", "hot-up", dict(ra=1e6, pr=0.71)),
    ("hplate", "cold-up", dict(ra=1e6, pr=0.71)),
    ("tplate", "hot-down", dict(ra=1e7, pr=0.71, tilt=30.0)),
    ("vcyl", None, dict(ra=1e6, pr=0.71, slenderness=10.0)),
    ("cavity", None, dict(ra=1e5, pr=0.71, aspect=20.0, tilt=90.0)),
    ("cavity", None, dict(ra=1e4, pr=0.71, aspect=40.0, tilt=30.0)),
])
def test_spread_is_the_lowest_and_highest_covering_correlation(geometry, case, inputs):
    expected = _direct_in_range(geometry, case, **inputs)
    spread = stillair.nu_spread(geometry, case=case, **inputs)
    assert spread.count == len(expected) > 0
    assert set(spread.methods) == set(expected)
    assert spread.low == min(expected.values()) and spread.high == max(expected.values())
    assert expected[spread.methods[0]] == spread.low and expected[spread.methods[-1]] == spread.high


def test_no_covering_correlation_gives_nan_and_count_zero():
    spread = stillair.nu_spread("hplate", 0.1, 0.71, case="hot-up")   # below every method (VDI from Ra f2 = 1)
    assert spread.count == 0 and spread.methods == ()
    assert math.isnan(spread.low) and math.isnan(spread.high)


@pytest.mark.parametrize("typed", ["VCYL", " VCyl "])
def test_the_geometry_name_is_read_as_every_function_reads_it(typed):
    """Case and spaces are free in a geometry name (common practice of the cell functions)."""
    assert stillair.nu_spread(typed, 1e6, 0.71, slenderness=10.0) == stillair.nu_spread(
        "vcyl", 1e6, 0.71, slenderness=10.0)


def test_cavity_tilt_defaults_to_vertical_like_nu_cavity():
    assert stillair.nu_spread("cavity", 1e5, 0.71, aspect=20.0) == stillair.nu_spread(
        "cavity", 1e5, 0.71, aspect=20.0, tilt=90.0)


@pytest.mark.parametrize("geometry, case, extra", [
    ("vplate", None, {}), ("hplate", "hot-up", {}), ("hplate", "hot-down", {}),
    ("tplate", "cold-down", {"tilt": 40.0}), ("hcyl", None, {}), ("sphere", None, {}),
    ("vcyl", None, {"slenderness": 8.0}), ("cavity", None, {"aspect": 30.0, "tilt": 90.0}),
    ("cavity", None, {"aspect": 6.0, "tilt": 90.0}), ("cavity", None, {"aspect": 20.0, "tilt": 30.0}),
])
def test_auto_lies_in_the_spread_wherever_auto_is_in_range(geometry, case, extra):
    ra = np.logspace(-6, 12, 400)
    spread = stillair.nu_spread(geometry, ra, 0.71, case=case, **extra)
    auto = stillair.nusselt(geometry, "auto", case, ra=ra, pr=0.71, **extra)
    checked = auto.in_range & (spread.count > 0)
    assert checked.sum() > 50
    assert np.all(auto.nu[checked] >= spread.low[checked] * (1 - 1e-12))
    assert np.all(auto.nu[checked] <= spread.high[checked] * (1 + 1e-12))


def test_vectorised_spread_equals_the_scalar_one():
    ra = np.array([1e-7, 1e3, 1e9])
    spread = stillair.nu_spread("hcyl", ra, 0.71)
    for i, value in enumerate(ra):
        one = stillair.nu_spread("hcyl", value, 0.71)
        assert (spread.low[i], spread.high[i], spread.count[i], spread.methods[i]) == (
            one.low, one.high, one.count, one.methods)


def test_errors_name_the_argument():
    with pytest.raises(stillair.InputError) as error:
        stillair.nu_spread("plate", 1e5, 0.71)
    assert str(error.value).startswith('nu_spread: geometry must be one of "vplate"')
    with pytest.raises(stillair.InputError) as error:
        stillair.nu_spread("cavity", 1e5, 0.71)
    assert str(error.value) == 'nu_spread: aspect must be a number for geometry "cavity", got None'


def test_cell_spills_one_row():
    spread = stillair.nu_spread("hcyl", 1e6, 0.71)
    assert call("NU_SPREAD", "hcyl", 1e6, 0.71) == [
        [spread.low, spread.high, 3.0, "kuehn-goldstein < churchill-chu < morgan"]]
    # vertical cylinder: the aspect cell is height/diameter
    assert call("NU_SPREAD", "vcyl", 1e6, 0.71, None, None, 10.0)[0][0] == pytest.approx(
        stillair.nu_spread("vcyl", 1e6, 0.71, slenderness=10.0).low)
    assert call("NU_SPREAD", "hplate", 0.1, 0.71, "hot-up") == [["", "", 0.0, ""]]
    assert call("NU_SPREAD", "cavity", 1e5, 0.71) == (
        'NU_SPREAD: aspect must be a number for geometry "cavity", got an empty cell')
