"""Gas arguments and mixtures: parsing "argon:0.9, air:0.1" and the mixing rules of
ISO 15099:2003 Annex B (method in the package docstring)."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np
from ..constants import MOLAR_GAS_CONSTANT as GAS_CONSTANT  # J/(mol K), exact since 2019

from ..validity import InputError, Range
from .data import GAS_NAMES, GASES, MIXTURE_SUM_TOLERANCE, _gas_doc
from .shipped import _molar_mass

_GAS_ALLOWED = ("one of " + ", ".join(GAS_NAMES)
                + ' or a mixture of them such as "argon:0.9, air:0.1"')
_SYNTAX_ALLOWED = 'a gas name or a mixture written "name:fraction, name:fraction" ' \
                  '(e.g. "argon:0.9, air:0.1")'


@dataclass(frozen=True, eq=False)
class _Mixture:
    """A parsed gas: components with mole fractions (summing exactly to 1), and its limits.

    Equal and hashed by its components alone (the key of the table and state caches).
    """

    components: tuple[tuple[str, float], ...]
    label: str
    t_range: Range
    molar_masses: tuple[float, ...]      # kg/mol, per component
    molar_mass: float                    # kg/mol, mole-fraction mean
    _hash: int = field(init=False, repr=False)  # of the components, set once

    def __post_init__(self):
        object.__setattr__(self, "_hash", hash(self.components))

    def __hash__(self):
        return self._hash

    def __eq__(self, other):
        return isinstance(other, _Mixture) and self.components == other.components

    @property
    def is_pure(self) -> bool:
        return len(self.components) == 1

    @property
    def fractions(self) -> np.ndarray:
        return np.array([fraction for _, fraction in self.components])


def parse_gas(gas: str) -> tuple[tuple[str, float], ...]:
    """Normalise a gas argument to its components and mole fractions.

    Parameters
    ----------
    gas : str
        {gas_doc}

    Returns
    -------
    tuple of (str, float)
        ``((component, mole_fraction), ...)``, names in lower case, fractions summing exactly
        to 1.

    Raises
    ------
    InputError
        An unknown gas, a malformed mixture, a gas named twice, fractions outside [0, 1] or
        not summing to 1 within {tolerance:g}.

    Notes
    -----
    Names are case-insensitive and spaces are ignored around names, colons and commas.
    Fractions are rescaled to sum exactly to 1, and components with fraction 0 are dropped (so
    "argon:1, air:0" is argon).

    Examples
    --------
    >>> import stillair
    >>> stillair.parse_gas(" Argon : 0.9 , AIR:0.1")
    (('argon', 0.9), ('air', 0.1))
    >>> stillair.parse_gas("argon:1, air:0")
    (('argon', 1.0),)
    """
    return _mixture("parse_gas", gas).components


def _mixture(function: str, gas) -> _Mixture:
    if not isinstance(gas, str):
        raise InputError(function, "gas", gas, _GAS_ALLOWED)
    try:
        return _parse_text(gas)
    except InputError as error:  # re-issue under the caller's name
        raise InputError(function, error.argument, error.value, error.allowed) from None


@lru_cache(maxsize=256)
def _parse_text(text: str) -> _Mixture:
    items = [item.strip() for item in text.split(",")]
    if len(items) == 1 and ":" not in items[0]:
        pairs = [(items[0].lower(), 1.0)]
    else:
        pairs = []
        for item in items:
            name, colon, fraction_text = item.partition(":")
            if not colon or not name.strip():
                raise InputError("parse_gas", "gas", text, _SYNTAX_ALLOWED)
            try:
                fraction = float(fraction_text)
            except ValueError:
                raise InputError("parse_gas", "gas", text, _SYNTAX_ALLOWED) from None
            pairs.append((name.strip().lower(), fraction))
    for name, fraction in pairs:
        if name not in GASES:
            value = text if len(pairs) == 1 else name
            raise InputError("parse_gas", "gas", value, _GAS_ALLOWED)
    names = [name for name, _ in pairs]
    if len(set(names)) != len(names):
        raise InputError("parse_gas", "gas", text, "a mixture naming each gas once")
    fractions = np.array([fraction for _, fraction in pairs])
    if not np.all(np.isfinite(fractions)) or np.any(fractions < 0) or np.any(fractions > 1):
        raise InputError("parse_gas", "gas", text, "a mixture with mole fractions in [0, 1]")
    total = float(fractions.sum())
    if abs(total - 1.0) > MIXTURE_SUM_TOLERANCE:
        raise InputError("parse_gas", "gas", text,
                         f"a mixture with mole fractions summing to 1 within "
                         f"{MIXTURE_SUM_TOLERANCE:g} (these sum to {total:.9g})")
    components = tuple((name, fraction / total) for name, fraction in pairs if fraction > 0)
    if len(components) == 1:
        components = ((components[0][0], 1.0),)
        label = components[0][0]
    else:
        label = ", ".join(f"{name}:{fraction:.6g}" for name, fraction in components)
    ranges = [GASES[name].t_range for name, _ in components]
    t_range = Range("t", max(r.low for r in ranges), min(r.high for r in ranges))
    molar_masses = tuple(_molar_mass(name) for name, _ in components)
    molar_mass = float(sum(f * m for (_, f), m in zip(components, molar_masses)))
    return _Mixture(components, label, t_range, molar_masses, molar_mass)


def _wilke_phi(ratio, molar_i, molar_j, mass_exponent):
    """[1 + ratio^(1/2) (M_i/M_j)^e]^2 / (2 sqrt2 (1 + M_i/M_j)^(1/2)), ISO 15099 Annex B.

    From memory: the viscosity phi uses ratio = mu_i/mu_j with e = -1/4 (i.e. (M_j/M_i)^(1/4));
    the conductivity psi and phi use ratio = k'_i/k'_j with e = +1/4.  phi_ii = 1.
    """
    mass_ratio = molar_i / molar_j
    return ((1.0 + np.sqrt(ratio) * mass_ratio ** mass_exponent) ** 2
            / (2.0 * math.sqrt(2.0) * np.sqrt(1.0 + mass_ratio)))


def _wilke_mix(fractions, values, phi):
    """sum_i x_i v_i / sum_j x_j phi_ij -- the ISO form sum_i v_i / (1 + sum_j!=i phi_ij x_j/x_i)
    multiplied through by x_i."""
    total = 0.0
    for i, x_i in enumerate(fractions):
        denominator = sum(x_j * phi[i][j] for j, x_j in enumerate(fractions))
        total = total + x_i * values[i] / denominator
    return total


def _mix(mixture: "_Mixture", primaries: list[np.ndarray], pressure) -> np.ndarray:
    """Mixture primaries from the components' primaries (each ``(..., 5)``)."""
    x = mixture.fractions
    molar = mixture.molar_masses
    n = len(x)
    density = [p[..., 0] * pressure for p in primaries]
    viscosity = [p[..., 1] for p in primaries]
    conductivity = [p[..., 2] for p in primaries]
    cp = [p[..., 3] for p in primaries]
    expansion = [p[..., 4] for p in primaries]

    # Additive molar volumes v_i = M_i/rho_i; beta_mix = sum x_i v_i beta_i / v_mix.
    volumes = [molar[i] / density[i] for i in range(n)]
    volume = sum(x[i] * volumes[i] for i in range(n))
    mix_density = mixture.molar_mass / volume
    mix_expansion = sum(x[i] * volumes[i] * expansion[i] for i in range(n)) / volume

    # ISO 15099: cp_mix = sum x_i (cp_i M_i) / M_mix.
    mix_cp = sum(x[i] * cp[i] * molar[i] for i in range(n)) / mixture.molar_mass

    phi_mu = [[_wilke_phi(viscosity[i] / viscosity[j], molar[i], molar[j], -0.25)
               for j in range(n)] for i in range(n)]
    mix_viscosity = _wilke_mix(x, viscosity, phi_mu)

    # Translational (monatomic) conductivity k' = 15/4 R mu / M, internal part k'' = k - k'.
    translational = [3.75 * GAS_CONSTANT * viscosity[i] / molar[i] for i in range(n)]
    internal = [conductivity[i] - translational[i] for i in range(n)]
    phi_k = [[_wilke_phi(translational[i] / translational[j], molar[i], molar[j], 0.25)
              for j in range(n)] for i in range(n)]
    # Mason-Saxena factor for the translational part (from memory: 2.41 and 0.142).
    psi_k = [[phi_k[i][j] * (1.0 + 2.41 * (molar[i] - molar[j]) * (molar[i] - 0.142 * molar[j])
                             / (molar[i] + molar[j]) ** 2)
              for j in range(n)] for i in range(n)]
    mix_conductivity = _wilke_mix(x, translational, psi_k) + _wilke_mix(x, internal, phi_k)

    return np.stack([mix_density / pressure, mix_viscosity, mix_conductivity, mix_cp,
                     mix_expansion], axis=-1)


# The docstring of parse_gas carries the gas names of GASES, filled in here rather than retyped.
parse_gas.__doc__ = (parse_gas.__doc__ or "").format(gas_doc=_gas_doc("        "),
                                                     tolerance=MIXTURE_SUM_TOLERANCE)
