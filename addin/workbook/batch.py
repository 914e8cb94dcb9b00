"""Many jobs in one run: spread over worker processes, with a progress bar on stderr.

`calc --cases` (one row per job) and `audit DIR` (one workbook per job) share this.  A job is a
module-level function of one item; its result must pickle.  ``start`` (also module-level) runs
once in each worker before its first job: it builds what every job reads (the workbook's model),
so a worker pays the start-up once, not per job.  Where the platform forks, the workers inherit
what the parent already built, and ``start`` finds it done.

Results come back in the order of the items whatever order the workers finish in, so a run with
``jobs=2`` writes what ``jobs=1`` writes.
"""

from __future__ import annotations

import multiprocessing
import os
import sys
from concurrent.futures import ProcessPoolExecutor, as_completed
from typing import Callable, Iterable, Sequence

__all__ = ["run_jobs", "progress_bar", "PROGRESS_DELAY"]

# A bar appears only for runs longer than this (seconds): a short run prints nothing extra.
PROGRESS_DELAY = 2.0


def progress_bar(total: int, unit: str):
    """A tqdm bar on stderr, drawn only when stderr is a terminal and after PROGRESS_DELAY s."""
    from tqdm import tqdm

    # formulas_bridge sets TQDM_DISABLE for formulas' own compile bar; our bar says itself
    # whether it shows, which overrides that default.
    return tqdm(total=total, unit=unit, file=sys.stderr, delay=PROGRESS_DELAY, leave=False,
                disable=not _is_terminal(sys.stderr), dynamic_ncols=True)


def _is_terminal(stream) -> bool:
    try:
        return stream.isatty()
    except (AttributeError, ValueError):
        return False


def check_jobs(jobs: int) -> int:
    """The --jobs value, checked: a whole number from 1 to 8 x the machine's cores."""
    cores = os.cpu_count() or 1
    if not isinstance(jobs, int) or jobs < 1 or jobs > 8 * cores:
        raise ValueError(f"--jobs must be a whole number from 1 to {8 * cores} "
                         f"(this machine has {cores} cores), got {jobs}")
    return jobs


def _context():
    """fork where the platform has it (the workers inherit the built model), else spawn."""
    methods = multiprocessing.get_all_start_methods()
    return multiprocessing.get_context("fork" if "fork" in methods else "spawn")


def _run_chunk(job: Callable, chunk: Sequence) -> list:
    return [job(item) for item in chunk]


def run_jobs(job: Callable, items: Iterable, jobs: int = 1, *, unit: str = "job",
             start: Callable | None = None, start_args: tuple = ()) -> list:
    """``[job(item) for item in items]``, in ``jobs`` processes, with a progress bar."""
    items = list(items)
    results: list = [None] * len(items)
    with progress_bar(len(items), unit) as bar:
        if jobs <= 1 or len(items) <= 1:
            if start is not None:
                start(*start_args)
            for index, item in enumerate(items):
                results[index] = job(item)
                bar.update(1)
            return results
        # Chunks small enough to keep both workers busy to the end and to move the bar, large
        # enough that sending them costs nothing beside a job.
        size = max(1, min(16, len(items) // (jobs * 8)))
        chunks = [(first, items[first:first + size]) for first in range(0, len(items), size)]
        with ProcessPoolExecutor(max_workers=min(jobs, len(chunks)), mp_context=_context(),
                                 initializer=start, initargs=start_args) as pool:
            pending = {pool.submit(_run_chunk, job, chunk): first for first, chunk in chunks}
            for future in as_completed(pending):
                first = pending[future]
                done = future.result()
                results[first:first + len(done)] = done
                bar.update(len(done))
    return results
