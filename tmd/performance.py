"""What an engineer reads off a design: rms and peak responses, effective damping.

Peaks are g sigma with Davenport's peak factor from each response's own
up-crossing rate (:mod:`tmd.peak`). Accelerations can be reported at another
height than the damper's by the mode-shape value there (``shape_factor``:
phi(z_eval) with phi = 1 at the damper).
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from tmd.dampers.absorber import Absorbers
from tmd.errors import NonFiniteResult, NumericalFailure
from tmd.notes import LoadWarning, current_load
from tmd.peak import davenport_peak_factor, peak_factor_is_held, vanmarcke_peak_factor
from tmd.response import RESPONSES, TOP_DECADE_WARNING, Moments, spectral_response
from tmd.spectra import ForceSpectrum

# Spectral peak estimates; "simulated" (tmd.simulated_sizing) sizes by records.
PEAK_METHODS = ("davenport", "vanmarcke")


class UpperEdgeWarning(LoadWarning):
    """Much of a response moment comes from the top decade of the load spectrum.

    Parameters
    ----------
    load : str
        The load it concerns.
    values : dict
        ``share_m0`` and ``share_m2``, the largest shares of the acceleration's
        variance and second moment over the batch [-], and ``f_max_hz``, the
        top of the load's range [Hz]; for a spectrum with ``edge_advice``,
        also ``advice`` (its text) and ``peak_change_per_decade`` [-].
    """

    @classmethod
    def text(cls, load, values, count):
        """Return the warning in words (see :meth:`tmd.notes.LoadWarning.text`).

        Parameters
        ----------
        load : str
            The load it concerns.
        values : dict
            ``share_m0``, ``share_m2`` [-] and ``f_max_hz`` [Hz]; optionally
            ``advice`` and ``peak_change_per_decade`` [-].
        count : int
            How many evaluations raised it [-].

        Returns
        -------
        str
            One line.
        """
        designs = "one evaluation" if count == 1 else f"the worst of {count} evaluations"
        advice = values.get("advice") or "extend the spectrum table to higher frequencies"
        if "peak_change_per_decade" in values:
            advice += (f"; one more decade of the same tail would raise the peak by about "
                       f"{100 * values['peak_change_per_decade']:.2g}% (Davenport's factor)")
        return (f"{load}: {100 * values['share_m2']:.1f}% of the acceleration's second moment "
                f"and {100 * values['share_m0']:.1f}% of its variance come from the top decade "
                f"of the load spectrum (up to {values['f_max_hz']:g} Hz; {designs}), so the "
                f"up-crossing rate and peak factor depend on where the spectrum is cut off; "
                f"{advice}")

    def key(self):
        """Kind, load and the spectrum's top frequency.

        Returns
        -------
        tuple
            A hashable key.
        """
        return (type(self), self.load, self.values["f_max_hz"])


class NoEffectiveDampingWarning(LoadWarning):
    """No damping ratio of the bare mode gives the damped structure's rms acceleration.

    Parameters
    ----------
    load : str
        The load it concerns.
    values : dict of str to float
        ``missing`` (how many ratios have no value) and ``total``
        (of how many) [-]; ``reason`` 1 (the damped response exceeds the bare
        mode's at the lowest damping searched), 2 (it is below it at the
        highest) or 0 (no convergence); ``sigma_m_s2`` the damped rms
        acceleration and ``bare_sigma_m_s2`` the bare mode's at that end of the
        search [m/s^2]; ``damping_ratio`` that end [-]; ``frequency_hz`` the
        mode's and ``f_min_hz``, ``f_max_hz`` the load's range [Hz].
    """

    @classmethod
    def text(cls, load, values, count):
        """Return the warning in words (see :meth:`tmd.notes.LoadWarning.text`).

        Parameters
        ----------
        load : str
            The load it concerns.
        values : dict of str to float
            See the class.
        count : int
            How many evaluations raised it [-].

        Returns
        -------
        str
            One line.
        """
        v = values
        head = (f"{load}: {int(v['missing'])} of {int(v['total'])} effective damping ratio(s) "
                f"have no value (null)" + ("" if count == 1 else f", in {count} evaluations"))
        if v["reason"] == 1:
            return (f"{head}: the damped rms acceleration {v['sigma_m_s2']:.4g} m/s^2 exceeds "
                    f"the bare mode's at any damping ratio down to {v['damping_ratio']:g} "
                    f"({v['bare_sigma_m_s2']:.4g} m/s^2): the load (given on {v['f_min_hz']:g} "
                    f"to {v['f_max_hz']:g} Hz) has little energy near the mode's "
                    f"{v['frequency_hz']:.4g} Hz, where a damper mostly adds mass")
        if v["reason"] == 2:
            return (f"{head}: the damped rms acceleration {v['sigma_m_s2']:.4g} m/s^2 is below "
                    f"the bare mode's even at damping ratio {v['damping_ratio']:g} "
                    f"({v['bare_sigma_m_s2']:.4g} m/s^2)")
        return f"{head}: the root search did not converge"

    def key(self):
        """Kind, load and reason.

        Returns
        -------
        tuple
            A hashable key.
        """
        return (type(self), self.load, self.values["reason"])


# Effective damping ratios are searched in this range [-]: from far below any
# structure's damping to just below critical (the engine's pole-clustered
# grid is for underdamped modes), so that a missing value means the bare mode
# cannot reproduce the response.
EFFECTIVE_DAMPING_BRACKET = (1e-7, 0.99)


@dataclass(frozen=True)
class Assessment:
    """Responses of a batch of designs (arrays over the batch).

    Accelerations are at the evaluation height [m/s^2]; displacement at the
    damper level [m]; strokes per absorber (last axis) [m]; force is the
    total the absorbers put on the structure [N]. The fields of a response
    left out of ``responses`` (see :func:`assess`) are None.

    Parameters
    ----------
    sigma_displacement_m, peak_displacement_m : numpy.ndarray
        Rms and peak displacement of the structure at the damper level [m].
    sigma_acceleration_m_s2, peak_acceleration_m_s2 : numpy.ndarray
        Rms and peak acceleration at the evaluation height [m/s^2].
    peak_factor : numpy.ndarray
        g of the acceleration [-], peak = g sigma.
    upcrossing_hz : numpy.ndarray
        Mean zero up-crossing rate of the acceleration [Hz].
    sigma_stroke_m, peak_stroke_m : numpy.ndarray
        Rms and peak stroke of each absorber relative to the structure [m]
        (last axis: the absorbers).
    sigma_force_n, peak_damper_force_n : numpy.ndarray
        Rms and peak of the total force the absorbers put on the structure [N].
    top_decade_share_m0, top_decade_share_m2 : numpy.ndarray
        Shares of the acceleration's variance and second spectral moment that
        come from the top decade of the load's frequency range [-].
    peak_factor_held : numpy.ndarray of bool
        True where nu T was too small for Davenport's formula and g was held
        at its smallest value (:func:`tmd.peak.peak_factor_is_held`).
    """

    sigma_displacement_m: np.ndarray
    peak_displacement_m: np.ndarray
    sigma_acceleration_m_s2: np.ndarray
    peak_acceleration_m_s2: np.ndarray
    peak_factor: np.ndarray
    upcrossing_hz: np.ndarray
    sigma_stroke_m: np.ndarray
    peak_stroke_m: np.ndarray
    sigma_force_n: np.ndarray
    peak_damper_force_n: np.ndarray
    top_decade_share_m0: np.ndarray
    top_decade_share_m2: np.ndarray
    peak_factor_held: np.ndarray


def peak_factor(moments: Moments, duration_s, peak_method: str = "davenport"):
    """Peak factor of a response and its up-crossing rate, by the chosen method.

    Parameters
    ----------
    moments : Moments
        Spectral moments of the response (m1 is needed for ``"vanmarcke"``).
    duration_s : float
        Averaging duration T [s].
    peak_method : str
        ``"davenport"``: Davenport's (1964) g from nu = sqrt(m2 / m0), the
        tool's default; ``"vanmarcke"``: the mean of max |x| over T by
        Vanmarcke's (1975) first-passage law with the bandwidth parameter q
        (two-sided: comfort and stroke verdicts judge max |x|).

    Returns
    -------
    g, nu : arrays
        Peak factor [-] and up-crossing rate [Hz].
    """
    with np.errstate(invalid="ignore", divide="ignore"):
        nu = np.nan_to_num(moments.upcrossing_hz)
        if peak_method == "davenport":
            return davenport_peak_factor(nu, duration_s), nu
        if peak_method == "vanmarcke":
            q = np.nan_to_num(moments.bandwidth, nan=1.0)
            return vanmarcke_peak_factor(nu, q, duration_s, two_sided=True), nu
    raise ValueError(f"peak_method = {peak_method!r}: allowed are {', '.join(PEAK_METHODS)}")


def _peak(moments: Moments, duration_s, peak_method="davenport"):
    g, nu = peak_factor(moments, duration_s, peak_method)
    return g * moments.sigma, nu


def assess(frequency_hz, modal_mass_kg, damping_ratio, absorbers: Absorbers,
           spectrum: ForceSpectrum, duration_s: float, *, shape_factor: float = 1.0,
           warn: bool = False, responses=RESPONSES,
           peak_method: str = "davenport") -> Assessment:
    """Rms and peak responses of a batch of designs.

    Parameters
    ----------
    frequency_hz, modal_mass_kg, damping_ratio : float or array
        The structure's mode: f_s [Hz], M* [kg] (mode shape = 1 at the
        damper), zeta_s [-].
    absorbers : Absorbers
        The absorbers of each design.
    spectrum : ForceSpectrum
        One-sided modal force PSD [N^2/Hz].
    duration_s : float
        Averaging duration T for the peak factor [s].
    shape_factor : float
        Mode-shape value phi(z_eval) at the height where acceleration is
        reported [-] (1 at the damper level).
    warn : bool
        Emit :class:`UpperEdgeWarning` when more than 1% of the
        acceleration's m0 or m2 comes from the top decade of the load's range.
    responses : collection of str
        Which of "displacement", "acceleration", "stroke", "force" to compute
        (the acceleration always is); the engine skips the others and their
        fields are None. Default: all.
    peak_method : str
        How peaks are estimated from the moments (:func:`peak_factor`).

    Returns
    -------
    Assessment
    """
    wanted = frozenset(responses) | {"acceleration"}
    _require_finite(frequency_hz=frequency_hz, modal_mass_kg=modal_mass_kg,
                    damping_ratio=damping_ratio, absorber_mass_kg=absorbers.mass_kg,
                    absorber_frequency_hz=absorbers.frequency_hz,
                    absorber_damping_ratio=absorbers.damping_ratio)
    try:
        r = spectral_response(frequency_hz, modal_mass_kg, damping_ratio, absorbers, spectrum,
                              responses=wanted)
    except np.linalg.LinAlgError as exc:
        raise NumericalFailure(
            f"the response computation failed ({exc}) for structure frequency "
            f"{_span(frequency_hz)} Hz, modal mass {_span(modal_mass_kg)} kg, damping ratio "
            f"{_span(damping_ratio)}, absorber masses {_span(absorbers.mass_kg)} kg") from exc
    g_a, nu_a = peak_factor(r.acceleration, duration_s, peak_method)
    peak_a = g_a * r.acceleration.sigma
    peak_r = _peak(r.stroke, duration_s, peak_method)[0] if r.stroke is not None else None
    peak_f = _peak(r.force, duration_s, peak_method)[0] if r.force is not None else None
    peak_x = (_peak(r.displacement, duration_s, peak_method)[0] if r.displacement is not None
              else None)
    share0, share2 = r.acceleration_top_decade
    if warn and np.any(np.maximum(share0, share2) > TOP_DECADE_WARNING):
        values = {"share_m0": float(np.max(share0)), "share_m2": float(np.max(share2)),
                  "f_max_hz": float(spectrum.f_max_hz)}
        advice = getattr(spectrum, "edge_advice", "")
        if advice:
            # A tail no table settles (advice given): say how much the peak would
            # still move. One more decade of a tail that adds the top decade's m2
            # again multiplies m2 by (1 + share) and nu by sqrt(1 + share).
            with np.errstate(invalid="ignore", divide="ignore"):
                g0 = davenport_peak_factor(nu_a, duration_s)
                g1 = davenport_peak_factor(nu_a * np.sqrt(1.0 + share2), duration_s)
                change = np.nan_to_num(g1 / g0 - 1.0)
            values |= {"advice": advice, "peak_change_per_decade": float(np.max(change))}
        warnings.warn(UpperEdgeWarning(current_load(), values), stacklevel=2)
    return Assessment(
        sigma_displacement_m=r.displacement.sigma if r.displacement is not None else None,
        peak_displacement_m=peak_x,
        sigma_acceleration_m_s2=shape_factor * r.acceleration.sigma,
        peak_acceleration_m_s2=shape_factor * peak_a,
        peak_factor=g_a,
        upcrossing_hz=nu_a,
        sigma_stroke_m=r.stroke.sigma if r.stroke is not None else None,
        peak_stroke_m=peak_r,
        sigma_force_n=r.force.sigma if r.force is not None else None,
        peak_damper_force_n=peak_f,
        top_decade_share_m0=share0,
        top_decade_share_m2=share2,
        peak_factor_held=peak_factor_is_held(nu_a, duration_s),
    )


def _span(values) -> str:
    """'x' or 'x to y' for the values of an array, for messages."""
    v = np.asarray(values, float)
    if v.size == 0:
        return "(none)"
    lo, hi = np.nanmin(v), np.nanmax(v)
    return f"{lo:.6g}" if lo == hi else f"{lo:.6g} to {hi:.6g}"


def _require_finite(**inputs):
    """Raise NonFiniteResult naming the first input of the engine that is NaN or infinite."""
    for name, values in inputs.items():
        v = np.asarray(values, float)
        if not np.all(np.isfinite(v)):
            bad = float(v[~np.isfinite(v)].ravel()[0])
            raise NonFiniteResult(
                f"the response computation was given {name} = {bad!r} (of {v.size} value(s)); "
                "a derived quantity upstream is not finite")


def bare_sigma_acceleration(frequency_hz, modal_mass_kg, damping_ratio, spectrum):
    """Return the rms acceleration [m/s^2] of the bare mode (no absorber) at the damper level.

    Parameters
    ----------
    frequency_hz : float or array
        Natural frequency of the mode [Hz].
    modal_mass_kg : float or array
        Modal mass M* [kg], mode shape = 1 at the damper.
    damping_ratio : float or array
        Damping ratio of the mode [-] (structural plus aerodynamic where the
        caller includes it).
    spectrum : ForceSpectrum
        One-sided modal force PSD [N^2/Hz].

    Returns
    -------
    numpy.ndarray
        sigma_a [m/s^2], broadcast over ``frequency_hz`` and ``damping_ratio``.
    """
    zeta = np.asarray(damping_ratio, float)
    none = Absorbers.none(np.broadcast_shapes(zeta.shape, np.shape(frequency_hz)))
    return spectral_response(frequency_hz, modal_mass_kg, zeta, none, spectrum,
                             responses=("acceleration",)).acceleration.sigma


def effective_damping_ratio(frequency_hz, modal_mass_kg, sigma_acceleration_m_s2, spectrum,
                            *, bracket=EFFECTIVE_DAMPING_BRACKET):
    """Damping ratio at which the bare mode has a given rms acceleration.

    Parameters
    ----------
    frequency_hz, modal_mass_kg : float or array
        The structure's mode [Hz], [kg].
    sigma_acceleration_m_s2 : float or array
        Rms acceleration at the damper level of the damped structure [m/s^2].
    spectrum : ForceSpectrum
        The same load.
    bracket : (float, float)
        Range of damping ratios searched [-].

    Returns
    -------
    array
        zeta_eff [-] such that the bare structure with zeta_eff has the same
        rms acceleration; NaN where no ratio inside ``bracket`` does, with a
        :class:`NoEffectiveDampingWarning` saying why (e.g. a load with
        little energy near the mode's frequency, under which a damper's
        added mass raises the response above the bare mode's at any damping).

    Notes
    -----
    sigma_a of the bare mode decreases monotonically with its damping, so
    the root is bracketed and found elementwise in log(zeta) by Chandrupatla's
    method (``scipy.optimize.elementwise.find_root``).
    """
    target = np.asarray(sigma_acceleration_m_s2, float)
    fs = np.broadcast_to(np.asarray(frequency_hz, float), target.shape)
    mass = np.broadcast_to(np.asarray(modal_mass_kg, float), target.shape)

    def gap(log_zeta, f, m, goal):
        return np.log(bare_sigma_acceleration(f, m, np.exp(log_zeta), spectrum) / goal)

    # Imported here: the bare response of the wind job does not need it, and
    # scipy.optimize costs about 0.6 s of CPU to import (bench/bench_jobs.py).
    from scipy.optimize.elementwise import find_root

    lo, hi = np.log(bracket[0]), np.log(bracket[1])
    with np.errstate(divide="ignore", invalid="ignore"):
        result = find_root(gap, (np.full(target.shape, lo), np.full(target.shape, hi)),
                           args=(fs, mass, target), tolerances={"xatol": 1e-12, "xrtol": 1e-12})
    zeta = np.where(result.success, np.exp(result.x), np.nan)
    if np.any(np.isnan(zeta)):
        _warn_no_effective_damping(fs, mass, target, spectrum, bracket, np.isnan(zeta))
    return zeta


def _warn_no_effective_damping(fs, mass, target, spectrum, bracket, missing):
    """Say why effective damping ratios have no value (once per call)."""
    f, m, goal = fs[missing], mass[missing], target[missing]
    ends = [bare_sigma_acceleration(f, m, np.full(f.shape, z), spectrum) for z in bracket]
    above = goal > ends[0]
    below = goal < ends[1]
    i = int(np.flatnonzero(above | below)[0]) if np.any(above | below) else 0
    reason, end = (1, 0) if above[i] else (2, 1) if below[i] else (0, 0)
    warnings.warn(NoEffectiveDampingWarning(current_load(), {
        "missing": float(missing.sum()), "total": float(missing.size), "reason": float(reason),
        "sigma_m_s2": float(goal[i]), "bare_sigma_m_s2": float(ends[end][i]),
        "damping_ratio": float(bracket[end]), "frequency_hz": float(f[i]),
        "f_min_hz": float(spectrum.f_min_hz), "f_max_hz": float(spectrum.f_max_hz)}),
        stacklevel=3)
