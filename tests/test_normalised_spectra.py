"""Normalised wind-tunnel spectra: conversions and tables."""

import numpy as np
import pytest

from tmd.loads import Building
from tmd.normalised_spectra import (
    NormalisedFileError,
    NormalisedSpectrum,
    dimensional,
    normalise,
    read_normalised_psd_csv,
    write_normalised_psd_csv,
)
from tmd.wind import acrosswind

# Fictional tower of our own ("Quayside Needle").
TOWER = Building(height_m=260.0, breadth_m=45.0, depth_m=50.0, drag_coefficient=1.3,
                 mode_shape_exponent=1.4)


@pytest.mark.parametrize("quantity", ["generalised-force", "base-moment"])
def test_round_trip_dimensional_normalised_dimensional(quantity):
    # Issue 10: dimensional -> normalised -> dimensional round-trips to 1e-12
    # (conventions.md: S(f) = (q_H b h)^2 F(f b / U_H) / f); any positive table will do.
    rng = np.random.default_rng(7)
    f = np.sort(rng.uniform(0.01, 2.0, 50))
    s = rng.uniform(1e6, 1e9, 50)
    kw = dict(top_mean_speed_m_s=41.3, breadth_m=45.0, height_m=260.0, air_density_kg_m3=1.22,
              quantity=quantity)
    n, phi = normalise(f, s, **kw)
    f2, s2 = dimensional(n, phi, **kw)
    np.testing.assert_allclose(f2, f, rtol=1e-12)
    np.testing.assert_allclose(s2, s, rtol=1e-12)


def test_base_moment_table_gives_the_across_wind_model_back():
    # The AIJ-RLB 2004 spectrum written as a normalised base-moment table and read
    # back at U_H must equal tmd.wind.acrosswind.generalised_force_psd (same eta
    # correction) at the table's own frequencies (log-log interpolation is exact
    # at nodes): rtol 1e-12.
    n = np.geomspace(1e-3, 3.0, 300)
    phi = acrosswind.normalised_base_moment_psd(n, 50.0 / 45.0)
    table = NormalisedSpectrum(n, phi, quantity="base-moment")
    u = 38.0
    s = table.modal_force_spectrum(top_mean_speed_m_s=u, building=TOWER)
    f = n[10:-10:7] * u / 45.0
    want = acrosswind.generalised_force_psd(f, breadth_m=45.0, depth_m=50.0, height_m=260.0,
                                            top_mean_speed_m_s=u, mode_shape=TOWER.mode_shape)
    np.testing.assert_allclose(s(f), want, rtol=1e-12)
    # Its rms coefficient (exact integral of the interpolant) is C'_L within the
    # table's truncation and interpolation (0.5%).
    assert table.rms_coefficient() == pytest.approx(
        acrosswind.rms_lift_coefficient(50.0 / 45.0), rel=5e-3)


def test_csv_round_trip_and_errors(tmp_path):
    path = tmp_path / "n.csv"
    write_normalised_psd_csv(path, [0.01, 0.1, 1.0], [1e-4, 2e-3, 1e-5])
    table = read_normalised_psd_csv(path)
    np.testing.assert_array_equal(table.normalised_psd, [1e-4, 2e-3, 1e-5])
    path.write_text("reduced_frequency,normalised_psd\n0.1,1e-3\n0.1,2e-3\n", encoding="utf-8")
    with pytest.raises(NormalisedFileError, match="line 3.*strictly increasing"):
        read_normalised_psd_csv(path)
    path.write_text("reduced_frequency,normalised_psd\n0.1,1e-3\n0.2,-2e-3\n", encoding="utf-8")
    with pytest.raises(NormalisedFileError, match="line 3: normalised_psd"):
        read_normalised_psd_csv(path)
    path.write_text("frequency_hz,psd_n2_per_hz\n0.1,1\n0.2,2\n", encoding="utf-8")
    with pytest.raises(NormalisedFileError, match="header"):
        read_normalised_psd_csv(path)


CASE = """
name = "Quayside Needle (fictional test)"
[mode]
frequency_hz = 0.18
modal_mass_kg = 2.1e7
damping_ratio = 0.012
[building]
height_m = 190.0
breadth_m = 32.0
depth_m = 32.0
drag_coefficient = 1.3
mode_shape_exponent = 1.5
damper_height_m = 186.0
[load]
normalised_force_psd_csv = "normalised.csv"
{load}
{wind}
[target]
peak_acceleration_m_s2 = 0.06
return_period_years = 1
[damper]
max_stroke_m = 1.2
"""


def test_strip_model_fed_back_reproduces_it_at_every_return_period(tmp_path):
    # Issue 10: the along-wind strip model's spectrum at 50 years, normalised and
    # fed back through [load], reproduces the strip model at each return period
    # to 1e-6. With the EN spectrum and coherence, S_F(f; T) = c^3 S_F(f / c; 50)
    # for c = U_H(T) / U_H(50) (speed, sigma_u and decays all scale with c), so
    # the reference is the strip model tabulated on the grid that similarity maps
    # the 50-year grid to (tmd.loads.modal_force_spectrum, frequency_hz = c f).
    from tests.consistency import assert_consistent_results
    from tmd.case import read_case
    from tmd.design import LoadedMode, bare_response
    from tmd.jobs import design_job, loaded_mode_of
    from tmd.loads import modal_force_spectrum
    from tmd.wind import Site

    site = Site("III", basic_speed_m_s=30.0)
    building = Building(height_m=190.0, breadth_m=32.0, depth_m=32.0, drag_coefficient=1.3,
                        mode_shape_exponent=1.5, damper_height_m=186.0)
    s50 = modal_force_spectrum(site, building, 50.0)
    u50 = float(site.mean_speed(190.0, 50.0))
    n, phi = normalise(s50.frequency_hz, s50.psd_n2_per_hz, top_mean_speed_m_s=u50,
                       breadth_m=32.0, height_m=190.0)
    write_normalised_psd_csv(tmp_path / "normalised.csv", n, phi)
    path = tmp_path / "case.toml"
    path.write_text(CASE.format(load="", wind='[wind]\nterrain = "III"\nbasic_speed_m_s = 30.0'),
                    encoding="utf-8")
    case = read_case(path)
    assert [w.return_period_years for w in case.wind_loads] == [1.0, 10.0, 50.0]
    for wind_load in case.wind_loads:
        t = wind_load.return_period_years
        c = float(site.mean_speed(190.0, t)) / u50
        ref = modal_force_spectrum(site, building, t, frequency_hz=s50.frequency_hz * c)
        want = bare_response(LoadedMode(case.mode, ref, 600.0, case.shape_factor))
        got = bare_response(loaded_mode_of(case, wind_load))
        assert got.sigma_acceleration_m_s2 == pytest.approx(want.sigma_acceleration_m_s2,
                                                            rel=1e-6)
        assert got.peak_acceleration_m_s2 == pytest.approx(want.peak_acceleration_m_s2, rel=1e-6)
    result = design_job(case)
    assert_consistent_results(result)
    fifty = next(r for r in result["by_return_period"] if r["return_period_years"] == 50.0)
    assert fifty["design"]["peak_stroke_m"] > 0 and fifty["design"]["peak_damper_force_n"] > 0


def test_top_speeds_given_directly(tmp_path):
    # The same table with U_H given per return period: the spectrum at T is the
    # table scaled by U_H(T) (conventions.md), checked at one node to 1e-12.
    from tmd.case import CaseError, read_case

    write_normalised_psd_csv(tmp_path / "normalised.csv", [0.01, 0.1, 1.0], [1e-4, 2e-3, 1e-5])
    path = tmp_path / "case.toml"
    path.write_text(CASE.format(load="return_periods_years = [1, 50]\n"
                                     "top_mean_speed_m_s = [30.0, 40.0]", wind=""),
                    encoding="utf-8")
    case = read_case(path)
    fifty = case.wind_loads[1]
    q = 0.5 * 1.25 * 40.0**2
    f = 0.1 * 40.0 / 32.0
    assert fifty.spectrum(f) == pytest.approx((q * 32.0 * 190.0) ** 2 * 2e-3 / f, rel=1e-12)
    path.write_text(CASE.format(load="return_periods_years = [1, 50]\n"
                                     "top_mean_speed_m_s = [30.0]", wind=""), encoding="utf-8")
    with pytest.raises(CaseError, match="one per period"):
        read_case(path)
    path.write_text(CASE.format(load="", wind=""), encoding="utf-8")
    with pytest.raises(CaseError, match="top speed per return period"):
        read_case(path)
