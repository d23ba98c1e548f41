"""TMD bank by the convex-concave procedure, checked against the spine and the engine."""

import numpy as np
import pytest

from tmd.dampers.absorber import Absorbers
from tmd.design import LoadedMode, least_mass
from tmd.performance import assess
from tmd.sizing.bank import BankSettings, size_tmd_bank
from tmd.spectra import WhiteSpectrum
from tmd.structure import Mode

# Fictional: a 0.2 Hz tower mode, 1e7 kg, 1% damping, band-limited white force.
CASE = LoadedMode(Mode(0.2, 1e7, 0.01), WhiteSpectrum(4e9, 0.02, 2.0), duration_s=600.0)
TARGET = 0.6 * float(CASE.assess(Absorbers.none()).peak_acceleration_m_s2)
STROKE = 1.5


def _recheck(iterate, factors):
    """Peak acceleration and stroke of an iterate by the engine, per scenario."""
    m = CASE.mode
    mass = np.asarray(iterate.mass_ratios) * m.modal_mass_kg
    used = mass > 0
    shape = (len(factors), int(used.sum()))
    absorbers = Absorbers.tuned_masses(np.broadcast_to(mass[used], shape),
                                       np.broadcast_to(np.asarray(iterate.frequency_hz)[used],
                                                       shape),
                                       np.broadcast_to(np.asarray(iterate.damping_ratio)[used],
                                                       shape))
    a = assess(np.asarray(factors) * m.frequency_hz, m.modal_mass_kg, m.damping_ratio,
               absorbers, CASE.spectrum, CASE.duration_s)
    return a.peak_acceleration_m_s2, a.peak_stroke_m


def test_single_damper_at_the_spine_tuning_gives_the_spine_least_mass():
    # Reference: tmd.design.least_mass (SLSQP tuning + brentq on the mass).
    spine = least_mass(CASE, TARGET, max_mass_ratio=0.1, max_stroke_m=STROKE).design
    bank = size_tmd_bank(CASE, TARGET, max_mass_ratio=0.1, max_stroke_m=STROKE,
                         frequency_ratios=[spine.frequency_ratio],
                         damping_ratios=[spine.damping_ratio])
    assert bank.meets_target
    assert len(bank.history) > 2  # the convex steps did the work, not the start
    assert bank.mass_ratio == pytest.approx(spine.mass_ratio, rel=0.01)  # issue: within 1%


def test_every_accepted_iterate_meets_the_target_and_mass_never_increases():
    bank = size_tmd_bank(CASE, TARGET, max_mass_ratio=0.1, max_stroke_m=STROKE,
                         settings=BankSettings(frequency_ratios=(0.92, 0.97, 1.02),
                                               damping_ratios=(0.05, 0.1)))
    assert bank.meets_target and len(bank.history) > 2
    masses = [it.mass_ratio for it in bank.history]
    assert all(b <= a for a, b in zip(masses, masses[1:], strict=False))
    for it in bank.history:
        peak, stroke = _recheck(it, [1.0])
        # engine re-check with its own grid and peak factor; 1e-9 = the acceptance tolerance
        assert float(peak.max()) <= TARGET * (1 + 1e-9)
        assert float(stroke.max()) <= STROKE * (1 + 1e-9)
    # a bank of spread dampers is no heavier than the single best TMD here
    spine = least_mass(CASE, TARGET, max_mass_ratio=0.1, max_stroke_m=STROKE).design
    assert bank.mass_ratio <= spine.mass_ratio * 1.01


def test_detuning_band_bank_meets_the_target_in_every_scenario():
    factors = (0.92, 1.0, 1.08)
    bank = size_tmd_bank(CASE, TARGET, max_mass_ratio=0.15, max_stroke_m=STROKE,
                         settings=BankSettings(frequency_ratios=(0.88, 0.96, 1.04),
                                               damping_ratios=(0.06, 0.12),
                                               frequency_factors=factors))
    assert bank.meets_target
    peak, stroke = _recheck(bank.history[-1], factors)
    assert np.all(peak <= TARGET * (1 + 1e-9))
    assert np.all(stroke <= STROKE * (1 + 1e-9))
    nominal = size_tmd_bank(CASE, TARGET, max_mass_ratio=0.15, max_stroke_m=STROKE,
                            settings=BankSettings(frequency_ratios=(0.88, 0.96, 1.04),
                                                  damping_ratios=(0.06, 0.12)))
    assert bank.mass_ratio > nominal.mass_ratio  # robustness costs mass


def test_infeasible_target_is_reported():
    bank = size_tmd_bank(CASE, 0.05 * TARGET, max_mass_ratio=0.02,
                         settings=BankSettings(frequency_ratios=(0.98,), damping_ratios=(0.05,)))
    assert not bank.meets_target and bank.governed_by == "mass"
    assert "no uniform scaling" in bank.message


def test_phantom_members_are_pruned_and_the_bank_rechecked(kestrel_case):
    # Issue 13, defect 13: on the Kestrel Point demo the bank listed members
    # of a fraction of a kilogram beside members of tens of tonnes. Members
    # below the stated share of the bank's mass are removed, the rest scaled
    # up until the engine passes, and the pruned bank is re-checked here by
    # the engine on its own (tmd.performance.assess).
    import warnings

    from tmd.jobs import loaded_mode_of

    loaded = loaded_mode_of(kestrel_case)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        bank = size_tmd_bank(loaded, 0.06, max_mass_ratio=0.05, max_stroke_m=1.2)
        # A share above the lighter member's forces a pruning on this demo.
        strict = size_tmd_bank(loaded, 0.06, max_mass_ratio=0.05, max_stroke_m=1.2,
                               settings=BankSettings(prune_share=0.45))
    for b, share in ((bank, 0.01), (strict, 0.45)):
        before = b.mass_kg.sum() + sum(p["mass_kg"] for p in b.pruned)
        assert all(p["mass_kg"] < share * before for p in b.pruned)
        assert np.all(b.mass_kg >= share * b.mass_kg.sum() * (1 - 1e-12))
        m = loaded.mode
        a = assess(m.frequency_hz, m.modal_mass_kg, m.damping_ratio, b.absorbers,
                   loaded.spectrum, loaded.duration_s, shape_factor=loaded.shape_factor)
        assert float(np.ravel(a.peak_acceleration_m_s2)[0]) <= 0.06
        assert float(np.max(a.peak_stroke_m)) <= 1.2 * (1 + 1e-9)  # the re-check's tolerance
    assert strict.pruned and "removed" in strict.message
    assert strict.mass_kg.size < bank.mass_kg.size


def test_the_convex_step_is_well_scaled_at_any_spectrum_range(kestrel_case):
    # Issue 13, defect 15 (root cause of a failed fix): with the Kestrel Point
    # load tabulated to 1 kHz, |Z / k_s| reached 1e7 at the top nodes while the
    # weights fell to 1e-30, and CLARABEL failed ("Solver 'CLARABEL' failed").
    # Each node's bound is now taken relative to |Z| at the current masses. The
    # two loads differ by about 1% in the acceleration's second moment (with the
    # demo table cut at 10 Hz; less than 0.1% where it continues as its f^-11/3
    # asymptote), so the two banks, both re-checked by the engine, must agree:
    # 0.5% in mass allows for that and for the convex-concave procedure stopping
    # at a relative decrease of 1e-4 per step on slightly different paths
    # (measured 0.15% and 0.03%).
    import dataclasses
    import warnings

    from tmd.jobs import loaded_mode_of
    from tmd.loads import modal_force_spectrum

    loaded = loaded_mode_of(kestrel_case)
    wide = dataclasses.replace(loaded, spectrum=modal_force_spectrum(
        kestrel_case.site, kestrel_case.building, 1.0, frequency_hz=np.geomspace(1e-4, 1e3, 400)))
    assert wide.spectrum.f_max_hz == 1e3
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        banks = [size_tmd_bank(lm, 0.06, max_mass_ratio=0.05, max_stroke_m=1.2)
                 for lm in (loaded, wide)]
    for bank, lm in zip(banks, (loaded, wide), strict=True):
        assert bank.meets_target and bank.governed_by == "target"
        m = lm.mode
        a = assess(m.frequency_hz, m.modal_mass_kg, m.damping_ratio, bank.absorbers,
                   lm.spectrum, lm.duration_s, shape_factor=lm.shape_factor)
        assert float(np.ravel(a.peak_acceleration_m_s2)[0]) <= 0.06
    assert banks[1].mass_ratio == pytest.approx(banks[0].mass_ratio, rel=5e-3)
