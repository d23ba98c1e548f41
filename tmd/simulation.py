"""Monte Carlo check of a design: simulated records, their maxima against peak formulas.

The spectral route is exact for rms values; its peaks rest on a peak factor
(Davenport's by default), and its liquid dampers on statistical
linearisation. This module simulates the same load case in the time domain
(:mod:`tmd.timehistory`) and reports, per response, the rms with its
sampling interval and the distribution of the maxima of records of the
averaging duration T, beside the Davenport and Vanmarcke estimates from the
spectral moments of the same design.

Conventions: max |x| per record is compared with two-sided (double-barrier)
formulas, max x with one-sided ones; comfort and stroke verdicts use
max |x|. Davenport's formula is the one the rest of the tool uses: g sigma
with g from the response's own up-crossing rate, for max |x| as for max x.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from tmd.dampers.absorber import Absorbers
from tmd.peak import davenport_peak_factor, vanmarcke_peak_factor
from tmd.response import spectral_response
from tmd.timehistory import (
    NonlinearAbsorber,
    StateSpace,
    force_records,
    integrate_linear,
    integrate_nonlinear,
    periodic_steady_state,
    resolving_period_s,
)

# Two-sided 99% point of the standard normal, for the rms sampling interval.
Z99 = 2.5758293035489004
MIN_RECORDS = 10
MIN_PERIODS_PER_RECORD = 10
# Memory bound: states of at most this many samples are held at once.
BLOCK_SAMPLES = 4_000_000
# Halving the integration step may change a nonlinear rms by at most this.
STEP_CHECK_RTOL = 0.01
DEFAULT_TIME_STEP_S = 0.05
# f_s dt at most this: the first-order hold's gain at f_s is then >= 0.9997.
MAX_FREQUENCY_STEP = 0.01


class SimulationInputError(ValueError):
    """Simulation settings that cannot be used; the message names the setting."""


@dataclass(frozen=True)
class SimulationSettings:
    """How many records, how long, how finely, from which seed.

    Parameters
    ----------
    records : int
        Number of records of ``duration_s`` (at least 10).
    duration_s : float
        Length of one record T, the averaging duration of its maximum [s].
    time_step_s : float or None
        Sample step [s]; 1 / (2 dt) must cover the load spectrum's range.
        None chooses it (:meth:`time_step_for`).
    seed : int
        Seed of the random phases (``numpy.random.default_rng``).
    substeps : int
        Integration steps per sample for nonlinear absorbers.
    """

    records: int = 200
    duration_s: float = 600.0
    time_step_s: float | None = None
    seed: int = 1
    substeps: int = 4

    def time_step_for(self, spectrum, structure_frequency_hz: float) -> float:
        """Return the sample step: the one given, or the default for this load and structure.

        Parameters
        ----------
        spectrum : ForceSpectrum
            The load.
        structure_frequency_hz : float
            f_s [Hz].

        Returns
        -------
        float
            dt [s]. The default is the largest of 1 / 20 s, T / 2^k that keeps
            f_s dt <= 0.01 and 1 / (2 dt) >= f_max of the load, where T is the
            record duration.

        Notes
        -----
        A first-order hold passes a force component of frequency f with the
        gain sinc^2(f dt) = (sin(pi f dt) / (pi f dt))^2, 0.9997 at
        f dt = 0.01: the rms near resonance is then low by 0.03%.
        """
        if self.time_step_s is not None:
            return self.time_step_s
        dt = DEFAULT_TIME_STEP_S
        f_max = spectrum.f_max_hz if math.isfinite(spectrum.f_max_hz) else 0.0
        while structure_frequency_hz * dt > MAX_FREQUENCY_STEP or 2.0 * f_max * dt > 1 + 1e-12:
            dt /= 2.0
        return dt

    def check(self, spectrum, structure_frequency_hz: float) -> None:
        """Refuse settings that cannot give a meaningful simulation.

        Parameters
        ----------
        spectrum : ForceSpectrum
            The load (its ``f_max_hz`` is compared with the Nyquist frequency).
        structure_frequency_hz : float
            f_s [Hz], for the shortest useful record.

        Raises
        ------
        SimulationInputError
            Naming the setting, its value and what is allowed.
        """
        if not (isinstance(self.records, int) and self.records >= MIN_RECORDS):
            raise SimulationInputError(f"records = {self.records!r}: at least {MIN_RECORDS} "
                                       "records are needed for maxima statistics")
        shortest = MIN_PERIODS_PER_RECORD / structure_frequency_hz
        if not (math.isfinite(self.duration_s) and self.duration_s >= shortest):
            raise SimulationInputError(
                f"duration_s = {self.duration_s!r}: a record must span at least "
                f"{MIN_PERIODS_PER_RECORD} periods of the structure, {shortest:.4g} s")
        dt = self.time_step_for(spectrum, structure_frequency_hz)
        if not (math.isfinite(dt) and dt > 0):
            raise SimulationInputError(f"time_step_s = {dt!r}: must be > 0")
        nyquist = 0.5 / dt
        if math.isfinite(spectrum.f_max_hz) and spectrum.f_max_hz > nyquist * (1 + 1e-12):
            raise SimulationInputError(
                f"time_step_s = {dt:g}: its Nyquist frequency {nyquist:g} Hz "
                f"lies below the load spectrum's upper frequency {spectrum.f_max_hz:g} Hz, "
                f"which would alias; use at most {0.5 / spectrum.f_max_hz:g} s")
        steps = round(self.duration_s / dt)
        if abs(steps * dt - self.duration_s) > 1e-9 * self.duration_s:
            raise SimulationInputError(f"duration_s = {self.duration_s:g} must be a whole "
                                       f"number of time_step_s = {dt:g}")
        if not (isinstance(self.substeps, int) and self.substeps >= 1):
            raise SimulationInputError(f"substeps = {self.substeps!r}: must be an integer >= 1")


@dataclass(frozen=True)
class ResponseStatistics:
    """Simulated and spectral statistics of one response [its unit].

    Parameters
    ----------
    sigma : float
        Rms over all records.
    sigma_ci99 : tuple of float
        99% sampling interval of the rms, from the spread of the records'
        mean squares (normal approximation over records).
    maxima_abs, maxima : array
        max |x| and max x of each record.
    sigma_spectral : float
        sqrt(m0) from the spectral engine for the same design and load.
    davenport_peak : float
        g sigma with Davenport's g from nu = sqrt(m2 / m0).
    vanmarcke_peak_two_sided, vanmarcke_peak_one_sided : float
        Vanmarcke's mean maximum of |x| and of x.
    upcrossing_hz : float
        nu = sqrt(m2 / m0) from the spectral moments [Hz].
    bandwidth : float
        Vanmarcke's q = sqrt(1 - m1^2 / (m0 m2)) [-].
    """

    sigma: float
    sigma_ci99: tuple[float, float]
    maxima_abs: np.ndarray = field(repr=False)
    maxima: np.ndarray = field(repr=False)
    sigma_spectral: float
    davenport_peak: float
    vanmarcke_peak_two_sided: float
    vanmarcke_peak_one_sided: float
    upcrossing_hz: float
    bandwidth: float

    def summary(self, unit_suffix: str, limit: float | None = None) -> dict:
        """Return the results.json block of this response.

        Parameters
        ----------
        unit_suffix : str
            SI suffix of the response's keys (``m_s2``, ``m``, ``n``).
        limit : float, optional
            A limit on max |x| (target or stroke limit), for the fraction of
            records over it.

        Returns
        -------
        dict
        """
        s = unit_suffix
        a, m = self.maxima_abs, self.maxima
        block = {
            f"sigma_{s}": self.sigma,
            f"sigma_ci99_low_{s}": self.sigma_ci99[0],
            f"sigma_ci99_high_{s}": self.sigma_ci99[1],
            f"sigma_spectral_{s}": self.sigma_spectral,
            f"max_abs_mean_{s}": float(a.mean()),
            f"max_abs_median_{s}": float(np.median(a)),
            f"max_abs_p05_{s}": float(np.quantile(a, 0.05)),
            f"max_abs_p95_{s}": float(np.quantile(a, 0.95)),
            f"max_mean_{s}": float(m.mean()),
            f"davenport_peak_{s}": self.davenport_peak,
            f"vanmarcke_peak_two_sided_{s}": self.vanmarcke_peak_two_sided,
            f"vanmarcke_peak_one_sided_{s}": self.vanmarcke_peak_one_sided,
            "upcrossing_hz": self.upcrossing_hz,
            "bandwidth": self.bandwidth,
            "max_abs_mean_to_davenport_ratio": float(a.mean()) / self.davenport_peak,
            "max_abs_mean_to_vanmarcke_ratio": float(a.mean()) / self.vanmarcke_peak_two_sided,
        }
        if limit is not None:
            block[f"limit_{s}"] = limit
            block["records_over_limit_fraction"] = float(np.mean(a > limit))
        return block


@dataclass(frozen=True)
class Simulation:
    """Outcome of :func:`simulate` for one design under one load.

    Parameters
    ----------
    settings : SimulationSettings
        What was simulated.
    acceleration, displacement, stroke, force : ResponseStatistics
        Acceleration at the evaluation height [m/s^2]; the structure's
        displacement at the damper level [m]; the first absorber's
        stroke [m] (None for the bare structure); the force the absorbers put
        on the structure [N] (None for the bare structure).
    period_s : float
        Period of the force records; records are consecutive windows of it.
    time_step_s : float
        Sample step used [s].
    stop_contacts_per_hour : float or None
        Mean number of entries into an end-stop per hour (both sides).
    records_with_stop_contact : float or None
        Share of records with at least one contact.
    step_check_change : float or None
        Relative change of the stroke rms when the nonlinear step is halved.
    history : dict
        One record's time history (``time_s``, ``force_n``,
        ``acceleration_m_s2``, ``stroke_m``, ``damper_force_n``).
    """

    settings: SimulationSettings
    acceleration: ResponseStatistics
    displacement: ResponseStatistics
    stroke: ResponseStatistics | None
    force: ResponseStatistics | None
    period_s: float
    time_step_s: float
    stop_contacts_per_hour: float | None
    records_with_stop_contact: float | None
    step_check_change: float | None
    history: dict = field(repr=False)


def simulate(frequency_hz: float, modal_mass_kg: float, damping_ratio: float,
             absorbers: Absorbers, spectrum, settings: SimulationSettings, *,
             shape_factor: float = 1.0, nonlinear: NonlinearAbsorber | None = None,
             linear_damping_ratio: np.ndarray | None = None,
             period_s: float | None = None) -> Simulation:
    """Simulate seeded records of one design under one modal force spectrum.

    Parameters
    ----------
    frequency_hz, modal_mass_kg, damping_ratio : float
        The structure's mode: f_s [Hz], M* [kg] (mode shape = 1 at the
        damper), zeta_s [-] (aerodynamic damping included where it applies).
    absorbers : Absorbers
        One design (batch shape ()), or no absorber.
    spectrum : ForceSpectrum
        One-sided modal force PSD [N^2/Hz].
    settings : SimulationSettings
        Records, duration, step, seed.
    shape_factor : float
        phi(z_eval): acceleration is reported at the evaluation height [-].
    nonlinear : NonlinearAbsorber, optional
        Head loss or end-stops; then ``absorbers`` holds the equivalent linear
        absorbers (for the spectral figures and the starting state) and
        ``linear_damping_ratio`` the linear damping kept in the integration.
    linear_damping_ratio : array, optional
        Absorber damping ratios of the integrated system (0 for a liquid
        column whose damping is all head loss); defaults to those of
        ``absorbers``.
    period_s : float, optional
        Period of the force records, a whole number (>= 4) of records [s];
        given, the same seed gives the same force records for any design
        (common random numbers); default: :func:`resolving_period_s`.

    Returns
    -------
    Simulation

    Notes
    -----
    The force records are periodic with period T_p = n T, n chosen so that
    the record's lines resolve the narrowest closed-loop resonance
    (:func:`tmd.timehistory.resolving_period_s`); each is integrated from its
    periodic steady state (:func:`tmd.timehistory.periodic_steady_state`, of
    the equivalent linear system where there is a nonlinear element) and cut
    into n records of T. Consecutive windows of one stationary history are
    samples of the same process; their maxima are nearly independent once T
    is long against the response's correlation time 1 / (2 pi zeta f).
    """
    settings.check(spectrum, frequency_hz)
    dt = settings.time_step_for(spectrum, frequency_hz)
    linear = StateSpace.of(frequency_hz, modal_mass_kg, damping_ratio, absorbers)
    integrated = linear
    if nonlinear is not None:
        zeta = absorbers.damping_ratio if linear_damping_ratio is None else linear_damping_ratio
        integrated = StateSpace.of(frequency_hz, modal_mass_kg, damping_ratio, Absorbers(
            absorbers.mass_kg, absorbers.frequency_hz, np.asarray(zeta, float),
            absorbers.coupling))
    moments = spectral_response(frequency_hz, modal_mass_kg, damping_ratio, absorbers, spectrum)
    period = period_s if period_s is not None else resolving_period_s(
        settings.duration_s, narrowest_half_width_hz(linear))
    per_period = int(round(period / settings.duration_s))
    n_periods = -(-settings.records // per_period)
    samples = int(round(period / dt))
    per_record = samples // per_period
    block = max(1, BLOCK_SAMPLES // (samples * linear.size))
    rng = np.random.default_rng(settings.seed)
    has_absorber = absorbers.count > 0
    ms = {"acceleration": [], "displacement": [], "stroke": [], "force": []}
    mx = {k: [] for k in ms}
    mxa = {k: [] for k in ms}
    contacts, touched, history, step_change = [], [], None, None
    for start in range(0, n_periods, block):
        count = min(block, n_periods - start)
        force = force_records(spectrum, period_s=period, time_step_s=dt,
                              n_periods=count, rng=rng)
        x0 = periodic_steady_state(linear, force, dt)
        if nonlinear is None:
            states = integrate_linear(linear, force, dt, x0)
            out = linear.outputs(states, force)
        elif not np.any(nonlinear.head_loss_per_m):
            # End-stops alone: the linear history is exact until the stroke
            # first reaches a stop, so only the periods that reach one are
            # integrated again with the nonlinear scheme.
            states = integrate_linear(linear, force, dt, x0)
            touched_periods = np.any(np.abs(states[:, :, 1:linear.n_absorbers + 1])
                                     > nonlinear.stop_travel_m, axis=(1, 2))
            rates = states @ linear.a.T + force[..., None] * linear.b
            if touched_periods.any():
                redo = np.flatnonzero(touched_periods)
                states[redo], rates[redo] = integrate_nonlinear(
                    integrated, nonlinear, force[redo], dt, x0[redo], substeps=settings.substeps)
                if step_change is None:
                    k = redo[:1]
                    step_change = _step_check(integrated, nonlinear, force[k, :per_record + 1],
                                              dt, settings.substeps, x0[k],
                                              states[k, :per_record + 1, 1])
            out = integrated.outputs(states, force, state_rate=rates)
        else:
            states, rates = integrate_nonlinear(integrated, nonlinear, force,
                                                dt, x0,
                                                substeps=settings.substeps)
            out = integrated.outputs(states, force, state_rate=rates)
            if step_change is None:
                # Step check on the first record only: the step that serves it
                # serves the others, which share the load and the absorber.
                step_change = _step_check(integrated, nonlinear, force[:1, :per_record + 1], dt,
                                          settings.substeps, x0[:1],
                                          out["stroke"][:1, :per_record + 1, 0])
        responses = {"acceleration": shape_factor * out["acceleration"],
                     "displacement": out["displacement"]}
        if has_absorber:
            responses["stroke"] = out["stroke"][..., 0]
            responses["force"] = out["force"]
        if history is None:
            history = _history(force[0, :per_record + 1], responses, dt)
        for name, series in responses.items():
            windows = series[:, :per_period * per_record].reshape(count * per_period, per_record)
            ms[name].append(np.mean(windows**2, axis=-1))
            mx[name].append(windows.max(axis=-1))
            mxa[name].append(np.abs(windows).max(axis=-1))
        if nonlinear is not None and np.isfinite(nonlinear.stop_travel_m[0]):
            stroke = out["stroke"][..., 0][:, :per_period * per_record]
            inside = (np.abs(stroke) <= nonlinear.stop_travel_m[0]).reshape(
                count * per_period, per_record)
            entries = np.sum(inside[:, :-1] & ~inside[:, 1:], axis=-1)
            contacts.append(entries)
            touched.append(~inside.all(axis=-1))
    keep = slice(0, settings.records)
    spectral = {"acceleration": moments.acceleration, "displacement": moments.displacement}
    if has_absorber:
        spectral |= {"stroke": _first(moments.stroke), "force": moments.force}
    stats = {}
    for name, mom in spectral.items():
        scale = shape_factor if name == "acceleration" else 1.0
        sigma_spectral = scale * float(np.sqrt(mom.m0))
        nu = float(np.sqrt(mom.m2 / mom.m0))
        q = float(np.sqrt(max(0.0, 1.0 - float(mom.m1) ** 2 / float(mom.m0 * mom.m2))))
        t = settings.duration_s
        stats[name] = ResponseStatistics(
            *_rms_interval(np.concatenate(ms[name])[keep]),
            maxima_abs=np.concatenate(mxa[name])[keep],
            maxima=np.concatenate(mx[name])[keep],
            sigma_spectral=sigma_spectral,
            davenport_peak=float(davenport_peak_factor(nu, t)) * sigma_spectral,
            vanmarcke_peak_two_sided=float(vanmarcke_peak_factor(nu, q, t)) * sigma_spectral,
            vanmarcke_peak_one_sided=float(vanmarcke_peak_factor(nu, q, t, two_sided=False))
            * sigma_spectral,
            upcrossing_hz=nu, bandwidth=q)
    per_hour = rec_touch = None
    if contacts:
        c = np.concatenate(contacts)[keep]
        per_hour = float(c.mean() * 3600.0 / settings.duration_s)
        rec_touch = float(np.concatenate(touched)[keep].mean())
    return Simulation(settings, stats["acceleration"], stats["displacement"], stats.get("stroke"),
                      stats.get("force"), period, dt, per_hour, rec_touch, step_change, history)


def _first(moments):
    return type(moments)(moments.m0[..., 0], moments.m2[..., 0], moments.m1[..., 0])


def _rms_interval(mean_squares: np.ndarray):
    mean = float(mean_squares.mean())
    half = Z99 * float(mean_squares.std(ddof=1)) / math.sqrt(mean_squares.size)
    return math.sqrt(mean), (math.sqrt(max(mean - half, 0.0)), math.sqrt(mean + half))


def narrowest_half_width_hz(system: StateSpace) -> float:
    """Smallest half-power half-width |Re p| / (2 pi) of the system's oscillating poles [Hz].

    Parameters
    ----------
    system : StateSpace
        The linear system.

    Returns
    -------
    float
        zeta f of the most lightly damped resonance [Hz].
    """
    poles = np.linalg.eigvals(system.a)
    oscillating = poles[poles.imag > 0]
    return float(np.min(np.abs(oscillating.real))) / (2.0 * np.pi)


def _step_check(system, nonlinear, force, dt, substeps, x0, stroke):
    halved = integrate_nonlinear(system, nonlinear, force, dt, x0,
                                 substeps=2 * substeps)[0][..., 1]
    return float(abs(np.std(halved) / np.std(stroke) - 1.0))


def _history(force, responses, time_step_s):
    n = force.size
    record = {"time_s": np.arange(n) * time_step_s, "force_n": force,
              "acceleration_m_s2": responses["acceleration"][0, :n]}
    if "stroke" in responses:
        record["stroke_m"] = responses["stroke"][0, :n]
        record["damper_force_n"] = responses["force"][0, :n]
    return record
