"""Template: a thermal network of the user's own.

For a problem none of the other templates fits: the user types the branch and boundary tables
(the engine's columns) on the Network sheet, one row per branch, blank rows allowed.  Beside each
row the meaning and unit of p1..p5 for the kind typed is looked up in a small table of the
kinds, which the builder writes from the engine's ``BRANCH_KINDS`` (nothing about a kind is
retyped here).  The solution follows the tables row by row: every node's temperature with the
correlation spread, every branch's heat flow, h, R, correlation and note, and the energy balance
over the fixed-temperature nodes.

The worked example is a scenario of our own: an electronics box standing in a room, its circuit
board behind the front panel across a closed air layer.
"""

from __future__ import annotations

from xlsxwriter.utility import xl_rowcol_to_cell

from stillair.gases import GAS_NAMES
from stillair.network import BOUNDARY_COLUMNS, BRANCH_COLUMNS, BRANCH_KINDS

from ..cells.network import RESULT_HEADER
from .book import limit_check
from .pages import GRIDS, text_lines
from .spec import BOUNDARY_FORMATS, BRANCH_FORMATS, LIMIT_TEMPERATURE, SIG3, Template, altitude

NAME = "own-network"
SHEET = "Network"

# Rows of the tables: room for this many branches, boundary conditions and solved nodes.
BRANCH_ROWS = 40
BOUNDARY_ROWS = 20
NODE_ROWS = 50

# The worked example (a scenario of our own): a sealed box 0.30 m wide, 0.20 m deep, 0.25 m high
# of 1.5 mm painted sheet steel standing on a desk in an office.  A 20 W circuit board (0.24 m x
# 0.20 m) sits 12 mm behind the front panel: the closed air layer between them carries heat by
# convection and radiation; the board's back face warms the inside air, which gives heat to the
# sides, back and lid; the outer faces lose heat by convection to the room air and radiation to
# the room's walls; the base and cable glands are one estimated resistance to the room air.
STEEL_T, STEEL_K = 0.0015, 50.0            # m, W/(m·K): sheet steel (handbook order of magnitude)
EXAMPLE_BRANCHES = [
    ["layer_conv", "board", "panel_in", "cavity", 0.012, 0.20, 0.048, None, None, None],
    ["layer_rad", "board", "panel_in", "radiation", 0.9, 0.85, 0.048, None, None, None],
    ["board_back", "board", "air_in", "vplate", 0.20, 0.048, None, None, None, None],
    ["panel_wall", "panel_in", "panel_out", "conduction", STEEL_T, STEEL_K, 0.075, None, None, None],
    ["panel_conv", "panel_out", "room_air", "vplate", 0.25, 0.075, None, None, None, None],
    ["panel_rad", "panel_out", "room_walls", "radiation", 0.9, None, 0.075, None, None, None],
    ["case_conv_in", "case_in", "air_in", "vplate", 0.25, 0.175, None, None, None, None],
    ["case_wall", "case_in", "case_out", "conduction", STEEL_T, STEEL_K, 0.175, None, None, None],
    ["case_conv", "case_out", "room_air", "vplate", 0.25, 0.175, None, None, None, None],
    ["case_rad", "case_out", "room_walls", "radiation", 0.9, None, 0.175, None, None, None],
    ["lid_conv_in", "lid_in", "air_in", "hplate", 0.06, 0.06, "down", None, None, None],
    ["lid_wall", "lid_in", "lid_out", "conduction", STEEL_T, STEEL_K, 0.06, None, None, None],
    ["lid_conv", "lid_out", "room_air", "hplate", 0.06, 0.06, "up", None, None, None],
    ["lid_rad", "lid_out", "room_walls", "radiation", 0.9, None, 0.06, None, None, None],
    ["base", "air_in", "room_air", "resistance", 4.0, None, None, None, None, None],
]
EXAMPLE_BOUNDARIES = [
    ["board", "Q", 20.0],
    ["room_air", "T", 23.0],
    ["room_walls", "T", 21.0],
]


# Columns of NET_SOLVE's table (1-based, as INDEX reads them).
COLUMN = {title: k for k, title in enumerate(RESULT_HEADER, 1)}


def kind_columns(kind) -> str:
    """What p1..p5 hold for a kind, in order: each column's label and unit, from the engine."""
    return ", ".join(f"{param.label} {param.unit}".strip() for param in kind.params)


# What each branch column asks for, shown as the cell's input message (the kinds' own p1..p5
# meanings are in the column beside the row).
BRANCH_PROMPTS = (
    ("name", "A name of the branch, unique in the table; blank rows are skipped."),
    ("from", "The from node: for convection the solid surface, for a cavity the layer's underside."),
    ("to", "The to node: for convection the fluid, for a cavity the other face."),
    ("kind", "Choose a kind; the column on the right then says what p1..p5 hold."),
    ("p1", "See the column on the right: what p1..p5 hold for this row's kind."),
    ("p2", "See the column on the right: what p1..p5 hold for this row's kind."),
    ("p3", "See the column on the right: what p1..p5 hold for this row's kind."),
    ("p4", "See the column on the right: what p1..p5 hold for this row's kind."),
    ("p5", "See the column on the right: what p1..p5 hold for this row's kind."),
    ("method", "Blank: auto (the correlation whose range covers the case); or a correlation's method "
               "name (convection kinds only; stillair functions lists them)."),
)


def _prompt(title: str, text: str) -> dict:
    """A data-validation input message (the cell accepts anything unless the caller adds a rule)."""
    return {"validate": "any", "input_title": title, "input_message": text}


def branch_row_lines() -> int:
    """Lines a branch row is given: enough for the longest kind's p1..p5 text in the column beside
    the row (the kinds are the engine's, so a new kind with long labels makes the rows taller)."""
    width = GRIDS[SHEET][len(BRANCH_COLUMNS)]
    return max(text_lines(kind_columns(kind), width) for kind in BRANCH_KINDS.values())


def _ref(row: int, col: int) -> str:
    """A relative reference on the Network sheet ("D12"), as a row's formula reads its neighbours."""
    return xl_rowcol_to_cell(row, col)


def build(b) -> None:
    # ------------------------------------------------------------------ Inputs
    b.section("Inputs", "The network: its branch and boundary tables are typed on the Network sheet")
    b.input("net_gas", "Gas of the convection branches", "air", "",
            "a cavity row may name its own gas in p5", choices=list(GAS_NAMES))
    b.input("site_altitude", "Site altitude", 0.0, "m", "sets the gas pressure (standard atmosphere)",
            valid=altitude())
    b.input("max_node_t", "Allowed temperature of any solved node", 70.0, "°C",
            "e.g. the lowest rating among the parts", valid=LIMIT_TEMPERATURE)

    # ------------------------------------------------------------------ Network: the tables typed
    kinds = list(BRANCH_KINDS.values())
    b.section(SHEET, f"Branches: one row per branch, up to {BRANCH_ROWS} (from = surface, to = fluid for "
                     "convection; blank rows are skipped)")
    kind_list = [kind.name for kind in kinds]
    branch_first, branch_last = b.input_table(
        SHEET, list(BRANCH_COLUMNS), EXAMPLE_BRANCHES, BRANCH_ROWS, "own_branches",
        formats=BRANCH_FORMATS, lines=branch_row_lines(),
        validations={**{col: _prompt(title, text) for col, (title, text) in enumerate(BRANCH_PROMPTS)},
                     3: {**_prompt(*BRANCH_PROMPTS[3]), "validate": "list", "source": kind_list,
                         "error_title": "Not a branch kind",
                         "error_message": "kind: choose one of " + ", ".join(kind_list) + "."}})
    meaning_col = len(BRANCH_COLUMNS)
    state = b.sheet(SHEET)
    ws = state.worksheet
    ws.write(branch_first - 1, meaning_col, "p1..p5 of this kind", b.fmt("header"))

    b.section(SHEET, "Boundaries (T fixes a node's °C, Q adds W at a solved node)")
    bound_first, bound_last = b.input_table(
        SHEET, list(BOUNDARY_COLUMNS), EXAMPLE_BOUNDARIES, BOUNDARY_ROWS, "own_bounds",
        formats=BOUNDARY_FORMATS,
        validations={0: _prompt("node", "A node some branch joins, named as in the branch table."),
                     1: {**_prompt("T or Q", "T fixes the node's temperature (°C); Q adds a heat input (W) "
                                   "at a solved node."), "validate": "list", "source": ["T", "Q"],
                         "error_title": "Not T or Q", "error_message": "T or Q: choose T or Q."},
                     # a number; a fixed temperature above absolute zero
                     2: {**_prompt("value", "°C for a T row (above -273.15), W for a Q row (negative: heat "
                                   "taken out)."),
                         "validate": "custom", "value": "=AND(ISNUMBER({cell}),OR({left}<>\"T\",{cell}>-273.15))",
                         "error_title": "Not a usable value",
                         "error_message": "value: a number; for a T row a temperature above -273.15 °C."}})
    # the kinds: what p1..p5 hold (the text runs on over the empty columns to its right)
    b.section(SHEET, "Branch kinds and what p1..p5 hold (from the stillair engine; Notes lists them in full)")
    kind_first, _, kind_last, _ = b.table(SHEET, ["kind", "p1..p5"],
                                          [[kind.name, kind_columns(kind)] for kind in kinds])
    b.name_range("kind_names", SHEET, kind_first, 0, kind_last, 0)
    b.name_range("kind_params", SHEET, kind_first, 1, kind_last, 1)

    # what p1..p5 hold, beside each branch row, looked up from the kinds table (the kind's
    # position by SUMPRODUCT: the evaluator's MATCH on a column is unreliable)
    kind_numbers = "{" + ";".join(str(k) for k in range(1, len(kinds) + 1)) + "}"
    for row in range(branch_first, branch_last + 1):
        kind_cell = _ref(row, 3)
        kind_position = f"SUMPRODUCT((kind_names={kind_cell})*{kind_numbers})"
        ws.write_formula(row, meaning_col,
                         f'=IF({kind_cell}="", "", IF({kind_position}=0, "not a kind: choose from the list", '
                         f'INDEX(kind_params, {kind_position})))', b.fmt("note"))

    # ------------------------------------------------------------------ Calculation
    tables = "own_branches, own_bounds"
    fluid = "net_gas, gas_pressure"
    solve = f"NET_SOLVE({tables}, {fluid})"
    b.section("Calculation", "Gas and the size of the network")
    b.step("gas_pressure", "Gas pressure at the site", "=ALTITUDE_PRESSURE(site_altitude)", "Pa")
    names = f"{SHEET}!$A${branch_first + 1}:$A${branch_last + 1}"
    b.step("branch_count", "Branches typed (rows with a name)", f"=COUNTA({names})", number_format="0")
    # NET_SOLVE's rows: the header, a row per node, a row per branch (LibreOffice compares no
    # text of an add-in's array, so the nodes are counted from the rows)
    b.step("node_count", "Nodes in the solution (NET_SOLVE's rows less header and branches)",
           f"=ROWS({solve})-1-branch_count", number_format="0")

    # ------------------------------------------------------------------ Network: the solution
    b.section(SHEET, "Solution: branches (row by row as typed; heat flow positive from -> to)")
    q_first = state.row + 1
    rows = []
    for i, row in enumerate(range(branch_first, branch_last + 1)):
        name = f"{SHEET}!{_ref(row, 0)}"
        # the branch's row in NET_SOLVE's table: header, the nodes, then the branches in order
        # (a relative end, so every row's formula has one form, prepared once)
        at = f"1+node_count+COUNTA({SHEET}!$A${branch_first + 1}:{_ref(row, 0)})"

        def pick(col, empty=None, _name=name, _at=at):
            """Column ``col`` of the branch's row; ``empty`` is printed where the engine leaves
            the entry empty (h of a resistance, a note in range): LibreOffice recalculates a cell
            cached as empty text, and without the add-in would print an error."""
            value = f"INDEX({solve}, {_at}, {col})"
            shown = value if empty is None else f'IF({value}="", "{empty}", {value})'
            return f'=IF({_name}="", "", {shown})'

        # the name as NET_SOLVE's table has it at that row: a check that the rows line up
        rows.append([pick(COLUMN["item"]), pick(COLUMN["value"]), pick(COLUMN["h W/(m²·K)"], "-"),
                     pick(COLUMN["R K/W"]), pick(COLUMN["method"]), None, None, None, None, None,
                     pick(COLUMN["note"], "none")])
    b.table(SHEET, ["branch", "heat flow W", "h W/(m²·K)", "R K/W", "method", "", "", "", "", "", "note"],
            rows, formats=[None, "0.00", SIG3, SIG3, None, None, None, None, None, None, None])
    q_last = q_first + BRANCH_ROWS - 1

    b.section(SHEET, f"Solution: nodes (in order of first appearance; up to {NODE_ROWS} listed); heat taken: "
                     "the heat a fixed node takes from the network")
    node_rows = []
    heat_col = f"{SHEET}!$B${q_first + 1}:$B${q_last + 1}"
    from_col = f"{SHEET}!$B${branch_first + 1}:$B${branch_last + 1}"
    to_col = f"{SHEET}!$C${branch_first + 1}:$C${branch_last + 1}"
    node_first = state.row + 1
    # the node table's columns: the state (text) beside the name, the numbers after it
    at_col = {"node": 0, "state": 1, "t": 2, "low": 3, "high": 4, "heat": 5, "number": 6}
    for number, row in enumerate(range(node_first, node_first + NODE_ROWS), start=1):
        node, fixed_or_solved = (f"{SHEET}!{_ref(row, at_col[key])}" for key in ("node", "state"))
        # the node's number in the solution is a cell of the row, so every row's formulas have one
        # form (prepared once by the evaluator)
        j = f"{SHEET}!{_ref(row, at_col['number'])}"
        shown = f"{j}>node_count"
        at = f"1+MIN({j}, MAX(node_count, 1))"
        band = f"NET_BAND({tables}, INDEX({solve}, {at}, {COLUMN['item']}), {fluid})"
        node_rows.append([
            f'=IF({shown}, "", INDEX({solve}, {at}, {COLUMN["item"]}))',
            f'=IF({shown}, "", IF(SUMPRODUCT((own_bound_nodes={node})*(own_bound_kinds="T"))>0, "fixed", '
            f'"solved"))',
            f'=IF({shown}, "", INDEX({solve}, {at}, {COLUMN["value"]}))',
            f'=IF({shown}, "", INDEX({band}, 1, 1))',
            f'=IF({shown}, "", INDEX({band}, 1, 2))',
            # the heat a fixed node takes: its branches' flows in less those out
            f'=IF({shown}, "", IF({fixed_or_solved}="fixed", '
            f'SUMIF({to_col}, {node}, {heat_col})-SUMIF({from_col}, {node}, {heat_col}), ""))',
            number])
    b.name_range("own_bound_nodes", SHEET, bound_first, 0, bound_last, 0)
    b.name_range("own_bound_kinds", SHEET, bound_first, 1, bound_last, 1)
    b.name_range("own_bound_values", SHEET, bound_first, 2, bound_last, 2)
    b.table(SHEET, ["node", "fixed or solved", "T °C", "spread low °C", "spread high °C", "heat taken W", "#"],
            node_rows, formats=[None, None, "0.0", "0.0", "0.0", "0.00", "0"])
    node_last = node_first + NODE_ROWS - 1

    def node_column(key):
        letter = xl_rowcol_to_cell(0, at_col[key])[:-1]
        return f"{SHEET}!${letter}${node_first + 1}:${letter}${node_last + 1}"
    node_t, node_high, node_state, node_heat, node_names, node_numbers = (
        node_column(key) for key in ("t", "high", "state", "heat", "node", "number"))

    # ------------------------------------------------------------------ Calculation: key numbers
    b.section("Calculation", "Energy balance (heat inputs leave through the fixed-temperature nodes)")
    b.step("heat_inputs", "Heat inputs: the Q rows", '=SUMIF(own_bound_kinds, "Q", own_bound_values)', "W")
    b.step("heat_to_fixed", "Heat into the fixed-temperature nodes", f'=SUMIF({node_state}, "fixed", {node_heat})',
           "W", "branch flows into each fixed node less those out")
    b.step("balance", "Energy balance: inputs - heat into fixed nodes", "=heat_inputs-heat_to_fixed", "W",
           "should be ~0", number_format="0.0E+00")
    b.section("Calculation", "Hottest solved node")
    b.step("t_hottest", "Highest temperature of a solved node", f'=_xlfn.MAXIFS({node_t}, {node_state}, "solved")',
           "°C")
    b.step("hottest_node", "Which node (the first, if several are equally hot)",
           f'=INDEX({node_names}, _xlfn.MINIFS({node_numbers}, {node_state}, "solved", {node_t}, t_hottest))')
    b.step("t_hottest_high", "The same, convection at the highest covering Nu",
           f'=_xlfn.MAXIFS({node_high}, {node_state}, "solved")', "°C")

    # ------------------------------------------------------------------ Results
    b.section("Results", "Network")
    b.result("res_net_check", "Network check", f"=NET_CHECK({tables}, {fluid})", text=True)
    b.result("res_branches", "Branches", "=branch_count", number_format="0")
    b.result("res_nodes", "Nodes", "=node_count", number_format="0")
    b.result("res_listed", "All nodes listed on the Network sheet",
             f'=IF(ISNUMBER(node_count), IF(node_count<={NODE_ROWS}, "yes", "NOT ALL LISTED: more than '
             f'{NODE_ROWS} nodes; read the rest with NET_TEMP"), "CALC FAILED")', text=True,
             fails=("NOT ALL LISTED",))
    b.section("Results", "Temperatures")
    b.result("res_hottest_node", "Hottest solved node", "=hottest_node", text=True)
    b.result("res_t_hottest", "Its temperature", "=t_hottest", "°C")
    b.result("res_t_hottest_high", "Hottest, correlation spread: highest", "=t_hottest_high", "°C",
             "spread of the correlations (see Notes)")
    b.result("res_limit", "Highest temperature allowed", "=max_node_t", "°C")
    b.result("res_check", "Limit check", limit_check("t_hottest", "max_node_t"), text=True,
             fails=("EXCEEDS LIMIT",))
    b.result("res_check_high", "Limit check at the top of the spread", limit_check("t_hottest_high", "max_node_t"),
             text=True, fails=("EXCEEDS LIMIT",))
    b.section("Results", "Heat balance")
    b.result("res_heat_inputs", "Heat inputs (Q rows)", "=heat_inputs", "W")
    b.result("res_heat_to_fixed", "Heat into the fixed-temperature nodes", "=heat_to_fixed", "W")
    b.result("res_balance", "Energy balance residual", "=balance", "W", number_format="0.0E+00")
    b.caution("Results", "Caution: a network is only as good as its branches. Parts run hotter than the node "
                         "standing for them; check against the makers' ratings, applicable standards and "
                         "licensed practice (see Notes).")

    # ------------------------------------------------------------------ Notes
    b.section("Notes", "Method")
    b.paragraph("The Network sheet's tables are solved by NET_SOLVE: every node that is not fixed is solved "
                "from its energy balance by Newton iteration, each convection branch taking its gas "
                "properties at its own film temperature and its correlation at its own temperature "
                "difference (a horizontal face is hot or cold by the sign of that difference). The solution "
                "tables read NET_SOLVE, NET_HEAT and NET_BAND row by row; the network check (NET_CHECK) names "
                "every branch used outside its correlation's validity range, and any table problem with its "
                "row and column.")
    b.paragraph("Energy balance: at a solved node the branches and its heat input balance; the heat inputs "
                "therefore leave through the fixed-temperature nodes, and the Results sheet compares the two.")
    b.spread_note("every node")
    b.section("Notes", "Branch kinds (from the stillair engine; `stillair functions` prints the same)")
    for kind in kinds:
        columns = "; ".join(f"p{k} {param.describe()}" for k, param in enumerate(kind.params, 1))
        b.paragraph(f"{kind.name}: q = {kind.flow}; {kind.ends}. Columns: {columns}.")
    b.paragraph("Method column: blank for auto (the correlation whose validity range covers the case) or a "
                "correlation's method name; convection kinds only. Every correlation's source, equation and "
                "range is listed by `stillair functions` and in the README.")
    b.section("Notes", "Worked example (a scenario of our own; replace it with your network)")
    b.paragraph("A sealed box 0.30 m wide, 0.20 m deep and 0.25 m high of 1.5 mm painted sheet steel stands "
                "in an office (air 23 °C, walls 21 °C). A 20 W circuit board 0.24 m x 0.20 m sits 12 mm "
                "behind the front panel: the closed air layer between them carries heat by convection "
                "(cavity) and radiation; the board's back face warms the inside air, which gives its heat to "
                "the sides and back and to the underside of the lid; the outer faces lose heat by "
                "convection to the room air and radiation to the room's walls. The base and cable glands "
                "are one estimated resistance of 4 K/W. Sheet steel is taken at 50 W/(m·K) "
                "(unverified: handbook order of magnitude for carbon steel).")
    b.section("Notes", "Cautions")
    b.paragraph("Overheated equipment, touch temperatures, condensation: a node is the mean temperature of "
                "what it stands for; components, hot spots and corners can be much hotter or colder. Defer "
                "to the makers' ratings, the applicable standards and local codes, and licensed practice "
                "before relying on a result.", caution=True)


TEMPLATE = Template(NAME, 1, "Thermal network of your own",
                    "Your own branches and boundaries, solved: node temperatures with the correlation spread, "
                    "heat flows, coefficients, correlations and notes, and the energy balance.", build)
