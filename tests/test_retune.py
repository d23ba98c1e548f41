"""Re-tuning a built damper to a measured structure."""

import json
import warnings
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from tmd.cli import app
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, evaluate_tmd, tune
from tmd.retune import BuiltDamper, measured_structure, retune_damper
from tmd.spectra import TabulatedSpectrum
from tmd.structure import Mode

CASES = Path(__file__).resolve().parents[1] / "cases"
runner = CliRunner()


def one_over_f_load(duration_s=3600.0):
    # S_F = C / f: sigma_a^2 = C (s f_s)^0 * integral u^-1 |h_a(u)|^2 du, independent of
    # where f_s lies (dimensional analysis, common practice), up to the fixed 10 Hz
    # cut-off of the background part.
    f = np.geomspace(1e-3, 10.0, 50)
    return LoadedMode(Mode(0.2, 2.0e7, 0.01), TabulatedSpectrum(f, 1e10 / f), duration_s)


@pytest.fixture(scope="module")
def shifted():
    load = one_over_f_load()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the 1/f load's m2 sits at its cut-off, as intended
        t = tune(load, 0.01)
        nominal = evaluate_tmd(load, TunedMassDamper(0.01, t.frequency_ratio, t.damping_ratio))
        built = BuiltDamper.of(nominal.damper, load.mode)
        structure = measured_structure(load.mode, 0.01, 0.0, 0.92 * 0.2)
        r = retune_damper(load, structure, built, adjustment_band=0.15)
    return load, nominal, built, structure, r


def test_retune_to_8_percent_lower_restores_the_nominal_peak(shifted):
    _, nominal, _, _, r = shifted
    # Scale invariance of the 1/f load (above): a damper re-tuned to the softer
    # structure gives back the nominal-tuning peak; the issue asks for 1%
    # (measured here 0.13%, from the fixed cut-off and the peak factor).
    assert r.after.peak_acceleration_m_s2 == pytest.approx(nominal.peak_acceleration_m_s2,
                                                           rel=0.01)
    # The damper left as installed is detuned by 8%: markedly worse (measured +21%).
    assert r.before.peak_acceleration_m_s2 > 1.1 * nominal.peak_acceleration_m_s2
    assert r.after.peak_acceleration_m_s2 <= r.before.peak_acceleration_m_s2


def test_retuned_ratios_equal_tune_on_the_measured_structure(shifted):
    load, _, built, _, r = shifted
    measured = LoadedMode(Mode(0.184, 2.0e7, 0.01), load.spectrum, load.duration_s)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        t = tune(measured, built.mass_kg / 2.0e7)
    assert r.frequency_ratio == pytest.approx(t.frequency_ratio, abs=1e-6)
    assert r.retuned.damping_ratio == pytest.approx(t.damping_ratio, abs=1e-6)
    # k = m (2 pi f_d)^2 and c = 2 zeta m (2 pi f_d) (README conventions) at the built mass.
    w = 2 * np.pi * t.frequency_ratio * 0.184
    assert r.retuned.mass_kg == pytest.approx(built.mass_kg, rel=1e-12)
    assert r.retuned.stiffness_n_per_m == pytest.approx(built.mass_kg * w * w, rel=1e-5)
    assert r.retuned.damping_n_s_per_m == pytest.approx(2 * t.damping_ratio * built.mass_kg * w,
                                                        rel=1e-5)
    # An 8% shift lies inside a +/-15% range, not inside +/-5%.
    assert r.within_adjustment_range
    f_lo, _ = r.frequency_range_hz
    assert f_lo == pytest.approx(0.85 * built.frequency_hz, rel=1e-12)


def test_range_check_uses_frequency_and_spring(shifted):
    load, _, built, structure, _ = shifted
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        narrow = retune_damper(load, structure, built, adjustment_band=0.05)
    assert not narrow.within_adjustment_range


def test_built_damper_round_trip():
    # k = m w^2 and c = 2 zeta m w (README conventions), inverted.
    mode = Mode(0.18, 2.1e7, 0.012)
    d = TunedMassDamper(0.02, 0.97, 0.08)
    b = BuiltDamper.of(d, mode)
    assert b.frequency_hz == pytest.approx(0.97 * 0.18, rel=1e-14)
    assert b.damping_ratio == pytest.approx(0.08, rel=1e-14)
    back = b.on(mode)
    assert (back.mass_ratio, back.frequency_ratio) == pytest.approx((0.02, 0.97), rel=1e-14)


def test_measured_structure_keeps_case_values_and_scales_aerodynamic_damping():
    mode = Mode(0.18, 2.1e7, 0.012)
    s = measured_structure(mode, 0.012, 0.002, 0.9 * 0.18)
    # EN 1991-1-4 (F.18): aerodynamic damping proportional to 1 / n_1.
    assert s.aerodynamic_damping_ratio == pytest.approx(0.002 / 0.9, rel=1e-12)
    assert s.modal_mass_kg == 2.1e7 and s.structural_damping_ratio == 0.012
    m = measured_structure(mode, 0.012, 0.002, 0.17, damping_ratio=0.009, modal_mass_kg=2.0e7)
    assert (m.structural_damping_ratio, m.modal_mass_kg, m.damping_source) == (
        0.009, 2.0e7, "measured")
    with pytest.raises(ValueError, match="measured-damping-ratio"):
        measured_structure(mode, 0.012, 0.0, 0.17, damping_ratio=1.5)


@pytest.fixture(scope="module")
def harbourline_results(tmp_path_factory):
    out = tmp_path_factory.mktemp("retune")
    case = CASES / "harbourline_residences.toml"
    result = runner.invoke(app, ["design", str(case), "--out", str(out)])
    assert result.exit_code == 0, result.output
    return case, out / "results.json"


def test_cli_retune_json(harbourline_results):
    case, results = harbourline_results
    design = json.loads(results.read_text())["design"]
    f_nominal = json.loads(results.read_text())["case"]["inputs"]["mode"]["frequency_hz"]
    result = runner.invoke(app, ["retune", str(case), "--design-from", str(results),
                                 "--measured-frequency-hz", repr(0.95 * f_nominal),
                                 "--measured-damping-ratio", "0.011", "--json"])
    assert result.exit_code == 0, result.output
    r = json.loads(result.stdout)["retuned"]
    for key in ("frequency_hz", "damping_ratio", "stiffness_n_per_m", "damping_n_s_per_m",
                "within_adjustment_range", "peak_acceleration_before_m_s2",
                "peak_acceleration_after_m_s2"):
        assert key in r
    assert r["mass_kg"] == pytest.approx(design["mass_kg"], rel=1e-12)
    assert r["structure"]["structural_damping_ratio"] == 0.011
    assert r["peak_acceleration_after_m_s2"] <= r["peak_acceleration_before_m_s2"]
    assert "counted twice" in r["damping_note"] and r["cautions"]
    # The designed damper given to evaluate as built properties (kg, N/m, N s/m).
    again = runner.invoke(app, ["evaluate", str(case), "--damper-mass-kg", repr(design["mass_kg"]),
                                "--damper-stiffness-n-per-m", repr(design["stiffness_n_per_m"]),
                                "--damper-damping-n-s-per-m", repr(design["damping_n_s_per_m"]),
                                "--json"])
    assert again.exit_code == 0, again.output
    e = json.loads(again.stdout)["design"]
    # Same device through k = m w^2, c = 2 zeta m w and back: equal to rounding.
    assert e["peak_acceleration_m_s2"] == pytest.approx(design["peak_acceleration_m_s2"], rel=1e-9)
    assert e["frequency_ratio"] == pytest.approx(design["frequency_ratio"], rel=1e-12)


@pytest.mark.parametrize("args, message", [
    (["--measured-frequency-hz", "-0.1"], "must be"),
    (["--measured-frequency-hz", "0.17", "--measured-damping-ratio", "2"], "(0, 1)"),
])
def test_cli_retune_bad_input_exit_2(harbourline_results, args, message):
    case, results = harbourline_results
    result = runner.invoke(app, ["retune", str(case), "--design-from", str(results), *args])
    assert result.exit_code == 2, result.output
    assert message in result.output


def test_cli_evaluate_mixed_or_partial_damper_options_exit_2():
    case = CASES / "harbourline_residences.toml"
    partial = runner.invoke(app, ["evaluate", str(case), "--damper-mass-kg", "1e5"])
    assert partial.exit_code == 2 and "missing" in partial.output
    mixed = runner.invoke(app, ["evaluate", str(case), "--mass-ratio", "0.01",
                                "--damper-mass-kg", "1e5"])
    assert mixed.exit_code == 2 and "not" in mixed.output
