"""EN 1991-1-4 Annex B (procedure 1): structural factor and along-wind acceleration.

The check works on the bare building's fundamental along-wind mode; an added
damper enters only as its logarithmic decrement delta_d.

References
----------
EN 1991-1-4:2005+A1:2010, 6.3.1 (eq. 6.1-6.3), Annex B (B.1-B.11), Annex F
(F.3 mode shape exponent, F.4 equivalent mass, F.5 eq. F.18 aerodynamic
damping). Eq. B.10 and B.11 are written here from memory.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass

import numpy as np

from tmd.loads import aerodynamic_log_decrement, reference_height
from tmd.peak import eurocode_peak_factor
from tmd.wind.coherence import averaged_exponential
from tmd.wind.turbulence import eurocode_reduced

AVERAGING_TIME_S = 600.0


def background_factor_sq(breadth_m, height_m, length_scale_m):
    """Return the background response factor B^2 [-] (EN 1991-1-4 eq. B.3).

    Parameters
    ----------
    breadth_m : float
        b, breadth of the building across the wind [m].
    height_m : float
        h, height of the building [m].
    length_scale_m : float
        L(z_s), turbulence length scale at the reference height [m].

    Returns
    -------
    float
        B^2 [-], the quasi-static share of the response, reduced for the lack
        of full correlation of the gusts over the face.

    Notes
    -----
    B^2 = 1 / (1 + 0.9 ((b + h) / L(z_s))^0.63).

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex B, eq. B.3.
    """
    return 1.0 / (1.0 + 0.9 * ((breadth_m + height_m) / length_scale_m) ** 0.63)


def size_reduction(eta):
    """Return the aerodynamic admittance R_h or R_b [-] (EN 1991-1-4 eq. B.7).

    Parameters
    ----------
    eta : float or array
        eta_h = 4.6 h f_L / L(z_s) or eta_b = 4.6 b f_L / L(z_s) [-], the
        height or breadth in units of the gusts' correlation length at n_1.

    Returns
    -------
    float or numpy.ndarray
        R_h or R_b [-], in (0, 1].

    Notes
    -----
    R(eta) = 1/eta - (1 - exp(-2 eta)) / (2 eta^2), R(0) = 1, with
    eta_h = 4.6 h f_L / L(z_s) and eta_b = 4.6 b f_L / L(z_s).

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex B, eq. B.7 and B.8.
    """
    return averaged_exponential(eta)


def reduced_frequency(frequency_hz, length_scale_m, mean_speed_m_s):
    """Dimensionless frequency f_L = n_1 L(z_s) / v_m(z_s) (EN 1991-1-4 eq. B.2).

    Parameters
    ----------
    frequency_hz : float
        n_1 [Hz].
    length_scale_m : float
        L(z_s) [m].
    mean_speed_m_s : float
        v_m(z_s) [m/s].

    Returns
    -------
    float
    """
    return frequency_hz * length_scale_m / mean_speed_m_s


def size_reduction_arguments(height_m, breadth_m, reduced_frequency_value, length_scale_m):
    """eta_h = 4.6 h f_L / L(z_s) and eta_b = 4.6 b f_L / L(z_s) (EN 1991-1-4 eq. B.7, B.8).

    Parameters
    ----------
    height_m, breadth_m : float
        h, b [m].
    reduced_frequency_value : float
        f_L [-] (:func:`reduced_frequency`).
    length_scale_m : float
        L(z_s) [m].

    Returns
    -------
    eta_h, eta_b : float
    """
    scale = 4.6 * reduced_frequency_value / length_scale_m
    return height_m * scale, breadth_m * scale


def resonance_factor_sq(log_decrement, reduced_spectrum, reduction_height, reduction_breadth):
    """Return the resonance response factor R^2 [-] (EN 1991-1-4 eq. B.6).

    Parameters
    ----------
    log_decrement : float
        delta, total logarithmic decrement of damping of the mode [-]
        (structural + aerodynamic + special devices).
    reduced_spectrum : float
        S_L(z_s, n_1) [-], EN's non-dimensional power spectral density at the
        reference height and the natural frequency.
    reduction_height, reduction_breadth : float
        R_h and R_b [-], the aerodynamic admittances (:func:`size_reduction`).

    Returns
    -------
    float
        R^2 [-], the resonant share of the response.

    Notes
    -----
    R^2 = pi^2 / (2 delta) S_L(z_s, n_1) R_h R_b.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex B, eq. B.6.
    """
    admittance = reduction_height * reduction_breadth
    return math.pi**2 / (2.0 * log_decrement) * reduced_spectrum * admittance


def peak_factor(upcrossing_hz, duration_s=AVERAGING_TIME_S):
    """Return the peak factor k_p [-] (EN 1991-1-4 eq. B.4), not below 3, as a float.

    Parameters
    ----------
    upcrossing_hz : float
        nu, the response's up-crossing frequency [Hz] (:func:`upcrossing_frequency`).
    duration_s : float
        T, averaging time of the mean wind velocity [s], 600 s in EN.

    Returns
    -------
    float
        k_p [-], the ratio of the expected maximum to the standard deviation
        of the fluctuating response.

    Notes
    -----
    k_p = sqrt(2 ln(nu T)) + 0.6 / sqrt(2 ln(nu T)); the standard's rounding of
    Davenport's 0.5772. Computed by :func:`tmd.peak.eurocode_peak_factor`.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex B, eq. B.4.
    """
    return float(eurocode_peak_factor(upcrossing_hz, duration_s))


def upcrossing_frequency(frequency_hz, background_sq, resonance_sq):
    """Return the up-crossing frequency nu [Hz] (EN 1991-1-4 eq. B.5), not below 0.08 Hz.

    Parameters
    ----------
    frequency_hz : float
        n_1, natural frequency of the along-wind mode [Hz].
    background_sq : float
        B^2, background response factor [-].
    resonance_sq : float
        R^2, resonance response factor [-].

    Returns
    -------
    float
        nu [Hz].

    Notes
    -----
    nu = n_1 sqrt(R^2 / (B^2 + R^2)).

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex B, eq. B.5.
    """
    return max(frequency_hz * math.sqrt(resonance_sq / (background_sq + resonance_sq)), 0.08)


def structural_factor(peak, turbulence_intensity, background_sq, resonance_sq):
    """Return the structural factor c_s c_d [-] (EN 1991-1-4 eq. 6.1).

    Parameters
    ----------
    peak : float
        k_p, peak factor [-].
    turbulence_intensity : float
        I_v(z_s), turbulence intensity at the reference height [-].
    background_sq : float
        B^2, background response factor [-].
    resonance_sq : float
        R^2, resonance response factor [-].

    Returns
    -------
    float
        c_s c_d [-], the factor on the peak-velocity-pressure wind force that
        accounts for non-simultaneous gusts and resonance.

    Notes
    -----
    c_s c_d = (1 + 2 k_p I_v(z_s) sqrt(B^2 + R^2)) / (1 + 7 I_v(z_s)).

    References
    ----------
    EN 1991-1-4:2005+A1:2010, 6.3.1, eq. 6.1.
    """
    return ((1.0 + 2.0 * peak * turbulence_intensity * math.sqrt(background_sq + resonance_sq))
            / (1.0 + 7.0 * turbulence_intensity))


def acceleration_shape_factor(mode_shape_exponent, reference_height_m, roughness_length_m):
    """Return the non-dimensional coefficient K_x [-] (EN 1991-1-4 eq. B.11, from memory).

    Parameters
    ----------
    mode_shape_exponent : float
        zeta of the mode shape Phi_1 = (z/h)^zeta [-] (EN Annex F, F.3).
    reference_height_m : float
        z_s, reference height of the structure [m].
    roughness_length_m : float
        z0, roughness length of the terrain [m].

    Returns
    -------
    float
        K_x [-].

    Notes
    -----
    K_x = (2 zeta + 1) {(zeta + 1) [ln(z_s/z0) + 0.5] - 1} / ((zeta + 1)^2 ln(z_s/z0)).

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex B, eq. B.11 (from memory).
    """
    zeta = mode_shape_exponent
    log = math.log(reference_height_m / roughness_length_m)
    return (2 * zeta + 1) * ((zeta + 1) * (log + 0.5) - 1) / ((zeta + 1) ** 2 * log)


@dataclass(frozen=True)
class AnnexBResult:
    """EN 1991-1-4 Annex B quantities for one mode, wind and damping (units in the names).

    Parameters
    ----------
    reference_height_m : float
        z_s, reference height [m].
    mean_speed_m_s : float
        v_m(z_s), mean wind velocity at z_s [m/s].
    turbulence_intensity : float
        I_v(z_s) [-].
    length_scale_m : float
        L(z_s), turbulence length scale [m].
    background_factor_sq : float
        B^2 [-] (eq. B.3).
    resonance_factor_sq : float
        R^2 [-] (eq. B.6).
    size_reduction_height, size_reduction_breadth : float
        R_h and R_b [-] (eq. B.7, B.8).
    log_decrement_total : float
        delta = delta_s + delta_a + delta_d [-].
    upcrossing_hz : float
        nu [Hz] (eq. B.5).
    peak_factor : float
        k_p [-] of the structural factor (eq. B.4).
    structural_factor : float
        c_s c_d [-] (eq. 6.1).
    peak_factor_acceleration : float
        k_p [-] of the acceleration, with nu = n_1.
    sigma_acceleration_m_s2 : float
        sigma_a,x, standard deviation of the along-wind acceleration at the
        evaluation height [m/s^2] (eq. B.10).
    peak_acceleration_m_s2 : float
        k_p sigma_a,x [m/s^2].
    """

    reference_height_m: float
    mean_speed_m_s: float
    turbulence_intensity: float
    length_scale_m: float
    background_factor_sq: float
    resonance_factor_sq: float
    size_reduction_height: float
    size_reduction_breadth: float
    log_decrement_total: float
    upcrossing_hz: float
    peak_factor: float
    structural_factor: float
    peak_factor_acceleration: float
    sigma_acceleration_m_s2: float
    peak_acceleration_m_s2: float

    def as_dict(self) -> dict[str, float]:
        """Return the fields as a plain dict.

        Returns
        -------
        dict of str to float
            One entry per field, keyed by the field's name (its unit in the name).
        """
        return asdict(self)


def annex_b(*, height_m, breadth_m, force_coefficient, frequency_hz, equivalent_mass_kg_m,
            reference_height_m, mean_speed_m_s, turbulence_intensity, length_scale_m,
            roughness_length_m, structural_log_decrement, mode_shape_exponent,
            mode_shape_ratio=1.0, air_density_kg_m3=1.25, damper_log_decrement=0.0,
            duration_s=AVERAGING_TIME_S) -> AnnexBResult:
    """Run EN 1991-1-4 Annex B from explicit inputs (the published worked-example level).

    Parameters
    ----------
    height_m, breadth_m : float
        h, b [m].
    force_coefficient : float
        c_f [-].
    frequency_hz : float
        n_1 [Hz].
    equivalent_mass_kg_m : float
        m_e = m_1,x [kg/m].
    reference_height_m, mean_speed_m_s, turbulence_intensity, length_scale_m : float
        z_s [m], v_m(z_s) [m/s], I_v(z_s) [-], L(z_s) [m].
    roughness_length_m : float
        z0 [m] (for K_x).
    structural_log_decrement : float
        delta_s [-].
    mode_shape_exponent : float
        zeta of Phi_1 = (z/h)^zeta [-] (for K_x).
    mode_shape_ratio : float
        Phi_1(z) / Phi_1,max at the acceleration height [-].
    air_density_kg_m3 : float
        rho [kg/m^3].
    damper_log_decrement : float
        delta_d of special devices [-].
    duration_s : float
        T [s] of the peak factors.

    Notes
    -----
    delta = delta_s + delta_a + delta_d with delta_a from eq. F.18;
    f_L = n_1 L / v_m; sigma_a = c_f rho b I_v v_m^2 R K_x Phi / (m_e Phi_max)
    (eq. B.10, from memory: the standard divides by m_1,x, the equivalent mass
    per length); its peak factor uses nu = n_1 (B.4(4)).

    Returns
    -------
    AnnexBResult
        Every intermediate quantity and the peak acceleration.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, 6.3.1, Annex B (B.2, B.4) and Annex F (F.5,
    eq. F.18). Eq. B.10 and B.11 from memory.
    """
    delta_a = float(aerodynamic_log_decrement(force_coefficient, air_density_kg_m3, breadth_m,
                                              mean_speed_m_s, frequency_hz, equivalent_mass_kg_m))
    delta = structural_log_decrement + delta_a + damper_log_decrement
    f_l = reduced_frequency(frequency_hz, length_scale_m, mean_speed_m_s)
    eta_h, eta_b = size_reduction_arguments(height_m, breadth_m, f_l, length_scale_m)
    r_h, r_b = float(size_reduction(eta_h)), float(size_reduction(eta_b))
    b2 = background_factor_sq(breadth_m, height_m, length_scale_m)
    r2 = resonance_factor_sq(delta, float(eurocode_reduced(f_l)), r_h, r_b)
    nu = upcrossing_frequency(frequency_hz, b2, r2)
    k_p = peak_factor(nu, duration_s)
    k_x = acceleration_shape_factor(mode_shape_exponent, reference_height_m, roughness_length_m)
    sigma_a = (force_coefficient * air_density_kg_m3 * breadth_m * turbulence_intensity
               * mean_speed_m_s**2 * math.sqrt(r2) * k_x * mode_shape_ratio / equivalent_mass_kg_m)
    k_pa = peak_factor(frequency_hz, duration_s)
    return AnnexBResult(
        reference_height_m=reference_height_m, mean_speed_m_s=mean_speed_m_s,
        turbulence_intensity=turbulence_intensity, length_scale_m=length_scale_m,
        background_factor_sq=b2, resonance_factor_sq=r2, size_reduction_height=r_h,
        size_reduction_breadth=r_b, log_decrement_total=delta, upcrossing_hz=nu,
        peak_factor=k_p, structural_factor=structural_factor(k_p, turbulence_intensity, b2, r2),
        peak_factor_acceleration=k_pa, sigma_acceleration_m_s2=sigma_a,
        peak_acceleration_m_s2=k_pa * sigma_a,
    )


def annex_b_check(site, building, mode, return_period_years=50.0, *, damper_log_decrement=0.0,
                  duration_s=AVERAGING_TIME_S) -> AnnexBResult:
    """Run the EN 1991-1-4 Annex B check of a building's along-wind mode.

    Parameters
    ----------
    site : tmd.wind.Site
        The wind climate and terrain (mean speed, turbulence intensity and
        length scale at z_s, roughness length, air density).
    building : tmd.loads.Building
        Its drag coefficient is used as c_f; acceleration at evaluation_height_m.
    mode : tmd.structure.Mode
        n_1 [Hz], M* [kg] (phi = 1 at the damper), structural damping ratio
        zeta_s (delta_s = 2 pi zeta_s).
    return_period_years : float
        T [years] of the mean wind.
    damper_log_decrement : float
        delta_d [-] of an added damper (0 for the bare building).
    duration_s : float
        T [s] of the peak factors, default 600.

    Notes
    -----
    z_s = 0.6 h, not below z_min; m_e from the building
    (:meth:`tmd.loads.Building.equivalent_mass_per_length`).

    Returns
    -------
    AnnexBResult
        Every intermediate quantity and the peak acceleration.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, 6.3.1 and Annex B, procedure 1.
    """
    z_s = reference_height(site, building)
    z = np.linspace(0.0, building.height_m, 2001)
    phi_max = float(np.max(np.abs(building.mode_shape(z))))
    return annex_b(
        height_m=building.height_m, breadth_m=building.breadth_m,
        force_coefficient=building.drag_coefficient, frequency_hz=mode.frequency_hz,
        equivalent_mass_kg_m=building.equivalent_mass_per_length(mode.modal_mass_kg),
        reference_height_m=z_s, mean_speed_m_s=float(site.mean_speed(z_s, return_period_years)),
        turbulence_intensity=float(site.turbulence_intensity(z_s)),
        length_scale_m=float(site.length_scale(z_s)), roughness_length_m=site.roughness_length_m,
        structural_log_decrement=2.0 * math.pi * mode.damping_ratio,
        mode_shape_exponent=building.mode_shape_exponent,
        mode_shape_ratio=building.evaluation_mode_value / phi_max,
        air_density_kg_m3=site.air_density_kg_m3, damper_log_decrement=damper_log_decrement,
        duration_s=duration_s,
    )
