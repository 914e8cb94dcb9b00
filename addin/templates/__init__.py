"""The shipped calculation templates, and listing, copying and rebuilding them.

Each module here defines ``TEMPLATE`` (an :class:`stillair.addin.templatebook.Template`) whose ``build``
function describes the workbook.  ``python -m stillair.addin.templates`` rebuilds every committed file in
templates/ from this code; a test rebuilds them and compares formulas and values, so the files
and the code cannot drift apart.
"""

from __future__ import annotations

import shutil
from importlib import import_module
from pathlib import Path

from ..templatebook import TEMPLATE_DIR, Template, build_template

__all__ = ["MODULES", "all_templates", "template_by_name", "copy_templates", "rebuild_all"]

# The order templates are listed in; one module per template.
MODULES = ("sealed_cabinet", "glazing_unit", "air_layer", "solar_collector", "hot_surface", "partition_cavity",
           "finned_heatsink")


def all_templates() -> tuple[Template, ...]:
    return tuple(import_module(f"{__name__}.{module}").TEMPLATE for module in MODULES)


def template_by_name(name: str) -> Template:
    for template in all_templates():
        if template.name == name:
            return template
    raise KeyError(name)


def copy_templates(directory: str | Path) -> list[tuple[Path, str]]:
    """Copy every template into ``directory``; a file already there is never overwritten.

    Returns (target, outcome) pairs, outcome "copied" or "kept existing file".
    """
    target_dir = Path(directory)
    target_dir.mkdir(parents=True, exist_ok=True)
    outcomes = []
    for template in all_templates():
        target = target_dir / template.path.name
        if target.exists():
            outcomes.append((target, "kept existing file"))
            continue
        shutil.copyfile(template.path, target)
        outcomes.append((target, "copied"))
    return outcomes


def rebuild_all(directory: str | Path | None = None) -> list[Path]:
    """Rebuild every template (into templates/ by default)."""
    out_dir = Path(directory) if directory is not None else TEMPLATE_DIR
    return [build_template(t, out_dir / t.path.name) for t in all_templates()]
