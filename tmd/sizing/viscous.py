"""Added viscous damping: dampers built into the structure instead of a moving mass.

Linear viscous dampers between points of the structure add modal damping.
With the mode shape = 1 at the reference (damper) level, let each damper's
deformation be d = phi_d x per unit modal displacement x (phi_d, stated by
the user from the installation: e.g. the storey drift per unit displacement
at the reference level, times the brace's cosine). A damper c_d dissipates
c_d (phi_d x')^2, the work of a modal dashpot c_d phi_d^2, so n such
dampers add (virtual work on the modal coordinate)

    c_add = n c_d phi_d^2 = 2 zeta_add M* omega_s,  hence
    c_d = 2 zeta_add M* omega_s / (n phi_d^2).

The supplemental damping ratio needed is found on the same engine: the
bare mode's peak acceleration falls monotonically with its damping ratio, so
zeta_total with peak(zeta_total) = target is bracketed and found by Brent's
method (``scipy.optimize.brentq``), taking the end of its final bracket that
meets the target (:func:`tmd.design.smallest_meeting_mass_ratio`);
zeta_add = zeta_total - zeta_s. This
assumes the dampers leave the mode shape unchanged (classical damping), a
common preliminary-design simplification.

References
----------
Constantinou, M. C. and Symans, M. D. (1993). Seismic response of structures
with supplemental damping. The Structural Design of Tall Buildings 2, 77-92
(modal damping from the energy dissipated by linear viscous dampers; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.dampers.absorber import Absorbers
from tmd.design import LoadedMode, smallest_meeting_mass_ratio
from tmd.peak import davenport_peak_factor
from tmd.performance import assess
from tmd.response import spectral_response
from tmd.verdict import meets_target

TWO_PI = 2.0 * math.pi
MAX_DAMPING_RATIO = 0.5


@dataclass(frozen=True)
class ViscousSettings:
    """The installation of the dampers (loaded keys under [options]).

    Parameters
    ----------
    deformation_per_modal_displacement : float
        phi_d, damper deformation per unit modal displacement at the damper
        (reference) level [-].
    damper_count : int
        Number n of identical dampers.
    force_capacity_n : float, optional
        Force capacity of one device, checked against its peak force [N].
    stroke_capacity_m : float, optional
        Stroke capacity of one device, checked against its peak deformation [m].
    """

    deformation_per_modal_displacement: float = 1.0
    damper_count: int = 1
    force_capacity_n: float | None = None
    stroke_capacity_m: float | None = None

    def __post_init__(self):
        if not self.deformation_per_modal_displacement > 0:
            raise ValueError("deformation_per_modal_displacement must be > 0")
        if not (isinstance(self.damper_count, int) and self.damper_count >= 1):
            raise ValueError("damper_count must be an integer >= 1")


@dataclass(frozen=True)
class ViscousDesign:
    """Added damping that meets the target, and the dampers that give it (SI).

    Parameters
    ----------
    total_damping_ratio : float
        zeta_total, the mode's damping ratio with the dampers [-].
    added_damping_ratio : float
        zeta_add = zeta_total - zeta_s [-].
    modal_damping_n_s_per_m : float
        c_add = 2 zeta_add M* omega_s, the added modal dashpot [N s/m].
    damper_constant_n_s_per_m : float
        c_d of each linear damper [N s/m].
    damper_count : int
        Number n of identical dampers.
    deformation_per_modal_displacement : float
        phi_d, damper deformation per unit modal displacement [-].
    sigma_acceleration_m_s2, peak_acceleration_m_s2 : float
        Rms and peak acceleration at the evaluation height [m/s^2].
    peak_displacement_m : float
        Peak modal displacement at the reference level [m].
    peak_damper_deformation_m : float
        phi_d times the peak displacement: each damper's peak stroke [m].
    peak_modal_damping_force_n : float
        c_add v_peak, the peak total modal damping force [N].
    peak_force_per_damper_n : float
        c_d phi_d v_peak, each damper's peak force [N].
    meets_target : bool
        Whether the peak acceleration meets the target.
    message : str
        The outcome in one plain sentence.
    """

    total_damping_ratio: float
    added_damping_ratio: float
    modal_damping_n_s_per_m: float
    damper_constant_n_s_per_m: float
    damper_count: int
    deformation_per_modal_displacement: float
    sigma_acceleration_m_s2: float
    peak_acceleration_m_s2: float
    peak_displacement_m: float
    peak_damper_deformation_m: float
    peak_modal_damping_force_n: float
    peak_force_per_damper_n: float
    meets_target: bool
    message: str


def size_added_damping(loaded: LoadedMode, target_peak_m_s2: float, *,
                       settings: ViscousSettings = ViscousSettings(),
                       max_damping_ratio: float = MAX_DAMPING_RATIO) -> ViscousDesign:
    """Return the supplemental modal damping that meets a peak-acceleration target.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    settings : ViscousSettings
        phi_d and the number of dampers.
    max_damping_ratio : float
        Largest total modal damping ratio searched [-].

    Returns
    -------
    ViscousDesign

    Notes
    -----
    zeta_total solves peak_a(zeta_total) = target (brentq on the bare mode);
    c_d = 2 zeta_add M* omega_s / (n phi_d^2). Peak velocity uses Davenport's
    factor with nu_v = sqrt(m4 / m2) of the displacement spectrum; the force
    per damper is c_d phi_d v_peak and the total modal force c_add v_peak.

    References
    ----------
    Constantinou, M. C. and Symans, M. D. (1993), The Structural Design of
    Tall Buildings 2, 77-92 (from memory).
    """
    m = loaded.mode

    def peak(zeta):
        return float(_assess_damped(loaded, zeta).peak_acceleration_m_s2)

    zeta_s = m.damping_ratio
    if meets_target(peak(zeta_s), target_peak_m_s2):
        total, message = zeta_s, "the bare building already meets the target"
    elif not meets_target(peak(max_damping_ratio), target_peak_m_s2):
        total = max_damping_ratio
        message = (f"the target {target_peak_m_s2:.4g} m/s^2 cannot be met with modal damping "
                   f"up to {max_damping_ratio:g}")
    else:
        # The search returns the end of its bracket that meets the target.
        total = smallest_meeting_mass_ratio(peak, target_peak_m_s2, zeta_s, max_damping_ratio)
        message = (f"a total modal damping ratio of {total:.4g} (added {total - zeta_s:.4g}) "
                   f"meets the target {target_peak_m_s2:.4g} m/s^2")
    return _design(loaded, total, settings, meets_target(peak(total), target_peak_m_s2), message)


def _design(loaded, total, settings, met, message):
    m = loaded.mode
    added = total - m.damping_ratio
    phi, n = settings.deformation_per_modal_displacement, settings.damper_count
    c_add = 2.0 * added * m.modal_mass_kg * TWO_PI * m.frequency_hz
    c_d = float(damper_constant_n_s_per_m(added, m.frequency_hz, m.modal_mass_kg, phi, n))
    a = _assess_damped(loaded, total)
    v_peak = peak_velocity_m_s(loaded, total)
    return ViscousDesign(
        total_damping_ratio=float(total), added_damping_ratio=float(added),
        modal_damping_n_s_per_m=float(c_add), damper_constant_n_s_per_m=c_d, damper_count=n,
        deformation_per_modal_displacement=phi,
        sigma_acceleration_m_s2=float(a.sigma_acceleration_m_s2),
        peak_acceleration_m_s2=float(a.peak_acceleration_m_s2),
        peak_displacement_m=float(a.peak_displacement_m),
        peak_damper_deformation_m=phi * float(a.peak_displacement_m),
        peak_modal_damping_force_n=float(c_add * v_peak),
        peak_force_per_damper_n=float(c_d * phi * v_peak), meets_target=bool(met),
        message=message)


def _assess_damped(loaded: LoadedMode, damping_ratio, frequency_hz=None):
    m = loaded.mode
    fs = m.frequency_hz if frequency_hz is None else frequency_hz
    zeta = np.asarray(damping_ratio, float)
    return assess(fs, m.modal_mass_kg, zeta, Absorbers.none(np.broadcast_shapes(
        zeta.shape, np.shape(fs))), loaded.spectrum, loaded.duration_s,
        shape_factor=loaded.shape_factor, peak_method=loaded.peak_method)


def peak_acceleration_with_dashpot(loaded: LoadedMode, added_damping_ratio: float, frequency_scale):
    """Return the peak acceleration [m/s^2] with the added dashpot kept as f_s moves.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    added_damping_ratio : float
        zeta_add at the nominal frequency [-].
    frequency_scale : float or array
        s = f_s' / f_s [-], the structure's frequency factor.

    Returns
    -------
    numpy.ndarray
        Peak acceleration at the evaluation height [m/s^2] at each s.

    Notes
    -----
    With f_s -> s f_s and M* kept, the added dashpot c_add is fixed, so its
    damping ratio becomes zeta_add / s; the structure's own damping follows
    the band definition :meth:`tmd.design.LoadedMode.structure_damping_ratio`.
    """
    s = np.asarray(frequency_scale, float)
    zeta = loaded.structure_damping_ratio(s) + added_damping_ratio / s
    return _assess_damped(loaded, zeta, s * loaded.mode.frequency_hz).peak_acceleration_m_s2


def velocity_statistics(loaded: LoadedMode, damping_ratio: float) -> tuple[float, float]:
    """Return the rms modal velocity [m/s] and its up-crossing rate [Hz] of the damped mode.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    damping_ratio : float
        Total modal damping ratio with the dampers [-].

    Returns
    -------
    sigma_v : float
        Rms modal velocity at the reference level [m/s].
    nu_v : float
        Its mean zero up-crossing rate [Hz].

    Notes
    -----
    sigma_v = 2 pi sqrt(m2_x) with m2_x the displacement's second moment
    [m^2 Hz^2]; the engine's acceleration variance is (2 pi)^4 m4_x, so
    nu_v = sqrt(m4_x / m2_x).
    """
    m = loaded.mode
    r = spectral_response(m.frequency_hz, m.modal_mass_kg, damping_ratio, Absorbers.none(),
                          loaded.spectrum)
    m2 = float(r.displacement.m2)
    m4 = float(r.acceleration.m0) / TWO_PI**4
    return TWO_PI * math.sqrt(m2), math.sqrt(m4 / m2)


def peak_velocity_m_s(loaded: LoadedMode, damping_ratio: float) -> float:
    """Return the expected peak modal velocity at the damper level [m/s].

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    damping_ratio : float
        Total modal damping ratio with the dampers [-].

    Returns
    -------
    float
        v_peak = g(nu_v, T) sigma_v [m/s].

    Notes
    -----
    Davenport's (1964) peak factor on :func:`velocity_statistics`.

    References
    ----------
    Davenport, A. G. (1964), Proc. ICE 28(2), 187-196.
    """
    sigma_v, nu_v = velocity_statistics(loaded, damping_ratio)
    return float(davenport_peak_factor(nu_v, loaded.duration_s)) * sigma_v


def damper_constant_n_s_per_m(added_damping_ratio, frequency_hz, modal_mass_kg,
                              deformation_per_modal_displacement=1.0, damper_count=1):
    """Return the linear damper constant c_d [N s/m] giving an added modal damping ratio.

    Parameters
    ----------
    added_damping_ratio : float or array
        zeta_add [-].
    frequency_hz, modal_mass_kg : float
        The mode (M* with the mode shape = 1 at the reference level).
    deformation_per_modal_displacement : float
        phi_d [-].
    damper_count : int
        n identical dampers.

    Notes
    -----
    c_d = 2 zeta_add M* omega_s / (n phi_d^2) (module notes).

    Returns
    -------
    float or numpy.ndarray
        c_d [N s/m].

    References
    ----------
    Constantinou, M. C. and Symans, M. D. (1993), The Structural Design of
    Tall Buildings 2, 77-92 (from memory).
    """
    omega = TWO_PI * np.asarray(frequency_hz, float)
    return (2.0 * np.asarray(added_damping_ratio, float) * modal_mass_kg * omega
            / (damper_count * deformation_per_modal_displacement**2))

