"""``stillair libreoffice-setup``: build the LibreOffice extension and install it with unopkg.

* ``--oxt PATH`` only writes the extension file (never over an existing file).
* Otherwise the extension is installed with LibreOffice's own ``unopkg``: for the current user,
  or, when run as root (unopkg refuses a per-user install as root), as a shared extension for
  every user of the machine.  Only the extension ``org.stillair.calc`` is added or updated in
  place (``unopkg add --force``); other extensions and settings are not touched.
* Before installing, LibreOffice's own Python is asked to import stillair the way the extension
  will (the paths of this environment prepended); a failure stops the set-up with the reason.
* After installing, LibreOffice converts a small Excel workbook that calls our functions,
  headless (when it is not running on that profile), and the set-up checks the computed values.
  That is also the profile's first start with the extension, which LibreOffice needs before it
  rebinds the calls in the Excel workbooks a user opens.
* Run from a virtual environment, with LibreOffice on the distribution's Python, the set-up
  writes launchers (soffice, libreoffice, localc) into the environment's bin that put
  LibreOffice's Python first on PATH (launcher.py: the environment's python3 would hide
  python3-uno from LibreOffice), and verifies through them.  A shell that would still start
  LibreOffice on a foreign python3 gets a warning naming it.
"""

from __future__ import annotations

import functools
import os
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

from . import launcher
from .build import IDENTIFIER, ToolMissing, build_oxt, find_program_dir, python_paths

EXIT_PROBLEM = 2

_CHECK = """
import json, site, sys
setup = json.loads(sys.argv[1])
for directory in reversed(setup["paths"]):
    if directory in sys.path:
        sys.path.remove(directory)
    sys.path.insert(0, directory)
for directory in setup["site_dirs"]:
    site.addsitedir(directory)
import uno  # noqa: F401  (LibreOffice's Python bridge must be there)
from stillair.addin.cells.callpath import call
import stillair
print("%d.%d.%d" % sys.version_info[:3], stillair.__version__, stillair.__file__, call("AIR_DENSITY", 20.0))
"""


def libreoffice_environment(environ=None) -> dict:
    """The environment to start LibreOffice's programs with: without this virtual environment.

    LibreOffice's embedded Python takes the first python3 on PATH for itself (see launcher.py):
    a virtual environment's would hide python3-uno from it, so its folders go, and when another
    python3 still comes first, LibreOffice's Python's folder goes first.  PYTHONHOME and
    PYTHONPATH would mislead it too; the extension sets up its own paths."""
    env = dict(os.environ if environ is None else environ)
    venvs = {os.path.abspath(sys.prefix)} if sys.prefix != sys.base_prefix else set()
    if env.get("VIRTUAL_ENV"):
        venvs.add(os.path.abspath(env["VIRTUAL_ENV"]))
    for name in ("VIRTUAL_ENV", "VIRTUAL_ENV_PROMPT", "PYTHONHOME", "PYTHONPATH"):
        env.pop(name, None)

    def inside_venv(directory: str) -> bool:
        directory = os.path.abspath(directory)
        return (any(directory == v or directory.startswith(v + os.sep) for v in venvs)
                or os.path.isfile(os.path.join(os.path.dirname(directory), "pyvenv.cfg")))

    env["PATH"] = os.pathsep.join(d for d in env.get("PATH", "").split(os.pathsep)
                                  if d and not inside_venv(d))
    # Another Python first on PATH (pyenv's, conda's) would mislead it the same way.  Folders
    # are compared, not programs: a venv's python3 is a link to the very same program.
    python = _distribution_python()
    first = shutil.which("python3", path=env["PATH"])
    if python is not None and first is not None and \
            os.path.realpath(os.path.dirname(first)) != os.path.realpath(python.parent):
        env["PATH"] = os.pathsep.join([str(python.parent), env["PATH"]])
    return env


@functools.lru_cache(maxsize=1)
def _distribution_python() -> Path | None:
    """LibreOffice's Python when LibreOffice runs one from outside its own folder (a Linux
    distribution's python3-uno), which is when the first python3 on PATH matters."""
    try:
        program_dir = find_program_dir()
    except ToolMissing:
        return None
    python = libreoffice_python(program_dir)
    return python if python is not None and python.parent != program_dir else None


def libreoffice_python(program_dir: Path) -> Path | None:
    """The Python LibreOffice runs: its own (Windows, macOS, TDF builds) or the system's."""
    for name in ("python", "python.exe", "python3"):
        candidate = program_dir / name
        if candidate.is_file():
            return candidate
    for system_python in ("/usr/bin/python3", "/usr/local/bin/python3"):
        if os.path.isfile(system_python):
            return Path(system_python)
    return None


def check_import(program_dir: Path, paths: dict) -> tuple[bool, str]:
    """Can LibreOffice's Python import stillair from ``paths``?  (ok, one-line report)."""
    import json

    python = libreoffice_python(program_dir)
    if python is None:
        return False, "LibreOffice's Python was not found"
    version = subprocess.run([str(python), "-c", "import sys; print('%d.%d' % sys.version_info[:2])"],
                             capture_output=True, text=True, stdin=subprocess.DEVNULL, timeout=60,
                             env=libreoffice_environment()).stdout.strip()
    if version != paths["version"]:
        return False, (f"LibreOffice's Python ({python}) is Python {version or '?'}, this environment "
                       f"({paths['executable']}) is Python {paths['version']}: stillair's compiled "
                       f"dependencies (numpy, scipy, CoolProp) need the same version; run the set-up "
                       f"from a Python {version} environment")
    done = subprocess.run([str(python), "-c", _CHECK, json.dumps(paths)], capture_output=True,
                          text=True, stdin=subprocess.DEVNULL, timeout=120, cwd=tempfile.gettempdir(),
                          env=libreoffice_environment())
    if done.returncode != 0:
        last = (done.stderr.strip().splitlines() or ["no output"])[-1]
        if "No module named 'uno'" in done.stderr:
            last += " (on Debian or Ubuntu: apt-get install python3-uno libreoffice-script-provider-python)"
        return False, f"{python} cannot import stillair from {paths['executable']}: {last}"
    version, stillair_version, location, density = done.stdout.split()[:4]
    return True, (f"LibreOffice's Python {version} ({python}) imports stillair {stillair_version} "
                  f"from {Path(location).parent} (AIR_DENSITY(20) = {float(density):.6g})")


def _unopkg(program_dir: Path) -> Path:
    for candidate in (program_dir / "unopkg", program_dir / "unopkg.exe", program_dir / "unopkg.com"):
        if candidate.is_file():
            return candidate
    found = shutil.which("unopkg")
    if found:
        return Path(found)
    raise ToolMissing("LibreOffice's unopkg was not found")


def _url(path: str | Path) -> str:
    return Path(path).resolve().as_uri()


def _is_root() -> bool:
    return hasattr(os, "geteuid") and os.geteuid() == 0


def install_options(profile: str | None, shared_cache: str | None) -> tuple[list[str], str]:
    """unopkg/soffice options and a sentence saying where the extension goes."""
    options, where = [], ""
    if profile:
        options.append(f"-env:UserInstallation={_url(profile)}")
    shared = _is_root() or shared_cache is not None
    if shared:
        options.insert(0, "--shared")
        if shared_cache:
            options.append(f"-env:UNO_SHARED_PACKAGES_CACHE={_url(shared_cache)}")
            where = f"shared extension in {shared_cache} (isolated: only a LibreOffice started with the same cache sees it)"
        else:
            where = ("shared extension for every user of this machine (running as root: unopkg "
                     "refuses a per-user install as root)")
    else:
        where = f"extension of the current user ({profile or 'default LibreOffice profile'})"
    return options, where


def _installed(unopkg: Path, options: list[str]) -> bool:
    listing = subprocess.run([str(unopkg), "list", *options], capture_output=True, text=True,
                             stdin=subprocess.DEVNULL, timeout=300, env=libreoffice_environment())
    return f"Identifier: {IDENTIFIER}" in listing.stdout


def _profile_dir(profile: str | None) -> Path:
    if profile:
        return Path(profile)
    if sys.platform.startswith("win"):
        return Path(os.environ.get("APPDATA", "~")) / "LibreOffice" / "4"
    if sys.platform == "darwin":
        return Path("~/Library/Application Support/LibreOffice/4").expanduser()
    return Path(os.environ.get("XDG_CONFIG_HOME", "~/.config")).expanduser() / "libreoffice" / "4"


def verify(program_dir: Path, options: list[str], profile: str | None, out,
           soffice: Path | None = None) -> bool | None:
    """Open a small Excel workbook that calls our functions in headless LibreOffice and read
    the results back (True: computed, False: not, None: not tried).  ``soffice``: a launcher
    to start it with, in this process's own environment (what the user's shell will run).

    This is also the profile's first start with the extension: until LibreOffice has once
    loaded a document with the extension installed, Excel workbooks' calls are not rebound."""
    import csv

    import xlsxwriter

    if (_profile_dir(profile) / ".lock").exists():
        print("LibreOffice is running on this profile: not verified. Close LibreOffice and open "
              "a workbook once before opening Excel workbooks that call the functions.", file=out)
        return None
    env_options = [o for o in options if o.startswith("-env:")]
    with tempfile.TemporaryDirectory(prefix="stillair-lo-check-") as directory:
        book = Path(directory) / "check.xlsx"
        workbook = xlsxwriter.Workbook(str(book))
        sheet = workbook.add_worksheet()
        sheet.write_formula("A1", "=AIR_DENSITY(20)", None, 0)
        sheet.write_formula("B1", "=STILLAIR_VERSION()", None, "")
        workbook.close()
        subprocess.run([str(soffice or program_dir / "soffice"), *env_options, "--headless",
                        "--norestore", "--convert-to", "csv", "--outdir", directory, str(book)],
                       stdin=subprocess.DEVNULL, capture_output=True, timeout=600, cwd=directory,
                       env=dict(os.environ) if soffice else libreoffice_environment())
        result = Path(directory) / "check.csv"
        rows = list(csv.reader(result.open(encoding="utf-8", errors="replace"))) if result.exists() else []
    from ..cells.callpath import call

    expected = call("AIR_DENSITY", 20.0)
    try:
        computed = float(rows[0][0])
    except (IndexError, ValueError):
        computed = None
    if computed is not None and abs(computed - expected) <= 1e-9 * expected:
        print(f"Verified: LibreOffice opened an Excel workbook and computed AIR_DENSITY(20) = "
              f"{computed:.6g}, STILLAIR_VERSION() = {rows[0][1] if len(rows[0]) > 1 else '?'}", file=out)
        return True
    print(f"Not verified: LibreOffice did not compute the check workbook (got {rows[:1]!r}); open "
          "a workbook in LibreOffice once, then try again.", file=out)
    return False


def _launchers_needed(program_dir: Path) -> Path | None:
    """LibreOffice's Python, when the set-up runs from a virtual environment and LibreOffice
    runs a Python from outside its own folder (then the launchers are written)."""
    python = libreoffice_python(program_dir)
    if sys.prefix == sys.base_prefix or python is None or python.parent == program_dir:
        return None
    return python


def write_launchers(program_dir: Path, out) -> Path | None:
    """Run from a virtual environment, with LibreOffice on a Python outside its own folder (a
    distribution's): write the launchers into the environment's bin (launcher.py says why) and
    return the soffice one; None when not needed or not written."""
    python = _launchers_needed(program_dir)
    if python is None:
        return None
    written, refused = launcher.write_launchers(sys.prefix, python, program_dir)
    if written:
        print(f"Wrote {', '.join(p.name for p in written)} into {written[0].parent}: with this "
              f"environment active they start LibreOffice with its own Python ({python}) first "
              f"on PATH; this environment's python3 would otherwise hide LibreOffice's Python "
              f"bridge from it.", file=out)
    for path in refused:
        print(f"Not written: {path} exists and is not stillair's (never overwritten).", file=out)
    soffice = Path(sys.prefix) / "bin" / "soffice"
    return soffice if soffice in written else None


def run(dry_run: bool = False, oxt: str | None = None, profile: str | None = None,
        shared_cache: str | None = None, out=None) -> int:
    out = out or sys.stdout
    try:
        if oxt is not None:
            if os.path.exists(oxt):
                print(f"stillair libreoffice-setup: {oxt} exists; choose a new file name "
                      "(an existing file is never overwritten)", file=sys.stderr)
                return EXIT_PROBLEM
            if dry_run:
                print(f"would write the extension to {oxt}", file=out)
                return 0
            spec = build_oxt(Path(oxt))
            print(f"Wrote {oxt}: {len(spec['functions'])} functions, stillair {spec['stillair_version']}, "
                  f"Python paths of {spec['python']['executable']}", file=out)
            return 0

        program_dir = find_program_dir()
        unopkg = _unopkg(program_dir)
        paths = python_paths()
        ok, report = check_import(program_dir, paths)
        print(report, file=out)
        if not ok:
            print("stillair libreoffice-setup: nothing installed (the reason is above)", file=sys.stderr)
            return EXIT_PROBLEM
        options, where = install_options(profile, shared_cache)
        update = _installed(unopkg, options)
        verb = "update" if update else "install"
        if dry_run:
            print(f"would {verb} {IDENTIFIER} as a {where}", file=out)
            print(f"    {unopkg} add --force {' '.join(options)} stillair.oxt", file=out)
            if _launchers_needed(program_dir):
                print(f"would write {', '.join(launcher.LAUNCHERS)} into {Path(sys.prefix) / 'bin'} "
                      f"(a file of the same name that is not stillair's is kept)", file=out)
            return 0
        with tempfile.TemporaryDirectory(prefix="stillair-lo-") as directory:
            path = Path(directory) / "stillair.oxt"
            spec = build_oxt(path)
            done = subprocess.run([str(unopkg), "add", "--force", *options, str(path)],
                                  capture_output=True, text=True, stdin=subprocess.DEVNULL, timeout=600,
                                  env=libreoffice_environment())
        if done.returncode != 0:
            print(f"stillair libreoffice-setup: unopkg failed: {(done.stderr or done.stdout).strip()[:800]}",
                  file=sys.stderr)
            return EXIT_PROBLEM
        print(f"{'Updated' if update else 'Installed'} {IDENTIFIER} {spec['stillair_version']} "
              f"({len(spec['functions'])} functions) as a {where}", file=out)
        started_by = write_launchers(program_dir, out)
        if verify(program_dir, options, profile, out, soffice=started_by) is False:
            return EXIT_PROBLEM
        print("In LibreOffice Calc the functions are listed under the Add-In category of the "
              "Function Wizard; Excel workbooks (.xlsx) that call them are rebound when opened.", file=out)
        python = libreoffice_python(program_dir)   # found: check_import ran it
        warning = python and launcher.shell_report(python, program_dir, dict(os.environ),
                                                   shutil.which)
        if warning:
            print(warning, file=out)
        return 0
    except (ToolMissing, FileExistsError) as error:
        print(f"stillair libreoffice-setup: {error}", file=sys.stderr)
        return EXIT_PROBLEM
