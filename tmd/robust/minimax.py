"""Robust TMD design: least mass meeting the target for every s in a band (minimax).

References
----------
Hoang, N., Warnitchai, P. (2005). Design of multiple tuned mass dampers by
using a numerical optimizer. Earthquake Engineering and Structural Dynamics
34, 125-144. (With uncertain structural properties, larger TMD damping makes
the system more robust.)
Warburton, G. B. (1982). Optimum absorber parameters for various combinations
of response and excitation parameters. Earthquake Engineering and Structural
Dynamics 10, 381-401.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np
from scipy.optimize import minimize

from tmd.dampers.absorber import Absorbers
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import (
    DAMPING_RATIO_BOUNDS,
    FREQUENCY_RATIO_BOUNDS,
    STROKE_MARGIN,
    DesignError,
    LoadedMode,
    TmdDesign,
    central_difference_gradient,
    central_difference_points,
    evaluate_tmd,
    smallest_meeting_mass_ratio,
    tune,
)
from tmd.performance import assess
from tmd.robust.sweeps import (
    BandMaximum,
    StructureDamping,
    factor_grid,
    peak_acceleration_band_max,
    structure_damping_ratios,
)
from tmd.verdict import meets_target

OPTIMISER_BAND_POINTS = 41  # grid of s inside the minimax tuning
CHECK_BAND_POINTS = 201     # finer grid the robust answer is checked on
EXCHANGE_ROUNDS = 4         # worst points added to the optimiser grid, at most
# The robust search aims this much below the target so that the answer meets it
# outright rather than to the root finder's tolerance (costs ~1e-6 of the mass).
TARGET_MARGIN = 1e-6


@dataclass(frozen=True)
class BandTuning:
    """Minimax tuning at a fixed mass ratio over a grid of s.

    ``value`` is the largest peak acceleration over the optimiser's grid
    [m/s^2] (inf when the stroke limit cannot be held); ``peak_stroke_m`` the
    largest peak stroke over it [m].

    Parameters
    ----------
    frequency_ratio : float
        f_d / f_s [-], relative to the nominal structure.
    damping_ratio : float
        zeta_d [-], referred to the damper's own frequency.
    value : float
        Largest peak acceleration over the optimiser's grid of s [m/s^2].
    peak_stroke_m : float
        Largest peak stroke relative to the structure over that grid [m].
    stroke_limited : bool
        True when the stroke limit is active at the optimum.
    lower_bound : bool
        True when ``value`` is only a lower bound of the stroke-limited
        minimax: the free optimum, whose tuning breaks the stroke limit,
        returned because it already fails ``fails_above`` (see
        :func:`tune_for_band`). Not a design.
    """

    frequency_ratio: float
    damping_ratio: float
    value: float
    peak_stroke_m: float
    stroke_limited: bool
    lower_bound: bool = False


@dataclass(frozen=True)
class RobustSizing:
    """Outcome of the robust least-mass search.

    ``governed_by`` is "target", "stroke", "mass" or "bare" as in
    :class:`tmd.design.Sizing`; ``meets_target`` holds across the whole band.

    Parameters
    ----------
    design : TmdDesign or None
        The robust design evaluated on the nominal structure (s = 1); None
        when no damper is needed.
    frequency_band : float
        Half-width b of the band s in [1 - b, 1 + b] [-].
    band_maximum : BandMaximum or None
        The worst peak acceleration over the band and where it occurs.
    meets_target : bool
        Whether the target is met at every s in the band.
    governed_by : str
        What decided the mass: "target", "stroke", "mass" or "bare".
    message : str
        The outcome in one plain sentence.
    """

    design: TmdDesign | None
    frequency_band: float
    band_maximum: BandMaximum | None
    meets_target: bool
    governed_by: str
    message: str


# --- robust design ------------------------------------------------------------

def tune_for_band(loaded: LoadedMode, mass_ratio: float, frequency_factors, *,
                  max_stroke_m: float | None = None,
                  structure_damping_ratio: StructureDamping | None = None,
                  start: tuple[float, float] | None = None,
                  stroke_loads: tuple[LoadedMode, ...] = (),
                  fails_above: float | None = None) -> BandTuning:
    """Tuning of a TMD of given mass ratio that minimises the worst peak over a grid of s.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    mass_ratio : float
        mu = m_d / M* [-].
    frequency_factors : array
        The structure frequency factors s the worst case is taken over [-].
    max_stroke_m : float, optional
        Peak stroke limit [m], held at every s of the grid.
    structure_damping_ratio : callable, optional
        zeta_s(s) [-].
    start : (frequency_ratio, damping_ratio), optional
        A warm start (e.g. the band tuning at a nearby mass ratio); it
        replaces the nominal-optimum start.
    stroke_loads : tuple of LoadedMode
        Further loads (e.g. a longer return period's wind) under which the
        peak stroke must also stay within ``max_stroke_m``, at every s of the
        grid, each with its own band damping
        (:meth:`tmd.design.LoadedMode.structure_damping_ratio`).
    fails_above : float, optional
        A peak acceleration [m/s^2] that only the sign of the answer matters
        against (a least-mass search): when the free optimum's worst peak
        already fails it (:func:`tmd.verdict.meets_target`), the
        stroke-limited problem is not solved and the free optimum is returned
        with ``lower_bound`` True. The limit can only raise the minimax, so
        the stroke-limited tuning fails it too.

    Returns
    -------
    BandTuning
        The frequency ratio is f_d / f_s of the nominal structure.

    Notes
    -----
    Minimax in epigraph form, solved by SLSQP in (f_d/f_s, ln zeta_d, t):

        minimise t  subject to  t >= ln a_peak(x; s_i)  for every s_i,
                                 ln u_max >= max_i ln u_peak(x; s_i)  (stroke limit),

    with the gradients by central differences, all designs x ± h e_k at all
    s_i in one engine call. The stroke limit is one constraint on the worst
    stroke (gradient of the worst row): one row per s_i made SLSQP zig-zag
    to its iteration limit while the limit was far from active. Starts: the
    nominal optimum (:func:`tmd.design.tune` at s = 1) and a start with 1.5
    times its damping; the better is kept. The stroke limit enters only
    when the free minimax optimum violates it; ``peak_stroke_m`` is the
    worst over the grid and every stroke load.
    """
    factors = np.asarray(frequency_factors, float)
    nominal = tune(loaded, mass_ratio)
    zeta0 = nominal.damping_ratio
    starts = [(nominal.frequency_ratio, zeta0) if start is None else start]
    if factors.size > 1:
        starts.append((nominal.frequency_ratio, min(1.5 * zeta0, DAMPING_RATIO_BOUNDS[1])))
    extra = tuple(stroke_loads) if max_stroke_m is not None else ()
    free = _solve_band(_BandProblem(loaded, mass_ratio, factors, None, structure_damping_ratio,
                                    extra), starts)
    free_tuning = BandTuning(float(free[2][0]), float(math.exp(free[2][1])), math.exp(free[1]),
                             free[3], False)
    if max_stroke_m is None or free[3] <= max_stroke_m:
        # The limit is not active at the free optimum, so that is the optimum.
        return free_tuning
    if fails_above is not None and not meets_target(free_tuning.value, fails_above):
        # Constraining the stroke shrinks the feasible set, so the minimax can only
        # rise: this mass fails either way, and the constrained solve (the slowest,
        # at a light damper's large strokes) is not needed for the verdict.
        return replace(free_tuning, lower_bound=True)
    problem = _BandProblem(loaded, mass_ratio, factors, max_stroke_m, structure_damping_ratio,
                           extra)
    infeasible, worst, x, stroke = _solve_band(problem, starts + [(free[2][0],
                                                                   math.exp(free[2][1]))])
    infeasible = stroke > max_stroke_m * (1 + 1e-6)
    return BandTuning(float(x[0]), float(math.exp(x[1])),
                      math.inf if infeasible else math.exp(worst), stroke,
                      bool(stroke >= max_stroke_m * (1 - 1e-4)))


def _solve_band(problem, starts):
    """SLSQP from each start; the best (feasible first, then least worst peak)."""
    bounds = [FREQUENCY_RATIO_BOUNDS, tuple(np.log(DAMPING_RATIO_BOUNDS)), (None, None)]
    constraints = [{"type": "ineq", "fun": problem.constraint, "jac": problem.constraint_jac}]
    best = None
    for ratio, zeta in starts:
        x0 = np.array([ratio, math.log(zeta)])
        problem.evaluate(x0)
        z0 = np.append(x0, problem.log_peak.max())
        res = minimize(lambda z: z[2], z0, jac=lambda z: np.array([0.0, 0.0, 1.0]),
                       method="SLSQP", bounds=bounds, constraints=constraints,
                       options={"ftol": 1e-10, "maxiter": 100})
        problem.evaluate(res.x[:2])
        worst, stroke = float(problem.log_peak.max()), float(problem.stroke.max())
        feasible = problem.max_stroke is None or stroke <= problem.max_stroke * (1 + 1e-6)
        candidate = (not feasible, worst, res.x[:2].copy(), stroke)
        if np.isfinite(worst) and (best is None or candidate[:2] < best[:2]):
            best = candidate
    if best is None:
        raise DesignError(f"the band tuning optimiser failed at mass ratio {problem.mu:g}")
    return best


def robust_least_mass(loaded: LoadedMode, target_peak_m_s2: float, frequency_band: float, *,
                      max_mass_ratio: float, max_stroke_m: float | None = None,
                      min_mass_ratio: float = 1e-4,
                      structure_damping_ratio: StructureDamping | None = None,
                      optimiser_points: int = OPTIMISER_BAND_POINTS,
                      check_points: int = CHECK_BAND_POINTS,
                      stroke_loads: tuple[LoadedMode, ...] = ()) -> RobustSizing:
    """Least-mass TMD whose peak acceleration meets the target for every s in the band.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    frequency_band : float
        Half-width b of the band s in [1 - b, 1 + b] [-]; 0 gives the nominal
        least-mass design.
    max_mass_ratio : float
        Largest mass ratio m_d / M* searched [-].
    max_stroke_m : float, optional
        Peak stroke limit [m], held across the band.
    min_mass_ratio : float
        Smallest mass ratio searched [-].
    structure_damping_ratio : callable, optional
        zeta_s(s) [-].
    optimiser_points : int
        Grid of s inside the minimax tuning.
    check_points : int
        Finer grid (plus refinement) on which the answer is checked.
    stroke_loads : tuple of LoadedMode
        Further loads under which the stroke limit is held across the
        optimiser's grid too (:func:`tune_for_band`), e.g. the wind of
        ``[damper] stroke_return_period_years``.

    Returns
    -------
    RobustSizing
        At a "target"-governed answer the band maximum is at most the target
        and within ~1e-5 of it.

    Notes
    -----
    Brent's method (``scipy.optimize.brentq``) on W(mu) / (target (1 - 1e-6)) - 1,
    W(mu) the minimax value of :func:`tune_for_band` on the optimiser's grid,
    as :func:`tmd.design.least_mass` does for the nominal structure. The
    answer is then checked by :func:`peak_acceleration_band_max` on the finer
    grid; if a worst point between the optimiser's grid points exceeds the
    target, that point joins the grid and the search repeats (an exchange
    step, at most four times), its mass search starting from the last answer
    (a larger grid only raises the minimax value, so the least mass cannot fall).
    """
    bare = peak_acceleration_band_max(loaded, None, frequency_band,
                                      structure_damping_ratio=structure_damping_ratio)
    if meets_target(bare.peak_acceleration_m_s2, target_peak_m_s2):
        return RobustSizing(None, frequency_band, bare, True, "bare", (
            f"the bare building's peak acceleration stays at or below {target_peak_m_s2:.4g} "
            f"m/s^2 across the band ±{frequency_band:g}: no damper is needed"))
    grid = factor_grid(frequency_band, optimiser_points)
    goal = target_peak_m_s2 * (1.0 - TARGET_MARGIN)
    lowest = min_mass_ratio
    for _ in range(EXCHANGE_ROUNDS + 1):
        sizing = _robust_search(loaded, goal, target_peak_m_s2, frequency_band, grid,
                                max_mass_ratio, lowest, max_stroke_m,
                                structure_damping_ratio, check_points, tuple(stroke_loads))
        worst = sizing.band_maximum
        if (sizing.governed_by != "target" or worst is None
                or meets_target(worst.peak_acceleration_m_s2, target_peak_m_s2)):
            return sizing
        grid = np.union1d(grid, [worst.structure_frequency_factor])
        # A larger grid only raises the minimax value at every mass, so the next
        # least mass is at least this one: the next search starts from it.
        lowest = max(lowest, sizing.design.mass_ratio)
    return RobustSizing(sizing.design, frequency_band, worst, False, "target", (
        f"the robust search did not settle: the band maximum {worst.peak_acceleration_m_s2:.6g} "
        f"m/s^2 exceeds the target at s = {worst.structure_frequency_factor:.5g}"))


def _robust_search(loaded, goal, target, band, grid, max_mu, min_mu, max_stroke_m, damping,
                   check_points, stroke_loads=()) -> RobustSizing:
    last = []
    tunings = {}

    def best(mu, fails_above=goal):
        # Warm-started from the last tuning: SLSQP from the nominal optimum can
        # zig-zag on the nearly degenerate worst-case constraints. One tuning
        # per mass ratio, so that the answer is the tuning the search saw. In the
        # search only the verdict against the goal matters where a mass fails
        # (fails_above); the largest mass is tuned in full, as it may be reported.
        if mu in tunings:
            return tunings[mu]
        tuning = tune_for_band(loaded, mu, grid, max_stroke_m=max_stroke_m,
                               structure_damping_ratio=damping,
                               start=last[-1] if last else None, stroke_loads=stroke_loads,
                               fails_above=fails_above)
        if np.isfinite(tuning.value) and not tuning.lower_bound:
            last.append((tuning.frequency_ratio, tuning.damping_ratio))
        tunings[mu] = tuning
        return tuning

    def finish(mu, tuning, met, governed_by, message):
        damper = TunedMassDamper(mu, tuning.frequency_ratio, tuning.damping_ratio)
        worst = peak_acceleration_band_max(loaded, damper, band, points=check_points,
                                           structure_damping_ratio=damping)
        met = met and meets_target(worst.peak_acceleration_m_s2, target)
        return RobustSizing(evaluate_tmd(loaded, damper, target), band, worst, met, governed_by,
                            message)

    top = best(max_mu, fails_above=None)
    if not meets_target(top.value, goal):
        limit = "stroke" if top.stroke_limited or not np.isfinite(top.value) else "mass"
        reason = (f"the peak stroke limit of {max_stroke_m:g} m" if limit == "stroke"
                  else f"the largest mass ratio allowed, {max_mu:g}")
        return finish(max_mu, top, False, limit, (
            f"the target {target:.4g} m/s^2 cannot be met across the band ±{band:g}: the best "
            f"worst-case peak is {top.value:.4g} m/s^2 at mass ratio {max_mu:g}, limited by "
            f"{reason}"))

    mu = smallest_meeting_mass_ratio(lambda x: best(x).value, goal, min_mu, max_mu)
    tuning = best(mu)
    if tuning.value < goal * (1 - 1e-4):
        # Below this mass no tuning holds the stroke within its limit.
        return finish(mu, tuning, True, "stroke", (
            f"least mass ratio {mu:.5g} across the band ±{band:g} is set by the peak stroke "
            f"limit of {max_stroke_m:g} m"))
    return finish(mu, tuning, True, "target", (
        f"least mass ratio {mu:.5g} meets the target {target:.4g} m/s^2 for every structure "
        f"frequency within ±{100 * band:g}% of nominal"
        + (" with the stroke limit active" if tuning.stroke_limited else "")))


class _BandProblem:
    """Worst-case constraints over a grid of s with batched central differences."""

    def __init__(self, loaded, mass_ratio, factors, max_stroke_m, damping, stroke_loads=()):
        self.loaded, self.mu, self.s, self.max_stroke = loaded, mass_ratio, factors, max_stroke_m
        self.zeta_s = structure_damping_ratios(loaded, factors, damping)
        # Further loads the stroke limit applies to, each with its own band damping.
        self.stroke_loads = tuple((other, structure_damping_ratios(other, factors))
                                  for other in stroke_loads)
        self._x = None

    def evaluate(self, x):
        x = np.asarray(x, float)
        if self._x is not None and np.array_equal(x, self._x):
            return
        pts = central_difference_points(x)
        m = self.loaded.mode
        absorbers = Absorbers.tuned_masses(
            np.full((5, 1, 1), self.mu * m.modal_mass_kg),
            (pts[:, 0] * m.frequency_hz)[:, None, None],
            np.exp(pts[:, 1])[:, None, None])
        a = assess(self.s * m.frequency_hz, m.modal_mass_kg, self.zeta_s, absorbers,
                   self.loaded.spectrum, self.loaded.duration_s,
                   shape_factor=self.loaded.shape_factor, responses=("acceleration", "stroke"),
                   peak_method=self.loaded.peak_method)
        log_peak = np.log(a.peak_acceleration_m_s2)
        # Stroke rows: the design load's grid of s, then each further load's.
        log_stroke = np.log(np.concatenate([a.peak_stroke_m[..., 0]] + [
            assess(self.s * other.mode.frequency_hz, other.mode.modal_mass_kg, zeta_s,
                   absorbers, other.spectrum, other.duration_s,
                   shape_factor=other.shape_factor, responses=("stroke",),
                   peak_method=other.peak_method).peak_stroke_m[..., 0]
            for other, zeta_s in self.stroke_loads], axis=-1))
        # A copy: SLSQP may hand over its own buffer and change it in place.
        self._x = x.copy()
        self.log_peak, self.stroke = log_peak[0], np.exp(log_stroke[0])
        self.log_stroke = log_stroke[0]
        self.grad = central_difference_gradient(log_peak).T
        self.stroke_grad = central_difference_gradient(log_stroke).T

    def constraint(self, z):
        self.evaluate(z[:2])
        rows = [z[2] - self.log_peak]
        if self.max_stroke is not None:
            rows.append([math.log(self.max_stroke * (1.0 - STROKE_MARGIN))
                         - self.log_stroke.max()])
        return np.concatenate(rows)

    def constraint_jac(self, z):
        self.evaluate(z[:2])
        n = self.s.size
        rows = [np.hstack([-self.grad, np.ones((n, 1))])]
        if self.max_stroke is not None:
            worst = int(np.argmax(self.log_stroke))
            rows.append(np.append(-self.stroke_grad[worst], 0.0)[None, :])
        return np.vstack(rows)
