"""The type checker (mypy, configured in pyproject's [tool.mypy]) over the engine and the public
API, and over the spreadsheet layer (addin/) at its recorded level: no errors.  A failure prints
mypy's own report.

The source folders install as one package under another name (engine/ is ``stillair``, addin/ is
``stillair.addin``), which a type checker cannot see from the folders, and an editable install
maps them with an import hook it does not follow.  So the checks run on a tree of links that lays
the folders out as the installed package: the files checked are the working copy's own.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
CONFIG = ROOT / "pyproject.toml"

pytest.importorskip("mypy", reason="mypy is in the test extra: pip install -e '.[test]'")


def package_tree(target: Path) -> Path:
    """``target/stillair``: links to engine/'s files, with addin/ and templates/ as its
    sub-packages, as the installed package lays them out.  Returns ``target``."""
    package = target / "stillair"
    package.mkdir(parents=True)
    for entry in (ROOT / "engine").iterdir():
        if entry.name != "__pycache__":
            (package / entry.name).symlink_to(entry)
    (package / "addin").symlink_to(ROOT / "addin")
    (package / "templates").symlink_to(ROOT / "templates")
    return target


def run_mypy(tree: Path, *arguments: str) -> subprocess.CompletedProcess:
    environment = dict(os.environ, MYPYPATH=str(tree))
    return subprocess.run([sys.executable, "-m", "mypy", "--config-file", str(CONFIG), "--no-incremental",
                           *arguments], capture_output=True, text=True, cwd=tree, env=environment, timeout=600)


@pytest.mark.slow
def test_the_engine_and_the_public_api_type_check(tmp_path):
    tree = package_tree(tmp_path)
    usage = tmp_path / "typing_public_api.py"
    usage.write_text((ROOT / "tests" / "typing_public_api.py").read_text(encoding="utf-8"), encoding="utf-8")
    done = run_mypy(tree, "-p", "stillair", "--exclude", "stillair/addin", "-m", usage.stem)
    assert done.returncode == 0, done.stdout + done.stderr
    assert "Success: no issues found" in done.stdout


@pytest.mark.slow
def test_a_missing_public_name_is_caught(tmp_path):
    """The check above can fail: a name the package does not define is reported."""
    tree = package_tree(tmp_path)
    usage = tmp_path / "misuse.py"
    usage.write_text("import stillair\nstillair.gas_densty('air', 20.0)\n", encoding="utf-8")
    done = run_mypy(tree, "-m", usage.stem)
    assert done.returncode == 1
    assert 'Module has no attribute "gas_densty"' in done.stdout


# The spreadsheet layer's level (DEVELOPERS.md "Type checking"): the pyproject override for
# stillair.addin sets exactly this, so loosening it (ignore_errors, more switches off) fails here.
ADDIN_LEVEL = {"module": ["stillair.addin", "stillair.addin.*"], "check_untyped_defs": False}


def test_the_spreadsheet_layer_level_is_the_recorded_one():
    tomllib = pytest.importorskip("tomllib", reason="tomllib is in Python 3.11+")
    overrides = tomllib.loads(CONFIG.read_text(encoding="utf-8"))["tool"]["mypy"]["overrides"]
    addin = [o for o in overrides if any(m.startswith("stillair.addin") for m in o["module"])]
    assert addin == [ADDIN_LEVEL]


@pytest.mark.slow
def test_the_spreadsheet_layer_type_checks(tmp_path):
    """addin/ (cell functions, workbook, audit, templates, the LibreOffice component) at the
    recorded level: annotated functions checked in full, unannotated ones' bodies skipped."""
    tree = package_tree(tmp_path)
    done = run_mypy(tree, "-p", "stillair.addin")
    assert done.returncode == 0, done.stdout + done.stderr
    assert "Success: no issues found" in done.stdout
