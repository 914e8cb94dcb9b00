"""The development install is the one the README's commands make, and nothing in the working
directory shadows it.

`git clone` makes a folder named after the repository; started from its parent, Python used to
find that folder as a namespace package `stillair` before setuptools' editable finder, so
`import stillair` gave an empty module.  The README's commands use setuptools' strict editable
mode: a link tree on an ordinary path entry, which a regular package wins over a namespace
folder and which static tools (type checkers, IDEs) resolve as they resolve any installed
package.
"""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

import stillair

ROOT = Path(__file__).resolve().parents[1]


def test_a_folder_named_stillair_in_the_working_directory_does_not_shadow_the_package(tmp_path):
    (tmp_path / "stillair" / "engine").mkdir(parents=True)   # what `git clone` leaves there
    (tmp_path / "stillair" / "README.md").write_text("a clone\n")
    probe = ("import stillair; print(stillair.__file__); "
             "print(stillair.air_density(20.0))")
    run = subprocess.run([sys.executable, "-c", probe], cwd=tmp_path, capture_output=True,
                         text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    where, density = run.stdout.split()
    assert Path(where).resolve() == Path(stillair.__file__).resolve()
    assert abs(float(density) - stillair.air_density(20.0)) == 0.0


def test_the_readme_and_ci_install_in_strict_editable_mode():
    strict = "pip install --config-settings editable_mode=strict -e"
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8")
    installs = re.findall(r"pip install [^&\n]*-e [^&\n]*", readme.split("### Windows")[0])
    assert installs and all(line.startswith(strict) for line in installs), installs
    assert f"{strict} '.[test]' && python -m pytest -q" in ci
