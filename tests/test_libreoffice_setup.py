"""`stillair libreoffice-setup` and the extension's generated parts, without LibreOffice."""

from __future__ import annotations

import os
import re
import sysconfig
from pathlib import Path

import pytest

from stillair.addin.cli import main
from stillair.addin.libreoffice import launcher, setup
from stillair.addin.libreoffice.build import function_spec, idl_source, python_paths
from stillair.addin.cells.registry import REGISTRY
from stillair.addin.cells.registry import arg_doc


def test_oxt_never_overwrites_an_existing_file(tmp_path, capsys):
    target = tmp_path / "mine.oxt"
    target.write_bytes(b"the user's file")
    assert main(["libreoffice-setup", "--oxt", str(target)]) == 2
    assert target.read_bytes() == b"the user's file"
    assert capsys.readouterr().err == (f"stillair libreoffice-setup: {target} exists; choose a new file "
                                       "name (an existing file is never overwritten)\n")


def test_idl_has_one_method_per_cell_function():
    idl = idl_source()
    spec = {f["name"]: f for f in function_spec()["functions"]}
    methods = re.findall(r"^\s+(any|sequence< sequence< any > >) (\w+)\(([^)]*)\);$", idl, re.M)
    assert [name for _, name, _ in methods] == [f.name for f in REGISTRY]
    for (kind, name, args), entry in zip(methods, REGISTRY):
        # a table, or an array when a numeric argument is a range (a single value as a 1x1 one)
        may_be_array = entry.result == "table" or entry.takes_arrays
        assert kind == ("sequence< sequence< any > >" if may_be_array else "any"), name
        assert spec[name]["array_result"] == may_be_array, name  # the component shapes results by it
        # Calc shows an argument declared any as optional: required ones are mixed arrays
        declared = [a.strip().rsplit(" ", 1)[0] for a in args.split(", ")] if args else []
        assert declared == [("[in] any" if a.optional else "[in] sequence< sequence< any > >")
                            for a in entry.args], name


def test_wizard_texts_come_from_the_registry():
    spec = function_spec()
    assert [f["name"] for f in spec["functions"]] == [f.name for f in REGISTRY]
    for shown, entry in zip(spec["functions"], REGISTRY):
        assert shown["description"] == f"[{entry.category}] {entry.description}"
        assert [(a["name"], a["doc"], a["optional"], a["kind"]) for a in shown["args"]] == [
            (a.name, arg_doc(a), a.optional, a.kind) for a in entry.args]


def test_recorded_paths_are_site_folders_not_the_standard_library():
    paths = python_paths()
    assert sysconfig.get_paths()["purelib"] in paths["site_dirs"]
    assert sysconfig.get_paths()["stdlib"] not in paths["paths"]
    assert paths["version"].count(".") == 1


def test_libreoffice_starts_without_the_virtual_environment(tmp_path):
    venv = tmp_path / "venv"
    (venv / "bin").mkdir(parents=True)
    (venv / "pyvenv.cfg").write_text("home = /somewhere\n")
    tools = tmp_path / "tools"      # a folder without a python3: nothing is put before it
    env = setup.libreoffice_environment({
        "PATH": f"{venv / 'bin'}:{tools}", "VIRTUAL_ENV": str(venv),
        "PYTHONPATH": "/x", "PYTHONHOME": "/y", "HOME": "/home/someone"})
    assert env["PATH"] == str(tools)
    assert not {"VIRTUAL_ENV", "PYTHONPATH", "PYTHONHOME"} & set(env)
    assert env["HOME"] == "/home/someone"


@pytest.mark.parametrize("root", [False, True])
def test_root_installs_shared_and_a_user_installs_for_himself(monkeypatch, root):
    monkeypatch.setattr(setup, "_is_root", lambda: root)
    options, where = setup.install_options(None, None)
    assert options == (["--shared"] if root else [])
    assert ("every user" in where) == root
    options, where = setup.install_options("/p", "/c")
    assert options == ["--shared", "-env:UserInstallation=file:///p", "-env:UNO_SHARED_PACKAGES_CACHE=file:///c"]


# LibreOffice's Python as a distribution ships it (Debian: /usr/bin/python3 with python3-uno)
SYSTEM_PYTHON = Path("/usr/bin/python3")
PROGRAM_DIR = Path("/usr/lib/libreoffice/program")
needs_system_uno = pytest.mark.skipif(
    not (SYSTEM_PYTHON.is_file() and (PROGRAM_DIR / "pythonloader.py").is_file()),
    reason="needs LibreOffice on the system Python (Debian/Ubuntu: apt-get install "
           "libreoffice-calc python3-uno libreoffice-script-provider-python)")


def fake_venv(where: Path) -> Path:
    """A virtual environment as `python -m venv` lays it out, on the system's Python."""
    (where / "bin").mkdir(parents=True)
    (where / "bin" / "python3").symlink_to(SYSTEM_PYTHON)
    (where / "pyvenv.cfg").write_text(f"home = {SYSTEM_PYTHON.parent}\ninclude-system-site-packages = false\n")
    return where


@needs_system_uno
def test_a_venv_first_on_path_hides_uno_from_libreoffices_python(tmp_path):
    """The root cause, measured: started as LibreOffice starts it, its Python takes the first
    python3 on PATH for itself; a venv's makes the venv its prefix and python3-uno's module is
    gone.  PYTHONHOME does not help (site.py still reads the venv's pyvenv.cfg); LibreOffice's
    Python first on PATH does."""
    venv = fake_venv(tmp_path / "venv")
    shell = {"PATH": f"{venv / 'bin'}:/usr/bin:/bin", "VIRTUAL_ENV": str(venv)}
    found = launcher.probe(SYSTEM_PYTHON, PROGRAM_DIR, shell)
    assert (found.ok, found.executable, found.prefix) == (False, str(venv / "bin" / "python3"), str(venv))
    assert found.error == "ModuleNotFoundError: No module named 'uno'"
    assert not launcher.probe(SYSTEM_PYTHON, PROGRAM_DIR, dict(shell, PYTHONHOME="/usr")).ok
    launcher.write_launchers(venv, SYSTEM_PYTHON, PROGRAM_DIR)
    folder = launcher.python_folder(venv)
    fixed = launcher.probe(SYSTEM_PYTHON, PROGRAM_DIR, dict(shell, PATH=f"{folder}:{shell['PATH']}"))
    assert (fixed.ok, fixed.prefix, fixed.error) == (True, "/usr", "")
    assert launcher.probe(SYSTEM_PYTHON, PROGRAM_DIR, {"PATH": "/usr/bin:/bin"}).ok


def test_launchers_put_libreoffices_python_first_and_keep_a_foreign_file(tmp_path):
    venv = tmp_path / "venv"
    (venv / "bin").mkdir(parents=True)
    mine = venv / "bin" / "libreoffice"
    mine.write_text("#!/bin/sh\necho the user's own\n")
    python, program = Path("/opt/lo-python/python3"), Path("/opt/lo/program")
    written, refused = launcher.write_launchers(venv, python, program)
    assert [p.name for p in written] == ["soffice", "localc"] and refused == [mine]
    assert mine.read_text() == "#!/bin/sh\necho the user's own\n"
    folder = venv / "share" / "stillair" / "libreoffice-python"
    assert os.readlink(folder / "python3") == str(python)
    assert not (folder / "pyvenv.cfg").exists() and not (folder.parent / "pyvenv.cfg").exists()
    assert (venv / "bin" / "localc").read_text().splitlines()[-1] == (
        f'PATH={folder}:"$PATH" exec /opt/lo/program/soffice --calc "$@"')
    assert os.access(venv / "bin" / "soffice", os.X_OK)
    # a second set-up rewrites its own launchers (another LibreOffice or Python now), never the user's
    written, refused = launcher.write_launchers(venv, Path("/usr/bin/python3"), program)
    assert [p.name for p in written] == ["soffice", "localc"] and refused == [mine]
    assert os.readlink(folder / "python3") == "/usr/bin/python3"


@needs_system_uno
def test_a_shell_not_covered_by_a_launcher_gets_a_warning_naming_its_python3(tmp_path):
    venv = fake_venv(tmp_path / "venv")
    shell = {"PATH": f"{venv / 'bin'}:/usr/bin:/bin"}
    warning = launcher.shell_report(SYSTEM_PYTHON, PROGRAM_DIR, shell, lambda name: None)
    assert warning.startswith("WARNING: a LibreOffice started from this shell cannot load its Python bridge")
    assert f"the first python3 on PATH, {venv}/bin/python3, for itself, which makes {venv} its prefix" in warning
    assert f'Start it as PATH={SYSTEM_PYTHON.parent}:"$PATH" soffice' in warning
    launcher.write_launchers(venv, SYSTEM_PYTHON, PROGRAM_DIR)
    assert launcher.shell_report(SYSTEM_PYTHON, PROGRAM_DIR, shell, lambda name: str(venv / "bin" / name)) is None
    assert launcher.shell_report(SYSTEM_PYTHON, PROGRAM_DIR, {"PATH": "/usr/bin:/bin"}, lambda name: None) is None


@needs_system_uno
def test_our_own_libreoffice_runs_put_its_python_first_past_any_other_python(tmp_path):
    """Not only a venv: any other python3 first on PATH (pyenv's, conda's) takes LibreOffice's
    Python's place.  The environment every LibreOffice program of ours starts with puts
    LibreOffice's Python's folder first then, and the probe shows uno importable again."""
    # another installation's python3, not recognised as a venv by its folder (CPython reads a
    # pyvenv.cfg beside the program too), whose prefix is not LibreOffice's
    other = tmp_path / "other" / "bin"
    other.mkdir(parents=True)
    (other / "python3").symlink_to(SYSTEM_PYTHON)
    (other / "pyvenv.cfg").write_text("home = /usr/bin\ninclude-system-site-packages = false\n")
    shell = {"PATH": f"{other}:/usr/bin:/bin", "HOME": "/home/someone"}
    assert not launcher.probe(SYSTEM_PYTHON, PROGRAM_DIR, shell).ok
    env = setup.libreoffice_environment(shell)
    assert env["PATH"] == f"{SYSTEM_PYTHON.parent}:{other}:/usr/bin:/bin"
    assert launcher.probe(SYSTEM_PYTHON, PROGRAM_DIR, env).ok
    # LibreOffice's Python already first: PATH is left as it is
    assert setup.libreoffice_environment({"PATH": "/usr/bin:/bin"})["PATH"] == "/usr/bin:/bin"


@needs_system_uno
def test_the_setup_run_from_a_venv_writes_the_launchers_and_says_so(tmp_path, monkeypatch):
    import io
    import sys

    venv = fake_venv(tmp_path / "venv")
    (venv / "bin" / "localc").write_text("mine\n")
    monkeypatch.setattr(sys, "prefix", str(venv))
    out = io.StringIO()
    assert setup.write_launchers(PROGRAM_DIR, out) == venv / "bin" / "soffice"
    lines = out.getvalue().splitlines()
    assert lines[0].startswith(f"Wrote soffice, libreoffice into {venv / 'bin'}: with this "
                               f"environment active they start LibreOffice with its own Python "
                               f"({SYSTEM_PYTHON}) first on PATH")
    assert lines[1] == f"Not written: {venv / 'bin' / 'localc'} exists and is not stillair's (never overwritten)."
    assert (venv / "bin" / "localc").read_text() == "mine\n"
    # not from a virtual environment: nothing is written
    monkeypatch.setattr(sys, "prefix", sys.base_prefix)
    assert setup.write_launchers(PROGRAM_DIR, io.StringIO()) is None
