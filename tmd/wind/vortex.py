"""Vortex-shedding check of a tall building's across-wind mode.

The spectral (random-vibration) route treats the across-wind force as a
given spectrum; it does not capture lock-in, where the motion itself
organises the shedding. This module flags where lock-in is possible so that a
wind-tunnel test can be called for.

References
----------
EN 1991-1-4:2005+A1:2010, Annex E: E.1.3.1 critical velocity
v_crit,i = b n_i,y / St (eq. E.2); E.1.2(2) vortex shedding need not be
investigated when v_crit,i > 1.25 v_m (v_m at the cross-section where shedding
occurs, here the top).
The Strouhal number is the across-wind model's own (tmd.wind.acrosswind,
AIJ-RLB 2004 A6.4, from memory).
"""

from __future__ import annotations

import math

import numpy as np

from tmd.wind.profile import probability_factor

LOCK_IN_SPEED_FACTOR = 1.25  # EN 1991-1-4 E.1.2(2): check shedding when v_crit <= 1.25 v_m
NEAR_CRITICAL_BAND = 0.20  # issue 10: warn when a return period's speed is within +-20% of v_crit
LOCK_IN_WARNING = ("the spectral method does not capture lock-in (vortex-induced resonance); "
                   "a wind-tunnel test is required")


def reduced_velocity(top_mean_speed_m_s, frequency_hz, breadth_m):
    """Reduced velocity U_H / (f_s b) [-].

    Parameters
    ----------
    top_mean_speed_m_s : float or array
        U_H [m/s], 10-min mean speed at the top.
    frequency_hz : float
        f_s [Hz], the across-wind mode's natural frequency.
    breadth_m : float
        b [m], the face normal to the wind.

    Returns
    -------
    float or array
        U_H / (f_s b) [-].
    """
    return np.asarray(top_mean_speed_m_s, dtype=float) / (frequency_hz * breadth_m)


def critical_speed(breadth_m, frequency_hz, strouhal_number):
    """Critical wind speed of vortex shedding v_crit = b f_s / St [m/s] (EN 1991-1-4 eq. E.2).

    Parameters
    ----------
    breadth_m : float
        b [m], the face normal to the wind.
    frequency_hz : float
        f_s [Hz].
    strouhal_number : float
        St [-].

    Returns
    -------
    float
        v_crit [m/s].
    """
    return breadth_m * frequency_hz / strouhal_number


def lock_in_possible(critical_speed_m_s, top_mean_speed_m_s):
    """Whether lock-in must be considered: v_crit <= 1.25 v_m (EN 1991-1-4 E.1.2(2)).

    Parameters
    ----------
    critical_speed_m_s : float
        v_crit [m/s].
    top_mean_speed_m_s : float or array
        v_m at the top [m/s].

    Returns
    -------
    bool or array of bool
    """
    return critical_speed_m_s <= LOCK_IN_SPEED_FACTOR * np.asarray(top_mean_speed_m_s, float)


def return_period_for_speed_factor(speed_factor, shape_parameter=0.2, exponent=0.5,
                                   reference_return_period_years=None):
    """Return period T at which c_prob(T) (/ c_prob(T_ref)) reaches a speed factor [years].

    Parameters
    ----------
    speed_factor : float
        Wanted ratio of mean speeds [-]: c_prob(T), or c_prob(T) / c_prob(T_ref)
        when ``reference_return_period_years`` is given.
    shape_parameter, exponent : float
        K and n of c_prob [-] (EN 1991-1-4 4.2 Note 4).
    reference_return_period_years : float, optional
        T_ref [years] of the speeds the factor is relative to.

    Returns
    -------
    float
        T [years]; ``inf`` if no return period reaches it with K = 0, and the
        smallest defined T (c_prob = 0) is never returned: factors at or below
        zero give ``nan``.

    Notes
    -----
    Inverse of c_prob = ((1 + K ln T) / (1 - K ln(-ln 0.98)))^n with
    p = 1 - exp(-1/T) (as :func:`tmd.wind.profile.probability_factor`):
    T = exp(((c^(1/n)) (1 - K ln(-ln 0.98)) - 1) / K).
    """
    c = float(speed_factor)
    if reference_return_period_years is not None:
        c *= float(probability_factor(reference_return_period_years, shape_parameter, exponent))
    if not c > 0:
        return math.nan
    denominator = 1.0 - shape_parameter * math.log(-math.log(0.98))
    if shape_parameter == 0:
        return math.inf if c > 1.0 else 0.0
    return math.exp((c ** (1.0 / exponent) * denominator - 1.0) / shape_parameter)


def vortex_rows(return_periods_years, top_mean_speeds_m_s, *, breadth_m, frequency_hz,
                strouhal_number):
    """Reduced velocity, v_crit and lock-in flag per return period.

    Parameters
    ----------
    return_periods_years : sequence of float
        T [years].
    top_mean_speeds_m_s : sequence of float
        U_H(T) [m/s].
    breadth_m : float
        b [m].
    frequency_hz : float
        f_s [Hz].
    strouhal_number : float
        St [-].

    Returns
    -------
    list of dict
        ``return_period_years``, ``top_mean_speed_m_s``, ``reduced_velocity``,
        ``critical_speed_m_s``, ``lock_in_possible``, ``near_critical_speed``
        (|U_H - v_crit| <= 0.2 v_crit).
    """
    v_crit = float(critical_speed(breadth_m, frequency_hz, strouhal_number))
    rows = []
    for period, speed in zip(return_periods_years, top_mean_speeds_m_s, strict=True):
        rows.append({
            "return_period_years": float(period),
            "top_mean_speed_m_s": float(speed),
            "reduced_velocity": float(reduced_velocity(speed, frequency_hz, breadth_m)),
            "critical_speed_m_s": v_crit,
            "lock_in_possible": bool(lock_in_possible(v_crit, speed)),
            "near_critical_speed": bool(abs(speed - v_crit) <= NEAR_CRITICAL_BAND * v_crit),
        })
    return rows


def vortex_warnings(rows, lock_in_return_period_years=None) -> list[str]:
    """Warnings for the rows of :func:`vortex_rows` (empty when none applies).

    Parameters
    ----------
    rows : list of dict
        From :func:`vortex_rows`.
    lock_in_return_period_years : float, optional
        T [years] from which v_crit <= 1.25 v_m holds (quoted in the warning).

    Returns
    -------
    list of str
        One warning when lock-in is possible at a listed return period or its
        top speed lies within 20% of v_crit.
    """
    flagged = [r for r in rows if r["lock_in_possible"] or r["near_critical_speed"]]
    if not flagged:
        return []
    v_crit = rows[0]["critical_speed_m_s"]
    parts = ", ".join(f"T = {r['return_period_years']:g} yr (U_H = {r['top_mean_speed_m_s']:.3g} "
                      f"m/s)" for r in flagged)
    text = (f"vortex shedding: critical speed v_crit = {v_crit:.3g} m/s; lock-in possible or "
            f"top speed within 20% of v_crit at {parts}")
    if lock_in_return_period_years is not None:
        text += (f"; v_crit <= 1.25 v_m (EN 1991-1-4 E.1.2) from T = "
                 f"{lock_in_return_period_years:.3g} yr")
    return [f"{text}: {LOCK_IN_WARNING}"]
