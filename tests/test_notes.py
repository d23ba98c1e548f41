"""Warnings: one line per cause and load, naming the load; numpy's floating-point text summarised.

The expected behaviour is the project's rule for warnings (README "Model and
conventions", Peaks): the cut-off warning fires when more than 1% of the
acceleration's m0 or m2 comes from the top decade of the load's range. The
floating-point messages are numpy's own ("divide by zero encountered in
log", numpy documentation of ``numpy.errstate``). The wind table's range is
checked by the truncation rule of numerical integration (common practice: the
neglected tail of a convergent integral must be small against the tolerance).
"""

import warnings
from pathlib import Path

import numpy as np
import pytest

from tmd.case import read_case
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.jobs import evaluate_job
from tmd.notes import about, collect
from tmd.performance import UpperEdgeWarning

CASES = Path(__file__).resolve().parents[1] / "cases"


def _edge(share_m2):
    warnings.warn(UpperEdgeWarning(_load(), {"share_m0": 0.0, "share_m2": share_m2,
                                            "f_max_hz": 10.0}), stacklevel=1)


def _load():
    from tmd.notes import current_load

    return current_load()


def test_repeats_merge_into_one_line_per_load_with_the_worst_numbers():
    def build():
        with about("1-year wind (design load)"):
            for share in (0.024, 0.042, 0.029):
                _edge(share)
        with about("10-year wind"):
            _edge(0.013)
        return {}

    _, lines = collect(build, first=("an input note",))
    assert lines[0] == "an input note"
    assert len(lines) == 3, lines
    assert lines[1].startswith("1-year wind (design load): 4.2% of the acceleration's second")
    assert "the worst of 3 evaluations" in lines[1]
    assert lines[2].startswith("10-year wind: 1.3%") and "one evaluation" in lines[2]


def test_numpy_floating_point_warnings_are_summarised_in_words():
    def build():
        with about("detuning sweep on the design load"):
            for _ in range(4):
                np.log(np.zeros(2))
        return {}

    _, lines = collect(build)
    assert len(lines) == 1
    assert lines[0].startswith("detuning sweep on the design load: numpy reported "
                               "'divide by zero encountered in log'")
    assert "4 times" in lines[0]


def test_a_job_names_its_load():
    case = read_case(CASES / "harbourline_residences.toml")
    result = evaluate_job(case, TunedMassDamper(0.02, 0.98, 0.08))
    edge = [w for w in result["warnings"] if "top decade" in w]
    assert len(edge) == 1 and edge[0].startswith("design load (harbourline_force.csv):"), edge


def test_the_retune_job_names_its_load():
    # Issue 13, defect 15: a warning names the load it refers to; retune said
    # "the job's load" for the design load it re-tunes under.
    from tmd.jobs import retune_job
    from tmd.retune import BuiltDamper

    case = read_case(CASES / "harbourline_residences.toml")
    built = BuiltDamper.of(TunedMassDamper(0.02, 0.98, 0.08), case.mode)
    warnings_ = retune_job(case, built, 0.165)["retuned"]["warnings"]
    edge = [w for w in warnings_ if "top decade" in w]
    assert edge and all(w.startswith("design load (harbourline_force.csv):") for w in edge), edge


@pytest.mark.parametrize("old, new", [("basic_speed_m_s = 30.0", "basic_speed_m_s = 60.0")])
def test_unusual_inputs_come_first_in_the_warnings(tmp_path, old, new):
    text = (CASES / "kestrel_point.toml").read_text().replace(old, new)
    (tmp_path / "c.toml").write_text(text)
    case = read_case(tmp_path / "c.toml")
    result = evaluate_job(case, TunedMassDamper(0.0024, 0.99, 0.05))
    assert "basic_speed_m_s = 60 m/s is unusual" in result["warnings"][0]
