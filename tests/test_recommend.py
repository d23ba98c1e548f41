"""The recommendation rule (README, tmd.recommend): which design is specified and why."""

import pytest

from tmd.recommend import RULE, recommendation

TARGET = 0.06


def _design(mass, peak, **extra):
    return {"mass_kg": mass, "mass_ratio": mass / 2e7, "frequency_hz": 0.18,
            "frequency_ratio": 0.99, "damping_ratio": 0.03, "stiffness_n_per_m": 1.0,
            "damping_n_s_per_m": 1.0, "peak_acceleration_m_s2": peak, "peak_stroke_m": 0.5,
            "peak_damper_force_n": 1.0, "meets_target": peak <= TARGET} | extra


def _result(design, band_max=None, robust=None):
    r = {"target": {"peak_acceleration_m_s2": TARGET}, "design": design}
    if band_max is not None:
        r["peak_acceleration_band_max_m_s2"] = band_max
    if robust is not None:
        r["band_design"] = robust
    return r


def test_band_robust_design_when_the_nominal_fails_across_the_band():
    # The Kestrel Point situation of the issue: nominal 49.8 t exceeds the target in the
    # band, the band-robust 230.6 t meets it across the band.
    robust = _design(230.6e3, 0.0577, peak_acceleration_band_max_m_s2=0.05999,
                     meets_target_across_band=True)
    rec = recommendation(_result(_design(49.8e3, 0.06), 0.0862, robust), frequency_band=0.15)
    assert rec["design_key"] == "band_design" and rec["mass_kg"] == 230.6e3
    assert rec["meets_target_across_band"] is True and rec["rule"] == RULE
    assert "0.0862" in rec["why"] and "230.6 t" in rec["why"]


def test_nominal_design_when_it_already_meets_the_band():
    robust = _design(60e3, 0.05, peak_acceleration_band_max_m_s2=0.06,
                     meets_target_across_band=True)
    rec = recommendation(_result(_design(50e3, 0.06), 0.0599, robust), frequency_band=0.1)
    assert rec["design_key"] == "design" and rec["meets_target_across_band"] is True
    assert rec["peak_acceleration_band_max_m_s2"] == 0.0599


def test_robust_row_that_misses_the_band_is_flagged_not_hidden():
    robust = _design(1e6, 0.055, peak_acceleration_band_max_m_s2=0.07,
                     meets_target_across_band=False)
    rec = recommendation(_result(_design(50e3, 0.06), 0.09, robust), frequency_band=0.15)
    assert rec["design_key"] == "band_design" and rec["meets_target_across_band"] is False
    assert "still above" in rec["why"]


def test_without_robustness_the_nominal_design_with_a_detuning_caution():
    rec = recommendation(_result(_design(50e3, 0.06)))
    assert rec["design_key"] == "design" and rec["band_checked"] is False
    assert "detuning" in rec["why"] and "meets_target_across_band" not in rec


@pytest.mark.parametrize("band_max, needed", [(0.05, False), (0.07, True)])
def test_no_damper_verdict_uses_the_band_check(band_max, needed):
    rec = recommendation(_result(None), bare_band_max_m_s2=band_max, frequency_band=0.15)
    assert rec["design_key"] is None
    assert rec["meets_target_across_band"] is (band_max <= TARGET)
    assert ("a damper is needed" in rec["why"]) is needed
