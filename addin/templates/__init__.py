"""The shipped calculation templates, and listing, copying and rebuilding them.

Each module here defines ``TEMPLATE`` (an :class:`stillair.addin.templates.spec.Template`) whose ``build``
function describes the workbook.  ``python -m stillair.addin.templates`` rebuilds every committed file in
templates/ from this code; a test rebuilds them and compares formulas and values, so the files
and the code cannot drift apart.
"""

from __future__ import annotations

import shutil
from importlib import import_module
from pathlib import Path

from .spec import Template

__all__ = ["MODULES", "all_templates", "template_by_name", "copy_templates"]

# The order templates are listed in; one module per template.
MODULES = ("sealed_cabinet", "glazing_unit", "air_layer", "solar_collector", "hot_surface", "partition_cavity",
           "finned_heatsink", "vented_cabinet", "own_network", "cabinet_day")


def all_templates() -> tuple[Template, ...]:
    return tuple(import_module(f"{__name__}.{module}").TEMPLATE for module in MODULES)


def template_by_name(name: str) -> Template:
    for template in all_templates():
        if template.name == name:
            return template
    raise KeyError(name)


def copy_templates(directory: str | Path) -> list[tuple[Path, str]]:
    """Copy every template into ``directory`` (which must exist); a file already there is never
    overwritten: each copy creates its file exclusively, so a file appearing meanwhile is kept.

    Returns (target, outcome) pairs, outcome "copied", "kept existing file" or
    "cannot write (reason)".
    """
    outcomes = []
    for template in all_templates():
        target = Path(directory) / template.path.name
        try:
            with open(template.path, "rb") as source, open(target, "xb") as copy:
                shutil.copyfileobj(source, copy)
        except FileExistsError:
            outcomes.append((target, "kept existing file"))
        except OSError as error:
            outcomes.append((target, f"cannot write ({error.strerror or error})"))
        else:
            outcomes.append((target, "copied"))
    return outcomes
