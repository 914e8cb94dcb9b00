""""auto" has no steps: every geometry swept finely in every input.

Physical law (common practice): the heat transfer of a geometry changes continuously with Ra,
Pr, aspect, tilt and slenderness, so the value "auto" reports must too.  Each input is swept on
a fine grid along lines through a lattice of the other inputs (inside and far outside every
published range).  Any rise or fall of more than 1 % between neighbouring points is then
bisected 40 times: a smooth but steep stretch (Hollands' onset, Ra cos(tilt) near 90 deg)
shrinks to nothing, a step keeps its size and fails the test with where it is.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from stillair.correlations import GEOMETRIES, nusselt

pytestmark = pytest.mark.slow  # long sweeps of every geometry with bisection

STEP = 0.01          # the largest change allowed between neighbouring points
BISECTIONS = 40

LATTICE = {
    "ra": np.logspace(-4, 12, 17),
    "pr": (0.01, 0.71, 1.1, 7.0, 100.0, 1e4),
    "aspect": (0.5, 1.0, 1.25, 1.5, 1.79, 1.9, 2.0, 3.0, 5.0, 8.0, 9.5, 10.0, 11.0, 12.0, 13.0, 15.0, 20.0, 40.0,
               100.0, 150.0),
    "slenderness": (0.1, 1.0, 10.0, 60.0, 100.0, 1e3),
    "re": np.logspace(-2, 9, 12),   # the wind's forced flows (engine/forced.py)
}
LATTICE_TILT = {"cavity": (0.0, 0.01, 3.0, 10.0, 30.0, 60.0, 67.0, 69.0, 70.0, 72.0, 75.0, 80.0, 90.0,
                           120.0, 170.0, 180.0),
                "tplate": (0.0, 10.0, 30.0, 45.0, 60.0, 75.0, 89.0, 90.0)}
CAVITY_PR = (0.71, 1.1, 7.0)  # gases and, for MacGregor-Emery's range, liquids

FINE = {
    "ra": lambda geo: np.logspace(-6, 13, 19 * 250),
    "pr": lambda geo: np.logspace(-2.3, 4.3, 1600),
    "aspect": lambda geo: np.logspace(np.log10(0.3), 3, 2000),
    "slenderness": lambda geo: np.logspace(-1.5, 3.5, 1500),
    "re": lambda geo: np.logspace(-3, 9.5, 12 * 250),
    # The stable face of a tilted plate reads Ra cos(tilt): continuous at 90 deg, but with a
    # slope that no finite grid resolves there, so the sweep stops 0.1 deg short of it.
    "tilt": lambda geo: np.linspace(0.0, 180.0, 3601) if geo == "cavity" else np.linspace(0.0, 89.9, 1800),
}


def _lines(geometry: str, swept: str):
    geo = GEOMETRIES[geometry]
    lattice = dict(LATTICE, tilt=LATTICE_TILT.get(geometry, ()))
    if geometry == "cavity":
        lattice.update(pr=CAVITY_PR, ra=np.logspace(0, 11, 12))
    others = [name for name in geo.inputs if name != swept]
    combos = np.array(list(itertools.product(*(lattice[name] for name in others))), dtype=float)
    return others, combos


def _evaluate(geometry, case, inputs):
    return nusselt(geometry, "auto", case, notes=False, **inputs).nu


def _relative_change(a, b):
    return np.abs(b - a) / np.minimum(np.abs(a), np.abs(b))


def find_steps(geometry: str, case, swept: str):
    """[(size, swept value, other inputs)] of every step > STEP that survives bisection."""
    others, combos = _lines(geometry, swept)
    x = FINE[swept](geometry)
    inputs = {name: np.repeat(combos[:, i][:, None], x.size, axis=1) for i, name in enumerate(others)}
    inputs[swept] = np.broadcast_to(x, (len(combos), x.size))
    nu = _evaluate(geometry, case, inputs)
    change = _relative_change(nu[:, :-1], nu[:, 1:])
    line, at = np.nonzero(change > STEP)
    if line.size == 0:
        return []
    low, high = x[at].copy(), x[at + 1].copy()
    fixed = {name: combos[line, i] for i, name in enumerate(others)}
    nu_low, nu_high = nu[line, at], nu[line, at + 1]
    for _ in range(BISECTIONS):
        middle = 0.5 * (low + high)
        nu_middle = _evaluate(geometry, case, dict(fixed, **{swept: middle}))
        left = _relative_change(nu_low, nu_middle) >= _relative_change(nu_middle, nu_high)
        high, nu_high = np.where(left, middle, high), np.where(left, nu_middle, nu_high)
        low, nu_low = np.where(left, low, middle), np.where(left, nu_low, nu_middle)
    size = _relative_change(nu_low, nu_high)
    real = np.flatnonzero(size > STEP)
    return [(float(size[k]), float(low[k]), {n: float(v[k]) for n, v in fixed.items()}) for k in real]


SWEEPS = [(name, case, swept) for name, geo in GEOMETRIES.items() for case in (geo.cases or (None,))
          for swept in geo.inputs]


@pytest.mark.parametrize("geometry, case, swept", SWEEPS, ids=lambda v: str(v))
def test_auto_has_no_step_above_one_percent(geometry, case, swept):
    steps = find_steps(geometry, case, swept)
    worst = sorted(steps, key=lambda s: -s[0])[:5]
    assert not steps, f"{len(steps)} steps; largest: " + "; ".join(
        f"{size:.1%} at {swept}={where:.6g} with {others}" for size, where, others in worst)


def test_the_detector_finds_a_published_step():
    """The same sweep on a named method with a published step (Catton at H/L = 2) must fail."""
    x = np.array([1.9, 2.1])
    nu = nusselt("cavity", "catton", ra=1e5, pr=0.71, aspect=x, tilt=90.0).nu
    assert _relative_change(nu[0], nu[1]) > STEP   # so auto's blend is what removes it


@pytest.mark.parametrize("geometry", sorted(GEOMETRIES))
def test_the_scalar_path_gives_the_array_path_result(geometry):
    """One case in plain numbers takes a faster path (numpy scalars); it must agree with the
    arrays to round-off (numpy's scalar and vectorised pow may differ in the last bits)."""
    rng = np.random.default_rng(11)
    geo = GEOMETRIES[geometry]
    n = 400
    draws = {"ra": 10 ** rng.uniform(-6, 12, n), "pr": 10 ** rng.uniform(-1.5, 3, n),
             "aspect": 10 ** rng.uniform(-0.5, 2.5, n), "slenderness": 10 ** rng.uniform(-1, 3, n),
             "tilt": rng.uniform(*geo.tilt_range, n), "re": 10 ** rng.uniform(-2, 9, n)}
    inputs = {name: draws[name] for name in geo.inputs}
    for case in geo.cases or (None,):
        for method in ["auto"] + geo.case_methods(case):
            whole = nusselt(geometry, method, case, **inputs)
            for i in range(0, n, 5):
                one = nusselt(geometry, method, case, **{k: float(v[i]) for k, v in inputs.items()})
                assert one.nu == pytest.approx(whole.nu[i], rel=1e-14, abs=0)
                assert (one.method, one.note, one.blend, one.in_range) == (
                    whole.method[i], whole.note[i], whole.blend[i], whole.in_range[i])
