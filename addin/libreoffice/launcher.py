"""Starting LibreOffice from a shell whose first ``python3`` on PATH is not LibreOffice's Python.

Why this exists (measured on Debian 12, LibreOffice 7.4 with python3-uno, Python 3.11):
LibreOffice on a Linux distribution runs the system's Python as a library, and its Python loader
(pyuno_loader.cxx) starts the interpreter without a program name or a home: the distribution's
pythonloader.unorc sets no PYUNO_LOADER_PYTHONHOME.  CPython then resolves its default program
name ``python3`` against PATH (Modules/getpath.py, "Resolve names against PATH") and takes the
program it finds for itself.  With a virtual environment's bin first on PATH that is the
environment's python3: getpath reads its pyvenv.cfg (the standard library of the environment's
base Python, another build) and site.py makes the environment sys.prefix, so the distribution's
dist-packages, where python3-uno's ``uno`` module lives, is not on sys.path.  pythonloader.py
stops at ``import uno``, no Python component can be created, and once our extension is installed
the first document LibreOffice opens fails to load (headless: "Error: source file could not be
loaded", exit status 0) and the functions are missing in the others.  PYTHONHOME=/usr does not
help: site.py still finds the pyvenv.cfg beside the python3 found on PATH.

The remedy is a folder holding one entry, ``python3`` -> LibreOffice's Python, first on the PATH
LibreOffice starts with; the rest of the user's PATH stays as it is.  The set-up, run from a
virtual environment, writes launchers (``soffice``, ``libreoffice``, ``localc``) into that
environment's bin, so the very shell that would fail starts LibreOffice through them.
"""

from __future__ import annotations

import os
import shlex
import subprocess
from dataclasses import dataclass
from pathlib import Path

MARK = "# written by stillair libreoffice-setup"
# name on PATH -> the options it passes to LibreOffice's soffice (Debian's localc adds --calc)
LAUNCHERS = {"soffice": (), "libreoffice": (), "localc": ("--calc",)}

_PROBE = "import sys; print(sys.executable); print(sys.prefix); import uno"


@dataclass(frozen=True)
class Probe:
    """What LibreOffice's Python becomes when LibreOffice starts in a given environment."""

    ok: bool
    executable: str   # the python3 that CPython took itself for
    prefix: str       # the sys.prefix that followed from it
    error: str        # the last line of the failure ('' when ok)


def probe(python: Path, program_dir: Path, environ: dict) -> Probe:
    """Start LibreOffice's Python the way LibreOffice's Python loader does, in ``environ``.

    A bare program name (no folder) makes CPython look ``python3`` up on PATH exactly as the
    embedded interpreter does, and LibreOffice's program folder goes first on PYTHONPATH as the
    loader puts it; the probe then imports ``uno`` as pythonloader.py does first."""
    env = dict(environ)
    env["PYTHONPATH"] = os.pathsep.join(p for p in (str(program_dir), env.get("PYTHONPATH")) if p)
    done = subprocess.run(["python3", "-c", _PROBE], executable=str(python), env=env,
                          capture_output=True, text=True, stdin=subprocess.DEVNULL, timeout=60,
                          cwd=str(program_dir))
    lines = done.stdout.splitlines() + ["", ""]
    error = (done.stderr.strip().splitlines() or [""])[-1] if done.returncode else ""
    return Probe(done.returncode == 0, lines[0], lines[1], error)


def python_folder(prefix: str | Path) -> Path:
    """The folder whose only entry is ``python3`` -> LibreOffice's Python.  It must not hold a
    pyvenv.cfg, nor its parent (CPython looks for one beside and above the program it found)."""
    return Path(prefix) / "share" / "stillair" / "libreoffice-python"


def launcher_text(folder: Path, soffice: Path, options: tuple[str, ...]) -> str:
    extra = "".join(f" {shlex.quote(o)}" for o in options)
    return (f"#!/bin/sh\n{MARK}: LibreOffice with its own Python first on PATH\n"
            f"# (this environment's python3 would take its place: see stillair's README, LibreOffice).\n"
            f"PATH={shlex.quote(str(folder))}:\"$PATH\" exec {shlex.quote(str(soffice))}{extra} \"$@\"\n")


def is_ours(path: Path) -> bool:
    try:
        return MARK in path.read_text(encoding="utf-8", errors="replace")[:400]
    except OSError:
        return False


def write_launchers(prefix: str | Path, python: Path, program_dir: Path) -> tuple[list[Path], list[Path]]:
    """Write the launchers into ``prefix``/bin and the python3 link they put first on PATH.

    A file of the same name that is not ours is never overwritten: it is returned as refused.
    Returns (written, refused)."""
    folder = python_folder(prefix)
    folder.mkdir(parents=True, exist_ok=True)
    link = folder / "python3"
    if link.is_symlink() or link.exists():
        link.unlink()
    link.symlink_to(python)
    written, refused = [], []
    for name, options in LAUNCHERS.items():
        target = Path(prefix) / "bin" / name
        if target.exists() and not is_ours(target):
            refused.append(target)
            continue
        target.write_text(launcher_text(folder, program_dir / "soffice", options), encoding="utf-8")
        target.chmod(0o755)
        written.append(target)
    return written, refused


def shell_report(python: Path, program_dir: Path, environ: dict, which) -> str | None:
    """None when LibreOffice started from this environment loads its Python bridge, or starts
    through our launcher; otherwise a warning that says why and how to start it instead.
    ``which(name)`` finds a program on this environment's PATH (shutil.which)."""
    found = probe(python, program_dir, environ)
    if found.ok:
        return None
    soffice = which("soffice")
    if soffice and is_ours(Path(soffice)):
        return None
    return (f"WARNING: a LibreOffice started from this shell cannot load its Python bridge, so it "
            f"fails to open the first document and the functions are missing: LibreOffice's Python "
            f"({python}) takes the first python3 on PATH, {found.executable}, for itself, "
            f"which makes {found.prefix} its prefix ({found.error}). Start it as "
            f"PATH={python.parent}:\"$PATH\" soffice ..., or remove {Path(found.executable).parent} "
            f"from PATH first.")
