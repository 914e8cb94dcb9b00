"""Benchmark: `stillair calc` on a 300-formula workbook in a cold process.

Run: python tests/bench/bench_calc.py [--repeat 3]
Prints wall time of the whole process and, from calc's own report, the workbook load (formulas
parsing and compiling the workbook, including importing formulas) and the calculation.
"""

from __future__ import annotations

import argparse
import re
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import xlsxwriter


def build(path: Path, formulas: int = 300) -> None:
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Cases")
    rows = formulas // 6
    for r in range(rows):
        n = r + 2
        ws.write_row(r + 1, 0, [15.0 + r * 0.1, 5.0, 0.010 + 0.0002 * r, 1.2, 0.84, 0.04])
        ws.write_formula(r + 1, 6, f"=H_CAVITY(A{n},B{n},C{n},D{n})")
        ws.write_formula(r + 1, 7, f"=H_RAD(A{n},B{n},E{n},F{n})")
        ws.write_formula(r + 1, 8, f"=1/(1/(G{n}+H{n})+0.17)")
        ws.write_formula(r + 1, 9, f"=RAYLEIGH(A{n},B{n},C{n})")
        ws.write_formula(r + 1, 10, f"=CAVITY_METHOD(J{n},AIR_PRANDTL((A{n}+B{n})/2),D{n}/C{n})")
        ws.write_formula(r + 1, 11, f"=ROUND(I{n}*(A{n}-B{n}),3)")
    wb.define_name("worst_u", f"=Cases!$I${rows + 3}")
    ws.write_formula(rows + 2, 8, f"=MAX(I2:I{rows + 1})")
    wb.close()


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as directory:
        book = Path(directory) / "bench.xlsx"
        build(book)
        for i in range(args.repeat):
            started = time.perf_counter()
            done = subprocess.run([sys.executable, "-m", "stillair.addin.cli", "calc", str(book)],
                                  capture_output=True, text=True, check=True)
            wall = time.perf_counter() - started
            m = re.search(r"(\d+) formula cells \(engine import ([\d.]+) s, load ([\d.]+) s, "
                          r"calculate ([\d.]+) s\)", done.stdout)
            cells, imp, load, calc = int(m.group(1)), *map(float, m.group(2, 3, 4))
            print(f"run {i + 1}: {cells} formula cells, wall {wall:.2f} s = engine import {imp:.2f} s"
                  f" + load {load:.2f} s + calculate {calc:.2f} s"
                  f" + start-up/output {wall - imp - load - calc:.2f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
