"""Type aliases for the annotations of the public API (no run-time role)."""

from __future__ import annotations

from typing import Union

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = ["ArrayLike", "FloatOrArray"]

# What a numeric engine function returns: a float for scalar inputs, otherwise an array of the
# broadcast shape of its array arguments.
FloatOrArray = Union[float, NDArray[np.float64]]
