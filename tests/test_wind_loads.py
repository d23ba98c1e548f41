"""The wind loads of a case: one modal force spectrum per return period.

References: the strip model computed directly at each return period
(:func:`tmd.loads.modal_force_spectrum`) and EN 1991-1-4 eq. 4.2 (c_prob
scales every mean speed and sigma_u, not the length scales). Fictional
150 m tower on terrain III.
"""

import numpy as np

from tmd.loads import Building, modal_force_spectrum
from tmd.structure import Mode
from tmd.wind import Site
from tmd.wind.boundary_layer import DeavesHarrisSite
from tmd.wind_loads import compute_wind_loads

TOWER = Building(height_m=150.0, breadth_m=40.0, depth_m=30.0, drag_coefficient=1.3)
MODE = Mode(0.2, 2.0e7, 0.01)
PERIODS = [1.0, 10.0, 50.0]
SETTINGS = dict(spectrum="eurocode", coherence="exponential", n_strips=8,
                aerodynamic_damping=False)


def test_one_strip_computation_serves_every_return_period_on_an_en_site():
    # EN 1991-1-4 eq. 4.2: S_F(c f; T) = c^3 S_F(f; T_ref) on an EN site, so
    # the other periods are the design period's table scaled. Reference: the
    # strip sums computed directly at T on the scaled nodes (rounding: 1e-12);
    # the design period's table is the direct one, bit for bit.
    site = Site("III", basic_speed_m_s=26.0)
    loads = compute_wind_loads(site, TOWER, MODE, PERIODS, reference_period_years=10.0,
                               **SETTINGS)
    assert [x.return_period_years for x in loads] == PERIODS
    for load in loads:
        direct = modal_force_spectrum(site, TOWER, load.return_period_years, spectrum="eurocode",
                                      coherence="exponential", n_strips=8,
                                      frequency_hz=load.spectrum.frequency_hz)
        np.testing.assert_allclose(load.spectrum.psd_n2_per_hz, direct.psd_n2_per_hz,
                                   rtol=1e-12)
    design = modal_force_spectrum(site, TOWER, 10.0, spectrum="eurocode",
                                  coherence="exponential", n_strips=8)
    np.testing.assert_array_equal(loads[1].spectrum.frequency_hz, design.frequency_hz)
    np.testing.assert_array_equal(loads[1].spectrum.psd_n2_per_hz, design.psd_n2_per_hz)
    # The other periods' nodes are the design grid times c = c_prob(T) / c_prob(10 yr).
    c = site.speed_factor(50.0) / site.speed_factor(10.0)
    shifted = loads[2].spectrum.frequency_hz / c
    grid = design.frequency_hz
    steps = np.log(shifted / grid[0]) / np.log(grid[1] / grid[0])
    np.testing.assert_allclose(steps, np.round(steps), atol=1e-9)  # on the design's log grid


def test_a_deaves_harris_site_is_computed_period_by_period():
    # Its gradient height grows with the friction velocity, so the profile's
    # shape changes with the speed: no scaling; each period's table is the
    # direct one on the default grid.
    site = DeavesHarrisSite("III", basic_speed_m_s=26.0, latitude_deg=52.0)
    loads = compute_wind_loads(site, TOWER, MODE, PERIODS, reference_period_years=10.0,
                               **SETTINGS)
    for load in loads:
        direct = modal_force_spectrum(site, TOWER, load.return_period_years, spectrum="eurocode",
                                      coherence="exponential", n_strips=8)
        np.testing.assert_array_equal(load.spectrum.frequency_hz, direct.frequency_hz)
        np.testing.assert_array_equal(load.spectrum.psd_n2_per_hz, direct.psd_n2_per_hz)
