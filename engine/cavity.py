"""Enclosed cavities: natural convection across a closed rectangular gas layer.

A layer of gap L between two isothermal walls, height H along the walls (aspect A = H/L), the
other side walls adiabatic.  Ra = g beta (T1 - T2) L^3 / (nu alpha) is based on the gap, and so is
Nu = h L / k, the coefficient of q = h (T1 - T2) per unit wall area.  Nu = 1 is pure conduction
across the gap, the physical floor: every value below 1 a formula gives is raised to 1 (the
geometry's ``floor``); each correlation says below where its formula does that.

Tilt is the layer's angle from the HORIZONTAL: 0 = horizontal layer heated from below (the
Rayleigh-Benard layer), 90 = vertical layer (the default), 180 = horizontal layer heated from
above (stable, pure conduction).  Between 90 and 180 the hot wall is on top.

How the correlations fit together
---------------------------------
* Horizontal and tilted layers heated from below, 0 <= tilt <= 75 deg: ``hollands`` (Hollands et
  al. 1975 horizontal form, 1976 tilted form; they coincide at tilt 0), ``globe-dropkin``
  (horizontal only, high Ra).
* Vertical layers: ``elsherbiny``, ``catton``, ``macgregor-emery``, ``wright``.  Each computes its
  vertical value Nu(90) and then applies ONE shared tilt treatment (:func:`tilt_from_vertical`):
  Ayyaswamy & Catton (1973) Nu(t) = Nu(90) (sin t)^(1/4) for the critical tilt t* <= t <= 90, and
  Arnold, Catton & Edwards (1976) Nu(t) = 1 + (Nu(90) - 1) sin t for 90 <= t <= 180.  Both give
  Nu(90) at 90.  Below t* (see :func:`cavity_critical_tilt`) Catton's interpolation between
  Hollands' horizontal value and the value at t* takes over, as published for H/L < 12; for
  taller layers the vertical methods are out of range there, with a note.
* ``en673``: the glazing standard's Nu = A (Gr Pr)^n at its three tabulated tilts.
* ``conduction``: Nu = 1.

The "auto" rule (:data:`AUTO_RULE`) is written below; :func:`cavity_method` reports its choice.

Caution: a cavity Nusselt number is one input to a heat-loss or surface-temperature estimate;
where condensation, mould, touchable surfaces or equipment ratings depend on the result, check it
against local codes, the manufacturer's ratings and licensed practice.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from .correlations import (
    AUTO_PRINCIPLE,
    AutoStep,
    Geometry,
    Parameter,
    correlation,
    define_geometry,
    document,
    nusselt_parameters,
    nusselt,
    nusselt_value,
)
from numpy.typing import NDArray

from ._select import any_true, clip, ignoring_division_by, maximum, radians, where
from ._typing import ArrayLike, FloatOrArray
from .validity import Range, require_positive, unwrap

__all__ = ["nu_cavity", "cavity_method", "cavity_critical_tilt", "tilt_from_vertical",
           "CRITICAL_TILT_TABLE", "AUTO_RULE"]

AUTO_RULE = (
    "auto's order among the correlations valid at a point: conduction (Ra cos(tilt) <= 1708 and "
    "Ra sin(tilt) <= 1e3: heated from above, or below the onset of convection), hollands "
    "(tilt <= 75 deg, H/L >= 12, Ra <= 1e8 horizontal and Ra cos(tilt) <= 1e5 tilted, that bound "
    "reached over the first degree; air and gases, 0.5 <= Pr <= 0.9), globe-dropkin (horizontal, 3e5 <= Ra <= 7e9), then the "
    "vertical correlations with the shared tilt treatment (Catton's interpolation below the "
    "critical tilt for H/L < 12, faded from H/L 9 to 12 for auto): elsherbiny (air and gases, "
    "0.5 <= Pr <= 0.9), catton (its "
    "short-layer form to H/L = 2, handed over to its tall-layer form from 2 to 2.24, the short "
    "form extrapolated by at most a factor 1.12 there), macgregor-emery (its laminar and "
    "turbulent boxes; Pr >= 1), wright (air and gases, 0.5 <= Pr <= 0.9).  " + AUTO_PRINCIPLE + "  So a square or near-square "
    "layer keeps Catton's short-layer form (H/L 1 is its bound, nothing else is published "
    "there), extrapolated below H/L 1 with the note.  A method named explicitly keeps its "
    "published form.  en673 is never chosen by auto (it is the glazing standard's own "
    "procedure; ask for it).")

#: Critical tilt t* (deg from horizontal, heated from below) against aspect H/L, below which the
#: vertical-layer flow gives way to the Benard cells of the heated-from-below layer.
#: Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., Table 9.3 (after
#: Hollands/Catton); from memory: H/L 1, 3, 6, 12, > 12 -> 25, 53, 60, 67, 70 deg.
CRITICAL_TILT_TABLE = ((1.0, 25.0), (3.0, 53.0), (6.0, 60.0), (12.0, 67.0))
CRITICAL_TILT_TALL = 70.0  # H/L > 12
#: Where we take the table's "> 12" row to be reached: t* rises linearly from 67 deg at H/L 12
#: to 70 deg at 15, so that nothing built on t* steps at 12 (our reading of "> 12").
CRITICAL_TILT_TALL_FROM = 15.0
SHORT_CAVITY = 12.0  # H/L below which Catton's interpolation covers tilts below t*

RAYLEIGH_ONSET = 1708.0  # Ra cos(tilt) at the onset of Benard cells (rigid walls), Hollands 1976
CONDUCTION_VERTICAL_RA = 1e3  # vertical-layer conduction regime: ElSherbiny Nu_ct - 1 < 1e-4


def cavity_critical_tilt(aspect: ArrayLike) -> FloatOrArray:
    """Critical tilt t* (deg from horizontal) of a layer of aspect H/L, from Incropera Table 9.3.

    Linear interpolation in the table for 1 <= H/L <= 12; the table's "> 12" row (70 deg) is
    reached at H/L = 15, linearly from 67 deg at 12, so t* has no step; 70 deg above 15; 25 deg
    below H/L = 1 (the table's first row held: the table has no entry there).

    Parameters
    ----------
    aspect : array_like
        Height/gap H/L of the layer (> 0).

    Returns
    -------
    float or ndarray
        t* in degrees from the horizontal.

    Notes
    -----
    Source: Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., Table 9.3
    (critical tilts of inclined cavities, after Hollands and Catton).  Valid for any
    H/L > 0, the table's ends held as described above.

    Examples
    --------
    >>> cavity_critical_tilt(3.0), cavity_critical_tilt(40.0)
    (53.0, 70.0)
    """
    aspect = require_positive("cavity_critical_tilt", "aspect", aspect)
    return unwrap(_critical_tilt(aspect))


def _critical_tilt(aspect):
    if aspect is _LAST_CRITICAL[0]:    # the scalar path asks for t* of one aspect object ~5 times per case
        return _LAST_CRITICAL[1]
    if type(aspect) is np.float64 or type(aspect) is float:
        tilt = _critical_tilt_of(aspect)
        # the object is held, so its identity cannot pass to another number while kept here
        _LAST_CRITICAL[:] = (aspect, tilt)
        return tilt
    if not isinstance(aspect, np.ndarray):
        return _critical_tilt_of(float(aspect))
    table_aspect, table_tilt = _CRITICAL_TILT_POINTS
    return np.interp(aspect, table_aspect, table_tilt)


_CRITICAL_TILT_POINTS = tuple(zip(*(CRITICAL_TILT_TABLE + ((CRITICAL_TILT_TALL_FROM, CRITICAL_TILT_TALL),))))


#: The last scalar aspect asked for and its t* (one slot, compared by identity).
_LAST_CRITICAL: list = [None, None]


@lru_cache(maxsize=1024)
def _critical_tilt_of(aspect: float) -> float:
    return float(np.interp(aspect, _CRITICAL_TILT_POINTS[0], _CRITICAL_TILT_POINTS[1]))


def tilt_from_vertical(nu_vertical, tilt, nu_horizontal=None, critical_tilt=None):
    """The shared tilt treatment of a vertical-layer Nusselt number Nu(90) (Catton 1978).

    * tilt < t* (when ``nu_horizontal`` Nu(0) and ``critical_tilt`` t* are given): Catton's
      interpolation Nu = Nu(0) [Nu(90) (sin t*)^(1/4) / Nu(0)]^(tilt/t*), i.e.
      Nu(0) [Nu(90)/Nu(0)]^(tilt/t*) (sin t*)^(tilt/(4 t*)) (Incropera 6th ed. eq. 9.57, from
      memory of the number), published for H/L < 12;
    * t* <= tilt <= 90: Ayyaswamy & Catton (1973), Nu = Nu(90) (sin tilt)^(1/4)
      (Incropera 6th ed. eq. 9.58, from memory of the number);
    * 90 <= tilt <= 180: Arnold, Catton & Edwards (1976), Nu = 1 + (Nu(90) - 1) sin tilt
      (Incropera 6th ed. eq. 9.59, from memory of the number).

    The three meet without a step: Nu(0) at 0, Nu(90) (sin t*)^(1/4) at t*, Nu(90) at 90,
    conduction at 180.
    """
    sine = np.sin(radians(tilt))
    tilted = where(tilt <= 90.0, nu_vertical * sine ** 0.25, 1.0 + (nu_vertical - 1.0) * sine)
    if nu_horizontal is None:
        return tilted
    below = tilt < critical_tilt
    if not any_true(below):
        return tilted
    with np.errstate(divide="ignore", invalid="ignore"):
        at_critical = nu_vertical * np.sin(radians(critical_tilt)) ** 0.25
        interpolated = nu_horizontal * (at_critical / nu_horizontal) ** (tilt / critical_tilt)
    return where(below, interpolated, tilted)


# --- validity quantities (Range(of=...)) ------------------------------------------------------

def _ra_cos(inputs):
    return inputs["ra"] * np.cos(radians(inputs["tilt"]))


def _ra_sin(inputs):
    return inputs["ra"] * np.sin(radians(inputs["tilt"]))


def _only_in_band(band, quantity, stand_in):
    """``of`` for a Range that binds only in one band of a two-band correlation.

    Inside the band the real quantity is checked; elsewhere a stand-in value inside the range is
    returned, so the Range passes there (the other band's own Range does the checking).  This
    keeps two-band correlations on the one validity mechanism.
    """
    def of(inputs):
        in_band = band(inputs)
        if type(in_band) is np.bool_:  # the scalar path: the quantity only where it binds
            return quantity(inputs) if in_band else stand_in
        return np.where(in_band, quantity(inputs), stand_in)

    return of


def _input(name):
    return lambda inputs: inputs[name]


def _tilt_past_critical(inputs):
    return inputs["tilt"] - _critical_tilt(inputs["aspect"])


TILT_FROM_CRITICAL = Range(
    "tilt - critical tilt [H/L >= 12]", low=0.0, in_auto=False,
    of=_only_in_band(lambda i: i["aspect"] >= SHORT_CAVITY, _tilt_past_critical, 0.0))
"""Tall layers: the vertical methods' tilt range starts at the critical tilt t*(aspect)."""

HORIZONTAL_VALUE_RA = Range(
    "Ra [tilt < critical tilt]", high=1e8, in_auto=False,
    of=_only_in_band(lambda i: i["tilt"] < _critical_tilt(i["aspect"]), _input("ra"), 0.0))
"""Below t*, Catton's interpolation takes Nu(0) from Hollands' horizontal form (Ra <= 1e8)."""

VERTICAL_TILT_RANGES = (TILT_FROM_CRITICAL, HORIZONTAL_VALUE_RA)


# Auto reads continuous versions of the ranges above, which jump (Range.in_auto): a weight
# that jumps would make auto's value jump.  Each reaches the published bound where it binds.

def _vertical_tilt_margin(inputs):
    """How far (deg) the vertical methods' tilt treatment is inside its reach: any tilt below
    H/L = 12 (by (12 - H/L) x 5/3 deg, so the 5 deg band fades from H/L 9 to 12), tilt - t*
    from there, continuously; the published range jumps at H/L = 12."""
    reach = (SHORT_CAVITY - inputs["aspect"]) * (5.0 / 3.0)
    return maximum(_tilt_past_critical(inputs), reach)


def _horizontal_value_ra(inputs):
    """Ra where Catton's interpolation reads Hollands' horizontal value, faded out over the
    5 deg below t*: the horizontal value's share of the interpolation, 1 - tilt/t*, is small
    there and vanishes at t*, where the published bound stops at once."""
    share = clip((_critical_tilt(inputs["aspect"]) - inputs["tilt"]) / 5.0, 0.0, 1.0)
    return inputs["ra"] * share


VERTICAL_TILT_COVERAGE = (
    Range("tilt past the vertical methods' reach", low=0.0, of=_vertical_tilt_margin),
    Range("Ra [tilt < critical tilt, faded over 5 deg]", high=1e8, of=_horizontal_value_ra))
"""Auto's reading of :data:`VERTICAL_TILT_RANGES`, continuous in tilt and aspect."""


def _hollands_tilted_ra(inputs):
    """Ra cos(tilt) x 1000^(tilt/1 deg, at most 1): the published bound Ra cos(tilt) <= 1e5 once
    tilted, Ra <= 1e8 horizontal, reached over the first degree instead of at once."""
    return _ra_cos(inputs) * 1e3 ** np.minimum(inputs["tilt"], 1.0)


HOLLANDS_TILTED_RA = Range("Ra cos(tilt) [tilt > 0], over the first degree", high=1e8, of=_hollands_tilted_ra)


# --- geometry ---------------------------------------------------------------------------------

_CATTON_BAND_EDGE = 2.0   # H/L where Catton's eqs. 9.53 and 9.52 meet
_MACGREGOR_EDGE_ASPECT, _MACGREGOR_EDGE_RA = 10.0, 1e7


def _catton_x(inputs):
    return inputs["ra"] * inputs["pr"] / (0.2 + inputs["pr"])


#: Auto's coverage of the two published bands of Catton's and MacGregor-Emery's correlations:
#: each band's own published range, with Catton's aspect edge at 2 in a band of a factor 1.25
#: centred on it (each band's coverage may reach a factor 1.12 past the edge; auto, preferring
#: the short form where both are equally deep, hands it over from 2 to 2.24) and
#: MacGregor-Emery's laminar box handing over to the turbulent one inside both (Ra 2.5e6-1e7).
CATTON_SHORT_WHEN = (Range("aspect", high=_CATTON_BAND_EDGE, placement="centred"),
                     Range("Pr", 1e-3, 1e5), Range("Ra*Pr/(0.2+Pr)", low=1e3, of=_catton_x)) + VERTICAL_TILT_COVERAGE
CATTON_TALL_WHEN = (Range("aspect", low=_CATTON_BAND_EDGE, placement="centred"), Range("aspect", high=10.0),
                    Range("Pr", high=1e5), Range("Ra", 1e3, 1e10)) + VERTICAL_TILT_COVERAGE
MACGREGOR_LAMINAR_WHEN = (Range("aspect", _MACGREGOR_EDGE_ASPECT, 40.0), Range("Pr", 1.0, 2e4),
                          Range("Ra", 1e4, _MACGREGOR_EDGE_RA)) + VERTICAL_TILT_COVERAGE
MACGREGOR_TURBULENT_WHEN = (Range("aspect", 1.0, 40.0), Range("Pr", 1.0, 20.0),
                            Range("Ra", 1e6, 1e9)) + VERTICAL_TILT_COVERAGE
#: The air-layer correlations (ElSherbiny et al. 1982 and Hollands et al. 1975/1976: "air
#: layers" in their titles; Wright 1996: window glazing cavities) were fitted to air and fill
#: gases, Pr ~ 0.7.  0.5-0.9 is our bound (no published Pr range: the gases of glazing and
#: enclosures, air, argon, krypton, CO2, lie within it; water and oils far above), with a
#: band of a factor 1.1 so that air at any temperature (Pr 0.69-0.73) is fully inside.  A
#: liquid-filled layer goes to the correlations measured in liquids (MacGregor-Emery, Globe-
#: Dropkin, Catton's Pr-dependent form), and an air correlation asked for by name there says
#: it is out of range.
AIR_LAYER_PR = Range("Pr", 0.5, 0.9, band=1.1)
ELSHERBINY_RANGES = (Range("aspect", 5.0, 110.0), Range("Ra", 1e2, 2e7), AIR_LAYER_PR)
#: Wright's aspect reach: the correlation reads H/L through Nu_2, but no upper bound was found
#: in a source we could read; 1e3 is our bound (glazing cavities run to H/L ~ 200), so that an
#: aspect typed in the wrong unit (a height in mm: H/L of tens of thousands) gets the note.
WRIGHT_RANGES = (Range("Ra", high=1e6), Range("aspect", 20.0, 1e3), AIR_LAYER_PR)

#: The order auto prefers among the correlations valid at a point (stillair.correlations.auto
#: weighs them; each step also reads its correlation's published ranges).  Beyond every range
#: the rule keeps the nearest valid correlation by itself, so no step here extends a range.
CAVITY_AUTO = (
    AutoStep("conduction"),
    AutoStep("hollands", when=(HOLLANDS_TILTED_RA,)),
    AutoStep("globe-dropkin"),
    AutoStep("elsherbiny", when=VERTICAL_TILT_COVERAGE),
    AutoStep("catton", when=CATTON_SHORT_WHEN, form="short"),
    AutoStep("catton", when=CATTON_TALL_WHEN, form="tall"),
    AutoStep("macgregor-emery", when=MACGREGOR_LAMINAR_WHEN, form="laminar"),
    AutoStep("macgregor-emery", when=MACGREGOR_TURBULENT_WHEN, form="turbulent"),
    AutoStep("wright", when=VERTICAL_TILT_COVERAGE),
)

define_geometry(Geometry(
    name="cavity", inputs=("ra", "pr", "aspect", "tilt"),
    description="enclosed rectangular gas layer, Ra and Nu on the gap L, aspect = H/L, tilt in "
                "deg from the horizontal (0 heated from below, 90 vertical, 180 heated from "
                "above). " + AUTO_RULE,
    auto={None: CAVITY_AUTO},
    floor=1.0, default_tilt=90.0, title="enclosed gas layer (cavity)", length="gap",
    length_doc="gap L between the two faces, m",
    parameters=(Parameter("gap", "m", "gap between the two faces (> 0)"),
                Parameter("height", "m", "height of the layer along its faces (> 0)"),
                Parameter("tilt", "deg", "tilt from the horizontal: 0 heated from below, 90 vertical, "
                          "180 heated from above", default=90.0))))


def _vertical_correlation(*, method, title, source, equation, validity, notes="", forms=None):
    """Register a vertical-layer correlation ``nu90(ra, pr, aspect)`` with the shared tilt treatment.

    The registered function is Nu(tilt) = :func:`tilt_from_vertical` of nu90, with Nu(0) from
    Hollands' horizontal form below the critical tilt; its ranges are the published vertical
    ones plus :data:`VERTICAL_TILT_RANGES`.  ``forms`` (published bands of a piecewise
    correlation, as vertical functions) get the same tilt treatment.
    """

    def tilted(nu_vertical):
        def nu_tilted(ra, pr, aspect, tilt):
            critical = _critical_tilt(aspect)
            below = tilt < critical
            horizontal = hollands(ra, pr, aspect, np.zeros_like(tilt)) if any_true(below) else None
            return tilt_from_vertical(nu_vertical(ra, pr, aspect), tilt, horizontal, critical)

        nu_tilted.__name__ = nu_vertical.__name__ + "_tilted"
        nu_tilted.__doc__ = nu_vertical.__doc__
        nu_tilted.vertical = nu_vertical  # type: ignore[attr-defined]  # a function attribute, read below
        return nu_tilted

    def register(nu_vertical):
        correlation(
            geometry="cavity", method=method, title=title, source=source,
            equation=equation + "; tilted: Nu(t) = Nu(0) [Nu(90) (sin t*)^(1/4)/Nu(0)]^(t/t*) for "
                                "t < t* (Catton; Nu(0) from Hollands' horizontal form), "
                                "Nu(t) = Nu(90) (sin t)^(1/4) for t* <= t <= 90 "
                                "(Ayyaswamy & Catton), Nu(t) = 1 + (Nu(90) - 1) sin t for "
                                "90 <= t <= 180 (Arnold, Catton & Edwards)",
            validity=tuple(validity) + VERTICAL_TILT_RANGES, notes=notes,
            forms={name: tilted(form) for name, form in (forms or {}).items()})(tilted(nu_vertical))
        return nu_vertical

    return register


_TILT_SOURCES = ("; tilt: I. Catton, Natural convection in enclosures, Proc. 6th Int. Heat Transfer "
                 "Conf. 6 (1978) 13-31 (Ayyaswamy & Catton 1973, Arnold, Catton & Edwards 1976), "
                 "Incropera et al. 6th ed. eqs. 9.57-9.59 and Table 9.3")

# --- vertical layers --------------------------------------------------------------------------

_CATTON_SHORT = lambda inputs: inputs["aspect"] < _CATTON_BAND_EDGE   # eq. 9.53 band, 1 <= H/L < 2


def _catton_short(ra, pr, aspect):
    """Incropera 6th ed. eq. 9.53 (1 <= H/L < 2)."""
    return 0.18 * (ra * pr / (0.2 + pr)) ** 0.29 + 0.0 * aspect


def _catton_tall(ra, pr, aspect):
    """Incropera 6th ed. eq. 9.52 (2 <= H/L <= 10)."""
    return 0.22 * (ra * pr / (0.2 + pr)) ** 0.28 * aspect ** -0.25


@_vertical_correlation(
    method="catton", forms={"short": _catton_short, "tall": _catton_tall}, title="Catton, vertical cavity (two aspect bands)",
    source="I. Catton, Proc. 6th Int. Heat Transfer Conf. 6 (1978) 13-31, as given in Incropera "
           "et al., Fundamentals of Heat and Mass Transfer, 6th ed., eqs. 9.52 (2 <= H/L <= 10) "
           "and 9.53 (1 <= H/L < 2)" + _TILT_SOURCES,
    equation="Nu(90) = 0.22 (Pr Ra/(0.2+Pr))^0.28 (H/L)^(-1/4) for H/L >= 2; "
             "0.18 (Pr Ra/(0.2+Pr))^0.29 for H/L < 2",
    validity=[
        Range("aspect", 1.0, 10.0),
        Range("Pr", high=1e5),
        Range("Pr [H/L < 2]", low=1e-3, in_auto=False, of=_only_in_band(_CATTON_SHORT, _input("pr"), 1e-3)),
        Range("Ra [H/L >= 2]", 1e3, 1e10, in_auto=False,
              of=_only_in_band(lambda i: ~_CATTON_SHORT(i), _input("ra"), 1e3)),
        Range("Ra*Pr/(0.2+Pr) [H/L < 2]", low=1e3, in_auto=False, of=_only_in_band(_CATTON_SHORT, _catton_x, 1e3)),
    ],
    notes="One method, band chosen by aspect: eq. 9.53 for H/L < 2, eq. 9.52 from H/L = 2 up "
          "(the bands meet at 2, where the value steps up by about 9 % at Ra ~ 1e5).  The "
          "formula gives Nu < 1 (raised to 1) below Ra Pr/(0.2+Pr) ~ 4e2 (H/L = 2) to ~ 1.7e3 "
          "(H/L = 10), the latter inside the published Ra range.")
def catton_vertical(ra, pr, aspect):
    """Catton's vertical-cavity correlation, band by aspect (Incropera 6th ed. eqs. 9.52-9.53)."""
    return where(aspect < _CATTON_BAND_EDGE, _catton_short(ra, pr, aspect), _catton_tall(ra, pr, aspect))


def _in_macgregor_laminar_box(ra, aspect):
    """Eq. 9.54 band: 10 <= H/L and Ra <= 1e7 (its published box); eq. 9.55 elsewhere."""
    return (aspect >= _MACGREGOR_EDGE_ASPECT) & (ra <= _MACGREGOR_EDGE_RA)


def _macgregor_laminar_band(inputs):
    return _in_macgregor_laminar_box(inputs["ra"], inputs["aspect"])


def _macgregor_laminar(ra, pr, aspect):
    """Incropera 6th ed. eq. 9.54 (10 <= H/L <= 40, Ra <= 1e7)."""
    return 0.42 * ra ** 0.25 * pr ** 0.012 * aspect ** -0.3


def _macgregor_turbulent(ra, pr, aspect):
    """Incropera 6th ed. eq. 9.55 (1 <= H/L <= 40, 1e6 <= Ra <= 1e9)."""
    return 0.046 * ra ** (1.0 / 3.0) + 0.0 * aspect


@_vertical_correlation(
    method="macgregor-emery", forms={"laminar": _macgregor_laminar, "turbulent": _macgregor_turbulent}, title="MacGregor and Emery, vertical cavity (two ranges)",
    source="R.K. MacGregor, A.F. Emery, J. Heat Transfer 91 (1969) 391-403, as given in "
           "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eqs. 9.54-9.55"
           + _TILT_SOURCES,
    equation="Nu(90) = 0.42 Ra^(1/4) Pr^0.012 (H/L)^(-0.3) for H/L >= 10 and Ra <= 1e7; "
             "0.046 Ra^(1/3) otherwise",
    validity=[
        Range("aspect", 1.0, 40.0),
        Range("Pr", 1.0, 2e4),
        Range("Ra", 1e4, 1e9),
        Range("Pr [0.046 Ra^(1/3) band]", high=20.0, in_auto=False,
              of=_only_in_band(lambda i: ~_macgregor_laminar_band(i), _input("pr"), 20.0)),
        Range("Ra [0.046 Ra^(1/3) band]", low=1e6, in_auto=False,
              of=_only_in_band(lambda i: ~_macgregor_laminar_band(i), _input("ra"), 1e6)),
    ],
    notes="The published Prandtl range starts at Pr = 1: air (Pr ~ 0.71) and the other fill "
          "gases are OUTSIDE it and always carry a note (auto uses it for a gas only where no "
          "correlation covers the case and it is the nearest, extrapolated).  Where the two published boxes overlap (10 <= H/L <= 40, 1e6 <= Ra <= "
          "1e7) eq. 9.54 is used; the value steps at Ra = 1e7 (-16 % at H/L = 10, +27 % at "
          "H/L = 40) and at H/L = 10 (+45 % at Ra = 1e6).  The formulas stay above 1 inside "
          "the published ranges.")
def macgregor_emery_vertical(ra, pr, aspect):
    """MacGregor & Emery's vertical-cavity correlations (Incropera 6th ed. eqs. 9.54-9.55)."""
    return where(_in_macgregor_laminar_box(ra, aspect),
                 _macgregor_laminar(ra, pr, aspect), _macgregor_turbulent(ra, pr, aspect))


@_vertical_correlation(
    method="elsherbiny", title="ElSherbiny, Raithby and Hollands, vertical air layer",
    source="S.M. ElSherbiny, G.D. Raithby, K.G.T. Hollands, Heat transfer by natural convection "
           "across vertical and inclined air layers, J. Heat Transfer 104 (1982) 96-102, "
           "vertical-layer equations (from memory)" + _TILT_SOURCES,
    equation="Nu(90) = max(Nu_ct, Nu_l, Nu_t); Nu_ct = [1 + (0.104 Ra^0.293/(1 + (6310/Ra)^1.36))^3]"
             "^(1/3), Nu_l = 0.242 (Ra/A)^0.273, Nu_t = 0.0605 Ra^(1/3)",
    validity=ELSHERBINY_RANGES,
    notes="Data for air (Pr 0.5-0.9 is our bound: gases near air's Pr).  The exponent of Nu_l is written 0.273 here (the Raithby-Hollands "
          "handbook form, from memory); ISO 15099 transcribes the same term with 0.272 (from "
          "memory) - the two differ by < 1 % in range.  Nu_ct >= 1 always, so the formula never "
          "goes below conduction.")
def elsherbiny_vertical(ra, pr, aspect):
    """ElSherbiny, Raithby & Hollands (1982), vertical layers: the largest of three regimes."""
    with ignoring_division_by(ra):  # Ra = 0: 6310/Ra = inf, and the term is 1 (conduction)
        conduction_transition = (1.0 + (0.104 * ra ** 0.293 / (1.0 + (6310.0 / ra) ** 1.36)) ** 3) ** (1.0 / 3.0)
    laminar_boundary_layer = 0.242 * (ra / aspect) ** 0.273
    turbulent = 0.0605 * ra ** (1.0 / 3.0)
    return maximum(conduction_transition, maximum(laminar_boundary_layer, turbulent))


def _wright_bands(ra):
    """Wright (1996): three Ra bands, Nu_1 of ISO 15099's vertical-cavity equations."""
    return where(ra > 5e4, 0.0673838 * ra ** (1.0 / 3.0),
                 where(ra > 1e4, 0.028154 * ra ** 0.4134,
                       1.0 + 1.7596678e-10 * ra ** 2.2984755))


@_vertical_correlation(
    method="wright", title="Wright, vertical glazing cavity (as adopted in ISO 15099)",
    source="J.L. Wright, A correlation to quantify convective heat transfer between vertical "
           "window glazings, ASHRAE Transactions 102(1) (1996) 940-946; combined with the "
           "aspect term as in ISO 15099:2003 §5.3.3.2 (from memory)" + _TILT_SOURCES,
    equation="Nu(90) = max(Nu_1, Nu_2); Nu_1 = 0.0673838 Ra^(1/3) (Ra > 5e4), "
             "0.028154 Ra^0.4134 (1e4 < Ra <= 5e4), 1 + 1.7596678e-10 Ra^2.2984755 (Ra <= 1e4); "
             "Nu_2 = 0.242 (Ra/A)^0.272",
    validity=WRIGHT_RANGES,
    notes="Implemented: the ISO 15099 form, the larger of Wright's three-band Nu_1 and the "
          "aspect term Nu_2 = 0.242 (Ra/A)^0.272.  Bounds (from memory, not checked against "
          "the paper): Ra <= 1e6, A >= 20; Pr 0.5-0.9 (air and fill gases) and the upper A <= 1e3 are ours (no published bound found).  Nu_1 steps at its band edges: -0.007 at Ra = 1e4 "
          "(1.275 -> 1.268) and +0.016 at Ra = 5e4 (2.467 -> 2.483), visible where Nu_2 is "
          "smaller (tall cavities).  Nu_1 >= 1 always.")
def wright_vertical(ra, pr, aspect):
    """Wright (1996) glazing-cavity correlation, ISO 15099 form (max with the aspect term)."""
    return np.maximum(_wright_bands(ra), 0.242 * (ra / aspect) ** 0.272)


# --- horizontal and tilted layers heated from below --------------------------------------------

@correlation(
    geometry="cavity", method="hollands",
    title="Hollands et al., horizontal (1975) and tilted (1976) air layers heated from below",
    source="K.G.T. Hollands, G.D. Raithby, L. Konicek, Int. J. Heat Mass Transfer 18 (1975) "
           "879-884 (horizontal, air); K.G.T. Hollands, T.E. Unny, G.D. Raithby, L. Konicek, "
           "Free convective heat transfer across inclined air layers, J. Heat Transfer 98 (1976) "
           "189-193; Incropera et al. 6th ed. eq. 9.56 (from memory of the number)",
    equation="Nu = 1 + 1.44 [1 - 1708/(Ra cos t)]+ [1 - 1708 (sin 1.8t)^1.6/(Ra cos t)] "
             "+ [((Ra cos t)/5830)^(1/3) - 1]+   ([x]+ = max(x, 0)); at t = 0 this is the 1975 "
             "form 1 + 1.44 [1 - 1708/Ra]+ + [(Ra/5830)^(1/3) - 1]+",
    validity=[
        Range("tilt", 0.0, 75.0),
        Range("aspect", low=12.0),
        Range("Ra", high=1e8),
        AIR_LAYER_PR,
        Range("Ra cos(tilt) [tilt > 0]", high=1e5, in_auto=False,
              of=_only_in_band(lambda i: i["tilt"] > 0.0, _ra_cos, 0.0)),
    ],
    notes="Air (and gases of similar Pr: 0.5-0.9 is our bound).  Ra < 1e8 for the horizontal layer (1975), "
          "Ra cos t < 1e5 once tilted (1976): the upper Ra bound drops as soon as tilt > 0, as "
          "published.  The formula is 1 exactly below Ra cos t = 1708 (never below 1).  Out of "
          "range above 90 deg it gives conduction (Ra cos t <= 0).")
def hollands(ra, pr, aspect, tilt):
    """Hollands et al. (1976) tilted-layer form; at tilt 0 exactly the 1975 horizontal form."""
    angle = radians(tilt)
    ra_normal = ra * np.cos(angle)
    with np.errstate(divide="ignore", invalid="ignore"):
        onset = where(ra_normal > RAYLEIGH_ONSET, 1.0 - RAYLEIGH_ONSET / ra_normal, 0.0)
        # sin(1.8 t) < 0 only above 100 deg, out of range, where onset is 0 anyway.
        tilt_factor = 1.0 - RAYLEIGH_ONSET * np.clip(np.sin(1.8 * angle), 0.0, None) ** 1.6 / ra_normal
        cells = where(ra_normal > 0.0, np.cbrt(np.maximum(ra_normal, 0.0) / 5830.0) - 1.0, 0.0)
        return 1.0 + 1.44 * where(onset > 0.0, onset * tilt_factor, 0.0) + np.maximum(cells, 0.0)


@correlation(
    geometry="cavity", method="globe-dropkin", title="Globe and Dropkin, horizontal layer heated from below",
    source="S. Globe, D. Dropkin, Natural-convection heat transfer in liquids confined by two "
           "horizontal plates and heated from below, J. Heat Transfer 81 (1959) 24-28; "
           "Incropera et al. 6th ed. eq. 9.49",
    equation="Nu = 0.069 Ra^(1/3) Pr^0.074",
    validity=[Range("tilt", 0.0, 0.0), Range("Ra", 3e5, 7e9), Range("Pr", 0.02, 8750.0)],
    notes="Horizontal layers only (tilt 0); at other tilts the horizontal value is returned "
          "with the note (the correlation knows no tilt - it does NOT fall to 1 when heated "
          "from above).  Pr range 0.02-8750 from memory (mercury, water, silicone oils - "
          "liquids; no gas was tested).  Gives Nu < 1 below Ra ~ 3e3, far below its range.")
def globe_dropkin(ra, pr, aspect, tilt):
    """Globe & Dropkin (1959), Incropera 6th ed. eq. 9.49."""
    return 0.069 * np.cbrt(ra) * pr ** 0.074


# --- glazing standard and conduction -----------------------------------------------------------

#: EN 673 constants of Nu = A (Gr Pr)^n (from memory: EN 673:2011 Table 3 / §5.3):
#: tilt (deg from horizontal, heat flow upward) -> (A, n).
EN673_CONSTANTS = {0.0: (0.16, 0.28), 45.0: (0.10, 0.31), 90.0: (0.035, 0.38)}


def _en673_off_table(inputs):
    """Distance (deg) of the tilt from the nearest tabulated tilt."""
    return np.min([np.abs(inputs["tilt"] - t) for t in EN673_CONSTANTS], axis=0)


@correlation(
    geometry="cavity", method="en673", title="EN 673 glazing standard, Nu = A (Gr Pr)^n",
    source="EN 673 Glass in building - Determination of thermal transmittance (U value) - "
           "Calculation method, §5.3 (constants from memory): A = 0.035, n = 0.38 vertical; "
           "A = 0.10, n = 0.31 at 45 deg; A = 0.16, n = 0.28 horizontal, heat flow upward; "
           "Nu < 1 -> 1",
    equation="Nu = max(1, A (Gr Pr)^n) at tilt 0, 45, 90; linear in tilt between them; "
             "1 + (Nu(90) - 1) sin t above 90 (Arnold's treatment)",
    validity=[Range("tilt off 0/45/90 deg", high=0.0, of=_en673_off_table)],
    notes="The standard tabulates only 0, 45 and 90 deg (heat flow upward).  Between them we "
          "interpolate Nu linearly in tilt (continuous, with the note); above 90 (heat flow "
          "downward) we apply Arnold's treatment to the vertical value (note), giving 1 at 180. "
          "EN 673 evaluates Gr and Pr at its own declared conditions (mean gas temperature, "
          "temperature difference); this function only needs Ra = Gr Pr.  Each tabulated A (Gr Pr)^n "
          "is raised to 1 where it is below 1, as the standard says.")
def en673(ra, pr, aspect, tilt):
    """EN 673 Nu = A (Gr Pr)^n, floored at 1 per tabulated tilt, interpolated between tilts."""
    tilts = np.array(sorted(EN673_CONSTANTS))
    a, n = (np.array(v) for v in zip(*(EN673_CONSTANTS[t] for t in tilts)))
    nu_tab = np.maximum(1.0, a * ra[..., np.newaxis] ** n)            # (..., 3)
    position = np.clip(tilt, 0.0, 90.0) / 45.0                        # 0..2
    lower = np.minimum(np.floor(position).astype(int), 1)
    weight = position - lower
    nu_low = np.take_along_axis(nu_tab, lower[..., np.newaxis], -1)[..., 0]
    nu_high = np.take_along_axis(nu_tab, lower[..., np.newaxis] + 1, -1)[..., 0]
    upward = nu_low + weight * (nu_high - nu_low)
    return np.where(tilt > 90.0, tilt_from_vertical(nu_tab[..., 2], tilt), upward)


@correlation(
    geometry="cavity", method="conduction", title="Pure conduction across the gap",
    source="Fourier conduction across a still layer (Nu = 1 by definition of Nu on the gap); "
           "onset of Benard cells at Ra cos t = 1708: Hollands et al., J. Heat Transfer 98 (1976); "
           "vertical conduction regime: ElSherbiny et al., J. Heat Transfer 104 (1982)",
    equation="Nu = 1",
    validity=[Range("Ra cos(tilt)", high=RAYLEIGH_ONSET, of=_ra_cos),
              Range("Ra sin(tilt)", high=CONDUCTION_VERTICAL_RA, of=_ra_sin)],
    notes="Exact for the layer heated from above (tilt 180: Ra cos t <= 0, Ra sin t = 0) and "
          "below the onset of cells of a layer heated from below (Ra cos t <= 1708).  A layer "
          "with a vertical component (sin t > 0) circulates at any Ra; its conduction regime "
          "is taken to Ra sin t = 1e3, where ElSherbiny's Nu_ct - 1 = 7e-5 (common practice).")
def conduction(ra, pr, aspect, tilt):
    """Nu = 1."""
    return np.ones(np.shape(ra))


# --- public API --------------------------------------------------------------------------------

def nu_cavity(ra: ArrayLike, pr: ArrayLike, aspect: ArrayLike, tilt: ArrayLike = 90.0,
              method: str = "auto") -> FloatOrArray:
    """Nusselt number (on the gap) of an enclosed gas layer.

    ``ra`` on the gap, ``aspect`` = height/gap, ``tilt`` in deg from the horizontal (0 heated from
    below, 90 vertical, 180 heated from above), ``method`` one of "auto", "catton",
    "macgregor-emery", "elsherbiny", "wright", "hollands", "globe-dropkin", "en673",
    "conduction".  Returns a float for scalar input, an array otherwise; issues a
    CorrelationRangeWarning when any input is outside the method's published range.
    """
    return nusselt_value("cavity", method, function_name="nu_cavity",
                         ra=ra, pr=pr, aspect=aspect, tilt=tilt)


def cavity_method(ra: ArrayLike, pr: ArrayLike, aspect: ArrayLike, tilt: ArrayLike = 90.0,
                  method: str = "auto") -> str | NDArray[np.object_]:
    """The method name(s) that ``nu_cavity`` uses for these inputs (auto's choice, per element)."""
    result = nusselt("cavity", method, function_name="cavity_method",
                     ra=ra, pr=pr, aspect=aspect, tilt=tilt)
    return unwrap(result.method)


_CAVITY_TILT = ("Tilt from the horizontal in degrees: 0 heated from below, 90 vertical (default), "
                "180 heated from above.")
document(nu_cavity, "cavity", "Nusselt number (on the gap) of an enclosed gas layer, never below 1.",
         nusselt_parameters("cavity", _CAVITY_TILT),
         ("float or ndarray", "Nu = h L / k on the gap (-), >= 1: a float for scalar inputs, an array of "
                              "the broadcast shape otherwise."),
         ">>> round(nu_cavity(1e4, 0.71, 40.0), 3)\n1.303")
document(cavity_method, "cavity", "The method ``nu_cavity`` uses for these inputs (auto's dominant one).",
         nusselt_parameters("cavity", _CAVITY_TILT),
         ("str or ndarray of str", "The method name; where auto blends two methods, the one with the larger "
                                   "weight (``stillair.nusselt(...).blend`` names both)."),
         '>>> cavity_method(1e4, 0.71, 40.0)\n\'elsherbiny\'')
