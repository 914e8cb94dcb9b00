"""The function reference, generated from the registry (``stillair functions [--markdown]``)."""

from __future__ import annotations

from .registry import CATEGORIES, REGISTRY

__all__ = ["reference_text", "reference_markdown", "correlations_markdown"]

_RESULT = {"text": "text", "table": "table (spills)"}


def _returns(entry) -> str:
    if entry.result == "number":
        return entry.unit or "-"
    return _RESULT[entry.result]


def _arg_line(arg) -> str:
    unit = f" [{arg.unit}]" if arg.unit else ""
    default = ""
    if arg.optional:
        default = " (optional, blank: " + ("none" if arg.default is None else
                                         f"{arg.default:g}" if isinstance(arg.default, float)
                                         else f'"{arg.default}"') + ")"
    return f"{arg.name}{unit}{default}: {arg.doc}"


def reference_text() -> str:
    lines = []
    for category in CATEGORIES.values():
        lines.append(category)
        lines.append("=" * len(category))
        for entry in (e for e in REGISTRY if e.category == category):
            lines.append(f"{entry.signature()} -> {_returns(entry)}")
            lines.append(f"    {entry.description}")
            for arg in entry.args:
                lines.append(f"    - {_arg_line(arg)}")
        lines.append("")
    from .network import kinds_text
    return "\n".join(lines).rstrip() + "\n\n" + kinds_text()


def _cell(text: str) -> str:
    return text.replace("|", "\\|")


def reference_markdown() -> str:
    lines = []
    for category in CATEGORIES.values():
        lines.append(f"### {category[0].upper()}{category[1:]}")
        lines.append("")
        lines.append("| Function | Returns | Description |")
        lines.append("|---|---|---|")
        for entry in (e for e in REGISTRY if e.category == category):
            lines.append(f"| `{entry.signature()}` | {_cell(_returns(entry))} | "
                         f"{_cell(entry.description)} |")
        lines.append("")
    lines.append("Arguments in [brackets] are optional; a blank cell takes the default. "
                 "`stillair functions` lists every argument with its unit and default.")
    lines.append("")
    from .network import kinds_markdown
    return "\n".join(lines) + "\n" + correlations_markdown() + "\n" + kinds_markdown()


def correlations_markdown() -> str:
    """Every registered correlation with its source, equation and validity, per geometry,
    with the geometry's "auto" rule; generated from the engine's registry."""
    from stillair.correlations import CORRELATIONS, GEOMETRIES

    lines = ["### Correlations (method names for the `method` arguments)", ""]
    for geometry in GEOMETRIES.values():
        lines.append(f"**{geometry.name}** — {_cell(' '.join(geometry.description.split()))}")
        lines.append("")
        lines.append("| method | source | equation | validity |")
        lines.append("|---|---|---|---|")
        for (name, method), corr in CORRELATIONS.items():
            if name != geometry.name:
                continue
            validity = corr.describe_validity()
            if corr.cases:
                validity = f"cases {', '.join(corr.cases)}; {validity}"
            lines.append(f"| `{method}` | {_cell(corr.source)} | {_cell(corr.equation)} | {_cell(validity)} |")
        lines.append("")
    return "\n".join(lines)
