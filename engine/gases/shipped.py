"""The shipped tables (engine/data/gas_tables.npz): reading them, the provenance of every pure
gas's table, and writing the file again (policy in the package docstring)."""

from __future__ import annotations

import os
import sys
import warnings
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

import numpy as np

from .data import GAS_NAMES, GAS_PRESSURE_RANGE, GASES, GasData
from .tables import (_PRESSURE_NODES, _PRIMARY, _T_STEP, _TABLES_LOCK, _PropertyTable, _coolprop,
                     _tabulate, _temperature_grid, chebyshev_columns, spline_coefficients)

TABLE_FILE = Path(__file__).parent.parent / "data" / "gas_tables.npz"
TABLE_FILE_VARIABLE = "STILLAIR_GAS_TABLES"  # another file, or "off"
_TABLE_FORMAT = 1
_REBUILD_HINT = "rebuild it with `python -m stillair.data`"


def _grid_parameters() -> np.ndarray:
    """What every table's grid depends on; a file made on another grid is not used."""
    return np.array([_T_STEP, _PRESSURE_NODES, GAS_PRESSURE_RANGE.low, GAS_PRESSURE_RANGE.high])


def _definition(gas: GasData) -> str:
    """What one gas's table depends on besides CoolProp; a changed definition makes it stale."""
    return (f"{gas.coolprop_fluid} t={gas.t_range.low!r}..{gas.t_range.high!r} degC "
            f"viscosity_fit={gas.viscosity_fit!r} conductivity_fit={gas.conductivity_fit!r}")


@dataclass(frozen=True)
class _ShippedGas:
    t_kelvin: np.ndarray
    values: np.ndarray       # (temperatures, pressure nodes, primaries)
    molar_mass: float        # kg/mol
    spline: bool = False     # the file carries the table's spline coefficients (<gas>.spline)


@dataclass
class _ShippedFile:
    path: Path
    coolprop_version: str
    coolprop_gitrevision: str
    gases: dict              # name -> _ShippedGas, the fresh entries
    stale: dict              # name -> why the file's entry is not used


_SHIPPED_UNREAD = object()
_shipped_file: Any = _SHIPPED_UNREAD     # a _ShippedFile, or None for "no usable file"
_shipped_reason = ""                     # why there is no usable file
_SOURCES: dict[str, str] = {}            # pure gas -> where its table came from


def _table_path() -> Path | None:
    value = os.environ.get(TABLE_FILE_VARIABLE)
    if value is None:
        return TABLE_FILE
    if value.strip().lower() in ("", "off", "none", "0"):
        return None
    return Path(value)


def _read_table_file(path: Path) -> _ShippedFile:
    """The file's fresh entries; raises ValueError if the whole file does not fit this code."""
    with np.load(path, allow_pickle=False) as data:
        # the spline coefficients (4x the values) are read per gas, when its table is first used
        arrays = {key: data[key] for key in data.files if not key.endswith(".spline")}
        splines = {key for key in data.files if key.endswith(".spline")}
    if int(arrays["format"]) != _TABLE_FORMAT:
        raise ValueError(f"format {int(arrays['format'])}, expected {_TABLE_FORMAT}")
    if not np.array_equal(arrays["grid"], _grid_parameters()):
        raise ValueError(f"grid (T step K, pressure nodes, p low Pa, p high Pa) "
                         f"{arrays['grid'].tolist()}, expected {_grid_parameters().tolist()}")
    if tuple(arrays["primaries"].tolist()) != _PRIMARY:
        raise ValueError(f"columns {arrays['primaries'].tolist()}, expected {list(_PRIMARY)}")
    shipped = _ShippedFile(path, str(arrays["coolprop_version"]),
                           str(arrays["coolprop_gitrevision"]), {}, {})
    names = set(arrays["gases"].tolist())
    for gas in GASES.values():
        if gas.name not in names:
            shipped.stale[gas.name] = "not in the file"
        elif str(arrays[f"{gas.name}.definition"]) != _definition(gas):
            shipped.stale[gas.name] = (f"made for '{arrays[f'{gas.name}.definition']}', "
                                       f"now '{_definition(gas)}'")
        elif not np.array_equal(arrays[f"{gas.name}.t_kelvin"], _temperature_grid(gas.t_range)):
            shipped.stale[gas.name] = "its temperature grid differs"
        else:
            shipped.gases[gas.name] = _ShippedGas(arrays[f"{gas.name}.t_kelvin"],
                                                  arrays[f"{gas.name}.values"],
                                                  float(arrays[f"{gas.name}.molar_mass"]),
                                                  f"{gas.name}.spline" in splines)
    return shipped


def _shipped() -> _ShippedFile | None:
    """The table file, read once (None when absent, disabled or not fitting this code)."""
    global _shipped_file, _shipped_reason
    if _shipped_file is _SHIPPED_UNREAD:
        with _TABLES_LOCK:
            if _shipped_file is _SHIPPED_UNREAD:
                path = _table_path()
                if path is None:
                    _shipped_file, _shipped_reason = None, f"{TABLE_FILE_VARIABLE} is off"
                else:
                    import zipfile   # here, not at import: the file is read at the first property call
                    try:
                        _shipped_file = _read_table_file(path)
                    except (OSError, ValueError, KeyError, TypeError, zipfile.BadZipFile) as error:
                        _shipped_file = None
                        _shipped_reason = f"gas table file {path} not used: {error}"
                        warnings.warn(f"stillair.gases: {_shipped_reason}; gases are computed "
                                      f"from the installed CoolProp ({_REBUILD_HINT})",
                                      RuntimeWarning, stacklevel=2)
    return _shipped_file


def _shipped_gas(name: str) -> _ShippedGas | None:
    """The shipped table of one pure gas, or None (warned, unless the file is off)."""
    shipped = _shipped()
    entry = shipped.gases.get(name) if shipped is not None else None
    if name in _SOURCES:
        return entry
    if entry is not None and shipped is not None:
        _SOURCES[name] = (f"shipped table {shipped.path.name} "
                          f"(CoolProp {shipped.coolprop_version})")
        return entry
    reason = _shipped_reason if shipped is None else \
        f"{name} in gas table file {shipped.path}: {shipped.stale[name]}"
    _SOURCES[name] = f"computed with the installed CoolProp ({reason})"
    if shipped is not None:
        warnings.warn(f"stillair.gases: {reason}; computed from the installed CoolProp "
                      f"({_REBUILD_HINT})", RuntimeWarning, stacklevel=2)
    return None


def gas_table_provenance() -> dict:
    """Where the pure-gas property tables come from, for traceability.

    Returns
    -------
    dict
        ``"file"``: path of the table file in use, or None; ``"coolprop_version"``: the
        CoolProp version that computed the file ("" without one); ``"installed_coolprop"``:
        the installed CoolProp's version if it has been imported (else None: it was not
        needed); ``"gases"``: ``{gas: source}`` for each pure gas used so far (mixtures come
        from their components' tables).

    Notes
    -----
    The shipped file is the reference data of a release: results do not change with the
    installed CoolProp version.  ``STILLAIR_GAS_TABLES`` names another file, or ``off``.

    Examples
    --------
    >>> import stillair
    >>> _ = stillair.air_density(20.0)
    >>> sorted(stillair.gas_table_provenance())
    ['coolprop_version', 'file', 'gases', 'installed_coolprop']
    """
    shipped = _shipped()
    coolprop = _coolprop() if "CoolProp" in sys.modules else None
    return {
        "file": str(shipped.path) if shipped is not None else None,
        "coolprop_version": shipped.coolprop_version if shipped is not None else "",
        "installed_coolprop": coolprop.__version__ if coolprop is not None else None,
        "gases": dict(_SOURCES),
    }


def table_file_arrays() -> dict[str, np.ndarray]:
    """The arrays of the table file, freshly computed from the installed CoolProp."""
    coolprop = _coolprop()
    arrays = {
        "format": np.array(_TABLE_FORMAT),
        "coolprop_version": np.array(coolprop.__version__),
        "coolprop_gitrevision": np.array(coolprop.__gitrevision__),
        "grid": _grid_parameters(),
        "primaries": np.array(_PRIMARY),
        "gases": np.array(GAS_NAMES),
    }
    for gas in GASES.values():
        arrays[f"{gas.name}.definition"] = np.array(_definition(gas))
        arrays[f"{gas.name}.t_kelvin"] = _temperature_grid(gas.t_range)
        arrays[f"{gas.name}.values"] = _tabulate(gas)
        arrays[f"{gas.name}.molar_mass"] = np.array(
            coolprop.AbstractState("HEOS", gas.coolprop_fluid).molar_mass())
    return with_splines(arrays)


def with_splines(arrays: dict[str, np.ndarray]) -> dict[str, np.ndarray]:
    """The table file's arrays with each gas's spline coefficients (``<gas>.spline``, fitted
    with scipy from its ``<gas>.values``) added or replaced: evaluating a shipped table then
    needs numpy only (no scipy.interpolate at the first property call)."""
    arrays = dict(arrays)
    for name in arrays["gases"].tolist():
        arrays[f"{name}.spline"] = spline_coefficients(arrays[f"{name}.t_kelvin"], arrays[f"{name}.values"])
    return arrays


def _stored_spline(path: Path, name: str, shipped: _ShippedGas) -> np.ndarray | None:
    """The spline coefficients the file stores for one gas, if they belong to its values: the
    right shape, and the constant terms (a spline's values at its breaks) equal to the values'
    Chebyshev series to 1e-12 -- a stale or foreign set is refused (warned; scipy fits it)."""
    with np.load(path, allow_pickle=False) as data:
        coefficients = data[f"{name}.spline"]
    knots = chebyshev_columns(shipped.values)
    expected = (4, len(shipped.t_kelvin) - 1) + knots.shape[1:]
    if coefficients.shape == expected and coefficients.dtype == np.float64 and \
            np.allclose(coefficients[3], knots[:-1], rtol=1e-12, atol=0.0):
        return coefficients
    warnings.warn(f"stillair.gases: the spline of {name} in gas table file {path} does not fit its "
                  f"values; fitted again ({_REBUILD_HINT})", RuntimeWarning, stacklevel=3)
    return None


def write_table_file(path: Path | str = TABLE_FILE, arrays: dict | None = None) -> Path:
    """Write the table file (``arrays``, by default :func:`table_file_arrays`) to ``path``.

    A ``numpy.load``-able .npz; written with fixed zip dates, so that the same CoolProp gives
    the same bytes (a rebuild shows in version control only when a number changed).
    """
    # resolved: in a development install the package's file is a link into the source tree, and
    # replacing the link would leave the source file as it was
    import zipfile

    path = Path(path).resolve()
    arrays = table_file_arrays() if arrays is None else arrays
    path.parent.mkdir(parents=True, exist_ok=True)
    partial = path.with_name(path.name + ".partial")
    with zipfile.ZipFile(partial, "w", compression=zipfile.ZIP_DEFLATED) as archive:
        for key, array in arrays.items():
            member = zipfile.ZipInfo(f"{key}.npy", date_time=(1980, 1, 1, 0, 0, 0))
            member.compress_type = zipfile.ZIP_DEFLATED
            with archive.open(member, "w", force_zip64=True) as stream:
                np.lib.format.write_array(stream, np.asarray(array),
                                          allow_pickle=False)
    os.replace(partial, path)
    return path



def _forget_file() -> None:
    """Forget the table file and the sources (tests switch the file in process)."""
    global _shipped_file, _shipped_reason
    _SOURCES.clear()
    _shipped_file, _shipped_reason = _SHIPPED_UNREAD, ""
    _molar_mass.cache_clear()


def _pure_table(gas: GasData) -> _PropertyTable:
    """The table of a pure gas: shipped values if the file has them, else from CoolProp."""
    shipped = _shipped_gas(gas.name)
    if shipped is not None:
        file = _shipped()
        coefficients = _stored_spline(file.path, gas.name, shipped) if shipped.spline and file else None
        return _PropertyTable(shipped.t_kelvin, shipped.values, coefficients)
    return _PropertyTable(_temperature_grid(gas.t_range), _tabulate(gas))


@lru_cache(maxsize=None)
def _molar_mass(name: str) -> float:
    """Molar mass, kg/mol, of the gas's CoolProp fluid (from the shipped tables if there)."""
    shipped = _shipped_gas(name)
    if shipped is not None:
        return shipped.molar_mass
    return _coolprop().AbstractState("HEOS", GASES[name].coolprop_fluid).molar_mass()
