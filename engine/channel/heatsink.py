"""Plate-fin heat sinks: channels between fins with fin efficiency and radiation (method in the
package docstring)."""

from __future__ import annotations

import functools
import itertools
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike
from ..constants import STEFAN_BOLTZMANN as SIGMA, ZERO_CELSIUS as zero_Celsius


from ..convection import surface_convection
from ..groups import DEFAULT_PRESSURE
from ..gases import _checked_pressure, require_gas_temperature
from .._docs import shared_docs
from .._select import any_true, where
from .walls import FIN_TIPS, channel_convection
from ..validity import (InputError, distinct_notes, require_between, require_choice, require_finite,
                        require_length, require_positive, unwrap, warn_out_of_range)

# --------------------------------------------------------------------------------------------
# Plate-fin heat sink
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class HeatSinkResult:
    """A plate-fin heat sink's heat rejection and how it splits (W, °C, m, W/(m²·K))."""

    q: np.ndarray                 # total heat rejected, W
    q_fins: np.ndarray            # convection from the fins, W
    q_base: np.ndarray            # convection from the exposed base between the fins, W
    q_radiation: np.ndarray       # radiation from the envelope, W
    spacing: np.ndarray           # gap between fins, m
    h_channel: np.ndarray         # channel coefficient (inner fin faces, base), W/(m²·K)
    h_outer: np.ndarray           # vertical-plate coefficient of the two outer faces, W/(m²·K)
    fin_efficiency: np.ndarray    # efficiency of an inner fin
    outer_fin_efficiency: np.ndarray
    emissivity_effective: np.ndarray  # apparent emissivity of a channel's openings
    in_range: np.ndarray
    note: np.ndarray

    @property
    def notes(self) -> list[str]:
        return distinct_notes(self.note)

    def scalar(self) -> "HeatSinkResult":
        return HeatSinkResult(**{name: unwrap(getattr(self, name)) for name in self.__dataclass_fields__})

#: The largest dimensions of a plate-fin heat sink this model takes, in m (our judgement: no
#: plate-fin sink cooled by still air is larger; beyond them a dimension is almost surely
#: typed in mm, and the call is refused with the value): base width and fin length (its
#: height along the flow) 3 m, fin height (out from the base) 1 m, fin thickness 0.1 m.
HEATSINK_SIZE_LIMITS = {"base_width": 3.0, "fin_length": 3.0, "fin_height": 1.0, "fin_thickness": 0.1}


def _fin_efficiency(h, conductivity, thickness, length, fin_height, tip):
    """tanh(m Lc)/(m Lc) of a straight rectangular fin, m = sqrt(h P/(k A_c)), P = 2(L + t),
    A_c = L t; Lc = H + t/2 ("corrected": the tip's convection folded into the length) or H."""
    m = np.sqrt(h * 2.0 * (length + thickness) / (conductivity * length * thickness))
    lc = fin_height + (thickness / 2.0 if tip == "corrected" else 0.0)
    mlc = m * lc
    # no error state to set: h >= 0, and the divisor is never 0
    eta = where(mlc > 0, np.tanh(mlc) / where(mlc > 0, mlc, 1.0), 1.0)
    return eta, lc


def heatsink(t_base: ArrayLike, t_ambient: ArrayLike, base_width: ArrayLike, fin_height: ArrayLike,
             fin_length: ArrayLike, fin_thickness: ArrayLike, fin_count: ArrayLike, conductivity: ArrayLike,
             emissivity: ArrayLike, gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE, *,
             tip: str = "corrected", function_name: str = "heatsink") -> HeatSinkResult:
    """Heat rejected by a natural-convection plate-fin heat sink with vertical fins, and its split.

    Parameters
    ----------
{heatsink_parameters}
    function_name : str, default "heatsink"
        The name error messages start with.

    Returns
    -------
    HeatSinkResult
        Total heat q (W) and its parts q_fins, q_base, q_radiation; the spacing, both
        coefficients, fin efficiencies, the channels' apparent emissivity and the validity note.

    Notes
    -----
    Model.  A vertical base plate of width W carries N straight rectangular fins of height H (normal
    to the base), length L (vertical, along the flow) and thickness t, at a uniform spacing
    S = (W - N t)/(N - 1).  The base is at ``t_base``, its back face is mounted on the
    equipment (no heat loss), and the sink stands in still air at ``t_ambient`` with large
    surroundings at the same temperature.

    * Channels: each gap is an open vertical channel with isothermal walls (the
      ``isothermal`` case of :func:`h_channel`, Bar-Cohen and Rohsenow), h on the gap S and
      the height L, properties at the film temperature of base and ambient.  The base strip
      between two fins (area S L) takes the same h at the base temperature.
    * Fins: efficiency eta = tanh(m Lc)/(m Lc), m = sqrt(h P/(k A_c)) with P = 2 (L + t),
      A_c = L t; the tip's convection folded into the corrected length Lc = H + t/2
      (``tip="corrected"``) or an adiabatic tip Lc = H (``tip="adiabatic"``); Incropera et
      al., 6th ed., eqs. 3.89, 3.92 and 3.94 (equation numbers from memory).
      q_fin = eta h P Lc (t_base - t_ambient).
      Inner fins have a channel on both faces; the two outer fins have a channel on one face
      and a free vertical plate (:func:`h_vplate`) on the other, and use the mean of the two h.
    * Radiation: from the envelope of the sink to the surroundings at ambient temperature,
      with the whole sink at the base temperature.  The envelope is the fin-tip plane (the N
      tips at emissivity eps, and the openings of the N - 1 channels), the two outer fin faces
      at eps, and the channels' openings at the top and bottom.  A channel's openings (front
      S L, ends 2 S H) radiate with the apparent emissivity of an isothermal grey cavity of
      uniform radiosity, eps_a = eps / (eps + (1 - eps) A_open / A_wall), A_wall = (2 H + S) L
      (the radiosity balance of a two-surface enclosure, Incropera et al., 6th ed., ch. 13; common
      practice).

    Limits.  Fins at the base temperature for radiation overstate it when the fin efficiency is
    low (good for aluminium and copper fins in still air, eta > 0.9); the channel correlation
    ignores the base as a third wall and the open fin-tip side, which lets air in sideways on
    short fins (fin height much less than the length); radiation from nearby hot parts, an
    enclosure around the sink, or a sink mounted with fins horizontal are outside the model.

    Examples
    --------
    >>> r = heatsink(60.0, 25.0, 0.10, 0.04, 0.12, 0.0015, 12, 200.0, 0.85).scalar()
    >>> round(r.q, 1), round(r.q_fins, 1), round(r.q_base, 1), round(r.q_radiation, 1)
    (30.2, 21.8, 1.8, 6.5)
    """
    tip = require_choice(function_name, "tip", tip, FIN_TIPS)
    t_base = require_gas_temperature(function_name, "t_base", t_base, gas)
    checked = _checked_sink(function_name, t_ambient, base_width, fin_height, fin_length, fin_thickness, fin_count,
                            conductivity, emissivity, gas, pressure)
    t_ambient, width, fin_height, length, thickness, count, conductivity, emissivity, spacing = checked
    return _sink_model(t_base, t_ambient, width, fin_height, length, thickness, count, conductivity, emissivity,
                       spacing, gas, pressure, tip, function_name)


def _checked_sink(function_name, t_ambient, base_width, fin_height, fin_length, fin_thickness, fin_count,
                  conductivity, emissivity, gas, pressure) -> tuple:
    """Every argument of the model but the base temperature and the tip, checked under
    ``function_name``: (t_ambient, width, fin_height, length, thickness, count, conductivity,
    emissivity, spacing) as arrays."""
    t_ambient = require_gas_temperature(function_name, "t_ambient", t_ambient, gas)
    width = require_length(function_name, "base_width", base_width, HEATSINK_SIZE_LIMITS["base_width"])
    fin_height = require_length(function_name, "fin_height", fin_height, HEATSINK_SIZE_LIMITS["fin_height"])
    length = require_length(function_name, "fin_length", fin_length, HEATSINK_SIZE_LIMITS["fin_length"])
    thickness = require_length(function_name, "fin_thickness", fin_thickness, HEATSINK_SIZE_LIMITS["fin_thickness"])
    count = require_finite(function_name, "fin_count", fin_count)
    bad = (count < 2) | (count != np.floor(count))
    if any_true(bad):
        raise InputError(function_name, "fin_count", count[bad].flat[0] if count.ndim else count.item(),
                         "a whole number >= 2")
    conductivity = require_positive(function_name, "conductivity", conductivity, "W/(m·K)")
    emissivity = require_between(function_name, "emissivity", emissivity, 0.0, 1.0)
    spacing = (width - count * thickness) / (count - 1.0)
    if any_true(spacing <= 0):
        bad = np.broadcast_to(count, spacing.shape)[spacing <= 0].flat[0] if spacing.ndim else count.item()
        raise InputError(function_name, "fin_count", bad,
                         "small enough that the fins fit on the base (fin_count × fin_thickness < base_width)")
    _checked_pressure(function_name, pressure)
    return t_ambient, width, fin_height, length, thickness, count, conductivity, emissivity, spacing


def _sink_model(t_base, t_ambient, width, fin_height, length, thickness, count, conductivity, emissivity, spacing,
                gas, pressure, tip, function_name) -> HeatSinkResult:
    """:func:`heatsink`'s model on arguments :func:`_checked_sink` checked (arrays, or plain
    floats: then the channel and the outer faces take the correlation registry's scalar path)."""
    return _sink_result(_sink_heat(t_base, t_ambient, width, fin_height, length, thickness, count, conductivity,
                                   emissivity, spacing, gas, pressure, tip, function_name))


def _sink_heat(t_base, t_ambient, width, fin_height, length, thickness, count, conductivity, emissivity, spacing,
               gas, pressure, tip, function_name) -> tuple:
    """The model's numbers, ``(q, q_fins, q_base, q_radiation, spacing, h_in, h_out, eta_in,
    eta_out, eps_a, channel, outer)``, before :func:`_sink_result` dresses them (a solve reads
    only q, and the result of the root)."""
    channel = channel_convection(t_base, t_ambient, spacing, length, case="isothermal", gas=gas,
                                 pressure=pressure, function_name=function_name)
    outer = surface_convection("vplate", t_base, t_ambient, length, gas=gas, pressure=pressure,
                               function_name=function_name)
    excess = t_base - t_ambient     # checked floats (or float arrays)
    # plain floats for one case: numpy's 0-d arrays cost ten times a float in the arithmetic below
    h_in, h_out = unwrap(channel.h), unwrap(outer.h)
    h_outer_fin = 0.5 * (h_in + h_out)
    eta_in, lc = _fin_efficiency(h_in, conductivity, thickness, length, fin_height, tip)
    eta_out, _ = _fin_efficiency(h_outer_fin, conductivity, thickness, length, fin_height, tip)
    fin_area = 2.0 * (length + thickness) * lc
    q_fins = ((count - 2.0) * eta_in * h_in + 2.0 * eta_out * h_outer_fin) * fin_area * excess
    q_base = (count - 1.0) * spacing * length * h_in * excess

    opening = spacing * length + 2.0 * spacing * fin_height
    walls = (2.0 * fin_height + spacing) * length
    # the walls' area is > 0, and the denominator >= the opening's share, > 0: nothing can warn
    eps_a = where(emissivity > 0, emissivity / (emissivity + (1.0 - emissivity) * opening / walls), 0.0)
    grey_area = emissivity * (count * thickness * length + 2.0 * fin_height * length)
    t_b, t_a = t_base + zero_Celsius, t_ambient + zero_Celsius
    q_radiation = SIGMA * (grey_area + eps_a * (count - 1.0) * opening) * (t_b ** 4 - t_a ** 4)

    q = q_fins + q_base + q_radiation
    return q, q_fins, q_base, q_radiation, spacing, h_in, h_out, eta_in, eta_out, eps_a, channel, outer


def _sink_result(heat: tuple) -> HeatSinkResult:
    """:func:`_sink_heat`'s numbers as a :class:`HeatSinkResult` of their broadcast shape."""
    q, q_fins, q_base, q_radiation, spacing, h_in, h_out, eta_in, eta_out, eps_a, channel, outer = heat
    shape = np.shape(q)
    if shape == ():   # one case (heatsink_tbase's evaluations): 0-d arrays, no broadcasting machinery
        full = lambda a: np.asarray(a)  # noqa: E731
        in_range = np.asarray(bool(channel.in_range) and bool(outer.in_range))
        note = np.asarray(_sink_note(heat), dtype=object)
        q = np.asarray(q)
    else:
        in_range = np.broadcast_to(channel.in_range & outer.in_range, shape)
        note = np.broadcast_to(np.where(channel.note != "", channel.note, outer.note), shape)
        full = lambda a: np.broadcast_to(a, shape)  # noqa: E731
    return HeatSinkResult(q=q, q_fins=full(q_fins), q_base=full(q_base), q_radiation=full(q_radiation),
                          spacing=full(spacing), h_channel=full(h_in), h_outer=full(h_out),
                          fin_efficiency=full(eta_in), outer_fin_efficiency=full(eta_out),
                          emissivity_effective=full(eps_a), in_range=in_range, note=note)


def _sink_note(heat: tuple) -> str:
    """The note of one case of :func:`_sink_heat`'s numbers: the channel's, else the outer
    faces' (as plain text: str() of a 0-d array would format it)."""
    channel, outer = heat[-2], heat[-1]
    return str(channel.note.item() or outer.note.item())


@functools.cache
def _brentq():
    """scipy's brentq, imported on first use (scipy.optimize takes 0.4 s to load), then at
    the cost of a call rather than an import statement per solve."""
    from scipy.optimize import brentq
    return brentq


def heatsink_q(t_base: ArrayLike, t_ambient: ArrayLike, base_width: ArrayLike, fin_height: ArrayLike,
               fin_length: ArrayLike, fin_thickness: ArrayLike, fin_count: ArrayLike, conductivity: ArrayLike,
               emissivity: ArrayLike, gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
               tip: str = "corrected") -> float | np.ndarray:
    """Heat in W rejected by a plate-fin heat sink with vertical fins (model: :func:`heatsink`).

    Parameters
    ----------
{heatsink_parameters}

    Returns
    -------
    float or array
        Heat rejected in W (fins + exposed base + radiation).

    Notes
    -----
    The model, its sources (Bar-Cohen and Rohsenow channels, fin efficiency, grey-cavity
    radiation) and its limits are described in :func:`heatsink`.

    Examples
    --------
    >>> round(heatsink_q(80.0, 30.0, 0.12, 0.024, 0.18, 0.001, 14, 180.0, 0.0))   # W, convection only
    38
    """
    result = heatsink(t_base, t_ambient, base_width, fin_height, fin_length, fin_thickness, fin_count,
                      conductivity, emissivity, gas, pressure, tip=tip, function_name="heatsink_q")
    warn_out_of_range("heatsink_q", result.in_range, result.note)
    return unwrap(result.q)


# Largest base-ambient difference heatsink_tbase searches (the gas data end well before).
_MAX_EXCESS = 2000.0


def heatsink_tbase(q: ArrayLike, t_ambient: ArrayLike, base_width: ArrayLike, fin_height: ArrayLike,
                   fin_length: ArrayLike, fin_thickness: ArrayLike, fin_count: ArrayLike, conductivity: ArrayLike,
                   emissivity: ArrayLike, gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
                   tip: str = "corrected") -> float | np.ndarray:
    """Base temperature in °C at which a plate-fin heat sink rejects ``q`` W.

    Parameters
    ----------
    q : float or array
        Heat to reject in W (>= 0).
{heatsink_parameters_after_t_base}
    Returns
    -------
    float or array
        Base temperature in °C (= t_ambient for q = 0).

    Notes
    -----
    Solves heatsink_q(t_base, ...) = q for t_base with scipy's brentq (the heat rejected rises
    monotonically with the base temperature); the bracket starts at t_ambient and doubles until
    it holds q (at most 2000 K above ambient).  Array inputs are solved element by element.
    The model and its sources are described in :func:`heatsink`.

    Examples
    --------
    >>> round(heatsink_tbase(20.0, 25.0, 0.1, 0.03, 0.1, 0.0015, 10, 200.0, 0.85), 1)
    59.6
    """
    function_name = "heatsink_tbase"
    q = require_between(function_name, "q", q, 0.0, np.inf, "W")
    tip = require_choice(function_name, "tip", tip, FIN_TIPS)
    # Every argument checked once, in full, so that the messages name this function; the solve
    # below evaluates the model on them, element by element in plain floats.
    checked = _checked_sink(function_name, t_ambient, base_width, fin_height, fin_length, fin_thickness, fin_count,
                            conductivity, emissivity, gas, pressure)
    arrays = (q, *checked, np.asarray(pressure, dtype=float))
    if any(array.ndim for array in arrays):
        arrays = tuple(np.broadcast_arrays(*arrays))
    out = np.empty(arrays[0].shape)
    notes = np.empty(arrays[0].shape, dtype=object)
    brentq = _brentq()
    for index in itertools.product(*map(range, out.shape)):   # np.ndindex, without its set-up cost
        q_i, ta, width, height, length, thickness, count, fin_k, eps, spacing, p = (float(a[index]) for a in arrays)

        # Each base temperature is evaluated once: brentq asks again for the bracket's end the
        # search below found, and the notes are read at the root brentq evaluated last.  At
        # t_base = t_ambient the sink rejects nothing (every term carries the difference or the
        # difference of fourth powers), so that end costs no evaluation.
        evaluated: dict = {}
        excess: dict = {ta: -q_i}

        def rejected(t_base):
            if t_base not in evaluated:
                # the model on the arguments checked above, in plain floats: the channel and the
                # outer faces take the registry's scalar path, and no argument is checked again
                evaluated[t_base] = _sink_heat(t_base, ta, width, height, length, thickness, count, fin_k, eps,
                                               spacing, gas, p, tip, function_name)
            return evaluated[t_base]

        def excess_heat(t_base):
            if t_base not in excess:
                excess[t_base] = float(rejected(t_base)[0]) - q_i
            return excess[t_base]

        if q_i == 0.0:
            out[index], notes[index] = ta, ""
            continue
        span = 10.0
        try:
            while excess_heat(ta + span) < 0.0:
                span *= 2.0
                if span > _MAX_EXCESS:
                    raise InputError(function_name, "q", q_i, "within what the sink can reject below "
                                     f"{_MAX_EXCESS:g} K above ambient")
            out[index] = brentq(excess_heat, ta, ta + span, xtol=1e-10, rtol=1e-13)
        except InputError as error:
            if error.argument == "q":
                raise
            # the bracket ran past the gas data: the heat is more than the sink can reject there
            raise InputError(function_name, "q", q_i, "small enough that the base temperature stays "
                             f"inside the gas data ({error.allowed})") from None
        notes[index] = _sink_note(rejected(out[index]))
    warn_out_of_range(function_name, notes == "", notes)
    return unwrap(out)

# The heat-sink functions share their parameters; their docstrings list them from one place.
_HEATSINK_PARAMETERS = """    t_base : float or array
        Temperature of the base in °C.
    t_ambient : float or array
        Temperature of the still ambient air and of the surroundings in °C.
    base_width : float or array
        Width W of the base across the fins in m.
    fin_height : float or array
        Height H of each fin from the base to its tip in m.
    fin_length : float or array
        Length L of the fins along the (vertical) flow in m.
    fin_thickness : float or array
        Fin thickness t in m.
    fin_count : int or array
        Number of fins N (whole number >= 2, N t < W).
    conductivity : float or array
        Fin conductivity in W/(m·K) (aluminium alloys about 150 to 220).
    emissivity : float or array
        Emissivity of the sink's surface, 0 to 1 (anodised about 0.8, bare aluminium 0.05-0.1).
    gas : str, default "air"
        Gas name or mixture such as "argon:0.9, air:0.1" (mole fractions).
    pressure : float or array, default 101325
        Absolute pressure in Pa.
    tip : str, default "corrected"
        "corrected" or "adiabatic" fin tip."""
for _sink_function in (heatsink, heatsink_q, heatsink_tbase):
    shared_docs(_sink_function, {"heatsink_parameters": _HEATSINK_PARAMETERS,
                                 "heatsink_parameters_after_t_base": _HEATSINK_PARAMETERS.split("\n", 2)[2]})
del _sink_function
