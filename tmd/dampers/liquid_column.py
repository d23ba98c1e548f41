"""Tuned liquid column damper (TLCD): the device model.

A U-shaped column of liquid, total length L along its centre line, horizontal
length B, uniform cross-section A, liquid mass m_l = rho A L, length ratio
alpha = B / L. The liquid displacement y along the column obeys (Sakai et al.
1989)

    rho A L y'' + 0.5 rho A xi |y'| y' + 2 rho A g y = -rho A B x'',

i.e. y'' + (xi / 2L) |y'| y' + omega_l^2 y = -alpha x'' with

    omega_l = sqrt(2 g / L),

and the structure carries (M* + m_l) x'' + alpha m_l y''. This is the
universal absorber of :mod:`tmd.dampers.absorber` with coupling beta = alpha
and coordinate r = y. This module holds the column's layout settings and its
geometry and damping formulas; its sizing on a mode under load is
:mod:`tmd.sizing.liquid_column`.

References
----------
Sakai, F., Takaeda, S. and Tamaki, T. (1989). Tuned liquid column damper - new
type device for suppression of building vibrations. Proc. Int. Conf. on
High-rise Buildings, Nanjing, 926-931.
Gao, H., Kwok, K. C. S. and Samali, B. (1997). Optimization of tuned liquid
column dampers. Engineering Structures 19(6), 476-486.
Yalla, S. K. and Kareem, A. (2000). Optimum absorber parameters for tuned
liquid column dampers. Journal of Structural Engineering 126(8), 906-915.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.constants import STANDARD_GRAVITY

WATER_DENSITY = 1000.0  # kg/m^3
TWO_PI = 2.0 * math.pi


@dataclass(frozen=True)
class ColumnSettings:
    """How a liquid column damper is laid out (case keys under [options]).

    Parameters
    ----------
    length_ratio : float
        alpha = B / L [-], horizontal over total liquid length.
    columns : int
        Number of identical columns sharing the liquid mass.
    max_excursion_ratio : float
        Largest peak liquid excursion allowed as a fraction of the still
        liquid height in a vertical leg, (1 - alpha) L / 2 [-]; beyond 1 the
        liquid would leave the leg and the model no longer holds.
    density_kg_m3 : float
        Liquid density [kg/m^3].
    """

    length_ratio: float = 0.7
    columns: int = 1
    max_excursion_ratio: float = 0.8
    density_kg_m3: float = WATER_DENSITY


def column_length_m(frequency_hz, gravity_m_s2: float = STANDARD_GRAVITY):
    """Liquid length L [m] of a column of natural frequency f [Hz].

    Notes
    -----
    omega_l = sqrt(2 g / L) (Sakai et al. 1989), so L = 2 g / (2 pi f)^2.
    """
    return 2.0 * gravity_m_s2 / (TWO_PI * np.asarray(frequency_hz, float)) ** 2


def column_frequency_hz(length_m, gravity_m_s2: float = STANDARD_GRAVITY):
    """Natural frequency sqrt(2 g / L) / (2 pi) [Hz] of a liquid length L [m]."""
    return np.sqrt(2.0 * gravity_m_s2 / np.asarray(length_m, float)) / TWO_PI


def leg_height_m(length_m, length_ratio):
    """Still liquid height in each vertical leg, (1 - alpha) L / 2 [m]."""
    return 0.5 * (1.0 - np.asarray(length_ratio, float)) * np.asarray(length_m, float)


def column_damping_gain(head_loss_coefficient, length_m, frequency_hz):
    """zeta_eq per unit rms liquid velocity [s/m]: xi / (sqrt(2 pi) L omega_l)."""
    omega = TWO_PI * np.asarray(frequency_hz, float)
    return np.asarray(head_loss_coefficient, float) / (math.sqrt(TWO_PI) * length_m * omega)


def random_equivalent_damping_ratio(head_loss_coefficient, sigma_velocity_m_s, length_m,
                                    frequency_hz):
    """Statistically linearised damping ratio of the column's head loss [-].

    Parameters
    ----------
    head_loss_coefficient : float or array
        xi [-] in the head loss 0.5 rho A xi |y'| y'.
    sigma_velocity_m_s : float or array
        Rms liquid velocity sigma_y' [m/s], Gaussian.
    length_m : float or array
        Liquid length L [m].
    frequency_hz : float or array
        Column frequency f_l [Hz].

    Returns
    -------
    array
        zeta_eq = xi sigma_y' / (sqrt(2 pi) L omega_l).

    Notes
    -----
    E[(xi/2L) |v| v * v] / E[v^2] = (xi/2L) sqrt(8/pi) sigma_v for Gaussian v,
    equated to 2 zeta omega_l (Gao, Kwok & Samali 1997; Yalla & Kareem 2000).
    """
    return column_damping_gain(head_loss_coefficient, length_m, frequency_hz) * \
        np.asarray(sigma_velocity_m_s, float)


def head_loss_for_damping(damping_ratio, sigma_velocity_m_s, length_m, frequency_hz):
    """The head-loss coefficient xi giving zeta_eq at rms velocity sigma_y' [-].

    Notes
    -----
    Inverse of :func:`random_equivalent_damping_ratio`:
    xi = zeta_eq sqrt(2 pi) L omega_l / sigma_y'.
    """
    omega = TWO_PI * np.asarray(frequency_hz, float)
    return float(np.asarray(damping_ratio) * math.sqrt(TWO_PI) * length_m * omega
                 / np.asarray(sigma_velocity_m_s))


def harmonic_equivalent_damping_ratio(head_loss_coefficient, amplitude_m, length_m):
    """Equivalent damping ratio for a harmonic excursion at the column's frequency [-].

    Notes
    -----
    Energy per cycle of (xi / 2L) |y'| y' on y = U sin(omega t) is
    (xi / 2L) (8/3) U^3 omega^2; of 2 zeta omega y' it is 2 pi zeta omega^2 U^2;
    equal for zeta = 2 xi U / (3 pi L) (e.g. Gao, Kwok & Samali 1997, from memory).
    """
    return 2.0 * np.asarray(head_loss_coefficient, float) * np.asarray(amplitude_m, float) / (
        3.0 * math.pi * np.asarray(length_m, float))
