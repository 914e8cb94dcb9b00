"""What a hand-typed formula may compute: the forms the hand check tests a formula against.

A form is a function of named roles (Ra, Pr, a length, two temperatures ...), vectorised over
numpy arrays, with what it is in words.  Three families:

* every registered correlation of every geometry (:data:`stillair.correlations.CORRELATIONS`),
  case by case, and each published band of a piecewise one (``Correlation.forms``): read from
  the registry, never retyped here;
* the dimensionless groups and the coefficients built from them, as their definitions
  (Gr, Ra in its usual written forms, Pr, Nu = hL/k, h = Nu k/L, the convective heat flow);
* radiation (the grey exchange and its linearised coefficient, Stefan-Boltzmann constant and
  0 degC from :mod:`stillair.constants`), conduction and resistances.

Some forms are themselves a mistake practitioners make (beta = 1/T with T in degC, the
fourth powers of Celsius temperatures): a cell matching one of those is recognised and flagged.

Roles carry a plausibility class (:data:`ROLE_CLASS`): an assignment of a cell's inputs to roles
is tried only where every input's value is plausible for its role, which both bounds the search
and keeps a product of two numbers from being "recognised" as whatever has that shape.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from stillair.constants import STANDARD_GRAVITY, STEFAN_BOLTZMANN as SIGMA, ZERO_CELSIUS

__all__ = ["Form", "FORMS", "forms", "ROLE_CLASS", "plausible", "CLASS_WORDS", "with_typed",
           "WEAK"]

# Plausible values of the inputs of each class (still-air work, SI units, temperatures in degC).
# Bounds are generous: they only keep absurd assignments out of the search.
_CLASS_RANGES = {
    "temperature": (-150.0, 1500.0),
    "difference": (-1500.0, 1500.0),
    "length": (1e-5, 200.0),
    "area": (1e-8, 1e5),
    "kinvisc": (1e-7, 1e-2),
    "diffusivity": (1e-7, 1e-2),
    "conductivity": (1e-3, 0.5),        # a gas
    "solid_conductivity": (1e-3, 500.0),
    "expansion": (1e-5, 1.0),         # 1/T in degC included (a mistake we report)
    "rayleigh": (1e-6, 1e20),
    "reynolds": (1e-3, 1e9),            # the wind's forced correlations (stillair.forced)
    "prandtl": (0.5, 20.0),
    "nusselt": (0.05, 1e5),
    "coefficient": (0.01, 5000.0),      # h, W/(m2 K)
    "emissivity": (0.005, 1.0),
    "aspect": (0.01, 1e4),
    "slenderness": (0.01, 1e4),
    "tilt": (0.0, 180.0),
    "resistance": (1e-9, 1e9),          # K/W
}

CLASS_WORDS = {"temperature": "temperature", "length": "length", "area": "area",
               "kinvisc": "kinematic viscosity", "diffusivity": "thermal diffusivity",
               "conductivity": "thermal conductivity", "expansion": "expansion coefficient",
               "prandtl": "Prandtl number", "coefficient": "coefficient"}

ROLE_CLASS = {
    "t1": "temperature", "t2": "temperature", "tb": "temperature", "dt": "difference",
    "length": "length", "area": "area", "thickness": "length",
    "kinvisc": "kinvisc", "diffusivity": "diffusivity", "conductivity": "conductivity",
    "solid_conductivity": "solid_conductivity", "expansion": "expansion",
    "ra": "rayleigh", "re": "reynolds", "pr": "prandtl", "nusselt": "nusselt", "h": "coefficient",
    "eps": "emissivity", "eps1": "emissivity", "eps2": "emissivity",
    "aspect": "aspect", "slenderness": "slenderness", "tilt": "tilt",
    "r1": "resistance", "r2": "resistance", "r3": "resistance", "h2": "coefficient",
    "outer": "length", "inner": "length",
}


# A form that is a degC mistake (1/T, T^4 of Celsius temperatures) is that mistake only where
# the temperatures are Celsius: above this (as kelvin, -123 degC) they may be a sheet kept in
# kelvin, where the same arithmetic is right.
CELSIUS_CEILING = 150.0


def plausible(role: str, values: np.ndarray, celsius: bool = False) -> np.ndarray:
    """Whether each value is plausible for ``role`` (a zero difference never is); ``celsius``:
    a temperature must also read as degC (below :data:`CELSIUS_CEILING`)."""
    kind = ROLE_CLASS[role]
    low, high = _CLASS_RANGES[kind]
    ok = (values >= low) & (values <= high) & np.isfinite(values)
    if kind == "difference":
        ok &= values != 0
    if celsius and kind == "temperature":
        ok &= values < CELSIUS_CEILING
    return ok


@dataclass(frozen=True)
class Form:
    """One thing a formula may compute."""

    name: str                       # "rayleigh", "correlation"...
    title: str                      # what the cell is, in words, for the report
    roles: tuple[str, ...]
    function: Callable[..., np.ndarray]
    quantity: str                   # "Ra", "Gr", "Pr", "Nu", "h", "q", "beta", "R", "hrad"
    mistake: str | None = None      # this form is itself a mistake: the reason
    geometry: str | None = None     # correlations: the registry's key and case
    method: str | None = None
    case: str | None = None
    band: str | None = None         # one published band of a piecewise correlation
    fixed: dict = field(default_factory=dict)   # roles the form fixes (tilt 90 for a layer)
    inline: tuple[str, ...] = ()    # roles whose value is a number typed in the formula
    base: "Form | None" = None      # the form before a role was fixed to a typed number
    # Roles whose inputs must be cells recognised as one of these quantities for the form to
    # count: a sum of two numbers is a series resistance only when both are resistances.
    context: dict = field(default_factory=dict)


def with_typed(form: Form, role: str, value: float) -> Form:
    """``form`` with ``role`` taken as a number typed in the formula itself (Pr = 0.71 written
    into a correlation): the roles left are the formula's cell inputs."""
    def function(**inputs):
        shape = np.shape(next(iter(inputs.values())))
        return form.function(**inputs, **{role: np.full(shape, value)})

    return Form(form.name, form.title, tuple(r for r in form.roles if r != role), function,
                form.quantity, form.mistake, form.geometry, form.method, form.case, form.band,
                dict(form.fixed, **{role: value}), form.inline + (role,), form)


def _kelvin(t, offset=ZERO_CELSIUS):
    return t + offset


# ---------------------------------------------------------------------------------------------
# Groups: Ra = g beta dT L^3 / (nu alpha) in its written forms

_BETA = {   # how the expansion coefficient enters: (roles, function, mistake)
    "beta": (("expansion",), lambda r: r["expansion"], None),
    "1/T": (("tb",), lambda r: 1.0 / _kelvin(r["tb"]), None),
    "1/Tfilm": ((), lambda r: 1.0 / _kelvin((r["t1"] + r["t2"]) / 2), None),
    "1/T degC": (("tb",), lambda r: 1.0 / r["tb"],
                 "beta = 1/T with T in degC (the absolute temperature is T + 273.15)"),
    "1/Tfilm degC": ((), lambda r: 2.0 / (r["t1"] + r["t2"]),
                     "beta = 1/T with the film temperature in degC (the absolute temperature is "
                     "T + 273.15)"),
}
_DIFFERENCE = {"t1-t2": (("t1", "t2"), lambda r: r["t1"] - r["t2"]),
               "dt": (("dt",), lambda r: r["dt"])}
_TRANSPORT = {   # the denominator: (roles, function, quantity)
    "nu alpha": (("kinvisc", "diffusivity"), lambda r: r["kinvisc"] * r["diffusivity"], "Ra"),
    "nu^2/Pr": (("kinvisc", "pr"), lambda r: r["kinvisc"] ** 2 / r["pr"], "Ra"),
    "nu^2": (("kinvisc",), lambda r: r["kinvisc"] ** 2, "Gr"),
}


def _buoyancy_forms():
    for beta_name, (beta_roles, beta, mistake) in _BETA.items():
        for dt_name, (dt_roles, difference) in _DIFFERENCE.items():
            if beta_name.startswith("1/Tfilm") and dt_name == "dt":
                continue   # the film temperature needs both temperatures
            for transport_name, (transport_roles, transport, quantity) in _TRANSPORT.items():
                roles = tuple(dict.fromkeys(beta_roles + dt_roles + ("length",) + transport_roles))

                def function(_b=beta, _d=difference, _t=transport, **r):
                    return STANDARD_GRAVITY * _b(r) * _d(r) * r["length"] ** 3 / _t(r)

                word = "Rayleigh number" if quantity == "Ra" else "Grashof number"
                written = {"Ra": "g beta dT L^3/(nu alpha)" if transport_name == "nu alpha"
                           else "g beta dT L^3 Pr/nu^2", "Gr": "g beta dT L^3/nu^2"}[quantity]
                yield Form(quantity.lower(), f"{word}, {written} (beta as {beta_name})", roles,
                           function, quantity, mistake)


# A product x y / z or x y (t1 - t2) is a Nusselt number or a heat flow only where x was
# recognised as a coefficient.
_COEFFICIENT = {"h": ("h", "hrad")}

# Forms too plain to claim a cell on their own (a reciprocal, a ratio, x/(y z)): kept only where
# a recognised cell reads the result (beta in a Rayleigh number, Pr in a correlation, a wall
# resistance in a series sum).
WEAK = frozenset({"prandtl", "beta-ideal", "beta-ideal-film", "beta-celsius", "beta-celsius-film",
                  "conduction-resistance"})


def _group_forms():
    yield from _buoyancy_forms()
    yield Form("prandtl", "Prandtl number, nu/alpha", ("kinvisc", "diffusivity"),
               lambda kinvisc, diffusivity: kinvisc / diffusivity, "Pr")
    yield Form("nusselt-from-h", "Nusselt number, h L/k", ("h", "length", "conductivity"),
               lambda h, length, conductivity: h * length / conductivity, "Nu",
               context=_COEFFICIENT)
    yield Form("h-from-nusselt", "convection coefficient, Nu k/L", ("nusselt", "conductivity", "length"),
               lambda nusselt, conductivity, length: nusselt * conductivity / length, "h")
    yield Form("beta-ideal", "expansion coefficient of an ideal gas, 1/(T + 273.15)", ("tb",),
               lambda tb: 1.0 / _kelvin(tb), "beta")
    yield Form("beta-ideal-film", "expansion coefficient of an ideal gas at the film "
               "temperature, 1/((T1 + T2)/2 + 273.15)", ("t1", "t2"),
               lambda t1, t2: 1.0 / _kelvin((t1 + t2) / 2), "beta")
    yield Form("beta-celsius", "expansion coefficient as 1/T", ("tb",), lambda tb: 1.0 / tb, "beta",
               "beta = 1/T with T in degC (the absolute temperature is T + 273.15)")
    yield Form("beta-celsius-film", "expansion coefficient as 1/T at the film temperature",
               ("t1", "t2"), lambda t1, t2: 2.0 / (t1 + t2), "beta",
               "beta = 1/T with the film temperature in degC (the absolute temperature is "
               "T + 273.15)")
    yield Form("convection-flow", "heat flow, h A (T1 - T2)", ("h", "area", "t1", "t2"),
               lambda h, area, t1, t2: h * area * (t1 - t2), "Q", context=_COEFFICIENT)
    yield Form("convection-flow", "heat flow, h A dT", ("h", "area", "dt"),
               lambda h, area, dt: h * area * dt, "Q", context=_COEFFICIENT)


# ---------------------------------------------------------------------------------------------
# Radiation and conduction


def _radiation_forms():
    for offset, mistake in ((ZERO_CELSIUS, None), (0.0, "the fourth powers are taken of degC "
                                                        "temperatures (kelvin are due)")):
        def flux(eps, t1, t2, _o=offset):
            return SIGMA * eps * (_kelvin(t1, _o) ** 4 - _kelvin(t2, _o) ** 4)

        def coefficient(eps, t1, t2, _o=offset):
            a, b = _kelvin(t1, _o), _kelvin(t2, _o)
            return SIGMA * eps * (a * a + b * b) * (a + b)

        yield Form("radiation-flux", "radiant flux density, sigma eps (T1^4 - T2^4)",
                   ("eps", "t1", "t2"), flux, "q", mistake)
        yield Form("radiation-flow", "radiant heat flow, sigma eps A (T1^4 - T2^4)",
                   ("eps", "area", "t1", "t2"),
                   lambda eps, area, t1, t2, _f=flux: area * _f(eps, t1, t2), "Q", mistake)
        yield Form("radiation-coefficient", "linearised radiation coefficient, "
                   "sigma eps (T1^2 + T2^2)(T1 + T2)", ("eps", "t1", "t2"), coefficient, "hrad",
                   mistake)
        yield Form("radiation-coefficient", "linearised radiation coefficient, 4 sigma eps Tm^3",
                   ("eps", "t1", "t2"),
                   lambda eps, t1, t2, _o=offset: 4 * SIGMA * eps * _kelvin((t1 + t2) / 2, _o) ** 3,
                   "hrad", mistake)

        def parallel(eps1, eps2, t1, t2, _f=flux):
            return _f(1.0 / (1.0 / eps1 + 1.0 / eps2 - 1.0), t1, t2)

        yield Form("radiation-flux", "radiant flux density between parallel grey surfaces, "
                   "sigma (T1^4 - T2^4)/(1/eps1 + 1/eps2 - 1)", ("eps1", "eps2", "t1", "t2"),
                   parallel, "q", mistake)
        yield Form("radiation-coefficient", "linearised radiation coefficient between parallel "
                   "grey surfaces", ("eps1", "eps2", "t1", "t2"),
                   lambda eps1, eps2, t1, t2, _c=coefficient: _c(
                       1.0 / (1.0 / eps1 + 1.0 / eps2 - 1.0), t1, t2), "hrad", mistake)


def _conduction_forms():
    yield Form("conduction-resistance", "conduction resistance of a plane wall, t/(k A)",
               ("thickness", "solid_conductivity", "area"),
               lambda thickness, solid_conductivity, area: thickness / (solid_conductivity * area),
               "R")
    yield Form("conduction-resistance", "conduction resistance of a cylindrical shell, "
               "ln(D2/D1)/(2 pi k L)", ("outer", "inner", "solid_conductivity", "length"),
               lambda outer, inner, solid_conductivity, length:
               np.log(outer / inner) / (2 * np.pi * solid_conductivity * length), "R")
    yield Form("surface-resistance", "surface resistance, 1/(h A)", ("h", "area"),
               lambda h, area: 1.0 / (h * area), "R", context={"h": ("h", "hrad")})
    resistance = {"r1": ("R",), "r2": ("R",), "r3": ("R",)}
    yield Form("series", "resistances in series, R1 + R2", ("r1", "r2"),
               lambda r1, r2: r1 + r2, "R", context=resistance)
    yield Form("series", "resistances in series, R1 + R2 + R3", ("r1", "r2", "r3"),
               lambda r1, r2, r3: r1 + r2 + r3, "R", context=resistance)
    yield Form("parallel", "resistances in parallel, 1/(1/R1 + 1/R2)", ("r1", "r2"),
               lambda r1, r2: 1.0 / (1.0 / r1 + 1.0 / r2), "R", context=resistance)
    yield Form("coefficients-in-parallel", "convection and radiation in parallel, h + hrad",
               ("h", "h2"), lambda h, h2: h + h2, "h",
               context={"h": ("h",), "h2": ("hrad",)})


# ---------------------------------------------------------------------------------------------
# Correlations: from the registry


def _correlation_forms():
    from stillair.correlations import CORRELATIONS, GEOMETRIES

    for (geometry, method), corr in CORRELATIONS.items():
        geo = GEOMETRIES[geometry]
        cases = corr.cases or geo.cases or (None,)
        bands = [(None, corr.function)] + list(corr.forms.items())
        for case in cases:
            if case in geo.flux_cases:
                continue   # a flux case reads Ra* = Ra Nu: not a formula of the cell's inputs
            for band, function in bands:
                def evaluate(_f=function, _case=case, _cased=bool(geo.cases), **inputs):
                    return _f(**inputs, case=_case) if _cased else _f(**inputs)

                words = corr.title + (f" ({case})" if case else "")
                words += f", {band}" if band else ""
                variants = [(geo.inputs, {})]
                if "tilt" in geo.inputs and geo.default_tilt is not None:
                    variants.append((tuple(i for i in geo.inputs if i != "tilt"),
                                     {"tilt": geo.default_tilt}))
                if not _reads_prandtl(evaluate, geo):   # a hand formula has no Pr to read
                    variants += [(tuple(i for i in roles if i != "pr"), dict(fixed, pr=0.71))
                                 for roles, fixed in variants]
                for roles, fixed in variants:
                    def with_fixed(_e=evaluate, _fixed=fixed, **inputs):
                        return _e(**inputs, **{k: np.full(np.shape(next(iter(inputs.values()))), v)
                                               for k, v in _fixed.items()})

                    yield Form("correlation", words, roles, with_fixed, "Nu", geometry=geometry,
                               method=method, case=case, band=band, fixed=fixed)


_SAMPLE = {"ra": 1e6, "aspect": 20.0, "tilt": 90.0, "slenderness": 5.0}


def _reads_prandtl(evaluate, geo) -> bool:
    """Whether the correlation's value depends on Pr (sampled at two Prandtl numbers)."""
    point = {name: np.asarray([_SAMPLE.get(name, 0.7)]) for name in geo.inputs}
    with np.errstate(all="ignore"):
        low = evaluate(**dict(point, pr=np.asarray([0.7])))
        high = evaluate(**dict(point, pr=np.asarray([7.0])))
    return not np.allclose(low, high, rtol=1e-12, atol=0)


_FORMS: list[Form] | None = None


def forms() -> list[Form]:
    """Every form, correlations first (the most specific), built once."""
    global _FORMS
    if _FORMS is None:
        _FORMS = [*_correlation_forms(), *_group_forms(), *_radiation_forms(),
                  *_conduction_forms()]
    return _FORMS


FORMS = forms
