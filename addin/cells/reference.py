"""The function reference, generated from the registry (``stillair functions [--markdown]``)."""

from __future__ import annotations

from .registry import CATEGORIES, REGISTRY

__all__ = ["reference_text", "reference_markdown", "correlations_markdown", "network_markdown",
           "network_text"]

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
    return _functions_text() + "\n" + network_text()


def _functions_text() -> str:
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
    return "\n".join(lines).rstrip() + "\n"


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
    return "\n".join(lines) + "\n" + network_markdown() + "\n" + correlations_markdown()


# ---------------------------------------------------------------------------------------------
# The network tables: every branch kind's columns, heat flow and meaning of `from` are data on
# the engine's kind objects (stillair.network.BRANCH_KINDS); nothing about a kind is retyped here.


def _kind_meaning(kind) -> str:
    return f"q = {kind.flow}; {kind.ends}"


def _kinds():
    from stillair.network import BRANCH_KINDS
    return BRANCH_KINDS


def _conventions() -> list[str]:
    from stillair.gases import GAS_NAMES, MIXTURE_SUM_TOLERANCE
    return [
        "Temperatures in °C; SI units otherwise (m, m², W, K/W, W/(m²·K), Pa).",
        "Plate tilt is measured from the vertical (0 vertical, 90 horizontal); cavity tilt from "
        "the horizontal (0 a horizontal layer heated from below, 90 vertical, 180 heated from "
        "above), as the literature has them.",
        "Gases: " + ", ".join(GAS_NAMES) + '; a mixture is written "argon:0.9, air:0.1" (mole '
        f"fractions summing to 1 within {MIXTURE_SUM_TOLERANCE:g}); names ignore case.",
        "`method` is blank (auto: the correlation whose validity range covers the case) or a "
        "correlation's method name, as for the NU_ functions' method argument; it applies to "
        "the convection kinds only.",
        "Columns a kind does not use stay blank. A header row is allowed, blank rows are "
        "skipped, and node names typed as numbers are names (1 and 1.0 are node \"1\").",
        "Heat flows are positive from `from` to `to`. Film-temperature properties are "
        "re-evaluated for every branch at every iteration.",
    ]


def _through_time() -> list[str]:
    """The extra tables of the network through time (NET_TRANSIENT, NET_PEAK)."""
    from stillair.network import CAPACITY_COLUMNS, SERIES_COLUMNS
    return [
        "Through time (NET_TRANSIENT, NET_PEAK): the capacities range, one row per node that stores "
        "heat: " + " | ".join(f"`{c}`" for c in CAPACITY_COLUMNS) + " (C in J/K); a solved node without a "
        "row is quasi-steady (balanced at every instant), a fixed node has none.",
        "The series range: " + " | ".join(f"`{c}`" for c in SERIES_COLUMNS) + " (time in s; value in °C "
        "for a T row, W for a Q row). A boundary row whose value is a series name follows the series: "
        "linear between its points, held at its first and last values outside them.",
        "The output times (s): a column, a row or a block read row by row, increasing; the solution "
        "starts at the first time, from the steady network there unless a start is given "
        '(one °C for every node with a capacity, rows node | °C, or "periodic").',
    ]


def network_markdown() -> str:
    """The network tables' reference as markdown (README and `stillair functions --markdown`)."""
    from stillair.network import BOUNDARY_COLUMNS, BRANCH_COLUMNS

    kinds = _kinds()
    lines = ["### Thermal network tables (NET_SOLVE, NET_TEMP, NET_HEAT, NET_CHECK)", "",
             "Branches range, one row per branch: " + " \\| ".join(f"`{c}`" for c in BRANCH_COLUMNS)
             + ".", "",
             "| kind | what it models | p1 | p2 | p3 | p4 | p5 |", "|---|---|---|---|---|---|---|"]
    for name, kind in kinds.items():
        cells = [_cell(p.describe()) for p in kind.params] + [""] * (5 - len(kind.params))
        lines.append(f"| `{name}` | {_cell(_kind_meaning(kind))} | " + " | ".join(cells) + " |")
    lines += ["", "Boundaries range, one row per condition: "
              + " \\| ".join(f"`{c}`" for c in BOUNDARY_COLUMNS) + ".", "",
              "| T or Q | value | meaning |", "|---|---|---|",
              "| `T` | °C | fixes the node's temperature |",
              "| `Q` | W | adds a heat input at a node whose temperature is solved (several Q rows "
              "at a node add up; a Q row on a fixed node is an error) |", "",
              "Every node that is not fixed is solved from its energy balance.", ""]
    for line in _through_time():
        lines += [_cell(line), ""]
    lines += ["Conventions:", ""]
    lines += [f"- {line}" for line in _conventions()]
    lines.append("")
    return "\n".join(lines)


def _plain(text: str) -> str:
    return text.replace("`", '"')


def network_text() -> str:
    """The same reference as plain text, for `stillair functions`."""
    from stillair.network import BOUNDARY_COLUMNS, BRANCH_COLUMNS

    title = "stillair thermal network tables"
    lines = [title, "=" * len(title),
             "Branches range, one row per branch: " + " | ".join(BRANCH_COLUMNS)]
    for name, kind in _kinds().items():
        lines.append(f"{name}: {_plain(_kind_meaning(kind))}")
        for number, param in enumerate(kind.params, start=1):
            lines.append(f"    - p{number}: {param.describe()}")
    lines += ["Boundaries range, one row per condition: " + " | ".join(BOUNDARY_COLUMNS),
              "    - T: value in °C fixes the node's temperature",
              "    - Q: value in W adds a heat input at a node whose temperature is solved "
              "(several Q rows at a node add up)",
              "Every node that is not fixed is solved from its energy balance."]
    lines += [_plain(line) for line in _through_time()]
    lines += ["Conventions:"]
    lines += [f"    - {_plain(line)}" for line in _conventions()]
    return "\n".join(lines) + "\n"


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
