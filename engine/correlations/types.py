"""The registry's types: a geometry and its auto rule, a published correlation, the result of an
evaluation (the facts each layer above reads)."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Callable, Mapping

import numpy as np

from ..validity import Range, distinct_notes, format_value, unwrap

PLATE_CASES = ("hot-up", "hot-down", "cold-up", "cold-down")
# A heated face looking up and a cooled face looking down both drive an unstable, rising
# (or falling) plume off the face; the other two cases trap the fluid against the face.
UNSTABLE_CASES = ("hot-up", "cold-down")
STABLE_CASES = ("hot-down", "cold-up")


#: The auto rule in words, the same for every geometry (stillair.correlations.auto computes it);
#: each geometry's description gives its order and ranges and then this.
AUTO_PRINCIPLE = (
    "Auto prefers what is valid: it weighs the rule's correlations in order, each by how far it "
    "lies inside its published ranges (its coverage, falling to 0 across the transition band "
    "inside a bound: a factor 4 in Ra, 1.25 in aspect, Pr and slenderness, 5 deg in tilt).  A "
    "correlation hands its weight on across its band only as far as a later one inside its own "
    "range can take it, and what no correlation covers is taken, in order, by those inside their "
    "ranges (each as far as it covers along Ra and lies a tenth of a band inside its other "
    "bounds), so a correlation whose Ra range ends hands over across its whole band.  Where the "
    "correlation in use reaches the end of its range and no valid neighbour takes over, it keeps "
    "its weight, and outside every range the nearest valid correlation is used, extrapolated, "
    "with the note.  Where two ranges only touch, the two share a tenth of a band either side of "
    "the touch, so the value has no step.")


@dataclass(frozen=True)
class AutoStep:
    """One step of a geometry's "auto" rule: use ``method`` where ``when`` holds.

    The step always reads the method's published validity ranges (those with
    ``Range.in_auto``); ``when`` adds auto's own where its choice is narrower (one band of a
    piecewise correlation, a continuous stand-in for a published range that jumps).  An empty
    ``when`` adds nothing (a rule of one correlation).  ``form`` names one published band of a
    piecewise correlation (:attr:`Correlation.forms`), so that auto can blend across the band
    edge while the named method keeps its published step.  Its weight follows from the largest
    of its ranges' shortfalls (:func:`stillair.correlations.auto.weigh_steps`).
    """

    method: str
    when: tuple[Range, ...] | None = None
    form: str | None = None


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
    :class:`AutoStep` list of its "auto" rule, in the order auto prefers the correlations valid
    at a point (:data:`AUTO_PRINCIPLE`; :mod:`stillair.correlations.auto`).  ``floor`` is the smallest physical Nusselt number (1 for
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
    auto: Mapping[Any, tuple[AutoStep, ...]] = field(default_factory=dict)  # case (None: no cases) -> rule
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
        return self.case_methods(None)

    def case_methods(self, case: str | None) -> list[str]:
        from .registry import methods_for  # the registry holds Geometry objects: imported late
        return methods_for(self.name, case)

    def method_help(self) -> str:
        """The methods in words, with the cases each serves where it serves only some:
        "churchill-chu-cos (hot-down, cold-up), raithby-hollands (hot-up, cold-down)"."""
        from .registry import CORRELATIONS  # see case_methods
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
        return self.validity if case is None else self.validity_by_case.get(case, self.validity)

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
    in_range: Any  # array: every weighted method inside its published ranges (None: ranges=False)
    note: Any      # array: "" in range; else the bounds crossed (and the blend, if any)
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


