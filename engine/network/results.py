"""The converged network as the user reads it: temperatures, heat flows, one record per branch."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Mapping

import numpy as np

from ..plausibility import temperature_slip
from ..correlations import methods_for
from .errors import FUNCTION, NetworkError
from .model import Evaluation, Network

__all__ = ["BranchResult", "NetworkResult", "build_result"]


@dataclass(frozen=True, slots=True)   # slots: no dict per branch (a large network's result holds 10^4-10^5)
class BranchResult:
    """One branch at the solution.  h is per unit area (nan for a resistance branch);
    R = (T_from - T_to) / q in K/W (its zero-difference limit 1/(h A) when the temperatures are
    equal); Ra, Nu, Pr and t_film are nan for branches without a correlation; mass_flow (kg/s)
    and volume_flow (m³/s, at the outside temperature) are those of a vent or airflow branch."""

    name: str
    kind: str
    source: str
    target: str
    heat: float
    delta_t: float
    h: float
    R: float
    area: float
    Ra: float
    Nu: float
    Pr: float
    t_film: float
    method: str
    case: str
    note: str
    in_range: bool
    Re: float = 0.0        # on the length along the wind; 0 in still air (and for other kinds)
    mass_flow: float = math.nan     # kg/s of air through a vent or airflow branch (nan elsewhere)
    volume_flow: float = math.nan   # m³/s of that air at the outside (to) temperature

    def __getitem__(self, key):
        return getattr(self, key)


@dataclass(frozen=True)
class NetworkResult:
    """The converged network.  Immutable: repeated solves of the same tables share it.

    ``band`` (only with ``solve_network(..., band=True)``, else None): node -> (low, high) °C,
    the range of the node's temperature between the network solved with every convection
    branch at the lowest and at the highest Nu of the correlations that cover it;
    ``band_solutions`` holds those two solutions (low-Nu first)."""

    temperatures: Mapping[str, float]     # node -> °C
    heat: Mapping[str, float]             # branch -> W, positive from -> to
    branches: Mapping[str, BranchResult]  # branch -> record
    heat_inputs: Mapping[str, float]      # free node -> W (zero where none is given)
    iterations: int
    residual: float                       # W, largest nodal imbalance
    tolerance: float                      # W, the largest nodal tolerance (each node has its own)
    property_evaluations: int             # film-temperature property look-ups, all iterations
    notes: tuple[str, ...]                # every out-of-range use, "branch <name>: <note>"
    solver: str                           # "newton", "hybr", "lm" or "direct"
    fixed: tuple[str, ...] = field(default=())  # nodes with a fixed temperature
    band: Mapping[str, tuple[float, float]] | None = None
    band_solutions: tuple["NetworkResult", "NetworkResult"] | None = None

    def balance(self) -> dict[str, float]:
        """Energy imbalance (W) at every solved node, recomputed from the reported values."""
        totals = {node: self.heat_inputs.get(node, 0.0) for node in self.temperatures if node not in self.fixed}
        for record in self.branches.values():
            if record.target in totals:
                totals[record.target] += record.heat
            if record.source in totals:
                totals[record.source] -= record.heat
        return totals


def branch_records(net: Network, t: np.ndarray, evaluation: Evaluation, strict: bool = True) -> list[dict]:
    """One dict per branch (in table order) with every BranchResult field.  ``strict``: a plate
    method that does not serve the case at the solution is an error."""
    q, dt = evaluation.q, evaluation.delta_t
    t1, t2 = t[net.source], t[net.target]
    nan = math.nan
    records = [dict(name=b.name, kind=b.kind, source=b.source, target=b.target, heat=float(q[k]),
                    delta_t=float(dt[k]), Ra=nan, Nu=nan, Pr=nan, t_film=nan, case="", note="",
                    in_range=True) for k, b in enumerate(net.branches)]
    groups = [(g, None) for g in net.plain_groups] + [
        (g, detail.for_group(k)) for batch, detail in zip(net.batches, evaluation.details)
        for k, g in enumerate(batch.groups)]
    for group, detail in groups:
        i = group.index
        for position, values in group.records(t1[i], t2[i], dt[i], q[i], detail):
            records[position].update(values)
        flagged = getattr(detail, "flagged", None)
        if strict and flagged is not None and flagged.any():
            k = int(np.flatnonzero(flagged)[0])
            b = net.branches[int(i[k])]
            case = str(detail.case[k])
            raise NetworkError(
                FUNCTION, f"{b.where}, column method", b.method,
                f"a method for case {case} at the solution (the surface is "
                f"{'hotter' if dt[i[k]] >= 0 else 'colder'} than the fluid); "
                "allowed: " + ", ".join(methods_for(b.kind, case)) + " or blank")
    return records


def build_result(net: Network, t: np.ndarray, evaluation: Evaluation, residual: np.ndarray,
                 tolerance: np.ndarray, iterations: int, how: str, strict: bool = True) -> NetworkResult:
    records = branch_records(net, t, evaluation, strict)
    notes = tuple(f"branch {r['name']}: {r['note']}" for r in records if r["note"])
    # a fixed temperature typed in kelvin moves every node: the boundaries' note comes first
    slip = temperature_slip({f"the boundary T of node {net.nodes[i]}": t[i] for i in net.fixed})
    if slip:
        notes = (f"boundaries: {slip}",) + notes
    branches = {r["name"]: BranchResult(**r) for r in records}
    return NetworkResult(
        temperatures=MappingProxyType({node: float(t[i]) for i, node in enumerate(net.nodes)}),
        heat=MappingProxyType({name: record.heat for name, record in branches.items()}),
        branches=MappingProxyType(branches),
        heat_inputs=MappingProxyType({net.nodes[i]: float(net.heat_input[i]) for i in net.free}),
        iterations=iterations,
        residual=float(np.max(np.abs(residual), initial=0.0)),
        tolerance=float(np.max(tolerance, initial=0.0)),
        property_evaluations=net.property_evaluations,
        notes=notes, solver=how, fixed=tuple(net.nodes[i] for i in net.fixed))
