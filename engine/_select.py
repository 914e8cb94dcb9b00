"""Element choice that costs little for one case.

The correlations are written once, for numpy arrays, and the scalar path runs the same code on
numpy scalars.  ``np.where`` and ``ndarray.any`` convert a scalar to an array and back, which
costs more than the arithmetic around them; these two give the same values without that.
"""

from __future__ import annotations

import numpy as np


_SINGLE_BOOLEANS = (np.bool_, bool)


def where(condition, if_true, if_false):
    """``np.where(condition, if_true, if_false)``; for a single boolean (numpy's or Python's),
    the chosen operand itself (no array is made)."""
    if type(condition) in _SINGLE_BOOLEANS:
        return if_true if condition else if_false
    return np.where(condition, if_true, if_false)


def any_true(condition) -> bool:
    """``np.any(condition)``, cheap for a single boolean."""
    if type(condition) in _SINGLE_BOOLEANS:
        return bool(condition)
    return bool(np.any(condition))
