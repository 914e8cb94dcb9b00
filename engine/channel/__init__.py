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

Layout: :mod:`.walls` (the geometry, its correlations, nu_channel, channel_convection,
h_channel), :mod:`.spacing` (the optimum spacing), :mod:`.heatsink` (plate-fin heat sinks).
Everything is imported from ``stillair.channel``.
"""

from __future__ import annotations

# Besides the public names (__all__), the package keeps importable the ones the tests use.
from .heatsink import HeatSinkResult, _fin_efficiency, heatsink, heatsink_q, heatsink_tbase
from .spacing import channel_spacing, optimum_elenbaas
from .walls import (BAR_COHEN_ROHSENOW, CHANNEL, CHANNEL_CASES, CHANNEL_OPTIMA, FIN_TIPS, FLUX_CASES,
                    PLATE_OPTIMUM_FRACTION, channel_convection, fully_developed_limit, h_channel,
                    isolated_plate_limit, nu_channel)

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

# The public functions are documented, and their examples run, as stillair.channel.<name>: their
# home for users, whichever module of the package defines them.
_PUBLIC_FUNCTIONS = (nu_channel, channel_convection, h_channel, channel_spacing, optimum_elenbaas, heatsink,
                     heatsink_q, heatsink_tbase)
for _function in _PUBLIC_FUNCTIONS:
    _function.__module__ = __name__
__test__ = {function.__name__: function for function in _PUBLIC_FUNCTIONS}
