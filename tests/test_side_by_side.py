"""tmd.side_by_side: two computations at once give what a serial run gives.

The reference of every check is the serial run of the same two callables
(an identity test): the same results, warnings in the same order under the
same load names, the same exceptions.
"""

import os
import pickle
import warnings

import pytest

from tmd import side_by_side as sbs
from tmd.notes import about, collect
from tmd.performance import UpperEdgeWarning

needs_fork = pytest.mark.skipif(not sbs.parallel_available(),
                                reason="no fork or fewer than two CPUs: side_by_side runs serially")


def _pid_and_warn(text, load):
    def work():
        with about(load):
            # collect() names a RuntimeWarning by the load and file it came from.
            warnings.warn(text, RuntimeWarning, stacklevel=1)
        return os.getpid()
    return work


@needs_fork
def test_second_runs_in_another_process_and_both_results_return():
    here, there = sbs.side_by_side(os.getpid, os.getpid)
    assert here == os.getpid()
    assert there != os.getpid()


def test_one_process_when_the_environment_says_so(monkeypatch):
    monkeypatch.setenv(sbs.ENVIRONMENT_VARIABLE, "1")
    assert not sbs.parallel_available()
    assert sbs.side_by_side(os.getpid, os.getpid) == (os.getpid(), os.getpid())


@pytest.mark.parametrize("processes", ["1", ""])
def test_warnings_arrive_in_serial_order_under_their_loads(monkeypatch, processes):
    monkeypatch.setenv(sbs.ENVIRONMENT_VARIABLE, processes)

    def build():
        sbs.side_by_side(_pid_and_warn("from the first", "load A"),
                         _pid_and_warn("from the second", "load B"))
        return {}

    _, lines = collect(build)
    assert [line.split(" (")[0] for line in lines] == [
        "load A: numpy reported 'from the first'", "load B: numpy reported 'from the second'"]
    assert all("(test_side_by_side.py, once)" in line for line in lines)


@needs_fork
def test_a_load_warning_keeps_its_numbers_through_the_child():
    # LoadWarning pickles by its arguments; the merged line carries its numbers.
    sent = UpperEdgeWarning("design load", {"share_m2": 0.5, "share_m0": 0.02,
                                            "f_max_hz": 5.0})
    assert pickle.loads(pickle.dumps(sent)).values == sent.values

    def second():
        warnings.warn(sent, stacklevel=1)
        return 1

    def build():
        sbs.side_by_side(lambda: 0, second)
        return {}

    _, parallel = collect(build)
    _, serial = collect(lambda: (warnings.warn(sent, stacklevel=1), {})[1])
    assert parallel == serial and "50.0%" in parallel[0]


def test_an_error_of_the_second_is_raised_here_as_in_a_serial_run():
    def second():
        raise ZeroDivisionError("the second failed")

    with pytest.raises(ZeroDivisionError, match="the second failed"):
        sbs.side_by_side(lambda: 1, second)


def test_an_error_of_the_first_is_raised_and_the_child_stopped():
    def first():
        raise KeyError("the first failed")

    with pytest.raises(KeyError, match="the first failed"):
        sbs.side_by_side(first, lambda: 2)
    import multiprocessing

    assert not multiprocessing.active_children()


def test_an_unpicklable_result_is_computed_here_instead():
    # A lambda cannot be pickled back from the child: the second runs again here.
    here, there = sbs.side_by_side(lambda: 1, lambda: (lambda: 42))
    assert here == 1 and there() == 42


@needs_fork
def test_the_design_job_gives_the_serial_results_bit_for_bit(monkeypatch, design_results,
                                                             kestrel_case):
    # Kestrel Point runs its robust and probabilistic searches side by side; the
    # serial run (TMD_PROCESSES=1) is the reference, warnings and their order included.
    from pathlib import Path

    from tmd.jobs import design_job
    from tmd.outputs import to_json

    parallel = design_results(Path(__file__).resolve().parents[1] / "cases"
                              / "kestrel_point.toml")
    monkeypatch.setenv(sbs.ENVIRONMENT_VARIABLE, "1")
    serial = design_job(kestrel_case)
    assert to_json(serial) == to_json(parallel)


@pytest.mark.parametrize("platform", ["darwin", "win32"])
def test_one_process_off_linux(monkeypatch, platform):
    # macOS fork is unsafe once system libraries start threads; Windows has none.
    monkeypatch.setattr(sbs.sys, "platform", platform)
    assert not sbs.parallel_available()
    assert sbs.side_by_side(os.getpid, os.getpid) == (os.getpid(), os.getpid())


class _BrokenOnArrival:
    """Pickles, but fails to unpickle (its reconstructor raises)."""

    def __reduce__(self):
        return _refuse, ()


def _refuse():
    raise TypeError("cannot be rebuilt")


@needs_fork
def test_a_result_that_does_not_unpickle_is_computed_here_instead():
    # The child's result pickles but cannot be rebuilt here: the second block
    # runs again in this process, whose result (built here, never unpickled) returns.
    here, there = sbs.side_by_side(lambda: 1, _BrokenOnArrival)
    assert here == 1 and isinstance(there, _BrokenOnArrival)
