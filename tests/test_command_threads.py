"""The `stillair` command runs one BLAS thread (its matrix products are small; idle OpenBLAS
threads only spun beside them), unless the user chose a count; a program that imports stillair
keeps numpy's own threads.  Each case is a fresh process, as numpy reads the count when it loads."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest

_REPORT = ("import os, stillair\n"
           "tasks = len(os.listdir('/proc/self/task')) if os.path.isdir('/proc/self/task') else -1\n"
           "print(os.environ.get('OPENBLAS_NUM_THREADS'), tasks)\n")


def _run(tmp_path, argv0: str, **env) -> tuple[str, int]:
    script = tmp_path / argv0       # run as a file of this name: sys.argv[0], as a console script has it
    script.write_text(_REPORT)
    environment = {k: v for k, v in os.environ.items() if k not in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS")}
    environment.update(env)
    done = subprocess.run([sys.executable, str(script)], capture_output=True, text=True, env=environment,
                          check=True, timeout=60)
    value, tasks = done.stdout.split()
    return value, int(tasks)


def test_the_command_runs_one_blas_thread(tmp_path):
    value, tasks = _run(tmp_path, "stillair")
    assert value == "1"
    if tasks >= 0 and (os.cpu_count() or 1) > 1:
        assert tasks == 1    # numpy loaded its BLAS with no thread beside the main one


@pytest.mark.parametrize("variable", ["OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS"])
def test_a_count_the_user_set_is_kept(tmp_path, variable):
    value, _ = _run(tmp_path, "stillair", **{variable: "2"})
    assert value == ("2" if variable == "OPENBLAS_NUM_THREADS" else "None")   # not set over it


def test_a_program_that_imports_stillair_keeps_its_threads(tmp_path):
    value, tasks = _run(tmp_path, "my_model.py")
    assert value == "None"
    if tasks >= 0 and (os.cpu_count() or 1) > 1:
        assert tasks > 1     # OpenBLAS's own default: a thread per core
