"""The wheel does the whole job: built from the source, installed into a fresh virtual
environment outside the checkout, and used from a folder of the user's own that holds files
named engine.py and addin.py (which must not be imported).

This is the slowest test module (about 25 s here): installing numpy, scipy, CoolProp and the
other run-time dependencies into a new environment takes most of it, even from pip's cache.
It is kept as fast as it can be: one build and one environment for the whole module, the
wheel built with the already-installed setuptools (no build isolation, so nothing to download),
pip's wheel cache for the dependencies, no byte-compiling at install time, and the outer pip
driving the new environment (``pip --python``) instead of bootstrapping pip into it.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import tarfile
import zipfile
from importlib.metadata import PackageNotFoundError, version
from pathlib import Path

import pytest

import stillair

pytestmark = pytest.mark.slow  # builds and installs the wheel in a fresh environment

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE_NAMES = sorted(p.name for p in (ROOT / "templates").glob("*.xlsx"))
_NOT_SOURCE = shutil.ignore_patterns(".venv*", ".git", "__pycache__", "*.egg-info", "build", "dist",
                                     ".pytest_cache", ".hypothesis", ".benchmarks")
# A user's own modules with the generic names the project's folders have: importing either
# would be a bug (xlwings puts a workbook's folder on the import path).
_DECOY = 'raise ImportError("the user\'s own {name}.py was imported instead of stillair")\n'


def _setuptools_version() -> tuple[int, ...]:
    try:
        return tuple(int(p) for p in version("setuptools").split(".")[:2] if p.isdigit())
    except PackageNotFoundError:
        return (0,)


def _clean_env(**extra) -> dict:
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "PYTHONHOME", "VIRTUAL_ENV")}
    env.update(extra)
    return env


def _run(args, cwd=None, timeout=600, **extra_env) -> subprocess.CompletedProcess:
    return subprocess.run([str(a) for a in args], cwd=cwd, capture_output=True, text=True,
                          encoding="utf-8", errors="replace", env=_clean_env(**extra_env),
                          timeout=timeout)


def _check(done: subprocess.CompletedProcess) -> subprocess.CompletedProcess:
    assert done.returncode == 0, f"{done.args}\n{done.stdout}\n{done.stderr}"
    return done


@pytest.fixture(scope="module")
def dist(tmp_path_factory) -> dict[str, Path]:
    """The wheel and the sdist, built from a copy of the source (nothing is written into the
    checkout, which other test runs may be reading)."""
    base = tmp_path_factory.mktemp("build")
    source = base / "source"
    shutil.copytree(ROOT, source, ignore=_NOT_SOURCE)
    out = base / "dist"
    out.mkdir()
    if _setuptools_version() >= (77,):
        hooks = ("import sys; from setuptools import build_meta as b; out = sys.argv[1]; "
                 "b.build_wheel(out); b.build_sdist(out)")  # setuptools rewrites sys.argv
        _check(_run([sys.executable, "-c", hooks, out], cwd=source))
    else:  # an environment without the test extra's setuptools: isolated build, wheel only
        _check(_run([sys.executable, "-m", "pip", "wheel", "-q", "--no-deps", "-w", out, source]))
    wheels, sdists = list(out.glob("*.whl")), list(out.glob("*.tar.gz"))
    assert len(wheels) == 1
    return {"wheel": wheels[0], "sdist": sdists[0] if sdists else None}


@pytest.fixture(scope="module")
def installed(dist, tmp_path_factory) -> dict[str, Path]:
    """A fresh virtual environment outside the checkout with the wheel installed, and a user
    folder holding engine.py and addin.py."""
    base = tmp_path_factory.mktemp("wheel-env")
    venv = base / "venv"
    bindir = venv / ("Scripts" if os.name == "nt" else "bin")
    python = bindir / ("python.exe" if os.name == "nt" else "python")
    install = ["install", "-q", "--no-compile", "--disable-pip-version-check", dist["wheel"]]
    _check(_run([sys.executable, "-m", "venv", "--without-pip", venv]))
    done = _run([sys.executable, "-m", "pip", "--python", python, *install])
    if done.returncode != 0 and "no such option: --python" in done.stderr:  # pip older than 22.3
        _check(_run([sys.executable, "-m", "venv", "--clear", venv]))
        done = _run([python, "-m", "pip", *install])
    _check(done)
    user = base / "user-folder"
    user.mkdir()
    for name in ("engine", "addin"):
        (user / f"{name}.py").write_text(_DECOY.format(name=name))
    script = bindir / ("stillair.exe" if os.name == "nt" else "stillair")
    return {"python": python, "stillair": script, "user": user}


def test_wheel_holds_one_package_with_templates_and_gas_tables(dist):
    with zipfile.ZipFile(dist["wheel"]) as wheel:
        names = wheel.namelist()
    tops = {n.split("/")[0] for n in names if not n.split("/")[0].endswith(".dist-info")}
    assert tops == {"stillair"}                       # no generic engine/, addin/, templates/
    assert "stillair/data/gas_tables.npz" in names and "stillair/py.typed" in names
    assert sorted(n.split("/")[-1] for n in names if n.startswith("stillair/templates/")
                  and n.endswith(".xlsx")) == TEMPLATE_NAMES
    assert any(n.endswith(".dist-info/licenses/LICENSE") for n in names)


def test_sdist_holds_templates_and_gas_tables(dist):
    if dist["sdist"] is None:
        pytest.skip("setuptools >= 77 (the test extra) is needed to build the sdist here")
    with tarfile.open(dist["sdist"]) as sdist:
        names = {"/".join(n.split("/")[1:]) for n in sdist.getnames()}
    assert "engine/data/gas_tables.npz" in names and "LICENSE" in names
    assert {f"templates/{n}" for n in TEMPLATE_NAMES} <= names
    assert "tests/template_support.py" in names and "DEVELOPERS.md" in names


def _in_user_folder(installed, *args) -> subprocess.CompletedProcess:
    """Run from the user's folder with that folder also on the import path, as xlwings puts a
    workbook's folder there: its engine.py and addin.py must still not be imported."""
    return _run(args, cwd=installed["user"], PYTHONPATH=str(installed["user"]))


def test_installed_outside_the_checkout(installed):
    done = _check(_in_user_folder(installed, installed["python"], "-c",
                                  "import stillair, stillair.addin.cli as c; "
                                  "print(stillair.__file__); print(stillair.__version__)"))
    where, installed_version = done.stdout.split()
    assert Path(where).is_relative_to(installed["python"].parents[1])
    assert not Path(where).is_relative_to(ROOT)
    assert installed_version == stillair.__version__


def test_main_job(installed):
    done = _check(_in_user_folder(installed, installed["python"], "-m", "stillair"))
    assert "heat through the partition" in done.stdout and done.stderr == ""


def test_version(installed):
    done = _check(_in_user_folder(installed, installed["stillair"], "--version"))
    assert done.stdout.strip() == f"stillair {stillair.__version__}"


def test_templates_copy_calc_and_audit(installed):
    user, command = installed["user"], installed["stillair"]
    listed = _check(_in_user_folder(installed, command, "templates")).stdout.splitlines()
    assert listed[0].startswith("Templates in ") and listed[-1].startswith("Next: ")
    assert sorted(line.split()[0] for line in listed[1:-1]) == TEMPLATE_NAMES
    _check(_in_user_folder(installed, command, "templates", "--copy", "work"))
    copied = user / "work"
    assert sorted(p.name for p in copied.iterdir()) == TEMPLATE_NAMES
    calc = _check(_in_user_folder(installed, command, "calc", copied / "sealed-cabinet.xlsx"))
    assert "Internal air temperature" in calc.stdout and "Traceback" not in calc.stderr
    audit = _in_user_folder(installed, command, "audit", copied / "air-layer.xlsx")
    assert audit.returncode == 0, audit.stdout + audit.stderr   # an untouched template is clean
    assert "no findings" in audit.stdout


def test_every_library_the_package_imports_is_a_declared_dependency():
    """A library imported by engine/ or addin/ at run time must be in [project] dependencies,
    not only installed as a dependency of a dependency or by the test extra."""
    import ast
    import re
    from importlib.metadata import packages_distributions

    tomllib = pytest.importorskip("tomllib")  # Python >= 3.11
    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    declared = {re.split(r"[<>=!~ ;\[]", d, maxsplit=1)[0].lower().replace("_", "-")
                for d in project["dependencies"]}
    imported = set()
    for folder in ("engine", "addin"):
        for path in (ROOT / folder).rglob("*.py"):
            for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
                if isinstance(node, ast.Import):
                    imported |= {alias.name.split(".")[0] for alias in node.names}
                elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                    imported.add(node.module.split(".")[0])
    # The LibreOffice component runs inside LibreOffice's own Python, which provides the UNO
    # bridge (python3-uno) and the types of our own extension (org.stillair...): those modules
    # are the host's, not ours to declare.
    host_provided = {"uno", "unohelper", "com", "org"}
    third_party = imported - set(sys.stdlib_module_names) - {"stillair", "__future__"} - host_provided
    distributions = packages_distributions()
    for module in sorted(third_party):
        names = {d.lower().replace("_", "-") for d in distributions.get(module, [module])}
        assert names & declared, f"{module} is imported but not declared in pyproject.toml"
