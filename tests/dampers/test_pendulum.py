"""Pendulum TMD geometry against the simple-pendulum relation."""

import math
from pathlib import Path

import pytest

from tmd.case import read_case
from tmd.dampers.pendulum import (
    PendulumSettings,
    multi_stage_frequency_hz,
    pendulum_length_m,
    swing_angle_rad,
)
from tmd.design import least_mass
from tmd.jobs import loaded_mode_of
from tmd.sizing.pendulum import pendulum_design


def test_length_is_g_over_omega_squared():
    # Simple pendulum L = g / (2 pi f)^2; the "seconds pendulum" (period 2 s, f = 0.5 Hz)
    # is 0.9936 m long at standard gravity (common practice).
    assert pendulum_length_m(0.5) == pytest.approx(0.99362, rel=1e-5)
    assert pendulum_length_m(0.15) == pytest.approx(9.80665 / (2 * math.pi * 0.15) ** 2,
                                                    rel=1e-14)


def test_stages_in_series_act_as_one_pendulum_of_the_total_length():
    # Light frames: stage stiffness m g / L_i in series gives m g / sum L_i.
    total = 11.0
    assert multi_stage_frequency_hz([total / 4] * 4) == pytest.approx(
        math.sqrt(9.80665 / total) / (2 * math.pi), rel=1e-14)


def test_swing_angle():
    length = 8.0
    assert swing_angle_rad(length * math.sin(math.radians(10)), length) == pytest.approx(
        math.radians(10), rel=1e-12)
    assert math.isnan(float(swing_angle_rad(9.0, length)))


def test_design_geometry_on_the_demo_case():
    # Path from this file, not the working directory.
    demo = Path(__file__).resolve().parents[2] / "cases" / "harbourline_residences.toml"
    load = loaded_mode_of(read_case(demo))
    tmd = least_mass(load, 0.1, max_mass_ratio=0.05, max_stroke_m=1.0).design
    p = pendulum_design(tmd, PendulumSettings(stages=3))
    assert p.length_m == pytest.approx(9.80665 / (2 * math.pi * tmd.frequency_hz) ** 2,
                                       rel=1e-14)
    assert p.stage_length_m * 3 == pytest.approx(p.length_m, rel=1e-14)
    assert p.peak_swing_angle_rad == pytest.approx(math.asin(tmd.peak_stroke_m / p.length_m),
                                                   rel=1e-14)
