"""Along-wind strip cross-spectra of several modes against the one-mode strip model."""

import numpy as np
import pytest

from tmd.building_modes import BuildingMode, ModeShape
from tmd.building_wind import strip_cross_spectrum, wind_travel_vector
from tmd.loads import Building, modal_force_spectrum
from tmd.wind import Site

H = 150.0
F = np.geomspace(0.01, 2.0, 12)


def _modes():
    shape = dict(height_m=H, exponent=1.5)
    return (BuildingMode("x", 0.2, 0.01, 2e7, ModeShape.power_law(x=1.0, y=0.0, theta=0.0,
                                                                   **shape)),
            BuildingMode("y", 0.2, 0.01, 2e7, ModeShape.power_law(x=0.0, y=1.0, theta=0.0,
                                                                   **shape)),
            BuildingMode("t", 0.3, 0.01, 5e9, ModeShape.power_law(x=0.0, y=0.0, theta=1.0,
                                                                   **shape)))


def _one_mode(site):
    # tmd.loads' one-mode strip model: phi = (z/H)^1.5, 1 at the top (damper at the top).
    building = Building(H, 30.0, 30.0, 1.3, mode_shape_exponent=1.5)
    return modal_force_spectrum(site, building, 1.0, n_strips=8, frequency_hz=F)(F)


def test_wind_along_x_drives_the_x_mode_like_the_one_mode_model():
    site = Site(terrain="III", basic_speed_m_s=30.0)
    travel = wind_travel_vector(270.0, 0.0)  # from the west: along +x
    np.testing.assert_allclose(travel, [1.0, 0.0], atol=1e-15)
    s = strip_cross_spectrum(site, _modes(), height_m=H, breadth_m=30.0, depth_m=30.0,
                             drag_coefficient=1.3, travel=travel, return_period_years=1.0,
                             n_strips=8, frequency_hz=F)(F)
    # Same strips, coherence and shape: equal to rounding.
    np.testing.assert_allclose(s[:, 0, 0].real, _one_mode(site), rtol=1e-12)
    assert np.all(s[:, 1, 1] == 0) and np.all(s[:, 2, 2] == 0)  # no y sway, no torsion


def test_oblique_wind_correlates_the_two_sway_modes_fully():
    # Wind at 45 deg to both axes: psi_x = psi_y = phi cos 45 deg, so each sway mode
    # takes half the one-mode spectrum and their coherence is one (quasi-steady
    # strip loading along one direction; Davenport 1962).
    site = Site(terrain="III", basic_speed_m_s=30.0)
    travel = wind_travel_vector(225.0, 0.0)
    s = strip_cross_spectrum(site, _modes(), height_m=H, breadth_m=30.0, depth_m=30.0,
                             drag_coefficient=1.3, travel=travel, return_period_years=1.0,
                             n_strips=8, frequency_hz=F)(F)
    one = _one_mode(site)
    np.testing.assert_allclose(s[:, 0, 0].real, 0.5 * one, rtol=1e-12)
    np.testing.assert_allclose(s[:, 1, 1].real, 0.5 * one, rtol=1e-12)
    np.testing.assert_allclose(s[:, 0, 1].real, 0.5 * one, rtol=1e-9)
    assert np.max(np.abs(s[:, 0, 1].imag)) == pytest.approx(0.0, abs=1e-20)
