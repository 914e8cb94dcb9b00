"""``python -m stillair``: a real calculation on a built-in default case.

Demo scenario (invented for illustration): a partition between a heated office at 21 °C and an
unheated store at 4 °C, built of two 12.5 mm boards around a sealed 70 mm air cavity, 2.6 m high
and 3.0 m wide.  Each room face loses heat by natural convection and by radiation to the room;
the cavity carries convection and radiation in parallel.  Solved as a network to convergence,
with film-temperature properties per branch.
"""

from __future__ import annotations

import math
import sys

from . import solve_network
from ._console import run_command

HEIGHT, WIDTH = 2.6, 3.0
AREA = HEIGHT * WIDTH
BOARD = (0.0125, 0.21)  # thickness m, conductivity W/(m·K): demo values

BRANCHES: list[list[object]] = [
    # name          from          to            kind          p1      p2       p3    p4   p5  method
    ["office-conv", "office-face", "office",     "vplate",     HEIGHT, AREA,    None, None, None, None],
    ["office-rad",  "office-face", "office",     "radiation",  0.9,    None,    AREA, None, None, None],
    ["board-1",     "office-face", "cavity-1",   "conduction", *BOARD,          AREA, None, None, None],
    ["cavity-conv", "cavity-1",    "cavity-2",   "cavity",     0.070,  HEIGHT,  AREA, 90,   None, None],
    ["cavity-rad",  "cavity-1",    "cavity-2",   "radiation",  0.9,    0.9,     AREA, None, None, None],
    ["board-2",     "cavity-2",    "store-face", "conduction", *BOARD,          AREA, None, None, None],
    ["store-conv",  "store-face",  "store",      "vplate",     HEIGHT, AREA,    None, None, None, None],
    ["store-rad",   "store-face",  "store",      "radiation",  0.9,    None,    AREA, None, None, None],
]
OFFICE, STORE = 21.0, 4.0  # room temperatures, °C
BOUNDARIES = [["office", "T", OFFICE], ["store", "T", STORE]]


def main() -> None:
    result = solve_network(BRANCHES, BOUNDARIES)
    print(f"Partition with a sealed 70 mm air cavity, office {OFFICE:g} °C | store {STORE:g} °C (demo case)")
    print(f"solved in {result.iterations} iterations, energy residual {result.residual:.1e} W\n")
    print(f"{'node':<12}{'T °C':>9}")
    for node, temperature in result.temperatures.items():
        print(f"{node:<12}{temperature:>9.2f}")
    print(f"\n{'branch':<13}{'Q W':>9}{'h W/m²K':>10}{'Nu':>8}  method")
    for name, heat in result.heat.items():
        branch = result.branches[name]
        h = "" if math.isnan(branch.h) else f"{branch.h:.3f}"
        nu = "" if math.isnan(branch.Nu) else f"{branch.Nu:.2f}"
        print(f"{name:<13}{heat:>9.2f}{h:>10}{nu:>8}  {branch.method or ''}")
    total = result.heat["board-1"]
    print(f"\nheat through the partition {total:.1f} W, U = {total / (AREA * (OFFICE - STORE)):.3f} W/(m²·K)")
    for note in result.notes:
        print(f"note: {note}")


if __name__ == "__main__":
    sys.exit(run_command("python -m stillair", main))
