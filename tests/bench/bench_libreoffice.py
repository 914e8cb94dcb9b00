"""Benchmark: LibreOffice Calc with the stillair extension beside `stillair calc`, on the same files.

Run: python tests/bench/bench_libreoffice.py [--formulas 4800]
Installs the extension with `stillair libreoffice-setup` into a throw-away profile and shared
cache, then, in one headless LibreOffice session, opens every template and a generated workbook
of FORMULAS formulas (the layout of bench_calc.py).  Reported per file:

* LibreOffice load: loading the .xlsx, including the extension's load job that rebinds the
  Excel calls and recalculates them (the first computation of every stillair cell);
* LibreOffice recalc: a full recalculation afterwards (``calculateAll``);
* stillair calc: the command in a fresh process (wall), and its own load + calculate figures.
"""

from __future__ import annotations

import argparse
import json
import re
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent.parent
sys.path.insert(0, str(HERE))

from bench_calc import build  # noqa: E402  (the same generated layout, scaled)

from stillair.addin.cli import main as stillair_main  # noqa: E402
from stillair.addin.libreoffice.build import find_program_dir  # noqa: E402
from stillair.addin.libreoffice.setup import libreoffice_environment, libreoffice_python  # noqa: E402


def stillair_calc(path: Path) -> tuple[float, float, float]:
    started = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "stillair.addin.cli", "calc", str(path)],
                          capture_output=True, text=True, check=True)
    wall = time.perf_counter() - started
    m = re.search(r"load ([\d.]+) s, calculate ([\d.]+) s", done.stdout)
    return wall, float(m.group(1)), float(m.group(2))


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--formulas", type=int, default=4800)
    args = parser.parse_args()
    program = find_program_dir()
    with tempfile.TemporaryDirectory(prefix="stillair-bench-lo-") as directory:
        work = Path(directory)
        install = {"profile": str(work / "profile"), "shared_cache": str(work / "shared"),
                   "soffice": str(program / "soffice")}
        assert stillair_main(["libreoffice-setup", "--profile", install["profile"],
                              "--shared-cache", install["shared_cache"]]) == 0
        books = []
        for template in sorted((ROOT / "templates").glob("*.xlsx")):
            books.append(work / template.name)
            shutil.copyfile(template, books[-1])
        large = work / f"bench-{args.formulas}.xlsx"
        build(large, args.formulas)
        books.append(large)
        request = work / "request.json"
        request.write_text(json.dumps(dict(install, jobs=[{"open": str(b)} for b in books])))
        started = time.perf_counter()
        done = subprocess.run([str(libreoffice_python(program)), str(ROOT / "tests" / "libreoffice" / "session.py"),
                               str(request)], capture_output=True, text=True, check=True, cwd=work,
                              env=libreoffice_environment())
        session = time.perf_counter() - started
        results = json.loads(done.stdout)["results"]
        print(f"{'workbook':<26}{'cells':>7}{'LO load':>10}{'LO recalc':>11}"
              f"{'calc wall':>11}{'calc load':>11}{'calc calc':>11}")
        for book, result in zip(books, results):
            if "failed" in result:
                print(f"{book.name:<26} LibreOffice failed: {result['failed']}")
                continue
            cells = sum(len(c) for c in result["sheets"].values())
            errors = sum(1 for c in result["sheets"].values() for v in c.values() if v["error"])
            wall, load, calc = stillair_calc(book)
            print(f"{book.name:<26}{cells:>7}{result['load_seconds']:>9.2f}s"
                  f"{result['calculate_seconds']:>10.2f}s{wall:>10.2f}s{load:>10.2f}s{calc:>10.2f}s"
                  + (f"  ({errors} error cells in LibreOffice)" if errors else ""))
        print(f"LibreOffice session (start, all files, close): {session:.1f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
