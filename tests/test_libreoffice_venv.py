"""LibreOffice started from a shell with a virtual environment first on PATH, end to end.

The extension is installed into a fresh profile and an isolated shared cache; the same two
workbooks are converted by a plain `soffice` and by the launcher the set-up writes into a
virtual environment, both from that environment's PATH.  Needs LibreOffice on the system Python
(Debian: libreoffice-calc python3-uno libreoffice-script-provider-python libreoffice-dev).
"""

from __future__ import annotations

import csv
import os
import subprocess
from pathlib import Path

import pytest
import xlsxwriter

from stillair.addin.cells.callpath import call
from stillair.addin.cli import main
from stillair.addin.libreoffice import launcher
from stillair.addin.libreoffice.build import ToolMissing, find_program_dir, find_unoidl_write
from stillair.addin.libreoffice.setup import libreoffice_python

pytestmark = pytest.mark.slow  # installs the extension and starts LibreOffice twice

try:
    PROGRAM = find_program_dir()
    find_unoidl_write(PROGRAM)
except ToolMissing as error:
    pytest.skip(f"{error}; apt-get install libreoffice-calc python3-uno "
                "libreoffice-script-provider-python libreoffice-dev", allow_module_level=True)
PYTHON = libreoffice_python(PROGRAM)
if PYTHON is None or PYTHON.parent == PROGRAM:
    pytest.skip("LibreOffice runs a Python of its own here (it sets its Python home): not affected",
                allow_module_level=True)


def convert(soffice: str, install: dict, books: list[Path], path: str, outdir: Path) -> list:
    """First cell of each book as LibreOffice computed it (None: the book did not load)."""
    subprocess.run([soffice, f"-env:UserInstallation={Path(install['profile']).as_uri()}",
                    f"-env:UNO_SHARED_PACKAGES_CACHE={Path(install['shared']).as_uri()}",
                    "--headless", "--norestore", "--convert-to", "csv", "--outdir", str(outdir),
                    *map(str, books)], env=dict(os.environ, PATH=path), capture_output=True,
                   stdin=subprocess.DEVNULL, timeout=600, cwd=outdir)
    firsts = []
    for book in books:
        result = outdir / f"{book.stem}.csv"
        firsts.append(float(next(csv.reader(result.open()))[0]) if result.exists() else None)
    return firsts


def test_a_venv_first_on_path_fails_plain_soffice_and_the_launcher_fixes_it(tmp_path):
    install = {"profile": tmp_path / "profile", "shared": tmp_path / "shared"}
    assert main(["libreoffice-setup", "--profile", str(install["profile"]),
                 "--shared-cache", str(install["shared"])]) == 0
    books = []
    for name in ("first", "second"):
        books.append(tmp_path / f"{name}.xlsx")
        workbook = xlsxwriter.Workbook(str(books[-1]))
        workbook.add_worksheet().write_formula("A1", "=AIR_DENSITY(20)", None, 0)
        workbook.close()
    venv = tmp_path / "venv"
    (venv / "bin").mkdir(parents=True)
    (venv / "bin" / "python3").symlink_to(PYTHON)
    (venv / "pyvenv.cfg").write_text(f"home = {PYTHON.parent}\ninclude-system-site-packages = false\n")
    path = f"{venv / 'bin'}:/usr/bin:/bin"
    expected = call("AIR_DENSITY", 20.0)

    plain = tmp_path / "plain"
    plain.mkdir()
    # LibreOffice's own behaviour, the reason for the launcher: the first book does not load and
    # the second computes without the add-in.  Should a LibreOffice release stop taking the first
    # python3 on PATH for its Python, this line fails and the launcher can be retired.
    assert convert(str(PROGRAM / "soffice"), install, books, path, plain) == [None, 0.0]

    written, refused = launcher.write_launchers(venv, PYTHON, PROGRAM)
    assert refused == [] and venv / "bin" / "soffice" in written
    through = tmp_path / "launcher"
    through.mkdir()
    assert convert(str(venv / "bin" / "soffice"), install, books, path, through) == pytest.approx(
        [expected, expected], rel=1e-12)
