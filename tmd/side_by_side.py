"""Two independent computations of one job at once, on two cores: one here, one in a child.

A job's blocks that do not depend on each other (the band-robust search and
the probabilistic least-mass search of a design; the bank and the other rows
of a comparison) take seconds each on one core. :func:`side_by_side` runs the
second in a forked child process while this process runs the first, and
returns both results as if they had run one after the other:

* the same values: the child runs the same code on a copy of this process's
  memory (fork), and its result comes back pickled;
* the same warnings in the same order: the child records what it warns
  (with the load named by :func:`tmd.notes.about` at the time), and they are
  raised again here after the first computation's own, as a serial run would
  raise them;
* the same errors: when the child fails in any way (an exception, a result
  that cannot be pickled, a crash), the second computation runs again here,
  so that its exception and traceback are this process's own.

It runs the two one after the other, here, on any platform but Linux
(Windows has no fork; on macOS fork is not safe once system libraries such
as Accelerate have started threads, and a spawned child would import
everything again), when fewer than two CPUs are available to the process,
inside such a child (no grandchildren), or when the environment variable
``TMD_PROCESSES`` is ``1``.
"""

from __future__ import annotations

import multiprocessing
import os
import sys
import warnings
from collections.abc import Callable
from typing import TypeVar

from tmd.notes import about, current_load

First = TypeVar("First")
Second = TypeVar("Second")

ENVIRONMENT_VARIABLE = "TMD_PROCESSES"

_IN_CHILD = False


def parallel_available() -> bool:
    """Return whether :func:`side_by_side` would use a second process now.

    Returns
    -------
    bool
        False on any platform but Linux, with fewer than two CPUs available
        to this process, inside a child of :func:`side_by_side`, or with
        ``TMD_PROCESSES=1`` in the environment.
    """
    if _IN_CHILD or os.environ.get(ENVIRONMENT_VARIABLE, "").strip() == "1":
        return False
    if not sys.platform.startswith("linux"):
        return False
    if "fork" not in multiprocessing.get_all_start_methods():
        return False
    cpus = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    return (cpus or 1) >= 2


def side_by_side(first: Callable[[], First], second: Callable[[], Second]
                 ) -> tuple[First, Second]:
    """Run ``first`` here and ``second`` in a forked child at the same time; return both results.

    Parameters
    ----------
    first : callable
        Takes no argument; runs in this process.
    second : callable
        Takes no argument; must not depend on what ``first`` does (it sees
        this process's memory as it was before ``first`` started) and must
        return a picklable result. Runs in a child process where possible.

    Returns
    -------
    tuple
        (first(), second()), equal to a serial run of first, then second.

    Raises
    ------
    Exception
        Whatever ``first`` or ``second`` raises (``first``'s first, as in a
        serial run).

    Notes
    -----
    The child sends its result through a pipe when it is done, and this
    process reads it after ``first`` returns; the child's warnings are
    raised here again, each under the load it was raised for. See the
    module's description for when both run here, one after the other.
    """
    if not parallel_available():
        return first(), second()
    context = multiprocessing.get_context("fork")
    reader, writer = context.Pipe(duplex=False)
    child = context.Process(target=_run_in_child, args=(second, writer), daemon=True)
    with warnings.catch_warnings():
        # Python 3.12+ warns that fork in a process with threads may deadlock. The
        # threads here are the BLAS library's idle workers (reset by its own fork
        # handler) and, while a report is written on a terminal, the progress bar's
        # refresh thread; the child takes no lock they may hold (it prints nothing,
        # and its warnings are recorded, not shown).
        warnings.simplefilter("ignore", DeprecationWarning)
        child.start()
    writer.close()
    try:
        here = first()
    except BaseException:
        child.kill()
        child.join()
        reader.close()
        raise
    try:
        status, there, caught = reader.recv()
    except Exception:  # noqa: BLE001 - a crash (EOF) or a result that does not unpickle
        status, there, caught = "failed", None, []
    finally:
        reader.close()
        child.join()
    if status != "ok":
        # Run it again here: the same error, with this process's traceback.
        return here, second()
    for message, category, filename, lineno, load in caught:
        with about(load):
            warnings.warn_explicit(message, category, filename, lineno)
    return here, there


def _run_in_child(work: Callable[[], object], connection) -> None:
    """Run ``work`` (the child's side), record its warnings, send ("ok", result, warnings)."""
    global _IN_CHILD
    _IN_CHILD = True
    caught: list[tuple] = []

    def record(message, category, filename, lineno, file=None, line=None):
        caught.append((message, category, filename, lineno, current_load()))

    try:
        # The filters stay as inherited (the job's own): only the display is replaced.
        with warnings.catch_warnings():
            warnings.showwarning = record
            result = work()
        connection.send(("ok", result, caught))
    except BaseException:  # noqa: BLE001 - any failure is re-run (and raised) by the parent
        try:
            connection.send(("failed", None, []))
        except (OSError, ValueError):
            pass
    finally:
        connection.close()
