"""Turbulence spectra: reduced forms against hand arithmetic, scaled forms against quad."""

import numpy as np
import pytest
from scipy.integrate import quad

from tmd.wind import (
    Site,
    davenport_psd,
    davenport_reduced,
    eurocode_psd,
    eurocode_reduced,
    harris_psd,
    harris_reduced,
    kaimal_psd,
    kaimal_reduced,
    velocity_spectrum,
    von_karman_psd,
    von_karman_reduced,
)

SIGMA = 3.2  # m/s, fictional


def _variance(psd):
    # scipy adaptive quadrature over 0..inf, split at 1 Hz where the power-law
    # tail starts; the integrand is smooth, so 1e-10 relative is reachable.
    low = quad(psd, 0.0, 1.0, epsabs=0, epsrel=1e-11, limit=200)[0]
    high = quad(psd, 1.0, np.inf, epsabs=0, epsrel=1e-11, limit=200)[0]
    return low + high


@pytest.mark.parametrize(
    "psd",
    [
        lambda f: eurocode_psd(f, SIGMA, 28.0, 120.0),
        lambda f: davenport_psd(f, SIGMA, 22.0),
        lambda f: kaimal_psd(f, SIGMA, 28.0, 60.0),
        lambda f: von_karman_psd(f, SIGMA, 28.0, 120.0),
        lambda f: harris_psd(f, SIGMA, 22.0),
    ],
    ids=["eurocode", "davenport", "kaimal", "von-karman", "harris"],
)
def test_scaled_spectrum_integrates_to_sigma_squared(psd):
    # Reference: scipy.integrate.quad. rtol 1e-7 covers quadrature error on the
    # slowly decaying f^-5/3 tail; the normalising constants are analytic.
    assert _variance(psd) == pytest.approx(SIGMA**2, rel=1e-7)


def test_reduced_forms_by_hand():
    # All rtol 1e-5: the hand arithmetic below is carried to 6 figures.
    # EN 1991-1-4 eq. B.2 at f_L = 0.1: 0.68 / 2.02^(5/3) = 0.68 / 3.22788 = 0.210664
    assert float(eurocode_reduced(0.1)) == pytest.approx(0.210664, rel=1e-5)
    # Davenport (from memory) at x = 1: 4 / 2^(4/3) = 4 / 2.519842 = 1.587401
    assert float(davenport_reduced(1.0)) == pytest.approx(1.587401, rel=1e-5)
    # Kaimal (from memory) at f_z = 1/33: (105/33) / 2^(5/3) = 3.181818 / 3.174802 = 1.002210
    assert float(kaimal_reduced(1.0 / 33.0)) == pytest.approx(1.002210, rel=1e-5)
    # von Karman (from memory) at f_L = 1/sqrt(70.8) = 0.118846:
    # 4 * 0.118846 / 2^(5/6) = 0.475383 / 1.781797 = 0.266800
    x = 1.0 / np.sqrt(70.8)
    assert float(von_karman_reduced(x)) == pytest.approx(0.266800, rel=1e-5)
    # Harris (from memory) at x = sqrt(2): 4 * 1.414214 / 4^(5/6) = 5.656854 / 3.174802 = 1.781797
    assert float(harris_reduced(np.sqrt(2.0))) == pytest.approx(1.781797, rel=1e-5)


def test_eurocode_psd_is_reduced_form_over_frequency():
    # EN 1991-1-4 eq. B.2 definition S_L = f S / sigma^2, f_L = f L / v_m.
    f = np.array([0.01, 0.2, 3.0])
    expected = SIGMA**2 * eurocode_reduced(f * 120.0 / 28.0) / f
    np.testing.assert_allclose(eurocode_psd(f, SIGMA, 28.0, 120.0), expected, rtol=1e-13)


def test_low_frequency_limits_are_finite():
    # Common practice: the along-wind spectrum is finite at f = 0, equal to
    # 4 sigma^2 L / U for von Karman (the integral-scale definition).
    assert float(von_karman_psd(0.0, SIGMA, 28.0, 120.0)) == pytest.approx(
        4 * SIGMA**2 * 120.0 / 28.0 / 0.99995, rel=1e-4)  # 0.99995: rounded 70.8
    assert float(davenport_psd(0.0, SIGMA, 22.0)) == 0.0


def test_site_spectrum_broadcasts_and_rejects_unknown_names():
    site = Site("III", basic_speed_m_s=26.0)
    f = np.geomspace(1e-3, 5, 7)[:, None]
    z = np.array([10.0, 50.0, 120.0])[None, :]
    for name in ("eurocode", "davenport", "kaimal", "von-karman", "harris"):
        assert velocity_spectrum(site, z, f, 10.0, name).shape == (7, 3)
    with pytest.raises(ValueError, match=r"spectrum = 'karman'.*'von-karman'"):
        velocity_spectrum(site, 10.0, f, 10.0, "karman")
