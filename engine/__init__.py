"""stillair: natural-convection and still-air heat transfer as pure numerics.

Temperatures in degrees Celsius at every public interface (kelvin only inside), SI units
otherwise.  The public names mirror the spreadsheet cell functions in snake_case
(``H_CAVITY`` -> :func:`h_cavity`); arrays broadcast, scalar inputs give floats.

>>> import stillair
>>> h = stillair.h_cavity(20.0, 10.0, 0.02, 1.0)          # W/(m²·K) across a 20 mm air gap
>>> result = stillair.solve_network(
...     [["wall", "in", "out", "conduction", 0.1, 0.5, 2.0, None, None, None]],
...     [["in", "T", 20.0], ["out", "T", 0.0]])
>>> round(result.heat["wall"], 6)
200.0

Modules, one per physical topic: :mod:`stillair.gases` (gas and mixture properties),
:mod:`stillair.atmosphere`, :mod:`stillair.groups` (Gr, Ra), :mod:`stillair.external` (plates,
cylinders, spheres), :mod:`stillair.cavity` (enclosed gas layers), :mod:`stillair.radiation`,
:mod:`stillair.convection` (h in one call, still or in a wind: :mod:`stillair.forced`), :mod:`stillair.channel` (open channels, heat sinks), :mod:`stillair.network` (the thermal network),
:mod:`stillair.correlations` (the correlation registry and :func:`nusselt`),
:mod:`stillair.ventilation` (stack-driven and forced airflow through enclosures), :mod:`stillair.humid`
(humid air: saturation, humidity ratio, dew point, surface humidity), :mod:`stillair.insulation`
(the insulation thickness for a surface temperature).
"""

import time as _time

_import_started = _time.perf_counter()   # the command reports what importing the engine took



# First, before any import of ours: Ctrl-C while the `stillair` command starts ends in one line,
# not a traceback (only when this process is that command).  Written here, not in _console:
# importing even that small module (compiling it, where no bytecode is kept) left milliseconds
# in which Ctrl-C still printed a traceback.  _console hands Ctrl-C back once the command runs.

def _started_as_command() -> bool:
    """Whether this process is the ``stillair`` command: its console script (``stillair``,
    ``stillair.exe``, ``stillair-script.py``) or ``python -m stillair[.…]``."""
    import os
    import sys      # both loaded by the interpreter's own start-up: no import time

    name = os.path.basename(sys.argv[0]).lower() if sys.argv and sys.argv[0] else ""
    for suffix in (".exe", "-script.pyw", "-script.py"):
        name = name.removesuffix(suffix)
    if name == "stillair":
        return True
    argv = getattr(sys, "orig_argv", [])
    return any(flag == "-m" and (module == "stillair" or module.startswith("stillair."))
               for flag, module in zip(argv, argv[1:]))


def _interrupted_while_starting(signum, frame):
    """Ctrl-C while the command is still importing: one line, exit status 2 (EXIT_CANNOT_RUN).
    Ended here, not by raising: an exception raised inside a C extension's import (numpy's own)
    comes out as that library's ImportError with a traceback; nothing is open yet to be flushed
    or closed.  Written with os.write: _console (say) may itself be half imported."""
    import os

    try:
        os.write(2, b"stillair: interrupted\n")
    finally:
        os._exit(2)


def _guard_command_start() -> None:
    if not _started_as_command():
        return      # a program that imports stillair as a library keeps Python's own Ctrl-C
    # signal's C module: the signal module itself imports enum (a few ms under ``python -m``)
    import _signal  # type: ignore[import-not-found]  # (typeshed has no stub for the C module)

    try:
        if _signal.getsignal(_signal.SIGINT) is _signal.default_int_handler:
            _signal.signal(_signal.SIGINT, _interrupted_while_starting)
    except (ValueError, OSError):      # not the main thread: leave Ctrl-C alone
        pass


_guard_command_start()

from ._console import one_blas_thread_for_command as _one_blas_thread_for_command  # noqa: E402

_one_blas_thread_for_command()      # before numpy loads its BLAS (see _console)

from .validity import *  # noqa: F401,F403,E402
from .correlations import *  # noqa: F401,F403
from .external import *  # noqa: F401,F403
from .cavity import *  # noqa: F401,F403
from .gases import *  # noqa: F401,F403
from .atmosphere import *  # noqa: F401,F403
from .groups import *  # noqa: F401,F403
from .radiation import *  # noqa: F401,F403
from .convection import *  # noqa: F401,F403
from .channel import *  # noqa: F401,F403
from .network import *  # noqa: F401,F403
from .ventilation import *  # noqa: F401,F403
from .humid import *  # noqa: F401,F403
from .insulation import *  # noqa: F401,F403

__version__ = "0.1.0"

#: Seconds this process spent importing the engine (the first ``import stillair``, which a
#: ``stillair`` command pays before it runs): ``stillair calc`` reports it under "engine import".
_IMPORT_SECONDS = _time.perf_counter() - _import_started
del _time, _import_started

# The public API, listed by hand so that help(stillair) and IDEs show exactly this.  The
# submodules' own __all__ also carry the mechanisms contributors use (correlation(),
# define_geometry(), the require_* checks); those stay importable from their modules.
# tests/test_public_api.py checks that every nu_*, h_*, gas_* and air_* function is here.
__all__ = [
    "__version__",
    # errors and the range warning
    "StillairError", "InputError", "CorrelationRangeWarning", "NetworkError",
    "NetworkConvergenceError",
    # gas properties
    "air_density", "air_viscosity", "air_kinvisc", "air_conductivity", "air_cp",
    "air_diffusivity", "air_prandtl", "air_expansion",
    "gas_density", "gas_viscosity", "gas_kinvisc", "gas_conductivity", "gas_cp",
    "gas_diffusivity", "gas_prandtl", "gas_expansion",
    "gas_properties", "GasProperties", "parse_gas", "gas_table_provenance", "GAS_NAMES", "GASES",
    "STANDARD_PRESSURE",
    # atmosphere
    "altitude_pressure", "SEA_LEVEL_PRESSURE",
    # dimensionless groups
    "rayleigh", "grashof", "film_properties",
    # Nusselt numbers and the correlation registry
    "nu_vplate", "nu_hplate", "nu_tplate", "nu_hcyl", "nu_sphere", "nu_vcyl", "nu_cavity",
    "cavity_method", "cavity_critical_tilt", "nusselt", "NusseltResult", "methods_for",
    "nu_spread", "NusseltSpread", "AutoStep", "Parameter",
    "get_correlation", "Correlation", "Geometry", "Range", "GEOMETRIES", "CORRELATIONS",
    "PLATE_CASES",
    # heat-transfer coefficients
    "h_vplate", "h_hplate", "h_tplate", "h_hcyl", "h_sphere", "h_vcyl", "h_cavity", "h_rad",
    "surface_convection", "cavity_convection", "ConvectionResult", "geometry_convection",
    "convection_geometries",
    # open channels and plate-fin heat sinks
    "nu_channel", "h_channel", "channel_convection", "channel_spacing", "optimum_elenbaas",
    "heatsink", "heatsink_q", "heatsink_tbase", "HeatSinkResult", "CHANNEL_CASES",
    # radiation
    "radiation_flux", "exchange_factor", "SIGMA",
    # the thermal network
    "solve_network", "NetworkResult", "BranchResult", "BRANCH_KINDS", "clear_network_cache",
    # ventilation: stack-driven and forced airflow
    "stack_flow", "airflow_for", "DEFAULT_DISCHARGE_COEFFICIENT",
    # humid air
    "saturation_pressure",
    "vapour_pressure",
    "humidity_ratio",
    "dew_point",
    "surface_rh",
    "temperature_factor",
    # the network turned round: the heat input that brings a node to a temperature
    "heat_for_temperature",
    "HeatForTemperature",
    # insulation turned round: the thickness for an outer surface temperature
    "insulation_thickness",
    "solve_transient", "TransientResult",
]
