"""Peak factors against the published formulas, evaluated by hand."""

import math

import numpy as np
import pytest

from tmd.peak import (
    SMALLEST_PEAK_FACTOR,
    davenport_peak_factor,
    eurocode_peak_factor,
    peak_factor_is_held,
    vanmarcke_distribution,
    vanmarcke_peak_factor,
)


def test_davenport_value_by_hand():
    # Davenport (1964): g = sqrt(2 ln(nu T)) + 0.5772 / sqrt(2 ln(nu T)).
    # nu = 0.2 Hz, T = 600 s: nu T = 120, 2 ln 120 = 9.5750, sqrt = 3.0944,
    # 0.5772 / 3.0944 = 0.18653, g = 3.2809.
    assert davenport_peak_factor(0.2, 600.0) == pytest.approx(3.2809, abs=1e-4)


def test_davenport_grows_with_duration():
    g = davenport_peak_factor(0.2, np.array([600.0, 3600.0]))
    assert g[1] > g[0]


def test_small_nu_t_holds_the_factor_at_its_minimum():
    # The asymptotic formula is used only where 2 ln(nu T) >= 0.5772; below,
    # including nu T <= 1 (log not positive), g is held at 2 sqrt(0.5772).
    nu_t = np.array([0.5, 1.0, 1.2, 1.5, 10.0])
    g = davenport_peak_factor(nu_t, 1.0)
    held = peak_factor_is_held(nu_t, 1.0)
    np.testing.assert_array_equal(held, [True, True, True, False, False])
    assert np.all(np.isfinite(g))
    np.testing.assert_allclose(g[:3], SMALLEST_PEAK_FACTOR, rtol=1e-15)
    assert SMALLEST_PEAK_FACTOR == pytest.approx(2 * math.sqrt(0.5772157), rel=1e-7)
    assert np.all(np.diff(g) >= 0)  # never decreases as nu T grows
    assert davenport_peak_factor(0.0, 600.0) == pytest.approx(SMALLEST_PEAK_FACTOR)


def test_eurocode_peak_factor_has_floor_of_three():
    # EN 1991-1-4 (B.4): k_p = sqrt(2 ln(nu T)) + 0.6 / sqrt(2 ln(nu T)), >= 3.
    # nu = 0.2, T = 600: 3.0944 + 0.6 / 3.0944 = 3.2883.
    assert eurocode_peak_factor(0.2, 600.0) == pytest.approx(3.2883, abs=1e-4)
    assert eurocode_peak_factor(0.001, 600.0) == 3.0


def _poisson_mean_maximum(crossings):
    # Rice's Poisson crossings: P(max <= r sigma) = exp(-n exp(-r^2 / 2)) for
    # n crossings of zero in T; the mean is the integral of 1 - P over r,
    # here by adaptive quadrature (scipy.integrate.quad).
    from scipy.integrate import quad
    return quad(lambda r: -np.expm1(-crossings * np.exp(-0.5 * r * r)), 0, 40,
                epsabs=0, epsrel=1e-12, limit=200)[0]


@pytest.mark.parametrize("two_sided", [False, True])
def test_vanmarcke_broadband_limit_is_rices_poisson_law(two_sided):
    # With q = 1 every envelope crossing carries a crossing, so Vanmarcke's
    # law tends to the Poisson law at high levels; the small difference near
    # the mean comes from the (1 - exp(-r^2/2)) start factor and the finite
    # exp(-b r) share (Vanmarcke 1975, from memory), 0.3% at nu T = 1000.
    nu, t = 1.0, 1000.0
    g = vanmarcke_peak_factor(nu, 1.0, t, two_sided=two_sided)
    expected = _poisson_mean_maximum((2 if two_sided else 1) * nu * t)
    assert g == pytest.approx(expected, rel=3e-3)


def test_vanmarcke_narrow_band_peaks_fall_below_davenport():
    # Clumped up-crossings of a narrow-band response lower the mean maximum
    # (Vanmarcke 1975); the factor grows monotonically with q toward Rice's law.
    q = np.array([0.05, 0.1, 0.2, 0.4, 0.8, 1.0])
    g = vanmarcke_peak_factor(0.2, q, 600.0, two_sided=False)
    assert np.all(np.diff(g) > 0)
    assert g[0] < 0.9 * davenport_peak_factor(0.2, 600.0)


def test_vanmarcke_distribution_is_a_distribution():
    r = np.linspace(0.0, 10.0, 401)
    for two_sided in (False, True):
        f = vanmarcke_distribution(r, 0.2, 0.15, 600.0, two_sided=two_sided)
        assert f[0] == 0.0 and f[-1] == pytest.approx(1.0, abs=1e-12)
        assert np.all(np.diff(f) >= -1e-15)
    # The double barrier is crossed at least as often as the single one.
    assert np.all(vanmarcke_distribution(r, 0.2, 0.15, 600.0, two_sided=True)
                  <= vanmarcke_distribution(r, 0.2, 0.15, 600.0, two_sided=False) + 1e-15)
