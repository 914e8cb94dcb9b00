"""An OpenDocument spreadsheet (.ods) read through LibreOffice: converted into a temporary .xlsx.

``calc`` and ``audit`` read .xlsx only; a LibreOffice user's own copy is often .ods.  LibreOffice
converts it (``soffice --convert-to xlsx``, which keeps the values the file stores: single-cell
formulas are not recalculated) with a throw-away user profile, so a running LibreOffice is not
disturbed, from a copy of the file, so not even a lock file appears beside the user's .ods.
"""

from __future__ import annotations

import shutil
import subprocess
import tempfile
from pathlib import Path

from .build import ToolMissing, find_program_dir
from .setup import libreoffice_environment

__all__ = ["ODS_SUFFIXES", "ConversionError", "is_opendocument", "converted_to_xlsx",
           "temporary_folder", "remove"]

ODS_SUFFIXES = (".ods", ".fods")
INSTALL = ("install LibreOffice to read .ods files (Debian/Ubuntu: apt-get install "
           "libreoffice-calc), or save the workbook as .xlsx from LibreOffice")


class ConversionError(Exception):
    """The .ods cannot be converted; one line for the user."""


def is_opendocument(path: str) -> bool:
    return str(path).lower().endswith(ODS_SUFFIXES)


def converted_to_xlsx(path: str, folder: str) -> str:
    """Convert ``path`` into ``folder`` (a temporary folder the caller removes); the .xlsx."""
    try:
        program = find_program_dir()
    except ToolMissing:
        raise ConversionError(f"{path}: an OpenDocument spreadsheet; {INSTALL}") from None
    work = Path(folder)
    source = work / ("input" + Path(path).suffix.lower())
    shutil.copyfile(path, source)
    profile = work / "profile"
    out = work / "out"
    out.mkdir()
    command = [str(program / "soffice"), f"-env:UserInstallation={profile.as_uri()}",
               "--headless", "--invisible", "--norestore", "--nologo", "--convert-to",
               "xlsx:Calc MS Excel 2007 XML", "--outdir", str(out), str(source)]
    try:
        done = subprocess.run(command, capture_output=True, text=True, timeout=600,
                              env=libreoffice_environment(), stdin=subprocess.DEVNULL,
                              start_new_session=True)
    except subprocess.TimeoutExpired:
        raise ConversionError(f"{path}: LibreOffice did not convert it within 10 minutes") from None
    result = out / "input.xlsx"
    if not result.is_file():
        detail = " ".join((done.stderr or done.stdout or "").split())[-200:]
        raise ConversionError(f"{path}: LibreOffice could not convert it to .xlsx (exit "
                              f"{done.returncode}{': ' + detail if detail else ''})")
    return str(result)


def temporary_folder() -> str:
    return tempfile.mkdtemp(prefix="stillair-ods-")


def remove(folder: str) -> None:
    shutil.rmtree(folder, ignore_errors=True)
