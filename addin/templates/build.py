"""Building a template: write the workbook, evaluate it headlessly, store the cached values,
and refuse a workbook that does not calculate cleanly."""

from __future__ import annotations

import os
import re
import tempfile
from pathlib import Path

from .book import TemplateBook
from .spec import Template, TemplateBuildError

__all__ = ["build_template", "is_error_value"]


def build_template(template: Template, out_path: str | os.PathLike | None = None) -> Path:
    """Write ``template`` to ``out_path`` (default: templates/NAME.xlsx) with cached values.

    The workbook is written to a temporary file, evaluated headlessly, and the copy with cached
    values is moved into place.  Any error value or failed evaluation aborts the build: a template
    that does not calculate cleanly is never written.
    """
    from ..workbook.cachewriter import write_cached_values
    from ..workbook.model import evaluate_book

    out = Path(out_path) if out_path is not None else template.path
    out.parent.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory(prefix="stillair-template-") as directory:
        raw = os.path.join(directory, f"{template.name}.raw.xlsx")
        book = TemplateBook(template, raw)
        template.build(book)
        book.close()
        evaluation = evaluate_book(raw)
        if book.uses_sig3:
            # the same cells again, three-significant-figure cells now with their decimals
            book = TemplateBook(template, raw, values=evaluation.values)
            template.build(book)
            book.close()
        errors = [(cell, result.value if result.status == "error" else result.messages[0])
                  for cell, result in evaluation.failed]
        if errors:
            shown = ", ".join(f"{cell} = {value}" for cell, value in errors[:8])
            raise TemplateBuildError(f"{template.name}: {len(errors)} cells evaluate to errors: {shown}")
        staged = os.path.join(directory, f"{template.name}.xlsx")
        write_cached_values(evaluation.book, staged, evaluation.values)
        os.replace(staged, out) if _same_device(staged, out) else _copy(staged, out)
    return out


def is_error_value(value) -> bool:
    """An Excel error (#VALUE!, ...) or one of our cell functions' error messages
    ("NET_TEMP: node must be ..."), which arrive as text."""
    from ..cells.registry import BY_NAME

    if not isinstance(value, str):
        return False
    if value.startswith("#"):
        return True
    match = _CELL_ERROR_RE.match(value)
    return match is not None and match.group(1) in BY_NAME


_CELL_ERROR_RE = re.compile(r"^([A-Z][A-Z0-9_]*): ")


def _same_device(a: str, b: Path) -> bool:
    try:
        return os.stat(a).st_dev == os.stat(b.parent).st_dev
    except OSError:
        return False


def _copy(source: str, target: Path) -> None:
    import shutil

    shutil.copyfile(source, target)
