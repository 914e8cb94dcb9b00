"""Humid air: saturation vapour pressure over water and over ice, humidity ratio, dew and frost
point, the relative humidity at a colder or warmer surface, and the surface temperature factor.

The relations are those of the ASHRAE Handbook -- Fundamentals (2017), ch. 1 (perfect-gas
relations for moist air):

* saturation pressure p_ws(T): the Hyland-Wexler (1983) formulas, over ice below the triple
  point of water and over liquid water above it (:data:`SATURATION_FORMULAS`);
* vapour pressure p_w = RH p_ws(t): relative humidity is a fraction 0-1, relative to
  saturation at the air's own temperature -- over ice below the triple point (0.01 °C), over
  water above it, as the ASHRAE chapter, ISO 13788 and CoolProp's humid-air functions define it;
* humidity ratio W = 0.621945 p_w / (p - p_w) (ASHRAE 2017 ch. 1 eq. 20; 0.621945 is the ratio
  of the molar masses of water and dry air);
* dew point: the temperature at which p_ws equals p_w (below 0.01 °C this is the frost point,
  saturation over ice, where frost rather than dew forms).

Two models, chosen by the ``model`` argument of the functions of a humid mixture:

* ``"ideal"`` (the default): the perfect-gas relations above, as the ASHRAE chapter gives them
  for engineering use ("perfect gas relations can be substituted in most air-conditioning
  problems"; errors under 0.7 % in the humidity ratio of saturated air at atmospheric pressure
  from -50 to 50 °C, Kuehn et al. 1998, as cited there), the same as psychrolib.  In it the dew
  point and the surface relative humidity at a given RH do not depend on the total pressure;
  the pressure argument checks that the vapour pressure stays below it.
* ``"enhanced"``: the saturated vapour content of air is that of pure water vapour times the
  enhancement factor f(p, T) (1.004 at 20 °C, 1.006 at 70 °C, at atmospheric pressure), by
  Greenspan's (1976) equation with Hardy's (1998) ITS-90 coefficients
  (:data:`ENHANCEMENT_FORMULAS`); RH is then the mole fraction of vapour over its saturation
  value, x_w / (f p_ws / p), as in real-gas formulations (CoolProp's HAPropsSI).  It raises W
  by 0.4-1.1 % and moves the dew point at a given RH by at most 0.07 K from the ideal model
  over -40..+80 °C, 5-100 % RH, 1-200 kPa (0.033 K at atmospheric pressure; the most near
  the boiling point at low pressure; measured, tests/test_humid.py).

The ideal model is the default because it is the engineering convention of the ASHRAE chapter,
the results of the two models differ by far less than the uncertainty of any RH a designer knows
(a tolerance of 2 % RH is 0.6 K of dew point at 20 °C, 50 % RH), and the templates' dew points
stay the same.  ISO 13788's calculations use a saturation-pressure formula without an
enhancement factor too (from memory, not read).

Temperatures are in °C at the interface and kelvin inside.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.polynomial import polynomial

from ._typing import ArrayLike, FloatOrArray
from .constants import ZERO_CELSIUS
from .gases import GAS_PRESSURE_RANGE
from .groups import DEFAULT_PRESSURE
from .validity import (ABSOLUTE_ZERO_C, InputError, Range, format_value, require_between, require_choice,
                       require_finite, unwrap, warn_out_of_range)

__all__ = [
    "SaturationFormula",
    "SATURATION_FORMULAS",
    "EnhancementFormula",
    "ENHANCEMENT_FORMULAS",
    "HUMID_MODELS",
    "TRIPLE_POINT_C",
    "MOLAR_MASS_RATIO",
    "saturation_pressure",
    "vapour_pressure",
    "humidity_ratio",
    "dew_point",
    "surface_rh",
    "temperature_factor",
]

#: The triple point of water, 273.16 K, in °C: below it saturation is over ice, above it over
#: liquid water.  The two Hyland-Wexler formulas meet there (611.657 Pa both; at 0 °C they are
#: 0.06 Pa apart), so switching at the triple point keeps p_ws continuous.
TRIPLE_POINT_C = 0.01

#: Molar mass of water over that of dry air, 18.015268/28.966 (ASHRAE 2017 ch. 1 eq. 20).
MOLAR_MASS_RATIO = 0.621945

_SOURCE = ("Hyland, R.W., Wexler, A., Formulations for the thermodynamic properties of the saturated "
           "phases of H2O from 173.15 K to 473.15 K, ASHRAE Trans. 89(2A) (1983) 500-519; ASHRAE "
           "Handbook - Fundamentals (2017) ch. 1 eq. {equation}")


@dataclass(frozen=True)
class SaturationFormula:
    """One saturation-pressure formula, ln p_ws = C1/T + C2 + C3 T + C4 T^2 + C5 T^3 + C6 T^4
    + C7 ln T (p_ws in Pa, T in K), with its phase, validity and source."""

    phase: str                      # "water" or "ice": the condensed phase in equilibrium
    coefficients: tuple[float, ...]  # C1..C7
    validity: Range                 # in °C
    source: str

    def log_pressure(self, t_kelvin):
        c1, c2, c3, c4, c5, c6, c7 = self.coefficients
        t = t_kelvin
        return c1 / t + c2 + t * (c3 + t * (c4 + t * (c5 + t * c6))) + c7 * np.log(t)

    def log_slope(self, t_kelvin):
        """d(ln p_ws)/dT in 1/K (for the dew-point inversion)."""
        c1, _, c3, c4, c5, c6, c7 = self.coefficients
        t = t_kelvin
        return -c1 / t**2 + c3 + t * (2 * c4 + t * (3 * c5 + t * 4 * c6)) + c7 / t

    @property
    def equation(self) -> str:
        return ("ln p_ws = C1/T + C2 + C3 T + C4 T^2 + C5 T^3 + C6 T^4 + C7 ln T, with C1..C7 = "
                + ", ".join(f"{c:.8g}" for c in self.coefficients))


# The coefficients (8 significant figures) as printed in the ASHRAE Handbook - Fundamentals
# (2017) ch. 1 eqs. 5 and 6, read in the source of psychrolib 2.5.0, which cites those
# equations; checked against the Dortmund Data Bank's page of the ice formula (Hyland and Wexler
# 1983 eq. 18, 7 figures, valid 173.16-273.16 K) and a Vaisala humidity-instrument manual (the
# water formula, the same 8 figures).  Validity ranges: the ASHRAE chapter's -100..0 °C over ice
# and 0..200 °C over water, the ice range taken to the triple point where the two meet.
SATURATION_FORMULAS = {
    "ice": SaturationFormula(
        "ice", (-5.6745359e3, 6.3925247, -9.677843e-3, 6.2215701e-7, 2.0747825e-9, -9.484024e-13, 4.1635019),
        Range("t", -100.0, TRIPLE_POINT_C), _SOURCE.format(equation=5)),
    "water": SaturationFormula(
        "water", (-5.8002206e3, 1.3914993, -4.8640239e-2, 4.1764768e-5, -1.4452093e-8, 0.0, 6.5459673),
        Range("t", 0.0, 200.0), _SOURCE.format(equation=6)),
}

_OVER = ("auto", "water", "ice")


@dataclass(frozen=True)
class EnhancementFormula:
    """Greenspan's enhancement factor of water vapour in air over one condensed phase:
    ln f = alpha (1 - p_ws/p) + beta (p/p_ws - 1), alpha = A0 + A1 T + A2 T^2 + A3 T^3,
    ln beta = B0 + B1 T + B2 T^2 + B3 T^3 (T in K, p_ws and p in the same unit)."""

    phase: str                  # "water" or "ice", as the saturation formula it multiplies
    alpha: tuple[float, ...]    # A0..A3
    log_beta: tuple[float, ...]  # B0..B3
    validity: Range             # in °C
    source: str

    def log_factor(self, t_kelvin, saturation, pressure):
        """ln f at ``t_kelvin`` where the saturation pressure is ``saturation`` (Pa), at the
        total pressure ``pressure`` (Pa).  Where water boils (saturation >= pressure) no air can
        be saturated and f is taken as 1, which the form itself gives at saturation = pressure
        (past it the beta term would fall steeply below 1)."""
        alpha = polynomial.polyval(t_kelvin, self.alpha)
        beta = np.exp(polynomial.polyval(t_kelvin, self.log_beta))
        log_f = alpha * (1.0 - saturation / pressure) + beta * (pressure / saturation - 1.0)
        return np.where(saturation < pressure, log_f, 0.0)

    @property
    def equation(self) -> str:
        return ("ln f = alpha (1 - p_ws/p) + beta (p/p_ws - 1), alpha = sum A_i T^i, ln beta = sum B_i T^i, "
                "with A0..A3 = " + ", ".join(f"{c:.8g}" for c in self.alpha)
                + " and B0..B3 = " + ", ".join(f"{c:.8g}" for c in self.log_beta))


_ENHANCEMENT_SOURCE = ("Greenspan, L., Functional equations for the enhancement factors for CO2-free moist air, "
                       "J. Res. NBS 80A (1976) 41-44 (the form); Hardy, B., ITS-90 formulations for vapor "
                       "pressure, frostpoint temperature, dewpoint temperature, and enhancement factors in the "
                       "range -100 to +100 C, Proc. 3rd Int. Symp. on Humidity and Moisture, Teddington (1998) "
                       "(the coefficients, ITS-90, T in K, over {phase} {low} to {high} °C)")

# Hardy's coefficients as transcribed in three independent public programs that cite his paper
# (the paper itself not read; the journal details of Greenspan's paper are from memory).  The
# ranges are Hardy's: over ice -100..0 °C (taken to the triple point, where "auto" switches),
# over water 0..100 °C.  Checked: with them the dew point agrees with CoolProp's HAPropsSI
# (Hyland-Wexler virial formulation) to 0.006 K over -40..+80 °C, 1-200 kPa (tests/test_humid.py).
ENHANCEMENT_FORMULAS = {
    "ice": EnhancementFormula(
        "ice", (-6.0190570e-2, 7.3984060e-4, -3.0897838e-6, 4.3669918e-9),
        (-9.4868712e1, 7.2392075e-1, -2.1963437e-3, 2.4668279e-6),
        Range("t", -100.0, TRIPLE_POINT_C), _ENHANCEMENT_SOURCE.format(phase="ice", low=-100, high=0)),
    "water": EnhancementFormula(
        "water", (-1.6302041e-1, 1.8071570e-3, -6.7703064e-6, 8.5813609e-9),
        (-5.9890467e1, 3.4378043e-1, -7.7326396e-4, 6.3405286e-7),
        Range("t", 0.0, 100.0), _ENHANCEMENT_SOURCE.format(phase="water", low=0, high=100)),
}

#: The humid-air models: "ideal" (perfect-gas relations, no enhancement factor) and "enhanced".
HUMID_MODELS = ("ideal", "enhanced")


# ---------------------------------------------------------------------------------------------
# Argument checks


def _temperature(function: str, argument: str, value) -> np.ndarray:
    t = require_finite(function, argument, value)
    bad = ~(t > ABSOLUTE_ZERO_C)
    if np.any(bad):
        raise InputError(function, argument, t[bad].flat[0] if t.ndim else t.item(), "above -273.15 °C")
    return t


def _relative_humidity(function: str, value, *, positive: bool = False) -> np.ndarray:
    """RH as a fraction; a percentage typed as a number is the usual slip, so its message says so."""
    rh = require_finite(function, "rh", value)
    high = rh > 1.0
    if np.any(high):
        got = float(rh[high].flat[0]) if rh.ndim else float(rh)
        raise InputError(function, "rh", got,
                         f"a fraction from 0 to 1 ({format_value(got)} reads as {100 * got:,.6g} %; "
                         f"for {format_value(got)} % enter {format_value(got / 100)})")
    if positive:
        return require_between(function, "rh", rh, 0.0, 1.0, low_open=True)
    return require_between(function, "rh", rh, 0.0, 1.0)


def _pressure(function: str, value) -> np.ndarray:
    return require_between(function, "pressure", value, GAS_PRESSURE_RANGE.low, GAS_PRESSURE_RANGE.high, "Pa")


def _phases(t: np.ndarray, over: str):
    """(phase, where) pairs: which condensed phase each temperature is saturated over."""
    if over == "auto":
        ice = t < TRIPLE_POINT_C
        return [("ice", ice), ("water", ~ice)]
    return [(over, np.ones(np.shape(t), dtype=bool))]


def _warn_outside(function: str, formula, name: str, where: np.ndarray, t: np.ndarray, argument: str) -> None:
    """A CorrelationRangeWarning where ``t`` uses ``formula`` outside its validity."""
    inside = formula.validity.inside({"t": t}) | ~where
    notes = [f"{argument} = {format_value(t[~inside].flat[0] if t.ndim else t.item())} °C is outside "
             f"the {name} over {formula.phase} "
             f"({format_value(formula.validity.low)} to {format_value(formula.validity.high)} °C)"] \
        if not np.all(inside) else []
    warn_out_of_range(function, inside, notes)


def _saturation(function: str, t: np.ndarray, over: str, argument: str = "t") -> np.ndarray:
    """p_ws in Pa at ``t`` (°C, checked); a temperature outside the formula's range warns."""
    t_kelvin = t + ZERO_CELSIUS
    log_p = np.zeros(np.shape(t))
    for phase, where in _phases(t, over):
        formula = SATURATION_FORMULAS[phase]
        log_p = np.where(where, formula.log_pressure(t_kelvin), log_p)
        _warn_outside(function, formula, "Hyland-Wexler formula", where, t, argument)
    return np.exp(log_p)


def _enhancement(function: str, t: np.ndarray, saturated: np.ndarray, p, argument: str = "t") -> np.ndarray:
    """The enhancement factor f(p, t) over the phase "auto" takes; outside the formula's
    temperature range, or where water boils at ``p`` (p_ws >= p), it warns."""
    t_kelvin = t + ZERO_CELSIUS
    log_f = np.zeros(np.broadcast_shapes(np.shape(t), np.shape(p)))
    for phase, where in _phases(t, "auto"):
        formula = ENHANCEMENT_FORMULAS[phase]
        log_f = np.where(where, formula.log_factor(t_kelvin, saturated, p), log_f)
        _warn_outside(function, formula, "enhancement factor (Greenspan, Hardy)", where, t, argument)
    below_boiling = np.broadcast_to(saturated < p, np.shape(log_f))
    notes = [f"at {argument} = {format_value(np.broadcast_to(t, log_f.shape)[~below_boiling].flat[0])} °C "
             f"water boils at the pressure {format_value(np.broadcast_to(p, log_f.shape)[~below_boiling].flat[0])} "
             f"Pa: the enhancement factor is taken as 1 there"] if not np.all(below_boiling) else []
    warn_out_of_range(function, below_boiling, notes)
    return np.exp(log_f)


def _saturated_vapour(function: str, t: np.ndarray, p, model: str, argument: str = "t") -> np.ndarray:
    """The vapour pressure of saturated humid air at ``t`` (Pa): p_ws over the phase "auto"
    takes, times the enhancement factor in the enhanced model."""
    saturated = _saturation(function, t, "auto", argument)
    if model == "enhanced":
        return saturated * _enhancement(function, t, saturated, p, argument)
    return saturated


def _vapour(function: str, t, rh, pressure, model: str, t_name: str = "t"):
    """(t, p_w, p) checked: the vapour pressure must stay below the total pressure."""
    t = _temperature(function, t_name, t)
    p = _pressure(function, pressure)
    saturated = _saturated_vapour(function, t, p, model, t_name)
    p_w, p = np.broadcast_arrays(rh * saturated, p)
    too_high = p_w >= p
    if np.any(too_high):
        first = np.unravel_index(int(np.argmax(too_high)), too_high.shape)
        t_bad, rh_bad, p_bad, saturated_bad = (float(np.broadcast_to(a, too_high.shape)[first])
                                               for a in (t, rh, p, saturated))
        raise InputError(function, "rh", rh_bad,
                         f"low enough that the vapour pressure rh x p_ws({t_name}) stays below the pressure "
                         f"{format_value(p_bad)} Pa (p_ws({format_value(t_bad)} °C) = "
                         f"{format_value(saturated_bad)} Pa: at this pressure water boils below that temperature)")
    return t, unwrap(p_w), unwrap(p)


def _model(function: str, model) -> str:
    return require_choice(function, "model", model, HUMID_MODELS)


# ---------------------------------------------------------------------------------------------
# Public functions


def saturation_pressure(t: ArrayLike, over: str = "auto") -> FloatOrArray:
    """Saturation pressure of water vapour over liquid water or over ice.

    Parameters
    ----------
    t : array_like
        Temperature in °C, above -273.15; the formulas hold from -100 to 0.01 °C over ice and
        0 to 200 °C over water (outside, the value is extrapolated and a
        :class:`~stillair.CorrelationRangeWarning` says so).
    over : {"auto", "water", "ice"}, default "auto"
        The condensed phase: "auto" takes ice below the triple point (0.01 °C) and water above
        it; "water" below 0 °C gives supercooled water's (higher) pressure.

    Returns
    -------
    float or numpy.ndarray
        p_ws in Pa, of the shape of ``t``.

    Raises
    ------
    InputError
        A temperature that is not finite or not above absolute zero, an unknown ``over``.

    Notes
    -----
    Hyland and Wexler's formulas, T in K:

        ln p_ws = C1/T + C2 + C3 T + C4 T^2 + C5 T^3 + C6 T^4 + C7 ln T

    with the coefficients of :data:`SATURATION_FORMULAS` (C6 = 0 over water).  They meet at
    the triple point (611.657 Pa).

    References
    ----------
    Hyland, R.W., Wexler, A., Formulations for the thermodynamic properties of the saturated
    phases of H2O from 173.15 K to 473.15 K, ASHRAE Trans. 89(2A) (1983) 500-519; ASHRAE
    Handbook - Fundamentals (2017) ch. 1 eqs. 5 (ice) and 6 (water).

    Examples
    --------
    >>> round(saturation_pressure(20.0), 1)
    2338.8
    >>> round(saturation_pressure(-10.0), 1)                  # over ice
    259.9
    """
    t = _temperature("saturation_pressure", "t", t)
    over = require_choice("saturation_pressure", "over", over, _OVER)
    return unwrap(_saturation("saturation_pressure", t, over))


def vapour_pressure(t: ArrayLike, rh: ArrayLike, pressure: ArrayLike = DEFAULT_PRESSURE,
                    model: str = "ideal") -> FloatOrArray:
    """Partial pressure of the water vapour in humid air, p_w = rh p_ws(t) (times f(p, t) in the
    enhanced model).

    Parameters
    ----------
    t : array_like
        Air temperature in °C.
    rh : array_like
        Relative humidity, a fraction 0-1 (over ice below 0.01 °C, over water above).
    pressure : array_like, default 101325
        Total (absolute) pressure in Pa, 1e3 to 2e5; p_w must stay below it.
    model : {"ideal", "enhanced"}, default "ideal"
        "ideal": perfect-gas relations (ASHRAE Fundamentals ch. 1, as psychrolib); "enhanced":
        with the enhancement factor f(p, T) of Greenspan and Hardy (as real-gas formulations
        such as CoolProp's HAPropsSI).  See the module notes for how far they differ.

    Returns
    -------
    float or numpy.ndarray
        p_w in Pa, of the broadcast shape.

    Raises
    ------
    InputError
        An RH outside 0-1 (a percentage typed as a number is named), a temperature not above
        absolute zero, a pressure outside its range, a vapour pressure reaching the pressure,
        an unknown ``model``.

    Notes
    -----
    Perfect-gas relation of the ASHRAE chapter (eq. 24, RH = p_w / p_ws; enhanced: p_w = rh f p_ws); p_ws from
    :func:`saturation_pressure` with ``over="auto"``.  Moisture sealed into an enclosure at
    constant total pressure keeps its p_w (and humidity ratio) whatever its temperature, so this
    is also the vapour pressure of a sealed cabinet's air at any later temperature (until
    condensation removes water).

    References
    ----------
    ASHRAE Handbook - Fundamentals (2017) ch. 1 eq. 24.

    Examples
    --------
    >>> round(vapour_pressure(20.0, 0.5), 1)
    1169.4
    """
    rh = _relative_humidity("vapour_pressure", rh)
    _, p_w, _ = _vapour("vapour_pressure", t, rh, pressure, _model("vapour_pressure", model))
    return unwrap(p_w)


def humidity_ratio(t: ArrayLike, rh: ArrayLike, pressure: ArrayLike = DEFAULT_PRESSURE,
                   model: str = "ideal") -> FloatOrArray:
    """Humidity ratio (mixing ratio): kg of water vapour per kg of dry air.

    Parameters
    ----------
    t : array_like
        Air temperature in °C.
    rh : array_like
        Relative humidity, a fraction 0-1 (over ice below 0.01 °C, over water above).
    pressure : array_like, default 101325
        Total (absolute) pressure in Pa, 1e3 to 2e5.
    model : {"ideal", "enhanced"}, default "ideal"
        "ideal": perfect-gas relations (ASHRAE Fundamentals ch. 1, as psychrolib); "enhanced":
        with the enhancement factor f(p, T) of Greenspan and Hardy (as real-gas formulations
        such as CoolProp's HAPropsSI).  See the module notes for how far they differ.

    Returns
    -------
    float or numpy.ndarray
        W in kg/kg, of the broadcast shape.

    Raises
    ------
    InputError
        As :func:`vapour_pressure`.

    Notes
    -----
    W = 0.621945 p_w / (p - p_w), p_w = rh p_ws(t) (ideal model) or rh f p_ws(t) (enhanced
    model: W larger by 0.4-1.1 % from -40 to +80 °C at atmospheric pressure).

    References
    ----------
    ASHRAE Handbook - Fundamentals (2017) ch. 1 eqs. 20 and 24.

    Examples
    --------
    >>> round(humidity_ratio(20.0, 0.5), 6)
    0.007262
    """
    rh = _relative_humidity("humidity_ratio", rh)
    _, p_w, p = _vapour("humidity_ratio", t, rh, pressure, _model("humidity_ratio", model))
    return unwrap(MOLAR_MASS_RATIO * p_w / (p - p_w))


def _dew_point_of(function: str, p_w, t_start, pressure, model: str) -> np.ndarray:
    """The temperature (°C) at which saturated humid air (p_ws over="auto", times f(p, T) in the
    enhanced model) has the vapour pressure ``p_w``.

    Newton's method (scipy.optimize.newton, element by element on arrays) on ln p_ws as a
    function of 1/T, in which it is nearly a straight line (Clausius-Clapeyron), so two or three
    steps converge from the air temperature whatever the humidity.  The slope leaves out ln f,
    which changes a thousand times more slowly than ln p_ws: the residual is exact, so the root
    is, and each step still gains three digits."""
    from scipy import optimize  # here, not at import: scipy.optimize costs 0.4 s of start-up

    ice, water = SATURATION_FORMULAS["ice"], SATURATION_FORMULAS["water"]
    triple_inverse = 1.0 / (TRIPLE_POINT_C + ZERO_CELSIUS)
    target = np.log(p_w)

    def residual(u):
        t_kelvin = 1.0 / u
        on_ice = u > triple_inverse
        log_p = np.where(on_ice, ice.log_pressure(t_kelvin), water.log_pressure(t_kelvin))
        if model == "enhanced":
            saturated = np.exp(log_p)
            log_p = log_p + np.where(on_ice, ENHANCEMENT_FORMULAS["ice"].log_factor(t_kelvin, saturated, pressure),
                                     ENHANCEMENT_FORMULAS["water"].log_factor(t_kelvin, saturated, pressure))
        return log_p - target

    def slope(u):
        t_kelvin = 1.0 / u
        on_ice = u > triple_inverse
        return -t_kelvin**2 * np.where(on_ice, ice.log_slope(t_kelvin), water.log_slope(t_kelvin))

    start = 1.0 / (np.broadcast_to(t_start, np.shape(target)) + ZERO_CELSIUS)
    inverse = optimize.newton(residual, start, fprime=slope, tol=1e-15, maxiter=50)
    t_dew = 1.0 / np.asarray(inverse) - ZERO_CELSIUS
    inside = (t_dew >= ice.validity.low) & (t_dew <= water.validity.high)
    notes = [f"the dew point {format_value(t_dew[~inside].flat[0] if t_dew.ndim else t_dew.item())} °C is "
             f"outside the saturation formulas' range ({format_value(ice.validity.low)} to "
             f"{format_value(water.validity.high)} °C)"] if not np.all(inside) else []
    warn_out_of_range(function, inside, notes)
    return t_dew


def dew_point(t: ArrayLike, rh: ArrayLike, pressure: ArrayLike = DEFAULT_PRESSURE,
              model: str = "ideal") -> FloatOrArray:
    """Dew point of humid air; below 0.01 °C the frost point (saturation over ice).

    Parameters
    ----------
    t : array_like
        Air temperature in °C.
    rh : array_like
        Relative humidity, a fraction above 0 and at most 1 (over ice below 0.01 °C, over
        water above).
    pressure : array_like, default 101325
        Total (absolute) pressure in Pa, 1e3 to 2e5; in the ideal model it does not change the
        result, in the enhanced one slightly; the vapour pressure must stay below it.
    model : {"ideal", "enhanced"}, default "ideal"
        "ideal": perfect-gas relations (ASHRAE Fundamentals ch. 1, as psychrolib); "enhanced":
        with the enhancement factor f(p, T) of Greenspan and Hardy (as real-gas formulations
        such as CoolProp's HAPropsSI).  See the module notes for how far they differ.

    Returns
    -------
    float or numpy.ndarray
        The dew point in °C (the frost point where it is below 0.01 °C), of the broadcast
        shape; never above ``t``.

    Raises
    ------
    InputError
        An RH of 0 or outside 0-1, a temperature not above absolute zero, a pressure outside
        its range, a vapour pressure reaching the pressure.

    Notes
    -----
    The temperature at which the saturation pressure (:func:`saturation_pressure`,
    ``over="auto"``) equals the vapour pressure p_w = rh p_ws(t), found by Newton's method on
    ln p_ws (to 1e-10 K); in the enhanced model f(p, T) p_ws(T) equals p_w = rh f(p, t) p_ws(t).
    The two models differ by at most 0.07 K over -40..+80 °C, 5-100 % RH, 1-200 kPa; the
    enhanced one agrees with CoolProp's HAPropsSI to 0.006 K, the ideal one with psychrolib to
    1e-8 K.  A surface colder than this collects dew, or frost where the value is
    below 0.01 °C.  Moisture sealed into an enclosure at constant total pressure keeps this dew
    point at any later temperature (see :func:`vapour_pressure`).

    References
    ----------
    ASHRAE Handbook - Fundamentals (2017) ch. 1 (dew-point temperature: saturation at the
    vapour pressure, eqs. 5, 6 and 24).

    Examples
    --------
    >>> round(dew_point(20.0, 0.5), 3)
    9.272
    >>> round(dew_point(-5.0, 0.8), 3)      # a frost point
    -7.585
    """
    rh = _relative_humidity("dew_point", rh, positive=True)
    model = _model("dew_point", model)
    t, p_w, p = _vapour("dew_point", t, rh, pressure, model)
    return unwrap(np.minimum(_dew_point_of("dew_point", p_w, t, p, model), t))


def surface_rh(t_air: ArrayLike, rh: ArrayLike, t_surface: ArrayLike,
               pressure: ArrayLike = DEFAULT_PRESSURE, model: str = "ideal") -> FloatOrArray:
    """Relative humidity of the air touching a colder or warmer surface.

    Parameters
    ----------
    t_air : array_like
        Air temperature in °C.
    rh : array_like
        Relative humidity of the air, a fraction 0-1.
    t_surface : array_like
        Surface temperature in °C.
    pressure : array_like, default 101325
        Total (absolute) pressure in Pa, 1e3 to 2e5 (in the ideal model it does not change the
        result, in the enhanced one slightly).
    model : {"ideal", "enhanced"}, default "ideal"
        "ideal": perfect-gas relations (ASHRAE Fundamentals ch. 1, as psychrolib); "enhanced":
        with the enhancement factor f(p, T) of Greenspan and Hardy (as real-gas formulations
        such as CoolProp's HAPropsSI).  See the module notes for how far they differ.

    Returns
    -------
    float or numpy.ndarray
        p_w / p_ws(t_surface) (enhanced: over f p_ws), a fraction, of the broadcast shape.  Above 1 the surface is below
        the dew point (frost point below 0.01 °C) and water condenses on it; the value is not
        capped so that the shortfall shows.

    Raises
    ------
    InputError
        As :func:`vapour_pressure`, and a surface temperature not above absolute zero.

    Notes
    -----
    The air keeps its vapour pressure p_w = rh p_ws(t_air) up to the surface, where it takes
    the surface's temperature.  ISO 13788 (2012) judges mould growth likely where this stays at
    0.8 or above for some time (from memory); condensation at 1.

    References
    ----------
    ASHRAE Handbook - Fundamentals (2017) ch. 1 eq. 24; ISO 13788:2012, clause 5 (surface
    relative humidity criteria, from memory).

    Examples
    --------
    >>> round(surface_rh(20.0, 0.5, 12.0), 4)
    0.8337
    """
    rh = _relative_humidity("surface_rh", rh)
    model = _model("surface_rh", model)
    _, p_w, p = _vapour("surface_rh", t_air, rh, pressure, model, "t_air")
    t_surface = _temperature("surface_rh", "t_surface", t_surface)
    return unwrap(p_w / _saturated_vapour("surface_rh", t_surface, p, model, "t_surface"))


def temperature_factor(t_surface: ArrayLike, t_inside: ArrayLike, t_outside: ArrayLike) -> FloatOrArray:
    """Temperature factor at the internal surface, f_Rsi of ISO 13788.

    Parameters
    ----------
    t_surface : array_like
        Internal surface temperature in °C (the lowest, at a thermal bridge, for the check).
    t_inside : array_like
        Internal air temperature in °C.
    t_outside : array_like
        External air temperature in °C, different from ``t_inside``.

    Returns
    -------
    float or numpy.ndarray
        f_Rsi = (t_surface - t_outside) / (t_inside - t_outside), dimensionless, of the
        broadcast shape: 1 for a surface at the inside temperature, 0 at the outside one.

    Raises
    ------
    InputError
        A value that is not finite, ``t_outside`` equal to ``t_inside``.

    Notes
    -----
    In a linear (constant-coefficient) model f_Rsi is a property of the construction, not of
    the weather; the check compares it with the minimum the climate and the indoor humidity
    require (ISO 13788's f_Rsi,min, set by local practice).  With temperature-dependent
    coefficients (natural convection, radiation) it changes somewhat with the temperatures.

    References
    ----------
    ISO 13788:2012, Hygrothermal performance of building components and building elements --
    Internal surface temperature to avoid critical surface humidity and interstitial
    condensation, clause 3 (definition of f_Rsi; the formula as read in public summaries of the
    standard).

    Examples
    --------
    >>> round(temperature_factor(15.0, 20.0, 0.0), 3)
    0.75
    """
    ts = require_finite("temperature_factor", "t_surface", t_surface)
    ti = require_finite("temperature_factor", "t_inside", t_inside)
    te = require_finite("temperature_factor", "t_outside", t_outside)
    ts, ti, te = np.broadcast_arrays(ts, ti, te)
    equal = ti == te
    if np.any(equal):
        raise InputError("temperature_factor", "t_outside", float(te[equal].flat[0]) if te.ndim else float(te),
                         "different from t_inside (the factor divides by t_inside - t_outside)")
    return unwrap((ts - te) / (ti - te))

