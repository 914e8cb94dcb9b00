"""The spread of the published correlations: the lowest and highest Nu among those whose
published ranges cover a case."""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from .._typing import ArrayLike
from ..validity import require_choice
from .evaluate import _checked_inputs, _with_default_tilt
from .registry import CORRELATIONS, GEOMETRIES, methods_for
from .types import Geometry

@dataclass(frozen=True)
class NusseltSpread:
    """The lowest and highest Nu among the correlations whose published ranges cover a case.

    ``low`` and ``high`` are NaN where no registered correlation covers the case (``count`` 0).
    ``methods`` lists the covering methods in ascending order of their Nu (a tuple for scalar
    input, an object array of tuples otherwise), so ``methods[0]`` gave ``low`` and
    ``methods[-1]`` gave ``high``.  This is the spread of published correlations, not a
    statistical confidence interval: it says how much the literature disagrees about the case.
    """

    low: float | np.ndarray
    high: float | np.ndarray
    count: int | np.ndarray
    methods: tuple[str, ...] | np.ndarray

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
        lies between ``low`` and ``high``, but within a tenth of a transition band of a point
        where two published ranges only touch (auto's hand-over there has no step; README).

    Notes
    -----
    Every method of :func:`methods_for` is evaluated and kept where its published ranges (the
    registry's, as listed in the ``nu_<geometry>`` docstrings with their sources) cover the
    inputs.  The spread of published correlations, not a confidence interval.

    Examples
    --------
    >>> spread = nu_spread("hcyl", 1e6, 0.71)
    >>> spread.methods, round(spread.low, 2), round(spread.high, 2)
    (('kuehn-goldstein', 'churchill-chu', 'morgan'), 13.63, 15.18)
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
        inside = corr.inside(flat, case)
        names.append(method)
        values.append(np.where(inside, nu, np.nan))
        for form, coverage in _form_coverage(geo, case, method, flat):
            # a piecewise correlation's other band, where auto blends the two across their
            # published edge: the literature's own step is part of its spread
            form_nu = np.broadcast_to(np.asarray(corr.forms[form](**args), dtype=float), nu.shape)
            if geo.floor is not None:
                form_nu = np.maximum(form_nu, geo.floor)
            names.append(f"{method} ({form} form)")
            values.append(np.where(inside & (coverage > 0.0) & (form_nu != nu), form_nu, np.nan))
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


def _form_coverage(geo: Geometry, case, method: str, inputs):
    """(form, auto's coverage of that form) for each published band of ``method`` that auto's
    rule blends by its own ranges."""
    forms: dict[str, np.ndarray] = {}
    for step in geo.auto.get(case, ()):
        if step.method == method and step.form and step.when:
            coverage = np.ones(next(iter(inputs.values())).shape)
            for bound in step.when:
                coverage = coverage * bound.weight(inputs)
            forms[step.form] = np.maximum(forms.get(step.form, 0.0), coverage)
    return forms.items()


def _geometry(function_name: str, geometry) -> Geometry:
    name = require_choice(function_name, "geometry", geometry, tuple(GEOMETRIES))
    return GEOMETRIES[name]

