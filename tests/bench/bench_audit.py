"""Benchmark: `stillair audit` on a workbook with 1,000 stillair function cells, cold process.

Target: under 5 s wall for the whole process.  Also times the refusal of hostile files (billion
laughs in a sheet and in workbook.xml, a zip member declaring 3.75 GiB, a 48 MiB deflate bomb):
target under 1 s each.

Run: python tests/bench/bench_audit.py [--repeat 3] [--cells 1000]
The cached values are the engine's own (computed in this process while building), so the audit
of the big book should come out clean; the script says so when it does not.
"""

from __future__ import annotations

import argparse
import json
import struct
import subprocess
import sys
import tempfile
import time
import zipfile
from pathlib import Path

import xlsxwriter

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "tests"))


def build(path: Path, cells: int) -> None:
    """Rows of inputs with 4 stillair cells each (plate, cavity, radiation, air property)."""
    from stillair.addin.cells import call

    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Cases")
    for r in range(cells // 4):
        n = r + 2
        t1, t2, gap, height = 20.0 + 0.01 * r, 5.0, 0.012 + 0.00001 * r, 1.0
        ws.write_row(r + 1, 0, [t1, t2, gap, height, 0.84])
        ws.write_formula(r + 1, 5, f"=H_VPLATE(A{n},B{n},D{n})", None, call("H_VPLATE", t1, t2, height))
        ws.write_formula(r + 1, 6, f"=H_CAVITY(A{n},B{n},C{n},D{n})", None,
                         call("H_CAVITY", t1, t2, gap, height))
        ws.write_formula(r + 1, 7, f"=H_RAD(A{n},B{n},E{n},E{n})", None, call("H_RAD", t1, t2, 0.84, 0.84))
        ws.write_formula(r + 1, 8, f"=AIR_CONDUCTIVITY(A{n})", None, call("AIR_CONDUCTIVITY", t1))
    wb.close()


def cold_audit(path: Path) -> tuple[float, dict, int]:
    started = time.perf_counter()
    run = subprocess.run([sys.executable, "-m", "stillair.addin.audit", str(path), "--json"],
                         capture_output=True, text=True, cwd=ROOT)
    wall = time.perf_counter() - started
    return wall, json.loads(run.stdout), run.returncode


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
    parser.add_argument("--cells", type=int, default=1000)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as directory:
        directory = Path(directory)
        book = directory / "audit-1000.xlsx"
        build(book, args.cells)
        print(f"audit of {args.cells} stillair cells, cold process (target < 5 s wall):")
        for i in range(args.repeat):
            wall, data, code = cold_audit(book)
            t = data.get("timing", {})
            print(f"  run {i + 1}: wall {wall:.2f} s | read {t.get('read', 0):.2f} s, engine import "
                  f"{t.get('engine_import', 0):.2f} s, load {t.get('load', 0):.2f} s, compute "
                  f"{t.get('calculate', 0):.2f} s, classify {t.get('classify', 0):.2f} s | "
                  f"{data.get('checked')} cells checked, exit {code}")
            if code != 0:
                print("  (not clean:", data.get("counts") or data.get("error"), ")")
        from stillair.addin.audit import AuditError, audit_book
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
