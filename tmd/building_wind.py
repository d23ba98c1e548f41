"""Along-wind strip loading of the building's n modes, per wind direction.

For a wind blowing along the plan unit vector e (the direction it travels),
every strip's quasi-steady fluctuating drag acts along e through the plan
origin (x0, y0), so mode i's generalised force is the strip sum weighted by
the mode's sway projected on the wind direction,

    psi_i(z) = phi_x,i(z) e_x + phi_y,i(z) e_y,

and the modal forces of one direction are correlated: their cross-spectra are
the strip double sums (:func:`tmd.loads.generalized_force_psd`) with two
different weights, S_ij = w_i^T C w_j. The root-coherence is real, so S_ij
is real; it follows from the one-mode quadratic form by polarisation,
S_ij = (S(psi_i + psi_j) - S(psi_i) - S(psi_j)) / 2. The drag through the origin
gives no torsional moment.

On request, a sector adds the across-wind forces of the published model of
:mod:`tmd.wind.acrosswind` (AIJ-RLB 2004): the base-moment spectrum S_M(f)
of the face normal to the wind, turned into each mode's generalised force
through that mode's sway across the wind, chi_i(z) = phi_x,i(z) c_x +
phi_y,i(z) c_y with c = (-e_y, e_x) (the travel direction turned a quarter
turn anticlockwise; the sign only fixes the modes' relative sign). The model
takes the across-wind force as fully correlated over the height, so
S_ij = eta_i eta_j S_M(f) with eta_i = Q_i / M from
:func:`tmd.wind.acrosswind.mode_shape_correction`. The across-wind forces are
taken as uncorrelated with the along-wind ones (the matrices add), and there
is still no torsional load: torsional and across-wind loads are in fact often
correlated, which only wind-tunnel data settle.

Wind direction is where the wind comes from, in degrees clockwise from north;
the building's orientation is the bearing of its +y axis, clockwise from
north. The wind then travels along e = -(sin a, cos a) in plan axes, with
a = direction - orientation.

References
----------
Davenport, A. G. (1962). The response of slender, line-like structures to a
gusty wind. Proc. ICE 23, 389-408 (quasi-steady strip loading, from memory).
"""

from __future__ import annotations

import math

import numpy as np

from tmd.building_modes import BuildingMode
from tmd.cross_spectra import TabulatedCrossSpectrum
from tmd.loads import (
    DEFAULT_FREQUENCY_HZ,
    Building,
    generalized_force_psd,
    height_strips,
    reference_height,
)
from tmd.wind import acrosswind
from tmd.wind.turbulence import velocity_spectrum


def wind_travel_vector(direction_deg: float, orientation_deg: float) -> np.ndarray:
    """Plan unit vector along which the wind travels.

    Parameters
    ----------
    direction_deg : float
        Where the wind comes from, clockwise from north [deg].
    orientation_deg : float
        Bearing of the building's +y axis, clockwise from north [deg].

    Returns
    -------
    array (2,)
        (e_x, e_y) in the building's plan axes [-].
    """
    a = math.radians(direction_deg - orientation_deg)
    return -np.array([math.sin(a), math.cos(a)])


def strip_cross_spectrum(site, modes: tuple[BuildingMode, ...], *, height_m: float,
                         breadth_m: float, depth_m: float, drag_coefficient: float,
                         travel: np.ndarray, return_period_years: float,
                         spectrum: str = "eurocode", coherence: str = "exponential",
                         n_strips: int = 40, frequency_hz=None,
                         across_wind: bool = False) -> TabulatedCrossSpectrum:
    """Modal force cross-spectral matrix of one wind direction [N^2/Hz].

    Parameters
    ----------
    site : tmd.wind.Site
        The site, with any directional factor already applied to its speed.
    modes : tuple of BuildingMode
        The modes.
    height_m : float
        Building height [m].
    breadth_m, depth_m : float
        Face breadth normal to this wind and depth along it [m].
    drag_coefficient : float
        Drag (force) coefficient for this direction [-].
    travel : array (2,)
        Unit vector the wind travels along (:func:`wind_travel_vector`).
    return_period_years : float
        Return period of the mean wind speed [years].
    spectrum, coherence : str
        Turbulence spectrum and coherence model (see :mod:`tmd.loads`).
    n_strips : int
        Strips over the height.
    frequency_hz : array, optional
        Table frequencies [Hz]; default as :func:`tmd.loads.modal_force_spectrum`.
    across_wind : bool
        Add the across-wind forces (:func:`across_wind_matrix`), taken as
        uncorrelated with the along-wind ones.

    Returns
    -------
    TabulatedCrossSpectrum
        A mode with no sway along (or across) the wind gets a zero row.
    """
    f = DEFAULT_FREQUENCY_HZ if frequency_hz is None else np.asarray(frequency_hz, float)
    building = Building(height_m, breadth_m, depth_m, drag_coefficient)
    z, dz = height_strips(height_m, n_strips)
    speed = site.mean_speed(z, return_period_years)
    psd = velocity_spectrum(site, z[None, :], f[:, None], return_period_years, spectrum)
    weights = [m.shape.values(z)[:, :2] @ travel for m in modes]
    admittance_speed = float(site.mean_speed(reference_height(site, building),
                                             return_period_years))

    def form(shape):
        return generalized_force_psd(f, z, dz, shape, speed, psd, breadth_m=breadth_m,
                                     drag_coefficient=drag_coefficient,
                                     air_density_kg_m3=site.air_density_kg_m3,
                                     coherence=coherence, admittance_speed=admittance_speed)

    n = len(modes)
    active = [bool(np.any(np.abs(w) > 1e-12)) for w in weights]
    matrix = np.zeros((f.size, n, n), dtype=complex)
    for i in range(n):
        if active[i]:
            matrix[:, i, i] = form(weights[i])
        for j in range(i):
            if active[i] and active[j]:
                cross = 0.5 * (form(weights[i] + weights[j]) - matrix[:, i, i].real
                               - matrix[:, j, j].real)
                matrix[:, i, j] = matrix[:, j, i] = cross
    source = (f"along-wind strip model: {spectrum} spectrum, {coherence} coherence, "
              f"T = {return_period_years:g} yr, {n_strips} strips")
    if across_wind:
        matrix = matrix + across_wind_matrix(
            site, modes, height_m=height_m, breadth_m=breadth_m, depth_m=depth_m,
            travel=travel, return_period_years=return_period_years, frequency_hz=f)
        source += f"; across-wind: {acrosswind.SOURCE}"
    return TabulatedCrossSpectrum(f, matrix, source=source)


def _across(travel) -> np.ndarray:
    """Return the plan unit vector across the wind (the travel direction turned anticlockwise).

    The quarter turn is anticlockwise in plan.
    """
    return np.array([-travel[1], travel[0]])


def across_wind_matrix(site, modes: tuple[BuildingMode, ...], *, height_m: float,
                       breadth_m: float, depth_m: float, travel: np.ndarray,
                       return_period_years: float, frequency_hz) -> np.ndarray:
    """Across-wind modal force cross-spectral matrix of one wind direction [N^2/Hz].

    Parameters
    ----------
    site : tmd.wind.Site
        The site, with any directional factor already applied to its speed.
    modes : tuple of BuildingMode
        The modes.
    height_m : float
        Building height H [m].
    breadth_m, depth_m : float
        Face breadth B normal to this wind and depth D along it [m].
    travel : array (2,)
        Unit vector the wind travels along (:func:`wind_travel_vector`).
    return_period_years : float
        Return period of the mean wind speed [years].
    frequency_hz : array (F,)
        Frequencies [Hz], > 0.

    Returns
    -------
    array (F, n, n), real
        eta_i eta_j S_M(f): S_M from :func:`tmd.wind.acrosswind.base_moment_psd`
        at the top mean speed U_H, eta_i the mode-shape correction of mode i's
        sway across the wind (fully correlated over the height, so coherence 1
        between the modes).
    """
    f = np.asarray(frequency_hz, float)
    eta = across_wind_corrections(modes, height_m, travel)
    top = float(site.mean_speed(height_m, return_period_years))
    moment = acrosswind.base_moment_psd(f, breadth_m=breadth_m, depth_m=depth_m,
                                        height_m=height_m, top_mean_speed_m_s=top,
                                        air_density_kg_m3=site.air_density_kg_m3)
    return moment[:, None, None] * np.outer(eta, eta)[None, :, :]


def across_wind_corrections(modes: tuple[BuildingMode, ...], height_m: float,
                            travel: np.ndarray) -> np.ndarray:
    """eta_i = Q_i / M of every mode's sway across the wind [1/m].

    Parameters
    ----------
    modes : tuple of BuildingMode
        The modes.
    height_m : float
        H [m].
    travel : array (2,)
        Unit vector the wind travels along.

    Returns
    -------
    array (n,)
        :func:`tmd.wind.acrosswind.mode_shape_correction` of chi_i(z); zero
        for a mode with no sway across the wind (below 1e-12 at 41 heights).
    """
    across = _across(travel)
    z = np.linspace(0.0, height_m, 41)
    # As the strip model's rows: a sway below 1e-12 across the wind (a rounding
    # of the direction's sine or cosine) counts as none.
    return np.array([acrosswind.mode_shape_correction(
        height_m, lambda z, m=m: m.shape.values(z)[..., :2] @ across, m.shape.breakpoints_m)
        if np.max(np.abs(m.shape.values(z)[:, :2] @ across)) > 1e-12 else 0.0 for m in modes])


def across_wind_problems(site, modes: tuple[BuildingMode, ...], *, height_m: float,
                         breadth_m: float, depth_m: float, travel: np.ndarray,
                         return_period_years: float) -> list[str]:
    """Return the inputs outside the across-wind model's range for one wind direction.

    Parameters
    ----------
    site : tmd.wind.Site
        The site.
    modes : tuple of BuildingMode
        The modes.
    height_m, breadth_m, depth_m : float
        H, B (normal to the wind), D [m].
    travel : array (2,)
        Unit vector the wind travels along.
    return_period_years : float
        Return period [years].

    Returns
    -------
    list of str
        :func:`tmd.wind.acrosswind.validity_problems`, the reduced velocity
        taken for every mode that sways across the wind.
    """
    eta = across_wind_corrections(modes, height_m, travel)
    swaying = np.abs(eta) > 1e-9 * max(float(np.max(np.abs(eta))), 1e-300)
    top = float(site.mean_speed(height_m, return_period_years))
    width = math.sqrt(breadth_m * depth_m)
    frequencies = np.array([m.frequency_hz for m in modes])[swaying]
    return acrosswind.validity_problems(
        side_ratio=depth_m / breadth_m, aspect_ratio=height_m / width,
        reduced_velocity=top / (frequencies * width) if frequencies.size else None)
