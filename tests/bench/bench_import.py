"""Benchmark: cold-process start-up of the engine and of `stillair calc`.

Run: python tests/bench/bench_import.py [--repeat 5]

Each case is a fresh Python process, timed from outside (wall clock, best and median of
--repeat runs):

* ``import stillair`` alone, and ``import stillair; stillair.air_conductivity(20.0)``;
* ``stillair calc`` on the 300-formula bench workbook of bench_calc.py.

Byte code is cached as an installed package has it (pip compiles a wheel's modules): the
processes run without PYTHONDONTWRITEBYTECODE, and one untimed run of each case writes the
.pyc files first.  Compiling the engine's ~50 modules from source would otherwise add about
0.15 s to every start and measure the machine's environment rather than the package.

Each is run twice: as shipped (the gas tables from engine/data/gas_tables.npz, CoolProp never
imported), and "as before" -- CoolProp imported at start-up and every gas tabulated from it
(STILLAIR_GAS_TABLES=off), which is what the engine did before the tables were shipped.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent))
from bench_calc import build  # noqa: E402

SHIPPED = {}
BEFORE = {"STILLAIR_GAS_TABLES": "off"}
PRELOAD_COOLPROP = "import CoolProp; "  # the old engine imported it with itself


def wall(code: str, environment: dict, repeat: int) -> list[float]:
    env = {key: value for key, value in os.environ.items()
           if key not in ("STILLAIR_GAS_TABLES", "PYTHONDONTWRITEBYTECODE")}
    env.update(environment)
    subprocess.run([sys.executable, "-c", code], env=env, check=True, stdout=subprocess.DEVNULL)  # .pyc
    times = []
    for _ in range(repeat):
        started = time.perf_counter()
        subprocess.run([sys.executable, "-c", code], env=env, check=True,
                       stdout=subprocess.DEVNULL)
        times.append(time.perf_counter() - started)
    return times


def in_process(code: str, repeat: int) -> list[float]:
    """What ``code`` prints (a time it measured itself), from ``repeat`` fresh processes."""
    env = {key: value for key, value in os.environ.items()
           if key not in ("STILLAIR_GAS_TABLES", "PYTHONDONTWRITEBYTECODE")}
    return [float(subprocess.run([sys.executable, "-c", code], env=env, check=True, capture_output=True,
                                 text=True).stdout) for _ in range(repeat)]


def report(label: str, times: list[float]) -> None:
    print(f"  {label:<58} best {min(times):5.2f} s   median {statistics.median(times):5.2f} s")


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=5)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as directory:
        book = Path(directory) / "bench.xlsx"
        build(book)
        calc = f"import sys; from stillair.addin.cli import main; sys.exit(main(['calc', {str(book)!r}]))"
        cases = [
            ("import stillair", "import stillair"),
            ("import stillair; stillair.air_conductivity(20.0)",
             "import stillair; stillair.air_conductivity(20.0)"),
            ("stillair calc (300 formulas)", calc),
        ]
        print(f"cold processes, {args.repeat} runs each")
        # The target (issue 21): import stillair at most 2x import numpy, timed in the same run.
        # In-process import time (-X importtime would add its own cost): the interpreter's own
        # start-up is the same for both and is taken off by timing `pass` alone.
        # the three timed in alternation, one process each per round, so that a change of load
        # during the run weighs on all three alike (blocks of one case each made the ratio swing)
        rounds = [[min(wall(code, SHIPPED, 1)) for code in ("pass", "import numpy", "import stillair")]
                  for _ in range(max(args.repeat, 7))]
        bare, numpy_import, engine_import = (min(times) for times in zip(*rounds))
        numpy_import, engine_import = numpy_import - bare, engine_import - bare
        print(f"import numpy {numpy_import:.3f} s, import stillair {engine_import:.3f} s "
              f"(interpreter start-up {bare:.3f} s taken off): ratio {engine_import / numpy_import:.2f} "
              f"(target <= 2)")
        # The first property call reads the shipped table and its stored spline (numpy only),
        # timed inside the process (a difference of two cold-process minima is mostly noise).
        first_call = min(in_process("import time, stillair\nstarted = time.perf_counter()\n"
                                    "stillair.air_conductivity(20.0)\nprint(time.perf_counter() - started)",
                                    args.repeat))
        print(f"first property call (air_conductivity, table read from the file): {first_call:.3f} s, "
              f"{first_call / numpy_import:.2f}x import numpy")
        for label, code in cases:
            print(label)
            report("shipped tables (CoolProp not imported)", wall(code, SHIPPED, args.repeat))
            report("before: CoolProp at start-up, tables computed",
                   wall(PRELOAD_COOLPROP + code, BEFORE, args.repeat))
    return 0


if __name__ == "__main__":
    sys.exit(main())
