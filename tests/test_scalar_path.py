"""The scalar path's shortcuts give what the array path gives.

One case in plain numbers is evaluated on numpy scalars, with a per-number form of the auto
rule's shortfalls (:meth:`Range.shortfall_of`) and element choice that makes no arrays
(:mod:`stillair._select`).  These are exact identities of the code, checked here against the
array forms they stand in for; the end-to-end agreement of every geometry and method is in
test_auto_continuity.py.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest

from stillair._select import any_true, ignoring_division_by, maximum, where
from stillair.correlations import CORRELATIONS, GEOMETRIES

EPS = np.finfo(float).eps


def _auto_ranges():
    """Every distinct Range an auto rule weighs."""
    seen = {}
    for geo in GEOMETRIES.values():
        for case in geo.cases or (None,):
            for step in geo.auto[case]:
                corr = CORRELATIONS[(geo.name, step.method)]
                for bound in (corr.ranges(case) if step.when is None else step.when):
                    seen[id(bound)] = bound
    return list(seen.values())


def _probe_values(bound) -> np.ndarray:
    """Each bound, the ends of its band, a few ulps either side of each, and values between."""
    marks = []
    for edge in (bound.low, bound.high):
        if math.isinf(edge):
            continue
        width = bound.transition
        if bound.log_scale and edge > 0:
            marks += [edge, edge * width, edge / width, edge * width ** 0.5, edge / width ** 0.5]
        elif not bound.log_scale:
            marks += [edge, edge + width, edge - width, edge + width / 2, edge - width / 2]
    probes = []
    for mark in marks:
        probes += [mark, *np.nextafter(mark, [np.inf, -np.inf]),
                   mark * (1 + 4 * EPS), mark * (1 - 4 * EPS), mark * (1 + 1e-10), mark * (1 - 1e-10)]
    spread = np.geomspace(1e-8, 1e14, 400) if bound.log_scale else np.linspace(-10.0, 190.0, 400)
    return np.concatenate([np.array(probes, dtype=float), spread, [0.0]])


RANGES = _auto_ranges()


@pytest.mark.parametrize("bound", RANGES, ids=lambda b: f"{b.quantity}[{b.low:g},{b.high:g}]{b.placement}")
def test_shortfall_of_one_number_is_the_array_shortfall(bound):
    """The scalar path reads Range.shortfall_of, the array path Range.shortfall (issue 19's rule
    weighs steps by shortfall; the per-number weight it replaced is gone)."""
    values = _probe_values(bound)
    # the shortfall of the quantity's value, however it is derived from the inputs
    whole = dataclasses.replace(bound, of=None).shortfall({bound.quantity.lower(): values})
    one = np.array([bound.shortfall_of(float(v)) for v in values])
    # the same arithmetic; math.log and numpy's vectorised log may differ in the last bits, which
    # a band's width (log 1.25 = 0.22) magnifies a few times; a value <= 0 is infinitely far
    # below a log-scale lower bound on both paths
    finite = np.isfinite(whole)
    np.testing.assert_array_equal(one[~finite], whole[~finite])
    np.testing.assert_allclose(one[finite], whole[finite], rtol=0, atol=64 * EPS)
    # well inside, both give exactly 0 (the step then covers fully: the rule reads no further)
    np.testing.assert_array_equal(one == 0.0, whole == 0.0)


def test_the_ranges_probed_include_every_kind_of_band():
    # the band "outside" a bound is gone with issue 19 (auto never weighs a correlation outside
    # its range there), so the rules read bands inside a bound and centred on one
    placements = {bound.placement for bound in RANGES}
    assert placements == {"inside", "centred"}
    assert any(bound.log_scale for bound in RANGES) and any(not bound.log_scale for bound in RANGES)


@pytest.mark.parametrize("condition, if_true, if_false", [
    (np.float64(3.0) > 2.0, np.float64(1.5), 2.5),
    (np.float64(1.0) > 2.0, np.float64(1.5), 2.5),
    (3.0 > 2.0, 1.5, 2.5), (1.0 > 2.0, 1.5, 2.5),
    (np.array([True, False, True]), np.array([1.0, 2.0, 3.0]), 0.0),
    (np.array(True), 1.0, np.array([4.0, 5.0])),
])
def test_where_chooses_as_numpy_does(condition, if_true, if_false):
    np.testing.assert_array_equal(where(condition, if_true, if_false), np.where(condition, if_true, if_false))


def test_where_on_a_numpy_boolean_makes_no_array():
    chosen = np.float64(1.5)
    assert where(np.float64(3.0) > 2.0, chosen, 2.5) is chosen


@pytest.mark.parametrize("condition, expected", [
    (np.bool_(True), True), (np.bool_(False), False), (True, True), (False, False),
    (np.array([False, False]), False), (np.array([False, True]), True), (np.array([], dtype=bool), False),
    (np.array(True), True), (np.array(False), False),
])
def test_any_true_is_numpy_any(condition, expected):
    assert any_true(condition) is expected


@pytest.mark.parametrize("a, b", [
    (1.0, 2.0), (2.0, 1.0), (-0.5, -0.5), (math.nan, 1.0), (1.0, math.nan), (math.inf, 3.0), (-math.inf, -1e300),
])
def test_maximum_of_two_numpy_scalars_is_numpy_maximum(a, b):
    got, expected = maximum(np.float64(a), np.float64(b)), np.maximum(np.float64(a), np.float64(b))
    assert type(got) is np.float64
    np.testing.assert_array_equal(got, expected)   # NaN propagates from either side


@pytest.mark.parametrize("a, b", [(np.array([1.0, 5.0]), np.float64(2.0)), (2.0, np.array([1.0, 3.0])), (1.0, 2.0)])
def test_maximum_of_anything_else_is_numpy_maximum(a, b):
    np.testing.assert_array_equal(maximum(a, b), np.maximum(a, b))
    assert type(maximum(a, b)) is type(np.maximum(a, b))


@pytest.mark.parametrize("denominator", [np.float64(0.0), np.array([0.0, 1.0]), 0.0])
def test_a_division_that_can_warn_is_still_silenced(denominator, recwarn):
    with np.errstate(divide="raise"), ignoring_division_by(denominator):
        np.divide(1.0, np.asarray(denominator))
    assert not recwarn


def test_a_nonzero_numpy_scalar_needs_no_error_state():
    with np.errstate(divide="raise"):
        assert not isinstance(ignoring_division_by(np.float64(2.0)), np.errstate)
        with pytest.raises(FloatingPointError):   # the state outside is left as it was
            with ignoring_division_by(np.float64(2.0)):
                np.divide(1.0, np.float64(0.0))
