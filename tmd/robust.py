"""Detuning: how a TMD holds up when the building or the damper is not as designed.

A building's real frequency is only known once it stands (finite-element
predictions are commonly 10-20% off), and an as-built damper's spring and
dashpot differ from their specification. This module

* sweeps the structure frequency factor s (f_s -> s f_s with the modal mass
  M* held, so k_s scales by s^2; the damper keeps its absolute mass, spring
  and dashpot, hence its absolute f_d and zeta_d), for the bare building and
  for a design, and sweeps the damper's own spring and dashpot;
* finds the worst peak acceleration over a band s in [1 - b, 1 + b] by a
  grid plus local refinement (the worst case can lie inside the band);
* sizes the least-mass TMD whose peak acceleration meets the target for
  every s in the band (a minimax tuning inside a least-mass search);
* puts it all in one call, :func:`robustness_study`, returning plain dicts.

Every sweep is one batched engine call (:func:`tmd.performance.assess` with
arrays of structure frequency or absorber parameters). The probabilistic
counterpart (random s and zeta_s) is :mod:`tmd.probabilistic`.

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
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq, minimize, minimize_scalar

from tmd.dampers.absorber import Absorbers
from tmd.dampers.tmd import TunedMassDamper
from tmd.design import (
    DAMPING_RATIO_BOUNDS,
    FREQUENCY_RATIO_BOUNDS,
    DesignError,
    LoadCase,
    TmdDesign,
    evaluate_tmd,
    tune,
)
from tmd.performance import assess, effective_damping_ratio

SWEEP_RANGE = 0.20          # structure frequency factor sweep, +/-
SPRING_RANGE = 0.10         # as-built spring stiffness, +/-
DASHPOT_RANGE = 0.30        # as-built dashpot, +/-
SWEEP_POINTS = 41           # s step 0.01 over +/-20%
DAMPER_SWEEP_POINTS = 21
BAND_SEARCH_POINTS = 81     # grid of the band-maximum search before refinement
OPTIMISER_BAND_POINTS = 41  # grid of s inside the minimax tuning
CHECK_BAND_POINTS = 201     # finer grid the robust answer is checked on
EXCHANGE_ROUNDS = 4         # worst points added to the optimiser grid, at most
# The robust search aims this much below the target so that the answer meets it
# outright rather than to the root finder's tolerance (costs ~1e-6 of the mass).
TARGET_MARGIN = 1e-6
_STEP = 1e-6  # central-difference step in (f_d/f_s, ln zeta_d)

StructureDamping = Callable[[np.ndarray], np.ndarray]


@dataclass(frozen=True)
class AerodynamicDamping:
    """Structure damping that varies with the structure frequency factor.

    zeta_s(s) = structural_ratio + aerodynamic_ratio / s: the along-wind
    aerodynamic damping is inversely proportional to the natural frequency.

    Parameters
    ----------
    structural_ratio : float
        Structural damping ratio, independent of s [-].
    aerodynamic_ratio : float
        Aerodynamic damping ratio at the nominal frequency (s = 1) [-].

    References
    ----------
    EN 1991-1-4:2005, Annex F.5 (aerodynamic damping proportional to 1/n_1).
    """

    structural_ratio: float
    aerodynamic_ratio: float

    def __call__(self, frequency_factor):
        s = np.asarray(frequency_factor, float)
        return self.structural_ratio + self.aerodynamic_ratio / s


@dataclass(frozen=True)
class BandMaximum:
    """The worst peak acceleration over a band of structure frequency factors."""

    peak_acceleration_m_s2: float
    structure_frequency_factor: float


@dataclass(frozen=True)
class BandTuning:
    """Minimax tuning at a fixed mass ratio over a grid of s.

    ``value`` is the largest peak acceleration over the optimiser's grid
    [m/s^2] (inf when the stroke limit cannot be held); ``peak_stroke_m`` the
    largest peak stroke over it [m].
    """

    frequency_ratio: float
    damping_ratio: float
    value: float
    peak_stroke_m: float
    stroke_limited: bool


@dataclass(frozen=True)
class RobustSizing:
    """Outcome of the robust least-mass search.

    ``governed_by`` is "target", "stroke", "mass" or "bare" as in
    :class:`tmd.design.Sizing`; ``meets_target`` holds across the whole band.
    """

    design: TmdDesign | None
    frequency_band: float
    band_maximum: BandMaximum | None
    meets_target: bool
    governed_by: str
    message: str


# --- one call per job -------------------------------------------------------

def robustness_study(case: LoadCase, nominal: TunedMassDamper, target_peak_m_s2: float, *,
                     frequency_band: float = 0.15, sweep_range: float = SWEEP_RANGE,
                     robust_design: bool = True, max_mass_ratio: float = 0.05,
                     max_stroke_m: float | None = None,
                     structure_damping_ratio: StructureDamping | None = None,
                     probabilistic=None) -> dict:
    """Sweeps, band maximum, robust design and (optionally) exceedance probabilities.

    Parameters
    ----------
    case : LoadCase
    nominal : TunedMassDamper
        The design sized for the nominal structure (e.g. from
        :func:`tmd.design.least_mass`).
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    frequency_band : float
        Half-width b of the band of structure frequency factors [-]
        (s in [1 - b, 1 + b]).
    sweep_range : float
        Half-width of the structure-frequency sweep [-].
    robust_design : bool
        Also size the least-mass TMD that meets the target across the band.
    max_mass_ratio : float
        Largest mass ratio of the robust and probabilistic searches [-].
    max_stroke_m : float, optional
        Peak stroke limit [m], held across the band by the robust design.
    structure_damping_ratio : callable, optional
        zeta_s(s) [-], vectorised; default the mode's constant damping. See
        :class:`AerodynamicDamping`; a table can be passed as
        ``functools.partial(numpy.interp, xp=s_values, fp=zeta_values)``.
    probabilistic : tmd.probabilistic.Uncertainty, optional
        Random structure frequency (and damping): adds ``probabilistic``.

    Returns
    -------
    dict
        ``frequency_band``, ``sweep``, ``sweep_bare``, ``sweep_damper_frequency``,
        ``sweep_damper_damping``, ``peak_acceleration_band_max_m_s2`` and
        ``worst_structure_frequency_factor`` (of the nominal design),
        ``robust_design`` (when asked; see
        :func:`robust_design_block`), ``probabilistic`` (when asked; see
        :func:`tmd.probabilistic.probabilistic_study`) and ``summary``:
        ``nominal_band_loss`` (band maximum / peak at s = 1, minus 1 [-]),
        ``nominal_band_max_over_target`` [-], ``robust_extra_mass_kg`` and
        ``robust_extra_mass_fraction`` (robust minus nominal mass, and that
        over the nominal mass; None without a robust design).

    Notes
    -----
    The extra mass is measured against the ``nominal`` damper given, so with
    a fixed-mass nominal design it can be negative.
    """
    result = design_sweeps(case, nominal, frequency_band=frequency_band,
                           sweep_range=sweep_range,
                           structure_damping_ratio=structure_damping_ratio)
    worst = BandMaximum(result["peak_acceleration_band_max_m_s2"],
                        result["worst_structure_frequency_factor"])
    at_nominal = float(case.assess(nominal.absorbers(case.mode)).peak_acceleration_m_s2)
    robust = None
    if robust_design:
        robust = robust_least_mass(case, target_peak_m_s2, frequency_band,
                                   max_mass_ratio=max_mass_ratio, max_stroke_m=max_stroke_m,
                                   structure_damping_ratio=structure_damping_ratio)
        result["robust_design"] = robust_design_block(robust)
    if probabilistic is not None:
        from tmd.probabilistic import probabilistic_study  # avoids an import cycle

        result["probabilistic"] = probabilistic_study(
            case, nominal, target_peak_m_s2, probabilistic,
            robust=robust.design.damper if robust and robust.design else None,
            max_mass_ratio=max_mass_ratio, max_stroke_m=max_stroke_m,
            structure_damping_ratio=structure_damping_ratio)
    extra = None
    if robust is not None and robust.design is not None:
        extra = robust.design.mass_kg - nominal.mass_kg(case.mode)
    result["summary"] = {
        "nominal_band_loss": worst.peak_acceleration_m_s2 / at_nominal - 1.0,
        "nominal_band_max_over_target": worst.peak_acceleration_m_s2 / target_peak_m_s2,
        "robust_extra_mass_kg": extra,
        "robust_extra_mass_fraction": (None if extra is None
                                       else extra / nominal.mass_kg(case.mode)),
    }
    return result


def design_sweeps(case: LoadCase, damper: TunedMassDamper, *, frequency_band: float = 0.15,
                  sweep_range: float = SWEEP_RANGE, spring_range: float = SPRING_RANGE,
                  dashpot_range: float = DASHPOT_RANGE,
                  structure_damping_ratio: StructureDamping | None = None) -> dict:
    """Every sweep of one given design, e.g. an as-built damper (``tmd sweep``).

    Parameters
    ----------
    case : LoadCase
    damper : TunedMassDamper
        The design, relative to the nominal mode.
    frequency_band : float
        Half-width of the band for ``peak_acceleration_band_max_m_s2`` [-].
    sweep_range, spring_range, dashpot_range : float
        Half-widths of the structure-frequency, spring and dashpot sweeps [-].
    structure_damping_ratio : callable, optional
        zeta_s(s) [-]; default the mode's constant damping.

    Returns
    -------
    dict
        ``frequency_band``, ``sweep``, ``sweep_bare``, ``sweep_damper_frequency``,
        ``sweep_damper_damping`` (see the sweep functions for the point
        keys), ``peak_acceleration_band_max_m_s2`` and the s where it occurs,
        ``worst_structure_frequency_factor`` [-].
    """
    worst = peak_acceleration_band_max(case, damper, frequency_band,
                                       structure_damping_ratio=structure_damping_ratio)
    return {
        "frequency_band": frequency_band,
        "sweep": sweep_structure_frequency(case, damper, sweep_range=sweep_range,
                                           structure_damping_ratio=structure_damping_ratio),
        "sweep_bare": sweep_structure_frequency(case, None, sweep_range=sweep_range,
                                                structure_damping_ratio=structure_damping_ratio),
        "sweep_damper_frequency": sweep_damper_frequency(case, damper,
                                                         spring_range=spring_range),
        "sweep_damper_damping": sweep_damper_damping(case, damper, dashpot_range=dashpot_range),
        "peak_acceleration_band_max_m_s2": worst.peak_acceleration_m_s2,
        "worst_structure_frequency_factor": worst.structure_frequency_factor,
    }


def robust_design_block(sizing: RobustSizing) -> dict:
    """The ``robust_design`` block of results.json.

    The fields of the ``design`` block (the design evaluated on the nominal
    structure, s = 1; all None when no damper is needed) plus
    ``frequency_band`` [-], ``peak_acceleration_band_max_m_s2``,
    ``worst_structure_frequency_factor`` [-], ``meets_target_across_band``,
    ``governed_by`` and ``message``.
    """
    from tmd.jobs import DESIGN_KEYS, design_block  # jobs is the owner of the block

    block = (design_block(sizing.design) if sizing.design is not None
             else dict.fromkeys(DESIGN_KEYS))
    worst = sizing.band_maximum
    return block | {
        "frequency_band": sizing.frequency_band,
        "peak_acceleration_band_max_m_s2": None if worst is None else worst.peak_acceleration_m_s2,
        "worst_structure_frequency_factor": (None if worst is None
                                             else worst.structure_frequency_factor),
        "meets_target_across_band": sizing.meets_target,
        "governed_by": sizing.governed_by,
        "message": sizing.message,
    }


# --- sweeps -------------------------------------------------------------------

def sweep_structure_frequency(case: LoadCase, damper: TunedMassDamper | None, *,
                              sweep_range: float = SWEEP_RANGE, points: int = SWEEP_POINTS,
                              structure_damping_ratio: StructureDamping | None = None
                              ) -> list[dict]:
    """Responses over structure frequency factors s in [1 - r, 1 + r], s = 1 included.

    Parameters
    ----------
    case : LoadCase
    damper : TunedMassDamper or None
        The design (absolute m_d, k_d, c_d kept as s varies); None for the
        bare building.
    sweep_range : float
        Half-width r [-].
    points : int
        Number of points (made odd so that s = 1 is one of them).
    structure_damping_ratio : callable, optional
        zeta_s(s) [-]; default the mode's constant damping.

    Returns
    -------
    list of dict
        ``structure_frequency_factor`` [-], ``peak_acceleration_m_s2``,
        ``peak_stroke_m`` (None for the bare building),
        ``effective_damping_ratio`` [-].

    Notes
    -----
    The swept structure has f_s' = s f_s, M* unchanged, zeta_s' = zeta_s(s).
    The effective damping is that of the swept bare structure (same s and
    M*) with the same rms acceleration at the damper level
    (:func:`tmd.performance.effective_damping_ratio`); for the bare building
    it is zeta_s(s) by definition.
    """
    s = factor_grid(sweep_range, points)
    a, zeta_s = assess_structure_factors(case, damper, s, structure_damping_ratio)
    if damper is None:
        return _points("structure_frequency_factor", s, a.peak_acceleration_m_s2, None, zeta_s)
    zeta_eff = effective_damping_ratio(s * case.mode.frequency_hz, case.mode.modal_mass_kg,
                                       a.sigma_acceleration_m_s2 / case.shape_factor,
                                       case.spectrum)
    return _points("structure_frequency_factor", s, a.peak_acceleration_m_s2,
                   a.peak_stroke_m[..., 0], zeta_eff)


def sweep_damper_frequency(case: LoadCase, damper: TunedMassDamper, *,
                           spring_range: float = SPRING_RANGE,
                           points: int = DAMPER_SWEEP_POINTS) -> list[dict]:
    """Responses of the nominal structure with the damper's spring off its design value.

    Parameters
    ----------
    case : LoadCase
    damper : TunedMassDamper
    spring_range : float
        Half-width of the spring stiffness factor k_d'/k_d in
        [1 - r, 1 + r] [-] (default +/-10%, an as-built tolerance).
    points : int
        Number of points (made odd so that the design point is one of them).

    Returns
    -------
    list of dict
        ``damper_frequency_factor`` = f_d'/f_d [-], ``damper_stiffness_factor``
        = k_d'/k_d [-], ``peak_acceleration_m_s2``, ``peak_stroke_m``,
        ``effective_damping_ratio`` [-].

    Notes
    -----
    The damper keeps its mass and dashpot: f_d' = f_d sqrt(k_d'/k_d), so a
    +/-10% spring spans f_d'/f_d in [sqrt(0.9), sqrt(1.1)] = [0.949, 1.049],
    and zeta_d' = zeta_d f_d / f_d' (c_d = 2 zeta_d m_d omega_d fixed).
    """
    stiffness = factor_grid(spring_range, points)
    factor = np.sqrt(stiffness)
    m = case.mode
    absorbers = Absorbers.tuned_masses(
        np.full((factor.size, 1), damper.mass_kg(m)),
        (damper.frequency_hz(m) * factor)[:, None],
        (damper.damping_ratio / factor)[:, None])
    points_ = _damper_points(case, absorbers, "damper_frequency_factor", factor)
    for point, k in zip(points_, stiffness, strict=True):
        point["damper_stiffness_factor"] = float(k)
    return points_


def sweep_damper_damping(case: LoadCase, damper: TunedMassDamper, *,
                         dashpot_range: float = DASHPOT_RANGE,
                         points: int = DAMPER_SWEEP_POINTS) -> list[dict]:
    """Responses of the nominal structure with the damper's dashpot off its design value.

    Parameters
    ----------
    case : LoadCase
    damper : TunedMassDamper
    dashpot_range : float
        Half-width of the dashpot factor c_d'/c_d in [1 - r, 1 + r] [-]
        (default +/-30%).
    points : int
        Number of points (made odd so that the design point is one of them).

    Returns
    -------
    list of dict
        ``damper_damping_factor`` = c_d'/c_d = zeta_d'/zeta_d [-],
        ``peak_acceleration_m_s2``, ``peak_stroke_m``, ``effective_damping_ratio``.

    Notes
    -----
    At fixed m_d and f_d the damping ratio scales with the dashpot.
    """
    factor = factor_grid(dashpot_range, points)
    m = case.mode
    absorbers = Absorbers.tuned_masses(
        np.full((factor.size, 1), damper.mass_kg(m)),
        np.full((factor.size, 1), damper.frequency_hz(m)),
        (damper.damping_ratio * factor)[:, None])
    return _damper_points(case, absorbers, "damper_damping_factor", factor)


def peak_acceleration_band_max(case: LoadCase, damper: TunedMassDamper | None,
                               frequency_band: float, *, points: int = BAND_SEARCH_POINTS,
                               structure_damping_ratio: StructureDamping | None = None
                               ) -> BandMaximum:
    """Largest peak acceleration for s in [1 - b, 1 + b].

    Parameters
    ----------
    case : LoadCase
    damper : TunedMassDamper or None
        None for the bare building.
    frequency_band : float
        Half-width b [-]; 0 gives the nominal value.
    points : int
        Grid points of the first search (one engine call).
    structure_damping_ratio : callable, optional
        zeta_s(s) [-].

    Returns
    -------
    BandMaximum

    Notes
    -----
    A grid locates the worst point; ``scipy.optimize.minimize_scalar``
    (bounded) refines it between its grid neighbours. The maximum may lie at
    a band edge or inside the band.
    """
    s = factor_grid(frequency_band, points)
    peak = assess_structure_factors(case, damper, s, structure_damping_ratio)[0]
    peak = peak.peak_acceleration_m_s2
    i = int(np.argmax(peak))
    best = BandMaximum(float(peak[i]), float(s[i]))
    if s.size == 1:
        return best
    lo, hi = s[max(i - 1, 0)], s[min(i + 1, s.size - 1)]

    def negative_peak(x):
        a = assess_structure_factors(case, damper, np.array([x]), structure_damping_ratio)[0]
        return -float(a.peak_acceleration_m_s2[0])

    res = minimize_scalar(negative_peak, bounds=(lo, hi), method="bounded",
                          options={"xatol": 1e-7})
    if -res.fun > best.peak_acceleration_m_s2:
        return BandMaximum(float(-res.fun), float(res.x))
    return best


# --- robust design ------------------------------------------------------------

def tune_for_band(case: LoadCase, mass_ratio: float, frequency_factors, *,
                  max_stroke_m: float | None = None,
                  structure_damping_ratio: StructureDamping | None = None,
                  start: tuple[float, float] | None = None) -> BandTuning:
    """Tuning of a TMD of given mass ratio that minimises the worst peak over a grid of s.

    Parameters
    ----------
    case : LoadCase
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
    when the free minimax optimum violates it.
    """
    factors = np.asarray(frequency_factors, float)
    nominal = tune(case, mass_ratio)
    zeta0 = nominal.damping_ratio
    starts = [(nominal.frequency_ratio, zeta0) if start is None else start]
    if factors.size > 1:
        starts.append((nominal.frequency_ratio, min(1.5 * zeta0, DAMPING_RATIO_BOUNDS[1])))
    free = _solve_band(_BandProblem(case, mass_ratio, factors, None, structure_damping_ratio),
                       starts)
    if max_stroke_m is None or free[3] <= max_stroke_m:
        # The limit is not active at the free optimum, so that is the optimum.
        return BandTuning(float(free[2][0]), float(math.exp(free[2][1])), math.exp(free[1]),
                          free[3], False)
    problem = _BandProblem(case, mass_ratio, factors, max_stroke_m, structure_damping_ratio)
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


def robust_least_mass(case: LoadCase, target_peak_m_s2: float, frequency_band: float, *,
                      max_mass_ratio: float, max_stroke_m: float | None = None,
                      min_mass_ratio: float = 1e-4,
                      structure_damping_ratio: StructureDamping | None = None,
                      optimiser_points: int = OPTIMISER_BAND_POINTS,
                      check_points: int = CHECK_BAND_POINTS) -> RobustSizing:
    """Least-mass TMD whose peak acceleration meets the target for every s in the band.

    Parameters
    ----------
    case : LoadCase
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    frequency_band : float
        Half-width b of the band s in [1 - b, 1 + b] [-]; 0 gives the nominal
        least-mass design.
    max_mass_ratio, min_mass_ratio : float
        Search range of the mass ratio [-].
    max_stroke_m : float, optional
        Peak stroke limit [m], held across the band.
    structure_damping_ratio : callable, optional
        zeta_s(s) [-].
    optimiser_points : int
        Grid of s inside the minimax tuning.
    check_points : int
        Finer grid (plus refinement) on which the answer is checked.

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
    step, at most four times).
    """
    bare = peak_acceleration_band_max(case, None, frequency_band,
                                      structure_damping_ratio=structure_damping_ratio)
    if bare.peak_acceleration_m_s2 <= target_peak_m_s2:
        return RobustSizing(None, frequency_band, bare, True, "bare", (
            f"the bare building's peak acceleration stays at or below {target_peak_m_s2:.4g} "
            f"m/s^2 across the band ±{frequency_band:g}: no damper is needed"))
    grid = factor_grid(frequency_band, optimiser_points)
    goal = target_peak_m_s2 * (1.0 - TARGET_MARGIN)
    for _ in range(EXCHANGE_ROUNDS + 1):
        sizing = _robust_search(case, goal, target_peak_m_s2, frequency_band, grid,
                                max_mass_ratio, min_mass_ratio, max_stroke_m,
                                structure_damping_ratio, check_points)
        worst = sizing.band_maximum
        if (sizing.governed_by != "target" or worst is None
                or worst.peak_acceleration_m_s2 <= target_peak_m_s2):
            return sizing
        grid = np.union1d(grid, [worst.structure_frequency_factor])
    return RobustSizing(sizing.design, frequency_band, worst, False, "target", (
        f"the robust search did not settle: the band maximum {worst.peak_acceleration_m_s2:.6g} "
        f"m/s^2 exceeds the target at s = {worst.structure_frequency_factor:.5g}"))


def _robust_search(case, goal, target, band, grid, max_mu, min_mu, max_stroke_m, damping,
                   check_points) -> RobustSizing:
    last = []

    def best(mu):
        # Warm-started from the last tuning: SLSQP from the nominal optimum can
        # zig-zag on the nearly degenerate worst-case constraints.
        tuning = tune_for_band(case, mu, grid, max_stroke_m=max_stroke_m,
                               structure_damping_ratio=damping,
                               start=last[-1] if last else None)
        if np.isfinite(tuning.value):
            last.append((tuning.frequency_ratio, tuning.damping_ratio))
        return tuning

    def finish(mu, tuning, met, governed_by, message):
        damper = TunedMassDamper(mu, tuning.frequency_ratio, tuning.damping_ratio)
        worst = peak_acceleration_band_max(case, damper, band, points=check_points,
                                           structure_damping_ratio=damping)
        met = met and worst.peak_acceleration_m_s2 <= target
        return RobustSizing(evaluate_tmd(case, damper, target), band, worst, met, governed_by,
                            message)

    top = best(max_mu)
    if top.value > goal:
        limit = "stroke" if top.stroke_limited or not np.isfinite(top.value) else "mass"
        reason = (f"the peak stroke limit of {max_stroke_m:g} m" if limit == "stroke"
                  else f"the largest mass ratio allowed, {max_mu:g}")
        return finish(max_mu, top, False, limit, (
            f"the target {target:.4g} m/s^2 cannot be met across the band ±{band:g}: the best "
            f"worst-case peak is {top.value:.4g} m/s^2 at mass ratio {max_mu:g}, limited by "
            f"{reason}"))

    def gap(mu):
        value = best(mu).value
        return value / goal - 1.0 if np.isfinite(value) else 1.0

    mu = brentq(gap, min_mu, max_mu, xtol=1e-12, rtol=1e-10, maxiter=200)
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

    def __init__(self, case, mass_ratio, factors, max_stroke_m, damping):
        self.case, self.mu, self.s, self.max_stroke = case, mass_ratio, factors, max_stroke_m
        self.zeta_s = structure_damping_ratios(case, factors, damping)
        self._x = None

    def evaluate(self, x):
        x = np.asarray(x, float)
        if self._x is not None and np.array_equal(x, self._x):
            return
        pts = np.vstack([x, x + _STEP * np.eye(2), x - _STEP * np.eye(2)])
        m = self.case.mode
        absorbers = Absorbers.tuned_masses(
            np.full((5, 1, 1), self.mu * m.modal_mass_kg),
            (pts[:, 0] * m.frequency_hz)[:, None, None],
            np.exp(pts[:, 1])[:, None, None])
        a = assess(self.s * m.frequency_hz, m.modal_mass_kg, self.zeta_s, absorbers,
                   self.case.spectrum, self.case.duration_s, shape_factor=self.case.shape_factor)
        log_peak = np.log(a.peak_acceleration_m_s2)
        log_stroke = np.log(a.peak_stroke_m[..., 0])
        # A copy: SLSQP may hand over its own buffer and change it in place.
        self._x = x.copy()
        self.log_peak, self.stroke = log_peak[0], np.exp(log_stroke[0])
        self.log_stroke = log_stroke[0]
        self.grad = ((log_peak[1:3] - log_peak[3:5]) / (2 * _STEP)).T
        self.stroke_grad = ((log_stroke[1:3] - log_stroke[3:5]) / (2 * _STEP)).T

    def constraint(self, z):
        self.evaluate(z[:2])
        rows = [z[2] - self.log_peak]
        if self.max_stroke is not None:
            rows.append([math.log(self.max_stroke) - self.log_stroke.max()])
        return np.concatenate(rows)

    def constraint_jac(self, z):
        self.evaluate(z[:2])
        n = self.s.size
        rows = [np.hstack([-self.grad, np.ones((n, 1))])]
        if self.max_stroke is not None:
            worst = int(np.argmax(self.log_stroke))
            rows.append(np.append(-self.stroke_grad[worst], 0.0)[None, :])
        return np.vstack(rows)


# --- pure numpy helpers -------------------------------------------------------

def factor_grid(half_range: float, points: int) -> np.ndarray:
    """Factors 1 + r linspace(-1, 1, n), n odd, with the centre exactly 1."""
    if half_range < 0:
        raise ValueError(f"a sweep range must be >= 0, got {half_range!r}")
    if half_range == 0:
        return np.array([1.0])
    n = points + (1 - points % 2)
    grid = 1.0 + half_range * np.linspace(-1.0, 1.0, n)
    grid[n // 2] = 1.0
    return grid


def structure_damping_ratios(case: LoadCase, factors, structure_damping_ratio=None):
    """zeta_s at each structure frequency factor [-] (the mode's own when None)."""
    s = np.asarray(factors, float)
    if structure_damping_ratio is None:
        return np.full(s.shape, case.mode.damping_ratio)
    return np.broadcast_to(np.asarray(structure_damping_ratio(s), float), s.shape)


def assess_structure_factors(case: LoadCase, damper: TunedMassDamper | None, factors,
                             structure_damping_ratio=None):
    """One engine call over structure frequency factors; returns (Assessment, zeta_s)."""
    s = np.asarray(factors, float)
    zeta_s = structure_damping_ratios(case, s, structure_damping_ratio)
    m = case.mode
    absorbers = Absorbers.none(s.shape) if damper is None else damper.absorbers(m)
    a = assess(s * m.frequency_hz, m.modal_mass_kg, zeta_s, absorbers, case.spectrum,
               case.duration_s, shape_factor=case.shape_factor)
    return a, zeta_s


def _damper_points(case, absorbers, key, factors):
    a = case.assess(absorbers)
    m = case.mode
    zeta_eff = effective_damping_ratio(m.frequency_hz, m.modal_mass_kg,
                                       a.sigma_acceleration_m_s2 / case.shape_factor,
                                       case.spectrum)
    return _points(key, factors, a.peak_acceleration_m_s2, a.peak_stroke_m[..., 0], zeta_eff)


def _points(key, factors, peak, stroke, zeta_eff):
    strokes = [None] * len(factors) if stroke is None else [float(v) for v in stroke]
    return [{key: float(f), "peak_acceleration_m_s2": float(p), "peak_stroke_m": u,
             "effective_damping_ratio": float(z)}
            for f, p, u, z in zip(factors, peak, strokes, zeta_eff, strict=True)]
