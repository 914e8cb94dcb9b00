"""Element choice that costs little for one case.

The correlations are written once, for numpy arrays, and the scalar path runs the same code on
numpy scalars.  ``np.where``, ``ndarray.any``, ``np.maximum`` and ``np.errstate`` cost several
times the arithmetic around them on one number (0.6-0.9 us each, numpy 2.4); these give the same
values without that.
"""

from __future__ import annotations

import contextlib
import math

import numpy as np


_SINGLE_BOOLEANS = (np.bool_, bool)


def where(condition, if_true, if_false):
    """``np.where(condition, if_true, if_false)``; for a single boolean (numpy's or Python's),
    the chosen operand itself (no array is made)."""
    if type(condition) in _SINGLE_BOOLEANS:
        return if_true if condition else if_false
    return np.where(condition, if_true, if_false)


def any_true(condition) -> bool:
    """``np.any(condition)``, cheap for a single boolean (a numpy or Python one, or a 0-d array)."""
    if type(condition) in _SINGLE_BOOLEANS or type(condition) is np.ndarray and condition.ndim == 0:
        return bool(condition)
    return bool(np.any(condition))


def maximum(a, b):
    """``np.maximum(a, b)``; for two numpy float scalars, the larger operand itself (a NaN in
    either propagates, as np.maximum's does)."""
    if type(a) is np.float64 and type(b) is np.float64:
        return a if a >= b or a != a else b
    return np.maximum(a, b)


#: numpy's degrees-to-radians factor: np.radians is defined as degrees x (pi / 180) (npy_deg2rad
#: in numpy's C math library), this product in double precision.
_RADIANS_PER_DEGREE = math.pi / 180.0


def radians(degrees):
    """``np.radians(degrees)``; for one float (numpy's or Python's), the same product without
    the ufunc call (0.2 us on one number), a numpy float for a numpy float."""
    if type(degrees) is np.float64 or type(degrees) is float:
        return degrees * _RADIANS_PER_DEGREE
    return np.radians(degrees)


def clip(a, low: float, high: float):
    """``np.clip(a, low, high)``; for one numpy float scalar, plain comparisons (np.clip costs
    some 3 us on one number), a numpy float either way (a NaN stays NaN, as np.clip's does)."""
    if type(a) is np.float64:
        if a < low:
            return np.float64(low)
        return np.float64(high) if a > high else a
    return np.clip(a, low, high)


_NO_CHANGE = contextlib.nullcontext()


def ignoring_division_by(denominator):
    """``np.errstate(divide="ignore")`` around a division by ``denominator``; for one nonzero
    numpy float scalar no division can warn, and the context costs nothing."""
    if type(denominator) is np.float64 and denominator != 0.0:
        return _NO_CHANGE
    return np.errstate(divide="ignore")
