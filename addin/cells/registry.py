"""The registry of cell functions: the one place where every spreadsheet function is listed.

Each :class:`CellFunction` names its engine callable by attribute name (``stillair.<name>``), its
arguments in cell order, a one-line description and a category.  Everything spreadsheet-shaped is
generated from this list: the xlwings functions (:mod:`stillair.addin.xlfuncs`), the headless evaluator's
registrations (:mod:`stillair.addin.workbook.formulas_bridge`) and the function reference (``stillair functions``).

Argument kinds:

``number``  a number; an optional one takes its default when blank.  Where the function
            broadcasts (:attr:`CellFunction.takes_arrays`) a range or array is accepted too,
            and the result is an array of the broadcast shape (it spills in Excel 365).
``text``    one text cell (gas, method, case, facing, node or branch name).
``table``   a range (branches or boundaries table); trailing blank rows are ignored.

Result kinds: ``number`` (float), ``text`` (str), ``table`` (2-D list padded with "").
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Callable

from .network import (net_airflow, net_band, net_check, net_heat, net_heat_for, net_peak, net_table, net_temp,
                      net_transient)

__all__ = ["Arg", "CellFunction", "REGISTRY", "BY_NAME", "CATEGORIES", "arg_doc", "lookup"]

_REQUIRED = object()


@dataclass(frozen=True)
class Arg:
    """One argument of a cell function.

    ``engine_name`` is the keyword of the engine callable the value goes to (default: ``name``);
    it differs where the natural name is a VBA keyword (``case``).  ``methods_of`` names the
    engine geometry whose registered correlations fill ``{methods}`` in the text, read when the
    help is shown, so a correlation registered in the engine appears in every cell help.
    """

    name: str
    text: str
    unit: str = ""
    kind: str = "number"
    default: Any = _REQUIRED
    engine_name: str | None = None
    methods_of: str | None = None

    @property
    def doc(self) -> str:
        """The argument's help text, as every host shows it."""
        if self.methods_of is None:
            return self.text
        return self.text.format(methods=_method_list(self.methods_of))

    @property
    def optional(self) -> bool:
        return self.default is not _REQUIRED

    @property
    def keyword(self) -> str:
        return self.engine_name or self.name


def arg_doc(arg: Arg) -> str:
    """An argument's help as the spreadsheet hosts show it (Excel's and LibreOffice's function
    wizards): the text, its unit in brackets and "Optional." where the text does not say so."""
    unit = f" [{arg.unit}]" if arg.unit and arg.unit not in arg.doc else ""
    optional = " Optional." if arg.optional and "blank" not in arg.doc else ""
    return f"{arg.doc}{unit}{optional}"


@dataclass(frozen=True)
class CellFunction:
    """One cell function: NAME(args...) -> result, computed by ``stillair.<engine>``.

    ``invoke(callable, kwargs)`` adapts the call where the cell does more than pass its
    arguments through (pick one value out of a network result, render a note); by default the
    engine callable is called with the keyword arguments.  ``call=False`` marks an engine
    attribute that is a value, not a function (the version).
    """

    name: str
    engine: str
    args: tuple[Arg, ...]
    description: str
    category: str
    result: str = "number"
    unit: str = ""
    invoke: Callable[[Any, dict], Any] | None = field(default=None, compare=False)
    call: bool = True
    # Derived once from the fields above (__post_init__), read on every call of the cell.
    #: True when every numeric argument may be a range or array (the result is then an array of
    #: the broadcast shape): every computing function without a table argument.  Functions that
    #: pass their arguments straight to a broadcasting engine callable are computed in one call;
    #: those with ``invoke`` element by element.
    takes_arrays: bool = field(init=False, compare=False, repr=False)
    #: True when an argument is a table (the network functions).
    has_table: bool = field(init=False, compare=False, repr=False)
    #: For a function that passes its arguments straight through (no table, no ``invoke``), what
    #: the call path's plain-value fast path reads (``callpath._plain_kwargs``): the count of
    #: required arguments, the optional ones' (keyword, default) pairs, and per argument
    #: (keyword, is text); None for the others.
    plain: tuple[int, tuple[tuple[str, Any], ...], tuple[tuple[str, bool], ...]] | None = field(
        init=False, compare=False, repr=False)

    def __post_init__(self):
        has_table = any(a.kind == "table" for a in self.args)
        object.__setattr__(self, "has_table", has_table)
        object.__setattr__(self, "takes_arrays", self.call and not has_table
                           and any(a.kind == "number" for a in self.args))
        plain = None
        if self.call and self.invoke is None and all(a.kind in ("number", "text") for a in self.args):
            plain = (sum(1 for a in self.args if not a.optional),
                     tuple((a.keyword, a.default) for a in self.args if a.optional),
                     tuple((a.keyword, a.kind == "text") for a in self.args))
        object.__setattr__(self, "plain", plain)

    def signature(self) -> str:
        parts = [f"[{a.name}]" if a.optional else a.name for a in self.args]
        return f"{self.name}({', '.join(parts)})"


CATEGORIES = {
    "properties": "stillair gas properties",
    "groups": "stillair dimensionless groups",
    "nusselt": "stillair Nusselt numbers",
    "coefficients": "stillair heat-transfer coefficients",
    "network": "stillair thermal network",
    "info": "stillair information",
}

# ---------------------------------------------------------------------------------------------
# Shared argument definitions (each written once, used by every function that takes it).

P = Arg("pressure", "Absolute gas pressure in Pa; blank for 101325 Pa (sea level).", "Pa",
        default=101325.0)
GAS = Arg("gas", 'Gas name (air, argon, krypton, xenon, sf6, co2, nitrogen) or a mixture such as '
          '"argon:0.9, air:0.1" (mole fractions); blank for air.', kind="text", default="air")
GAS_REQUIRED = Arg("gas", GAS.doc.replace("; blank for air", ""), kind="text")
T = Arg("t", "Gas temperature in degrees Celsius.", "°C")
RA = Arg("Ra", "Rayleigh number based on the geometry's own length (>= 0).", engine_name="ra")
PR = Arg("Pr", "Prandtl number of the fluid (> 0).", engine_name="pr")
RA_GAP = Arg("Ra", "Rayleigh number based on the gap (>= 0).", engine_name="ra")


def _method_list(geometry: str) -> str:
    """The engine's methods of ``geometry`` in registration order, each serving only some of
    the geometry's cases followed by those cases: "a (hot-up, cold-down), b"."""
    from stillair import GEOMETRIES, methods_for
    cases = GEOMETRIES[geometry].cases
    served = {method: [case for case in cases if method in methods_for(geometry, case)]
              for method in methods_for(geometry)}
    return ", ".join(method if len(only) == len(cases) else
                     f"{method} ({only[0]} only)" if len(only) == 1 else f"{method} ({', '.join(only)})"
                     for method, only in served.items())


def _method(label: str, geometry: str) -> Arg:
    return Arg("method", f"Correlation for the {label}: {{methods}}; blank or \"auto\" picks the "
               "one whose validity range covers the case.", kind="text", default="auto",
               methods_of=geometry)


M_VPLATE = _method("vertical plate", "vplate")
M_HPLATE = _method("horizontal plate", "hplate")
M_TPLATE = _method("tilted plate", "tplate")
M_HCYL = _method("horizontal cylinder", "hcyl")
M_VCYL = _method("vertical cylinder", "vcyl")
M_SPHERE = _method("sphere", "sphere")
M_CAVITY = _method("cavity", "cavity")
PLATE_CASE = Arg("plate_case", 'Plate case: "hot-up", "hot-down", "cold-up" or "cold-down" (the '
                 "exposed face points up or down and is hotter or colder than the fluid).",
                 kind="text", engine_name="case")
CAV_TILT = Arg("tilt", "Cavity tilt in degrees from the horizontal: 0 heated from below, 90 vertical "
               "(blank), 180 heated from above.", "°", default=90.0)
PLATE_TILT = Arg("tilt", "Plate tilt in degrees from the vertical (0 vertical, 90 horizontal).", "°")
ASPECT = Arg("aspect", "Cavity aspect ratio height/gap (> 0).")
SLENDERNESS = Arg("slenderness", "Cylinder slenderness height/diameter (> 0).")
TS = Arg("ts", "Surface temperature in degrees Celsius.", "°C")
TF = Arg("tf", "Temperature of the still fluid far from the surface, in degrees Celsius.", "°C")
FACING = Arg("facing", 'Which way the exposed face points: "up" or "down".', kind="text")
BRANCHES = Arg("branches", "Branches table, one row per branch: name | from | to | kind | p1 | p2 | "
               "p3 | p4 | p5 | method (a header row above them is allowed; blank rows are skipped).",
               kind="table")
BOUNDARIES = Arg("boundaries", "Boundaries table, one row per condition: node | T or Q | value "
                 "(T fixes a temperature in °C, Q adds a heat input in W; a header row above them "
                 "is allowed; blank rows are skipped).", kind="table")
NET_GAS = Arg("gas", "Gas of the convection branches (name or mixture); blank for air.",
              kind="text", default="air")

# ---------------------------------------------------------------------------------------------
# Properties

_PROPERTIES = [
    ("DENSITY", "density", "kg/m³", "Density"),
    ("VISCOSITY", "viscosity", "Pa·s", "Dynamic viscosity"),
    ("KINVISC", "kinvisc", "m²/s", "Kinematic viscosity"),
    ("CONDUCTIVITY", "conductivity", "W/(m·K)", "Thermal conductivity"),
    ("CP", "cp", "J/(kg·K)", "Specific heat capacity at constant pressure"),
    ("DIFFUSIVITY", "diffusivity", "m²/s", "Thermal diffusivity"),
    ("PRANDTL", "prandtl", "-", "Prandtl number"),
    ("EXPANSION", "expansion", "1/K", "Volumetric thermal expansion coefficient (beta)"),
]



def _in(unit: str) -> str:
    return "" if unit == "-" else f" in {unit}"


_entries: list[CellFunction] = []
for _cell, _snake, _unit, _what in _PROPERTIES:
    _entries.append(CellFunction(
        f"AIR_{_cell}", f"air_{_snake}", (T, P),
        f"{_what} of dry air{_in(_unit)} at temperature t (°C) and pressure (Pa).",
        CATEGORIES["properties"], unit=_unit))
for _cell, _snake, _unit, _what in _PROPERTIES:
    _entries.append(CellFunction(
        f"GAS_{_cell}", f"gas_{_snake}", (GAS_REQUIRED, T, P),
        f"{_what} of a fill gas or gas mixture{_in(_unit)} at temperature t (°C) and pressure (Pa).",
        CATEGORIES["properties"], unit=_unit))

_entries += [
    CellFunction("ALTITUDE_PRESSURE", "altitude_pressure",
                 (Arg("altitude_m", "Altitude above sea level in m (standard atmosphere).", "m"),),
                 "Standard-atmosphere pressure in Pa at an altitude in m, for the pressure argument.",
                 CATEGORIES["properties"], unit="Pa"),
]

# ---------------------------------------------------------------------------------------------
# Dimensionless groups

_GROUP_ARGS = (Arg("t1", "Temperature of one surface in degrees Celsius.", "°C"),
               Arg("t2", "Temperature of the other surface or of the fluid, in degrees Celsius.", "°C"),
               Arg("length", "Characteristic length in m (plate height, gap, diameter...).", "m"),
               GAS, P)
_entries += [
    CellFunction("RAYLEIGH", "rayleigh", _GROUP_ARGS,
                 "Rayleigh number g·beta·|t1-t2|·L³/(nu·alpha), properties at the mean temperature.",
                 CATEGORIES["groups"], unit="-"),
    CellFunction("GRASHOF", "grashof", _GROUP_ARGS,
                 "Grashof number g·beta·|t1-t2|·L³/nu², properties at the mean temperature.",
                 CATEGORIES["groups"], unit="-"),
]

# ---------------------------------------------------------------------------------------------
# Nusselt numbers and the validity information that goes with them


def _buoyancy_geometries() -> dict:
    """The geometries whose correlations read Ra (every one but the wind's forced flows, which
    read Re and enter through the H_ functions' wind argument): those NU_NOTE and NU_SPREAD take."""
    from stillair.correlations import GEOMETRIES
    return {name: geometry for name, geometry in GEOMETRIES.items() if "ra" in geometry.inputs}


def _any_geometry(function_name: str, value) -> str:
    """The geometry cell of NU_NOTE / NU_SPREAD, checked against the geometries that read Ra."""
    from stillair import InputError
    names = _buoyancy_geometries()
    geometry = str(value).strip().lower()
    if geometry not in names:
        raise InputError(function_name, "geometry", value, "one of " + ", ".join(f'"{name}"' for name in names))
    return geometry


def _nu_note(nusselt, kwargs):
    """Render stillair.nusselt's validity information as one line of text."""
    from stillair import GEOMETRIES  # the geometry's inputs decide which arguments matter

    from stillair import InputError

    geometry = _any_geometry("nu_note", kwargs.pop("geometry"))
    method = kwargs.pop("method")
    case = kwargs.pop("case")
    _aspect_as_slenderness(geometry, kwargs)
    spec = GEOMETRIES[geometry]
    inputs = {k: v for k, v in kwargs.items() if k in spec.inputs}
    if "tilt" in spec.inputs and inputs.get("tilt") is None and spec.default_tilt is not None:
        inputs["tilt"] = spec.default_tilt   # the geometry's own blank tilt (cavity: 90)
    for name in spec.inputs:
        if inputs.get(name) is None:
            raise InputError("nu_note", "aspect" if name == "slenderness" else name, None, f'a number for geometry "{geometry}"')
    result = nusselt(geometry, method, case if spec.cases else None,
                     function_name="nu_note", **inputs).scalar()
    if result.in_range:
        # a blend names every correlation that carries weight ("auto blend of a and b")
        return f"in range ({result.blend or result.method})"
    return str(result.note)


# The case and tilt of a function that takes any geometry (NU_NOTE, NU_SPREAD).
def _case_choices() -> str:
    """The cases of every geometry that has some, as "a, b for g1 and g2; c, d for g3"."""
    by_cases: dict[tuple, list[str]] = {}
    for geometry in _buoyancy_geometries().values():
        if geometry.cases:
            by_cases.setdefault(geometry.cases, []).append(geometry.name)
    return "; ".join(f"{', '.join(cases)} for {' and '.join(names)}" for cases, names in by_cases.items())


ANY_PLATE_CASE = Arg("plate_case", f"Case: {_case_choices()}; blank otherwise.", kind="text", default=None,
                     engine_name="case")
ANY_TILT = Arg("tilt", "Tilt in degrees: from the vertical for tplate, from the horizontal "
               "for cavity (blank 90); blank otherwise.", "°", default=None)


def _aspect_as_slenderness(geometry, kwargs) -> None:
    """The one shape-ratio cell ("aspect") of a function that takes any geometry is a vertical
    cylinder's slenderness height/diameter."""
    from stillair import GEOMETRIES
    spec = GEOMETRIES.get(geometry.strip().lower()) if isinstance(geometry, str) else None
    if spec is not None and "slenderness" in spec.inputs:
        kwargs["slenderness"] = kwargs.pop("aspect")


def _geometry_choices() -> str:
    names = list(_buoyancy_geometries())
    return ", ".join(names[:-1]) + " or " + names[-1]


# The geometry and shape-ratio cells of a function that takes any geometry (NU_NOTE, NU_SPREAD).
ANY_GEOMETRY = Arg("geometry", f"Geometry: {_geometry_choices()}.", kind="text")
ANY_ASPECT = Arg("aspect", "Shape ratio: height/gap for cavity, height/spacing for channel, "
                 "height/diameter for vcyl; blank otherwise.", default=None)


_entries += [
    CellFunction("NU_VPLATE", "nu_vplate", (RA, PR, M_VPLATE),
                 "Nusselt number of a vertical plate (Ra on the plate height).",
                 CATEGORIES["nusselt"], unit="-"),
    CellFunction("NU_HPLATE", "nu_hplate", (RA, PR, PLATE_CASE, M_HPLATE),
                 "Nusselt number of a horizontal plate (Ra on area/perimeter) for the given case.",
                 CATEGORIES["nusselt"], unit="-"),
    CellFunction("NU_TPLATE", "nu_tplate", (RA, PR, PLATE_TILT, PLATE_CASE, M_TPLATE),
                 "Nusselt number of a tilted plate for the given case; tilt in degrees from the "
                 "vertical (0 vertical, 90 horizontal).",
                 CATEGORIES["nusselt"], unit="-"),
    CellFunction("NU_HCYL", "nu_hcyl", (RA, PR, M_HCYL),
                 "Nusselt number of a horizontal cylinder (Ra on the diameter).",
                 CATEGORIES["nusselt"], unit="-"),
    CellFunction("NU_SPHERE", "nu_sphere", (RA, PR, M_SPHERE),
                 "Nusselt number of a sphere (Ra on the diameter).",
                 CATEGORIES["nusselt"], unit="-"),
    CellFunction("NU_VCYL", "nu_vcyl", (RA, PR, SLENDERNESS, M_VCYL),
                 "Nusselt number of a vertical cylinder (Ra on the height; slenderness = "
                 "height/diameter).", CATEGORIES["nusselt"], unit="-"),
    CellFunction("NU_CAVITY", "nu_cavity", (RA_GAP, PR, ASPECT, CAV_TILT, M_CAVITY),
                 "Nusselt number across an enclosed gas layer (Ra on the gap), never below 1; tilt "
                 "in degrees from the horizontal (0 heated from below, 90 vertical, 180 heated "
                 "from above).",
                 CATEGORIES["nusselt"], unit="-"),
    CellFunction("CAVITY_METHOD", "cavity_method",
                 (RA_GAP, PR, ASPECT, CAV_TILT,
                  M_CAVITY),
                 "Name of the cavity correlation NU_CAVITY uses for these inputs (the auto choice); "
                 "tilt from the horizontal as for NU_CAVITY.",
                 CATEGORIES["nusselt"], result="text"),
    CellFunction("NU_NOTE", "nusselt",
                 (ANY_GEOMETRY, RA, PR, ANY_PLATE_CASE, ANY_TILT, ANY_ASPECT,
                  Arg("method", "Correlation name as for the NU_ functions; blank or \"auto\".",
                      kind="text", default="auto")),
                 'Validity note of a Nusselt correlation: "in range (method)" or which bound is '
                 "crossed. Tilt from the vertical for tplate, from the horizontal for cavity.",
                 CATEGORIES["nusselt"], result="text", invoke=_nu_note),
]

# ---------------------------------------------------------------------------------------------
# Heat-transfer coefficients

_LENGTH_DOC = {
    "height": "Plate height in m (> 0).",
    "length": "Characteristic length in m: area/perimeter for a horizontal plate (> 0).",
    "diameter": "Outside diameter in m (> 0).",
}
DIAMETER = Arg("diameter", _LENGTH_DOC["diameter"], "m")
# The wind on an exposed surface (stillair.forced): optional, after every earlier argument.
WIND = Arg("wind", "Wind speed in m/s (>= 0), taken horizontal; blank or 0 for still air (the "
           "still-air value exactly). With a wind h = (h_N³ + h_F³)^(1/3), the forced part from the "
           "flat-plate, cross-flow cylinder or sphere correlation.", "m/s", default=0.0)


def _wind_length(blank: str) -> Arg:
    return Arg("wind_length", f"Plate length in m along the wind (> 0); {blank}.", "m", default=None)


_entries += [
    CellFunction("H_VPLATE", "h_vplate",
                 (TS, TF, Arg("height", _LENGTH_DOC["height"], "m"), GAS, P, M_VPLATE,
                  WIND, _wind_length("blank: the plate height (a horizontal wind across a vertical face "
                                     "usually runs along its width: give that)")),
                 "Convection coefficient in W/(m²·K) of a vertical plate in still gas or in a wind, "
                 "properties at the film temperature.", CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_HPLATE", "h_hplate",
                 (TS, TF, Arg("length", _LENGTH_DOC["length"], "m"), FACING, GAS, P, M_HPLATE,
                  WIND, _wind_length("required with a wind (area/perimeter is no length along the wind)")),
                 "Convection coefficient in W/(m²·K) of a horizontal plate, still air or in a wind; "
                 "hot/cold follows from ts and tf.", CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_TPLATE", "h_tplate",
                 (TS, TF, Arg("length", "Plate length in m along the slope (> 0).", "m"),
                  PLATE_TILT, FACING, GAS, P, M_TPLATE, WIND,
                  _wind_length("blank: the length along the slope")),
                 "Convection coefficient in W/(m²·K) of a tilted plate, still air or in a wind; tilt "
                 "in degrees from the vertical (0 vertical, 90 horizontal).",
                 CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_HCYL", "h_hcyl",
                 (TS, TF, DIAMETER, GAS, P, M_HCYL, WIND),
                 "Convection coefficient in W/(m²·K) of a horizontal cylinder or pipe, still air or a "
                 "wind across its axis.",
                 CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_SPHERE", "h_sphere",
                 (TS, TF, DIAMETER, GAS, P, M_SPHERE, WIND),
                 "Convection coefficient in W/(m²·K) of a sphere, still air or in a wind.",
                 CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_VCYL", "h_vcyl",
                 (TS, TF, Arg("height", "Cylinder height in m (> 0).", "m"), DIAMETER, GAS, P, M_VCYL,
                  WIND),
                 "Convection coefficient in W/(m²·K) of the side of a vertical cylinder, still air or "
                 "a wind across it, properties at the film temperature.", CATEGORIES["coefficients"],
                 unit="W/(m²·K)"),
    CellFunction("H_CAVITY", "h_cavity",
                 (Arg("t1", "Temperature of one cavity face in degrees Celsius.", "°C"),
                  Arg("t2", "Temperature of the other cavity face in degrees Celsius.", "°C"),
                  Arg("gap", "Gap width between the faces in m (> 0).", "m"),
                  Arg("height", "Cavity height in m along the faces (> 0).", "m"),
                  CAV_TILT, GAS, P, M_CAVITY),
                 "Convection coefficient in W/(m²·K) across an enclosed gas layer (Nu·k/gap), "
                 "properties at the mean temperature; tilt in degrees from the horizontal (0 "
                 "heated from below, 90 vertical).", CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_RAD", "h_rad",
                 (Arg("t1", "Temperature of the radiating surface in degrees Celsius.", "°C"),
                  Arg("t2", "Temperature of the facing surface or of the surroundings, in °C.", "°C"),
                  Arg("eps1", "Emissivity of surface 1 (0 to 1).", "-"),
                  Arg("eps2", "Emissivity of surface 2 for two parallel surfaces; blank when "
                      "surface 1 sees large surroundings at t2.", "-", default=None)),
                 "Linearised radiation coefficient in W/(m²·K) between two surfaces or a surface "
                 "and large surroundings.", CATEGORIES["coefficients"], unit="W/(m²·K)"),
]

# ---------------------------------------------------------------------------------------------
# Thermal network.  The four cells share one solve per distinct set of inputs (cached in
# stillair.addin.cells.callpath), so a sheet with NET_SOLVE and many NET_TEMP cells solves once.


_NET = (BRANCHES, BOUNDARIES)
_entries += [
    CellFunction("NET_SOLVE", "solve_network", _NET + (NET_GAS, P),
                 "Solves the thermal network; returns a table (spills) of node temperatures in °C "
                 "and branch heat flows in W with h, R, Ra, Nu, method and notes.",
                 CATEGORIES["network"], result="table", invoke=net_table),
    CellFunction("NET_TEMP", "solve_network",
                 _NET + (Arg("node", "Name of the node whose temperature is wanted.", kind="text"),
                         NET_GAS, P),
                 "Temperature in °C of one node of the solved thermal network.",
                 CATEGORIES["network"], unit="°C", invoke=net_temp),
    CellFunction("NET_HEAT", "solve_network",
                 _NET + (Arg("branch", "Name of the branch whose heat flow is wanted.", kind="text"),
                         NET_GAS, P),
                 "Heat flow in W through one branch of the solved network, positive from -> to.",
                 CATEGORIES["network"], unit="W", invoke=net_heat),
    CellFunction("NET_CHECK", "solve_network", _NET + (NET_GAS, P),
                 'Check of the solved network: "OK" with iterations and energy residual, or the '
                 "validity notes of its branches.", CATEGORIES["network"], result="text",
                 invoke=net_check),
    CellFunction("STILLAIR_VERSION", "__version__", (),
                 "Version of the stillair engine, for traceability of a calculation.",
                 CATEGORIES["info"], result="text", call=False),
]

# ---------------------------------------------------------------------------------------------
# Open vertical channels and plate-fin heat sinks

CATEGORIES["heatsinks"] = "stillair channels and heat sinks"
CHANNEL_CASE = Arg("channel_case", 'Channel walls: "isothermal" (both, blank), "isothermal-adiabatic" '
                   '(one isothermal, one adiabatic), "flux" (uniform heat flux on both) or '
                   '"flux-adiabatic" (flux on one).', kind="text", default="isothermal", engine_name="case")
M_CHANNEL = _method("channel", "channel")
CHANNEL_TS = Arg("ts", "Wall temperature in °C; for the flux cases the wall temperature at the top of "
                 "the channel (the maximum).", "°C")
CHANNEL_TF = Arg("tf", "Temperature of the still air around the channel (entering at the bottom), °C.", "°C")
CHANNEL_HEIGHT = Arg("height", "Plate height in m along the vertical flow (> 0).", "m")
SINK_ARGS = (
    Arg("t_ambient", "Ambient air temperature in °C (large surroundings at the same temperature).", "°C"),
    Arg("base_width", "Width of the base across the fins in m.", "m"),
    Arg("fin_height", "Height of each fin from the base to its tip in m.", "m"),
    Arg("fin_length", "Length of the fins along the vertical flow in m.", "m"),
    Arg("fin_thickness", "Thickness of each fin in m.", "m"),
    Arg("fin_count", "Number of fins (whole number >= 2; count × thickness < base width).", "-"),
    Arg("conductivity", "Thermal conductivity of the fin material in W/(m·K).", "W/(m·K)"),
    Arg("emissivity", "Emissivity of the sink's surface, 0 to 1 (anodised about 0.8, bare aluminium "
        "about 0.05).", "-"),
    GAS, P)
_entries += [
    CellFunction("NU_CHANNEL", "nu_channel",
                 (Arg("Ra", "Rayleigh number on the spacing; for the flux cases the modified Ra*_S on "
                      "the wall heat flux (>= 0).", engine_name="ra"), PR,
                  Arg("aspect", "Channel aspect ratio height/spacing (> 0).", "-"), CHANNEL_CASE, M_CHANNEL),
                 "Nusselt number h·S/k of an open vertical parallel-plate channel (flux cases: on the "
                 "top wall temperature).", CATEGORIES["nusselt"], unit="-"),
    CellFunction("H_CHANNEL", "h_channel",
                 (CHANNEL_TS, CHANNEL_TF, Arg("spacing", "Gap between the plates in m (> 0).", "m"),
                  CHANNEL_HEIGHT, CHANNEL_CASE, GAS, P, M_CHANNEL),
                 "Convection coefficient in W/(m²·K) on the walls of an open vertical parallel-plate "
                 "channel, properties at the film temperature.", CATEGORIES["coefficients"],
                 unit="W/(m²·K)"),
    CellFunction("CHANNEL_SPACING", "channel_spacing",
                 (CHANNEL_TS, CHANNEL_TF, CHANNEL_HEIGHT, CHANNEL_CASE,
                  Arg("optimum", '"array" (blank): most heat from a fixed width of plates; "plate": '
                      "where h reaches 99 % of the single-plate value.", kind="text", default="array"),
                  GAS, P),
                 "Optimum gap in m between vertical parallel plates (Bar-Cohen and Rohsenow composite).",
                 CATEGORIES["heatsinks"], unit="m"),
    CellFunction("HEATSINK_Q", "heatsink_q",
                 (Arg("t_base", "Base temperature of the heat sink in °C.", "°C"),) + SINK_ARGS,
                 "Heat in W rejected by a plate-fin heat sink with vertical fins in still air: fins "
                 "(channel h, fin efficiency), exposed base and radiation from its envelope.",
                 CATEGORIES["heatsinks"], unit="W"),
    CellFunction("HEATSINK_TBASE", "heatsink_tbase",
                 (Arg("q", "Heat to reject in W (>= 0).", "W"),) + SINK_ARGS,
                 "Base temperature in °C at which a plate-fin heat sink with vertical fins rejects q "
                 "(solved from HEATSINK_Q).", CATEGORIES["heatsinks"], unit="°C"),
]

# ---------------------------------------------------------------------------------------------
# The spread of the published correlations, and the network's correlation band


def _nu_spread_row(nu_spread, kwargs):
    """One row: low, high, count, the covering methods (lowest Nu first).  For a vertical
    cylinder the aspect cell is its slenderness height/diameter."""
    kwargs["geometry"] = _any_geometry("nu_spread", kwargs["geometry"])
    _aspect_as_slenderness(kwargs["geometry"], kwargs)
    spread = nu_spread(**kwargs)
    return [[spread.low, spread.high, spread.count, spread.text]]


_entries += [
    CellFunction(
        "NU_SPREAD", "nu_spread",
        (ANY_GEOMETRY, RA, PR, ANY_PLATE_CASE, ANY_TILT, ANY_ASPECT),
        "Spread of the published correlations covering the case: one row of lowest Nu, highest Nu, "
        "how many cover it, the methods (lowest first). Not a confidence interval. Tilt from the "
        "vertical for tplate, from the horizontal for cavity.",
        CATEGORIES["nusselt"], result="table", invoke=_nu_spread_row),
    CellFunction(
        "NET_BAND", "solve_network",
        _NET + (Arg("node", "Name of the node whose temperature band is wanted.", kind="text"), NET_GAS, P),
        "Node temperature in °C with every convection branch at the lowest and at the highest Nu of its "
        "in-range correlations: one row, low and high. The spread of published correlations, not a "
        "confidence interval.", CATEGORIES["network"], result="table", unit="°C", invoke=net_band),
]

# ---------------------------------------------------------------------------------------------
# Ventilation: the stack flow through two openings, and the airflow a dissipation needs

CATEGORIES["ventilation"] = "stillair ventilation"
AREA_ARG = "Area of the {} opening in m² (> 0), as cut; a screen or grille goes in extra_loss."
_entries += [
    CellFunction("STACK_FLOW", "stack_flow",
                 (Arg("t_inside", "Temperature of the well-mixed inside air in °C.", "°C"),
                  Arg("t_outside", "Temperature of the outside air in °C.", "°C"),
                  Arg("inlet_area", AREA_ARG.format("low (inlet)"), "m²"),
                  Arg("outlet_area", AREA_ARG.format("high (outlet)"), "m²"),
                  Arg("height", "Height between the openings' centres in m (> 0).", "m"),
                  Arg("discharge", "Discharge coefficient of the openings, in (0, 1]; blank for 0.61 "
                      "(sharp-edged).", "-", default=0.61),
                  Arg("extra_loss", "Extra loss coefficient in the low opening (screen, grille, filter) on "
                      "the velocity through it, >= 0; blank for 0.", "-", default=0.0),
                  GAS, P),
                 "Mass flow in kg/s the stack effect drives through a low and a high opening (negative: "
                 "downward, inside air colder); divide by the outside density for the volume drawn in.",
                 CATEGORIES["ventilation"], unit="kg/s"),
    CellFunction("AIRFLOW_FOR", "airflow_for",
                 (Arg("heat", "Heat in W the air must carry away (>= 0).", "W"),
                  Arg("rise", "Allowed rise of the air from intake to exhaust in K (> 0).", "K"),
                  Arg("t_air", "Temperature of the air drawn in, °C; blank for 20 °C.", "°C", default=20.0),
                  P),
                 "Volume flow in m³/s of air at t_air that carries the heat away with the rise: "
                 "V = Q / (rho cp dT), rho at t_air, cp at the mean air temperature.",
                 CATEGORIES["ventilation"], unit="m³/s"),
    CellFunction("NET_AIRFLOW", "solve_network",
                 _NET + (Arg("branch", "Name of a vent or airflow branch.", kind="text"), NET_GAS, P),
                 "Volume flow in m³/s of outside air (at the to node's temperature) through a vent or "
                 "airflow branch of the solved thermal network.", CATEGORIES["ventilation"], unit="m³/s",
                 invoke=net_airflow),
]

# ---------------------------------------------------------------------------------------------
# Humid air, and the questions turned round (the heat for a temperature, the insulation for a
# surface temperature)

CATEGORIES["humid"] = "stillair humid air"
CATEGORIES["insulation"] = "stillair insulation"
RH = Arg("rh", "Relative humidity as a fraction from 0 to 1 (50 % is 0.5); over ice below 0.01 °C.", "-")
T_HUMID = Arg("t", "Air temperature in degrees Celsius.", "°C")
HUMID_MODEL = Arg("model", '"ideal" or blank: perfect-gas relations (ASHRAE Fundamentals ch. 1); "enhanced": with '
                  "the enhancement factor of Greenspan and Hardy, as real-gas formulations (dew points differ by "
                  "at most 0.07 K).", kind="text", default="ideal")


_entries += [
    CellFunction("SAT_PRESSURE", "saturation_pressure",
                 (Arg("t", "Temperature in degrees Celsius.", "°C"),
                  Arg("over", '"water", "ice", or blank for auto (ice below 0.01 °C, water above).', kind="text",
                      default="auto")),
                 "Saturation pressure of water vapour in Pa over water or ice (Hyland-Wexler, ASHRAE "
                 "Fundamentals).", CATEGORIES["humid"], unit="Pa"),
    CellFunction("VAPOUR_PRESSURE", "vapour_pressure", (T_HUMID, RH, P, HUMID_MODEL),
                 "Partial pressure of the water vapour in humid air in Pa: rh x saturation pressure (x the "
                 "enhancement factor in the enhanced model).",
                 CATEGORIES["humid"], unit="Pa"),
    CellFunction("HUMIDITY_RATIO", "humidity_ratio", (T_HUMID, RH, P, HUMID_MODEL),
                 "Humidity ratio of humid air in kg of water vapour per kg of dry air.",
                 CATEGORIES["humid"], unit="kg/kg"),
    CellFunction("DEW_POINT", "dew_point", (T_HUMID, RH, P, HUMID_MODEL),
                 "Dew point of humid air in °C; below 0.01 °C the frost point (saturation over ice). Ideal "
                 "gases by default; the enhanced model differs by at most 0.07 K (and is within 0.006 K of "
                 "real-gas formulations).",
                 CATEGORIES["humid"], unit="°C"),
    CellFunction("SURFACE_RH", "surface_rh",
                 (Arg("t_air", "Air temperature in degrees Celsius.", "°C"), RH,
                  Arg("t_surface", "Surface temperature in degrees Celsius.", "°C"), P, HUMID_MODEL),
                 "Relative humidity of the air at a colder or warmer surface (fraction); above 1 the surface "
                 "is below the dew point and water condenses.", CATEGORIES["humid"], unit="-"),
    CellFunction("TEMP_FACTOR", "temperature_factor",
                 (Arg("t_surface", "Internal surface temperature in degrees Celsius.", "°C"),
                  Arg("t_inside", "Internal air temperature in degrees Celsius.", "°C"),
                  Arg("t_outside", "External air temperature in degrees Celsius (not t_inside).", "°C")),
                 "Temperature factor f_Rsi of ISO 13788: (t_surface - t_outside)/(t_inside - t_outside).",
                 CATEGORIES["humid"], unit="-"),
    CellFunction("NET_HEAT_FOR", "heat_for_temperature",
                 _NET + (Arg("node", "Name of the node whose heat input is sought (its Q rows are replaced).",
                             kind="text"),
                         Arg("temperature", "Target temperature in degrees Celsius.", "°C"),
                         NET_GAS, P,
                         Arg("at", "Node that must reach the temperature; blank for the node itself.",
                             kind="text", default=None)),
                 "Heat input in W at a node that brings it (or the node at) to a temperature, the whole "
                 "network re-solved: the allowed dissipation for a limit; negative: cooling needed.",
                 CATEGORIES["network"], unit="W", invoke=net_heat_for),
    CellFunction("INSULATION_THICKNESS", "insulation_thickness",
                 (Arg("t_inner", "Temperature under the insulation (pipe or face metal) in degrees Celsius.", "°C"),
                  Arg("t_air", "Still air temperature in degrees Celsius.", "°C"),
                  Arg("t_surface", "Outer surface temperature wanted in degrees Celsius (a touch limit, or dew "
                      "point + margin).", "°C"),
                  Arg("conductivity", "Insulation conductivity in W/(m·K) (> 0).", "W/(m·K)"),
                  Arg("emissivity", "Emissivity of the outer surface (0 to 1).", "-"),
                  Arg("geometry", '"hcyl" (horizontal pipe), "vplate" (vertical face) or "hplate" (horizontal '
                      'face).', kind="text"),
                  Arg("size", "Bare pipe outside diameter (hcyl), face height (vplate) or area/perimeter "
                      "(hplate), in m.", "m"),
                  Arg("facing", '"up" or "down" for hplate; blank otherwise.', kind="text", default=None),
                  Arg("t_surroundings", "Temperature of the surroundings the surface radiates to, in °C; blank "
                      "for t_air.", "°C", default=None),
                  GAS, P, WIND,
                  _wind_length("faces only; blank: the face height (vplate), required for hplate with a wind")),
                 "Insulation thickness in m at which the outer surface of an insulated pipe or face is at "
                 "t_surface (ISO 12241 surface-temperature and condensation criteria).",
                 CATEGORIES["insulation"], unit="m"),
]

# ---------------------------------------------------------------------------------------------
# The network through time: one integration per distinct set of inputs (cached by the engine), so
# a sheet of INDEX(NET_TRANSIENT(...)) and NET_PEAK cells integrates once.

CAPACITIES = Arg("capacities", "Capacities table: node | C in J/K, one row per node that stores heat; a node "
                 "without a row is quasi-steady (balanced at every instant).", kind="table")
TIMES = Arg("times", "Output times in s: a column, a row or a block read row by row, increasing; the "
            "solution starts at the first.", "s", kind="table")
SERIES = Arg("series", "Series table: series | time s | value, for boundary rows whose value names a series "
             "(linear between points, held outside them); blank for none.", kind="table", default=None)
INITIAL = Arg("initial", 'Start in °C of every node with a capacity, a table node | °C, or "periodic" (the '
              "times are one repeating cycle); blank: the steady network at the first time.",
              kind="table", default=None)
_TRANSIENT = (BRANCHES, BOUNDARIES, CAPACITIES, TIMES)
_entries += [
    CellFunction("NET_TRANSIENT", "solve_transient", _TRANSIENT + (SERIES, INITIAL, NET_GAS, P),
                 "Solves the thermal network through time (capacities, boundaries from series); returns a "
                 "table (spills): a header, then per output time the time in s and every node's °C.",
                 CATEGORIES["network"], result="table", invoke=net_transient),
    CellFunction("NET_PEAK", "solve_transient",
                 _TRANSIENT + (Arg("node", "Name of the node whose extreme is wanted.", kind="text"),
                               Arg("which", '"max" (blank) for the peak, "min" for the minimum.', kind="text",
                                   default="max"), SERIES, INITIAL, NET_GAS, P),
                 "Peak (or minimum) temperature of one node over the output times of the network through "
                 "time: one row, °C and the time in s when it occurs.",
                 CATEGORIES["network"], result="table", unit="°C", invoke=net_peak),
]

REGISTRY: tuple[CellFunction, ...] = tuple(_entries)
BY_NAME: dict[str, CellFunction] = {f.name: f for f in REGISTRY}
del _entries


def lookup(name: str) -> CellFunction:
    return BY_NAME[name.upper()]
