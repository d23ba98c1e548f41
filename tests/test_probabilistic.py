"""Exceedance probabilities under an uncertain structure frequency and damping.

References are scipy.stats (distribution functions and sampling), scipy's
brentq on the engine's peak, and seeded sampling. The load case is the
fictional demo's force spectrum on a 0.17 Hz, 1.9e7 kg, 1.2% mode.
"""

from pathlib import Path

import numpy as np
import pytest
from scipy import stats
from scipy.optimize import brentq

from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, least_mass, tune
from tmd.robust import assess_structure_factors
from tmd.robust.probabilistic import (
    Distribution,
    Uncertainty,
    exceedance_probability,
    least_mass_for_probability,
    probabilistic_study,
    sampled_exceedance_probability,
)
from tmd.spectra import read_force_psd_csv
from tmd.structure import Mode

CSV = Path(__file__).resolve().parents[1] / "cases" / "harbourline_force.csv"
TARGET = 0.10

pytestmark = pytest.mark.filterwarnings("ignore::tmd.performance.UpperEdgeWarning")


@pytest.fixture(scope="module")
def case():
    return LoadedMode(Mode(0.17, 1.9e7, 0.012), read_force_psd_csv(CSV), 600.0)


@pytest.fixture(scope="module")
def damper(case):
    return least_mass(case, TARGET, max_mass_ratio=0.05).design.damper


@pytest.mark.parametrize("cov", [0.07, 0.3])
def test_lognormal_has_mean_one_and_the_given_cov(cov):
    # Lognormal with E[X] = 1 and CoV c: sigma^2 = ln(1 + c^2), mu = -sigma^2/2
    # (Ang & Tang 2007). Reference: scipy.stats.lognorm's moments and
    # quantiles; X(u) must be its quantile at Phi(u) (rounding only).
    sigma = np.sqrt(np.log1p(cov**2))
    ref = stats.lognorm(s=sigma, scale=np.exp(-0.5 * sigma**2))
    mean, var = ref.stats(moments="mv")
    assert mean == pytest.approx(1.0, rel=1e-14)
    assert np.sqrt(var) == pytest.approx(cov, rel=1e-13)
    u = np.linspace(-4, 4, 9)
    assert Distribution.LOGNORMAL.factor(u, cov) == pytest.approx(ref.ppf(stats.norm.cdf(u)),
                                                                  rel=1e-12)
    assert Distribution.NORMAL.factor(u, 0.07) == pytest.approx(1 + 0.07 * u, rel=1e-15)


def test_frequency_only_quadrature_matches_scipy_cdf_between_roots(case, damper):
    # Independent reference: the band of s where the target is met, its ends
    # found by scipy.optimize.brentq on the engine's peak (one design at a
    # time), and P = F(s_lo) + 1 - F(s_hi) with scipy.stats.lognorm's CDF.
    # For this design the peak dips below the target on one window around
    # s = 1 (peak 0.10 at s = 1 by construction, lower just above).
    # Both solve the same roots to ~1e-10: agreement to 1e-8.
    target = 0.11
    unc = Uncertainty(0.07, distribution="lognormal")

    def gap(s):
        return assess_structure_factors(case, damper, np.array([s]))[0] \
            .peak_acceleration_m_s2[0] - target

    s_lo = brentq(gap, 0.8, 1.0, xtol=1e-13)
    s_hi = brentq(gap, 1.0, 1.3, xtol=1e-13)
    sigma = np.sqrt(np.log1p(0.07**2))
    ref = stats.lognorm(s=sigma, scale=np.exp(-0.5 * sigma**2))
    expected = ref.cdf(s_lo) + ref.sf(s_hi)
    assert exceedance_probability(case, damper, target, unc) == pytest.approx(expected, abs=1e-8)


@pytest.mark.parametrize("distribution, damping_cov, target", [
    ("lognormal", 0.0, 0.11),
    ("lognormal", 0.3, 0.11),
    ("normal", 0.3, 0.10),
])
def test_quadrature_agrees_with_seeded_sampling(case, damper, distribution, damping_cov,
                                                target):
    # Issue 4: the quadrature agrees with seeded sampling within its sampling
    # error. With N = 20000 the sampled p is, by the central limit theorem,
    # ~N(p, p(1 - p)/N); a correct quadrature lies within 3 standard errors
    # with probability 99.7%, and the seed makes the check deterministic.
    # The target 0.10 case is the hardest for the quadrature (the nominal
    # design sits exactly at the target, so the conditional probability has a
    # kink in the damping variable).
    # Issue "Speed" asks for the 99% interval: z = 2.576 (scipy.stats.norm.ppf(0.995)).
    unc = Uncertainty(0.07, damping_cov, distribution, seed=2024)
    quad = exceedance_probability(case, damper, target, unc)
    sampled = sampled_exceedance_probability(case, damper, target, unc)
    assert 0.05 < sampled.probability < 0.95  # the check has power: SE ~ 3e-3
    z99 = stats.norm.ppf(0.995)
    assert abs(quad - sampled.probability) < z99 * sampled.standard_error


def test_library_sampling_matches_scipy_stats_sampling(case, damper):
    # The sampling path against one built from scipy.stats.lognorm.rvs (its
    # own random stream) and the engine directly: two independent samples of
    # 20000, so their difference has standard error sqrt(2) SE; 3 of those.
    unc = Uncertainty(0.07, seed=5)
    mine = sampled_exceedance_probability(case, damper, 0.11, unc)
    sigma = np.sqrt(np.log1p(0.07**2))
    s = stats.lognorm(s=sigma, scale=np.exp(-0.5 * sigma**2)).rvs(
        size=20000, random_state=np.random.default_rng(99))
    peaks = assess_structure_factors(case, damper, s)[0].peak_acceleration_m_s2
    theirs = np.mean(peaks > 0.11)
    assert abs(mine.probability - theirs) < 3 * np.sqrt(2) * mine.standard_error


class _DesignCounter:
    """Counts the designs every engine call of tmd.robust.probabilistic evaluates."""

    def __init__(self, monkeypatch):
        import tmd.robust.probabilistic as module

        self.designs, inner = 0, module.assess

        def counted(*args, **kwargs):
            result = inner(*args, **kwargs)
            self.designs += np.size(result.peak_acceleration_m_s2)
            return result

        monkeypatch.setattr(module, "assess", counted)


@pytest.mark.parametrize("damping_cov, distribution", [(0.0, "lognormal"), (0.3, "lognormal"),
                                                       (0.3, "normal")])
def test_exceedance_probability_costs_at_most_five_sweeps(case, damper, monkeypatch,
                                                          damping_cov, distribution):
    # Budget of issue "Speed" (Precisions): at most 5 sweeps' worth of designs,
    # a sweep being tmd.robust's 41-point detuning sweep; was 15,000+ designs
    # with random damping. The answer must still be a probability of the
    # exceedance seen on the sweep (peak > target at some s -> P > 0).
    from tmd.robust.sweeps import SWEEP_POINTS

    counter = _DesignCounter(monkeypatch)
    p = exceedance_probability(case, damper, 0.11, Uncertainty(0.07, damping_cov, distribution))
    assert 0 < counter.designs <= 5 * SWEEP_POINTS
    assert 0.05 < p < 0.95


def test_least_mass_for_an_acceptable_probability(case):
    # Its own definition: the returned design exceeds the target with the
    # acceptable probability (brentq to 1e-10 in mu: 1e-6 in probability),
    # and 2% less mass (nominal-optimal tuning, tmd.design.tune) exceeds it.
    unc = Uncertainty(0.07, exceedance_probability=0.10)
    sized = least_mass_for_probability(case, TARGET, unc, max_mass_ratio=0.2)
    assert sized.governed_by == "probability" and sized.meets_probability
    assert sized.exceedance_probability == pytest.approx(0.10, abs=1e-6)
    d = sized.design
    assert exceedance_probability(case, d.damper, TARGET, unc) == pytest.approx(0.10, abs=1e-6)
    t = tune(case, 0.98 * d.mass_ratio)
    lighter = TunedMassDamper(0.98 * d.mass_ratio, t.frequency_ratio, t.damping_ratio)
    assert exceedance_probability(case, lighter, TARGET, unc) > 0.10


def test_warm_started_mass_search_finds_the_same_mass_with_few_designs(case, monkeypatch):
    # The same root from the nominal least mass as from the full range
    # (both stop within 1e-5 in logit P; measured 3e-7 apart in mass). Cost:
    # issue "Speed" (Precisions) allows 5 sweeps' worth of designs for the
    # whole search, bare building included (measured 186 designs, 4.5
    # sweeps; was 374 before the grid-interpolated steps, 217,204 on the
    # Kestrel demo before that). The nominal tunings at each mass are not
    # counted: they are the design, not the probability.
    from tmd.robust.sweeps import SWEEP_POINTS

    unc = Uncertainty(0.07, exceedance_probability=0.10)
    cold = least_mass_for_probability(case, TARGET, unc, max_mass_ratio=0.2)
    counter = _DesignCounter(monkeypatch)
    start = least_mass(case, TARGET, max_mass_ratio=0.2).design.mass_ratio
    warm = least_mass_for_probability(case, TARGET, unc, max_mass_ratio=0.2,
                                      start_mass_ratio=start)
    assert warm.design.mass_ratio == pytest.approx(cold.design.mass_ratio, rel=1e-6)
    assert warm.exceedance_probability <= 0.10 and warm.meets_probability
    assert counter.designs <= 5 * SWEEP_POINTS


@pytest.mark.parametrize("distribution", ["lognormal", "normal"])
def test_mass_search_with_random_damping_costs_at_most_five_sweeps(case, monkeypatch,
                                                                   distribution):
    # Issue "Speed" (Precisions): the least mass for an exceedance probability
    # with damping_cov > 0 in at most 5 sweeps' worth of designs (was 1,350 to
    # 1,500 designs, 33 to 37 sweeps; measured 169). Its probability agrees
    # with the seeded sampling check within the check's 99% interval
    # (z = 2.576, scipy.stats.norm.ppf(0.995)), and the search stops on the
    # meeting side within 1e-2 in logit P (the tensor grid's own accuracy,
    # about 1e-3 in P).
    from tmd.robust.sweeps import SWEEP_POINTS

    unc = Uncertainty(0.07, 0.3, distribution, exceedance_probability=0.10, seed=2024)
    start = least_mass(case, TARGET, max_mass_ratio=0.2).design.mass_ratio
    counter = _DesignCounter(monkeypatch)
    sized = least_mass_for_probability(case, TARGET, unc, max_mass_ratio=0.2,
                                       start_mass_ratio=start)
    assert 0 < counter.designs <= 5 * SWEEP_POINTS
    assert sized.governed_by == "probability" and sized.meets_probability
    assert 0.10 * (1 - 1.1e-2) <= sized.exceedance_probability <= 0.10
    sampled = sampled_exceedance_probability(case, sized.design.damper, TARGET, unc)
    z99 = stats.norm.ppf(0.995)
    assert abs(sized.exceedance_probability - sampled.probability) < z99 * sampled.standard_error


def test_probabilistic_block_keys(case, damper):
    # The output: inputs, exceedance probabilities of the designs, and
    # the least-mass design (None unless an acceptable probability is given).
    unc = Uncertainty(0.07, sample_count=2000)
    block = probabilistic_study(case, damper, TARGET, unc)
    assert set(block) == {"inputs", "nominal", "robust", "least_mass_design"}
    assert block["inputs"] == {"frequency_cov": 0.07, "damping_cov": 0.0,
                               "distribution": "lognormal", "exceedance_probability": None,
                               "seed": 1, "sample_count": 2000}
    assert block["robust"] is None and block["least_mass_design"] is None
    nominal = block["nominal"]
    # Designed exactly at the target at s = 1: it is exceeded for most s.
    assert 0.5 < nominal["exceedance_probability"] < 1.0
    assert nominal["sampling_standard_error"] > 0


def test_least_mass_for_probability_holds_the_stroke_limit_at_the_stroke_load(case):
    # Issue 11: with [damper] stroke_return_period_years the stroke limit
    # constrains every tuning at that wind as well; here that wind is the
    # same mode under 9x the force spectrum (a stronger return period). The
    # limit is 80% of the unconstrained design's stroke under it, so it binds
    # there only: the design load's own stroke stays far below it.
    from tmd.spectra import TabulatedSpectrum

    load = case.spectrum
    extreme = LoadedMode(case.mode, TabulatedSpectrum(load.frequency_hz,
                                                      9.0 * load.psd_n2_per_hz), 600.0)
    unc = Uncertainty(0.07, exceedance_probability=0.10)

    def stroke(loaded, design):
        return float(np.max(loaded.assess(design.damper.absorbers(loaded.mode)).peak_stroke_m))

    free = least_mass_for_probability(case, TARGET, unc, max_mass_ratio=0.2).design
    limit = 0.8 * stroke(extreme, free)
    assert stroke(case, free) < 0.6 * limit
    held = least_mass_for_probability(case, TARGET, unc, max_mass_ratio=0.2,
                                      max_stroke_m=limit, stroke_loads=(extreme,))
    assert held.meets_probability
    # tune keeps an active stroke limit 1e-7 inside it (tmd.design STROKE_MARGIN).
    assert stroke(extreme, held.design) <= limit
    assert held.design.mass_ratio > free.mass_ratio


@pytest.mark.parametrize("distribution", ["normal", "lognormal"])
def test_tensor_interpolant_from_spline_coefficients_is_the_spline_of_interpolated_rows(
        distribution):
    # The random-damping probability interpolates the grid's excess by a cubic
    # spline in u_s (linear in its data) of a barycentric interpolant in u_d
    # (linear in its values), so the engine forms one spline and weights its
    # coefficients. Reference: scipy's CubicSpline built afresh through each
    # interpolated row (BarycentricInterpolator), as before; rtol 1e-12
    # (rounding only). The excess is a smooth field with crossings that move
    # with u_d and vanish past u_d = 2 (a kink), so that the kink search and its
    # panels take part.
    from scipy.interpolate import BarycentricInterpolator

    import tmd.robust.probabilistic as prob

    unc = Uncertainty(0.07, 0.3, distribution)
    u_s, u_d = prob._tensor_nodes(unc)
    s, d = np.meshgrid(u_s, u_d)
    values = 0.8 + 0.1 * d - np.exp(-0.5 * ((s - 0.4 * d) / 1.3) ** 2)
    lo, hi = prob._damping_span(unc)
    rows = BarycentricInterpolator(u_d, values, axis=0)

    def curves(v):
        return rows(np.clip(np.asarray(v, float), lo, hi))

    want = prob._outer_expectation(
        lambda v: prob._spline_crossings(u_s, curves(v))[0],
        lambda v: prob._spline_crossings(u_s, curves(v))[1],
        unc.panel_nodes, unc.distribution.kinks(unc.damping_cov))
    got = prob._grid_probability(unc, values)
    assert 0.05 < want < 0.95
    assert got == pytest.approx(want, rel=1e-12)
