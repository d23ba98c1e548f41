"""compare respects the case's [damper] settings: its TMD rows are the design job's TMD."""

import shutil
import warnings
from pathlib import Path

import pytest

from tmd.case import read_case
from tmd.jobs import compare_job, design_job

CASES = Path(__file__).resolve().parents[1] / "cases"


@pytest.mark.parametrize("objective", ["acceleration", "displacement"])
def test_fixed_mass_ratio_and_objective_reach_the_tmd_rows(tmp_path, objective):
    # The report: with mass_ratio fixed, compare sized its own least-mass TMD
    # (210 t where design used 84 t). The rows must be the case's own damper.
    shutil.copy(CASES / "harbourline_force.csv", tmp_path)
    text = (CASES / "harbourline_residences.toml").read_text(encoding="utf-8")
    text = text.replace('objective = "acceleration"',
                        f'objective = "{objective}"\nmass_ratio = 0.004')
    text += '\n[options]\nenabled = ["tmd", "pendulum"]\n'
    path = tmp_path / "fixed.toml"
    path.write_text(text, encoding="utf-8")
    case = read_case(path)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        design = design_job(case)["design"]
        rows = {r["option"]: r for r in compare_job(case)["options"]}
    for name in ("tmd", "pendulum"):
        row = rows[name]
        assert row["mass_ratio"] == pytest.approx(0.004, rel=1e-12)
        # Same tuning through the same engine: equal to rounding.
        assert row["dampers"][0]["frequency_hz"] == pytest.approx(design["frequency_hz"],
                                                                  rel=1e-9)
        assert row["peak_acceleration_m_s2"] == pytest.approx(design["peak_acceleration_m_s2"],
                                                              rel=1e-9)
        assert row["meets_target"] == design["meets_target"]
