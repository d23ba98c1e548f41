"""Option settings from the case file: the viscous installation and its capacities."""

import shutil
import warnings
from pathlib import Path

import pytest

from tmd.case import CaseError, read_case
from tmd.compare import OptionSettings, compare_options
from tmd.jobs import loaded_mode_of, option_settings_of
from tmd.sizing.viscous import ViscousSettings

CASES = Path(__file__).resolve().parents[1] / "cases"


def _case(tmp_path, options: str):
    shutil.copy(CASES / "harbourline_force.csv", tmp_path)
    text = (CASES / "harbourline_residences.toml").read_text(encoding="utf-8") + options
    path = tmp_path / "case.toml"
    path.write_text(text, encoding="utf-8")
    return read_case(path)


def _viscous(case, phi, count=1):
    settings = OptionSettings(viscous=ViscousSettings(phi, count))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return compare_options(loaded_mode_of(case), case.target_peak_m_s2,
                               enabled=["viscous"], settings=settings)[0]


def test_amplification_scales_constant_force_and_stroke(tmp_path):
    case = _case(tmp_path, "")
    a = 2.5
    base, amplified = _viscous(case, 0.03), _viscous(case, 0.03 * a)
    # Virtual work (Constantinou & Symans 1993, from memory): n c_d phi^2 = c_add, so the
    # constant scales by 1/a^2; the device force c_d phi v by 1/a; its stroke phi x by a.
    # The modal damping needed is the same, so the ratios hold to rounding.
    assert amplified["damper_constant_n_s_per_m"] == pytest.approx(
        base["damper_constant_n_s_per_m"] / a**2, rel=1e-9)
    assert amplified["peak_force_per_damper_n"] == pytest.approx(
        base["peak_force_per_damper_n"] / a, rel=1e-9)
    assert amplified["peak_stroke_m"] == pytest.approx(base["peak_stroke_m"] * a, rel=1e-9)
    assert amplified["added_damping_ratio"] == pytest.approx(base["added_damping_ratio"],
                                                             rel=1e-12)


def test_case_keys_default_and_capacity_verdicts(tmp_path):
    default = option_settings_of(_case(tmp_path, ""))
    # The stated conservative default, not the idealised top-to-ground damper (1.0).
    assert default.viscous.deformation_per_modal_displacement == 0.03
    case = _case(tmp_path, "\n[options.viscous]\ndamper_count = 4\n"
                           "storey_drift_per_modal_displacement = 0.02\n"
                           "drift_amplification = 2.0\nforce_capacity_n = 1.0e5\n"
                           "stroke_capacity_m = 0.05\n[options.pendulum]\nstages = 2\n")
    s = option_settings_of(case)
    assert s.viscous.deformation_per_modal_displacement == pytest.approx(0.04, rel=1e-15)
    assert s.viscous.damper_count == 4 and s.pendulum.stages == 2
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        row = compare_options(loaded_mode_of(case), case.target_peak_m_s2, enabled=["viscous"],
                              settings=s)[0]
    assert row["force_within_capacity"] == (row["peak_force_per_damper_n"] <= 1.0e5)
    assert row["stroke_within_capacity"] == (row["peak_stroke_m"] <= 0.05)


@pytest.mark.parametrize("options, message", [
    ("\n[options.viscous]\ndeformation_per_modal_displacement = 0.1\n"
     "drift_amplification = 2.0\n", "not both"),
    ("\n[options.viscous]\ndrift_amplification = 2.0\n", "go together"),
    ("\n[options.viscous]\ndamper_cont = 2\n", "damper_count"),
    ("\n[options.pendulum]\nstages = 0\n", "stages"),
])
def test_bad_option_keys_are_rejected(tmp_path, options, message):
    with pytest.raises(CaseError, match=message):
        _case(tmp_path, options)
