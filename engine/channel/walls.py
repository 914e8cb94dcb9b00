"""Open vertical channels: the geometry, its correlations (Elenbaas; Bar-Cohen and Rohsenow),
nu_channel, channel_convection and h_channel (method in the package docstring)."""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from ..convection import (ONE_CALLS, ConvectionResult, _full, _h_only, _plain_case, _scalar_groups, _scalar_result,
                          _with_slip, shape_ratios)
from ..correlations import (AutoStep, Geometry, Parameter, correlation, define_geometry,
                            nusselt_at_difference, nusselt_plain, nusselt_value)
from ..groups import DEFAULT_PRESSURE, buoyancy_groups, film_properties
from .._docs import shared_docs
from ..plausibility import length_slip, temperature_slip, warn_slips
from ..validity import Range, require_choice, require_length, require_positive

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
    result = _channel_convection(ts, tf, spacing, height, case, gas, pressure, method, property_temperature,
                                 ideal_expansion, function_name)
    slip = warn_slips(function_name, temperature_slip({"ts": ts, "tf": tf}), length_slip("spacing", spacing),
                      length_slip("height", height), stacklevel=4)
    return _with_slip(result, slip)


def _channel_convection(ts, tf, spacing, height, case, gas, pressure, method, property_temperature,
                        ideal_expansion, function_name) -> ConvectionResult:
    mixture = None if case in CHANNEL.flux_cases else \
        _plain_case(gas, pressure, (ts, tf), (spacing, height), property_temperature)
    if mixture is not None:
        # one isothermal case in plain numbers: the scalar path (the registry's, as the cavity's)
        props, t_film, _, _, gr, ra = _scalar_groups(ts, tf, spacing, mixture, pressure, ideal_expansion)
        parts = nusselt_plain(CHANNEL, method, case, function_name,
                              {"ra": ra, "pr": props.prandtl, **shape_ratios(CHANNEL, spacing, height=height)})
        return _scalar_result(props, t_film, gr, ra, spacing, parts, case)
    spacing = require_length(function_name, "spacing", spacing)
    height = require_length(function_name, "height", height)
    props, t_film, beta = film_properties(ts, tf, gas, pressure, names=("ts", "tf"),
                                          property_temperature=property_temperature,
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
del _function
