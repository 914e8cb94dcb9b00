"""Wind on exposed surfaces: forced convection and its combination with natural convection.

The forced-convection correlations are registered in :mod:`stillair.correlations` as geometries
of their own (inputs Re and Pr), with source, equation and validity as data, exactly as the
natural-convection ones; they are not called alone by the public functions but through
:func:`wind_convection`, which every exposed-surface coefficient (``h_vplate`` ... ``h_sphere``
with ``wind=``) and the network's convection branches with a wind column share.

Natural (N) and forced (F) convection are combined in Churchill and Usagi's form

    Nu^n = Nu_N^n + Nu_F^n,  n = 3,

written on coefficients, h^n = h_N^n + h_F^n (the same thing with both Nusselt numbers on one
length), because each part keeps its own length: the buoyancy length of the natural
correlation (plate height, area/perimeter, diameter) and the length along the wind of the
forced one (the plate's extent along the wind, the diameter of a cylinder or sphere).

The wind is taken horizontal, so on every geometry here it is transverse to buoyancy (a vertical
plate or cylinder, a horizontal plate, a horizontal cylinder in cross-flow, a sphere) or, on a
tilted plate, blowing up or down its slope: the sum with n = 3 is used throughout.  Opposing
flow (the forced flow against the buoyant one, Nu^3 = |Nu_F^3 - Nu_N^3| in the same source) is
not offered: it needs the wind's direction relative to the slope, which a wind speed does not
give, and it can fall below either part.

Wind 0 is still air exactly: the forced part is left out, not added as zero (Churchill and
Bernstein's 0.3 and Whitaker's 2 are conduction limits that the natural correlations already
hold), so the still-air value is returned bit for bit.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ._select import where
from .correlations import AUTO_PRINCIPLE, AutoStep, Geometry, correlation, define_geometry
from .validity import Range

__all__ = ["MIXING_EXPONENT", "MIXING_SOURCE", "MIXING_EQUATION", "WindFlow", "WIND_FLOWS",
           "combine_mixed", "wind_notes"]

#: Churchill and Usagi's exponent for assisting and transverse flows.
MIXING_EXPONENT = 3.0
MIXING_SOURCE = (
    "S.W. Churchill, R. Usagi, AIChE J. 18 (1972) 1121-1128 (the form); S.W. Churchill, AIChE J. 23 "
    "(1977) 10-16 (n = 3 for assisting and transverse flows; both citations from memory); as recommended in Incropera et al., "
    "Fundamentals of Heat and Mass Transfer, 6th ed., eq. 9.66 (from memory; the text adds that 3.5 "
    "and 4 may suit transverse flows over horizontal plates and over cylinders or spheres: not used)")
MIXING_EQUATION = "Nu^3 = Nu_N^3 + Nu_F^3 (on one length), i.e. h = (h_N^3 + h_F^3)^(1/3)"


def combine_mixed(h_natural, h_forced):
    """Churchill-Usagi sum (h_N^n + h_F^n)^(1/n), n = :data:`MIXING_EXPONENT`, formed on the
    ratios to the larger part so that neither cube under- or overflows (a tiny part must not
    turn the sum into 0)."""
    n = MIXING_EXPONENT
    larger = np.maximum(h_natural, h_forced)
    with np.errstate(divide="ignore", invalid="ignore"):   # 0/0 where both are 0: where() keeps 0
        summed = larger * ((h_natural / larger) ** n + (h_forced / larger) ** n) ** (1.0 / n)
    # both 0: 0; an infinite part (a correlation's Ra = 0 limit, Popiel's): infinite
    return where((larger > 0.0) & (larger < np.inf), summed, larger)


# --------------------------------------------------------------------------------------------
# Flat plate in parallel flow (Re on the length along the wind)
# --------------------------------------------------------------------------------------------

#: The critical Reynolds number of the mixed boundary layer; 871 = 0.037 Re_c^0.8 - 0.664 Re_c^0.5.
PLATE_CRITICAL_RE = 5e5
#: The published bound Re_c of both forms carries no transition band (band=1: a switch): the two
#: forms meet there within 0.1 %, while a band inside either bound would read the mixed form
#: below Re_c, where it falls away steeply (a 1 % dip), or hand the laminar form past it.
_PLATE_SWITCH_BAND = 1.0

define_geometry(Geometry(
    name="plate-flow", title="flat plate in parallel flow (wind)", inputs=("re", "pr"),
    length="wind_length", length_doc="length of the plate along the wind, m",
    description="Flat plate in a parallel flow, Re on the length along the flow, properties at the "
                "film temperature. Auto rule: pohlhausen (laminar boundary layer) up to Re = 5e5, "
                "mixed-boundary-layer above it; the two meet within 0.1 % at 5e5, where auto "
                "switches from one to the other (their common bound has no transition band). " + AUTO_PRINCIPLE,
    auto={None: (AutoStep("pohlhausen"), AutoStep("mixed-boundary-layer"))}))


@correlation(
    geometry="plate-flow", method="pohlhausen", title="Laminar boundary layer on a flat plate, average Nu",
    source="E. Pohlhausen, Z. Angew. Math. Mech. 1 (1921) 115-121 (from memory); Incropera et al., "
           "Fundamentals of Heat and Mass Transfer, 6th ed., eq. 7.30 (laminar, Pr >= 0.6); the same form "
           "in Baehr and Stephan, Heat and Mass Transfer (as implemented in ht)",
    equation="Nu = 0.664 Re^(1/2) Pr^(1/3)",
    validity=[Range("Re", high=PLATE_CRITICAL_RE, band=_PLATE_SWITCH_BAND), Range("Pr", low=0.6)])
def _plate_pohlhausen(re, pr):
    return 0.664 * re ** 0.5 * pr ** (1.0 / 3.0)


@correlation(
    geometry="plate-flow", method="mixed-boundary-layer",
    title="Flat plate, laminar then turbulent boundary layer (Re_c = 5e5), average Nu",
    source="Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eqs. 7.38 and 7.39 "
           "(turbulent part after Schlichting's 0.0296 Re_x^(4/5) Pr^(1/3), eq. 7.36; equation numbers "
           "and ranges from memory)",
    equation="Nu = (0.037 Re^(4/5) - 871) Pr^(1/3)",
    validity=[Range("Re", PLATE_CRITICAL_RE, 1e8, band=_PLATE_SWITCH_BAND), Range("Pr", 0.6, 60.0)],
    notes="871 = 0.037 Re_c^(4/5) - 0.664 Re_c^(1/2) at Re_c = 5e5: the laminar value is carried to "
          "the transition point.  Below Re_c the formula has no meaning (it goes negative near 1e5).")
def _plate_mixed_boundary_layer(re, pr):
    return (0.037 * re ** 0.8 - 871.0) * pr ** (1.0 / 3.0)


# --------------------------------------------------------------------------------------------
# Circular cylinder in cross-flow (Re on the diameter)
# --------------------------------------------------------------------------------------------

def _peclet(inputs):
    return inputs["re"] * inputs["pr"]


define_geometry(Geometry(
    name="cylinder-crossflow", title="circular cylinder in cross-flow (wind)", inputs=("re", "pr"),
    length="diameter", length_doc="outside diameter, m",
    description="Long circular cylinder with the flow across its axis, Re on the diameter, properties "
                "at the film temperature. Auto rule: churchill-bernstein (valid for Re Pr >= 0.2); "
                "outside that range churchill-bernstein is still used, with the note.",
    auto={None: (AutoStep("churchill-bernstein", when=()),)}))


@correlation(
    geometry="cylinder-crossflow", method="churchill-bernstein",
    title="Churchill and Bernstein, cylinder in cross-flow, all Re",
    source="S.W. Churchill, M. Bernstein, J. Heat Transfer 99 (1977) 300-306; Incropera et al., "
           "Fundamentals of Heat and Mass Transfer, 6th ed., eq. 7.54 (Re Pr >= 0.2, properties at "
           "the film temperature)",
    equation="Nu = 0.3 + 0.62 Re^(1/2) Pr^(1/3) / [1 + (0.4/Pr)^(2/3)]^(1/4) "
             "[1 + (Re/282000)^(5/8)]^(4/5)",
    validity=[Range("Re*Pr", low=0.2, of=_peclet)])
def _cylinder_churchill_bernstein(re, pr):
    return 0.3 + (0.62 * re ** 0.5 * pr ** (1.0 / 3.0) / (1.0 + (0.4 / pr) ** (2.0 / 3.0)) ** 0.25
                  * (1.0 + (re / 282000.0) ** 0.625) ** 0.8)


# --------------------------------------------------------------------------------------------
# Sphere (Re on the diameter)
# --------------------------------------------------------------------------------------------

define_geometry(Geometry(
    name="sphere-flow", title="sphere in a uniform flow (wind)", inputs=("re", "pr"),
    length="diameter", length_doc="diameter, m",
    description="Sphere in a uniform flow, Re on the diameter, properties at the film temperature. "
                "Auto rule: whitaker (valid for 3.5 <= Re <= 7.6e4, 0.70 <= Pr <= 380); outside that "
                "range whitaker is still used, with the note.",
    auto={None: (AutoStep("whitaker", when=()),)}))


@correlation(
    geometry="sphere-flow", method="whitaker", title="Whitaker, sphere in a uniform flow",
    source="S. Whitaker, AIChE J. 18 (1972) 361-371; Incropera et al., Fundamentals of Heat and Mass "
           "Transfer, 6th ed., eq. 7.56 (ranges from memory)",
    equation="Nu = 2 + (0.4 Re^(1/2) + 0.06 Re^(2/3)) Pr^0.4, the viscosity ratio (mu/mu_s)^(1/4) "
             "taken as 1",
    validity=[Range("Re", 3.5, 7.6e4), Range("Pr", 0.70, 380.0)],
    notes="Published for 0.71 <= Pr <= 380, 0.71 being air's Prandtl number rounded: the lower bound "
          "is read as 0.70 so that air itself (0.70-0.71 at outdoor film temperatures) is inside.  "
          "Whitaker takes the properties at the free-stream temperature with the factor "
          "(mu/mu_s)^(1/4); here, as for every wind correlation, at the film temperature with the "
          "factor 1 (for air 60 K above or below the fluid the factor is within about 3 % of 1).")
def _sphere_whitaker(re, pr):
    return 2.0 + (0.4 * re ** 0.5 + 0.06 * re ** (2.0 / 3.0)) * pr ** 0.4


# --------------------------------------------------------------------------------------------
# Which flow each exposed surface sees in a wind
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class WindFlow:
    """The forced flow over one natural-convection geometry in a horizontal wind.

    ``geometry`` is the forced geometry of the registry; ``along`` says where its length comes
    from: "wind_length" (a plate: the length along the wind, blank = the buoyancy length unless
    ``wind_length_required``), "length" (the geometry's own length: the diameter of a horizontal
    cylinder or a sphere) or "diameter" (the vertical cylinder's diameter parameter).
    """

    geometry: str
    along: str
    arrangement: str
    wind_length_required: bool = False


WIND_FLOWS = {
    "vplate": WindFlow("plate-flow", "wind_length", "horizontal wind along the face, transverse to "
                                                    "the rising flow"),
    "hplate": WindFlow("plate-flow", "wind_length", "horizontal wind along the face, transverse to "
                                                    "the buoyant plume", wind_length_required=True),
    "tplate": WindFlow("plate-flow", "wind_length", "wind along the face (up or down the slope or "
                                                    "across it), taken as transverse"),
    "hcyl": WindFlow("cylinder-crossflow", "length", "horizontal wind across the axis, transverse to "
                                                     "the rising flow"),
    "vcyl": WindFlow("cylinder-crossflow", "diameter", "horizontal wind across the axis, transverse "
                                                       "to the rising flow"),
    "sphere": WindFlow("sphere-flow", "length", "horizontal wind, transverse to the rising flow"),
}


def wind_notes(geometry: str) -> str:
    """The wind paragraph of an h function's Notes: the forced correlation(s) with their
    equation, validity and source, and the combination (from the registry)."""
    from .correlations import CORRELATIONS, GEOMETRIES

    flow = WIND_FLOWS[geometry]
    forced = GEOMETRIES[flow.geometry]
    lines = [f"With ``wind`` > 0 ({flow.arrangement}), forced convection over the {forced.title} is "
             f"combined with the natural value: {MIXING_EQUATION}. Source: {MIXING_SOURCE}. "
             f"{forced.description}"]
    for method in forced.methods:
        corr = CORRELATIONS[(forced.name, method)]
        lines.append(f"Wind method ``{method}``: {corr.title}. Equation: {corr.equation}. Valid: "
                     f"{corr.describe_validity()}. Source: {corr.source}.")
    lines.append("Wind 0 (the default) is still air: the value above, bit for bit.")
    return "\n\n".join(lines)


def forced_length(flow: WindFlow, length, *, wind_length=None, diameter=None):
    """The length the forced correlation reads (m), from the natural call's lengths."""
    if flow.along == "diameter":
        return diameter
    if flow.along == "length" or wind_length is None:
        return length
    return wind_length

