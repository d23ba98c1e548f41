"""Across-wind base-moment and generalised-force spectra of rectangular tall buildings.

The empirical model is the across-wind overturning-moment spectrum of the
Architectural Institute of Japan's Recommendations for Loads on Buildings
(AIJ-RLB 2004, A6.4), fitted to wind-tunnel tests of rectangular prisms in a
boundary-layer flow. It gives, as functions of the side ratio D/B (D along
the wind, B the face normal to it):

* the rms across-wind base-moment coefficient C'_L = sigma_M / (q_H B H^2);
* the normalised spectrum F_L(n) = f S_M(f) / sigma_M^2 against the reduced
  frequency n = f B / U_H: one vortex-shedding peak at the Strouhal number
  St_1 = f_s1 B / U_H, and a second, weaker one (reattachment) for D/B >= 3.

Here the model is used in the project's normalisation (``conventions.md``):

    Phi(n) = f S_M(f) / (q_H B H^2)^2 = C'_L^2 F_L(n) / I_F,

where I_F is the integral of F_L over ln n, so that Phi integrates over
ln(f B / U_H) to exactly C'_L^2. The source's F_L integrates to about
kappa_1 (+ kappa_2), i.e. 0.85 to 0.87, rather than 1; dividing by I_F
puts the variance the fit leaves out into the fitted shape, which raises the
spectral ordinate at resonance by 1/I_F (about 15%, on the safe side).

The base moment becomes a generalised force of a sway mode phi(z) through a
stated mode-shape correction (:func:`mode_shape_correction`).

All coefficients below were recalled without the document at hand: they are
marked "from memory", and every output that uses the model says
:data:`NOT_VERIFIED`.

References
----------
Architectural Institute of Japan (2004). Recommendations for Loads on
Buildings (AIJ-RLB-2004), Chapter 6 Wind loads, A6.4 "Across-wind vibration
and resulting wind load": C'_L, F_L, f_s1, f_s2, kappa_j, beta_j and the
scope H / sqrt(BD) <= 6, 0.2 <= D/B <= 5, U_H / (f_L sqrt(BD)) <= 10
(all from memory).
Marukawa, H., Ohkuma, T., Momomura, Y. (1992). Across-wind and torsional
acceleration of prismatic high rise buildings. J. Wind Eng. Ind. Aerodyn.
41-44, 1139-1150 (the wind-tunnel data behind the AIJ fits; from memory).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np

from tmd.height_integral import integrate_over_height

SOURCE = ("AIJ Recommendations for Loads on Buildings (2004), A6.4 across-wind "
          "overturning-moment spectrum (coefficients from memory)")
NOT_VERIFIED = "across-wind model not verified against its source"
# The advice of the top-decade warning on every across-wind load (README): the
# model's F_L ~ n^-2 tail (S ~ f^-3) makes the single-mode acceleration's m2 grow
# by a constant amount per decade, so no table length removes the warning.
TAIL_NOTE = ("this load is the AIJ-RLB 2004 across-wind model, whose spectrum falls as f^-3 "
             "above its peak, so every decade adds about the same to the second moment and a "
             "longer table would not remove this share")
STROUHAL_SOURCE = "AIJ-RLB 2004 A6.4 f_s1 B / U_H (the across-wind model's own, from memory)"

SIDE_RATIO_RANGE = (0.2, 5.0)  # D/B, AIJ-RLB 2004 A6.4 scope (from memory)
MAX_ASPECT_RATIO = 6.0  # H / sqrt(B D), AIJ-RLB 2004 A6.4 scope (from memory)
MAX_REDUCED_VELOCITY = 10.0  # U_H / (f_L sqrt(B D)), AIJ-RLB 2004 A6.4 scope (from memory)
SECOND_PEAK_SIDE_RATIO = 3.0  # D/B from which the reattachment peak is added (from memory)
KAPPA = (0.85, 0.02)  # peak weights kappa_1, kappa_2 (from memory)


def _side_ratio(side_ratio) -> float:
    r = float(side_ratio)
    if not (math.isfinite(r) and r > 0):
        raise ValueError(f"side ratio D/B = {side_ratio!r}; must be a finite number > 0")
    return r


def strouhal_numbers(side_ratio):
    """Strouhal numbers of the model's spectral peaks, St_j = f_sj B / U_H [-].

    Parameters
    ----------
    side_ratio : float
        D/B [-], depth along the wind over the breadth normal to it.

    Returns
    -------
    (st_1, st_2) : tuple of float
        Vortex-shedding peak and, for D/B >= 3, the reattachment peak
        (``nan`` below D/B = 3).

    Notes
    -----
    St_1 = 0.12 / (1 + 0.38 (D/B)^2)^0.89 and St_2 = 0.56 / (D/B)^0.85
    (AIJ-RLB 2004 A6.4, from memory). St_1 falls as D/B grows.
    """
    r = _side_ratio(side_ratio)
    st1 = 0.12 / (1.0 + 0.38 * r**2) ** 0.89
    st2 = 0.56 / r**0.85 if r >= SECOND_PEAK_SIDE_RATIO else math.nan
    return st1, st2


def bandwidths(side_ratio):
    """Bandwidth parameters of the model's spectral peaks beta_j [-].

    Parameters
    ----------
    side_ratio : float
        D/B [-].

    Returns
    -------
    (beta_1, beta_2) : tuple of float
        ``beta_2`` is ``nan`` below D/B = 3.

    Notes
    -----
    beta_1 = ((D/B)^4 + 2.3 (D/B)^2) / (2.4 (D/B)^4 - 9.2 (D/B)^3 + 18 (D/B)^2
    + 9.5 D/B - 0.15) + 0.12 / (D/B); beta_2 = 0.28 / (D/B)^0.34
    (AIJ-RLB 2004 A6.4, from memory).
    """
    r = _side_ratio(side_ratio)
    beta1 = ((r**4 + 2.3 * r**2) / (2.4 * r**4 - 9.2 * r**3 + 18.0 * r**2 + 9.5 * r - 0.15)
             + 0.12 / r)
    beta2 = 0.28 / r**0.34 if r >= SECOND_PEAK_SIDE_RATIO else math.nan
    return beta1, beta2


def rms_lift_coefficient(side_ratio) -> float:
    """Return the rms across-wind base-moment coefficient C'_L = sigma_M / (q_H B H^2) [-].

    Parameters
    ----------
    side_ratio : float
        D/B [-].

    Returns
    -------
    float
        C'_L [-].

    Notes
    -----
    C'_L = 0.0082 (D/B)^3 - 0.071 (D/B)^2 + 0.22 D/B (AIJ-RLB 2004 A6.4,
    from memory). It is called the rms lift coefficient in the outputs (the
    trade's name for the rms across-wind force coefficient); it rises with D/B
    over the model's range.
    """
    r = _side_ratio(side_ratio)
    return 0.0082 * r**3 - 0.071 * r**2 + 0.22 * r


def _peaks(side_ratio):
    st, beta = strouhal_numbers(side_ratio), bandwidths(side_ratio)
    count = 2 if side_ratio >= SECOND_PEAK_SIDE_RATIO else 1
    return [(KAPPA[j], st[j], beta[j]) for j in range(count)]


def model_spectrum(reduced_frequency, side_ratio):
    """Return the source's normalised spectrum F_L(n) = f S_M(f) / sigma_M^2 [-].

    Parameters
    ----------
    reduced_frequency : array
        n = f B / U_H [-], > 0.
    side_ratio : float
        D/B [-].

    Returns
    -------
    array
        F_L(n) [-], as the source writes it (integral over ln n close to,
        but not exactly, sum kappa_j; see :func:`model_spectrum_integral`).

    Notes
    -----
    F_L = sum_j 4 kappa_j (1 + 0.6 beta_j) beta_j / pi * x_j^2 /
    ((1 - x_j^2)^2 + 4 beta_j^2 x_j^2), x_j = n / St_j, one term for D/B < 3
    and two from D/B = 3 (AIJ-RLB 2004 A6.4, from memory). Each term, read
    over ln n, peaks exactly at x_j = 1.
    """
    n = np.asarray(reduced_frequency, dtype=float)
    r = _side_ratio(side_ratio)
    out = np.zeros_like(n)
    for kappa, st, beta in _peaks(r):
        x2 = (n / st) ** 2
        out = out + (4.0 * kappa * (1.0 + 0.6 * beta) * beta / math.pi
                     * x2 / ((1.0 - x2) ** 2 + 4.0 * beta**2 * x2))
    return out


def _term_integral(beta: float) -> float:
    """Integral over ln x of x^2 / ((1 - x^2)^2 + 4 beta^2 x^2), closed form.

    With u = x^2 it is (1/2) int_0^inf du / (u^2 - 2 a u + 1), a = 1 - 2 beta^2.
    """
    a = 1.0 - 2.0 * beta**2
    if abs(a) < 1.0:
        c = math.sqrt(1.0 - a * a)
        return 0.5 * (0.5 * math.pi + math.atan(a / c)) / c
    if a <= -1.0:  # beta >= 1: two negative real roots (a = -1 is the limit 1/2)
        s = math.sqrt(a * a - 1.0)
        return 0.5 if s == 0.0 else 0.5 * math.log((-a + s) / (-a - s)) / (2.0 * s)
    raise ValueError(f"bandwidth beta = {beta!r} must be > 0")


def model_spectrum_integral(side_ratio) -> float:
    """Integral of the source's F_L over ln n, I_F [-], exact.

    Parameters
    ----------
    side_ratio : float
        D/B [-].

    Returns
    -------
    float
        I_F = sum_j 4 kappa_j (1 + 0.6 beta_j) beta_j / pi * J(beta_j), J the
        closed-form integral of one term over ln x.
    """
    return float(sum(4.0 * kappa * (1.0 + 0.6 * beta) * beta / math.pi * _term_integral(beta)
                     for kappa, _, beta in _peaks(_side_ratio(side_ratio))))


def normalised_base_moment_psd(reduced_frequency, side_ratio):
    """Normalised across-wind base-moment spectrum Phi(n) = f S_M(f) / (q_H B H^2)^2 [-].

    Parameters
    ----------
    reduced_frequency : array
        n = f B / U_H [-], > 0.
    side_ratio : float
        D/B [-].

    Returns
    -------
    array
        Phi(n) [-]; its integral over ln n is C'_L^2.

    Notes
    -----
    Phi(n) = C'_L^2 F_L(n) / I_F (see the module docstring).
    """
    r = _side_ratio(side_ratio)
    return rms_lift_coefficient(r) ** 2 * model_spectrum(reduced_frequency, r) \
        / model_spectrum_integral(r)


def validity_problems(*, side_ratio, aspect_ratio=None, reduced_velocity=None) -> list[str]:
    """Which inputs lie outside the model's stated range (empty if none).

    Parameters
    ----------
    side_ratio : float
        D/B [-] ([building] depth_m / breadth_m).
    aspect_ratio : float, optional
        H / sqrt(B D) [-].
    reduced_velocity : float or array, optional
        U_H / (f_L sqrt(B D)) [-] of the mode at each return period.

    Returns
    -------
    list of str
        One sentence per input outside the range, naming the input.

    Notes
    -----
    Range of AIJ-RLB 2004 A6.4 (from memory): 0.2 <= D/B <= 5,
    H / sqrt(BD) <= 6, U_H / (f_L sqrt(BD)) <= 10.
    """
    problems = []
    low, high = SIDE_RATIO_RANGE
    if not low <= side_ratio <= high:
        problems.append(
            f"side ratio D/B = [building] depth_m / breadth_m = {side_ratio:.3g} is outside the "
            f"across-wind model's range {low:g} <= D/B <= {high:g}")
    if aspect_ratio is not None and aspect_ratio > MAX_ASPECT_RATIO:
        problems.append(
            f"aspect ratio H / sqrt(B D) = {aspect_ratio:.3g} ([building] height_m, breadth_m, "
            f"depth_m) exceeds the across-wind model's limit {MAX_ASPECT_RATIO:g}")
    if reduced_velocity is not None:
        worst = float(np.max(reduced_velocity))
        if worst > MAX_REDUCED_VELOCITY:
            problems.append(
                f"reduced velocity U_H / (f_s sqrt(B D)) = {worst:.3g} (from the wind speed at "
                f"the top and [mode] frequency_hz) exceeds the across-wind model's limit "
                f"{MAX_REDUCED_VELOCITY:g}, i.e. reduced frequency below "
                f"{1.0 / MAX_REDUCED_VELOCITY:g}")
    return [p + f" ({SOURCE}); results there are extrapolated" for p in problems]


def mode_shape_correction(height_m: float, mode_shape: Callable,
                          breakpoints_m: Sequence[float] = ()) -> float:
    """Ratio of generalised force to base moment Q / M for a sway mode [1/m].

    Parameters
    ----------
    height_m : float
        H [m].
    mode_shape : callable
        phi(z) [-] of an array of heights z [m], in the normalisation the
        generalised force is wanted in (e.g. 1 at the damper).
    breakpoints_m : sequence of float
        Heights [m] where phi may have a kink (a tabulated shape's heights).

    Returns
    -------
    float
        eta = Q / M [1/m].

    Notes
    -----
    The fluctuating across-wind force per unit height is taken as fully
    correlated over the height with the triangular distribution w(z) ~ z / H
    of AIJ-RLB 2004's across-wind equivalent static load (from memory). Then
    M = int w z dz and Q = int w phi dz give

        eta = 3 int_0^H z phi(z) dz / H^3,

    which is exact for a linear mode shape phi = z / H (eta = 1 / H) whatever
    the distribution; for phi = (z/H)^beta it is 3 / ((beta + 2) H). The
    generalised-force PSD is S_Q = eta^2 S_M. The integral is by
    :func:`tmd.height_integral.integrate_over_height`.
    """
    h = float(height_m)
    value = integrate_over_height(lambda z: z * mode_shape(z), h, breakpoints_m)
    return 3.0 * value / h**3


def base_moment_psd(frequency_hz, *, breadth_m, depth_m, height_m, top_mean_speed_m_s,
                    air_density_kg_m3=1.25):
    """One-sided PSD of the across-wind base moment S_M(f) [N^2 m^2/Hz].

    Parameters
    ----------
    frequency_hz : array
        f [Hz], > 0.
    breadth_m : float
        B [m], the face normal to the wind.
    depth_m : float
        D [m], along the wind.
    height_m : float
        H [m].
    top_mean_speed_m_s : float
        U_H [m/s], 10-min mean at the top.
    air_density_kg_m3 : float
        rho [kg/m^3], default 1.25.

    Returns
    -------
    array
        S_M(f) [N^2 m^2/Hz].

    Notes
    -----
    S_M(f) = (q_H B H^2)^2 Phi(f B / U_H) / f with q_H = rho U_H^2 / 2
    (``conventions.md``: converting a normalised spectrum back).
    """
    f = np.asarray(frequency_hz, dtype=float)
    q_h = 0.5 * air_density_kg_m3 * top_mean_speed_m_s**2
    scale = (q_h * breadth_m * height_m**2) ** 2
    phi = normalised_base_moment_psd(f * breadth_m / top_mean_speed_m_s, depth_m / breadth_m)
    return scale * phi / f


def generalised_force_psd(frequency_hz, *, breadth_m, depth_m, height_m, top_mean_speed_m_s,
                          mode_shape, air_density_kg_m3=1.25, mode_shape_breakpoints_m=()):
    """One-sided PSD of the across-wind generalised force of a sway mode [N^2/Hz].

    This is the stable interface for callers that build modal force spectra
    (one mode, or the cross-spectral matrix over several modes).

    Parameters
    ----------
    frequency_hz : array
        f [Hz], > 0.
    breadth_m : float
        B [m], the face normal to the wind.
    depth_m : float
        D [m], along the wind.
    height_m : float
        H [m].
    top_mean_speed_m_s : float
        U_H [m/s], 10-min mean at the top.
    mode_shape : callable
        phi(z) [-] of heights z [m] of the across-wind sway mode, in the
        normalisation wanted (1 at the damper in this project).
    air_density_kg_m3 : float
        rho [kg/m^3], default 1.25.
    mode_shape_breakpoints_m : sequence of float
        Heights [m] where phi may have a kink (a tabulated shape's heights).

    Returns
    -------
    array
        S_Q(f) [N^2/Hz], same shape as ``frequency_hz``.

    Notes
    -----
    S_Q(f) = eta^2 S_M(f), eta from :func:`mode_shape_correction`. Under the
    model's full correlation over height, two across-wind sway modes i, j have
    the real cross-PSD eta_i eta_j S_M(f) (coherence 1).
    """
    eta = mode_shape_correction(height_m, mode_shape, mode_shape_breakpoints_m)
    return eta**2 * base_moment_psd(frequency_hz, breadth_m=breadth_m, depth_m=depth_m,
                                    height_m=height_m, top_mean_speed_m_s=top_mean_speed_m_s,
                                    air_density_kg_m3=air_density_kg_m3)
