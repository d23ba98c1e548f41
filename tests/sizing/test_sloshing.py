"""Sloshing tanks: linear-wave formulas against hand values, limits and quadrature."""

import math

import numpy as np
import pytest
from scipy.integrate import quad

from tmd.dampers.absorber import Absorbers
from tmd.dampers.sloshing import (
    TankSettings,
    intrinsic_damping_ratio,
    screen_depth_integral_m,
    sloshing_frequency_hz,
    sloshing_mass_fraction,
    tank_length_m,
    wall_elevation_per_displacement,
)
from tmd.design import LoadedMode
from tmd.sizing.liquid_column import velocity_proportional_fixed_point
from tmd.sizing.sloshing import size_sloshing_tanks
from tmd.spectra import WhiteSpectrum
from tmd.structure import Mode


def test_frequency_hand_value():
    # Linear wave theory (Abramson 1966): L = 10 m, h = 1 m. By hand:
    # tanh(pi/10) = tanh(0.3141593) = 0.304218; pi g / L = 3.080842;
    # product 0.937247; sqrt 0.968115 rad/s; / 2 pi = 0.154080 Hz.
    assert sloshing_frequency_hz(10.0, 1.0) == pytest.approx(0.154080, rel=1e-5)  # 6 digits
    assert sloshing_frequency_hz(tank_length_m(0.17, 0.15), 0.15 * tank_length_m(0.17, 0.15)) \
        == pytest.approx(0.17, rel=1e-13)


def test_mass_fraction_shallow_and_deep_limits():
    # Graham & Rodriguez (1952): m1/mw = 8 tanh(pi h/L) / (pi^3 h/L).
    # Shallow water: the first mode tends to 8 / pi^2 and all modes together to 1.
    assert sloshing_mass_fraction(1e-5) == pytest.approx(8 / math.pi**2, rel=1e-8)
    total = sum(sloshing_mass_fraction(1e-6, n) for n in range(1, 4001))
    assert total == pytest.approx(1.0, rel=2e-4)  # series tail ~ 8/(pi^2 4 N) = 5e-5
    # Deep water: tanh -> 1, so m1/mw -> 8 / (pi^3 h/L) -> 0.
    for r in (3.0, 10.0):
        assert sloshing_mass_fraction(r) == pytest.approx(8 / (math.pi**3 * r), rel=1e-7)
    assert sloshing_mass_fraction(50.0) < 0.01


def test_wall_elevation_from_centre_of_mass_by_quadrature():
    # The first mode's surface A cos(pi x / L): its horizontal moment about the tank
    # centre, by scipy.integrate.quad, carried by the sloshing mass m1 u.
    length, depth, width, rho, a = 12.0, 1.8, 3.0, 1000.0, 0.25
    moment = rho * width * quad(lambda x: (x - length / 2) * a * math.cos(math.pi * x / length),
                                0, length, epsrel=1e-13)[0]
    water = rho * width * length * depth
    u = abs(moment) / (sloshing_mass_fraction(depth / length) * water)
    assert wall_elevation_per_displacement(depth / length) == pytest.approx(a / u, rel=1e-10)


def test_screen_integrals_by_quadrature():
    length, depth = 12.0, 1.8
    k = math.pi / length
    ref = quad(lambda z: (math.cosh(k * (z + depth)) / math.cosh(k * depth)) ** 3, -depth, 0,
               epsrel=1e-13)[0]
    assert screen_depth_integral_m(length, depth) == pytest.approx(ref, rel=1e-10)
    # E|v|^3 = 2 sqrt(2/pi) sigma^3 for Gaussian v, the moment used in the linearisation
    e3 = 2 * quad(lambda v: v**3 * math.exp(-v * v / 2) / math.sqrt(2 * math.pi), 0, np.inf)[0]
    assert e3 == pytest.approx(2 * math.sqrt(2 / math.pi), rel=1e-10)


def test_unscreened_tank_has_little_damping():
    # Boundary-layer damping (Miles 1967; Sun et al. 1992, from memory) of a building-size
    # tank: well under 0.5% (common practice: screens or baffles are needed).
    zeta = intrinsic_damping_ratio(1.8, 8.0, 0.17)
    assert 1e-4 < zeta < 5e-3


def test_sized_tanks_meet_target_and_respect_freeboard():
    case = LoadedMode(Mode(0.2, 1e7, 0.01), WhiteSpectrum(4e9, 0.02, 2.0))
    target = 0.6 * float(case.assess(Absorbers.none()).peak_acceleration_m_s2)
    settings = TankSettings(depth_ratio=0.12, max_tank_width_m=6.0, freeboard_m=0.5)
    d = size_sloshing_tanks(case, target, max_mass_ratio=0.1, settings=settings)
    assert d.meets_target
    zeta, a = velocity_proportional_fixed_point(case, d.water_mass_kg, d.frequency_hz, d.coupling,
                                                d.damping_gain_s_per_m,
                                                damping_floor=d.intrinsic_damping_ratio)
    assert zeta[0] == pytest.approx(d.equivalent_damping_ratio, rel=1e-6)  # root tolerance
    assert float(a.peak_acceleration_m_s2[0]) <= target * (1 + 1e-4)
    assert d.peak_free_surface_elevation_m <= 0.5 * (1 + 1e-6)
    assert d.tank_width_m <= 6.0 and d.tank_count * d.tank_width_m * d.tank_length_m * \
        d.water_depth_m * 1000.0 == pytest.approx(d.water_mass_kg, rel=1e-12)
    assert d.water_depth_m / d.tank_length_m == pytest.approx(0.12, rel=1e-12)
    assert d.screen_loss_coefficient > 0
