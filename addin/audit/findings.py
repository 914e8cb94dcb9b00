"""What the audit finds: the kinds of finding, a finding and the audit's result, the cells as
the file holds them, and how two values are compared."""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any

from ..workbook.cachewriter import ERROR_VALUES
from ..workbook.status import label

__all__ = ["KINDS", "EXIT_OK", "EXIT_FINDINGS", "EXIT_UNREADABLE", "DEFAULT_RTOL", "DEFAULT_ATOL",
           "Finding", "AuditResult", "AuditError", "CellRecord", "Records", "differs",
           "relative_difference", "same_value", "show", "is_error_text", "default_templates_dir", "label"]

EXIT_OK, EXIT_FINDINGS, EXIT_UNREADABLE = 0, 1, 2
DEFAULT_RTOL = 1e-6

# Worst first: silent wrong numbers, then changed calculations, failures, cells that cannot be
# checked, correlations outside their range, missing recalculation, and traceability.
KINDS = ("mismatch", "hand-formula", "iteration", "template-drift", "error", "unknown-function",
         "cannot-evaluate", "out-of-range", "stale", "version")


def default_templates_dir() -> Path:
    from ..templates.spec import TEMPLATE_DIR
    return TEMPLATE_DIR


# ---------------------------------------------------------------------------------------------
# Findings


@dataclass
class Finding:
    kind: str
    cell: str                      # "Sheet!B3" ('quoted' where Excel needs it), "" for the book
    message: str
    formula: str | None = None     # the workbook's formula, with "="
    cached: object = None          # the value Excel saved
    computed: object = None        # the value the engine gives
    rel_diff: float | None = None  # mismatch only
    original_formula: str | None = None  # template drift only
    recognised: str | None = None  # hand-formula: what the cell was recognised as
    check: str | None = None       # hand-formula, iteration: which check (constant, property ...)
    cells: list[str] | None = None  # every cell it covers (a note over a table); None: ``cell``
    sheet: str | None = field(default=None, repr=False)
    ref: str | None = field(default=None, repr=False)

    def public(self) -> dict:
        data = asdict(self)
        data.pop("sheet"), data.pop("ref")
        return data


@dataclass
class AuditResult:
    path: str
    engine_version: str
    findings: list[Finding]
    checked: list[str]             # every classified cell, in sheet order
    ok: list[str]
    template: str | None = None
    follow_on: int = 0             # error cells whose error comes from an upstream finding
    unchecked: list[str] = field(default_factory=list)  # downstream of an unknown function
    timing: dict[str, float] = field(default_factory=dict)
    sha256: str = ""
    report: str | None = None
    # the hand check of the formulas typed by hand, a hand.HandCheck: hand.py imports this module
    # and addin's modules import without a cycle (tests/test_addin_layout.py), so readers name it
    hand: Any = None

    def covered(self) -> dict[str, str]:
        """Each cell a finding names -> the worst kind among its findings."""
        worst: dict[str, str] = {}
        for f in self.findings:
            for cell in f.cells or ([f.cell] if f.cell else []):
                if cell not in worst or KINDS.index(f.kind) < KINDS.index(worst[cell]):
                    worst[cell] = f.kind
        return worst

    def counts(self) -> dict[str, int]:
        """Cells, in one unit: ``ok`` and, per kind, the cells whose worst finding is of that
        kind (a cell is counted once; findings about the whole workbook name no cell)."""
        counts = dict.fromkeys(("ok",) + KINDS, 0)
        counts["ok"] = len(self.ok)
        for kind in self.covered().values():
            counts[kind] += 1
        return counts

    @property
    def workbook_findings(self) -> int:
        """Findings about the workbook as a whole (a template marker, a note with no cell)."""
        return sum(1 for f in self.findings if not f.cell and not f.cells)

    @property
    def exit_code(self) -> int:
        return EXIT_FINDINGS if self.findings else EXIT_OK


@dataclass
class CellRecord:
    """A formula cell (or an array formula's member) as the file holds it."""

    sheet: str
    ref: str
    formula: str | None            # "=..." (shared formulas expanded); None for array members
    cached: object = None
    has_cached: bool = False
    array_ref: str | None = None


class Records:
    """The cells of a book as :class:`CellRecord`, made when asked for (a workbook's constants
    are not copied: the audit looks at formula cells and the few cells drift asks about)."""

    def __init__(self, book):
        self.sheets = {s.name: s for s in book.sheets}

    def get(self, key) -> CellRecord | None:
        sheet = self.sheets.get(key[0])
        if sheet is None:
            return None
        name, ref = key
        cell = sheet.formulas.get(ref)
        if cell is not None:
            return CellRecord(name, ref, "=" + cell.formula if cell.formula is not None else None,
                              _stored(cell.cached), cell.has_cached, cell.array_ref)
        for values in (sheet.cached, sheet.values):
            if ref in values:
                return CellRecord(name, ref, None, _stored(values[ref]), True)
        if ref in sheet.array_members:
            return CellRecord(name, ref, None, None, False)
        return None

    def formulas(self):
        """Every formula cell's record, sheet by sheet."""
        for sheet in self.sheets.values():
            for ref in sheet.formulas:
                yield self.get((sheet.name, ref))


def _stored(value):
    from ..workbook.reader import CellError
    return str(value) if isinstance(value, CellError) else value


# ---------------------------------------------------------------------------------------------
# Comparing values


def is_error_text(value) -> bool:
    return isinstance(value, str) and value.strip() in ERROR_VALUES


def relative_difference(cached: float, computed: float) -> float:
    scale = max(abs(cached), abs(computed))
    return 0.0 if scale == 0 else abs(cached - computed) / scale


# The absolute floor of a comparison grows with the size of the numbers the formula reads:
# a difference of two flows of 100 W cannot be trusted below about 1e-12 x 100 W.
ROUND_OFF = 1e-12
DEFAULT_ATOL = 1e-12


def differs(cached: float, computed: float, rtol: float, atol: float, scale: float = 0.0) -> bool:
    """Whether two numbers differ for the audit: |a-b| must exceed both rtol*max(|a|,|b|) and
    the absolute floor atol + ROUND_OFF*S, S being the largest magnitude among the numbers the
    formula reads and its results."""
    difference = abs(cached - computed)
    size = max(abs(cached), abs(computed), scale)
    return difference > rtol * max(abs(cached), abs(computed)) and \
        difference > atol + ROUND_OFF * size


def same_value(cached, computed, rtol: float, atol: float = DEFAULT_ATOL, scale: float = 0.0
               ) -> tuple[bool, float | None]:
    if isinstance(cached, bool) or isinstance(computed, bool):
        return cached == computed, None
    if isinstance(cached, float) and isinstance(computed, float):
        if not (math.isfinite(cached) and math.isfinite(computed)):
            return cached == computed, None
        return not differs(cached, computed, rtol, atol, scale), relative_difference(cached, computed)
    if computed is None:
        return cached in (None, "", 0.0), None
    return cached == computed, None


def show(value) -> str:
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        return f"{value:.10g}"
    if value is None:
        return "(blank)"
    text = str(value)
    return repr(text) if not is_error_text(text) else text


class AuditError(Exception):
    """The workbook cannot be audited; one line for the user."""
