"""Wind cases, robustness, comparison and sweep through the case file and the CLI."""

import copy
import json
from pathlib import Path

import pytest
from typer.testing import CliRunner

from tests.consistency import assert_consistent_results
from tmd import cli
from tmd.case import CaseError, read_case
from tmd.cli import app

CASES = Path(__file__).resolve().parents[1] / "cases"
HARBOUR = CASES / "harbourline_residences.toml"
runner = CliRunner()

WIND = """name = "wind test tower"
[mode]
frequency_hz = 0.2
modal_mass_kg = 1.5e7
damping_ratio = 0.015
[building]
height_m = 150.0
breadth_m = 30.0
depth_m = 30.0
drag_coefficient = 1.3
mode_shape_exponent = 1.0
[wind]
terrain = "III"
basic_speed_m_s = 28.0
n_strips = 20
return_periods_years = [1, 50]
aerodynamic_damping = true
[target]
peak_acceleration_m_s2 = 0.05
return_period_years = 1
[damper]
max_mass_ratio = 0.05
"""


def _write(tmp_path, text):
    path = tmp_path / "wind.toml"
    path.write_text(text, encoding="utf-8")
    return path


def test_wind_command_reports_annex_b_and_spectral_route(tmp_path):
    result = runner.invoke(app, ["wind", str(_write(tmp_path, WIND)), "--json"])
    assert result.exit_code == 0, result.output
    assert_consistent_results(json.loads(result.stdout))
    rows = json.loads(result.stdout)["return_periods"]
    assert [r["return_period_years"] for r in rows] == [1.0, 50.0]
    keys = {"reference_height_m", "mean_speed_m_s", "turbulence_intensity", "length_scale_m",
            "background_factor_sq", "resonance_factor_sq", "size_reduction_height",
            "size_reduction_breadth", "log_decrement_total", "upcrossing_hz", "peak_factor",
            "structural_factor", "peak_factor_acceleration", "sigma_acceleration_m_s2",
            "peak_acceleration_m_s2", "spectral_sigma_acceleration_m_s2",
            "spectral_peak_acceleration_m_s2"}
    assert keys <= set(rows[0])
    # EN 1991-1-4 z_s = 0.6 h = 90 m; the 50-year mean speed exceeds the 1-year one
    # by 1/c_prob(1) = 1/0.749 (the standard's probability factor).
    assert rows[0]["reference_height_m"] == pytest.approx(90.0)
    assert rows[1]["mean_speed_m_s"] / rows[0]["mean_speed_m_s"] == pytest.approx(1 / 0.749,
                                                                                  rel=2e-3)
    # The two routes differ in coherence model and mode-shape treatment (see
    # tests/wind): agreement within 30% is what that allows for this building.
    for r in rows:
        ratio = r["spectral_sigma_acceleration_m_s2"] / r["sigma_acceleration_m_s2"]
        assert 0.7 < ratio < 1.3


def test_design_reports_every_return_period(tmp_path):
    out = tmp_path / "out"
    result = runner.invoke(app, ["design", str(_write(tmp_path, WIND)), "--out", str(out)])
    assert result.exit_code == 0, result.output
    data = json.loads((out / "results.json").read_text())
    assert_consistent_results(data)
    rows = data["by_return_period"]
    assert [r["return_period_years"] for r in rows] == [1.0, 50.0]
    # The design return period's row is the design itself.
    assert rows[0]["design"]["peak_acceleration_m_s2"] == pytest.approx(
        data["design"]["peak_acceleration_m_s2"], rel=1e-12)
    assert abs(data["design"]["peak_acceleration_m_s2"] / 0.05 - 1) < 1e-4
    # A stronger wind gives a larger response (physics, common practice).
    assert rows[1]["bare"]["peak_acceleration_m_s2"] > rows[0]["bare"]["peak_acceleration_m_s2"]
    assert rows[1]["design"]["peak_stroke_m"] > rows[0]["design"]["peak_stroke_m"]
    assert rows[0]["aerodynamic_damping_ratio"] > 0
    assert (out / "report.html").exists() and (out / "figures" / "comfort.png").exists()


@pytest.mark.parametrize("old, new, needle", [
    ('terrain = "III"', 'terrain = "V"', "[wind] terrain = 'V'"),
    ("basic_speed_m_s = 28.0", "basic_speed_m_s = -28.0", "[wind] basic_speed_m_s = -28.0"),
    ("mode_shape_exponent = 1.0", "mode_shape_exponent = 1.0\ndamper_height_m = 160.0",
     "damper_height_m"),
    ("return_period_years = 1\n", "", "return_period_years is required"),
    ("[wind]", "[wnd]", "did you mean 'wind'"),
])
def test_bad_wind_input_is_named(tmp_path, old, new, needle):
    assert old in WIND
    with pytest.raises(CaseError) as err:
        read_case(_write(tmp_path, WIND.replace(old, new)))
    assert needle in str(err.value)


def test_heights_outside_the_building_exit_two(tmp_path):
    text = WIND.replace("mode_shape_exponent = 1.0", "mode_shape_exponent = 1.0\n"
                        "evaluation_height_m = 151.0")
    result = runner.invoke(app, ["design", str(_write(tmp_path, text))])
    assert result.exit_code == 2 and "evaluation_height_m" in result.output
    assert "Traceback" not in result.output


def _shared_jobs(monkeypatch, design_results, demo_compare):
    """The CLI on the session's shared demo runs (tests/conftest.py), not new ones."""
    monkeypatch.setattr(cli, "design_job", lambda case: design_results(case.path))
    monkeypatch.setattr(cli, "compare_job", lambda case: copy.deepcopy(demo_compare[1]))


def test_compare_lists_every_option_and_its_tmd_row_equals_design(tmp_path, monkeypatch,
                                                                  design_results, demo_compare):
    _shared_jobs(monkeypatch, design_results, demo_compare)
    result = runner.invoke(app, ["compare", str(HARBOUR), "--out", str(tmp_path / "c")])
    assert result.exit_code == 0, result.output
    compared = json.loads((tmp_path / "c" / "results.json").read_text())
    assert_consistent_results(compared)
    options = compared["options"]
    names = [o["option"] for o in options]
    assert names == ["tmd", "pendulum", "tmd-bank", "liquid-column", "sloshing-tank", "viscous"]
    design = runner.invoke(app, ["design", str(HARBOUR), "--out", str(tmp_path / "d")])
    assert design.exit_code == 0
    designed = json.loads((tmp_path / "d" / "results.json").read_text())
    assert_consistent_results(designed)
    d = designed["design"]
    # Same least-mass search on the same case: equal to the solver's tolerance.
    assert options[0]["mass_kg"] == pytest.approx(d["mass_kg"], rel=1e-9)


def test_sweep_from_results_at_nominal_equals_the_design(tmp_path, monkeypatch, design_results,
                                                         demo_compare):
    _shared_jobs(monkeypatch, design_results, demo_compare)
    out = tmp_path / "d"
    assert runner.invoke(app, ["design", str(HARBOUR), "--out", str(out)]).exit_code == 0
    d = json.loads((out / "results.json").read_text())["design"]
    result = runner.invoke(app, ["sweep", str(HARBOUR), "--design-from",
                                 str(out / "results.json"), "--json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert_consistent_results(data)
    at_one = [p for p in data["sweep"] if p["structure_frequency_factor"] == 1.0]
    assert len(at_one) == 1
    # The sweep at s = 1 is the nominal evaluation (issue 4's identity).
    assert at_one[0]["peak_acceleration_m_s2"] == pytest.approx(d["peak_acceleration_m_s2"],
                                                                rel=1e-9)
    assert data["peak_acceleration_band_max_m_s2"] >= d["peak_acceleration_m_s2"]


def test_sweep_needs_a_design(tmp_path):
    result = runner.invoke(app, ["sweep", str(HARBOUR), "--mass-ratio", "0.02"])
    assert result.exit_code == 2 and "--design-from" in result.output
