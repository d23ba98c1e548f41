"""The results checker itself: it must pass consistent results and catch each contradiction.

The contradictions are the ones issue 13 reports (a verdict one ulp off its
number, sizing and design disagreeing, a 'no damper' verdict that fails in
the band); the rules are those stated in tests/consistency.py.
"""

import copy

import pytest

from tests.consistency import DESIGN_KEYS, assert_consistent_results


def _results():
    design = dict.fromkeys(DESIGN_KEYS, 0.1) | {
        "peak_acceleration_m_s2": 0.09, "peak_stroke_m": 0.5, "meets_target": True}
    return {
        "schema_version": 2,
        "target": {"peak_acceleration_m_s2": 0.09, "duration_s": 600.0},
        "bare": {"peak_acceleration_m_s2": 0.12, "peak_acceleration_band_max_m_s2": 0.13},
        "design": design,
        "sizing": {"meets_target": True, "governed_by": "target", "message": "m"},
        "peak_acceleration_band_max_m_s2": 0.1,
        "sweep": [{"structure_frequency_factor": 1.0, "peak_acceleration_m_s2": 0.09}],
        "options": [{"option": "tmd", "peak_acceleration_m_s2": 0.09,
                     "peak_acceleration_band_max_m_s2": 0.1, "meets_target": True}],
    }


def test_consistent_results_pass():
    assert_consistent_results(_results())


def _broken(path, value):
    results = copy.deepcopy(_results())
    block = results
    for key in path[:-1]:
        block = block[key]
    block[path[-1]] = value
    return results


@pytest.mark.parametrize(("path", "value", "message"), [
    # issue 13, defect 3: the peak 0.09000000000000002 said to meet 0.09
    (("design", "peak_acceleration_m_s2"), 0.09000000000000002, "meets_target"),
    (("sizing", "meets_target"), False, "sizing.meets_target"),
    (("options", 0, "peak_acceleration_m_s2"), 0.0900000000001, "meets_target"),
    (("peak_acceleration_band_max_m_s2",), 0.08, "band maximum"),
    (("bare", "peak_acceleration_band_max_m_s2"), 0.11, "bare"),
    (("design", "peak_stroke_m"), -1e-3, "negative"),
    (("design", "peak_acceleration_m_s2"), float("nan"), "not finite"),
    (("design", "damper_mass_t"), 3.0, "SI unit"),
    (("sweep", 0, "peak_acceleration_m_s2"), 0.0901, "s = 1"),
])
def test_each_contradiction_is_caught(path, value, message):
    with pytest.raises(AssertionError, match=message):
        assert_consistent_results(_broken(path, value))


def test_missing_design_key_is_caught():
    results = _results()
    del results["design"]["peak_stroke_m"]
    with pytest.raises(AssertionError, match="documented keys"):
        assert_consistent_results(results)


def test_no_damper_verdict_must_hold_across_the_band():
    # issue 13, defect 1: bare nominal 0.0785 meets 0.079, but its band worst 0.0887 does not
    results = _results() | {"design": None, "peak_acceleration_band_max_m_s2": None}
    results["target"]["peak_acceleration_m_s2"] = 0.079
    results["options"] = []
    results["sweep"] = []
    results["bare"] = {"peak_acceleration_m_s2": 0.0785, "peak_acceleration_band_max_m_s2": 0.0887}
    results["sizing"] = {"meets_target": True, "governed_by": "bare", "message": "m"}
    with pytest.raises(AssertionError, match="no damper is needed"):
        assert_consistent_results(results)
    results["bare"]["peak_acceleration_band_max_m_s2"] = 0.0789
    assert_consistent_results(results)
