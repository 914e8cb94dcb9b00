"""The workbook's own data-validation rules applied to ``--set`` values.

A value typed into a cell in Excel or LibreOffice is checked against the cell's data-validation
rule, and refused with the rule's own message; ``--set`` does the same.  Every rule type is
turned into one formula that is TRUE for an allowed value (a custom rule is that formula
already) and evaluated headlessly, with the ``--set`` values in place, over the workbook's
calculated values.  Clearing a cell is never checked, as the Delete key is not in either
program.
"""

from __future__ import annotations

from .formulas_bridge import compile_formula, plain, to_formulas
from .formulatext import parse_reference
from .reader import BookError, Validation, index_to_col, split_ref
from .rewrite import prepare
from .status import label

__all__ = ["rule_formula", "check_sets"]

_COMPARE = {"between": "AND({x}>={a},{x}<={b})", "notBetween": "OR({x}<{a},{x}>{b})",
            "equal": "{x}={a}", "notEqual": "{x}<>{a}", "greaterThan": "{x}>{a}",
            "lessThan": "{x}<{a}", "greaterThanOrEqual": "{x}>={a}",
            "lessThanOrEqual": "{x}<={a}"}


def _shifted(formula: str, origin: str, target: str) -> str:
    """A rule's formula, written for the top-left cell of its range, as it reads at ``target``."""
    from openpyxl.formula.translate import Translator
    if origin == target:
        return formula
    return Translator("=" + formula, origin=origin).translate_formula(target)[1:]


def rule_formula(rule: Validation, ref: str) -> str | None:
    """The formula that is TRUE when the value in ``ref`` passes the rule (None: any value)."""
    origin = rule.areas[0].partition(":")[0].replace("$", "") if rule.areas else ref
    f1 = _shifted(rule.formula1, origin, ref) if rule.formula1 else None
    f2 = _shifted(rule.formula2, origin, ref) if rule.formula2 else None
    if rule.type == "custom":
        return f1
    if rule.type in ("decimal", "whole", "date", "time", "textLength") and f1 is not None:
        x = f"LEN({ref})" if rule.type == "textLength" else ref
        test = _COMPARE.get(rule.operator, _COMPARE["between"]).format(x=x, a=f1, b=f2 or f1)
        if rule.type == "textLength":
            return test
        whole = f",{ref}=INT({ref})" if rule.type == "whole" else ""
        return f"AND(ISNUMBER({ref}){whole},{test})"
    return None


def _list_items(model, evaluation, sets, rule: Validation, sheet: str, ref: str):
    """The allowed values of a list rule: its literal items, or the cells of its range."""
    text = (rule.formula1 or "").strip()
    if text.startswith('"') and text.endswith('"'):
        return [item.strip() for item in text[1:-1].replace('""', '"').split(",")]
    reference = parse_reference(text.lstrip("="))
    if reference.kind != "area" or reference.cells > 100_000:
        return None
    source = model.sheet_case.get((reference.sheet or sheet).upper())
    if source is None:
        return None
    return [_plain_cell(model, evaluation, sets, source, f"{index_to_col(c)}{r}")
            for r in range(reference.r1, reference.r2 + 1)
            for c in range(reference.c1, reference.c2 + 1)]


def _plain_cell(model, evaluation, sets, sheet: str, ref: str):
    if (sheet, ref) in sets:
        return sets[(sheet, ref)]
    computed = evaluation.values.get(sheet, {})
    if ref in computed:
        return computed[ref]
    return model.sheets[sheet].values.get(ref)


def _compiled(model, sheet: str, ref: str, formula: str):
    """The rule's formula at ``ref`` compiled (the function and its inputs' references), or
    None where it cannot be; made once per model and kept on it (``Model._compiled_rules``):
    ``--cases`` checks the same rules on every row (compiling them took a tenth of a row's time)."""
    cache = model._compiled_rules
    key = (sheet, ref, formula)
    if key not in cache:
        row, col = split_ref(ref)
        prepared = prepare(formula, row, col, model.used, sheet)
        compiled = None
        if not prepared.problem:
            try:
                compiled = compile_formula(prepared.text)
            except Exception:
                pass
        cache[key] = compiled
    return cache[key]


def _evaluate(model, evaluation, sets, sheet: str, ref: str, formula: str):
    """The rule's formula at ``ref`` over the calculated workbook: True, False, or None when
    it cannot be evaluated headlessly."""
    import numpy as np

    compiled = _compiled(model, sheet, ref, formula)
    if compiled is None:
        return None
    function, inputs = compiled
    args = []
    for key in inputs:
        reference = parse_reference(key)
        if reference.kind == "name":
            target = model._resolve_name(reference, sheet)
            node = model.nodes.get(target) if target is not None else None
            if node is None or not node.prepared.references or \
                    node.prepared.references[0].kind != "area":
                return None
            reference, where = node.prepared.references[0], node.sources[0]
        elif reference.kind == "area":
            where = model.sheet_case.get((reference.sheet or sheet).upper())
        else:
            return None
        if where is None or reference.cells > 100_000:
            return None
        array = np.empty((reference.r2 - reference.r1 + 1, reference.c2 - reference.c1 + 1),
                         dtype=object)
        for r in range(reference.r1, reference.r2 + 1):
            for c in range(reference.c1, reference.c2 + 1):
                array[r - reference.r1, c - reference.c1] = to_formulas(
                    _plain_cell(model, evaluation, sets, where, f"{index_to_col(c)}{r}"))
        args.append(array)
    try:
        value = plain(function(*args))
    except Exception:
        return None
    return value is True or (isinstance(value, float) and value != 0.0)


def check_sets(model, evaluation, sets: dict, shown: dict, command: str = "--set ") -> list[str]:
    """Apply each set cell's data-validation rule; raise BookError with the rule's message for
    a refused value (``command`` starts it: what set the value).  Returns the rules that could
    not be checked headlessly (in words)."""
    unchecked = []
    for (sheet, ref), value in sets.items():
        if value is None:
            continue            # clearing a cell is never refused (nor in the spreadsheet)
        rule = model.sheets[sheet].validation_of(ref)
        if rule is None or rule.type == "any":
            continue
        typed = shown.get((sheet, ref), f"{label(sheet, ref)}")
        blank_text = isinstance(value, str) and value == ""
        if blank_text and rule.allow_blank:
            continue
        allowed: bool | None
        if rule.type == "list":
            items = _list_items(model, evaluation, sets, rule, sheet, ref)
            if items is None:
                unchecked.append(f"{typed}: the list rule of {label(sheet, ref)} "
                                 f"({rule.formula1}) could not be checked headlessly")
                continue
            allowed = any(_same_item(value, item) for item in items)
        else:
            formula = rule_formula(rule, ref)
            allowed = None if formula is None else _evaluate(model, evaluation, sets, sheet, ref,
                                                             formula)
            if allowed is None:
                unchecked.append(f"{typed}: the {rule.type} rule of {label(sheet, ref)} "
                                 f"({rule.formula1}) could not be checked headlessly")
                continue
        if not allowed:
            message = rule.error or f"the cell's data-validation rule ({rule.type} " \
                f"{rule.operator} {rule.formula1}{', ' + rule.formula2 if rule.formula2 else ''})" \
                " refuses it"
            raise BookError(f"{command}{typed}: {label(sheet, ref)} refuses {_show(value)}: {message}")
    return unchecked


def _same_item(value, item) -> bool:
    if isinstance(value, float) and not isinstance(item, bool):
        try:
            return float(item) == value
        except (TypeError, ValueError):
            return False
    return str(value).casefold() == str(item if item is not None else "").casefold()


def _show(value) -> str:
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        return f"{value:g}"
    return repr(value)
