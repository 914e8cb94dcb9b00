"""The layout of addin/: rooms (sub-packages) that import one another in one direction only."""

from __future__ import annotations

import ast
from graphlib import CycleError, TopologicalSorter
from pathlib import Path

ADDIN = Path(__file__).resolve().parent.parent / "addin"


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ADDIN).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(["stillair", "addin", *parts])


def _imports() -> dict[str, set[str]]:
    """Every addin module -> the addin modules it imports (at the top or inside a function)."""
    modules = {_module_name(p): p for p in ADDIN.rglob("*.py")}
    graph: dict[str, set[str]] = {}
    for name, path in modules.items():
        package = name if path.name == "__init__.py" else name.rpartition(".")[0]
        found = set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom):
                base = package.split(".")
                base = base[:len(base) - node.level + 1] if node.level else []
                target = ".".join(base + ([node.module] if node.module else [])) if node.level \
                    else node.module or ""
                for alias in node.names:        # "from . import x" may name a module
                    candidate = f"{target}.{alias.name}"
                    found.add(candidate if candidate in modules else target)
            elif isinstance(node, ast.Import):
                found.update(alias.name for alias in node.names)
        graph[name] = {m for m in found if m in modules and m != name}
    return graph


def _room(module: str) -> str:
    parts = module.split(".")
    return parts[2] if len(parts) > 3 else parts[-1]


def test_addin_modules_import_each_other_without_a_cycle():
    try:
        order = list(TopologicalSorter(_imports()).static_order())
    except CycleError as error:
        raise AssertionError(f"import cycle: {' -> '.join(error.args[1])}") from None
    assert "stillair.addin.cli" in order


def test_rooms_import_in_one_direction():
    """cells <- excel, libreoffice, workbook; workbook <- audit, templates; cli on top."""
    rooms: dict[str, set[str]] = {}
    for module, imported in _imports().items():
        rooms.setdefault(_room(module), set()).update(_room(m) for m in imported)
    for room in rooms:
        rooms[room].discard(room)
    try:
        list(TopologicalSorter(rooms).static_order())
    except CycleError as error:
        raise AssertionError(f"rooms import each other: {' -> '.join(error.args[1])}") from None
    assert rooms["cells"] == set()                                  # the cell layer stands alone
    assert "cli" not in set().union(*(rooms[r] for r in rooms if r != "cli"))
