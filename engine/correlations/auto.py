"""The "auto" rule, written once for the scalar path and the array path.

With c_k the continuous coverage of step k (the product of its ranges' transition weights,
:meth:`~stillair.validity.Range.weight`), step k's weight is c_k (1 - c_1) ... (1 - c_(k-1)); the
weights add up to 1 because the last step covers everything.  The value is the weighted sum of
the methods' values, each floored like a named method, so it lies between them.  The scalar path
(one case, numpy scalars) and the array path (1-D arrays) run the same loop, :func:`weigh_steps`,
with the same arithmetic; they differ only in how a range's weight is read (``Range.weight_of``
on a plain number, ``Range.weight`` on an array) and in how the result's notes are worded.
"""

from __future__ import annotations

import math
from typing import Any, Callable, Mapping

import numpy as np

from ..validity import Range
from .registry import CORRELATIONS
from .single import _evaluate_one, _first, _range_notes, _scalar_note, _scalar_result
from .types import Geometry, NusseltResult, uniform

#: One compiled step: (method, ((range, input name or None where the range computes its
#: quantity), ...), the function evaluated: the correlation or one published form of it).
CompiledStep = tuple[str, tuple[tuple[Range, Any], ...], Callable[..., Any]]


def _compiled_steps(geo: Geometry, case: str | None) -> tuple[CompiledStep, ...]:
    """The auto rule of ``case`` as :data:`CompiledStep` tuples, built once per geometry and case
    (a cache, not a field of the frozen Geometry)."""
    cache = geo.__dict__.setdefault("_compiled_steps", {})
    if case not in cache:
        compiled = []
        for step in geo.auto[case]:
            corr = CORRELATIONS[(geo.name, step.method)]
            ranges = corr.ranges(case) if step.when is None else step.when
            compiled.append((step.method,
                             tuple((bound, None if bound.of else bound.quantity.lower()) for bound in ranges),
                             corr.forms[step.form] if step.form else corr.function))
        cache[case] = tuple(compiled)
    return cache[case]


def _coverage(ranges: tuple[tuple[Range, Any], ...], inputs: Mapping[str, Any],
              plain: Mapping[str, float] | None) -> Any:
    """A step's coverage 0..1: the product of its ranges' weights, in their order.

    ``plain`` (the scalar path) holds the inputs as floats: each weight is then
    ``Range.weight_of`` (the same arithmetic on one number), stopping at the first 0.  Without
    it the inputs are arrays, and a step without ranges gives None: it covers everything.
    """
    if plain is None:
        weight = None
        for bound, _ in ranges:
            part = bound.weight(inputs)
            weight = part if weight is None else weight * part
        return weight
    coverage = 1.0
    for bound, key in ranges:
        coverage *= bound.weight_of(plain[key] if key else _first(bound.values(inputs)))
        if coverage == 0.0:
            break
    return coverage


def weigh_steps(geo: Geometry, case: str | None, inputs: Mapping[str, Any],
                plain: Mapping[str, float] | None = None) -> tuple[Any, dict[str, Any]]:
    """Nu by the auto rule (before the geometry's floor on the sum) and each method's weight.

    ``inputs``: numpy scalars with ``plain`` their float values (the scalar path), or 1-D arrays
    of one length (``plain`` None).  Returns the weighted Nu (a float or an array) and
    ``{method: total weight}`` for the methods that carry weight, in the order they first do.
    """
    scalar = plain is not None
    floor = -math.inf if geo.floor is None else geo.floor
    size = () if scalar else next(iter(inputs.values())).shape
    left: Any = 1.0 if scalar else np.ones(size)
    nu: Any = 0.0 if scalar else np.zeros(size)
    weights: dict[str, Any] = {}        # method -> total weight (its forms together)
    for method, ranges, function in _compiled_steps(geo, case):
        coverage = _coverage(ranges, inputs, plain)
        if coverage is None:  # covers everything: takes all that is left
            weight, left = left, np.zeros(size)
        else:
            weight, left = left * coverage, left * (1.0 - coverage)
        used = weight > 0.0
        if used if scalar else used.any():
            everywhere = scalar or used.all()
            part = inputs if everywhere else {k: v[used] for k, v in inputs.items()}
            raw = function(**(dict(part, case=case) if geo.cases else part))
            if scalar:
                nu += weight * max(_first(raw), floor)
            else:
                value = np.asarray(raw, dtype=float)
                if geo.floor is not None:
                    value = np.maximum(value, geo.floor)
                if everywhere:
                    nu += weight * value
                else:
                    nu[used] += weight[used] * value
            weights[method] = weights.get(method, 0.0) + weight
        if not (left > 0.0 if scalar else left.any()):
            break
    return nu, weights


def _rule_order(geo: Geometry, case: str | None, weights: Mapping[str, Any]) -> list[str]:
    """The weighted methods, in the rule's order."""
    if len(weights) == 1:
        return list(weights)
    return [name for name in geo.auto_methods(case) if name in weights]


def auto_scalar(geo: Geometry, case: str | None, inputs: Mapping[str, Any],
                plain: Mapping[str, float]) -> NusseltResult:
    """The auto rule for one case in numpy scalars (``plain``: the same as floats); notes
    formatted only for a bound crossed."""
    floor = -math.inf if geo.floor is None else geo.floor
    nu, weights = weigh_steps(geo, case, inputs, plain)
    names = _rule_order(geo, case, weights)
    notes = [note for note in (_scalar_note(CORRELATIONS[(geo.name, name)], inputs, plain, case)
                               for name in names) if note]
    blend = "auto blend of " + " and ".join(names) if len(names) > 1 else ""
    note = "; ".join(notes)
    if note and blend:
        note = f"{blend}: {note}"
    return _scalar_result(max(nu, floor), max(names, key=weights.__getitem__), note, blend)


def auto_arrays(geo: Geometry, case: str | None, arrays: Mapping[str, np.ndarray], notes: bool = True,
                ranges: bool = True) -> NusseltResult:
    """The auto rule on 1-D inputs (before the geometry's floor on the sum).

    Each weighted method's own range notes are kept; where several methods carry weight,
    ``blend`` names them and an out-of-range note says so too.
    """
    size = next(iter(arrays.values())).shape
    steps = geo.auto[case]
    if size == (0,):
        empty = np.empty(0, dtype=object)
        return NusseltResult(nu=np.empty(0), method=empty, in_range=np.ones(0, dtype=bool), note=empty)
    if len(steps) == 1 and steps[0].when == ():
        # a rule of one unconditional step (most plate cases): its method everywhere, the same
        # numbers as weigh_steps gives (0 + 1 x, floored by the caller) without its dozen
        # array operations, which the network solver would pay on every evaluation
        return _evaluate_one(geo, steps[0].method, case, arrays, notes, ranges, form=steps[0].form)
    nu, weights = weigh_steps(geo, case, arrays)
    names = _rule_order(geo, case, weights)
    if len(names) == 1:  # the usual case: one method everywhere
        in_range, note = _range_notes(CORRELATIONS[(geo.name, names[0])], arrays, case, notes) if ranges \
            else (None, None)
        return NusseltResult(nu=nu, method=uniform(names[0], size), in_range=in_range, note=note)
    stacked = np.array([np.broadcast_to(weights[n], size) for n in names])   # (methods, points)
    method = np.array(names, dtype=object)[np.argmax(stacked, axis=0)]
    if not ranges:
        return NusseltResult(nu=nu, method=method, in_range=None, note=None)
    code = (stacked > 0.0).astype(np.int64).T @ (1 << np.arange(len(names), dtype=np.int64))
    note = np.full(size, "", dtype=object)
    blend = np.full(size, "", dtype=object)
    in_range = np.ones(size, dtype=bool)
    for index, name in enumerate(names):
        used = stacked[index] > 0.0
        part_in, part_notes = _range_notes(CORRELATIONS[(geo.name, name)],
                                           {k: v[used] for k, v in arrays.items()}, case, notes)
        bad = ~part_in
        in_range[np.flatnonzero(used)[bad]] = False
        if notes and bad.any():
            where = np.flatnonzero(used)[bad]
            joined = note[where]
            note[where] = np.where(joined == "", part_notes[bad], joined + "; " + part_notes[bad])
    for value in np.unique(code):
        members = [n for i, n in enumerate(names) if value >> i & 1]
        if len(members) > 1:
            blend[code == value] = "auto blend of " + " and ".join(members)
    blended_out = ~in_range & (blend != "") if notes else np.zeros(size, dtype=bool)
    if blended_out.any():
        note[blended_out] = blend[blended_out] + ": " + note[blended_out]
    return NusseltResult(nu=nu, method=method, in_range=in_range, note=note, blend=blend)
