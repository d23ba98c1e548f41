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
    """Davenport's peak factor g for a Gaussian process.

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
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        x = 2.0 * np.log(np.asarray(upcrossing_hz, float) * np.asarray(duration_s, float))
    x = np.where(np.isfinite(x), x, SMALLEST_ARGUMENT)
    x = np.maximum(x, SMALLEST_ARGUMENT)
    return np.sqrt(x) + EULER_GAMMA / np.sqrt(x)


def peak_factor_is_held(upcrossing_hz, duration_s):
    """True where nu T is too small for Davenport's formula (see above)."""
    product = np.asarray(upcrossing_hz, float) * np.asarray(duration_s, float)
    with np.errstate(divide="ignore"):
        return ~(2.0 * np.log(product) >= SMALLEST_ARGUMENT)


def eurocode_peak_factor(upcrossing_hz, duration_s=600.0):
    """Peak factor of EN 1991-1-4 (B.4): 0.6 in place of 0.5772, and at least 3.

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
        k_p = max(sqrt(2 ln(nu T)) + 0.6 / sqrt(2 ln(nu T)), 3).
    """
    x = 2.0 * np.log(np.asarray(upcrossing_hz, float) * duration_s)
    with np.errstate(invalid="ignore", divide="ignore"):
        g = np.sqrt(x) + 0.6 / np.sqrt(x)
    return np.where(x > 0, np.maximum(g, 3.0), 3.0)
