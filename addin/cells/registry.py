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

from .network import net_band, net_check, net_heat, net_table, net_temp

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

    @property
    def takes_arrays(self) -> bool:
        """True when every numeric argument may be a range or array (the result is then an
        array of the broadcast shape): every computing function without a table argument.
        Functions that pass their arguments straight to a broadcasting engine callable are
        computed in one call; those with ``invoke`` element by element."""
        return (self.call and any(a.kind == "number" for a in self.args)
                and not any(a.kind == "table" for a in self.args))

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


def _nu_note(nusselt, kwargs):
    """Render stillair.nusselt's validity information as one line of text."""
    from stillair import GEOMETRIES  # the geometry's inputs decide which arguments matter

    from stillair import InputError

    geometry = str(kwargs.pop("geometry")).strip().lower()
    if geometry not in GEOMETRIES:
        raise InputError("nu_note", "geometry", kwargs.get("geometry", geometry),
                         "one of " + ", ".join(f'"{name}"' for name in GEOMETRIES))
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
    from stillair.correlations import GEOMETRIES
    by_cases: dict[tuple, list[str]] = {}
    for geometry in GEOMETRIES.values():
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
    from stillair.correlations import GEOMETRIES
    names = list(GEOMETRIES)
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
_entries += [
    CellFunction("H_VPLATE", "h_vplate",
                 (TS, TF, Arg("height", _LENGTH_DOC["height"], "m"), GAS, P, M_VPLATE),
                 "Convection coefficient in W/(m²·K) of a vertical plate in still gas, properties "
                 "at the film temperature.", CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_HPLATE", "h_hplate",
                 (TS, TF, Arg("length", _LENGTH_DOC["length"], "m"), FACING, GAS, P, M_HPLATE),
                 "Convection coefficient in W/(m²·K) of a horizontal plate; hot/cold follows from "
                 "ts and tf.", CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_TPLATE", "h_tplate",
                 (TS, TF, Arg("length", "Plate length in m along the slope (> 0).", "m"),
                  PLATE_TILT, FACING, GAS, P, M_TPLATE),
                 "Convection coefficient in W/(m²·K) of a tilted plate; tilt in degrees from the "
                 "vertical (0 vertical, 90 horizontal).",
                 CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_HCYL", "h_hcyl",
                 (TS, TF, DIAMETER, GAS, P, M_HCYL),
                 "Convection coefficient in W/(m²·K) of a horizontal cylinder or pipe.",
                 CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_SPHERE", "h_sphere",
                 (TS, TF, DIAMETER, GAS, P, M_SPHERE),
                 "Convection coefficient in W/(m²·K) of a sphere.",
                 CATEGORIES["coefficients"], unit="W/(m²·K)"),
    CellFunction("H_VCYL", "h_vcyl",
                 (TS, TF, Arg("height", "Cylinder height in m (> 0).", "m"), DIAMETER, GAS, P, M_VCYL),
                 "Convection coefficient in W/(m²·K) of the side of a vertical cylinder, properties "
                 "at the film temperature.", CATEGORIES["coefficients"], unit="W/(m²·K)"),
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

REGISTRY: tuple[CellFunction, ...] = tuple(_entries)
BY_NAME: dict[str, CellFunction] = {f.name: f for f in REGISTRY}
del _entries


def lookup(name: str) -> CellFunction:
    return BY_NAME[name.upper()]
