"""Open vertical channels and plate-fin heat sinks.

Air rising between two vertical parallel plates of spacing S and height L, open at the bottom
and at the top: the gaps of a plate-fin heat sink, a vented card cage, the air gap behind a
rainscreen.  Only vertical channels are covered (no tilt): published treatments of inclined
channels exist (e.g. Mittelman, Alshare and Davidson, Int. J. Heat Mass Transfer 52 (2009)
4689-4694, uniform flux, 30-90 deg) but their group definitions were not checked against the
papers here, so none is registered.

Groups
------
Ra_S is based on the spacing, Ra_S = g beta dT S^3 / (nu alpha), and the channel's governing group
is the Elenbaas number El = Ra_S S/L (Ra_S over the aspect ratio L/S).  For the uniform-flux cases
the modified Rayleigh number on the wall heat flux q'' replaces it,
Ra*_S = g beta q'' S^4 / (k alpha nu), El* = Ra*_S S/L.

Cases (the two walls of the channel)
------------------------------------
``isothermal``             both walls at Ts (symmetric)
``isothermal-adiabatic``   one wall at Ts, the other adiabatic
``flux``                   uniform heat flux q'' on both walls (symmetric)
``flux-adiabatic``         uniform heat flux q'' on one wall, the other adiabatic

Nusselt numbers are on the spacing and on the heated wall area: Nu_S = h S / k, with
q'' = h (Ts - Tf) per unit area of heated wall (both walls in the symmetric cases, the one heated
wall in the asymmetric cases).  In the isothermal cases Ts - Tf is the wall temperature minus the
ambient (inlet) temperature.  In the flux cases the wall temperature rises with height, and the
temperature difference is the one at the top of the channel, the maximum wall temperature:
Nu_S = q'' S / (k (Ts,L - Tf)) (Bar-Cohen and Rohsenow's definition); it is *not* the mid-height
or mean temperature.

Correlations (registered for the geometry ``channel``)
------------------------------------------------------
Bar-Cohen and Rohsenow composed each case from its two limits in Churchill-Usagi form with
exponent -2, Nu = (Nu_fd^-2 + Nu_iso^-2)^-1/2:

* fully developed (narrow or tall channel, the air leaves at the wall temperature):
  Nu_fd = El / sqrt(C1) (isothermal), sqrt(El* / C1) (flux);
* isolated plate (wide channel, the boundary layers never meet):
  Nu_iso = El^(1/4) / sqrt(C2) (isothermal), El*^(1/5) / sqrt(C2) (flux).

C1 = 576, 144, 48, 24 and C2 = 2.87, 2.87, 2.51, 2.51 for the four cases in the order above.
Elenbaas' own fit for symmetric isothermal plates is registered too.

Optimum spacing (:func:`channel_spacing`)
-----------------------------------------
``"array"``: the spacing that rejects the most heat from a fixed width of thin plates at a fixed
wall temperature: it maximises h/S, i.e. Nu/S^2.  For the isothermal cases this gives
El_opt = (2 C1/C2)^(2/3), S_opt = (2 C1/C2)^(1/6) (Ra_S/(S^3 L))^-1/4 = 2.716 and 2.156 times
(Ra_S/(S^3 L))^-1/4, Bar-Cohen and Rohsenow's published 2.714 and 2.154 to their rounding.  For
the flux cases the same criterion at a fixed maximum wall temperature gives
El*_opt = (5 C1 / (4 C2))^(5/3); Bar-Cohen and Rohsenow's own flux optima (from memory 1.47 and
1.17 (Ra*_S/(S^4 L))^-1/5) rest on a criterion not reproduced here.
``"plate"``: the spacing beyond which a wider gap no longer helps each plate: the composite
rises monotonically towards the isolated plate, so this is the spacing where h reaches 99 % of
the isolated-plate value at the same wall temperature (for the isothermal cases 1.71 S_opt,
Bar-Cohen and Rohsenow's S_max).

Plate-fin heat sink (:func:`heatsink`)
--------------------------------------
See :func:`heatsink` for the model and its limits.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from numpy.typing import ArrayLike
from scipy.constants import Stefan_Boltzmann as SIGMA, zero_Celsius
from scipy.optimize import brentq

from .convection import ONE_CALLS, ConvectionResult, _full, _h_only, shape_ratios, surface_convection
from .correlations import (AutoStep, Geometry, Parameter, correlation, define_geometry, nusselt_at_difference,
                           nusselt_value)
from .groups import DEFAULT_PRESSURE, STANDARD_GRAVITY, buoyancy_groups, film_properties
from ._docs import shared_docs
from .validity import (
    InputError,
    Range,
    distinct_notes,
    require_between,
    require_choice,
    require_finite,
    require_positive,
    unwrap,
    warn_out_of_range,
)

__all__ = [
    "CHANNEL_CASES",
    "CHANNEL_OPTIMA",
    "FIN_TIPS",
    "BAR_COHEN_ROHSENOW",
    "HeatSinkResult",
    "channel_convection",
    "nu_channel",
    "h_channel",
    "channel_spacing",
    "optimum_elenbaas",
    "heatsink",
    "heatsink_q",
    "heatsink_tbase",
]

CHANNEL_CASES = ("isothermal", "isothermal-adiabatic", "flux", "flux-adiabatic")
FLUX_CASES = ("flux", "flux-adiabatic")
CHANNEL_OPTIMA = ("array", "plate")
FIN_TIPS = ("corrected", "adiabatic")

# Bar-Cohen and Rohsenow (1984): (C1, C2) per case.
BAR_COHEN_ROHSENOW = {
    "isothermal": (576.0, 2.87),
    "isothermal-adiabatic": (144.0, 2.87),
    "flux": (48.0, 2.51),
    "flux-adiabatic": (24.0, 2.51),
}

# h within this fraction of the isolated plate defines the "plate" optimum.
PLATE_OPTIMUM_FRACTION = 0.99


def _elenbaas(inputs):
    return inputs["ra"] / inputs["aspect"]


def _ra_length(inputs):
    """Ra on the height, Ra_S (L/S)^3: the isolated-plate laminar bound applies to it."""
    return inputs["ra"] * inputs["aspect"] ** 3


def _flux_ra_length(inputs):
    """Ra* on the height, Ra*_S (L/S)^4."""
    return inputs["ra"] * inputs["aspect"] ** 4


CHANNEL = define_geometry(Geometry(
    name="channel", inputs=("ra", "pr", "aspect"), cases=CHANNEL_CASES, flux_cases=FLUX_CASES,
    description="Open vertical channel between parallel plates, Ra on the spacing S (Ra*_S on "
                "the wall heat flux for the flux cases), aspect = height/spacing, Nu = h S/k; "
                "flux cases: h and Nu on the top (maximum) wall temperature. Cases: isothermal, "
                "isothermal-adiabatic, flux, flux-adiabatic. Auto rule: bar-cohen-rohsenow for "
                "every case; outside its range it is still used, with the note. elenbaas "
                "(isothermal only) is used only when asked for.",
    auto={case: (AutoStep("bar-cohen-rohsenow", when=()),) for case in CHANNEL_CASES},
    title="open vertical channel", length="spacing", length_doc="spacing S between the plates, m",
    branch_ends="from: a channel wall (flux cases: its temperature at the top, the hottest point); "
                "to: the air at the channel inlet (ambient); A: the heated wall area the branch "
                "stands for (both walls in the symmetric cases)",
    parameters=(Parameter("spacing", "m", "spacing S between the plates (> 0)"),
                Parameter("height", "m", "channel height L, the plates' length along the flow (> 0)"),
                Parameter("case", "", "the walls: " + ", ".join(CHANNEL_CASES), default="isothermal",
                          kind="text"))))


def fully_developed_limit(el, case):
    """Nu_fd: El/sqrt(C1) (isothermal cases) or sqrt(El*/C1) (flux cases)."""
    c1, _ = BAR_COHEN_ROHSENOW[case]
    return np.sqrt(el / c1) if case in FLUX_CASES else el / np.sqrt(c1)


def isolated_plate_limit(el, case):
    """Nu_iso: El^(1/4)/sqrt(C2) (isothermal cases) or El*^(1/5)/sqrt(C2) (flux cases)."""
    _, c2 = BAR_COHEN_ROHSENOW[case]
    return el ** (0.2 if case in FLUX_CASES else 0.25) / np.sqrt(c2)


def _composite(el, case):
    with np.errstate(divide="ignore"):  # El = 0: Nu_fd = 0 and the composite is 0
        return (fully_developed_limit(el, case) ** -2.0 + isolated_plate_limit(el, case) ** -2.0) ** -0.5


@correlation(
    geometry="channel", method="bar-cohen-rohsenow", cases=CHANNEL_CASES,
    title="Bar-Cohen and Rohsenow, composite of the fully developed and isolated-plate limits",
    source="A. Bar-Cohen, W.M. Rohsenow, Thermally optimum spacing of vertical, natural "
           "convection cooled, parallel plates, J. Heat Transfer 106 (1984) 116-123; Incropera "
           "et al., Fundamentals of Heat and Mass Transfer, 6th ed., sec. 9.7, eqs. 9.37 and "
           "9.40, Table 9.3 (equation numbers from memory)",
    equation="isothermal cases: Nu = [C1/El^2 + C2/El^(1/2)]^(-1/2), El = Ra_S S/L; flux cases: "
             "Nu = [C1/El* + C2/El*^(2/5)]^(-1/2), El* = Ra*_S S/L; (C1, C2) = (576, 2.87) "
             "isothermal, (144, 2.87) isothermal-adiabatic, (48, 2.51) flux, (24, 2.51) "
             "flux-adiabatic",
    validity=[Range("Ra_L", high=1e9, of=_ra_length)],
    validity_by_case={case: (Range("Ra*_L", high=1e11, of=_flux_ra_length),) for case in FLUX_CASES},
    notes="Laminar: the isolated-plate limit holds to Ra_L = Ra_S (L/S)^3 = 1e9; for the flux "
          "cases the same bound carried over (Ra* = Ra Nu, Nu_L ~ 100 there) as Ra*_L = 1e11 "
          "(common practice, not a published bound). Coefficients fitted for air (Pr ~ 0.7).")
def _channel_bar_cohen_rohsenow(ra, pr, aspect, case):
    return _composite(ra / aspect, case)


@correlation(
    geometry="channel", method="elenbaas", cases=("isothermal",),
    title="Elenbaas, symmetric isothermal parallel plates in air",
    source="W. Elenbaas, Heat dissipation of parallel plates by free convection, Physica 9 "
           "(1942) 1-28; Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., "
           "eq. 9.36 (range from memory)",
    equation="Nu = (El/24) [1 - exp(-35/El)]^(3/4), El = Ra_S S/L",
    validity=[Range("El", 1e-1, 1e5, of=_elenbaas)],
    notes="Fitted to Elenbaas' measurements in air. Limits: El/24 (fully developed) for small El, "
          "35^(3/4)/24 El^(1/4) = 0.60 El^(1/4) (isolated plate) for large El.")
def _channel_elenbaas(ra, pr, aspect, case):
    el = ra / aspect
    with np.errstate(divide="ignore", over="ignore"):
        return el / 24.0 * (-np.expm1(-35.0 / el)) ** 0.75


def nu_channel(ra: ArrayLike, pr: ArrayLike, aspect: ArrayLike, case: str = "isothermal",
               method: str = "auto") -> float | np.ndarray:
    """Nusselt number Nu_S = h S / k of an open vertical parallel-plate channel.

    Parameters
    ----------
    ra : float or array
        Rayleigh number on the spacing, Ra_S = g beta (Ts - Tf) S^3/(nu alpha), for the
        isothermal cases; the modified Rayleigh number Ra*_S = g beta q'' S^4/(k alpha nu) for the
        flux cases (q'' in W/m² of heated wall).
    pr : float or array
        Prandtl number.
    aspect : float or array
        Height over spacing, L/S (> 0); El = Ra_S / aspect is the Elenbaas number.
    case : str
        "isothermal", "isothermal-adiabatic", "flux" or "flux-adiabatic".
    method : str
        "auto" (bar-cohen-rohsenow), "bar-cohen-rohsenow" or "elenbaas" (isothermal only).

    Returns
    -------
    float or array
        Nu_S on the heated wall area; for the flux cases on the top (maximum) wall temperature.

    Notes
    -----
    Formula, source and validity: see the registry (``stillair functions`` lists them) and the
    module text.  Outside the validity range the value is returned with a
    :class:`CorrelationRangeWarning`.

    Examples
    --------
    >>> round(nu_channel(54.4 * 25, 0.71, 25.0), 3)   # at the optimum El = 54.4
    1.309
    """
    return nusselt_value("channel", method, case, function_name="nu_channel", ra=ra, pr=pr, aspect=aspect)


def channel_convection(ts: ArrayLike, tf: ArrayLike, spacing: ArrayLike, height: ArrayLike, *,
                       case: str = "isothermal", gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
                       method: str = "auto", property_temperature: ArrayLike | None = None,
                       ideal_expansion: bool = False, function_name: str = "h_channel") -> ConvectionResult:
    """Convection in an open vertical channel, with everything a checker wants to see.

    Properties at the film temperature (ts + tf)/2 (or ``property_temperature``).  ``ra`` of
    the result is the Rayleigh number the correlation saw: Ra_S for the isothermal cases, Ra*_S
    for the flux cases.

    Parameters
    ----------
    {channel_walls}
    case : str, default "isothermal"
        "isothermal", "isothermal-adiabatic", "flux", "flux-adiabatic".
    {gas_and_pressure}
    method : str, default "auto"
        "auto", "bar-cohen-rohsenow" or "elenbaas".
    property_temperature : float or array, optional
        Temperature in °C at which to take the gas properties instead of (ts + tf)/2.
    ideal_expansion : bool, default False
        Use the ideal-gas expansion coefficient 1/T instead of the real gas's.
    function_name : str, default "h_channel"
        The name error messages and range notes are given under.

    Returns
    -------
    ConvectionResult
        h in W/(m²·K) per unit area of heated wall with Nu_S, Ra (see above), Gr, Pr, the film
        temperature, the conductivity, the length S, the method, the case and the range note,
        as arrays of the broadcast shape (``.scalar()`` for floats).

    Raises
    ------
    InputError
        An unknown case, gas or method; a spacing or height that is not positive; a temperature
        outside the gas's range.

    Notes
    -----
    h = Nu_S k / S with Nu_S from :func:`nu_channel` (the correlation registry's channel methods,
    with their sources and validity in its docstring).  For the flux cases ts - tf is the
    top-of-channel temperature difference and Ra*_S = Ra_S Nu_S, solved for Nu_S.

    Examples
    --------
    >>> result = channel_convection(80.0, 30.0, 0.00745, 0.18).scalar()
    >>> round(result.h, 1), result.method
    (4.9, 'bar-cohen-rohsenow')
    """
    case = require_choice(function_name, "case", case, CHANNEL_CASES)
    spacing = require_positive(function_name, "spacing", spacing, "m")
    height = require_positive(function_name, "height", height, "m")
    props, t_film, beta = film_properties(ts, tf, gas, pressure, property_temperature=property_temperature,
                                          ideal_expansion=ideal_expansion, function_name=function_name)
    delta_t = np.subtract(ts, tf, dtype=float)
    gr, ra = buoyancy_groups(props, beta, delta_t, spacing)
    shape = np.broadcast(ra, props.prandtl, height).shape
    ra, pr = _full(ra, shape), _full(props.prandtl, shape)
    aspect = _full(shape_ratios(CHANNEL, spacing, height=height)["aspect"], shape)
    result = nusselt_at_difference("channel", method, case, function_name=function_name, ra=ra, pr=pr,
                                   aspect=aspect)
    ra = CHANNEL.correlation_rayleigh(ra, result.nu, case)
    h = result.nu * props.conductivity / spacing
    return ConvectionResult(h=_full(h, shape), nu=result.nu, ra=_full(ra, shape), gr=_full(gr, shape), pr=pr,
                            t_film=_full(t_film, shape), conductivity=_full(props.conductivity, shape),
                            length=_full(spacing, shape),
                            method=result.method, case=np.full(shape, case, dtype=object),
                            in_range=result.in_range, note=result.note)


ONE_CALLS["channel"] = channel_convection



def h_channel(ts: ArrayLike, tf: ArrayLike, spacing: ArrayLike, height: ArrayLike, case: str = "isothermal",
              gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE,
              method: str = "auto") -> float | np.ndarray:
    """Convection coefficient on the walls of an open vertical parallel-plate channel.

    Parameters
    ----------
    {channel_walls}
    case : str
        "isothermal" (default), "isothermal-adiabatic", "flux", "flux-adiabatic".
    {gas_and_pressure}
    method : str
        "auto", "bar-cohen-rohsenow" or "elenbaas".

    Returns
    -------
    float or array
        h in W/(m²·K) per unit area of heated wall, q'' = h (ts - tf); properties at the film
        temperature (ts + tf)/2.

    Notes
    -----
    h = Nu_S k / S with Nu_S from :func:`nu_channel`.  For the flux cases ts - tf is the
    top-of-channel temperature difference and Ra*_S = Ra_S Nu_S, solved for Nu_S.

    Examples
    --------
    >>> round(h_channel(80.0, 30.0, 0.00745, 0.18), 1)   # a heat-sink gap near its optimum
    4.9
    """
    return _h_only(channel_convection(ts, tf, spacing, height, case=case, gas=gas, pressure=pressure,
                                      method=method, function_name="h_channel"), "h_channel")


# --------------------------------------------------------------------------------------------
# Optimum spacing
# --------------------------------------------------------------------------------------------

def _flux_nu_at_el(el, case):
    """Composite Nu of a flux case for a given El on the top temperature (El* = El Nu)."""
    return brentq(lambda nu: nu - _composite(el * nu, case), 1e-12, 1e6, xtol=1e-14, rtol=1e-14)


@lru_cache(maxsize=None)
def optimum_elenbaas(case: str, optimum: str) -> float:
    """El = Ra_S S/L (on the wall or top-wall temperature difference) at the optimum spacing.

    "array", isothermal cases: (2 C1/C2)^(2/3) (maximum of Nu/El^(1/2), closed form).
    "array", flux cases: El* = (5 C1/(4 C2))^(5/3), then El = El*/Nu (maximum of Nu/El^(1/2)
    with El* = El Nu at a fixed top temperature, closed form).
    "plate": h = 0.99 h_isolated at the same wall temperature (root found with brentq).
    """
    c1, c2 = BAR_COHEN_ROHSENOW[case]
    if optimum == "array":
        if case not in FLUX_CASES:
            return (2.0 * c1 / c2) ** (2.0 / 3.0)
        el_star = (5.0 * c1 / (4.0 * c2)) ** (5.0 / 3.0)
        return float(el_star / _composite(el_star, case))
    if case not in FLUX_CASES:
        return (c1 / c2 / (PLATE_OPTIMUM_FRACTION ** -2 - 1.0)) ** (2.0 / 3.0)
    # Isolated flux plate at a fixed top temperature: Nu = (El Nu)^(1/5)/sqrt(C2) -> El^(1/4) C2^(-5/8)
    log_el = brentq(lambda x: _flux_nu_at_el(np.exp(x), case)
                    - PLATE_OPTIMUM_FRACTION * np.exp(x) ** 0.25 * c2 ** -0.625, 0.0, 30.0, xtol=1e-13)
    return float(np.exp(log_el))


def channel_spacing(ts: ArrayLike, tf: ArrayLike, height: ArrayLike, case: str = "isothermal",
                    optimum: str = "array", gas: str = "air",
                    pressure: ArrayLike = DEFAULT_PRESSURE) -> float | np.ndarray:
    """Optimum spacing of vertical parallel plates (Bar-Cohen and Rohsenow composite).

    Parameters
    ----------
    ts : float or array
        Wall temperature in °C (flux cases: the allowed top-of-channel wall temperature).
    tf : float or array
        Ambient air temperature in °C.
    height : float or array
        Plate height L in m (> 0).
    case : str
        As for :func:`h_channel`.
    optimum : str
        "array" (default): the spacing that rejects the most heat from a fixed width of thin
        plates (maximum of h/S); "plate": the spacing where h reaches 99 % of the isolated-plate
        value (wider gaps gain less than 1 %).
    gas : str, default "air"
        Gas name or mixture such as "argon:0.9, air:0.1" (mole fractions).
    pressure : float or array, default 101325
        Absolute pressure in Pa; properties at the film temperature (ts + tf)/2.

    Returns
    -------
    float or array
        Spacing in m: S = (El_opt / P)^(1/4), P = g beta |ts - tf| / (nu alpha L).

    Notes
    -----
    Isothermal, "array": S_opt = 2.714 (Ra_S/(S^3 L))^(-1/4); isothermal-adiabatic 2.154
    (Bar-Cohen and Rohsenow, J. Heat Transfer 106 (1984) 116-123; Incropera et al., 6th ed.,
    Table 9.3).  Flux cases: most heat from a fixed width at a fixed top wall temperature,
    derived from the same composite (see :func:`optimum_elenbaas`).  Thin plates: with plates of
    thickness t the pitch is S + t; for fins see :func:`heatsink`.

    Examples
    --------
    >>> round(channel_spacing(80.0, 30.0, 0.18) * 1000, 2)   # mm
    7.5
    """
    function_name = "channel_spacing"
    case = require_choice(function_name, "case", case, CHANNEL_CASES)
    optimum = require_choice(function_name, "optimum", optimum, CHANNEL_OPTIMA)
    height = require_positive(function_name, "height", height, "m")
    props, _, beta = film_properties(ts, tf, gas, pressure, function_name=function_name)
    delta_t = np.abs(np.subtract(ts, tf, dtype=float))
    if np.any(delta_t == 0):
        raise InputError(function_name, "ts", ts, "different from tf (no buoyancy, no optimum)")
    drive = STANDARD_GRAVITY * beta * delta_t / (props.kinvisc * props.diffusivity * height)
    return unwrap((optimum_elenbaas(case, optimum) / drive) ** 0.25)


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


def _fin_efficiency(h, conductivity, thickness, length, fin_height, tip):
    """tanh(m Lc)/(m Lc) of a straight rectangular fin, m = sqrt(h P/(k A_c)), P = 2(L + t),
    A_c = L t; Lc = H + t/2 ("corrected": the tip's convection folded into the length) or H."""
    m = np.sqrt(h * 2.0 * (length + thickness) / (conductivity * length * thickness))
    lc = fin_height + (thickness / 2.0 if tip == "corrected" else 0.0)
    mlc = m * lc
    with np.errstate(invalid="ignore", divide="ignore"):
        eta = np.where(mlc > 0, np.tanh(mlc) / np.where(mlc > 0, mlc, 1.0), 1.0)
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
    t_base = require_finite(function_name, "t_base", t_base)
    t_ambient = require_finite(function_name, "t_ambient", t_ambient)
    width = require_positive(function_name, "base_width", base_width, "m")
    fin_height = require_positive(function_name, "fin_height", fin_height, "m")
    length = require_positive(function_name, "fin_length", fin_length, "m")
    thickness = require_positive(function_name, "fin_thickness", fin_thickness, "m")
    count = require_finite(function_name, "fin_count", fin_count)
    bad = (count < 2) | (count != np.floor(count))
    if np.any(bad):
        raise InputError(function_name, "fin_count", count[bad].flat[0] if count.ndim else count.item(),
                         "a whole number >= 2")
    conductivity = require_positive(function_name, "conductivity", conductivity, "W/(m·K)")
    emissivity = require_between(function_name, "emissivity", emissivity, 0.0, 1.0)
    spacing = (width - count * thickness) / (count - 1.0)
    if np.any(spacing <= 0):
        bad = np.broadcast_to(count, spacing.shape)[spacing <= 0].flat[0] if spacing.ndim else count.item()
        raise InputError(function_name, "fin_count", bad,
                         "small enough that the fins fit on the base (fin_count × fin_thickness < base_width)")

    channel = channel_convection(t_base, t_ambient, spacing, length, case="isothermal", gas=gas,
                                 pressure=pressure, function_name=function_name)
    outer = surface_convection("vplate", t_base, t_ambient, length, gas=gas, pressure=pressure,
                               function_name=function_name)
    excess = np.subtract(t_base, t_ambient, dtype=float)
    h_in, h_out = channel.h, outer.h
    h_outer_fin = 0.5 * (h_in + h_out)
    eta_in, lc = _fin_efficiency(h_in, conductivity, thickness, length, fin_height, tip)
    eta_out, _ = _fin_efficiency(h_outer_fin, conductivity, thickness, length, fin_height, tip)
    fin_area = 2.0 * (length + thickness) * lc
    q_fins = ((count - 2.0) * eta_in * h_in + 2.0 * eta_out * h_outer_fin) * fin_area * excess
    q_base = (count - 1.0) * spacing * length * h_in * excess

    opening = spacing * length + 2.0 * spacing * fin_height
    walls = (2.0 * fin_height + spacing) * length
    with np.errstate(invalid="ignore", divide="ignore"):
        eps_a = np.where(emissivity > 0, emissivity / (emissivity + (1.0 - emissivity) * opening / walls), 0.0)
    grey_area = emissivity * (count * thickness * length + 2.0 * fin_height * length)
    t_b, t_a = t_base + zero_Celsius, t_ambient + zero_Celsius
    q_radiation = SIGMA * (grey_area + eps_a * (count - 1.0) * opening) * (t_b ** 4 - t_a ** 4)

    q = q_fins + q_base + q_radiation
    shape = np.shape(q)
    in_range = np.broadcast_to(channel.in_range & outer.in_range, shape)
    note = np.broadcast_to(np.where(channel.note != "", channel.note, outer.note), shape)
    full = lambda a: np.broadcast_to(a, shape)  # noqa: E731
    return HeatSinkResult(q=q, q_fins=full(q_fins), q_base=full(q_base), q_radiation=full(q_radiation),
                          spacing=full(spacing), h_channel=full(h_in), h_outer=full(h_out),
                          fin_efficiency=full(eta_in), outer_fin_efficiency=full(eta_out),
                          emissivity_effective=full(eps_a), in_range=in_range, note=note)


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
    t_ambient = require_finite(function_name, "t_ambient", t_ambient)
    # Check the geometry once, in full, so its messages name this function (and before the
    # arrays below, whose float conversion would otherwise meet a bad cell first).
    heatsink(t_ambient + 1.0, t_ambient, base_width, fin_height, fin_length, fin_thickness, fin_count,
             conductivity, emissivity, gas, pressure, tip=tip, function_name=function_name)
    arrays = np.broadcast_arrays(q, t_ambient, *[np.asarray(a, dtype=float) for a in (
        base_width, fin_height, fin_length, fin_thickness, fin_count, conductivity, emissivity, pressure)])
    out = np.empty(arrays[0].shape)
    notes = np.full(arrays[0].shape, "", dtype=object)
    for index in np.ndindex(out.shape):
        q_i, ta, *rest = (float(a[index]) for a in arrays)
        *geometry, p = rest

        def rejected(t_base):
            # the seven geometry arguments, which a type checker cannot count in *geometry
            return heatsink(t_base, ta, *geometry, gas, p, tip=tip, function_name=function_name)  # type: ignore[misc, arg-type]

        def excess_heat(t_base):
            return float(rejected(t_base).q) - q_i

        if q_i == 0.0:
            out[index] = ta
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
        # a scalar solve carries its note as a 0-d array; the notes array holds plain text
        notes[index] = str(np.asarray(rejected(out[index]).note).item())
    warn_out_of_range(function_name, notes == "", notes)
    return unwrap(out)


# Parameters the channel functions share; their docstrings list them from one place.
_CHANNEL_WALLS = """    ts : float or array
        Wall temperature in °C; for the flux cases the wall temperature at the top of the
        channel (the maximum).
    tf : float or array
        Temperature of the still air around the channel (entering at the bottom) in °C.
    spacing : float or array
        Gap S between the plates in m (> 0).
    height : float or array
        Plate height L in m along the flow (> 0)."""
for _function in (channel_convection, h_channel):
    shared_docs(_function, {"channel_walls": _CHANNEL_WALLS})

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
del _function, _sink_function
