"""Peak methods of the design: Vanmarcke's spectral peak and the simulated outer loop."""

import math
from pathlib import Path

import pytest

from tests.consistency import assert_consistent_results
from tmd.case import CaseError, read_case
from tmd.dampers.absorber import single_tmd
from tmd.jobs import design_job
from tmd.peak import vanmarcke_peak_factor
from tmd.performance import assess
from tmd.response import spectral_response
from tmd.simulated_sizing import MASS_RTOL, MAX_ITERATIONS
from tmd.spectra import FirstOrderSpectrum

CASES = Path(__file__).resolve().parents[1] / "cases"
DEMO = CASES / "harbourline_residences.toml"


def _variant(tmp_path, target_lines: str, extra: str = "") -> Path:
    text = DEMO.read_text().replace("duration_s = 600\n", "duration_s = 600\n" + target_lines)
    path = tmp_path / "variant.toml"
    path.write_text(text + extra)
    (tmp_path / "harbourline_force.csv").write_bytes((CASES / "harbourline_force.csv")
                                                     .read_bytes())
    return path


def test_vanmarcke_peak_method_is_the_two_sided_first_passage_mean():
    # assess(peak_method="vanmarcke") = g_V(nu, q, T) sigma with Vanmarcke's
    # (1975) two-sided mean (tmd.peak, checked against Rice's law there).
    load, tmd = FirstOrderSpectrum(4e10, 0.05, f_max_hz=10.0), single_tmd(0.17, 1.9e7, 0.03,
                                                                         0.985, 0.085)
    a = assess(0.17, 1.9e7, 0.012, tmd, load, 600.0, peak_method="vanmarcke")
    acc = spectral_response(0.17, 1.9e7, 0.012, tmd, load).acceleration
    g = vanmarcke_peak_factor(acc.upcrossing_hz, acc.bandwidth, 600.0, two_sided=True)
    assert float(a.peak_acceleration_m_s2) == pytest.approx(float(g * acc.sigma), rel=1e-12)
    assert float(a.peak_factor) == pytest.approx(float(g), rel=1e-12)


def test_design_by_vanmarcke_states_its_method_and_meets_by_it(tmp_path):
    result = design_job(read_case(_variant(tmp_path, 'peak_method = "vanmarcke"\n')))
    assert_consistent_results(result)
    assert result["target"]["peak_method"] == "vanmarcke"
    assert result["sizing"]["peak_method"] == "vanmarcke"
    est = result["peak_estimates"]
    assert result["design"]["peak_acceleration_m_s2"] == pytest.approx(
        est["vanmarcke_peak_acceleration_m_s2"], rel=1e-9)
    assert est["davenport_peak_acceleration_m_s2"] != est["vanmarcke_peak_acceleration_m_s2"]


def test_simulated_peak_loop_converges_on_the_demo(tmp_path):
    # The check: the outer loop settles (mass change < 0.5%) within
    # its 10 passes, and the verdict is the simulated statistic's.
    case = read_case(_variant(tmp_path, 'peak_method = "simulated"\n',
                              "\n[simulation]\nrecords = 20\nseed = 4\n"))
    result = design_job(case)
    assert_consistent_results(result)
    passes = result["peak_correction"]["passes"]
    assert 2 <= len(passes) < MAX_ITERATIONS
    last, before = passes[-1]["mass_ratio"], passes[-2]["mass_ratio"]
    assert abs(last - before) <= MASS_RTOL * before
    design = result["design"]
    assert design["peak_acceleration_m_s2"] == passes[-1]["simulated_peak_m_s2"]
    assert design["meets_target"] is (design["peak_acceleration_m_s2"]
                                      <= result["target"]["peak_acceleration_m_s2"])
    assert design["meets_target"] is result["sizing"]["meets_target"] is True
    # Every pass used the same random phases: the ratio moves only with the design.
    ratios = [p["simulated_to_spectral_ratio"] for p in passes]
    assert max(ratios) - min(ratios) < 0.02
    assert math.isclose(result["peak_estimates"]["simulated_peak_acceleration_m_s2"],
                        design["peak_acceleration_m_s2"])


def test_a_fractile_needs_the_simulated_method(tmp_path):
    with pytest.raises(CaseError, match="peak_fractile"):
        read_case(_variant(tmp_path, "peak_fractile = 0.8\n"))


def test_a_loop_that_does_not_settle_stops_and_warns(monkeypatch):
    # A simulated peak alternately 30% above and below the spectral one keeps the
    # corrected target, hence the least mass, moving: the loop must stop after
    # MAX_ITERATIONS passes and say so (SimulatedPeakWarning).
    import tmd.simulated_sizing as simulated
    from tmd.design import LoadedMode, bare_response, least_mass
    from tmd.simulation import SimulationSettings
    from tmd.spectra import FirstOrderSpectrum
    from tmd.structure import Mode

    passes = []

    def alternating(load, design, settings, period_s, fractile=None):
        passes.append(design.mass_ratio)
        return design.peak_acceleration_m_s2 * (1.3 if len(passes) % 2 else 0.7)

    monkeypatch.setattr(simulated, "simulated_peak", alternating)
    load = LoadedMode(Mode(0.2, 1e7, 0.01), FirstOrderSpectrum(1e8, 0.3), 600.0)
    # Met by 2.3% of M*; the corrected targets then alternate between masses of about
    # 0.3% and 8.5%, inside max_mass_ratio, so no limit holds the mass still.
    target = 0.5 * bare_response(load).peak_acceleration_m_s2

    def size_at(t):
        return least_mass(load, t, max_mass_ratio=0.2)

    with pytest.warns(simulated.SimulatedPeakWarning,
                      match=rf"stopped after {MAX_ITERATIONS} passes with the mass ratio still "
                            "changing"):
        _, steps = simulated.size_for_simulated_peak(load, target, size_at,
                                                     SimulationSettings(records=10))
    assert len(steps) == MAX_ITERATIONS == len(passes)
