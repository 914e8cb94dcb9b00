"""Shared helpers for the template tests: evaluate a committed template, with --set changes."""

from __future__ import annotations

import functools

from stillair.addin.workbook.model import evaluate_book
from stillair.addin.templates import template_by_name


@functools.lru_cache(maxsize=None)
def _evaluate(name: str, sets: tuple[tuple[str, object], ...]):
    # The template tests drive a sheet where no typed value may go (a formula's result, a value
    # the input rule refuses, as pasting does in the spreadsheet): neither is refused here.
    return evaluate_book(str(template_by_name(name).path), {k: str(v) for k, v in sets},
                         replace_formulas=True, validate=False)


def evaluate_template(name: str, **sets):
    """Headless evaluation of templates/NAME.xlsx with inputs changed by defined name."""
    return _evaluate(name, tuple(sorted(sets.items())))


def input_names(template) -> set[str]:
    """The defined names of a template's input cells (those on its Inputs sheet; the count of
    blank inputs under them is not an input)."""
    import openpyxl

    from stillair.addin.templates.spec import MISSING_NAME

    workbook = openpyxl.load_workbook(template.path)
    return {name for name, definition in workbook.defined_names.items()
            if any(sheet == "Inputs" for sheet, _ in definition.destinations)
            and name != MISSING_NAME}


def named(evaluation, name: str):
    """The value of a workbook-scoped defined name after evaluation."""
    return evaluation.names[name]


def assert_direction(name: str, input_name: str, new_value, result_name: str, direction: int) -> None:
    """--set of one input moves a result the physically expected way (+1 up, -1 down, 0 unchanged)."""
    base = named(evaluate_template(name), result_name)
    changed = named(evaluate_template(name, **{input_name: new_value}), result_name)
    if direction > 0:
        assert changed > base, f"{input_name}={new_value}: {result_name} {base} -> {changed}, expected a rise"
    elif direction < 0:
        assert changed < base, f"{input_name}={new_value}: {result_name} {base} -> {changed}, expected a fall"
    else:
        assert changed == base, f"{input_name}={new_value}: {result_name} {base} -> {changed}, expected no change"
