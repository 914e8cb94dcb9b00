"""Benchmark: `stillair calc BOOK --cases CASES.csv` on the sealed-cabinet template.

Targets (issue 21): 1,000 rows in under 60 s on a 2-core machine; per row at most 5 % of one
cold `stillair calc` of the same book.  The anchor, one cold `stillair calc` (a fresh process:
start-up, engine import, preparing the workbook, one calculation), is measured in the same run, so
the ratio holds on a loaded machine; the load (os.getloadavg) is printed beside the figures.

Run: python tests/bench/bench_cases.py [--rows 1000] [--jobs 1 2]
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
BOOK = ROOT / "templates" / "sealed-cabinet.xlsx"


def write_cases(path: Path, rows: int) -> None:
    """Dissipation 50..250 W, ambient 10..40 C, sun on the top 0..1000 W/m2: every row differs."""
    lines = ["dissipation,ambient_t,sun_top"]
    for i in range(rows):
        lines.append(f"{50 + (i * 7) % 200},{10 + (i * 3) % 31},{(i * 37) % 1001}")
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


def child_cpu() -> float:
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def timed(argv: list[str]) -> tuple[float, float, subprocess.CompletedProcess]:
    cpu = child_cpu()
    started = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "stillair.addin.cli", *argv],
                          capture_output=True, text=True)
    wall = time.perf_counter() - started
    if done.returncode not in (0, 1):
        raise SystemExit(f"{' '.join(argv)} failed: {done.stderr}")
    return wall, child_cpu() - cpu, done


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--rows", type=int, default=1000)
    parser.add_argument("--jobs", type=int, nargs="+", default=[1, 2])
    args = parser.parse_args()
    print(f"load average at start: {' '.join(f'{x:.2f}' for x in os.getloadavg())}")
    cold_wall, cold_cpu, _ = timed(["calc", str(BOOK)])
    print(f"anchor, one cold `stillair calc` of {BOOK.name}: wall {cold_wall:.2f} s, CPU {cold_cpu:.2f} s")
    with tempfile.TemporaryDirectory() as directory:
        cases = Path(directory) / "cases.csv"
        write_cases(cases, args.rows)
        for jobs in args.jobs:
            out = Path(directory) / f"results-{jobs}.csv"
            wall, cpu, done = timed(["calc", str(BOOK), "--cases", str(cases), "--out", str(out),
                                     "--jobs", str(jobs)])
            per_row_wall, per_row_cpu = wall / args.rows, cpu / args.rows
            print(f"--cases, {args.rows} rows, --jobs {jobs}: wall {wall:.1f} s (target < 60 s for "
                  f"1,000 rows), CPU {cpu:.1f} s; {done.stdout.strip()}")
            print(f"  per row: wall {per_row_wall * 1000:.0f} ms = {per_row_wall / cold_wall:.1%} of "
                  f"the cold calc's wall; CPU {per_row_cpu * 1000:.0f} ms = "
                  f"{per_row_cpu / cold_cpu:.1%} of its CPU (target <= 5 %)")
    print(f"load average at end: {' '.join(f'{x:.2f}' for x in os.getloadavg())}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
