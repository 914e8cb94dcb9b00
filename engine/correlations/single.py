"""One named correlation evaluated: on 1-D arrays (range notes vectorised) and, for the scalar
path, on one case in numpy scalars (the note worded only for a bound crossed)."""

from __future__ import annotations

import numpy as np

from .registry import CORRELATIONS
from .types import Correlation, Geometry, NusseltResult, _violation_notes, uniform

_ONE_NUMBER = (np.float64, float)


def _first(values) -> float:
    """The value of a scalar path's result as a float (a numpy or Python float, the usual case,
    or an array holding one element)."""
    if type(values) in _ONE_NUMBER or getattr(values, "ndim", 0) == 0:
        return float(values)
    return float(np.ravel(values)[0])


def _scalar_note(corr: Correlation, arrays, values, case, ranges=None) -> str:
    """The note of one case in numpy scalars (``values``: the same as floats): the first of
    ``ranges`` (default: the correlation's published ranges for ``case``) it lies outside, or
    "" (formatted only for a bound crossed)."""
    for bound in corr.ranges(case) if ranges is None else ranges:
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

