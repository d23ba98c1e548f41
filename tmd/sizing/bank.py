"""A bank of tuned mass dampers sized as a sequence of convex programs.

With each damper's frequency f_j and damping ratio zeta_j fixed, the
structure's dynamic stiffness

    Z(f) = k_s - omega^2 M* + i omega c_s - sum_j m_j omega^2 T_j(omega)

is affine in the masses m_j, so |Z| is convex in m. At the current masses m0

    l(f) = Re(conj(Z(m0)) Z(m)) / |Z(m0)|

is affine in m, equals |Z| at m0 and is <= |Z| everywhere (Cauchy-Schwarz),
so on a fixed quadrature grid f_i with weights w_i

    sigma_a^2 = sum_i w_i S_F(f_i) omega_i^4 / |Z_i|^2
             <= sum_i w_i S_F(f_i) omega_i^4 l_i^-2,

convex in m where l > 0 (``cvxpy.power(l, -2)``); a stroke variance has the
same form with |omega^2 / D_j|^2 in place of omega^4. Each step minimises the
total mass subject to these bounds with the peak factors frozen at the
current iterate (g sigma <= limit), m >= 0: the convex-concave procedure of
Lipp & Boyd (2016). Variables are nondimensional (Z / k_s, m / M*), and each
node's bound is divided by |Z(m0)| there, so that every argument of the power
is 1 at m0 and every weight is that node's share of the moment; the grid
is the engine's pole-clustered grid of the current iterate
(:func:`tmd.grid.pole_grid`), so at m0 the bound is exactly the engine's
moment. The solver is CLARABEL.

After each step the design is re-checked with the engine
(:func:`tmd.performance.assess`, its own grid, peak factors recomputed); if
the check fails the step is halved towards the new masses' direction until
it passes. The mass never increases and the iteration converges to a
stationary point, not necessarily the global optimum. The start is feasible:
the dictionary's masses are scaled up uniformly (doubling) until the target
holds. Several structure-frequency scenarios (a detuning band) are simply
more constraints. A dictionary of candidate tunings (a grid of frequency
ratios x damping ratios) lets the solver choose which dampers to use;
candidates whose mass falls to (numerically) zero are dropped from the
problem, together with their stroke constraints (a damper that is not built
has no stroke to limit), which only enlarges the feasible set.

References
----------
Lipp, T. and Boyd, S. (2016). Variations and extension of the convex-concave
procedure. Optimization and Engineering 17, 263-287.
Igusa, T. and Xu, K. (1994). Vibration control using multiple tuned mass
dampers. Journal of Sound and Vibration 175(4), 491-503.
Diamond, S. and Boyd, S. (2016). CVXPY: a Python-embedded modeling language for
convex optimization. Journal of Machine Learning Research 17(83), 1-5.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field

import numpy as np

from tmd.dampers.absorber import Absorbers
from tmd.design import DesignError, LoadedMode
from tmd.grid import pole_grid
from tmd.performance import Assessment, assess
from tmd.response import closed_loop_poles, resonances
from tmd.verdict import meets_target

TWO_PI = 2.0 * math.pi
# The convex step aims this far (relative, on sigma) inside the limits so that
# the engine's re-check on its own grid passes without a back-off.
STEP_MARGIN = 1e-7
CHECK_TOLERANCE = 1e-9
MAX_BACKOFFS = 8
PRUNE_FRACTION = 1e-6


class BankSolverError(DesignError):
    """The convex solver failed, or returned an inaccurate step the engine rejects."""


@dataclass(frozen=True)
class BankSettings:
    """The candidate dictionary and the iteration (loaded keys under [options]).

    Parameters
    ----------
    frequency_ratios : tuple of float
        Candidate f_j / f_s [-] (f_s the nominal structure frequency).
    damping_ratios : tuple of float
        Candidate zeta_j [-]; every pair (ratio, zeta) is one candidate.
    frequency_factors : tuple of float
        Structure frequency factors s of the design scenarios (f_s -> s f_s,
        M* and zeta_s kept, dampers unchanged) [-]; (1.0,) is nominal.
    max_iterations : int
        Convex steps at most.
    tolerance : float
        Stop when a step lowers the total mass by less than this fraction.
    prune_share : float
        Members lighter than this share of the bank's total mass are removed
        from the final bank [-]; the rest are scaled up until the engine's
        re-check passes, and what was removed is reported.
    """

    frequency_ratios: tuple[float, ...] = (0.90, 0.94, 0.98, 1.02)
    damping_ratios: tuple[float, ...] = (0.04, 0.08, 0.12)
    frequency_factors: tuple[float, ...] = (1.0,)
    max_iterations: int = 30
    tolerance: float = 1e-4
    prune_share: float = 0.01

    def candidates(self) -> tuple[np.ndarray, np.ndarray]:
        """Return the frequency ratios and damping ratios of every candidate, flattened.

        Returns
        -------
        frequency_ratios : numpy.ndarray
            f_j / f_s of each candidate [-].
        damping_ratios : numpy.ndarray
            zeta_j of each candidate [-], referred to its own frequency.
        """
        r, z = np.meshgrid(np.asarray(self.frequency_ratios, float),
                           np.asarray(self.damping_ratios, float), indexing="ij")
        return r.ravel(), z.ravel()


@dataclass(frozen=True)
class BankIterate:
    """One accepted iterate: masses, worst peak acceleration and worst stroke ratio.

    ``mass_ratios`` are m_j / M* of every candidate (zero where unused);
    ``frequency_hz`` and ``damping_ratio`` the candidates' tunings.

    Parameters
    ----------
    mass_ratio : float
        Total bank mass over the modal mass M* [-].
    mass_ratios : tuple of float
        m_j / M* of every candidate [-].
    frequency_hz : tuple of float
        Each candidate's own frequency [Hz].
    damping_ratio : tuple of float
        Each candidate's damping ratio [-], referred to its own frequency.
    peak_acceleration_m_s2 : float
        Worst peak acceleration over the scenarios [m/s^2].
    max_stroke_ratio : float
        Worst peak stroke over the stroke limit [-] (0 without a limit).
    step : float
        Fraction of the convex step taken (after back-offs) [-]; 0 at the start.
    status : str
        The convex solver's status for the step ("start" for the first iterate).
    """

    mass_ratio: float
    mass_ratios: tuple[float, ...]
    frequency_hz: tuple[float, ...]
    damping_ratio: tuple[float, ...]
    peak_acceleration_m_s2: float
    max_stroke_ratio: float
    step: float
    status: str


@dataclass(frozen=True)
class BankDesign:
    """A sized bank: the dampers in use and how the iteration went (SI).

    Parameters
    ----------
    mass_kg : numpy.ndarray
        Mass of each damper in the bank [kg].
    frequency_hz : numpy.ndarray
        Each damper's own frequency [Hz].
    damping_ratio : numpy.ndarray
        Each damper's damping ratio [-], referred to its own frequency.
    mass_ratio : float
        Total bank mass over M* [-].
    meets_target : bool
        Whether the bank meets the target in every scenario.
    governed_by : str
        "target" (a stationary point of the convex iteration) or "mass" (no
        scaling within the largest mass ratio meets the target).
    message : str
        The outcome in one plain sentence.
    history : tuple of BankIterate
        The accepted iterates, first to last.
    pruned : tuple of dict
        Members removed as too light, each with ``mass_kg``,
        ``frequency_hz`` and ``damping_ratio``.
    """

    mass_kg: np.ndarray
    frequency_hz: np.ndarray
    damping_ratio: np.ndarray
    mass_ratio: float
    meets_target: bool
    governed_by: str
    message: str
    history: tuple[BankIterate, ...] = field(default=())
    pruned: tuple[dict, ...] = field(default=())

    @property
    def absorbers(self) -> Absorbers:
        """The bank as the engine's absorbers (one design, every damper)."""
        return Absorbers.tuned_masses(self.mass_kg[None, :], self.frequency_hz[None, :],
                                      self.damping_ratio[None, :])

    @property
    def dampers(self) -> list[dict]:
        """Each damper's ``mass_kg``, ``frequency_hz`` and ``damping_ratio``, as dicts."""
        return [{"mass_kg": float(m), "frequency_hz": float(f), "damping_ratio": float(z)}
                for m, f, z in zip(self.mass_kg, self.frequency_hz, self.damping_ratio,
                                   strict=True)]


class _Problem:
    """The structure, load, scenarios and limits, with the engine check."""

    def __init__(self, loaded, target, max_stroke_m, factors, frequency_hz, damping_ratio,
                 stroke_loads=()):
        self.loaded, self.target, self.max_stroke = loaded, target, max_stroke_m
        self.s = np.asarray(factors, float)
        self.f = np.asarray(frequency_hz, float)
        self.zeta = np.asarray(damping_ratio, float)
        m = loaded.mode
        self.fs = self.s * m.frequency_hz
        # The band definition of every job (aerodynamic damping as 1/s).
        self.zeta_s = loaded.structure_damping_ratio(self.s)
        self.k0 = m.stiffness_n_per_m
        # Further loads the stroke limit applies to, in every scenario, each with its
        # own band damping (none without a limit).
        self.stroke_loads = tuple(
            (other, np.broadcast_to(other.structure_damping_ratio(self.s), self.s.shape))
            for other in (stroke_loads if max_stroke_m is not None else ()))

    def absorbers(self, mu, keep):
        m = self.loaded.mode
        shape = (self.s.size, int(keep.sum()))
        return Absorbers.tuned_masses(np.broadcast_to(mu[keep] * m.modal_mass_kg, shape),
                                      np.broadcast_to(self.f[keep], shape),
                                      np.broadcast_to(self.zeta[keep], shape))

    def assess(self, mu, keep, load=None, zeta_s=None, responses=None) -> Assessment:
        """Return the engine on every scenario, under the design load or a given one."""
        c = self.loaded if load is None else load
        zeta_s = self.zeta_s if zeta_s is None else zeta_s
        return assess(self.fs, c.mode.modal_mass_kg, zeta_s, self.absorbers(mu, keep),
                      c.spectrum, c.duration_s, shape_factor=c.shape_factor,
                      peak_method=c.peak_method, **({} if responses is None
                                                    else {"responses": responses}))

    def peak_strokes(self, mu, keep, a) -> np.ndarray:
        """Peak strokes [m], scenarios of the design load (``a``) then of each stroke load."""
        return np.concatenate([a.peak_stroke_m] + [
            self.assess(mu, keep, other, zeta_s, responses=("stroke",)).peak_stroke_m
            for other, zeta_s in self.stroke_loads], axis=0)

    def ratios(self, mu, keep):
        """Worst peak / target and worst stroke / limit over the scenarios (and stroke loads)."""
        a = self.assess(mu, keep)
        acc = float(np.max(a.peak_acceleration_m_s2)) / self.target
        used = mu[keep] > 0
        stroke = 0.0
        if self.max_stroke is not None and np.any(used):
            stroke = float(np.max(self.peak_strokes(mu, keep, a)[:, used])) / self.max_stroke
        return acc, stroke, a

    def feasible(self, mu, keep):
        # The target is met exactly (the one verdict comparison); the stroke
        # limit, a geometric allowance, within CHECK_TOLERANCE.
        _, stroke, a = self.ratios(mu, keep)
        return (meets_target(float(np.max(a.peak_acceleration_m_s2)), self.target)
                and stroke <= 1.0 + CHECK_TOLERANCE)


def size_tmd_bank(loaded: LoadedMode, target_peak_m_s2: float, *, max_mass_ratio: float,
                  max_stroke_m: float | None = None,
                  settings: BankSettings = BankSettings(),
                  frequency_ratios=None, damping_ratios=None,
                  stroke_loads: tuple[LoadedMode, ...] = ()) -> BankDesign:
    """Least total mass of a TMD bank chosen from a dictionary of tunings.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height, in every scenario
        [m/s^2].
    max_mass_ratio : float
        Largest total mass over M* [-].
    max_stroke_m : float, optional
        Peak stroke limit of every damper in use [m].
    settings : BankSettings
        Dictionary grid, scenarios and iteration limits.
    frequency_ratios, damping_ratios : array, optional
        An explicit list of candidates (equal lengths) instead of the grid.
    stroke_loads : tuple of LoadedMode
        Further loads (e.g. a longer return period's wind) under which every
        damper's peak stroke must also stay within ``max_stroke_m``, in every
        scenario.

    Returns
    -------
    BankDesign
        ``governed_by`` "target" (a stationary point of the convex-concave
        procedure), "mass" (no uniform scaling of the dictionary within
        max_mass_ratio meets the target) or "bare".

    Raises
    ------
    BankSolverError
        If a convex step fails, or is inaccurate and the engine rejects it.

    Notes
    -----
    See the module notes for the bound, the step, the back-off and pruning.
    """
    if frequency_ratios is None:
        ratios, zetas = settings.candidates()
    else:
        ratios, zetas = (np.atleast_1d(np.asarray(v, float)) for v in
                         (frequency_ratios, damping_ratios))
    problem = _Problem(loaded, target_peak_m_s2, max_stroke_m, settings.frequency_factors,
                       ratios * loaded.mode.frequency_hz, zetas, stroke_loads)
    n = ratios.size
    keep = np.ones(n, bool)
    bare_acc = float(np.max(problem.assess(np.zeros(n), keep).peak_acceleration_m_s2))
    if meets_target(bare_acc, target_peak_m_s2):
        return _design(problem, np.zeros(n), keep, True, "bare",
                       "the bare building already meets the target: no damper is needed", ())
    mu, keep = _feasible_start(problem, n, max_mass_ratio)
    if mu is None:
        top = np.full(n, max_mass_ratio / n)
        return _design(problem, top, np.ones(n, bool), False, "mass", (
            f"no uniform scaling of the {n} candidate dampers within total mass ratio "
            f"{max_mass_ratio:g} meets the target {target_peak_m_s2:.4g} m/s^2"
            + ("" if max_stroke_m is None else f" with peak strokes <= {max_stroke_m:g} m")
        ), ())
    history = [_iterate(problem, mu, keep, 0.0, "start")]
    for _ in range(settings.max_iterations):
        proposal, status, exact = _convex_step(problem, mu, keep)
        accepted = None
        step = 1.0
        for _ in range(MAX_BACKOFFS + 1):
            trial = mu + step * (proposal - mu)
            trial[trial < PRUNE_FRACTION * trial.sum()] = 0.0
            if trial.sum() <= mu.sum() and problem.feasible(trial, keep):
                accepted = trial
                break
            step *= 0.5
        if accepted is None:
            if not exact:
                raise BankSolverError(
                    f"the convex step ended '{status}' and no step towards it passes the "
                    "engine's re-check")
            break
        decrease = 1.0 - accepted.sum() / mu.sum()
        mu = accepted
        keep = keep & (mu > 0)
        history.append(_iterate(problem, mu, keep, step, status))
        if decrease < settings.tolerance:
            break
    mu, keep, pruned, note = _prune(problem, mu, keep, settings.prune_share, max_mass_ratio)
    return _design(problem, mu, keep, True, "target", (
        f"{int(keep.sum())} of {n} candidate dampers, total mass ratio {mu.sum():.5g}, meet the "
        f"target {target_peak_m_s2:.4g} m/s^2 in {problem.s.size} scenario(s) after "
        f"{len(history) - 1} convex steps (a stationary point, not necessarily the global least "
        f"mass){note}"), tuple(history), pruned)


def _prune(problem: _Problem, mu, keep, share, max_mass_ratio):
    """Remove members below ``share`` of the bank's mass; re-check with the engine.

    The remaining members keep their tunings and are scaled up together by
    the least factor (bisection, 30 engine checks at most) that passes the
    engine's re-check; if none within ``max_mass_ratio`` does, nothing is
    removed. Returns (mu, keep, pruned members as dicts, a note for the message).
    """
    small = keep & (mu > 0) & (mu < share * mu.sum())
    if not small.any():
        return mu, keep, (), ""
    rest_keep = keep & ~small
    rest = np.where(rest_keep, mu, 0.0)
    lo, hi = 1.0, max_mass_ratio / rest.sum()
    if not problem.feasible(rest * hi, rest_keep):
        return mu, keep, (), (
            f"; {int(small.sum())} member(s) below {share:g} of the bank's mass are kept, as "
            "the bank without them fails the engine's re-check")
    if problem.feasible(rest, rest_keep):
        hi = 1.0
    for _ in range(30):
        if hi - lo <= 1e-9 * hi:
            break
        mid = 0.5 * (lo + hi)
        lo, hi = (lo, mid) if problem.feasible(rest * mid, rest_keep) else (mid, hi)
    mass = problem.loaded.mode.modal_mass_kg
    pruned = tuple({"mass_kg": float(mu[j] * mass), "frequency_hz": float(problem.f[j]),
                    "damping_ratio": float(problem.zeta[j])} for j in np.flatnonzero(small))
    removed = sum(p["mass_kg"] for p in pruned)
    scaled = ("the other members pass unchanged" if hi == 1.0
              else f"the other members scaled by {hi:.6g} to pass")
    note = (f"; {len(pruned)} member(s) below {share:g} of the bank's mass (together "
            f"{removed:.4g} kg) were removed and {scaled} the engine's re-check")
    return rest * hi, rest_keep, pruned, note


def _feasible_start(problem: _Problem, n, max_mass_ratio):
    """Uniform masses, doubled until the engine says the target holds."""
    keep = np.ones(n, bool)
    total = max_mass_ratio / 2.0**12
    while True:
        mu = np.full(n, total / n)
        if problem.feasible(mu, keep):
            return mu, keep
        if total >= max_mass_ratio:
            break
        total = min(2.0 * total, max_mass_ratio)
    # At the largest mass, candidates whose own stroke breaks the limit are dropped.
    if problem.max_stroke is not None:
        for _ in range(n):
            mu = np.where(keep, max_mass_ratio / max(keep.sum(), 1), 0.0)
            acc, stroke, a = problem.ratios(mu, keep)
            if (meets_target(float(np.max(a.peak_acceleration_m_s2)), problem.target)
                    and stroke <= 1 + CHECK_TOLERANCE):
                return mu, keep
            worst = np.max(problem.peak_strokes(mu, keep, a), axis=0) > problem.max_stroke
            if not np.any(worst):
                break
            keep = keep.copy()
            keep[np.flatnonzero(keep)[worst]] = False
            if not keep.any():
                break
    return None, keep


def _convex_step(problem: _Problem, mu, keep):
    """One convex-concave step from mu.

    Returns (proposed masses, solver status, whether the status is exactly optimal).

    Notes
    -----
    The program is posed with each node's bound relative to |Z(m0)| there
    (see :func:`_linearised`); should CLARABEL stall on it (it ended
    'InsufficientProgress' at the optimum once, on a one-damper bank under a
    band-limited white force), the same program in unscaled form is solved
    before the step is declared failed.
    """
    failure = ""
    for relative in (True, False):
        proposal, status, failure = _solve_step(problem, mu, keep, relative)
        if proposal is not None:
            return proposal, status, status == "optimal"
    raise BankSolverError(failure)


def _solve_step(problem: _Problem, mu, keep, relative):
    """Solve the convex program of one step; (proposal, status, '') or (None, None, why)."""
    import cvxpy as cp  # here, not at module level: importing it takes ~1 s

    idx = np.flatnonzero(keep)
    x = cp.Variable(idx.size, nonneg=True)
    constraints = []
    loads = ((problem.loaded, problem.zeta_s, True),) + tuple(
        (other, zeta_s, False) for other, zeta_s in problem.stroke_loads)
    for load, zeta_s, design in loads:
        # The acceleration target under the design load; the stroke limit under every load.
        a, omega, w2, d, p, q, weight = _linearised(problem, load, zeta_s, mu, keep, idx,
                                                    relative)
        sigma_a = problem.target / (np.asarray(a.peak_factor) * load.shape_factor) * (
            1 - STEP_MARGIN)
        for k in range(problem.s.size):
            inverse_sq = cp.power(p[k] + q[k] @ x, -2)
            if design:
                acc_weight = weight[k] * omega[k] ** 4 / sigma_a[k] ** 2
                constraints.append(acc_weight @ inverse_sq <= 1.0)
            if problem.max_stroke is not None:
                g_r = a.peak_stroke_m[k] / a.sigma_stroke_m[k]
                limit = problem.max_stroke / g_r * (1 - STEP_MARGIN)
                stroke_weight = (np.abs(w2[k][:, None] / d[k]) ** 2 * weight[k][:, None]
                                 / limit**2).T
                constraints.append(stroke_weight @ inverse_sq <= 1.0)
    prob = cp.Problem(cp.Minimize(cp.sum(x)), constraints)
    try:
        with warnings.catch_warnings():
            # An inaccurate end is judged by the caller (status) and the engine's re-check.
            warnings.filterwarnings("ignore", "Solution may be inaccurate", UserWarning)
            prob.solve(solver=cp.CLARABEL)
    except cp.SolverError as exc:
        return None, None, f"the convex step failed in CLARABEL: {exc}"
    if prob.status not in (cp.OPTIMAL, cp.OPTIMAL_INACCURATE) or x.value is None:
        return None, None, (
            f"the convex step ended '{prob.status}' although the current design is feasible; "
            "the problem is badly scaled or the load spectrum is degenerate")
    proposal = np.zeros_like(mu)
    proposal[idx] = np.maximum(x.value, 0.0)
    return proposal, prob.status, ""


def _linearised(problem: _Problem, load: LoadedMode, zeta_s, mu, keep, idx, relative=True):
    """Return the engine's responses and the step's linearised impedance under one load.

    Returns the assessment at mu and, per scenario and grid node, omega,
    omega^2, the dampers' denominators d, and p, q of the linearised
    |z| / |z0| = p + q @ x (z = Z / k0 of the structure with the dampers), with
    the node weights times the load's spectrum / (k0 |z0|)^2; with ``relative``
    False, |z| = p + q @ x and the weights times the spectrum / k0^2.
    """
    m = load.mode
    a = problem.assess(mu, keep, load, zeta_s)
    absorbers = problem.absorbers(mu, keep)
    poles = closed_loop_poles(problem.fs, m.modal_mass_kg, zeta_s, absorbers)
    grid, weight = pole_grid(*resonances(poles), load.spectrum.f_min_hz, load.spectrum.f_max_hz)
    omega = TWO_PI * grid
    w2 = omega**2
    fs = problem.fs[:, None]
    # Nondimensional z = Z / k0 = base + coeff @ mu, per scenario and node.
    ks = (fs / m.frequency_hz) ** 2
    base = ks - w2 / (TWO_PI * m.frequency_hz) ** 2 + 2j * np.asarray(zeta_s)[:, None] * np.sqrt(
        ks) * (omega / (TWO_PI * m.frequency_hz))
    wa = TWO_PI * problem.f[idx]
    d = wa**2 - w2[..., None] + 2j * problem.zeta[idx] * wa * omega[..., None]
    transfer = 1.0 + w2[..., None] / d
    coeff = -(w2[..., None] / (TWO_PI * m.frequency_hz) ** 2) * transfer
    z0 = base + coeff @ mu[idx]
    # Each node's bound is divided by |z0| there: l / |z0| = 1 at mu and its weight is
    # that node's share of the current moment, whatever the frequency. Unscaled, |z| grows
    # as (f / f_s)^2 (1e7 at 1 kHz for a 0.18 Hz mode) while the weights fall as
    # f^-4 S_F; CLARABEL then reported 'optimal' for steps at which no constraint was
    # active (Kestrel Point: acceleration bound 0.95, stroke 0.13, mass 16% above the
    # step's optimum) and failed outright on a spectrum tabulated to 1 kHz.
    size = np.abs(z0) if relative else np.ones(z0.shape)
    unit = np.conj(z0) / (np.abs(z0) * size)
    p = np.real(unit * base)
    q = np.real(unit[..., None] * coeff)
    return a, omega, w2, d, p, q, weight * load.spectrum(grid) / problem.k0**2 / size**2


def _iterate(problem, mu, keep, step, status) -> BankIterate:
    acc, stroke, _ = problem.ratios(mu, keep)
    masses = np.where(keep, mu, 0.0)
    return BankIterate(float(masses.sum()), tuple(masses.tolist()), tuple(problem.f.tolist()),
                       tuple(problem.zeta.tolist()), acc * problem.target, stroke, step,
                       str(status))


def _design(problem, mu, keep, meets, governed, message, history, pruned=()) -> BankDesign:
    mass = problem.loaded.mode.modal_mass_kg
    used = keep & (mu > 0)
    return BankDesign(mass_kg=mu[used] * mass, frequency_hz=problem.f[used].copy(),
                      damping_ratio=problem.zeta[used].copy(), mass_ratio=float(mu[used].sum()),
                      meets_target=bool(meets), governed_by=governed, message=message,
                      history=history, pruned=pruned)
