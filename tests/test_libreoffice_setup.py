"""`stillair libreoffice-setup` and the extension's generated parts, without LibreOffice."""

from __future__ import annotations

import re
import sysconfig

import pytest

from stillair.addin.cli import main
from stillair.addin.libreoffice import setup
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
    env = setup.libreoffice_environment({
        "PATH": f"{venv / 'bin'}:/usr/local/bin:/usr/bin", "VIRTUAL_ENV": str(venv),
        "PYTHONPATH": "/x", "PYTHONHOME": "/y", "HOME": "/home/someone"})
    assert env["PATH"] == "/usr/local/bin:/usr/bin"
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


def test_setup_warns_when_run_from_an_activated_virtual_environment():
    """LibreOffice started with a virtual environment first on PATH takes that environment's
    standard library and silently fails to load documents: the set-up says so, loudly."""
    from stillair.addin.libreoffice.setup import virtual_environment_warning
    venv = "/home/u/proj/.venv"
    env = {"PATH": f"{venv}/bin:/usr/bin:/bin", "VIRTUAL_ENV": venv}
    warning = virtual_environment_warning(env, prefix=venv, base_prefix="/usr")
    assert warning.startswith("WARNING") and venv in warning and "deactivate" in warning
    assert virtual_environment_warning({"PATH": "/usr/bin"}, prefix="/usr", base_prefix="/usr") is None
    assert virtual_environment_warning({"PATH": "/usr/bin:/bin"}, prefix=venv,
                                       base_prefix="/usr") is None
