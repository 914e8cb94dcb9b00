"""External natural convection: plates, cylinders and spheres in a large still fluid.

Ra is based on the geometry's own length: plate height (vertical plate), area/perimeter
(horizontal plate), the plate length the caller chooses (tilted plate, see below), diameter
(horizontal cylinder, sphere), height (vertical cylinder).  Properties at the film temperature.
No conduction floor applies: Nu based on an arbitrary length may be below 1.

Every correlation is registered in :mod:`stillair.correlations` with its source, equation and
validity ranges; the public ``nu_*`` functions are one-line calls of the registry, which checks
the arguments, picks the method for "auto" and reports any out-of-range use.

Piecewise power laws (McAdams, Lloyd-Moran, Morgan) are written as bands ``C Ra^n``; a value
exactly on a band edge belongs to the lower band.
"""

from __future__ import annotations

import numpy as np

from .correlations import (
    AUTO_PRINCIPLE,
    PLATE_CASES,
    STABLE_CASES,
    UNSTABLE_CASES,
    AutoStep,
    Geometry,
    Parameter,
    correlation,
    define_geometry,
    document,
    nusselt_parameters,
    nusselt_value,
)
from ._select import radians, where
from ._typing import ArrayLike, FloatOrArray
from .validity import Range

__all__ = ["nu_vplate", "nu_hplate", "nu_tplate", "nu_hcyl", "nu_sphere", "nu_vcyl"]


#: The face of a plate: which way it looks; hot or cold follows from the temperatures.
FACING_PARAMETER = Parameter("facing", "", 'which way the exposed face looks: "up" or "down"', kind="text")


def _churchill_pr_factor(pr, constant, exponent):
    """Churchill's Prandtl function [1 + (c/Pr)^(9/16)]^exponent, shared by his correlations."""
    return (1.0 + (constant / pr) ** (9.0 / 16.0)) ** exponent


def _power_bands(ra, edges, coefficients, exponents):
    """C Ra^n with (C, n) taken per band; ``edges`` ascending, an edge value in the lower band."""
    band = np.searchsorted(np.asarray(edges, dtype=float), ra, side="left")
    return np.asarray(coefficients)[band] * ra ** np.asarray(exponents)[band]


def _cos_tilt(inputs):
    return inputs["ra"] * np.cos(radians(inputs["tilt"]))


# --------------------------------------------------------------------------------------------
# Vertical plate
# --------------------------------------------------------------------------------------------

define_geometry(Geometry(
    name="vplate", title="vertical plate", inputs=("ra", "pr"),
    length="height", length_doc="plate height along the surface, m",
    parameters=(Parameter("height", "m", "plate height along the surface (> 0)"),),
    description="Vertical plate, Ra on the height. Auto rule: churchill-chu (valid for "
                "0.1 <= Ra <= 1e12); outside that range churchill-chu is still used, with the note.",
    auto={None: (AutoStep("churchill-chu", when=()),)}))


@correlation(
    geometry="vplate", method="churchill-chu", title="Churchill and Chu, vertical plate, all Ra",
    source="S.W. Churchill, H.H.S. Chu, Int. J. Heat Mass Transfer 18 (1975) 1323-1329, eq. (4); "
           "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 9.26",
    equation="Nu = {0.825 + 0.387 Ra^(1/6) / [1 + (0.492/Pr)^(9/16)]^(8/27)}^2",
    validity=[Range("Ra", 1e-1, 1e12)])
def _vplate_churchill_chu(ra, pr):
    return (0.825 + 0.387 * ra ** (1.0 / 6.0) / _churchill_pr_factor(pr, 0.492, 8.0 / 27.0)) ** 2


@correlation(
    geometry="vplate", method="churchill-chu-laminar", title="Churchill and Chu, vertical plate, laminar",
    source="S.W. Churchill, H.H.S. Chu, Int. J. Heat Mass Transfer 18 (1975) 1323-1329 (laminar "
           "form); Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 9.27",
    equation="Nu = 0.68 + 0.670 Ra^(1/4) / [1 + (0.492/Pr)^(9/16)]^(4/9)",
    validity=[Range("Ra", high=1e9)])
def _vplate_churchill_chu_laminar(ra, pr):
    return 0.68 + 0.670 * ra ** 0.25 / _churchill_pr_factor(pr, 0.492, 4.0 / 9.0)


@correlation(
    geometry="vplate", method="mcadams", title="McAdams, vertical plate, laminar and turbulent bands",
    source="W.H. McAdams, Heat Transmission, 3rd ed., McGraw-Hill (1954), ch. 7, vertical plates "
           "(equation numbers not checked)",
    equation="Nu = 0.59 Ra^(1/4) for 1e4 <= Ra <= 1e9; Nu = 0.10 Ra^(1/3) for 1e9 < Ra <= 1e13",
    validity=[Range("Ra", 1e4, 1e13)],
    notes="Discontinuous at Ra = 1e9 (0.10 Ra^(1/3) is 4.7% below 0.59 Ra^(1/4) there).")
def _vplate_mcadams(ra, pr):
    return _power_bands(ra, (1e9,), (0.59, 0.10), (0.25, 1.0 / 3.0))


def nu_vplate(ra: ArrayLike, pr: ArrayLike, method: str = "auto") -> FloatOrArray:
    """Nusselt number of a vertical plate (Ra on its height), by ``method`` or "auto".

    Methods: churchill-chu (default), churchill-chu-laminar, mcadams.
    """
    return nusselt_value("vplate", method, function_name="nu_vplate", ra=ra, pr=pr)


# --------------------------------------------------------------------------------------------
# Horizontal plate
# --------------------------------------------------------------------------------------------

define_geometry(Geometry(
    name="hplate", title="horizontal plate", inputs=("ra", "pr"), cases=PLATE_CASES,
    length="length", length_doc="area/perimeter of the plate, m",
    parameters=(Parameter("length", "m", "area/perimeter of the plate (> 0)"),
                FACING_PARAMETER),
    description="Horizontal plate, Ra on L = area/perimeter. Cases: hot-up and cold-down "
                "(unstable: the plume leaves the face), hot-down and cold-up (stable: the fluid is "
                "trapped against the face). Auto rule: hot-up/cold-down use lloyd-moran, "
                "hot-down/cold-up use raithby-hollands; outside its range the same method is used, "
                "with the note. mcadams is never chosen by auto (its length is the side of a "
                "square, and it jumps against the defaults at their band edges).",
    auto={case: (AutoStep("lloyd-moran", when=()),) for case in UNSTABLE_CASES}
    | {case: (AutoStep("raithby-hollands", when=()),) for case in STABLE_CASES}))


# Where 0.54 Ra^(1/4) = 0.15 Ra^(1/3): the laminar and turbulent bands meet without a step.
LLOYD_MORAN_CROSSOVER = (0.54 / 0.15) ** 12

#: Pr >= 0.7 is published for the laminar band only (Incropera 6th ed. eq. 9.30); the turbulent
#: band (eq. 9.31) states no Prandtl limit.
LLOYD_MORAN_LAMINAR_PR = Range(
    "Pr [laminar band]", low=0.7,
    of=lambda inputs: where(inputs["ra"] <= LLOYD_MORAN_CROSSOVER, inputs["pr"], 0.7))


@correlation(
    geometry="hplate", method="lloyd-moran", cases=UNSTABLE_CASES,
    title="Lloyd and Moran, horizontal plate, hot face up or cold face down",
    source="J.R. Lloyd, W.R. Moran, J. Heat Transfer 96 (1974) 443-447; Incropera et al., "
           "Fundamentals of Heat and Mass Transfer, 6th ed., eqs. 9.30 and 9.31 (L = As/P)",
    equation="Nu = 0.54 Ra^(1/4) for 1e4 <= Ra <= Ra_x; Nu = 0.15 Ra^(1/3) for Ra_x < Ra <= 1e11, "
             "Ra_x = (0.54/0.15)^12 = 4.74e6 where the two bands meet (published edge 1e7)",
    validity=[Range("Ra", 1e4, 1e11), LLOYD_MORAN_LAMINAR_PR],
    notes="The bands are switched where they intersect, Ra_x = 4.74e6, not at the published 1e7: "
          "the published switch is a 6.4 % step, and a surface temperature solved through a step "
          "may have no solution at all. Between Ra_x and 1e7 this gives up to 6.4 % more than the "
          "laminar band, well inside the correlation's scatter.")
def _hplate_lloyd_moran(ra, pr, case):
    return _power_bands(ra, (LLOYD_MORAN_CROSSOVER,), (0.54, 0.15), (0.25, 1.0 / 3.0))


@correlation(
    geometry="hplate", method="raithby-hollands", cases=STABLE_CASES,
    title="Raithby and Hollands, horizontal plate, hot face down or cold face up",
    source="G.D. Raithby, K.G.T. Hollands, Natural convection, ch. 4 in W.M. Rohsenow, "
           "J.P. Hartnett, Y.I. Cho (eds.), Handbook of Heat Transfer, 3rd ed., McGraw-Hill "
           "(1998), downward-facing heated plate (equation number not checked); range as given "
           "for the simplified form in Incropera et al., 7th ed., eq. 9.32",
    equation="Nu_T = 0.527 Ra^(1/5) / [1 + (1.9/Pr)^(9/10)]^(2/9); Nu = 2.5 / ln(1 + 2.5/Nu_T)",
    validity=[Range("Ra", 1e4, 1e9)])
def _hplate_raithby_hollands(ra, pr, case):
    thin_layer = 0.527 * ra ** 0.2 / (1.0 + (1.9 / pr) ** 0.9) ** (2.0 / 9.0)
    with np.errstate(divide="ignore"):  # Ra = 0 gives the limit Nu = 0
        return 2.5 / np.log1p(2.5 / thin_layer)


def _vdi_unstable_group(inputs):
    """Ra f2(Pr), the group of VDI's upward-facing heated plate."""
    return inputs["ra"] * (1.0 + (0.322 / inputs["pr"]) ** 0.55) ** (20.0 / 11.0)


def _vdi_stable_group(inputs):
    """Ra f1(Pr), the group of VDI's downward-facing heated plate."""
    return inputs["ra"] * (1.0 + (0.492 / inputs["pr"]) ** (9.0 / 16.0)) ** (-16.0 / 9.0)


@correlation(
    geometry="hplate", method="vdi", cases=PLATE_CASES,
    title="VDI Heat Atlas, horizontal plate (Stewartson's form for the unstable face)",
    source="VDI Heat Atlas, 2nd ed., Springer (2010), section F2; the unstable face after K. "
           "Stewartson, ZAMP 9 (1958) 276-282; equations as transcribed in the ht library "
           "(C. Bell), ht.conv_free_immersed.Nu_horizontal_plate_VDI (L = A/P); the Atlas itself "
           "was not read",
    equation="hot-up, cold-down: Nu = 0.766 (Ra f2)^(1/5) for Ra f2 <= 7e4, 0.15 (Ra f2)^(1/3) "
             "above, f2 = [1 + (0.322/Pr)^(11/20)]^(20/11); hot-down, cold-up: Nu = 0.6 (Ra f1)^(1/5), "
             "f1 = [1 + (0.492/Pr)^(9/16)]^(-16/9)",
    validity=[Range("Ra*f1(Pr)", 1e3, 1e10, of=_vdi_stable_group)],
    validity_by_case={case: (Range("Ra*f2(Pr)", 1.0, 1e11, of=_vdi_unstable_group),) for case in UNSTABLE_CASES},
    notes="Ranges unverified (ht states none; the Atlas was not read): 1e3 to 1e10 for the stable "
          "face and 1 to 1e11 for the unstable one are ours, from memory of the Atlas.  The "
          "unstable face steps down by 13 % at Ra f2 = 7e4 (0.766 x^(1/5) = 7.13 against 0.15 x^(1/3) = 6.18), "
          "as published.")
def _hplate_vdi(ra, pr, case):
    if case in UNSTABLE_CASES:
        group = _vdi_unstable_group({"ra": ra, "pr": pr})
        return where(group <= 7e4, 0.766 * group ** 0.2, 0.15 * np.cbrt(group))
    return 0.6 * _vdi_stable_group({"ra": ra, "pr": pr}) ** 0.2


# McAdams correlated square plates on their side length; stillair's hplate Ra is on A/P, which
# is a quarter of the side of a square (a disk of diameter D: McAdams's 0.9 D = 3.6 A/P).
_MCADAMS_SIDE_PER_LENGTH = 4.0


def _mcadams_side_ra(inputs):
    return inputs["ra"] * _MCADAMS_SIDE_PER_LENGTH ** 3


@correlation(
    geometry="hplate", method="mcadams", cases=PLATE_CASES,
    title="McAdams, horizontal square plate (length = side)",
    source="W.H. McAdams, Heat Transmission, 3rd ed., McGraw-Hill (1954), ch. 7, horizontal "
           "plates (coefficients and ranges from memory, equation numbers not checked)",
    equation="Ra_s = 64 Ra (side of a square = 4 A/P), Nu = Nu_s/4 with: hot-up, cold-down: "
             "Nu_s = 0.54 Ra_s^(1/4) for 1e5 <= Ra_s <= 2e7, 0.14 Ra_s^(1/3) for 2e7 < Ra_s <= 3e10; "
             "hot-down, cold-up: Nu_s = 0.27 Ra_s^(1/4) for 3e5 <= Ra_s <= 3e10",
    validity=[Range("Ra_side", 3e5, 3e10, of=_mcadams_side_ra)],
    validity_by_case={case: (Range("Ra_side", 1e5, 3e10, of=_mcadams_side_ra),)
                      for case in UNSTABLE_CASES},
    notes="Exact for square plates; for other shapes the side-length conversion is approximate.")
def _hplate_mcadams(ra, pr, case):
    ra_side = ra * _MCADAMS_SIDE_PER_LENGTH ** 3
    if case in UNSTABLE_CASES:
        nu_side = _power_bands(ra_side, (2e7,), (0.54, 0.14), (0.25, 1.0 / 3.0))
    else:
        nu_side = 0.27 * ra_side ** 0.25
    return nu_side / _MCADAMS_SIDE_PER_LENGTH


def nu_hplate(ra: ArrayLike, pr: ArrayLike, case: str, method: str = "auto") -> FloatOrArray:
    """Nusselt number of a horizontal plate (Ra on area/perimeter) for ``case``.

    ``case``: "hot-up", "hot-down", "cold-up", "cold-down".  Methods: lloyd-moran (hot-up,
    cold-down; default there), raithby-hollands (hot-down, cold-up; default there), mcadams.
    """
    return nusselt_value("hplate", method, case, function_name="nu_hplate", ra=ra, pr=pr)


# --------------------------------------------------------------------------------------------
# Tilted plate (tilt from the vertical: 0 = vertical, 90 = horizontal)
# --------------------------------------------------------------------------------------------

define_geometry(Geometry(
    name="tplate", title="tilted plate", inputs=("ra", "pr", "tilt"), cases=PLATE_CASES, tilt_range=(0.0, 90.0),
    length="length", length_doc="plate length along the slope, m",
    parameters=(Parameter("length", "m", "plate length along the slope (> 0)"),
                Parameter("tilt", "deg", "tilt from the vertical, 0 (vertical) to 90 (horizontal)"),
                FACING_PARAMETER),
    description="Plate tilted 0..90 deg from the vertical; the case names the face (up/down) and "
                "whether it is hotter or colder than the fluid. Ra on the one length the caller "
                "gives: the length along the slope for the vertical-plate term; the horizontal "
                "term of the unstable face reads the same Ra (give Ra on area/perimeter where "
                "that term governs). Auto rule: hot-down/cold-up (stable face) use "
                "churchill-chu-cos, valid to 60 deg, used beyond it with the note; hot-up/cold-down "
                "(unstable face) use raithby-hollands, the larger of the vertical result with "
                "Ra cos(tilt) and the horizontal result with Ra sin(tilt). Tilt 0 is the vertical "
                "plate exactly; at tilt 90 the unstable face is the horizontal plate (lloyd-moran) "
                "exactly, while the stable face does not join the horizontal plate (Ra cos(tilt) "
                "-> 0; its range ends at 60 deg): use nu_hplate for near-horizontal stable faces.",
    auto={case: (AutoStep("churchill-chu-cos", when=()),) for case in STABLE_CASES}
    | {case: (AutoStep("raithby-hollands", when=()),) for case in UNSTABLE_CASES}))


@correlation(
    geometry="tplate", method="churchill-chu-cos", cases=STABLE_CASES,
    title="Vertical plate (Churchill-Chu) with g cos(tilt), stable face of a tilted plate",
    source="G.C. Vliet, J. Heat Transfer 91 (1969) 511-516; T. Fujii, H. Imura, Int. J. Heat Mass "
           "Transfer 15 (1972) 755-767; as recommended in Incropera et al., Fundamentals of Heat "
           "and Mass Transfer, 6th ed., sec. 9.6.2 (bottom face of a heated plate, top face of a "
           "cooled plate, 0 <= tilt <~ 60 deg), used with eq. 9.26",
    equation="Nu = Nu_vplate,churchill-chu(Ra cos(tilt), Pr)",
    validity=[Range("tilt", 0.0, 60.0), Range("Ra*cos(tilt)", 1e-1, 1e12, of=_cos_tilt)])
def _tplate_churchill_chu_cos(ra, pr, tilt, case):
    return _vplate_churchill_chu(ra * np.cos(radians(tilt)), pr)


@correlation(
    geometry="tplate", method="raithby-hollands", cases=UNSTABLE_CASES,
    title="Raithby and Hollands, unstable face of a tilted plate: larger of vertical and horizontal",
    source="G.D. Raithby, K.G.T. Hollands, Natural convection, ch. 4 in Rohsenow, Hartnett, Cho "
           "(eds.), Handbook of Heat Transfer, 3rd ed. (1998), inclined plates, upward-facing "
           "heated face (recommendation from memory; equation number not checked); components: "
           "Churchill-Chu (Incropera 6th ed. eq. 9.26) and Lloyd-Moran (eqs. 9.30, 9.31)",
    equation="Nu = max(Nu_vplate,churchill-chu(Ra cos(tilt), Pr), Nu_hplate,lloyd-moran(Ra sin(tilt)))",
    validity=[Range("tilt", 0.0, 90.0), Range("Ra", 1e4, 1e11),
              Range("Pr [laminar band of the horizontal term]", low=0.7,
                    of=lambda inputs: LLOYD_MORAN_LAMINAR_PR.values(
                        dict(inputs, ra=inputs["ra"] * np.sin(radians(inputs["tilt"])))))],
    notes="Range: the intersection of the two components' ranges (Lloyd-Moran's Pr >= 0.7 "
          "binds in its laminar band only, on Ra sin(tilt)).")
def _tplate_raithby_hollands(ra, pr, tilt, case):
    theta = radians(tilt)
    along_slope = _vplate_churchill_chu(ra * np.cos(theta), pr)
    normal_to_face = _hplate_lloyd_moran(ra * np.sin(theta), pr, case)
    return np.maximum(along_slope, normal_to_face)


def nu_tplate(ra: ArrayLike, pr: ArrayLike, tilt: ArrayLike, case: str,
              method: str = "auto") -> FloatOrArray:
    """Nusselt number of a plate tilted ``tilt`` degrees from the vertical, for ``case``.

    ``case``: "hot-up", "hot-down", "cold-up", "cold-down" (the face's direction and whether it
    is hotter than the fluid).  Methods: churchill-chu-cos (stable faces hot-down, cold-up),
    raithby-hollands (unstable faces hot-up, cold-down).
    """
    return nusselt_value("tplate", method, case, function_name="nu_tplate", ra=ra, pr=pr, tilt=tilt)


# --------------------------------------------------------------------------------------------
# Horizontal cylinder
# --------------------------------------------------------------------------------------------

define_geometry(Geometry(
    name="hcyl", title="horizontal cylinder", inputs=("ra", "pr"),
    length="diameter", length_doc="outside diameter, m",
    parameters=(Parameter("diameter", "m", "outside diameter (> 0)"),),
    description="Long horizontal cylinder, Ra on the diameter. Auto rule: churchill-chu "
                "(1e-5 <= Ra <= 1e12), then morgan (1e-10 <= Ra <= 1e12): churchill-chu hands over "
                "to morgan across a factor 4 inside its lower bound (Ra 1e-5..4e-5); at their "
                "common upper bound churchill-chu keeps its weight and is used beyond it with "
                "the note. " + AUTO_PRINCIPLE,
    auto={None: (AutoStep("churchill-chu"), AutoStep("morgan"))}))


@correlation(
    geometry="hcyl", method="churchill-chu", title="Churchill and Chu, horizontal cylinder",
    source="S.W. Churchill, H.H.S. Chu, Int. J. Heat Mass Transfer 18 (1975) 1049-1053 (lower "
           "limit Ra 1e-5); Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., "
           "eq. 9.34 (Ra <~ 1e12)",
    equation="Nu = {0.60 + 0.387 Ra^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27)}^2",
    validity=[Range("Ra", 1e-5, 1e12)])
def _hcyl_churchill_chu(ra, pr):
    return (0.60 + 0.387 * ra ** (1.0 / 6.0) / _churchill_pr_factor(pr, 0.559, 8.0 / 27.0)) ** 2


_MORGAN_EDGES = (1e-2, 1e2, 1e4, 1e7)
_MORGAN_C = (0.675, 1.02, 0.850, 0.480, 0.125)
_MORGAN_N = (0.058, 0.148, 0.188, 0.250, 0.333)


@correlation(
    geometry="hcyl", method="morgan", title="Morgan, horizontal cylinder, C Ra^n table",
    source="V.T. Morgan, The overall convective heat transfer from smooth circular cylinders, "
           "Advances in Heat Transfer 11 (1975) 199-264; Incropera et al., Fundamentals of Heat "
           "and Mass Transfer, 6th ed., eq. 9.33 and Table 9.1",
    equation="Nu = C Ra^n: (0.675, 0.058) 1e-10..1e-2; (1.02, 0.148) 1e-2..1e2; "
             "(0.850, 0.188) 1e2..1e4; (0.480, 0.250) 1e4..1e7; (0.125, 0.333) 1e7..1e12",
    validity=[Range("Ra", 1e-10, 1e12)],
    notes="Discontinuous at each band edge (at most 0.8%, at Ra = 1e7).")
def _hcyl_morgan(ra, pr):
    return _power_bands(ra, _MORGAN_EDGES, _MORGAN_C, _MORGAN_N)


@correlation(
    geometry="hcyl", method="kuehn-goldstein", title="Kuehn and Goldstein, horizontal cylinder, all Ra",
    source="T.H. Kuehn, R.J. Goldstein, Correlating equations for natural convection heat transfer "
           "between horizontal circular cylinders, Int. J. Heat Mass Transfer 19 (1976) 1127-1134; "
           "equation as transcribed in the ht library (C. Bell), "
           "ht.conv_free_immersed.Nu_horizontal_cylinder_Kuehn_Goldstein",
    equation="2/Nu = ln(1 + 2 / [ (0.518 Ra^(1/4) [1 + (0.559/Pr)^(3/5)]^(-5/12))^15 "
             "+ (0.1 Ra^(1/3))^15 ]^(1/15))",
    validity=[Range("Ra", 1e-10, 1e12), Range("Pr", low=0.7)],
    notes="The authors give it for all Ra except low-Pr fluids (as ht notes); the bounds here are "
          "ours: Ra as Morgan's table (1e-10 to 1e12), Pr >= 0.7 (gases and liquids).")
def _hcyl_kuehn_goldstein(ra, pr):
    laminar = 0.518 * ra ** 0.25 * (1.0 + (0.559 / pr) ** 0.6) ** (-5.0 / 12.0)
    turbulent = 0.1 * np.cbrt(ra)
    with np.errstate(divide="ignore"):  # Ra = 0: the conduction limit, Nu = 2/ln(inf) = 0
        return 2.0 / np.log1p(2.0 / (laminar ** 15 + turbulent ** 15) ** (1.0 / 15.0))


def nu_hcyl(ra: ArrayLike, pr: ArrayLike, method: str = "auto") -> FloatOrArray:
    """Nusselt number of a long horizontal cylinder (Ra on the diameter).

    Methods: churchill-chu (default), morgan.
    """
    return nusselt_value("hcyl", method, function_name="nu_hcyl", ra=ra, pr=pr)


# --------------------------------------------------------------------------------------------
# Sphere
# --------------------------------------------------------------------------------------------

define_geometry(Geometry(
    name="sphere", title="sphere", inputs=("ra", "pr"),
    length="diameter", length_doc="diameter, m",
    parameters=(Parameter("diameter", "m", "diameter (> 0)"),),
    description="Sphere, Ra on the diameter. Auto rule: churchill (Ra <= 1e11, Pr >= 0.7); "
                "outside that range churchill is still used, with the note.",
    auto={None: (AutoStep("churchill", when=()),)}))


@correlation(
    geometry="sphere", method="churchill", title="Churchill, sphere",
    source="S.W. Churchill, Free convection around immersed bodies, sec. 2.5.7 in Heat Exchanger "
           "Design Handbook, Hemisphere (1983); Incropera et al., Fundamentals of Heat and Mass "
           "Transfer, 6th ed., eq. 9.35",
    equation="Nu = 2 + 0.589 Ra^(1/4) / [1 + (0.469/Pr)^(9/16)]^(4/9)",
    validity=[Range("Ra", high=1e11), Range("Pr", low=0.7)])
def _sphere_churchill(ra, pr):
    return 2.0 + 0.589 * ra ** 0.25 / _churchill_pr_factor(pr, 0.469, 4.0 / 9.0)


def nu_sphere(ra: ArrayLike, pr: ArrayLike, method: str = "auto") -> FloatOrArray:
    """Nusselt number of a sphere (Ra on the diameter).  Method: churchill."""
    return nusselt_value("sphere", method, function_name="nu_sphere", ra=ra, pr=pr)


# --------------------------------------------------------------------------------------------
# Vertical cylinder (slenderness = height / diameter)
# --------------------------------------------------------------------------------------------

def _thin_cylinder_group(inputs):
    """(D/L) Gr_L^(1/4) with Gr = Ra/Pr: a cylinder acts as a plate where it is >= 35."""
    return (inputs["ra"] / inputs["pr"]) ** 0.25 / inputs["slenderness"]


#: Sparrow & Gregg's thin-cylinder criterion; auto hands over to popiel across (D/L) Gr^(1/4)
#: = 35 .. 70 where popiel is inside its range.
THIN_CYLINDER = Range("(D/L)*Gr^(1/4)", low=35.0, of=_thin_cylinder_group, band=2.0)

define_geometry(Geometry(
    name="vcyl", title="vertical cylinder", inputs=("ra", "pr", "slenderness"),
    length="height", length_doc="cylinder height, m",
    parameters=(Parameter("height", "m", "cylinder height (> 0)"),
                Parameter("diameter", "m", "outside diameter (> 0)")),
    description="Vertical cylinder, Ra on the height, slenderness = height/diameter. Auto rule: "
                "churchill-chu (the vertical-plate result) where the thin-cylinder criterion "
                "(D/L) Gr^(1/4) >= 35 holds and 0.1 <= Ra <= 1e12, then popiel (1.5e4 <= Ra <= "
                "1e9, slenderness <= 60, 0.01 <= Pr <= 100); the plate result hands over to "
                "popiel across (D/L) Gr^(1/4) = 35..70 (a factor 2 inside the criterion) where "
                "popiel is in range; outside both ranges the nearer is used, with the note. "
                + AUTO_PRINCIPLE,
    auto={None: (AutoStep("churchill-chu"), AutoStep("popiel"))}))


@correlation(
    geometry="vcyl", method="churchill-chu", title="Vertical plate (Churchill-Chu) for a thick vertical cylinder",
    source="Churchill and Chu (1975) vertical-plate equation, Incropera et al., 6th ed., eq. 9.26; "
           "applicable to a cylinder where D/L >= 35/Gr_L^(1/4): E.M. Sparrow, J.L. Gregg, "
           "Trans. ASME 78 (1956) 1823-1829, as quoted in Incropera et al., 6th ed., sec. 9.6.1",
    equation="Nu = Nu_vplate,churchill-chu(Ra, Pr), where (D/L) (Ra/Pr)^(1/4) >= 35",
    validity=[Range("Ra", 1e-1, 1e12), THIN_CYLINDER])
def _vcyl_churchill_chu(ra, pr, slenderness):
    return _vplate_churchill_chu(ra, pr)


@correlation(
    geometry="vcyl", method="popiel", title="Popiel, Wojtkowiak and Bober, slender vertical cylinder",
    source="C.O. Popiel, J. Wojtkowiak, K. Bober, Exp. Thermal Fluid Sci. 32 (2007) 607-613; Pr "
           "dependence of B and C from C.O. Popiel, Heat Transfer Eng. 29 (2008) 521-536; "
           "plate term Churchill-Chu (Incropera 6th ed. eq. 9.26); ranges from memory",
    equation="Nu = Nu_vplate,churchill-chu (1 + B [32^0.5 (L/D) / Gr^(1/4)]^C), Gr = Ra/Pr, "
             "B = 0.0571322 + 0.20305 Pr^-0.43, "
             "C = 0.9165 - 0.0043 Pr^0.5 + 0.01333 ln(Pr) + 0.0004809/Pr",
    validity=[Range("Ra", 1.5e4, 1e9), Range("slenderness", 0.0, 60.0), Range("Pr", 0.01, 100.0)])
def _vcyl_popiel(ra, pr, slenderness):
    b = 0.0571322 + 0.20305 * pr ** -0.43
    c = 0.9165 - 0.0043 * pr ** 0.5 + 0.01333 * np.log(pr) + 0.0004809 / pr
    with np.errstate(divide="ignore"):  # Ra = 0: no boundary layer, the curvature term is infinite
        curvature = np.sqrt(32.0) * slenderness / (ra / pr) ** 0.25
    return _vplate_churchill_chu(ra, pr) * (1.0 + b * curvature ** c)


# The vertical-cylinder correlations of the literature's review (Morgan 1975; Popiel 2008;
# Boetcher 2014), each for the data's own Ra range: the spread of the trade's correlations.  The
# equations and ranges as transcribed with their references in the ht library (C. Bell,
# ht.conv_free_immersed, Nu_vertical_cylinder_*), read there; they are checked against it to
# 1e-9 in tests/test_external.py.  Ra and Nu on the height; a named method keeps its published
# step between bands (an edge value belongs to the lower band, as published "Ra > edge").
_VCYL_REVIEW = ("as reviewed by V.T. Morgan, Advances in Heat Transfer 11 (1975) 199-264, "
                "C.O. Popiel, Heat Transfer Eng. 29 (2008) 521-536 and S.K.S. Boetcher, Natural "
                "Convection from Circular Cylinders, Springer (2014) 23-42; equation and range as "
                "transcribed in the ht library (C. Bell), ht.conv_free_immersed")


@correlation(
    geometry="vcyl", method="mcadams", title="McAdams (Weise, Saunders), vertical cylinder as a plate",
    source="R. Weise, Forsch. Ing.-Wes. A 6 (1935) 281-292; O.A. Saunders, Proc. R. Soc. A 157 "
           "(1936) 278-291; W.H. McAdams, Heat Transmission, 3rd ed. (1954); " + _VCYL_REVIEW,
    equation="Nu = 0.59 Ra^(1/4) (1e4 < Ra <= 1e9); 0.13 Ra^(1/3) (1e9 < Ra < 1e12)",
    validity=[Range("Ra", 1e4, 1e12)])
def _vcyl_mcadams(ra, pr, slenderness):
    return _power_bands(ra, (1e9,), (0.59, 0.13), (0.25, 1.0 / 3.0))


@correlation(
    geometry="vcyl", method="jakob-linke", title="Jakob and Linke, vertical cylinder in air",
    source="M. Jakob, W. Linke, Phys. Z. 36 (1935) 267-280, correlated by Morgan (1975); " + _VCYL_REVIEW,
    equation="Nu = 0.555 Ra^(1/4) (1e4 < Ra <= 1e8); 0.129 Ra^(1/3) (1e8 < Ra < 1e12)",
    validity=[Range("Ra", 1e4, 1e12)],
    notes="Air; one cylinder of 3.5 cm diameter, L/D = 4.3.")
def _vcyl_jakob_linke(ra, pr, slenderness):
    return _power_bands(ra, (1e8,), (0.555, 0.129), (0.25, 1.0 / 3.0))


@correlation(
    geometry="vcyl", method="griffiths-davis", title="Griffiths and Davis, vertical cylinder in air",
    source="E. Griffiths, A.H. Davis, The Transmission of Heat by Radiation and Convection, HMSO "
           "(1922), correlated by Morgan (1975); " + _VCYL_REVIEW,
    equation="Nu = 0.67 Ra^(1/4) (1e7 < Ra <= 1e9); 0.0782 Ra^0.357 (1e9 < Ra < 1e11)",
    validity=[Range("Ra", 1e7, 1e11), Range("slenderness", 0.26, 15.2)],
    notes="Air; a cylinder of 17.43 cm diameter, 4.65 to 263.5 cm long (L/D 0.27 to 15.1).")
def _vcyl_griffiths_davis(ra, pr, slenderness):
    return _power_bands(ra, (1e9,), (0.67, 0.0782), (0.25, 0.357))


@correlation(
    geometry="vcyl", method="carne", title="Carne, vertical cylinder in air",
    source="J.B. Carne, Phil. Mag. 24 (1937) 634-653, correlated by Morgan (1975); " + _VCYL_REVIEW,
    equation="Nu = 1.07 Ra^0.28 (2e6 < Ra <= 2e8); 0.152 Ra^0.38 (2e8 < Ra < 2e11)",
    validity=[Range("Ra", 2e6, 2e11), Range("slenderness", 8.0, 127.0)],
    notes="Cylinders of 0.475 to 7.62 cm diameter, L/D 8 to 127.")
def _vcyl_carne(ra, pr, slenderness):
    return _power_bands(ra, (2e8,), (1.07, 0.152), (0.28, 0.38))


@correlation(
    geometry="vcyl", method="kreith-eckert", title="Kreith (Eckert and Jackson), vertical cylinder as a plate",
    source="E.R.G. Eckert, T.W. Jackson, NACA Report 1015 / TN 2207 (1950); F. Kreith, R. Manglik, "
           "M. Bohn, Principles of Heat Transfer (2010); " + _VCYL_REVIEW,
    equation="Nu = 0.555 Ra^(1/4) (1e5 < Ra <= 1e9); 0.021 Ra^0.4 (1e9 < Ra < 1e12)",
    validity=[Range("Ra", 1e5, 1e12)])
def _vcyl_kreith_eckert(ra, pr, slenderness):
    return _power_bands(ra, (1e9,), (0.555, 0.021), (0.25, 0.4))


@correlation(
    geometry="vcyl", method="hanesian-kalish", title="Hanesian and Kalish, vertical cylinder, laminar",
    source="D. Hanesian, R. Kalish, IEEE Trans. Parts, Materials and Packaging 6 (1970) 147-148, "
           "correlated by Morgan (1975); " + _VCYL_REVIEW,
    equation="Nu = 0.48 Ra^0.23",
    validity=[Range("Ra", 1e6, 1e8)],
    notes="Air and fluorocarbon gases; laminar range only.")
def _vcyl_hanesian_kalish(ra, pr, slenderness):
    return 0.48 * ra ** 0.23


@correlation(
    geometry="vcyl", method="touloukian", title="Touloukian, Hawkins and Jakob, vertical cylinder in liquids",
    source="Y.S. Touloukian, G.A. Hawkins, M. Jakob, Trans. ASME 70 (1948) 13-18, correlated by "
           "Morgan (1975); " + _VCYL_REVIEW,
    equation="Nu = 0.726 Ra^(1/4) (2e8 < Ra <= 4e10); 0.0674 (Gr Pr^1.29)^(1/3) (4e10 < Ra < 9e11), "
             "Gr = Ra/Pr",
    validity=[Range("Ra", 2e8, 9e11), Range("Pr", 2.0, 200.0)],
    notes="Water and ethylene glycol on a 2.75 in cylinder 6 to 36.25 in high.  The Pr range "
          "(the two liquids' over the tests' temperatures) is ours, from memory: unverified.")
def _vcyl_touloukian(ra, pr, slenderness):
    return where(ra > 4e10, 0.0674 * np.cbrt(ra * pr ** 0.29), 0.726 * ra ** 0.25)


@correlation(
    geometry="vcyl", method="eigenson", title="Eigenson, vertical cylinder in diatomic gases",
    source="L. Eigenson, Dokl. Akad. Nauk SSSR 26 (1940) 440-444, correlated by Morgan (1975); "
           "the transition band as given by Boetcher (2014); " + _VCYL_REVIEW,
    equation="Nu = 0.48 Ra^(1/4) (Ra <= 1e9); 51.5 + 0.0000726 Ra^0.63 (1e9 < Ra <= 1.69e10); "
             "0.148 Ra^(1/3) - 127.6 (Ra > 1.69e10)",
    validity=[Range("Ra", high=1e12), Range("slenderness", 40.0, 1050.0)],
    notes="Air; 2.5 m high cylinders of 2.4 to 50 mm diameter and one of 58 mm, 6.5 m high "
          "(L/D about 43 to 1040).  The lower Ra limit is not stated; the upper (1e12) is ours.")
def _vcyl_eigenson(ra, pr, slenderness):
    return where(ra > 1.69e10, 0.148 * np.cbrt(ra) - 127.6,
                 where(ra > 1e9, 51.5 + 0.0000726 * ra ** 0.63, 0.48 * ra ** 0.25))


def _diameter_grashof(inputs):
    """Gr on the diameter, Gr_D = Gr_H (D/H)^3 = (Ra/Pr) / slenderness^3."""
    return inputs["ra"] / inputs["pr"] / inputs["slenderness"] ** 3


@correlation(
    geometry="vcyl", method="al-arabi-khamis", title="Al-Arabi and Khamis, vertical cylinder in air",
    source="M. Al-Arabi, M. Khamis, Int. J. Heat Mass Transfer 25 (1982) 3-15; " + _VCYL_REVIEW,
    equation="Nu = 2.9 Ra^(1/4) / Gr_D^(1/12) (9.88e7 <= Ra <= 2.7e9); 0.47 Ra^(1/3) / Gr_D^(1/12) "
             "(2.7e9 < Ra <= 2.95e10); Gr_D = Gr (D/H)^3",
    validity=[Range("Ra", 9.88e7, 2.95e10), Range("Gr_D", 1.08e4, 6.9e5, of=_diameter_grashof)],
    notes="Air; D 12.75 to 51 mm, H 300 to 2000 mm, walls held isothermal by condensing steam.  "
          "ht's code switches bands at Ra = 2.6e9 while its equations state 2.7e9; the stated "
          "2.7e9 is used here (the paper itself was not read).")
def _vcyl_al_arabi_khamis(ra, pr, slenderness):
    gr_d = ra / pr / slenderness ** 3
    return where(ra > 2.7e9, 0.47 * np.cbrt(ra), 2.9 * ra ** 0.25) / gr_d ** (1.0 / 12.0)


def nu_vcyl(ra: ArrayLike, pr: ArrayLike, slenderness: ArrayLike, method: str = "auto") -> FloatOrArray:
    """Nusselt number of a vertical cylinder (Ra on the height; slenderness = height/diameter).

    Methods: churchill-chu (the plate result, for thick cylinders), popiel (slender cylinders).
    """
    return nusselt_value("vcyl", method, function_name="nu_vcyl", ra=ra, pr=pr, slenderness=slenderness)


# --------------------------------------------------------------------------------------------
# Docstrings of the public functions, from the registry (methods, equations, ranges, sources)
# --------------------------------------------------------------------------------------------

_NU = ("float or ndarray", "Nusselt number on the geometry's length (-): a float for scalar inputs, "
       "an array of the broadcast shape otherwise.")
document(nu_vplate, "vplate", "Nusselt number of a vertical plate in still fluid, Ra on its height.",
         nusselt_parameters("vplate"), _NU, ">>> round(nu_vplate(1e8, 0.71), 2)\n61.07")
document(nu_hplate, "hplate", "Nusselt number of a horizontal plate, Ra on area/perimeter, for one case.",
         nusselt_parameters("hplate", case=True), _NU, '>>> round(nu_hplate(1e6, 0.71, "hot-up"), 2)\n17.08')
document(nu_tplate, "tplate", "Nusselt number of a plate tilted from the vertical, for one case.",
         nusselt_parameters("tplate", "Tilt from the vertical in degrees, 0 (vertical) to 90 (horizontal).",
                            case=True), _NU,
         '>>> round(nu_tplate(1e8, 0.71, 30.0, "hot-down"), 2)\n58.5')
document(nu_hcyl, "hcyl", "Nusselt number of a long horizontal cylinder, Ra on the diameter.",
         nusselt_parameters("hcyl"), _NU, ">>> round(nu_hcyl(1e6, 0.71), 2)\n14.54")
document(nu_sphere, "sphere", "Nusselt number of a sphere, Ra on the diameter.",
         nusselt_parameters("sphere"), _NU, ">>> round(nu_sphere(1e6, 0.71), 2)\n16.37")
document(nu_vcyl, "vcyl", "Nusselt number of a vertical cylinder, Ra on its height.",
         nusselt_parameters("vcyl"), _NU, ">>> round(nu_vcyl(1e6, 0.71, 10.0), 2)\n24.16")
