"""Shaping a solved thermal network for cells: stillair.solve_network's result, and
stillair.solve_transient's (the network through time)."""

from __future__ import annotations

import math

from .coerce import CellInputError, _name_text

__all__ = ["RESULT_HEADER", "result_table", "pick_temperature", "pick_heat", "pick_band", "check_text",
           "net_table", "net_temp", "net_heat", "net_check", "net_band",
           "pick_airflow", "net_airflow", "net_heat_for",
           "start_temperatures", "transient_table", "pick_extreme", "net_transient", "net_peak"]

RESULT_HEADER = ["item", "kind", "value", "unit", "h W/(m²·K)", "R K/W", "Ra", "Nu", "method", "note"]


def _kinds(branch_rows) -> dict:
    return {row[0]: (row[3] if len(row) > 3 else None) for row in branch_rows if row and row[0]}


def result_table(result, branch_rows) -> list[list]:
    """Header, one row per node (temperature), one row per branch (heat flow and details)."""
    kinds = _kinds(branch_rows)
    rows = [list(RESULT_HEADER)]
    for node, temperature in result.temperatures.items():
        rows.append([node, "node", float(temperature), "°C"] + [None] * 6)
    for name, heat in result.heat.items():
        info = result.branches.get(name) if hasattr(result.branches, "get") else None
        rows.append([name, kinds.get(name) or "branch", float(heat), "W"]
                    + [_attr(info, a) for a in ("h", "R", "Ra", "Nu", "method", "note")])
    return rows


def _attr(info, name):
    value = getattr(info, name, None) if info is not None else None
    if value is None and isinstance(info, dict):
        value = info.get(name)
    if isinstance(value, str):
        return value
    try:
        number = float(value) if value is not None else None
    except (TypeError, ValueError):
        return str(value)
    # nan marks "does not apply" (Ra of a conduction branch); a cell shows that as blank.
    return None if number is None or math.isnan(number) else number


def pick_temperature(result, node: str) -> float:
    if node not in result.temperatures:
        raise CellInputError("node", node, "one of " + ", ".join(map(repr, result.temperatures)))
    return float(result.temperatures[node])


def pick_heat(result, branch: str) -> float:
    if branch not in result.heat:
        raise CellInputError("branch", branch, "one of " + ", ".join(map(repr, result.heat)))
    return float(result.heat[branch])


def pick_airflow(result, branch: str) -> float:
    """The volume flow (m³/s of outside air) through a vent or airflow branch."""
    pick_heat(result, branch)
    if math.isnan(result.branches[branch].volume_flow):
        carrying = [name for name, record in result.branches.items() if not math.isnan(record.volume_flow)]
        raise CellInputError("branch", branch, "a vent or airflow branch: "
                             + (", ".join(map(repr, carrying)) if carrying else "the network has none"))
    return float(result.branches[branch].volume_flow)


def pick_band(result, node: str) -> list[list[float]]:
    """One row, low and high °C: the node between the lowest- and highest-Nu solutions."""
    pick_temperature(result, node)
    low, high = result.band[node]
    return [[float(low), float(high)]]


def branch_notes(result) -> list[str]:
    notes = []
    for name, info in result.branches.items():
        note = _attr(info, "note")
        if note:
            notes.append(f"{name}: {note}")
    return notes


def check_text(result) -> str:
    """"OK: ..." when every branch is inside its correlation's range, else the notes."""
    residual = float(getattr(result, "residual", math.nan))
    iterations = getattr(result, "iterations", None)
    notes = [str(n) for n in getattr(result, "notes", ())] or branch_notes(result)
    if notes:
        return f"{len(notes)} note{'s' if len(notes) > 1 else ''}: " + "; ".join(notes)
    return f"OK: {iterations} iterations, energy residual {residual:.3g} W"


# The cells' invoke adapters: ``solve`` is the engine's solve_network, ``kwargs`` the cell's
# arguments; the network cells share one solve per distinct set of inputs (cached in callpath).


def net_table(solve, kwargs):
    """NET_SOLVE: the result table of the solved network."""
    return result_table(solve(**kwargs), kwargs["branches"])


def net_temp(solve, kwargs):
    """NET_TEMP: one node's temperature."""
    node = kwargs.pop("node")
    return pick_temperature(solve(**kwargs), node)


def net_heat(solve, kwargs):
    """NET_HEAT: one branch's heat flow."""
    branch = kwargs.pop("branch")
    return pick_heat(solve(**kwargs), branch)


def net_airflow(solve, kwargs):
    """NET_AIRFLOW: one vent or airflow branch's volume flow."""
    branch = kwargs.pop("branch")
    return pick_airflow(solve(**kwargs), branch)


def net_check(solve, kwargs):
    """NET_CHECK: the solve's notes as one text."""
    return check_text(solve(**kwargs))


def net_band(solve, kwargs):
    """NET_BAND: one node's correlation band (a solve with band=True)."""
    node = kwargs.pop("node")
    return pick_band(solve(band=True, **kwargs), node)


def net_heat_for(heat_for_temperature, kwargs):
    """NET_HEAT_FOR: the heat input (W) that brings the node (or the node ``at``) to the temperature;
    its solution's range notes are reported as every network cell's."""
    return float(heat_for_temperature(**kwargs).heat)


# ---------------------------------------------------------------------------------------------
# The network through time (stillair.solve_transient's result)


def start_temperatures(cells):
    """The initial argument as a cell gives it: blank, one number, "periodic", or rows node | °C."""
    if cells is None:
        return None
    if len(cells) == 1 and len(cells[0]) == 1:
        return cells[0][0]
    start = {}
    for row in cells:
        if len(row) != 2 or row[0] is None:
            raise CellInputError("initial", cells, 'one number, "periodic" or rows of node | °C')
        start[_name_text(row[0])] = row[1]
    return start


def transient_table(result) -> list[list]:
    """Header (time s, then every node in the network's order), one row per output time (°C)."""
    nodes = list(result.temperatures)
    columns = [result.times] + [result.temperatures[node] for node in nodes]
    return [["time s"] + nodes] + [[float(value) for value in row] for row in zip(*columns)]


def pick_extreme(result, node: str, which: str) -> list[list[float]]:
    """One row: the node's largest ("max") or smallest ("min") temperature at the output times,
    °C, and its time, s."""
    if node not in result.temperatures:
        raise CellInputError("node", node, "one of " + ", ".join(map(repr, result.temperatures)))
    choice = which.strip().lower()
    if choice not in ("max", "min"):
        raise CellInputError("which", which, '"max" (blank) or "min"')
    value, time = (result.peak if choice == "max" else result.minimum)[node]
    return [[float(value), float(time)]]


def net_transient(solve, kwargs):
    """NET_TRANSIENT: the temperature table over the output times (``solve`` is solve_transient)."""
    kwargs["initial"] = start_temperatures(kwargs["initial"])
    return transient_table(solve(**kwargs))


def net_peak(solve, kwargs):
    """NET_PEAK: one node's peak or minimum and its time."""
    node, which = kwargs.pop("node"), kwargs.pop("which")
    kwargs["initial"] = start_temperatures(kwargs["initial"])
    return pick_extreme(solve(**kwargs), node, which)
