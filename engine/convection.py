"""Natural-convection heat-transfer coefficients in one call.

Each function goes the whole way a hand calculation goes: film temperature, gas properties there,
Ra on the geometry's length, the case (which way the surface faces and whether it is hotter or
colder than the fluid), Nu from the chosen correlation with its validity note, and
h = Nu k / L.  :func:`surface_convection` and :func:`cavity_convection` return all of these as a
:class:`ConvectionResult`; the ``h_*`` functions return h alone and warn when a correlation was
used outside its range.

Cavity orientation: ``t1`` is the surface on the underside of the layer.  ``tilt`` is the layer's
angle from the horizontal (90 vertical).  When t1 >= t2 the layer is heated from below and the
correlations see ``tilt``; when t1 < t2 it is heated from above and they see 180 - tilt.  A vertical
layer is the same either way.  This keeps a roof cavity right when summer reverses the heat flow.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from typing import Any, Callable

from .constants import ZERO_CELSIUS as zero_Celsius

import numpy as np

from ._select import where
from .correlations import (GEOMETRIES, Geometry, NusseltResult, document, merge_masked, nusselt, nusselt_plain,
                           uniform)
from .correlations.docs import _indent
from .forced import WIND_FLOWS, combine_mixed, forced_length, wind_notes
from .gases import gas_properties, plain_mixture, plain_state
from .groups import DEFAULT_PRESSURE, STANDARD_GRAVITY, buoyancy_groups, film_properties
from ._docs import shared_docs
from ._typing import ArrayLike, FloatOrArray
from .plausibility import length_slip, temperature_slip, warn_slips
from .validity import (PLAIN_NUMBERS, is_plain_number, InputError, distinct_notes, require_between,
                       require_choice, require_length, require_nonnegative, require_positive, unwrap,
                       warn_out_of_range, is_plain_length)

__all__ = [
    "ConvectionResult",
    "surface_convection",
    "cavity_convection",
    "h_vplate",
    "h_hplate",
    "h_tplate",
    "h_hcyl",
    "h_sphere",
    "h_vcyl",
    "h_cavity",
    "FACINGS",
    "plate_case",
    "geometry_convection",
    "convection_geometries",
]

FACINGS = ("up", "down")


@dataclass(frozen=True)
class ConvectionResult:
    """Everything a checker wants to see beside a convection coefficient."""

    h: np.ndarray            # W/(m²·K)
    nu: np.ndarray
    ra: np.ndarray
    gr: np.ndarray
    pr: np.ndarray
    t_film: np.ndarray       # °C, where the properties were taken
    conductivity: np.ndarray  # W/(m·K) at t_film
    length: np.ndarray       # m, the length Ra and h are based on
    method: np.ndarray
    case: np.ndarray
    in_range: np.ndarray
    note: np.ndarray
    blend: np.ndarray | None = None   # "" or "auto blend of A and B" (see NusseltResult)
    # With a wind (stillair.forced): Re on the length along the wind, the natural and forced
    # coefficients that h combines, and the forced correlation; None in still air.
    re: np.ndarray | None = None
    h_natural: np.ndarray | None = None
    h_forced: np.ndarray | None = None
    forced_method: np.ndarray | None = None

    @property
    def notes(self) -> list[str]:
        return distinct_notes(self.note)

    def scalar(self) -> "ConvectionResult":
        return ConvectionResult(**{name: unwrap(getattr(self, name)) for name in self.__dataclass_fields__})


def plate_case(facing: str, delta_t: np.ndarray) -> np.ndarray:
    """hot-up / hot-down / cold-up / cold-down from the facing and the sign of Ts - Tf.

    At delta T = 0 every case gives the same Ra = 0 limit; "hot" is used by convention.
    """
    delta_t = np.asarray(delta_t)
    return np.where(delta_t >= 0, f"hot-{facing}", f"cold-{facing}").astype(object).reshape(delta_t.shape)




def shape_ratios(geometry: Geometry, length, *, diameter=None, height=None) -> dict:
    """The shape ratios a geometry's correlations take, from its lengths: slenderness =
    length/diameter (vertical cylinder), aspect = height/length (cavity: height/gap, channel:
    height/spacing).  The h functions and the network's branch columns both take them from here."""
    ratios = {}
    if "slenderness" in geometry.inputs:
        ratios["slenderness"] = length / diameter
    if "aspect" in geometry.inputs:
        ratios["aspect"] = height / length
    return ratios


def layer_tilt(tilt, delta_t):
    """The tilt the cavity correlations see: a layer heated from above (t1 < t2) is the same
    layer turned over, 180 - tilt."""
    return where(delta_t >= 0, tilt, 180.0 - tilt)


def _full(array, shape):
    """``array`` broadcast to ``shape``, without a new view when it already has it (hot path)."""
    array = np.asarray(array)
    return array if array.shape == shape else np.broadcast_to(array, shape)


WIND_DOC = '''    wind : array_like, default 0
        Wind speed in m/s (>= 0), taken horizontal; 0 is still air (the result is then the
        still-air one exactly).
    wind_length : array_like, optional
        Length of a plate along the wind in m (> 0); blank: the plate's own length (required
        for hplate, whose area/perimeter is no length along the wind).  Cylinders and spheres
        take their diameter and no wind_length.'''


def _wind_docs(function):
    return shared_docs(function, {"wind": WIND_DOC})


@_wind_docs
def surface_convection(geometry: str, t_surface: ArrayLike, t_fluid: ArrayLike, length: ArrayLike, *,
                       facing: str | None = None, tilt: ArrayLike | None = None,
                       diameter: ArrayLike | None = None, gas: str = "air",
                       pressure: ArrayLike = DEFAULT_PRESSURE, method: str = "auto",
                       property_temperature: ArrayLike | None = None, ideal_expansion: bool = False,
                       function_name: str | None = None, wind: ArrayLike = 0.0,
                       wind_length: ArrayLike | None = None) -> ConvectionResult:
    """Convection from a surface at ``t_surface`` to fluid at ``t_fluid`` (°C), still or in a wind.

    Parameters
    ----------
    geometry : str
        One of "vplate", "hplate", "tplate", "hcyl", "sphere", "vcyl" (the external geometries
        :func:`convection_geometries` lists).
    t_surface : array_like
        Surface temperature in °C, inside the gas's range.
    t_fluid : array_like
        Temperature of the still fluid far from the surface in °C.
    length : array_like
        The geometry's length in m: the height (vplate, vcyl), area/perimeter (hplate), the
        length along the slope (tplate) or the diameter (hcyl, sphere); > 0.
    facing : str, optional
        "up" or "down": the direction the face looks; needed for hplate and tplate.
    tilt : array_like, optional
        Tilt of the plate from the vertical in degrees; needed for tplate.
    diameter : array_like, optional
        Diameter in m of a vertical cylinder; needed for vcyl.
    {gas_and_pressure}
    {method}
    {property_options}
    {wind}

    {convection_result}

    Notes
    -----
    Gr = g beta |Ts - Tf| L^3 / nu^2 and Ra = Gr Pr with the gas properties at the film
    temperature (:func:`stillair.film_properties`); Nu from the correlation registry
    (:func:`stillair.nusselt`; each method's source and validity in the ``nu_<geometry>``
    docstrings); h = Nu k / L.  Out-of-range inputs are reported in ``note``, not raised.
    With a wind, Re = V L_w / nu at the same film temperature, Nu_F from the forced correlation
    of :data:`stillair.forced.WIND_FLOWS` (flat plate, cylinder in cross-flow, sphere) and
    h = (h_N^3 + h_F^3)^(1/3) (Churchill and Usagi); ``nu`` is then h L / k on the geometry's
    own length, ``re``, ``h_natural``, ``h_forced`` and ``forced_method`` tell the parts.

    Examples
    --------
    >>> result = surface_convection("vplate", 60.0, 20.0, 0.5)
    >>> round(float(result.h), 2), str(result.method)
    (5.0, 'churchill-chu')
    >>> windy = surface_convection("vplate", 60.0, 20.0, 0.5, wind=2.0, wind_length=1.0)
    >>> round(float(windy.h), 2), str(windy.forced_method), round(float(windy.re))
    (6.66, 'pohlhausen', 117656)
    """
    surfaces = tuple(name for name, geo in GEOMETRIES.items() if name not in ONE_CALLS and "ra" in geo.inputs)
    function_name = function_name or (f"h_{geometry}" if geometry in surfaces else "surface_convection")
    geo = GEOMETRIES[require_choice(function_name, "geometry", geometry, surfaces)]
    still = _surface_convection(geo, t_surface, t_fluid, length, facing, tilt, diameter, gas, pressure, method,
                                property_temperature, ideal_expansion, function_name)
    slip = warn_slips(function_name, temperature_slip({"ts": t_surface, "tf": t_fluid}),
                      length_slip(geo.length, length),
                      length_slip("diameter", diameter) if "slenderness" in geo.inputs else "", stacklevel=4)
    still = _with_slip(still, slip)
    if wind_length is None and is_plain_number(wind) and wind == 0:
        return still    # still air, untouched (the usual call)
    return _with_wind(geo.name, still, wind, wind_length, length, diameter, gas, pressure, function_name)


def _with_slip(result: "ConvectionResult", slip: str) -> "ConvectionResult":
    """The result with a unit-slip note added to every element's note (the range notes stay)."""
    if not slip:
        return result
    note = np.asarray(result.note, dtype=object)
    with_slip = np.where(note == "", slip, note + "; " + slip) if note.ndim else \
        np.array(f"{note.item()}; {slip}" if note.item() else slip, dtype=object)
    return dataclasses.replace(result, note=with_slip)


def _surface_convection(geo: Geometry, t_surface: ArrayLike, t_fluid: ArrayLike, length: ArrayLike,
                        facing: str | None, tilt: ArrayLike | None, diameter: ArrayLike | None, gas: str,
                        pressure: ArrayLike, method: str, property_temperature: ArrayLike | None,
                        ideal_expansion: bool, function_name: str) -> "ConvectionResult":
    geometry = geo.name
    length_name = geo.length
    mixture = _plain_case(gas, pressure, (t_surface, t_fluid),
                          (length,) + ((diameter,) if "slenderness" in geo.inputs else ()), property_temperature)
    if (mixture is not None
            and (not geo.cases or isinstance(facing, str) and facing.strip().lower() in FACINGS)
            and ("tilt" not in geo.inputs or is_plain_number(tilt) and geo.tilt_range[0] <= tilt <= geo.tilt_range[1])):
        props, t_film, beta, delta_t, gr, ra = _scalar_groups(t_surface, t_fluid, length, mixture, pressure,
                                                              ideal_expansion)
        inputs = {"ra": ra, "pr": props.prandtl}
        if "tilt" in geo.inputs:
            inputs["tilt"] = float(tilt)  # type: ignore[arg-type]  # a plain number: tested above
        inputs.update(shape_ratios(geo, length, diameter=diameter))
        plate = f"{'hot' if delta_t >= 0 else 'cold'}-{str(facing).strip().lower()}" if geo.cases else ""
        parts = nusselt_plain(geo, method, plate or None, function_name, inputs)
        return _scalar_result(props, t_film, gr, ra, length, parts, plate)
    length = require_length(function_name, length_name, length)
    # every argument takes part in the result's shape (a range of tilts or diameters at one
    # temperature broadcasts like a range of temperatures)
    extra: list[np.ndarray] = []
    if "tilt" in geo.inputs:
        tilt = require_between(function_name, "tilt", tilt, *geo.tilt_range, "deg")
        extra.append(tilt)
    if "slenderness" in geo.inputs:
        diameter = require_length(function_name, "diameter", diameter)
        extra.append(diameter)
    props, t_film, beta = film_properties(t_surface, t_fluid, gas, pressure,
                                          property_temperature=property_temperature,
                                          ideal_expansion=ideal_expansion, function_name=function_name,
                                          names=("ts", "tf"))
    delta_t = np.subtract(t_surface, t_fluid, dtype=float)
    gr, ra = buoyancy_groups(props, beta, delta_t, length)
    shape = np.broadcast(ra, props.prandtl, *extra).shape
    ra, pr = _full(ra, shape), _full(props.prandtl, shape)
    inputs = {"ra": ra, "pr": pr}
    if "tilt" in geo.inputs:
        inputs["tilt"] = _full(tilt, shape)
    if "slenderness" in geo.inputs:
        inputs.update({k: _full(v, shape) for k, v in shape_ratios(geo, length, diameter=diameter).items()})
    if geo.cases:
        facing = require_choice(function_name, "facing", facing, FACINGS)
        case = plate_case(facing, _full(delta_t, shape))
        cases = list(dict.fromkeys(case.ravel()))
        if len(cases) == 1:
            result = nusselt(geometry, method, cases[0], function_name=function_name, **inputs)
        else:
            result = merge_masked(NusseltResult, [
                (mask, nusselt(geometry, method, name, function_name=function_name,
                               **{k: v[mask] for k, v in inputs.items()}))
                for name, mask in ((name, case == name) for name in cases)], shape)
    else:
        case = uniform("", shape)
        result = nusselt(geometry, method, function_name=function_name, **inputs)
    h = _full(result.nu * props.conductivity / length, shape)
    return ConvectionResult(h=h, nu=result.nu, ra=ra, gr=_full(gr, shape), pr=pr,
                            t_film=_full(t_film, shape),
                            conductivity=_full(props.conductivity, shape),
                            length=_full(length, shape), method=result.method, case=case,
                            in_range=result.in_range, note=result.note, blend=result.blend)


@shared_docs
def cavity_convection(t1: ArrayLike, t2: ArrayLike, gap: ArrayLike, height: ArrayLike, *,
                      tilt: ArrayLike = 90.0, gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
                      method: str = "auto", property_temperature: ArrayLike | None = None,
                      ideal_expansion: bool = False, function_name: str = "h_cavity") -> ConvectionResult:
    """Convection across a closed gas layer between surfaces at t1 (underside) and t2 (°C).

    Parameters
    ----------
    t1 : array_like
        Temperature in °C of the layer's underside face (the left face of a vertical layer).
    t2 : array_like
        Temperature in °C of the other face.
    gap : array_like
        Width of the layer between the faces in m, > 0.
    height : array_like
        Height of the layer in m (its extent along the faces, up the slope), > 0.
    tilt : array_like, default 90
        Tilt from the horizontal in degrees: 0 heated from below, 90 vertical, 180 heated from
        above (when t1 < t2 the layer is turned over: 180 - tilt).
    {gas_and_pressure}
    {method}
    {property_options}

    {convection_result}

    Notes
    -----
    Ra on the gap with the properties at the film temperature, Nu from the cavity
    correlations of the registry (see :func:`stillair.nu_cavity` for every method's source and
    validity), h = Nu k / gap: the coefficient of q = h (t1 - t2) per unit area of the layer.

    Examples
    --------
    >>> round(float(cavity_convection(15.0, 5.0, 0.016, 1.2).h), 3)
    1.645
    """
    plain = _plain_cavity(t1, t2, gap, height, tilt, gas, pressure, method, property_temperature,
                          ideal_expansion, function_name)
    if plain is not None:
        props, t_film, gr, ra, length, parts = plain
        result = _scalar_result(props, t_film, gr, ra, length, parts, "")
    else:
        result = _cavity_convection(t1, t2, gap, height, tilt, gas, pressure, method, property_temperature,
                                    ideal_expansion, function_name)
    slip = warn_slips(function_name, *_cavity_slips(t1, t2, gap, height), stacklevel=4)
    return _with_slip(result, slip)


def _cavity_slips(t1, t2, gap, height) -> tuple[str, str, str]:
    """The unit-slip notes of a cavity's arguments (:mod:`stillair.plausibility`)."""
    return temperature_slip({"t1": t1, "t2": t2}), length_slip("gap", gap), length_slip("height", height)


def _plain_cavity(t1, t2, gap, height, tilt, gas, pressure, method, property_temperature, ideal_expansion,
                  function_name):
    """The cavity's scalar path: (props, t_film, gr, ra, gap, Nu's plain parts) for one case in
    plain numbers, None for anything else (the array path checks it and words the message)."""
    geo = GEOMETRIES["cavity"]
    tilt_low, tilt_high = geo.tilt_range
    mixture = _plain_case(gas, pressure, (t1, t2), (gap, height), property_temperature)
    if mixture is None or not (is_plain_number(tilt) and tilt_low <= tilt <= tilt_high):
        return None
    props, t_film, beta, delta_t, gr, ra = _scalar_groups(t1, t2, gap, mixture, pressure, ideal_expansion)
    parts = nusselt_plain(geo, method, None, function_name,
                          {"ra": ra, "pr": props.prandtl, "tilt": layer_tilt(float(tilt), delta_t),
                           **shape_ratios(geo, gap, height=height)})
    return props, t_film, gr, ra, gap, parts


def _cavity_convection(t1, t2, gap, height, tilt, gas, pressure, method, property_temperature,
                       ideal_expansion, function_name) -> "ConvectionResult":
    """The cavity on arrays (:func:`_plain_cavity` serves one case in plain numbers)."""
    geo = GEOMETRIES["cavity"]
    tilt_low, tilt_high = geo.tilt_range
    gap = require_length(function_name, "gap", gap)
    height = require_length(function_name, "height", height)
    tilt = require_between(function_name, "tilt", tilt, tilt_low, tilt_high, "deg")
    props, t_film, beta = film_properties(t1, t2, gas, pressure, property_temperature=property_temperature,
                                          ideal_expansion=ideal_expansion, function_name=function_name)
    delta_t = np.subtract(t1, t2, dtype=float)
    gr, ra = buoyancy_groups(props, beta, delta_t, gap)
    shape = np.broadcast(ra, props.prandtl, height, tilt).shape
    result = nusselt("cavity", method, function_name=function_name,
                     ra=_full(ra, shape), pr=_full(props.prandtl, shape),
                     aspect=_full(shape_ratios(geo, gap, height=height)["aspect"], shape),
                     tilt=_full(layer_tilt(tilt, delta_t), shape))
    h = result.nu * props.conductivity / gap
    return ConvectionResult(h=_full(h, shape), nu=result.nu, ra=_full(ra, shape),
                            gr=_full(gr, shape), pr=_full(props.prandtl, shape),
                            t_film=_full(t_film, shape),
                            conductivity=_full(props.conductivity, shape),
                            length=_full(gap, shape), method=result.method,
                            case=uniform("", shape), in_range=result.in_range, note=result.note, blend=result.blend)


def _with_wind(geometry, still: ConvectionResult, wind, wind_length, length, diameter, gas, pressure,
               function_name) -> ConvectionResult:
    """``still`` with the wind's forced convection combined in (see :mod:`stillair.forced`);
    where the wind is 0 every field keeps its still-air value exactly."""
    flow = WIND_FLOWS[geometry]
    if (is_plain_number(wind) and 0.0 < wind < math.inf and still.h.ndim == 0
            and (wind_length is None or is_plain_number(wind_length) and 0.0 < wind_length < math.inf)
            and not (wind_length is None and flow.wind_length_required)
            and (wind_length is None or flow.along == "wind_length")):
        return _with_plain_wind(flow, still, float(wind), wind_length, length, diameter, gas, pressure,
                                function_name)
    wind = require_nonnegative(function_name, "wind", wind, "m/s")
    if wind_length is not None:
        if flow.along != "wind_length":
            raise InputError(function_name, "wind_length", wind_length,
                             f"blank for {geometry} (the wind crosses its diameter)")
        wind_length = require_positive(function_name, "wind_length", wind_length, "m")
    blowing = wind > 0.0
    if not np.any(blowing):
        return still
    if wind_length is None and flow.wind_length_required:
        raise InputError(function_name, "wind_length", None,
                         "the plate's length along the wind in m (> 0) when wind > 0 (area/perimeter "
                         "is not a length along the wind)")
    along = forced_length(flow, length, wind_length=wind_length, diameter=diameter)
    kinvisc = gas_properties(gas, still.t_film, pressure, function_name=function_name).kinvisc
    shape = np.broadcast(still.h, wind, along).shape
    re = _full(wind * along / kinvisc, shape)
    blowing = _full(blowing, shape) & (re > 0.0)   # a wind so light that Re underflows to 0 is still air
    # Re = 0 where still: the forced correlation is not evaluated there (1 is a stand-in)
    forced = nusselt(flow.geometry, "auto", function_name=function_name,
                     re=np.where(blowing, re, 1.0), pr=_full(still.pr, shape))
    conductivity = _full(still.conductivity, shape)
    h_natural = _full(still.h, shape)
    h_forced = np.where(blowing, forced.nu * conductivity / along, 0.0)
    h = np.where(blowing, combine_mixed(h_natural, h_forced), h_natural)
    still_note = _full(still.note, shape)
    forced_note = np.where(blowing, forced.note, "")
    note = np.where((still_note != "") & (forced_note != ""), still_note + "; " + forced_note,
                    np.where(still_note != "", still_note, forced_note))
    own_length = _full(still.length, shape)
    return ConvectionResult(
        h=h, nu=np.where(blowing, h * own_length / conductivity, _full(still.nu, shape)),
        ra=_full(still.ra, shape), gr=_full(still.gr, shape), pr=_full(still.pr, shape),
        t_film=_full(still.t_film, shape), conductivity=conductivity, length=own_length,
        method=_full(still.method, shape), case=_full(still.case, shape),
        in_range=_full(still.in_range, shape) & (forced.in_range | ~blowing), note=note.astype(object),
        blend=None if still.blend is None else _full(still.blend, shape),
        re=np.where(blowing, re, 0.0), h_natural=h_natural, h_forced=h_forced,
        forced_method=np.where(blowing, forced.method, "").astype(object))


def _with_plain_wind(flow, still, wind, wind_length, length, diameter, gas, pressure, function_name):
    """:func:`_with_wind` for one case in plain numbers (the registry's scalar path, the same
    formulas)."""
    along = float(forced_length(flow, length, wind_length=wind_length, diameter=diameter))
    t_film = float(still.t_film)
    kinvisc = gas_properties(gas, t_film, pressure, function_name=function_name).kinvisc
    re = wind * along / float(kinvisc)
    if not re > 0.0:    # a wind so light that Re underflows to 0: still air
        return still
    forced = nusselt(flow.geometry, "auto", function_name=function_name, re=re, pr=float(still.pr))
    conductivity = float(still.conductivity)
    h_natural = float(still.h)
    h_forced = float(forced.nu) * conductivity / along
    h = combine_mixed(h_natural, h_forced)
    notes = [str(n) for n in (still.note, forced.note) if str(n)]
    return ConvectionResult(
        h=np.asarray(h), nu=np.asarray(h * float(still.length) / conductivity), ra=still.ra, gr=still.gr,
        pr=still.pr, t_film=still.t_film, conductivity=still.conductivity, length=still.length,
        method=still.method, case=still.case, in_range=np.asarray(bool(still.in_range) and bool(forced.in_range)),
        note=np.asarray("; ".join(notes), dtype=object), blend=still.blend, re=np.asarray(re),
        h_natural=np.asarray(h_natural), h_forced=np.asarray(h_forced), forced_method=forced.method)


def _plain_case(gas, pressure, temperatures, lengths, property_temperature):
    """One case in plain numbers, every check passed by plain comparisons (the scalar path): the
    parsed gas (for :func:`_scalar_groups`), else None."""
    if property_temperature is not None:
        return None
    for length in lengths:
        if not is_plain_length(length):
            return None
    return plain_mixture(gas, temperatures, pressure)


def _scalar_groups(t1, t2, length, mixture, pressure, ideal_expansion):
    """(props, t_film, beta, delta_t, gr, ra) for plain numbers :func:`_plain_case` accepted,
    the arithmetic of the array path."""
    t_film = 0.5 * (t1 + t2)
    props = plain_state(mixture, t_film, pressure)   # between two checked temperatures: inside
    beta = 1.0 / (t_film + zero_Celsius) if ideal_expansion else props.expansion
    delta_t = float(t1) - float(t2)
    gr = STANDARD_GRAVITY * beta * abs(delta_t) * length ** 3 / props.kinvisc ** 2
    return props, t_film, beta, delta_t, gr, gr * props.prandtl


def _plain_h(parts, props, length) -> float:
    """h = Nu k / L of the scalar path, from Nu's plain parts (:func:`nusselt_plain`)."""
    return parts[0] * props.conductivity / length


def _scalar_result(props, t_film, gr, ra, length, parts, case) -> ConvectionResult:
    """The scalar path's :class:`ConvectionResult` (0-d arrays) from Nu's plain parts."""
    nu, method, note, blend = parts
    return ConvectionResult(h=np.asarray(_plain_h(parts, props, length)), nu=np.array(nu), ra=np.asarray(ra),
                            gr=np.asarray(gr), pr=np.asarray(props.prandtl), t_film=np.asarray(t_film),
                            conductivity=np.asarray(props.conductivity), length=np.asarray(float(length)),
                            method=np.array(method, dtype=object), case=np.asarray(case, dtype=object),
                            in_range=np.array(note == ""), note=np.array(note, dtype=object),
                            blend=np.array(blend, dtype=object))


def convection_geometries() -> tuple[Geometry, ...]:
    """Every convection geometry (:class:`~stillair.correlations.Geometry`), in definition order.

    Each carries what a caller needs to offer it: ``name``, ``title``, ``parameters`` (the
    physical arguments of :func:`geometry_convection` in order, with unit, doc and default), ``cases``,
    ``tilt_range``, ``methods``, ``method_help()``, ``auto_methods(case)`` and the auto rule in
    ``description``.  A new geometry defined in the registry appears here with no other change.

    A geometry that defines no ``parameters`` is not listed.

    Returns
    -------
    tuple of Geometry
        The geometries of :func:`geometry_convection`, read from the correlation registry.

    Notes
    -----
    The geometries are those defined in the registry (:data:`stillair.GEOMETRIES`); their
    methods' sources and validity are in the ``nu_<geometry>`` docstrings.

    Examples
    --------
    >>> [g.name for g in convection_geometries()]
    ['vplate', 'hplate', 'tplate', 'hcyl', 'sphere', 'vcyl', 'cavity', 'channel']
    """
    return tuple(geometry for geometry in GEOMETRIES.values() if geometry.parameters)


def _h_cavity_call(t1, t2, *, gap, height, tilt, **common) -> ConvectionResult:
    return cavity_convection(t1, t2, gap, height, tilt=tilt, **common)


# The one-call functions of geometries that are not a surface in a large still fluid, by name:
# f(t1, t2, **parameters, gas=, pressure=, method=, property_temperature=, ideal_expansion=,
# function_name=).  A module that defines such a geometry adds its own (channel.py: the channel).
ONE_CALLS: dict = {"cavity": _h_cavity_call}


@_wind_docs
def geometry_convection(geometry: str, t1: ArrayLike, t2: ArrayLike, *, gas: str = "air",
                        pressure: ArrayLike = DEFAULT_PRESSURE, method: str = "auto",
                        property_temperature: ArrayLike | None = None, ideal_expansion: bool = False,
                        function_name: str | None = None, wind: ArrayLike = 0.0,
                        wind_length: ArrayLike | None = None, **parameters: ArrayLike | str) -> ConvectionResult:
    """Convection of any geometry by name, its parameters as keywords (``geometry.parameters``).

    ``t1`` is the surface (or the cavity's underside face) and ``t2`` the fluid (or the other
    face), in °C.  Parameters with a default may be left out; an unknown or missing one is an
    :class:`~stillair.InputError`.  This is :func:`surface_convection` or
    :func:`cavity_convection` with the arguments read from the geometry's data.

    Parameters
    ----------
    geometry : str
        A name from :func:`convection_geometries`.
    t1 : array_like
        Surface temperature (the cavity's underside face) in °C.
    t2 : array_like
        Fluid temperature (the cavity's other face) in °C.
    {gas_and_pressure}
    {method}
    {property_options}
    {wind}
        Only for the exposed surfaces (vplate, hplate, tplate, hcyl, sphere, vcyl).
    parameters : array_like or str
        The geometry's own parameters by name (``length``, ``height``, ``facing``, ``tilt``,
        ``diameter``, ``gap`` ... as ``geometry.parameters`` lists them, lengths in m, angles
        in degrees).

    {convection_result}

    Notes
    -----
    As :func:`surface_convection` (h = Nu k / L) and :func:`cavity_convection` (h = Nu k / gap);
    each method's source and validity are in the ``nu_<geometry>`` docstrings.

    Examples
    --------
    >>> round(float(geometry_convection("vcyl", 60.0, 20.0, height=0.5, diameter=0.05).h), 2)
    5.6
    """
    function_name = function_name or f"h_{geometry}"
    names = tuple(g.name for g in convection_geometries())
    geo = GEOMETRIES[require_choice(function_name, "geometry", geometry, names)]
    known = {p.name: p for p in geo.parameters}
    for name in parameters:
        if name not in known:
            raise InputError(function_name, "parameter", name,
                             f"one of {', '.join(known)} for {geo.name}")
    values: dict[str, Any] = {}
    for parameter in geo.parameters:
        value = parameters.get(parameter.name, parameter.default)
        if value is None:
            raise InputError(function_name, parameter.name, None,
                             f"{'text' if parameter.kind == 'text' else 'a number'} for {geo.name}")
        values[parameter.name] = value
    common: dict[str, Any] = dict(gas=gas, pressure=pressure, method=method, property_temperature=property_temperature,
                  ideal_expansion=ideal_expansion, function_name=function_name)
    own_call = ONE_CALLS.get(geo.name)
    if own_call is not None:
        if wind_length is not None or not (is_plain_number(wind) and wind == 0):
            raise InputError(function_name, "wind", wind, f"0 for {geo.name} (wind acts on exposed surfaces: "
                                                          f"{', '.join(WIND_FLOWS)})")
        return own_call(t1, t2, **values, **common)
    length = values.pop(geo.length)
    return surface_convection(geo.name, t1, t2, length, **values, **common, wind=wind, wind_length=wind_length)


def _h_only(result: ConvectionResult, function_name: str):
    warn_out_of_range(function_name, result.in_range, result.note)
    return unwrap(result.h)


def _h_of_plain(function_name: str, h: float, note: str, slip: str) -> float:
    """:func:`_h_only` of a scalar path's h and range note (the unit-slip note added as
    :func:`_with_slip` adds it), without the result's 0-d arrays."""
    if note:
        warn_out_of_range(function_name, False, f"{note}; {slip}" if slip else note)
    return float(h)     # a Python float, as unwrap gives, whatever numbers came in


def h_vplate(ts: ArrayLike, tf: ArrayLike, height: ArrayLike,
             gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
             method: str = "auto", wind: ArrayLike = 0.0, wind_length: ArrayLike | None = None) -> FloatOrArray:
    """h of a vertical plate of ``height`` (m) at ts in gas at tf (°C), still or in a wind."""
    return _h_only(surface_convection("vplate", ts, tf, height, gas=gas, pressure=pressure, method=method,
                                      function_name="h_vplate", wind=wind, wind_length=wind_length), "h_vplate")


def h_hplate(ts: ArrayLike, tf: ArrayLike, length: ArrayLike, facing: str,
             gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
             method: str = "auto", wind: ArrayLike = 0.0, wind_length: ArrayLike | None = None) -> FloatOrArray:
    """h of a horizontal plate, ``length`` = area/perimeter (m), face looking "up" or "down"."""
    return _h_only(surface_convection("hplate", ts, tf, length, facing=facing, gas=gas, pressure=pressure,
                                      method=method, function_name="h_hplate", wind=wind,
                                      wind_length=wind_length), "h_hplate")


def h_tplate(ts: ArrayLike, tf: ArrayLike, length: ArrayLike, tilt: ArrayLike,
             facing: str, gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
             method: str = "auto", wind: ArrayLike = 0.0, wind_length: ArrayLike | None = None) -> FloatOrArray:
    """h of a plate tilted ``tilt`` degrees from vertical, face looking "up" or "down"."""
    return _h_only(surface_convection("tplate", ts, tf, length, facing=facing, tilt=tilt, gas=gas,
                                      pressure=pressure, method=method, function_name="h_tplate", wind=wind,
                                      wind_length=wind_length), "h_tplate")


def h_hcyl(ts: ArrayLike, tf: ArrayLike, diameter: ArrayLike,
           gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
           method: str = "auto", wind: ArrayLike = 0.0) -> FloatOrArray:
    """h of a long horizontal cylinder (pipe) of outside ``diameter`` (m), wind across its axis."""
    return _h_only(surface_convection("hcyl", ts, tf, diameter, gas=gas, pressure=pressure, method=method,
                                      function_name="h_hcyl", wind=wind), "h_hcyl")


def h_sphere(ts: ArrayLike, tf: ArrayLike, diameter: ArrayLike,
             gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
             method: str = "auto", wind: ArrayLike = 0.0) -> FloatOrArray:
    """h of a sphere of ``diameter`` (m)."""
    return _h_only(surface_convection("sphere", ts, tf, diameter, gas=gas, pressure=pressure, method=method,
                                      function_name="h_sphere", wind=wind), "h_sphere")


def h_vcyl(ts: ArrayLike, tf: ArrayLike, height: ArrayLike, diameter: ArrayLike,
           gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
           method: str = "auto", wind: ArrayLike = 0.0) -> FloatOrArray:
    """h of a vertical cylinder of ``height`` and ``diameter`` (m), Ra on the height, wind across it."""
    return _h_only(surface_convection("vcyl", ts, tf, height, diameter=diameter, gas=gas, pressure=pressure,
                                      method=method, function_name="h_vcyl", wind=wind), "h_vcyl")


def h_cavity(t1: ArrayLike, t2: ArrayLike, gap: ArrayLike, height: ArrayLike,
             tilt: ArrayLike = 90.0, gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
             method: str = "auto") -> FloatOrArray:
    """h across a closed gas layer of ``gap`` and ``height`` (m); t1 on the layer's underside."""
    plain = _plain_cavity(t1, t2, gap, height, tilt, gas, pressure, method, None, False, "h_cavity")
    if plain is not None:   # one case in plain numbers (the usual call, and every cell's)
        props, _, _, _, _, parts = plain
        slip = warn_slips("h_cavity", *_cavity_slips(t1, t2, gap, height), stacklevel=3)
        return _h_of_plain("h_cavity", _plain_h(parts, props, gap), parts[2], slip)
    return _h_only(cavity_convection(t1, t2, gap, height, tilt=tilt, gas=gas, pressure=pressure, method=method,
                                     function_name="h_cavity"), "h_cavity")


# --- docstrings of the h functions, from the geometries and the registry -----------------------

def _h_parameters(geometry: str, first: tuple[str, str]):
    geo = GEOMETRIES[geometry]
    entries = [(first[0], "array_like", "Temperature of the surface (the layer's underside face for a cavity) "
                                        "in °C, inside the gas's range."),
               (first[1], "array_like", "Temperature of the still fluid far from the surface (the other face "
                                        "for a cavity) in °C, inside the gas's range.")]
    for parameter in geo.parameters:
        kind = "str" if parameter.kind == "text" else "array_like"
        default = f", default {parameter.default:g}" if isinstance(parameter.default, float) else ""
        unit = f" in {parameter.unit}" if parameter.unit else ""
        entries.append((parameter.name, kind + default, f"{parameter.doc[:1].upper()}{parameter.doc[1:]}{unit}."))
    entries += [("gas", 'str, default "air"', 'Gas name or mixture such as "argon:0.9, air:0.1" (mole fractions).'),
                ("pressure", "array_like, default 101325", "Absolute pressure in Pa."),
                ("method", 'str, default "auto"', f'One of {geo.method_help()}, or "auto" (see Notes).')]
    if geometry in WIND_FLOWS:
        entries.append(("wind", "array_like, default 0", "Wind speed in m/s (>= 0), taken horizontal; 0 is "
                                                         "still air, the value without wind exactly."))
        if WIND_FLOWS[geometry].along == "wind_length":
            blank = ("required when wind > 0 (area/perimeter is no length along the wind)"
                     if WIND_FLOWS[geometry].wind_length_required else f"blank: the plate's {geo.length}")
            entries.append(("wind_length", "array_like, optional",
                            f"Length of the plate along the wind in m (> 0); {blank}."))
    return entries


_H = ("float or ndarray", "Convection coefficient h = Nu k / L in W/(m²·K), gas properties at the film "
      "(mean) temperature: a float for scalar inputs, an array otherwise.")
# Each h function with its geometry, summary and example (call, shown value), documented from the
# registry below.
_H_SUMMARIES: dict[Callable[..., Any], tuple[str, str, str, str]] = {
    h_vplate: ("vplate", "Convection coefficient of a vertical plate in still gas.", "h_vplate(60.0, 20.0, 0.5)", "5.0"),
    h_hplate: ("hplate", "Convection coefficient of a horizontal plate; hot or cold follows from ts and tf.",
               'h_hplate(60.0, 20.0, 0.25, "up")', "5.96"),
    h_tplate: ("tplate", "Convection coefficient of a plate tilted from the vertical.",
               'h_tplate(60.0, 20.0, 0.5, 30.0, "up")', "4.79"),
    h_hcyl: ("hcyl", "Convection coefficient of a long horizontal cylinder (pipe).", "h_hcyl(60.0, 20.0, 0.05)", "6.09"),
    h_sphere: ("sphere", "Convection coefficient of a sphere.", "h_sphere(60.0, 20.0, 0.1)", "5.75"),
    h_vcyl: ("vcyl", "Convection coefficient of a vertical cylinder, Ra on its height.",
             "h_vcyl(60.0, 20.0, 0.5, 0.05)", "5.6"),
    h_cavity: ("cavity", "Convection coefficient across an enclosed gas layer, per unit face area (Nu k / gap).",
               "h_cavity(15.0, 5.0, 0.016, 1.2)", "1.645"),
}
for _function, (_geometry, _summary, _call, _value) in _H_SUMMARIES.items():
    document(_function, _geometry, _summary,
             _h_parameters(_geometry, ("t1", "t2") if _geometry == "cavity" else ("ts", "tf")), _H,
             f">>> round({_call}, {len(_value.split('.')[1])})\n{_value}")
    if _geometry in WIND_FLOWS:   # the wind's correlations and the combination, before Examples
        _wind = "\n".join(["``wind``"] + [_indent(part, 4) + "\n" for part in wind_notes(_geometry).split("\n\n")])
        _function.__doc__ = (_function.__doc__ or "").replace("\nExamples\n--------\n", f"\n{_wind}\nExamples\n--------\n", 1)
del _function, _geometry, _summary, _call, _value
