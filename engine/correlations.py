"""The correlation registry: one mechanism for every Nusselt correlation.

A correlation is a small pure function of numpy arrays, registered with :func:`correlation`
together with its source, its equation, its validity ranges and the cases it serves.  Everything
else is done here once for all of them:

* argument checking (Ra >= 0, Pr > 0, aspect > 0, tilt in [0, 180], case names),
* broadcasting of array arguments and scalar results for scalar inputs,
* the conduction floor Nu >= 1 where the geometry has one (cavities),
* the validity check against the published ranges, with a note naming the bound crossed,
* the "auto" rule: the geometry's ordered steps, each taking its continuous coverage of what
  the earlier steps left (linear across a transition band inside each published bound), so
  the value passes from one correlation to the next without a step; the last step takes the
  rest, with the note where it is out of range.

Geometries and their inputs (all lower-case keyword arguments of the registered functions):

=========  =======================================  ==============================================
geometry   inputs                                   case
=========  =======================================  ==============================================
vplate     ra, pr                                   --
hplate     ra, pr                                   hot-up, hot-down, cold-up, cold-down
tplate     ra, pr, tilt (deg from vertical)         hot-up, hot-down, cold-up, cold-down
hcyl       ra, pr                                   --
sphere     ra, pr                                   --
vcyl       ra, pr, slenderness (height/diameter)    --
cavity     ra, pr, aspect (height/gap), tilt (deg   --
           from horizontal, 0 heated from below)
channel    ra (Ra*_S on the wall flux for the       isothermal, isothermal-adiabatic, flux,
           flux cases), pr, aspect (height/spacing) flux-adiabatic
=========  =======================================  ==============================================

Ra is always based on the geometry's own length (plate height, area/perimeter, diameter, gap).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field
from typing import Callable, Mapping, Sequence

import numpy as np

from ._typing import ArrayLike
from .validity import (
    InputError,
    PLAIN_NUMBERS,
    Range,
    format_value,
    require_between,
    require_choice,
    require_nonnegative,
    require_positive,
    distinct_notes,
    unwrap,
    warn_out_of_range,
)

__all__ = [
    "Correlation",
    "Geometry",
    "AutoStep",
    "Parameter",
    "NusseltResult",
    "GEOMETRIES",
    "CORRELATIONS",
    "correlation",
    "define_geometry",
    "get_correlation",
    "methods_for",
    "nusselt",
    "nusselt_value",
    "nusselt_at_difference",
    "merge_masked",
    "PLATE_CASES",
    "NusseltSpread",
    "nu_spread",
    "document",
    "methods_section",
]

PLATE_CASES = ("hot-up", "hot-down", "cold-up", "cold-down")
# A heated face looking up and a cooled face looking down both drive an unstable, rising
# (or falling) plume off the face; the other two cases trap the fluid against the face.
UNSTABLE_CASES = ("hot-up", "cold-down")
STABLE_CASES = ("hot-down", "cold-up")


@dataclass(frozen=True)
class AutoStep:
    """One step of a geometry's "auto" rule: use ``method`` where ``when`` holds.

    ``when`` defaults to the method's published validity ranges; a rule states its own where
    the auto choice differs from the published range (a horizontal-only correlation carried a
    few degrees off the horizontal, a fallback that takes whatever is left).  An empty ``when``
    covers everything (the last step of every rule).  ``form`` names one published band of a
    piecewise correlation (:attr:`Correlation.forms`), so that auto can blend across the band
    edge while the named method keeps its published step.
    """

    method: str
    when: tuple[Range, ...] | None = None
    form: str | None = None

    def coverage(self, correlation: "Correlation", inputs: Mapping[str, np.ndarray], case) -> np.ndarray:
        """Continuous weight 0..1 of this step (the product of its ranges' transition weights)."""
        ranges = correlation.ranges(case) if self.when is None else self.when
        weight = None
        for bound in ranges:
            part = bound.weight(inputs)
            weight = part if weight is None else weight * part
        return weight


@dataclass(frozen=True)
class Parameter:
    """One physical parameter of a geometry's convection call (beyond the two temperatures),
    in the order a sheet or a network row gives them."""

    name: str
    unit: str
    doc: str
    default: float | str | None = None   # None: required
    kind: str = "number"                 # or "text" (facing)

    @property
    def required(self) -> bool:
        return self.default is None


@dataclass(frozen=True)
class Geometry:
    """A family of correlations sharing inputs, and every fact about it the layers above read.

    ``auto`` maps a case (or ``None`` for geometries without cases) to the ordered
    :class:`AutoStep` list of its "auto" rule; the last step covers everything.  Auto weighs the
    steps continuously: each step takes its coverage of what the earlier steps left, so where
    one correlation's range ends the value passes to the next across the transition band of
    that bound, with no step.  ``floor`` is the smallest physical Nusselt number (1 for
    conduction across a cavity), or None where a formula may legitimately go below 1 (external
    flows, where Nu is based on an arbitrary length).

    ``length`` names the length Ra and Nu are based on, as the h functions and the network call
    it (``length_doc`` says what it is); ``extra`` names the inputs beyond Ra and Pr that come
    from the user's geometry rather than from the gas.
    """

    name: str
    inputs: tuple[str, ...]
    description: str
    cases: tuple[str, ...] = ()
    auto: Mapping[str | None, tuple[AutoStep, ...]] = field(default_factory=dict)
    floor: float | None = None
    # Allowed tilt (degrees) where tilt is an input: cavities 0-180 from the horizontal,
    # tilted plates 0-90 from the vertical.
    tilt_range: tuple[float, float] = (0.0, 180.0)
    # The tilt a caller who gives none gets (cavities: 90, the vertical layer), or None where
    # the tilt is required (tilted plates).
    default_tilt: float | None = None
    title: str = ""
    length: str = "length"
    length_doc: str = ""
    # The physical parameters of the h-level call, in order (the length first): what a sheet
    # function or a network branch of this geometry takes besides t1, t2, gas and pressure.
    parameters: tuple[Parameter, ...] = ()
    # Cases whose correlations take the modified Rayleigh number on the wall heat flux,
    # Ra* = Ra Nu (Nu on the temperature difference), instead of Ra: given the difference, Nu
    # is solved (:func:`nusselt_at_difference`).
    flux_cases: tuple[str, ...] = ()
    # What the from and to nodes of its network branch are, where the branch is not a surface
    # in a large still fluid (the reference prints it).
    branch_ends: str = ""

    def correlation_rayleigh(self, ra, nu, case: str | None):
        """The Rayleigh number the correlation of ``case`` reads, from Ra on the temperature
        difference and the Nu found: Ra* = Ra Nu for a flux case, Ra otherwise."""
        return ra * nu if case in self.flux_cases else ra

    def auto_methods(self, case: str | None = None) -> list[str]:
        """The methods auto may use for ``case``, in the rule's order, each once."""
        cache = self.__dict__.setdefault("_auto_methods", {})   # a cache, not a field
        if case not in cache:
            cache[case] = list(dict.fromkeys(step.method for step in self.auto.get(case, ())))
        return cache[case]

    @property
    def methods(self) -> list[str]:
        """Every registered method of the geometry (all cases), in registration order."""
        return methods_for(self.name)

    def case_methods(self, case: str | None) -> list[str]:
        return methods_for(self.name, case)

    def method_help(self) -> str:
        """The methods in words, with the cases each serves where it serves only some:
        "churchill-chu-cos (hot-down, cold-up), raithby-hollands (hot-up, cold-down)"."""
        parts = []
        for method in self.methods:
            cases = CORRELATIONS[(self.name, method)].cases
            served = f" ({', '.join(cases)})" if cases and set(cases) != set(self.cases) else ""
            parts.append(method + served)
        return ", ".join(parts)


@dataclass(frozen=True)
class Correlation:
    """One published correlation, as the registry stores it."""

    geometry: str
    method: str
    function: Callable[..., np.ndarray]
    title: str
    source: str
    equation: str
    validity: tuple[Range, ...]
    cases: tuple[str, ...] = ()
    notes: str = ""
    # Some correlations publish different ranges per case (McAdams: hot-up from Ra 1e5, hot-down
    # from 3e5).  A case listed here uses its own ranges instead of ``validity``.
    validity_by_case: Mapping[str, tuple[Range, ...]] = field(default_factory=dict)
    # The published bands of a piecewise correlation as separate functions (same arguments),
    # for auto's blend across their edges; ``function`` keeps the published switch.
    forms: Mapping[str, Callable[..., np.ndarray]] = field(default_factory=dict)

    def ranges(self, case: str | None = None) -> tuple[Range, ...]:
        """The validity ranges that apply to ``case`` (``validity`` unless the case has its own)."""
        return self.validity_by_case.get(case, self.validity)

    def inside(self, inputs: Mapping[str, np.ndarray], case: str | None = None) -> np.ndarray:
        shape = np.broadcast(*[np.asarray(v) for v in inputs.values()]).shape
        inside = np.ones(shape, dtype=bool)
        for bound in self.ranges(case):
            inside &= bound.inside(inputs)
        return inside

    def notes_for(self, inputs: Mapping[str, np.ndarray], case: str | None = None) -> np.ndarray:
        """Per element: "" when inside every range, else the first bound crossed."""
        shape = np.broadcast(*[np.asarray(v) for v in inputs.values()]).shape
        notes = uniform("", shape)
        for bound in reversed(self.ranges(case)):  # first listed bound wins
            values = _shaped(bound.values(inputs), shape)
            outside = ~_shaped(bound.inside(inputs), shape)
            if outside.any():
                if not notes.flags.writeable:
                    notes = np.full(shape, "", dtype=object)
                notes[outside] = _violation_notes(self.method, bound, values[outside])
        return notes

    def describe_validity(self, case: str | None = None) -> str:
        return "; ".join(bound.describe() for bound in self.ranges(case)) or "no stated limits"


def _shaped(array: np.ndarray, shape) -> np.ndarray:
    """``array`` broadcast to ``shape``; as it is when it has that shape already (the usual
    case, where np.broadcast_to's overhead would be all the cost)."""
    return array if array.shape == shape else np.broadcast_to(array, shape)


def uniform(value, shape) -> np.ndarray:
    """A read-only object array holding ``value`` everywhere, without a million references:
    the method name or empty note of a result where every element shares it.  Small arrays
    are filled instead (np.broadcast_to's own overhead costs more than the references there:
    the network solver makes a dozen of these per evaluation)."""
    if math.prod(shape) <= _FILL_BELOW:
        array = np.full(shape, value, dtype=object)
        array.flags.writeable = False
        return array
    return np.broadcast_to(np.array(value, dtype=object), shape)


_FILL_BELOW = 4096


def _violation_notes(method: str, bound: Range, values: np.ndarray) -> np.ndarray:
    """``"{method}: {quantity} = {value} below|above {bound} (valid {range})"`` per value, vectorised.

    Formatting one note per element in a Python loop made a million out-of-range values cost
    seconds; only the number changes from note to note, so it alone is formatted per element.
    """
    values = np.asarray(values, dtype=float).ravel()
    head = f"{method}: {bound.quantity} = "
    valid = f" (valid {bound.describe()})"
    notes = np.empty(values.shape, dtype=object)
    below = values < bound.low
    for side, tail in ((below, f" below {format_value(bound.low)}{valid}"),
                       (~below, f" above {format_value(bound.high)}{valid}")):
        # f"{x:.6g}" is format_value's rendering of a float
        notes[side] = [f"{head}{x:.6g}{tail}" for x in values[side].tolist()]
    return notes


@dataclass
class NusseltResult:
    """Nu with the method that produced it and whether the inputs were inside its range."""

    nu: np.ndarray
    method: np.ndarray        # the method with the largest weight
    in_range: np.ndarray      # every weighted method inside its published ranges
    note: np.ndarray          # "" in range; else the bounds crossed (and the blend, if any)
    blend: np.ndarray | None = None  # "" or "blend of A and B" where auto weighs several

    def __post_init__(self):
        if self.blend is None:
            self.blend = uniform("", np.shape(self.nu))

    def scalar(self) -> "NusseltResult":
        return NusseltResult(unwrap(self.nu), unwrap(self.method), unwrap(self.in_range), unwrap(self.note),
                             unwrap(self.blend))

    @property
    def notes(self) -> list[str]:
        """The distinct non-empty notes, in order of first appearance."""
        return distinct_notes(self.note)


GEOMETRIES: dict[str, Geometry] = {}
CORRELATIONS: dict[tuple[str, str], Correlation] = {}


def define_geometry(geometry: Geometry) -> Geometry:
    if geometry.parameters and geometry.parameters[0].name != geometry.length:
        raise RuntimeError(f"{geometry.name}: the first parameter must be the length {geometry.length!r}")
    for case in geometry.cases or (None,):
        steps = geometry.auto.get(case)
        if not steps or steps[-1].when != ():
            raise RuntimeError(f"{geometry.name}: the auto rule of case {case!r} must end with a "
                               "step that covers everything (when=())")
    GEOMETRIES[geometry.name] = geometry
    return geometry


def correlation(*, geometry: str, method: str, title: str, source: str, equation: str,
                validity: Sequence[Range] = (), cases: Sequence[str] = (), notes: str = "",
                validity_by_case: Mapping[str, Sequence[Range]] | None = None,
                forms: Mapping[str, Callable[..., np.ndarray]] | None = None):
    """Register a correlation function ``f(**inputs) -> Nu`` under (geometry, method).

    ``validity_by_case`` (optional) gives the ranges of cases whose published range differs
    from ``validity``.
    """

    def register(function):
        key = (geometry, method)
        if key in CORRELATIONS:
            raise RuntimeError(f"correlation {key} registered twice")
        if geometry not in GEOMETRIES:
            raise RuntimeError(f"unknown geometry {geometry!r}; define it first")
        _METHODS_CACHE.clear()
        CORRELATIONS[key] = Correlation(
            geometry=geometry, method=method, function=function, title=title, source=source,
            equation=equation, validity=tuple(validity), cases=tuple(cases), notes=notes,
            validity_by_case={c: tuple(r) for c, r in (validity_by_case or {}).items()},
            forms=dict(forms or {}))
        return function

    return register


_METHODS_CACHE: dict[tuple[str, str | None], list[str]] = {}


def methods_for(geometry: str, case: str | None = None) -> list[str]:
    """Method names registered for a geometry (and case), in registration order.

    Parameters
    ----------
    geometry : str
        A geometry name of the registry (a key of :data:`GEOMETRIES`: "vplate", "cavity" ...).
    case : str, optional
        For plate geometries, "hot-up", "hot-down", "cold-up" or "cold-down": only the methods
        that serve that case.  None (the default) lists every method.

    Returns
    -------
    list of str
        The method names, as accepted by the ``method`` argument of the ``nu_*`` and ``h_*``
        functions (besides "auto").

    Notes
    -----
    Read from the correlation registry (:data:`CORRELATIONS`); each method's source, equation and
    validity are in its :class:`Correlation` and in the ``nu_<geometry>`` docstrings.

    Examples
    --------
    >>> methods_for("hplate", "hot-up")
    ['lloyd-moran', 'mcadams']
    """
    key = (geometry, case)
    if key not in _METHODS_CACHE:
        _METHODS_CACHE[key] = [c.method for (g, _), c in CORRELATIONS.items()
                               if g == geometry and (case is None or not c.cases or case in c.cases)]
    return list(_METHODS_CACHE[key])


def get_correlation(geometry: str, method: str) -> Correlation:
    """The registered correlation of ``geometry`` named ``method``, with its source and ranges.

    Parameters
    ----------
    geometry : str
        A geometry name of the registry (a key of :data:`GEOMETRIES`).
    method : str
        A method name of that geometry (see :func:`methods_for`).

    Returns
    -------
    Correlation
        Its ``title``, ``source``, ``equation``, ``validity`` (published ranges), ``cases``,
        ``notes`` and the vectorised ``function``.

    Raises
    ------
    KeyError
        No such geometry and method in the registry.

    Notes
    -----
    Read from the correlation registry (:data:`CORRELATIONS`), where each correlation is
    registered once, beside its code, with its source and validity.

    Examples
    --------
    >>> corr = get_correlation("hcyl", "churchill-chu")
    >>> corr.title
    'Churchill and Chu, horizontal cylinder'
    >>> [(r.quantity, r.low, r.high) for r in corr.validity]
    [('Ra', 1e-05, 1000000000000.0)]
    """
    try:
        return CORRELATIONS[(geometry, method)]
    except KeyError:
        raise KeyError(f"no correlation {method!r} for {geometry}") from None


def _input_domain(name: str, geo: Geometry) -> tuple[float, float, bool]:
    """Where :func:`nusselt` accepts a geometry input: (low, high, low end open), finite always.
    Both the array checks, which word the message, and the scalar path's plain comparisons
    read it."""
    if name == "tilt":
        return geo.tilt_range[0], geo.tilt_range[1], False
    return 0.0, math.inf, name != "ra"     # Ra >= 0; Pr, aspect, slenderness > 0


_INPUT_LABELS = {"ra": "Ra", "pr": "Pr"}   # the other inputs are named as typed


def _check_input(function_name: str, name: str, value, geo: Geometry) -> np.ndarray:
    low, high, low_open = _input_domain(name, geo)
    label = _INPUT_LABELS.get(name, name)
    if not math.isinf(high):
        return require_between(function_name, label, value, low, high, "deg")  # tilt
    return (require_positive if low_open else require_nonnegative)(function_name, label, value)


def _with_default_tilt(geo: Geometry, inputs: dict) -> dict:
    """``inputs`` with the geometry's default tilt where it takes one and none is given."""
    if "tilt" in geo.inputs and inputs.get("tilt") is None and geo.default_tilt is not None:
        inputs["tilt"] = geo.default_tilt
    return inputs


def _checked_inputs(function_name: str, geometry: Geometry, raw: Mapping[str, object]) -> dict:
    inputs = {}
    for name in geometry.inputs:
        if name not in raw:
            raise InputError(function_name, name, None, f'a number for geometry "{geometry.name}"')
        inputs[name] = _check_input(function_name, name, raw[name], geometry)
    arrays = np.broadcast_arrays(*inputs.values())
    return {name: array for name, array in zip(inputs, arrays)}


def _resolve_method(function_name: str, geometry: Geometry, method, case) -> str:
    if method is None or method == "auto":
        return "auto"
    allowed = ["auto"] + methods_for(geometry.name, case)
    name = method.strip().lower() if isinstance(method, str) else None
    if case is not None and name not in allowed and name in methods_for(geometry.name):
        # The method exists for this geometry but not for this case: say which cases it serves.
        serves = ", ".join(f'"{c}"' for c in CORRELATIONS[(geometry.name, name)].cases)
        raise InputError(function_name, "method", method,
                         "one of " + ", ".join(f'"{c}"' for c in allowed)
                         + f' for case "{case}" ({name} serves only {serves})')
    return require_choice(function_name, "method", method, allowed)


def nusselt(geometry: str, method: str | None = "auto", case: str | None = None, *,
            function_name: str | None = None, warn: bool = False, notes: bool = True,
            **inputs: ArrayLike) -> NusseltResult:
    """Evaluate Nu for ``geometry`` by ``method`` (or "auto") with full validity information.

    This never raises for inputs outside a correlation's range (that is a note), only for
    inputs no correlation can take (negative Ra, unknown case, unknown method).  With
    ``warn=True`` a :class:`CorrelationRangeWarning` is issued listing every note.

    Parameters
    ----------
    geometry : str
        A geometry name of the registry (a key of :data:`GEOMETRIES`: "vplate", "hplate",
        "tplate", "hcyl", "sphere", "vcyl", "cavity", "channel").
    method : str or None, default "auto"
        A method of the geometry (see :func:`methods_for`), or "auto" / None for the geometry's
        auto rule.
    case : str, optional
        For plate geometries, "hot-up", "hot-down", "cold-up" or "cold-down"; required there.
    function_name : str, optional
        The name error messages and notes are given under; default ``nu_<geometry>``.
    warn : bool, default False
        Issue a :class:`CorrelationRangeWarning` when any input is out of range.
    notes : bool, default True
        Word the range notes; False leaves ``note`` empty (``in_range`` is still computed),
        which is faster for large arrays.
    inputs : array_like
        The geometry's inputs by name (dimensionless): ``ra``, ``pr`` and, as the geometry
        needs them, ``tilt`` (deg), ``aspect``, ``slenderness``; arrays broadcast.

    Returns
    -------
    NusseltResult
        ``nu`` (-), ``method`` (the method used, per element), ``in_range``, ``note`` (the
        bounds crossed, "" in range) and ``blend`` (the methods auto weighed, if several),
        arrays of the broadcast shape.

    Raises
    ------
    InputError
        Ra < 0, Pr <= 0, an unknown case or method, a missing input.

    Notes
    -----
    Each method's equation, source and validity are registered with it (:data:`CORRELATIONS`)
    and listed in the Notes of the ``nu_<geometry>`` function; "auto" follows the geometry's
    auto rule (:attr:`Geometry.description`).

    Examples
    --------
    >>> result = nusselt("hplate", "auto", "hot-up", ra=1e12, pr=0.71)
    >>> bool(result.in_range), str(result.note)
    (False, 'lloyd-moran: Ra = 1e+12 above 1e+11 (valid 10000 <= Ra <= 1e+11)')
    """
    geo = GEOMETRIES[geometry]
    function_name = function_name or f"nu_{geometry}"
    if geo.cases:
        case = require_choice(function_name, "case", case, geo.cases)
    else:
        case = None
    method = _resolve_method(function_name, geo, method, case)
    inputs = _with_default_tilt(geo, inputs)
    plain = _plain_inputs(geo, inputs)
    if plain is not None:  # one case in plain numbers: the scalar path (the same formulas)
        result = _scalar(geo, method, case, plain)
    else:
        arrays = _checked_inputs(function_name, geo, inputs)
        shape = next(iter(arrays.values())).shape if arrays else ()
        result = nusselt_checked(geo, method, case, {k: v.ravel() for k, v in arrays.items()}, notes)
        result = NusseltResult(**{name: getattr(result, name).reshape(shape)
                                  for name in NusseltResult.__dataclass_fields__})
    if warn:
        warn_out_of_range(function_name, result.in_range, result.note)
    return result


def nusselt_checked(geo: Geometry, method: str, case, inputs: Mapping[str, np.ndarray],
                    notes: bool = True, ranges: bool = True) -> NusseltResult:
    """:func:`nusselt`'s array path without its argument checks, for a caller that built and
    checked the inputs itself (the network solver, which calls this a few times per solve on
    arrays it made: the checks cost more than the correlations there).

    ``method`` is "auto" or a method of ``geo`` serving ``case``; ``case`` one of the geometry's
    cases (None without cases); ``inputs`` every input the geometry takes, as 1-D float arrays
    of one length with values the checks of :func:`nusselt` accept (finite Ra >= 0, Pr > 0...).
    ``ranges=False`` leaves ``in_range`` and ``note`` None: a caller reading only Nu and the
    method (the solver's iterations) does not pay for the range tests.
    """
    if method == "auto":
        result = _auto(geo, case, inputs, notes, ranges)
    else:
        result = _evaluate_one(geo, method, case, inputs, notes, ranges)
    if geo.floor is not None:
        result.nu = np.maximum(result.nu, geo.floor)
    return result


def _plain_inputs(geo: Geometry, inputs) -> dict[str, float] | None:
    """The inputs as floats when each is a plain number the geometry accepts; else None (the
    array path then checks them and words the message)."""
    values = {}
    for name in geo.inputs:
        value = inputs.get(name)
        if type(value) not in PLAIN_NUMBERS:
            return None
        value = float(value)
        low, high, low_open = _input_domain(name, geo)
        if not ((low < value if low_open else low <= value) and value <= high and value < math.inf):
            return None
        values[name] = value
    return values


def _scalar(geo: Geometry, method: str, case, values: dict[str, float]) -> NusseltResult:
    """Nu for one case in plain numbers: the auto rule's weights with :meth:`Range.weight_of`,
    stopping as soon as nothing is left; notes formatted only for a bound crossed."""
    # numpy scalars, not Python floats: comparisons then give numpy booleans, which the
    # correlations combine with ~ and & as they do arrays
    arrays = {k: np.float64(v) for k, v in values.items()}
    args = dict(arrays, case=case) if geo.cases else arrays
    floor = -math.inf if geo.floor is None else geo.floor
    if method != "auto":
        corr = CORRELATIONS[(geo.name, method)]
        nu = max(_first(corr.function(**args)), floor)
        return _scalar_result(nu, method, _scalar_note(corr, arrays, values, case), "")
    left, nu = 1.0, 0.0
    weights: dict[str, float] = {}
    for name, ranges, function in _compiled_steps(geo, case):
        coverage = 1.0
        for bound, key in ranges:
            coverage *= bound.weight_of(values[key] if key else _first(bound.of(arrays)))
            if coverage == 0.0:
                break
        weight = left * coverage
        if weight > 0.0:
            nu += weight * max(_first(function(**args)), floor)
            weights[name] = weights.get(name, 0.0) + weight
            left -= weight
        if left <= 0.0 or coverage == 1.0:
            break
    names = list(weights) if len(weights) == 1 else [  # several: in the rule's order
        name for name in geo.auto_methods(case) if name in weights]
    notes = [note for note in (_scalar_note(CORRELATIONS[(geo.name, name)], arrays, values, case)
                               for name in names) if note]
    blend = "auto blend of " + " and ".join(names) if len(names) > 1 else ""
    note = "; ".join(notes)
    if note and blend:
        note = f"{blend}: {note}"
    return _scalar_result(max(nu, floor), max(names, key=weights.get), note, blend)


def _compiled_steps(geo: Geometry, case):
    """The auto rule of ``case`` as (method, ((range, input name or None), ...), function),
    built once per geometry and case (a cache, not a field of the frozen Geometry)."""
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


def _first(values) -> float:
    if getattr(values, "ndim", 0) == 0:
        return float(values)
    return float(np.ravel(values)[0])


def _scalar_note(corr: Correlation, arrays, values, case) -> str:
    for bound in corr.ranges(case):
        value = values[bound.quantity.lower()] if bound.of is None else _first(bound.of(arrays))
        if not bound.low <= value <= bound.high:
            return str(_violation_notes(corr.method, bound, np.array([value]))[0])
    return ""


def _scalar_result(nu: float, method: str, note: str, blend: str) -> NusseltResult:
    return NusseltResult(nu=np.array(nu), method=np.array(method, dtype=object),
                         in_range=np.array(note == ""), note=np.array(note, dtype=object),
                         blend=np.array(blend, dtype=object))


def _evaluate_one(geo: Geometry, method: str, case, arrays, notes: bool = True, ranges: bool = True,
                  form: str | None = None) -> NusseltResult:
    """One correlation (or one published ``form`` of it) on 1-D inputs, before the geometry's
    floor."""
    corr = CORRELATIONS[(geo.name, method)]
    function = corr.forms[form] if form else corr.function
    size = next(iter(arrays.values())).shape
    nu = np.asarray(function(**(dict(arrays, case=case) if geo.cases else arrays)), dtype=float)
    in_range, note = _range_notes(corr, arrays, case, notes) if ranges else (None, None)
    return NusseltResult(nu=nu if nu.shape == size else np.broadcast_to(nu, size).copy(),
                         method=uniform(method, size), in_range=in_range, note=note)


def _range_notes(corr: Correlation, arrays, case, notes: bool):
    """(in_range, note): the notes text only when asked for (it costs a string per element)."""
    if notes:
        note = corr.notes_for(arrays, case)
        return np.asarray(note == ""), note
    in_range = corr.inside(arrays, case)
    return in_range, uniform("", in_range.shape)


def _auto(geo: Geometry, case, arrays, notes: bool = True, ranges: bool = True) -> NusseltResult:
    """The geometry's auto rule on 1-D inputs: each step takes its coverage of what is left.

    With c_k the continuous coverage of step k (:meth:`AutoStep.coverage`), step k's weight is
    c_k (1 - c_1) ... (1 - c_(k-1)); the weights add up to 1 because the last step covers
    everything.  The value is the weighted sum of the methods' values, each floored like a named
    method, so it lies between them.  Each weighted method's own range notes are kept; where
    several methods carry weight, ``blend`` names them and an out-of-range note says so too.
    """
    size = next(iter(arrays.values())).shape
    steps = geo.auto[case]
    if size == (0,):
        empty = np.empty(0, dtype=object)
        return NusseltResult(nu=np.empty(0), method=empty, in_range=np.ones(0, dtype=bool), note=empty)
    if len(steps) == 1 and steps[0].when == ():
        # a rule of one unconditional step (most plate cases): its method everywhere, the same
        # numbers as the loop below gives (0 + 1 x, floored by the caller) without its dozen
        # array operations, which the network solver would pay on every evaluation
        return _evaluate_one(geo, steps[0].method, case, arrays, notes, ranges, form=steps[0].form)
    left = np.ones(size)
    nu = np.zeros(size)
    weights: dict[str, np.ndarray] = {}        # method -> total weight (its forms together)
    for step in steps:
        corr = CORRELATIONS[(geo.name, step.method)]
        coverage = step.coverage(corr, arrays, case)
        if coverage is None:  # covers everything: takes all that is left
            weight, left = left, np.zeros(size)
        else:
            weight, left = left * coverage, left * (1.0 - coverage)
        used = weight > 0.0
        if used.any():
            everywhere = used.all()
            part = arrays if everywhere else {k: v[used] for k, v in arrays.items()}
            function = corr.forms[step.form] if step.form else corr.function
            value = np.asarray(function(**(dict(part, case=case) if geo.cases else part)), dtype=float)
            if geo.floor is not None:
                value = np.maximum(value, geo.floor)
            if everywhere:
                nu += weight * value
            else:
                nu[used] += weight[used] * value
            weights[step.method] = weights.get(step.method, 0.0) + weight
        if not left.any():
            break
    names = list(weights) if len(weights) == 1 else [  # several: in the rule's order
        name for name in geo.auto_methods(case) if name in weights]
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


def merge_masked(result_type, parts, shape):
    """One result of ``result_type`` (a dataclass of arrays) from ``(mask, part)`` pairs that
    together cover ``shape``; each field keeps the dtype of the first part's field."""
    fields = {}
    for name in result_type.__dataclass_fields__:
        sample = np.asarray(getattr(parts[0][1], name))
        merged = np.empty(shape, dtype=sample.dtype if sample.dtype != object else object)
        for mask, part in parts:
            merged[mask] = getattr(part, name)
        fields[name] = merged
    return result_type(**fields)


def nusselt_value(geometry: str, method, case=None, *, function_name: str, **inputs):
    """Nu alone (float for scalar inputs), warning when any input is outside the range."""
    return unwrap(nusselt(geometry, method, case, function_name=function_name, warn=True, **inputs).nu)


def nusselt_at_difference(geometry: str, method, case=None, *, function_name: str, ra, **inputs) -> NusseltResult:
    """Nu when Ra is known on the temperature difference (Ra = 0 gives Nu = 0 for a flux case).

    For a case in the geometry's ``flux_cases`` the correlation reads Ra* = Ra Nu, so Nu solves
    Nu = F(Ra Nu): a secant iteration on ln Nu (the map's slope d ln F / d ln Ra* lies in
    (0, 1/2] for the published forms, so the iteration is a contraction and converges in a few
    steps).  Other cases are :func:`nusselt` itself.  The Ra the correlation read is
    ``Geometry.correlation_rayleigh(ra, result.nu, case)``.
    """
    geo = GEOMETRIES[geometry]
    if case not in geo.flux_cases:
        return nusselt(geometry, method, case, function_name=function_name, ra=ra, **inputs)
    method = _resolve_method(function_name, geo, method, case)
    arrays = _checked_inputs(function_name, geo, _with_default_tilt(geo, dict(inputs, ra=ra)))
    shape = arrays["ra"].shape
    result = nusselt_at_difference_checked(geo, method, case, {k: v.ravel() for k, v in arrays.items()})
    return NusseltResult(**{name: getattr(result, name).reshape(shape) for name in NusseltResult.__dataclass_fields__})


def nusselt_at_difference_checked(geo: Geometry, method: str, case, inputs: Mapping[str, np.ndarray],
                                  notes: bool = True, ranges: bool = True) -> NusseltResult:
    """:func:`nusselt_at_difference` without its argument checks, on the inputs
    :func:`nusselt_checked` takes (1-D, checked, ``method`` resolved): the network solver calls
    it at every iteration, where the checks would be repeated on arrays it built itself."""
    if case not in geo.flux_cases:
        return nusselt_checked(geo, method, case, inputs, notes, ranges)
    ra = inputs["ra"]
    positive = ra > 0
    ra_pos = np.where(positive, ra, 1.0)

    def residual(log_nu):
        nu = nusselt_checked(geo, method, case, dict(inputs, ra=ra_pos * np.exp(log_nu)), notes=False,
                             ranges=False).nu
        return np.log(nu) - log_nu

    previous = np.zeros_like(ra_pos)
    r_previous = residual(previous)
    current = previous + r_previous  # one fixed-point step
    for _ in range(60):
        r_current = residual(current)
        if np.all(np.abs(r_current) < 1e-13):
            break
        slope = (r_current - r_previous) / np.where(current == previous, 1.0, current - previous)
        with np.errstate(divide="ignore", invalid="ignore"):  # the where() keeps only finite steps
            step = np.where((current == previous) | (slope == 0), r_current, -r_current / slope)
        previous, r_previous, current = current, r_current, current + step
    result = nusselt_checked(geo, method, case, dict(inputs, ra=ra * np.exp(current)), notes, ranges)
    result.nu = np.where(positive, result.nu, 0.0)
    return result


# --- the spread of the published correlations ---------------------------------------------------

@dataclass(frozen=True)
class NusseltSpread:
    """The lowest and highest Nu among the correlations whose published ranges cover a case.

    ``low`` and ``high`` are NaN where no registered correlation covers the case (``count`` 0).
    ``methods`` lists the covering methods in ascending order of their Nu (a tuple for scalar
    input, an object array of tuples otherwise), so ``methods[0]`` gave ``low`` and
    ``methods[-1]`` gave ``high``.  This is the spread of published correlations, not a
    statistical confidence interval: it says how much the literature disagrees about the case.
    """

    low: np.ndarray
    high: np.ndarray
    count: np.ndarray
    methods: np.ndarray

    @property
    def text(self):
        """The methods as text, lowest Nu first ("morgan < churchill-chu")."""
        if isinstance(self.methods, tuple):
            return " < ".join(self.methods)
        return np.vectorize(lambda m: " < ".join(m), otypes=[object])(self.methods)


def nu_spread(geometry: str, ra: ArrayLike, pr: ArrayLike, *, case: str | None = None,
              tilt: ArrayLike | None = None, aspect: ArrayLike | None = None,
              slenderness: ArrayLike | None = None, function_name: str = "nu_spread") -> NusseltSpread:
    """Lowest and highest Nu among every registered correlation of ``geometry`` whose published
    validity ranges cover the case (with the geometry's floor applied, as ``nusselt`` does).

    Parameters
    ----------
    geometry : {"vplate", "hplate", "tplate", "hcyl", "sphere", "vcyl", "cavity", "channel"}
        The geometry, a name of the registry.
    ra : array_like
        Rayleigh number on the geometry's own length (-), >= 0 (Ra*_S for a channel's flux cases).
    pr : array_like
        Prandtl number (-), > 0.
    case : str, optional
        Plate case for hplate and tplate ("hot-up", "hot-down", "cold-up", "cold-down"); the
        walls of a channel ("isothermal", "isothermal-adiabatic", "flux", "flux-adiabatic").
    tilt : array_like, optional
        Degrees: from the vertical for tplate, from the horizontal for cavity (default 90).
    aspect : array_like, optional
        Cavity height/gap; channel height/spacing.
    slenderness : array_like, optional
        Vertical cylinder height/diameter.
    function_name : str, default "nu_spread"
        The name error messages are given under.

    Returns
    -------
    NusseltSpread
        ``.low``, ``.high`` (floats for scalar input; NaN where ``.count`` is 0), ``.count``
        and ``.methods`` (covering methods, ascending Nu).  Where "auto" is in range, its value
        lies between ``low`` and ``high``.

    Notes
    -----
    Every method of :func:`methods_for` is evaluated and kept where its published ranges (the
    registry's, as listed in the ``nu_<geometry>`` docstrings with their sources) cover the
    inputs.  The spread of published correlations, not a confidence interval.

    Examples
    --------
    >>> spread = nu_spread("hcyl", 1e6, 0.71)
    >>> spread.methods, round(spread.low, 2), round(spread.high, 2)
    (('churchill-chu', 'morgan'), 14.54, 15.18)
    """
    geo = _geometry(function_name, geometry)
    given = _with_default_tilt(geo, {"ra": ra, "pr": pr, "tilt": tilt, "aspect": aspect,
                                     "slenderness": slenderness})
    case = require_choice(function_name, "case", case, geo.cases) if geo.cases else None
    arrays = _checked_inputs(function_name, geo, {k: v for k, v in given.items()
                                                  if k in geo.inputs and v is not None})
    shape = next(iter(arrays.values())).shape
    flat = {k: v.ravel() for k, v in arrays.items()}
    names, values = [], []
    for method in methods_for(geo.name, case):
        corr = CORRELATIONS[(geo.name, method)]
        args = dict(flat, case=case) if geo.cases else flat
        nu = np.broadcast_to(np.asarray(corr.function(**args), dtype=float), flat["ra"].shape)
        if geo.floor is not None:
            nu = np.maximum(nu, geo.floor)
        names.append(method)
        values.append(np.where(corr.inside(flat, case), nu, np.nan))
    table = np.array(values).reshape(len(names), -1)            # (methods, points)
    covered = ~np.isnan(table)
    count = covered.sum(axis=0)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # all-NaN columns: no covering method
        low, high = np.nanmin(table, axis=0), np.nanmax(table, axis=0)
    order = np.argsort(np.where(covered, table, np.inf), axis=0, kind="stable")
    methods = np.empty(table.shape[1], dtype=object)
    for point in range(table.shape[1]):
        methods[point] = tuple(names[i] for i in order[:count[point], point])
    if shape == ():
        return NusseltSpread(low=float(low[0]), high=float(high[0]), count=int(count[0]),
                             methods=methods[0])
    return NusseltSpread(low=low.reshape(shape), high=high.reshape(shape), count=count.reshape(shape),
                         methods=methods.reshape(shape))


def _geometry(function_name: str, geometry) -> Geometry:
    name = require_choice(function_name, "geometry", geometry, tuple(GEOMETRIES))
    return GEOMETRIES[name]


# --- docstrings generated from the registry -----------------------------------------------------

#: What each geometry input is, for the Parameters section (name -> (type, description)).
INPUT_DOCS = {
    "ra": ("array_like", "Rayleigh number on the geometry's own length (-), >= 0."),
    "pr": ("array_like", "Prandtl number of the fluid (-), > 0."),
    "aspect": ("array_like", "Height/gap H/L of the layer (-), > 0."),
    "slenderness": ("array_like", "Height/diameter of the cylinder (-), > 0."),
    "tilt": ("array_like", "Tilt in degrees."),
}


def _indent(text: str, spaces: int = 4) -> str:
    import textwrap
    return textwrap.fill(" ".join(text.split()), width=96, initial_indent=" " * spaces,
                         subsequent_indent=" " * spaces)


def methods_section(geometry: str) -> str:
    """The Notes section of a geometry's public functions: every registered method with its
    title, equation, validity and source, and the auto rule, read from the registry."""
    geo = GEOMETRIES[geometry]
    lines = ["Notes", "-----", f"Methods for the {geo.title or geo.name} (from the correlation registry):", ""]
    for method in geo.methods:
        corr = CORRELATIONS[(geometry, method)]
        cases = corr.cases if corr.cases else (None,)
        validity = "; ".join(dict.fromkeys(f"{c}: {corr.describe_validity(c)}" if c else corr.describe_validity()
                                           for c in cases)) if corr.validity_by_case else corr.describe_validity()
        lines += [f"``{method}``", _indent(f"{corr.title}.", 4), _indent(f"Equation: {corr.equation}", 4),
                  _indent(f"Valid: {validity}.", 4), _indent(f"Source: {corr.source}", 4), ""]
    lines += ['``"auto"``', _indent(geo.description, 4)]
    return "\n".join(lines)


def document(function, geometry: str, summary: str, parameters: Sequence[tuple[str, str, str]],
             returns: tuple[str, str], example: str):
    """Give ``function`` a numpydoc docstring: ``summary``, its ``parameters`` (name, type,
    description with unit), ``returns`` (type, description), the geometry's methods and auto
    rule from the registry, and an ``example`` (doctest lines)."""
    lines = [summary, "", "Parameters", "----------"]
    for name, kind, text in parameters:
        lines += [f"{name} : {kind}", _indent(text, 4)]
    lines += ["", "Returns", "-------", returns[0], _indent(returns[1], 4), "",
              "Warns", "-----", "CorrelationRangeWarning",
              _indent("When an input lies outside the published range of the method used (the value is "
                      "still returned).", 4), "",
              methods_section(geometry), "", "Examples", "--------", example]
    function.__doc__ = "\n".join(lines) + "\n"
    return function


def nusselt_parameters(geometry: str, tilt_doc: str = "", case: bool = False):
    """The Parameters entries of a ``nu_<geometry>`` function, from the geometry's inputs."""
    geo = GEOMETRIES[geometry]
    entries = []
    for name in geo.inputs:
        kind, text = INPUT_DOCS[name]
        entries.append((name, kind, tilt_doc if name == "tilt" and tilt_doc else text))
    if case:
        entries.append(("case", "str", 'One of ' + ", ".join(f'"{c}"' for c in geo.cases)
                        + " (the face looks up or down and is hotter or colder than the fluid)."))
    entries.append(("method", 'str, default "auto"', f'One of {geo.method_help()}, or "auto" (see Notes).'))
    return entries
