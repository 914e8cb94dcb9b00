"""The `stillair` command in the situations that used to end in a traceback, a hang or an
overwritten file: each runs the real installed command in a subprocess."""

from __future__ import annotations

import json
import os
import shutil
import stat
import subprocess
import sys
from pathlib import Path

import openpyxl
import pytest
import xlsxwriter

import stillair
from stillair.templates import __file__ as _templates_init

TEMPLATES = Path(_templates_init).parent
AIR_LAYER = TEMPLATES / "air-layer.xlsx"
_SCRIPT = shutil.which("stillair", path=str(Path(sys.executable).parent))
COMMAND = [_SCRIPT] if _SCRIPT else [sys.executable, "-c",
                                     "import sys; from stillair.addin.cli import main; sys.exit(main())"]


def stillair_cmd(*args, env=None, cwd=None, timeout=120, **kwargs) -> subprocess.CompletedProcess:
    environment = dict(os.environ, **(env or {}))
    return subprocess.run([*COMMAND, *map(str, args)], capture_output=True, text=True,
                          encoding="utf-8", errors="replace", env=environment, cwd=cwd,
                          timeout=timeout, **kwargs)


def assert_one_line(done: subprocess.CompletedProcess, *words: str) -> None:
    """Exit status 2 and exactly one line on stderr that contains every word given."""
    assert done.returncode == 2, done.stderr
    assert "Traceback" not in done.stderr
    assert done.stderr.count("\n") == 1, done.stderr
    for word in words:
        assert word in done.stderr


@pytest.fixture(scope="module")
def error_book(tmp_path_factory):
    """Three cells with the same bad gap, one good cell."""
    path = tmp_path_factory.mktemp("errors") / "bad-gap.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Gap")
    ws.write("A1", -0.01)
    for row in (2, 3, 4):
        ws.write_formula(f"B{row}", "=H_CAVITY(20,10,$A$1,1)")
    ws.write_formula("B5", "=AIR_DENSITY(20)")
    wb.close()
    return path


def test_out_into_a_missing_folder(tmp_path):
    target = tmp_path / "no-such-folder" / "copy.xlsx"
    done = stillair_cmd("calc", AIR_LAYER, "--out", target)
    assert_one_line(done, str(target), "does not exist")
    assert not target.parent.exists()


def test_out_refuses_a_folder_and_an_existing_file(tmp_path):
    assert_one_line(stillair_cmd("calc", AIR_LAYER, "--out", tmp_path), str(tmp_path), "is a folder")
    existing = tmp_path / "mine.xlsx"
    existing.write_bytes(b"my own file")
    done = stillair_cmd("calc", AIR_LAYER, "--out", existing)
    assert_one_line(done, str(existing), "exists", "never writes over")
    assert existing.read_bytes() == b"my own file"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["mine.xlsx"]  # no temporary left behind


def test_out_copy_gets_the_users_normal_permissions(tmp_path):
    target = tmp_path / "filled.xlsx"
    done = stillair_cmd("calc", AIR_LAYER, "--out", target, preexec_fn=lambda: os.umask(0o027))
    assert done.returncode == 0, done.stderr
    assert stat.S_IMODE(target.stat().st_mode) == 0o640   # 0666 less the umask, not tempfile's 0600
    assert sorted(p.name for p in tmp_path.iterdir()) == ["filled.xlsx"]


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no FIFOs on this platform")
@pytest.mark.parametrize("command", ["calc", "audit"])
def test_a_fifo_is_refused_at_once(tmp_path, command):
    fifo = tmp_path / "book.xlsx"
    os.mkfifo(fifo)
    done = stillair_cmd(command, fifo, timeout=60)  # reading it would block for ever
    assert_one_line(done, str(fifo), "FIFO", "not a regular file")


@pytest.mark.skipif(not os.path.exists("/dev/null"), reason="no /dev/null")
def test_a_device_is_refused():
    assert_one_line(stillair_cmd("calc", "/dev/null"), "/dev/null", "device", "not a regular file")


def test_output_closed_early_is_one_line_not_a_traceback():
    process = subprocess.Popen([*COMMAND, "functions"], stdout=subprocess.PIPE,
                               stderr=subprocess.PIPE, text=True, encoding="utf-8")
    process.stdout.close()  # the reader is gone before the first line (as `| head -0`)
    err = process.stderr.read()
    process.stderr.close()
    assert process.wait(timeout=120) == 2
    assert "Traceback" not in err and err.count("\n") == 1 and "broken pipe" in err


@pytest.mark.parametrize("env", [{"PYTHONIOENCODING": "ascii"},
                                 {"PYTHONIOENCODING": "latin-1"},
                                 {"LANG": "C", "LC_ALL": "C", "PYTHONIOENCODING": ""}])
def test_a_console_that_cannot_print_degrees_or_squares(env):
    done = stillair_cmd("functions", env=env)
    assert done.returncode == 0 and done.stderr == ""
    assert "H_CAVITY(t1, t2, gap, height, [tilt], [gas], [pressure], [method]) -> W/(m" in done.stdout
    if env["PYTHONIOENCODING"] == "ascii":  # one workbook is enough (each calc takes seconds)
        done = stillair_cmd("calc", AIR_LAYER, env=env)
        assert done.returncode == 0 and done.stderr == ""
        assert "W/(m2.K)" in done.stdout  # W/(m²·K) in plain ASCII
    demo = subprocess.run([sys.executable, "-m", "stillair"], capture_output=True, text=True,
                          encoding="utf-8", errors="replace", env=dict(os.environ, **env), timeout=120)
    assert demo.returncode == 0 and demo.stderr == ""


def test_templates_copy_keeps_existing_files_and_names_them(tmp_path):
    target = tmp_path / "work"
    done = stillair_cmd("templates", "--copy", target)
    names = sorted(p.name for p in TEMPLATES.glob("*.xlsx"))
    assert done.returncode == 0 and done.stderr == ""
    assert sorted(p.name for p in target.iterdir()) == names
    (target / names[0]).write_bytes(b"filled in by the user")
    (target / names[1]).unlink()
    done = stillair_cmd("templates", "--copy", target)
    assert done.returncode == 2 and "Traceback" not in done.stderr
    skipped = done.stderr.splitlines()
    assert len(skipped) == len(names) - 1                   # one line per file left alone
    assert any(str(target / names[0]) in line and "exists" in line for line in skipped)
    assert f"copied  {target / names[1]}" in done.stdout    # the missing one is copied again
    assert (target / names[0]).read_bytes() == b"filled in by the user"


def test_templates_says_where_they_are_and_what_to_do_next(tmp_path):
    done = stillair_cmd("templates")
    assert done.returncode == 0 and done.stderr == ""
    lines = done.stdout.splitlines()
    # the folder as the user can open it: the strict editable install reaches it through a
    # link tree, which the command resolves
    shown = lines[0].removeprefix("Templates in ").removesuffix(":")
    assert (Path(shown) / "sealed-cabinet.xlsx").resolve() == (TEMPLATES / "sealed-cabinet.xlsx").resolve()
    assert sorted(line.split()[0] for line in lines[1:-1]) == sorted(p.name for p in TEMPLATES.glob("*.xlsx"))
    assert lines[-1].startswith("Next: stillair templates --copy DIR copies them")
    done = stillair_cmd("templates", "--copy", tmp_path / "mine")
    assert done.returncode == 0
    next_step = done.stdout.splitlines()[-1]
    assert next_step.startswith("Next: open a copy") and \
        next_step.endswith(f"stillair audit {tmp_path / 'mine' / 'sealed-cabinet.xlsx'}")


@pytest.mark.parametrize("args, words", [
    (("audit", AIR_LAYER, "--rtol", "abc"), ("stillair audit: --rtol must be a number >= 0, got 'abc'",)),
    (("audit", AIR_LAYER, "--atol", "-1"), ("stillair audit: --atol must be >= 0, got -1",)),
    (("calc",), ("stillair calc: the following arguments are required: BOOK",)),
    (("calc", AIR_LAYER, "--frobnicate"), ("stillair: unrecognized arguments: --frobnicate",)),
    (("tabulate",), ("stillair: COMMAND: invalid choice: 'tabulate'",)),
])
def test_a_bad_command_line_is_one_line_naming_the_option_and_value(args, words):
    """Not the whole usage text: one line, exit 2, like every other bad input."""
    done = stillair_cmd(*args)
    assert_one_line(done, *words)
    assert "usage:" not in done.stderr and done.stdout == ""


def test_templates_copy_onto_a_file(tmp_path):
    plain = tmp_path / "plain"
    plain.write_text("x")
    assert_one_line(stillair_cmd("templates", "--copy", plain), str(plain), "not a folder")


def test_calc_exits_1_on_error_cells_and_lists_each_note_once(error_book):
    done = stillair_cmd("calc", error_book)
    assert done.returncode == 1, done.stderr
    message = "H_CAVITY: gap must be > 0 m, got -0.01"
    notes = [line for line in done.stdout.splitlines() if message in line]
    assert notes == [f"  Gap!B2:B4: {message}"]
    assert ("3 formula cells are errors or cannot be evaluated (Gap!B2:B4; see the notes): "
            "exit status 1") in done.stdout
    done = stillair_cmd("calc", error_book, "--json")
    assert done.returncode == 1
    assert json.loads(done.stdout)["values"]["Gap!B5"] == pytest.approx(stillair.air_density(20))


def test_calc_prints_every_column_of_a_results_table(capsys):
    from stillair.addin.cli import main
    done = stillair_cmd("calc", AIR_LAYER)
    assert done.returncode == 0, done.stderr
    assert main(["calc", str(AIR_LAYER), "--json"]) == 0
    values = json.loads(capsys.readouterr().out)["values"]
    assert "=1/(" not in done.stdout and "=MIN(" not in done.stdout  # no formula text for a value
    header = next(line for line in done.stdout.splitlines() if "thickness mm" in line)
    assert "R correlations" in header and "R simplified" in header
    first = next(line for line in done.stdout.splitlines() if line.split()[:1] == ["5"])
    sheet = openpyxl.load_workbook(AIR_LAYER)["Results"]
    row = next(r for r in range(1, sheet.max_row + 1) if sheet.cell(r, 1).value == 5)
    assert first.split()[1:] == [f"{values[f'Results!B{row}']:.6g}", f"{values[f'Results!C{row}']:.6g}"]


def test_version():
    done = stillair_cmd("--version")
    assert done.returncode == 0 and done.stdout.strip() == f"stillair {stillair.__version__}"


@pytest.mark.parametrize("command", [COMMAND, [sys.executable, "-m", "stillair"]], ids=["stillair", "python-m"])
def test_ctrl_c_while_starting_is_one_line_not_a_traceback(command):
    """Ctrl-C in the first moments, while numpy, scipy and the engine are still importing, ends
    like a Ctrl-C later: "stillair: interrupted", exit status 2, no traceback."""
    import signal
    import time

    outcomes = []
    delay = 0.03
    # later and later, until three signals came while our code ran or the command was done
    # first (it may be done in ~0.15 s; on a loaded machine the interpreter's own start-up can
    # take longer than that, so no fixed list of delays is sure to reach our code)
    while len(outcomes) < 3 and delay < 10.0:
        process = subprocess.Popen([*command, "functions"] if command is COMMAND else command,
                                   stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
        time.sleep(delay)
        process.send_signal(signal.SIGINT)
        err = process.stderr.read()
        process.stderr.close()
        code = process.wait(timeout=120)
        delay *= 1.5
        if "Traceback" in err and "/stillair/" not in err and "stillair:" not in err:
            continue    # interrupted inside the interpreter's own start-up (site, .pth files),
                        # before any code of ours ran
        assert "Traceback" not in err, f"after {delay / 1.5:.3f} s: {err}"
        if code == 0 and err == "":
            break       # finished before the signal came: a later one would come later still
        if code != -signal.SIGINT:      # not killed before Python had started at all
            outcomes.append((code, err))
    said = ("stillair: interrupted\n", "python -m stillair: interrupted\n")   # the program as started
    assert outcomes and all(code == 2 and err in said for code, err in outcomes), outcomes
