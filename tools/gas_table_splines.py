"""Add the spline coefficients to the shipped gas tables, from the tables as they stand.

    python tools/gas_table_splines.py [PATH]      (default: the package's engine/data/gas_tables.npz)

Each pure gas's table is interpolated by a cubic spline in temperature over Chebyshev series in
pressure (stillair.gases.tables).  Fitting the spline needs scipy.interpolate, whose import
costs more than a property call; so the file carries each gas's fitted coefficients
(``<gas>.spline``, scipy's ``CubicSpline.c``) and evaluating them needs numpy only.  This script
fits them from the tabulated values already in the file -- no CoolProp, no new tabulation, so
no value changes -- and writes the file again (fixed zip dates: the same input gives the same
bytes).  ``python -m stillair.data`` writes them too when it tabulates the gases afresh.
tests/test_gas_tables.py checks that the stored coefficients reproduce scipy's spline.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

from stillair.gases.shipped import TABLE_FILE, with_splines, write_table_file


def main(argv: list[str]) -> int:
    path = Path(argv[0]) if argv else TABLE_FILE
    with np.load(path, allow_pickle=False) as data:
        arrays = {key: data[key] for key in data.files}
    before = path.stat().st_size
    write_table_file(path, with_splines(arrays))
    print(f"wrote {path}: {before / 1e6:.2f} MB -> {path.stat().st_size / 1e6:.2f} MB, "
          f"splines of {', '.join(arrays['gases'].tolist())}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
