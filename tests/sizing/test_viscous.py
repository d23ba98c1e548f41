"""Added viscous damping against closed forms."""

import math

import pytest

from tmd.design import LoadedMode
from tmd.sizing.viscous import (
    ViscousSettings,
    damper_constant_n_s_per_m,
    size_added_damping,
    velocity_statistics,
)
from tmd.spectra import WhiteSpectrum
from tmd.structure import Mode


def test_damper_constant_hand_value():
    # c_d = 2 zeta_add M* omega_s / (n phi^2): 2 * 0.03 * 1e7 * (2 pi 0.2) / (4 * 0.25)
    # = 753982.2 N s/m by hand.
    assert damper_constant_n_s_per_m(0.03, 0.2, 1e7, 0.5, 4) == pytest.approx(753982.2,
                                                                             rel=1e-7)


def test_velocity_rms_matches_crandall_and_mark():
    # Crandall & Mark: sigma_x^2 = G / (8 zeta omega^3 M^2) under one-sided white G per Hz,
    # so sigma_v^2 = omega^2 sigma_x^2. The band 0-50 f_s leaves out a tail of relative
    # size ~ (4 zeta / pi) / 50 ~ 1e-3 of the velocity variance.
    mode = Mode(0.2, 1e7, 0.03)
    level = 4e9
    case = LoadedMode(mode, WhiteSpectrum(level, 0.0, 10.0))
    omega = 2 * math.pi * mode.frequency_hz
    sigma_v = math.sqrt(level / (8 * mode.damping_ratio * omega * mode.modal_mass_kg**2))
    assert velocity_statistics(case, mode.damping_ratio)[0] == pytest.approx(sigma_v, rel=2e-3)


def test_required_damping_meets_the_target_exactly():
    case = LoadedMode(Mode(0.2, 1e7, 0.01), WhiteSpectrum(4e9, 0.02, 2.0))
    d = size_added_damping(case, 0.05, settings=ViscousSettings(0.4, 8))
    assert d.meets_target
    assert d.peak_acceleration_m_s2 == pytest.approx(0.05, rel=1e-9)  # brentq tolerance
    # physical dampers dissipate what the modal dashpot does: n c_d phi^2 = c_add
    assert 8 * d.damper_constant_n_s_per_m * 0.4**2 == pytest.approx(d.modal_damping_n_s_per_m,
                                                                    rel=1e-12)
