"""Along-wind turbulence spectra: published reduced forms and scaled PSDs.

Each model appears twice:

* the *reduced* (native) form as published, a function of a dimensionless
  frequency, returning f S(f) divided by the model's own normaliser;
* the *scaled* PSD, one-sided per Hz in (m/s)^2/Hz, normalised so that its
  integral over 0 < f < inf is exactly sigma_u^2 (the reduced form divided by
  its own integral, which is computed analytically here).

The scaled forms therefore differ only in spectral shape; the variance always
comes from the site (EN 1991-1-4 sigma_u).

References
----------
EN 1991-1-4:2005, Annex B, eq. B.2 (spectrum) and B.1 (length scale).
Davenport, A. G. (1961). The spectrum of horizontal gustiness near the ground
in high winds. Q. J. Royal Meteorological Society 87, 194-211.
Kaimal, J. C., Wyngaard, J. C., Izumi, Y., Cote, O. R. (1972). Spectral
characteristics of surface-layer turbulence. Q. J. R. Meteorol. Soc. 98,
563-589.
von Karman, T. (1948). Progress in the statistical theory of turbulence.
Proc. National Academy of Sciences 34, 530-539.
Harris, R. I. (1971). The nature of the wind. In: The modern design of
wind-sensitive structures, CIRIA, London, 29-55.
The constants of the Davenport, Kaimal, von Karman and Harris forms are
quoted from memory (no copy of the papers was at hand); the variance
integrals below are derived from the forms as written.
"""

from __future__ import annotations

import math

import numpy as np

DAVENPORT_LENGTH_M = 1200.0  # from memory: Davenport (1961), x = 1200 f / U10
HARRIS_LENGTH_M = 1800.0  # from memory: Harris (1971), x = 1800 f / U10
VON_KARMAN_CONSTANT = 70.8  # from memory: the usual rounding in the longitudinal form

# integral of (1 + y^2)^(-5/6) dy over 0..inf = sqrt(pi) Gamma(1/3) / (2 Gamma(5/6))
_INT_56 = math.sqrt(math.pi) * math.gamma(1.0 / 3.0) / (2.0 * math.gamma(5.0 / 6.0))


def eurocode_reduced(reduced_frequency):
    """EN 1991-1-4 reduced spectrum S_L = f S / sigma^2 [-] (eq. B.2).

    Parameters
    ----------
    reduced_frequency : array
        f_L = f L(z) / v_m(z) [-]: frequency times the turbulence length scale
        at height z over the mean speed there.

    Returns
    -------
    numpy.ndarray
        S_L, the non-dimensional spectral density f S_u(f) / sigma_u^2 [-], of
        the shape of ``reduced_frequency``.

    Notes
    -----
    S_L(f_L) = 6.8 f_L / (1 + 10.2 f_L)^(5/3). Its integral over ln f is 1.

    References
    ----------
    EN 1991-1-4:2005, Annex B, eq. B.2.
    """
    x = np.asarray(reduced_frequency, dtype=float)
    return 6.8 * x / (1.0 + 10.2 * x) ** (5.0 / 3.0)


def davenport_reduced(reduced_frequency):
    """Davenport (1961) reduced spectrum f S / (kappa U10^2) [-].

    Parameters
    ----------
    reduced_frequency : array
        x = 1200 f / U10 [-], U10 the mean speed at 10 m [m/s].

    Returns
    -------
    numpy.ndarray
        f S_u(f) / (kappa U10^2) [-], of the shape of ``reduced_frequency``.

    Notes
    -----
    f S / (kappa U10^2) = 4 x^2 / (1 + x^2)^(4/3), kappa the surface drag
    coefficient; height independent. Its integral over ln f is 6, so
    sigma_u^2 = 6 kappa U10^2. Form and constants from memory.

    References
    ----------
    Davenport, A. G. (1961). The spectrum of horizontal gustiness near the
    ground in high winds. Q. J. R. Meteorol. Soc. 87, 194-211.
    """
    x = np.asarray(reduced_frequency, dtype=float)
    return 4.0 * x**2 / (1.0 + x**2) ** (4.0 / 3.0)


def kaimal_reduced(reduced_frequency):
    """Kaimal et al. (1972) reduced spectrum f S / u*^2 [-] (neutral surface layer).

    Parameters
    ----------
    reduced_frequency : array
        f_z = f z / U(z) [-]: frequency times height over the mean speed at
        that height.

    Returns
    -------
    numpy.ndarray
        f S_u(f) / u*^2 [-], of the shape of ``reduced_frequency``.

    Notes
    -----
    f S / u*^2 = 105 f_z / (1 + 33 f_z)^(5/3), u* the friction velocity. Its
    integral over ln f is 105/22 = 4.77. Constants from memory.

    References
    ----------
    Kaimal, J. C., Wyngaard, J. C., Izumi, Y., Cote, O. R. (1972). Spectral
    characteristics of surface-layer turbulence. Q. J. R. Meteorol. Soc. 98,
    563-589.
    """
    x = np.asarray(reduced_frequency, dtype=float)
    return 105.0 * x / (1.0 + 33.0 * x) ** (5.0 / 3.0)


def von_karman_reduced(reduced_frequency):
    """Longitudinal reduced spectrum of von Karman (1948), f S / sigma^2 [-].

    Parameters
    ----------
    reduced_frequency : array
        f_L = f L / U [-], L the longitudinal integral length scale [m] and U
        the mean speed [m/s].

    Returns
    -------
    numpy.ndarray
        f S_u(f) / sigma_u^2 [-], of the shape of ``reduced_frequency``.

    Notes
    -----
    f S / sigma^2 = 4 f_L / (1 + 70.8 f_L^2)^(5/6). With the rounded 70.8 its
    integral over ln f is 0.99995 rather than 1. Form from memory.

    References
    ----------
    von Karman, T. (1948). Progress in the statistical theory of turbulence.
    Proc. National Academy of Sciences 34, 530-539.
    """
    x = np.asarray(reduced_frequency, dtype=float)
    return 4.0 * x / (1.0 + VON_KARMAN_CONSTANT * x**2) ** (5.0 / 6.0)


def harris_reduced(reduced_frequency):
    """Harris (1971) reduced spectrum f S / (kappa U10^2) [-].

    Parameters
    ----------
    reduced_frequency : array
        x = 1800 f / U10 [-], U10 the mean speed at 10 m [m/s].

    Returns
    -------
    numpy.ndarray
        f S_u(f) / (kappa U10^2) [-], of the shape of ``reduced_frequency``.

    Notes
    -----
    f S / (kappa U10^2) = 4 x / (2 + x^2)^(5/6); height independent. Its
    integral over ln f is 4 * 2^(-1/3) sqrt(pi) Gamma(1/3) / (2 Gamma(5/6)) = 6.68.
    Form and constants from memory.

    References
    ----------
    Harris, R. I. (1971). The nature of the wind. In: The modern design of
    wind-sensitive structures, CIRIA, London, 29-55.
    """
    x = np.asarray(reduced_frequency, dtype=float)
    return 4.0 * x / (2.0 + x**2) ** (5.0 / 6.0)


# Integral over ln f (= integral over x of reduced(x)/x) of each reduced form.
REDUCED_VARIANCE = {
    "eurocode": 1.0,  # 6.8 / (10.2 * 2/3)
    "davenport": 6.0,  # 2 * integral (1+u)^(-4/3) du
    "kaimal": 105.0 / 22.0,  # 105 / (33 * 2/3)
    "von-karman": 4.0 / math.sqrt(VON_KARMAN_CONSTANT) * _INT_56,
    "harris": 4.0 * 2.0 ** (-1.0 / 3.0) * _INT_56,
}


def _scaled(reduced, name, frequency_hz, sigma_u, time_scale_s):
    """sigma^2 T g(f T) / I with g = reduced(x)/x evaluated safely at x = 0."""
    f = np.asarray(frequency_hz, dtype=float)
    t = np.asarray(time_scale_s, dtype=float)
    x = f * t
    # reduced(x)/x is finite at x = 0 for every form; avoid 0/0 by a tiny floor.
    x_safe = np.where(x > 0, x, 1e-300)
    g = reduced(x_safe) / x_safe
    return np.asarray(sigma_u, dtype=float) ** 2 * t * g / REDUCED_VARIANCE[name]


def eurocode_psd(frequency_hz, sigma_u, mean_speed, length_scale):
    """EN 1991-1-4 (B.2) along-wind PSD [(m/s)^2/Hz], one-sided, integral sigma_u^2.

    Parameters
    ----------
    frequency_hz : array
        f [Hz].
    sigma_u : float or array
        Standard deviation of the along-wind turbulence [m/s].
    mean_speed : float or array
        v_m(z), mean wind speed at the height considered [m/s].
    length_scale : float or array
        L(z), turbulence length scale at that height (EN eq. B.1) [m].

    Returns
    -------
    numpy.ndarray
        S_u(f) [(m/s)^2/Hz], one-sided, broadcast over the arguments.

    Notes
    -----
    S(f) = sigma_u^2 S_L(f L / v_m) / f.

    References
    ----------
    EN 1991-1-4:2005, Annex B, eq. B.2.
    """
    tau = np.asarray(length_scale, dtype=float) / np.asarray(mean_speed, dtype=float)
    return _scaled(eurocode_reduced, "eurocode", frequency_hz, sigma_u, tau)


def davenport_psd(frequency_hz, sigma_u, mean_speed_10m):
    """Davenport (1961) PSD [(m/s)^2/Hz] scaled to variance sigma_u^2.

    Parameters
    ----------
    frequency_hz : array
        f [Hz].
    sigma_u : float or array
        Standard deviation of the along-wind turbulence [m/s].
    mean_speed_10m : float
        U10, mean speed at 10 m [m/s].

    Returns
    -------
    numpy.ndarray
        S_u(f) [(m/s)^2/Hz], one-sided, broadcast over the arguments.

    Notes
    -----
    S(f) = sigma_u^2 / 6 * 4 x^2 / (f (1 + x^2)^(4/3)), x = 1200 f / U10.

    References
    ----------
    Davenport, A. G. (1961), Q. J. R. Meteorol. Soc. 87, 194-211 (form from
    memory).
    """
    tau = DAVENPORT_LENGTH_M / np.asarray(mean_speed_10m, dtype=float)
    return _scaled(davenport_reduced, "davenport", frequency_hz, sigma_u, tau)


def kaimal_psd(frequency_hz, sigma_u, mean_speed, height_m):
    """Kaimal (1972) PSD [(m/s)^2/Hz] scaled to variance sigma_u^2.

    Parameters
    ----------
    frequency_hz : array
        f [Hz].
    sigma_u : float or array
        Standard deviation of the along-wind turbulence [m/s].
    mean_speed : float or array
        U(z), mean wind speed at height z [m/s].
    height_m : float or array
        z, height above ground [m].

    Returns
    -------
    numpy.ndarray
        S_u(f) [(m/s)^2/Hz], one-sided, broadcast over the arguments.

    Notes
    -----
    S(f) = sigma_u^2 (22/105) 105 f_z / (f (1 + 33 f_z)^(5/3)), f_z = f z / U(z).

    References
    ----------
    Kaimal, J. C. et al. (1972), Q. J. R. Meteorol. Soc. 98, 563-589
    (constants from memory).
    """
    tau = np.asarray(height_m, dtype=float) / np.asarray(mean_speed, dtype=float)
    return _scaled(kaimal_reduced, "kaimal", frequency_hz, sigma_u, tau)


def von_karman_psd(frequency_hz, sigma_u, mean_speed, length_scale):
    """Longitudinal PSD of von Karman (1948) [(m/s)^2/Hz], scaled to variance sigma_u^2.

    Parameters
    ----------
    frequency_hz : array
        f [Hz].
    sigma_u : float or array
        Standard deviation of the along-wind turbulence [m/s].
    mean_speed : float or array
        U(z), mean wind speed at the height considered [m/s].
    length_scale : float or array
        Longitudinal integral length scale [m].

    Returns
    -------
    numpy.ndarray
        S_u(f) [(m/s)^2/Hz], one-sided, broadcast over the arguments.

    Notes
    -----
    S(f) = sigma_u^2 / I * 4 f_L / (f (1 + 70.8 f_L^2)^(5/6)), f_L = f L / U,
    I = 0.99995 the integral of the rounded form.

    References
    ----------
    von Karman, T. (1948), Proc. National Academy of Sciences 34, 530-539
    (form from memory).
    """
    tau = np.asarray(length_scale, dtype=float) / np.asarray(mean_speed, dtype=float)
    return _scaled(von_karman_reduced, "von-karman", frequency_hz, sigma_u, tau)


def harris_psd(frequency_hz, sigma_u, mean_speed_10m):
    """Harris (1971) PSD [(m/s)^2/Hz] scaled to variance sigma_u^2.

    Parameters
    ----------
    frequency_hz : array
        f [Hz].
    sigma_u : float or array
        Standard deviation of the along-wind turbulence [m/s].
    mean_speed_10m : float
        U10, mean speed at 10 m [m/s].

    Returns
    -------
    numpy.ndarray
        S_u(f) [(m/s)^2/Hz], one-sided, broadcast over the arguments.

    Notes
    -----
    S(f) = sigma_u^2 / 6.68 * 4 x / (f (2 + x^2)^(5/6)), x = 1800 f / U10.

    References
    ----------
    Harris, R. I. (1971), CIRIA, London, 29-55 (form from memory).
    """
    tau = HARRIS_LENGTH_M / np.asarray(mean_speed_10m, dtype=float)
    return _scaled(harris_reduced, "harris", frequency_hz, sigma_u, tau)


def _sigma_u(site, z, t):
    # A profile table or boundary-layer model has sigma_u varying over height;
    # the EN site's sigma_u is the same at every height (EN 1991-1-4 eq. 4.6).
    if hasattr(site, "sigma_u_at"):
        return site.sigma_u_at(z, t)
    return site.sigma_u(t)


def _at_site_eurocode(site, z, t, f):
    return eurocode_psd(f, _sigma_u(site, z, t), site.mean_speed(z, t), site.length_scale(z))


def _at_site_davenport(site, z, t, f):
    return davenport_psd(f, _sigma_u(site, z, t), site.mean_speed(10.0, t)) + 0.0 * np.asarray(z)


def _at_site_kaimal(site, z, t, f):
    return kaimal_psd(f, _sigma_u(site, z, t), site.mean_speed(z, t), z)


def _at_site_von_karman(site, z, t, f):
    return von_karman_psd(f, _sigma_u(site, z, t), site.mean_speed(z, t), site.length_scale(z))


def _at_site_harris(site, z, t, f):
    return harris_psd(f, _sigma_u(site, z, t), site.mean_speed(10.0, t)) + 0.0 * np.asarray(z)


# Spectrum names as written in case files -> (site, height, T, f) -> PSD.
SPECTRUM_MODELS = {
    "eurocode": _at_site_eurocode,
    "davenport": _at_site_davenport,
    "kaimal": _at_site_kaimal,
    "von-karman": _at_site_von_karman,
    "harris": _at_site_harris,
}


def velocity_spectrum(site, height_m, frequency_hz, return_period_years=50.0, model="eurocode"):
    """Along-wind turbulence PSD at the site [(m/s)^2/Hz], one-sided, integral sigma_u^2.

    Parameters
    ----------
    site : tmd.wind.Site or profile model
        The site: mean speed v_m(z, T), sigma_u and length scale L(z). A
        profile table or boundary-layer model with ``sigma_u_at`` gives a
        sigma_u that varies over height.
    height_m : float or array
        z [m]. Broadcast against ``frequency_hz``: pass ``f[:, None]`` and a
        row of heights for a (frequency, height) table.
    frequency_hz : array
        f [Hz].
    return_period_years : float
        T, return period of the mean wind speed [years].
    model : str
        One of ``SPECTRUM_MODELS``: "eurocode", "davenport", "kaimal",
        "von-karman", "harris".

    Notes
    -----
    sigma_u comes from the site. The EN and von Karman forms use the EN
    length scale L(z) and v_m(z); Kaimal uses z and v_m(z); Davenport and
    Harris use the site's 10 m mean speed and are the same at every height.

    Returns
    -------
    numpy.ndarray
        S_u(z, f) [(m/s)^2/Hz], one-sided, broadcast over ``height_m`` and
        ``frequency_hz``.

    Raises
    ------
    ValueError
        If ``model`` is not a key of ``SPECTRUM_MODELS``.

    References
    ----------
    See the module's references for each model.
    """
    if model not in SPECTRUM_MODELS:
        allowed = ", ".join(repr(k) for k in SPECTRUM_MODELS)
        raise ValueError(f"spectrum = {model!r} is not a known model; allowed: {allowed}")
    return SPECTRUM_MODELS[model](site, np.asarray(height_m, dtype=float), return_period_years,
                                  np.asarray(frequency_hz, dtype=float))
