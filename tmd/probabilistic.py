"""Probability that a TMD design misses its target when the building is uncertain.

The structure frequency factor s (f_s -> s f_s, M* held; see
:mod:`tmd.robust`) and, optionally, a factor e on the structure's damping
ratio (zeta_s -> e zeta_s(s)) are independent random variables with mean 1
and a given coefficient of variation (CoV), each a function of a standard
normal variable u:

* normal:     X = 1 + c u, floored at 0.02 (a tail of probability
  Phi(-0.98 / c), 1e-45 at c = 0.07, lumped there so the mode stays valid);
* lognormal:  X = exp(sigma u - sigma^2 / 2), sigma^2 = ln(1 + c^2), so that
  E[X] = 1 and sqrt(Var X) / E[X] = c exactly.

The exceedance probability P[a_peak(s, e) > target] is computed two ways:

* quadrature: conditional on the damping variable, the set of u_s where the
  target is exceeded is found by a grid in u_s on [-6, 6] (one engine call)
  and root-finding on a_peak = target between sign changes (Chandrupatla,
  ``scipy.optimize.elementwise.find_root``, batched), and its probability is
  integrated exactly as sums of Phi(u_hi) - Phi(u_lo): the indicator is
  discontinuous in s, so no polynomial rule is used across it. The
  conditional probability is continuous in the damping variable but has
  square-root kinks where an exceedance interval opens or closes; those are
  located and the damping variable is integrated by Gauss-Legendre panels
  between them (see :func:`_outer_expectation`). Gauss-Hermite in the damping
  variable was tried and converges slowly across such a kink (error ~5e-3 at
  16 nodes on the demo);
* seeded sampling (``numpy.random.Generator``) with its standard error
  sqrt(p (1 - p) / N).

References
----------
Ang, A. H.-S., Tang, W. H. (2007). Probability Concepts in Engineering,
2nd ed. Wiley. (Lognormal parameters from mean and CoV.)
Abramowitz, M., Stegun, I. A. (1964). Handbook of Mathematical Functions,
25.4.29-30 (Gauss-Legendre quadrature).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

import numpy as np
from numpy.polynomial.legendre import leggauss
from scipy.optimize.elementwise import find_root
from scipy.special import ndtr

from tmd.dampers.absorber import Absorbers
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.defaults import MAX_MASS_RATIO
from tmd.design import LoadedMode, TmdDesign, evaluate_tmd, tune
from tmd.performance import assess
from tmd.robust import StructureDamping, structure_damping_ratios
from tmd.schema import design_block

NORMAL_FLOOR = 0.02      # smallest factor a normal variable is allowed to take
STANDARD_NORMAL_SPAN = 6.0  # the u_s grid covers [-6, 6]; beyond, Phi < 1e-9
PANEL_SPLITS = (-2.0, 0.0, 2.0)     # fixed panel edges in the damping variable, besides its kinks
SAMPLE_CHUNK = 4000      # designs per engine call when sampling


class Distribution(StrEnum):
    """Distribution of a random factor of mean 1."""

    NORMAL = "normal"
    LOGNORMAL = "lognormal"

    def factor(self, standard_normal, cov: float):
        """The factor X(u) [-] for standard normal u and coefficient of variation ``cov``."""
        u = np.asarray(standard_normal, float)
        if self is Distribution.NORMAL:
            return np.maximum(1.0 + cov * u, NORMAL_FLOOR)
        sigma2 = math.log1p(cov**2)
        return np.exp(math.sqrt(sigma2) * u - 0.5 * sigma2)

    def kinks(self, cov: float) -> tuple[float, ...]:
        """Standard-normal values where X(u) is not smooth (the normal's floor)."""
        return ((NORMAL_FLOOR - 1.0) / cov,) if self is Distribution.NORMAL else ()


@dataclass(frozen=True)
class Uncertainty:
    """Random structure frequency (and damping) and what is asked of them.

    Parameters
    ----------
    frequency_cov : float
        CoV of the structure frequency factor s [-].
    damping_cov : float
        CoV of the structure damping factor e [-]; 0 keeps the damping fixed.
    distribution : Distribution or str
        "normal" or "lognormal", for both variables.
    exceedance_probability : float, optional
        Acceptable probability that the target is exceeded [-]; asks for the
        least mass that achieves it.
    seed : int
        Seed of the sampling estimate.
    sample_count : int
        Samples of the sampling estimate.
    inner_points : int
        Grid points in u_s on [-6, 6] before root-finding (spacing 0.1 at 121;
        a window of non-exceedance narrower than that is missed).
    panel_nodes : int
        Gauss-Legendre nodes per panel in the damping variable.
    """

    frequency_cov: float
    damping_cov: float = 0.0
    distribution: Distribution = Distribution.LOGNORMAL
    exceedance_probability: float | None = None
    seed: int = 1
    sample_count: int = 20000
    inner_points: int = 121
    panel_nodes: int = 12

    def __post_init__(self):
        object.__setattr__(self, "distribution", Distribution(self.distribution))
        if not self.frequency_cov > 0:
            raise ValueError(f"frequency_cov must be > 0, got {self.frequency_cov!r}")
        if not self.damping_cov >= 0:
            raise ValueError(f"damping_cov must be >= 0, got {self.damping_cov!r}")
        p = self.exceedance_probability
        if p is not None and not 0 < p < 1:
            raise ValueError(f"exceedance_probability must lie in (0, 1), got {p!r}")

    def inputs(self) -> dict:
        """The inputs as the ``probabilistic.inputs`` block."""
        return {"frequency_cov": self.frequency_cov, "damping_cov": self.damping_cov,
                "distribution": self.distribution.value,
                "exceedance_probability": self.exceedance_probability, "seed": self.seed,
                "sample_count": self.sample_count}


@dataclass(frozen=True)
class SampledProbability:
    """A sampling estimate of a probability with its standard error."""

    probability: float
    standard_error: float
    sample_count: int


@dataclass(frozen=True)
class ProbabilisticSizing:
    """Least mass for an acceptable exceedance probability.

    ``governed_by`` is "probability" (met exactly), "mass" (not reachable
    within the largest mass ratio) or "bare" (no damper needed).
    """

    design: TmdDesign | None
    exceedance_probability: float
    meets_probability: bool
    governed_by: str
    message: str


# --- one call per job -------------------------------------------------------

def probabilistic_study(loaded: LoadedMode, nominal: TunedMassDamper, target_peak_m_s2: float,
                        uncertainty: Uncertainty, *, robust: TunedMassDamper | None = None,
                        max_mass_ratio: float = MAX_MASS_RATIO, max_stroke_m: float | None = None,
                        structure_damping_ratio: StructureDamping | None = None) -> dict:
    """The ``probabilistic`` block: exceedance probabilities and the least mass for one.

    Parameters
    ----------
    loaded : LoadedMode
    nominal, robust : TunedMassDamper
        The nominal design and (optionally) the band-robust one.
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    uncertainty : Uncertainty
    max_mass_ratio : float
        Largest mass ratio of the least-mass search [-].
    max_stroke_m : float, optional
        Peak stroke limit [m] of the nominal tuning inside that search.
    structure_damping_ratio : callable, optional
        zeta_s(s) [-] before the damping factor e multiplies it.

    Returns
    -------
    dict
        ``inputs`` (:meth:`Uncertainty.inputs`); ``nominal`` and ``robust``
        (None without one), each with ``exceedance_probability`` (quadrature),
        ``exceedance_probability_sampled`` and ``sampling_standard_error``;
        ``least_mass_design`` (None unless an acceptable probability is given):
        the fields of the ``design`` block plus ``exceedance_probability``,
        ``meets_probability``, ``governed_by`` and ``message``.
    """
    def block(damper):
        if damper is None:
            return None
        sampled = sampled_exceedance_probability(loaded, damper, target_peak_m_s2, uncertainty,
                                                 structure_damping_ratio=structure_damping_ratio)
        return {"exceedance_probability": exceedance_probability(
                    loaded, damper, target_peak_m_s2, uncertainty,
                    structure_damping_ratio=structure_damping_ratio),
                "exceedance_probability_sampled": sampled.probability,
                "sampling_standard_error": sampled.standard_error}

    sized = None
    if uncertainty.exceedance_probability is not None:
        s = least_mass_for_probability(loaded, target_peak_m_s2, uncertainty,
                                       max_mass_ratio=max_mass_ratio, max_stroke_m=max_stroke_m,
                                       structure_damping_ratio=structure_damping_ratio)
        sized = design_block(s.design) | {
            "exceedance_probability": s.exceedance_probability,
            "meets_probability": s.meets_probability, "governed_by": s.governed_by,
            "message": s.message}
    return {"inputs": uncertainty.inputs(), "nominal": block(nominal), "robust": block(robust),
            "least_mass_design": sized}


def exceedance_probability(loaded: LoadedMode, damper: TunedMassDamper | None,
                           target_peak_m_s2: float, uncertainty: Uncertainty, *,
                           structure_damping_ratio: StructureDamping | None = None) -> float:
    """P[a_peak > target] over the random structure frequency (and damping), by quadrature.

    Parameters
    ----------
    loaded : LoadedMode
    damper : TunedMassDamper or None
        The design (absolute m_d, k_d, c_d kept); None for the bare building.
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    uncertainty : Uncertainty
    structure_damping_ratio : callable, optional
        zeta_s(s) [-] before the damping factor e multiplies it.

    Returns
    -------
    float
        The exceedance probability [-].

    Notes
    -----
    P = integral of phi(u_d) P(u_d) du_d, P(u_d) = sum [Phi(u_hi) - Phi(u_lo)]
    over the segments of u_s on which a_peak(s(u_s), e(u_d)) > target. The
    segment ends are roots of a_peak = target, located on a grid of spacing
    12 / (inner_points - 1) and solved to 1e-10 in u_s (an excursion
    narrower than the grid spacing is missed); the integral over u_d is by
    Gauss-Legendre panels cut at the kinks of P(u_d). Accuracy on the demo:
    ~1e-7 (lognormal) to ~1e-5 against 32 nodes per panel.
    """
    def excess(u_s, u_d):
        return _peak_excess(loaded, damper, target_peak_m_s2, uncertainty, u_s, u_d,
                            structure_damping_ratio)

    def conditional(u_d):
        return _conditional_probability(excess, u_d, uncertainty.inner_points)

    def root_count(u_d):
        return _sign_changes(excess, u_d, uncertainty.inner_points)[0]

    if uncertainty.damping_cov == 0:
        return float(conditional(np.zeros(1))[0])
    return _outer_expectation(conditional, root_count, uncertainty.panel_nodes,
                              uncertainty.distribution.kinks(uncertainty.damping_cov))


def sampled_exceedance_probability(loaded: LoadedMode, damper: TunedMassDamper | None,
                                   target_peak_m_s2: float, uncertainty: Uncertainty, *,
                                   structure_damping_ratio: StructureDamping | None = None
                                   ) -> SampledProbability:
    """P[a_peak > target] by seeded sampling, with its standard error.

    Notes
    -----
    N pairs of independent standard normals (u_s, u_d) are drawn from
    ``numpy.random.default_rng(seed)`` (both always drawn, so the frequency
    sample does not depend on whether damping is random);
    p = (1/N) sum 1[a_peak > target], standard error sqrt(p (1 - p) / N).
    """
    rng = np.random.default_rng(uncertainty.seed)
    n = uncertainty.sample_count
    u = rng.standard_normal((n, 2))
    u_d = u[:, 1] if uncertainty.damping_cov > 0 else np.zeros(n)
    hits = 0
    for start in range(0, n, SAMPLE_CHUNK):
        chunk = slice(start, start + SAMPLE_CHUNK)
        hits += int(np.count_nonzero(_peak_excess(loaded, damper, target_peak_m_s2, uncertainty,
                                                  u[chunk, 0], u_d[chunk],
                                                  structure_damping_ratio) > 0))
    p = hits / n
    return SampledProbability(p, math.sqrt(p * (1.0 - p) / n), n)


def least_mass_for_probability(loaded: LoadedMode, target_peak_m_s2: float,
                               uncertainty: Uncertainty, *, max_mass_ratio: float,
                               max_stroke_m: float | None = None, min_mass_ratio: float = 1e-4,
                               structure_damping_ratio: StructureDamping | None = None
                               ) -> ProbabilisticSizing:
    """Least mass whose exceedance probability is the acceptable one.

    Parameters
    ----------
    loaded : LoadedMode
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    uncertainty : Uncertainty
        With ``exceedance_probability`` set.
    max_mass_ratio, min_mass_ratio : float
        Search range of the mass ratio [-].
    max_stroke_m : float, optional
        Peak stroke limit [m] inside the nominal tuning.
    structure_damping_ratio : callable, optional
        zeta_s(s) [-].

    Returns
    -------
    ProbabilisticSizing

    Notes
    -----
    At each mass ratio the TMD has the nominal-optimal tuning
    (:func:`tmd.design.tune` on the nominal structure, with the stroke
    limit); only the mass is searched, by a bracketing root search
    (Chandrupatla's, ``scipy.optimize.elementwise.find_root``, returning
    the bracket end that meets it) on P(mu) - P_acceptable with P by
    :func:`exceedance_probability`. Re-optimising the tuning for the
    probability would need less mass; this answers "how much more mass does
    the nominal sizing need".
    """
    accept = uncertainty.exceedance_probability
    if accept is None:
        raise ValueError("the uncertainty gives no acceptable exceedance_probability")

    def probability(damper):
        return exceedance_probability(loaded, damper, target_peak_m_s2, uncertainty,
                                      structure_damping_ratio=structure_damping_ratio)

    def damper_at(mu):
        t = tune(loaded, mu, max_stroke_m=max_stroke_m)
        return TunedMassDamper(mu, t.frequency_ratio, t.damping_ratio)

    bare = probability(None)
    if bare <= accept:
        return ProbabilisticSizing(None, bare, True, "bare", (
            f"the bare building exceeds the target with probability {bare:.3g}, within the "
            f"acceptable {accept:.3g}: no damper is needed"))
    top = damper_at(max_mass_ratio)
    p_top = probability(top)
    if p_top > accept:
        return ProbabilisticSizing(evaluate_tmd(loaded, top, target_peak_m_s2), p_top, False,
                                   "mass", (
            f"even the largest mass ratio allowed, {max_mass_ratio:g}, exceeds the target with "
            f"probability {p_top:.3g} > {accept:.3g}"))
    def gap(mu):
        return np.reshape([probability(damper_at(float(m))) - accept for m in np.ravel(mu)],
                          np.shape(mu))

    # Chandrupatla's bracketing root; the answer is the bracket end that meets
    # the acceptable probability, so that the verdict below holds by construction.
    res = find_root(gap, (min_mass_ratio, max_mass_ratio),
                    tolerances={"xatol": 1e-10, "xrtol": 1e-8})
    mu = min(float(x) for x, g in zip(res.bracket, res.f_bracket, strict=True) if g <= 0)
    damper = damper_at(mu)
    p = probability(damper)
    return ProbabilisticSizing(evaluate_tmd(loaded, damper, target_peak_m_s2), p, True,
                               "probability", (
        f"least mass ratio {mu:.5g} (nominal-optimal tuning) exceeds the target with "
        f"probability {p:.3g}, the acceptable {accept:.3g}"))


# --- pure numpy helpers -------------------------------------------------------

def _outer_expectation(conditional, root_count, panel_nodes, kinks=()):
    """E[P(v)] over standard normal v of a conditional probability with kinks.

    P(v) is smooth except where an exceedance interval in the inner variable
    appears or vanishes (the root count changes), where it has a square-root
    kink. The kinks are bracketed on a grid of v (spacing 0.5) and bisected
    to ~3e-5 (a kink misplaced by d costs ~d^1.5); [-6, 6] is cut there, at
    ``kinks`` (the normal's floor) and at -2, 0, 2, and each panel [a, b]
    is integrated by Gauss-Legendre (``numpy.polynomial.legendre.leggauss``)
    in t with
    v = a + (b - a)(3 t^2 - 2 t^3), whose zero slope at both ends
    makes a square-root end behaviour smooth in t. Beyond +/-6 the
    probability mass (2e-9) is dropped.
    """
    coarse = np.linspace(-STANDARD_NORMAL_SPAN, STANDARD_NORMAL_SPAN, 25)
    counts = root_count(coarse)
    jump = np.flatnonzero(counts[1:] != counts[:-1])
    lo, hi, count_lo = coarse[jump], coarse[jump + 1], counts[jump]
    for _ in range(14 if jump.size else 0):
        mid = 0.5 * (lo + hi)
        same = root_count(mid) == count_lo
        lo, hi = np.where(same, mid, lo), np.where(same, hi, mid)
    edges = np.unique(np.concatenate([[-STANDARD_NORMAL_SPAN, STANDARD_NORMAL_SPAN],
                                      PANEL_SPLITS, kinks, 0.5 * (lo + hi)]))
    edges = edges[np.abs(edges) <= STANDARD_NORMAL_SPAN]
    t, w = leggauss(panel_nodes)
    t, w = 0.5 * (t + 1.0), 0.5 * w
    a, width = edges[:-1, None], np.diff(edges)[:, None]
    v = a + width * (3 * t**2 - 2 * t**3)
    dv = width * 6 * t * (1 - t)
    p = conditional(v.ravel()).reshape(v.shape)
    density = np.exp(-0.5 * v**2) / math.sqrt(2 * math.pi)
    return float(np.sum(p * density * dv * w))


def _sign_changes(excess, outer, points):
    """Root counts per outer node, and the grid, signs and brackets they come from."""
    u = np.linspace(-STANDARD_NORMAL_SPAN, STANDARD_NORMAL_SPAN, points)
    over = excess(u[None, :], outer[:, None]) > 0
    node, left = np.nonzero(over[:, 1:] != over[:, :-1])
    return np.bincount(node, minlength=outer.size), u, over, node, left


def _conditional_probability(excess, outer, points):
    """P[excess(u, v) > 0] over standard normal u, for each v in ``outer``.

    A grid in u on [-6, 6] (one call of ``excess`` for all of it) brackets the
    sign changes, Chandrupatla's method (batched) finds the roots, and the
    probability is the sum of Phi(u_hi) - Phi(u_lo) over the segments where
    the excess is positive; beyond the grid the end points' signs hold.
    """
    _, u, over, node, left = _sign_changes(excess, outer, points)
    roots = np.empty(0)
    if node.size:
        roots = find_root(excess, (u[left], u[left + 1]), args=(outer[node],),
                          tolerances={"xatol": 1e-10, "xrtol": 0.0}).x
    conditional = np.empty(outer.size)
    for k in range(outer.size):
        edges = np.concatenate([[-np.inf], np.sort(roots[node == k]), [np.inf]])
        # The first segment has the sign of the first grid point; each root flips it.
        exceeded = over[k, 0] ^ (np.arange(edges.size - 1) % 2 == 1)
        conditional[k] = np.sum(np.diff(ndtr(edges))[exceeded])
    return conditional


def _peak_excess(loaded, damper, target, uncertainty, u_s, u_d, damping):
    """a_peak / target - 1 at standard-normal (u_s, u_d), broadcast; one engine call."""
    u_s, u_d = np.broadcast_arrays(np.asarray(u_s, float), np.asarray(u_d, float))
    dist = uncertainty.distribution
    s = dist.factor(u_s, uncertainty.frequency_cov)
    zeta = structure_damping_ratios(loaded, s, damping)
    if uncertainty.damping_cov > 0:
        zeta = zeta * dist.factor(u_d, uncertainty.damping_cov)
    m = loaded.mode
    absorbers = Absorbers.none(s.shape) if damper is None else damper.absorbers(m)
    a = assess(s * m.frequency_hz, m.modal_mass_kg, zeta, absorbers, loaded.spectrum,
               loaded.duration_s, shape_factor=loaded.shape_factor, responses=("acceleration",))
    return a.peak_acceleration_m_s2 / target - 1.0
