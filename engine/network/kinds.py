"""Branch kinds: one object per kind of row in the branches table.

A kind knows its parameter columns p1..p5 (label, unit, meaning, check), which node is its
``from`` node, its heat flow q (positive from ``from`` to ``to``) with the two derivatives
dq/dT_from and dq/dT_to, and a nominal conductance for the solver's start.  The function
reference and the README print the table of kinds from :func:`kind_reference`.

The convection kinds are generated from the correlation registry's geometries
(:data:`stillair.correlations.GEOMETRIES`): the geometry's inputs decide the columns (a tilt
input adds a tilt column, a slenderness input a diameter column, an aspect input a height
column, plate cases a facing column, other cases a case column), so a geometry registered there
is a branch kind here with no further code.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, Callable, Mapping

import numpy as np
from ..constants import ZERO_CELSIUS as zero_Celsius

from ..convection import layer_tilt, plate_case, shape_ratios
from ..groups import STANDARD_GRAVITY
from ..correlations import (CORRELATIONS, GEOMETRIES, PLATE_CASES, NusseltResult, merge_masked, methods_for,
                           nusselt_at_difference_checked, nusselt_checked)
from ..forced import WIND_FLOWS, combine_mixed
from ..radiation import SIGMA, exchange_factor
from ..validity import LENGTH_RANGE
from ..ventilation import parse_fan_curve
from .errors import FUNCTION, NetworkError
from .reading import blank, error_text, gas_key, number

__all__ = ["Param", "BranchKind", "LinearKind", "RadiationKind", "ConvectionKind", "BRANCH_KINDS",
           "SKIPPED_GEOMETRIES", "NoBranchKind",
           "kind_reference", "NOMINAL_SURFACE_H", "NOMINAL_CAVITY_NU", "NOMINAL_CONDUCTIVITY"]

NOMINAL_SURFACE_H = 4.0       # W/(m²·K), still air on a surface (common practice), start only
NOMINAL_CAVITY_NU = 1.5       # a cavity's start: Nu = 1.5 ...
NOMINAL_CONDUCTIVITY = 0.026  # W/(m·K) ... with air's conductivity near 20 °C (start only)
_START_NU_ALPHA = 1.5e-5 * 2.1e-5  # m⁴/s², air's kinematic viscosity times diffusivity near 20 °C


# --------------------------------------------------------------------------------------------
# Parameter columns


@dataclass(frozen=True)
class Param:
    """One parameter column of a kind.

    ``role`` says what a convection kind does with it: "length" (the correlation's length),
    "area", "tilt" (a correlation input as typed), "layer-tilt" (a cavity's tilt, seen as
    180 - tilt when the layer is heated from above), "diameter" (slenderness = length/diameter),
    "height" (aspect = height/length), "facing" (with the sign of the difference, the plate
    case), "case" (the geometry's case, one of ``choices``), "gas", "wind" (wind speed, m/s) and
    "wind-length" (a plate's length along the wind).  Linear and radiation kinds leave it blank.
    """

    label: str
    unit: str = ""
    meaning: str = ""
    check: str = "positive"   # positive | non-negative | emissivity | fraction | angle | facing | choice | gas
    #                           | flow-or-curve (a number > 0, or a fan curve's text: parse_fan_curve)
    limits: tuple[float, float] = (0.0, 0.0)
    choices: tuple[str, ...] = ()
    optional: bool = False
    default: object = None
    blank_means: str = ""
    role: str = ""

    def describe(self) -> str:
        """The column as the reference table shows it: "thickness m", "tilt ° from vertical"."""
        text = " ".join(part for part in (self.label, self.unit, self.meaning and f"({self.meaning})") if part)
        return text + (f" (blank: {self.blank_means})" if self.blank_means else "")

    def read(self, value, where: str, column: str):
        column = f"{column} ({self.label})"
        here = f"{where}, column {column}"
        if blank(value):
            if self.optional:
                return self.default
            if self.check in ("facing", "gas", "choice"):
                raise NetworkError(FUNCTION, here, None, {
                    "facing": '"up" or "down"', "gas": "a gas name",
                    "choice": "one of " + ", ".join(f'"{c}"' for c in self.choices)}[self.check])
        if self.check == "facing":
            if not isinstance(value, str) or value.strip().lower() not in ("up", "down"):
                raise NetworkError(FUNCTION, here, value, '"up" or "down"')
            return value.strip().lower()
        if self.check == "choice":
            if not isinstance(value, str) or value.strip().lower() not in self.choices:
                listed = ", ".join(f'"{c}"' for c in self.choices)
                raise NetworkError(FUNCTION, here, value,
                                   f"blank or one of {listed}" if self.optional else f"one of {listed}")
            return value.strip().lower()
        if self.check == "gas":
            if not isinstance(value, str):
                raise NetworkError(FUNCTION, here, value, "a gas name")
            return gas_key(value)
        if self.check == "flow-or-curve" and isinstance(value, str) and error_text(value) is None:
            try:
                return parse_fan_curve(value)
            except ValueError as reason:
                raise NetworkError(FUNCTION, here, value, f'a volume flow in m³/s or a fan curve "V:dp, ..." '
                                                          f"in m³/s:Pa ({reason})") from None
        value = number(value, where, column, self.unit)
        unit = f" {self.unit}" if self.unit else ""
        if self.check in ("positive", "flow-or-curve") and not value > 0:
            raise NetworkError(FUNCTION, here, value, f"> 0{unit}")
        if self.role in _GEOMETRY_LENGTHS:   # the lengths a correlation reads: as h_* checks them
            low, high = LENGTH_RANGE
            if value > high:
                raise NetworkError(FUNCTION, here, value, f"at most {high:g} m (is it in mm?)")
            if value < low:
                raise NetworkError(FUNCTION, here, value, f"at least {low:g} m (the gas is no continuum below)")
        if self.check in ("emissivity", "fraction") and not 0 < value <= 1:
            raise NetworkError(FUNCTION, here, value, "in (0, 1]")
        if self.check == "non-negative" and not value >= 0:
            raise NetworkError(FUNCTION, here, value, f">= 0{unit}")
        if self.check == "angle" and not self.limits[0] <= value <= self.limits[1]:
            raise NetworkError(FUNCTION, here, value, f"in [{self.limits[0]:g}, {self.limits[1]:g}]°")
        return value

    def read_column(self, values: list) -> list | None:
        """:meth:`read` of a whole column at once, when every cell is a plain number (float or
        int) that :meth:`read` accepts: the same floats, checked by array comparisons.  None
        when any cell is anything else (blank, text, out of range): :meth:`read` then takes
        the cells one by one and words the problem."""
        if self.optional and values.count(None) == len(values):
            return [self.default] * len(values)
        if self.check not in _NUMBER_CHECKS or not set(map(type, values)) <= _PLAIN_TYPES:
            return None
        array = np.array(values, dtype=float)
        good = np.isfinite(array)
        if self.check in ("positive", "flow-or-curve"):
            good &= array > 0
        if self.role in _GEOMETRY_LENGTHS:
            good &= (array >= LENGTH_RANGE[0]) & (array <= LENGTH_RANGE[1])
        if self.check in ("emissivity", "fraction"):
            good &= (array > 0) & (array <= 1)
        if self.check == "non-negative":
            good &= array >= 0
        if self.check == "angle":
            good &= (array >= self.limits[0]) & (array <= self.limits[1])
        return array.tolist() if good.all() else None


#: The checks :meth:`Param.read_column` does with arrays (a number and a condition on it).
_NUMBER_CHECKS = ("positive", "non-negative", "emissivity", "fraction", "angle", "flow-or-curve")
_PLAIN_TYPES = {float, int}     # a plain number (a bool is neither: read() refuses it by name)


#: Parameter roles that are a convection geometry's lengths (checked against LENGTH_RANGE).
_GEOMETRY_LENGTHS = ("length", "height", "diameter")

AREA = Param("area", "m²")


# --------------------------------------------------------------------------------------------
# Kinds


@dataclass(frozen=True)
class BranchKind:
    """What a row of this kind means.  Subclasses give the heat flow and its derivatives."""

    name: str
    params: tuple[Param, ...]
    flow: str                 # the heat flow as a formula, for the reference
    ends: str                 # which node is "from" (and "to")
    geometry: str | None = None

    @property
    def has_correlation(self) -> bool:
        return self.geometry is not None

    def read_params(self, row_values, where: str) -> tuple:
        values = []
        for position in range(5):
            column = f"p{position + 1}"
            value = row_values[position]
            if position >= len(self.params):
                if not blank(value):
                    raise NetworkError(FUNCTION, f"{where}, column {column}", value,
                                       f"blank for kind {self.name} (it uses p1..p{len(self.params)})")
                continue
            values.append(self.params[position].read(value, where, column))
        return tuple(values)

    def read_columns(self, columns: list[list]) -> list[tuple] | None:
        """The p1..p5 columns of many rows of this kind (``columns[k]``: column p(k+1)), read
        as :meth:`read_params` reads each row -- a column of plain numbers in one array check
        (:meth:`Param.read_column`), other columns cell by cell -- or None at the first cell
        :meth:`read_params` would refuse (the caller then reads row by row, which words it).
        A kind with its own :meth:`read_params` and no ``read_columns`` is read row by row."""
        if type(self).read_params is not BranchKind.read_params and type(self).read_columns is BranchKind.read_columns:
            return self._read_rows(columns)
        read = []
        try:
            for position, column in enumerate(columns):
                if position >= len(self.params):
                    if column.count(None) < len(column) and not all(blank(value) for value in column):
                        return None
                    continue
                param = self.params[position]
                values = param.read_column(column)
                read.append(values if values is not None else
                            [param.read(value, "", f"p{position + 1}") for value in column])
        except NetworkError:
            return None
        return list(zip(*read)) if read else [()] * len(columns[0])

    def _read_rows(self, columns: list[list]) -> list[tuple] | None:
        try:
            return [self.read_params(list(row), "") for row in zip(*columns)]
        except NetworkError:
            return None

    def read_method(self, value, where: str, params: tuple = ()) -> str:
        """The method column; ``params`` are the row's parameters as read (a case column
        narrows the methods to those serving its case)."""
        if not blank(value):
            raise NetworkError(FUNCTION, f"{where}, column method", value,
                               f"blank for kind {self.name} (it has no correlation)")
        return ""

    def group_key(self, branch, gas: str) -> tuple:
        return (self.name,)

    def group(self, index: np.ndarray, params: list[tuple], context: dict) -> Any:
        """The vectorised evaluator of this kind's branches ``index`` (every kind has its own)."""
        raise NotImplementedError(self.name)

    def reference(self) -> dict:
        """kind, p1..p5 texts, heat flow, from/to: one row of the reference table."""
        columns = [p.describe() for p in self.params] + [""] * (5 - len(self.params))
        return {"kind": self.name, **{f"p{k + 1}": text for k, text in enumerate(columns)},
                "q": self.flow, "from": self.ends}


class _Group:
    """Branches of one kind evaluated in one vectorised call.  ``index``: their positions."""

    needs_properties = False

    def __init__(self, kind: BranchKind, index: np.ndarray, params: list[tuple]):
        self.kind = kind
        self.index = index
        self.params = params

    def column(self, k: int) -> np.ndarray:
        return np.array([p[k] for p in self.params], dtype=float)


# ---- conduction, resistance, film --------------------------------------------------------


@dataclass(frozen=True)
class LinearKind(BranchKind):
    """q = G (T_from - T_to) with a constant conductance G (W/K)."""

    # required (a default only because the fields of BranchKind have them)
    conductance: Callable[[tuple], float] = field(default=None, compare=False)  # type: ignore[assignment]
    coefficient: Callable[[tuple], tuple[float, float]] = field(default=None, compare=False)  # type: ignore[assignment]  # (h, area)

    def group(self, index, params, context):
        return _LinearGroup(self, index, params)


class _LinearGroup(_Group):
    kind: LinearKind

    def __init__(self, kind, index, params):
        super().__init__(kind, index, params)
        self.g = np.array([kind.conductance(p) for p in params], dtype=float)

    def nominal(self, t1, t2):
        return self.g

    def flows(self, t1, t2, dt):
        return self.g * dt, self.g, -self.g

    def records(self, t1, t2, dt, q, detail):
        for k, p in enumerate(self.params):
            h, area = self.kind.coefficient(p)
            yield int(self.index[k]), dict(h=h, R=float(1.0 / self.g[k]), area=area, method=self.kind.name)


# ---- radiation ---------------------------------------------------------------------------


@dataclass(frozen=True)
class RadiationKind(BranchKind):
    """q = A F sigma (T_from^4 - T_to^4), F the grey exchange factor of the two emissivities."""

    def group(self, index, params, context):
        return _RadiationGroup(self, index, params)


class _RadiationGroup(_Group):
    def __init__(self, kind, index, params):
        super().__init__(kind, index, params)
        parallel = np.array([p[1] is not None for p in params])
        first = self.column(0)
        self.factor = np.empty(len(params))
        if parallel.any():
            self.factor[parallel] = exchange_factor(first[parallel], np.array(
                [p[1] for p in params if p[1] is not None], dtype=float), FUNCTION)
        if not parallel.all():
            self.factor[~parallel] = exchange_factor(first[~parallel], None, FUNCTION)
        self.area = self.column(2)
        self.af = self.area * self.factor

    def nominal(self, t1, t2):
        k1, k2 = t1 + zero_Celsius, t2 + zero_Celsius
        return self.af * SIGMA * (k1 + k2) * (k1 * k1 + k2 * k2)

    def flows(self, t1, t2, dt):
        k1, k2 = t1 + zero_Celsius, t2 + zero_Celsius
        # (k1 - k2) from the exact difference, so a branch between nearly equal temperatures
        # keeps its digits
        q = self.af * SIGMA * dt * (k1 + k2) * (k1 * k1 + k2 * k2)
        return q, 4.0 * self.af * SIGMA * k1 ** 3, -4.0 * self.af * SIGMA * k2 ** 3

    def records(self, t1, t2, dt, q, detail):
        k1, k2 = t1 + zero_Celsius, t2 + zero_Celsius
        h = self.factor * SIGMA * (k1 ** 2 + k2 ** 2) * (k1 + k2)   # exact linearised, see radiation.py
        for k, p in enumerate(self.params):
            method = "grey parallel surfaces" if p[1] is not None else "grey surface to large surroundings"
            yield int(self.index[k]), dict(h=float(h[k]), R=float(1.0 / (h[k] * self.area[k])),
                                           area=float(self.area[k]), method=method)


# ---- convection (generated from the correlation registry) --------------------------------


@dataclass(frozen=True)
class ConvectionKind(BranchKind):
    """q = h(T_from, T_to) A (T_from - T_to), h = Nu k / length from the geometry's correlation
    with the gas properties at the branch's film temperature."""

    @property
    def geometry_name(self) -> str:
        """The registry geometry its branches are computed with (every convection kind has one)."""
        return str(self.geometry)

    def role(self, role: str) -> int | None:
        for k, p in enumerate(self.params):
            if p.role == role:
                return k
        return None

    def read_method(self, value, where: str, params: tuple = ()) -> str:
        if blank(value):
            return "auto"
        k = self.role("case")
        case = params[k] if k is not None and params else None
        allowed = ["auto"] + methods_for(self.geometry_name, case)
        if not isinstance(value, str) or value.strip().lower() not in allowed:
            raise NetworkError(FUNCTION, f"{where}, column method", value,
                               "blank or one of " + ", ".join(f'"{m}"' for m in allowed)
                               + (f' for case "{case}"' if case is not None else ""))
        return value.strip().lower()

    def read_columns(self, columns: list[list]) -> list[tuple] | None:
        rows = super().read_columns(columns)
        wind, along = self.role("wind"), self.role("wind-length")
        if rows is None or (wind is not None and along is not None
                            and any(self._wind_without_length(values) for values in rows
                                    if values[along] is None)):
            return None
        return rows

    def _wind_without_length(self, values: tuple) -> bool:
        wind, along = self.role("wind"), self.role("wind-length")
        return bool(wind is not None and values[wind] > 0 and along is not None and values[along] is None
                    and WIND_FLOWS[self.geometry or ""].wind_length_required)

    def read_params(self, row_values, where: str) -> tuple:
        values = super().read_params(row_values, where)
        if self._wind_without_length(values):
            along = self.role("wind-length")
            raise NetworkError(FUNCTION, f"{where}, column p{(along or 0) + 1} (wind length)", None,
                               "the plate's length along the wind in m (> 0) when the wind is > 0 "
                               "(area/perimeter is not a length along the wind)")
        return values

    def gas_of(self, params: tuple, network_gas: str) -> str:
        k = self.role("gas")
        return (params[k] or network_gas) if k is not None else network_gas

    def case_column(self) -> int | None:
        """The column that sets the correlation's case (a facing or a case), or None."""
        k = self.role("facing")
        return k if k is not None else self.role("case")

    def group_key(self, branch, gas: str) -> tuple:
        k = self.case_column()
        return (self.name, branch.params[k] if k is not None else None, branch.method,
                self.gas_of(branch.params, gas))

    def group(self, index, params, context):
        return _ConvectionGroup(self, index, params, context)

    def correlation_inputs(self, columns: Mapping[str, np.ndarray], dt: np.ndarray) -> dict:
        """The geometry's inputs other than Ra and Pr, from the parameter columns (by role)."""
        inputs = shape_ratios(GEOMETRIES[self.geometry_name], columns["length"], diameter=columns.get("diameter"),
                              height=columns.get("height"))
        if "tilt" in columns:
            inputs["tilt"] = columns["tilt"]
        if "layer-tilt" in columns:   # heated from above (t_from < t_to): the layer turned over
            inputs["tilt"] = layer_tilt(columns["layer-tilt"], dt)
        return inputs


def _case_param(geometry) -> Param:
    """The column of a geometry's own cases (not set by a facing and the sign of the
    difference); blank takes the default of the geometry's "case" parameter, if it has one."""
    default = next((p.default for p in geometry.parameters if p.name == "case"), None)
    return Param("case", check="choice", choices=tuple(geometry.cases), meaning="one of " + ", ".join(geometry.cases),
                 optional=default is not None, default=default, blank_means=default or "", role="case")


def _length_param(geometry) -> Param:
    """The column of the geometry's own length (its name and meaning are the geometry's)."""
    meaning = geometry.length_doc.removesuffix(", m").strip()
    if meaning == geometry.length:
        meaning = ""
    return Param(geometry.length, "m", meaning, role="length")


def _wind_params(geometry, free: int) -> list[Param]:
    """The wind columns of an exposed surface (stillair.forced.WIND_FLOWS), in the columns left
    free: the wind speed first, then a plate's length along the wind where one is left."""
    flow = WIND_FLOWS.get(geometry.name)
    if flow is None or free < 1:
        return []
    params = [Param("wind", "m/s", "horizontal wind speed; mixed convection", check="non-negative",
                    optional=True, default=0.0, blank_means="0, still air", role="wind")]
    if flow.along == "wind_length" and free >= 2:
        blank = "required with a wind" if flow.wind_length_required else f"the {geometry.length}"
        params.append(Param("wind length", "m", "plate length along the wind", optional=True,
                            blank_means=blank, role="wind-length"))
    return params


class NoBranchKind(Exception):
    """A geometry whose inputs no column rule covers (the reason is the message)."""


def _convection_kind(geometry) -> ConvectionKind:
    """The branch kind of a registered geometry: its columns follow from its inputs.  Raises
    :class:`NoBranchKind` when no rule covers it (it is then listed in SKIPPED_GEOMETRIES)."""
    inputs = set(geometry.inputs) - {"ra", "pr"}
    if inputs == {"aspect", "tilt"}:   # an enclosed layer: gap, height, area, tilt, its own gas
        low, high = geometry.tilt_range
        default_tilt = 90.0 if geometry.default_tilt is None else geometry.default_tilt
        layer = (_length_param(geometry), Param("height", "m", role="height"),
                  Param("area", "m²", role="area"),
                  Param("tilt", "° from horizontal", check="angle", limits=(low, high), optional=True,
                        default=default_tilt, blank_means=f"{default_tilt:g}", role="layer-tilt"),
                  Param("gas", check="gas", optional=True, blank_means="the network's", role="gas"))
        return ConvectionKind(geometry.name, layer,
                              flow=f"h(T1, T2) A (T1 - T2), h = Nu k / {geometry.length}",
                              ends="from: the surface on the layer's underside; to: the other face",
                              geometry=geometry.name)
    label = geometry.length
    params = [_length_param(geometry)]
    if "slenderness" in inputs:
        params.append(Param("diameter", "m", role="diameter"))
    if "aspect" in inputs:   # an open layer (a channel): aspect = height/length
        params.append(Param("height", "m", role="height"))
    params.append(Param("area", "m²", role="area"))
    if "tilt" in inputs:
        low, high = geometry.tilt_range
        params.append(Param("tilt", "° from vertical", check="angle", limits=(low, high), role="tilt"))
    if geometry.cases:
        params.append(Param("facing", check="facing", meaning="up or down", role="facing")
                      if set(geometry.cases) == set(PLATE_CASES) else _case_param(geometry))
    unknown = inputs - {"tilt", "slenderness", "aspect"}
    if unknown:
        raise NoBranchKind(f"no column rule for its input(s) {', '.join(sorted(unknown))}")
    wind = _wind_params(geometry, free=5 - len(params))
    params += wind
    mixed = "; in a wind h = (h_N^3 + h_F^3)^(1/3), h_F forced" if wind else ""
    return ConvectionKind(geometry.name, tuple(params),
                          flow=f"h(T1, T2) A (T1 - T2), h = Nu k / {label}{mixed}",
                          ends=geometry.branch_ends or ("from: the solid surface; to: the fluid far from it "
                                                        "(still, or moving at the wind speed)" if wind else
                                                        "from: the solid surface; to: the still fluid"),
                          geometry=geometry.name)


class _ConvectionGroup(_Group):
    kind: ConvectionKind
    facing: Any   # the row's facing ("up", "down"), or None
    """Convection branches of one kind, facing, method and gas."""

    needs_properties = True

    def __init__(self, kind: ConvectionKind, index, params, context):
        super().__init__(kind, index, params)
        self.geometry = kind.geometry_name
        self.method = context["method"]
        self.gas = context["gas"]
        facing = kind.role("facing")
        self.facing = params[0][facing] if facing is not None else None
        own_case = kind.role("case")
        self.case = params[0][own_case] if own_case is not None else None
        self.columns = {p.role: self.column(k) for k, p in enumerate(kind.params)
                        if p.role not in ("", "facing", "case", "gas")}
        self.length = self.columns.pop("length")
        self.area = self.columns.pop("area")
        self.wind: np.ndarray | None = self.columns.pop("wind", None)
        along = self.columns.pop("wind-length", None)
        if self.wind is not None and not np.any(self.wind > 0):
            self.wind = None      # still air: the forced part is never evaluated
        self.wind_along: np.ndarray = self.length     # the length the forced correlation reads
        if self.wind is not None:
            flow = WIND_FLOWS[self.geometry]
            own = self.columns["diameter"] if flow.along == "diameter" else self.length
            self.wind_along = own if along is None or flow.along != "wind_length" else \
                np.where(np.isnan(along), own, along)
        self.cases = GEOMETRIES[self.geometry].cases
        served = CORRELATIONS[(self.geometry, self.method)].cases if self.method != "auto" else ()
        # a method named for a plate may serve only some cases (hot-up...); while the solution
        # moves, the other cases use "auto" and are flagged; a flag at the solution is an error
        self.served_cases = (served if self.facing is not None and served and set(served) != set(self.cases)
                             else ())

    def nominal(self, t1, t2):
        """A start only: laminar-like Nu = c Ra^(1/4) with air near 20 °C (common practice
        magnitudes), or the still-air values where the difference is not known yet."""
        cavity = self.kind.role("height") is not None
        dt = np.abs(t1 - t2)
        if not np.any(dt > 0):
            h = NOMINAL_CAVITY_NU * NOMINAL_CONDUCTIVITY / self.length if cavity else NOMINAL_SURFACE_H
            return h * self.area
        ra = STANDARD_GRAVITY * dt * self.length ** 3 / ((0.5 * (t1 + t2) + zero_Celsius) * _START_NU_ALPHA)
        nu = np.maximum(1.0, 0.15 * ra ** 0.25) if cavity else np.maximum(0.5, 0.54 * ra ** 0.25)
        return nu * NOMINAL_CONDUCTIVITY / self.length * self.area

    def tiled(self, copies: int) -> None:
        """Keep the parameter columns repeated ``copies`` times: the model evaluates the group
        at the point and at the two finite-difference points in one call."""
        self.length_tiled = np.tile(self.length, copies)
        self.area_tiled = np.tile(self.area, copies)
        self.columns_tiled = {k: np.tile(v, copies) for k, v in self.columns.items()}
        if self.wind is not None:
            self.wind_tiled = np.tile(self.wind, copies)
            self.wind_along_tiled = np.tile(self.wind_along, copies)

    def with_wind(self, h, kinvisc, pr, conductivity, tiled=True, notes=False):
        """(h with the wind's forced convection combined in, the forced NusseltResult or None,
        Re or None): h^3 = h_N^3 + h_F^3 where the wind blows, h unchanged where it is 0."""
        if self.wind is None:
            return h, None, None
        wind, along = (self.wind_tiled, self.wind_along_tiled) if tiled else (self.wind, self.wind_along)
        re = wind * along / kinvisc
        blowing = re > 0.0     # wind > 0 (a wind so light that Re underflows to 0 is still air)
        forced = nusselt_checked(GEOMETRIES[WIND_FLOWS[self.geometry].geometry], "auto", None,
                                 {"re": np.where(blowing, re, 1.0), "pr": pr}, notes, ranges=notes)
        h_forced = forced.nu * conductivity / along
        return np.where(blowing, combine_mixed(h, h_forced), h), forced, np.where(blowing, re, 0.0)

    def nusselt(self, ra, pr, dt, tiled=True, notes=False):
        """(NusseltResult, plate case or None, flagged or None) at the tiled points (or, with
        ``tiled=False``, at the branches).  Without ``notes`` the result's notes are blank:
        only the records read them, so the solver asks for them once, at the solution; the
        iterations (``notes=False``) skip the range tests altogether (``in_range`` is None)."""
        columns = dict(self.columns_tiled, length=self.length_tiled) if tiled else dict(self.columns, length=self.length)
        inputs = dict(ra=ra, pr=pr, **self.kind.correlation_inputs(columns, dt))
        return self._nusselt(inputs, dt, notes)

    def _nusselt(self, inputs, dt, notes=True):
        # the inputs come from checked table columns and the model's own Ra and Pr (finite: the
        # property look-up rejects what is not), so the correlations' argument checks are skipped
        geometry = GEOMETRIES[self.geometry]
        if not self.cases:
            return nusselt_checked(geometry, self.method, None, inputs, notes, ranges=notes), None, None
        if self.case is not None:   # the case is the row's own (a channel's walls): Nu solved where
            # the correlation reads a flux Rayleigh number
            result = nusselt_at_difference_checked(geometry, self.method, self.case, inputs, notes, ranges=notes)
            return result, np.full(len(dt), self.case, dtype=object), None
        hot = dt >= 0
        if hot.all() or not hot.any():   # the usual case: one plate case for the whole group
            names = [f"{'hot' if hot.all() else 'cold'}-{self.facing}"]
            case = np.full(len(dt), names[0], dtype=object)
        else:
            case = plate_case(self.facing, dt)
            names = list(dict.fromkeys(case.tolist()))
        flagged = ~np.isin(case, self.served_cases) if self.served_cases else None
        parts = []
        for name in names:
            mask = case == name if len(names) > 1 else None
            method = self.method if flagged is None or name in self.served_cases else "auto"
            sub = inputs if mask is None else {k: v[mask] for k, v in inputs.items()}
            parts.append((mask, nusselt_checked(geometry, method, name, sub, notes, ranges=notes)))
        result = parts[0][1] if len(parts) == 1 else merge_masked(NusseltResult, parts, case.shape)
        return result, case, flagged

    def records(self, t1, t2, dt, q, detail):
        geometry = GEOMETRIES[self.geometry]
        for k in range(len(self.index)):
            conductance = float(detail.h[k] * self.area[k])
            case = str(detail.case[k]) if detail.case is not None else ""
            # Ra as the correlation read it (a flux case's Ra*), as the one-call functions report it
            ra = geometry.correlation_rayleigh(detail.ra[k], detail.nu[k], case)
            record = dict(
                h=float(detail.h[k]), R=(1.0 / conductance) if conductance > 0 else math.inf,
                area=float(self.area[k]), Ra=float(ra), Nu=float(detail.nu[k]),
                Pr=float(detail.pr[k]), t_film=float(detail.t_film[k]), method=str(detail.method[k]),
                case=case,
                note=str(detail.note[k] or ""), in_range=bool(detail.in_range[k]))
            if detail.forced is not None and self.wind is not None and self.wind[k] > 0:
                # mixed convection: Nu = h L / k on the geometry's own length, both notes
                notes = (str(detail.note[k] or ""), str(detail.forced.note[k] or ""))
                record.update(Re=float(detail.re[k]), Nu=float(detail.h[k] * self.length[k] / detail.conductivity[k]),
                              method=f"{record['method']} + {detail.forced.method[k]} (wind)",
                              note="; ".join(n for n in notes if n),
                              in_range=record["in_range"] and bool(detail.forced.in_range[k]))
            yield int(self.index[k]), record

    def spread_inputs(self, records) -> tuple[dict, list]:
        """Correlation inputs of the group's branches at a solution (for the correlation spread):
        the inputs by name, and each branch's case (None without cases)."""
        dt = np.array([records[int(p)]["delta_t"] for p in self.index])
        inputs = self.kind.correlation_inputs(dict(self.columns, length=self.length), dt)
        inputs["ra"] = np.array([records[int(p)]["Ra"] for p in self.index])
        inputs["pr"] = np.array([records[int(p)]["Pr"] for p in self.index])
        cases = [records[int(p)]["case"] or None for p in self.index]
        return inputs, cases


# --------------------------------------------------------------------------------------------
# The table of kinds


def _linear_kinds():
    return (
        LinearKind("conduction", (Param("thickness", "m"), Param("conductivity", "W/(m·K)"), AREA),
                   flow="k A (T1 - T2) / L", ends="either way round (q > 0 from from to to)",
                   conductance=lambda p: p[1] * p[2] / p[0], coefficient=lambda p: (p[1] / p[0], p[2])),
        LinearKind("resistance", (Param("R", "K/W"),), flow="(T1 - T2) / R",
                   ends="either way round", conductance=lambda p: 1.0 / p[0],
                   coefficient=lambda p: (math.nan, math.nan)),
        LinearKind("film", (Param("h", "W/(m²·K)"), AREA), flow="h A (T1 - T2)",
                   ends="either way round", conductance=lambda p: p[0] * p[1],
                   coefficient=lambda p: (p[0], p[1])),
    )


RADIATION = RadiationKind(
    "radiation", (Param("emissivity of from", check="emissivity"),
                  Param("emissivity of to", check="emissivity", optional=True,
                        blank_means="from sees large surroundings at to"), AREA),
    flow="A F sigma (T1^4 - T2^4), F = 1/(1/eps1 + 1/eps2 - 1), or eps1 to large surroundings",
    ends="either way round")

_FORCED_FLOWS = {flow.geometry for flow in WIND_FLOWS.values()}


def _generated_kinds():
    kinds, skipped = [], {}
    for geometry in GEOMETRIES.values():
        if geometry.name in _FORCED_FLOWS:
            skipped[geometry.name] = ("the wind's forced flow over an exposed surface: it enters a network "
                                      "through the wind column of that surface's kind")
            continue
        try:
            kinds.append(_convection_kind(geometry))
        except NoBranchKind as reason:
            skipped[geometry.name] = str(reason)
    return kinds, skipped


_CONVECTION_KINDS, _SKIPPED = _generated_kinds()
# the airflow kinds build on the classes above (their module imports this one)
from .advection import AIRFLOW, VENT  # noqa: E402
BRANCH_KINDS: Mapping[str, BranchKind] = MappingProxyType({
    kind.name: kind for kind in (*_linear_kinds(), *_CONVECTION_KINDS, RADIATION,
                                 VENT, AIRFLOW)})
# Registered geometries that are not branch kinds, with the reason (their h can still enter a
# network through a film branch).
SKIPPED_GEOMETRIES: Mapping[str, str] = MappingProxyType(_SKIPPED)


def kind_reference() -> list[dict]:
    """One row per kind: kind, p1..p5 (meaning and unit), q, from/to.  For the docs."""
    return [kind.reference() for kind in BRANCH_KINDS.values()]
