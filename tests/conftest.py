"""Shared fixtures. Matplotlib runs headless (Agg) in every test.

The demo cases' design runs are the suite's most expensive computations; the
report, browser and CLI tests share one run per case and session through
:func:`design_results` (each test gets its own deep copy).
"""

import copy
import json
import warnings
from pathlib import Path

import matplotlib
import pytest

matplotlib.use("Agg")

DEMO_FORCE_CASE = Path(__file__).resolve().parents[1] / "cases" / "harbourline_residences.toml"


@pytest.fixture(scope="session")
def demo_compare():
    """(case, results) of ``compare`` on the force-spectrum demo, as results.json holds them."""
    from tmd.case import read_case
    from tmd.jobs import compare_job
    from tmd.outputs import to_json
    from tmd.performance import UpperEdgeWarning

    case = read_case(DEMO_FORCE_CASE)
    with warnings.catch_warnings():
        # the demo spectrum's upper-edge note is already in results["warnings"]
        warnings.simplefilter("ignore", UpperEdgeWarning)
        results = compare_job(case)
    return case, json.loads(to_json(results))

@pytest.fixture(scope="session")
def kestrel_case():
    """The Kestrel Point demo case, loaded once (its wind model takes seconds)."""
    from tmd.case import read_case

    return read_case(Path(__file__).resolve().parent.parent / "cases" / "kestrel_point.toml")


_DESIGN_RUNS: dict[Path, dict] = {}


@pytest.fixture(scope="session")
def design_results():
    """path -> tmd.jobs.design_job(read_case(path)), computed once per session (a copy each)."""
    from tmd.case import read_case
    from tmd.jobs import design_job
    from tmd.performance import UpperEdgeWarning

    def get(path):
        key = Path(path).resolve()
        if key not in _DESIGN_RUNS:
            with warnings.catch_warnings():
                # the demo spectrum's upper-edge note is already in results["warnings"]
                warnings.simplefilter("ignore", UpperEdgeWarning)
                _DESIGN_RUNS[key] = design_job(read_case(key))
        return copy.deepcopy(_DESIGN_RUNS[key])

    return get
