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
    freeboard_m : float or None
        Height of the vertical legs above the still liquid [m]; the peak
        excursion at the design load is held below it as well. None: the
        legs are made as high as the peak excursion at the longest reported
        return period needs (at the design load's when there is only one).
    """

    length_ratio: float = 0.7
    columns: int = 1
    max_excursion_ratio: float = 0.8
    density_kg_m3: float = WATER_DENSITY
    freeboard_m: float | None = None


def column_length_m(frequency_hz, gravity_m_s2: float = STANDARD_GRAVITY):
    """Return the liquid length L [m] of a column of natural frequency f [Hz].

    Parameters
    ----------
    frequency_hz : float or array
        Natural frequency f_l of the liquid column's sloshing along its centre
        line [Hz].
    gravity_m_s2 : float
        Acceleration of gravity g [m/s^2].

    Returns
    -------
    float or numpy.ndarray
        L, total liquid length along the centre line [m].

    Notes
    -----
    omega_l = sqrt(2 g / L) (Sakai et al. 1989), so L = 2 g / (2 pi f)^2.

    References
    ----------
    Sakai, F., Takaeda, S. and Tamaki, T. (1989), Proc. Int. Conf. on High-rise
    Buildings, Nanjing, 926-931.
    """
    return 2.0 * gravity_m_s2 / (TWO_PI * np.asarray(frequency_hz, float)) ** 2


def column_frequency_hz(length_m, gravity_m_s2: float = STANDARD_GRAVITY):
    """Return the natural frequency [Hz] of a column of liquid length L [m].

    Parameters
    ----------
    length_m : float or array
        L, total liquid length along the column's centre line [m].
    gravity_m_s2 : float
        Acceleration of gravity g [m/s^2].

    Returns
    -------
    float or numpy.ndarray
        f_l [Hz].

    Notes
    -----
    f_l = sqrt(2 g / L) / (2 pi), independent of the length ratio B / L.

    References
    ----------
    Sakai, F., Takaeda, S. and Tamaki, T. (1989), Proc. Int. Conf. on High-rise
    Buildings, Nanjing, 926-931.
    """
    return np.sqrt(2.0 * gravity_m_s2 / np.asarray(length_m, float)) / TWO_PI


def leg_height_m(length_m, length_ratio):
    """Return the still liquid height in each vertical leg [m].

    Parameters
    ----------
    length_m : float or array
        L, total liquid length along the centre line [m].
    length_ratio : float or array
        alpha = B / L [-], horizontal over total liquid length.

    Returns
    -------
    float or numpy.ndarray
        h = (1 - alpha) L / 2 [m], the liquid above the horizontal part in
        each of the two legs.
    """
    return 0.5 * (1.0 - np.asarray(length_ratio, float)) * np.asarray(length_m, float)


def column_damping_gain(head_loss_coefficient, length_m, frequency_hz):
    """Return the linearised damping ratio per unit rms liquid velocity [s/m].

    Parameters
    ----------
    head_loss_coefficient : float or array
        xi [-] in the head loss 0.5 rho A xi |y'| y' (orifice or valve).
    length_m : float or array
        L, total liquid length [m].
    frequency_hz : float or array
        Column frequency f_l [Hz].

    Returns
    -------
    float or numpy.ndarray
        zeta_eq / sigma_y' = xi / (sqrt(2 pi) L omega_l) [s/m]; times the rms
        liquid velocity it gives :func:`random_equivalent_damping_ratio`.

    References
    ----------
    Gao, H., Kwok, K. C. S. and Samali, B. (1997). Optimization of tuned liquid
    column dampers. Engineering Structures 19(6), 476-486.
    """
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
        zeta_eq = xi sigma_y' / (sqrt(2 pi) L omega_l) [-], referred to the
        column's own frequency.

    Notes
    -----
    E[(xi/2L) |v| v * v] / E[v^2] = (xi/2L) sqrt(8/pi) sigma_v for Gaussian v,
    equated to 2 zeta omega_l (Gao, Kwok & Samali 1997; Yalla & Kareem 2000).

    References
    ----------
    Gao, H., Kwok, K. C. S. and Samali, B. (1997), Engineering Structures 19(6),
    476-486. Yalla, S. K. and Kareem, A. (2000), Journal of Structural
    Engineering 126(8), 906-915.
    """
    return column_damping_gain(head_loss_coefficient, length_m, frequency_hz) * \
        np.asarray(sigma_velocity_m_s, float)


def head_loss_for_damping(damping_ratio, sigma_velocity_m_s, length_m, frequency_hz):
    """Return the head-loss coefficient xi giving zeta_eq at rms velocity sigma_y' [-].

    Parameters
    ----------
    damping_ratio : float
        Target equivalent damping ratio zeta_eq, referred to the column's own
        frequency [-].
    sigma_velocity_m_s : float
        Rms liquid velocity sigma_y' along the column [m/s], Gaussian.
    length_m : float
        L, total liquid length [m].
    frequency_hz : float
        Column frequency f_l [Hz].

    Returns
    -------
    float
        xi [-] in the head loss 0.5 rho A xi |y'| y'.

    Notes
    -----
    Inverse of :func:`random_equivalent_damping_ratio`:
    xi = zeta_eq sqrt(2 pi) L omega_l / sigma_y'.

    References
    ----------
    Gao, H., Kwok, K. C. S. and Samali, B. (1997). Optimization of tuned liquid
    column dampers. Engineering Structures 19(6), 476-486.
    """
    omega = TWO_PI * np.asarray(frequency_hz, float)
    return float(np.asarray(damping_ratio) * math.sqrt(TWO_PI) * length_m * omega
                 / np.asarray(sigma_velocity_m_s))


def harmonic_equivalent_damping_ratio(head_loss_coefficient, amplitude_m, length_m):
    """Return the equivalent damping ratio for a harmonic excursion [-].

    Parameters
    ----------
    head_loss_coefficient : float or array
        xi [-] in the head loss 0.5 rho A xi |y'| y'.
    amplitude_m : float or array
        U, amplitude of the liquid displacement along the column [m], at the
        column's own frequency.
    length_m : float or array
        L, total liquid length [m].

    Returns
    -------
    float or numpy.ndarray
        zeta_eq [-], referred to the column's own frequency.

    Notes
    -----
    Energy per cycle of (xi / 2L) |y'| y' on y = U sin(omega t) is
    (xi / 2L) (8/3) U^3 omega^2; of 2 zeta omega y' it is 2 pi zeta omega^2 U^2;
    equal for zeta = 2 xi U / (3 pi L) (e.g. Gao, Kwok & Samali 1997, from memory).

    References
    ----------
    Gao, H., Kwok, K. C. S. and Samali, B. (1997). Optimization of tuned liquid
    column dampers. Engineering Structures 19(6), 476-486.
    """
    return 2.0 * np.asarray(head_loss_coefficient, float) * np.asarray(amplitude_m, float) / (
        3.0 * math.pi * np.asarray(length_m, float))
