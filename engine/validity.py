"""Input checking, validity ranges and the messages both produce.

Every public engine function checks its arguments through the helpers here, so a wrong input
always produces the same shape of message, naming the function, the argument, the value and what
is allowed (``h_cavity: gap must be > 0 m, got -0.01``).  The cell layer re-words only the
function name (``H_CAVITY``).

Validity ranges of correlations are :class:`Range` objects.  A value outside a correlation's range
is *not* an error: the number is still computed, and the range note travels with it
(:class:`CorrelationRangeWarning` from the plain Python functions, a note in cells, CLI and the
network result).
"""

from __future__ import annotations

import dataclasses

import contextvars
import math
import warnings
from dataclasses import dataclass, field
from typing import Any, Callable, Mapping, TypeGuard

import numpy as np

__all__ = [
    "StillairError",
    "InputError",
    "CorrelationRangeWarning",
    "Range",
    "as_float_array",
    "require_finite",
    "require_positive",
    "require_nonnegative",
    "require_between",
    "require_choice",
    "require_length",
    "LENGTH_RANGE",
    "format_value",
    "unwrap",
    "distinct_notes",
    "collect_range_notes",
    "TRANSITION_BANDS",
]

ABSOLUTE_ZERO_C = -273.15


class StillairError(ValueError):
    """Base class of every error stillair raises on purpose."""


class InputError(StillairError):
    """An argument outside what the function accepts.

    The parts are kept so that the cell layer can rebuild the message with the cell function's
    own name.
    """

    def __init__(self, function: str, argument: str, value, allowed: str):
        self.function = function
        self.argument = argument
        self.value = value
        self.allowed = allowed
        super().__init__(self.render(function))

    def render(self, function_name: str) -> str:
        return f"{function_name}: {self.argument} must be {self.allowed}, got {format_value(self.value)}"


class CorrelationRangeWarning(UserWarning):
    """A correlation was evaluated outside its published validity range."""


def format_value(value) -> str:
    """Short, readable rendering of a scalar or array for error messages."""
    if isinstance(value, str):
        return repr(value)
    array = np.asarray(value) if not isinstance(value, (list, tuple)) or _is_numeric(value) else None
    if array is None:
        return repr(value)
    if array.ndim == 0:
        item = array.item()
        if isinstance(item, float):
            return f"{item:.6g}"
        return repr(item) if isinstance(item, str) else str(item)
    return f"array of {array.size} values"


def _is_numeric(value) -> bool:
    try:
        np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        return False
    return True


def as_float_array(function: str, argument: str, value) -> np.ndarray:
    """Convert ``value`` to a float array, rejecting text, None and booleans by name."""
    if value is None:
        raise InputError(function, argument, value, "a number")
    if isinstance(value, (bool, np.bool_)):
        raise InputError(function, argument, value, "a number, not a logical value")
    if isinstance(value, str):
        raise InputError(function, argument, value, "a number, not text")
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(function, argument, value, "a number") from None
    return array


def require_finite(function: str, argument: str, value) -> np.ndarray:
    if type(value) in PLAIN_NUMBERS and -math.inf < value < math.inf:   # one plain number: no array tests
        return np.asarray(value, dtype=float)
    array = as_float_array(function, argument, value)
    finite = np.isfinite(array)
    if not np.all(finite):
        raise InputError(function, argument, _first_bad(array, ~finite), "a finite number")
    return array


def _first_bad(array: np.ndarray, bad: np.ndarray):
    return array[bad].flat[0] if array.ndim else array.item()


def require_positive(function: str, argument: str, value, unit: str = "") -> np.ndarray:
    if type(value) in PLAIN_NUMBERS and 0.0 < value < math.inf:
        return np.asarray(value, dtype=float)
    array = require_finite(function, argument, value)
    bad = ~(array > 0)
    if np.any(bad):
        raise InputError(function, argument, _first_bad(array, bad), f"> 0{_unit(unit)}")
    return array


def require_nonnegative(function: str, argument: str, value, unit: str = "") -> np.ndarray:
    if type(value) in PLAIN_NUMBERS and 0.0 <= value < math.inf:
        return np.asarray(value, dtype=float)
    array = require_finite(function, argument, value)
    bad = ~(array >= 0)
    if np.any(bad):
        raise InputError(function, argument, _first_bad(array, bad), f">= 0{_unit(unit)}")
    return array


def require_between(function: str, argument: str, value, low: float, high: float,
                    unit: str = "", low_open: bool = False, high_open: bool = False) -> np.ndarray:
    if (type(value) in PLAIN_NUMBERS and -math.inf < value < math.inf
            and (low < value if low_open else low <= value) and (value < high if high_open else value <= high)):
        return np.asarray(value, dtype=float)
    array = require_finite(function, argument, value)
    above_low = array > low if low_open else array >= low
    below_high = array < high if high_open else array <= high
    bad = ~(above_low & below_high)
    if np.any(bad):
        left = "(" if low_open else "["
        right = ")" if high_open else "]"
        allowed = f"in {left}{format_value(low)}, {format_value(high)}{right}{_unit(unit)}"
        raise InputError(function, argument, _first_bad(array, bad), allowed)
    return array


#: The lengths a geometry argument may take, in m.  Below 1 um the gas is no continuum for any
#: correlation here (the mean free path of air at 1 atm is about 0.07 um, from memory; the
#: correlations are continuum results); above 1 km no still-air geometry of this trade exists,
#: and a length there is almost surely a value typed in the wrong unit.  Outside: an error.
LENGTH_RANGE = (1e-6, 1e3)


def require_length(function: str, argument: str, value, high: float = LENGTH_RANGE[1]) -> np.ndarray:
    """A geometry length in m, finite and inside [1e-6 m, ``high``] (:data:`LENGTH_RANGE`)."""
    if is_plain_length(value, high):
        return np.asarray(value, dtype=float)
    array = require_positive(function, argument, value, "m")
    low = LENGTH_RANGE[0]
    for bad, allowed in ((array > high, f"at most {format_value(high)} m (is it in mm?)"),
                         (array < low, f"at least {format_value(low)} m (the gas is no continuum below)")):
        if np.any(bad):
            raise InputError(function, argument, _first_bad(array, bad), allowed)
    return array


def is_plain_length(value, high: float = LENGTH_RANGE[1]) -> bool:
    """The scalar paths' plain test of :func:`require_length`."""
    return type(value) in PLAIN_NUMBERS and LENGTH_RANGE[0] <= value <= high


def require_choice(function: str, argument: str, value, choices) -> str:
    if not isinstance(value, str) or value.strip().lower() not in choices:
        raise InputError(function, argument, value, "one of " + ", ".join(f'"{c}"' for c in choices))
    return value.strip().lower()


def _unit(unit: str) -> str:
    return f" {unit}" if unit else ""


def distinct_notes(notes) -> list[str]:
    """The distinct non-empty notes of a note array, in order of first appearance."""
    return list(dict.fromkeys(note for note in np.atleast_1d(notes).ravel() if note))


#: The types a scalar path takes as one plain number (a bool is not one: the checks refuse a
#: logical value with a message).
PLAIN_NUMBERS = (float, int, np.float64)


def is_plain_number(value: object) -> TypeGuard[float]:
    """True for one plain number (:data:`PLAIN_NUMBERS`), the test of the scalar paths; a type
    checker then knows the value compares as a float."""
    return type(value) in PLAIN_NUMBERS


# Where range notes go instead of warnings while a caller collects them (collect_range_notes).
_NOTE_SINK: contextvars.ContextVar[list | None] = contextvars.ContextVar("stillair_range_notes",
                                                                         default=None)


def collect_range_notes(sink: list | None) -> contextvars.Token:
    """Until ``_NOTE_SINK.reset(token)`` with the token returned, the range notes this thread's
    calls would warn as :class:`CorrelationRangeWarning` are appended to ``sink`` (their text)
    instead; ``None`` warns again.  A caller that wants every note as data (the cell layer, once
    per call) pays a context variable instead of ``warnings.catch_warnings`` (several µs)."""
    return _NOTE_SINK.set(sink)


def warn_out_of_range(function_name: str, in_range, notes) -> None:
    """Issue a :class:`CorrelationRangeWarning` listing the distinct notes when any element is
    outside its correlation's range; it points at the line that called the caller.  While a
    caller collects the notes (:func:`collect_range_notes`) the text goes to its list instead."""
    if not (bool(in_range) if getattr(in_range, "ndim", None) == 0 else np.all(in_range)):  # np.all: 2 us on one
        message = f"{function_name}: outside validity range: " + "; ".join(distinct_notes(notes))
        sink = _NOTE_SINK.get()
        if sink is not None:
            sink.append(message)
        else:
            warnings.warn(message, CorrelationRangeWarning, stacklevel=4)


def unwrap(array):
    """Return a Python float for 0-d results, the array otherwise."""
    array = np.asarray(array)
    if array.ndim == 0:
        item = array.item()
        return item
    return array


#: Width of the transition band over which "auto" hands a bound over to the next correlation,
#: by quantity: a factor for quantities read on a log scale (Ra and its products, aspect, Pr,
#: slenderness), degrees for tilts.  A Range may state its own ``band``.
TRANSITION_BANDS = {"aspect": 1.25, "Pr": 1.25, "slenderness": 1.25}
DEFAULT_LOG_BAND = 4.0      # a factor of two either side of the band's middle
DEFAULT_TILT_BAND = 5.0     # degrees
#: Bounds that coincide with the end of an input's allowed domain need no transition.
_DOMAIN = {"tilt": (0.0, 180.0)}
_OFFSET = {"inside": 0.0, "centred": 0.5}
#: The default band on each scale, by "is it a log scale": 5 deg, or the log of a factor 4.
_DEFAULT_UNIT = {False: DEFAULT_TILT_BAND, True: math.log(DEFAULT_LOG_BAND)}
#: How far inside the ends of the full-weight interval (:func:`_full_weight_interval`) a value
#: must lie, relative, to be taken as fully weighted without the arithmetic: far above the
#: round-off of that arithmetic (~1e-16), far below any band (a factor 1.25 or 5 deg); and how
#: far outside the weightless ends (:func:`_weightless_interval`) it must lie to weigh nothing.
_FULL_WEIGHT_MARGIN = 1e-9


@dataclass(frozen=True)
class Range:
    """A closed validity interval of one quantity, as published with a correlation.

    ``quantity`` is the name shown in notes ("Ra", "Pr", "aspect", "tilt", "Ra*Pr/(0.2+Pr)").
    ``of`` computes the quantity from the correlation's inputs when it is not an input itself;
    by default the input of the same name (lower case) is used.  Bounds are inclusive: papers
    state them loosely and a reviewer should not be warned at the exact published bound.

    The same object describes where "auto" uses a correlation (:meth:`weight`): full weight
    inside, none outside, and linear in between over the transition band ``band`` (a factor on
    a log scale, degrees for tilts; default :data:`TRANSITION_BANDS`).  ``placement`` puts the
    band inside the range ("inside", the default: the correlation is never weighted outside
    its published range) or centred on the bound ("centred": the two bands of one piecewise
    correlation, each extrapolated by half the band).

    ``full_weight`` (an attribute, not a field) is the open interval of values the range weighs
    fully with a margin (:func:`_full_weight_interval`): the scalar path takes the shortfall
    there as 0 without the arithmetic, which would give 0 exactly.  ``weightless`` (likewise)
    is the closed interval outside which the range weighs nothing with a margin
    (:func:`_weightless_interval`): a value below its low end or above its high end has a
    shortfall above 1, told by a comparison where a caller only asks whether it weighs anything.
    """

    quantity: str
    low: float = -math.inf
    high: float = math.inf
    of: Callable[[Mapping[str, np.ndarray]], np.ndarray] | None = None
    band: float | None = None
    placement: str = "inside"
    #: False for a bound that holds in one band of a piecewise range only (a published jump of
    #: the range, such as Catton's Pr bound below H/L = 2): auto does not read it, because a
    #: weight that jumps would make its value jump; the auto rule states that band's bounds in
    #: its own steps instead.  Notes and the spread read it as published.
    in_auto: bool = True
    # made once by __post_init__ from the fields above (not arguments, not compared)
    _ramps: tuple = field(init=False, repr=False, compare=False)
    full_weight: tuple[float, float] = field(init=False, repr=False, compare=False)
    weightless: tuple[float, float] = field(init=False, repr=False, compare=False)

    def values(self, inputs: Mapping[str, np.ndarray]) -> np.ndarray:
        value = self.of(inputs) if self.of is not None else inputs[self.quantity.lower()]
        if type(value) is np.float64:   # the scalar path: a numpy scalar already (no 0-d array)
            return value     # reads as an array of no dimensions
        return np.asarray(value, dtype=float)

    def inside(self, inputs: Mapping[str, np.ndarray]) -> np.ndarray:
        values = self.values(inputs)
        return (values >= self.low) & (values <= self.high)

    def describe(self) -> str:
        if math.isinf(self.low):
            return f"{self.quantity} <= {format_value(self.high)}"
        if math.isinf(self.high):
            return f"{self.quantity} >= {format_value(self.low)}"
        return f"{format_value(self.low)} <= {self.quantity} <= {format_value(self.high)}"

    # --- the transition band of "auto" ---------------------------------------------------------

    @property
    def driven(self) -> bool:
        """True where the range bounds the flow's driving group (Ra, Re, Gr and groups made of
        them), the input along which Nu rises; auto hands over along it over whole bands."""
        return self.quantity.startswith(("Ra", "Re")) or "Gr" in self.quantity

    def placed_inside(self) -> "Range":
        """This range with its bands inside its bounds (itself unless it is "centred"): where it
        gives weight, the values lie inside the published range."""
        if self.placement == "inside":
            return self
        inner = self.__dict__.get("_placed_inside")
        if inner is None:
            inner = self.__dict__["_placed_inside"] = dataclasses.replace(self, placement="inside")
        return inner

    @property
    def bands_every_bound(self) -> bool:
        """True where each finite bound has a band (a ramp, or a step): a shortfall of 0 then
        means the value lies inside (each band lies inside its bound, or a centred one reaches
        past it only where the shortfall is above 0).  A bound at the end of the input's domain
        or a lower bound <= 0 on a log scale has none."""
        ramped = {(bound, side) for bound, side, *_ in self._ramps}
        return all(math.isinf(bound) or (bound, side) in ramped for bound, side in ((self.low, 1.0), (self.high, -1.0)))

    @property
    def log_scale(self) -> bool:
        return not self.quantity.lower().startswith("tilt")

    @property
    def transition(self) -> float:
        """The band: a factor (log scale) or a width in degrees."""
        if self.band is not None:
            return self.band
        if not self.log_scale:
            return DEFAULT_TILT_BAND
        return TRANSITION_BANDS.get(self.quantity, DEFAULT_LOG_BAND)

    def describe_band(self) -> str:
        """The band in words, for the auto rule text."""
        unit = f"a factor {format_value(self.transition)}" if self.log_scale else \
            f"{format_value(self.transition)} deg"
        where = {"inside": "inside the bound", "centred": "centred on the bound"}[self.placement]
        return f"{self.quantity} over {unit} {where}"

    def weight(self, inputs: Mapping[str, np.ndarray]) -> np.ndarray:
        """1 well inside the range, 0 outside, linear (in log for log quantities) across the band."""
        values = self.values(inputs)
        weight = None
        for bound, side, log_bound, scale, offset in self._ramps:
            if scale == 0.0:  # no band: a step at the bound
                ramp = (side * (values - bound) >= 0).astype(float)
            else:
                # log of a value <= 0 (Ra cos(tilt) heated from above): far below any bound
                along = values - bound if log_bound is None else np.log(np.maximum(values, 1e-300)) - log_bound
                # np.minimum/np.maximum: the same as np.clip, several times faster on large arrays
                ramp = np.minimum(np.maximum(side * along / scale + offset, 0.0), 1.0)
            weight = ramp if weight is None else weight * ramp
        if weight is None:
            return np.ones(np.shape(values))
        return weight

    def shortfall(self, inputs: Mapping[str, np.ndarray]) -> np.ndarray:
        """How far the values lie short of the range's full weight, in transition bands: 0 where
        :meth:`weight` is 1, 1 - weight across the band, and beyond where it reaches 0, 1 + the
        distance counted in the default band of the scale (a factor 4, 5 deg) whatever the
        bound's own band, so that "how far outside" means the same for every quantity; the
        larger of its two bounds'.  A bound without a band (a step) counts its distance the
        same way; on a log scale a value <= 0 lies infinitely far below every bound.  Auto weighs its steps by it (:func:`stillair.correlations.auto.weigh_steps`)."""
        values = self.values(inputs)
        shortfall: Any = 0.0
        positive = values > 0.0
        for bound, side, log_bound, scale, offset in self._ramps:
            # on a log scale a value <= 0 (Ra = 0, Ra cos(tilt) heated from above) lies infinitely
            # far below every bound: beyond any lower bound, deep inside any upper one
            along = values - bound if log_bound is None else \
                np.where(positive, np.log(np.where(positive, values, 1.0)), -np.inf) - log_bound
            unit = _DEFAULT_UNIT[log_bound is not None]
            if scale == 0.0:   # a step: full weight on its side, the distance beyond it
                position = np.where(side * along >= 0, 1.0, side * along / unit)
            else:              # the ramp, and beyond its zero end the distance in default bands
                position = side * along / scale + offset
                position = np.where(position < 0.0, position * (scale / unit), position)
            shortfall = np.maximum(shortfall, 1.0 - position)
        return np.broadcast_to(shortfall, np.shape(values))

    def shortfall_of(self, value: float) -> float:
        """:meth:`shortfall` of one plain number (the scalar path; the same arithmetic)."""
        shortfall = 0.0
        for bound, side, log_bound, scale, offset in self._ramps:
            along = value - bound if log_bound is None else \
                (math.log(value) if value > 0.0 else -math.inf) - log_bound
            unit = _DEFAULT_UNIT[log_bound is not None]
            if scale == 0.0:
                position = 1.0 if side * along >= 0 else side * along / unit
            else:
                position = side * along / scale + offset
                if position < 0.0:
                    position *= scale / unit
            if 1.0 - position > shortfall:
                shortfall = 1.0 - position
        return shortfall

    def __post_init__(self):
        # the band's constants, computed once (attributes, not fields: frozen stays frozen)
        ramps = self._ramp_constants_of()
        object.__setattr__(self, "_ramps", ramps)
        object.__setattr__(self, "full_weight", _full_weight_interval(ramps))
        object.__setattr__(self, "weightless", _weightless_interval(ramps))

    def _ramp_constants_of(self):
        """The bounds that have a transition: (bound, side, log of the bound or None for a
        linear quantity, scale, offset), kept as ``_ramps``.

        ``side`` is +1 for a lower bound, -1 for an upper one.  ``scale`` is the band's width on
        the quantity's scale (the log of the factor, or degrees), 0 for a step at the bound;
        ``offset`` places the band (:data:`_OFFSET`).  A bound at the end of the input's domain,
        and a lower bound <= 0 on a log scale, bind nowhere and have no ramp.
        """
        domain_low, domain_high = _DOMAIN.get(self.quantity, (-math.inf, math.inf))
        ramps: list[tuple[float, float, float | None, float, float]] = []
        width = self.transition
        offset = _OFFSET[self.placement]
        for bound, side in ((self.low, 1.0), (self.high, -1.0)):
            if math.isinf(bound) or (side > 0 and bound <= domain_low) or (side < 0 and bound >= domain_high):
                continue
            if self.log_scale:
                if side > 0 and bound <= 0.0:
                    continue
                ramps.append((bound, side, math.log(bound), math.log(width) if width > 1.0 else 0.0, offset))
            else:
                ramps.append((bound, side, None, max(width, 0.0), offset))
        return tuple(ramps)


def _full_weight_interval(ramps) -> tuple[float, float]:
    """The open interval of values a range weighs fully with a margin (shortfall exactly 0):
    each ramp's position side * along / scale + offset reaches 1 where the value passes
    bound x exp((1 - offset) scale) on a log scale, bound + (1 - offset) scale on a linear one;
    the ends are moved inward by :data:`_FULL_WEIGHT_MARGIN` so that round-off in that
    arithmetic cannot matter.  Values outside are read by the arithmetic itself."""
    low, high = -math.inf, math.inf
    for bound, side, log_bound, scale, offset in ramps:
        reach = (1.0 - offset) * scale
        if log_bound is not None:
            end = bound * math.exp(side * reach) * (1.0 + side * _FULL_WEIGHT_MARGIN)
        else:
            end = bound + side * (reach + _FULL_WEIGHT_MARGIN * max(1.0, abs(bound)))
        if side > 0:
            low = max(low, end)
        else:
            high = min(high, end)
    return low, high


def _weightless_interval(ramps) -> tuple[float, float]:
    """The closed interval outside which a range weighs nothing with a margin (shortfall above
    1): each ramp's position side * along / scale + offset reaches 0 where the value passes
    bound x exp(-side offset scale) on a log scale, bound - side offset scale on a linear one
    (the bound itself for a step, scale 0); the ends are moved outward by
    :data:`_FULL_WEIGHT_MARGIN`.  The largest lower end and the least upper end: past either,
    that one ramp alone gives a shortfall above 1.  Values inside are read by the arithmetic."""
    low, high = -math.inf, math.inf
    for bound, side, log_bound, scale, offset in ramps:
        reach = offset * scale
        if log_bound is not None:
            end = bound * math.exp(-side * reach) * (1.0 - side * _FULL_WEIGHT_MARGIN)
        else:
            end = bound - side * (reach + _FULL_WEIGHT_MARGIN * max(1.0, abs(bound)))
        if side > 0:
            low = max(low, end)
        else:
            high = min(high, end)
    return low, high
