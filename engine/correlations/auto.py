"""The "auto" rule, written once for the scalar path and the array path.

Each step of a geometry's rule reads its ranges: its own ``when`` (or none: the correlation's
published ranges) and the correlation's published ranges (:attr:`Range.in_auto` ones).  Its
shortfall d_k (:meth:`~stillair.validity.Range.shortfall`, the largest over its ranges) says how
far it lies from full coverage, in transition bands: 0 well inside every range, 0 to 1 across the
band inside a bound, above 1 beyond it.  Its coverage is c_k = 1 - d_k clipped to 0..1, and its
claim k_k = min(c_k along the driving group, c_k elsewhere / NEAREST_MARGIN), clipped to 0..1
and read inside the published ranges (:meth:`Range.driven`: the ranges of Ra, Re, Gr and their
groups, the input along which Nu rises; a "centred" band placed inside its bound).

The weights, in three passes over the steps in order:

1. Step k takes s_k of what the earlier steps left, s_k = c_k / max(c_k, K_k, NEAREST_MARGIN),
   K_k the largest claim of the later steps: a step hands on the fall of its coverage only as
   far as a later step inside its range can claim it (where a later step covers fully, K_k = 1
   and s_k = c_k: the band hand-over, and where none can, it keeps its weight), and across the
   last NEAREST_MARGIN of its band it hands on what nothing later can take to the passes below,
   so its weight never jumps.  The forms of one correlation (consecutive steps of one method)
   share its coverage: the earlier hands all its fall to the later (K = 1), which takes its
   coverage of what was left before the earlier form, past its own published edge only as far
   as it stands in for the earlier (:func:`_form_share`).
2. What is left is claimed in order: step k takes k_k of it.  So where a correlation leaves its
   Ra range while the one taking over lies inside the band of another bound (MacGregor-Emery
   near Pr 1, Catton near H/L 10), the first hands over across its whole Ra band rather than
   across the part of it where it lies deeper inside its range than the taker (the squeeze that
   made Nu fall with Ra at such points).
3. What nothing claims (where every step lies within NEAREST_MARGIN of a band of a bound, or
   beyond) goes by nearness: d_min is the least shortfall, D = max(1 - d_min, NEAREST_MARGIN
   min(d_min, 1)), and in order step k takes clip(1 - (d_k - d_min) / D, 0, 1) of what is left.
   Beyond every range the nearest valid correlation is kept, extrapolated with its note; two
   ranges that only touch (no band inside both) hand over across NEAREST_MARGIN of a band on
   either side of the touch, the one place a correlation outside its range takes a share where
   another is valid; two extrapolations share only where they lie within NEAREST_MARGIN of a
   band of each other.

The first step of least shortfall takes all that is left in pass 3, so the weights add up to 1;
they are continuous, because the coverages, claims and shortfalls are.  Where a step covers
fully nothing is left after pass 1, which is then the sequential hand-over (each step before it
takes its coverage of what is left).  The value is the weighted sum of the methods' values, each
floored like a named method, so it lies between them.  The scalar path (one case, numpy
scalars) and the array path (1-D arrays) run the same rule, :func:`weigh_steps`, with the same
arithmetic; they differ only in how a range is read (``Range.shortfall_of`` on a plain number,
``Range.shortfall`` on an array) and in how the result's notes are worded.
"""

from __future__ import annotations

import math
from typing import Any, Callable, Mapping

import numpy as np

from ..validity import Range
from .registry import CORRELATIONS
from .single import _evaluate_one, _first, _range_notes, _scalar_note
from .types import Correlation, Geometry, NusseltResult, uniform

#: Where no correlation covers fully, how close another step's shortfall must come to the least
#: for it to take a share, in bands (relative to the least below one band): the width of the
#: hand-over between two ranges that only touch, and between two extrapolations.
NEAREST_MARGIN = 0.1

#: One compiled step: (method, ((range, the input it reads: its name, or the range's ``of``
#: where it computes its quantity), ...), the function evaluated: the correlation or one
#: published form of it).
CompiledStep = tuple[str, tuple[tuple[Range, Any], ...], Callable[..., Any]]


def _compiled_steps(geo: Geometry, case: str | None) -> tuple[CompiledStep, ...]:
    """The auto rule of ``case`` as :data:`CompiledStep` tuples, built once per geometry and case
    (a cache, not a field of the frozen Geometry).  A step's ranges: its ``when`` and the
    correlation's published ranges that auto reads, each once."""
    compiled_rules = geo.__dict__.get("_compiled_steps")   # read on every scalar call: no dict made
    if compiled_rules is not None and case in compiled_rules:
        return compiled_rules[case]
    cache = geo.__dict__.setdefault("_compiled_steps", {})
    if case not in cache:
        compiled = []
        for step in geo.auto[case]:
            corr = CORRELATIONS[(geo.name, step.method)]
            published = tuple(bound for bound in corr.ranges(case) if bound.in_auto)
            ranges = published if step.when is None else \
                tuple(step.when) + tuple(bound for bound in published if bound not in step.when)
            # ranges read straight from an input first: the scalar path stops reading a step once
            # it surely weighs nothing (_shortfall's cut), so the computed quantities (the tilt
            # coverage's critical tilt) are then often never computed
            ranges = tuple(sorted(ranges, key=lambda bound: bound.of is not None))
            compiled.append((step.method,
                             tuple((bound, bound.of or bound.quantity.lower()) for bound in ranges),
                             corr.forms[step.form] if step.form else corr.function))
        cache[case] = tuple(compiled)
    return cache[case]


def _shortfall(ranges: tuple[tuple[Range, Any], ...], inputs: Mapping[str, Any],
               plain: Mapping[str, float] | None, read: dict[int, Any] | None = None) -> Any:
    """A step's shortfall: the largest of its ranges' (:meth:`Range.shortfall`).  ``plain``
    (the scalar path) holds the inputs as floats (:func:`_shortfall_of`); without it the inputs
    are arrays.  ``read`` keeps each range's shortfall for the other steps that read the same
    range (the cavity's vertical methods share their tilt ranges)."""
    if plain is not None:
        return _shortfall_of(ranges, inputs, plain, {} if read is None else read)
    largest: Any = 0.0
    read = {} if read is None else read
    for bound, _ in ranges:
        short = read.get(id(bound))
        if short is None:
            short = read[id(bound)] = bound.shortfall(inputs)
        largest = np.maximum(largest, short)
    return largest


def _shortfall_of(ranges: tuple[tuple[Range, Any], ...], inputs: Mapping[str, Any],
                  plain: Mapping[str, float], read: dict[int, float], cut: float = math.inf,
                  weighs_only: bool = False) -> float:
    """:func:`_shortfall` on the scalar path (``Range.shortfall_of`` of each range's value as a
    float), stopping at the first range whose shortfall reaches ``cut``
    (:func:`_weightless_from`): the step weighs nothing whatever the rest, and that lower bound
    serves the rule as well.  The range that reached the cut last time is read first (the
    largest of all is the same in any order, and any range that reaches the cut gives such a
    lower bound), so a step that weighs nothing is mostly told by one range.

    ``weighs_only`` (with ``cut`` 1: the caller asks only whether the step weighs anything,
    and the exact shortfall below 1) takes a value past a range's :attr:`~Range.weightless`
    ends as a shortfall of 1 without the arithmetic (its own is larger); such a lower bound is
    not kept in ``read``, where the other passes read exact shortfalls."""
    order = _reading(ranges)
    largest = 0.0
    for bound, key, low, high, none_below, none_above in order:
        if type(key) is str:    # an input's value: read at once (cheaper than keeping it)
            value = plain[key]
            if low < value < high:
                continue
            short = 1.0 if weighs_only and (value < none_below or value > none_above) else bound.shortfall_of(value)
        else:                   # a computed quantity: once per call, whichever step reads it
            kept = read.get(id(bound))
            if kept is not None:
                short = kept
            else:
                value = float(key(inputs))
                if low < value < high:
                    read[id(bound)] = 0.0
                    continue
                if weighs_only and (value < none_below or value > none_above):
                    short = 1.0
                else:
                    short = read[id(bound)] = bound.shortfall_of(value)
        if short > largest:
            largest = short
            if largest >= cut:
                if order[0][0] is not bound:    # read it first next time
                    _READ_ORDER[id(ranges)] = (ranges, tuple(sorted(order, key=lambda entry: entry[0] is not bound)))
                break
    return largest


def _plain_reading(ranges: tuple[tuple[Range, Any], ...]) -> tuple[tuple[Range, Any, float, float, float, float], ...]:
    """A step's ranges as the scalar path reads them: (range, input name or ``of``, the ends of
    the range's ``full_weight`` and of its ``weightless``), kept in :data:`_READ_ORDER`."""
    order = tuple((bound, key, *bound.full_weight, *bound.weightless) for bound, key in ranges)
    _READ_ORDER[id(ranges)] = (ranges, order)
    return order


#: The scalar path's reading of each step's ranges: id(ranges) -> (ranges, their reading in the
#: order to read them, the range that reached the cut last time first).  The ranges are held,
#: so their id stays theirs.
_READ_ORDER: dict[int, tuple] = {}


def _weightless_from(nearest: float) -> float:
    """The shortfall from which a step weighs nothing while the least shortfall is ``nearest``
    or less: nearest + the rule's width there (1 up to 1/1.1, then 1.1 nearest, then nearest +
    NEAREST_MARGIN), which never falls as ``nearest`` falls, so a cut by the steps read so far
    holds for the final least shortfall too."""
    return nearest + max(1.0 - nearest, NEAREST_MARGIN * min(nearest, 1.0))


def _step_weights(geo: Geometry, case: str | None, inputs: Mapping[str, Any],
                  plain: Mapping[str, float] | None) -> list[Any]:
    """Each step's weight by the rule (module text); they add up to 1.  The scalar path runs
    the same arithmetic on floats (``max``/``min``) as the array path on arrays."""
    if plain is not None:
        steps = _compiled_steps(geo, case)
        weights = _plain_step_weights(geo, case, steps, inputs, plain)[0]
        return weights + [0.0] * (len(steps) - len(weights))
    return _weights_by_rule(geo, case, inputs, None, {}, None, math.inf)


def _plain_step_weights(geo: Geometry, case: str | None, steps: tuple[CompiledStep, ...],
                        inputs: Mapping[str, Any], plain: Mapping[str, float],
                        tested: bool = False) -> tuple[list[float], int | None]:
    """:func:`_step_weights` on the scalar path (the steps past the end of the list weigh
    nothing), and the step that covers fully (shortfall 0) and takes what is left, where the
    weights come from :func:`_weights_where_one_covers` or the last certificate (else None):
    every range that step reads holds, and the note need not read them again
    (:func:`auto_scalar`).  ``tested``: the caller found already that the point does not meet
    the last certificate (:func:`_met_certificate`).

    The step that was nearest at the last call of this rule is read first (a hint only: its
    shortfall bounds the least from above, so the steps before it in order are cut sooner; the
    weights are the same whichever step is read first)."""
    if not tested:
        certificate = _met_certificate(geo, case, steps, inputs, plain)
        if certificate is not None:
            return [0.0] * certificate[1] + [1.0], certificate[1]
    hints = geo.__dict__.get("_nearest_step")
    if hints is None:
        hints = geo.__dict__["_nearest_step"] = {}
    hint = hints.get(case)
    read: dict[int, Any] = {}
    known = math.inf if hint is None else _shortfall_of(steps[hint][1], inputs, plain, read)
    if known == 0.0:
        weights, covering = _weights_where_one_covers(steps, hint, hints, case, inputs, plain, read)  # type: ignore[arg-type]
        if covering is not None and not any(weights[:covering]) and not _later_form(steps, covering):
            geo.__dict__.setdefault("_certificates", {})[case] = _certificate(geo, case, steps, covering, inputs, plain)
        return weights, covering
    return _weights_by_rule(geo, case, inputs, plain, read, hint, known), None


def _met_certificate(geo: Geometry, case: str | None, steps: tuple[CompiledStep, ...],
                     inputs: Mapping[str, Any], plain: Mapping[str, float]) -> Certificate | None:
    """The last certificate of this rule and case (:func:`_certificate`) where the point meets
    its bounds: the rule would give its covering step all the weight.  Else None."""
    certificates = geo.__dict__.get("_certificates")
    certificate = None if certificates is None else certificates.get(case)
    if certificate is None or certificate[0] is not steps:
        return None
    # (_value written out: this runs on every scalar call)
    for key, below, above in certificate[2]:
        value = plain[key] if type(key) is str else float(key(inputs))
        if not (value < below or value > above):
            return None
    for key, low, high in certificate[3]:
        value = plain[key] if type(key) is str else float(key(inputs))
        if not low < value < high:
            return None
    for key, low, high in certificate[4]:
        value = plain[key] if type(key) is str else float(key(inputs))
        if not low <= value <= high:
            return None
    return certificate


#: A certificate of the scalar path's usual outcome (:func:`_certificate`): (the compiled steps
#: it was made for, the covering step, ((input or ``of``, weightless ends) that rules out each
#: step before it, ...), ((input or ``of``, full-weight ends) of each range of the covering
#: step, ...), ((input or ``of``, published ends) of each range its note reads, where all held
#: when it was made, else ()), and for :func:`auto_scalar`: the covering step's method, the
#: function it evaluates, its correlation and the ranges its note still reads where the
#: certificate is met (() where the published ends are in the certificate)).
Certificate = tuple[tuple[CompiledStep, ...], int, tuple[tuple[Any, float, float], ...],
                    tuple[tuple[Any, float, float], ...], tuple[tuple[Any, float, float], ...], str,
                    Callable[..., Any], Correlation, tuple[Range, ...]]


def _certificate(geo: Geometry, case: str | None, steps: tuple[CompiledStep, ...], covering: int,
                 inputs: Mapping[str, Any], plain: Mapping[str, float]) -> Certificate | None:
    """Why step ``covering`` took everything at this point, as bounds to test the next point
    against: each step before it has a range whose value lies past its weightless ends
    (shortfall >= 1: it weighs nothing), and every range of the covering step holds its value
    inside its full-weight interval (shortfall 0), which is not a later form of a correlation.
    Where a point meets the same bounds the rule gives the same weights (nothing before, all to
    the covering step) whatever the exact shortfalls, so the scalar path tests them
    (:func:`_met_certificate`) before running the rule: a spreadsheet column or a solver's iteration
    mostly stays in one correlation's range.  None where a step before is ruled out only by the
    exact arithmetic (no certificate: the rule runs every time)."""
    outside = []
    for _, ranges, _ in steps[:covering]:
        for _, key, _, _, below, above in _reading(ranges):
            value = _value(key, inputs, plain)
            if value < below or value > above:    # the test _met_certificate makes (NaN fails it)
                outside.append((key, below, above))
                break
        else:
            return None
    inside = tuple((key, low, high) for _, key, low, high, _, _ in _reading(steps[covering][1]))
    if not all(low < _value(key, inputs, plain) < high for key, low, high in inside):
        return None     # covered by the exact arithmetic at an end: a certificate would rarely hold
    method, _, function = steps[covering]
    corr = CORRELATIONS[(geo.name, method)]
    unsettled = _unsettled_ranges(corr, case)
    # the ranges the covering method's note reads, as published (closed): where each holds here,
    # the certificate asks them too, and wherever it is met the note is "" without a reading
    held = tuple((bound.of or bound.quantity.lower(), bound.low, bound.high) for bound in unsettled)
    if all(low <= _value(key, inputs, plain) <= high for key, low, high in held):
        return steps, covering, tuple(outside), inside, held, method, function, corr, ()
    return steps, covering, tuple(outside), inside, (), method, function, corr, unsettled


def _value(key: Any, inputs: Mapping[str, Any], plain: Mapping[str, float]) -> float:
    """The value a range reads on the scalar path: an input's, or its computed quantity's."""
    return plain[key] if type(key) is str else float(key(inputs))


def _reading(ranges: tuple[tuple[Range, Any], ...]) -> tuple[tuple[Range, Any, float, float, float, float], ...]:
    """A step's ranges as the scalar path reads them (:func:`_plain_reading`), in their order."""
    entry = _READ_ORDER.get(id(ranges))
    return _plain_reading(ranges) if entry is None else entry[1]


def _weights_by_rule(geo: Geometry, case: str | None, inputs: Mapping[str, Any],
                     plain: Mapping[str, float] | None, read: dict[int, Any], hint: int | None,
                     known: float) -> list[Any]:
    """The three passes of the rule (module text): on arrays (``plain`` None), or on the
    scalar path with step ``hint``'s shortfall ``known`` read already."""
    scalar = plain is not None
    steps = _compiled_steps(geo, case)
    larger, smaller = (max, min) if scalar else (np.maximum, np.minimum)
    size = () if scalar else next(iter(inputs.values())).shape
    shortfalls: list[Any] = []
    nearest: Any = math.inf
    for index, (_, ranges, _) in enumerate(steps):
        if not scalar:
            short = _shortfall(ranges, inputs, plain, read)
        elif index == hint:
            short = known
        else:
            short = _shortfall_of(ranges, inputs, plain, read, _weightless_from(min(nearest, known)))  # type: ignore[arg-type]
        shortfalls.append(short if scalar else np.broadcast_to(short, size))
        nearest = smaller(nearest, short)
        # a step that covers fully takes all that is left: the later ones weigh nothing, and
        # need not be read (d_min is 0 wherever this holds)
        if not (nearest > 0.0 if scalar else np.any(nearest > 0.0)):
            break
    if scalar:
        geo.__dict__["_nearest_step"][case] = shortfalls.index(nearest)
    coverage = [smaller(larger(1.0 - short, 0.0), 1.0) for short in shortfalls]
    reach = [_reach_past_edge(steps[index][1], inputs, plain, read) if _later_form(steps, index) else 1.0
             for index in range(len(coverage))]
    claims = [_claim(steps[index][1], inputs, plain, read, cover) for index, cover in enumerate(coverage)]
    weights, left, aside = _taken_in_order(steps, coverage, reach, claims, scalar)
    if not (left + aside > 0.0 if scalar else np.any(left + aside > 0.0)):   # one covers fully
        return weights + [0.0] * (len(steps) - len(weights))
    # what no step covered: claimed by the steps inside their ranges, in order, each as far as
    # it covers along the driving group (its claim fades over its own whole band there) and
    # holds at least NEAREST_MARGIN of a band inside its other bounds; only what nothing
    # claims goes by nearness
    for index in range(len(coverage)):
        claim = claims[index]
        weights[index] = weights[index] + left * claim
        left = left * (1.0 - claim)
    left = left + aside
    for index, share in enumerate(_nearest_shares(shortfalls, nearest, scalar)):
        weights[index] = weights[index] + left * share
    return weights + [0.0] * (len(steps) - len(weights))


def _taken_in_order(steps: tuple[CompiledStep, ...], coverage: list[Any], reach: list[Any],
                    claims: list[Any], scalar: bool) -> tuple[list[Any], Any, Any]:
    """Pass 1 of the rule (module text): each step in order takes s = c / max(c, K) of what the
    earlier left, K the largest claim of the later steps (1 before another form of its own
    correlation, which takes :func:`_form_share`); of that it keeps min(1, max(c, K) /
    NEAREST_MARGIN) and sets the rest aside for the nearest (pass 3), so that a step which no
    later step can take from keeps its weight to the end of its band and then hands it on
    without a jump.  Returns the weights, what is left and what is set aside."""
    larger, smaller = (max, min) if scalar else (np.maximum, np.minimum)
    left: Any = 1.0
    aside: Any = 0.0
    weights: list[Any] = []
    later: list[Any] = [0.0] * len(coverage)     # the largest claim of the steps after each
    for index in range(len(coverage) - 2, -1, -1):
        later[index] = larger(later[index + 1], claims[index + 1])
    for index, cover in enumerate(coverage):
        if _later_form(steps, index):
            share, kept = _form_share(cover, coverage[index - 1], reach[index], smaller, larger), 1.0
        else:
            # a step hands on its coverage's fall as far as a later step can claim it (a form
            # of one correlation hands all of it on to its next form)
            taker = 1.0 if index + 1 < len(coverage) and _later_form(steps, index + 1) else later[index]
            reference = larger(cover, taker)
            share = cover / larger(reference, 1e-300)
            kept = smaller(reference / NEAREST_MARGIN, 1.0)
        weights.append(left * share * kept)
        aside = aside + left * share * (1.0 - kept)
        left = left * (1.0 - share)
        if scalar and left == 0.0:
            break
    return weights + [0.0] * (len(coverage) - len(weights)), left, aside


def _later_form(steps: tuple[CompiledStep, ...], index: int) -> bool:
    """Whether step ``index`` is a later form of the correlation of the step before it (the
    forms of one correlation are consecutive steps of one method)."""
    return index > 0 and steps[index][0] == steps[index - 1][0]


def _form_share(cover: Any, previous: Any, reach: Any, smaller: Callable, larger: Callable) -> Any:
    """The share a later form of one correlation takes of what its earlier form left: its
    coverage of what was left before the earlier form (the forms share one coverage), and past
    its own published edge (``reach`` < 1) only as far as it stands in for the earlier form."""
    return smaller(smaller(cover, previous + reach) / larger(1.0 - previous, 1e-300), 1.0)


def _reach_past_edge(ranges: tuple[tuple[Range, Any], ...], inputs: Mapping[str, Any],
                     plain: Mapping[str, float] | None, read: dict[int, Any]) -> Any:
    """1 inside a form's published range, falling to 0 across the half band a "centred" range
    reaches past its edge (1 for a step without one): how far a form stands by itself there."""
    centred = tuple((bound, key) for bound, key in ranges if bound.placement == "centred")
    if not centred:
        return 1.0
    shortfall = _shortfall(centred, inputs, plain, read)
    if plain is None:
        return np.clip(2.0 * (1.0 - shortfall), 0.0, 1.0)
    return min(max(2.0 * (1.0 - shortfall), 0.0), 1.0)


def _claim(ranges: tuple[tuple[Range, Any], ...], inputs: Mapping[str, Any],
           plain: Mapping[str, float] | None, read: dict[int, Any], coverage: Any) -> Any:
    """How much of what no step covered a step claims: its coverage along the driving group,
    limited by its other coverage counted in NEAREST_MARGIN of a band (full from there inward),
    all read inside the published ranges (a "centred" band placed inside its bound)."""
    if plain is not None and coverage == 0.0:
        return 0.0
    driven: Any = 0.0
    other: Any = 0.0
    for bound, key in ranges:
        inner = bound.placed_inside()
        short = read.get(id(inner))
        if short is None:
            short = read[id(inner)] = inner.shortfall(inputs) if plain is None else \
                inner.shortfall_of(_value(key, inputs, plain))
        if inner.driven:
            driven = np.maximum(driven, short) if plain is None else max(driven, short)
        else:
            other = np.maximum(other, short) if plain is None else max(other, short)
    if plain is None:
        return np.clip(np.minimum(1.0 - driven, (1.0 - other) / NEAREST_MARGIN), 0.0, 1.0)
    return min(max(min(1.0 - driven, (1.0 - other) / NEAREST_MARGIN), 0.0), 1.0)


def _nearest_shares(shortfalls: list[Any], nearest: Any, scalar: bool) -> list[Any]:
    """How what nothing claimed is shared: the step of least shortfall d_min, and the others
    within the width D = max(1 - d_min, NEAREST_MARGIN min(d_min, 1)) of it, in order, each
    taking 1 - (d - d_min) / D of what is left."""
    larger, smaller = (max, min) if scalar else (np.maximum, np.minimum)
    width = larger(1.0 - nearest, NEAREST_MARGIN * smaller(nearest, 1.0))
    left: Any = 1.0
    weights: list[Any] = []
    for short in shortfalls:
        # (inf - inf where two steps are infinitely far, as at Ra = 0: a tie, the first keeps it)
        if scalar:
            beyond = short - nearest if short != nearest else 0.0
        else:
            with np.errstate(invalid="ignore"):    # inf - inf, replaced by the tie's 0
                beyond = np.where(short == nearest, 0.0, short - nearest)
        share = smaller(larger(1.0 - beyond / width, 0.0), 1.0)
        weights.append(left * share)
        left = left * (1.0 - share)
        if scalar and left == 0.0:   # the rest weigh nothing
            break
    return weights + [0.0] * (len(shortfalls) - len(weights))


def _weights_where_one_covers(steps: tuple[CompiledStep, ...], covering: int, hints: dict,
                              case: str | None, inputs: Mapping[str, Any], plain: Mapping[str, float],
                              read: dict[int, float]) -> tuple[list[Any], int | None]:
    """:func:`_step_weights` on the scalar path where step ``covering`` covers fully (d = 0, the
    usual case): the rule's arithmetic with d_min = 0 and a width of one band, written out (a
    step before it takes 1 - d of what is left, the first that covers fully takes the rest, the
    later ones nothing); a step is read only until its shortfall reaches 1, and a range read
    past its weightless end tells that at once (``weighs_only``).  Returns the weights of the
    steps up to the one that took the rest (the later ones weigh nothing) and that step where it
    took it with shortfall 0 (None where a later form of one correlation took it by its shared
    coverage)."""
    left = 1.0
    weights: list[Any] = []
    previous = 0.0
    for index in range(covering + 1):
        if index < covering:
            short = _shortfall_of(steps[index][1], inputs, plain, read, 1.0, True)
            if short >= 1.0:    # the usual step before the one that covers: it takes nothing
                weights.append(0.0)
                previous = 0.0
                continue
        else:
            short = 0.0
        cover = share = min(max(1.0 - short, 0.0), 1.0)
        if _later_form(steps, index):
            share = _form_share(cover, previous, _reach_past_edge(steps[index][1], inputs, plain, read), min, max)
        previous = cover
        weights.append(left * share)
        left = left * (1.0 - share)
        if left == 0.0:
            hints[case] = index
            return weights, index if short == 0.0 else None
    return weights, None


def weigh_steps(geo: Geometry, case: str | None, inputs: Mapping[str, Any],
                plain: Mapping[str, float] | None = None) -> tuple[Any, dict[str, Any]]:
    """Nu by the auto rule (before the geometry's floor on the sum) and each method's weight.

    ``inputs``: numpy scalars with ``plain`` their float values (the scalar path), or 1-D arrays
    of one length (``plain`` None).  Returns the weighted Nu (a float or an array) and
    ``{method: total weight}`` for the methods that carry weight, in the order they first do.
    """
    if plain is not None:
        return _weigh_plain(geo, case, inputs, plain)[:2]
    size = next(iter(inputs.values())).shape
    nu: Any = np.zeros(size)
    weights: dict[str, Any] = {}        # method -> total weight (its forms together)
    for (method, _, function), weight in zip(_compiled_steps(geo, case),
                                             _step_weights(geo, case, inputs, plain)):
        used = weight > 0.0
        if not np.any(used):
            continue
        weight = np.broadcast_to(weight, size)
        everywhere = used.all()
        part = inputs if everywhere else {k: v[used] for k, v in inputs.items()}
        value = np.asarray(function(**(dict(part, case=case) if geo.cases else part)), dtype=float)
        if geo.floor is not None:
            value = np.maximum(value, geo.floor)
        if everywhere:
            nu += weight * value
        else:
            nu[used] += weight[used] * value
        weights[method] = weights.get(method, 0.0) + weight
    return nu, weights


def _weigh_plain(geo: Geometry, case: str | None, inputs: Mapping[str, Any],
                 plain: Mapping[str, float], tested: bool = False) -> tuple[float, dict[str, float], str | None]:
    """:func:`weigh_steps` for one case: the same sum, each weighted method's value (a numpy
    scalar) floored as a float; and the method of the step that covered fully and took what
    was left (:func:`_plain_step_weights`, ``tested`` as there), or None."""
    floor = -math.inf if geo.floor is None else geo.floor
    steps = _compiled_steps(geo, case)
    nu = 0.0
    weights: dict[str, float] = {}
    step_weights, covering = _plain_step_weights(geo, case, steps, inputs, plain, tested)
    for (method, _, function), weight in zip(steps, step_weights):
        if weight > 0.0:
            raw = function(case=case, **inputs) if geo.cases else function(**inputs)
            nu += weight * max(_first(raw), floor)
            weights[method] = weights.get(method, 0.0) + weight
    return nu, weights, None if covering is None else steps[covering][0]


def _rule_order(geo: Geometry, case: str | None, weights: Mapping[str, Any]) -> list[str]:
    """The weighted methods, in the rule's order."""
    if len(weights) == 1:
        return list(weights)
    return [name for name in geo.auto_methods(case) if name in weights]


def auto_scalar(geo: Geometry, case: str | None, inputs: Mapping[str, Any],
                plain: Mapping[str, float]) -> tuple[float, str, str, str]:
    """The auto rule for one case in numpy scalars (``plain``: the same as floats): (Nu, the
    method of the largest weight, the note, the blend) as plain values; notes formatted only
    for a bound crossed.  The method whose step covered fully reads only the ranges that step
    did not settle (:func:`_unsettled_ranges`)."""
    floor = -math.inf if geo.floor is None else geo.floor
    steps = _compiled_steps(geo, case)
    certificate = _met_certificate(geo, case, steps, inputs, plain)
    if certificate is not None:    # the usual case: the last point's covering step takes all again
        _, _, _, _, _, name, function, corr, unsettled = certificate
        nu = max(_first(function(case=case, **inputs) if geo.cases else function(**inputs)), floor)
        return nu, name, _scalar_note(corr, inputs, plain, case, unsettled) if unsettled else "", ""
    nu, weights, settled = _weigh_plain(geo, case, inputs, plain, tested=True)
    if len(weights) == 1:    # one method, its own note, no blend
        (name,) = weights
        return max(nu, floor), name, _plain_note(geo, case, name, settled, inputs, plain), ""
    names = _rule_order(geo, case, weights)
    notes = [note for note in (_plain_note(geo, case, name, settled, inputs, plain) for name in names) if note]
    blend = "auto blend of " + " and ".join(names) if len(names) > 1 else ""
    note = "; ".join(notes)
    if note and blend:
        note = f"{blend}: {note}"
    return max(nu, floor), max(names, key=weights.__getitem__), note, blend


def _plain_note(geo: Geometry, case: str | None, name: str, settled: str | None,
                inputs: Mapping[str, Any], plain: Mapping[str, float]) -> str:
    """The note of method ``name`` for one case: its published ranges, or only those the step
    that covered fully left unread where ``name`` is its method (``settled``)."""
    corr = CORRELATIONS[(geo.name, name)]
    ranges = _unsettled_ranges(corr, case) if name == settled else corr.ranges(case)
    return _scalar_note(corr, inputs, plain, case, ranges) if ranges else ""


def _unsettled_ranges(corr: Correlation, case: str | None) -> tuple[Range, ...]:
    """The published ranges of ``corr`` for ``case`` that a step of it covering fully (shortfall
    0) leaves unread, in their order: those auto does not read (``in_auto`` False), those of a
    computed quantity (``of``: it could be NaN, whose shortfall is 0 and which lies inside no
    range; the inputs are finite numbers, checked), and those with a bound that has no band (a
    bound at the end of the input's domain, a lower bound <= 0 on a log scale), where shortfall
    0 does not tell that the value is inside.  Every other published range, read by that step
    with shortfall 0, holds (:attr:`Range.bands_every_bound`), so the note reads only these
    (none: the note is "" at once).  Made once per correlation and case."""
    made = corr.__dict__.get("_unsettled_ranges")   # read on every scalar call: no dict made
    if made is not None and case in made:
        return made[case]
    cache = corr.__dict__.setdefault("_unsettled_ranges", {})
    if case not in cache:
        cache[case] = tuple(bound for bound in corr.ranges(case)
                            if not (bound.in_auto and bound.of is None and bound.bands_every_bound))
    return cache[case]


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
