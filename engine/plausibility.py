"""A word on a likely unit slip: values that are allowed but look typed in another unit.

Not errors - the number is computed - but a note where notes show (the Python warning
:class:`UnitSlipWarning`, the cells' notes, ``stillair calc`` and ``audit``, NET_CHECK):

* **Temperatures that look like kelvin.**  Every temperature is in °C.  When every temperature
  argument of a call lies between 230 and 400 - where kelvin values of everyday conditions
  (-43 °C to 127 °C) fall, and no argument lies in a normal °C range below 230 - the note says
  "temperatures are in °C; t = 293.15 looks like a kelvin value".  A real case of every
  temperature above 230 °C (an oven, a flue) gets the note too; it asks, it does not refuse.
* **Lengths that look like millimetres.**  Each geometry length has a largest plausible value
  (:data:`PLAUSIBLE_LENGTHS`, our judgement of the trade's largest such part: a cavity gap of
  0.5 m, a plate 20 m high); above it the note says "gap = 20 m is large for this geometry;
  lengths are in m: is it in mm?".  Lengths no physics admits are errors
  (:data:`stillair.validity.LENGTH_RANGE`).
"""

from __future__ import annotations

import contextlib
import contextvars
import warnings
from typing import Iterator, Mapping

import numpy as np

from .validity import _NOTE_SINK, PLAIN_NUMBERS, CorrelationRangeWarning, format_value, is_plain_number

__all__ = ["UnitSlipWarning", "KELVIN_LOOKING", "PLAUSIBLE_LENGTHS", "temperature_slip", "length_slip",
           "warn_slips", "trial_sizes"]


class UnitSlipWarning(CorrelationRangeWarning):
    """A value allowed but unusual where it is, most likely typed in another unit (a kelvin
    temperature, a length in mm).  A subclass of :class:`CorrelationRangeWarning`, so that it
    travels wherever range notes travel."""


#: Where every temperature of a call lying inside suggests kelvin values typed as °C.
KELVIN_LOOKING = (230.0, 400.0)

#: The largest plausible value of each geometry length, m (our judgement; above it a note, not
#: an error): by argument name, and by geometry where one name means different sizes.
PLAUSIBLE_LENGTHS = {
    "height": 50.0,         # a plate, a cylinder, a cavity or a channel: a tall facade
    "length": 50.0,         # a horizontal or tilted plate's characteristic length
    "diameter": 10.0,       # a pipe, a tank, a sphere
    "gap": 0.5,             # an enclosed layer: beyond it a room, not a cavity
    "spacing": 2.0,         # the plates of an open channel (a wide one is an isolated plate)
}


def temperature_slip(temperatures: Mapping[str, object]) -> str:
    """The kelvin note for a call's temperature arguments (name -> value), or ""."""
    low, high = KELVIN_LOOKING
    first = None
    for name, value in temperatures.items():
        if is_plain_number(value):   # one plain number: plain comparisons, no array (scalar path)
            if not low <= value <= high:
                return ""
            if first is None:
                first = (name, value)
            continue
        array = np.asarray(value, dtype=float)
        if array.size == 0 or not np.all((array >= low) & (array <= high)):
            return ""
        if first is None:
            first = (name, array.flat[0])
    if first is None:
        return ""
    return (f"temperatures are in °C; {first[0]} = {format_value(float(first[1]))} looks like a kelvin "
            f"value (°C = K - 273.15)")


def length_slip(name: str, value, plausible: float | None = None) -> str:
    """The millimetre note for one length argument, or ""."""
    limit = PLAUSIBLE_LENGTHS.get(name) if plausible is None else plausible
    if limit is None:
        return ""
    if type(value) in PLAIN_NUMBERS:       # one plain number (is_plain_number, written out): no array
        if not value > limit:
            return ""
        largest = float(value)
    else:
        array = np.asarray(value, dtype=float)
        if array.size == 0 or not np.any(array > limit):
            return ""
        largest = float(np.max(array))
    return f"{name} = {format_value(largest)} m is large for this geometry; lengths are in m: is it in mm?"


#: Set while a function tries sizes of its own (an insulation thickness search): those sizes
#: were not typed, so no unit-slip note may speak of them.
_TRIALS: contextvars.ContextVar[bool] = contextvars.ContextVar("stillair_trial_sizes", default=False)


@contextlib.contextmanager
def trial_sizes() -> Iterator[None]:
    """Inside, calls check no unit slips: the caller's own inputs were checked where it took
    them, and the sizes it now tries are its own."""
    token = _TRIALS.set(True)
    try:
        yield
    finally:
        _TRIALS.reset(token)


def warn_slips(function_name: str, *notes: str, stacklevel: int = 3) -> str:
    """Issue a :class:`UnitSlipWarning` with the non-empty notes (``stacklevel`` as
    :func:`warnings.warn` counts from the caller of this function, plus one); return the text
    ("" inside :func:`trial_sizes`)."""
    if not any(notes) or _TRIALS.get():    # the usual call: nothing to say
        return ""
    text = "; ".join(note for note in notes if note)
    if text:
        # the cell layer collects notes as data (validity.collect_range_notes): a unit slip is a
        # note like a range note and goes the same way
        sink = _NOTE_SINK.get()
        if sink is not None:
            sink.append(f"{function_name}: {text}")
        else:
            warnings.warn(f"{function_name}: {text}", UnitSlipWarning, stacklevel=stacklevel)
    return text
