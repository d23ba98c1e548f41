"""Detuning sweeps, band maximum and robust design, against independent evaluations.

The load case is the fictional demo's modal force spectrum
(cases/harbourline_force.csv) on a 0.17 Hz, 1.9e7 kg, 1.2% mode: realistic
numbers for a ~170 m residential tower.
"""

from pathlib import Path

import numpy as np
import pytest

from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, bare_response, evaluate_tmd, least_mass, tune
from tmd.robust import (
    AerodynamicDamping,
    assess_structure_factors,
    factor_grid,
    peak_acceleration_band_max,
    robust_least_mass,
    robustness_study,
    sweep_damper_damping,
    sweep_damper_frequency,
    sweep_structure_frequency,
    tune_for_band,
)
from tmd.spectra import read_force_psd_csv
from tmd.structure import Mode

CSV = Path(__file__).resolve().parents[1] / "cases" / "harbourline_force.csv"
TARGET = 0.10  # m/s^2
BAND = 0.15

pytestmark = pytest.mark.filterwarnings("ignore::tmd.performance.UpperEdgeWarning")


@pytest.fixture(scope="module")
def case():
    return LoadedMode(Mode(0.17, 1.9e7, 0.012), read_force_psd_csv(CSV), 600.0)


@pytest.fixture(scope="module")
def nominal(case):
    return least_mass(case, TARGET, max_mass_ratio=0.05).design


@pytest.fixture(scope="module")
def study(case, nominal):
    return robustness_study(case, nominal.damper, TARGET, frequency_band=BAND,
                            max_mass_ratio=0.12)


def _at_one(points, key):
    (point,) = [p for p in points if p[key] == 1.0]
    return point


def test_sweep_at_nominal_equals_the_nominal_evaluation(case, nominal, study):
    # Issue 4: the sweep at s = 1 equals the nominal evaluation
    # (tmd.design.evaluate_tmd). Same engine, one design inside a batch: the
    # pole-clustered grid is built per design, so agreement is to rounding
    # (rtol 1e-12); the effective damping is a root found to xrtol 1e-12.
    for points, key in ((study["sweep"], "structure_frequency_factor"),
                        (study["sweep_damper_frequency"], "damper_frequency_factor"),
                        (study["sweep_damper_damping"], "damper_damping_factor")):
        p = _at_one(points, key)
        assert p["peak_acceleration_m_s2"] == pytest.approx(nominal.peak_acceleration_m_s2,
                                                            rel=1e-12)
        assert p["peak_stroke_m"] == pytest.approx(nominal.peak_stroke_m, rel=1e-12)
        assert p["effective_damping_ratio"] == pytest.approx(nominal.effective_damping_ratio,
                                                             rel=1e-9)
    bare = _at_one(study["sweep_bare"], "structure_frequency_factor")
    assert bare["peak_acceleration_m_s2"] == pytest.approx(
        bare_response(case).peak_acceleration_m_s2, rel=1e-12)


def test_detuned_point_keeps_the_damper_absolute(case, nominal):
    # Issue 4 definition: s scales f_s with M* fixed (k_s by s^2); the damper
    # keeps its absolute mass, spring and dashpot. Independently: the same
    # physical damper described on the mode of frequency s f_s has frequency
    # ratio f_d / (s f_s) and the same zeta_d; its spring and dashpot (hand
    # formulas k = m w^2, c = 2 zeta m w) must be unchanged.
    s = 0.9
    points = sweep_structure_frequency(case, nominal.damper, sweep_range=0.1, points=3)
    assert [p["structure_frequency_factor"] for p in points] == pytest.approx([0.9, 1.0, 1.1])
    m = case.mode
    mode_s = Mode(s * m.frequency_hz, m.modal_mass_kg, m.damping_ratio)
    same = TunedMassDamper(nominal.mass_ratio, nominal.frequency_ratio / s,
                           nominal.damping_ratio)
    assert same.stiffness_n_per_m(mode_s) == pytest.approx(nominal.stiffness_n_per_m, rel=1e-14)
    assert same.damping_n_s_per_m(mode_s) == pytest.approx(nominal.damping_n_s_per_m, rel=1e-14)
    ref = evaluate_tmd(LoadedMode(mode_s, case.spectrum, case.duration_s), same)
    # Same physical system through another path of the API: rounding only.
    assert points[0]["peak_acceleration_m_s2"] == pytest.approx(ref.peak_acceleration_m_s2,
                                                                rel=1e-10)
    assert points[0]["peak_stroke_m"] == pytest.approx(ref.peak_stroke_m, rel=1e-10)
    assert points[0]["effective_damping_ratio"] == pytest.approx(ref.effective_damping_ratio,
                                                                 rel=1e-8)
    # A detuned TMD helps less: a fact of the trade (common practice).
    assert points[0]["peak_acceleration_m_s2"] > points[1]["peak_acceleration_m_s2"]


def test_bare_sweep_with_aerodynamic_damping(case):
    # zeta_s(s) = zeta_struct + zeta_aero / s (aerodynamic damping ~ 1/n_1,
    # EN 1991-1-4 Annex F.5). Each bare point must equal the bare response of
    # a Mode built by hand with that frequency and damping (tmd.design.bare_response).
    damping = AerodynamicDamping(0.010, 0.002)
    points = sweep_structure_frequency(case, None, sweep_range=0.2, points=5,
                                       structure_damping_ratio=damping)
    m = case.mode
    for p in points:
        s = p["structure_frequency_factor"]
        zeta = 0.010 + 0.002 / s
        ref = bare_response(LoadedMode(Mode(s * m.frequency_hz, m.modal_mass_kg, zeta),
                                     case.spectrum, case.duration_s))
        assert p["peak_acceleration_m_s2"] == pytest.approx(ref.peak_acceleration_m_s2,
                                                            rel=1e-12)
        assert p["effective_damping_ratio"] == pytest.approx(zeta, rel=1e-15)
        assert p["peak_stroke_m"] is None


def test_damper_sweeps_follow_the_as_built_spring_and_dashpot(case, nominal):
    # Issue 4: a +/-10% spring and a +/-30% dashpot. With the mass kept, a
    # spring factor k'/k moves f_d by sqrt(k'/k) and, the dashpot kept,
    # zeta_d by 1/sqrt(k'/k) (hand formulas k = m w^2, c = 2 zeta m w).
    freq = sweep_damper_frequency(case, nominal.damper, spring_range=0.1, points=3)
    assert [p["damper_stiffness_factor"] for p in freq] == pytest.approx([0.9, 1.0, 1.1])
    assert [p["damper_frequency_factor"] for p in freq] == pytest.approx(
        [np.sqrt(0.9), 1.0, np.sqrt(1.1)], rel=1e-15)
    damp = sweep_damper_damping(case, nominal.damper, dashpot_range=0.3, points=3)
    assert [p["damper_damping_factor"] for p in damp] == pytest.approx([0.7, 1.0, 1.3])
    m = case.mode
    soft = TunedMassDamper(nominal.mass_ratio, nominal.frequency_ratio * np.sqrt(0.9),
                           nominal.damping_ratio / np.sqrt(0.9))
    assert soft.stiffness_n_per_m(m) == pytest.approx(0.9 * nominal.stiffness_n_per_m, rel=1e-13)
    assert soft.damping_n_s_per_m(m) == pytest.approx(nominal.damping_n_s_per_m, rel=1e-13)
    assert freq[0]["peak_acceleration_m_s2"] == pytest.approx(
        evaluate_tmd(case, soft).peak_acceleration_m_s2, rel=1e-10)
    weak = TunedMassDamper(nominal.mass_ratio, nominal.frequency_ratio,
                           0.7 * nominal.damping_ratio)
    assert damp[0]["peak_stroke_m"] == pytest.approx(evaluate_tmd(case, weak).peak_stroke_m,
                                                     rel=1e-10)


def test_band_maximum_finds_an_interior_worst_case(case):
    # A damper tuned low (f_d/f_s = 0.85) has its worst point inside the
    # +/-20% band (near s = 1.18). Reference: a dense numpy grid of 4001
    # points; the refined maximum must be at least the dense maximum (to the
    # dense grid's own curvature error, 1e-7 relative) and no larger than it
    # by more than that.
    damper = TunedMassDamper(0.03, 0.85, 0.06)
    worst = peak_acceleration_band_max(case, damper, 0.2)
    s = np.linspace(0.8, 1.2, 4001)
    dense = assess_structure_factors(case, damper, s)[0].peak_acceleration_m_s2
    assert 0.8 < worst.structure_frequency_factor < 1.2 - 1e-3
    assert worst.structure_frequency_factor == pytest.approx(s[np.argmax(dense)], abs=2e-4)
    assert worst.peak_acceleration_m_s2 == pytest.approx(dense.max(), rel=1e-7)
    assert worst.peak_acceleration_m_s2 >= dense.max() * (1 - 1e-9)


def test_factor_grid_always_holds_one():
    # Issue 4: the sweep grid always includes s = 1 exactly.
    for r, n in ((0.2, 41), (0.15, 40), (0.3, 7)):
        g = factor_grid(r, n)
        assert 1.0 in g and g[0] == pytest.approx(1 - r) and g[-1] == pytest.approx(1 + r)


def test_robust_design_meets_target_on_a_finer_grid(case, nominal, study):
    # Issue 4: the robust design meets the target at every point of a grid
    # finer than the optimiser used (41 points in the minimax tuning, here 801
    # points across the band, no tolerance: the search aims 1e-6 below the
    # target). It is not oversized: the worst point is within 1e-4 of the
    # target (least mass, as tmd.design.least_mass).
    r = study["band_design"]
    assert r["governed_by"] == "target" and r["meets_target_across_band"]
    damper = TunedMassDamper(r["mass_ratio"], r["frequency_ratio"], r["damping_ratio"])
    s = np.linspace(1 - BAND, 1 + BAND, 801)
    peaks = assess_structure_factors(case, damper, s)[0].peak_acceleration_m_s2
    assert peaks.max() <= TARGET
    assert peaks.max() == pytest.approx(TARGET, rel=1e-4)
    assert r["peak_acceleration_band_max_m_s2"] <= TARGET
    # Robustness costs mass, and the design meets the target at s = 1 with margin.
    assert r["mass_kg"] > nominal.mass_kg
    assert r["peak_acceleration_m_s2"] < TARGET
    summary = study["summary"]
    assert summary["robust_extra_mass_kg"] == pytest.approx(r["mass_kg"] - nominal.mass_kg,
                                                            rel=1e-12)
    assert summary["nominal_band_loss"] == pytest.approx(
        study["peak_acceleration_band_max_m_s2"] / nominal.peak_acceleration_m_s2 - 1, rel=1e-12)
    assert study["peak_acceleration_band_max_m_s2"] > TARGET


def test_zero_width_band_gives_the_nominal_design(case, nominal):
    # Issue 4: with a zero-width band the robust design equals the nominal one
    # (tmd.design.least_mass). The robust search aims 1e-6 below the target,
    # which at d ln(peak)/d ln(mu) ~ -0.22 costs ~5e-6 of the mass ratio:
    # rtol 2e-5. The tunings come from two SLSQP formulations of the same
    # optimum (flat there): rtol 1e-4.
    r = robust_least_mass(case, TARGET, 0.0, max_mass_ratio=0.05).design
    assert r.mass_ratio == pytest.approx(nominal.mass_ratio, rel=2e-5)
    assert r.frequency_ratio == pytest.approx(nominal.frequency_ratio, rel=1e-4)
    assert r.damping_ratio == pytest.approx(nominal.damping_ratio, rel=1e-4)


@pytest.mark.parametrize("mu", [0.01, 0.03])
def test_band_optimal_tuning_has_more_damper_damping(case, mu):
    # Published qualitative result: with uncertain structural properties,
    # increasing the TMD damping makes the system more robust (Hoang &
    # Warnitchai 2005, EESD 34:125-144, abstract). The minimax tuning over
    # s in [0.85, 1.15] must have more damper damping than the nominal
    # optimum (tmd.design.tune) and a worst case no worse than the nominal
    # tuning's over the same grid.
    grid = factor_grid(BAND, 41)
    band = tune_for_band(case, mu, grid)
    nominal = tune(case, mu)
    assert band.damping_ratio > 1.2 * nominal.damping_ratio
    nominal_damper = TunedMassDamper(mu, nominal.frequency_ratio, nominal.damping_ratio)
    nominal_worst = assess_structure_factors(case, nominal_damper, grid)[0]
    assert band.value < nominal_worst.peak_acceleration_m_s2.max()


def test_a_failing_mass_is_judged_on_the_free_optimum_a_lower_bound(case):
    # Constraining the stroke shrinks the feasible set, so the stroke-limited
    # minimax is at least the free one (a property of any constrained minimum).
    # A light damper at a tight stroke limit: the free optimum breaks the limit
    # and fails the target, so fails_above returns it as a lower bound; the full
    # solve (the reference) lies above it and fails too.
    grid = factor_grid(BAND, 21)
    mu, limit = 0.002, 0.05
    free = tune_for_band(case, mu, grid)
    full = tune_for_band(case, mu, grid, max_stroke_m=limit)
    bound = tune_for_band(case, mu, grid, max_stroke_m=limit, fails_above=TARGET)
    assert free.peak_stroke_m > limit and free.value > TARGET  # the premise of the check
    assert bound.lower_bound and not full.lower_bound
    assert bound.value == pytest.approx(free.value, rel=1e-12)
    assert bound.value <= full.value * (1 + 1e-9) and full.value > TARGET
    # A mass whose free optimum meets the value is solved in full, as without it.
    heavy = tune_for_band(case, 0.03, grid, max_stroke_m=0.6, fails_above=TARGET)
    assert not heavy.lower_bound
    assert heavy == tune_for_band(case, 0.03, grid, max_stroke_m=0.6)
