"""The two errors of the network solver: bad tables, and balances that cannot be closed."""

from __future__ import annotations

from dataclasses import dataclass

from ..validity import InputError, StillairError, format_value

__all__ = ["FUNCTION", "NetworkError", "NetworkConvergenceError", "Shown"]

FUNCTION = "solve_network"


@dataclass(frozen=True)
class Shown:
    """A 'got' part shown verbatim in a message (a description rather than a value)."""

    text: str


class NetworkError(InputError):
    """A problem in the network tables, naming the table, row and column.

    Same shape as every input error: ``solve_network: branch row 3 (wall), column p2
    (conductivity) must be > 0 W/(m·K), got 0``.
    """

    def render(self, function_name: str) -> str:
        shown = "blank" if self.value is None else (
            self.value.text if isinstance(self.value, Shown) else format_value(self.value))
        return f"{function_name}: {self.argument} must be {self.allowed}, got {shown}"


class NetworkConvergenceError(StillairError):
    """The energy balances could not be closed to the tolerance; no result is returned."""

    def __init__(self, message: str, residual: float, worst_node: str | None, iterations: int):
        self.residual = residual
        self.worst_node = worst_node
        self.iterations = iterations
        super().__init__(message)
