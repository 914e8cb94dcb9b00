"""The cycle collector runs rarely while a model is built and calculated, and the process's own
thresholds come back afterwards, also when the calculation fails."""

from __future__ import annotations

import gc

import pytest

from stillair.addin.workbook.model import _RARE_COLLECTIONS, collecting_rarely


def test_thresholds_are_raised_inside_and_restored_after():
    before = gc.get_threshold()
    try:
        gc.set_threshold(700, 10, 10)
        with collecting_rarely():
            assert gc.get_threshold() == (_RARE_COLLECTIONS, 10, 10)
        assert gc.get_threshold() == (700, 10, 10)
        with pytest.raises(ZeroDivisionError):
            with collecting_rarely():
                1 / 0
        assert gc.get_threshold() == (700, 10, 10)
    finally:
        gc.set_threshold(*before)


def test_a_caller_who_collects_more_rarely_still_does():
    before = gc.get_threshold()
    try:
        gc.set_threshold(10 * _RARE_COLLECTIONS, 5, 5)
        with collecting_rarely():
            assert gc.get_threshold() == (10 * _RARE_COLLECTIONS, 5, 5)
    finally:
        gc.set_threshold(*before)


def test_cyclic_garbage_made_while_calculating_is_still_collected():
    """Rarely is not never: a cycle made inside is freed once enough is allocated."""
    import weakref

    class Cell:
        pass

    with collecting_rarely():
        cell = Cell()
        cell.self = cell
        alive = weakref.ref(cell)
        del cell
        kept = [[] for _ in range(2 * _RARE_COLLECTIONS)]   # what a calculation keeps
        assert alive() is None
        del kept


def test_nested_and_overlapping_uses_restore_the_thresholds_once_all_have_left():
    """Two uses that do not leave in the order they came (two threads calculating) leave the
    process's thresholds as they found them."""
    before = gc.get_threshold()
    try:
        gc.set_threshold(700, 10, 10)
        first, second = collecting_rarely(), collecting_rarely()
        first.__enter__()
        second.__enter__()
        first.__exit__(None, None, None)
        assert gc.get_threshold() == (_RARE_COLLECTIONS, 10, 10)    # the second is still inside
        second.__exit__(None, None, None)
        assert gc.get_threshold() == (700, 10, 10)
    finally:
        gc.set_threshold(*before)


@pytest.mark.parametrize("argv, frozen", [("None", True), ("['functions']", False)])
def test_the_command_process_exits_without_collecting_what_it_leaves(argv, frozen):
    """At the exit of the stillair command's own process the objects left (a big model) are
    frozen, so the interpreter's shutdown does not run the cycle collector over them; the output
    is complete all the same.  A caller that runs main(argv) in its own process keeps its
    interpreter's shutdown as it was."""
    import subprocess
    import sys
    code = ("import atexit, gc, sys\n"
            "atexit.register(lambda: print('frozen at exit:', gc.get_freeze_count() > 0))\n"
            "from stillair.addin.cli import main\n"
            "sys.argv = ['stillair', 'functions']\n"
            f"main({argv})\n"
            "print('calculated')\n")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          timeout=120)
    assert done.returncode == 0, done.stderr
    assert done.stdout.splitlines()[-2:] == ["calculated", f"frozen at exit: {frozen}"]
