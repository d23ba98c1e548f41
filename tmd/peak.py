"""Peak factors: expected largest value of a stationary Gaussian response over T.

References
----------
Davenport, A. G. (1964). Note on the distribution of the largest value of a
random function with application to gust loading. Proc. ICE 28(2), 187-196.
EN 1991-1-4:2005, Eurocode 1 - Actions on structures - Part 1-4: Wind
actions, equation (B.4).
"""

from __future__ import annotations

import numpy as np

EULER_GAMMA = float(np.euler_gamma)  # 0.5772...
# g(x) = sqrt(x) + gamma / sqrt(x) with x = 2 ln(nu T) is smallest at x = gamma;
# below it the asymptotic formula would grow again as nu T falls, which is not
# physical, so the factor is held at that minimum, 2 sqrt(gamma) = 1.519.
SMALLEST_ARGUMENT = EULER_GAMMA
SMALLEST_PEAK_FACTOR = 2.0 * np.sqrt(EULER_GAMMA)


def davenport_peak_factor(upcrossing_hz, duration_s):
    """Return Davenport's peak factor g for a Gaussian process.

    Parameters
    ----------
    upcrossing_hz : float or array
        Mean zero up-crossing rate nu = sqrt(m2 / m0) [Hz].
    duration_s : float or array
        Averaging duration T [s].

    Returns
    -------
    array
        g [-], such that the expected peak is g sigma.

    Notes
    -----
    g = sqrt(2 ln(nu T)) + 0.5772 / sqrt(2 ln(nu T)) (Davenport 1964), with
    Euler's constant 0.5772... The formula is asymptotic in nu T. Where
    2 ln(nu T) < 0.5772 (nu T < 1.335, fewer than about one and a third
    up-crossings in T, including nu T <= 1 where the logarithm is not positive)
    it is not used: g is held at its smallest value 2 sqrt(0.5772) = 1.519, so
    that g never decreases as nu T grows. :func:`peak_factor_is_held` tells
    where that happened.

    References
    ----------
    Davenport, A. G. (1964). Note on the distribution of the largest value of a
    random function with application to gust loading. Proc. ICE 28(2), 187-196.
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        x = 2.0 * np.log(np.asarray(upcrossing_hz, float) * np.asarray(duration_s, float))
    x = np.where(np.isfinite(x), x, SMALLEST_ARGUMENT)
    x = np.maximum(x, SMALLEST_ARGUMENT)
    return np.sqrt(x) + EULER_GAMMA / np.sqrt(x)


def peak_factor_is_held(upcrossing_hz, duration_s):
    """Tell where nu T is too small for Davenport's formula.

    Parameters
    ----------
    upcrossing_hz : float or array
        Mean zero up-crossing rate nu = sqrt(m2 / m0) [Hz].
    duration_s : float or array
        Averaging duration T [s].

    Returns
    -------
    bool or numpy.ndarray of bool
        True where 2 ln(nu T) < 0.5772 (or nu T <= 0), where
        :func:`davenport_peak_factor` holds g at its smallest value 1.519
        instead of using the asymptotic formula.
    """
    product = np.asarray(upcrossing_hz, float) * np.asarray(duration_s, float)
    with np.errstate(divide="ignore"):
        return ~(2.0 * np.log(product) >= SMALLEST_ARGUMENT)


def eurocode_peak_factor(upcrossing_hz, duration_s=600.0):
    """Return the peak factor of EN 1991-1-4 (B.4): 0.6 in place of 0.5772, and at least 3.

    Parameters
    ----------
    upcrossing_hz : float or array
        Up-crossing frequency nu [Hz] (EN takes nu >= 0.08 Hz; apply that
        bound before calling where the standard asks for it).
    duration_s : float
        Averaging time T [s], 600 s in EN 1991-1-4.

    Returns
    -------
    array
        k_p [-], the expected maximum over T in standard deviations.

    Notes
    -----
    k_p = max(sqrt(2 ln(nu T)) + 0.6 / sqrt(2 ln(nu T)), 3); 3 where
    ln(nu T) <= 0.

    References
    ----------
    EN 1991-1-4:2005, Annex B, eq. B.4.
    """
    x = 2.0 * np.log(np.asarray(upcrossing_hz, float) * duration_s)
    with np.errstate(invalid="ignore", divide="ignore"):
        g = np.sqrt(x) + 0.6 / np.sqrt(x)
    return np.where(x > 0, np.maximum(g, 3.0), 3.0)


# Der Kiureghian (1980) and Vanmarcke (1975) replace q by q^1.2 in the
# first-passage rate, an empirical correction fitted to simulations of
# oscillator responses (from memory).
_BANDWIDTH_EXPONENT = 1.2
_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(160)


def vanmarcke_distribution(level, upcrossing_hz, bandwidth, duration_s, *, two_sided=True):
    """Return Vanmarcke's probability that a Gaussian response stays below a level over T.

    Parameters
    ----------
    level : float or array
        r = u / sigma, the level in standard deviations [-].
    upcrossing_hz : float or array
        Mean zero up-crossing rate nu = sqrt(m2 / m0) [Hz].
    bandwidth : float or array
        Vanmarcke's bandwidth parameter q = sqrt(1 - m1^2 / (m0 m2)) [-].
    duration_s : float or array
        Duration T [s].
    two_sided : bool
        True for the largest absolute value max |x| (a double barrier at
        +-u), False for the largest value max x (a single barrier at u).

    Returns
    -------
    array
        P(max <= r sigma) [-].

    Notes
    -----
    With a = exp(-r^2 / 2) and q_e = q^1.2,

        F(r) = (1 - a) exp(-c nu T a (1 - exp(-b q_e r)) / (1 - a)),

    with c = 2, b = sqrt(pi / 2) for the double barrier and c = 1,
    b = sqrt(2 pi) for the single barrier. The factor (1 - exp(-b q_e r))
    is the share of the envelope's crossings that carry a crossing of the
    response itself, so clumps of up-crossings of a narrow-band response
    count once; for q -> 1 and large r the rate becomes Rice's Poisson rate
    c nu a. Formula from memory of the sources below.

    References
    ----------
    Vanmarcke, E. H. (1975). On the distribution of the first-passage time
    for normal stationary random processes. J. Appl. Mech. 42(1), 215-220.
    Der Kiureghian, A. (1980). Structural response to stationary excitation.
    J. Eng. Mech. Div. ASCE 106(6), 1195-1213.
    """
    r = np.asarray(level, float)
    crossings, barrier = (2.0, np.sqrt(np.pi / 2)) if two_sided else (1.0, np.sqrt(2 * np.pi))
    qe = np.asarray(bandwidth, float) ** _BANDWIDTH_EXPONENT
    a = np.exp(-0.5 * r**2)
    with np.errstate(divide="ignore", invalid="ignore"):
        clumped = -np.expm1(-barrier * qe * r) / -np.expm1(-0.5 * r**2)
        exponent = -crossings * np.asarray(upcrossing_hz, float) * duration_s * a * clumped
        value = -np.expm1(-0.5 * r**2) * np.exp(exponent)
    return np.where(r > 0, value, 0.0)


def vanmarcke_peak_factor(upcrossing_hz, bandwidth, duration_s, *, two_sided=True):
    """Return the mean largest value over T, in standard deviations, by Vanmarcke's distribution.

    Parameters
    ----------
    upcrossing_hz : float or array
        nu = sqrt(m2 / m0) [Hz].
    bandwidth : float or array
        q = sqrt(1 - m1^2 / (m0 m2)) [-].
    duration_s : float or array
        Duration T [s].
    two_sided : bool
        True for E[max |x|] / sigma, False for E[max x] / sigma.

    Returns
    -------
    array
        g = E[max] / sigma [-].

    Notes
    -----
    g = integral over r from 0 to infinity of (1 - F(r)) dr with F from
    :func:`vanmarcke_distribution`, by 160-point Gauss-Legendre on
    [0, r_max], r_max = sqrt(2 ln(2 nu T)) + 9, beyond which 1 - F is below
    1e-16 of the result.

    References
    ----------
    Vanmarcke (1975); Der Kiureghian (1980); see :func:`vanmarcke_distribution`.
    """
    nu, q, t = np.broadcast_arrays(*(np.asarray(v, float) for v in
                                     (upcrossing_hz, bandwidth, duration_s)))
    top = np.sqrt(2.0 * np.log(np.maximum(2.0 * nu * t, np.e))) + 9.0
    r = 0.5 * top[..., None] * (_NODES + 1.0)
    f = vanmarcke_distribution(r, nu[..., None], q[..., None], t[..., None],
                               two_sided=two_sided)
    return 0.5 * top * np.sum(_WEIGHTS * (1.0 - f), axis=-1)
