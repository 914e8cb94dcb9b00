"""Benchmark: the hand check of a 500-formula hand-built workbook.

The book repeats a pipe-run calculation typed by hand (film temperature, Ra, Churchill-Chu
cylinder, h, area, convective and radiant heat, 10 formulas a run) for 50 runs of different
sizes and temperatures: 500 formulas.  Reported: the hand check's recognition and probing time,
and its ratio to the anchor, one plain headless calculation of the same book in the same run.
A second book is the search's worst case: 500 formulas of power laws and logarithms of numbers
in Rayleigh-like ranges, none of them ours and no two of one relative form, so every one is
searched for a near-match and a mistyped constant (bounded by hand.SEARCH_BUDGET).  Target (issue 24): under 10 s here.

    python tests/bench/bench_audit_hand.py
"""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

import openpyxl

import stillair
from stillair.addin.audit.hand import check_hand_book
from stillair.addin.workbook.model import Model
from stillair.addin.workbook.reader import read_book

RUNS = 50


def build(path: Path) -> int:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Runs"
    ws.append(["run", "Ts", "Ta", "D", "L", "eps", "nu", "alpha", "k", "Pr",
               "Tf", "beta", "Ra", "Nu", "h", "A", "Qc", "Qr", "Q", "Q/L"])
    formulas = 0
    for i in range(RUNS):
        r = i + 2
        ts, ta = 30.0 + i, 15.0 + (i % 7)
        p = stillair.gas_properties("air", (ts + ta) / 2)
        ws.append([f"run {i + 1}", ts, ta, 0.05 + 0.01 * (i % 9), 5.0 + i, 0.3 + 0.01 * (i % 5),
                   float(f"{p.kinvisc:.4g}"), float(f"{p.diffusivity:.4g}"),
                   float(f"{p.conductivity:.4g}"), float(f"{p.prandtl:.4g}"),
                   f"=(B{r}+C{r})/2", f"=1/(K{r}+273.15)",
                   f"=9.81*L{r}*(B{r}-C{r})*D{r}^3/(G{r}*H{r})",
                   f"=(0.6+0.387*M{r}^(1/6)/(1+(0.559/J{r})^(9/16))^(8/27))^2",
                   f"=N{r}*I{r}/D{r}", f"=PI()*D{r}*E{r}", f"=O{r}*P{r}*(B{r}-C{r})",
                   f"=F{r}*5.67E-8*P{r}*((B{r}+273.15)^4-(C{r}+273.15)^4)", f"=Q{r}+R{r}",
                   f"=S{r}/E{r}"])
        formulas += 10
    wb.save(path)
    return formulas


def build_adversarial(path: Path) -> int:
    import random

    rng = random.Random(7)
    wb = openpyxl.Workbook()
    ws = wb.active
    # each formula carries its own number ({k}), so no two share a relative form and the
    # search runs for every one (copies of one form are searched once)
    shapes = ("=0.5*A{r}^0.26*B{r}^{k}", "=A{r}^0.3/({k}+C{r})", "=0.6+{k}*A{r}^(1/6)*B{r}",
              "=LN(A{r})*B{r}+C{r}/{k}", "=(A{r}/C{r})^0.25*{k}")
    for r in range(1, 501):
        ws[f"A{r}"] = rng.uniform(1e3, 1e8)
        ws[f"B{r}"] = rng.uniform(0.6, 0.8)
        ws[f"C{r}"] = rng.uniform(1, 50)
        ws[f"D{r}"] = rng.choice(shapes).format(r=r, k=round(rng.uniform(0.1, 10), 4))
    wb.save(path)
    return 500


def timed(path: Path) -> tuple[float, float, object]:
    check_hand_book(str(path))            # warm: imports, compiled shapes
    started = time.perf_counter()
    Model(read_book(str(path))).calculate()
    anchor = time.perf_counter() - started
    started = time.perf_counter()
    result = check_hand_book(str(path))
    return anchor, time.perf_counter() - started, result


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "adversarial.xlsx"
        count = build_adversarial(path)
        anchor, seconds, result = timed(path)
        print(f"worst case, {count} formulas none of them ours: {result.summary()}")
        print(f"  anchor {anchor:.3f} s; hand check {seconds:.3f} s = {seconds / anchor:.1f} x "
              f"anchor, of which recognition and probing {result.timing['recognise']:.3f} s "
              f"-> {'met' if result.timing['recognise'] < 10 else 'NOT met'} (under 10 s)")
        path = Path(tmp) / "runs.xlsx"
        formulas = build(path)
        check_hand_book(str(path))            # warm: imports, compiled shapes
        started = time.perf_counter()
        Model(read_book(str(path))).calculate()
        anchor = time.perf_counter() - started
        started = time.perf_counter()
        result = check_hand_book(str(path))
        seconds = time.perf_counter() - started
    print(f"{formulas} formulas; {result.summary()}")
    print(f"anchor (read + one headless calculation): {anchor:.3f} s")
    print(f"hand check (read, calculate, recognise, probe, check): {seconds:.3f} s "
          f"= {seconds / anchor:.1f} x anchor; recognition and probing "
          f"{result.timing['recognise']:.3f} s")
    print(f"target: recognition and probing under 10 s -> "
          f"{'met' if result.timing['recognise'] < 10 else 'NOT met'}")


if __name__ == "__main__":
    main()
