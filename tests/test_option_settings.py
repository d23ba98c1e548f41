"""Option settings from the case file: the viscous installation and its capacities."""

import shutil
import warnings
from pathlib import Path

import numpy as np
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


def test_bank_column_and_tank_tables_reach_their_sizing(tmp_path):
    # Every key of the three tables lands in its settings dataclass, and the sizing
    # uses it: the geometry follows from the given layout by the device formulas.
    case = _case(tmp_path, "\n[options]\nenabled = [\"tmd-bank\", \"liquid-column\", "
                           "\"sloshing-tank\"]\n"
                           "[options.tmd_bank]\nfrequency_ratios = [0.96, 1.0]\n"
                           "damping_ratios = [0.07]\nfrequency_factors = [1.0]\n"
                           "max_iterations = 5\ntolerance = 1e-3\nprune_share = 0.0\n"
                           "[options.liquid_column]\nlength_ratio = 0.6\ncolumns = 2\n"
                           "max_excursion_ratio = 0.7\ndensity_kg_m3 = 1200.0\n"
                           "[options.sloshing_tank]\ndepth_ratio = 0.12\n"
                           "max_tank_width_m = 6.0\nfreeboard_m = 1.5\n"
                           "screen_positions = [0.5]\ndensity_kg_m3 = 1000.0\n"
                           "kinematic_viscosity_m2_s = 1.3e-6\n")
    s = option_settings_of(case)
    assert (s.bank.frequency_ratios, s.bank.damping_ratios, s.bank.frequency_factors) == (
        (0.96, 1.0), (0.07,), (1.0,))
    assert (s.bank.max_iterations, s.bank.tolerance, s.bank.prune_share) == (5, 1e-3, 0.0)
    assert (s.column.length_ratio, s.column.columns, s.column.max_excursion_ratio,
            s.column.density_kg_m3) == (0.6, 2, 0.7, 1200.0)
    assert (s.tank.depth_ratio, s.tank.max_tank_width_m, s.tank.freeboard_m,
            s.tank.screen_positions, s.tank.kinematic_viscosity_m2_s) == (
        0.12, 6.0, 1.5, (0.5,), 1.3e-6)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        from tmd.jobs import compare_job

        rows = {r["option"]: r for r in compare_job(case)["options"]}
    f_s = case.mode.frequency_hz
    # The bank's members are candidates of the given grid only.
    for d in rows["tmd-bank"]["dampers"]:
        assert min(abs(d["frequency_hz"] / f_s - r) for r in (0.96, 1.0)) < 1e-12
        assert d["damping_ratio"] == 0.07
    col = rows["liquid-column"]
    dims = col["dimensions"]
    # Sakai et al. (1989): omega_l = sqrt(2 g / L); B = alpha L; h = (1 - alpha) L / 2;
    # A = m / (n rho L) per column.
    g, w = 9.80665, 2 * np.pi * col["frequency_hz"]
    assert dims["liquid_length_m"] == pytest.approx(2 * g / w**2, rel=1e-12)
    assert dims["horizontal_length_m"] == pytest.approx(0.6 * dims["liquid_length_m"], rel=1e-12)
    assert dims["cross_section_area_m2"] == pytest.approx(
        col["mass_kg"] / (2 * 1200.0 * dims["liquid_length_m"]), rel=1e-12)
    assert col["columns"] == 2 and col["peak_excursion_ratio"] <= 0.7 * (1 + 1e-6)
    tank = rows["sloshing-tank"]
    # Linear wave theory (e.g. Abramson 1966): omega^2 = (pi g / L) tanh(pi h / L).
    L, h = tank["dimensions"]["tank_length_m"], tank["dimensions"]["water_depth_m"]
    assert h == pytest.approx(0.12 * L, rel=1e-12)
    assert (2 * np.pi * tank["frequency_hz"]) ** 2 == pytest.approx(
        np.pi * g / L * np.tanh(np.pi * 0.12), rel=1e-12)
    assert tank["dimensions"]["tank_width_m"] <= 6.0
    assert tank["screen_positions"] == [0.5] and tank["dimensions"]["freeboard_m"] == 1.5
    assert tank["peak_free_surface_elevation_m"] <= 1.5 * (1 + 1e-6)


@pytest.mark.parametrize("options, message", [
    ("[options.tmd_bank]\ndamping_ratios = [0.05, 0.7]\n",
     r"\[options.tmd_bank\] damping_ratios\[1\] = 0.7: must be <= 0.5"),
    ("[options.tmd_bank]\nfrequency_ratios = [0.2]\n",
     r"\[options.tmd_bank\] frequency_ratios\[0\] = 0.2: must be >= 0.5"),
    ("[options.tmd_bank]\nfrequency_factors = []\n", "at least one entry"),
    ("[options.tmd_bank]\nmax_iterations = 2.0\n", "must be a whole number"),
    ("[options.tmd_bank]\nfrequency_ratios = [0.90, 0.90]\n", "given twice"),
    ("[options.tmd_bank]\nfrequency_ratios = " + str([0.5 + 0.02 * i for i in range(21)])
     + "\n", "at most 20 entries"),
    ("[options.liquid_column]\nlength_ratio = 1.0\n",
     r"\[options.liquid_column\] length_ratio = 1.0: must be < 1"),
    ("[options.liquid_column]\ncolumns = 0\n", "columns = 0: must be >= 1"),
    ("[options.liquid_column]\nmax_excursion_ratio = 1.5\n", "must be <= 1"),
    ("[options.liquid_column]\ndensity_kg_m3 = 1.0\n", "must be >= 500"),
    ("[options.sloshing_tank]\ndepth_ratio = 0.0\n", "depth_ratio = 0.0: must be > 0"),
    ("[options.sloshing_tank]\nfreeboard_m = nan\n", "must be a finite number"),
    ("[options.sloshing_tank]\nscreen_positions = [1.2]\n",
     r"screen_positions\[0\] = 1.2: must be < 1"),
    ("[options.sloshing_tank]\nmax_tank_width_m = \"6\"\n", "must be a number"),
    ("[options.sloshing_tank]\nfree_board_m = 1.0\n", "did you mean 'freeboard_m'"),
])
def test_bad_bank_column_and_tank_keys_exit_2_naming_file_field_value_and_rule(
        tmp_path, options, message):
    from typer.testing import CliRunner

    from tmd.cli import app

    _case(tmp_path, "")  # copies the force CSV beside the case
    path = tmp_path / "bad.toml"
    path.write_text((CASES / "harbourline_residences.toml").read_text(encoding="utf-8")
                    + "\n" + options, encoding="utf-8")
    with pytest.raises(CaseError, match=message):
        read_case(path)
    r = CliRunner().invoke(app, ["compare", str(path), "--out", str(tmp_path / "out")])
    assert r.exit_code == 2 and "Traceback" not in r.output
    assert "bad.toml" in r.output and not (tmp_path / "out").exists()
