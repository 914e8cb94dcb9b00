"""Check a hand-built workbook: recognise what its formulas compute, then check that.

Most workbooks a checker receives were typed by hand, without our cell functions.  This module
identifies each formula *numerically*, never by its text:

1. every formula cell whose value depends on at most :data:`MAX_INPUTS` numeric cells (typed
   constants or other formulas) is re-evaluated alone, with the headless evaluator's compiled
   formula, at the workbook's values and at :data:`PROBES` points where each input is moved by
   1-5 % (never across its sign);
2. the values are compared with every form of :mod:`stillair.addin.audit.hand_forms` (the registry's
   correlations case by case, the groups, radiation, conduction) under every assignment of the
   cell's inputs to the form's roles whose values are plausible for the role.  A match is
   agreement at every probe to :data:`MATCH_RTOL`; a consistent ratio is a near-match (a
   constant typed differently: g = 9.81, sigma = 5.67e-8 are stated, not findings, when the
   ratio is within :data:`ROUNDING`); a formula that matches once one of its typed constants is
   changed is a near-match naming that constant.  Algebraic rearrangements are recognised
   because the test is numerical;
3. what was recognised is checked: a correlation outside its published range, typed gas
   properties against the engine's at the film temperature the sheet implies, beta = 1/T in
   degC, radiation of degC temperatures, a length or an area that disagrees between the group
   and the heat flow, and (with iterative calculation on) whether the stored values are
   converged.

Unrecognised formulas are counted, never claimed.
"""

from __future__ import annotations

import dataclasses
import itertools
import math
import re
import time
import warnings
from dataclasses import dataclass, field

import numpy as np

from .hand_forms import CELSIUS_CEILING, WEAK, Form, forms, plausible, with_typed

__all__ = ["HandFinding", "Recognition", "HandCheck", "check_hand_book", "hand_findings",
           "hand_json", "MAX_INPUTS", "PROBES", "MATCH_RTOL", "PROPERTY_THRESHOLD", "ROUNDING"]

MAX_INPUTS = 6              # distinct input cells of a formula the search tries (6! assignments)
PROBES = 3                  # perturbed points besides the workbook's own values
MATCH_RTOL = 1e-9           # agreement at every probe
ROUNDING = 5e-3             # a constant ratio within this is a rounded constant, stated only
PROPERTY_THRESHOLD = 0.02   # a typed property is a finding when it moves its cell by more
NEAR = 0.6                  # a form within this at every probe is worth a constant search
_NEAR_TRIED = 8             # the closest that many are searched for one mistyped constant
_MAX_CONSTANTS = 16         # typed numbers of one formula tried as the mistyped one
_SECANT_STEPS = 12
_COMPILE_COST = 100         # a compilation of a formula variant, in formula evaluations
WIDE = 4                    # points far from the workbook's values a near-match must also hold at
TYPED_PRANDTL = (0.6, 0.9)  # a number typed in a correlation taken for the gas's Pr
SEARCH_BUDGET = 12_000      # formula evaluations a book may spend on near-matches
_SCRATCH = "XEZ999999"      # a cell far out of any used range: the constant being solved
_SEED = 20240611

# What a role's input is, when it is a recognised cell (other roles take typed numbers or
# cells that are not groups: temperatures, lengths, properties).
_ROLE_QUANTITY = {"ra": ("Ra",), "nusselt": ("Nu",), "h": ("h", "hrad"), "h2": ("h", "hrad"),
                  "r1": ("R",), "r2": ("R",), "r3": ("R",), "expansion": ("beta",),
                  "pr": ("Pr",)}

# The engine's name of each property role (GasProperties fields).
_PROPERTY_OF_ROLE = {"kinvisc": "kinvisc", "diffusivity": "diffusivity",
                     "conductivity": "conductivity", "expansion": "expansion", "pr": "prandtl"}
_PROPERTY_WORDS = {"kinvisc": "kinematic viscosity", "diffusivity": "thermal diffusivity",
                   "conductivity": "thermal conductivity", "expansion": "expansion coefficient",
                   "prandtl": "Prandtl number"}


@dataclass
class HandFinding:
    kind: str                  # constant, out-of-range, property, beta-celsius, ...
    cell: str                  # "Sheet!B3"
    recognised: str            # what the cell was recognised as
    message: str               # the reason, with the numbers
    value: float | None = None          # the workbook's value (recomputed from its inputs)
    engine: float | None = None         # what the engine gives in its place
    difference: float | None = None     # (value - engine)/engine


@dataclass
class Recognition:
    cell: str
    key: tuple
    form: Form
    roles: dict                 # role -> input cell key
    values: dict                # role -> base value
    value: float
    ratio: float = 1.0          # cell / form, constant over the probes
    constant: tuple | None = None   # (as written, typed value, the value that matches)
    statements: list = field(default_factory=list)   # stated, not findings
    findings: list = field(default_factory=list)

    @property
    def title(self) -> str:
        return self.form.title


@dataclass
class HandCheck:
    path: str
    recognised: list[Recognition]
    findings: list[HandFinding]
    formulas: int                  # formula cells looked at
    unrecognised: list[str]
    too_large: list[str]
    iteration: dict | None = None
    seconds: float = 0.0
    timing: dict = field(default_factory=dict)
    unsearched: list[str] = field(default_factory=list)   # search budget spent before them
    not_numeric: list[str] = field(default_factory=list)  # reading ranges, text, blanks, errors

    def summary(self) -> str:
        n = len(self.recognised)
        flagged = {f.cell for f in self.findings if f.kind not in ("not-converged", "circular")}
        agree = sum(1 for r in self.recognised if r.cell not in flagged)
        text = (f"{n} hand formula{'s' if n != 1 else ''} recognised: {agree} agree, "
                f"{n - agree} with findings; {len(self.unrecognised)} not recognised")
        if self.too_large:
            text += f", {len(self.too_large)} too large to identify"
        if self.not_numeric:
            text += (f", {len(self.not_numeric)} reading ranges, text or errors (not "
                     "identified)")
        if self.unsearched:
            text += (f", {len(self.unsearched)} not searched for a mistyped constant (search "
                     "budget spent)")
        if self.iteration is not None:
            text += "; iteration " + ("converged" if self.iteration["converged"]
                                      else "NOT converged")
        return text


# ---------------------------------------------------------------------------------------------
# One formula on its own: the evaluator's compiled formula fed with chosen input values


class _Formula:
    """A formula cell evaluated alone: ``self(values)`` with ``values`` mapping each input cell
    key to a number.  ``problem`` says why it cannot be (a range, an array formula ...)."""

    def __init__(self, model, key, node=None):
        from ..workbook.formulatext import parse_reference
        from ..workbook.reader import index_to_col

        self.key, self.problem, self.inputs = key, None, []
        node = node if node is not None else model.nodes.get(key)
        if node is None or node.prepared is None or node.problem or node.array or node.name:
            self.problem = "not a single-cell formula the evaluator reads"
            return
        function, positions, problem, reference_keys = model.compile(node)
        if problem:
            self.problem = problem
            return
        if reference_keys is not None:
            # ROW, INDEX...: it reads where its arguments lie, not only their numbers
            self.problem = "reads its arguments as references (ROW, INDEX...), not as numbers"
            return
        self.function = function
        for position in positions:
            reference, source = node.prepared.references[position], node.sources[position]
            target = None
            if reference.kind == "area" and source is not None and reference.cells == 1:
                target = (source, f"{index_to_col(reference.c1)}{reference.r1}")
            elif reference.kind == "name" and source is not None:
                entry = model.names.get((source[1], source[2]))
                inner = parse_reference(entry.text.strip().lstrip("=").replace("$", "")) \
                    if entry is not None else None
                if inner is not None and inner.kind == "area" and inner.cells == 1:
                    sheet = model.sheet_case.get((inner.sheet or node.sheet).upper())
                    if sheet is not None:
                        target = (sheet, f"{index_to_col(inner.c1)}{inner.r1}")
            if target is None:
                self.problem = "reads a range or a name of more than one cell"
                return
            self.inputs.append(target)
        self.precedents = list(dict.fromkeys(self.inputs))

    def __call__(self, values) -> float | None:
        args = []
        for key in self.inputs:
            cell = np.empty((1, 1), dtype=object)
            cell[0, 0] = values[key]
            args.append(cell)
        try:
            raw = self.function(*args)
        except Exception:
            return None
        flat = np.asarray(raw, dtype=object).ravel()
        value = flat[0] if flat.size else None
        if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.number)):
            return None
        value = float(value)
        return value if math.isfinite(value) else None


# ---------------------------------------------------------------------------------------------
# Matching a cell's probe values with the forms

_PERMUTATIONS = {n: np.array(list(itertools.permutations(range(n))), dtype=int)
                 for n in range(1, MAX_INPUTS + 1)}


@dataclass
class _Match:
    form: Form
    order: tuple            # input index per role
    ratio: float            # cell / form (1 for an exact match)
    close: float = 0.0      # largest |cell/form - 1| over the probes


def _match_forms(x: np.ndarray, y: np.ndarray, candidates):
    """(exact matches, consistent-ratio matches, the closest other assignments within NEAR).

    ``x`` holds the probes' inputs (probes x inputs), ``y`` the cell's values there.  Forms
    are tried on assignments that make no sense too (a length in a logarithm's place): their
    NaNs and infinities are expected and simply never match."""
    with np.errstate(all="ignore"), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return _match_quietly(x, y, candidates)


def _match_quietly(x, y, candidates):
    n = x.shape[1]
    exact, scaled, near = [], [], []
    fits_role = {}   # (role, degC only) -> which inputs are plausible (shared by many forms)
    for form in candidates:
        roles = form.roles
        orders = _PERMUTATIONS[n]
        keep = np.ones(len(orders), dtype=bool)
        celsius = form.mistake is not None   # every mistake form is a degC one
        for j, role in enumerate(roles):
            if (role, celsius) not in fits_role:
                fits_role[(role, celsius)] = plausible(role, x[0], celsius)
            keep &= fits_role[(role, celsius)][orders[:, j]]
        orders = orders[keep]
        if not len(orders):
            continue
        arguments = {role: x[:, orders[:, j]].T for j, role in enumerate(roles)}
        try:
            values = np.asarray(form.function(**arguments), dtype=float)
        except Exception:
            continue
        values = np.broadcast_to(values, (len(orders), len(y)))
        # NaN and infinity (a form off its domain, a zero) fail every comparison below, so
        # they need no test of their own; few numpy calls, since this runs for every form.
        ratio = y / values
        consistent = np.abs(ratio / ratio[:, :1] - 1).max(axis=1) <= MATCH_RTOL
        if consistent.any():
            # a form that does not move over the probes (Nu = 1) matches nothing
            consistent &= np.ptp(values, axis=1) > 1e-12 * np.abs(values).max(axis=1)
        is_exact = consistent & (np.abs(ratio[:, 0] - 1) <= MATCH_RTOL)
        exact += [_Match(form, tuple(orders[i]), 1.0) for i in np.nonzero(is_exact)[0]]
        if form.name not in _SCALED:
            continue
        for i in np.nonzero(consistent & ~is_exact)[0]:
            q = float(ratio[i, 0])
            if 0.5 <= q <= 2.0:
                scaled.append(_Match(form, tuple(orders[i]), q, abs(q - 1)))
        spread = np.abs(ratio - 1).max(axis=1)
        for i in np.nonzero((spread < NEAR) & ~consistent)[0]:
            near.append(_Match(form, tuple(orders[i]), float(ratio[i, 0]), float(spread[i])))
    near.sort(key=lambda m: m.close)
    return exact, scaled, near


# Forms whose written constants a practitioner types (g, sigma, the correlation's constants):
# a constant ratio, or one constant off, is a near-match for them.  A ratio of two inputs
# (Pr = nu/alpha) or a product has no constant to be off.
_SCALED = {"correlation", "ra", "gr", "radiation-flux", "radiation-flow", "radiation-coefficient"}


# ---------------------------------------------------------------------------------------------
# The check


def _calc_settings(book, path: str) -> dict | None:
    """The workbook's iterative-calculation settings (calcPr), or None when iteration is off.

    From the book where the reader records them (issue 20's ``Book.iteration``); else read
    here from the package read_book has already opened and checked: only workbook.xml, small
    and parsed through defusedxml."""
    if hasattr(book, "iteration"):
        setting = book.iteration
        return None if setting is None else {"count": setting.count, "delta": setting.delta}
    import zipfile

    from ..workbook.safezip import parse_xml

    with zipfile.ZipFile(path) as archive:
        if archive.getinfo("xl/workbook.xml").file_size > _WORKBOOK_PART_LIMIT:
            return None
        root = parse_xml(archive.read("xl/workbook.xml"))
    for element in root.iter():
        if element.tag.endswith("}calcPr") or element.tag == "calcPr":
            if element.get("iterate", "0").lower() in ("1", "true"):
                try:
                    return {"count": max(1, int(float(element.get("iterateCount", "100")))),
                            "delta": abs(float(element.get("iterateDelta", "0.001")))}
                except ValueError:
                    return {"count": 100, "delta": 0.001}
    return None


_WORKBOOK_PART_LIMIT = 16 << 20


def _sheet_gas(book) -> dict[str, str]:
    """The gas each sheet names in its text (the first of the engine's gases other than air
    that a label mentions), else air."""
    from stillair import GAS_NAMES

    names = [g for g in GAS_NAMES if g != "air"]
    found = {}
    for sheet in book.sheets:
        gas = "air"
        for value in sheet.values.values():
            if isinstance(value, str):
                hit = next((g for g in names if re.search(rf"(?i)\b{re.escape(g)}\b", value)), None)
                if hit:
                    gas = hit
                    break
        found[sheet.name] = gas
    return found


class _Checker:
    def __init__(self, path: str, book=None, exclude=(), model=None, known=None):
        from ..workbook.model import Model
        from ..workbook.reader import read_book
        from ..workbook.status import label

        self.started = time.perf_counter()
        self.label = label
        self.path = path
        self.book = book if book is not None else read_book(path)
        self.exclude = set(exclude)
        self.model = model if model is not None else Model(self.book)
        self.timing = {"load": time.perf_counter() - self.started}
        # Values the caller has calculated already (the audit's cells) are given, not redone.
        known = {key: value for key, value in (known or {}).items() if isinstance(value, float)}
        evaluation = self.model.calculate(sets=known)
        self.timing["calculate"] = evaluation.calc_seconds
        self.values: dict = dict(known)
        for key, result in evaluation.results.items():
            if result.status in ("value", "note") and isinstance(result.value, float):
                self.values[key] = result.value
        self.settings = _calc_settings(self.book, path)
        self.gas = _sheet_gas(self.book)
        self.formulas: dict = {}
        self.recognised: dict = {}
        self.findings: list[HandFinding] = []
        self.unrecognised: list[str] = []
        self.too_large: list[str] = []
        self.unsearched: list[str] = []
        self.not_numeric: list[str] = []
        self.iteration: dict | None = None

    # -- values ---------------------------------------------------------------------------

    def value(self, key):
        if key in self.values:
            return self.values[key]
        sheet = self.model.sheets.get(key[0])
        if sheet is None:
            return None
        if key[1] in sheet.formulas:
            return None
        value = sheet.values.get(key[1])
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            return None
        return float(value)

    def is_constant(self, key) -> bool:
        sheet = self.model.sheets.get(key[0])
        return sheet is not None and key[1] not in sheet.formulas and key[1] in sheet.values

    def formula(self, key) -> _Formula:
        if key not in self.formulas:
            self.formulas[key] = _Formula(self.model, key)
        return self.formulas[key]

    def name(self, key) -> str:
        return self.label(*key)

    # -- iteration ------------------------------------------------------------------------

    def iterate(self) -> None:
        """With iterative calculation on: the cells in or after a cycle, re-iterated from the
        stored values to the workbook's delta; whether the stored values were converged."""
        cycles: set[tuple] = getattr(self.model, "cycles", set())
        if not cycles:
            return
        affected = self.model.downstream(cycles)
        order = sorted(affected, key=lambda k: (self._sheet_index(k[0]), *self._rc(k[1])))
        stored = {}
        for key in order:
            cell = self.model.sheets[key[0]].formulas.get(key[1])
            cached = cell.cached if cell is not None else None
            stored[key] = float(cached) if isinstance(cached, (int, float)) and \
                not isinstance(cached, bool) else 0.0
        if self.settings is None:
            self.values.update(stored)   # a cycle without iteration: the stored values
            first = min(cycles, key=lambda k: (self._sheet_index(k[0]), *self._rc(k[1])))
            self.findings.append(HandFinding(
                "circular", self.name(first), "circular reference",
                f"{self.name(first)} and {len(cycles) - 1} other cell(s) depend on their own "
                "values but the workbook is saved with iterative calculation off: Excel warns "
                "and leaves the loop uncalculated, so the stored values are not a solution "
                "(switch iterative calculation on, or break the loop)"))
            return
        delta, limit = self.settings["delta"], max(self.settings["count"], 1000)
        current = dict(stored)
        lookup = _Values(self, current)
        first_change, sweeps, change = None, 0, math.inf
        while change > 1 and sweeps < limit:
            change = 0.0   # the largest change in units of the allowed change
            for key in order:
                new = self.formula(key)(lookup)
                if new is None:
                    change = math.nan
                    break
                change = max(change, abs(new - current[key]) / _allowed(delta, new))
                current[key] = new
            sweeps += 1
            first_change = change if first_change is None else first_change
            if not math.isfinite(change):
                break
        converged_now = math.isfinite(change) and change <= 1
        worst = max(order, key=lambda k: abs(_rel(stored[k], current[k]) or 0.0))
        stored_ok = first_change is not None and first_change <= 1
        self.iteration = {"converged": bool(stored_ok), "delta": delta,
                          "count": self.settings["count"], "sweeps": sweeps,
                          "reached": bool(converged_now), "cells": [self.name(k) for k in order],
                          "worst": self.name(worst), "stored": stored[worst],
                          "converged_value": current[worst],
                          "values": {self.name(k): {"stored": stored[k], "converged": current[k]}
                                     for k in order}}
        self.values.update(current)
        if not stored_ok:
            reached = (f"re-iterated to the workbook's delta {delta:g} in {sweeps} sweeps"
                       if converged_now else f"still changing after {sweeps} sweeps")
            self.findings.append(HandFinding(
                "not-converged", self.name(worst), "iterative calculation",
                f"the stored values are not converged: {self.name(worst)} holds "
                f"{stored[worst]:.6g}, the converged value is {current[worst]:.6g} ({reached}; "
                f"the first sweep from the stored values moved a cell by {first_change:.3g} times "
                "the allowed change); "
                "recalculate until the iteration settles before reading the results",
                stored[worst], current[worst], _rel(stored[worst], current[worst])))

    def _sheet_index(self, sheet):
        return next(i for i, s in enumerate(self.book.sheets) if s.name == sheet)

    @staticmethod
    def _rc(ref):
        from ..workbook.reader import split_ref
        return split_ref(ref)

    # -- recognition ----------------------------------------------------------------------

    def recognise_all(self) -> None:
        rng = self.rng = np.random.default_rng(_SEED)
        self.search_left = SEARCH_BUDGET
        pending = []
        all_forms = forms()
        by_count = {n: [f for f in all_forms if len(f.roles) == n] for n in range(1, MAX_INPUTS + 1)}
        keys = [(s.name, ref) for s in self.book.sheets for ref in s.formula_refs()
                if ref in s.formulas and (s.name, ref) not in self.exclude]
        shapes: dict = {}   # a formula's relative form (a row copied down) -> its first outcome
        for key in keys:
            formula = self.formula(key)
            prepared = self.model.nodes[key].prepared
            shape = prepared.key if not formula.problem and prepared is not None else None
            first = shapes.get(shape)
            if first is not None and first[0] is None:
                # A copy of a formula that was not recognised is not recognised either: the
                # search is done once per relative form (tables of hundreds of rows).
                self.unrecognised.append(self.name(key))
                if first[1]:
                    self.unsearched.append(self.name(key))
                continue
            if formula.problem:
                self.not_numeric.append(self.name(key))   # ranges, arrays, what cannot run
                continue
            inputs = formula.precedents
            if not inputs:
                continue   # a constant expression: nothing to identify
            if len(inputs) > MAX_INPUTS:
                self.too_large.append(self.name(key))
                continue
            base = [self.value(k) for k in inputs]
            if any(v is None for v in base) or self.values.get(key) is None:
                self.not_numeric.append(self.name(key))   # text, blanks, errors
                continue
            x = np.empty((PROBES + 1, len(inputs)))
            x[0] = base
            moves = rng.uniform(0.01, 0.05, size=(PROBES, len(inputs))) * \
                rng.choice((-1.0, 1.0), size=(PROBES, len(inputs)))
            x[1:] = x[0] * (1 + moves)
            y = np.empty(PROBES + 1)
            for i in range(PROBES + 1):
                value = formula(dict(zip(inputs, x[i])))
                if value is None:
                    break
                y[i] = value
            else:
                if first is not None and self._as_first(key, formula, inputs, x, y, first[0]):
                    continue
                self._identify(key, formula, inputs, x, y, by_count[len(inputs)])
                recognised = self.recognised.get(key)
                shapes.setdefault(shape, (recognised, self.name(key) in self.unsearched))
                if recognised is None:
                    pending.append((key, inputs, x, y))
                continue
            self.unrecognised.append(self.name(key))
        # A cell above the cells it combines (a total at the top of a sheet) is looked at again
        # once they are recognised: the forms with a context need them.
        for key, inputs, x, y in pending:
            exact = [m for m in _match_forms(x, y, [f for f in by_count[len(inputs)]
                                                    if f.context])[0]
                     if self._in_context(m, inputs)]
            if exact:
                self.unrecognised.remove(self.name(key))
                self._record(key, inputs, x, y, max(exact, key=lambda m: self._fits(m, inputs)))

    def _as_first(self, key, formula, inputs, x, y, first: "Recognition") -> bool:
        """A copy of a recognised formula (the same relative form) recognised as its first
        cell was, when that form and assignment hold at this cell's own probes (a mistyped
        constant: the same constant solved again); False: identify it in full."""
        positions = {k: i for i, k in enumerate(inputs)}
        places: list[int] = []
        for role in first.form.roles:
            original = first.roles[role]
            # a relative reference moved with the copy, or an absolute one where it was
            place = next((positions[k] for k in (_moved(first.key, key, original), original)
                          if k in positions), None)
            if place is None:
                return False
            places.append(place)
        order = tuple(places)
        match = _Match(first.form, order, first.ratio)
        with np.errstate(all="ignore"), warnings.catch_warnings():
            warnings.simplefilter("ignore")
            expected = np.asarray(first.form.function(**{role: x[:, i] for role, i in
                                                         zip(first.form.roles, order)}),
                                  dtype=float)
        ratio = y / expected
        if not np.all(np.isfinite(ratio)) or \
                np.any(np.abs(ratio / ratio[0] - 1) > MATCH_RTOL):
            return False
        constant = None
        if first.constant is not None:
            constant = self._one_constant(key, inputs, x, self._wide(x[0]), match)
            if constant is None:
                return False
        elif abs(ratio[0] / first.ratio - 1) > MATCH_RTOL:
            return False
        if not self._in_context(match, inputs):
            return False
        self._record(key, inputs, x, y, match, constant)
        return True

    def _identify(self, key, formula, inputs, x, y, candidates) -> None:
        exact, scaled, near = _match_forms(x, y, candidates)
        if not exact:
            exact = self._typed_prandtl(key, x, y)
        exact = [m for m in exact if self._in_context(m, inputs)]
        match, constant = None, None
        if exact:
            match = max(exact, key=lambda m: self._fits(m, inputs))
        else:
            # A near-match must hold far from the workbook's values too (each input moved by up
            # to a factor 10): a correlation in one of its limits is locally a power law, and
            # any power law typed by hand would otherwise pass for it times a constant.
            wide = self._wide(x[0])
            points = np.vstack([x, wide])
            scaled = [m for m in scaled if self._identifying(m, points)]
            near = itertools.islice((m for m in near if self._identifying(m, points)),
                                    _NEAR_TRIED)
            for candidate in sorted(scaled, key=lambda m: self._fits(m, inputs), reverse=True):
                if self._holds(formula, inputs, wide, candidate, candidate.ratio):
                    match = candidate
                    break
            for candidate in near if match is None else ():
                if self.search_left <= 0:
                    self.unsearched.append(self.name(key))
                    break
                constant = self._one_constant(key, inputs, x, wide, candidate)
                if constant is not None:
                    match = candidate
                    break
        if match is None:
            self.unrecognised.append(self.name(key))
            return
        self._record(key, inputs, x, y, match, constant)

    def _record(self, key, inputs, x, y, match: _Match, constant=None) -> None:
        roles = {role: inputs[i] for role, i in zip(match.form.roles, match.order)}
        values = {role: float(x[0][i]) for role, i in zip(match.form.roles, match.order)}
        values.update({role: match.form.fixed[role] for role in match.form.inline})
        self.recognised[key] = Recognition(self.name(key), key, match.form, roles, values,
                                           float(y[0]), match.ratio if constant is None else 1.0,
                                           constant)

    def _typed_prandtl(self, key, x, y) -> list:
        """Exact matches of the correlations that read Pr, with Pr one of the numbers typed in
        the formula (a Prandtl number written into the correlation, as 0.71 for air; numbers
        in the range of the engine's gases near room temperature, TYPED_PRANDTL)."""
        numbers = {value for _, _, value in self._typed_numbers(key)
                   if TYPED_PRANDTL[0] <= value <= TYPED_PRANDTL[1]}
        if not numbers:
            return []
        candidates = [with_typed(form, "pr", value) for form in forms()
                      if form.name == "correlation" and "pr" in form.roles and
                      len(form.roles) == x.shape[1] + 1 for value in sorted(numbers)]
        return _match_forms(x, y, candidates)[0]

    def _typed_numbers(self, key) -> list:
        """(token index, text, value) of every number typed in the cell's formula."""
        from openpyxl.formula.tokenizer import Token, Tokenizer

        cache = self.__dict__.setdefault("_numbers", {})
        if key not in cache:
            try:
                tokens = Tokenizer("=" + self.model.nodes[key].text).items
            except Exception:
                tokens = []
            cache[key] = [(i, t.value, float(t.value)) for i, t in enumerate(tokens)
                          if t.type == Token.OPERAND and t.subtype == Token.NUMBER]
            self.__dict__.setdefault("_tokens", {})[key] = tokens
        return cache[key]

    @staticmethod
    def _identifying(match: _Match, points) -> bool:
        """Whether a near-match to this form would say anything: not where a correlation is a
        pure power law over the points (in one of its limits, as Bar-Cohen and Rohsenow's
        composite far from the fully developed limit), since every power law typed by hand with
        those exponents is then the form times a constant.  The groups keep their near-matches:
        five inputs with the exponents of g beta dT L^3/(nu alpha) identify a Rayleigh number."""
        form = match.form
        if form.name != "correlation":
            return True
        columns = [points[:, i] for i in match.order]
        with np.errstate(all="ignore"), warnings.catch_warnings():
            warnings.simplefilter("ignore")
            values = np.asarray(form.function(**{role: column for role, column in
                                                 zip(form.roles, columns)}), dtype=float)
            logs = [np.log(np.abs(c)) for c in columns if np.ptp(c) > 0]
            design = np.column_stack([np.ones(len(points)), *logs])
            target = np.log(np.abs(values))
        if not np.all(np.isfinite(design)) or not np.all(np.isfinite(target)):
            return True
        fit, *_ = np.linalg.lstsq(design, target, rcond=None)
        return bool(np.max(np.abs(design @ fit - target)) > 1e-6)

    def _wide(self, base) -> np.ndarray:
        factors = np.exp(self.rng.uniform(-math.log(10), math.log(10), size=(WIDE, len(base))))
        return base * factors

    def _holds(self, evaluate, inputs, points, match: _Match, ratio: float, extra=None) -> bool:
        """Whether the cell (``evaluate``, with ``extra`` inputs) equals ``ratio`` times the
        matched form at every point, to 1e-7."""
        form = match.form
        with np.errstate(all="ignore"), warnings.catch_warnings():
            warnings.simplefilter("ignore")
            expected = np.asarray(form.function(**{role: points[:, match.order[j]] for j, role
                                                  in enumerate(form.roles)}), dtype=float) * ratio
        for point, want in zip(points, np.broadcast_to(expected, (len(points),)).tolist()):
            values = {**dict(zip(inputs, point)), **(extra or {})}
            self.search_left -= 1
            got = evaluate(values)
            if got is None or not math.isfinite(want) or abs(got - want) > 1e-7 * abs(want):
                return False
        return True

    def settle(self) -> None:
        """Drop what the recognition cannot stand by, until nothing changes: a plain form no
        recognised cell reads (a reciprocal that is no beta of a Rayleigh number), a form whose
        inputs are no longer recognised as its context needs."""
        changed = True
        while changed:
            changed = False
            read = {k for rec in self.recognised.values() for k in rec.roles.values()}
            for key, rec in list(self.recognised.items()):
                inputs = list(rec.roles.values())
                match = _Match(rec.form, tuple(range(len(inputs))), rec.ratio)
                if (rec.form.name in WEAK and key not in read) or \
                        not self._in_context(match, inputs):
                    del self.recognised[key]
                    self.unrecognised.append(rec.cell)
                    changed = True

    def _in_context(self, match: _Match, inputs) -> bool:
        """A form with a context (a sum as series resistances) counts only where its inputs
        were recognised as what it combines."""
        for role, i in zip(match.form.roles, match.order):
            wanted = match.form.context.get(role)
            if wanted is not None:
                source = self.recognised.get(inputs[i])
                if source is None or source.form.quantity not in wanted:
                    return False
        return True

    def _fits(self, match: _Match, inputs) -> tuple:
        """How well an assignment agrees with what the inputs were recognised as: a Nusselt
        number in the Nu role scores, one in a length's role counts against (h = Nu k/L and
        Nu = h L/k have the same shape); then the earlier form (the registry's order)."""
        score = 0
        for role, i in zip(match.form.roles, match.order):
            source = self.recognised.get(inputs[i])
            wanted = _ROLE_QUANTITY.get(role)
            if source is not None:
                score += 2 if source.form.quantity in (wanted or ()) else -2
            elif wanted and self.is_constant(inputs[i]) and role not in _PROPERTY_OF_ROLE:
                score -= 1   # a typed number where a computed group is due
        return (score,)

    def _one_constant(self, key, inputs, x, wide, near: _Match):
        """A typed constant of the formula which, changed alone, makes the cell match ``near``'s
        form at every probe, near and wide: (the constant as typed, its value, the value that
        matches, None), or None.  Each constant is made an input of its own (one compilation
        per constant) and solved for by the secant method at the first probe, or at a wide one
        where it governs there (a constant inside a MAX of terms may not govern at the
        workbook's values)."""
        form, order = near.form, near.order
        points = np.vstack([x, wide])
        with np.errstate(all="ignore"):
            targets = np.asarray(form.function(**{role: points[:, order[j]] for j, role in
                                                  enumerate(form.roles)}), dtype=float)
        for written, typed, variant, slot in self._constants(key):
            for point, target in zip(points[[0, *range(len(x), len(points))]],
                                     targets[[0, *range(len(x), len(points))]]):
                found = self._solve(variant, dict(zip(inputs, point)), slot, typed, target)
                if found is not None and self._holds(variant, inputs, points, near, 1.0,
                                                     {slot: found}):
                    return written, typed, float(f"{found:.6g}")
        return None

    def _solve(self, variant, values, slot, typed, target) -> float | None:
        """The constant's value that makes the cell equal ``target`` at ``values``: the secant
        method from the typed value; None if it does not converge within a factor 5."""
        def residual(c):
            self.search_left -= 1
            got = variant({**values, slot: c})
            return math.nan if got is None or not target else got / target - 1

        a, b = typed, typed * 1.05
        fa, fb = residual(a), residual(b)
        for _ in range(_SECANT_STEPS):
            if not (math.isfinite(fa) and math.isfinite(fb)) or fa == fb:
                return None
            a, b, fa = b, b - fb * (b - a) / (fb - fa), fb
            fb = residual(b)
            if abs(fb) <= 1e-12:
                break
        if not (math.isfinite(fb) and abs(fb) <= 1e-10) or b == typed or not 0.2 <= b / typed <= 5:
            return None
        return b

    def _constants(self, key):
        """Per typed number of the formula: (text, value, the formula with that number read
        from a scratch cell, the scratch cell's key).  Each variant is compiled when first
        asked for (a compilation costs the search budget :data:`_COMPILE_COST` evaluations)
        and kept for the cell's other candidates."""
        cache = self.__dict__.setdefault("_constant_variants", {})
        node = self.model.nodes[key]
        slot = (node.sheet, _SCRATCH)
        for index, written, typed in self._typed_numbers(key)[:_MAX_CONSTANTS]:
            if typed == 0:
                continue
            if (key, index) not in cache:
                if self.search_left <= 0:
                    return
                self.search_left -= _COMPILE_COST
                tokens = self._tokens[key]
                text = "".join(_SCRATCH if i == index else t.value for i, t in enumerate(tokens))
                variant = dataclasses.replace(node, text=text, prepared=None, deps=set(),
                                              sources=[], compiled=None, problem=None)
                self.model._prepare(variant)
                formula = _Formula(self.model, key, variant)
                cache[(key, index)] = None if formula.problem else formula
            if cache[(key, index)] is not None:
                yield written, typed, cache[(key, index)], slot

    # -- checks ---------------------------------------------------------------------------

    def check_all(self) -> None:
        for key, rec in self.recognised.items():
            form = rec.form
            if rec.constant is not None:
                written, typed, right = rec.constant
                engine = self._form_value(form, rec.values)
                text = f"the formula matches {form.title} once its typed constant {written} is " \
                       f"{right:.6g}"
                if abs(_rel(rec.value, engine) or 0.0) <= ROUNDING:
                    rec.statements.append(f"{text}: a rounded constant, moving the cell by "
                                          f"{(_rel(rec.value, engine) or 0.0) * 100:+.3f} %")
                else:
                    self._add(rec, "constant", f"{text}: one constant mistyped", engine)
            elif rec.ratio != 1.0:
                self._ratio(rec)
            if form.mistake:
                self._mistake(rec)
            if form.quantity == "Nu" and form.geometry:
                self._range(rec)
            self._properties(rec)
            if form.name == "h-from-nusselt":
                self._length(rec)
            if form.quantity == "Q" and "area" in rec.roles:
                self._area(rec)
                self._difference(rec)

    def _add(self, rec, kind, message, engine=None):
        value = rec.value
        finding = HandFinding(kind, rec.cell, rec.title, message, value, engine,
                              _rel(value, engine) if engine is not None else None)
        rec.findings.append(finding)
        self.findings.append(finding)

    @staticmethod
    def _form_value(form, values) -> float:
        with np.errstate(all="ignore"), warnings.catch_warnings():
            warnings.simplefilter("ignore")
            return float(np.asarray(form.function(**{r: np.asarray([values[r]]) for r in
                                                     form.roles})).ravel()[0])

    def _ratio(self, rec) -> None:
        q = rec.ratio
        constant = {"ra": "g", "gr": "g"}.get(rec.form.name, "sigma" if rec.form.name.startswith(
            "radiation") else "the leading constant")
        from stillair.constants import STANDARD_GRAVITY, STEFAN_BOLTZMANN
        standard = {"g": STANDARD_GRAVITY, "sigma": STEFAN_BOLTZMANN}.get(constant)
        typed = f" (typed as {standard * q:.7g}, standard {standard:.10g})" if standard else ""
        if abs(q - 1) <= ROUNDING:
            rec.statements.append(f"{constant} differs by a factor {q:.9g}{typed}: a rounded "
                                  "constant, within the audit's rounding allowance")
            return
        self._add(rec, "constant", f"the formula is {rec.title} times {q:.6g}: {constant} is "
                  f"off{typed}", rec.value / q)

    def _mistake(self, rec) -> None:
        right = next((f for f in forms() if f.mistake is None and f.roles == rec.form.roles and
                      f.quantity == rec.form.quantity and _same_kind(f, rec.form)), None)
        engine = self._form_value(right, rec.values) * rec.ratio if right is not None else None
        kind = "beta-celsius" if "beta" in rec.form.mistake else "celsius"
        self._add(rec, kind, rec.form.mistake, engine)

    def _range(self, rec) -> None:
        from stillair.correlations import CORRELATIONS

        corr = CORRELATIONS[(rec.form.geometry, rec.form.method)]
        inputs = {r: np.asarray([v]) for r, v in rec.values.items()}
        inputs.update({r: np.asarray([float(v)]) for r, v in rec.form.fixed.items()})
        note = str(corr.notes_for(inputs, rec.form.case)[0])
        if note:
            self._add(rec, "out-of-range", f"outside the correlation's published range: {note}")

    def _film(self, rec, depth: int = 0):
        """(t1, t2, gas) the recognised cell's temperature difference is built from, following
        the recognised cells it reads (a Nu cell's Ra, an h cell's Nu ...)."""
        if depth > 4:
            return None
        v = rec.values
        if "t1" in v and "t2" in v:
            return v["t1"], v["t2"], self.gas.get(rec.key[0], "air")
        if "dt" in v:
            pair = self._difference_of(rec.roles["dt"])
            if pair is not None:
                return (*pair, self.gas.get(rec.key[0], "air"))
        for role in ("ra", "nusselt", "h"):
            source = self.recognised.get(rec.roles.get(role))
            if source is not None:
                found = self._film(source, depth + 1)
                if found is not None:
                    return found
        for user in self.recognised.values():   # a Pr cell: the film of the Nu that reads it
            if rec.key in user.roles.values() and user.key != rec.key and depth == 0:
                found = self._film(user, depth + 1)
                if found is not None:
                    return found
        return None

    def _difference_of(self, key):
        """The two temperatures a formula cell subtracts (T1 - T2), checked at the probes."""
        formula = self.formula(key) if key in self.model.nodes else None
        if formula is None or formula.problem or len(formula.precedents) != 2:
            return None
        a, b = formula.precedents
        va, vb = self.value(a), self.value(b)
        if va is None or vb is None:
            return None
        for factor_a, factor_b in ((1, 1), (1.03, 0.98), (0.97, 1.01)):
            got = formula({a: va * factor_a, b: vb * factor_b})
            if got is None:
                return None
            if abs(got - (va * factor_a - vb * factor_b)) > 1e-9 * max(abs(va), abs(vb), 1):
                if abs(got - (vb * factor_b - va * factor_a)) > 1e-9 * max(abs(va), abs(vb), 1):
                    return None
        return va, vb

    def _properties(self, rec) -> None:
        typed_roles = [r for r in rec.roles if r in _PROPERTY_OF_ROLE and
                       self.is_constant(rec.roles[r])] + list(rec.form.inline)
        if not typed_roles:
            return
        film = self._film(rec)
        if film is None:
            return
        t1, t2, gas = film
        t_film, kelvin = self._film_celsius(rec, typed_roles, t1, t2, gas)
        from stillair import gas_properties

        try:
            props = gas_properties(gas, t_film)
        except Exception:
            return
        self._order_symmetric(rec, props)
        for role in typed_roles:
            attribute = _PROPERTY_OF_ROLE[role]
            engine_property = float(getattr(props, attribute))
            typed = rec.values[role]
            changed = dict(rec.values, **{role: engine_property})
            form = rec.form
            while form.base is not None:   # the roles typed in the formula become inputs again
                form = form.base
            with_engine = self._form_value(form, changed) * rec.ratio
            as_typed = self._form_value(form, rec.values) * rec.ratio
            moves = _rel(as_typed, with_engine) or 0.0   # the property's own effect, nothing else's
            right_at = _temperature_where(gas, attribute, typed, t_film)
            at = f"right at {right_at:.1f} degC" if right_at is not None else \
                "not the gas's value at any temperature from -50 to 400 degC"
            where = f"typed in the formula of {rec.cell}" if role in rec.form.inline else \
                f"in {self.name(rec.roles[role])}"
            read = " (the sheet's temperatures read as kelvin)" if kelvin else ""
            message = (f"typed {_PROPERTY_WORDS[attribute]} {typed:.5g} {where} is {at}; the "
                       f"sheet's film temperature{read} is "
                       f"{t_film:.1f} degC (mean of {t1:.4g} and {t2:.4g}), where {gas} has "
                       f"{engine_property:.5g} ({(_rel(typed, engine_property) or 0.0) * 100:+.2f} %)")
            if abs(moves) > PROPERTY_THRESHOLD:
                self._add(rec, "property", message + f"; this moves the cell by "
                          f"{moves * 100:+.2f} % (threshold {PROPERTY_THRESHOLD * 100:g} %)",
                          with_engine)
            else:
                rec.statements.append(message)

    @staticmethod
    def _film_celsius(rec, typed_roles, t1, t2, gas) -> tuple[float, bool]:
        """The film temperature in degC, and whether the sheet's temperatures were read as
        kelvin: both above :data:`~.hand_forms.CELSIUS_CEILING` and the typed properties
        nearer the gas's at the kelvin reading (a sheet kept in kelvin throughout)."""
        from stillair import gas_properties

        film = (t1 + t2) / 2
        if min(t1, t2) < CELSIUS_CEILING:
            return film, False

        def misfit(t):
            try:
                props = gas_properties(gas, t)
            except Exception:
                return math.inf
            return sum(abs(math.log(abs(rec.values[r] / getattr(props, _PROPERTY_OF_ROLE[r]))))
                       for r in typed_roles)

        kelvin = film - 273.15
        return (kelvin, True) if misfit(kelvin) < misfit(film) else (film, False)

    @staticmethod
    def _order_symmetric(rec, props) -> None:
        """nu and alpha enter g beta dT L^3/(nu alpha) alike, so the match cannot tell which
        typed cell is which: take the assignment closer to the gas's own values."""
        if not {"kinvisc", "diffusivity"} <= set(rec.roles) or "pr" in rec.roles:
            return
        a, b = rec.values["kinvisc"], rec.values["diffusivity"]
        as_is = abs(math.log(a / props.kinvisc)) + abs(math.log(b / props.diffusivity))
        swapped = abs(math.log(b / props.kinvisc)) + abs(math.log(a / props.diffusivity))
        if swapped < as_is:
            rec.values["kinvisc"], rec.values["diffusivity"] = b, a
            rec.roles["kinvisc"], rec.roles["diffusivity"] = \
                rec.roles["diffusivity"], rec.roles["kinvisc"]

    def _reads(self, key) -> set:
        """Every cell a formula reads, constants included, through the formulas it reads."""
        seen, todo = set(), [key]
        while todo:
            current = todo.pop()
            if current in seen:
                continue
            seen.add(current)
            if current in self.model.nodes:
                formula = self.formula(current)
                if not formula.problem:
                    todo.extend(formula.precedents)
        return seen

    def _ra_of_h(self, rec):
        nusselt = self.recognised.get(rec.roles.get("nusselt"))
        if nusselt is None:
            return None
        return self.recognised.get(nusselt.roles.get("ra")), nusselt

    def _length(self, rec) -> None:
        found = self._ra_of_h(rec)
        if found is None or found[0] is None or "length" not in found[0].values:
            return
        ra, nusselt = found
        here, there = rec.values["length"], ra.values["length"]
        if abs(here - there) > 1e-9 * max(abs(here), abs(there)):
            engine = rec.values["nusselt"] * rec.values["conductivity"] / there
            self._add(rec, "length", f"h = Nu k/L divides by L = {here:.6g} m "
                      f"({self.name(rec.roles['length'])}) but the Rayleigh number "
                      f"{ra.cell} is built on L = {there:.6g} m "
                      f"({self.name(ra.roles['length'])}): the same length is due in both",
                      engine)

    def _difference(self, rec) -> None:
        """A convective heat flow h A (T1 - T2) must take the temperature difference its
        coefficient's Rayleigh number was built on."""
        h = self.recognised.get(rec.roles.get("h"))
        if h is None or h.form.name != "h-from-nusselt":
            return
        found = self._ra_of_h(h)
        if found is None or found[0] is None:
            return
        group, here = self._film(found[0]), self._film(rec)
        if group is None or here is None:
            return
        if sorted(group[:2]) != sorted(here[:2]):
            engine = rec.value / (here[0] - here[1]) * abs(group[0] - group[1]) * \
                (1 if here[0] >= here[1] else -1)
            self._add(rec, "difference", f"the heat flow takes the difference {here[0]:.6g} - "
                      f"{here[1]:.6g} degC, but its coefficient comes from the Rayleigh number "
                      f"{found[0].cell}, built on {group[0]:.6g} - {group[1]:.6g} degC", engine)

    def _area(self, rec) -> None:
        """The area of a heat flow h A dT must be built from the geometry's length: the plate's
        height, the cylinder's diameter, the layer's or channel's height."""
        h = self.recognised.get(rec.roles.get("h"))
        if h is None or h.form.name != "h-from-nusselt":
            return
        found = self._ra_of_h(h)
        if found is None or found[0] is None or "length" not in found[0].roles:
            return
        ra, nusselt = found
        geometry = nusselt.form.geometry
        lengths = set()
        if geometry in ("vplate", "hcyl", "sphere", "vcyl"):
            lengths.add(ra.roles["length"])
        for role in ("aspect", "slenderness"):
            if role in nusselt.roles:
                ratio = self.formula(nusselt.roles[role]) \
                    if nusselt.roles[role] in self.model.nodes else None
                if ratio is not None and not ratio.problem:
                    lengths |= set(ratio.precedents) - {ra.roles["length"]}
        area_key = rec.roles["area"]
        if not lengths or area_key not in self.model.nodes:
            return   # a typed area, or a geometry without a defining length: not checked
        upstream = self._reads(area_key)
        wanted = {self.value(k) for k in lengths} - {None}
        read = {self.value(k) for k in upstream} - {None}
        if lengths & upstream or wanted & read:
            return
        names = ", ".join(f"{self.name(k)} = {self.value(k):.6g} m" for k in sorted(lengths))
        self._add(rec, "area", f"the area {self.name(area_key)} = {rec.values['area']:.6g} m2 "
                  f"is not built from the length that defines the geometry in "
                  f"{ra.cell} ({names}): the group and the heat flow describe different surfaces")


def _moved(first_key, key, first_input):
    """Where ``first_input`` lands when the formula of ``first_key`` is copied to ``key``
    (a relative reference on the same sheet), or ``first_input`` itself."""
    from ..workbook.reader import index_to_col, split_ref

    if not (first_input[0] == first_key[0] == key[0]):
        return first_input
    (r0, c0), (r1, c1), (ri, ci) = split_ref(first_key[1]), split_ref(key[1]), \
        split_ref(first_input[1])
    row, col = ri + r1 - r0, ci + c1 - c0
    return (first_input[0], f"{index_to_col(col)}{row}") if row >= 1 and col >= 1 else first_input


def _allowed(delta: float, value: float) -> float:
    """The change a sweep may make to a cell for the iteration to count as settled: the
    workbook's delta, relative for values above 1 (a Rayleigh number of 1e10 moves by more
    than 0.001 in its last digits long after the temperatures have settled)."""
    return delta * max(1.0, abs(value))


def _same_kind(a: Form, b: Form) -> bool:
    return a.name.replace("-celsius", "-ideal") == b.name.replace("-celsius", "-ideal") or (
        a.name == b.name)


def _rel(value, reference) -> float | None:
    if value is None or reference is None or reference == 0:
        return None
    return (value - reference) / abs(reference)


def _temperature_where(gas: str, attribute: str, typed: float, near: float) -> float | None:
    """The temperature (degC) where the gas's property equals ``typed``, the root nearest
    ``near`` on a 0.5 K grid from -50 to 400 degC, linearly interpolated; None if none."""
    from stillair import gas_properties

    grid = np.arange(-50.0, 400.01, 0.5)
    try:
        values = np.asarray(getattr(gas_properties(gas, grid), attribute), dtype=float) - typed
    except Exception:
        return None
    crossings = np.nonzero(np.sign(values[:-1]) * np.sign(values[1:]) <= 0)[0]
    if not len(crossings):
        return None
    roots = [grid[i] + (grid[i + 1] - grid[i]) * values[i] / (values[i] - values[i + 1])
             if values[i] != values[i + 1] else grid[i] for i in crossings]
    return float(min(roots, key=lambda t: abs(t - near)))


class _Values(dict):
    """Input values for a formula evaluated alone during the iteration: the iterated cells'
    current values, else the checker's values, else the typed constants."""

    def __init__(self, checker, current):
        super().__init__()
        self.checker, self.current = checker, current

    def __missing__(self, key):
        if key in self.current:
            return self.current[key]
        value = self.checker.value(key)
        return 0.0 if value is None else value


# ---------------------------------------------------------------------------------------------
# Public entry and output


def check_hand_book(path: str, book=None, exclude=(), model=None, known=None) -> HandCheck:
    """Recognise and check the hand-typed formulas of the workbook at ``path``.

    ``book``: the workbook already read (:func:`stillair.addin.workbook.reader.read_book`);
    ``exclude``: (sheet, ref) cells not to look at (the audit's cells that call our functions,
    which it checks itself); ``model``: the book's model where the caller has built one;
    ``known``: (sheet, ref) -> value of cells the caller has calculated already."""
    checker = _Checker(path, book, exclude, model, known)
    checker.iterate()
    started = time.perf_counter()
    with _offline():
        checker.recognise_all()
        checker.settle()
        checker.check_all()
    checker.timing["recognise"] = time.perf_counter() - started
    order = {s.name: i for i, s in enumerate(checker.book.sheets)}

    def position(key):
        return order.get(key[0], 0), *checker._rc(key[1])

    recognised = [checker.recognised[k] for k in sorted(checker.recognised, key=position)]
    findings = sorted(checker.findings, key=lambda f: f.kind not in ("not-converged", "circular"))
    by_label = {checker.name(k): position(k) for k in checker.model.nodes if k[0] != "#name"}
    checker.unrecognised.sort(key=lambda cell: by_label.get(cell, (0, 0, 0)))
    return HandCheck(path, recognised, findings,
                     sum(len(s.formulas) for s in checker.book.sheets), checker.unrecognised,
                     checker.too_large, checker.iteration,
                     time.perf_counter() - checker.started, checker.timing,
                     unsearched=checker.unsearched, not_numeric=checker.not_numeric)


def hand_findings(result: HandCheck, cells) -> list:
    """The hand check's findings as the audit's :class:`~.findings.Finding` (kind
    "hand-formula", or "iteration" for the iteration's), with the value the file stores (or,
    in a file that stores none, the value recomputed from its inputs)."""
    from ..workbook.reader import split_ref
    from .findings import Finding

    out = []
    for finding in result.findings:
        sheet, _, ref = finding.cell.rpartition("!")
        sheet = sheet[1:-1].replace("''", "'") if sheet.startswith("'") else sheet
        record = cells.get((sheet, ref)) if sheet else None
        iteration = finding.kind in ("not-converged", "circular")
        text = finding.message if iteration else (
            f"{finding.kind}: recognised as {finding.recognised}; "
            + (f"engine {finding.engine:.6g}" + (f" ({finding.difference * 100:+.2f} %)"
                                                 if finding.difference is not None else "")
               + "; " if finding.engine is not None else "") + finding.message)
        split_ref(ref)   # a finding always names one cell
        out.append(Finding(
            "iteration" if iteration else "hand-formula", finding.cell, text,
            formula=record.formula if record else None,
            cached=record.cached if record is not None and record.has_cached else finding.value,
            computed=finding.engine,
            rel_diff=abs(finding.difference) if finding.difference is not None else None,
            recognised=None if iteration else finding.recognised, check=finding.kind,
            sheet=sheet, ref=ref))
    return out


def _offline():
    from ..workbook.safezip import offline
    return offline()


def hand_json(result: HandCheck) -> dict:
    return {
        "book": result.path,
        "summary": result.summary(),
        "recognised": [{"cell": r.cell, "as": r.title, "quantity": r.form.quantity,
                        "inputs": {role: r.values[role] for role in r.form.roles},
                        "input_cells": {role: _label(k) for role, k in r.roles.items()},
                        "value": r.value, "agrees": not r.findings,
                        "statements": r.statements} for r in result.recognised],
        "findings": [dataclasses.asdict(f) for f in result.findings],
        "unrecognised": result.unrecognised,
        "too_large": result.too_large,
        "unsearched": result.unsearched,
        "not_numeric": result.not_numeric,
        "iteration": result.iteration,
        "timing": dict(result.timing, total=result.seconds),
    }


def _label(key) -> str:
    from ..workbook.status import label
    return label(*key)
