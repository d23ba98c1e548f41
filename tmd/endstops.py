"""Extreme winds and end-stops: what happens beyond the stroke limit.

A damper is sized at the serviceability wind, but it must survive the
extreme one. At every reported return period this module checks the peak
stroke against the stroke limit, and gives the numbers an end-stop
specification needs:

* the **travel** to specify (the stroke limit where one is given, else the
  peak stroke at the longest return period);
* the expected number of **stop contacts** per hour and per side, from
  Rice's rate of up-crossings of the stop level by the Gaussian stroke r,

      N_a = 3600 nu_0 exp(-a^2 / (2 sigma_r^2)),  nu_0 = sigma_r' / (2 pi sigma_r);

* the **impact velocity** at the longest return period: at its crossings of
  a level a, a stationary Gaussian process's velocity is Rayleigh
  distributed with scale sigma_r' (independent of a), so its mean is
  sigma_r' sqrt(pi / 2) and the value exceeded at one contact in a hundred
  sigma_r' sqrt(2 ln 100);
* an **estimate** of the force for the connection design:
  g sqrt(k^2 sigma_r^2 + c^2 sigma_r'^2), the spring and dashpot forces
  being uncorrelated at the same instant (E[r r'] = 0 for a stationary
  process), with Davenport's peak factor g of the stroke. The stops' own
  impact force is not in it: it depends on the buffer (for a linear buffer
  of stiffness k_b, F = v sqrt(m_d k_b)).

The stroke statistics come from the linear model, i.e. as if there were no
stops: contacts are counted on the free response, a first estimate that
holds while contacts are rare.

References
----------
Rice, S. O. (1944, 1945). Mathematical analysis of random noise. Bell System
Technical Journal 23, 282-332; 24, 46-156 (rate of level crossings; velocity
at a crossing).
Davenport, A. G. (1964). Note on the distribution of the largest value of a
random function with application to gust loading. Proc. ICE 28(2), 187-196.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode
from tmd.peak import davenport_peak_factor
from tmd.response import spectral_response

TWO_PI = 2.0 * math.pi
RARE_CONTACT_PROBABILITY = 0.01  # the "one contact in a hundred" impact velocity


@dataclass(frozen=True)
class StrokeStatistics:
    """Gaussian statistics of a damper's stroke under one load.

    Parameters
    ----------
    sigma_stroke_m : float
        Rms stroke sigma_r [m].
    sigma_stroke_velocity_m_s : float
        Rms stroke velocity sigma_r' [m/s].
    upcrossing_hz : float
        Mean zero up-crossing rate nu_0 = sigma_r' / (2 pi sigma_r) [Hz].
    peak_factor : float
        Davenport's g at nu_0 over the case's duration [-].
    """

    sigma_stroke_m: float
    sigma_stroke_velocity_m_s: float
    upcrossing_hz: float
    peak_factor: float

    @property
    def peak_stroke_m(self) -> float:
        """Peak stroke relative to the structure, g sigma_r [m]."""
        return self.peak_factor * self.sigma_stroke_m


def stroke_statistics(load: LoadedMode, damper: TunedMassDamper) -> StrokeStatistics:
    """Rms stroke and stroke velocity of a TMD under a load.

    Parameters
    ----------
    load : LoadedMode
        Mode, load spectrum and duration.
    damper : TunedMassDamper
        The TMD by mass ratio, frequency ratio and damping ratio (relative to the mode).

    Returns
    -------
    StrokeStatistics

    Notes
    -----
    sigma_r = sqrt(m0), sigma_r' = 2 pi sqrt(m2), with m_k the stroke's
    spectral moments in Hz (:mod:`tmd.response`).
    """
    m = load.mode
    r = spectral_response(m.frequency_hz, m.modal_mass_kg, m.damping_ratio,
                          damper.absorbers(m), load.spectrum)
    m0 = float(np.asarray(r.stroke.m0).ravel()[0])
    m2 = float(np.asarray(r.stroke.m2).ravel()[0])
    nu = math.sqrt(m2 / m0)
    return StrokeStatistics(math.sqrt(m0), TWO_PI * math.sqrt(m2), nu,
                            float(davenport_peak_factor(nu, load.duration_s)))


def contacts_per_hour(level_m, sigma_m, upcrossing_hz):
    """Return the expected crossings per hour of a level by a Gaussian process, one side (Rice).

    Parameters
    ----------
    level_m : float or array
        The stop level a [m].
    sigma_m : float or array
        Rms of the process [m].
    upcrossing_hz : float or array
        Its mean zero up-crossing rate nu_0 [Hz].

    Returns
    -------
    array
        3600 nu_0 exp(-a^2 / (2 sigma^2)) [1/h].
    """
    a, s = np.asarray(level_m, float), np.asarray(sigma_m, float)
    return 3600.0 * np.asarray(upcrossing_hz, float) * np.exp(-0.5 * (a / s) ** 2)


def mean_impact_velocity_m_s(sigma_velocity_m_s):
    """Mean velocity at the crossings of any level: sigma_v sqrt(pi / 2) (Rayleigh) [m/s].

    Parameters
    ----------
    sigma_velocity_m_s : float or array
        Rms velocity of the process sigma_v [m/s].

    Returns
    -------
    array
        The Rayleigh mean [m/s].
    """
    return np.asarray(sigma_velocity_m_s, float) * math.sqrt(math.pi / 2.0)


def rare_impact_velocity_m_s(sigma_velocity_m_s, probability=RARE_CONTACT_PROBABILITY):
    """Velocity exceeded at a given share of the crossings: sigma_v sqrt(-2 ln p) [m/s].

    Parameters
    ----------
    sigma_velocity_m_s : float or array
        Rms velocity sigma_v [m/s].
    probability : float
        Share p of the contacts faster than the result [-].

    Returns
    -------
    array
        The Rayleigh quantile [m/s].
    """
    return np.asarray(sigma_velocity_m_s, float) * math.sqrt(-2.0 * math.log(probability))


def connection_force_estimate_n(peak_factor, stiffness_n_per_m, damping_n_s_per_m,
                                sigma_stroke_m, sigma_stroke_velocity_m_s):
    """Estimate of the peak spring + dashpot force on the connection [N].

    Parameters
    ----------
    peak_factor : float or array
        g [-].
    stiffness_n_per_m, damping_n_s_per_m : float
        The damper's spring k [N/m] and dashpot c [N s/m].
    sigma_stroke_m, sigma_stroke_velocity_m_s : float or array
        sigma_r [m] and sigma_r' [m/s].

    Returns
    -------
    array
        g sqrt(k^2 sigma_r^2 + c^2 sigma_r'^2) [N].
    """
    return np.asarray(peak_factor) * np.hypot(stiffness_n_per_m * np.asarray(sigma_stroke_m),
                                              damping_n_s_per_m
                                              * np.asarray(sigma_stroke_velocity_m_s))


def end_stop_block(loads: list[tuple[float | None, LoadedMode]], damper: TunedMassDamper,
                   max_stroke_m: float | None) -> dict:
    """Return the ``end_stops`` block of results.json for a TMD design.

    Parameters
    ----------
    loads : list of (return period [years] or None, LoadedMode)
        Every reported load, in increasing return period (one entry with
        None for a case without return periods).
    damper : TunedMassDamper
        The design.
    max_stroke_m : float, optional
        The stroke limit, where the stops sit [m].

    Returns
    -------
    dict
        ``travel_m``, ``travel_basis``, ``extreme_return_period_years``,
        ``impact_velocity_mean_m_s``, ``impact_velocity_rare_m_s``,
        ``impact_velocity_rare_probability``, ``impact_energy_mean_j``,
        ``by_return_period`` (rows with ``return_period_years``,
        ``sigma_stroke_m``, ``sigma_stroke_velocity_m_s``,
        ``stroke_upcrossing_hz``, ``peak_stroke_m``,
        ``contact_rate_per_side_hz`` (stop contacts per second on each side; the
        report and terminal show them per hour), ``connection_force_estimate_n``),
        and ``note``.
    """
    stats = [(period, load, stroke_statistics(load, damper)) for period, load in loads]
    extreme_period, extreme_load, extreme = stats[-1]
    if max_stroke_m is not None:
        travel, basis = float(max_stroke_m), "the stroke limit [damper] max_stroke_m"
    else:
        travel = extreme.peak_stroke_m
        basis = "the peak stroke at the longest return period (no stroke limit given)"
    rows = []
    for period, load, s in stats:
        m = load.mode
        k = damper.stiffness_n_per_m(m)
        c = damper.damping_n_s_per_m(m)
        rows.append({
            "return_period_years": period,
            "sigma_stroke_m": s.sigma_stroke_m,
            "sigma_stroke_velocity_m_s": s.sigma_stroke_velocity_m_s,
            "stroke_upcrossing_hz": s.upcrossing_hz,
            "peak_stroke_m": s.peak_stroke_m,
            "contact_rate_per_side_hz": float(contacts_per_hour(
                travel, s.sigma_stroke_m, s.upcrossing_hz)) / 3600.0,
            "connection_force_estimate_n": float(connection_force_estimate_n(
                s.peak_factor, k, c, s.sigma_stroke_m, s.sigma_stroke_velocity_m_s)),
        })
    v_mean = float(mean_impact_velocity_m_s(extreme.sigma_stroke_velocity_m_s))
    mass = damper.mass_kg(extreme_load.mode)
    return {
        "travel_m": travel, "travel_basis": basis,
        "extreme_return_period_years": extreme_period,
        "impact_velocity_mean_m_s": v_mean,
        "impact_velocity_rare_m_s": float(rare_impact_velocity_m_s(
            extreme.sigma_stroke_velocity_m_s)),
        "impact_velocity_rare_probability": RARE_CONTACT_PROBABILITY,
        "impact_energy_mean_j": 0.5 * mass * v_mean**2,
        "by_return_period": rows,
        "note": END_STOP_NOTE,
    }


END_STOP_NOTE = (
    "End-stop figures are estimates from the linear (stop-free) response: contacts per hour per "
    "side at the travel by Rice's crossing rate 3600 nu_0 exp(-a^2 / (2 sigma^2)); impact "
    "velocity Rayleigh-distributed with scale sigma of the stroke velocity (mean and the value "
    "exceeded at 1 contact in 100) at the longest return period; the connection force "
    "g sqrt(k^2 sigma_r^2 + c^2 sigma_r'^2) is an estimate of the spring and dashpot force and "
    "excludes the stops' impact force, which depends on the buffer (v sqrt(m_d k_buffer) for a "
    "linear buffer). Frequent contacts make these figures unreliable: constrain the stroke at "
    "that return period instead.")


class StrokeLimitWarning(UserWarning):
    """The peak stroke exceeds the stroke limit at some return period."""


def stroke_limit_messages(rows: list[dict], end_stops: dict, max_stroke_m: float,
                          constrained_years: tuple[float, ...],
                          subject: str = "the design") -> list[str]:
    """One warning per return period whose peak stroke exceeds the limit.

    Parameters
    ----------
    rows : list of dict
        ``by_return_period`` rows with ``design.stroke_within_limit``.
    end_stops : dict
        The :func:`end_stop_block` of the same design.
    max_stroke_m : float
        The stroke limit [m].
    constrained_years : tuple of float
        Return periods where the limit is a constraint of the tuning [years].
    subject : str
        Which design the rows describe, in words.

    Returns
    -------
    list of str
    """
    contacts = {r["return_period_years"]: 3600.0 * r["contact_rate_per_side_hz"]
                for r in end_stops["by_return_period"]}
    out = []
    for row in rows:
        d = row.get("design") or {}
        if d.get("stroke_within_limit", True):
            continue
        period = row["return_period_years"]
        hint = ("" if period in constrained_years else
                f"; give [damper] stroke_return_period_years = {period:g} to make the limit a "
                "constraint of the tuning there, or design the end-stops for the figures of "
                "the end-stop table")
        out.append(
            f"{subject}: at the {period:g}-year wind the peak stroke {d['peak_stroke_m']:.3f} m "
            "exceeds "
            f"the stroke limit {max_stroke_m:g} m by "
            f"{100 * (d['peak_stroke_m'] / max_stroke_m - 1):.1f}%: the damper meets its "
            f"end-stops (about {contacts.get(period, float('nan')):.2g} contacts per hour per "
            f"side){hint}")
    return out
