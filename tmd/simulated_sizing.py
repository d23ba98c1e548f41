"""Least mass against the simulated peak: an outer correction loop on the spectral sizing.

Davenport's peak factor assumes independent up-crossings; the maxima of a
narrow-band response come lower, of a two-peaked one sometimes higher
(:mod:`tmd.simulation`). With ``[target] peak_method = "simulated"`` the
damper is sized so that the simulated statistic of the 600 s maxima (their
mean, or a stated fractile) meets the target:

1. size with the spectral (Davenport) peak against the target T;
2. simulate the design; r = simulated statistic / spectral peak;
3. re-size against 0.999 T / r, and repeat from 2 until the mass changes by less
   than 0.5% and the simulated statistic meets T, or after 10 iterations
   (with a warning).

Every iteration simulates the same random phases (common random numbers),
so the loop does not chase sampling noise.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from tmd.design import LoadedMode, Sizing, TmdDesign, bare_response
from tmd.simulation import SimulationSettings, narrowest_half_width_hz, simulate
from tmd.timehistory import StateSpace, resolving_period_s

MASS_RTOL = 0.005
MAX_ITERATIONS = 10
# Each re-sizing aims this fraction below the target, so that the final
# comparison of the simulated statistic with T is not decided by round-off.
AIM_BELOW = 1e-3


class SimulatedPeakWarning(UserWarning):
    """The simulated-peak loop stopped before the mass settled."""


@dataclass(frozen=True)
class CorrectionStep:
    """One pass of the outer loop.

    Parameters
    ----------
    iteration : int
        1, 2, ...
    spectral_target_m_s2 : float
        Target the spectral sizing used [m/s^2].
    mass_ratio : float
        Mass ratio it gave [-] (0 where no damper was needed).
    spectral_peak_m_s2 : float
        Davenport peak of that design [m/s^2].
    simulated_peak_m_s2 : float
        Simulated statistic of its maxima [m/s^2].
    """

    iteration: int
    spectral_target_m_s2: float
    mass_ratio: float
    spectral_peak_m_s2: float
    simulated_peak_m_s2: float

    @property
    def ratio(self) -> float:
        """Simulated over spectral peak [-]."""
        return self.simulated_peak_m_s2 / self.spectral_peak_m_s2


def simulated_peak(load: LoadedMode, design: TmdDesign | None, settings: SimulationSettings,
                   period_s: float, fractile: float | None = None) -> float:
    """Return the simulated statistic of max |a| over T at the evaluation height [m/s^2].

    Parameters
    ----------
    load : LoadedMode
        Mode, load and evaluation height.
    design : TmdDesign or None
        The TMD (None: the bare building).
    settings : SimulationSettings
        Records, duration (the target's T), seed.
    period_s : float
        Force-record period, the same for every design (common random numbers).
    fractile : float, optional
        Use this fractile of the maxima instead of their mean.

    Returns
    -------
    float
    """
    from tmd.dampers.absorber import Absorbers

    m = load.mode
    absorbers = Absorbers.none() if design is None else Absorbers.tuned_masses(
        [design.mass_kg], [design.frequency_hz], [design.damping_ratio])
    sim = simulate(m.frequency_hz, m.modal_mass_kg, m.damping_ratio, absorbers, load.spectrum,
                   settings, shape_factor=load.shape_factor, period_s=period_s)
    maxima = sim.acceleration.maxima_abs
    return float(np.mean(maxima) if fractile is None else np.quantile(maxima, fractile))


def common_period_s(load: LoadedMode, design: TmdDesign | None, duration_s: float) -> float:
    """Return a force-record period that resolves the bare mode and the first design [s].

    Parameters
    ----------
    load : LoadedMode
        Mode and load.
    design : TmdDesign or None
        The first spectral design.
    duration_s : float
        Record duration T [s].

    Returns
    -------
    float
    """
    from tmd.dampers.absorber import Absorbers

    m = load.mode
    widths = [m.damping_ratio * m.frequency_hz]
    if design is not None:
        absorbers = Absorbers.tuned_masses([design.mass_kg], [design.frequency_hz],
                                           [design.damping_ratio])
        widths.append(narrowest_half_width_hz(StateSpace.of(
            m.frequency_hz, m.modal_mass_kg, m.damping_ratio, absorbers)))
    return resolving_period_s(duration_s, min(widths))


def size_for_simulated_peak(load: LoadedMode, target_m_s2: float,
                            size_at: Callable[[float], Sizing], settings: SimulationSettings,
                            *, fractile: float | None = None
                            ) -> tuple[Sizing, list[CorrectionStep]]:
    """Least-mass TMD whose simulated peak statistic meets the target.

    Parameters
    ----------
    load : LoadedMode
        The design load (spectral peaks by Davenport).
    target_m_s2 : float
        Peak acceleration target T [m/s^2].
    size_at : callable
        ``size_at(spectral_target_m_s2) -> Sizing``: the case's spectral
        sizing (least mass, or tuning at a fixed mass) against a target.
    settings : SimulationSettings
        Records and seed (T = the target's duration).
    fractile : float, optional
        Size against this fractile of the maxima instead of their mean.

    Returns
    -------
    sizing : Sizing
        The final design, whose ``peak_acceleration_m_s2`` is the simulated
        statistic and whose verdict compares it with T.
    steps : list of CorrectionStep
        Every pass of the loop.

    Notes
    -----
    The correction is T_k+1 = (1 - 0.001) T / r_k with r_k = simulated /
    spectral peak of the k-th design (0.1% aimed below T so that the last
    comparison is not decided by round-off); it stops when |m_k+1 - m_k| <= 0.005 m_k and the
    simulated statistic meets T, or when the design is held by the stroke or
    mass limit (the mass cannot change), or after 10 passes.
    """
    steps: list[CorrectionStep] = []
    spectral_target = target_m_s2
    sizing = size_at(spectral_target)
    period = common_period_s(load, sizing.design, settings.duration_s)
    while True:
        design = sizing.design
        spectral = (design.peak_acceleration_m_s2 if design is not None
                    else bare_response(load).peak_acceleration_m_s2)
        sim = simulated_peak(load, design, settings, period, fractile)
        mu = design.mass_ratio if design is not None else 0.0
        steps.append(CorrectionStep(len(steps) + 1, spectral_target, mu, spectral, sim))
        meets = sim <= target_m_s2
        settled = len(steps) > 1 and abs(mu - steps[-2].mass_ratio) <= MASS_RTOL * max(
            steps[-2].mass_ratio, 1e-12)
        held = sizing.governed_by in ("stroke", "mass", "fixed mass ratio") and len(steps) > 1
        if (settled and meets) or held:
            break
        if len(steps) == MAX_ITERATIONS:
            warnings.warn(f"the simulated-peak loop stopped after {MAX_ITERATIONS} passes with "
                          f"the mass ratio still changing ({steps[-2].mass_ratio:.6g} -> "
                          f"{mu:.6g})", SimulatedPeakWarning, stacklevel=2)
            break
        spectral_target = spectral_target * target_m_s2 * (1.0 - AIM_BELOW) / sim
        sizing = size_at(spectral_target)
    return _simulated_sizing(sizing, steps[-1], target_m_s2, fractile), steps


def _simulated_sizing(sizing: Sizing, last: CorrectionStep, target_m_s2: float,
                      fractile) -> Sizing:
    """Return the final sizing with its peak and verdict taken from the simulation."""
    meets = last.simulated_peak_m_s2 <= target_m_s2
    statistic = "mean" if fractile is None else f"{100 * fractile:g}% fractile"
    verdict = "meets" if meets else "does not meet"
    design = sizing.design
    if design is not None:
        design = replace(design, peak_acceleration_m_s2=last.simulated_peak_m_s2,
                         peak_factor=last.simulated_peak_m_s2 / design.sigma_acceleration_m_s2,
                         meets_target=meets)
    what = (f"the mass ratio {design.mass_ratio:.6g}" if design is not None
            else "the bare building")
    message = (f"{what} {verdict} the target {target_m_s2:.4g} m/s^2 by the {statistic} of "
               f"simulated maxima, {last.simulated_peak_m_s2:.4g} m/s^2 "
               f"(Davenport: {last.spectral_peak_m_s2:.4g}; {last.iteration} passes)")
    return replace(sizing, design=design, meets_target=meets, message=message)
