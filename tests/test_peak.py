"""Peak factors against the published formulas, evaluated by hand."""

import math

import numpy as np
import pytest

from tmd.peak import (
    SMALLEST_PEAK_FACTOR,
    davenport_peak_factor,
    eurocode_peak_factor,
    peak_factor_is_held,
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
