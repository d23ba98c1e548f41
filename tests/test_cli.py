"""The command line: exit codes, messages and files (typer's CliRunner)."""

import json
import shutil
from pathlib import Path

import pytest
from typer.testing import CliRunner

from tests.consistency import assert_consistent_results
from tmd import cli
from tmd.cli import app

CASES = Path(__file__).resolve().parents[1] / "cases"
DEMO = CASES / "harbourline_residences.toml"
runner = CliRunner()


@pytest.fixture(scope="module")
def design_run(tmp_path_factory, design_results):
    # The CLI's own path (parsing, output folder, report, summary) on the
    # session's shared design run of the demo (tests/conftest.py).
    out = tmp_path_factory.mktemp("design")
    with pytest.MonkeyPatch.context() as patch:
        patch.setattr(cli, "design_job", lambda case: design_results(case.path))
        result = runner.invoke(app, ["design", str(DEMO), "--out", str(out)])
    return result, out


def test_design_writes_results_with_the_documented_keys(design_run):
    result, out = design_run
    assert result.exit_code == 0, result.output
    data = json.loads((out / "results.json").read_text())
    assert_consistent_results(data)
    for key in ("tool_version", "schema_version", "case", "bare", "design", "target"):
        assert key in data
    assert set(data["bare"]) >= {"sigma_acceleration_m_s2", "peak_acceleration_m_s2",
                                 "peak_factor", "upcrossing_hz", "sigma_displacement_m"}
    assert set(data["design"]) >= {
        "mass_ratio", "mass_kg", "frequency_ratio", "frequency_hz", "damping_ratio",
        "stiffness_n_per_m", "damping_n_s_per_m", "sigma_acceleration_m_s2",
        "peak_acceleration_m_s2", "sigma_stroke_m", "peak_stroke_m", "peak_damper_force_n",
        "effective_damping_ratio", "meets_target"}
    assert set(data["target"]) == {"peak_acceleration_m_s2", "duration_s", "peak_method"}
    assert data["target"]["peak_method"] == "davenport"
    assert data["case"]["inputs"]["mode"]["frequency_hz"] == 0.17
    assert data["cautions"] and "re-tuned" in " ".join(data["cautions"])
    # The summary shows milli-g on screen.
    assert "milli-g" in result.output and "damper mass" in result.output


def test_evaluate_json_matches_design_block(design_run):
    _, out = design_run
    d = json.loads((out / "results.json").read_text())["design"]
    result = runner.invoke(app, ["evaluate", str(DEMO), "--mass-ratio", repr(d["mass_ratio"]),
                                 "--frequency-ratio", repr(d["frequency_ratio"]),
                                 "--damping-ratio", repr(d["damping_ratio"]), "--json"])
    assert result.exit_code == 0, result.output
    assert_consistent_results(json.loads(result.stdout))
    again = json.loads(result.stdout)["design"]
    # Same design through the same engine: equal to rounding.
    for key in ("peak_acceleration_m_s2", "peak_stroke_m", "effective_damping_ratio"):
        assert again[key] == pytest.approx(d[key], rel=1e-9)


def test_unmet_target_still_exits_zero(tmp_path):
    shutil.copy(CASES / "harbourline_force.csv", tmp_path)
    text = DEMO.read_text().replace("peak_acceleration_m_s2 = 0.10",
                                    "peak_acceleration_m_s2 = 0.01")
    (tmp_path / "c.toml").write_text(text)
    result = runner.invoke(app, ["design", str(tmp_path / "c.toml"), "--out", str(tmp_path / "o")])
    assert result.exit_code == 0, result.output
    data = json.loads((tmp_path / "o" / "results.json").read_text())
    assert_consistent_results(data)
    assert data["design"]["meets_target"] is False
    assert "cannot be met" in result.output


def test_bad_input_exits_two_without_traceback(tmp_path):
    shutil.copy(CASES / "harbourline_force.csv", tmp_path)
    text = DEMO.read_text().replace("damping_ratio = 0.012", "damping_ratio = -0.01")
    (tmp_path / "c.toml").write_text(text)
    result = runner.invoke(app, ["design", str(tmp_path / "c.toml"), "--out", str(tmp_path / "o")])
    assert result.exit_code == 2
    assert "[mode] damping_ratio = -0.01" in result.output
    assert "Traceback" not in result.output
    assert not (tmp_path / "o").exists()  # nothing written for a bad case


def test_missing_case_file_exits_two(tmp_path):
    result = runner.invoke(app, ["design", str(tmp_path / "nope.toml")])
    assert result.exit_code == 2 and "no such case file" in result.output


def test_evaluate_rejects_bad_damping(tmp_path):
    result = runner.invoke(app, ["evaluate", str(DEMO), "--mass-ratio", "0.02",
                                 "--frequency-ratio", "0.98", "--damping-ratio", "1.5"])
    assert result.exit_code == 2 and "--damping-ratio = 1.5" in result.output


def test_inputs_are_never_overwritten(tmp_path):
    shutil.copy(CASES / "harbourline_force.csv", tmp_path / "results.json")
    text = DEMO.read_text().replace("harbourline_force.csv", "results.json")
    (tmp_path / "c.toml").write_text(text)
    before = (tmp_path / "results.json").read_bytes()
    result = runner.invoke(app, ["design", str(tmp_path / "c.toml"), "--out", str(tmp_path)])
    assert result.exit_code == 2 and "will not be overwritten" in result.output
    assert (tmp_path / "results.json").read_bytes() == before


def test_version_option_prints_the_installed_distribution_version():
    # The installed package metadata (importlib.metadata, what pip reports) is
    # the outside reference for the version the CLI prints.
    from importlib.metadata import version

    result = runner.invoke(app, ["--version"])
    assert result.exit_code == 0
    assert result.output.strip() == f"tmd {version('tmd')}"
