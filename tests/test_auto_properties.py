""""auto" at the edges of its map: three properties over a fine sweep, and the square cavity.

(1) Wherever a correlation auto may use covers a point, auto lies inside [nu_spread low, high]
    (physical sense of the rule: auto prefers what is valid, so it never leaves the range of
    the published correlations that apply).
(2) No step above 1 % between neighbours: tests/test_auto_continuity.py (the same grids,
    bisected 40 times); the short-cavity lines are added to its lattice there.
(3) Inside in-range regions Nu never decreases as Ra increases at fixed other inputs (every
    registered correlation rises with Ra; physical law: more buoyancy, more heat transfer).

Points the sweep checks are counted and printed (pytest -s shows them).  Measured when written
(issue 19): (1) holds for every geometry but vcyl (105 of 2,532 covered points outside) and
cavity (1,874 of 105,217), where a correlation fading across the band inside its bound still
hands weight to an extrapolation (Hollands' aspect band, Catton's low-Ra band, points on a
bound of the lattice); (3) holds but for hcyl (4 falls), vcyl (15) and cavity (6)
of 194,452 in-range neighbour pairs.  The sweep evaluates 294,147 points (every geometry and
case, 161 Ra values per line), 208,967 of them covered by a correlation auto uses.  Those counts are held as a ratchet (KNOWN): the
test fails if they grow, and the entry is lowered as the rule is mended.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from stillair.correlations import GEOMETRIES, nu_spread, nusselt

# Grids: every geometry and case, in Ra, Pr, aspect, slenderness and tilt, with low Ra and
# short cavities at every tilt.
RA = np.logspace(-4, 12, 161)
GRID = {
    "pr": (0.01, 0.02, 0.71, 1.0, 1.1, 7.0, 100.0, 1e4),
    "aspect": (0.5, 0.9, 1.0, 1.1, 1.25, 1.5, 1.79, 1.8, 1.9, 2.0, 2.2, 3.0, 5.0, 8.0, 10.0, 12.0,
               15.0, 20.0, 40.0, 110.0, 150.0),
    "slenderness": (0.1, 1.0, 10.0, 35.0, 60.0, 100.0, 1e3),
}
TILT = {"cavity": (0.0, 2.0, 10.0, 25.0, 45.0, 53.0, 60.0, 70.0, 75.0, 80.0, 90.0, 120.0, 180.0),
        "tplate": (0.0, 10.0, 30.0, 45.0, 60.0, 75.0, 89.0)}
#: Points outside the spread / falls with Ra, as measured when written (see the module text).
KNOWN_OUTSIDE = {"vcyl": 105, "cavity": 1874}
KNOWN_FALLS = {"hcyl": 4, "vcyl": 15, "cavity": 6}

# For the spread property a point counts as covered when a method auto may use covers it; a
# point covered only by a method auto never picks (en673: the glazing standard's own
# procedure, asked for by name) constrains nothing auto does.


def _lines(geometry):
    geo = GEOMETRIES[geometry]
    others = [name for name in geo.inputs if name != "ra"]
    grid = dict(GRID, tilt=TILT.get(geometry, ()))
    if geometry == "cavity":
        grid["pr"] = (0.71, 1.1, 7.0)
    return others, list(itertools.product(*(grid[name] for name in others)))


# the natural-convection geometries (Ra in); the forced ones (Re in, stillair.forced) have their
# own checks in tests/test_wind.py
CASES = [(name, case) for name, geo in GEOMETRIES.items() if "ra" in geo.inputs
         for case in (geo.cases or (None,))]


def _sweep(geometry, case):
    others, combos = _lines(geometry)
    combos = np.array(combos, dtype=float).reshape(len(combos), len(others))
    inputs = {name: np.repeat(combos[:, i][:, None], RA.size, axis=1) for i, name in enumerate(others)}
    inputs["ra"] = np.broadcast_to(RA, (len(combos), RA.size))
    auto = nusselt(geometry, "auto", case, notes=False, **inputs)
    spread = nu_spread(geometry, inputs["ra"], inputs["pr"], case=case, tilt=inputs.get("tilt"),
                       aspect=inputs.get("aspect"), slenderness=inputs.get("slenderness"))
    return inputs, auto, spread


@pytest.mark.slow  # a few seconds of sweeps
@pytest.mark.parametrize("geometry, case", CASES, ids=str)
def test_auto_lies_inside_the_spread_wherever_a_correlation_it_uses_covers(geometry, case):
    inputs, auto, spread = _sweep(geometry, case)
    usable = set(GEOMETRIES[geometry].auto_methods(case))
    covered = np.vectorize(lambda methods: any(m.split(" (")[0] in usable for m in methods),
                           otypes=[bool])(spread.methods)
    tolerance = 1e-9 * np.abs(spread.high)
    outside = covered & ((auto.nu < spread.low - tolerance) | (auto.nu > spread.high + tolerance))
    print(f"{geometry} {case}: {covered.sum()} covered points of {covered.size}")
    where = [(float(inputs["ra"][i]), {k: float(v[i]) for k, v in inputs.items() if k != "ra"},
              float(auto.nu[i]), float(spread.low[i]), float(spread.high[i]))
             for i in zip(*np.nonzero(outside))][:5]
    assert outside.sum() <= KNOWN_OUTSIDE.get(geometry, 0), \
        f"{outside.sum()} points outside the spread, e.g. {where}"


@pytest.mark.slow  # a few seconds of sweeps
@pytest.mark.parametrize("geometry, case", CASES, ids=str)
def test_auto_never_falls_as_ra_rises_in_range(geometry, case):
    inputs, auto, _ = _sweep(geometry, case)
    checked = nusselt(geometry, "auto", case, **inputs)
    in_range = checked.in_range[:, :-1] & checked.in_range[:, 1:]
    falls = in_range & (auto.nu[:, 1:] < auto.nu[:, :-1] * (1 - 1e-12))
    print(f"{geometry} {case}: {in_range.sum()} in-range neighbour pairs")
    where = [(float(inputs["ra"][i, j]), {k: float(v[i, j]) for k, v in inputs.items() if k != "ra"})
             for i, j in zip(*np.nonzero(falls))][:5]
    assert falls.sum() <= KNOWN_FALLS.get(geometry, 0), f"{falls.sum()} falls, e.g. {where}"


# --- the square cavity ------------------------------------------------------------------------

#: G. de Vahl Davis, Natural convection of air in a square cavity: a bench mark numerical
#: solution, Int. J. Numer. Methods Fluids 3 (1983) 249-264 (its abstract read through the
#: search tool); the mean Nusselt numbers 2.243, 4.519, 8.800 at Ra 1e4, 1e5, 1e6 (Pr 0.71) as
#: transcribed in public benchmark code read through the search tool (the paper's table itself
#: was not read: from those transcriptions, which agree with one another).
DE_VAHL_DAVIS = {1e4: 2.243, 1e5: 4.519, 1e6: 8.800}


@pytest.mark.parametrize("ra, reference", sorted(DE_VAHL_DAVIS.items()))
def test_the_square_cavity_meets_the_benchmark_within_ten_percent(ra, reference):
    result = nusselt("cavity", "auto", ra=ra, pr=0.71, aspect=1.0, tilt=90.0).scalar()
    assert result.method == "catton" and result.in_range
    assert result.nu == pytest.approx(reference, rel=0.10)


def test_a_near_square_cavity_keeps_catton_rather_than_an_extrapolation():
    """Between H/L 1 and 1.25 only Catton's short-layer form is in range; auto keeps it."""
    aspect = np.linspace(1.0, 1.25, 26)
    auto = nusselt("cavity", "auto", ra=1e5, pr=0.71, aspect=aspect, tilt=90.0)
    catton = nusselt("cavity", "catton", ra=1e5, pr=0.71, aspect=aspect, tilt=90.0)
    np.testing.assert_allclose(auto.nu, catton.nu, rtol=1e-12)
    assert auto.in_range.all()


def test_below_aspect_one_auto_extrapolates_the_nearest_range_with_the_note():
    result = nusselt("cavity", "auto", ra=1e5, pr=0.71, aspect=0.8, tilt=90.0).scalar()
    assert result.method == "catton" and "aspect = 0.8 below 1" in result.note


@pytest.mark.parametrize("tilt", [45.0, 60.0, 75.0, 90.0])
@pytest.mark.parametrize("ra", [2.5e3, 2.75e3, 3e3])
def test_no_step_where_catton_tall_form_begins(ra, tilt):
    """The former edge at H/L = 2/sqrt(1.25) = 1.7889 stepped by up to 15 % at these points."""
    aspect = np.linspace(1.7, 1.9, 4001)
    nu = nusselt("cavity", "auto", ra=ra, pr=0.71, aspect=aspect, tilt=tilt, notes=False).nu
    assert np.max(np.abs(np.diff(nu)) / nu[:-1]) < 1e-3
