"""Pendulum TMD: the translational TMD's dynamics with gravity as the spring.

A mass m hanging on a pendulum of length L has the lateral stiffness
m g / L for small swings, so its frequency is f_d = sqrt(g / L) / (2 pi) and

    L = g / (2 pi f_d)^2,

independent of the mass (common practice; any dynamics text). The damper is
therefore sized exactly as a translational TMD (coupling beta = 1 on the
universal absorber; :func:`tmd.sizing.pendulum.size_pendulum`) and its
frequency is then set by the length.

Multi-stage pendulum: long periods need long pendulums (f = 0.15 Hz gives
L = 11 m), so the length is often folded into n nested frames, each hanging
from the one above by length L_i, the mass hanging from the innermost. Model
used here: the intermediate frames are light compared with the mass, so
every stage carries the weight m g and has the lateral stiffness m g / L_i;
the stages act in series, k = m g / sum L_i, and the mass behaves as a simple
pendulum of total length L = sum L_i (springs in series; with n equal stages
each is L / n long). Each stage then swings through the same angle,
sin(theta) = (u / n) / (L / n) = u / L for a peak stroke u. Heavy frames
add modes of their own and are outside this model.

Swing angle: the bob's horizontal offset relative to the suspension point is
u = L sin(theta), so theta = asin(u / L); the linear model assumes small
angles (sin theta ~ theta; at 10 degrees the frequency is ~0.2% lower, from the
large-amplitude pendulum period series, common practice).

References
----------
Den Hartog, J. P. (1956). Mechanical Vibrations, 4th ed. McGraw-Hill
(absorber theory; the pendulum as an absorber).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.constants import STANDARD_GRAVITY


@dataclass(frozen=True)
class PendulumSettings:
    """How a pendulum damper is built (case keys under [options]).

    Parameters
    ----------
    stages : int
        Number of equal nested pendulum stages (1 = a simple pendulum).
    """

    stages: int = 1

    def __post_init__(self):
        if not (isinstance(self.stages, int) and self.stages >= 1):
            raise ValueError(f"stages must be an integer >= 1, got {self.stages!r}")


def pendulum_length_m(frequency_hz, gravity_m_s2: float = STANDARD_GRAVITY):
    """Return the length L [m] of a simple pendulum of frequency f [Hz].

    Parameters
    ----------
    frequency_hz : float or array
        Target natural frequency f_d of the pendulum damper [Hz].
    gravity_m_s2 : float
        Acceleration of gravity g [m/s^2].

    Returns
    -------
    float or numpy.ndarray
        L, suspension point to centre of mass [m] (for n stages, their total).

    Notes
    -----
    L = g / (2 pi f)^2 (small swings).

    References
    ----------
    Small-swing pendulum frequency, common practice (any dynamics text, e.g.
    Den Hartog 1956).
    """
    return gravity_m_s2 / (2.0 * math.pi * np.asarray(frequency_hz, float)) ** 2


def pendulum_frequency_hz(length_m, gravity_m_s2: float = STANDARD_GRAVITY):
    """Return the frequency [Hz] of a pendulum of total length L [m].

    Parameters
    ----------
    length_m : float or array
        L, total pendulum length [m].
    gravity_m_s2 : float
        Acceleration of gravity g [m/s^2].

    Returns
    -------
    float or numpy.ndarray
        f = sqrt(g / L) / (2 pi) [Hz], small swings.

    Notes
    -----
    For n stages of lengths L_i in series (light frames) L = sum L_i
    (:func:`multi_stage_frequency_hz`).

    References
    ----------
    Small-swing pendulum frequency, common practice (any dynamics text, e.g.
    Den Hartog 1956).
    """
    return np.sqrt(gravity_m_s2 / np.asarray(length_m, float)) / (2.0 * math.pi)


def multi_stage_frequency_hz(stage_lengths_m, gravity_m_s2: float = STANDARD_GRAVITY):
    """Return the frequency [Hz] of a mass on stages of lengths L_i [m] in series.

    Parameters
    ----------
    stage_lengths_m : array
        L_i of each nested stage [m], the stages along the last axis; the
        intermediate frames are taken as light compared with the mass.
    gravity_m_s2 : float
        Acceleration of gravity g [m/s^2].

    Returns
    -------
    float or numpy.ndarray
        f [Hz], one per row of ``stage_lengths_m``.

    Notes
    -----
    Each stage carries m g, so its lateral stiffness is m g / L_i; in series
    k = m g / sum L_i and f = sqrt(g / sum L_i) / (2 pi).

    References
    ----------
    Springs in series and the small-swing pendulum, common practice.
    """
    total = np.sum(np.asarray(stage_lengths_m, float), axis=-1)
    return pendulum_frequency_hz(total, gravity_m_s2)


def swing_angle_rad(stroke_m, length_m):
    """Return the swing angle theta = asin(u / L) [rad] at horizontal offset u [m].

    Parameters
    ----------
    stroke_m : float or array
        u, horizontal offset of the mass from below its suspension point [m]
        (the peak stroke relative to the structure).
    length_m : float or array
        L, total pendulum length [m]; with n equal stages each stage swings
        through the same angle.

    Returns
    -------
    float or numpy.ndarray
        theta [rad]; NaN where u > L (no pendulum of that length reaches the
        stroke).
    """
    ratio = np.asarray(stroke_m, float) / np.asarray(length_m, float)
    with np.errstate(invalid="ignore"):
        return np.where(ratio <= 1.0, np.arcsin(np.minimum(ratio, 1.0)), np.nan)
