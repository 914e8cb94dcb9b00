""""auto" at the edges of its map: three properties over a fine sweep, and the square cavity.

(1) Wherever a correlation auto may use covers a point, auto lies inside [nu_spread low, high]
    (physical sense of the rule: auto prefers what is valid, so it never leaves the range of
    the published correlations that apply).
(2) No step above 1 % between neighbours: tests/test_auto_continuity.py (the same grids,
    bisected 40 times); the short-cavity lines are added to its lattice there.
(3) Inside in-range regions Nu never decreases as Ra increases at fixed other inputs (every
    registered correlation rises with Ra; physical law: more buoyancy, more heat transfer).

The lattice sweep evaluates 294,147 points (every natural-convection geometry and case, 161 Ra
values per line; lines ON published bounds, H/L = 1, 10, 12, 40, 110 and Pr 0.01, on purpose); a
second sweep draws 1,000 random lines per geometry and case (seeded), so that what a lattice
line happens to miss is found too.  The points each test checks are counted and printed
(pytest -s shows them).

An "edge" is where every step of the rule lies within NEAREST_MARGIN of a band of a bound or
beyond (the least shortfall d_min > 1/(1 + NEAREST_MARGIN); stillair.correlations.auto): where
two published ranges only touch (conduction's Ra sin(tilt) <= 1e3 and Catton's Ra >= 1e3;
Catton's H/L <= 10 and MacGregor-Emery's H/L >= 10; the vertical methods' tilt reach at the
critical tilt) no band lies inside both, so a value without a step must hand over there across
NEAREST_MARGIN of a band, and only there may a correlation just outside its range take a share
while another is valid.  Points and pairs at an edge are counted apart, with a ratchet each.

What is left is held as a ratchet (the test fails if a count grows; lower the entry as it is
mended), measured when the rule of issue 19 was rewritten to hand over across whole bands:
(1) at edges: cavity 40 of 102,435 covered points, vcyl 2; elsewhere one cavity point
    (KNOWN_OUTSIDE), where Catton's published range jumps at H/L = 2 (its short band reads
    Ra Pr/(0.2+Pr) >= 1e3, its tall band Ra >= 1e3) and auto reads each band's own range.
(3) falls of one correlation by itself (KNOWN_OWN_FALLS: vcyl 14, Popiel's curvature term at
    Pr 0.01-0.02, slenderness 35-60, falling faster than the plate term rises, as ht's
    Nu_vertical_cylinder_Popiel_Churchill does too; cavity 1, MacGregor-Emery's own published
    step from its laminar to its turbulent box at Ra 1e7, where both boxes lie on the tilt
    reach's bound) are the literature's; at edges (KNOWN_FALLS_AT_EDGES: cavity 45 of 101,435
    in-range pairs) a hand-over
    across NEAREST_MARGIN of a band between correlations that disagree; elsewhere
    (KNOWN_FALLS): cavity 2 pairs at Ra 316-398, H/L 40, falling by 2e-6 and 7e-7 relative
    (ElSherbiny's conduction regime, 1 + 3e-7, takes over from Wright's, 1 + 1e-4), and vcyl 1
    (Churchill-Chu's thin-cylinder criterion and Popiel's Ra bound overlap so little at
    Pr 0.02 that the plate result, barely inside its own band, must take over within Popiel's).
On the random lines, (1) (KNOWN_RANDOM_BRIDGED, KNOWN_RANDOM_OUTSIDE): cavity 254 of 151,534
covered points outside the spread at an edge and 1 elsewhere (Catton's jumping range again: Ra
1259, H/L 1.92), vcyl 14 at an edge; (3) (KNOWN_RANDOM_FALLS): cavity 5 pairs elsewhere, the largest 5e-4 relative
(the nearest rule the issue found gave 256, the largest 36 %), vcyl 13, the largest 6.5 % (the
Churchill-Chu/Popiel overlap at Pr below 0.6, as on the lattice).
"""

from __future__ import annotations

import dataclasses
import itertools

import numpy as np
import pytest

from stillair.correlations import CORRELATIONS, GEOMETRIES, nu_spread, nusselt
from stillair.correlations.auto import NEAREST_MARGIN, _compiled_steps, _shortfall

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
#: Points outside the spread, at an edge / elsewhere, and falls with Ra, by reason (module text).
KNOWN_BRIDGED = {"vcyl": 2, "cavity": 40}
KNOWN_OUTSIDE = {"cavity": 1}
KNOWN_OWN_FALLS = {"vcyl": 14, "cavity": 1}
KNOWN_FALLS_AT_EDGES = {"cavity": 45}
KNOWN_FALLS = {"vcyl": 1, "cavity": 2}
KNOWN_RANDOM_FALLS = {"vcyl": 13, "cavity": 5}
KNOWN_RANDOM_BRIDGED = {"vcyl": 14, "cavity": 254}
KNOWN_RANDOM_OUTSIDE = {"cavity": 1}

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
    return inputs, auto, _spread_of(geometry, case, inputs)


def _spread_of(geometry, case, inputs):
    return nu_spread(geometry, inputs["ra"], inputs["pr"], case=case, tilt=inputs.get("tilt"),
                     aspect=inputs.get("aspect"), slenderness=inputs.get("slenderness"))


def _outside(geometry, case, inputs, auto, spread):
    """Covered points outside the spread, (at an edge, elsewhere) as boolean arrays."""
    usable = set(GEOMETRIES[geometry].auto_methods(case))
    covered = np.vectorize(lambda methods: any(m.split(" (")[0] in usable for m in methods),
                           otypes=[bool])(spread.methods)
    tolerance = 1e-9 * np.abs(spread.high)
    outside = covered & ((auto.nu < spread.low - tolerance) | (auto.nu > spread.high + tolerance))
    edge = _at_an_edge(geometry, case, inputs)
    return covered, outside & edge, outside & ~edge


@pytest.mark.slow  # a few seconds of sweeps
@pytest.mark.parametrize("geometry, case", CASES, ids=str)
def test_auto_lies_inside_the_spread_on_random_lines(geometry, case):
    """Property (1) on the 1,000 seeded random lines of each geometry and case."""
    inputs = _random_lines(geometry)
    auto = nusselt(geometry, "auto", case, notes=False, **inputs)
    covered, at_edge, elsewhere = _outside(geometry, case, inputs, auto, _spread_of(geometry, case, inputs))
    print(f"{geometry} {case}: {covered.sum()} covered points on random lines, {at_edge.sum()} outside "
          f"at an edge, {elsewhere.sum()} elsewhere")
    assert elsewhere.sum() <= KNOWN_RANDOM_OUTSIDE.get(geometry, 0)
    assert at_edge.sum() <= KNOWN_RANDOM_BRIDGED.get(geometry, 0)


@pytest.mark.slow  # a few seconds of sweeps
@pytest.mark.parametrize("geometry, case", CASES, ids=str)
def test_auto_lies_inside_the_spread_wherever_a_correlation_it_uses_covers(geometry, case):
    inputs, auto, spread = _sweep(geometry, case)
    covered, at_edge, elsewhere = _outside(geometry, case, inputs, auto, spread)
    print(f"{geometry} {case}: {covered.sum()} covered points of {covered.size}, "
          f"{at_edge.sum()} outside at an edge, {elsewhere.sum()} elsewhere")
    where = [(float(inputs["ra"][i]), {k: float(v[i]) for k, v in inputs.items() if k != "ra"},
              float(auto.nu[i]), float(spread.low[i]), float(spread.high[i]))
             for i in zip(*np.nonzero(elsewhere))][:5]
    assert elsewhere.sum() <= KNOWN_OUTSIDE.get(geometry, 0), \
        f"{elsewhere.sum()} points outside the spread, e.g. {where}"
    assert at_edge.sum() <= KNOWN_BRIDGED.get(geometry, 0)


def _at_an_edge(geometry, case, inputs):
    """Where every step of the rule lies within NEAREST_MARGIN of a band of its bound: the only
    points where the rule gives a correlation outside its range a share (the least shortfall
    d_min > 1/(1 + NEAREST_MARGIN); stillair.correlations.auto)."""
    flat = {k: np.ravel(v) for k, v in inputs.items()}
    shortfalls = [np.broadcast_to(_shortfall(ranges, flat, None), flat["ra"].shape)
                  for _, ranges, _ in _compiled_steps(GEOMETRIES[geometry], case)]
    return (np.minimum.reduce(shortfalls) > 1.0 / (1.0 + NEAREST_MARGIN)).reshape(inputs["ra"].shape)


def _falls(geometry, case, inputs, auto):
    """The in-range neighbour pairs along Ra, and where Nu falls: (pairs, own, at an edge,
    elsewhere) as boolean arrays over the pairs.  Own: auto is one correlation by itself at
    both points and that correlation, named explicitly, falls there too."""
    checked = nusselt(geometry, "auto", case, **inputs)
    in_range = checked.in_range[:, :-1] & checked.in_range[:, 1:]
    falls = in_range & (auto.nu[:, 1:] < auto.nu[:, :-1] * (1 - 1e-12))
    alone = (checked.blend[:, 1:] == "") & (checked.blend[:, :-1] == "") & \
        (checked.method[:, 1:] == checked.method[:, :-1])
    own = np.zeros_like(falls)
    for i, j in zip(*np.nonzero(falls & alone)):
        named = nusselt(geometry, str(checked.method[i, j]), case,
                        **{k: v[i, j:j + 2] for k, v in inputs.items()}).nu
        own[i, j] = named[1] < named[0]
    edge = _at_an_edge(geometry, case, inputs)
    at_edge = falls & ~own & (edge[:, 1:] | edge[:, :-1])
    return in_range, own, at_edge, falls & ~own & ~at_edge


def _where(inputs, auto, pairs):
    return [(float(inputs["ra"][i, j]), {k: float(v[i, j]) for k, v in inputs.items() if k != "ra"},
             f"{1 - auto.nu[i, j + 1] / auto.nu[i, j]:.2e} relative")
            for i, j in zip(*np.nonzero(pairs))][:5]


@pytest.mark.slow  # a few seconds of sweeps
@pytest.mark.parametrize("geometry, case", CASES, ids=str)
def test_auto_never_falls_as_ra_rises_in_range(geometry, case):
    inputs, auto, _ = _sweep(geometry, case)
    pairs, own, at_edge, elsewhere = _falls(geometry, case, inputs, auto)
    print(f"{geometry} {case}: {pairs.sum()} in-range neighbour pairs, {own.sum()} falls of one "
          f"correlation by itself, {at_edge.sum()} at an edge, {elsewhere.sum()} elsewhere")
    assert elsewhere.sum() <= KNOWN_FALLS.get(geometry, 0), \
        f"{elsewhere.sum()} falls, e.g. {_where(inputs, auto, elsewhere)}"
    assert at_edge.sum() <= KNOWN_FALLS_AT_EDGES.get(geometry, 0), \
        f"{at_edge.sum()} falls at an edge, e.g. {_where(inputs, auto, at_edge)}"
    assert own.sum() <= KNOWN_OWN_FALLS.get(geometry, 0)


#: The random lines: each input other than Ra drawn log-uniformly (tilt uniformly) over these
#: spans, wider than every published range.
RANDOM_SPAN = {"pr": (0.005, 2e4), "aspect": (0.8, 150.0), "slenderness": (0.1, 1e3), "tilt": (0.0, 180.0)}
RANDOM_LINES = 1000
RANDOM_RA = np.logspace(-1, 12, 261)


def _random_lines(geometry):
    rng = np.random.default_rng(19)
    inputs = {}
    for name in GEOMETRIES[geometry].inputs:
        if name == "ra":
            continue
        low, high = RANDOM_SPAN[name]
        if name == "tilt":
            values = rng.uniform(low, 90.0 if geometry == "tplate" else high, RANDOM_LINES)
        else:
            values = np.exp(rng.uniform(np.log(low), np.log(high), RANDOM_LINES))
        inputs[name] = np.repeat(values[:, None], RANDOM_RA.size, axis=1)
    inputs["ra"] = np.broadcast_to(RANDOM_RA, (RANDOM_LINES, RANDOM_RA.size))
    return inputs


@pytest.mark.slow  # a few seconds of sweeps
@pytest.mark.parametrize("geometry, case", CASES, ids=str)
def test_auto_falls_on_random_lines_are_counted(geometry, case):
    """What the lattice lines miss: 1,000 seeded random lines per geometry and case."""
    inputs = _random_lines(geometry)
    auto = nusselt(geometry, "auto", case, notes=False, **inputs)
    pairs, own, at_edge, elsewhere = _falls(geometry, case, inputs, auto)
    print(f"{geometry} {case}: {pairs.sum()} in-range neighbour pairs on random lines, {own.sum()} "
          f"falls of one correlation by itself, {at_edge.sum()} at an edge, {elsewhere.sum()} elsewhere")
    assert elsewhere.sum() <= KNOWN_RANDOM_FALLS.get(geometry, 0), \
        f"{elsewhere.sum()} falls, e.g. {_where(inputs, auto, elsewhere)}"


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


# --- the rule's arithmetic on one number is the array's ------------------------------------------

def _rule_ranges():
    """Every distinct Range the auto rules read (their whens and the published ranges)."""
    seen = {}
    for geo in GEOMETRIES.values():
        for case in geo.cases or (None,):
            for _, ranges, _ in _compiled_steps(geo, case):
                for bound, _ in ranges:
                    seen[id(bound)] = bound
    return list(seen.values())


@pytest.mark.parametrize("bound", _rule_ranges(), ids=lambda b: f"{b.quantity}[{b.low:g},{b.high:g}]{b.placement}")
def test_shortfall_is_what_the_weight_lacks_inside_the_band(bound):
    """The rule's shortfall and the spread's weight read one band (the scalar shortfall against
    the array's: tests/test_scalar_path.py)."""
    values = np.concatenate([np.geomspace(1e-8, 1e14, 300) if bound.log_scale else np.linspace(-10.0, 190.0, 300),
                             [bound.low, bound.high] if np.isfinite([bound.low, bound.high]).all() else [], [0.0]])
    plain = dataclasses.replace(bound, of=None)
    whole = plain.shortfall({bound.quantity.lower(): values})
    # 0 where the range's weight is 1, 1 - weight across the band, above 1 beyond it
    weight = plain.weight({bound.quantity.lower(): values})
    inside_band = (whole > 0.0) & (whole < 1.0)
    np.testing.assert_allclose(whole[inside_band], 1.0 - weight[inside_band], atol=1e-12)
    assert (weight[whole == 0.0] == 1.0).all() and (weight[whole >= 1.0] == 0.0).all()


def test_the_weights_add_up_to_one_and_reach_only_valid_correlations_off_the_edges():
    """The rule's two guarantees on random cavities: the weights add up to 1, and a correlation
    outside its published ranges (those auto reads: Range.in_auto) weighs nothing unless every
    step lies at an edge."""
    from stillair.correlations.auto import _step_weights
    rng = np.random.default_rng(19)
    n = 20000
    inputs = {"ra": 10 ** rng.uniform(-2, 12, n), "pr": 10 ** rng.uniform(-1, 2, n),
              "aspect": 10 ** rng.uniform(-0.5, 2.5, n), "tilt": rng.uniform(0.0, 180.0, n)}
    geo = GEOMETRIES["cavity"]
    weights = _step_weights(geo, None, inputs, None)
    np.testing.assert_allclose(np.sum(weights, axis=0), 1.0, rtol=0, atol=1e-12)
    edge = _at_an_edge("cavity", None, inputs)
    for (method, _, _), weight in zip(_compiled_steps(geo, None), weights):
        published = [bound for bound in CORRELATIONS[("cavity", method)].ranges(None) if bound.in_auto]
        inside = np.all([bound.inside(inputs) for bound in published], axis=0)
        assert not ((weight > 0.0) & ~inside & ~edge).any(), method


def test_the_scalar_paths_early_stop_leaves_every_weight_as_the_arrays_give_it():
    """The scalar path stops reading a step's ranges once it surely weighs nothing (and reads no
    step past one that covers fully); on random cavities and on the property lattice (bounds,
    bands and their corners) its weights are the array path's, which reads every range."""
    from stillair.correlations.auto import _step_weights
    geo = GEOMETRIES["cavity"]
    rng = np.random.default_rng(23)
    n = 4000
    random = {"ra": 10 ** rng.uniform(-1, 11, n), "pr": 10 ** rng.uniform(-0.5, 1.5, n),
              "aspect": 10 ** rng.uniform(-0.2, 2.3, n), "tilt": rng.uniform(0.0, 180.0, n)}
    others, combos = _lines("cavity")
    lattice = [dict(zip(others, combo), ra=ra) for combo in combos[::3] for ra in RA[::4]][::5]
    arrays = {k: np.concatenate([random[k], [p[k] for p in lattice]]) for k in random}
    whole = np.array([np.broadcast_to(w, arrays["ra"].shape) for w in _step_weights(geo, None, arrays, None)])
    for index in range(arrays["ra"].size):
        plain = {k: float(v[index]) for k, v in arrays.items()}
        one = _step_weights(geo, None, {k: np.float64(v) for k, v in plain.items()}, plain)
        np.testing.assert_allclose(one, whole[:, index], rtol=0, atol=1e-12, err_msg=str(plain))
    print(f"{arrays['ra'].size} points compared")
