"""The two network tables as the sheet holds them, read and checked.

* branches, one row per branch:  name | from | to | kind | p1 | p2 | p3 | p4 | p5 | method
* boundaries, one row per condition:  node | T or Q | value

Every problem is a :class:`NetworkError` naming the table, the row and the column.  Beyond
each cell, the tables are checked as a whole: a boundary must name a node some branch joins
(with "did you mean" for a near name), a node without a boundary must join at least two
branches (a node on one branch only carries no heat: usually a mistyped name), and every
connected group of nodes needs a fixed temperature.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ..validity import ABSOLUTE_ZERO_C
from .errors import FUNCTION, NetworkError, Shown
from .kinds import BRANCH_KINDS
from .reading import _ERROR_TEXT, blank, error_text, name, number

__all__ = ["BRANCH_COLUMNS", "BOUNDARY_COLUMNS", "Branch", "Boundary", "parse_branches",
           "parse_boundaries", "Topology", "check_topology"]

BRANCH_COLUMNS = ("name", "from", "to", "kind", "p1", "p2", "p3", "p4", "p5", "method")
BOUNDARY_COLUMNS = ("node", "T or Q", "value")


@dataclass(frozen=True, slots=True)   # slots: no dict per row (fewer objects for the collector)
class Branch:
    row: int
    name: str
    source: str
    target: str
    kind: str
    params: tuple
    method: str

    @property
    def where(self) -> str:
        return f"branch row {self.row} ({self.name})"


@dataclass(frozen=True)
class Boundary:
    row: int
    node: str
    kind: str     # "T" or "Q"
    value: float


def _rows(table, table_name: str, columns: tuple[str, ...]):
    """(row number, padded row) for every non-blank row; a header row is skipped."""
    width = len(columns)
    if table is None:
        raise NetworkError(FUNCTION, table_name, None, "a table of rows")
    if isinstance(table, np.ndarray):
        table = table.tolist()
    try:
        rows = list(table)
    except TypeError:
        raise NetworkError(FUNCTION, table_name, table, "a table of rows (a list of lists)") from None
    plain = _plain_table(rows, columns)
    if plain is not None:
        return plain
    singular = {"branches": "branch", "boundaries": "boundary", "capacities": "capacity"}.get(table_name, table_name)
    result: list = []
    for number_, row in enumerate(rows, start=1):
        if isinstance(row, np.ndarray):
            row = row.tolist()
        if isinstance(row, (str, bytes)) or not hasattr(row, "__iter__"):
            raise NetworkError(FUNCTION, f"{singular} row {number_}", row,
                               f"a row of up to {width} values ({' | '.join(columns)})")
        row = list(row)
        if len(row) > width and any(not blank(v) for v in row[width:]):
            raise NetworkError(FUNCTION, f"{singular} row {number_}", Shown(f"{len(row)} columns"),
                               f"at most {width} columns ({' | '.join(columns)})")
        row = (row + [None] * width)[:width]
        if all(blank(v) for v in row):
            continue
        for column, value in zip(columns, row):
            text = error_text(value)
            if text is not None:
                raise NetworkError(FUNCTION, f"{singular} row {number_}, column {column}", Shown(text),
                                   f"{_WHAT.get(column, 'a value')}, not a spreadsheet error value "
                                   "(correct the cell the error comes from)")
        if not result and _is_header(row, columns):
            continue
        result.append((number_, row))
    return result


def _plain_table(rows, columns) -> list | None:
    """:func:`_rows`'s answer for a table that needs no look at any one cell: rows of numbers,
    None and text no spreadsheet error value is (one regular-expression search over all the
    text), no filled cell past the last column, every row's first cell filled.  None for any
    other table, which the loop of :func:`_rows` then reads row by row, wording the first problem."""
    width = len(columns)
    padded = []
    for row in rows:
        if type(row) is not list and type(row) is not tuple:
            return None
        size = len(row)
        if size > width and list(row[width:]).count(None) < size - width:
            return None
        row = list(row[:width]) + [None] * (width - size) if size != width else list(row)
        first = row[0]
        if not (type(first) is str and not first.isspace() and first or type(first) in (float, int)):
            return None
        padded.append(row)
    cells = [value for row in padded for value in row]
    if not set(map(type, cells)) <= _PLAIN_CELL_TYPES:
        return None
    if _ERROR_LINE.search("\n".join([value for value in cells if type(value) is str])):
        return None
    numbered = list(enumerate(padded, start=1))
    return numbered[1:] if numbered and _is_header(numbered[0][1], columns) else numbered


_PLAIN_CELL_TYPES = {float, int, str, type(None)}
#: A line holding a spreadsheet error value (reading.error_text's pattern, one per line), to
#: search all the text of a table at once.
_ERROR_LINE = re.compile(r"(?m)^[^\S\n]*" + _ERROR_TEXT.pattern.strip("^$") + r"[^\S\n]*$", re.IGNORECASE)

_WHAT = {"name": "a branch name", "from": "a node name", "to": "a node name", "node": "a node name"}


def _is_header(row, columns) -> bool:
    words = [v.strip().lower() for v in row[:2] if isinstance(v, str)]
    return words == [c.lower() for c in columns[:2]]


def parse_branches(table) -> tuple[Branch, ...]:
    rows = _rows(table, "branches", BRANCH_COLUMNS)
    return _branches_by_column(rows) or _branches_by_row(rows)


def _branches_by_column(rows) -> tuple[Branch, ...] | None:
    """The branch rows read column by column: names and kinds as lists, each kind's parameter
    columns at once (:meth:`BranchKind.read_columns`).  None as soon as any cell is not plainly
    good -- a number typed as a name, a blank, a duplicate, a value out of range -- and then
    :func:`_branches_by_row` reads the table and words the first problem, so a message never
    depends on which reader found it."""
    if not rows:
        return None
    names, sources, targets, kinds, *parameters, methods = zip(*[row for _, row in rows])
    if not set(map(type, names + sources + targets + kinds)) == {str}:
        return None
    name_of, source_of, target_of = ([v.strip() for v in column] for column in (names, sources, targets))
    if (not all(name_of) or not all(source_of) or not all(target_of) or len(set(name_of)) < len(name_of)
            or any(a == b for a, b in zip(source_of, target_of))):
        return None
    members: dict[str, list[int]] = {}
    for position, kind_cell in enumerate(kinds):
        members.setdefault(kind_cell.strip().lower(), []).append(position)
    if not all(kind_name in BRANCH_KINDS for kind_name in members):
        return None
    params: list = [None] * len(rows)
    method_names: list = [None] * len(rows)
    for kind_name, positions in members.items():
        kind = BRANCH_KINDS[kind_name]
        read = kind.read_columns([[column[i] for i in positions] for column in parameters])
        if read is None:
            return None
        blank_method = kind.read_method(None, "", ())    # a blank method cell reads the same in every row
        try:
            for position, values in zip(positions, read):
                params[position] = values
                cell = methods[position]
                method_names[position] = blank_method if cell is None else kind.read_method(cell, "", values)
        except NetworkError:
            return None
    return tuple(Branch(row_number, name_of[i], source_of[i], target_of[i], kinds[i].strip().lower(), params[i],
                        method_names[i]) for i, (row_number, _) in enumerate(rows))


def _branches_by_row(rows) -> tuple[Branch, ...]:
    branches: list[Branch] = []
    seen: dict[str, int] = {}
    for row_number, row in rows:
        where = f"branch row {row_number}"
        branch_name = name(row[0], where, "name")
        where = f"branch row {row_number} ({branch_name})"
        if branch_name in seen:
            raise NetworkError(FUNCTION, f"{where}, column name", branch_name,
                               f"unique (row {seen[branch_name]} has the same name)")
        seen[branch_name] = row_number
        source = name(row[1], where, "from")
        target = name(row[2], where, "to")
        if source == target:
            raise NetworkError(FUNCTION, f"{where}, column to", target, "a node other than its from node")
        kind_cell = row[3]
        kind_name = kind_cell.strip().lower() if isinstance(kind_cell, str) else kind_cell
        if kind_name not in BRANCH_KINDS:
            raise NetworkError(FUNCTION, f"{where}, column kind", kind_cell,
                               "one of " + ", ".join(BRANCH_KINDS))
        kind = BRANCH_KINDS[kind_name]
        params = kind.read_params(row[4:9], where)
        method = kind.read_method(row[9], where, params)
        branches.append(Branch(row_number, branch_name, source, target, kind_name, params, method))
    if not branches:
        raise NetworkError(FUNCTION, "branches", Shown("no rows"), "at least one branch row")
    return tuple(branches)


def parse_boundaries(table) -> tuple[Boundary, ...]:
    result = []
    for row_number, row in _rows(table, "boundaries", BOUNDARY_COLUMNS):
        where = f"boundary row {row_number}"
        node = name(row[0], where, "node")
        where = f"boundary row {row_number} ({node})"
        kind_cell = row[1]
        kind = kind_cell.strip().upper() if isinstance(kind_cell, str) else None
        if kind not in ("T", "Q"):
            raise NetworkError(FUNCTION, f"{where}, column T or Q", kind_cell,
                               '"T" (fixed temperature, °C) or "Q" (heat input, W)')
        unit = "°C" if kind == "T" else "W"
        value = number(row[2], where, "value", unit)
        if kind == "T" and not value > ABSOLUTE_ZERO_C:
            raise NetworkError(FUNCTION, f"{where}, column value", value, "above -273.15 °C")
        result.append(Boundary(row_number, node, kind, value))
    return tuple(result)


# --------------------------------------------------------------------------------------------
# The tables as a whole


@dataclass(frozen=True)
class Topology:
    nodes: tuple[str, ...]
    source: np.ndarray
    target: np.ndarray
    fixed: np.ndarray          # node indices with a fixed temperature, in boundary order
    fixed_t: np.ndarray
    free: np.ndarray
    heat_input: np.ndarray     # W at every node


def _near(word: str, candidates) -> str | None:
    """The name ``word`` was most likely meant to be (same letters in another case first)."""
    import difflib   # only for a misspelt name: not worth its import time on every start

    lower = {c.lower(): c for c in candidates if c != word}
    near = difflib.get_close_matches(word.lower(), list(lower), n=1, cutoff=0.6)
    return lower[near[0]] if near else None


def check_topology(branches: tuple[Branch, ...], boundaries: tuple[Boundary, ...]) -> Topology:
    nodes = list(dict.fromkeys(n for b in branches for n in (b.source, b.target)))
    index = {n: i for i, n in enumerate(nodes)}

    fixed_rows: dict[str, Boundary] = {}
    bounded = set()
    heat_input = np.zeros(len(nodes))
    for bound in boundaries:
        if bound.node not in index:
            raise NetworkError(FUNCTION, f"boundary row {bound.row}, column node", bound.node,
                               "a node that some branch connects" + (
                                   f" (did you mean {near!r}?)" if (near := _near(bound.node, nodes)) else ""))
        bounded.add(bound.node)
        if bound.kind == "T":
            if bound.node in fixed_rows:
                raise NetworkError(FUNCTION, f"boundary row {bound.row} ({bound.node}), column node",
                                   bound.node, f"fixed only once (row {fixed_rows[bound.node].row} "
                                               "already fixes its temperature)")
            fixed_rows[bound.node] = bound
    for bound in boundaries:
        if bound.kind == "Q":
            if bound.node in fixed_rows:
                raise NetworkError(FUNCTION, f"boundary row {bound.row} ({bound.node}), column T or Q",
                                   "Q", f'"T" only: the node\'s temperature is fixed by row '
                                        f'{fixed_rows[bound.node].row}, so a heat input there would '
                                        "have no effect")
            heat_input[index[bound.node]] += bound.value

    source = np.array([index[b.source] for b in branches])
    target = np.array([index[b.target] for b in branches])
    _check_grounded(nodes, branches, source, target, fixed_rows)
    _check_dangling(nodes, branches, source, target, bounded)
    fixed = np.array([index[n] for n in fixed_rows], dtype=int)
    free = np.array([i for i, n in enumerate(nodes) if n not in fixed_rows], dtype=int)
    return Topology(tuple(nodes), source, target, fixed,
                    np.array([fixed_rows[nodes[i]].value for i in fixed], dtype=float), free, heat_input)


def _check_dangling(nodes, branches, source, target, bounded):
    """A node without a boundary row that only one branch joins carries no heat: the branch's
    flow is zero whatever it is, which hides a mistyped node name (Amb for amb)."""
    degree = np.bincount(np.concatenate([source, target]), minlength=len(nodes))
    for i in np.flatnonzero(degree == 1):
        node = nodes[i]
        if node in bounded:
            continue
        position = int(np.flatnonzero((source == i) | (target == i))[0])
        branch = branches[position]
        column = "from" if branch.source == node else "to"
        near = _near(node, nodes)
        raise NetworkError(
            FUNCTION, f"{branch.where}, column {column}", node,
            "a node that another branch or a boundary row also names (a node on one branch only "
            "carries no heat" + (f"; did you mean {near!r}?)" if near else ")"))


def _check_grounded(nodes, branches, source, target, fixed_rows):
    """Every connected group of nodes needs a fixed temperature, or its balance is singular."""
    parent = list(range(len(nodes)))

    def root(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for a, b in zip(source.tolist(), target.tolist()):
        parent[root(a)] = root(b)
    grounded = {root(i) for i, node in enumerate(nodes) if node in fixed_rows}
    groups: dict[int, list[int]] = {}
    for i in range(len(nodes)):
        groups.setdefault(root(i), []).append(i)
    for label, members in groups.items():
        if label in grounded:
            continue
        names = [nodes[i] for i in members]
        rows = [str(b.row) for b in branches if b.source in names or b.target in names]
        listed = ", ".join(repr(m) for m in names)
        raise NetworkError(
            FUNCTION, f"the nodes {listed} (branch rows {', '.join(rows)})",
            Shown("a group with no fixed temperature (its energy balance is singular)"),
            "connected through branches to a node with a fixed temperature (a boundary row of type T)")
