"""Evaluating Nu: the argument checks, :func:`nusselt` with its scalar path (one case in plain
numbers skips the array machinery) and its array path, and Nu on the temperature difference for
the flux cases."""

from __future__ import annotations

import math
import sys
from typing import Mapping

import numpy as np

from .._typing import ArrayLike
from ..validity import (InputError, PLAIN_NUMBERS, format_value, require_between, require_choice, require_nonnegative,
                        require_positive, unwrap, warn_out_of_range)
from .auto import auto_arrays, auto_scalar
from .registry import CORRELATIONS, GEOMETRIES, methods_for
from .single import _evaluate_one, _first, _scalar_note, _scalar_result
from .types import Geometry, NusseltResult

#: The largest value of each dimensionless input that any physics of still fluids admits: Ra
#: 1e30 (beyond the atmosphere's own scale), Pr 1e7 (the most viscous oils are near 1e5-1e6),
#: a shape ratio 1e9 (two lengths of the allowed 1 um-1 km).  Beyond: an error naming the
#: value; inside but outside every correlation's range: the out-of-range note.
INPUT_LIMITS = {"ra": 1e30, "pr": 1e7, "aspect": 1e9, "slenderness": 1e9}


def _input_domain(name: str, geo: Geometry) -> tuple[float, float, bool]:
    """Where :func:`nusselt` accepts a geometry input: (low, high, low end open), finite always.
    Both the array checks, which word the message, and the scalar path's plain comparisons
    read it."""
    if name == "tilt":
        return geo.tilt_range[0], geo.tilt_range[1], False
    return 0.0, INPUT_LIMITS.get(name, math.inf), name != "ra"     # Ra >= 0; Pr, aspect, slenderness > 0


_INPUT_LABELS = {"ra": "Ra", "pr": "Pr"}   # the other inputs are named as typed


def _check_input(function_name: str, name: str, value, geo: Geometry) -> np.ndarray:
    low, high, low_open = _input_domain(name, geo)
    label = _INPUT_LABELS.get(name, name)
    if name == "tilt":
        return require_between(function_name, label, value, low, high, "deg")
    array = (require_positive if low_open else require_nonnegative)(function_name, label, value)
    too_large = array > high
    if np.any(too_large):
        raise InputError(function_name, label, array[too_large].flat[0] if array.ndim else array.item(),
                         f"at most {format_value(high)} (no still fluid reaches more)")
    return array


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
    function_name = function_name or (f"nu_{geometry}" if geometry in GEOMETRIES else "nusselt")
    geo = GEOMETRIES[require_choice(function_name, "geometry", geometry, tuple(GEOMETRIES))]
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
        result = auto_arrays(geo, case, inputs, notes, ranges)
    else:
        result = _evaluate_one(geo, method, case, inputs, notes, ranges)
    if geo.floor is not None:
        result.nu = np.maximum(result.nu, geo.floor)
    return result


def _plain_domains(geo: Geometry) -> tuple[tuple[str, float, float, bool], ...]:
    """(name, low, high, low end open) of each input, from :func:`_input_domain` (high finite), made once per
    geometry (a cache, not a field of the frozen Geometry): the scalar path reads it per call."""
    domains = geo.__dict__.get("_plain_domains")
    if domains is None:
        # an infinite upper end as the largest float: the one comparison value <= high then
        # refuses inf too (no plain number), where it took a second
        domains = geo.__dict__["_plain_domains"] = tuple(
            (name, low, min(high, sys.float_info.max), low_open)
            for name, low, high, low_open in ((name, *_input_domain(name, geo)) for name in geo.inputs))
    return domains


_NUMPY_FLOAT = np.float64     # bound once: the module attribute look-up is a third of the scalar path's conversion


def _plain_inputs(geo: Geometry, inputs) -> tuple[dict[str, float], dict[str, np.float64]] | None:
    """The inputs as floats, and as numpy floats (the scalar path evaluates the correlations on
    these), when each is a plain number the geometry accepts; else None (the array path then
    checks them and words the message)."""
    values = {}
    scalars = {}
    domains = geo.__dict__.get("_plain_domains") or _plain_domains(geo)   # (the call only the first time)
    for name, low, high, low_open in domains:
        value = inputs.get(name)
        if type(value) is not float:
            if type(value) not in PLAIN_NUMBERS:
                return None
            value = float(value)
        if not ((low < value if low_open else low <= value) and value <= high):
            return None
        values[name] = value
        scalars[name] = _NUMPY_FLOAT(value)
    return values, scalars


#: Nu of one case as plain values: (Nu, the method used, its note or "", the blend or "").
PlainNusselt = tuple[float, str, str, str]


def _scalar_parts(geo: Geometry, method: str, case: str | None,
                  plain: tuple[dict[str, float], dict[str, np.float64]]) -> PlainNusselt:
    """Nu for one case in plain numbers (:func:`_plain_inputs`): a named method, or the auto
    rule (:func:`auto_scalar`)."""
    # numpy scalars, not Python floats: comparisons then give numpy booleans, which the
    # correlations combine with ~ and & as they do arrays
    values, arrays = plain
    if method == "auto":
        return auto_scalar(geo, case, arrays, values)
    corr = CORRELATIONS[(geo.name, method)]
    floor = -math.inf if geo.floor is None else geo.floor
    nu = max(_first(corr.function(**(dict(arrays, case=case) if geo.cases else arrays))), floor)
    return nu, method, _scalar_note(corr, arrays, values, case), ""


def _scalar(geo: Geometry, method: str, case: str | None,
            values: tuple[dict[str, float], dict[str, np.float64]]) -> NusseltResult:
    """:func:`_scalar_parts` as a :class:`NusseltResult` of 0-d arrays."""
    return _scalar_result(*_scalar_parts(geo, method, case, values))


def nusselt_plain(geo: Geometry, method: str | None, case: str | None, function_name: str,
                  inputs: dict) -> PlainNusselt:
    """:func:`nusselt` of one case for a caller that has its inputs as plain numbers (the h
    functions' scalar paths): the method is resolved and the inputs checked as there, and Nu
    comes as plain values, without the 0-d arrays of a :class:`NusseltResult`.  ``case`` is
    one of the geometry's cases already (or None).  Inputs that are not plain numbers inside
    their domains go the array path, whose checks word the message."""
    method = _resolve_method(function_name, geo, method, case)
    values = _plain_inputs(geo, _with_default_tilt(geo, inputs))
    if values is not None:
        if method == "auto":    # the usual call: the rule at once
            return auto_scalar(geo, case, values[1], values[0])
        return _scalar_parts(geo, method, case, values)
    result = nusselt(geo.name, method, case, function_name=function_name, **inputs)
    return float(result.nu), str(result.method), str(result.note), str(result.blend)


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
    """Nu alone (float for scalar inputs), warning when any input is outside the range.

    A correlation whose formula is infinite at Ra = 0 (Popiel's curvature term: no boundary
    layer at all) is refused by the argument that made it so rather than returned as inf."""
    nu = nusselt(geometry, method, case, function_name=function_name, warn=True, **inputs).nu
    infinite = ~np.isfinite(nu)
    if np.any(infinite):
        ra = np.broadcast_to(np.asarray(inputs["ra"], dtype=float), np.shape(nu))
        raise InputError(function_name, "Ra", ra[infinite].flat[0] if np.ndim(nu) else float(ra),
                         f"> 0 for geometry \"{geometry}\" (its correlation is infinite at Ra = 0, "
                         "where nothing drives the flow)")
    return unwrap(nu)


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

