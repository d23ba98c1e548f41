"""`tmd simulate`: files, seeds and refusals with the option named (typer's CliRunner)."""

import json
from pathlib import Path

import pytest
from typer.testing import CliRunner

from tmd.cli import app

CASES = Path(__file__).resolve().parents[1] / "cases"
DEMO = CASES / "harbourline_residences.toml"
runner = CliRunner()
# A TMD near the demo's optimum, written as a results.json design block.
DESIGN = {"design": {"mass_ratio": 0.03, "frequency_ratio": 0.985, "damping_ratio": 0.085}}


@pytest.fixture(scope="module")
def design_file(tmp_path_factory):
    path = tmp_path_factory.mktemp("sim") / "results.json"
    path.write_text(json.dumps(DESIGN))
    return path


def _run(design_file, *extra):
    return runner.invoke(app, ["simulate", str(DEMO), "--design-from", str(design_file),
                               "--records", "12", *extra])


def test_simulate_writes_results_history_and_figures(design_file, tmp_path):
    before = design_file.read_bytes()
    result = _run(design_file, "--out", str(tmp_path / "out"))
    assert result.exit_code == 0, result.output
    data = json.loads((tmp_path / "out" / "results.json").read_text())
    row = data["simulation"]["by_load"][0]
    acc = row["design"]["acceleration"]
    # The spectral rms lies in the simulated 99% interval (the engine is exact
    # for rms: test_response.py); a maxima share and both peak formulas given.
    assert acc["sigma_ci99_low_m_s2"] <= acc["sigma_spectral_m_s2"] <= acc["sigma_ci99_high_m_s2"]
    assert 0 <= acc["records_over_limit_fraction"] <= 1
    assert acc["davenport_peak_m_s2"] > 0 and acc["vanmarcke_peak_two_sided_m_s2"] > 0
    header = (tmp_path / "out" / "time_history.csv").read_text().splitlines()[0]
    assert header == "time_s,force_n,acceleration_m_s2,stroke_m,damper_force_n"
    for name in ("maxima.png", "time_history.png"):
        assert (tmp_path / "out" / "figures" / name).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert design_file.read_bytes() == before


def test_same_seed_same_json_other_seed_other_json(design_file):
    a, b, c = (_run(design_file, "--json", "--seed", s) for s in ("4", "4", "5"))
    assert a.exit_code == b.exit_code == c.exit_code == 0, a.output
    assert a.output == b.output
    assert a.output != c.output


@pytest.mark.parametrize("extra, flag", [
    (("--records", "5"), "--records"),
    (("--duration-s", "30"), "--duration-s"),
    (("--time-step-s", "0.2"), "--time-step-s"),
    (("--end-stop-travel-m", "-1"), "--end-stop-travel-m"),
    (("--option", "rocket"), "--option"),
])
def test_bad_settings_exit_2_naming_the_option(design_file, extra, flag):
    result = runner.invoke(app, ["simulate", str(DEMO), "--design-from", str(design_file),
                                 "--records", "12", *extra])
    assert result.exit_code == 2
    assert flag in result.output
    assert "Traceback" not in result.output


def test_simulate_a_liquid_column_and_with_end_stops(tmp_path):
    # A column row as `tmd compare` writes it (mass, frequency, alpha, xi and
    # dimensions); its liquid length is the U-tube's 2 g / omega^2 at 0.16745 Hz.
    row = {"option": "liquid-column", "mass_kg": 5.7e5, "frequency_hz": 0.16745,
           "length_ratio": 0.7, "head_loss_coefficient": 20.0,
           "dimensions": {"liquid_length_m": 17.718, "vertical_leg_height_m": 4.5,
                          "vertical_liquid_height_m": 2.66}}
    path = tmp_path / "compare.json"
    path.write_text(json.dumps({"options": [row]}))
    result = runner.invoke(app, ["simulate", str(DEMO), "--design-from", str(path), "--option",
                                 "liquid-column", "--records", "10", "--duration-s", "120",
                                 "--json"])
    assert result.exit_code == 0, result.output
    from tests.consistency import assert_consistent_results
    data = json.loads(result.output)
    assert_consistent_results(data)
    design = data["simulation"]["by_load"][0]["design"]
    assert design["freeboard_m"] == pytest.approx(4.5 - 2.66)
    assert 0.0 <= design["overflow_record_fraction"] <= 1.0
    assert design["step_halving_stroke_rms_change_fraction"] < 0.01


def test_end_stops_report_contacts(design_file):
    result = _run(design_file, "--end-stop-travel-m", "0.2", "--duration-s", "120", "--json")
    assert result.exit_code == 0, result.output
    from tests.consistency import assert_consistent_results
    data = json.loads(result.output)
    assert_consistent_results(data)
    design = data["simulation"]["by_load"][0]["design"]
    # A 0.2 m travel is under two rms strokes of this TMD (about 0.11 m
    # each), so by Rice's crossing rate the stops are met many times an hour.
    assert design["hourly_end_stop_contact_count"] > 10
    assert design["stroke"]["max_abs_mean_m"] < 0.3
