"""External natural convection: plates, cylinders and spheres in a large still fluid.

Ra is based on the geometry's own length: plate height (vertical plate), area/perimeter
(horizontal plate), diameter (cylinder, sphere).  Properties at the film temperature.
No conduction floor applies: Nu based on an arbitrary length may be below 1.
"""

from __future__ import annotations

import numpy as np

from .correlations import Geometry, correlation, define_geometry, nusselt_value
from .validity import Range

__all__ = ["nu_vplate"]

define_geometry(Geometry(
    name="vplate", inputs=("ra", "pr"), description="vertical plate, Ra on the height",
    auto_order={None: ("churchill-chu",)}, fallback={None: "churchill-chu"}))


def _churchill_pr_factor(pr, constant, exponent):
    """Churchill's Prandtl function [1 + (c/Pr)^(9/16)]^exponent, shared by his correlations."""
    return (1.0 + (constant / pr) ** (9.0 / 16.0)) ** exponent


@correlation(
    geometry="vplate", method="churchill-chu", title="Churchill and Chu, vertical plate, all Ra",
    source="S.W. Churchill, H.H.S. Chu, Int. J. Heat Mass Transfer 18 (1975) 1323-1329, eq. (4); "
           "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 9.26",
    equation="Nu = {0.825 + 0.387 Ra^(1/6) / [1 + (0.492/Pr)^(9/16)]^(8/27)}^2",
    validity=[Range("Ra", 1e-1, 1e12)])
def _vplate_churchill_chu(ra, pr):
    return (0.825 + 0.387 * ra ** (1.0 / 6.0) / _churchill_pr_factor(pr, 0.492, 8.0 / 27.0)) ** 2


def nu_vplate(ra, pr, method="auto"):
    """Nusselt number of a vertical plate (Ra on its height), by ``method`` or "auto"."""
    return nusselt_value("vplate", method, function_name="nu_vplate", ra=ra, pr=pr)
