"""Spatial correlation of the along-wind turbulence.

References
----------
Davenport, A. G. (1961). The application of statistical concepts to the wind
loading of structures. Proc. Institution of Civil Engineers 19, 449-472
(exponential root-coherence).
Simiu, E., Scanlan, R. H. (1996). Wind Effects on Structures, 3rd ed., Wiley,
section 2.3 (decay constants C_z = 10, C_y = 16 quoted there; from memory).
Vickery, B. J. (1965). On the flow behind a coarse grid and its use as a
model of atmospheric turbulence in studies related to wind loads on
buildings. NPL Aero Report 1143 (area admittance; form from memory, as
reproduced in Holmes, J. D., Wind Loading of Structures, Spon).
EN 1991-1-4:2005 Annex B, eq. B.7 (the averaged exponential, R_h and R_b).
"""

from __future__ import annotations

import numpy as np

# Exponential decay constants, from memory (Simiu & Scanlan, commonly quoted).
DECAY_VERTICAL = 10.0
DECAY_LATERAL = 16.0
# EN 1991-1-4 B.2(6) writes eta = 4.6 h f_L / L = 4.6 h f / v_m: equivalent to
# an exponential coherence with decay 2 x 4.6 in both directions.
DECAY_EUROCODE = 9.2


def root_coherence(frequency_hz, vertical_separation_m, lateral_separation_m, mean_speed,
                   decay_vertical=DECAY_VERTICAL, decay_lateral=DECAY_LATERAL):
    """Davenport's exponential root-coherence between two points [-].

    Parameters
    ----------
    frequency_hz : array
        f [Hz].
    vertical_separation_m, lateral_separation_m : array
        dz, dy [m].
    mean_speed : array
        Mean speed over the pair [m/s], usually the average of the two.
    decay_vertical, decay_lateral : float
        C_z, C_y [-].

    Returns
    -------
    coh : array [-], in (0, 1].

    Notes
    -----
    coh = exp(-f sqrt((C_z dz)^2 + (C_y dy)^2) / U).

    References
    ----------
    Davenport, A. G. (1961), Proc. ICE 19, 449-472; decay constants as quoted
    in Simiu & Scanlan (1996), section 2.3 (from memory).
    """
    f = np.asarray(frequency_hz, dtype=float)
    distance = np.hypot(decay_vertical * np.asarray(vertical_separation_m, dtype=float),
                        decay_lateral * np.asarray(lateral_separation_m, dtype=float))
    return np.exp(-f * distance / np.asarray(mean_speed, dtype=float))


def cross_spectrum(psd_i, psd_j, coherence):
    """Co-spectrum of two points [(m/s)^2/Hz]: sqrt(S_i S_j) coh.

    Parameters
    ----------
    psd_i, psd_j : array
        One-sided point spectra of the along-wind turbulence at the two points
        [(m/s)^2/Hz].
    coherence : array
        Root-coherence between the points [-], e.g. from :func:`root_coherence`.

    Returns
    -------
    numpy.ndarray
        Co-spectrum S_ij(f) [(m/s)^2/Hz], broadcast over the arguments.

    Notes
    -----
    S_ij = sqrt(S_i S_j) coh_ij; the quadrature spectrum is neglected, as usual
    for the along-wind component.
    """
    return np.sqrt(np.asarray(psd_i) * np.asarray(psd_j)) * np.asarray(coherence)


def area_admittance_sq(frequency_hz, area_m2, mean_speed):
    """Aerodynamic admittance chi^2 of a bluff area [-] (Vickery 1965 type).

    Parameters
    ----------
    frequency_hz : array
        f [Hz].
    area_m2 : float
        Loaded area A [m^2].
    mean_speed : float
        Reference mean speed U [m/s].

    Notes
    -----
    chi^2(f) = 1 / [1 + (2 f sqrt(A) / U)^(4/3)]^2. Form from memory.

    Returns
    -------
    numpy.ndarray
        chi^2(f) [-], in (0, 1], of the shape of ``frequency_hz``.

    References
    ----------
    Vickery, B. J. (1965), NPL Aero Report 1143, as reproduced in Holmes,
    Wind Loading of Structures (form from memory).
    """
    x = 2.0 * np.asarray(frequency_hz, dtype=float) * np.sqrt(area_m2) / mean_speed
    return 1.0 / (1.0 + x ** (4.0 / 3.0)) ** 2


def averaged_exponential(eta):
    """Mean of exp(-2 eta |s - t|) over s, t uniform on [0, 1] [-].

    Parameters
    ----------
    eta : array
        eta >= 0 [-], the decay exponent over the whole length: for EN's R_h,
        eta = 4.6 h f_L / L(z_s); for a strip, f C dz / (2 U).

    Returns
    -------
    numpy.ndarray
        R(eta) [-], in (0, 1], of the shape of ``eta``.

    Notes
    -----
    R(eta) = 1/eta - (1 - exp(-2 eta)) / (2 eta^2), R(0) = 1. This is EN
    1991-1-4 eq. B.7 (R_h, R_b); here it is also the exact self-coherence of a
    strip of length dz, with eta = f C dz / (2 U). A series is used below
    eta = 1e-3, where the closed form loses digits to cancellation.

    References
    ----------
    EN 1991-1-4:2005, Annex B, eq. B.7.
    """
    e = np.asarray(eta, dtype=float)
    small = e < 1e-3
    e_safe = np.where(small, 1.0, e)
    closed = 1.0 / e_safe - (1.0 - np.exp(-2.0 * e_safe)) / (2.0 * e_safe**2)
    series = 1.0 - 2.0 * e / 3.0 + e**2 / 3.0
    return np.where(small, series, closed)
