"""Sizing a single translational TMD under the actual modal force spectrum.

Two jobs:

* :func:`tune` - at a fixed mass ratio, the frequency ratio and damping ratio
  that minimise the peak (or rms) acceleration or displacement, optionally
  with the peak stroke held to a limit as a constraint of the tuning;
* :func:`least_mass` - the smallest mass ratio whose best tuning meets a
  peak-acceleration target, with the stroke limit inside the tuning.

The tuning starts from Warburton's (1982) closed form and is refined with
SLSQP (``scipy.optimize.minimize``) in (f_d/f_s, ln zeta_d); gradients come
from central differences evaluated as one batch of designs. The mass search
is Brent's method (``scipy.optimize.brentq``) on best_peak(mu) / target - 1.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.dampers.absorber import Absorbers, single_tmd
from tmd.dampers.tuned_mass import TunedMassDamper, warburton_white_force_tuning
from tmd.defaults import DURATION_S
from tmd.errors import BracketError, NumericalFailure
from tmd.performance import assess, effective_damping_ratio
from tmd.registry import OBJECTIVES, STATISTICS
from tmd.rules import Duration, InputError, Positive, Ratio, require
from tmd.schema import BareResponse, TmdDesign
from tmd.spectra import ForceSpectrum
from tmd.structure import Mode
from tmd.verdict import meets_target

FREQUENCY_RATIO_BOUNDS = (0.5, 1.5)
DAMPING_RATIO_BOUNDS = (1e-3, 0.6)
_STEP = 1e-6  # central-difference step in (f_d/f_s, ln zeta_d)
# The tunings hold the stroke this far (relative) inside its limit, so that the
# verdict peak <= limit holds outright rather than to the optimiser's rounding (an
# active limit gave 1.2000000000000002 m against 1.2 m, flagged as exceeded).
STROKE_MARGIN = 1e-7


class DesignError(NumericalFailure):
    """The optimiser failed numerically (maps to exit code 1)."""


@dataclass(frozen=True)
class LoadedMode:
    """One mode under one load, with the reporting conventions (a "loaded mode").

    Not to be confused with :class:`tmd.case.Case`, the validated case file:
    :func:`tmd.jobs.loaded_mode_of` gives a case's loaded mode.

    Parameters
    ----------
    mode : Mode
        The structure's mode (mode shape = 1 at the damper).
    spectrum : ForceSpectrum
        One-sided modal force PSD [N^2/Hz].
    duration_s : float
        Averaging duration T for peak factors [s].
    shape_factor : float
        phi(z_eval), the mode shape where acceleration is judged [-].
    peak_method : str
        ``"davenport"`` or ``"vanmarcke"`` (:func:`tmd.performance.peak_factor`).
    aerodynamic_damping_ratio : float
        The part of ``mode.damping_ratio`` that is aerodynamic [-] (at the
        nominal frequency); it scales as 1/s over a detuning band.
    """

    mode: Mode
    spectrum: ForceSpectrum
    duration_s: float = DURATION_S
    shape_factor: float = 1.0
    peak_method: str = "davenport"
    aerodynamic_damping_ratio: float = 0.0

    def structure_damping_ratio(self, frequency_factor):
        """Return the structure damping ratio with the frequency scaled by s [-].

        Parameters
        ----------
        frequency_factor : float or array
            s = f_s' / f_s [-], > 0.

        Returns
        -------
        array
            zeta_s(s) = (zeta_s - zeta_aero) + zeta_aero / s.

        Notes
        -----
        The structure keeps M* and its structural damping ratio as s moves;
        the aerodynamic damping ratio is inversely proportional to the
        natural frequency, as in EN 1991-1-4 (F.18),
        delta_a = c_f rho b v_m / (2 n_1 m_e). Every detuning band of every
        job (sweeps, band maxima, robust and probabilistic designs, option
        comparison) uses this one definition.

        References
        ----------
        EN 1991-1-4:2005, Annex F.5, expression (F.18).
        """
        s = np.asarray(frequency_factor, float)
        aero, zeta = self.aerodynamic_damping_ratio, self.mode.damping_ratio
        # s = 1 is the nominal mode itself, to the last bit.
        return np.where(s == 1.0, zeta, zeta - aero + aero / s)

    def __post_init__(self):
        # The case file's rules and messages (tmd.rules).
        if not isinstance(self.mode, Mode):
            raise InputError(f"mode = {self.mode!r}: must be a tmd.structure.Mode")
        if not isinstance(self.spectrum, ForceSpectrum):
            raise InputError(f"spectrum = {self.spectrum!r}: must be a force spectrum "
                             "(callable with f_min_hz, f_max_hz and breakpoints_hz)")
        object.__setattr__(self, "duration_s", require("duration_s", self.duration_s, Duration))
        object.__setattr__(self, "shape_factor",
                           require("shape_factor", self.shape_factor, Positive))

    def assess(self, absorbers, **kw):
        """Return the responses of a batch of designs on this mode and load.

        Parameters
        ----------
        absorbers : Absorbers
            The absorbers of each design (:mod:`tmd.dampers.absorber`).
        **kw
            Further keywords of :func:`tmd.performance.assess` (``warn``,
            ``responses``).

        Returns
        -------
        Assessment
            Rms and peak responses, accelerations at the evaluation height.
        """
        m = self.mode
        return assess(m.frequency_hz, m.modal_mass_kg, m.damping_ratio, absorbers,
                      self.spectrum, self.duration_s, shape_factor=self.shape_factor,
                      peak_method=self.peak_method, **kw)


@dataclass(frozen=True)
class Tuning:
    """Best tuning of a TMD of given mass ratio (outcome of :func:`tune`).

    Parameters
    ----------
    frequency_ratio : float
        f_d / f_s [-] at the optimum.
    damping_ratio : float
        zeta_d [-] at the optimum, referred to the damper's own frequency.
    value : float
        The objective at the optimum: peak or rms acceleration [m/s^2] or
        displacement [m], as asked.
    peak_stroke_m : float
        Peak stroke of the damper relative to the structure at the optimum [m].
    stroke_limited : bool
        True when the stroke limit is active at the optimum.
    """

    frequency_ratio: float
    damping_ratio: float
    value: float  # the objective at the optimum [m/s^2 or m]
    peak_stroke_m: float
    stroke_limited: bool


@dataclass(frozen=True)
class Sizing:
    """Outcome of the least-mass search.

    ``governed_by`` is "target" (the least mass meets the target exactly),
    "stroke" (the stroke limit decides the least mass or the best reachable),
    "mass" (even max_mass_ratio cannot reach the target), "minimum" (the
    smallest mass ratio searched already meets the target) or "bare" (the
    bare building meets the target, no damper needed). ``meets_target`` is
    the design's own verdict (:func:`tmd.verdict.meets_target` on its peak).

    Parameters
    ----------
    design : TmdDesign or None
        The least-mass design, or the best reachable; None when no damper is
        needed ("bare").
    meets_target : bool
        Whether that design's peak acceleration meets the target.
    governed_by : str
        What decided the mass: "target", "stroke", "mass", "minimum" or "bare".
    message : str
        The outcome in one plain sentence.
    """

    design: TmdDesign | None
    meets_target: bool
    governed_by: str
    message: str


def bare_response(loaded: LoadedMode) -> BareResponse:
    """Return the responses of the building without a damper.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its load, with the reporting conventions.

    Returns
    -------
    BareResponse
        Rms and peak acceleration at the evaluation height [m/s^2], peak
        factor [-], up-crossing rate [Hz] and rms displacement [m].
    """
    a = loaded.assess(Absorbers.none())
    return BareResponse(float(a.sigma_acceleration_m_s2), float(a.peak_acceleration_m_s2),
                        float(a.peak_factor), float(a.upcrossing_hz),
                        float(a.sigma_displacement_m))


def evaluate_tmd(loaded: LoadedMode, damper: TunedMassDamper,
                 target_peak_m_s2: float | None = None) -> TmdDesign:
    """Return every response of one given TMD (e.g. a proposed or as-built damper).

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its load, with the reporting conventions.
    damper : TunedMassDamper
        The TMD by mass ratio, frequency ratio and damping ratio.
    target_peak_m_s2 : float, optional
        Peak acceleration target at the evaluation height [m/s^2]; without it
        ``meets_target`` is None.

    Returns
    -------
    TmdDesign
        The damper's absolute properties and the responses, with the effective
        damping ratio of the bare mode that gives the same rms acceleration.
    """
    m = loaded.mode
    a = loaded.assess(damper.absorbers(m), warn=True)
    modal_sigma = float(a.sigma_acceleration_m_s2) / loaded.shape_factor
    zeta_eff = float(effective_damping_ratio(m.frequency_hz, m.modal_mass_kg, modal_sigma,
                                             loaded.spectrum))
    peak = float(a.peak_acceleration_m_s2)
    return TmdDesign(
        mass_ratio=damper.mass_ratio, mass_kg=damper.mass_kg(m),
        frequency_ratio=damper.frequency_ratio, frequency_hz=damper.frequency_hz(m),
        damping_ratio=damper.damping_ratio, stiffness_n_per_m=damper.stiffness_n_per_m(m),
        damping_n_s_per_m=damper.damping_n_s_per_m(m),
        sigma_acceleration_m_s2=float(a.sigma_acceleration_m_s2), peak_acceleration_m_s2=peak,
        peak_factor=float(a.peak_factor), sigma_stroke_m=float(a.sigma_stroke_m[0]),
        peak_stroke_m=float(a.peak_stroke_m[0]), peak_damper_force_n=float(a.peak_damper_force_n),
        sigma_displacement_m=float(a.sigma_displacement_m), effective_damping_ratio=zeta_eff,
        added_damping_ratio=zeta_eff - m.damping_ratio,
        meets_target=None if target_peak_m_s2 is None else meets_target(peak, target_peak_m_s2),
    )


def central_difference_points(x):
    """Return x and x +/- the step along each axis: the designs of one batched gradient.

    Parameters
    ----------
    x : array of shape (n,)
        The design variables, here (f_d/f_s, ln zeta_d) [-].

    Returns
    -------
    numpy.ndarray of shape (2 n + 1, n)
        x, then x + h e_i for each axis, then x - h e_i, h = 1e-6.
    """
    x = np.asarray(x, float)
    return np.vstack([x, x + _STEP * np.eye(x.size), x - _STEP * np.eye(x.size)])


def central_difference_gradient(values):
    """Return the gradient from values at :func:`central_difference_points` (along axis 0).

    Parameters
    ----------
    values : numpy.ndarray
        The function at the 2 n + 1 points, in their order [unit of the function].

    Returns
    -------
    numpy.ndarray
        (f(x + h e_i) - f(x - h e_i)) / (2 h) for each axis i [unit per unit of x].

    Notes
    -----
    Central differences, error O(h^2); common practice.
    """
    n = (len(values) - 1) // 2
    return (values[1:n + 1] - values[n + 1:]) / (2 * _STEP)


class _TuningProblem:
    """Objective and stroke constraint with batched central-difference gradients."""

    def __init__(self, loaded, mass_ratio, objective, statistic, max_stroke_m, stroke_loads=()):
        if objective not in OBJECTIVES:
            raise ValueError(f"objective must be one of {OBJECTIVES}, got {objective!r}")
        if statistic not in STATISTICS:
            raise ValueError(f"statistic must be one of {STATISTICS}, got {statistic!r}")
        self.loaded, self.mu = loaded, mass_ratio
        self.objective, self.statistic, self.max_stroke = objective, statistic, max_stroke_m
        self.stroke_loads = tuple(stroke_loads)  # further loads the stroke limit applies to
        self._x = None

    def _measure(self, a):
        peak = self.statistic == "peak"
        if self.objective == "acceleration":
            return a.peak_acceleration_m_s2 if peak else a.sigma_acceleration_m_s2
        return a.peak_displacement_m if peak else a.sigma_displacement_m

    def evaluate(self, x):
        x = np.asarray(x, float)
        if self._x is not None and np.array_equal(x, self._x):
            return
        pts = central_difference_points(x)
        m = self.loaded.mode
        absorbers = single_tmd(m.frequency_hz, m.modal_mass_kg, self.mu, pts[:, 0],
                               np.exp(pts[:, 1]))
        a = self.loaded.assess(absorbers, responses=("acceleration", "stroke", self.objective))
        value = np.log(self._measure(a))
        # One row per load the limit applies to: the design load, then the others.
        strokes = np.vstack([a.peak_stroke_m[:, 0]] + [
            other.assess(absorbers, responses=("stroke",)).peak_stroke_m[:, 0]
            for other in self.stroke_loads])
        self._x = x.copy()  # the optimiser may reuse and mutate its array
        self.value, self.strokes = value[0], strokes[:, 0]
        self.stroke = float(np.max(self.strokes))
        self.grad = central_difference_gradient(value)
        self.stroke_grad = central_difference_gradient(strokes.T).T

    def fun(self, x):
        self.evaluate(x)
        return self.value

    def jac(self, x):
        self.evaluate(x)
        return self.grad

    def constraint(self, x):
        self.evaluate(x)
        return 1.0 - self.strokes / (self.max_stroke * (1.0 - STROKE_MARGIN))

    def constraint_jac(self, x):
        self.evaluate(x)
        return -self.stroke_grad / (self.max_stroke * (1.0 - STROKE_MARGIN))


def _check_sizing_arguments(*, target_peak_m_s2=None, max_mass_ratio=None, max_stroke_m=None):
    """Check the sizing arguments that are given by the case file's rules (tmd.rules)."""
    if target_peak_m_s2 is not None:
        require("peak_acceleration_m_s2", target_peak_m_s2, Positive)
    if max_mass_ratio is not None:
        require("max_mass_ratio", max_mass_ratio, Ratio)
    if max_stroke_m is not None:
        require("max_stroke_m", max_stroke_m, Positive)


def tune(loaded: LoadedMode, mass_ratio: float, *, objective: str = "acceleration",
         statistic: str = "peak", max_stroke_m: float | None = None,
         stroke_loads: tuple[LoadedMode, ...] = (),
         start: tuple[float, float] | None = None) -> Tuning:
    """Return the best frequency and damping ratio of a TMD of given mass ratio.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    mass_ratio : float
        mu = m_d / M* [-].
    objective : {"acceleration", "displacement"}
        The structure response to minimise.
    statistic : {"peak", "rms"}
        Minimise the peak (g sigma, the default) or the rms value.
    max_stroke_m : float, optional
        Upper limit on the peak stroke [m], a constraint of the tuning.
    stroke_loads : tuple of LoadedMode
        Further loads (e.g. a longer return period's wind) under which the
        peak stroke must also stay within ``max_stroke_m``.
    start : (float, float), optional
        (f_d / f_s [-], zeta_d [-]) to start the optimiser from instead of
        Warburton's (1982) white-force optimum.

    Returns
    -------
    Tuning

    Raises
    ------
    DesignError
        If SLSQP fails from every start.
    """
    require("mass_ratio", mass_ratio, Ratio)
    _check_sizing_arguments(max_stroke_m=max_stroke_m)
    if objective not in OBJECTIVES:
        raise InputError(f"objective = {objective!r}: must be one of {OBJECTIVES}")
    problem = _TuningProblem(loaded, mass_ratio, objective, statistic, max_stroke_m,
                             stroke_loads if max_stroke_m is not None else ())
    ratio0, zeta0 = (warburton_white_force_tuning(mass_ratio) if start is None
                     else (float(start[0]), float(start[1])))
    zeta0 = float(np.clip(zeta0, *DAMPING_RATIO_BOUNDS))
    bounds = [FREQUENCY_RATIO_BOUNDS, tuple(np.log(DAMPING_RATIO_BOUNDS))]
    constraints = []
    starts = [(ratio0, math.log(zeta0))]
    if max_stroke_m is not None:
        constraints = [{"type": "ineq", "fun": problem.constraint, "jac": problem.constraint_jac}]
        starts.append((ratio0, math.log(min(3 * zeta0, 0.3))))
    # Imported here: the wind job uses this module's bare response only, and
    # scipy.optimize costs about 0.6 s of CPU to import (bench/bench_jobs.py).
    from scipy.optimize import minimize

    best = None
    for start in starts:
        res = minimize(problem.fun, np.array(start), jac=problem.jac, method="SLSQP",
                       bounds=bounds, constraints=constraints,
                       options={"ftol": 1e-13, "maxiter": 200})
        problem.evaluate(res.x)
        feasible = max_stroke_m is None or problem.stroke <= max_stroke_m * (1 + 1e-6)
        if not np.isfinite(problem.value):
            continue
        candidate = (not feasible, problem.value, res.x, problem.stroke)
        if best is None or candidate[:2] < best[:2]:
            best = candidate
    if best is None:
        raise DesignError(f"the tuning optimiser failed at mass ratio {mass_ratio:g}")
    infeasible, value, x, stroke = best
    limited = max_stroke_m is not None and stroke >= max_stroke_m * (1 - 1e-4)
    if infeasible:
        value = np.inf
    return Tuning(float(x[0]), float(math.exp(x[1])), float(math.exp(value)), float(stroke),
                  bool(limited))


def least_mass(loaded: LoadedMode, target_peak_m_s2: float, *, max_mass_ratio: float,
               max_stroke_m: float | None = None, min_mass_ratio: float = 1e-4,
               stroke_loads: tuple[LoadedMode, ...] = ()) -> Sizing:
    """Return the smallest mass ratio whose best tuning meets the peak-acceleration target.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    max_mass_ratio : float
        Largest mass ratio considered [-].
    max_stroke_m : float, optional
        Peak stroke limit [m], a constraint inside every tuning.
    min_mass_ratio : float
        Lower end of the mass search [-].
    stroke_loads : tuple of LoadedMode
        Further loads under which the stroke limit also applies (see :func:`tune`).

    Returns
    -------
    Sizing
        At a "target"-governed answer |peak / target - 1| < 1e-4.
    """
    _check_sizing_arguments(target_peak_m_s2=target_peak_m_s2, max_mass_ratio=max_mass_ratio,
                            max_stroke_m=max_stroke_m)
    bare = bare_response(loaded)
    if meets_target(bare.peak_acceleration_m_s2, target_peak_m_s2):
        return Sizing(None, True, "bare", (
            f"the bare building's peak acceleration {bare.peak_acceleration_m_s2:.4g} m/s^2 "
            f"already meets the target {target_peak_m_s2:.4g} m/s^2: no damper is needed"))
    tunings, designs = {}, {}

    def best(mu):
        # One tuning per mass ratio: the answer is the tuning the search saw.
        if mu not in tunings:
            tunings[mu] = tune(loaded, mu, max_stroke_m=max_stroke_m, stroke_loads=stroke_loads)
        return tunings[mu]

    def design(mu):
        if mu not in designs:
            designs[mu] = _design_at(loaded, mu, best(mu), target_peak_m_s2)
        return designs[mu]

    top = best(max_mass_ratio)
    if not meets_target(top.value, target_peak_m_s2):
        limit = "stroke" if top.stroke_limited or not np.isfinite(top.value) else "mass"
        d = design(max_mass_ratio)
        reason = (f"the peak stroke limit of {max_stroke_m:g} m" if limit == "stroke"
                  else f"the largest mass ratio allowed, {max_mass_ratio:g}")
        return Sizing(d, d.meets_target, limit, (
            f"the target {target_peak_m_s2:.4g} m/s^2 cannot be met: the best achievable peak "
            f"acceleration is {d.peak_acceleration_m_s2:.4g} m/s^2 at mass ratio "
            f"{max_mass_ratio:g}, limited by {reason}"))

    mu = smallest_meeting_mass_ratio(lambda x: best(x).value, target_peak_m_s2,
                                     min_mass_ratio, max_mass_ratio,
                                     accept=lambda x: design(x).meets_target)
    tuning, d = best(mu), design(mu)
    met = d.meets_target
    verdict = "meets" if met else "does not meet"
    peak = f"peak {d.peak_acceleration_m_s2:.6g} m/s^2"
    if mu == min_mass_ratio and tuning.value < target_peak_m_s2 * (1 - 1e-4):
        return Sizing(d, met, "minimum", (
            f"the smallest mass ratio searched, {mu:g}, already {verdict} the target "
            f"{target_peak_m_s2:.4g} m/s^2 ({peak}); a lighter damper may do"))
    if abs(tuning.value / target_peak_m_s2 - 1.0) < 1e-4:
        return Sizing(d, met, "target", (
            f"least mass ratio {mu:.5g} {verdict} the target {target_peak_m_s2:.4g} m/s^2 "
            f"({peak})" + (" with the stroke limit active" if tuning.stroke_limited else "")))
    # Below this mass no tuning keeps the stroke within its limit: the stroke
    # limit, not the acceleration target, sets the least mass.
    return Sizing(d, met, "stroke", (
        f"least mass ratio {mu:.5g} is set by the peak stroke limit of {max_stroke_m:g} m; "
        f"its {peak} {verdict} the target {target_peak_m_s2:.4g} m/s^2"))


def smallest_meeting_mass_ratio(best_value, target, min_mass_ratio, max_mass_ratio, *,
                                accept=None) -> float:
    """Smallest mass ratio whose best achievable value meets ``target``.

    Parameters
    ----------
    best_value : callable
        mu -> the least value [m/s^2] reachable at mass ratio mu (infinite
        where no tuning is feasible); it falls as mu grows.
    target : float
        The value to reach [m/s^2].
    min_mass_ratio, max_mass_ratio : float
        Search range [-]; ``best_value`` must meet the target at the upper
        end. A lower end that already meets it is the answer.
    accept : callable, optional
        mu -> bool, the final verdict on the design at mu when it is judged
        on another evaluation than ``best_value`` (e.g. the design's own
        engine call); the smallest searched mass ratio it accepts is returned.

    Returns
    -------
    float
        A mass ratio [-] whose value meets the target by
        :func:`tmd.verdict.meets_target`: the end of Brent's final bracket
        on the side that meets, never the root itself, which may lie an ulp
        on the failing side.

    Raises
    ------
    BracketError
        When even ``max_mass_ratio`` does not meet the target (the callers
        check this first and report it as an unmet target).

    Notes
    -----
    Brent's method (``scipy.optimize.brentq``) on best(mu) / target - 1, an
    infeasible mass counting as +1 (on the side that fails). Every value it
    sees is kept; the answer is the smallest mass ratio whose value met.
    """
    values: dict[float, float] = {}
    rejected: set[float] = set()

    def value(mu):
        mu = float(mu)
        if mu not in values:
            values[mu] = float(best_value(mu))
        return values[mu]

    def gap(mu):
        # The sign follows the verdict: a value an ulp above the target fails.
        v = value(mu)
        if not np.isfinite(v):
            return 1.0
        if float(mu) in rejected or not meets_target(v, target):
            return max(v / target - 1.0, np.finfo(float).tiny)
        return min(v / target - 1.0, 0.0)

    if meets_target(value(min_mass_ratio), target):
        if accept is None or accept(min_mass_ratio):
            return float(min_mass_ratio)
        rejected.add(float(min_mass_ratio))
    if not meets_target(value(max_mass_ratio), target):
        raise BracketError(
            f"the least-mass search has no answer in mass ratios [{min_mass_ratio:g}, "
            f"{max_mass_ratio:g}]: the best value at {max_mass_ratio:g} is "
            f"{values[float(max_mass_ratio)]:.6g}, above the target {target:.6g}")
    from scipy.optimize import brentq  # imported here, as minimize above

    brentq(gap, min_mass_ratio, max_mass_ratio, xtol=1e-12, rtol=1e-10, maxiter=200)
    meeting = sorted(mu for mu, v in values.items()
                     if meets_target(v, target) and mu not in rejected)
    for mu in meeting:
        if accept is None or accept(mu):
            return mu
        rejected.add(mu)
    return meeting[-1]


def _design_at(loaded, mu, tuning: Tuning, target):
    return evaluate_tmd(loaded, TunedMassDamper(mu, tuning.frequency_ratio, tuning.damping_ratio),
                        target)
