"""Reports built once per session (matplotlib Agg, low DPI to keep the tests fast)."""

import json
from pathlib import Path

import pytest

from tests.consistency import assert_consistent_results
from tmd.case import read_case
from tmd.outputs import to_json
from tmd.report import render_report

CASES = sorted((Path(__file__).resolve().parents[2] / "cases").glob("*.toml"))
# The demo with every section a design job writes: three return periods, a stroke
# limit (end-stops), the band-robust design and the probabilistic study.
FULL_CASE = Path(__file__).resolve().parents[2] / "cases" / "kestrel_point.toml"
TEST_DPI = 40


def as_written(results: dict) -> dict:
    """results as results.json holds them (non-finite floats as null)."""
    return json.loads(to_json(results))


@pytest.fixture(scope="session", params=CASES, ids=[c.stem for c in CASES])
def case_report(request, design_results):
    case = read_case(request.param)
    results = design_results(request.param)
    assert_consistent_results(as_written(results))
    return case, as_written(results), render_report(results, dpi=TEST_DPI)


@pytest.fixture(scope="session")
def full_report(design_results):
    """Real job output with every optional section of a design: Kestrel Point's design job."""
    case = read_case(FULL_CASE)
    results = as_written(design_results(FULL_CASE))
    assert {"by_return_period", "sweep", "band_design", "probabilistic", "end_stops"} <= set(
        results)
    return case, results, render_report(results, dpi=TEST_DPI)


@pytest.fixture(scope="session")
def compare_report(demo_compare):
    """The comparison of every option on the force-spectrum demo, with its report."""
    case, results = demo_compare
    return case, results, render_report(results, dpi=TEST_DPI)
