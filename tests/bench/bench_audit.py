"""Benchmark: `stillair audit` on the calc benchmark's workbook (300 and 4,800 formulas), cold.

Target: the 4,800-formula workbook under 6 s wall on a 2-core machine.  The workbook is
bench_calc's layout with its cached values filled in by `stillair calc --out`, so the audit
checks every cell against a saved value and should come out clean; the script says when not.
Also times the refusal of hostile files (billion laughs in a sheet and in workbook.xml, a zip
member declaring 3.75 GiB, a 48 MiB deflate bomb): target under 1 s each.

Run: python tests/bench/bench_audit.py [--repeat 3] [--formulas 300 4800]
"""

from __future__ import annotations

import argparse
import json
import resource
import struct
import subprocess
import sys
import tempfile
import time
import zipfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "tests"))
sys.path.insert(0, str(ROOT / "tests" / "bench"))


def build(path: Path, formulas: int) -> None:
    """bench_calc's layout, with cached values written by `stillair calc --out`."""
    from bench_calc import build as build_layout

    raw = path.with_suffix(".raw.xlsx")
    build_layout(raw, formulas)
    done = subprocess.run([sys.executable, "-m", "stillair.addin.cli", "calc", str(raw), "--out",
                           str(path)], capture_output=True, text=True)
    if done.returncode not in (0, 1):
        raise SystemExit(f"calc --out failed: {done.stderr}")


def child_cpu() -> float:
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def cold_audit(path: Path) -> tuple[float, float, dict, int]:
    """Wall and CPU time of one audit in a new process, its JSON output and exit status."""
    cpu = child_cpu()
    started = time.perf_counter()
    run = subprocess.run([sys.executable, "-m", "stillair.addin.audit", str(path), "--json"],
                         capture_output=True, text=True, cwd=ROOT)
    wall = time.perf_counter() - started
    return wall, child_cpu() - cpu, json.loads(run.stdout), run.returncode


def hostile(directory: Path) -> dict[str, Path]:
    from test_untrusted import LAUGHS, _book, _replace_member

    files = {}
    for member, label in (("xl/worksheets/sheet1.xml", "billion laughs in a sheet"),
                          ("xl/workbook.xml", "billion laughs in workbook.xml")):
        path = _book(directory / f"{label.split()[-1]}.xlsx")
        _replace_member(path, member, LAUGHS)
        files[label] = path
    path = _book(directory / "huge.xlsx")
    data = bytearray(path.read_bytes())
    at = data.index(b"PK\x01\x02")
    while data[at + 46:at + 46 + 24] != b"xl/worksheets/sheet1.xml":
        at = data.index(b"PK\x01\x02", at + 4)
    struct.pack_into("<I", data, at + 24, 0xF0000000)
    path.write_bytes(bytes(data))
    files["member declaring 3.75 GiB"] = path
    path = _book(directory / "bomb.xlsx")
    with zipfile.ZipFile(path, "a", zipfile.ZIP_DEFLATED) as archive:
        with archive.open("xl/media/padding.bin", "w", force_zip64=True) as member:
            for _ in range(48):
                member.write(bytes(1 << 20))
    files["48 MiB deflate bomb"] = path
    return files


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--formulas", type=int, nargs="+", default=[300, 4800])
    args = parser.parse_args()
    best = {}
    with tempfile.TemporaryDirectory() as directory:
        directory = Path(directory)
        for count in args.formulas:
            book = directory / f"audit-{count}.xlsx"
            build(book, count)
            print(f"audit, {count} formulas, cold process:")
            for i in range(args.repeat):
                wall, cpu, data, code = cold_audit(book)
                t = data.get("timing", {})
                print(f"  run {i + 1}: wall {wall:.2f} s | read {t.get('read', 0):.2f} s, engine "
                      f"import {t.get('engine_import', 0):.2f} s, prepare {t.get('load', 0):.2f} s,"
                      f" calculate {t.get('calculate', 0):.2f} s, classify "
                      f"{t.get('classify', 0):.2f} s | {data.get('checked')} cells checked, "
                      f"exit {code} | CPU {cpu:.2f} s")
                if code != 0:
                    print("  (not clean:", data.get("counts") or data.get("error"), ")")
                best[count] = min(best.get(count, wall), wall)
        if len(best) > 1:
            low, high = min(best), max(best)
            print(f"growth: {low} -> {high} formulas ({high / low:.0f}x): best wall "
                  f"{best[low]:.2f} s -> {best[high]:.2f} s ({best[high] / best[low]:.1f}x); per "
                  f"extra formula {(best[high] - best[low]) / (high - low) * 1000:.2f} ms")
        from stillair.addin.audit.check import AuditError, audit_book
        print("refusal of hostile files, in process (target < 1 s each):")
        for label, path in hostile(directory).items():
            started = time.perf_counter()
            try:
                audit_book(str(path))
                outcome = "NOT REFUSED"
            except AuditError as error:
                outcome = str(error).split(": refused: ")[-1][:70]
            print(f"  {label:<32} {time.perf_counter() - started:.3f} s  {outcome}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
