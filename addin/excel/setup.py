"""``stillair excel-setup``: prepare xlwings so that Excel can call the stillair functions.

Writes (or, with --dry-run, only shows) two small config files in xlwings' own
``"KEY","VALUE"`` format:

* ``~/.xlwings/xlwings.conf`` — read by the standard xlwings add-in (route A);
* ``~/.stillair/stillair.conf`` — read by a custom xlwings add-in whose project name is
  ``stillair`` (route B, the functions available in every workbook).

Both get ``INTERPRETER_WIN`` (this Python) and ``UDF MODULES`` (``stillair.addin.xlfuncs``).  An existing
file is never overwritten blindly: keys it already has are left alone (a different value is
reported, not changed), new keys are appended, and the old file is first copied to
``<file>.bak-<timestamp>``.  Nothing in Excel itself can be done from here; the remaining steps
are printed.
"""

from __future__ import annotations

import os
import shutil
import sys
import time
from pathlib import Path

UDF_MODULE = "stillair.addin.xlfuncs"
PROJECT_NAME = "stillair"


def wanted_settings() -> dict[str, str]:
    return {"INTERPRETER_WIN": sys.executable, "UDF MODULES": UDF_MODULE}


def config_paths(home: Path) -> list[Path]:
    return [home / ".xlwings" / "xlwings.conf", home / f".{PROJECT_NAME}" / f"{PROJECT_NAME}.conf"]


def _read(path: Path) -> dict[str, str]:
    settings = {}
    if path.exists():
        for line in path.read_text(encoding="utf-8", errors="replace").splitlines():
            key, sep, value = line.partition(",")
            if sep:
                settings[key.strip().strip('"')] = value.strip().strip('"')
    return settings


def plan(path: Path, wanted: dict[str, str]) -> tuple[list[str], list[str]]:
    """(lines to append, conflicts kept as they are) for one config file."""
    existing = {k.upper(): v for k, v in _read(path).items()}
    additions, conflicts = [], []
    for key, value in wanted.items():
        if key.upper() not in existing:
            additions.append(f'"{key}","{value}"')
        elif existing[key.upper()] != value:
            conflicts.append(f'{key} is "{existing[key.upper()]}" (stillair would use "{value}")')
    return additions, conflicts


def apply(path: Path, additions: list[str]) -> Path | None:
    """Append the lines, backing up an existing file first; returns the backup path."""
    backup = None
    path.parent.mkdir(parents=True, exist_ok=True)
    if path.exists():
        backup = path.with_name(f"{path.name}.bak-{time.strftime('%Y%m%d-%H%M%S')}")
        shutil.copy2(path, backup)
        text = path.read_text(encoding="utf-8", errors="replace")
        if text and not text.endswith("\n"):
            text += "\n"
    else:
        text = ""
    path.write_text(text + "".join(line + "\n" for line in additions), encoding="utf-8")
    return backup


MANUAL_STEPS = f"""\
Remaining steps, in Windows Excel (they cannot be done from the command line):

Route A - functions inside one macro-enabled workbook (simplest):
  1. xlwings addin install            (installs the xlwings add-in into XLSTART)
  2. Excel: File > Options > Trust Center > Trust Center Settings > Macro Settings:
     tick "Trust access to the VBA project object model".
  3. Open or create a workbook, save it as .xlsm, and on the xlwings ribbon tab check that
     "UDF Modules" shows {UDF_MODULE} (it comes from the config), then click "Import Functions".
  4. Type =STILLAIR_VERSION() in a cell to check; the functions appear in the function wizard
     under the "stillair ..." categories.

Route B - functions in every workbook (custom add-in named {PROJECT_NAME}):
  1. In an empty folder: xlwings quickstart {PROJECT_NAME} --addin
     and delete the generated {PROJECT_NAME}.py (the functions come from {UDF_MODULE}).
  2. Open {PROJECT_NAME}.xlam in Excel with trust access to the VBA project enabled (as above),
     and run its "Import Functions" (ribbon button or the ImportPythonUDFsToAddin macro).
  3. Save the add-in, copy it to %APPDATA%\\Microsoft\\AddIns and tick it in
     File > Options > Add-ins > Manage: Excel Add-ins > Go.
  Workbooks saved with add-in calls store them as '{PROJECT_NAME}.xlam'!NAME(...) or [1]!NAME(...);
  `stillair calc` and `stillair audit` read those prefixes, so such files evaluate headlessly.
"""


def run(dry_run: bool = False, home: Path | None = None, out=sys.stdout) -> int:
    home = Path(home) if home is not None else Path(os.path.expanduser("~"))
    wanted = wanted_settings()
    for path in config_paths(home):
        additions, conflicts = plan(path, wanted)
        if additions:
            verb = "would add" if dry_run else "adding"
            print(f"{path}: {verb}:", file=out)
            for line in additions:
                print(f"    {line}", file=out)
            if not dry_run:
                backup = apply(path, additions)
                if backup is not None:
                    print(f"    (previous file kept as {backup})", file=out)
        else:
            print(f"{path}: nothing to add", file=out)
        for conflict in conflicts:
            print(f"    kept your setting: {conflict}; change it yourself if stillair should be "
                  "used", file=out)
    if not sys.platform.startswith("win"):
        print("Note: this is not Windows; INTERPRETER_WIN above points to this machine's Python. "
              "Run excel-setup again on the Windows machine that runs Excel.", file=out)
    print("", file=out)
    print(MANUAL_STEPS, file=out, end="")
    return 0
