"""The correlation registry: one mechanism for every Nusselt correlation.

A correlation is a small pure function of numpy arrays, registered with :func:`correlation`
together with its source, its equation, its validity ranges and the cases it serves.  Everything
else is done here once for all of them:

* argument checking (Ra >= 0, Pr > 0, aspect > 0, tilt in [0, 180], case names),
* broadcasting of array arguments and scalar results for scalar inputs,
* the conduction floor Nu >= 1 where the geometry has one (cavities),
* the validity check against the published ranges, with a note naming the bound crossed,
* the "auto" rule: the geometry's ordered steps, each taking its continuous coverage of what
  the earlier steps left (linear across a transition band inside each published bound), so
  the value passes from one correlation to the next without a step; the last step takes the
  rest, with the note where it is out of range.

Geometries and their inputs (all lower-case keyword arguments of the registered functions):

=========  =======================================  ==============================================
geometry   inputs                                   case
=========  =======================================  ==============================================
vplate     ra, pr                                   --
hplate     ra, pr                                   hot-up, hot-down, cold-up, cold-down
tplate     ra, pr, tilt (deg from vertical)         hot-up, hot-down, cold-up, cold-down
hcyl       ra, pr                                   --
sphere     ra, pr                                   --
vcyl       ra, pr, slenderness (height/diameter)    --
cavity     ra, pr, aspect (height/gap), tilt (deg   --
           from horizontal, 0 heated from below)
channel    ra (Ra*_S on the wall flux for the       isothermal, isothermal-adiabatic, flux,
           flux cases), pr, aspect (height/spacing) flux-adiabatic
=========  =======================================  ==============================================

Ra is always based on the geometry's own length (plate height, area/perimeter, diameter, gap).

Layout: :mod:`.types` (AutoStep, Parameter, Geometry, Correlation, NusseltResult),
:mod:`.registry` (registration and look-up), :mod:`.single` (one named correlation evaluated),
:mod:`.auto` (the auto rule, once for scalars and arrays), :mod:`.evaluate` (:func:`nusselt`,
the checks, the scalar path, the flux cases), :mod:`.spread` (:func:`nu_spread`), :mod:`.docs`
(docstrings from the registry).  Everything is imported from ``stillair.correlations``.
"""

from __future__ import annotations

# Besides the public names (__all__), the package keeps importable the mechanisms the other engine
# modules use (nusselt_checked, nusselt_parameters, uniform, the plate case groups ...).
from .docs import INPUT_DOCS, document, methods_section, nusselt_parameters
from .evaluate import (merge_masked, nusselt, nusselt_at_difference, nusselt_at_difference_checked,
                       nusselt_checked, nusselt_plain, nusselt_value)
from .registry import CORRELATIONS, GEOMETRIES, correlation, define_geometry, get_correlation, methods_for
from .spread import NusseltSpread, nu_spread
from .types import (AUTO_PRINCIPLE, PLATE_CASES, STABLE_CASES, UNSTABLE_CASES, AutoStep, Correlation, Geometry,
                    NusseltResult, Parameter, uniform)

__all__ = [
    "Correlation",
    "Geometry",
    "AutoStep",
    "Parameter",
    "NusseltResult",
    "GEOMETRIES",
    "CORRELATIONS",
    "correlation",
    "define_geometry",
    "get_correlation",
    "methods_for",
    "nusselt",
    "nusselt_value",
    "nusselt_at_difference",
    "merge_masked",
    "PLATE_CASES",
    "NusseltSpread",
    "nu_spread",
    "document",
    "methods_section",
]


# The public functions are documented, and their examples run, as stillair.correlations.<name>:
# their home for users, whichever module of the package defines them.
_PUBLIC_FUNCTIONS = (correlation, define_geometry, get_correlation, methods_for, nusselt, nusselt_value,
                     nusselt_at_difference, merge_masked, nu_spread, document, methods_section)
for _function in _PUBLIC_FUNCTIONS:
    _function.__module__ = __name__
__test__ = {function.__name__: function for function in _PUBLIC_FUNCTIONS}
