"""What the evaluator made of each formula cell, and of a whole workbook: status as data."""

from __future__ import annotations

import functools
import re
from dataclasses import dataclass, field

from .reader import Book

__all__ = ["STATUSES", "CellResult", "Evaluation", "LoopReport", "label", "quote_sheet"]

# What a formula cell's value is: a plain value, a value with validity notes, an error, or
# nothing because the evaluator cannot calculate the formula (or one it depends on).
STATUSES = ("value", "note", "error", "cannot-evaluate")


@functools.lru_cache(maxsize=1024)   # asked for every cell's label; a book has few sheets
def quote_sheet(sheet: str) -> str:
    return f"'{sheet}'" if re.search(r"[^A-Za-z0-9_.]", sheet) or sheet[:1].isdigit() else sheet


def label(sheet: str, ref: str) -> str:
    return f"{quote_sheet(sheet)}!{ref}"


@dataclass(slots=True)
class CellResult:
    """What the evaluator made of one formula cell (array members each have their own)."""

    value: object                         # float, bool, str (Excel errors as "#N/A"), None
    status: str = "value"                 # one of STATUSES
    messages: tuple[str, ...] = ()        # range notes, the error, or what cannot be evaluated
    cause: str | None = None              # the upstream cell an error or failure comes from
    scale: float = 0.0                    # largest magnitude among the numbers the formula read


@dataclass(frozen=True)
class LoopReport:
    """One circular loop calculated by iteration (the workbook enables it): its cells, the
    sweeps made, the largest change in the last sweep, whether that met the workbook's delta,
    and whether the values stored in the file were already converged (the first sweep from
    them changed nothing by more than the delta)."""

    cells: tuple[str, ...]
    sweeps: int
    last_change: float
    delta: float
    converged: bool
    stored_converged: bool


@dataclass
class Evaluation:
    """Result of evaluating a workbook headlessly."""

    book: Book
    values: dict[str, dict[str, object]]       # sheet -> ref -> value (formula cells only)
    names: dict[str, object]                    # defined name -> value
    notes: list[tuple[str, str]]                # (cell "Sheet!B3" or "", message)
    load_seconds: float                         # reading the file (where read here) and preparing
    calc_seconds: float
    sets: dict[tuple[str, str], object] = field(default_factory=dict)
    engine_seconds: float = 0.0                 # importing the engine and formulas
    results: dict[tuple[str, str], CellResult] = field(default_factory=dict)
    loops: list[LoopReport] = field(default_factory=list)   # iterated loops
    input_missing: str | None = None            # a template's blank required inputs, in words

    def flat_values(self) -> dict[str, object]:
        return {label(sheet, ref): value for sheet, cells in self.values.items()
                for ref, value in cells.items()}

    def status(self, sheet: str, ref: str) -> str | None:
        result = self.results.get((sheet, ref))
        return result.status if result is not None else None

    def writable_values(self) -> dict[str, dict[str, object]]:
        """Values to store as cached values: every formula cell except those that could not be
        evaluated (their saved values are left as they were)."""
        return {sheet: {ref: value for ref, value in cells.items()
                        if self.status(sheet, ref) != "cannot-evaluate"}
                for sheet, cells in self.values.items()}

    @property
    def failed(self) -> list[tuple[str, CellResult]]:
        """Cells whose status is error or cannot-evaluate, labelled, in sheet order."""
        return [(label(s, r), res) for (s, r), res in self.results.items()
                if res.status in ("error", "cannot-evaluate")]
