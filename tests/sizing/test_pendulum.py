"""Pendulum sizing: a swing angle with no value is explained, not silently null."""

import dataclasses
import math

import pytest

from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, evaluate_tmd
from tmd.sizing.pendulum import SwingAngleWarning, pendulum_design
from tmd.spectra import WhiteSpectrum
from tmd.structure import Mode


def test_stroke_longer_than_the_pendulum_is_explained():
    # Issue 13, defect 11: peak_swing_angle_rad was null without a word.
    # L = g / (2 pi f)^2 = 9.80665 / (2 pi 0.196)^2 = 6.466 m at 0.196 Hz
    # (hand value); no pendulum of that length swings 10 m sideways.
    case = LoadedMode(Mode(0.2, 1e7, 0.01), WhiteSpectrum(4e9, 0.02, 2.0))
    design = evaluate_tmd(case, TunedMassDamper(0.02, 0.98, 0.07))
    assert design.frequency_hz == pytest.approx(0.196, rel=1e-12)
    with pytest.warns(SwingAngleWarning, match=r"stroke 10 m exceeds its length 6.466 m"):
        p = pendulum_design(dataclasses.replace(design, peak_stroke_m=10.0))
    assert math.isnan(p.peak_swing_angle_rad)
    # A stroke within the length gives theta = asin(u / L) (geometry).
    p = pendulum_design(dataclasses.replace(design, peak_stroke_m=1.0))
    assert p.peak_swing_angle_rad == pytest.approx(math.asin(1.0 / p.length_m), rel=1e-14)
