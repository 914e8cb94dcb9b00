"""Benchmark: LibreOffice Calc with the stillair extension beside `stillair calc`, on the same files.

Run: python tests/bench/bench_libreoffice.py [--formulas 4800]
Installs the extension with `stillair libreoffice-setup` into a throw-away profile and shared
cache, then, in one headless LibreOffice session, opens every template and a generated workbook
of FORMULAS formulas (the layout of bench_calc.py).  Reported per file:

* LibreOffice load: loading the .xlsx, including the extension's load job that rebinds the
  Excel calls and recalculates them (the first computation of every stillair cell);
* LibreOffice recalc: a full recalculation afterwards (``calculateAll``);
* stillair calc: the command in a fresh process (wall), and its own load + calculate figures.

``--growth 4800 19200``: opening big books against their built-in twin instead.  Each size is
written twice in the same layout: with our functions, and with built-in formulas of similar
arithmetic in their place (the twin).  Reported: the load (wall, and soffice's CPU time, which
other work on the machine inflates less), the ratio ours / twin and how each grows from the
smallest to the largest size (linear growth: the CPU ratio equals the size ratio).  Target:
ours within 2x of the twin, growing linearly.  Neither book computes its formulas while it
opens: the twin keeps the .xlsx's cached values, ours are rebound by the load job and computed
by LibreOffice when each is first read (shown, saved, printed, read through the API), so the
first full recalculation after the open is printed too (wall): there ours computes every call,
the twin its built-ins.  Then, from the extension's timing marks (STILLAIR_LIBREOFFICE_TIMING),
where each book's least-CPU load went: LibreOffice reading the file until the load job starts,
the job's rebinding, what follows.

``--cells 1000 10000``: the cost per cell of recalculating N cells of ``=H_CAVITY(A;B;C;D)`` and
of ``=AIR_CONDUCTIVITY(A)`` (inputs varying per row) against a built-in formula of the arithmetic
size of a cavity correlation and the trivial ``=A+B``, best of 3 full recalculations, soffice
CPU.  Targets: H_CAVITY at most 4x the built-in twin, AIR_CONDUCTIVITY at most 3x.
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


# The built-in twin of bench_calc's layout: each of our calls replaced by built-in arithmetic of
# about its size (film temperature, a property fit, Ra, a Nusselt power law, h).
_RA = "9.80665*(A{n}-B{n})*C{n}^3/(((A{n}+B{n})/2+273.15)*1.5E-5*2.1E-5)"
TWIN = {
    "G": "=(1+(0.104*(" + _RA + ")^0.293/(1+(6310/(" + _RA + "))^1.36))^3)^(1/3)*(0.0241+7.6E-5*(A{n}+B{n})/2)/C{n}",
    "H": "=4*5.670374419E-8*((A{n}+B{n})/2+273.15)^3/(1/E{n}+1/F{n}-1)",
    "I": "=1/(1/(G{n}+H{n})+0.17)",
    "J": "=" + _RA,
    "K": '=IF(J{n}>1000,"elsherbiny","conduction")&TEXT(0.713-0.0002*(A{n}+B{n})/2+D{n}/C{n}*0,"0.000")',
    "L": "=ROUND(I{n}*(A{n}-B{n}),3)",
}
# One cell of each kind for --cells, row n (1-based); inputs A..D vary per row.
CELL_FORMULAS = {
    "E": "=H_CAVITY(A{n};B{n};C{n};D{n})",
    "F": "=AIR_CONDUCTIVITY(A{n})",
    "G": "=(1+(0.104*(9.80665*(A{n}-B{n})*C{n}^3/(((A{n}+B{n})/2+273.15)*1.5E-5*2.1E-5))^0.293"
         "/(1+(6310/(9.80665*(A{n}-B{n})*C{n}^3/(((A{n}+B{n})/2+273.15)*1.5E-5*2.1E-5)))^1.36))^3)"
         "^(1/3)*(0.0241+7.6E-5*(A{n}+B{n})/2)/C{n}",
    "H": "=A{n}+B{n}",
    "I": "=STILLAIR_VERSION()",
}
CELL_LABELS = {"E": "=H_CAVITY(A;B;C;D)", "F": "=AIR_CONDUCTIVITY(A)",
               "G": "built-in twin (cavity-size arithmetic)", "H": "=A+B (trivial)",
               "I": "=STILLAIR_VERSION() (bridge floor)"}


def build_twin(path: Path, formulas: int) -> None:
    """bench_calc's layout with built-in formulas in place of ours (same inputs, same shape)."""
    import xlsxwriter

    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Cases")
    rows = formulas // 6
    for r in range(rows):
        n = r + 2
        ws.write_row(r + 1, 0, [15.0 + r * 0.1, 5.0, 0.010 + 0.0002 * r, 1.2, 0.84, 0.04])
        for c, column in enumerate("GHIJKL"):
            ws.write_formula(r + 1, 6 + c, TWIN[column].format(n=n))
    wb.define_name("worst_u", f"=Cases!$I${rows + 3}")
    ws.write_formula(rows + 2, 8, f"=MAX(I2:I{rows + 1})")
    wb.close()


def run_session(install: dict, jobs: list, work: Path, program: Path, env: dict | None = None) -> list[dict]:
    request = work / "request.json"
    request.write_text(json.dumps(dict(install, jobs=jobs)))
    done = subprocess.run([str(libreoffice_python(program)), str(ROOT / "tests" / "libreoffice" / "session.py"),
                           str(request)], capture_output=True, text=True, check=True, cwd=work,
                          env=dict(libreoffice_environment(), **(env or {})))
    return json.loads(done.stdout)["results"]


def phases(result: dict, marks: list[dict]) -> dict:
    """Where one load's time went, from the extension's timing marks inside its window
    (stillair_calc._timing): LibreOffice reading the file until the load job starts (wall; its
    CPU is the load's CPU less the job's), the job's rebinding (soffice CPU), and what follows
    the job (wall)."""
    inside = [m for m in marks if result["load_started"] <= m["wall"] <= result["load_finished"]]
    at = {}
    for mark in inside:
        at.setdefault(mark["event"], mark)
    if "job_started" not in at or "rebound" not in at:
        return {}
    job, rebound = at["job_started"], at["rebound"]
    return {"reading_wall": job["wall"] - result["load_started"],
            "reading_cpu": result["load_cpu_seconds"] - (rebound["cpu"] - job["cpu"]),
            "rebinding_cpu": rebound["cpu"] - job["cpu"],
            "after_wall": result["load_finished"] - rebound["wall"]}


def growth(install: dict, work: Path, program: Path, sizes: list[int], repeat: int) -> None:
    jobs, labels = [], []
    for size in sizes:
        for kind, writer in (("ours", build), ("twin", build_twin)):
            book = work / f"{kind}-{size}.xlsx"
            writer(book, size)
            for _ in range(repeat):
                jobs.append({"open": str(book), "report": False})
                labels.append((size, kind))
    best: dict = {}
    first_recalculation: dict = {}   # label -> least wall of the full recalculation after the open
    split: dict = {}  # the phases of each label's least-CPU load
    timing = work / "timing.jsonl"
    results = run_session(install, jobs, work, program, {"STILLAIR_LIBREOFFICE_TIMING": str(timing)})
    marks = [json.loads(line) for line in timing.read_text().splitlines()] if timing.exists() else []
    for label, result in zip(labels, results):
        if "failed" in result:
            raise SystemExit(f"{label}: {result['failed']}")
        wall, cpu = best.get(label, (float("inf"), float("inf")))
        if result["load_cpu_seconds"] < cpu:
            split[label] = phases(result, marks)
        best[label] = (min(wall, result["load_seconds"]), min(cpu, result["load_cpu_seconds"]))
        first_recalculation[label] = min(first_recalculation.get(label, float("inf")), result["calculate_seconds"])
    print(f"opening big books, best of {repeat} (wall / soffice CPU):")
    for size in sizes:
        (ow, oc), (tw, tc) = best[(size, "ours")], best[(size, "twin")]
        print(f"  {size:>6} formulas: ours {ow:6.2f} s / {oc:6.2f} s CPU, twin {tw:6.2f} s / {tc:6.2f} s CPU"
              f"  ->  ours/twin {ow / tw:4.1f}x wall, {oc / tc:4.1f}x CPU (target <= 2x); then the first full"
              f" recalculation {first_recalculation[(size, 'ours')]:5.2f} s wall, twin"
              f" {first_recalculation[(size, 'twin')]:5.2f} s")
    print("  where each least-CPU load went (soffice CPU; reading the file also as wall):")
    for (size, kind), p in sorted(split.items()):
        if p:
            print(f"    {size:>6} {kind}: reading the file {p['reading_cpu']:5.2f} s ({p['reading_wall']:5.2f} s wall),"
                  f" rebinding {p['rebinding_cpu']:5.2f} s, after the job {p['after_wall']:5.2f} s wall")
    low, high = min(sizes), max(sizes)
    for kind in ("ours", "twin"):
        (lw, lc), (hw, hc) = best[(low, kind)], best[(high, kind)]
        print(f"  growth {kind}: {low} -> {high} ({high / low:.0f}x cells): wall {hw / lw:4.1f}x, "
              f"CPU {hc / lc:4.1f}x")


def per_cell(install: dict, work: Path, program: Path, sizes: list[int], repeat: int) -> None:
    jobs = []
    for size in sizes:
        inputs = [[15.0 + 0.001 * r, 5.0 - 0.0005 * r, 0.012 + 1e-7 * r, 1.2] for r in range(size)]
        formulas = {c: [f.format(n=r + 1) for r in range(size)] for c, f in CELL_FORMULAS.items()}
        jobs.append({"recalc": {"inputs": inputs, "formulas": formulas}, "repeat": repeat})
    for size, result in zip(sizes, run_session(install, jobs, work, program)):
        if "failed" in result:
            raise SystemExit(f"{size}: {result['failed']}")
        twin = result["G"]["cpu"]
        print(f"recalculating {size} cells, best of {repeat}, per cell (soffice CPU; wall):")
        for column, label in CELL_LABELS.items():
            r = result[column]
            print(f"  {label:<40} {r['cpu'] / size * 1e6:7.1f} us CPU {r['wall'] / size * 1e6:7.1f} us wall"
                  f"  {r['cpu'] / twin:5.1f}x the twin   (last: {r['last']})")


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--formulas", type=int, default=4800)
    parser.add_argument("--growth", type=int, nargs="+", help="open books of these sizes against their twins")
    parser.add_argument("--cells", type=int, nargs="+", help="per-cell recalculation at these sizes")
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    program = find_program_dir()
    if args.growth or args.cells:
        import os

        print(f"load: {os.getloadavg()[0]:.2f} {os.getloadavg()[1]:.2f} {os.getloadavg()[2]:.2f}")
        with tempfile.TemporaryDirectory(prefix="stillair-bench-lo-") as directory:
            work = Path(directory)
            install = {"profile": str(work / "profile"), "shared_cache": str(work / "shared"),
                       "soffice": str(program / "soffice")}
            assert stillair_main(["libreoffice-setup", "--profile", install["profile"],
                                  "--shared-cache", install["shared_cache"]]) == 0
            if args.growth:
                growth(install, work, program, args.growth, args.repeat)
            if args.cells:
                per_cell(install, work, program, args.cells, args.repeat)
        return 0
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
